/* builder.c — turns directives and transition lines, in any order, into a checked bc_model. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Every reader (text, JSON, grids) feeds this one builder, so the rules of the
 * model format are enforced in one place: probability sums, declared orders,
 * dead ends, duplicate pairs, terminal states without lines.
 *
 * Pairs and successors are appended as they come ("raw" arrays, input order).
 * bc_builder_finish() sorts the pairs into CSR order (state, then action);
 * when the input was already in that order — what generators usually write —
 * the raw arrays become the model's arrays without a copy.
 */
#include "bellcheck.h"
#include "builder_internal.h"

#include <assert.h>
#include <float.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* Reports a problem at `at` (line/col, or a JSON-style path). Returns -1. */
int bc__builder_report(bc_builder *b, bc_severity sev, bc_pos at, const char *fmt, ...)
{
    char msg[1024];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(msg, sizeof msg, fmt, ap);
    va_end(ap);
    if (sev == BC_ERROR)
        b->n_errors++;
    if (at.line == 0 && at.path) {
        size_t n = strlen(b->file) + strlen(at.path) + 2;
        char *where = malloc(n);
        if (where)
            snprintf(where, n, "%s:%s", b->file, at.path);
        bc_diag_add(b->diag, sev, where ? where : b->file, 0, 0, "%s", msg);
        free(where);
    } else {
        bc_diag_add(b->diag, sev, b->file, at.line, at.col, "%s", msg);
    }
    return -1;
}

/* Grows *arr (element size sz) to hold at least need elements. */
int bc__grow(void **arr, int64_t *cap, int64_t need, size_t sz)
{
    if (need <= *cap)
        return 0;
    int64_t c = *cap ? *cap : 1024;
    while (c < need)
        c *= 2;
    if ((uint64_t)c > SIZE_MAX / sz)
        return -1;
    void *p = realloc(*arr, (size_t)c * sz);
    if (!p)
        return -1;
    *arr = p;
    *cap = c;
    return 0;
}

const char *bc__abbrev(char *text)
{
    if (!text)
        return "(a number; out of memory to show it)";
    size_t n = strlen(text);
    if (n > 200) /* keep the head and the tail, and say that the middle is left out */
        memmove(text + 90, "...", 4), memmove(text + 93, text + n - 90, 91);
    return text;
}

int bc__resize(void **arr, int64_t old_cap, int64_t new_cap, size_t sz)
{
    if (new_cap < 0 || (uint64_t)new_cap > SIZE_MAX / sz)
        return -1;
    void *p = realloc(*arr, new_cap ? (size_t)new_cap * sz : 1);
    if (!p)
        return -1;
    if (new_cap > old_cap)
        memset((char *)p + (size_t)old_cap * sz, 0, (size_t)(new_cap - old_cap) * sz);
    *arr = p;
    return 0;
}

bc_builder *bc_builder_new(const char *file_label, bc_diag *d)
{
    bc_builder *b = calloc(1, sizeof *b);
    if (!b)
        return NULL;
    b->diag = d;
    b->file = strdup(file_label ? file_label : "<input>");
    b->big = bc_bigtab_new();
    b->values = bc_numtab_new();
    b->states.names = bc_names_new();
    b->actions.names = bc_names_new();
    if (!b->file || !b->big || !b->values || !b->states.names || !b->actions.names) {
        bc_builder_free(b);
        return NULL;
    }
    b->objective = BC_MAX;
    return b;
}

static void nameset_free(bc_nameset *ns)
{
    bc_names_free(ns->names);
    free(ns->first);
    free(ns->declared);
    free(ns->listed);
    free(ns->order);
}

void bc_builder_free(bc_builder *b)
{
    if (!b)
        return;
    free(b->file);
    free(b->label);
    bc_bigtab_free(b->big);
    bc_numtab_free(b->values);
    nameset_free(&b->states);
    nameset_free(&b->actions);
    free(b->terminal_at);
    free(b->init_state);
    free(b->init_prob);
    free(b->init_has_prob);
    free(b->p_state);
    free(b->p_action);
    free(b->p_reward);
    free(b->p_line);
    free(b->p_col);
    free(b->p_trans_start);
    free(b->t_succ);
    free(b->t_prob);
    free(b->t_outcome);
    free(b->line_prob);
    free(b->renorm_lines);
    free(b);
}

bc_bigtab *bc_builder_bigtab(bc_builder *b)
{
    return b->big;
}

bc_numtab *bc_builder_values(bc_builder *b)
{
    return b->values;
}

int32_t bc_builder_known_state(bc_builder *b, const char *name, size_t len)
{
    return bc_names_find(b->states.names, name, len);
}

/* 1 when name[0..len) matches [A-Za-z_][A-Za-z0-9_.:-]* and is at most BC_NAME_MAX bytes.
 * Readers check names with their own messages; this guards every other caller. */
static int valid_name(const char *name, size_t len)
{
    /* 1: may start a name (letters, _), 2: may continue it (also digits . : -). */
    static uint8_t cls[256];
    static int ready; /* filled once; the same values whichever thread fills it */
    if (!ready) {
        for (int c = 0; c < 256; c++) {
            int alpha = (c >= 'A' && c <= 'Z') || (c >= 'a' && c <= 'z') || c == '_';
            int other = (c >= '0' && c <= '9') || c == '.' || c == ':' || c == '-';
            cls[c] = (uint8_t)(alpha ? 3 : other ? 2 : 0);
        }
        ready = 1;
    }
    if (len == 0 || len > BC_NAME_MAX || !(cls[(unsigned char)name[0]] & 1))
        return 0;
    for (size_t i = 1; i < len; i++)
        if (!(cls[(unsigned char)name[i]] & 2))
            return 0;
    return 1;
}

/* Interns a name into a name set and records where it first appeared. */
static int32_t nameset_intern(bc_builder *b, bc_nameset *ns, const char *name, size_t len,
                              bc_pos at)
{
    /* A name already held was checked when it was added: most calls end here. */
    int32_t known = bc_names_find(ns->names, name, len);
    if (known >= 0)
        return known;
    if (!valid_name(name, len)) {
        bc__builder_report(b, BC_ERROR, at,
                           "`%.*s` is not a valid name: names start with a letter or _, "
                           "continue with letters, digits, _ . : - and have at most 255 bytes",
                           (int)(len > 80 ? 80 : len), name);
        return -1;
    }
    int32_t before = bc_names_count(ns->names);
    int32_t i = bc_names_intern(ns->names, name, len);
    if (i < 0) {
        bc__builder_report(b, BC_ERROR, at, "out of memory while storing names");
        return -1;
    }
    if (i == before) {
        if (i >= ns->cap) {
            int64_t cap = ns->cap ? 2 * ns->cap : 256;
            if (bc__resize((void **)&ns->first, ns->cap, cap, sizeof *ns->first) < 0 ||
                bc__resize((void **)&ns->declared, ns->cap, cap, sizeof *ns->declared) < 0 ||
                bc__resize((void **)&ns->listed, ns->cap, cap, sizeof *ns->listed) < 0) {
                bc__builder_report(b, BC_ERROR, at, "out of memory while storing names");
                return -1;
            }
            ns->cap = cap;
        }
        ns->first[i].line = at.line;
        ns->first[i].col = at.col;
        ns->declared[i] = 0;
        ns->listed[i] = 0;
    }
    return i;
}

int32_t bc_builder_state(bc_builder *b, const char *name, size_t len, bc_pos at)
{
    return nameset_intern(b, &b->states, name, len, at);
}

uint64_t bc_builder_seek_state(bc_builder *b, const char *name, size_t len)
{
    return bc_names_seek(b->states.names, name, len);
}

int32_t bc_builder_found_state(bc_builder *b, const char *name, size_t len, uint64_t key)
{
    return bc_names_found(b->states.names, name, len, key);
}

int32_t bc_builder_action(bc_builder *b, const char *name, size_t len, bc_pos at)
{
    return nameset_intern(b, &b->actions, name, len, at);
}

int bc__directive_once(bc_builder *b, bc_directive which, const char *word, bc_pos at)
{
    if (b->seen[which].line || b->seen_flag[which]) {
        if (b->seen[which].line)
            return bc__builder_report(b, BC_ERROR, at,
                                      "`%s` appears twice (first at line %d); each directive "
                                      "may appear at most once",
                                      word, (int)b->seen[which].line);
        return bc__builder_report(b, BC_ERROR, at, "`%s` appears twice", word);
    }
    b->seen[which].line = at.line;
    b->seen[which].col = at.col;
    b->seen_flag[which] = 1;
    return 0;
}

int bc_builder_name(bc_builder *b, const char *text, size_t len, bc_pos at)
{
    if (bc__directive_once(b, BC_DIR_NAME, "name", at) < 0)
        return -1;
    free(b->label);
    b->label = strndup(text, len);
    return b->label ? 0 : bc__builder_report(b, BC_ERROR, at, "out of memory");
}

int bc_builder_discount(bc_builder *b, bc_num g, bc_pos at)
{
    if (bc__directive_once(b, BC_DIR_DISCOUNT, "discount", at) < 0)
        return -1;
    if (bc_num_sign(g, b->big) <= 0 || bc_num_cmp(g, bc_num_int(1), b->big) > 0) {
        char *text = bc_num_text(g, b->big);
        bc__builder_report(b, BC_ERROR, at, "the discount must satisfy 0 < discount <= 1; found %s",
                           bc__abbrev(text));
        free(text);
        return -1;
    }
    if (bc_num_to_double(g, b->big) < DBL_MIN) {
        /* bellcheck computes in doubles: a discount that rounds to 0 (or
         * below the normal range) would make every bound meaningless. */
        char *text = bc_num_text(g, b->big);
        bc__builder_report(b, BC_ERROR, at, "the discount %s is too small to compute with: it "
                           "must be at least 2.2250738585072014e-308 (the smallest normal double)",
                           bc__abbrev(text));
        free(text);
        return -1;
    }
    b->discount = g;
    return 0;
}

int bc_builder_objective(bc_builder *b, bc_objective o, bc_pos at)
{
    if (bc__directive_once(b, BC_DIR_OBJECTIVE, "objective", at) < 0)
        return -1;
    b->objective = o;
    return 0;
}

int bc_builder_horizon(bc_builder *b, bc_num h, bc_pos at)
{
    if (bc__directive_once(b, BC_DIR_HORIZON, "horizon", at) < 0)
        return -1;
    if (h.den != 1 || h.num < 1 || h.num > 1000000) {
        char *text = bc_num_text(h, b->big);
        bc__builder_report(b, BC_ERROR, at,
                           "the horizon must be a positive integer of at most 1000000; found %s",
                           bc__abbrev(text));
        free(text);
        return -1;
    }
    b->horizon = (int32_t)h.num;
    return 0;
}
