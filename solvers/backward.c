/* backward.c — backward induction for finite-horizon models: one exact sweep per stage, last stage first. */
/*
 * Copyright (C) 2026 the bellcheck developers.
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * With H decisions left to take at stage 0:  V_H = 0 and, for t = H-1 .. 0,
 *     V_t(s) = max_p [ r(p) + g sum_u P(u|p) V_{t+1}(u) ]
 * (Puterman 1994, section 4.5).  This is exact up to floating-point rounding,
 * so the bound is only a rounding allowance: stage t adds at most
 * e_t = bc_sv_backup_error(max |V_{t+1}|) and passes the error of stage t+1
 * on multiplied by g (a backup is g-Lipschitz in the max norm), so
 * err_t = e_t + g err_{t+1}, err_H = 0, and bound = err_0.
 */
#include <assert.h>
#include <math.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include "bellcheck.h"
#include "solver_internal.h"

/* One stage: cur = backup of next; choice gets the pairs (-1 for terminal
 * states).  Returns max_s |cur(s)|. */
static double stage(const bc_model *m, double sgn, const double *next, double *cur, int64_t *choice)
{
    double vmax = 0.0;
    for (int32_t s = 0; s < m->n_states; s++) {
        if (m->terminal[s]) {
            cur[s] = 0.0;
            choice[s] = -1;
            continue;
        }
        cur[s] = bc_sv_backup(m, sgn, next, s, &choice[s]);
        vmax = fmax(vmax, fabs(cur[s]));
    }
    return vmax;
}

bc_solve_status bc_solve_backward(const bc_model *m, const bc_solve_opts *o, bc_solution *sol)
{
    const double t0 = bc_sv_now(), sgn = bc_sv_sign(m);
    bc_solve_status st = bc_sv_begin(m, BC_METHOD_BACKWARD, sol);
    if (st != BC_SOLVE_OK)
        return st;
    const size_t n = (size_t)m->n_states, h = (size_t)m->horizon;
    double *next = calloc(n ? n : 1, sizeof *next); /* V_{t+1}; V_H = 0 */
    if (n && h > SIZE_MAX / sizeof(int64_t) / n)
        sol->stage_policy = NULL;
    else
        sol->stage_policy = malloc((h * n > 0 ? h * n : 1) * sizeof *sol->stage_policy);
    if (!next || !sol->stage_policy) {
        free(next);
        snprintf(sol->message, sizeof sol->message,
                 "backward induction: out of memory for %zu stages of %zu states", h, n);
        return bc_sv_finish(m, sol, BC_SOLVE_NOMEM, t0);
    }
    bc_sv_scales sc;
    bc_sv_scales_of(m, &sc);
    double vmax_next = 0.0, err = 0.0;
    double *cur = sol->values, *spare = next;
    st = BC_SOLVE_OK;
    for (int32_t t = m->horizon - 1; t >= 0; t--) {
        if (bc_sv_out_of_time(o, t0)) {
            st = BC_SOLVE_NOT_CONVERGED;
            break;
        }
        err = bc_sv_backup_error(m, &sc, vmax_next) + m->discount * err;
        vmax_next = stage(m, sgn, next, cur, sol->stage_policy + (size_t)t * n);
        sol->iterations++;
        double *swap = next; /* V_t becomes the input of stage t-1 */
        next = cur;
        cur = swap;
    }
    if (next != sol->values) /* next holds the last stage computed */
        memcpy(sol->values, next, n * sizeof *next);
    free(spare);
    if (st == BC_SOLVE_NOT_CONVERGED) {
        /* Stages 0..t were not computed: there is no stage-0 answer. */
        free(sol->stage_policy);
        sol->stage_policy = NULL;
        memset(sol->values, 0, n * sizeof *sol->values);
        snprintf(sol->message, sizeof sol->message,
                 "backward induction: time limit reached after %lld of %d stages",
                 (long long)sol->iterations, (int)m->horizon);
        return bc_sv_finish(m, sol, st, t0);
    }
    memcpy(sol->policy, sol->stage_policy, n * sizeof *sol->policy);
    sol->bound = err;
    snprintf(sol->message, sizeof sol->message,
             "backward induction: %d stages; exact up to rounding, |V - V*| <= %.3g",
             (int)m->horizon, sol->bound);
    return bc_sv_finish(m, sol, st, t0);
}
