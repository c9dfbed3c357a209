/* json_out.h — a small streaming JSON writer for reports (no tree: reports can hold millions of values). */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#ifndef BC_JSON_OUT_H
#define BC_JSON_OUT_H

#include <stdint.h>
#include <stdio.h>

#define BC_JW_MAX_DEPTH 32

/* Writer state: nesting depth and whether the current container is still empty. */
typedef struct {
    FILE *f;
    int depth;
    int empty[BC_JW_MAX_DEPTH];
} bc_jw;

void bc_jw_init(bc_jw *w, FILE *f);                         /* starts a document on f */
void bc_jw_object(bc_jw *w, const char *key);               /* opens {} (key NULL inside arrays / at the root) */
void bc_jw_array(bc_jw *w, const char *key);                /* opens [] */
void bc_jw_end(bc_jw *w, char close);                       /* closes with '}' or ']' */
void bc_jw_string(bc_jw *w, const char *key, const char *v); /* "v" escaped; NULL writes null */
void bc_jw_number(bc_jw *w, const char *key, double v);     /* shortest round-trip form; NaN/inf write null */
void bc_jw_int(bc_jw *w, const char *key, int64_t v);       /* integer */
void bc_jw_bool(bc_jw *w, const char *key, int v);          /* true/false */
void bc_jw_null(bc_jw *w, const char *key);                 /* null */
void bc_jw_finish(bc_jw *w);                                /* final newline; depth must be 0 */

#endif
