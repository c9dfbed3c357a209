/* compare.c — runs every applicable method on one model and measures how far their answers differ. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#include "bellcheck.h"

#include <math.h>
#include <string.h>

/* What a method's answer may be off by: its proven bound, or the documented
 * tolerance for methods that prove none. */
static double allowance(const bc_solution *s, double scale)
{
    return s->bound >= 0 ? s->bound : BC_UNPROVEN_TOL * scale;
}

int bc_compare(const bc_model *m, const bc_solve_opts *o, bc_comparison *c)
{
    memset(c, 0, sizeof *c);
    c->worst_state = -1;
    bc_method methods[BC_COMPARE_MAX];
    int n = 0;
    if (m->horizon > 0) {
        methods[n++] = BC_METHOD_BACKWARD;
    } else {
        methods[n++] = BC_METHOD_VI;
        methods[n++] = BC_METHOD_PI;
        methods[n++] = BC_METHOD_LP;
    }
    bc_prove_opts po;
    bc_prove_opts_default(&po);
    if (m->n_trans <= po.exact_max_trans) /* small enough for the exact reference too */
        methods[n++] = BC_METHOD_EXACT;
    c->agree = 1;
    for (int i = 0; i < n; i++) {
        bc_solution_init(&c->sol[i]);
        c->n = i + 1;
        bc_solve_status st = bc_solve(m, methods[i], o, &c->sol[i]);
        if (st == BC_SOLVE_NOMEM)
            return -1;
        if (st != BC_SOLVE_OK)
            c->agree = 0;
        /* Each method's values get their own interval proof (never replaced). */
        c->proof[i] = (bc_proof){BC_PROOF_NONE, -1};
        if (st == BC_SOLVE_OK && methods[i] == BC_METHOD_EXACT) {
            c->proof[i] = (bc_proof){BC_PROOF_EXACT, c->sol[i].bound};
        } else if (st == BC_SOLVE_OK) {
            bc_proof_result pr;
            po.mode = BC_PROVE_INTERVAL;
            if (bc_prove_solution(m, &c->sol[i], &po, &pr) == 0)
                c->proof[i] = pr.value;
            bc_proof_result_free(&pr);
        }
    }
    double scale = 1;
    for (int i = 0; i < n; i++)
        if (c->sol[i].values)
            for (int32_t s = 0; s < m->n_states; s++)
                if (isfinite(c->sol[i].values[s]) && fabs(c->sol[i].values[s]) > scale)
                    scale = fabs(c->sol[i].values[s]);
    double worst_excess = -INFINITY;
    for (int i = 0; i < n; i++)
        for (int j = i + 1; j < n; j++) {
            if (!c->sol[i].values || !c->sol[j].values)
                continue;
            double allowed = allowance(&c->sol[i], scale) + allowance(&c->sol[j], scale);
            for (int32_t s = 0; s < m->n_states; s++) {
                double d = fabs(c->sol[i].values[s] - c->sol[j].values[s]);
                if (isnan(d))
                    d = INFINITY;
                if (d > c->max_disagreement)
                    c->max_disagreement = d;
                if (d - allowed > worst_excess) {
                    worst_excess = d - allowed;
                    c->worst_state = s;
                    c->worst_i = i;
                    c->worst_j = j;
                    c->allowed = allowed;
                }
            }
        }
    if (worst_excess > 0)
        c->agree = 0;
    return 0;
}

void bc_comparison_free(bc_comparison *c)
{
    for (int i = 0; i < c->n; i++)
        bc_solution_free(&c->sol[i]);
    memset(c, 0, sizeof *c);
}
