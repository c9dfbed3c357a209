/* test_svg.c — unit tests of the pictures: colour data against their publications, ticks, escaping, layouts, maps and plots on synthetic data. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#include "bellcheck.h"
#include "svg_internal.h"
#include "unit.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* What a writer put on a stream, as a string (caller frees). */
typedef struct {
    char *text;
    size_t len;
    FILE *f;
} capture;

static void cap_open(capture *c)
{
    c->text = NULL;
    c->len = 0;
    c->f = open_memstream(&c->text, &c->len);
}

static void cap_close(capture *c)
{
    fclose(c->f);
}

static int count(const char *hay, const char *needle)
{
    int n = 0;
    for (const char *p = hay; (p = strstr(p, needle)) != NULL; p += strlen(needle))
        n++;
    return n;
}

/* Well-formed XML, by xmllint (Debian's libxml2-utils), on text written to a temporary file. */
static int well_formed(const char *text)
{
    char path[] = "/tmp/bc-svg-test.XXXXXX";
    int fd = mkstemp(path);
    if (fd < 0)
        return 0;
    FILE *f = fdopen(fd, "w");
    fputs("<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n", f);
    fputs(text, f);
    fclose(f);
    char cmd[128];
    snprintf(cmd, sizeof cmd, "xmllint --noout %s", path);
    int rc = system(cmd);
    remove(path);
    return rc == 0;
}

/* ------------------------------------------------------------------------ */
/* Colours                                                                  */
/* ------------------------------------------------------------------------ */

static void test_colours(void)
{
    char c[8];
    /* S. van der Walt, N. Smith, E. Firing, the viridis and magma colour maps
     * (2015, CC0): viridis entries 0, 128 and 255 are #440154, #21918c,
     * #fde725; magma entries 255 and 0 are #fcfdbf and #000004. */
    bc__seq_colour(BC__MAP_VIRIDIS, 0, c);
    CHECK(!strcmp(c, "#440154"), "viridis: low end");
    bc__seq_colour(BC__MAP_VIRIDIS, 128.0 / 255.0, c);
    CHECK(!strcmp(c, "#21918c"), "viridis: entry 128");
    bc__seq_colour(BC__MAP_VIRIDIS, 1, c);
    CHECK(!strcmp(c, "#fde725"), "viridis: high end");
    bc__seq_colour(BC__MAP_MAGMA_R, 0, c);
    CHECK(!strcmp(c, "#fcfdbf"), "regret map: zero is magma's light end");
    bc__seq_colour(BC__MAP_MAGMA_R, 1, c);
    CHECK(!strcmp(c, "#000004"), "regret map: the largest is magma's dark end");
    bc__seq_colour(BC__MAP_VIRIDIS, NAN, c);
    CHECK(!strcmp(c, "#440154"), "viridis: NaN gives the low end");

    /* Readable in grey: lightness rises monotonically along viridis and falls
     * along the reversed magma (a design property stated by its authors, in
     * CAM02-UCS lightness).  Measured as relative luminance of colours rounded
     * to bytes, the published tables themselves dip by up to 3e-4 (viridis
     * entries 95 and 146), so dips below 1e-3 are allowed. */
    int up = 1, down = 1;
    double prev_v = -1, prev_m = 2;
    for (int k = 0; k <= 255; k++) {
        bc__seq_colour(BC__MAP_VIRIDIS, k / 255.0, c);
        double lv = bc__luminance(c);
        bc__seq_colour(BC__MAP_MAGMA_R, k / 255.0, c);
        double lm = bc__luminance(c);
        up = up && lv >= prev_v - 1e-3;
        down = down && lm <= prev_m + 1e-3;
        prev_v = lv;
        prev_m = lm;
    }
    CHECK(up && prev_v > 0.75, "viridis: luminance rises from dark to light");
    CHECK(down && prev_m < 0.01, "reversed magma: luminance falls from light to dark");

    /* Relative luminance of white and black (IEC 61966-2-1 / WCAG 2.0 definitions). */
    CHECK_NEAR(bc__luminance("#ffffff"), 1.0, 1e-12, "luminance: white");
    CHECK_NEAR(bc__luminance("#000000"), 0.0, 1e-12, "luminance: black");

    /* M. Okabe and K. Ito, Color Universal Design (2008): blue (0,114,178),
     * orange (230,159,0), bluish green (0,158,115), vermillion (213,94,0),
     * sky blue (86,180,233), reddish purple (204,121,167), yellow (240,228,66)
     * (RGB values from memory). */
    static const char *okabe[7] = {"#0072b2", "#e69f00", "#009e73", "#d55e00",
                                   "#56b4e9", "#cc79a7", "#f0e442"};
    int same = 1;
    for (int a = 0; a < 7; a++) {
        bc__action_colour(a, c);
        same = same && !strcmp(c, okabe[a]);
    }
    CHECK(same, "actions: the seven colours of Okabe & Ito");
    int distinct = 1;
    char d[8];
    for (int a = 0; a < BC__ACTION_COLOURS; a++)
        for (int b = a + 1; b < BC__ACTION_COLOURS; b++) {
            bc__action_colour(a, c);
            bc__action_colour(b, d);
            distinct = distinct && strcmp(c, d);
        }
    CHECK(distinct, "actions: 14 distinct colours before they repeat");
}

/* ------------------------------------------------------------------------ */
/* Ticks and text                                                           */
/* ------------------------------------------------------------------------ */

static int ticks_are(const double *t, int n, const double *want, int m)
{
    if (n != m)
        return 0;
    for (int k = 0; k < n; k++)
        if (fabs(t[k] - want[k]) > 1e-12)
            return 0;
    return 1;
}

static void test_ticks(void)
{
    double t[32];
    /* Worked by hand: steps of 1, 2 or 5 times a power of ten. */
    static const double a[] = {0, 0.2, 0.4, 0.6, 0.8, 1};
    CHECK(ticks_are(t, bc__ticks_linear(0, 1, 5, t, 32), a, 6), "ticks: [0, 1] by 0.2");
    static const double b[] = {-1.5, -1, -0.5, 0, 0.5};
    CHECK(ticks_are(t, bc__ticks_linear(-1.5, 0.7, 6, t, 32), b, 5), "ticks: crater x range by 0.5");
    static const double c[] = {-0.08, -0.06, -0.04, -0.02, 0, 0.02, 0.04, 0.06, 0.08};
    CHECK(ticks_are(t, bc__ticks_linear(-0.08, 0.08, 6, t, 32), c, 9), "ticks: crater v range by 0.02");
    static const double d[] = {1e-3, 1e-2, 1e-1, 1, 10};
    CHECK(ticks_are(t, bc__ticks_log(1e-3, 10, t, 32), d, 5), "ticks: decades on a log axis");
    CHECK(bc__ticks_linear(3, 3, 5, t, 32) == 1 && t[0] == 3, "ticks: one value");
    char buf[32];
    bc__num_label(buf, sizeof buf, -0.0);
    CHECK(!strcmp(buf, "0"), "labels: no -0");
}

static void test_escaping(void)
{
    capture c;
    cap_open(&c);
    bc__xml_text(c.f, "a<b&\"c'\x01\xff\xc3\xa9");
    cap_close(&c);
    CHECK(!strcmp(c.text, "a&lt;b&amp;&quot;c&#39;\xef\xbf\xbd\xef\xbf\xbd\xc3\xa9"),
          "escaping: markup escaped, bad bytes replaced, UTF-8 kept");
    free(c.text);
    CHECK_NEAR(bc__text_width("\xc3\xa9t\xc3\xa9", 10), 18, 1e-12, "text width counts characters");
}

/* ------------------------------------------------------------------------ */
/* Layouts                                                                  */
/* ------------------------------------------------------------------------ */

/* A 3 x 2 yard: cells x0y0 .. x2y1, terminal `goal` (not a cell) reached by
 * moving east from x2y0; moves cost 1; discount 1 (invented, for the tests). */
static const char yard[] =
    "bell 1\nname yard\ndiscount 1\nobjective min\nterminal goal\ninitial x0y1\n"
    "actions east west north south\n"
    "x0y0 east 1 -> x1y0\nx0y0 west 1 -> x0y0\nx0y0 north 1 -> x0y1\nx0y0 south 1 -> x0y0\n"
    "x1y0 east 1 -> x2y0\nx1y0 west 1 -> x0y0\nx1y0 north 1 -> x1y1\nx1y0 south 1 -> x1y0\n"
    "x2y0 east 1 -> goal\nx2y0 west 1 -> x1y0\nx2y0 north 1 -> x2y1\nx2y0 south 1 -> x2y0\n"
    "x0y1 east 1 -> x1y1\nx0y1 west 1 -> x0y1\nx0y1 north 1 -> x0y1\nx0y1 south 1 -> x0y0\n"
    "x1y1 east 1 -> x2y1\nx1y1 west 1 -> x0y1\nx1y1 north 1 -> x1y1\nx1y1 south 1 -> x1y0\n"
    "x2y1 east 1 -> x2y1\nx2y1 west 1 -> x1y1\nx2y1 north 1 -> x2y1\nx2y1 south 1 -> x2y0\n";

static const char *state_at(const bc_model *m, const bc_layout *l, int i, int j)
{
    int32_t s = l->state[i + j * l->nx];
    return s >= 0 ? bc_names_get(m->state_names, s) : "-";
}

static void test_layout_names(void)
{
    bc_model *m = unit_read_model(yard);
    CHECK(m != NULL, "names: model read");
    if (!m)
        return;
    bc_layout l;
    char why[256];
    CHECK(bc_layout_names(&l, m, NULL, why, sizeof why) == 0, "names: a grid");
    CHECK(l.n_vars == 2 && !strcmp(l.var_name[0], "x") && !strcmp(l.var_name[1], "y"),
          "names: variables x and y");
    CHECK(l.nx == 3 && l.ny == 2 && l.low[0] == -0.5 && l.high[0] == 2.5, "names: 3 x 2 cells");
    CHECK(!strcmp(state_at(m, &l, 2, 1), "x2y1") && !strcmp(state_at(m, &l, 0, 0), "x0y0"),
          "names: cell (i, j) is state xIyJ");
    bc_layout_free(&l);
    CHECK(bc_layout_names(&l, m, "y,x", why, sizeof why) == 0 && l.nx == 2 && l.ny == 3 &&
          !strcmp(state_at(m, &l, 1, 2), "x2y1"), "names: --slice y,x swaps the axes");
    bc_layout_free(&l);
    CHECK(bc_layout_names(&l, m, "x,z", why, sizeof why) < 0 && strstr(why, "'z'") &&
          strstr(why, "(x, y)"), "names: an unknown variable is named");
    CHECK(bc_layout_names(&l, m, "x,x", why, sizeof why) < 0, "names: the same variable twice");
    CHECK(bc_layout_names(&l, m, "x,y,x", why, sizeof why) < 0, "names: three variables");
    bc_model_free(m);

    bc_model *w = unit_read_model("bell 1\ndiscount 1/2\nactions a\ndock a 1 -> dock\n"
                                  "aisle3 a 1 -> dock\n");
    CHECK(w && bc_layout_names(&l, w, NULL, why, sizeof why) == 1 && strstr(why, "dock"),
          "names: a name without a number is no grid");
    bc_model_free(w);
    w = unit_read_model("bell 1\ndiscount 1/2\nactions a\nq1 a 1 -> q2\nq2 a 1 -> q3\nq3 a 1 -> q1\n");
    CHECK(w && bc_layout_names(&l, w, NULL, why, sizeof why) == 0 && l.axis_y < 0 && l.nx == 3 &&
          !strcmp(state_at(w, &l, 0, 0), "q1"), "names: q1..q3 is a strip from 1");
    bc_layout_free(&l);
    bc_model_free(w);
    w = unit_read_model("bell 1\ndiscount 1/2\nactions a\nc1_2 a 1 -> c1_3\nc1_3 a 1 -> c1_2\n");
    CHECK(w && bc_layout_names(&l, w, NULL, why, sizeof why) == 0 &&
          !strcmp(l.var_name[0], "i1") && !strcmp(l.var_name[1], "i2"),
          "names: grid-model names give variables i1, i2");
    bc_layout_free(&l);
    bc_model_free(w);
}

/* A task of three variables, for the slice of a task's grid. */
static const char cube[] =
    "task 1\nname cube\ndiscount 9/10\nstate x 0 1\nstate y 0 1\nstate z 0 1\n"
    "action u = {down: -1, up: 1}\nnext x = x + 0.1*u\nnext y = y\nnext z = z\n"
    "reward -1\ninitial x = 0.5\ninitial y = 0.5\ninitial z = 0.5\n";

static void test_layout_task(void)
{
    bc_diag d;
    bc_diag_init(&d);
    bc_task *t = bc_task_read_text(cube, strlen(cube), "cube.task", &d);
    bc_grid_opts o;
    bc_grid_opts_default(&o);
    const char *why0;
    bc_grid_parse_cells("6x5x4", &o, &why0);
    bc_model *m = t ? bc_grid_model(t, &o, &d) : NULL;
    bc_diag_print(&d, stdout);
    bc_diag_free(&d);
    CHECK(m != NULL, "task: 6x5x4 grid built");
    if (!m) {
        bc_task_free(t);
        return;
    }
    bc_layout l;
    char why[256];
    CHECK(bc_layout_task(&l, t, &o, m, NULL, why, sizeof why) == 0 && l.nx == 6 && l.ny == 5 &&
          l.fixed[2] == 2, "task: default plane x, y at z's middle cell 2");
    /* Row-major, last variable fastest: cell (i, j, 2) is state 20 i + 4 j + 2. */
    CHECK(l.state[3 + 4 * 6] == 3 * 20 + 4 * 4 + 2, "task: state of cell (3, 4, 2)");
    bc_layout_free(&l);
    CHECK(bc_layout_task(&l, t, &o, m, "z,x", why, sizeof why) == 0 && l.nx == 4 && l.ny == 6 &&
          l.fixed[1] == 2 && l.state[1 + 5 * 4] == 5 * 20 + 2 * 4 + 1,
          "task: slice z,x holds y at cell 2");
    bc_layout_free(&l);
    CHECK(bc_layout_task(&l, t, &o, m, "v", why, sizeof why) < 0 && strstr(why, "(x, y, z)"),
          "task: an unknown variable is named with the list");
    bc_grid_opts other = o;
    other.cells[0] = 3;
    CHECK(bc_layout_task(&l, t, &other, m, NULL, why, sizeof why) < 0,
          "task: a model of another grid is refused");
    bc_model_free(m);
    bc_task_free(t);
}

/* ------------------------------------------------------------------------ */
/* Maps                                                                     */
/* ------------------------------------------------------------------------ */

static void test_maps(void)
{
    bc_model *m = unit_read_model(yard);
    bc_layout l;
    char why[256];
    if (!m || bc_layout_names(&l, m, NULL, why, sizeof why) != 0) {
        CHECK(0, "maps: yard laid out");
        bc_model_free(m);
        return;
    }
    /* Policy: east everywhere (action 0) but north (action 2) at x0y0. */
    int64_t policy[7];
    for (int32_t s = 0; s < m->n_states; s++)
        policy[s] = m->terminal[s] ? -1 : bc_model_find_pair(m, s, 0);
    policy[bc_names_find(m->state_names, "x0y0", 4)] =
        bc_model_find_pair(m, bc_names_find(m->state_names, "x0y0", 4), 2);
    capture c;
    cap_open(&c);
    CHECK(bc_svg_policy_map(c.f, m, &l, policy, "yard <policy>") == 0, "policy map: written");
    cap_close(&c);
    CHECK(well_formed(c.text), "policy map: well-formed (xmllint)");
    /* Row y1 (drawn at the top, y = 0) is one run of east; row y0 is north then two east. */
    CHECK(strstr(c.text, "<rect x=\"0\" y=\"0\" width=\"3\" height=\"1\" fill=\"#0072b2\"/>") &&
          strstr(c.text, "<rect x=\"0\" y=\"1\" width=\"1\" height=\"1\" fill=\"#009e73\"/>") &&
          strstr(c.text, "<rect x=\"1\" y=\"1\" width=\"2\" height=\"1\" fill=\"#0072b2\"/>"),
          "policy map: runs of one action merged, rows upwards");
    CHECK(strstr(c.text, ">east</text>") && strstr(c.text, ">north</text>") &&
          !strstr(c.text, ">west</text>"), "policy map: legend names the actions drawn");
    CHECK(strstr(c.text, "yard &lt;policy&gt;"), "policy map: title escaped");
    free(c.text);

    double v[7] = {1, 2, 3, 4, 5, 6, 0};
    cap_open(&c);
    CHECK(bc_svg_value_map(c.f, m, &l, v, "values", "V") == 0, "value map: written");
    cap_close(&c);
    CHECK(well_formed(c.text), "value map: well-formed (xmllint)");
    int32_t lo = -1, hi = -1;
    for (int32_t s = 0; s < m->n_states; s++) {
        if (m->terminal[s])
            continue;
        if (lo < 0 || v[s] < v[lo])
            lo = s;
        if (hi < 0 || v[s] > v[hi])
            hi = s;
    }
    CHECK(count(c.text, "#440154") >= 1 && count(c.text, "#fde725") >= 1,
          "value map: the lowest and highest values take the ends of viridis");
    free(c.text);
    bc_layout_free(&l);
    bc_model_free(m);
}

/* The yard scored: row y1 goes south and row y0 east (optimal), but at x1y1
 * the agent goes west, a detour of 2 (V = 5 against V* = 3): x1y1 alone is
 * marked.  Worked by hand.  A second agent stays at x2y1 (north into the
 * wall): a trap. */
static void test_agent_map(void)
{
    bc_model *m = unit_read_model(yard);
    bc_layout l;
    char why[256];
    if (!m || bc_layout_names(&l, m, NULL, why, sizeof why) != 0) {
        CHECK(0, "agent map: yard laid out");
        bc_model_free(m);
        return;
    }
    int32_t x1y1 = bc_names_find(m->state_names, "x1y1", 4);
    int32_t x2y1 = bc_names_find(m->state_names, "x2y1", 4);
    for (int variant = 0; variant < 2; variant++) {
        bc_policy *p = bc_policy_alloc(m);
        for (int32_t s = 0; p && s < m->n_states; s++) {
            if (m->terminal[s])
                continue;
            const char *n = bc_names_get(m->state_names, s);
            int a = n[3] == '1' ? 3 : 0; /* row y1 goes south, row y0 east */
            if (variant == 0 && s == x1y1)
                a = 1; /* west */
            if (variant == 1 && s == x2y1)
                a = 2; /* north: stays for ever */
            p->prob[bc_model_find_pair(m, s, a)] = 1;
        }
        bc_score sc;
        int ok = p && bc_score_compute(m, NULL, p, NULL, &sc) == 0;
        CHECK(ok, variant ? "agent map: trap agent scored" : "agent map: agent scored");
        if (ok) {
            capture c;
            cap_open(&c);
            CHECK(bc_svg_agent_map(c.f, m, &l, &sc, "agent") == 0, "agent map: written");
            cap_close(&c);
            CHECK(well_formed(c.text), "agent map: well-formed (xmllint)");
            if (variant == 0)
                CHECK(count(c.text, "class=\"mark\"") == 1 &&
                      strstr(c.text, "class=\"mark\" x=\"1.20\" y=\"0.20\"") &&
                      count(c.text, "class=\"trap\"") == 0,
                      "agent map: only the cell acting wrongly is marked");
            else
                CHECK(count(c.text, "class=\"trap\"") == 1 &&
                      strstr(c.text, "class=\"trap\" x=\"2\" y=\"0\""),
                      "agent map: the trap cell is outlined");
            free(c.text);
            bc_score_free(&sc);
        }
        bc_policy_free(p);
    }
    bc_layout_free(&l);
    bc_model_free(m);
}

/* ------------------------------------------------------------------------ */
/* Plots on synthetic data                                                  */
/* ------------------------------------------------------------------------ */

/* The points="..." of the k-th polyline of text into x[], y[]; returns how many. */
static int polyline(const char *text, int k, double *x, double *y, int cap)
{
    const char *p = text;
    for (int i = 0; i <= k; i++) {
        p = strstr(p, "<polyline");
        if (!p)
            return 0;
        p += 9;
    }
    p = strstr(p, "points=\"");
    if (!p)
        return 0;
    p += 8;
    int n = 0, used;
    while (n < cap && sscanf(p, "%lf,%lf%n", &x[n], &y[n], &used) == 2) {
        n++;
        p += used;
        while (*p == ' ')
            p++;
    }
    return n;
}

static void test_convergence(void)
{
    /* Synthetic refinement of exact order 2: V(h) = 1 + h^2, so the change
     * between grids h and 2h is 3 h^2 and lies on the order-2 guide. */
    double h[5] = {1.0 / 4, 1.0 / 8, 1.0 / 16, 1.0 / 32, 1.0 / 64}, v[5], b[5];
    for (int k = 0; k < 5; k++) {
        v[k] = 1 + h[k] * h[k];
        b[k] = k == 2 ? -1 : 1e-3;
    }
    bc_convergence cv = {5, h, v, b, "V*(initial)", "cell width / range"};
    capture c;
    cap_open(&c);
    CHECK(bc_svg_convergence(c.f, &cv) == 0, "convergence: written");
    cap_close(&c);
    CHECK(well_formed(c.text), "convergence: well-formed (xmllint)");
    double x[16], y[16], gx[4], gy[4];
    CHECK(polyline(c.text, 0, x, y, 16) == 5, "convergence: five values drawn");
    int nd = polyline(c.text, 1, x, y, 16), ng = polyline(c.text, 3, gx, gy, 4);
    CHECK(nd == 4 && ng == 2, "convergence: four changes and an order-2 guide");
    double worst = 0;
    for (int k = 0; k < nd && ng == 2; k++) { /* distance from the guide's line, in pixels */
        double t = (x[k] - gx[0]) / (gx[1] - gx[0]);
        worst = fmax(worst, fabs(y[k] - (gy[0] + t * (gy[1] - gy[0]))));
    }
    CHECK(ng == 2 && worst < 0.2, "convergence: order-2 changes lie on the order-2 guide (log-log)");
    CHECK(count(c.text, "<path d=\"M") == 4, "convergence: error bars where a bound is given");
    free(c.text);

    bc_plot empty = {"nothing", "x", "y", 1, 1, NULL, 0};
    cap_open(&c);
    CHECK(bc_svg_plot(c.f, &empty) == 0, "plot: no series written");
    cap_close(&c);
    CHECK(well_formed(c.text) && strstr(c.text, "no data to draw"), "plot: an empty plot says so");
    free(c.text);
}

static void test_trajectories(void)
{
    bc_model *m = unit_read_model(yard);
    bc_layout l;
    char why[256];
    if (!m || bc_layout_names(&l, m, NULL, why, sizeof why) != 0) {
        CHECK(0, "trajectories: yard laid out");
        bc_model_free(m);
        return;
    }
    /* Two synthetic paths: a diagonal from (0, 0) to (2, 1), and a single point. */
    double a[2 * 11], one[2] = {1, 0.5};
    for (int t = 0; t <= 10; t++) {
        a[2 * t] = 0.2 * t;
        a[2 * t + 1] = 0.1 * t;
    }
    bc_path paths[2] = {{a, 11}, {one, 1}};
    capture c;
    cap_open(&c);
    CHECK(bc_svg_trajectories(c.f, m, &l, NULL, paths, 2, "paths") == 0, "trajectories: written");
    cap_close(&c);
    CHECK(well_formed(c.text), "trajectories: well-formed (xmllint)");
    double x[16], y[16];
    int n = polyline(c.text, 1, x, y, 16); /* the line over its white halo */
    int straight = n == 11;
    for (int k = 1; k + 1 < n; k++) /* equal steps along a straight line */
        straight = straight && fabs((x[k + 1] - x[k]) - (x[1] - x[0])) < 0.11 &&
                   fabs((y[k + 1] - y[k]) - (y[1] - y[0])) < 0.11;
    CHECK(straight && x[10] > x[0] && y[10] < y[0], "trajectories: the diagonal goes right and up");
    CHECK(count(c.text, "<circle") == 2, "trajectories: a start mark per path");
    free(c.text);
    bc_layout_free(&l);
    bc_model_free(m);
}

static char *slurp(const char *path)
{
    FILE *f = fopen(path, "rb");
    if (!f)
        return NULL;
    static char buf[1 << 20];
    size_t n = fread(buf, 1, sizeof buf - 1, f);
    fclose(f);
    buf[n] = 0;
    return buf;
}

/* A synthetic refinement study of the cube task: three grids, the middle
 * one failed (left out of the plot), two trajectories kept on the finest. */
static void test_refine_pictures(void)
{
    bc_diag d;
    bc_diag_init(&d);
    bc_task *t = bc_task_read_text(cube, strlen(cube), "cube.task", &d);
    CHECK(t != NULL, "refine pictures: task read");
    if (!t)
        return;
    bc_refine_level lv[3];
    memset(lv, 0, sizeof lv);
    const char *cells[3] = {"4x4x4", "8x8x8", "16x16x16"};
    double a[3 * 4] = {0.1, 0.1, 0.5, 0.3, 0.2, 0.5, 0.5, 0.3, 0.5, 0.9, 0.4, 0.5};
    double b[3 * 2] = {0.9, 0.9, 0.5, 0.6, 0.6, 0.5};
    bc_trajectory tr[2] = {{.n_points = 4, .x = a}, {.n_points = 2, .x = b}};
    for (int k = 0; k < 3; k++) {
        const char *why;
        bc_grid_opts_default(&lv[k].grid);
        bc_grid_parse_cells(cells[k], &lv[k].grid, &why);
        lv[k].h = 1.0 / (4 << k);
        lv[k].value = 2 - lv[k].h;
        lv[k].value_proof = (bc_proof){BC_PROOF_INTERVAL, 1e-3};
    }
    lv[1].status = BC_REFINE_SOLVER;
    lv[2].trajectories = tr;
    lv[2].n_trajectories = 2;
    bc_refine r = {.n_levels = 3, .level = lv, .extrapolated = NAN};
    char dir[] = "/tmp/bc-svg-refine.XXXXXX", path[128];
    CHECK(mkdtemp(dir) != NULL, "refine pictures: temporary directory");
    snprintf(path, sizeof path, "%s/pics", dir);
    CHECK(bc_report_svg_refine(path, t, &r, "z,x", &d) == 0, "refine pictures: written into a new directory");
    bc_diag_print(&d, stdout);
    snprintf(path, sizeof path, "%s/pics/convergence.svg", dir);
    char *text = slurp(path);
    double x[16], y[16];
    CHECK(text && polyline(text, 0, x, y, 16) == 2 && polyline(text, 1, x, y, 16) == 1,
          "refine pictures: the two solved grids and their one change");
    CHECK(text && well_formed(strstr(text, "<svg")), "refine pictures: convergence well-formed");
    snprintf(path, sizeof path, "%s/pics/trajectories.svg", dir);
    text = slurp(path);
    CHECK(text && well_formed(strstr(text, "<svg")) && count(text, "<circle") == 2 &&
          polyline(text, 1, x, y, 16) == 4 && strstr(text, ">z</text>") &&
          strstr(text, "y in cell 8 of 16"), "refine pictures: trajectories on the z,x plane");
    /* The first path runs z 0.5 -> 0.5 and x 0.1 -> 0.9: straight up in z,x. */
    CHECK(text && polyline(text, 1, x, y, 16) == 4 && fabs(x[0] - x[3]) < 0.05 && y[3] < y[0],
          "refine pictures: a path drawn in the slice's coordinates");
    char cmd[160];
    snprintf(cmd, sizeof cmd, "rm -rf %s", dir);
    CHECK(system(cmd) == 0, "refine pictures: cleaned up");
    bc_diag_free(&d);
    bc_task_free(t);
}

/* A synthetic history: four vi sweeps whose residuals and bounds fall a
 * decade per sweep, then three pi steps, the last with residual 0 and the
 * only bound.  Worked by hand: four series (vi residual, vi bound, pi
 * residual, pi bound) of 4, 4, 2 and 1 points; the pi steps continue the
 * count (x = 5, 6, 7), the zero is left out and said so. */
static void test_residual(void)
{
    bc_trace_point t[7] = {{BC_METHOD_VI, 1, 1, 10},      {BC_METHOD_VI, 2, 0.1, 1},
                           {BC_METHOD_VI, 3, 0.01, 0.1},  {BC_METHOD_VI, 4, 0.001, 0.01},
                           {BC_METHOD_PI, 1, 0.5, -1},    {BC_METHOD_PI, 2, 0.05, -1},
                           {BC_METHOD_PI, 3, 0, 1e-6}};
    capture c;
    cap_open(&c);
    CHECK(bc_svg_residual(c.f, t, 7, 2, "a <model>") == 0, "residual: written");
    cap_close(&c);
    CHECK(well_formed(c.text), "residual: well-formed (xmllint)");
    CHECK(strstr(c.text, "<title>Residual per iteration: value iteration, then policy "
                         "iteration</title>") != NULL, "residual: both methods in the title");
    CHECK(strstr(c.text, "a &lt;model&gt;; 1 iteration in 2 kept (a long run is thinned); 1 "
                         "residual of 0 not drawn (logarithmic axis)") != NULL,
          "residual: the name, the thinning and the zero left out, said under the plot");
    double x[4][8], y[4][8];
    int n[4];
    for (int k = 0; k < 4; k++)
        n[k] = polyline(c.text, k, x[k], y[k], 8);
    CHECK(n[0] == 4 && n[1] == 4 && n[2] == 2 && n[3] == 1, "residual: 4, 4, 2 and 1 points drawn");
    CHECK(count(c.text, "class=\"series-3\"") == 1, "residual: each series marked by its class");
    int even = n[0] == 4 && n[2] == 2;
    for (int k = 1; even && k < 4; k++) /* a decade per sweep: equal steps down the log axis */
        even = fabs((x[0][k] - x[0][k - 1]) - (x[0][1] - x[0][0])) < 0.11 &&
               fabs((y[0][k] - y[0][k - 1]) - (y[0][1] - y[0][0])) < 0.11 && y[0][k] > y[0][k - 1];
    CHECK(even, "residual: a decade per sweep is an equal step down the log axis");
    double step = even ? (x[0][3] - x[0][0]) / 3 : 0; /* pixels per iteration (0.1 px rounding) */
    CHECK(even && fabs(x[2][0] - (x[0][0] + 4 * step)) < 0.2 &&
              fabs(x[3][0] - (x[0][0] + 6 * step)) < 0.3,
          "residual: policy iteration continues the count (steps 1 and 3 at x = 5 and 7)");
    free(c.text);

    /* Value iteration at discount 1 proves no bound: no bound series, and the note says so. */
    bc_trace_point u[2] = {{BC_METHOD_VI, 1, 3, -1}, {BC_METHOD_VI, 2, 1, -1}};
    cap_open(&c);
    CHECK(bc_svg_residual(c.f, u, 2, 1, NULL) == 0, "residual without bounds: written");
    cap_close(&c);
    CHECK(well_formed(c.text) && count(c.text, "class=\"series-") == 1 &&
              !strstr(c.text, "proven bound (vi)") && strstr(c.text, "no proven bound along the way"),
          "residual without bounds: one series, no bound in the legend, a note");
    free(c.text);
}

/* The HTML page of the synthetic study above: well-formed, both pictures,
 * one row per grid in each table, the failed grid said so. */
static void test_refine_page(void)
{
    bc_diag d;
    bc_diag_init(&d);
    bc_task *t = bc_task_read_text(cube, strlen(cube), "cube.task", &d);
    bc_diag_free(&d);
    if (!t) {
        CHECK(0, "refine page: task read");
        return;
    }
    bc_refine_level lv[2];
    memset(lv, 0, sizeof lv);
    double a[3 * 2] = {0.1, 0.1, 0.5, 0.9, 0.4, 0.5};
    bc_trajectory tr = {.n_points = 2, .x = a};
    const char *cells[2] = {"4x4x4", "8x8x8"};
    for (int k = 0; k < 2; k++) {
        const char *why;
        bc_grid_opts_default(&lv[k].grid);
        bc_grid_parse_cells(cells[k], &lv[k].grid, &why);
        lv[k].h = 1.0 / (4 << k);
        lv[k].value = 2 - lv[k].h;
        lv[k].value_proof = (bc_proof){k ? BC_PROOF_EXACT : BC_PROOF_INTERVAL, 1e-3};
        lv[k].difference = k ? 0.125 : NAN;
        lv[k].order = lv[k].extrapolated = NAN;
    }
    lv[0].status = BC_REFINE_UNUSABLE;
    snprintf(lv[0].message, sizeof lv[0].message, "a <bad> grid");
    lv[1].trajectories = &tr;
    lv[1].n_trajectories = 1;
    bc_refine r = {.n_levels = 2, .level = lv, .extrapolated = NAN};
    snprintf(r.note, sizeof r.note, "fewer than three grids");
    bc_refine_opts o;
    bc_refine_opts_default(&o);
    capture c;
    cap_open(&c);
    CHECK(bc_report_html_refine(c.f, t, &r, &o, "cube.task", NULL) == 0, "refine page: written");
    cap_close(&c);
    CHECK(well_formed(c.text), "refine page: well-formed (xmllint)");
    CHECK(count(c.text, "<svg") == 2, "refine page: the convergence plot and the trajectories inline");
    CHECK(count(c.text, "<td>8x8x8</td>") == 2 && count(c.text, "<td>4x4x4</td>") == 2,
          "refine page: each grid in both tables");
    CHECK(strstr(c.text, "unusable</span>: a &lt;bad&gt; grid") &&
              strstr(c.text, "1 of 2 grids FAILED") && strstr(c.text, "verdict failed"),
          "refine page: the failed grid, escaped, and the verdict says so");
    CHECK(strstr(c.text, "<span class=\"proof exact\">exact</span>") &&
              strstr(c.text, "No extrapolated optimum: fewer than three grids."),
          "refine page: the proof badge and why there is no extrapolation");
    CHECK(strstr(c.text, "It is not a proof about the physical system") != NULL,
          "refine page: the safety statement");
    free(c.text);
    bc_task_free(t);
}

int main(void)
{
    test_colours();
    test_ticks();
    test_escaping();
    test_layout_names();
    test_layout_task();
    test_maps();
    test_agent_map();
    test_convergence();
    test_trajectories();
    test_refine_pictures();
    test_residual();
    test_refine_page();
    UNIT_DONE();
}
