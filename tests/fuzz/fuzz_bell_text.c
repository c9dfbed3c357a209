/* fuzz_bell_text.c — libFuzzer harness: arbitrary bytes through the .bell text reader (bc_read_bell_text), then both round trips. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#include "fuzz.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    bc_diag d;
    bc_diag_init(&d);
    fuzz_model_result(bc_read_bell_text((const char *)data, size, "fuzz.bell", &d), &d);
    return 0;
}
