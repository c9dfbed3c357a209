/* cli_refine.c — `bellcheck refine TASK --cells A,B,C`: a grid-refinement study of a continuous task. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#define _GNU_SOURCE
#include "cli.h"

#include <getopt.h>
#include <math.h>
#include <string.h>

static const char help[] =
    "usage: bellcheck refine TASK --cells A,B,... [options]\n"
    "Lays each grid of --cells over the continuous TASK (coarsest first, like\n"
    "16x16,32x32,64x64), solves and proves its finite model, and prints per grid: the\n"
    "optimum at the initial distribution with its proof, the change from the previous\n"
    "grid, the observed order of convergence and a Richardson-extrapolated estimate of\n"
    "the limit (from three grids on), and the return of that grid's optimal policy\n"
    "simulated in the task itself with its 95% confidence interval, paired with the\n"
    "previous grid's policy on the same episodes: does a finer grid give a better\n"
    "controller?\n\n"
    "options:\n"
    "  --cells A,B,...   the grids, comma-separated, each with more cells than the one\n"
    "                    before (the counts of one grid are joined by x)\n"
    "  --episodes N      episodes simulated per grid (default 1000; at most 100000000)\n"
    "  --proof P         how each optimum is proven, as for solve: auto (default), exact,\n"
    "                    interval or off (the figures are then labelled as estimates)\n"
    "  --max-seconds S   limit on each grid's solve and on its exact proof\n"
    "  --seed N          the simulations' seed; every grid meets the same episodes\n"
    "  --svg DIR         write convergence.svg (values and changes against cell size)\n"
    "                    and trajectories.svg (8 simulated episodes over the finest\n"
    "                    grid) into DIR, all files or none\n"
    "  --html FILE       write one self-contained HTML page: the verdict, the tables\n"
    "                    of grids with their proofs, and both pictures\n"
    "  --slice X[,Y]     the variables drawn across and up in the trajectories\n"
    "                    (default: the first two; needs --svg or --html)\n\n"
    "Exit status 2 when a grid's model is unusable or a simulation step fails, 3 when a\n"
    "solver fails; the report still shows every grid.\n"
    "A simulation measures the task as its formulas describe it, not the physical machine.\n\n"
    BC_CLI_COMMON_HELP;

#define MAX_GRIDS 32

enum { OPT_EPISODES = OPT_FIRST_COMMAND_OPTION, OPT_PROOF, OPT_MAX_SECONDS, OPT_SVG_DIR,
       OPT_SLICE_VARS, OPT_HTML_PAGE };

typedef struct {
    bc_cli_common c;
    const char *path;
    bc_grid_opts grids[MAX_GRIDS];
    int32_t n_grids;
    bc_refine_opts o;
    const char *svg_dir;   /* --svg DIR */
    const char *html_path; /* --html FILE */
    const char *slice;     /* --slice X[,Y] */
} refine_args;

/* "16x16,32x32,..." into a->grids; 0, or the exit status after printing. */
static int parse_cells_list(refine_args *a, const char *arg)
{
    char buf[1024];
    if (strlen(arg) >= sizeof buf)
        return bc_cli_usage_error("refine", "--cells: the list is too long");
    strcpy(buf, arg);
    a->n_grids = 0;
    char *save = NULL;
    for (char *p = strtok_r(buf, ",", &save); p; p = strtok_r(NULL, ",", &save)) {
        const char *why;
        if (a->n_grids == MAX_GRIDS)
            return bc_cli_usage_error("refine", "--cells: at most %d grids", MAX_GRIDS);
        bc_grid_opts *g = &a->grids[a->n_grids];
        bc_grid_opts_default(g);
        if (bc_grid_parse_cells(p, g, &why) < 0)
            return bc_cli_usage_error("refine", "--cells '%s': %s", p, why);
        a->n_grids++;
    }
    if (a->n_grids == 0 || arg[0] == ',' || arg[strlen(arg) - 1] == ',' || strstr(arg, ",,"))
        return bc_cli_usage_error("refine", "--cells expects grids joined by commas, like "
                                  "16x16,32x32,64x64, got '%s'", arg);
    return 0;
}

/* The grids go from coarse to fine, all with the same number of counts. */
static int check_grids(const refine_args *a)
{
    if (a->n_grids < 2)
        return bc_cli_usage_error("refine", "--cells: give at least two grids, coarsest first "
                                  "(like 16x16,32x32,64x64)");
    double prev = 0;
    for (int32_t k = 0; k < a->n_grids; k++) {
        double cells = 1;
        for (int32_t j = 0; j < a->grids[k].n_dims; j++)
            cells *= a->grids[k].cells[j];
        if (a->grids[k].n_dims != a->grids[0].n_dims)
            return bc_cli_usage_error("refine", "--cells: every grid needs the same number of "
                                      "counts (one per state variable)");
        if (cells <= prev)
            return bc_cli_usage_error("refine", "--cells: each grid must have more cells than "
                                      "the one before it (grid %d does not)", (int)k + 1);
        prev = cells;
    }
    return 0;
}

static int command_option(refine_args *a, int id, const char *arg, const char *word)
{
    long long v;
    switch (id) {
    case OPT_CELLS: return parse_cells_list(a, arg);
    case OPT_EPISODES:
        if (bc_cli_long("refine", "--episodes", arg, 1, 100000000, &v) < 0)
            return BC_EXIT_USAGE;
        a->o.rollout.episodes = v;
        return 0;
    case OPT_PROOF:
        return bc_cli_prove_mode("refine", arg, &a->o.prove.mode) < 0 ? BC_EXIT_USAGE : 0;
    case OPT_SVG_DIR:
        if (!strcmp(arg, "-") || !arg[0])
            return bc_cli_usage_error("refine", "--svg writes files into a directory; give its name");
        a->svg_dir = arg;
        a->o.n_trajectories = 8; /* drawn over the finest grid's plane */
        return 0;
    case OPT_HTML_PAGE:
        if (!strcmp(arg, "-") || !arg[0])
            return bc_cli_usage_error("refine", "--html writes a file; give its name (standard "
                                      "output carries the text report)");
        a->html_path = arg;
        a->o.n_trajectories = 8;
        return 0;
    case OPT_SLICE_VARS:
        a->slice = arg;
        return 0;
    case OPT_MAX_SECONDS:
        if (bc_cli_double("refine", "--max-seconds", arg, 1e-3, 1e9, &a->o.solve.max_seconds) < 0)
            return BC_EXIT_USAGE;
        a->o.prove.exact.max_seconds = a->o.solve.max_seconds;
        return 0;
    default:
        return bc_cli_usage_error("refine", "unknown or incomplete option '%s' (see --help)", word);
    }
}

static int parse_args(int argc, char **argv, refine_args *a)
{
    static const struct option longopts[] = {
        BC_CLI_COMMON_LONGOPTS,
        {"episodes", required_argument, NULL, OPT_EPISODES},
        {"proof", required_argument, NULL, OPT_PROOF},
        {"max-seconds", required_argument, NULL, OPT_MAX_SECONDS},
        {"svg", required_argument, NULL, OPT_SVG_DIR},
        {"slice", required_argument, NULL, OPT_SLICE_VARS},
        {"html", required_argument, NULL, OPT_HTML_PAGE},
        {NULL, 0, NULL, 0}};
    int id;
    opterr = 0;
    while ((id = getopt_long(argc, argv, "", longopts, NULL)) != -1) {
        if (id == OPT_HELP) {
            fputs(help, stdout);
            return -1;
        }
        int r = id == OPT_CELLS ? 0 : bc_cli_common_option(&a->c, id, optarg);
        if (r < 0)
            return BC_EXIT_USAGE;
        if (r == 0 && command_option(a, id, optarg, argv[optind - 1]) != 0)
            return BC_EXIT_USAGE;
    }
    if (optind != argc - 1)
        return bc_cli_usage_error("refine", "expected one TASK argument (see --help)");
    a->path = argv[optind];
    if (!bc_task_path(a->path) && strcmp(a->path, "-"))
        return bc_cli_usage_error("refine", "'%s' is not a TASK: refine studies a continuous "
                                  "task (a file ending in .task)", a->path);
    if (a->n_grids == 0)
        return bc_cli_usage_error("refine", "give the grids with --cells, coarsest first (like "
                                  "--cells 16x16,32x32,64x64)");
    if (check_grids(a) != 0)
        return BC_EXIT_USAGE;
    if (a->slice && !a->svg_dir && !a->html_path)
        return bc_cli_usage_error("refine", "--slice chooses the plane of the trajectories: give "
                                  "--svg or --html");
    for (int32_t k = 0; k < a->n_grids; k++) { /* the other grid options apply to every grid */
        a->grids[k].scheme = a->c.grid.scheme;
        a->grids[k].samples = a->c.grid.samples;
        a->grids[k].noise_samples = a->c.grid.noise_samples;
    }
    a->o.rollout.seed = (uint64_t)a->c.seed;
    a->o.rollout.threads = a->c.threads;
    a->o.solve.threads = a->c.threads;
    return 0;
}

typedef struct {
    const bc_task *t;
    const bc_refine *r;
    const bc_refine_opts *o;
    const char *source;
    const char *slice;
} refine_report;

static int write_json(FILE *f, const void *ctx)
{
    const refine_report *x = ctx;
    return bc_report_refine_json(f, x->t, x->r, x->o, x->source);
}

static int write_html(FILE *f, const void *ctx)
{
    const refine_report *x = ctx;
    return bc_report_html_refine(f, x->t, x->r, x->o, x->source, x->slice);
}

/* A --slice that names no variable of the task is refused before the study
 * runs (its pictures come last).  0, or the exit status after printing. */
static int check_slice(const refine_args *a, const bc_task *t)
{
    if (!a->slice)
        return 0;
    bc_layout l;
    char why[400];
    int rc = bc_layout_task(&l, t, &a->grids[0], NULL, a->slice, why, sizeof why);
    bc_layout_free(&l);
    return rc < 0 ? bc_cli_usage_error("refine", "--slice: %s", why) : 0;
}

/* The exit status of a study: 3 if a solver failed, else 2 if a grid was unusable or a simulation failed. */
static int study_status(const bc_refine *r)
{
    int rc = BC_EXIT_OK;
    for (int32_t k = 0; k < r->n_levels; k++) {
        if (r->level[k].status == BC_REFINE_SOLVER)
            return BC_EXIT_SOLVER;
        if (r->level[k].status != BC_REFINE_OK)
            rc = BC_EXIT_USAGE;
    }
    return rc;
}

/* After Ctrl-C: the grid that was cut short and what its solve had proven. */
static int interrupted(const bc_refine *r)
{
    char what[400];
    int32_t k = 0; /* the first grid without a solution */
    while (k + 1 < r->n_levels && r->level[k].status == BC_REFINE_OK && r->level[k].values)
        k++;
    const char *state = k < r->n_levels && r->level[k].message[0] ? r->level[k].message
                                                                  : "building its model";
    snprintf(what, sizeof what, "grid %d of the study (%.300s)", (int)k + 1, state);
    return bc_cli_interrupted("refine", what, NAN); /* the grid's message holds its bound */
}

int bc_cli_refine(int argc, char **argv)
{
    refine_args a;
    memset(&a, 0, sizeof a);
    a.c.seed = 1;
    a.c.threads = 1;
    bc_refine_opts_default(&a.o);
    int rc = parse_args(argc, argv, &a);
    if (rc != 0)
        return rc < 0 ? BC_EXIT_OK : rc;
    bc_diag d;
    bc_diag_init(&d);
    d.max_memory = a.c.max_memory;
    bc_cli_catch_interrupt();
    bc_task *t = bc_task_read_file(a.path, &d);
    const char *source = strcmp(a.path, "-") ? a.path : "<stdin>";
    bc_refine r;
    memset(&r, 0, sizeof r);
    if (!t)
        rc = BC_EXIT_USAGE;
    else if ((rc = check_slice(&a, t)) != 0)
        ;
    else if (bc_refine_run(t, a.grids, a.n_grids, &a.o, &r, &d) < 0)
        rc = BC_EXIT_USAGE;
    if (t && bc_stop_requested()) { /* Ctrl-C: no report, no file */
        bc_diag_free(&d);
        rc = interrupted(&r);
    }
    bc_diag_print(&d, stderr);
    bc_diag_free(&d);
    if (rc == BC_EXIT_OK) {
        for (int32_t k = 0; k < r.n_levels; k++)
            if (r.level[k].status != BC_REFINE_OK)
                fprintf(stderr, "bellcheck refine: grid %d: %s\n", (int)k + 1, r.level[k].message);
        if (bc_cli_text_wanted(&a.c))
            bc_report_refine_text(stdout, t, &r, &a.o, source);
        refine_report x = {t, &r, &a.o, source, a.slice};
        rc = study_status(&r);
        if (a.c.json_path && bc_cli_write_file(a.c.json_path, write_json, &x) < 0)
            rc = BC_EXIT_SOLVER;
        if (a.svg_dir) {
            bc_diag_init(&d);
            if (bc_report_svg_refine(a.svg_dir, t, &r, a.slice, &d) < 0)
                rc = BC_EXIT_SOLVER;
            bc_diag_print(&d, stderr);
            bc_diag_free(&d);
        }
        if (a.html_path && bc_cli_write_file(a.html_path, write_html, &x) < 0)
            rc = BC_EXIT_SOLVER;
    }
    bc_refine_free(&r);
    bc_task_free(t);
    return rc;
}
