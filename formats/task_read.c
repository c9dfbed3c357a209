/* task_read.c — the .task reader: lines to a bc_task, formulas handed to the formula compiler, errors at file:line:column. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Two passes over the lines.  The first reads the declarations (version,
 * name, discount, objective, constants, state variables, the action, noise,
 * limit); the second the lines that refer to them (next, reward, stop,
 * stop_reward, initial).  So a formula may use a variable declared further
 * down, while a constant may use only the constants above it (it is
 * computed where it stands).  Within a pass every line is checked and reading
 * goes on after an error, so one run lists up to the diagnostics' limit of
 * problems; the second pass runs only after a clean first one, since its
 * formulas would mostly repeat the declarations' errors.
 *
 * Names of variables, constants and noise follow the formula language
 * ([A-Za-z_][A-Za-z0-9_]*, not a word of the language); action labels
 * follow the model format, since they become action names of grid models.
 */
#include "task_internal.h"

#include <float.h>
#include <math.h>
#include <stdarg.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

enum { D_TASK, D_NAME, D_DISCOUNT, D_OBJECTIVE, D_ACTION, D_REWARD, D_STOP, D_STOP_REWARD,
       D_LIMIT, D_COUNT };
static const char *const once_words[D_COUNT] = {"task", "name", "discount", "objective", "action",
                                                "reward", "stop", "stop_reward", "limit"};

typedef struct {
    const char *file;
    bc_diag *d;
    bc_task *t;
    int errors;
    int32_t line;
    const char *start, *end; /* the current line without its comment and line end */
    const char *p;           /* cursor in the line */
    int32_t seen[D_COUNT];   /* line of each once-only directive, 0 if not seen */
    int32_t first_line;      /* first line with content */
    uint8_t primed[BC_TASK_MAX_VARS];
    int32_t init_line[BC_TASK_MAX_VARS];
} reader;

static int32_t col_of(const reader *r, const char *at)
{
    return (int32_t)(at - r->start) + 1;
}

static int fail(reader *r, const char *at, const char *fmt, ...) __attribute__((format(printf, 3, 4)));

static int fail(reader *r, const char *at, const char *fmt, ...)
{
    char msg[600];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(msg, sizeof msg, fmt, ap);
    va_end(ap);
    r->errors++;
    bc_diag_add(r->d, BC_ERROR, r->file, r->line, at ? col_of(r, at) : 0, "%s", msg);
    return -1;
}

/* ---- the cursor ----------------------------------------------------------- */

static void skip_blanks(reader *r)
{
    while (r->p < r->end && (*r->p == ' ' || *r->p == '\t'))
        r->p++;
}

static int at_end(reader *r)
{
    skip_blanks(r);
    return r->p >= r->end;
}

/* The next blank-separated word (stopping also at any of `stops`); len 0 at the end. */
static const char *word(reader *r, size_t *len, const char *stops)
{
    skip_blanks(r);
    const char *s = r->p;
    while (r->p < r->end && *r->p != ' ' && *r->p != '\t' && !(stops && strchr(stops, *r->p)))
        r->p++;
    *len = (size_t)(r->p - s);
    return s;
}

static int ident_start(char c)
{
    return (c >= 'A' && c <= 'Z') || (c >= 'a' && c <= 'z') || c == '_';
}

static int ident_char(char c)
{
    return ident_start(c) || (c >= '0' && c <= '9');
}

/* Takes `ch` after blanks; 1 if it was there. */
static int take(reader *r, char ch)
{
    skip_blanks(r);
    if (r->p < r->end && *r->p == ch) {
        r->p++;
        return 1;
    }
    return 0;
}

/* What stands at the cursor, for messages. */
static const char *here(reader *r, char *buf, size_t cap)
{
    skip_blanks(r);
    if (r->p >= r->end)
        return "the end of the line";
    size_t n = 0;
    while (r->p + n < r->end && r->p[n] != ' ' && r->p[n] != '\t' && n < 40)
        n++;
    snprintf(buf, cap, "`%.*s`", (int)n, r->p);
    return buf;
}

/* A name of the formula language, new to the task: sets *s, *len; 0 or -1. */
static int new_name(reader *r, const char *what, const char **s, size_t *len)
{
    char buf[64];
    skip_blanks(r);
    const char *a = r->p;
    if (r->p >= r->end || !ident_start(*r->p))
        return fail(r, a, "expected %s (a name like speed or x_1), found %s", what,
                    here(r, buf, sizeof buf));
    while (r->p < r->end && ident_char(*r->p))
        r->p++;
    *s = a;
    *len = (size_t)(r->p - a);
    int n = (int)(*len > 80 ? 80 : *len);
    if (r->p < r->end && *r->p != ' ' && *r->p != '\t' && *r->p != '=')
        return fail(r, r->p, "`%c` is not allowed in a name (letters, digits and _)", *r->p);
    if (*len > BC_NAME_MAX)
        return fail(r, a, "a name is at most %d bytes long", BC_NAME_MAX);
    if (bc__formula_reserved(a, *len))
        return fail(r, a, "`%.*s` is a word of the formula language and cannot name %s", n, a, what);
    char kind;
    if (bc__task_lookup(r->t, a, *len, r->t->n_consts, &kind) >= 0)
        return fail(r, a, "`%.*s` is already the name of a %s", n, a,
                    kind == 's' ? "state variable" : kind == 'a' ? "the action variable" :
                    kind == 'n' ? "noise variable" : "constant");
    return 0;
}

/* An exact number word (stopping at `stops`); 0 or -1. */
static int number(reader *r, const char *what, const char *stops, bc_num *out, double *dbl,
                  const char **at)
{
    size_t len;
    const char *s = word(r, &len, stops);
    const char *why = NULL;
    *at = s;
    if (len == 0)
        return fail(r, s, "expected %s (a number) before the end of the line", what);
    if (bc_num_parse(s, len, out, r->t->big, &why) < 0)
        return fail(r, s, "expected %s, found `%.*s` (%s)", what, (int)(len > 60 ? 60 : len), s, why);
    *dbl = bc_num_to_double(*out, r->t->big);
    if (!isfinite(*dbl))
        return fail(r, s, "%s `%.*s` is too large for a double", what, (int)(len > 60 ? 60 : len), s);
    return 0;
}

static int expect_end(reader *r)
{
    char buf[64];
    if (at_end(r))
        return 0;
    return fail(r, r->p, "unexpected %s at the end of the line", here(r, buf, sizeof buf));
}

/* The index of the state variable named by the next word; -1 after reporting. */
static int32_t state_ref(reader *r, const char *what)
{
    char buf[64];
    skip_blanks(r);
    const char *a = r->p;
    while (r->p < r->end && ident_char(*r->p))
        r->p++;
    size_t len = (size_t)(r->p - a);
    char kind;
    int32_t i = len ? bc__task_lookup(r->t, a, len, 0, &kind) : -1;
    if (len == 0) {
        r->p = a;
        return fail(r, a, "expected the name of a state variable after `%s`, found %s", what,
                    here(r, buf, sizeof buf));
    }
    if (i < 0 || kind != 's')
        return fail(r, a, "`%.*s` is not a state variable (declare it with `state %.*s LOW HIGH`)",
                    (int)len, a, (int)len, a);
    return i;
}

/* ---- first pass: declarations --------------------------------------------- */

static int once(reader *r, int which, const char *at)
{
    if (r->seen[which])
        return fail(r, at, "`%s` appears twice (first at line %d)", once_words[which],
                    (int)r->seen[which]);
    r->seen[which] = r->line;
    return 0;
}

static int version_line(reader *r, const char *at)
{
    if (once(r, D_TASK, at) < 0)
        return -1;
    if (r->first_line != r->line)
        return fail(r, at, "`task 1` must be the first line (comments and blank lines aside)");
    size_t len;
    const char *v = word(r, &len, NULL);
    if (!(len == 1 && v[0] == '1'))
        return fail(r, len ? v : at, "this reader knows version 1 of the task format, found `%.*s`",
                    (int)(len > 20 ? 20 : len), v);
    return expect_end(r);
}

static int name_line(reader *r, const char *at)
{
    if (once(r, D_NAME, at) < 0)
        return -1;
    skip_blanks(r);
    const char *e = r->end;
    while (e > r->p && (e[-1] == ' ' || e[-1] == '\t'))
        e--;
    if (e == r->p)
        return fail(r, at, "`name` needs a text");
    size_t ok = bc_utf8_valid_prefix(r->p, (size_t)(e - r->p));
    if (ok < (size_t)(e - r->p))
        return fail(r, r->p + ok, "the label holds a byte that is not UTF-8 (0x%02X); a task is UTF-8 text",
                    (unsigned)(unsigned char)r->p[ok]);
    free(r->t->name);
    r->t->name = strndup(r->p, (size_t)(e - r->p));
    r->p = r->end;
    return r->t->name ? 0 : fail(r, at, "out of memory");
}

static int discount_line(reader *r, const char *at)
{
    bc_num g;
    double dg;
    const char *s;
    if (once(r, D_DISCOUNT, at) < 0 || number(r, "the discount", NULL, &g, &dg, &s) < 0)
        return -1;
    if (bc_num_sign(g, r->t->big) <= 0 || bc_num_cmp(g, bc_num_int(1), r->t->big) > 0)
        return fail(r, s, "the discount must satisfy 0 < discount <= 1; found %.*s",
                    (int)(r->p - s), s);
    if (dg < DBL_MIN) /* as the model builder: a discount that rounds to 0 proves nothing */
        return fail(r, s, "the discount %.*s is too small to compute with: it must be at least "
                    "2.2250738585072014e-308 (the smallest normal double)", (int)(r->p - s), s);
    r->t->discount_exact = g;
    r->t->discount = dg;
    return expect_end(r);
}

static int objective_line(reader *r, const char *at)
{
    size_t len;
    if (once(r, D_OBJECTIVE, at) < 0)
        return -1;
    const char *w = word(r, &len, NULL);
    if (len == 3 && !memcmp(w, "max", 3))
        r->t->objective = BC_MAX;
    else if (len == 3 && !memcmp(w, "min", 3))
        r->t->objective = BC_MIN;
    else
        return fail(r, len ? w : r->p, "expected `max` or `min` after `objective`, found `%.*s`",
                    (int)(len > 40 ? 40 : len), w);
    return expect_end(r);
}

static int limit_line(reader *r, const char *at)
{
    bc_num v;
    double dv;
    const char *s;
    if (once(r, D_LIMIT, at) < 0 || number(r, "the step limit", NULL, &v, &dv, &s) < 0)
        return -1;
    if (v.den != 1 || v.num < 1 || v.num > 1000000000)
        return fail(r, s, "the step limit must be a whole number from 1 to 1000000000, found %.*s",
                    (int)(r->p - s), s);
    r->t->limit = v.num;
    return expect_end(r);
}

static int const_line(reader *r, const char *at)
{
    const char *s;
    size_t len;
    char buf[64];
    (void)at;
    if (new_name(r, "a constant", &s, &len) < 0)
        return -1;
    if (!take(r, '='))
        return fail(r, r->p, "expected `=` after the constant's name, found %s",
                    here(r, buf, sizeof buf));
    bc_task *t = r->t;
    bc__scope scope = {BC__SCOPE_CONST, t, t->n_consts, NULL};
    bc__program prog;
    skip_blanks(r);
    if (bc__formula_compile(r->p, (size_t)(r->end - r->p), r->line, col_of(r, r->p), &scope,
                            r->file, r->d, &prog) < 0)
        return r->errors++, -1;
    bc__fp_clear();
    double no_slots[1] = {0}; /* constant programs read no variable */
    double v = bc__program_eval(&prog, no_slots);
    int bad = bc__fp_raised() || !isfinite(v);
    bc__program_free(&prog);
    if (bad)
        return fail(r, r->p, "the value of constant `%.*s` is not a finite number", (int)len, s);
    r->p = r->end;
    char **names = realloc(t->const_name, (size_t)(t->n_consts + 1) * sizeof *names);
    if (names)
        t->const_name = names;
    double *values = realloc(t->const_value, (size_t)(t->n_consts + 1) * sizeof *values);
    if (values)
        t->const_value = values;
    char *copy = names && values ? strndup(s, len) : NULL;
    if (!copy)
        return fail(r, at, "out of memory");
    t->const_name[t->n_consts] = copy;
    t->const_value[t->n_consts++] = v;
    return 0;
}

static int state_line(reader *r, const char *at)
{
    const char *s, *ls, *hs;
    size_t len;
    bc_task *t = r->t;
    if (t->n_vars == BC_TASK_MAX_VARS)
        return fail(r, at, "a task has at most %d state variables", BC_TASK_MAX_VARS);
    bc__task_var v;
    memset(&v, 0, sizeof v);
    if (new_name(r, "a state variable", &s, &len) < 0 ||
        number(r, "the lowest value", NULL, &v.low_exact, &v.low, &ls) < 0 ||
        number(r, "the highest value", NULL, &v.high_exact, &v.high, &hs) < 0 || expect_end(r) < 0)
        return -1;
    if (bc_num_cmp(v.low_exact, v.high_exact, t->big) >= 0 || !(v.low < v.high))
        return fail(r, ls, "the range of `%.*s` is empty: the lowest value must be below the "
                    "highest", (int)len, s);
    v.name = strndup(s, len);
    if (!v.name)
        return fail(r, at, "out of memory");
    v.line = r->line;
    v.col = col_of(r, s);
    t->var[t->n_vars++] = v;
    return 0;
}

/* `action NAME = {label: value, ...}` from the `{`. */
static int action_labels(reader *r, double **values, char ***names, int32_t *n)
{
    char buf[64];
    if (!take(r, '{'))
        return fail(r, r->p, "expected `{` after `=`, found %s", here(r, buf, sizeof buf));
    for (;;) {
        skip_blanks(r);
        const char *l = r->p;
        while (r->p < r->end && (ident_char(*r->p) || *r->p == '.' || *r->p == '-'))
            r->p++;
        size_t len = (size_t)(r->p - l);
        if (len == 0 || !ident_start(*l))
            return fail(r, l, "expected an action label (a name like push_left), found %s",
                        here(r, buf, sizeof buf));
        if (len > BC_NAME_MAX)
            return fail(r, l, "a name is at most %d bytes long", BC_NAME_MAX);
        for (int32_t k = 0; k < *n; k++)
            if (strlen((*names)[k]) == len && !memcmp((*names)[k], l, len))
                return fail(r, l, "the action `%.*s` is listed twice", (int)len, l);
        if (!take(r, ':'))
            return fail(r, r->p, "expected `:` and the action's value after `%.*s`, found %s",
                        (int)len, l, here(r, buf, sizeof buf));
        bc_num v;
        double dv;
        const char *vs;
        if (number(r, "the action's value", ",}", &v, &dv, &vs) < 0)
            return -1;
        char **nn = realloc(*names, (size_t)(*n + 1) * sizeof *nn);
        if (nn)
            *names = nn;
        double *vv = realloc(*values, (size_t)(*n + 1) * sizeof *vv);
        if (vv)
            *values = vv;
        char *copy = nn && vv ? strndup(l, len) : NULL;
        if (!copy)
            return fail(r, l, "out of memory");
        (*names)[*n] = copy;
        (*values)[(*n)++] = dv;
        if (take(r, '}'))
            return expect_end(r);
        if (!take(r, ','))
            return fail(r, r->p, "expected `,` or `}` after an action's value, found %s",
                        here(r, buf, sizeof buf));
    }
}

/* `action NAME V1 V2 ...`: the actions are named NAME:V (or NAME_k when V
 * holds characters names may not, such as the / of a fraction). */
static int action_values(reader *r, const char *var, double **values, char ***names, int32_t *n)
{
    while (!at_end(r)) {
        bc_num v;
        double dv;
        const char *s;
        if (number(r, "an action value", NULL, &v, &dv, &s) < 0)
            return -1;
        size_t len = (size_t)(r->p - s);
        for (int32_t k = 0; k < *n; k++)
            if ((*values)[k] == dv)
                return fail(r, s, "the action value %.*s is listed twice", (int)len, s);
        char name[BC_NAME_MAX + 1];
        size_t plain_len = 0;
        while (plain_len < len && s[plain_len] && strchr("0123456789.-eE", s[plain_len]))
            plain_len++;
        int plain = plain_len == len;
        if (plain && strlen(var) + 1 + len <= BC_NAME_MAX)
            snprintf(name, sizeof name, "%s:%.*s", var, (int)len, s);
        else
            snprintf(name, sizeof name, "%.*s_%d", BC_NAME_MAX - 12, var, (int)*n + 1);
        char **nn = realloc(*names, (size_t)(*n + 1) * sizeof *nn);
        if (nn)
            *names = nn;
        double *vv = realloc(*values, (size_t)(*n + 1) * sizeof *vv);
        if (vv)
            *values = vv;
        char *copy = nn && vv ? strdup(name) : NULL;
        if (!copy)
            return fail(r, s, "out of memory");
        (*names)[*n] = copy;
        (*values)[(*n)++] = dv;
    }
    return 0;
}

static int action_line(reader *r, const char *at)
{
    const char *s;
    size_t len;
    bc_task *t = r->t;
    if (once(r, D_ACTION, at) < 0 || new_name(r, "the action variable", &s, &len) < 0)
        return -1;
    t->action_var = strndup(s, len);
    if (!t->action_var)
        return fail(r, at, "out of memory");
    int rc = take(r, '=') ? action_labels(r, &t->action_value, &t->action_name, &t->n_actions)
                          : action_values(r, t->action_var, &t->action_value, &t->action_name,
                                          &t->n_actions);
    if (rc == 0 && t->n_actions == 0)
        return fail(r, r->p, "`action %s` needs at least one value", t->action_var);
    return rc;
}

static int noise_line(reader *r, const char *at)
{
    const char *s, *as, *bs;
    size_t len, klen;
    bc_task *t = r->t;
    if (t->n_noise == BC_TASK_MAX_NOISE)
        return fail(r, at, "a task has at most %d noise variables", BC_TASK_MAX_NOISE);
    if (new_name(r, "a noise variable", &s, &len) < 0)
        return -1;
    const char *kind = word(r, &klen, NULL);
    bc__task_noise nz = {NULL, BC__NOISE_UNIFORM, 0, 0};
    if (klen == 6 && !memcmp(kind, "normal", 6))
        nz.kind = BC__NOISE_NORMAL;
    else if (!(klen == 7 && !memcmp(kind, "uniform", 7)))
        return fail(r, klen ? kind : r->p, "expected `uniform A B` or `normal MEAN SD` after the "
                    "noise's name, found `%.*s`", (int)(klen > 40 ? 40 : klen), kind);
    bc_num a, b;
    int normal = nz.kind == BC__NOISE_NORMAL;
    if (number(r, normal ? "the mean" : "the lowest value", NULL, &a, &nz.a, &as) < 0 ||
        number(r, normal ? "the standard deviation" : "the highest value", NULL, &b, &nz.b, &bs) < 0 ||
        expect_end(r) < 0)
        return -1;
    if (normal && !(nz.b > 0))
        return fail(r, bs, "the standard deviation must be positive");
    if (!normal && !(bc_num_cmp(a, b, t->big) < 0 && nz.a < nz.b))
        return fail(r, as, "the range of noise `%.*s` is empty: A must be below B", (int)len, s);
    nz.name = strndup(s, len);
    if (!nz.name)
        return fail(r, at, "out of memory");
    t->noise[t->n_noise++] = nz;
    return 0;
}

/* ---- second pass: formulas and initial values ----------------------------- */

/* The rest of the line as a formula in the given scope. */
static int formula(reader *r, bc__scope_kind kind, bc__program *out)
{
    bc__scope scope = {kind, r->t, r->t->n_consts, r->primed};
    skip_blanks(r);
    int rc = bc__formula_compile(r->p, (size_t)(r->end - r->p), r->line, col_of(r, r->p), &scope,
                                 r->file, r->d, out);
    r->p = r->end;
    if (rc < 0)
        r->errors++;
    return rc;
}

static int next_line(reader *r, const char *at)
{
    char buf[64];
    bc_task *t = r->t;
    int32_t i = state_ref(r, "next");
    if (i < 0)
        return -1;
    bc__task_var *v = &t->var[i];
    if (v->next_line)
        return fail(r, at, "`next %s` appears twice (first at line %d)", v->name, (int)v->next_line);
    if (r->p < r->end && *r->p == '\'')
        return fail(r, r->p, "write `next %s = ...` (without ')", v->name);
    if (!take(r, '='))
        return fail(r, r->p, "expected `=` after `next %s`, found %s", v->name,
                    here(r, buf, sizeof buf));
    v->next_line = r->line;
    if (formula(r, BC__SCOPE_NEXT, &t->next[t->n_next]) < 0)
        return -1;
    t->next_var[t->n_next++] = i;
    r->primed[i] = 1;
    return 0;
}

static int after_line(reader *r, int which, const char *at)
{
    bc_task *t = r->t;
    if (once(r, which, at) < 0)
        return -1;
    bc__program *p = which == D_REWARD ? &t->reward : which == D_STOP ? &t->stop : &t->stop_reward;
    if (formula(r, BC__SCOPE_AFTER, p) < 0)
        return -1;
    if (which == D_STOP)
        t->has_stop = 1;
    if (which == D_STOP_REWARD)
        t->has_stop_reward = 1;
    return 0;
}

/* The value is inside the variable's range; -1 after reporting. */
static int in_range(reader *r, const bc__task_var *v, bc_num x, const char *at)
{
    if (bc_num_cmp(x, v->low_exact, r->t->big) >= 0 && bc_num_cmp(x, v->high_exact, r->t->big) <= 0)
        return 0;
    char *lo = bc_num_text(v->low_exact, r->t->big), *hi = bc_num_text(v->high_exact, r->t->big);
    fail(r, at, "the initial value lies outside the range of `%s` [%s, %s]", v->name,
         lo ? lo : "?", hi ? hi : "?");
    free(lo);
    free(hi);
    return -1;
}

static int initial_line(reader *r, const char *at)
{
    size_t klen;
    const char *as, *bs;
    int32_t i = state_ref(r, "initial");
    if (i < 0)
        return -1;
    bc__task_var *v = &r->t->var[i];
    if (r->init_line[i])
        return fail(r, at, "`initial %s` appears twice (first at line %d)", v->name,
                    (int)r->init_line[i]);
    r->init_line[i] = r->line;
    if (take(r, '=')) {
        if (number(r, "the initial value", NULL, &v->init_a_exact, &v->init_a, &as) < 0 ||
            expect_end(r) < 0 || in_range(r, v, v->init_a_exact, as) < 0)
            return -1;
        v->init_b_exact = v->init_a_exact;
        v->init_b = v->init_a;
        v->init = BC__INIT_POINT;
        return 0;
    }
    const char *kind = word(r, &klen, NULL);
    if (!(klen == 7 && !memcmp(kind, "uniform", 7)))
        return fail(r, klen ? kind : r->p, "expected `uniform A B` or `= VALUE` after `initial %s`",
                    v->name);
    if (number(r, "the lowest initial value", NULL, &v->init_a_exact, &v->init_a, &as) < 0 ||
        number(r, "the highest initial value", NULL, &v->init_b_exact, &v->init_b, &bs) < 0 ||
        expect_end(r) < 0 || in_range(r, v, v->init_a_exact, as) < 0 ||
        in_range(r, v, v->init_b_exact, bs) < 0)
        return -1;
    if (bc_num_cmp(v->init_a_exact, v->init_b_exact, r->t->big) >= 0)
        return fail(r, as, "the initial range of `%s` is empty: A must be below B (use `= VALUE` "
                    "for one value)", v->name);
    v->init = BC__INIT_UNIFORM;
    return 0;
}

/* ---- lines ---------------------------------------------------------------- */

static int keyword_is(const char *w, size_t len, const char *k)
{
    return strlen(k) == len && memcmp(w, k, len) == 0;
}

/* Handles one line in the given pass (1 or 2). */
static void line(reader *r, int pass)
{
    size_t len;
    const char *w = word(r, &len, NULL);
    if (len == 0)
        return;
    if (r->first_line == 0)
        r->first_line = r->line;
    static const char *const pass1[] = {"task", "name", "discount", "objective", "const",
                                        "state", "action", "noise", "limit"};
    static const char *const pass2[] = {"next", "reward", "stop", "stop_reward", "initial"};
    for (int k = 0; pass == 1 && k < 9; k++) {
        if (!keyword_is(w, len, pass1[k]))
            continue;
        static int (*const fn[])(reader *, const char *) = {
            version_line, name_line, discount_line, objective_line, const_line,
            state_line, action_line, noise_line, limit_line};
        fn[k](r, w);
        return;
    }
    for (int k = 0; k < 5; k++) {
        if (!keyword_is(w, len, pass2[k]))
            continue;
        if (pass == 2) {
            if (k == 0)
                next_line(r, w);
            else if (k == 4)
                initial_line(r, w);
            else
                after_line(r, k == 1 ? D_REWARD : k == 2 ? D_STOP : D_STOP_REWARD, w);
        }
        return;
    }
    if (pass == 1) {
        for (int k = 0; k < 9; k++)
            if (keyword_is(w, len, pass1[k]))
                return;
        fail(r, w, "unknown line `%.*s` (a task line starts with task, name, discount, "
             "objective, const, state, action, noise, next, reward, stop, stop_reward, initial "
             "or limit)", (int)(len > 40 ? 40 : len), w);
    }
}

static void each_line(reader *r, const char *buf, size_t len, int pass)
{
    const char *p = buf, *end = buf + len;
    r->line = 0;
    if (len >= 3 && !memcmp(p, "\xEF\xBB\xBF", 3))
        p += 3;
    while (p < end && !bc_diag_full(r->d)) {
        const char *nl = memchr(p, '\n', (size_t)(end - p));
        const char *stop = nl ? nl : end;
        r->line++;
        r->start = p;
        const char *hash = memchr(p, '#', (size_t)(stop - p));
        r->end = hash ? hash : stop;
        while (r->end > p && (r->end[-1] == '\r' || r->end[-1] == ' ' || r->end[-1] == '\t'))
            r->end--;
        const char *nul = memchr(p, 0, (size_t)(r->end - p));
        r->p = p;
        if (nul && pass == 1)
            fail(r, nul, "the file holds a NUL byte: a task is a text file");
        else if (!nul)
            line(r, pass);
        p = nl ? nl + 1 : end;
    }
}

/* Required lines and the variables' completeness, after both passes. */
static void check_complete(reader *r)
{
    bc_task *t = r->t;
    r->line = 0;
    if (!r->seen[D_DISCOUNT])
        fail(r, NULL, "no `discount` line: a task needs `discount G` (0 < G <= 1)");
    if (t->n_vars == 0)
        fail(r, NULL, "no `state` line: a task needs at least one state variable");
    if (!r->seen[D_ACTION])
        fail(r, NULL, "no `action` line: a task needs its action variable and values");
    if (!r->seen[D_REWARD])
        fail(r, NULL, "no `reward` line: a task needs the reward of one step");
    if (r->seen[D_STOP_REWARD] && !r->seen[D_STOP]) {
        r->line = r->seen[D_STOP_REWARD];
        fail(r, NULL, "`stop_reward` without a `stop` line is never paid");
    }
    for (int32_t i = 0; i < t->n_vars; i++) {
        r->line = t->var[i].line;
        r->start = NULL;
        if (!t->var[i].next_line)
            bc_diag_add(r->d, BC_ERROR, r->file, r->line, t->var[i].col,
                        "state variable `%s` has no `next %s = ...` line", t->var[i].name,
                        t->var[i].name), r->errors++;
        if (!r->init_line[i])
            bc_diag_add(r->d, BC_ERROR, r->file, r->line, t->var[i].col,
                        "state variable `%s` has no `initial %s ...` line (`uniform A B` or "
                        "`= VALUE`)", t->var[i].name, t->var[i].name), r->errors++;
    }
}

bc_task *bc_task_read_text(const char *buf, size_t len, const char *file_label, bc_diag *d)
{
    reader r;
    memset(&r, 0, sizeof r);
    r.file = file_label ? file_label : "<input>";
    r.d = d;
    r.t = calloc(1, sizeof *r.t);
    if (!r.t || !(r.t->big = bc_bigtab_new()) || !(r.t->label = strdup(r.file))) {
        bc_task_free(r.t);
        bc_diag_add(d, BC_ERROR, r.file, 0, 0, "out of memory");
        return NULL;
    }
    r.t->objective = BC_MAX;
    r.t->limit = 10000;
    r.t->discount_exact = bc_num_int(1);
    r.t->discount = 1;
    if (len >= INT32_MAX) { /* lines and columns are 32-bit: refused before any is counted */
        fail(&r, NULL, "the file holds %zu bytes; a task file must be smaller than 2 GiB", len);
        bc_task_free(r.t);
        return NULL;
    }
    each_line(&r, buf, len, 1);
    if (r.errors == 0)
        each_line(&r, buf, len, 2); /* formulas would only repeat declaration errors */
    if (r.errors == 0 && r.first_line == 0) {
        r.line = 0; /* the whole file: no line to point at */
        fail(&r, NULL, "the file is empty: expected a task");
    }
    else if (r.errors == 0)
        check_complete(&r);
    if (r.errors) {
        bc_task_free(r.t);
        return NULL;
    }
    return r.t;
}

bc_task *bc_task_read_file(const char *path, bc_diag *d)
{
    char *buf;
    size_t len;
    if (bc_read_file(path, &buf, &len, d) < 0)
        return NULL;
    bc_task *t = bc_task_read_text(buf, len, strcmp(path, "-") ? path : "<stdin>", d);
    free(buf);
    return t;
}
