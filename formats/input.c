/* input.c — reading input files (or standard input): whole, or a .bell model in chunks; choosing the model reader. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#include "bellcheck.h"
#include "bell_read_internal.h"

#include <errno.h>
#include <fcntl.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

/* 1 when fd is at its end (one byte is read to find out); -1 on a read error. */
static int at_end(int fd)
{
    char probe;
    ssize_t got;
    while ((got = read(fd, &probe, 1)) < 0 && errno == EINTR)
        ;
    return got < 0 ? -1 : got == 0;
}

/* Reads everything from fd into a growing buffer (one byte more for a final
 * NUL).  Returns 0, -1 (errno set), -2 when the buffer would need more than
 * max bytes (0 = no limit), or -4 on a stop request (bc_stop_request), looked
 * at before every read and when a signal interrupts one, so that Ctrl-C ends
 * a wait on a pipe or a terminal that sends nothing. */
static int read_all(int fd, size_t hint, uint64_t max, char **buf, size_t *len)
{
    /* A regular file fits with a byte to spare, so its end is seen without growing. */
    size_t cap = hint + 1 > 65536 ? hint + 1 : 65536, n = 0;
    if (max && cap >= max)
        cap = max > 1 ? (size_t)max - 1 : 1;
    char *p = malloc(cap + 1);
    if (!p)
        return -1;
    for (;;) {
        if (bc_stop_requested()) {
            free(p);
            return -4;
        }
        if (n == cap) {
            /* Double, but never past max; when no growth is allowed the input must end here. */
            size_t grown = cap > SIZE_MAX / 2 - 1 ? cap : 2 * cap;
            if (max && grown + 1 > max)
                grown = max - 1 > cap ? (size_t)max - 1 : cap;
            if (grown == cap) {
                int end = at_end(fd);
                if (end == 1)
                    break;
                free(p);
                if (end == 0 && !max)
                    errno = ENOMEM;
                return end < 0 || !max ? -1 : -2;
            }
            char *q = realloc(p, grown + 1);
            if (!q) {
                free(p);
                return -1;
            }
            p = q;
            cap = grown;
        }
        ssize_t got = read(fd, p + n, cap - n);
        if (got < 0) {
            if (errno == EINTR)
                continue; /* the stop request, if that was it, is seen above */
            free(p);
            return -1;
        }
        if (got == 0)
            break;
        n += (size_t)got;
    }
    p[n] = 0;
    *buf = p;
    *len = n;
    return 0;
}

/* Opens path ("-" = standard input) for reading: the descriptor into *fd and,
 * for a regular file, its size into *hint (else 0).  0, or -1 after reporting. */
static int open_input(const char *path, const char *label, int *fd, size_t *hint, bc_diag *d)
{
    int is_stdin = strcmp(path, "-") == 0;
    *fd = is_stdin ? STDIN_FILENO : open(path, O_RDONLY);
    if (*fd < 0) {
        bc_diag_add(d, BC_ERROR, label, 0, 0, "cannot open: %s", strerror(errno));
        return -1;
    }
    struct stat st;
    if (fstat(*fd, &st) == 0 && S_ISDIR(st.st_mode)) {
        bc_diag_add(d, BC_ERROR, label, 0, 0, "is a directory, not a file");
        if (!is_stdin)
            close(*fd);
        return -1;
    }
    *hint = (fstat(*fd, &st) == 0 && S_ISREG(st.st_mode)) ? (size_t)st.st_size : 0;
    return 0;
}

static void close_input(const char *path, int fd)
{
    if (strcmp(path, "-") != 0)
        close(fd);
}

int bc_read_file(const char *path, char **buf, size_t *len, bc_diag *d)
{
    const char *label = strcmp(path, "-") == 0 ? "<stdin>" : path;
    int fd;
    size_t hint;
    if (open_input(path, label, &fd, &hint, d) < 0)
        return -1;
    /* A regular file is refused before anything is allocated; a pipe when
     * the buffer would outgrow the limit. */
    int rc = bc_diag_memory_refused(d, label, (uint64_t)hint + 1, "holding the file") ? -3
             : read_all(fd, hint, d->max_memory, buf, len);
    int err = errno;
    close_input(path, fd);
    if (rc == -2)
        bc_diag_add(d, BC_ERROR, label, 0, 0, "the input is larger than the memory limit "
                    "(--max-memory %llu bytes)", (unsigned long long)d->max_memory);
    else if (rc == -1)
        bc_diag_add(d, BC_ERROR, label, 0, 0, "cannot read: %s", strerror(err));
    else if (rc == -4)
        bc_diag_add(d, BC_ERROR, label, 0, 0, "stopped on request while reading");
    return rc < 0 ? -1 : 0;
}

/* A model being read: the bytes held (buf[0..have), room for cap and a
 * final NUL) and what was read in all. */
typedef struct {
    int fd;
    const char *label;
    bc_diag *d;
    char *buf;
    size_t have, cap;
    size_t hint; /* a regular file's size, else 0 */
    uint64_t total;
    int eof;
} source;

/* A .bell text is read in pieces of this size: the text is never held whole. */
#define CHUNK ((size_t)256 * 1024)

/* 1 after reporting when a stop request (bc_stop_request: Ctrl-C in the
 * command line) has come: a large model takes seconds to read (100 MB of
 * text, 4 million states: 2 s), and a pipe may never end, so it is looked
 * at before every read (once per chunk of a .bell text) and when a read
 * was interrupted by a signal. */
static int source_stopped(const source *s)
{
    if (!bc_stop_requested())
        return 0;
    if (s->hint)
        bc_diag_add(s->d, BC_ERROR, s->label, 0, 0, "stopped on request while reading the model "
                    "(%llu of %llu bytes read)", (unsigned long long)s->total,
                    (unsigned long long)s->hint);
    else
        bc_diag_add(s->d, BC_ERROR, s->label, 0, 0, "stopped on request while reading the model "
                    "(%llu bytes read)", (unsigned long long)s->total);
    return 1;
}

/* Reads once more after the bytes held, doubling the buffer first when it
 * is full.  0 (s->eof set at the end of the input), or -1 after reporting
 * (a read error, out of memory, a stop request, or more input than
 * --max-memory allows: a reading is charged the input's size and one byte,
 * whether it holds the input whole or not, so that a limit means the same
 * for every form). */
static int source_read(source *s)
{
    if (source_stopped(s))
        return -1;
    if (s->have == s->cap) {
        size_t cap = s->cap > SIZE_MAX / 2 - 1 ? 0 : 2 * s->cap;
        char *p = cap ? realloc(s->buf, cap + 1) : NULL;
        if (!p) {
            bc_diag_add(s->d, BC_ERROR, s->label, 0, 0, "cannot read: %s", strerror(ENOMEM));
            return -1;
        }
        s->buf = p;
        s->cap = cap;
    }
    ssize_t got;
    while ((got = read(s->fd, s->buf + s->have, s->cap - s->have)) < 0 && errno == EINTR)
        if (source_stopped(s)) /* Ctrl-C while waiting for a pipe or a terminal */
            return -1;
    if (got < 0) {
        bc_diag_add(s->d, BC_ERROR, s->label, 0, 0, "cannot read: %s", strerror(errno));
        return -1;
    }
    s->eof = got == 0;
    s->have += (size_t)got;
    s->total += (uint64_t)got;
    if (s->d->max_memory && s->total + 1 > s->d->max_memory) {
        bc_diag_add(s->d, BC_ERROR, s->label, 0, 0, "the input is larger than the memory limit "
                    "(--max-memory %llu bytes)", (unsigned long long)s->d->max_memory);
        return -1;
    }
    return 0;
}

/* The .bell text of s, its first bytes held: fed to the reader a chunk at a
 * time, each chunk's last, incomplete line carried over to the next. */
static bc_model *read_text(source *s)
{
    bc__bell_reader *r = bc__bell_reader_new(s->label, s->d);
    if (!r)
        return NULL;
    for (;;) {
        int64_t used = bc__bell_reader_lines(r, s->buf, s->have, s->eof);
        if (used < 0 || s->eof)
            break; /* stopped (binary data, too many errors), or done */
        memmove(s->buf, s->buf + used, s->have - (size_t)used);
        s->have -= (size_t)used;
        if (source_read(s) < 0) {
            bc__bell_reader_free(r);
            return NULL;
        }
    }
    return bc__bell_reader_finish(r);
}

/* 1 for the bytes a model may start with before its first content. */
static int blank(char c)
{
    return c == ' ' || c == '\t' || c == '\r' || c == '\n';
}

/* Reads until the first byte after a byte-order mark and blanks (at
 * s->buf[*first]) or the end.  0, or -1 after reporting. */
static int find_content(source *s, size_t *first)
{
    while (s->have < 3 && !s->eof)
        if (source_read(s) < 0)
            return -1;
    size_t i = s->have >= 3 && (unsigned char)s->buf[0] == 0xEF &&
                       (unsigned char)s->buf[1] == 0xBB && (unsigned char)s->buf[2] == 0xBF
                   ? 3 : 0;
    for (;;) {
        while (i < s->have && blank(s->buf[i]))
            i++;
        if (i < s->have || s->eof)
            break;
        if (source_read(s) < 0)
            return -1;
    }
    *first = i;
    return 0;
}

/* The model of an open input: JSON when its first content is '{' or '['
 * (held whole: the JSON parser needs it so), else .bell text (in chunks). */
static bc_model *read_model_from(source *s)
{
    size_t first;
    if (find_content(s, &first) < 0)
        return NULL;
    if (first == s->have) {
        bc_diag_add(s->d, BC_ERROR, s->label, 0, 0, "the file is empty: expected a model");
        return NULL;
    }
    if (s->buf[first] != '{' && s->buf[first] != '[') /* '[' starts no .bell line: a JSON array, refused as such */
        return read_text(s);
    if (s->hint >= s->cap && s->hint < SIZE_MAX - 1) {
        /* A regular file fits with a byte to spare, so its end is seen without growing. */
        char *p = realloc(s->buf, s->hint + 2);
        if (p)
            s->buf = p, s->cap = s->hint + 1;
    }
    while (!s->eof)
        if (source_read(s) < 0)
            return NULL;
    s->buf[s->have] = 0;
    return bc_read_bell_json(s->buf, s->have, s->label, s->d);
}

bc_model *bc_read_model(const char *path, bc_diag *d)
{
    const char *label = strcmp(path, "-") == 0 ? "<stdin>" : path;
    source s = {.label = label, .d = d};
    if (open_input(path, label, &s.fd, &s.hint, d) < 0)
        return NULL;
    bc_model *m = NULL;
    /* A regular file is refused from its size, before anything is allocated. */
    if (!bc_diag_memory_refused(d, label, (uint64_t)s.hint + 1, "reading the file")) {
        s.cap = CHUNK;
        s.buf = malloc(s.cap + 1);
        if (s.buf)
            m = read_model_from(&s);
        else
            bc_diag_add(d, BC_ERROR, label, 0, 0, "cannot read: %s", strerror(ENOMEM));
    }
    free(s.buf);
    close_input(path, s.fd);
    return m;
}
