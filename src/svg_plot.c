/* svg_plot.c — line plots: any series on linear or logarithmic axes, the two panels of a grid refinement, a solve's residual per iteration. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#include "svg_internal.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* A point is drawn when finite and, on a log axis, positive. */
static int usable(const bc_plot *p, double x, double y)
{
    return isfinite(x) && isfinite(y) && (!p->log_x || x > 0) && (!p->log_y || y > 0);
}

static void widen(double *lo, double *hi, double v)
{
    if (v < *lo)
        *lo = v;
    if (v > *hi)
        *hi = v;
}

/* The data range of axis k (0 x, 1 y) with a margin; 0, or -1 without data. */
static int data_range(const bc_plot *p, int k, double *lo, double *hi)
{
    *lo = INFINITY;
    *hi = -INFINITY;
    for (int32_t s = 0; s < p->n_series; s++) {
        const bc_plot_series *se = &p->series[s];
        for (int32_t i = 0; i < se->n; i++) {
            if (!usable(p, se->x[i], se->y[i]))
                continue;
            double v = k == 0 ? se->x[i] : se->y[i];
            widen(lo, hi, v);
            if (k == 1 && se->err && se->err[i] > 0) {
                widen(lo, hi, v + se->err[i]);
                if (!p->log_y || v - se->err[i] > 0)
                    widen(lo, hi, v - se->err[i]);
            }
        }
    }
    if (*lo > *hi)
        return -1;
    int lg = k == 0 ? p->log_x : p->log_y;
    if (lg) {
        double a = log10(*lo), b = log10(*hi), pad = b > a ? 0.06 * (b - a) : 0.3;
        *lo = pow(10, a - pad);
        *hi = pow(10, b + pad);
    } else {
        double pad = *hi > *lo ? 0.06 * (*hi - *lo) : fmax(1e-12, 0.1 * fabs(*lo)) + (*lo == 0);
        *lo -= pad;
        *hi += pad;
    }
    return 0;
}

static void series_colour(const bc_plot_series *se, int32_t k, char out[8])
{
    if (se->dashed)
        memcpy(out, "#555555", 8);
    else
        bc__action_colour(k, out);
}

/* The line of series k, broken where points are left out (each piece of
 * class "series-k"), then its markers and error bars. */
static void draw_series(FILE *f, const bc_plot *p, const bc__frame *fr, const bc_plot_series *se,
                        const char *colour, int32_t k)
{
    int open = 0;
    for (int32_t i = 0; i <= se->n; i++) {
        int ok = i < se->n && usable(p, se->x[i], se->y[i]);
        if (ok && !open)
            fprintf(f, "<polyline class=\"series-%d\" fill=\"none\" stroke=\"%s\" "
                       "stroke-width=\"%s\"%s points=\"", (int)k, colour, se->dashed ? "1.2" : "1.8",
                    se->dashed ? " stroke-dasharray=\"6 4\"" : "");
        if (ok)
            fprintf(f, "%s%.1f,%.1f", open ? " " : "", bc__frame_px(fr, 0, se->x[i]),
                    bc__frame_px(fr, 1, se->y[i]));
        else if (open)
            fputs("\"/>\n", f);
        open = ok;
    }
    if (se->dashed || se->n > 200)
        return;
    for (int32_t i = 0; i < se->n; i++) {
        if (!usable(p, se->x[i], se->y[i]))
            continue;
        double x = bc__frame_px(fr, 0, se->x[i]), y = bc__frame_px(fr, 1, se->y[i]);
        if (se->err && se->err[i] > 0) {
            double lo = se->y[i] - se->err[i], hi = se->y[i] + se->err[i];
            double ya = p->log_y && lo <= 0 ? fr->y0 + fr->h : bc__frame_px(fr, 1, lo);
            double yb = bc__frame_px(fr, 1, hi);
            fprintf(f, "<path d=\"M%.1f %.1fV%.1fM%.1f %.1fH%.1fM%.1f %.1fH%.1f\" stroke=\"%s\"/>\n",
                    x, ya, yb, x - 4, ya, x + 4, x - 4, yb, x + 4, colour);
        }
        fprintf(f, "<circle cx=\"%.1f\" cy=\"%.1f\" r=\"3\" fill=\"%s\"/>\n", x, y, colour);
    }
}

/* Legend entries in a row above the frame. */
static void plot_legend(FILE *f, const bc_plot *p, double x, double y)
{
    char col[8];
    for (int32_t s = 0; s < p->n_series; s++) {
        const bc_plot_series *se = &p->series[s];
        if (!se->label)
            continue;
        series_colour(se, s, col);
        fprintf(f, "<line x1=\"%.1f\" y1=\"%.1f\" x2=\"%.1f\" y2=\"%.1f\" stroke=\"%s\" "
                   "stroke-width=\"2\"%s/>\n", x, y - 4, x + 18, y - 4, col,
                se->dashed ? " stroke-dasharray=\"6 4\"" : "");
        bc__svg_text(f, x + 22, y, "start", 11, 0, 0, se->label);
        x += 22 + bc__text_width(se->label, 11) + 14;
    }
}

/* One plot inside the panel (px, py, pw, ph) of a larger picture. */
static void plot_panel(FILE *f, const bc_plot *p, double px, double py, double pw, double ph)
{
    bc__frame fr = {px + 78, py + 50, pw - 78 - 18, ph - 50 - 56, {0, 0}, {1, 1}, {p->log_x, p->log_y}, 0};
    if (p->title)
        bc__svg_text(f, px + 10, py + 20, "start", 14, 1, 0, p->title);
    plot_legend(f, p, fr.x0, py + 40);
    if (data_range(p, 0, &fr.lo[0], &fr.hi[0]) < 0 || data_range(p, 1, &fr.lo[1], &fr.hi[1]) < 0) {
        fr.log[0] = fr.log[1] = 0;
        fr.lo[0] = fr.lo[1] = 0; /* an empty frame that says so */
        fr.hi[0] = fr.hi[1] = 1;
        bc__svg_text(f, fr.x0 + fr.w / 2, fr.y0 + fr.h / 2, "middle", 12, 0, 0, "no data to draw");
    }
    char col[8];
    for (int32_t s = 0; s < p->n_series; s++) {
        series_colour(&p->series[s], s, col);
        draw_series(f, p, &fr, &p->series[s], col, s);
    }
    bc__frame_axes(f, &fr, p->x_label, p->y_label);
}

int bc_svg_plot(FILE *f, const bc_plot *p)
{
    bc__svg_begin(f, 600, 420, p->title ? p->title : "plot");
    plot_panel(f, p, 0, 0, 600, 420);
    bc__svg_end(f);
    return ferror(f) ? -1 : 0;
}

int bc_svg_convergence(FILE *f, const bc_convergence *c)
{
    enum { MAXG = 64 };
    int32_t n = c->n < MAXG ? c->n : MAXG;
    double err[MAXG], h[MAXG], d[MAXG];
    int32_t nd = 0;
    for (int32_t k = 0; k < n; k++) {
        err[k] = c->bound ? c->bound[k] : -1;
        if (k > 0) { /* the change from the previous (coarser) grid, at this grid's size */
            h[nd] = c->cell_size[k];
            d[nd++] = fabs(c->value[k] - c->value[k - 1]);
        }
    }
    bc_plot_series values = {c->cell_size, c->value, err, n, NULL, 0};
    bc_plot left = {"value on each grid", c->size_label, c->value_label, 1, 0, &values, 1};
    /* Guides of order 1 and 2 through the first positive change. */
    double gx[2], g1[2], g2[2];
    int32_t first = 0;
    while (first < nd && !(d[first] > 0 && h[first] > 0))
        first++;
    bc_plot_series diffs[3] = {{h, d, NULL, nd, "|change|", 0}};
    int32_t ns = 1;
    if (first < nd) {
        double hmin = INFINITY, hmax = 0;
        for (int32_t k = 0; k < nd; k++)
            if (h[k] > 0)
                hmin = fmin(hmin, h[k]), hmax = fmax(hmax, h[k]);
        gx[0] = hmin;
        gx[1] = hmax;
        for (int e = 0; e < 2; e++) {
            g1[e] = d[first] * (gx[e] / h[first]);
            g2[e] = d[first] * pow(gx[e] / h[first], 2);
        }
        diffs[ns++] = (bc_plot_series){gx, g1, NULL, 2, "order 1", 1};
        diffs[ns++] = (bc_plot_series){gx, g2, NULL, 2, "order 2", 1};
    }
    bc_plot right = {"change from the previous grid", c->size_label, "|change|", 1, 1, diffs, ns};
    bc__svg_begin(f, 1000, 420, "grid refinement");
    plot_panel(f, &left, 0, 0, 500, 420);
    plot_panel(f, &right, 500, 0, 500, 420);
    bc__svg_end(f);
    return ferror(f) ? -1 : 0;
}

/* ------------------------------------------------------------------------ */
/* A solve's convergence history                                            */
/* ------------------------------------------------------------------------ */

#define TRACE_SERIES 8 /* at most four runs of one method, two series each */

static const char *method_words(bc_method m)
{
    switch (m) {
    case BC_METHOD_VI: return "value iteration";
    case BC_METHOD_PI: return "policy iteration";
    default: return bc_method_name(m);
    }
}

/* The x, residual and bound arrays of a history: a run of points of one
 * method continues the count of the run before it. */
typedef struct {
    double *x, *res, *bound;
    int32_t run_start[TRACE_SERIES / 2 + 1]; /* first point of each run; runs end at the next */
    bc_method run_method[TRACE_SERIES / 2];
    int32_t n_runs;
    int64_t zeros;   /* residuals of exactly 0: not drawn on the log axis */
    int any_bound;
} trace_data;

static int trace_data_fill(trace_data *d, const bc_trace_point *t, int32_t n)
{
    memset(d, 0, sizeof *d);
    d->x = malloc((size_t)(n ? n : 1) * sizeof *d->x);
    d->res = malloc((size_t)(n ? n : 1) * sizeof *d->res);
    d->bound = malloc((size_t)(n ? n : 1) * sizeof *d->bound);
    if (!d->x || !d->res || !d->bound)
        return -1;
    double offset = 0, last = 0;
    for (int32_t i = 0; i < n; i++) {
        if (i == 0 || t[i].method != t[i - 1].method) {
            if (d->n_runs == TRACE_SERIES / 2)
                break; /* more runs than a picture can tell apart: the rest is left out */
            d->run_method[d->n_runs] = t[i].method;
            d->run_start[d->n_runs++] = i;
            offset = last;
        }
        d->x[i] = offset + (double)t[i].iteration;
        last = d->x[i];
        d->res[i] = t[i].residual;
        d->bound[i] = t[i].bound >= 0 ? t[i].bound : NAN;
        d->zeros += t[i].residual == 0;
        d->any_bound |= t[i].bound > 0;
        d->run_start[d->n_runs] = i + 1;
    }
    return 0;
}

static void trace_data_free(trace_data *d)
{
    free(d->x), free(d->res), free(d->bound);
}

int bc_svg_residual(FILE *f, const bc_trace_point *trace, int64_t n, int64_t stride,
                    const char *name)
{
    trace_data d;
    int32_t np = n > INT32_MAX ? INT32_MAX : (int32_t)n;
    if (trace_data_fill(&d, trace, np) < 0) {
        trace_data_free(&d);
        return -1;
    }
    bc_plot_series se[TRACE_SERIES];
    char labels[TRACE_SERIES][48], title[400];
    int32_t ns = 0;
    size_t len = (size_t)snprintf(title, sizeof title, "Residual per iteration: ");
    for (int32_t r = 0; r < d.n_runs; r++) {
        int32_t a = d.run_start[r], k = d.run_start[r + 1] - a;
        const char *short_name = bc_method_name(d.run_method[r]);
        snprintf(labels[ns], sizeof labels[ns], "residual (%s)", short_name);
        se[ns] = (bc_plot_series){d.x + a, d.res + a, NULL, k, labels[ns], 0};
        ns++;
        int bounded = 0;
        for (int32_t i = a; i < a + k; i++)
            bounded |= d.bound[i] > 0;
        if (!bounded)
            continue; /* no bound proven along this run: no legend entry for one */
        snprintf(labels[ns], sizeof labels[ns], "proven bound (%s)", short_name);
        se[ns] = (bc_plot_series){d.x + a, d.bound + a, NULL, k, labels[ns], 0};
        ns++;
    }
    for (int32_t r = 0; r < d.n_runs && len < sizeof title; r++)
        len += (size_t)snprintf(title + len, sizeof title - len, "%s%s", r ? ", then " : "",
                                method_words(d.run_method[r]));
    bc_plot p = {title, "iteration (sweeps, then steps)", "residual, bound", 0, 1, se, ns};
    if (d.n_runs < 2)
        p.x_label = d.n_runs && d.run_method[0] == BC_METHOD_PI ? "improvement step" : "sweep";
    char note[600];
    size_t nl = 0;
    note[0] = 0;
    if (name)
        nl += (size_t)snprintf(note, sizeof note, "%.300s; ", name);
    if (stride > 1 && nl < sizeof note)
        nl += (size_t)snprintf(note + nl, sizeof note - nl, "1 iteration in %lld kept (a long "
                               "run is thinned); ", (long long)stride);
    if (d.zeros > 0 && nl < sizeof note)
        nl += (size_t)snprintf(note + nl, sizeof note - nl, "%lld residual%s of 0 not drawn "
                               "(logarithmic axis); ", (long long)d.zeros, d.zeros == 1 ? "" : "s");
    if (!d.any_bound && nl < sizeof note)
        nl += (size_t)snprintf(note + nl, sizeof note - nl, "no proven bound along the way; ");
    if (nl >= 2 && nl < sizeof note)
        note[nl - 2] = 0;
    bc__svg_begin(f, 720, note[0] ? 440 : 420, title);
    plot_panel(f, &p, 0, 0, 720, 420);
    if (note[0])
        bc__svg_text(f, 10, 432, "start", 11, 0, 0, note);
    bc__svg_end(f);
    trace_data_free(&d);
    return ferror(f) ? -1 : 0;
}
