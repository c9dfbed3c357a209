/* fuzz_task.c — libFuzzer harness: arbitrary bytes through the .task reader and formula compiler, then steps and a tiny grid model. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * A task that reads is exercised further, within a small budget so that the
 * fuzzer stays fast: one step from a few points (corners, centre, initial
 * draws) under every action and a few noise levels, then the grid model of
 * at most 8 cells under the scheme the input's length picks, with one sample
 * per cell and two noise strata.  Promises checked: a task exactly when no
 * error; its declarations within the format's bounds; a step either fails
 * with a message or gives next values inside their ranges (clamped), a
 * finite reward and a stop flag of 0 or 1; a grid model satisfies the
 * model's invariants and reads back identically from the text writer.
 */
#include "fuzz.h"

#include <math.h>

/* Steps from x under every action (at most 16) and three noise levels. */
static void steps_from(const bc_task *t, const double *x)
{
    int32_t n = bc_task_n_vars(t), nn = bc_task_n_noise(t), na = bc_task_n_actions(t);
    static const double level[3] = {0.5, 0.01, 0.99};
    double noise[BC_TASK_MAX_NOISE], next[BC_TASK_MAX_VARS], r;
    char msg[1400];
    for (int l = 0; l < (nn ? 3 : 1); l++) {
        for (int32_t k = 0; k < nn; k++) {
            noise[k] = bc_task_noise_at(t, k, level[(l + k) % 3]);
            fuzz_require(!isnan(noise[k]), "a noise level is a number");
        }
        for (int32_t a = 0; a < na && a < 16; a++) {
            int stop = -1;
            if (bc_task_step(t, x, a, nn ? noise : NULL, next, &r, &stop) < 0) {
                const char *why = bc_task_step_error(t, x, a, nn ? noise : NULL, msg, sizeof msg);
                fuzz_require(why && why[0], "a failed step says why");
                continue;
            }
            fuzz_require(isfinite(r) && (stop == 0 || stop == 1), "a step gives a finite reward "
                         "and a stop flag");
            for (int32_t i = 0; i < n; i++)
                fuzz_require(next[i] >= bc_task_var_low(t, i) && next[i] <= bc_task_var_high(t, i),
                             "next values are clamped to their ranges");
        }
    }
}

static void check_task(const bc_task *t)
{
    int32_t n = bc_task_n_vars(t);
    fuzz_require(n >= 1 && n <= BC_TASK_MAX_VARS && bc_task_n_actions(t) >= 1 &&
                     bc_task_n_noise(t) >= 0 && bc_task_n_noise(t) <= BC_TASK_MAX_NOISE,
                 "a task has variables and actions within the bounds");
    double g = bc_task_discount(t);
    fuzz_require(g > 0 && g <= 1 && bc_task_limit(t) >= 1, "discount in (0, 1], a step limit");
    double x[BC_TASK_MAX_VARS], u[BC_TASK_MAX_VARS];
    for (int32_t i = 0; i < n; i++) {
        fuzz_require(bc_task_var_name(t, i) != NULL && isfinite(bc_task_var_low(t, i)) &&
                         bc_task_var_low(t, i) < bc_task_var_high(t, i),
                     "a state variable has a name and a finite, non-empty range");
    }
    for (int32_t a = 0; a < bc_task_n_actions(t); a++)
        fuzz_require(bc_task_action_name(t, a) != NULL && isfinite(bc_task_action_value(t, a)),
                     "an action has a name and a finite value");
    for (int corner = 0; corner < 3; corner++) {
        for (int32_t i = 0; i < n; i++)
            x[i] = corner == 0 ? bc_task_var_low(t, i) : corner == 1 ? bc_task_var_high(t, i)
                 : bc_task_var_low(t, i) / 2 + bc_task_var_high(t, i) / 2;
        steps_from(t, x);
    }
    for (int draw = 0; draw < 2; draw++) {
        for (int32_t i = 0; i < n; i++)
            u[i] = draw ? 0.999 : 0.0;
        bc_task_initial_at(t, u, x);
        for (int32_t i = 0; i < n; i++)
            fuzz_require(x[i] >= bc_task_var_low(t, i) && x[i] <= bc_task_var_high(t, i),
                         "an initial state lies in the ranges");
        steps_from(t, x);
    }
}

/* The grid model of at most 8 cells, if the task is small enough to build it fast. */
static void tiny_grid(const bc_task *t, size_t size)
{
    int32_t n = bc_task_n_vars(t);
    if (n > 3 || bc_task_n_actions(t) > 16 || bc_task_n_noise(t) > 3)
        return;
    bc_grid_opts o;
    bc_grid_opts_default(&o);
    o.n_dims = n;
    for (int32_t i = 0; i < n; i++)
        o.cells[i] = 2;
    o.scheme = (bc_scheme)(size % 3);
    if (o.scheme == BC_SCHEME_SAMPLE)
        o.samples = 1;
    if (bc_task_n_noise(t))
        o.noise_samples = 2;
    bc_diag d;
    bc_diag_init(&d);
    bc_model *m = bc_grid_model(t, &o, &d);
    fuzz_check_verdict(m, &d);
    if (m)
        fuzz_round_trip(m, 0);
    bc_model_free(m);
    bc_diag_free(&d);
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    bc_diag d;
    bc_diag_init(&d);
    bc_task *t = bc_task_read_text((const char *)data, size, "fuzz.task", &d);
    fuzz_check_verdict(t, &d);
    bc_diag_free(&d);
    if (t) {
        check_task(t);
        tiny_grid(t, size);
    }
    bc_task_free(t);
    return 0;
}
