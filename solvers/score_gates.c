/* score_gates.c — release gates: thresholds on a score that make `score` exit 1 when broken. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#include "bellcheck.h"

#include <math.h>

void bc_gate_limits_none(bc_gate_limits *l)
{
    l->max_regret = NAN;
    l->max_regret_is_percent = 0;
    l->max_state_regret = NAN;
    l->max_residual = NAN;
    l->min_agreement = NAN;
}

/* Appends a gate; an undefined value (NAN) never passes. */
static int add_gate(bc_gate *out, int n, const char *name, double limit, double value, int upper)
{
    out[n].name = name;
    out[n].limit = limit;
    out[n].value = value;
    out[n].passed = !isnan(value) && (upper ? value <= limit : value >= limit);
    return n + 1;
}

int bc_score_gates(const bc_score *s, const bc_gate_limits *l, bc_gate out[4])
{
    int n = 0;
    if (!isnan(l->max_regret)) {
        double limit = l->max_regret;
        if (l->max_regret_is_percent)
            limit = l->max_regret / 100 * fabs(s->optimal_initial);
        n = add_gate(out, n, "max-regret", limit, s->regret_initial, 1);
    }
    if (!isnan(l->max_state_regret))
        n = add_gate(out, n, "max-state-regret", l->max_state_regret, s->regret_max_state, 1);
    if (!isnan(l->max_residual))
        n = add_gate(out, n, "max-residual", l->max_residual, s->has_q ? s->residual : NAN, 1);
    if (!isnan(l->min_agreement))
        n = add_gate(out, n, "min-agreement", l->min_agreement, s->agreement_states, 0);
    return n;
}
