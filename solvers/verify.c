/* verify.c — re-checks an optimality certificate in one pass of the Bellman conditions, without solving. */
/*
 * Copyright (C) 2026 the bellcheck developers.
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Exact certificate (values v, policy pi), in the maximising convention:
 *   (1) v = 0 at terminal states;
 *   (2) v(s) = Q(s, pi(s)) exactly: v is the value of pi (discount < 1: the
 *       unique fixed point of T_pi; discount 1: also needs (3));
 *   (3) discount 1: pi reaches a terminal state with probability 1 (a graph
 *       search over the transitions of positive probability);
 *   (4) Q(s, a) <= v(s) for every pair: v >= T v, so v >= V* (discount < 1:
 *       T is a monotone contraction; discount 1: v >= T_mu v for every
 *       terminating mu, and iterating gives v >= V^mu).
 * (2)-(4) give V^pi = v >= V* >= V^pi: v is V* and pi is optimal.
 * Interval certificate: one outward-rounded pass (interval.c) proves its own
 * bound on |v - V*| and on the policy's loss; the claim holds when those are
 * no larger than the certificate's.
 */
#include "exact_internal.h"
#include "proof_internal.h"
#include "solver_internal.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

static int bad(bc_verdict *v, int32_t s, const char *fmt, const char *a, const char *b)
{
    v->holds = 0;
    v->first_bad_state = s;
    snprintf(v->message, sizeof v->message, fmt, a, b);
    return 0;
}

/* Conditions (1), (2), (4) at state s; returns 1 when they hold. */
static int state_holds(const bc_model *m, const bc_certificate *c, int sgn, const mpq_t g,
                       const mpq_t *v, int32_t s, mpq_t q, mpq_t t, bc_verdict *out)
{
    const char *name = bc_names_get(m->state_names, s);
    if (m->terminal[s]) {
        if (mpq_sgn(v[s]) == 0)
            return 1;
        return bad(out, s, "state %s is terminal, but its certified value is not 0%s", name, "");
    }
    for (int64_t p = m->state_pair_start[s]; p < m->state_pair_start[s + 1]; p++) {
        bc__exact_pair_q(m, sgn, g, v, p, q, t);
        out->pairs_checked++;
        int cmp = mpq_cmp(q, v[s]);
        const char *act = bc_names_get(m->action_names, m->pair_action[p]);
        if (p == c->policy[s] && cmp != 0)
            return bad(out, s, "at state %s the certified value is not the value of its action "
                               "%s (Bellman equation fails)", name, act);
        if (cmp > 0)
            return bad(out, s, "at state %s action %s does better than the certified value "
                               "(optimality fails)", name, act);
    }
    return 1;
}

static int verify_exact(const bc_model *m, const bc_certificate *c, bc_verdict *out)
{
    const int sgn = m->objective == BC_MIN ? -1 : 1;
    mpq_t *v = malloc((size_t)(m->n_states ? m->n_states : 1) * sizeof *v);
    if (!v)
        return -1;
    for (int32_t s = 0; s < m->n_states; s++) {
        mpq_init(v[s]);
        mpq_set(v[s], c->exact_values[s]);
        if (sgn < 0)
            mpq_neg(v[s], v[s]);
    }
    mpq_t g, q, t;
    mpq_inits(g, q, t, NULL);
    bc_num_to_mpq(g, m->discount_exact, m->big);
    out->holds = 1;
    int stopped = 0;
    for (int32_t s = 0; s < m->n_states && out->holds; s++) {
        if (bc_stop_requested()) { /* a large model's exact pass takes seconds to minutes */
            out->holds = 0;
            snprintf(out->message, sizeof out->message, "stopped on request after %lld of %lld "
                     "states", (long long)s, (long long)m->n_states);
            stopped = 1;
            break;
        }
        state_holds(m, c, sgn, g, (const mpq_t *)v, s, q, t, out);
    }
    int32_t first = -1;
    if (out->holds && m->discount >= 1.0) {
        int64_t nbad = bc_sv_policy_proper(m, c->policy, NULL, &first);
        if (nbad < 0)
            out->holds = -1;
        else if (nbad > 0)
            bad(out, first, "the policy never reaches a terminal state from state %s%s",
                bc_names_get(m->state_names, first), "");
    }
    if (out->holds == 1)
        snprintf(out->message, sizeof out->message,
                 "exact: the certified values are V* at every state and the policy is optimal "
                 "(%lld pairs checked)", (long long)out->pairs_checked);
    for (int32_t s = 0; s < m->n_states; s++)
        mpq_clear(v[s]);
    free(v);
    mpq_clears(g, q, t, NULL);
    return stopped ? -2 : out->holds < 0 ? -1 : 0;
}

static int verify_interval(const bc_model *m, const bc_certificate *c, bc_verdict *out)
{
    if (m->discount >= 1.0 || m->horizon > 0)
        return bad(out, -1, "an interval certificate needs a discount below 1 and no horizon%s%s",
                   "", "");
    const int sgn = m->objective == BC_MIN ? -1 : 1;
    bc__enclosure e;
    size_t n = (size_t)(m->n_states ? m->n_states : 1);
    double *v = malloc(n * sizeof *v), *margin = malloc(n * sizeof *margin);
    int built = v && margin ? bc__enclosure_build(m, sgn, &e) : -1;
    if (built < 0) {
        free(v);
        free(margin);
        if (built == -2)
            return bad(out, -1, "cannot check: %.200s%s", e.why, "");
        return -1;
    }
    for (int32_t s = 0; s < m->n_states; s++)
        v[s] = sgn * c->values[s];
    bc__interval_pass ps;
    int32_t n_proven, n_undecided;
    int finite = bc__interval_check(m, &e, v, c->policy, margin, &ps) == 0;
    out->policy_loss = bc__policy_loss(m, &e, margin, &ps, &n_proven, &n_undecided);
    bc__enclosure_free(&e);
    free(v);
    free(margin);
    out->pairs_checked = m->n_pairs;
    out->bound = fmax(0.0, fmax(-ps.lo, ps.hi));
    char a[64], b[64];
    snprintf(a, sizeof a, "%.3g", out->bound);
    snprintf(b, sizeof b, "%.3g", c->bound);
    if (!finite)
        return bad(out, ps.worst_state, "a value is not finite%s%s", "", "");
    if (out->bound > c->bound)
        return bad(out, ps.worst_state, "the values are proven within %s of V* only, not the "
                   "certified %s (largest Bellman residual at the state named)", a, b);
    snprintf(a, sizeof a, "%.3g", out->policy_loss);
    snprintf(b, sizeof b, "%.3g", c->policy_loss);
    if (out->policy_loss > c->policy_loss)
        return bad(out, ps.worst_state, "the policy is proven within %s of optimal only, not the "
                   "certified %s", a, b);
    out->holds = 1;
    snprintf(out->message, sizeof out->message,
             "interval: the values are within %.3g of V* and the policy within %.3g of optimal",
             out->bound, out->policy_loss);
    return 0;
}

int bc_verify_certificate(const bc_model *m, const bc_certificate *c, bc_verdict *v)
{
    memset(v, 0, sizeof *v);
    v->first_bad_state = -1;
    const double t0 = bc__exact_now();
    int rc = c->kind == BC_PROOF_EXACT ? verify_exact(m, c, v) : verify_interval(m, c, v);
    v->seconds = bc__exact_now() - t0;
    return rc;
}
