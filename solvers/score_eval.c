/* score_eval.c — exact-as-possible evaluation of a stochastic policy: its values, their proven error and its visit distribution. */
/*
 * Copyright (C) 2026 the bellcheck developers.
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The values solve (I - g P_pi) v = r_pi over the system S of non-terminal
 * states that are not traps, with the sparse LU factorisation of policy
 * iteration (bc_sv_eval_*, pi.c).  S is closed under the policy: a state
 * that steps into a trap with positive probability is itself a trap.  So
 * the rows of S need no value outside S but the terminal states' 0.
 *
 * Error bound (the argument of pi.c, for a mixed policy).  Let res be the
 * residual max_s |r_pi(s) + g P_pi v(s) - v(s)| over S, recomputed from the
 * model, and e the rounding allowance of that recomputation.  Then
 * v - V^pi = (I - g P_pi)^{-1} (v - T_pi v), and (I - g P_pi)^{-1} is
 * non-negative, so
 *   g < 1:  |v - V^pi| <= (res + e) / (1 - g)          (its row sums are 1/(1-g));
 *   g = 1:  |v - V^pi| <= (res + e) max_s N(s),        N = (I - P_pi)^{-1} 1,
 * N the expected number of steps to termination, bounded above from its own
 * computed residual rN: N <= N~ + rN max N, so max N <= max N~ / (1 - rN).
 * e counts the roundings of one mixed backup (mixed_rounding_terms).  The
 * policy's probabilities are taken as exact: they are the policy.
 *
 * Under g < 1 the g < 1 bound holds for any v, so when the factorisation is
 * estimated dearer than iterating (lu_dearer) Gauss-Seidel sweeps replace
 * it with the same guarantee.
 */
#include <assert.h>
#include <float.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "bellcheck.h"
#include "score_internal.h"
#include "solver_internal.h"

/* sum_p prob[p] sum_t P(t|p) v(t) over the pairs of s (support only). */
static double mixed_next(const bc_model *m, const double *prob, const double *v, int32_t s)
{
    double acc = 0.0;
    for (int64_t p = m->state_pair_start[s]; p < m->state_pair_start[s + 1]; p++) {
        if (!(prob[p] > 0.0))
            continue;
        double next = 0.0;
        for (int64_t k = m->pair_trans_start[p]; k < m->pair_trans_start[p + 1]; k++)
            if (m->prob[k] > 0.0)
                next += m->prob[k] * v[m->succ_state[k]];
        acc += prob[p] * next;
    }
    return acc;
}

double bc_sc_mixed_backup(const bc_model *m, const double *prob, const double *v, int32_t s)
{
    double r = 0.0;
    for (int64_t p = m->state_pair_start[s]; p < m->state_pair_start[s + 1]; p++)
        if (prob[p] > 0.0)
            r += prob[p] * m->reward[p];
    return r + m->discount * mixed_next(m, prob, v, s);
}

/* Number of roundings, each at most u (max|r| + g max|v|) to first order, in
 * one mixed backup: k for the dot product of k successors (Higham 2002, 3.1),
 * one each for the probabilities and the discount being rounded images of
 * exact ones, one for g * next and one for the final sum, A each for mixing
 * the pairs' next values and rewards, one for the rewards' own rounding, and
 * two more for second-order terms: k + 2A + 7, k the most successors of a
 * pair and A the most pairs of a state. */
static double mixed_rounding_terms(const bc_model *m)
{
    bc_sv_scales sc;
    bc_sv_scales_of(m, &sc);
    int64_t widest = 0;
    for (int32_t s = 0; s < m->n_states; s++) {
        int64_t a = m->state_pair_start[s + 1] - m->state_pair_start[s];
        widest = a > widest ? a : widest;
    }
    return (double)(sc.max_succ + 2 * widest + 7);
}

/* Discount 1: an upper bound on max_s N(s) over the system, N the expected
 * steps to termination, solved with the current factors; -1 if none. */
static double max_steps_bound(const bc_model *m, bc_sv_eval *w, const double *prob,
                              const uint8_t *in_s, double *steps, double *ones)
{
    for (int32_t s = 0; s < m->n_states; s++)
        ones[s] = 1.0;
    if (bc_sv_eval_solve(m, w, 0, ones, steps) < 0)
        return -1;
    double nmax = 0.0, rn = 0.0;
    for (int32_t s = 0; s < m->n_states; s++) {
        if (!in_s[s])
            continue;
        rn = fmax(rn, fabs(1.0 + mixed_next(m, prob, steps, s) - steps[s]));
        nmax = fmax(nmax, fabs(steps[s]));
    }
    rn += mixed_rounding_terms(m) * (DBL_EPSILON / 2) * (1.0 + nmax);
    return rn < 0.5 ? nmax / (1.0 - rn) : -1;
}

/* Residual max_s |T_pi v(s) - v(s)| over the system, and e, the rounding
 * allowance of computing it. */
static double residual_of(const bc_model *m, const double *prob, const uint8_t *in_s,
                          const double *v, double *e)
{
    double res = 0.0, vmax = 0.0, rmax = 0.0;
    for (int32_t s = 0; s < m->n_states; s++) {
        if (!in_s[s])
            continue;
        res = fmax(res, fabs(bc_sc_mixed_backup(m, prob, v, s) - v[s]));
        vmax = fmax(vmax, fabs(v[s]));
    }
    for (int64_t p = 0; p < m->n_pairs; p++)
        rmax = fmax(rmax, fabs(m->reward[p]));
    *e = mixed_rounding_terms(m) * (DBL_EPSILON / 2) * (rmax + m->discount * vmax);
    return res;
}

/* Sparse LU: values, their bound (top of the file) and the visits, from
 * one factorisation.  r_pi is overwritten.  0 or -1 (message set). */
static int evaluate_lu(const bc_model *m, bc_sv_eval *w, const double *prob, const uint8_t *in_s,
                       double *r_pi, bc_sc_eval *ev, double *scratch, char *msg, size_t cap)
{
    char why[160];
    if (bc_sv_eval_factorise(m, w, prob, why, sizeof why) != BC_SOLVE_OK) {
        snprintf(msg, cap, "score: evaluating the agent's policy: %s", why);
        return -1;
    }
    if (bc_sv_eval_solve(m, w, 0, r_pi, ev->values) < 0) {
        snprintf(msg, cap,
                 "score: evaluating the agent's policy: the sparse solve failed or overflowed");
        return -1;
    }
    double e;
    ev->residual = residual_of(m, prob, in_s, ev->values, &e);
    if (m->discount < 1.0) {
        ev->bound = (ev->residual + e) / (1.0 - m->discount);
    } else {
        double nmax = max_steps_bound(m, w, prob, in_s, scratch, r_pi);
        ev->bound = nmax < 0 ? -1 : (ev->residual + e) * nmax;
    }
    /* Visits: d^T (I - g P_pi) = initial^T over S, the transposed system;
     * mass that starts in a trap is left out. */
    for (int32_t s = 0; s < m->n_states; s++)
        r_pi[s] = m->initial[s];
    if (bc_sv_eval_solve(m, w, 1, r_pi, ev->visits) < 0) {
        snprintf(msg, cap, "score: the agent's visit distribution: the sparse solve failed");
        return -1;
    }
    return 0;
}

/* Discount < 1: 1 when one LU factorisation is estimated to cost more than
 * iterating (the rule bc_solve_auto_method applies to its own choice, with
 * about ln(10^12)/(-ln g) sweeps for the values and as many for the
 * visits).  Random-looking transition graphs fill the LU factors in badly:
 * on a 20,000-state model the factorisation alone took minutes. */
static int lu_dearer(const bc_model *m, bc_sv_eval *w, const double *prob, const uint8_t *in_s)
{
    double flops = bc_sv_eval_flops(m, w, prob), nnz = 0.0;
    for (int32_t s = 0; s < m->n_states; s++)
        for (int64_t p = m->state_pair_start[s]; in_s[s] && p < m->state_pair_start[s + 1]; p++)
            if (prob[p] > 0.0)
                nnz += (double)(m->pair_trans_start[p + 1] - m->pair_trans_start[p]);
    double sweeps = 27.6 / -log(m->discount);
    return flops < 0 || flops + 30.0 * nnz > 2.0 * sweeps * 30.0 * nnz;
}

/* Discount < 1, iteratively: Gauss-Seidel sweeps v(s) <- T_pi v(s) from 0
 * until the bound (res + e)/(1-g) of the top of the file is at most the
 * tolerance, or at most 4 e/(1-g) when rounding forbids better; a residual
 * check costs a sweep, so it runs only once the sweep's change has fallen
 * below the residual wanted (halving between failed checks).  The bound
 * holds for whatever v the iteration stops at, limits included. */
static void evaluate_iterative(const bc_model *m, const double *prob, const uint8_t *in_s,
                               const bc_solve_opts *so, bc_sc_eval *ev)
{
    const double g = m->discount, t0 = bc_sv_now();
    const int64_t max_sweeps = so->max_iter > 0 ? so->max_iter : BC_SV_VI_MAX_SWEEPS;
    double next_check = INFINITY, e = 0.0;
    for (int32_t s = 0; s < m->n_states; s++)
        ev->values[s] = 0.0;
    for (ev->sweeps = 1;; ev->sweeps++) {
        double change = 0.0;
        for (int32_t s = 0; s < m->n_states; s++) {
            if (!in_s[s])
                continue;
            double x = bc_sc_mixed_backup(m, prob, ev->values, s);
            change = fmax(change, fabs(x - ev->values[s]));
            ev->values[s] = x;
        }
        int last = ev->sweeps >= max_sweeps || bc_sv_out_of_time(so, t0);
        if (!last && change > next_check && ev->sweeps > 1)
            continue;
        ev->residual = residual_of(m, prob, in_s, ev->values, &e);
        ev->bound = (ev->residual + e) / (1.0 - g);
        if (last || ev->bound <= fmax(so->tol, 4.0 * e / (1.0 - g)))
            return;
        next_check = fmin(change, (1.0 - g) * so->tol) / 2;
    }
}

/* Discount < 1: the visits y = initial + g P_pi^T y over the system by
 * Jacobi sweeps (a scatter along the transitions), until a sweep changes
 * the total by at most 1e-13 of it; they only weight the agreement, so no
 * bound is wanted.  next is scratch. */
static void visits_iterative(const bc_model *m, const double *prob, const uint8_t *in_s,
                             int64_t max_sweeps, double *y, double *next)
{
    for (int32_t s = 0; s < m->n_states; s++)
        y[s] = in_s[s] ? m->initial[s] : 0.0;
    for (int64_t sweep = 0; sweep < max_sweeps; sweep++) {
        double total = 0.0, change = 0.0;
        for (int32_t s = 0; s < m->n_states; s++)
            next[s] = in_s[s] ? m->initial[s] : 0.0;
        for (int32_t s = 0; s < m->n_states; s++) {
            for (int64_t p = m->state_pair_start[s]; in_s[s] && p < m->state_pair_start[s + 1]; p++) {
                if (!(prob[p] > 0.0))
                    continue;
                for (int64_t k = m->pair_trans_start[p]; k < m->pair_trans_start[p + 1]; k++)
                    if (in_s[m->succ_state[k]])
                        next[m->succ_state[k]] += m->discount * y[s] * prob[p] * m->prob[k];
            }
        }
        for (int32_t s = 0; s < m->n_states; s++) {
            change += fabs(next[s] - y[s]);
            total += next[s];
            y[s] = next[s];
        }
        if (change <= 1e-13 * total)
            return;
    }
}

int bc_sc_evaluate(const bc_model *m, const double *prob, const uint8_t *trap,
                   const bc_solve_opts *so, bc_sc_eval *ev, char *msg, size_t cap)
{
    const size_t n = (size_t)(m->n_states ? m->n_states : 1);
    const double lost = m->objective == BC_MIN ? INFINITY : -INFINITY;
    uint8_t *in_s = malloc(n);
    double *r_pi = malloc(n * sizeof *r_pi), *scratch = malloc(n * sizeof *scratch);
    bc_sv_eval *w = NULL;
    int rc = -1;
    ev->sweeps = 0;
    if (!in_s || !r_pi || !scratch)
        goto out_of_memory;
    for (int32_t s = 0; s < m->n_states; s++) {
        in_s[s] = !m->terminal[s] && !(trap && trap[s]);
        r_pi[s] = 0.0;
        for (int64_t p = m->state_pair_start[s]; in_s[s] && p < m->state_pair_start[s + 1]; p++)
            if (prob[p] > 0.0)
                r_pi[s] += prob[p] * m->reward[p];
    }
    w = bc_sv_eval_new(m, in_s, 1);
    if (!w)
        goto out_of_memory;
    if (m->discount < 1.0 && lu_dearer(m, w, prob, in_s)) {
        evaluate_iterative(m, prob, in_s, so, ev);
        visits_iterative(m, prob, in_s, so->max_iter > 0 ? so->max_iter : BC_SV_VI_MAX_SWEEPS,
                         ev->visits, scratch);
    } else if (evaluate_lu(m, w, prob, in_s, r_pi, ev, scratch, msg, cap) < 0) {
        goto done;
    }
    for (int32_t s = 0; s < m->n_states; s++) {
        if (trap && trap[s])
            ev->values[s] = lost;
        ev->values[s] += 0.0; /* no -0.0 at terminal states */
        assert(in_s[s] || ev->visits[s] == 0.0);
    }
    rc = 0;
    goto done;
out_of_memory:
    snprintf(msg, cap, "score: out of memory evaluating the agent's policy");
done:
    bc_sv_eval_free(w);
    free(in_s), free(r_pi), free(scratch);
    return rc;
}
