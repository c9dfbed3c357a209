/* cli_solve.c — `bellcheck solve MODEL`: solve by one method (or all, --compare) and report. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#define _GNU_SOURCE
#include "cli.h"
#include "cli_pictures.h"

#include <getopt.h>
#include <string.h>

static const char help[] =
    "usage: bellcheck solve MODEL [options]\n"
    "Solves MODEL and prints the optimal value at the initial distribution, the bound\n"
    "that is proven on it, and the optimal policy.\n\n"
    "options:\n"
    "  --method M        vi (value iteration), pi (policy iteration),\n"
    "                    lp (linear programming, GLPK), backward (backward induction,\n"
    "                    for models with a horizon), exact (the automatic method, then\n"
    "                    policy iteration in exact rational arithmetic; the JSON report\n"
    "                    holds exact_values) or auto (default: the fastest method that\n"
    "                    proves its bound for this model)\n"
    "  --proof P         how the answer is proven: auto (default: exact rational check on\n"
    "                    small models, outward-rounded intervals on large ones), exact,\n"
    "                    interval, or off (numbers are then labelled as estimates)\n"
    "  --exact-solver S  linear algebra of the exact proof: auto (default), sparse\n"
    "                    (elimination in a fill-reducing order) or dense (p-adic\n"
    "                    lifting, FLINT)\n"
    "  --compare         solve with every method; exit 3 if they disagree beyond\n"
    "                    their bounds\n"
    "  --tol X           wanted bound on the error of every value (default 1e-9)\n"
    "  --max-iter N      limit on iterations / improvement steps\n"
    "  --max-seconds S   limit on the solve time\n"
    "  --show N          states listed in the text report (default 10)\n"
    "  --values-out FILE write state,value as CSV\n"
    "  --policy-out FILE write state,action as CSV\n\n"
    BC_CLI_PICTURES_HELP "\n"
    "A proof covers the model as written, not the physical system it describes.\n\n"
    BC_CLI_COMMON_HELP;

enum { OPT_METHOD = OPT_FIRST_COMMAND_OPTION, OPT_COMPARE, OPT_TOL, OPT_MAX_ITER, OPT_MAX_SECONDS,
       OPT_SHOW, OPT_VALUES_OUT, OPT_POLICY_OUT, OPT_PROOF, OPT_EXACT_SOLVER };

typedef struct {
    bc_cli_common c;
    bc_method method;
    int compare;
    bc_solve_opts o;
    bc_prove_opts proof;
    long long show;
    const char *values_out, *policy_out, *path;
    bc_cli_pictures pic;
} solve_args;

static int parse_args(int argc, char **argv, solve_args *a)
{
    static const struct option longopts[] = {
        BC_CLI_COMMON_LONGOPTS,
        BC_CLI_PICTURES_LONGOPTS,
        {"method", required_argument, NULL, OPT_METHOD},
        {"compare", no_argument, NULL, OPT_COMPARE},
        {"tol", required_argument, NULL, OPT_TOL},
        {"max-iter", required_argument, NULL, OPT_MAX_ITER},
        {"max-seconds", required_argument, NULL, OPT_MAX_SECONDS},
        {"show", required_argument, NULL, OPT_SHOW},
        {"values-out", required_argument, NULL, OPT_VALUES_OUT},
        {"policy-out", required_argument, NULL, OPT_POLICY_OUT},
        {"proof", required_argument, NULL, OPT_PROOF},
        {"exact-solver", required_argument, NULL, OPT_EXACT_SOLVER},
        {NULL, 0, NULL, 0}};
    long long v;
    int id;
    opterr = 0;
    while ((id = getopt_long(argc, argv, "", longopts, NULL)) != -1) {
        int r = bc_cli_common_option(&a->c, id, optarg);
        if (r < 0)
            return BC_EXIT_USAGE;
        if (r > 0)
            continue;
        r = bc_cli_pictures_option(&a->pic, "solve", id, optarg);
        if (r < 0)
            return BC_EXIT_USAGE;
        if (r > 0)
            continue;
        switch (id) {
        case OPT_HELP: fputs(help, stdout); return -1;
        case OPT_METHOD:
            if (bc_method_parse(optarg, &a->method) < 0)
                return bc_cli_usage_error("solve", "--method expects vi, pi, lp, backward, exact or auto, got '%s'", optarg);
            break;
        case OPT_PROOF:
            if (bc_cli_prove_mode("solve", optarg, &a->proof.mode) < 0)
                return BC_EXIT_USAGE;
            break;
        case OPT_EXACT_SOLVER:
            if (!strcmp(optarg, "auto") || !strcmp(optarg, "sparse") || !strcmp(optarg, "dense"))
                a->proof.exact.solver = optarg[0] == 'a' ? BC_EXACT_LU_AUTO
                                      : optarg[0] == 's' ? BC_EXACT_LU_SPARSE : BC_EXACT_LU_DENSE;
            else
                return bc_cli_usage_error("solve", "--exact-solver expects auto, sparse or dense, got '%s'", optarg);
            break;
        case OPT_COMPARE: a->compare = 1; break;
        case OPT_TOL:
            if (bc_cli_double("solve", "--tol", optarg, 1e-15, 1e6, &a->o.tol) < 0)
                return BC_EXIT_USAGE;
            break;
        case OPT_MAX_ITER:
            if (bc_cli_long("solve", "--max-iter", optarg, 1, INT64_MAX, &v) < 0)
                return BC_EXIT_USAGE;
            a->o.max_iter = v;
            break;
        case OPT_MAX_SECONDS:
            if (bc_cli_double("solve", "--max-seconds", optarg, 1e-3, 1e9, &a->o.max_seconds) < 0)
                return BC_EXIT_USAGE;
            break;
        case OPT_SHOW:
            if (bc_cli_long("solve", "--show", optarg, 0, INT32_MAX, &a->show) < 0)
                return BC_EXIT_USAGE;
            break;
        case OPT_VALUES_OUT: a->values_out = optarg; break;
        case OPT_POLICY_OUT: a->policy_out = optarg; break;
        default:
            return bc_cli_usage_error("solve", "unknown or incomplete option '%s' (see --help)",
                                      argv[optind - 1]);
        }
    }
    if (optind != argc - 1)
        return bc_cli_usage_error("solve", "expected one MODEL argument (see --help)");
    if (a->compare && a->method != BC_METHOD_AUTO)
        return bc_cli_usage_error("solve", "--compare runs every method; do not combine it with --method");
    if (a->compare && (a->pic.svg_dir || a->pic.html_path))
        return bc_cli_usage_error("solve", "--svg and --html picture one solve; do not combine them with --compare");
    int json_stdout = a->c.json_path && !strcmp(a->c.json_path, "-");
    if ((a->values_out && !strcmp(a->values_out, "-") && (json_stdout || (a->policy_out && !strcmp(a->policy_out, "-")))) ||
        (a->policy_out && !strcmp(a->policy_out, "-") && json_stdout))
        return bc_cli_usage_error("solve", "only one output may go to standard output (-)");
    a->path = argv[optind];
    return 0;
}

/* The output files of one run: all are written to temporaries first and
 * renamed into place only when every one of them succeeded. */
typedef struct {
    const char *path;
    char kind; /* 'j' JSON report, 'v' values CSV, 'p' policy CSV */
    bc_out out;
} output;

static int write_one(output *o, const bc_model *m, const bc_solution *sol,
                     const bc_proof_result *pr, const bc_comparison *cmp)
{
    switch (o->kind) {
    case 'j': return cmp ? bc_report_compare_json(o->out.f, m, cmp) : bc_report_solve_json(o->out.f, m, sol, pr);
    case 'v': return bc_write_values_csv(o->out.f, m, sol);
    default: return bc_write_policy_csv(o->out.f, m, sol);
    }
}

/* Writes every requested output, or none; 0, or -1 after printing why. */
static int write_outputs(const solve_args *a, const bc_model *m, const bc_solution *sol,
                         const bc_proof_result *pr, const bc_comparison *cmp)
{
    output outs[3];
    int n = 0;
    if (a->c.json_path)
        outs[n++] = (output){a->c.json_path, 'j', {0}};
    if (a->values_out && sol)
        outs[n++] = (output){a->values_out, 'v', {0}};
    if (a->policy_out && sol)
        outs[n++] = (output){a->policy_out, 'p', {0}};
    bc_diag d;
    bc_diag_init(&d);
    int k = 0, ok = 1;
    for (; k < n && ok; k++)
        ok = bc_out_open(&outs[k].out, outs[k].path, &d) == 0;
    if (!ok)
        k--; /* outs[k - 1] failed to open and holds nothing */
    for (int i = 0; i < k && ok; i++)
        if (write_one(&outs[i], m, sol, pr, cmp) < 0) {
            bc_diag_add(&d, BC_ERROR, outs[i].path, 0, 0, "write error");
            ok = 0;
        }
    if (ok && bc_stop_requested())
        ok = 0; /* Ctrl-C came while writing: nothing is committed (the caller says so) */
    for (int i = 0; i < k; i++) {
        if (ok)
            ok = bc_out_commit(&outs[i].out, &d) == 0;
        else
            bc_out_abort(&outs[i].out);
    }
    bc_diag_print(&d, stderr);
    bc_diag_free(&d);
    return ok ? 0 : -1;
}

static int run_compare(const solve_args *a, const bc_model *m)
{
    bc_comparison cmp;
    if (bc_compare(m, &a->o, &cmp) < 0) {
        bc_comparison_free(&cmp);
        fprintf(stderr, "bellcheck solve: out of memory\n");
        return BC_EXIT_SOLVER;
    }
    if (bc_stop_requested()) { /* the best bound any method proved before it stopped */
        const bc_solution *best = NULL;
        for (int i = 0; i < cmp.n; i++)
            if (cmp.sol[i].bound >= 0 && (!best || cmp.sol[i].bound < best->bound))
                best = &cmp.sol[i];
        int rc = best ? bc_cli_interrupted_solve("solve", best)
                      : bc_cli_interrupted("solve", "the comparison of methods", -1);
        bc_comparison_free(&cmp);
        return rc;
    }
    if (bc_cli_text_wanted(&a->c))
        bc_report_compare_text(stdout, m, &cmp);
    int rc = cmp.agree ? BC_EXIT_OK : BC_EXIT_SOLVER;
    /* The CSV outputs come from the first method that solved the model. */
    const bc_solution *best = NULL;
    for (int i = 0; i < cmp.n && !best; i++)
        if (cmp.sol[i].status == BC_SOLVE_OK)
            best = &cmp.sol[i];
    if (rc == BC_EXIT_OK && write_outputs(a, m, best, NULL, &cmp) < 0)
        rc = bc_stop_requested() ? bc_cli_interrupted("solve", "writing the outputs", -1)
                                 : BC_EXIT_SOLVER;
    bc_comparison_free(&cmp);
    return rc;
}

static int run_one(const solve_args *a, const bc_model *m)
{
    bc_solution sol;
    bc_solution_init(&sol);
    bc_prove_opts po = a->proof;
    bc_method method = a->method;
    if (method == BC_METHOD_EXACT) { /* the float solve, then an exact-only proof */
        method = BC_METHOD_AUTO;
        po.mode = BC_PROVE_EXACT;
    }
    if (a->o.max_seconds > 0)
        po.exact.max_seconds = a->o.max_seconds;
    bc_solve_status st = bc_solve(m, method, &a->o, &sol);
    bc_proof_result pr;
    memset(&pr, 0, sizeof pr);
    int proved = st == BC_SOLVE_OK ? bc_prove_solution(m, &sol, &po, &pr) : 0;
    if (st == BC_SOLVE_INTERRUPTED || bc_stop_requested()) { /* Ctrl-C: no report, no file */
        int rc = bc_cli_interrupted_solve("solve", &sol);
        bc_proof_result_free(&pr);
        bc_solution_free(&sol);
        return rc;
    }
    if (proved < 0) {
        fprintf(stderr, "bellcheck solve: the %s proof failed: %s\n",
                po.mode == BC_PROVE_EXACT ? "exact" : "interval", pr.message);
        st = BC_SOLVE_FAILED;
    }
    if (st == BC_SOLVE_OK && a->method == BC_METHOD_EXACT) {
        sol.method = BC_METHOD_EXACT;
        sol.seconds += pr.seconds; /* the method's time includes its exact part */
    }
    if (bc_cli_text_wanted(&a->c))
        bc_report_solve_text(stdout, m, &sol, st == BC_SOLVE_OK ? &pr : NULL, (int32_t)a->show);
    int rc = st == BC_SOLVE_OK ? BC_EXIT_OK : BC_EXIT_SOLVER;
    if (st != BC_SOLVE_OK && proved >= 0)
        fprintf(stderr, "bellcheck solve: %s: %s\n", bc_method_name(sol.method), sol.message);
    /* A failed solve writes nothing: its numbers are not an answer. */
    if (st == BC_SOLVE_OK && write_outputs(a, m, &sol, &pr, NULL) < 0)
        rc = bc_stop_requested() ? bc_cli_interrupted_solve("solve", &sol) : BC_EXIT_SOLVER;
    if (st == BC_SOLVE_OK && rc == BC_EXIT_OK &&
        bc_cli_pictures_solve(&a->pic, m, &sol, &pr, (int32_t)a->show) < 0)
        rc = BC_EXIT_SOLVER;
    bc_proof_result_free(&pr);
    bc_solution_free(&sol);
    return rc;
}

int bc_cli_solve(int argc, char **argv)
{
    solve_args a;
    memset(&a, 0, sizeof a);
    bc_solve_opts_default(&a.o);
    bc_prove_opts_default(&a.proof);
    a.show = 10;
    int rc = parse_args(argc, argv, &a);
    if (rc != 0)
        return rc < 0 ? BC_EXIT_OK : rc;
    if (a.c.threads)
        a.o.threads = a.c.threads;
    bc_cli_catch_interrupt();
    bc_model *m = bc_cli_load_pictured(a.path, &a.c, &a.pic, "solve");
    if (!m)
        return bc_stop_requested() ? bc_cli_interrupted("solve", "the construction of the model", -1)
                                   : BC_EXIT_USAGE;
    int ok = bc_cli_model_usable(m, a.path);
    if (ok > 0 && m->horizon > 0 && a.method != BC_METHOD_AUTO && a.method != BC_METHOD_BACKWARD &&
        a.method != BC_METHOD_EXACT) {
        bc_cli_usage_error("solve", "the model has a horizon of %d decisions, which only backward "
                                    "induction solves: use --method backward, exact or auto",
                           (int)m->horizon);
        ok = 0;
    }
    if (ok > 0 && m->horizon == 0 && a.method == BC_METHOD_BACKWARD) {
        bc_cli_usage_error("solve", "--method backward needs a model with a `horizon`");
        ok = 0;
    }
    if (ok <= 0)
        rc = ok < 0 ? BC_EXIT_SOLVER : BC_EXIT_USAGE;
    else
        rc = a.compare ? run_compare(&a, m) : run_one(&a, m);
    bc_model_free(m);
    bc_cli_pictures_free(&a.pic);
    return rc;
}
