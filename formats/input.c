/* input.c — reading whole input files (or standard input) and choosing the model reader. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#include "bellcheck.h"

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
 * NUL).  Returns 0, -1 (errno set), or -2 when the buffer would need more
 * than max bytes (0 = no limit). */
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
                continue;
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

int bc_read_file(const char *path, char **buf, size_t *len, bc_diag *d)
{
    int is_stdin = strcmp(path, "-") == 0;
    const char *label = is_stdin ? "<stdin>" : path;
    int fd = is_stdin ? STDIN_FILENO : open(path, O_RDONLY);
    if (fd < 0) {
        bc_diag_add(d, BC_ERROR, label, 0, 0, "cannot open: %s", strerror(errno));
        return -1;
    }
    struct stat st;
    if (fstat(fd, &st) == 0 && S_ISDIR(st.st_mode)) {
        bc_diag_add(d, BC_ERROR, label, 0, 0, "is a directory, not a file");
        if (!is_stdin)
            close(fd);
        return -1;
    }
    size_t hint = (fstat(fd, &st) == 0 && S_ISREG(st.st_mode)) ? (size_t)st.st_size : 0;
    /* A regular file is refused before anything is allocated; a pipe when
     * the buffer would outgrow the limit. */
    int rc = bc_diag_memory_refused(d, label, (uint64_t)hint + 1, "holding the file") ? -3
             : read_all(fd, hint, d->max_memory, buf, len);
    int err = errno;
    if (!is_stdin)
        close(fd);
    if (rc == -2)
        bc_diag_add(d, BC_ERROR, label, 0, 0, "the input is larger than the memory limit "
                    "(--max-memory %llu bytes)", (unsigned long long)d->max_memory);
    else if (rc == -1)
        bc_diag_add(d, BC_ERROR, label, 0, 0, "cannot read: %s", strerror(err));
    return rc < 0 ? -1 : 0;
}

bc_model *bc_read_model(const char *path, bc_diag *d)
{
    char *buf;
    size_t len;
    if (bc_read_file(path, &buf, &len, d) < 0)
        return NULL;
    const char *label = strcmp(path, "-") == 0 ? "<stdin>" : path;
    size_t i = 0;
    if (len >= 3 && (unsigned char)buf[0] == 0xEF && (unsigned char)buf[1] == 0xBB &&
        (unsigned char)buf[2] == 0xBF)
        i = 3;
    while (i < len && (buf[i] == ' ' || buf[i] == '\t' || buf[i] == '\r' || buf[i] == '\n'))
        i++;
    bc_model *m = NULL;
    if (i == len)
        bc_diag_add(d, BC_ERROR, label, 0, 0, "the file is empty: expected a model");
    else if (buf[i] == '{' || buf[i] == '[') /* '[' starts no .bell line: a JSON array, refused as such */
        m = bc_read_bell_json(buf, len, label, d);
    else
        m = bc_read_bell_text(buf, len, label, d);
    free(buf);
    return m;
}
