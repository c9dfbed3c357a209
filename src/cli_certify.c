/* cli_certify.c — `bellcheck certify MODEL [-o CERT]` and `bellcheck verify MODEL CERT`. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#define _GNU_SOURCE
#include "cli.h"

#include <getopt.h>
#include <math.h>
#include <string.h>

static const char certify_help[] =
    "usage: bellcheck certify MODEL [-o CERT] [options]\n"
    "Solves MODEL, proves the answer and writes a self-contained certificate (JSON): the\n"
    "model's SHA-256, the optimal policy and its values, exact rationals when the exact\n"
    "proof can be had, otherwise doubles with a proven bound.  `bellcheck verify MODEL\n"
    "CERT` re-checks it later without solving.\n\n"
    "options:\n"
    "  -o, --output CERT  where to write the certificate (default: standard output)\n"
    "  --proof P          auto (default: exact when the model is small enough, else\n"
    "                     interval), exact or interval\n"
    "  --max-seconds S    limit on the solve and on the exact proof\n\n"
    "Models with a horizon are refused (exit 2); at discount 1 certificates are exact,\n"
    "and a model beyond the exact proof's reach cannot be certified (exit 3).  A certificate covers the model as written, not the physical\n"
    "system it describes.\n\n" BC_CLI_COMMON_HELP;

static const char verify_help[] =
    "usage: bellcheck verify MODEL CERT [options]\n"
    "Re-checks a certificate written by `bellcheck certify` against MODEL in one exact\n"
    "(or outward-rounded) pass of the Bellman optimality conditions, without solving.\n"
    "Exit 0 when it holds, 1 when it does not (the first failing state is named), 2 when\n"
    "the certificate is malformed or belongs to another model.\n\n" BC_CLI_COMMON_HELP;

enum { OPT_OUTPUT = OPT_FIRST_COMMAND_OPTION, OPT_PROOF, OPT_MAX_SECONDS };

/* Writes the certificate and the JSON report, both or neither; 0 or -1. */
static int write_certify_outputs(const char *cert_path, const char *json_path, const bc_model *m,
                                 const bc_certificate *cert, const bc_proof_result *pr)
{
    bc_diag d;
    bc_diag_init(&d);
    bc_out co = {0}, jo = {0};
    const char *shown = strcmp(cert_path, "-") ? cert_path : "<stdout>";
    int ok = bc_out_open(&co, cert_path, &d) == 0;
    int have_json = ok && json_path && bc_out_open(&jo, json_path, &d) == 0;
    ok = ok && (!json_path || have_json);
    ok = ok && bc_write_certificate(co.f, m, cert) == 0;
    ok = ok && (!json_path || bc_report_certify_json(jo.f, m, cert, pr, shown) == 0);
    int stop = ok && bc_stop_requested(); /* Ctrl-C came while writing: the caller says so */
    ok = ok && !stop;
    if (ok)
        ok = bc_out_commit(&co, &d) == 0 && (!json_path || bc_out_commit(&jo, &d) == 0);
    else {
        if (co.f)
            bc_out_abort(&co);
        if (have_json)
            bc_out_abort(&jo);
        if (d.n == 0 && !stop)
            bc_diag_add(&d, BC_ERROR, cert_path, 0, 0, "write error");
    }
    bc_diag_print(&d, stderr);
    bc_diag_free(&d);
    return ok ? 0 : -1;
}

static int certify_model(const bc_model *m, const bc_cli_common *c, const char *out_path,
                         const bc_prove_opts *po, const bc_solve_opts *so)
{
    bc_solution sol;
    bc_solution_init(&sol);
    bc_proof_result pr;
    memset(&pr, 0, sizeof pr);
    bc_certificate cert;
    memset(&cert, 0, sizeof cert);
    int rc = BC_EXIT_SOLVER;
    bc_solve_status st = bc_solve(m, BC_METHOD_AUTO, so, &sol);
    if (st == BC_SOLVE_OK && bc_prove_solution(m, &sol, po, &pr) < 0)
        pr.value.kind = BC_PROOF_NONE; /* pr.message says why */
    if (st == BC_SOLVE_INTERRUPTED || bc_stop_requested())
        rc = bc_cli_interrupted_solve("certify", &sol);
    else if (st != BC_SOLVE_OK)
        fprintf(stderr, "bellcheck certify: the solve failed: %s\n", sol.message);
    else if (pr.value.kind == BC_PROOF_NONE)
        fprintf(stderr, "bellcheck certify: no proof could be had: %s\n", pr.message);
    else if (bc_certificate_from_proof(m, &sol, &pr, &cert) < 0)
        fprintf(stderr, "bellcheck certify: out of memory\n");
    else if (write_certify_outputs(out_path, c->json_path, m, &cert, &pr) == 0) {
        rc = BC_EXIT_OK;
        if (bc_cli_text_wanted(c) && strcmp(out_path, "-"))
            bc_report_certify_text(stdout, m, &cert, &pr, out_path);
    } else if (bc_stop_requested()) {
        rc = bc_cli_interrupted_solve("certify", &sol);
    }
    bc_certificate_free(&cert);
    bc_proof_result_free(&pr);
    bc_solution_free(&sol);
    return rc;
}

int bc_cli_certify(int argc, char **argv)
{
    static const struct option longopts[] = {
        BC_CLI_COMMON_LONGOPTS,
        {"output", required_argument, NULL, OPT_OUTPUT},
        {"proof", required_argument, NULL, OPT_PROOF},
        {"max-seconds", required_argument, NULL, OPT_MAX_SECONDS},
        {NULL, 0, NULL, 0}};
    bc_cli_common c = {0};
    bc_prove_opts po;
    bc_prove_opts_default(&po);
    bc_solve_opts so;
    bc_solve_opts_default(&so);
    const char *out_path = "-";
    int id;
    opterr = 0;
    while ((id = getopt_long(argc, argv, "o:", longopts, NULL)) != -1) {
        int r = bc_cli_common_option(&c, id, optarg);
        if (r < 0)
            return BC_EXIT_USAGE;
        if (r > 0)
            continue;
        switch (id) {
        case OPT_HELP: fputs(certify_help, stdout); return BC_EXIT_OK;
        case 'o':
        case OPT_OUTPUT: out_path = optarg; break;
        case OPT_PROOF:
            if (bc_cli_prove_mode("certify", optarg, &po.mode) < 0)
                return BC_EXIT_USAGE;
            if (po.mode == BC_PROVE_OFF)
                return bc_cli_usage_error("certify", "--proof off cannot make a certificate");
            break;
        case OPT_MAX_SECONDS:
            if (bc_cli_double("certify", "--max-seconds", optarg, 1e-3, 1e9, &so.max_seconds) < 0)
                return BC_EXIT_USAGE;
            po.exact.max_seconds = so.max_seconds;
            break;
        default:
            return bc_cli_usage_error("certify", "unknown or incomplete option '%s' (see --help)",
                                      argv[optind - 1]);
        }
    }
    if (optind != argc - 1)
        return bc_cli_usage_error("certify", "expected one MODEL argument (see --help)");
    if (!strcmp(out_path, "-") && c.json_path && !strcmp(c.json_path, "-"))
        return bc_cli_usage_error("certify", "only one output may go to standard output (-)");
    bc_cli_catch_interrupt();
    bc_model *m = bc_cli_load_model(argv[optind], &c);
    if (!m)
        return bc_stop_requested() ? bc_cli_interrupted("certify", "the construction of the model", -1)
                                   : BC_EXIT_USAGE;
    int rc = bc_cli_model_usable(m, argv[optind]);
    if (rc > 0 && m->horizon == 0 && m->discount >= 1.0 && po.mode == BC_PROVE_INTERVAL) {
        bc_cli_usage_error("certify", "at discount 1 certificates are exact: drop --proof interval");
        rc = 0;
    }
    if (rc > 0 && m->horizon == 0 && m->discount >= 1.0)
        po.mode = BC_PROVE_EXACT; /* verify checks discount-1 certificates exactly only */
    if (rc > 0 && m->horizon > 0) {
        fprintf(stderr, "bellcheck certify: models with a horizon are not certified: checking "
                        "one costs as much as solving it (use solve --method exact)\n");
        rc = 0;
    }
    rc = rc > 0 ? certify_model(m, &c, out_path, &po, &so) : rc < 0 ? BC_EXIT_SOLVER : BC_EXIT_USAGE;
    bc_model_free(m);
    return rc;
}

static int write_verify_json(const bc_cli_common *c, const bc_model *m, const bc_certificate *cert,
                             const bc_verdict *v)
{
    bc_diag d;
    bc_diag_init(&d);
    bc_out o = {0};
    int ok = bc_out_open(&o, c->json_path, &d) == 0 &&
             bc_report_verify_json(o.f, m, cert, v) == 0 && bc_out_commit(&o, &d) == 0;
    if (!ok && o.f)
        bc_out_abort(&o);
    bc_diag_print(&d, stderr);
    bc_diag_free(&d);
    return ok ? 0 : -1;
}

int bc_cli_verify(int argc, char **argv)
{
    static const struct option longopts[] = {BC_CLI_COMMON_LONGOPTS, {NULL, 0, NULL, 0}};
    bc_cli_common c = {0};
    int id;
    opterr = 0;
    while ((id = getopt_long(argc, argv, "", longopts, NULL)) != -1) {
        int r = bc_cli_common_option(&c, id, optarg);
        if (r < 0)
            return BC_EXIT_USAGE;
        if (r > 0)
            continue;
        if (id == OPT_HELP) {
            fputs(verify_help, stdout);
            return BC_EXIT_OK;
        }
        return bc_cli_usage_error("verify", "unknown or incomplete option '%s' (see --help)",
                                  argv[optind - 1]);
    }
    if (optind != argc - 2)
        return bc_cli_usage_error("verify", "expected MODEL and CERT (see --help)");
    if (!strcmp(argv[optind], "-") && !strcmp(argv[optind + 1], "-"))
        return bc_cli_usage_error("verify", "MODEL and CERT cannot both be standard input");
    bc_cli_catch_interrupt(); /* a large model takes a while to read and to check */
    bc_model *m = bc_cli_load_model(argv[optind], &c);
    if (!m || bc_stop_requested()) { /* Ctrl-C: no report, no file */
        bc_model_free(m);
        return bc_stop_requested() ? bc_cli_interrupted("verify", "the construction of the model", NAN)
                                   : BC_EXIT_USAGE;
    }
    bc_diag d;
    bc_diag_init(&d);
    bc_certificate cert;
    int rc = bc_read_certificate(argv[optind + 1], m, &cert, &d);
    bc_diag_print(&d, stderr);
    bc_diag_free(&d);
    if (rc < 0 || bc_stop_requested()) {
        if (rc == 0)
            bc_certificate_free(&cert);
        bc_model_free(m);
        return bc_stop_requested() ? bc_cli_interrupted("verify", "the reading of the certificate", NAN)
                                   : BC_EXIT_USAGE;
    }
    bc_verdict v;
    int vr = bc_verify_certificate(m, &cert, &v);
    if (bc_stop_requested()) { /* Ctrl-C: whatever the check found is not reported */
        char what[320] = "the check of the certificate";
        if (vr == -2) /* stopped part-way: the verdict's message says where */
            snprintf(what, sizeof what, "the check of the certificate (%s)", v.message);
        rc = bc_cli_interrupted("verify", what, NAN);
    } else if (vr < 0) {
        fprintf(stderr, "bellcheck verify: out of memory\n");
        rc = BC_EXIT_SOLVER;
    } else {
        rc = v.holds ? BC_EXIT_OK : BC_EXIT_GATE;
        if (!v.holds)
            fprintf(stderr, "bellcheck verify: the certificate does not hold: %s\n", v.message);
        if (bc_cli_text_wanted(&c))
            bc_report_verify_text(stdout, m, &cert, &v);
        if (c.json_path && write_verify_json(&c, m, &cert, &v) < 0)
            rc = BC_EXIT_SOLVER;
    }
    bc_certificate_free(&cert);
    bc_model_free(m);
    return rc;
}
