/* grid_analyse.c — what `check` says about a grid model itself: cells the grid makes stuck, cells never entered, actions that never change the cell. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * These are faults of the discretisation, not of the task, so each comes
 * with its remedy in the report: a cell whose every action leads back to
 * itself with probability 1 while the continuous dynamics do move its centre
 * is held by the grid (one step moves less than a cell) — a finer grid or
 * another scheme frees it.  The model must be the one bc_grid_model built
 * for the same task and options: cell c is state c.
 */
#include "task_internal.h"

#include <stdlib.h>
#include <string.h>

/* 1 when every successor of pair p is state s. */
static int pair_stays(const bc_model *m, int64_t p, int32_t s)
{
    for (int64_t k = m->pair_trans_start[p]; k < m->pair_trans_start[p + 1]; k++)
        if (m->succ_state[k] != s)
            return 0;
    return 1;
}

/* 1 when some action moves the centre of cell c (noise at its median); a
 * step that fails counts as moving: the model build reports such steps. */
static int centre_moves(const bc_task *t, const bc_grid *g, int64_t c)
{
    double x[BC_TASK_MAX_VARS], y[BC_TASK_MAX_VARS], noise[BC_TASK_MAX_NOISE], r;
    int stop;
    bc_grid_cell_center(g, c, x);
    for (int32_t k = 0; k < t->n_noise; k++)
        noise[k] = bc_task_noise_at(t, k, 0.5);
    for (int32_t a = 0; a < t->n_actions; a++) {
        if (bc_task_step(t, x, a, noise, y, &r, &stop) < 0 || stop)
            return 1;
        for (int32_t j = 0; j < g->n_dims; j++)
            if (y[j] != x[j])
                return 1;
    }
    return 0;
}

void bc_grid_findings_free(bc_grid_findings *f)
{
    free(f->stuck);
    free(f->never_entered);
    free(f->idle_actions);
    f->stuck = f->never_entered = f->idle_actions = NULL;
    f->n_stuck = f->n_never_entered = f->n_idle_actions = 0;
}

int bc_grid_analyse(const bc_task *t, const bc_grid_opts *o, const bc_model *m, bc_grid_findings *f)
{
    memset(f, 0, sizeof *f);
    f->opts = *o;
    bc_grid g;
    bc_diag d;
    bc_diag_init(&d);
    int bad = bc_grid_init(&g, t, o, &d) < 0 || g.n_cells > m->n_states;
    bc_diag_free(&d);
    if (bad)
        return -1;
    int32_t n = (int32_t)g.n_cells;
    uint8_t *entered = calloc((size_t)n, 1), *moves = calloc((size_t)m->n_actions, 1);
    f->stuck = malloc((size_t)n * sizeof *f->stuck);
    f->never_entered = malloc((size_t)n * sizeof *f->never_entered);
    f->idle_actions = malloc((size_t)(m->n_actions ? m->n_actions : 1) * sizeof *f->idle_actions);
    if (!entered || !moves || !f->stuck || !f->never_entered || !f->idle_actions) {
        free(entered);
        free(moves);
        bc_grid_findings_free(f);
        return -1;
    }
    for (int32_t s = 0; s < n; s++) {
        int all_stay = m->state_pair_start[s] < m->state_pair_start[s + 1];
        for (int64_t p = m->state_pair_start[s]; p < m->state_pair_start[s + 1]; p++) {
            int stays = pair_stays(m, p, s);
            all_stay &= stays;
            if (!stays)
                moves[m->pair_action[p]] = 1;
            for (int64_t k = m->pair_trans_start[p]; k < m->pair_trans_start[p + 1]; k++)
                if (m->succ_state[k] != s && m->succ_state[k] < n)
                    entered[m->succ_state[k]] = 1;
        }
        if (all_stay && centre_moves(t, &g, s))
            f->stuck[f->n_stuck++] = s;
    }
    for (int32_t s = 0; s < n; s++)
        if (!entered[s] && !(m->initial[s] > 0))
            f->never_entered[f->n_never_entered++] = s;
    for (int32_t a = 0; a < m->n_actions; a++)
        if (!moves[a])
            f->idle_actions[f->n_idle_actions++] = a;
    free(entered);
    free(moves);
    return 0;
}
