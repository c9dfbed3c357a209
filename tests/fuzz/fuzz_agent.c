/* fuzz_agent.c — libFuzzer harness: arbitrary bytes read as a Q-table and as a policy (CSV, NPY or JSON, by content) for one fixed model. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The model is the greenhouse of tests/unit/greenhouse.h (states cold
 * mild hot wilted, wilted terminal; actions open shut heat), so the seeds the
 * unit test's NumPy script writes (tests/tools/make_agents.py) and the ones in
 * tests/fuzz/seeds/ reach past the name lookups.  One binary serves the CSV,
 * NPY and JSON corpora (tests/fuzz/SEEDS): the format is chosen by content.
 * The length's parity picks which reading skips missing states, so both
 * modes are exercised.
 */
#include "fuzz.h"

#include "../unit/greenhouse.h"

#include <math.h>

static const bc_model *model(void)
{
    static bc_model *m;
    if (!m) {
        bc_diag d;
        bc_diag_init(&d);
        m = bc_read_bell_text(greenhouse_text, sizeof greenhouse_text - 1, "greenhouse.bell", &d);
        fuzz_require(m != NULL, "the harness's model reads");
        bc_diag_free(&d);
    }
    return m;
}

/* What a Q-table that was read promises: finite exactly on the pairs of covered states. */
static void check_qtable(const bc_model *m, const bc_qtable *q)
{
    for (int32_t s = 0; s < m->n_states; s++)
        for (int64_t p = m->state_pair_start[s]; p < m->state_pair_start[s + 1]; p++)
            fuzz_require(q->present[s] ? isfinite(q->q[p]) : isnan(q->q[p]),
                         "Q is finite on covered pairs, NaN elsewhere");
}

/* What a policy that was read promises: probabilities of a covered state sum to 1. */
static void check_policy(const bc_model *m, const bc_policy *pol)
{
    for (int32_t s = 0; s < m->n_states; s++) {
        if (m->terminal[s] || !pol->present[s])
            continue;
        double sum = 0;
        for (int64_t p = m->state_pair_start[s]; p < m->state_pair_start[s + 1]; p++) {
            fuzz_require(pol->prob[p] >= 0 && pol->prob[p] <= 1, "a probability is in [0, 1]");
            sum += pol->prob[p];
        }
        fuzz_require(fabs(sum - 1) < 1e-12, "a covered state's probabilities sum to 1");
    }
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    const bc_model *m = model();
    const char *buf = (const char *)data;
    int odd = size % 2;
    bc_diag d;
    bc_diag_init(&d);
    bc_qtable *q = bc_read_qtable_mem(buf, size, "fuzz.q", m, odd ? BC_MISSING_SKIP : BC_MISSING_ERROR, &d);
    fuzz_check_verdict(q, &d);
    bc_diag_free(&d);
    bc_policy *pol = bc_read_policy_mem(buf, size, "fuzz.p", m, odd ? BC_MISSING_ERROR : BC_MISSING_SKIP, &d);
    fuzz_check_verdict(pol, &d);
    bc_diag_free(&d);
    if (q)
        check_qtable(m, q);
    if (pol)
        check_policy(m, pol);
    bc_qtable_free(q);
    bc_policy_free(pol);
    return 0;
}
