/* interval.c — rigorous interval passes of the Bellman operator: outward rounding on the model's exact numbers. */
/*
 * Copyright (C) 2026 the bellcheck developers.
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Compiled with -frounding-math (see the Makefile).  The passes run in
 * round-downward mode: a lower bound is computed directly, an upper bound as
 * the negation of a lower bound (up(a*b) = -((-a)*b)), so one mode serves
 * both ends and the mode is switched once per pass, not per operation.
 *
 * Why the model's numbers need enclosures at all: a probability such as 0.1
 * is not a double; the solvers use the nearest double, which is off by up to
 * half an ulp.  The passes use [plo, phi] containing the exact decimal, so
 * what they prove is about the model as written, not its double image.
 *
 * The discounted bound (MacQueen 1966; Porteus 1971): for any v, with
 * d = Tv - v in [dmin, dmax] componentwise, V* - v lies in
 * [dmin/(1-g), dmax/(1-g)], because T is monotone and T(v + c) = Tv + g c,
 * so T^{k+1} v - T^k v lies in [g^k dmin, g^k dmax] and the differences sum.
 * The same argument with T_pi encloses V^pi.
 */
#include "proof_internal.h"

#include <fenv.h>
#include <float.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

/* GCC ignores `#pragma STDC FENV_ACCESS`; -frounding-math is what it honours. */

static inline double mul_up(double a, double b) { return -((-a) * b); }
static inline double div_up(double a, double b) { return -((-a) / b); }
double bc__add_up(double a, double b)
{
    int old = fegetround();
    fesetround(FE_DOWNWARD);
    double r = -((-a) + (-b));
    fesetround(old);
    return r;
}
double bc__sub_up(double a, double b)
{
    int old = fegetround();
    fesetround(FE_DOWNWARD);
    double r = -((-a) + b);
    fesetround(old);
    return r;
}
double bc__sub_down(double a, double b)
{
    int old = fegetround();
    fesetround(FE_DOWNWARD);
    double r = a - b;
    fesetround(old);
    return r;
}

/* --- enclosures of the model's numbers ------------------------------------ */

#define EXACT_INT_LIMIT 9007199254740992LL /* 2^53: every integer up to it is a double */

/* Fast path (rounding mode downward): a small rational whose numerator and
 * denominator are doubles.  Returns 0 when it applied. */
static int enclose_small(bc_num x, double *lo, double *hi)
{
    if (x.den <= 0 || x.den > EXACT_INT_LIMIT || x.num > EXACT_INT_LIMIT ||
        x.num < -EXACT_INT_LIMIT)
        return -1;
    *lo = (double)x.num / (double)x.den;
    *hi = div_up((double)x.num, (double)x.den);
    return 0;
}

/* Slow path (rounding mode to nearest): the nearest double and its
 * neighbour on the far side of x. */
static void enclose_mpq(const mpq_t x, mpq_t t, double *lo, double *hi)
{
    double d = bc_mpq_to_double(x);
    if (!isfinite(d)) {
        *lo = d > 0 ? DBL_MAX : -INFINITY;
        *hi = d > 0 ? INFINITY : -DBL_MAX;
        return;
    }
    mpq_set_d(t, d);
    int c = mpq_cmp(t, x);
    *lo = c <= 0 ? d : nextafter(d, -INFINITY);
    *hi = c >= 0 ? d : nextafter(d, INFINITY);
}

void bc__enclosure_free(bc__enclosure *e)
{
    free(e->plo);
    free(e->phi);
    free(e->rlo);
    free(e->rhi);
    memset(e, 0, sizeof *e);
}

/* 1 when the rounding mode really changes results.  An emulator (valgrind)
 * computes in round-to-nearest whatever mode is set; every interval would
 * then be too narrow by up to an ulp and the proofs silently wrong. */
/* A call the compiler cannot move across fesetround (GCC may move bare
 * arithmetic across it even with -frounding-math). */
static __attribute__((noinline)) double divide(double a, double b)
{
    volatile double q = a / b;
    return q;
}

static int rounding_honoured(void)
{
    int old = fegetround();
    fesetround(FE_DOWNWARD);
    double down = divide(1.0, 3.0);
    fesetround(FE_UPWARD);
    double up = divide(1.0, 3.0);
    fesetround(old);
    return down < up;
}

int bc__enclosure_build(const bc_model *m, int sgn, bc__enclosure *e)
{
    memset(e, 0, sizeof *e);
    if (!rounding_honoured()) {
        snprintf(e->why, sizeof e->why, "the rounding mode is not honoured here (an emulator?)");
        return -2;
    }
    size_t nt = (size_t)(m->n_trans ? m->n_trans : 1), np = (size_t)(m->n_pairs ? m->n_pairs : 1);
    if (bc_memory_refused(0, 16 * (uint64_t)(nt + np), "the interval enclosures of the model",
                          e->why, sizeof e->why))
        return -2;
    e->plo = malloc(nt * sizeof(double));
    e->phi = malloc(nt * sizeof(double));
    e->rlo = malloc(np * sizeof(double));
    e->rhi = malloc(np * sizeof(double));
    if (!e->plo || !e->phi || !e->rlo || !e->rhi) {
        bc__enclosure_free(e);
        return -1;
    }
    /* Pass 1, downward: the fast path; NAN marks what needs GMP. */
    int old = fegetround();
    fesetround(FE_DOWNWARD);
    int64_t slow = 0;
    for (int64_t t = 0; t < m->n_trans; t++)
        if (enclose_small(bc_model_prob_exact(m, t), &e->plo[t], &e->phi[t]) < 0)
            e->plo[t] = NAN, slow++;
    for (int64_t p = 0; p < m->n_pairs; p++)
        if (m->outcome_id || enclose_small(bc_model_reward_exact(m, p), &e->rlo[p], &e->rhi[p]) < 0)
            e->rlo[p] = NAN, slow++;
    fesetround(FE_TONEAREST);
    /* Pass 2, to nearest: exact rationals through GMP. */
    mpq_t x, t;
    mpq_inits(x, t, NULL);
    for (int64_t k = 0; slow && k < m->n_trans; k++)
        if (isnan(e->plo[k])) {
            bc_num_to_mpq(x, bc_model_prob_exact(m, k), m->big);
            enclose_mpq(x, t, &e->plo[k], &e->phi[k]);
        }
    for (int64_t p = 0; slow && p < m->n_pairs; p++)
        if (isnan(e->rlo[p])) {
            bc_model_reward_mpq(m, p, x);
            enclose_mpq(x, t, &e->rlo[p], &e->rhi[p]);
        }
    bc_num_to_mpq(x, m->discount_exact, m->big);
    enclose_mpq(x, t, &e->glo, &e->ghi);
    mpq_clears(x, t, NULL);
    fesetround(old);
    if (sgn < 0)
        for (int64_t p = 0; p < m->n_pairs; p++) {
            double lo = e->rlo[p];
            e->rlo[p] = -e->rhi[p];
            e->rhi[p] = -lo;
        }
    return 0;
}

double bc__initial_bound(const bc_model *m, const double *lower, const double *upper, double x)
{
    /* Enclosures of the initial probabilities: fast path downward, the
     * rest through GMP to nearest (as in bc__enclosure_build). */
    int old = fegetround();
    double lo = 0.0, neg_hi = 0.0;
    mpq_t q, t;
    mpq_inits(q, t, NULL);
    for (int32_t s = 0; s < m->n_states; s++) {
        if (bc_num_sign(m->initial_exact[s], m->big) == 0)
            continue;
        double wlo, whi;
        fesetround(FE_DOWNWARD);
        if (enclose_small(m->initial_exact[s], &wlo, &whi) < 0) {
            fesetround(FE_TONEAREST);
            bc_num_to_mpq(q, m->initial_exact[s], m->big);
            enclose_mpq(q, t, &wlo, &whi);
            fesetround(FE_DOWNWARD);
        }
        lo += (lower[s] >= 0 ? wlo : whi) * lower[s];
        neg_hi += (-(upper[s] >= 0 ? whi : wlo)) * upper[s];
    }
    double r = fmax(x - lo, (-neg_hi) - x); /* x - lo rounded down: step up below */
    r = -((-x) + lo) > r ? -((-x) + lo) : r;
    r = -(neg_hi + x) > r ? -(neg_hi + x) : r;
    fesetround(old);
    mpq_clears(q, t, NULL);
    return r < 0 ? 0.0 : r;
}

/* --- one pass -------------------------------------------------------------- */

/* Enclosure of Q(p) = r + g sum_t P(t) v(t) with v in [vlo, vhi] per state
 * (point values: vlo == vhi).  Probabilities are >= 0, so the lower end of
 * P*v takes plo or phi by the sign of vlo (likewise for the upper end). */
static inline void pair_q(const bc_model *m, const bc__enclosure *e, const double *vlo,
                          const double *vhi, int64_t p, double *qlo, double *qhi)
{
    double slo = 0.0, shi = 0.0; /* shi holds the negated upper sum */
    for (int64_t t = m->pair_trans_start[p]; t < m->pair_trans_start[p + 1]; t++) {
        double a = vlo[m->succ_state[t]], b = vhi[m->succ_state[t]];
        slo += (a >= 0 ? e->plo[t] : e->phi[t]) * a;
        shi += (-(b >= 0 ? e->phi[t] : e->plo[t])) * b;
    }
    shi = -shi;
    *qlo = e->rlo[p] + (slo >= 0 ? e->glo : e->ghi) * slo;
    *qhi = -((-e->rhi[p]) - mul_up(shi >= 0 ? e->ghi : e->glo, shi));
}

/* Lower bound of x / (1 - g) and upper bound, g in [glo, ghi] < 1. */
static double over_one_minus_g_down(const bc__enclosure *e, double x)
{
    double den_small = 1.0 - e->ghi; /* rounded down: the smallest possible 1 - g */
    double den_big = -((-1.0) + e->glo);
    return x >= 0 ? x / den_big : x / den_small;
}
static double over_one_minus_g_up(const bc__enclosure *e, double x)
{
    double den_small = 1.0 - e->ghi;
    double den_big = -((-1.0) + e->glo);
    return x >= 0 ? div_up(x, den_small) : div_up(x, den_big);
}

/* Lower bound of Q(pi) - max over other pairs of Q, from their enclosures. */
static double state_margin(const bc_model *m, const bc__enclosure *e, const double *v, int32_t s,
                           int64_t pi, double pilo)
{
    double other_hi = -INFINITY, qlo, qhi;
    for (int64_t p = m->state_pair_start[s]; p < m->state_pair_start[s + 1]; p++) {
        if (p == pi)
            continue;
        pair_q(m, e, v, v, p, &qlo, &qhi);
        if (qhi > other_hi)
            other_hi = qhi;
    }
    return other_hi == -INFINITY ? INFINITY : pilo - other_hi;
}

int bc__interval_check(const bc_model *m, const bc__enclosure *e, const double *v,
                       const int64_t *pi, double *margin, bc__interval_pass *out)
{
    int old = fegetround();
    fesetround(FE_DOWNWARD);
    double dmin = 0, dmax = 0, pmin = 0, pmax = 0; /* terminal states count with d = 0 */
    double worst = -1;
    int ok = 1;
    out->worst_state = -1;
    for (int32_t s = 0; s < m->n_states && ok; s++) {
        if (m->terminal[s]) {
            if (margin)
                margin[s] = INFINITY;
            continue;
        }
        double tlo = -INFINITY, thi = -INFINITY, pilo = NAN, pihi = NAN, qlo, qhi;
        for (int64_t p = m->state_pair_start[s]; p < m->state_pair_start[s + 1]; p++) {
            pair_q(m, e, v, v, p, &qlo, &qhi);
            tlo = qlo > tlo ? qlo : tlo;
            thi = qhi > thi ? qhi : thi;
            if (p == pi[s])
                pilo = qlo, pihi = qhi;
        }
        ok = isfinite(tlo) && isfinite(thi) && isfinite(v[s]) && !isnan(pilo);
        double dl = tlo - v[s], dh = -((-thi) + v[s]);
        double ql = pilo - v[s], qh = -((-pihi) + v[s]);
        dmin = dl < dmin ? dl : dmin;
        dmax = dh > dmax ? dh : dmax;
        if (fmax(-dl, dh) > worst)
            worst = fmax(-dl, dh), out->worst_state = s;
        pmin = ql < pmin ? ql : pmin;
        pmax = qh > pmax ? qh : pmax;
        if (margin)
            margin[s] = state_margin(m, e, v, s, pi[s], pilo);
    }
    out->dmin = dmin, out->dmax = dmax, out->pmin = pmin, out->pmax = pmax;
    if (e->ghi < 1.0) {
        out->lo = over_one_minus_g_down(e, dmin);
        out->hi = over_one_minus_g_up(e, dmax);
        out->plo = over_one_minus_g_down(e, pmin);
        out->phi = over_one_minus_g_up(e, pmax);
    } else {
        out->lo = out->plo = -INFINITY;
        out->hi = out->phi = INFINITY;
    }
    fesetround(old);
    return ok ? 0 : -1;
}

double bc__policy_loss(const bc_model *m, const bc__enclosure *e, const double *margin,
                       const bc__interval_pass *ps, int32_t *n_proven, int32_t *n_undecided)
{
    int old = fegetround();
    fesetround(FE_DOWNWARD);
    double width = -((-ps->hi) + ps->lo);  /* hi - lo, rounded up */
    double need = -((-e->ghi) * width);    /* g (hi - lo), rounded up */
    double loss = -((-ps->hi) + ps->plo);  /* hi - plo, rounded up */
    fesetround(old);
    *n_proven = *n_undecided = 0;
    for (int32_t s = 0; s < m->n_states; s++) {
        if (m->terminal[s])
            continue;
        if (margin[s] > need)
            ++*n_proven;
        else
            ++*n_undecided;
    }
    return *n_undecided == 0 ? 0.0 : fmax(0.0, loss);
}

int bc__interval_mixed(const bc_model *m, const bc__enclosure *e, const double *v,
                       const double *prob, double *dmin, double *dmax)
{
    int old = fegetround();
    fesetround(FE_DOWNWARD);
    double lo_min = 0.0, hi_max = 0.0, qlo, qhi;
    int ok = 1;
    for (int32_t s = 0; s < m->n_states && ok; s++) {
        if (m->terminal[s])
            continue;
        double tlo = 0.0, neg_thi = 0.0;
        for (int64_t p = m->state_pair_start[s]; p < m->state_pair_start[s + 1]; p++) {
            if (!(prob[p] > 0.0))
                continue;
            pair_q(m, e, v, v, p, &qlo, &qhi);
            tlo += prob[p] * qlo;
            neg_thi += (-prob[p]) * qhi;
        }
        double dl = tlo - v[s], dh = -(neg_thi + v[s]);
        ok = isfinite(dl) && isfinite(dh);
        lo_min = dl < lo_min ? dl : lo_min;
        hi_max = dh > hi_max ? dh : hi_max;
    }
    fesetround(old);
    *dmin = lo_min, *dmax = hi_max;
    return ok ? 0 : -1;
}

/* Lower and upper bounds of |x| for x in [lo, hi] (rounding already outward). */
static void abs_range(double lo, double hi, double *alo, double *ahi)
{
    *ahi = fmax(fabs(lo), fabs(hi));
    *alo = lo > 0 ? lo : hi < 0 ? -hi : 0.0;
}

void bc__interval_qtable(const bc_model *m, const bc__enclosure *e, double glo, double ghi,
                         const double *q, const uint8_t *present, const double *vq,
                         const double *vlo, const double *vhi, double *res_lo, double *res_hi,
                         double *err_lo, double *err_hi)
{
    /* Uncovered states (NAN) may still be successors with probability 0:
     * they count as 0 there, as in the float residual. */
    double *v0 = malloc((size_t)(m->n_states ? m->n_states : 1) * sizeof *v0);
    if (!v0) {
        *res_lo = *err_lo = 0, *res_hi = *err_hi = INFINITY;
        return;
    }
    for (int32_t s = 0; s < m->n_states; s++)
        v0[s] = isnan(vq[s]) ? 0.0 : vq[s];
    int old = fegetround();
    fesetround(FE_DOWNWARD);
    bc__enclosure eg = *e; /* the table's own discount */
    eg.glo = glo, eg.ghi = ghi;
    double rl = 0, rh = 0, el = 0, eh = 0, qlo, qhi, alo, ahi;
    for (int64_t p = 0; p < m->n_pairs; p++) {
        int32_t s = m->pair_state[p];
        if (!present[s] || isnan(q[p]))
            continue;
        int reachable = 1;
        for (int64_t t = m->pair_trans_start[p]; t < m->pair_trans_start[p + 1]; t++)
            reachable &= !isnan(vq[m->succ_state[t]]) || !(m->prob[t] > 0.0);
        if (reachable) {
            pair_q(m, &eg, v0, v0, p, &qlo, &qhi);
            abs_range(qlo - q[p], -((-qhi) + q[p]), &alo, &ahi);
            rl = fmax(rl, alo), rh = fmax(rh, ahi);
        }
        if (vlo) {
            pair_q(m, e, vlo, vhi, p, &qlo, &qhi);
            abs_range(q[p] - qhi, -((-q[p]) + qlo), &alo, &ahi);
            el = fmax(el, alo), eh = fmax(eh, ahi);
        }
    }
    fesetround(old);
    free(v0);
    *res_lo = rl, *res_hi = rh, *err_lo = el, *err_hi = eh;
}

double bc__interval_policy_drop(const bc_model *m, const bc__enclosure *e, const int64_t *pi,
                                const double *N)
{
    int old = fegetround();
    fesetround(FE_DOWNWARD);
    double cmin = INFINITY;
    for (int32_t s = 0; s < m->n_states; s++) {
        if (m->terminal[s])
            continue;
        double neg_sum = 0.0; /* - upper(sum P N) */
        for (int64_t t = m->pair_trans_start[pi[s]]; t < m->pair_trans_start[pi[s] + 1]; t++) {
            double x = N[m->succ_state[t]];
            neg_sum += (-(x >= 0 ? e->phi[t] : e->plo[t])) * x;
        }
        double drop = N[s] + neg_sum;
        cmin = drop < cmin ? drop : cmin;
    }
    fesetround(old);
    return cmin;
}

/* --- finite horizon -------------------------------------------------------- */

/* One stage: [lo, hi] of max over pairs (all pairs when pol is NULL, else
 * pol[s] alone) given the next stage's enclosure. */
static int stage(const bc_model *m, const bc__enclosure *e, const int64_t *pol, const double *nlo,
                 const double *nhi, double *lo, double *hi)
{
    for (int32_t s = 0; s < m->n_states; s++) {
        lo[s] = hi[s] = 0.0;
        if (m->terminal[s])
            continue;
        double best_lo = -INFINITY, best_hi = -INFINITY, qlo, qhi;
        for (int64_t p = m->state_pair_start[s]; p < m->state_pair_start[s + 1]; p++) {
            if (pol && pol[s] != p)
                continue;
            pair_q(m, e, nlo, nhi, p, &qlo, &qhi);
            best_lo = qlo > best_lo ? qlo : best_lo;
            best_hi = qhi > best_hi ? qhi : best_hi;
        }
        if (!isfinite(best_lo) || !isfinite(best_hi))
            return -1;
        lo[s] = best_lo, hi[s] = best_hi;
    }
    return 0;
}

int bc__interval_backward(const bc_model *m, const bc__enclosure *e, const int64_t *stage_policy,
                          double *lo, double *hi, double *plo, double *phi)
{
    size_t n = (size_t)(m->n_states ? m->n_states : 1);
    double *nlo = calloc(n, sizeof *nlo), *nhi = calloc(n, sizeof *nhi);
    double *qlo = calloc(n, sizeof *qlo), *qhi = calloc(n, sizeof *qhi);
    int rc = (nlo && nhi && qlo && qhi) ? 0 : -1;
    int old = fegetround();
    fesetround(FE_DOWNWARD);
    /* V*: lo/hi carry stage t+1 into t; the policy's value runs beside it. */
    memset(lo, 0, n * sizeof *lo), memset(hi, 0, n * sizeof *hi);
    memset(plo, 0, n * sizeof *plo), memset(phi, 0, n * sizeof *phi);
    for (int32_t t = m->horizon - 1; t >= 0 && rc == 0; t--) {
        memcpy(nlo, lo, n * sizeof *lo), memcpy(nhi, hi, n * sizeof *hi);
        memcpy(qlo, plo, n * sizeof *lo), memcpy(qhi, phi, n * sizeof *hi);
        rc = stage(m, e, NULL, nlo, nhi, lo, hi);
        if (rc == 0)
            rc = stage(m, e, stage_policy + (size_t)t * (size_t)m->n_states, qlo, qhi, plo, phi);
    }
    fesetround(old);
    free(nlo), free(nhi), free(qlo), free(qhi);
    return rc;
}
