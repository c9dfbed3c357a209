/* test_num.c — exact numbers: parsing, arithmetic across the small/big boundary, text forms, doubles. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Every expected value is written out by hand (or taken from GMP / strtod,
 * which are not code under test).  Syntax rules: ../shared/design/model-format.md
 * ("A number"); limits and text forms: bc_num_parse / bc_num_write in bellcheck.h.
 */
#include "bellcheck.h"
#include "unit.h"

#include <stdint.h>
#include <stdlib.h>
#include <string.h>

static bc_bigtab *big;

/* Parses s; returns 1 on success (x set), 0 on rejection (why must then be set). */
static int parse(const char *s, bc_num *x)
{
    const char *why = NULL;
    int rc = bc_num_parse(s, strlen(s), x, big, &why);
    if (rc != 0 && (why == NULL || why[0] == 0))
        printf("FAIL parse %s: rejected without a reason\n", s);
    return rc == 0;
}

/* 1 when s parses to the small rational num/den exactly (already lowest terms). */
static int parses_small(const char *s, int64_t num, int64_t den)
{
    bc_num x;
    return parse(s, &x) && x.den == den && x.num == num;
}

/* 1 when x equals the rational written (GMP syntax "p/q" or "p") in want. */
static int equals_text(bc_num x, const char *want)
{
    mpq_t a, b;
    mpq_inits(a, b, NULL);
    bc_num_to_mpq(a, x, big);
    int ok = mpq_set_str(b, want, 10) == 0;
    if (ok) {
        mpq_canonicalize(b);
        ok = mpq_equal(a, b);
    }
    mpq_clears(a, b, NULL);
    return ok;
}

/* bc_num_format of x into a static buffer. */
static const char *fmt(bc_num x)
{
    static char buf[8192];
    bc_num_format(buf, sizeof buf, x, big);
    return buf;
}

static bc_num num(const char *s)
{
    bc_num x = {0, 1};
    if (!parse(s, &x))
        printf("FAIL helper parse %s\n", s);
    return x;
}

static void test_parse_small(void)
{
    CHECK(parses_small("0", 0, 1), "parse 0");
    CHECK(parses_small("-0", 0, 1), "parse -0 is 0/1");
    CHECK(parses_small("42", 42, 1), "parse 42");
    CHECK(parses_small("-3", -3, 1), "parse -3");
    CHECK(parses_small("0.125", 1, 8), "parse 0.125 = 1/8");
    CHECK(parses_small("-2.50", -5, 2), "parse -2.50 = -5/2");
    CHECK(parses_small("1e-3", 1, 1000), "parse 1e-3 = 1/1000");
    CHECK(parses_small("-2.5E+2", -250, 1), "parse -2.5E+2 = -250");
    CHECK(parses_small("1.5e2", 150, 1), "parse 1.5e2 = 150");
    CHECK(parses_small("12e0", 12, 1), "parse 12e0");
    CHECK(parses_small("9/10", 9, 10), "parse 9/10");
    CHECK(parses_small("6/4", 3, 2), "parse 6/4 reduced to 3/2");
    CHECK(parses_small("-1/3", -1, 3), "parse -1/3");
    CHECK(parses_small("0/7", 0, 1), "parse 0/7 = 0/1");
    CHECK(parses_small("0.1", 1, 10), "parse 0.1 = 1/10");
    CHECK(parses_small("007", 7, 1), "parse 007 = 7");
    CHECK(parses_small("9223372036854775807", INT64_MAX, 1), "parse INT64_MAX stays small");
    CHECK(parses_small("1/9223372036854775807", 1, INT64_MAX), "parse 1/INT64_MAX stays small");
}

static void test_parse_big(void)
{
    bc_num x;
    size_t before = bc_bigtab_count(big);
    /* 123456789012345678901234567890 = 7 * 17636684144620811271604938270 (by hand: 7 * ...270). */
    CHECK(parse("123456789012345678901234567890/7", &x), "parse big/7 accepted");
    CHECK(x.den == 0, "parse big/7 is big");
    CHECK(equals_text(x, "17636684144620811271604938270"), "parse big/7 reduced to an integer");
    CHECK(bc_bigtab_count(big) == before + 1, "parse big/7 adds one big value");
    CHECK(strcmp(fmt(x), "17636684144620811271604938270") == 0, "format big integer");
    CHECK(parse("123456789012345678901234567891/7", &x) && x.den == 0, "parse big fraction");
    CHECK(equals_text(x, "123456789012345678901234567891/7"), "big fraction exact");
    CHECK(strcmp(fmt(x), "123456789012345678901234567891/7") == 0, "format big fraction p/q");
    CHECK(parse("9223372036854775808", &x) && x.den == 0, "parse 2^63 is big");
    CHECK(equals_text(x, "9223372036854775808"), "parse 2^63 exact");
    CHECK(parse("0.000000000000000000001", &x) && x.den == 0, "parse 1e-21 (denominator > int64) is big");
    CHECK(equals_text(x, "1/1000000000000000000000"), "parse 0.000000000000000000001 exact");
    CHECK(strcmp(fmt(x), "0.000000000000000000001") == 0, "format 1e-21 as a decimal");
    CHECK(parse("-1e30", &x) && equals_text(x, "-1000000000000000000000000000000"), "parse -1e30");
    CHECK(parse("1e4096", &x) && x.den == 0, "parse 1e4096 (exponent at the limit)");
    CHECK(parse("1e-4096", &x) && x.den == 0, "parse 1e-4096 (exponent at the limit)");
    /* INT64_MIN fits int64; whichever form the reader picks, the value must be exact. */
    CHECK(parse("-9223372036854775808", &x) && equals_text(x, "-9223372036854775808"),
          "parse -2^63 exact");
    bc_num y;
    CHECK(bc_num_add(x, bc_num_int(1), &y, big) == 0 && equals_text(y, "-9223372036854775807") &&
              y.den == 1 && y.num == -INT64_MAX,
          "-2^63 + 1 is small -(2^63 - 1)");
    CHECK(bc_num_cmp(x, y, big) < 0 && bc_num_cmp(y, x, big) > 0, "cmp -2^63 < -(2^63-1)");
    CHECK(bc_num_sign(x, big) == -1, "sign of -2^63");
    CHECK(bc_num_to_double(x, big) == -9223372036854775808.0, "-2^63 to double");
    CHECK(strcmp(fmt(x), "-9223372036854775808") == 0, "format -2^63");
    /* 4096 digits are allowed, 4097 are not. */
    char *digits = malloc(4098);
    memset(digits, '3', 4097);
    digits[4096] = 0;
    CHECK(parse(digits, &x) && x.den == 0, "parse 4096 digits");
    digits[4096] = '3';
    digits[4097] = 0;
    CHECK(!parse(digits, &x), "reject 4097 digits");
    free(digits);
}

static void test_parse_reject(void)
{
    static const char *bad[] = {"", "1.", ".5", "1e", "--1", "1/0", "-1/0", "1e4097", "1e-4097",
                                "1e99999", "1.2.3", "0x10", "inf", "-inf", "nan", "1/", "/2",
                                "1//2", "1/2/3", "1.5/2", "1e3/2", "e5", "-", "+", "1 ", " 1",
                                "1,5", "1e+", "1e-", "1.e3", "1_000", "2/3.0", "½"};
    for (size_t i = 0; i < sizeof bad / sizeof bad[0]; i++) {
        char name[64];
        bc_num x;
        snprintf(name, sizeof name, "reject \"%s\"", bad[i]);
        CHECK(!parse(bad[i], &x), name);
    }
    /* The length is honoured: "12" read as its first byte only. */
    bc_num x;
    const char *why = NULL;
    CHECK(bc_num_parse("12", 1, &x, big, &why) == 0 && x.num == 1 && x.den == 1, "parse honours len");
}

static void test_arith(void)
{
    bc_num r;
    CHECK(bc_num_add(num("1/6"), num("1/3"), &r, big) == 0 && r.num == 1 && r.den == 2,
          "1/6 + 1/3 = 1/2");
    CHECK(bc_num_add(num("0.1"), num("0.2"), &r, big) == 0 && r.num == 3 && r.den == 10,
          "0.1 + 0.2 = 3/10 exactly");
    CHECK(bc_num_add(num("1/2"), num("-1/2"), &r, big) == 0 && r.num == 0 && r.den == 1,
          "1/2 - 1/2 = 0/1");
    CHECK(bc_num_mul(num("2/3"), num("9/4"), &r, big) == 0 && r.num == 3 && r.den == 2,
          "2/3 * 9/4 = 3/2");
    CHECK(bc_num_mul(num("-5"), num("-1/10"), &r, big) == 0 && r.num == 1 && r.den == 2,
          "-5 * -1/10 = 1/2");
    CHECK(bc_num_div(num("1/3"), num("2/9"), &r, big) == 0 && r.num == 3 && r.den == 2,
          "1/3 / 2/9 = 3/2");
    CHECK(bc_num_div(num("1"), num("-4"), &r, big) == 0 && r.num == -1 && r.den == 4,
          "1 / -4 = -1/4 (sign on the numerator)");
    CHECK(bc_num_div(num("1"), num("0"), &r, big) == -1, "division by zero fails");

    /* Overflow into the big form and back. */
    bc_num two62 = num("4611686018427387904"); /* 2^62 */
    CHECK(two62.den == 1, "2^62 is small");
    CHECK(bc_num_add(two62, two62, &r, big) == 0 && r.den == 0 && equals_text(r, "9223372036854775808"),
          "2^62 + 2^62 = 2^63 overflows to big");
    bc_num back;
    CHECK(bc_num_mul(r, num("1/2"), &back, big) == 0 && back.den == 1 &&
              back.num == INT64_C(4611686018427387904),
          "2^63 * 1/2 comes back to small 2^62");
    CHECK(bc_num_mul(num("3037000500"), num("3037000500"), &r, big) == 0 && r.den == 0 &&
              equals_text(r, "9223372037000250000"),
          "3037000500^2 overflows to big");
    CHECK(bc_num_div(r, num("3037000500"), &back, big) == 0 && back.den == 1 && back.num == 3037000500,
          "3037000500^2 / 3037000500 back to small");
    CHECK(bc_num_mul(num("1/4294967296"), num("1/4294967296"), &r, big) == 0 && r.den == 0 &&
              equals_text(r, "1/18446744073709551616"),
          "2^-32 * 2^-32 = 2^-64 is big");
    bc_num x = num("123456789012345678901234567890"), y = num("-123456789012345678901234567889");
    CHECK(bc_num_add(x, y, &r, big) == 0 && r.num == 1 && r.den == 1, "big + big = small 1");
    CHECK(bc_num_add(num("1/3"), x, &r, big) == 0 && equals_text(r, "370370367037037036703703703671/3"),
          "1/3 + big exact");
    CHECK(bc_num_div(x, x, &r, big) == 0 && r.num == 1 && r.den == 1 && bc_num_is_one(r, big),
          "big / big = 1");

    /* Comparison across forms. */
    bc_num third = num("1/3"), approx = num("0.333333333333333333333"); /* 21 threes: big */
    CHECK(approx.den == 0, "0.333... (21 digits) is big");
    CHECK(bc_num_cmp(third, approx, big) > 0 && bc_num_cmp(approx, third, big) < 0, "1/3 > 0.333...(21)");
    CHECK(bc_num_cmp(num("2/4"), num("0.5"), big) == 0, "2/4 == 0.5");
    CHECK(bc_num_cmp(num("-1/3"), num("-0.3"), big) < 0, "-1/3 < -0.3");
    CHECK(bc_num_cmp(num("9223372036854775807"), num("9223372036854775808"), big) < 0, "INT64_MAX < 2^63");
    CHECK(bc_num_cmp(num("1/9223372036854775807"), num("1/9223372036854775806"), big) < 0,
          "1/INT64_MAX < 1/(INT64_MAX-1) (no overflow in cross-multiplication)");
    CHECK(bc_num_cmp(num("9223372036854775807/2"), num("9223372036854775806/2"), big) > 0,
          "(2^63-1)/2 > (2^63-2)/2");
    CHECK(bc_num_sign(num("-0.001"), big) == -1 && bc_num_sign(num("0"), big) == 0 &&
              bc_num_sign(num("1e30"), big) == 1,
          "sign of small, zero and big");
    CHECK(bc_num_is_one(num("3/3"), big) && bc_num_is_one(num("1.000"), big) &&
              !bc_num_is_one(num("0.9999999999999999999999"), big),
          "is_one");
}

static void test_format(void)
{
    CHECK(strcmp(fmt(num("1/8")), "0.125") == 0, "format 1/8 -> 0.125");
    CHECK(strcmp(fmt(num("1/3")), "1/3") == 0, "format 1/3 -> 1/3");
    CHECK(strcmp(fmt(num("-5/2")), "-2.5") == 0, "format -5/2 -> -2.5");
    CHECK(strcmp(fmt(num("10")), "10") == 0, "format 10 -> 10");
    CHECK(strcmp(fmt(num("0")), "0") == 0, "format 0 -> 0");
    CHECK(strcmp(fmt(num("-1/20")), "-0.05") == 0, "format -1/20 -> -0.05");
    CHECK(strcmp(fmt(num("-2.5E+2")), "-250") == 0, "format -250");
    CHECK(strcmp(fmt(num("1/1000000000000000000")), "0.000000000000000001") == 0, "format 1e-18");
    /* Contract (bellcheck.h): a decimal whenever den = 2^i 5^j needs at most 40 fraction
     * digits.  2^-19 needs 19, 2^-40 needs 40 (allowed); 2^-41 needs 41 (p/q). */
    CHECK(strcmp(fmt(num("1/524288")), "0.0000019073486328125") == 0,
          "format 2^-19 as a 19-digit decimal");
    CHECK(strcmp(fmt(num("1/1099511627776")), "0.0000000000009094947017729282379150390625") == 0,
          "format 2^-40 as a 40-digit decimal");
    CHECK(strcmp(fmt(num("1/2199023255552")), "1/2199023255552") == 0, "format 2^-41 as p/q");
    CHECK(strcmp(fmt(num("2/7")), "2/7") == 0, "format 2/7");
    CHECK(strcmp(fmt(num("-1/6")), "-1/6") == 0, "format -1/6");
    CHECK(strcmp(fmt(num("9223372036854775807")), "9223372036854775807") == 0, "format INT64_MAX");
    CHECK(strcmp(fmt(num("-1e30")), "-1000000000000000000000000000000") == 0, "format -1e30 (big)");

    /* Truncation: NUL-terminated within cap, full length returned. */
    char small[4];
    CHECK(bc_num_format(small, sizeof small, num("1/8"), big) == 5 && strcmp(small, "0.1") == 0,
          "format truncated to cap, returns full length");
    char buf[64];
    CHECK(bc_num_format_fraction(buf, sizeof buf, num("0.125"), big) == 3 && strcmp(buf, "1/8") == 0,
          "format_fraction 0.125 -> 1/8");
    CHECK(bc_num_format_fraction(buf, sizeof buf, num("10"), big) == 2 && strcmp(buf, "10") == 0,
          "format_fraction 10 -> 10");
    CHECK(bc_num_format_fraction(buf, sizeof buf, num("-2.5"), big) == 4 && strcmp(buf, "-5/2") == 0,
          "format_fraction -2.5 -> -5/2");

    /* bc_num_write: same text to a stream, byte count returned; the text parses back. */
    char *out = NULL;
    size_t len = 0;
    FILE *f = open_memstream(&out, &len);
    int n1 = bc_num_write(f, num("1/8"), big);
    fputc(' ', f);
    int n2 = bc_num_write(f, num("-1/3"), big);
    fputc(' ', f);
    int n3 = bc_num_write(f, num("123456789012345678901234567891/7"), big);
    fclose(f);
    CHECK(n1 == 5 && n2 == 4 && n3 == 32, "bc_num_write returns bytes written");
    CHECK(out && strcmp(out, "0.125 -1/3 123456789012345678901234567891/7") == 0, "bc_num_write text");
    free(out);
    bc_num x = num("0.000000000000000000000000000001"), y;
    CHECK(parse(fmt(x), &y) && bc_num_cmp(x, y, big) == 0, "format of 1e-30 parses back equal");
}

static void test_double(void)
{
    CHECK(bc_num_to_double(num("0.1"), big) == strtod("0.1", NULL), "0.1 to double == strtod(0.1)");
    CHECK(bc_num_to_double(num("1/3"), big) == 1.0 / 3.0, "1/3 to double == 1.0/3.0");
    CHECK(bc_num_to_double(num("-2.5E+2"), big) == -250.0, "-2.5E+2 to double");
    CHECK(bc_num_to_double(num("0.95"), big) == strtod("0.95", NULL), "0.95 to double == strtod");
    CHECK(bc_num_to_double(num("9007199254740993"), big) == 9007199254740992.0,
          "2^53 + 1 rounds to nearest-even 2^53");
    CHECK(bc_num_to_double(num("1e-3"), big) == strtod("1e-3", NULL), "1e-3 to double == strtod");
    CHECK_NEAR(bc_num_to_double(num("123456789012345678901234567891/7"), big), 1.763668414462081e28,
               1e13, "big fraction to double (relative 1e-15)");
    CHECK(bc_num_to_double(num("0.000000000000000000001"), big) > 0.99e-21 &&
              bc_num_to_double(num("0.000000000000000000001"), big) < 1.01e-21,
          "1e-21 (big) to double");
    /* mpq round trip through bc_num_from_mpq: canonical small form when it fits. */
    mpq_t q;
    mpq_init(q);
    mpq_set_si(q, 6, 4);
    mpq_canonicalize(q);
    bc_num r;
    CHECK(bc_num_from_mpq(&r, q, big) == 0 && r.num == 3 && r.den == 2, "from_mpq 6/4 -> small 3/2");
    mpq_set_str(q, "100000000000000000000/3", 10);
    mpq_canonicalize(q);
    CHECK(bc_num_from_mpq(&r, q, big) == 0 && r.den == 0 && equals_text(r, "100000000000000000000/3"),
          "from_mpq 1e20/3 -> big");
    mpq_clear(q);
}

int main(void)
{
    big = bc_bigtab_new();
    CHECK(big != NULL && bc_bigtab_count(big) == 0, "new bigtab is empty");
    test_parse_small();
    test_parse_big();
    test_parse_reject();
    test_arith();
    test_format();
    test_double();
    bc_bigtab_free(big);
    UNIT_DONE();
}
