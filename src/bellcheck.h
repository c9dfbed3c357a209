/* bellcheck.h — the public interface of libbellcheck: exact numbers, the model, readers, writers, solvers and analyses. */
/*
 * Copyright (C) 2026 the bellcheck developers.
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Conventions (see docs/library.md for the full reference):
 *  - every public name starts with bc_;
 *  - functions that allocate return NULL (or a negative status) on failure and
 *    free whatever they took; callers check;
 *  - readers report problems into a bc_diag and never print.
 */
#ifndef BELLCHECK_H
#define BELLCHECK_H

#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <gmp.h>

#ifdef __cplusplus
extern "C" {
#endif

#define BC_VERSION "0.1.0"

/* ------------------------------------------------------------------------ */
/* Exact numbers                                                            */
/* ------------------------------------------------------------------------ */

/* An exact rational.  den > 0: the small rational num/den in lowest terms.
 * den == 0: a big rational stored in a bc_bigtab at index num.
 * Small form is used whenever numerator and denominator fit in int64. */
typedef struct {
    int64_t num;
    int64_t den;
} bc_num;

/* Storage for the rationals that do not fit the small form (GMP). */
typedef struct bc_bigtab bc_bigtab;

/* Largest number of digits (mantissa) and largest |exponent| a number may have. */
#define BC_NUM_MAX_DIGITS 4096
#define BC_NUM_MAX_EXPONENT 4096

bc_bigtab *bc_bigtab_new(void);                           /* empty table; NULL if out of memory */
void bc_bigtab_free(bc_bigtab *big);                      /* frees the table and every value; NULL is allowed */
size_t bc_bigtab_count(const bc_bigtab *big);             /* number of big values held */

/* Parses s[0..len) (integer, decimal with optional exponent, or p/q) exactly.
 * Returns 0 and sets *out, or -1 and sets *why to a static explanation. */
int bc_num_parse(const char *s, size_t len, bc_num *out, bc_bigtab *big, const char **why);
bc_num bc_num_int(int64_t v);                             /* the integer v */
double bc_num_to_double(bc_num x, const bc_bigtab *big);  /* the nearest double (ties to even) */
double bc_mpq_to_double(const mpq_t x);                   /* the nearest double (ties to even) */
void bc_num_to_mpq(mpq_t out, bc_num x, const bc_bigtab *big); /* exact copy into an initialised mpq_t */
int bc_num_from_mpq(bc_num *out, const mpq_t x, bc_bigtab *big); /* canonical bc_num of x; -1 on out of memory */
int bc_num_cmp(bc_num a, bc_num b, const bc_bigtab *big); /* <0, 0, >0 as a <, ==, > b */
int bc_num_sign(bc_num x, const bc_bigtab *big);          /* -1, 0 or 1 */
int bc_num_is_one(bc_num x, const bc_bigtab *big);        /* 1 when x == 1 exactly */
int bc_num_add(bc_num a, bc_num b, bc_num *out, bc_bigtab *big); /* out = a + b exactly; -1 on out of memory */
int bc_num_mul(bc_num a, bc_num b, bc_num *out, bc_bigtab *big); /* out = a * b exactly; -1 on out of memory */
int bc_num_div(bc_num a, bc_num b, bc_num *out, bc_bigtab *big); /* out = a / b exactly; -1 if b == 0 or out of memory */
/* Writes x in the model format: a terminating decimal when den is 2^i 5^j
 * (at most 40 fraction digits), otherwise p/q.  Returns bytes written or -1. */
int bc_num_write(FILE *f, bc_num x, const bc_bigtab *big);
/* The same text into buf (NUL-terminated, truncated to cap); returns the full length. */
size_t bc_num_format(char *buf, size_t cap, bc_num x, const bc_bigtab *big);
/* The bc_num_format text of x, whole, in a malloc'ed string; NULL if out of memory. */
char *bc_num_text(bc_num x, const bc_bigtab *big);
/* x as "p/q" in lowest terms ("p" for integers), malloc'ed; NULL if out of memory. */
char *bc_mpq_text(const mpq_t x);
/* Lowest-terms "p/q" (or "p" for integers) into buf; returns the full length. */
size_t bc_num_format_fraction(char *buf, size_t cap, bc_num x, const bc_bigtab *big);
/* 1 when x[0..n) are small, non-negative and sum to exactly 1, decided in 128-bit
 * integers over a common denominator; 0 when they do not or when that cannot decide
 * (big values, a denominator past 2^62): then sum them with bc_num_add. */
int bc_num_sum_is_one(const bc_num *x, int64_t n);

/* Distinct exact numbers behind 32-bit ids (a model repeats a few probabilities
 * and rewards millions of times).  Id 0 is 0 and id 1 is 1; equal small values
 * written alike share an id, every big value gets its own. */
typedef struct bc_numtab bc_numtab;

#define BC_NUM_ID_ZERO 0u
#define BC_NUM_ID_ONE 1u

bc_numtab *bc_numtab_new(void);                      /* holds 0 and 1; NULL if out of memory */
void bc_numtab_free(bc_numtab *t);                   /* NULL is allowed */
int64_t bc_numtab_intern(bc_numtab *t, bc_num x);    /* the id of x, added if new; -1 if out of memory or ids */
bc_num bc_numtab_get(const bc_numtab *t, uint32_t id); /* the value of an id */
uint32_t bc_numtab_count(const bc_numtab *t);        /* ids given so far */
const bc_num *bc_numtab_values(const bc_numtab *t);  /* [count] the values by id; moves when one is added */
void bc_numtab_compact(bc_numtab *t);                /* frees spare room and the lookup hash (rebuilt by the next intern) */

/* ------------------------------------------------------------------------ */
/* Diagnostics                                                              */
/* ------------------------------------------------------------------------ */

typedef enum { BC_NOTE = 0, BC_WARNING = 1, BC_ERROR = 2 } bc_severity;

typedef struct {
    bc_severity severity;
    char *file;    /* may be NULL */
    int32_t line;  /* 1-based; 0 when the problem has no position */
    int32_t col;   /* 1-based; 0 when unknown */
    char *message; /* one line, no trailing newline */
} bc_diag_item;

/* A list of messages collected by readers and analyses.  At most max_errors
 * errors are kept (default 20); later ones only count in n_dropped.
 * max_memory travels with it because every reader and the builder get a
 * bc_diag: before a large allocation they ask bc_diag_memory_refused. */
typedef struct {
    bc_diag_item *items;
    int n, cap;
    int n_errors, n_warnings, n_dropped;
    int max_errors;
    uint64_t max_memory; /* bytes one reading may hold (--max-memory); 0 = the process-wide
                          * bc_memory_limit_get() (no limit by default) */
} bc_diag;

void bc_diag_init(bc_diag *d);                 /* empty list, max_errors 20 */
void bc_diag_free(bc_diag *d);                 /* frees every item; d can be re-initialised */
/* Appends one message (printf format).  Returns 1 if the error limit is now reached. */
int bc_diag_add(bc_diag *d, bc_severity sev, const char *file, int32_t line, int32_t col,
                const char *fmt, ...) __attribute__((format(printf, 6, 7)));
int bc_diag_full(const bc_diag *d);            /* 1 when max_errors errors are held */
void bc_diag_print(const bc_diag *d, FILE *f); /* "file:line:col: error: message" lines */
/* 0 when holding `bytes` for `what` fits d->max_memory (when 0: the process-wide
 * limit below); else 1 after reporting the refusal against file. */
int bc_diag_memory_refused(bc_diag *d, const char *file, uint64_t bytes, const char *what);
/* The process-wide memory limit, for code that has no bc_diag (the solvers):
 * bytes, 0 = none (the default).  Set it once, before any work starts. */
void bc_memory_limit_set(uint64_t bytes);
uint64_t bc_memory_limit_get(void);
/* 0 when `bytes` for `what` fit `limit` (0: the process-wide limit); else 1 after
 * writing "WHAT needs X, more than the memory limit of Y (--max-memory)" into buf[cap]. */
int bc_memory_refused(uint64_t limit, uint64_t bytes, const char *what, char *buf, size_t cap);
/* The fewest bytes a model of these counts holds: its solver arrays alone
 * (indices, doubles), names and exact numbers aside.  Saturates. */
uint64_t bc_model_bytes_min(int64_t n_states, int64_t n_pairs, int64_t n_trans);

/* ------------------------------------------------------------------------ */
/* UTF-8                                                                    */
/* ------------------------------------------------------------------------ */

/* Length (1 to 4) of the well-formed UTF-8 character at text within avail
 * bytes, or 0 (none there; a NUL never continues a character, so SIZE_MAX
 * may be given for NUL-terminated text). */
size_t bc_utf8_len(const char *text, size_t avail);
/* Length of the longest prefix of text[0..len) that is well-formed UTF-8. */
size_t bc_utf8_valid_prefix(const char *text, size_t len);
/* Copy of text[0..len), NUL-terminated, each byte that is not part of a
 * well-formed character replaced by U+FFFD; NULL if out of memory. */
char *bc_utf8_copy(const char *text, size_t len);

/* ------------------------------------------------------------------------ */
/* Name tables                                                              */
/* ------------------------------------------------------------------------ */

#define BC_NAME_MAX 255

/* Interned names with constant-time lookup; indices are dense from 0. */
typedef struct bc_names bc_names;

bc_names *bc_names_new(void);                                   /* empty table; NULL if out of memory */
void bc_names_free(bc_names *t);                                /* NULL is allowed */
int32_t bc_names_intern(bc_names *t, const char *s, size_t len); /* index of s, adding it if new; -1 on out of memory */
int32_t bc_names_find(const bc_names *t, const char *s, size_t len); /* index of s, or -1 */
const char *bc_names_get(const bc_names *t, int32_t i);         /* NUL-terminated name i */
/* A lookup in two steps, so that the cache misses of several overlap: seek
 * starts it (fetching where s would be) and returns a key, found ends it with
 * the index of s or -1, as bc_names_find.  The table must not change in between. */
uint64_t bc_names_seek(const bc_names *t, const char *s, size_t len);
int32_t bc_names_found(const bc_names *t, const char *s, size_t len, uint64_t key);
int32_t bc_names_count(const bc_names *t);                      /* number of names */
/* New table with the names in the order perm[0], perm[1], ... (perm holds old indices). */
bc_names *bc_names_permuted(const bc_names *t, const int32_t *perm);

/* ------------------------------------------------------------------------ */
/* The model                                                                */
/* ------------------------------------------------------------------------ */

typedef enum { BC_MAX = 0, BC_MIN = 1 } bc_objective;

/* A finite MDP in compressed sparse rows over state-action pairs.
 * Invariants (checked by bc_model_check_invariants):
 *  - pairs of state s are state_pair_start[s] .. state_pair_start[s+1]-1,
 *    contiguous and in increasing action index; terminal states have none and
 *    every other state has at least one;
 *  - successors of pair p are pair_trans_start[p] .. pair_trans_start[p+1]-1,
 *    in the order written; a successor may repeat;
 *  - the exact probabilities of one pair sum to exactly 1; prob is their double image;
 *  - reward[p] = reward_exact(p) + sum_t prob[t] * outcome_exact(t) (doubles);
 *  - every id is below bc_numtab_count(values).
 * Exact numbers are ids into `values` (read them with bc_model_prob_exact and
 * its siblings below); `big` holds the big rationals those values refer to. */
typedef struct bc_model {
    char *name;
    int32_t n_states;
    int32_t n_actions;
    int64_t n_pairs;
    int64_t n_trans;
    double discount;          /* 0 < discount <= 1 */
    bc_num discount_exact;
    bc_objective objective;
    int32_t horizon;          /* number of decisions; 0 = infinite horizon */

    bc_names *state_names;    /* n_states names */
    bc_names *action_names;   /* n_actions names */

    int64_t *state_pair_start; /* [n_states + 1] */
    int32_t *pair_state;       /* [n_pairs] */
    int32_t *pair_action;      /* [n_pairs] */
    int64_t *pair_trans_start; /* [n_pairs + 1] */
    int32_t *succ_state;       /* [n_trans] */
    double *prob;              /* [n_trans] */
    double *reward;            /* [n_pairs] expected immediate reward */

    uint32_t *prob_id;         /* [n_trans] exact probability: an id into values */
    uint32_t *reward_id;       /* [n_pairs] the REWARD column as written: an id into values */
    uint32_t *outcome_id;      /* [n_trans] extra reward of each outcome; NULL when all are zero */
    bc_numtab *values;         /* the distinct exact numbers the ids name */
    int32_t *pair_line;        /* [n_pairs] source line of the pair; NULL when not from a text file */

    uint8_t *terminal;         /* [n_states] 1 for absorbing states */
    double *initial;           /* [n_states] initial distribution */
    bc_num *initial_exact;     /* [n_states] */
    int initial_given;         /* 1 if the source stated `initial` */
    int32_t initial_renormalised_line; /* != 0 if `initial` summed within 1e-9 of 1 and was renormalised: its line, or -1 */

    int32_t n_renormalised;    /* pairs whose probabilities were renormalised on reading */
    int32_t *renormalised_lines; /* [n_renormalised] their source lines (0 if unknown) */

    bc_bigtab *big;            /* big rationals referenced by the bc_num fields */
} bc_model;

/* Allocates a model with every array sized for the given counts and zeroed
 * (every exact number 0; outcome_id and pair_line left NULL).  NULL if out of memory. */
bc_model *bc_model_alloc(int32_t n_states, int32_t n_actions, int64_t n_pairs, int64_t n_trans);
void bc_model_free(bc_model *m);                 /* frees everything; NULL is allowed */
bc_num bc_model_prob_exact(const bc_model *m, int64_t t);    /* exact probability of transition t */
bc_num bc_model_reward_exact(const bc_model *m, int64_t p);  /* REWARD column of pair p, as written */
bc_num bc_model_outcome_exact(const bc_model *m, int64_t t); /* outcome reward of transition t (0 if none) */
/* Setters for models made by hand: x must live in m->big if big.  0, or -1 if out of memory. */
int bc_model_set_prob_exact(bc_model *m, int64_t t, bc_num x);
int bc_model_set_reward_exact(bc_model *m, int64_t p, bc_num x);
int bc_model_set_outcome_exact(bc_model *m, int64_t t, bc_num x); /* allocates outcome_id at first use */
/* Returns NULL when the invariants hold, else a static description of the first violation. */
const char *bc_model_check_invariants(const bc_model *m);
/* Exact expected reward of pair p (base reward plus outcome rewards) into an initialised mpq_t. */
void bc_model_reward_mpq(const bc_model *m, int64_t p, mpq_t out);
/* Index of the pair of state s with action a, or -1. */
int64_t bc_model_find_pair(const bc_model *m, int32_t s, int32_t a);
/* The transposed transition graph: for each state t, the pairs that reach t
 * with positive probability, pair_of[start[t] .. start[t+1]-1], in increasing
 * pair order (a pair repeats if it lists t twice). */
typedef struct {
    int64_t *start;   /* [n_states + 1] */
    int64_t *pair_of; /* [n_trans] (only start[n_states] entries used) */
} bc_reverse;

/* Builds r over the pairs p with use[p] (use NULL: every pair); 0, or -1 if out of memory. */
int bc_reverse_build(const bc_model *m, const uint8_t *use, bc_reverse *r);
void bc_reverse_free(bc_reverse *r); /* frees both arrays; r can be built again */
/* sum_s initial[s] * v[s]. */
double bc_model_initial_value(const bc_model *m, const double *v);

/* ------------------------------------------------------------------------ */
/* Building a model (used by every reader)                                  */
/* ------------------------------------------------------------------------ */

/* Accumulates directives and transition lines in any order, then sorts them
 * into a bc_model and runs the format's checks (dead ends, duplicates,
 * declared orders, probability sums).  Every call takes the source position
 * (line, col; 0 if unknown) used in its messages. */
typedef struct bc_builder bc_builder;

/* A position in a source: 1-based line and column, or 0 when not known.
 * `path` is a JSON-path-like location for sources without lines (may be NULL). */
typedef struct {
    int32_t line;
    int32_t col;
    const char *path;
} bc_pos;

bc_builder *bc_builder_new(const char *file_label, bc_diag *d); /* NULL if out of memory */
void bc_builder_free(bc_builder *b);                            /* discards everything */
bc_bigtab *bc_builder_bigtab(bc_builder *b);                     /* where parsed numbers must live */
int32_t bc_builder_state(bc_builder *b, const char *name, size_t len, bc_pos at);  /* state index (interned); -1 on error */
int32_t bc_builder_action(bc_builder *b, const char *name, size_t len, bc_pos at); /* action index (interned); -1 on error */
uint64_t bc_builder_seek_state(bc_builder *b, const char *name, size_t len); /* see bc_names_seek */
int32_t bc_builder_found_state(bc_builder *b, const char *name, size_t len, uint64_t key); /* see bc_names_found */
/* Directives: each returns 0, or -1 after reporting the problem (repeated directive, bad value). */
int bc_builder_name(bc_builder *b, const char *text, size_t len, bc_pos at);
int bc_builder_discount(bc_builder *b, bc_num g, bc_pos at);
int bc_builder_objective(bc_builder *b, bc_objective o, bc_pos at);
int bc_builder_horizon(bc_builder *b, bc_num h, bc_pos at);
/* `states`, `actions`, `terminal`: call begin, then add each name, then end. */
int bc_builder_states_begin(bc_builder *b, bc_pos at);
int bc_builder_actions_begin(bc_builder *b, bc_pos at);
int bc_builder_terminal_begin(bc_builder *b, bc_pos at);
int bc_builder_list_add(bc_builder *b, const char *name, size_t len, bc_pos at);
int bc_builder_list_end(bc_builder *b, bc_pos at);
/* `initial`: begin, then (state, probability or NULL for "alone, probability 1"), then end. */
int bc_builder_initial_begin(bc_builder *b, bc_pos at);
int bc_builder_initial_add(bc_builder *b, const char *name, size_t len, const bc_num *p, bc_pos at);
int bc_builder_initial_end(bc_builder *b, bc_pos at);
/* A transition line: begin, then each successor (prob NULL = "lone successor,
 * probability 1"; outcome NULL = no outcome reward), then end, which checks
 * and if needed renormalises the probabilities. */
int bc_builder_pair_begin(bc_builder *b, const char *state, size_t slen, bc_pos state_at,
                          const char *action, size_t alen, bc_pos action_at, bc_num reward);
int bc_builder_succ(bc_builder *b, const char *name, size_t len, const bc_num *prob,
                    const bc_num *outcome, bc_pos at);
int bc_builder_pair_end(bc_builder *b, bc_pos at);
/* Faster forms for a reader that keeps its own caches (the .bell text reader): */
bc_numtab *bc_builder_values(bc_builder *b); /* the table that ids given to the builder refer to */
int32_t bc_builder_known_state(bc_builder *b, const char *name, size_t len); /* index of a state already seen, or -1 (reports nothing) */
/* bc_builder_pair_begin with the reward as an id. */
int bc_builder_pair_begin_id(bc_builder *b, const char *state, size_t slen, bc_pos state_at,
                             const char *action, size_t alen, bc_pos action_at, uint32_t reward_id);
/* bc_builder_succ for a state index and a probability id (a value >= 0) with no outcome reward. */
int bc_builder_succ_id(bc_builder *b, int32_t state, uint32_t prob_id, bc_pos at);
/* bc_builder_pair_end when the caller has proven that the line's probabilities sum to exactly 1. */
int bc_builder_pair_end_summed(bc_builder *b, bc_pos at);
void bc_builder_pair_cancel(bc_builder *b); /* drops the open line (after an error was reported) */
/* Sorts, checks and returns the model (NULL if any error was reported);
 * the builder is freed in both cases.  Without bc_builder_name the model is
 * labelled by the file label's base name without its extension. */
bc_model *bc_builder_finish(bc_builder *b);

/* ------------------------------------------------------------------------ */
/* Readers and writers (formats/)                                           */
/* ------------------------------------------------------------------------ */

/* Reads a whole file ("-" = standard input) into a NUL-terminated buffer.
 * Returns 0, or -1 after reporting the problem in d (a stop request,
 * bc_stop_request, ends the reading too, even a wait on a silent pipe). */
int bc_read_file(const char *path, char **buf, size_t *len, bc_diag *d);
/* Reads a .bell text model from buf[0..len); file_label names it in messages. NULL on error. */
bc_model *bc_read_bell_text(const char *buf, size_t len, const char *file_label, bc_diag *d);
/* Reads the JSON form of a model from buf[0..len). NULL on error. */
bc_model *bc_read_bell_json(const char *buf, size_t len, const char *file_label, bc_diag *d);
/* Reads a model file ("-" = standard input), text or JSON by its first non-blank byte. NULL on
 * error, or after a stop request (bc_stop_request), looked at between reads of the input. */
bc_model *bc_read_model(const char *path, bc_diag *d);
/* Writes m in the .bell text format; returns 0 or -1 on a write error. */
int bc_write_bell_text(const bc_model *m, FILE *f);
/* Writes m in the JSON form; returns 0 or -1 on a write error. */
int bc_write_bell_json(const bc_model *m, FILE *f);

/* Output files that appear only when complete: written to a temporary file
 * beside the target, renamed into place by bc_out_commit. */
typedef struct {
    FILE *f;
    char *path;     /* target path; NULL for standard output */
    char *tmp_path; /* temporary path; NULL for standard output and direct writes */
    int direct;     /* 1: the target is not a regular file (a pipe, a device) and is written in place */
} bc_out;

int bc_out_open(bc_out *o, const char *path, bc_diag *d); /* "-" = standard output; 0 or -1 */
int bc_out_commit(bc_out *o, bc_diag *d);                 /* flush, close, rename; 0 or -1 (then nothing is left) */
void bc_out_abort(bc_out *o);                             /* close and delete the temporary file */

/* ------------------------------------------------------------------------ */
/* Solvers (solvers/)                                                       */
/* ------------------------------------------------------------------------ */

/* What stands behind a printed number. */
typedef enum {
    BC_PROOF_NONE = 0,     /* an estimate: nothing is proven */
    BC_PROOF_INTERVAL = 1, /* a rigorous enclosure (outward-rounded arithmetic) */
    BC_PROOF_EXACT = 2     /* exact rational arithmetic */
} bc_proof_kind;

const char *bc_proof_kind_name(bc_proof_kind k); /* "none", "interval", "exact" */

/* A proof attached to one number x: the true value lies in [x - bound, x + bound].
 * exact: bound is the distance from x (a double) to the exact rational, rounded up
 * (0 when x is exact); none: bound = -1. */
typedef struct {
    bc_proof_kind kind;
    double bound;
} bc_proof;

typedef enum { BC_METHOD_AUTO = 0, BC_METHOD_VI, BC_METHOD_PI, BC_METHOD_LP, BC_METHOD_BACKWARD,
               BC_METHOD_EXACT /* a floating-point solve made exact by bc_prove_solution */ } bc_method;

const char *bc_method_name(bc_method m);            /* "vi", "pi", "lp", "backward", "exact", "auto" */
int bc_method_parse(const char *s, bc_method *out); /* 0, or -1 for an unknown name */

typedef struct {
    double tol;          /* wanted bound on max_s |V(s) - V*(s)|; default 1e-9 */
    int64_t max_iter;    /* sweeps (vi) or improvement steps (pi); 0 = default */
    double max_seconds;  /* 0 = no limit */
    int threads;         /* 0 = default */
} bc_solve_opts;

void bc_solve_opts_default(bc_solve_opts *o); /* fills the defaults above */

/* Status of a solve. */
typedef enum {
    BC_SOLVE_OK = 0,
    BC_SOLVE_NOT_CONVERGED = 1, /* limit reached; values hold the last iterate */
    BC_SOLVE_FAILED = 2,        /* numerical or library failure; message says why */
    BC_SOLVE_NOMEM = 3,
    BC_SOLVE_INTERRUPTED = 4    /* bc_stop_request() was called; values hold the last iterate and
                                   bound the best proven so far (-1 if none) */
} bc_solve_status;

/* One point of a solve's convergence history: after `iteration` (a value-iteration sweep
 * or a policy-iteration improvement step of `method`), residual = largest |Tv(s) - v(s)|
 * (vi; Gauss-Seidel change at discount 1) or largest improvement any pair still offers (pi),
 * bound = the proven bound on |v - V*| at that point, -1 when none is proven. */
typedef struct {
    bc_method method;
    int64_t iteration;
    double residual;
    double bound;
} bc_trace_point;

typedef struct {
    bc_method method;
    bc_solve_status status;
    double *values;         /* [n_states] value of each state (stage 0 with a horizon) */
    int64_t *policy;        /* [n_states] chosen pair (stage 0 with a horizon); -1 for terminal states */
    int64_t *stage_policy;  /* [horizon * n_states] pair per stage and state, or NULL */
    double value_initial;   /* sum_s initial[s] * values[s] */
    double bound;           /* proven bound on max_s |values[s] - V*(s)|, or -1 if none is proven */
    int64_t iterations;
    double seconds;
    char message[256];      /* what happened, in one line */
    bc_trace_point *trace;  /* [n_trace] convergence history (vi and pi; NULL for the others) */
    int64_t n_trace;
    int64_t trace_stride;   /* every trace_stride-th iteration is kept (long runs are thinned) */
} bc_solution;

void bc_solution_init(bc_solution *sol);  /* zeroes everything, bound -1 */
void bc_solution_free(bc_solution *sol);  /* frees the arrays; sol can be re-initialised */

/* Each solver fills sol (allocating its arrays) and returns its status.
 * The model must satisfy its invariants; objective min is handled inside. */
bc_solve_status bc_solve_vi(const bc_model *m, const bc_solve_opts *o, bc_solution *sol);
bc_solve_status bc_solve_pi(const bc_model *m, const bc_solve_opts *o, bc_solution *sol);
bc_solve_status bc_solve_lp(const bc_model *m, const bc_solve_opts *o, bc_solution *sol);
bc_solve_status bc_solve_backward(const bc_model *m, const bc_solve_opts *o, bc_solution *sol);
/* The automatic method, then exact policy iteration from its answer: values are the
 * doubles nearest the exact optimum (bc_prove_solution keeps the rationals). */
bc_solve_status bc_solve_exact(const bc_model *m, const bc_solve_opts *o, bc_solution *sol);
/* Asks running solves to stop at their next sweep or step (async-signal-safe: only sets a
 * flag); they return BC_SOLVE_INTERRUPTED with their best proven bound.  Grid models,
 * bc_read_model and bc_rollout also stop (between cells, reads and episodes). */
void bc_stop_request(void);
int bc_stop_requested(void); /* 1 once bc_stop_request was called, until bc_stop_clear */
void bc_stop_clear(void);    /* forgets an earlier request */
/* Picks the method (auto: the fastest that certifies its answer for m) and solves. */
bc_solve_status bc_solve(const bc_model *m, bc_method method, const bc_solve_opts *o, bc_solution *sol);
/* The method bc_solve would use for m under BC_METHOD_AUTO. */
bc_method bc_solve_auto_method(const bc_model *m);

/* Runs every applicable method (vi, pi, lp; backward induction alone for a
 * finite horizon) and measures their largest disagreement. */
#define BC_COMPARE_MAX 4
typedef struct {
    int n;                            /* methods run */
    bc_solution sol[BC_COMPARE_MAX];
    double max_disagreement;          /* max over method pairs and states of |V_i(s) - V_j(s)| */
    double allowed;                   /* what their bounds allow for that pair */
    bc_proof proof[BC_COMPARE_MAX];   /* interval proof of each method's values (kind none at discount 1) */
    int32_t worst_state;              /* where the largest excess (or disagreement) occurs; -1 if none */
    int worst_i, worst_j;             /* the two methods behind it */
    int agree;                        /* 1 when every pair agrees within its allowance */
} bc_comparison;

/* Allowance used when a method proves no bound: this, times max(1, max |V|). */
#define BC_UNPROVEN_TOL 1e-6

/* Solves m with every method; 0, or -1 if out of memory.  A failed method leaves agree = 0. */
int bc_compare(const bc_model *m, const bc_solve_opts *o, bc_comparison *c);
void bc_comparison_free(bc_comparison *c); /* frees every solution */

/* ------------------------------------------------------------------------ */
/* Exact optima and proofs (solvers/exact*.c, interval.c, prove.c)          */
/* ------------------------------------------------------------------------ */

/* The exact optimum of a model: values as rationals in the model's sign. */
typedef struct {
    int32_t n_states;
    mpq_t *values;          /* [n_states] V* (stage 0 with a horizon); 0 at terminal states */
    int64_t *policy;        /* [n_states] an optimal pair (stage 0 with a horizon); -1 for terminal states */
    int64_t *stage_policy;  /* [horizon * n_states] with a horizon, else NULL */
    mpq_t value_initial;    /* sum_s initial(s) V*(s), exactly */
    int32_t steps;          /* exact evaluations (policy iteration) or stages (horizon) */
    int32_t n_changed;      /* states whose pair differs from the starting policy */
    int64_t fill;           /* largest number of entries of an elimination factor */
    double seconds;
    char message[256];
} bc_exact;

/* The exact linear solver: sparse elimination in a fill-reducing order (cheap
 * when the factors stay sparse), dense p-adic lifting (FLINT; when they fill
 * in), or auto: sparse while the fill stays small, else dense. */
typedef enum { BC_EXACT_LU_AUTO = 0, BC_EXACT_LU_SPARSE = 1, BC_EXACT_LU_DENSE = 2 } bc_exact_lu;

typedef struct {
    int64_t max_fill;       /* sparse: refuse past this many factor entries; 0 = default */
    int32_t max_dense;      /* dense: refuse systems of more rows; 0 = default */
    bc_exact_lu solver;     /* default auto */
    double max_seconds;     /* 0 = no limit */
} bc_exact_opts;

void bc_exact_opts_default(bc_exact_opts *o); /* default fill budget (see docs/methods.md), no time limit */
/* Exact policy iteration (or exact backward induction with a horizon) started
 * from start[] (pairs per state, e.g. a floating-point optimum; NULL: a
 * terminating policy is built).  BC_SOLVE_OK, NOT_CONVERGED when a budget
 * stopped it, FAILED (message says why) or NOMEM.  out is always freeable. */
bc_solve_status bc_exact_solve(const bc_model *m, const int64_t *start, const bc_exact_opts *o,
                               bc_exact *out);
void bc_exact_free(bc_exact *e); /* clears every value; NULL members allowed */
/* Exact value of a (possibly stochastic) policy: prob[n_pairs] weights per
 * pair as doubles (each an exact dyadic rational); states with skip[s] = 1
 * (skip may be NULL) are left out and must not be reached.  values[] must be
 * initialised; model sign.  0, 1 when a budget stopped it, -1 on failure
 * (why[] says). */
int bc_exact_policy_values(const bc_model *m, const double *prob, const uint8_t *skip,
                           const bc_exact_opts *o, mpq_t *values, char *why, size_t cap);

/* How a floating-point answer is proven. */
typedef enum {
    BC_PROVE_AUTO = 0,     /* exact when the model is small enough, else interval */
    BC_PROVE_EXACT = 1,    /* exact only (fails when its budget is exceeded) */
    BC_PROVE_INTERVAL = 2, /* interval only */
    BC_PROVE_OFF = 3       /* no proof: every number is labelled "none" */
} bc_prove_mode;

typedef struct {
    bc_prove_mode mode;
    int64_t exact_max_trans; /* auto: exact up to this many transitions (default in docs/methods.md) */
    bc_exact_opts exact;
} bc_prove_opts;

void bc_prove_opts_default(bc_prove_opts *o); /* auto, the measured threshold */

/* The proof attached to a solution. */
typedef struct {
    bc_proof value;            /* for every values[s]: |values[s] - V*(s)| <= value.bound */
    bc_proof initial;          /* for value_initial */
    double *lower, *upper;     /* [n_states] a proven enclosure of V* (model sign) */
    bc_exact exact;            /* the exact optimum when value.kind is exact */
    int has_exact;
    int policy_optimal;        /* 1: the solution's policy is proven optimal in every state */
    int32_t n_proven_optimal;  /* non-terminal states where its pair is proven optimal */
    int32_t n_undecided;       /* non-terminal states whose action gap is within the error */
    double policy_loss;        /* proven bound on max_s regret of the policy; 0 if optimal; -1 unknown */
    int32_t n_corrected;       /* exact: states whose pair the exact check changed */
    double seconds;
    char message[256];
} bc_proof_result;

/* Proves sol (a floating-point solution of m): exact rational check when the
 * mode and size allow (then sol's values become the doubles nearest the exact
 * optimum, its policy an exactly optimal one, and sol->bound the rounding
 * distance), otherwise outward-rounded intervals.  0, or -1 (out of memory or
 * an exact-only proof that could not be had; message says why). */
int bc_prove_solution(const bc_model *m, bc_solution *sol, const bc_prove_opts *o,
                      bc_proof_result *out);
void bc_proof_result_free(bc_proof_result *r); /* frees the arrays and the exact values */
/* Upper bound on |nearest double of x - x| style distances: |d - x| rounded up. */
double bc_mpq_distance_up(double d, const mpq_t x);

/* ------------------------------------------------------------------------ */
/* Certificates: optimality that re-checks without solving                  */
/* ------------------------------------------------------------------------ */

/* SHA-256 (hex) of m's normalised form, the text bc_write_bell_text writes; 0 or -1. */
int bc_model_digest(const bc_model *m, char hex[65]);

/* A self-contained claim about a model: this policy is optimal and these are
 * its values.  exact: values are rationals and the claim is V = V* exactly;
 * interval: values are doubles within `bound` of V*, and the policy is within
 * `policy_loss` of optimal in every state. */
typedef struct {
    bc_proof_kind kind;      /* BC_PROOF_EXACT or BC_PROOF_INTERVAL */
    char digest[65];         /* the model's bc_model_digest */
    int32_t n_states;
    int64_t *policy;         /* [n_states] pair; -1 at terminal states */
    mpq_t *exact_values;     /* [n_states] exact kind, model sign; else NULL */
    double *values;          /* [n_states] interval kind; else NULL */
    double bound;            /* interval: claimed max_s |values[s] - V*(s)| */
    double policy_loss;      /* interval: claimed max_s regret of the policy */
} bc_certificate;

/* Builds the certificate of a proven solution (pr from bc_prove_solution; its
 * kind must be exact or interval).  0, or -1 (out of memory / nothing proven). */
int bc_certificate_from_proof(const bc_model *m, const bc_solution *sol,
                              const bc_proof_result *pr, bc_certificate *c);
void bc_certificate_free(bc_certificate *c); /* frees the arrays; c can be reused */
/* Writes c as JSON (schema in docs/certificates.md); 0 or -1 on a write error. */
int bc_write_certificate(FILE *f, const bc_model *m, const bc_certificate *c);
/* Reads a certificate for m from path ("-" = standard input).  0; -1 when it
 * is malformed (errors in d); -2 when it belongs to another model (d says). */
int bc_read_certificate(const char *path, const bc_model *m, bc_certificate *c, bc_diag *d);
/* The same on bytes in memory, buf[0..len) (no final NUL needed); label names them in messages. */
int bc_read_certificate_mem(const char *buf, size_t len, const char *label, const bc_model *m,
                            bc_certificate *c, bc_diag *d);

/* What bc_verify_certificate found. */
typedef struct {
    int holds;               /* 1: every condition checked */
    int32_t first_bad_state; /* the first state where a condition fails; -1 */
    double bound;            /* interval: the bound the check itself proves */
    double policy_loss;      /* interval: the policy loss it proves */
    int64_t pairs_checked;
    double seconds;
    char message[256];       /* what failed, or what was proven */
} bc_verdict;

/* Re-checks c against m in one exact (or outward-rounded) pass of the
 * Bellman optimality conditions, without solving.  0; -1 out of memory; -2
 * when a stop request (bc_stop_request) ended the exact pass between states
 * (holds 0, message says where). */
int bc_verify_certificate(const bc_model *m, const bc_certificate *c, bc_verdict *v);

/* ------------------------------------------------------------------------ */
/* Learned agents: Q-tables and policies (formats/agent_*.c)                */
/* ------------------------------------------------------------------------ */

/* A Q-table laid over the model's state-action pairs. */
typedef struct {
    double *q;           /* [n_pairs] Q-value of each pair; NAN for a pair of a state the table skips */
    uint8_t *present;    /* [n_states] 1 if the table covers the state (terminal states: 1) */
    int32_t n_missing;   /* non-terminal states the table does not cover (only with BC_MISSING_SKIP) */
} bc_qtable;

/* A policy laid over the model's pairs: prob[p] is the probability of pair p
 * in its state; over the pairs of a covered non-terminal state they sum to 1. */
typedef struct {
    double *prob;        /* [n_pairs] */
    uint8_t *present;    /* [n_states] 1 if the policy covers the state (terminal states: 1) */
    int32_t n_missing;   /* non-terminal states not covered (only with BC_MISSING_SKIP) */
    int deterministic;   /* 1 if every covered state has one pair of probability 1 */
} bc_policy;

typedef enum { BC_MISSING_ERROR = 0, BC_MISSING_SKIP = 1 } bc_missing_mode;

/* Reads a Q-table for m: CSV (wide `state,<action>...` or long `state,action,q`,
 * told apart by the header), NPY (shape (states, actions) in the model's orders,
 * NaN where a state lacks the action) or JSON {"q": {state: {action: value}}};
 * the format is chosen by content.  NULL on error (errors in d, with file:row:column). */
bc_qtable *bc_read_qtable(const char *path, const bc_model *m, bc_missing_mode missing, bc_diag *d);
/* Reads a policy for m: CSV `state,action` or `state,action,prob`, NPY integer
 * array of action indices (shape (states,)), or JSON {"policy": {state: action}}. NULL on error. */
bc_policy *bc_read_policy(const char *path, const bc_model *m, bc_missing_mode missing, bc_diag *d);
/* The same two readers on bytes in memory, buf[0..len) (no final NUL needed); label names them in messages. */
bc_qtable *bc_read_qtable_mem(const char *buf, size_t len, const char *label, const bc_model *m,
                              bc_missing_mode missing, bc_diag *d);
bc_policy *bc_read_policy_mem(const char *buf, size_t len, const char *label, const bc_model *m,
                              bc_missing_mode missing, bc_diag *d);
/* The shape of an NPY file's array into shape[0..*ndim) (at most 32 axes); 0, or -1 after reporting. */
int bc_npy_shape(const char *path, int64_t *shape, int *ndim, bc_diag *d);
void bc_qtable_free(bc_qtable *q);  /* NULL is allowed */
void bc_policy_free(bc_policy *p);  /* NULL is allowed */
/* Allocates an empty Q-table / policy for m (every state present, values 0). NULL if out of memory. */
bc_qtable *bc_qtable_alloc(const bc_model *m);
bc_policy *bc_policy_alloc(const bc_model *m);

/* ------------------------------------------------------------------------ */
/* Scoring a learned agent against the optimum (solvers/score*.c)           */
/* ------------------------------------------------------------------------ */

typedef struct {
    bc_prove_opts prove; /* how the optimum and the agent's values are proven */
    double discount;     /* discount to score under; NAN = the model's */
    double q_discount;   /* discount under which the Q-table's residual is measured; NAN = `discount` */
    int ties_worst;      /* 1: among tied greedy actions, evaluate the worst choice (exactly) */
    bc_solve_opts solve; /* for the optimum */
} bc_score_opts;

void bc_score_opts_default(bc_score_opts *o); /* model's discounts, ties by action order */

/* Whether the actions an agent takes in one state are optimal by Q* (bc_score.acts; the test
 * is in docs/methods.md, "Agreement").  Traps are listed apart (bc_score.traps). */
typedef enum {
    BC_ACT_NONE = 0,        /* terminal, or not covered by the agent's file */
    BC_ACT_OPTIMAL = 1,     /* proven: every pair it uses has Q*(s,a) = V*(s) */
    BC_ACT_SUBOPTIMAL = 2,  /* proven: a pair it uses has Q*(s,a) below V*(s) (above, for min) */
    BC_ACT_UNDECIDED = 3    /* the proof's error is wider than the gap: a near or exact tie */
} bc_act_verdict;

/* Everything `score` reports.  Values are in the model's own sign (costs for
 * objective min); regrets are >= 0 and measured in the direction of the
 * objective (V* - V for max, V - V* for min).  A trap state's value is
 * -INFINITY for max (+INFINITY for min) and its regret +INFINITY. */
typedef struct {
    bc_solution optimum;       /* V*, its policy and proven bound */
    double discount;           /* the scoring discount actually used */
    double *agent_prob;        /* [n_pairs] the agent's policy (greedy from Q, or as given) */
    int32_t n_tied;            /* states whose greedy maximum is tied (Q-table only) */
    double *values;            /* [n_states] V of the agent's policy */
    double value_initial;      /* sum_s initial(s) V(s) (infinite if a trap has initial mass) */
    double optimal_initial;    /* sum_s initial(s) V*(s) */
    double regret_initial;     /* regret at the initial distribution */
    double regret_max_state;   /* largest single-state regret over covered states */
    int32_t worst_state;       /* where it occurs; -1 if none */
    double *state_regret;      /* [n_states] per-state regret (NAN for states not covered) */
    double eval_bound;         /* bound on the error of `values` from the linear solve */
    int has_q;                 /* 1 when scored from a Q-table */
    double residual;           /* max |T Q - Q| over the table's pairs, under q_discount (NAN without Q) */
    double q_error;            /* max |Q - Q*| (NAN without Q) */
    double regret_bound;       /* a-priori regret bound implied by the residual (NAN if none applies) */
    double agreement_states;   /* share of covered non-terminal states whose agent action is optimal */
    double agreement_weighted; /* the same weighted by the agent's discounted visit distribution */
    int32_t n_traps;           /* discount 1: states from which the agent never reaches a terminal state */
    int32_t *traps;            /* [n_traps] */
    double reach_probability;  /* discount 1: probability the agent reaches a terminal state from the initial distribution */
    int32_t n_wrong;           /* covered non-terminal states whose agent action is not optimal */
    uint8_t *acts;             /* [n_states] a bc_act_verdict per state, decided with the proven V* */
    int32_t n_undecided;       /* covered non-terminal states whose verdict is BC_ACT_UNDECIDED */
    int32_t *by_regret;        /* [n_states] state indices sorted by decreasing regret (for --top) */
    /* Proofs (kind none when nothing is proven).  The bound of each is on
     * |printed figure - true figure|. */
    bc_proof_result optimum_proof;   /* V*, as bc_prove_solution gives it */
    bc_proof values_proof;           /* the agent's values off the traps */
    bc_proof value_initial_proof, optimal_initial_proof;
    bc_proof regret_initial_proof, regret_max_state_proof;
    bc_proof residual_proof, q_error_proof;
    char *exact_regret_initial;      /* "p/q" when the regret is exact, else NULL */
    char *exact_value_initial;       /* the agent's value at the initial distribution, exact, or NULL */
    mpq_t *exact_values;             /* [n_exact_values] the agent's exact values (model sign), or NULL */
    int32_t n_exact_values;
    char message[256];
} bc_score;

/* Scores an agent given by a Q-table (q) or a policy (p; exactly one of them
 * non-NULL) against the optimum of m.  0, or -1 with out->message set. */
int bc_score_compute(const bc_model *m, const bc_qtable *q, const bc_policy *p,
                     const bc_score_opts *o, bc_score *out);
void bc_score_free(bc_score *s); /* frees every array */

/* Release gates on a score.  A limit that is NAN is not set. */
typedef struct {
    double max_regret;          /* regret at the initial distribution */
    int max_regret_is_percent;  /* max_regret is a percentage of |V*(initial)| */
    double max_state_regret;    /* largest single-state regret */
    double max_residual;        /* Bellman residual of the Q-table */
    double min_agreement;       /* share of states acting optimally, 0..1 */
} bc_gate_limits;

typedef struct {
    const char *name; /* "max-regret", "max-state-regret", "max-residual", "min-agreement" */
    double limit;     /* in the unit of value (a percentage limit is converted to an absolute one) */
    double value;
    int passed;
} bc_gate;

void bc_gate_limits_none(bc_gate_limits *l); /* every limit unset */
/* Evaluates the set limits against s into out[0..n); returns n (at most 4).
 * A gate whose value is undefined (e.g. a residual without a Q-table) fails. */
int bc_score_gates(const bc_score *s, const bc_gate_limits *l, bc_gate out[4]);

/* ------------------------------------------------------------------------ */
/* Analyses (src/)                                                          */
/* ------------------------------------------------------------------------ */

/* Structural findings of `check`. Arrays are owned by the struct. */
typedef struct {
    int32_t n_terminal;
    int32_t n_unreachable;      /* not reachable from the initial distribution */
    int32_t *unreachable;
    int32_t n_no_exit;          /* discount 1: no policy reaches a terminal state with probability 1 */
    int32_t *no_exit;
    int32_t n_zero_cycle_states;/* discount 1: states where a policy can stay forever on zero-reward pairs */
    int32_t *zero_cycle_states;
    int32_t n_unbounded;        /* discount 1: states where a policy can stay forever and collect without bound */
    int32_t *unbounded;
} bc_findings;

/* Computes the findings of m; 0, or -1 if out of memory. */
int bc_analyse(const bc_model *m, bc_findings *f);
void bc_findings_free(bc_findings *f);  /* frees the arrays */

/* ------------------------------------------------------------------------ */
/* Reports (src/report_*.c): text for people, JSON for programs            */
/* ------------------------------------------------------------------------ */

/* Text report of `check`: summary and findings.  Returns 0 or -1 on a write error. */
int bc_report_check_text(FILE *f, const bc_model *m, const bc_findings *fd, const char *source);
/* JSON report of `check` (schema in docs/json-reports.md). */
int bc_report_check_json(FILE *f, const bc_model *m, const bc_findings *fd, const char *source);
/* 1 when the findings make the model unusable (an error), else 0. */
int bc_findings_fatal(const bc_model *m, const bc_findings *fd);

/* Text report of a solve with its proof (pr may be NULL: nothing proven);
 * show_states = how many states of the policy to list. */
int bc_report_solve_text(FILE *f, const bc_model *m, const bc_solution *sol,
                         const bc_proof_result *pr, int32_t show_states);
/* JSON report of a solve (schema in docs/json-reports.md). */
int bc_report_solve_json(FILE *f, const bc_model *m, const bc_solution *sol,
                         const bc_proof_result *pr);
/* Text and JSON reports of --compare. */
int bc_report_compare_text(FILE *f, const bc_model *m, const bc_comparison *c);
int bc_report_compare_json(FILE *f, const bc_model *m, const bc_comparison *c);

/* Text report of `score`: verdict first, then details, the top worst states and the gates. */
int bc_report_score_text(FILE *f, const bc_model *m, const bc_score *s, const bc_gate *gates,
                         int n_gates, int32_t top);
/* JSON report of `score` (schema in docs/json-reports.md). */
int bc_report_score_json(FILE *f, const bc_model *m, const bc_score *s, const bc_gate *gates,
                         int n_gates, int32_t top);

/* Reports of `certify` (what was written and claimed) and `verify` (the verdict). */
int bc_report_certify_text(FILE *f, const bc_model *m, const bc_certificate *c,
                           const bc_proof_result *pr, const char *cert_path);
int bc_report_certify_json(FILE *f, const bc_model *m, const bc_certificate *c,
                           const bc_proof_result *pr, const char *cert_path);
int bc_report_verify_text(FILE *f, const bc_model *m, const bc_certificate *c, const bc_verdict *v);
int bc_report_verify_json(FILE *f, const bc_model *m, const bc_certificate *c, const bc_verdict *v);

/* CSV `state,value` of a solution (values in the model's own sign). */
int bc_write_values_csv(FILE *f, const bc_model *m, const bc_solution *sol);
/* CSV `state,action` of a solution's policy (terminal states omitted). */
int bc_write_policy_csv(FILE *f, const bc_model *m, const bc_solution *sol);

/* ------------------------------------------------------------------------ */
/* Continuous tasks (.task files) and the grids laid over them              */
/* (formats/task_read.c, formats/formula_parse.c, src/task.c,               */
/*  src/formula_eval.c, src/grid*.c; format in docs/format-task.md)         */
/* ------------------------------------------------------------------------ */

#define BC_TASK_MAX_VARS 16 /* state variables of one task */
#define BC_TASK_MAX_NOISE 8 /* noise variables of one task */

/* A control task: continuous state variables with ranges, one action
 * variable with a finite set of values, noise inputs, and the formulas of
 * the dynamics, compiled once.  Read-only after reading: one task may be
 * stepped by several threads at once. */
typedef struct bc_task bc_task;

/* Reads a task from buf[0..len); file_label names it in messages. NULL on error. */
bc_task *bc_task_read_text(const char *buf, size_t len, const char *file_label, bc_diag *d);
bc_task *bc_task_read_file(const char *path, bc_diag *d); /* "-" = standard input; NULL on error */
void bc_task_free(bc_task *t);                            /* NULL is allowed */
int bc_task_path(const char *path);                       /* 1 when path names a .task file (by its ending) */

const char *bc_task_name(const bc_task *t);               /* the `name` line, or NULL */
double bc_task_discount(const bc_task *t);                /* nearest double of the exact discount */
bc_objective bc_task_objective(const bc_task *t);
int64_t bc_task_limit(const bc_task *t);                  /* longest simulated episode (steps) */
int32_t bc_task_n_vars(const bc_task *t);                 /* state variables, in `state` order */
const char *bc_task_var_name(const bc_task *t, int32_t i);
double bc_task_var_low(const bc_task *t, int32_t i);      /* range of variable i */
double bc_task_var_high(const bc_task *t, int32_t i);
int32_t bc_task_n_actions(const bc_task *t);
const char *bc_task_action_name(const bc_task *t, int32_t a); /* the action's name in grid models */
double bc_task_action_value(const bc_task *t, int32_t a);     /* the value formulas see */
int32_t bc_task_n_noise(const bc_task *t);
const char *bc_task_noise_name(const bc_task *t, int32_t k);
/* Noise variable k at probability level u in (0, 1): the inverse of its distribution function. */
double bc_task_noise_at(const bc_task *t, int32_t k, double u);
/* An initial state from u[0..n_vars) in [0, 1): A + u (B - A) for `uniform A B`, the value for `= V`. */
void bc_task_initial_at(const bc_task *t, const double *u, double *x);

/* One step of the dynamics from x[0..n_vars) under action a with noise values
 * noise[0..n_noise) (NULL when the task has none): writes next[0..n_vars)
 * (each value clamped to its range), *reward (plus stop_reward when it stops)
 * and *stop (1 when the stop formula holds of the next state).  Allocates
 * nothing.  Returns 0, or -1 when some formula produced a NaN or an infinity
 * (bc_task_step_error then says which and where). */
int bc_task_step(const bc_task *t, const double *x, int32_t a, const double *noise, double *next,
                 double *reward, int *stop);
/* One line naming the formula that fails on these inputs, with the state, action and noise; returns buf. */
const char *bc_task_step_error(const bc_task *t, const double *x, int32_t a, const double *noise,
                               char *buf, size_t cap);

/* How a grid turns a task into a finite model (docs/format-task.md, "Grids"). */
typedef enum { BC_SCHEME_SAMPLE = 0, BC_SCHEME_CENTER, BC_SCHEME_INTERP } bc_scheme;

const char *bc_scheme_name(bc_scheme s);            /* "sample", "center", "interp" */
int bc_scheme_parse(const char *s, bc_scheme *out); /* 0, or -1 for an unknown name */

typedef struct {
    int32_t n_dims;                  /* counts given in cells (0 = no grid given) */
    int32_t cells[BC_TASK_MAX_VARS]; /* cells per state variable */
    bc_scheme scheme;                /* default sample */
    int32_t samples;                 /* sample: points per cell, m^n_dims; 0 = default */
    int32_t noise_samples;           /* strata per noise variable; 0 = default */
} bc_grid_opts;

void bc_grid_opts_default(bc_grid_opts *o); /* no cells, scheme sample, default counts */
/* Parses "64x64" (one count per state variable) into o; 0, or -1 with *why set. */
int bc_grid_parse_cells(const char *text, bc_grid_opts *o, const char **why);

/* Equal cells over a task's ranges.  Cell (i_1, ..., i_k) has index
 * sum_j i_j stride[j] (row-major: the last variable varies fastest).  In a
 * grid model state c is cell c, named "c<i_1>_<i_2>...", and the terminal
 * state `stop`, when some step stops, comes last. */
typedef struct {
    int32_t n_dims;
    int32_t cells[BC_TASK_MAX_VARS];
    int64_t stride[BC_TASK_MAX_VARS];
    double low[BC_TASK_MAX_VARS];
    double high[BC_TASK_MAX_VARS];
    double width[BC_TASK_MAX_VARS]; /* (high - low) / cells */
    int64_t n_cells;
    int32_t samples_per_axis;       /* points per axis of one cell (sample scheme) */
    int32_t noise_strata;           /* strata per noise variable */
} bc_grid;

/* Lays the grid of o over t; 0, or -1 after reporting (wrong number of counts, too many cells, bad --samples). */
int bc_grid_init(bc_grid *g, const bc_task *t, const bc_grid_opts *o, bc_diag *d);
int64_t bc_grid_cell(const bc_grid *g, const double *x);                  /* cell holding x (outside: the nearest) */
void bc_grid_cell_center(const bc_grid *g, int64_t cell, double *x);      /* centre of a cell */
size_t bc_grid_cell_name(const bc_grid *g, int64_t cell, char *buf, size_t cap); /* "c3_17"; full length */

/* The finite model of t on the grid of o, by o's scheme.  NULL after reporting. */
bc_model *bc_grid_model(const bc_task *t, const bc_grid_opts *o, bc_diag *d);

/* What `check` says about a grid itself.  Arrays are owned by the struct. */
typedef struct {
    bc_grid_opts opts;
    int32_t n_stuck;         /* cells every action keeps in place with probability 1 ... */
    int32_t *stuck;          /* ... although the dynamics move their centre: made by the grid */
    int32_t n_never_entered; /* cells that no other cell leads to and the initial distribution misses */
    int32_t *never_entered;
    int32_t n_idle_actions;  /* actions that keep every cell where it is */
    int32_t *idle_actions;
} bc_grid_findings;

/* Computes the findings of m = bc_grid_model(t, o); 0, or -1 on a failed step or out of memory. */
int bc_grid_analyse(const bc_task *t, const bc_grid_opts *o, const bc_model *m, bc_grid_findings *f);
void bc_grid_findings_free(bc_grid_findings *f); /* frees the arrays */
/* `check`'s reports with the grid findings added (gf NULL: the same as without). */
int bc_report_check_grid_text(FILE *f, const bc_model *m, const bc_findings *fd,
                              const bc_grid_findings *gf, const char *source);
int bc_report_check_grid_json(FILE *f, const bc_model *m, const bc_findings *fd,
                              const bc_grid_findings *gf, const char *source);
/* Reports of `grid`: the grid, the model's size, where it was written (output NULL: nowhere). */
int bc_report_grid_text(FILE *f, const bc_model *m, const bc_grid *g, bc_scheme scheme,
                        const char *source, const char *output);
int bc_report_grid_json(FILE *f, const bc_model *m, const bc_grid *g, bc_scheme scheme,
                        const char *source, const char *output);

/* ------------------------------------------------------------------------ */
/* Pictures: SVG maps and plots, and the one-file HTML report               */
/* (src/svg*.c, src/report_svg.c, src/report_html*.c; docs/pictures.md)     */
/* ------------------------------------------------------------------------ */

/* Where a model's states lie on a grid, and which plane (or line) of it is
 * drawn: cell (i, j) of the picture, i across along variable axis_x and j
 * upwards along axis_y, is model state state[i + j * nx] (-1: no state). */
typedef struct {
    int32_t n_vars;                       /* variables of the grid, 1 to BC_TASK_MAX_VARS */
    int32_t cells[BC_TASK_MAX_VARS];      /* cells along each variable */
    double low[BC_TASK_MAX_VARS];         /* range of each variable (names: index - 0.5 .. index + 0.5) */
    double high[BC_TASK_MAX_VARS];
    char var_name[BC_TASK_MAX_VARS][64];
    int32_t axis_x, axis_y;               /* variables drawn across and up; axis_y = -1: a strip of one */
    int32_t fixed[BC_TASK_MAX_VARS];      /* cell of each variable not drawn: its middle one, cells / 2 */
    int32_t nx, ny;                       /* cells drawn across and up (ny = 1 for a strip) */
    int32_t *state;                       /* [nx * ny] */
    int from_names;                       /* 1: read from state names (index units); 0: a task's grid */
} bc_layout;

/* The layout of m = bc_grid_model(t, o) on the plane `slice` ("x,v": variable
 * names, across then up; one name: a strip; NULL: the first two variables);
 * m NULL: state c is cell c, unchecked.  0, or -1 with why[] set (unknown or
 * repeated variable, m not t's grid, out of memory). */
int bc_layout_task(bc_layout *l, const bc_task *t, const bc_grid_opts *o, const bc_model *m,
                   const char *slice, char *why, size_t cap);
/* The layout read from state names in which letters and whole numbers alternate
 * ("x3y0", "r2c4", "c3_17", "q5"), the same letters in every non-terminal state;
 * slice names the letter groups ("c,r").  0; 1 when the names are no grid;
 * -1 for a bad slice or out of memory (why[] says, in both cases). */
int bc_layout_names(bc_layout *l, const bc_model *m, const char *slice, char *why, size_t cap);
void bc_layout_free(bc_layout *l); /* frees state; l can be laid out again */

/* Maps over a layout.  Each writes one <svg> element (no XML declaration, so
 * it also goes inline into HTML); 0, or -1 on a write error. */
/* A policy (a pair per state, -1 none): one colour per action, legend with the action names. */
int bc_svg_policy_map(FILE *f, const bc_model *m, const bc_layout *l, const int64_t *policy,
                      const char *title);
/* Values per state as a heat map with a colour bar (a line plot for a strip). */
int bc_svg_value_map(FILE *f, const bc_model *m, const bc_layout *l, const double *values,
                     const char *title, const char *value_label);
/* A scored agent: its actions; cells where an action it takes is proven
 * suboptimal (s->acts) marked and shaded by their regret, undecided ones
 * marked apart; traps outlined. */
int bc_svg_agent_map(FILE *f, const bc_model *m, const bc_layout *l, const bc_score *s,
                     const char *title);
/* One simulated trajectory: n_points states of l->n_vars values each, in the
 * task's units (a bc_trajectory's x and n_points). */
typedef struct {
    const double *x;
    int64_t n_points;
} bc_path;
/* Trajectories drawn over the plane of l (policy non-NULL: over its map, faded). */
int bc_svg_trajectories(FILE *f, const bc_model *m, const bc_layout *l, const int64_t *policy,
                        const bc_path *paths, int32_t n_paths, const char *title);

/* Line plots. */
typedef struct {
    const double *x, *y;  /* n points; non-finite ones (and <= 0 on a log axis) are left out */
    const double *err;    /* NULL, or half-widths of error bars (negative: none) */
    int32_t n;
    const char *label;    /* legend entry, or NULL */
    int dashed;           /* 1: a dashed guide line without markers */
} bc_plot_series;
typedef struct {
    const char *title, *x_label, *y_label;
    int log_x, log_y;     /* 1: logarithmic axis */
    const bc_plot_series *series;
    int32_t n_series;
} bc_plot;
int bc_svg_plot(FILE *f, const bc_plot *p);
/* Grid refinement: the value on each grid against its cell size, and on a
 * log-log panel the change from the previous grid, with guides of order 1 and 2. */
typedef struct {
    int32_t n;               /* grids, coarsest first */
    const double *cell_size; /* [n] one length per grid (> 0) */
    const double *value;     /* [n] e.g. the optimal value at the initial distribution */
    const double *bound;     /* [n] its proven bound (< 0: none), or NULL */
    const char *value_label; /* y-axis label of the first panel */
    const char *size_label;  /* x-axis label, e.g. "cell width / range" */
} bc_convergence;
int bc_svg_convergence(FILE *f, const bc_convergence *c);
/* A solve's convergence history (bc_solution.trace): per iteration its residual and proven
 * bound on a logarithmic axis, the methods in the title, name (may be NULL) and notes under
 * the plot; a policy-iteration history after a value-iteration one continues its count. */
int bc_svg_residual(FILE *f, const bc_trace_point *trace, int64_t n, int64_t stride,
                    const char *name);

/* Files of a picture directory: name, and what fills it. */
typedef struct {
    const char *name;                         /* e.g. "policy.svg" */
    int (*write)(FILE *f, const void *ctx);   /* 0, or -1 */
    const void *ctx;
} bc_svg_file;
/* Writes every file into dir, each behind an XML declaration, or none: a new
 * dir appears whole (built beside it and renamed), an existing one receives
 * its files only when all were written.  0, or -1 after reporting into d. */
int bc_svg_write_dir(const char *dir, const bc_svg_file *files, int32_t n, bc_diag *d);
/* The pictures of a solve (policy.svg, value.svg, and residual.svg when the
 * solution has a history) or of a score (agent.svg, policy.svg, value.svg)
 * into dir, as bc_svg_write_dir does.  0 or -1. */
int bc_report_svg_solve(const char *dir, const bc_model *m, const bc_layout *l,
                        const bc_solution *sol, bc_diag *d);
int bc_report_svg_score(const char *dir, const bc_model *m, const bc_layout *l, const bc_score *s,
                        bc_diag *d);
/* One self-contained HTML page (inline SVG and CSS, no script, nothing
 * fetched): the report of a solve or a score with its proofs, tables and, when
 * l is non-NULL, its pictures.  0, or -1 on a write error. */
int bc_report_html_solve(FILE *f, const bc_model *m, const bc_layout *l, const bc_solution *sol,
                         const bc_proof_result *pr, int32_t show);
int bc_report_html_score(FILE *f, const bc_model *m, const bc_layout *l, const bc_score *s,
                         const bc_gate *gates, int n_gates, int32_t top);

/* ------------------------------------------------------------------------ */
/* Simulating a grid's controller in the task, and grid refinement          */
/* (solvers/rollout*.c, solvers/refine.c; docs/methods.md, "Simulation")    */
/* ------------------------------------------------------------------------ */

/* A controller of a task laid on a grid: the action in each cell, or for a
 * stochastic policy the cumulative probabilities of the task's actions. */
typedef struct {
    bc_grid grid;
    bc_scheme scheme;  /* of the grid model it was read from (for reports) */
    int32_t n_actions; /* the task's actions (a grid model's action a is the task's action a) */
    int32_t *action;   /* [n_cells] the action in each cell; NULL when stochastic */
    double *cum;       /* [n_cells * n_actions] cumulative probabilities; NULL when deterministic */
} bc_grid_policy;

/* From a Q-table over m = bc_grid_model(t, o): the best Q in the objective's
 * sense, the first action on exact ties.  0, or -1 after reporting in d. */
int bc_grid_policy_from_q(bc_grid_policy *gp, const bc_task *t, const bc_grid_opts *o,
                          const bc_model *m, const bc_qtable *q, bc_diag *d);
/* From a policy over m (deterministic or stochastic).  0, or -1 after reporting. */
int bc_grid_policy_from_policy(bc_grid_policy *gp, const bc_task *t, const bc_grid_opts *o,
                               const bc_model *m, const bc_policy *p, bc_diag *d);
/* From one pair per state of m (a solution's policy).  0, or -1 after reporting. */
int bc_grid_policy_from_pairs(bc_grid_policy *gp, const bc_task *t, const bc_grid_opts *o,
                              const bc_model *m, const int64_t *pair, bc_diag *d);
void bc_grid_policy_free(bc_grid_policy *gp); /* frees the arrays; gp can be filled again */

typedef struct {
    int64_t episodes; /* default 1000 */
    uint64_t seed;    /* episode e draws from its own stream, a function of (seed, e) alone */
    int threads;      /* default 1; the results do not depend on it */
    int64_t limit;    /* steps per episode; 0 = the task's `limit` */
} bc_rollout_opts;

void bc_rollout_opts_default(bc_rollout_opts *o);

/* Mean of a sample with its 95% confidence interval mean +- t(0.975, n-1) sd / sqrt(n). */
typedef struct {
    int64_t n;
    double mean;
    double sd;               /* sample standard deviation (divisor n - 1); NAN when n < 2 */
    double ci_low, ci_high;  /* NAN when n < 2 */
} bc_sample_stats;

/* Student's t quantile t(p, df) for 0.5 <= p < 1, df >= 1. */
double bc_t_quantile(double p, double df);

/* What a rollout measured.  Returns are discounted sums of the task's
 * rewards in its own sign (costs for objective min). */
typedef struct {
    int64_t episodes, limit;
    bc_sample_stats ret;       /* return per episode */
    int64_t successes;         /* episodes that stopped within the limit */
    double success_rate;
    double steps_mean;         /* steps per episode (the limit for episodes that did not stop) */
    int64_t steps_min, steps_p10, steps_p50, steps_p90, steps_max; /* nearest-rank percentiles */
    int has_against;           /* a second policy ran on the same start states and noise */
    bc_sample_stats against_ret;
    int64_t against_successes;
    double against_success_rate, against_steps_mean;
    bc_sample_stats regret;    /* per episode: against's return minus the agent's, in the objective's direction */
    double seconds;
    int64_t simulated;         /* episodes run to their end: all of them, unless stopped (-3) */
    char message[512];         /* on failure: the episode, step and formula */
} bc_rollout_result;

/* Simulates agent (and against, if not NULL, on the same start states and
 * noise) from the task's initial distribution.  Same options, same results,
 * whatever o->threads.  0; -1 when a step failed (message names the episode,
 * the step and the formula); -2 for bad options or out of memory (message);
 * -3 when a stop request (bc_stop_request, looked at before every episode)
 * ended it early (simulated and message say after how many episodes). */
int bc_rollout(const bc_task *t, const bc_grid_policy *agent, const bc_grid_policy *against,
               const bc_rollout_opts *o, bc_rollout_result *r);

/* One simulated episode, recorded. */
typedef struct {
    int64_t n_points;  /* states recorded, the initial one first */
    double *x;         /* [n_points * n_vars] */
    int32_t *action;   /* [n_points - 1] the action taken at each step */
    double ret;        /* its return (up to where it was recorded) */
    int stopped;       /* 1 when the episode stopped */
    int truncated;     /* 1 when max_points cut the record short */
} bc_trajectory;

/* Episodes 0..k-1 of bc_rollout(t, gp, NULL, o) (the same draws), each recorded
 * up to max_points states, into out[0..k).  0, or -1 (why[] says). */
int bc_rollout_trajectories(const bc_task *t, const bc_grid_policy *gp, const bc_rollout_opts *o,
                            int32_t k, int64_t max_points, bc_trajectory *out, char *why,
                            size_t cap);
void bc_trajectories_free(bc_trajectory *tr, int32_t k); /* frees the arrays of tr[0..k) */

/* A grid-refinement study: one grid per level, finest last. */
typedef struct {
    bc_solve_opts solve;
    bc_prove_opts prove;
    bc_rollout_opts rollout;   /* simulation of each grid's optimal policy */
    int32_t n_trajectories;    /* sample trajectories kept per grid (0: none) */
    int64_t max_points;        /* states per kept trajectory */
} bc_refine_opts;

void bc_refine_opts_default(bc_refine_opts *o); /* auto solve and proof, 1000 episodes, no trajectories */

typedef enum { BC_REFINE_OK = 0, BC_REFINE_UNUSABLE, BC_REFINE_SOLVER, BC_REFINE_SIMULATION } bc_refine_status;

typedef struct {
    bc_grid_opts grid;
    bc_refine_status status;
    int32_t n_states;
    int64_t n_trans;
    double h;                  /* relative cell size: cells^(-1/variables) */
    double value;              /* the grid's optimum at its initial distribution */
    bc_proof value_proof;
    bc_method method;
    double seconds;            /* building, solving and proving */
    double *values;            /* [n_states] V* per state (cells, then `stop`) */
    bc_grid_policy policy;     /* the optimal action per cell */
    double difference;         /* value - previous grid's value; NAN for the first */
    double order;              /* observed order of convergence from the last three grids; NAN */
    double extrapolated;       /* Richardson estimate from the last three grids; NAN */
    bc_rollout_result sim;     /* the policy simulated in the task */
    int has_gain;              /* sim.regret compares with the previous grid's policy */
    bc_trajectory *trajectories;
    int32_t n_trajectories;
    char message[256];         /* why a level failed, or what its proof says */
} bc_refine_level;

typedef struct {
    int32_t n_levels;
    bc_refine_level *level;
    double extrapolated;       /* the finest grid's Richardson estimate; NAN */
    char note[256];            /* why there is none, when there is none */
} bc_refine;

/* Solves, proves and simulates each grid of t.  0 (failed levels carry
 * their status), or -1 after reporting (a grid that cannot be built). */
int bc_refine_run(const bc_task *t, const bc_grid_opts *grids, int32_t n, const bc_refine_opts *o,
                  bc_refine *out, bc_diag *d);
void bc_refine_free(bc_refine *r);

/* Reports of `rollout` and `refine` (schemas in docs/json-reports.md). */
int bc_report_rollout_text(FILE *f, const bc_task *t, const bc_rollout_result *r,
                           const bc_grid_policy *agent, const bc_grid_policy *against,
                           const bc_rollout_opts *o, const char *source, const char *agent_path);
int bc_report_rollout_json(FILE *f, const bc_task *t, const bc_rollout_result *r,
                           const bc_grid_policy *agent, const bc_grid_policy *against,
                           const bc_rollout_opts *o, const char *source, const char *agent_path);
int bc_report_refine_text(FILE *f, const bc_task *t, const bc_refine *r, const bc_refine_opts *o,
                          const char *source);
int bc_report_refine_json(FILE *f, const bc_task *t, const bc_refine *r, const bc_refine_opts *o,
                          const char *source);
/* The pictures of a refinement study into dir, as bc_svg_write_dir does:
 * convergence.svg (the solved grids' values against h, and their changes on
 * log-log axes) and, when the finest solved grid kept trajectories,
 * trajectories.svg over the plane `slice` of that grid (docs/pictures.md).  0 or -1. */
int bc_report_svg_refine(const char *dir, const bc_task *t, const bc_refine *r, const char *slice,
                         bc_diag *d);
/* The one-file HTML page of a refinement study (docs/pictures.md): the verdict, one row per
 * grid with its proof kind, the convergence plot and trajectories inline.  0, or -1 on a write error. */
int bc_report_html_refine(FILE *f, const bc_task *t, const bc_refine *r, const bc_refine_opts *o,
                          const char *source, const char *slice);

#ifdef __cplusplus
}
#endif

#endif /* BELLCHECK_H */
