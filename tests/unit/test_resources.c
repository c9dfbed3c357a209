/* test_resources.c — bounds that protect against hostile input and runaway work: the memory limit, stop requests, the task reader's size. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#define _GNU_SOURCE /* MAP_ANONYMOUS, MAP_NORESERVE */
/*
 * Expected values are worked out by hand from docs/limits.md (the memory
 * estimates: 17 bytes per state, 24 per state-action pair, 12 per
 * transition; 16 bytes per transition and per pair for the interval
 * enclosures; 16 bytes per entry of a dense exact matrix).
 */
#include "bellcheck.h"
#include "unit.h"

#include <stdint.h>
#include <string.h>
#include <sys/mman.h>

/* Puterman (1994), the two-state example (from memory): V* = -60/7 at s1, -20 at s2. */
static const char two_state[] = "bell 1\n"
                                "discount 0.95\n"
                                "states s1 s2\n"
                                "s1 a11 5 -> s1 1/2 s2 1/2\n"
                                "s1 a12 10 -> s2\n"
                                "s2 a21 -1 -> s2\n";

/* A task of two variables (invented), for the grid builder. */
static const char task_text[] = "discount 0.9\n"
                                "state x 0 1\n"
                                "state y 0 1\n"
                                "action u = {left: -1, right: 1}\n"
                                "next x = x + 0.1*u\n"
                                "next y = y\n"
                                "reward -1\n"
                                "initial x = 0.5\n"
                                "initial y = 0.5\n";

static int has(const bc_diag *d, const char *text)
{
    for (int i = 0; i < d->n; i++)
        if (d->items[i].message && strstr(d->items[i].message, text))
            return 1;
    return 0;
}

static void memory_estimates(void)
{
    CHECK(bc_model_bytes_min(10, 20, 30) == 10 * 17 + 20 * 24 + 30 * 12,
          "model bytes: 17 per state, 24 per pair, 12 per transition");
    CHECK(bc_model_bytes_min(INT64_MAX, INT64_MAX, INT64_MAX) == UINT64_MAX,
          "model bytes saturate instead of wrapping");
    char buf[300];
    bc_memory_limit_set(0);
    CHECK(bc_memory_refused(0, UINT64_MAX, "x", buf, sizeof buf) == 0, "no limit: nothing is refused");
    bc_memory_limit_set(1024);
    CHECK(bc_memory_limit_get() == 1024, "the process-wide limit reads back");
    CHECK(bc_memory_refused(0, 1024, "x", buf, sizeof buf) == 0, "the limit itself fits");
    CHECK(bc_memory_refused(0, 1025, "holding x", buf, sizeof buf) == 1 &&
              strstr(buf, "holding x needs 1.0 KiB, more than the memory limit of 1.0 KiB "
                          "(--max-memory)") != NULL,
          "one byte more is refused, naming the option");
    CHECK(bc_memory_refused(2048, 2000, "x", buf, sizeof buf) == 0,
          "an explicit limit replaces the process-wide one");
    bc_diag d;
    bc_diag_init(&d);
    CHECK(bc_diag_memory_refused(&d, "f", 5000, "y") == 1 && d.n_errors == 1,
          "a diagnostics list without its own limit uses the process-wide one");
    bc_diag_free(&d);
    bc_memory_limit_set(0);
}

/* 2x2 cells, 2 actions, 4 sample points per cell: 5 states counted (the cells and a `stop`),
 * 8 pairs, at least 8 transitions,
 * 4 evaluations of 24 bytes: 85 + 192 + 96 + 96 = 469 bytes. */
static void grid_limit(void)
{
    bc_diag d;
    bc_diag_init(&d);
    bc_task *t = bc_task_read_text(task_text, sizeof task_text - 1, "t.task", &d);
    CHECK(t != NULL, "the test task reads");
    if (!t)
        return;
    bc_grid_opts o;
    bc_grid_opts_default(&o);
    const char *why;
    CHECK(bc_grid_parse_cells("2x2", &o, &why) == 0, "2x2 cells");
    o.samples = 4;
    d.max_memory = 468;
    bc_model *m = bc_grid_model(t, &o, &d);
    CHECK(m == NULL && has(&d, "needs 469 bytes, more than the memory limit of 468 bytes"),
          "a grid model one byte over the limit is refused before building");
    bc_diag_free(&d);
    bc_diag_init(&d);
    d.max_memory = 469;
    m = bc_grid_model(t, &o, &d);
    CHECK(m != NULL && m->n_states == 4 && m->n_pairs == 8, "at the limit the grid model is built");
    bc_model_free(m);
    bc_diag_free(&d);

    bc_diag_init(&d);
    bc_stop_request();
    m = bc_grid_model(t, &o, &d);
    bc_stop_clear();
    CHECK(m == NULL && has(&d, "stopped on request") && d.n_errors == 1,
          "a stop request ends the grid build with one error");
    bc_diag_free(&d);
    bc_task_free(t);
}

/* Interval enclosures of the two-state model: 4 transitions and 3 pairs, 16 bytes each = 112. */
static void prover_limits(void)
{
    bc_model *m = unit_read_model(two_state);
    CHECK(m != NULL, "the two-state model reads");
    if (!m)
        return;
    bc_solve_opts so;
    bc_solve_opts_default(&so);
    bc_prove_opts po;
    bc_prove_opts_default(&po);
    po.mode = BC_PROVE_INTERVAL;
    bc_solution sol;
    bc_solution_init(&sol);
    bc_proof_result pr;
    memset(&pr, 0, sizeof pr);
    CHECK(bc_solve(m, BC_METHOD_VI, &so, &sol) == BC_SOLVE_OK, "the two-state model solves");
    bc_memory_limit_set(111);
    int rc = bc_prove_solution(m, &sol, &po, &pr);
    CHECK(rc == 0 && pr.value.kind == BC_PROOF_NONE && strstr(pr.message, "needs 112 bytes") &&
              strstr(pr.message, "--max-memory"),
          "the interval proof is refused one byte over the limit, and says so");
    bc_proof_result_free(&pr);
    memset(&pr, 0, sizeof pr);
    bc_memory_limit_set(112);
    rc = bc_prove_solution(m, &sol, &po, &pr);
    CHECK(rc == 0 && pr.value.kind == BC_PROOF_INTERVAL, "at the limit the interval proof is made");
    bc_proof_result_free(&pr);
    memset(&pr, 0, sizeof pr);

    /* Exact, dense lifting forced: 2 equations, 4 entries of 16 bytes = 64 bytes. */
    po.mode = BC_PROVE_EXACT;
    po.exact.solver = BC_EXACT_LU_DENSE;
    bc_memory_limit_set(63);
    rc = bc_prove_solution(m, &sol, &po, &pr);
    CHECK(rc < 0 && strstr(pr.message, "dense lifting") && strstr(pr.message, "needs 64 bytes"),
          "dense exact evaluation is refused one byte over the limit");
    bc_proof_result_free(&pr);
    memset(&pr, 0, sizeof pr);
    bc_memory_limit_set(64);
    rc = bc_prove_solution(m, &sol, &po, &pr);
    CHECK(rc == 0 && pr.value.kind == BC_PROOF_EXACT, "at the limit the dense exact proof is made");
    bc_proof_result_free(&pr);
    bc_memory_limit_set(0);
    bc_solution_free(&sol);
    bc_model_free(m);
}

/* A task file of 2 GiB or more is refused before a line is counted (positions are
 * 32-bit).  The bytes are an untouched anonymous mapping: no memory is used. */
static void task_size(void)
{
    size_t len = (size_t)INT32_MAX + 16;
    void *p = mmap(NULL, len, PROT_READ, MAP_PRIVATE | MAP_ANONYMOUS | MAP_NORESERVE, -1, 0);
    if (p == MAP_FAILED) {
        printf("NOTE no 2 GiB address range for the task-size check\n");
        return;
    }
    bc_diag d;
    bc_diag_init(&d);
    bc_task *t = bc_task_read_text(p, len, "huge.task", &d);
    CHECK(t == NULL && d.n_errors == 1 && has(&d, "smaller than 2 GiB"),
          "a task file of 2 GiB is refused by its size");
    bc_diag_free(&d);
    munmap(p, len);
}

int main(void)
{
    memory_estimates();
    grid_limit();
    prover_limits();
    task_size();
    UNIT_DONE();
}
