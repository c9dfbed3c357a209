/* proof_internal.h — what the verifiers share: outward-rounded enclosures of a model's numbers and interval Bellman passes. */
/*
 * Copyright (C) 2026 the bellcheck developers.
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Every routine declared here runs with the rounding mode set to downward
 * for its own duration (and restores the caller's); interval.c is compiled
 * with -frounding-math so that the compiler neither folds nor reorders its
 * floating-point operations.  Values are in the maximising convention
 * (rewards times sgn), as in solver_internal.h.
 */
#ifndef BC_PROOF_INTERNAL_H
#define BC_PROOF_INTERNAL_H

#include <stdint.h>

#include "bellcheck.h"

/* Outward-rounded double enclosures of a model's exact numbers: each decimal
 * probability lies in [plo, phi], each pair's exact expected reward times sgn
 * in [rlo, rhi], the discount in [glo, ghi].  Most decimals are not doubles,
 * so these intervals are usually one ulp wide. */
typedef struct {
    double *plo, *phi; /* [n_trans] */
    double *rlo, *rhi; /* [n_pairs] */
    double glo, ghi;
    char why[256];     /* after -2 from bc__enclosure_build: why no interval proof is made */
} bc__enclosure;

/* Builds the enclosures of m (discount g: m's own); 0, -1 if out of memory,
 * -2 when no interval proof can be made, e->why saying why: this machine (or
 * an emulator) does not honour the rounding mode, so that no interval proof
 * can be trusted, or the arrays would pass the memory limit (--max-memory). */
int bc__enclosure_build(const bc_model *m, int sgn, bc__enclosure *e);
void bc__enclosure_free(bc__enclosure *e);

/* Result of one interval pass of the Bellman operator at a point v. */
typedef struct {
    double dmin, dmax; /* min_s lower(Tv - v), max_s upper(Tv - v); terminal states count as 0 */
    double pmin, pmax; /* the same for T_pi v - v (the policy's own pair) */
    double lo, hi;     /* proven V* - v in [lo, hi] (discount < 1) */
    double plo, phi;   /* proven V^pi - v in [plo, phi] (discount < 1) */
    int32_t worst_state; /* where |Tv - v| may be largest; -1 if every state is terminal */
} bc__interval_pass;

/* One pass at v for the policy pi (pairs; -1 at terminal states).  margin[s]
 * (may be NULL) gets a lower bound on Q(s,pi(s)) - max_{p != pi(s)} Q(s,p) at
 * v (+INFINITY for a state with one pair).  0, or -1 when a value is not
 * finite.  Discount must be < 1 for lo/hi/plo/phi to mean anything. */
int bc__interval_check(const bc_model *m, const bc__enclosure *e, const double *v,
                       const int64_t *pi, double *margin, bc__interval_pass *out);

/* From one pass's margins: the policy's pair is proven optimal in state s
 * when margin[s] > g (hi - lo) (no other pair can beat it for any V* in the
 * enclosure).  Counts those states and the undecided ones, and returns a
 * proven bound on the policy's loss: 0 when every state is decided, else
 * hi - plo (V* - V^pi <= (V* - v) - (V^pi - v)). */
double bc__policy_loss(const bc_model *m, const bc__enclosure *e, const double *margin,
                       const bc__interval_pass *ps, int32_t *n_proven, int32_t *n_undecided);

/* A stochastic policy (weights prob[p], exact doubles) at a point v: the
 * range [*dmin, *dmax] of T_pi v - v over the non-terminal states, terminal
 * states counting 0.  0, or -1 when a value is not finite. */
int bc__interval_mixed(const bc_model *m, const bc__enclosure *e, const double *v,
                       const double *prob, double *dmin, double *dmax);

/* A Q-table's residual and distance to Q*, enclosed.  e is built with
 * sgn = +1 (model sign); g in [glo, ghi] is the discount of the table's
 * backup; vq[s] the table's best value per state (NAN: not covered, and a
 * pair reaching such a state is skipped, as the float residual skips it);
 * [vlo, vhi] an enclosure of V* (vlo NULL: no q-error).  Over the pairs of
 * covered states: max |TQ - Q| in [*res_lo, *res_hi] and max |Q - Q*| in
 * [*err_lo, *err_hi]. */
void bc__interval_qtable(const bc_model *m, const bc__enclosure *e, double glo, double ghi,
                         const double *q, const uint8_t *present, const double *vq,
                         const double *vlo, const double *vhi, double *res_lo, double *res_hi,
                         double *err_lo, double *err_hi);

/* Discount 1: a lower bound on min over non-terminal s of
 * N(s) - sum_t P(t | pi(s)) N(t) (terminal states have N = 0). */
double bc__interval_policy_drop(const bc_model *m, const bc__enclosure *e, const int64_t *pi,
                                const double *N);

/* Finite horizon: proven enclosures [lo, hi] of V*_0 and [plo, phi] of the
 * stage policy's value at stage 0 (stage_policy as in bc_solution).  Arrays
 * are [n_states]; 0, or -1 if out of memory or a value is not finite. */
int bc__interval_backward(const bc_model *m, const bc__enclosure *e, const int64_t *stage_policy,
                          double *lo, double *hi, double *plo, double *phi);

/* Upper bound on |x - sum_s initial(s) V(s)| for every V in [lower, upper]
 * (exact initial probabilities enclosed like the model's numbers). */
double bc__initial_bound(const bc_model *m, const double *lower, const double *upper, double x);

/* Upper bound of a - b and lower bound of a - b, rounded outward. */
double bc__sub_up(double a, double b);
double bc__sub_down(double a, double b);
/* Upper bound of a + b. */
double bc__add_up(double a, double b);

#endif /* BC_PROOF_INTERNAL_H */
