/* prove.c — attaches a proof to a floating-point solution: exact rational verification or rigorous intervals. */
/*
 * Copyright (C) 2026 the bellcheck developers.
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The floating-point solvers find the answer; this file proves it.
 *  - exact: exact policy iteration started from the solver's policy
 *    (exact.c).  Usually one exact evaluation and one exact optimality check.
 *    The solution's values are replaced by the doubles nearest the exact
 *    optimum, so every printed value is within half an ulp of the truth.
 *  - interval: one outward-rounded pass of the Bellman operator at the
 *    solver's values (interval.c) encloses V*, encloses the policy's own
 *    value, and proves the policy's pair optimal wherever its action gap
 *    exceeds the enclosure's width.  Discount < 1 or a finite horizon; at
 *    discount 1 without an exact proof nothing is claimed ("none").
 * `auto` takes exact up to a size threshold measured in docs/methods.md and
 * falls back to intervals when the exact elimination exceeds its budget.
 */
#include "exact_internal.h"
#include "proof_internal.h"
#include "solver_internal.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

/* Transitions up to which `auto` tries the exact proof (docs/methods.md). */
#define BC_PROVE_EXACT_MAX_TRANS 5000
/* Auto at discount 1 above that size: dense lifting up to this many states (about a minute, measured). */
#define BC_PROVE_UNDISCOUNTED_DENSE 1500
/* ... and sparse elimination for at most this long (`--proof exact` has no limit). */
#define BC_PROVE_UNDISCOUNTED_SECONDS 20

const char *bc_proof_kind_name(bc_proof_kind k)
{
    switch (k) {
    case BC_PROOF_EXACT:
        return "exact";
    case BC_PROOF_INTERVAL:
        return "interval";
    default:
        return "none";
    }
}

void bc_prove_opts_default(bc_prove_opts *o)
{
    o->mode = BC_PROVE_AUTO;
    o->exact_max_trans = BC_PROVE_EXACT_MAX_TRANS;
    bc_exact_opts_default(&o->exact);
}

double bc_mpq_distance_up(double d, const mpq_t x)
{
    mpq_t t;
    mpq_init(t);
    mpq_set_d(t, d);
    mpq_sub(t, t, x);
    mpq_abs(t, t);
    double r = bc_mpq_to_double(t);
    mpq_t rq;
    mpq_init(rq);
    mpq_set_d(rq, r);
    if (mpq_cmp(rq, t) < 0) /* the nearest double fell below the distance */
        r = nextafter(r, INFINITY);
    mpq_clears(rq, t, NULL);
    return r;
}

void bc_proof_result_free(bc_proof_result *r)
{
    free(r->lower);
    free(r->upper);
    if (r->has_exact)
        bc_exact_free(&r->exact);
    memset(r, 0, sizeof *r);
}

static void proof_none(bc_proof_result *out, const char *why)
{
    out->value.kind = out->initial.kind = BC_PROOF_NONE;
    out->value.bound = out->initial.bound = -1;
    out->policy_loss = -1;
    if (why != out->message)
        snprintf(out->message, sizeof out->message, "%s", why);
}

/* Copies the exact optimum into sol as nearest doubles; enclosure = point. */
static void adopt_exact(const bc_model *m, bc_solution *sol, bc_proof_result *out)
{
    const bc_exact *x = &out->exact;
    double worst = 0.0;
    for (int32_t s = 0; s < m->n_states; s++) {
        double d = bc_mpq_to_double(x->values[s]);
        double dist = bc_mpq_distance_up(d, x->values[s]);
        out->n_corrected += sol->policy[s] != x->policy[s];
        sol->values[s] = d;
        sol->policy[s] = x->policy[s];
        out->lower[s] = dist == 0 ? d : nextafter(d, -INFINITY);
        out->upper[s] = dist == 0 ? d : nextafter(d, INFINITY);
        worst = dist > worst ? dist : worst;
    }
    if (sol->stage_policy && x->stage_policy)
        memcpy(sol->stage_policy, x->stage_policy,
               (size_t)m->horizon * (size_t)m->n_states * sizeof *sol->stage_policy);
    sol->value_initial = bc_mpq_to_double(x->value_initial);
    sol->bound = worst;
    out->value = (bc_proof){BC_PROOF_EXACT, worst};
    out->initial = (bc_proof){BC_PROOF_EXACT,
                              bc_mpq_distance_up(sol->value_initial, x->value_initial)};
    out->policy_optimal = 1;
    out->policy_loss = 0;
    out->n_proven_optimal = 0;
    for (int32_t s = 0; s < m->n_states; s++)
        out->n_proven_optimal += !m->terminal[s];
}

/* 0 proven, 1 budget exceeded (fall back), -1 failure. */
static int prove_exact(const bc_model *m, bc_solution *sol, const bc_prove_opts *o,
                       bc_proof_result *out)
{
    bc_solve_status st = bc_exact_solve(m, sol->policy, &o->exact, &out->exact);
    out->has_exact = 1;
    if (st != BC_SOLVE_OK) {
        snprintf(out->message, sizeof out->message, "exact proof: %.200s", out->exact.message);
        bc_exact_free(&out->exact);
        out->has_exact = 0;
        return st == BC_SOLVE_NOT_CONVERGED ? 1 : -1;
    }
    adopt_exact(m, sol, out);
    snprintf(out->message, sizeof out->message, "%s", out->exact.message);
    return 0;
}

/* Discounted interval proof at sol's values and policy. */
static int prove_interval_discounted(const bc_model *m, const bc_solution *sol, int sgn,
                                     const bc__enclosure *e, bc_proof_result *out)
{
    size_t n = (size_t)(m->n_states ? m->n_states : 1);
    double *v = malloc(n * sizeof *v), *margin = malloc(n * sizeof *margin);
    bc__interval_pass ps;
    int rc = -1;
    if (!v || !margin)
        goto done;
    for (int32_t s = 0; s < m->n_states; s++)
        v[s] = sgn * sol->values[s];
    if (bc__interval_check(m, e, v, sol->policy, margin, &ps) < 0) {
        snprintf(out->message, sizeof out->message, "interval proof: a value is not finite");
        rc = 1;
        goto done;
    }
    for (int32_t s = 0; s < m->n_states; s++) {
        double lo = bc__sub_down(v[s], -ps.lo), hi = bc__add_up(v[s], ps.hi);
        out->lower[s] = sgn > 0 ? lo : -hi;
        out->upper[s] = sgn > 0 ? hi : -lo;
    }
    double bound = fmax(-ps.lo, ps.hi);
    out->value = (bc_proof){BC_PROOF_INTERVAL, fmax(bound, 0.0)};
    out->initial = out->value; /* a weighted mean of the states' errors */
    out->policy_loss = bc__policy_loss(m, e, margin, &ps, &out->n_proven_optimal, &out->n_undecided);
    out->policy_optimal = out->n_undecided == 0;
    snprintf(out->message, sizeof out->message,
             "interval proof: V* - v in [%.3g, %.3g]; policy proven optimal in %d of %d states",
             ps.lo, ps.hi, (int)out->n_proven_optimal,
             (int)(out->n_proven_optimal + out->n_undecided));
    rc = 0;
done:
    free(v);
    free(margin);
    return rc;
}

/* Finite-horizon interval proof (stage 0). */
static int prove_interval_horizon(const bc_model *m, const bc_solution *sol, int sgn,
                                  const bc__enclosure *e, bc_proof_result *out)
{
    size_t n = (size_t)(m->n_states ? m->n_states : 1);
    double *lo = malloc(n * sizeof *lo), *hi = malloc(n * sizeof *hi);
    double *plo = malloc(n * sizeof *plo), *phi = malloc(n * sizeof *phi);
    int rc = (lo && hi && plo && phi && sol->stage_policy) ? 0 : -1;
    if (rc == 0 && bc__interval_backward(m, e, sol->stage_policy, lo, hi, plo, phi) < 0)
        rc = 1;
    double bound = 0, loss = 0;
    for (int32_t s = 0; rc == 0 && s < m->n_states; s++) {
        double v = sgn * sol->values[s];
        bound = fmax(bound, fmax(bc__sub_up(v, lo[s]), bc__sub_up(hi[s], v)));
        loss = fmax(loss, bc__sub_up(hi[s], plo[s]));
        out->lower[s] = sgn > 0 ? lo[s] : -hi[s];
        out->upper[s] = sgn > 0 ? hi[s] : -lo[s];
    }
    if (rc == 0) {
        out->value = (bc_proof){BC_PROOF_INTERVAL, bound};
        out->initial = out->value;
        out->policy_loss = loss;
        snprintf(out->message, sizeof out->message,
                 "interval proof over %d stages: values within %.3g, policy within %.3g",
                 (int)m->horizon, bound, loss);
    }
    free(lo), free(hi), free(plo), free(phi);
    return rc;
}

/* N = expected steps to termination under pi: (I - P_pi) N = 1, in floating
 * point (the same sparse LU as policy iteration); 0, or -1. */
static int expected_steps(const bc_model *m, const int64_t *pi, double *N)
{
    size_t n = (size_t)(m->n_states ? m->n_states : 1);
    double *prob = calloc((size_t)(m->n_pairs ? m->n_pairs : 1), sizeof *prob);
    double *ones = malloc(n * sizeof *ones);
    bc_sv_eval *w = bc_sv_eval_new(m, NULL, 1);
    char why[256];
    int rc = -1;
    if (prob && ones && w) {
        for (int32_t s = 0; s < m->n_states; s++) {
            ones[s] = 1.0;
            if (pi[s] >= 0)
                prob[pi[s]] = 1.0;
        }
        if (bc_sv_eval_factorise(m, w, prob, why, sizeof why) == BC_SOLVE_OK &&
            bc_sv_eval_solve(m, w, 0, ones, N) == 0)
            rc = 0;
    }
    bc_sv_eval_free(w);
    free(prob), free(ones);
    return rc;
}

/* Discount 1 (no contraction).  With pi terminating and N its expected
 * steps, a proven c > 0 with (I - P_pi) N >= c makes (I - P_pi)^{-1} 1 <= N/c
 * ((I - P_pi)^{-1} is non-negative).  Then
 *   V^pi - v = (I - P_pi)^{-1} (T_pi v - v) >= pmin N / c   (pmin <= 0), and
 *   W = v + eps N with T W <= W (checked by an interval pass) bounds every
 *   terminating policy's value from above (W >= T_mu W, iterate), so V* <= W.
 * eps starts at what pi's own residual needs (pmax / c) and grows a few
 * times; the check fails where another action ties with pi's but leads to
 * states with more expected steps, and the proof is then "none". */
static int prove_interval_undiscounted(const bc_model *m, const bc_solution *sol, int sgn,
                                       const bc__enclosure *e, bc_proof_result *out)
{
    size_t n = (size_t)(m->n_states ? m->n_states : 1);
    double *v = malloc(n * sizeof *v), *N = malloc(n * sizeof *N), *W = malloc(n * sizeof *W);
    double *margin = malloc(n * sizeof *margin);
    int32_t bad = -1;
    int rc = -1;
    if (!v || !N || !W || !margin)
        goto done;
    rc = 1;
    snprintf(out->message, sizeof out->message, "interval proof at discount 1: the policy does "
             "not terminate, or its expected steps cannot be had");
    if (bc_sv_policy_proper(m, sol->policy, NULL, &bad) != 0 || expected_steps(m, sol->policy, N) < 0)
        goto done;
    for (int32_t s = 0; s < m->n_states; s++)
        v[s] = sgn * sol->values[s];
    bc__interval_pass ps;
    double c = bc__interval_policy_drop(m, e, sol->policy, N);
    if (!(c > 0) || bc__interval_check(m, e, v, sol->policy, margin, &ps) < 0)
        goto done;
    double nmax = 0;
    for (int32_t s = 0; s < m->n_states; s++)
        nmax = fmax(nmax, N[s]);
    double low = ps.pmin < 0 ? nextafter(-ps.pmin / c, INFINITY) : 0.0; /* v - V^pi <= low N */
    double eps = ps.pmax > 0 ? nextafter(ps.pmax / c, INFINITY) : 0.0;
    int held = 0;
    for (int k = 0; k < 6 && !held; k++, eps = eps > 0 ? eps * 8 : 1e-300) {
        for (int32_t s = 0; s < m->n_states; s++)
            W[s] = bc__add_up(v[s], nextafter(eps * N[s], INFINITY));
        bc__interval_pass pw;
        held = bc__interval_check(m, e, W, sol->policy, NULL, &pw) == 0 && pw.dmax <= 0;
    }
    if (!held) {
        snprintf(out->message, sizeof out->message, "interval proof at discount 1 failed: an "
                 "action ties with the policy's but takes longer (use --proof exact)");
        goto done;
    }
    double up_bound = 0, low_bound = 0;
    for (int32_t s = 0; s < m->n_states; s++) {
        double lo = bc__sub_down(v[s], nextafter(low * N[s], INFINITY));
        up_bound = fmax(up_bound, bc__sub_up(W[s], v[s]));
        low_bound = fmax(low_bound, bc__sub_up(v[s], lo));
        out->lower[s] = sgn > 0 ? lo : -W[s];
        out->upper[s] = sgn > 0 ? W[s] : -lo;
    }
    out->value = (bc_proof){BC_PROOF_INTERVAL, fmax(up_bound, low_bound)};
    out->initial = out->value;
    ps.lo = -low_bound, ps.hi = up_bound, ps.plo = -low_bound;
    out->policy_loss = bc__policy_loss(m, e, margin, &ps, &out->n_proven_optimal,
                                       &out->n_undecided);
    out->policy_optimal = out->n_undecided == 0;
    snprintf(out->message, sizeof out->message,
             "interval proof at discount 1: V* - v in [%.3g, %.3g] (expected steps up to %.4g); "
             "policy proven optimal in %d of %d states", -low_bound, up_bound, nmax,
             (int)out->n_proven_optimal, (int)(out->n_proven_optimal + out->n_undecided));
    rc = 0;
done:
    free(v), free(N), free(W), free(margin);
    return rc;
}

static int prove_interval(const bc_model *m, bc_solution *sol, bc_proof_result *out)
{
    const int sgn = m->objective == BC_MIN ? -1 : 1;
    bc__enclosure e;
    int built = bc__enclosure_build(m, sgn, &e);
    if (built == -2) {
        char why[240];
        snprintf(why, sizeof why, "no interval proof: %.200s", e.why); /* fits out->message */
        proof_none(out, why);
        return 0;
    }
    if (built < 0)
        return -1;
    int rc = m->horizon > 0       ? prove_interval_horizon(m, sol, sgn, &e, out)
             : m->discount >= 1.0 ? prove_interval_undiscounted(m, sol, sgn, &e, out)
                                  : prove_interval_discounted(m, sol, sgn, &e, out);
    bc__enclosure_free(&e);
    if (rc > 0)
        proof_none(out, out->message);
    return rc < 0 ? -1 : 0;
}

/* The common end of a proof: the initial value's bound and the time. */
static int finish(const bc_model *m, const bc_solution *sol, bc_proof_result *out, double t0)
{
    if (out->value.kind == BC_PROOF_INTERVAL)
        out->initial.bound = bc__initial_bound(m, out->lower, out->upper, sol->value_initial);
    out->seconds = bc__exact_now() - t0;
    return 0;
}

int bc_prove_solution(const bc_model *m, bc_solution *sol, const bc_prove_opts *o,
                      bc_proof_result *out)
{
    bc_prove_opts dflt;
    if (!o) {
        bc_prove_opts_default(&dflt);
        o = &dflt;
    }
    memset(out, 0, sizeof *out);
    const double t0 = bc__exact_now();
    size_t n = (size_t)(m->n_states ? m->n_states : 1);
    out->lower = malloc(n * sizeof *out->lower);
    out->upper = malloc(n * sizeof *out->upper);
    if (!out->lower || !out->upper) {
        snprintf(out->message, sizeof out->message, "out of memory");
        return -1;
    }
    if (o->mode == BC_PROVE_OFF || !sol->values || !sol->policy ||
        (sol->status != BC_SOLVE_OK && sol->status != BC_SOLVE_NOT_CONVERGED)) {
        proof_none(out, "no proof asked for");
        return 0;
    }
    if (o->mode == BC_PROVE_EXACT)
        return prove_exact(m, sol, o, out) == 0 ? finish(m, sol, out, t0) : -1;
    if (o->mode == BC_PROVE_INTERVAL)
        return prove_interval(m, sol, out) < 0 ? -1 : finish(m, sol, out, t0);
    /* auto: exact on small models, intervals on large ones; at discount 1,
     * where the interval proof can fail on ties, exact is the fallback,
     * within a smaller dense limit and a time limit. */
    char exact_why[256] = "";
    int rc = 1; /* 1: not proven yet */
    if (m->n_trans <= o->exact_max_trans) {
        rc = prove_exact(m, sol, o, out);
        if (rc != 0)
            snprintf(exact_why, sizeof exact_why, "%.200s", out->message);
    }
    if (rc != 0 && prove_interval(m, sol, out) < 0)
        return -1;
    int undiscounted = m->horizon == 0 && m->discount >= 1.0;
    if (rc != 0 && out->value.kind == BC_PROOF_NONE && undiscounted && !exact_why[0]) {
        bc_prove_opts eo = *o;
        if (eo.exact.max_dense == 0 || eo.exact.max_dense > BC_PROVE_UNDISCOUNTED_DENSE)
            eo.exact.max_dense = BC_PROVE_UNDISCOUNTED_DENSE;
        if (eo.exact.max_seconds == 0 || eo.exact.max_seconds > BC_PROVE_UNDISCOUNTED_SECONDS)
            eo.exact.max_seconds = BC_PROVE_UNDISCOUNTED_SECONDS;
        char interval_why[128];
        snprintf(interval_why, sizeof interval_why, "%.120s", out->message);
        if (prove_exact(m, sol, &eo, out) != 0) {
            char both[256];
            snprintf(both, sizeof both, "%s; %.120s", interval_why, out->message);
            proof_none(out, both);
        }
    }
    if (exact_why[0] && out->value.kind != BC_PROOF_EXACT) {
        size_t len = strlen(out->message);
        snprintf(out->message + len, sizeof out->message - len, " (%s)", exact_why);
    }
    return finish(m, sol, out, t0);
}

bc_solve_status bc_solve_exact(const bc_model *m, const bc_solve_opts *o, bc_solution *sol)
{
    bc_solve_status st = bc_solve(m, BC_METHOD_AUTO, o, sol);
    if (st != BC_SOLVE_OK)
        return st;
    bc_prove_opts po;
    bc_prove_opts_default(&po);
    po.mode = BC_PROVE_EXACT;
    if (o && o->max_seconds > 0)
        po.exact.max_seconds = o->max_seconds;
    bc_proof_result pr;
    int rc = bc_prove_solution(m, sol, &po, &pr);
    char base[64];
    snprintf(base, sizeof base, "%s", bc_method_name(sol->method));
    sol->method = BC_METHOD_EXACT;
    if (rc < 0) {
        snprintf(sol->message, sizeof sol->message, "%.250s", pr.message);
        sol->status = BC_SOLVE_FAILED;
    } else {
        snprintf(sol->message, sizeof sol->message, "%.200s, started from %.40s", pr.message, base);
    }
    sol->seconds += pr.seconds;
    bc_proof_result_free(&pr);
    return sol->status;
}
