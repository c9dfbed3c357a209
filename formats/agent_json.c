/* agent_json.c — reads Q-tables {"q": {state: {action: value}}} and policies {"policy": {state: action}} from JSON. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Forms read (cJSON parses the whole document):
 *   {"q": {"s": {"a": 1.5, "b": null}, ...}}         null: the state lacks the action
 *   {"policy": {"s": "a", ...}}                       deterministic
 *   {"policy": {"s": {"a": 0.25, "b": 0.75}, ...}}    stochastic (forms may mix per state)
 * A state whose value is null (or {}, or holds only nulls) is not covered.
 * cJSON keeps no positions, so problems inside the document are located by a
 * path put after the file label ("q.json:q.hot.open"); syntax errors get a
 * line and column.  JSON has no NaN: Python's json.dump writes a bare NaN,
 * which is refused with a hint to write null.
 */
#include "agent_internal.h"
#include "json_internal.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include <cjson/cJSON.h>

/* Room for "label:top.state.action" with the names cut to 300 bytes each. */
#define WHERE_MAX 4800

/* The position of top.state(.action) in the document. */
static bc__at json_at(const bc__agent_reader *r, char *buf, const char *state, const char *action)
{
    if (action)
        snprintf(buf, WHERE_MAX, "%.4000s:%s.%.300s.%.300s", r->label, r->json_top, state, action);
    else
        snprintf(buf, WHERE_MAX, "%.4000s:%s.%.300s", r->label, r->json_top, state);
    return (bc__at){buf, 0, 0};
}


/* ---- the document -------------------------------------------------------- */

/* Reports a syntax problem at byte offset off as label:line:col. */
static int syntax_fail(bc__agent_reader *r, const char *buf, size_t len, size_t off,
                       const char *what)
{
    int32_t line, col;
    bc__json_line_col(buf, len, off, &line, &col);
    return bc__fail(r, (bc__at){r->label, line, col}, "%s", what);
}

/* Parses buf[0..len) whole; NULL after reporting. */
static cJSON *parse_document(bc__agent_reader *r, const char *buf, size_t len)
{
    size_t off;
    const char *why;
    cJSON *root = bc__json_parse_whole(buf, len, &off, &why);
    if (root)
        return root;
    const char *at = buf + off;
    size_t rest = len - off;
    if ((rest >= 3 && memcmp(at, "NaN", 3) == 0) || (rest >= 8 && memcmp(at, "Infinity", 8) == 0) ||
        (rest >= 9 && memcmp(at, "-Infinity", 9) == 0))
        why = "JSON has no NaN or Infinity: write null for an action the state does not have";
    syntax_fail(r, buf, len, off, why);
    return NULL;
}

/* The object under the one top-level key r->json_top; NULL after reporting. */
static const cJSON *top_object(bc__agent_reader *r, const cJSON *root)
{
    const char *other = strcmp(r->json_top, "q") == 0 ? "policy" : "q";
    const cJSON *top = NULL;
    char fb[96];
    bc__at at = {r->label, 0, 0};
    if (!cJSON_IsObject(root)) {
        bc__fail(r, at, "expected a JSON object {\"%s\": ...}, found %s", r->json_top,
                 bc__json_found(root, fb, sizeof fb));
        return NULL;
    }
    int bad = 0;
    for (const cJSON *item = root->child; item; item = item->next) {
        if (strcmp(item->string, r->json_top) != 0)
            bad = bc__fail(r, at, "unknown key \"%.60s\" (the file holds only \"%s\")%s",
                           item->string, r->json_top, strcmp(item->string, other) == 0
                           ? (other[0] == 'q' ? ": this looks like a Q-table, not a policy"
                                              : ": this looks like a policy, not a Q-table")
                           : "");
        else if (top)
            bad = bc__fail(r, at, "the key \"%s\" appears twice", r->json_top);
        else
            top = item;
    }
    if (bad)
        return NULL;
    if (!top)
        bc__fail(r, at, "no \"%s\" key: expected {\"%s\": {state: ...}}", r->json_top,
                 r->json_top);
    else if (!cJSON_IsObject(top))
        bc__fail(r, at, "\"%s\" must be an object {state: ...}, found %s", r->json_top,
                 bc__json_found(top, fb, sizeof fb));
    else
        return top;
    return NULL;
}

/* 1 when v is null, or an object holding nothing but nulls. */
static int holds_no_value(const cJSON *v)
{
    if (cJSON_IsNull(v))
        return 1;
    if (!cJSON_IsObject(v))
        return 0;
    for (const cJSON *c = v->child; c; c = c->next)
        if (!cJSON_IsNull(c))
            return 0;
    return 1;
}

/* Starts the state named by item's key: its index, or -1 when the rest of it is to be skipped. */
static int32_t begin_state(bc__agent_reader *r, const cJSON *item, char *where)
{
    bc__at at = json_at(r, where, item->string, NULL);
    int32_t s = bc__state_of(r, item->string, strlen(item->string), at);
    if (s < 0 || bc__row_begin(r, s, at) < 0)
        return -1;
    if (holds_no_value(item)) {
        bc__row_empty(r, s, at);
        return -1;
    }
    return s;
}

/* The action named by cell's key in state s, given once; -1 after reporting. */
static int32_t cell_action(bc__agent_reader *r, int32_t s, const cJSON *item, const cJSON *cell,
                           char *where)
{
    bc__at at = json_at(r, where, item->string, cell->string);
    int32_t a = bc__action_of(r, cell->string, strlen(cell->string), at);
    if (a < 0 || bc__cell_once(r, s, a, at) < 0) {
        bc__state_bad(r, s);
        return -1;
    }
    return a;
}

/* Runs state_fn on each state of the top object of buf; 0, or -1 when reading stopped. */
static int read_document(bc__agent_reader *r, const char *buf, size_t len,
                         void (*state_fn)(bc__agent_reader *, const cJSON *))
{
    if (len >= 3 && memcmp(buf, "\xEF\xBB\xBF", 3) == 0) { /* a byte-order mark: cJSON refuses it */
        buf += 3;
        len -= 3;
    }
    size_t deep = bc__json_depth_excess(buf, len);
    if (deep < len) {
        char msg[96];
        snprintf(msg, sizeof msg, "JSON nested more than %d levels deep (a Q-table or policy "
                 "needs 3)", BC__JSON_MAX_DEPTH);
        syntax_fail(r, buf, len, deep, msg);
        return -1;
    }
    size_t nul = bc__json_nul_in_string(buf, len);
    if (nul < len) {
        syntax_fail(r, buf, len, nul, "a JSON string holds the NUL character \\u0000; no state "
                    "or action name may contain one");
        return -1;
    }
    cJSON *root = parse_document(r, buf, len);
    if (!root)
        return -1;
    const cJSON *top = top_object(r, root);
    for (const cJSON *item = top ? top->child : NULL; item && !bc__full(r); item = item->next)
        state_fn(r, item);
    int rc = top && !bc__full(r) ? 0 : -1;
    cJSON_Delete(root);
    return rc;
}

/* ---- Q-tables ------------------------------------------------------------ */

static void q_state(bc__agent_reader *r, const cJSON *item)
{
    char where[WHERE_MAX], fb[96];
    int32_t s = begin_state(r, item, where);
    if (s < 0)
        return;
    if (!cJSON_IsObject(item)) {
        bc__state_bad(r, s);
        bc__fail(r, json_at(r, where, item->string, NULL), "expected an object {action: "
                 "Q-value}, found %s", bc__json_found(item, fb, sizeof fb));
        return;
    }
    for (const cJSON *cell = item->child; cell; cell = cell->next) {
        int32_t a = cell_action(r, s, item, cell, where);
        if (a < 0)
            continue;
        bc__at at = json_at(r, where, item->string, cell->string);
        if (cJSON_IsNumber(cell) || cJSON_IsNull(cell)) {
            bc__q_value(r, s, a, cJSON_IsNull(cell) ? NAN : cell->valuedouble, at);
        } else {
            bc__state_bad(r, s);
            bc__fail(r, at, "expected a number or null, found %s", bc__json_found(cell, fb, sizeof fb));
        }
    }
}

int bc__read_json_qtable(bc__agent_reader *r, const char *buf, size_t len)
{
    return read_document(r, buf, len, q_state);
}

/* ---- policies ------------------------------------------------------------ */

/* {action: probability, ...} of state s. */
static void policy_probs(bc__agent_reader *r, int32_t s, const cJSON *item, char *where)
{
    char fb[96];
    for (const cJSON *cell = item->child; cell; cell = cell->next) {
        int32_t a = cell_action(r, s, item, cell, where);
        if (a < 0)
            continue;
        bc__at at = json_at(r, where, item->string, cell->string);
        if (cJSON_IsNumber(cell)) {
            bc__policy_prob(r, s, a, cell->valuedouble, at);
        } else {
            bc__state_bad(r, s);
            bc__fail(r, at, "expected a probability, found %s", bc__json_found(cell, fb, sizeof fb));
        }
    }
}

static void policy_state(bc__agent_reader *r, const cJSON *item)
{
    char where[WHERE_MAX], fb[96];
    int32_t s = begin_state(r, item, where);
    if (s < 0)
        return;
    bc__at at = json_at(r, where, item->string, NULL);
    if (cJSON_IsObject(item)) {
        policy_probs(r, s, item, where);
    } else if (cJSON_IsString(item)) {
        int32_t a = bc__action_of(r, item->valuestring, strlen(item->valuestring), at);
        if (a < 0)
            bc__state_bad(r, s);
        else
            bc__policy_action(r, s, a, at);
    } else {
        bc__state_bad(r, s);
        bc__fail(r, at, "expected an action name, an object {action: probability} or null, "
                 "found %s", bc__json_found(item, fb, sizeof fb));
    }
}

int bc__read_json_policy(bc__agent_reader *r, const char *buf, size_t len)
{
    return read_document(r, buf, len, policy_state);
}
