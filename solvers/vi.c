/* vi.c — value iteration: Jacobi sweeps stopped by the MacQueen–Porteus bounds (proven for discount < 1); Gauss–Seidel at discount 1. */
/*
 * Copyright (C) 2026 the bellcheck developers.
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Discount g < 1.  For ANY vector v, with d = Tv - v (one Jacobi application
 * of the Bellman operator T),
 *     Tv + g/(1-g) min d  <=  V*  <=  Tv + g/(1-g) max d
 * (MacQueen 1966; Porteus 1971).  So the midpoint of that interval is within
 * the half-width  g/(1-g) (max d - min d)/2  of V* in every state, whatever
 * produced v.  Every sweep is a Jacobi one (solvers/sweep.c, threaded with
 * results independent of the thread count) and so every sweep is a check;
 * going on from the midpoint, the half-width shrinks at the rate of the
 * chain's mixing, which on random models is far faster than g.
 *
 * Terminal states take part in the bounds as absorbing zero-reward states
 * with d = 0.  Leaving them out would be wrong: the argument needs
 * T(v + c) = Tv + g c for constants c, which fails when probability mass
 * leaves to states whose value is pinned at 0.
 *
 * Discount 1 (total reward until a terminal state): no such bound exists.
 * Gauss-Seidel value iteration from v = 0 runs until an estimate of its
 * error (from the observed rate of convergence) and max |Tv - v| are below
 * tol, and reports bound = -1 (nothing proven).  From 0 it converges to the
 * best value over ALL policies, counting a zero-reward cycle as worth 0;
 * bellcheck counts a policy that never terminates as worth minus infinity,
 * so when only such a cycle attains the values found, the solve fails and
 * says so.
 */
#include <assert.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "bellcheck.h"
#include "solver_internal.h"
#include "sweep_internal.h"

/* One Gauss–Seidel sweep in state order: each state's backup already sees
 * the new values of the states before it.  *lo, *hi get the smallest and
 * largest change over non-terminal states (0, 0 if there are none); with
 * policy set, policy[s] gets the greedy pair and the result is the number
 * of states whose pair changed.  (Visiting the states by their distance to
 * the terminal states instead did not save sweeps on the crater-rover grid,
 * whose paths circle, and lost the arrays' locality: 1.5 times the time.) */
static int64_t gs_sweep(const bc_model *m, double sgn, double *v, int64_t *policy, double *lo,
                        double *hi)
{
    double a = INFINITY, b = -INFINITY;
    int64_t changed = 0;
    for (int32_t s = 0; s < m->n_states; s++) {
        if (m->terminal[s])
            continue;
        int64_t p;
        double t = bc_sv_backup(m, sgn, v, s, &p);
        double d = t - v[s];
        v[s] = t;
        a = d < a ? d : a;
        b = d > b ? d : b;
        if (policy) {
            changed += policy[s] != p;
            policy[s] = p;
        }
    }
    *lo = a <= b ? a : 0.0;
    *hi = a <= b ? b : 0.0;
    return changed;
}

/* Rounding allowance of one MacQueen-Porteus interval: each computed Tv(s)
 * errs by at most e = bc_sv_backup_error(vmax), so each d(s) errs by at most
 * e plus one rounding of the subtraction (an ulp of |d|); both interval ends
 * then move by at most (e + ulp) (1 + g/(1-g)) = (e + ulp)/(1-g).  Two more
 * ulps of the largest value cover the final additions.  This is a worst-case
 * a-priori bound, not an estimate; the 1/(1-g) is real (a perturbation of T
 * by e moves its fixed point by up to e/(1-g)), so at discounts near 1 with
 * large values it can exceed a tight tol: the result then says so. */
static double allowance(const bc_model *m, const bc_sv_scales *sc, const bc__sweep_stat *st,
                        double shift)
{
    double dabs = fmax(fabs(st->dmin), fabs(st->dmax));
    return (bc_sv_backup_error(m, sc, st->vmax) + DBL_EPSILON * dabs) / (1.0 - m->discount) +
           2.0 * DBL_EPSILON * (st->vmax + fabs(shift));
}

/* 1 when the half-widths seen so far predict that reaching tol takes more
 * than BC_SV_HANDOVER_SWEEPS further sweeps: the rate is the geometric mean
 * of the last RATE_SPAN ratios of successive half-widths. */
#define RATE_SPAN 8
static int converging_slowly(const double *hist, int64_t sweeps, double half, double tol)
{
    if (sweeps <= 2 * RATE_SPAN)
        return 0;
    double old = hist[(sweeps - RATE_SPAN) % (RATE_SPAN + 1)];
    if (!(old > 0.0) || !(half > 0.0) || half <= tol)
        return 0;
    double rho = pow(half / old, 1.0 / RATE_SPAN);
    if (rho >= 1.0)
        return 1;
    return log(tol / half) / log(rho) > BC_SV_HANDOVER_SWEEPS;
}

/* 1 when the greedy policy has settled, `since` sweeps after the slow
 * convergence was noticed: no state's greedy pair changed in the last sweep
 * (greedy against the previous one, kept in policy, which it then
 * replaces), after a sweep in which at least 1% of the states changed.
 * While the news of a distant reward spreads, the changes follow its front
 * (and early on there may be none at all, the front being small); near-ties
 * may keep flipping for ever, so the caller also caps the sweeps.  On a
 * 200 x 200 grid at discount 0.999 one sweep cost about 1/300 of a
 * factorisation, and policy iteration needed 22 evaluations from the policy
 * of 330 sweeps but one from that of 1,000: sweeps are the cheap way to a
 * good start. */
static int policy_settled(const bc_model *m, int64_t *policy, const int64_t *greedy,
                          int64_t since, int64_t *peak)
{
    int64_t changed = 0;
    for (int32_t s = 0; s < m->n_states; s++) {
        changed += policy[s] != greedy[s];
        policy[s] = greedy[s];
    }
    if (since < 2)
        return 0; /* the first comparison is against no policy */
    *peak = changed > *peak ? changed : *peak;
    return changed == 0 && *peak * 100 >= m->n_states;
}

/* Writes the midpoint v + shift (0 at terminal states) into out, which may be v. */
static void to_midpoint(const bc_model *m, const double *v, double *out, double shift)
{
    for (int32_t s = 0; s < m->n_states; s++)
        out[s] = m->terminal[s] ? 0.0 : v[s] + shift;
}

/* Discount < 1: Jacobi sweeps v <- Tv, each one a check; the answer is the
 * midpoint of the last MacQueen-Porteus interval.  The half-width shrinks
 * at the rate the chain mixes (the constant component, which decays only
 * like g, does not enter it).  The iterates are not moved to the midpoints:
 * where probability leaks to terminal states a constant shift is not
 * carried over as g times itself, and shifting every sweep can diverge.
 * With handover set, the loop also stops, with *slow = 1, when the
 * half-widths predict a long way to go (see bc_solve). */
static bc_solve_status vi_discounted(const bc_model *m, const bc_solve_opts *o, bc_solution *sol,
                                     double *tv, int64_t *tv_policy, double t0, int handover,
                                     int *slow)
{
    const double g = m->discount, c = g / (1.0 - g), sgn = bc_sv_sign(m);
    const int64_t max_sweeps = o->max_iter > 0 ? o->max_iter : BC_SV_VI_MAX_SWEEPS;
    double *v = sol->values, *first = sol->values; /* 0 at start and at terminal states */
    double shift = 0.0;
    bc_sv_scales sc;
    bc_sv_scales_of(m, &sc);
    double hist[RATE_SPAN + 1] = {0}, half = INFINITY, allow = 0.0, resid = INFINITY;
    int64_t sweeps = 0, slow_since = 0, peak = 0, below = 0;
    int64_t *greedy = tv_policy; /* the greedy policy of the last sweep (handover only) */
    bc_solve_status st;
    for (;;) {
        bc__sweep_stat ss;
        bc__sweep_jacobi(m, sgn, v, tv, slow_since ? greedy : NULL, o->threads, &ss);
        sweeps++;
        half = c * (ss.dmax - ss.dmin) / 2.0;
        shift = c * (ss.dmin + ss.dmax) / 2.0;
        double *swap = v; /* v <- Tv (terminal states stay 0) */
        v = tv, tv = swap;
        if (!isfinite(half) || !isfinite(shift)) {
            snprintf(sol->message, sizeof sol->message,
                     "value iteration: values overflowed after %lld sweeps", (long long)sweeps);
            sol->iterations = sweeps;
            to_midpoint(m, v, first, 0.0);
            return bc_sv_finish(m, sol, BC_SOLVE_FAILED, t0);
        }
        allow = allowance(m, &sc, &ss, shift);
        resid = fmax(fabs(ss.dmin), fabs(ss.dmax));
        bc_sv_trace(sol, BC_METHOD_VI, sweeps, resid, half + allow);
        hist[sweeps % (RATE_SPAN + 1)] = half;
        /* Below the allowance, rounding may decide the half-width and more
         * sweeps may not help: go on while it has not halved, for at most
         * a tenth more sweeps (at least 64). */
        below = half <= allow ? (below ? below : sweeps) : 0;
        if (half <= o->tol ||
            (below && (half <= 0.5 * allow || sweeps - below >= (below / 10 > 64 ? below / 10 : 64)))) {
            st = BC_SOLVE_OK;
            break;
        }
        if (sweeps >= max_sweeps || bc_sv_out_of_time(o, t0)) {
            st = BC_SOLVE_NOT_CONVERGED;
            break;
        }
        if (bc_stop_requested()) {
            st = BC_SOLVE_INTERRUPTED;
            break;
        }
        if (handover && (slow_since || converging_slowly(hist, sweeps, half, o->tol))) {
            /* Slow: go on only until the greedy policy settles, so that
             * policy iteration starts close to the optimum (on a large grid
             * the reward's news travels one cell per sweep). */
            slow_since = slow_since ? slow_since : sweeps;
            if (policy_settled(m, sol->policy, greedy, sweeps - slow_since, &peak) ||
                sweeps - slow_since >= BC_SV_WARM_SWEEPS) {
                *slow = 1;
                bc_sv_trace_last(sol, BC_METHOD_VI, sweeps, resid, half + allow);
                sol->iterations = sweeps;
                to_midpoint(m, v, first, shift);
                return BC_SOLVE_NOT_CONVERGED;
            }
        }
    }
    sol->bound = half + allow;
    sol->iterations = sweeps;
    bc_sv_trace_last(sol, BC_METHOD_VI, sweeps, resid, sol->bound);
    to_midpoint(m, v, first, shift);
    bc__sweep_stat ss; /* the greedy policy, with the other buffer as scratch */
    bc__sweep_jacobi(m, sgn, first, v == first ? tv : v, sol->policy, o->threads, &ss);
    int n = snprintf(sol->message, sizeof sol->message,
                     "value iteration: %lld Jacobi sweeps with MacQueen-Porteus bounds; proven "
                     "|V - V*| <= %.3g (half-width %.3g + rounding %.3g)",
                     (long long)sweeps, sol->bound, half, allow);
    if (n > 0 && (size_t)n < sizeof sol->message) {
        if (st == BC_SOLVE_INTERRUPTED)
            snprintf(sol->message + n, sizeof sol->message - (size_t)n, "; interrupted");
        else if (st == BC_SOLVE_NOT_CONVERGED)
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

/* Discount 1: Gauss–Seidel from 0 until the estimated
 * error and the Bellman residual are below tol.  Nothing is proven (bound
 * -1).  With handover, it stops earlier, with *slow = 1 and the values so
 * far, once the greedy policy has settled or
 * BC_SV_WARM_SWEEPS sweeps are spent: one evaluation of that policy is then
 * cheaper than the sweeps still to go, and proves its bound. */
static bc_solve_status vi_total(const bc_model *m, const bc_solve_opts *o, bc_solution *sol,
                                double *tv, double t0, int handover, int *slow)
{
    const double sgn = bc_sv_sign(m);
    const int64_t max_sweeps = o->max_iter > 0 ? o->max_iter : BC_SV_VI_MAX_SWEEPS;
    double *v = sol->values;
    bc_sv_scales sc;
    bc_sv_scales_of(m, &sc);
    int64_t sweeps = 0;
    double hist[RATE_WINDOW + 1] = {0};
    double resid = INFINITY, vmax = 0.0, est = INFINITY, rho = 1.0, last_change = INFINITY;
    bc_solve_status st;
    for (;;) {
        double lo, hi;
        int64_t changed = gs_sweep(m, sgn, v, handover ? sol->policy : NULL, &lo, &hi);
        sweeps++;
        double change = fmax(fabs(lo), fabs(hi));
        hist[sweeps % (RATE_WINDOW + 1)] = change;
        int limit = sweeps >= max_sweeps || bc_sv_out_of_time(o, t0);
        if (handover && !isfinite(change)) {
            /* Policy iteration will say what is wrong, from its usual start. */
            memset(v, 0, (size_t)m->n_states * sizeof *v);
            change = 0.0, limit = 1;
        }
        if (!isfinite(change)) {
            snprintf(sol->message, sizeof sol->message,
                     "value iteration (discount 1): values overflowed after %lld sweeps "
                     "(a cycle with positive total reward?)", (long long)sweeps);
            sol->iterations = sweeps;
            return bc_sv_finish(m, sol, BC_SOLVE_FAILED, t0);
        }
        last_change = change;
        bc_sv_trace(sol, BC_METHOD_VI, sweeps, change, -1.0);
        if (bc_stop_requested()) {
            st = BC_SOLVE_INTERRUPTED;
            break;
        }
        est = error_estimate(hist, sweeps, change, &rho);
        int done = (change <= o->tol && est <= o->tol) || limit;
        /* Settled: no greedy pair changed in a sweep after the second (the
         * first sets them all); handing over too early costs evaluations,
         * not correctness. */
        if (handover && (done || (changed == 0 && sweeps >= 3) || sweeps >= BC_SV_WARM_SWEEPS)) {
            *slow = 1;
            sol->iterations = sweeps;
            bc_sv_trace_last(sol, BC_METHOD_VI, sweeps, change, -1.0);
            return BC_SOLVE_NOT_CONVERGED;
        }
        if (!done)
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
    bc_sv_trace_last(sol, BC_METHOD_VI, sweeps, last_change, -1.0);
    if (st == BC_SOLVE_INTERRUPTED) {
        /* An iterate of Gauss-Seidel from 0: nothing proven, and no
         * termination check of its greedy policy is worth making. */
        bc_sv_greedy(m, sgn, v, sol->policy);
        snprintf(sol->message, sizeof sol->message,
                 "value iteration (discount 1): interrupted after %lld sweeps; nothing is proven",
                 (long long)sweeps);
        return bc_sv_finish(m, sol, st, t0);
    }
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

/* Value iteration; with handover (discount < 1 only), gives up early with
 * *slow = 1 and the values reached so far when convergence is slow. */
static bc_solve_status vi_run(const bc_model *m, const bc_solve_opts *o, bc_solution *sol,
                              int handover, int *slow)
{
    const double t0 = bc_sv_now();
    bc_solve_status st = bc_sv_begin(m, BC_METHOD_VI, sol);
    if (st != BC_SOLVE_OK)
        return st;
    assert(m->discount > 0.0 && m->discount <= 1.0);
    double *tv = malloc((size_t)(m->n_states ? m->n_states : 1) * sizeof *tv);
    int64_t *greedy = handover ? malloc((size_t)(m->n_states ? m->n_states : 1) * sizeof *greedy) : NULL;
    if (!tv || (handover && !greedy)) {
        free(tv), free(greedy);
        snprintf(sol->message, sizeof sol->message, "value iteration: out of memory");
        return bc_sv_finish(m, sol, BC_SOLVE_NOMEM, t0);
    }
    *slow = 0;
    st = m->discount < 1.0 ? vi_discounted(m, o, sol, tv, greedy, t0, handover, slow)
                           : vi_total(m, o, sol, tv, t0, handover, slow);
    free(tv), free(greedy);
    return st;
}

bc_solve_status bc_solve_vi(const bc_model *m, const bc_solve_opts *o, bc_solution *sol)
{
    int slow;
    return vi_run(m, o, sol, 0, &slow);
}

bc_solve_status bc_sv_vi_or_handover(const bc_model *m, const bc_solve_opts *o, bc_solution *sol,
                                     int *slow)
{
    return vi_run(m, o, sol, 1, slow);
}
