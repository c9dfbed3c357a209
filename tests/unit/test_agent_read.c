/* test_agent_read.c — the Q-table and policy readers: every format's happy path value by value, and every error with its message and position. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The models are small invented scenarios (a greenhouse controller, two
 * lamps).  Every expected value below is written out by hand from the tables
 * in this file; NPY files are written by NumPy itself
 * (tests/tools/make_agents.py, run with /usr/bin/python3 into a temporary
 * directory), holding the same hand-written arrays.  Without python3 or
 * numpy the NPY checks FAIL.  Run from the repository root (tests/run.sh
 * does): the script is found from this file's path.  Positions: CSV line:column count bytes from 1;
 * NPY positions are the 1-based row and column of the array; JSON problems
 * carry a path after the file label.
 */
#include "bellcheck.h"
#include "unit.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "greenhouse.h" /* greenhouse_text */

/* The greenhouse Q-table every happy path encodes, by pair. */
static const double greenhouse_q[7] = {1.5, -0.25, 2.0, 3.125, 0.5, -4.75, -9.0};
static const char *const pair_label[7] = {"cold/shut", "cold/heat", "mild/open", "mild/shut",
                                          "hot/open",  "hot/shut",  "hot/heat"};

/* States on off; actions flip stay; pairs 0 on/flip, 1 on/stay, 2 off/flip, 3 off/stay. */
static const char lamps_text[] =
    "bell 1\n"
    "discount 1/2\n"
    "actions flip stay\n"
    "on flip 0 -> off\n"
    "on stay 1 -> on\n"
    "off flip 0 -> on\n"
    "off stay 0 -> off\n";

static char tmpdir[] = "/tmp/bc-agent-test.XXXXXX";
static char path_buf[4096];

/* ---- helpers ------------------------------------------------------------ */


static const char *path_of(const char *name)
{
    snprintf(path_buf, sizeof path_buf, "%s/%s", tmpdir, name);
    return path_buf;
}

/* Writes text into the temporary directory; returns its path (valid until the next call). */
static const char *put(const char *name, const char *text, size_t len)
{
    const char *p = path_of(name);
    FILE *f = fopen(p, "wb");
    if (f) {
        fwrite(text, 1, len, f);
        fclose(f);
    }
    return p;
}

static const char *put_text(const char *name, const char *text)
{
    return put(name, text, strlen(text));
}

/* 1 when d holds an error whose message contains frag, whose file contains
 * file_frag (unless NULL) and at line:col (each unless negative). */
static int has_error(const bc_diag *d, const char *frag, const char *file_frag, int line, int col)
{
    for (int i = 0; i < d->n; i++) {
        const bc_diag_item *it = &d->items[i];
        if (it->severity == BC_ERROR && it->message && strstr(it->message, frag) &&
            (!file_frag || (it->file && strstr(it->file, file_frag))) &&
            (line < 0 || it->line == line) && (col < 0 || it->col == col))
            return 1;
    }
    return 0;
}

/* Prints the diagnostics (as comments) when a check is about to fail, to show what came instead. */
static void show(const bc_diag *d, int ok)
{
    if (ok)
        return;
    for (int i = 0; i < d->n; i++)
        printf("#   got: %s:%d:%d: %s\n", d->items[i].file ? d->items[i].file : "",
               (int)d->items[i].line, (int)d->items[i].col,
               d->items[i].message ? d->items[i].message : "");
}

/* Checks q against the greenhouse table, one check per pair, and the coverage. */
static void check_greenhouse_q(const bc_qtable *q, const char *what)
{
    char name[160];
    snprintf(name, sizeof name, "%s: reads", what);
    CHECK(q != NULL, name);
    if (!q)
        return;
    for (int p = 0; p < 7; p++) {
        snprintf(name, sizeof name, "%s: Q(%s) = %g", what, pair_label[p], greenhouse_q[p]);
        CHECK(q->q[p] == greenhouse_q[p], name);
    }
    snprintf(name, sizeof name, "%s: every state present, none missing", what);
    CHECK(q->present[0] && q->present[1] && q->present[2] && q->present[3] && q->n_missing == 0,
          name);
}

/* Reads a greenhouse Q-table that must be valid, checks it value by value. */
static void q_ok(const bc_model *m, const char *path, const char *what)
{
    bc_diag d;
    bc_diag_init(&d);
    bc_qtable *q = bc_read_qtable(path, m, BC_MISSING_ERROR, &d);
    show(&d, q != NULL);
    check_greenhouse_q(q, what);
    bc_qtable_free(q);
    bc_diag_free(&d);
}

/* An input that must be refused. */
typedef struct {
    int policy;            /* 1: read as a policy; 0: as a Q-table */
    const char *file;      /* written into the temporary directory; NULL: a make_agents.py file */
    const char *text;      /* the file's content, or the make_agents.py file's name */
    const char *frag;      /* part of the expected message */
    const char *file_frag; /* part of the message's file (a JSON path), or NULL */
    int line, col;         /* the expected position; -1: any */
    const char *name;
} bad_case;

/* Reads path, which must be refused with c's message at c's position. */
static void expect_bad(const bc_model *m, const char *path, const bad_case *c)
{
    bc_diag d;
    bc_diag_init(&d);
    bc_qtable *q = c->policy ? NULL : bc_read_qtable(path, m, BC_MISSING_ERROR, &d);
    bc_policy *p = c->policy ? bc_read_policy(path, m, BC_MISSING_ERROR, &d) : NULL;
    int ok = !q && !p && has_error(&d, c->frag, c->file_frag, c->line, c->col);
    show(&d, ok);
    CHECK(ok, c->name);
    bc_qtable_free(q);
    bc_policy_free(p);
    bc_diag_free(&d);
}

/* One check per case. */
static void run_bad(const bc_model *m, const bad_case *cases, size_t n)
{
    for (size_t k = 0; k < n; k++)
        expect_bad(m, cases[k].file ? put_text(cases[k].file, cases[k].text)
                                    : path_of(cases[k].text), &cases[k]);
}

/* A Q-table at path that must be refused with frag at line:col. */
static void q_bad(const bc_model *m, const char *path, const char *frag, int line, int col,
                  const char *name)
{
    bad_case c = {0, NULL, NULL, frag, NULL, line, col, name};
    expect_bad(m, path, &c);
}

/* Reads a policy that must be valid; NULL after a failed check. */
static bc_policy *policy_ok(const bc_model *m, const char *path, bc_missing_mode mode,
                            const char *what)
{
    bc_diag d;
    bc_diag_init(&d);
    bc_policy *p = bc_read_policy(path, m, mode, &d);
    show(&d, p != NULL);
    char name[160];
    snprintf(name, sizeof name, "%s: reads", what);
    CHECK(p != NULL, name);
    bc_diag_free(&d);
    return p;
}

/* Checks a policy's probabilities, one check per pair, against want[7]. */
static void check_probs(const bc_policy *p, const double *want, int deterministic,
                        const char *what)
{
    char name[160];
    if (!p)
        return;
    for (int k = 0; k < 7; k++) {
        snprintf(name, sizeof name, "%s: prob(%s) = %g", what, pair_label[k], want[k]);
        CHECK_NEAR(p->prob[k], want[k], 0, name);
    }
    snprintf(name, sizeof name, "%s: deterministic = %d", what, deterministic);
    CHECK(p->deterministic == deterministic, name);
}

/* cold->heat, mild->open, hot->shut. */
static const double greenhouse_policy[7] = {0, 1, 1, 0, 0, 1, 0};

/* ---- CSV Q-tables ------------------------------------------------------- */

static const char wide_csv[] =
    "state,open,shut,heat\n"
    "cold,,1.5,-0.25\n"
    "mild,2,3.125,\n"
    "hot,0.5,-4.75,-9\n"
    "wilted,,,\n";

static const char long_csv[] =
    "state,action,q\n"
    "cold,shut,1.5\n"
    "cold,heat,-0.25\n"
    "mild,open,2\n"
    "mild,shut,3.125\n"
    "hot,open,0.5\n"
    "hot,shut,-4.75\n"
    "hot,heat,-9\n";

static void test_csv_q_happy(const bc_model *m)
{
    q_ok(m, put_text("wide.csv", wide_csv), "csv wide");
    q_ok(m, put_text("wide-crlf.csv",
                     "\xEF\xBB\xBFstate,open,shut,heat\r\n"
                     "cold,,1.5,-0.25\r\n"
                     "\r\n"
                     "mild,2,3.125,\r\n"
                     "hot,0.5,-4.75,-9\r\n"),
         "csv wide, CRLF, BOM, blank line, terminal omitted");
    q_ok(m, put_text("wide-spaces.csv",
                     "state, heat ,\"open\",shut\n"
                     "  cold , -0.25 , , 1.5\n"
                     "\"mild\",nan,2,3.125\n"
                     "hot,-9,0.5,-4.75\n"
                     "wilted,0,0,0\n"),
         "csv wide, columns permuted, spaces, quotes, NaN cell, terminal zeros");
    q_ok(m, put_text("wide-exp.csv",
                     "state,open,shut,heat\n"
                     "cold,,15e-1,-2.5E-1\n"
                     "mild,+2.0,3125e-3,\n"
                     "hot,.5,-4.75,-9.000\n"),
         "csv wide, exponents and signs");
    q_ok(m, put_text("long.csv", long_csv), "csv long");
    q_ok(m, put_text("long-extra.csv",
                     "state,action,q\r\n"
                     "hot,heat,-9\r\n"
                     "cold,heat,-0.25\r\n"
                     "cold,open,\r\n"
                     "mild,shut,3.125\r\n"
                     "wilted,shut,0\r\n"
                     "cold,shut,1.5\r\n"
                     "mild,open,2\r\n"
                     "hot,open,0.5\r\n"
                     "mild,heat,nan\r\n"
                     "hot,shut,-4.75\r\n"),
         "csv long, shuffled, CRLF, empty and NaN for absent actions, terminal row 0");
}

static const bad_case csv_q_errors_bad[] = {
    {0, "e.csv", "state,open,shut,heat\nchilly,,1,2\n",
     "unknown state 'chilly'", NULL, 2, 1, "csv: unknown state, line 2 col 1"},
    {0, "e.csv", "state,open,shut,heat,vent\ncold,,1.5,-0.25,\n",
     "unknown action 'vent'", NULL, 1, 22, "csv: unknown action in the header, col 22"},
    {0, "e.csv", "state,open,shut\ncold,,1.5\n",
     "no column for action 'heat'", NULL, 1, -1, "csv: header lacks an action some state has"},
    {0, "e.csv", "state,open,shut,open,heat\n",
     "action 'open' has two columns", NULL, 1, 17, "csv: action with two columns"},
    {0, "e.csv", "st,open,shut,heat\ncold,,1.5,-0.25\n",
     "the first row must be the header", NULL, 1, 1, "csv: header not starting with state"},
    {0, "e.csv", "state\ncold\n",
     "the header names no action", NULL, 1, -1, "csv: header with no action"},
    {0, "e.csv", "state,open,shut,heat\ncold,,1.5,-0.25\nmild,2,3.125,\n",
     "state 'hot' is missing from the table", NULL, 0, 0, "csv: missing state is an error"},
    {0, "e.csv", "state,open,shut,heat\ncold,,1.5,-0.25\nmild,nan,3.125,\nhot,0.5,-4.75,-9\n",
     "state 'mild', action 'open': the cell is empty or NaN", NULL, 3, 6,
     "csv: NaN where the action exists, line 3 col 6"},
    {0, "e.csv", "state,open,shut,heat\ncold,,,-0.25\nmild,2,3.125,\nhot,0.5,-4.75,-9\n",
     "state 'cold', action 'shut': the cell is empty or NaN", NULL, 2, 7,
     "csv: empty cell where the action exists, line 2 col 7"},
    {0, "e.csv", "state,open,shut,heat\ncold,,1.5,-0.25\nmild,2,3.125,\nhot,0.5,inf,-9\n",
     "the Q-value inf is not finite", NULL, 4, 9, "csv: infinity, line 4 col 9"},
    {0, "e.csv", "state,open,shut,heat\ncold,4,1.5,-0.25\nmild,2,3.125,\nhot,0.5,-4.75,-9\n",
     "state 'cold' has no action 'open' in the model, but the table gives it the value 4",
     NULL, 2, 6, "csv: finite value where the model has no action, line 2 col 6"},
    {0, "e.csv", "state,open,shut,heat\ncold,0,1.5,-0.25\nmild,2,3.125,\nhot,0.5,-4.75,-9\n",
     "has no action 'open' in the model, but the table gives it the value 0", NULL, 2, 6,
     "csv: 0 where a non-terminal state has no action is an error too"},
    {0, "e.csv", "state,open,shut,heat\ncold,,1.5,-0.25\nmild,2,3.125,\nhot,0.5,-4.75,-9\n"
                 "wilted,,2,\n",
     "state 'wilted' is terminal, so its cells must be empty, NaN or 0; found 2", NULL, 5, 9,
     "csv: terminal state with a non-zero value, line 5 col 9"},
    {0, "e.csv", "state,open,shut,heat\ncold,,1.5,-0.25\nmild,2,3.125,\nhot,0.5,-4.75,-9\n"
                 "cold,,1.5,-0.25\n",
     "duplicate row for state 'cold' (first at line 2)", NULL, 5, 1,
     "csv wide: duplicate row, line 5"},
    {0, "e.csv", "state,open,shut,heat\ncold,,1.5,-0.25\nmild,2,3.125\nhot,0.5,-4.75,-9\n",
     "the row has 3 cells, the header has 4", NULL, 3, 13, "csv: too few cells, at row end"},
    {0, "e.csv", "state,open,shut,heat\ncold,,1.5,-0.25\nmild,2,3.125,,7\nhot,0.5,-4.75,-9\n",
     "the row has 5 cells, the header has 4", NULL, 3, 15,
     "csv: too many cells, at the first extra one"},
    {0, "e.csv", "state,open,shut,heat\ncold,,1.5,-0.25\nmild,2,3.125,\nhot,0.5x,-4.75,-9\n",
     "Q-value '0.5x' is not a number", NULL, 4, 5, "csv: trailing junk in a number"},
    {0, "e.csv", "state,open,shut,heat\ncold,,1.5,-0.25\nmild,2,3 .125,\nhot,0.5,-4.75,-9\n",
     "Q-value '3 .125' is not a number", NULL, 3, 8, "csv: space inside a number"},
    {0, "e.csv", "state,open,shut,heat\ncold,,1.5,-0.25\nmild,2,abc,\nhot,0.5,-4.75,-9\n",
     "Q-value 'abc' is not a number", NULL, 3, 8, "csv: a word for a number"},
    {0, "e.csv", "state,open,shut,heat\ncold,,\"1.5,-0.25\n",
     "a quote opens here but is not closed", NULL, 2, 7, "csv: unclosed quote"},
    {0, "e.csv", "",
     "the file is empty", NULL, 0, 0, "csv: empty file"},
    {0, "e.csv", " \r\n\n\t\n",
     "the file is empty", NULL, 0, 0, "csv: blank-only file"},
    {0, "e.csv", "state,action,q\ncold,shut,1.5\ncold,heat,-0.25\nmild,open,2\nmild,shut,3.125\n"
                 "hot,open,0.5\nhot,shut,-4.75\n",
     "state 'hot' has no Q-value for action 'heat'", NULL, 6, 1,
     "csv long: missing pair, reported at the state's first row"},
    {0, "e.csv", "state,action,q\ncold,shut,1.5\ncold,heat,-0.25\nmild,open,2\nmild,shut,3.125\n"
                 "cold,shut,1.5\nhot,open,0.5\nhot,shut,-4.75\nhot,heat,-9\n",
     "duplicate entry for state 'cold', action 'shut' (first at line 2)", NULL, 6, 1,
     "csv long: duplicate pair row"},
    {0, "e.csv", "state,action,q\ncold,open,\ncold,shut,1.5\ncold,heat,-0.25\nmild,open,2\n"
                 "mild,shut,3.125\nhot,open,0.5\nhot,shut,-4.75\nhot,heat,-9\ncold,open,nan\n",
     "duplicate entry for state 'cold', action 'open' (first at line 2)", NULL, 10, 1,
     "csv long: duplicate row for an absent action"},
    {0, "e.csv", "state,action,q\ncold,shut,1.5\ncold,stop,1\n",
     "unknown action 'stop'", NULL, 3, 6, "csv long: unknown action"},
    {0, "e.csv", "state,action,q\ncold,shut\n",
     "the row has 2 cells, the header has 3", NULL, 2, 10, "csv long: too few cells"},
    {0, "e.csv", "state,action,q\ncold,shut,1.5\ncold,heat,-0.25\nmild,open,2\nmild,shut,3.125\n"
                 "hot,open,0.5\nhot,shut,-4.75\nhot,heat,NaN\n",
     "state 'hot', action 'heat': the cell is empty or NaN", NULL, 8, 10,
     "csv long: NaN for an existing pair, line 8 col 10"},
};

static void test_csv_q_errors(const bc_model *m)
{
    run_bad(m, csv_q_errors_bad, sizeof csv_q_errors_bad / sizeof csv_q_errors_bad[0]);
}

/* A missing state under BC_MISSING_SKIP: present 0, counted, its Q-values NaN. */
static void test_csv_q_skip(const bc_model *m)
{
    bc_diag d;
    bc_diag_init(&d);
    const char *path = put_text("skip.csv", "state,open,shut,heat\ncold,,1.5,-0.25\n"
                                            "hot,0.5,-4.75,-9\n");
    bc_qtable *q = bc_read_qtable(path, m, BC_MISSING_SKIP, &d);
    show(&d, q != NULL);
    CHECK(q != NULL, "skip: a table without mild reads");
    if (q) {
        CHECK(q->n_missing == 1, "skip: n_missing = 1");
        CHECK(q->present[0] == 1 && q->present[1] == 0 && q->present[2] == 1 && q->present[3] == 1,
              "skip: present = 1 0 1 1 (terminal wilted present)");
        CHECK(isnan(q->q[2]) && isnan(q->q[3]), "skip: mild's Q-values are NaN");
        CHECK(q->q[0] == 1.5 && q->q[6] == -9, "skip: cold/shut 1.5, hot/heat -9");
    }
    bc_qtable_free(q);
    bc_diag_free(&d);
    /* An all-empty row marks the state as not covered, too. */
    bc_diag_init(&d);
    path = put_text("skip2.csv", "state,open,shut,heat\ncold,,1.5,-0.25\nmild,,,\n"
                                 "hot,0.5,-4.75,-9\n");
    q = bc_read_qtable(path, m, BC_MISSING_SKIP, &d);
    CHECK(q && q->n_missing == 1 && q->present[1] == 0, "skip: an all-empty row is not covered");
    bc_qtable_free(q);
    bc_diag_free(&d);
    q_bad(m, path, "the row of state 'mild' holds no value", 3, 1,
          "csv: an all-empty row is an error without skip");
}

/* ---- JSON Q-tables ------------------------------------------------------ */

/* The rows of mild and hot of a valid JSON Q-table, for error cases about cold. */
#define OK_REST                                                                            \
    "\"mild\": {\"open\": 2, \"shut\": 3.125}, "                                          \
    "\"hot\": {\"heat\": -9, \"shut\": -4.75, \"open\": 0.5}"

static const bad_case json_q_bad[] = {
    {0, "e.json", "{\"q\": {\"cold\": {\"shut\": 1.5}, " OK_REST "}}",
     "state 'cold' has no Q-value for action 'heat'", "e.json:q.cold", 0, 0,
     "json: missing action, path q.cold"},
    {0, "e.json", "{\"q\": {\"cold\": {\"shut\": \"1.5\", \"heat\": 1}, " OK_REST "}}",
     "expected a number or null, found the string \"1.5\"", "e.json:q.cold.shut", 0, 0,
     "json: a string for a number, path q.cold.shut"},
    {0, "e.json", "{\"q\": {\"cold\": {\"shut\": 1, \"heat\": 1, \"shut\": 2}, " OK_REST "}}",
     "duplicate entry for state 'cold', action 'shut'", "e.json:q.cold.shut", 0, 0,
     "json: duplicate key"},
    {0, "e.json", "{\"q\": {\"cold\": {\"shut\": 1, \"heat\": 1}, \"cold\": {\"shut\": "
                  "1, \"heat\": 1}, " OK_REST "}}",
     "duplicate row for state 'cold'", "e.json:q.cold", 0, 0, "json: duplicate state"},
    {0, "e.json", "{\"q\": {\"cold\": {\"shut\": 1, \"heat\": 1, \"vent\": 2}, " OK_REST "}}",
     "unknown action 'vent'", "e.json:q.cold.vent", 0, 0, "json: unknown action"},
    {0, "e.json", "{\"q\": {\"cold\": {\"shut\": 1, \"heat\": 1, \"open\": 3}, " OK_REST "}}",
     "state 'cold' has no action 'open' in the model", "e.json:q.cold.open", 0, 0,
     "json: value for an absent action"},
    {0, "e.json", "{\"q\": {\"cold\": {\"shut\": 1, \"heat\": 1}, \"chilly\": {}, " OK_REST "}}",
     "unknown state 'chilly'", "e.json:q.chilly", 0, 0, "json: unknown state"},
    {0, "e.json", "{\"q\": {\"cold\": {\"shut\": 1, \"heat\": 1}}}",
     "state 'mild' is missing from the table", NULL, 0, 0, "json: missing state"},
    {0, "e.json", "{\"q\": {\"cold\": {\"shut\": 1,\n  \"heat\": NaN}}}",
     "JSON has no NaN", NULL, 2, 11, "json: NaN token, with a hint, line 2 col 11"},
    {0, "e.json", "{\"q\": {\"cold\": {\"shut\": 1\n  \"heat\": 2}}}",
     "JSON syntax error", NULL, 2, -1, "json: syntax error on line 2"},
    {0, "e.json", "{\"q\": {\"cold\": {\"shut\": 1",
     "ends too early", NULL, -1, -1, "json: truncated document"},
    {0, "e.json", "{\"policy\": {\"cold\": \"heat\"}}",
     "this looks like a policy, not a Q-table", NULL, 0, 0, "json: a policy given as a Q-table"},
    {0, "e.json", "{\"q\": [1, 2]}",
     "\"q\" must be an object", NULL, 0, 0, "json: q not an object"},
    {0, "e.json", "{\"q\": {}} x",
     "text after the end of the JSON document", NULL, 1, 11, "json: trailing text"},
};

static void test_json_q(const bc_model *m)
{
    q_ok(m, put_text("q.json",
                     "{\"q\": {\"cold\": {\"open\": null, \"shut\": 1.5, \"heat\": -0.25},\n"
                     "        \"mild\": {\"open\": 2, \"shut\": 3.125},\n"
                     "        \"hot\": {\"heat\": -9, \"shut\": -4.75, \"open\": 0.5},\n"
                     "        \"wilted\": null}}\n"),
         "json");
    q_ok(m, put_text("q2.json",
                     "\xEF\xBB\xBF  {\"q\": {\"hot\": {\"open\": 5e-1, \"shut\": -4.75, "
                     "\"heat\": -9.0},"
                     " \"cold\": {\"shut\": 1.5, \"heat\": -0.25}, \"wilted\": {\"open\": 0},"
                     " \"mild\": {\"open\": 2.0, \"shut\": 3.125, \"heat\": null}}}"),
         "json, byte-order mark, other order, terminal 0");
    run_bad(m, json_q_bad, sizeof json_q_bad / sizeof json_q_bad[0]);
}

/* ---- NPY Q-tables ------------------------------------------------------- */

static const bad_case npy_q_bad[] = {
    {0, NULL, "q_truncated.npy",
     "the file is truncated: the header's shape (4, 3) of '<f8' needs 96 "
     "bytes of data, the file holds 91", NULL, 0, 0, "npy: truncated file"},
    {0, NULL, "q_longer.npy",
     "the file holds 104 bytes of data, but the header's shape (4, 3) of "
     "'<f8' accounts for only 96", NULL, 0, 0, "npy: data longer than the shape"},
    {0, NULL, "q_bigshape.npy",
     "the file is truncated: the header's shape (5, 3) of '<f8' needs 120 "
     "bytes of data, the file holds 96", NULL, 0, 0, "npy: header claiming a larger shape"},
    {0, NULL, "q_wrongshape.npy",
     "wrong shape: expected (4, 3) (states, actions of the model), found (4, 2)", NULL, 0, 0,
     "npy: wrong shape, expected vs found"},
    {0, NULL, "q_1d.npy",
     "expected (4, 3) (states, actions of the model), found (4,)", NULL, 0, 0,
     "npy: one-dimensional Q-table"},
    {0, NULL, "q_c16.npy",
     "unsupported dtype '<c16'", NULL, 0, 0, "npy: complex dtype"},
    {0, NULL, "q_f2.npy",
     "unsupported dtype '<f2'", NULL, 0, 0, "npy: float16 dtype"},
    {0, NULL, "q_bool.npy",
     "unsupported dtype '|b1'", NULL, 0, 0, "npy: bool dtype"},
    {0, NULL, "pol_struct.npy",
     "structured dtypes", NULL, 0, 0, "npy: structured dtype"},
    {0, NULL, "q_nan_pair.npy",
     "state 'hot', action 'shut': the cell is empty or NaN", NULL, 3, 2,
     "npy: NaN where the action exists, element (3, 2)"},
    {0, NULL, "q_inf_pair.npy",
     "state 'cold', action 'heat': the Q-value inf is not finite", NULL, 1, 3,
     "npy: infinity, element (1, 3)"},
    {0, NULL, "q_value_nonpair.npy",
     "state 'cold' has no action 'open' in the model, but the table gives it the value 7",
     NULL, 1, 1, "npy: value where no action"},
    {0, NULL, "q_terminal_nonzero.npy",
     "state 'wilted' is terminal", NULL, 4, 2, "npy: terminal state with a non-zero value"},
    {0, NULL, "q_i4.npy",
     "state 'cold' has no action 'open' in the model, but the table gives it the value 0",
     NULL, 1, 1, "npy: integer Q-table cannot mark absent actions"},
    {0, NULL, "q_missing_row.npy",
     "the row of state 'hot' holds no value", NULL, 3, 1,
     "npy: an all-NaN row is an error without skip"},
};

static void test_npy_q(const bc_model *m, const bc_model *lamps)
{
    q_ok(m, path_of("q_f8.npy"), "npy float64");
    q_ok(m, path_of("q_f4.npy"), "npy float32");
    q_ok(m, path_of("q_f8_big.npy"), "npy big-endian >f8");
    q_ok(m, path_of("q_fortran.npy"), "npy Fortran order");
    q_ok(m, path_of("q_v2.npy"), "npy format version 2.0");
    q_ok(m, path_of("q_v3.npy"), "npy format version 3.0");
    q_ok(m, path_of("q_terminal_zero.npy"), "npy terminal row of zeros");

    /* Integer Q-tables on a model where every state has every action. */
    static const struct { const char *file; double q[4]; } ints[] = {
        {"lamps_i2_big.npy", {3, -2, -7, 100}},
        {"lamps_u1.npy", {3, 2, 7, 255}},
        {"lamps_u8.npy", {1, 2, 3, 1099511627776.0}},
    };
    for (size_t k = 0; k < sizeof ints / sizeof ints[0]; k++) {
        bc_diag d;
        bc_diag_init(&d);
        bc_qtable *q = lamps ? bc_read_qtable(path_of(ints[k].file), lamps, BC_MISSING_ERROR, &d)
                             : NULL;
        show(&d, q != NULL);
        char name[128];
        for (int p = 0; p < 4; p++) {
            snprintf(name, sizeof name, "npy %s: Q[%d] = %.0f", ints[k].file, p, ints[k].q[p]);
            CHECK(q && q->q[p] == ints[k].q[p], name);
        }
        bc_qtable_free(q);
        bc_diag_free(&d);
    }

    run_bad(m, npy_q_bad, sizeof npy_q_bad / sizeof npy_q_bad[0]);

    bc_diag d;
    bc_diag_init(&d);
    bc_qtable *q = bc_read_qtable(path_of("q_missing_row.npy"), m, BC_MISSING_SKIP, &d);
    CHECK(q && q->n_missing == 1 && q->present[2] == 0 && isnan(q->q[4]) && q->q[2] == 2.0,
          "npy skip: an all-NaN row leaves the state out");
    bc_qtable_free(q);
    bc_diag_free(&d);
}

/* Hand-made NPY headers NumPy would not write. */
static void test_npy_headers(const bc_model *m)
{
    static const char v4[] = "\x93NUMPY\x04\x00\x10\x00{'descr': '<f8'}";
    q_bad(m, put("v4.npy", v4, sizeof v4 - 1), "format version 4.0 is not read", 0, 0,
          "npy: version 4.0 refused");
    static const char key[] = "\x93NUMPY\x01\x00\x40\x00{'descr': '<f8', 'fortran_order': False, "
                              "'shape': (0,), 'x': 1}\n";
    q_bad(m, put("key.npy", key, sizeof key - 1), "unknown key 'x'", 0, 0,
          "npy: unknown header key");
    static const char nokey[] = "\x93NUMPY\x01\x00\x22\x00{'descr': '<f8', 'shape': (0,), }\n";
    q_bad(m, put("nokey.npy", nokey, sizeof nokey - 1), "needs 'descr', 'fortran_order' and "
          "'shape'", 0, 0, "npy: header without fortran_order");
    static const char past[] = "\x93NUMPY\x01\x00\xff\x00{'descr': '<f8'";
    q_bad(m, put("past.npy", past, sizeof past - 1), "runs past the end of the file", 0, 0,
          "npy: header length past the end");
    static const char le_pipe[] = "\x93NUMPY\x01\x00\x3a\x00{'descr': '|f8', 'fortran_order': "
                                  "False, 'shape': (0,), }\n";
    q_bad(m, put("pipe.npy", le_pipe, sizeof le_pipe - 1), "unsupported dtype '|f8'", 0, 0,
          "npy: '|' byte order on an 8-byte type");
}

/* ---- policies ----------------------------------------------------------- */

static void test_policy_happy(const bc_model *m)
{
    const char *path = put_text("p.csv", "state,action\ncold,heat\nmild,open\nhot,shut\n");
    bc_policy *p = policy_ok(m, path, BC_MISSING_ERROR, "policy csv");
    check_probs(p, greenhouse_policy, 1, "policy csv");
    bc_policy_free(p);

    p = policy_ok(m, put_text("p2.csv", "state,action\r\nwilted,open\r\nhot, shut\r\n"
                                        "\"mild\",open\r\ncold,heat\r\n"),
                  BC_MISSING_ERROR, "policy csv, CRLF, terminal listed");
    check_probs(p, greenhouse_policy, 1, "policy csv, CRLF, terminal listed");
    CHECK(p && p->present[3] == 1 && p->n_missing == 0,
          "policy csv: terminal present, none missing");
    bc_policy_free(p);

    /* A stochastic table whose cold row sums to 1 + 5e-10 (within 1e-9): divided by its sum. */
    p = policy_ok(m, put_text("ps.csv", "state,action,prob\ncold,shut,0.25\n"
                                        "cold,heat,0.7500000005\nmild,open,1\nhot,open,0.5\n"
                                        "hot,shut,0.5\nhot,heat,0\nmild,heat,0\nwilted,open,1\n"),
                  BC_MISSING_ERROR, "policy csv stochastic");
    static const double sto[7] = {0.25 / 1.0000000005, 0.7500000005 / 1.0000000005, 1, 0, 0.5,
                                  0.5, 0};
    check_probs(p, sto, 0, "policy csv stochastic");
    bc_policy_free(p);

    p = policy_ok(m, put_text("pd.csv", "state,action,prob\ncold,heat,1\nmild,open,1\n"
                                        "hot,shut,1\nhot,open,0\n"),
                  BC_MISSING_ERROR, "policy csv stochastic, all 0/1");
    check_probs(p, greenhouse_policy, 1, "policy csv stochastic, all 0/1");
    bc_policy_free(p);

    p = policy_ok(m, put_text("p.json", "{\"policy\": {\"cold\": \"heat\", \"mild\": \"open\", "
                                        "\"hot\": \"shut\", \"wilted\": null}}"),
                  BC_MISSING_ERROR, "policy json");
    check_probs(p, greenhouse_policy, 1, "policy json");
    bc_policy_free(p);

    p = policy_ok(m, put_text("p2.json", "{\"policy\": {\"cold\": {\"shut\": 0.25, \"heat\": 0.75},"
                                         " \"mild\": \"open\", \"hot\": {\"open\": 0.5, "
                                         "\"shut\": 0.5, \"heat\": 0}}}"),
                  BC_MISSING_ERROR, "policy json stochastic, mixed forms");
    static const double sto2[7] = {0.25, 0.75, 1, 0, 0.5, 0.5, 0};
    check_probs(p, sto2, 0, "policy json stochastic, mixed forms");
    bc_policy_free(p);

    static const char *const npy[] = {"pol_i4.npy", "pol_u1.npy", "pol_i8_big.npy", "pol_i1.npy"};
    for (size_t k = 0; k < sizeof npy / sizeof npy[0]; k++) {
        char what[64];
        snprintf(what, sizeof what, "policy %s", npy[k]);
        p = policy_ok(m, path_of(npy[k]), BC_MISSING_ERROR, what);
        check_probs(p, greenhouse_policy, 1, what);
        bc_policy_free(p);
    }
}

/* What `solve` writes (bc_write_policy_csv) reads back as the same policy. */
static void test_policy_round_trip(const bc_model *m)
{
    int64_t chosen[4] = {1, 2, 5, -1};
    bc_solution sol;
    bc_solution_init(&sol);
    sol.policy = chosen;
    const char *path = path_of("solved.csv");
    FILE *f = fopen(path, "w");
    int rc = f ? bc_write_policy_csv(f, m, &sol) : -1;
    if (f)
        fclose(f);
    CHECK(rc == 0, "round trip: bc_write_policy_csv writes");
    bc_policy *p = policy_ok(m, path, BC_MISSING_ERROR, "round trip of solve's policy CSV");
    check_probs(p, greenhouse_policy, 1, "round trip of solve's policy CSV");
    bc_policy_free(p);
}

static const bad_case policy_errors_bad[] = {
    {1, "e.csv", "state,action\ncold,open\nmild,open\nhot,shut\n",
     "action 'open' is not allowed in state 'cold'", NULL, 2, 6,
     "policy csv: action the state lacks"},
    {1, "e.csv", "state,action\ncold,heat\nmild,open\ncold,heat\nhot,shut\n",
     "duplicate row for state 'cold' (first at line 2)", NULL, 4, 1, "policy csv: duplicate row"},
    {1, "e.csv", "state,action\ncold,heat\nhot,shut\n",
     "state 'mild' is missing from the table", NULL, 0, 0, "policy csv: missing state"},
    {1, "e.csv", "state,action\ncold,heat\nmild,open\nhot,vent\n",
     "unknown action 'vent'", NULL, 4, 5, "policy csv: unknown action"},
    {1, "e.csv", "state,action\ncold,heat,1\n",
     "the row has 3 cells, the header has 2", NULL, 2, 11, "policy csv: extra cell"},
    {1, "e.csv", "state,up,down\ncold,1,2\n",
     "a policy's header is 'state,action' or 'state,action,prob', not 'state,up,down'", NULL, 1, 1,
     "policy csv: a Q-table's header"},
    {1, "e.csv", "",
     "the file is empty", NULL, 0, 0, "policy: empty file"},
    {1, "e.csv", "state,action,prob\ncold,shut,0.25\ncold,heat,0.5\nmild,open,1\nhot,shut,1\n",
     "the probabilities of state 'cold' sum to 0.75, not 1", NULL, 2, 1,
     "policy csv: probabilities summing to 0.75"},
    {1, "e.csv", "state,action,prob\ncold,shut,0.5\ncold,heat,0.500000002\nmild,open,1\n"
                 "hot,shut,1\n",
     "sum to 1.000000002", NULL, 2, 1, "policy csv: a sum 2e-9 off is beyond the tolerance"},
    {1, "e.csv", "state,action,prob\ncold,shut,-0.25\ncold,heat,1.25\nmild,open,1\nhot,shut,1\n",
     "the probability -0.25 is negative", NULL, 2, 11, "policy csv: negative probability"},
    {1, "e.csv", "state,action,prob\ncold,heat,1\nmild,open,1\nhot,shut,1\ncold,heat,1\n",
     "duplicate entry for state 'cold', action 'heat' (first at line 2)", NULL, 5, 1,
     "policy csv: duplicate stochastic row"},
    {1, "e.csv", "state,action,prob\ncold,heat,1\nmild,open,1\nhot,shut,1\ncold,open,0.5\n",
     "action 'open' is not allowed in state 'cold' (the model has no such "
     "pair), but the policy gives it probability 0.5", NULL, 5, 11,
     "policy csv: probability on an action the state lacks"},
    {1, "e.csv", "state,action,prob\ncold,heat,1\nmild,open,\nhot,shut,1\n",
     "the probability is missing", NULL, 3, 11, "policy csv: empty probability"},
    {1, "e.csv", "state,action,prob\ncold,heat,1\nmild,open,one\nhot,shut,1\n",
     "probability 'one' is not a number", NULL, 3, 11, "policy csv: unparsable probability"},
    {1, "e.json", "{\"policy\": {\"cold\": \"heat\", \"mild\": \"open\", \"hot\": "
                  "{\"open\": 0.5}}}",
     "the probabilities of state 'hot' sum to 0.5, not 1", "e.json:policy.hot", 0, 0,
     "policy json: sum reported at the state's path"},
    {1, "e.json", "{\"policy\": {\"cold\": \"heat\", \"mild\": \"vent\", \"hot\": \"shut\"}}",
     "unknown action 'vent'", "e.json:policy.mild", 0, 0, "policy json: unknown action"},
    {1, "e.json", "{\"policy\": {\"cold\": 2, \"mild\": \"open\", \"hot\": \"shut\"}}",
     "expected an action name, an object {action: probability} or null, found the number 2",
     "e.json:policy.cold", 0, 0, "policy json: a number for an action"},
    {1, "e.json", "{\"q\": {}}",
     "this looks like a Q-table, not a policy", NULL, 0, 0,
     "policy json: a Q-table given as a policy"},
    {1, NULL, "pol_f8.npy",
     "integer action indices; this one has the float dtype '<f8'", NULL, 0, 0,
     "policy npy: float dtype"},
    {1, NULL, "pol_range.npy",
     "state 'hot': action index 5 is out of range (the model has 3 actions)", NULL, 3, 1,
     "policy npy: index out of range"},
    {1, NULL, "pol_notallowed.npy",
     "action 'open' is not allowed in state 'cold'", NULL, 1, 1,
     "policy npy: action the state lacks"},
    {1, NULL, "pol_missing.npy",
     "the row of state 'mild' holds no value", NULL, 2, 1,
     "policy npy: -1 for a non-terminal state is an error without skip"},
    {1, NULL, "pol_shape.npy",
     "wrong shape: expected (4,) (one action index per state of the model), found (4, 1)",
     NULL, 0, 0, "policy npy: wrong shape"},
};

static void test_policy_errors(const bc_model *m)
{
    run_bad(m, policy_errors_bad, sizeof policy_errors_bad / sizeof policy_errors_bad[0]);

    bc_policy *p = policy_ok(m, path_of("pol_missing.npy"), BC_MISSING_SKIP, "policy npy skip");
    CHECK(p && p->n_missing == 1 && p->present[1] == 0 && p->prob[2] == 0 && p->prob[3] == 0 &&
              p->prob[1] == 1,
          "policy npy skip: mild not covered, its probabilities 0");
    bc_policy_free(p);
    p = policy_ok(m, put_text("skip.csv", "state,action\ncold,heat\nhot,shut\nmild,\n"),
                  BC_MISSING_SKIP, "policy csv skip");
    CHECK(p && p->n_missing == 1 && p->present[1] == 0 && p->present[0] == 1,
          "policy csv skip: an empty action leaves the state out");
    bc_policy_free(p);
}

/* ---- allocation ---------------------------------------------------------- */

static void test_alloc(const bc_model *m)
{
    bc_qtable *q = bc_qtable_alloc(m);
    bc_policy *p = bc_policy_alloc(m);
    CHECK(q && q->q[0] == 0 && q->q[6] == 0 && q->present[0] && q->present[3] && q->n_missing == 0,
          "bc_qtable_alloc: values 0, every state present");
    CHECK(p && p->prob[0] == 0 && p->prob[6] == 0 && p->present[1] && p->n_missing == 0,
          "bc_policy_alloc: values 0, every state present");
    bc_qtable_free(q);
    bc_policy_free(p);
    bc_qtable_free(NULL);
    bc_policy_free(NULL);
    CHECK(1, "free functions accept NULL");
}

/* Runs NumPy's writer into tmpdir; 1 on success. */
static int make_npy_files(void)
{
    /* The script sits at tests/tools/ beside this file's tests/unit/. */
    char script[1024], cmd[2300];
    snprintf(script, sizeof script, "%s", __FILE__);
    char *cut = strstr(script, "unit/test_agent_read.c");
    if (!cut)
        return 0;
    strcpy(cut, "tools/make_agents.py");
    snprintf(cmd, sizeof cmd, "/usr/bin/python3 '%s' '%s'", script, tmpdir);
    return system(cmd) == 0;
}

int main(void)
{
    if (!mkdtemp(tmpdir)) {
        CHECK(0, "a temporary directory");
        UNIT_DONE();
    }
    bc_model *m = unit_read_model(greenhouse_text);
    bc_model *lamps = unit_read_model(lamps_text);
    CHECK(m && m->n_pairs == 7 && m->n_states == 4 && m->terminal[3], "greenhouse model reads");
    CHECK(lamps && lamps->n_pairs == 4, "lamps model reads");
    if (!m) {
        UNIT_DONE();
    }
    CHECK(make_npy_files(), "/usr/bin/python3 with numpy writes the NPY test files");
    test_alloc(m);
    test_csv_q_happy(m);
    test_csv_q_errors(m);
    test_csv_q_skip(m);
    test_json_q(m);
    test_npy_q(m, lamps);
    test_npy_headers(m);
    test_policy_happy(m);
    test_policy_round_trip(m);
    test_policy_errors(m);
    bc_model_free(m);
    bc_model_free(lamps);
    char cmd[256];
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", tmpdir);
    if (system(cmd) != 0)
        printf("# could not remove %s\n", tmpdir);
    UNIT_DONE();
}
