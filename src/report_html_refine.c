/* report_html_refine.c — the HTML page of `refine`: the verdict, each grid's proven optimum and simulated policy in one table, the convergence plot and trajectories. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#include "report_html_internal.h"
#include "report_internal.h"
#include "svg_internal.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

/* What a text writer of report_refine.c / report_rollout.c prints, escaped. */
static void stats_cell(FILE *f, const bc_sample_stats *s)
{
    char buf[256] = "";
    FILE *mem = fmemopen(buf, sizeof buf - 1, "w");
    if (mem) {
        bc__stats_text(mem, s);
        fclose(mem);
    }
    bc__xml_text(f, buf);
}

static void success_cell(FILE *f, const bc_rollout_result *sim)
{
    char buf[256] = "";
    FILE *mem = fmemopen(buf, sizeof buf - 1, "w");
    if (mem) {
        bc__success_text(mem, sim->successes, sim->episodes, sim->limit);
        fclose(mem);
    }
    bc__xml_text(f, buf);
}

/* A number cell: %.7g, or a dash for NAN (not defined for this grid). */
static void num_cell(FILE *f, double v, const char *fmt)
{
    if (isnan(v))
        fputs("<td class=\"num\">-</td>", f);
    else {
        fputs("<td class=\"num\">", f);
        fprintf(f, fmt, v);
        fputs("</td>", f);
    }
}

static void summary(FILE *f, const bc_task *t, const bc_refine *r, const bc_refine_opts *o,
                    const char *source)
{
    fputs("<p class=\"sub\">From ", f);
    bc__xml_text(f, source);
    fprintf(f, ": %d grids, scheme %s, objective %s, discount %.10g. Each grid's optimal policy "
               "is simulated in the task itself: %lld episodes from its initial distribution, "
               "seed %llu, the same episodes for every grid.</p>\n",
            (int)r->n_levels, bc_scheme_name(r->level[0].grid.scheme),
            bc_task_objective(t) == BC_MAX ? "max (rewards)" : "min (costs)", bc_task_discount(t),
            (long long)o->rollout.episodes, (unsigned long long)o->rollout.seed);
}

/* The answer: the extrapolated optimum (or why there is none), the
 * simulation's verdict on the two finest grids, and failed grids. */
static void verdict(FILE *f, const bc_refine *r)
{
    int failed = 0;
    for (int32_t k = 0; k < r->n_levels; k++)
        failed += r->level[k].status != BC_REFINE_OK;
    fprintf(f, "<h2>Answer</h2>\n<p class=\"verdict%s\">", failed ? " failed" : "");
    const bc_refine_level *L = &r->level[r->n_levels - 1];
    if (!isnan(r->extrapolated))
        fprintf(f, "Extrapolated optimum of the task (Richardson, from the last three grids; an "
                   "estimate, not proven): %.10g; the finest grid differs from it by %.3g.",
                r->extrapolated, fabs(r->extrapolated - L->value));
    else {
        fputs("No extrapolated optimum: ", f);
        bc__xml_text(f, r->note);
        fputc('.', f);
    }
    const char *v = bc__refine_verdict(r);
    if (v)
        fprintf(f, "<br/>In simulation, %s.", v);
    if (failed)
        fprintf(f, "<br/>%d of %d grids FAILED (see the table).", failed, (int)r->n_levels);
    fputs("</p>\n", f);
}

/* The first cells of a grid's row: its size; 1 when the grid failed before
 * it was solved (the row is then closed with the message). */
static int grid_cells(FILE *f, const bc_refine_level *L, int span)
{
    char cells[200];
    bc__cells_text(L->grid.n_dims, L->grid.cells, cells, sizeof cells);
    fprintf(f, "<tr><td>%s</td>", cells);
    if (L->status != BC_REFINE_UNUSABLE && L->status != BC_REFINE_SOLVER)
        return 0;
    fprintf(f, "<td colspan=\"%d\"><span class=\"gate-failed\">%s</span>: ", span,
            bc__refine_status_name(L->status));
    bc__xml_text(f, L->message);
    fputs("</td></tr>\n", f);
    return 1;
}

/* Each grid's model, its proven optimum and the convergence figures. */
static void optima_table(FILE *f, const bc_refine *r)
{
    fputs("<h2>The optimum on each grid</h2>\n<table>\n<tr><th>cells</th><th>states</th>"
          "<th>transitions</th><th>solved by</th><th>optimum at the initial distribution</th>"
          "<th>proof</th><th>change from the previous grid</th><th>observed order</th>"
          "<th>extrapolated (Richardson)</th></tr>\n", f);
    for (int32_t k = 0; k < r->n_levels; k++) {
        const bc_refine_level *L = &r->level[k];
        if (grid_cells(f, L, 8))
            continue;
        fprintf(f, "<td class=\"num\">%d</td><td class=\"num\">%lld</td><td>%s</td><td>",
                (int)L->n_states, (long long)L->n_trans, bc_method_name(L->method));
        bc__html_value(f, L->value, L->value_proof);
        fputs("</td><td>", f);
        bc__html_badge(f, L->value_proof.kind);
        fputs("</td>", f);
        num_cell(f, L->difference, "%+.7g");
        num_cell(f, L->order, "%.3g");
        num_cell(f, L->extrapolated, "%.10g");
        fputs("</tr>\n", f);
    }
    fputs("</table>\n<p>Each optimum is a number about that grid's finite model and carries its "
          "proof; the changes, the observed order and the extrapolation are estimates made "
          "from those numbers.</p>\n", f);
}

/* Each grid's optimal policy simulated in the task. */
static void simulations_table(FILE *f, const bc_refine *r)
{
    fputs("<h2>Each grid's policy in the task</h2>\n<table>\n<tr><th>cells</th>"
          "<th>mean return</th><th>episodes that stop</th>"
          "<th>better than the previous grid's policy by</th></tr>\n", f);
    for (int32_t k = 0; k < r->n_levels; k++) {
        const bc_refine_level *L = &r->level[k];
        if (grid_cells(f, L, 3))
            continue;
        if (L->status == BC_REFINE_SIMULATION) {
            fputs("<td colspan=\"3\"><span class=\"gate-failed\">simulation failed</span>: ", f);
            bc__xml_text(f, L->message);
            fputs("</td></tr>\n", f);
            continue;
        }
        fputs("<td>", f);
        stats_cell(f, &L->sim.ret);
        fputs("</td><td>", f);
        success_cell(f, &L->sim);
        fputs("</td><td>", f);
        if (L->has_gain) {
            bc_sample_stats gain = bc__refine_gain(L);
            stats_cell(f, &gain);
        } else {
            fputs("-", f);
        }
        fputs("</td></tr>\n", f);
    }
    fputs("</table>\n<p>Returns are simulated with 95% confidence intervals; every grid's "
          "policy meets the same episodes, so the difference from the previous grid is "
          "paired.</p>\n", f);
}

int bc_report_html_refine(FILE *f, const bc_task *t, const bc_refine *r, const bc_refine_opts *o,
                          const char *source, const char *slice)
{
    const char *name = bc_task_name(t) ? bc_task_name(t) : source;
    bc__html_open(f, "refine", name);
    summary(f, t, r, o, source);
    bc__html_safety(f);
    fputs("<p>", f);
    bc__xml_text(f, bc__simulation_note);
    fputs("</p>\n", f);
    verdict(f, r);
    optima_table(f, r);
    simulations_table(f, r);
    fputs("<h2>Pictures</h2>\n", f);
    bc__refine_pictures p;
    char why[400];
    if (bc__refine_pictures_init(&p, t, r, slice, why, sizeof why) < 0) {
        fputs("<p>No pictures: ", f);
        bc__xml_text(f, why);
        fputs(".</p>\n", f);
    } else {
        bc__html_picture(f, bc__refine_convergence_svg, &p,
                         "Left: the optimum of each solved grid against its relative cell size, "
                         "with its proven bound as an error bar. Right: the change from the "
                         "previous grid on log-log axes, with dashed guides of order 1 and 2 "
                         "through the first change; changes that follow a guide converge at "
                         "that order.");
        if (p.n_paths > 0)
            bc__html_picture(f, bc__refine_trajectories_svg, &p,
                             "Episodes simulated in the task under the finest grid's optimal "
                             "policy, each from a start drawn from the initial distribution "
                             "(circle) to its last state (square).");
        else
            fputs("<p>No trajectories: the finest grid was not simulated.</p>\n", f);
        bc__refine_pictures_free(&p);
    }
    bc__html_end(f);
    return ferror(f) ? -1 : 0;
}
