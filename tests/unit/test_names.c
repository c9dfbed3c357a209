/* test_names.c — the name table: the direct table for prefix + number names and the hash table for the rest must act as one set. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * Expected results are those of a set of strings (common practice): every
 * distinct name gets a new dense index in order of first appearance, the
 * same name always gets the same index, and a name never added is not
 * found.  The cases aim at the seams of src/names.c: names of the dense
 * form that are not in the dense table (leading zeros, another prefix,
 * numbers beyond the range when they were added, which must still be found
 * after the range grows), and names that are a prefix of others.
 */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "bellcheck.h"
#include "unit.h"

static int32_t add(bc_names *t, const char *s)
{
    return bc_names_intern(t, s, strlen(s));
}

static int32_t find(const bc_names *t, const char *s)
{
    return bc_names_find(t, s, strlen(s));
}

/* Names that look alike but are different strings. */
static void test_seams(void)
{
    const char *names[] = {"s0",   "s1",  "s01", "s001", "s", "t1",  "s10", "s1.5",
                           "s_1",  "S1",  "s-1", "ss1",  "s9", "s00", "x",  "s4000000000",
                           "s99999999999"};
    const int n = (int)(sizeof names / sizeof names[0]);
    bc_names *t = bc_names_new();
    int ok = t != NULL;
    for (int i = 0; i < n && ok; i++)
        ok = add(t, names[i]) == i;
    CHECK(ok, "names: every distinct name gets the next index");
    ok = t != NULL;
    for (int i = 0; i < n && ok; i++)
        ok = find(t, names[i]) == i && add(t, names[i]) == i &&
             strcmp(bc_names_get(t, i), names[i]) == 0;
    CHECK(ok, "names: each is found again, re-adding returns its index, the text is kept");
    CHECK(t && bc_names_count(t) == n, "names: the count is the number of distinct names");
    CHECK(t && find(t, "s2") == -1 && find(t, "s010") == -1 && find(t, "") == -1 &&
              find(t, "s1 ") == -1,
          "names: names never added are not found");
    bc_names_free(t);
}

/* Numbers in random order, far beyond the table's first range, then the
 * range grows past them: all must stay distinct and findable. */
static void test_growth(void)
{
    bc_names *t = bc_names_new();
    const int n = 300000;
    char buf[32];
    int ok = t != NULL;
    /* A permutation of 0..n-1 by a multiplier coprime to n (common practice). */
    for (int i = 0; i < n && ok; i++) {
        long k = ((long)i * 7919L + 13L) % n;
        snprintf(buf, sizeof buf, "s%ld", k * 50L); /* up to 15,000,000: beyond the free range */
        ok = add(t, buf) == i;
    }
    CHECK(ok, "names growth: 300000 scattered numbers get indices in order of appearance");
    for (int i = 0; i < n && ok; i++) {
        long k = ((long)i * 7919L + 13L) % n;
        snprintf(buf, sizeof buf, "s%ld", k * 50L);
        ok = find(t, buf) == i;
    }
    CHECK(ok, "names growth: every one is found again");
    ok = t != NULL;
    for (long k = 1; k < 2000 && ok; k += 3) {
        snprintf(buf, sizeof buf, "s%ld", k * 50L + 1);
        ok = find(t, buf) == -1;
    }
    CHECK(ok, "names growth: numbers never added are not found");
    bc_names *p = NULL;
    if (t) {
        int32_t *perm = malloc((size_t)n * sizeof *perm);
        for (int i = 0; perm && i < n; i++)
            perm[i] = n - 1 - i;
        p = perm ? bc_names_permuted(t, perm) : NULL;
        free(perm);
    }
    ok = p != NULL;
    for (int i = 0; i < n && ok; i++)
        ok = strcmp(bc_names_get(p, i), bc_names_get(t, n - 1 - i)) == 0 &&
             find(p, bc_names_get(t, n - 1 - i)) == i;
    CHECK(ok, "names growth: a permuted copy holds the names in the new order");
    bc_names_free(p);
    bc_names_free(t);
}

int main(void)
{
    test_seams();
    test_growth();
    UNIT_DONE();
}
