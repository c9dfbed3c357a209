/* builder_finish.c — the builder's last step: orders, format checks, and the CSR model. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#include "bellcheck.h"
#include "builder_internal.h"

#include <assert.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* Final order of a name set: perm[new] = old index.  With a declaration line,
 * every name must be in it; otherwise the order is that of first appearance. */
static int32_t *name_order(bc_builder *b, bc_nameset *ns, const char *kind, bc_directive dir,
                           int *identity)
{
    int32_t n = bc_names_count(ns->names);
    int32_t *perm = malloc((size_t)(n ? n : 1) * sizeof *perm);
    if (!perm) {
        bc__builder_report(b, BC_ERROR, (bc_pos){0, 0, NULL}, "out of memory");
        return NULL;
    }
    *identity = 1;
    if (!b->seen_flag[dir]) {
        for (int32_t i = 0; i < n; i++)
            perm[i] = i;
        return perm;
    }
    int ok = 1;
    for (int32_t i = 0; i < n; i++) {
        if (!ns->declared[i]) {
            bc_pos at = {ns->first[i].line, ns->first[i].col, NULL};
            bc__builder_report(b, BC_ERROR, at,
                               "%s `%s` is not listed in the `%ss` line (line %d), which fixes "
                               "the %ss",
                               kind, bc_names_get(ns->names, i), kind, (int)b->seen[dir].line,
                               kind);
            ok = 0;
        }
    }
    if (!ok) {
        free(perm);
        return NULL;
    }
    assert(ns->n_order == n);
    for (int32_t k = 0; k < n; k++) {
        perm[k] = ns->order[k];
        if (perm[k] != k)
            *identity = 0;
    }
    return perm;
}

static int32_t *inverse(const int32_t *perm, int32_t n)
{
    int32_t *inv = malloc((size_t)(n ? n : 1) * sizeof *inv);
    if (inv)
        for (int32_t k = 0; k < n; k++)
            inv[perm[k]] = k;
    return inv;
}

/* Terminal flags (new state order), errors for terminal states with lines and
 * for dead ends; the pairs of each state (new order) into *counts. */
static uint8_t *terminal_and_dead_ends(bc_builder *b, const int32_t *inv_state, int32_t n_states,
                                       int64_t **counts)
{
    uint8_t *term = calloc((size_t)(n_states ? n_states : 1), 1);
    int64_t *count = calloc((size_t)(n_states ? n_states : 1), sizeof *count);
    if (!term || !count) {
        free(term);
        free(count);
        bc__builder_report(b, BC_ERROR, (bc_pos){0, 0, NULL}, "out of memory");
        return NULL;
    }
    for (int64_t k = 0; k < b->n_terminal; k++)
        term[inv_state[b->terminal_at[k].state]] = 1;
    for (int64_t p = 0; p < b->n_pairs; p++) {
        int32_t s = inv_state[b->p_state[p]];
        count[s]++;
        if (term[s] && count[s] == 1) {
            char where[48]; /* for sources without lines */
            snprintf(where, sizeof where, "transitions[%lld]", (long long)p);
            bc__builder_report(b, BC_ERROR,
                               (bc_pos){b->p_line[p], b->p_col[p], b->p_line[p] > 0 ? NULL : where},
                               "state `%s` is declared terminal, so it cannot have transition "
                               "lines",
                               bc_names_get(b->states.names, b->p_state[p]));
        }
    }
    int32_t dead = 0;
    for (int32_t s = 0; s < n_states; s++)
        if (!term[s] && count[s] == 0)
            dead++;
    if (dead) {
        int32_t shown = 0;
        for (int32_t old = 0; old < n_states && shown < 10; old++) {
            int32_t s = inv_state[old];
            if (term[s] || count[s])
                continue;
            shown++;
            bc_pos at = {b->states.first[old].line, b->states.first[old].col, NULL};
            bc__builder_report(b, BC_ERROR, at,
                               "state `%s` has no transition line (a dead end); if it is "
                               "absorbing, declare it with `terminal %s`",
                               bc_names_get(b->states.names, old),
                               bc_names_get(b->states.names, old));
        }
        if (dead > shown)
            bc__builder_report(b, BC_ERROR, (bc_pos){0, 0, NULL},
                               "%d dead-end states in all (%d shown)", (int)dead, (int)shown);
    }
    *counts = count;
    return term;
}

typedef struct {
    int32_t action; /* in the new order */
    int64_t pair;   /* raw index: ties keep input order */
} action_key;

static int cmp_action_key(const void *x, const void *y)
{
    const action_key *a = x, *b = y;
    if (a->action != b->action)
        return a->action < b->action ? -1 : 1;
    return (a->pair > b->pair) - (a->pair < b->pair);
}

/* Sorts the raw pairs g[0..n) of one state, with their actions act[0..n),
 * by action, stably; 0 or -1 (out of memory). */
static int sort_by_action(int64_t *g, int32_t *act, int64_t n)
{
    int64_t k = 1;
    while (k < n && act[k - 1] < act[k])
        k++;
    if (k >= n)
        return 0; /* the usual case: written in action order */
    action_key *key = malloc((size_t)n * sizeof *key);
    if (!key)
        return -1;
    for (k = 0; k < n; k++)
        key[k] = (action_key){act[k], g[k]};
    qsort(key, (size_t)n, sizeof *key, cmp_action_key);
    for (k = 0; k < n; k++)
        g[k] = key[k].pair, act[k] = key[k].action;
    free(key);
    return 0;
}

/* The pairs in model order, when that is not the input order. */
typedef struct {
    int64_t *order; /* [n_pairs] order[k] = the raw pair that becomes pair k */
    int32_t *act;   /* [n_pairs] its action, new order */
    int64_t *end;   /* [n_states] the end of state s's pairs in order */
} pair_sort;

static void pair_sort_free(pair_sort *ps)
{
    free(ps->order), free(ps->act), free(ps->end);
    ps->order = NULL, ps->act = NULL, ps->end = NULL;
}

/* 1 when the raw pairs are already sorted by (state, action) in the new orders. */
static int in_model_order(const bc_builder *b, const int32_t *inv_state, const int32_t *inv_action)
{
    for (int64_t p = 1; p < b->n_pairs; p++) {
        int32_t s0 = inv_state[b->p_state[p - 1]], s1 = inv_state[b->p_state[p]];
        if (s1 < s0 || (s1 == s0 && inv_action[b->p_action[p]] <= inv_action[b->p_action[p - 1]]))
            return 0;
    }
    return 1;
}

/* Pair order sorted by (state, action) in the new orders, ties in input
 * order: a stable counting sort by state (counts: pairs per state), then
 * each state's pairs by action.  0, or -1 if out of memory. */
static int sorted_pairs(const bc_builder *b, const int32_t *inv_state, const int32_t *inv_action,
                        int32_t n_states, const int64_t *counts, pair_sort *ps)
{
    int64_t np = b->n_pairs;
    ps->order = malloc((size_t)(np ? np : 1) * sizeof *ps->order);
    ps->act = malloc((size_t)(np ? np : 1) * sizeof *ps->act);
    ps->end = malloc((size_t)(n_states ? n_states : 1) * sizeof *ps->end);
    if (!ps->order || !ps->act || !ps->end) {
        pair_sort_free(ps);
        return -1;
    }
    int64_t *next = ps->end; /* first where each state's next pair goes, then its end */
    for (int64_t s = 0, at = 0; s < n_states; s++)
        next[s] = at, at += counts[s];
    for (int64_t p = 0; p < np; p++)
        ps->order[next[inv_state[b->p_state[p]]]++] = p;
    /* The actions in that order, fetched ahead: the raw pairs of a state are far apart. */
    for (int64_t k = 0; k < np; k++) {
        if (k + 16 < np)
            __builtin_prefetch(&b->p_action[ps->order[k + 16]]);
        ps->act[k] = inv_action[b->p_action[ps->order[k]]];
    }
    for (int64_t s = 0, lo = 0; s < n_states; lo = next[s++])
        if (sort_by_action(ps->order + lo, ps->act + lo, next[s] - lo) < 0) {
            pair_sort_free(ps);
            return -1;
        }
    return 0;
}

/* Reports raw pair p, which repeats raw pair q (the same state and action). */
static void duplicate_pair(bc_builder *b, int64_t p, int64_t q)
{
    int64_t later = p > q ? p : q, earlier = p > q ? q : p;
    /* Sources without lines (JSON) number their pairs in input order,
     * which is the raw pair index. */
    char where[48], first[48];
    snprintf(where, sizeof where, "transitions[%lld]", (long long)later);
    if (b->p_line[earlier] > 0)
        snprintf(first, sizeof first, "line %d", (int)b->p_line[earlier]);
    else
        snprintf(first, sizeof first, "transitions[%lld]", (long long)earlier);
    bc_pos at = {b->p_line[later], b->p_col[later], b->p_line[later] > 0 ? NULL : where};
    bc__builder_report(b, BC_ERROR, at,
                       "state `%s` action `%s` already has a line (%s); a pair "
                       "appears on at most one line",
                       bc_names_get(b->states.names, b->p_state[p]),
                       bc_names_get(b->actions.names, b->p_action[p]), first);
}

/* Reports pairs written twice (adjacent once sorted; ps->order NULL: in input order). */
static void duplicate_pairs(bc_builder *b, const pair_sort *ps, int32_t n_states)
{
    if (!ps->order) {
        for (int64_t k = 1; k < b->n_pairs; k++)
            if (b->p_state[k] == b->p_state[k - 1] && b->p_action[k] == b->p_action[k - 1])
                duplicate_pair(b, k, k - 1);
        return;
    }
    for (int64_t s = 0, lo = 0; s < n_states; lo = ps->end[s++])
        for (int64_t k = lo + 1; k < ps->end[s]; k++)
            if (ps->act[k] == ps->act[k - 1])
                duplicate_pair(b, ps->order[k], ps->order[k - 1]);
}

/* Fills the model's initial distribution (default: uniform over non-terminal states). */
static int fill_initial(bc_builder *b, bc_model *m, const int32_t *inv_state)
{
    if (b->seen_flag[BC_DIR_INITIAL]) {
        m->initial_given = 1;
        m->initial_renormalised_line = b->init_renorm_line;
        for (int64_t k = 0; k < b->n_init; k++)
            m->initial_exact[inv_state[b->init_state[k]]] = b->init_prob[k];
    } else {
        int64_t live = 0;
        for (int32_t s = 0; s < m->n_states; s++)
            live += !m->terminal[s];
        if (live == 0)
            return bc__builder_report(b, BC_ERROR, (bc_pos){0, 0, NULL},
                                      "every state is terminal: there is nothing to decide");
        bc_num share = {1, live};
        for (int32_t s = 0; s < m->n_states; s++)
            if (!m->terminal[s])
                m->initial_exact[s] = share;
    }
    for (int32_t s = 0; s < m->n_states; s++)
        m->initial[s] = bc_num_to_double(m->initial_exact[s], m->big);
    return 0;
}

/* Hands the builder's raw array *from to the model, shrunk to n elements of
 * size sz (glibc shrinks a large block in place), and clears *from: in input
 * order the raw arrays are the model's, and copying them would hold both. */
static void *take(void **from, int64_t n, size_t sz)
{
    void *p = *from, *q = realloc(p, n ? (size_t)n * sz : 1);
    *from = NULL;
    return q ? q : p;
}

/* Frees what *slot holds and puts p there. */
static void replace(void *slot, void *p)
{
    void **s = slot;
    free(*s);
    *s = p;
}

/* The double nearest each distinct value, by id; NULL if out of memory. */
static double *value_doubles(const bc_model *m)
{
    uint32_t n = bc_numtab_count(m->values);
    const bc_num *v = bc_numtab_values(m->values);
    double *d = malloc((size_t)(n ? n : 1) * sizeof *d);
    if (d)
        for (uint32_t k = 0; k < n; k++)
            d[k] = bc_num_to_double(v[k], m->big);
    return d;
}

/* How many pairs ahead the gathers below prefetch: the raw pairs of one
 * state are far apart when states are numbered by first appearance. */
#define AHEAD 16

/* dst, in model pair order, from the raw per-transition array src (32-bit
 * elements); then frees src.  raw_start: the builder's p_trans_start. */
static void gather_trans(uint32_t *dst, uint32_t *src, const int64_t *raw_start,
                         const int64_t *order, int64_t np)
{
    int64_t t = 0;
    for (int64_t k = 0; k < np; k++) {
        if (k + 2 * AHEAD < np)
            __builtin_prefetch(&raw_start[order[k + 2 * AHEAD]]);
        if (k + AHEAD < np)
            __builtin_prefetch(&src[raw_start[order[k + AHEAD]]]);
        int64_t p = order[k];
        for (int64_t u = raw_start[p]; u < raw_start[p + 1]; u++)
            dst[t++] = src[u];
    }
    free(src);
}

/* Copies the successors into the model in the pair order `order` (raw pair
 * of each model pair), one array at a time, freeing each raw array once it
 * is copied: the reading holds at most one array twice. */
static int copy_transitions(bc_builder *b, bc_model *m, const int64_t *order)
{
    size_t zt = (size_t)(b->n_trans ? b->n_trans : 1);
    const int64_t *rs = b->p_trans_start;
    replace(&m->pair_trans_start, malloc(((size_t)m->n_pairs + 1) * sizeof *m->pair_trans_start));
    if (!m->pair_trans_start)
        return -1;
    int64_t t = 0;
    for (int64_t k = 0; k < m->n_pairs; k++) {
        if (k + AHEAD < m->n_pairs)
            __builtin_prefetch(&rs[order[k + AHEAD]]);
        m->pair_trans_start[k] = t;
        t += rs[order[k] + 1] - rs[order[k]];
    }
    m->pair_trans_start[m->n_pairs] = t;
    replace(&m->succ_state, malloc(zt * sizeof *m->succ_state));
    if (!m->succ_state)
        return -1;
    gather_trans((uint32_t *)m->succ_state, (uint32_t *)b->t_succ, rs, order, m->n_pairs);
    b->t_succ = NULL;
    replace(&m->prob_id, malloc(zt * sizeof *m->prob_id));
    if (!m->prob_id)
        return -1;
    gather_trans(m->prob_id, b->t_prob, rs, order, m->n_pairs);
    b->t_prob = NULL;
    if (b->t_outcome) {
        m->outcome_id = malloc(zt * sizeof *m->outcome_id);
        if (!m->outcome_id)
            return -1;
        gather_trans(m->outcome_id, b->t_outcome, rs, order, m->n_pairs);
        b->t_outcome = NULL;
    }
    return 0;
}

/* Moves (identity order) or copies the successors into the model, renaming
 * states. */
static int place_transitions(bc_builder *b, bc_model *m, const int64_t *order,
                             const int32_t *inv_state, int state_identity)
{
    int64_t nt = b->n_trans;
    if (!order) {
        replace(&m->succ_state, take((void **)&b->t_succ, nt, sizeof *b->t_succ));
        replace(&m->prob_id, take((void **)&b->t_prob, nt, sizeof *b->t_prob));
        if (b->t_outcome)
            m->outcome_id = take((void **)&b->t_outcome, nt, sizeof *b->t_outcome);
        replace(&m->pair_trans_start,
                take((void **)&b->p_trans_start, m->n_pairs + 1, sizeof *b->p_trans_start));
    } else if (copy_transitions(b, m, order) < 0) {
        return -1;
    }
    /* The raw arrays are no longer needed: free them before the doubles come. */
    free(b->t_succ), free(b->t_prob), free(b->t_outcome), free(b->p_trans_start);
    b->t_succ = NULL, b->t_prob = NULL, b->t_outcome = NULL, b->p_trans_start = NULL;
    if (!state_identity)
        for (int64_t t = 0; t < nt; t++)
            m->succ_state[t] = inv_state[m->succ_state[t]];
    return 0;
}

/* The probabilities as doubles (dv: by value id). */
static int fill_probs(bc_model *m, const double *dv)
{
    replace(&m->prob, malloc((size_t)(m->n_trans ? m->n_trans : 1) * sizeof *m->prob));
    if (!m->prob)
        return -1;
    for (int64_t t = 0; t < m->n_trans; t++)
        m->prob[t] = dv[m->prob_id[t]];
    return 0;
}

/* The raw per-pair array *src (32-bit elements) in model pair order, in a
 * new array; frees *src.  NULL if out of memory (then *src is kept). */
static void *gather_pairs(void *src_slot, const int64_t *order, int64_t np)
{
    uint32_t **src = src_slot;
    uint32_t *dst = malloc((size_t)(np ? np : 1) * sizeof *dst);
    if (!dst)
        return NULL;
    for (int64_t k = 0; k < np; k++) {
        if (k + AHEAD < np)
            __builtin_prefetch(&(*src)[order[k + AHEAD]]);
        dst[k] = (*src)[order[k]];
    }
    free(*src);
    *src = NULL;
    return dst;
}

/* Moves (identity order) or copies the raw pair arrays into the model. */
static int take_pairs(bc_builder *b, bc_model *m, const int64_t *order)
{
    int64_t np = m->n_pairs;
    if (!order) {
        replace(&m->pair_state, take((void **)&b->p_state, np, sizeof *b->p_state));
        replace(&m->pair_action, take((void **)&b->p_action, np, sizeof *b->p_action));
        replace(&m->reward_id, take((void **)&b->p_reward, np, sizeof *b->p_reward));
        m->pair_line = take((void **)&b->p_line, np, sizeof *b->p_line);
        return 0;
    }
    replace(&m->pair_state, gather_pairs(&b->p_state, order, np));
    replace(&m->pair_action, gather_pairs(&b->p_action, order, np));
    replace(&m->reward_id, gather_pairs(&b->p_reward, order, np));
    m->pair_line = gather_pairs(&b->p_line, order, np);
    return m->pair_state && m->pair_action && m->reward_id && m->pair_line ? 0 : -1;
}

/* Fills the pair arrays (state, action, reward, line) in CSR order, renaming
 * states and actions (inv_*: old index to new), and the expected rewards. */
static int fill_pairs(bc_builder *b, bc_model *m, const int64_t *order, const int32_t *inv_state,
                      const int32_t *inv_action, const double *dv)
{
    if (take_pairs(b, m, order) < 0)
        return -1;
    replace(&m->reward, malloc((size_t)(m->n_pairs ? m->n_pairs : 1) * sizeof *m->reward));
    if (!m->reward)
        return -1;
    for (int64_t k = 0; k < m->n_pairs; k++) {
        m->pair_state[k] = inv_state[m->pair_state[k]];
        m->pair_action[k] = inv_action[m->pair_action[k]];
        m->state_pair_start[m->pair_state[k] + 1]++;
    }
    for (int32_t s = 0; s < m->n_states; s++)
        m->state_pair_start[s + 1] += m->state_pair_start[s];
    /* The expected reward is summed exactly and rounded once: summing doubles
     * can cancel catastrophically (1e20 - 1e20 must give 0, not 16384). */
    mpq_t r;
    mpq_init(r);
    for (int64_t k = 0; k < m->n_pairs; k++) {
        int has_outcome = 0;
        if (m->outcome_id)
            for (int64_t t = m->pair_trans_start[k]; t < m->pair_trans_start[k + 1] && !has_outcome; t++)
                has_outcome = bc_num_sign(bc_model_outcome_exact(m, t), m->big) != 0;
        if (!has_outcome) {
            m->reward[k] = dv[m->reward_id[k]];
            continue;
        }
        bc_model_reward_mpq(m, k, r);
        m->reward[k] = bc_mpq_to_double(r);
    }
    mpq_clear(r);
    return 0;
}

/* "dir/dock-shuttle.bell" -> "dock-shuttle" (malloc'ed). */
static char *base_name(const char *path)
{
    const char *slash = strrchr(path, '/');
    const char *start = slash ? slash + 1 : path;
    const char *dot = strrchr(start, '.');
    size_t n = dot && dot > start ? (size_t)(dot - start) : strlen(start);
    return bc_utf8_copy(start, n); /* a label is UTF-8 text: other bytes of a file name become U+FFFD */
}

/* Builds the model once every check has passed; NULL if out of memory.
 * The builder's raw arrays move into the model (input order) or are freed
 * as soon as they are copied, so the reading never holds two copies; the
 * doubles, which have no raw form, come last.  Frees *order. */
static bc_model *assemble(bc_builder *b, uint8_t *term, int64_t **order,
                          const int32_t *perm_state, const int32_t *inv_state, int state_identity,
                          const int32_t *perm_action, const int32_t *inv_action,
                          int action_identity)
{
    int32_t ns = bc_names_count(b->states.names), na = bc_names_count(b->actions.names);
    bc_model *m = bc_model_alloc(ns, na, 0, 0); /* pair and transition arrays come below */
    if (!m) {
        free(term);
        return NULL;
    }
    m->n_pairs = b->n_pairs;
    m->n_trans = b->n_trans;
    /* The model takes the builder's numbers: every id and bc_num read so far points into them. */
    replace(&m->terminal, term);
    bc_bigtab_free(m->big);
    m->big = b->big;
    b->big = NULL;
    bc_numtab_free(m->values);
    m->values = b->values;
    b->values = NULL;
    m->name = b->label ? strdup(b->label) : base_name(b->file);
    m->state_names = state_identity ? b->states.names : bc_names_permuted(b->states.names, perm_state);
    if (state_identity)
        b->states.names = NULL;
    m->action_names =
        action_identity ? b->actions.names : bc_names_permuted(b->actions.names, perm_action);
    if (action_identity)
        b->actions.names = NULL;
    double *dv = value_doubles(m);
    int ok = m->name && m->state_names && m->action_names && dv &&
             place_transitions(b, m, *order, inv_state, state_identity) == 0 &&
             fill_pairs(b, m, *order, inv_state, inv_action, dv) == 0;
    free(*order);
    *order = NULL;
    ok = ok && fill_probs(m, dv) == 0;
    free(dv);
    bc_numtab_compact(m->values); /* the reading is over: no more lookups by value */
    if (!ok) {
        bc_model_free(m);
        return NULL;
    }
    m->discount_exact = b->discount;
    m->discount = bc_num_to_double(b->discount, m->big);
    m->objective = b->objective;
    m->horizon = b->horizon;
    if (b->n_renorm) {
        m->renormalised_lines = malloc((size_t)b->n_renorm * sizeof(int32_t));
        if (!m->renormalised_lines) {
            bc_model_free(m);
            return NULL;
        }
        memcpy(m->renormalised_lines, b->renorm_lines, (size_t)b->n_renorm * sizeof(int32_t));
        m->n_renormalised = (int32_t)b->n_renorm;
    }
    return m;
}

bc_model *bc_builder_finish(bc_builder *b)
{
    assert(!b->pair_open);
    bc_pos nowhere = {0, 0, NULL};
    if (!b->seen_flag[BC_DIR_DISCOUNT])
        bc__builder_report(b, BC_ERROR, nowhere,
                           "no `discount` line: the discount factor is required "
                           "(0 < discount <= 1)");
    int32_t ns = bc_names_count(b->states.names), na = bc_names_count(b->actions.names);
    if (ns == 0)
        bc__builder_report(b, BC_ERROR, nowhere, "the model has no states");
    int sid = 1, aid = 1;
    int32_t *perm_s = name_order(b, &b->states, "state", BC_DIR_STATES, &sid);
    int32_t *perm_a = name_order(b, &b->actions, "action", BC_DIR_ACTIONS, &aid);
    int32_t *inv_s = perm_s ? inverse(perm_s, ns) : NULL;
    int32_t *inv_a = perm_a ? inverse(perm_a, na) : NULL;
    uint8_t *term = NULL;
    int64_t *counts = NULL;
    pair_sort ps = {NULL, NULL, NULL};
    bc_model *m = NULL;
    if (!inv_s || !inv_a || b->n_errors)
        goto done;
    term = terminal_and_dead_ends(b, inv_s, ns, &counts);
    if (!term)
        goto done;
    if (!in_model_order(b, inv_s, inv_a) && sorted_pairs(b, inv_s, inv_a, ns, counts, &ps) < 0) {
        bc__builder_report(b, BC_ERROR, nowhere, "out of memory");
        goto done;
    }
    free(counts);
    counts = NULL;
    duplicate_pairs(b, &ps, ns);
    free(ps.act), free(ps.end); /* the order alone is needed from here on */
    ps.act = NULL, ps.end = NULL;
    if (b->n_pairs == 0 && ns > 0)
        bc__builder_report(b, BC_ERROR, nowhere,
                           "the model has no transition lines: every state is terminal, so "
                           "there is nothing to decide");
    if (b->n_errors)
        goto done;
    free(b->p_col); /* columns served the messages above; the model keeps lines only */
    b->p_col = NULL;
    m = assemble(b, term, &ps.order, perm_s, inv_s, sid, perm_a, inv_a, aid);
    term = NULL; /* owned by the model now (or freed with it) */
    if (!m) {
        bc__builder_report(b, BC_ERROR, nowhere, "out of memory while building the model");
        goto done;
    }
    if (fill_initial(b, m, inv_s) < 0) {
        bc_model_free(m);
        m = NULL;
    }
done:
    free(term);
    free(counts);
    pair_sort_free(&ps);
    free(perm_s);
    free(perm_a);
    free(inv_s);
    free(inv_a);
    bc_builder_free(b);
    return m;
}
