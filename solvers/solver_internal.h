/* solver_internal.h — what the solvers share: the sign convention, Bellman backups, rounding allowances, timing, proper policies. */
/*
 * Copyright (C) 2026 the bellcheck developers.
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Conventions every solver follows:
 *  - Solvers maximise.  A model with objective min is solved as the model with
 *    rewards multiplied by sgn = -1; the sign enters in exactly two places:
 *    bc_sv_reward() on the way in and bc_sv_finish() on the way out.
 *  - A value vector is indexed by state and holds 0 at every terminal state,
 *    always; backups read successors' values without testing for terminality.
 *  - Ties between pairs of a state go to the first pair (lowest action index).
 * Nothing here is public: these names are internal to libbellcheck.
 */
#ifndef BC_SOLVER_INTERNAL_H
#define BC_SOLVER_INTERNAL_H

#include <float.h>
#include <stdint.h>

#include "bellcheck.h"

/* +1 for objective max, -1 for objective min (rewards are then costs). */
static inline double bc_sv_sign(const bc_model *m)
{
    return m->objective == BC_MIN ? -1.0 : 1.0;
}

/* Reward of pair p in the solvers' maximising convention. */
static inline double bc_sv_reward(const bc_model *m, double sgn, int64_t p)
{
    return sgn * m->reward[p];
}

/* Q-value of pair p under values v: sgn*r(p) + g * sum_t P(t|p) v(t). */
static inline double bc_sv_pair_q(const bc_model *m, double sgn, const double *v, int64_t p)
{
    const int64_t end = m->pair_trans_start[p + 1];
    double acc = 0.0;
    for (int64_t k = m->pair_trans_start[p]; k < end; k++)
        acc += m->prob[k] * v[m->succ_state[k]];
    return bc_sv_reward(m, sgn, p) + m->discount * acc;
}

/* Bellman backup of non-terminal state s: the best Q-value; *best_pair gets
 * the first pair reaching it (strict comparison keeps the lowest action). */
static inline double bc_sv_backup(const bc_model *m, double sgn, const double *v, int32_t s,
                                  int64_t *best_pair)
{
    int64_t p = m->state_pair_start[s];
    const int64_t end = m->state_pair_start[s + 1];
    int64_t arg = p;
    double best = bc_sv_pair_q(m, sgn, v, p);
    for (p++; p < end; p++) {
        double q = bc_sv_pair_q(m, sgn, v, p);
        if (q > best) {
            best = q;
            arg = p;
        }
    }
    *best_pair = arg;
    return best;
}

/* Sizes that fix the floating-point rounding allowance of a backup. */
typedef struct {
    int64_t max_succ;   /* largest number of successors of one pair */
    double reward_max;  /* max_p |reward[p]| */
} bc_sv_scales;

void bc_sv_scales_of(const bc_model *m, bc_sv_scales *sc);

/* Upper bound on |computed - exact| of one backup when max_s |v(s)| <= vmax,
 * "exact" meaning the model's exact rationals.  With u = DBL_EPSILON/2 and
 * S = sum_t P(t|p) |v(t)| <= vmax, first-order error terms:
 *   k u g S   the dot product of k terms, sequential summation (Higham,
 *             Accuracy and Stability of Numerical Algorithms, 2002, 3.1);
 *   u g S     each probability rounded to double;
 *   u g S     the discount rounded to double, and u g S its product;
 *   u (|r| + g S) the final sum, and u |r| the reward rounded to double.
 * That is at most (k+4) u (|r| + g S); one more u absorbs second-order terms.
 * (A reward the reader computed from outcome rewards carries its own
 * rounding, which this does not cover.) */
static inline double bc_sv_backup_error(const bc_model *m, const bc_sv_scales *sc, double vmax)
{
    return (double)(sc->max_succ + 5) * (DBL_EPSILON / 2) * (sc->reward_max + m->discount * vmax);
}

/* The name of state s for messages ("#s" when the model has no names);
 * buf must hold 32 bytes.  Returns the name or buf. */
const char *bc_sv_state_label(const bc_model *m, int32_t s, char *buf);

/* Monotonic wall-clock seconds. */
double bc_sv_now(void);

/* Starts a solve: zeroes sol (it is output only; see bc_solve), sets method
 * and allocates values[n_states] and policy[n_states].  Also refuses a model
 * whose horizon does not fit the method (message set).  Returns BC_SOLVE_OK,
 * BC_SOLVE_NOMEM or BC_SOLVE_FAILED. */
bc_solve_status bc_sv_begin(const bc_model *m, bc_method method, bc_solution *sol);

/* Ends a solve: turns values from the maximising convention back into the
 * model's sign, computes value_initial and seconds since t0, stores status. */
bc_solve_status bc_sv_finish(const bc_model *m, bc_solution *sol, bc_solve_status st, double t0);

/* Greedy policy w.r.t. v (maximising convention); -1 for terminal states. */
void bc_sv_greedy(const bc_model *m, double sgn, const double *v, int64_t *policy);

/* One Jacobi application of the Bellman operator: tv = T v (tv may be NULL),
 * and min / max over all states of d = Tv - v (terminal states count with
 * d = 0; see vi.c for why).  Returns max_s |v(s)| over v and Tv. */
double bc_sv_bellman(const bc_model *m, double sgn, const double *v, double *tv, double *dmin,
                     double *dmax);

/* UMFPACK's estimate of the flops of one policy-iteration factorisation
 * (starting policy); -1 if it cannot be had (no memory, no proper policy). */
double bc_sv_pi_lu_flops(const bc_model *m);

/* --- Sparse LU evaluation of a policy (pi.c; shared with scoring) ------- */

/* The matrix A = I - g P_pi (g = m->discount) over a set of states, the
 * "system", factorised by UMFPACK with two steps of iterative refinement.
 * Transitions to states outside the system are dropped: they must lead to
 * states of value 0 (terminal states) or be accounted for by the caller in
 * the right-hand side. */
typedef struct bc_sv_eval bc_sv_eval;

/* Workspace for the states with in_system[s] = 1 (NULL: the non-terminal
 * states); stochastic = 1 makes room for rows that mix several pairs.
 * NULL if out of memory. */
bc_sv_eval *bc_sv_eval_new(const bc_model *m, const uint8_t *in_system, int stochastic);
void bc_sv_eval_free(bc_sv_eval *w); /* NULL is allowed */
/* Builds A for the stochastic policy prob ([n_pairs]; a row mixes the pairs
 * of its state with these weights) and factorises it (workspace made with
 * stochastic = 1).  BC_SOLVE_OK, or BC_SOLVE_FAILED / BC_SOLVE_NOMEM with
 * why[] saying what went wrong (a singular or nearly singular matrix). */
bc_solve_status bc_sv_eval_factorise(const bc_model *m, bc_sv_eval *w, const double *prob,
                                     char *why, size_t cap);
/* UMFPACK's estimate (an upper bound) of the flops of factorising A for the
 * stochastic policy prob; -1 if it cannot be had.  Leaves no factors. */
double bc_sv_eval_flops(const bc_model *m, bc_sv_eval *w, const double *prob);
/* Solves A x = b (transpose: A^T x = b) with the last factors; b and x are
 * indexed by state, b is read only on the system and x is 0 outside it.
 * 0, or -1 if the solve failed or gave a non-finite x. */
int bc_sv_eval_solve(const bc_model *m, bc_sv_eval *w, int transpose, const double *b, double *x);

/* Value iteration (discount < 1) that gives up, with *slow = 1, status
 * NOT_CONVERGED and sol->values holding its last midpoint in the maximising
 * convention (not yet in the model's sign), once its half-widths predict
 * more than BC_SV_HANDOVER_SWEEPS further sweeps and its greedy policy has
 * stopped changing (or BC_SV_WARM_SWEEPS sweeps are spent): a warm start
 * for policy iteration.  Otherwise it is bc_solve_vi. */
bc_solve_status bc_sv_vi_or_handover(const bc_model *m, const bc_solve_opts *o, bc_solution *sol,
                                     int *slow);
#define BC_SV_HANDOVER_SWEEPS 300
#define BC_SV_WARM_SWEEPS 1000
/* Models up to this many states: auto prices policy iteration's factorisation. */
#define BC_SV_SMALL_MODEL 100
/* Policy iteration started from the greedy policy of v0 (maximising
 * convention, 0 at terminal states; discount < 1), else bc_solve_pi.
 * skipped_sweeps: value-iteration sweeps already spent, for the message. */
bc_solve_status bc_sv_solve_pi_warm(const bc_model *m, const bc_solve_opts *o, const double *v0,
                                    int64_t skipped_sweeps, bc_solution *sol);

/* --- Convergence history (solvers/trace.c) ------------------------------ */

/* Points a solution's history keeps at most (it is thinned when full). */
#define BC_SV_TRACE_MAX 4096
/* Records iteration's residual and proven bound (-1: none) when the thinning keeps it. */
void bc_sv_trace(bc_solution *sol, bc_method method, int64_t iteration, double residual,
                 double bound);
/* Records the final iteration whatever the thinning (replacing it if already recorded). */
void bc_sv_trace_last(bc_solution *sol, bc_method method, int64_t iteration, double residual,
                      double bound);
/* Puts first[0..n_first) before dst's history (it may have been longer than
 * BC_SV_TRACE_MAX then); 0, or -1 when out of memory (dst unchanged). */
int bc_sv_trace_join(bc_solution *dst, bc_trace_point *first, int64_t n_first);

/* Default limits when o->max_iter is 0. */
#define BC_SV_VI_MAX_SWEEPS 1000000
#define BC_SV_PI_MAX_STEPS 10000

/* 1 when the caller's time budget is spent. */
static inline int bc_sv_out_of_time(const bc_solve_opts *o, double t0)
{
    return o->max_seconds > 0 && bc_sv_now() - t0 > o->max_seconds;
}

/* --- Proper policies (discount 1: termination with probability 1) ------- */

/* Chooses, for every state from which some policy over the allowed pairs
 * (allowed == NULL: all pairs) reaches a terminal state with probability 1,
 * a pair that moves strictly closer to the terminal set with positive
 * probability while never leaving that set of states.  policy[s] = -1 for
 * terminal states and for states without such a policy.  Returns the number
 * of non-terminal states without one (*first_bad gets the lowest), or -1
 * when out of memory. */
int64_t bc_sv_proper_policy(const bc_model *m, const uint8_t *allowed, int64_t *policy,
                            int32_t *first_bad);

/* Checks that policy reaches a terminal state with probability 1 from every
 * state.  Returns the number of states from which it does not (*first_bad
 * gets the lowest; proper[s], if not NULL, gets 1/0 per state), or -1 when out
 * of memory. */
int64_t bc_sv_policy_proper(const bc_model *m, const int64_t *policy, uint8_t *proper,
                            int32_t *first_bad);

/* Discount 1: greedy w.r.t. v may pick a zero-reward loop that ties with
 * terminating (e.g. "stay" vs "go" when both are worth the same).  This keeps
 * the greedy choice where it terminates and elsewhere picks, among pairs
 * within tie_tol of the best, ones that terminate.  Returns 0 when the
 * result is proper, the number of non-terminating states otherwise (policy
 * then stays greedy there), -1 when out of memory. */
int64_t bc_sv_greedy_proper(const bc_model *m, double sgn, const double *v, double tie_tol,
                            int64_t *policy, int32_t *first_bad);

#endif /* BC_SOLVER_INTERNAL_H */
