/* score_proof.c — the proofs behind the figures of `score`: the optimum, the agent's values, regrets, residual, max |Q - Q*|. */
/*
 * Copyright (C) 2026 the bellcheck developers.
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Two kinds, as for a solve (prove.c):
 *  - exact: the optimum is proven by exact policy iteration, the agent's
 *    policy (stochastic weights are exact doubles) is evaluated exactly, and
 *    every regret is the exact difference; the doubles shown are the ones
 *    nearest the exact numbers and the proof's bound is their distance.
 *  - interval (discount < 1): the optimum's enclosure (interval.c), the
 *    agent's values enclosed by one outward-rounded pass of T_pi at them,
 *    and a regret's bound is the sum of the two bounds it depends on plus
 *    the rounding of the subtraction.
 * The Q-table's residual and max |Q - Q*| are always enclosed by outward
 * rounding (the table's numbers are doubles, the model's are not).
 * Trap states (discount 1) have infinite values and regrets; whether a state
 * is a trap is decided exactly by a graph search, so those figures are exact.
 */
#include "exact_internal.h"
#include "proof_internal.h"
#include "score_internal.h"
#include "solver_internal.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

static const bc_proof none = {BC_PROOF_NONE, -1};

int bc_sc_prove_optimum(const bc_model *m, const bc_prove_opts *po, bc_score *out)
{
    if (bc_prove_solution(m, &out->optimum, po, &out->optimum_proof) < 0) {
        snprintf(out->message, sizeof out->message, "score: proving the optimum: %.200s",
                 out->optimum_proof.message);
        return -1;
    }
    if (out->optimum_proof.value.kind != BC_PROOF_NONE)
        out->optimum.bound = out->optimum_proof.value.bound; /* the proven figure */
    out->optimal_initial_proof = out->optimum_proof.initial;
    return 0;
}

/* sum_s initial(s) v(s) exactly over the states not trapped; 0, or 1 when
 * a trap has initial mass (the value is then infinite). */
static int exact_initial(const bc_model *m, const mpq_t *v, const uint8_t *trap, mpq_t out)
{
    mpq_t t;
    mpq_init(t);
    mpq_set_ui(out, 0, 1);
    int infinite = 0;
    for (int32_t s = 0; s < m->n_states; s++) {
        if (bc_num_sign(m->initial_exact[s], m->big) == 0)
            continue;
        if (trap && trap[s]) {
            infinite = 1;
            continue;
        }
        bc_num_to_mpq(t, m->initial_exact[s], m->big);
        mpq_mul(t, t, v[s]);
        mpq_add(out, out, t);
    }
    mpq_clear(t);
    return infinite;
}

/* Exact evaluation of the agent: 0 done, 1 not possible (fall back). */
static int agent_exact(const bc_model *m, const uint8_t *trap, const bc_prove_opts *po,
                       bc_score *out)
{
    size_t n = (size_t)(m->n_states ? m->n_states : 1);
    mpq_t *v = malloc(n * sizeof *v);
    if (!v)
        return 1;
    for (int32_t s = 0; s < m->n_states; s++)
        mpq_init(v[s]);
    char why[256];
    if (bc_exact_policy_values(m, out->agent_prob, trap, &po->exact, v, why, sizeof why) != 0) {
        for (int32_t s = 0; s < m->n_states; s++)
            mpq_clear(v[s]);
        free(v);
        return 1;
    }
    double worst = 0.0;
    for (int32_t s = 0; s < m->n_states; s++) {
        if (trap && trap[s])
            continue;
        out->values[s] = bc_mpq_to_double(v[s]);
        worst = fmax(worst, bc_mpq_distance_up(out->values[s], v[s]));
    }
    out->exact_values = v;
    out->values_proof = (bc_proof){BC_PROOF_EXACT, worst};
    mpq_t init;
    mpq_init(init);
    if (exact_initial(m, v, trap, init) == 0) {
        out->exact_value_initial = bc_mpq_text(init);
        out->value_initial_proof =
            (bc_proof){BC_PROOF_EXACT, bc_mpq_distance_up(bc_mpq_to_double(init), init)};
    } else {
        out->value_initial_proof = (bc_proof){BC_PROOF_EXACT, 0}; /* infinite, decided exactly */
    }
    mpq_clear(init);
    return 0;
}

/* Interval proof of the agent's values at discount < 1. */
static int agent_interval(const bc_model *m, bc_score *out)
{
    const int sgn = m->objective == BC_MIN ? -1 : 1;
    size_t n = (size_t)(m->n_states ? m->n_states : 1);
    bc__enclosure e;
    double *v = malloc(n * sizeof *v);
    int rc = -1, built = v ? bc__enclosure_build(m, sgn, &e) : -1;
    if (built == -2)
        rc = 0; /* rounding not honoured: the values stay unproven */
    if (built < 0)
        goto done;
    for (int32_t s = 0; s < m->n_states; s++)
        v[s] = sgn * out->values[s];
    double dmin, dmax;
    int ok = bc__interval_mixed(m, &e, v, out->agent_prob, &dmin, &dmax) == 0;
    double one_minus_g = bc__sub_down(1.0, e.ghi); /* a lower bound of 1 - g */
    bc__enclosure_free(&e);
    rc = 0;
    if (!ok)
        goto done;
    /* |V^pi - v| <= max(-dmin, dmax) / (1 - g), as in interval.c; the
     * division rounds to nearest, so one step up covers it. */
    double d = fmax(-dmin, dmax);
    double b = d > 0 ? nextafter(d / one_minus_g, INFINITY) : 0.0;
    out->values_proof = (bc_proof){BC_PROOF_INTERVAL, b};
done:
    free(v);
    return rc;
}

int bc_sc_prove_agent(const bc_model *m, const uint8_t *trap, const bc_prove_opts *po,
                      bc_score *out)
{
    out->values_proof = (bc_proof){BC_PROOF_NONE, out->eval_bound};
    out->value_initial_proof = out->values_proof;
    if (po->mode == BC_PROVE_OFF)
        return 0;
    if (out->optimum_proof.has_exact && agent_exact(m, trap, po, out) == 0)
        return 0;
    if (m->discount < 1.0 && agent_interval(m, out) < 0) {
        snprintf(out->message, sizeof out->message, "score: out of memory proving the agent's values");
        return -1;
    }
    return 0;
}

/* Exact regrets: both sides exact.  Replaces the regret figures by the
 * doubles nearest the exact ones. */
static void regrets_exact(const bc_model *m, const uint8_t *trap, bc_score *out)
{
    const mpq_t *vstar = (const mpq_t *)out->optimum_proof.exact.values;
    const int sgn = m->objective == BC_MIN ? -1 : 1;
    mpq_t r, best;
    mpq_inits(r, best, NULL);
    double dist_max = 0.0;
    int32_t worst = -1;
    for (int32_t s = 0; s < m->n_states; s++) {
        if (isnan(out->state_regret[s]) || (trap && trap[s]))
            continue; /* not covered, or infinite (exact already) */
        mpq_sub(r, vstar[s], out->exact_values[s]);
        if (sgn < 0)
            mpq_neg(r, r);
        out->state_regret[s] = bc_mpq_to_double(r);
        if (!m->terminal[s] && (worst < 0 || mpq_cmp(r, best) > 0)) {
            mpq_set(best, r);
            worst = s;
            dist_max = bc_mpq_distance_up(out->state_regret[s], r);
        }
    }
    if (worst >= 0 && !isinf(out->regret_max_state)) {
        out->worst_state = worst;
        out->regret_max_state = out->state_regret[worst];
        out->regret_max_state_proof = (bc_proof){BC_PROOF_EXACT, dist_max};
    }
    if (out->exact_value_initial) {
        mpq_set_str(r, out->exact_value_initial, 10);
        mpq_sub(r, out->optimum_proof.exact.value_initial, r);
        if (sgn < 0)
            mpq_neg(r, r);
        out->regret_initial = bc_mpq_to_double(r);
        out->exact_regret_initial = bc_mpq_text(r);
        out->regret_initial_proof =
            (bc_proof){BC_PROOF_EXACT, bc_mpq_distance_up(out->regret_initial, r)};
    }
    mpq_clears(r, best, NULL);
}

int bc_sc_decide_exact(const bc_model *m, const uint8_t *present, bc_score *out)
{
    if (!out->optimum_proof.has_exact)
        return 1;
    const int sgn = m->objective == BC_MIN ? -1 : 1;
    bc__qvec v; /* V* over one denominator, so each comparison needs no big gcd */
    if (bc__qvec_from_mpq(&v, (const mpq_t *)out->optimum_proof.exact.values, m->n_states, sgn) < 0) {
        bc__qvec_free(&v);
        return -1;
    }
    bc__qscratch w;
    bc__qscratch_init(&w);
    mpq_t g;
    mpq_init(g);
    bc_num_to_mpq(g, m->discount_exact, m->big);
    for (int32_t s = 0; s < m->n_states; s++) {
        out->acts[s] = BC_ACT_NONE;
        if (m->terminal[s] || !present[s])
            continue;
        out->acts[s] = BC_ACT_OPTIMAL;
        for (int64_t p = m->state_pair_start[s]; p < m->state_pair_start[s + 1]; p++) {
            if (!(out->agent_prob[p] > 0.0))
                continue;
            int c = bc__qvec_pair_cmp(m, sgn, g, &v, p, &w); /* sign of Q*(p) - V*(s) */
            if (c < 0) {
                out->acts[s] = BC_ACT_SUBOPTIMAL;
                break;
            }
            if (c > 0) /* cannot happen for a proven optimum; claim nothing */
                out->acts[s] = BC_ACT_UNDECIDED;
        }
    }
    mpq_clear(g);
    bc__qscratch_clear(&w);
    bc__qvec_free(&v);
    return 0;
}

/* A difference of two proven numbers: the bounds add, plus the rounding of
 * the subtraction (half an ulp of the result, taken as a whole ulp). */
static bc_proof sum_of(bc_proof a, bc_proof b, double x)
{
    if (a.kind == BC_PROOF_NONE || b.kind == BC_PROOF_NONE)
        return none;
    if (isinf(x))
        return (bc_proof){BC_PROOF_EXACT, 0};
    double ulp = nextafter(fabs(x), INFINITY) - fabs(x);
    return (bc_proof){BC_PROOF_INTERVAL, bc__add_up(bc__add_up(a.bound, b.bound), ulp)};
}

/* Residual and q-error enclosures of the Q-table. */
static int qtable_proofs(const bc_model *m, const bc_qtable *q, double g_q, bc_score *out)
{
    size_t n = (size_t)(m->n_states ? m->n_states : 1);
    double *vq = malloc(n * sizeof *vq);
    bc__enclosure e;
    int built = vq ? bc__enclosure_build(m, 1, &e) : -1;
    if (built < 0) {
        free(vq);
        return built == -2 ? 0 : -1; /* -2: the figures stay unproven */
    }
    for (int32_t s = 0; s < m->n_states; s++)
        vq[s] = bc_sc_q_best(m, q, s);
    double glo = e.glo, ghi = e.ghi;
    if (g_q != m->discount)
        glo = ghi = g_q; /* a discount given as a double is that double exactly */
    int have_star = out->optimum_proof.value.kind != BC_PROOF_NONE;
    double rl, rh, el, eh;
    bc__interval_qtable(m, &e, glo, ghi, q->q, q->present, vq,
                        have_star ? out->optimum_proof.lower : NULL,
                        have_star ? out->optimum_proof.upper : NULL, &rl, &rh, &el, &eh);
    bc__enclosure_free(&e);
    free(vq);
    /* fmax with +0.0 also turns a -0.0 into 0. */
    out->residual_proof = (bc_proof){BC_PROOF_INTERVAL,
                                     fmax(0.0, fmax(bc__sub_up(out->residual, rl),
                                                    bc__sub_up(rh, out->residual)))};
    out->q_error_proof = have_star ? (bc_proof){BC_PROOF_INTERVAL,
                                                fmax(0.0, fmax(bc__sub_up(out->q_error, el),
                                                               bc__sub_up(eh, out->q_error)))}
                                   : none;
    return 0;
}

/* The agent's value at the initial distribution from its values' interval
 * proof (value_initial is known only once the regrets are computed). */
static int initial_interval(const bc_model *m, bc_score *out)
{
    size_t n = (size_t)(m->n_states ? m->n_states : 1);
    double *lo = malloc(n * sizeof *lo), *hi = malloc(n * sizeof *hi), b = out->values_proof.bound;
    if (!lo || !hi) {
        free(lo), free(hi);
        return -1;
    }
    for (int32_t s = 0; s < m->n_states; s++) {
        lo[s] = bc__sub_down(out->values[s], b);
        hi[s] = bc__add_up(out->values[s], b);
    }
    out->value_initial_proof =
        (bc_proof){BC_PROOF_INTERVAL, bc__initial_bound(m, lo, hi, out->value_initial)};
    free(lo), free(hi);
    return 0;
}

int bc_sc_prove_figures(const bc_model *m, const bc_qtable *q, double g_q, const uint8_t *trap,
                        bc_score *out)
{
    if (out->values_proof.kind == BC_PROOF_INTERVAL && initial_interval(m, out) < 0) {
        snprintf(out->message, sizeof out->message, "score: out of memory");
        return -1;
    }
    out->regret_initial_proof = sum_of(out->optimal_initial_proof, out->value_initial_proof,
                                       out->regret_initial);
    out->regret_max_state_proof = sum_of(out->optimum_proof.value, out->values_proof,
                                         out->regret_max_state);
    if (out->optimum_proof.has_exact && out->exact_values)
        regrets_exact(m, trap, out);
    out->residual_proof = out->q_error_proof = none;
    if (q && qtable_proofs(m, q, g_q, out) < 0) {
        snprintf(out->message, sizeof out->message, "score: out of memory proving the residual");
        return -1;
    }
    return 0;
}
