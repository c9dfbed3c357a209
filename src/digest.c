/* digest.c — the SHA-256 fingerprint of a model: a hash of its normalised .bell text (nettle). */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#define _GNU_SOURCE /* fopencookie */
#include "bellcheck.h"

#include <nettle/sha2.h>
#include <stdio.h>

/* The normalised form is what bc_write_bell_text writes: the same model
 * read from its text or its JSON form, with any spacing or comments, gives
 * the same bytes.  They stream through the hash; nothing is held. */
static ssize_t hash_write(void *cookie, const char *buf, size_t len)
{
    sha256_update((struct sha256_ctx *)cookie, len, (const uint8_t *)buf);
    return (ssize_t)len;
}

int bc_model_digest(const bc_model *m, char hex[65])
{
    struct sha256_ctx ctx;
    sha256_init(&ctx);
    cookie_io_functions_t io = {.write = hash_write};
    FILE *f = fopencookie(&ctx, "w", io);
    if (!f)
        return -1;
    int rc = bc_write_bell_text(m, f);
    if (fclose(f) != 0)
        rc = -1;
    if (rc < 0)
        return -1;
    uint8_t d[SHA256_DIGEST_SIZE];
    sha256_digest(&ctx, sizeof d, d);
    static const char digits[] = "0123456789abcdef";
    for (int i = 0; i < SHA256_DIGEST_SIZE; i++) {
        hex[2 * i] = digits[d[i] >> 4];
        hex[2 * i + 1] = digits[d[i] & 15];
    }
    hex[64] = '\0';
    return 0;
}
