/* solve.c — choosing and running a solver, and the pieces all solvers share (sign, backups, proper policies). */
/*
 * Copyright (C) 2026 the bellcheck developers.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include <assert.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "bellcheck.h"
#include "solver_internal.h"

/* ------------------------------------------------------------------------ */
/* Methods and options                                                      */
/* ------------------------------------------------------------------------ */

static const struct {
    bc_method method;
    const char *name;
} method_names[] = {
    {BC_METHOD_AUTO, "auto"}, {BC_METHOD_VI, "vi"},       {BC_METHOD_PI, "pi"},
    {BC_METHOD_LP, "lp"},     {BC_METHOD_BACKWARD, "backward"}, {BC_METHOD_EXACT, "exact"},
};

const char *bc_method_name(bc_method m)
{
    for (size_t i = 0; i < sizeof method_names / sizeof method_names[0]; i++)
        if (method_names[i].method == m)
            return method_names[i].name;
    return "unknown";
}

int bc_method_parse(const char *s, bc_method *out)
{
    for (size_t i = 0; s && i < sizeof method_names / sizeof method_names[0]; i++) {
        if (strcmp(s, method_names[i].name) == 0) {
            *out = method_names[i].method;
            return 0;
        }
    }
    return -1;
}

void bc_solve_opts_default(bc_solve_opts *o)
{
    memset(o, 0, sizeof *o);
    o->tol = 1e-9;
}

void bc_solution_init(bc_solution *sol)
{
    memset(sol, 0, sizeof *sol);
    sol->bound = -1;
}

void bc_solution_free(bc_solution *sol)
{
    if (!sol)
        return;
    free(sol->values);
    free(sol->policy);
    free(sol->stage_policy);
    free(sol->trace);
    sol->values = NULL;
    sol->policy = NULL;
    sol->stage_policy = NULL;
    sol->trace = NULL;
    sol->n_trace = 0;
}

/* ------------------------------------------------------------------------ */
/* Dispatch                                                                 */
/* ------------------------------------------------------------------------ */

/* 1 when policy iteration is expected to cost no more than value iteration.
 * Costs in flops of LU: one value-iteration sweep touches every transition
 * at about 30 LU-flops each (random memory access), and needs about
 * ln(1e12)/(-ln g) sweeps; policy iteration takes about 6 evaluations, each a
 * factorisation (UMFPACK's symbolic estimate) plus a sweep.  The constants
 * were measured on random models of 2,000-10,000 states (3 actions, 3
 * successors) on the development machine, where the LU fill of random
 * transition graphs makes policy iteration 50-300 times slower than value
 * iteration; grid-like models have little fill and favour policy iteration.
 * Only models of at most BC_SV_SMALL_MODEL states are priced this way (see
 * bc_solve_auto_method); the count of sweeps is that of the plain stopping
 * rule, pessimistic for the MacQueen-Porteus one, which favours pi there. */
static int pi_not_dearer(const bc_model *m)
{
    double flops = bc_sv_pi_lu_flops(m);
    if (flops < 0) /* cannot tell; policy iteration will report what is wrong */
        return 1;
    double sweeps = 27.6 / -log(m->discount);
    double cost_vi = sweeps * (double)m->n_trans * 30.0;
    double cost_pi = 6.0 * (flops + 30.0 * (double)m->n_trans);
    return cost_pi <= cost_vi;
}

bc_method bc_solve_auto_method(const bc_model *m)
{
    if (m->horizon > 0)
        return BC_METHOD_BACKWARD;
    /* Only policy iteration proves a bound at discount 1. */
    if (m->discount >= 1.0)
        return BC_METHOD_PI;
    /* Small models: whichever is estimated cheaper; a factorisation of at
     * most BC_SV_SMALL_MODEL states is cheap to price and to do. */
    if (m->n_states <= BC_SV_SMALL_MODEL)
        return pi_not_dearer(m) ? BC_METHOD_PI : BC_METHOD_VI;
    /* Larger ones start with value iteration, whose Jacobi sweeps with
     * MacQueen-Porteus bounds converge at the rate the chain mixes, however
     * close g is to 1; bc_solve hands over to policy iteration, warm-started
     * from the values reached, when those bounds shrink too slowly (a
     * slow-mixing model, such as a large grid).  Pricing a factorisation up
     * front is no option: UMFPACK's symbolic analysis alone of a random
     * 200,000-state model took 26 s on the development machine. */
    return BC_METHOD_VI;
}

/* Auto for discount < 1 beyond small models: value iteration, handing over
 * to policy iteration warm-started from its values when it converges
 * slowly.  The time limit
 * covers both; sol->method and the message say which answered. */
static bc_solve_status solve_adaptive(const bc_model *m, const bc_solve_opts *o, bc_solution *sol)
{
    const double t0 = bc_sv_now();
    int slow = 0;
    bc_solve_status st = bc_sv_vi_or_handover(m, o, sol, &slow);
    if (!slow)
        return st;
    double *v0 = sol->values;
    int64_t sweeps = sol->iterations;
    bc_trace_point *vi_trace = sol->trace; /* goes before policy iteration's history */
    int64_t n_vi_trace = sol->n_trace;
    sol->values = NULL;
    sol->trace = NULL;
    bc_solution_free(sol);
    bc_solve_opts rest = *o;
    if (o->max_seconds > 0) {
        rest.max_seconds = o->max_seconds - (bc_sv_now() - t0);
        rest.max_seconds = rest.max_seconds > 1e-3 ? rest.max_seconds : 1e-3;
    }
    st = bc_sv_solve_pi_warm(m, &rest, v0, sweeps, sol);
    if (bc_sv_trace_join(sol, vi_trace, n_vi_trace) < 0) {
        /* The history is a by-product; the answer stands, and says what is missing. */
        size_t n = strlen(sol->message);
        snprintf(sol->message + n, sizeof sol->message - n,
                 " (the history of the sweeps is lost: out of memory)");
    }
    free(vi_trace);
    free(v0);
    sol->seconds = bc_sv_now() - t0;
    return st;
}

/* Solvers treat sol as output only: it is zeroed on entry (so an
 * uninitialised struct is fine) and the caller frees it with
 * bc_solution_free before reusing it. */
bc_solve_status bc_solve(const bc_model *m, bc_method method, const bc_solve_opts *o,
                         bc_solution *sol)
{
    bc_solve_opts defaults;
    if (!o) {
        bc_solve_opts_default(&defaults);
        o = &defaults;
    }
    if (method == BC_METHOD_AUTO) {
        method = bc_solve_auto_method(m);
        if (m->n_states > BC_SV_SMALL_MODEL && (method == BC_METHOD_VI || m->discount >= 1.0))
            return solve_adaptive(m, o, sol);
    }
    switch (method) {
    case BC_METHOD_VI: return bc_solve_vi(m, o, sol);
    case BC_METHOD_PI: return bc_solve_pi(m, o, sol);
    case BC_METHOD_LP: return bc_solve_lp(m, o, sol);
    case BC_METHOD_BACKWARD: return bc_solve_backward(m, o, sol);
    case BC_METHOD_EXACT: return bc_solve_exact(m, o, sol);
    case BC_METHOD_AUTO: break;
    }
    bc_solution_init(sol);
    sol->status = BC_SOLVE_FAILED;
    snprintf(sol->message, sizeof sol->message, "unknown solution method %d", (int)method);
    return BC_SOLVE_FAILED;
}

/* ------------------------------------------------------------------------ */
/* Shared by the solvers                                                    */
/* ------------------------------------------------------------------------ */

double bc_sv_now(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

const char *bc_sv_state_label(const bc_model *m, int32_t s, char *buf)
{
    if (m->state_names && s >= 0 && s < bc_names_count(m->state_names))
        return bc_names_get(m->state_names, s);
    snprintf(buf, 32, "#%d", (int)s);
    return buf;
}

void bc_sv_scales_of(const bc_model *m, bc_sv_scales *sc)
{
    sc->max_succ = 0;
    sc->reward_max = 0.0;
    for (int64_t p = 0; p < m->n_pairs; p++) {
        int64_t k = m->pair_trans_start[p + 1] - m->pair_trans_start[p];
        if (k > sc->max_succ)
            sc->max_succ = k;
        if (fabs(m->reward[p]) > sc->reward_max)
            sc->reward_max = fabs(m->reward[p]);
    }
}

bc_solve_status bc_sv_begin(const bc_model *m, bc_method method, bc_solution *sol)
{
    bc_solution_init(sol);
    sol->method = method;
    if (method == BC_METHOD_BACKWARD && m->horizon <= 0) {
        snprintf(sol->message, sizeof sol->message,
                 "backward induction needs a finite horizon; this model has none");
        return sol->status = BC_SOLVE_FAILED;
    }
    if (method != BC_METHOD_BACKWARD && m->horizon > 0) {
        snprintf(sol->message, sizeof sol->message,
                 "%s solves infinite-horizon models; this one has horizon %d (use backward)",
                 bc_method_name(method), (int)m->horizon);
        return sol->status = BC_SOLVE_FAILED;
    }
    size_t n = (size_t)m->n_states;
    sol->values = calloc(n ? n : 1, sizeof *sol->values);
    sol->policy = malloc((n ? n : 1) * sizeof *sol->policy);
    if (!sol->values || !sol->policy) {
        bc_solution_free(sol);
        snprintf(sol->message, sizeof sol->message, "out of memory for %zu states", n);
        return sol->status = BC_SOLVE_NOMEM;
    }
    for (size_t s = 0; s < n; s++)
        sol->policy[s] = -1;
    return BC_SOLVE_OK;
}

bc_solve_status bc_sv_finish(const bc_model *m, bc_solution *sol, bc_solve_status st, double t0)
{
    const double sgn = bc_sv_sign(m);
    /* The one place where values return to the model's sign.  "+ 0.0" turns
     * the -0.0 of a negated zero into +0.0, so terminal states print as 0. */
    for (int32_t s = 0; s < m->n_states; s++)
        sol->values[s] = sgn * sol->values[s] + 0.0;
    sol->value_initial = bc_model_initial_value(m, sol->values);
    sol->seconds = bc_sv_now() - t0;
    sol->status = st;
    return st;
}

void bc_sv_greedy(const bc_model *m, double sgn, const double *v, int64_t *policy)
{
    for (int32_t s = 0; s < m->n_states; s++) {
        if (m->terminal[s]) {
            policy[s] = -1;
            continue;
        }
        (void)bc_sv_backup(m, sgn, v, s, &policy[s]);
    }
}

double bc_sv_bellman(const bc_model *m, double sgn, const double *v, double *tv, double *dmin,
                     double *dmax)
{
    double lo = INFINITY, hi = -INFINITY, vmax = 0.0;
    for (int32_t s = 0; s < m->n_states; s++) {
        double t = 0.0;
        if (!m->terminal[s]) {
            int64_t p;
            t = bc_sv_backup(m, sgn, v, s, &p);
        }
        assert(!m->terminal[s] || v[s] == 0.0);
        double d = t - v[s];
        lo = d < lo ? d : lo;
        hi = d > hi ? d : hi;
        if (fabs(t) > vmax)
            vmax = fabs(t);
        if (fabs(v[s]) > vmax)
            vmax = fabs(v[s]);
        if (tv)
            tv[s] = t;
    }
    *dmin = m->n_states ? lo : 0.0;
    *dmax = m->n_states ? hi : 0.0;
    return vmax;
}

/* ------------------------------------------------------------------------ */
/* Proper policies                                                          */
/* ------------------------------------------------------------------------ */

/* pair_ok[p] = allowed and every positive-probability successor is in U. */
static void mark_pairs_inside(const bc_model *m, const uint8_t *allowed, const uint8_t *in_u,
                              uint8_t *pair_ok)
{
    for (int64_t p = 0; p < m->n_pairs; p++) {
        uint8_t ok = allowed ? allowed[p] : 1;
        for (int64_t k = m->pair_trans_start[p]; ok && k < m->pair_trans_start[p + 1]; k++)
            if (m->prob[k] > 0.0 && !in_u[m->succ_state[k]])
                ok = 0;
        pair_ok[p] = ok;
    }
}

/* Breadth-first search backwards from the terminal states over pairs marked
 * ok; in_r gets the states reached, policy the pair that reached each (a pair
 * that moves one layer closer with positive probability).  Returns the
 * number of states reached. */
static int32_t layered_search(const bc_model *m, const bc_reverse *r, const uint8_t *pair_ok,
                              uint8_t *in_r, int32_t *queue, int64_t *policy)
{
    int32_t head = 0, tail = 0;
    for (int32_t s = 0; s < m->n_states; s++) {
        policy[s] = -1;
        in_r[s] = m->terminal[s];
        if (in_r[s])
            queue[tail++] = s;
    }
    while (head < tail) {
        int32_t t = queue[head++];
        for (int64_t i = r->start[t]; i < r->start[t + 1]; i++) {
            int64_t p = r->pair_of[i];
            int32_t s = m->pair_state[p];
            if (!pair_ok[p] || in_r[s])
                continue;
            in_r[s] = 1;
            policy[s] = p;
            queue[tail++] = s;
        }
    }
    return tail;
}

int64_t bc_sv_proper_policy(const bc_model *m, const uint8_t *allowed, int64_t *policy,
                            int32_t *first_bad)
{
    const size_t n = (size_t)m->n_states;
    bc_reverse r;
    if (bc_reverse_build(m, NULL, &r) < 0)
        return -1;
    uint8_t *in_u = malloc(n ? n : 1), *in_r = malloc(n ? n : 1);
    uint8_t *pair_ok = malloc((size_t)(m->n_pairs ? m->n_pairs : 1));
    int32_t *queue = malloc((n ? n : 1) * sizeof *queue);
    if (!in_u || !in_r || !pair_ok || !queue) {
        free(in_u), free(in_r), free(pair_ok), free(queue);
        bc_reverse_free(&r);
        return -1;
    }
    /* U shrinks to the states from which the terminal set can be reached
     * while never using a pair that may leave U; at the fixed point every
     * state of U has a pair moving it strictly closer (in search layers) with
     * positive probability and staying in U, so following those pairs
     * terminates with probability 1 (the standard almost-sure reachability
     * construction).  Each round removes at least one state. */
    memset(in_u, 1, n);
    int32_t size_u = m->n_states;
    for (;;) {
        mark_pairs_inside(m, allowed, in_u, pair_ok);
        int32_t size_r = layered_search(m, &r, pair_ok, in_r, queue, policy);
        assert(size_r <= size_u);
        if (size_r == size_u)
            break;
        memcpy(in_u, in_r, n);
        size_u = size_r;
    }
    int64_t bad = 0;
    *first_bad = -1;
    for (int32_t s = 0; s < m->n_states; s++) {
        if (!m->terminal[s] && !in_u[s]) {
            if (bad++ == 0)
                *first_bad = s;
        }
    }
    free(in_u), free(in_r), free(pair_ok), free(queue);
    bc_reverse_free(&r);
    return bad;
}

int64_t bc_sv_policy_proper(const bc_model *m, const int64_t *policy, uint8_t *proper,
                            int32_t *first_bad)
{
    /* Under a fixed policy (a finite Markov chain) termination has
     * probability 1 from every state iff every state reaches a terminal state
     * with positive probability: search backwards from the terminal states
     * along the policy's edges. */
    const size_t n = (size_t)m->n_states;
    int64_t *start = calloc(n + 1, sizeof *start);
    int32_t *from = malloc((size_t)(m->n_trans ? m->n_trans : 1) * sizeof *from);
    int32_t *queue = malloc((n ? n : 1) * sizeof *queue);
    uint8_t *seen = malloc(n ? n : 1);
    if (!start || !from || !queue || !seen) {
        free(start), free(from), free(queue), free(seen);
        return -1;
    }
    for (int32_t s = 0; s < m->n_states; s++) {
        int64_t p = policy[s];
        if (m->terminal[s] || p < 0)
            continue;
        for (int64_t k = m->pair_trans_start[p]; k < m->pair_trans_start[p + 1]; k++)
            if (m->prob[k] > 0.0)
                start[m->succ_state[k] + 1]++;
    }
    for (size_t t = 0; t < n; t++)
        start[t + 1] += start[t];
    for (int32_t s = 0; s < m->n_states; s++) {
        int64_t p = policy[s];
        if (m->terminal[s] || p < 0)
            continue;
        assert(m->pair_state[p] == s);
        for (int64_t k = m->pair_trans_start[p]; k < m->pair_trans_start[p + 1]; k++)
            if (m->prob[k] > 0.0)
                from[start[m->succ_state[k]]++] = s;
    }
    for (size_t t = n; t > 0; t--)
        start[t] = start[t - 1];
    start[0] = 0;
    int32_t head = 0, tail = 0;
    for (int32_t s = 0; s < m->n_states; s++) {
        seen[s] = m->terminal[s];
        if (seen[s])
            queue[tail++] = s;
    }
    while (head < tail) {
        int32_t t = queue[head++];
        for (int64_t i = start[t]; i < start[t + 1]; i++)
            if (!seen[from[i]]) {
                seen[from[i]] = 1;
                queue[tail++] = from[i];
            }
    }
    int64_t bad = 0;
    *first_bad = -1;
    for (int32_t s = 0; s < m->n_states; s++) {
        if (proper)
            proper[s] = seen[s];
        if (!seen[s] && bad++ == 0)
            *first_bad = s;
    }
    free(start), free(from), free(queue), free(seen);
    return bad;
}

int64_t bc_sv_greedy_proper(const bc_model *m, double sgn, const double *v, double tie_tol,
                            int64_t *policy, int32_t *first_bad)
{
    const size_t n = (size_t)m->n_states;
    bc_sv_greedy(m, sgn, v, policy);
    uint8_t *proper = malloc(n ? n : 1);
    if (!proper)
        return -1;
    int64_t bad = bc_sv_policy_proper(m, policy, proper, first_bad);
    if (bad <= 0) {
        free(proper);
        return bad;
    }
    /* Repair: the states where the greedy policy terminates form a closed
     * set, so their choices stay.  Every other state takes the layered pair
     * of the proper-policy construction over near-optimal pairs; those pairs
     * only lead into states that themselves terminate, so the mix does. */
    uint8_t *allowed = calloc((size_t)(m->n_pairs ? m->n_pairs : 1), 1);
    int64_t *alt = malloc((n ? n : 1) * sizeof *alt);
    if (!allowed || !alt) {
        free(proper), free(allowed), free(alt);
        return -1;
    }
    for (int32_t s = 0; s < m->n_states; s++) {
        if (m->terminal[s])
            continue;
        double best = bc_sv_pair_q(m, sgn, v, policy[s]);
        for (int64_t p = m->state_pair_start[s]; p < m->state_pair_start[s + 1]; p++)
            allowed[p] = bc_sv_pair_q(m, sgn, v, p) >= best - tie_tol;
    }
    int32_t ignored;
    bad = bc_sv_proper_policy(m, allowed, alt, &ignored);
    if (bad >= 0) {
        for (int32_t s = 0; s < m->n_states; s++)
            if (!proper[s] && alt[s] >= 0)
                policy[s] = alt[s];
        bad = bc_sv_policy_proper(m, policy, NULL, first_bad);
    }
    free(proper), free(allowed), free(alt);
    return bad;
}
