/* formula_eval.c — the stack machine that runs compiled formulas over an array of doubles (the hot loop of simulation and grids). */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * One dispatch per instruction, the stack in a local array: no allocation, no
 * name lookup, no recursion, so one task can be evaluated by many threads.
 * Errors are not tested here: a NaN or an infinity produced by any operation
 * raises a floating-point exception (invalid, division by zero, overflow),
 * which the caller tests once per step (task.c) — the common case pays
 * nothing for the check.
 *
 * Invariants: a compiled program never needs more than BC__STACK_MAX values
 * (formula_parse.c checks this), jump targets point inside the code, and
 * the code ends with OP_END.
 */
#include "task_internal.h"

#include <math.h>

/* Every instruction but OP_END: X(opcode, what it does to the stack). */
#define INSTRUCTIONS(X) \
    X(OP_K, { *sp++ = ip->k; })                                                                        \
    X(OP_V, { *sp++ = slots[ip->slot]; })                                                              \
    X(OP_ADD, { sp--; sp[-1] += sp[0]; })                                                              \
    X(OP_SUB, { sp--; sp[-1] -= sp[0]; })                                                              \
    X(OP_MUL, { sp--; sp[-1] *= sp[0]; })                                                              \
    X(OP_DIV, { sp--; sp[-1] /= sp[0]; })                                                              \
    X(OP_POW, { sp--; sp[-1] = pow(sp[-1], sp[0]); })                                                  \
    X(OP_ADD_K, { sp[-1] += ip->k; })                                                                  \
    X(OP_SUB_K, { sp[-1] -= ip->k; })                                                                  \
    X(OP_MUL_K, { sp[-1] *= ip->k; })                                                                  \
    X(OP_DIV_K, { sp[-1] /= ip->k; })                                                                  \
    X(OP_POW_K, { sp[-1] = pow(sp[-1], ip->k); })                                                      \
    X(OP_ADD_V, { sp[-1] += slots[ip->slot]; })                                                        \
    X(OP_SUB_V, { sp[-1] -= slots[ip->slot]; })                                                        \
    X(OP_MUL_V, { sp[-1] *= slots[ip->slot]; })                                                        \
    X(OP_DIV_V, { sp[-1] /= slots[ip->slot]; })                                                        \
    X(OP_POW_V, { sp[-1] = pow(sp[-1], slots[ip->slot]); })                                            \
    X(OP_KSUB, { sp[-1] = ip->k - sp[-1]; })                                                           \
    X(OP_KDIV, { sp[-1] = ip->k / sp[-1]; })                                                           \
    X(OP_KPOW, { sp[-1] = pow(ip->k, sp[-1]); })                                                       \
    X(OP_SQR, { sp[-1] *= sp[-1]; })                                                                   \
    X(OP_LT, { sp--; sp[-1] = sp[-1] < sp[0]; })                                                       \
    X(OP_LE, { sp--; sp[-1] = sp[-1] <= sp[0]; })                                                      \
    X(OP_GT, { sp--; sp[-1] = sp[-1] > sp[0]; })                                                       \
    X(OP_GE, { sp--; sp[-1] = sp[-1] >= sp[0]; })                                                      \
    X(OP_EQ, { sp--; sp[-1] = sp[-1] == sp[0]; })                                                      \
    X(OP_NE, { sp--; sp[-1] = sp[-1] != sp[0]; })                                                      \
    X(OP_LT_K, { sp[-1] = sp[-1] < ip->k; })                                                           \
    X(OP_LE_K, { sp[-1] = sp[-1] <= ip->k; })                                                          \
    X(OP_GT_K, { sp[-1] = sp[-1] > ip->k; })                                                           \
    X(OP_GE_K, { sp[-1] = sp[-1] >= ip->k; })                                                          \
    X(OP_EQ_K, { sp[-1] = sp[-1] == ip->k; })                                                          \
    X(OP_NE_K, { sp[-1] = sp[-1] != ip->k; })                                                          \
    X(OP_AND, { sp--; sp[-1] = sp[-1] != 0 && sp[0] != 0; })                                           \
    X(OP_OR, { sp--; sp[-1] = sp[-1] != 0 || sp[0] != 0; })                                            \
    X(OP_NOT, { sp[-1] = sp[-1] == 0; })                                                               \
    X(OP_NEG, { sp[-1] = -sp[-1]; })                                                                   \
    X(OP_SIN, { sp[-1] = sin(sp[-1]); })                                                               \
    X(OP_COS, { sp[-1] = cos(sp[-1]); })                                                               \
    X(OP_TAN, { sp[-1] = tan(sp[-1]); })                                                               \
    X(OP_ASIN, { sp[-1] = asin(sp[-1]); })                                                             \
    X(OP_ACOS, { sp[-1] = acos(sp[-1]); })                                                             \
    X(OP_ATAN, { sp[-1] = atan(sp[-1]); })                                                             \
    X(OP_SINH, { sp[-1] = sinh(sp[-1]); })                                                             \
    X(OP_COSH, { sp[-1] = cosh(sp[-1]); })                                                             \
    X(OP_TANH, { sp[-1] = tanh(sp[-1]); })                                                             \
    X(OP_EXP, { sp[-1] = exp(sp[-1]); })                                                               \
    X(OP_LOG, { sp[-1] = log(sp[-1]); })                                                               \
    X(OP_LOG10, { sp[-1] = log10(sp[-1]); })                                                           \
    X(OP_SQRT, { sp[-1] = sqrt(sp[-1]); })                                                             \
    X(OP_ABS, { sp[-1] = fabs(sp[-1]); })                                                              \
    X(OP_FLOOR, { sp[-1] = floor(sp[-1]); })                                                           \
    X(OP_CEIL, { sp[-1] = ceil(sp[-1]); })                                                             \
    X(OP_ROUND, { sp[-1] = round(sp[-1]); })                                                           \
    X(OP_ATAN2, { sp--; sp[-1] = atan2(sp[-1], sp[0]); })                                              \
    X(OP_MIN, { sp--; if (sp[0] < sp[-1]) sp[-1] = sp[0]; })                                           \
    X(OP_MAX, { sp--; if (sp[0] > sp[-1]) sp[-1] = sp[0]; })                                           \
    X(OP_CLAMP, { sp -= 2; if (sp[-1] < sp[0]) sp[-1] = sp[0]; if (sp[-1] > sp[1]) sp[-1] = sp[1]; })  \
    X(OP_CLAMP_KK, { if (sp[-1] < ip->k) sp[-1] = ip->k; if (sp[-1] > ip->k2) sp[-1] = ip->k2; })      \
    X(OP_JZ, { sp--; if (sp[0] == 0) ip = code + ip->slot - 1; })                                      \
    X(OP_JMP, { ip = code + ip->slot - 1; })

double bc__program_eval(const bc__program *p, const double *slots)
{
    double stack[BC__STACK_MAX];
    double *sp = stack; /* next free entry; the top is sp[-1] */
    const bc__ins *code = p->code, *ip = code;
#if defined(__GNUC__) && !defined(BC_PLAIN_DISPATCH)
    /* Threaded dispatch (a GNU C extension): one indirect jump per
     * instruction, each from its own place, which branch predictors follow
     * far better than the single jump of a switch (about twice the speed
     * here).  -DBC_PLAIN_DISPATCH selects the portable switch below. */
#define LABEL(name, body) [name] = &&do_##name,
    static const void *const labels[OP_COUNT] = {INSTRUCTIONS(LABEL)[OP_END] = &&do_OP_END};
#undef LABEL
#define BODY(name, body) do_##name: body; goto *labels[(++ip)->op];
    goto *labels[ip->op];
    INSTRUCTIONS(BODY)
#undef BODY
do_OP_END:
    return sp[-1];
#else
    for (;; ip++) {
        switch ((bc__op)ip->op) {
#define CASE(name, body) case name: body; break;
            INSTRUCTIONS(CASE)
#undef CASE
        case OP_END: return sp[-1];
        default: return NAN; /* not an instruction */
        }
    }
#endif
}
