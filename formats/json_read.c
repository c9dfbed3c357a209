/* json_read.c — reads the JSON form of a model ("format": "bell-json") into a bc_builder. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The document is parsed whole by cJSON, then walked once, feeding the same
 * bc_builder the text reader uses, so both forms obey exactly the same checks.
 * cJSON keeps no positions, so semantic errors are located by a JSON path
 * ("transitions[3].next[1][1]") carried in bc_pos.path and put after the file
 * label with line 0; syntax errors get a line and column from the offset where
 * cJSON stopped.
 *
 * Invariants: ctx.path always holds the path of the value being examined
 * (segments are appended before a descent and cut back after it); the
 * nesting depth is checked (at most JSON_MAX_DEPTH) before cJSON recurses.
 */
#include "bellcheck.h"
#include "json_internal.h"

#include <assert.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <cjson/cJSON.h>

/* The deepest legal document nests 5 levels (root, transitions, one
 * transition, next, one successor); 64 leaves room and keeps recursion small. */
#define JSON_MAX_DEPTH BC__JSON_MAX_DEPTH
#define JSON_PATH_MAX 512

typedef struct {
    bc_builder *b;
    bc_diag *d;
    const char *label;        /* file label for messages */
    int n_errors;             /* errors this reader reported itself */
    size_t path_len;
    char path[JSON_PATH_MAX]; /* path of the current value; "" is the root */
} json_ctx;

/* ---- paths and messages ------------------------------------------------- */

/* Appends s[0..n) to the path, truncating (a prefix is still a useful location).
 * Paths are rebuilt for every value of a model, so this avoids printf. */
static void path_append(json_ctx *c, const char *s, size_t n)
{
    size_t room = sizeof c->path - 1 - c->path_len;
    if (n > room)
        n = room;
    memcpy(c->path + c->path_len, s, n);
    c->path_len += n;
    c->path[c->path_len] = 0;
}

/* Appends ".key" (or "key" at the root) to the path; returns the old length. */
static size_t path_key(json_ctx *c, const char *key)
{
    size_t old = c->path_len;
    if (old)
        path_append(c, ".", 1);
    path_append(c, key, strlen(key));
    return old;
}

/* Appends "[i]" to the path; returns the old length. */
static size_t path_index(json_ctx *c, int i)
{
    assert(i >= 0);
    char digits[16], *d = digits + sizeof digits;
    *--d = ']';
    do {
        *--d = (char)('0' + i % 10);
        i /= 10;
    } while (i);
    *--d = '[';
    size_t old = c->path_len;
    path_append(c, d, (size_t)(digits + sizeof digits - d));
    return old;
}

static void path_cut(json_ctx *c, size_t len)
{
    assert(len <= c->path_len);
    c->path_len = len;
    c->path[len] = 0;
}

/* The position handed to the builder: no line, the current path. */
static bc_pos here(const json_ctx *c)
{
    bc_pos p = {0, 0, c->path_len ? c->path : "(top level)"};
    return p;
}

/* Reports an error at the current path as "label:path: error: message". */
static int fail(json_ctx *c, const char *fmt, ...) __attribute__((format(printf, 2, 3)));
static int fail(json_ctx *c, const char *fmt, ...)
{
    char msg[1024], where[JSON_PATH_MAX + 256];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(msg, sizeof msg, fmt, ap);
    va_end(ap);
    snprintf(where, sizeof where, "%s:%s", c->label, here(c).path);
    bc_diag_add(c->d, BC_ERROR, where, 0, 0, "%s", msg);
    c->n_errors++;
    return -1;
}

/* The shortest "%.*g" text of finite x that strtod reads back as x
 * (17 significant digits always do). */
static void shortest_decimal(double x, char *buf, size_t cap)
{
    for (int prec = 1; prec <= 17; prec++) {
        snprintf(buf, cap, "%.*g", prec, x);
        if (strtod(buf, NULL) == x)
            break;
    }
    for (char *q = buf; *q; q++)
        if (*q == ',')
            *q = '.'; /* a decimal comma, should a caller have set such an LC_NUMERIC */
}

const char *bc__json_found(const cJSON *v, char *buf, size_t cap)
{
    if (cJSON_IsObject(v))
        return "an object";
    if (cJSON_IsArray(v))
        return "an array";
    if (cJSON_IsTrue(v))
        return "true";
    if (cJSON_IsFalse(v))
        return "false";
    if (cJSON_IsNull(v))
        return "null";
    if (cJSON_IsNumber(v)) {
        char text[40];
        shortest_decimal(v->valuedouble, text, sizeof text);
        snprintf(buf, cap, "the number %s", text);
        return buf;
    }
    if (cJSON_IsString(v)) {
        size_t n = strlen(v->valuestring);
        snprintf(buf, cap, "the string \"%.40s%s\"", v->valuestring, n > 40 ? "..." : "");
        return buf;
    }
    return "an invalid value";
}

/* ---- values ------------------------------------------------------------- */

/* Reads an exact number (JSON string or JSON number) described by `what`. */
static int get_number(json_ctx *c, const cJSON *v, const char *what, bc_num *out)
{
    char text[64], fb[96];
    const char *why = NULL;
    bc_bigtab *big = bc_builder_bigtab(c->b);
    if (cJSON_IsString(v)) {
        if (bc_num_parse(v->valuestring, strlen(v->valuestring), out, big, &why) == 0)
            return 0;
        return fail(c, "expected %s as an exact number (like \"0.25\", \"1/3\", \"-2e3\"), "
                    "found %s: %s", what, bc__json_found(v, fb, sizeof fb), why ? why : "not a number");
    }
    if (!cJSON_IsNumber(v))
        return fail(c, "expected %s (a number, or a string holding an exact number), found %s",
                    what, bc__json_found(v, fb, sizeof fb));
    if (!isfinite(v->valuedouble))
        return fail(c, "expected %s, found a number too large for a double; "
                    "write it as a string to keep it exact", what);
    shortest_decimal(v->valuedouble, text, sizeof text);
    if (bc_num_parse(text, strlen(text), out, big, &why) == 0)
        return 0;
    return fail(c, "expected %s, found the number %s which cannot be read exactly: %s",
                what, text, why ? why : "not a number");
}

/* Requires a JSON string (a word such as "max"); returns it or NULL after reporting. */
static const char *get_string(json_ctx *c, const cJSON *v, const char *what)
{
    char fb[96];
    if (cJSON_IsString(v))
        return v->valuestring;
    fail(c, "expected %s (a string), found %s", what, bc__json_found(v, fb, sizeof fb));
    return NULL;
}

/* 1 when s is a name of the model format: [A-Za-z_][A-Za-z0-9_.:-]*, at most BC_NAME_MAX bytes.
 * The JSON form keeps the text form's rule so that every model can be written as text. */
static int is_name(const char *s)
{
    size_t i = 0;
    for (; s[i]; i++) {
        char ch = s[i];
        int letter = (ch >= 'A' && ch <= 'Z') || (ch >= 'a' && ch <= 'z') || ch == '_';
        if (!letter && (i == 0 || !((ch >= '0' && ch <= '9') || ch == '.' || ch == ':' ||
                                    ch == '-')))
            return 0;
    }
    return i > 0 && i <= BC_NAME_MAX;
}

/* Requires a JSON string holding a state or action name; NULL after reporting. */
static const char *get_name(json_ctx *c, const cJSON *v, const char *what)
{
    const char *s = get_string(c, v, what);
    if (s && !is_name(s)) {
        fail(c, "expected %s (letters, digits, _ . : -, not starting with a digit or sign, "
             "at most %d bytes), found \"%.64s%s\"", what, BC_NAME_MAX, s,
             strlen(s) > 64 ? "..." : "");
        return NULL;
    }
    return s;
}

/* Requires a JSON array or object (kind "an array" / "an object"). */
static int want(json_ctx *c, const cJSON *v, int is_array, const char *what)
{
    char fb[96];
    if (is_array ? cJSON_IsArray(v) : cJSON_IsObject(v))
        return 0;
    return fail(c, "expected %s (%s), found %s", what, is_array ? "an array" : "an object",
                bc__json_found(v, fb, sizeof fb));
}

/* ---- keys --------------------------------------------------------------- */

/* Finds each allowed key of object o (slot[i] = value or NULL), reporting
 * unknown and repeated keys.  Returns 0 if every key is known and unique. */
static int sort_keys(json_ctx *c, const cJSON *o, const char *const *keys, int n_keys,
                     const cJSON **slot)
{
    int rc = 0;
    for (int k = 0; k < n_keys; k++)
        slot[k] = NULL;
    for (const cJSON *it = o->child; it; it = it->next) {
        int k = 0;
        while (k < n_keys && strcmp(it->string, keys[k]) != 0)
            k++;
        size_t old = path_key(c, it->string);
        if (k == n_keys) {
            char list[256] = "";
            for (int j = 0; j < n_keys; j++)
                snprintf(list + strlen(list), sizeof list - strlen(list), "%s\"%s\"",
                         j ? ", " : "", keys[j]);
            rc = fail(c, "unknown key \"%.64s\"; expected one of %s", it->string, list);
        } else if (slot[k]) {
            rc = fail(c, "key \"%s\" appears twice in one object", keys[k]);
        } else {
            slot[k] = it;
        }
        path_cut(c, old);
    }
    return rc;
}

/* Reports a missing required key of the current object. */
static int missing(json_ctx *c, const char *key, const char *meaning)
{
    return fail(c, "missing key \"%s\" (%s)", key, meaning);
}

/* ---- directives --------------------------------------------------------- */

enum {
    K_FORMAT, K_VERSION, K_NAME, K_DISCOUNT, K_OBJECTIVE, K_HORIZON, K_STATES, K_ACTIONS,
    K_TERMINAL, K_INITIAL, K_TRANSITIONS, K_COUNT
};
static const char *const top_keys[K_COUNT] = {
    "format", "version", "name", "discount", "objective", "horizon", "states", "actions",
    "terminal", "initial", "transitions"};

/* "format" and "version" identify the document; anything else means the
 * rest would be read under the wrong rules, so the caller stops on failure. */
static int read_identity(json_ctx *c, const cJSON *const *slot)
{
    char fb[96];
    if (!slot[K_FORMAT])
        return missing(c, "format", "expected \"format\": \"bell-json\"");
    if (!slot[K_VERSION])
        return missing(c, "version", "expected \"version\": 1");
    const cJSON *f = slot[K_FORMAT], *v = slot[K_VERSION];
    int rc = 0;
    size_t old = path_key(c, "format");
    if (!cJSON_IsString(f) || strcmp(f->valuestring, "bell-json") != 0)
        rc = fail(c, "expected the string \"bell-json\", found %s", bc__json_found(f, fb, sizeof fb));
    path_cut(c, old);
    path_key(c, "version");
    if (rc == 0 && !cJSON_IsNumber(v))
        rc = fail(c, "expected the number 1, found %s", bc__json_found(v, fb, sizeof fb));
    else if (rc == 0 && v->valuedouble != 1.0)
        rc = fail(c, "unsupported version: expected 1, found %s",
                  bc__json_found(v, fb, sizeof fb) + strlen("the number "));
    path_cut(c, old);
    return rc;
}

/* "name", "discount", "objective", "horizon". */
static int read_scalars(json_ctx *c, const cJSON *const *slot)
{
    int rc = 0;
    bc_num x = bc_num_int(0);
    size_t old;
    if (slot[K_NAME]) {
        old = path_key(c, "name");
        const char *s = get_string(c, slot[K_NAME], "the model's label");
        size_t len = s ? strlen(s) : 0, ok = s ? bc_utf8_valid_prefix(s, len) : 0;
        if (ok < len) {
            /* cJSON copies raw bytes; a label must be text to be written again. */
            fail(c, "the model's label holds a byte that is not UTF-8 (0x%02X, its byte %zu)",
                 (unsigned)(unsigned char)s[ok], ok + 1);
            rc = -1;
        } else if (!s || bc_builder_name(c->b, s, len, here(c)) < 0)
            rc = -1;
        path_cut(c, old);
    }
    if (!slot[K_DISCOUNT]) {
        rc = missing(c, "discount", "required: the discount factor G, 0 < G <= 1");
    } else {
        old = path_key(c, "discount");
        if (get_number(c, slot[K_DISCOUNT], "the discount factor", &x) < 0 ||
            bc_builder_discount(c->b, x, here(c)) < 0)
            rc = -1;
        path_cut(c, old);
    }
    if (slot[K_OBJECTIVE]) {
        old = path_key(c, "objective");
        const char *s = get_string(c, slot[K_OBJECTIVE], "\"max\" or \"min\"");
        if (!s)
            rc = -1;
        else if (strcmp(s, "max") != 0 && strcmp(s, "min") != 0)
            rc = fail(c, "expected \"max\" or \"min\", found \"%.40s\"", s);
        else if (bc_builder_objective(c->b, s[1] == 'a' ? BC_MAX : BC_MIN, here(c)) < 0)
            rc = -1;
        path_cut(c, old);
    }
    if (slot[K_HORIZON]) {
        old = path_key(c, "horizon");
        if (get_number(c, slot[K_HORIZON], "the horizon (a positive integer)", &x) < 0 ||
            bc_builder_horizon(c->b, x, here(c)) < 0)
            rc = -1;
        path_cut(c, old);
    }
    return rc;
}

/* A list of names ("states", "actions", "terminal") fed to an open builder list. */
static int read_name_list(json_ctx *c, const cJSON *v, const char *key, const char *kind,
                          int (*begin)(bc_builder *, bc_pos))
{
    size_t old = path_key(c, key);
    int rc = want(c, v, 1, "a list of names");
    if (rc == 0 && begin(c->b, here(c)) < 0)
        rc = -1;
    if (rc < 0) {
        path_cut(c, old);
        return rc;
    }
    int i = 0;
    for (const cJSON *it = v->child; it; it = it->next, i++) {
        size_t at = path_index(c, i);
        const char *s = get_name(c, it, kind);
        if (!s || bc_builder_list_add(c->b, s, strlen(s), here(c)) < 0)
            rc = -1;
        path_cut(c, at);
        if (bc_diag_full(c->d))
            break;
    }
    if (bc_builder_list_end(c->b, here(c)) < 0)
        rc = -1;
    path_cut(c, old);
    return rc;
}

/* "initial": {"state": probability, ...}. */
static int read_initial(json_ctx *c, const cJSON *v)
{
    size_t old = path_key(c, "initial");
    int rc = want(c, v, 0, "an object mapping state names to probabilities");
    if (rc == 0 && bc_builder_initial_begin(c->b, here(c)) < 0)
        rc = -1;
    if (rc < 0) {
        path_cut(c, old);
        return rc;
    }
    for (const cJSON *it = v->child; it; it = it->next) {
        size_t at = path_key(c, it->string);
        bc_num p;
        if (!is_name(it->string))
            rc = fail(c, "expected a state name as the key (letters, digits, _ . : -, not "
                      "starting with a digit or sign), found \"%.64s\"", it->string);
        else if (get_number(c, it, "the initial probability of this state", &p) < 0 ||
            bc_builder_initial_add(c->b, it->string, strlen(it->string), &p, here(c)) < 0)
            rc = -1;
        path_cut(c, at);
        if (bc_diag_full(c->d))
            break;
    }
    if (rc == 0 && bc_builder_initial_end(c->b, here(c)) < 0) /* after an error it would only echo it */
        rc = -1;
    path_cut(c, old);
    return rc;
}

/* ---- transitions -------------------------------------------------------- */

/* One successor checked and parsed before anything reaches the builder, so a
 * malformed transition is skipped whole instead of leaving a pair half-fed. */
typedef struct {
    const char *name;
    bc_num prob, outcome;
    int has_prob, has_outcome;
} json_succ;

typedef struct {
    json_succ *v;
    int n, cap;
} succ_list;

/* Parses one successor [NAME], [NAME, PROB] or [NAME, PROB, OUTCOME] into out. */
static int read_succ(json_ctx *c, const cJSON *v, json_succ *out)
{
    int n = cJSON_IsArray(v) ? 0 : -1;
    for (const cJSON *k = n == 0 ? v->child : NULL; k && n <= 3; k = k->next)
        n++; /* counting stops past 3: cJSON_GetArraySize would walk a long array */
    if (n < 1 || n > 3) {
        char fb[96];
        return fail(c, "expected a successor [NAME, PROBABILITY, OUTCOME_REWARD] (an array of "
                    "1 to 3 items), found %s",
                    n < 0 ? bc__json_found(v, fb, sizeof fb) : n == 0 ? "an empty array"
                                                    : "an array of more than 3 items");
    }
    const cJSON *it = v->child;
    size_t old = path_index(c, 0);
    out->name = get_name(c, it, "the successor's state name");
    path_cut(c, old);
    int rc = out->name ? 0 : -1;
    out->has_prob = out->has_outcome = 0;
    if ((it = it->next)) {
        path_index(c, 1);
        out->has_prob = get_number(c, it, "a probability", &out->prob) == 0;
        rc = out->has_prob ? rc : -1;
        path_cut(c, old);
    }
    if (it && (it = it->next)) {
        path_index(c, 2);
        out->has_outcome = get_number(c, it, "an outcome reward", &out->outcome) == 0;
        rc = out->has_outcome ? rc : -1;
        path_cut(c, old);
    }
    return rc;
}

/* Parses "next" (an array of successors) into list. */
static int read_next(json_ctx *c, const cJSON *v, succ_list *list)
{
    int rc = want(c, v, 1, "a list of successors");
    if (rc < 0)
        return rc;
    list->n = 0;
    int i = 0;
    for (const cJSON *it = v->child; it; it = it->next, i++) {
        if (list->n == list->cap) {
            int cap = list->cap ? 2 * list->cap : 16;
            json_succ *p = realloc(list->v, (size_t)cap * sizeof *p);
            if (!p)
                return fail(c, "out of memory");
            list->v = p;
            list->cap = cap;
        }
        size_t old = path_index(c, i);
        if (read_succ(c, it, &list->v[list->n]) < 0)
            rc = -1;
        else
            list->n++;
        path_cut(c, old);
    }
    if (rc == 0 && i == 0)
        rc = fail(c, "expected at least one successor, found an empty list");
    return rc;
}

enum { T_STATE, T_ACTION, T_REWARD, T_NEXT, T_COUNT };
static const char *const trans_keys[T_COUNT] = {"state", "action", "reward", "next"};

/* Feeds one checked transition to the builder; paths name each part. */
static int feed_pair(json_ctx *c, const char *state, const char *action, bc_num reward,
                     const succ_list *list)
{
    char state_path[JSON_PATH_MAX + 8], action_path[JSON_PATH_MAX + 8];
    memcpy(state_path, c->path, c->path_len);
    memcpy(state_path + c->path_len, ".state", sizeof ".state");
    memcpy(action_path, c->path, c->path_len);
    memcpy(action_path + c->path_len, ".action", sizeof ".action");
    bc_pos sat = {0, 0, state_path}, aat = {0, 0, action_path};
    if (bc_builder_pair_begin(c->b, state, strlen(state), sat, action, strlen(action), aat,
                              reward) < 0)
        return -1;
    int rc = 0;
    size_t old = path_key(c, "next");
    for (int i = 0; i < list->n; i++) {
        const json_succ *s = &list->v[i];
        size_t at = path_index(c, i);
        if (bc_builder_succ(c->b, s->name, strlen(s->name), s->has_prob ? &s->prob : NULL,
                            s->has_outcome ? &s->outcome : NULL, here(c)) < 0)
            rc = -1;
        path_cut(c, at);
    }
    path_cut(c, old);
    if (bc_builder_pair_end(c->b, here(c)) < 0)
        rc = -1;
    return rc;
}

/* One element of "transitions": {"state", "action", "reward", "next"}. */
static int read_transition(json_ctx *c, const cJSON *t, succ_list *list)
{
    const cJSON *slot[T_COUNT];
    if (want(c, t, 0, "a transition {\"state\", \"action\", \"reward\", \"next\"}") < 0 ||
        sort_keys(c, t, trans_keys, T_COUNT, slot) < 0)
        return -1;
    static const char *const meaning[T_COUNT] = {
        "the state's name", "the action's name", "the expected immediate reward",
        "the list of successors"};
    int rc = 0;
    for (int k = 0; k < T_COUNT; k++)
        if (!slot[k])
            rc = missing(c, trans_keys[k], meaning[k]);
    if (rc < 0)
        return rc;
    size_t old = path_key(c, "state");
    const char *state = get_name(c, slot[T_STATE], "the state's name");
    path_cut(c, old);
    path_key(c, "action");
    const char *action = get_name(c, slot[T_ACTION], "the action's name");
    path_cut(c, old);
    bc_num reward;
    path_key(c, "reward");
    int reward_ok = get_number(c, slot[T_REWARD], "the reward", &reward) == 0;
    path_cut(c, old);
    path_key(c, "next");
    int next_ok = read_next(c, slot[T_NEXT], list) == 0;
    path_cut(c, old);
    if (!state || !action || !reward_ok || !next_ok)
        return -1;
    if (!strcmp(state, "name")) {
        /* `name TEXT` is the one directive of the text form that takes the
         * rest of its line, `->` included, so a line of a state named `name`
         * would read as it: the model could not be written as .bell and read
         * back.  (Every other keyword starts a transition line when `->`
         * follows, so such states are fine in both forms.) */
        path_key(c, "state");
        fail(c, "a state that has transitions cannot be named `name`: in the .bell text form a "
             "line starting with `name` is the model's label; rename the state");
        path_cut(c, old);
        return -1;
    }
    return feed_pair(c, state, action, reward, list);
}

/* "transitions": an array of transitions; errors in one do not stop the rest. */
static int read_transitions(json_ctx *c, const cJSON *v)
{
    size_t old = path_key(c, "transitions");
    int rc = want(c, v, 1, "a list of transitions");
    succ_list list = {NULL, 0, 0};
    int i = 0;
    for (const cJSON *t = rc == 0 ? v->child : NULL; t; t = t->next, i++) {
        size_t at = path_index(c, i);
        if (read_transition(c, t, &list) < 0)
            rc = -1;
        path_cut(c, at);
        if (bc_diag_full(c->d))
            break;
    }
    free(list.v);
    path_cut(c, old);
    return rc;
}

/* ---- syntax ------------------------------------------------------------- */

size_t bc__json_depth_excess(const char *buf, size_t len)
{
    int depth = 0, in_string = 0;
    for (size_t i = 0; i < len; i++) {
        char ch = buf[i];
        if (in_string) {
            if (ch == '\\')
                i++; /* the escaped byte cannot end the string */
            else if (ch == '"')
                in_string = 0;
        } else if (ch == '"') {
            in_string = 1;
        } else if (ch == '[' || ch == '{') {
            if (++depth > JSON_MAX_DEPTH)
                return i;
        } else if (ch == ']' || ch == '}') {
            depth--;
        }
    }
    return len;
}

void bc__json_line_col(const char *buf, size_t len, size_t off, int32_t *line, int32_t *col)
{
    *line = 1;
    *col = 1;
    for (size_t i = 0; i < off && i < len; i++) {
        if (buf[i] == '\n') {
            *line += *line < INT32_MAX; /* positions saturate past 2^31 - 1 */
            *col = 1;
        } else if (((unsigned char)buf[i] & 0xC0) != 0x80) {
            *col += *col < INT32_MAX; /* columns count characters, not UTF-8 continuation bytes */
        }
    }
}

size_t bc__json_nul_in_string(const char *buf, size_t len)
{
    int in_string = 0;
    for (size_t i = 0; i < len; i++) {
        if (!in_string) {
            in_string = buf[i] == '"';
        } else if (buf[i] == 0) {
            return i;
        } else if (buf[i] == '"') {
            in_string = 0;
        } else if (buf[i] == '\\') {
            if (len - i >= 6 && memcmp(buf + i + 1, "u0000", 5) == 0)
                return i;
            i++; /* the escaped byte cannot end the string */
        }
    }
    return len;
}

/* Reports a problem at byte offset off of buf as label:line:col. */
static void fail_at(json_ctx *c, const char *buf, size_t len, size_t off, const char *msg)
{
    int32_t line, col;
    bc__json_line_col(buf, len, off, &line, &col);
    bc_diag_add(c->d, BC_ERROR, c->label, line, col, "%s", msg);
    c->n_errors++;
}

/* Parses buf[0..n) with cJSON.  On failure returns NULL and sets *stop to
 * the offset where cJSON gave up, or to n when the input ended too early. */
static cJSON *parse_prefix(const char *buf, size_t n, size_t *stop)
{
    const char *end = NULL;
    cJSON *root = cJSON_ParseWithLengthOpts(buf, n, &end, 0);
    *stop = end && end >= buf && (size_t)(end - buf) <= n ? (size_t)(end - buf) : 0;
    if (root || n == 0 || *stop + 1 != n)
        return root;
    /* cJSON reports "ran out of input" as the last byte; parsing again with
     * one byte more tells a wrong last byte from a missing rest. */
    char *copy = malloc(n + 1);
    if (!copy)
        return NULL;
    memcpy(copy, buf, n);
    copy[n] = 0x01; /* never valid where a JSON token may start */
    cJSON *again = cJSON_ParseWithLengthOpts(copy, n + 1, &end, 0);
    if (!again && end == copy + n)
        *stop = n;
    cJSON_Delete(again);
    free(copy);
    return NULL;
}

/* What the JSON grammar allows next, tracked over a prefix that cJSON accepted. */
typedef enum {
    EXP_VALUE, EXP_VALUE_OR_CLOSE, EXP_KEY, EXP_KEY_OR_CLOSE, EXP_COLON,
    EXP_COMMA_OR_CLOSE, EXP_END, EXP_IN_STRING
} json_expect;

static const char *const expect_text[] = {
    "a value", "a value or ']'", "a key in double quotes", "a key in double quotes or '}'",
    "':'", "',' or a closing bracket", "the end of the input",
    "a string closed by '\"', with only the escapes \\\" \\\\ \\/ \\b \\f \\n \\r \\t \\uXXXX"};

static int is_blank(char ch)
{
    return ch == ' ' || ch == '\t' || ch == '\n' || ch == '\r';
}

/* The state after buf[0..end): a small pushdown walk (depth is already known
 * to be at most JSON_MAX_DEPTH).  *string_at receives the start of an open string. */
static json_expect expect_after(const char *buf, size_t end, size_t *string_at)
{
    char stack[JSON_MAX_DEPTH + 1];
    int depth = 0;
    json_expect e = EXP_VALUE;
    for (size_t i = 0; i < end; i++) {
        char ch = buf[i];
        int in_object = depth > 0 && stack[depth - 1] == '{';
        json_expect after_value = depth == 0 ? EXP_END : EXP_COMMA_OR_CLOSE;
        if (is_blank(ch))
            continue;
        if (ch == '"') {
            *string_at = i;
            for (i++; i < end && buf[i] != '"'; i++)
                if (buf[i] == '\\')
                    i++;
            if (i >= end)
                return EXP_IN_STRING;
            e = e == EXP_KEY || e == EXP_KEY_OR_CLOSE ? EXP_COLON : after_value;
        } else if ((ch == '{' || ch == '[') && depth <= JSON_MAX_DEPTH) {
            stack[depth++] = ch;
            e = ch == '{' ? EXP_KEY_OR_CLOSE : EXP_VALUE_OR_CLOSE;
        } else if ((ch == '}' || ch == ']') && depth > 0) {
            depth--;
            e = depth == 0 ? EXP_END : EXP_COMMA_OR_CLOSE;
        } else if (ch == ':') {
            e = EXP_VALUE;
        } else if (ch == ',') {
            e = in_object ? EXP_KEY : EXP_VALUE;
        } else {
            while (i + 1 < end && !is_blank(buf[i + 1]) && !strchr(",:]}[{\"", buf[i + 1]))
                i++; /* a number, true, false or null */
            e = after_value;
        }
    }
    return e;
}

/* Reports where and why cJSON stopped, saying what the grammar expected there. */
static void fail_syntax(json_ctx *c, const char *buf, size_t len, size_t off)
{
    char msg[200];
    size_t i = 0, string_at = 0;
    while (i < len && is_blank(buf[i]))
        i++;
    if (i == len) {
        fail_at(c, buf, len, len, "expected a JSON object {\"format\": \"bell-json\", ...}, "
                "found an empty input");
        return;
    }
    /* Where a key should start, cJSON points one byte past the culprit. */
    if (off > 0 && off <= len && !is_blank(buf[off - 1]) && buf[off - 1] != '"') {
        json_expect before = expect_after(buf, off - 1, &string_at);
        if (before == EXP_KEY || before == EXP_KEY_OR_CLOSE)
            off--;
    }
    json_expect e = expect_after(buf, off < len ? off : len, &string_at);
    if (e == EXP_IN_STRING) {
        snprintf(msg, sizeof msg, "JSON syntax error: expected %s, found %s", expect_text[e],
                 off >= len ? "the end of the input" : "a bad escape or no closing quote");
        fail_at(c, buf, len, string_at, msg);
        return;
    }
    if (off >= len) {
        snprintf(msg, sizeof msg, "JSON syntax error: the input ends inside a value "
                 "(expected %s, found the end)", expect_text[e]);
        fail_at(c, buf, len, len, msg);
        return;
    }
    unsigned char ch = (unsigned char)buf[off];
    if (ch >= 0x20 && ch < 0x7f)
        snprintf(msg, sizeof msg, "JSON syntax error: expected %s, found '%c'", expect_text[e], ch);
    else
        snprintf(msg, sizeof msg, "JSON syntax error: expected %s, found the byte 0x%02x",
                 expect_text[e], ch);
    fail_at(c, buf, len, off, msg);
}

/* Parses buf with cJSON, rejecting deep nesting first; NULL after reporting. */
static cJSON *parse_document(json_ctx *c, const char *buf, size_t len)
{
    /* Parse only up to the excess: cJSON then never recurses deeper than
     * JSON_MAX_DEPTH, and a syntax error before it is the real problem. */
    size_t deep = bc__json_depth_excess(buf, len), off;
    size_t nul = bc__json_nul_in_string(buf, deep);
    if (nul < deep) {
        fail_at(c, buf, len, nul, "a JSON string holds a NUL character (\\u0000 or a zero "
                "byte); no name, number or label may contain one");
        return NULL;
    }
    cJSON *root = parse_prefix(buf, deep, &off);
    if (root) { /* complete: only blanks may follow */
        while (off < len && (buf[off] == ' ' || buf[off] == '\t' || buf[off] == '\n' ||
                             buf[off] == '\r'))
            off++;
        if (off == len || (buf[off] == 0 && off + 1 == len))
            return root;
        cJSON_Delete(root);
        fail_at(c, buf, len, off, "expected the end of the input after the JSON document, "
                "found more text");
        return NULL;
    }
    cJSON_Delete(root);
    if (deep < len && off >= deep) {
        char msg[128];
        snprintf(msg, sizeof msg, "JSON nested more than %d levels deep (a model needs 5)",
                 JSON_MAX_DEPTH);
        fail_at(c, buf, len, deep, msg);
    } else {
        fail_syntax(c, buf, len, off);
    }
    return NULL;
}

/* ---- entry -------------------------------------------------------------- */

/* Walks the document in the order the builder likes best (lists before pairs). */
static int read_document(json_ctx *c, const cJSON *root)
{
    const cJSON *slot[K_COUNT];
    if (!cJSON_IsObject(root)) {
        char fb[96];
        return fail(c, "expected a JSON object {\"format\": \"bell-json\", ...}, found %s",
                    bc__json_found(root, fb, sizeof fb));
    }
    int rc = sort_keys(c, root, top_keys, K_COUNT, slot);
    if (read_identity(c, slot) < 0)
        return -1;
    if (read_scalars(c, slot) < 0)
        rc = -1;
    if (slot[K_STATES] && read_name_list(c, slot[K_STATES], "states", "a state name",
                                         bc_builder_states_begin) < 0)
        rc = -1;
    if (slot[K_ACTIONS] && read_name_list(c, slot[K_ACTIONS], "actions", "an action name",
                                          bc_builder_actions_begin) < 0)
        rc = -1;
    if (slot[K_TERMINAL] && read_name_list(c, slot[K_TERMINAL], "terminal", "a state name",
                                           bc_builder_terminal_begin) < 0)
        rc = -1;
    if (slot[K_INITIAL] && read_initial(c, slot[K_INITIAL]) < 0)
        rc = -1;
    if (slot[K_TRANSITIONS] && !bc_diag_full(c->d) &&
        read_transitions(c, slot[K_TRANSITIONS]) < 0)
        rc = -1;
    return rc;
}

bc_model *bc_read_bell_json(const char *buf, size_t len, const char *file_label, bc_diag *d)
{
    json_ctx c;
    memset(&c, 0, sizeof c);
    c.d = d;
    c.label = file_label ? file_label : "<input>";
    cJSON *root = parse_document(&c, buf, len);
    if (!root)
        return NULL;
    c.b = bc_builder_new(c.label, d);
    if (!c.b) {
        bc_diag_add(d, BC_ERROR, c.label, 0, 0, "out of memory while reading the model");
        cJSON_Delete(root);
        return NULL;
    }
    int rc = read_document(&c, root);
    cJSON_Delete(root);
    bc_model *m = NULL;
    if (rc < 0 || c.n_errors > 0)
        bc_builder_free(c.b); /* the builder's own errors are already in d */
    else
        m = bc_builder_finish(c.b); /* default label: the file's base name */
    return m;
}
