/* report_svg.c — the picture directories of `solve`, `score` and `refine`: every SVG file written, or none. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#define _XOPEN_SOURCE 700 /* mkdtemp */
#include "report_internal.h"
#include "svg_internal.h"

#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

static const char xml_decl[] = "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n";

static char *join(const char *dir, const char *name)
{
    size_t n = strlen(dir) + strlen(name) + 2;
    char *p = malloc(n);
    if (p)
        snprintf(p, n, "%s/%s", dir, name);
    return p;
}

static int write_one(FILE *f, const bc_svg_file *file)
{
    fputs(xml_decl, f);
    return file->write(f, file->ctx) < 0 || fflush(f) != 0 || ferror(f) ? -1 : 0;
}

/* An existing directory: every file to a temporary beside its target; all
 * are renamed into place only when every one was written. */
static int into_existing(const char *dir, const bc_svg_file *files, int32_t n, bc_diag *d)
{
    bc_out *o = calloc((size_t)n, sizeof *o);
    if (!o) {
        bc_diag_add(d, BC_ERROR, dir, 0, 0, "out of memory");
        return -1;
    }
    int32_t opened = 0;
    int ok = 1;
    for (; opened < n && ok; opened++) {
        char *path = join(dir, files[opened].name);
        ok = path && bc_out_open(&o[opened], path, d) == 0;
        if (ok && write_one(o[opened].f, &files[opened]) < 0) {
            bc_diag_add(d, BC_ERROR, path, 0, 0, "write error: %s", strerror(errno));
            ok = 0;
        }
        free(path);
    }
    for (int32_t k = 0; k < opened; k++)
        if (ok)
            ok = bc_out_commit(&o[k], d) == 0;
        else
            bc_out_abort(&o[k]);
    free(o);
    return ok ? 0 : -1;
}

/* Removes the files of a directory being built, then the directory. */
static void discard(const char *tmp, const bc_svg_file *files, int32_t n)
{
    for (int32_t k = 0; k < n; k++) {
        char *path = join(tmp, files[k].name);
        if (path)
            unlink(path);
        free(path);
    }
    rmdir(tmp);
}

/* A new directory: built as DIR.tmpXXXXXX beside it and renamed into place. */
static int as_new(const char *dir, const bc_svg_file *files, int32_t n, bc_diag *d)
{
    size_t len = strlen(dir);
    while (len > 1 && dir[len - 1] == '/')
        len--;
    char *tmp = malloc(len + 12);
    if (!tmp) {
        bc_diag_add(d, BC_ERROR, dir, 0, 0, "out of memory");
        return -1;
    }
    snprintf(tmp, len + 12, "%.*s.tmpXXXXXX", (int)len, dir);
    if (!mkdtemp(tmp)) {
        bc_diag_add(d, BC_ERROR, dir, 0, 0, "cannot create the directory: %s", strerror(errno));
        free(tmp);
        return -1;
    }
    mode_t mask = umask(0); /* mkdtemp makes it private; give it the mode mkdir would */
    umask(mask);
    chmod(tmp, 0777 & ~mask);
    int ok = 1;
    for (int32_t k = 0; k < n && ok; k++) {
        char *path = join(tmp, files[k].name);
        FILE *f = path ? fopen(path, "w") : NULL;
        ok = f && write_one(f, &files[k]) == 0;
        if (f && fclose(f) != 0)
            ok = 0;
        if (!ok)
            bc_diag_add(d, BC_ERROR, dir, 0, 0, "cannot write %s: %s", files[k].name,
                        strerror(errno));
        free(path);
    }
    if (ok && rename(tmp, dir) != 0) {
        bc_diag_add(d, BC_ERROR, dir, 0, 0, "cannot create the directory: %s", strerror(errno));
        ok = 0;
    }
    if (!ok)
        discard(tmp, files, n);
    free(tmp);
    return ok ? 0 : -1;
}

int bc_svg_write_dir(const char *dir, const bc_svg_file *files, int32_t n, bc_diag *d)
{
    struct stat st;
    if (stat(dir, &st) == 0) {
        if (!S_ISDIR(st.st_mode)) {
            bc_diag_add(d, BC_ERROR, dir, 0, 0, "exists and is not a directory");
            return -1;
        }
        return into_existing(dir, files, n, d);
    }
    if (errno != ENOENT) {
        bc_diag_add(d, BC_ERROR, dir, 0, 0, "%s", strerror(errno));
        return -1;
    }
    return as_new(dir, files, n, d);
}

/* ------------------------------------------------------------------------ */
/* The pictures of solve and score                                          */
/* ------------------------------------------------------------------------ */

typedef struct {
    const bc_model *m;
    const bc_layout *l;
    const int64_t *policy;
    const double *values;
    const bc_score *score;
    const bc_solution *sol; /* solve: its history for residual.svg */
    char title[3][320];
} pictures;

static int policy_svg(FILE *f, const void *ctx)
{
    const pictures *p = ctx;
    return bc_svg_policy_map(f, p->m, p->l, p->policy, p->title[0]);
}

static int value_svg(FILE *f, const void *ctx)
{
    const pictures *p = ctx;
    return bc_svg_value_map(f, p->m, p->l, p->values, p->title[1],
                            p->m->objective == BC_MIN ? "V* (cost)" : "V*");
}

static int agent_svg(FILE *f, const void *ctx)
{
    const pictures *p = ctx;
    return bc_svg_agent_map(f, p->m, p->l, p->score, p->title[2]);
}

static int residual_svg(FILE *f, const void *ctx)
{
    const pictures *p = ctx;
    return bc_svg_residual(f, p->sol->trace, p->sol->n_trace, p->sol->trace_stride, p->m->name);
}

static void titles(pictures *p, const bc_model *m)
{
    const char *stage = m->horizon > 0 ? " (first stage)" : "";
    snprintf(p->title[0], sizeof p->title[0], "Optimal policy%s: %.200s", stage, m->name);
    snprintf(p->title[1], sizeof p->title[1], "Optimal value V*%s: %.200s", stage, m->name);
    snprintf(p->title[2], sizeof p->title[2], "The agent's actions and where it loses value: %.200s",
             m->name);
}

int bc_report_svg_solve(const char *dir, const bc_model *m, const bc_layout *l,
                        const bc_solution *sol, bc_diag *d)
{
    pictures p = {m, l, sol->policy, sol->values, NULL, sol, {{0}}};
    titles(&p, m);
    bc_svg_file files[] = {{"policy.svg", policy_svg, &p},
                           {"value.svg", value_svg, &p},
                           {"residual.svg", residual_svg, &p}};
    return bc_svg_write_dir(dir, files, sol->n_trace > 0 ? 3 : 2, d);
}

int bc_report_svg_score(const char *dir, const bc_model *m, const bc_layout *l, const bc_score *s,
                        bc_diag *d)
{
    pictures p = {m, l, s->optimum.policy, s->optimum.values, s, NULL, {{0}}};
    titles(&p, m);
    bc_svg_file files[] = {{"agent.svg", agent_svg, &p},
                           {"policy.svg", policy_svg, &p},
                           {"value.svg", value_svg, &p}};
    return bc_svg_write_dir(dir, files, 3, d);
}

/* ------------------------------------------------------------------------ */
/* The pictures of refine                                                   */
/* ------------------------------------------------------------------------ */

/* The pieces of a refinement study's pictures (svg_internal.h): the solved
 * grids' values for the convergence plot, and the finest solved grid's
 * trajectories on the plane of the slice. */
int bc__refine_pictures_init(bc__refine_pictures *p, const bc_task *t, const bc_refine *r,
                             const char *slice, char *why, size_t cap)
{
    memset(p, 0, sizeof *p);
    int32_t finest = -1;
    for (int32_t k = 0; k < r->n_levels && p->cv.n < BC__REFINE_MAX; k++) {
        const bc_refine_level *lv = &r->level[k];
        if (lv->status != BC_REFINE_OK)
            continue; /* a failed grid has no value to draw */
        p->h[p->cv.n] = lv->h;
        p->value[p->cv.n] = lv->value;
        p->bound[p->cv.n++] = lv->value_proof.kind != BC_PROOF_NONE ? lv->value_proof.bound : -1;
        finest = k;
    }
    p->cv = (bc_convergence){p->cv.n, p->h, p->value, p->bound, "V* at the initial distribution",
                             "relative cell size h = cells^(-1/variables)"};
    const bc_refine_level *lv = finest >= 0 ? &r->level[finest] : NULL;
    if (!lv || lv->n_trajectories == 0)
        return 0;
    if (bc_layout_task(&p->layout, t, &lv->grid, NULL, slice, why, cap) < 0)
        return -1;
    p->paths = malloc((size_t)lv->n_trajectories * sizeof *p->paths);
    if (!p->paths) {
        bc_layout_free(&p->layout);
        snprintf(why, cap, "out of memory");
        return -1;
    }
    for (int32_t k = 0; k < lv->n_trajectories; k++)
        p->paths[k] = (bc_path){lv->trajectories[k].x, lv->trajectories[k].n_points};
    p->n_paths = lv->n_trajectories;
    char cells[200];
    bc__cells_text(lv->grid.n_dims, lv->grid.cells, cells, sizeof cells);
    snprintf(p->title, sizeof p->title, "Simulated episodes under the optimal policy of the "
             "finest grid, %s (%d trajectories)", cells, (int)p->n_paths);
    return 0;
}

void bc__refine_pictures_free(bc__refine_pictures *p)
{
    free(p->paths);
    p->paths = NULL;
    bc_layout_free(&p->layout);
}

int bc__refine_convergence_svg(FILE *f, const void *ctx)
{
    return bc_svg_convergence(f, &((const bc__refine_pictures *)ctx)->cv);
}

int bc__refine_trajectories_svg(FILE *f, const void *ctx)
{
    const bc__refine_pictures *p = ctx;
    return bc_svg_trajectories(f, NULL, &p->layout, NULL, p->paths, p->n_paths, p->title);
}

int bc_report_svg_refine(const char *dir, const bc_task *t, const bc_refine *r, const char *slice,
                         bc_diag *d)
{
    bc__refine_pictures p;
    char why[400];
    if (bc__refine_pictures_init(&p, t, r, slice, why, sizeof why) < 0) {
        bc_diag_add(d, BC_ERROR, dir, 0, 0, "%s", why);
        return -1;
    }
    bc_svg_file files[2] = {{"convergence.svg", bc__refine_convergence_svg, &p}};
    int32_t n = 1;
    if (p.n_paths > 0)
        files[n++] = (bc_svg_file){"trajectories.svg", bc__refine_trajectories_svg, &p};
    int rc = bc_svg_write_dir(dir, files, n, d);
    bc__refine_pictures_free(&p);
    return rc;
}
