/* model.c — the model in compressed sparse rows: allocation, invariants and small accessors. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#include "bellcheck.h"

#include <stdlib.h>
#include <string.h>

/* calloc of n elements of size sz, refusing sizes that overflow size_t. */
static void *alloc_array(int64_t n, size_t sz)
{
    if (n < 0 || (uint64_t)n > SIZE_MAX / sz)
        return NULL;
    return calloc(n ? (size_t)n : 1, sz);
}

bc_model *bc_model_alloc(int32_t n_states, int32_t n_actions, int64_t n_pairs, int64_t n_trans)
{
    if (n_states < 0 || n_actions < 0 || n_pairs < 0 || n_trans < 0)
        return NULL;
    bc_model *m = calloc(1, sizeof *m);
    if (!m)
        return NULL;
    m->n_states = n_states;
    m->n_actions = n_actions;
    m->n_pairs = n_pairs;
    m->n_trans = n_trans;
    m->discount = 1;
    m->discount_exact = bc_num_int(1);
    m->state_pair_start = alloc_array((int64_t)n_states + 1, sizeof(int64_t));
    m->pair_state = alloc_array(n_pairs, sizeof(int32_t));
    m->pair_action = alloc_array(n_pairs, sizeof(int32_t));
    m->pair_trans_start = alloc_array(n_pairs + 1, sizeof(int64_t));
    m->succ_state = alloc_array(n_trans, sizeof(int32_t));
    m->prob = alloc_array(n_trans, sizeof(double));
    m->reward = alloc_array(n_pairs, sizeof(double));
    m->prob_id = alloc_array(n_trans, sizeof(uint32_t));   /* zeroed: BC_NUM_ID_ZERO */
    m->reward_id = alloc_array(n_pairs, sizeof(uint32_t));
    m->values = bc_numtab_new();
    m->terminal = alloc_array(n_states, sizeof(uint8_t));
    m->initial = alloc_array(n_states, sizeof(double));
    m->initial_exact = alloc_array(n_states, sizeof(bc_num));
    m->big = bc_bigtab_new();
    if (!m->state_pair_start || !m->pair_state || !m->pair_action || !m->pair_trans_start ||
        !m->succ_state || !m->prob || !m->reward || !m->prob_id || !m->reward_id ||
        !m->values || !m->terminal || !m->initial || !m->initial_exact || !m->big) {
        bc_model_free(m);
        return NULL;
    }
    for (int32_t s = 0; s < n_states; s++)
        m->initial_exact[s].den = 1; /* zero, canonically */
    return m;
}

void bc_model_free(bc_model *m)
{
    if (!m)
        return;
    free(m->name);
    bc_names_free(m->state_names);
    bc_names_free(m->action_names);
    free(m->state_pair_start);
    free(m->pair_state);
    free(m->pair_action);
    free(m->pair_trans_start);
    free(m->succ_state);
    free(m->prob);
    free(m->reward);
    free(m->prob_id);
    free(m->reward_id);
    free(m->outcome_id);
    bc_numtab_free(m->values);
    free(m->pair_line);
    free(m->terminal);
    free(m->initial);
    free(m->initial_exact);
    free(m->renormalised_lines);
    bc_bigtab_free(m->big);
    free(m);
}

static const char *check_pairs(const bc_model *m)
{
    if (m->state_pair_start[0] != 0 || m->state_pair_start[m->n_states] != m->n_pairs)
        return "state_pair_start does not span the pairs";
    for (int32_t s = 0; s < m->n_states; s++) {
        int64_t a = m->state_pair_start[s], b = m->state_pair_start[s + 1];
        if (b < a)
            return "state_pair_start is not monotone";
        if (m->terminal[s] ? b != a : b == a)
            return "a terminal state has pairs, or a non-terminal state has none";
        for (int64_t p = a; p < b; p++) {
            if (m->pair_state[p] != s)
                return "pair_state disagrees with state_pair_start";
            if (m->pair_action[p] < 0 || m->pair_action[p] >= m->n_actions)
                return "pair_action out of range";
            if (p > a && m->pair_action[p] <= m->pair_action[p - 1])
                return "pairs of a state are not in increasing action order";
        }
    }
    return NULL;
}

const char *bc_model_check_invariants(const bc_model *m)
{
    if (!(m->discount > 0 && m->discount <= 1))
        return "discount outside (0, 1]";
    const char *why = check_pairs(m);
    if (why)
        return why;
    if (m->pair_trans_start[0] != 0 || m->pair_trans_start[m->n_pairs] != m->n_trans)
        return "pair_trans_start does not span the transitions";
    uint32_t n_values = bc_numtab_count(m->values);
    for (int64_t p = 0; p < m->n_pairs; p++)
        if (m->reward_id[p] >= n_values)
            return "a reward id is not in the table of values";
    for (int64_t t = 0; t < m->n_trans; t++)
        if (m->prob_id[t] >= n_values || (m->outcome_id && m->outcome_id[t] >= n_values))
            return "a probability or outcome id is not in the table of values";
    for (int64_t p = 0; p < m->n_pairs; p++) {
        int64_t a = m->pair_trans_start[p], b = m->pair_trans_start[p + 1];
        if (b <= a)
            return "a pair has no successor";
        double sum = 0;
        for (int64_t t = a; t < b; t++) {
            if (m->succ_state[t] < 0 || m->succ_state[t] >= m->n_states)
                return "succ_state out of range";
            if (!(m->prob[t] >= 0))
                return "a negative or NaN probability";
            sum += m->prob[t];
        }
        if (sum < 1 - 1e-9 || sum > 1 + 1e-9)
            return "the probabilities of a pair do not sum to 1";
    }
    return NULL;
}

bc_num bc_model_prob_exact(const bc_model *m, int64_t t)
{
    return bc_numtab_get(m->values, m->prob_id[t]);
}

bc_num bc_model_reward_exact(const bc_model *m, int64_t p)
{
    return bc_numtab_get(m->values, m->reward_id[p]);
}

bc_num bc_model_outcome_exact(const bc_model *m, int64_t t)
{
    return m->outcome_id ? bc_numtab_get(m->values, m->outcome_id[t]) : bc_num_int(0);
}

/* The id of x in m's table into *id; 0 or -1 if out of memory. */
static int set_id(bc_model *m, uint32_t *id, bc_num x)
{
    int64_t k = bc_numtab_intern(m->values, x);
    if (k < 0)
        return -1;
    *id = (uint32_t)k;
    return 0;
}

int bc_model_set_prob_exact(bc_model *m, int64_t t, bc_num x)
{
    return set_id(m, &m->prob_id[t], x);
}

int bc_model_set_reward_exact(bc_model *m, int64_t p, bc_num x)
{
    return set_id(m, &m->reward_id[p], x);
}

int bc_model_set_outcome_exact(bc_model *m, int64_t t, bc_num x)
{
    if (!m->outcome_id) {
        m->outcome_id = alloc_array(m->n_trans, sizeof *m->outcome_id); /* zeroed: every outcome 0 */
        if (!m->outcome_id)
            return -1;
    }
    return set_id(m, &m->outcome_id[t], x);
}

void bc_model_reward_mpq(const bc_model *m, int64_t p, mpq_t out)
{
    bc_num_to_mpq(out, bc_model_reward_exact(m, p), m->big);
    if (!m->outcome_id)
        return;
    mpq_t o, pr;
    mpq_init(o);
    mpq_init(pr);
    for (int64_t t = m->pair_trans_start[p]; t < m->pair_trans_start[p + 1]; t++) {
        bc_num x = bc_model_outcome_exact(m, t);
        if (bc_num_sign(x, m->big) == 0)
            continue;
        bc_num_to_mpq(o, x, m->big);
        bc_num_to_mpq(pr, bc_model_prob_exact(m, t), m->big);
        mpq_mul(o, o, pr);
        mpq_add(out, out, o);
    }
    mpq_clear(o);
    mpq_clear(pr);
}

int64_t bc_model_find_pair(const bc_model *m, int32_t s, int32_t a)
{
    if (s < 0 || s >= m->n_states)
        return -1;
    /* Pairs of a state are sorted by action: binary search. */
    int64_t lo = m->state_pair_start[s], hi = m->state_pair_start[s + 1];
    while (lo < hi) {
        int64_t mid = lo + (hi - lo) / 2;
        if (m->pair_action[mid] < a)
            lo = mid + 1;
        else
            hi = mid;
    }
    return lo < m->state_pair_start[s + 1] && m->pair_action[lo] == a ? lo : -1;
}

double bc_model_initial_value(const bc_model *m, const double *v)
{
    double sum = 0;
    for (int32_t s = 0; s < m->n_states; s++)
        if (m->initial[s] != 0)
            sum += m->initial[s] * v[s];
    return sum;
}

/* A transition counts as an edge when its exact probability is positive (a
 * probability too small for a double is still an edge). */
static int edge(const bc_model *m, int64_t t)
{
    return m->prob[t] > 0 || bc_num_sign(bc_model_prob_exact(m, t), m->big) > 0;
}

int bc_reverse_build(const bc_model *m, const uint8_t *use, bc_reverse *r)
{
    r->start = calloc((size_t)m->n_states + 1, sizeof *r->start);
    r->pair_of = malloc((size_t)(m->n_trans ? m->n_trans : 1) * sizeof *r->pair_of);
    if (!r->start || !r->pair_of) {
        bc_reverse_free(r);
        return -1;
    }
    for (int64_t p = 0; p < m->n_pairs; p++)
        for (int64_t k = m->pair_trans_start[p]; (!use || use[p]) && k < m->pair_trans_start[p + 1]; k++)
            if (edge(m, k))
                r->start[m->succ_state[k] + 1]++;
    for (int32_t t = 0; t < m->n_states; t++)
        r->start[t + 1] += r->start[t];
    /* Counting-sort fill with start[t] as a cursor, then shift back: the usual
     * transpose, which keeps pairs in increasing order. */
    for (int64_t p = 0; p < m->n_pairs; p++)
        for (int64_t k = m->pair_trans_start[p]; (!use || use[p]) && k < m->pair_trans_start[p + 1]; k++)
            if (edge(m, k))
                r->pair_of[r->start[m->succ_state[k]]++] = p;
    for (int32_t t = m->n_states; t > 0; t--)
        r->start[t] = r->start[t - 1];
    r->start[0] = 0;
    return 0;
}

void bc_reverse_free(bc_reverse *r)
{
    free(r->start);
    free(r->pair_of);
    r->start = NULL;
    r->pair_of = NULL;
}
