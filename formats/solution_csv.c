/* solution_csv.c — writes a solution's values and policy as CSV (state,value / state,action). */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#include "bellcheck.h"

#include <math.h>

/* Writes a double that reads back exactly (or -inf / inf / nan). */
static void write_double(FILE *f, double v)
{
    if (isnan(v))
        fputs("nan", f);
    else if (isinf(v))
        fputs(v < 0 ? "-inf" : "inf", f);
    else
        fprintf(f, "%.17g", v);
}

int bc_write_values_csv(FILE *f, const bc_model *m, const bc_solution *sol)
{
    fputs("state,value\n", f);
    for (int32_t s = 0; s < m->n_states; s++) {
        fprintf(f, "%s,", bc_names_get(m->state_names, s));
        write_double(f, sol->values[s]);
        fputc('\n', f);
    }
    return ferror(f) ? -1 : 0;
}

int bc_write_policy_csv(FILE *f, const bc_model *m, const bc_solution *sol)
{
    fputs("state,action\n", f);
    for (int32_t s = 0; s < m->n_states; s++) {
        int64_t p = sol->policy[s];
        if (p < 0)
            continue;
        fprintf(f, "%s,%s\n", bc_names_get(m->state_names, s),
                bc_names_get(m->action_names, m->pair_action[p]));
    }
    return ferror(f) ? -1 : 0;
}
