/* builder_internal.h — the bc_builder's state, shared by the builder's source files only. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#ifndef BC_BUILDER_INTERNAL_H
#define BC_BUILDER_INTERNAL_H

#include "bellcheck.h"

#include <stdarg.h>

typedef enum {
    BC_DIR_NAME,
    BC_DIR_DISCOUNT,
    BC_DIR_OBJECTIVE,
    BC_DIR_HORIZON,
    BC_DIR_STATES,
    BC_DIR_ACTIONS,
    BC_DIR_TERMINAL,
    BC_DIR_INITIAL,
    BC_DIR_COUNT
} bc_directive;

typedef struct {
    int32_t line, col;
} bc_linecol;

/* States or actions: the interned names, where each first appeared, and the
 * order fixed by a `states` / `actions` line (declared[i] = 1 + position). */
typedef struct {
    bc_names *names;
    bc_linecol *first; /* [count] */
    int32_t *declared; /* [count] 0 = not in the declaration line, else 1 + position */
    uint8_t *listed;   /* [count] BC_LISTED_* bits: already in `terminal` / `initial` */
    int64_t cap;       /* of first, declared and listed */
    int32_t *order;    /* declaration order: order[k] = name index */
    int64_t n_order, cap_order;
} bc_nameset;

enum { BC_LISTED_TERMINAL = 1, BC_LISTED_INITIAL = 2 };

typedef struct {
    int32_t state;
    bc_linecol at;
} bc_terminal_entry;

typedef enum { BC_LIST_NONE, BC_LIST_STATES, BC_LIST_ACTIONS, BC_LIST_TERMINAL } bc_list_kind;

struct bc_builder {
    char *file;   /* label used in messages */
    bc_diag *diag;
    bc_bigtab *big;
    bc_numtab *values; /* the distinct exact numbers; raw ids below point here */
    int n_errors; /* errors this builder reported */
    int over_limit; /* --max-memory refused growing the arrays: later pairs are dropped unreported */

    bc_linecol seen[BC_DIR_COUNT];
    int seen_flag[BC_DIR_COUNT];
    char *label;
    bc_num discount;
    bc_objective objective;
    int32_t horizon;

    bc_nameset states, actions;
    bc_list_kind list;

    bc_terminal_entry *terminal_at;
    int64_t n_terminal, cap_terminal;

    int32_t *init_state;
    bc_num *init_prob;
    uint8_t *init_has_prob;
    int64_t n_init, cap_init;
    bc_linecol init_at;
    int32_t init_renorm_line; /* line of a renormalised `initial` (-1 if it has none), 0 if not */

    /* Raw pairs, in input order (p_reward: ids into values). */
    int32_t *p_state, *p_action, *p_line, *p_col;
    uint32_t *p_reward;
    int64_t *p_trans_start; /* [n_pairs + 1] */
    int64_t n_pairs, cap_pairs;
    int pair_open;
    int32_t line_succ, line_missing_prob; /* successors on the open line, and those without a probability */

    /* Raw successors (ids into values). t_outcome is allocated at the first
     * non-zero outcome reward. */
    int32_t *t_succ;
    uint32_t *t_prob, *t_outcome;
    int64_t n_trans, cap_trans;
    bc_num *line_prob; /* [cap_line] the open line's probabilities, for its sum */
    int64_t cap_line;

    int32_t *renorm_lines;
    int64_t n_renorm, cap_renorm;
};

/* Reports a problem at `at`; returns -1 so that callers can `return bc__builder_report(...)`. */
int bc__builder_report(bc_builder *b, bc_severity sev, bc_pos at, const char *fmt, ...)
    __attribute__((format(printf, 4, 5)));
/* Records that a directive appears; a second appearance is reported. 0 or -1. */
int bc__directive_once(bc_builder *b, bc_directive which, const char *word, bc_pos at);
/* Shortens a malloc'ed number text in place to at most 183 bytes, marking the cut with "...". */
const char *bc__abbrev(char *text);
/* Grows *arr (element size sz, capacity *cap) to hold need elements; 0 or -1. */
int bc__grow(void **arr, int64_t *cap, int64_t need, size_t sz);
/* Reallocates *arr from old_cap to new_cap elements of size sz, zeroing the new part; 0 or -1. */
int bc__resize(void **arr, int64_t old_cap, int64_t new_cap, size_t sz);
/* Checks that probs[0..n) are >= 0 and sum to 1 (renormalising within 1e-9); 0 or -1. */
int bc__check_distribution(bc_builder *b, bc_num *probs, int64_t n, bc_pos at, const char *what,
                           int *renormalised);

#endif
