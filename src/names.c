/* names.c — interned state and action names: one character arena, open-addressing hash lookup. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Names live back to back (NUL-terminated) in one growing arena, addressed by
 * offset so that growing it never invalidates anything; the hash table holds
 * name indices with 32 bits of their hash and is kept at most half full, so a
 * lookup probes O(1) slots and touches the arena only on a likely match.
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

struct bc_names {
    char *arena;
    size_t arena_len, arena_cap;
    size_t *offset;      /* [count] start of name i in arena */
    uint32_t *len;       /* [count] */
    int32_t count, cap;
    slot_t *slot;        /* [n_slots] */
    size_t n_slots;      /* power of two */
};

static uint64_t name_hash(const char *s, size_t len)
{
    uint64_t h = 1469598103934665603ULL; /* FNV-1a, then a final mix */
    for (size_t i = 0; i < len; i++)
        h = (h ^ (unsigned char)s[i]) * 1099511628211ULL;
    h ^= h >> 29;
    h *= 0xbf58476d1ce4e5b9ULL;
    return h ^ (h >> 32);
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
    free(t);
}

/* Names in the arena are NUL-terminated and never contain NUL, so this also checks the length. */
static int names_equal(const bc_names *t, uint64_t offset, const char *s, size_t len)
{
    const char *a = t->arena + offset;
    return memcmp(a, s, len) == 0 && a[len] == 0;
}

int32_t bc_names_find(const bc_names *t, const char *s, size_t len)
{
    size_t mask = t->n_slots - 1;
    uint64_t h = name_hash(s, len);
    uint32_t tag = (uint32_t)(h >> 32);
    for (size_t k = h & mask;; k = (k + 1) & mask) {
        int32_t i = t->slot[k].index;
        if (i < 0)
            return -1;
        if (t->slot[k].hash == tag && names_equal(t, t->slot[k].offset, s, len))
            return i;
    }
}

void bc_names_prefetch(const bc_names *t, const char *s, size_t len, int stage)
{
    uint64_t h = name_hash(s, len);
    const slot_t *sl = &t->slot[h & (t->n_slots - 1)];
    if (stage == 0)
        __builtin_prefetch(sl);
    else if (sl->index >= 0)
        __builtin_prefetch(t->arena + sl->offset);
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

static int names_rehash(bc_names *t, size_t n_slots)
{
    slot_t *slot = malloc(n_slots * sizeof *slot);
    if (!slot)
        return -1;
    memset(slot, 0xff, n_slots * sizeof *slot);
    for (int32_t i = 0; i < t->count; i++)
        slot_insert(slot, n_slots, name_hash(t->arena + t->offset[i], t->len[i]), i, t->offset[i]);
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
    if ((size_t)(t->count + 1) * 2 > t->n_slots)
        return names_rehash(t, t->n_slots * 2);
    return 0;
}

int32_t bc_names_intern(bc_names *t, const char *s, size_t len)
{
    int32_t found = bc_names_find(t, s, len);
    if (found >= 0)
        return found;
    if (len > UINT32_MAX || names_reserve(t, len) < 0)
        return -1;
    int32_t i = t->count++;
    t->offset[i] = t->arena_len;
    t->len[i] = (uint32_t)len;
    memcpy(t->arena + t->arena_len, s, len);
    t->arena[t->arena_len + len] = 0;
    t->arena_len += len + 1;
    slot_insert(t->slot, t->n_slots, name_hash(s, len), i, t->offset[i]);
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
