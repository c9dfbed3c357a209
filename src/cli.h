/* cli.h — what the command-line files share: exit codes, common options, loading a model. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#ifndef BC_CLI_H
#define BC_CLI_H

#include "bellcheck.h"

enum { BC_EXIT_OK = 0, BC_EXIT_GATE = 1, BC_EXIT_USAGE = 2, BC_EXIT_SOLVER = 3 };

/* Options every command accepts. */
typedef struct {
    const char *json_path; /* --json FILE or "-" */
    int quiet;             /* --quiet: no text report, warnings only on error */
    int threads;           /* --threads N */
    long long seed;        /* --seed N */
} bc_cli_common;

/* Long-option ids shared by the commands (above the ASCII range). */
enum { OPT_JSON = 1000, OPT_QUIET, OPT_THREADS, OPT_SEED, OPT_HELP, OPT_FIRST_COMMAND_OPTION };

/* Handles a common option; returns 1 if it was one, 0 if not, -1 on a bad value. */
int bc_cli_common_option(bc_cli_common *c, int id, const char *arg);
/* Prints "bellcheck CMD: message" to stderr and returns BC_EXIT_USAGE. */
int bc_cli_usage_error(const char *cmd, const char *fmt, ...) __attribute__((format(printf, 2, 3)));
/* Parses a number option strictly; returns 0, or -1 after printing an error. */
int bc_cli_double(const char *cmd, const char *opt, const char *arg, double lo, double hi, double *out);
int bc_cli_long(const char *cmd, const char *opt, const char *arg, long long lo, long long hi, long long *out);
/* Reads and checks a model; prints its messages to stderr.  NULL on error. */
bc_model *bc_cli_load_model(const char *path, const bc_cli_common *c);
/* Says on stderr why a model is unusable (bc_findings_fatal). */
void bc_cli_report_unusable(const char *source, const bc_model *m, const bc_findings *fd);
/* Text report goes to stdout unless --quiet or --json - . */
int bc_cli_text_wanted(const bc_cli_common *c);

/* The commands. */
int bc_cli_check(int argc, char **argv);
int bc_cli_solve(int argc, char **argv);
int bc_cli_score(int argc, char **argv);

/* Common options, for getopt_long tables and --help texts. */
#define BC_CLI_COMMON_LONGOPTS                                                                     \
    {"json", required_argument, NULL, OPT_JSON}, {"quiet", no_argument, NULL, OPT_QUIET},         \
        {"threads", required_argument, NULL, OPT_THREADS},                                         \
        {"seed", required_argument, NULL, OPT_SEED}, {"help", no_argument, NULL, OPT_HELP}
#define BC_CLI_COMMON_HELP                                                                         \
    "common options:\n"                                                                            \
    "  --json FILE       write the machine-readable report to FILE (- = standard output,\n"      \
    "                    which then holds the JSON alone)\n"                                      \
    "  --quiet           no text report; only errors on standard error\n"                         \
    "  --threads N       threads to use (default: 1)\n"                                           \
    "  --seed N          seed for anything random (default: 1)\n"                                 \
    "  --help            this text\n"                                                             \
    "exit status: 0 success, 1 a gate failed, 2 bad usage or bad input,\n"                       \
    "             3 a solver failed or a resource ran out\n"

#endif
