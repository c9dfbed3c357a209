/* utf8.c — the one rule for well-formed UTF-8 (RFC 3629), shared by the readers that refuse other bytes and the writers that replace them. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#include "bellcheck.h"

#include <stdlib.h>
#include <string.h>

size_t bc_utf8_len(const char *text, size_t avail)
{
    const unsigned char *s = (const unsigned char *)text;
    if (avail == 0)
        return 0;
    unsigned c = s[0];
    if (c < 0x80)
        return 1;
    size_t n = c >= 0xC2 && c <= 0xDF ? 2 : c >= 0xE0 && c <= 0xEF ? 3 : c >= 0xF0 && c <= 0xF4 ? 4 : 0;
    if (n == 0 || n > avail)
        return 0; /* a continuation byte, an overlong lead (C0, C1), past U+10FFFF, or cut short */
    /* The second byte's range excludes overlong forms (E0, F0), UTF-16
     * surrogates (ED) and code points past U+10FFFF (F4). */
    unsigned lo = c == 0xE0 ? 0xA0 : c == 0xF0 ? 0x90 : 0x80;
    unsigned hi = c == 0xED ? 0x9F : c == 0xF4 ? 0x8F : 0xBF;
    if (s[1] < lo || s[1] > hi)
        return 0;
    for (size_t k = 2; k < n; k++)
        if ((s[k] & 0xC0) != 0x80)
            return 0; /* also stops at a NUL terminator */
    return n;
}

size_t bc_utf8_valid_prefix(const char *text, size_t len)
{
    size_t i = 0;
    while (i < len) {
        size_t n = bc_utf8_len(text + i, len - i);
        if (n == 0)
            break;
        i += n;
    }
    return i;
}

char *bc_utf8_copy(const char *text, size_t len)
{
    char *out = malloc(3 * len + 1), *o = out; /* U+FFFD takes 3 bytes for 1 */
    if (!out)
        return NULL;
    for (size_t i = 0; i < len;) {
        size_t k = bc_utf8_len(text + i, len - i);
        if (k == 0) {
            memcpy(o, "\xEF\xBF\xBD", 3);
            o += 3;
            i++;
        } else {
            memcpy(o, text + i, k);
            o += k;
            i += k;
        }
    }
    *o = 0;
    return out;
}
