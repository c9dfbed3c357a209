/* grid.c — equal cells over a task's ranges: options, layout, point-to-cell lookup, cell names. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The lookup is the one every consumer of a grid uses (grid models,
 * rollouts, agents' tables), so a point is in the same cell everywhere:
 * along each axis the cell is floor((x - low) / width), and a point on or
 * beyond the upper end belongs to the last cell, one below the lower end to
 * the first.
 */
#include "task_internal.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define GRID_MAX_CELLS 100000000   /* cells of one grid (so states fit in int32 with room) */
#define GRID_MAX_POINTS 1000000    /* evaluations per state-action pair */

const char *bc_scheme_name(bc_scheme s)
{
    return s == BC_SCHEME_CENTER ? "center" : s == BC_SCHEME_INTERP ? "interp" : "sample";
}

int bc_scheme_parse(const char *s, bc_scheme *out)
{
    if (!strcmp(s, "sample"))
        *out = BC_SCHEME_SAMPLE;
    else if (!strcmp(s, "center"))
        *out = BC_SCHEME_CENTER;
    else if (!strcmp(s, "interp"))
        *out = BC_SCHEME_INTERP;
    else
        return -1;
    return 0;
}

void bc_grid_opts_default(bc_grid_opts *o)
{
    memset(o, 0, sizeof *o);
    o->scheme = BC_SCHEME_SAMPLE;
}

int bc_grid_parse_cells(const char *text, bc_grid_opts *o, const char **why)
{
    const char *p = text;
    int32_t n = 0;
    for (;;) {
        if (*p < '1' || *p > '9') {
            *why = "expected counts of cells like 64x64 (one positive whole number per state "
                   "variable, joined by x)";
            return -1;
        }
        long long v = 0;
        while (*p >= '0' && *p <= '9' && v <= GRID_MAX_CELLS)
            v = 10 * v + (*p++ - '0');
        if (v > GRID_MAX_CELLS) {
            *why = "a count of cells is larger than 100000000";
            return -1;
        }
        if (n == BC_TASK_MAX_VARS) {
            *why = "more counts than a task may have state variables (16)";
            return -1;
        }
        o->cells[n++] = (int32_t)v;
        if (*p == 0)
            break;
        if (*p++ != 'x') {
            *why = "expected counts of cells like 64x64 (joined by x)";
            return -1;
        }
    }
    o->n_dims = n;
    return 0;
}

/* Points per axis of the sample scheme: m with m^dims = samples; -1 if none. */
static int32_t per_axis(int32_t samples, int32_t dims)
{
    if (samples == 0)
        return dims == 1 ? 8 : dims == 2 ? 4 : dims == 3 ? 3 : 2;
    for (int32_t m = 1;; m++) {
        int64_t p = 1;
        for (int32_t k = 0; k < dims && p <= samples; k++)
            p *= m;
        if (p == samples)
            return m;
        if (p > samples)
            return -1;
    }
}

/* Names the variables, "x, v", for messages. */
static void var_list(const bc_task *t, char *buf, size_t cap)
{
    size_t n = 0;
    buf[0] = 0;
    for (int32_t i = 0; i < t->n_vars && n < cap; i++)
        n += (size_t)snprintf(buf + n, cap - n, "%s%s", i ? ", " : "", t->var[i].name);
}

int bc_grid_init(bc_grid *g, const bc_task *t, const bc_grid_opts *o, bc_diag *d)
{
    char vars[512];
    memset(g, 0, sizeof *g);
    var_list(t, vars, sizeof vars);
    if (o->n_dims != t->n_vars) {
        bc_diag_add(d, BC_ERROR, t->label, 0, 0, "the grid gives %d count%s of cells, but the task "
                    "has %d state variable%s (%s): give one count per variable, like --cells %s",
                    (int)o->n_dims, o->n_dims == 1 ? "" : "s", (int)t->n_vars,
                    t->n_vars == 1 ? "" : "s", vars, t->n_vars == 1 ? "64" : t->n_vars == 2 ?
                    "64x64" : "16x16x16");
        return -1;
    }
    g->n_dims = o->n_dims;
    g->n_cells = 1;
    for (int32_t j = g->n_dims - 1; j >= 0; j--) {
        if (o->cells[j] < 1 || g->n_cells > GRID_MAX_CELLS / o->cells[j]) {
            bc_diag_add(d, BC_ERROR, t->label, 0, 0, "the grid has more than %d cells",
                        GRID_MAX_CELLS);
            return -1;
        }
        g->cells[j] = o->cells[j];
        g->stride[j] = g->n_cells;
        g->low[j] = t->var[j].low;
        g->high[j] = t->var[j].high;
        g->width[j] = (g->high[j] - g->low[j]) / g->cells[j];
        g->n_cells *= o->cells[j];
    }
    if (o->samples && o->scheme != BC_SCHEME_SAMPLE) {
        bc_diag_add(d, BC_ERROR, t->label, 0, 0, "--samples sets the points per cell of the "
                    "sample scheme; the %s scheme uses the centre alone", bc_scheme_name(o->scheme));
        return -1;
    }
    if (o->noise_samples && t->n_noise == 0) {
        bc_diag_add(d, BC_ERROR, t->label, 0, 0, "--noise-samples: the task has no noise variable");
        return -1;
    }
    g->samples_per_axis = o->scheme == BC_SCHEME_SAMPLE ? per_axis(o->samples, g->n_dims) : 1;
    if (g->samples_per_axis < 0) {
        bc_diag_add(d, BC_ERROR, t->label, 0, 0, "--samples %d is not a whole power m^%d: the "
                    "sample scheme puts m points on each of the %d axes of a cell",
                    (int)o->samples, (int)g->n_dims, (int)g->n_dims);
        return -1;
    }
    int32_t nn = t->n_noise;
    g->noise_strata = nn == 0 ? 1 : o->noise_samples ? o->noise_samples : nn == 1 ? 8 : nn == 2 ? 4 : 2;
    double points = 1;
    for (int32_t j = 0; j < g->n_dims; j++)
        points *= g->samples_per_axis;
    for (int32_t k = 0; k < nn; k++)
        points *= g->noise_strata;
    if (points > GRID_MAX_POINTS) {
        bc_diag_add(d, BC_ERROR, t->label, 0, 0, "%.0f evaluations per cell and action (points "
                    "per cell times noise strata) is more than %d: lower --samples or "
                    "--noise-samples", points, GRID_MAX_POINTS);
        return -1;
    }
    return 0;
}

int64_t bc__grid_axis(const bc_grid *g, int32_t j, double x)
{
    double f = (x - g->low[j]) / g->width[j];
    return f >= 0 ? (f < g->cells[j] ? (int64_t)f : g->cells[j] - 1) : 0; /* NaN: 0 */
}

int64_t bc_grid_cell(const bc_grid *g, const double *x)
{
    int64_t c = 0;
    for (int32_t j = 0; j < g->n_dims; j++)
        c += bc__grid_axis(g, j, x[j]) * g->stride[j];
    return c;
}

void bc_grid_cell_center(const bc_grid *g, int64_t cell, double *x)
{
    for (int32_t j = 0; j < g->n_dims; j++) {
        int64_t i = cell / g->stride[j] % g->cells[j];
        x[j] = g->low[j] + ((double)i + 0.5) * g->width[j];
    }
}

size_t bc_grid_cell_name(const bc_grid *g, int64_t cell, char *buf, size_t cap)
{
    /* By hand rather than snprintf: grid models name millions of successors. */
    char text[24 * BC_TASK_MAX_VARS + 2];
    size_t n = 0;
    text[n++] = 'c';
    for (int32_t j = 0; j < g->n_dims; j++) {
        if (j)
            text[n++] = '_';
        char digits[24];
        int k = 0;
        int64_t i = cell / g->stride[j] % g->cells[j];
        do
            digits[k++] = (char)('0' + i % 10);
        while ((i /= 10) > 0);
        while (k)
            text[n++] = digits[--k];
    }
    if (cap) {
        size_t m = n < cap ? n : cap - 1;
        memcpy(buf, text, m);
        buf[m] = 0;
    }
    return n;
}
