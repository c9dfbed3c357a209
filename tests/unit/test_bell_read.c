/* test_bell_read.c — the .bell text reader: the format's example model field by field, directive placement, renormalisation, error positions. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The model texts are the format's own example (../shared/design/model-format.md,
 * "Example", an invented dock-shuttle scenario) and small invented models.  Every
 * expected array below is written out by hand from those texts.
 */
#include "bellcheck.h"
#include "unit.h"

#include <stdlib.h>
#include <string.h>

/* The example of model-format.md, verbatim (line numbers matter: 1 is the comment). */
static const char dock_shuttle[] =
    "# A battery-powered shuttle carries parcels between a dock and a depot.\n" /* 1 */
    "bell 1\n"                                                                   /* 2 */
    "name dock-shuttle\n"                                                        /* 3 */
    "discount 0.95\n"                                                            /* 4 */
    "initial dock\n"                                                             /* 5 */
    "terminal scrapped\n"                                                        /* 6 */
    "\n"                                                                         /* 7 */
    "dock     load    -1   -> loaded 9/10  dock 1/10\n"                          /* 8 */
    "dock     wait     0   -> dock\n"                                            /* 9 */
    "loaded   drive   -2   -> depot 0.8 10  loaded 0.15  scrapped 0.05\n"       /* 10 */
    "loaded   unload   0   -> dock\n"                                            /* 11 */
    "depot    return  -1   -> dock\n";                                           /* 12 */

static bc_model *read_text(const char *text, bc_diag *d)
{
    bc_diag_init(d);
    return bc_read_bell_text(text, strlen(text), "t.bell", d);
}

/* 1 when x is exactly num/den (small form, lowest terms). */
static int is_q(bc_num x, int64_t num, int64_t den)
{
    return x.den == den && x.num == num;
}

static int names_are(const bc_names *t, const char *const *want, int n)
{
    if (bc_names_count(t) != n)
        return 0;
    for (int i = 0; i < n; i++)
        if (strcmp(bc_names_get(t, i), want[i]) != 0)
            return 0;
    return 1;
}

static int i64_eq(const int64_t *a, const int64_t *b, int n)
{
    for (int i = 0; i < n; i++)
        if (a[i] != b[i])
            return 0;
    return 1;
}

static int i32_eq(const int32_t *a, const int32_t *b, int n)
{
    for (int i = 0; i < n; i++)
        if (a[i] != b[i])
            return 0;
    return 1;
}

static void test_dock_shuttle(void)
{
    bc_diag d;
    bc_model *m = read_text(dock_shuttle, &d);
    CHECK(m != NULL, "dock: reads");
    CHECK(d.n_errors == 0 && d.n_warnings == 0, "dock: no errors, no warnings");
    if (!m) {
        bc_diag_print(&d, stdout);
        bc_diag_free(&d);
        return;
    }
    CHECK(bc_model_check_invariants(m) == NULL, "dock: invariants hold");
    CHECK(strcmp(m->name, "dock-shuttle") == 0, "dock: name");
    CHECK(m->discount == 0.95 && is_q(m->discount_exact, 19, 20), "dock: discount 0.95 = 19/20");
    CHECK(m->objective == BC_MAX && m->horizon == 0, "dock: objective max, infinite horizon");
    /* States in order of first appearance: initial dock, terminal scrapped, then loaded, depot. */
    static const char *const states[] = {"dock", "scrapped", "loaded", "depot"};
    static const char *const actions[] = {"load", "wait", "drive", "unload", "return"};
    CHECK(m->n_states == 4 && names_are(m->state_names, states, 4), "dock: state names in order");
    CHECK(m->n_actions == 5 && names_are(m->action_names, actions, 5), "dock: action names in order");
    CHECK(m->n_pairs == 5 && m->n_trans == 8, "dock: 5 pairs, 8 transitions");
    if (m->n_states != 4 || m->n_pairs != 5 || m->n_trans != 8) {
        bc_model_free(m);
        bc_diag_free(&d);
        return;
    }
    /* Pairs by state then action index: dock load, dock wait, loaded drive, loaded unload, depot return. */
    static const int64_t sps[] = {0, 2, 2, 4, 5};
    static const int32_t pst[] = {0, 0, 2, 2, 3}, pac[] = {0, 1, 2, 3, 4};
    static const int64_t pts[] = {0, 2, 3, 6, 7, 8};
    static const int32_t succ[] = {2, 0, 0, 3, 2, 1, 0, 0};
    static const int32_t lines[] = {8, 9, 10, 11, 12};
    CHECK(i64_eq(m->state_pair_start, sps, 5), "dock: state_pair_start");
    CHECK(i32_eq(m->pair_state, pst, 5), "dock: pair_state");
    CHECK(i32_eq(m->pair_action, pac, 5), "dock: pair_action");
    CHECK(i64_eq(m->pair_trans_start, pts, 6), "dock: pair_trans_start");
    CHECK(i32_eq(m->succ_state, succ, 8), "dock: succ_state in written order");
    CHECK(m->pair_line && i32_eq(m->pair_line, lines, 5), "dock: pair_line");
    static const int64_t pn[] = {9, 1, 1, 4, 3, 1, 1, 1}, pd[] = {10, 10, 1, 5, 20, 20, 1, 1};
    int probs_ok = 1, dprobs_ok = 1;
    for (int t = 0; t < 8; t++) {
        probs_ok &= is_q(bc_model_prob_exact(m, t), pn[t], pd[t]);
        dprobs_ok &= m->prob[t] == (double)pn[t] / (double)pd[t];
    }
    CHECK(probs_ok, "dock: prob_exact 9/10 1/10 1 4/5 3/20 1/20 1 1");
    CHECK(dprobs_ok, "dock: prob doubles nearest to the exact values");
    static const int64_t rw[] = {-1, 0, -2, 0, -1};
    int rw_ok = 1;
    for (int p = 0; p < 5; p++)
        rw_ok &= is_q(bc_model_reward_exact(m, p), rw[p], 1);
    CHECK(rw_ok, "dock: reward_exact as written (-1 0 -2 0 -1)");
    CHECK(m->outcome_id != NULL && is_q(bc_model_outcome_exact(m, 3), 10, 1) &&
              is_q(bc_model_outcome_exact(m, 4), 0, 1) && is_q(bc_model_outcome_exact(m, 0), 0, 1),
          "dock: outcome reward 10 on loaded->depot only");
    /* Expected reward of `loaded drive` = -2 + 0.8 * 10 = 6 (model-format.md). */
    mpq_t r;
    mpq_init(r);
    bc_model_reward_mpq(m, 2, r);
    CHECK(mpq_cmp_si(r, 6, 1) == 0, "dock: expected reward of loaded drive is exactly 6");
    bc_model_reward_mpq(m, 0, r);
    CHECK(mpq_cmp_si(r, -1, 1) == 0, "dock: expected reward of dock load is exactly -1");
    mpq_clear(r);
    CHECK(m->reward[2] == 6.0 && m->reward[0] == -1.0 && m->reward[1] == 0.0, "dock: reward doubles");
    CHECK(m->terminal[0] == 0 && m->terminal[1] == 1 && m->terminal[2] == 0 && m->terminal[3] == 0,
          "dock: only scrapped is terminal");
    CHECK(m->initial_given == 1 && m->initial[0] == 1.0 && m->initial[1] == 0.0 &&
              m->initial[2] == 0.0 && m->initial[3] == 0.0,
          "dock: initial distribution all on dock");
    CHECK(is_q(m->initial_exact[0], 1, 1) && is_q(m->initial_exact[2], 0, 1), "dock: initial_exact");
    CHECK(m->n_renormalised == 0, "dock: nothing renormalised");
    CHECK(bc_model_find_pair(m, 2, 2) == 2 && bc_model_find_pair(m, 0, 2) == -1 &&
              bc_model_find_pair(m, 1, 0) == -1,
          "dock: find_pair");
    bc_model_free(m);
    bc_diag_free(&d);
}

/* Directives after the transition lines, a `states` line that reorders the states,
 * an `actions` line that reorders the actions. */
static void test_directives_last(void)
{
    static const char text[] = "a go 1 -> b 1/2 c 1/2\n" /* 1 */
                               "b go 2 -> c\n"           /* 2 */
                               "c stay 0 -> c\n"         /* 3 */
                               "c go 5 -> a\n"           /* 4 */
                               "# directives last\n"     /* 5 */
                               "discount 1/2\n"          /* 6 */
                               "states c b a\n"          /* 7 */
                               "actions stay go\n"       /* 8 */
                               "objective min\n"         /* 9 */
                               "horizon 4\n"             /* 10 */
                               "name late\n"             /* 11 */
                               "initial a\n";            /* 12 */
    bc_diag d;
    bc_model *m = read_text(text, &d);
    CHECK(m != NULL && d.n_errors == 0, "late: reads");
    if (!m) {
        bc_diag_print(&d, stdout);
        bc_diag_free(&d);
        return;
    }
    static const char *const states[] = {"c", "b", "a"};
    static const char *const actions[] = {"stay", "go"};
    CHECK(names_are(m->state_names, states, 3), "late: states line fixes the order c b a");
    CHECK(names_are(m->action_names, actions, 2), "late: actions line fixes the order stay go");
    CHECK(strcmp(m->name, "late") == 0 && m->discount == 0.5 && is_q(m->discount_exact, 1, 2),
          "late: name and discount");
    CHECK(m->objective == BC_MIN && m->horizon == 4, "late: objective min, horizon 4");
    CHECK(bc_model_check_invariants(m) == NULL, "late: invariants hold");
    /* Pairs: c stay, c go, b go, a go. */
    static const int64_t sps[] = {0, 2, 3, 4};
    static const int32_t pac[] = {0, 1, 1, 1}, lines[] = {3, 4, 2, 1};
    static const int32_t succ[] = {0, 2, 0, 1, 0}; /* c; a; c; b c */
    CHECK(m->n_pairs == 4 && i64_eq(m->state_pair_start, sps, 4), "late: pairs grouped by the new order");
    CHECK(m->n_pairs == 4 && i32_eq(m->pair_action, pac, 4), "late: pair actions in the new order");
    CHECK(m->n_pairs == 4 && m->pair_line && i32_eq(m->pair_line, lines, 4), "late: pair lines follow");
    CHECK(m->n_trans == 5 && i32_eq(m->succ_state, succ, 5), "late: successors renumbered");
    CHECK(m->n_pairs == 4 && is_q(bc_model_reward_exact(m, 3), 1, 1) && is_q(bc_model_reward_exact(m, 1), 5, 1),
          "late: rewards follow their pairs");
    CHECK(m->initial[2] == 1.0 && m->initial[0] == 0.0 && m->initial_given, "late: initial a (index 2)");
    bc_model_free(m);
    bc_diag_free(&d);
}

/* Sums within 1e-9 of 1 are renormalised exactly with a warning naming the line. */
static void test_renormalise(void)
{
    static const char text[] = "discount 0.9\n"                         /* 1 */
                               "a go 1 -> b 0.333333333 c 0.666666666\n" /* 2: sum 1 - 1e-9 */
                               "b go 0 -> a 0.5 b 0.5000000005\n"        /* 3: sum 1 + 5e-10 */
                               "c go 0 -> a 1/2 c 1/2\n";                /* 4: exact */
    bc_diag d;
    bc_model *m = read_text(text, &d);
    CHECK(m != NULL && d.n_errors == 0, "renorm: reads");
    CHECK(d.n_warnings == 2, "renorm: two warnings");
    int lines_ok = 1;
    for (int i = 0, k = 0; i < d.n; i++)
        if (d.items[i].severity == BC_WARNING)
            lines_ok &= d.items[i].line == (k++ == 0 ? 2 : 3) && d.items[i].file &&
                        strcmp(d.items[i].file, "t.bell") == 0;
    CHECK(lines_ok, "renorm: warnings name t.bell lines 2 and 3");
    if (!m) {
        bc_diag_print(&d, stdout);
        bc_diag_free(&d);
        return;
    }
    CHECK(m->n_renormalised == 2 && m->renormalised_lines && m->renormalised_lines[0] == 2 &&
              m->renormalised_lines[1] == 3,
          "renorm: model records lines 2 and 3");
    /* 0.333333333 / 0.999999999 = 1/3 exactly; 0.5 / 1.0000000005 = 1000000000/2000000001. */
    CHECK(is_q(bc_model_prob_exact(m, 0), 1, 3) && is_q(bc_model_prob_exact(m, 1), 2, 3), "renorm: line 2 becomes 1/3, 2/3");
    CHECK(is_q(bc_model_prob_exact(m, 2), 1000000000, 2000000001) && is_q(bc_model_prob_exact(m, 3), 1000000001, 2000000001),
          "renorm: line 3 becomes 1000000000/2000000001, 1000000001/2000000001");
    CHECK(is_q(bc_model_prob_exact(m, 4), 1, 2), "renorm: exact line untouched");
    bc_model_free(m);
    bc_diag_free(&d);

    /* 1.1e-9 off is an error, at line 2. */
    m = read_text("discount 0.9\na go 1 -> a 0.5 b 0.4999999989\nb go 0 -> a\n", &d);
    CHECK(m == NULL && d.n_errors >= 1 && d.items[0].line == 2, "renorm: 1.1e-9 off is an error at line 2");
    bc_model_free(m);
    bc_diag_free(&d);
}

static void test_number_forms(void)
{
    bc_diag d;
    bc_model *m = read_text("discount 0.9\na go -2.5E+2 -> a 1e-3 b 0.999\nb go 1e-3 -> b\n", &d);
    CHECK(m != NULL, "numbers: reads");
    if (m) {
        CHECK(is_q(bc_model_reward_exact(m, 0), -250, 1), "numbers: -2.5E+2 = -250");
        CHECK(is_q(bc_model_reward_exact(m, 1), 1, 1000), "numbers: reward 1e-3 = 1/1000");
        CHECK(is_q(bc_model_prob_exact(m, 0), 1, 1000) && is_q(bc_model_prob_exact(m, 1), 999, 1000),
              "numbers: probabilities 1e-3 and 0.999");
        CHECK(m->reward[0] == -250.0 && m->reward[1] == 0.001, "numbers: doubles");
    }
    bc_model_free(m);
    bc_diag_free(&d);
}

/* Reads text that must fail; 1 when the first error is at line:col of t.bell. */
static int error_at(const char *text, int line, int col)
{
    bc_diag d;
    bc_model *m = read_text(text, &d);
    int ok = m == NULL && d.n_errors >= 1;
    const bc_diag_item *e = NULL;
    for (int i = 0; i < d.n && !e; i++)
        if (d.items[i].severity == BC_ERROR)
            e = &d.items[i];
    ok = ok && e && e->line == line && e->col == col && e->file && strcmp(e->file, "t.bell") == 0;
    if (!ok) {
        printf("  (got:");
        bc_diag_print(&d, stdout);
        printf("  )\n");
    }
    bc_model_free(m);
    bc_diag_free(&d);
    return ok;
}

static void test_error_positions(void)
{
    /* The column of the offending token (model-format.md, "Errors"). */
    CHECK(error_at("bell 1\ndiscount 2\na go 1 -> a\n", 2, 10), "error: discount 2 at 2:10");
    CHECK(error_at("discount 0.9\na go ten -> a\n", 2, 6), "error: reward `ten` at 2:6");
    CHECK(error_at("discount 0.9\na go 1 -> a\nb go 0 -> a\na go 2 -> b\n", 4, 1),
          "error: duplicate pair at 4:1");
    CHECK(error_at("discount 0.9\nactions go\na go 1 -> b\nb  fly 0 -> a\n", 4, 4),
          "error: action not in `actions` at 4:4");
    CHECK(error_at("discount 0.9\na go 1 -> b\nb go 0 ->\t c$d\n", 3, 12),
          "error: bad name `c$d` at 3:12 (after a tab)");
    CHECK(error_at("discount 0.9\na go 1 -> a 1.5 b -0.5\nb go 0 -> a\n", 2, 19),
          "error: negative probability at its column 2:19");
}

int main(void)
{
    test_dock_shuttle();
    test_directives_last();
    test_renormalise();
    test_number_forms();
    test_error_positions();
    UNIT_DONE();
}
