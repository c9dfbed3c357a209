/* test_numtab.c — exact numbers behind ids: the value table, the model's accessors and setters, big values, write/read round trips, exact line sums, and the text reader fed in pieces. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The models are invented and generated here; every expected value is
 * worked out by hand in the comments beside it, and compared through GMP's
 * own rationals (mpq_set_str, mpq_canonicalize: not the code under test).
 */
#include "bellcheck.h"
#include "unit.h"
#include "../../formats/bell_read_internal.h"

#include <stdlib.h>
#include <string.h>

/* 1 when x (of model m) equals the rational written in text ("p/q" or "p"), by GMP. */
static int equals(const bc_model *m, bc_num x, const char *text)
{
    mpq_t a, b;
    mpq_inits(a, b, NULL);
    bc_num_to_mpq(a, x, m->big);
    int ok = mpq_set_str(b, text, 10) == 0;
    mpq_canonicalize(b);
    ok = ok && mpq_equal(a, b);
    mpq_clears(a, b, NULL);
    return ok;
}

static void test_table(void)
{
    bc_numtab *t = bc_numtab_new();
    CHECK(t && bc_numtab_count(t) == 2, "numtab: a new table holds two values");
    CHECK(t && bc_numtab_get(t, BC_NUM_ID_ZERO).num == 0 && bc_numtab_get(t, BC_NUM_ID_ZERO).den == 1 &&
              bc_numtab_get(t, BC_NUM_ID_ONE).num == 1 && bc_numtab_get(t, BC_NUM_ID_ONE).den == 1,
          "numtab: id 0 is 0/1 and id 1 is 1/1");
    if (!t)
        return;
    CHECK(bc_numtab_intern(t, (bc_num){0, 1}) == 0 && bc_numtab_intern(t, (bc_num){1, 1}) == 1,
          "numtab: 0 and 1 are found again");
    /* 100,000 distinct values k/100003 (100003 is prime, so each is in lowest
     * terms and no two are equal): ids 2, 3, ... in order, each found again. */
    int ok_new = 1, ok_again = 1, ok_value = 1;
    for (int64_t k = 1; k <= 100000; k++)
        ok_new &= bc_numtab_intern(t, (bc_num){k, 100003}) == k + 1;
    for (int64_t k = 100000; k >= 1; k--) {
        ok_again &= bc_numtab_intern(t, (bc_num){k, 100003}) == k + 1;
        bc_num v = bc_numtab_get(t, (uint32_t)(k + 1));
        ok_value &= v.num == k && v.den == 100003;
    }
    CHECK(ok_new, "numtab: 100000 distinct values get new ids in order (the hash grows)");
    CHECK(ok_again, "numtab: each of them is found again");
    CHECK(ok_value && bc_numtab_values(t)[100001].num == 100000,
          "numtab: the values read back by id");
    CHECK(bc_numtab_count(t) == 100002, "numtab: 100002 ids in all");
    /* Compacted (as a finished model's table is), it still finds and adds. */
    bc_numtab_compact(t);
    CHECK(bc_numtab_intern(t, (bc_num){77777, 100003}) == 77778 &&
              bc_numtab_intern(t, (bc_num){1, 100004}) == 100002 &&
              bc_numtab_get(t, 100002).den == 100004,
          "numtab: after compacting, a value is found again and a new one added");
    /* A big value (den 0: an index into a big table) gets a new id every time. */
    int64_t b1 = bc_numtab_intern(t, (bc_num){5, 0}), b2 = bc_numtab_intern(t, (bc_num){5, 0});
    CHECK(b1 == 100003 && b2 == 100004, "numtab: big values are not merged");
    bc_numtab_free(t);
}

static void test_sum_is_one(void)
{
    /* By hand: 1/2 + 1/3 + 1/6 = 1 (denominators neither equal nor dividing:
     * the lcm path); 1/4 + 3/4 = 1; 1/2 + 1/3 = 5/6; 1/2 + 1/2 + 1/2 passes 1. */
    bc_num a[] = {{1, 2}, {1, 3}, {1, 6}}, b[] = {{1, 4}, {3, 4}}, c[] = {{1, 2}, {1, 3}},
           d[] = {{1, 2}, {1, 2}, {1, 2}}, e[] = {{3, 2}, {-1, 2}}, f[] = {{1, 2}, {1, 0}};
    CHECK(bc_num_sum_is_one(a, 3) == 1, "sum: 1/2 + 1/3 + 1/6 is exactly 1");
    CHECK(bc_num_sum_is_one(b, 2) == 1, "sum: 1/4 + 3/4 is exactly 1");
    CHECK(bc_num_sum_is_one(c, 2) == 0, "sum: 1/2 + 1/3 is not 1");
    CHECK(bc_num_sum_is_one(d, 3) == 0, "sum: 3/2 is not 1");
    CHECK(bc_num_sum_is_one(e, 2) == 0, "sum: a negative term leaves it to the exact path");
    CHECK(bc_num_sum_is_one(f, 2) == 0, "sum: a big term leaves it to the exact path");
    /* 1/p + (p-1)/p for the prime p = 2^61 - 1, then 1/3 on top: the common
     * denominator would pass 2^62, so the fast sum gives up (0). */
    const int64_t p = ((int64_t)1 << 61) - 1;
    bc_num g[] = {{1, p}, {p - 1, p}}, h[] = {{1, 3}, {1, p}};
    CHECK(bc_num_sum_is_one(g, 2) == 1, "sum: 1/p + (p-1)/p = 1 for p = 2^61 - 1");
    CHECK(bc_num_sum_is_one(h, 2) == 0, "sum: a denominator past 2^62 is not decided");
}

/* n states in a ring; line i: s<i> go i/7 -> s<i+1> (i+1)/(2i+3) s<i+2> (i+2)/(2i+3).
 * (i+1)/(2i+3) and (i+2)/(2i+3) are in lowest terms (gcd(i+1, 2i+3) =
 * gcd(i+1, 1) = 1, gcd(i+2, 2i+3) = gcd(i+2, 1) = 1), sum to 1, and no two of
 * all of them are equal (one family increases with i, the other decreases,
 * and (i+1)/(2i+3) = (j+2)/(2j+3) would need i + j = -3). */
static char *ring_text(int n)
{
    size_t cap = 128 + (size_t)n * 96, len = 0;
    char *s = malloc(cap);
    if (!s)
        return NULL;
    len += (size_t)snprintf(s + len, cap - len, "bell 1\ndiscount 9/10\n");
    for (int i = 0; i < n; i++)
        len += (size_t)snprintf(s + len, cap - len, "s%d go %d/7 -> s%d %d/%d s%d %d/%d\n", i, i,
                                (i + 1) % n, i + 1, 2 * i + 3, (i + 2) % n, i + 2, 2 * i + 3);
    return s;
}

static void test_many_values(void)
{
    const int n = 20000;
    char *text = ring_text(n);
    bc_model *m = text ? unit_read_model(text) : NULL;
    CHECK(m && m->n_states == n && m->n_trans == 2 * n, "many values: the ring model reads");
    if (!m) {
        free(text);
        return;
    }
    /* States are numbered by first appearance: s0, s1, s2, then s3, ... in
     * order, so state i is s<i> and pair i is line i + 3. */
    int ok = 1;
    char want[64];
    for (int i = 0; i < n && ok; i++) {
        snprintf(want, sizeof want, "%d/%d", i + 1, 2 * i + 3);
        ok &= equals(m, bc_model_prob_exact(m, 2 * i), want);
        snprintf(want, sizeof want, "%d/%d", i + 2, 2 * i + 3);
        ok &= equals(m, bc_model_prob_exact(m, 2 * i + 1), want);
        snprintf(want, sizeof want, "%d/7", i);
        ok &= equals(m, bc_model_reward_exact(m, i), want);
        ok &= m->pair_line[i] == i + 3;
    }
    CHECK(ok, "many values: every probability and reward is the one written");
    /* 2n distinct probabilities, all strictly between 0 and 1, so with 0
     * and 1 at least 2n + 2 values (a reward i/7 may equal a probability). */
    CHECK(bc_numtab_count(m->values) >= (uint32_t)(2 * n + 2),
          "many values: the table holds every distinct value");
    CHECK(m->prob[1] == 2.0 / 3.0 && m->reward[7] == 1.0, "many values: the doubles follow the ids");
    bc_model_free(m);
    free(text);
}

/* Both models hold the same exact numbers, transition by transition. */
static int same_numbers(const bc_model *a, const bc_model *b)
{
    if (a->n_trans != b->n_trans || a->n_pairs != b->n_pairs)
        return 0;
    int ok = 1;
    mpq_t x, y;
    mpq_inits(x, y, NULL);
    for (int64_t t = 0; t < a->n_trans; t++) {
        bc_num_to_mpq(x, bc_model_prob_exact(a, t), a->big);
        bc_num_to_mpq(y, bc_model_prob_exact(b, t), b->big);
        ok &= mpq_equal(x, y) != 0;
        bc_num_to_mpq(x, bc_model_outcome_exact(a, t), a->big);
        bc_num_to_mpq(y, bc_model_outcome_exact(b, t), b->big);
        ok &= mpq_equal(x, y) != 0;
    }
    for (int64_t p = 0; p < a->n_pairs; p++) {
        bc_num_to_mpq(x, bc_model_reward_exact(a, p), a->big);
        bc_num_to_mpq(y, bc_model_reward_exact(b, p), b->big);
        ok &= mpq_equal(x, y) != 0;
    }
    mpq_clears(x, y, NULL);
    return ok;
}

/* m written (text or JSON) and read back. */
static bc_model *round_trip(const bc_model *m, int json)
{
    char *buf = NULL;
    size_t len = 0;
    FILE *f = open_memstream(&buf, &len);
    if (!f)
        return NULL;
    int rc = json ? bc_write_bell_json(m, f) : bc_write_bell_text(m, f);
    if (fclose(f) != 0 || rc != 0) {
        free(buf);
        return NULL;
    }
    bc_diag d;
    bc_diag_init(&d);
    bc_model *back = json ? bc_read_bell_json(buf, len, "back.json", &d)
                          : bc_read_bell_text(buf, len, "back.bell", &d);
    bc_diag_print(&d, stdout);
    bc_diag_free(&d);
    free(buf);
    return back;
}

/* Numbers too big for int64 live in the big table; the ids hold them the same. */
static const char big_text[] =
    "bell 1\n"
    "discount 0.9\n"
    "a go 123456789012345678901234567890 -> a 33333333333333333333/100000000000000000000 "
    "b 66666666666666666667/100000000000000000000 -77777777777777777777777\n"
    "b go -1 -> a 1/2 b 0.5\n";

static void test_big_values(void)
{
    bc_model *m = unit_read_model(big_text);
    CHECK(m != NULL, "big: the model reads");
    if (!m)
        return;
    /* 10^20 > 2^63: both probabilities of line 3 and its reward and outcome are big. */
    CHECK(bc_model_prob_exact(m, 0).den == 0 && bc_model_prob_exact(m, 1).den == 0 &&
              bc_model_reward_exact(m, 0).den == 0 && bc_model_outcome_exact(m, 1).den == 0,
          "big: values past int64 are in the big table");
    CHECK(equals(m, bc_model_prob_exact(m, 0), "33333333333333333333/100000000000000000000") &&
              equals(m, bc_model_prob_exact(m, 1), "66666666666666666667/100000000000000000000"),
          "big: the probabilities are exact");
    CHECK(equals(m, bc_model_reward_exact(m, 0), "123456789012345678901234567890") &&
              equals(m, bc_model_outcome_exact(m, 1), "-77777777777777777777777") &&
              equals(m, bc_model_outcome_exact(m, 0), "0"),
          "big: the reward and the outcome rewards are exact");
    /* Line 4: 1/2 and 0.5 are the same value, written two ways. */
    CHECK(m->prob_id[2] == m->prob_id[3] && equals(m, bc_model_prob_exact(m, 3), "1/2"),
          "big: equal small values share one id");
    for (int json = 0; json <= 1; json++) {
        bc_model *back = round_trip(m, json);
        CHECK(back && same_numbers(m, back),
              json ? "big: the JSON writer round-trips the ids" : "big: the text writer round-trips the ids");
        bc_model_free(back);
    }
    bc_model_free(m);
}

static void test_round_trip_many(void)
{
    char *text = ring_text(3000);
    bc_model *m = text ? unit_read_model(text) : NULL;
    bc_model *back = m ? round_trip(m, 0) : NULL;
    CHECK(back && same_numbers(m, back) && back->n_states == 3000,
          "round trip: 9000 distinct values through the text writer");
    bc_model_free(back);
    bc_model_free(m);
    free(text);
}

static void test_setters(void)
{
    /* One state, one action, two transitions: 1/3 and 2/3, reward -5/2, an
     * outcome of 7 on the second. */
    bc_model *m = bc_model_alloc(1, 1, 1, 2);
    CHECK(m && bc_model_prob_exact(m, 0).num == 0 && m->outcome_id == NULL,
          "setters: a new model's numbers are all 0, with no outcome rewards");
    if (!m)
        return;
    m->pair_trans_start[1] = 2; /* the pair's two transitions (the arrays come zeroed) */
    CHECK(bc_model_set_prob_exact(m, 0, (bc_num){1, 3}) == 0 &&
              bc_model_set_prob_exact(m, 1, (bc_num){2, 3}) == 0 &&
              bc_model_set_reward_exact(m, 0, (bc_num){-5, 2}) == 0 &&
              bc_model_set_outcome_exact(m, 1, bc_num_int(7)) == 0,
          "setters: every setter succeeds");
    CHECK(equals(m, bc_model_prob_exact(m, 0), "1/3") && equals(m, bc_model_prob_exact(m, 1), "2/3") &&
              equals(m, bc_model_reward_exact(m, 0), "-5/2") &&
              equals(m, bc_model_outcome_exact(m, 0), "0") && equals(m, bc_model_outcome_exact(m, 1), "7"),
          "setters: the values read back");
    /* Expected reward: -5/2 + (2/3) 7 = -15/6 + 28/6 = 13/6. */
    mpq_t r, want;
    mpq_inits(r, want, NULL);
    bc_model_reward_mpq(m, 0, r);
    mpq_set_si(want, 13, 6);
    CHECK(mpq_equal(r, want), "setters: the exact expected reward is 13/6");
    mpq_clears(r, want, NULL);
    bc_model_free(m);
}

/* A model read from text given to the reader in pieces of `step` bytes
 * (the way formats/input.c feeds a file); NULL on error, messages in d. */
static bc_model *read_in_pieces(const char *text, size_t step, bc_diag *d)
{
    bc_diag_init(d);
    bc__bell_reader *r = bc__bell_reader_new("t.bell", d);
    size_t len = strlen(text), have = 0, done = 0;
    char *buf = malloc(len + 1);
    while (r && buf) {
        size_t more = len - done - have < step ? len - done - have : step;
        memcpy(buf + have, text + done + have, more); /* what a read would add */
        have += more;
        int last = done + have == len;
        int64_t used = bc__bell_reader_lines(r, buf, have, last);
        if (used < 0 || last)
            break;
        memmove(buf, buf + used, have - (size_t)used);
        done += (size_t)used;
        have -= (size_t)used;
    }
    free(buf);
    return r ? bc__bell_reader_finish(r) : NULL;
}

static void test_pieces(void)
{
    char *text = ring_text(500);
    bc_diag d;
    bc_model *whole = text ? read_in_pieces(text, strlen(text), &d) : NULL;
    bc_diag_free(&d);
    int ok = whole != NULL;
    for (size_t step = 1; ok && step <= 97; step += 6) {
        bc_model *m = read_in_pieces(text, step, &d);
        ok &= m && m->n_states == whole->n_states && same_numbers(m, whole) &&
              memcmp(m->succ_state, whole->succ_state, (size_t)m->n_trans * sizeof *m->succ_state) == 0;
        bc_model_free(m);
        bc_diag_free(&d);
    }
    CHECK(ok, "pieces: a text read in pieces of 1 to 97 bytes gives the same model");
    bc_model_free(whole);
    free(text);
    /* The error of line 4 (column 15: the probability -1/2, after the 14
     * bytes "s1 go 0 -> s0 "), and a byte-order mark split over pieces. */
    const char *bad = "\xEF\xBB\xBF"
                      "bell 1\ndiscount 0.9\ns0 go 0 -> s0 1/2 s1 1/2\ns1 go 0 -> s0 -1/2 s1 3/2\n";
    for (size_t step = 1; step <= 4; step++) {
        bc_model *m = read_in_pieces(bad, step, &d);
        char name[96];
        snprintf(name, sizeof name, "pieces of %zu bytes: the error keeps its line and column", step);
        CHECK(!m && d.n_errors == 1 && d.items[0].line == 4 && d.items[0].col == 15, name);
        bc_model_free(m);
        bc_diag_free(&d);
    }
}

int main(void)
{
    test_table();
    test_sum_is_one();
    test_many_values();
    test_big_values();
    test_round_trip_many();
    test_setters();
    test_pieces();
    UNIT_DONE();
}
