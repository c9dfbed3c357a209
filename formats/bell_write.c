/* bell_write.c — writes a model in the .bell text format, so that reading it back gives the same model. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * What makes the round trip exact:
 *  - `states` and `actions` lines fix both orders (terminal and unused names included);
 *  - every number is the exact rational (bc_num_format: decimal or p/q);
 *  - `initial` is written only when the source stated it, so the default
 *    (uniform over non-terminal states) applies again on reading;
 *  - each pair is one line with every probability written, and the outcome
 *    reward of a successor only where it is non-zero.
 * The one thing text cannot carry is a label with a line break or `#`
 * (the rest of the line is a comment): those bytes become spaces.
 *
 * Speed: a model of millions of transitions is a hot loop over names and small
 * rationals, so text is assembled in a private buffer and handed to stdio in
 * large blocks (the caller's stream may already be in use, so its own
 * buffering cannot be changed here).
 */
#include "bellcheck.h"

#include <assert.h>
#include <stdlib.h>
#include <string.h>

#define OUT_BLOCK (1 << 16)
#define OUT_SLACK 128 /* a number of the small form always fits in this */

/* Pending text is buf[0..n); n <= OUT_BLOCK except just after a number. */
typedef struct {
    FILE *f;
    const bc_bigtab *big;
    size_t n;
    int failed;
    char buf[OUT_BLOCK + OUT_SLACK];
} text_out;

static void out_flush(text_out *o)
{
    if (o->n && fwrite(o->buf, 1, o->n, o->f) != o->n)
        o->failed = 1;
    o->n = 0;
}

/* Appends s[0..len); long pieces go straight to the stream. */
static void out_bytes(text_out *o, const char *s, size_t len)
{
    if (o->n + len > OUT_BLOCK) {
        out_flush(o);
        if (len > OUT_BLOCK) {
            if (fwrite(s, 1, len, o->f) != len)
                o->failed = 1;
            return;
        }
    }
    memcpy(o->buf + o->n, s, len);
    o->n += len;
}

static void out_str(text_out *o, const char *s)
{
    out_bytes(o, s, strlen(s));
}

static void out_char(text_out *o, char ch)
{
    if (o->n >= OUT_BLOCK)
        out_flush(o);
    o->buf[o->n++] = ch;
}

/* Appends the exact text of x ("0.95", "-1/3", or a long big rational). */
static void out_num(text_out *o, bc_num x)
{
    if (x.den != 0) {
        /* Small form: under 64 characters, formatted in place; the slack
         * past OUT_BLOCK guarantees the room (invariant n <= OUT_BLOCK + OUT_SLACK). */
        if (o->n > OUT_BLOCK)
            out_flush(o);
        size_t len = bc_num_format(o->buf + o->n, OUT_SLACK, x, o->big);
        assert(len < OUT_SLACK);
        o->n += len;
        return;
    }
    out_flush(o);
    if (bc_num_write(o->f, x, o->big) < 0)
        o->failed = 1;
}

/* Appends " name" for each name of t in index order (a `states`/`actions` line). */
static void out_name_list(text_out *o, const char *keyword, const bc_names *t)
{
    out_str(o, keyword);
    for (int32_t i = 0; i < bc_names_count(t); i++) {
        out_char(o, ' ');
        out_str(o, bc_names_get(t, i));
    }
    out_char(o, '\n');
}

/* 1 for the bytes a `name` line cannot carry: they become spaces. */
static int label_blank(unsigned char ch)
{
    return ch <= 0x20 || ch == 0x7f || ch == '#';
}

/* The `name` line: the label with line breaks, control bytes and `#` as spaces;
 * no line at all when nothing else is left (the reader rejects an empty name). */
static void out_label(text_out *o, const char *label)
{
    const char *p = label;
    while (p && *p && label_blank((unsigned char)*p))
        p++;
    if (!p || !*p)
        return;
    out_str(o, "name ");
    for (p = label; *p; p++)
        out_char(o, label_blank((unsigned char)*p) ? ' ' : *p);
    out_char(o, '\n');
}

/* Directives, in the order a reader expects to meet them. */
static void out_directives(text_out *o, const bc_model *m)
{
    out_str(o, "# written by bellcheck " BC_VERSION "\nbell 1\n");
    out_label(o, m->name);
    out_str(o, "discount ");
    out_num(o, m->discount_exact);
    out_str(o, m->objective == BC_MIN ? "\nobjective min\n" : "\nobjective max\n");
    if (m->horizon > 0) {
        char tmp[32];
        snprintf(tmp, sizeof tmp, "horizon %d\n", (int)m->horizon);
        out_str(o, tmp);
    }
    out_name_list(o, "states", m->state_names);
    out_name_list(o, "actions", m->action_names);
    int any_terminal = 0;
    for (int32_t s = 0; s < m->n_states; s++) {
        if (!m->terminal[s])
            continue;
        out_str(o, any_terminal++ ? " " : "terminal ");
        out_str(o, bc_names_get(m->state_names, s));
    }
    if (any_terminal)
        out_char(o, '\n');
    if (m->initial_given) {
        out_str(o, "initial");
        for (int32_t s = 0; s < m->n_states; s++) {
            if (bc_num_sign(m->initial_exact[s], m->big) == 0)
                continue; /* a zero entry says nothing the reader needs */
            out_char(o, ' ');
            out_str(o, bc_names_get(m->state_names, s));
            out_char(o, ' ');
            out_num(o, m->initial_exact[s]);
        }
        out_char(o, '\n');
    }
}

/* One line per pair: STATE ACTION REWARD -> NEXT PROB [OUTCOME] ... */
static void out_pairs(text_out *o, const bc_model *m)
{
    for (int64_t p = 0; p < m->n_pairs; p++) {
        out_str(o, bc_names_get(m->state_names, m->pair_state[p]));
        out_char(o, ' ');
        out_str(o, bc_names_get(m->action_names, m->pair_action[p]));
        out_char(o, ' ');
        out_num(o, m->reward_exact[p]);
        out_str(o, " ->");
        for (int64_t t = m->pair_trans_start[p]; t < m->pair_trans_start[p + 1]; t++) {
            out_char(o, ' ');
            out_str(o, bc_names_get(m->state_names, m->succ_state[t]));
            out_char(o, ' ');
            out_num(o, m->prob_exact[t]);
            if (m->outcome_exact && bc_num_sign(m->outcome_exact[t], m->big) != 0) {
                out_char(o, ' ');
                out_num(o, m->outcome_exact[t]);
            }
        }
        out_char(o, '\n');
        if (o->failed)
            return;
    }
}

int bc_write_bell_text(const bc_model *m, FILE *f)
{
    text_out *o = malloc(sizeof *o);
    if (!o)
        return -1;
    o->f = f;
    o->big = m->big;
    o->n = 0;
    o->failed = 0;
    out_directives(o, m);
    out_pairs(o, m);
    out_flush(o);
    int rc = o->failed || fflush(f) != 0 || ferror(f) ? -1 : 0; /* a full disk shows here */
    free(o);
    return rc;
}
