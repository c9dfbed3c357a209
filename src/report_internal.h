/* report_internal.h — pieces shared by the report files (not part of the public API). */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#ifndef BC_REPORT_INTERNAL_H
#define BC_REPORT_INTERNAL_H

#include "bellcheck.h"
#include "json_out.h"

/* Writes the "model" object every JSON report starts with. */
void bc__json_model(bc_jw *w, const bc_model *m);

/* The next position k' >= k in s->by_regret of a state a worst-states list
 * shows (non-terminal, covered, regret > 0), or -1 when there is none. */
int32_t bc__next_worst(const bc_model *m, const bc_score *s, int32_t k);
/* "v (exact)", "v +/- b (interval proof)" or "v (estimate, not proven)". */
void bc__value_text(FILE *f, double v, bc_proof p);
/* {"kind": ..., "bound": ...} under key. */
void bc__proof_json(bc_jw *w, const char *key, bc_proof p);
/* An exact rational as the string "p/q" in lowest terms ("p" for integers). */
void bc__mpq_json(bc_jw *w, const char *key, const mpq_t x);

/* Simulations (report_rollout.c; shared with report_refine.c). */
extern const char bc__simulation_note[]; /* what a simulation covers, one sentence */
void bc__cells_text(int32_t n_dims, const int32_t *cells, char *buf, size_t cap); /* "64x64" */
/* "mean, 95% CI [lo, hi]" (or a note for one episode). */
void bc__stats_text(FILE *f, const bc_sample_stats *s);
/* mean under mean_key and "ci95": [lo, hi] (null for one episode). */
void bc__stats_json(bc_jw *w, const char *mean_key, const bc_sample_stats *s);
void bc__grid_json(bc_jw *w, const char *key, const bc_grid_policy *gp); /* {"cells", "scheme"} */
/* episodes, mean_return, ci95, sd_return, success_rate, successes, steps {...}. */
void bc__simulation_json(bc_jw *w, const bc_rollout_result *r);
/* "98.5% of episodes stop within L steps (k of n)". */
void bc__success_text(FILE *f, int64_t successes, int64_t episodes, int64_t limit);

/* Refinement studies (report_refine.c; shared with report_html_refine.c). */
const char *bc__refine_status_name(bc_refine_status s); /* "ok", "unusable", ... */
/* How much better L's policy did than the previous grid's on the same
 * episodes, in the objective's direction (its mean and 95% interval). */
bc_sample_stats bc__refine_gain(const bc_refine_level *L);
/* The study's closing sentence on the two finest grids' simulated policies
 * ("the finest grid gives a better controller ..."), or NULL when there is none. */
const char *bc__refine_verdict(const bc_refine *r);

#endif
