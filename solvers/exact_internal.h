/* exact_internal.h — what the exact solvers share: a sparse rational linear system and its solver, exact Q-values. */
/*
 * Copyright (C) 2026 the bellcheck developers.
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Nothing here is public.  Exact arithmetic is GMP's mpq_t throughout; these
 * routines are called once per verification, never from a hot float loop.
 */
#ifndef BC_EXACT_INTERNAL_H
#define BC_EXACT_INTERNAL_H

#include <gmp.h>
#include <stdint.h>

#include "bellcheck.h"

/* A square system A x = rhs over the rationals in compressed sparse rows.
 * Row i's entries are col[row_start[i] .. row_start[i+1]-1] (columns
 * distinct, any order) with values val[...]; every mpq_t is initialised. */
typedef struct {
    int32_t n;
    int64_t *row_start; /* [n + 1] */
    int32_t *col;       /* [nnz] */
    mpq_t *val;         /* [nnz] */
    mpq_t *rhs;         /* [n] */
    int64_t cap;        /* entries allocated in col / val */
} bc__qsys;

/* Allocates a system of n rows with room for cap entries (all mpq_t
 * initialised to 0).  0, or -1 if out of memory (nothing left allocated). */
int bc__qsys_alloc(bc__qsys *A, int32_t n, int64_t cap);
void bc__qsys_free(bc__qsys *A); /* clears every mpq_t and frees the arrays */

/* Outcomes of bc__qsys_solve. */
enum { BC__QSYS_OK = 0, BC__QSYS_NOMEM = -1, BC__QSYS_SINGULAR = -2, BC__QSYS_TOO_BIG = -3,
       BC__QSYS_OVER_LIMIT = -4 /* refused by the memory limit (--max-memory), nothing allocated */ };

/* Solves A x = rhs exactly by Gaussian elimination without pivoting in a
 * fill-reducing symmetric order (AMD on the pattern of A + A^T).  Without
 * pivoting this is only safe for matrices whose symmetric permutations keep
 * non-zero pivots: I - g P with g < 1 (strictly diagonally dominant by rows)
 * and I - P over the transient states of a terminating policy (a
 * non-singular M-matrix) are both such.  x[0..n) must be initialised.
 * Stops with BC__QSYS_TOO_BIG when the factor would hold more than max_fill
 * entries or max_seconds (> 0) pass; *bad_row gets the row of a zero pivot. */
int bc__qsys_solve(const bc__qsys *A, mpq_t *x, int64_t max_fill, double max_seconds,
                   int32_t *bad_row, int64_t *fill_out);

/* Solves A x = rhs exactly by Dixon's p-adic lifting on a dense integer
 * copy of A (FLINT).  BC__QSYS_OK, or BC__QSYS_SINGULAR (*bad_row = 0:
 * the method does not locate the problem). */
int bc__qsys_solve_dense(const bc__qsys *A, mpq_t *x, int32_t *bad_row);

/* Exact Q-value of pair p in the maximising convention (sgn = -1 for
 * objective min): sgn * r(p) + g * sum_t P(t|p) v(succ(t)); `g` exact, `v`
 * indexed by state.  `tmp` is scratch (initialised). */
void bc__exact_pair_q(const bc_model *m, int sgn, const mpq_t g, const mpq_t *v, int64_t p,
                      mpq_t out, mpq_t tmp);

/* A value vector over one common denominator: v[s] = x[s] / den (den > 0).
 * Comparing Q-values in this form needs only products of a big number by a
 * small one: no gcd of two big numbers, which is what makes rational
 * arithmetic on optimal values (thousands of digits) slow. */
typedef struct {
    int32_t n;
    mpz_t *x;
    mpz_t den;
} bc__qvec;

int bc__qvec_from_mpq(bc__qvec *v, const mpq_t *vals, int32_t n, int sgn); /* v = sgn * vals; 0 or -1 */
void bc__qvec_free(bc__qvec *v);

/* Scratch for bc__qvec_pair_cmp. */
typedef struct {
    mpz_t num, den, acc_num, acc_den, t, pn, pd, l;
    mpq_t q;
} bc__qscratch;
void bc__qscratch_init(bc__qscratch *w);
void bc__qscratch_clear(bc__qscratch *w);

/* Sign of Q(p) - v(s) for s the state of p, in the maximising convention,
 * with Q(p) = sgn r(p) + g sum_t P(t|p) v(succ t) exactly; g exact. */
int bc__qvec_pair_cmp(const bc_model *m, int sgn, const mpq_t g, const bc__qvec *v, int64_t p,
                      bc__qscratch *w);

/* Monotonic seconds (solvers' clock). */
double bc__exact_now(void);

#endif /* BC_EXACT_INTERNAL_H */
