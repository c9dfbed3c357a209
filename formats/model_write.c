/* model_write.c — the walk over a model shared by the text and JSON writers, with both spellings in one table. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#include "model_write.h"

#include <assert.h>
#include <stdlib.h>

/* How a list is spelled: `open` before the first item, `sep` between items,
 * `close` after the last; `empty` instead of all three when there is no item
 * (NULL: the list is left out). */
typedef struct {
    const char *open, *sep, *close, *empty;
} list_spelling;

/* Every fixed piece of a model document, [BC__FORM_TEXT] as .bell text
 * (docs/format-bell.md) and [BC__FORM_JSON] as JSON (docs/format-json.md),
 * in the order the walk writes them: the order of the JSON format's example
 * (the text accepts directives in any order; it writes the same one). */
static const struct {
    const char *start[2], *end[2];                      /* first and last text of the document */
    const char *discount[2], *discount_end[2];          /* around the discount */
    const char *objective_max[2], *objective_min[2];    /* the whole objective entry */
    const char *horizon[2], *horizon_end[2];            /* around a finite horizon */
    list_spelling states[2], actions[2], initial[2], terminal[2];
    const char *initial_prob[2];                        /* between a state and its probability */
    list_spelling pairs[2];                             /* one item per state-action pair */
    const char *pair_state[2], *pair_action[2], *pair_reward[2], *pair_next[2], *pair_end[2];
    list_spelling succs[2];                             /* the successors of a pair */
    const char *succ_prob[2], *succ_outcome[2];         /* before a probability, an outcome reward */
} spelling = {
    /*                .bell text                      JSON */
    .start =         {"# written by bellcheck " BC_VERSION "\nbell 1\n",
                      "{\"format\": \"bell-json\", \"version\": 1"},
    .end =           {"", "}\n"},
    .discount =      {"discount ", ",\n \"discount\": "},
    .discount_end =  {"\n", ""},
    .objective_max = {"objective max\n", ", \"objective\": \"max\""},
    .objective_min = {"objective min\n", ", \"objective\": \"min\""},
    .horizon =       {"horizon ", ", \"horizon\": "}, /* an integer: a JSON number */
    .horizon_end =   {"\n", ""},
    .states =   {{"states ", " ", "\n", "states\n"},
                 {",\n \"states\": [", ", ", "]", ",\n \"states\": []"}},
    .actions =  {{"actions ", " ", "\n", "actions\n"},
                 {",\n \"actions\": [", ", ", "]", ",\n \"actions\": []"}},
    .initial =  {{"initial ", " ", "\n", NULL},
                 {",\n \"initial\": {", ", ", "}", ",\n \"initial\": {}"}},
    .terminal = {{"terminal ", " ", "\n", NULL},
                 {",\n \"terminal\": [", ", ", "]", ",\n \"terminal\": []"}},
    .initial_prob =  {" ", ": "},
    /* STATE ACTION REWARD -> NEXT PROB [OUTCOME] ...  one line per pair, or
     * {"state", "action", "reward", "next": [[NEXT, PROB(, OUTCOME)], ...]} */
    .pairs =    {{"", "", "", ""},
                 {",\n \"transitions\": [\n  ", ",\n  ", "\n ]", ",\n \"transitions\": []"}},
    .pair_state =    {"", "{\"state\": "},
    .pair_action =   {" ", ", \"action\": "},
    .pair_reward =   {" ", ", \"reward\": "},
    .pair_next =     {" ->", ", \"next\": "},
    .pair_end =      {"\n", "}"},
    .succs =    {{" ", " ", "", ""}, {"[[", "], [", "]]", "[]"}},
    .succ_prob =     {" ", ", "},
    .succ_outcome =  {" ", ", "},
};

/* Pairs ahead of the one being written whose successor names are prefetched. */
#define PREFETCH_PAIRS 8

/* Before item number *count of a list: its opening or a separator. */
static void list_item(bc__outbuf *o, const list_spelling *ls, int64_t *count)
{
    bc__outbuf_str(o, (*count)++ ? ls->sep : ls->open);
}

/* After the last item: the closing, or the empty form when there was none. */
static void list_end(bc__outbuf *o, const list_spelling *ls, int64_t count)
{
    if (count)
        bc__outbuf_str(o, ls->close);
    else if (ls->empty)
        bc__outbuf_str(o, ls->empty);
}

/* Every name of t in index order (so the order survives a round trip). */
static void walk_names(bc__outbuf *o, const bc__model_format *fmt, const list_spelling *ls,
                       const bc_names *t)
{
    int64_t count = 0;
    for (int32_t i = 0; i < bc_names_count(t); i++) {
        list_item(o, ls, &count);
        fmt->name(o, bc_names_get(t, i));
    }
    list_end(o, ls, count);
}

/* The stated initial distribution; a zero entry says nothing a reader needs. */
static void walk_initial(bc__outbuf *o, const bc__model_format *fmt, const bc_model *m)
{
    const list_spelling *ls = &spelling.initial[fmt->form];
    int64_t count = 0;
    for (int32_t s = 0; s < m->n_states; s++) {
        if (bc_num_sign(m->initial_exact[s], m->big) == 0)
            continue;
        list_item(o, ls, &count);
        fmt->name(o, bc_names_get(m->state_names, s));
        bc__outbuf_str(o, spelling.initial_prob[fmt->form]);
        fmt->num(o, m->initial_exact[s]);
    }
    list_end(o, ls, count);
}

/* Everything before the pairs.  `initial` only when the source stated it, so
 * the default (uniform over non-terminal states) applies again on reading. */
static void walk_header(bc__outbuf *o, const bc__model_format *fmt, const bc_model *m)
{
    const bc__model_form k = fmt->form;
    bc__outbuf_str(o, spelling.start[k]);
    fmt->label(o, m->name);
    bc__outbuf_str(o, spelling.discount[k]);
    fmt->num(o, m->discount_exact);
    bc__outbuf_str(o, spelling.discount_end[k]);
    bc__outbuf_str(o, m->objective == BC_MIN ? spelling.objective_min[k] : spelling.objective_max[k]);
    if (m->horizon > 0) {
        char digits[16];
        snprintf(digits, sizeof digits, "%d", (int)m->horizon);
        bc__outbuf_str(o, spelling.horizon[k]);
        bc__outbuf_str(o, digits);
        bc__outbuf_str(o, spelling.horizon_end[k]);
    }
    walk_names(o, fmt, &spelling.states[k], m->state_names);
    walk_names(o, fmt, &spelling.actions[k], m->action_names);
    if (m->initial_given)
        walk_initial(o, fmt, m);
    int64_t count = 0;
    for (int32_t s = 0; s < m->n_states; s++) {
        if (m->terminal[s]) {
            list_item(o, &spelling.terminal[k], &count);
            fmt->name(o, bc_names_get(m->state_names, s));
        }
    }
    list_end(o, &spelling.terminal[k], count);
}

/* Hints that the successor names of pair p will be written soon.  Successors
 * are scattered states, and each name costs two cache misses (offset table,
 * text) that dominate the time of writing a large model; issued some pairs
 * ahead, they overlap (about 2x on a 200,000-state Garnet model). */
static void prefetch_names(const bc_model *m, int64_t p)
{
    if (p >= m->n_pairs)
        return;
    for (int64_t t = m->pair_trans_start[p]; t < m->pair_trans_start[p + 1]; t++)
        __builtin_prefetch(bc_names_get(m->state_names, m->succ_state[t]));
}

/* The pair loop is compiled once per form (k a constant), so the table's
 * separators become literals and their copies a store or two. */
#define PER_FORM static inline __attribute__((always_inline))

/* The successors of pair p: every probability written, an outcome reward only where non-zero. */
PER_FORM void walk_succs(bc__outbuf *o, const bc__model_format *fmt, const bc_model *m, int64_t p,
                         const bc__model_form k)
{
    int64_t count = 0;
    for (int64_t t = m->pair_trans_start[p]; t < m->pair_trans_start[p + 1]; t++) {
        list_item(o, &spelling.succs[k], &count);
        fmt->name(o, bc_names_get(m->state_names, m->succ_state[t]));
        bc__outbuf_str(o, spelling.succ_prob[k]);
        fmt->num(o, bc_model_prob_exact(m, t));
        if (m->outcome_id && bc_num_sign(bc_model_outcome_exact(m, t), m->big) != 0) {
            bc__outbuf_str(o, spelling.succ_outcome[k]);
            fmt->num(o, bc_model_outcome_exact(m, t));
        }
    }
    assert(count > 0); /* a pair has at least one successor */
    list_end(o, &spelling.succs[k], count);
}

/* One item per state-action pair, in pair order. */
PER_FORM void walk_pairs(bc__outbuf *o, const bc__model_format *fmt, const bc_model *m,
                         const bc__model_form k)
{
    int64_t count = 0;
    for (int64_t p = 0; p < m->n_pairs && !o->failed; p++) {
        prefetch_names(m, p + PREFETCH_PAIRS);
        list_item(o, &spelling.pairs[k], &count);
        bc__outbuf_str(o, spelling.pair_state[k]);
        fmt->name(o, bc_names_get(m->state_names, m->pair_state[p]));
        bc__outbuf_str(o, spelling.pair_action[k]);
        fmt->name(o, bc_names_get(m->action_names, m->pair_action[p]));
        bc__outbuf_str(o, spelling.pair_reward[k]);
        fmt->num(o, bc_model_reward_exact(m, p));
        bc__outbuf_str(o, spelling.pair_next[k]);
        walk_succs(o, fmt, m, p, k);
        bc__outbuf_str(o, spelling.pair_end[k]);
    }
    list_end(o, &spelling.pairs[k], count);
}

int bc__write_model(const bc_model *m, FILE *f, const bc__model_format *fmt)
{
    assert(fmt->form == BC__FORM_TEXT || fmt->form == BC__FORM_JSON);
    bc__outbuf *o = bc__outbuf_new(f, m->big);
    if (!o)
        return -1;
    walk_header(o, fmt, m);
    if (fmt->form == BC__FORM_TEXT)
        walk_pairs(o, fmt, m, BC__FORM_TEXT);
    else
        walk_pairs(o, fmt, m, BC__FORM_JSON);
    bc__outbuf_str(o, spelling.end[fmt->form]);
    return bc__outbuf_close(o);
}
