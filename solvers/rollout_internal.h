/* rollout_internal.h — what the simulation files share: random streams, running statistics, one episode. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#ifndef BC_ROLLOUT_INTERNAL_H
#define BC_ROLLOUT_INTERNAL_H

#include "bellcheck.h"

/* ---- random streams (docs/methods.md, "Simulation") ----------------------
 * splitmix64 (Steele, Lea and Flood 2014): state s advances by the golden
 * gamma, each output is the finaliser of the new state.  Episode e of seed S
 * has the key k_e = output e+1 of splitmix64 started at S, and its draw i is
 * output i+1 of splitmix64 started at k_e.  Draws are counter-based: any
 * draw of any episode is computed directly, so episodes can run in any order
 * on any thread and still see the same numbers. */
#define BC__GOLDEN 0x9E3779B97F4A7C15ULL

static inline uint64_t bc__mix64(uint64_t z)
{
    z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9ULL;
    z = (z ^ (z >> 27)) * 0x94D049BB133111EBULL;
    return z ^ (z >> 31);
}

/* Output i+1 of splitmix64 started at state s. */
static inline uint64_t bc__stream_at(uint64_t s, uint64_t i)
{
    return bc__mix64(s + (i + 1) * BC__GOLDEN);
}

/* A draw as a double strictly inside (0, 1): the top 53 bits plus one half, scaled. */
static inline double bc__unit(uint64_t z)
{
    return ((double)(z >> 11) + 0.5) * 0x1.0p-53;
}

/* Where the draws of an episode sit: the initial state's first, then per
 * step the noise values and one draw for a stochastic policy's action. */
static inline uint64_t bc__draw_index(const bc_task *t, int64_t step, int32_t k)
{
    return (uint64_t)bc_task_n_vars(t) + (uint64_t)step * (uint64_t)(bc_task_n_noise(t) + 1) +
           (uint64_t)k;
}

/* ---- running statistics ---------------------------------------------------
 * Welford's update and Chan, Golub and LeVeque's merge (1979).  Merged in a
 * fixed order they give the same bits whatever thread computed each part. */
typedef struct {
    int64_t n;
    double mean, m2;
    double sum; /* the reported mean is sum / n: exact for sums of whole numbers below 2^53 */
} bc__welford;

void bc__welford_add(bc__welford *w, double x);
void bc__welford_merge(bc__welford *into, const bc__welford *part);
/* Mean, standard deviation and 95% interval of what w has seen. */
void bc__welford_stats(const bc__welford *w, bc_sample_stats *out);
/* The nearest-rank percentile q (0 < q <= 100) of sorted[0..n). */
int64_t bc__percentile(const uint32_t *sorted, int64_t n, double q);

/* ---- one episode ------------------------------------------------------- */
typedef struct {
    double ret;
    int64_t steps;
    int stopped;
    /* When a step fails: where, and its inputs (for bc_task_step_error). */
    int failed;
    int64_t fail_step;
    int32_t fail_action;
    double fail_x[BC_TASK_MAX_VARS];
    double fail_noise[BC_TASK_MAX_NOISE];
} bc__episode;

/* Runs episode `key` of gp in t for at most limit steps; records into tr
 * (NULL: nothing) up to max_points states.  0, or -1 when a step failed
 * (ep says where) or the record could not grow (ep->failed stays 0). */
int bc__run_episode(const bc_task *t, const bc_grid_policy *gp, uint64_t key, int64_t limit,
                    bc__episode *ep, bc_trajectory *tr, int64_t max_points);
/* The key of episode e of seed s. */
uint64_t bc__episode_key(uint64_t seed, int64_t e);

#endif
