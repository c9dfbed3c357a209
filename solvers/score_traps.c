/* score_traps.c — where an agent can get stuck: states that never reach a terminal state for sure, and the probability of reaching one. */
/*
 * Copyright (C) 2026 the bellcheck developers.
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * At discount 1 a policy that fails to terminate with positive probability
 * is worth minus infinity (plus infinity for costs).  Under a fixed
 * stochastic policy the model is a finite Markov chain, and (common
 * practice, the classification of states of a finite chain):
 *   reach(s) < 1  iff  s can reach, along the support, a state that cannot
 *                      reach any terminal state.
 * If reach(s) < 1 the chain avoids the terminal states with positive
 * probability, so it ends up in a closed class without terminal state, whose
 * states reach none; conversely a state that reaches none has reach 0 and
 * any state leading to it with positive probability loses that mass.  So
 * two backward searches decide traps exactly, with no arithmetic.
 *
 * For an adversary choosing among allowed pairs (the worst tie-break) the
 * question is whether SOME choice fails to terminate.  Any policy, with
 * probability 1, ends up staying in an end component (a set of states each
 * with a pair that keeps it inside); one without terminal state lies in the
 * largest set C of non-terminal states in which every state has an allowed
 * pair whose successors all stay in C.  Hence: some choice fails to
 * terminate from s iff s can reach C along allowed pairs (common practice,
 * the end-component argument of probabilistic model checking).
 */
#include <assert.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "bellcheck.h"
#include "score_internal.h"
#include "solver_internal.h"

/* Backward search: adds to mark[] every state with a pair (in r) that
 * reaches a marked state with positive probability, until none is left;
 * choice[s] (if not NULL) gets the pair that added s.  queue holds
 * n_states entries. */
static void backward_closure(const bc_model *m, const bc_reverse *r, uint8_t *mark, int32_t *queue,
                             int64_t *choice)
{
    int32_t head = 0, tail = 0;
    for (int32_t s = 0; s < m->n_states; s++)
        if (mark[s])
            queue[tail++] = s;
    while (head < tail) {
        int32_t t = queue[head++];
        for (int64_t i = r->start[t]; i < r->start[t + 1]; i++) {
            int64_t p = r->pair_of[i];
            int32_t s = m->pair_state[p];
            if (mark[s])
                continue;
            mark[s] = 1;
            if (choice)
                choice[s] = p;
            queue[tail++] = s;
        }
    }
}

int32_t bc_sc_find_traps(const bc_model *m, const double *prob, uint8_t *trap)
{
    const size_t n = (size_t)(m->n_states ? m->n_states : 1);
    uint8_t *use = malloc((size_t)(m->n_pairs ? m->n_pairs : 1));
    uint8_t *reaches = malloc(n);
    int32_t *queue = malloc(n * sizeof *queue);
    bc_reverse r = {NULL, NULL};
    if (!use || !reaches || !queue) {
        free(use), free(reaches), free(queue);
        return -1;
    }
    for (int64_t p = 0; p < m->n_pairs; p++)
        use[p] = prob[p] > 0.0;
    if (bc_reverse_build(m, use, &r) < 0) {
        free(use), free(reaches), free(queue);
        return -1;
    }
    /* reaches: the states from which some terminal state has positive
     * probability; the others (reach 0) seed the traps, and every state
     * that can get to one of them is a trap too. */
    memcpy(reaches, m->terminal, (size_t)m->n_states);
    backward_closure(m, &r, reaches, queue, NULL);
    for (int32_t s = 0; s < m->n_states; s++)
        trap[s] = !reaches[s];
    backward_closure(m, &r, trap, queue, NULL);
    int32_t count = 0;
    for (int32_t s = 0; s < m->n_states; s++) {
        assert(!(trap[s] && m->terminal[s]));
        count += trap[s];
    }
    bc_reverse_free(&r);
    free(use), free(reaches), free(queue);
    return count;
}

/* Right-hand side of the absorption system over the leaky traps: the
 * probability of stepping straight to a state of reach 1 (a terminal state
 * or a state that is not a trap). */
static double step_to_safety(const bc_model *m, const double *prob, const uint8_t *trap, int32_t s)
{
    double acc = 0.0;
    for (int64_t p = m->state_pair_start[s]; p < m->state_pair_start[s + 1]; p++) {
        if (!(prob[p] > 0.0))
            continue;
        double out = 0.0;
        for (int64_t k = m->pair_trans_start[p]; k < m->pair_trans_start[p + 1]; k++)
            if (!trap[m->succ_state[k]])
                out += m->prob[k];
        acc += prob[p] * out;
    }
    return acc;
}

int bc_sc_reach_probability(const bc_model *m, const double *prob, const uint8_t *trap,
                            double *reach, char *msg, size_t cap)
{
    assert(m->discount == 1.0);
    /* Off the traps reach is 1.  Among the traps, those that can still reach
     * a terminal state ("leaky") solve h = P_LL h + (step to safety), whose
     * matrix I - P_LL is non-singular because every leaky state leaves L
     * with positive probability along some path; the other traps have 0. */
    const size_t n = (size_t)(m->n_states ? m->n_states : 1);
    uint8_t *leaky = calloc(n, 1);
    int32_t *queue = malloc(n * sizeof *queue);
    uint8_t *use = malloc((size_t)(m->n_pairs ? m->n_pairs : 1));
    double *b = calloc(n, sizeof *b), *h = calloc(n, sizeof *h);
    bc_reverse r = {NULL, NULL};
    int rc = -1;
    if (!leaky || !queue || !use || !b || !h)
        goto out_of_memory;
    for (int64_t p = 0; p < m->n_pairs; p++)
        use[p] = prob[p] > 0.0;
    if (bc_reverse_build(m, use, &r) < 0)
        goto out_of_memory;
    memcpy(leaky, m->terminal, (size_t)m->n_states);
    backward_closure(m, &r, leaky, queue, NULL);
    double mass_leaky = 0.0, total = 0.0;
    for (int32_t s = 0; s < m->n_states; s++) {
        leaky[s] = leaky[s] && trap[s];
        if (leaky[s]) {
            b[s] = step_to_safety(m, prob, trap, s);
            mass_leaky += m->initial[s];
        } else if (!trap[s]) {
            total += m->initial[s];
        }
    }
    if (mass_leaky > 0.0) {
        char why[160];
        bc_sv_eval *w = bc_sv_eval_new(m, leaky, 1);
        if (!w)
            goto out_of_memory;
        bc_solve_status st = bc_sv_eval_factorise(m, w, prob, why, sizeof why);
        if (st == BC_SOLVE_OK && bc_sv_eval_solve(m, w, 0, b, h) < 0) {
            st = BC_SOLVE_FAILED;
            snprintf(why, sizeof why, "the sparse solve failed");
        }
        bc_sv_eval_free(w);
        if (st != BC_SOLVE_OK) {
            snprintf(msg, cap, "score: probability of reaching a terminal state: %s", why);
            goto done;
        }
        for (int32_t s = 0; s < m->n_states; s++)
            if (leaky[s] && m->initial[s] > 0.0)
                total += m->initial[s] * fmin(1.0, fmax(0.0, h[s]));
    }
    *reach = fmin(1.0, total);
    rc = 0;
    goto done;
out_of_memory:
    snprintf(msg, cap, "score: out of memory finding the probability of termination");
done:
    bc_reverse_free(&r);
    free(leaky), free(queue), free(use), free(b), free(h);
    return rc;
}

/* C: the largest set of non-terminal states in which every state has an
 * allowed pair whose successors all stay in C.  Worklist form: outside[p]
 * counts p's positive transitions leaving C, good[s] the allowed pairs of s
 * with outside 0; a state whose good count drops to 0 leaves C, which may
 * raise the outside counts of the pairs leading to it.  Linear time. */
static int largest_closed_set(const bc_model *m, const uint8_t *allowed, const bc_reverse *r,
                              uint8_t *in_c, int32_t *queue)
{
    int64_t *outside = calloc((size_t)(m->n_pairs ? m->n_pairs : 1), sizeof *outside);
    int64_t *good = calloc((size_t)(m->n_states ? m->n_states : 1), sizeof *good);
    if (!outside || !good) {
        free(outside), free(good);
        return -1;
    }
    int32_t head = 0, tail = 0;
    for (int32_t s = 0; s < m->n_states; s++) {
        in_c[s] = !m->terminal[s];
        for (int64_t p = m->state_pair_start[s]; p < m->state_pair_start[s + 1]; p++) {
            for (int64_t k = m->pair_trans_start[p]; k < m->pair_trans_start[p + 1]; k++)
                outside[p] += m->prob[k] > 0.0 && m->terminal[m->succ_state[k]];
            good[s] += allowed[p] && outside[p] == 0;
        }
        if (in_c[s] && good[s] == 0) {
            in_c[s] = 0;
            queue[tail++] = s;
        }
    }
    while (head < tail) {
        int32_t t = queue[head++];
        for (int64_t i = r->start[t]; i < r->start[t + 1]; i++) {
            int64_t p = r->pair_of[i];
            int32_t s = m->pair_state[p];
            if (outside[p]++ == 0 && --good[s] == 0 && in_c[s]) {
                in_c[s] = 0;
                queue[tail++] = s;
            }
        }
    }
    free(outside), free(good);
    return 0;
}

/* In C, a pair of s whose positive successors all stay in C (one exists). */
static int64_t staying_pair(const bc_model *m, const uint8_t *allowed, const uint8_t *in_c,
                            int32_t s)
{
    for (int64_t p = m->state_pair_start[s]; p < m->state_pair_start[s + 1]; p++) {
        int inside = allowed[p];
        for (int64_t k = m->pair_trans_start[p]; inside && k < m->pair_trans_start[p + 1]; k++)
            if (m->prob[k] > 0.0 && !in_c[m->succ_state[k]])
                inside = 0;
        if (inside)
            return p;
    }
    assert(!"a state of C without a pair staying in C");
    return -1;
}

int32_t bc_sc_avoidable(const bc_model *m, const uint8_t *allowed, uint8_t *stuck,
                        int64_t *choice)
{
    const size_t n = (size_t)(m->n_states ? m->n_states : 1);
    int32_t *queue = malloc(n * sizeof *queue);
    bc_reverse r = {NULL, NULL};
    if (!queue || bc_reverse_build(m, allowed, &r) < 0) {
        free(queue);
        return -1;
    }
    if (largest_closed_set(m, allowed, &r, stuck, queue) < 0) {
        bc_reverse_free(&r);
        free(queue);
        return -1;
    }
    /* In C the adversary stays for ever; elsewhere it heads for C, one
     * search layer closer with positive probability at every step. */
    for (int32_t s = 0; s < m->n_states; s++)
        choice[s] = stuck[s] ? staying_pair(m, allowed, stuck, s) : -1;
    backward_closure(m, &r, stuck, queue, choice);
    int32_t count = 0;
    for (int32_t s = 0; s < m->n_states; s++) {
        assert(!stuck[s] || (choice[s] >= 0 && allowed[choice[s]]));
        count += stuck[s];
    }
    bc_reverse_free(&r);
    free(queue);
    return count;
}
