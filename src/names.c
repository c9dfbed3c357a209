/* names.c — interned state and action names: one character arena, a direct table for names of the form prefix + number, open-addressing hash lookup for the rest. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Names live back to back (NUL-terminated) in one growing arena, addressed by
 * offset so that growing it never invalidates anything.
 *
 * Generated models name their states `s0 s1 s2 ...`: a prefix and a
 * decimal number.  The table fixes one prefix (the non-digit head of the
 * first such name it sees while empty) and keeps `dense[k]` = the index of
 * prefix + k, so those lookups parse a few digits and read one array
 * element instead of hashing and comparing text.  Every other name (another
 * prefix, a leading zero, a number beyond the dense range) goes to the hash
 * table, which holds name indices with 32 bits of their hash, is kept at
 * most half full, and touches the arena only on a likely match.
 *
 * Invariant: a name is in exactly one of the two structures.  A name of the
 * dense form whose number was beyond the dense range when it was added stays
 * in the hash table after the range grows, so a lookup of the dense form
 * that finds nothing in `dense` also asks the hash table (only misses pay
 * this, i.e. names seen for the first time).
 */
#include "bellcheck.h"

#include <assert.h>
#include <stdlib.h>
#include <string.h>

/* A slot carries what a lookup needs — a hash tag and the arena offset — so a
 * hit costs two cache misses (slot, arena), not four. */
typedef struct {
    uint32_t hash;   /* high bits of the name's hash */
    int32_t index;   /* name index, or -1 for an empty slot */
    uint64_t offset; /* where the name starts in the arena */
} slot_t;

/* Longest prefix and number (digits) the direct table handles. */
#define DENSE_PREFIX_MAX 15
#define DENSE_DIGITS_MAX 9

struct bc_names {
    char *arena;
    size_t arena_len, arena_cap;
    size_t *offset;      /* [count] start of name i in arena */
    uint32_t *len;       /* [count] */
    int32_t count, cap;
    slot_t *slot;        /* [n_slots] */
    size_t n_slots;      /* power of two */
    int32_t n_hashed;    /* names held in the hash table */
    char prefix[DENSE_PREFIX_MAX + 1];
    size_t prefix_len;   /* 0: no prefix fixed yet (or none possible) */
    int prefix_fixed;
    int32_t *dense;      /* [dense_cap] name index of prefix + k, or -1 */
    int64_t dense_cap;
};

/* bc_names_seek's keys: a name's hash, or SEEK_DENSE | its number in the
 * direct table, or SEEK_ABSENT. */
#define SEEK_DENSE (1ULL << 63)
#define SEEK_ABSENT UINT64_MAX

/* 63-bit hash of s[0..len): 8 bytes at a time, then a final mix
 * (the multiply-xorshift steps of splitmix64, common practice). */
static uint64_t name_hash(const char *s, size_t len)
{
    uint64_t h = 0x9E3779B97F4A7C15ULL ^ (len * 0xBF58476D1CE4E5B9ULL);
    size_t i = 0;
    for (; i + 8 <= len; i += 8) {
        uint64_t w;
        memcpy(&w, s + i, 8);
        h = (h ^ w) * 0x94D049BB133111EBULL;
        h ^= h >> 29;
    }
    if (i < len) {
        uint64_t w = 0;
        memcpy(&w, s + i, len - i);
        h = (h ^ w) * 0x94D049BB133111EBULL;
    }
    h ^= h >> 31;
    h *= 0xBF58476D1CE4E5B9ULL;
    return (h ^ (h >> 32)) & ~SEEK_DENSE; /* 63 bits: bc_names_seek's keys tell the two kinds apart */
}

/* Splits s into a non-digit head and a decimal number without leading zero
 * (k = 0 is "0" itself).  Returns the head length, or -1 when s is not of
 * that form within the limits. */
static int dense_split(const char *s, size_t len, int64_t *k)
{
    size_t d = len;
    while (d > 0 && s[d - 1] >= '0' && s[d - 1] <= '9')
        d--;
    size_t nd = len - d;
    if (nd == 0 || nd > DENSE_DIGITS_MAX || d == 0 || d > DENSE_PREFIX_MAX ||
        (nd > 1 && s[d] == '0'))
        return -1;
    int64_t v = 0;
    for (size_t i = d; i < len; i++)
        v = v * 10 + (s[i] - '0');
    *k = v;
    return (int)d;
}

/* The dense slot of s, or NULL when s is not prefix + number in range
 * (the same form dense_split accepts, read forwards).  Called for most
 * lookups of a large model, so the digits are read without a branch per
 * digit: a bad digit only sets a flag. */
static int32_t *dense_at(const bc_names *t, const char *s, size_t len)
{
    size_t p = t->prefix_len, nd = len - p; /* nd wraps when len < p: caught below */
    if (p == 0 || nd - 1 >= DENSE_DIGITS_MAX || (s[p] == '0' && nd > 1) || s[0] != t->prefix[0])
        return NULL;
    for (size_t i = 1; i < p; i++) /* prefixes are short: no library call */
        if (s[i] != t->prefix[i])
            return NULL;
    /* The digits from the first, unrolled: a jump into the ladder instead
     * of a loop; a byte that is not a digit gives a value above 9. */
    const unsigned char *e = (const unsigned char *)s + len;
    uint64_t k = 0;
    unsigned bad = 0;
#define DIGIT(j)                                      \
    do {                                              \
        unsigned g_ = (unsigned)e[-(j)] - '0';        \
        bad |= g_ > 9;                                \
        k = k * 10 + g_;                              \
    } while (0)
    switch (nd) {
    case 9: DIGIT(9); /* fall through */
    case 8: DIGIT(8); /* fall through */
    case 7: DIGIT(7); /* fall through */
    case 6: DIGIT(6); /* fall through */
    case 5: DIGIT(5); /* fall through */
    case 4: DIGIT(4); /* fall through */
    case 3: DIGIT(3); /* fall through */
    case 2: DIGIT(2); /* fall through */
    default: DIGIT(1);
    }
#undef DIGIT
    return !bad && k < (uint64_t)t->dense_cap ? &t->dense[k] : NULL;
}

bc_names *bc_names_new(void)
{
    bc_names *t = calloc(1, sizeof *t);
    if (!t)
        return NULL;
    t->n_slots = 64;
    t->slot = malloc(t->n_slots * sizeof *t->slot);
    if (!t->slot) {
        free(t);
        return NULL;
    }
    memset(t->slot, 0xff, t->n_slots * sizeof *t->slot);
    return t;
}

void bc_names_free(bc_names *t)
{
    if (!t)
        return;
    free(t->arena);
    free(t->offset);
    free(t->len);
    free(t->slot);
    free(t->dense);
    free(t);
}

/* Names in the arena are NUL-terminated and never contain NUL, so this also checks the length. */
static int names_equal(const bc_names *t, uint64_t offset, const char *s, size_t len)
{
    const char *a = t->arena + offset;
    if (a[len] != 0)
        return 0;
    for (size_t i = 0; i < len; i++)
        if (a[i] != s[i])
            return 0;
    return 1;
}

static int32_t hash_find(const bc_names *t, const char *s, size_t len, uint64_t h)
{
    size_t mask = t->n_slots - 1;
    uint32_t tag = (uint32_t)(h >> 32);
    for (size_t k = h & mask;; k = (k + 1) & mask) {
        int32_t i = t->slot[k].index;
        if (i < 0)
            return -1;
        if (t->slot[k].hash == tag && names_equal(t, t->slot[k].offset, s, len))
            return i;
    }
}

int32_t bc_names_find(const bc_names *t, const char *s, size_t len)
{
    const int32_t *d = dense_at(t, s, len);
    if (d && *d >= 0)
        return *d;
    if (t->n_hashed == 0)
        return -1;
    return hash_find(t, s, len, name_hash(s, len));
}

uint64_t bc_names_seek(const bc_names *t, const char *s, size_t len)
{
    const int32_t *d = dense_at(t, s, len);
    if (d) {
        __builtin_prefetch(d);
        return SEEK_DENSE | (uint64_t)(d - t->dense);
    }
    if (t->n_hashed == 0)
        return SEEK_ABSENT; /* bc_names_find would not look further */
    uint64_t h = name_hash(s, len);
    __builtin_prefetch(&t->slot[h & (t->n_slots - 1)]);
    return h;
}

int32_t bc_names_found(const bc_names *t, const char *s, size_t len, uint64_t key)
{
    if (key == SEEK_ABSENT)
        return -1;
    if (!(key & SEEK_DENSE))
        return hash_find(t, s, len, key);
    int32_t i = t->dense[key & ~SEEK_DENSE];
    return i >= 0 ? i : bc_names_find(t, s, len); /* not in the direct table: maybe hashed */
}

/* Puts name i (hash h) into the first free slot of its probe sequence. */
static void slot_insert(slot_t *slot, size_t n_slots, uint64_t h, int32_t i, uint64_t offset)
{
    size_t mask = n_slots - 1, k = h & mask;
    while (slot[k].index >= 0)
        k = (k + 1) & mask;
    slot[k].hash = (uint32_t)(h >> 32);
    slot[k].index = i;
    slot[k].offset = offset;
}

/* 1 when name i is held by the dense table. */
static int in_dense(const bc_names *t, int32_t i)
{
    const int32_t *d = dense_at(t, t->arena + t->offset[i], t->len[i]);
    return d && *d == i;
}

static int names_rehash(bc_names *t, size_t n_slots)
{
    slot_t *slot = malloc(n_slots * sizeof *slot);
    if (!slot)
        return -1;
    memset(slot, 0xff, n_slots * sizeof *slot);
    for (int32_t i = 0; i < t->count; i++)
        if (!in_dense(t, i))
            slot_insert(slot, n_slots, name_hash(t->arena + t->offset[i], t->len[i]), i,
                        t->offset[i]);
    free(t->slot);
    t->slot = slot;
    t->n_slots = n_slots;
    return 0;
}

/* Makes room for one more name of length len. */
static int names_reserve(bc_names *t, size_t len)
{
    if (t->count == INT32_MAX)
        return -1;
    if (t->count == t->cap) {
        int32_t cap = t->cap ? (t->cap > INT32_MAX / 2 ? INT32_MAX : 2 * t->cap) : 16;
        size_t *off = realloc(t->offset, (size_t)cap * sizeof *off);
        if (!off)
            return -1;
        t->offset = off;
        uint32_t *ln = realloc(t->len, (size_t)cap * sizeof *ln);
        if (!ln)
            return -1;
        t->len = ln;
        t->cap = cap;
    }
    if (t->arena_len + len + 1 > t->arena_cap) {
        size_t cap = t->arena_cap ? 2 * t->arena_cap : 1024;
        while (cap < t->arena_len + len + 1)
            cap *= 2;
        char *a = realloc(t->arena, cap);
        if (!a)
            return -1;
        t->arena = a;
        t->arena_cap = cap;
    }
    return 0;
}

/* Grows the dense range to cover number k when k is below DENSE_FREE or
 * within a constant factor of the names held (so a stray large number cannot
 * make the range huge; successors in random order name large numbers
 * early).  Names already hashed stay where they are.  0, or -1 when the
 * range stays as it is (out of memory or k too far). */
#define DENSE_FREE (1 << 22)
static int dense_cover(bc_names *t, int64_t k)
{
    if (k < t->dense_cap)
        return 0;
    if (k >= DENSE_FREE && k > 4 * (int64_t)t->count)
        return -1;
    int64_t cap = t->dense_cap ? t->dense_cap : 1024;
    while (cap <= k)
        cap *= 2;
    int32_t *d = realloc(t->dense, (size_t)cap * sizeof *d);
    if (!d)
        return -1;
    for (int64_t j = t->dense_cap; j < cap; j++)
        d[j] = -1;
    t->dense = d;
    t->dense_cap = cap;
    return 0;
}

/* Where a new name s goes: its dense slot, or NULL for the hash table.
 * The prefix is fixed by the first name, if it has the dense form. */
static int32_t *dense_slot_for_new(bc_names *t, const char *s, size_t len)
{
    int64_t k;
    int d = dense_split(s, len, &k);
    if (!t->prefix_fixed) {
        t->prefix_fixed = 1;
        if (d > 0) {
            memcpy(t->prefix, s, (size_t)d);
            t->prefix_len = (size_t)d;
        }
    }
    if (d <= 0 || (size_t)d != t->prefix_len || memcmp(s, t->prefix, (size_t)d) != 0 ||
        dense_cover(t, k) < 0)
        return NULL;
    return &t->dense[k];
}

int32_t bc_names_intern(bc_names *t, const char *s, size_t len)
{
    int32_t found = bc_names_find(t, s, len);
    if (found >= 0)
        return found;
    if (len > UINT32_MAX || names_reserve(t, len) < 0)
        return -1;
    int32_t *d = dense_slot_for_new(t, s, len);
    if (!d && (size_t)(t->n_hashed + 1) * 2 > t->n_slots && names_rehash(t, t->n_slots * 2) < 0)
        return -1;
    int32_t i = t->count++;
    t->offset[i] = t->arena_len;
    t->len[i] = (uint32_t)len;
    memcpy(t->arena + t->arena_len, s, len);
    t->arena[t->arena_len + len] = 0;
    t->arena_len += len + 1;
    if (d) {
        *d = i;
    } else {
        slot_insert(t->slot, t->n_slots, name_hash(s, len), i, t->offset[i]);
        t->n_hashed++;
    }
    return i;
}

const char *bc_names_get(const bc_names *t, int32_t i)
{
    assert(i >= 0 && i < t->count);
    return t->arena + t->offset[i];
}

int32_t bc_names_count(const bc_names *t)
{
    return t ? t->count : 0;
}

bc_names *bc_names_permuted(const bc_names *t, const int32_t *perm)
{
    bc_names *r = bc_names_new();
    if (!r)
        return NULL;
    if (t->count && names_rehash(r, 64) < 0) {
        bc_names_free(r);
        return NULL;
    }
    for (int32_t k = 0; k < t->count; k++) {
        int32_t i = perm[k];
        if (bc_names_intern(r, t->arena + t->offset[i], t->len[i]) != k) {
            bc_names_free(r); /* out of memory, or perm is not a permutation */
            return NULL;
        }
    }
    return r;
}
