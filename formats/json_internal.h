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

#endif
