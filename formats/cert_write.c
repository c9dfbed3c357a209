/* cert_write.c — a proven solution as a self-contained certificate, and the certificate written as JSON. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#include "bellcheck.h"
#include "json_out.h"

#include <stdlib.h>
#include <string.h>

void bc_certificate_free(bc_certificate *c)
{
    if (c->exact_values)
        for (int32_t s = 0; s < c->n_states; s++)
            mpq_clear(c->exact_values[s]);
    free(c->exact_values);
    free(c->values);
    free(c->policy);
    memset(c, 0, sizeof *c);
}

int bc_certificate_from_proof(const bc_model *m, const bc_solution *sol,
                              const bc_proof_result *pr, bc_certificate *c)
{
    memset(c, 0, sizeof *c);
    if (m->horizon > 0 || pr->value.kind == BC_PROOF_NONE)
        return -1; /* see docs/certificates.md: infinite-horizon models, proven answers */
    size_t n = (size_t)(m->n_states ? m->n_states : 1);
    c->kind = pr->value.kind;
    c->n_states = m->n_states;
    c->policy = malloc(n * sizeof *c->policy);
    if (!c->policy || bc_model_digest(m, c->digest) < 0)
        goto fail;
    memcpy(c->policy, sol->policy, (size_t)m->n_states * sizeof *c->policy);
    if (c->kind == BC_PROOF_EXACT) {
        if (!pr->has_exact || !(c->exact_values = malloc(n * sizeof *c->exact_values)))
            goto fail;
        for (int32_t s = 0; s < m->n_states; s++) {
            mpq_init(c->exact_values[s]);
            mpq_set(c->exact_values[s], pr->exact.values[s]);
        }
        memcpy(c->policy, pr->exact.policy, (size_t)m->n_states * sizeof *c->policy);
    } else {
        if (!(c->values = malloc(n * sizeof *c->values)))
            goto fail;
        memcpy(c->values, sol->values, (size_t)m->n_states * sizeof *c->values);
        c->bound = pr->value.bound;
        c->policy_loss = pr->policy_loss;
    }
    return 0;
fail:
    bc_certificate_free(c);
    return -1;
}

/* 0, or -1 when out of memory (the certificate must then not be kept). */
static int write_mpq(bc_jw *w, const char *key, const mpq_t x)
{
    char *s = bc_mpq_text(x);
    bc_jw_string(w, key, s);
    free(s);
    return s ? 0 : -1;
}

int bc_write_certificate(FILE *f, const bc_model *m, const bc_certificate *c)
{
    bc_jw w;
    bc_jw_init(&w, f);
    bc_jw_object(&w, NULL);
    bc_jw_int(&w, "bellcheck_certificate", 1);
    bc_jw_object(&w, "model");
    bc_jw_string(&w, "name", m->name);
    bc_jw_string(&w, "sha256", c->digest);
    bc_jw_int(&w, "states", m->n_states);
    bc_jw_int(&w, "actions", m->n_actions);
    char *g = bc_num_text(m->discount_exact, m->big);
    bc_jw_string(&w, "discount", g);
    free(g);
    bc_jw_string(&w, "objective", m->objective == BC_MAX ? "max" : "min");
    bc_jw_end(&w, '}');
    bc_jw_string(&w, "kind", bc_proof_kind_name(c->kind));
    if (c->kind == BC_PROOF_INTERVAL) {
        bc_jw_number(&w, "bound", c->bound);
        bc_jw_number(&w, "policy_loss_bound", c->policy_loss);
    }
    bc_jw_object(&w, "policy");
    for (int32_t s = 0; s < m->n_states; s++)
        if (c->policy[s] >= 0)
            bc_jw_string(&w, bc_names_get(m->state_names, s),
                         bc_names_get(m->action_names, m->pair_action[c->policy[s]]));
    bc_jw_end(&w, '}');
    bc_jw_object(&w, "values");
    int lost = 0;
    for (int32_t s = 0; s < m->n_states; s++) {
        const char *name = bc_names_get(m->state_names, s);
        if (c->kind == BC_PROOF_EXACT)
            lost |= write_mpq(&w, name, c->exact_values[s]) < 0;
        else
            bc_jw_number(&w, name, c->values[s]);
    }
    bc_jw_end(&w, '}');
    bc_jw_end(&w, '}');
    bc_jw_finish(&w);
    return ferror(f) || lost ? -1 : 0;
}
