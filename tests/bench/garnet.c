/* garnet.c — fast seeded generator of random Garnet MDPs as .bell text, byte for byte the model tests/tools/garnet.py writes. */
/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * Garnet MDPs: Archibald, T. W., McKinnon, K. I. M. & Thomas, L. C., On the
 * generation of Markov decision processes, Journal of the Operational
 * Research Society 46 (1995).  N states, M actions in every state, B distinct
 * successors per pair drawn uniformly without replacement, probabilities a
 * random partition of 1 into B parts k/D, rewards uniform on [-1, 1] in steps
 * of 0.001 (our choices, as in tests/tools/garnet.py).
 *
 * The random stream is splitmix64 (Steele, Lea & Flood 2014) consumed in the
 * same order as garnet.py, so for equal arguments both write the same lines
 * after the leading comments; the smoke test tests/cli/bench_garnet.sh
 * compares them.  This one exists because the Python one needs minutes for
 * the benchmark's millions of states.
 *
 * usage: garnet --states N --actions M --branch B [--discount G] [--seed S]
 *               [--objective max|min] [--denominator D] [-o FILE]
 */
#include <errno.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

static uint64_t rng_state;

static uint64_t next64(void)
{
    uint64_t z = (rng_state += 0x9E3779B97F4A7C15ULL);
    z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9ULL;
    z = (z ^ (z >> 27)) * 0x94D049BB133111EBULL;
    return z ^ (z >> 31);
}

/* Uniform on [0, n) by rejection, exactly as garnet.py's below(). */
static uint64_t below(uint64_t n)
{
    /* limit = 2^64 - (2^64 mod n); 2^64 mod n = (2^64 - n) mod n. */
    uint64_t rem = (0 - n) % n;
    for (;;) {
        uint64_t x = next64();
        if (rem == 0 || x < 0 - rem)
            return x % n;
    }
}

/* k distinct integers of [0, n): partial Fisher-Yates over a sparse map
 * (garnet.py's dict), held here as a short list of (key, value). */
typedef struct {
    uint64_t key, val;
} kv;

static uint64_t map_get(const kv *m, int n, uint64_t key)
{
    for (int i = n - 1; i >= 0; i--)
        if (m[i].key == key)
            return m[i].val;
    return key;
}

static void map_set(kv *m, int *n, uint64_t key, uint64_t val)
{
    for (int i = 0; i < *n; i++)
        if (m[i].key == key) {
            m[i].val = val;
            return;
        }
    m[*n].key = key;
    m[*n].val = val;
    (*n)++;
}

static void sample(uint64_t n, int k, uint64_t *out, kv *map)
{
    int used = 0;
    for (int i = 0; i < k; i++) {
        uint64_t j = (uint64_t)i + below(n - (uint64_t)i);
        out[i] = map_get(map, used, j);
        map_set(map, &used, j, map_get(map, used, (uint64_t)i));
    }
}

static int cmp_u64(const void *a, const void *b)
{
    uint64_t x = *(const uint64_t *)a, y = *(const uint64_t *)b;
    return x < y ? -1 : x > y;
}

/* Output through a large buffer with hand-made integer formatting (printf
 * would dominate the run time). */
static char obuf[1 << 20];
static size_t olen;
static FILE *ofile;

static void flush_out(void)
{
    if (olen && fwrite(obuf, 1, olen, ofile) != olen) {
        fprintf(stderr, "garnet: write error: %s\n", strerror(errno));
        exit(1);
    }
    olen = 0;
}

static void put(const char *s, size_t n)
{
    if (olen + n > sizeof obuf)
        flush_out();
    memcpy(obuf + olen, s, n);
    olen += n;
}

static void put_s(const char *s)
{
    put(s, strlen(s));
}

static void put_u(uint64_t v)
{
    char tmp[24];
    int n = 0;
    do
        tmp[sizeof tmp - 1 - n++] = (char)('0' + v % 10);
    while ((v /= 10) != 0);
    put(tmp + sizeof tmp - n, (size_t)n);
}

static int usage(void)
{
    fputs("usage: garnet --states N --actions M --branch B [--discount G] [--seed S]\n"
          "              [--objective max|min] [--denominator D] [-o FILE]\n",
          stderr);
    return 2;
}

static int parse_u(const char *s, uint64_t *out)
{
    char *end;
    errno = 0;
    unsigned long long v = strtoull(s, &end, 10);
    if (!*s || *end || errno || s[0] == '-')
        return -1;
    *out = v;
    return 0;
}

static void pair_line(uint64_t s, uint64_t a, uint64_t n, int b, uint64_t denom, uint64_t *succ,
                      uint64_t *cuts, kv *map)
{
    sample(n, b, succ, map);
    sample(denom - 1, b - 1, cuts, map);
    for (int i = 0; i < b - 1; i++)
        cuts[i] += 1;
    qsort(cuts, (size_t)(b - 1), sizeof *cuts, cmp_u64);
    int64_t k = (int64_t)below(2001) - 1000;
    put("s", 1), put_u(s), put(" a", 2), put_u(a), put(" ", 1);
    if (k < 0)
        put("-", 1);
    uint64_t ak = (uint64_t)(k < 0 ? -k : k);
    char frac[4] = {'.', (char)('0' + ak % 1000 / 100), (char)('0' + ak % 100 / 10),
                    (char)('0' + ak % 10)};
    put_u(ak / 1000), put(frac, 4), put(" ->", 3);
    uint64_t prev = 0;
    for (int i = 0; i < b; i++) {
        uint64_t edge = i < b - 1 ? cuts[i] : denom;
        put(" s", 2), put_u(succ[i]), put(" ", 1), put_u(edge - prev), put("/", 1), put_u(denom);
        prev = edge;
    }
    put("\n", 1);
}

int main(int argc, char **argv)
{
    uint64_t n = 0, m = 0, b = 0, seed = 1, denom = 1000;
    const char *discount = "0.9", *objective = "max", *path = "-";
    for (int i = 1; i < argc; i += 2) {
        if (i + 1 >= argc)
            return usage();
        const char *k = argv[i], *v = argv[i + 1];
        int bad = 0;
        if (!strcmp(k, "--states")) bad = parse_u(v, &n);
        else if (!strcmp(k, "--actions")) bad = parse_u(v, &m);
        else if (!strcmp(k, "--branch")) bad = parse_u(v, &b);
        else if (!strcmp(k, "--seed")) bad = parse_u(v, &seed);
        else if (!strcmp(k, "--denominator")) bad = parse_u(v, &denom);
        else if (!strcmp(k, "--discount")) discount = v;
        else if (!strcmp(k, "--objective")) objective = v;
        else if (!strcmp(k, "-o")) path = v;
        else return usage();
        if (bad)
            return usage();
    }
    double g = atof(discount);
    if (n < 1 || m < 1 || b < 1 || b > n || b > denom || b > 64 || !(g > 0 && g < 1) ||
        (strcmp(objective, "max") && strcmp(objective, "min"))) {
        fputs("garnet: need N, M >= 1, 1 <= B <= min(N, D, 64), 0 < G < 1, objective max|min\n",
              stderr);
        return 2;
    }
    ofile = strcmp(path, "-") ? fopen(path, "w") : stdout;
    if (!ofile) {
        fprintf(stderr, "garnet: cannot write %s: %s\n", path, strerror(errno));
        return 1;
    }
    rng_state = seed;
    char head[512];
    snprintf(head, sizeof head,
             "# Garnet MDP (Archibald, McKinnon & Thomas, J. Oper. Res. Soc. 1995), generated by\n"
             "# tests/bench/garnet --states %llu --actions %llu --branch %llu --discount %s "
             "--seed %llu --objective %s --denominator %llu\n"
             "bell 1\nname garnet-n%llu-m%llu-b%llu-seed%llu\ndiscount %s\nobjective %s\n"
             "initial s0\n\n",
             (unsigned long long)n, (unsigned long long)m, (unsigned long long)b, discount,
             (unsigned long long)seed, objective, (unsigned long long)denom, (unsigned long long)n,
             (unsigned long long)m, (unsigned long long)b, (unsigned long long)seed, discount,
             objective);
    put_s(head);
    uint64_t succ[64], cuts[64];
    kv map[128];
    for (uint64_t s = 0; s < n; s++)
        for (uint64_t a = 0; a < m; a++)
            pair_line(s, a, n, (int)b, denom, succ, cuts, map);
    flush_out();
    if (ofile != stdout ? fclose(ofile) != 0 : fflush(stdout) != 0) {
        fprintf(stderr, "garnet: write error: %s\n", strerror(errno));
        return 1;
    }
    return 0;
}
