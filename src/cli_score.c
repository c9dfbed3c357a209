/* cli_score.c — `bellcheck score MODEL --q FILE | --policy FILE`: grade a learned agent, apply the gates. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#define _GNU_SOURCE
#include "cli.h"
#include "cli_pictures.h"

#include <getopt.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

static const char help[] =
    "usage: bellcheck score MODEL (--q FILE | --policy FILE) [options]\n"
    "Grades a learned agent against the proven optimum of MODEL: regret at the initial\n"
    "distribution and per state, the Bellman residual of a Q-table, the share of states\n"
    "acting optimally, and (discount 1) the states where the agent never finishes.\n\n"
    "the agent:\n"
    "  --q FILE            Q-table: CSV (state,<action>... or state,action,q), NPY\n"
    "                      (states x actions) or JSON {\"q\": {state: {action: value}}}\n"
    "  --policy FILE       policy: CSV (state,action[,prob]), NPY (action indices)\n"
    "                      or JSON {\"policy\": {state: action}}\n"
    "  --missing MODE      error (default) or skip: states the file does not cover\n"
    "  --ties MODE         first (default: ties go to the first action) or worst\n"
    "                      (evaluate the worst choice among tied greedy actions)\n"
    "  --discount G        score under discount G instead of the model's\n"
    "  --q-discount G      discount under which the Q-table's residual is measured\n"
    "  --top K             worst states listed (default 5)\n"
    "  --proof P           auto (default: exact on small models, else intervals), exact,\n"
    "                      interval or off: what stands behind every figure\n"
    "gates (exit 1 when one fails, naming it):\n"
    "  --max-regret X      regret at the initial distribution at most X (or X% of |V*|)\n"
    "  --max-state-regret X   regret of every single state at most X\n"
    "  --max-residual X    Bellman residual of the Q-table at most X\n"
    "  --min-agreement F   share of states acting optimally at least F (0..1, or N%)\n\n"
    BC_CLI_PICTURES_HELP "\n" BC_CLI_COMMON_HELP;

enum { OPT_Q = OPT_FIRST_COMMAND_OPTION, OPT_POLICY, OPT_MISSING, OPT_TIES, OPT_DISCOUNT,
       OPT_Q_DISCOUNT, OPT_TOP, OPT_MAX_REGRET, OPT_MAX_STATE_REGRET, OPT_MAX_RESIDUAL,
       OPT_MIN_AGREEMENT, OPT_PROOF };

typedef struct {
    bc_cli_common c;
    const char *q_path, *policy_path, *path;
    bc_missing_mode missing;
    bc_score_opts o;
    long long top;
    bc_gate_limits limits;
    bc_cli_pictures pic;
} score_args;

/* "X" or "X%": a non-negative number, *percent set for the second form. */
static int parse_limit(const char *opt, const char *arg, double *out, int *percent)
{
    size_t n = strlen(arg);
    char buf[64];
    *percent = n > 0 && arg[n - 1] == '%';
    if (*percent) {
        if (n >= sizeof buf)
            return bc_cli_usage_error("score", "%s: value too long", opt), -1;
        memcpy(buf, arg, n - 1);
        buf[n - 1] = 0;
        arg = buf;
    }
    return bc_cli_double("score", opt, arg, 0, 1e300, out);
}

static int command_option(score_args *a, int id, const char *arg)
{
    int pct;
    switch (id) {
    case OPT_Q: a->q_path = arg; return 0;
    case OPT_POLICY: a->policy_path = arg; return 0;
    case OPT_MISSING:
        if (strcmp(arg, "error") && strcmp(arg, "skip"))
            return bc_cli_usage_error("score", "--missing expects error or skip, got '%s'", arg);
        a->missing = strcmp(arg, "skip") ? BC_MISSING_ERROR : BC_MISSING_SKIP;
        return 0;
    case OPT_TIES:
        if (strcmp(arg, "first") && strcmp(arg, "worst"))
            return bc_cli_usage_error("score", "--ties expects first or worst, got '%s'", arg);
        a->o.ties_worst = !strcmp(arg, "worst");
        return 0;
    case OPT_DISCOUNT:
        return bc_cli_double("score", "--discount", arg, 1e-12, 1, &a->o.discount) < 0 ? BC_EXIT_USAGE : 0;
    case OPT_Q_DISCOUNT:
        return bc_cli_double("score", "--q-discount", arg, 1e-12, 1, &a->o.q_discount) < 0 ? BC_EXIT_USAGE : 0;
    case OPT_TOP:
        return bc_cli_long("score", "--top", arg, 0, INT32_MAX, &a->top) < 0 ? BC_EXIT_USAGE : 0;
    case OPT_MAX_REGRET:
        return parse_limit("--max-regret", arg, &a->limits.max_regret,
                           &a->limits.max_regret_is_percent) < 0 ? BC_EXIT_USAGE : 0;
    case OPT_MAX_STATE_REGRET:
        if (parse_limit("--max-state-regret", arg, &a->limits.max_state_regret, &pct) < 0 || pct)
            return pct ? bc_cli_usage_error("score", "--max-state-regret takes an absolute value") : BC_EXIT_USAGE;
        return 0;
    case OPT_MAX_RESIDUAL:
        if (parse_limit("--max-residual", arg, &a->limits.max_residual, &pct) < 0 || pct)
            return pct ? bc_cli_usage_error("score", "--max-residual takes an absolute value") : BC_EXIT_USAGE;
        return 0;
    case OPT_PROOF:
        return bc_cli_prove_mode("score", arg, &a->o.prove.mode) < 0 ? BC_EXIT_USAGE : 0;
    case OPT_MIN_AGREEMENT:
        if (parse_limit("--min-agreement", arg, &a->limits.min_agreement, &pct) < 0)
            return BC_EXIT_USAGE;
        if (pct)
            a->limits.min_agreement /= 100;
        if (a->limits.min_agreement > 1)
            return bc_cli_usage_error("score", "--min-agreement is a share between 0 and 1 (or 0%%..100%%), got '%s'", arg);
        return 0;
    default:
        return bc_cli_usage_error("score", "unknown or incomplete option (see --help)");
    }
}

static int parse_args(int argc, char **argv, score_args *a)
{
    static const struct option longopts[] = {
        BC_CLI_COMMON_LONGOPTS,
        BC_CLI_PICTURES_LONGOPTS,
        {"q", required_argument, NULL, OPT_Q},
        {"policy", required_argument, NULL, OPT_POLICY},
        {"missing", required_argument, NULL, OPT_MISSING},
        {"ties", required_argument, NULL, OPT_TIES},
        {"discount", required_argument, NULL, OPT_DISCOUNT},
        {"q-discount", required_argument, NULL, OPT_Q_DISCOUNT},
        {"top", required_argument, NULL, OPT_TOP},
        {"max-regret", required_argument, NULL, OPT_MAX_REGRET},
        {"max-state-regret", required_argument, NULL, OPT_MAX_STATE_REGRET},
        {"max-residual", required_argument, NULL, OPT_MAX_RESIDUAL},
        {"min-agreement", required_argument, NULL, OPT_MIN_AGREEMENT},
        {"proof", required_argument, NULL, OPT_PROOF},
        {NULL, 0, NULL, 0}};
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
        r = bc_cli_pictures_option(&a->pic, "score", id, optarg);
        if (r < 0)
            return BC_EXIT_USAGE;
        if (r > 0)
            continue;
        if (id == '?' || id == ':')
            return bc_cli_usage_error("score", "unknown or incomplete option '%s' (see --help)",
                                      argv[optind - 1]);
        if (command_option(a, id, optarg) != 0)
            return BC_EXIT_USAGE;
    }
    if (optind != argc - 1)
        return bc_cli_usage_error("score", "expected one MODEL argument (see --help)");
    if (!a->q_path == !a->policy_path)
        return bc_cli_usage_error("score", "give the agent as exactly one of --q FILE or --policy FILE");
    if (!isnan(a->limits.max_residual) && !a->q_path)
        return bc_cli_usage_error("score", "--max-residual needs a Q-table (--q)");
    if (!isnan(a->o.q_discount) && !a->q_path)
        return bc_cli_usage_error("score", "--q-discount needs a Q-table (--q)");
    a->path = argv[optind];
    return 0;
}

/* Reads the agent; NULL-both on error (messages printed). */
static int load_agent(const score_args *a, const bc_model *m, bc_qtable **q, bc_policy **p)
{
    bc_diag d;
    bc_diag_init(&d);
    d.max_memory = a->c.max_memory;
    if (a->q_path)
        *q = bc_read_qtable(a->q_path, m, a->missing, &d);
    else
        *p = bc_read_policy(a->policy_path, m, a->missing, &d);
    int ok = *q || *p;
    if (!ok || !a->c.quiet)
        bc_diag_print(&d, stderr);
    bc_diag_free(&d);
    int32_t missing = *q ? (*q)->n_missing : *p ? (*p)->n_missing : 0, live = 0;
    for (int32_t s = 0; s < m->n_states; s++)
        live += !m->terminal[s];
    if (ok && missing == live) {
        fprintf(stderr, "bellcheck score: the agent's file covers none of the %d non-terminal "
                        "states; there is nothing to grade\n", (int)live);
        return -1;
    }
    if (ok && missing && !a->c.quiet)
        fprintf(stderr, "bellcheck score: %d state%s not covered by the agent's file; they are "
                        "left out of regret and agreement (--missing skip)\n",
                (int)missing, missing == 1 ? " is" : "s are");
    return ok ? 0 : -1;
}

/* Writes the JSON report if asked; 0 or -1. */
static int write_json(const score_args *a, const bc_model *m, const bc_score *s,
                      const bc_gate *gates, int n_gates)
{
    if (!a->c.json_path)
        return 0;
    bc_diag d;
    bc_diag_init(&d);
    bc_out o;
    int rc = -1;
    if (bc_out_open(&o, a->c.json_path, &d) == 0) {
        if (bc_report_score_json(o.f, m, s, gates, n_gates, (int32_t)a->top) < 0) {
            bc_diag_add(&d, BC_ERROR, a->c.json_path, 0, 0, "write error");
            bc_out_abort(&o);
        } else if (bc_stop_requested()) {
            bc_out_abort(&o); /* Ctrl-C came while writing: the caller says so */
        } else {
            rc = bc_out_commit(&o, &d);
        }
    }
    bc_diag_print(&d, stderr);
    bc_diag_free(&d);
    return rc;
}

static int run(const score_args *a, const bc_model *m, const bc_qtable *q, const bc_policy *p)
{
    bc_score s;
    int computed = bc_score_compute(m, q, p, &a->o, &s);
    if (bc_stop_requested()) { /* Ctrl-C: no report, no file */
        int rc = bc_cli_interrupted_solve("score", &s.optimum);
        bc_score_free(&s);
        return rc;
    }
    if (computed < 0) {
        fprintf(stderr, "bellcheck %s\n", s.message); /* the message starts with "score: " */
        bc_score_free(&s);
        return BC_EXIT_SOLVER;
    }
    bc_gate gates[4];
    int n_gates = bc_score_gates(&s, &a->limits, gates);
    if (bc_cli_text_wanted(&a->c))
        bc_report_score_text(stdout, m, &s, gates, n_gates, (int32_t)a->top);
    int rc = BC_EXIT_OK;
    for (int g = 0; g < n_gates; g++)
        if (!gates[g].passed) {
            fprintf(stderr, "bellcheck score: gate %s failed: value %.6g, limit %.6g\n",
                    gates[g].name, gates[g].value, gates[g].limit);
            rc = BC_EXIT_GATE;
        }
    if (write_json(a, m, &s, gates, n_gates) < 0)
        rc = bc_stop_requested() ? bc_cli_interrupted_solve("score", &s.optimum) : BC_EXIT_SOLVER;
    if ((rc == BC_EXIT_OK || rc == BC_EXIT_GATE) &&
        bc_cli_pictures_score(&a->pic, m, &s, gates, n_gates, (int32_t)a->top) < 0)
        rc = BC_EXIT_SOLVER;
    bc_score_free(&s);
    return rc;
}

int bc_cli_score(int argc, char **argv)
{
    score_args a;
    memset(&a, 0, sizeof a);
    bc_score_opts_default(&a.o);
    bc_gate_limits_none(&a.limits);
    a.top = 5;
    int rc = parse_args(argc, argv, &a);
    if (rc != 0)
        return rc < 0 ? BC_EXIT_OK : rc;
    if (bc_cli_grid_from_agent(&a.c, a.path, a.q_path) < 0)
        return BC_EXIT_USAGE;
    bc_cli_catch_interrupt();
    bc_model *m = bc_cli_load_pictured(a.path, &a.c, &a.pic, "score");
    if (!m)
        return bc_stop_requested() ? bc_cli_interrupted("score", "the construction of the model", -1)
                                   : BC_EXIT_USAGE;
    bc_findings fd;
    if (bc_analyse(m, &fd) < 0) {
        bc_model_free(m);
        bc_cli_pictures_free(&a.pic);
        return BC_EXIT_SOLVER;
    }
    int usable = !bc_findings_fatal(m, &fd);
    if (usable && m->horizon > 0) {
        bc_cli_usage_error("score", "the model has a finite horizon (%d decisions); score grades "
                                    "agents on infinite-horizon models only", (int)m->horizon);
        bc_findings_free(&fd);
        bc_model_free(m);
        bc_cli_pictures_free(&a.pic);
        return BC_EXIT_USAGE;
    }
    if (!usable)
        bc_cli_report_unusable(strcmp(a.path, "-") ? a.path : "<stdin>", m, &fd);
    bc_findings_free(&fd);
    bc_qtable *q = NULL;
    bc_policy *p = NULL;
    if (!usable || load_agent(&a, m, &q, &p) < 0)
        rc = BC_EXIT_USAGE;
    else
        rc = run(&a, m, q, p);
    bc_qtable_free(q);
    bc_policy_free(p);
    bc_model_free(m);
    bc_cli_pictures_free(&a.pic);
    return rc;
}
