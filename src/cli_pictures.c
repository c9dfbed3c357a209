/* cli_pictures.c — --svg, --html and --slice of `solve` and `score`: parse, lay out the states, write what was asked. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#include "cli_pictures.h"

#include <stdlib.h>
#include <string.h>

int bc_cli_pictures_option(bc_cli_pictures *p, const char *cmd, int id, const char *arg)
{
    switch (id) {
    case OPT_SVG:
        if (!strcmp(arg, "-") || !arg[0]) {
            bc_cli_usage_error(cmd, "--svg writes files into a directory; give its name");
            return -1;
        }
        p->svg_dir = arg;
        return 1;
    case OPT_HTML:
        if (!strcmp(arg, "-") || !arg[0]) {
            bc_cli_usage_error(cmd, "--html writes a file; give its name (standard output "
                                    "carries the text report)");
            return -1;
        }
        p->html_path = arg;
        return 1;
    case OPT_SLICE:
        p->slice = arg;
        return 1;
    default:
        return 0;
    }
}

bc_model *bc_cli_load_pictured(const char *path, const bc_cli_common *c, bc_cli_pictures *p,
                               const char *cmd)
{
    if (!p->svg_dir && !p->html_path) {
        if (p->slice) {
            bc_cli_usage_error(cmd, "--slice chooses the plane of the pictures: give --svg or --html");
            return NULL;
        }
        return bc_cli_load_model(path, c);
    }
    int task = bc_cli_is_task(path, c);
    if (task < 0)
        return NULL;
    bc_task *t = NULL;
    bc_model *m = task ? bc_cli_load_task(path, c, &t) : bc_cli_load_model(path, c);
    if (!m)
        return NULL;
    char why[600];
    int rc = task ? bc_layout_task(&p->layout, t, &c->grid, m, p->slice, why, sizeof why)
                  : bc_layout_names(&p->layout, m, p->slice, why, sizeof why);
    bc_task_free(t);
    p->has_layout = rc == 0;
    if (rc == 0 || (rc > 0 && !p->svg_dir && !p->slice))
        return m; /* no grid: the page says that it has no pictures */
    if (rc > 0)
        bc_cli_usage_error(cmd, "%s draws maps of a grid, and the states of '%s' are none: %s",
                           p->svg_dir ? "--svg" : "--slice", path, why);
    else
        bc_cli_usage_error(cmd, "--slice: %s", why);
    bc_model_free(m);
    return NULL;
}

typedef struct {
    const bc_cli_pictures *p;
    const bc_model *m;
    const bc_solution *sol;
    const bc_proof_result *pr;
    const bc_score *s;
    const bc_gate *gates;
    int n_gates;
    int32_t count; /* states (solve) or worst states (score) listed */
} page;

static int solve_page(FILE *f, const void *ctx)
{
    const page *g = ctx;
    return bc_report_html_solve(f, g->m, g->p->has_layout ? &g->p->layout : NULL, g->sol, g->pr,
                                g->count);
}

static int score_page(FILE *f, const void *ctx)
{
    const page *g = ctx;
    return bc_report_html_score(f, g->m, g->p->has_layout ? &g->p->layout : NULL, g->s, g->gates,
                                g->n_gates, g->count);
}

/* The SVG directory through `svg` (when asked), then the page through `html`. */
static int write_both(const page *g, int (*svg)(const page *g, bc_diag *d),
                      int (*html)(FILE *f, const void *ctx))
{
    if (g->p->svg_dir) {
        bc_diag d;
        bc_diag_init(&d);
        int rc = svg(g, &d);
        bc_diag_print(&d, stderr);
        bc_diag_free(&d);
        if (rc < 0)
            return -1;
    }
    return g->p->html_path ? bc_cli_write_file(g->p->html_path, html, g) : 0;
}

static int solve_svg(const page *g, bc_diag *d)
{
    return bc_report_svg_solve(g->p->svg_dir, g->m, &g->p->layout, g->sol, d);
}

static int score_svg(const page *g, bc_diag *d)
{
    return bc_report_svg_score(g->p->svg_dir, g->m, &g->p->layout, g->s, d);
}

int bc_cli_pictures_solve(const bc_cli_pictures *p, const bc_model *m, const bc_solution *sol,
                          const bc_proof_result *pr, int32_t show)
{
    page g = {p, m, sol, pr, NULL, NULL, 0, show};
    return write_both(&g, solve_svg, solve_page);
}

int bc_cli_pictures_score(const bc_cli_pictures *p, const bc_model *m, const bc_score *s,
                          const bc_gate *gates, int n_gates, int32_t top)
{
    page g = {p, m, NULL, NULL, s, gates, n_gates, top};
    return write_both(&g, score_svg, score_page);
}

void bc_cli_pictures_free(bc_cli_pictures *p)
{
    bc_layout_free(&p->layout);
}
