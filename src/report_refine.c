/* report_refine.c — the reports of `refine`: each grid's proven optimum, the convergence figures and each grid's policy simulated in the task. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#include "report_internal.h"

#include <math.h>
#include <string.h>

const char *bc__refine_status_name(bc_refine_status s)
{
    switch (s) {
    case BC_REFINE_OK: return "ok";
    case BC_REFINE_UNUSABLE: return "unusable";
    case BC_REFINE_SOLVER: return "solver failed";
    default: return "simulation failed";
    }
}

/* The gain is the negative of the regret the rollout measured (previous
 * minus L's). */
bc_sample_stats bc__refine_gain(const bc_refine_level *L)
{
    bc_sample_stats g = L->sim.regret;
    g.mean = -g.mean;
    g.ci_low = -L->sim.regret.ci_high;
    g.ci_high = -L->sim.regret.ci_low;
    return g;
}

/* One grid's paragraph. */
static void level_text(FILE *f, const bc_refine *r, int32_t k)
{
    const bc_refine_level *L = &r->level[k];
    char cells[200], prev[200] = "";
    bc__cells_text(L->grid.n_dims, L->grid.cells, cells, sizeof cells);
    if (k > 0)
        bc__cells_text(r->level[k - 1].grid.n_dims, r->level[k - 1].grid.cells, prev, sizeof prev);
    fprintf(f, "grid %s: %d states, %lld transitions", cells, (int)L->n_states, (long long)L->n_trans);
    if (L->status == BC_REFINE_UNUSABLE || L->status == BC_REFINE_SOLVER) {
        fprintf(f, "\n  %s\n", L->message);
        return;
    }
    fprintf(f, "; solved by %s%s in %.3g s\n", bc_method_name(L->method),
            L->value_proof.kind == BC_PROOF_NONE ? "" : " and proven", L->seconds);
    fputs("  optimum at the initial distribution: ", f);
    bc__value_text(f, L->value, L->value_proof);
    fputc('\n', f);
    if (!isnan(L->difference)) {
        fprintf(f, "  change from %s: %+.7g", prev, L->difference);
        if (!isnan(L->order))
            fprintf(f, "; observed order %.3g", L->order);
        if (!isnan(L->extrapolated))
            fprintf(f, "; extrapolated %.10g", L->extrapolated);
        fputc('\n', f);
    }
    if (L->status == BC_REFINE_SIMULATION) {
        fprintf(f, "  %s\n", L->message);
        return;
    }
    fputs("  its policy in the task: mean return ", f);
    bc__stats_text(f, &L->sim.ret);
    fputs("\n    ", f);
    bc__success_text(f, L->sim.successes, L->sim.episodes, L->sim.limit);
    fputc('\n', f);
    if (L->has_gain) {
        bc_sample_stats gain = bc__refine_gain(L);
        fprintf(f, "    better than the %s policy on the same episodes by ", prev);
        bc__stats_text(f, &gain);
        fputc('\n', f);
    }
}

const char *bc__refine_verdict(const bc_refine *r)
{
    const bc_refine_level *L = &r->level[r->n_levels - 1];
    if (!L->has_gain || L->status != BC_REFINE_OK)
        return NULL;
    bc_sample_stats gain = bc__refine_gain(L);
    const bc_sample_stats *g = &gain;
    if (g->n >= 2 && g->ci_low > 0)
        return "the finest grid gives a better controller than the one before it (95% interval "
               "of the paired difference above 0)";
    if (g->n >= 2 && g->ci_high < 0)
        return "the finest grid gives a worse controller than the one before it (95% interval "
               "of the paired difference below 0)";
    if (g->n >= 2 && g->ci_low == 0 && g->ci_high == 0)
        return "the two finest grids' policies do equally well on every episode";
    return "the simulation cannot tell the two finest grids' policies apart (the 95% "
           "interval of their paired difference contains 0); more episodes may";
}

int bc_report_refine_text(FILE *f, const bc_task *t, const bc_refine *r, const bc_refine_opts *o,
                          const char *source)
{
    const bc_grid_opts *g0 = &r->level[0].grid;
    fprintf(f, "refine %s%s%s: %d grids, scheme %s, objective %s, discount %.10g\n",
            bc_task_name(t) ? bc_task_name(t) : source, bc_task_name(t) ? " from " : "",
            bc_task_name(t) ? source : "", (int)r->n_levels, bc_scheme_name(g0->scheme),
            bc_task_objective(t) == BC_MAX ? "max" : "min", bc_task_discount(t));
    fprintf(f, "each grid's optimal policy simulated in the task: %lld episodes from its initial "
            "distribution, seed %llu (the same episodes for every grid)\n\n",
            (long long)o->rollout.episodes, (unsigned long long)o->rollout.seed);
    for (int32_t k = 0; k < r->n_levels; k++)
        level_text(f, r, k);
    fputc('\n', f);
    if (!isnan(r->extrapolated)) {
        const bc_refine_level *L = &r->level[r->n_levels - 1];
        fprintf(f, "Extrapolated optimum of the task (Richardson, from the last three grids; an "
                "estimate, not proven): %.10g; the finest grid differs from it by %.3g.\n",
                r->extrapolated, fabs(r->extrapolated - L->value));
    } else {
        fprintf(f, "No extrapolated optimum: %s.\n", r->note);
    }
    const char *verdict = bc__refine_verdict(r);
    if (verdict)
        fprintf(f, "In simulation, %s.\n", verdict);
    fprintf(f, "%s\n", bc__simulation_note);
    return ferror(f) ? -1 : 0;
}

static void level_json(bc_jw *w, const bc_refine_level *L)
{
    bc_jw_object(w, NULL);
    bc_jw_array(w, "cells");
    for (int32_t j = 0; j < L->grid.n_dims; j++)
        bc_jw_int(w, NULL, L->grid.cells[j]);
    bc_jw_end(w, ']');
    bc_jw_string(w, "status", bc__refine_status_name(L->status));
    bc_jw_string(w, "message", L->message);
    bc_jw_int(w, "states", L->n_states);
    bc_jw_int(w, "transitions", L->n_trans);
    bc_jw_number(w, "h", L->h);
    int solved = L->status == BC_REFINE_OK || L->status == BC_REFINE_SIMULATION;
    bc_jw_number(w, "value", solved ? L->value : NAN);
    if (solved)
        bc__proof_json(w, "value_proof", L->value_proof);
    else
        bc_jw_null(w, "value_proof");
    bc_jw_string(w, "method", solved ? bc_method_name(L->method) : NULL);
    bc_jw_number(w, "difference", L->difference);
    bc_jw_number(w, "order", L->order);
    bc_jw_number(w, "extrapolated", L->extrapolated);
    if (L->status == BC_REFINE_OK) {
        bc_jw_object(w, "simulation");
        bc__simulation_json(w, &L->sim);
        bc_jw_end(w, '}');
    } else {
        bc_jw_null(w, "simulation");
    }
    if (L->status == BC_REFINE_OK && L->has_gain) {
        bc_sample_stats gain = bc__refine_gain(L);
        bc_jw_object(w, "gain_over_previous");
        bc__stats_json(w, "mean", &gain);
        bc_jw_end(w, '}');
    } else {
        bc_jw_null(w, "gain_over_previous");
    }
    bc_jw_end(w, '}');
}

int bc_report_refine_json(FILE *f, const bc_task *t, const bc_refine *r, const bc_refine_opts *o,
                          const char *source)
{
    bc_jw w;
    bc_jw_init(&w, f);
    bc_jw_object(&w, NULL);
    bc_jw_string(&w, "source", source);
    bc_jw_string(&w, "task", bc_task_name(t));
    bc_jw_string(&w, "scheme", bc_scheme_name(r->level[0].grid.scheme));
    bc_jw_string(&w, "objective", bc_task_objective(t) == BC_MAX ? "max" : "min");
    bc_jw_number(&w, "discount", bc_task_discount(t));
    bc_jw_int(&w, "episodes", o->rollout.episodes);
    bc_jw_int(&w, "seed", (int64_t)o->rollout.seed);
    bc_jw_array(&w, "grids");
    for (int32_t k = 0; k < r->n_levels; k++)
        level_json(&w, &r->level[k]);
    bc_jw_end(&w, ']');
    bc_jw_number(&w, "extrapolated", r->extrapolated);
    bc_jw_string(&w, "note", isnan(r->extrapolated) ? r->note : NULL);
    bc_jw_string(&w, "simulation_note", bc__simulation_note);
    bc_jw_end(&w, '}');
    bc_jw_finish(&w);
    return ferror(f) ? -1 : 0;
}
