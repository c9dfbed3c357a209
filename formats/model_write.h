/* model_write.h — one walk over a model that both model writers share (internal). */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#ifndef BC_MODEL_WRITE_H
#define BC_MODEL_WRITE_H

/*
 * Why one walk: the .bell text and the JSON form carry the same model, and
 * what makes a round trip exact (which names, which numbers, which entries
 * may be left out) is the same for both.  bc__write_model holds that once,
 * with both spellings side by side in one table; a writer adds only what
 * takes code (escaping a name, quoting a number, the label).
 */
#include "out_buffer.h"

/* The two forms a model is written in: a column of the spelling table in model_write.c. */
typedef enum { BC__FORM_TEXT = 0, BC__FORM_JSON = 1 } bc__model_form;

/* What a writer spells by code rather than by the table: names, numbers, the label. */
typedef struct {
    bc__model_form form;
    void (*name)(bc__outbuf *o, const char *name);   /* a state or action name */
    void (*num)(bc__outbuf *o, bc_num x);            /* an exact number */
    void (*label)(bc__outbuf *o, const char *label); /* the model's label entry; label may be NULL */
} bc__model_format;

/* Writes m to f in the given form; 0, or -1 on out of memory or a failed write. */
int bc__write_model(const bc_model *m, FILE *f, const bc__model_format *fmt);

#endif
