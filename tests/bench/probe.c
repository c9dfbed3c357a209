/* probe.c — the benchmark's measuring tool: memory bandwidth (triad), parse speed, sweep time, and the model's arrays for the baseline. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * usage: probe stream [MIB]           triad bandwidth over 3 arrays of MIB MiB
 *                                     each (default 256), one line of JSON
 *        probe model FILE [DUMP]      parse and sweep figures of FILE, one line
 *                                     of JSON; with DUMP, the model's arrays as
 *                                     raw files DUMP.* for tests/bench/baseline.py
 *        probe run RESULT CMD ARGS... runs CMD (a path), writes its wall time,
 *                                     peak memory and exit status to RESULT
 *
 * The triad a[i] = b[i] + q c[i] is the one of McCalpin's STREAM benchmark
 * (common practice): 24 bytes per element (two reads, one write) over arrays
 * far larger than the last-level cache; the best of several passes counts,
 * as in STREAM.
 *
 * A sweep is one Jacobi application of the Bellman operator by the solvers'
 * own kernel (solvers/sweep.c), on one thread; the bytes it must move come
 * from the same file, so the limit and the kernel describe one layout.  The
 * median of 7 sweeps is reported.  Parsing is timed as bc_read_bell_text on
 * a buffer already in memory, the median of `BENCH_PARSE_REPEAT` (default 3)
 * runs.
 */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/resource.h>
#include <sys/wait.h>
#include <time.h>
#include <unistd.h>

#include "bellcheck.h"
#include "solver_internal.h"
#include "sweep_internal.h"

static double now(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

static double cpu_now(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_PROCESS_CPUTIME_ID, &ts);
    return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

static int cmp_double(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

static double median(double *x, int n)
{
    qsort(x, (size_t)n, sizeof *x, cmp_double);
    return n % 2 ? x[n / 2] : (x[n / 2 - 1] + x[n / 2]) / 2;
}

static int stream(size_t mib)
{
    size_t n = mib * 1024 * 1024 / sizeof(double);
    double *a = malloc(n * sizeof *a), *b = malloc(n * sizeof *b), *c = malloc(n * sizeof *c);
    if (!a || !b || !c) {
        fprintf(stderr, "probe: out of memory for the triad\n");
        return 1;
    }
    for (size_t i = 0; i < n; i++)
        a[i] = 0.0, b[i] = 1.0, c[i] = 2.0;
    double best = 1e30;
    for (int rep = 0; rep < 7; rep++) {
        double t0 = now(), q = 3.0 + rep;
        for (size_t i = 0; i < n; i++)
            a[i] = b[i] + q * c[i];
        double t = now() - t0;
        best = t < best ? t : best;
    }
    /* printing an element keeps the loop from being optimised away */
    printf("{\"triad_bytes\": %zu, \"triad_seconds\": %.6g, \"bandwidth_gbs\": %.4g, \"probe\": %g}\n",
           3 * n * sizeof(double), best, 3.0 * (double)n * sizeof(double) / best / 1e9, a[n / 2]);
    free(a), free(b), free(c);
    return 0;
}

static int write_array(const char *prefix, const char *what, const void *p, size_t n, size_t sz)
{
    char path[4096];
    snprintf(path, sizeof path, "%s.%s", prefix, what);
    FILE *f = fopen(path, "wb");
    if (!f || fwrite(p, sz, n, f) != n || fclose(f) != 0) {
        fprintf(stderr, "probe: cannot write %s\n", path);
        return -1;
    }
    return 0;
}

/* The model's arrays as raw native-endian files; rewards in the solvers'
 * maximising sign, so the baseline always maximises. */
static int dump(const bc_model *m, const char *prefix)
{
    double *r = malloc((size_t)(m->n_pairs ? m->n_pairs : 1) * sizeof *r);
    if (!r)
        return -1;
    for (int64_t p = 0; p < m->n_pairs; p++)
        r[p] = bc_sv_reward(m, bc_sv_sign(m), p);
    int32_t init = 0;
    for (int32_t s = 0; s < m->n_states; s++)
        if (m->initial[s] > m->initial[init])
            init = s;
    char meta[256];
    int n = snprintf(meta, sizeof meta,
                     "{\"n_states\": %d, \"n_pairs\": %lld, \"n_trans\": %lld, \"discount\": %.17g, "
                     "\"sign\": %g, \"initial_state\": %d}\n",
                     (int)m->n_states, (long long)m->n_pairs, (long long)m->n_trans, m->discount,
                     bc_sv_sign(m), (int)init);
    int rc = write_array(prefix, "meta", meta, (size_t)n, 1) |
             write_array(prefix, "spstart", m->state_pair_start, (size_t)m->n_states + 1, 8) |
             write_array(prefix, "tstart", m->pair_trans_start, (size_t)m->n_pairs + 1, 8) |
             write_array(prefix, "succ", m->succ_state, (size_t)m->n_trans, 4) |
             write_array(prefix, "prob", m->prob, (size_t)m->n_trans, 8) |
             write_array(prefix, "reward", r, (size_t)m->n_pairs, 8) |
             write_array(prefix, "initial", m->initial, (size_t)m->n_states, 8);
    free(r);
    return rc;
}

static int model(const char *path, const char *prefix)
{
    bc_diag d;
    bc_diag_init(&d);
    char *buf;
    size_t len;
    if (bc_read_file(path, &buf, &len, &d) < 0) {
        bc_diag_print(&d, stderr);
        return 1;
    }
    const char *rep_env = getenv("BENCH_PARSE_REPEAT");
    int reps = rep_env ? atoi(rep_env) : 3;
    reps = reps < 1 ? 1 : reps > 15 ? 15 : reps;
    double times[15], cpu[15];
    bc_model *m = NULL;
    for (int k = 0; k < reps; k++) {
        bc_model_free(m);
        double t0 = now(), c0 = cpu_now();
        m = bc_read_bell_text(buf, len, path, &d);
        times[k] = now() - t0;
        cpu[k] = cpu_now() - c0;
        if (!m) {
            bc_diag_print(&d, stderr);
            return 1;
        }
    }
    free(buf);
    double parse = median(times, reps), parse_cpu = median(cpu, reps);
    size_t n = (size_t)m->n_states;
    double *v = calloc(n ? n : 1, sizeof *v), *tv = malloc((n ? n : 1) * sizeof *tv);
    if (!v || !tv)
        return 1;
    bc__sweep_stat st;
    double sw[7];
    for (int k = 0; k < 8; k++) { /* the first sweep warms the cache and is not counted */
        double t0 = now();
        bc__sweep_jacobi(m, bc_sv_sign(m), v, tv, NULL, 1, &st);
        if (k > 0)
            sw[k - 1] = now() - t0;
        for (size_t s = 0; s < n; s++)
            v[s] = tv[s];
    }
    printf("{\"bytes\": %zu, \"parse_seconds\": %.6g, \"parse_cpu_seconds\": %.6g, "
           "\"n_states\": %d, \"n_pairs\": %lld, "
           "\"n_trans\": %lld, \"sweep_bytes\": %.0f, \"sweep_seconds\": %.6g}\n",
           len, parse, parse_cpu, (int)m->n_states, (long long)m->n_pairs, (long long)m->n_trans,
           bc__sweep_bytes(m), median(sw, 7));
    int rc = prefix && dump(m, prefix) < 0;
    free(v), free(tv);
    bc_model_free(m);
    bc_diag_free(&d);
    return rc;
}

/* Runs argv[0..] as a child and writes its wall time, peak resident memory
 * and exit status as one line of JSON to result.  The child is forked from
 * this small process on purpose: Linux carries a process's peak resident
 * size across exec, so a child spawned from a large parent (the Python
 * driver) would report the parent's size. */
static int run_child(const char *result, char **argv)
{
    double t0 = now();
    pid_t pid = fork();
    if (pid < 0)
        return 1;
    if (pid == 0) {
        execv(argv[0], argv);
        _exit(127);
    }
    int status;
    struct rusage ru; /* this process has had only this one child */
    if (waitpid(pid, &status, 0) != pid || getrusage(RUSAGE_CHILDREN, &ru) != 0)
        return 1;
    double wall = now() - t0;
    FILE *f = fopen(result, "w");
    if (!f)
        return 1;
    fprintf(f, "{\"seconds\": %.6g, \"peak_bytes\": %.0f, \"status\": %d}\n", wall,
            (double)ru.ru_maxrss * 1024.0, WIFEXITED(status) ? WEXITSTATUS(status) : 128);
    return fclose(f) != 0;
}

int main(int argc, char **argv)
{
    if (argc >= 4 && !strcmp(argv[1], "run"))
        return run_child(argv[2], argv + 3);
    if (argc >= 2 && !strcmp(argv[1], "stream"))
        return stream(argc >= 3 ? (size_t)atol(argv[2]) : 256);
    if (argc >= 3 && !strcmp(argv[1], "model"))
        return model(argv[2], argc >= 4 ? argv[3] : NULL);
    fputs("usage: probe stream [MIB] | probe model FILE [DUMP-PREFIX] | probe run RESULT CMD...\n",
          stderr);
    return 2;
}
