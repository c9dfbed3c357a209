/* test_formats_json.c — the JSON form and the text writer: round trips, exact JSON numbers, error messages and paths. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Round trips go text -> model -> JSON -> model -> text -> model and compare
 * every field exactly.  Expected values are written out by hand from the
 * model texts below (invented scenarios), never computed by the code under test.
 */
#include "bellcheck.h"
#include "unit.h"

#include <stdlib.h>
#include <string.h>

/* ---- helpers ------------------------------------------------------------ */


static bc_model *read_json(const char *text, bc_diag *d)
{
    return bc_read_bell_json(text, strlen(text), "t.json", d);
}

/* Reads JSON that must be valid (diagnostics printed otherwise). */
static bc_model *read_json_ok(const char *text)
{
    bc_diag d;
    bc_diag_init(&d);
    bc_model *m = read_json(text, &d);
    if (!m)
        bc_diag_print(&d, stdout);
    bc_diag_free(&d);
    return m;
}

/* Runs a writer into a malloc'ed NUL-terminated string (NULL on failure). */
static char *write_to_string(const bc_model *m, int (*writer)(const bc_model *, FILE *))
{
    char *buf = NULL;
    size_t len = 0;
    FILE *f = open_memstream(&buf, &len);
    if (!f)
        return NULL;
    int rc = writer(m, f);
    fclose(f);
    if (rc != 0) {
        free(buf);
        return NULL;
    }
    return buf;
}

/* x (a number of table big) == y exactly. */
static int num_equals_mpq(bc_num x, const bc_bigtab *big, const mpq_t y)
{
    mpq_t a;
    mpq_init(a);
    bc_num_to_mpq(a, x, big);
    int eq = mpq_equal(a, y);
    mpq_clear(a);
    return eq;
}

/* x (in table bx) == y (in table by); bc_num_cmp cannot compare across two models' tables. */
static int num_eq(bc_num x, const bc_bigtab *bx, bc_num y, const bc_bigtab *by)
{
    mpq_t b;
    mpq_init(b);
    bc_num_to_mpq(b, y, by);
    int eq = num_equals_mpq(x, bx, b);
    mpq_clear(b);
    return eq;
}

/* x == p/q exactly. */
static int num_is(bc_num x, const bc_bigtab *big, long p, unsigned long q)
{
    mpq_t b;
    mpq_init(b);
    mpq_set_si(b, p, q);
    mpq_canonicalize(b);
    int eq = num_equals_mpq(x, big, b);
    mpq_clear(b);
    return eq;
}

static int names_equal(const bc_names *a, const bc_names *b)
{
    if (bc_names_count(a) != bc_names_count(b))
        return 0;
    for (int32_t i = 0; i < bc_names_count(a); i++)
        if (strcmp(bc_names_get(a, i), bc_names_get(b, i)) != 0)
            return 0;
    return 1;
}

#define SAME_ARRAY(x, y, n) (memcmp((x), (y), (size_t)(n) * sizeof *(x)) == 0)

/* The first field in which a and b differ, or NULL when they are the same model. */
static const char *model_diff(const bc_model *a, const bc_model *b)
{
    if (!a || !b)
        return "a model is missing";
    if (strcmp(a->name, b->name) != 0)
        return "name";
    if (a->n_states != b->n_states || a->n_actions != b->n_actions || a->n_pairs != b->n_pairs ||
        a->n_trans != b->n_trans)
        return "sizes";
    if (!num_eq(a->discount_exact, a->big, b->discount_exact, b->big) || a->discount != b->discount)
        return "discount";
    if (a->objective != b->objective || a->horizon != b->horizon)
        return "objective or horizon";
    if (!names_equal(a->state_names, b->state_names))
        return "state names or their order";
    if (!names_equal(a->action_names, b->action_names))
        return "action names or their order";
    if (!SAME_ARRAY(a->state_pair_start, b->state_pair_start, a->n_states + 1) ||
        !SAME_ARRAY(a->pair_state, b->pair_state, a->n_pairs) ||
        !SAME_ARRAY(a->pair_action, b->pair_action, a->n_pairs) ||
        !SAME_ARRAY(a->pair_trans_start, b->pair_trans_start, a->n_pairs + 1) ||
        !SAME_ARRAY(a->succ_state, b->succ_state, a->n_trans))
        return "CSR structure";
    for (int64_t t = 0; t < a->n_trans; t++) {
        if (!num_eq(bc_model_prob_exact(a, t), a->big, bc_model_prob_exact(b, t), b->big) || a->prob[t] != b->prob[t])
            return "a probability";
        bc_num zero = bc_num_int(0);
        bc_num oa = a->outcome_id ? bc_model_outcome_exact(a, t) : zero;
        bc_num ob = b->outcome_id ? bc_model_outcome_exact(b, t) : zero;
        if (!num_eq(oa, a->big, ob, b->big))
            return "an outcome reward";
    }
    for (int64_t p = 0; p < a->n_pairs; p++)
        if (!num_eq(bc_model_reward_exact(a, p), a->big, bc_model_reward_exact(b, p), b->big) ||
            a->reward[p] != b->reward[p])
            return "a reward";
    if (!SAME_ARRAY(a->terminal, b->terminal, a->n_states))
        return "terminal states";
    if (a->initial_given != b->initial_given)
        return "initial_given";
    for (int32_t s = 0; s < a->n_states; s++)
        if (!num_eq(a->initial_exact[s], a->big, b->initial_exact[s], b->big) ||
            a->initial[s] != b->initial[s])
            return "initial distribution";
    return bc_model_check_invariants(b);
}

/* text -> model A -> JSON -> model B -> text -> model C; A, B and C must agree. */
static void round_trip(const char *label, const char *text)
{
    char name[160];
    bc_model *a = unit_read_model(text);
    snprintf(name, sizeof name, "%s: the text reads", label);
    CHECK(a != NULL, name);
    if (!a)
        return;
    char *json = write_to_string(a, bc_write_bell_json);
    bc_model *b = json ? read_json_ok(json) : NULL;
    char *text2 = b ? write_to_string(b, bc_write_bell_text) : NULL;
    bc_model *c = text2 ? unit_read_model(text2) : NULL;
    const char *d1 = model_diff(a, b), *d2 = model_diff(a, c);
    snprintf(name, sizeof name, "%s: text -> JSON -> model is the same model (%s)", label,
             d1 ? d1 : "all fields");
    CHECK(d1 == NULL, name);
    snprintf(name, sizeof name, "%s: ... -> text -> model is the same model (%s)", label,
             d2 ? d2 : "all fields");
    CHECK(d2 == NULL, name);
    if (d1 || d2)
        printf("---- JSON ----\n%s---- text ----\n%s", json ? json : "(none)",
               text2 ? text2 : "(none)");
    free(json);
    free(text2);
    bc_model_free(a);
    bc_model_free(b);
    bc_model_free(c);
}

/* Reading `json` must fail with an error whose message holds `fragment` and
 * whose location is t.json:`path` (path NULL: a line and column are expected). */
static void expect_error(const char *label, const char *json, const char *fragment,
                         const char *path, int line, int col)
{
    bc_diag d;
    bc_diag_init(&d);
    bc_model *m = read_json(json, &d);
    char name[200];
    snprintf(name, sizeof name, "%s: reading fails", label);
    CHECK(m == NULL && d.n_errors > 0, name);
    char where[160];
    snprintf(where, sizeof where, "t.json:%s", path ? path : "");
    int found = 0;
    for (int i = 0; i < d.n && !found; i++) {
        const bc_diag_item *it = &d.items[i];
        if (it->severity != BC_ERROR || !it->message || !strstr(it->message, fragment))
            continue;
        if (path)
            found = it->file && strcmp(it->file, where) == 0 && it->line == 0;
        else
            found = it->file && strcmp(it->file, "t.json") == 0 && it->line == line &&
                    it->col == col;
    }
    if (path)
        snprintf(name, sizeof name, "%s: says \"%s\" at %s", label, fragment, where);
    else
        snprintf(name, sizeof name, "%s: says \"%s\" at t.json:%d:%d", label, fragment, line, col);
    CHECK(found, name);
    if (!found)
        bc_diag_print(&d, stdout);
    bc_diag_free(&d);
    bc_model_free(m);
}

/* Does s contain needle?  Prints s on failure for the reader of the log. */
static int has(const char *s, const char *needle)
{
    return s && strstr(s, needle) != NULL;
}

/* ---- models (invented scenarios) ---------------------------------------- */

/* The example of the model format: a battery-powered shuttle between dock and depot. */
static const char *const dock_text =
    "bell 1\n"
    "name dock-shuttle\n"
    "discount 0.95\n"
    "initial dock\n"
    "terminal scrapped\n"
    "dock     load    -1   -> loaded 9/10  dock 1/10\n"
    "dock     wait     0   -> dock\n"
    "loaded   drive   -2   -> depot 0.8 10  loaded 0.15  scrapped 0.05\n"
    "loaded   unload   0   -> dock\n"
    "depot    return  -1   -> dock\n";

/* A kiln: costs to minimise over 4 firings; declared orders differ from the
 * order of the lines; big rationals; a free-text label with quotes and a backslash. */
static const char *const kiln_text =
    "bell 1\n"
    "name kiln \"B\" \\ night shift\n"
    "discount 1\n"
    "objective min\n"
    "horizon 4\n"
    "states idle hot cracked done\n"
    "actions fire cool wait\n"
    "initial idle 2/3 hot 1/3\n"
    "terminal done\n"
    "hot cool 1/3 -> idle 1/3 hot 2/3 0.125\n"
    "idle wait 0 -> idle\n"
    "idle fire 123456789012345678901234567890.5 -> hot 0.999 cracked 0.001 -7/3\n"
    "hot fire 2 -> done 1/2 cracked 1/2\n"
    "cracked cool 1e-3 -> idle 1/12345678901234567890123 "
    "cracked 12345678901234567890122/12345678901234567890123\n";

/* Three rooms visited at random; probabilities printed as floats (renormalised
 * on reading), no `initial`, no outcome rewards, an action that no line uses. */
static const char *const rooms_text =
    "discount 0.9\n"
    "states c b a\n"
    "actions stay go\n"
    "a go 1 -> a 0.333333333333 b 0.333333333333 c 0.333333333333\n"
    "b go -1 -> c\n"
    "c go 0 -> a\n";

/* ---- checks --------------------------------------------------------------- */

static void test_round_trips(void)
{
    round_trip("dock-shuttle", dock_text);
    round_trip("kiln", kiln_text);
    round_trip("rooms", rooms_text);
}

/* The text writer: expected lines follow from the model text and the number rules. */
static void test_text_writer(void)
{
    bc_model *dock = unit_read_model(dock_text), *kiln = unit_read_model(kiln_text);
    bc_model *rooms = unit_read_model(rooms_text);
    char *t = dock ? write_to_string(dock, bc_write_bell_text) : NULL;
    CHECK(has(t, "\nloaded drive -2 -> depot 0.8 10 loaded 0.15 scrapped 0.05\n"),
          "text: outcome reward written after its probability");
    CHECK(has(t, "\ndock load -1 -> loaded 0.9 dock 0.1\n"), "text: 9/10 written as 0.9");
    CHECK(has(t, "\ndock wait 0 -> dock 1\n"), "text: a lone successor gets probability 1");
    CHECK(has(t, "\ninitial dock 1\n") && has(t, "\nterminal scrapped\n"),
          "text: initial and terminal lines");
    CHECK(has(t, "\nname dock-shuttle\n") && has(t, "\ndiscount 0.95\n"), "text: name, discount");
    free(t);
    t = kiln ? write_to_string(kiln, bc_write_bell_text) : NULL;
    CHECK(has(t, "\nstates idle hot cracked done\n") && has(t, "\nactions fire cool wait\n"),
          "text: declared orders written");
    CHECK(has(t, "\nobjective min\n") && has(t, "\nhorizon 4\n") && has(t, "\ndiscount 1\n"),
          "text: objective, horizon, discount");
    CHECK(has(t, "\ninitial idle 2/3 hot 1/3\n"), "text: a stated initial distribution");
    CHECK(has(t, "\nhot cool 1/3 -> idle 1/3 hot 2/3 0.125\n"), "text: fractions stay exact");
    CHECK(has(t, "\nidle fire 123456789012345678901234567890.5 -> hot 0.999 cracked 0.001 -7/3\n"),
          "text: a big reward written in full");
    CHECK(has(t, "\nname kiln \"B\" \\ night shift\n"), "text: free-text label kept");
    free(t);
    t = rooms ? write_to_string(rooms, bc_write_bell_text) : NULL;
    CHECK(t && !has(t, "\ninitial"), "text: no initial line when the source had none");
    CHECK(has(t, "\na go 1 -> a 1/3 b 1/3 c 1/3\n"), "text: renormalised probabilities exact");
    CHECK(has(t, "\nactions stay go\n"), "text: an unused action keeps its place");
    free(t);
    if (dock) {
        /* A label that text cannot carry: line breaks and `#` become spaces. */
        free(dock->name);
        dock->name = strdup("a\nb#c");
        t = write_to_string(dock, bc_write_bell_text);
        CHECK(has(t, "\nname a b c\n"), "text: line break and # in the label become spaces");
        free(t);
    }
    FILE *full = fopen("/dev/full", "w");
    if (full && kiln) {
        CHECK(bc_write_bell_text(kiln, full) == -1, "text: a write error returns -1");
        clearerr(full);
        CHECK(bc_write_bell_json(kiln, full) == -1, "json: a write error returns -1");
    }
    if (full)
        fclose(full);
    bc_model_free(dock);
    bc_model_free(kiln);
    bc_model_free(rooms);
}

/* Position of key "k" in the document, or a large number when absent. */
static size_t key_at(const char *s, const char *k)
{
    char q[64];
    snprintf(q, sizeof q, "\"%s\":", k);
    const char *p = s ? strstr(s, q) : NULL;
    return p ? (size_t)(p - s) : (size_t)-1;
}

static void test_json_writer(void)
{
    bc_model *kiln = unit_read_model(kiln_text);
    char *j = kiln ? write_to_string(kiln, bc_write_bell_json) : NULL;
    static const char *const order[] = {"format", "version", "name", "discount", "objective",
                                        "horizon", "states", "actions", "initial", "terminal",
                                        "transitions"};
    int in_order = j != NULL;
    for (size_t i = 0; i + 1 < sizeof order / sizeof *order; i++)
        in_order = in_order && key_at(j, order[i]) < key_at(j, order[i + 1]) &&
                   key_at(j, order[i + 1]) != (size_t)-1;
    CHECK(in_order, "json: keys in the documented order");
    CHECK(has(j, "\"name\": \"kiln \\\"B\\\" \\\\ night shift\""), "json: quotes and backslash escaped");
    CHECK(has(j, "\"discount\": \"1\"") && has(j, "\"horizon\": 4") &&
              has(j, "\"objective\": \"min\""),
          "json: discount as a string, horizon as a number");
    CHECK(has(j, "\"initial\": {\"idle\": \"2/3\", \"hot\": \"1/3\"}"), "json: initial object");
    CHECK(has(j, "\"terminal\": [\"done\"]"), "json: terminal list");
    CHECK(has(j, "{\"state\": \"hot\", \"action\": \"cool\", \"reward\": \"1/3\", "
                 "\"next\": [[\"idle\", \"1/3\"], [\"hot\", \"2/3\", \"0.125\"]]}"),
          "json: one transition, outcome only where non-zero");
    CHECK(has(j, "\"reward\": \"123456789012345678901234567890.5\""), "json: big reward exact");
    free(j);
    if (kiln) {
        free(kiln->name);
        kiln->name = strdup("x\xffy\t\x01\xc3\xa9");
        j = write_to_string(kiln, bc_write_bell_json);
        CHECK(has(j, "\"name\": \"x\xEF\xBF\xBDy\\t\\u0001\xc3\xa9\""),
              "json: invalid UTF-8 replaced, control bytes escaped, valid UTF-8 kept");
        free(j);
    }
    bc_model_free(kiln);
}

/* JSON numbers are read as the shortest decimal that gives back the same double. */
static void test_json_numbers(void)
{
    const char *doc =
        "{\"format\": \"bell-json\", \"version\": 1, \"discount\": 0.95,\n"
        " \"transitions\": [\n"
        "  {\"state\": \"s\", \"action\": \"a\", \"reward\": -2.5e2,\n"
        "   \"next\": [[\"s\", 0.1], [\"t\", 0.9, 0.30000000000000004]]},\n"
        "  {\"state\": \"t\", \"action\": \"a\", \"reward\": 7, \"next\": [[\"t\"]]}]}\n";
    bc_model *m = read_json_ok(doc);
    CHECK(m != NULL, "numbers: the document reads");
    if (!m)
        return;
    CHECK(num_is(m->discount_exact, m->big, 19, 20), "numbers: 0.95 is exactly 19/20");
    CHECK(m->n_trans == 3 && num_is(bc_model_prob_exact(m, 0), m->big, 1, 10),
          "numbers: 0.1 is exactly 1/10");
    CHECK(m->n_trans == 3 && num_is(bc_model_prob_exact(m, 1), m->big, 9, 10),
          "numbers: 0.9 is exactly 9/10");
    CHECK(num_is(bc_model_reward_exact(m, 0), m->big, -250, 1), "numbers: -2.5e2 is exactly -250");
    CHECK(m->n_pairs == 2 && num_is(bc_model_reward_exact(m, 1), m->big, 7, 1), "numbers: 7 is 7");
    CHECK(m->outcome_id && num_is(bc_model_outcome_exact(m, 1), m->big, 7500000000000001L,
                                     25000000000000000UL),
          "numbers: 0.30000000000000004 keeps all 17 digits");
    CHECK(m->n_trans == 3 && num_is(bc_model_prob_exact(m, 2), m->big, 1, 1),
          "numbers: a lone successor has probability 1");
    CHECK(strcmp(m->name, "t") == 0, "numbers: default name is the file's base name");
    CHECK(!m->initial_given && num_is(m->initial_exact[0], m->big, 1, 2) &&
              num_is(m->initial_exact[1], m->big, 1, 2),
          "numbers: default initial is uniform over non-terminal states");
    bc_model_free(m);

    /* Escapes in the label survive reading and a second write/read. */
    m = read_json_ok("{\"format\": \"bell-json\", \"version\": 1, \"discount\": \"1/2\","
                     " \"name\": \"kiln \\\"B\\\"\\\\\\n\\t\\u0001 \\u00e9\","
                     " \"transitions\": [{\"state\": \"s\", \"action\": \"a\", \"reward\": \"0\","
                     " \"next\": [[\"s\", \"1\"]]}]}");
    CHECK(m && strcmp(m->name, "kiln \"B\"\\\n\t\x01 \xc3\xa9") == 0, "json: escapes decoded");
    char *j = m ? write_to_string(m, bc_write_bell_json) : NULL;
    bc_model *m2 = j ? read_json_ok(j) : NULL;
    CHECK(m && m2 && strcmp(m->name, m2->name) == 0, "json: label survives a round trip");
    free(j);
    bc_model_free(m);
    bc_model_free(m2);
}

/* A valid document's start and end around one transition list. */
#define HEAD "{\"format\": \"bell-json\", \"version\": 1, \"discount\": \"0.9\", "
#define ONE(next) "\"transitions\": [{\"state\": \"s\", \"action\": \"a\", \"reward\": \"1\", " \
                  "\"next\": " next "}]}"

static void test_json_errors(void)
{
    expect_error("bad version", "{\"format\": \"bell-json\", \"version\": 2, \"discount\": \"0.9\"}",
                 "unsupported version: expected 1, found 2", "version", 0, 0);
    expect_error("version as a string",
                 "{\"format\": \"bell-json\", \"version\": \"1\", \"discount\": \"0.9\"}",
                 "expected the number 1, found the string \"1\"", "version", 0, 0);
    expect_error("wrong format", "{\"format\": \"bell\", \"version\": 1, \"discount\": \"0.9\"}",
                 "expected the string \"bell-json\"", "format", 0, 0);
    expect_error("missing format", "{\"version\": 1, \"discount\": \"0.9\"}",
                 "missing key \"format\"", "(top level)", 0, 0);
    expect_error("unknown key", HEAD "\"discont\": \"0.9\", " ONE("[[\"s\"]]"),
                 "unknown key \"discont\"", "discont", 0, 0);
    expect_error("unknown key in a transition",
                 HEAD "\"transitions\": [{\"state\": \"s\", \"action\": \"a\", \"reward\": \"1\", "
                      "\"rewards\": \"2\", \"next\": [[\"s\"]]}]}",
                 "unknown key \"rewards\"", "transitions[0].rewards", 0, 0);
    expect_error("duplicate key", HEAD "\"discount\": \"0.5\", " ONE("[[\"s\"]]"),
                 "appears twice", "discount", 0, 0);
    expect_error("probability is an object", HEAD ONE("[[\"s\", {}]]"),
                 "expected a probability (a number, or a string holding an exact number), "
                 "found an object",
                 "transitions[0].next[0][1]", 0, 0);
    expect_error("probability is true", HEAD ONE("[[\"t\", \"1/2\"], [\"s\", true]]"),
                 "found true", "transitions[0].next[1][1]", 0, 0);
    expect_error("probability is not a number", HEAD ONE("[[\"s\", \"0.5.1\"]]"),
                 "expected a probability as an exact number", "transitions[0].next[0][1]", 0, 0);
    expect_error("missing discount",
                 "{\"format\": \"bell-json\", \"version\": 1, " ONE("[[\"s\"]]"),
                 "missing key \"discount\"", "(top level)", 0, 0);
    expect_error("discount out of range",
                 "{\"format\": \"bell-json\", \"version\": 1, \"discount\": 1.5, " ONE("[[\"s\"]]"),
                 "0 < discount <= 1", "discount", 0, 0);
    expect_error("probabilities do not sum to 1", HEAD ONE("[[\"s\", \"0.5\"]]"),
                 "sum to 0.5", "transitions[0]", 0, 0);
    expect_error("bad state name",
                 HEAD "\"transitions\": [{\"state\": \"1up\", \"action\": \"a\", \"reward\": 1, "
                      "\"next\": [[\"s\"]]}]}",
                 "expected the state's name", "transitions[0].state", 0, 0);
    expect_error("successor of four items", HEAD ONE("[[\"s\", 1, 2, 3]]"),
                 "an array of 1 to 3 items", "transitions[0].next[0]", 0, 0);
    expect_error("no successor", HEAD ONE("[]"), "at least one successor",
                 "transitions[0].next", 0, 0);
    expect_error("number too large", HEAD "\"transitions\": [{\"state\": \"s\", \"action\": "
                                          "\"a\", \"reward\": 1e400, \"next\": [[\"s\"]]}]}",
                 "too large for a double", "transitions[0].reward", 0, 0);
    expect_error("missing reward",
                 HEAD "\"transitions\": [{\"state\": \"s\", \"action\": \"a\", \"next\": [[\"s\"]]}]}",
                 "missing key \"reward\"", "transitions[0]", 0, 0);
    expect_error("objective word", HEAD "\"objective\": \"maximise\", " ONE("[[\"s\"]]"),
                 "expected \"max\" or \"min\"", "objective", 0, 0);
    expect_error("initial is a list", HEAD "\"initial\": [\"s\"], " ONE("[[\"s\"]]"),
                 "expected an object mapping state names", "initial", 0, 0);
    expect_error("root is an array", "[1, 2]", "expected a JSON object", "(top level)", 0, 0);
    /* Syntax errors carry line:column (columns count characters). */
    expect_error("syntax: double comma", "{\n  \"format\": \"bell-json\",\n  \"version\": 1,,\n}",
                 "JSON syntax error", NULL, 3, 16);
    expect_error("syntax: after a two-byte character", "{\"name\": \"\xc3\xa9\",, }",
                 "JSON syntax error", NULL, 1, 14);
    expect_error("syntax: cut short", "{\"format\": ", "ends inside a value", NULL, 1, 12);
    expect_error("syntax: text after the document", "{}\n  x", "found more text", NULL, 2, 3);
    expect_error("syntax: empty input", "  \n", "found an empty input", NULL, 2, 1);
    char deep[200];
    memset(deep, '[', 100);
    strcpy(deep + 100, "]");
    expect_error("syntax: nesting", deep, "nested more than 64 levels", NULL, 1, 65);

    /* Independent errors in several transitions are all reported. */
    bc_diag d;
    bc_diag_init(&d);
    bc_model *m = read_json(HEAD "\"transitions\": ["
                            "{\"state\": \"s\", \"action\": \"a\", \"reward\": null, \"next\": [[\"s\"]]},"
                            "{\"state\": \"t\", \"action\": \"a\", \"reward\": 1, \"next\": {}}]}",
                            &d);
    CHECK(m == NULL && d.n_errors == 2, "errors: both bad transitions reported");
    bc_diag_free(&d);
    bc_model_free(m);
}

int main(void)
{
    test_round_trips();
    test_text_writer();
    test_json_writer();
    test_json_numbers();
    test_json_errors();
    UNIT_DONE();
}
