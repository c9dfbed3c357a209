/* report_grid.c — the reports of `grid`: the grid laid over a task and the size of the model built on it, as text and as JSON. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#include "report_internal.h"

#include <string.h>

/* "64x64" into buf. */
static const char *cells_text(const bc_grid *g, char *buf, size_t cap)
{
    size_t n = 0;
    buf[0] = 0;
    for (int32_t j = 0; j < g->n_dims && n < cap; j++)
        n += (size_t)snprintf(buf + n, cap - n, "%s%d", j ? "x" : "", (int)g->cells[j]);
    return buf;
}

static int32_t points_per_cell(const bc_grid *g, bc_scheme scheme)
{
    int32_t k = 1;
    for (int32_t j = 0; scheme == BC_SCHEME_SAMPLE && j < g->n_dims; j++)
        k *= g->samples_per_axis;
    return k;
}

static int32_t terminal_count(const bc_model *m)
{
    int32_t n = 0;
    for (int32_t s = 0; s < m->n_states; s++)
        n += m->terminal[s];
    return n;
}

int bc_report_grid_text(FILE *f, const bc_model *m, const bc_grid *g, bc_scheme scheme,
                        const char *source, const char *output)
{
    char cells[200];
    fprintf(f, "grid of %s cells over %s, scheme %s", cells_text(g, cells, sizeof cells), source,
            bc_scheme_name(scheme));
    if (scheme == BC_SCHEME_SAMPLE)
        fprintf(f, " (%d points per cell)", (int)points_per_cell(g, scheme));
    fputc('\n', f);
    fprintf(f, "  model %s\n", m->name);
    fprintf(f, "  %d state%s (%d terminal), %d action%s, %lld state-action pair%s, %lld transition%s\n",
            (int)m->n_states, m->n_states == 1 ? "" : "s", (int)terminal_count(m), (int)m->n_actions,
            m->n_actions == 1 ? "" : "s", (long long)m->n_pairs, m->n_pairs == 1 ? "" : "s",
            (long long)m->n_trans, m->n_trans == 1 ? "" : "s");
    if (output)
        fprintf(f, "  written to %s\n", strcmp(output, "-") ? output : "standard output");
    else
        fputs("  not written (give -o FILE to keep it)\n", f);
    return ferror(f) ? -1 : 0;
}

int bc_report_grid_json(FILE *f, const bc_model *m, const bc_grid *g, bc_scheme scheme,
                        const char *source, const char *output)
{
    bc_jw w;
    bc_jw_init(&w, f);
    bc_jw_object(&w, NULL);
    bc_jw_string(&w, "source", source);
    bc_jw_object(&w, "grid");
    bc_jw_array(&w, "cells");
    for (int32_t j = 0; j < g->n_dims; j++)
        bc_jw_int(&w, NULL, g->cells[j]);
    bc_jw_end(&w, ']');
    bc_jw_string(&w, "scheme", bc_scheme_name(scheme));
    bc_jw_int(&w, "points_per_cell", points_per_cell(g, scheme));
    bc_jw_int(&w, "noise_strata", g->noise_strata);
    bc_jw_end(&w, '}');
    bc__json_model(&w, m);
    bc_jw_string(&w, "output", output && strcmp(output, "-") ? output : NULL);
    bc_jw_end(&w, '}');
    bc_jw_finish(&w);
    return ferror(f) ? -1 : 0;
}
