/* agent_internal.h — what the Q-table and policy readers (formats/agent_*.c) share: the reading context and the common rules. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Every format (CSV, NPY, JSON) turns its bytes into calls on one
 * bc__agent_reader; the rules that do not depend on the format (which cells
 * a state may have, duplicates, missing states, probability sums) live in
 * agent_read.c, so the three formats obey exactly the same checks.
 *
 * How a reader drives it:
 *  - row forms (one row or object per state: wide CSV, NPY, JSON, CSV
 *    `state,action`): bc__row_begin, then the cells, or bc__row_empty when
 *    the row holds no value at all; JSON also calls bc__cell_once, since an
 *    object may repeat a key;
 *  - long forms (one row per cell: CSV `state,action,q` / `state,action,prob`):
 *    bc__state_touch, then bc__cell_once and the cell;
 *  - finally bc__finish_qtable / bc__finish_policy, which check what spans
 *    a whole state (every pair given, probabilities summing to 1) and the
 *    states the file leaves out.
 */
#ifndef BC_AGENT_INTERNAL_H
#define BC_AGENT_INTERNAL_H

#include "bellcheck.h"

/* Where a value came from.  file is the label, or "label:json.path" for
 * sources without lines; line and col are 1-based, 0 when unknown.  In NPY
 * files they are the 1-based row and column of the array. */
typedef struct {
    const char *file;
    int32_t line;
    int32_t col;
} bc__at;

/* Lines in state_line and pair_line: 0 = not given yet, -1 = given at no line. */
#define BC__NO_LINE (-1)

/* (state, action) cells outside the model's pairs that a long form or a JSON
 * object has given, for duplicate detection: open addressing on s * n_actions + a. */
typedef struct {
    int64_t *keys;  /* [cap], -1 = empty slot */
    int32_t *lines; /* [cap] */
    size_t cap, n;
} bc__cellset;

typedef struct {
    const bc_model *m;
    bc_diag *d;
    const char *label;       /* file label for messages */
    const char *json_top;    /* "q" or "policy": the JSON key above the state names */
    bc_missing_mode missing;
    int n_errors;            /* errors this reading reported */
    bc_qtable *q;            /* exactly one of q and pol is set */
    bc_policy *pol;
    int32_t *state_line;     /* [n_states] where the state's row (or first long row) is */
    int32_t *pair_line;      /* [n_pairs] where the pair's value is */
    uint8_t *state_bad;      /* [n_states] 1 once an error about one of its cells was reported */
    bc__cellset others;      /* cells outside the pairs (long forms and JSON only) */
} bc__agent_reader;

/* ---- agent_alloc.c: the context ------------------------------------------ */

/* Prepares r for a Q-table (want_policy 0) or a policy (1): q all NAN, every
 * present flag 0.  Returns 0, or -1 after reporting running out of memory
 * (or that the tables would exceed d->max_memory). */
int bc__reader_init(bc__agent_reader *r, const bc_model *m, const char *label,
                    bc_missing_mode missing, int want_policy, bc_diag *d);
/* Frees the bookkeeping and, unless it was handed out, the table. */
void bc__reader_free(bc__agent_reader *r);
/* Looks up key; returns its line (or BC__NO_LINE) if present, else inserts it
 * with line and returns 0.  Returns -2 if out of memory. */
int32_t bc__cellset_add(bc__cellset *set, int64_t key, int32_t line);

/* ---- agent_read.c: the shared rules -------------------------------------- */

/* Reports an error at `at` (printf format); always returns -1. */
int bc__fail(bc__agent_reader *r, bc__at at, const char *fmt, ...)
    __attribute__((format(printf, 3, 4)));
/* 1 once the diagnostics hold all the errors they keep: readers may stop early. */
int bc__full(const bc__agent_reader *r);
/* Shortest text that reads back as v ("nan", "inf" and "-inf" for the rest). */
void bc__format_double(char *buf, size_t cap, double v);
/* Index of the state / action named s[0..len), or -1 after reporting it unknown. */
int32_t bc__state_of(bc__agent_reader *r, const char *s, size_t len, bc__at at);
int32_t bc__action_of(bc__agent_reader *r, const char *s, size_t len, bc__at at);
/* Row forms: state s starts its row.  0, or -1 after reporting a duplicate row. */
int bc__row_begin(bc__agent_reader *r, int32_t s, bc__at at);
/* Row forms: the row of s holds no value at all, so the table does not cover s. */
void bc__row_empty(bc__agent_reader *r, int32_t s, bc__at at);
/* A format-level error (say, an unparsable number) spoiled a cell of s: its
 * whole-state checks are skipped, since they would only repeat the news. */
void bc__state_bad(bc__agent_reader *r, int32_t s);
/* Long forms: s has a row (the first one fixes where its state-wide problems are reported). */
void bc__state_touch(bc__agent_reader *r, int32_t s, bc__at at);
/* Long forms and JSON: the cell (s, a) is given here.  0, or -1 after reporting a duplicate. */
int bc__cell_once(bc__agent_reader *r, int32_t s, int32_t a, bc__at at);
/* Q-value v of (s, a); NAN for an empty cell.  Checks it against the model
 * and stores it.  0, or -1 after reporting. */
int bc__q_value(bc__agent_reader *r, int32_t s, int32_t a, double v, bc__at at);
/* Deterministic policy: s takes a.  0, or -1 after reporting. */
int bc__policy_action(bc__agent_reader *r, int32_t s, int32_t a, bc__at at);
/* Stochastic policy: s takes a with probability prob.  0, or -1 after reporting. */
int bc__policy_prob(bc__agent_reader *r, int32_t s, int32_t a, double prob, bc__at at);
/* Whole-state checks and missing states; returns the table (r no longer owns
 * it), or NULL when any error was reported. */
bc_qtable *bc__finish_qtable(bc__agent_reader *r);
bc_policy *bc__finish_policy(bc__agent_reader *r);

/* ---- one file per format ------------------------------------------------- */

/* Each reads buf[0..len) into r (already initialised).  0 when every row was
 * examined (cell errors may have been reported), -1 when reading stopped
 * early: a problem that spoils the rest (header, syntax, shape), or the
 * diagnostics are full. */
int bc__read_csv_qtable(bc__agent_reader *r, const char *buf, size_t len);
int bc__read_csv_policy(bc__agent_reader *r, const char *buf, size_t len);
int bc__read_npy_qtable(bc__agent_reader *r, const unsigned char *buf, size_t len);
int bc__read_npy_policy(bc__agent_reader *r, const unsigned char *buf, size_t len);
int bc__read_json_qtable(bc__agent_reader *r, const char *buf, size_t len);
int bc__read_json_policy(bc__agent_reader *r, const char *buf, size_t len);

#endif
