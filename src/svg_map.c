/* svg_map.c — maps over a grid's plane: a policy, values as a heat map, a scored agent, trajectories. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Cells are drawn inside a group scaled to cell units: drawn cell (i, j) is
 * the rectangle x = i, y = rows - 1 - j, 1 x 1 (j grows upwards, as the
 * variable does), and neighbours of one colour in a row are merged into one
 * rectangle.  A plane wider or taller than MAX_DRAWN cells is sampled: drawn
 * cell i shows the cell under its centre, and the picture says so.
 */
#include "svg_internal.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define MAX_DRAWN 400
#define PLOT_W 480.0
#define PLOT_H 400.0
#define STRIP_H 60.0
#define LEFT 78.0
#define TOP 58.0
#define BOTTOM 58.0
#define ENTRY_H 18.0
#define MAX_ENTRIES 20

#define COLOUR_TERMINAL "#cccccc"
#define COLOUR_NO_STATE "#ffffff"
#define COLOUR_UNCOVERED "#eeeeee"
#define COLOUR_NOT_FINITE "#999999"

typedef struct {
    bc__frame fr;      /* the plane in the variables' units */
    int32_t dx, dy;    /* drawn columns and rows */
    double width, height;
} map_geom;

/* A legend entry: a swatch and its text (outline 1: drawn as a thick black
 * frame; 2: a small square with a dashed frame, as undecided cells are marked). */
typedef struct {
    char colour[8];
    int outline;
    const char *text;
} entry;

/* right: width of the legend column(s); right_h: the height they need below TOP. */
static void geom_init(map_geom *g, const bc_layout *l, double right, double right_h)
{
    g->dx = l->nx < MAX_DRAWN ? l->nx : MAX_DRAWN;
    g->dy = l->ny < MAX_DRAWN ? l->ny : MAX_DRAWN;
    int strip = l->axis_y < 0;
    g->fr = (bc__frame){LEFT, TOP, PLOT_W, strip ? STRIP_H : PLOT_H, {0, 0}, {1, 1}, {0, 0}, strip};
    g->fr.lo[0] = l->low[l->axis_x];
    g->fr.hi[0] = l->high[l->axis_x];
    if (!strip) {
        g->fr.lo[1] = l->low[l->axis_y];
        g->fr.hi[1] = l->high[l->axis_y];
    }
    g->width = LEFT + PLOT_W + right;
    g->height = fmax(TOP + g->fr.h + BOTTOM, TOP + right_h + 12);
}

/* The state drawn at drawn cell (i, j). */
static int32_t drawn_state(const bc_layout *l, const map_geom *g, int32_t i, int32_t j)
{
    int64_t ci = (int64_t)((i + 0.5) * l->nx / g->dx), cj = (int64_t)((j + 0.5) * l->ny / g->dy);
    return l->state[ci + cj * l->nx];
}

/* What the plane is: the variables held fixed, and any sampling. */
static void plane_note(const bc_layout *l, const map_geom *g, char *buf, size_t cap)
{
    size_t n = 0;
    buf[0] = 0;
    for (int32_t k = 0; k < l->n_vars && n < cap; k++) {
        if (k == l->axis_x || k == l->axis_y)
            continue;
        double w = (l->high[k] - l->low[k]) / l->cells[k], a = l->low[k] + l->fixed[k] * w;
        char lo[32], hi[32];
        bc__num_label(lo, sizeof lo, a);
        bc__num_label(hi, sizeof hi, a + w);
        n += (size_t)snprintf(buf + n, cap - n, "%s%s in cell %d of %d (%s to %s)", n ? "; " : "",
                              l->var_name[k], (int)l->fixed[k], (int)l->cells[k], lo, hi);
    }
    if (n < cap && (g->dx < l->nx || g->dy < l->ny))
        snprintf(buf + n, cap - n, "%s%d x %d cells, sampled to %d x %d", n ? "; " : "",
                 (int)l->nx, (int)l->ny, (int)g->dx, (int)g->dy);
}

static void map_begin(FILE *f, const bc_layout *l, const map_geom *g, const char *title)
{
    bc__svg_begin(f, g->width, g->height, title);
    bc__svg_text(f, LEFT, 22, "start", 15, 1, 0, title);
    char note[1024];
    plane_note(l, g, note, sizeof note);
    if (note[0])
        bc__svg_text(f, LEFT, 40, "start", 11, 0, 0, note);
}

static void map_axes(FILE *f, const bc_layout *l, const map_geom *g)
{
    bc__frame_axes(f, &g->fr, l->var_name[l->axis_x], l->axis_y >= 0 ? l->var_name[l->axis_y] : NULL);
}

/* Opens the group in cell units. */
static void cells_begin(FILE *f, const map_geom *g, const char *extra)
{
    fprintf(f, "<g class=\"cells\" transform=\"translate(%.1f %.1f) scale(%.6g %.6g)\"%s>\n",
            g->fr.x0, g->fr.y0, g->fr.w / g->dx, g->fr.h / g->dy, extra);
}

/* Colour of one state for a map; returns the colour in out. */
typedef void (*colour_fn)(int32_t state, const void *ctx, char out[8]);

/* Every drawn cell, neighbours of one colour merged into one rectangle. */
static void cell_runs(FILE *f, const bc_layout *l, const map_geom *g, colour_fn colour,
                      const void *ctx, const char *extra)
{
    cells_begin(f, g, extra);
    char run[8], col[8];
    for (int32_t j = 0; j < g->dy; j++) {
        int32_t start = 0;
        for (int32_t i = 0; i <= g->dx; i++) {
            if (i < g->dx)
                colour(drawn_state(l, g, i, j), ctx, col);
            if (i > 0 && (i == g->dx || strcmp(col, run))) {
                fprintf(f, "<rect x=\"%d\" y=\"%d\" width=\"%d\" height=\"1\" fill=\"%s\"/>\n",
                        (int)start, (int)(g->dy - 1 - j), (int)(i - start), run);
                start = i;
            }
            if (i < g->dx)
                memcpy(run, col, sizeof run);
        }
    }
    fputs("</g>\n", f);
}

static void legend(FILE *f, double x, double y, const entry *e, int n, const char *more)
{
    for (int k = 0; k < n; k++) {
        double ey = y + k * ENTRY_H;
        if (e[k].outline == 2)
            fprintf(f, "<rect x=\"%.1f\" y=\"%.1f\" width=\"9\" height=\"9\" fill=\"%s\" "
                       "stroke=\"#000000\" stroke-width=\"1\" stroke-dasharray=\"2 1.5\"/>\n",
                    x + 2, ey + 2, e[k].colour);
        else
            fprintf(f, "<rect x=\"%.1f\" y=\"%.1f\" width=\"13\" height=\"13\" fill=\"%s\" "
                       "stroke=\"%s\" stroke-width=\"%s\"/>\n", x, ey, e[k].colour,
                    e[k].outline ? "#000000" : "#666666", e[k].outline ? "2.5" : "0.6");
        bc__svg_text(f, x + 19, ey + 11, "start", 12, 0, 0, e[k].text);
    }
    if (more)
        bc__svg_text(f, x, y + n * ENTRY_H + 11, "start", 11, 0, 0, more);
}

static double legend_width(const entry *e, int n)
{
    double w = 0;
    for (int k = 0; k < n; k++) {
        double t = bc__text_width(e[k].text, 12);
        w = t > w ? t : w;
    }
    return 19 + w + 16;
}

/* ------------------------------------------------------------------------ */
/* Policy map                                                               */
/* ------------------------------------------------------------------------ */

typedef struct {
    const bc_model *m;
    const int64_t *policy;
} policy_ctx;

static void policy_colour(int32_t s, const void *ctx, char out[8])
{
    const policy_ctx *c = ctx;
    if (s < 0)
        memcpy(out, COLOUR_NO_STATE, 8);
    else if (c->m->terminal[s] || c->policy[s] < 0)
        memcpy(out, COLOUR_TERMINAL, 8);
    else
        bc__action_colour(c->m->pair_action[c->policy[s]], out);
}

/* Legend entries for the actions used in the plane (and terminal / no state);
 * used[a] marks actions.  Returns the number of entries; *more counts actions left out. */
static int action_entries(const bc_model *m, const uint8_t *used, int terminal, int none,
                          entry *e, int cap, int32_t *more)
{
    int n = 0;
    *more = 0;
    for (int32_t a = 0; a < m->n_actions; a++) {
        if (!used[a])
            continue;
        if (n >= cap - 2) {
            (*more)++;
            continue;
        }
        bc__action_colour(a, e[n].colour);
        e[n].outline = 0;
        e[n++].text = bc_names_get(m->action_names, a);
    }
    if (terminal)
        e[n++] = (entry){COLOUR_TERMINAL, 0, "terminal (no action)"};
    if (none)
        e[n++] = (entry){COLOUR_NO_STATE, 0, "no state"};
    return n;
}

/* Which actions, terminal cells and empty cells the plane shows under policy. */
static uint8_t *plane_usage(const bc_model *m, const bc_layout *l, const int64_t *policy,
                            int *terminal, int *none)
{
    uint8_t *used = calloc((size_t)m->n_actions + 1, 1);
    *terminal = *none = 0;
    for (int64_t c = 0; used && c < (int64_t)l->nx * l->ny; c++) {
        int32_t s = l->state[c];
        if (s < 0)
            *none = 1;
        else if (m->terminal[s] || policy[s] < 0)
            *terminal = 1;
        else
            used[m->pair_action[policy[s]]] = 1;
    }
    return used;
}

static void more_note(char *buf, size_t cap, int32_t more, const bc_model *m)
{
    buf[0] = 0;
    if (more)
        snprintf(buf, cap, "... and %d more actions", (int)more);
    else if (m->n_actions > BC__ACTION_COLOURS)
        snprintf(buf, cap, "(colours repeat after %d actions)", BC__ACTION_COLOURS);
}

int bc_svg_policy_map(FILE *f, const bc_model *m, const bc_layout *l, const int64_t *policy,
                      const char *title)
{
    int terminal, none;
    uint8_t *used = plane_usage(m, l, policy, &terminal, &none);
    if (!used)
        return -1;
    entry e[MAX_ENTRIES + 2];
    int32_t more;
    int n = action_entries(m, used, terminal, none, e, MAX_ENTRIES, &more);
    free(used);
    char note[64];
    more_note(note, sizeof note, more, m);
    map_geom g;
    geom_init(&g, l, 24 + legend_width(e, n), (n + 1) * ENTRY_H);
    map_begin(f, l, &g, title);
    policy_ctx ctx = {m, policy};
    cell_runs(f, l, &g, policy_colour, &ctx, " shape-rendering=\"crispEdges\"");
    map_axes(f, l, &g);
    legend(f, LEFT + PLOT_W + 24, TOP, e, n, note[0] ? note : NULL);
    bc__svg_end(f);
    return ferror(f) ? -1 : 0;
}

/* ------------------------------------------------------------------------ */
/* Value map                                                                */
/* ------------------------------------------------------------------------ */

typedef struct {
    const bc_model *m;
    const double *v;
    double lo, hi;
} value_ctx;

static void value_colour(int32_t s, const void *ctx, char out[8])
{
    const value_ctx *c = ctx;
    if (s < 0)
        memcpy(out, COLOUR_NO_STATE, 8);
    else if (!isfinite(c->v[s]))
        memcpy(out, COLOUR_NOT_FINITE, 8);
    else
        bc__seq_colour(BC__MAP_VIRIDIS, c->hi > c->lo ? (c->v[s] - c->lo) / (c->hi - c->lo) : 0.5, out);
}

/* A strip's values as a line over the variable. */
static int value_line(FILE *f, const bc_layout *l, const double *values, const char *title,
                      const char *value_label)
{
    double *x = malloc((size_t)l->nx * sizeof *x), *y = malloc((size_t)l->nx * sizeof *y);
    if (!x || !y) {
        free(x);
        free(y);
        return -1;
    }
    double w = (l->high[l->axis_x] - l->low[l->axis_x]) / l->nx;
    for (int32_t i = 0; i < l->nx; i++) {
        x[i] = l->low[l->axis_x] + (i + 0.5) * w;
        y[i] = l->state[i] >= 0 ? values[l->state[i]] : NAN;
    }
    bc_plot_series s = {x, y, NULL, l->nx, NULL, 0};
    bc_plot p = {title, l->var_name[l->axis_x], value_label, 0, 0, &s, 1};
    int rc = bc_svg_plot(f, &p);
    free(x);
    free(y);
    return rc;
}

int bc_svg_value_map(FILE *f, const bc_model *m, const bc_layout *l, const double *values,
                     const char *title, const char *value_label)
{
    if (l->axis_y < 0)
        return value_line(f, l, values, title, value_label);
    value_ctx ctx = {m, values, INFINITY, -INFINITY};
    int none = 0, odd = 0;
    for (int64_t c = 0; c < (int64_t)l->nx * l->ny; c++) {
        int32_t s = l->state[c];
        if (s < 0)
            none = 1;
        else if (!isfinite(values[s]))
            odd = 1;
        else {
            ctx.lo = fmin(ctx.lo, values[s]);
            ctx.hi = fmax(ctx.hi, values[s]);
        }
    }
    entry e[2];
    int n = 0;
    if (odd)
        e[n++] = (entry){COLOUR_NOT_FINITE, 0, "not finite"};
    if (none)
        e[n++] = (entry){COLOUR_NO_STATE, 0, "no state"};
    map_geom g;
    geom_init(&g, l, 134 + (n ? legend_width(e, n) : 0), 16 + 220 + 16);
    map_begin(f, l, &g, title);
    cell_runs(f, l, &g, value_colour, &ctx, " shape-rendering=\"crispEdges\"");
    map_axes(f, l, &g);
    if (ctx.lo <= ctx.hi)
        bc__colour_bar(f, LEFT + PLOT_W + 24, TOP + 16, 220, BC__MAP_VIRIDIS, ctx.lo, ctx.hi,
                       value_label);
    legend(f, LEFT + PLOT_W + 130, TOP + 16, e, n, NULL);
    bc__svg_end(f);
    return ferror(f) ? -1 : 0;
}

/* ------------------------------------------------------------------------ */
/* A scored agent                                                           */
/* ------------------------------------------------------------------------ */

typedef struct {
    const bc_model *m;
    const bc_score *s;
    int64_t *agent; /* [n_states] the agent's pair (most probable), -1 none */
} agent_ctx;

static void agent_colour(int32_t st, const void *ctx, char out[8])
{
    const agent_ctx *c = ctx;
    if (st < 0)
        memcpy(out, COLOUR_NO_STATE, 8);
    else if (c->m->terminal[st])
        memcpy(out, COLOUR_TERMINAL, 8);
    else if (isnan(c->s->state_regret[st]))
        memcpy(out, COLOUR_UNCOVERED, 8);
    else
        bc__action_colour(c->m->pair_action[c->agent[st]], out);
}

/* The agent's pair per state: its most probable one, the first on ties. */
static int64_t *agent_pairs(const bc_model *m, const bc_score *s)
{
    int64_t *a = malloc((size_t)m->n_states * sizeof *a);
    for (int32_t st = 0; a && st < m->n_states; st++) {
        a[st] = -1;
        for (int64_t p = m->state_pair_start[st]; p < m->state_pair_start[st + 1]; p++)
            if (a[st] < 0 || s->agent_prob[p] > s->agent_prob[a[st]])
                a[st] = p;
    }
    return a;
}

/* Marked: an action the agent takes in st is proven suboptimal by Q*
 * (bc_score.acts); a tied action that loses value only downstream of
 * another mistake is optimal there and not marked. */
static int marked(const agent_ctx *c, int32_t st)
{
    return c->s->acts[st] == BC_ACT_SUBOPTIMAL;
}

static int undecided(const agent_ctx *c, int32_t st)
{
    return c->s->acts[st] == BC_ACT_UNDECIDED;
}

/* Insets on marked cells (shaded by regret on [0, rmax]), small dashed
 * squares on undecided ones, and outlines of traps. */
static void agent_marks(FILE *f, const bc_layout *l, const map_geom *g, const agent_ctx *c,
                        const uint8_t *trap, double rmax)
{
    double cell_px = fmin(g->fr.w / g->dx, g->fr.h / g->dy);
    double inset = cell_px >= 6 ? 0.6 : 1.0, off = (1 - inset) / 2;
    char col[8];
    cells_begin(f, g, " stroke=\"#000000\"");
    for (int32_t j = 0; j < g->dy; j++)
        for (int32_t i = 0; i < g->dx; i++) {
            int32_t st = drawn_state(l, g, i, j);
            if (st < 0 || !marked(c, st))
                continue;
            double r = c->s->state_regret[st];
            bc__seq_colour(BC__MAP_MAGMA_R, isfinite(r) && rmax > 0 ? r / rmax : 1.0, col);
            fprintf(f, "<rect class=\"mark\" x=\"%.2f\" y=\"%.2f\" width=\"%.2f\" height=\"%.2f\" fill=\"%s\" "
                       "stroke-width=\"0.7\" vector-effect=\"non-scaling-stroke\"/>\n",
                    i + off, g->dy - 1 - j + off, inset, inset, col);
        }
    double small = inset * 0.6, soff = (1 - small) / 2;
    for (int32_t j = 0; j < g->dy; j++)
        for (int32_t i = 0; i < g->dx; i++) {
            int32_t st = drawn_state(l, g, i, j);
            if (st >= 0 && undecided(c, st))
                fprintf(f, "<rect class=\"undecided\" x=\"%.2f\" y=\"%.2f\" width=\"%.2f\" "
                           "height=\"%.2f\" fill=\"#ffffff\" stroke-width=\"1\" "
                           "stroke-dasharray=\"2 1.5\" vector-effect=\"non-scaling-stroke\"/>\n",
                        i + soff, g->dy - 1 - j + soff, small, small);
        }
    for (int32_t j = 0; j < g->dy; j++)
        for (int32_t i = 0; i < g->dx; i++) {
            int32_t st = drawn_state(l, g, i, j);
            if (st >= 0 && trap[st])
                fprintf(f, "<rect class=\"trap\" x=\"%d\" y=\"%d\" width=\"1\" height=\"1\" "
                           "fill=\"none\" stroke-width=\"2.5\" vector-effect=\"non-scaling-stroke\"/>\n",
                        (int)i, (int)(g->dy - 1 - j));
        }
    fputs("</g>\n", f);
}

/* Legend of the agent map: actions, then what marks and outlines mean. */
static int agent_entries(const agent_ctx *c, const bc_layout *l, const uint8_t *trap, entry *e,
                         int32_t *more, double *rmax)
{
    const bc_model *m = c->m;
    uint8_t *used = calloc((size_t)m->n_actions, 1);
    if (!used)
        return -1;
    int terminal = 0, none = 0, uncovered = 0, any_mark = 0, any_trap = 0, any_undecided = 0;
    *rmax = 0;
    for (int64_t k = 0; k < (int64_t)l->nx * l->ny; k++) {
        int32_t st = l->state[k];
        if (st < 0)
            none = 1;
        else if (m->terminal[st])
            terminal = 1;
        else if (isnan(c->s->state_regret[st]))
            uncovered = 1;
        else
            used[m->pair_action[c->agent[st]]] = 1;
        if (st >= 0 && marked(c, st)) {
            any_mark = 1;
            if (isfinite(c->s->state_regret[st]))
                *rmax = fmax(*rmax, c->s->state_regret[st]);
        }
        any_trap |= st >= 0 && trap[st];
        any_undecided |= st >= 0 && undecided(c, st);
    }
    int n = action_entries(m, used, terminal, none, e, MAX_ENTRIES - 4, more);
    free(used);
    if (uncovered)
        e[n++] = (entry){COLOUR_UNCOVERED, 0, "not covered by the agent's file"};
    if (any_mark) {
        bc__seq_colour(BC__MAP_MAGMA_R, 0.5, e[n].colour);
        e[n].outline = 0;
        e[n++].text = "inset: a suboptimal action";
    }
    if (any_undecided)
        e[n++] = (entry){"#ffffff", 2, "dashed: undecided by the proof"};
    if (any_trap)
        e[n++] = (entry){"#ffffff", 1, "outlined: trap (never finishes)"};
    return n;
}

int bc_svg_agent_map(FILE *f, const bc_model *m, const bc_layout *l, const bc_score *s,
                     const char *title)
{
    agent_ctx c = {m, s, agent_pairs(m, s)};
    uint8_t *trap = calloc((size_t)m->n_states, 1);
    entry e[MAX_ENTRIES + 2];
    int32_t more = 0;
    double rmax = 0;
    for (int32_t k = 0; trap && k < s->n_traps; k++)
        trap[s->traps[k]] = 1;
    int n = c.agent && trap ? agent_entries(&c, l, trap, e, &more, &rmax) : -1;
    if (n < 0) {
        free(c.agent);
        free(trap);
        return -1;
    }
    char note[64];
    more_note(note, sizeof note, more, m);
    map_geom g;
    geom_init(&g, l, 24 + (rmax > 0 ? 110 : 0) + legend_width(e, n),
              fmax(16 + (n + 1) * ENTRY_H, rmax > 0 ? 16 + 200 + 16 : 0));
    map_begin(f, l, &g, title);
    cell_runs(f, l, &g, agent_colour, &c, " shape-rendering=\"crispEdges\"");
    agent_marks(f, l, &g, &c, trap, rmax);
    map_axes(f, l, &g);
    double lx = LEFT + PLOT_W + 24;
    if (rmax > 0) {
        bc__colour_bar(f, lx, TOP + 16, 200, BC__MAP_MAGMA_R, 0, rmax, "regret");
        lx += 110;
    }
    legend(f, lx, TOP + 16, e, n, note[0] ? note : NULL);
    bc__svg_end(f);
    free(c.agent);
    free(trap);
    return ferror(f) ? -1 : 0;
}

/* ------------------------------------------------------------------------ */
/* Trajectories                                                             */
/* ------------------------------------------------------------------------ */

#define MAX_POINTS 4000 /* per drawn path; longer ones are thinned evenly */

static void one_path(FILE *f, const bc_layout *l, const bc__frame *fr, const bc_path *p)
{
    int64_t step = p->n_points > MAX_POINTS ? (p->n_points + MAX_POINTS - 1) / MAX_POINTS : 1;
    int strip = l->axis_y < 0;
    for (int pass = 0; pass < 2; pass++) { /* a white halo, then the line */
        fprintf(f, "<polyline fill=\"none\" stroke=\"%s\" stroke-width=\"%s\" points=\"",
                pass ? "#1a1a1a" : "#ffffff", pass ? "1.4" : "3.4");
        for (int64_t t = 0; t < p->n_points; t += step) {
            const double *x = p->x + (int64_t)t * l->n_vars;
            double px = bc__frame_px(fr, 0, x[l->axis_x]);
            double py = bc__frame_px(fr, 1, strip ? (double)t : x[l->axis_y]);
            fprintf(f, "%s%.1f,%.1f", t ? " " : "", px, py);
        }
        fputs("\"/>\n", f);
    }
    if (p->n_points < 1)
        return;
    const double *a = p->x, *b = p->x + (p->n_points - 1) * l->n_vars;
    fprintf(f, "<circle cx=\"%.1f\" cy=\"%.1f\" r=\"3.5\" fill=\"#ffffff\" stroke=\"#000000\"/>\n",
            bc__frame_px(fr, 0, a[l->axis_x]), bc__frame_px(fr, 1, strip ? 0 : a[l->axis_y]));
    fprintf(f, "<rect x=\"%.1f\" y=\"%.1f\" width=\"6\" height=\"6\" fill=\"#000000\"/>\n",
            bc__frame_px(fr, 0, b[l->axis_x]) - 3,
            bc__frame_px(fr, 1, strip ? (double)(p->n_points - 1) : b[l->axis_y]) - 3);
}

int bc_svg_trajectories(FILE *f, const bc_model *m, const bc_layout *l, const int64_t *policy,
                        const bc_path *paths, int32_t n_paths, const char *title)
{
    int strip = l->axis_y < 0;
    entry e[MAX_ENTRIES + 2];
    int n = 0;
    int32_t more = 0;
    int64_t longest = 1;
    if (policy) {
        int terminal, none;
        uint8_t *used = plane_usage(m, l, policy, &terminal, &none);
        if (!used)
            return -1;
        n = action_entries(m, used, terminal, none, e, MAX_ENTRIES - 2, &more);
        free(used);
    }
    e[n++] = (entry){"#ffffff", 0, "start (circle), end (square)"};
    for (int32_t k = 0; k < n_paths; k++)
        longest = paths[k].n_points > longest ? paths[k].n_points : longest;
    map_geom g;
    geom_init(&g, l, 24 + legend_width(e, n), (n + 1) * ENTRY_H);
    if (strip) { /* the variable across, the step upwards */
        g.fr.h = PLOT_H;
        g.fr.no_y_axis = 0;
        g.fr.lo[1] = 0;
        g.fr.hi[1] = longest > 1 ? (double)(longest - 1) : 1;
        g.height = TOP + PLOT_H + BOTTOM;
    }
    map_begin(f, l, &g, title);
    if (policy && !strip) {
        policy_ctx ctx = {m, policy};
        cell_runs(f, l, &g, policy_colour, &ctx, " opacity=\"0.4\" shape-rendering=\"crispEdges\"");
    }
    for (int32_t k = 0; k < n_paths; k++)
        one_path(f, l, &g.fr, &paths[k]);
    bc__frame_axes(f, &g.fr, l->var_name[l->axis_x], strip ? "step" : l->var_name[l->axis_y]);
    legend(f, LEFT + PLOT_W + 24, TOP, e, n, NULL);
    bc__svg_end(f);
    return ferror(f) ? -1 : 0;
}
