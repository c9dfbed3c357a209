/* sweep.c — the Jacobi Bellman sweep every discounted solver spends its time in: tight loops over the CSR arrays, OpenMP threads. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * The sweep streams the model's arrays once: successor indices (32-bit) and
 * probabilities per transition, the transition offsets and rewards per pair,
 * the pair offsets and terminal flags per state, and v and Tv.  Only the
 * successor values are gathered at random; for models whose value vector
 * fits in the cache the sweep is bound by memory bandwidth, which is what
 * tests/bench measures it against.
 *
 * Threads split the states into static blocks.  A state's backup is the
 * same sequence of floating-point operations whichever thread runs it, and
 * the reductions are min and max, which are exact; so every result is
 * bit-for-bit that of one thread.
 */
#include <math.h>

#include "bellcheck.h"
#include "sweep_internal.h"

#ifdef _OPENMP
#include <omp.h>
#endif

int bc__sweep_threads(int threads)
{
    if (threads <= 1)
        return 1;
#ifdef _OPENMP
    return threads;
#else
    return 1;
#endif
}

double bc__sweep_bytes(const bc_model *m)
{
    return (double)m->n_trans * (sizeof(int32_t) + sizeof(double)) +
           (double)m->n_pairs * (sizeof(int64_t) + sizeof(double)) +
           (double)m->n_states * (sizeof(int64_t) + sizeof(uint8_t) + 2 * sizeof(double));
}

/* The best Q-value of state s and its first pair. */
static inline double backup(const int64_t *restrict pstart, const int64_t *restrict tstart,
                            const int32_t *restrict succ, const double *restrict prob,
                            const double *restrict reward, double sgn, double g,
                            const double *restrict v, int32_t s, int64_t *arg)
{
    int64_t p = pstart[s], end = pstart[s + 1];
    double best = -INFINITY;
    int64_t at = p;
    for (; p < end; p++) {
        double acc = 0.0;
        for (int64_t k = tstart[p]; k < tstart[p + 1]; k++)
            acc += prob[k] * v[succ[k]];
        double q = sgn * reward[p] + g * acc;
        if (q > best) {
            best = q;
            at = p;
        }
    }
    *arg = at;
    return best;
}

void bc__sweep_jacobi(const bc_model *m, double sgn, const double *v, double *tv, int64_t *policy,
                      int threads, bc__sweep_stat *st)
{
    const int64_t *restrict pstart = m->state_pair_start, *restrict tstart = m->pair_trans_start;
    const int32_t *restrict succ = m->succ_state;
    const double *restrict prob = m->prob, *restrict reward = m->reward;
    const uint8_t *restrict term = m->terminal;
    const double g = m->discount;
    const int32_t n = m->n_states;
    double lo = INFINITY, hi = -INFINITY, vmax = 0.0;
    int nt = bc__sweep_threads(threads);
    (void)nt;
#pragma omp parallel for num_threads(nt) if (nt > 1) schedule(static) \
    reduction(min : lo) reduction(max : hi, vmax)
    for (int32_t s = 0; s < n; s++) {
        double t = 0.0;
        int64_t arg = -1;
        if (!term[s])
            t = backup(pstart, tstart, succ, prob, reward, sgn, g, v, s, &arg);
        if (policy)
            policy[s] = arg;
        double d = t - v[s];
        tv[s] = t;
        lo = d < lo ? d : lo;
        hi = d > hi ? d : hi;
        double a = fmax(fabs(t), fabs(v[s]));
        vmax = a > vmax ? a : vmax;
    }
    st->dmin = n ? lo : 0.0;
    st->dmax = n ? hi : 0.0;
    st->vmax = vmax;
}
