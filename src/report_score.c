/* report_score.c — the reports of `score`: a verdict first, then the figures, the worst states and the gates. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#include "report_internal.h"

#include <math.h>
#include <string.h>

static const char model_only[] =
    "These figures hold for the model only. They do not show that a machine driven by this\n"
    "agent is safe: that is for the codes and standards that apply to it and for qualified,\n"
    "licensed practitioners.\n";

/* Action the agent takes in s: the pair with most probability (first on ties); -1 for terminals. */
static int64_t agent_pair(const bc_model *m, const bc_score *s, int32_t st)
{
    int64_t best = -1;
    for (int64_t p = m->state_pair_start[st]; p < m->state_pair_start[st + 1]; p++)
        if (best < 0 || s->agent_prob[p] > s->agent_prob[best])
            best = p;
    return best;
}

static int32_t covered_live(const bc_model *m, const bc_score *s)
{
    int32_t n = 0;
    for (int32_t st = 0; st < m->n_states; st++)
        n += !m->terminal[st] && !isnan(s->state_regret[st]);
    return n;
}

static void verdict_text(FILE *f, const bc_model *m, const bc_score *s)
{
    double rel = s->optimal_initial != 0 ? 100 * s->regret_initial / fabs(s->optimal_initial) : NAN;
    fprintf(f, "verdict: regret %.6g at the initial distribution", s->regret_initial);
    if (isfinite(rel))
        fprintf(f, " (%.3g%% of |V*|)", rel);
    fprintf(f, "; %d of %d states act suboptimally", (int)s->n_wrong, (int)covered_live(m, s));
    if (m->discount == 1 || s->discount == 1)
        fprintf(f, "; %d trap%s", (int)s->n_traps, s->n_traps == 1 ? "" : "s");
    fputc('\n', f);
}

static void figures_text(FILE *f, const bc_model *m, const bc_score *s)
{
    fputs("  regret at initial          ", f);
    bc__value_text(f, s->regret_initial, s->regret_initial_proof);
    if (s->exact_regret_initial && strlen(s->exact_regret_initial) <= 60)
        fprintf(f, " = %s", s->exact_regret_initial);
    fputs("\n  agent value at initial     ", f);
    bc__value_text(f, s->value_initial, s->value_initial_proof);
    fputs("\n  optimal value at initial   ", f);
    bc__value_text(f, s->optimal_initial, s->optimal_initial_proof);
    fputc('\n', f);
    if (s->worst_state >= 0) {
        fprintf(f, "  worst single state         %s, regret ",
                bc_names_get(m->state_names, s->worst_state));
        bc__value_text(f, s->regret_max_state, s->regret_max_state_proof);
        fputc('\n', f);
    }
    if (s->has_q) {
        fputs("  Bellman residual of Q      ", f);
        bc__value_text(f, s->residual, s->residual_proof);
        fputs("\n  max |Q - Q*|               ", f);
        bc__value_text(f, s->q_error, s->q_error_proof);
        fputc('\n', f);
        if (!isnan(s->regret_bound))
            fprintf(f, "  regret bound from residual %.6g  (true regret %.6g)\n", s->regret_bound,
                    s->regret_initial);
        fprintf(f, "  tied greedy actions        %d state%s\n", (int)s->n_tied,
                s->n_tied == 1 ? "" : "s");
    }
    fprintf(f, "  acting optimally           %.4g%% of covered states", 100 * s->agreement_states);
    if (isnan(s->agreement_weighted))
        fputs(" (no visit weighting: the agent can get stuck)\n", f);
    else
        fprintf(f, ", %.4g%% weighted by visits\n", 100 * s->agreement_weighted);
    if (s->n_undecided > 0)
        fprintf(f, "  undecided (gap within error) %d state%s, counted as acting optimally\n",
                (int)s->n_undecided, s->n_undecided == 1 ? "" : "s");
    if (s->n_traps > 0) {
        fprintf(f, "  traps (may never finish)   ");
        for (int32_t k = 0; k < s->n_traps && k < 10; k++)
            fprintf(f, "%s%s", k ? ", " : "", bc_names_get(m->state_names, s->traps[k]));
        fprintf(f, "%s\n                             (from these the agent reaches a terminal state "
                   "with probability < 1,\n                             so their value is %s)\n",
                s->n_traps > 10 ? ", ..." : "", m->objective == BC_MAX ? "-inf" : "+inf");
        fprintf(f, "  reaches a terminal state   with probability %.6g from the initial distribution\n",
                s->reach_probability);
    }
}

int32_t bc__next_worst(const bc_model *m, const bc_score *s, int32_t k)
{
    for (; k < m->n_states; k++) {
        int32_t st = s->by_regret[k];
        if (!m->terminal[st] && !isnan(s->state_regret[st]) && s->state_regret[st] > 0)
            return k;
    }
    return -1;
}

static void top_text(FILE *f, const bc_model *m, const bc_score *s, int32_t top)
{
    int32_t shown = 0;
    for (int32_t k = bc__next_worst(m, s, 0); k >= 0 && shown < top; k = bc__next_worst(m, s, k + 1)) {
        int32_t st = s->by_regret[k];
        if (shown++ == 0)
            fprintf(f, "worst states:\n  %-20s %-14s %-14s %-14s %s\n", "state", "agent", "optimal",
                    "regret", "V agent / V*");
        int64_t pa = agent_pair(m, s, st), po = s->optimum.policy[st];
        fprintf(f, "  %-20s %-14s %-14s %-14.6g %.6g / %.6g\n", bc_names_get(m->state_names, st),
                pa >= 0 ? bc_names_get(m->action_names, m->pair_action[pa]) : "-",
                po >= 0 ? bc_names_get(m->action_names, m->pair_action[po]) : "-",
                s->state_regret[st], s->values[st], s->optimum.values[st]);
    }
}

int bc_report_score_text(FILE *f, const bc_model *m, const bc_score *s, const bc_gate *gates,
                         int n_gates, int32_t top)
{
    fprintf(f, "agent scored on model %s: %d states, discount %g, objective %s\n", m->name,
            (int)m->n_states, s->discount, m->objective == BC_MAX ? "max" : "min");
    verdict_text(f, m, s);
    figures_text(f, m, s);
    top_text(f, m, s, top);
    for (int g = 0; g < n_gates; g++)
        fprintf(f, "%s gate %s: value %.6g, limit %.6g\n", gates[g].passed ? "passed" : "FAILED",
                gates[g].name, gates[g].value, gates[g].limit);
    fputs(model_only, f);
    return ferror(f) ? -1 : 0;
}

/* A number, or null when it is not finite (infinite values are explained by the trap list). */
static void json_values(bc_jw *w, const char *key, const bc_model *m, const double *v,
                        const double *regret)
{
    bc_jw_object(w, key);
    for (int32_t st = 0; st < m->n_states; st++) {
        if (regret && isnan(regret[st]) && !m->terminal[st])
            bc_jw_null(w, bc_names_get(m->state_names, st));
        else
            bc_jw_number(w, bc_names_get(m->state_names, st), v[st]);
    }
    bc_jw_end(w, '}');
}

static void json_agent(bc_jw *w, const bc_model *m, const bc_score *s)
{
    bc_jw_object(w, "policy");
    for (int32_t st = 0; st < m->n_states; st++) {
        int64_t p = agent_pair(m, s, st);
        if (p >= 0 && !isnan(s->state_regret[st])) /* states the agent's file does not cover: omitted */
            bc_jw_string(w, bc_names_get(m->state_names, st),
                         bc_names_get(m->action_names, m->pair_action[p]));
    }
    bc_jw_end(w, '}');
}

static void json_traps(bc_jw *w, const bc_model *m, const bc_score *s)
{
    bc_jw_object(w, "traps");
    bc_jw_int(w, "count", s->n_traps);
    bc_jw_array(w, "states");
    for (int32_t k = 0; k < s->n_traps; k++)
        bc_jw_string(w, NULL, bc_names_get(m->state_names, s->traps[k]));
    bc_jw_end(w, ']');
    bc_jw_number(w, "reach_probability", s->reach_probability);
    bc_jw_end(w, '}');
}

static void json_gates(bc_jw *w, const bc_gate *gates, int n_gates)
{
    bc_jw_array(w, "gates");
    for (int g = 0; g < n_gates; g++) {
        bc_jw_object(w, NULL);
        bc_jw_string(w, "name", gates[g].name);
        bc_jw_number(w, "limit", gates[g].limit);
        bc_jw_number(w, "value", gates[g].value);
        bc_jw_bool(w, "passed", gates[g].passed);
        bc_jw_end(w, '}');
    }
    bc_jw_end(w, ']');
}

static void json_top(bc_jw *w, const bc_model *m, const bc_score *s, int32_t top)
{
    bc_jw_array(w, "worst_states");
    int32_t shown = 0;
    for (int32_t k = bc__next_worst(m, s, 0); k >= 0 && shown < top; k = bc__next_worst(m, s, k + 1)) {
        int32_t st = s->by_regret[k];
        shown++;
        int64_t pa = agent_pair(m, s, st), po = s->optimum.policy[st];
        bc_jw_object(w, NULL);
        bc_jw_string(w, "state", bc_names_get(m->state_names, st));
        bc_jw_string(w, "agent_action", pa >= 0 ? bc_names_get(m->action_names, m->pair_action[pa]) : NULL);
        bc_jw_string(w, "optimal_action", po >= 0 ? bc_names_get(m->action_names, m->pair_action[po]) : NULL);
        bc_jw_number(w, "regret", s->state_regret[st]);
        bc_jw_end(w, '}');
    }
    bc_jw_end(w, ']');
}

int bc_report_score_json(FILE *f, const bc_model *m, const bc_score *s, const bc_gate *gates,
                         int n_gates, int32_t top)
{
    bc_jw w;
    bc_jw_init(&w, f);
    bc_jw_object(&w, NULL);
    bc__json_model(&w, m);
    bc_jw_number(&w, "discount", s->discount);
    bc_jw_number(&w, "value_initial", s->value_initial);
    bc_jw_number(&w, "optimal_initial", s->optimal_initial);
    bc_jw_number(&w, "optimal_bound", s->optimum.bound >= 0 ? s->optimum.bound : NAN);
    bc__proof_json(&w, "value_initial_proof", s->value_initial_proof);
    bc__proof_json(&w, "optimal_initial_proof", s->optimal_initial_proof);
    bc__proof_json(&w, "values_proof", s->values_proof);
    bc_jw_string(&w, "exact_value_initial", s->exact_value_initial);
    bc_jw_object(&w, "regret");
    bc_jw_number(&w, "initial", s->regret_initial);
    bc__proof_json(&w, "initial_proof", s->regret_initial_proof);
    bc_jw_string(&w, "exact_initial", s->exact_regret_initial);
    bc_jw_number(&w, "max_state", s->regret_max_state);
    bc__proof_json(&w, "max_state_proof", s->regret_max_state_proof);
    bc_jw_string(&w, "worst_state", s->worst_state >= 0 ? bc_names_get(m->state_names, s->worst_state) : NULL);
    bc_jw_end(&w, '}');
    bc_jw_number(&w, "residual", s->has_q ? s->residual : NAN);
    bc__proof_json(&w, "residual_proof", s->residual_proof);
    bc_jw_number(&w, "q_error", s->has_q ? s->q_error : NAN);
    bc__proof_json(&w, "q_error_proof", s->q_error_proof);
    bc__proof_json(&w, "optimum_proof", s->optimum_proof.value);
    bc_jw_number(&w, "regret_bound", s->regret_bound);
    bc_jw_int(&w, "tied_states", s->n_tied);
    bc_jw_int(&w, "wrong_states", s->n_wrong);
    bc_jw_int(&w, "undecided_states", s->n_undecided);
    bc_jw_object(&w, "agreement");
    bc_jw_number(&w, "states", s->agreement_states);
    bc_jw_number(&w, "weighted", s->agreement_weighted);
    bc_jw_end(&w, '}');
    json_traps(&w, m, s);
    json_gates(&w, gates, n_gates);
    json_top(&w, m, s, top);
    json_values(&w, "values", m, s->values, s->state_regret);
    json_values(&w, "optimal_values", m, s->optimum.values, NULL);
    json_agent(&w, m, s);
    bc_jw_end(&w, '}');
    bc_jw_finish(&w);
    return ferror(f) ? -1 : 0;
}
