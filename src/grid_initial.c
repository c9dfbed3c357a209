/* grid_initial.c — the initial distribution of a grid model: each variable's `initial` line mapped exactly onto its cells, then multiplied out. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Variables start independently, so the probability of a cell is the
 * product over the axes of the probability of its index along that axis:
 *  - `initial X uniform A B`: the share of [A, B] that lies in the cell's
 *    interval, computed exactly from the exact numbers of the file (the
 *    cell boundaries low + i (high - low) / n are rationals too);
 *  - `initial X = V`: probability 1 for the cell bc_grid_cell puts V in (the
 *    double V, as a simulation starting at V would find it).
 * Both sum to exactly 1 on each axis, so their product does over the grid.
 * In the interp scheme a cell's probability goes to its node, the centre.
 */
#include "task_internal.h"

#include <stdlib.h>
#include <string.h>

typedef struct {
    int64_t *index; /* cells along the axis with positive probability */
    bc_num *prob;
    int64_t n;
} axis_mass;

/* The cells of axis j that [A, B] overlaps, with the overlapping shares. */
static int uniform_axis(const bc_task *t, const bc_grid *g, int32_t j, bc_bigtab *big,
                        axis_mass *out)
{
    const bc__task_var *v = &t->var[j];
    int64_t n = g->cells[j];
    /* A first guess of the index range from doubles, widened by one: the exact test decides. */
    double fa = (v->init_a - v->low) / g->width[j], fb = (v->init_b - v->low) / g->width[j];
    int64_t i0 = fa > 1 ? (int64_t)fa - 1 : 0, i1 = fb + 2 < (double)n ? (int64_t)fb + 2 : n;
    out->index = malloc((size_t)(i1 - i0 + 1) * sizeof *out->index);
    out->prob = malloc((size_t)(i1 - i0 + 1) * sizeof *out->prob);
    if (!out->index || !out->prob)
        return -1;
    mpq_t lo, hi, width, a, b, len, cell_lo, cell_hi, ov;
    mpq_inits(lo, hi, width, a, b, len, cell_lo, cell_hi, ov, NULL);
    bc_num_to_mpq(lo, v->low_exact, t->big);
    bc_num_to_mpq(hi, v->high_exact, t->big);
    bc_num_to_mpq(a, v->init_a_exact, t->big);
    bc_num_to_mpq(b, v->init_b_exact, t->big);
    mpq_sub(width, hi, lo);
    mpq_set_si(ov, n, 1);
    mpq_div(width, width, ov);
    mpq_sub(len, b, a);
    int rc = 0;
    for (int64_t i = i0; i < i1 && rc == 0; i++) {
        mpq_set_si(ov, i, 1);
        mpq_mul(cell_lo, width, ov);
        mpq_add(cell_lo, cell_lo, lo);
        mpq_add(cell_hi, cell_lo, width);
        if (mpq_cmp(cell_lo, a) < 0)
            mpq_set(cell_lo, a);
        if (mpq_cmp(cell_hi, b) > 0)
            mpq_set(cell_hi, b);
        mpq_sub(ov, cell_hi, cell_lo);
        if (mpq_sgn(ov) <= 0)
            continue;
        mpq_div(ov, ov, len);
        out->index[out->n] = i;
        rc = bc_num_from_mpq(&out->prob[out->n++], ov, big);
    }
    mpq_clears(lo, hi, width, a, b, len, cell_lo, cell_hi, ov, NULL);
    return rc;
}

static int point_axis(const bc_task *t, const bc_grid *g, int32_t j, axis_mass *out)
{
    out->index = malloc(sizeof *out->index);
    out->prob = malloc(sizeof *out->prob);
    if (!out->index || !out->prob)
        return -1;
    out->index[0] = bc__grid_axis(g, j, t->var[j].init_a);
    out->prob[0] = bc_num_int(1);
    out->n = 1;
    return 0;
}

/* Feeds the product of the axes' masses, cell by cell in index order. */
static int feed_product(bc_builder *b, const bc_grid *g, const axis_mass *ax)
{
    bc_bigtab *big = bc_builder_bigtab(b);
    int64_t pos[BC_TASK_MAX_VARS] = {0};
    char name[BC_NAME_MAX + 1];
    bc_pos at = {0, 0, NULL};
    for (;;) {
        bc_num p = bc_num_int(1);
        int64_t cell = 0;
        for (int32_t j = 0; j < g->n_dims; j++) {
            if (bc_num_mul(p, ax[j].prob[pos[j]], &p, big) < 0)
                return -1;
            cell += ax[j].index[pos[j]] * g->stride[j];
        }
        bc_grid_cell_name(g, cell, name, sizeof name);
        if (bc_builder_initial_add(b, name, strlen(name), &p, at) < 0)
            return -1;
        int32_t j = g->n_dims - 1; /* odometer, last axis fastest */
        while (j >= 0 && ++pos[j] == ax[j].n)
            pos[j--] = 0;
        if (j < 0)
            return 0;
    }
}

int bc__grid_initial(bc_builder *b, const bc_task *t, const bc_grid *g, bc_diag *d)
{
    axis_mass ax[BC_TASK_MAX_VARS];
    memset(ax, 0, sizeof ax);
    int rc = 0;
    for (int32_t j = 0; j < g->n_dims && rc == 0; j++)
        rc = t->var[j].init == BC__INIT_UNIFORM ? uniform_axis(t, g, j, bc_builder_bigtab(b), &ax[j])
                                                : point_axis(t, g, j, &ax[j]);
    if (rc < 0)
        bc_diag_add(d, BC_ERROR, t->label, 0, 0, "out of memory while building the grid's "
                    "initial distribution");
    bc_pos at = {0, 0, NULL};
    if (rc == 0)
        rc = bc_builder_initial_begin(b, at) < 0 || feed_product(b, g, ax) < 0 ||
             bc_builder_initial_end(b, at) < 0 ? -1 : 0;
    for (int32_t j = 0; j < g->n_dims; j++) {
        free(ax[j].index);
        free(ax[j].prob);
    }
    return rc;
}
