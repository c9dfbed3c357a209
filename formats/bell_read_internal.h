/* bell_read_internal.h — the .bell text reader fed a piece at a time (formats/input.c reads files in chunks). */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#ifndef BC_BELL_READ_INTERNAL_H
#define BC_BELL_READ_INTERNAL_H

#include "bellcheck.h"

typedef struct bc__bell_reader bc__bell_reader;

/* A reader of one text; file_label (kept, not copied) names it in messages.  NULL after reporting. */
bc__bell_reader *bc__bell_reader_new(const char *file_label, bc_diag *d);
/* Reads the complete lines at the start of buf[0..len), or all of it when `last`
 * (the end of the text ends a line), and returns the bytes read: the caller gives
 * the rest again, followed by more, in the next call.  -1 when reading has stopped
 * (binary data, or the error limit): nothing more will be read. */
int64_t bc__bell_reader_lines(bc__bell_reader *r, const char *buf, size_t len, int last);
/* The model (NULL if any error was reported); frees r. */
bc_model *bc__bell_reader_finish(bc__bell_reader *r);
void bc__bell_reader_free(bc__bell_reader *r); /* gives up: frees r; NULL is allowed */

#endif
