/* out_buffer.h — the block buffer the model writers write through (internal). */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#ifndef BC_OUT_BUFFER_H
#define BC_OUT_BUFFER_H

/*
 * Why a private buffer: a large model is written as tens of millions of small
 * pieces (names, numbers, separators), and one stdio call per piece costs
 * several times more than a memcpy.  The caller's stream may already be in
 * use, so its own buffering cannot be changed; text is gathered here and
 * handed over in blocks of BC__OUTBUF_BLOCK bytes.  The struct is visible and
 * the hot appenders are inline, so a piece costs a compare and a memcpy; only
 * block boundaries call into out_buffer.c.

 */
#include "bellcheck.h"

#include <stdio.h>
#include <string.h>

#define BC__OUTBUF_BLOCK (1 << 16)
#define BC__OUTBUF_SLACK 128 /* a number of the small form always fits in this */

/* Pending text is buf[0..n).  Invariant: n <= BC__OUTBUF_BLOCK except just
 * after a number, and always n <= BC__OUTBUF_BLOCK + BC__OUTBUF_SLACK. */
typedef struct {
    FILE *f;
    const bc_bigtab *big; /* where the big numbers of the model live */
    size_t n;
    int failed;           /* 1 once any write to f failed; later writes still run */
    char buf[BC__OUTBUF_BLOCK + BC__OUTBUF_SLACK];
} bc__outbuf;

bc__outbuf *bc__outbuf_new(FILE *f, const bc_bigtab *big); /* empty buffer on f; NULL if out of memory */
int bc__outbuf_close(bc__outbuf *o); /* hands the rest to f, fflush(f), frees o; 0, or -1 if any write failed */
void bc__outbuf_flush(bc__outbuf *o); /* hands buf[0..n) to f and empties the buffer */
void bc__outbuf_bytes_slow(bc__outbuf *o, const char *s, size_t len); /* bc__outbuf_bytes past a block end */
void bc__outbuf_num(bc__outbuf *o, bc_num x); /* appends the exact text of x (bc_num_format) */

/* Appends s[0..len). */
static inline void bc__outbuf_bytes(bc__outbuf *o, const char *s, size_t len)
{
    if (o->n + len > BC__OUTBUF_BLOCK) {
        bc__outbuf_bytes_slow(o, s, len);
        return;
    }
    memcpy(o->buf + o->n, s, len);
    o->n += len;
}

/* Appends the NUL-terminated s. */
static inline void bc__outbuf_str(bc__outbuf *o, const char *s)
{
    bc__outbuf_bytes(o, s, strlen(s));
}

/* Appends one byte. */
static inline void bc__outbuf_char(bc__outbuf *o, char ch)
{
    if (o->n >= BC__OUTBUF_BLOCK)
        bc__outbuf_flush(o);
    o->buf[o->n++] = ch;
}

#endif
