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
 * The walk over the model and the spelling of every key and bracket are in
 * model_write.c, shared with the text writer; this file adds what only JSON
 * needs: escaped strings, numbers in quotes, the optional "name".
 */
#include "bellcheck.h"
#include "model_write.h"

#include <stdio.h>
#include <string.h>

/* Appends s as a JSON string: quotes, backslashes and control bytes escaped;
 * bytes that are not UTF-8 become U+FFFD so the output is always valid JSON. */
static void emit_string(bc__outbuf *o, const char *s)
{
    static const char hex[] = "0123456789abcdef", short_escape[] = "\n\t\r\b\f";
    const unsigned char *p = (const unsigned char *)s;
    bc__outbuf_char(o, '"');
    while (*p) {
        const unsigned char *run = p;
        while (*p >= 0x20 && *p < 0x80 && *p != '"' && *p != '\\')
            p++; /* the common case: plain ASCII, copied in one piece */
        bc__outbuf_bytes(o, (const char *)run, (size_t)(p - run));
        if (!*p)
            break;
        size_t n = bc_utf8_len((const char *)p, SIZE_MAX);
        if (*p == '"' || *p == '\\') {
            char esc[2] = {'\\', (char)*p};
            bc__outbuf_bytes(o, esc, 2);
            p++;
        } else if (*p < 0x20) {
            const char *named = strchr(short_escape, *p); /* \n \t ... read better */
            char esc[6] = {'\\', 'u', '0', '0', hex[*p >> 4], hex[*p & 15]};
            if (named)
                esc[1] = "ntrbf"[named - short_escape];
            bc__outbuf_bytes(o, esc, named ? 2 : 6);
            p++;
        } else if (n) {
            bc__outbuf_bytes(o, (const char *)p, n);
            p += n;
        } else {
            bc__outbuf_str(o, "\xEF\xBF\xBD");
            p++;
        }
    }
    bc__outbuf_char(o, '"');
}

/* Appends x as a JSON string holding its exact text ("0.95", "-1/3", ...). */
static void emit_num(bc__outbuf *o, bc_num x)
{
    bc__outbuf_char(o, '"');
    bc__outbuf_num(o, x);
    bc__outbuf_char(o, '"');
}

/* The "name" entry, when the model has a label. */
static void json_label(bc__outbuf *o, const char *label)
{
    if (!label)
        return;
    bc__outbuf_str(o, ", \"name\": ");
    emit_string(o, label);
}

int bc_write_bell_json(const bc_model *m, FILE *f)
{
    static const bc__model_format json = {BC__FORM_JSON, emit_string, emit_num, json_label};
    return bc__write_model(m, f, &json);
}
