/* report_html_score.c — the HTML page of `score`: verdict and gates first, then figures with their proofs, the worst states and the maps. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#include "report_html_internal.h"
#include "report_internal.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>

/* The agent's action in st: its most probable pair (the first on ties); -1 for terminals. */
static int64_t agent_action(const bc_model *m, const bc_score *s, int32_t st)
{
    int64_t best = -1;
    for (int64_t p = m->state_pair_start[st]; p < m->state_pair_start[st + 1]; p++)
        if (best < 0 || s->agent_prob[p] > s->agent_prob[best])
            best = p;
    return best < 0 ? -1 : m->pair_action[best];
}

static void verdict(FILE *f, const bc_model *m, const bc_score *s, const bc_gate *gates,
                    int n_gates)
{
    int failed = 0;
    for (int g = 0; g < n_gates; g++)
        failed += !gates[g].passed;
    int32_t covered = 0;
    for (int32_t st = 0; st < m->n_states; st++)
        covered += !m->terminal[st] && !isnan(s->state_regret[st]);
    fprintf(f, "<p class=\"verdict%s\">Regret at the initial distribution: ", failed ? " failed" : "");
    bc__html_value(f, s->regret_initial, s->regret_initial_proof);
    if (s->optimal_initial != 0 && isfinite(s->regret_initial))
        fprintf(f, " (%.3g%% of |V*|)", 100 * s->regret_initial / fabs(s->optimal_initial));
    fprintf(f, ".<br/>%d of %d covered states act suboptimally", (int)s->n_wrong, (int)covered);
    if (s->n_undecided > 0)
        fprintf(f, "; in %d the proof cannot tell whether the action is optimal (a tie, or a gap "
                   "within its error)", (int)s->n_undecided);
    if (m->discount == 1 || s->discount == 1)
        fprintf(f, "; %d trap%s (states from which the agent may never finish)", (int)s->n_traps,
                s->n_traps == 1 ? "" : "s");
    fputs(".<br/>", f);
    if (n_gates == 0)
        fputs("No gate was set.", f);
    else if (!failed)
        fprintf(f, "All %d gate%s passed.", n_gates, n_gates == 1 ? "" : "s");
    else
        fprintf(f, "%d of %d gate%s FAILED.", failed, n_gates, n_gates == 1 ? "" : "s");
    fputs("</p>\n", f);
}

static void gates_table(FILE *f, const bc_gate *gates, int n_gates)
{
    if (n_gates == 0)
        return;
    fputs("<h2>Gates</h2>\n<table>\n<tr><th>gate</th><th>value</th><th>limit</th><th>result</th></tr>\n", f);
    for (int g = 0; g < n_gates; g++) {
        fputs("<tr><td>", f);
        bc__html_text(f, gates[g].name);
        fprintf(f, "</td><td class=\"num\">%.6g</td><td class=\"num\">%.6g</td><td%s>%s</td></tr>\n",
                gates[g].value, gates[g].limit, gates[g].passed ? "" : " class=\"gate-failed\"",
                gates[g].passed ? "passed" : "FAILED");
    }
    fputs("</table>\n", f);
}

static void trap_rows(FILE *f, const bc_model *m, const bc_score *s)
{
    char buf[1200];
    size_t n = 0;
    buf[0] = 0;
    for (int32_t k = 0; k < s->n_traps && k < 20 && n < sizeof buf; k++)
        n += (size_t)snprintf(buf + n, sizeof buf - n, "%s%s", k ? ", " : "",
                              bc_names_get(m->state_names, s->traps[k]));
    if (s->n_traps > 20 && n < sizeof buf)
        snprintf(buf + n, sizeof buf - n, ", ... (%d in all)", (int)s->n_traps);
    bc__html_row(f, "traps (value infinite)", buf);
    snprintf(buf, sizeof buf, "%.6g from the initial distribution", s->reach_probability);
    bc__html_row(f, "reaches a terminal state with probability", buf);
}

static void figures(FILE *f, const bc_model *m, const bc_score *s)
{
    char buf[320];
    fputs("<h2>Figures</h2>\n<table>\n", f);
    bc__html_figure(f, "regret at the initial distribution", s->regret_initial, s->regret_initial_proof);
    if (s->exact_regret_initial)
        bc__html_row(f, "regret, exactly", s->exact_regret_initial);
    bc__html_figure(f, "agent's value at the initial distribution", s->value_initial, s->value_initial_proof);
    bc__html_figure(f, "optimal value at the initial distribution", s->optimal_initial, s->optimal_initial_proof);
    if (s->worst_state >= 0) {
        snprintf(buf, sizeof buf, "worst single state (%s)", bc_names_get(m->state_names, s->worst_state));
        bc__html_figure(f, buf, s->regret_max_state, s->regret_max_state_proof);
    }
    if (s->has_q) {
        bc__html_figure(f, "Bellman residual of the Q-table", s->residual, s->residual_proof);
        bc__html_figure(f, "max |Q - Q*|", s->q_error, s->q_error_proof);
        if (!isnan(s->regret_bound)) {
            snprintf(buf, sizeof buf, "%.6g (the true regret is %.6g)", s->regret_bound, s->regret_initial);
            bc__html_row(f, "regret bound implied by the residual", buf);
        }
        snprintf(buf, sizeof buf, "%d", (int)s->n_tied);
        bc__html_row(f, "states with tied greedy actions", buf);
    }
    if (isnan(s->agreement_weighted))
        snprintf(buf, sizeof buf, "%.4g%% of covered states (no visit weighting: the agent can "
                 "get stuck)", 100 * s->agreement_states);
    else
        snprintf(buf, sizeof buf, "%.4g%% of covered states, %.4g%% weighted by visits",
                 100 * s->agreement_states, 100 * s->agreement_weighted);
    bc__html_row(f, "acting optimally", buf);
    if (s->n_traps > 0)
        trap_rows(f, m, s);
    fputs("</table>\n", f);
}

static void worst_table(FILE *f, const bc_model *m, const bc_score *s, int32_t top)
{
    int32_t shown = 0;
    for (int32_t k = bc__next_worst(m, s, 0); k >= 0 && shown < top; k = bc__next_worst(m, s, k + 1)) {
        int32_t st = s->by_regret[k];
        if (shown++ == 0)
            fputs("<h2>Worst states</h2>\n<table>\n<tr><th>state</th><th>agent's action</th>"
                  "<th>optimal action</th><th>regret</th><th>agent's value</th><th>V*</th></tr>\n", f);
        int64_t a = agent_action(m, s, st), po = s->optimum.policy[st];
        fputs("<tr><td>", f);
        bc__html_text(f, bc_names_get(m->state_names, st));
        fputs("</td><td>", f);
        bc__html_text(f, a >= 0 ? bc_names_get(m->action_names, (int32_t)a) : "-");
        fputs("</td><td>", f);
        bc__html_text(f, po >= 0 ? bc_names_get(m->action_names, m->pair_action[po]) : "-");
        fprintf(f, "</td><td class=\"num\">%.6g</td><td class=\"num\">%.6g</td>"
                   "<td class=\"num\">%.6g</td></tr>\n", s->state_regret[st], s->values[st],
                s->optimum.values[st]);
    }
    if (shown)
        fputs("</table>\n", f);
}

typedef struct {
    const bc_model *m;
    const bc_layout *l;
    const bc_score *s;
} score_pictures;

static int draw_agent(FILE *f, const void *ctx)
{
    const score_pictures *p = ctx;
    return bc_svg_agent_map(f, p->m, p->l, p->s, "The agent's actions and where it loses value");
}

static int draw_policy(FILE *f, const void *ctx)
{
    const score_pictures *p = ctx;
    return bc_svg_policy_map(f, p->m, p->l, p->s->optimum.policy, "Optimal policy");
}

static int draw_value(FILE *f, const void *ctx)
{
    const score_pictures *p = ctx;
    return bc_svg_value_map(f, p->m, p->l, p->s->optimum.values, "Optimal value V*",
                            p->m->objective == BC_MIN ? "V* (cost)" : "V*");
}

int bc_report_html_score(FILE *f, const bc_model *m, const bc_layout *l, const bc_score *s,
                         const bc_gate *gates, int n_gates, int32_t top)
{
    bc__html_begin(f, "score", m);
    fprintf(f, "<p>The agent is scored under discount %.10g.</p>\n<h2>Verdict</h2>\n", s->discount);
    verdict(f, m, s, gates, n_gates);
    gates_table(f, gates, n_gates);
    figures(f, m, s);
    worst_table(f, m, s, top);
    fputs("<h2>Pictures</h2>\n", f);
    if (l && l->state) {
        score_pictures p = {m, l, s};
        bc__html_picture(f, draw_agent, &p, "Each cell in the colour of the agent's action. "
                         "An inset square marks a cell where the agent's action is proven "
                         "suboptimal by the optimal Q-values; its shade is the state's regret "
                         "(darker is worse). A small dashed square marks a cell where the proof "
                         "cannot decide (a tie, or a gap within its error). Cells from which the "
                         "agent may never finish (traps) are outlined in black.");
        bc__html_picture(f, draw_policy, &p, "The optimal policy, in the same colours, to compare.");
        bc__html_picture(f, draw_value, &p, "The optimal value V* of each cell (viridis scale: "
                         "darker is lower, brighter is higher).");
    } else {
        bc__html_no_pictures(f);
    }
    bc__html_end(f);
    return ferror(f) ? -1 : 0;
}
