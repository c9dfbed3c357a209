/* svg.c — what every picture is made of: colour maps, the action palette, escaping, ticks, frames and axes. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Colour data (published data, not code):
 *  - viridis and magma: the colour maps of S. van der Walt, N. J. Smith and
 *    E. Firing (2015), designed to be perceptually uniform, monotone in
 *    lightness (so they print in grey) and readable with the common forms
 *    of colour blindness; released under CC0.  Kept here: every 8th of their
 *    256 entries and the last, interpolated linearly in sRGB.
 *  - the action palette: M. Okabe and K. Ito, "Color Universal Design (CUD):
 *    how to make figures and presentations that are friendly to colorblind
 *    people" (2008): seven colours told apart by every common form of colour
 *    blindness (their black is kept for marks and outlines).
 */
#include "svg_internal.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

/* Entries 0, 8, 16, ..., 248 and 255 of the 256-entry tables. */
static const float viridis[33][3] = {
    {0.267004f, 0.004874f, 0.329415f}, {0.277018f, 0.050344f, 0.375715f},
    {0.282327f, 0.094955f, 0.417331f}, {0.282884f, 0.135920f, 0.453427f},
    {0.278826f, 0.175490f, 0.483397f}, {0.270595f, 0.214069f, 0.507052f},
    {0.258965f, 0.251537f, 0.524736f}, {0.244972f, 0.287675f, 0.537260f},
    {0.229739f, 0.322361f, 0.545706f}, {0.214298f, 0.355619f, 0.551184f},
    {0.199430f, 0.387607f, 0.554642f}, {0.185556f, 0.418570f, 0.556753f},
    {0.172719f, 0.448791f, 0.557885f}, {0.160665f, 0.478540f, 0.558115f},
    {0.149039f, 0.508051f, 0.557250f}, {0.137770f, 0.537492f, 0.554906f},
    {0.127568f, 0.566949f, 0.550556f}, {0.120565f, 0.596422f, 0.543611f},
    {0.120638f, 0.625828f, 0.533488f}, {0.132268f, 0.655014f, 0.519661f},
    {0.157851f, 0.683765f, 0.501686f}, {0.196571f, 0.711827f, 0.479221f},
    {0.246070f, 0.738910f, 0.452024f}, {0.304148f, 0.764704f, 0.419943f},
    {0.369214f, 0.788888f, 0.382914f}, {0.440137f, 0.811138f, 0.340967f},
    {0.515992f, 0.831158f, 0.294279f}, {0.595839f, 0.848717f, 0.243329f},
    {0.678489f, 0.863742f, 0.189503f}, {0.762373f, 0.876424f, 0.137064f},
    {0.845561f, 0.887322f, 0.099702f}, {0.926106f, 0.897330f, 0.104071f},
    {0.993248f, 0.906157f, 0.143936f}};

static const float magma[33][3] = {
    {0.001462f, 0.000466f, 0.013866f}, {0.013708f, 0.011771f, 0.068667f},
    {0.039608f, 0.031090f, 0.133515f}, {0.074257f, 0.052017f, 0.202660f},
    {0.113094f, 0.065492f, 0.276784f}, {0.159018f, 0.068354f, 0.352688f},
    {0.211718f, 0.061992f, 0.418647f}, {0.265447f, 0.060237f, 0.461840f},
    {0.316654f, 0.071690f, 0.485380f}, {0.366012f, 0.090314f, 0.497960f},
    {0.414709f, 0.110431f, 0.504662f}, {0.463508f, 0.129893f, 0.507652f},
    {0.512831f, 0.148179f, 0.507648f}, {0.562866f, 0.165368f, 0.504692f},
    {0.613617f, 0.181811f, 0.498536f}, {0.664915f, 0.198075f, 0.488836f},
    {0.716387f, 0.214982f, 0.475290f}, {0.767398f, 0.233705f, 0.457755f},
    {0.816914f, 0.255895f, 0.436461f}, {0.863320f, 0.283729f, 0.412403f},
    {0.904281f, 0.319610f, 0.388137f}, {0.937221f, 0.364929f, 0.368567f},
    {0.960949f, 0.418323f, 0.359630f}, {0.976690f, 0.476226f, 0.364466f},
    {0.986700f, 0.535582f, 0.382210f}, {0.992785f, 0.594891f, 0.410283f},
    {0.996096f, 0.653659f, 0.446213f}, {0.997325f, 0.711848f, 0.488154f},
    {0.996898f, 0.769591f, 0.534892f}, {0.995131f, 0.827052f, 0.585701f},
    {0.992440f, 0.884330f, 0.640099f}, {0.989434f, 0.941470f, 0.697519f},
    {0.987053f, 0.991438f, 0.749504f}};

/* Okabe & Ito's colours, ordered so that the first few differ most in hue
 * and in lightness: blue, orange, bluish green, vermillion, sky blue,
 * reddish purple, yellow. */
static const unsigned char okabe_ito[7][3] = {
    {0, 114, 178}, {230, 159, 0}, {0, 158, 115}, {213, 94, 0},
    {86, 180, 233}, {204, 121, 167}, {240, 228, 66}};

static int byte_of(double c)
{
    long v = lround(c * 255.0);
    return v < 0 ? 0 : v > 255 ? 255 : (int)v;
}

void bc__seq_colour(bc__seqmap map, double t, char out[8])
{
    const float(*tab)[3] = map == BC__MAP_MAGMA_R ? magma : viridis;
    if (map == BC__MAP_MAGMA_R)
        t = 1.0 - t; /* reversed: light for small regrets, dark for large */
    if (!(t > 0)) /* also NaN */
        t = 0;
    if (t > 1)
        t = 1;
    /* Table entry k holds map position 8k/255 (the last one 255/255). */
    double pos = t * 255.0;
    int k = (int)(pos / 8.0);
    if (k > 31)
        k = 31;
    double a = 8.0 * k, b = k == 31 ? 255.0 : 8.0 * (k + 1), u = (pos - a) / (b - a);
    double rgb[3];
    for (int c = 0; c < 3; c++)
        rgb[c] = tab[k][c] + u * (tab[k + 1][c] - tab[k][c]);
    snprintf(out, 8, "#%02x%02x%02x", byte_of(rgb[0]), byte_of(rgb[1]), byte_of(rgb[2]));
}

void bc__action_colour(int32_t a, char out[8])
{
    if (a < 0)
        a = -a;
    const unsigned char *c = okabe_ito[a % 7];
    /* Actions 8 to 14 take the same hues darkened by 40 %: still apart in
     * lightness from the first seven.  Beyond 14 the colours repeat (the
     * legend says so). */
    double k = (a / 7) % 2 ? 0.6 : 1.0;
    snprintf(out, 8, "#%02x%02x%02x", (int)lround(c[0] * k), (int)lround(c[1] * k),
             (int)lround(c[2] * k));
}

double bc__luminance(const char *hex)
{
    unsigned r = 0, g = 0, b = 0;
    if (sscanf(hex, "#%02x%02x%02x", &r, &g, &b) != 3)
        return NAN;
    unsigned v[3] = {r, g, b};
    double lin[3];
    for (int c = 0; c < 3; c++) { /* sRGB to linear light (IEC 61966-2-1) */
        double s = v[c] / 255.0;
        lin[c] = s <= 0.04045 ? s / 12.92 : pow((s + 0.055) / 1.055, 2.4);
    }
    return 0.2126 * lin[0] + 0.7152 * lin[1] + 0.0722 * lin[2];
}

/* Length of the well-formed UTF-8 character at s (1 to 4) that is also an
 * XML character, or 0. */
static size_t utf8_char(const unsigned char *s)
{
    unsigned c = s[0];
    if (c < 0x80)
        return c >= 0x20 || c == '\t' || c == '\n' || c == '\r' ? 1 : 0;
    size_t n = bc_utf8_len((const char *)s, SIZE_MAX);
    if (n == 3 && c == 0xEF && s[1] == 0xBF && (s[2] == 0xBE || s[2] == 0xBF))
        return 0; /* U+FFFE and U+FFFF are not XML characters */
    return n;
}

void bc__xml_text(FILE *f, const char *s)
{
    const unsigned char *p = (const unsigned char *)(s ? s : "");
    while (*p) {
        int n = utf8_char(p);
        if (n == 0) {
            fputs("\xEF\xBF\xBD", f); /* U+FFFD */
            p++;
            continue;
        }
        switch (*p) {
        case '&': fputs("&amp;", f); break;
        case '<': fputs("&lt;", f); break;
        case '>': fputs("&gt;", f); break;
        case '"': fputs("&quot;", f); break;
        case '\'': fputs("&#39;", f); break;
        default: fwrite(p, 1, (size_t)n, f);
        }
        p += n;
    }
}

double bc__text_width(const char *s, double size)
{
    size_t chars = 0;
    for (const unsigned char *p = (const unsigned char *)s; *p; p++)
        chars += (*p & 0xC0) != 0x80; /* count code points, not bytes */
    return 0.6 * size * (double)chars;
}

void bc__num_label(char *buf, size_t cap, double v)
{
    if (v == 0)
        v = 0; /* -0 prints as 0 */
    snprintf(buf, cap, "%.4g", v);
}

int bc__ticks_linear(double lo, double hi, int want, double *ticks, int cap)
{
    if (cap < 1)
        return 0;
    if (!(hi > lo) || !isfinite(hi - lo)) {
        ticks[0] = lo;
        return 1;
    }
    double raw = (hi - lo) / (want > 1 ? want : 1), mag = pow(10, floor(log10(raw)));
    double norm = raw / mag, step = (norm < 1.5 ? 1 : norm < 3.5 ? 2 : norm < 7.5 ? 5 : 10) * mag;
    double first = ceil(lo / step - 1e-9) * step;
    int n = 0;
    for (int k = 0; n < cap; k++) {
        double t = first + k * step;
        if (t > hi + 1e-9 * step)
            break;
        ticks[n++] = fabs(t) < 1e-9 * step ? 0 : t;
    }
    return n;
}

int bc__ticks_log(double lo, double hi, double *ticks, int cap)
{
    int e0 = (int)ceil(log10(lo) - 1e-9), e1 = (int)floor(log10(hi) + 1e-9);
    if (e1 - e0 < 1)
        return bc__ticks_linear(lo, hi, 4, ticks, cap);
    int every = (e1 - e0) / 8 + 1, n = 0;
    for (int e = e0; e <= e1 && n < cap; e += every)
        ticks[n++] = pow(10, e);
    return n;
}

void bc__svg_begin(FILE *f, double w, double h, const char *title)
{
    fprintf(f, "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"%.0f\" height=\"%.0f\" "
               "viewBox=\"0 0 %.0f %.0f\" font-family=\"DejaVu Sans, Arial, Helvetica, sans-serif\" "
               "role=\"img\">\n<title>", w, h, w, h);
    bc__xml_text(f, title);
    fputs("</title>\n<rect width=\"100%\" height=\"100%\" fill=\"#ffffff\"/>\n", f);
}

void bc__svg_end(FILE *f)
{
    fputs("</svg>\n", f);
}

void bc__svg_text(FILE *f, double x, double y, const char *anchor, double size, int bold,
                  double rotate, const char *s)
{
    fprintf(f, "<text x=\"%.1f\" y=\"%.1f\" text-anchor=\"%s\" font-size=\"%.0f\"%s", x, y, anchor,
            size, bold ? " font-weight=\"bold\"" : "");
    if (rotate != 0)
        fprintf(f, " transform=\"rotate(%.0f %.1f %.1f)\"", rotate, x, y);
    fputc('>', f);
    bc__xml_text(f, s);
    fputs("</text>\n", f);
}

double bc__frame_px(const bc__frame *fr, int k, double v)
{
    double lo = fr->lo[k], hi = fr->hi[k];
    if (fr->log[k]) {
        lo = log10(lo);
        hi = log10(hi);
        v = log10(v);
    }
    double u = hi > lo ? (v - lo) / (hi - lo) : 0.5;
    return k == 0 ? fr->x0 + u * fr->w : fr->y0 + fr->h - u * fr->h;
}

/* Ticks of axis k of the frame. */
static int frame_ticks(const bc__frame *fr, int k, double *ticks, int cap)
{
    if (fr->log[k])
        return bc__ticks_log(fr->lo[k], fr->hi[k], ticks, cap);
    return bc__ticks_linear(fr->lo[k], fr->hi[k], k == 0 ? 6 : 5, ticks, cap);
}

void bc__frame_axes(FILE *f, const bc__frame *fr, const char *x_label, const char *y_label)
{
    double t[32];
    char lab[32];
    fprintf(f, "<rect x=\"%.1f\" y=\"%.1f\" width=\"%.1f\" height=\"%.1f\" fill=\"none\" "
               "stroke=\"#333333\"/>\n<g stroke=\"#333333\">\n", fr->x0, fr->y0, fr->w, fr->h);
    int nx = frame_ticks(fr, 0, t, 32);
    for (int i = 0; i < nx; i++) {
        double x = bc__frame_px(fr, 0, t[i]);
        fprintf(f, "<line x1=\"%.1f\" y1=\"%.1f\" x2=\"%.1f\" y2=\"%.1f\"/>\n", x, fr->y0 + fr->h,
                x, fr->y0 + fr->h + 5);
    }
    double ty[32];
    int ny = fr->no_y_axis ? 0 : frame_ticks(fr, 1, ty, 32);
    for (int i = 0; i < ny; i++) {
        double y = bc__frame_px(fr, 1, ty[i]);
        fprintf(f, "<line x1=\"%.1f\" y1=\"%.1f\" x2=\"%.1f\" y2=\"%.1f\"/>\n", fr->x0 - 5, y,
                fr->x0, y);
    }
    fputs("</g>\n", f);
    for (int i = 0; i < nx; i++) {
        bc__num_label(lab, sizeof lab, t[i]);
        bc__svg_text(f, bc__frame_px(fr, 0, t[i]), fr->y0 + fr->h + 18, "middle", 11, 0, 0, lab);
    }
    for (int i = 0; i < ny; i++) {
        bc__num_label(lab, sizeof lab, ty[i]);
        bc__svg_text(f, fr->x0 - 8, bc__frame_px(fr, 1, ty[i]) + 4, "end", 11, 0, 0, lab);
    }
    if (x_label)
        bc__svg_text(f, fr->x0 + fr->w / 2, fr->y0 + fr->h + 38, "middle", 13, 0, 0, x_label);
    if (y_label)
        bc__svg_text(f, fr->x0 - 52, fr->y0 + fr->h / 2, "middle", 13, 0, -90, y_label);
}

void bc__colour_bar(FILE *f, double x, double y, double h, bc__seqmap map, double lo, double hi,
                    const char *label)
{
    enum { STRIPES = 64 };
    char col[8], lab[32];
    fputs("<g shape-rendering=\"crispEdges\">\n", f);
    for (int k = 0; k < STRIPES; k++) { /* bottom stripe = lo */
        bc__seq_colour(map, (k + 0.5) / STRIPES, col);
        fprintf(f, "<rect x=\"%.1f\" y=\"%.2f\" width=\"16\" height=\"%.2f\" fill=\"%s\"/>\n", x,
                y + h - (k + 1) * h / STRIPES, h / STRIPES + 0.3, col);
    }
    fprintf(f, "</g>\n<rect x=\"%.1f\" y=\"%.1f\" width=\"16\" height=\"%.1f\" fill=\"none\" "
               "stroke=\"#333333\"/>\n", x, y, h);
    double t[16];
    int n = hi > lo ? bc__ticks_linear(lo, hi, 5, t, 16) : 0;
    if (!(hi > lo)) { /* one value: one label in the middle */
        t[0] = lo;
        n = 1;
    }
    for (int i = 0; i < n; i++) {
        double ty = hi > lo ? y + h - (t[i] - lo) / (hi - lo) * h : y + h / 2;
        fprintf(f, "<line x1=\"%.1f\" y1=\"%.1f\" x2=\"%.1f\" y2=\"%.1f\" stroke=\"#333333\"/>\n",
                x + 16, ty, x + 21, ty);
        bc__num_label(lab, sizeof lab, t[i]);
        bc__svg_text(f, x + 24, ty + 4, "start", 11, 0, 0, lab);
    }
    if (label)
        bc__svg_text(f, x, y - 10, "start", 12, 0, 0, label);
}
