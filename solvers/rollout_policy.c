/* rollout_policy.c — a controller on a grid: the action per cell from a Q-table, a policy file or a solution. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * In a grid model state c is cell c, and action a is the task's action a
 * (grid_build.c declares the actions in task order), so a table over the
 * model's pairs becomes a table over cells.  The controller looks a point up
 * with bc_grid_cell, the rule every grid consumer shares; for the interp
 * scheme the state of cell c is the node at its centre, the nearest node to
 * any point of the cell, so the lookup is the same.
 */
#include "solver_internal.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

void bc_grid_policy_free(bc_grid_policy *gp)
{
    free(gp->action);
    free(gp->cum);
    gp->action = NULL;
    gp->cum = NULL;
}

/* Lays the grid and checks that m is the grid model of (t, o); allocates
 * the deterministic table when `deterministic`.  0, or -1 after reporting. */
static int begin(bc_grid_policy *gp, const bc_task *t, const bc_grid_opts *o, const bc_model *m,
                 int deterministic, bc_diag *d)
{
    memset(gp, 0, sizeof *gp);
    if (bc_grid_init(&gp->grid, t, o, d) < 0)
        return -1;
    gp->scheme = o->scheme;
    gp->n_actions = bc_task_n_actions(t);
    if (m->n_states < gp->grid.n_cells || m->n_actions != gp->n_actions) {
        bc_diag_add(d, BC_ERROR, NULL, 0, 0, "the model is not the grid model of the task "
                    "(%d states for %lld cells, %d actions for %d)", (int)m->n_states,
                    (long long)gp->grid.n_cells, (int)m->n_actions, (int)gp->n_actions);
        return -1;
    }
    size_t n = (size_t)gp->grid.n_cells;
    if (deterministic)
        gp->action = malloc(n * sizeof *gp->action);
    else
        gp->cum = malloc(n * (size_t)gp->n_actions * sizeof *gp->cum);
    if (deterministic ? !gp->action : !gp->cum) {
        bc_diag_add(d, BC_ERROR, NULL, 0, 0, "out of memory for the controller's table");
        return -1;
    }
    return 0;
}

/* The name of cell c, for messages. */
static const char *cell_label(const bc_grid_policy *gp, int64_t c, char *buf, size_t cap)
{
    bc_grid_cell_name(&gp->grid, c, buf, cap);
    return buf;
}

/* Checks that cell c is a live state of m; 0, or -1 after reporting. */
static int live_cell(const bc_grid_policy *gp, const bc_model *m, int64_t c, const uint8_t *present,
                     bc_diag *d)
{
    char name[64];
    if (m->terminal[c] || m->state_pair_start[c] == m->state_pair_start[c + 1]) {
        bc_diag_add(d, BC_ERROR, NULL, 0, 0, "cell %s has no action in the model",
                    cell_label(gp, c, name, sizeof name));
        return -1;
    }
    if (present && !present[c]) {
        bc_diag_add(d, BC_ERROR, NULL, 0, 0, "the agent's file does not cover cell %s, which a "
                    "simulation may visit", cell_label(gp, c, name, sizeof name));
        return -1;
    }
    return 0;
}

int bc_grid_policy_from_q(bc_grid_policy *gp, const bc_task *t, const bc_grid_opts *o,
                          const bc_model *m, const bc_qtable *q, bc_diag *d)
{
    if (begin(gp, t, o, m, 1, d) < 0)
        goto fail;
    const double sgn = bc_sv_sign(m);
    for (int64_t c = 0; c < gp->grid.n_cells; c++) {
        if (live_cell(gp, m, c, q->present, d) < 0)
            goto fail;
        int64_t best = -1;
        for (int64_t p = m->state_pair_start[c]; p < m->state_pair_start[c + 1]; p++) {
            if (!isfinite(q->q[p])) {
                char name[64];
                bc_diag_add(d, BC_ERROR, NULL, 0, 0, "the Q-table has a non-finite value at "
                            "cell %s, action %s", cell_label(gp, c, name, sizeof name),
                            bc_names_get(m->action_names, m->pair_action[p]));
                goto fail;
            }
            if (best < 0 || sgn * q->q[p] > sgn * q->q[best])
                best = p;
        }
        gp->action[c] = m->pair_action[best];
    }
    return 0;
fail:
    bc_grid_policy_free(gp);
    return -1;
}

int bc_grid_policy_from_policy(bc_grid_policy *gp, const bc_task *t, const bc_grid_opts *o,
                               const bc_model *m, const bc_policy *p, bc_diag *d)
{
    if (begin(gp, t, o, m, p->deterministic, d) < 0)
        goto fail;
    for (int64_t c = 0; c < gp->grid.n_cells; c++) {
        if (live_cell(gp, m, c, p->present, d) < 0)
            goto fail;
        double *cum = gp->cum ? gp->cum + c * gp->n_actions : NULL, sum = 0.0;
        if (cum)
            memset(cum, 0, (size_t)gp->n_actions * sizeof *cum);
        else
            gp->action[c] = m->pair_action[m->state_pair_start[c]];
        for (int64_t q = m->state_pair_start[c]; q < m->state_pair_start[c + 1]; q++) {
            if (!cum && p->prob[q] == 1.0)
                gp->action[c] = m->pair_action[q];
            if (cum)
                cum[m->pair_action[q]] = p->prob[q];
        }
        for (int32_t a = 0; cum && a < gp->n_actions; a++)
            cum[a] = sum += cum[a];
        if (cum) /* the reader checked the sum to 1e-9; the last action takes what rounding left */
            cum[gp->n_actions - 1] = 1.0;
    }
    return 0;
fail:
    bc_grid_policy_free(gp);
    return -1;
}

int bc_grid_policy_from_pairs(bc_grid_policy *gp, const bc_task *t, const bc_grid_opts *o,
                              const bc_model *m, const int64_t *pair, bc_diag *d)
{
    if (begin(gp, t, o, m, 1, d) < 0)
        goto fail;
    for (int64_t c = 0; c < gp->grid.n_cells; c++) {
        if (live_cell(gp, m, c, NULL, d) < 0)
            goto fail;
        if (pair[c] < m->state_pair_start[c] || pair[c] >= m->state_pair_start[c + 1]) {
            bc_diag_add(d, BC_ERROR, NULL, 0, 0, "the policy's pair of cell %lld is not one of "
                        "its pairs", (long long)c);
            goto fail;
        }
        gp->action[c] = m->pair_action[pair[c]];
    }
    return 0;
fail:
    bc_grid_policy_free(gp);
    return -1;
}
