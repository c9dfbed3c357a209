/* fuzz.h — what every libFuzzer harness of tests/fuzz/ shares: a diagnostics list per input and the round-trip checks. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * A harness is one file tests/fuzz/fuzz_NAME.c defining LLVMFuzzerTestOneInput
 * (libFuzzer supplies main), plus one line in tests/fuzz/SEEDS naming its
 * seeds; `make fuzz` builds every fuzz_*.c and runs each line of SEEDS.
 * A finding is anything AddressSanitizer or UndefinedBehaviorSanitizer
 * reports, a crash, a hang, or a broken promise checked here with
 * fuzz_require (which aborts, so libFuzzer saves the input).
 */
#ifndef BC_FUZZ_H
#define BC_FUZZ_H

#include "bellcheck.h"

#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

/* Aborts with a message when a promise of the library does not hold. */
#define fuzz_require(cond, what)                                                               \
    do {                                                                                       \
        if (!(cond)) {                                                                         \
            fprintf(stderr, "fuzz: broken promise: %s (%s:%d)\n", what, __FILE__, __LINE__); \
            abort();                                                                           \
        }                                                                                      \
    } while (0)

/* A reader's verdict is consistent with its messages: a result exactly when no error was reported. */
static inline void fuzz_check_verdict(const void *result, const bc_diag *d)
{
    fuzz_require((result != NULL) == (d->n_errors == 0), "a result exactly when no error");
    for (int i = 0; i < d->n; i++)
        fuzz_require(d->items[i].message != NULL, "every message has a text");
}

/* x of model a equals y of model b exactly (each lives in its own big-number table). */
static inline int fuzz_num_equal(bc_num x, const bc_model *a, bc_num y, const bc_model *b)
{
    mpq_t qx, qy;
    mpq_init(qx);
    mpq_init(qy);
    bc_num_to_mpq(qx, x, a->big);
    bc_num_to_mpq(qy, y, b->big);
    int eq = mpq_equal(qx, qy);
    mpq_clear(qx);
    mpq_clear(qy);
    return eq;
}

/* b, read back from what was written of a, is the same model: counts, names, pairs and exact numbers. */
static inline void fuzz_same_model(const bc_model *a, const bc_model *b)
{
    fuzz_require(a->n_states == b->n_states && a->n_actions == b->n_actions &&
                     a->n_pairs == b->n_pairs && a->n_trans == b->n_trans,
                 "the model read back has the same counts");
    fuzz_require(a->objective == b->objective && a->horizon == b->horizon &&
                     fuzz_num_equal(a->discount_exact, a, b->discount_exact, b),
                 "the model read back has the same directives");
    for (int32_t s = 0; s < a->n_states; s++)
        fuzz_require(!strcmp(bc_names_get(a->state_names, s), bc_names_get(b->state_names, s)) &&
                         a->terminal[s] == b->terminal[s] &&
                         fuzz_num_equal(a->initial_exact[s], a, b->initial_exact[s], b),
                     "states read back in the same order, with the same initial mass");
    for (int64_t p = 0; p < a->n_pairs; p++)
        fuzz_require(a->pair_state[p] == b->pair_state[p] && a->pair_action[p] == b->pair_action[p] &&
                         fuzz_num_equal(bc_model_reward_exact(a, p), a, bc_model_reward_exact(b, p), b),
                     "pairs read back the same");
    for (int64_t t = 0; t < a->n_trans; t++)
        fuzz_require(a->succ_state[t] == b->succ_state[t] &&
                         fuzz_num_equal(bc_model_prob_exact(a, t), a, bc_model_prob_exact(b, t), b),
                     "transitions read back the same");
}

/* A model that was read satisfies the invariants, and writing it in form
 * `json` (0 text, 1 JSON) and reading that back gives the same model. */
static inline void fuzz_round_trip(const bc_model *m, int json)
{
    fuzz_require(bc_model_check_invariants(m) == NULL, "the model's invariants hold");
    char *text = NULL;
    size_t len = 0;
    FILE *f = open_memstream(&text, &len);
    fuzz_require(f != NULL, "open_memstream");
    int rc = json ? bc_write_bell_json(m, f) : bc_write_bell_text(m, f);
    fuzz_require(fclose(f) == 0 && rc == 0, "the writer succeeds");
    bc_diag d;
    bc_diag_init(&d);
    bc_model *again = json ? bc_read_bell_json(text, len, "again.json", &d)
                           : bc_read_bell_text(text, len, "again.bell", &d);
    if (!again) {
        bc_diag_print(&d, stderr);
        fprintf(stderr, "--- written:\n%.*s\n", (int)(len > 4000 ? 4000 : len), text);
    }
    fuzz_require(again != NULL, "what the writer wrote reads back");
    fuzz_same_model(m, again);
    /* Every label is UTF-8 (the readers refuse other bytes, a file name's
     * become U+FFFD), so the JSON form keeps it exactly; the text form turns
     * line breaks, control bytes and '#' into spaces (bell_write.c). */
    fuzz_require(m->name && bc_utf8_valid_prefix(m->name, strlen(m->name)) == strlen(m->name),
                 "a model's label is UTF-8");
    if (json)
        fuzz_require(!strcmp(m->name, again->name ? again->name : ""), "the JSON form keeps the label");
    bc_model_free(again);
    bc_diag_free(&d);
    free(text);
}

/* Everything a model reader promises about one input: a verdict matching
 * its messages and, for a model, both round trips. */
static inline void fuzz_model_result(bc_model *m, bc_diag *d)
{
    fuzz_check_verdict(m, d);
    if (m) {
        fuzz_round_trip(m, 0);
        fuzz_round_trip(m, 1);
    }
    bc_model_free(m);
    bc_diag_free(d);
}

#endif
