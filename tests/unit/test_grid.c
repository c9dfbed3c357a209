/* test_grid.c — grids over a task: --cells parsing, point-to-cell lookup, cell names and centres, the exact initial distribution, exact probabilities of each scheme, and grid model -> .bell -> read back unchanged. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The tasks are the invented examples of models/ (crater rover, reservoir
 * release).  Expected cells, centres and initial probabilities are computed by
 * hand below from the ranges in the files.
 */
#define _POSIX_C_SOURCE 200809L
#include "bellcheck.h"
#include "unit.h"

#include <stdlib.h>
#include <string.h>

static bc_task *load(const char *path)
{
    bc_diag d;
    bc_diag_init(&d);
    bc_task *t = bc_task_read_file(path, &d);
    if (!t)
        bc_diag_print(&d, stdout);
    bc_diag_free(&d);
    return t;
}

static bc_grid_opts opts(const char *cells, bc_scheme scheme)
{
    bc_grid_opts o;
    const char *why;
    bc_grid_opts_default(&o);
    bc_grid_parse_cells(cells, &o, &why);
    o.scheme = scheme;
    return o;
}

static void test_cells_option(void)
{
    bc_grid_opts o;
    const char *why = NULL;
    bc_grid_opts_default(&o);
    CHECK(bc_grid_parse_cells("64x32", &o, &why) == 0 && o.n_dims == 2 && o.cells[0] == 64 &&
          o.cells[1] == 32, "cells: 64x32");
    CHECK(bc_grid_parse_cells("7", &o, &why) == 0 && o.n_dims == 1 && o.cells[0] == 7, "cells: one axis");
    CHECK(bc_grid_parse_cells("64x", &o, &why) < 0, "cells: trailing x refused");
    CHECK(bc_grid_parse_cells("0x4", &o, &why) < 0, "cells: zero refused");
    CHECK(bc_grid_parse_cells("64X64", &o, &why) < 0, "cells: capital X refused");
    CHECK(bc_grid_parse_cells("-4", &o, &why) < 0, "cells: sign refused");
    CHECK(bc_grid_parse_cells("1000000000", &o, &why) < 0, "cells: too many refused");
    bc_scheme s;
    CHECK(bc_scheme_parse("interp", &s) == 0 && s == BC_SCHEME_INTERP &&
          bc_scheme_parse("centre", &s) < 0 && !strcmp(bc_scheme_name(BC_SCHEME_CENTER), "center"),
          "scheme names");
}

static void test_lookup(const bc_task *t)
{
    bc_grid g;
    bc_diag d;
    bc_diag_init(&d);
    bc_grid_opts o = opts("4x4", BC_SCHEME_SAMPLE);
    CHECK(bc_grid_init(&g, t, &o, &d) == 0 && g.n_cells == 16 && g.stride[0] == 4 && g.stride[1] == 1,
          "lookup: 4x4 grid, last variable fastest");
    /* x widths 2.2/4 = 0.55, v widths 0.16/4 = 0.04. */
    double p[2] = {-1.0, 0.01}; /* x index floor(0.5/0.55) = 0, v index floor(0.09/0.04) = 2 */
    CHECK(bc_grid_cell(&g, p) == 2, "lookup: interior point");
    double lo[2] = {-1.5, -0.08}, hi[2] = {0.7, 0.08}, out[2] = {-9, 9};
    CHECK(bc_grid_cell(&g, lo) == 0 && bc_grid_cell(&g, hi) == 15 && bc_grid_cell(&g, out) == 3,
          "lookup: range ends and outside points go to the nearest cell");
    char name[32];
    CHECK(bc_grid_cell_name(&g, 6, name, sizeof name) == 4 && !strcmp(name, "c1_2"), "lookup: name c1_2");
    double c[2];
    bc_grid_cell_center(&g, 6, c); /* x -1.5 + 1.5 * 0.55, v -0.08 + 2.5 * 0.04 */
    CHECK_NEAR(c[0], -0.675, 1e-15, "lookup: centre x");
    CHECK_NEAR(c[1], 0.02, 1e-15, "lookup: centre v");
    CHECK(bc_grid_cell(&g, c) == 6, "lookup: a centre is in its cell");
    bc_grid_opts bad = opts("4", BC_SCHEME_SAMPLE);
    CHECK(bc_grid_init(&g, t, &bad, &d) < 0 && d.n_errors == 1 &&
          strstr(d.items[0].message, "2 state variables (x, v)"), "lookup: wrong number of counts");
    bad = opts("4x4", BC_SCHEME_SAMPLE);
    bad.samples = 10;
    CHECK(bc_grid_init(&g, t, &bad, &d) < 0 && strstr(d.items[1].message, "m^2"),
          "lookup: --samples must be m^2");
    bc_diag_free(&d);
}

static bc_model *build(const bc_task *t, bc_grid_opts o)
{
    bc_diag d;
    bc_diag_init(&d);
    bc_model *m = bc_grid_model(t, &o, &d);
    if (!m)
        bc_diag_print(&d, stdout);
    bc_diag_free(&d);
    return m;
}

static void test_initial(const bc_task *t)
{
    bc_model *m = build(t, opts("4x4", BC_SCHEME_SAMPLE)); /* some points near the rim stop */
    CHECK(m != NULL, "initial: 4x4 sample model builds");
    if (!m)
        return;
    /* x uniform [-0.7, -0.3] against boundaries -1.5 -0.95 -0.4 0.15 0.7: 0.3 of 0.4 in
     * cell 1, 0.1 in cell 2; v = 0 is the boundary between v cells 1 and 2: cell 2. */
    int32_t c12 = 1 * 4 + 2, c22 = 2 * 4 + 2, others = 0;
    for (int32_t s = 0; s < m->n_states; s++)
        others += s != c12 && s != c22 && m->initial_exact[s].num != 0;
    CHECK(m->initial_exact[c12].num == 3 && m->initial_exact[c12].den == 4 &&
          m->initial_exact[c22].num == 1 && m->initial_exact[c22].den == 4 && others == 0,
          "initial: exact shares 3/4 and 1/4 of the uniform range");
    CHECK(!strcmp(bc_names_get(m->state_names, m->n_states - 1), "stop") && m->terminal[m->n_states - 1],
          "initial: the terminal state `stop` comes last");
    CHECK(m->n_states == 17 && m->n_actions == 3 && m->n_pairs == 48, "initial: 16 cells + stop, 3 actions");
    bc_model_free(m);
}

/* 1 when every probability of m is a multiple of 1/den. */
static int probs_multiple_of(const bc_model *m, int64_t den)
{
    for (int64_t k = 0; k < m->n_trans; k++)
        if (bc_model_prob_exact(m, k).den <= 0 || den % bc_model_prob_exact(m, k).den != 0)
            return 0;
    return 1;
}

static void test_schemes(const bc_task *t)
{
    bc_model *m = build(t, opts("16x16", BC_SCHEME_SAMPLE));
    CHECK(m && probs_multiple_of(m, 16), "schemes: sample probabilities are count/16 (4x4 points)");
    bc_model_free(m);
    bc_grid_opts o = opts("16x16", BC_SCHEME_SAMPLE);
    o.samples = 9;
    m = build(t, o);
    CHECK(m && probs_multiple_of(m, 9), "schemes: --samples 9 gives count/9");
    bc_model_free(m);
    m = build(t, opts("16x16", BC_SCHEME_CENTER));
    CHECK(m && m->n_trans == m->n_pairs, "schemes: center has one successor per pair");
    bc_model_free(m);
    m = build(t, opts("16x16", BC_SCHEME_INTERP));
    int corners = 1;
    for (int64_t p = 0; m && p < m->n_pairs; p++)
        corners &= m->pair_trans_start[p + 1] - m->pair_trans_start[p] <= 3;
    CHECK(m && probs_multiple_of(m, (int64_t)1 << 30) && corners,
          "schemes: interp weights are multiples of 2^-30 on at most 3 corners (2-D simplex)");
    bc_model_free(m);
}

/* The .bell text of m. */
static char *text_of(const bc_model *m, size_t *len)
{
    char *buf = NULL;
    FILE *f = open_memstream(&buf, len);
    if (!f)
        return NULL;
    bc_write_bell_text(m, f);
    fclose(f);
    return buf;
}

static int same_model(const bc_model *a, const bc_model *b)
{
    if (a->n_states != b->n_states || a->n_actions != b->n_actions || a->n_pairs != b->n_pairs ||
        a->n_trans != b->n_trans || strcmp(a->name, b->name) || a->objective != b->objective ||
        bc_num_cmp(a->discount_exact, b->discount_exact, NULL) != 0)
        return 0;
    for (int32_t s = 0; s < a->n_states; s++)
        if (strcmp(bc_names_get(a->state_names, s), bc_names_get(b->state_names, s)) ||
            a->terminal[s] != b->terminal[s] ||
            bc_num_cmp(a->initial_exact[s], b->initial_exact[s], NULL) != 0 ||
            a->state_pair_start[s] != b->state_pair_start[s])
            return 0;
    for (int64_t p = 0; p < a->n_pairs; p++)
        if (a->pair_action[p] != b->pair_action[p] || a->pair_trans_start[p] != b->pair_trans_start[p] ||
            a->reward[p] != b->reward[p])
            return 0;
    for (int64_t k = 0; k < a->n_trans; k++)
        if (a->succ_state[k] != b->succ_state[k] || a->prob[k] != b->prob[k])
            return 0;
    return 1;
}

static void round_trip(const bc_task *t, const char *cells, bc_scheme scheme, const char *name)
{
    bc_model *m = build(t, opts(cells, scheme)), *back = NULL, *again = build(t, opts(cells, scheme));
    size_t n1 = 0, n2 = 0, n3 = 0;
    char *t1 = m ? text_of(m, &n1) : NULL, *t2 = NULL, *t3 = again ? text_of(again, &n3) : NULL;
    if (t1) {
        bc_diag d;
        bc_diag_init(&d);
        back = bc_read_bell_text(t1, n1, "grid.bell", &d);
        if (!back)
            bc_diag_print(&d, stdout);
        bc_diag_free(&d);
    }
    if (back)
        t2 = text_of(back, &n2);
    char label[200];
    snprintf(label, sizeof label, "round trip %s: the written model reads back equal", name);
    CHECK(back && same_model(m, back), label);
    snprintf(label, sizeof label, "round trip %s: written again, byte for byte the same", name);
    CHECK(t1 && t2 && n1 == n2 && !memcmp(t1, t2, n1), label);
    snprintf(label, sizeof label, "round trip %s: built twice, the same text (deterministic)", name);
    CHECK(t1 && t3 && n1 == n3 && !memcmp(t1, t3, n1), label);
    free(t1);
    free(t2);
    free(t3);
    bc_model_free(m);
    bc_model_free(back);
    bc_model_free(again);
}

int main(void)
{
    test_cells_option();
    bc_task *rover = load("models/crater-rover.task"), *reservoir = load("models/reservoir-release.task");
    CHECK(rover && reservoir, "the example tasks read");
    if (rover && reservoir) {
        test_lookup(rover);
        test_initial(rover);
        test_schemes(rover);
        round_trip(rover, "24x20", BC_SCHEME_SAMPLE, "rover sample");
        round_trip(rover, "24x20", BC_SCHEME_CENTER, "rover center");
        round_trip(rover, "24x20", BC_SCHEME_INTERP, "rover interp");
        bc_model *m = build(reservoir, opts("12x5", BC_SCHEME_SAMPLE));
        CHECK(m && probs_multiple_of(m, 256) && !probs_multiple_of(m, 16),
              "noise: 16 points x 4 x 4 noise strata give count/256");
        bc_model_free(m);
        round_trip(reservoir, "12x5", BC_SCHEME_SAMPLE, "reservoir sample (noise)");
        round_trip(reservoir, "12x5", BC_SCHEME_INTERP, "reservoir interp (noise)");
    }
    bc_task_free(rover);
    bc_task_free(reservoir);
    UNIT_DONE();
}
