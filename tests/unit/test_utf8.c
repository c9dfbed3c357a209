/* test_utf8.c — the one UTF-8 rule (bc_utf8_len) against Python's strict decoder on half a million byte sequences. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Reference: CPython's strict UTF-8 codec (tests/tools/utf8_ref.py), which
 * implements RFC 3629 (F. Yergeau, 2003) / Table 3-7 of the Unicode
 * Standard.  Every first and second byte, with third bytes 00 80 BF C0 and
 * fourth bytes 80 C0: 524,288 records cover each lead byte and the exact
 * edges of the second byte's ranges (E0 A0, ED 9F, F0 90, F4 8F).
 */
#include "bellcheck.h"
#include "unit.h"

#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

static const unsigned char third[] = {0x00, 0x80, 0xBF, 0xC0}, fourth[] = {0x80, 0xC0};
#define N_REC (256 * 256 * 4 * 2)

static void record(size_t i, unsigned char r[4])
{
    r[0] = (unsigned char)(i >> 11);
    r[1] = (unsigned char)(i >> 3);
    r[2] = third[(i >> 1) & 3];
    r[3] = fourth[i & 1];
}

int main(void)
{
    char in[] = "/tmp/bc-utf8-XXXXXX";
    int fd = mkstemp(in);
    CHECK(fd >= 0, "utf8: a temporary file");
    if (fd < 0)
        UNIT_DONE();
    FILE *f = fdopen(fd, "wb");
    for (size_t i = 0; i < N_REC; i++) {
        unsigned char r[4];
        record(i, r);
        fwrite(r, 1, 4, f);
    }
    fclose(f);
    char cmd[256];
    snprintf(cmd, sizeof cmd, "/usr/bin/python3 tests/tools/utf8_ref.py < %s", in);
    FILE *py = popen(cmd, "r");
    unsigned char *want = malloc(N_REC);
    size_t got = py && want ? fread(want, 1, N_REC, py) : 0;
    int py_rc = py ? pclose(py) : -1;
    unlink(in);
    CHECK(got == N_REC && py_rc == 0, "utf8: Python's strict decoder gives a length for every record");
    if (got != N_REC)
        UNIT_DONE();
    size_t wrong = 0, valid = 0, first_wrong = 0;
    for (size_t i = 0; i < N_REC; i++) {
        unsigned char r[4];
        record(i, r);
        size_t n = bc_utf8_len((const char *)r, 4);
        valid += n > 0;
        if (n != want[i] && wrong++ == 0)
            first_wrong = i;
    }
    if (wrong) {
        unsigned char r[4];
        record(first_wrong, r);
        printf("  first disagreement: %02X %02X %02X %02X: bellcheck %zu, Python %u\n", r[0], r[1], r[2],
               r[3], bc_utf8_len((const char *)r, 4), want[first_wrong]);
    }
    CHECK(wrong == 0, "utf8: bc_utf8_len agrees with Python on all 524,288 records");
    CHECK(valid > 100000 && valid < N_REC, "utf8: the records hold both well-formed and ill-formed starts");
    free(want);

    /* Cut short: a character is never read past avail (by hand). */
    CHECK(bc_utf8_len("\xE2\x98\x83", 3) == 3 && bc_utf8_len("\xE2\x98\x83", 2) == 0 &&
              bc_utf8_len("a", 0) == 0,
          "utf8: a character cut short by avail is none");
    CHECK(bc_utf8_len("\xE2\x98", SIZE_MAX) == 0, "utf8: the NUL terminator ends a character");
    /* Prefixes (by hand): "caf" + e-acute is 5 bytes; Latin-1 e-acute stops at 3. */
    CHECK(bc_utf8_valid_prefix("caf\xC3\xA9", 5) == 5, "utf8: a well-formed string is its own prefix");
    CHECK(bc_utf8_valid_prefix("caf\xE9 ok", 6) == 3, "utf8: the prefix stops at a Latin-1 byte");
    CHECK(bc_utf8_valid_prefix("\xED\xA0\x80", 3) == 0, "utf8: an encoded surrogate is refused");
    UNIT_DONE();
}
