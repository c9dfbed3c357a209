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
/* Lowest-terms "p/q" (or "p" for integers) into buf; returns the full length. */
size_t bc_num_format_fraction(char *buf, size_t cap, bc_num x, const bc_bigtab *big);

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
 * errors are kept (default 20); later ones only count in n_dropped. */
typedef struct {
    bc_diag_item *items;
    int n, cap;
    int n_errors, n_warnings, n_dropped;
    int max_errors;
} bc_diag;

void bc_diag_init(bc_diag *d);                 /* empty list, max_errors 20 */
void bc_diag_free(bc_diag *d);                 /* frees every item; d can be re-initialised */
/* Appends one message (printf format).  Returns 1 if the error limit is now reached. */
int bc_diag_add(bc_diag *d, bc_severity sev, const char *file, int32_t line, int32_t col,
                const char *fmt, ...) __attribute__((format(printf, 6, 7)));
int bc_diag_full(const bc_diag *d);            /* 1 when max_errors errors are held */
void bc_diag_print(const bc_diag *d, FILE *f); /* "file:line:col: error: message" lines */

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
/* Hint that s will be looked up soon: stage 0 fetches its slot, stage 1 (later) its text.
 * Issuing both stages for all names of a line overlaps their cache misses. */
void bc_names_prefetch(const bc_names *t, const char *s, size_t len, int stage);
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
 *  - prob_exact of one pair sums to exactly 1; prob is its double image;
 *  - reward[p] = reward_exact[p] + sum_t prob[t] * outcome_exact[t] (doubles). */
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

    bc_num *prob_exact;        /* [n_trans] */
    bc_num *reward_exact;      /* [n_pairs] the REWARD column as written */
    bc_num *outcome_exact;     /* [n_trans] extra reward of each outcome; NULL when all are zero */
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
 * (outcome_exact and pair_line left NULL).  NULL if out of memory. */
bc_model *bc_model_alloc(int32_t n_states, int32_t n_actions, int64_t n_pairs, int64_t n_trans);
void bc_model_free(bc_model *m);                 /* frees everything; NULL is allowed */
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
void bc_builder_prefetch_state(bc_builder *b, const char *name, size_t len, int stage); /* see bc_names_prefetch */
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
void bc_builder_pair_cancel(bc_builder *b); /* drops the open line (after an error was reported) */
/* Sorts, checks and returns the model (NULL if any error was reported);
 * the builder is freed in both cases.  default_name NULL: the file label's
 * base name without its extension. */
bc_model *bc_builder_finish(bc_builder *b, const char *default_name);

/* ------------------------------------------------------------------------ */
/* Readers and writers (formats/)                                           */
/* ------------------------------------------------------------------------ */

/* Reads a whole file ("-" = standard input) into a NUL-terminated buffer.
 * Returns 0, or -1 after reporting the problem in d. */
int bc_read_file(const char *path, char **buf, size_t *len, bc_diag *d);
/* Reads a .bell text model from buf[0..len); file_label names it in messages. NULL on error. */
bc_model *bc_read_bell_text(const char *buf, size_t len, const char *file_label, bc_diag *d);
/* Reads the JSON form of a model from buf[0..len). NULL on error. */
bc_model *bc_read_bell_json(const char *buf, size_t len, const char *file_label, bc_diag *d);
/* Reads a model file ("-" = standard input), text or JSON by its first non-blank byte. NULL on error. */
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

typedef enum { BC_METHOD_AUTO = 0, BC_METHOD_VI, BC_METHOD_PI, BC_METHOD_LP, BC_METHOD_BACKWARD } bc_method;

const char *bc_method_name(bc_method m);            /* "vi", "pi", "lp", "backward", "auto" */
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
    BC_SOLVE_NOMEM = 3
} bc_solve_status;

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
} bc_solution;

void bc_solution_init(bc_solution *sol);  /* zeroes everything, bound -1 */
void bc_solution_free(bc_solution *sol);  /* frees the arrays; sol can be re-initialised */

/* Each solver fills sol (allocating its arrays) and returns its status.
 * The model must satisfy its invariants; objective min is handled inside. */
bc_solve_status bc_solve_vi(const bc_model *m, const bc_solve_opts *o, bc_solution *sol);
bc_solve_status bc_solve_pi(const bc_model *m, const bc_solve_opts *o, bc_solution *sol);
bc_solve_status bc_solve_lp(const bc_model *m, const bc_solve_opts *o, bc_solution *sol);
bc_solve_status bc_solve_backward(const bc_model *m, const bc_solve_opts *o, bc_solution *sol);
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
void bc_qtable_free(bc_qtable *q);  /* NULL is allowed */
void bc_policy_free(bc_policy *p);  /* NULL is allowed */
/* Allocates an empty Q-table / policy for m (every state present, values 0). NULL if out of memory. */
bc_qtable *bc_qtable_alloc(const bc_model *m);
bc_policy *bc_policy_alloc(const bc_model *m);

/* ------------------------------------------------------------------------ */
/* Scoring a learned agent against the optimum (solvers/score*.c)           */
/* ------------------------------------------------------------------------ */

typedef struct {
    double discount;     /* discount to score under; NAN = the model's */
    double q_discount;   /* discount under which the Q-table's residual is measured; NAN = `discount` */
    int ties_worst;      /* 1: among tied greedy actions, evaluate the worst choice (exactly) */
    bc_solve_opts solve; /* for the optimum */
} bc_score_opts;

void bc_score_opts_default(bc_score_opts *o); /* model's discounts, ties by action order */

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
    int32_t *by_regret;        /* [n_states] state indices sorted by decreasing regret (for --top) */
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

/* Text report of a solve; show_states = how many states of the policy to list. */
int bc_report_solve_text(FILE *f, const bc_model *m, const bc_solution *sol, int32_t show_states);
/* JSON report of a solve (schema in docs/json-reports.md). */
int bc_report_solve_json(FILE *f, const bc_model *m, const bc_solution *sol);
/* Text and JSON reports of --compare. */
int bc_report_compare_text(FILE *f, const bc_model *m, const bc_comparison *c);
int bc_report_compare_json(FILE *f, const bc_model *m, const bc_comparison *c);

/* Text report of `score`: verdict first, then details, the top worst states and the gates. */
int bc_report_score_text(FILE *f, const bc_model *m, const bc_score *s, const bc_gate *gates,
                         int n_gates, int32_t top);
/* JSON report of `score` (schema in docs/json-reports.md). */
int bc_report_score_json(FILE *f, const bc_model *m, const bc_score *s, const bc_gate *gates,
                         int n_gates, int32_t top);

/* CSV `state,value` of a solution (values in the model's own sign). */
int bc_write_values_csv(FILE *f, const bc_model *m, const bc_solution *sol);
/* CSV `state,action` of a solution's policy (terminal states omitted). */
int bc_write_policy_csv(FILE *f, const bc_model *m, const bc_solution *sol);

#ifdef __cplusplus
}
#endif

#endif /* BELLCHECK_H */
