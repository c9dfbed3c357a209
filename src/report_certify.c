/* report_certify.c — the reports of `certify` and `verify`, as text and as JSON. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#include "report_internal.h"

int bc_report_certify_text(FILE *f, const bc_model *m, const bc_certificate *c,
                           const bc_proof_result *pr, const char *cert_path)
{
    fprintf(f, "model %s: %d states, SHA-256 %s\n", m->name, (int)m->n_states, c->digest);
    fprintf(f, "certificate (%s) written to %s\n", bc_proof_kind_name(c->kind), cert_path);
    if (c->kind == BC_PROOF_EXACT)
        fputs("  claims: these rational values are V* exactly and the policy is optimal\n", f);
    else
        fprintf(f, "  claims: the values are within %.3g of V*, the policy within %.3g of optimal\n",
                c->bound, c->policy_loss);
    fprintf(f, "  proof: %s (%.3f s)\n", pr->message, pr->seconds);
    fputs("A certificate covers the model as written, not the physical system it describes.\n", f);
    return ferror(f) ? -1 : 0;
}

int bc_report_certify_json(FILE *f, const bc_model *m, const bc_certificate *c,
                           const bc_proof_result *pr, const char *cert_path)
{
    bc_jw w;
    bc_jw_init(&w, f);
    bc_jw_object(&w, NULL);
    bc__json_model(&w, m);
    bc_jw_string(&w, "sha256", c->digest);
    bc_jw_string(&w, "certificate", cert_path);
    bc__proof_json(&w, "proof", (bc_proof){c->kind, c->kind == BC_PROOF_EXACT ? 0 : c->bound});
    if (c->kind == BC_PROOF_INTERVAL)
        bc_jw_number(&w, "policy_loss_bound", c->policy_loss);
    bc_jw_number(&w, "seconds", pr->seconds);
    bc_jw_end(&w, '}');
    bc_jw_finish(&w);
    return ferror(f) ? -1 : 0;
}

int bc_report_verify_text(FILE *f, const bc_model *m, const bc_certificate *c,
                          const bc_verdict *v)
{
    fprintf(f, "model %s: %d states, SHA-256 %s (matches the certificate)\n", m->name,
            (int)m->n_states, c->digest);
    fprintf(f, "certificate (%s): %s\n", bc_proof_kind_name(c->kind),
            v->holds ? "HOLDS" : "FAILS");
    fprintf(f, "  %s\n", v->message);
    if (!v->holds && v->first_bad_state >= 0)
        fprintf(f, "  first failing state: %s\n", bc_names_get(m->state_names, v->first_bad_state));
    fprintf(f, "  %lld pairs checked in %.3f s, without solving\n", (long long)v->pairs_checked,
            v->seconds);
    return ferror(f) ? -1 : 0;
}

int bc_report_verify_json(FILE *f, const bc_model *m, const bc_certificate *c,
                          const bc_verdict *v)
{
    bc_jw w;
    bc_jw_init(&w, f);
    bc_jw_object(&w, NULL);
    bc__json_model(&w, m);
    bc_jw_string(&w, "sha256", c->digest);
    bc_jw_string(&w, "kind", bc_proof_kind_name(c->kind));
    bc_jw_bool(&w, "holds", v->holds);
    if (!v->holds && v->first_bad_state >= 0)
        bc_jw_string(&w, "first_failing_state", bc_names_get(m->state_names, v->first_bad_state));
    else
        bc_jw_null(&w, "first_failing_state");
    if (c->kind == BC_PROOF_INTERVAL) {
        bc_jw_number(&w, "proven_bound", v->bound);
        bc_jw_number(&w, "proven_policy_loss", v->policy_loss);
    }
    bc_jw_int(&w, "pairs_checked", v->pairs_checked);
    bc_jw_number(&w, "seconds", v->seconds);
    bc_jw_string(&w, "message", v->message);
    bc_jw_end(&w, '}');
    bc_jw_finish(&w);
    return ferror(f) ? -1 : 0;
}
