/* cli_rollout.c — `bellcheck rollout TASK --q FILE | --policy FILE`: simulate a learned agent in the continuous task. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#define _GNU_SOURCE
#include "cli.h"

#include <getopt.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

static const char help[] =
    "usage: bellcheck rollout TASK (--q FILE | --policy FILE) [options]\n"
    "Simulates a learned agent in the continuous TASK itself (its formulas, not a grid\n"
    "model): each episode starts from the task's initial distribution; every step looks\n"
    "up the cell holding the state and takes the agent's action there (greedy from a\n"
    "Q-table), until `stop` holds or the task's `limit` is reached.  Prints the mean\n"
    "return with its 95% confidence interval, the share of episodes that stop, and\n"
    "percentiles of their length.\n\n"
    "the agent and the simulation:\n"
    "  --q FILE          Q-table over the grid: NPY of shape (N1, ..., Nk, actions), whose\n"
    "                    shape gives the grid, or any Q-table format with --cells\n"
    "  --policy FILE     a policy over the grid (with --cells); stochastic ones are sampled\n"
    "  --episodes N      episodes to simulate (default 1000; at most 100000000)\n"
    "  --against CELLS   also simulate the optimal policy of the grid CELLS (a finer one,\n"
    "                    say) on the same start states and noise, and estimate the\n"
    "                    agent's regret from the paired differences\n"
    "  --seed N          episode e draws from its own stream, a function of N and e: the\n"
    "                    same seed gives the same results whatever --threads says\n\n"
    "A simulation measures the task as its formulas describe it, not the physical machine.\n\n"
    BC_CLI_COMMON_HELP;

enum { OPT_Q = OPT_FIRST_COMMAND_OPTION, OPT_POLICY, OPT_EPISODES, OPT_AGAINST };

typedef struct {
    bc_cli_common c;
    const char *q_path, *policy_path, *path;
    long long episodes;
    bc_grid_opts against;  /* n_dims 0: no --against */
} rollout_args;

static int parse_args(int argc, char **argv, rollout_args *a)
{
    static const struct option longopts[] = {
        BC_CLI_COMMON_LONGOPTS,
        {"q", required_argument, NULL, OPT_Q},
        {"policy", required_argument, NULL, OPT_POLICY},
        {"episodes", required_argument, NULL, OPT_EPISODES},
        {"against", required_argument, NULL, OPT_AGAINST},
        {NULL, 0, NULL, 0}};
    const char *why;
    int id;
    opterr = 0;
    while ((id = getopt_long(argc, argv, "", longopts, NULL)) != -1) {
        if (id == OPT_HELP) {
            fputs(help, stdout);
            return -1;
        }
        int r = bc_cli_common_option(&a->c, id, optarg);
        if (r < 0)
            return BC_EXIT_USAGE;
        if (r > 0)
            continue;
        if (id == OPT_Q)
            a->q_path = optarg;
        else if (id == OPT_POLICY)
            a->policy_path = optarg;
        else if (id == OPT_EPISODES) {
            if (bc_cli_long("rollout", "--episodes", optarg, 1, 100000000, &a->episodes) < 0)
                return BC_EXIT_USAGE;
        } else if (id == OPT_AGAINST) {
            if (bc_grid_parse_cells(optarg, &a->against, &why) < 0)
                return bc_cli_usage_error("rollout", "--against '%s': %s", optarg, why);
        } else
            return bc_cli_usage_error("rollout", "unknown or incomplete option '%s' (see --help)",
                                      argv[optind - 1]);
    }
    if (optind != argc - 1)
        return bc_cli_usage_error("rollout", "expected one TASK argument (see --help)");
    if (!a->q_path == !a->policy_path)
        return bc_cli_usage_error("rollout", "give the agent as exactly one of --q FILE or --policy FILE");
    a->path = argv[optind];
    if (!bc_task_path(a->path) && strcmp(a->path, "-"))
        return bc_cli_usage_error("rollout", "'%s' is not a TASK: rollout simulates a continuous "
                                  "task (a file ending in .task)", a->path);
    if (!strcmp(a->path, "-") && ((a->q_path && !strcmp(a->q_path, "-")) ||
                                  (a->policy_path && !strcmp(a->policy_path, "-"))))
        return bc_cli_usage_error("rollout", "the TASK and the agent cannot both come from "
                                  "standard input");
    return 0;
}

/* The agent's controller on the grid model m; 0, or -1 after printing why. */
static int load_agent(const rollout_args *a, const bc_task *t, const bc_model *m, bc_grid_policy *gp)
{
    bc_diag d;
    bc_diag_init(&d);
    d.max_memory = a->c.max_memory;
    bc_qtable *q = NULL;
    bc_policy *p = NULL;
    if (a->q_path)
        q = bc_read_qtable(a->q_path, m, BC_MISSING_ERROR, &d);
    else
        p = bc_read_policy(a->policy_path, m, BC_MISSING_ERROR, &d);
    int rc = -1;
    if (q)
        rc = bc_grid_policy_from_q(gp, t, &a->c.grid, m, q, &d);
    else if (p)
        rc = bc_grid_policy_from_policy(gp, t, &a->c.grid, m, p, &d);
    if (rc < 0 || !a->c.quiet)
        bc_diag_print(&d, stderr);
    bc_diag_free(&d);
    bc_qtable_free(q);
    bc_policy_free(p);
    return rc;
}

/* The optimal controller of the --against grid.  0; -1 bad input (printed); -2 the solver
 * failed; -3 a stop request ended the grid's construction or its solve (*stopped says which). */
static int load_against(const rollout_args *a, const bc_task *t, bc_grid_policy *gp,
                        const char **stopped)
{
    bc_grid_opts o = a->c.grid;
    o.n_dims = a->against.n_dims;
    memcpy(o.cells, a->against.cells, sizeof o.cells);
    bc_diag d;
    bc_diag_init(&d);
    bc_model *m = bc_grid_model(t, &o, &d);
    bc_diag_print(&d, stderr);
    bc_diag_free(&d);
    *stopped = "the construction of the --against grid's model";
    if (!m)
        return bc_stop_requested() ? -3 : -1;
    char label[512];
    snprintf(label, sizeof label, "%s (the --against grid)", strcmp(a->path, "-") ? a->path : "<stdin>");
    int rc = bc_cli_model_usable(m, label) > 0 ? 0 : -1;
    bc_solution sol;
    bc_solution_init(&sol);
    bc_solve_opts so;
    bc_solve_opts_default(&so);
    so.threads = a->c.threads;
    if (rc == 0 && bc_solve(m, BC_METHOD_AUTO, &so, &sol) != BC_SOLVE_OK) {
        *stopped = "the solve of the --against grid's model";
        if (bc_stop_requested())
            rc = -3;
        else {
            fprintf(stderr, "bellcheck rollout: the --against grid: %s: %s\n",
                    bc_method_name(sol.method), sol.message);
            rc = -2;
        }
    }
    if (rc == 0) {
        bc_diag_init(&d);
        rc = bc_grid_policy_from_pairs(gp, t, &o, m, sol.policy, &d) < 0 ? -2 : 0;
        bc_diag_print(&d, stderr);
        bc_diag_free(&d);
    }
    bc_solution_free(&sol);
    bc_model_free(m);
    return rc;
}

/* What the JSON writer needs. */
typedef struct {
    const bc_task *t;
    const bc_rollout_result *r;
    const bc_grid_policy *agent, *against;
    const bc_rollout_opts *o;
    const char *source, *agent_path;
} rollout_report;

static int write_json(FILE *f, const void *ctx)
{
    const rollout_report *x = ctx;
    return bc_report_rollout_json(f, x->t, x->r, x->agent, x->against, x->o, x->source,
                                  x->agent_path);
}

/* Simulates and reports; the exit status. */
static int run(const rollout_args *a, const bc_task *t, const bc_grid_policy *agent,
               const bc_grid_policy *against)
{
    bc_rollout_opts o;
    bc_rollout_opts_default(&o);
    o.episodes = a->episodes;
    o.seed = (uint64_t)a->c.seed;
    o.threads = a->c.threads;
    bc_rollout_result r;
    int rc = bc_rollout(t, agent, against, &o, &r);
    if (rc == -3 || bc_stop_requested()) { /* Ctrl-C: no report, no file */
        char what[160];
        if (rc == -3)
            snprintf(what, sizeof what, "the simulation after %lld of %lld episodes",
                     (long long)r.simulated, (long long)r.episodes);
        else
            snprintf(what, sizeof what, "the work after the simulation (all %lld episodes ran)",
                     (long long)r.episodes);
        return bc_cli_interrupted("rollout", what, NAN);
    }
    if (rc < 0) {
        fprintf(stderr, "bellcheck rollout: %s\n", r.message);
        return rc == -1 ? BC_EXIT_USAGE : BC_EXIT_SOLVER;
    }
    rollout_report x = {t, &r, agent, against, &o, strcmp(a->path, "-") ? a->path : "<stdin>",
                        a->q_path ? a->q_path : a->policy_path};
    if (bc_cli_text_wanted(&a->c))
        bc_report_rollout_text(stdout, t, &r, agent, against, &o, x.source, x.agent_path);
    if (a->c.json_path && bc_cli_write_file(a->c.json_path, write_json, &x) < 0)
        return BC_EXIT_SOLVER;
    return BC_EXIT_OK;
}

int bc_cli_rollout(int argc, char **argv)
{
    rollout_args a;
    memset(&a, 0, sizeof a);
    a.c.seed = 1;
    a.c.threads = 1;
    a.episodes = 1000;
    int rc = parse_args(argc, argv, &a);
    if (rc != 0)
        return rc < 0 ? BC_EXIT_OK : rc;
    if (bc_cli_grid_from_agent(&a.c, a.path, a.q_path) < 0)
        return BC_EXIT_USAGE;
    a.c.grid_given = 1;
    bc_cli_catch_interrupt();
    bc_task *t = NULL;
    bc_model *m = bc_cli_load_task(a.path, &a.c, &t);
    if (!m)
        return bc_stop_requested() ? bc_cli_interrupted("rollout", "the construction of the model", NAN)
                                   : BC_EXIT_USAGE;
    bc_grid_policy agent, against;
    memset(&against, 0, sizeof against);
    rc = BC_EXIT_USAGE;
    if (load_agent(&a, t, m, &agent) == 0) {
        const char *stopped = "";
        int ra = a.against.n_dims ? load_against(&a, t, &against, &stopped) : 0;
        if (ra == 0)
            rc = run(&a, t, &agent, a.against.n_dims ? &against : NULL);
        else if (ra == -3)
            rc = bc_cli_interrupted("rollout", stopped, NAN);
        else
            rc = ra == -1 ? BC_EXIT_USAGE : BC_EXIT_SOLVER;
        bc_grid_policy_free(&agent);
        bc_grid_policy_free(&against);
    }
    bc_model_free(m);
    bc_task_free(t);
    return rc;
}
