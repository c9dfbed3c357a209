/* refine.c — a grid-refinement study: each grid's proven optimum, the observed order of convergence, Richardson's estimate, and each grid's policy simulated in the task. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * With values V_1, V_2, V_3 on grids of relative cell size h_1 > h_2 > h_3
 * refined by a constant ratio r = h_1/h_2 = h_2/h_3, and an error that
 * behaves like C h^p, the differences d_2 = V_2 - V_1 and d_3 = V_3 - V_2
 * give the observed order p = log(|d_2| / |d_3|) / log r and the Richardson
 * estimate V_3 + d_3 / (r^p - 1) of the limit (Richardson 1911; Roache,
 * Verification and Validation in Computational Science and Engineering,
 * 1998).  With p taken from the same three values the estimate is Aitken's
 * delta-squared: V_3 + d_3^2 / (d_2 - d_3).  It needs the differences to
 * shrink and keep their sign; otherwise the grids are not yet in the range
 * where the error behaves like C h^p, and no estimate is given.
 *
 * Each grid's optimal policy is simulated with the same seed, so the grids
 * meet the same start states and noise (common random numbers), and from
 * the second grid on the simulation also runs the previous grid's policy
 * beside it: the paired difference says whether the finer grid controls
 * the task better.
 */
#include "rollout_internal.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

void bc_refine_opts_default(bc_refine_opts *o)
{
    memset(o, 0, sizeof *o);
    bc_solve_opts_default(&o->solve);
    bc_prove_opts_default(&o->prove);
    bc_rollout_opts_default(&o->rollout);
    o->max_points = 100000;
}

static double seconds_now(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

/* 1 when m has an optimum (check's fatal findings absent); -1 out of memory. */
static int usable(const bc_model *m, bc_refine_level *L)
{
    bc_findings fd;
    if (bc_analyse(m, &fd) < 0)
        return -1;
    int ok = !bc_findings_fatal(m, &fd);
    if (fd.n_unbounded > 0)
        snprintf(L->message, sizeof L->message, "not usable: a policy can stay forever in %d "
                 "state%s while collecting rewards, so no optimum exists", (int)fd.n_unbounded,
                 fd.n_unbounded == 1 ? "" : "s");
    else if (!ok)
        snprintf(L->message, sizeof L->message, "not usable: with discount 1, no policy reaches "
                 "`stop` with probability 1 from %d state%s (see `check` on this grid)",
                 (int)fd.n_no_exit, fd.n_no_exit == 1 ? "" : "s");
    bc_findings_free(&fd);
    return ok;
}

/* Solves and proves m into L (values, policy, value and its proof).  0; -1
 * when the solve or its proof failed (status and message set); -2 out of
 * memory (reported in d). */
static int solve_level(const bc_task *t, const bc_model *m, const bc_refine_opts *o,
                       bc_refine_level *L, bc_diag *d)
{
    bc_solution sol;
    bc_solution_init(&sol);
    bc_proof_result pr;
    memset(&pr, 0, sizeof pr);
    int rc = -1;
    bc_solve_status st = bc_solve(m, BC_METHOD_AUTO, &o->solve, &sol);
    L->method = sol.method;
    if (st != BC_SOLVE_OK) {
        snprintf(L->message, sizeof L->message, "%s: %.200s", bc_method_name(sol.method), sol.message);
        goto done;
    }
    if (bc_prove_solution(m, &sol, &o->prove, &pr) < 0) {
        snprintf(L->message, sizeof L->message, "the proof failed: %.200s", pr.message);
        goto done;
    }
    L->value = sol.value_initial;
    L->value_proof = pr.initial;
    snprintf(L->message, sizeof L->message, "%.250s", pr.message);
    L->values = malloc((size_t)m->n_states * sizeof *L->values);
    if (!L->values || bc_grid_policy_from_pairs(&L->policy, t, &L->grid, m, sol.policy, d) < 0) {
        if (!L->values)
            bc_diag_add(d, BC_ERROR, NULL, 0, 0, "out of memory");
        rc = -2;
        goto done;
    }
    memcpy(L->values, sol.values, (size_t)m->n_states * sizeof *L->values);
    rc = 0;
done:
    if (rc == -1)
        L->status = BC_REFINE_SOLVER;
    bc_proof_result_free(&pr);
    bc_solution_free(&sol);
    return rc;
}

/* Simulates L's policy (beside prev's, when given) and keeps trajectories. */
static void simulate_level(const bc_task *t, const bc_refine_opts *o, bc_refine_level *L,
                           const bc_refine_level *prev)
{
    const bc_grid_policy *against = prev ? &prev->policy : NULL;
    if (bc_rollout(t, &L->policy, against, &o->rollout, &L->sim) < 0) {
        L->status = BC_REFINE_SIMULATION;
        snprintf(L->message, sizeof L->message, "simulation: %.230s", L->sim.message);
        return;
    }
    L->has_gain = against != NULL;
    if (o->n_trajectories <= 0)
        return;
    L->trajectories = calloc((size_t)o->n_trajectories, sizeof *L->trajectories);
    char why[256] = "out of memory";
    if (!L->trajectories || bc_rollout_trajectories(t, &L->policy, &o->rollout, o->n_trajectories,
                                                    o->max_points, L->trajectories, why,
                                                    sizeof why) < 0) {
        free(L->trajectories);
        L->trajectories = NULL;
        L->status = BC_REFINE_SIMULATION;
        snprintf(L->message, sizeof L->message, "trajectories: %.200s", why);
        return;
    }
    L->n_trajectories = o->n_trajectories;
}

/* Differences, observed orders and Richardson estimates along the levels. */
static void extrapolate(bc_refine *r)
{
    r->extrapolated = NAN;
    snprintf(r->note, sizeof r->note, "an extrapolation needs three grids that solved");
    for (int32_t k = 0; k < r->n_levels; k++) {
        bc_refine_level *L = &r->level[k];
        L->difference = L->order = L->extrapolated = NAN;
        if (k < 1 || L->status != BC_REFINE_OK || r->level[k - 1].status != BC_REFINE_OK)
            continue;
        L->difference = L->value - r->level[k - 1].value;
        if (k < 2 || r->level[k - 2].status != BC_REFINE_OK)
            continue;
        double d1 = r->level[k - 1].difference, d2 = L->difference;
        double ratio = r->level[k - 1].h / L->h;
        if (d2 == 0.0) {
            L->extrapolated = L->value; /* the values no longer change */
            continue;
        }
        if (d1 == 0.0)
            continue;
        L->order = log(fabs(d1) / fabs(d2)) / log(ratio);
        if (L->order > 0 && (d1 > 0) == (d2 > 0))
            L->extrapolated = L->value + d2 / (pow(ratio, L->order) - 1.0);
    }
    const bc_refine_level *last = &r->level[r->n_levels - 1];
    if (!isnan(last->extrapolated)) {
        r->extrapolated = last->extrapolated;
        r->note[0] = 0;
    } else if (!isnan(last->order)) {
        snprintf(r->note, sizeof r->note, "the differences between the last grids %s: the grids "
                 "are not yet fine enough for an extrapolation",
                 last->order <= 0 ? "do not shrink" : "change sign");
    }
}

int bc_refine_run(const bc_task *t, const bc_grid_opts *grids, int32_t n, const bc_refine_opts *o,
                  bc_refine *out, bc_diag *d)
{
    memset(out, 0, sizeof *out);
    out->level = calloc((size_t)(n > 0 ? n : 1), sizeof *out->level);
    if (!out->level) {
        bc_diag_add(d, BC_ERROR, NULL, 0, 0, "out of memory");
        return -1;
    }
    out->n_levels = n;
    const bc_refine_level *prev = NULL;
    for (int32_t k = 0; k < n; k++) {
        bc_refine_level *L = &out->level[k];
        const double t0 = seconds_now();
        L->grid = grids[k];
        double cells = 1.0;
        for (int32_t j = 0; j < grids[k].n_dims; j++)
            cells *= grids[k].cells[j];
        L->h = pow(cells, -1.0 / grids[k].n_dims);
        bc_model *m = bc_grid_model(t, &grids[k], d);
        if (!m)
            return -1;
        L->n_states = m->n_states;
        L->n_trans = m->n_trans;
        int ok = usable(m, L);
        if (ok < 0)
            bc_diag_add(d, BC_ERROR, NULL, 0, 0, "out of memory");
        if (ok < 0 || (ok > 0 && solve_level(t, m, o, L, d) == -2)) {
            bc_model_free(m);
            return -1;
        }
        if (ok == 0)
            L->status = BC_REFINE_UNUSABLE;
        bc_model_free(m);
        L->seconds = seconds_now() - t0;
        if (L->status == BC_REFINE_OK)
            simulate_level(t, o, L, prev && prev->status == BC_REFINE_OK ? prev : NULL);
        prev = L;
    }
    extrapolate(out);
    return 0;
}

void bc_refine_free(bc_refine *r)
{
    for (int32_t k = 0; r->level && k < r->n_levels; k++) {
        bc_refine_level *L = &r->level[k];
        free(L->values);
        bc_grid_policy_free(&L->policy);
        bc_trajectories_free(L->trajectories, L->n_trajectories);
        free(L->trajectories);
    }
    free(r->level);
    r->level = NULL;
    r->n_levels = 0;
}
