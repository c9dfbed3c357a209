/* test_sweep.c — the Jacobi sweep kernel (solvers/sweep.c): its values, policy and statistics against a hand example and the plain loop, for any thread count. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * The kernel's contract (solvers/sweep_internal.h): Tv(s) = max over the
 * pairs p of s of sgn r(p) + g sum_k P(k) v(succ k), the sum taken in the
 * order of the transitions, and policy[s] = the FIRST pair reaching the
 * maximum; every state computed by the same operations whatever the number
 * of threads.  The checks compare it bit for bit with the plain loop written
 * here from that definition (the Bellman operator: Puterman, Markov Decision
 * Processes, 1994, section 6.2) and with a two-state example worked by hand.
 * The random model varies the successor counts (1 to 9), has terminal
 * states, ties, and transitions up to the very end of the arrays (the
 * kernel reads ahead and must stop at the end).
 */
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include "bellcheck.h"
#include "unit.h"
#include "../../solvers/sweep_internal.h"

static uint64_t rng_state = 0x2545F4914F6CDD1DULL;

/* xorshift64* (Vigna, An experimental exploration of Marsaglia's xorshift
 * generators, scrambled, 2016): a uniform double in [0, 1). */
static double uniform(void)
{
    rng_state ^= rng_state >> 12;
    rng_state ^= rng_state << 25;
    rng_state ^= rng_state >> 27;
    return (double)((rng_state * 2685821657736338717ULL) >> 11) * 0x1.0p-53;
}

/* A random model: every 20th state terminal, the others 1 to 3 pairs of 1
 * to 9 successors; in every 7th non-terminal state all pairs are equal (a
 * tie the first pair must win).  The last state is non-terminal, so
 * transitions run to the end of the arrays. */
static bc_model *random_model(int32_t n, double g)
{
    int64_t pairs = 0, trans = 0;
    uint64_t keep = rng_state;
    for (int pass = 0; pass < 2; pass++) {
        bc_model *m = pass ? bc_model_alloc(n, 3, pairs, trans) : NULL;
        if (pass && !m)
            return NULL;
        rng_state = keep;
        int64_t p = 0, k = 0;
        for (int32_t s = 0; s < n; s++) {
            int term = s % 20 == 3 && s != n - 1;
            int na = term ? 0 : 1 + (int)(uniform() * 3);
            int tie = s % 7 == 0;
            if (m) {
                m->terminal[s] = (uint8_t)term;
                m->state_pair_start[s] = p;
            }
            int nb = 1 + (int)(uniform() * 9);
            double r = 2 * uniform() - 1;
            for (int a = 0; a < na; a++, p++) {
                if (!tie && a > 0)
                    nb = 1 + (int)(uniform() * 9), r = 2 * uniform() - 1;
                if (m) {
                    m->pair_state[p] = s, m->pair_action[p] = a;
                    m->pair_trans_start[p] = k;
                    m->reward[p] = r;
                }
                uint64_t at = rng_state; /* a tie repeats the same successors */
                double sum = 0.0;
                for (int b = 0; b < nb; b++) {
                    double w = 0.1 + uniform();
                    int32_t t = (int32_t)(uniform() * n);
                    if (m)
                        m->succ_state[k + b] = t, m->prob[k + b] = w;
                    sum += w;
                }
                if (m)
                    for (int b = 0; b < nb; b++)
                        m->prob[k + b] /= sum;
                k += nb;
                if (tie && a + 1 < na)
                    rng_state = at;
            }
        }
        if (!m) {
            pairs = p, trans = k;
            continue;
        }
        m->state_pair_start[n] = p;
        m->pair_trans_start[p] = k;
        m->discount = g;
        return m;
    }
    return NULL;
}

/* The Bellman operator written from its definition, one state at a time. */
static void plain_sweep(const bc_model *m, double sgn, const double *v, double *tv,
                        int64_t *policy, bc__sweep_stat *st)
{
    st->dmin = INFINITY, st->dmax = -INFINITY, st->vmax = 0.0;
    for (int32_t s = 0; s < m->n_states; s++) {
        double best = 0.0;
        int64_t arg = -1;
        for (int64_t p = m->state_pair_start[s]; p < m->state_pair_start[s + 1]; p++) {
            double acc = 0.0;
            for (int64_t k = m->pair_trans_start[p]; k < m->pair_trans_start[p + 1]; k++)
                acc += m->prob[k] * v[m->succ_state[k]];
            double q = sgn * m->reward[p] + m->discount * acc;
            if (arg < 0 || q > best)
                best = q, arg = p;
        }
        tv[s] = best;
        policy[s] = arg;
        double d = best - v[s];
        st->dmin = fmin(st->dmin, d), st->dmax = fmax(st->dmax, d);
        st->vmax = fmax(st->vmax, fmax(fabs(best), fabs(v[s])));
    }
}

/* Two states; s1 terminal.  s0: a0 pays 1 and goes to s0 or s1 with 1/2
 * each, a1 pays 2 and goes to s1.  g = 0.9, v = (10, 0), by hand:
 * Q(a0) = 1 + 0.9 (5 + 0) = 5.5, Q(a1) = 2 + 0.9 * 0 = 2, so Tv = (5.5, 0),
 * the policy takes a0 (pair 0), d = (-4.5, 0), max |v|, |Tv| = 10.  For
 * objective min (sgn = -1): Q(a0) = -1 + 4.5 = 3.5, Q(a1) = -2: again a0. */
static void hand_example(void)
{
    bc_model *m = bc_model_alloc(2, 2, 2, 3);
    CHECK(m != NULL, "hand: model allocated");
    if (!m)
        return;
    int64_t sp[] = {0, 2, 2}, tp[] = {0, 2, 3};
    int32_t succ[] = {0, 1, 1};
    double prob[] = {0.5, 0.5, 1.0}, rew[] = {1.0, 2.0};
    memcpy(m->state_pair_start, sp, sizeof sp);
    memcpy(m->pair_trans_start, tp, sizeof tp);
    memcpy(m->succ_state, succ, sizeof succ);
    memcpy(m->prob, prob, sizeof prob);
    memcpy(m->reward, rew, sizeof rew);
    m->pair_action[1] = 1;
    m->terminal[1] = 1;
    m->discount = 0.9;
    double v[2] = {10.0, 0.0}, tv[2];
    int64_t pol[2];
    bc__sweep_stat st;
    bc__sweep_jacobi(m, 1.0, v, tv, pol, 1, &st);
    CHECK_NEAR(tv[0], 5.5, 1e-15, "hand: Tv(s0) = 5.5");
    CHECK(tv[1] == 0.0 && pol[1] == -1, "hand: terminal s1 keeps 0 and has no pair");
    CHECK(pol[0] == 0, "hand: the policy of s0 is a0 (pair 0)");
    CHECK_NEAR(st.dmin, -4.5, 1e-15, "hand: min d = -4.5");
    CHECK(st.dmax == 0.0, "hand: max d = 0 (the terminal state counts)");
    CHECK(st.vmax == 10.0, "hand: max |v|, |Tv| = 10");
    bc__sweep_jacobi(m, -1.0, v, tv, pol, 1, &st);
    CHECK_NEAR(tv[0], 3.5, 1e-15, "hand, objective min: Tv(s0) = 3.5 in the maximising sign");
    CHECK(pol[0] == 0, "hand, objective min: the policy of s0 is a0");
    bc_model_free(m);
}

static int same_stat(const bc__sweep_stat *a, const bc__sweep_stat *b)
{
    return a->dmin == b->dmin && a->dmax == b->dmax && a->vmax == b->vmax;
}

/* The random model against the plain loop, for each sign and thread count. */
static void random_checks(int32_t n)
{
    bc_model *m = random_model(n, 0.95);
    CHECK(m != NULL, "random: model allocated");
    if (!m)
        return;
    CHECK(bc_model_check_invariants(m) == NULL, "random: the model keeps the invariants");
    double *v = malloc((size_t)n * sizeof *v), *tv = malloc((size_t)n * sizeof *tv),
           *ref = malloc((size_t)n * sizeof *ref);
    int64_t *pol = malloc((size_t)n * sizeof *pol), *rpol = malloc((size_t)n * sizeof *rpol);
    if (!v || !tv || !ref || !pol || !rpol) {
        CHECK(0, "random: buffers allocated");
        goto out;
    }
    for (int32_t s = 0; s < n; s++)
        v[s] = m->terminal[s] ? 0.0 : 100 * uniform() - 50;
    int64_t ties = 0;
    for (int32_t s = 0; s < n; s += 7)
        ties += m->state_pair_start[s + 1] - m->state_pair_start[s] > 1;
    if (n > 100)
        CHECK(ties > n / 100, "random: the model has states whose pairs tie");
    for (int sign = 0; sign < 2; sign++) {
        double sgn = sign ? -1.0 : 1.0;
        bc__sweep_stat rst, st;
        plain_sweep(m, sgn, v, ref, rpol, &rst);
        for (int threads = 1; threads <= 3; threads++) {
            char name[160];
            memset(tv, 0xff, (size_t)n * sizeof *tv);
            bc__sweep_jacobi(m, sgn, v, tv, pol, threads, &st);
            snprintf(name, sizeof name, "random %d states, sign %+g, %d thread(s): Tv bit for bit the plain loop's",
                     (int)n, sgn, threads);
            CHECK(!memcmp(tv, ref, (size_t)n * sizeof *tv), name);
            snprintf(name, sizeof name, "random %d states, sign %+g, %d thread(s): policy = the first maximising pair",
                     (int)n, sgn, threads);
            CHECK(!memcmp(pol, rpol, (size_t)n * sizeof *pol), name);
            snprintf(name, sizeof name, "random %d states, sign %+g, %d thread(s): min d, max d, max |v| exact",
                     (int)n, sgn, threads);
            CHECK(same_stat(&st, &rst), name);
        }
        memset(tv, 0xff, (size_t)n * sizeof *tv);
        bc__sweep_jacobi(m, sgn, v, tv, NULL, 2, &st);
        CHECK(!memcmp(tv, ref, (size_t)n * sizeof *tv) && same_stat(&st, &rst),
              sign ? "random, sign -1, no policy asked: same Tv and statistics"
                   : "random, sign +1, no policy asked: same Tv and statistics");
    }
out:
    free(v), free(tv), free(ref), free(pol), free(rpol);
    bc_model_free(m);
}

int main(void)
{
    hand_example();
    random_checks(4001);
    random_checks(7); /* fewer transitions than the kernel reads ahead */
    bc_model *m = bc_model_alloc(0, 0, 0, 0);
    if (m) {
        bc__sweep_stat st = {1, 1, 1};
        double v[1], tv[1];
        bc__sweep_jacobi(m, 1.0, v, tv, NULL, 2, &st);
        CHECK(st.dmin == 0.0 && st.dmax == 0.0 && st.vmax == 0.0, "no states: statistics 0, 0, 0");
        bc_model_free(m);
    }
    UNIT_DONE();
}
