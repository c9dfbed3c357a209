/* unit.h — the tiny check macros every unit test uses; one PASS/FAIL line per check. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#ifndef BC_UNIT_H
#define BC_UNIT_H
#include <math.h>
#include <stdio.h>

static int unit_failed;

/* CHECK(cond, name): one named check; prints "PASS name" or "FAIL name (file:line)". */
#define CHECK(cond, name)                                                                  \
    do {                                                                                   \
        if (cond) {                                                                        \
            printf("PASS %s\n", name);                                                     \
        } else {                                                                           \
            printf("FAIL %s (%s:%d: %s)\n", name, __FILE__, __LINE__, #cond);              \
            unit_failed++;                                                                 \
        }                                                                                  \
    } while (0)

/* CHECK_NEAR(a, b, tol, name): |a - b| <= tol. */
#define CHECK_NEAR(a, b, tol, name)                                                        \
    do {                                                                                   \
        double unit_a_ = (a), unit_b_ = (b);                                               \
        if (fabs(unit_a_ - unit_b_) <= (tol)) {                                            \
            printf("PASS %s\n", name);                                                     \
        } else {                                                                           \
            printf("FAIL %s (%s:%d: %.17g vs %.17g, tol %g)\n", name, __FILE__, __LINE__,  \
                   unit_a_, unit_b_, (double)(tol));                                       \
            unit_failed++;                                                                 \
        }                                                                                  \
    } while (0)

#define UNIT_DONE() return unit_failed ? 1 : 0

#ifdef BELLCHECK_H
#include <string.h>
/* Reads a .bell model from text (labelled t.bell); prints the messages and returns NULL on error. */
static inline bc_model *unit_read_model(const char *text)
{
    bc_diag d;
    bc_diag_init(&d);
    bc_model *m = bc_read_bell_text(text, strlen(text), "t.bell", &d);
    if (!m)
        bc_diag_print(&d, stdout);
    bc_diag_free(&d);
    return m;
}
#endif

#endif
