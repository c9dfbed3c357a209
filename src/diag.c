/* diag.c — the list of errors, warnings and notes that readers and analyses collect. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#include "bellcheck.h"

#include <stdarg.h>
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
    memset(d, 0, sizeof *d);
    d->max_errors = max;
}

int bc_diag_full(const bc_diag *d)
{
    return d->max_errors > 0 && d->n_errors >= d->max_errors;
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
    if (msg)
        vsnprintf(msg, (size_t)len + 1, fmt, ap2);
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
}
