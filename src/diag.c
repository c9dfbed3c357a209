/* diag.c — the list of errors, warnings and notes that readers and analyses collect. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#include "bellcheck.h"

#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

void bc_diag_init(bc_diag *d)
{
    memset(d, 0, sizeof *d);
    d->max_errors = 20;
}

void bc_diag_free(bc_diag *d)
{
    for (int i = 0; i < d->n; i++) {
        free(d->items[i].file);
        free(d->items[i].message);
    }
    free(d->items);
    int max = d->max_errors;
    uint64_t max_memory = d->max_memory;
    memset(d, 0, sizeof *d);
    d->max_errors = max;
    d->max_memory = max_memory;
}

/* bytes as "123 bytes", "4.5 KiB", "12.0 MiB" ... for messages. */
static void size_text(char *buf, size_t cap, uint64_t bytes)
{
    static const char *const unit[] = {"KiB", "MiB", "GiB", "TiB", "PiB", "EiB"};
    if (bytes < 1024) {
        snprintf(buf, cap, "%llu bytes", (unsigned long long)bytes);
        return;
    }
    double v = (double)bytes / 1024;
    int u = 0;
    while (v >= 1024 && u < 5) {
        v /= 1024;
        u++;
    }
    snprintf(buf, cap, "%.1f %s", v, unit[u]);
}

/* The limit the solvers consult.  Set once by the command line before any
 * work starts (--max-memory), read afterwards: no locking is needed. */
static uint64_t memory_limit;

void bc_memory_limit_set(uint64_t bytes)
{
    memory_limit = bytes;
}

uint64_t bc_memory_limit_get(void)
{
    return memory_limit;
}

uint64_t bc_model_bytes_min(int64_t n_states, int64_t n_pairs, int64_t n_trans)
{
    /* state: pair start, terminal flag, initial mass; pair: state, action,
     * transition start, reward; transition: successor, probability. */
    const long double b = (long double)n_states * 17 + (long double)n_pairs * 24 +
                          (long double)n_trans * 12;
    return b >= (long double)UINT64_MAX ? UINT64_MAX : (uint64_t)b;
}

/* "WHAT needs X, more than the memory limit of Y (--max-memory)" into buf. */
static void refusal_text(char *buf, size_t cap, const char *what, uint64_t bytes, uint64_t limit)
{
    char need[32], lim[32];
    size_text(need, sizeof need, bytes);
    size_text(lim, sizeof lim, limit);
    snprintf(buf, cap, "%s needs %s, more than the memory limit of %s (--max-memory)", what, need,
             lim);
}

int bc_memory_refused(uint64_t limit, uint64_t bytes, const char *what, char *buf, size_t cap)
{
    if (limit == 0)
        limit = memory_limit;
    if (limit == 0 || bytes <= limit)
        return 0;
    refusal_text(buf, cap, what, bytes, limit);
    return 1;
}

int bc_diag_memory_refused(bc_diag *d, const char *file, uint64_t bytes, const char *what)
{
    char msg[600];
    if (!bc_memory_refused(d->max_memory, bytes, what, msg, sizeof msg))
        return 0;
    bc_diag_add(d, BC_ERROR, file, 0, 0, "%s", msg);
    return 1;
}

int bc_diag_full(const bc_diag *d)
{
    return d->max_errors > 0 && d->n_errors >= d->max_errors;
}

/* Messages quote the input they complain about, which may be binary: control
 * bytes and bytes that are not UTF-8 become '?', so that a message stays one
 * printable line (in place: each byte is kept or replaced by one byte). */
static void make_printable(char *msg)
{
    unsigned char *p = (unsigned char *)msg;
    while (*p) {
        size_t n = bc_utf8_len((const char *)p, SIZE_MAX);
        if (n == 0 || *p < 0x20 || *p == 0x7F) {
            *p++ = '?';
            continue;
        }
        p += n;
    }
}

int bc_diag_add(bc_diag *d, bc_severity sev, const char *file, int32_t line, int32_t col,
                const char *fmt, ...)
{
    if (sev == BC_ERROR && bc_diag_full(d)) {
        d->n_dropped++;
        return 1;
    }
    if (d->n == d->cap) {
        int cap = d->cap ? 2 * d->cap : 16;
        bc_diag_item *items = realloc(d->items, (size_t)cap * sizeof *items);
        if (!items) {
            d->n_dropped++;
            if (sev == BC_ERROR)
                d->n_errors++; /* the error still counts even if its text is lost */
            return bc_diag_full(d);
        }
        d->items = items;
        d->cap = cap;
    }
    va_list ap, ap2;
    va_start(ap, fmt);
    va_copy(ap2, ap);
    int len = vsnprintf(NULL, 0, fmt, ap);
    char *msg = len >= 0 ? malloc((size_t)len + 1) : NULL;
    if (msg) {
        vsnprintf(msg, (size_t)len + 1, fmt, ap2);
        make_printable(msg);
    }
    va_end(ap2);
    va_end(ap);
    bc_diag_item *it = &d->items[d->n++];
    it->severity = sev;
    it->file = file ? strdup(file) : NULL;
    it->line = line;
    it->col = col;
    it->message = msg;
    if (sev == BC_ERROR)
        d->n_errors++;
    else if (sev == BC_WARNING)
        d->n_warnings++;
    return bc_diag_full(d);
}

static const char *severity_word(bc_severity s)
{
    return s == BC_ERROR ? "error" : s == BC_WARNING ? "warning" : "note";
}

void bc_diag_print(const bc_diag *d, FILE *f)
{
    for (int i = 0; i < d->n; i++) {
        const bc_diag_item *it = &d->items[i];
        if (it->file && it->line > 0 && it->col > 0)
            fprintf(f, "%s:%d:%d: ", it->file, (int)it->line, (int)it->col);
        else if (it->file && it->line > 0)
            fprintf(f, "%s:%d: ", it->file, (int)it->line);
        else if (it->file)
            fprintf(f, "%s: ", it->file);
        fprintf(f, "%s: %s\n", severity_word(it->severity),
                it->message ? it->message : "(message lost: out of memory)");
    }
    if (d->n_dropped)
        fprintf(f, "(%d more error%s not shown)\n", d->n_dropped, d->n_dropped == 1 ? "" : "s");
    else if (bc_diag_full(d)) /* the readers stop there, so nothing was counted past it */
        fprintf(f, "(reading stops at %d errors; later problems, if any, are not listed)\n",
                d->max_errors);
}
