/* kphi report, numbers: printf's "%.10g" text for a double, computed without printf.
 *
 * A sweep writes some thirty numbers per grid point, and snprintf's general formatting
 * was most of the CSV writer's time. The same text comes from: v with
 * 1e-30 <= |v| <= 1e40 is scaled by a power of ten (exact in binary64 up to 1e22, at
 * most two factors since |k| <= 41) to s = |v| 10^k in [1e9, 1e10); s rounded to the nearest integer gives
 * the ten significant digits, and the decimal exponent places the point exactly as %g
 * does (C11 7.21.6.1: style e when the exponent is below -4 or at least the precision,
 * trailing zeros and a trailing point removed). The scaling rounds at most three times,
 * each by at most half an ulp of s (ulp(s) <= 2^-19 below 1e10), so its error is below
 * 3e-6: when the fraction of s lies within 1e-5 of one half, the rounding could go either
 * way and snprintf itself is asked, as it is for zero, values outside that range and
 * non-finite ones. The output is therefore always printf's, byte for byte, and does not
 * depend on the thread that formats it. */
#include "report_internal.h"

#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <string.h>

/* Powers of ten 1e0..1e22, all exact in binary64. */
static const double P10[23] = {1e0,  1e1,  1e2,  1e3,  1e4,  1e5,  1e6,  1e7,
                               1e8,  1e9,  1e10, 1e11, 1e12, 1e13, 1e14, 1e15,
                               1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22};

/* "00" .. "99" */
static const char DIGITS2[201] = "00010203040506070809101112131415161718192021222324252627282930"
                                 "31323334353637383940414243444546474849505152535455565758596061"
                                 "62636465666768697071727374757677787980818283848586878889909192"
                                 "93949596979899";

/* The five digits of x < 100000 into d[0..4]. */
static void five_digits(char d[5], uint32_t x)
{
    uint32_t hi = x / 1000, lo = x % 1000; /* hi < 100 */
    memcpy(d, DIGITS2 + 2 * hi, 2);
    d[2] = (char)('0' + lo / 100);
    memcpy(d + 3, DIGITS2 + 2 * (lo % 100), 2);
}

int kphi__report_g10(char *buf, double v)
{
    double a = fabs(v);
    if (!(a >= 1e-30 && a <= 1e40)) /* zero, tiny, huge, NaN, infinite */
        return snprintf(buf, 32, "%.10g", v);
    uint64_t bits;
    memcpy(&bits, &a, sizeof bits);
    int e2 = (int)(bits >> 52) - 1023; /* a in [2^e2, 2^(e2+1)) */
    /* floor(e2 log10 2) within one (corrected below): 78913 / 2^18 = 0.3010292 */
    int e10 = e2 >= 0 ? (e2 * 78913) >> 18 : -((-e2 * 78913 + (1 << 18) - 1) >> 18);
    int k = 9 - e10;
    double s = a;
    while (k > 22) {
        s *= 1e22;
        k -= 22;
    }
    while (k < -22) {
        s /= 1e22;
        k += 22;
    }
    s = k >= 0 ? s * P10[k] : s / P10[-k];
    if (s >= 1e10) {
        s /= 10.0;
        e10++;
    } else if (s < 1e9) {
        s *= 10.0;
        e10--;
    }
    if (!(s >= 1e9 && s < 1e10)) /* the estimate of e10 is never off by more than one */
        return snprintf(buf, 32, "%.10g", v);
    uint64_t whole = (uint64_t)s; /* s < 1e10: exact truncation */
    double frac = s - (double)whole;
    if (fabs(frac - 0.5) < 1e-5)
        return snprintf(buf, 32, "%.10g", v);
    uint64_t r = whole + (frac > 0.5);
    if (r >= 10000000000ULL) {
        r /= 10;
        e10++;
    }
    char d[10];
    five_digits(d, (uint32_t)(r / 100000));
    five_digits(d + 5, (uint32_t)(r % 100000));
    int nd = 10;
    while (nd > 1 && d[nd - 1] == '0')
        nd--;
    char *p = buf;
    if (v < 0.0)
        *p++ = '-';
    if (e10 < -4 || e10 >= 10) {
        *p++ = d[0];
        if (nd > 1) {
            *p++ = '.';
            memcpy(p, d + 1, (size_t)(nd - 1));
            p += nd - 1;
        }
        *p++ = 'e';
        int x = e10;
        *p++ = x < 0 ? '-' : '+';
        if (x < 0)
            x = -x;
        if (x >= 100) {
            *p++ = (char)('0' + x / 100);
            x %= 100;
        }
        memcpy(p, DIGITS2 + 2 * x, 2);
        p += 2;
    } else if (e10 >= 0) {
        for (int i = 0; i <= e10; i++)
            *p++ = i < nd ? d[i] : '0';
        if (nd > e10 + 1) {
            *p++ = '.';
            memcpy(p, d + e10 + 1, (size_t)(nd - e10 - 1));
            p += nd - e10 - 1;
        }
    } else {
        *p++ = '0';
        *p++ = '.';
        for (int i = 0; i < -e10 - 1; i++)
            *p++ = '0';
        memcpy(p, d, (size_t)nd);
        p += nd;
    }
    *p = '\0';
    return (int)(p - buf);
}
