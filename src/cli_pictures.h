/* cli_pictures.h — --svg DIR, --html FILE and --slice of `solve` and `score`: the options and the one call each command makes. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#ifndef BC_CLI_PICTURES_H
#define BC_CLI_PICTURES_H

#include "cli.h"

typedef struct {
    const char *svg_dir;   /* --svg DIR */
    const char *html_path; /* --html FILE */
    const char *slice;     /* --slice X[,Y] */
    bc_layout layout;      /* where the states lie, when pictures were asked for and they are a grid */
    int has_layout;
} bc_cli_pictures;

/* Option ids, well above those of the commands. */
enum { OPT_SVG = OPT_FIRST_COMMAND_OPTION + 200, OPT_HTML, OPT_SLICE };

#define BC_CLI_PICTURES_LONGOPTS                                                                   \
    {"svg", required_argument, NULL, OPT_SVG}, {"html", required_argument, NULL, OPT_HTML},        \
        {"slice", required_argument, NULL, OPT_SLICE}
#define BC_CLI_PICTURES_HELP                                                                       \
    "pictures (grids: tasks, or models whose state names are cells like x3y0):\n"                \
    "  --svg DIR         write the maps as SVG files into DIR (created if needed;\n"              \
    "                    all files or none)\n"                                                     \
    "  --html FILE       write one self-contained HTML page: the report with its\n"               \
    "                    proofs, tables and maps\n"                                                \
    "  --slice X[,Y]     the variables drawn across and up (default: the first two);\n"          \
    "                    the others are held at their middle cell\n"

/* Handles --svg, --html and --slice: 1 when id is one of them, 0 when not,
 * -1 after printing a usage error. */
int bc_cli_pictures_option(bc_cli_pictures *p, const char *cmd, int id, const char *arg);
/* Reads MODEL or TASK as bc_cli_load_model does and, when pictures are
 * asked for, lays its states out (a task's grid, or grid names).  NULL after
 * printing why (a usage error: exit 2). */
bc_model *bc_cli_load_pictured(const char *path, const bc_cli_common *c, bc_cli_pictures *p,
                               const char *cmd);
/* Writes the pictures and the page asked for; 0, or -1 after printing why (exit 3). */
int bc_cli_pictures_solve(const bc_cli_pictures *p, const bc_model *m, const bc_solution *sol,
                          const bc_proof_result *pr, int32_t show);
int bc_cli_pictures_score(const bc_cli_pictures *p, const bc_model *m, const bc_score *s,
                          const bc_gate *gates, int n_gates, int32_t top);
void bc_cli_pictures_free(bc_cli_pictures *p);

#endif
