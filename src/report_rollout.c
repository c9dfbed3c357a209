/* report_rollout.c — the reports of `rollout`: a controller simulated in the task, with confidence intervals, as text and as JSON. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#include "report_internal.h"

#include <math.h>
#include <string.h>

const char bc__simulation_note[] =
    "A simulation measures the task as its formulas describe it, not the physical machine.";

void bc__cells_text(int32_t n_dims, const int32_t *cells, char *buf, size_t cap)
{
    size_t n = 0;
    buf[0] = 0;
    for (int32_t j = 0; j < n_dims && n < cap; j++)
        n += (size_t)snprintf(buf + n, cap - n, "%s%d", j ? "x" : "", (int)cells[j]);
}

void bc__stats_text(FILE *f, const bc_sample_stats *s)
{
    /* + 0.0 prints a zero as 0, never -0 (the sum of equal returns' differences). */
    fprintf(f, "%.7g", s->mean + 0.0);
    if (s->n < 2)
        fputs(" (one episode: no interval)", f);
    else
        fprintf(f, ", 95%% CI [%.7g, %.7g]", s->ci_low + 0.0, s->ci_high + 0.0);
}

void bc__stats_json(bc_jw *w, const char *mean_key, const bc_sample_stats *s)
{
    bc_jw_number(w, mean_key, s->mean);
    if (s->n < 2) {
        bc_jw_null(w, "ci95");
        return;
    }
    bc_jw_array(w, "ci95");
    bc_jw_number(w, NULL, s->ci_low);
    bc_jw_number(w, NULL, s->ci_high);
    bc_jw_end(w, ']');
}

void bc__grid_json(bc_jw *w, const char *key, const bc_grid_policy *gp)
{
    bc_jw_object(w, key);
    bc_jw_array(w, "cells");
    for (int32_t j = 0; j < gp->grid.n_dims; j++)
        bc_jw_int(w, NULL, gp->grid.cells[j]);
    bc_jw_end(w, ']');
    bc_jw_string(w, "scheme", bc_scheme_name(gp->scheme));
    bc_jw_end(w, '}');
}

void bc__simulation_json(bc_jw *w, const bc_rollout_result *r)
{
    bc_jw_int(w, "episodes", r->episodes);
    bc__stats_json(w, "mean_return", &r->ret);
    bc_jw_number(w, "sd_return", r->ret.sd);
    bc_jw_number(w, "success_rate", r->success_rate);
    bc_jw_int(w, "successes", r->successes);
    bc_jw_object(w, "steps");
    bc_jw_number(w, "mean", r->steps_mean);
    bc_jw_int(w, "min", r->steps_min);
    bc_jw_int(w, "p10", r->steps_p10);
    bc_jw_int(w, "p50", r->steps_p50);
    bc_jw_int(w, "p90", r->steps_p90);
    bc_jw_int(w, "max", r->steps_max);
    bc_jw_end(w, '}');
}

void bc__success_text(FILE *f, int64_t successes, int64_t episodes, int64_t limit)
{
    fprintf(f, "%.1f%% of episodes stop within %lld steps (%lld of %lld)",
            100.0 * (double)successes / (double)episodes, (long long)limit, (long long)successes,
            (long long)episodes);
}

int bc_report_rollout_text(FILE *f, const bc_task *t, const bc_rollout_result *r,
                           const bc_grid_policy *agent, const bc_grid_policy *against,
                           const bc_rollout_opts *o, const char *source, const char *agent_path)
{
    char cells[200];
    bc__cells_text(agent->grid.n_dims, agent->grid.cells, cells, sizeof cells);
    fprintf(f, "rollout of %s (%s on the grid of %s cells, %s) in %s%s%s\n", agent_path,
            agent->cum ? "a stochastic policy" : "its action per cell", cells,
            bc_scheme_name(agent->scheme), bc_task_name(t) ? bc_task_name(t) : source,
            bc_task_name(t) ? " from " : "", bc_task_name(t) ? source : "");
    fprintf(f, "  %lld episodes from the task's initial distribution, seed %llu, at most %lld "
            "steps each, discount %.10g, objective %s\n", (long long)r->episodes,
            (unsigned long long)o->seed, (long long)r->limit, bc_task_discount(t),
            bc_task_objective(t) == BC_MAX ? "max" : "min");
    fputs("  mean return:  ", f);
    bc__stats_text(f, &r->ret);
    if (r->ret.n >= 2)
        fprintf(f, " (sd %.4g)", r->ret.sd);
    fputs("\n  success:      ", f);
    bc__success_text(f, r->successes, r->episodes, r->limit);
    fprintf(f, "\n  steps:        mean %.6g; min %lld, 10%% %lld, median %lld, 90%% %lld, max %lld\n",
            r->steps_mean, (long long)r->steps_min, (long long)r->steps_p10,
            (long long)r->steps_p50, (long long)r->steps_p90, (long long)r->steps_max);
    if (r->has_against && against) {
        bc__cells_text(against->grid.n_dims, against->grid.cells, cells, sizeof cells);
        fprintf(f, "against the optimal policy of the grid of %s cells (%s), on the same start "
                   "states and noise:\n  its return:   ", cells, bc_scheme_name(against->scheme));
        bc__stats_text(f, &r->against_ret);
        fputs("\n  its success:  ", f);
        bc__success_text(f, r->against_successes, r->episodes, r->limit);
        fputs("\n  regret:       ", f);
        bc__stats_text(f, &r->regret);
        fprintf(f, "\n                (%s, episode by episode)\n",
                bc_task_objective(t) == BC_MIN ? "the agent's cost minus this policy's"
                                                : "this policy's return minus the agent's");
    }
    fprintf(f, "time: %.3g s, %.4g episodes/s on %d thread%s\n", r->seconds,
            r->seconds > 0 ? (double)r->episodes * (1 + r->has_against) / r->seconds : 0.0,
            o->threads, o->threads == 1 ? "" : "s");
    fprintf(f, "%s\n", bc__simulation_note);
    return ferror(f) ? -1 : 0;
}

int bc_report_rollout_json(FILE *f, const bc_task *t, const bc_rollout_result *r,
                           const bc_grid_policy *agent, const bc_grid_policy *against,
                           const bc_rollout_opts *o, const char *source, const char *agent_path)
{
    bc_jw w;
    bc_jw_init(&w, f);
    bc_jw_object(&w, NULL);
    bc_jw_string(&w, "source", source);
    bc_jw_string(&w, "task", bc_task_name(t));
    bc_jw_string(&w, "agent", agent_path);
    bc_jw_bool(&w, "stochastic", agent->cum != NULL);
    bc__grid_json(&w, "grid", agent);
    bc_jw_int(&w, "seed", (int64_t)o->seed);
    bc_jw_int(&w, "limit", r->limit);
    bc_jw_number(&w, "discount", bc_task_discount(t));
    bc_jw_string(&w, "objective", bc_task_objective(t) == BC_MAX ? "max" : "min");
    bc__simulation_json(&w, r);
    if (r->has_against && against) {
        bc_jw_object(&w, "against");
        bc__grid_json(&w, "grid", against);
        bc__stats_json(&w, "mean_return", &r->against_ret);
        bc_jw_number(&w, "success_rate", r->against_success_rate);
        bc_jw_number(&w, "steps_mean", r->against_steps_mean);
        bc_jw_object(&w, "regret");
        bc__stats_json(&w, "mean", &r->regret);
        bc_jw_number(&w, "sd", r->regret.sd);
        bc_jw_end(&w, '}');
        bc_jw_end(&w, '}');
    } else {
        bc_jw_null(&w, "against");
    }
    bc_jw_string(&w, "note", bc__simulation_note);
    bc_jw_end(&w, '}');
    bc_jw_finish(&w);
    return ferror(f) ? -1 : 0;
}
