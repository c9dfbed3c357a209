/* formula_speed.c — benchmark of the formula engine: formula steps per second of a task's dynamics on one core. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * usage: formula_speed [TASK] [SECONDS]
 *        (default models/crater-rover.task, 2 seconds per measurement)
 *
 * A "formula step" is one evaluation of one compiled formula.  Two figures:
 *  - dynamics: whole steps by bc_task_step (what a simulation pays, with the
 *    state copy, the clamping of next values and the floating-point error
 *    check), each counting as the formulas it runs: one per `next` line, one
 *    for `stop` (if any), one for `reward`, and one for `stop_reward` on the
 *    steps that stop.  For the crater rover that is 4 per step.  Episodes
 *    start from initial states and follow a bang-bang policy (push the way
 *    the rover moves), restarting when they stop or reach the limit;
 *  - formula: the `next` programs alone, run by the evaluator on the states
 *    of a stored trajectory (the engine's raw speed, without step overhead).
 * Rates are per second of CPU time of this process (one thread), so they
 * stay meaningful on a shared machine; the wall-clock rate is printed too.
 * One line of JSON on standard output; the goal is 20 million formula steps
 * per second on one core (issue 5).
 */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "bellcheck.h"
#include "task_internal.h"

/* CPU time of this process: the figures are per core even on a busy machine
 * (the wall-clock rate is printed beside them). */
static double cpu_now(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_PROCESS_CPUTIME_ID, &ts);
    return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

static double wall_now(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

/* A uniform in [0, 1) from a xorshift generator (the draws only vary the start states). */
static double uniform(uint64_t *s)
{
    *s ^= *s << 13;
    *s ^= *s >> 7;
    *s ^= *s << 17;
    return (double)(*s >> 11) / 9007199254740992.0;
}

/* Runs episodes for about `seconds` of CPU time; returns formula steps per
 * CPU second, and the wall-clock rate in *wall_rate.  The noise is drawn
 * beforehand (4096 vectors, cycled): drawing it is not formula work. */
static double dynamics(const bc_task *t, double seconds, double *wall_rate)
{
    enum { DRAWS = 4096 };
    int32_t n = bc_task_n_vars(t), nn = bc_task_n_noise(t);
    double x[BC_TASK_MAX_VARS], y[BC_TASK_MAX_VARS], u[BC_TASK_MAX_VARS];
    static double noise[DRAWS][BC_TASK_MAX_NOISE];
    double r, sum = 0;
    uint64_t rng = 88172645463325252ULL;
    for (int k = 0; k < DRAWS; k++)
        for (int32_t j = 0; j < nn; j++)
            noise[k][j] = bc_task_noise_at(t, j, 0.001 + 0.998 * uniform(&rng));
    long long steps = 0, formulas = 0, len = 0;
    int per_step = t->n_next + t->has_stop + 1, stop = 1;
    int32_t forward = bc_task_n_actions(t) - 1;
    double start = cpu_now(), wall = wall_now(), elapsed = 0;
    while (elapsed < seconds) {
        for (int k = 0; k < DRAWS; k++) {
            if (stop || len == bc_task_limit(t)) {
                for (int32_t i = 0; i < n; i++)
                    u[i] = uniform(&rng);
                bc_task_initial_at(t, u, x);
                len = 0;
            }
            int32_t a = n > 1 && x[1] < 0 ? 0 : forward; /* push along the velocity */
            if (bc_task_step(t, x, a, noise[k], y, &r, &stop) < 0) {
                fprintf(stderr, "formula_speed: a step failed\n");
                exit(2);
            }
            sum += r;
            memcpy(x, y, (size_t)n * sizeof *x);
            formulas += per_step + (stop && t->has_stop_reward);
            steps++;
            len++;
        }
        elapsed = cpu_now() - start;
    }
    if (sum == 12345.678)
        puts(""); /* keeps the rewards alive */
    *wall_rate = (double)formulas / (wall_now() - wall);
    return (double)formulas / elapsed;
}

/* The `next` programs alone over a stored trajectory; formula evaluations per second. */
static double formula_only(const bc_task *t, double seconds)
{
    enum { STATES = 4096 };
    int32_t n = t->n_vars;
    double *slots = malloc(STATES * BC__SLOTS_MAX * sizeof *slots), x[BC_TASK_MAX_VARS], u[BC_TASK_MAX_VARS];
    uint64_t rng = 2463534242ULL;
    for (int k = 0; k < STATES; k++) {
        double *s = slots + (size_t)k * BC__SLOTS_MAX;
        for (int32_t i = 0; i < n; i++)
            u[i] = uniform(&rng);
        bc_task_initial_at(t, u, x);
        for (int32_t i = 0; i < n; i++)
            s[i] = s[n + i] = x[i] + 0.01 * (uniform(&rng) - 0.5);
        s[2 * n] = t->action_value[k % t->n_actions];
        for (int32_t j = 0; j < t->n_noise; j++)
            s[2 * n + 1 + j] = bc_task_noise_at(t, j, 0.5);
    }
    long long evals = 0;
    double sum = 0, start = cpu_now(), elapsed = 0;
    while (elapsed < seconds) {
        for (int k = 0; k < STATES; k++)
            for (int32_t f = 0; f < t->n_next; f++)
                sum += bc__program_eval(&t->next[f], slots + (size_t)k * BC__SLOTS_MAX);
        evals += (long long)STATES * t->n_next;
        elapsed = cpu_now() - start;
    }
    if (sum == 12345.678)
        puts("");
    free(slots);
    return (double)evals / elapsed;
}

int main(int argc, char **argv)
{
    const char *path = argc > 1 ? argv[1] : "models/crater-rover.task";
    double seconds = argc > 2 ? atof(argv[2]) : 2;
    if (seconds <= 0)
        seconds = 2;
    bc_diag d;
    bc_diag_init(&d);
    bc_task *t = bc_task_read_file(path, &d);
    bc_diag_print(&d, stderr);
    bc_diag_free(&d);
    if (!t)
        return 2;
    double wall_rate, dyn = dynamics(t, seconds, &wall_rate), raw = formula_only(t, seconds);
    int per_step = t->n_next + t->has_stop + 1;
    printf("{\"task\": \"%s\", \"formulas_per_step\": %d, \"formula_steps_per_cpu_s\": %.0f, "
           "\"task_steps_per_cpu_s\": %.0f, \"formula_steps_per_wall_s\": %.0f, "
           "\"next_formulas_alone_per_cpu_s\": %.0f, \"goal\": 20000000}\n",
           path, per_step, dyn, dyn / per_step, wall_rate, raw);
    bc_task_free(t);
    return 0;
}
