/* fuzz_cert.c — libFuzzer harness: arbitrary bytes read as an optimality certificate of two fixed models, then verified. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The models are the greenhouse of tests/unit/greenhouse.h (discount 9/10,
 * maximise) and an invented courier (discount 1, minimise, so the verifier's
 * termination check runs).  A certificate names its model by SHA-256, which
 * mutations would never hit: in inputs of even length the harness writes
 * the model's digest over the first run of 64 lower-case hex digits, so the
 * mutated certificate reaches the policy and values; inputs of odd length
 * are read as they are (the foreign-model path).
 *
 * Promises checked beyond the verdict: a certificate read has a pair of its
 * own state for every non-terminal state and none at terminals; and when the
 * verifier says a certificate holds, it is true.  The optimal values were
 * computed by hand with Python's fractions (policy iteration over all
 * policies, not with bellcheck): greenhouse V*(cold, mild, hot) = 122/29,
 * 200/29, 180/29, optimal actions heat, shut, open; courier V*(depot, hub,
 * dock) = 27/4, 2, 5 (4 + 3/4 * 2 + 1/4 * 5), optimal action drive everywhere.
 * So an exact certificate that holds must carry exactly these values and
 * actions, and an interval one values within its proven bound of them, with
 * a one-step loss of each certified action within its proven policy loss.
 */
#include "fuzz.h"

#include "../unit/greenhouse.h"

#include <math.h>

static const char courier_text[] =
    "bell 1\n"
    "name courier\n"
    "discount 1\n"
    "objective min\n"
    "states depot hub dock done\n"
    "actions drive wait\n"
    "terminal done\n"
    "depot drive 4 -> hub 3/4 dock 1/4\n"
    "depot wait 1 -> depot\n"
    "hub drive 2 -> done\n"
    "hub wait 1 -> depot 1/2 hub 1/2\n"
    "dock drive 5 -> done\n";

typedef struct {
    const char *text;
    size_t len;
    const char *vstar[4];  /* V* of states 0..3 in declaration order */
    const char *best[4];   /* the optimal action; NULL at the terminal state */
    bc_model *m;
    char digest[65];
} known_model;

static known_model models[2] = {
    {greenhouse_text, sizeof greenhouse_text - 1, {"122/29", "200/29", "180/29", "0"},
     {"heat", "shut", "open", NULL}, NULL, ""},
    {courier_text, sizeof courier_text - 1, {"27/4", "2", "5", "0"},
     {"drive", "drive", "drive", NULL}, NULL, ""},
};

static void load(known_model *k)
{
    if (k->m)
        return;
    bc_diag d;
    bc_diag_init(&d);
    k->m = bc_read_bell_text(k->text, k->len, "model.bell", &d);
    fuzz_require(k->m != NULL && k->m->n_states == 4, "the harness's model reads");
    fuzz_require(bc_model_digest(k->m, k->digest) == 0, "the harness's model has a digest");
    bc_diag_free(&d);
}

/* Writes k's digest over the first run of exactly 64 lower-case hex digits of buf. */
static void put_digest(char *buf, size_t len, const known_model *k)
{
    size_t run = 0;
    for (size_t i = 0; i <= len; i++) {
        char ch = i < len ? buf[i] : 0;
        if ((ch >= '0' && ch <= '9') || (ch >= 'a' && ch <= 'f')) {
            run++;
            continue;
        }
        if (run == 64) {
            memcpy(buf + i - 64, k->digest, 64);
            return;
        }
        run = 0;
    }
}

/* The Q-value of pair p under V* in the model's own sign convention, exactly. */
static void q_star(const bc_model *m, const mpq_t *vstar, int64_t p, mpq_t q, mpq_t t)
{
    mpq_t g;
    mpq_init(g);
    bc_num_to_mpq(g, m->discount_exact, m->big);
    mpq_set_ui(q, 0, 1);
    for (int64_t k = m->pair_trans_start[p]; k < m->pair_trans_start[p + 1]; k++) {
        bc_num_to_mpq(t, bc_model_prob_exact(m, k), m->big);
        mpq_mul(t, t, vstar[m->succ_state[k]]);
        mpq_add(q, q, t);
    }
    mpq_mul(q, q, g);
    bc_model_reward_mpq(m, p, t);
    mpq_add(q, q, t);
    mpq_clear(g);
}

/* A verdict of "holds" is true of the certificate (see the head comment). */
static void check_holds(const known_model *k, const bc_certificate *c, const bc_verdict *v)
{
    const bc_model *m = k->m;
    mpq_t vs[4], x, q, t;
    mpq_inits(x, q, t, NULL);
    for (int s = 0; s < 4; s++) {
        mpq_init(vs[s]);
        fuzz_require(mpq_set_str(vs[s], k->vstar[s], 10) == 0, "the harness's V* parses");
    }
    for (int32_t s = 0; s < 4; s++) {
        if (c->kind == BC_PROOF_EXACT) {
            fuzz_require(mpq_equal(c->exact_values[s], vs[s]), "an exact certificate that holds "
                         "carries V* exactly");
            fuzz_require(m->terminal[s] || !strcmp(bc_names_get(m->action_names,
                         m->pair_action[c->policy[s]]), k->best[s]),
                         "an exact certificate that holds carries the optimal actions");
            continue;
        }
        mpq_set_d(x, c->values[s]);
        mpq_sub(x, x, vs[s]);
        mpq_abs(x, x);
        mpq_set_d(t, v->bound);
        fuzz_require(mpq_cmp(x, t) <= 0, "an interval certificate that holds is within its "
                     "proven bound of V*");
        if (m->terminal[s])
            continue;
        q_star(m, (const mpq_t *)vs, c->policy[s], q, t);
        mpq_sub(x, vs[s], q); /* one-step loss, maximising */
        if (m->objective == BC_MIN)
            mpq_neg(x, x);
        mpq_set_d(t, v->policy_loss);
        fuzz_require(mpq_cmp(x, t) <= 0, "an interval certificate that holds loses at most its "
                     "proven policy loss in one step");
    }
    for (int s = 0; s < 4; s++)
        mpq_clear(vs[s]);
    mpq_clears(x, q, t, NULL);
}

static void one_model(known_model *k, const uint8_t *data, size_t size)
{
    load(k);
    const bc_model *m = k->m;
    char *buf = malloc(size ? size : 1);
    fuzz_require(buf != NULL, "malloc");
    memcpy(buf, data, size);
    int substituted = size % 2 == 0;
    if (substituted)
        put_digest(buf, size, k);
    bc_diag d;
    bc_diag_init(&d);
    bc_certificate c;
    int rc = bc_read_certificate_mem(buf, size, "fuzz.cert", m, &c, &d);
    fuzz_require(rc == 0 || rc == -1 || rc == -2, "the reader returns 0, -1 or -2");
    fuzz_require((rc == 0) == (d.n_errors == 0), "a certificate exactly when no error");
    for (int i = 0; i < d.n; i++)
        fuzz_require(d.items[i].message != NULL, "every message has a text");
    if (rc == 0) {
        fuzz_require(c.kind == BC_PROOF_EXACT || c.kind == BC_PROOF_INTERVAL, "a known kind");
        fuzz_require(c.n_states == m->n_states && !strcmp(c.digest, k->digest), "the model's digest");
        for (int32_t s = 0; s < m->n_states; s++)
            fuzz_require(m->terminal[s] ? c.policy[s] == -1
                                        : c.policy[s] >= m->state_pair_start[s] &&
                                              c.policy[s] < m->state_pair_start[s + 1],
                         "the policy names a pair of each non-terminal state");
        bc_verdict v;
        fuzz_require(bc_verify_certificate(m, &c, &v) == 0, "the verifier runs");
        fuzz_require(v.holds == 0 || v.holds == 1, "a verdict");
        fuzz_require(v.holds ? v.first_bad_state == -1 : v.first_bad_state < m->n_states,
                     "a failed check names a state of the model or none");
        if (v.holds)
            check_holds(k, &c, &v);
        bc_certificate_free(&c);
    }
    bc_diag_free(&d);
    free(buf);
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    one_model(&models[0], data, size);
    one_model(&models[1], data, size);
    return 0;
}
