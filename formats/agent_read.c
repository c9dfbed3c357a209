/* agent_read.c — reading Q-tables and policies: the format chosen by content, and the rules every format shares. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The rules (see docs/format-agents.md):
 *  - a Q-value is finite exactly where the model has the pair; elsewhere the
 *    cell is empty or NaN, or 0 when the state is terminal;
 *  - a policy names only actions its state has (a probability of 0 may name
 *    any action); the probabilities of a state sum to 1 within BC__PROB_TOL
 *    and are then divided by their sum;
 *  - terminal states make no decision: a file may list them or not;
 *  - a state or a cell is given once; every non-terminal state is covered
 *    unless missing states are skipped.
 * Invariant: present[s] is 1 exactly for the states whose row (or first
 * long-form row) was read with some value; state_line[s] != 0 for every
 * state that was mentioned at all.
 */
#include "agent_internal.h"

#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* How far a state's probabilities may sum from 1 (a writer printing rounded floats). */
#define BC__PROB_TOL 1e-9

/* ---- messages ------------------------------------------------------------ */

int bc__fail(bc__agent_reader *r, bc__at at, const char *fmt, ...)
{
    char msg[1024];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(msg, sizeof msg, fmt, ap);
    va_end(ap);
    bc_diag_add(r->d, BC_ERROR, at.file ? at.file : r->label, at.line, at.col, "%s", msg);
    r->n_errors++;
    return -1;
}

int bc__full(const bc__agent_reader *r)
{
    return bc_diag_full(r->d);
}

void bc__format_double(char *buf, size_t cap, double v)
{
    if (isnan(v)) {
        snprintf(buf, cap, "nan");
        return;
    }
    if (isinf(v)) {
        snprintf(buf, cap, v < 0 ? "-inf" : "inf");
        return;
    }
    for (int prec = 1; prec <= 17; prec++) { /* 17 significant digits always read back */
        snprintf(buf, cap, "%.*g", prec, v);
        if (strtod(buf, NULL) == v)
            return;
    }
}

static const char *state_name(const bc__agent_reader *r, int32_t s)
{
    return bc_names_get(r->m->state_names, s);
}

static const char *action_name(const bc__agent_reader *r, int32_t a)
{
    return bc_names_get(r->m->action_names, a);
}

/* "s" trimmed for a message: at most 60 bytes shown. */
#define SHOWN(len) ((int)((len) > 60 ? 60 : (len)))

/* Index of the name s[0..len) in t, or -1 after reporting it unknown
 * (what: "state" or "action"). */
static int32_t name_of(bc__agent_reader *r, const bc_names *t, const char *what, const char *s,
                       size_t len, bc__at at)
{
    if (len == 0)
        return bc__fail(r, at, "empty %s name", what);
    int32_t i = bc_names_find(t, s, len);
    if (i < 0)
        bc__fail(r, at, "unknown %s '%.*s%s' (the model has no %s of that name)", what,
                 SHOWN(len), s, len > 60 ? "..." : "", what);
    return i;
}

int32_t bc__state_of(bc__agent_reader *r, const char *s, size_t len, bc__at at)
{
    return name_of(r, r->m->state_names, "state", s, len, at);
}

int32_t bc__action_of(bc__agent_reader *r, const char *s, size_t len, bc__at at)
{
    return name_of(r, r->m->action_names, "action", s, len, at);
}

/* ", first at line N" (or nothing when the first had no line) into buf. */
static const char *first_at(char *buf, size_t cap, int32_t line)
{
    if (line > 0)
        snprintf(buf, cap, " (first at line %d)", (int)line);
    else
        buf[0] = 0;
    return buf;
}

static int32_t line_of(bc__at at)
{
    return at.line > 0 ? at.line : BC__NO_LINE;
}

static uint8_t *present_of(bc__agent_reader *r)
{
    return r->q ? r->q->present : r->pol->present;
}

/* ---- states and cells ---------------------------------------------------- */

int bc__row_begin(bc__agent_reader *r, int32_t s, bc__at at)
{
    if (r->state_line[s] != 0) {
        char first[48];
        return bc__fail(r, at, "duplicate row for state '%s'%s", state_name(r, s),
                        first_at(first, sizeof first, r->state_line[s]));
    }
    r->state_line[s] = line_of(at);
    present_of(r)[s] = 1;
    return 0;
}

void bc__row_empty(bc__agent_reader *r, int32_t s, bc__at at)
{
    present_of(r)[s] = 0;
    if (!r->m->terminal[s] && r->missing == BC_MISSING_ERROR)
        bc__fail(r, at, "the row of state '%s' holds no value, so the table does not cover it",
                 state_name(r, s));
}

void bc__state_bad(bc__agent_reader *r, int32_t s)
{
    r->state_bad[s] = 1;
}

void bc__state_touch(bc__agent_reader *r, int32_t s, bc__at at)
{
    if (r->state_line[s] == 0)
        r->state_line[s] = line_of(at);
    present_of(r)[s] = 1;
}

int bc__cell_once(bc__agent_reader *r, int32_t s, int32_t a, bc__at at)
{
    const bc_model *m = r->m;
    int64_t p = bc_model_find_pair(m, s, a);
    int32_t prev;
    if (p >= 0) {
        prev = r->pair_line[p];
        if (!prev)
            r->pair_line[p] = line_of(at);
    } else {
        prev = bc__cellset_add(&r->others, (int64_t)s * m->n_actions + a, line_of(at));
        if (prev == -2)
            return bc__fail(r, at, "out of memory while reading the agent");
    }
    if (!prev)
        return 0;
    char first[48];
    r->state_bad[s] = 1;
    return bc__fail(r, at, "duplicate entry for state '%s', action '%s'%s", state_name(r, s),
                    action_name(r, a), first_at(first, sizeof first, prev));
}

int bc__q_value(bc__agent_reader *r, int32_t s, int32_t a, double v, bc__at at)
{
    const bc_model *m = r->m;
    char text[40];
    int64_t p = bc_model_find_pair(m, s, a);
    if (p >= 0) {
        if (!r->pair_line[p])
            r->pair_line[p] = line_of(at);
        if (isfinite(v)) {
            r->q->q[p] = v;
            return 0;
        }
        r->state_bad[s] = 1;
        bc__format_double(text, sizeof text, v);
        if (isnan(v))
            return bc__fail(r, at, "state '%s', action '%s': the cell is empty or NaN, but the "
                            "model has this action, so it needs a finite Q-value",
                            state_name(r, s), action_name(r, a));
        return bc__fail(r, at, "state '%s', action '%s': the Q-value %s is not finite",
                        state_name(r, s), action_name(r, a), text);
    }
    if (isnan(v))
        return 0; /* the usual mark of an action the state does not have */
    if (m->terminal[s] && v == 0)
        return 0; /* learners often leave terminal rows at their initial 0 */
    r->state_bad[s] = 1;
    bc__format_double(text, sizeof text, v);
    if (m->terminal[s])
        return bc__fail(r, at, "state '%s' is terminal, so its cells must be empty, NaN or 0; "
                        "found %s for action '%s'", state_name(r, s), text, action_name(r, a));
    return bc__fail(r, at, "state '%s' has no action '%s' in the model, but the table gives it "
                    "the value %s (leave the cell empty or NaN)", state_name(r, s),
                    action_name(r, a), text);
}

int bc__policy_action(bc__agent_reader *r, int32_t s, int32_t a, bc__at at)
{
    if (r->m->terminal[s])
        return 0; /* a terminal state makes no decision: whatever is written is ignored */
    int64_t p = bc_model_find_pair(r->m, s, a);
    if (p < 0) {
        r->state_bad[s] = 1;
        return bc__fail(r, at, "action '%s' is not allowed in state '%s' (the model has no such "
                        "pair)", action_name(r, a), state_name(r, s));
    }
    r->pair_line[p] = line_of(at);
    r->pol->prob[p] = 1;
    return 0;
}

int bc__policy_prob(bc__agent_reader *r, int32_t s, int32_t a, double prob, bc__at at)
{
    char text[40];
    int64_t p = bc_model_find_pair(r->m, s, a);
    int fine = isfinite(prob) && prob >= 0;
    if (fine && (r->m->terminal[s] || (p < 0 && prob == 0)))
        return 0; /* no decision; or a dense export's 0 on an action the state lacks */
    if (fine && p >= 0) {
        r->pol->prob[p] = prob;
        return 0;
    }
    r->state_bad[s] = 1;
    bc__format_double(text, sizeof text, prob);
    if (!fine)
        return bc__fail(r, at, "state '%s', action '%s': the probability %s is %s",
                        state_name(r, s), action_name(r, a), text,
                        isfinite(prob) ? "negative" : "not a finite number");
    return bc__fail(r, at, "action '%s' is not allowed in state '%s' (the model has no such "
                    "pair), but the policy gives it probability %s", action_name(r, a),
                    state_name(r, s), text);
}

/* ---- whole states -------------------------------------------------------- */

/* Where the problems of a whole state s are reported: its first row, or its
 * JSON path when it has no line (buf holds the file label then). */
static bc__at state_at(const bc__agent_reader *r, int32_t s, char *buf, size_t cap)
{
    bc__at at = {r->label, 0, 0};
    if (r->state_line[s] > 0) {
        at.line = r->state_line[s];
        at.col = 1;
    } else if (r->state_line[s] == BC__NO_LINE) {
        snprintf(buf, cap, "%s:%s.%s", r->label, r->json_top, state_name(r, s));
        at.file = buf;
    }
    return at;
}

/* Q-table: every pair of covered state s has a value. */
static void q_state_complete(bc__agent_reader *r, int32_t s)
{
    const bc_model *m = r->m;
    char where[BC_NAME_MAX + 600];
    for (int64_t p = m->state_pair_start[s]; p < m->state_pair_start[s + 1]; p++)
        if (!r->pair_line[p])
            bc__fail(r, state_at(r, s, where, sizeof where), "state '%s' has no Q-value for "
                     "action '%s'", state_name(r, s), action_name(r, m->pair_action[p]));
}

/* Policy: the probabilities of covered state s sum to 1; then divided by their sum. */
static void policy_state_complete(bc__agent_reader *r, int32_t s)
{
    const bc_model *m = r->m;
    double *prob = r->pol->prob, sum = 0;
    int64_t lo = m->state_pair_start[s], hi = m->state_pair_start[s + 1];
    for (int64_t p = lo; p < hi; p++)
        sum += prob[p];
    if (fabs(sum - 1) > BC__PROB_TOL) {
        char where[BC_NAME_MAX + 600], text[40];
        bc__format_double(text, sizeof text, sum);
        bc__fail(r, state_at(r, s, where, sizeof where), "the probabilities of state '%s' "
                 "sum to %s, not 1", state_name(r, s), text);
        return;
    }
    if (sum != 1)
        for (int64_t p = lo; p < hi; p++)
            prob[p] /= sum;
}

/* A non-terminal state the file does not cover: an error, or counted as skipped. */
static void state_missing(bc__agent_reader *r, int32_t s, int32_t *n_missing)
{
    if (r->missing == BC_MISSING_SKIP) {
        (*n_missing)++;
        return;
    }
    if (r->state_line[s] == 0) /* an empty row was reported where it stands */
        bc__fail(r, (bc__at){r->label, 0, 0}, "state '%s' is missing from the table",
                 state_name(r, s));
}

/* The checks of finish shared by both kinds: terminal states covered, missing
 * states, and the whole-state check on every other covered state. */
static void finish_states(bc__agent_reader *r, void (*complete)(bc__agent_reader *, int32_t),
                          int32_t *n_missing)
{
    uint8_t *present = present_of(r);
    *n_missing = 0;
    for (int32_t s = 0; s < r->m->n_states; s++) {
        if (r->m->terminal[s])
            present[s] = 1;
        else if (!present[s])
            state_missing(r, s, n_missing);
        else if (!r->state_bad[s])
            complete(r, s);
    }
}

bc_qtable *bc__finish_qtable(bc__agent_reader *r)
{
    finish_states(r, q_state_complete, &r->q->n_missing);
    if (r->n_errors)
        return NULL;
    bc_qtable *q = r->q;
    r->q = NULL;
    return q;
}

bc_policy *bc__finish_policy(bc__agent_reader *r)
{
    const bc_model *m = r->m;
    finish_states(r, policy_state_complete, &r->pol->n_missing);
    if (r->n_errors)
        return NULL;
    bc_policy *pol = r->pol;
    pol->deterministic = 1;
    for (int32_t s = 0; s < m->n_states && pol->deterministic; s++) {
        if (m->terminal[s] || !pol->present[s])
            continue;
        int n_nonzero = 0, n_one = 0;
        for (int64_t p = m->state_pair_start[s]; p < m->state_pair_start[s + 1]; p++) {
            n_nonzero += pol->prob[p] != 0;
            n_one += pol->prob[p] == 1;
        }
        pol->deterministic = n_nonzero == 1 && n_one == 1;
    }
    r->pol = NULL;
    return pol;
}

/* ---- choosing the format ------------------------------------------------- */

typedef enum { AGENT_EMPTY, AGENT_NPY, AGENT_JSON, AGENT_CSV } agent_format;

/* NPY by its magic bytes; otherwise JSON when the first byte that is not
 * blank (after a UTF-8 byte-order mark) opens an object, else CSV. */
static agent_format sniff(const char *buf, size_t len)
{
    if (len >= 6 && memcmp(buf, "\x93NUMPY", 6) == 0)
        return AGENT_NPY;
    size_t i = len >= 3 && memcmp(buf, "\xEF\xBB\xBF", 3) == 0 ? 3 : 0;
    while (i < len && (buf[i] == ' ' || buf[i] == '\t' || buf[i] == '\r' || buf[i] == '\n'))
        i++;
    if (i == len)
        return AGENT_EMPTY;
    return buf[i] == '{' ? AGENT_JSON : AGENT_CSV;
}

/* The first NUL byte of buf[0..len) as a 1-based line and column; 0 when there is none.
 * CSV and JSON are text: a NUL would silently cut a name or a number short. */
static int first_nul(const char *buf, size_t len, int32_t *line, int32_t *col)
{
    const char *nul = memchr(buf, 0, len);
    if (!nul)
        return 0;
    *line = 1;
    const char *start = buf;
    for (const char *p = buf; p < nul; p++)
        if (*p == '\n') {
            *line += *line < INT32_MAX; /* positions saturate past 2^31 - 1 */
            start = p + 1;
        }
    *col = nul - start < INT32_MAX ? (int32_t)(nul - start) + 1 : INT32_MAX;
    return 1;
}

/* Reads buf[0..len) into r by the format its content shows.  0 when the
 * whole input was examined (errors may have been reported), -1 when reading
 * stopped (then the whole-state checks would only report what was never read). */
static int read_agent_bytes(bc__agent_reader *r, const char *buf, size_t len, int want_policy)
{
    const unsigned char *bytes = (const unsigned char *)buf;
    agent_format f = sniff(buf, len);
    int32_t line, col;
    if (f != AGENT_NPY && first_nul(buf, len, &line, &col))
        return bc__fail(r, (bc__at){r->label, line, col}, "binary data (a NUL byte): a %s file "
                        "in CSV or JSON is text", want_policy ? "policy" : "Q-table");
    switch (f) {
    case AGENT_EMPTY:
        return bc__fail(r, (bc__at){r->label, 0, 0}, "the file is empty: expected a %s (CSV, "
                        "NPY or JSON)", want_policy ? "policy" : "Q-table");
    case AGENT_NPY:
        return want_policy ? bc__read_npy_policy(r, bytes, len) : bc__read_npy_qtable(r, bytes, len);
    case AGENT_JSON:
        return want_policy ? bc__read_json_policy(r, buf, len) : bc__read_json_qtable(r, buf, len);
    case AGENT_CSV:
        break;
    }
    return want_policy ? bc__read_csv_policy(r, buf, len) : bc__read_csv_qtable(r, buf, len);
}

/* Prepares r and reads path (buf NULL) or buf[0..len) into it; 0 when the
 * whole-state checks may follow.  r is left ready for bc__reader_free in every case. */
static int read_agent(bc__agent_reader *r, const char *path, const char *buf, size_t len,
                      const bc_model *m, bc_missing_mode missing, int want_policy, bc_diag *d)
{
    const char *label = buf ? path : strcmp(path, "-") == 0 ? "<stdin>" : path;
    if (bc__reader_init(r, m, label ? label : "<input>", missing, want_policy, d) < 0)
        return -1;
    if (buf)
        return read_agent_bytes(r, buf, len, want_policy);
    char *file;
    if (bc_read_file(path, &file, &len, d) < 0)
        return -1;
    int rc = read_agent_bytes(r, file, len, want_policy);
    free(file);
    return rc;
}

/* A Q-table (want_policy 0) or a policy (1) read from path (buf NULL) or
 * from buf[0..len); NULL after reporting. */
static void *read_table(const char *path, const char *buf, size_t len, const bc_model *m,
                        bc_missing_mode missing, int want_policy, bc_diag *d)
{
    bc__agent_reader r;
    void *t = NULL;
    if (read_agent(&r, path, buf, len, m, missing, want_policy, d) == 0)
        t = want_policy ? (void *)bc__finish_policy(&r) : (void *)bc__finish_qtable(&r);
    bc__reader_free(&r);
    return t;
}

bc_qtable *bc_read_qtable(const char *path, const bc_model *m, bc_missing_mode missing, bc_diag *d)
{
    return read_table(path, NULL, 0, m, missing, 0, d);
}

bc_policy *bc_read_policy(const char *path, const bc_model *m, bc_missing_mode missing, bc_diag *d)
{
    return read_table(path, NULL, 0, m, missing, 1, d);
}

bc_qtable *bc_read_qtable_mem(const char *buf, size_t len, const char *label, const bc_model *m,
                              bc_missing_mode missing, bc_diag *d)
{
    return read_table(label, buf ? buf : "", len, m, missing, 0, d);
}

bc_policy *bc_read_policy_mem(const char *buf, size_t len, const char *label, const bc_model *m,
                              bc_missing_mode missing, bc_diag *d)
{
    return read_table(label, buf ? buf : "", len, m, missing, 1, d);
}
