/* test_solvers.c — unit tests of the solvers (vi, pi, lp, backward) on small models with known answers. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include "bellcheck.h"
#include "../../solvers/solver_internal.h"
#include "unit.h"

/* ------------------------------------------------------------------------ */
/* Building models by hand                                                  */
/* ------------------------------------------------------------------------ */

/* One state-action pair: reward rn/rd, successors with probabilities pn/pd. */
typedef struct {
    int state, action;
    int64_t rn, rd;
    int n_succ;
    int succ[3];
    int64_t pn[3], pd[3];
} pair_spec;

typedef struct {
    const char *const *states;
    int n_states;
    const char *const *actions;
    int n_actions;
    const char *terminal; /* one '0' or '1' per state */
    const pair_spec *pairs; /* sorted by state, then action */
    int n_pairs;
    int64_t gn, gd; /* discount gn/gd */
    bc_objective objective;
    int32_t horizon;
} model_spec;

static bc_model *make_model(const model_spec *sp)
{
    int64_t n_trans = 0;
    for (int i = 0; i < sp->n_pairs; i++)
        n_trans += sp->pairs[i].n_succ;
    bc_model *m = bc_model_alloc(sp->n_states, sp->n_actions, sp->n_pairs, n_trans);
    if (!m)
        return NULL;
    m->discount = (double)sp->gn / (double)sp->gd;
    m->discount_exact = (bc_num){sp->gn, sp->gd};
    m->objective = sp->objective;
    m->horizon = sp->horizon;
    m->state_names = bc_names_new();
    m->action_names = bc_names_new();
    for (int s = 0; s < sp->n_states; s++)
        bc_names_intern(m->state_names, sp->states[s], strlen(sp->states[s]));
    for (int a = 0; a < sp->n_actions; a++)
        bc_names_intern(m->action_names, sp->actions[a], strlen(sp->actions[a]));
    int n_live = 0;
    for (int s = 0; s < sp->n_states; s++)
        n_live += (m->terminal[s] = sp->terminal[s] == '1') ? 0 : 1;
    for (int s = 0; s < sp->n_states; s++) {
        m->initial[s] = m->terminal[s] ? 0.0 : 1.0 / n_live;
        m->initial_exact[s] = m->terminal[s] ? (bc_num){0, 1} : (bc_num){1, n_live};
    }
    int64_t k = 0;
    for (int p = 0; p < sp->n_pairs; p++) {
        const pair_spec *q = &sp->pairs[p];
        m->pair_state[p] = q->state;
        m->pair_action[p] = q->action;
        m->reward[p] = (double)q->rn / (double)q->rd;
        bc_model_set_reward_exact(m, p, (bc_num){q->rn, q->rd});
        m->pair_trans_start[p] = k;
        for (int j = 0; j < q->n_succ; j++, k++) {
            m->succ_state[k] = q->succ[j];
            m->prob[k] = (double)q->pn[j] / (double)q->pd[j];
            bc_model_set_prob_exact(m, k, (bc_num){q->pn[j], q->pd[j]});
        }
        m->state_pair_start[q->state + 1] = p + 1;
    }
    m->pair_trans_start[sp->n_pairs] = k;
    for (int s = 0; s < sp->n_states; s++) /* states without pairs (terminal) */
        if (m->state_pair_start[s + 1] < m->state_pair_start[s])
            m->state_pair_start[s + 1] = m->state_pair_start[s];
    return m;
}

/* A random model, the same for every run (linear congruential generator):
 * n states (the last one terminal), 3 actions, 3 successors per pair with
 * integer weights, integer rewards in [-10, 10]. */
static uint64_t lcg_state;
static int lcg(int range)
{
    lcg_state = lcg_state * 6364136223846793005ULL + 1442695040888963407ULL;
    return (int)((lcg_state >> 33) % (uint64_t)range);
}

static bc_model *random_model(int n, int64_t gn, int64_t gd, uint64_t seed)
{
    const int n_act = 3, n_succ = 3;
    lcg_state = seed;
    bc_model *m = bc_model_alloc(n, n_act, (int64_t)(n - 1) * n_act, (int64_t)(n - 1) * n_act * n_succ);
    if (!m)
        return NULL;
    m->discount = (double)gn / (double)gd;
    m->discount_exact = (bc_num){gn, gd};
    m->terminal[n - 1] = 1;
    int64_t p = 0, k = 0;
    for (int s = 0; s < n; s++) {
        m->state_pair_start[s] = p;
        m->initial[s] = s == 0 ? 1.0 : 0.0;
        m->initial_exact[s] = (bc_num){s == 0, 1};
        if (m->terminal[s])
            continue;
        for (int a = 0; a < n_act; a++, p++) {
            m->pair_state[p] = s;
            m->pair_action[p] = a;
            m->reward[p] = lcg(21) - 10;
            bc_model_set_reward_exact(m, p, bc_num_int((int64_t)m->reward[p]));
            m->pair_trans_start[p] = k;
            int w[3], sum = 0;
            for (int j = 0; j < n_succ; j++)
                sum += w[j] = 1 + lcg(9);
            for (int j = 0; j < n_succ; j++, k++) {
                m->succ_state[k] = lcg(n);
                m->prob[k] = (double)w[j] / sum;
                bc_model_set_prob_exact(m, k, (bc_num){w[j], sum}); /* not reduced; solvers read prob */
            }
        }
    }
    m->state_pair_start[n] = p;
    m->pair_trans_start[p] = k;
    return m;
}

static double max_abs_diff(const double *a, const double *b, int n)
{
    double d = 0;
    for (int i = 0; i < n; i++)
        d = fabs(a[i] - b[i]) > d ? fabs(a[i] - b[i]) : d;
    return d;
}

/* ------------------------------------------------------------------------ */
/* The checks                                                               */
/* ------------------------------------------------------------------------ */

/* Puterman, Markov Decision Processes (1994): the two-state example of
 * section 3.1 (figure 3.1.1) solved with discount 0.95 in chapter 6
 * (from memory).  s1: a11 reward 5 -> s1 1/2, s2 1/2; a12 reward 10 -> s2.
 * s2: a21 reward -1 -> s2.  By hand: v(s2) = -1/(1 - 0.95) = -20;
 * a11 gives v = 5 + 0.95 (v/2 - 10), v = -4.5/0.525 = -60/7 = -8.571...;
 * a12 gives 10 - 19 = -9 < -60/7, so a11 is optimal. */
static bc_model *puterman_model(void)
{
    static const char *const st[] = {"s1", "s2"};
    static const char *const ac[] = {"a11", "a12", "a21"};
    static const pair_spec pairs[] = {
        {0, 0, 5, 1, 2, {0, 1}, {1, 1}, {2, 2}},
        {0, 1, 10, 1, 1, {1}, {1}, {1}},
        {1, 2, -1, 1, 1, {1}, {1}, {1}},
    };
    model_spec sp = {st, 2, ac, 3, "00", pairs, 3, 19, 20, BC_MAX, 0};
    return make_model(&sp);
}

static void test_puterman_two_state(void)
{
    bc_model *m = puterman_model();
    CHECK(m && !bc_model_check_invariants(m), "puterman: model built");
    const double exact[2] = {-60.0 / 7.0, -20.0};
    const bc_method methods[3] = {BC_METHOD_VI, BC_METHOD_PI, BC_METHOD_LP};
    bc_solve_opts o;
    bc_solve_opts_default(&o);
    for (int i = 0; i < 3; i++) {
        bc_solution sol;
        char name[96];
        bc_solve_status st_ = bc_solve(m, methods[i], &o, &sol);
        const char *mn = bc_method_name(methods[i]);
        snprintf(name, sizeof name, "puterman %s: status ok", mn);
        CHECK(st_ == BC_SOLVE_OK && sol.status == BC_SOLVE_OK, name);
        snprintf(name, sizeof name, "puterman %s: v(s1) = -60/7", mn);
        CHECK_NEAR(sol.values[0], exact[0], 1e-8, name);
        snprintf(name, sizeof name, "puterman %s: v(s2) = -20", mn);
        CHECK_NEAR(sol.values[1], exact[1], 1e-8, name);
        snprintf(name, sizeof name, "puterman %s: bound proven, <= 1e-8, contains the exact value", mn);
        CHECK(sol.bound >= 0 && sol.bound <= 1e-8 && max_abs_diff(sol.values, exact, 2) <= sol.bound,
              name);
        snprintf(name, sizeof name, "puterman %s: policy s1 -> a11", mn);
        CHECK(sol.policy[0] == 0 && sol.policy[1] == 2, name);
        snprintf(name, sizeof name, "puterman %s: value at the uniform initial distribution", mn);
        CHECK_NEAR(sol.value_initial, (exact[0] + exact[1]) / 2, 1e-8, name);
        bc_solution_free(&sol);
    }
    bc_model_free(m);
}

/* A tiny cost model (objective min), by hand (common practice: shortest
 * expected cost).  x: direct cost 5 -> T; cheap cost 1 -> y.  y: fin cost 1
 * -> T.  Discount 9/10: V(y) = 1, V(x) = min(5, 1 + 0.9 * 1) = 1.9 (cheap). */
static void test_min_objective(void)
{
    static const char *const st[] = {"x", "y", "T"};
    static const char *const ac[] = {"direct", "cheap", "fin"};
    static const pair_spec pairs[] = {
        {0, 0, 5, 1, 1, {2}, {1}, {1}},
        {0, 1, 1, 1, 1, {1}, {1}, {1}},
        {1, 2, 1, 1, 1, {2}, {1}, {1}},
    };
    model_spec sp = {st, 3, ac, 3, "001", pairs, 3, 9, 10, BC_MIN, 0};
    bc_model *m = make_model(&sp);
    CHECK(m && !bc_model_check_invariants(m), "min: model built");
    const bc_method methods[3] = {BC_METHOD_VI, BC_METHOD_PI, BC_METHOD_LP};
    for (int i = 0; i < 3; i++) {
        bc_solution sol;
        char name[96];
        const char *mn = bc_method_name(methods[i]);
        bc_solve(m, methods[i], NULL, &sol);
        snprintf(name, sizeof name, "min %s: status ok", mn);
        CHECK(sol.status == BC_SOLVE_OK, name);
        snprintf(name, sizeof name, "min %s: V(x) = 1.9 in the model's sign", mn);
        CHECK_NEAR(sol.values[0], 1.9, 1e-8, name);
        snprintf(name, sizeof name, "min %s: V(y) = 1, V(T) = +0", mn);
        CHECK(fabs(sol.values[1] - 1.0) <= 1e-8 && sol.values[2] == 0.0 && !signbit(sol.values[2]),
              name);
        snprintf(name, sizeof name, "min %s: x takes the cheap action; T has no pair", mn);
        CHECK(sol.policy[0] == 1 && sol.policy[1] == 2 && sol.policy[2] == -1, name);
        bc_solution_free(&sol);
    }
    bc_model_free(m);
}

/* Discount 1 with a zero-reward self-loop that is not optimal (by hand).
 * a: stay 0 -> a; go +1 -> b; hop 0 -> c.  b: wait 0 -> b; fin +2 -> T.
 * c: wait 0 -> c; fin +10 -> T 1/2, c 1/2.  Total reward to T:
 * V(b) = 2, V(c) = 10 + V(c)/2 = 20, V(a) = max(V(a) [stay], 3, 20) = 20.
 * "stay" and "wait" tie with the optimum forever (Q = V), so a method that
 * follows ties into the loop never terminates: the policy must not. */
static void test_discount_one_zero_loop(void)
{
    static const char *const st[] = {"a", "b", "c", "T"};
    static const char *const ac[] = {"stay", "go", "hop", "wait", "fin"};
    static const pair_spec pairs[] = {
        {0, 0, 0, 1, 1, {0}, {1}, {1}},
        {0, 1, 1, 1, 1, {1}, {1}, {1}},
        {0, 2, 0, 1, 1, {2}, {1}, {1}},
        {1, 3, 0, 1, 1, {1}, {1}, {1}},
        {1, 4, 2, 1, 1, {3}, {1}, {1}},
        {2, 3, 0, 1, 1, {2}, {1}, {1}},
        {2, 4, 10, 1, 2, {3, 2}, {1, 1}, {2, 2}},
    };
    model_spec sp = {st, 4, ac, 5, "0001", pairs, 7, 1, 1, BC_MAX, 0};
    bc_model *m = make_model(&sp);
    CHECK(m && !bc_model_check_invariants(m), "zero loop: model built");
    const double exact[4] = {20, 2, 20, 0};
    const bc_method methods[3] = {BC_METHOD_VI, BC_METHOD_PI, BC_METHOD_LP};
    for (int i = 0; i < 3; i++) {
        bc_solution sol;
        char name[96];
        const char *mn = bc_method_name(methods[i]);
        bc_solve(m, methods[i], NULL, &sol);
        snprintf(name, sizeof name, "zero loop %s: status ok", mn);
        CHECK(sol.status == BC_SOLVE_OK, name);
        snprintf(name, sizeof name, "zero loop %s: values 20, 2, 20, 0", mn);
        CHECK(max_abs_diff(sol.values, exact, 4) <= 1e-8, name);
        snprintf(name, sizeof name, "zero loop %s: policy a hop, b fin, c fin (terminates)", mn);
        CHECK(sol.policy[0] == 2 && sol.policy[1] == 4 && sol.policy[2] == 6, name);
        snprintf(name, sizeof name, "zero loop %s: bound proven only by pi", mn);
        CHECK(methods[i] == BC_METHOD_PI ? sol.bound >= 0 && sol.bound <= 1e-8 : sol.bound == -1,
              name);
        bc_solution_free(&sol);
    }
    bc_model_free(m);
}

/* Discount 1, by hand; a policy that never terminates counts as worth minus
 * infinity.  (1) a's only action loops: no policy terminates from a, pi must
 * fail naming a.  (2) a: stay 0 -> a, go -5 -> T: staying forever would
 * collect 0 > -5, but it never terminates, so V*(a) = -5 by go; value
 * iteration from 0 finds the loop's 0 and must fail saying so.  (3) a: stay
 * +1 -> a, go 0 -> T: looping longer always pays more, no policy is optimal:
 * pi and lp must fail. */
static void test_discount_one_cycles(void)
{
    static const char *const st[] = {"b", "a", "T"};
    static const char *const ac[] = {"stay", "go"};
    static const pair_spec only_loop[] = {
        {0, 1, -1, 1, 1, {2}, {1}, {1}},
        {1, 0, -1, 1, 1, {1}, {1}, {1}},
    };
    model_spec sp = {st, 3, ac, 2, "001", only_loop, 2, 1, 1, BC_MAX, 0};
    bc_model *m = make_model(&sp);
    bc_solution sol;
    bc_solve(m, BC_METHOD_PI, NULL, &sol);
    CHECK(sol.status == BC_SOLVE_FAILED && strstr(sol.message, "state a"),
          "discount 1, no exit: pi fails naming state a");
    bc_solution_free(&sol);
    bc_model_free(m);

    static const pair_spec zero_loop[] = {
        {0, 1, -1, 1, 1, {2}, {1}, {1}},
        {1, 0, 0, 1, 1, {1}, {1}, {1}},
        {1, 1, -5, 1, 1, {2}, {1}, {1}},
    };
    model_spec sp2 = {st, 3, ac, 2, "001", zero_loop, 3, 1, 1, BC_MAX, 0};
    m = make_model(&sp2);
    bc_solve(m, BC_METHOD_PI, NULL, &sol);
    CHECK(sol.status == BC_SOLVE_OK && fabs(sol.values[1] + 5) < 1e-12 && sol.policy[1] == 2,
          "discount 1, zero loop beats going: pi keeps the terminating go, V(a) = -5");
    bc_solution_free(&sol);
    bc_solve(m, BC_METHOD_LP, NULL, &sol);
    CHECK(sol.status == BC_SOLVE_OK && fabs(sol.values[1] + 5) < 1e-9 && sol.policy[1] == 2,
          "discount 1, zero loop beats going: lp gives V(a) = -5 with go");
    bc_solution_free(&sol);
    bc_solve(m, BC_METHOD_VI, NULL, &sol);
    CHECK(sol.status == BC_SOLVE_FAILED && strstr(sol.message, "state a"),
          "discount 1, zero loop beats going: vi fails naming state a");
    bc_solution_free(&sol);
    bc_model_free(m);

    static const pair_spec paying_loop[] = {
        {0, 1, -1, 1, 1, {2}, {1}, {1}},
        {1, 0, 1, 1, 1, {1}, {1}, {1}},
        {1, 1, 0, 1, 1, {2}, {1}, {1}},
    };
    model_spec sp3 = {st, 3, ac, 2, "001", paying_loop, 3, 1, 1, BC_MAX, 0};
    m = make_model(&sp3);
    bc_solve(m, BC_METHOD_PI, NULL, &sol);
    CHECK(sol.status == BC_SOLVE_FAILED && strstr(sol.message, "state a"),
          "discount 1, paying loop: pi fails naming state a");
    bc_solution_free(&sol);
    bc_solve(m, BC_METHOD_LP, NULL, &sol);
    CHECK(sol.status == BC_SOLVE_FAILED && strstr(sol.message, "feasible"),
          "discount 1, paying loop: lp fails (infeasible)");
    bc_solution_free(&sol);
    bc_model_free(m);
}

/* Discount 1, slow termination, by hand: a: wait +1 -> a 99/100, T 1/100.
 * V(a) = 1 / (1/100) = 100; the expected number of steps is 100, so a value
 * iteration stopped on a residual below tol alone would be off by about
 * 100 tol.  (Regression: vi once stopped on the residual.) */
static void test_discount_one_slow(void)
{
    static const char *const st[] = {"a", "T"};
    static const char *const ac[] = {"wait"};
    static const pair_spec pairs[] = {
        {0, 0, 1, 1, 2, {0, 1}, {99, 1}, {100, 100}},
    };
    model_spec sp = {st, 2, ac, 1, "01", pairs, 1, 1, 1, BC_MAX, 0};
    bc_model *m = make_model(&sp);
    bc_solution sol;
    bc_solve(m, BC_METHOD_VI, NULL, &sol);
    CHECK(sol.status == BC_SOLVE_OK && fabs(sol.values[0] - 100.0) <= 2e-9,
          "discount 1, slow exit: vi V(a) = 100 within 2 tol");
    bc_solution_free(&sol);
    bc_solve(m, BC_METHOD_PI, NULL, &sol);
    CHECK(sol.status == BC_SOLVE_OK && fabs(sol.values[0] - 100.0) <= sol.bound &&
              sol.bound < 1e-10,
          "discount 1, slow exit: pi V(a) = 100 within its bound (residual * 100 steps)");
    bc_solution_free(&sol);
    bc_model_free(m);
}

/* Finite horizon H = 2, discount 1, by hand.  x: a +1 -> x; b 0 -> y.
 * y: c +3 -> y 1/2, x 1/2.  V_2 = 0; V_1(x) = max(1, 0) = 1 (a), V_1(y) = 3;
 * V_0(x) = max(1 + 1, 0 + 3) = 3 (b), V_0(y) = 3 + 3/2 + 1/2 = 5. */
static void test_backward(void)
{
    static const char *const st[] = {"x", "y", "T"};
    static const char *const ac[] = {"a", "b", "c"};
    static const pair_spec pairs[] = {
        {0, 0, 1, 1, 1, {0}, {1}, {1}},
        {0, 1, 0, 1, 1, {1}, {1}, {1}},
        {1, 2, 3, 1, 2, {1, 0}, {1, 1}, {2, 2}},
    };
    model_spec sp = {st, 3, ac, 3, "001", pairs, 3, 1, 1, BC_MAX, 2};
    bc_model *m = make_model(&sp);
    CHECK(bc_solve_auto_method(m) == BC_METHOD_BACKWARD, "horizon: auto picks backward");
    bc_solution sol;
    bc_solve(m, BC_METHOD_AUTO, NULL, &sol);
    CHECK(sol.status == BC_SOLVE_OK && sol.method == BC_METHOD_BACKWARD, "horizon: solved");
    CHECK_NEAR(sol.values[0], 3.0, 1e-12, "horizon: V_0(x) = 3");
    CHECK_NEAR(sol.values[1], 5.0, 1e-12, "horizon: V_0(y) = 5");
    CHECK(sol.stage_policy && sol.stage_policy[0] == 1 && sol.stage_policy[3 + 0] == 0 &&
              sol.stage_policy[1] == 2 && sol.stage_policy[2] == -1 && sol.stage_policy[5] == -1,
          "horizon: stage 0 x takes b, stage 1 x takes a, T has none");
    CHECK(sol.policy[0] == 1, "horizon: policy is stage 0");
    CHECK(sol.bound >= 0 && sol.bound < 1e-13, "horizon: bound is a rounding allowance");
    bc_solution_free(&sol);
    bc_solve(m, BC_METHOD_VI, NULL, &sol);
    CHECK(sol.status == BC_SOLVE_FAILED, "horizon: vi refuses a finite-horizon model");
    bc_solution_free(&sol);
    m->objective = BC_MIN; /* costs: V_1(x) = 0 (b), V_1(y) = 3; V_0(x) = min(1+0, 0+3) = 1 */
    bc_solve(m, BC_METHOD_BACKWARD, NULL, &sol);
    CHECK(fabs(sol.values[0] - 1.0) < 1e-12 && sol.stage_policy[0] == 0 && sol.stage_policy[3] == 1,
          "horizon min: V_0(x) = 1, stage 0 a, stage 1 b");
    bc_solution_free(&sol);
    bc_model_free(m);
}

/* On random models the three methods must agree within their proven
 * bounds (common practice: cross-checking independent solvers); vi's bound
 * must be at most tol, or at most floor_ when rounding alone (about
 * 4 ulps * max|V| / (1-g), see vi.c) exceeds tol, which the message must
 * then say; a sweep limit gives NOT_CONVERGED with a bound that still holds. */
static void test_agreement(int64_t gn, int64_t gd, double floor_, const char *label)
{
    bc_model *m = random_model(300, gn, gd, 12345);
    char name[128];
    snprintf(name, sizeof name, "random %s: model built", label);
    CHECK(m && !bc_model_check_invariants(m), name);
    bc_solve_opts o;
    bc_solve_opts_default(&o);
    bc_solution vi, pi, lp, cut;
    bc_solve(m, BC_METHOD_VI, &o, &vi);
    bc_solve(m, BC_METHOD_PI, &o, &pi);
    bc_solve(m, BC_METHOD_LP, &o, &lp);
    snprintf(name, sizeof name, "random %s: all ok", label);
    CHECK(vi.status == BC_SOLVE_OK && pi.status == BC_SOLVE_OK && lp.status == BC_SOLVE_OK, name);
    snprintf(name, sizeof name, "random %s: vi bound <= max(tol, rounding floor)", label);
    CHECK(vi.bound >= 0 && vi.bound <= floor_ && (vi.bound <= o.tol || strstr(vi.message, "below")),
          name);
    snprintf(name, sizeof name, "random %s: vi and pi agree within their bounds", label);
    CHECK(max_abs_diff(vi.values, pi.values, m->n_states) <= vi.bound + pi.bound, name);
    snprintf(name, sizeof name, "random %s: lp and pi agree within their bounds", label);
    CHECK(lp.bound >= 0 && max_abs_diff(lp.values, pi.values, m->n_states) <= lp.bound + pi.bound,
          name);
    snprintf(name, sizeof name, "random %s: vi and pi choose the same policy", label);
    CHECK(memcmp(vi.policy, pi.policy, (size_t)m->n_states * sizeof *vi.policy) == 0, name);
    o.max_iter = 3;
    bc_solve(m, BC_METHOD_VI, &o, &cut);
    snprintf(name, sizeof name, "random %s: vi after 3 sweeps: not converged, bound still holds", label);
    CHECK(cut.status == BC_SOLVE_NOT_CONVERGED && cut.iterations == 3 && cut.bound > o.tol &&
              max_abs_diff(cut.values, pi.values, m->n_states) <= cut.bound + pi.bound,
          name);
    bc_solution_free(&vi), bc_solution_free(&pi), bc_solution_free(&lp), bc_solution_free(&cut);
    bc_model_free(m);
}

/* The convergence history and the stop request, on Puterman's two-state
 * model (above).  First two Jacobi sweeps from v = 0, by hand: Tv = (max(5,
 * 10), -1) = (10, -1), largest change 10; then s1: max(5 + 0.95 (10 - 1)/2,
 * 10 - 0.95) = 9.275, s2: -1.95, largest change 0.95.  The MacQueen-Porteus
 * half-width after sweep 1 is g/(1-g) (10 - (-1))/2 = 19 * 5.5 = 104.5 (plus
 * a rounding allowance far below 1e-9). */
static void test_trace_and_stop(void)
{
    bc_model *m = puterman_model();
    const double exact[2] = {-60.0 / 7.0, -20.0};
    bc_solve_opts o;
    bc_solve_opts_default(&o);
    bc_solution sol;
    bc_solve(m, BC_METHOD_VI, &o, &sol);
    CHECK(sol.n_trace == sol.iterations && sol.n_trace >= 2 && sol.trace[0].method == BC_METHOD_VI,
          "trace: one point per sweep");
    CHECK(sol.trace[0].iteration == 1 && sol.trace[0].residual == 10.0 &&
              sol.trace[1].iteration == 2 && fabs(sol.trace[1].residual - 0.95) < 1e-12,
          "trace: residuals of the first two sweeps as by hand");
    CHECK(sol.trace[0].bound >= 104.5 && sol.trace[0].bound <= 104.5 + 1e-9,
          "trace: first proven bound is the MacQueen-Porteus half-width 104.5");
    CHECK(sol.trace[sol.n_trace - 1].bound == sol.bound &&
              sol.trace[sol.n_trace - 1].iteration == sol.iterations,
          "trace: the last point is the answer's bound");
    bc_solution_free(&sol);

    bc_solve(m, BC_METHOD_PI, &o, &sol);
    CHECK(sol.n_trace == sol.iterations && sol.n_trace >= 1 && sol.trace[0].method == BC_METHOD_PI &&
              sol.trace[sol.n_trace - 1].bound == sol.bound,
          "trace: policy iteration records one point per evaluation");
    bc_solution_free(&sol);

    bc_stop_request();
    bc_solve_status s1 = bc_solve(m, BC_METHOD_VI, &o, &sol);
    CHECK(s1 == BC_SOLVE_INTERRUPTED && sol.iterations == 1 && sol.bound >= 104.5 &&
              max_abs_diff(sol.values, exact, 2) <= sol.bound,
          "stop: value iteration stops after one sweep, its bound holds");
    bc_solution_free(&sol);
    bc_solve_status s2 = bc_solve(m, BC_METHOD_PI, &o, &sol);
    CHECK((s2 == BC_SOLVE_INTERRUPTED || s2 == BC_SOLVE_OK) && sol.iterations == 1 &&
              sol.bound >= 0 && max_abs_diff(sol.values, exact, 2) <= sol.bound,
          "stop: policy iteration stops after one evaluation, its bound holds");
    bc_solution_free(&sol);
    bc_stop_clear();
    CHECK(bc_solve(m, BC_METHOD_VI, &o, &sol) == BC_SOLVE_OK && !bc_stop_requested(),
          "stop: cleared, the next solve runs to the end");
    bc_solution_free(&sol);
    bc_model_free(m);

    /* Thinning: 10,000 recorded iterations keep at most BC_SV_TRACE_MAX
     * points, the first and last among them, in increasing order. */
    bc_solution_init(&sol);
    for (int64_t i = 1; i <= 10000; i++)
        bc_sv_trace(&sol, BC_METHOD_VI, i, 1.0 / (double)i, -1.0);
    bc_sv_trace_last(&sol, BC_METHOD_VI, 10000, 1e-4, 0.5);
    int ordered = 1;
    for (int64_t i = 1; i < sol.n_trace; i++)
        ordered &= sol.trace[i].iteration > sol.trace[i - 1].iteration &&
                   sol.trace[i].residual == 1.0 / (double)sol.trace[i].iteration;
    CHECK(sol.n_trace <= BC_SV_TRACE_MAX && sol.n_trace >= BC_SV_TRACE_MAX / 4 && ordered &&
              sol.trace[0].iteration == 1 && sol.trace[sol.n_trace - 1].iteration == 10000 &&
              sol.trace[sol.n_trace - 1].bound == 0.5,
          "trace: a long run is thinned evenly and keeps its ends");
    bc_solution_free(&sol);
}

static void test_names_and_auto(void)
{
    bc_method mt;
    CHECK(bc_method_parse("pi", &mt) == 0 && mt == BC_METHOD_PI &&
              strcmp(bc_method_name(BC_METHOD_LP), "lp") == 0 && bc_method_parse("simplex", &mt) == -1,
          "method names parse and print");
    bc_solve_opts o;
    bc_solve_opts_default(&o);
    CHECK(o.tol == 1e-9 && o.max_iter == 0, "default options");
    bc_model *m = random_model(10, 1, 2, 7);
    CHECK(bc_solve_auto_method(m) == BC_METHOD_PI, "auto: small model -> pi");
    bc_model_free(m);
}

int main(void)
{
    test_puterman_two_state();
    test_min_objective();
    test_discount_one_zero_loop();
    test_discount_one_cycles();
    test_discount_one_slow();
    test_backward();
    test_agreement(9, 10, 1e-9, "g=0.9");
    test_agreement(999, 1000, 1e-8, "g=0.999");
    test_names_and_auto();
    test_trace_and_stop();
    UNIT_DONE();
}
