/* test_task.c — the .task reader and the formula engine: the format's example, operators and functions, clamping, next values, NaN/inf errors, reader errors at line:column. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Expected values are hand computations (written beside each check) or C's
 * own libm on the same operation; error positions were counted by hand from
 * the texts below.  The task example is the invented crater rover of the
 * task format (../shared/design/task-format.md).
 */
#include "bellcheck.h"
#include "unit.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

static const char rover[] =
    "# crater rover\n"                                                         /* 1 */
    "task 1\n"                                                                 /* 2 */
    "name crater-rover\n"                                                      /* 3 */
    "discount 1\n"                                                             /* 4 */
    "objective max\n"                                                          /* 5 */
    "const slope = 0.0030\n"                                                   /* 6 */
    "state x  -1.5  0.7\n"                                                     /* 7 */
    "state v  -0.08 0.08\n"                                                    /* 8 */
    "action motor = {reverse: -1, idle: 0, forward: 1}\n"                      /* 9 */
    "next v = clamp(v + 0.0012*motor - slope*cos(2.5*x), -0.08, 0.08)\n"       /* 10 */
    "next x = clamp(x + v', -1.5, 0.7)\n"                                      /* 11 */
    "reward -1\n"                                                              /* 12 */
    "stop x' >= 0.6\n"                                                         /* 13 */
    "initial x uniform -0.7 -0.3\n"                                            /* 14 */
    "initial v = 0\n"                                                          /* 15 */
    "limit 5000\n";                                                            /* 16 */

static bc_task *read_task(const char *text, bc_diag *d)
{
    bc_diag_init(d);
    return bc_task_read_text(text, strlen(text), "t.task", d);
}

static void test_example(void)
{
    bc_diag d;
    bc_task *t = read_task(rover, &d);
    CHECK(t != NULL, "example: reads");
    if (!t) {
        bc_diag_print(&d, stdout);
        bc_diag_free(&d);
        return;
    }
    CHECK(d.n == 0, "example: no messages");
    CHECK(!strcmp(bc_task_name(t), "crater-rover"), "example: name");
    CHECK(bc_task_discount(t) == 1 && bc_task_objective(t) == BC_MAX, "example: discount, objective");
    CHECK(bc_task_limit(t) == 5000, "example: limit");
    CHECK(bc_task_n_vars(t) == 2 && !strcmp(bc_task_var_name(t, 0), "x") &&
          !strcmp(bc_task_var_name(t, 1), "v"), "example: variables in state order");
    CHECK(bc_task_var_low(t, 0) == -1.5 && bc_task_var_high(t, 0) == 0.7 &&
          bc_task_var_low(t, 1) == -0.08 && bc_task_var_high(t, 1) == 0.08, "example: ranges");
    CHECK(bc_task_n_actions(t) == 3 && !strcmp(bc_task_action_name(t, 0), "reverse") &&
          !strcmp(bc_task_action_name(t, 2), "forward") && bc_task_action_value(t, 0) == -1 &&
          bc_task_action_value(t, 1) == 0 && bc_task_action_value(t, 2) == 1,
          "example: named actions and values");
    CHECK(bc_task_n_noise(t) == 0, "example: no noise");
    /* One step by hand: x = -0.5, v = 0.01, forward:
     * v' = 0.01 + 0.0012 - 0.003 cos(-1.25) (clamped; in range), x' = -0.5 + v'. */
    double x[2] = {-0.5, 0.01}, y[2], r;
    int stop;
    CHECK(bc_task_step(t, x, 2, NULL, y, &r, &stop) == 0, "example: a step succeeds");
    double v1 = 0.01 + 0.0012 * 1 - 0.0030 * cos(2.5 * -0.5);
    CHECK(y[1] == v1 && y[0] == -0.5 + v1, "example: v' then x' = x + v' (same operations as C)");
    CHECK(r == -1 && stop == 0, "example: reward -1, no stop");
    /* At the rim: x = 0.59, v = 0.05, forward: x' >= 0.6 stops. */
    double rim[2] = {0.59, 0.05};
    CHECK(bc_task_step(t, rim, 2, NULL, y, &r, &stop) == 0 && stop == 1, "example: stop at x' >= 0.6");
    /* Clamping: v = 0.08 forward would exceed 0.08 when cos(2.5x) < 0.4 (x = 0.7: cos(1.75) < 0). */
    double fast[2] = {0.7, 0.08};
    CHECK(bc_task_step(t, fast, 2, NULL, y, &r, &stop) == 0 && y[1] == 0.08 && y[0] == 0.7,
          "example: next values clamped to their ranges");
    double u[2] = {0.25, 0.9}, start[2];
    bc_task_initial_at(t, u, start);
    CHECK(start[0] == -0.7 + 0.25 * (-0.3 - -0.7) && start[1] == 0, "example: initial_at (uniform, = 0)");
    bc_task_free(t);
    bc_diag_free(&d);
}

/* The reward of one step of a one-variable task whose reward is `formula`, at y = yv;
 * *ok is the step's status. */
static double value_of(const char *formula, double yv, int *ok)
{
    char text[1024];
    snprintf(text, sizeof text,
             "discount 0.9\nconst k = 2\nconst half = k / 4\nstate y -100 100\n"
             "action a 1 3\nnext y = y\nreward %s\ninitial y = 0\n", formula);
    bc_diag d;
    bc_task *t = read_task(text, &d);
    double r = NAN;
    *ok = -2;
    if (t) {
        double x[1] = {yv}, nx[1];
        int stop;
        *ok = bc_task_step(t, x, 1, NULL, nx, &r, &stop);
    } else {
        bc_diag_print(&d, stdout);
    }
    bc_task_free(t);
    bc_diag_free(&d);
    return r;
}

static void test_operators(void)
{
    static const struct {
        const char *formula;
        double y, want;
        const char *name;
    } cases[] = {
        {"-2^2", 0, -4, "unary minus binds looser than ^: -(2^2)"},
        {"2^3^2", 0, 512, "^ is right associative: 2^(3^2)"},
        {"2^-1", 0, 0.5, "exponent may carry a sign"},
        {"7 - 3 - 2", 0, 2, "- is left associative"},
        {"8 / 4 / 2", 0, 1, "/ is left associative"},
        {"1 + 2 * 3", 0, 7, "* before +"},
        {"(1 + 2) * 3", 0, 9, "parentheses"},
        {"y * a", 1.5, 4.5, "action value 3 (second of `a 1 3`)"},
        {"k * half", 0, 1, "constants: k = 2, half = k/4 = 0.5"},
        {"pi", 0, 3.141592653589793, "pi"},
        {"y < 2", 1, 1, "comparison true is 1"},
        {"y >= 2", 1, 0, "comparison false is 0"},
        {"y == 1 and y != 2", 1, 1, "and"},
        {"y > 5 or y < 0", 1, 0, "or"},
        {"not y", 0, 1, "not 0 is 1"},
        {"not y > 0", 1, 0, "not binds looser than comparisons"},
        {"if(y > 0, 10, 20)", 1, 10, "if true"},
        {"if(y > 0, 10, 20)", -1, 20, "if false"},
        {"if(y > 0, 1, log(0))", 1, 1, "if evaluates only the chosen branch"},
        {"min(3, y, 2)", 1, 1, "min of three"},
        {"max(3, y, 2)", 7, 7, "max of three"},
        {"clamp(y, 0, 1)", 5, 1, "clamp high"},
        {"clamp(y, 0, 1)", -5, 0, "clamp low"},
        {"round(2.5) + round(-2.5)", 0, 0, "round halves away from zero: 3 + -3"},
        {"floor(-1.5) + ceil(-1.5)", 0, -3, "floor -2, ceil -1"},
        {"abs(-3)", 0, 3, "abs"},
        {"atan2(1, 1) * 4", 0, 3.141592653589793, "atan2(1,1) = pi/4"},
        {"atan2(0, 0)", 0, 0, "atan2(0, 0) is 0, not an error"},
        {"sqrt(16) + log10(1000) + log(1)", 0, 7, "sqrt 4, log10 3, log 0"},
        {"exp(0) + sin(0) + cos(0) + tan(0)", 0, 2, "exp, sin, cos, tan at 0"},
        {"asin(1) * 2", 0, 3.141592653589793, "asin(1) = pi/2"},
        {"acos(1) + atan(0) + sinh(0) + tanh(0) + cosh(0)", 0, 1, "acos, atan, sinh, tanh, cosh"},
        {"y^2", 3, 9, "square"},
        {"2^y", 3, 8, "number to a variable power"},
        {"1.5e2 + 25e-1", 0, 152.5, "exponents in numbers"},
        {"0.5 + 1/4", 0, 0.75, "decimals and integer division"},
    };
    for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
        int ok;
        double v = value_of(cases[i].formula, cases[i].y, &ok);
        char name[200];
        snprintf(name, sizeof name, "operators: %s", cases[i].name);
        CHECK(ok == 0 && fabs(v - cases[i].want) <= 1e-15 * fabs(cases[i].want), name);
    }
}

static void test_not_finite(void)
{
    static const struct {
        const char *formula;
        const char *name;
    } cases[] = {
        {"log(y)", "log(0): division by zero"},
        {"sqrt(y - 1)", "sqrt(-1): invalid"},
        {"1 / y", "1/0"},
        {"y / y", "0/0"},
        {"exp(1000 + y)", "exp(1000): overflow"},
        {"acos(2 + y)", "acos(2)"},
        {"clamp(1 / y, 0, 1)", "an infinity clamped to a finite value is still an error"},
        {"(1 / y) > 0", "an infinity compared is still an error"},
    };
    for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
        int ok;
        value_of(cases[i].formula, 0, &ok);
        char name[200];
        snprintf(name, sizeof name, "not finite: %s is an error", cases[i].name);
        CHECK(ok == -1, name);
    }
    /* The message names the formula, its line, the state and the action. */
    bc_diag d;
    bc_task *t = read_task("discount 1\nstate y -1 1\naction push = {left: -1, right: 1}\n"
                           "next y = y\nreward log(y + push)\nstop y' > 5\ninitial y = 0\n", &d);
    CHECK(t != NULL, "not finite: task reads");
    if (t) {
        double x[1] = {1}, nx[1], r;
        int stop;
        char buf[1500];
        CHECK(bc_task_step(t, x, 0, NULL, nx, &r, &stop) == -1, "not finite: log(1 + -1) fails");
        bc_task_step_error(t, x, 0, NULL, buf, sizeof buf);
        CHECK(strstr(buf, "`reward` (line 5)") && strstr(buf, "y = 1") && strstr(buf, "left") &&
              strstr(buf, "push = -1"), "not finite: message names formula, line, state, action");
        CHECK(bc_task_step(t, x, 1, NULL, nx, &r, &stop) == 0 && r == log(2.0),
              "not finite: the other action is fine");
    }
    bc_task_free(t);
    bc_diag_free(&d);
}

static void test_next_order_and_noise(void)
{
    bc_diag d;
    /* next lines run in file order: b is computed first and a sees b'. */
    bc_task *t = read_task("discount 1\nstate a 0 100\nstate b 0 100\naction u 1\n"
                           "noise w uniform 2 4\nnoise z normal 10 2\n"
                           "next b = b + u + w\nnext a = b' * 2 + z\nreward a' - a\n"
                           "initial a = 1\ninitial b uniform 0 1\n", &d);
    CHECK(t != NULL, "order: task with noise reads");
    if (t) {
        double x[2] = {1, 3}, nz[2] = {2.5, 10}, y[2], r;
        int stop;
        CHECK(bc_task_step(t, x, 0, nz, y, &r, &stop) == 0, "order: step");
        /* b' = 3 + 1 + 2.5 = 6.5; a' = 6.5 * 2 + 10 = 23; reward 23 - 1 = 22. */
        CHECK(y[1] == 6.5 && y[0] == 23 && r == 22, "order: b' then a' = 2 b' + z, reward from both");
        CHECK(!strcmp(bc_task_action_name(t, 0), "u:1"), "order: value actions are named NAME:VALUE");
        CHECK(bc_task_n_noise(t) == 2 && bc_task_noise_at(t, 0, 0.25) == 2.5,
              "noise: uniform 2 4 at 0.25 is 2.5");
        /* Normal quantiles: Phi(q(u)) = u, Phi from libm's erfc (an independent function). */
        double worst = 0;
        for (int k = 1; k < 1000; k++) {
            double u = k / 1000.0, q = (bc_task_noise_at(t, 1, u) - 10) / 2;
            double back = 0.5 * erfc(-q / sqrt(2.0));
            worst = fmax(worst, fabs(back - u) / fmin(u, 1 - u));
        }
        CHECK(worst < 1e-13, "noise: normal quantile inverts Phi = erfc/2 to 1e-13 relative");
        /* z_0.975 = 1.959963984540054 (the familiar 1.96 of 95% intervals; from memory). */
        CHECK_NEAR((bc_task_noise_at(t, 1, 0.975) - 10) / 2, 1.959963984540054, 1e-14,
                   "noise: normal quantile at 0.975");
        CHECK(bc_task_noise_at(t, 1, 0.5) == 10, "noise: normal median is the mean");
    }
    bc_task_free(t);
    bc_diag_free(&d);
}

/* Reading `text` fails with a message at `where` ("t.task:L:C") containing `what`. */
static void expect_error(const char *text, const char *where, const char *what, const char *name)
{
    bc_diag d;
    bc_task *t = read_task(text, &d);
    int found = 0;
    char full[300];
    for (int i = 0; i < d.n && !found; i++) {
        const bc_diag_item *it = &d.items[i];
        if (it->line > 0 && it->col > 0)
            snprintf(full, sizeof full, "%s:%d:%d", it->file, (int)it->line, (int)it->col);
        else if (it->line > 0)
            snprintf(full, sizeof full, "%s:%d", it->file, (int)it->line);
        else
            snprintf(full, sizeof full, "%s", it->file);
        found = it->severity == BC_ERROR && !strcmp(full, where) && strstr(it->message, what);
    }
    char label[300];
    snprintf(label, sizeof label, "reader error: %s", name);
    CHECK(t == NULL && found, label);
    if (!found)
        bc_diag_print(&d, stdout);
    bc_task_free(t);
    bc_diag_free(&d);
}

#define HEAD "discount 1\nstate x 0 1\naction a 0 1\n"      /* lines 1-3 */
#define TAIL "reward -1\ninitial x = 0\n"

static void test_errors(void)
{
    expect_error(HEAD "next x = x + y\n" TAIL, "t.task:4:14", "unknown name `y`", "unknown name");
    expect_error(HEAD "next x = sine(x)\n" TAIL, "t.task:4:10", "unknown function `sine`",
                 "unknown function");
    expect_error(HEAD "next x = atan2(x)\n" TAIL, "t.task:4:10", "takes 2 arguments, found 1",
                 "wrong argument count");
    expect_error(HEAD "next x = clamp(x, 0)\n" TAIL, "t.task:4:10", "takes 3 arguments, found 2",
                 "clamp with two arguments");
    expect_error(HEAD "next x = min(x)\n" TAIL, "t.task:4:10", "at least 2", "min with one argument");
    expect_error(HEAD "next x = x +\n" TAIL, "t.task:4:13", "ends where a value was expected",
                 "formula ends after an operator");
    expect_error(HEAD "next x = (x + 1\n" TAIL, "t.task:4:16", "expected `)`", "unclosed parenthesis");
    expect_error(HEAD "next x = x 1\n" TAIL, "t.task:4:12", "expected an operator", "two values in a row");
    expect_error(HEAD "next x = 0 < x < 1\n" TAIL, "t.task:4:16", "do not chain", "chained comparison");
    expect_error(HEAD "next x = x = 1\n" TAIL, "t.task:4:12", "`==`", "= instead of ==");
    expect_error(HEAD "next x = x @ 1\n" TAIL, "t.task:4:12", "unexpected character `@`", "bad character");
    expect_error(HEAD "next x = 1.2.3\n" TAIL, "t.task:4:10", "`1.2.3` is not a number", "bad number");
    expect_error(HEAD "next x = .5\n" TAIL, "t.task:4:10", "`.5` is not a number",
                 "number without a leading digit (as in the model format)");
    expect_error(HEAD "next x = sin\n" TAIL, "t.task:4:10", "is a function", "function without call");
    expect_error(HEAD "next x = x(2)\n" TAIL, "t.task:4:10", "not a function", "variable called");
    expect_error(HEAD "next x = a'\n" TAIL, "t.task:4:10", "only state variables", "primed action");
    expect_error("discount 1\nstate x 0 1\nstate y 0 1\naction a 0 1\nnext x = y'\nnext y = x\n" TAIL
                 "initial y = 0\n", "t.task:5:10", "not computed yet", "next value used too early");
    expect_error(HEAD "next z = x\n" TAIL, "t.task:4:6", "`z` is not a state variable", "next of unknown");
    expect_error(HEAD "next x = x\nnext x = x\n" TAIL, "t.task:5:1", "appears twice (first at line 4)",
                 "next twice");
    expect_error(HEAD TAIL, "t.task:2:7", "has no `next x", "missing next");
    expect_error("discount 1\nstate x 0 1\naction a 0 1\nnext x = x\nreward -1\n", "t.task:2:7",
                 "has no `initial x", "missing initial");
    expect_error("state x 0 1\naction a 0 1\nnext x = x\n" TAIL, "t.task", "no `discount` line",
                 "missing discount");
    expect_error("discount 1\nstate x 0 1\nnext x = x\n" TAIL, "t.task", "no `action` line",
                 "missing action");
    expect_error("discount 1\nstate x 0 1\naction a 0 1\nnext x = x\ninitial x = 0\n", "t.task",
                 "no `reward` line", "missing reward");
    expect_error(HEAD "discount 0.5\nnext x = x\n" TAIL, "t.task:4:1", "`discount` appears twice",
                 "duplicate discount");
    expect_error("discount 1.5\nstate x 0 1\naction a 0 1\nnext x = x\n" TAIL, "t.task:1:10",
                 "0 < discount <= 1", "discount above 1");
    expect_error("discount 1\nstate x 1 0\naction a 0 1\nnext x = x\n" TAIL, "t.task:2:9",
                 "range of `x` is empty", "empty range");
    expect_error("discount 1\nstate x 0 1\nstate x 0 2\naction a 0 1\nnext x = x\n" TAIL,
                 "t.task:3:7", "already the name of a state variable", "duplicate state");
    expect_error("discount 1\nstate sin 0 1\naction a 0 1\n", "t.task:2:7", "word of the formula language",
                 "reserved name");
    expect_error(HEAD "next x = x\nreward -1\ninitial x = 2\n", "t.task:6:13", "outside the range",
                 "initial outside range");
    expect_error(HEAD "next x = x\nreward -1\ninitial x uniform 0.5 0.5\n", "t.task:6:19",
                 "initial range of `x` is empty", "empty initial range");
    expect_error(HEAD "noise w normal 0 0\nnext x = x\n" TAIL, "t.task:4:18", "standard deviation must "
                 "be positive", "noise with zero deviation");
    expect_error(HEAD "noise w gamma 1 2\nnext x = x\n" TAIL, "t.task:4:9", "`uniform A B` or `normal",
                 "unknown noise kind");
    expect_error("discount 1\nstate x 0 1\naction a = {up: 1, up: 2}\nnext x = x\n" TAIL, "t.task:3:20",
                 "listed twice", "duplicate action label");
    expect_error("discount 1\nstate x 0 1\naction a 1 2 1\nnext x = x\n" TAIL, "t.task:3:14",
                 "listed twice", "duplicate action value");
    expect_error("discount 1\nstate x 0 1\naction a = {up 1}\nnext x = x\n" TAIL, "t.task:3:16",
                 "expected `:`", "action label without colon");
    expect_error(HEAD "limit 0\nnext x = x\n" TAIL, "t.task:4:7", "step limit", "limit zero");
    expect_error(HEAD "speed 3\nnext x = x\n" TAIL, "t.task:4:1", "unknown line `speed`", "unknown keyword");
    expect_error("discount 1\ntask 1\n", "t.task:2:1", "must be the first line", "version not first");
    expect_error("task 2\n", "t.task:1:6", "version 1", "version 2");
    expect_error(HEAD "const c = x + 1\nnext x = x\n" TAIL, "t.task:4:11", "a constant may use only",
                 "constant using a state");
    expect_error(HEAD "const c = d + 1\nconst d = 1\nnext x = x\n" TAIL, "t.task:4:11",
                 "unknown name `d`", "constant using a later constant");
    expect_error(HEAD "const c = 1 / 0\nnext x = x\n" TAIL, "t.task:4:11", "not a finite number",
                 "constant not finite");
    expect_error(HEAD "next x = x\nstop_reward 5\n" TAIL, "t.task:5", "without a `stop` line",
                 "stop_reward without stop");
    expect_error("", "t.task", "empty", "empty file");
}

int main(void)
{
    test_example();
    test_operators();
    test_not_finite();
    test_next_order_and_noise();
    test_errors();
    UNIT_DONE();
}
