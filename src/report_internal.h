/* report_internal.h — pieces shared by the report files (not part of the public API). */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#ifndef BC_REPORT_INTERNAL_H
#define BC_REPORT_INTERNAL_H

#include "bellcheck.h"
#include "json_out.h"

/* Writes the "model" object every JSON report starts with. */
void bc__json_model(bc_jw *w, const bc_model *m);

#endif
