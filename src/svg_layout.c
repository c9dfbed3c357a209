/* svg_layout.c — where a model's states lie on a grid (a task's cells, or indices read from state names) and which plane is drawn. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * A picture shows one plane of the grid: two variables (one for a strip),
 * every other variable held at its middle cell, cells / 2 counting from 0.
 * The layout keeps only the model state of each drawn cell, so a picture
 * never assumes that state c is cell c; for a task's grid that identity is
 * checked against the cell names once, here.
 */
#include "bellcheck.h"

#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define MAX_GROUPS BC_TASK_MAX_VARS
#define NAME_CELLS_LIMIT 100000000 /* cells of a grid read from names */

__attribute__((format(printf, 3, 4))) static int say(char *why, size_t cap, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    if (cap)
        vsnprintf(why, cap, fmt, ap);
    va_end(ap);
    return -1;
}

/* "x, v" for messages. */
static void var_list(const bc_layout *l, char *buf, size_t cap)
{
    size_t n = 0;
    buf[0] = 0;
    for (int32_t k = 0; k < l->n_vars && n < cap; k++)
        n += (size_t)snprintf(buf + n, cap - n, "%s%s", k ? ", " : "", l->var_name[k]);
}

static int32_t var_index(const bc_layout *l, const char *name, size_t len)
{
    for (int32_t k = 0; k < l->n_vars; k++)
        if (strlen(l->var_name[k]) == len && !memcmp(l->var_name[k], name, len))
            return k;
    return -1;
}

/* Sets axis_x, axis_y and fixed[] from "a,b", "a" or NULL. */
static int parse_slice(bc_layout *l, const char *slice, char *why, size_t cap)
{
    for (int32_t k = 0; k < l->n_vars; k++)
        l->fixed[k] = l->cells[k] / 2;
    l->axis_x = 0;
    l->axis_y = l->n_vars > 1 ? 1 : -1;
    if (!slice)
        return 0;
    char vars[16 * 66];
    var_list(l, vars, sizeof vars);
    const char *comma = strchr(slice, ',');
    size_t len0 = comma ? (size_t)(comma - slice) : strlen(slice);
    const char *second = comma ? comma + 1 : NULL;
    if (len0 == 0 || (second && (!*second || strchr(second, ','))))
        return say(why, cap, "slice '%s': give one or two variables joined by a comma, like "
                   "'%s%s%s'", slice, l->var_name[0], l->n_vars > 1 ? "," : "",
                   l->n_vars > 1 ? l->var_name[1] : "");
    int32_t a = var_index(l, slice, len0), b = second ? var_index(l, second, strlen(second)) : -1;
    if (a < 0)
        return say(why, cap, "slice '%s': '%.*s' is not a variable of the grid (%s)", slice,
                   (int)len0, slice, vars);
    if (second && b < 0)
        return say(why, cap, "slice '%s': '%s' is not a variable of the grid (%s)", slice, second,
                   vars);
    if (a == b)
        return say(why, cap, "slice '%s': the two variables must differ", slice);
    l->axis_x = a;
    l->axis_y = b;
    return 0;
}

static int alloc_plane(bc_layout *l, char *why, size_t cap)
{
    l->nx = l->cells[l->axis_x];
    l->ny = l->axis_y >= 0 ? l->cells[l->axis_y] : 1;
    l->state = malloc((size_t)l->nx * (size_t)l->ny * sizeof *l->state);
    if (!l->state)
        return say(why, cap, "out of memory");
    for (int64_t c = 0; c < (int64_t)l->nx * l->ny; c++)
        l->state[c] = -1;
    return 0;
}

int bc_layout_task(bc_layout *l, const bc_task *t, const bc_grid_opts *o, const bc_model *m,
                   const char *slice, char *why, size_t cap)
{
    memset(l, 0, sizeof *l);
    bc_grid g;
    bc_diag d;
    bc_diag_init(&d);
    int rc = bc_grid_init(&g, t, o, &d);
    if (rc < 0)
        say(why, cap, "%s", d.n ? d.items[0].message : "bad grid");
    bc_diag_free(&d);
    if (rc < 0)
        return -1;
    if (m && m->n_states != g.n_cells && m->n_states != g.n_cells + 1)
        return say(why, cap, "the model has %d states, not the %lld cells of the grid",
                   (int)m->n_states, (long long)g.n_cells);
    l->n_vars = g.n_dims;
    for (int32_t k = 0; k < g.n_dims; k++) {
        l->cells[k] = g.cells[k];
        l->low[k] = g.low[k];
        l->high[k] = g.high[k];
        snprintf(l->var_name[k], sizeof l->var_name[k], "%s", bc_task_var_name(t, k));
    }
    if (parse_slice(l, slice, why, cap) < 0 || alloc_plane(l, why, cap) < 0)
        return -1;
    int64_t base = 0;
    for (int32_t k = 0; k < g.n_dims; k++)
        if (k != l->axis_x && k != l->axis_y)
            base += l->fixed[k] * g.stride[k];
    char name[24 * BC_TASK_MAX_VARS + 2];
    for (int32_t j = 0; j < l->ny; j++)
        for (int32_t i = 0; i < l->nx; i++) {
            int64_t c = base + i * g.stride[l->axis_x] + (l->axis_y >= 0 ? j * g.stride[l->axis_y] : 0);
            bc_grid_cell_name(&g, c, name, sizeof name);
            if (m && strcmp(name, bc_names_get(m->state_names, (int32_t)c))) {
                bc_layout_free(l);
                return say(why, cap, "state %lld of the model is not cell %s of the grid",
                           (long long)c, name);
            }
            l->state[i + (int64_t)j * l->nx] = (int32_t)c;
        }
    return 0;
}

/* ------------------------------------------------------------------------ */
/* Grids read from state names                                              */
/* ------------------------------------------------------------------------ */

/* Splits a name into groups "letters, number": labels[] point into name,
 * idx[] the numbers.  Returns the number of groups, 0 when the name is not
 * of that form (it must end with a number). */
static int split_name(const char *name, const char **label, size_t *label_len, int32_t *idx)
{
    int n = 0;
    const char *p = name;
    while (*p) {
        const char *q = p;
        while (*q && (*q < '0' || *q > '9'))
            q++;
        if (q == p || !*q || n == MAX_GROUPS)
            return 0; /* a number without letters before it, letters at the end, too many */
        long long v = 0;
        const char *r = q;
        while (*r >= '0' && *r <= '9' && v < NAME_CELLS_LIMIT)
            v = 10 * v + (*r++ - '0');
        if (*r >= '0' && *r <= '9')
            return 0;
        label[n] = p;
        label_len[n] = (size_t)(q - p);
        idx[n++] = (int32_t)v;
        p = r;
    }
    return n;
}

/* The variables' names: each group's letters ("x", "y"), or "i1", "i2", ...
 * when some group has no letter or two groups share theirs ("c3_17"). */
static void name_vars(bc_layout *l, const char **label, const size_t *len)
{
    int plain = 1;
    for (int32_t k = 0; k < l->n_vars && plain; k++) {
        size_t n = 0;
        for (size_t c = 0; c < len[k]; c++) {
            char ch = label[k][c];
            if ((ch >= 'a' && ch <= 'z') || (ch >= 'A' && ch <= 'Z') || ch == '_')
                n++;
            else
                plain = 0;
        }
        plain = plain && n > 0 && label[k][0] != '_' && len[k] < sizeof l->var_name[0];
        for (int32_t j = 0; j < k && plain; j++)
            plain = !(len[j] == len[k] && !memcmp(label[j], label[k], len[k]));
    }
    for (int32_t k = 0; k < l->n_vars; k++)
        if (plain)
            snprintf(l->var_name[k], sizeof l->var_name[k], "%.*s", (int)len[k], label[k]);
        else
            snprintf(l->var_name[k], sizeof l->var_name[k], "i%d", (int)k + 1);
}

/* 1 when the groups of a name match the first non-terminal state's letters. */
static int same_labels(int n, const char **label, const size_t *len, int n0, const char **label0,
                       const size_t *len0)
{
    if (n != n0)
        return 0;
    for (int k = 0; k < n; k++)
        if (len[k] != len0[k] || memcmp(label[k], label0[k], len[k]))
            return 0;
    return 1;
}

/* Reads the indices of every state into idx[s * MAX_GROUPS ..]; on[s] = 1
 * for states on the grid.  Sets l->n_vars, low, high, cells, names.
 * Returns 0, or 1 with why[] when the names are no grid. */
static int read_indices(bc_layout *l, const bc_model *m, int32_t *idx, uint8_t *on, char *why,
                        size_t cap)
{
    const char *label0[MAX_GROUPS], *label[MAX_GROUPS];
    size_t len0[MAX_GROUPS], len[MAX_GROUPS];
    int n0 = 0;
    int32_t lo[MAX_GROUPS], hi[MAX_GROUPS], count = 0;
    for (int pass = 0; pass < 2; pass++) /* non-terminal states fix the letters; then terminals may join */
        for (int32_t s = 0; s < m->n_states; s++) {
            if (m->terminal[s] != pass)
                continue;
            const char *name = bc_names_get(m->state_names, s);
            int32_t *v = idx + (int64_t)s * MAX_GROUPS;
            int n = split_name(name, label, len, v);
            if (n0 == 0 && n > 0) {
                n0 = n;
                memcpy(label0, label, sizeof label);
                memcpy(len0, len, sizeof len);
                memcpy(lo, v, sizeof lo);
                memcpy(hi, v, sizeof hi);
            }
            if (n == 0 || !same_labels(n, label, len, n0, label0, len0)) {
                if (pass == 0)
                    return say(why, cap, "state '%s' is not named like the others as a grid "
                               "cell (letters and whole numbers in turn, like 'x3y0')", name), 1;
                continue;
            }
            for (int k = 0; k < n; k++) {
                lo[k] = v[k] < lo[k] ? v[k] : lo[k];
                hi[k] = v[k] > hi[k] ? v[k] : hi[k];
            }
            on[s] = 1;
            count++;
        }
    if (n0 == 0 || count < 2)
        return say(why, cap, "fewer than two states are named as grid cells"), 1;
    int64_t cells = 1;
    l->n_vars = n0;
    for (int k = 0; k < n0; k++) {
        l->cells[k] = hi[k] - lo[k] + 1;
        l->low[k] = lo[k] - 0.5;
        l->high[k] = hi[k] + 0.5;
        cells *= l->cells[k];
        if (cells > NAME_CELLS_LIMIT || cells > 16 * (int64_t)count + 1024)
            return say(why, cap, "the indices in the state names are too sparse for a grid "
                       "(%d states)", (int)count), 1;
    }
    name_vars(l, label0, len0);
    for (int32_t s = 0; s < m->n_states; s++) /* indices from 0 */
        for (int k = 0; on[s] && k < n0; k++)
            idx[(int64_t)s * MAX_GROUPS + k] -= lo[k];
    return 0;
}

/* Puts the states of the drawn plane in place; 1 with why[] when two share a cell. */
static int place_states(bc_layout *l, const bc_model *m, const int32_t *idx, const uint8_t *on,
                        char *why, size_t cap)
{
    for (int32_t s = 0; s < m->n_states; s++) {
        const int32_t *v = idx + (int64_t)s * MAX_GROUPS;
        int in = on[s];
        for (int32_t k = 0; k < l->n_vars && in; k++)
            in = k == l->axis_x || k == l->axis_y || v[k] == l->fixed[k];
        if (!in)
            continue;
        int64_t c = v[l->axis_x] + (l->axis_y >= 0 ? (int64_t)v[l->axis_y] * l->nx : 0);
        if (l->state[c] >= 0)
            return say(why, cap, "states '%s' and '%s' name the same grid cell",
                       bc_names_get(m->state_names, l->state[c]),
                       bc_names_get(m->state_names, s)), 1;
        l->state[c] = s;
    }
    return 0;
}

int bc_layout_names(bc_layout *l, const bc_model *m, const char *slice, char *why, size_t cap)
{
    memset(l, 0, sizeof *l);
    int32_t *idx = malloc((size_t)m->n_states * MAX_GROUPS * sizeof *idx);
    uint8_t *on = calloc((size_t)m->n_states, 1);
    int rc = !idx || !on ? say(why, cap, "out of memory") : read_indices(l, m, idx, on, why, cap);
    if (rc == 0)
        rc = parse_slice(l, slice, why, cap) < 0 || alloc_plane(l, why, cap) < 0 ? -1
             : place_states(l, m, idx, on, why, cap);
    free(idx);
    free(on);
    if (rc != 0)
        bc_layout_free(l);
    return rc;
}

void bc_layout_free(bc_layout *l)
{
    free(l->state);
    l->state = NULL;
    l->nx = l->ny = 0;
}
