/* report_html_internal.h — the page pieces the HTML reports of solve, score and refine share (not public). */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#ifndef BC_REPORT_HTML_INTERNAL_H
#define BC_REPORT_HTML_INTERNAL_H

#include "bellcheck.h"

/* The page up to and including the safety statement: doctype, head with the
 * style sheet, the heading "bellcheck COMMAND: model" and the model's summary. */
void bc__html_begin(FILE *f, const char *command, const bc_model *m);
/* The same in two halves, for pages about something other than one model:
 * the doctype, head and heading "bellcheck COMMAND: NAME" (leaving <header>
 * open for a summary), then the header's end and the safety statement. */
void bc__html_open(FILE *f, const char *command, const char *name);
void bc__html_safety(FILE *f);
/* The footer and the closing tags. */
void bc__html_end(FILE *f);
/* Escaped text. */
void bc__html_text(FILE *f, const char *s);
/* The value as the text report words it, with its proof (escaped). */
void bc__html_value(FILE *f, double v, bc_proof p);
/* A table row: label, the value as the text report labels it, and a badge of its proof kind. */
void bc__html_figure(FILE *f, const char *label, double v, bc_proof p);
/* A badge of a proof kind (exact, interval, none). */
void bc__html_badge(FILE *f, bc_proof_kind k);
/* A table row of a label and plain text. */
void bc__html_row(FILE *f, const char *label, const char *text);
/* <figure> around one picture: writes the SVG through draw(), then the caption. */
void bc__html_picture(FILE *f, int (*draw)(FILE *f, const void *ctx), const void *ctx,
                      const char *caption);
/* Says why a model has no pictures (its states are no grid). */
void bc__html_no_pictures(FILE *f);

#endif
