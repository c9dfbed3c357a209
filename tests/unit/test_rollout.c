/* test_rollout.c — simulation of a grid controller: Student's t quantile, hand-computable returns, thread-independent results, trajectories, greedy choice by objective. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Expected values come from closed forms and hand computation, never from
 * the code under test (each is named beside its check).
 */
#define _POSIX_C_SOURCE 200809L
#include "bellcheck.h"
#include "unit.h"

#include <stdlib.h>
#include <string.h>

static bc_task *task_text(const char *text)
{
    bc_diag d;
    bc_diag_init(&d);
    bc_task *t = bc_task_read_text(text, strlen(text), "t.task", &d);
    if (!t)
        bc_diag_print(&d, stdout);
    bc_diag_free(&d);
    return t;
}

/* A controller taking action a in every cell of the grid `cells` of t. */
static int constant_policy(bc_grid_policy *gp, const bc_task *t, const char *cells, int32_t a)
{
    bc_grid_opts o;
    const char *why;
    bc_grid_opts_default(&o);
    bc_grid_parse_cells(cells, &o, &why);
    bc_diag d;
    bc_diag_init(&d);
    memset(gp, 0, sizeof *gp);
    int rc = bc_grid_init(&gp->grid, t, &o, &d);
    bc_diag_free(&d);
    if (rc < 0)
        return -1;
    gp->n_actions = bc_task_n_actions(t);
    gp->action = malloc((size_t)gp->grid.n_cells * sizeof *gp->action);
    for (int64_t c = 0; gp->action && c < gp->grid.n_cells; c++)
        gp->action[c] = a;
    return gp->action ? 0 : -1;
}

static void test_t_quantile(void)
{
    /* Closed forms of Student's t quantile (Johnson, Kotz and Balakrishnan,
     * Continuous Univariate Distributions, vol. 2, 2nd ed., 1995, ch. 28):
     * df = 1 is the Cauchy law, t = tan(pi (p - 1/2)); df = 2 gives
     * t = (2p - 1) / sqrt(2 p (1 - p)); df = 4 gives
     * t = 2 sqrt(q - 1), q = cos(acos(sqrt(a)) / 3) / sqrt(a), a = 4 p (1 - p). */
    const double p = 0.975, pi = 3.14159265358979323846;
    CHECK_NEAR(bc_t_quantile(p, 1), tan(pi * (p - 0.5)), 1e-9, "t quantile, 1 degree of freedom (Cauchy)");
    CHECK_NEAR(bc_t_quantile(p, 2), (2 * p - 1) / sqrt(2 * p * (1 - p)), 1e-10, "t quantile, 2 degrees of freedom");
    double a = 4 * p * (1 - p), q = cos(acos(sqrt(a)) / 3) / sqrt(a);
    CHECK_NEAR(bc_t_quantile(p, 4), 2 * sqrt(q - 1), 1e-10, "t quantile, 4 degrees of freedom");
    CHECK_NEAR(bc_t_quantile(0.9, 2), 0.8 / sqrt(2 * 0.9 * 0.1), 1e-10, "t quantile at 0.9, 2 degrees of freedom");
    /* Large df: the normal quantile 1.959963984540054 (Abramowitz and Stegun, 1964, table 26.1). */
    CHECK_NEAR(bc_t_quantile(p, 1e9), 1.959963984540054, 1e-8, "t quantile tends to the normal one");
    CHECK(isnan(bc_t_quantile(0.3, 5)) && isnan(bc_t_quantile(0.975, 0)), "t quantile: bad arguments give NaN");
}

/* Every episode of this task takes 5 steps and earns 2 per step: return 10
 * (by hand: x0 in [0, 1), x_k = x0 + k, the first k with x_k >= 5 is 5). */
static const char walk[] = "task 1\nname walk\ndiscount 1\nstate x 0 10\naction u 1\n"
                           "noise w uniform -1 1\nnext x = x + u + 0*w\nreward 2\n"
                           "stop x' >= 5\ninitial x uniform 0 1\nlimit 100\n";

static void test_hand_returns(void)
{
    bc_task *t = task_text(walk);
    bc_grid_policy gp;
    if (!t || constant_policy(&gp, t, "10", 0) < 0) {
        CHECK(0, "walk task and controller");
        bc_task_free(t);
        return;
    }
    bc_rollout_opts o;
    bc_rollout_opts_default(&o);
    o.episodes = 777;
    bc_rollout_result r;
    CHECK(bc_rollout(t, &gp, NULL, &o, &r) == 0, "rollout of the walk task");
    CHECK(r.ret.mean == 10.0 && r.ret.ci_low == 10.0 && r.ret.ci_high == 10.0 && r.ret.sd == 0.0,
          "every episode returns 10 (by hand): mean 10, interval of width 0");
    CHECK(r.successes == 777 && r.success_rate == 1.0, "every episode stops");
    CHECK(r.steps_min == 5 && r.steps_max == 5 && r.steps_p50 == 5 && r.steps_mean == 5.0,
          "every episode takes 5 steps (by hand)");
    o.limit = 3; /* cut before the stop: 3 steps, return 6, no success */
    CHECK(bc_rollout(t, &gp, NULL, &o, &r) == 0 && r.successes == 0 && r.ret.mean == 6.0 &&
          r.steps_max == 3, "a limit of 3 steps: return 6, success rate 0 (by hand)");
    o.limit = 0;
    o.episodes = 1;
    CHECK(bc_rollout(t, &gp, NULL, &o, &r) == 0 && r.ret.mean == 10.0 && isnan(r.ret.ci_low),
          "one episode: a mean and no interval");
    o.episodes = 0;
    CHECK(bc_rollout(t, &gp, NULL, &o, &r) == -2, "zero episodes refused");
    bc_grid_policy_free(&gp);
    bc_task_free(t);
}

static int same_stats(const bc_sample_stats *a, const bc_sample_stats *b)
{
    return a->n == b->n && !memcmp(&a->mean, &b->mean, sizeof a->mean) &&
           !memcmp(&a->sd, &b->sd, sizeof a->sd) && !memcmp(&a->ci_low, &b->ci_low, sizeof a->ci_low);
}

static void test_threads_and_trajectories(void)
{
    bc_diag d;
    bc_diag_init(&d);
    bc_task *t = bc_task_read_file("models/reservoir-release.task", &d);
    bc_diag_free(&d);
    bc_grid_policy low, high;
    if (!t || constant_policy(&low, t, "10x5", 1) < 0 || constant_policy(&high, t, "20x4", 2) < 0) {
        CHECK(0, "reservoir task and controllers");
        bc_task_free(t);
        return;
    }
    bc_rollout_opts o;
    bc_rollout_opts_default(&o);
    o.episodes = 1000; /* several blocks, so threads really share the work */
    bc_rollout_result r1, r3, r7;
    o.threads = 1;
    int ok = bc_rollout(t, &low, &high, &o, &r1) == 0;
    o.threads = 3;
    ok = ok && bc_rollout(t, &low, &high, &o, &r3) == 0;
    CHECK(ok && same_stats(&r1.ret, &r3.ret) && same_stats(&r1.regret, &r3.regret) &&
          same_stats(&r1.against_ret, &r3.against_ret) && r1.steps_p50 == r3.steps_p50,
          "1 and 3 threads give bit-identical results");
    CHECK(ok && r1.successes == 0 && r1.steps_min == 365,
          "the reservoir never stops: success rate 0, every episode runs to its limit of 365");
    o.seed = 7;
    CHECK(bc_rollout(t, &low, NULL, &o, &r7) == 0 && r7.ret.mean != r1.ret.mean,
          "another seed, other episodes");
    /* Trajectories are episodes 0..k-1 of the rollout: their returns average to its mean. */
    o.seed = 1;
    o.episodes = 5;
    o.threads = 1;
    bc_trajectory tr[5];
    char why[256];
    ok = bc_rollout(t, &low, NULL, &o, &r1) == 0 &&
         bc_rollout_trajectories(t, &low, &o, 5, 1000, tr, why, sizeof why) == 0;
    double sum = 0;
    int shapes = 1;
    for (int i = 0; ok && i < 5; i++) {
        sum += tr[i].ret;
        shapes = shapes && tr[i].n_points == 366 && !tr[i].stopped && !tr[i].truncated &&
                 tr[i].x[0] >= 40 && tr[i].x[0] <= 60 && tr[i].action[0] == 1;
    }
    CHECK(ok && sum / 5 == r1.ret.mean, "trajectories replay the rollout's episodes (same returns)");
    CHECK(ok && shapes, "a trajectory holds the initial state and one state per step (365 steps)");
    bc_trajectories_free(tr, 5);
    ok = bc_rollout_trajectories(t, &low, &o, 2, 10, tr, why, sizeof why) == 0;
    CHECK(ok && tr[0].n_points == 10 && tr[0].truncated, "max_points cuts a trajectory short and says so");
    bc_trajectories_free(tr, 2);
    bc_grid_policy_free(&low);
    bc_grid_policy_free(&high);
    bc_task_free(t);
}

/* The greedy action follows the objective: the largest Q for max, the smallest for min. */
static void test_greedy_sense(void)
{
    static const char base[] = "task 1\ndiscount 0.9\nobjective %s\nstate x 0 4\naction u 0 1 2\n"
                                "next x = x\nreward 1\ninitial x = 1\n";
    for (int k = 0; k < 2; k++) {
        char text[512];
        snprintf(text, sizeof text, base, k ? "min" : "max");
        bc_task *t = task_text(text);
        bc_grid_opts o;
        const char *why;
        bc_grid_opts_default(&o);
        bc_grid_parse_cells("4", &o, &why);
        bc_diag d;
        bc_diag_init(&d);
        bc_model *m = t ? bc_grid_model(t, &o, &d) : NULL;
        bc_qtable *q = m ? bc_qtable_alloc(m) : NULL;
        bc_grid_policy gp;
        int ok = q != NULL;
        for (int32_t s = 0; ok && s < 4; s++) { /* Q = 5, 1, 9 for actions 0, 1, 2 */
            int64_t p0 = m->state_pair_start[s];
            q->q[p0] = 5, q->q[p0 + 1] = 1, q->q[p0 + 2] = 9;
        }
        ok = ok && bc_grid_policy_from_q(&gp, t, &o, m, q, &d) == 0;
        CHECK(ok && gp.action[0] == (k ? 1 : 2) && gp.action[3] == (k ? 1 : 2),
              k ? "objective min: the smallest Q is greedy" : "objective max: the largest Q is greedy");
        if (ok)
            bc_grid_policy_free(&gp);
        if (q)
            q->q[m->state_pair_start[2]] = NAN;
        CHECK(q && bc_grid_policy_from_q(&gp, t, &o, m, q, &d) < 0 && gp.action == NULL,
              "a NaN in the Q-table is refused");
        bc_diag_free(&d);
        bc_qtable_free(q);
        bc_model_free(m);
        bc_task_free(t);
    }
}

/* What a refinement study keeps per grid for its readers (reports, pictures). */
static void test_refine_struct(void)
{
    bc_diag d;
    bc_diag_init(&d);
    bc_task *t = bc_task_read_file("models/reservoir-release.task", &d);
    bc_grid_opts g[2];
    const char *why;
    for (int k = 0; k < 2; k++) {
        bc_grid_opts_default(&g[k]);
        bc_grid_parse_cells(k ? "10x4" : "5x2", &g[k], &why);
    }
    bc_refine_opts o;
    bc_refine_opts_default(&o);
    o.rollout.episodes = 50;
    o.n_trajectories = 2;
    bc_refine r;
    int ok = t && bc_refine_run(t, g, 2, &o, &r, &d) == 0;
    bc_diag_print(&d, stdout);
    bc_diag_free(&d);
    CHECK(ok && r.n_levels == 2 && r.level[0].status == BC_REFINE_OK && r.level[1].status == BC_REFINE_OK,
          "refine: two grids solved and simulated");
    if (ok) {
        const bc_refine_level *a = &r.level[0], *b = &r.level[1];
        /* The reservoir has no `stop` line, so no terminal state: 40 states for 40 cells. */
        CHECK(a->values && b->values && b->n_states == 40 && b->policy.action && b->policy.grid.n_cells == 40,
              "refine keeps each grid's values and optimal action per cell");
        CHECK(b->difference == b->value - a->value && isnan(a->difference) && isnan(b->order) &&
              isnan(r.extrapolated), "refine: the change between two grids, no order or estimate from two");
        CHECK(!a->has_gain && b->has_gain && b->sim.has_against, "refine: the finer policy runs beside the coarser one");
        CHECK(b->n_trajectories == 2 && b->trajectories[1].n_points == 366,
              "refine keeps the asked-for trajectories (365 days each)");
        CHECK(b->sim.against_ret.mean == a->sim.ret.mean && b->sim.against_ret.sd == a->sim.ret.sd,
              "common random numbers: the coarser policy's episodes are the same in both runs");
    }
    if (t)
        bc_refine_free(&r);
    bc_task_free(t);
}

int main(void)
{
    test_t_quantile();
    test_hand_returns();
    test_threads_and_trajectories();
    test_greedy_sense();
    test_refine_struct();
    UNIT_DONE();
}
