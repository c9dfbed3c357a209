/* numtab.c — the distinct exact numbers of a model behind 32-bit ids: probabilities and rewards repeat millions of times. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * A model stores an id (4 bytes) per probability, reward and outcome reward
 * instead of a bc_num (16 bytes); the table holds each distinct value once.
 * Small values are found again through an open-addressing hash on their
 * (num, den) bits, so equal small values written the same way share one id
 * (canonical small values: equal values).  A big value (den == 0, an index
 * into a bc_bigtab) gets a new id every time: comparing rationals of
 * thousands of digits to save a few bytes is not worth it, and they are rare.
 *
 * Invariants: id 0 is 0 and id 1 is 1 (so zeroed id arrays mean 0); the
 * hash is at most half full; n < 2^32 - 1.  A finished model's table is
 * compacted (no hash: 16 bytes a value); a later intern rebuilds the hash.
 */
#include "bellcheck.h"

#include <assert.h>
#include <stdlib.h>
#include <string.h>

struct bc_numtab {
    bc_num *v;        /* [cap] the value of each id */
    uint32_t n, cap;
    uint32_t *slot;   /* [n_slots] 1 + the id of a small value, 0 = empty */
    uint32_t n_slots; /* a power of two */
    uint32_t n_small; /* values held in the hash */
};

/* Most ids a table gives: ids are uint32_t, and UINT32_MAX stays free. */
#define NUMTAB_MAX_IDS 0xFFFFFFFEu

static uint32_t num_hash(bc_num x)
{
    /* The multiply-xorshift finaliser of splitmix64 (common practice). */
    uint64_t h = (uint64_t)x.num * 0x9E3779B97F4A7C15ULL ^ (uint64_t)x.den * 0xC2B2AE3D27D4EB4FULL;
    h ^= h >> 31;
    h *= 0xBF58476D1CE4E5B9ULL;
    return (uint32_t)(h ^ (h >> 32));
}

static int rehash(bc_numtab *t, uint32_t n_slots)
{
    uint32_t *slot = calloc(n_slots, sizeof *slot);
    if (!slot)
        return -1;
    uint32_t mask = n_slots - 1;
    for (uint32_t id = 0; id < t->n; id++) {
        if (t->v[id].den == 0)
            continue;
        uint32_t k = num_hash(t->v[id]) & mask;
        while (slot[k])
            k = (k + 1) & mask;
        slot[k] = id + 1;
    }
    free(t->slot);
    t->slot = slot;
    t->n_slots = n_slots;
    return 0;
}

bc_numtab *bc_numtab_new(void)
{
    bc_numtab *t = calloc(1, sizeof *t);
    if (!t)
        return NULL;
    t->cap = 64;
    t->v = malloc(t->cap * sizeof *t->v);
    if (!t->v || rehash(t, 128) < 0 || bc_numtab_intern(t, bc_num_int(0)) != 0 ||
        bc_numtab_intern(t, bc_num_int(1)) != 1) {
        bc_numtab_free(t);
        return NULL;
    }
    return t;
}

void bc_numtab_free(bc_numtab *t)
{
    if (!t)
        return;
    free(t->v);
    free(t->slot);
    free(t);
}

/* Appends x as a new id; -1 when out of memory or out of ids. */
static int64_t append(bc_numtab *t, bc_num x)
{
    if (t->n >= NUMTAB_MAX_IDS)
        return -1;
    if (t->n == t->cap) {
        uint32_t cap = t->cap > NUMTAB_MAX_IDS / 2 ? NUMTAB_MAX_IDS : 2 * t->cap;
        bc_num *v = realloc(t->v, (size_t)cap * sizeof *v);
        if (!v)
            return -1;
        t->v = v;
        t->cap = cap;
    }
    t->v[t->n] = x;
    return t->n++;
}

int64_t bc_numtab_intern(bc_numtab *t, bc_num x)
{
    if (x.den == 0)
        return append(t, x);
    if (!t->slot) { /* compacted: the hash comes back, at most half full */
        uint32_t n = 128;
        while (n / 2 <= t->n_small && n <= UINT32_MAX / 2)
            n *= 2;
        if (rehash(t, n) < 0)
            return -1;
    }
    uint32_t mask = t->n_slots - 1, k = num_hash(x) & mask;
    for (; t->slot[k]; k = (k + 1) & mask) {
        bc_num y = t->v[t->slot[k] - 1];
        if (y.num == x.num && y.den == x.den)
            return t->slot[k] - 1;
    }
    if ((uint64_t)(t->n_small + 1) * 2 > t->n_slots) {
        if (t->n_slots > UINT32_MAX / 2 || rehash(t, 2 * t->n_slots) < 0)
            return -1;
        mask = t->n_slots - 1;
        for (k = num_hash(x) & mask; t->slot[k]; k = (k + 1) & mask)
            ;
    }
    int64_t id = append(t, x);
    if (id < 0)
        return -1;
    t->slot[k] = (uint32_t)id + 1;
    t->n_small++;
    return id;
}

void bc_numtab_compact(bc_numtab *t)
{
    free(t->slot);
    t->slot = NULL;
    t->n_slots = 0;
    bc_num *v = realloc(t->v, (size_t)t->n * sizeof *v); /* n >= 2: never zero bytes */
    if (v) {
        t->v = v;
        t->cap = t->n;
    }
}

bc_num bc_numtab_get(const bc_numtab *t, uint32_t id)
{
    assert(id < t->n);
    return t->v[id];
}

uint32_t bc_numtab_count(const bc_numtab *t)
{
    return t ? t->n : 0;
}

const bc_num *bc_numtab_values(const bc_numtab *t)
{
    return t->v;
}
