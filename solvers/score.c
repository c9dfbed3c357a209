/* score.c — scoring a learned agent against the optimum: its policy, regrets, Bellman residual, agreement and traps. */
/*
 * Copyright (C) 2026 the bellcheck developers.
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The order of work: solve the optimum under the scoring discount; turn the
 * agent into a stochastic policy over the pairs (greedy from a Q-table, or
 * as given); find its traps (discount 1); evaluate it exactly
 * (score_eval.c); then compare, state by state.  Methods and guarantees are
 * in docs/methods.md, "Scoring a learned agent".
 *
 * States the agent does not cover (present[s] == 0) act optimally: the
 * policy needs an action there to have values at all, and the optimal one
 * charges the agent nothing for them.  They are left out of regrets,
 * agreement and the Q-table's statistics.
 *
 * The scoring discount may differ from the model's: the model is then
 * copied shallowly (arrays shared, read only) with the other discount; the
 * caller's model is never changed.
 */
#include <assert.h>
#include <float.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "bellcheck.h"
#include "score_internal.h"
#include "solver_internal.h"

void bc_score_opts_default(bc_score_opts *o)
{
    o->discount = NAN;
    o->q_discount = NAN;
    o->ties_worst = 0;
    bc_solve_opts_default(&o->solve);
    bc_prove_opts_default(&o->prove);
}

void bc_score_free(bc_score *s)
{
    bc_solution_free(&s->optimum);
    free(s->agent_prob);
    free(s->values);
    free(s->state_regret);
    free(s->traps);
    free(s->by_regret);
    free(s->acts);
    s->acts = NULL;
    s->agent_prob = s->values = s->state_regret = NULL;
    s->traps = s->by_regret = NULL;
    s->n_traps = 0;
    bc_proof_result_free(&s->optimum_proof);
    for (int32_t i = 0; s->exact_values && i < s->n_exact_values; i++)
        mpq_clear(s->exact_values[i]);
    free(s->exact_values);
    s->exact_values = NULL;
    free(s->exact_regret_initial);
    free(s->exact_value_initial);
    s->exact_regret_initial = s->exact_value_initial = NULL;
}

/* Everything "not computed": arrays NULL, statistics NAN. */
static void score_init(bc_score *out)
{
    memset(out, 0, sizeof *out);
    bc_solution_init(&out->optimum);
    out->discount = out->value_initial = out->optimal_initial = NAN;
    out->regret_initial = out->regret_max_state = out->eval_bound = NAN;
    out->residual = out->q_error = out->regret_bound = NAN;
    out->agreement_states = out->agreement_weighted = out->reach_probability = NAN;
    out->worst_state = -1;
    const bc_proof none = {BC_PROOF_NONE, -1};
    out->values_proof = out->value_initial_proof = out->optimal_initial_proof = none;
    out->regret_initial_proof = out->regret_max_state_proof = none;
    out->residual_proof = out->q_error_proof = none;
}

/* The exact rational image of a discount given as a double (every double is
 * a dyadic rational); only reports and writers read discount_exact, and the
 * shallow copy reaches neither, so when it does not fit the small form the
 * nearest fraction with denominator 2^62 stands in. */
static bc_num num_of_double(double g)
{
    int e;
    double frac = frexp(g, &e); /* g = frac 2^e, frac in [1/2, 1) */
    int64_t num = (int64_t)ldexp(frac, 53);
    int shift = 53 - e; /* g = num / 2^shift */
    while (shift > 0 && num % 2 == 0)
        num /= 2, shift--;
    if (shift > 62) {
        num = (int64_t)llround(ldexp(g, 62));
        shift = 62;
    }
    return (bc_num){num, (int64_t)1 << shift};
}

/* Rejects what cannot be scored; sets *g and *g_q.  0 or -1 (message set). */
static int check_request(const bc_model *m, const bc_qtable *q, const bc_policy *p,
                         const bc_score_opts *o, double *g, double *g_q, bc_score *out)
{
    char *msg = out->message;
    const size_t cap = sizeof out->message;
    *g = isnan(o->discount) ? m->discount : o->discount;
    *g_q = isnan(o->q_discount) ? *g : o->q_discount;
    if ((q == NULL) == (p == NULL))
        snprintf(msg, cap, "score: give exactly one of a Q-table and a policy");
    else if (m->horizon > 0)
        snprintf(msg, cap, "score: the model has a finite horizon (%d); scoring supports "
                           "infinite-horizon models only", (int)m->horizon);
    else if (!(*g > 0.0 && *g <= 1.0))
        snprintf(msg, cap, "score: the scoring discount %g is outside (0, 1]", *g);
    else if (!(*g_q > 0.0 && *g_q <= 1.0))
        snprintf(msg, cap, "score: the Q-table's discount %g is outside (0, 1]", *g_q);
    else
        return 0;
    return -1;
}

/* Solves the optimum of mg into out->optimum.  0 or -1 (message set). */
static int solve_optimum(const bc_model *mg, const bc_score_opts *o, bc_score *out)
{
    bc_solve_status st = bc_solve(mg, BC_METHOD_AUTO, &o->solve, &out->optimum);
    if (st == BC_SOLVE_OK || st == BC_SOLVE_NOT_CONVERGED)
        return 0;
    snprintf(out->message, sizeof out->message, "score: the optimum (discount %g): %.200s",
             mg->discount, out->optimum.message);
    return -1;
}

/* ------------------------------------------------------------------------ */
/* The agent's policy                                                       */
/* ------------------------------------------------------------------------ */

/* Greedy policy of the Q-table on the states it covers: the best Q in the
 * objective's sense (largest for max, smallest for min), first pair on
 * exact ties; allowed[] marks every pair attaining it (the tied set).
 * 0, or -1 when a covered state has a non-finite Q (message set). */
static int greedy_from_q(const bc_model *mg, const bc_qtable *q, uint8_t *allowed, bc_score *out)
{
    const double sgn = bc_sv_sign(mg);
    for (int32_t s = 0; s < mg->n_states; s++) {
        if (mg->terminal[s] || !q->present[s])
            continue;
        int64_t first = -1;
        double best = 0.0;
        for (int64_t p = mg->state_pair_start[s]; p < mg->state_pair_start[s + 1]; p++) {
            if (!isfinite(q->q[p])) {
                char label[32];
                const char *action =
                    mg->action_names ? bc_names_get(mg->action_names, mg->pair_action[p]) : "?";
                snprintf(out->message, sizeof out->message,
                         "score: the Q-table has a non-finite value at state %s, action %s",
                         bc_sv_state_label(mg, s, label), action);
                return -1;
            }
            if (first < 0 || sgn * q->q[p] > best)
                best = sgn * q->q[p], first = p;
        }
        int32_t tied = 0;
        for (int64_t p = mg->state_pair_start[s]; p < mg->state_pair_start[s + 1]; p++)
            tied += allowed[p] = sgn * q->q[p] == best;
        out->n_tied += tied > 1;
        out->agent_prob[first] = 1.0;
    }
    return 0;
}

/* The given policy on the states it covers, checked: probabilities finite,
 * >= 0 and summing to 1 within 1e-9 per state.  0 or -1 (message set). */
static int copy_policy(const bc_model *mg, const bc_policy *pol, bc_score *out)
{
    for (int32_t s = 0; s < mg->n_states; s++) {
        if (mg->terminal[s] || !pol->present[s])
            continue;
        double sum = 0.0;
        int ok = 1;
        for (int64_t p = mg->state_pair_start[s]; p < mg->state_pair_start[s + 1]; p++) {
            ok = ok && isfinite(pol->prob[p]) && pol->prob[p] >= 0.0;
            sum += pol->prob[p];
            out->agent_prob[p] = pol->prob[p];
        }
        if (!ok || !(fabs(sum - 1.0) <= 1e-9)) {
            char label[32];
            snprintf(out->message, sizeof out->message,
                     "score: the policy's probabilities at state %s are not a distribution "
                     "(sum %.17g)", bc_sv_state_label(mg, s, label), sum);
            return -1;
        }
    }
    return 0;
}

/* Uncovered non-terminal states take the optimum's pair. */
static int32_t fill_uncovered(const bc_model *mg, const uint8_t *present, uint8_t *allowed,
                              bc_score *out)
{
    int32_t n = 0;
    for (int32_t s = 0; s < mg->n_states; s++) {
        if (mg->terminal[s] || present[s])
            continue;
        int64_t p = out->optimum.policy[s];
        assert(p >= 0 && mg->pair_state[p] == s);
        out->agent_prob[p] = 1.0;
        if (allowed)
            allowed[p] = 1;
        n++;
    }
    return n;
}

/* The model restricted to the allowed pairs, with the stuck states made
 * terminal and the objective reversed.  Shallow: names, initial
 * distribution, exact values and big numbers are mg's; only the arrays below are owned. */
typedef struct {
    bc_model m;
    int64_t *orig_pair; /* [m.n_pairs] the pair of mg each pair comes from */
} restricted_model;

static void restricted_free(restricted_model *r)
{
    free(r->m.state_pair_start), free(r->m.pair_state), free(r->m.pair_action);
    free(r->m.pair_trans_start), free(r->m.succ_state), free(r->m.prob), free(r->m.reward);
    free(r->m.prob_id), free(r->m.reward_id), free(r->m.outcome_id);
    free(r->m.terminal), free(r->orig_pair);
}

static int restricted_alloc(const bc_model *mg, int64_t np, int64_t nt, restricted_model *r)
{
    const size_t ns = (size_t)mg->n_states, zp = (size_t)(np ? np : 1), zt = (size_t)(nt ? nt : 1);
    r->m = *mg;
    r->m.n_pairs = np;
    r->m.n_trans = nt;
    r->m.state_pair_start = malloc((ns + 1) * sizeof *r->m.state_pair_start);
    r->m.pair_state = malloc(zp * sizeof *r->m.pair_state);
    r->m.pair_action = malloc(zp * sizeof *r->m.pair_action);
    r->m.pair_trans_start = malloc((zp + 1) * sizeof *r->m.pair_trans_start);
    r->m.succ_state = malloc(zt * sizeof *r->m.succ_state);
    r->m.prob = malloc(zt * sizeof *r->m.prob);
    r->m.reward = malloc(zp * sizeof *r->m.reward);
    r->m.prob_id = malloc(zt * sizeof *r->m.prob_id);
    r->m.reward_id = malloc(zp * sizeof *r->m.reward_id);
    r->m.outcome_id = mg->outcome_id ? malloc(zt * sizeof *r->m.outcome_id) : NULL;
    r->m.pair_line = NULL;
    r->m.terminal = malloc(ns ? ns : 1);
    r->orig_pair = malloc(zp * sizeof *r->orig_pair);
    if (!r->m.state_pair_start || !r->m.pair_state || !r->m.pair_action ||
        !r->m.pair_trans_start || !r->m.succ_state || !r->m.prob || !r->m.reward ||
        !r->m.prob_id || !r->m.reward_id || (mg->outcome_id && !r->m.outcome_id) ||
        !r->m.terminal || !r->orig_pair) {
        restricted_free(r);
        return -1;
    }
    return 0;
}

static int restricted_build(const bc_model *mg, const uint8_t *allowed, const uint8_t *stuck,
                            restricted_model *r)
{
    int64_t np = 0, nt = 0;
    for (int64_t p = 0; p < mg->n_pairs; p++)
        if (allowed[p] && !stuck[mg->pair_state[p]])
            np++, nt += mg->pair_trans_start[p + 1] - mg->pair_trans_start[p];
    if (restricted_alloc(mg, np, nt, r) < 0)
        return -1;
    r->m.objective = mg->objective == BC_MAX ? BC_MIN : BC_MAX;
    int64_t q = 0, k = 0;
    for (int32_t s = 0; s < mg->n_states; s++) {
        r->m.state_pair_start[s] = q;
        r->m.terminal[s] = mg->terminal[s] || stuck[s];
        for (int64_t p = mg->state_pair_start[s]; p < mg->state_pair_start[s + 1]; p++) {
            if (!allowed[p] || r->m.terminal[s])
                continue;
            r->orig_pair[q] = p;
            r->m.pair_state[q] = s;
            r->m.pair_action[q] = mg->pair_action[p];
            r->m.reward[q] = mg->reward[p];
            r->m.reward_id[q] = mg->reward_id[p];
            r->m.pair_trans_start[q++] = k;
            for (int64_t t = mg->pair_trans_start[p]; t < mg->pair_trans_start[p + 1]; t++, k++) {
                r->m.succ_state[k] = mg->succ_state[t];
                r->m.prob[k] = mg->prob[t];
                r->m.prob_id[k] = mg->prob_id[t];
                if (mg->outcome_id)
                    r->m.outcome_id[k] = mg->outcome_id[t];
            }
        }
    }
    r->m.state_pair_start[mg->n_states] = q;
    r->m.pair_trans_start[q] = k;
    assert(q == np && k == nt);
    assert(bc_model_check_invariants(&r->m) == NULL);
    return 0;
}

/* The worst tie-break, exactly: among the allowed pairs (the tied greedy
 * pairs; the one pair of every other state), the choice with the least
 * value for the agent is the optimum of the restricted model with the
 * objective reversed.  At discount 1 a choice that fails to terminate is
 * worst of all (-inf), but the reversed solve would avoid it (for the
 * reversed objective it is the worst too), so those states are found first
 * by graph search (bc_sc_avoidable) and made terminal in the restricted
 * model; no allowed pair leads from the others into them.  0 or -1. */
static int worst_tie_break(const bc_model *mg, const uint8_t *allowed, const bc_score_opts *o,
                           bc_score *out)
{
    const size_t n = (size_t)(mg->n_states ? mg->n_states : 1);
    uint8_t *stuck = calloc(n, 1);
    int64_t *choice = malloc(n * sizeof *choice);
    restricted_model r;
    bc_solution sol;
    bc_solution_init(&sol);
    int rc = -1;
    int failed = !stuck || !choice;
    if (!failed && mg->discount >= 1.0)
        failed = bc_sc_avoidable(mg, allowed, stuck, choice) < 0;
    if (failed || restricted_build(mg, allowed, stuck, &r) < 0) {
        snprintf(out->message, sizeof out->message, "score: out of memory for the worst tie-break");
        free(stuck), free(choice);
        return -1;
    }
    bc_solve_status st = bc_solve(&r.m, BC_METHOD_AUTO, &o->solve, &sol);
    if (st == BC_SOLVE_OK || st == BC_SOLVE_NOT_CONVERGED) {
        for (int32_t s = 0; s < mg->n_states; s++) {
            if (mg->terminal[s])
                continue;
            for (int64_t p = mg->state_pair_start[s]; p < mg->state_pair_start[s + 1]; p++)
                out->agent_prob[p] = 0.0;
            out->agent_prob[stuck[s] ? choice[s] : r.orig_pair[sol.policy[s]]] = 1.0;
        }
        rc = 0;
    } else {
        snprintf(out->message, sizeof out->message, "score: the worst tie-break: %.220s",
                 sol.message);
    }
    bc_solution_free(&sol);
    restricted_free(&r);
    free(stuck), free(choice);
    return rc;
}

/* The agent as a stochastic policy in out->agent_prob.  0 or -1. */
static int agent_policy(const bc_model *mg, const bc_qtable *q, const bc_policy *pol,
                        const bc_score_opts *o, bc_score *out, int32_t *n_uncovered)
{
    if (pol) {
        if (copy_policy(mg, pol, out) < 0)
            return -1;
        *n_uncovered = fill_uncovered(mg, pol->present, NULL, out);
        return 0;
    }
    uint8_t *allowed = calloc((size_t)(mg->n_pairs ? mg->n_pairs : 1), 1);
    if (!allowed) {
        snprintf(out->message, sizeof out->message, "score: out of memory");
        return -1;
    }
    int rc = greedy_from_q(mg, q, allowed, out);
    if (rc == 0) {
        *n_uncovered = fill_uncovered(mg, q->present, allowed, out);
        if (o->ties_worst && out->n_tied > 0)
            rc = worst_tie_break(mg, allowed, o, out);
    }
    free(allowed);
    return rc;
}

/* ------------------------------------------------------------------------ */
/* Comparing with the optimum                                               */
/* ------------------------------------------------------------------------ */

/* sum_s initial(s) v(s) over the states with initial mass (so an infinite
 * value elsewhere does not turn the sum into NaN). */
static double initial_value(const bc_model *m, const double *v)
{
    double acc = 0.0;
    for (int32_t s = 0; s < m->n_states; s++)
        if (m->initial[s] > 0.0)
            acc += m->initial[s] * v[s];
    return acc + 0.0;
}

/* A regret in the objective's direction.  Rounding can make a true 0 come
 * out slightly negative; within what the two bounds allow (the optimum's
 * and the evaluation's; an unproven one counts as --compare's allowance)
 * it is 0, beyond that it is kept (and counted in *odd): it signals an
 * optimum that is not one, e.g. a solve stopped by a limit. */
static double regret_of(double sgn, double vstar, double v, double allow, int32_t *odd)
{
    double r = sgn * (vstar - v);
    if (r < 0.0 && r >= -allow)
        return 0.0;
    *odd += r < 0.0;
    return r;
}

/* Orders by decreasing regret, NAN last, then by state. */
typedef struct {
    double regret;
    int32_t state;
} ranked;

static int ranked_cmp(const void *a, const void *b)
{
    const ranked *x = a, *y = b;
    int xn = isnan(x->regret), yn = isnan(y->regret);
    if (xn != yn)
        return xn - yn;
    if (!xn && x->regret != y->regret)
        return x->regret > y->regret ? -1 : 1;
    return (x->state > y->state) - (x->state < y->state);
}

/* by_regret from state_regret; 0, or -1 when out of memory. */
static int sort_by_regret(const bc_model *mg, bc_score *out)
{
    ranked *order = malloc((size_t)(mg->n_states ? mg->n_states : 1) * sizeof *order);
    if (!order)
        return -1;
    for (int32_t s = 0; s < mg->n_states; s++)
        order[s] = (ranked){out->state_regret[s], s};
    qsort(order, (size_t)mg->n_states, sizeof *order, ranked_cmp);
    for (int32_t i = 0; i < mg->n_states; i++)
        out->by_regret[i] = order[i].state;
    free(order);
    return 0;
}

/* value_initial, optimal_initial, the regrets, worst state, by_regret.  Returns
 * the number of states with a regret below what the bounds allow, or -1
 * when out of memory. */
static int32_t regrets(const bc_model *mg, const uint8_t *present, bc_score *out)
{
    const double sgn = bc_sv_sign(mg);
    const double *vstar = out->optimum.values;
    double vmax = 0.0;
    for (int32_t s = 0; s < mg->n_states; s++)
        vmax = fmax(vmax, fabs(vstar[s]));
    const double unproven = BC_UNPROVEN_TOL * fmax(1.0, vmax);
    double allow = (out->optimum.bound >= 0 ? out->optimum.bound : unproven) +
                   (out->eval_bound >= 0 ? out->eval_bound : unproven);
    int32_t odd = 0;
    out->value_initial = initial_value(mg, out->values);
    out->optimal_initial = initial_value(mg, vstar);
    out->regret_initial = regret_of(sgn, out->optimal_initial, out->value_initial, allow, &odd);
    out->regret_max_state = NAN;
    out->worst_state = -1;
    for (int32_t s = 0; s < mg->n_states; s++) {
        double r = present[s] ? regret_of(sgn, vstar[s], out->values[s], allow, &odd) : NAN;
        out->state_regret[s] = r;
        if (!isnan(r) && !mg->terminal[s] && (out->worst_state < 0 || r > out->regret_max_state))
            out->regret_max_state = r, out->worst_state = s;
    }
    return sort_by_regret(mg, out) < 0 ? -1 : odd;
}

/* Q*(p) = r(p) + g sum_t P(t|p) V*(t), model's sign. */
static double q_star(const bc_model *mg, const double *vstar, int64_t p)
{
    double acc = 0.0;
    for (int64_t k = mg->pair_trans_start[p]; k < mg->pair_trans_start[p + 1]; k++)
        acc += mg->prob[k] * vstar[mg->succ_state[k]];
    return mg->reward[p] + mg->discount * acc;
}

/* The optimality test of a pair: with |V~ - V*| <= b, the computed gap
 * V~(s) - Q~(p) is within b + g b <= 2b of the true gap V*(s) - Q*(p) >= 0,
 * plus the backup's rounding e; so a pair whose computed gap is at most
 * 2b + e + 1e-15 |V~(s)| is counted optimal, and no truly optimal pair is
 * missed (a pair counted optimal may be suboptimal by up to 4b + 2e + 2e-15 |V~(s)|).
 * The relative 1e-15 (a few ulps) absorbs rounding of V~ itself; a larger one
 * would accept real gaps on models with large values (found in review).  Without a proven b, the
 * allowance used by --compare stands in. */
static double optimal_gap_tol(const bc_model *mg, const bc_solution *opt, double vmax)
{
    bc_sv_scales sc;
    bc_sv_scales_of(mg, &sc);
    double b = opt->bound >= 0 ? opt->bound : BC_UNPROVEN_TOL * fmax(1.0, vmax);
    return 2.0 * b + bc_sv_backup_error(mg, &sc, vmax);
}

/* The verdict on state s from the floating-point optimum (see
 * optimal_gap_tol): suboptimal when a pair the agent uses has a computed gap
 * beyond what the errors explain; optimal when every pair it uses beats each
 * other pair of s by more than twice the error of a computed Q~ (g b + e
 * each), so no V* within the bound can make another pair as good; else
 * undecided (a tie, or a gap within the error). */
static bc_act_verdict float_verdict(const bc_model *mg, const bc_score *out, int32_t s,
                                    double gap_tol, double q_err)
{
    const double sgn = bc_sv_sign(mg), *vstar = out->optimum.values;
    const double slack = 1e-15 * fabs(vstar[s]);
    double first = -INFINITY, second = -INFINITY; /* the two largest sgn Q~ of s */
    int64_t arg = -1;
    for (int64_t p = mg->state_pair_start[s]; p < mg->state_pair_start[s + 1]; p++) {
        double q = sgn * q_star(mg, vstar, p);
        if (q > first)
            second = first, first = q, arg = p;
        else if (q > second)
            second = q;
    }
    int proven = 1;
    for (int64_t p = mg->state_pair_start[s]; p < mg->state_pair_start[s + 1]; p++) {
        if (!(out->agent_prob[p] > 0.0))
            continue;
        double q = sgn * q_star(mg, vstar, p);
        if (!(sgn * vstar[s] - q <= gap_tol + slack))
            return BC_ACT_SUBOPTIMAL;
        proven &= p == arg && first - second > 2.0 * q_err + slack;
    }
    return proven ? BC_ACT_OPTIMAL : BC_ACT_UNDECIDED;
}

/* The verdict per covered non-terminal state into out->acts: exactly from
 * the exact optimum when there is one (score_proof.c), else by the
 * floating-point test above. */
static int act_verdicts(const bc_model *mg, const uint8_t *present, double vmax, bc_score *out)
{
    int rc = bc_sc_decide_exact(mg, present, out);
    if (rc <= 0)
        return rc;
    bc_sv_scales sc;
    bc_sv_scales_of(mg, &sc);
    const double b = out->optimum.bound >= 0 ? out->optimum.bound : BC_UNPROVEN_TOL * fmax(1.0, vmax);
    const double e = bc_sv_backup_error(mg, &sc, vmax);
    const double gap_tol = optimal_gap_tol(mg, &out->optimum, vmax);
    for (int32_t s = 0; s < mg->n_states; s++)
        out->acts[s] = mg->terminal[s] || !present[s]
                           ? BC_ACT_NONE
                           : float_verdict(mg, out, s, gap_tol, mg->discount * b + e);
    return 0;
}

/* agreement_states, agreement_weighted, n_wrong and n_undecided over the
 * covered non-terminal states.  A state agrees unless its verdict is
 * suboptimal or it is a trap: a trap's value is -inf whatever its pairs' Q*
 * say (a zero-reward loop can tie with the optimum).  The weights are the
 * expected discounted visits; traps, which have none (their visits are
 * infinite at discount 1), are left out of the weighted share.  0, or -1
 * when out of memory. */
static int agreement(const bc_model *mg, const uint8_t *present, const uint8_t *trap,
                     const double *visits, bc_score *out)
{
    double vmax = 0.0;
    for (int32_t s = 0; s < mg->n_states; s++)
        vmax = fmax(vmax, fabs(out->optimum.values[s]));
    if (act_verdicts(mg, present, vmax, out) < 0)
        return -1;
    int32_t covered = 0, agree = 0;
    double w_all = 0.0, w_agree = 0.0;
    out->n_undecided = 0;
    for (int32_t s = 0; s < mg->n_states; s++) {
        if (mg->terminal[s] || !present[s])
            continue;
        int ok = !(trap && trap[s]) && out->acts[s] != BC_ACT_SUBOPTIMAL;
        covered++;
        agree += ok;
        out->n_undecided += out->acts[s] == BC_ACT_UNDECIDED;
        w_all += visits[s];
        w_agree += ok ? visits[s] : 0.0;
    }
    out->n_wrong = covered - agree;
    out->agreement_states = covered > 0 ? (double)agree / covered : NAN;
    out->agreement_weighted = w_all > 0.0 ? w_agree / w_all : NAN;
    return 0;
}

/* ------------------------------------------------------------------------ */
/* The Q-table's own statistics                                             */
/* ------------------------------------------------------------------------ */

/* best_a Q(t, a) in the objective's sense; 0 for terminal states, NAN for
 * states the table does not cover. */
double bc_sc_q_best(const bc_model *mg, const bc_qtable *q, int32_t t)
{
    if (mg->terminal[t])
        return 0.0;
    if (!q->present[t])
        return NAN;
    const double sgn = bc_sv_sign(mg);
    double best = q->q[mg->state_pair_start[t]];
    for (int64_t p = mg->state_pair_start[t] + 1; p < mg->state_pair_start[t + 1]; p++)
        if (sgn * q->q[p] > sgn * best)
            best = q->q[p];
    return best;
}

/* (T Q)(p) = r(p) + g_q sum_t P(t|p) v_q(t), v_q(t) = best_a' Q(t, a');
 * NAN when a successor of positive probability is not covered. */
static double q_backup(const bc_model *mg, const double *v_q, double g_q, int64_t p)
{
    double acc = 0.0;
    for (int64_t k = mg->pair_trans_start[p]; k < mg->pair_trans_start[p + 1]; k++)
        if (mg->prob[k] > 0.0)
            acc += mg->prob[k] * v_q[mg->succ_state[k]];
    return mg->reward[p] + g_q * acc;
}

/* residual, q_error and regret_bound.
 *
 * The bound (g < 1, g_q = g, every state covered).  Let eps = max |TQ - Q|
 * over all pairs, pi greedy for Q, V_Q(s) = best_a Q(s,a) = Q(s, pi(s)).
 * Then (T_pi V_Q)(s) = (TQ)(s, pi(s)), so ||T_pi V_Q - V_Q|| <= eps and
 * ||V^pi - V_Q|| <= eps/(1-g) (T_pi is a g-contraction with fixed point
 * V^pi); and (T V_Q)(s) = best_a (TQ)(s,a), so ||T V_Q - V_Q|| <= eps and
 * ||V* - V_Q|| <= eps/(1-g).  Hence for every state
 *     V*(s) - V^pi(s) <= 2 eps / (1 - g).
 * This is the Q-function form of the Bellman-residual bound of Williams &
 * Baird (1993), whose value-function form has 2 g eps/(1-g) (from memory);
 * the g is lost because pi is greedy for Q, not for V_Q (a one-step problem,
 * all successors terminal, attains 2 eps: Q = r - eps at the best pair and
 * r + eps at one 2 eps worse tie).  Going through ||Q - Q*|| <= eps/(1-g)
 * and Singh & Yee (1994), loss <= 2 ||Q - Q*||/(1-g), gives only
 * 2 eps/(1-g)^2.  It holds for any tie-break among greedy pairs.  The
 * computed eps is raised by the backup's rounding allowance. */
static int q_statistics(const bc_model *mg, const bc_qtable *q, double g_q, int32_t n_uncovered,
                        bc_score *out)
{
    double res = 0.0, err = 0.0, qmax = 0.0;
    int64_t skipped = 0;
    double *v_q = malloc((mg->n_states > 0 ? (size_t)mg->n_states : 1) * sizeof *v_q);
    if (!v_q) {
        snprintf(out->message, sizeof out->message, "score: out of memory");
        return -1;
    }
    for (int32_t t = 0; t < mg->n_states; t++)
        v_q[t] = bc_sc_q_best(mg, q, t);
    for (int64_t p = 0; p < mg->n_pairs; p++) {
        int32_t s = mg->pair_state[p];
        if (!q->present[s])
            continue;
        double tq = q_backup(mg, v_q, g_q, p);
        if (isnan(tq))
            skipped++;
        else
            res = fmax(res, fabs(tq - q->q[p]));
        err = fmax(err, fabs(q->q[p] - q_star(mg, out->optimum.values, p)));
        qmax = fmax(qmax, fabs(q->q[p]));
    }
    out->has_q = 1;
    out->residual = res;
    out->q_error = err;
    out->regret_bound = NAN;
    if (mg->discount < 1.0 && g_q == mg->discount && n_uncovered == 0 && skipped == 0) {
        bc_sv_scales sc;
        bc_sv_scales_of(mg, &sc);
        double eps = res * (1.0 + DBL_EPSILON) + bc_sv_backup_error(mg, &sc, qmax);
        out->regret_bound = 2.0 * eps / (1.0 - mg->discount);
    }
    free(v_q);
    return 0;
}

/* ------------------------------------------------------------------------ */
/* The whole score                                                          */
/* ------------------------------------------------------------------------ */

/* Arrays of out, and the traps (discount 1) into trap[] and out->traps. */
static int alloc_arrays(const bc_model *mg, bc_score *out)
{
    const size_t n = (size_t)(mg->n_states ? mg->n_states : 1);
    out->agent_prob = calloc((size_t)(mg->n_pairs ? mg->n_pairs : 1), sizeof *out->agent_prob);
    out->values = calloc(n, sizeof *out->values);
    out->state_regret = calloc(n, sizeof *out->state_regret);
    out->by_regret = calloc(n, sizeof *out->by_regret);
    out->acts = calloc(n, sizeof *out->acts);
    if (out->agent_prob && out->values && out->state_regret && out->by_regret && out->acts)
        return 0;
    snprintf(out->message, sizeof out->message, "score: out of memory for %d states",
             (int)mg->n_states);
    return -1;
}

static int find_traps(const bc_model *mg, const double *prob, uint8_t *trap, bc_score *out)
{
    out->n_traps = 0;
    if (mg->discount < 1.0) {
        memset(trap, 0, (size_t)mg->n_states);
        return 0;
    }
    int32_t count = bc_sc_find_traps(mg, prob, trap);
    out->traps = malloc((size_t)(count > 0 ? count : 1) * sizeof *out->traps);
    if (count < 0 || !out->traps) {
        snprintf(out->message, sizeof out->message, "score: out of memory finding traps");
        return -1;
    }
    for (int32_t s = 0; s < mg->n_states; s++)
        if (trap[s])
            out->traps[out->n_traps++] = s;
    assert(out->n_traps == count);
    return 0;
}

/* Evaluation, reach probability, regrets, agreement and the Q-table's
 * statistics, once the agent's policy is set.  0 or -1. */
static int compare(const bc_model *mg, const bc_qtable *q, const bc_policy *pol, double g_q,
                   const bc_score_opts *o, int32_t n_uncovered, bc_score *out, int32_t *odd,
                   int64_t *eval_sweeps)
{
    const size_t n = (size_t)(mg->n_states ? mg->n_states : 1);
    const uint8_t *present = q ? q->present : pol->present;
    uint8_t *trap = malloc(n);
    double *visits = calloc(n, sizeof *visits);
    int rc = -1;
    if (!trap || !visits) {
        snprintf(out->message, sizeof out->message, "score: out of memory");
        goto done;
    }
    if (find_traps(mg, out->agent_prob, trap, out) < 0)
        goto done;
    bc_sc_eval ev = {out->values, visits, -1, 0, 0};
    if (bc_sc_evaluate(mg, out->agent_prob, trap, &o->solve, &ev, out->message,
                       sizeof out->message) < 0)
        goto done;
    out->eval_bound = ev.bound;
    out->n_exact_values = mg->n_states;
    if (bc_sc_prove_agent(mg, trap, &o->prove, out) < 0)
        goto done;
    *eval_sweeps = ev.sweeps;
    out->reach_probability = mg->discount < 1.0 ? NAN : 1.0;
    if (out->n_traps > 0 &&
        bc_sc_reach_probability(mg, out->agent_prob, trap, &out->reach_probability,
                                out->message, sizeof out->message) < 0)
        goto done;
    *odd = regrets(mg, present, out);
    if (*odd < 0) {
        snprintf(out->message, sizeof out->message, "score: out of memory");
        goto done;
    }
    if (agreement(mg, present, trap, visits, out) < 0) {
        snprintf(out->message, sizeof out->message, "score: out of memory");
        goto done;
    }
    if (q && q_statistics(mg, q, g_q, n_uncovered, out) < 0)
        goto done;
    if (bc_sc_prove_figures(mg, q, g_q, trap, out) < 0 || sort_by_regret(mg, out) < 0)
        goto done;
    rc = 0;
done:
    free(trap), free(visits);
    return rc;
}

/* The one-line summary of a successful score. */
static void summary(const bc_qtable *q, const bc_score_opts *o, int32_t n_uncovered, int32_t odd,
                    int64_t sweeps, bc_score *out)
{
    char *msg = out->message;
    const size_t cap = sizeof out->message;
    int len = snprintf(msg, cap, "scored under discount %g; optimum by %s (%s); ", out->discount,
                       bc_method_name(out->optimum.method),
                       out->optimum.status == BC_SOLVE_OK ? "solved" : "stopped by a limit");
    if (q)
        len += snprintf(msg + len, cap - (size_t)len, "greedy from the Q-table, %d tied (%s); ",
                        (int)out->n_tied, o->ties_worst ? "worst tie-break" : "first action");
    if (n_uncovered > 0 && len < (int)cap)
        len += snprintf(msg + len, cap - (size_t)len,
                        "%d uncovered states take the optimal action; ", (int)n_uncovered);
    if (odd > 0 && len < (int)cap)
        len += snprintf(msg + len, cap - (size_t)len,
                        "%d regrets below -(bounds): the optimum is not reliable; ", (int)odd);
    if (sweeps > 0 && len < (int)cap)
        len += snprintf(msg + len, cap - (size_t)len, "evaluated by %lld Gauss-Seidel sweeps, ",
                        (long long)sweeps);
    if (len < (int)cap && out->eval_bound >= 0)
        snprintf(msg + len, cap - (size_t)len, "evaluation error <= %.3g", out->eval_bound);
    else if (len < (int)cap)
        snprintf(msg + len, cap - (size_t)len, "evaluation error not proven");
}

int bc_score_compute(const bc_model *m, const bc_qtable *q, const bc_policy *p,
                     const bc_score_opts *o, bc_score *out)
{
    bc_score_opts defaults;
    if (!o) {
        bc_score_opts_default(&defaults);
        o = &defaults;
    }
    score_init(out);
    double g, g_q;
    if (check_request(m, q, p, o, &g, &g_q, out) < 0)
        return -1;
    bc_model mg = *m; /* shallow: the scoring discount, everything else shared */
    if (g != m->discount) {
        mg.discount = g;
        mg.discount_exact = num_of_double(g);
    }
    out->discount = g;
    int32_t n_uncovered = 0, odd = 0;
    int64_t sweeps = 0;
    if (solve_optimum(&mg, o, out) < 0 || bc_sc_prove_optimum(&mg, &o->prove, out) < 0 ||
        alloc_arrays(&mg, out) < 0 ||
        agent_policy(&mg, q, p, o, out, &n_uncovered) < 0 ||
        compare(&mg, q, p, g_q, o, n_uncovered, out, &odd, &sweeps) < 0) {
        char keep[sizeof out->message];
        memcpy(keep, out->message, sizeof keep);
        bc_score_free(out);
        score_init(out);
        memcpy(out->message, keep, sizeof keep);
        return -1;
    }
    summary(q, o, n_uncovered, odd, sweeps, out);
    return 0;
}
