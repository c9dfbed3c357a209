/* bell_read.c — the .bell text reader: one pass over the bytes, tokens fed to the builder. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Tokens are separated by spaces or tabs; a token never needs a copy: it is a
 * (pointer, length) into the caller's buffer.  A line is a transition line
 * exactly when it contains the token `->`, so state names never clash with the
 * directive keywords.  Columns count bytes from 1.
 */
#include "bellcheck.h"

#include <stdlib.h>
#include <string.h>

typedef struct {
    const char *s;
    size_t len;
    int32_t col;
} token;

/* Parsed numbers by their text: models repeat a few probabilities and
 * rewards millions of times, and exact parsing (a gcd) costs far more than
 * a lookup.  Direct-mapped; only texts of at most 16 bytes whose value has
 * the small form (independent of the big-number table) are kept. */
#define NUM_CACHE 16384
typedef struct {
    uint64_t k0, k1; /* the text, zero-padded */
    uint32_t len;    /* 0: empty entry */
    bc_num value;
} num_entry;

typedef struct {
    const char *file;
    const char *end; /* end of the input buffer */
    bc_diag *diag;
    bc_builder *b;
    int32_t line;
    const char *line_start;
    token *tok;
    size_t n_tok, cap_tok;
    int errors;
    int seen_content; /* a non-comment line was already read */
    num_entry *num_cache; /* [NUM_CACHE], or NULL (out of memory: no cache) */
} reader;

static bc_pos pos_of(const reader *r, const token *t)
{
    bc_pos p = {r->line, t ? t->col : 1, NULL};
    return p;
}

static int report(reader *r, const token *t, const char *fmt, const char *a, size_t alen)
{
    r->errors++;
    bc_diag_add(r->diag, BC_ERROR, r->file, r->line, t ? t->col : 1, fmt, (int)alen, a);
    return -1;
}

/* Byte classes of names: 1 may start a name, 2 may continue one (a table,
 * since names are checked byte by byte millions of times). */
static const uint8_t name_class[256] = {
    ['_'] = 3, ['.'] = 2, [':'] = 2, ['-'] = 2,
    ['0'] = 2, ['1'] = 2, ['2'] = 2, ['3'] = 2, ['4'] = 2, ['5'] = 2, ['6'] = 2, ['7'] = 2,
    ['8'] = 2, ['9'] = 2,
    ['A'] = 3, ['B'] = 3, ['C'] = 3, ['D'] = 3, ['E'] = 3, ['F'] = 3, ['G'] = 3, ['H'] = 3,
    ['I'] = 3, ['J'] = 3, ['K'] = 3, ['L'] = 3, ['M'] = 3, ['N'] = 3, ['O'] = 3, ['P'] = 3,
    ['Q'] = 3, ['R'] = 3, ['S'] = 3, ['T'] = 3, ['U'] = 3, ['V'] = 3, ['W'] = 3, ['X'] = 3,
    ['Y'] = 3, ['Z'] = 3,
    ['a'] = 3, ['b'] = 3, ['c'] = 3, ['d'] = 3, ['e'] = 3, ['f'] = 3, ['g'] = 3, ['h'] = 3,
    ['i'] = 3, ['j'] = 3, ['k'] = 3, ['l'] = 3, ['m'] = 3, ['n'] = 3, ['o'] = 3, ['p'] = 3,
    ['q'] = 3, ['r'] = 3, ['s'] = 3, ['t'] = 3, ['u'] = 3, ['v'] = 3, ['w'] = 3, ['x'] = 3,
    ['y'] = 3, ['z'] = 3,
};

static int is_name_start(char c)
{
    return name_class[(unsigned char)c] & 1;
}

static int is_name_char(char c)
{
    return name_class[(unsigned char)c] & 2;
}

/* Checks that t is a name: [A-Za-z_][A-Za-z0-9_.:-]*, at most 255 bytes. */
static int expect_name(reader *r, const token *t, const char *what)
{
    char fmt[160];
    if (!is_name_start(t->s[0])) {
        snprintf(fmt, sizeof fmt, "expected %s (a name such as s1 or left), found `%%.*s`", what);
        return report(r, t, fmt, t->s, t->len);
    }
    for (size_t i = 1; i < t->len; i++) {
        if (!is_name_char(t->s[i])) {
            snprintf(fmt, sizeof fmt,
                     "expected %s; `%%.*s` contains a character not allowed in names "
                     "(letters, digits, _ . : -)",
                     what);
            return report(r, t, fmt, t->s, t->len);
        }
    }
    if (t->len > BC_NAME_MAX)
        return report(r, t, "a name is at most 255 bytes long; `%.*s...` is longer", t->s, 40);
    return 0;
}

/* The cache entry of t's text (key in k), or NULL when it cannot be cached. */
static num_entry *num_slot(const reader *r, const token *t, uint64_t k[2])
{
    if (!r->num_cache || t->len > 2 * sizeof *k)
        return NULL;
#if defined(__BYTE_ORDER__) && __BYTE_ORDER__ == __ORDER_LITTLE_ENDIAN__
    if (t->s + 2 * sizeof *k <= r->end) {
        /* Two whole words, masked to the token: no byte-wise copy (whose
         * stores the loads would wait for). */
        memcpy(k, t->s, 2 * sizeof *k);
        if (t->len < 8) {
            k[0] &= (1ULL << (8 * t->len)) - 1;
            k[1] = 0;
        } else if (t->len < 16) {
            k[1] &= (1ULL << (8 * (t->len - 8))) - 1;
        }
    } else
#endif
    {
        k[0] = k[1] = 0;
        memcpy(k, t->s, t->len);
    }
    uint64_t h = (k[0] * 0x9E3779B97F4A7C15ULL) ^ (k[1] * 0xBF58476D1CE4E5B9ULL) ^ t->len;
    return &r->num_cache[(h ^ (h >> 29)) % NUM_CACHE];
}

/* Parses t as an exact number into *out. */
static int expect_number(reader *r, const token *t, const char *what, bc_num *out)
{
    const char *why = NULL;
    uint64_t k[2];
    num_entry *e = num_slot(r, t, k);
    if (e) {
        if (e->len == t->len && e->k0 == k[0] && e->k1 == k[1]) {
            *out = e->value;
            return 0;
        }
    }
    if (bc_num_parse(t->s, t->len, out, bc_builder_bigtab(r->b), &why) == 0) {
        if (e && out->den != 0)
            e->k0 = k[0], e->k1 = k[1], e->len = (uint32_t)t->len, e->value = *out;
        return 0;
    }
    char fmt[320];
    snprintf(fmt, sizeof fmt, "expected %s, found `%%.*s` (%s)", what, why);
    return report(r, t, fmt, t->s, t->len > 80 ? 80 : t->len);
}

static int is_number_token(const token *t)
{
    char c = t->s[0];
    return (c >= '0' && c <= '9') || ((c == '-' || c == '+' || c == '.') && !(t->len == 2 && t->s[1] == '>'));
}

static int is_arrow(const token *t)
{
    return t->len == 2 && t->s[0] == '-' && t->s[1] == '>';
}

/* Splits one line [p, end) into tokens, stopping at '#'. */
/* 1 for the bytes that separate tokens, 2 for the comment mark. */
static const uint8_t sep_class[256] = {[' '] = 1, ['\t'] = 1, ['\r'] = 1, ['#'] = 2};

static int tokenize(reader *r, const char *p, const char *end)
{
    r->n_tok = 0;
    while (p < end) {
        while (p < end && sep_class[(unsigned char)*p] == 1)
            p++;
        if (p >= end || *p == '#')
            break;
        const char *start = p;
        while (p < end && !sep_class[(unsigned char)*p])
            p++;
        if (r->n_tok == r->cap_tok) {
            size_t cap = r->cap_tok ? 2 * r->cap_tok : 64;
            token *t = realloc(r->tok, cap * sizeof *t);
            if (!t) {
                bc_diag_add(r->diag, BC_ERROR, r->file, r->line, 1, "out of memory");
                return -1;
            }
            r->tok = t;
            r->cap_tok = cap;
        }
        token *t = &r->tok[r->n_tok++];
        t->s = start;
        t->len = (size_t)(p - start);
        t->col = (int32_t)(start - r->line_start) + 1;
    }
    return 0;
}

/* The successors after `->`: NEXT [PROB [OUTCOME_REWARD]] ...; 0 or -1. */
static int successors(reader *r)
{
    const token *t = r->tok;
    size_t n = r->n_tok, n_succ = 0;
    if (n == 4)
        return report(r, &t[3], "expected a successor state after `%.*s`", t[3].s, t[3].len);
    for (size_t k = 4; k < n; k++)
        n_succ += is_name_start(t[k].s[0]);
    for (size_t i = 4; i < n;) {
        const token *name = &t[i++];
        if (expect_name(r, name, "a successor state") < 0)
            return -1;
        bc_num prob, outcome;
        const bc_num *has_prob = NULL, *has_outcome = NULL;
        if (i < n && is_number_token(&t[i])) {
            const token *pt = &t[i++];
            if (expect_number(r, pt, "a probability", &prob) < 0)
                return -1;
            if (bc_num_sign(prob, bc_builder_bigtab(r->b)) < 0)
                return report(r, pt, "a probability must not be negative; found `%.*s`", pt->s,
                              pt->len);
            has_prob = &prob;
            if (i < n && is_number_token(&t[i])) {
                if (expect_number(r, &t[i++], "an outcome reward", &outcome) < 0)
                    return -1;
                has_outcome = &outcome;
            }
        } else if (n_succ > 1) {
            return report(r, name,
                          "successor `%.*s` needs a probability: only a lone successor may omit it",
                          name->s, name->len);
        }
        if (bc_builder_succ(r->b, name->s, name->len, has_prob, has_outcome, pos_of(r, name)) < 0)
            return -1;
    }
    return 0;
}

/* STATE ACTION REWARD -> NEXT [PROB [OUTCOME]] ... */
static int transition_line(reader *r)
{
    token *t = r->tok;
    size_t n = r->n_tok;
    /* Check the tokens in reading order, so the message points at the first wrong one. */
    if (expect_name(r, &t[0], "a state name") < 0)
        return -1;
    if (n < 2 || is_arrow(&t[1]))
        return report(r, n < 2 ? &t[0] : &t[1],
                      "expected an action name after the state `%.*s`", t[0].s, t[0].len);
    if (expect_name(r, &t[1], "an action name") < 0)
        return -1;
    if (n < 3)
        return report(r, &t[1], "expected the reward (a number) after the action `%.*s`", t[1].s,
                      t[1].len);
    if (is_arrow(&t[2]))
        return report(r, &t[2], "expected the reward (a number) before `%.*s`", t[2].s, t[2].len);
    if (n < 4)
        return report(r, &t[2], "expected `->` and the successors after the reward `%.*s`",
                      t[2].s, t[2].len);
    if (!is_arrow(&t[3]))
        return report(r, &t[3], "expected `->` after STATE ACTION REWARD, found `%.*s`", t[3].s,
                      t[3].len);
    bc_num reward;
    if (expect_number(r, &t[2], "the reward (a number)", &reward) < 0)
        return -1;
    if (bc_builder_pair_begin(r->b, t[0].s, t[0].len, pos_of(r, &t[0]), t[1].s, t[1].len,
                              pos_of(r, &t[1]), reward) < 0)
        return -1;
    /* Successor names are usually scattered over a large table: start all
     * their lookups before resolving any, so the cache misses overlap. */
    for (int stage = 0; stage < 2; stage++)
        for (size_t k = 4; k < n; k++) {
            if (is_name_start(t[k].s[0]))
                bc_builder_prefetch_state(r->b, t[k].s, t[k].len, stage);
        }
    int rc = successors(r);
    /* After an error the line is dropped whole: checking its sum would only add noise. */
    if (rc < 0) {
        bc_builder_pair_cancel(r->b);
        return -1;
    }
    return bc_builder_pair_end(r->b, pos_of(r, &t[0]));
}

/* `states`, `actions`, `terminal`: KEYWORD NAME ... */
static int list_line(reader *r, int (*begin)(bc_builder *, bc_pos), const char *what)
{
    if (r->n_tok < 2)
        return report(r, &r->tok[0], "`%.*s` needs at least one name", r->tok[0].s, r->tok[0].len);
    int rc = begin(r->b, pos_of(r, &r->tok[0]));
    for (size_t i = 1; i < r->n_tok && rc == 0; i++) {
        if (expect_name(r, &r->tok[i], what) < 0 ||
            bc_builder_list_add(r->b, r->tok[i].s, r->tok[i].len, pos_of(r, &r->tok[i])) < 0)
            rc = -1;
    }
    bc_builder_list_end(r->b, pos_of(r, &r->tok[0]));
    return rc;
}

/* initial S1 P1 S2 P2 ...   or   initial S */
static int initial_line(reader *r)
{
    token *t = r->tok;
    size_t n = r->n_tok;
    if (n < 2)
        return report(r, &t[0], "`%.*s` needs a state, or states with probabilities", t[0].s,
                      t[0].len);
    if (bc_builder_initial_begin(r->b, pos_of(r, &t[0])) < 0)
        return -1;
    size_t i = 1;
    while (i < n) {
        if (expect_name(r, &t[i], "a state name") < 0)
            return -1;
        const token *name = &t[i++];
        bc_num p;
        int has = 0;
        if (i < n && is_number_token(&t[i])) {
            if (expect_number(r, &t[i++], "a probability", &p) < 0)
                return -1;
            if (bc_num_sign(p, bc_builder_bigtab(r->b)) < 0)
                return report(r, &t[i - 1], "a probability must not be negative: `%.*s`",
                              t[i - 1].s, t[i - 1].len);
            has = 1;
        }
        if (bc_builder_initial_add(r->b, name->s, name->len, has ? &p : NULL, pos_of(r, name)) < 0)
            return -1;
    }
    return bc_builder_initial_end(r->b, pos_of(r, &t[0]));
}

/* KEYWORD NUMBER lines: bell, discount, horizon. */
static int number_line(reader *r, const char *what, bc_num *out)
{
    if (r->n_tok != 2) {
        const token *t = r->n_tok < 2 ? &r->tok[0] : &r->tok[2];
        if (r->n_tok < 2)
            return report(r, t, "`%.*s` needs one number", t->s, t->len);
        return report(r, t, "unexpected `%.*s`: this directive takes one number", t->s, t->len);
    }
    return expect_number(r, &r->tok[1], what, out);
}

static int token_is(const token *t, const char *word)
{
    size_t n = strlen(word);
    return t->len == n && memcmp(t->s, word, n) == 0;
}

/* `name TEXT`: the rest of the line after the keyword, trimmed. */
static int name_line(reader *r, const char *end)
{
    const char *p = r->tok[0].s + r->tok[0].len;
    while (p < end && (*p == ' ' || *p == '\t'))
        p++;
    const char *hash = p < end ? memchr(p, '#', (size_t)(end - p)) : NULL; /* a comment ends the text */
    const char *q = hash ? hash : end;
    while (q > p && (q[-1] == ' ' || q[-1] == '\t' || q[-1] == '\r'))
        q--;
    if (q == p)
        return report(r, &r->tok[0], "`%.*s` needs a text", r->tok[0].s, r->tok[0].len);
    return bc_builder_name(r->b, p, (size_t)(q - p), pos_of(r, &r->tok[0]));
}

static int is_directive(const token *t)
{
    /* Every keyword starts with one of these letters and has 4 to 9 bytes;
     * most lines are transition lines, which this turns away at once. */
    if (t->len < 4 || t->len > 9 || !strchr("bndohitsa", t->s[0]))
        return 0;
    static const char *const words[] = {"bell", "name", "discount", "objective", "horizon",
                                        "initial", "terminal", "states", "actions"};
    for (size_t i = 0; i < sizeof words / sizeof words[0]; i++)
        if (token_is(t, words[i]))
            return 1;
    return 0;
}

static int directive_line(reader *r, const char *end)
{
    token *k = &r->tok[0];
    bc_num x;
    if (token_is(k, "bell")) {
        if (r->seen_content)
            return report(r, k, "`%.*s` (the version line) must be the first line", k->s, k->len);
        if (number_line(r, "the format version", &x) < 0)
            return -1;
        if (!(x.den == 1 && x.num == 1))
            return report(r, &r->tok[1], "unsupported format version `%.*s`; this reader knows version 1",
                          r->tok[1].s, r->tok[1].len);
        return 0;
    }
    if (token_is(k, "name"))
        return name_line(r, end);
    if (token_is(k, "discount"))
        return number_line(r, "the discount (a number in (0, 1])", &x) < 0
                   ? -1
                   : bc_builder_discount(r->b, x, pos_of(r, &r->tok[1]));
    if (token_is(k, "horizon"))
        return number_line(r, "the horizon (a positive integer)", &x) < 0
                   ? -1
                   : bc_builder_horizon(r->b, x, pos_of(r, &r->tok[1]));
    if (token_is(k, "objective")) {
        if (r->n_tok < 2)
            return report(r, k, "expected `max` or `min` after `%.*s`; the line ends there", k->s,
                          k->len);
        if (r->n_tok != 2 || !(token_is(&r->tok[1], "max") || token_is(&r->tok[1], "min"))) {
            const token *t = r->n_tok > 2 && (token_is(&r->tok[1], "max") || token_is(&r->tok[1], "min"))
                                 ? &r->tok[2] : &r->tok[1];
            return report(r, t, "expected `objective max` or `objective min`, found `%.*s`", t->s,
                          t->len);
        }
        return bc_builder_objective(r->b, token_is(&r->tok[1], "max") ? BC_MAX : BC_MIN,
                                    pos_of(r, k));
    }
    if (token_is(k, "initial"))
        return initial_line(r);
    if (token_is(k, "terminal"))
        return list_line(r, bc_builder_terminal_begin, "a state name");
    if (token_is(k, "states"))
        return list_line(r, bc_builder_states_begin, "a state name");
    if (token_is(k, "actions"))
        return list_line(r, bc_builder_actions_begin, "an action name");
    /* read_line sends only the keywords above here. */
    return report(r, k, "internal error: `%.*s` is not a directive", k->s, k->len);
}

/* Reads one line [p, end). */
static int read_line(reader *r, const char *p, const char *end)
{
    r->line_start = p;
    const char *nul = memchr(p, '\0', (size_t)(end - p));
    if (nul) {
        r->errors++;
        bc_diag_add(r->diag, BC_ERROR, r->file, r->line, (int32_t)(nul - p) + 1,
                    "binary data (a NUL byte); a model is UTF-8 text");
        return -2; /* stop: the rest is not text */
    }
    if (tokenize(r, p, end) < 0)
        return -2;
    if (r->n_tok == 0)
        return 0;
    int rc = 0;
    /* A line with `->` is a transition line; so is one that does not start
     * with a directive keyword (then its messages say what a transition line
     * lacks, rather than calling the state an unknown directive). */
    int is_transition = !is_directive(&r->tok[0]);
    /* `name` takes the rest of its line as text, which may hold `->`. */
    for (size_t i = 1; i < r->n_tok && !is_transition && !token_is(&r->tok[0], "name"); i++)
        is_transition = is_arrow(&r->tok[i]);
    if (is_transition)
        rc = transition_line(r);
    else
        rc = directive_line(r, end);
    r->seen_content = 1;
    return rc;
}

bc_model *bc_read_bell_text(const char *buf, size_t len, const char *file_label, bc_diag *d)
{
    reader r = {0};
    r.file = file_label ? file_label : "<input>";
    r.num_cache = calloc(NUM_CACHE, sizeof *r.num_cache);
    r.diag = d;
    r.b = bc_builder_new(r.file, d);
    if (!r.b) {
        free(r.num_cache);
        bc_diag_add(d, BC_ERROR, r.file, 0, 0, "out of memory");
        return NULL;
    }
    const char *p = buf, *end = buf + len;
    r.end = end;
    if (len >= 3 && (unsigned char)p[0] == 0xEF && (unsigned char)p[1] == 0xBB &&
        (unsigned char)p[2] == 0xBF)
        p += 3; /* UTF-8 byte-order mark */
    int stop = 0;
    while (p < end && !stop) {
        const char *eol = memchr(p, '\n', (size_t)(end - p));
        if (!eol)
            eol = end;
        r.line++;
        if (read_line(&r, p, eol) == -2 || bc_diag_full(d))
            stop = 1;
        p = eol + 1;
    }
    free(r.tok);
    free(r.num_cache);
    if (r.errors || stop) {
        bc_builder_free(r.b);
        return NULL;
    }
    return bc_builder_finish(r.b, NULL);
}
