/* cert_read.c — reads an optimality certificate (JSON) and lays it over a model. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * A certificate names its model by the SHA-256 of the model's normalised
 * form; one that names another model is refused (-2) before anything else
 * is read, so a certificate can never be checked against the wrong model.
 * Problems inside the document are located by a path after the file label
 * ("cert.json:values.s1"); syntax errors get a line and column.
 */
#include "bellcheck.h"
#include "json_internal.h"

#include <ctype.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include <cjson/cJSON.h>

typedef struct {
    const bc_model *m;
    bc_diag *d;
    const char *label;
} cert_ctx;

static int fail(cert_ctx *c, const char *where, const char *fmt, const char *arg)
{
    char at[600];
    snprintf(at, sizeof at, "%.300s%s%.280s", c->label, where ? ":" : "", where ? where : "");
    bc_diag_add(c->d, BC_ERROR, at, 0, 0, fmt, arg ? arg : "");
    return -1;
}

/* A rational "p", "-p" or "p/q" in decimal digits, q > 0. */
static int parse_rational(const char *s, mpq_t out)
{
    const char *p = s + (*s == '-');
    size_t digits = 0, slash = 0;
    for (; *p; p++) {
        if (isdigit((unsigned char)*p))
            digits++;
        else if (*p == '/' && digits && !slash)
            slash = digits, digits = 0;
        else
            return -1;
    }
    if (!digits || strlen(s) > 1000000 || mpq_set_str(out, s, 10) != 0 ||
        mpz_sgn(mpq_denref(out)) == 0)
        return -1;
    mpq_canonicalize(out);
    return 0;
}

static int read_policy(cert_ctx *c, const cJSON *pol, bc_certificate *cert)
{
    const bc_model *m = c->m;
    char where[400], fb[64];
    if (!cJSON_IsObject(pol))
        return fail(c, "policy", "expected an object {state: action}, found %s",
                    bc__json_found(pol, fb, sizeof fb));
    for (int32_t s = 0; s < m->n_states; s++)
        cert->policy[s] = -1;
    for (const cJSON *it = pol->child; it; it = it->next) {
        snprintf(where, sizeof where, "policy.%.300s", it->string);
        int32_t s = bc_names_find(m->state_names, it->string, strlen(it->string));
        if (s < 0)
            return fail(c, where, "the model has no state of this name%s", NULL);
        if (m->terminal[s])
            return fail(c, where, "a terminal state takes no action%s", NULL);
        if (!cJSON_IsString(it))
            return fail(c, where, "expected an action name, found %s", bc__json_found(it, fb, sizeof fb));
        int32_t a = bc_names_find(m->action_names, it->valuestring, strlen(it->valuestring));
        int64_t p = a < 0 ? -1 : bc_model_find_pair(m, s, a);
        if (p < 0)
            return fail(c, where, "the state has no action '%s' in the model", it->valuestring);
        if (cert->policy[s] >= 0)
            return fail(c, where, "the state appears twice%s", NULL);
        cert->policy[s] = p;
    }
    for (int32_t s = 0; s < m->n_states; s++)
        if (!m->terminal[s] && cert->policy[s] < 0)
            return fail(c, "policy", "no action for state '%s'", bc_names_get(m->state_names, s));
    return 0;
}

static int read_values(cert_ctx *c, const cJSON *vals, bc_certificate *cert)
{
    const bc_model *m = c->m;
    char where[400], fb[64];
    if (!cJSON_IsObject(vals))
        return fail(c, "values", "expected an object {state: value}, found %s",
                    bc__json_found(vals, fb, sizeof fb));
    uint8_t *seen = calloc((size_t)m->n_states + 1, 1);
    if (!seen)
        return fail(c, NULL, "out of memory%s", NULL);
    int rc = 0;
    for (const cJSON *it = vals->child; it && rc == 0; it = it->next) {
        snprintf(where, sizeof where, "values.%.300s", it->string);
        int32_t s = bc_names_find(m->state_names, it->string, strlen(it->string));
        if (s < 0)
            rc = fail(c, where, "the model has no state of this name%s", NULL);
        else if (seen[s]++)
            rc = fail(c, where, "the state appears twice%s", NULL);
        else if (cert->kind == BC_PROOF_EXACT &&
                 (!cJSON_IsString(it) || parse_rational(it->valuestring, cert->exact_values[s]) < 0))
            rc = fail(c, where, "expected an exact rational as a string (\"-60/7\"), found %s",
                      bc__json_found(it, fb, sizeof fb));
        else if (cert->kind == BC_PROOF_INTERVAL && (!cJSON_IsNumber(it) || !isfinite(it->valuedouble)))
            rc = fail(c, where, "expected a finite number, found %s", bc__json_found(it, fb, sizeof fb));
        else if (cert->kind == BC_PROOF_INTERVAL)
            cert->values[s] = it->valuedouble;
    }
    for (int32_t s = 0; s < m->n_states && rc == 0; s++)
        if (!seen[s])
            rc = fail(c, "values", "no value for state '%s'", bc_names_get(m->state_names, s));
    free(seen);
    return rc;
}

static int read_nonneg(cert_ctx *c, const cJSON *root, const char *key, double *out)
{
    const cJSON *v = cJSON_GetObjectItemCaseSensitive(root, key);
    char fb[64];
    if (!cJSON_IsNumber(v) || !isfinite(v->valuedouble) || v->valuedouble < 0)
        return fail(c, key, "expected a number >= 0, found %s", bc__json_found(v, fb, sizeof fb));
    *out = v->valuedouble;
    return 0;
}

/* Identity, model digest and kind; -2 for another model's certificate. */
static int read_head(cert_ctx *c, const cJSON *root, bc_certificate *cert)
{
    const cJSON *mark = cJSON_GetObjectItemCaseSensitive(root, "bellcheck_certificate");
    char fb[64];
    if (!cJSON_IsObject(root))
        return fail(c, NULL, "not a bellcheck certificate: expected a JSON object, found %s",
                    bc__json_found(root, fb, sizeof fb));
    if (!cJSON_IsNumber(mark) || mark->valuedouble != 1)
        return fail(c, NULL, "not a bellcheck certificate (expected an object with "
                    "\"bellcheck_certificate\": 1)%s", NULL);
    const cJSON *model = cJSON_GetObjectItemCaseSensitive(root, "model");
    const cJSON *sha = cJSON_GetObjectItemCaseSensitive(model, "sha256");
    if (!cJSON_IsString(sha) || strlen(sha->valuestring) != 64)
        return fail(c, "model.sha256", "expected the model's SHA-256 as 64 hex digits%s", NULL);
    if (bc_model_digest(c->m, cert->digest) < 0)
        return fail(c, NULL, "cannot compute the model's digest%s", NULL);
    if (strcmp(sha->valuestring, cert->digest) != 0) {
        fail(c, "model.sha256", "the certificate belongs to another model (its SHA-256 is %s)",
             sha->valuestring);
        bc_diag_add(c->d, BC_NOTE, c->label, 0, 0, "this model's SHA-256 is %s", cert->digest);
        return -2;
    }
    const cJSON *kind = cJSON_GetObjectItemCaseSensitive(root, "kind");
    if (cJSON_IsString(kind) && !strcmp(kind->valuestring, "exact"))
        cert->kind = BC_PROOF_EXACT;
    else if (cJSON_IsString(kind) && !strcmp(kind->valuestring, "interval"))
        cert->kind = BC_PROOF_INTERVAL;
    else
        return fail(c, "kind", "expected \"exact\" or \"interval\"%s", NULL);
    if (cert->kind == BC_PROOF_INTERVAL && (read_nonneg(c, root, "bound", &cert->bound) < 0 ||
                                            read_nonneg(c, root, "policy_loss_bound", &cert->policy_loss) < 0))
        return -1;
    return 0;
}

/* Reports a problem of the document's text at byte offset off as label:line:col; NULL. */
static cJSON *syntax_fail(cert_ctx *c, const char *buf, size_t len, size_t off, const char *what)
{
    int32_t line, col;
    bc__json_line_col(buf, len, off, &line, &col);
    bc_diag_add(c->d, BC_ERROR, c->label, line, col, "%s", what);
    return NULL;
}

static size_t skip_space(const char *buf, size_t len, size_t off)
{
    while (off < len && (buf[off] == ' ' || buf[off] == '\t' || buf[off] == '\r' || buf[off] == '\n'))
        off++;
    return off;
}

/* The whole of buf[0..len) as one JSON document; NULL after reporting.  NUL
 * characters in strings and deep nesting are refused before cJSON sees the
 * text, as in the other JSON readers. */
static cJSON *parse_document(cert_ctx *c, const char *buf, size_t len)
{
    if (skip_space(buf, len, 0) == len) { /* the whole file: no position */
        bc_diag_add(c->d, BC_ERROR, c->label, 0, 0, "the file is empty: expected a certificate (JSON)");
        return NULL;
    }
    size_t off = bc__json_nul_in_string(buf, len);
    if (off < len)
        return syntax_fail(c, buf, len, off, "a JSON string holds a NUL character");
    if ((off = bc__json_depth_excess(buf, len)) < len) {
        char msg[96];
        snprintf(msg, sizeof msg, "JSON nested more than %d levels deep (a certificate needs 2)",
                 BC__JSON_MAX_DEPTH);
        return syntax_fail(c, buf, len, off, msg);
    }
    const char *why;
    cJSON *root = bc__json_parse_whole(buf, len, &off, &why);
    if (!root)
        return syntax_fail(c, buf, len, off, why);
    return root;
}

static int alloc_arrays(bc_certificate *cert, int32_t n)
{
    size_t k = (size_t)(n ? n : 1);
    cert->n_states = n;
    cert->policy = malloc(k * sizeof *cert->policy);
    if (!cert->policy)
        return -1;
    if (cert->kind == BC_PROOF_INTERVAL)
        return (cert->values = calloc(k, sizeof *cert->values)) ? 0 : -1;
    if (!(cert->exact_values = malloc(k * sizeof *cert->exact_values)))
        return -1;
    for (int32_t s = 0; s < n; s++)
        mpq_init(cert->exact_values[s]);
    return 0;
}

int bc_read_certificate_mem(const char *buf, size_t len, const char *label, const bc_model *m,
                            bc_certificate *cert, bc_diag *d)
{
    memset(cert, 0, sizeof *cert);
    cert_ctx c = {m, d, label ? label : "<input>"};
    cJSON *root = parse_document(&c, buf, len);
    int rc = -1;
    if (root && (rc = read_head(&c, root, cert)) == 0) {
        if (alloc_arrays(cert, m->n_states) < 0)
            rc = fail(&c, NULL, "out of memory%s", NULL);
        else if (read_policy(&c, cJSON_GetObjectItemCaseSensitive(root, "policy"), cert) < 0 ||
                 read_values(&c, cJSON_GetObjectItemCaseSensitive(root, "values"), cert) < 0)
            rc = -1;
    }
    cJSON_Delete(root);
    if (rc != 0)
        bc_certificate_free(cert);
    return rc;
}

int bc_read_certificate(const char *path, const bc_model *m, bc_certificate *cert, bc_diag *d)
{
    char *buf;
    size_t len;
    memset(cert, 0, sizeof *cert);
    if (bc_read_file(path, &buf, &len, d) < 0)
        return -1;
    int rc = bc_read_certificate_mem(buf, len, strcmp(path, "-") ? path : "<stdin>", m, cert, d);
    free(buf);
    return rc;
}
