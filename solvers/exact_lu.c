/* exact_lu.c — exact sparse Gaussian elimination over the rationals (GMP), in a fill-reducing order. */
/*
 * Copyright (C) 2026 the bellcheck developers.
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Row-by-row ("up-looking") elimination: row k of the permuted matrix is
 * loaded into a dense accumulator, the earlier pivot rows are subtracted in
 * increasing column order (a binary heap holds the columns still to
 * eliminate, since fill can add columns behind the current one), and what is
 * left from the diagonal on becomes row k of U.  The right-hand side is
 * carried along, so L is never stored; back substitution on U finishes.
 *
 * No pivoting: the matrices we solve (see exact_internal.h) keep non-zero
 * pivots under any symmetric permutation, and a zero pivot is reported, not
 * worked around.  Numbers stay in lowest terms (mpq_t); on the structured
 * models this is meant for (chains, grids, small random models) that is
 * cheaper than fraction-free integer elimination, whose entries grow with
 * every step whether or not they could cancel (measured: docs/methods.md).
 */
#include "exact_internal.h"

#include <amd.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

double bc__exact_now(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

int bc__qsys_alloc(bc__qsys *A, int32_t n, int64_t cap)
{
    memset(A, 0, sizeof *A);
    A->n = n;
    A->cap = cap;
    A->row_start = calloc((size_t)n + 1, sizeof *A->row_start);
    A->col = malloc((size_t)(cap ? cap : 1) * sizeof *A->col);
    A->val = malloc((size_t)(cap ? cap : 1) * sizeof *A->val);
    A->rhs = malloc((size_t)(n ? n : 1) * sizeof *A->rhs);
    if (!A->row_start || !A->col || !A->val || !A->rhs) {
        free(A->row_start);
        free(A->col);
        free(A->val);
        free(A->rhs);
        memset(A, 0, sizeof *A);
        return -1;
    }
    for (int64_t e = 0; e < cap; e++)
        mpq_init(A->val[e]);
    for (int32_t i = 0; i < n; i++)
        mpq_init(A->rhs[i]);
    return 0;
}

void bc__qsys_free(bc__qsys *A)
{
    if (!A->row_start)
        return;
    for (int64_t e = 0; e < A->cap; e++)
        mpq_clear(A->val[e]);
    for (int32_t i = 0; i < A->n; i++)
        mpq_clear(A->rhs[i]);
    free(A->row_start);
    free(A->col);
    free(A->val);
    free(A->rhs);
    memset(A, 0, sizeof *A);
}

/* --- a min-heap of column indices ---------------------------------------- */

static void heap_push(int32_t *h, int32_t *n, int32_t c)
{
    int32_t i = (*n)++;
    while (i > 0) {
        int32_t up = (i - 1) / 2;
        if (h[up] <= c)
            break;
        h[i] = h[up];
        i = up;
    }
    h[i] = c;
}

static int32_t heap_pop(int32_t *h, int32_t *n)
{
    int32_t top = h[0], last = h[--(*n)], i = 0;
    for (;;) {
        int32_t kid = 2 * i + 1;
        if (kid >= *n)
            break;
        if (kid + 1 < *n && h[kid + 1] < h[kid])
            kid++;
        if (h[kid] >= last)
            break;
        h[i] = h[kid];
        i = kid;
    }
    if (*n > 0)
        h[i] = last;
    return top;
}

/* --- the factor U, grown row by row ---------------------------------------- */

typedef struct {
    int64_t *start; /* [n + 1]; row k's first entry is its diagonal */
    int32_t *col;
    mpq_t *val;
    int64_t len, cap;
} urows;

static int urows_reserve(urows *u, int64_t need)
{
    if (need <= u->cap)
        return 0;
    int64_t cap = u->cap ? u->cap : 1024;
    while (cap < need)
        cap *= 2;
    int32_t *c = realloc(u->col, (size_t)cap * sizeof *c);
    if (!c)
        return -1;
    u->col = c;
    /* mpq_t holds pointers to its limbs, never to itself: moving it is safe. */
    mpq_t *v = realloc(u->val, (size_t)cap * sizeof *v);
    if (!v)
        return -1;
    u->val = v;
    for (int64_t e = u->cap; e < cap; e++)
        mpq_init(u->val[e]);
    u->cap = cap;
    return 0;
}

static void urows_free(urows *u)
{
    for (int64_t e = 0; e < u->cap; e++)
        mpq_clear(u->val[e]);
    free(u->start);
    free(u->col);
    free(u->val);
}

/* AMD order of A + A^T; perm[k] = original row of position k. */
static int fill_reducing_order(const bc__qsys *A, int32_t *perm)
{
    int64_t nnz = A->row_start[A->n];
    if (nnz > INT32_MAX)
        return -1;
    int32_t *ap = malloc(((size_t)A->n + 1) * sizeof *ap);
    if (!ap)
        return -1;
    for (int32_t i = 0; i <= A->n; i++)
        ap[i] = (int32_t)A->row_start[i];
    /* Rows of A are the columns of A^T; AMD orders the pattern of
     * A^T + A, which is the same.  Columns within a row may be unsorted:
     * AMD accepts that ("jumbled") and says so with AMD_OK_BUT_JUMBLED. */
    int st = amd_order(A->n, ap, A->col, perm, NULL, NULL);
    free(ap);
    return st == AMD_OK || st == AMD_OK_BUT_JUMBLED ? 0 : -1;
}

/* The number of entries U will have, from the pattern alone (no
 * cancellation assumed): the same row-by-row elimination without numbers,
 * so a system that would fill in is refused before any fraction is formed.
 * Returns -1 when out of memory, else the count (stops past limit). */
static int64_t symbolic_fill(const bc__qsys *A, const int32_t *perm, const int32_t *inv,
                             int64_t limit)
{
    const int32_t n = A->n;
    int32_t *mark = malloc((size_t)n * sizeof *mark), *heap = malloc((size_t)n * sizeof *heap);
    int32_t *list = malloc((size_t)n * sizeof *list);
    int64_t *start = calloc((size_t)n + 1, sizeof *start), cap = 1024, len = 0;
    int32_t *col = malloc((size_t)cap * sizeof *col);
    int64_t total = -1;
    if (!mark || !heap || !list || !start || !col)
        goto done;
    for (int32_t k = 0; k < n; k++)
        mark[k] = -1;
    for (int32_t k = 0; k < n && len <= limit; k++) {
        int32_t i = perm[k], nl = 0, nh = 0;
        for (int64_t e = A->row_start[i]; e < A->row_start[i + 1]; e++) {
            int32_t c = inv[A->col[e]];
            mark[c] = k, list[nl++] = c;
            if (c < k)
                heap_push(heap, &nh, c);
        }
        while (nh > 0) {
            int32_t j = heap_pop(heap, &nh);
            for (int64_t e = start[j]; e < start[j + 1]; e++) {
                int32_t c = col[e];
                if (mark[c] != k) {
                    mark[c] = k, list[nl++] = c;
                    if (c < k)
                        heap_push(heap, &nh, c);
                }
            }
        }
        if (len + nl > cap) {
            while (len + nl > cap)
                cap *= 2;
            int32_t *grown = realloc(col, (size_t)cap * sizeof *col);
            if (!grown)
                goto done;
            col = grown;
        }
        for (int32_t q = 0; q < nl; q++)
            if (list[q] > k)
                col[len++] = list[q];
        start[k + 1] = len;
    }
    total = len + n; /* plus the diagonal */
done:
    free(mark), free(heap), free(list), free(start), free(col);
    return total;
}

/* Eliminates row k (original row i) against U rows 0..k-1, then appends
 * it to U.  Returns one of the BC__QSYS_ codes. */
static int eliminate_row(const bc__qsys *A, int32_t i, int32_t k, const int32_t *inv, urows *u,
                         mpq_t *acc, int32_t *mark, int32_t *list, int32_t *heap, mpq_t *y,
                         mpq_t l, mpq_t t)
{
    int32_t nl = 0, nh = 0;
    for (int64_t e = A->row_start[i]; e < A->row_start[i + 1]; e++) {
        int32_t c = inv[A->col[e]];
        mark[c] = k;
        list[nl++] = c;
        mpq_set(acc[c], A->val[e]);
        if (c < k)
            heap_push(heap, &nh, c);
    }
    mpq_set(y[k], A->rhs[i]);
    while (nh > 0) {
        int32_t j = heap_pop(heap, &nh);
        if (mpq_sgn(acc[j]) == 0)
            continue; /* cancelled: nothing to subtract */
        int64_t d = u->start[j];
        mpq_div(l, acc[j], u->val[d]);
        for (int64_t e = d + 1; e < u->start[j + 1]; e++) {
            int32_t c = u->col[e];
            if (mark[c] != k) {
                mark[c] = k;
                list[nl++] = c;
                mpq_set_ui(acc[c], 0, 1);
                if (c < k)
                    heap_push(heap, &nh, c);
            }
            mpq_mul(t, l, u->val[e]);
            mpq_sub(acc[c], acc[c], t);
        }
        mpq_mul(t, l, y[j]);
        mpq_sub(y[k], y[k], t);
    }
    if (mark[k] != k || mpq_sgn(acc[k]) == 0)
        return BC__QSYS_SINGULAR;
    int64_t need = u->len + 1;
    for (int32_t q = 0; q < nl; q++)
        need += list[q] > k && mpq_sgn(acc[list[q]]) != 0;
    if (urows_reserve(u, need) < 0)
        return BC__QSYS_NOMEM;
    u->col[u->len] = k;
    mpq_swap(u->val[u->len++], acc[k]);
    for (int32_t q = 0; q < nl; q++) {
        int32_t c = list[q];
        if (c > k && mpq_sgn(acc[c]) != 0) {
            u->col[u->len] = c;
            mpq_swap(u->val[u->len++], acc[c]);
        }
    }
    u->start[k + 1] = u->len;
    return BC__QSYS_OK;
}

/* x[perm[k]] = (y[k] - sum_{c>k} U[k][c] xp[c]) / U[k][k], k = n-1 .. 0. */
static void back_substitute(const urows *u, int32_t n, const int32_t *perm, mpq_t *y, mpq_t *xp,
                            mpq_t *x, mpq_t t)
{
    for (int32_t k = n - 1; k >= 0; k--) {
        int64_t d = u->start[k];
        for (int64_t e = d + 1; e < u->start[k + 1]; e++) {
            mpq_mul(t, u->val[e], xp[u->col[e]]);
            mpq_sub(y[k], y[k], t);
        }
        mpq_div(xp[k], y[k], u->val[d]);
        mpq_set(x[perm[k]], xp[k]);
    }
}

int bc__qsys_solve(const bc__qsys *A, mpq_t *x, int64_t max_fill, double max_seconds,
                   int32_t *bad_row, int64_t *fill_out)
{
    const int32_t n = A->n;
    const double t0 = bc__exact_now();
    *bad_row = -1;
    if (n == 0)
        return BC__QSYS_OK;
    size_t nn = (size_t)n;
    int32_t *perm = malloc(nn * sizeof *perm), *inv = malloc(nn * sizeof *inv);
    int32_t *mark = malloc(nn * sizeof *mark), *list = malloc(nn * sizeof *list);
    int32_t *heap = malloc(nn * sizeof *heap);
    mpq_t *acc = malloc(nn * sizeof *acc), *y = malloc(nn * sizeof *y);
    urows u = {.start = calloc(nn + 1, sizeof(int64_t))};
    int st = BC__QSYS_NOMEM;
    if (!perm || !inv || !mark || !list || !heap || !acc || !y || !u.start ||
        fill_reducing_order(A, perm) < 0) {
        free(perm), free(inv), free(mark), free(list), free(heap), free(acc), free(y);
        free(u.start);
        return BC__QSYS_NOMEM;
    }
    mpq_t l, t;
    mpq_inits(l, t, NULL);
    for (int32_t k = 0; k < n; k++) {
        inv[perm[k]] = k;
        mark[k] = -1;
        mpq_init(acc[k]);
        mpq_init(y[k]);
    }
    /* (inv is complete before the symbolic pass below reads it.) */
    int64_t predicted = symbolic_fill(A, perm, inv, max_fill);
    st = predicted < 0 ? BC__QSYS_NOMEM : predicted > max_fill ? BC__QSYS_TOO_BIG : BC__QSYS_OK;
    for (int32_t k = 0; k < n && st == BC__QSYS_OK; k++) {
        st = eliminate_row(A, perm[k], k, inv, &u, acc, mark, list, heap, y, l, t);
        if (st == BC__QSYS_SINGULAR)
            *bad_row = perm[k];
        else if (st == BC__QSYS_OK && (u.len > max_fill || bc_stop_requested() ||
                                       (max_seconds > 0 &&
                                        bc__exact_now() - t0 > max_seconds)))
            st = BC__QSYS_TOO_BIG; /* (a stop request: the caller sees bc_stop_requested) */
    }
    if (st == BC__QSYS_OK)
        back_substitute(&u, n, perm, y, acc, x, t); /* acc reused as x in elimination order */
    if (fill_out)
        *fill_out = st == BC__QSYS_TOO_BIG && predicted > u.len ? predicted : u.len;
    for (int32_t k = 0; k < n; k++) {
        mpq_clear(acc[k]);
        mpq_clear(y[k]);
    }
    mpq_clears(l, t, NULL);
    urows_free(&u);
    free(perm), free(inv), free(mark), free(list), free(heap), free(acc), free(y);
    return st;
}
