/* cli_grid.c — `bellcheck grid TASK`, and TASK inputs for every command that takes a MODEL (--cells, --scheme, ...). */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#define _GNU_SOURCE
#include "cli.h"

#include <getopt.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

static const char help[] =
    "usage: bellcheck grid TASK --cells N1xN2... [options]\n"
    "Builds the finite model of the continuous TASK (.task file; - = standard input) on a\n"
    "grid of equal cells over its state ranges and prints its size; -o writes it as a\n"
    "model that every command reads.  Probabilities are exact: count/N for sample and\n"
    "center, weights rounded to multiples of 2^-30 (summing to exactly 1) for interp.\n"
    "Nothing is random: the same TASK and options give the same model.\n\n"
    "options:\n"
    "  -o FILE, --output FILE  write the model (- = standard output)\n"
    "  --format F        bell (default: the .bell text format) or json (its JSON form)\n\n"
    BC_CLI_COMMON_HELP;

enum { OPT_OUTPUT = OPT_FIRST_COMMAND_OPTION, OPT_FORMAT };

int bc_cli_grid_option(bc_cli_common *c, int id, const char *arg)
{
    const char *why;
    long long v;
    switch (id) {
    case OPT_CELLS:
        if (bc_grid_parse_cells(arg, &c->grid, &why) < 0) {
            bc_cli_usage_error("", "--cells '%s': %s", arg, why);
            return -1;
        }
        break;
    case OPT_SCHEME:
        if (bc_scheme_parse(arg, &c->grid.scheme) < 0) {
            bc_cli_usage_error("", "--scheme expects sample, center or interp, got '%s'", arg);
            return -1;
        }
        break;
    case OPT_SAMPLES:
        if (bc_cli_long("", "--samples", arg, 1, 1000000, &v) < 0)
            return -1;
        c->grid.samples = (int32_t)v;
        break;
    case OPT_NOISE_SAMPLES:
        if (bc_cli_long("", "--noise-samples", arg, 1, 1000, &v) < 0)
            return -1;
        c->grid.noise_samples = (int32_t)v;
        break;
    default:
        return 0;
    }
    c->grid_given = 1;
    return 1;
}

int bc_cli_is_task(const char *path, const bc_cli_common *c)
{
    if (bc_task_path(path) || (c->grid_given && !strcmp(path, "-")))
        return 1;
    if (!c->grid_given)
        return 0;
    fprintf(stderr, "bellcheck: --cells, --scheme, --samples and --noise-samples apply to a "
                    "continuous TASK (a file ending in .task, or standard input); '%s' is read "
                    "as a model\n", path);
    return -1;
}

bc_model *bc_cli_load_task(const char *path, const bc_cli_common *c, bc_task **task_out)
{
    bc_diag d;
    bc_diag_init(&d);
    d.max_memory = c->max_memory;
    bc_task *t = bc_task_read_file(path, &d);
    bc_model *m = NULL;
    const char *label = strcmp(path, "-") ? path : "<stdin>";
    if (t && c->grid.n_dims == 0)
        bc_diag_add(&d, BC_ERROR, label, 0, 0, "a TASK needs its grid: give --cells with one "
                    "count per state variable (%d here), like --cells %s", (int)bc_task_n_vars(t),
                    bc_task_n_vars(t) == 1 ? "64" : bc_task_n_vars(t) == 2 ? "64x64" : "16x16x16");
    else if (t)
        m = bc_grid_model(t, &c->grid, &d);
    if (!m || !c->quiet)
        bc_diag_print(&d, stderr);
    bc_diag_free(&d);
    if (m && task_out)
        *task_out = t;
    else
        bc_task_free(t);
    return m;
}

int bc_cli_grid_from_agent(bc_cli_common *c, const char *path, const char *q_path)
{
    if (c->grid.n_dims || !q_path || !bc_task_path(path))
        return 0;
    FILE *f = fopen(q_path, "rb");
    char magic[6] = {0};
    int npy = f && fread(magic, 1, 6, f) == 6 && !memcmp(magic, "\x93NUMPY", 6);
    if (f)
        fclose(f);
    if (!npy)
        return 0; /* CSV and JSON name their states: the grid must come from --cells */
    bc_diag d;
    bc_diag_init(&d);
    int64_t shape[32];
    int ndim = 0, rc = bc_npy_shape(q_path, shape, &ndim, &d);
    bc_diag_print(&d, stderr);
    bc_diag_free(&d);
    if (rc < 0)
        return -1;
    if (ndim < 2 || ndim - 1 > BC_TASK_MAX_VARS)
        return 0; /* not a grid's shape: loading says that --cells is needed */
    for (int k = 0; k + 1 < ndim; k++) {
        if (shape[k] < 1 || shape[k] > INT32_MAX)
            return 0;
        c->grid.cells[k] = (int32_t)shape[k];
    }
    c->grid.n_dims = ndim - 1;
    return 0;
}

/* What goes into one output file of `grid`. */
typedef struct {
    const bc_model *m;
    const bc_grid *g;
    bc_scheme scheme;
    const char *source, *output;
} grid_result;

static int write_bell(FILE *f, const void *r)
{
    return bc_write_bell_text(((const grid_result *)r)->m, f);
}

static int write_json_model(FILE *f, const void *r)
{
    return bc_write_bell_json(((const grid_result *)r)->m, f);
}

static int write_report(FILE *f, const void *ctx)
{
    const grid_result *r = ctx;
    return bc_report_grid_json(f, r->m, r->g, r->scheme, r->source, r->output);
}

int bc_cli_grid(int argc, char **argv)
{
    static const struct option longopts[] = {BC_CLI_COMMON_LONGOPTS,
                                             {"output", required_argument, NULL, OPT_OUTPUT},
                                             {"format", required_argument, NULL, OPT_FORMAT},
                                             {NULL, 0, NULL, 0}};
    bc_cli_common c;
    memset(&c, 0, sizeof c);
    const char *output = NULL;
    int json = 0, id;
    opterr = 0;
    while ((id = getopt_long(argc, argv, "o:", longopts, NULL)) != -1) {
        if (id == OPT_HELP) {
            fputs(help, stdout);
            return BC_EXIT_OK;
        }
        int r = bc_cli_common_option(&c, id, optarg);
        if (r < 0)
            return BC_EXIT_USAGE;
        if (r > 0)
            continue;
        if (id == 'o' || id == OPT_OUTPUT)
            output = optarg;
        else if (id == OPT_FORMAT && (!strcmp(optarg, "bell") || !strcmp(optarg, "json")))
            json = !strcmp(optarg, "json");
        else if (id == OPT_FORMAT)
            return bc_cli_usage_error("grid", "--format expects bell or json, got '%s'", optarg);
        else
            return bc_cli_usage_error("grid", "unknown or incomplete option '%s' (see --help)",
                                      argv[optind - 1]);
    }
    if (optind != argc - 1)
        return bc_cli_usage_error("grid", "expected one TASK argument (see --help)");
    const char *path = argv[optind];
    if (output && c.json_path && !strcmp(output, "-") && !strcmp(c.json_path, "-"))
        return bc_cli_usage_error("grid", "only one output may go to standard output (-)");
    if (!bc_task_path(path) && strcmp(path, "-"))
        return bc_cli_usage_error("grid", "'%s' is not a TASK: a task file's name ends in .task",
                                  path);
    c.grid_given = 1;
    bc_task *t = NULL;
    bc_cli_catch_interrupt(); /* a large grid takes a while to build */
    bc_model *m = bc_cli_load_task(path, &c, &t);
    if (!m || bc_stop_requested()) {
        bc_model_free(m);
        bc_task_free(t);
        return bc_stop_requested() ? bc_cli_interrupted("grid", "the construction of the model", NAN)
                                   : BC_EXIT_USAGE;
    }
    bc_grid g;
    bc_diag d;
    bc_diag_init(&d);
    bc_grid_init(&g, t, &c.grid, &d); /* succeeded once already, in bc_grid_model */
    bc_diag_free(&d);
    grid_result res = {m, &g, c.grid.scheme, strcmp(path, "-") ? path : "<stdin>", output};
    int rc = BC_EXIT_OK;
    if (output && bc_cli_write_file(output, json ? write_json_model : write_bell, &res) < 0)
        rc = BC_EXIT_SOLVER;
    int text = bc_cli_text_wanted(&c) && !(output && !strcmp(output, "-"));
    if (rc == BC_EXIT_OK && text)
        bc_report_grid_text(stdout, m, &g, c.grid.scheme, res.source, output);
    if (rc == BC_EXIT_OK && c.json_path && bc_cli_write_file(c.json_path, write_report, &res) < 0)
        rc = BC_EXIT_SOLVER;
    bc_model_free(m);
    bc_task_free(t);
    return rc;
}
