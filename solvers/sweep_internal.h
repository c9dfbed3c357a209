/* sweep_internal.h — the solvers' Jacobi Bellman sweep (solvers/sweep.c): the one hot loop, threaded. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#ifndef BC_SWEEP_INTERNAL_H
#define BC_SWEEP_INTERNAL_H

#include <stdint.h>

#include "bellcheck.h"

/* What one sweep found, over every state (terminal states count with
 * Tv = v = 0, so d = 0 there). */
typedef struct {
    double dmin, dmax; /* min and max of d = Tv - v; 0, 0 when there are no states */
    double vmax;       /* max |v(s)|, |Tv(s)| */
} bc__sweep_stat;

/* tv = T v in the maximising convention (sgn = bc_sv_sign), and, when
 * policy is not NULL, policy[s] = the first pair reaching the maximum (-1 for
 * terminal states).  v must be 0 at terminal states; tv must not alias v.
 * Each state is computed by the same sequence of operations whatever the
 * number of threads, and min/max are exact, so the results do not depend
 * on threads (0 or 1: one thread). */
void bc__sweep_jacobi(const bc_model *m, double sgn, const double *v, double *tv, int64_t *policy,
                      int threads, bc__sweep_stat *st);

/* Bytes of the arrays one sweep reads or writes in order (the successor
 * values it gathers are not counted: they are reused from the cache). */
double bc__sweep_bytes(const bc_model *m);

/* The thread count to use for a request of `threads` (0 = 1). */
int bc__sweep_threads(int threads);

#endif
