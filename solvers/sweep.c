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
 *
 * What costs is the gathers v[succ[k]]: once the value vector no longer
 * fits the core's own cache (1.6 MB at 200,000 states against a 2 MiB L2
 * that the streamed arrays also pass through), each one waits on the
 * shared cache or on memory, and one core keeps only a few such misses in
 * flight.  So the loop asks for data ahead of use, with prefetch hints
 * that change no result:
 *  - the successor value GATHER_AHEAD transitions ahead, into the nearest
 *    cache, so that more gathers are in flight at once;
 *  - per pair, the line of probabilities and of successor indices
 *    STREAM_AHEAD transitions ahead, as non-temporal (read once).
 * Measured (docs/performance.md, "The sweep kernel"): 11% to 21% less time
 * per sweep on random models of 10^6 and 10^7 states, no difference at
 * 200,000, where the misses of the L2 set the pace; other distances (8 to
 * 128 for the gathers, 64 to 256 for the streams) did no better.
 * Indices ahead are clamped to the last transition: every address read is
 * inside the arrays (the successor index of a hint is a real load).
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

/* Prefetch distances, in transitions (see the comment at the top). */
enum { GATHER_AHEAD = 24, STREAM_AHEAD = 128 };

#if defined(__GNUC__)
#define HINT_NEAR(addr) __builtin_prefetch((addr), 0, 3)  /* into every cache level */
#define HINT_ONCE(addr) __builtin_prefetch((addr), 0, 0)  /* non-temporal: read once */
#else
#define HINT_NEAR(addr) ((void)(addr))
#define HINT_ONCE(addr) ((void)(addr))
#endif

/* The arrays one sweep reads, and the index of the last transition (the
 * read-ahead stops there). */
typedef struct {
    const int64_t *restrict pstart, *restrict tstart;
    const int32_t *restrict succ;
    const double *restrict prob, *restrict reward;
    int64_t last;
    double sgn, g;
} sweep_arrays;

/* The best Q-value of non-terminal state s and its first pair: for each
 * pair in order, acc = sum of prob[k] v[succ[k]] in the order of k, then
 * q = sgn r + g acc; a pair replaces the best only when strictly greater.
 * The hints change no value. */
static inline double backup(const sweep_arrays *a, const double *restrict v, int32_t s,
                            int64_t *arg)
{
    const int64_t *restrict tstart = a->tstart;
    const int32_t *restrict succ = a->succ;
    const double *restrict prob = a->prob;
    const int64_t last = a->last;
    int64_t p = a->pstart[s], end = a->pstart[s + 1];
    double best = -INFINITY;
    int64_t at = p;
    for (; p < end; p++) {
        const int64_t k0 = tstart[p], k1 = tstart[p + 1];
        const int64_t ahead = k0 + STREAM_AHEAD < last ? k0 + STREAM_AHEAD : last;
        HINT_ONCE(&prob[ahead]);
        HINT_ONCE(&succ[ahead]);
        double acc = 0.0;
        for (int64_t k = k0; k < k1; k++) {
            const int64_t next = k + GATHER_AHEAD < last ? k + GATHER_AHEAD : last;
            HINT_NEAR(&v[succ[next]]);
            acc += prob[k] * v[succ[k]];
        }
        double q = a->sgn * a->reward[p] + a->g * acc;
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
    const sweep_arrays a = {m->state_pair_start, m->pair_trans_start, m->succ_state, m->prob,
                            m->reward, m->n_trans - 1, sgn, m->discount};
    const uint8_t *restrict term = m->terminal;
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
            t = backup(&a, v, s, &arg);
        if (policy)
            policy[s] = arg;
        double d = t - v[s];
        tv[s] = t;
        lo = d < lo ? d : lo;
        hi = d > hi ? d : hi;
        double at = fabs(t), av = fabs(v[s]); /* not fmax: gcc calls it through the PLT */
        vmax = at > vmax ? at : vmax;
        vmax = av > vmax ? av : vmax;
    }
    st->dmin = n ? lo : 0.0;
    st->dmax = n ? hi : 0.0;
    st->vmax = vmax;
}
