/* report_solve.c — the reports of `solve` and `solve --compare`, as text and as JSON. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#include "report_internal.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

static const char *method_long(bc_method m)
{
    switch (m) {
    case BC_METHOD_VI: return "value iteration";
    case BC_METHOD_PI: return "policy iteration (Howard)";
    case BC_METHOD_LP: return "linear programming (GLPK simplex)";
    case BC_METHOD_BACKWARD: return "backward induction";
    case BC_METHOD_EXACT: return "floating-point solve, then exact policy iteration (GMP)";
    default: return "?";
    }
}

static const char *status_word(bc_solve_status s)
{
    switch (s) {
    case BC_SOLVE_OK: return "solved";
    case BC_SOLVE_NOT_CONVERGED: return "not converged";
    case BC_SOLVE_FAILED: return "failed";
    case BC_SOLVE_INTERRUPTED: return "interrupted";
    default: return "out of memory";
    }
}

static const bc_proof no_proof = {BC_PROOF_NONE, -1};

/* The proof lines: what was proven about the values and the policy. */
static void proof_text(FILE *f, const bc_model *m, const bc_proof_result *pr)
{
    if (!pr)
        return;
    fprintf(f, "proof: %s", bc_proof_kind_name(pr->value.kind));
    if (pr->value.kind == BC_PROOF_EXACT)
        fprintf(f, " (every value below is the double nearest the exact rational optimum; "
                   "the policy is exactly optimal%s)\n",
                pr->n_corrected ? ", corrected by the exact check" : "");
    else if (pr->value.kind == BC_PROOF_INTERVAL)
        fprintf(f, " (every value below is within %.2g of V*; the policy's action is proven "
                   "optimal in %d of %d states%s)\n",
                pr->value.bound, (int)pr->n_proven_optimal,
                (int)(pr->n_proven_optimal + pr->n_undecided),
                pr->n_undecided ? "" : ", so the policy is optimal");
    else
        fputs(" (the numbers below are the solver's estimates)\n", f);
    if (pr->value.kind == BC_PROOF_INTERVAL && pr->n_undecided && pr->policy_loss >= 0)
        fprintf(f, "  elsewhere its action is within %.2g of optimal (proven)\n", pr->policy_loss);
    if (pr->message[0])
        fprintf(f, "  %s\n", pr->message);
    if (pr->has_exact && m->n_states <= 20)
        for (int32_t s = 0; s < m->n_states; s++) {
            char *x = bc_mpq_text(pr->exact.values[s]);
            if (x && strlen(x) <= 60)
                fprintf(f, "  V*(%s) = %s\n", bc_names_get(m->state_names, s), x);
            free(x);
        }
}

int bc_report_solve_text(FILE *f, const bc_model *m, const bc_solution *sol,
                         const bc_proof_result *pr, int32_t show)
{
    char *g = bc_num_text(m->discount_exact, m->big);
    fprintf(f, "model %s: %d state%s, %d action%s, discount %s, objective %s\n", m->name,
            (int)m->n_states, m->n_states == 1 ? "" : "s", (int)m->n_actions, m->n_actions == 1 ? "" : "s",
            g ? g : "?", m->objective == BC_MAX ? "max" : "min");
    free(g);
    fprintf(f, "method %s (%s): %s, %lld %s, %.3f s\n", bc_method_name(sol->method),
            method_long(sol->method), status_word(sol->status), (long long)sol->iterations,
            sol->method == BC_METHOD_PI ? "improvement steps" :
            sol->method == BC_METHOD_BACKWARD ? "stages" : "iterations", sol->seconds);
    if (sol->message[0])
        fprintf(f, "  %s\n", sol->message);
    if (!sol->values || sol->status != BC_SOLVE_OK) /* no answer to show */
        return ferror(f) ? -1 : 0;
    fputs("optimal value at the initial distribution: ", f);
    bc__value_text(f, sol->value_initial, pr ? pr->initial : (bc_proof){BC_PROOF_NONE, sol->bound});
    if (pr && pr->has_exact) {
        char *x = bc_mpq_text(pr->exact.value_initial);
        if (x && strlen(x) <= 60)
            fprintf(f, " = %s", x);
        else if (x)
            fprintf(f, " (a fraction of %zu characters: see --json)", strlen(x));
        free(x);
    }
    fputc('\n', f);
    proof_text(f, m, pr);
    if (m->horizon > 0)
        fprintf(f, "(values and policy below are those of the first of %d stages)\n", (int)m->horizon);
    int32_t n = m->n_states < show ? m->n_states : show;
    if (n > 0)
        fprintf(f, "%-24s %-20s %s\n", "state", "action", "value");
    for (int32_t s = 0; s < n; s++) {
        int64_t p = sol->policy ? sol->policy[s] : -1;
        fprintf(f, "%-24s %-20s %.10g\n", bc_names_get(m->state_names, s),
                p >= 0 ? bc_names_get(m->action_names, m->pair_action[p])
                       : m->terminal[s] ? "(terminal)" : "(none)",
                sol->values[s]);
    }
    if (n < m->n_states)
        fprintf(f, "... %d more states (use --values-out / --policy-out or --json)\n",
                (int)(m->n_states - n));
    return ferror(f) ? -1 : 0;
}

static void json_bound(bc_jw *w, double bound)
{
    if (bound >= 0)
        bc_jw_number(w, "bound", bound);
    else
        bc_jw_null(w, "bound");
}

/* method, status, value_initial, bound, iterations, seconds, message;
 * the bound is the proof's when there is one, else the solver's own. */
static void json_solution_head(bc_jw *w, const bc_solution *sol, const bc_proof *value_proof)
{
    bc_jw_string(w, "method", bc_method_name(sol->method));
    bc_jw_string(w, "status", status_word(sol->status));
    bc_jw_number(w, "value_initial", sol->value_initial);
    json_bound(w, value_proof && value_proof->kind != BC_PROOF_NONE ? value_proof->bound : sol->bound);
    bc_jw_bool(w, "bound_proven", value_proof ? value_proof->kind != BC_PROOF_NONE : sol->bound >= 0);
    bc_jw_int(w, "iterations", sol->iterations);
    bc_jw_number(w, "seconds", sol->seconds);
    bc_jw_string(w, "message", sol->message);
}

static void json_policy(bc_jw *w, const char *key, const bc_model *m, const int64_t *policy)
{
    bc_jw_object(w, key);
    for (int32_t s = 0; s < m->n_states; s++)
        if (policy[s] >= 0)
            bc_jw_string(w, bc_names_get(m->state_names, s),
                         bc_names_get(m->action_names, m->pair_action[policy[s]]));
    bc_jw_end(w, '}');
}

static void json_values(bc_jw *w, const bc_model *m, const double *v)
{
    bc_jw_object(w, "values");
    for (int32_t s = 0; s < m->n_states; s++)
        bc_jw_number(w, bc_names_get(m->state_names, s), v[s]);
    bc_jw_end(w, '}');
}

/* "proof": kind, bound and what it says about the policy. */
static void json_proof(bc_jw *w, const bc_model *m, const bc_proof_result *pr)
{
    bc_jw_object(w, "proof");
    bc_jw_string(w, "kind", bc_proof_kind_name(pr->value.kind));
    json_bound(w, pr->value.bound);
    bc_jw_bool(w, "policy_optimal", pr->value.kind != BC_PROOF_NONE && pr->policy_optimal);
    bc_jw_int(w, "states_proven_optimal", pr->n_proven_optimal);
    bc_jw_int(w, "states_undecided", pr->n_undecided);
    if (pr->policy_loss >= 0)
        bc_jw_number(w, "policy_loss_bound", pr->policy_loss);
    else
        bc_jw_null(w, "policy_loss_bound");
    bc_jw_int(w, "states_corrected", pr->n_corrected);
    bc_jw_number(w, "seconds", pr->seconds);
    bc_jw_string(w, "message", pr->message);
    bc_jw_end(w, '}');
    bc__proof_json(w, "value_initial_proof", pr->initial);
    if (!pr->has_exact)
        return;
    bc__mpq_json(w, "exact_value_initial", pr->exact.value_initial);
    bc_jw_object(w, "exact_values");
    for (int32_t s = 0; s < m->n_states; s++)
        bc__mpq_json(w, bc_names_get(m->state_names, s), pr->exact.values[s]);
    bc_jw_end(w, '}');
}

/* "trace": the convergence history, one object per kept iteration (null for
 * methods that keep none), and "trace_stride", how it was thinned. */
static void json_trace(bc_jw *w, const bc_solution *sol)
{
    if (!sol->trace || sol->n_trace == 0) {
        bc_jw_null(w, "trace");
        return;
    }
    bc_jw_array(w, "trace");
    for (int64_t i = 0; i < sol->n_trace; i++) {
        const bc_trace_point *t = &sol->trace[i];
        bc_jw_object(w, NULL);
        bc_jw_string(w, "method", bc_method_name(t->method));
        bc_jw_int(w, "iteration", t->iteration);
        bc_jw_number(w, "residual", t->residual);
        json_bound(w, t->bound);
        bc_jw_end(w, '}');
    }
    bc_jw_end(w, ']');
    bc_jw_int(w, "trace_stride", sol->trace_stride > 0 ? sol->trace_stride : 1);
}

int bc_report_solve_json(FILE *f, const bc_model *m, const bc_solution *sol,
                         const bc_proof_result *pr)
{
    bc_jw w;
    bc_jw_init(&w, f);
    bc_jw_object(&w, NULL);
    bc__json_model(&w, m);
    json_solution_head(&w, sol, pr ? &pr->value : NULL);
    if (pr)
        json_proof(&w, m, pr);
    else
        bc__proof_json(&w, "proof", no_proof);
    if (sol->values) {
        json_values(&w, m, sol->values);
        json_policy(&w, "policy", m, sol->policy);
    }
    json_trace(&w, sol);
    if (sol->stage_policy) {
        bc_jw_array(&w, "stage_policy");
        for (int32_t t = 0; t < m->horizon; t++)
            json_policy(&w, NULL, m, sol->stage_policy + (int64_t)t * m->n_states);
        bc_jw_end(&w, ']');
    }
    bc_jw_end(&w, '}');
    bc_jw_finish(&w);
    return ferror(f) ? -1 : 0;
}

int bc_report_compare_text(FILE *f, const bc_model *m, const bc_comparison *c)
{
    fprintf(f, "model %s: %d states, solved by each method in turn\n", m->name,
            (int)m->n_states);
    fprintf(f, "%-8s %-14s %-20s %-28s %-10s\n", "method", "status", "value at initial",
            "bound (proof)", "seconds");
    for (int i = 0; i < c->n; i++) {
        const bc_solution *s = &c->sol[i];
        char b[40];
        if (c->proof[i].kind != BC_PROOF_NONE)
            snprintf(b, sizeof b, "%.2g (%s)", c->proof[i].bound,
                     bc_proof_kind_name(c->proof[i].kind));
        else if (s->bound >= 0)
            snprintf(b, sizeof b, "%.2g (solver, unverified)", s->bound);
        else
            snprintf(b, sizeof b, "none");
        fprintf(f, "%-8s %-14s %-20.12g %-28s %-10.3f\n", bc_method_name(s->method),
                status_word(s->status), s->value_initial, b, s->seconds);
        if (s->status != BC_SOLVE_OK)
            fprintf(f, "         %s\n", s->message);
    }
    fprintf(f, "largest disagreement between two methods at one state: %.3g\n",
            c->max_disagreement);
    if (c->worst_state >= 0) {
        const bc_solution *a = &c->sol[c->worst_i], *b = &c->sol[c->worst_j];
        fprintf(f, "closest to its allowance: state %s, %s vs %s differ by %.3g, allowed %.3g\n",
                bc_names_get(m->state_names, c->worst_state), bc_method_name(a->method),
                bc_method_name(b->method),
                fabs(a->values[c->worst_state] - b->values[c->worst_state]), c->allowed);
    }
    fprintf(f, "verdict: %s\n", c->agree ? "the methods agree within their bounds"
                                         : "the methods DISAGREE beyond their bounds, or one failed");
    return ferror(f) ? -1 : 0;
}

int bc_report_compare_json(FILE *f, const bc_model *m, const bc_comparison *c)
{
    bc_jw w;
    bc_jw_init(&w, f);
    bc_jw_object(&w, NULL);
    bc__json_model(&w, m);
    bc_jw_bool(&w, "agree", c->agree);
    bc_jw_number(&w, "max_disagreement", c->max_disagreement);
    bc_jw_number(&w, "allowed", c->allowed);
    if (c->worst_state >= 0)
        bc_jw_string(&w, "worst_state", bc_names_get(m->state_names, c->worst_state));
    else
        bc_jw_null(&w, "worst_state");
    bc_jw_array(&w, "methods");
    for (int i = 0; i < c->n; i++) {
        bc_jw_object(&w, NULL);
        json_solution_head(&w, &c->sol[i], &c->proof[i]);
        bc__proof_json(&w, "proof", c->proof[i]);
        bc_jw_end(&w, '}');
    }
    bc_jw_end(&w, ']');
    bc_jw_end(&w, '}');
    bc_jw_finish(&w);
    return ferror(f) ? -1 : 0;
}
