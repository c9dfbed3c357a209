/* score_internal.h — what the scoring files share: traps and reach probability (score_traps.c), policy evaluation (score_eval.c). */
/*
 * Copyright (C) 2026 the bellcheck developers.
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * A policy here is stochastic and laid over the model's pairs: prob[p] is the
 * probability of pair p in its state, and over the pairs of each
 * non-terminal state the probabilities sum to 1.  Its support is the pairs
 * with prob[p] > 0 and, of those, the transitions with P > 0.
 * Nothing here is public: these names are internal to libbellcheck.
 */
#ifndef BC_SCORE_INTERNAL_H
#define BC_SCORE_INTERNAL_H

#include <stddef.h>
#include <stdint.h>

#include "bellcheck.h"

/* --- Traps (score_traps.c) ---------------------------------------------- */

/* trap[s] = 1 for every state from which the policy reaches a terminal
 * state with probability < 1 (a graph search on the support; meaningful at
 * discount 1).  Returns the number of traps, or -1 when out of memory. */
int32_t bc_sc_find_traps(const bc_model *m, const double *prob, uint8_t *trap);

/* Probability that the policy, started from m->initial, reaches a terminal
 * state; trap as found by bc_sc_find_traps (m->discount must be 1).
 * 0, or -1 with msg set (out of memory, failed solve). */
int bc_sc_reach_probability(const bc_model *m, const double *prob, const uint8_t *trap,
                            double *reach, char *msg, size_t cap);

/* An adversary choosing, in every non-terminal state, one of the pairs with
 * allowed[p] = 1: stuck[s] = 1 for the states from which some choice fails
 * to terminate with positive probability, and choice[s] gets such a choice
 * there (-1 elsewhere).  Returns the number of stuck states, or -1 when out
 * of memory. */
int32_t bc_sc_avoidable(const bc_model *m, const uint8_t *allowed, uint8_t *stuck,
                        int64_t *choice);

/* --- Evaluation (score_eval.c) ------------------------------------------ */

/* What the evaluation of a policy gives. */
typedef struct {
    double *values;  /* [n_states] V of the policy, model's sign; -inf / +inf (min) at traps */
    double *visits;  /* [n_states] expected discounted visits from the initial distribution,
                      * sum_t g^t Pr(S_t = s); 0 at terminal states and traps */
    double bound;    /* proven bound on max_s |values[s] - V(s)| off the traps, or -1 */
    double residual; /* max_s |r_pi(s) + g P_pi v(s) - v(s)| off the traps */
    int64_t sweeps;  /* 0: sparse LU; else the Gauss-Seidel sweeps used instead */
} bc_sc_eval;

/* Evaluates the policy prob on m (discount m->discount) over the
 * non-terminal states that are not traps (trap may be NULL: none): by one
 * sparse LU factorisation of I - g P_pi, the same linear algebra as policy
 * iteration, or, under discount < 1 when that is estimated dearer, by
 * Gauss-Seidel iteration to so->tol (so's limits apply).  The caller
 * provides values and visits ([n_states] each).  0, or -1 with msg set. */
int bc_sc_evaluate(const bc_model *m, const double *prob, const uint8_t *trap,
                   const bc_solve_opts *so, bc_sc_eval *ev, char *msg, size_t cap);

/* sum_p prob[p] (r(p) + g sum_t P(t|p) v(t)) over the pairs of non-terminal
 * state s, in the model's sign; pairs and transitions of probability 0 are
 * skipped (so an infinite v off the support does no harm). */
double bc_sc_mixed_backup(const bc_model *m, const double *prob, const double *v, int32_t s);

/* The table's best value in state t (objective's sense): 0 at terminal
 * states, NAN where the table does not cover t (score.c). */
double bc_sc_q_best(const bc_model *m, const bc_qtable *q, int32_t t);

/* --- Proofs of the figures (score_proof.c) ------------------------------ */

/* Proves the optimum just solved (bc_prove_solution; exact may replace its
 * values and policy) and sets optimal_initial_proof.  0 or -1 (message set). */
int bc_sc_prove_optimum(const bc_model *m, const bc_prove_opts *po, bc_score *out);
/* Proves the agent's values (out->values, policy out->agent_prob, traps
 * left out): exact evaluation when the optimum was proven exact (values are
 * then replaced by the doubles nearest the exact ones), else an interval
 * pass at discount < 1.  Call before the regrets are computed.  0 or -1. */
int bc_sc_prove_agent(const bc_model *m, const uint8_t *trap, const bc_prove_opts *po,
                      bc_score *out);
/* With an exact optimum: out->acts decided exactly, BC_ACT_OPTIMAL where every
 * pair the agent uses in a covered non-terminal state has Q*(s,a) = V*(s)
 * as rationals, BC_ACT_SUBOPTIMAL where one falls short.  0 done; 1 when
 * the optimum is not exact (nothing set); -1 when out of memory. */
int bc_sc_decide_exact(const bc_model *m, const uint8_t *present, bc_score *out);
/* After the regrets and the Q-table statistics: exact regrets (when both
 * sides are exact: state_regret, regret_initial and regret_max_state are
 * replaced by the doubles nearest them) or their interval bounds; the
 * residual and max |Q - Q*| enclosed by outward rounding.  q may be NULL. */
int bc_sc_prove_figures(const bc_model *m, const bc_qtable *q, double g_q, const uint8_t *trap,
                        bc_score *out);

#endif /* BC_SCORE_INTERNAL_H */
