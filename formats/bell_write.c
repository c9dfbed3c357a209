/* bell_write.c — writes a model in the .bell text format, so that reading it back gives the same model. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * What makes the round trip exact (the walk in model_write.c, shared with the
 * JSON writer, holds it, with the spelling of every directive; this file adds
 * what only text needs):
 *  - `states` and `actions` lines fix both orders (terminal and unused names included);
 *  - every number is the exact rational (bc_num_format: decimal or p/q);
 *  - `initial` is written only when the source stated it, so the default
 *    (uniform over non-terminal states) applies again on reading;
 *  - each pair is one line with every probability written, and the outcome
 *    reward of a successor only where it is non-zero.
 * The one thing text cannot carry is a label with a line break or `#`
 * (the rest of the line is a comment): those bytes become spaces.
 */
#include "bellcheck.h"
#include "model_write.h"

#include <stdio.h>

/* 1 for the bytes a `name` line cannot carry: they become spaces. */
static int label_blank(unsigned char ch)
{
    return ch <= 0x20 || ch == 0x7f || ch == '#';
}

/* The `name` line: the label with line breaks, control bytes and `#` as spaces;
 * no line at all when nothing else is left (the reader rejects an empty name). */
static void text_label(bc__outbuf *o, const char *label)
{
    const char *p = label;
    while (p && *p && label_blank((unsigned char)*p))
        p++;
    if (!p || !*p)
        return;
    bc__outbuf_str(o, "name ");
    for (p = label; *p; p++)
        bc__outbuf_char(o, label_blank((unsigned char)*p) ? ' ' : *p);
    bc__outbuf_char(o, '\n');
}

int bc_write_bell_text(const bc_model *m, FILE *f)
{
    /* Names and numbers stand in the text as they are. */
    static const bc__model_format text = {BC__FORM_TEXT, bc__outbuf_str, bc__outbuf_num, text_label};
    return bc__write_model(m, f, &text);
}
