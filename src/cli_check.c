/* cli_check.c — `bellcheck check MODEL`: read, validate, summarise, list the findings. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#define _GNU_SOURCE
#include "cli.h"

#include <getopt.h>
#include <math.h>
#include <string.h>

static const char help[] =
    "usage: bellcheck check MODEL [options]\n"
    "       bellcheck check TASK --cells N1xN2... [--scheme S] [options]\n"
    "Reads MODEL (.bell text or its JSON form; - = standard input), checks it and\n"
    "prints a summary and findings: probability sums (exact), dead ends, states\n"
    "unreachable from the initial distribution, and with discount 1 the states from\n"
    "which no policy reaches a terminal state and zero-reward loops.  A TASK's grid\n"
    "model is also checked for cells the grid alone holds in place, cells never\n"
    "entered and actions that never change the cell.\n"
    "Exit 0 when the model is usable (warnings allowed), 2 when it is not.\n\n" BC_CLI_COMMON_HELP;

int bc_cli_check(int argc, char **argv)
{
    static const struct option longopts[] = {BC_CLI_COMMON_LONGOPTS, {NULL, 0, NULL, 0}};
    bc_cli_common c = {0};
    int id;
    opterr = 0;
    while ((id = getopt_long(argc, argv, "", longopts, NULL)) != -1) {
        if (id == OPT_HELP) {
            fputs(help, stdout);
            return BC_EXIT_OK;
        }
        int r = bc_cli_common_option(&c, id, optarg);
        if (r < 0)
            return BC_EXIT_USAGE;
        if (r == 0)
            return bc_cli_usage_error("check", "unknown or incomplete option '%s' (see --help)",
                                      argv[optind - 1]);
    }
    if (optind != argc - 1)
        return bc_cli_usage_error("check", "expected one MODEL argument (see --help)");
    const char *path = argv[optind];
    bc_cli_catch_interrupt(); /* reading a large model takes a while */
    bc_task *task = NULL; /* a TASK's grid model also gets the grid's own findings */
    int is_task = bc_cli_is_task(path, &c);
    bc_model *m = is_task > 0 ? bc_cli_load_task(path, &c, &task) : is_task < 0 ? NULL
                                                                               : bc_cli_load_model(path, &c);
    if (!m || bc_stop_requested()) { /* Ctrl-C: no report, no file */
        bc_model_free(m);
        bc_task_free(task);
        return bc_stop_requested() ? bc_cli_interrupted("check", "the construction of the model", NAN)
                                   : BC_EXIT_USAGE;
    }
    bc_findings fd;
    bc_grid_findings gfd, *gf = task ? &gfd : NULL;
    int failed = bc_analyse(m, &fd) < 0;
    if (!failed && gf && bc_grid_analyse(task, &c.grid, m, gf) < 0)
        failed = 1, bc_findings_free(&fd);
    if (!failed && bc_stop_requested()) { /* Ctrl-C: no report, no file */
        bc_findings_free(&fd);
        if (gf)
            bc_grid_findings_free(gf);
        failed = 2;
    }
    if (failed) {
        bc_model_free(m);
        bc_task_free(task);
        if (failed == 2)
            return bc_cli_interrupted("check", "the analysis of the model", NAN);
        fprintf(stderr, "bellcheck check: out of memory while analysing the model\n");
        return BC_EXIT_SOLVER;
    }
    const char *source = strcmp(path, "-") ? path : "<stdin>";
    int rc = bc_findings_fatal(m, &fd) ? BC_EXIT_USAGE : BC_EXIT_OK;
    if (rc != BC_EXIT_OK)
        bc_cli_report_unusable(source, m, &fd);
    if (bc_cli_text_wanted(&c))
        bc_report_check_grid_text(stdout, m, &fd, gf, source);
    if (c.json_path) {
        bc_diag d;
        bc_diag_init(&d);
        bc_out o;
        if (bc_out_open(&o, c.json_path, &d) < 0 || bc_report_check_grid_json(o.f, m, &fd, gf, source) < 0 ||
            bc_out_commit(&o, &d) < 0) {
            if (o.f)
                bc_out_abort(&o);
            bc_diag_print(&d, stderr);
            rc = BC_EXIT_SOLVER;
        }
        bc_diag_free(&d);
    }
    bc_findings_free(&fd);
    if (gf)
        bc_grid_findings_free(gf);
    bc_task_free(task);
    bc_model_free(m);
    return rc;
}
