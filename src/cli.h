/* cli.h — what the command-line files share: exit codes, common options, loading a model. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#ifndef BC_CLI_H
#define BC_CLI_H

#include "bellcheck.h"

enum { BC_EXIT_OK = 0, BC_EXIT_GATE = 1, BC_EXIT_USAGE = 2, BC_EXIT_SOLVER = 3,
       BC_EXIT_INTERRUPTED = 130 /* Ctrl-C: 128 + SIGINT, as shells report it */ };

/* Options every command accepts. */
typedef struct {
    const char *json_path; /* --json FILE or "-" */
    int quiet;             /* --quiet: no text report, warnings only on error */
    int threads;           /* --threads N */
    long long seed;        /* --seed N */
    unsigned long long max_memory; /* --max-memory BYTES; 0 = no limit (readers see it in bc_diag) */
    bc_grid_opts grid;     /* --cells, --scheme, --samples, --noise-samples (a TASK's grid) */
    int grid_given;        /* one of them was given */
} bc_cli_common;

/* Long-option ids shared by the commands (above the ASCII range). */
enum { OPT_JSON = 1000, OPT_QUIET, OPT_THREADS, OPT_SEED, OPT_MAX_MEMORY, OPT_HELP,
       OPT_CELLS, OPT_SCHEME, OPT_SAMPLES, OPT_NOISE_SAMPLES, OPT_FIRST_COMMAND_OPTION };

/* Handles a common option; returns 1 if it was one, 0 if not, -1 on a bad value. */
int bc_cli_common_option(bc_cli_common *c, int id, const char *arg);
/* Prints "bellcheck CMD: message" to stderr and returns BC_EXIT_USAGE. */
int bc_cli_usage_error(const char *cmd, const char *fmt, ...) __attribute__((format(printf, 2, 3)));
/* Parses a number option strictly; returns 0, or -1 after printing an error. */
int bc_cli_double(const char *cmd, const char *opt, const char *arg, double lo, double hi, double *out);
int bc_cli_long(const char *cmd, const char *opt, const char *arg, long long lo, long long hi, long long *out);
/* 1 when check would accept m; 0 after saying why not on stderr; -1 out of memory. */
int bc_cli_model_usable(const bc_model *m, const char *path);
/* Parses a --proof value (auto, exact, interval, off); 0, or -1 after printing an error. */
int bc_cli_prove_mode(const char *cmd, const char *arg, bc_prove_mode *out);
/* Reads and checks a model; prints its messages to stderr.  NULL on error. */
bc_model *bc_cli_load_model(const char *path, const bc_cli_common *c);
/* Says on stderr why a model is unusable (bc_findings_fatal). */
void bc_cli_report_unusable(const char *source, const bc_model *m, const bc_findings *fd);
/* Writes one output file through a temporary file (bc_out_open/commit):
 * write(f, ctx) fills it.  Prints what went wrong; 0, or -1. */
int bc_cli_write_file(const char *path, int (*write)(FILE *f, const void *ctx), const void *ctx);
/* Text report goes to stdout unless --quiet or --json - . */
int bc_cli_text_wanted(const bc_cli_common *c);
/* Ctrl-C (SIGINT) from now on asks the solvers to stop (bc_stop_request);
 * the handler is reset by the first one, so a second Ctrl-C ends the process
 * at once.  Nothing is installed when SIGINT was ignored at start. */
void bc_cli_catch_interrupt(void);
/* After a stop request: says on stderr what was interrupted (`what`, e.g. "vi
 * after 12 iterations") with the best proven bound so far (bound < 0: none;
 * NAN: `what` tells) and that no output file was written; returns BC_EXIT_INTERRUPTED. */
int bc_cli_interrupted(const char *cmd, const char *what, double bound);
/* The same for an interrupted solution: its method, iterations and bound. */
int bc_cli_interrupted_solve(const char *cmd, const bc_solution *sol);

/* The commands. */
int bc_cli_check(int argc, char **argv);
int bc_cli_solve(int argc, char **argv);
int bc_cli_score(int argc, char **argv);
int bc_cli_certify(int argc, char **argv);
int bc_cli_verify(int argc, char **argv);
int bc_cli_grid(int argc, char **argv);
int bc_cli_refine(int argc, char **argv);
int bc_cli_rollout(int argc, char **argv);

/* TASK inputs (cli_grid.c). */
/* Handles --cells, --scheme, --samples, --noise-samples; 1, 0 (not one of them) or -1. */
int bc_cli_grid_option(bc_cli_common *c, int id, const char *arg);
/* 1 when path is read as a TASK (a .task file, or standard input with grid
 * options), 0 when as a model, -1 after printing that grid options were given
 * with a model. */
int bc_cli_is_task(const char *path, const bc_cli_common *c);
/* Reads TASK and builds its grid model (messages to stderr); the task into
 * *task_out when not NULL.  NULL on error. */
bc_model *bc_cli_load_task(const char *path, const bc_cli_common *c, bc_task **task_out);
/* Without --cells, a TASK scored against an NPY Q-table takes its grid from
 * the array's shape (n1, ..., nk, actions).  0, or -1 after printing an error. */
int bc_cli_grid_from_agent(bc_cli_common *c, const char *path, const char *q_path);

/* Common options, for getopt_long tables and --help texts. */
#define BC_CLI_COMMON_LONGOPTS                                                                     \
    {"json", required_argument, NULL, OPT_JSON}, {"quiet", no_argument, NULL, OPT_QUIET},         \
        {"threads", required_argument, NULL, OPT_THREADS},                                         \
        {"seed", required_argument, NULL, OPT_SEED},                                               \
        {"max-memory", required_argument, NULL, OPT_MAX_MEMORY},                                   \
        {"cells", required_argument, NULL, OPT_CELLS},                                             \
        {"scheme", required_argument, NULL, OPT_SCHEME},                                           \
        {"samples", required_argument, NULL, OPT_SAMPLES},                                         \
        {"noise-samples", required_argument, NULL, OPT_NOISE_SAMPLES},                             \
        {"help", no_argument, NULL, OPT_HELP}
#define BC_CLI_COMMON_HELP                                                                         \
    "common options:\n"                                                                            \
    "  --json FILE       write the machine-readable report to FILE (- = standard output,\n"      \
    "                    which then holds the JSON alone)\n"                                      \
    "  --quiet           no text report; only errors on standard error\n"                         \
    "  --threads N       threads to use (default: 1)\n"                                           \
    "  --seed N          seed for anything random (default: 1)\n"                                 \
    "  --max-memory BYTES  refuse, before allocating, work that needs more memory\n"              \
    "                    (suffixes K, M, G, T: powers of 1024; default: no limit)\n"             \
    "  --help            this text\n"                                                             \
    "a continuous TASK (.task file) in place of MODEL is turned into a model on a grid:\n"        \
    "  --cells N1xN2...  cells per state variable (required for a TASK)\n"                        \
    "  --scheme S        sample (default), center or interp\n"                                    \
    "  --samples K       sample: points per cell, m^k for k state variables\n"                    \
    "                    (default 8, 16, 27 for 1, 2, 3 variables, 2^k beyond)\n"               \
    "  --noise-samples M strata per noise variable (default 8; 4 with two noise\n"               \
    "                    variables, 2 with more)\n"                                               \
    "exit status: 0 success, 1 a gate failed, 2 bad usage or bad input,\n"                       \
    "             3 a solver failed or a resource ran out, 130 interrupted (Ctrl-C)\n"

#endif
