/* vi.c — Gauss–Seidel value iteration, stopped by the MacQueen–Porteus bounds (proven for discount < 1). */
/*
 * Copyright (C) 2026 the bellcheck developers.
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Discount g < 1.  For ANY vector v, with d = Tv - v (one Jacobi application
 * of the Bellman operator T),
 *     Tv + g/(1-g) min d  <=  V*  <=  Tv + g/(1-g) max d
 * (MacQueen 1966; Porteus 1971).  So the midpoint of that interval is within
 * the half-width  g/(1-g) (max d - min d)/2  of V* in every state, whatever
 * produced v.  Gauss–Seidel sweeps (cheaper per unit of progress than Jacobi
 * ones) move v; a Jacobi check sweep turns v into a proven answer.
 *
 * Terminal states take part in the bounds as absorbing zero-reward states
 * with d = 0.  Leaving them out would be wrong: the argument needs
 * T(v + c) = Tv + g c for constants c, which fails when probability mass
 * leaves to states whose value is pinned at 0.
 *
 * Discount 1 (total reward until a terminal state): no such bound exists.
 * Value iteration from v = 0 runs until an estimate of its error (from the
 * observed rate of convergence) and max |Tv - v| are below tol, and reports
 * bound = -1 (nothing proven).  From 0 it converges to the best value over
 * ALL policies, counting a zero-reward cycle as worth 0; bellcheck counts
 * a policy that never terminates as worth minus infinity, so when only
 * such a cycle attains the values found, the solve fails and says so.
 */
#include <assert.h>
#include <math.h>
#include <stdlib.h>

#include "bellcheck.h"
#include "solver_internal.h"

/* One Gauss–Seidel sweep in state order: each state's backup already sees
 * the new values of the states before it.  *lo, *hi get the smallest and
 * largest change over non-terminal states (0, 0 if there are none). */
static void gs_sweep(const bc_model *m, double sgn, double *v, double *lo, double *hi)
{
    double a = INFINITY, b = -INFINITY;
    for (int32_t s = 0; s < m->n_states; s++) {
        if (m->terminal[s])
            continue;
        int64_t p;
        double t = bc_sv_backup(m, sgn, v, s, &p);
        double d = t - v[s];
        v[s] = t;
        a = d < a ? d : a;
        b = d > b ? d : b;
    }
    *lo = a <= b ? a : 0.0;
    *hi = a <= b ? b : 0.0;
}

/* What one check of the discounted loop proved. */
typedef struct {
    double half_width; /* g/(1-g) (max d - min d)/2 */
    double allowance;  /* floating-point rounding, see check_and_center */
} vi_check;

/* Jacobi check at v: replaces v (non-terminal states) by the midpoint of the
 * MacQueen–Porteus interval, which is both the answer if we stop and a good
 * point to go on from (the shift removes the slow constant component).
 *
 * Rounding allowance: each computed Tv(s) errs by at most
 * e = bc_sv_backup_error(vmax), so each d(s) errs by at most e plus one
 * rounding of the subtraction (an ulp of |d|); both interval ends then move
 * by at most (e + ulp) (1 + g/(1-g)) = (e + ulp)/(1-g).  Two more ulps of
 * the largest value cover the final additions.  This is a worst-case
 * a-priori bound, not an estimate; the 1/(1-g) is real (a perturbation of
 * T by e moves its fixed point by up to e/(1-g)), so at discounts near 1
 * with large values it can exceed a tight tol: the result then says so. */
static vi_check check_and_center(const bc_model *m, double sgn, const bc_sv_scales *sc, double *v,
                                 double *tv)
{
    const double g = m->discount, c = g / (1.0 - g);
    double dmin, dmax;
    double vmax = bc_sv_bellman(m, sgn, v, tv, &dmin, &dmax);
    double shift = c * (dmin + dmax) / 2.0;
    for (int32_t s = 0; s < m->n_states; s++)
        v[s] = m->terminal[s] ? 0.0 : tv[s] + shift;
    vi_check ck;
    ck.half_width = c * (dmax - dmin) / 2.0;
    double dabs = fmax(fabs(dmin), fabs(dmax));
    ck.allowance = (bc_sv_backup_error(m, sc, vmax) + DBL_EPSILON * dabs) / (1.0 - g) +
                   2.0 * DBL_EPSILON * (vmax + fabs(shift));
    return ck;
}

/* Discount < 1.  Checks cost a sweep each, so they run only when the
 * Gauss–Seidel changes predict success: the prediction g/(1-g) span/2 is
 * scaled by the ratio observed at the previous check. */
static bc_solve_status vi_discounted(const bc_model *m, const bc_solve_opts *o, bc_solution *sol,
                                     double *tv, double t0)
{
    const double g = m->discount, c = g / (1.0 - g), sgn = bc_sv_sign(m);
    const int64_t max_sweeps = o->max_iter > 0 ? o->max_iter : BC_SV_VI_MAX_SWEEPS;
    double *v = sol->values; /* zero at start, zero at terminal states throughout */
    bc_sv_scales sc;
    bc_sv_scales_of(m, &sc);
    double ratio = 1.0;
    int64_t sweeps = 0, checks = 0;
    vi_check ck;
    bc_solve_status st;
    for (;;) {
        double lo, hi;
        gs_sweep(m, sgn, v, &lo, &hi);
        sweeps++;
        double predicted = c * (hi - lo) / 2.0;
        int limit = sweeps >= max_sweeps || bc_sv_out_of_time(o, t0);
        if (predicted * ratio > o->tol && !limit)
            continue;
        ck = check_and_center(m, sgn, &sc, v, tv);
        checks++;
        if (!isfinite(ck.half_width)) {
            snprintf(sol->message, sizeof sol->message,
                     "value iteration: values overflowed after %lld sweeps", (long long)sweeps);
            st = BC_SOLVE_FAILED;
            sol->iterations = sweeps;
            return bc_sv_finish(m, sol, st, t0);
        }
        if (predicted > 0.0 && ck.half_width > 0.0) {
            ratio = ck.half_width / predicted;
            ratio = ratio < 1e-6 ? 1e-6 : ratio > 1e6 ? 1e6 : ratio;
        }
        /* Below the allowance more sweeps cannot help: doubles cannot
         * certify a narrower interval. */
        if (ck.half_width <= o->tol || ck.half_width <= ck.allowance) {
            st = BC_SOLVE_OK;
            break;
        }
        if (limit) {
            st = BC_SOLVE_NOT_CONVERGED;
            break;
        }
    }
    sol->bound = ck.half_width + ck.allowance;
    sol->iterations = sweeps;
    bc_sv_greedy(m, sgn, v, sol->policy);
    int n = snprintf(sol->message, sizeof sol->message,
                     "value iteration: %lld Gauss-Seidel sweeps, %lld checks; proven |V - V*| <= %.3g "
                     "(half-width %.3g + rounding %.3g)",
                     (long long)sweeps, (long long)checks, sol->bound, ck.half_width, ck.allowance);
    if (n > 0 && (size_t)n < sizeof sol->message) {
        if (st == BC_SOLVE_NOT_CONVERGED)
            snprintf(sol->message + n, sizeof sol->message - (size_t)n, "; stopped by %s",
                     sweeps >= max_sweeps ? "the sweep limit" : "the time limit");
        else if (sol->bound > o->tol)
            snprintf(sol->message + n, sizeof sol->message - (size_t)n,
                     "; tolerance %.3g is below what doubles certify here", o->tol);
    }
    return bc_sv_finish(m, sol, st, t0);
}

/* Discount 1 has no contraction factor to bound the error, so the stopping
 * rule estimates one: rho, the geometric mean of the ratio of successive
 * sweep changes over the last RATE_WINDOW sweeps.  For a sequence that
 * converges linearly at rate rho the error left is about change rho/(1-rho)
 * (common practice; an estimate, not a proof).  A residual below tol alone
 * would not do: the error is the residual times the expected number of
 * steps to termination, which may be large. */
#define RATE_WINDOW 10

static double error_estimate(const double *hist, int64_t sweeps, double change, double *rho)
{
    *rho = 1.0;
    if (change == 0.0)
        return 0.0;
    if (sweeps <= RATE_WINDOW)
        return INFINITY;
    double old = hist[(sweeps - RATE_WINDOW) % (RATE_WINDOW + 1)];
    *rho = old > 0.0 ? pow(change / old, 1.0 / RATE_WINDOW) : 1.0;
    return *rho < 1.0 ? change * *rho / (1.0 - *rho) : INFINITY;
}

/* Discount 1: Gauss–Seidel from 0 until the estimated error and the Bellman
 * residual are below tol.  Nothing is proven (bound -1). */
static bc_solve_status vi_total(const bc_model *m, const bc_solve_opts *o, bc_solution *sol,
                                double *tv, double t0)
{
    const double sgn = bc_sv_sign(m);
    const int64_t max_sweeps = o->max_iter > 0 ? o->max_iter : BC_SV_VI_MAX_SWEEPS;
    double *v = sol->values;
    bc_sv_scales sc;
    bc_sv_scales_of(m, &sc);
    int64_t sweeps = 0;
    double hist[RATE_WINDOW + 1] = {0};
    double resid = INFINITY, vmax = 0.0, est = INFINITY, rho = 1.0;
    bc_solve_status st;
    for (;;) {
        double lo, hi;
        gs_sweep(m, sgn, v, &lo, &hi);
        sweeps++;
        double change = fmax(fabs(lo), fabs(hi));
        hist[sweeps % (RATE_WINDOW + 1)] = change;
        int limit = sweeps >= max_sweeps || bc_sv_out_of_time(o, t0);
        if (!isfinite(change)) {
            snprintf(sol->message, sizeof sol->message,
                     "value iteration (discount 1): values overflowed after %lld sweeps "
                     "(a cycle with positive total reward?)", (long long)sweeps);
            sol->iterations = sweeps;
            return bc_sv_finish(m, sol, BC_SOLVE_FAILED, t0);
        }
        est = error_estimate(hist, sweeps, change, &rho);
        if ((change > o->tol || est > o->tol) && !limit)
            continue;
        double dmin, dmax;
        vmax = bc_sv_bellman(m, sgn, v, tv, &dmin, &dmax);
        resid = fmax(fabs(dmin), fabs(dmax));
        st = resid <= o->tol && est <= o->tol ? BC_SOLVE_OK : BC_SOLVE_NOT_CONVERGED;
        if (st == BC_SOLVE_OK || limit)
            break;
    }
    sol->iterations = sweeps;
    sol->bound = -1;
    int32_t bad = -1;
    double tie_tol = 4.0 * (resid + bc_sv_backup_error(m, &sc, vmax));
    int64_t n_bad = bc_sv_greedy_proper(m, sgn, v, tie_tol, sol->policy, &bad);
    if (n_bad < 0) {
        snprintf(sol->message, sizeof sol->message, "value iteration: out of memory");
        return bc_sv_finish(m, sol, BC_SOLVE_NOMEM, t0);
    }
    if (n_bad > 0) {
        /* The values are those of never terminating: a zero-reward cycle
         * ties with or beats every way out.  Non-terminating behaviour is
         * worth minus infinity in bellcheck's reading of discount 1, so these
         * are not the optimum; policy iteration finds the best terminating
         * policy. */
        char label[32];
        snprintf(sol->message, sizeof sol->message,
                 "value iteration (discount 1): the values found are reached only by never "
                 "terminating from state %s (%lld states): a cycle ties with or beats every "
                 "way out, or there is none; pi finds the best terminating policy",
                 bc_sv_state_label(m, bad, label), (long long)n_bad);
        return bc_sv_finish(m, sol, BC_SOLVE_FAILED, t0);
    }
    snprintf(sol->message, sizeof sol->message,
             "value iteration (discount 1): %lld sweeps%s, Bellman residual %.3g, estimated "
             "error %.3g (rate %.4g); no error bound is proven at discount 1",
             (long long)sweeps, st == BC_SOLVE_NOT_CONVERGED ? " (stopped by the limit)" : "", resid,
             est, rho);
    return bc_sv_finish(m, sol, st, t0);
}

bc_solve_status bc_solve_vi(const bc_model *m, const bc_solve_opts *o, bc_solution *sol)
{
    const double t0 = bc_sv_now();
    bc_solve_status st = bc_sv_begin(m, BC_METHOD_VI, sol);
    if (st != BC_SOLVE_OK)
        return st;
    assert(m->discount > 0.0 && m->discount <= 1.0);
    double *tv = malloc((size_t)(m->n_states ? m->n_states : 1) * sizeof *tv);
    if (!tv) {
        snprintf(sol->message, sizeof sol->message, "value iteration: out of memory");
        return bc_sv_finish(m, sol, BC_SOLVE_NOMEM, t0);
    }
    st = m->discount < 1.0 ? vi_discounted(m, o, sol, tv, t0) : vi_total(m, o, sol, tv, t0);
    free(tv);
    return st;
}
