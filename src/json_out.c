/* json_out.c — a small streaming JSON writer for reports. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#include "json_out.h"
#include "bellcheck.h"

#include <assert.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

void bc_jw_init(bc_jw *w, FILE *f)
{
    memset(w, 0, sizeof *w);
    w->f = f;
    w->empty[0] = 1;
}

/* Writes s as a JSON string; bytes that are not UTF-8 become U+FFFD, so the
 * document stays valid whatever a model's label or a file name holds. */
static void write_escaped(FILE *f, const char *s)
{
    fputc('"', f);
    for (const unsigned char *p = (const unsigned char *)s; *p; p++) {
        size_t n = bc_utf8_len((const char *)p, SIZE_MAX);
        if (n == 0) {
            fputs("\ufffd", f);
            continue;
        }
        if (n > 1) {
            fwrite(p, 1, (size_t)n, f);
            p += n - 1;
            continue;
        }
        if (*p == '"' || *p == '\\')
            fprintf(f, "\\%c", *p);
        else if (*p == '\n')
            fputs("\\n", f);
        else if (*p == '\t')
            fputs("\\t", f);
        else if (*p == '\r')
            fputs("\\r", f);
        else if (*p < 0x20)
            fprintf(f, "\\u%04x", *p);
        else
            fputc(*p, f);
    }
    fputc('"', f);
}

/* Separator, indentation and key before a value. */
static void prefix(bc_jw *w, const char *key)
{
    if (w->depth > 0) {
        fputs(w->empty[w->depth] ? "\n" : ",\n", w->f);
        for (int i = 0; i < w->depth; i++)
            fputs("  ", w->f);
    }
    w->empty[w->depth] = 0;
    if (key) {
        write_escaped(w->f, key);
        fputs(": ", w->f);
    }
}

static void open_container(bc_jw *w, const char *key, char c)
{
    prefix(w, key);
    fputc(c, w->f);
    assert(w->depth + 1 < BC_JW_MAX_DEPTH);
    w->depth++;
    w->empty[w->depth] = 1;
}

void bc_jw_object(bc_jw *w, const char *key)
{
    open_container(w, key, '{');
}

void bc_jw_array(bc_jw *w, const char *key)
{
    open_container(w, key, '[');
}

void bc_jw_end(bc_jw *w, char close)
{
    assert(w->depth > 0);
    int was_empty = w->empty[w->depth];
    w->depth--;
    if (!was_empty) {
        fputc('\n', w->f);
        for (int i = 0; i < w->depth; i++)
            fputs("  ", w->f);
    }
    fputc(close, w->f);
}

void bc_jw_string(bc_jw *w, const char *key, const char *v)
{
    prefix(w, key);
    if (v)
        write_escaped(w->f, v);
    else
        fputs("null", w->f);
}

void bc_jw_number(bc_jw *w, const char *key, double v)
{
    prefix(w, key);
    if (!isfinite(v)) {
        fputs("null", w->f);
        return;
    }
    /* Shortest precision that reads back to the same double. */
    char buf[40];
    for (int prec = 1; prec <= 17; prec++) {
        snprintf(buf, sizeof buf, "%.*g", prec, v);
        if (strtod(buf, NULL) == v)
            break;
    }
    fputs(buf, w->f);
}

void bc_jw_int(bc_jw *w, const char *key, int64_t v)
{
    prefix(w, key);
    fprintf(w->f, "%lld", (long long)v);
}

void bc_jw_bool(bc_jw *w, const char *key, int v)
{
    prefix(w, key);
    fputs(v ? "true" : "false", w->f);
}

void bc_jw_null(bc_jw *w, const char *key)
{
    prefix(w, key);
    fputs("null", w->f);
}

void bc_jw_finish(bc_jw *w)
{
    assert(w->depth == 0);
    fputc('\n', w->f);
}
