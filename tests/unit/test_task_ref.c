/* test_task_ref.c — the formula engine against a published benchmark: the under-powered car, step by step, computed independently in Python. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Reference: the under-powered car of A. Moore (1990), with the dynamics as
 * given by R. S. Sutton & A. G. Barto, Reinforcement Learning: An
 * Introduction, 2nd ed. (2018), Section 10.1 (written from memory).  The
 * task file tests/tasks/underpowered-car.task states them as formulas;
 * tests/tools/underpowered_car.py computes the same trajectories in plain
 * Python (math.cos, min/max), independently of the code under test.  Both
 * follow "throttle along the velocity" from the same starts; every step's
 * x', v' and stop flag must agree (to 1e-15: the operations are the same, so
 * in practice they agree exactly).
 */
#include "bellcheck.h"
#include "unit.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define N_STARTS 4
static const double starts[N_STARTS][2] = {
    {-0.5, 0.0},   /* the bottom of the valley, at rest */
    {-0.6, 0.0},
    {-1.0, -0.05}, /* heading into the left wall: the velocity reset */
    {0.3, 0.04},   /* close to the goal */
};

int main(void)
{
    bc_diag d;
    bc_diag_init(&d);
    bc_task *t = bc_task_read_file("tests/tasks/underpowered-car.task", &d);
    bc_diag_print(&d, stdout);
    bc_diag_free(&d);
    CHECK(t != NULL, "underpowered car: the task reads");
    if (!t)
        UNIT_DONE();
    char cmd[600];
    int n = snprintf(cmd, sizeof cmd, "/usr/bin/python3 tests/tools/underpowered_car.py");
    for (int e = 0; e < N_STARTS; e++)
        n += snprintf(cmd + n, sizeof cmd - (size_t)n, " %.17g %.17g", starts[e][0], starts[e][1]);
    FILE *py = popen(cmd, "r");
    CHECK(py != NULL, "underpowered car: the Python reference runs");
    if (!py)
        UNIT_DONE();
    int32_t reverse = 0, forward = 2; /* action order of the file: reverse, zero, forward */
    long steps = 0, mismatches = 0, resets = 0, goals = 0, lines_ok = 1;
    double worst = 0;
    for (int e = 0; e < N_STARTS && lines_ok; e++) {
        double x[2] = {starts[e][0], starts[e][1]}, y[2], r;
        int stop = 0;
        for (int k = 0; k < 1000 && !stop; k++) {
            int32_t a = x[1] >= 0 ? forward : reverse;
            if (bc_task_step(t, x, a, NULL, y, &r, &stop) < 0) {
                mismatches++;
                break;
            }
            int pe, pk, pstop;
            double px, pv;
            if (fscanf(py, "%d %d %lf %lf %d", &pe, &pk, &px, &pv, &pstop) != 5 || pe != e || pk != k) {
                lines_ok = 0;
                break;
            }
            double diff = fmax(fabs(px - y[0]), fabs(pv - y[1]));
            worst = fmax(worst, diff);
            if (diff > 1e-15 || pstop != stop || r != -1)
                mismatches++;
            resets += y[0] == -1.2 && y[1] == 0;
            goals += stop;
            steps++;
            x[0] = y[0], x[1] = y[1];
        }
    }
    int status = pclose(py);
    CHECK(status == 0 && lines_ok, "underpowered car: Python printed every step of every episode");
    CHECK(steps > 200 && mismatches == 0, "underpowered car: every step agrees with the reference "
                                          "(x', v' within 1e-15, same stop)");
    printf("# %ld steps compared, largest difference %.3g\n", steps, worst);
    CHECK(resets > 0, "underpowered car: the left-wall reset (v' = 0) was exercised");
    CHECK(goals == N_STARTS, "underpowered car: every episode reached the goal at x >= 0.5");
    bc_task_free(t);
    UNIT_DONE();
}
