/* pi.c — Howard's policy iteration: sparse LU policy evaluation (UMFPACK) and strict-improvement steps. */
/*
 * Copyright (C) 2026 the bellcheck developers.
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Evaluation solves (I - g P_pi) v = r_pi over the non-terminal states
 * (terminal values are 0) with UMFPACK and two steps of iterative
 * refinement; the residual ||(I - g P_pi) v - r_pi||_inf is then recomputed
 * from the model itself.  Improvement switches a state's pair only when
 * another pair beats it by more than eps (see improve()), so ties keep the
 * current pair — that is what keeps the method out of zero-reward loops at
 * discount 1, where it must start from, and keep to, policies that
 * terminate with probability 1 (Howard 1960; Puterman 1994, ch. 6 and 7).
 * The same evaluation, for stochastic policies over any set of states,
 * serves scoring through bc_sv_eval_* (solver_internal.h).
 *
 * Bounds.  Let res be the evaluation residual and gain the largest
 * improvement any pair still offers at the end (computed at v).
 *  discount g < 1:  |v - V*| <= (res + gain)/(1-g).  Lower side: V* >= V^pi
 *    >= v - res/(1-g).  Upper side: MacQueen's bound at v gives V* <= Tv +
 *    g/(1-g) max(Tv - v), and Tv - v <= res + gain, Tv <= v + res + gain.
 *    In floating point, Tv(s) - v(s) <= (q_cur - v) + (q_best - q_cur) + e
 *    with the computed q's and e = bc_sv_backup_error, so one e is added.
 *  discount 1:  |v - V^pi| <= res * max_s N(s), N the expected number of
 *    steps to termination under pi: v - V^pi = (I-P)^{-1} e with
 *    (I-P)^{-1} >= 0 and (I-P)^{-1} 1 = N.  That V^pi = V* rests on no pair
 *    improving by more than eps; exact verification is the verifier's job.
 */
#include <assert.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include <umfpack.h>

#include "bellcheck.h"
#include "solver_internal.h"

/* Workspace of one run; the linear system lives over the n states of the
 * system (policy iteration: the non-terminal states), numbered in state
 * order.  Scoring uses the same workspace through bc_sv_eval_*. */
typedef struct bc_sv_eval {
    int32_t n;
    int32_t *col_of;   /* [n_states] index among the system's states, -1 outside */
    int32_t *state_of; /* [n] */
    int64_t nnz_max;   /* per system state 1 + its largest successor count (all
                        * its successor counts when stochastic), summed */
    int64_t *row_start;            /* [n+1] rows of A = I - g P_pi, duplicates merged */
    int32_t *row_col;              /* [nnz_max] */
    double *row_val;               /* [nnz_max] */
    int64_t *pos;                  /* [n] where column j sits in the current row */
    SuiteSparse_long *Ap, *Ai;     /* A by columns for UMFPACK: [n+1], [nnz_max] */
    double *Ax;                    /* [nnz_max] */
    double *b, *x;                 /* [n] */
    void *numeric;                 /* LU factors of the last evaluated policy, or NULL */
    double control[UMFPACK_CONTROL];
    double info[UMFPACK_INFO];
} pi_work;

static void pi_work_free(pi_work *w)
{
    if (w->numeric)
        umfpack_dl_free_numeric(&w->numeric);
    free(w->col_of), free(w->state_of), free(w->row_start), free(w->row_col);
    free(w->row_val), free(w->pos), free(w->Ap), free(w->Ai), free(w->Ax);
    free(w->b), free(w->x);
    memset(w, 0, sizeof *w);
}

/* in_system NULL: the non-terminal states.  stochastic: room for rows that
 * mix every pair of their state. */
static int pi_work_alloc(const bc_model *m, const uint8_t *in_system, int stochastic, pi_work *w)
{
    memset(w, 0, sizeof *w);
    w->col_of = malloc((size_t)(m->n_states ? m->n_states : 1) * sizeof *w->col_of);
    if (!w->col_of)
        return -1;
    for (int32_t s = 0; s < m->n_states; s++) {
        int in = in_system ? in_system[s] : !m->terminal[s];
        w->col_of[s] = in ? w->n++ : -1;
        if (!in)
            continue;
        int64_t widest = 0, all = 0;
        for (int64_t p = m->state_pair_start[s]; p < m->state_pair_start[s + 1]; p++) {
            int64_t k = m->pair_trans_start[p + 1] - m->pair_trans_start[p];
            widest = k > widest ? k : widest;
            all += k;
        }
        w->nnz_max += 1 + (stochastic ? all : widest);
    }
    size_t n = (size_t)(w->n ? w->n : 1), z = (size_t)(w->nnz_max ? w->nnz_max : 1);
    w->state_of = malloc(n * sizeof *w->state_of);
    w->row_start = malloc((n + 1) * sizeof *w->row_start);
    w->row_col = malloc(z * sizeof *w->row_col);
    w->row_val = malloc(z * sizeof *w->row_val);
    w->pos = malloc(n * sizeof *w->pos);
    w->Ap = malloc((n + 1) * sizeof *w->Ap);
    w->Ai = malloc(z * sizeof *w->Ai);
    w->Ax = malloc(z * sizeof *w->Ax);
    w->b = malloc(n * sizeof *w->b);
    w->x = malloc(n * sizeof *w->x);
    if (!w->state_of || !w->row_start || !w->row_col || !w->row_val || !w->pos || !w->Ap ||
        !w->Ai || !w->Ax || !w->b || !w->x) {
        pi_work_free(w);
        return -1;
    }
    for (int32_t s = 0; s < m->n_states; s++)
        if (w->col_of[s] >= 0)
            w->state_of[w->col_of[s]] = s;
    umfpack_dl_defaults(w->control);
    w->control[UMFPACK_IRSTEP] = 2;
    w->control[UMFPACK_PRL] = 0;
    return 0;
}

/* Adds -g * weight * P(.|p) to row i (which is open at the end of the row
 * arrays): repeated successors and the diagonal are merged, pos[j] >=
 * row_start[i] meaning column j already has a slot in row i; successors
 * outside the system are dropped.  Returns the new number of entries. */
static int64_t add_pair_to_row(const bc_model *m, pi_work *w, int32_t i, int64_t p, double weight,
                               int64_t nz)
{
    const double g = m->discount;
    for (int64_t k = m->pair_trans_start[p]; k < m->pair_trans_start[p + 1]; k++) {
        int32_t j = w->col_of[m->succ_state[k]];
        if (j < 0)
            continue;
        if (w->pos[j] >= w->row_start[i]) {
            w->row_val[w->pos[j]] -= g * weight * m->prob[k];
        } else {
            w->pos[j] = nz;
            w->row_col[nz] = j;
            w->row_val[nz++] = -g * weight * m->prob[k];
        }
    }
    return nz;
}

/* Opens row i of A with its diagonal 1; returns the new number of entries. */
static int64_t open_row(pi_work *w, int32_t i, int64_t nz)
{
    w->row_start[i] = nz;
    w->pos[i] = nz;
    w->row_col[nz] = i;
    w->row_val[nz++] = 1.0;
    return nz;
}

/* Transposes the nz entries of A's rows into the columns UMFPACK wants; a
 * counting-sort transpose leaves the row indices of each column sorted, as
 * UMFPACK requires. */
static void rows_to_columns(pi_work *w, int64_t nz)
{
    w->row_start[w->n] = nz;
    assert(nz <= w->nnz_max);
    memset(w->Ap, 0, ((size_t)w->n + 1) * sizeof *w->Ap);
    for (int64_t e = 0; e < nz; e++)
        w->Ap[w->row_col[e] + 1]++;
    for (int32_t j = 0; j < w->n; j++)
        w->Ap[j + 1] += w->Ap[j];
    for (int32_t i = 0; i < w->n; i++) {
        for (int64_t e = w->row_start[i]; e < w->row_start[i + 1]; e++) {
            SuiteSparse_long at = w->Ap[w->row_col[e]]++;
            w->Ai[at] = i;
            w->Ax[at] = w->row_val[e];
        }
    }
    for (int32_t j = w->n; j > 0; j--)
        w->Ap[j] = w->Ap[j - 1];
    w->Ap[0] = 0;
}

/* Fills A = I - g P_pi for the deterministic policy; b gets r_pi in the
 * maximising convention. */
static void build_system(const bc_model *m, pi_work *w, double sgn, const int64_t *policy)
{
    int64_t nz = 0;
    for (int32_t j = 0; j < w->n; j++)
        w->pos[j] = -1;
    for (int32_t i = 0; i < w->n; i++) {
        int64_t p = policy[w->state_of[i]];
        assert(p >= 0 && m->pair_state[p] == w->state_of[i]);
        nz = open_row(w, i, nz);
        nz = add_pair_to_row(m, w, i, p, 1.0, nz);
        w->b[i] = bc_sv_reward(m, sgn, p);
    }
    rows_to_columns(w, nz);
}

/* Fills A = I - g P_pi for the stochastic policy prob (per pair); b is left
 * to the caller. */
static void build_system_mixed(const bc_model *m, pi_work *w, const double *prob)
{
    int64_t nz = 0;
    for (int32_t j = 0; j < w->n; j++)
        w->pos[j] = -1;
    for (int32_t i = 0; i < w->n; i++) {
        int32_t s = w->state_of[i];
        nz = open_row(w, i, nz);
        for (int64_t p = m->state_pair_start[s]; p < m->state_pair_start[s + 1]; p++)
            if (prob[p] > 0.0)
                nz = add_pair_to_row(m, w, i, p, prob[p], nz);
    }
    rows_to_columns(w, nz);
}

/* Factorises A (replacing the previous factors).  Returns BC_SOLVE_OK, or
 * BC_SOLVE_FAILED / BC_SOLVE_NOMEM with why[] saying what went wrong. */
static bc_solve_status factorise(pi_work *w, char *why, size_t cap)
{
    void *symbolic = NULL;
    if (w->numeric)
        umfpack_dl_free_numeric(&w->numeric);
    SuiteSparse_long st = umfpack_dl_symbolic(w->n, w->n, w->Ap, w->Ai, w->Ax, &symbolic,
                                              w->control, w->info);
    if (st == UMFPACK_OK)
        st = umfpack_dl_numeric(w->Ap, w->Ai, w->Ax, symbolic, &w->numeric, w->control, w->info);
    if (symbolic)
        umfpack_dl_free_symbolic(&symbolic);
    double rcond = w->info[UMFPACK_RCOND];
    if (st == UMFPACK_OK && !(rcond >= DBL_EPSILON)) /* also catches NaN */
        st = UMFPACK_WARNING_singular_matrix;
    if (st == UMFPACK_OK)
        return BC_SOLVE_OK;
    if (w->numeric)
        umfpack_dl_free_numeric(&w->numeric);
    if (st == UMFPACK_WARNING_singular_matrix)
        snprintf(why, cap, "the matrix I - gP of the policy is singular (reciprocal condition %.3g)",
                 rcond);
    else if (st == UMFPACK_ERROR_out_of_memory)
        snprintf(why, cap, "out of memory in the sparse LU factorisation");
    else
        snprintf(why, cap, "sparse LU factorisation failed (UMFPACK status %ld)", (long)st);
    return st == UMFPACK_ERROR_out_of_memory ? BC_SOLVE_NOMEM : BC_SOLVE_FAILED;
}

/* Solves A x = b (sys UMFPACK_A) or A^T x = b (UMFPACK_At) with the current
 * factors (iterative refinement included) and scatters x into v by state
 * (0 outside the system).  0 or -1. */
static int solve_into(const bc_model *m, pi_work *w, int sys, double *v)
{
    SuiteSparse_long st = umfpack_dl_solve(sys, w->Ap, w->Ai, w->Ax, w->x, w->b, w->numeric,
                                           w->control, w->info);
    if (st != UMFPACK_OK)
        return -1;
    for (int32_t s = 0; s < m->n_states; s++)
        v[s] = w->col_of[s] >= 0 ? w->x[w->col_of[s]] : 0.0;
    for (int32_t i = 0; i < w->n; i++)
        if (!isfinite(w->x[i]))
            return -1;
    return 0;
}

/* max_s |r_pi(s) + g P_pi v(s) - v(s)|, computed from the model (not from
 * the matrix), so it also checks build_system. */
static double eval_residual(const bc_model *m, double sgn, const double *v, const int64_t *policy)
{
    double res = 0.0;
    for (int32_t s = 0; s < m->n_states; s++) {
        if (m->terminal[s])
            continue;
        double e = fabs(bc_sv_pair_q(m, sgn, v, policy[s]) - v[s]);
        res = e > res ? e : res;
    }
    return res;
}

/* Howard's improvement step: a state switches to its best pair (first of
 * equals) only if that beats the current pair by more than eps; returns how
 * many switched and the largest gain offered (switched or not) in *gain. */
static int64_t improve(const bc_model *m, double sgn, const double *v, double eps, int64_t *policy,
                       double *gain)
{
    int64_t changed = 0;
    double most = 0.0;
    for (int32_t s = 0; s < m->n_states; s++) {
        if (m->terminal[s])
            continue;
        int64_t best_pair;
        double best = bc_sv_backup(m, sgn, v, s, &best_pair);
        double g = best - bc_sv_pair_q(m, sgn, v, policy[s]);
        most = g > most ? g : most;
        if (g > eps) {
            policy[s] = best_pair;
            changed++;
        }
    }
    *gain = most;
    return changed;
}

/* Discount 1: max_s N(s) for the factorised policy, N the expected number of
 * steps to termination, (I - P) N = 1, bounded above rigorously: the
 * computed N has residual rN, so the true N satisfies N <= N~ + rN max N,
 * i.e. max N <= max N~ / (1 - rN).  Returns -1 if that cannot be bounded. */
static double max_steps_bound(const bc_model *m, pi_work *w, const bc_sv_scales *sc,
                              const int64_t *policy, double *steps)
{
    for (int32_t i = 0; i < w->n; i++)
        w->b[i] = 1.0;
    if (solve_into(m, w, UMFPACK_A, steps) < 0)
        return -1;
    double nmax = 0.0, rn = 0.0;
    for (int32_t s = 0; s < m->n_states; s++) {
        if (m->terminal[s])
            continue;
        double acc = 0.0;
        for (int64_t k = m->pair_trans_start[policy[s]]; k < m->pair_trans_start[policy[s] + 1]; k++)
            acc += m->prob[k] * steps[m->succ_state[k]];
        rn = fmax(rn, fabs(1.0 + acc - steps[s]));
        nmax = fmax(nmax, fabs(steps[s]));
    }
    rn += (double)(sc->max_succ + 4) * DBL_EPSILON * (1.0 + nmax);
    return rn < 0.5 ? nmax / (1.0 - rn) : -1;
}

/* Replaces policy's pairs at the states from which it does not terminate
 * by those of bc_sv_proper_policy.  The terminating states are closed under
 * policy and keep their pairs; from a patched state the proper pair reaches,
 * with positive probability, a state nearer the terminal set (patched) or a
 * terminating one, so the result terminates everywhere some policy does.
 * 0 when it does (checked), else -1 (also when out of memory). */
static int patch_loops(const bc_model *m, int64_t *policy)
{
    const size_t n = (size_t)(m->n_states ? m->n_states : 1);
    uint8_t *ends = malloc(n);
    int64_t *proper = malloc(n * sizeof *proper);
    int32_t bad = -1;
    int rc = -1;
    if (ends && proper && bc_sv_policy_proper(m, policy, ends, &bad) >= 0 &&
        bc_sv_proper_policy(m, NULL, proper, &bad) == 0) {
        for (int32_t s = 0; s < m->n_states; s++)
            if (!ends[s] && !m->terminal[s])
                policy[s] = proper[s];
        rc = bc_sv_policy_proper(m, policy, NULL, &bad) == 0 ? 0 : -1;
    }
    free(ends), free(proper);
    return rc;
}

/* The starting policy: greedy on v0 (discount < 1; v0 NULL: on immediate
 * reward), or one that terminates with probability 1 (discount 1).  0, or a
 * failure status with the message set. */
static bc_solve_status start_policy(const bc_model *m, double sgn, const double *v0,
                                    bc_solution *sol)
{
    if (m->discount < 1.0) {
        bc_sv_greedy(m, sgn, v0 ? v0 : sol->values, sol->policy); /* sol->values are 0 here */
        return BC_SOLVE_OK;
    }
    int32_t bad = -1;
    if (v0) {
        /* Greedy on v0 where that terminates, ties broken towards the
         * terminal states, the usual start's pairs where it still loops. */
        bc_sv_scales sc;
        bc_sv_scales_of(m, &sc);
        double vmax = 0.0;
        for (int32_t s = 0; s < m->n_states; s++)
            vmax = fmax(vmax, fabs(v0[s]));
        double tie = 1e-9 * (vmax + sc.reward_max);
        int64_t n_loop = bc_sv_greedy_proper(m, sgn, v0, tie, sol->policy, &bad);
        if (n_loop == 0 || (n_loop > 0 && patch_loops(m, sol->policy) == 0))
            return BC_SOLVE_OK;
    }
    int64_t n_bad = bc_sv_proper_policy(m, NULL, sol->policy, &bad);
    if (n_bad < 0) {
        snprintf(sol->message, sizeof sol->message, "policy iteration: out of memory");
        return BC_SOLVE_NOMEM;
    }
    if (n_bad > 0) {
        char label[32];
        snprintf(sol->message, sizeof sol->message,
                 "policy iteration (discount 1): no policy reaches a terminal state with "
                 "probability 1 from state %s (%lld such states)",
                 bc_sv_state_label(m, bad, label), (long long)n_bad);
        return BC_SOLVE_FAILED;
    }
    return BC_SOLVE_OK;
}

/* Evaluates policy into v; 0, or a failure status with the message set. */
static bc_solve_status evaluate(const bc_model *m, pi_work *w, double sgn, const int64_t *policy,
                                double *v, int64_t step, char *msg, size_t cap)
{
    char why[160];
    if (m->discount >= 1.0) {
        int32_t bad = -1;
        int64_t n_bad = bc_sv_policy_proper(m, policy, NULL, &bad);
        if (n_bad < 0) {
            snprintf(msg, cap, "policy iteration: out of memory");
            return BC_SOLVE_NOMEM;
        }
        if (n_bad > 0) {
            char label[32];
            snprintf(msg, cap,
                     "policy iteration (discount 1): step %lld leads to a policy that never "
                     "terminates from state %s: a cycle there has positive total reward "
                     "(negative total cost), so looping longer always pays and no policy is optimal",
                     (long long)step, bc_sv_state_label(m, bad, label));
            return BC_SOLVE_FAILED;
        }
    }
    build_system(m, w, sgn, policy);
    bc_solve_status st = factorise(w, why, sizeof why);
    if (st != BC_SOLVE_OK) {
        snprintf(msg, cap, "policy iteration: step %lld: %s", (long long)step, why);
        return st;
    }
    if (solve_into(m, w, UMFPACK_A, v) < 0) {
        snprintf(msg, cap, "policy iteration: step %lld: the sparse solve failed or overflowed",
                 (long long)step);
        return BC_SOLVE_FAILED;
    }
    return BC_SOLVE_OK;
}

/* Proven bound for the evaluated policy (see the top of the file); -1 when
 * none can be given. */
static double final_bound(const bc_model *m, pi_work *w, const bc_sv_scales *sc,
                          const int64_t *policy, const double *v, double res, double gain,
                          double *scratch)
{
    double vmax = 0.0;
    for (int32_t s = 0; s < m->n_states; s++)
        vmax = fmax(vmax, fabs(v[s]));
    double e = bc_sv_backup_error(m, sc, vmax);
    if (m->discount < 1.0)
        return (res + fmax(gain, 0.0) + e) / (1.0 - m->discount);
    double nmax = max_steps_bound(m, w, sc, policy, scratch);
    return nmax < 0 ? -1 : (res + e) * nmax;
}

double bc_sv_pi_lu_flops(const bc_model *m)
{
    /* The symbolic analysis of the starting policy's matrix: UMFPACK's
     * estimate (an upper bound) of the flops of one factorisation.  Later
     * policies have similar sparsity, so this prices every evaluation. */
    bc_solution start;
    pi_work w;
    double flops = -1;
    if (m->horizon > 0 || bc_sv_begin(m, BC_METHOD_PI, &start) != BC_SOLVE_OK)
        return -1;
    if (pi_work_alloc(m, NULL, 0, &w) == 0) {
        if (w.n == 0) {
            flops = 0;
        } else if (start_policy(m, bc_sv_sign(m), NULL, &start) == BC_SOLVE_OK) {
            void *symbolic = NULL;
            build_system(m, &w, bc_sv_sign(m), start.policy);
            if (umfpack_dl_symbolic(w.n, w.n, w.Ap, w.Ai, w.Ax, &symbolic, w.control, w.info) ==
                UMFPACK_OK)
                flops = w.info[UMFPACK_FLOPS_ESTIMATE];
            if (symbolic)
                umfpack_dl_free_symbolic(&symbolic);
        }
        pi_work_free(&w);
    }
    bc_solution_free(&start);
    return flops;
}

/* Improvement steps allowed below the usual threshold to reach tol. */
#define PI_POLISH 3

/* Policy iteration from the greedy policy of v0 (NULL: the usual start);
 * warm = value-iteration sweeps spent on v0, for the message. */
static bc_solve_status pi_run(const bc_model *m, const bc_solve_opts *o, const double *v0,
                              int64_t warm, bc_solution *sol)
{
    const double t0 = bc_sv_now(), sgn = bc_sv_sign(m);
    bc_solve_status st = bc_sv_begin(m, BC_METHOD_PI, sol);
    if (st != BC_SOLVE_OK)
        return st;
    const int64_t max_steps = o->max_iter > 0 ? o->max_iter : BC_SV_PI_MAX_STEPS;
    pi_work w;
    int64_t *next = malloc((size_t)(m->n_states ? m->n_states : 1) * sizeof *next);
    double *scratch = malloc((size_t)(m->n_states ? m->n_states : 1) * sizeof *scratch);
    if (!next || !scratch || pi_work_alloc(m, NULL, 0, &w) < 0) {
        free(next), free(scratch);
        snprintf(sol->message, sizeof sol->message, "policy iteration: out of memory");
        return bc_sv_finish(m, sol, BC_SOLVE_NOMEM, t0);
    }
    bc_sv_scales sc;
    bc_sv_scales_of(m, &sc);
    st = start_policy(m, sgn, v0, sol);
    double res = 0.0, gain = 0.0;
    int64_t changed = 1, polish = 0;
    while (st == BC_SOLVE_OK && changed > 0 && w.n > 0) {
        st = evaluate(m, &w, sgn, sol->policy, sol->values, sol->iterations + 1, sol->message,
                      sizeof sol->message);
        if (st != BC_SOLVE_OK)
            break;
        sol->iterations++;
        res = eval_residual(m, sgn, sol->values, sol->policy);
        double vmax = 0.0;
        for (int32_t s = 0; s < m->n_states; s++)
            vmax = fmax(vmax, fabs(sol->values[s]));
        /* The relative term keeps rounding noise from making the method
         * cycle.  Under g < 1 a gain left below it may still leave a bound
         * gain/(1-g) above tol: then at most PI_POLISH more steps take
         * every gain above tol (1-g)/4 (a bounded number, so noise cannot
         * make the method cycle for ever). */
        double floor_ = 4.0 * (res + bc_sv_backup_error(m, &sc, vmax));
        double eps = floor_ + (polish ? fmin(1e-12 * (sc.reward_max + vmax),
                                             0.25 * o->tol * (1.0 - m->discount))
                                      : 1e-12 * (sc.reward_max + vmax));
        memcpy(next, sol->policy, (size_t)m->n_states * sizeof *next);
        changed = improve(m, sgn, sol->values, eps, next, &gain);
        if (changed == 0 && m->discount < 1.0 && polish < PI_POLISH &&
            (gain + floor_) / (1.0 - m->discount) > o->tol) {
            polish++;
            eps = floor_ + fmin(1e-12 * (sc.reward_max + vmax), 0.25 * o->tol * (1.0 - m->discount));
            changed = improve(m, sgn, sol->values, eps, next, &gain);
        }
        bc_sv_trace(sol, BC_METHOD_PI, sol->iterations, fmax(gain, 0.0),
                    m->discount < 1.0 ? (res + fmax(gain, 0.0) + bc_sv_backup_error(m, &sc, vmax)) /
                                            (1.0 - m->discount)
                                      : -1.0);
        if (changed > 0 && (sol->iterations >= max_steps || bc_sv_out_of_time(o, t0)))
            st = BC_SOLVE_NOT_CONVERGED; /* keep the evaluated policy with its values */
        else if (changed > 0 && bc_stop_requested())
            st = BC_SOLVE_INTERRUPTED; /* the same */
        else if (changed > 0)
            memcpy(sol->policy, next, (size_t)m->n_states * sizeof *next);
    }
    if (st == BC_SOLVE_OK || st == BC_SOLVE_NOT_CONVERGED || st == BC_SOLVE_INTERRUPTED) {
        sol->bound = w.n == 0 ? 0.0
                              : final_bound(m, &w, &sc, sol->policy, sol->values, res, gain, scratch);
        if (st != BC_SOLVE_OK && m->discount >= 1.0)
            sol->bound = -1;
        if (sol->iterations > 0)
            bc_sv_trace_last(sol, BC_METHOD_PI, sol->iterations, fmax(gain, 0.0), sol->bound);
        char from[96] = "";
        if (warm > 0)
            snprintf(from, sizeof from, " from the policy of %lld value-iteration sweeps",
                     (long long)warm);
        snprintf(sol->message, sizeof sol->message,
                 "policy iteration%s: %lld evaluations%s, residual %.3g, gain left %.3g; %s %.3g",
                 from, (long long)sol->iterations,
                 st == BC_SOLVE_NOT_CONVERGED ? " (stopped by the limit)"
                 : st == BC_SOLVE_INTERRUPTED ? " (interrupted)"
                                              : "",
                 res, gain,
                 m->discount < 1.0 ? "proven |V - V*| <=" : "proven |V - V^pi| <=", sol->bound);
    }
    pi_work_free(&w);
    free(next), free(scratch);
    return bc_sv_finish(m, sol, st, t0);
}

bc_solve_status bc_solve_pi(const bc_model *m, const bc_solve_opts *o, bc_solution *sol)
{
    return pi_run(m, o, NULL, 0, sol);
}

bc_solve_status bc_sv_solve_pi_warm(const bc_model *m, const bc_solve_opts *o, const double *v0,
                                    int64_t skipped_sweeps, bc_solution *sol)
{
    return pi_run(m, o, v0, skipped_sweeps, sol);
}

/* ------------------------------------------------------------------------ */
/* The same evaluation for other callers (scoring)                          */
/* ------------------------------------------------------------------------ */

bc_sv_eval *bc_sv_eval_new(const bc_model *m, const uint8_t *in_system, int stochastic)
{
    pi_work *w = malloc(sizeof *w);
    if (!w)
        return NULL;
    if (pi_work_alloc(m, in_system, stochastic, w) < 0) {
        free(w);
        return NULL;
    }
    return w;
}

void bc_sv_eval_free(bc_sv_eval *w)
{
    if (!w)
        return;
    pi_work_free(w);
    free(w);
}

bc_solve_status bc_sv_eval_factorise(const bc_model *m, bc_sv_eval *w, const double *prob,
                                     char *why, size_t cap)
{
    if (w->n == 0)
        return BC_SOLVE_OK;
    build_system_mixed(m, w, prob);
    return factorise(w, why, cap);
}

double bc_sv_eval_flops(const bc_model *m, bc_sv_eval *w, const double *prob)
{
    if (w->n == 0)
        return 0.0;
    void *symbolic = NULL;
    double flops = -1;
    build_system_mixed(m, w, prob);
    if (umfpack_dl_symbolic(w->n, w->n, w->Ap, w->Ai, w->Ax, &symbolic, w->control, w->info) ==
        UMFPACK_OK)
        flops = w->info[UMFPACK_FLOPS_ESTIMATE];
    if (symbolic)
        umfpack_dl_free_symbolic(&symbolic);
    return flops;
}

int bc_sv_eval_solve(const bc_model *m, bc_sv_eval *w, int transpose, const double *b, double *x)
{
    if (w->n == 0) {
        for (int32_t s = 0; s < m->n_states; s++)
            x[s] = 0.0;
        return 0;
    }
    assert(w->numeric);
    for (int32_t i = 0; i < w->n; i++)
        w->b[i] = b[w->state_of[i]];
    return solve_into(m, w, transpose ? UMFPACK_At : UMFPACK_A, x);
}
