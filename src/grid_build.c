/* grid_build.c — the finite model of a task on a grid: the three schemes (sample, center, interp) fed to the builder with exact probabilities and rewards. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Every state-action pair is computed from a fixed set of evaluation points,
 * nothing is random (the seed plays no part):
 *  - sample: m points per axis at the midpoints of an m x ... x m sub-grid
 *    of the cell; the successor probabilities are count/N exactly, N the
 *    number of evaluations;
 *  - center: the cell's centre alone;
 *  - interp: the cell's centre is the node; the image of the node is spread
 *    over the corners of the Kuhn simplex of the node grid that holds it
 *    (nodes are the cells' centres, so all schemes share states and a
 *    Q-table's shape), with the barycentric weights as probabilities.  The
 *    weights are rounded to multiples of 2^-30 by the largest-remainder rule,
 *    so they are exact dyadic rationals that sum to exactly 1.  An image
 *    outside the box of nodes (within half a cell of the range's edge) is
 *    moved onto the box first.
 * Noise is integrated by stratified sampling in probability: each noise
 * variable's distribution is cut into M strata of probability 1/M, each
 * represented by its median (the quantile at (j + 1/2)/M), and every point
 * is evaluated under every combination of strata.
 *
 * An image that stops goes to the one terminal state `stop`.  The reward of
 * a pair is the exact mean, over its evaluations, of each evaluation's
 * reward written as the shortest decimal that reads back as the same double.
 */
#include "task_internal.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define WEIGHT_BITS 30 /* interp weights are multiples of 2^-WEIGHT_BITS */

typedef struct {
    const bc_task *t;
    bc_grid g;
    bc_scheme scheme;
    bc_diag *d;
    bc_builder *b;
    int32_t n_combos;   /* noise strata combinations */
    double *noise;      /* [n_combos * n_noise] */
    int32_t n_points;   /* evaluation points per cell */
    int64_t *succ;      /* [n_points * n_combos] successor of each evaluation (n_cells = stop) */
    int64_t *count;     /* [n_points * n_combos] evaluations per distinct successor */
    double *reward;     /* [n_points * n_combos] */
    int64_t *w_succ;    /* interp: successors with their accumulated weights */
    double *w;
    int64_t *w_int;
    int32_t n_w, cap_w;
    int any_stop;
    int have_last;      /* last_num is the exact value of last_reward */
    double last_reward;
    bc_num last_num;
} gb;

static int oom(gb *s)
{
    bc_diag_add(s->d, BC_ERROR, s->t->label, 0, 0, "out of memory while building the grid model");
    return -1;
}

/* The exact value of the shortest decimal that reads back as x. */
static int num_of_double(double x, bc_num *out, bc_bigtab *big)
{
    char text[40];
    for (int prec = 1; prec <= 17; prec++) {
        snprintf(text, sizeof text, "%.*g", prec, x);
        if (strtod(text, NULL) == x)
            break;
    }
    const char *why;
    return bc_num_parse(text, strlen(text), out, big, &why);
}

/* Noise values of every combination of strata: stratum j of M at (j + 1/2) / M. */
static int noise_table(gb *s)
{
    int32_t nn = s->t->n_noise, m = s->g.noise_strata;
    s->n_combos = 1;
    for (int32_t k = 0; k < nn; k++)
        s->n_combos *= m;
    s->noise = malloc((size_t)s->n_combos * (size_t)(nn ? nn : 1) * sizeof *s->noise);
    if (!s->noise)
        return oom(s);
    for (int32_t q = 0; q < s->n_combos; q++) {
        int32_t rest = q;
        for (int32_t k = nn - 1; k >= 0; k--, rest /= m)
            s->noise[(size_t)q * nn + k] = bc_task_noise_at(s->t, k, (rest % m + 0.5) / m);
    }
    return 0;
}

/* Evaluation point p of cell c into x. */
static void point(const gb *s, int64_t c, int32_t p, double *x)
{
    const bc_grid *g = &s->g;
    int32_t m = g->samples_per_axis;
    for (int32_t j = g->n_dims - 1; j >= 0; j--, p /= m) {
        int64_t i = c / g->stride[j] % g->cells[j];
        x[j] = g->low[j] + ((double)i + (p % m + 0.5) / m) * g->width[j];
    }
}

/* One evaluation; writes the image and the outcome; 0 or -1 after reporting. */
static int evaluate(gb *s, const double *x, int32_t a, const double *noise, double *next,
                    double *r, int *stop)
{
    if (bc_task_step(s->t, x, a, noise, next, r, stop) == 0)
        return 0;
    char msg[1400];
    bc_diag_add(s->d, BC_ERROR, s->t->label, 0, 0, "while building the grid: %s",
                bc_task_step_error(s->t, x, a, noise, msg, sizeof msg));
    return -1;
}

/* interp: adds weight w to successor c. */
static int add_weight(gb *s, int64_t c, double w)
{
    for (int32_t k = 0; k < s->n_w; k++)
        if (s->w_succ[k] == c)
            return s->w[k] += w, 0;
    if (s->n_w == s->cap_w) {
        int32_t cap = s->cap_w ? 2 * s->cap_w : 64;
        int64_t *ns = realloc(s->w_succ, (size_t)cap * sizeof *ns);
        if (ns)
            s->w_succ = ns;
        double *nw = realloc(s->w, (size_t)cap * sizeof *nw);
        if (nw)
            s->w = nw;
        int64_t *ni = realloc(s->w_int, (size_t)cap * sizeof *ni);
        if (ni)
            s->w_int = ni;
        if (!ns || !nw || !ni)
            return oom(s);
        s->cap_w = cap;
    }
    s->w_succ[s->n_w] = c;
    s->w[s->n_w++] = w;
    return 0;
}

/* interp: spreads weight `mass` of image y over the Kuhn simplex of the node grid holding it. */
static int spread(gb *s, const double *y, double mass)
{
    const bc_grid *g = &s->g;
    double f[BC_TASK_MAX_VARS];
    int32_t order[BC_TASK_MAX_VARS];
    int64_t corner = 0;
    for (int32_t j = 0; j < g->n_dims; j++) {
        double u = (y[j] - g->low[j]) / g->width[j] - 0.5; /* node coordinate */
        u = u < 0 ? 0 : u > g->cells[j] - 1 ? g->cells[j] - 1 : u;
        int64_t base = (int64_t)u;
        if (base > g->cells[j] - 2)
            base = g->cells[j] > 1 ? g->cells[j] - 2 : 0;
        f[j] = u - (double)base;
        corner += base * g->stride[j];
        int32_t k = j; /* insertion by decreasing f, ties in axis order */
        while (k > 0 && f[order[k - 1]] < f[j]) {
            order[k] = order[k - 1];
            k--;
        }
        order[k] = j;
    }
    double prev = 1;
    for (int32_t k = 0; k < g->n_dims; k++) {
        if (prev - f[order[k]] > 0 && add_weight(s, corner, mass * (prev - f[order[k]])) < 0)
            return -1;
        prev = f[order[k]];
        corner += g->stride[order[k]];
    }
    return prev > 0 ? add_weight(s, corner, mass * prev) : 0;
}

/* Rounds the interp weights to multiples of 2^-WEIGHT_BITS summing to exactly 1
 * (largest remainders first, ties to the earlier successor). */
static void round_weights(gb *s)
{
    const int64_t one = (int64_t)1 << WEIGHT_BITS;
    int64_t sum = 0;
    for (int32_t k = 0; k < s->n_w; k++) {
        s->w_int[k] = (int64_t)floor(s->w[k] * (double)one);
        s->w[k] = s->w[k] * (double)one - (double)s->w_int[k]; /* the remainder */
        sum += s->w_int[k];
    }
    while (sum != one) {
        int32_t best = -1;
        for (int32_t k = 0; k < s->n_w; k++) {
            if (sum > one ? s->w_int[k] == 0 : 0)
                continue;
            if (best < 0 || (sum < one ? s->w[k] > s->w[best] : s->w[k] < s->w[best]))
                best = k;
        }
        int step = sum < one ? 1 : -1;
        s->w_int[best] += step;
        s->w[best] -= step; /* not chosen again before the others */
        sum += step;
    }
}

static int cmp_i64(const void *a, const void *b)
{
    int64_t x = *(const int64_t *)a, y = *(const int64_t *)b;
    return (x > y) - (x < y);
}

static int cmp_double(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

/* Exact mean of reward[0..n) (each as its shortest decimal). */
static int mean_reward(gb *s, int64_t n, bc_num *out)
{
    bc_bigtab *big = bc_builder_bigtab(s->b);
    int64_t same = 1;
    while (same < n && s->reward[same] == s->reward[0])
        same++;
    if (same == n) { /* the common case (a constant reward): one conversion, cached */
        if (!(s->have_last && s->last_reward == s->reward[0])) {
            if (num_of_double(s->reward[0], &s->last_num, big) < 0)
                return oom(s);
            s->last_reward = s->reward[0];
            s->have_last = 1;
        }
        *out = s->last_num;
        return 0;
    }
    qsort(s->reward, (size_t)n, sizeof *s->reward, cmp_double);
    bc_num sum = bc_num_int(0), v, part;
    for (int64_t i = 0; i < n;) {
        int64_t j = i;
        while (j < n && s->reward[j] == s->reward[i])
            j++;
        if (num_of_double(s->reward[i], &v, big) < 0 || bc_num_mul(v, bc_num_int(j - i), &part, big) < 0 ||
            bc_num_add(sum, part, &sum, big) < 0)
            return oom(s);
        i = j;
    }
    return bc_num_div(sum, bc_num_int(n), out, big) < 0 ? oom(s) : 0;
}

/* The name of successor c (a cell, or `stop`). */
static const char *succ_name(const gb *s, int64_t c, char *buf, size_t cap)
{
    if (c == s->g.n_cells)
        return "stop";
    bc_grid_cell_name(&s->g, c, buf, cap);
    return buf;
}

/* Feeds one pair: successors succ[k] with probabilities num[k] / den. */
static int feed_pair(gb *s, int64_t c, int32_t a, bc_num reward, const int64_t *succ,
                     const int64_t *num, int32_t n, int64_t den)
{
    char name[BC_NAME_MAX + 1], sn[BC_NAME_MAX + 1];
    bc_bigtab *big = bc_builder_bigtab(s->b);
    bc_grid_cell_name(&s->g, c, name, sizeof name);
    const char *an = s->t->action_name[a];
    bc_pos at = {0, 0, NULL};
    if (bc_builder_pair_begin(s->b, name, strlen(name), at, an, strlen(an), at, reward) < 0)
        return -1;
    for (int32_t k = 0; k < n; k++) {
        bc_num p;
        if (bc_num_div(bc_num_int(num[k]), bc_num_int(den), &p, big) < 0)
            return oom(s);
        const char *nm = succ_name(s, succ[k], sn, sizeof sn);
        s->any_stop |= succ[k] == s->g.n_cells;
        if (bc_builder_succ(s->b, nm, strlen(nm), &p, NULL, at) < 0)
            return -1;
    }
    return bc_builder_pair_end(s->b, at);
}

/* sample and center: counts of each successor over the evaluations. */
static int counted_pair(gb *s, int64_t c, int32_t a)
{
    double x[BC_TASK_MAX_VARS], y[BC_TASK_MAX_VARS];
    int32_t nn = s->t->n_noise;
    int64_t n = 0;
    for (int32_t p = 0; p < s->n_points; p++) {
        if (s->scheme == BC_SCHEME_CENTER)
            bc_grid_cell_center(&s->g, c, x);
        else
            point(s, c, p, x);
        for (int32_t q = 0; q < s->n_combos; q++, n++) {
            int stop;
            if (evaluate(s, x, a, s->noise + (size_t)q * nn, y, &s->reward[n], &stop) < 0)
                return -1;
            s->succ[n] = stop ? s->g.n_cells : bc_grid_cell(&s->g, y);
        }
    }
    bc_num reward;
    if (mean_reward(s, n, &reward) < 0)
        return -1;
    qsort(s->succ, (size_t)n, sizeof *s->succ, cmp_i64);
    int32_t k = 0;
    for (int64_t i = 0; i < n;) { /* runs of equal successors, compacted in place */
        int64_t j = i;
        while (j < n && s->succ[j] == s->succ[i])
            j++;
        s->succ[k] = s->succ[i];
        s->count[k++] = j - i;
        i = j;
    }
    return feed_pair(s, c, a, reward, s->succ, s->count, k, n);
}

/* interp: the node's image under every noise combination, spread over simplex corners. */
static int interp_pair(gb *s, int64_t c, int32_t a)
{
    double x[BC_TASK_MAX_VARS], y[BC_TASK_MAX_VARS];
    int32_t nn = s->t->n_noise;
    bc_grid_cell_center(&s->g, c, x);
    s->n_w = 0;
    for (int32_t q = 0; q < s->n_combos; q++) {
        int stop;
        if (evaluate(s, x, a, s->noise + (size_t)q * nn, y, &s->reward[q], &stop) < 0)
            return -1;
        double mass = 1.0 / s->n_combos;
        if (stop ? add_weight(s, s->g.n_cells, mass) < 0 : spread(s, y, mass) < 0)
            return -1;
    }
    bc_num reward;
    if (mean_reward(s, s->n_combos, &reward) < 0)
        return -1;
    round_weights(s);
    int32_t k = 0; /* drop weights rounded to 0, then order the successors by index */
    for (int32_t i = 0; i < s->n_w; i++)
        if (s->w_int[i] > 0)
            s->w_succ[k] = s->w_succ[i], s->w_int[k++] = s->w_int[i];
    for (int32_t i = 1; i < k; i++)
        for (int32_t j = i; j > 0 && s->w_succ[j - 1] > s->w_succ[j]; j--) {
            int64_t ts = s->w_succ[j], tw = s->w_int[j];
            s->w_succ[j] = s->w_succ[j - 1], s->w_int[j] = s->w_int[j - 1];
            s->w_succ[j - 1] = ts, s->w_int[j - 1] = tw;
        }
    return feed_pair(s, c, a, reward, s->w_succ, s->w_int, k, (int64_t)1 << WEIGHT_BITS);
}

/* `actions`, `states` (cells in index order, then `stop`) and `terminal`. */
static int declare(gb *s, int after_pairs)
{
    char name[BC_NAME_MAX + 1];
    bc_pos at = {0, 0, NULL};
    if (!after_pairs) {
        if (bc_builder_actions_begin(s->b, at) < 0)
            return -1;
        for (int32_t a = 0; a < s->t->n_actions; a++)
            if (bc_builder_list_add(s->b, s->t->action_name[a], strlen(s->t->action_name[a]), at) < 0)
                return -1;
        return bc_builder_list_end(s->b, at);
    }
    if (bc_builder_states_begin(s->b, at) < 0)
        return -1;
    for (int64_t c = 0; c < s->g.n_cells; c++) {
        bc_grid_cell_name(&s->g, c, name, sizeof name);
        if (bc_builder_list_add(s->b, name, strlen(name), at) < 0)
            return -1;
    }
    if (s->any_stop && bc_builder_list_add(s->b, "stop", 4, at) < 0)
        return -1;
    bc_builder_list_end(s->b, at);
    if (!s->any_stop)
        return 0;
    if (bc_builder_terminal_begin(s->b, at) < 0 || bc_builder_list_add(s->b, "stop", 4, at) < 0)
        return -1;
    return bc_builder_list_end(s->b, at);
}

/* "64x64": the cells per variable. */
static void cells_text(const bc_grid *g, char *buf, size_t cap)
{
    size_t n = 0;
    buf[0] = 0;
    for (int32_t j = 0; j < g->n_dims && n < cap; j++)
        n += (size_t)snprintf(buf + n, cap - n, "%s%d", j ? "x" : "", (int)g->cells[j]);
}

/* Name, discount, objective of the model. */
static int header(gb *s, const bc_grid_opts *o)
{
    const bc_task *t = s->t;
    char label[512], cells[200], extra[120] = "";
    cells_text(&s->g, cells, sizeof cells);
    if (o->scheme == BC_SCHEME_SAMPLE)
        snprintf(extra, sizeof extra, ", %d points per cell", (int)s->n_points);
    if (t->n_noise)
        snprintf(extra + strlen(extra), sizeof extra - strlen(extra), ", %d noise strata per "
                 "variable", (int)s->g.noise_strata);
    const char *base = t->name ? t->name : t->label;
    if (!t->name && strrchr(base, '/'))
        base = strrchr(base, '/') + 1;
    size_t n = t->name ? strlen(base) : strcspn(base, ".");
    if (n > 300) /* room for the rest; cut between characters */
        for (n = 300; n > 0 && ((unsigned char)base[n] & 0xC0) == 0x80; n--)
            ;
    snprintf(label, sizeof label, "%.*s (grid %s, %s%s)", (int)n, base, cells,
             bc_scheme_name(o->scheme), extra);
    char *text = bc_utf8_copy(label, strlen(label)); /* a file name may hold bytes that are not UTF-8 */
    if (!text)
        return oom(s);
    mpq_t q;
    mpq_init(q);
    bc_num_to_mpq(q, t->discount_exact, t->big);
    bc_num g;
    int ok = bc_num_from_mpq(&g, q, bc_builder_bigtab(s->b)) == 0;
    mpq_clear(q);
    bc_pos at = {0, 0, NULL};
    if (!ok) {
        free(text);
        return oom(s);
    }
    int named = bc_builder_name(s->b, text, strlen(text), at);
    free(text);
    if (named < 0 || bc_builder_discount(s->b, g, at) < 0 ||
        bc_builder_objective(s->b, t->objective, at) < 0)
        return -1;
    return 0;
}

static void gb_free(gb *s)
{
    bc_builder_free(s->b);
    free(s->noise);
    free(s->succ);
    free(s->count);
    free(s->reward);
    free(s->w_succ);
    free(s->w);
    free(s->w_int);
}

/* --max-memory, before anything is allocated: the model has a state per cell
 * (and `stop`) and a pair per cell and action, each with one successor at
 * least, so its solver arrays alone need bc_model_bytes_min of those counts;
 * the evaluation buffers come on top.  1 after reporting a refusal. */
static int memory_refused(gb *s)
{
    int64_t pairs = s->g.n_cells * s->t->n_actions;
    uint64_t evals = (uint64_t)s->n_points;
    for (int32_t k = 0; k < s->t->n_noise; k++)
        evals *= (uint64_t)s->g.noise_strata; /* at most GRID_MAX_POINTS (grid.c) */
    uint64_t bytes = bc_model_bytes_min(s->g.n_cells + 1, pairs, pairs) + evals * 24;
    char what[400], cells[200];
    cells_text(&s->g, cells, sizeof cells);
    snprintf(what, sizeof what, "the grid model of %s cells (%lld cells x %d actions, counting one "
             "successor each)", cells, (long long)s->g.n_cells, (int)s->t->n_actions);
    return bc_diag_memory_refused(s->d, s->t->label, bytes, what);
}

bc_model *bc_grid_model(const bc_task *t, const bc_grid_opts *o, bc_diag *d)
{
    gb s;
    memset(&s, 0, sizeof s);
    s.t = t;
    s.d = d;
    s.scheme = o->scheme;
    if (bc_grid_init(&s.g, t, o, d) < 0)
        return NULL;
    s.n_points = 1;
    for (int32_t j = 0; o->scheme == BC_SCHEME_SAMPLE && j < s.g.n_dims; j++)
        s.n_points *= s.g.samples_per_axis;
    if (memory_refused(&s))
        return NULL;
    s.b = bc_builder_new(t->label, d);
    if (!s.b || noise_table(&s) < 0) {
        if (!s.b)
            oom(&s);
        gb_free(&s);
        return NULL;
    }
    size_t evals = (size_t)s.n_points * (size_t)s.n_combos;
    s.succ = malloc(evals * sizeof *s.succ);
    s.count = malloc(evals * sizeof *s.count);
    s.reward = malloc(evals * sizeof *s.reward);
    int rc = !s.succ || !s.count || !s.reward ? oom(&s) : 0;
    if (rc == 0)
        rc = header(&s, o) < 0 || declare(&s, 0) < 0 ? -1 : 0;
    for (int64_t c = 0; c < s.g.n_cells && rc == 0; c++) {
        if (bc_stop_requested()) { /* a large grid takes a while: a stop request ends it */
            bc_diag_add(d, BC_ERROR, t->label, 0, 0, "stopped on request while building the "
                        "grid model (%lld of %lld cells done)", (long long)c, (long long)s.g.n_cells);
            rc = -1;
        }
        for (int32_t a = 0; a < t->n_actions && rc == 0; a++)
            rc = o->scheme == BC_SCHEME_INTERP ? interp_pair(&s, c, a) : counted_pair(&s, c, a);
    }
    if (rc == 0)
        rc = declare(&s, 1) < 0 || bc__grid_initial(s.b, t, &s.g, d) < 0 ? -1 : 0;
    if (rc < 0) {
        gb_free(&s);
        return NULL;
    }
    bc_builder *b = s.b;
    s.b = NULL;
    gb_free(&s);
    return bc_builder_finish(b);
}
