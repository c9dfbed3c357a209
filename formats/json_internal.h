/* json_internal.h — what the JSON readers (models, agents) share (internal). */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#ifndef BC_JSON_INTERNAL_H
#define BC_JSON_INTERNAL_H

#include <cjson/cJSON.h>
#include <stddef.h>
#include <stdint.h>

/* A short description of a JSON value for "expected X, found Y" (may use buf). */
const char *bc__json_found(const cJSON *v, char *buf, size_t cap);

/* Line and column (1-based; columns count UTF-8 characters) of byte offset off in buf[0..len). */
void bc__json_line_col(const char *buf, size_t len, size_t off, int32_t *line, int32_t *col);

/* How deep a JSON document may nest: cJSON recurses once per level, and no
 * document this project reads needs more than 5 levels. */
#define BC__JSON_MAX_DEPTH 64

/* Offset of the first bracket that opens level BC__JSON_MAX_DEPTH + 1 in buf[0..len), or len. */
size_t bc__json_depth_excess(const char *buf, size_t len);

/* Offset in buf[0..len) of the first NUL character inside a JSON string
 * (a zero byte or the escape \u0000), or len when there is none.  cJSON
 * keeps strings NUL-terminated, so such a name would be cut short unseen. */
size_t bc__json_nul_in_string(const char *buf, size_t len);

/* Parses buf[0..len) as exactly one JSON document, blanks around it
 * allowed.  NULL on failure, with the byte offset of the problem in *off
 * (len when the document ends too early) and a message in *why. */
cJSON *bc__json_parse_whole(const char *buf, size_t len, size_t *off, const char **why);

#endif
