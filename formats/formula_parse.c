/* formula_parse.c — formulas of .task files: text to a syntax tree, constants folded, then a flat stack program. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Grammar, loosest binding first (every operator of one level is left
 * associative, except `^`, which is right associative):
 *
 *     or      := and { "or" and }
 *     and     := not { "and" not }
 *     not     := "not" not | compare
 *     compare := sum [ ("<" | "<=" | ">" | ">=" | "==" | "!=") sum ]
 *     sum     := product { ("+" | "-") product }
 *     product := unary { ("*" | "/") unary }
 *     unary   := ("-" | "+") unary | power
 *     power   := atom [ "^" unary ]
 *     atom    := NUMBER | NAME ["'"] | NAME "(" args ")" | "(" or ")"
 *
 * so -2^2 is -4 and 2^-1 is 0.5, as in mathematics.  Comparisons do not
 * chain (a < b < c is an error: it rarely means what it says).
 *
 * The parser builds a small tree, folding every operation whose operands are
 * numbers at once (by running the evaluator itself on them, so a folded value
 * is bit for bit what the program would compute; an operation that raises a
 * floating-point exception is left for run time, where it is reported).  The
 * tree is then flattened into the instructions of task_internal.h, choosing
 * the forms with a number or a variable as right operand where they apply.
 * Parsing stops at the first error of a formula.
 */
#include "task_internal.h"

#include <math.h>
#include <stdarg.h>
#include <stdlib.h>
#include <string.h>

#define NEST_MAX 200 /* nesting of parentheses and operators the parser follows */
/* Operations on the longest path from the root of the tree to a leaf.  The
 * parser nests at most NEST_MAX deep, but a chain such as x + x + ... + x
 * builds a left-deep tree as long as the line, and flatten() recurses along
 * it: without this bound a long enough line overflows the C stack. */
#define HEIGHT_MAX 2000

typedef enum { N_NUM, N_VAR, N_UN, N_BIN, N_FN, N_IF } node_kind;

typedef struct {
    node_kind kind;
    int32_t op;      /* bc__op for N_UN, N_BIN, N_FN */
    int32_t slot;    /* N_VAR */
    double k;        /* N_NUM */
    int32_t arg[3];  /* children */
    int32_t n_args;
    int32_t col;     /* where the node's text starts */
    int32_t height;  /* operations on the longest path down to a leaf (a leaf: 1) */
} node;

typedef enum { T_END, T_NUM, T_NAME, T_OP } tok_kind;

typedef struct {
    tok_kind kind;
    const char *s;
    size_t len;
    int primed;     /* T_NAME followed by ' */
    double value;   /* T_NUM */
    int32_t col;
} token;

typedef struct {
    const char *s;
    size_t len, i;
    int32_t line, col0;
    const bc__scope *scope;
    const char *file;
    bc_diag *d;
    token cur;
    node *nodes;
    int32_t n_nodes, cap_nodes;
    int depth;
    bc__ins *code;
    int32_t n_code, cap_code;
} parser;

/* The functions of the language; n_args -1 = two or more (min, max). */
static const struct {
    const char *name;
    int32_t op;
    int n_args;
} functions[] = {
    {"sin", OP_SIN, 1},     {"cos", OP_COS, 1},     {"tan", OP_TAN, 1},   {"asin", OP_ASIN, 1},
    {"acos", OP_ACOS, 1},   {"atan", OP_ATAN, 1},   {"atan2", OP_ATAN2, 2}, {"sinh", OP_SINH, 1},
    {"cosh", OP_COSH, 1},   {"tanh", OP_TANH, 1},   {"exp", OP_EXP, 1},   {"log", OP_LOG, 1},
    {"log10", OP_LOG10, 1}, {"sqrt", OP_SQRT, 1},   {"abs", OP_ABS, 1},   {"floor", OP_FLOOR, 1},
    {"ceil", OP_CEIL, 1},   {"round", OP_ROUND, 1}, {"min", OP_MIN, -1},  {"max", OP_MAX, -1},
    {"clamp", OP_CLAMP, 3}, {"if", OP_JZ, 3},
};
#define N_FUNCTIONS ((int)(sizeof functions / sizeof functions[0]))

static int word_is(const char *s, size_t len, const char *w)
{
    return strlen(w) == len && memcmp(s, w, len) == 0;
}

static int find_function(const char *s, size_t len)
{
    for (int f = 0; f < N_FUNCTIONS; f++)
        if (word_is(s, len, functions[f].name))
            return f;
    return -1;
}

int bc__formula_reserved(const char *s, size_t len)
{
    return find_function(s, len) >= 0 || word_is(s, len, "and") || word_is(s, len, "or") ||
           word_is(s, len, "not") || word_is(s, len, "pi");
}

static int fail(parser *p, int32_t col, const char *fmt, ...) __attribute__((format(printf, 3, 4)));

static int fail(parser *p, int32_t col, const char *fmt, ...)
{
    char msg[512];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(msg, sizeof msg, fmt, ap);
    va_end(ap);
    bc_diag_add(p->d, BC_ERROR, p->file, p->line, col, "%s", msg);
    return -1;
}

/* ---- tokens --------------------------------------------------------------- */

static int is_alpha(char c)
{
    return (c >= 'A' && c <= 'Z') || (c >= 'a' && c <= 'z') || c == '_';
}

static int is_digit(char c)
{
    return c >= '0' && c <= '9';
}

/* A number: digits [. digits] [e [sign] digits], read exactly, then rounded once. */
static int scan_number(parser *p, token *t)
{
    size_t i = p->i;
    while (i < p->len && (is_digit(p->s[i]) || p->s[i] == '.'))
        i++;
    if (i < p->len && (p->s[i] == 'e' || p->s[i] == 'E')) {
        size_t j = i + 1;
        if (j < p->len && (p->s[j] == '+' || p->s[j] == '-'))
            j++;
        if (j < p->len && is_digit(p->s[j])) {
            while (j < p->len && is_digit(p->s[j]))
                j++;
            i = j;
        } else {
            i = j; /* let the number parser say what is wrong with "1e" */
        }
    }
    while (i < p->len && (is_alpha(p->s[i]) || is_digit(p->s[i])))
        i++; /* "2x" or "0x10": one bad token rather than a number and a name */
    t->kind = T_NUM;
    t->s = p->s + p->i;
    t->len = i - p->i;
    bc_bigtab *big = bc_bigtab_new();
    const char *why = NULL;
    bc_num v;
    int rc = big ? bc_num_parse(t->s, t->len, &v, big, &why) : -1;
    if (rc == 0)
        t->value = bc_num_to_double(v, big);
    bc_bigtab_free(big);
    if (rc < 0)
        return fail(p, t->col, "`%.*s` is not a number: %s", (int)(t->len > 60 ? 60 : t->len),
                    t->s, why ? why : "out of memory");
    if (!isfinite(t->value))
        return fail(p, t->col, "the number `%.*s` is too large for a double", (int)t->len, t->s);
    p->i = i;
    return 0;
}

/* Reads the next token into p->cur; 0 or -1. */
static int next_token(parser *p)
{
    while (p->i < p->len && (p->s[p->i] == ' ' || p->s[p->i] == '\t' || p->s[p->i] == '\r'))
        p->i++;
    token *t = &p->cur;
    memset(t, 0, sizeof *t);
    t->col = p->col0 + (int32_t)p->i;
    if (p->i >= p->len) {
        t->kind = T_END;
        return 0;
    }
    char c = p->s[p->i];
    if (is_digit(c) || (c == '.' && p->i + 1 < p->len && is_digit(p->s[p->i + 1])))
        return scan_number(p, t);
    t->s = p->s + p->i;
    if (is_alpha(c)) {
        size_t j = p->i;
        while (j < p->len && (is_alpha(p->s[j]) || is_digit(p->s[j])))
            j++;
        t->kind = T_NAME;
        t->len = j - p->i;
        if (j < p->len && p->s[j] == '\'') {
            t->primed = 1;
            j++;
        }
        p->i = j;
        return 0;
    }
    static const char *const ops[] = {"<=", ">=", "==", "!=", "+", "-", "*", "/", "^",
                                      "(", ")", ",", "<", ">"};
    for (size_t k = 0; k < sizeof ops / sizeof ops[0]; k++) {
        size_t n = strlen(ops[k]);
        if (p->len - p->i >= n && memcmp(p->s + p->i, ops[k], n) == 0) {
            t->kind = T_OP;
            t->len = n;
            p->i += n;
            return 0;
        }
    }
    if (c == '=')
        return fail(p, t->col, "`=` is not an operator here: compare with `==`");
    if (c == '\'')
        return fail(p, t->col, "`'` (a next value) must follow a state variable's name directly");
    if ((unsigned char)c < 32 || (unsigned char)c >= 127)
        return fail(p, t->col, "unexpected byte 0x%02x in a formula", (unsigned)(unsigned char)c);
    return fail(p, t->col, "unexpected character `%c` in a formula", c);
}

static int is_op(const token *t, const char *op)
{
    return t->kind == T_OP && word_is(t->s, t->len, op);
}

static int is_word(const token *t, const char *w)
{
    return t->kind == T_NAME && !t->primed && word_is(t->s, t->len, w);
}

/* What the current token is, for "expected X, found Y" messages. */
static const char *found(const parser *p, char *buf, size_t cap)
{
    if (p->cur.kind == T_END)
        return "the end of the formula";
    snprintf(buf, cap, "`%.*s%s`", (int)(p->cur.len > 60 ? 60 : p->cur.len), p->cur.s,
             p->cur.primed ? "'" : "");
    return buf;
}

/* ---- the tree ------------------------------------------------------------- */

/* Makes room for one more element in *arr (n used of *cap, each sz bytes); 0 or -1 after reporting. */
static int room(parser *p, void **arr, int32_t n, int32_t *cap, size_t sz, int32_t col)
{
    if (n < *cap)
        return 0;
    int32_t c = *cap ? 2 * *cap : 32;
    void *grown = realloc(*arr, (size_t)c * sz);
    if (!grown)
        return fail(p, col, "out of memory");
    *arr = grown;
    *cap = c;
    return 0;
}

static int32_t new_node(parser *p, node_kind kind, int32_t op, int32_t col)
{
    if (room(p, (void **)&p->nodes, p->n_nodes, &p->cap_nodes, sizeof *p->nodes, col) < 0)
        return -1;
    node *n = &p->nodes[p->n_nodes];
    memset(n, 0, sizeof *n);
    n->kind = kind;
    n->op = op;
    n->col = col;
    n->height = 1;
    return p->n_nodes++;
}

static int32_t num_node(parser *p, double k, int32_t col)
{
    int32_t i = new_node(p, N_NUM, 0, col);
    if (i >= 0)
        p->nodes[i].k = k;
    return i;
}

/* Replaces node i by a number when its operands are numbers and computing it
 * raises no floating-point exception. */
static void fold(parser *p, int32_t i)
{
    node *n = &p->nodes[i];
    if (n->kind == N_IF) {
        node *c = &p->nodes[n->arg[0]];
        if (c->kind == N_NUM)
            *n = p->nodes[c->k != 0 ? n->arg[1] : n->arg[2]];
        return;
    }
    bc__ins code[5];
    int32_t m = 0;
    for (int32_t a = 0; a < n->n_args; a++) {
        const node *c = &p->nodes[n->arg[a]];
        if (c->kind != N_NUM)
            return;
        code[m++] = (bc__ins){OP_K, 0, c->k, 0};
    }
    code[m++] = (bc__ins){n->op, 0, 0, 0};
    code[m++] = (bc__ins){OP_END, 0, 0, 0};
    bc__program prog = {code, m, 0, 0};
    bc__fp_clear();
    double no_slots[1] = {0}; /* constant programs read no variable */
    double v = bc__program_eval(&prog, no_slots);
    if (!bc__fp_raised() && isfinite(v)) {
        n->kind = N_NUM;
        n->k = v;
        n->n_args = 0;
        n->height = 1;
    }
}

static int32_t op_node(parser *p, node_kind kind, int32_t op, int32_t col, int32_t a, int32_t b,
                       int32_t c, int32_t n_args)
{
    int32_t i = new_node(p, kind, op, col);
    if (i < 0)
        return -1;
    node *n = &p->nodes[i];
    n->arg[0] = a;
    n->arg[1] = b;
    n->arg[2] = c;
    n->n_args = n_args;
    for (int32_t k = 0; k < n_args; k++)
        if (p->nodes[n->arg[k]].height >= n->height)
            n->height = p->nodes[n->arg[k]].height + 1;
    fold(p, i);
    if (p->nodes[i].height > HEIGHT_MAX)
        return fail(p, col, "the formula is too long: more than %d operations in a row "
                    "(group the terms of a long sum or product in parentheses)", HEIGHT_MAX);
    return i;
}

/* ---- the parser ----------------------------------------------------------- */

static int32_t parse_or(parser *p);
static int32_t parse_unary(parser *p);

/* A name in the formula's scope: a number (constant, pi) or a slot. */
static int32_t name_node(parser *p, const token *t)
{
    const bc__scope *sc = p->scope;
    const bc_task *task = sc->task;
    int len = (int)(t->len > 80 ? 80 : t->len);
    if (word_is(t->s, t->len, "pi") && !t->primed)
        return num_node(p, 3.14159265358979323846, t->col);
    char kind = 0;
    int32_t k = bc__task_lookup(task, t->s, t->len, sc->n_consts, &kind);
    if (k < 0) {
        if (sc->kind == BC__SCOPE_CONST)
            return fail(p, t->col, "unknown name `%.*s`: a constant may use numbers, pi and "
                        "the constants defined before it", len, t->s);
        return fail(p, t->col, "unknown name `%.*s` (not a constant, state variable, action "
                    "variable or noise variable of this task)", len, t->s);
    }
    if (t->primed && kind != 's')
        return fail(p, t->col, "`%.*s'`: only state variables have a next value", len, t->s);
    if (kind == 'c')
        return num_node(p, task->const_value[k], t->col);
    if (sc->kind == BC__SCOPE_CONST)
        return fail(p, t->col, "`%.*s` is a %s; a constant may use only numbers, pi and earlier "
                    "constants", len, t->s, kind == 's' ? "state variable" : kind == 'a' ?
                    "the action variable" : "noise variable");
    int32_t n = task->n_vars, slot;
    if (kind == 's' && t->primed) {
        if (sc->kind == BC__SCOPE_NEXT && !sc->primed[k])
            return fail(p, t->col, "`%.*s'` is not computed yet: `next` lines run in file order "
                        "and this formula comes before `next %.*s`", len, t->s, len, t->s);
        slot = n + k;
    } else {
        slot = kind == 's' ? k : kind == 'a' ? 2 * n : 2 * n + 1 + k;
    }
    int32_t i = new_node(p, N_VAR, 0, t->col);
    if (i >= 0)
        p->nodes[i].slot = slot;
    return i;
}

/* NAME "(" args ")" with the current token just past NAME. */
static int32_t call(parser *p, const token *name)
{
    int f = find_function(name->s, name->len);
    int len = (int)(name->len > 80 ? 80 : name->len);
    char kind;
    if (f < 0 && bc__task_lookup(p->scope->task, name->s, name->len, p->scope->task->n_consts,
                                 &kind) >= 0)
        return fail(p, name->col, "`%.*s` is a %s, not a function; write `*` to multiply", len,
                    name->s, kind == 'c' ? "constant" : "variable");
    if (f < 0)
        return fail(p, name->col, "unknown function `%.*s` (the functions are sin cos tan asin "
                    "acos atan atan2 sinh cosh tanh exp log log10 sqrt abs floor ceil round min "
                    "max clamp if)", len, name->s);
    int32_t args[64], n_args = 0;
    char buf[96];
    if (next_token(p) < 0)
        return -1;
    if (!is_op(&p->cur, ")")) {
        for (;;) {
            if (n_args == 64)
                return fail(p, p->cur.col, "too many arguments");
            if ((args[n_args++] = parse_or(p)) < 0)
                return -1;
            if (is_op(&p->cur, ")"))
                break;
            if (!is_op(&p->cur, ","))
                return fail(p, p->cur.col, "expected `,` or `)` in the arguments of `%s`, found %s",
                            functions[f].name, found(p, buf, sizeof buf));
            if (next_token(p) < 0)
                return -1;
        }
    }
    int want = functions[f].n_args;
    if ((want > 0 && n_args != want) || (want < 0 && n_args < 2))
        return fail(p, name->col, "`%s` takes %s%d argument%s, found %d", functions[f].name,
                    want < 0 ? "at least " : "", want < 0 ? 2 : want, want == 1 ? "" : "s",
                    (int)n_args);
    if (next_token(p) < 0)
        return -1;
    if (functions[f].op == OP_JZ)
        return op_node(p, N_IF, 0, name->col, args[0], args[1], args[2], 3);
    if (want < 0) { /* min(a, b, c) = min(min(a, b), c) */
        int32_t acc = args[0];
        for (int32_t k = 1; k < n_args && acc >= 0; k++)
            acc = op_node(p, N_FN, functions[f].op, name->col, acc, args[k], 0, 2);
        return acc;
    }
    return op_node(p, N_FN, functions[f].op, name->col, args[0], args[1], args[2], n_args);
}

static int32_t parse_atom(parser *p)
{
    char buf[96];
    token t = p->cur;
    if (t.kind == T_NUM) {
        if (next_token(p) < 0)
            return -1;
        return num_node(p, t.value, t.col);
    }
    if (is_op(&t, "(")) {
        if (next_token(p) < 0)
            return -1;
        int32_t e = parse_or(p);
        if (e < 0)
            return -1;
        if (!is_op(&p->cur, ")"))
            return fail(p, p->cur.col, "expected `)` to close the `(` at column %d, found %s",
                        (int)t.col, found(p, buf, sizeof buf));
        return next_token(p) < 0 ? -1 : e;
    }
    if (t.kind == T_NAME) {
        if (is_word(&t, "and") || is_word(&t, "or") || is_word(&t, "not"))
            return fail(p, t.col, "expected a value, found the operator `%.*s`", (int)t.len, t.s);
        if (next_token(p) < 0)
            return -1;
        if (is_op(&p->cur, "(") && !t.primed)
            return call(p, &t);
        if (find_function(t.s, t.len) >= 0)
            return fail(p, t.col, "`%.*s` is a function: write `%.*s(...)`", (int)t.len, t.s,
                        (int)t.len, t.s);
        return name_node(p, &t);
    }
    if (t.kind == T_END)
        return fail(p, t.col, "the formula ends where a value was expected");
    return fail(p, t.col, "expected a value (a number, a name or `(`), found %s",
                found(p, buf, sizeof buf));
}

static int32_t parse_power(parser *p)
{
    int32_t a = parse_atom(p);
    if (a < 0 || !is_op(&p->cur, "^"))
        return a;
    int32_t col = p->cur.col;
    if (next_token(p) < 0)
        return -1;
    int32_t b = parse_unary(p);
    return b < 0 ? -1 : op_node(p, N_BIN, OP_POW, col, a, b, 0, 2);
}

static int32_t parse_unary(parser *p)
{
    if (++p->depth > NEST_MAX)
        return fail(p, p->cur.col, "the formula nests deeper than %d levels", NEST_MAX);
    int32_t r;
    if (is_op(&p->cur, "-") || is_op(&p->cur, "+")) {
        int neg = p->cur.s[0] == '-';
        int32_t col = p->cur.col;
        if (next_token(p) < 0)
            return -1;
        r = parse_unary(p);
        if (r >= 0 && neg)
            r = op_node(p, N_UN, OP_NEG, col, r, 0, 0, 1);
    } else {
        r = parse_power(p);
    }
    p->depth--;
    return r;
}

/* One level of left-associative binary operators: ops[k] becomes codes[k]. */
static int32_t parse_level(parser *p, int32_t (*operand)(parser *), const char *const *ops,
                           const int32_t *codes, int n_ops, int words)
{
    int32_t a = operand(p);
    while (a >= 0) {
        int k = 0;
        while (k < n_ops && !(words ? is_word(&p->cur, ops[k]) : is_op(&p->cur, ops[k])))
            k++;
        if (k == n_ops)
            break;
        int32_t col = p->cur.col;
        if (next_token(p) < 0)
            return -1;
        int32_t b = operand(p);
        a = b < 0 ? -1 : op_node(p, N_BIN, codes[k], col, a, b, 0, 2);
    }
    return a;
}

static int32_t parse_product(parser *p)
{
    static const char *const ops[] = {"*", "/"};
    static const int32_t codes[] = {OP_MUL, OP_DIV};
    return parse_level(p, parse_unary, ops, codes, 2, 0);
}

static int32_t parse_sum(parser *p)
{
    static const char *const ops[] = {"+", "-"};
    static const int32_t codes[] = {OP_ADD, OP_SUB};
    return parse_level(p, parse_product, ops, codes, 2, 0);
}

static int32_t parse_compare(parser *p)
{
    static const char *const ops[] = {"<", "<=", ">", ">=", "==", "!="};
    static const int32_t codes[] = {OP_LT, OP_LE, OP_GT, OP_GE, OP_EQ, OP_NE};
    int32_t a = parse_sum(p);
    for (int k = 0; a >= 0 && k < 6; k++) {
        if (!is_op(&p->cur, ops[k]))
            continue;
        int32_t col = p->cur.col;
        if (next_token(p) < 0)
            return -1;
        int32_t b = parse_sum(p);
        if (b < 0)
            return -1;
        for (int j = 0; j < 6; j++)
            if (is_op(&p->cur, ops[j]))
                return fail(p, p->cur.col, "comparisons do not chain: write `a < b and b < c`");
        return op_node(p, N_BIN, codes[k], col, a, b, 0, 2);
    }
    return a;
}

static int32_t parse_not(parser *p)
{
    if (!is_word(&p->cur, "not"))
        return parse_compare(p);
    if (++p->depth > NEST_MAX)
        return fail(p, p->cur.col, "the formula nests deeper than %d levels", NEST_MAX);
    int32_t col = p->cur.col;
    if (next_token(p) < 0)
        return -1;
    int32_t a = parse_not(p);
    p->depth--;
    return a < 0 ? -1 : op_node(p, N_UN, OP_NOT, col, a, 0, 0, 1);
}

static int32_t parse_and(parser *p)
{
    static const char *const ops[] = {"and"};
    static const int32_t codes[] = {OP_AND};
    return parse_level(p, parse_not, ops, codes, 1, 1);
}

static int32_t parse_or(parser *p)
{
    static const char *const ops[] = {"or"};
    static const int32_t codes[] = {OP_OR};
    if (++p->depth > NEST_MAX)
        return fail(p, p->cur.col, "the formula nests deeper than %d levels", NEST_MAX);
    int32_t r = parse_level(p, parse_and, ops, codes, 1, 1);
    p->depth--;
    return r;
}

/* ---- the program ---------------------------------------------------------- */

static int emit(parser *p, int32_t op, int32_t slot, double k, double k2, int32_t col)
{
    if (room(p, (void **)&p->code, p->n_code, &p->cap_code, sizeof *p->code, col) < 0)
        return -1;
    p->code[p->n_code++] = (bc__ins){op, slot, k, k2};
    return 0;
}

/* The _K form of a binary operation with a number on the right, or -1. */
static int32_t k_form(int32_t op)
{
    switch (op) {
    case OP_ADD: return OP_ADD_K;
    case OP_SUB: return OP_SUB_K;
    case OP_MUL: return OP_MUL_K;
    case OP_DIV: return OP_DIV_K;
    case OP_POW: return OP_POW_K;
    case OP_LT: return OP_LT_K;
    case OP_LE: return OP_LE_K;
    case OP_GT: return OP_GT_K;
    case OP_GE: return OP_GE_K;
    case OP_EQ: return OP_EQ_K;
    case OP_NE: return OP_NE_K;
    default: return -1;
    }
}

/* With the number on the left: the form that computes the same value from the
 * other operand (exactly: IEEE addition and multiplication commute), or -1. */
static int32_t k_left_form(int32_t op)
{
    switch (op) {
    case OP_ADD: return OP_ADD_K;
    case OP_MUL: return OP_MUL_K;
    case OP_SUB: return OP_KSUB;
    case OP_DIV: return OP_KDIV;
    case OP_POW: return OP_KPOW;
    case OP_LT: return OP_GT_K;
    case OP_LE: return OP_GE_K;
    case OP_GT: return OP_LT_K;
    case OP_GE: return OP_LE_K;
    case OP_EQ: return OP_EQ_K;
    case OP_NE: return OP_NE_K;
    default: return -1;
    }
}

static int32_t v_form(int32_t op)
{
    switch (op) {
    case OP_ADD: return OP_ADD_V;
    case OP_SUB: return OP_SUB_V;
    case OP_MUL: return OP_MUL_V;
    case OP_DIV: return OP_DIV_V;
    case OP_POW: return OP_POW_V;
    default: return -1;
    }
}

/* Emits node i; *depth is the stack depth before, updated to after. */
static int flatten(parser *p, int32_t i, int *depth)
{
    const node n = p->nodes[i];
    if (*depth + 3 > BC__STACK_MAX)
        return fail(p, n.col, "the formula is too deeply nested to evaluate (more than %d "
                    "pending values)", BC__STACK_MAX - 3);
    if (n.kind == N_NUM || n.kind == N_VAR) {
        ++*depth;
        return emit(p, n.kind == N_NUM ? OP_K : OP_V, n.slot, n.k, 0, n.col);
    }
    if (n.kind == N_IF) {
        int d0 = *depth;
        if (flatten(p, n.arg[0], depth) < 0 || emit(p, OP_JZ, 0, 0, 0, n.col) < 0)
            return -1;
        int32_t jz = p->n_code - 1;
        *depth = d0;
        if (flatten(p, n.arg[1], depth) < 0 || emit(p, OP_JMP, 0, 0, 0, n.col) < 0)
            return -1;
        int32_t jmp = p->n_code - 1;
        p->code[jz].slot = p->n_code;
        *depth = d0;
        if (flatten(p, n.arg[2], depth) < 0)
            return -1;
        p->code[jmp].slot = p->n_code;
        return 0;
    }
    const node *a = &p->nodes[n.arg[0]], *b = n.n_args > 1 ? &p->nodes[n.arg[1]] : NULL;
    if (n.kind == N_BIN && b && b->kind == N_NUM && k_form(n.op) >= 0) {
        if (flatten(p, n.arg[0], depth) < 0)
            return -1;
        if (n.op == OP_POW && b->k == 2)
            return emit(p, OP_SQR, 0, 0, 0, n.col); /* x*x: the correctly rounded square */
        return emit(p, k_form(n.op), 0, b->k, 0, n.col);
    }
    if (n.kind == N_BIN && b && b->kind == N_VAR && v_form(n.op) >= 0) {
        if (flatten(p, n.arg[0], depth) < 0)
            return -1;
        return emit(p, v_form(n.op), b->slot, 0, 0, n.col);
    }
    if (n.kind == N_BIN && a->kind == N_NUM && k_left_form(n.op) >= 0) {
        if (flatten(p, n.arg[1], depth) < 0)
            return -1;
        return emit(p, k_left_form(n.op), 0, a->k, 0, n.col);
    }
    if (n.kind == N_FN && n.op == OP_CLAMP && b->kind == N_NUM &&
        p->nodes[n.arg[2]].kind == N_NUM) {
        if (flatten(p, n.arg[0], depth) < 0)
            return -1;
        return emit(p, OP_CLAMP_KK, 0, b->k, p->nodes[n.arg[2]].k, n.col);
    }
    for (int32_t k = 0; k < n.n_args; k++)
        if (flatten(p, n.arg[k], depth) < 0)
            return -1;
    *depth -= n.n_args - 1;
    return emit(p, n.op, 0, 0, 0, n.col);
}

int bc__formula_compile(const char *text, size_t len, int32_t line, int32_t col,
                        const bc__scope *scope, const char *file, bc_diag *d, bc__program *out)
{
    parser p;
    memset(&p, 0, sizeof p);
    p.s = text;
    p.len = len;
    p.line = line;
    p.col0 = col;
    p.scope = scope;
    p.file = file;
    p.d = d;
    memset(out, 0, sizeof *out);
    int rc = -1, depth = 0;
    char buf[96];
    if (next_token(&p) == 0) {
        if (p.cur.kind == T_END) {
            fail(&p, col, "expected a formula");
        } else {
            int32_t root = parse_or(&p);
            if (root >= 0 && p.cur.kind != T_END)
                fail(&p, p.cur.col, "expected an operator or the end of the formula, found %s",
                     found(&p, buf, sizeof buf));
            else if (root >= 0 && flatten(&p, root, &depth) == 0 &&
                     emit(&p, OP_END, 0, 0, 0, col) == 0)
                rc = 0;
        }
    }
    free(p.nodes);
    if (rc < 0) {
        free(p.code);
        return -1;
    }
    out->code = p.code;
    out->n_code = p.n_code;
    out->line = line;
    out->col = col;
    return 0;
}

void bc__program_free(bc__program *p)
{
    free(p->code);
    memset(p, 0, sizeof *p);
}
