/* exact.c — exact optima over the rationals: policy iteration with exact evaluation, exact backward induction. */
/*
 * Copyright (C) 2026 the bellcheck developers.
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Policy iteration (Howard 1960) run entirely in rational arithmetic: the
 * policy's value solves (I - g P_pi) v = r_pi exactly (exact_lu.c), every
 * pair's Q-value is computed exactly from it, and a state switches only to a
 * pair that is strictly better.  When nothing switches, v = T v holds
 * exactly, which proves v = V* and the policy optimal (discount < 1: T is a
 * contraction; discount 1: v is the value of a terminating policy and
 * v >= T_a v for every pair makes v an upper bound on every terminating
 * policy's value).  Started from a floating-point optimum, one evaluation
 * usually suffices.
 *
 * Internally values are in the maximising convention (rewards times sgn);
 * they are turned back into the model's sign at the end.
 */
#include "exact_internal.h"
#include "solver_internal.h"

#include <stdlib.h>
#include <string.h>

#define BC_EXACT_DEFAULT_FILL 20000000
#define BC_EXACT_DEFAULT_DENSE 6000 /* 36M integers: a few hundred MB */

void bc_exact_opts_default(bc_exact_opts *o)
{
    o->max_fill = BC_EXACT_DEFAULT_FILL;
    o->max_dense = BC_EXACT_DEFAULT_DENSE;
    o->solver = BC_EXACT_LU_AUTO;
    o->max_seconds = 0;
}

/* The fewest bytes one entry of an exact factor holds: its mpq_t, the two
 * limb blocks behind it with malloc's headers, its column index. */
#define BC_EXACT_ENTRY_BYTES 68
/* The fewest bytes per entry of the dense lifting: the integer matrix and its
 * LU factors modulo a prime (FLINT), each a machine word per entry. */
#define BC_DENSE_ENTRY_BYTES 16

/* Auto: sparse elimination while its factor stays within a few times the
 * matrix (then its fractions stay small too); past that, the fill is the
 * sign of a graph that looks random, where lifting is far cheaper
 * (docs/methods.md has the measurements).  The memory limit (--max-memory)
 * caps the factor's entries and refuses a dense matrix that would not fit:
 * BC__QSYS_OVER_LIMIT with the refusal in why. */
static int solve_system(const bc__qsys *A, const bc_exact_opts *o, mpq_t *x, int32_t *bad,
                        int64_t *fill, char *why, size_t cap)
{
    int64_t nnz = A->row_start[A->n], n = A->n;
    uint64_t limit = bc_memory_limit_get();
    int st = BC__QSYS_TOO_BIG, capped = 0;
    if (o->solver != BC_EXACT_LU_DENSE) {
        int64_t budget = o->max_fill ? o->max_fill : BC_EXACT_DEFAULT_FILL;
        /* Sparse elimination pays while U stays a small multiple of A and far
         * from dense (measured: docs/methods.md). */
        int64_t sparse_limit = 4 * nnz + 1000;
        if (n * n / 32 + 1000 < sparse_limit)
            sparse_limit = n * n / 32 + 1000;
        if (o->solver == BC_EXACT_LU_AUTO && sparse_limit < budget)
            budget = sparse_limit;
        if (limit && (uint64_t)budget > limit / BC_EXACT_ENTRY_BYTES)
            budget = (int64_t)(limit / BC_EXACT_ENTRY_BYTES), capped = 1;
        const double t0 = bc__exact_now();
        st = bc__qsys_solve(A, x, budget, o->max_seconds, bad, fill);
        capped = capped && !(o->max_seconds > 0 && bc__exact_now() - t0 > o->max_seconds);
        int no_dense = o->solver == BC_EXACT_LU_SPARSE ||
                       n > (o->max_dense ? o->max_dense : BC_EXACT_DEFAULT_DENSE);
        char what[160];
        snprintf(what, sizeof what, "exact elimination of %lld equations (a factor of more than "
                 "%lld entries)", (long long)n, (long long)budget);
        if (st == BC__QSYS_TOO_BIG && capped && no_dense &&
            bc_memory_refused(0, (uint64_t)(budget + 1) * BC_EXACT_ENTRY_BYTES, what, why, cap))
            return BC__QSYS_OVER_LIMIT;
        if (st != BC__QSYS_TOO_BIG || o->solver == BC_EXACT_LU_SPARSE)
            return st;
    }
    if (A->n > (o->max_dense ? o->max_dense : BC_EXACT_DEFAULT_DENSE) || bc_stop_requested())
        return BC__QSYS_TOO_BIG;
    char what[160];
    snprintf(what, sizeof what, "exact evaluation by dense lifting (%lld equations, %lld matrix "
             "entries)", (long long)n, (long long)(n * n));
    if (bc_memory_refused(0, (uint64_t)(n * n) * BC_DENSE_ENTRY_BYTES, what, why, cap))
        return BC__QSYS_OVER_LIMIT;
    *fill = n * n;
    return bc__qsys_solve_dense(A, x, bad);
}

void bc__exact_pair_q(const bc_model *m, int sgn, const mpq_t g, const mpq_t *v, int64_t p,
                      mpq_t out, mpq_t tmp)
{
    mpq_set_ui(out, 0, 1);
    for (int64_t t = m->pair_trans_start[p]; t < m->pair_trans_start[p + 1]; t++) {
        bc_num_to_mpq(tmp, bc_model_prob_exact(m, t), m->big);
        mpq_mul(tmp, tmp, v[m->succ_state[t]]);
        mpq_add(out, out, tmp);
    }
    mpq_mul(out, out, g);
    bc_model_reward_mpq(m, p, tmp);
    if (sgn < 0)
        mpq_neg(tmp, tmp);
    mpq_add(out, out, tmp);
}

int bc__qvec_from_mpq(bc__qvec *v, const mpq_t *vals, int32_t n, int sgn)
{
    v->n = n;
    v->x = malloc((size_t)(n ? n : 1) * sizeof *v->x);
    mpz_init_set_ui(v->den, 1);
    if (!v->x)
        return -1;
    for (int32_t s = 0; s < n; s++)
        mpz_lcm(v->den, v->den, mpq_denref(vals[s]));
    for (int32_t s = 0; s < n; s++) {
        mpz_init(v->x[s]);
        mpz_divexact(v->x[s], v->den, mpq_denref(vals[s]));
        mpz_mul(v->x[s], v->x[s], mpq_numref(vals[s]));
        if (sgn < 0)
            mpz_neg(v->x[s], v->x[s]);
    }
    return 0;
}

void bc__qvec_free(bc__qvec *v)
{
    if (v->x)
        for (int32_t s = 0; s < v->n; s++)
            mpz_clear(v->x[s]);
    free(v->x);
    mpz_clear(v->den);
    v->x = NULL;
}

void bc__qscratch_init(bc__qscratch *w)
{
    mpz_inits(w->num, w->den, w->acc_num, w->acc_den, w->t, w->pn, w->pd, w->l, NULL);
    mpq_init(w->q);
}

void bc__qscratch_clear(bc__qscratch *w)
{
    mpz_clears(w->num, w->den, w->acc_num, w->acc_den, w->t, w->pn, w->pd, w->l, NULL);
    mpq_clear(w->q);
}

/* acc_num / acc_den += (pn / pd) * x, keeping acc_den the lcm of the pd's
 * (small): every product has one small factor. */
static void acc_add(bc__qscratch *w, const mpz_t x)
{
    if (mpz_divisible_p(w->acc_den, w->pd)) {
        mpz_divexact(w->l, w->acc_den, w->pd);
        mpz_mul(w->l, w->l, w->pn);
    } else {
        mpz_lcm(w->l, w->acc_den, w->pd);
        mpz_divexact(w->t, w->l, w->acc_den);
        mpz_mul(w->acc_num, w->acc_num, w->t);
        mpz_set(w->acc_den, w->l);
        mpz_divexact(w->l, w->l, w->pd);
        mpz_mul(w->l, w->l, w->pn);
    }
    mpz_addmul(w->acc_num, w->l, x);
}

int bc__qvec_pair_cmp(const bc_model *m, int sgn, const mpq_t g, const bc__qvec *v, int64_t p,
                      bc__qscratch *w)
{
    /* S = sum_t P(t) x[succ t] as acc_num / acc_den; then
     * Q den_v = r den_v + g S: num / den with
     * num = rn gd acc_den den_v + gn rd acc_num, den = rd gd acc_den. */
    mpz_set_ui(w->acc_num, 0);
    mpz_set_ui(w->acc_den, 1);
    for (int64_t t = m->pair_trans_start[p]; t < m->pair_trans_start[p + 1]; t++) {
        bc_num_to_mpq(w->q, bc_model_prob_exact(m, t), m->big);
        mpz_set(w->pn, mpq_numref(w->q));
        mpz_set(w->pd, mpq_denref(w->q));
        acc_add(w, v->x[m->succ_state[t]]);
    }
    bc_model_reward_mpq(m, p, w->q);
    if (sgn < 0)
        mpq_neg(w->q, w->q);
    /* num = rn * gd * acc_den * den_v + gn * rd * acc_num */
    mpz_mul(w->num, mpq_numref(w->q), mpq_denref(g));
    mpz_mul(w->num, w->num, w->acc_den);
    mpz_mul(w->num, w->num, v->den);
    mpz_mul(w->t, mpq_numref(g), mpq_denref(w->q));
    mpz_addmul(w->num, w->t, w->acc_num);
    mpz_mul(w->den, mpq_denref(w->q), mpq_denref(g));
    mpz_mul(w->den, w->den, w->acc_den);
    /* Q - v(s) has the sign of num - x[s] * den. */
    mpz_mul(w->t, v->x[m->pair_state[p]], w->den);
    return mpz_cmp(w->num, w->t);
}

static mpq_t *mpq_array(int64_t n)
{
    mpq_t *a = malloc((size_t)(n ? n : 1) * sizeof *a);
    if (a)
        for (int64_t i = 0; i < n; i++)
            mpq_init(a[i]);
    return a;
}

static void mpq_array_free(mpq_t *a, int64_t n)
{
    if (!a)
        return;
    for (int64_t i = 0; i < n; i++)
        mpq_clear(a[i]);
    free(a);
}

/* Weight of pair p in the policy being evaluated: a deterministic policy
 * (pair[s]) or a stochastic one (prob[p], an exact dyadic double). */
typedef struct {
    const int64_t *pair;
    const double *prob;
} policy_ref;

static int pair_used(const policy_ref *pol, int32_t s, int64_t p)
{
    return pol->pair ? pol->pair[s] == p : pol->prob[p] != 0.0;
}

/* Builds (I - g P_pol) v = sgn r_pol over the non-terminal states not
 * skipped; sys_of[s] is the row of state s or -1.  0, or -1 (no memory). */
static int build_system(const bc_model *m, int sgn, const mpq_t g, const policy_ref *pol,
                        const int32_t *sys_of, const int32_t *state_of, int32_t n, bc__qsys *A)
{
    int64_t cap = n;
    for (int32_t i = 0; i < n; i++) {
        int32_t s = state_of[i];
        for (int64_t p = m->state_pair_start[s]; p < m->state_pair_start[s + 1]; p++)
            if (pair_used(pol, s, p))
                cap += m->pair_trans_start[p + 1] - m->pair_trans_start[p];
    }
    int32_t *slot = malloc((size_t)(n ? n : 1) * sizeof *slot);
    if (!slot || bc__qsys_alloc(A, n, cap) < 0) {
        free(slot);
        return -1;
    }
    for (int32_t i = 0; i < n; i++)
        slot[i] = -1;
    mpq_t w, t;
    mpq_inits(w, t, NULL);
    int64_t e = 0;
    for (int32_t i = 0; i < n; i++) {
        int32_t s = state_of[i];
        int64_t row0 = e;
        A->col[e] = i; /* the identity's diagonal; duplicates merge into slot[] */
        mpq_set_ui(A->val[e], 1, 1);
        slot[i] = e++;
        for (int64_t p = m->state_pair_start[s]; p < m->state_pair_start[s + 1]; p++) {
            if (!pair_used(pol, s, p))
                continue;
            if (pol->pair)
                mpq_set_ui(w, 1, 1);
            else
                mpq_set_d(w, pol->prob[p]);
            bc_model_reward_mpq(m, p, t);
            mpq_mul(t, t, w);
            (sgn < 0 ? mpq_sub : mpq_add)(A->rhs[i], A->rhs[i], t);
            mpq_mul(w, w, g);
            for (int64_t k = m->pair_trans_start[p]; k < m->pair_trans_start[p + 1]; k++) {
                int32_t j = sys_of[m->succ_state[k]];
                if (j < 0)
                    continue; /* a terminal state: value 0 */
                if (slot[j] < 0) {
                    A->col[e] = j;
                    slot[j] = e++;
                }
                bc_num_to_mpq(t, bc_model_prob_exact(m, k), m->big);
                mpq_mul(t, t, w);
                mpq_sub(A->val[slot[j]], A->val[slot[j]], t);
            }
        }
        for (int64_t q = row0; q < e; q++)
            slot[A->col[q]] = -1;
        A->row_start[i + 1] = e;
    }
    mpq_clears(w, t, NULL);
    free(slot);
    return 0;
}

/* Solves for the values of pol (maximising convention) into v[n_states];
 * skip[s] (may be NULL) leaves states out.  0, 1 = budget, -1 = failure. */
static int evaluate(const bc_model *m, int sgn, const mpq_t g, const policy_ref *pol,
                    const uint8_t *skip, const bc_exact_opts *o, mpq_t *v, int64_t *fill,
                    char *why, size_t cap)
{
    int32_t *sys_of = malloc((size_t)m->n_states * sizeof *sys_of);
    int32_t *state_of = malloc((size_t)m->n_states * sizeof *state_of);
    mpq_t *x = NULL;
    bc__qsys A = {0};
    int32_t n = 0, bad = -1;
    int rc = -1;
    const double t0 = bc__exact_now();
    *fill = 0;
    if (!sys_of || !state_of)
        goto out;
    for (int32_t s = 0; s < m->n_states; s++) {
        mpq_set_ui(v[s], 0, 1);
        sys_of[s] = (m->terminal[s] || (skip && skip[s])) ? -1 : n;
        if (sys_of[s] >= 0)
            state_of[n++] = s;
    }
    if (build_system(m, sgn, g, pol, sys_of, state_of, n, &A) < 0 || !(x = mpq_array(n)))
        goto out;
    int st = solve_system(&A, o, x, &bad, fill, why, cap);
    if (st == BC__QSYS_OVER_LIMIT) {
        rc = 1; /* why says it */
    } else if (st == BC__QSYS_OK) {
        for (int32_t i = 0; i < n; i++)
            mpq_swap(v[state_of[i]], x[i]);
        rc = 0;
    } else if (st == BC__QSYS_TOO_BIG) {
        if (o->max_seconds > 0 && bc__exact_now() - t0 > o->max_seconds)
            snprintf(why, cap, "exact evaluation of %d equations stopped at its time limit "
                     "(%g s); --proof exact has none", (int)n, o->max_seconds);
        else
            snprintf(why, cap, "exact evaluation refused: %d equations fill in beyond the "
                     "sparse budget and exceed the dense limit of %d", (int)n,
                     (int)(o->max_dense ? o->max_dense : BC_EXACT_DEFAULT_DENSE));
        rc = 1;
    } else if (st == BC__QSYS_SINGULAR) {
        char lb[32];
        snprintf(why, cap, "the policy's equations are singular at state %s (it does not terminate)",
                 bc_sv_state_label(m, state_of[bad], lb));
    } else {
        snprintf(why, cap, "out of memory in exact evaluation");
    }
out:
    bc__qsys_free(&A);
    mpq_array_free(x, n);
    free(sys_of);
    free(state_of);
    return rc;
}

int bc_exact_policy_values(const bc_model *m, const double *prob, const uint8_t *skip,
                           const bc_exact_opts *o, mpq_t *values, char *why, size_t cap)
{
    mpq_t g;
    mpq_init(g);
    bc_num_to_mpq(g, m->discount_exact, m->big);
    policy_ref pol = {.prob = prob};
    int64_t fill = 0;
    int rc = evaluate(m, 1, g, &pol, skip, o, values, &fill, why, cap);
    mpq_clear(g);
    return rc;
}

/* One improvement step: switches each state whose best pair is strictly
 * better than its current one.  Returns the number of switches, -1 when
 * out of memory.  v is in the maximising convention. */
static int32_t improve(const bc_model *m, int sgn, const mpq_t g, const mpq_t *v, int64_t *policy)
{
    bc__qvec qv;
    if (bc__qvec_from_mpq(&qv, v, m->n_states, 1) < 0) {
        bc__qvec_free(&qv);
        return -1;
    }
    bc__qscratch w;
    bc__qscratch_init(&w);
    int32_t switched = 0;
    /* Best pair by pairwise exact comparison: Q(a) > Q(b) iff
     * Q(a) - v > Q(b) - v; compare each candidate against the current
     * best through the shifted value vector (x - best's Q is not needed:
     * a pair is better than the current one iff its Q exceeds v(s), and
     * among several such the first with the largest Q wins). */
    mpq_t best, q, t;
    mpq_inits(best, q, t, NULL);
    for (int32_t s = 0; s < m->n_states; s++) {
        if (m->terminal[s])
            continue;
        int64_t arg = policy[s];
        for (int64_t p = m->state_pair_start[s]; p < m->state_pair_start[s + 1]; p++) {
            if (p == policy[s] || bc__qvec_pair_cmp(m, sgn, g, &qv, p, &w) <= 0)
                continue;
            /* Rare: p improves on the current pair; rank it exactly. */
            bc__exact_pair_q(m, sgn, g, v, p, q, t);
            if (arg == policy[s] || mpq_cmp(q, best) > 0) {
                mpq_set(best, q);
                arg = p;
            }
        }
        if (arg != policy[s]) {
            policy[s] = arg;
            switched++;
        }
    }
    mpq_clears(best, q, t, NULL);
    bc__qscratch_clear(&w);
    bc__qvec_free(&qv);
    return switched;
}

/* A terminating start at discount 1: keeps start[] if it terminates. */
static int start_policy(const bc_model *m, const int64_t *start, int64_t *policy, char *why,
                        size_t cap)
{
    int32_t bad = -1;
    if (start)
        memcpy(policy, start, (size_t)m->n_states * sizeof *policy);
    if (start && (m->discount < 1.0 || bc_sv_policy_proper(m, policy, NULL, &bad) == 0))
        return 0;
    if (!start && m->discount < 1.0) {
        for (int32_t s = 0; s < m->n_states; s++)
            policy[s] = m->terminal[s] ? -1 : m->state_pair_start[s];
        return 0;
    }
    int64_t nbad = bc_sv_proper_policy(m, NULL, policy, &bad);
    if (nbad == 0)
        return 0;
    char lb[32];
    snprintf(why, cap, nbad < 0 ? "out of memory" : "no policy terminates from state %s",
             bc_sv_state_label(m, bad, lb));
    return -1;
}

/* Exact policy iteration; v gets V* in the maximising convention. */
static bc_solve_status policy_iteration(const bc_model *m, int sgn, const mpq_t g,
                                        const int64_t *start, const bc_exact_opts *o,
                                        bc_exact *out, mpq_t *v)
{
    if (start_policy(m, start, out->policy, out->message, sizeof out->message) < 0)
        return BC_SOLVE_FAILED;
    policy_ref pol = {.pair = out->policy};
    bc_solve_status st = BC_SOLVE_OK;
    for (;;) {
        int64_t fill = 0;
        int rc = evaluate(m, sgn, g, &pol, NULL, o, v, &fill, out->message, sizeof out->message);
        out->steps++;
        if (fill > out->fill)
            out->fill = fill;
        if (rc != 0) {
            st = rc > 0 ? BC_SOLVE_NOT_CONVERGED : BC_SOLVE_FAILED;
            break;
        }
        int32_t switched = improve(m, sgn, g, (const mpq_t *)v, out->policy);
        if (switched < 0) {
            st = BC_SOLVE_NOMEM;
            break;
        }
        if (switched == 0)
            break;
        if (bc_stop_requested()) {
            /* An exact step can take minutes; nothing half-exact is returned. */
            snprintf(out->message, sizeof out->message,
                     "exact policy iteration: interrupted after %lld evaluations",
                     (long long)out->steps);
            st = BC_SOLVE_INTERRUPTED;
            break;
        }
        int32_t bad = -1;
        if (m->discount >= 1.0 && bc_sv_policy_proper(m, out->policy, NULL, &bad) != 0) {
            char lb[32];
            snprintf(out->message, sizeof out->message,
                     "an improving policy stops terminating at state %s: a cycle of positive "
                     "total reward, no optimum exists", bc_sv_state_label(m, bad, lb));
            st = BC_SOLVE_FAILED;
            break;
        }
    }
    return st;
}

/* Exact backward induction over m->horizon stages; v gets stage 0. */
static bc_solve_status backward(const bc_model *m, int sgn, const mpq_t g, bc_exact *out,
                                mpq_t *v)
{
    const int32_t n = m->n_states;
    out->stage_policy = malloc((size_t)m->horizon * (size_t)n * sizeof *out->stage_policy);
    mpq_t *next = mpq_array(n);
    if (!out->stage_policy || !next) {
        mpq_array_free(next, n);
        return BC_SOLVE_NOMEM;
    }
    mpq_t q, tmp;
    mpq_inits(q, tmp, NULL);
    for (int32_t s = 0; s < n; s++)
        mpq_set_ui(v[s], 0, 1);
    for (int32_t t = m->horizon - 1; t >= 0; t--) {
        for (int32_t s = 0; s < n; s++)
            mpq_swap(next[s], v[s]);
        int64_t *pol = out->stage_policy + (size_t)t * (size_t)n;
        for (int32_t s = 0; s < n; s++) {
            pol[s] = -1;
            mpq_set_ui(v[s], 0, 1);
            for (int64_t p = m->state_pair_start[s]; p < m->state_pair_start[s + 1]; p++) {
                bc__exact_pair_q(m, sgn, g, (const mpq_t *)next, p, q, tmp);
                if (pol[s] < 0 || mpq_cmp(q, v[s]) > 0) {
                    mpq_set(v[s], q);
                    pol[s] = p;
                }
            }
        }
        out->steps++;
    }
    memcpy(out->policy, out->stage_policy, (size_t)n * sizeof *out->policy);
    mpq_clears(q, tmp, NULL);
    mpq_array_free(next, n);
    return BC_SOLVE_OK;
}

static int32_t count_changed(const bc_model *m, const int64_t *start, const int64_t *policy)
{
    int32_t c = 0;
    for (int32_t s = 0; start && s < m->n_states; s++)
        c += start[s] != policy[s];
    return c;
}

bc_solve_status bc_exact_solve(const bc_model *m, const int64_t *start, const bc_exact_opts *o,
                               bc_exact *out)
{
    bc_exact_opts dflt;
    if (!o) {
        bc_exact_opts_default(&dflt);
        o = &dflt;
    }
    memset(out, 0, sizeof *out);
    const double t0 = bc__exact_now();
    const int sgn = m->objective == BC_MIN ? -1 : 1;
    out->values = mpq_array(m->n_states);
    out->policy = malloc((size_t)(m->n_states ? m->n_states : 1) * sizeof *out->policy);
    out->n_states = m->n_states;
    if (!out->values || !out->policy) {
        bc_exact_free(out);
        return BC_SOLVE_NOMEM;
    }
    mpq_init(out->value_initial);
    mpq_t g;
    mpq_init(g);
    bc_num_to_mpq(g, m->discount_exact, m->big);
    bc_solve_status st = m->horizon > 0 ? backward(m, sgn, g, out, out->values)
                                        : policy_iteration(m, sgn, g, start, o, out, out->values);
    mpq_clear(g);
    mpq_t t;
    mpq_init(t);
    for (int32_t s = 0; s < m->n_states; s++) {
        if (sgn < 0)
            mpq_neg(out->values[s], out->values[s]);
        bc_num_to_mpq(t, m->initial_exact[s], m->big);
        mpq_mul(t, t, out->values[s]);
        mpq_add(out->value_initial, out->value_initial, t);
    }
    mpq_clear(t);
    if (st == BC_SOLVE_OK) {
        out->n_changed = count_changed(m, start, out->policy);
        snprintf(out->message, sizeof out->message,
                 "exact %s: %d %s, largest factor %lld entries; %d state%s changed from the start",
                 m->horizon > 0 ? "backward induction" : "policy iteration", (int)out->steps,
                 m->horizon > 0 ? (out->steps == 1 ? "stage" : "stages")
                                : (out->steps == 1 ? "evaluation" : "evaluations"),
                 (long long)out->fill,
                 (int)out->n_changed, out->n_changed == 1 ? "" : "s");
    }
    out->seconds = bc__exact_now() - t0;
    return st;
}

void bc_exact_free(bc_exact *e)
{
    mpq_array_free(e->values, e->n_states);
    free(e->policy);
    free(e->stage_policy);
    if (e->values && e->policy)
        mpq_clear(e->value_initial); /* initialised exactly when both arrays were had */
    memset(e, 0, sizeof *e);
}
