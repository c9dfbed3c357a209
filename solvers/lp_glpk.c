/* lp_glpk.c — the primal linear program of an MDP, solved with GLPK's simplex; its bound comes a posteriori from the Bellman residual. */
/*
 * Copyright (C) 2026 the bellcheck developers.
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Variables v(s), free, for the non-terminal states (terminal values are 0).
 *     minimise   sum_s w(s) v(s)
 *     subject to v(s) - g sum_t P(t|p) v(t) >= r(p)   for every pair p of s
 * (Puterman 1994, section 6.9), in the maximising convention (objective min
 * enters through bc_sv_reward).  Every feasible v satisfies v >= Tv, hence
 * v >= V* state by state (for discount < 1), and V* is feasible; so V* is the
 * unique optimum for ANY positive weights.  We take w(s) = 1: weighting by
 * the initial distribution would leave states of weight 0 undetermined, and
 * "initial + a small constant" changes nothing about the optimum while
 * making the objective's scale depend on that constant.
 *
 * The simplex gives no proof of accuracy, so the bound is computed after the
 * fact: for discount < 1 and any v, |v - V*| <= |Tv - v| / (1 - g).  At
 * discount 1 nothing is proven (bound -1).  The policy is the pair of least
 * slack per state, i.e. the greedy pair w.r.t. v (ties: lowest action).
 */
#include <assert.h>
#include <limits.h>
#include <math.h>
#include <setjmp.h>
#include <stdlib.h>
#include <string.h>

#include <glpk.h>

#include "bellcheck.h"
#include "solver_internal.h"

/* The constraint matrix in GLPK's 1-based triplets, duplicates merged. */
typedef struct {
    int n_cols;      /* non-terminal states */
    int *col_of;     /* [n_states] 1-based column, 0 for terminal states */
    int n_entries;
    int *ia, *ja;    /* [1 + cap] row, column */
    double *ar;      /* [1 + cap] coefficient */
    int64_t *pos;    /* [n_cols + 1] where column j sits in the current row */
} lp_matrix;

static void lp_matrix_free(lp_matrix *a)
{
    free(a->col_of), free(a->ia), free(a->ja), free(a->ar), free(a->pos);
}

/* Builds the rows; returns 0, -1 when out of memory, -2 when the model is
 * too large for GLPK's int indices. */
static int lp_matrix_build(const bc_model *m, lp_matrix *a)
{
    memset(a, 0, sizeof *a);
    int64_t cap = m->n_pairs + m->n_trans;
    if (m->n_pairs >= INT_MAX || cap >= INT_MAX - 1)
        return -2;
    a->col_of = malloc((size_t)(m->n_states ? m->n_states : 1) * sizeof *a->col_of);
    a->ia = malloc((size_t)(cap + 1) * sizeof *a->ia);
    a->ja = malloc((size_t)(cap + 1) * sizeof *a->ja);
    a->ar = malloc((size_t)(cap + 1) * sizeof *a->ar);
    a->pos = malloc(((size_t)m->n_states + 1) * sizeof *a->pos);
    if (!a->col_of || !a->ia || !a->ja || !a->ar || !a->pos) {
        lp_matrix_free(a);
        return -1;
    }
    for (int32_t s = 0; s < m->n_states; s++)
        a->col_of[s] = m->terminal[s] ? 0 : ++a->n_cols;
    for (int j = 0; j <= a->n_cols; j++)
        a->pos[j] = -1;
    int64_t ne = 0; /* entries so far; entry k lives at index k + 1 */
    for (int64_t p = 0; p < m->n_pairs; p++) {
        const int64_t row_begin = ne;
        int j = a->col_of[m->pair_state[p]];
        assert(j > 0);
        a->pos[j] = ne;
        a->ia[ne + 1] = (int)p + 1, a->ja[ne + 1] = j, a->ar[ne + 1] = 1.0;
        ne++;
        for (int64_t k = m->pair_trans_start[p]; k < m->pair_trans_start[p + 1]; k++) {
            j = a->col_of[m->succ_state[k]];
            if (j == 0)
                continue;
            if (a->pos[j] >= row_begin) {
                a->ar[a->pos[j] + 1] -= m->discount * m->prob[k];
            } else {
                a->pos[j] = ne;
                a->ia[ne + 1] = (int)p + 1, a->ja[ne + 1] = j;
                a->ar[ne + 1] = -m->discount * m->prob[k];
                ne++;
            }
        }
    }
    /* GLPK needs no explicit zeros (e.g. v(s) - v(s) for a sure self-loop
     * at discount 1): drop them. */
    a->n_entries = 0;
    for (int64_t k = 1; k <= ne; k++) {
        if (a->ar[k] == 0.0)
            continue;
        int at = ++a->n_entries;
        a->ia[at] = a->ia[k], a->ja[at] = a->ja[k], a->ar[at] = a->ar[k];
    }
    return 0;
}

/* GLPK reports internal errors (bad data, no memory) through a hook and
 * would abort the process after it; jumping out instead lets us fail the
 * solve.  GLPK's documentation prescribes glp_free_env() afterwards. */
static void glpk_error_hook(void *info)
{
    longjmp(*(jmp_buf *)info, 1);
}

static const char *glpk_code_name(int ret)
{
    switch (ret) {
    case GLP_EBADB: return "invalid initial basis";
    case GLP_ESING: return "singular basis matrix";
    case GLP_ECOND: return "ill-conditioned basis matrix";
    case GLP_EBOUND: return "incorrect bounds";
    case GLP_EFAIL: return "solver failure";
    case GLP_EITLIM: return "iteration limit reached";
    case GLP_ETMLIM: return "time limit reached";
    case GLP_ENOPFS: return "no primal feasible solution";
    case GLP_ENODFS: return "no dual feasible solution (unbounded)";
    default: return "unknown GLPK return code";
    }
}

/* What the simplex left: return code, solution status, iterations, and
 * where the run that produced it started (warm_policy's kind, 0 = cold). */
typedef struct {
    int ret, status, iterations, warm;
} lp_outcome;

/* The basis of a policy pi: every v(s) basic, the row of pi(s) tight
 * (nonbasic at its lower bound), every other row basic.  Its basis matrix
 * holds I - g P_pi, invertible for discount < 1 and for a terminating pi at
 * discount 1, and its dual values are pi's expected visit counts, which are
 * >= 0: the basis is dual feasible, and primal feasible iff pi is optimal.
 * So the dual simplex starts from it, and needs no step at all when pi is
 * already optimal. */
static void set_policy_basis(glp_prob *lp, const bc_model *m, const lp_matrix *a,
                             const int64_t *policy)
{
    for (int j = 1; j <= a->n_cols; j++)
        glp_set_col_stat(lp, j, GLP_BS);
    for (int64_t p = 0; p < m->n_pairs; p++)
        glp_set_row_stat(lp, (int)p + 1, GLP_BS);
    for (int32_t s = 0; s < m->n_states; s++)
        if (!m->terminal[s])
            glp_set_row_stat(lp, (int)policy[s] + 1, GLP_NL);
}

/* Loads the LP into GLPK, runs the simplex (from the policy basis if warm
 * is not NULL, else from GLPK's standard basis after presolving) and copies
 * the columns into v (maximising convention, terminal states 0). */
static void load_and_solve(const bc_model *m, const bc_solve_opts *o, const lp_matrix *a,
                           const int64_t *warm, int warm_kind, double *v, lp_outcome *out)
{
    const double sgn = bc_sv_sign(m);
    glp_prob *lp = glp_create_prob();
    glp_set_obj_dir(lp, GLP_MIN);
    glp_add_rows(lp, (int)m->n_pairs);
    glp_add_cols(lp, a->n_cols);
    for (int j = 1; j <= a->n_cols; j++) {
        glp_set_col_bnds(lp, j, GLP_FR, 0.0, 0.0);
        glp_set_obj_coef(lp, j, 1.0);
    }
    for (int64_t p = 0; p < m->n_pairs; p++)
        glp_set_row_bnds(lp, (int)p + 1, GLP_LO, bc_sv_reward(m, sgn, p), 0.0);
    glp_load_matrix(lp, a->n_entries, a->ia, a->ja, a->ar);
    glp_scale_prob(lp, GLP_SF_AUTO);
    glp_smcp parm;
    glp_init_smcp(&parm);
    parm.msg_lev = GLP_MSG_OFF;
    if (o->max_seconds > 0)
        parm.tm_lim = o->max_seconds * 1000 < INT_MAX ? (int)(o->max_seconds * 1000) : INT_MAX;
    if (o->max_iter > 0)
        parm.it_lim = o->max_iter < INT_MAX ? (int)o->max_iter : INT_MAX;
    out->ret = -1;
    out->warm = warm ? warm_kind : 0;
    if (warm) { /* the presolver would discard the basis */
        set_policy_basis(lp, m, a, warm);
        parm.presolve = GLP_OFF;
        parm.meth = GLP_DUALP;
        out->ret = glp_simplex(lp, &parm);
    }
    if (!warm || out->ret == GLP_EBADB || out->ret == GLP_ESING || out->ret == GLP_ECOND) {
        glp_std_basis(lp);
        parm.presolve = GLP_ON;
        parm.meth = GLP_PRIMAL;
        out->warm = 0;
        out->ret = glp_simplex(lp, &parm);
    }
    out->status = glp_get_status(lp);
    out->iterations = glp_get_it_cnt(lp);
    for (int32_t s = 0; s < m->n_states; s++)
        v[s] = a->col_of[s] ? glp_get_col_prim(lp, a->col_of[s]) : 0.0;
    glp_delete_prob(lp);
}

/* A starting policy for the simplex: value iteration's (cheap, and almost
 * always optimal), or at discount 1, when that fails, any terminating one.
 * Returns 1 (value iteration's) or 2 (a terminating one) with policy filled,
 * 0 if there is none (then GLPK starts cold), -1 when out of memory.  It only saves simplex steps: GLPK's own
 * optimality test decides the answer. */
static int warm_policy(const bc_model *m, const bc_solve_opts *o, int64_t *policy)
{
    bc_solve_opts quick = *o;
    bc_solution vi;
    quick.max_iter = m->discount < 1.0 ? 100000 : 10000; /* at discount 1 it may diverge */
    bc_solve_status st = bc_solve_vi(m, &quick, &vi);
    if (st == BC_SOLVE_NOMEM)
        return -1;
    int found = st == BC_SOLVE_OK || (st == BC_SOLVE_NOT_CONVERGED && m->discount < 1.0);
    if (found)
        memcpy(policy, vi.policy, (size_t)m->n_states * sizeof *policy);
    bc_solution_free(&vi);
    if (found)
        return 1;
    int32_t bad;
    int64_t n_bad = bc_sv_proper_policy(m, NULL, policy, &bad);
    return n_bad < 0 ? -1 : n_bad == 0 ? 2 : 0;
}

/* load_and_solve with GLPK's output off and its internal errors caught.
 * Returns 0, or -1 if GLPK raised an internal error. */
static int run_glpk(const bc_model *m, const bc_solve_opts *o, const lp_matrix *a,
                    const int64_t *warm, int warm_kind, double *v, lp_outcome *out)
{
    jmp_buf env;
    int old_term = glp_term_out(GLP_OFF); /* GLPK must never print */
    if (setjmp(env)) {
        /* glp_free_env also resets terminal output to GLPK's default. */
        glp_error_hook(NULL, NULL);
        glp_free_env();
        return -1;
    }
    glp_error_hook(glpk_error_hook, &env);
    load_and_solve(m, o, a, warm, warm_kind, v, out);
    glp_error_hook(NULL, NULL);
    glp_term_out(old_term);
    return 0;
}

/* Status of the solve from GLPK's outcome; message set on failure. */
static bc_solve_status judge_outcome(const lp_outcome *r, bc_solution *sol)
{
    if (r->ret == 0 && r->status == GLP_OPT)
        return BC_SOLVE_OK;
    if (r->ret == GLP_EITLIM || r->ret == GLP_ETMLIM)
        return BC_SOLVE_NOT_CONVERGED;
    if (r->ret == GLP_ENOPFS || r->status == GLP_NOFEAS)
        snprintf(sol->message, sizeof sol->message,
                 "linear program: GLPK found no feasible solution (return %d: %s; status %d); "
                 "at discount 1 a cycle of positive total reward does that", r->ret,
                 glpk_code_name(r->ret), r->status);
    else if (r->ret == GLP_ENODFS || r->status == GLP_UNBND)
        snprintf(sol->message, sizeof sol->message,
                 "linear program: GLPK found it unbounded (return %d: %s; status %d); "
                 "at discount 1 a state that cannot reach a terminal state does that", r->ret,
                 glpk_code_name(r->ret), r->status);
    else
        snprintf(sol->message, sizeof sol->message,
                 "linear program: GLPK failed (return %d: %s; status %d)", r->ret,
                 glpk_code_name(r->ret), r->status);
    return BC_SOLVE_FAILED;
}

/* Bound, policy and message from the values GLPK returned. */
static bc_solve_status conclude(const bc_model *m, bc_solution *sol, bc_solve_status st, int warm)
{
    const double sgn = bc_sv_sign(m), g = m->discount;
    bc_sv_scales sc;
    bc_sv_scales_of(m, &sc);
    double dmin, dmax;
    double vmax = bc_sv_bellman(m, sgn, sol->values, NULL, &dmin, &dmax);
    double resid = fmax(fabs(dmin), fabs(dmax));
    double e = bc_sv_backup_error(m, &sc, vmax) + DBL_EPSILON * resid;
    int64_t n_bad = 0;
    int32_t bad = -1;
    if (g < 1.0) {
        sol->bound = (resid + e) / (1.0 - g);
        bc_sv_greedy(m, sgn, sol->values, sol->policy);
    } else {
        sol->bound = -1;
        n_bad = bc_sv_greedy_proper(m, sgn, sol->values, 4.0 * (resid + e), sol->policy, &bad);
        if (n_bad < 0) {
            snprintf(sol->message, sizeof sol->message, "linear program: out of memory");
            return BC_SOLVE_NOMEM;
        }
    }
    int n = snprintf(sol->message, sizeof sol->message,
                     "linear program (GLPK simplex%s): %lld iterations%s, Bellman residual %.3g; %s",
                     warm == 1   ? ", from value iteration's policy"
                     : warm == 2 ? ", from a terminating policy"
                                 : "",
                     (long long)sol->iterations,
                     st == BC_SOLVE_NOT_CONVERGED ? " (stopped by the limit)" : "", resid,
                     g < 1.0 ? "proven |V - V*| <= residual/(1-g) = " : "no bound is proven at discount 1");
    if (n > 0 && (size_t)n < sizeof sol->message && g < 1.0)
        n += snprintf(sol->message + n, sizeof sol->message - (size_t)n, "%.3g", sol->bound);
    if (n > 0 && (size_t)n < sizeof sol->message && n_bad > 0) {
        char label[32];
        snprintf(sol->message + n, sizeof sol->message - (size_t)n,
                 "; the greedy policy never terminates from %lld states (first: %s)",
                 (long long)n_bad, bc_sv_state_label(m, bad, label));
    }
    return st;
}

bc_solve_status bc_solve_lp(const bc_model *m, const bc_solve_opts *o, bc_solution *sol)
{
    const double t0 = bc_sv_now();
    bc_solve_status st = bc_sv_begin(m, BC_METHOD_LP, sol);
    if (st != BC_SOLVE_OK)
        return st;
    lp_matrix a;
    int built = lp_matrix_build(m, &a);
    if (built < 0) {
        snprintf(sol->message, sizeof sol->message, "linear program: %s",
                 built == -1 ? "out of memory" : "the model is too large for GLPK (int indices)");
        return bc_sv_finish(m, sol, built == -1 ? BC_SOLVE_NOMEM : BC_SOLVE_FAILED, t0);
    }
    if (a.n_cols == 0) { /* every state is terminal: values 0, nothing to solve */
        lp_matrix_free(&a);
        sol->bound = 0.0;
        snprintf(sol->message, sizeof sol->message, "linear program: every state is terminal");
        return bc_sv_finish(m, sol, BC_SOLVE_OK, t0);
    }
    lp_outcome r;
    int have_warm = warm_policy(m, o, sol->policy);
    if (have_warm < 0) {
        lp_matrix_free(&a);
        snprintf(sol->message, sizeof sol->message, "linear program: out of memory");
        return bc_sv_finish(m, sol, BC_SOLVE_NOMEM, t0);
    }
    bc_solve_opts rest = *o; /* GLPK gets the time value iteration left */
    if (o->max_seconds > 0)
        rest.max_seconds = fmax(o->max_seconds - (bc_sv_now() - t0), 1e-3);
    if (run_glpk(m, &rest, &a, have_warm ? sol->policy : NULL, have_warm, sol->values, &r) < 0) {
        lp_matrix_free(&a);
        memset(sol->values, 0, (size_t)m->n_states * sizeof *sol->values);
        snprintf(sol->message, sizeof sol->message,
                 "linear program: GLPK stopped with an internal error (out of memory?)");
        return bc_sv_finish(m, sol, BC_SOLVE_FAILED, t0);
    }
    lp_matrix_free(&a);
    sol->iterations = r.iterations;
    st = judge_outcome(&r, sol);
    if (st != BC_SOLVE_FAILED)
        st = conclude(m, sol, st, r.warm);
    return bc_sv_finish(m, sol, st, t0);
}
