/* svg_internal.h — pieces the picture files share: colours, escaping, ticks, the SVG frame and axes, a refinement study's pictures (not public). */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#ifndef BC_SVG_INTERNAL_H
#define BC_SVG_INTERNAL_H

#include "bellcheck.h"

/* Sequential colour maps (svg.c names their sources). */
typedef enum {
    BC__MAP_VIRIDIS = 0, /* dark blue-violet (low) to yellow (high): values */
    BC__MAP_MAGMA_R = 1  /* pale yellow (low) to near-black (high): regrets, darker is worse */
} bc__seqmap;

/* "#rrggbb" of map at t in [0, 1] (clamped; NaN gives the low end) into out. */
void bc__seq_colour(bc__seqmap map, double t, char out[8]);
/* "#rrggbb" of action a in the qualitative palette (repeats after 14 actions). */
void bc__action_colour(int32_t a, char out[8]);
#define BC__ACTION_COLOURS 14 /* distinct colours before the palette repeats */
/* Relative luminance (0 black .. 1 white) of "#rrggbb". */
double bc__luminance(const char *hex);

/* Writes s as XML character data: & < > " ' escaped, invalid UTF-8 and
 * control characters replaced by U+FFFD, so any name keeps the file well-formed. */
void bc__xml_text(FILE *f, const char *s);
/* Width of s in pixels at font size `size` (an estimate: 0.6 em per character). */
double bc__text_width(const char *s, double size);
/* A tick label or a figure: %.4g, without "-0". */
void bc__num_label(char *buf, size_t cap, double v);

/* "Nice" ticks (1, 2, 5 times a power of ten) inside [lo, hi], about `want`
 * of them; returns how many were written to ticks[0..cap). */
int bc__ticks_linear(double lo, double hi, int want, double *ticks, int cap);
/* Ticks for a logarithmic axis over [lo, hi] (both > 0): powers of ten, or
 * linear ticks when the range spans less than one decade. */
int bc__ticks_log(double lo, double hi, double *ticks, int cap);

/* Opens an <svg> element of w x h pixels with its <title> (no XML
 * declaration, so the same text goes into a file or inline into HTML). */
void bc__svg_begin(FILE *f, double w, double h, const char *title);
void bc__svg_end(FILE *f);
/* A text element: anchor "start", "middle" or "end"; rotate -90 for a y label. */
void bc__svg_text(FILE *f, double x, double y, const char *anchor, double size, int bold,
                  double rotate, const char *s);

/* A rectangle of the page where data are drawn, and the data range it shows. */
typedef struct {
    double x0, y0, w, h;   /* pixels: left, top, width, height */
    double lo[2], hi[2];   /* data range along x and y */
    int log[2];            /* 1: logarithmic axis */
    int no_y_axis;         /* 1: a strip, without ticks up the side */
} bc__frame;

/* Pixel of data value v along axis k (0 = x, 1 = y; y grows upwards). */
double bc__frame_px(const bc__frame *fr, int k, double v);
/* Draws the frame's box, ticks, tick labels and axis labels (label NULL: none). */
void bc__frame_axes(FILE *f, const bc__frame *fr, const char *x_label, const char *y_label);
/* A vertical colour bar at (x, y) of height h for values lo..hi of map, with ticks and a label. */
void bc__colour_bar(FILE *f, double x, double y, double h, bc__seqmap map, double lo, double hi,
                    const char *label);

/* The pictures of a refinement study (report_svg.c), for its SVG directory
 * and its HTML page. */
#define BC__REFINE_MAX 64 /* grids drawn at most */
typedef struct {
    bc_convergence cv;     /* the solved grids' values against their cell size */
    double h[BC__REFINE_MAX], value[BC__REFINE_MAX], bound[BC__REFINE_MAX];
    bc_layout layout;      /* the finest solved grid's plane (when it kept trajectories) */
    bc_path *paths;        /* [n_paths] its trajectories; NULL when none */
    int32_t n_paths;
    char title[320];
} bc__refine_pictures;

/* Fills p from the study; 0, or -1 with why[] set (a bad slice, out of memory). */
int bc__refine_pictures_init(bc__refine_pictures *p, const bc_task *t, const bc_refine *r,
                             const char *slice, char *why, size_t cap);
void bc__refine_pictures_free(bc__refine_pictures *p);
/* Writers for bc_svg_file and bc__html_picture (ctx: a bc__refine_pictures). */
int bc__refine_convergence_svg(FILE *f, const void *ctx);
int bc__refine_trajectories_svg(FILE *f, const void *ctx);

#endif
