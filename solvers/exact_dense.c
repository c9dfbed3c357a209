/* exact_dense.c — exact solution of a rational system by p-adic lifting (Dixon's method, FLINT), for systems that fill in. */
/*
 * Copyright (C) 2026 the bellcheck developers.
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Each row is scaled by the least common multiple of its denominators, which
 * turns A x = b into an integer system of the same solution; FLINT's
 * fmpz_mat_solve_dixon_den then solves it modulo a prime and lifts the
 * solution p-adically until rational reconstruction gives X / den exactly
 * (Dixon, Exact solution of linear equations using p-adic expansions, 1982).
 * Its cost grows with n^3 for one dense LU modulo p plus n^2 per lifting
 * step, not with the size of the intermediate fractions, which is what makes
 * exact_lu.c slow on models whose transition graphs look random (measured
 * in docs/methods.md).  The matrix is dense: memory n^2 integers.
 */
#include "exact_internal.h"

#include <flint/fmpz.h>
#include <flint/fmpz_mat.h>
#include <stdlib.h>

/* L = lcm of the denominators of row i and of rhs[i]. */
static void row_scale(const bc__qsys *A, int32_t i, mpz_t L)
{
    mpz_set(L, mpq_denref(A->rhs[i]));
    for (int64_t e = A->row_start[i]; e < A->row_start[i + 1]; e++)
        mpz_lcm(L, L, mpq_denref(A->val[e]));
}

int bc__qsys_solve_dense(const bc__qsys *A, mpq_t *x, int32_t *bad_row)
{
    const int32_t n = A->n;
    *bad_row = -1;
    if (n == 0)
        return BC__QSYS_OK;
    fmpz_mat_t M, B, X;
    fmpz_t den;
    fmpz_mat_init(M, n, n);
    fmpz_mat_init(B, n, 1);
    fmpz_mat_init(X, n, 1);
    fmpz_init(den);
    mpz_t L, t;
    mpz_inits(L, t, NULL);
    for (int32_t i = 0; i < n; i++) {
        row_scale(A, i, L);
        for (int64_t e = A->row_start[i]; e < A->row_start[i + 1]; e++) {
            mpz_divexact(t, L, mpq_denref(A->val[e]));
            mpz_mul(t, t, mpq_numref(A->val[e]));
            fmpz_set_mpz(fmpz_mat_entry(M, i, A->col[e]), t);
        }
        mpz_divexact(t, L, mpq_denref(A->rhs[i]));
        mpz_mul(t, t, mpq_numref(A->rhs[i]));
        fmpz_set_mpz(fmpz_mat_entry(B, i, 0), t);
    }
    int st = fmpz_mat_solve_dixon_den(X, den, M, B) ? BC__QSYS_OK : BC__QSYS_SINGULAR;
    if (st == BC__QSYS_OK) {
        fmpz_get_mpz(L, den);
        for (int32_t i = 0; i < n; i++) {
            fmpz_get_mpz(mpq_numref(x[i]), fmpz_mat_entry(X, i, 0));
            mpz_set(mpq_denref(x[i]), L);
            mpq_canonicalize(x[i]);
        }
    } else {
        *bad_row = 0; /* FLINT does not say where */
    }
    mpz_clears(L, t, NULL);
    fmpz_clear(den);
    fmpz_mat_clear(X);
    fmpz_mat_clear(B);
    fmpz_mat_clear(M);
    return st;
}
