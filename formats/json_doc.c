/* json_doc.c — one whole JSON document from bytes: cJSON's parse plus the checks it leaves out (text after the end, a cut-off end). */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#include "json_internal.h"

#include <string.h>

static size_t skip_blanks(const char *buf, size_t len, size_t off)
{
    while (off < len && (buf[off] == ' ' || buf[off] == '\t' || buf[off] == '\r' || buf[off] == '\n'))
        off++;
    return off;
}

cJSON *bc__json_parse_whole(const char *buf, size_t len, size_t *off, const char **why)
{
    const char *end = NULL;
    cJSON *root = cJSON_ParseWithLengthOpts(buf, len, &end, 0);
    size_t at = end && end >= buf && (size_t)(end - buf) <= len ? (size_t)(end - buf) : len;
    if (root) {
        at = skip_blanks(buf, len, at);
        if (at == len)
            return root;
        cJSON_Delete(root);
        *off = at;
        *why = "text after the end of the JSON document";
        return NULL;
    }
    /* cJSON places an error past the end on the last byte: a document cut
     * short ends there without closing what it opened. */
    if (at >= len || (at + 1 == len && buf[at] != '}' && buf[at] != ']')) {
        *off = len;
        *why = "JSON syntax error: the document ends too early";
    } else {
        *off = at;
        *why = "JSON syntax error here";
    }
    return NULL;
}
