/* cli.c — the bellcheck command: dispatch to the sub-commands and the options they share. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#define _GNU_SOURCE
#include "cli.h"

#include <errno.h>
#include <getopt.h>
#include <math.h>
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
    {"solve", bc_cli_solve, "solve a model (vi, pi, lp) with a proven bound; --compare runs all"},
    {"score", bc_cli_score, "grade a learned Q-table or policy against the proven optimum"},
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
        if (bc_cli_long("", "--threads", arg, 1, 1024, &v) < 0)
            return -1;
        c->threads = (int)v;
        return 1;
    case OPT_SEED:
        if (bc_cli_long("", "--seed", arg, 0, INT64_MAX, &v) < 0)
            return -1;
        c->seed = v;
        return 1;
    default:
        return 0;
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

int bc_cli_text_wanted(const bc_cli_common *c)
{
    return !c->quiet && !(c->json_path && strcmp(c->json_path, "-") == 0);
}

bc_model *bc_cli_load_model(const char *path, const bc_cli_common *c)
{
    bc_diag d;
    bc_diag_init(&d);
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
            int rc = commands[i].run(argc - 1, argv + 1);
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
