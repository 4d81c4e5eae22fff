/* The report module's number formatter (src/report_num.c): the text of printf's "%.10g",
 * byte for byte, for values across every magnitude, near rounding ties, at the edges of
 * the %g style switch and of the fast path, and for the special values. */
#include <float.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <string.h>

#include "report_internal.h"
#include "testutil.h"

/* xorshift64* (Vigna 2016, "An experimental exploration of Marsaglia's xorshift
 * generators, scrambled", ACM TOMS 42(4)): reproducible values without libc's rand. */
static uint64_t next(uint64_t *s)
{
    *s ^= *s >> 12;
    *s ^= *s << 25;
    *s ^= *s >> 27;
    return *s * 2685821657736338717ULL;
}

static void same_as_printf(double v)
{
    char want[64], got[64];
    memset(got, 'x', sizeof got);
    int n = snprintf(want, sizeof want, "%.10g", v);
    int m = kphi__report_g10(got, v);
    ck_assert_msg(m == n && strcmp(got, want) == 0, "%.17g: got '%s' (%d), printf '%s' (%d)", v,
                  got, m, want, n);
}

START_TEST(special_values)
{
    const double v[] = {0.0,      -0.0,     INFINITY, -INFINITY, NAN,     DBL_MIN, DBL_MAX,
                        DBL_TRUE_MIN, 1.0,  -1.0,     723.15,    195.0,   1e-5,    1e-4,
                        9.9999999995e-5, 9.999999999e-5, 1e10, 9999999999.0, 9999999999.5,
                        99999999995.0, 1e-30, 1e40,  0.1,     0.5,     2.5e-31, 3.7e41};
    for (size_t k = 0; k < sizeof v / sizeof v[0]; k++) {
        same_as_printf(v[k]);
        same_as_printf(-v[k]);
    }
}
END_TEST

START_TEST(random_magnitudes)
{
    uint64_t s = 0x9E3779B97F4A7C15ULL;
    for (int k = 0; k < 300000; k++) {
        /* log-uniform over 1e-45 .. 1e55, either sign */
        double u = (double)(next(&s) >> 11) * 0x1.0p-53;
        double v = pow(10.0, -45.0 + 100.0 * u);
        same_as_printf(next(&s) & 1 ? -v : v);
    }
}
END_TEST

START_TEST(random_bit_patterns)
{
    uint64_t s = 0xD1B54A32D192ED03ULL;
    for (int k = 0; k < 200000; k++) {
        uint64_t b = next(&s);
        double v;
        memcpy(&v, &b, sizeof v);
        same_as_printf(v);
    }
}
END_TEST

/* Decimals that end in 5 at the eleventh significant digit (rounding ties of the decimal
 * text) and their binary neighbours, at many scales. */
START_TEST(near_ties)
{
    uint64_t s = 0x2545F4914F6CDD1DULL;
    for (int k = 0; k < 100000; k++) {
        uint64_t digits = 1000000000ULL + next(&s) % 9000000000ULL;
        int e = (int)(next(&s) % 70) - 35;
        double v = ((double)digits + 0.5) * pow(10.0, e - 9);
        same_as_printf(v);
        same_as_printf(nextafter(v, 0.0));
        same_as_printf(nextafter(v, INFINITY));
    }
}
END_TEST

static Suite *report_num_suite(void)
{
    Suite *s = suite_create("report_num");
    TCase *tc = tcase_create("g10");
    tcase_set_timeout(tc, 120);
    tcase_add_test(tc, special_values);
    tcase_add_test(tc, random_magnitudes);
    tcase_add_test(tc, random_bit_patterns);
    tcase_add_test(tc, near_ties);
    suite_add_tcase(s, tc);
    return s;
}

KPHI_TEST_MAIN(report_num_suite)
