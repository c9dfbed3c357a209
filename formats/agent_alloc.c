/* agent_alloc.c — allocating and freeing Q-tables and policies, and the bookkeeping of an agent reader. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#include "agent_internal.h"

#include <assert.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

/* calloc of n elements of size sz (at least one), refusing sizes that overflow. */
static void *alloc_array(int64_t n, size_t sz)
{
    if (n < 0 || (uint64_t)n > SIZE_MAX / sz)
        return NULL;
    return calloc(n ? (size_t)n : 1, sz);
}

/* The two arrays of a Q-table or policy: zeroed values of size sz per pair
 * (returned) and *present with every state 1.  NULL (nothing kept) if out of memory. */
static void *alloc_layer(const bc_model *m, size_t sz, uint8_t **present)
{
    void *values = alloc_array(m->n_pairs, sz);
    *present = alloc_array(m->n_states, sizeof **present);
    if (!values || !*present) {
        free(values);
        free(*present);
        *present = NULL;
        return NULL;
    }
    memset(*present, 1, (size_t)m->n_states);
    return values;
}

bc_qtable *bc_qtable_alloc(const bc_model *m)
{
    bc_qtable *q = calloc(1, sizeof *q);
    if (q && !(q->q = alloc_layer(m, sizeof *q->q, &q->present))) {
        free(q);
        return NULL;
    }
    return q;
}

void bc_qtable_free(bc_qtable *q)
{
    if (!q)
        return;
    free(q->q);
    free(q->present);
    free(q);
}

bc_policy *bc_policy_alloc(const bc_model *m)
{
    bc_policy *p = calloc(1, sizeof *p);
    if (p && !(p->prob = alloc_layer(m, sizeof *p->prob, &p->present))) {
        free(p);
        return NULL;
    }
    return p;
}

void bc_policy_free(bc_policy *p)
{
    if (!p)
        return;
    free(p->prob);
    free(p->present);
    free(p);
}

/* ---- the reader's context ----------------------------------------------- */

int bc__reader_init(bc__agent_reader *r, const bc_model *m, const char *label,
                    bc_missing_mode missing, int want_policy, bc_diag *d)
{
    memset(r, 0, sizeof *r);
    r->m = m;
    r->d = d;
    r->label = label;
    r->json_top = want_policy ? "policy" : "q";
    r->missing = missing;
    /* The table and the bookkeeping below: per pair a value and a line, per
     * state a line and two flags (n_pairs, n_states < 2^63, so no overflow). */
    uint64_t need = (uint64_t)m->n_pairs * (sizeof(double) + sizeof(int32_t)) +
                    (uint64_t)m->n_states * (sizeof(int32_t) + 2);
    if (bc_diag_memory_refused(d, label, need, "a table for this model"))
        return -1;
    r->state_line = alloc_array(m->n_states, sizeof *r->state_line);
    r->pair_line = alloc_array(m->n_pairs, sizeof *r->pair_line);
    r->state_bad = alloc_array(m->n_states, sizeof *r->state_bad);
    uint8_t *present = NULL;
    if (want_policy) {
        r->pol = bc_policy_alloc(m);
        present = r->pol ? r->pol->present : NULL;
    } else {
        r->q = bc_qtable_alloc(m);
        present = r->q ? r->q->present : NULL;
    }
    if (!r->state_line || !r->pair_line || !r->state_bad || !present) {
        bc__reader_free(r);
        bc_diag_add(d, BC_ERROR, label, 0, 0, "out of memory while reading the agent");
        return -1;
    }
    /* A state counts as covered only once a value for it is read. */
    memset(present, 0, (size_t)m->n_states);
    if (r->q)
        for (int64_t p = 0; p < m->n_pairs; p++)
            r->q->q[p] = NAN;
    return 0;
}

void bc__reader_free(bc__agent_reader *r)
{
    free(r->state_line);
    free(r->pair_line);
    free(r->state_bad);
    free(r->others.keys);
    free(r->others.lines);
    bc_qtable_free(r->q);
    bc_policy_free(r->pol);
    memset(r, 0, sizeof *r);
}

/* ---- cells outside the pairs -------------------------------------------- */

/* Slot of key in a table of capacity cap (a power of two): its own or the
 * empty one where it would go.  The table is never full (load <= 1/2). */
static size_t cellset_slot(const int64_t *keys, size_t cap, int64_t key)
{
    assert(cap && (cap & (cap - 1)) == 0);
    uint64_t h = (uint64_t)key * 0x9E3779B97F4A7C15u; /* Fibonacci hashing */
    size_t i = (size_t)(h >> 32) & (cap - 1);
    while (keys[i] != -1 && keys[i] != key)
        i = (i + 1) & (cap - 1);
    return i;
}

/* Doubles the capacity (16 at first); -1 if out of memory. */
static int cellset_grow(bc__cellset *set)
{
    size_t cap = set->cap ? 2 * set->cap : 16;
    if (cap > SIZE_MAX / sizeof(int64_t))
        return -1;
    int64_t *keys = malloc(cap * sizeof *keys);
    int32_t *lines = malloc(cap * sizeof *lines);
    if (!keys || !lines) {
        free(keys);
        free(lines);
        return -1;
    }
    memset(keys, 0xff, cap * sizeof *keys); /* every key -1: empty */
    for (size_t i = 0; i < set->cap; i++) {
        if (set->keys[i] == -1)
            continue;
        size_t j = cellset_slot(keys, cap, set->keys[i]);
        keys[j] = set->keys[i];
        lines[j] = set->lines[i];
    }
    free(set->keys);
    free(set->lines);
    set->keys = keys;
    set->lines = lines;
    set->cap = cap;
    return 0;
}

int32_t bc__cellset_add(bc__cellset *set, int64_t key, int32_t line)
{
    assert(key >= 0);
    if (2 * (set->n + 1) > set->cap && cellset_grow(set) < 0)
        return -2;
    size_t i = cellset_slot(set->keys, set->cap, key);
    if (set->keys[i] == key)
        return set->lines[i] ? set->lines[i] : BC__NO_LINE;
    set->keys[i] = key;
    set->lines[i] = line;
    set->n++;
    return 0;
}
