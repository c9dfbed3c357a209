/* fuzz_bell_json.c — libFuzzer harness: arbitrary bytes through the JSON model reader (bc_read_bell_json), then both round trips. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#include "fuzz.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    bc_diag d;
    bc_diag_init(&d);
    fuzz_model_result(bc_read_bell_json((const char *)data, size, "fuzz.json", &d), &d);
    return 0;
}
