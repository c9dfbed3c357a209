/* task.c — the continuous task: its lifetime, accessors, noise and initial draws, and one step of its dynamics. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * One step fills the slot array (task_internal.h) with the state, the action
 * value and the noise, runs the `next` programs in file order (each value
 * clamped to its variable's range before later formulas see it as x'), then
 * `stop`, `reward` and, on stopping, `stop_reward`.  Any NaN or infinity
 * produced on the way raises a floating-point exception; the step clears the
 * exception flags before and tests them once after, so the error check costs
 * two instructions per step, not one per operation.
 */
#include "task_internal.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

void bc_task_free(bc_task *t)
{
    if (!t)
        return;
    free(t->label);
    free(t->name);
    bc_bigtab_free(t->big);
    for (int32_t i = 0; i < t->n_vars; i++)
        free(t->var[i].name);
    free(t->action_var);
    for (int32_t a = 0; a < t->n_actions; a++)
        free(t->action_name[a]);
    free(t->action_name);
    free(t->action_value);
    for (int32_t k = 0; k < t->n_noise; k++)
        free(t->noise[k].name);
    for (int32_t c = 0; c < t->n_consts; c++)
        free(t->const_name[c]);
    free(t->const_name);
    free(t->const_value);
    for (int32_t k = 0; k < t->n_next; k++)
        bc__program_free(&t->next[k]);
    bc__program_free(&t->reward);
    bc__program_free(&t->stop);
    bc__program_free(&t->stop_reward);
    free(t);
}

int bc_task_path(const char *path)
{
    size_t n = strlen(path);
    return n > 5 && strcmp(path + n - 5, ".task") == 0;
}

static int same(const char *name, const char *s, size_t len)
{
    return name && strlen(name) == len && memcmp(name, s, len) == 0;
}

int32_t bc__task_lookup(const bc_task *t, const char *s, size_t len, int32_t n_consts, char *kind)
{
    for (int32_t i = 0; i < t->n_vars; i++)
        if (same(t->var[i].name, s, len))
            return *kind = 's', i;
    if (same(t->action_var, s, len))
        return *kind = 'a', 0;
    for (int32_t k = 0; k < t->n_noise; k++)
        if (same(t->noise[k].name, s, len))
            return *kind = 'n', k;
    for (int32_t c = 0; c < n_consts && c < t->n_consts; c++)
        if (same(t->const_name[c], s, len))
            return *kind = 'c', c;
    return -1;
}

/* ---- accessors ------------------------------------------------------------ */

const char *bc_task_name(const bc_task *t) { return t->name; }
double bc_task_discount(const bc_task *t) { return t->discount; }
bc_objective bc_task_objective(const bc_task *t) { return t->objective; }
int64_t bc_task_limit(const bc_task *t) { return t->limit; }
int32_t bc_task_n_vars(const bc_task *t) { return t->n_vars; }
const char *bc_task_var_name(const bc_task *t, int32_t i) { return t->var[i].name; }
double bc_task_var_low(const bc_task *t, int32_t i) { return t->var[i].low; }
double bc_task_var_high(const bc_task *t, int32_t i) { return t->var[i].high; }
int32_t bc_task_n_actions(const bc_task *t) { return t->n_actions; }
const char *bc_task_action_name(const bc_task *t, int32_t a) { return t->action_name[a]; }
double bc_task_action_value(const bc_task *t, int32_t a) { return t->action_value[a]; }
int32_t bc_task_n_noise(const bc_task *t) { return t->n_noise; }
const char *bc_task_noise_name(const bc_task *t, int32_t k) { return t->noise[k].name; }

/* ---- noise and initial states --------------------------------------------- */

/* The standard normal quantile: P. J. Acklam's rational approximation (2003,
 * relative error below 1.15e-9), then one step of Halley's method on
 * erfc, which brings it to about the precision of doubles. */
static double normal_quantile(double u)
{
    static const double a[] = {-3.969683028665376e+01, 2.209460984245205e+02,
                               -2.759285104469687e+02, 1.383577518672690e+02,
                               -3.066479806614716e+01, 2.506628277459239e+00};
    static const double b[] = {-5.447609879822406e+01, 1.615858368580409e+02,
                               -1.556989798598866e+02, 6.680131188771972e+01,
                               -1.328068155288572e+01};
    static const double c[] = {-7.784894002430293e-03, -3.223964580411365e-01,
                               -2.400758277161838e+00, -2.549732539343734e+00,
                               4.374664141464968e+00, 2.938163982698783e+00};
    static const double d[] = {7.784695709041462e-03, 3.224671290700398e-01,
                               2.445134137142996e+00, 3.754408661907416e+00};
    const double low = 0.02425;
    double x;
    if (u < low || u > 1 - low) {
        double q = sqrt(-2 * log(u < low ? u : 1 - u));
        x = (((((c[0] * q + c[1]) * q + c[2]) * q + c[3]) * q + c[4]) * q + c[5]) /
            ((((d[0] * q + d[1]) * q + d[2]) * q + d[3]) * q + 1);
        if (u > 1 - low)
            x = -x;
    } else {
        double q = u - 0.5, r = q * q;
        x = (((((a[0] * r + a[1]) * r + a[2]) * r + a[3]) * r + a[4]) * r + a[5]) * q /
            (((((b[0] * r + b[1]) * r + b[2]) * r + b[3]) * r + b[4]) * r + 1);
    }
    double e = 0.5 * erfc(-x / sqrt(2.0)) - u;
    double h = e * sqrt(2 * 3.14159265358979323846) * exp(x * x / 2);
    return x - h / (1 + x * h / 2);
}

double bc_task_noise_at(const bc_task *t, int32_t k, double u)
{
    const bc__task_noise *n = &t->noise[k];
    if (n->kind == BC__NOISE_UNIFORM)
        return n->a + u * (n->b - n->a);
    return n->a + n->b * normal_quantile(u);
}

void bc_task_initial_at(const bc_task *t, const double *u, double *x)
{
    for (int32_t i = 0; i < t->n_vars; i++) {
        const bc__task_var *v = &t->var[i];
        x[i] = v->init == BC__INIT_UNIFORM ? v->init_a + u[i] * (v->init_b - v->init_a) : v->init_a;
    }
}

/* ---- one step ------------------------------------------------------------- */

/* Fills the slots of a step: state, action value, noise. */
static void load_slots(const bc_task *t, const double *x, int32_t a, const double *noise, double *s)
{
    int32_t n = t->n_vars;
    memcpy(s, x, (size_t)n * sizeof *s);
    memcpy(s + n, x, (size_t)n * sizeof *s); /* not read before written; keeps them defined */
    s[2 * n] = t->action_value[a];
    if (t->n_noise)
        memcpy(s + 2 * n + 1, noise, (size_t)t->n_noise * sizeof *s);
}

int bc_task_step(const bc_task *t, const double *x, int32_t a, const double *noise, double *next,
                 double *reward, int *stop)
{
    double s[BC__SLOTS_MAX];
    int32_t n = t->n_vars;
    load_slots(t, x, a, noise, s);
    bc__fp_clear();
    for (int32_t k = 0; k < n; k++) {
        const bc__task_var *v = &t->var[t->next_var[k]];
        double y = bc__program_eval(&t->next[k], s);
        s[n + t->next_var[k]] = y < v->low ? v->low : y > v->high ? v->high : y;
    }
    int st = t->has_stop && bc__program_eval(&t->stop, s) != 0;
    double r = bc__program_eval(&t->reward, s);
    if (st && t->has_stop_reward)
        r += bc__program_eval(&t->stop_reward, s);
    if (bc__fp_raised() || !isfinite(r))
        return -1;
    memcpy(next, s + n, (size_t)n * sizeof *next);
    *reward = r;
    *stop = st;
    return 0;
}

/* "x = 0.1, v = -0.02" into buf. */
static void state_text(const bc_task *t, const double *x, char *buf, size_t cap)
{
    size_t len = 0;
    buf[0] = 0;
    for (int32_t i = 0; i < t->n_vars && len < cap; i++)
        len += (size_t)snprintf(buf + len, cap - len, "%s%s = %.17g", i ? ", " : "",
                                t->var[i].name, x[i]);
}

/* Runs one program alone and says whether it raised an exception. */
static int failing(const bc__program *p, const double *s, double *out)
{
    bc__fp_clear();
    *out = bc__program_eval(p, s);
    return bc__fp_raised() || !isfinite(*out);
}

const char *bc_task_step_error(const bc_task *t, const double *x, int32_t a, const double *noise,
                               char *buf, size_t cap)
{
    double s[BC__SLOTS_MAX], y = 0;
    int32_t n = t->n_vars;
    load_slots(t, x, a, noise, s);
    const bc__program *bad = NULL;
    const char *what = "the reward";
    for (int32_t k = 0; k < n && !bad; k++) {
        const bc__task_var *v = &t->var[t->next_var[k]];
        if (failing(&t->next[k], s, &y))
            bad = &t->next[k], what = v->name;
        s[n + t->next_var[k]] = y < v->low ? v->low : y > v->high ? v->high : y;
    }
    int st = 0;
    if (!bad && t->has_stop) {
        if (failing(&t->stop, s, &y))
            bad = &t->stop, what = "stop";
        st = y != 0;
    }
    if (!bad && failing(&t->reward, s, &y))
        bad = &t->reward, what = "reward";
    if (!bad && st && t->has_stop_reward && failing(&t->stop_reward, s, &y))
        bad = &t->stop_reward, what = "stop_reward";
    char state[600], noise_text[400] = "", formula[300];
    state_text(t, x, state, sizeof state);
    size_t len = 0;
    for (int32_t k = 0; k < t->n_noise && len < sizeof noise_text; k++)
        len += (size_t)snprintf(noise_text + len, sizeof noise_text - len, "%s%s = %.17g",
                                k ? ", " : " with noise ", t->noise[k].name, noise[k]);
    if (!bad)
        snprintf(formula, sizeof formula, "a formula"); /* not reproducible: inputs not finite? */
    else if (bad == &t->stop || bad == &t->reward || bad == &t->stop_reward)
        snprintf(formula, sizeof formula, "`%s` (line %d)", what, (int)bad->line);
    else
        snprintf(formula, sizeof formula, "`next %s` (line %d)", what, (int)bad->line);
    snprintf(buf, cap, "%s produced a NaN or an infinity at the state %s under action %s "
             "(%s = %.17g)%s", formula, state, t->action_name[a], t->action_var,
             t->action_value[a], noise_text);
    return buf;
}
