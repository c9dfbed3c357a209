/* qlearn.c — the example pipeline's learner: tabular Q-learning on a grid over a continuous task, saving the table as .npy. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * usage: rover-qlearn TASK CELLS OUT.npy [--episodes N] [--seed S] [--alpha A] [--epsilon E]
 *
 * A deliberately small learner of the kind bellcheck grades: one-step
 * Q-learning (Watkins 1989; Sutton and Barto, Reinforcement Learning, 2nd ed.,
 * 2018, section 6.5) with epsilon-greedy exploration, on the cells of a grid
 * laid over the task.  It learns from the task's own dynamics (bc_task_step),
 * never from a grid model, so its table is an approximation that `bellcheck
 * score` can measure against the grid's proven optimum and `bellcheck
 * rollout` can simulate.  The only part of libbellcheck it uses is the task
 * API: reading the task, one step, the grid lookup.
 *
 * The table is written as NPY 1.0, little-endian float64, shape
 * (N1, ..., Nk, actions), in the task's own sign (costs for objective min),
 * through a temporary file renamed into place.
 */
#include "bellcheck.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

typedef struct {
    const char *task_path, *cells, *out;
    long episodes;
    unsigned long long seed;
    double alpha, epsilon;
} options;

/* xorshift64* (Vigna 2016): the learner's own random numbers. */
static uint64_t rng_state;

static double uniform01(void)
{
    rng_state ^= rng_state >> 12;
    rng_state ^= rng_state << 25;
    rng_state ^= rng_state >> 27;
    return (double)((rng_state * 0x2545F4914F6CDD1DULL) >> 11) * 0x1.0p-53;
}

static int parse(int argc, char **argv, options *o)
{
    o->episodes = 3000;
    o->seed = 1;
    o->alpha = 0.1;
    o->epsilon = 0.1;
    int pos = 0;
    for (int i = 1; i < argc; i++) {
        const char *a = argv[i];
        char *end = NULL;
        if (!strcmp(a, "--episodes") && i + 1 < argc)
            o->episodes = strtol(argv[++i], &end, 10);
        else if (!strcmp(a, "--seed") && i + 1 < argc)
            o->seed = strtoull(argv[++i], &end, 10);
        else if (!strcmp(a, "--alpha") && i + 1 < argc)
            o->alpha = strtod(argv[++i], &end);
        else if (!strcmp(a, "--epsilon") && i + 1 < argc)
            o->epsilon = strtod(argv[++i], &end);
        else if (a[0] == '-' && a[1] == '-')
            return -1;
        else if (pos == 0)
            o->task_path = a, pos++;
        else if (pos == 1)
            o->cells = a, pos++;
        else if (pos == 2)
            o->out = a, pos++;
        else
            return -1;
        if (end && *end)
            return -1;
    }
    if (pos != 3 || o->episodes < 1 || !(o->alpha > 0 && o->alpha <= 1) ||
        !(o->epsilon >= 0 && o->epsilon <= 1))
        return -1;
    return 0;
}

/* The best action of cell c in the maximising sense (q holds sign * Q). */
static int32_t greedy(const double *q, int32_t n_actions)
{
    int32_t best = 0;
    for (int32_t a = 1; a < n_actions; a++)
        if (q[a] > q[best])
            best = a;
    return best;
}

/* One episode of Q-learning; returns its undiscounted return. */
static double episode(const bc_task *t, const bc_grid *g, double *q, const options *o, double sgn)
{
    int32_t nv = bc_task_n_vars(t), na = bc_task_n_actions(t), nn = bc_task_n_noise(t);
    double u[BC_TASK_MAX_VARS], x[BC_TASK_MAX_VARS], y[BC_TASK_MAX_VARS];
    double noise[BC_TASK_MAX_NOISE], gamma = bc_task_discount(t), total = 0;
    for (int32_t i = 0; i < nv; i++)
        u[i] = uniform01();
    bc_task_initial_at(t, u, x);
    int64_t c = bc_grid_cell(g, x);
    for (int64_t step = 0; step < bc_task_limit(t); step++) {
        int32_t a = uniform01() < o->epsilon ? (int32_t)(uniform01() * na) : greedy(q + c * na, na);
        for (int32_t k = 0; k < nn; k++)
            noise[k] = bc_task_noise_at(t, k, (uniform01() * 0x1.0p53 + 0.5) * 0x1.0p-53);
        double r;
        int stop;
        if (bc_task_step(t, x, a, nn ? noise : NULL, y, &r, &stop) < 0)
            return NAN;
        int64_t c2 = bc_grid_cell(g, y);
        double target = sgn * r + (stop ? 0.0 : gamma * q[c2 * na + greedy(q + c2 * na, na)]);
        q[c * na + a] += o->alpha * (target - q[c * na + a]);
        total += r;
        if (stop)
            break;
        memcpy(x, y, (size_t)nv * sizeof *x);
        c = c2;
    }
    return total;
}

/* Writes q (n_cells x actions, in the task's sign) as NPY 1.0 float64 of shape (cells..., actions). */
static int write_npy(const char *path, const bc_grid *g, const double *q, int32_t na, double sgn)
{
    char shape[256], header[512], tmp[4096];
    size_t n = 0;
    for (int32_t j = 0; j < g->n_dims; j++)
        n += (size_t)snprintf(shape + n, sizeof shape - n, "%d, ", (int)g->cells[j]);
    snprintf(shape + n, sizeof shape - n, "%d", (int)na);
    int len = snprintf(header, sizeof header, "{'descr': '<f8', 'fortran_order': False, 'shape': (%s), }", shape);
    int total = 10 + len + 1, pad = (64 - total % 64) % 64; /* magic+version+length, header, newline */
    memset(header + len, ' ', (size_t)pad);
    header[len + pad] = '\n';
    len += pad + 1;
    if (strlen(path) + 5 > sizeof tmp)
        return -1;
    snprintf(tmp, sizeof tmp, "%s.tmp", path);
    FILE *f = fopen(tmp, "wb");
    if (!f)
        return -1;
    unsigned char pre[10] = {0x93, 'N', 'U', 'M', 'P', 'Y', 1, 0, (unsigned char)(len & 0xff),
                             (unsigned char)(len >> 8)};
    int ok = fwrite(pre, 1, 10, f) == 10 && fwrite(header, 1, (size_t)len, f) == (size_t)len;
    for (int64_t i = 0; ok && i < g->n_cells * na; i++) {
        double v = sgn * q[i]; /* the host is little-endian (checked in main) */
        ok = fwrite(&v, sizeof v, 1, f) == 1;
    }
    ok = (fclose(f) == 0) && ok;
    if (!ok || rename(tmp, path) != 0) {
        remove(tmp);
        return -1;
    }
    return 0;
}

int main(int argc, char **argv)
{
    options o = {0};
    const uint16_t probe = 1;
    if (*(const unsigned char *)&probe != 1) {
        fputs("rover-qlearn: this example writes little-endian NPY and needs a little-endian host\n", stderr);
        return 2;
    }
    if (parse(argc, argv, &o) < 0) {
        fputs("usage: rover-qlearn TASK CELLS OUT.npy [--episodes N] [--seed S] [--alpha A] "
              "[--epsilon E]\n", stderr);
        return 2;
    }
    bc_diag d;
    bc_diag_init(&d);
    bc_task *t = bc_task_read_file(o.task_path, &d);
    bc_grid_opts go;
    bc_grid_opts_default(&go);
    const char *why = NULL;
    bc_grid g;
    if (t && bc_grid_parse_cells(o.cells, &go, &why) < 0)
        bc_diag_add(&d, BC_ERROR, NULL, 0, 0, "cells '%s': %s", o.cells, why);
    int ok = t && !why && bc_grid_init(&g, t, &go, &d) == 0;
    bc_diag_print(&d, stderr);
    bc_diag_free(&d);
    if (!ok) {
        bc_task_free(t);
        return 2;
    }
    int32_t na = bc_task_n_actions(t);
    double sgn = bc_task_objective(t) == BC_MIN ? -1.0 : 1.0, recent = 0;
    double *q = calloc((size_t)(g.n_cells * na), sizeof *q); /* 0: optimistic when rewards are costs */
    rng_state = o.seed * 0x9E3779B97F4A7C15ULL + 1;
    for (long e = 0; q && e < o.episodes; e++) {
        double ret = episode(t, &g, q, &o, sgn);
        if (isnan(ret)) {
            fputs("rover-qlearn: a step of the task failed (NaN or infinity)\n", stderr);
            ok = 0;
            break;
        }
        if (e >= o.episodes - 100)
            recent += ret / (o.episodes < 100 ? o.episodes : 100);
    }
    if (q && ok && write_npy(o.out, &g, q, na, sgn) == 0)
        printf("rover-qlearn: %ld episodes (seed %llu); mean return of the last %ld while "
               "exploring: %.1f; table (%s, %d actions) written to %s\n", o.episodes, o.seed,
               o.episodes < 100 ? o.episodes : 100, recent, o.cells, (int)na, o.out);
    else if (ok) {
        fprintf(stderr, "rover-qlearn: cannot write %s\n", o.out);
        ok = 0;
    }
    free(q);
    bc_task_free(t);
    return ok ? 0 : 1;
}
