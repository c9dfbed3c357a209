/* cli.c — the bellcheck command: dispatch to the sub-commands and the options they share. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#define _GNU_SOURCE
#include "cli.h"

#include <errno.h>
#include <getopt.h>
#include <limits.h>
#include <math.h>
#include <signal.h>
#include <stdarg.h>
#include <stdlib.h>
#include <string.h>

typedef struct {
    const char *name;
    int (*run)(int argc, char **argv);
    const char *summary;
} command;

static const command commands[] = {
    {"check", bc_cli_check, "read and validate a model; summary and findings"},
    {"solve", bc_cli_solve, "solve a model (vi, pi, lp, exact) and prove the answer; --compare runs all"},
    {"score", bc_cli_score, "grade a learned Q-table or policy against the proven optimum"},
    {"certify", bc_cli_certify, "write a certificate of the optimum that re-checks without solving"},
    {"verify", bc_cli_verify, "re-check a certificate against its model"},
    {"grid", bc_cli_grid, "build the finite model of a continuous task on a grid of cells"},
    {"refine", bc_cli_refine, "a task on finer and finer grids: convergence, each policy simulated"},
    {"rollout", bc_cli_rollout, "simulate a learned agent in a continuous task, with 95% intervals"},
};

static void usage(FILE *f)
{
    fputs("usage: bellcheck COMMAND [options] ...\n"
          "bellcheck tells how far a policy is from optimal on a finite model, with proof.\n\n"
          "commands:\n",
          f);
    for (size_t i = 0; i < sizeof commands / sizeof commands[0]; i++)
        fprintf(f, "  %-8s %s\n", commands[i].name, commands[i].summary);
    fputs("\n`bellcheck COMMAND --help` describes a command; `bellcheck --version` the version.\n",
          f);
}

int bc_cli_usage_error(const char *cmd, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    fprintf(stderr, "bellcheck %s: ", cmd);
    vfprintf(stderr, fmt, ap);
    fputc('\n', stderr);
    va_end(ap);
    return BC_EXIT_USAGE;
}

int bc_cli_double(const char *cmd, const char *opt, const char *arg, double lo, double hi,
                  double *out)
{
    char *end;
    errno = 0;
    double v = strtod(arg, &end);
    if (end == arg || *end || errno || !isfinite(v) || v < lo || v > hi) {
        bc_cli_usage_error(cmd, "%s expects a number in [%g, %g], got '%s'", opt, lo, hi, arg);
        return -1;
    }
    *out = v;
    return 0;
}

int bc_cli_long(const char *cmd, const char *opt, const char *arg, long long lo, long long hi,
                long long *out)
{
    char *end;
    errno = 0;
    long long v = strtoll(arg, &end, 10);
    if (end == arg || *end || errno || v < lo || v > hi) {
        bc_cli_usage_error(cmd, "%s expects an integer in [%lld, %lld], got '%s'", opt, lo, hi,
                           arg);
        return -1;
    }
    *out = v;
    return 0;
}

/* "BYTES" for --max-memory: a positive integer, optionally followed by K, M,
 * G or T (powers of 1024, also written KiB, MiB, ...).  0, or -1 after printing. */
static int parse_bytes(const char *cmd, const char *arg, unsigned long long *out)
{
    static const char units[] = "KMGT";
    char *end;
    errno = 0;
    unsigned long long v = arg[0] >= '0' && arg[0] <= '9' ? strtoull(arg, &end, 10) : 0;
    int shift = 0;
    if (v && !errno && *end) {
        const char *u = strchr(units, end[0] & ~0x20);
        if (u && *u && (!end[1] || !strcmp(end + 1, "iB") || !strcmp(end + 1, "B"))) {
            shift = 10 * (int)(u - units + 1);
            end += strlen(end);
        }
    }
    if (!v || errno || *end || v > (ULLONG_MAX >> shift)) {
        bc_cli_usage_error(cmd, "--max-memory expects a positive number of bytes, optionally "
                           "with K, M, G or T (like 512M), got '%s'", arg);
        return -1;
    }
    *out = v << shift;
    return 0;
}

int bc_cli_model_usable(const bc_model *m, const char *path)
{
    bc_findings fd;
    if (bc_analyse(m, &fd) < 0)
        return -1;
    int ok = !bc_findings_fatal(m, &fd);
    if (!ok)
        bc_cli_report_unusable(strcmp(path, "-") ? path : "<stdin>", m, &fd);
    bc_findings_free(&fd);
    return ok;
}

int bc_cli_prove_mode(const char *cmd, const char *arg, bc_prove_mode *out)
{
    static const char *const names[] = {"auto", "exact", "interval", "off"};
    for (int i = 0; i < 4; i++)
        if (!strcmp(arg, names[i])) {
            *out = (bc_prove_mode)i;
            return 0;
        }
    bc_cli_usage_error(cmd, "--proof expects auto, exact, interval or off, got '%s'", arg);
    return -1;
}

/* The command being run, for the messages of the options every command shares. */
static const char *running_command = "";

int bc_cli_common_option(bc_cli_common *c, int id, const char *arg)
{
    long long v;
    switch (id) {
    case OPT_JSON:
        c->json_path = arg;
        return 1;
    case OPT_QUIET:
        c->quiet = 1;
        return 1;
    case OPT_THREADS:
        if (bc_cli_long(running_command, "--threads", arg, 1, 1024, &v) < 0)
            return -1;
        c->threads = (int)v;
        return 1;
    case OPT_SEED:
        if (bc_cli_long(running_command, "--seed", arg, 0, INT64_MAX, &v) < 0)
            return -1;
        c->seed = v;
        return 1;
    case OPT_MAX_MEMORY:
        if (parse_bytes(running_command, arg, &c->max_memory) < 0)
            return -1;
        bc_memory_limit_set(c->max_memory); /* the solvers, which have no bc_diag, read it there */
        return 1;
    default:
        return bc_cli_grid_option(c, id, arg);
    }
}

void bc_cli_report_unusable(const char *source, const bc_model *m, const bc_findings *fd)
{
    if (fd->n_unbounded > 0) {
        fprintf(stderr,
                "%s: error: with discount 1, a policy can stay forever in %d state%s while %s, "
                "so no optimum exists; the model is not usable:",
                source, (int)fd->n_unbounded, fd->n_unbounded == 1 ? "" : "s",
                m->objective == BC_MAX ? "collecting positive rewards" : "earning negative costs");
        for (int32_t k = 0; k < fd->n_unbounded && k < 8; k++)
            fprintf(stderr, "%s %s", k ? "," : "", bc_names_get(m->state_names, fd->unbounded[k]));
        fputs(fd->n_unbounded > 8 ? ", ...\n" : "\n", stderr);
    }
    if (fd->n_no_exit == 0)
        return;
    fprintf(stderr,
            "%s: error: with discount 1, no policy reaches a terminal state with probability 1 "
            "from %d state%s, so their total reward is undefined; the model is not usable:",
            source, (int)fd->n_no_exit, fd->n_no_exit == 1 ? "" : "s");
    for (int32_t k = 0; k < fd->n_no_exit && k < 8; k++)
        fprintf(stderr, "%s %s", k ? "," : "", bc_names_get(m->state_names, fd->no_exit[k]));
    fputs(fd->n_no_exit > 8 ? ", ...\n" : "\n", stderr);
}

int bc_cli_write_file(const char *path, int (*write)(FILE *f, const void *ctx), const void *ctx)
{
    bc_diag d;
    bc_diag_init(&d);
    bc_out o;
    int rc = -1;
    if (bc_out_open(&o, path, &d) == 0) {
        if (write(o.f, ctx) < 0) {
            bc_diag_add(&d, BC_ERROR, path, 0, 0, "write error");
            bc_out_abort(&o);
        } else {
            rc = bc_out_commit(&o, &d);
        }
    }
    bc_diag_print(&d, stderr);
    bc_diag_free(&d);
    return rc;
}

int bc_cli_text_wanted(const bc_cli_common *c)
{
    return !c->quiet && !(c->json_path && strcmp(c->json_path, "-") == 0);
}

static void on_interrupt(int sig)
{
    (void)sig;
    bc_stop_request(); /* async-signal-safe: it only sets a flag */
}

void bc_cli_catch_interrupt(void)
{
    struct sigaction sa, old;
    if (sigaction(SIGINT, NULL, &old) == 0 && old.sa_handler == SIG_IGN)
        return; /* a background job that the shell shields from Ctrl-C stays so */
    memset(&sa, 0, sizeof sa);
    sa.sa_handler = on_interrupt;
    sigemptyset(&sa.sa_mask);
    sa.sa_flags = SA_RESETHAND;
    sigaction(SIGINT, &sa, NULL);
}

int bc_cli_interrupted(const char *cmd, const char *what, double bound)
{
    if (isnan(bound))
        fprintf(stderr, "bellcheck %s: interrupted (Ctrl-C) during %s; no output file was "
                "written\n", cmd, what);
    else if (bound >= 0)
        fprintf(stderr, "bellcheck %s: interrupted (Ctrl-C) during %s; the best bound proven so "
                "far is max |V - V*| <= %.3g; no output file was written\n", cmd, what, bound);
    else
        fprintf(stderr, "bellcheck %s: interrupted (Ctrl-C) during %s, before any bound was "
                "proven; no output file was written\n", cmd, what);
    return BC_EXIT_INTERRUPTED;
}

int bc_cli_interrupted_solve(const char *cmd, const bc_solution *sol)
{
    char what[128];
    const char *it = sol->iterations == 1 ? "" : "s";
    if (sol->status == BC_SOLVE_OK) /* the solve had finished: what was cut short came after it */
        snprintf(what, sizeof what, "the work after the solve (%s solved the model in %lld "
                 "iteration%s)", bc_method_name(sol->method), (long long)sol->iterations, it);
    else
        snprintf(what, sizeof what, "%s after %lld iteration%s", bc_method_name(sol->method),
                 (long long)sol->iterations, it);
    return bc_cli_interrupted(cmd, what, sol->bound);
}

bc_model *bc_cli_load_model(const char *path, const bc_cli_common *c)
{
    int task = bc_cli_is_task(path, c);
    if (task)
        return task > 0 ? bc_cli_load_task(path, c, NULL) : NULL;
    bc_diag d;
    bc_diag_init(&d);
    d.max_memory = c->max_memory;
    bc_model *m = bc_read_model(path, &d);
    if (!m || !c->quiet)
        bc_diag_print(&d, stderr);
    bc_diag_free(&d);
    return m;
}

int main(int argc, char **argv)
{
    if (argc < 2) {
        usage(stderr);
        return BC_EXIT_USAGE;
    }
    const char *cmd = argv[1];
    if (!strcmp(cmd, "--help") || !strcmp(cmd, "-h") || !strcmp(cmd, "help")) {
        usage(stdout);
        return BC_EXIT_OK;
    }
    if (!strcmp(cmd, "--version")) {
        printf("bellcheck %s\n", BC_VERSION);
        return BC_EXIT_OK;
    }
    for (size_t i = 0; i < sizeof commands / sizeof commands[0]; i++)
        if (!strcmp(cmd, commands[i].name)) {
            running_command = commands[i].name;
            int rc = commands[i].run(argc - 1, argv + 1);
            /* A failure that a Ctrl-C caused (a reading cut short, say) is an
             * interruption; outputs are all or nothing, so none was written. */
            if (bc_stop_requested() && rc != BC_EXIT_OK && rc != BC_EXIT_GATE &&
                rc != BC_EXIT_INTERRUPTED)
                rc = bc_cli_interrupted(cmd, "the run", NAN);
            /* A report that did not reach standard output is a failed run. */
            if (fflush(stdout) != 0 || ferror(stdout)) {
                fprintf(stderr, "bellcheck %s: cannot write to standard output: %s\n", cmd,
                        strerror(errno));
                return BC_EXIT_SOLVER;
            }
            return rc;
        }
    fprintf(stderr, "bellcheck: unknown command '%s'\n\n", cmd);
    usage(stderr);
    return BC_EXIT_USAGE;
}
