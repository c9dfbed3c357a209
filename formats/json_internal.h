/* json_internal.h — what the JSON readers (models, agents) share (internal). */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#ifndef BC_JSON_INTERNAL_H
#define BC_JSON_INTERNAL_H

#include <cjson/cJSON.h>
#include <stddef.h>

/* A short description of a JSON value for "expected X, found Y" (may use buf). */
const char *bc__json_found(const cJSON *v, char *buf, size_t cap);

#endif
