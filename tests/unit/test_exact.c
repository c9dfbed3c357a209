/* test_exact.c — exact policy iteration, exact backward induction, interval proofs and certificates on hand-checked models. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#include "bellcheck.h"
#include "unit.h"

#include <stdlib.h>

/* Bold play's win probability from capital s with goal 100 and p = 2/5, by the
 * recursion of Dubins & Savage, How to Gamble If You Must (1965): with
 * x = s/goal, f(x) = p f(2x) for x <= 1/2, p + (1-p) f(2x-1) above; the orbit
 * of x is eventually periodic, and equating f at the repeat solves for it.
 * Written here independently of the library (GMP only for the arithmetic). */
static void bold_play(int s, int goal, mpq_t out)
{
    mpq_t x, a, b, p, q, a0[256], b0[256], xs[256], t;
    mpq_inits(x, a, b, p, q, t, NULL);
    mpq_set_ui(x, (unsigned long)s, (unsigned long)goal);
    mpq_canonicalize(x);
    mpq_set_ui(p, 2, 5), mpq_set_ui(q, 3, 5), mpq_set_ui(a, 0, 1), mpq_set_ui(b, 1, 1);
    int n = 0;
    for (;;) {
        if (mpq_sgn(x) == 0) { mpq_set(out, a); break; }
        if (mpq_cmp_ui(x, 1, 1) == 0) { mpq_add(out, a, b); break; }
        int seen = -1;
        for (int i = 0; i < n; i++)
            if (mpq_equal(xs[i], x)) seen = i;
        if (seen >= 0) { /* a0 + b0 f = a + b f */
            mpq_sub(t, a, a0[seen]);
            mpq_sub(out, b0[seen], b);
            mpq_div(t, t, out);               /* f(x) */
            mpq_mul(t, t, b0[seen]);
            mpq_add(out, a0[seen], t);
            break;
        }
        mpq_init(xs[n]), mpq_init(a0[n]), mpq_init(b0[n]);
        mpq_set(xs[n], x), mpq_set(a0[n], a), mpq_set(b0[n], b);
        n++;
        mpq_set_ui(t, 1, 2);
        if (mpq_cmp(x, t) <= 0) {
            mpq_mul(b, b, p);
            mpq_add(x, x, x);
        } else {
            mpq_mul(t, b, p), mpq_add(a, a, t), mpq_mul(b, b, q);
            mpq_add(x, x, x), mpq_set_ui(t, 1, 1), mpq_sub(x, x, t);
        }
    }
    for (int i = 0; i < n; i++)
        mpq_clear(xs[i]), mpq_clear(a0[i]), mpq_clear(b0[i]);
    mpq_clears(x, a, b, p, q, t, NULL);
}

static char *slurp(const char *path)
{
    FILE *f = fopen(path, "rb");
    if (!f)
        return NULL;
    static char buf[1 << 20];
    size_t n = fread(buf, 1, sizeof buf - 1, f);
    buf[n] = 0;
    fclose(f);
    return buf;
}

/* Exact policy iteration from timid play (stake 1 everywhere) must end at
 * bold play's probabilities: the exact solver improves a poor start itself. */
static void gambler_from_timid_start(void)
{
    char *text = slurp("models/sutton-barto-4.3-gambler.bell");
    bc_model *m = text ? unit_read_model(text) : NULL;
    CHECK(m != NULL, "gambler model reads");
    if (!m)
        return;
    int64_t *start = malloc((size_t)m->n_states * sizeof *start);
    int32_t stake1 = bc_names_find(m->action_names, "stake1", 6);
    for (int32_t s = 0; s < m->n_states; s++)
        start[s] = m->terminal[s] ? -1 : bc_model_find_pair(m, s, stake1);
    bc_exact x;
    bc_solve_status st = bc_exact_solve(m, start, NULL, &x);
    CHECK(st == BC_SOLVE_OK, "exact PI from timid play solves");
    CHECK(x.steps > 1 && x.n_changed > 0, "exact PI from timid play improves the start");
    int wrong = 0;
    mpq_t f;
    mpq_init(f);
    for (int c = 1; st == BC_SOLVE_OK && c < 100; c++) {
        char name[16];
        snprintf(name, sizeof name, "c%d", c);
        int32_t s = bc_names_find(m->state_names, name, strlen(name));
        bold_play(c, 100, f);
        wrong += s < 0 || !mpq_equal(f, x.values[s]);
    }
    /* Dubins & Savage (1965): bold play is optimal for p < 1/2. */
    CHECK(st == BC_SOLVE_OK && wrong == 0, "exact V* = bold play at every capital (Dubins & Savage 1965)");
    mpq_clear(f);
    bc_exact_free(&x);
    free(start);
    bc_model_free(m);
}

/* Hand computation: stage 1 (last decision) V1(s) = max(1, 0) = 1,
 * V1(t) = 2; stage 0 Q(s,a) = 1 + V1(s)/2 + V1(t)/2 = 5/2, Q(s,b) = 2,
 * V0(t) = 2 + V1(s) = 3. */
static const char horizon_model[] = "bell 1\ndiscount 1\nhorizon 2\nstates s t\nactions a b\n"
                                    "s a 1 -> s 1/2 t 1/2\ns b 0 -> t\nt a 2 -> s\n";

static void horizon_exact_and_interval(void)
{
    bc_model *m = unit_read_model(horizon_model);
    CHECK(m != NULL, "horizon model reads");
    if (!m)
        return;
    bc_exact x;
    CHECK(bc_exact_solve(m, NULL, NULL, &x) == BC_SOLVE_OK, "exact backward induction");
    mpq_t want;
    mpq_init(want);
    mpq_set_ui(want, 5, 2);
    CHECK(mpq_equal(x.values[0], want), "horizon V0(s) = 5/2 (hand computation)");
    mpq_set_ui(want, 3, 1);
    CHECK(mpq_equal(x.values[1], want), "horizon V0(t) = 3 (hand computation)");
    bc_exact_free(&x);
    bc_solution sol;
    bc_solution_init(&sol);
    bc_solve(m, BC_METHOD_BACKWARD, NULL, &sol);
    bc_prove_opts po;
    bc_prove_opts_default(&po);
    po.mode = BC_PROVE_INTERVAL;
    bc_proof_result pr;
    CHECK(bc_prove_solution(m, &sol, &po, &pr) == 0 && pr.value.kind == BC_PROOF_INTERVAL,
          "horizon interval proof");
    CHECK(pr.lower[0] <= 2.5 && 2.5 <= pr.upper[0] && pr.lower[1] <= 3 && 3 <= pr.upper[1],
          "horizon enclosure contains 5/2 and 3");
    bc_proof_result_free(&pr);
    bc_solution_free(&sol);
    mpq_clear(want);
    bc_model_free(m);
}

/* An interval proof of a model whose probabilities are not doubles (1/3,
 * 0.1) must still enclose the exact optimum: V*(s) = 1/(1 - 0.9/3) ... by
 * hand: s pays 1 and stays with probability 1/3 (else ends), discount 0.9:
 * v = 1 + 0.9 v / 3, v = 1 / (1 - 0.3) = 10/7. */
static void interval_encloses_non_double(void)
{
    bc_model *m = unit_read_model("bell 1\ndiscount 0.9\nstates s end\nterminal end\nactions a\n"
                                  "s a 1 -> s 1/3 end 2/3\n");
    CHECK(m != NULL, "1/3 model reads");
    if (!m)
        return;
    bc_solution sol;
    bc_solution_init(&sol);
    bc_solve(m, BC_METHOD_VI, NULL, &sol);
    bc_prove_opts po;
    bc_prove_opts_default(&po);
    po.mode = BC_PROVE_INTERVAL;
    bc_proof_result pr;
    bc_prove_solution(m, &sol, &po, &pr);
    mpq_t v, lo, hi;
    mpq_inits(v, lo, hi, NULL);
    mpq_set_ui(v, 10, 7);
    mpq_set_d(lo, pr.lower[0]);
    mpq_set_d(hi, pr.upper[0]);
    CHECK(pr.value.kind == BC_PROOF_INTERVAL && mpq_cmp(lo, v) <= 0 && mpq_cmp(v, hi) <= 0,
          "interval enclosure contains 10/7 (hand computation)");
    CHECK(pr.policy_optimal, "a single action is proven optimal");
    mpq_clears(v, lo, hi, NULL);
    bc_proof_result_free(&pr);
    bc_solution_free(&sol);
    bc_model_free(m);
}

int main(void)
{
    gambler_from_timid_start();
    horizon_exact_and_interval();
    interval_encloses_non_double();
    UNIT_DONE();
}
