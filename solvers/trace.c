/* trace.c — what a running solve leaves behind besides its answer: the convergence history, and the stop request it obeys. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * The history keeps at most BC_SV_TRACE_MAX points.  When it is full, every
 * second point is dropped (the first iteration stays) and from then on only
 * every 2nd (4th, ...) iteration is recorded, so a run of a million sweeps keeps an evenly
 * thinned picture of itself in bounded memory.  The last iteration is
 * always recorded by the solvers through bc_sv_trace_last.
 *
 * The stop request is a volatile sig_atomic_t, the one type a signal
 * handler may write; the solvers read it once per sweep or step.
 */
#include <signal.h>
#include <stdlib.h>

#include "bellcheck.h"
#include "solver_internal.h"

static volatile sig_atomic_t stop_flag = 0;

void bc_stop_request(void)
{
    stop_flag = 1;
}

int bc_stop_requested(void)
{
    return stop_flag != 0;
}

void bc_stop_clear(void)
{
    stop_flag = 0;
}

/* Halves the history: keeps the first point and those whose iteration is a
 * multiple of twice the stride, and doubles the stride. */
static void thin(bc_solution *sol)
{
    int64_t j = 0, keep = 2 * sol->trace_stride;
    for (int64_t i = 0; i < sol->n_trace; i++)
        if (i == 0 || sol->trace[i].iteration % keep == 0)
            sol->trace[j++] = sol->trace[i];
    sol->n_trace = j;
    sol->trace_stride = keep;
}

static void append(bc_solution *sol, bc_method method, int64_t iteration, double residual,
                   double bound)
{
    if (!sol->trace) {
        sol->trace = malloc(BC_SV_TRACE_MAX * sizeof *sol->trace);
        if (!sol->trace)
            return; /* the history is a by-product: without memory for it the solve goes on */
    }
    if (sol->n_trace == BC_SV_TRACE_MAX)
        thin(sol);
    if (sol->n_trace == BC_SV_TRACE_MAX)
        return; /* cannot happen: thinning frees half the points */
    sol->trace[sol->n_trace++] = (bc_trace_point){method, iteration, residual, bound};
}

void bc_sv_trace(bc_solution *sol, bc_method method, int64_t iteration, double residual,
                 double bound)
{
    if (sol->trace_stride < 1)
        sol->trace_stride = 1;
    if (iteration % sol->trace_stride == 0 || iteration == 1)
        append(sol, method, iteration, residual, bound);
}

void bc_sv_trace_last(bc_solution *sol, bc_method method, int64_t iteration, double residual,
                      double bound)
{
    if (sol->n_trace > 0 && sol->trace[sol->n_trace - 1].method == method &&
        sol->trace[sol->n_trace - 1].iteration == iteration) {
        sol->trace[sol->n_trace - 1].residual = residual;
        sol->trace[sol->n_trace - 1].bound = bound;
        return;
    }
    append(sol, method, iteration, residual, bound);
}

int bc_sv_trace_join(bc_solution *dst, bc_trace_point *first, int64_t n_first)
{
    if (n_first == 0)
        return 0;
    bc_trace_point *all = malloc((size_t)(n_first + dst->n_trace) * sizeof *all);
    if (!all)
        return -1;
    for (int64_t i = 0; i < n_first; i++)
        all[i] = first[i];
    for (int64_t i = 0; i < dst->n_trace; i++)
        all[n_first + i] = dst->trace[i];
    free(dst->trace);
    dst->trace = all;
    dst->n_trace += n_first;
    return 0;
}
