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

/* Terminal flags (new state order), errors for terminal states with lines and for dead ends. */
static uint8_t *terminal_and_dead_ends(bc_builder *b, const int32_t *inv_state, int32_t n_states)
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
    free(count);
    return term;
}

/* Pair order sorted by (state, action) in the new orders: order[k] = raw pair.
 * Two stable counting sorts (by action, then by state).  NULL if out of memory. */
static int64_t *sorted_pairs(const bc_builder *b, const int32_t *inv_state,
                             const int32_t *inv_action, int32_t n_states, int32_t n_actions,
                             int *identity)
{
    int64_t np = b->n_pairs;
    *identity = 1;
    for (int64_t p = 1; p < np && *identity; p++) {
        int32_t s0 = inv_state[b->p_state[p - 1]], s1 = inv_state[b->p_state[p]];
        if (s1 < s0 || (s1 == s0 && inv_action[b->p_action[p]] <= inv_action[b->p_action[p - 1]]))
            *identity = 0;
    }
    if (*identity)
        return NULL;
    int64_t *tmp = malloc((size_t)np * sizeof *tmp), *out = malloc((size_t)np * sizeof *out);
    int64_t n_keys = n_states > n_actions ? n_states : n_actions;
    int64_t *start = calloc((size_t)n_keys + 1, sizeof *start);
    if (!tmp || !out || !start) {
        free(tmp);
        free(out);
        free(start);
        return NULL;
    }
    for (int64_t p = 0; p < np; p++)
        start[inv_action[b->p_action[p]] + 1]++;
    for (int64_t a = 0; a < n_actions; a++)
        start[a + 1] += start[a];
    for (int64_t p = 0; p < np; p++)
        tmp[start[inv_action[b->p_action[p]]]++] = p;
    memset(start, 0, ((size_t)n_keys + 1) * sizeof *start);
    for (int64_t p = 0; p < np; p++)
        start[inv_state[b->p_state[p]] + 1]++;
    for (int64_t s = 0; s < n_states; s++)
        start[s + 1] += start[s];
    for (int64_t k = 0; k < np; k++) {
        int64_t p = tmp[k];
        out[start[inv_state[b->p_state[p]]]++] = p;
    }
    free(tmp);
    free(start);
    return out;
}

/* Reports pairs written twice (adjacent once sorted). */
static void duplicate_pairs(bc_builder *b, const int64_t *order)
{
    for (int64_t k = 1; k < b->n_pairs; k++) {
        int64_t p = order ? order[k] : k, q = order ? order[k - 1] : k - 1;
        if (b->p_state[p] == b->p_state[q] && b->p_action[p] == b->p_action[q]) {
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
    }
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

/* Moves (identity order) or copies the successors into the model, renaming states. */
static int fill_transitions(bc_builder *b, bc_model *m, const int64_t *order,
                            const int32_t *inv_state, int state_identity)
{
    int64_t nt = b->n_trans;
    if (!order) {
        free(m->succ_state);
        free(m->prob_exact);
        m->succ_state = b->t_succ;
        m->prob_exact = b->t_prob;
        m->outcome_exact = b->t_outcome;
        b->t_succ = NULL;
        b->t_prob = NULL;
        b->t_outcome = NULL;
        for (int64_t p = 0; p <= m->n_pairs; p++)
            m->pair_trans_start[p] = b->p_trans_start[p];
    } else {
        m->outcome_exact = b->t_outcome ? malloc((size_t)nt * sizeof(bc_num)) : NULL;
        if (b->t_outcome && !m->outcome_exact)
            return -1;
        int64_t t = 0;
        for (int64_t k = 0; k < m->n_pairs; k++) {
            int64_t p = order[k];
            m->pair_trans_start[k] = t;
            for (int64_t u = b->p_trans_start[p]; u < b->p_trans_start[p + 1]; u++, t++) {
                m->succ_state[t] = b->t_succ[u];
                m->prob_exact[t] = b->t_prob[u];
                if (m->outcome_exact)
                    m->outcome_exact[t] = b->t_outcome[u];
            }
        }
        m->pair_trans_start[m->n_pairs] = t;
    }
    if (!state_identity)
        for (int64_t t = 0; t < nt; t++)
            m->succ_state[t] = inv_state[m->succ_state[t]];
    free(m->prob);
    m->prob = malloc((size_t)(nt ? nt : 1) * sizeof *m->prob);
    if (!m->prob)
        return -1;
    for (int64_t t = 0; t < nt; t++)
        m->prob[t] = bc_num_to_double(m->prob_exact[t], m->big);
    return 0;
}

/* Fills the pair arrays (state, action, reward, line) in CSR order. */
static void fill_pairs(bc_builder *b, bc_model *m, const int64_t *order, const int32_t *inv_state,
                       const int32_t *inv_action)
{
    for (int64_t k = 0; k < m->n_pairs; k++) {
        int64_t p = order ? order[k] : k;
        m->pair_state[k] = inv_state[b->p_state[p]];
        m->pair_action[k] = inv_action[b->p_action[p]];
        m->reward_exact[k] = b->p_reward[p];
        m->pair_line[k] = b->p_line[p];
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
        if (m->outcome_exact)
            for (int64_t t = m->pair_trans_start[k]; t < m->pair_trans_start[k + 1] && !has_outcome; t++)
                has_outcome = bc_num_sign(m->outcome_exact[t], m->big) != 0;
        if (!has_outcome) {
            m->reward[k] = bc_num_to_double(m->reward_exact[k], m->big);
            continue;
        }
        bc_model_reward_mpq(m, k, r);
        m->reward[k] = bc_mpq_to_double(r);
    }
    mpq_clear(r);
}

/* "dir/dock-shuttle.bell" -> "dock-shuttle" (malloc'ed). */
static char *base_name(const char *path)
{
    const char *slash = strrchr(path, '/');
    const char *start = slash ? slash + 1 : path;
    const char *dot = strrchr(start, '.');
    size_t n = dot && dot > start ? (size_t)(dot - start) : strlen(start);
    return strndup(start, n);
}

/* Builds the model once every check has passed; NULL if out of memory. */
static bc_model *assemble(bc_builder *b, uint8_t *term, const int64_t *order,
                          const int32_t *perm_state, const int32_t *inv_state, int state_identity,
                          const int32_t *perm_action, const int32_t *inv_action,
                          int action_identity, const char *default_name)
{
    int32_t ns = bc_names_count(b->states.names), na = bc_names_count(b->actions.names);
    bc_model *m = bc_model_alloc(ns, na, b->n_pairs, order ? b->n_trans : 0);
    if (!m) {
        free(term);
        return NULL;
    }
    /* The model takes the builder's big numbers: every bc_num read so far points into it. */
    bc_bigtab_free(m->big);
    m->big = b->big;
    b->big = NULL;
    free(m->terminal);
    m->terminal = term;
    m->n_trans = b->n_trans;
    m->name = b->label ? strdup(b->label) : default_name ? strdup(default_name) : base_name(b->file);
    m->pair_line = malloc((size_t)(b->n_pairs ? b->n_pairs : 1) * sizeof *m->pair_line);
    m->state_names = state_identity ? b->states.names : bc_names_permuted(b->states.names, perm_state);
    if (state_identity)
        b->states.names = NULL;
    m->action_names =
        action_identity ? b->actions.names : bc_names_permuted(b->actions.names, perm_action);
    if (action_identity)
        b->actions.names = NULL;
    if (!m->name || !m->pair_line || !m->state_names || !m->action_names ||
        fill_transitions(b, m, order, inv_state, state_identity) < 0) {
        bc_model_free(m);
        return NULL;
    }
    fill_pairs(b, m, order, inv_state, inv_action);
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

bc_model *bc_builder_finish(bc_builder *b, const char *default_name)
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
    int sid = 1, aid = 1, pid = 1;
    int32_t *perm_s = name_order(b, &b->states, "state", BC_DIR_STATES, &sid);
    int32_t *perm_a = name_order(b, &b->actions, "action", BC_DIR_ACTIONS, &aid);
    int32_t *inv_s = perm_s ? inverse(perm_s, ns) : NULL;
    int32_t *inv_a = perm_a ? inverse(perm_a, na) : NULL;
    uint8_t *term = NULL;
    int64_t *order = NULL;
    bc_model *m = NULL;
    if (!inv_s || !inv_a || b->n_errors)
        goto done;
    term = terminal_and_dead_ends(b, inv_s, ns);
    if (!term)
        goto done;
    order = sorted_pairs(b, inv_s, inv_a, ns, na, &pid);
    if (!pid && !order) {
        bc__builder_report(b, BC_ERROR, nowhere, "out of memory");
        goto done;
    }
    duplicate_pairs(b, order);
    if (b->n_pairs == 0 && ns > 0)
        bc__builder_report(b, BC_ERROR, nowhere,
                           "the model has no transition lines: every state is terminal, so "
                           "there is nothing to decide");
    if (b->n_errors)
        goto done;
    m = assemble(b, term, order, perm_s, inv_s, sid, perm_a, inv_a, aid, default_name);
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
    free(order);
    free(perm_s);
    free(perm_a);
    free(inv_s);
    free(inv_a);
    bc_builder_free(b);
    return m;
}
