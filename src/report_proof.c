/* report_proof.c — how reports label a number with its proof: exact, an interval bound, or an estimate. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#include "report_internal.h"

#include <gmp.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

void bc__value_text(FILE *f, double v, bc_proof p)
{
    if (isinf(v))
        fputs(v > 0 ? "+infinity" : "-infinity", f);
    else
        fprintf(f, "%.10g", v);
    switch (p.kind) {
    case BC_PROOF_EXACT:
        fputs(p.bound > 0 ? " (exact, shown rounded)" : " (exact)", f);
        break;
    case BC_PROOF_INTERVAL:
        fprintf(f, " +/- %.2g (interval proof)", p.bound);
        break;
    default:
        fputs(p.bound >= 0 ? "" : " (estimate, not proven)", f);
        if (p.bound >= 0)
            fprintf(f, " +/- %.2g (solver's bound, not verified)", p.bound);
    }
}

void bc__proof_json(bc_jw *w, const char *key, bc_proof p)
{
    bc_jw_object(w, key);
    bc_jw_string(w, "kind", bc_proof_kind_name(p.kind));
    if (p.bound >= 0)
        bc_jw_number(w, "bound", p.bound);
    else
        bc_jw_null(w, "bound");
    bc_jw_end(w, '}');
}

void bc__mpq_json(bc_jw *w, const char *key, const mpq_t x)
{
    char *s = bc_mpq_text(x); /* lowest terms; integers without "/1" */
    bc_jw_string(w, key, s);  /* NULL (out of memory) writes null */
    free(s);
}
