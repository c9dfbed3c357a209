/* out_buffer.c — the block buffer the model writers write through. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#include "out_buffer.h"

#include <assert.h>
#include <stdlib.h>

/* ---- the block buffer --------------------------------------------------- */

bc__outbuf *bc__outbuf_new(FILE *f, const bc_bigtab *big)
{
    bc__outbuf *o = malloc(sizeof *o);
    if (!o)
        return NULL;
    o->f = f;
    o->big = big;
    o->n = 0;
    o->failed = 0;
    return o;
}

int bc__outbuf_close(bc__outbuf *o)
{
    bc__outbuf_flush(o);
    int rc = o->failed || fflush(o->f) != 0 || ferror(o->f) ? -1 : 0; /* a full disk shows here */
    free(o);
    return rc;
}

void bc__outbuf_flush(bc__outbuf *o)
{
    assert(o->n <= BC__OUTBUF_BLOCK + BC__OUTBUF_SLACK);
    if (o->n && fwrite(o->buf, 1, o->n, o->f) != o->n)
        o->failed = 1;
    o->n = 0;
}

void bc__outbuf_bytes_slow(bc__outbuf *o, const char *s, size_t len)
{
    bc__outbuf_flush(o);
    if (len > BC__OUTBUF_BLOCK) { /* a piece longer than a block goes straight to the stream */
        if (fwrite(s, 1, len, o->f) != len)
            o->failed = 1;
        return;
    }
    memcpy(o->buf, s, len);
    o->n = len;
}

void bc__outbuf_num(bc__outbuf *o, bc_num x)
{
    if (x.den != 0) {
        /* Small form: under 64 characters, formatted in place; a number may
         * start anywhere up to BC__OUTBUF_BLOCK, the slack past it is the room. */
        if (o->n > BC__OUTBUF_BLOCK)
            bc__outbuf_flush(o);
        size_t len = bc_num_format(o->buf + o->n, BC__OUTBUF_SLACK, x, o->big);
        assert(len < BC__OUTBUF_SLACK);
        o->n += len;
        return;
    }
    /* A big rational has any length: straight to the stream, no copy. */
    bc__outbuf_flush(o);
    if (bc_num_write(o->f, x, o->big) < 0)
        o->failed = 1;
}
