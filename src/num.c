/* num.c — exact rational numbers: a 64-bit fast path, GMP for everything that does not fit. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Most numbers in a model are small decimals (0.95, 1/10, -2), so a bc_num
 * keeps num/den in two int64 and does arithmetic in 128-bit integers.  Only
 * when a result does not fit does it move into the bc_bigtab as an mpq_t.
 * Invariant: a small bc_num is in lowest terms with den > 0, and a value is
 * stored big only if it cannot be small — so equal values have equal
 * representations unless one of them is big (comparisons go through bc_num_cmp).
 */
#include "bellcheck.h"

#include <assert.h>
#include <errno.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

struct bc_bigtab {
    mpq_t *v;
    size_t n, cap;
};

typedef __int128 i128;
typedef unsigned __int128 u128;

bc_bigtab *bc_bigtab_new(void)
{
    return calloc(1, sizeof(bc_bigtab));
}

void bc_bigtab_free(bc_bigtab *big)
{
    if (!big)
        return;
    for (size_t i = 0; i < big->n; i++)
        mpq_clear(big->v[i]);
    free(big->v);
    free(big);
}

size_t bc_bigtab_count(const bc_bigtab *big)
{
    return big ? big->n : 0;
}

/* Moves x (canonical) into the table; returns its index or -1. */
static int64_t bigtab_push(bc_bigtab *big, const mpq_t x)
{
    if (!big)
        return -1;
    if (big->n == big->cap) {
        size_t cap = big->cap ? 2 * big->cap : 16;
        mpq_t *v = realloc(big->v, cap * sizeof(mpq_t));
        if (!v)
            return -1;
        big->v = v;
        big->cap = cap;
    }
    mpq_init(big->v[big->n]);
    mpq_set(big->v[big->n], x);
    return (int64_t)big->n++;
}

static const mpq_t *big_at(const bc_bigtab *big, bc_num x)
{
    assert(x.den == 0 && big && x.num >= 0 && (size_t)x.num < big->n);
    return (const mpq_t *)&big->v[x.num];
}

bc_num bc_num_int(int64_t v)
{
    bc_num r = {v, 1};
    return r;
}

/* Binary gcd on 64 bits: no division, far cheaper than 128-bit modulo. */
static uint64_t gcd_u64(uint64_t a, uint64_t b)
{
    if (a == 0)
        return b;
    if (b == 0)
        return a;
    int shift = __builtin_ctzll(a | b);
    a >>= __builtin_ctzll(a);
    do {
        b >>= __builtin_ctzll(b);
        if (a > b) {
            uint64_t t = a;
            a = b;
            b = t;
        }
        b -= a;
    } while (b);
    return a << shift;
}

static u128 gcd_u128(u128 a, u128 b)
{
    if ((a >> 64) == 0 && (b >> 64) == 0)
        return gcd_u64((uint64_t)a, (uint64_t)b);
    while (b) {
        u128 t = a % b;
        a = b;
        b = t;
    }
    return a;
}

static void mpz_set_i128(mpz_t z, i128 v)
{
    int neg = v < 0;
    u128 u = neg ? -(u128)v : (u128)v;
    mpz_set_ui(z, (unsigned long)(uint64_t)(u >> 64));
    mpz_mul_2exp(z, z, 64);
    mpz_add_ui(z, z, (unsigned long)(uint64_t)u);
    if (neg)
        mpz_neg(z, z);
}

/* Canonical bc_num of n/d (d != 0), big if it does not fit; -1 on failure. */
static int num_from_i128(i128 n, i128 d, bc_num *out, bc_bigtab *big)
{
    assert(d != 0);
    if (d < 0) {
        n = -n;
        d = -d;
    }
    if (n > INT64_MIN && n <= INT64_MAX && d <= INT64_MAX) { /* 64-bit path, no 128-bit division */
        int64_t n64 = (int64_t)n, d64 = (int64_t)d;
        uint64_t g64 = gcd_u64(n64 < 0 ? (uint64_t)-n64 : (uint64_t)n64, (uint64_t)d64);
        out->num = g64 > 1 ? n64 / (int64_t)g64 : n64;
        out->den = g64 > 1 ? d64 / (int64_t)g64 : d64;
        return 0;
    }
    u128 g = gcd_u128(n < 0 ? -(u128)n : (u128)n, (u128)d);
    if (g > 1) {
        n /= (i128)g;
        d /= (i128)g;
    }
    if (n >= INT64_MIN && n <= INT64_MAX && d <= INT64_MAX) {
        out->num = (int64_t)n;
        out->den = (int64_t)d;
        return 0;
    }
    mpq_t q;
    mpq_init(q);
    mpz_set_i128(mpq_numref(q), n);
    mpz_set_i128(mpq_denref(q), d);
    int64_t i = bigtab_push(big, q);
    mpq_clear(q);
    if (i < 0)
        return -1;
    out->num = i;
    out->den = 0;
    return 0;
}

int bc_num_from_mpq(bc_num *out, const mpq_t x, bc_bigtab *big)
{
    if (mpz_fits_slong_p(mpq_numref(x)) && mpz_fits_slong_p(mpq_denref(x))) {
        out->num = mpz_get_si(mpq_numref(x));
        out->den = mpz_get_si(mpq_denref(x));
        return 0;
    }
    int64_t i = bigtab_push(big, x);
    if (i < 0)
        return -1;
    out->num = i;
    out->den = 0;
    return 0;
}

void bc_num_to_mpq(mpq_t out, bc_num x, const bc_bigtab *big)
{
    if (x.den == 0) {
        mpq_set(out, *big_at(big, x));
        return;
    }
    mpz_set_si(mpq_numref(out), x.num);
    mpz_set_si(mpq_denref(out), x.den);
}

double bc_num_to_double(bc_num x, const bc_bigtab *big)
{
    const int64_t exact = (int64_t)1 << 53;
    if (x.den != 0 && x.num > -exact && x.num < exact && x.den < exact)
        return (double)x.num / (double)x.den; /* both exact, one correctly rounded division */
    mpq_t q;
    mpq_init(q);
    bc_num_to_mpq(q, x, big);
    double r = bc_mpq_to_double(q);
    mpq_clear(q);
    return r;
}

/* mpq_get_d truncates toward zero; the nearest double is that value or the
 * next one away from zero, decided exactly against their midpoint. */
double bc_mpq_to_double(const mpq_t x)
{
    double lo = mpq_get_d(x);
    if (mpq_sgn(x) == 0 || !isfinite(lo))
        return lo;
    double hi = nextafter(lo, mpq_sgn(x) > 0 ? INFINITY : -INFINITY);
    if (!isfinite(hi))
        return lo;
    mpq_t a, b;
    mpq_init(a);
    mpq_init(b);
    mpq_set_d(a, lo);
    mpq_set_d(b, hi);
    mpq_add(a, a, b);
    mpq_div_2exp(a, a, 1); /* the midpoint, exactly */
    int c = mpq_cmp(x, a) * mpq_sgn(x); /* > 0: x is beyond the midpoint, away from zero */
    double r = lo;
    if (c > 0)
        r = hi;
    else if (c == 0) { /* a tie: keep the one whose 53-bit mantissa is even */
        int e;
        r = ((int64_t)ldexp(fabs(frexp(lo, &e)), 53) & 1) ? hi : lo;
    }
    mpq_clear(a);
    mpq_clear(b);
    return r;
}

/* Exact binary operation through GMP, for operands or results that are big. */
static int num_op_big(char op, bc_num a, bc_num b, bc_num *out, bc_bigtab *big)
{
    mpq_t x, y;
    mpq_init(x);
    mpq_init(y);
    bc_num_to_mpq(x, a, big);
    bc_num_to_mpq(y, b, big);
    if (op == '+')
        mpq_add(x, x, y);
    else if (op == '*')
        mpq_mul(x, x, y);
    else
        mpq_div(x, x, y);
    int rc = bc_num_from_mpq(out, x, big);
    mpq_clear(x);
    mpq_clear(y);
    return rc;
}

int bc_num_add(bc_num a, bc_num b, bc_num *out, bc_bigtab *big)
{
    if (a.den == 0 || b.den == 0)
        return num_op_big('+', a, b, out, big);
    if (a.den == b.den) /* common case: probabilities over one denominator */
        return num_from_i128((i128)a.num + b.num, a.den, out, big);
    /* |num| < 2^63, den < 2^63: products < 2^126, the sum < 2^127 — no overflow. */
    i128 n = (i128)a.num * b.den + (i128)b.num * a.den;
    i128 d = (i128)a.den * b.den;
    return num_from_i128(n, d, out, big);
}

int bc_num_mul(bc_num a, bc_num b, bc_num *out, bc_bigtab *big)
{
    if (a.den == 0 || b.den == 0)
        return num_op_big('*', a, b, out, big);
    return num_from_i128((i128)a.num * b.num, (i128)a.den * b.den, out, big);
}

int bc_num_div(bc_num a, bc_num b, bc_num *out, bc_bigtab *big)
{
    if (bc_num_sign(b, big) == 0)
        return -1;
    if (a.den == 0 || b.den == 0)
        return num_op_big('/', a, b, out, big);
    return num_from_i128((i128)a.num * b.den, (i128)a.den * b.num, out, big);
}

int bc_num_cmp(bc_num a, bc_num b, const bc_bigtab *big)
{
    if (a.den != 0 && b.den != 0) {
        i128 l = (i128)a.num * b.den, r = (i128)b.num * a.den;
        return (l > r) - (l < r);
    }
    mpq_t x, y;
    mpq_init(x);
    mpq_init(y);
    bc_num_to_mpq(x, a, big);
    bc_num_to_mpq(y, b, big);
    int c = mpq_cmp(x, y);
    mpq_clear(x);
    mpq_clear(y);
    return (c > 0) - (c < 0);
}

int bc_num_sign(bc_num x, const bc_bigtab *big)
{
    if (x.den != 0)
        return (x.num > 0) - (x.num < 0);
    return mpq_sgn(*big_at(big, x));
}

int bc_num_is_one(bc_num x, const bc_bigtab *big)
{
    (void)big; /* 1 always fits the small form, and small form is canonical */
    return x.den == 1 && x.num == 1;
}

/* The sum is kept as num/den over a common denominator that only grows (by
 * lcm), without reducing any fraction: a line's probabilities usually share
 * a denominator, and a gcd per term is what made the exact sum slow. */
int bc_num_sum_is_one(const bc_num *x, int64_t n)
{
    i128 num = 0; /* invariant at each step: 0 <= num <= den <= 2^62, so no product overflows */
    int64_t den = 1;
    const int64_t den_cap = (int64_t)1 << 62;
    for (int64_t k = 0; k < n; k++) {
        bc_num p = x[k];
        if (p.den <= 0 || p.num < 0)
            return 0;
        if (p.den == den) {
            num += p.num;
        } else if (den % p.den == 0) {
            num += (i128)p.num * (den / p.den);
        } else {
            int64_t g = (int64_t)gcd_u64((uint64_t)den, (uint64_t)p.den);
            int64_t grow = p.den / g; /* lcm = den * grow */
            if (den > den_cap / grow)
                return 0;
            num = num * grow + (i128)p.num * (den * grow / p.den);
            den *= grow;
        }
        if (num > den)
            return 0; /* past 1 already, and the terms are not negative */
    }
    return num == den;
}

/* ---- parsing ------------------------------------------------------------ */

/* Scans [+-]?digits at s[*i]; returns the digit count (0 = none) and leaves *i after them. */
static size_t scan_int(const char *s, size_t len, size_t *i, int allow_sign)
{
    if (allow_sign && *i < len && (s[*i] == '+' || s[*i] == '-'))
        (*i)++;
    size_t start = *i;
    while (*i < len && s[*i] >= '0' && s[*i] <= '9')
        (*i)++;
    return *i - start;
}

/* Slow path: builds the exact value with GMP from the pieces of a decimal. */
static int parse_decimal_big(const char *s, size_t len, size_t int_start, size_t int_end,
                             size_t frac_start, size_t frac_end, long exp10, int neg,
                             bc_num *out, bc_bigtab *big)
{
    (void)len;
    size_t nd = (int_end - int_start) + (frac_end - frac_start);
    char *digits = malloc(nd + 2);
    if (!digits)
        return -1;
    memcpy(digits, s + int_start, int_end - int_start);
    memcpy(digits + (int_end - int_start), s + frac_start, frac_end - frac_start);
    digits[nd] = 0;
    mpq_t q;
    mpq_init(q);
    mpz_set_str(mpq_numref(q), nd ? digits : "0", 10);
    free(digits);
    long e = exp10 - (long)(frac_end - frac_start);
    mpz_t p;
    mpz_init(p);
    mpz_ui_pow_ui(p, 10, (unsigned long)(e < 0 ? -e : e));
    if (e >= 0)
        mpz_mul(mpq_numref(q), mpq_numref(q), p);
    else
        mpz_set(mpq_denref(q), p);
    mpz_clear(p);
    mpq_canonicalize(q);
    if (neg)
        mpq_neg(q, q);
    int rc = bc_num_from_mpq(out, q, big);
    mpq_clear(q);
    return rc;
}

static const uint64_t pow10_u64[20] = {
    1ULL, 10ULL, 100ULL, 1000ULL, 10000ULL, 100000ULL, 1000000ULL, 10000000ULL,
    100000000ULL, 1000000000ULL, 10000000000ULL, 100000000000ULL, 1000000000000ULL,
    10000000000000ULL, 100000000000000ULL, 1000000000000000ULL, 10000000000000000ULL,
    100000000000000000ULL, 1000000000000000000ULL, 10000000000000000000ULL};

/* Parses "p/q" exactly (the caller has checked that p is an integer followed by '/'). */
static int parse_fraction(const char *s, size_t len, bc_num *out, bc_bigtab *big,
                          const char **why)
{
    size_t i = 0;
    int neg = s[0] == '-';
    size_t nstart = (s[0] == '+' || s[0] == '-') ? 1 : 0;
    size_t nlen = scan_int(s, len, &i, 1);
    size_t slash = i;
    i++; /* the '/' */
    size_t dstart = i;
    size_t dlen = scan_int(s, len, &i, 0);
    if (dlen == 0 || i != len) {
        *why = "a fraction is two integers separated by '/', like 9/10";
        return -1;
    }
    if (nlen > BC_NUM_MAX_DIGITS || dlen > BC_NUM_MAX_DIGITS) {
        *why = "a number has more than 4096 digits";
        return -1;
    }
    if (nlen <= 18 && dlen <= 18) { /* fast path: both parts fit in int64 */
        int64_t n = 0, d = 0;
        for (size_t k = slash - nlen; k < slash; k++)
            n = n * 10 + (s[k] - '0');
        for (size_t k = dstart; k < dstart + dlen; k++)
            d = d * 10 + (s[k] - '0');
        if (d == 0) {
            *why = "the denominator of a fraction is zero";
            return -1;
        }
        if (num_from_i128(neg ? -(i128)n : (i128)n, (i128)d, out, big) < 0) {
            *why = "out of memory";
            return -1;
        }
        return 0;
    }
    mpq_t q;
    mpq_init(q);
    char *tmp = malloc(len + 1);
    if (!tmp) {
        mpq_clear(q);
        *why = "out of memory";
        return -1;
    }
    memcpy(tmp, s + nstart, slash - nstart);
    tmp[slash - nstart] = 0;
    mpz_set_str(mpq_numref(q), tmp, 10);
    memcpy(tmp, s + dstart, dlen);
    tmp[dlen] = 0;
    mpz_set_str(mpq_denref(q), tmp, 10);
    free(tmp);
    if (mpz_sgn(mpq_denref(q)) == 0) {
        mpq_clear(q);
        *why = "the denominator of a fraction is zero";
        return -1;
    }
    mpq_canonicalize(q);
    if (neg)
        mpq_neg(q, q);
    int rc = bc_num_from_mpq(out, q, big);
    mpq_clear(q);
    if (rc < 0)
        *why = "out of memory";
    return rc;
}

/* An optional exponent [eE][+-]?digits at s[*i] into *exp10 (|exp10| <= BC_NUM_MAX_EXPONENT).
 * Returns 0, or -1 with *why set. */
static int scan_exponent(const char *s, size_t len, size_t *i, long *exp10, const char **why)
{
    if (*i >= len || (s[*i] != 'e' && s[*i] != 'E'))
        return 0;
    (*i)++;
    int neg = *i < len && s[*i] == '-';
    if (*i < len && (s[*i] == '+' || s[*i] == '-'))
        (*i)++;
    size_t start = *i;
    if (scan_int(s, len, i, 0) == 0) {
        *why = "expected digits in the exponent";
        return -1;
    }
    long e = 0;
    for (size_t k = start; k < *i; k++) {
        e = e * 10 + (s[k] - '0');
        if (e > BC_NUM_MAX_EXPONENT) {
            *why = "exponent out of range (at most 4096 in absolute value)";
            return -1;
        }
    }
    *exp10 = neg ? -e : e;
    return 0;
}

int bc_num_parse(const char *s, size_t len, bc_num *out, bc_bigtab *big, const char **why)
{
    static const char *bad = "expected a number: an integer, a decimal like 0.125 or 1e-3, "
                             "or a fraction like 9/10";
    if (len == 0) {
        *why = bad;
        return -1;
    }
    if (memchr(s, '/', len)) {
        size_t i = 0, n = scan_int(s, len, &i, 1);
        if (n == 0 || i >= len || s[i] != '/') {
            *why = bad;
            return -1;
        }
        return parse_fraction(s, len, out, big, why);
    }
    size_t i = 0;
    int neg = s[0] == '-';
    if (s[0] == '+' || s[0] == '-')
        i++;
    size_t int_start = i, int_n = scan_int(s, len, &i, 0), int_end = i;
    size_t frac_start = i, frac_end = i;
    if (int_n == 0) {
        *why = bad;
        return -1;
    }
    if (i < len && s[i] == '.') {
        i++;
        frac_start = i;
        if (scan_int(s, len, &i, 0) == 0) {
            *why = "expected digits after the decimal point";
            return -1;
        }
        frac_end = i;
    }
    long exp10 = 0;
    if (scan_exponent(s, len, &i, &exp10, why) < 0)
        return -1;
    if (i != len) {
        *why = bad;
        return -1;
    }
    /* Skip leading zeros so that 0.000001 stays on the fast path. */
    size_t lead = int_start;
    while (lead < int_end && s[lead] == '0')
        lead++;
    size_t ndig = (int_end - lead) + (frac_end - frac_start);
    if (ndig > BC_NUM_MAX_DIGITS) {
        *why = "a number has more than 4096 digits";
        return -1;
    }
    long e = exp10 - (long)(frac_end - frac_start);
    if (ndig <= 18 && e >= -18 && e <= 18) {
        uint64_t mant = 0;
        for (size_t k = lead; k < int_end; k++)
            mant = mant * 10 + (uint64_t)(s[k] - '0');
        for (size_t k = frac_start; k < frac_end; k++)
            mant = mant * 10 + (uint64_t)(s[k] - '0');
        i128 n = neg ? -(i128)mant : (i128)mant, d = 1;
        if (e >= 0)
            n *= (i128)pow10_u64[e];
        else
            d = (i128)pow10_u64[-e];
        if (num_from_i128(n, d, out, big) < 0) {
            *why = "out of memory";
            return -1;
        }
        return 0;
    }
    if (parse_decimal_big(s, len, int_start, int_end, frac_start, frac_end, exp10, neg, out,
                          big) < 0) {
        *why = "out of memory";
        return -1;
    }
    return 0;
}

/* ---- formatting --------------------------------------------------------- */

/* Writes the decimal digits of u into buf (no NUL), padded on the left with
 * zeros to at least `width`; returns the count (at most 20 unpadded). */
static size_t u64_digits(uint64_t u, char *buf, size_t width)
{
    size_t n = 1;
    while (n < 20 && u >= pow10_u64[n])
        n++;
    if (n < width)
        n = width;
    for (size_t k = n; k-- > 0;) { /* division by the constant 10: a multiply, no divide */
        buf[k] = (char)('0' + (int)(u % 10));
        u /= 10;
    }
    return n;
}

/* Writes the k fraction digits of r/den (0 <= r < den, den divides 10^k) into
 * buf by long division; returns k.  Only for k > 19, where r * 10^k / den
 * may pass 2^64: r * 10 < 10 * 2^63 needs 128 bits. */
static size_t long_fraction_digits(uint64_t r, uint64_t den, int k, char *buf)
{
    u128 rem = r;
    for (int z = 0; z < k; z++) {
        rem *= 10;
        buf[z] = (char)('0' + (int)(rem / den));
        rem %= den;
    }
    assert(rem == 0); /* den divides 10^k: the expansion ends after k digits */
    return (size_t)k;
}

/* Small-form text of x into buf (at least 64 bytes); returns its length (< 64).
 * Longest: "-" + 19 digits + "." + 40 digits, or "-" + 19 + "/" + 19. */
static size_t format_small(char *buf, bc_num x, int fraction_only)
{
    assert(x.den > 0);
    size_t n = 0;
    /* |num| <= 2^63 and den < 2^63: every magnitude here fits in uint64. */
    uint64_t mag = x.num < 0 ? -(uint64_t)x.num : (uint64_t)x.num, den = (uint64_t)x.den;
    if (x.num < 0)
        buf[n++] = '-';
    if (den == 1)
        return n + u64_digits(mag, buf + n, 0);
    /* A terminating decimal needs den = 2^i 5^j; it has k = max(i, j) fraction digits. */
    int i2 = __builtin_ctzll(den), i5 = 0;
    uint64_t odd = den >> i2;
    while (odd % 5 == 0) {
        odd /= 5;
        i5++;
    }
    int k = i2 > i5 ? i2 : i5;
    if (fraction_only || odd != 1 || k > 40) {
        n += u64_digits(mag, buf + n, 0);
        buf[n++] = '/';
        return n + u64_digits(den, buf + n, 0);
    }
    /* mag/den = q + r/den, and r/den = r * (10^k / den) / 10^k: the fraction
     * digits are r * 2^(k-i2) * 5^(k-i5), padded to k digits.  gcd(r, den) = 1
     * and k is least, so the last digit is not zero. */
    uint64_t q = mag < den ? 0 : mag / den, r = mag < den ? mag : mag % den; /* probabilities: no divide */
    n += u64_digits(q, buf + n, 0);
    buf[n++] = '.';
    if (k > 19)
        return n + long_fraction_digits(r, den, k, buf + n);
    uint64_t scale = (pow10_u64[k - i5] >> (k - i5)) << (k - i2); /* 5^(k-i5) 2^(k-i2) */
    assert(scale * den == pow10_u64[k]);
    return n + u64_digits(r * scale, buf + n, (size_t)k); /* r * scale < 10^k <= 10^19 */
}

/* Text of a big value; malloc'ed, NULL on failure. */
static char *format_big(const mpq_t q, int fraction_only)
{
    /* Count the factors 2 and 5 of the denominator. */
    mpz_t d, f;
    mpz_init_set(d, mpq_denref(q));
    mpz_init_set_ui(f, 2);
    unsigned long n2 = mpz_remove(d, d, f);
    mpz_set_ui(f, 5);
    unsigned long n5 = mpz_remove(d, d, f);
    unsigned long k = n2 > n5 ? n2 : n5;
    int decimal = !fraction_only && mpz_cmp_ui(d, 1) == 0 && k <= 40;
    char *out = NULL;
    if (decimal) {
        mpz_t scaled, p;
        mpz_init(scaled);
        mpz_init(p);
        mpz_ui_pow_ui(p, 10, k);
        mpz_divexact(scaled, p, mpq_denref(q));
        mpz_mul(scaled, scaled, mpq_numref(q));
        mpz_abs(scaled, scaled);
        char *digits = mpz_get_str(NULL, 10, scaled);
        size_t nd = strlen(digits);
        out = malloc(nd + k + 4);
        if (out) {
            size_t n = 0;
            if (mpq_sgn(q) < 0)
                out[n++] = '-';
            if (nd <= k) {
                out[n++] = '0';
                out[n++] = '.';
                for (size_t z = nd; z < k; z++)
                    out[n++] = '0';
                memcpy(out + n, digits, nd);
                n += nd;
            } else {
                memcpy(out + n, digits, nd - k);
                n += nd - k;
                if (k) {
                    out[n++] = '.';
                    memcpy(out + n, digits + nd - k, k);
                    n += k;
                }
            }
            out[n] = 0;
        }
        free(digits);
        mpz_clear(scaled);
        mpz_clear(p);
    } else {
        out = mpq_get_str(NULL, 10, q);
    }
    mpz_clear(d);
    mpz_clear(f);
    return out;
}

static size_t num_format_any(char *buf, size_t cap, bc_num x, const bc_bigtab *big,
                             int fraction_only)
{
    if (x.den != 0) {
        char tmp[96];
        size_t n = format_small(tmp, x, fraction_only);
        if (cap) {
            size_t c = n < cap - 1 ? n : cap - 1;
            memcpy(buf, tmp, c);
            buf[c] = 0;
        }
        return n;
    }
    char *s = format_big(*big_at(big, x), fraction_only);
    if (!s) {
        if (cap)
            buf[0] = 0;
        return 0;
    }
    size_t n = strlen(s);
    if (cap) {
        size_t c = n < cap - 1 ? n : cap - 1;
        memcpy(buf, s, c);
        buf[c] = 0;
    }
    free(s);
    return n;
}

size_t bc_num_format(char *buf, size_t cap, bc_num x, const bc_bigtab *big)
{
    return num_format_any(buf, cap, x, big, 0);
}

char *bc_num_text(bc_num x, const bc_bigtab *big)
{
    size_t n = bc_num_format(NULL, 0, x, big);
    char *s = malloc(n + 1);
    if (s)
        bc_num_format(s, n + 1, x, big);
    return s;
}

size_t bc_num_format_fraction(char *buf, size_t cap, bc_num x, const bc_bigtab *big)
{
    return num_format_any(buf, cap, x, big, 1);
}

int bc_num_write(FILE *f, bc_num x, const bc_bigtab *big)
{
    if (x.den != 0) {
        char tmp[96];
        size_t n = format_small(tmp, x, 0);
        return fwrite(tmp, 1, n, f) == n ? (int)n : -1;
    }
    char *s = format_big(*big_at(big, x), 0);
    if (!s)
        return -1;
    size_t n = strlen(s);
    int rc = fwrite(s, 1, n, f) == n ? (int)n : -1;
    free(s);
    return rc;
}

char *bc_mpq_text(const mpq_t x)
{
    /* GMP allocates with its own functions; hand the caller a malloc'ed copy. */
    char *s = mpq_get_str(NULL, 10, x), *copy = s ? strdup(s) : NULL;
    void (*release)(void *, size_t);
    mp_get_memory_functions(NULL, NULL, &release);
    if (s)
        release(s, strlen(s) + 1);
    return copy;
}
