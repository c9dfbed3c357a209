/* output.c — output files that appear only when complete: a temporary file renamed into place. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#define _XOPEN_SOURCE 700 /* realpath */
#include "bellcheck.h"

#include <errno.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

int bc_out_open(bc_out *o, const char *path, bc_diag *d)
{
    memset(o, 0, sizeof *o);
    if (strcmp(path, "-") == 0) {
        o->f = stdout;
        return 0;
    }
    /* A symbolic link is followed, so that the file it names is replaced and
     * the link stays; a target that is not a regular file (a pipe, a device)
     * cannot be replaced atomically and is written directly. */
    struct stat st;
    char *resolved = NULL;
    if (lstat(path, &st) == 0 && S_ISLNK(st.st_mode)) {
        resolved = realpath(path, NULL);
        if (!resolved) {
            bc_diag_add(d, BC_ERROR, path, 0, 0, "cannot follow the symbolic link: %s",
                        strerror(errno));
            return -1;
        }
        path = resolved;
    }
    if (stat(path, &st) == 0 && !S_ISREG(st.st_mode)) {
        o->f = S_ISDIR(st.st_mode) ? NULL : fopen(path, "w");
        if (!o->f)
            bc_diag_add(d, BC_ERROR, path, 0, 0, "cannot write: %s",
                        S_ISDIR(st.st_mode) ? "is a directory" : strerror(errno));
        o->direct = o->f != NULL;
        o->path = o->f ? strdup(path) : NULL;
        free(resolved);
        return o->f ? 0 : -1;
    }
    size_t n = strlen(path) + 16;
    o->path = strdup(path);
    o->tmp_path = malloc(n);
    if (!o->path || !o->tmp_path) {
        bc_diag_add(d, BC_ERROR, path, 0, 0, "out of memory");
        bc_out_abort(o);
        free(resolved);
        return -1;
    }
    /* Same directory as the target, so that rename() is atomic. */
    snprintf(o->tmp_path, n, "%s.tmpXXXXXX", path);
    int fd = mkstemp(o->tmp_path);
    if (fd < 0) {
        bc_diag_add(d, BC_ERROR, path, 0, 0, "cannot create: %s", strerror(errno));
        free(o->tmp_path);
        o->tmp_path = NULL;
        bc_out_abort(o);
        free(resolved);
        return -1;
    }
    /* mkstemp makes the file private (0600); give it the mode a plain fopen would. */
    mode_t mask = umask(0);
    umask(mask);
    fchmod(fd, 0666 & ~mask);
    o->f = fdopen(fd, "w");
    if (!o->f) {
        close(fd);
        bc_diag_add(d, BC_ERROR, path, 0, 0, "cannot open: %s", strerror(errno));
        bc_out_abort(o);
        free(resolved);
        return -1;
    }
    free(resolved);
    return 0;
}

int bc_out_commit(bc_out *o, bc_diag *d)
{
    if (!o->path) { /* standard output */
        int bad = fflush(o->f) != 0 || ferror(o->f);
        if (bad)
            bc_diag_add(d, BC_ERROR, "<stdout>", 0, 0, "write error: %s", strerror(errno));
        o->f = NULL;
        return bad ? -1 : 0;
    }
    int bad = fflush(o->f) != 0 || ferror(o->f);
    int err = errno;
    if (fclose(o->f) != 0 && !bad) {
        bad = 1;
        err = errno;
    }
    o->f = NULL;
    if (!bad && !o->direct && rename(o->tmp_path, o->path) != 0) {
        bad = 1;
        err = errno;
    }
    if (bad) {
        bc_diag_add(d, BC_ERROR, o->path, 0, 0, "cannot write: %s", strerror(err));
        bc_out_abort(o);
        return -1;
    }
    free(o->path);
    free(o->tmp_path);
    o->path = o->tmp_path = NULL;
    return 0;
}

void bc_out_abort(bc_out *o)
{
    if (o->f && o->f != stdout)
        fclose(o->f);
    if (o->tmp_path)
        unlink(o->tmp_path);
    free(o->path);
    free(o->tmp_path);
    memset(o, 0, sizeof *o);
}
