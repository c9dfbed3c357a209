/* test_limits.c — hostile-input guarantees of the library: readers on buffers without a final NUL, NUL characters in JSON, printable messages, --max-memory's check. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Buffers are malloc'ed to their exact length, so that under
 * `make test-sanitize` any read past the end is reported.  The model is the
 * invented greenhouse of test_agent_read.c; every expected value is written
 * out by hand here.  The limits checked are those of docs/limits.md.
 */
#include "bellcheck.h"
#include "unit.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "greenhouse.h" /* greenhouse_text; pairs 0 cold/shut, 3 mild/shut, 6 hot/heat */

/* A copy of text without its terminating NUL, in a block of exactly its length. */
static char *exact_copy(const char *text, size_t *len)
{
    *len = strlen(text);
    char *p = malloc(*len ? *len : 1);
    if (p)
        memcpy(p, text, *len);
    return p;
}

/* 1 when some message of d contains fragment. */
static int said(const bc_diag *d, const char *fragment)
{
    for (int i = 0; i < d->n; i++)
        if (d->items[i].message && strstr(d->items[i].message, fragment))
            return 1;
    return 0;
}

static void test_mem_readers(const bc_model *m)
{
    size_t len;
    bc_diag d;
    /* The last cell, -9, ends the buffer: strtod must not read past it. */
    char *csv = exact_copy("state,open,shut,heat\ncold,,1.5,-0.25\nmild,2,3.125,\nhot,0.5,-4.75,-9", &len);
    bc_diag_init(&d);
    bc_qtable *q = bc_read_qtable_mem(csv, len, "mem.csv", m, BC_MISSING_ERROR, &d);
    CHECK(q != NULL, "mem: a CSV Q-table without a final newline reads");
    CHECK(q && q->q[6] == -9 && q->q[0] == 1.5 && q->q[3] == 3.125,
          "mem: its values are the hand-written ones (hot/heat -9, cold/shut 1.5, mild/shut 3.125)");
    bc_qtable_free(q);
    bc_diag_free(&d);
    free(csv);

    char *pol = exact_copy("state,action,prob\ncold,shut,0.25\ncold,heat,0.75\nmild,open,1\nhot,heat,1", &len);
    bc_diag_init(&d);
    bc_policy *p = bc_read_policy_mem(pol, len, "mem.csv", m, BC_MISSING_ERROR, &d);
    CHECK(p != NULL && p->prob[0] == 0.25 && p->prob[1] == 0.75 && p->prob[6] == 1,
          "mem: a stochastic CSV policy ending in a number reads exactly");
    bc_policy_free(p);
    bc_diag_free(&d);
    free(pol);

    /* A NUL byte in a CSV file: refused at its line and column (line 2, column 6). */
    static const char nul_csv[] = "state,action\ncold,\0heat\nmild,open\nhot,shut\n";
    bc_diag_init(&d);
    p = bc_read_policy_mem(nul_csv, sizeof nul_csv - 1, "nul.csv", m, BC_MISSING_ERROR, &d);
    CHECK(p == NULL && d.n_errors == 1 && said(&d, "NUL") && d.items[0].line == 2 &&
              d.items[0].col == 6,
          "mem: a NUL byte in CSV is refused at 2:6");
    bc_diag_free(&d);

    /* An NPY header promising (4, 3) float64 (96 bytes) over 95 bytes of data. */
    static const char hdr[] = "{'descr': '<f8', 'fortran_order': False, 'shape': (4, 3), }";
    size_t hlen = sizeof hdr - 1, n = 10 + hlen + 95;
    unsigned char *npy = calloc(1, n);
    memcpy(npy, "\x93NUMPY\x01\x00", 8);
    npy[8] = (unsigned char)hlen;
    npy[9] = 0;
    memcpy(npy + 10, hdr, hlen);
    bc_diag_init(&d);
    q = bc_read_qtable_mem((const char *)npy, n, "lie.npy", m, BC_MISSING_ERROR, &d);
    CHECK(q == NULL && said(&d, "needs 96 bytes of data, the file holds 95"),
          "mem: an NPY header promising more data than there is is refused");
    bc_diag_free(&d);
    free(npy);

    bc_diag_init(&d);
    q = bc_read_qtable_mem(NULL, 0, NULL, m, BC_MISSING_ERROR, &d);
    CHECK(q == NULL && said(&d, "empty") && d.items[0].file && !strcmp(d.items[0].file, "<input>"),
          "mem: zero bytes without a label: empty, labelled <input>");
    bc_diag_free(&d);
}

static void test_json_nul(const bc_model *m)
{
    bc_diag d;
    size_t len;
    /* "a\u0000b" would be the name "a" to a C string. */
    char *doc = exact_copy("{\"format\": \"bell-json\", \"version\": 1, \"discount\": \"1/2\",\n"
                           " \"transitions\": [{\"state\": \"a\\u0000b\", \"action\": \"go\", "
                           "\"reward\": \"1\", \"next\": [[\"a\"]]}]}", &len);
    bc_diag_init(&d);
    bc_model *bad = bc_read_bell_json(doc, len, "nul.json", &d);
    CHECK(bad == NULL && said(&d, "NUL") && d.items[0].line == 2 && d.items[0].col == 30,
          "json: \\u0000 in a state name is refused at 2:30");
    bc_model_free(bad);
    bc_diag_free(&d);
    free(doc);
    /* An escaped backslash followed by u0000 is the text \u0000, no NUL: refused only as a bad name. */
    doc = exact_copy("{\"format\": \"bell-json\", \"version\": 1, \"discount\": \"1/2\",\n"
                     " \"transitions\": [{\"state\": \"a\\\\u0000\", \"action\": \"go\", "
                     "\"reward\": \"1\", \"next\": [[\"a\"]]}]}", &len);
    bc_diag_init(&d);
    bad = bc_read_bell_json(doc, len, "esc.json", &d);
    CHECK(bad == NULL && !said(&d, "NUL") && said(&d, "expected the state's name"),
          "json: an escaped backslash before u0000 is not a NUL");
    bc_model_free(bad);
    bc_diag_free(&d);
    free(doc);

    static const char q[] = "{\"q\": {\"cold\\u0000\": {\"shut\": 1}}}";
    bc_diag_init(&d);
    bc_qtable *t = bc_read_qtable_mem(q, sizeof q - 1, "q.json", m, BC_MISSING_SKIP, &d);
    CHECK(t == NULL && said(&d, "NUL"), "json: \\u0000 in a Q-table's state name is refused");
    bc_diag_free(&d);
}

static void test_messages(void)
{
    bc_diag d;
    bc_diag_init(&d);
    bc_diag_add(&d, BC_ERROR, "f", 1, 1, "found `%s`", "a\x01" "b\xff" "c\n" "caf\xc3\xa9");
    CHECK(d.items[0].message && !strcmp(d.items[0].message, "found `a?b?c?caf\xc3\xa9`"),
          "messages: control bytes and bytes that are not UTF-8 become '?', UTF-8 stays");
    bc_diag_free(&d);
}

static void test_memory_limit(void)
{
    bc_diag d;
    bc_diag_init(&d);
    CHECK(d.max_memory == 0 && bc_diag_memory_refused(&d, "f", UINT64_MAX, "x") == 0,
          "max_memory: 0 by default, and then nothing is refused");
    d.max_memory = 1000;
    CHECK(bc_diag_memory_refused(&d, "f", 1000, "x") == 0 && d.n_errors == 0,
          "max_memory: exactly the limit is allowed");
    CHECK(bc_diag_memory_refused(&d, "f", 1001, "holding the file") == 1 && d.n_errors == 1,
          "max_memory: one byte more is refused");
    CHECK(said(&d, "holding the file needs 1001 bytes, more than the memory limit of 1000 bytes"),
          "max_memory: the message names the need and the limit");
    d.max_memory = 3 << 20;
    bc_diag_memory_refused(&d, "f", 5u << 29, "y");
    CHECK(said(&d, "y needs 2.5 GiB, more than the memory limit of 3.0 MiB"),
          "max_memory: sizes in KiB/MiB/GiB (5 * 2^29 bytes = 2.5 GiB)");
    bc_diag_free(&d);
    CHECK(d.max_memory == 3 << 20, "max_memory: kept by bc_diag_free like max_errors");
}

int main(void)
{
    bc_model *m = unit_read_model(greenhouse_text);
    CHECK(m != NULL, "the greenhouse model reads");
    if (!m)
        UNIT_DONE();
    test_mem_readers(m);
    test_json_nul(m);
    test_messages();
    test_memory_limit();
    bc_model_free(m);
    UNIT_DONE();
}
