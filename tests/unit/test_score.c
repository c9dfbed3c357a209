/* test_score.c — unit tests of scoring (bc_score_compute): published values, a numpy reference, traps and ties worked by hand. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#include <stdint.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "bellcheck.h"
#include "unit.h"

#define REF_TOOL "/usr/bin/python3 tests/tools/score_ref.py"

static bc_model *read_model(const char *path)
{
    bc_diag d;
    bc_diag_init(&d);
    bc_model *m = bc_read_model(path, &d);
    if (!m)
        bc_diag_print(&d, stdout);
    bc_diag_free(&d);
    return m;
}

static int32_t state_of(const bc_model *m, const char *name)
{
    return bc_names_find(m->state_names, name, strlen(name));
}

static int64_t pair_of(const bc_model *m, const char *state, const char *action)
{
    int32_t a = bc_names_find(m->action_names, action, strlen(action));
    return bc_model_find_pair(m, state_of(m, state), a);
}

static double value_at(const bc_model *m, const bc_score *sc, const char *state)
{
    return sc->values[state_of(m, state)];
}

/* ------------------------------------------------------------------------ */
/* Published values: the equiprobable random policy                         */
/* ------------------------------------------------------------------------ */

/* Every action with the same probability in every non-terminal state. */
static bc_policy *equiprobable(const bc_model *m)
{
    bc_policy *p = bc_policy_alloc(m);
    if (!p)
        return NULL;
    for (int32_t s = 0; s < m->n_states; s++) {
        int64_t a = m->state_pair_start[s], b = m->state_pair_start[s + 1];
        for (int64_t k = a; k < b; k++)
            p->prob[k] = 1.0 / (double)(b - a);
    }
    p->deterministic = 0;
    return p;
}

/* Sutton & Barto, Reinforcement Learning: An Introduction, 2nd ed. (2018),
 * Figure 4.1 (Example 4.1): values of the equiprobable random policy on the
 * 4x4 gridworld, discount 1, row by row (from memory; the book rounds). */
static void test_sutton_barto_4_1(void)
{
    static const double book[16] = {0,   -14, -20, -22, -14, -18, -20, -20,
                                    -20, -20, -18, -14, -22, -20, -14, 0};
    bc_model *m = read_model("models/sutton-barto-4.1-gridworld.bell");
    CHECK(m != NULL, "S&B 4.1: model read");
    if (!m)
        return;
    bc_policy *p = equiprobable(m);
    bc_score sc;
    CHECK(p && bc_score_compute(m, NULL, p, NULL, &sc) == 0, "S&B 4.1: scored");
    double worst = 0;
    for (int32_t s = 0; s < 16; s++)
        worst = fmax(worst, fabs(sc.values[s] - book[s]));
    CHECK(worst <= 0.5, "S&B 4.1: random-policy values within 0.5 of Figure 4.1 (Sutton & Barto 2018, from memory)");
    CHECK(sc.n_traps == 0, "S&B 4.1: the random policy has no trap (it terminates with probability 1)");
    CHECK_NEAR(sc.reach_probability, 1.0, 1e-12, "S&B 4.1: reach probability 1");
    /* By hand (common practice: with reward -1 per move the optimal value is
     * minus the number of moves to the nearest corner; those distances sum
     * to 28 over the 14 non-terminal states, the book's random values to
     * -256).  The model's initial distribution is uniform over them. */
    CHECK_NEAR(sc.optimal_initial, -28.0 / 14.0, 1e-9, "S&B 4.1: V*(initial) = -28/14 (by hand)");
    CHECK_NEAR(sc.regret_initial, (256.0 - 28.0) / 14.0, 0.5,
               "S&B 4.1: regret at initial = (256 - 28)/14 (Figure 4.1 values, by hand)");
    /* By hand: only at r1c2 and r2c1 do all four moves lead one step closer
     * to a corner (every neighbour is 2 moves away); 12 states are wrong. */
    CHECK_NEAR(sc.agreement_states, 2.0 / 14.0, 1e-15, "S&B 4.1: agreement 2/14 (by hand)");
    CHECK(sc.n_wrong == 12, "S&B 4.1: 12 states act suboptimally (by hand)");
    CHECK(sc.has_q == 0 && isnan(sc.residual), "S&B 4.1: no Q statistics for a policy");
    CHECK(sc.eval_bound >= 0 && sc.eval_bound < 1e-9, "S&B 4.1: evaluation bound proven and small");
    bc_score_free(&sc);
    bc_policy_free(p);
    bc_model_free(m);
}

/* Sutton & Barto (2018), Figure 3.2 (Example 3.5): the equiprobable random
 * policy on the 5x5 gridworld with discount 0.9 (from memory). */
static void test_sutton_barto_3_5(void)
{
    static const double row0[5] = {3.3, 8.8, 4.4, 5.3, 1.5};
    static const char *const names[5] = {"r0c0", "r0c1", "r0c2", "r0c3", "r0c4"};
    bc_model *m = read_model("models/sutton-barto-3.5-gridworld.bell");
    CHECK(m != NULL, "S&B 3.5: model read");
    if (!m)
        return;
    bc_policy *p = equiprobable(m);
    bc_score sc;
    CHECK(p && bc_score_compute(m, NULL, p, NULL, &sc) == 0, "S&B 3.5: scored");
    for (int i = 0; i < 5; i++) {
        char name[120];
        snprintf(name, sizeof name,
                 "S&B 3.5: random policy V(%s) = %.1f (Sutton & Barto 2018, Figure 3.2, from memory)",
                 names[i], row0[i]);
        CHECK_NEAR(value_at(m, &sc, names[i]), row0[i], 0.1, name);
    }
    CHECK(sc.n_traps == 0 && isnan(sc.reach_probability),
          "S&B 3.5: no traps and no reach probability under discount 0.9");
    bc_score_free(&sc);
    bc_policy_free(p);
    bc_model_free(m);
}

/* ------------------------------------------------------------------------ */
/* Against the independent numpy reference (tests/tools/score_ref.py)       */
/* ------------------------------------------------------------------------ */

#define REF_MAX_STATES 320
#define REF_MAX_PAIRS 1024

typedef struct {
    double optimal_initial, value_initial, regret_initial, regret_max_state;
    double agreement_states, agreement_weighted, residual, q_error, regret_bound;
    int n_tied, n_wrong;
    char worst_state[64];
    int n;
    char state[REF_MAX_STATES][64];
    double value[REF_MAX_STATES], regret[REF_MAX_STATES];
    double qstar[REF_MAX_PAIRS];
} ref_result;

static double *ref_field(ref_result *r, const char *key)
{
    static const char *const keys[] = {"optimal_initial", "value_initial", "regret_initial",
                                       "regret_max_state", "agreement_states",
                                       "agreement_weighted", "residual", "q_error", "regret_bound"};
    double *slots[] = {&r->optimal_initial, &r->value_initial, &r->regret_initial,
                       &r->regret_max_state, &r->agreement_states, &r->agreement_weighted,
                       &r->residual, &r->q_error, &r->regret_bound};
    for (size_t i = 0; i < sizeof keys / sizeof keys[0]; i++)
        if (strcmp(key, keys[i]) == 0)
            return slots[i];
    return NULL;
}

/* Runs the reference; qstar lines land in r->qstar by pair of m.  0 or -1. */
static int run_ref(const bc_model *m, const char *model, const char *args, ref_result *r)
{
    char cmd[512], line[512], key[64], a1[64], a2[64];
    memset(r, 0, sizeof *r);
    r->residual = r->q_error = r->regret_bound = NAN;
    snprintf(cmd, sizeof cmd, REF_TOOL " %s %s 2>/dev/null", model, args);
    FILE *f = popen(cmd, "r");
    if (!f)
        return -1;
    while (fgets(line, sizeof line, f)) {
        double x;
        if (sscanf(line, "%63s", key) != 1)
            continue;
        if (!strcmp(key, "qstar") && sscanf(line, "qstar %63s %63s %lf", a1, a2, &x) == 3) {
            int64_t p = pair_of(m, a1, a2);
            if (p >= 0 && p < REF_MAX_PAIRS)
                r->qstar[p] = x;
        } else if (!strcmp(key, "value") && sscanf(line, "value %63s %lf", a1, &x) == 2 &&
                   r->n < REF_MAX_STATES) {
            snprintf(r->state[r->n], sizeof r->state[0], "%s", a1);
            r->value[r->n++] = x;
        } else if (!strcmp(key, "regret") && sscanf(line, "regret %63s %lf", a1, &x) == 2 &&
                   r->n > 0) {
            r->regret[r->n - 1] = x;
        } else if (!strcmp(key, "worst_state")) {
            sscanf(line, "worst_state %63s", r->worst_state);
        } else if (!strcmp(key, "n_tied")) {
            sscanf(line, "n_tied %d", &r->n_tied);
        } else if (!strcmp(key, "n_wrong")) {
            sscanf(line, "n_wrong %d", &r->n_wrong);
        } else if (ref_field(r, key) && sscanf(line, "%*s %lf", &x) == 1) {
            *ref_field(r, key) = x;
        }
    }
    return pclose(f) == 0 ? 0 : -1;
}

/* Writes `state,action,value` lines of the pairs of covered states. */
static int write_csv(const bc_model *m, const double *val, const uint8_t *present, char *path)
{
    strcpy(path, "/tmp/bc-test-score-XXXXXX");
    int fd = mkstemp(path);
    FILE *f = fd >= 0 ? fdopen(fd, "w") : NULL;
    if (!f)
        return -1;
    for (int64_t p = 0; p < m->n_pairs; p++)
        if (present[m->pair_state[p]])
            fprintf(f, "%s,%s,%.17g\n", bc_names_get(m->state_names, m->pair_state[p]),
                    bc_names_get(m->action_names, m->pair_action[p]), val[p]);
    return fclose(f) == 0 ? 0 : -1;
}

/* Same number, both NAN, or both the same infinity. */
static int same(double a, double b, double tol)
{
    if (isnan(a) || isnan(b))
        return isnan(a) && isnan(b);
    if (isinf(a) || isinf(b))
        return a == b;
    return fabs(a - b) <= tol * fmax(1.0, fabs(b));
}

/* Compares every figure of sc with the reference r; tag names the case. */
static void check_against_ref(const bc_model *m, const bc_score *sc, const ref_result *r,
                              const char *tag, int has_q)
{
    char name[200];
#define REF_CHECK(cond, what)                                                                  \
    do {                                                                                       \
        snprintf(name, sizeof name, "%s: %s matches score_ref.py (numpy reference)", tag, what); \
        CHECK(cond, name);                                                                     \
    } while (0)
    REF_CHECK(r->n == m->n_states, "the reference ran and listed every state");
    REF_CHECK(same(sc->optimal_initial, r->optimal_initial, 1e-9), "V*(initial)");
    REF_CHECK(same(sc->value_initial, r->value_initial, 1e-9), "V(initial)");
    REF_CHECK(same(sc->regret_initial, r->regret_initial, 1e-8) ||
                  (fabs(r->regret_initial) < 1e-9 && sc->regret_initial == 0.0),
              "regret at initial");
    REF_CHECK(same(sc->regret_max_state, r->regret_max_state, 1e-8), "largest state regret");
    REF_CHECK(sc->n_tied == r->n_tied, "tied states");
    REF_CHECK(sc->n_wrong == r->n_wrong, "wrong states");
    REF_CHECK(same(sc->agreement_states, r->agreement_states, 1e-12), "agreement");
    REF_CHECK(same(sc->agreement_weighted, r->agreement_weighted, 1e-9), "weighted agreement");
    double dv = 0.0, dr = 0.0;
    for (int i = 0; i < r->n; i++) {
        int32_t s = state_of(m, r->state[i]);
        dv = s < 0 ? INFINITY : fmax(dv, fabs(sc->values[s] - r->value[i]));
        if (s >= 0 && !(isnan(sc->state_regret[s]) && isnan(r->regret[i])))
            dr = fmax(dr, fabs(sc->state_regret[s] - fmax(0.0, r->regret[i])));
    }
    REF_CHECK(dv <= 1e-8, "every state's value");
    REF_CHECK(sc->eval_bound >= 0 && dv <= sc->eval_bound + 1e-12 * fmax(1.0, fabs(r->value_initial)),
              "values within the proven evaluation bound (+1e-12 for the reference's rounding)");
    REF_CHECK(dr <= 1e-8, "every state's regret (NAN where not covered)");
    if (has_q) {
        REF_CHECK(same(sc->residual, r->residual, 1e-9), "Bellman residual");
        REF_CHECK(same(sc->q_error, r->q_error, 1e-9), "max |Q - Q*|");
        REF_CHECK(same(sc->regret_bound, r->regret_bound, 1e-9), "regret bound 2 res/(1-g)");
    }
#undef REF_CHECK
}

/* demo-warehouse-robot (max, 0.95): Q* from the reference, raised at one
 * pair so that dock_b2's greedy action flips from fast_charge to charge. */
static void test_flipped_q(void)
{
    const char *path = "models/demo-warehouse-robot.bell";
    bc_model *m = read_model(path);
    ref_result qs, r;
    CHECK(m && m->n_pairs <= REF_MAX_PAIRS && run_ref(m, path, "--qstar", &qs) == 0,
          "flip: model read, Q* from score_ref.py");
    if (!m)
        return;
    bc_qtable *q = bc_qtable_alloc(m);
    memcpy(q->q, qs.qstar, (size_t)m->n_pairs * sizeof *q->q);
    int64_t charge = pair_of(m, "dock_b2", "charge"), fast = pair_of(m, "dock_b2", "fast_charge");
    CHECK(qs.qstar[fast] > qs.qstar[charge] + 1.0, "flip: fast_charge optimal at dock_b2 (reference)");
    q->q[charge] = qs.qstar[fast] + 0.5;
    char csv[64];
    bc_score sc;
    CHECK(write_csv(m, q->q, q->present, csv) == 0, "flip: Q-table written for the reference");
    CHECK(bc_score_compute(m, q, NULL, NULL, &sc) == 0, "flip: scored");
    char args[128];
    snprintf(args, sizeof args, "--q %s", csv);
    CHECK(run_ref(m, path, args, &r) == 0, "flip: reference ran");
    check_against_ref(m, &sc, &r, "flip", 1);
    CHECK(sc.agent_prob[charge] == 1.0 && sc.n_wrong == 1, "flip: greedy takes charge at dock_b2, one wrong state");
    CHECK(strcmp(bc_names_get(m->state_names, sc.worst_state), r.worst_state) == 0,
          "flip: worst state matches score_ref.py");
    CHECK(sc.regret_initial > 0 && sc.regret_max_state <= sc.regret_bound,
          "flip: 0 < regret <= the residual's a-priori bound (Williams & Baird 1993 form)");
    bc_score_free(&sc);

    /* The residual measured under another discount than the scoring one:
     * no a-priori bound applies. */
    bc_score_opts o;
    bc_score_opts_default(&o);
    o.q_discount = 0.9;
    snprintf(args, sizeof args, "--q %s --q-discount 0.9", csv);
    CHECK(bc_score_compute(m, q, NULL, &o, &sc) == 0 && run_ref(m, path, args, &r) == 0,
          "q-discount: scored, reference ran");
    check_against_ref(m, &sc, &r, "q-discount 0.9", 1);
    CHECK(isnan(sc.regret_bound) && sc.discount == 0.95, "q-discount: no bound, scored under 0.95");
    bc_score_free(&sc);
    snprintf(args, sizeof args, "--q %s", csv);

    /* The same table with dock_b2 not covered: it acts optimally and drops
     * out of the statistics; no a-priori bound without every state. */
    q->present[state_of(m, "dock_b2")] = 0;
    unlink(csv);
    CHECK(write_csv(m, q->q, q->present, csv) == 0, "uncovered: Q-table written");
    snprintf(args, sizeof args, "--q %s", csv);
    CHECK(run_ref(m, path, args, &r) == 0, "uncovered: reference ran");
    CHECK(bc_score_compute(m, q, NULL, NULL, &sc) == 0, "uncovered: scored");
    check_against_ref(m, &sc, &r, "uncovered", 1);
    CHECK(isnan(sc.state_regret[state_of(m, "dock_b2")]) && isnan(sc.regret_bound),
          "uncovered: NAN regret at dock_b2, no regret bound");
    CHECK(sc.regret_initial < 1e-9, "uncovered: the optimal action there leaves no regret");
    bc_score_free(&sc);
    unlink(csv);
    bc_qtable_free(q);
    bc_model_free(m);
}

/* A Q-table far from Q*: Q*(p) + amp sin(7p) (an arbitrary fixed pattern),
 * scored under the model's discount or another one; msg_has, if not NULL,
 * must appear in the score's message. */
static void arbitrary_q(const char *path, const char *tag, double amp, double discount,
                        const char *ref_args, const char *msg_has)
{
    bc_model *m = read_model(path);
    ref_result qs, r;
    char args[256], csv[64], name[160];
    snprintf(args, sizeof args, "--qstar %s", ref_args);
    snprintf(name, sizeof name, "%s: model read, Q* from score_ref.py", tag);
    CHECK(m && m->n_pairs <= REF_MAX_PAIRS && run_ref(m, path, args, &qs) == 0, name);
    if (!m)
        return;
    bc_qtable *q = bc_qtable_alloc(m);
    for (int64_t p = 0; p < m->n_pairs; p++)
        q->q[p] = qs.qstar[p] + amp * sin(7.0 * (double)p);
    bc_score_opts o;
    bc_score_opts_default(&o);
    o.discount = discount;
    bc_score sc;
    snprintf(name, sizeof name, "%s: scored", tag);
    CHECK(write_csv(m, q->q, q->present, csv) == 0 && bc_score_compute(m, q, NULL, &o, &sc) == 0,
          name);
    snprintf(args, sizeof args, "--q %s %s", csv, ref_args);
    snprintf(name, sizeof name, "%s: reference ran", tag);
    CHECK(run_ref(m, path, args, &r) == 0, name);
    check_against_ref(m, &sc, &r, tag, 1);
    if (msg_has) {
        snprintf(name, sizeof name, "%s: message says \"%s\"", tag, msg_has);
        CHECK(strstr(sc.message, msg_has) != NULL, name);
    }
    snprintf(name, sizeof name, "%s: the greedy policy is wrong somewhere", tag);
    CHECK(sc.n_wrong > 0 && sc.regret_max_state > 0, name);
    if (sc.discount < 1) {
        snprintf(name, sizeof name, "%s: every state's regret within the residual's bound", tag);
        CHECK(sc.regret_max_state <= sc.regret_bound, name);
    }
    bc_score_free(&sc);
    unlink(csv);
    bc_qtable_free(q);
    bc_model_free(m);
}

/* A random-looking model (Garnet, tests/tools/garnet.py: 300 states, 3
 * actions, 5 successors each, discount 1/2) fills an LU factorisation in
 * badly, so the evaluation iterates instead; the reference still solves
 * densely. */
static void test_iterative(void)
{
    char path[] = "/tmp/bc-test-score-XXXXXX", cmd[256];
    int fd = mkstemp(path);
    if (fd >= 0)
        close(fd);
    snprintf(cmd, sizeof cmd,
             "/usr/bin/python3 tests/tools/garnet.py --states 300 --actions 3 --branch 5 "
             "--discount 0.5 --seed 7 -o %s", path);
    CHECK(fd >= 0 && system(cmd) == 0, "iterative: Garnet model generated");
    arbitrary_q(path, "iterative, Garnet 300", 1, NAN, "", "Gauss-Seidel");
    unlink(path);
}

/* A stochastic policy on queue-admission: admit with probability 0.7. */
static void test_stochastic_policy(void)
{
    const char *path = "models/queue-admission.bell";
    bc_model *m = read_model(path);
    CHECK(m != NULL, "stochastic: model read");
    if (!m)
        return;
    bc_policy *p = bc_policy_alloc(m);
    for (int32_t s = 0; s < m->n_states; s++) {
        int64_t a = m->state_pair_start[s], b = m->state_pair_start[s + 1];
        for (int64_t k = a; k < b; k++)
            p->prob[k] = b - a == 1 ? 1.0 : m->pair_action[k] == 0 ? 0.7 : 0.3;
    }
    p->deterministic = 0;
    char csv[64], args[128];
    ref_result r;
    bc_score sc;
    CHECK(write_csv(m, p->prob, p->present, csv) == 0 && bc_score_compute(m, NULL, p, NULL, &sc) == 0,
          "stochastic: scored");
    snprintf(args, sizeof args, "--policy %s", csv);
    CHECK(run_ref(m, path, args, &r) == 0, "stochastic: reference ran");
    check_against_ref(m, &sc, &r, "stochastic", 0);
    bc_score_free(&sc);
    unlink(csv);
    bc_policy_free(p);
    bc_model_free(m);
}

/* ------------------------------------------------------------------------ */
/* Traps and ties, worked by hand on the 4x4 gridworld of Example 4.1        */
/* ------------------------------------------------------------------------ */

/* Moves to the nearest corner (0,0) or (3,3): the optimal number of steps
 * (common practice: each move costs 1, shortest paths). */
static int corner_distance(int32_t s)
{
    int i = s / 4, j = s % 4, a = i + j, b = 6 - i - j;
    return a < b ? a : b;
}

/* The state a move leads to (off the grid: stays), computed from the rules
 * of Example 4.1 rather than read from the model. */
static int32_t move_target(int32_t s, const char *action)
{
    int i = s / 4, j = s % 4;
    if (!strcmp(action, "north") && i > 0)
        i--;
    else if (!strcmp(action, "south") && i < 3)
        i++;
    else if (!strcmp(action, "east") && j < 3)
        j++;
    else if (!strcmp(action, "west") && j > 0)
        j--;
    return 4 * i + j;
}

/* A policy that shuttles between r1c1 and r1c2 for ever; r2c2 goes north
 * into the shuttle or south to safety with probability 1/2 each; every other
 * state moves along a shortest path avoiding them.  By hand: traps r1c1,
 * r1c2, r2c2; from the uniform initial distribution over the 14 non-terminal
 * states the agent terminates with probability (11 + 1/2)/14. */
static void test_trap(void)
{
    static const char *const moves[][2] = {
        {"r0c1", "west"},  {"r0c2", "west"},  {"r0c3", "south"}, {"r1c0", "north"},
        {"r1c1", "east"},  {"r1c2", "west"},  {"r1c3", "south"}, {"r2c0", "north"},
        {"r2c1", "west"},  {"r2c3", "south"}, {"r3c0", "north"}, {"r3c1", "east"},
        {"r3c2", "east"},
    };
    bc_model *m = read_model("models/sutton-barto-4.1-gridworld.bell");
    CHECK(m != NULL, "trap: model read");
    if (!m)
        return;
    bc_policy *p = bc_policy_alloc(m);
    for (size_t i = 0; i < sizeof moves / sizeof moves[0]; i++)
        p->prob[pair_of(m, moves[i][0], moves[i][1])] = 1.0;
    p->prob[pair_of(m, "r2c2", "north")] = 0.5;
    p->prob[pair_of(m, "r2c2", "south")] = 0.5;
    p->deterministic = 0;
    bc_score sc;
    CHECK(bc_score_compute(m, NULL, p, NULL, &sc) == 0, "trap: scored");
    int32_t r1c1 = state_of(m, "r1c1"), r1c2 = state_of(m, "r1c2"), r2c2 = state_of(m, "r2c2");
    CHECK(sc.n_traps == 3 && sc.traps[0] == r1c1 && sc.traps[1] == r1c2 && sc.traps[2] == r2c2,
          "trap: traps are r1c1, r1c2, r2c2 (by hand)");
    CHECK(isinf(sc.values[r1c1]) && sc.values[r1c1] < 0 && isinf(sc.values[r2c2]) && sc.values[r2c2] < 0,
          "trap: their value is -inf, not a large number");
    CHECK_NEAR(sc.reach_probability, 11.5 / 14.0, 1e-12, "trap: reach probability (11 + 1/2)/14 (by hand)");
    CHECK(isinf(sc.value_initial) && isinf(sc.regret_initial) && sc.regret_initial > 0,
          "trap: value at initial -inf, regret +inf");
    CHECK(isinf(sc.regret_max_state) && sc.worst_state == r1c1 && sc.by_regret[0] == r1c1 &&
              sc.by_regret[1] == r1c2 && sc.by_regret[2] == r2c2,
          "trap: traps rank first by regret, in state order");
    CHECK_NEAR(value_at(m, &sc, "r0c3"), -3.0, 1e-9, "trap: r0c3 takes 3 moves (by hand)");
    CHECK_NEAR(value_at(m, &sc, "r3c0"), -3.0, 1e-9, "trap: r3c0 takes 3 moves (by hand)");
    CHECK(sc.state_regret[state_of(m, "r3c0")] == 0.0, "trap: a shortest path has regret 0");
    CHECK(sc.n_wrong >= 3 && sc.agreement_states <= 11.0 / 14.0, "trap: traps never count as agreeing");
    bc_score_free(&sc);
    bc_policy_free(p);
    bc_model_free(m);
}

/* Q(s, a) = -1 + V(target), V from corner_distance at discount g (exact:
 * -d at g = 1, -2 (1 - 2^-d) at g = 1/2), then a tie at r1c0 between north
 * (to the corner) and the later west (a wall: stays put). */
static bc_qtable *corner_q(const bc_model *m, double g)
{
    bc_qtable *q = bc_qtable_alloc(m);
    if (!q)
        return NULL;
    for (int64_t p = 0; p < m->n_pairs; p++) {
        const char *a = bc_names_get(m->action_names, m->pair_action[p]);
        int32_t s = state_of(m, bc_names_get(m->state_names, m->pair_state[p]));
        int d = corner_distance(move_target(s, a));
        q->q[p] = -1.0 + (g == 1.0 ? -(double)d : g * -2.0 * (1.0 - ldexp(1.0, -d)));
    }
    q->q[pair_of(m, "r1c0", "west")] = q->q[pair_of(m, "r1c0", "north")];
    return q;
}

/* Tied states by hand (shortest-path moves that tie, plus r1c0): r0c3,
 * r1c0, r1c1, r1c2, r2c1, r2c2, r3c0.  First-action tie-break: north,
 * south, east, west order always picks a shortest move, so no regret.
 * Worst tie-break: west at r1c0 stays for ever, and r1c1, r1c2, r2c0, r2c1,
 * r3c0 can all route into r1c0 along tied moves (r1c0 lies on one of their
 * shortest paths): six traps at discount 1 (reach 8/14); at discount 1/2
 * they are worth -1/(1 - 1/2) = -2 each instead of -2 (1 - 2^-d). */
static void test_ties(void)
{
    static const char *const stuck[6] = {"r1c0", "r1c1", "r1c2", "r2c0", "r2c1", "r3c0"};
    bc_model *m = read_model("models/sutton-barto-4.1-gridworld.bell");
    CHECK(m != NULL, "ties: model read");
    if (!m)
        return;
    bc_qtable *q = corner_q(m, 1.0);
    bc_score_opts o;
    bc_score_opts_default(&o);
    bc_score sc;
    CHECK(q && bc_score_compute(m, q, NULL, &o, &sc) == 0, "ties: scored, first action");
    CHECK(sc.n_tied == 7, "ties: 7 tied states (by hand)");
    CHECK(sc.n_traps == 0 && sc.regret_max_state == 0.0 && sc.n_wrong == 0,
          "ties: first-action tie-break is optimal (by hand)");
    /* Only Q(r1c0, west) is off: -1 where T Q and Q* give -1 + V(r1c0) = -2. */
    CHECK(sc.residual == 1.0 && sc.q_error == 1.0, "ties: residual and max |Q - Q*| are 1 (by hand)");
    CHECK(isnan(sc.regret_bound), "ties: no a-priori bound at discount 1");
    bc_score_free(&sc);

    o.ties_worst = 1;
    CHECK(bc_score_compute(m, q, NULL, &o, &sc) == 0, "ties: scored, worst tie-break");
    int ok = sc.n_traps == 6;
    for (int i = 0; ok && i < 6; i++)
        ok = sc.traps[i] == state_of(m, stuck[i]);
    CHECK(ok, "ties worst: the six states that can be routed into r1c0's wall are traps (by hand)");
    CHECK_NEAR(sc.reach_probability, 8.0 / 14.0, 1e-12, "ties worst: reach probability 8/14 (by hand)");
    CHECK(sc.agent_prob[pair_of(m, "r1c0", "west")] == 1.0, "ties worst: r1c0 takes west");
    CHECK(sc.state_regret[state_of(m, "r0c3")] == 0.0 && sc.state_regret[state_of(m, "r2c2")] == 0.0,
          "ties worst: states that cannot reach r1c0 keep regret 0");
    bc_score_free(&sc);
    bc_qtable_free(q);

    /* Discount 1/2 (scoring discount, the model's stays 1). */
    q = corner_q(m, 0.5);
    o.discount = 0.5;
    CHECK(q && bc_score_compute(m, q, NULL, &o, &sc) == 0, "ties 1/2: scored, worst tie-break");
    CHECK(m->discount == 1.0, "ties 1/2: the caller's model keeps its discount");
    double dv = 0.0, dr = 0.0;
    for (int32_t s = 0; s < 16; s++) {
        int is_stuck = 0;
        for (int i = 0; i < 6; i++)
            is_stuck |= s == state_of(m, stuck[i]);
        double vstar = -2.0 * (1.0 - ldexp(1.0, -corner_distance(s)));
        double v = is_stuck ? -2.0 : vstar;
        dv = fmax(dv, fabs(sc.values[s] - v));
        dr = fmax(dr, fabs(sc.state_regret[s] - (vstar - v)));
    }
    CHECK(sc.n_traps == 0 && dv <= 1e-12, "ties 1/2: values -2 on the six, -2(1 - 2^-d) elsewhere (by hand)");
    CHECK(dr <= 1e-12, "ties 1/2: regrets 1 at r1c0, 1/2 at d = 2, 1/4 at d = 3 (by hand)");
    CHECK(sc.n_tied == 7, "ties 1/2: the same 7 tied states");
    bc_score_free(&sc);
    bc_qtable_free(q);
    bc_model_free(m);
}

/* Objective min, every action tied (Q = 0): the worst tie-break is the
 * costliest policy, whose values are the optimum of the same model with
 * objective max (every policy terminates: each pair has a 0.02 chance of
 * harvest), taken from ref_solve.py on that edited model. */
static void test_ties_worst_min(void)
{
    const char *path = "models/greenhouse-irrigation.bell";
    bc_model *m = read_model(path);
    char tmp[] = "/tmp/bc-test-score-XXXXXX", cmd[256], line[256], state[64];
    int fd = mkstemp(tmp);
    FILE *in = fopen(path, "r"), *out = fd >= 0 ? fdopen(fd, "w") : NULL;
    CHECK(m && in && out, "ties min: model read, edited copy opened");
    if (!m || !in || !out)
        return;
    while (fgets(line, sizeof line, in))
        fputs(strncmp(line, "objective min", 13) ? line : "objective max\n", out);
    fclose(in);
    fclose(out);
    bc_qtable *q = bc_qtable_alloc(m); /* every Q-value 0 */
    bc_score_opts o;
    bc_score_opts_default(&o);
    o.ties_worst = 1;
    bc_score sc;
    CHECK(bc_score_compute(m, q, NULL, &o, &sc) == 0, "ties min: scored, worst tie-break");
    CHECK(sc.n_tied == 5 && sc.n_traps == 0, "ties min: all 5 live states tied, no trap");
    snprintf(cmd, sizeof cmd, "/usr/bin/python3 tests/tools/ref_solve.py %s 2>/dev/null", tmp);
    FILE *f = popen(cmd, "r");
    int seen = 0;
    double worst = 0.0, x;
    while (f && fgets(line, sizeof line, f)) {
        if (sscanf(line, " \"%63[^\"]\": %lf", state, &x) == 2) {
            seen++;
            worst = fmax(worst, fabs(sc.values[state_of(m, state)] - x));
        }
    }
    CHECK(f && pclose(f) == 0 && seen == m->n_states,
          "ties min: ref_solve.py solved the model with objective max");
    CHECK(worst <= 1e-8, "ties min: worst tie-break values = the costliest policy's (ref_solve.py)");
    CHECK(sc.regret_max_state > 0 && sc.agreement_states < 1,
          "ties min: the costliest policy has regret > 0 (costs above V*)");
    unlink(tmp);
    bc_score_free(&sc);
    bc_qtable_free(q);
    bc_model_free(m);
}

/* Requests that cannot be scored fail with a message. */
static void test_refusals(void)
{
    bc_model *m = read_model("models/puterman-two-state.bell");
    CHECK(m != NULL, "refusals: model read");
    if (!m)
        return;
    bc_qtable *q = bc_qtable_alloc(m);
    bc_policy *p = bc_policy_alloc(m);
    bc_score_opts o;
    bc_score_opts_default(&o);
    bc_score sc;
    CHECK(bc_score_compute(m, NULL, NULL, &o, &sc) == -1 && sc.message[0], "refusals: no agent");
    CHECK(bc_score_compute(m, q, p, &o, &sc) == -1, "refusals: both a Q-table and a policy");
    o.discount = 1.5;
    CHECK(bc_score_compute(m, q, NULL, &o, &sc) == -1, "refusals: discount 1.5");
    o.discount = NAN;
    q->q[0] = NAN;
    CHECK(bc_score_compute(m, q, NULL, &o, &sc) == -1 && strstr(sc.message, "s1"),
          "refusals: a NaN Q-value of a covered state, named");
    p->prob[0] = 0.5; /* s1's pairs sum to 0.5 */
    CHECK(bc_score_compute(m, NULL, p, &o, &sc) == -1, "refusals: probabilities not summing to 1");
    /* Discount 1 on a model without terminal states: no optimum. */
    o.discount = 1.0;
    q->q[0] = 0.0;
    CHECK(bc_score_compute(m, q, NULL, &o, &sc) == -1 && sc.values == NULL,
          "refusals: discount 1 without a terminal state, nothing left allocated");
    bc_score_free(&sc);
    bc_qtable_free(q);
    bc_policy_free(p);
    bc_model_free(m);
}

int main(void)
{
    test_sutton_barto_4_1();
    test_sutton_barto_3_5();
    test_flipped_q();
    arbitrary_q("models/demo-warehouse-robot.bell", "arbitrary Q, max 0.95", 6, NAN, "", NULL);
    arbitrary_q("models/demo-warehouse-robot.bell", "arbitrary Q, scoring discount 0.8", 6, 0.8,
                "--discount 0.8", NULL);
    arbitrary_q("models/greenhouse-irrigation.bell", "arbitrary Q, min, discount 1", 40, NAN, "",
                NULL);
    test_iterative();
    test_stochastic_policy();
    test_trap();
    test_ties();
    test_ties_worst_min();
    test_refusals();
    UNIT_DONE();
}
