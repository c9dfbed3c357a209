/* report_internal.h — pieces shared by the report files (not part of the public API). */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#ifndef BC_REPORT_INTERNAL_H
#define BC_REPORT_INTERNAL_H

#include "bellcheck.h"
#include "json_out.h"

/* Writes the "model" object every JSON report starts with. */
void bc__json_model(bc_jw *w, const bc_model *m);

/* "v (exact)", "v +/- b (interval proof)" or "v (estimate, not proven)". */
void bc__value_text(FILE *f, double v, bc_proof p);
/* {"kind": ..., "bound": ...} under key. */
void bc__proof_json(bc_jw *w, const char *key, bc_proof p);
/* An exact rational as the string "p/q" in lowest terms ("p" for integers). */
void bc__mpq_json(bc_jw *w, const char *key, const mpq_t x);

#endif
