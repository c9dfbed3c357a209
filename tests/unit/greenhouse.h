/* greenhouse.h — the invented greenhouse model the agent-reader tests and the agent fuzz harness share. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
#ifndef BC_TEST_GREENHOUSE_H
#define BC_TEST_GREENHOUSE_H

/* States cold mild hot wilted (terminal); actions open shut heat.
 * Pairs in CSR order: 0 cold/shut, 1 cold/heat, 2 mild/open, 3 mild/shut,
 * 4 hot/open, 5 hot/shut, 6 hot/heat. */
static const char greenhouse_text[] =
    "bell 1\n"
    "name greenhouse\n"
    "discount 0.9\n"
    "states cold mild hot wilted\n"
    "actions open shut heat\n"
    "terminal wilted\n"
    "cold shut -1 -> cold 1/2 mild 1/2\n"
    "cold heat -2 -> mild\n"
    "mild open 1 -> cold 1/2 mild 1/2\n"
    "mild shut 1 -> mild 1/2 hot 1/2\n"
    "hot open 0 -> mild\n"
    "hot shut -5 -> hot 0.8 wilted 0.2\n"
    "hot heat -9 -> wilted\n";

#endif
