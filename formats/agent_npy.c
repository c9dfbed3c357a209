/* agent_npy.c — reads Q-tables (shape (states, actions)) and policies (shape (states,)) from NumPy .npy files. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The .npy layout, as NumPy documents it (numpy.lib.format): the magic
 * "\x93NUMPY", a major and a minor version byte, the header length (2 bytes
 * little-endian for version 1.0, 4 bytes for 2.0 and 3.0), then the header:
 * a Python dict literal such as
 *     {'descr': '<f8', 'fortran_order': False, 'shape': (4, 3), }
 * padded with spaces and ended by a newline, then the raw data.
 *
 * Read here: descr float32 / float64 and the integers i1..i8, u1..u8, in
 * either byte order ('<', '>', or '|' for one-byte types); C or Fortran
 * order.  The data must fill the file exactly: a header whose shape does not
 * match the bytes that follow is refused rather than trusted.  Positions in
 * messages are the 1-based row and column of the array.
 *
 * Grids: a Q-table of a grid model may keep the grid's axes, shape
 * (n1, ..., nk, actions), its rows being the cells in C order; a grid's
 * terminal state `stop` (always last) may be left out of Q-tables and of
 * flat policies alike.
 */
#include "agent_internal.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define NPY_MAX_DIM 32 /* NumPy's own limit (NPY_MAXDIMS) in its 1.x releases */

typedef struct {
    char kind;          /* 'f', 'i' or 'u' */
    int itemsize;       /* bytes per element */
    int big_endian;
    int fortran;        /* column-major data */
    int ndim;
    int64_t shape[NPY_MAX_DIM];
    char descr[24];     /* as written, for messages */
    const unsigned char *data;
    size_t data_len;
} npy_array;

/* A cursor over the header text. */
typedef struct {
    const char *s;
    size_t n, i;
} npy_cursor;

static void skip_blanks(npy_cursor *h)
{
    while (h->i < h->n && (h->s[h->i] == ' ' || h->s[h->i] == '\t' || h->s[h->i] == '\n' ||
                           h->s[h->i] == '\r'))
        h->i++;
}

/* Consumes ch (after blanks); 1 if it was there. */
static int take(npy_cursor *h, char ch)
{
    skip_blanks(h);
    if (h->i < h->n && h->s[h->i] == ch) {
        h->i++;
        return 1;
    }
    return 0;
}

/* A quoted Python string (no escapes: none occur in keys or descr) into out. */
static int take_string(npy_cursor *h, char *out, size_t cap)
{
    skip_blanks(h);
    if (h->i >= h->n || (h->s[h->i] != '\'' && h->s[h->i] != '"'))
        return -1;
    char quote = h->s[h->i++];
    size_t start = h->i;
    while (h->i < h->n && h->s[h->i] != quote && h->s[h->i] != '\\')
        h->i++;
    if (h->i >= h->n || h->s[h->i] != quote || h->i - start >= cap)
        return -1;
    memcpy(out, h->s + start, h->i - start);
    out[h->i - start] = 0;
    h->i++;
    return 0;
}

static int take_word(npy_cursor *h, const char *word)
{
    skip_blanks(h);
    size_t n = strlen(word);
    if (h->n - h->i < n || memcmp(h->s + h->i, word, n) != 0)
        return 0;
    h->i += n;
    return 1;
}

/* A shape tuple: "()", "(3,)", "(4, 3)"; Python 2 files may write "3L". */
static int take_shape(npy_cursor *h, npy_array *a)
{
    if (!take(h, '('))
        return -1;
    a->ndim = 0;
    while (!take(h, ')')) {
        skip_blanks(h);
        int64_t v = 0;
        size_t start = h->i;
        for (; h->i < h->n && h->s[h->i] >= '0' && h->s[h->i] <= '9'; h->i++) {
            if (v > (INT64_MAX - 9) / 10)
                return -1;
            v = 10 * v + (h->s[h->i] - '0');
        }
        if (h->i == start || a->ndim == NPY_MAX_DIM)
            return -1;
        take(h, 'L');
        a->shape[a->ndim++] = v;
        if (!take(h, ',')) {
            if (!take(h, ')'))
                return -1;
            break;
        }
    }
    return 0;
}

/* Reports a header problem (no position: the header is one binary record). */
static int header_fail(bc__agent_reader *r, const char *what)
{
    return bc__fail(r, (bc__at){r->label, 0, 0}, "NPY header: %s", what);
}

/* One `'key': value` of the header dict; seen counts each known key. */
static int header_entry(bc__agent_reader *r, npy_cursor *h, npy_array *a, int seen[3])
{
    char key[32];
    if (take_string(h, key, sizeof key) < 0 || !take(h, ':'))
        return header_fail(r, "expected a quoted key and ':' in the dict");
    if (strcmp(key, "descr") == 0) {
        seen[0]++;
        skip_blanks(h);
        if (h->i < h->n && h->s[h->i] == '[')
            return header_fail(r, "structured dtypes (a list in 'descr') are not supported: "
                               "save a plain float or integer array");
        if (take_string(h, a->descr, sizeof a->descr) < 0)
            return header_fail(r, "'descr' is not a quoted dtype string");
    } else if (strcmp(key, "fortran_order") == 0) {
        seen[1]++;
        if (take_word(h, "True"))
            a->fortran = 1;
        else if (take_word(h, "False"))
            a->fortran = 0;
        else
            return header_fail(r, "'fortran_order' is neither True nor False");
    } else if (strcmp(key, "shape") == 0) {
        seen[2]++;
        if (take_shape(h, a) < 0)
            return header_fail(r, "'shape' is not a tuple of non-negative integers");
    } else {
        char msg[96];
        snprintf(msg, sizeof msg, "unknown key '%s' (expected 'descr', 'fortran_order' and "
                 "'shape')", key);
        return header_fail(r, msg);
    }
    return 0;
}

/* The header dict into a.  0, or -1 after reporting. */
static int parse_dict(bc__agent_reader *r, npy_cursor *h, npy_array *a)
{
    int seen[3] = {0, 0, 0};
    if (!take(h, '{'))
        return header_fail(r, "expected a dict starting with '{'");
    while (!take(h, '}')) {
        if (header_entry(r, h, a, seen) < 0)
            return -1;
        if (!take(h, ',')) {
            if (!take(h, '}'))
                return header_fail(r, "expected ',' or '}' after a value in the dict");
            break;
        }
    }
    skip_blanks(h);
    if (h->i != h->n)
        return header_fail(r, "text after the end of the dict");
    if (seen[0] != 1 || seen[1] != 1 || seen[2] != 1)
        return header_fail(r, "the dict needs 'descr', 'fortran_order' and 'shape', each once");
    return 0;
}

/* Decodes descr ("<f8", ">i4", "|u1", ...).  0, or -1 after reporting. */
static int parse_descr(bc__agent_reader *r, npy_array *a)
{
    const char *d = a->descr;
    char order = d[0], kind = d[0] ? d[1] : 0;
    int size = kind && d[2] >= '1' && d[2] <= '8' && d[3] == 0 ? d[2] - '0' : 0;
    int ok = (order == '<' || order == '>' || (order == '|' && size == 1)) &&
             ((kind == 'f' && (size == 4 || size == 8)) ||
              ((kind == 'i' || kind == 'u') && (size == 1 || size == 2 || size == 4 || size == 8)));
    if (!ok)
        return bc__fail(r, (bc__at){r->label, 0, 0}, "unsupported dtype '%s' (read are float32 "
                        "and float64, '<f4' '<f8', and the integers i1..i8 and u1..u8, in either "
                        "byte order)", d);
    a->kind = kind;
    a->itemsize = size;
    a->big_endian = order == '>';
    return 0;
}

/* "(4, 3)" as Python writes the shape. */
static const char *shape_text(const npy_array *a, char *buf, size_t cap)
{
    size_t n = (size_t)snprintf(buf, cap, "(");
    for (int k = 0; k < a->ndim && n < cap; k++)
        n += (size_t)snprintf(buf + n, cap - n, "%s%lld", k ? ", " : "", (long long)a->shape[k]);
    if (n < cap)
        snprintf(buf + n, cap - n, a->ndim == 1 ? ",)" : ")");
    return buf;
}

/* The data fills the rest of the file exactly.  0, or -1 after reporting. */
static int check_data_size(bc__agent_reader *r, const npy_array *a)
{
    char shape[64 + 24 * NPY_MAX_DIM];
    uint64_t count = 1;
    int overflow = 0;
    for (int k = 0; k < a->ndim; k++) {
        uint64_t dim = (uint64_t)a->shape[k];
        if (dim && count > SIZE_MAX / a->itemsize / dim)
            overflow = 1;
        else
            count *= dim;
    }
    if (overflow)
        return bc__fail(r, (bc__at){r->label, 0, 0}, "the header's shape %s is too large for "
                        "this machine", shape_text(a, shape, sizeof shape));
    uint64_t need = count * (uint64_t)a->itemsize;
    if (need == a->data_len)
        return 0;
    if (a->data_len < need)
        return bc__fail(r, (bc__at){r->label, 0, 0}, "the file is truncated: the header's shape "
                        "%s of '%s' needs %llu bytes of data, the file holds %zu",
                        shape_text(a, shape, sizeof shape), a->descr, (unsigned long long)need,
                        a->data_len);
    return bc__fail(r, (bc__at){r->label, 0, 0}, "the file holds %zu bytes of data, but the "
                    "header's shape %s of '%s' accounts for only %llu: the header does not "
                    "describe the data", a->data_len, shape_text(a, shape, sizeof shape),
                    a->descr, (unsigned long long)need);
}

/* Magic, version, header and data size.  0, or -1 after reporting. */
static int parse_npy(bc__agent_reader *r, const unsigned char *buf, size_t len, npy_array *a)
{
    memset(a, 0, sizeof *a);
    if (len < 10 || memcmp(buf, "\x93NUMPY", 6) != 0)
        return header_fail(r, "the file is too short to hold an NPY header");
    int major = buf[6], minor = buf[7];
    if (!(major >= 1 && major <= 3 && minor == 0)) {
        char msg[96];
        snprintf(msg, sizeof msg, "format version %d.%d is not read (1.0, 2.0 and 3.0 are)",
                 major, minor);
        return header_fail(r, msg);
    }
    size_t start = major == 1 ? 10 : 12;
    if (len < start)
        return header_fail(r, "the file ends inside the header length");
    size_t hlen = (size_t)buf[8] | (size_t)buf[9] << 8;
    if (major >= 2)
        hlen |= (size_t)buf[10] << 16 | (size_t)buf[11] << 24;
    if (hlen > len - start)
        return header_fail(r, "the header runs past the end of the file");
    npy_cursor h = {(const char *)buf + start, hlen, 0};
    if (parse_dict(r, &h, a) < 0 || parse_descr(r, a) < 0)
        return -1;
    a->data = buf + start + hlen;
    a->data_len = len - start - hlen;
    return check_data_size(r, a);
}

/* ---- elements ------------------------------------------------------------ */

/* The raw bits of element number `index` (in storage order), as an unsigned integer. */
static uint64_t element_bits(const npy_array *a, size_t index)
{
    const unsigned char *p = a->data + index * (size_t)a->itemsize;
    uint64_t x = 0;
    for (int k = 0; k < a->itemsize; k++)
        x |= (uint64_t)p[a->big_endian ? a->itemsize - 1 - k : k] << (8 * k);
    return x;
}

/* Element [i][j] as a double, the array seen as a matrix: row i runs over
 * the axes before the last in C order (all axes for a policy, j = 0), column
 * j over the last axis.  For 1-D and 2-D arrays that is the array itself. */
static double element(const npy_array *a, int64_t i, int64_t j)
{
    int n_row_axes = a->ndim >= 2 ? a->ndim - 1 : a->ndim;
    size_t index;
    if (!a->fortran) {
        index = (size_t)(i * (a->ndim >= 2 ? a->shape[a->ndim - 1] : 1) + j);
    } else { /* first axis fastest: split i into its C-order digits */
        int64_t digit[NPY_MAX_DIM], rest = i;
        for (int k = n_row_axes - 1; k >= 0; k--) {
            digit[k] = rest % a->shape[k];
            rest /= a->shape[k];
        }
        size_t stride = 1;
        index = 0;
        for (int k = 0; k < n_row_axes; k++) {
            index += (size_t)digit[k] * stride;
            stride *= (size_t)a->shape[k];
        }
        index += (size_t)j * stride;
    }
    uint64_t x = element_bits(a, index);
    if (a->kind == 'f' && a->itemsize == 4) {
        uint32_t u = (uint32_t)x;
        float f;
        memcpy(&f, &u, sizeof f);
        return f;
    }
    if (a->kind == 'f') {
        double v;
        memcpy(&v, &x, sizeof v);
        return v;
    }
    if (a->kind == 'i' && a->itemsize < 8 && (x >> (8 * a->itemsize - 1)) & 1)
        x |= ~(uint64_t)0 << (8 * a->itemsize); /* sign extension */
    if (a->kind == 'i') {
        int64_t v;
        memcpy(&v, &x, sizeof v);
        return (double)v;
    }
    return (double)x;
}

/* The array's shape is `want` (ndim entries); else reports it, naming what each axis is. */
static int check_shape(bc__agent_reader *r, const npy_array *a, const int64_t *want, int ndim,
                       const char *axes)
{
    int same = a->ndim == ndim;
    for (int k = 0; same && k < ndim; k++)
        same = a->shape[k] == want[k];
    if (same)
        return 0;
    npy_array expected = {.ndim = ndim};
    memcpy(expected.shape, want, (size_t)ndim * sizeof *want);
    char e[64], f[64 + 24 * NPY_MAX_DIM];
    return bc__fail(r, (bc__at){r->label, 0, 0}, "wrong shape: expected %s (%s of the model), "
                    "found %s", shape_text(&expected, e, sizeof e), axes,
                    shape_text(a, f, sizeof f));
}

/* A grid's array: axes (n1, ..., nk[, actions]) whose rows (the product of
 * the n's) cover the states in order, either all of them or all but the
 * terminal states at the end (a grid model's `stop`, which needs no row).
 * Returns the number of rows, or -1 when the shape is not of that kind. */
static int64_t grid_rows(const bc_model *m, const npy_array *a, int with_actions)
{
    int n_row_axes = a->ndim - with_actions;
    if (n_row_axes < 1 || (with_actions && a->shape[a->ndim - 1] != m->n_actions))
        return -1;
    int64_t rows = 1;
    for (int k = 0; k < n_row_axes; k++) {
        if (a->shape[k] < 1 || rows > INT32_MAX / a->shape[k])
            return -1;
        rows *= a->shape[k];
    }
    if (rows == m->n_states)
        return rows;
    for (int32_t s = (int32_t)(rows < m->n_states ? rows : m->n_states); s < m->n_states; s++)
        if (!m->terminal[s])
            return -1;
    return rows < m->n_states ? rows : -1;
}

int bc__read_npy_qtable(bc__agent_reader *r, const unsigned char *buf, size_t len)
{
    const bc_model *m = r->m;
    npy_array a;
    int64_t want[2] = {m->n_states, m->n_actions};
    if (parse_npy(r, buf, len, &a) < 0)
        return -1;
    int64_t rows = grid_rows(m, &a, 1);
    if (rows < 0 && check_shape(r, &a, want, 2, "states, actions") < 0)
        return -1;
    rows = rows < 0 ? m->n_states : rows;
    for (int32_t s = 0; s < rows; s++) {
        if (bc__full(r))
            return -1;
        int any = 0;
        for (int32_t k = 0; k < m->n_actions && !any; k++)
            any = !isnan(element(&a, s, k));
        bc__at row = {r->label, s + 1, 1};
        bc__row_begin(r, s, row);
        if (!any) {
            bc__row_empty(r, s, row); /* NaN throughout: the table does not cover s */
            continue;
        }
        for (int32_t k = 0; k < m->n_actions; k++)
            bc__q_value(r, s, k, element(&a, s, k), (bc__at){r->label, s + 1, k + 1});
    }
    return 0;
}

int bc__read_npy_policy(bc__agent_reader *r, const unsigned char *buf, size_t len)
{
    const bc_model *m = r->m;
    npy_array a;
    int64_t want[1] = {m->n_states};
    if (parse_npy(r, buf, len, &a) < 0)
        return -1;
    if (a.kind == 'f')
        return bc__fail(r, (bc__at){r->label, 0, 0}, "a policy array holds integer action "
                        "indices; this one has the float dtype '%s'", a.descr);
    int64_t rows = a.ndim == 1 ? grid_rows(m, &a, 0) : -1; /* a policy of a grid comes flat */
    if (rows < 0 && check_shape(r, &a, want, 1, "one action index per state") < 0)
        return -1;
    rows = rows < 0 ? m->n_states : rows;
    for (int32_t s = 0; s < rows; s++) {
        if (bc__full(r))
            return -1;
        double index = element(&a, s, 0); /* exact: action indices are far below 2^53 */
        bc__at at = {r->label, s + 1, 1};
        bc__row_begin(r, s, at);
        if (index < 0) {
            bc__row_empty(r, s, at); /* -1: no action, the policy does not cover s */
        } else if (m->terminal[s]) {
            bc__policy_action(r, s, -1, at); /* terminal states ignore any index (format-agents.md) */
        } else if (index >= m->n_actions) {
            bc__state_bad(r, s);
            bc__fail(r, at, "state '%s': action index %.0f is out of range (the model has %d "
                     "action%s)", bc_names_get(m->state_names, s), index, (int)m->n_actions,
                     m->n_actions == 1 ? "" : "s");
        } else {
            bc__policy_action(r, s, (int32_t)index, at);
        }
    }
    return 0;
}

int bc_npy_shape(const char *path, int64_t *shape, int *ndim, bc_diag *d)
{
    char *buf;
    size_t len;
    if (bc_read_file(path, &buf, &len, d) < 0)
        return -1;
    bc__agent_reader r;
    memset(&r, 0, sizeof r);
    r.d = d;
    r.label = strcmp(path, "-") ? path : "<stdin>";
    npy_array a;
    int rc = parse_npy(&r, (const unsigned char *)buf, len, &a);
    free(buf);
    if (rc < 0)
        return -1;
    *ndim = a.ndim;
    memcpy(shape, a.shape, (size_t)a.ndim * sizeof *shape);
    return 0;
}
