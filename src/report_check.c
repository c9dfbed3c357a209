/* report_check.c — the reports of `check`: model summary and findings, as text and as JSON. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#include "report_internal.h"

#include <stdlib.h>

#define LIST_MAX 12 /* states named in a text line before "and N more" */

int bc_findings_fatal(const bc_model *m, const bc_findings *fd)
{
    (void)m;
    return fd->n_no_exit > 0 || fd->n_unbounded > 0;
}

static void name_list(FILE *f, const bc_model *m, const int32_t *states, int32_t n)
{
    for (int32_t k = 0; k < n && k < LIST_MAX; k++)
        fprintf(f, "%s%s", k ? ", " : "", bc_names_get(m->state_names, states[k]));
    if (n > LIST_MAX)
        fprintf(f, " and %d more", (int)(n - LIST_MAX));
    fputc('\n', f);
}

static void summary_text(FILE *f, const bc_model *m, const bc_findings *fd, const char *source)
{
    char *g = bc_num_text(m->discount_exact, m->big);
    fprintf(f, "model %s (%s)\n", m->name, source);
    fprintf(f, "  %d state%s (%d terminal), %d action%s, %lld state-action pair%s, %lld transition%s\n",
            (int)m->n_states, m->n_states == 1 ? "" : "s", (int)fd->n_terminal, (int)m->n_actions,
            m->n_actions == 1 ? "" : "s", (long long)m->n_pairs, m->n_pairs == 1 ? "" : "s",
            (long long)m->n_trans, m->n_trans == 1 ? "" : "s");
    fprintf(f, "  discount %s, objective %s, ", g ? g : "?", m->objective == BC_MAX ? "max (rewards)" : "min (costs)");
    free(g);
    if (m->horizon > 0)
        fprintf(f, "finite horizon of %d decisions\n", (int)m->horizon);
    else
        fprintf(f, "infinite horizon\n");
    int32_t support = 0;
    for (int32_t s = 0; s < m->n_states; s++)
        support += m->initial[s] > 0;
    fprintf(f, "  initial distribution: %s, %d state%s\n",
            m->initial_given ? "as given" : "uniform over non-terminal states (default)",
            (int)support, support == 1 ? "" : "s");
}

/* The grid's own findings (bc_grid_analyse); returns the number of warnings. */
static int grid_text(FILE *f, const bc_model *m, const bc_grid_findings *gf)
{
    char cells[200];
    size_t n = 0;
    for (int32_t j = 0; j < gf->opts.n_dims && n < sizeof cells; j++)
        n += (size_t)snprintf(cells + n, sizeof cells - n, "%s%d", j ? "x" : "", (int)gf->opts.cells[j]);
    fprintf(f, "  note     grid of %s cells, scheme %s\n", cells, bc_scheme_name(gf->opts.scheme));
    if (gf->n_stuck == 0) {
        fputs("  ok       no cell is held in place by the grid alone\n", f);
    } else {
        fprintf(f, "  warning  %d cell%s stuck: every action keeps %s in the cell with probability "
                   "1 although the dynamics move %s centre (one step moves less than a cell); "
                   "a finer grid than %s or another --scheme (sample, interp) frees %s: ",
                (int)gf->n_stuck, gf->n_stuck == 1 ? " is" : "s are", gf->n_stuck == 1 ? "it" : "them",
                gf->n_stuck == 1 ? "its" : "their", cells, gf->n_stuck == 1 ? "it" : "them");
        name_list(f, m, gf->stuck, gf->n_stuck);
    }
    if (gf->n_never_entered == 0) {
        fputs("  ok       every cell is entered from another cell or by the initial distribution\n", f);
    } else {
        fprintf(f, "  warning  %d cell%s never entered (no other cell leads there and the initial "
                   "distribution misses %s): ", (int)gf->n_never_entered,
                gf->n_never_entered == 1 ? " is" : "s are", gf->n_never_entered == 1 ? "it" : "them");
        name_list(f, m, gf->never_entered, gf->n_never_entered);
    }
    if (gf->n_idle_actions == 0) {
        fputs("  ok       every action changes the cell somewhere\n", f);
    } else {
        fprintf(f, "  warning  %d action%s never change%s the cell: ", (int)gf->n_idle_actions,
                gf->n_idle_actions == 1 ? "" : "s", gf->n_idle_actions == 1 ? "s" : "");
        for (int32_t k = 0; k < gf->n_idle_actions; k++)
            fprintf(f, "%s%s", k ? ", " : "", bc_names_get(m->action_names, gf->idle_actions[k]));
        fputc('\n', f);
    }
    return (gf->n_stuck > 0) + (gf->n_never_entered > 0) + (gf->n_idle_actions > 0);
}

int bc_report_check_text(FILE *f, const bc_model *m, const bc_findings *fd, const char *source)
{
    return bc_report_check_grid_text(f, m, fd, NULL, source);
}

int bc_report_check_grid_text(FILE *f, const bc_model *m, const bc_findings *fd,
                              const bc_grid_findings *gf, const char *source)
{
    summary_text(f, m, fd, source);
    fputs("findings\n", f);
    if (m->n_renormalised == 0) {
        fprintf(f, "  ok       probabilities: all %lld lines sum to exactly 1\n",
                (long long)m->n_pairs);
    } else {
        fprintf(f, "  warning  probabilities: %d line%s summed to within 1e-9 of 1 and %s "
                   "renormalised exactly: line",
                (int)m->n_renormalised, m->n_renormalised == 1 ? "" : "s",
                m->n_renormalised == 1 ? "was" : "were");
        for (int32_t k = 0; k < m->n_renormalised && k < LIST_MAX; k++)
            fprintf(f, "%s %d", k ? "," : "", (int)m->renormalised_lines[k]);
        fputs(m->n_renormalised > LIST_MAX ? ", ...\n" : "\n", f);
    }
    if (m->initial_renormalised_line > 0)
        fprintf(f, "  warning  the initial distribution (line %d) summed to within 1e-9 of 1 and "
                   "was renormalised exactly\n", (int)m->initial_renormalised_line);
    else if (m->initial_renormalised_line < 0)
        fputs("  warning  the initial distribution summed to within 1e-9 of 1 and was "
              "renormalised exactly\n", f);
    fputs("  ok       no dead ends (every non-terminal state has an action)\n", f);
    if (fd->n_unreachable == 0) {
        fputs("  ok       every state is reachable from the initial distribution\n", f);
    } else {
        fprintf(f, "  warning  %d state%s unreachable from the initial distribution: ",
                (int)fd->n_unreachable, fd->n_unreachable == 1 ? " is" : "s are");
        name_list(f, m, fd->unreachable, fd->n_unreachable);
    }
    if (m->discount == 1 && m->horizon == 0) {
        if (fd->n_no_exit == 0) {
            fputs("  ok       from every state some policy reaches a terminal state with "
                  "probability 1\n",
                  f);
        } else {
            fprintf(f, "  error    with discount 1, no policy reaches a terminal state with "
                       "probability 1 from %d state%s, so their total reward is undefined: ",
                    (int)fd->n_no_exit, fd->n_no_exit == 1 ? "" : "s");
            name_list(f, m, fd->no_exit, fd->n_no_exit);
        }
        if (fd->n_unbounded > 0) {
            fprintf(f, "  error    with discount 1, a policy can stay forever in %d state%s while "
                       "%s, so no optimum exists: ",
                    (int)fd->n_unbounded, fd->n_unbounded == 1 ? "" : "s",
                    m->objective == BC_MAX ? "collecting positive rewards" : "earning negative costs");
            name_list(f, m, fd->unbounded, fd->n_unbounded);
        }
        if (fd->n_zero_cycle_states == 0) {
            fputs("  ok       no policy can loop forever on zero rewards\n", f);
        } else {
            fprintf(f, "  warning  %d state%s can loop forever on zero-reward actions (policies "
                       "that never terminate there have finite value; solvers start from a "
                       "terminating policy): ",
                    (int)fd->n_zero_cycle_states, fd->n_zero_cycle_states == 1 ? "" : "s");
            name_list(f, m, fd->zero_cycle_states, fd->n_zero_cycle_states);
        }
    }
    int warnings = (m->n_renormalised > 0) + (m->initial_renormalised_line != 0) +
                   (fd->n_unreachable > 0) + (fd->n_zero_cycle_states > 0) +
                   (gf ? grid_text(f, m, gf) : 0);
    if (bc_findings_fatal(m, fd))
        fputs("verdict: not usable (see the error above)\n", f);
    else if (warnings)
        fprintf(f, "verdict: usable, with %d warning%s\n", warnings, warnings == 1 ? "" : "s");
    else
        fputs("verdict: usable\n", f);
    return ferror(f) ? -1 : 0;
}

void bc__json_model(bc_jw *w, const bc_model *m)
{
    char *g = bc_num_text(m->discount_exact, m->big);
    bc_jw_object(w, "model");
    bc_jw_string(w, "name", m->name);
    bc_jw_int(w, "states", m->n_states);
    bc_jw_int(w, "actions", m->n_actions);
    bc_jw_int(w, "pairs", m->n_pairs);
    bc_jw_int(w, "transitions", m->n_trans);
    int32_t term = 0;
    for (int32_t s = 0; s < m->n_states; s++)
        term += m->terminal[s];
    bc_jw_int(w, "terminal_states", term);
    bc_jw_number(w, "discount", m->discount);
    bc_jw_string(w, "discount_exact", g);
    free(g);
    bc_jw_string(w, "objective", m->objective == BC_MAX ? "max" : "min");
    if (m->horizon > 0)
        bc_jw_int(w, "horizon", m->horizon);
    else
        bc_jw_null(w, "horizon");
    bc_jw_end(w, '}');
}

static void json_state_list(bc_jw *w, const char *key, const bc_model *m, const int32_t *s,
                            int32_t n)
{
    bc_jw_array(w, key);
    for (int32_t k = 0; k < n; k++)
        bc_jw_string(w, NULL, bc_names_get(m->state_names, s[k]));
    bc_jw_end(w, ']');
}

/* "grid": the grid's options and findings, or null. */
static void grid_json(bc_jw *w, const bc_model *m, const bc_grid_findings *gf)
{
    if (!gf) {
        bc_jw_null(w, "grid");
        return;
    }
    bc_jw_object(w, "grid");
    bc_jw_array(w, "cells");
    for (int32_t j = 0; j < gf->opts.n_dims; j++)
        bc_jw_int(w, NULL, gf->opts.cells[j]);
    bc_jw_end(w, ']');
    bc_jw_string(w, "scheme", bc_scheme_name(gf->opts.scheme));
    json_state_list(w, "stuck", m, gf->stuck, gf->n_stuck);
    json_state_list(w, "never_entered", m, gf->never_entered, gf->n_never_entered);
    bc_jw_array(w, "idle_actions");
    for (int32_t k = 0; k < gf->n_idle_actions; k++)
        bc_jw_string(w, NULL, bc_names_get(m->action_names, gf->idle_actions[k]));
    bc_jw_end(w, ']');
    bc_jw_end(w, '}');
}

int bc_report_check_json(FILE *f, const bc_model *m, const bc_findings *fd, const char *source)
{
    return bc_report_check_grid_json(f, m, fd, NULL, source);
}

int bc_report_check_grid_json(FILE *f, const bc_model *m, const bc_findings *fd,
                              const bc_grid_findings *gf, const char *source)
{
    bc_jw w;
    bc_jw_init(&w, f);
    bc_jw_object(&w, NULL);
    bc_jw_string(&w, "source", source);
    bc__json_model(&w, m);
    bc_jw_bool(&w, "usable", !bc_findings_fatal(m, fd));
    bc_jw_array(&w, "renormalised_lines");
    for (int32_t k = 0; k < m->n_renormalised; k++)
        bc_jw_int(&w, NULL, m->renormalised_lines[k]);
    bc_jw_end(&w, ']');
    bc_jw_bool(&w, "initial_renormalised", m->initial_renormalised_line != 0);
    json_state_list(&w, "unreachable", m, fd->unreachable, fd->n_unreachable);
    if (m->discount == 1 && m->horizon == 0) {
        json_state_list(&w, "no_exit", m, fd->no_exit, fd->n_no_exit);
        json_state_list(&w, "zero_reward_loops", m, fd->zero_cycle_states, fd->n_zero_cycle_states);
        json_state_list(&w, "unbounded", m, fd->unbounded, fd->n_unbounded);
    } else {
        bc_jw_null(&w, "no_exit");
        bc_jw_null(&w, "zero_reward_loops");
        bc_jw_null(&w, "unbounded");
    }
    grid_json(&w, m, gf);
    bc_jw_end(&w, '}');
    bc_jw_finish(&w);
    return ferror(f) ? -1 : 0;
}
