/* rollout.c — simulating a grid's controller in the continuous task: episodes, threads, common random numbers, recorded trajectories. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Reproducibility whatever the thread count: episode e draws only from its
 * own counter-based stream (rollout_internal.h), so it is the same episode
 * on any thread; episodes are grouped in blocks of a fixed size, each block
 * is summed in episode order, and the blocks are merged in block order, so
 * the sums see the same numbers in the same order.  Threads only decide
 * which block runs where.
 *
 * Common random numbers: the agent and the policy it is compared with run
 * episode e from the same draws — the same start state and, at step j, the
 * same noise — so their difference measures the policies, not the luck.
 *
 * A stop request (bc_stop_request) is looked at before every episode: each
 * thread then skips the rest of its block and every later block, so the
 * simulation ends within one episode per thread, and reports nothing.
 */
#include "rollout_internal.h"

#include <math.h>
#include <pthread.h>
#include <stdatomic.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#define BLOCK 256 /* episodes per block: fixed, so results do not depend on threads */

void bc_rollout_opts_default(bc_rollout_opts *o)
{
    o->episodes = 1000;
    o->seed = 1;
    o->threads = 1;
    o->limit = 0;
}

uint64_t bc__episode_key(uint64_t seed, int64_t e)
{
    return bc__stream_at(seed, (uint64_t)e);
}

/* The action of gp at x, drawing u for a stochastic policy. */
static int32_t choose(const bc_grid_policy *gp, const double *x, double u)
{
    int64_t c = bc_grid_cell(&gp->grid, x);
    if (gp->action)
        return gp->action[c];
    const double *cum = gp->cum + c * gp->n_actions;
    int32_t a = 0;
    while (a + 1 < gp->n_actions && u >= cum[a])
        a++;
    return a;
}

/* Appends state x (and the action that led away from the previous one). */
static int record(bc_trajectory *tr, const double *x, int32_t n_vars, int32_t a, int64_t max_points)
{
    if (tr->n_points >= max_points) {
        tr->truncated = 1;
        return 0;
    }
    int64_t n = tr->n_points;
    if (n == 0 || (n >= 16 && (n & (n - 1)) == 0)) { /* room for 16, then doubling */
        int64_t cap = n ? 2 * n : 16;
        if (cap > max_points)
            cap = max_points;
        double *nx = realloc(tr->x, (size_t)cap * (size_t)n_vars * sizeof *nx);
        if (!nx)
            return -1;
        tr->x = nx;
        int32_t *na = realloc(tr->action, (size_t)cap * sizeof *na);
        if (!na)
            return -1;
        tr->action = na;
    }
    memcpy(tr->x + n * n_vars, x, (size_t)n_vars * sizeof *x);
    if (n > 0)
        tr->action[n - 1] = a;
    tr->n_points = n + 1;
    return 0;
}

int bc__run_episode(const bc_task *t, const bc_grid_policy *gp, uint64_t key, int64_t limit,
                    bc__episode *ep, bc_trajectory *tr, int64_t max_points)
{
    const int32_t nv = bc_task_n_vars(t), nn = bc_task_n_noise(t);
    const double g = bc_task_discount(t);
    double u[BC_TASK_MAX_VARS], x[BC_TASK_MAX_VARS], y[BC_TASK_MAX_VARS];
    double noise[BC_TASK_MAX_NOISE];
    for (int32_t i = 0; i < nv; i++)
        u[i] = bc__unit(bc__stream_at(key, (uint64_t)i));
    bc_task_initial_at(t, u, x);
    memset(ep, 0, sizeof *ep);
    if (tr && record(tr, x, nv, -1, max_points) < 0)
        return -1;
    double weight = 1.0;
    int32_t a = -1;
    for (int64_t s = 0; s < limit; s++) {
        for (int32_t k = 0; k < nn; k++)
            noise[k] = bc_task_noise_at(t, k, bc__unit(bc__stream_at(key, bc__draw_index(t, s, k))));
        a = choose(gp, x, gp->action ? 0.0 : bc__unit(bc__stream_at(key, bc__draw_index(t, s, nn))));
        double r;
        int stop;
        if (bc_task_step(t, x, a, nn ? noise : NULL, y, &r, &stop) < 0) {
            ep->failed = 1;
            ep->fail_step = s;
            ep->fail_action = a;
            memcpy(ep->fail_x, x, (size_t)nv * sizeof *x);
            memcpy(ep->fail_noise, noise, (size_t)nn * sizeof *noise);
            return -1;
        }
        ep->ret += weight * r;
        weight *= g;
        memcpy(x, y, (size_t)nv * sizeof *x);
        ep->steps = s + 1;
        if (tr && record(tr, x, nv, a, max_points) < 0)
            return -1;
        if (stop) {
            ep->stopped = 1;
            break;
        }
    }
    if (tr) {
        tr->ret = ep->ret;
        tr->stopped = ep->stopped;
    }
    return 0;
}

/* What one block of episodes adds up to. */
typedef struct {
    bc__welford ret, against_ret, regret;
    int64_t successes, against_successes, steps, against_steps;
    int64_t fail_episode; /* first failing episode of the block; -1 */
    int fail_against;     /* it was the compared policy's step */
    bc__episode fail;
} block_sum;

/* Everything the workers share. */
typedef struct {
    const bc_task *t;
    const bc_grid_policy *agent, *against;
    uint64_t seed;
    int64_t episodes, limit, n_blocks;
    double sgn;
    uint32_t *steps;       /* [episodes] the agent's steps per episode */
    block_sum *blocks;     /* [n_blocks] */
    atomic_llong next;     /* next block to take */
    atomic_llong first_fail; /* smallest failing episode seen so far; episodes when none */
    atomic_llong done;     /* episodes run to their end */
} job;

static void run_block(job *j, int64_t b)
{
    block_sum *bs = &j->blocks[b];
    memset(bs, 0, sizeof *bs);
    bs->fail_episode = -1;
    int64_t end = (b + 1) * BLOCK < j->episodes ? (b + 1) * BLOCK : j->episodes;
    int64_t e;
    for (e = b * BLOCK; e < end; e++) {
        /* An earlier episode failed (nothing after it is reported), or a stop request. */
        if (e > atomic_load(&j->first_fail) || bc_stop_requested())
            break;
        uint64_t key = bc__episode_key(j->seed, e);
        bc__episode ep, ea;
        int bad = bc__run_episode(j->t, j->agent, key, j->limit, &ep, NULL, 0) < 0;
        int bad_against = !bad && j->against &&
                          bc__run_episode(j->t, j->against, key, j->limit, &ea, NULL, 0) < 0;
        if (bad || bad_against) {
            bs->fail_episode = e;
            bs->fail_against = bad_against;
            bs->fail = bad ? ep : ea;
            long long cur = atomic_load(&j->first_fail);
            while (e < cur && !atomic_compare_exchange_weak(&j->first_fail, &cur, e))
                ;
            break;
        }
        bc__welford_add(&bs->ret, ep.ret);
        bs->successes += ep.stopped;
        bs->steps += ep.steps;
        j->steps[e] = (uint32_t)ep.steps;
        if (j->against) {
            bc__welford_add(&bs->against_ret, ea.ret);
            bc__welford_add(&bs->regret, j->sgn * (ea.ret - ep.ret));
            bs->against_successes += ea.stopped;
            bs->against_steps += ea.steps;
        }
    }
    atomic_fetch_add(&j->done, e - b * BLOCK);
}

static void *worker(void *arg)
{
    job *j = arg;
    for (;;) {
        int64_t b = atomic_fetch_add(&j->next, 1);
        if (b >= j->n_blocks)
            return NULL;
        run_block(j, b);
    }
}

/* Runs the blocks on `threads` threads (the caller's thread among them). */
static void run_all(job *j, int threads)
{
    pthread_t tid[1024];
    int started = 0;
    if (threads > j->n_blocks)
        threads = (int)j->n_blocks;
    for (int i = 1; i < threads && i < 1024; i++) {
        if (pthread_create(&tid[started], NULL, worker, j) != 0)
            break; /* fewer threads: the same results, later */
        started++;
    }
    worker(j);
    for (int i = 0; i < started; i++)
        pthread_join(tid[i], NULL);
}

static int cmp_u32(const void *a, const void *b)
{
    uint32_t x = *(const uint32_t *)a, y = *(const uint32_t *)b;
    return (x > y) - (x < y);
}

/* Merges the blocks in order into r; the steps' percentiles. */
static void summarise(job *j, bc_rollout_result *r)
{
    bc__welford ret = {0}, against = {0}, regret = {0};
    int64_t steps = 0, against_steps = 0;
    for (int64_t b = 0; b < j->n_blocks; b++) {
        block_sum *bs = &j->blocks[b];
        bc__welford_merge(&ret, &bs->ret);
        bc__welford_merge(&against, &bs->against_ret);
        bc__welford_merge(&regret, &bs->regret);
        r->successes += bs->successes;
        r->against_successes += bs->against_successes;
        steps += bs->steps;
        against_steps += bs->against_steps;
    }
    double n = (double)j->episodes;
    bc__welford_stats(&ret, &r->ret);
    r->success_rate = (double)r->successes / n;
    r->steps_mean = (double)steps / n;
    qsort(j->steps, (size_t)j->episodes, sizeof *j->steps, cmp_u32);
    r->steps_min = j->steps[0];
    r->steps_p10 = bc__percentile(j->steps, j->episodes, 10);
    r->steps_p50 = bc__percentile(j->steps, j->episodes, 50);
    r->steps_p90 = bc__percentile(j->steps, j->episodes, 90);
    r->steps_max = j->steps[j->episodes - 1];
    if (j->against) {
        r->has_against = 1;
        bc__welford_stats(&against, &r->against_ret);
        bc__welford_stats(&regret, &r->regret);
        r->against_success_rate = (double)r->against_successes / n;
        r->against_steps_mean = (double)against_steps / n;
    }
}

/* The message of the first failing episode. */
static void failure_message(const job *j, bc_rollout_result *r)
{
    const block_sum *first = NULL;
    for (int64_t b = 0; b < j->n_blocks && !first; b++)
        if (j->blocks[b].fail_episode >= 0)
            first = &j->blocks[b];
    char why[400];
    bc_task_step_error(j->t, first->fail.fail_x, first->fail.fail_action,
                       bc_task_n_noise(j->t) ? first->fail.fail_noise : NULL, why, sizeof why);
    snprintf(r->message, sizeof r->message, "episode %lld, step %lld%s: %s",
             (long long)first->fail_episode, (long long)first->fail.fail_step + 1,
             first->fail_against ? " (the compared policy)" : "", why);
}

static double now_seconds(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

int bc_rollout(const bc_task *t, const bc_grid_policy *agent, const bc_grid_policy *against,
               const bc_rollout_opts *o, bc_rollout_result *r)
{
    const double t0 = now_seconds();
    memset(r, 0, sizeof *r);
    job j = {.t = t, .agent = agent, .against = against, .seed = o->seed,
             .episodes = o->episodes, .limit = o->limit > 0 ? o->limit : bc_task_limit(t),
             .sgn = bc_task_objective(t) == BC_MIN ? -1.0 : 1.0};
    r->episodes = o->episodes;
    r->limit = j.limit;
    if (o->episodes < 1 || j.limit > UINT32_MAX) {
        snprintf(r->message, sizeof r->message, "a rollout needs at least one episode and a "
                 "limit below 2^32 steps");
        return -2;
    }
    j.n_blocks = (o->episodes + BLOCK - 1) / BLOCK;
    j.steps = malloc((size_t)o->episodes * sizeof *j.steps);
    j.blocks = malloc((size_t)j.n_blocks * sizeof *j.blocks);
    if (!j.steps || !j.blocks) {
        free(j.steps);
        free(j.blocks);
        snprintf(r->message, sizeof r->message, "out of memory for %lld episodes",
                 (long long)o->episodes);
        return -2;
    }
    atomic_init(&j.next, 0);
    atomic_init(&j.first_fail, (long long)o->episodes);
    atomic_init(&j.done, 0);
    run_all(&j, o->threads > 0 ? o->threads : 1);
    r->simulated = atomic_load(&j.done);
    int rc = 0;
    if (r->simulated < o->episodes && bc_stop_requested()) {
        snprintf(r->message, sizeof r->message, "stopped on request after %lld of %lld episodes",
                 (long long)r->simulated, (long long)o->episodes);
        rc = -3;
    } else if (atomic_load(&j.first_fail) < o->episodes) {
        failure_message(&j, r);
        rc = -1;
    } else {
        summarise(&j, r);
    }
    free(j.steps);
    free(j.blocks);
    r->seconds = now_seconds() - t0;
    return rc;
}

int bc_rollout_trajectories(const bc_task *t, const bc_grid_policy *gp, const bc_rollout_opts *o,
                            int32_t k, int64_t max_points, bc_trajectory *out, char *why,
                            size_t cap)
{
    int64_t limit = o->limit > 0 ? o->limit : bc_task_limit(t);
    memset(out, 0, (size_t)k * sizeof *out);
    for (int32_t i = 0; i < k; i++) {
        bc__episode ep;
        if (bc__run_episode(t, gp, bc__episode_key(o->seed, i), limit, &ep, &out[i],
                            max_points < 1 ? 1 : max_points) < 0) {
            if (ep.failed)
                bc_task_step_error(t, ep.fail_x, ep.fail_action, ep.fail_noise, why, cap);
            else
                snprintf(why, cap, "out of memory for trajectory %d", (int)i);
            bc_trajectories_free(out, k);
            return -1;
        }
    }
    return 0;
}

void bc_trajectories_free(bc_trajectory *tr, int32_t k)
{
    for (int32_t i = 0; tr && i < k; i++) {
        free(tr[i].x);
        free(tr[i].action);
        tr[i].x = NULL;
        tr[i].action = NULL;
        tr[i].n_points = 0;
    }
}
