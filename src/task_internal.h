/* task_internal.h — the continuous task's inside: formula programs, variables, the slot layout (shared by the task's files only). */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * A formula is compiled once (formats/formula_parse.c) into a flat program
 * for a stack machine over doubles (src/formula_eval.c).  Every name a
 * formula may read lives in one array of doubles, the slots:
 *
 *     [0, n)          current state variables, in `state` order
 *     [n, 2n)         next values (x'), filled as the `next` lines run
 *     2n              the value of the chosen action
 *     2n+1 ...        the noise values, in `noise` order
 *
 * Constants and `pi` are folded into the program as numbers, so a program
 * never looks a name up while it runs.
 */
#ifndef BC_TASK_INTERNAL_H
#define BC_TASK_INTERNAL_H

#include "bellcheck.h"

#define BC__STACK_MAX 64 /* deepest evaluation stack a program may need */
#define BC__SLOTS_MAX (2 * BC_TASK_MAX_VARS + 1 + BC_TASK_MAX_NOISE)

/* Instructions.  The _K forms take their right operand from k (a number),
 * the _V forms from slot; OP_KSUB, OP_KDIV and OP_KPOW have the number on the
 * left (k - x, k / x, k ^ x).  OP_JZ pops and jumps to slot when the value
 * is 0; OP_JMP always jumps; OP_END returns the top of the stack. */
typedef enum {
    OP_END = 0,
    OP_K, OP_V,
    OP_ADD, OP_SUB, OP_MUL, OP_DIV, OP_POW,
    OP_ADD_K, OP_SUB_K, OP_MUL_K, OP_DIV_K, OP_POW_K,
    OP_ADD_V, OP_SUB_V, OP_MUL_V, OP_DIV_V, OP_POW_V,
    OP_KSUB, OP_KDIV, OP_KPOW, OP_SQR,
    OP_LT, OP_LE, OP_GT, OP_GE, OP_EQ, OP_NE,
    OP_LT_K, OP_LE_K, OP_GT_K, OP_GE_K, OP_EQ_K, OP_NE_K,
    OP_AND, OP_OR, OP_NOT, OP_NEG,
    OP_SIN, OP_COS, OP_TAN, OP_ASIN, OP_ACOS, OP_ATAN, OP_SINH, OP_COSH, OP_TANH,
    OP_EXP, OP_LOG, OP_LOG10, OP_SQRT, OP_ABS, OP_FLOOR, OP_CEIL, OP_ROUND,
    OP_ATAN2, OP_MIN, OP_MAX, OP_CLAMP, OP_CLAMP_KK,
    OP_JZ, OP_JMP,
    OP_COUNT
} bc__op;

typedef struct {
    int32_t op;   /* bc__op */
    int32_t slot; /* variable slot (_V forms, OP_V) or jump target */
    double k;     /* number operand (_K forms, OP_K; the low bound of OP_CLAMP_KK) */
    double k2;    /* the high bound of OP_CLAMP_KK */
} bc__ins;

/* A compiled formula; code ends with OP_END. */
typedef struct {
    bc__ins *code;
    int32_t n_code;
    int32_t line, col; /* where the formula starts in the source, for messages */
} bc__program;

/* Floating-point exceptions that mean a formula produced a NaN or an
 * infinity: invalid operation, division by zero, overflow.  On x86 the SSE
 * status register is read directly (glibc's fenv calls also save and restore
 * the x87 state, ten times the cost of a whole formula); doubles never touch
 * the x87 unit there, libm's double functions included. */
#if defined(__SSE2__) && (defined(__x86_64__) || defined(__i386__))
#include <xmmintrin.h>
#define BC__FP_TRAPS 0x0Du /* MXCSR flags IE, ZE, OE */
static inline void bc__fp_clear(void) { _mm_setcsr(_mm_getcsr() & ~BC__FP_TRAPS); }
static inline int bc__fp_raised(void) { return (_mm_getcsr() & BC__FP_TRAPS) != 0; }
#else
#include <fenv.h>
static inline void bc__fp_clear(void) { feclearexcept(FE_INVALID | FE_DIVBYZERO | FE_OVERFLOW); }
static inline int bc__fp_raised(void) { return fetestexcept(FE_INVALID | FE_DIVBYZERO | FE_OVERFLOW) != 0; }
#endif

/* Runs p over the slots; the caller checks floating-point exceptions. */
double bc__program_eval(const bc__program *p, const double *slots);

/* What a formula may name (the scope of one formula). */
typedef enum {
    BC__SCOPE_CONST,  /* numbers, pi, earlier constants */
    BC__SCOPE_NEXT,   /* also states, action, noise, and the next values computed so far */
    BC__SCOPE_AFTER   /* reward / stop / stop_reward: every next value */
} bc__scope_kind;

typedef struct {
    bc__scope_kind kind;
    const bc_task *task;
    int32_t n_consts;        /* constants visible (the first n_consts) */
    const uint8_t *primed;   /* [n_vars] 1 where x' is computed already (BC__SCOPE_NEXT) */
} bc__scope;

/* Compiles text[0..len) (the formula, starting at column col of line `line`)
 * into p.  Errors go to d with file:line:column; returns 0 or -1. */
int bc__formula_compile(const char *text, size_t len, int32_t line, int32_t col,
                        const bc__scope *scope, const char *file, bc_diag *d, bc__program *p);
void bc__program_free(bc__program *p);

typedef enum { BC__INIT_NONE = 0, BC__INIT_UNIFORM, BC__INIT_POINT } bc__init_kind;
typedef enum { BC__NOISE_UNIFORM = 0, BC__NOISE_NORMAL } bc__noise_kind;

typedef struct {
    char *name;
    bc_num low_exact, high_exact;
    double low, high;
    int32_t line, col;                /* of its `state` line */
    bc__init_kind init;
    bc_num init_a_exact, init_b_exact; /* uniform A B, or the point A */
    double init_a, init_b;
    int32_t next_line;                /* 0 until its `next` line is seen */
} bc__task_var;

typedef struct {
    char *name;
    bc__noise_kind kind;
    double a, b; /* uniform: A B; normal: mean, standard deviation */
} bc__task_noise;

struct bc_task {
    char *label;           /* file label for messages */
    char *name;            /* the `name` line, or NULL */
    bc_bigtab *big;        /* big rationals of the exact fields */
    bc_num discount_exact;
    double discount;
    bc_objective objective;
    int64_t limit;

    int32_t n_vars;
    bc__task_var var[BC_TASK_MAX_VARS];

    char *action_var;      /* the action variable's name */
    int32_t n_actions;
    char **action_name;    /* [n_actions] action names in the model */
    double *action_value;  /* [n_actions] */

    int32_t n_noise;
    bc__task_noise noise[BC_TASK_MAX_NOISE];

    int32_t n_consts;
    char **const_name;     /* [n_consts] */
    double *const_value;   /* [n_consts] */

    int32_t n_next;                      /* == n_vars once read */
    int32_t next_var[BC_TASK_MAX_VARS];  /* variable of the k-th `next` line (evaluation order) */
    bc__program next[BC_TASK_MAX_VARS];  /* in evaluation order */
    bc__program reward, stop, stop_reward;
    int has_stop, has_stop_reward;
};

/* Index of the variable, action variable or noise named s[0..len) — see
 * task.c; -1 when none.  *kind is 's' state, 'a' action, 'n' noise, 'c' constant. */
int32_t bc__task_lookup(const bc_task *t, const char *s, size_t len, int32_t n_consts, char *kind);
/* 1 when s[0..len) is a word of the formula language (function, and, or, not, pi, if). */
int bc__formula_reserved(const char *s, size_t len);

/* Index along axis j of the cell holding coordinate x (grid.c; the rule of bc_grid_cell). */
int64_t bc__grid_axis(const bc_grid *g, int32_t j, double x);
/* Feeds the grid's initial distribution to b (grid_initial.c); 0, or -1 after reporting. */
int bc__grid_initial(bc_builder *b, const bc_task *t, const bc_grid *g, bc_diag *d);

#endif
