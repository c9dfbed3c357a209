/* agent_csv.c — reads Q-tables (wide and long) and policies (deterministic and stochastic) from CSV. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The first row that is not blank is a header, and it alone tells the form:
 *   Q-table  `state,action,q`          long: one row per (state, action)
 *            `state,<action>,...`      wide: one row per state
 *   policy   `state,action`            deterministic: one row per state
 *            `state,action,prob`       stochastic: one row per (state, action)
 * Cells are separated by commas; spaces and tabs around a cell are ignored; a
 * cell may be in double quotes (a spreadsheet's habit).  CRLF line ends and a
 * UTF-8 byte-order mark are accepted; blank lines are skipped.  Numbers are
 * read by strtod, which must consume the whole cell.  Columns in messages
 * count bytes from 1.
 */
#include "agent_internal.h"

#include <assert.h>
#include <ctype.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

typedef struct {
    const char *text; /* inside the quotes if quoted; not NUL-terminated */
    size_t len;
    int32_t col;      /* 1-based column of the cell's first byte */
} csv_cell;

typedef struct {
    bc__agent_reader *r;
    const char *buf;
    size_t len, pos;  /* pos: start of the next line */
    int32_t line;     /* line of the current row */
    int32_t end_col;  /* column just past the current row's last byte */
    csv_cell *cells;  /* the current row */
    size_t n_cells, cap_cells;
} csv_reader;

/* Longest cell read as a number (see cell_number). */
#define NUM_CELL_MAX 256

static int is_space(char ch)
{
    return ch == ' ' || ch == '\t';
}

/* ---- rows and cells ------------------------------------------------------ */

static int push_cell(csv_reader *c, const char *text, size_t len, int32_t col)
{
    if (c->n_cells == c->cap_cells) {
        size_t cap = c->cap_cells ? 2 * c->cap_cells : 16;
        csv_cell *cells = realloc(c->cells, cap * sizeof *cells);
        if (!cells)
            return -1;
        c->cells = cells;
        c->cap_cells = cap;
    }
    c->cells[c->n_cells++] = (csv_cell){text, len, col};
    return 0;
}

/* Splits line[0..n) into cells.  0, or -1 after reporting a bad quote or running out of memory. */
static int split_cells(csv_reader *c, const char *line, size_t n)
{
    size_t i = 0;
    c->n_cells = 0;
    for (;;) {
        while (i < n && is_space(line[i]))
            i++;
        size_t start = i, len;
        const char *text = line + i;
        if (i < n && line[i] == '"') {
            text++;
            for (i++; i < n && line[i] != '"'; i++)
                ;
            if (i == n)
                return bc__fail(c->r, (bc__at){c->r->label, c->line, (int32_t)start + 1},
                                "a quote opens here but is not closed on this line");
            len = (size_t)(line + i - text);
            for (i++; i < n && is_space(line[i]); i++)
                ;
            if (i < n && line[i] != ',')
                return bc__fail(c->r, (bc__at){c->r->label, c->line, (int32_t)i + 1},
                                "text after a closing quote; expected ',' or the end of the row");
        } else {
            while (i < n && line[i] != ',')
                i++;
            len = i - start;
            while (len > 0 && is_space(text[len - 1]))
                len--;
        }
        if (push_cell(c, text, len, (int32_t)start + 1) < 0)
            return bc__fail(c->r, (bc__at){c->r->label, c->line, 0}, "out of memory");
        if (i >= n)
            return 0;
        i++; /* the comma */
    }
}

/* Moves to the next row that is not blank.  1: a row is ready; 0: end of
 * input; -1: this row was bad (reported), try the next one. */
static int next_row(csv_reader *c)
{
    for (;;) {
        if (c->pos >= c->len)
            return 0;
        if (c->pos == 0 && c->len >= 3 && memcmp(c->buf, "\xEF\xBB\xBF", 3) == 0)
            c->pos = 3;
        const char *line = c->buf + c->pos;
        const char *nl = memchr(line, '\n', c->len - c->pos);
        size_t n = nl ? (size_t)(nl - line) : c->len - c->pos;
        c->pos += n + (nl != NULL);
        if (c->line < INT32_MAX)
            c->line++; /* past 2^31 - 1 lines, positions name the last line number */
        if (n > 0 && line[n - 1] == '\r')
            n--;
        size_t k = 0;
        while (k < n && is_space(line[k]))
            k++;
        if (k == n)
            continue;
        if (n >= INT32_MAX)
            return bc__fail(c->r, (bc__at){c->r->label, c->line, 0}, "row too long");
        c->end_col = (int32_t)n + 1;
        if (split_cells(c, line, n) < 0)
            return -1;
        assert(c->n_cells >= 1); /* a row that is not blank has a first cell */
        return 1;
    }
}

static bc__at cell_at(const csv_reader *c, size_t k)
{
    assert(k < c->n_cells);
    return (bc__at){c->r->label, c->line, c->cells[k].col};
}

/* 1 when cell k reads exactly word. */
static int cell_is(const csv_reader *c, size_t k, const char *word)
{
    return k < c->n_cells && c->cells[k].len == strlen(word) &&
           memcmp(c->cells[k].text, word, c->cells[k].len) == 0;
}

/* The number in cell k (NAN when empty).  0, or -1 after reporting text strtod does not consume. */
static int cell_number(csv_reader *c, size_t k, const char *what, double *v)
{
    const csv_cell *cell = &c->cells[k];
    if (cell->len == 0) {
        *v = NAN;
        return 0;
    }
    /* strtod needs a NUL-terminated copy: the cell may be the last bytes of a
     * buffer that has no NUL after it (bc_read_qtable_mem).  17 significant
     * digits already pin a double, so NUM_CELL_MAX bytes leave ample room.
     * strtod would skip leading white space, which a quoted cell may hold. */
    if (cell->len > NUM_CELL_MAX)
        return bc__fail(c->r, cell_at(c, k), "%s '%.40s...' is %zu bytes long; a number in a "
                        "CSV cell is at most %d bytes", what, cell->text, cell->len, NUM_CELL_MAX);
    char text[NUM_CELL_MAX + 1], *end;
    memcpy(text, cell->text, cell->len);
    text[cell->len] = 0;
    *v = strtod(text, &end);
    if (end == text + cell->len && !isspace((unsigned char)text[0]))
        return 0;
    return bc__fail(c->r, cell_at(c, k), "%s '%.*s%s' is not a number", what,
                    (int)(cell->len > 40 ? 40 : cell->len), cell->text,
                    cell->len > 40 ? "..." : "");
}

/* The row has exactly `want` cells; else reports it (at the first extra cell, or the row's end). */
static int row_width(csv_reader *c, size_t want)
{
    if (c->n_cells == want)
        return 0;
    bc__at at = {c->r->label, c->line, c->n_cells > want ? c->cells[want].col : c->end_col};
    return bc__fail(c->r, at, "the row has %zu cell%s, the header has %zu", c->n_cells,
                    c->n_cells == 1 ? "" : "s", want);
}

/* The header: the first row, which must start with `state`.  0, or -1 after reporting. */
static int read_header(csv_reader *c, const char *expected)
{
    int rc = next_row(c);
    if (rc < 0)
        return -1;
    if (rc == 0)
        return bc__fail(c->r, (bc__at){c->r->label, 0, 0}, "the file is empty: expected the "
                        "header %s", expected);
    if (!cell_is(c, 0, "state"))
        return bc__fail(c->r, cell_at(c, 0), "the first row must be the header %s; its first "
                        "cell is '%.*s', not 'state'", expected,
                        (int)(c->cells[0].len > 40 ? 40 : c->cells[0].len), c->cells[0].text);
    return 0;
}

/* The current row's cells joined by commas, cut to fit buf. */
static const char *header_text(const csv_reader *c, char *buf, size_t cap)
{
    size_t n = 0;
    buf[0] = 0;
    for (size_t k = 0; k < c->n_cells && n + 1 < cap; k++) {
        int w = snprintf(buf + n, cap - n, "%s%.*s", k ? "," : "", (int)c->cells[k].len,
                         c->cells[k].text);
        n = w < 0 || (size_t)w >= cap - n ? cap - 1 : n + (size_t)w;
    }
    return buf;
}

/* A row of the wrong width: its state, if it names one, is marked spoiled, so
 * that the whole-state checks do not also report the state as missing. */
static void row_spoiled(csv_reader *c)
{
    int32_t s = bc_names_find(c->r->m->state_names, c->cells[0].text, c->cells[0].len);
    if (s >= 0) {
        bc__state_touch(c->r, s, cell_at(c, 0));
        bc__state_bad(c->r, s);
    }
}

/* Reads every row after the header with row_fn; 0, or -1 when the diagnostics filled up. */
static int read_rows(csv_reader *c, size_t width, void (*row_fn)(csv_reader *, void *), void *arg)
{
    int rc;
    while ((rc = next_row(c)) != 0) {
        if (bc__full(c->r))
            return -1;
        if (rc > 0 && row_width(c, width) == 0)
            row_fn(c, arg);
        else if (rc > 0)
            row_spoiled(c);
    }
    return bc__full(c->r) ? -1 : 0;
}

/* ---- Q-tables ------------------------------------------------------------ */

/* Long forms: the state and action of the row, the state touched and the
 * cell given once.  The state's index, or -1 when the row is to be skipped. */
static int32_t long_row_cell(csv_reader *c, int32_t *a)
{
    bc__agent_reader *r = c->r;
    int32_t s = bc__state_of(r, c->cells[0].text, c->cells[0].len, cell_at(c, 0));
    *a = bc__action_of(r, c->cells[1].text, c->cells[1].len, cell_at(c, 1));
    if (s < 0 || *a < 0)
        return -1;
    bc__state_touch(r, s, cell_at(c, 0));
    return bc__cell_once(r, s, *a, cell_at(c, 0)) < 0 ? -1 : s;
}

/* Long form row: state, action, q. */
static void q_long_row(csv_reader *c, void *unused)
{
    (void)unused;
    int32_t a, s = long_row_cell(c, &a);
    double v;
    if (s < 0)
        return;
    if (cell_number(c, 2, "Q-value", &v) < 0)
        bc__state_bad(c->r, s);
    else
        bc__q_value(c->r, s, a, v, cell_at(c, 2));
}

/* Wide form: the action of each column after the first. */
typedef struct {
    int32_t *action; /* [n_cells of the header]; action[0] unused */
    double *value;
} q_wide;

/* Wide form row: state, then one value per header column. */
static void q_wide_row(csv_reader *c, void *arg)
{
    q_wide *w = arg;
    bc__agent_reader *r = c->r;
    int32_t s = bc__state_of(r, c->cells[0].text, c->cells[0].len, cell_at(c, 0));
    int any = 0, bad = 0;
    for (size_t k = 1; k < c->n_cells; k++) {
        bad |= cell_number(c, k, "Q-value", &w->value[k]) < 0;
        any |= !isnan(w->value[k]);
    }
    if (s < 0 || bc__row_begin(r, s, cell_at(c, 0)) < 0)
        return;
    if (bad) {
        bc__state_bad(r, s);
        return;
    }
    if (!any) {
        bc__row_empty(r, s, cell_at(c, 0));
        return;
    }
    for (size_t k = 1; k < c->n_cells; k++)
        bc__q_value(r, s, w->action[k], w->value[k], cell_at(c, k));
}

/* Maps the header's columns to actions: each known, none twice, and every
 * action some state has present.  0, or -1 after reporting. */
static int wide_columns(csv_reader *c, int32_t *action)
{
    const bc_model *m = c->r->m;
    /* column[a]: 1 + the header column of action a, 0 while it has none. */
    int32_t *column = calloc((size_t)m->n_actions + 1, sizeof *column);
    if (!column)
        return bc__fail(c->r, (bc__at){c->r->label, c->line, 0}, "out of memory");
    int rc = 0;
    for (size_t k = 1; k < c->n_cells; k++) {
        action[k] = bc__action_of(c->r, c->cells[k].text, c->cells[k].len, cell_at(c, k));
        if (action[k] < 0) {
            rc = -1;
        } else if (column[action[k]]) {
            rc = bc__fail(c->r, cell_at(c, k), "action '%s' has two columns (also column %d)",
                          bc_names_get(m->action_names, action[k]), (int)column[action[k]]);
        } else {
            column[action[k]] = (int32_t)k + 1;
        }
    }
    for (int64_t p = 0; p < m->n_pairs && rc == 0; p++)
        if (!column[m->pair_action[p]])
            rc = bc__fail(c->r, (bc__at){c->r->label, c->line, c->end_col}, "the header has no "
                          "column for action '%s', which state '%s' has",
                          bc_names_get(m->action_names, m->pair_action[p]),
                          bc_names_get(m->state_names, m->pair_state[p]));
    free(column);
    return rc;
}

static int read_q_wide(csv_reader *c)
{
    size_t width = c->n_cells;
    q_wide w = {calloc(width, sizeof *w.action), calloc(width, sizeof *w.value)};
    int rc = -1;
    if (!w.action || !w.value)
        bc__fail(c->r, (bc__at){c->r->label, c->line, 0}, "out of memory");
    else if (wide_columns(c, w.action) == 0)
        rc = read_rows(c, width, q_wide_row, &w);
    free(w.action);
    free(w.value);
    return rc;
}

int bc__read_csv_qtable(bc__agent_reader *r, const char *buf, size_t len)
{
    csv_reader c = {.r = r, .buf = buf, .len = len};
    int rc = read_header(&c, "'state,<action>,<action>...' or 'state,action,q'");
    if (rc == 0) {
        if (c.n_cells == 3 && cell_is(&c, 1, "action") && cell_is(&c, 2, "q"))
            rc = read_rows(&c, 3, q_long_row, NULL);
        else if (c.n_cells < 2)
            rc = bc__fail(r, (bc__at){r->label, c.line, c.end_col}, "the header names no "
                          "action: expected 'state,<action>,<action>...' or 'state,action,q'");
        else
            rc = read_q_wide(&c);
    }
    free(c.cells);
    return rc;
}

/* ---- policies ------------------------------------------------------------ */

/* Deterministic row: state, action (an empty action: the state is not covered). */
static void policy_action_row(csv_reader *c, void *unused)
{
    (void)unused;
    bc__agent_reader *r = c->r;
    int32_t s = bc__state_of(r, c->cells[0].text, c->cells[0].len, cell_at(c, 0));
    int32_t a = c->cells[1].len == 0
                    ? -1
                    : bc__action_of(r, c->cells[1].text, c->cells[1].len, cell_at(c, 1));
    if (s < 0 || bc__row_begin(r, s, cell_at(c, 0)) < 0)
        return;
    if (c->cells[1].len == 0)
        bc__row_empty(r, s, cell_at(c, 1));
    else if (a < 0)
        bc__state_bad(r, s);
    else
        bc__policy_action(r, s, a, cell_at(c, 1));
}

/* Stochastic row: state, action, probability. */
static void policy_prob_row(csv_reader *c, void *unused)
{
    (void)unused;
    bc__agent_reader *r = c->r;
    int32_t a, s = long_row_cell(c, &a);
    double prob;
    if (s < 0)
        return;
    if (cell_number(c, 2, "probability", &prob) < 0) {
        bc__state_bad(r, s);
    } else if (c->cells[2].len == 0) {
        bc__state_bad(r, s);
        bc__fail(r, cell_at(c, 2), "state '%s', action '%s': the probability is missing",
                 bc_names_get(r->m->state_names, s), bc_names_get(r->m->action_names, a));
    } else {
        bc__policy_prob(r, s, a, prob, cell_at(c, 2));
    }
}

int bc__read_csv_policy(bc__agent_reader *r, const char *buf, size_t len)
{
    csv_reader c = {.r = r, .buf = buf, .len = len};
    int rc = read_header(&c, "'state,action' or 'state,action,prob'");
    if (rc == 0) {
        char text[100];
        if (c.n_cells == 2 && cell_is(&c, 1, "action"))
            rc = read_rows(&c, 2, policy_action_row, NULL);
        else if (c.n_cells == 3 && cell_is(&c, 1, "action") && cell_is(&c, 2, "prob"))
            rc = read_rows(&c, 3, policy_prob_row, NULL);
        else
            rc = bc__fail(r, cell_at(&c, 0), "a policy's header is "
                          "'state,action' or 'state,action,prob', not '%s'%s",
                          header_text(&c, text, sizeof text),
                          c.n_cells > 2 ? " (is this a Q-table?)" : "");
    }
    free(c.cells);
    return rc;
}
