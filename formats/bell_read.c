/* bell_read.c — the .bell text reader: one pass over the bytes, line by line, tokens fed to the builder. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Tokens are separated by spaces or tabs; a token never needs a copy: it is a
 * (pointer, length) into the caller's buffer.  A line is a transition line
 * exactly when it contains the token `->`, so state names never clash with the
 * directive keywords.  Columns count bytes from 1.
 *
 * The reader takes its input a piece at a time (bc__bell_reader_lines): it
 * reads the complete lines of each piece and leaves the rest for the next,
 * so a file is never held whole (formats/input.c feeds it in chunks).
 *
 * Speed (docs/performance.md): nothing is allocated per token; numbers are
 * cached by their text with their id in the builder's value table; a
 * successor already seen is found by one lookup and handed over by index,
 * and only names not seen yet have their characters checked.
 */
#include "bellcheck.h"
#include "bell_read_internal.h"

#include <stddef.h>
#include <stdlib.h>
#include <string.h>

typedef struct {
    const char *s;
    size_t len;
    int32_t col;
    int32_t known; /* successor names: the state's index if already seen, else -1 */
    uint32_t id;   /* probabilities on the fast path: the value's id */
    uint64_t key;  /* successor names: the key of their lookup (bc_builder_seek_state) */
    uint64_t nk[2];        /* numbers on the fast path: their cache key ... */
    struct num_entry *bucket; /* ... and bucket (num_bucket) */
} token;

/* Parsed numbers by their text: models repeat a few probabilities and
 * rewards millions of times, and exact parsing (a gcd) and interning cost
 * far more than a lookup.  Only texts of at most 16 bytes whose value has
 * the small form are kept, with the value's id in the builder's table and
 * the value as written (num/den before reducing: a line's probabilities
 * usually share that denominator, which makes their sum two additions).
 * Two-way: a bucket is two entries in one 64-byte line; a new text goes
 * first and pushes the older entry to second place. */
#define NUM_BUCKET_BITS 13
#define NUM_BUCKETS (1 << NUM_BUCKET_BITS)
typedef struct num_entry {
    uint64_t k0, k1;     /* the text, zero-padded */
    uint32_t id;         /* of the value in the builder's table */
    uint8_t len;         /* 0: empty entry */
    int8_t sign;         /* of the value: -1, 0, 1 */
    uint16_t unused;
    uint32_t wnum, wden; /* value = wnum/wden exactly, as written; wden 0: not known */
} num_entry;

_Static_assert(sizeof(num_entry) == 32, "two entries to a 64-byte line");

/* A number read from a token, with what the caller asked for. */
typedef struct {
    bc_num value;        /* with WANT_VALUE */
    uint32_t id;         /* with WANT_ID */
    int sign;
    uint32_t wnum, wden; /* as in num_entry; wden 0 when not known */
} number;

enum { WANT_VALUE = 1, WANT_ID = 2 };

typedef struct bc__bell_reader {
    const char *file;
    const char *end; /* end of the bytes given: numbers may be loaded a word at a time up to here */
    bc_diag *diag;
    bc_builder *b;
    int32_t line;
    const char *line_start;
    token *tok;
    size_t n_tok, cap_tok;
    int errors;
    int seen_content; /* a non-comment line was already read */
    int started;      /* the first bytes were seen (a byte-order mark is skipped there only) */
    int stopped;      /* binary data or the error limit: nothing more is read */
    num_entry *num_cache; /* [2 * NUM_BUCKETS], or NULL (out of memory: no cache) */
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

/* The cache bucket of t's text (key in k), or NULL when it cannot be cached. */
static inline num_entry *num_bucket(const reader *r, const token *t, uint64_t k[2])
{
    if (!r->num_cache || t->len > 2 * sizeof *k)
        return NULL;
#if defined(__BYTE_ORDER__) && __BYTE_ORDER__ == __ORDER_LITTLE_ENDIAN__
    if (t->s + 2 * sizeof *k <= r->end) {
        /* Two whole words, masked to the token: no byte-wise copy (whose
         * stores the loads would wait for), no branch on the length. */
        static const uint64_t keep[17][2] = {
#define KEEP(n) {(n) >= 8 ? ~0ULL : (1ULL << (8 * (n))) - 1, \
                 (n) <= 8 ? 0 : (n) >= 16 ? ~0ULL : (1ULL << (8 * ((n) - 8))) - 1}
            KEEP(0),  KEEP(1),  KEEP(2),  KEEP(3),  KEEP(4),  KEEP(5),  KEEP(6),  KEEP(7), KEEP(8),
            KEEP(9),  KEEP(10), KEEP(11), KEEP(12), KEEP(13), KEEP(14), KEEP(15), KEEP(16)};
#undef KEEP
        uint64_t w0, w1; /* in registers: k is written once, not read back */
        memcpy(&w0, t->s, sizeof w0);
        memcpy(&w1, t->s + sizeof w0, sizeof w1);
        k[0] = w0 & keep[t->len][0];
        k[1] = w1 & keep[t->len][1];
    } else
#endif
    {
        k[0] = k[1] = 0;
        memcpy(k, t->s, t->len);
    }
    /* A product's high bits depend on all of its factor's bits (its low bits
     * only on the low ones, the first bytes of the text): take the top. */
    uint64_t h = (k[0] ^ (k[1] << 29 | k[1] >> 35) ^ t->len) * 0x9E3779B97F4A7C15ULL;
    return &r->num_cache[2 * (h >> (64 - NUM_BUCKET_BITS))];
}

/* The number s[0..len) as written, *wnum / *wden, when it is digits with an
 * optional fraction part, or digits '/' digits, in at most 9 digits a part;
 * else *wden = 0. */
static void written_form(const char *s, size_t len, uint32_t *wnum, uint32_t *wden)
{
    size_t i = 0, nd = 0, nf = 0;
    uint64_t a = 0, d = 1;
    *wden = 0;
    for (; i < len && s[i] >= '0' && s[i] <= '9'; i++, nd++)
        a = a * 10 + (uint64_t)(s[i] - '0');
    if (nd == 0 || nd > 9)
        return;
    if (i < len && s[i] == '.') {
        for (i++; i < len && s[i] >= '0' && s[i] <= '9'; i++, nf++)
            a = a * 10 + (uint64_t)(s[i] - '0'), d *= 10;
        if (nf == 0 || nd + nf > 9)
            return;
    } else if (i < len && s[i] == '/') {
        for (i++, d = 0; i < len && s[i] >= '0' && s[i] <= '9'; i++, nf++)
            d = d * 10 + (uint64_t)(s[i] - '0');
        if (nf == 0 || nf > 9 || d == 0)
            return;
    }
    if (i != len)
        return;
    *wnum = (uint32_t)a;
    *wden = (uint32_t)d;
}

static int read_number_in(reader *r, const token *t, num_entry *e, const uint64_t k[2], int want,
                          number *x, const char **why);

/* Reads the number of token t: from the cache, or parsed (and then cached
 * when its value is small).  0; -1 when t is not a number (*why says why);
 * -2 when out of memory. */
static int read_number(reader *r, const token *t, int want, number *x, const char **why)
{
    uint64_t k[2];
    return read_number_in(r, t, num_bucket(r, t, k), k, want, x, why);
}

/* read_number with t's cache bucket e and key k already computed (num_bucket). */
static int read_number_in(reader *r, const token *t, num_entry *e, const uint64_t k[2], int want,
                          number *x, const char **why)
{
    for (int w = 0; e && w < 2; w++) {
        if (e[w].len == t->len && e[w].k0 == k[0] && e[w].k1 == k[1]) {
            x->id = e[w].id;
            x->sign = e[w].sign;
            x->wnum = e[w].wnum;
            x->wden = e[w].wden;
            if (want & WANT_VALUE)
                x->value = bc_numtab_get(bc_builder_values(r->b), e[w].id);
            return 0;
        }
    }
    bc_bigtab *big = bc_builder_bigtab(r->b);
    if (bc_num_parse(t->s, t->len, &x->value, big, why) < 0)
        return -1;
    x->sign = bc_num_sign(x->value, big);
    x->wden = 0;
    int cache = e && x->value.den != 0;
    if (!(want & WANT_ID) && !cache)
        return 0;
    int64_t v = bc_numtab_intern(bc_builder_values(r->b), x->value);
    if (v < 0)
        return -2;
    x->id = (uint32_t)v;
    if (!cache)
        return 0;
    written_form(t->s, t->len, &x->wnum, &x->wden);
    if (x->wden && (__int128)x->value.num * x->wden != (__int128)x->wnum * x->value.den)
        x->wden = 0; /* not what was parsed: never trust it */
    e[1] = e[0];
    e[0] = (num_entry){k[0], k[1], x->id, (uint8_t)t->len, (int8_t)x->sign, 0, x->wnum, x->wden};
    return 0;
}

/* read_number, reporting a token that is not a number as `what`. */
static int expect_number_id(reader *r, const token *t, const char *what, int want, number *x)
{
    const char *why = NULL;
    int rc = read_number(r, t, want, x, &why);
    if (rc == -2) {
        r->errors++;
        bc_diag_add(r->diag, BC_ERROR, r->file, r->line, t->col, "out of memory");
        return -1;
    }
    if (rc == 0)
        return 0;
    char fmt[320];
    snprintf(fmt, sizeof fmt, "expected %s, found `%%.*s` (%s)", what, why);
    return report(r, t, fmt, t->s, t->len > 80 ? 80 : t->len);
}

/* Parses t as an exact number into *out. */
static int expect_number(reader *r, const token *t, const char *what, bc_num *out)
{
    number x;
    if (expect_number_id(r, t, what, WANT_VALUE, &x) < 0)
        return -1;
    *out = x.value;
    return 0;
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

/* 1 for the bytes that separate tokens. */
static const uint8_t sep_class[256] = {[' '] = 1, ['\t'] = 1, ['\r'] = 1};

/* Makes room for `more` tokens; 0, or -1 after reporting. */
static int reserve_tokens(reader *r, size_t more)
{
    if (r->n_tok + more <= r->cap_tok)
        return 0;
    size_t cap = r->cap_tok ? 2 * r->cap_tok : 64;
    while (cap < r->n_tok + more)
        cap *= 2;
    token *t = realloc(r->tok, cap * sizeof *t);
    if (!t) {
        bc_diag_add(r->diag, BC_ERROR, r->file, r->line, 1, "out of memory");
        return -1;
    }
    r->tok = t;
    r->cap_tok = cap;
    return 0;
}

/* Column (1-based) of p in the current line; saturates at INT32_MAX like the
 * line counter, as in the other readers. */
static int32_t column_of(const reader *r, const char *p)
{
    ptrdiff_t off = p - r->line_start;
    return off >= INT32_MAX - 1 ? INT32_MAX : (int32_t)off + 1;
}

/* Opens a token at p. */
static void token_open(reader *r, const char *p)
{
    token *t = &r->tok[r->n_tok++];
    t->s = p;
    t->col = column_of(r, p);
}

/* Closes the oldest open token at p (tokens close in the order they open). */
static void token_close(reader *r, size_t *closed, const char *p)
{
    token *t = &r->tok[(*closed)++];
    t->len = (size_t)(p - t->s);
}

#if defined(__SSE2__)
#include <emmintrin.h>
/* For 64 bytes at p: bit i of *sep set when p[i] separates tokens (space,
 * tab, CR), of *hash when it is '#', of *nul when it is NUL. */
static void masks64(const char *p, uint64_t *sep, uint64_t *hash, uint64_t *nul)
{
    const __m128i sp = _mm_set1_epi8(' '), tab = _mm_set1_epi8('\t'), cr = _mm_set1_epi8('\r');
    const __m128i hs = _mm_set1_epi8('#'), zero = _mm_setzero_si128();
    *sep = *hash = *nul = 0;
    for (int i = 0; i < 4; i++) {
        __m128i v = _mm_loadu_si128((const __m128i *)(const void *)(p + 16 * i));
        __m128i x = _mm_or_si128(_mm_or_si128(_mm_cmpeq_epi8(v, sp), _mm_cmpeq_epi8(v, tab)),
                                 _mm_cmpeq_epi8(v, cr));
        *sep |= (uint64_t)(uint16_t)_mm_movemask_epi8(x) << (16 * i);
        *hash |= (uint64_t)(uint16_t)_mm_movemask_epi8(_mm_cmpeq_epi8(v, hs)) << (16 * i);
        *nul |= (uint64_t)(uint16_t)_mm_movemask_epi8(_mm_cmpeq_epi8(v, zero)) << (16 * i);
    }
}
#endif

/* Splits one line [p, end) into tokens, stopping at '#', and finds its
 * first NUL byte (*nul; NULL if none), which makes the line binary data.
 * 64 bytes at a time where the buffer allows (SSE2): masks of the
 * separators give the bytes where tokens open (a token byte after a
 * separator) and close (a separator after a token byte), with no branch
 * per byte.  0, or -1 after reporting. */
static int tokenize(reader *r, const char *p, const char *end, const char **nul)
{
    r->n_tok = 0;
    *nul = NULL;
    size_t closed = 0;
    int in_tok = 0;        /* the byte before p belongs to a token */
    const char *cut = end; /* where tokens stop: the line's end, or its first '#' */
#if defined(__SSE2__)
    for (; p < end && p + 64 <= r->end; p += 64) {
        if (reserve_tokens(r, 32) < 0)
            return -1;
        uint64_t sep, hash, zero;
        masks64(p, &sep, &hash, &zero);
        uint64_t past = end - p < 64 ? ~0ULL << (end - p) : 0; /* bytes after the line */
        if (zero & ~past) {
            *nul = p + __builtin_ctzll(zero & ~past);
            return 0;
        }
        if (cut < end) /* in a comment: only NUL bytes matter now */
            continue;
        if (hash & ~past) {
            cut = p + __builtin_ctzll(hash & ~past);
            past |= ~0ULL << (cut - p);
        }
        sep |= past; /* past the line or in its comment: separators */
        uint64_t word = ~sep, before = word << 1 | (uint64_t)in_tok;
        for (uint64_t open = word & ~before; open; open &= open - 1)
            token_open(r, p + __builtin_ctzll(open));
        for (uint64_t close = sep & before; close; close &= close - 1)
            token_close(r, &closed, p + __builtin_ctzll(close));
        in_tok = (int)(word >> 63);
    }
#endif
    for (; p < end; p++) { /* the end of the buffer, or no SSE2 */
        if (*p == '\0') {
            *nul = p;
            return 0;
        }
        if (*p == '#' && cut == end)
            cut = p;
        int sep = p >= cut || sep_class[(unsigned char)*p];
        if (!sep && !in_tok) {
            if (reserve_tokens(r, 1) < 0)
                return -1;
            token_open(r, p);
        } else if (sep && in_tok) {
            token_close(r, &closed, p);
        }
        in_tok = !sep;
    }
    if (closed < r->n_tok)
        token_close(r, &closed, cut);
    return 0;
}

/* Successor `name` with a probability id and no outcome reward: a state
 * already seen goes by its index (known >= 0), a new one is interned. */
static int succ_by_id(reader *r, const token *name, int32_t known, uint32_t prob_id)
{
    bc_pos at = pos_of(r, name);
    if (known < 0 && (known = bc_builder_state(r->b, name->s, name->len, at)) < 0)
        return -1;
    return bc_builder_succ_id(r->b, known, prob_id, at);
}

/* The successors after `->`: NEXT [PROB [OUTCOME_REWARD]] ...; 0 or -1.
 * The checks and their order are those of the format; a name already
 * known to the builder was checked when it was first seen. */
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
        /* A name first seen earlier on this line was interned since the lookup: ask again. */
        int32_t known = name->known >= 0 ? name->known
                                         : bc_builder_known_state(r->b, name->s, name->len);
        if (known < 0 && expect_name(r, name, "a successor state") < 0)
            return -1;
        bc_num outcome;
        number prob = {.id = BC_NUM_ID_ONE};
        const bc_num *has_prob = NULL, *has_outcome = NULL;
        if (i < n && is_number_token(&t[i])) {
            const token *pt = &t[i++];
            /* The value itself is needed only with an outcome reward (the slow form). */
            int outcome_next = i < n && is_number_token(&t[i]);
            if (expect_number_id(r, pt, "a probability", WANT_ID | (outcome_next ? WANT_VALUE : 0),
                                 &prob) < 0)
                return -1;
            if (prob.sign < 0)
                return report(r, pt, "a probability must not be negative; found `%.*s`", pt->s,
                              pt->len);
            has_prob = &prob.value;
            if (outcome_next) {
                if (expect_number(r, &t[i++], "an outcome reward", &outcome) < 0)
                    return -1;
                has_outcome = &outcome;
            }
        } else if (n_succ > 1) {
            return report(r, name,
                          "successor `%.*s` needs a probability: only a lone successor may omit it",
                          name->s, name->len);
        }
        int rc = has_outcome ? bc_builder_succ(r->b, name->s, name->len, has_prob, has_outcome,
                                               pos_of(r, name))
                             : succ_by_id(r, name, known, prob.id);
        if (rc < 0)
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
     * their lookups before ending any, so the cache misses overlap. */
    for (size_t k = 4; k < n; k++)
        t[k].key = is_name_start(t[k].s[0]) ? bc_builder_seek_state(r->b, t[k].s, t[k].len) : 0;
    for (size_t k = 4; k < n; k++)
        t[k].known = is_name_start(t[k].s[0])
                         ? bc_builder_found_state(r->b, t[k].s, t[k].len, t[k].key) : -1;
    int rc = successors(r);
    /* After an error the line is dropped whole: checking its sum would only add noise. */
    if (rc < 0) {
        bc_builder_pair_cancel(r->b);
        return -1;
    }
    return bc_builder_pair_end(r->b, pos_of(r, &t[0]));
}

/* 1 when t is a name (what expect_name accepts), without a message. */
static int name_ok(const token *t)
{
    if (t->len > BC_NAME_MAX || !is_name_start(t->s[0]))
        return 0;
    for (size_t i = 1; i < t->len; i++)
        if (!is_name_char(t->s[i]))
            return 0;
    return 1;
}

/* A transition line in its usual form, STATE ACTION REWARD -> followed by
 * NEXT PROB pairs (or one NEXT alone), every name and number well formed:
 * read with the checks such a line needs (a name already known needs none)
 * and, when its probabilities are written over one denominator, summed
 * here in two additions instead of by the builder.  Checks come before the
 * builder hears of the line, so that any other line goes, untouched, to
 * transition_line, which says what is wrong in the format's order.
 * Returns 1 when the line was read, -1 when the builder refused it (and
 * reported why, as it would have for transition_line), 0 to leave it to
 * transition_line. */
static int fast_transition(reader *r)
{
    token *t = r->tok;
    size_t n = r->n_tok;
    int lone = n == 5;
    if (n < 5 || (!lone && n % 2) || !is_arrow(&t[3]) || !name_ok(&t[0]) || !name_ok(&t[1]))
        return 0;
    /* The numbers' cache entries and the successors' slots in the names
     * table are fetched first, all of them, so that their cache misses
     * overlap (a large model scatters them); the lookups follow. */
    for (size_t k = 2; k < n; k += k == 2 ? 3 : 2) {
        t[k].bucket = num_bucket(r, &t[k], t[k].nk);
        __builtin_prefetch(t[k].bucket);
    }
    for (size_t k = 4; k < n; k += 2)
        t[k].key = bc_builder_seek_state(r->b, t[k].s, t[k].len);
    const char *why;
    number x;
    if (!is_number_token(&t[2]) || read_number_in(r, &t[2], t[2].bucket, t[2].nk, WANT_ID, &x, &why) < 0)
        return 0;
    uint32_t reward = x.id, den = lone ? 1 : 0;
    uint64_t sum = lone;
    int common = 1; /* every probability written over den */
    for (size_t k = 5; !lone && k < n; k += 2) {
        if (!is_number_token(&t[k]) ||
            read_number_in(r, &t[k], t[k].bucket, t[k].nk, WANT_ID, &x, &why) < 0 || x.sign < 0)
            return 0;
        t[k].id = x.id;
        if (k == 5)
            den = x.wden;
        common &= x.wden != 0 && x.wden == den;
        sum += x.wnum;
    }
    for (size_t k = 4; k < n; k += 2) {
        t[k].known = bc_builder_found_state(r->b, t[k].s, t[k].len, t[k].key);
        if (t[k].known < 0 && !name_ok(&t[k]))
            return 0;
    }
    if (bc_builder_pair_begin_id(r->b, t[0].s, t[0].len, pos_of(r, &t[0]), t[1].s, t[1].len,
                                 pos_of(r, &t[1]), reward) < 0)
        return -1;
    for (size_t k = 4; k < n; k += 2) {
        if (succ_by_id(r, &t[k], t[k].known, lone ? BC_NUM_ID_ONE : t[k + 1].id) < 0) {
            bc_builder_pair_cancel(r->b);
            return -1;
        }
    }
    /* sum/den = the sum of the probabilities, exactly: one means one. */
    if (common && sum == den)
        return bc_builder_pair_end_summed(r->b, pos_of(r, &t[0])) < 0 ? -1 : 1;
    return bc_builder_pair_end(r->b, pos_of(r, &t[0])) < 0 ? -1 : 1;
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
    /* The label goes into reports and the JSON form as it is, so it must be
     * text: bytes that are not UTF-8 would not survive the JSON form. */
    size_t ok = bc_utf8_valid_prefix(p, (size_t)(q - p));
    if (ok < (size_t)(q - p)) {
        r->errors++;
        bc_diag_add(r->diag, BC_ERROR, r->file, r->line, column_of(r, p + ok),
                    "the label holds a byte that is not UTF-8 (0x%02X); a model is UTF-8 text",
                    (unsigned)(unsigned char)p[ok]);
        return -1;
    }
    /* A state called `name` cannot have transition lines: its line would be
     * this directive.  Say so when the label looks like one. */
    for (size_t i = 1; i < r->n_tok && r->tok[i].s < q; i++)
        if (is_arrow(&r->tok[i])) {
            bc_diag_add(r->diag, BC_WARNING, r->file, r->line, r->tok[0].col,
                        "this line is the model's label, `->` and all; a state called `name` "
                        "cannot have transition lines (rename the state if one was meant)");
            break;
        }
    return bc_builder_name(r->b, p, (size_t)(q - p), pos_of(r, &r->tok[0]));
}

static int is_directive(const token *t)
{
    /* Every keyword has 4 to 9 bytes; most lines are transition lines, which
     * the length and the first letter turn away at once. */
    static const struct {
        const char *word;
        size_t len;
    } words[] = {{"bell", 4},    {"name", 4},     {"discount", 8}, {"objective", 9}, {"horizon", 7},
                 {"initial", 7}, {"terminal", 8}, {"states", 6},   {"actions", 7}};
    if (t->len < 4 || t->len > 9)
        return 0;
    for (size_t i = 0; i < sizeof words / sizeof words[0]; i++)
        if (t->len == words[i].len && t->s[0] == words[i].word[0] &&
            memcmp(t->s, words[i].word, t->len) == 0)
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
    const char *nul;
    if (tokenize(r, p, end, &nul) < 0)
        return -2;
    if (nul) {
        r->errors++;
        bc_diag_add(r->diag, BC_ERROR, r->file, r->line, column_of(r, nul),
                    "binary data (a NUL byte); a model is UTF-8 text");
        return -2; /* stop: the rest is not text */
    }
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
    if (is_transition) {
        rc = fast_transition(r);
        rc = rc == 0 ? transition_line(r) : rc < 0 ? -1 : 0;
    } else
        rc = directive_line(r, end);
    r->seen_content = 1;
    return rc;
}

bc__bell_reader *bc__bell_reader_new(const char *file_label, bc_diag *d)
{
    const char *file = file_label ? file_label : "<input>";
    reader *r = calloc(1, sizeof *r);
    if (r) {
        r->file = file;
        r->diag = d;
        /* Buckets on cache lines; without a cache the reader is slower, not wrong. */
        r->num_cache = aligned_alloc(64, 2 * NUM_BUCKETS * sizeof *r->num_cache);
        if (r->num_cache)
            memset(r->num_cache, 0, 2 * NUM_BUCKETS * sizeof *r->num_cache);
        r->b = bc_builder_new(file, d);
    }
    if (!r || !r->b) {
        if (r)
            free(r->num_cache);
        free(r);
        bc_diag_add(d, BC_ERROR, file, 0, 0, "out of memory");
        return NULL;
    }
    return r;
}

int64_t bc__bell_reader_lines(bc__bell_reader *r, const char *buf, size_t len, int last)
{
    if (r->stopped)
        return -1;
    const char *p = buf, *end = buf + len;
    r->end = end;
    if (!r->started) {
        if (len < 3 && !last)
            return 0; /* too few bytes to tell a byte-order mark */
        r->started = 1;
        if (len >= 3 && (unsigned char)p[0] == 0xEF && (unsigned char)p[1] == 0xBB &&
            (unsigned char)p[2] == 0xBF)
            p += 3; /* UTF-8 byte-order mark */
    }
    while (p < end) {
        const char *eol = memchr(p, '\n', (size_t)(end - p));
        if (!eol) {
            if (!last)
                break; /* the rest comes with the next piece */
            eol = end;
        }
        r->line += r->line < INT32_MAX; /* positions saturate past 2^31 - 1 lines */
        if (read_line(r, p, eol) == -2 || bc_diag_full(r->diag)) {
            r->stopped = 1;
            return -1;
        }
        p = eol + 1;
    }
    return (p > end ? end : p) - buf;
}

void bc__bell_reader_free(bc__bell_reader *r)
{
    if (!r)
        return;
    bc_builder_free(r->b);
    free(r->tok);
    free(r->num_cache);
    free(r);
}

bc_model *bc__bell_reader_finish(bc__bell_reader *r)
{
    if (r->errors || r->stopped) {
        bc__bell_reader_free(r);
        return NULL;
    }
    bc_builder *b = r->b;
    r->b = NULL;
    bc__bell_reader_free(r); /* the token array and the cache go before the model is assembled */
    return bc_builder_finish(b);
}

bc_model *bc_read_bell_text(const char *buf, size_t len, const char *file_label, bc_diag *d)
{
    bc__bell_reader *r = bc__bell_reader_new(file_label, d);
    if (!r)
        return NULL;
    bc__bell_reader_lines(r, buf, len, 1);
    return bc__bell_reader_finish(r);
}
