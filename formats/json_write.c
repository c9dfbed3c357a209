/* json_write.c — writes a model in its JSON form ("format": "bell-json"), streamed, numbers exact as strings. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The document is streamed, never built as a cJSON tree: a model may hold
 * tens of millions of transitions.  Keys come in the order of the format's
 * example (format, version, name, discount, objective), then horizon, states
 * and actions (so both orders survive a round trip), initial, terminal,
 * transitions.  Every number is a JSON string holding the exact rational, so
 * no reader ever rounds it; the horizon, an integer, is a JSON number.
 *
 * Text is assembled in a private buffer and handed to stdio in large blocks,
 * for the same reason as in bell_write.c (several times faster than one stdio
 * call per piece on a large model).
 */
#include "bellcheck.h"

#include <assert.h>
#include <stdlib.h>
#include <string.h>

#define JSON_BLOCK (1 << 16)
#define JSON_NUM_ROOM 128 /* a number of the small form always fits in this */

/* Pending text is text[0..len); len <= JSON_BLOCK except just after a number. */
typedef struct {
    FILE *f;
    const bc_bigtab *big;
    size_t len;
    int failed;
    char text[JSON_BLOCK + JSON_NUM_ROOM];
} json_out;

static void emit_flush(json_out *o)
{
    if (o->len && fwrite(o->text, 1, o->len, o->f) != o->len)
        o->failed = 1;
    o->len = 0;
}

/* Appends raw bytes (already valid JSON text). */
static void emit(json_out *o, const char *s, size_t n)
{
    while (n) {
        if (o->len >= JSON_BLOCK)
            emit_flush(o);
        size_t room = JSON_BLOCK - o->len, k = n < room ? n : room;
        memcpy(o->text + o->len, s, k);
        o->len += k;
        s += k;
        n -= k;
    }
}

static void emit_lit(json_out *o, const char *s)
{
    emit(o, s, strlen(s));
}

/* Length of the valid UTF-8 sequence at s (1 to 4), or 0 if the bytes are not one. */
static size_t utf8_length(const unsigned char *s)
{
    unsigned char c = s[0];
    if (c < 0x80)
        return 1;
    size_t n = c >= 0xC2 && c <= 0xDF ? 2 : c >= 0xE0 && c <= 0xEF ? 3 : c >= 0xF0 && c <= 0xF4 ? 4 : 0;
    for (size_t i = 1; i < n; i++)
        if ((s[i] & 0xC0) != 0x80)
            return 0; /* also stops at the NUL terminator */
    /* Reject overlong forms, UTF-16 surrogates and code points past U+10FFFF. */
    if ((c == 0xE0 && s[1] < 0xA0) || (c == 0xED && s[1] >= 0xA0) ||
        (c == 0xF0 && s[1] < 0x90) || (c == 0xF4 && s[1] >= 0x90))
        return 0;
    return n;
}

/* Appends s as a JSON string: quotes, backslashes and control bytes escaped;
 * bytes that are not UTF-8 become U+FFFD so the output is always valid JSON. */
static void emit_string(json_out *o, const char *s)
{
    static const char hex[] = "0123456789abcdef", short_escape[] = "\n\t\r\b\f";
    const unsigned char *p = (const unsigned char *)s;
    emit(o, "\"", 1);
    while (*p) {
        const unsigned char *run = p;
        while (*p >= 0x20 && *p < 0x80 && *p != '"' && *p != '\\')
            p++; /* the common case: plain ASCII, copied in one piece */
        emit(o, (const char *)run, (size_t)(p - run));
        if (!*p)
            break;
        size_t n = utf8_length(p);
        if (*p == '"' || *p == '\\') {
            char esc[2] = {'\\', (char)*p};
            emit(o, esc, 2);
            p++;
        } else if (*p < 0x20) {
            const char *named = strchr(short_escape, *p); /* \n \t ... read better */
            char esc[6] = {'\\', 'u', '0', '0', hex[*p >> 4], hex[*p & 15]};
            if (named)
                esc[1] = "ntrbf"[named - short_escape];
            emit(o, esc, named ? 2 : 6);
            p++;
        } else if (n) {
            emit(o, (const char *)p, n);
            p += n;
        } else {
            emit_lit(o, "\xEF\xBF\xBD");
            p++;
        }
    }
    emit(o, "\"", 1);
}

/* Appends x as a JSON string holding its exact text ("0.95", "-1/3", ...). */
static void emit_num(json_out *o, bc_num x)
{
    if (x.den == 0) {
        size_t n = bc_num_format(NULL, 0, x, o->big); /* a big rational: any length */
        char *tmp = n ? malloc(n + 1) : NULL; /* n == 0: GMP ran out of memory */
        if (!tmp) {
            o->failed = 1;
            return;
        }
        bc_num_format(tmp, n + 1, x, o->big);
        emit(o, "\"", 1);
        emit(o, tmp, n);
        emit(o, "\"", 1);
        free(tmp);
        return;
    }
    if (o->len > JSON_BLOCK)
        emit_flush(o);
    o->text[o->len++] = '"';
    size_t n = bc_num_format(o->text + o->len, JSON_NUM_ROOM - 2, x, o->big);
    assert(n < JSON_NUM_ROOM - 2);
    o->len += n;
    o->text[o->len++] = '"';
}

/* Appends ["name", "name", ...] for each name of t in index order. */
static void emit_names(json_out *o, const char *key, const bc_names *t)
{
    emit_lit(o, key);
    for (int32_t i = 0; i < bc_names_count(t); i++) {
        emit_lit(o, i ? ", " : "[");
        emit_string(o, bc_names_get(t, i));
    }
    emit_lit(o, bc_names_count(t) ? "]" : "[]");
}

/* Everything before "transitions". */
static void emit_header(json_out *o, const bc_model *m)
{
    emit_lit(o, "{\"format\": \"bell-json\", \"version\": 1");
    if (m->name) {
        emit_lit(o, ", \"name\": ");
        emit_string(o, m->name);
    }
    emit_lit(o, ",\n \"discount\": ");
    emit_num(o, m->discount_exact);
    emit_lit(o, m->objective == BC_MIN ? ", \"objective\": \"min\"" : ", \"objective\": \"max\"");
    if (m->horizon > 0) {
        char tmp[40];
        snprintf(tmp, sizeof tmp, ", \"horizon\": %d", (int)m->horizon);
        emit_lit(o, tmp);
    }
    emit_names(o, ",\n \"states\": ", m->state_names);
    emit_names(o, ",\n \"actions\": ", m->action_names);
    if (m->initial_given) {
        const char *sep = ",\n \"initial\": {";
        for (int32_t s = 0; s < m->n_states; s++) {
            if (bc_num_sign(m->initial_exact[s], m->big) == 0)
                continue;
            emit_lit(o, sep);
            emit_string(o, bc_names_get(m->state_names, s));
            emit_lit(o, ": ");
            emit_num(o, m->initial_exact[s]);
            sep = ", ";
        }
        emit_lit(o, "}");
    }
    emit_lit(o, ",\n \"terminal\": ");
    int any = 0;
    for (int32_t s = 0; s < m->n_states; s++) {
        if (!m->terminal[s])
            continue;
        emit_lit(o, any++ ? ", " : "[");
        emit_string(o, bc_names_get(m->state_names, s));
    }
    emit_lit(o, any ? "]" : "[]");
}

/* One transition per line: {"state", "action", "reward", "next": [[NEXT, PROB(, OUTCOME)], ...]}. */
static void emit_transitions(json_out *o, const bc_model *m)
{
    emit_lit(o, ",\n \"transitions\": [");
    for (int64_t p = 0; p < m->n_pairs && !o->failed; p++) {
        emit_lit(o, p ? ",\n  {\"state\": " : "\n  {\"state\": ");
        emit_string(o, bc_names_get(m->state_names, m->pair_state[p]));
        emit_lit(o, ", \"action\": ");
        emit_string(o, bc_names_get(m->action_names, m->pair_action[p]));
        emit_lit(o, ", \"reward\": ");
        emit_num(o, m->reward_exact[p]);
        emit_lit(o, ", \"next\": [");
        for (int64_t t = m->pair_trans_start[p]; t < m->pair_trans_start[p + 1]; t++) {
            emit_lit(o, t > m->pair_trans_start[p] ? ", [" : "[");
            emit_string(o, bc_names_get(m->state_names, m->succ_state[t]));
            emit_lit(o, ", ");
            emit_num(o, m->prob_exact[t]);
            if (m->outcome_exact && bc_num_sign(m->outcome_exact[t], m->big) != 0) {
                emit_lit(o, ", ");
                emit_num(o, m->outcome_exact[t]);
            }
            emit_lit(o, "]");
        }
        emit_lit(o, "]}");
    }
    emit_lit(o, m->n_pairs ? "\n ]}\n" : "]}\n");
}

int bc_write_bell_json(const bc_model *m, FILE *f)
{
    json_out *o = malloc(sizeof *o);
    if (!o)
        return -1;
    o->f = f;
    o->big = m->big;
    o->len = 0;
    o->failed = 0;
    emit_header(o, m);
    emit_transitions(o, m);
    emit_flush(o);
    int rc = o->failed || fflush(f) != 0 || ferror(f) ? -1 : 0; /* a full disk shows here */
    free(o);
    return rc;
}
