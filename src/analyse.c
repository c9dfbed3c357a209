/* analyse.c — structural findings of a model: reachability, states with no way out, zero-reward end components. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * All three analyses are graph searches over the positive-probability
 * successors (probabilities are compared exactly, so a written 0 is no edge).
 */
#include "bellcheck.h"

#include <stdlib.h>
#include <string.h>

static int positive(const bc_model *m, int64_t t)
{
    return bc_num_sign(bc_model_prob_exact(m, t), m->big) > 0;
}

/* Collects the indices where flag[s] == want into a new array. */
static int collect(const uint8_t *flag, uint8_t want, int32_t n, int32_t **out, int32_t *count)
{
    int32_t c = 0;
    for (int32_t s = 0; s < n; s++)
        c += flag[s] == want;
    *count = c;
    *out = malloc((size_t)(c ? c : 1) * sizeof **out);
    if (!*out)
        return -1;
    c = 0;
    for (int32_t s = 0; s < n; s++)
        if (flag[s] == want)
            (*out)[c++] = s;
    return 0;
}

/* Forward search from the support of the initial distribution. */
static int unreachable_states(const bc_model *m, bc_findings *f)
{
    int32_t n = m->n_states;
    uint8_t *seen = calloc((size_t)n + 1, 1);
    int32_t *stack = malloc(((size_t)n + 1) * sizeof *stack);
    if (!seen || !stack) {
        free(seen);
        free(stack);
        return -1;
    }
    int32_t top = 0;
    for (int32_t s = 0; s < n; s++)
        if (bc_num_sign(m->initial_exact[s], m->big) > 0) {
            seen[s] = 1;
            stack[top++] = s;
        }
    while (top > 0) {
        int32_t s = stack[--top];
        for (int64_t p = m->state_pair_start[s]; p < m->state_pair_start[s + 1]; p++)
            for (int64_t t = m->pair_trans_start[p]; t < m->pair_trans_start[p + 1]; t++) {
                int32_t u = m->succ_state[t];
                if (!seen[u] && positive(m, t)) {
                    seen[u] = 1;
                    stack[top++] = u; /* each state is pushed once: the stack never overflows */
                }
            }
    }
    int rc = collect(seen, 0, n, &f->unreachable, &f->n_unreachable);
    free(seen);
    free(stack);
    return rc;
}

/* States from which some policy reaches a terminal state with probability 1
 * (the classical fixed point: keep the states that can reach the terminal set
 * using only pairs whose every successor is kept, until nothing changes).
 * Each round removes at least one state, and a round costs O(transitions). */
static int no_exit_states(const bc_model *m, bc_findings *f)
{
    int32_t n = m->n_states;
    bc_reverse rev = {NULL, NULL};
    uint8_t *keep = malloc((size_t)n + 1), *reach = malloc((size_t)n + 1);
    uint8_t *pair_ok = malloc((size_t)m->n_pairs + 1);
    int32_t *queue = malloc(((size_t)n + 1) * sizeof *queue);
    int rc = -1;
    if (!keep || !reach || !pair_ok || !queue || bc_reverse_build(m, NULL, &rev) < 0)
        goto done;
    memset(keep, 1, (size_t)n);
    for (int changed = 1; changed;) {
        for (int64_t p = 0; p < m->n_pairs; p++) {
            pair_ok[p] = keep[m->pair_state[p]];
            for (int64_t t = m->pair_trans_start[p]; t < m->pair_trans_start[p + 1] && pair_ok[p]; t++)
                if (positive(m, t) && !keep[m->succ_state[t]])
                    pair_ok[p] = 0;
        }
        int32_t head = 0, tail = 0;
        memset(reach, 0, (size_t)n);
        for (int32_t s = 0; s < n; s++)
            if (m->terminal[s]) {
                reach[s] = 1;
                queue[tail++] = s;
            }
        while (head < tail) {
            int32_t u = queue[head++];
            for (int64_t k = rev.start[u]; k < rev.start[u + 1]; k++) {
                int64_t p = rev.pair_of[k];
                int32_t s = m->pair_state[p];
                if (!reach[s] && pair_ok[p]) {
                    reach[s] = 1;
                    queue[tail++] = s;
                }
            }
        }
        changed = 0;
        for (int32_t s = 0; s < n; s++)
            if (keep[s] && !reach[s]) {
                keep[s] = 0;
                changed = 1;
            }
    }
    rc = collect(keep, 0, n, &f->no_exit, &f->n_no_exit);
done:
    free(keep);
    free(reach);
    free(pair_ok);
    free(queue);
    bc_reverse_free(&rev);
    return rc;
}

/* 1 when the expected reward of pair p is exactly zero. */
static int zero_reward(const bc_model *m, int64_t p)
{
    if (!m->outcome_id)
        return bc_num_sign(bc_model_reward_exact(m, p), m->big) == 0;
    if (m->reward[p] != 0)
        return 0; /* reward[p] is the exact sum rounded once: non-zero means non-zero */
    mpq_t r;
    mpq_init(r);
    bc_model_reward_mpq(m, p, r);
    int z = mpq_sgn(r) == 0;
    mpq_clear(r);
    return z;
}

/* Tarjan's strongly connected components over the edges of the pairs with
 * use[p] set, iterative (models can be deep).  comp[s] = component id, or -1
 * for states with cand[s] == 0.  Returns 0 or -1. */
static int components(const bc_model *m, const uint8_t *cand, const uint8_t *use, int32_t *comp)
{
    int32_t n = m->n_states, next_index = 0, n_comp = 0, sp = 0, fp = 0;
    int32_t *index = malloc((size_t)n * sizeof *index), *low = malloc((size_t)n * sizeof *low);
    int32_t *stack = malloc((size_t)n * sizeof *stack);
    struct frame { int32_t s; int64_t p, t; } *frames = malloc((size_t)n * sizeof *frames);
    uint8_t *on = calloc((size_t)n, 1);
    if (!index || !low || !stack || !frames || !on) {
        free(index); free(low); free(stack); free(frames); free(on);
        return -1;
    }
    for (int32_t s = 0; s < n; s++) {
        index[s] = -1;
        comp[s] = -1;
    }
    for (int32_t root = 0; root < n; root++) {
        if (!cand[root] || index[root] >= 0)
            continue;
        frames[fp++] = (struct frame){root, m->state_pair_start[root], -1};
        index[root] = low[root] = next_index++;
        stack[sp++] = root;
        on[root] = 1;
        while (fp > 0) {
            struct frame *fr = &frames[fp - 1];
            int32_t s = fr->s, child = -1;
            /* Advance to the next edge of s. */
            while (fr->p < m->state_pair_start[s + 1] && child < 0) {
                if (!use[fr->p]) {
                    fr->p++;
                    fr->t = -1;
                    continue;
                }
                if (fr->t < 0)
                    fr->t = m->pair_trans_start[fr->p];
                if (fr->t >= m->pair_trans_start[fr->p + 1]) {
                    fr->p++;
                    fr->t = -1;
                    continue;
                }
                int64_t t = fr->t++;
                int32_t u = m->succ_state[t];
                if (!positive(m, t) || !cand[u])
                    continue;
                if (index[u] < 0)
                    child = u;
                else if (on[u] && index[u] < low[s])
                    low[s] = index[u];
            }
            if (child >= 0) {
                index[child] = low[child] = next_index++;
                stack[sp++] = child;
                on[child] = 1;
                frames[fp++] = (struct frame){child, m->state_pair_start[child], -1};
                continue;
            }
            if (low[s] == index[s]) {
                int32_t u;
                do {
                    u = stack[--sp];
                    on[u] = 0;
                    comp[u] = n_comp;
                } while (u != s);
                n_comp++;
            }
            fp--;
            if (fp > 0) {
                int32_t parent = frames[fp - 1].s;
                if (low[s] < low[parent])
                    low[parent] = low[s];
            }
        }
    }
    free(index); free(low); free(stack); free(frames); free(on);
    return 0;
}

/* 1 when pair p moves to u with positive probability (pos: per transition). */
static int moves_to(const bc_model *m, const uint8_t *pos, int64_t p, int32_t u)
{
    for (int64_t t = m->pair_trans_start[p]; t < m->pair_trans_start[p + 1]; t++)
        if (pos[t] && m->succ_state[t] == u)
            return 1;
    return 0;
}

/* Drops, until none is left, the pairs with use[p] that can leave cand and
 * the states of cand left without such pairs.  A worklist over the reversed
 * transitions: a dropped state re-examines only the pairs that can reach
 * it, so the whole pruning costs one pass over the transitions, however
 * long the chain of states dropping one another (common practice: the
 * attractor computation of end-component algorithms). */
static void prune(const bc_model *m, const uint8_t *pos, const bc_reverse *rev, uint8_t *cand,
                  uint8_t *use, int64_t *count, int32_t *queue)
{
    int32_t head = 0, tail = 0;
    for (int32_t s = 0; s < m->n_states; s++) {
        if (!cand[s])
            continue;
        count[s] = 0;
        for (int64_t p = m->state_pair_start[s]; p < m->state_pair_start[s + 1]; p++) {
            for (int64_t t = m->pair_trans_start[p]; use[p] && t < m->pair_trans_start[p + 1]; t++)
                if (pos[t] && !cand[m->succ_state[t]])
                    use[p] = 0;
            count[s] += use[p];
        }
        if (count[s] == 0)
            cand[s] = 0, queue[tail++] = s;
    }
    while (head < tail) {
        int32_t u = queue[head++];
        for (int64_t i = rev->start[u]; i < rev->start[u + 1]; i++) {
            int64_t p = rev->pair_of[i];
            int32_t s = m->pair_state[p];
            if (!cand[s] || !use[p] || !moves_to(m, pos, p, u))
                continue;
            use[p] = 0;
            if (--count[s] == 0)
                cand[s] = 0, queue[tail++] = s;
        }
    }
}

/* Drops the pairs of cand that can move to another strongly connected
 * component (over the pairs with use[p]).  1 if any was dropped, 0 if none,
 * -1 on failure. */
static int split_components(const bc_model *m, const uint8_t *pos, uint8_t *cand, uint8_t *use,
                            int32_t *comp)
{
    if (components(m, cand, use, comp) < 0)
        return -1;
    int changed = 0;
    for (int64_t p = 0; p < m->n_pairs; p++) {
        if (!use[p] || !cand[m->pair_state[p]])
            continue;
        for (int64_t t = m->pair_trans_start[p]; t < m->pair_trans_start[p + 1]; t++)
            if (pos[t] && comp[m->succ_state[t]] != comp[m->pair_state[p]]) {
                use[p] = 0;
                changed = 1;
                break;
            }
    }
    return changed;
}

/* End components over the pairs with use[p] set on entry: on return cand[s]
 * is 1 for states some policy (using only such pairs) can keep forever, use[p]
 * marks the pairs that stay inside, comp[s] the component.  Alternates the
 * pruning and the split into components until neither drops anything.
 * 0 or -1. */
static int end_components(const bc_model *m, uint8_t *cand, uint8_t *use, int32_t *comp)
{
    const size_t n = (size_t)m->n_states + 1;
    uint8_t *pos = malloc((size_t)m->n_trans + 1);
    int64_t *count = malloc(n * sizeof *count);
    int32_t *queue = malloc(n * sizeof *queue);
    bc_reverse rev = {NULL, NULL};
    int rc = -1;
    if (!pos || !count || !queue || bc_reverse_build(m, NULL, &rev) < 0)
        goto done;
    for (int64_t t = 0; t < m->n_trans; t++)
        pos[t] = (uint8_t)positive(m, t);
    for (int32_t s = 0; s < m->n_states; s++)
        cand[s] = !m->terminal[s];
    for (int r = 1; r != 0;) {
        prune(m, pos, &rev, cand, use, count, queue);
        if ((r = split_components(m, pos, cand, use, comp)) < 0)
            goto done;
    }
    rc = 0;
done:
    free(pos), free(count), free(queue);
    bc_reverse_free(&rev);
    return rc;
}

/* Discount 1: states of end components made of zero-reward pairs (some policy
 * can stay forever collecting nothing: a warning), and states of end
 * components holding a pair that pays (max) or earns (min): some policy
 * collects without bound there, so the model has no optimum (an error). */
static int end_component_findings(const bc_model *m, bc_findings *f)
{
    int32_t n = m->n_states;
    uint8_t *cand = malloc((size_t)n + 1), *use = malloc((size_t)m->n_pairs + 1);
    uint8_t *bad_comp = calloc((size_t)n + 1, 1);
    int32_t *comp = malloc(((size_t)n + 1) * sizeof *comp);
    int rc = -1;
    if (!cand || !use || !comp || !bad_comp)
        goto done;
    for (int64_t p = 0; p < m->n_pairs; p++)
        use[p] = (uint8_t)zero_reward(m, p);
    if (end_components(m, cand, use, comp) < 0 ||
        collect(cand, 1, n, &f->zero_cycle_states, &f->n_zero_cycle_states) < 0)
        goto done;
    memset(use, 1, (size_t)m->n_pairs);
    if (end_components(m, cand, use, comp) < 0)
        goto done;
    double sgn = m->objective == BC_MAX ? 1 : -1;
    for (int64_t p = 0; p < m->n_pairs; p++)
        if (use[p] && cand[m->pair_state[p]] && sgn * m->reward[p] > 0)
            bad_comp[comp[m->pair_state[p]]] = 1;
    for (int32_t s = 0; s < n; s++)
        cand[s] = cand[s] && bad_comp[comp[s]];
    rc = collect(cand, 1, n, &f->unbounded, &f->n_unbounded);
done:
    free(cand);
    free(use);
    free(comp);
    free(bad_comp);
    return rc;
}

int bc_analyse(const bc_model *m, bc_findings *f)
{
    memset(f, 0, sizeof *f);
    for (int32_t s = 0; s < m->n_states; s++)
        f->n_terminal += m->terminal[s];
    if (unreachable_states(m, f) < 0)
        goto fail;
    if (m->discount == 1 && m->horizon == 0) {
        if (no_exit_states(m, f) < 0 || end_component_findings(m, f) < 0)
            goto fail;
    }
    return 0;
fail:
    bc_findings_free(f);
    return -1;
}

void bc_findings_free(bc_findings *f)
{
    free(f->unreachable);
    free(f->no_exit);
    free(f->zero_cycle_states);
    free(f->unbounded);
    memset(f, 0, sizeof *f);
}
