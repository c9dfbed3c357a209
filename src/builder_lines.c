/* builder_lines.c — the builder's list directives (states, actions, terminal, initial) and transition lines. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#include "bellcheck.h"
#include "builder_internal.h"

#include <assert.h>
#include <stdlib.h>
#include <string.h>

int bc_builder_states_begin(bc_builder *b, bc_pos at)
{
    b->list = BC_LIST_STATES;
    return bc__directive_once(b, BC_DIR_STATES, "states", at);
}

int bc_builder_actions_begin(bc_builder *b, bc_pos at)
{
    b->list = BC_LIST_ACTIONS;
    return bc__directive_once(b, BC_DIR_ACTIONS, "actions", at);
}

int bc_builder_terminal_begin(bc_builder *b, bc_pos at)
{
    b->list = BC_LIST_TERMINAL;
    return bc__directive_once(b, BC_DIR_TERMINAL, "terminal", at);
}

/* Adds a name to the declaration order of a name set; a repeat is an error. */
static int declare(bc_builder *b, bc_nameset *ns, const char *kind, const char *name, size_t len,
                   bc_pos at)
{
    int32_t idx = ns == &b->states ? bc_builder_state(b, name, len, at)
                                   : bc_builder_action(b, name, len, at);
    if (idx < 0)
        return -1;
    if (ns->declared[idx])
        return bc__builder_report(b, BC_ERROR, at, "%s `%.*s` is listed twice", kind, (int)len,
                                  name);
    if (bc__grow((void **)&ns->order, &ns->cap_order, ns->n_order + 1, sizeof *ns->order) < 0)
        return bc__builder_report(b, BC_ERROR, at, "out of memory");
    ns->order[ns->n_order++] = idx;
    ns->declared[idx] = (int32_t)ns->n_order;
    return 0;
}

int bc_builder_list_add(bc_builder *b, const char *name, size_t len, bc_pos at)
{
    switch (b->list) {
    case BC_LIST_STATES:
        return declare(b, &b->states, "state", name, len, at);
    case BC_LIST_ACTIONS:
        return declare(b, &b->actions, "action", name, len, at);
    case BC_LIST_TERMINAL: {
        int32_t s = bc_builder_state(b, name, len, at);
        if (s < 0)
            return -1;
        if (b->states.listed[s] & BC_LISTED_TERMINAL)
            return bc__builder_report(b, BC_ERROR, at, "terminal state `%.*s` is listed twice",
                                      (int)len, name);
        b->states.listed[s] |= BC_LISTED_TERMINAL;
        if (bc__grow((void **)&b->terminal_at, &b->cap_terminal, b->n_terminal + 1,
                     sizeof *b->terminal_at) < 0)
            return bc__builder_report(b, BC_ERROR, at, "out of memory");
        bc_terminal_entry *e = &b->terminal_at[b->n_terminal++];
        e->state = s;
        e->at.line = at.line;
        e->at.col = at.col;
        return 0;
    }
    default:
        assert(!"bc_builder_list_add outside a list");
        return -1;
    }
}

int bc_builder_list_end(bc_builder *b, bc_pos at)
{
    (void)at;
    b->list = BC_LIST_NONE;
    return 0;
}

int bc_builder_initial_begin(bc_builder *b, bc_pos at)
{
    b->init_at.line = at.line;
    b->init_at.col = at.col;
    return bc__directive_once(b, BC_DIR_INITIAL, "initial", at);
}

int bc_builder_initial_add(bc_builder *b, const char *name, size_t len, const bc_num *p, bc_pos at)
{
    int32_t s = bc_builder_state(b, name, len, at);
    if (s < 0)
        return -1;
    if (b->states.listed[s] & BC_LISTED_INITIAL)
        return bc__builder_report(b, BC_ERROR, at, "state `%.*s` appears twice in `initial`",
                                  (int)len, name);
    b->states.listed[s] |= BC_LISTED_INITIAL;
    if (p && bc_num_sign(*p, b->big) < 0) { /* the text reader refuses it itself; JSON comes here */
        char *text = bc_num_text(*p, b->big);
        bc__builder_report(b, BC_ERROR, at, "a probability must not be negative: `%s` (state `%.*s` in "
                           "`initial`)", text ? bc__abbrev(text) : "?", (int)len, name);
        free(text);
        return -1;
    }
    if (b->n_init == b->cap_init) {
        int64_t cap = b->cap_init ? 2 * b->cap_init : 16;
        if (bc__resize((void **)&b->init_state, b->cap_init, cap, sizeof *b->init_state) < 0 ||
            bc__resize((void **)&b->init_prob, b->cap_init, cap, sizeof *b->init_prob) < 0 ||
            bc__resize((void **)&b->init_has_prob, b->cap_init, cap, sizeof *b->init_has_prob) < 0)
            return bc__builder_report(b, BC_ERROR, at, "out of memory");
        b->cap_init = cap;
    }
    b->init_state[b->n_init] = s;
    b->init_prob[b->n_init] = p ? *p : bc_num_int(1);
    b->init_has_prob[b->n_init] = p != NULL;
    b->n_init++;
    return 0;
}

int bc_builder_initial_end(bc_builder *b, bc_pos at)
{
    if (b->n_init == 0)
        return bc__builder_report(b, BC_ERROR, at, "`initial` needs at least one state");
    for (int64_t k = 0; k < b->n_init; k++)
        if (!b->init_has_prob[k] && b->n_init > 1)
            return bc__builder_report(
                b, BC_ERROR, at,
                "`initial` lists several states, so each needs a probability (state `%s`)",
                bc_names_get(b->states.names, b->init_state[k]));
    int renorm = 0;
    int rc = bc__check_distribution(b, b->init_prob, b->n_init, at, "the `initial` probabilities",
                                    &renorm);
    if (renorm)
        b->init_renorm_line = at.line > 0 ? at.line : -1;
    return rc;
}

/* ---- transition lines ---------------------------------------------------- */

/* Reallocates *arr to new_cap elements of size sz without zeroing the new
 * part: the raw arrays are written before they are read, and zeroing them
 * would touch every page twice.  0 or -1. */
static int grow_raw(void **arr, int64_t new_cap, size_t sz)
{
    if (new_cap < 0 || (uint64_t)new_cap > SIZE_MAX / sz)
        return -1;
    void *p = realloc(*arr, new_cap ? (size_t)new_cap * sz : 1);
    if (!p)
        return -1;
    *arr = p;
    return 0;
}

/* --max-memory (docs/limits.md), when the raw arrays are about to double:
 * a model of twice the pairs and transitions held so far needs at least
 * bc_model_bytes_min of them.  1 after reporting a refusal (once). */
static int over_limit(bc_builder *b, bc_pos at)
{
    char what[200], msg[400];
    if (b->over_limit)
        return 1;
    int64_t pairs = 2 * (b->n_pairs + 1), trans = 2 * (b->n_trans + 1);
    snprintf(what, sizeof what, "growing the model to %lld state-action pairs and %lld transitions",
             (long long)pairs, (long long)trans);
    uint64_t bytes = bc_model_bytes_min(bc_names_count(b->states.names), pairs, trans);
    if (!bc_memory_refused(b->diag->max_memory, bytes, what, msg, sizeof msg))
        return 0;
    b->over_limit = 1;
    return bc__builder_report(b, BC_ERROR, at, "%s", msg), 1;
}

/* Makes room for one more raw pair. */
static int reserve_pair(bc_builder *b)
{
    if (b->n_pairs + 1 < b->cap_pairs)
        return 0;
    int64_t cap = b->cap_pairs ? 2 * b->cap_pairs : 4096;
    if (grow_raw((void **)&b->p_state, cap, sizeof *b->p_state) < 0 ||
        grow_raw((void **)&b->p_action, cap, sizeof *b->p_action) < 0 ||
        grow_raw((void **)&b->p_line, cap, sizeof *b->p_line) < 0 ||
        grow_raw((void **)&b->p_col, cap, sizeof *b->p_col) < 0 ||
        grow_raw((void **)&b->p_reward, cap, sizeof *b->p_reward) < 0 ||
        grow_raw((void **)&b->p_trans_start, cap, sizeof *b->p_trans_start) < 0)
        return -1;
    b->cap_pairs = cap;
    return 0;
}

int bc_builder_pair_begin_id(bc_builder *b, const char *state, size_t slen, bc_pos state_at,
                             const char *action, size_t alen, bc_pos action_at, uint32_t reward_id)
{
    assert(!b->pair_open);
    int32_t s = bc_builder_state(b, state, slen, state_at);
    int32_t a = bc_builder_action(b, action, alen, action_at);
    if (s < 0 || a < 0)
        return -1;
    if (b->n_pairs >= INT32_MAX)
        return bc__builder_report(b, BC_ERROR, state_at, "too many state-action pairs");
    if (b->n_pairs + 1 >= b->cap_pairs && over_limit(b, state_at))
        return -1;
    if (reserve_pair(b) < 0)
        return bc__builder_report(b, BC_ERROR, state_at, "out of memory");
    int64_t p = b->n_pairs;
    b->p_state[p] = s;
    b->p_action[p] = a;
    b->p_line[p] = state_at.line;
    b->p_col[p] = state_at.col;
    b->p_reward[p] = reward_id;
    b->p_trans_start[p] = b->n_trans;
    b->pair_open = 1;
    b->line_succ = 0;
    b->line_missing_prob = 0;
    return 0;
}

int bc_builder_pair_begin(bc_builder *b, const char *state, size_t slen, bc_pos state_at,
                          const char *action, size_t alen, bc_pos action_at, bc_num reward)
{
    /* The reward is interned after the names: the checks of a line come in that order. */
    if (bc_builder_pair_begin_id(b, state, slen, state_at, action, alen, action_at,
                                 BC_NUM_ID_ZERO) < 0)
        return -1;
    int64_t rid = bc_numtab_intern(b->values, reward);
    if (rid < 0) {
        bc_builder_pair_cancel(b);
        return bc__builder_report(b, BC_ERROR, state_at, "out of memory");
    }
    b->p_reward[b->n_pairs] = (uint32_t)rid;
    return 0;
}

/* Makes room for one more raw successor. */
static int reserve_trans(bc_builder *b)
{
    if (b->n_trans < b->cap_trans)
        return 0;
    int64_t cap = b->cap_trans ? 2 * b->cap_trans : 8192;
    if (grow_raw((void **)&b->t_succ, cap, sizeof *b->t_succ) < 0 ||
        grow_raw((void **)&b->t_prob, cap, sizeof *b->t_prob) < 0 ||
        (b->t_outcome &&
         grow_raw((void **)&b->t_outcome, cap, sizeof *b->t_outcome) < 0))
        return -1;
    b->cap_trans = cap;
    return 0;
}

/* Appends successor s with probability and outcome ids to the open line. */
static int append_succ(bc_builder *b, int32_t s, uint32_t pid, uint32_t oid, bc_pos at)
{
    if (b->n_trans >= b->cap_trans && over_limit(b, at))
        return -1;
    if (reserve_trans(b) < 0)
        return bc__builder_report(b, BC_ERROR, at, "out of memory");
    if (oid != BC_NUM_ID_ZERO && !b->t_outcome) {
        b->t_outcome = calloc((size_t)b->cap_trans, sizeof *b->t_outcome); /* zeroed: BC_NUM_ID_ZERO */
        if (!b->t_outcome)
            return bc__builder_report(b, BC_ERROR, at, "out of memory");
    }
    int64_t t = b->n_trans++;
    b->t_succ[t] = s;
    b->t_prob[t] = pid;
    if (b->t_outcome)
        b->t_outcome[t] = oid;
    b->line_succ++;
    return 0;
}

int bc_builder_succ(bc_builder *b, const char *name, size_t len, const bc_num *prob,
                    const bc_num *outcome, bc_pos at)
{
    assert(b->pair_open);
    int32_t s = bc_builder_state(b, name, len, at);
    if (s < 0)
        return -1;
    int64_t pid = prob ? bc_numtab_intern(b->values, *prob) : BC_NUM_ID_ONE;
    /* An outcome of 0 takes id 0 (as if none were written) whatever its spelling. */
    int64_t oid = outcome && bc_num_sign(*outcome, b->big) != 0
                      ? bc_numtab_intern(b->values, *outcome) : BC_NUM_ID_ZERO;
    if (pid < 0 || oid < 0)
        return bc__builder_report(b, BC_ERROR, at, "out of memory");
    if (append_succ(b, s, (uint32_t)pid, (uint32_t)oid, at) < 0)
        return -1;
    if (prob && bc_num_sign(*prob, b->big) < 0)
        bc__builder_report(b, BC_ERROR, at, "a probability must not be negative");
    if (!prob)
        b->line_missing_prob++;
    return 0;
}

int bc_builder_succ_id(bc_builder *b, int32_t state, uint32_t prob_id, bc_pos at)
{
    assert(b->pair_open && state >= 0);
    int64_t t = b->n_trans;
    if (t >= b->cap_trans || b->t_outcome) /* growing, or outcomes to keep: the general path */
        return append_succ(b, state, prob_id, BC_NUM_ID_ZERO, at);
    b->t_succ[t] = state;
    b->t_prob[t] = prob_id;
    b->n_trans = t + 1;
    b->line_succ++;
    return 0;
}

int bc_builder_pair_end(bc_builder *b, bc_pos at)
{
    assert(b->pair_open);
    b->pair_open = 0;
    int64_t p = b->n_pairs++;
    int64_t first = b->p_trans_start[p];
    b->p_trans_start[b->n_pairs] = b->n_trans;
    if (b->line_succ == 0)
        return bc__builder_report(b, BC_ERROR, at, "expected at least one successor after `->`");
    if (b->line_missing_prob && b->line_succ > 1)
        return bc__builder_report(b, BC_ERROR, at,
                                  "this line has %d successors, so each needs a probability "
                                  "(only a lone successor may omit it)",
                                  (int)b->line_succ);
    int64_t n = b->n_trans - first;
    if (n > b->cap_line) {
        if (bc__resize((void **)&b->line_prob, 0, n, sizeof *b->line_prob) < 0)
            return bc__builder_report(b, BC_ERROR, at, "out of memory");
        b->cap_line = n;
    }
    const bc_num *val = bc_numtab_values(b->values);
    for (int64_t k = 0; k < n; k++)
        b->line_prob[k] = val[b->t_prob[first + k]];
    int renorm = 0;
    if (bc__check_distribution(b, b->line_prob, n, at, "the probabilities of this line",
                               &renorm) < 0)
        return -1;
    if (renorm) {
        for (int64_t k = 0; k < n; k++) {
            int64_t id = bc_numtab_intern(b->values, b->line_prob[k]);
            if (id < 0)
                return bc__builder_report(b, BC_ERROR, at, "out of memory");
            b->t_prob[first + k] = (uint32_t)id;
        }
        if (bc__grow((void **)&b->renorm_lines, &b->cap_renorm, b->n_renorm + 1,
                     sizeof *b->renorm_lines) < 0)
            return bc__builder_report(b, BC_ERROR, at, "out of memory");
        b->renorm_lines[b->n_renorm++] = at.line;
    }
    return 0;
}

int bc_builder_pair_end_summed(bc_builder *b, bc_pos at)
{
    assert(b->pair_open && b->n_trans > b->p_trans_start[b->n_pairs]);
    assert(!b->line_missing_prob || b->line_succ == 1);
    b->pair_open = 0;
    b->n_pairs++;
    b->p_trans_start[b->n_pairs] = b->n_trans;
    (void)at;
    return 0;
}

void bc_builder_pair_cancel(bc_builder *b)
{
    assert(b->pair_open);
    b->pair_open = 0;
    b->n_trans = b->p_trans_start[b->n_pairs];
}

int bc__check_distribution(bc_builder *b, bc_num *probs, int64_t n, bc_pos at, const char *what,
                           int *renormalised)
{
    bc_num sum = bc_num_int(0);
    *renormalised = 0;
    if (bc_num_sum_is_one(probs, n))
        return 0;
    for (int64_t k = 0; k < n; k++) {
        if (bc_num_sign(probs[k], b->big) < 0)
            return -1; /* already reported where it was read */
        if (bc_num_add(sum, probs[k], &sum, b->big) < 0)
            return bc__builder_report(b, BC_ERROR, at, "out of memory");
    }
    if (bc_num_is_one(sum, b->big))
        return 0;
    /* |sum - 1| <= 1e-9, compared exactly. */
    bc_num lo = {999999999, 1000000000}, hi = {1000000001, 1000000000};
    char *text = bc_num_text(sum, b->big);
    int off = bc_num_cmp(sum, lo, b->big) < 0 || bc_num_cmp(sum, hi, b->big) > 0;
    if (off)
        bc__builder_report(b, BC_ERROR, at, "%s sum to %s; expected exactly 1", what,
                           bc__abbrev(text));
    else
        bc__builder_report(b, BC_WARNING, at,
                           "%s sum to %s, within 1e-9 of 1; renormalised exactly", what,
                           bc__abbrev(text));
    free(text);
    if (off)
        return -1;
    for (int64_t k = 0; k < n; k++)
        if (bc_num_div(probs[k], sum, &probs[k], b->big) < 0)
            return bc__builder_report(b, BC_ERROR, at, "out of memory");
    *renormalised = 1;
    return 0;
}
