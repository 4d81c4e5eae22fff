/* Tests of kphi units: text such as "450 C" or "3000 psia" into K and Pa, and back.
 *
 * Conversion factors (NIST SP 811, Thompson & Taylor 2008, "Guide for the Use of the
 * International System of Units (SI)", appendix B.8; from memory):
 *   T/K = t/degC + 273.15, T/K = (t/degF + 459.67)/1.8, T/K = (T/degR)/1.8 (exact);
 *   1 atm = 101325 Pa, 1 bar = 1e5 Pa (exact);
 *   1 psi = 0.45359237 kg * 9.80665 m/s^2 / (0.0254 m)^2 = 6894.757293168361 Pa (exact by the
 *   definitions of the pound, standard gravity and the inch; SP 811 B.8 lists 6.894 757 E+03).
 * Gauge units add one standard atmosphere, 101325 Pa (common practice). */
#include "kphi/units.h"

#include <math.h>
#include <string.h>

#include "testutil.h"

#define PSI 6894.757293168361 /* Pa, see above */
#define ATM 101325.0          /* Pa, exact */

static const kphi_units_origin here = {"case.yaml", {7, 4}};

static double T_of(const char *text)
{
    double T = -1.0;
    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_msg(kphi_units_temperature(text, &T, NULL, &err) == KPHI_OK, "'%s': %s", text,
                  err.msg);
    return T;
}

static double P_of(const char *text)
{
    double P = -1.0;
    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_msg(kphi_units_pressure(text, &P, NULL, &err) == KPHI_OK, "'%s': %s", text,
                  err.msg);
    return P;
}

/* Parse text with origin `here` and check the error: code, column and message. */
static void expect_error(int (*fn)(const char *, double *, const kphi_units_origin *,
                                   kphi_error *),
                         const char *text, long column, const char *msg)
{
    kphi_error err;
    kphi_error_clear(&err);
    double v = 12.5;
    int rc = fn(text, &v, &here, &err);
    ck_assert_int_eq(rc, KPHI_EINPUT);
    ck_assert_int_eq(err.code, KPHI_EINPUT);
    ck_assert_str_eq(err.path, "case.yaml");
    ck_assert_int_eq(err.line, 7);
    ck_assert_msg(err.column == column, "'%s': column %ld, want %ld", text, err.column, column);
    ck_assert_str_eq(err.msg, msg);
    ck_assert(v == 12.5); /* output untouched on error */
}

START_TEST(celsius_spellings)
{
    /* T/K = t/degC + 273.15, exact by definition (NIST SP 811, from memory) */
    const char *texts[] = {"450 C", "450C", "450 c", "450 degC", "450degc", "450 \xc2\xb0" "C",
                           "450\xc2\xb0" "c", "  450 C\t", "+450 C", "4.5e2 C", "4.50E+2C"};
    for (size_t i = 0; i < sizeof texts / sizeof texts[0]; i++)
        ck_assert_double_eq_tol(T_of(texts[i]), 723.15, 1e-12);
    ck_assert_double_eq_tol(T_of("-40 C"), 233.15, 1e-12);
    ck_assert_double_eq_tol(T_of("0.01 C"), 273.16, 1e-12);
}
END_TEST

START_TEST(kelvin_fahrenheit_rankine)
{
    ck_assert_double_eq_tol(T_of("673.15 K"), 673.15, 1e-12);
    ck_assert_double_eq_tol(T_of("673.15k"), 673.15, 1e-12);
    /* 842 degF = (842 + 459.67)/1.8 K = 723.15 K = 450 degC (NIST SP 811 B.8, from memory) */
    ck_assert_double_eq_tol(T_of("842 F"), 723.15, 1e-9);
    ck_assert_double_eq_tol(T_of("842 degF"), 723.15, 1e-9);
    ck_assert_double_eq_tol(T_of("842 \xc2\xb0" "F"), 723.15, 1e-9);
    ck_assert_double_eq_tol(T_of("842f"), 723.15, 1e-9);
    /* -40 degF and -40 degC are the same temperature, 233.15 K (from the two definitions) */
    ck_assert_double_eq_tol(T_of("-40 F"), 233.15, 1e-9);
    /* 1301.67 degR = 1301.67/1.8 K = 723.15 K (NIST SP 811 B.8, from memory) */
    ck_assert_double_eq_tol(T_of("1301.67 R"), 723.15, 1e-9);
    ck_assert_double_eq_tol(T_of("1301.67 degR"), 723.15, 1e-9);
    ck_assert_double_eq_tol(T_of("1301.67 \xc2\xb0" "R"), 723.15, 1e-9);
    ck_assert_double_eq_tol(T_of("1301.67r"), 723.15, 1e-9);
}
END_TEST

START_TEST(pressure_units)
{
    ck_assert_double_eq_tol(P_of("3.7 atm"), 3.7 * ATM, 1e-6); /* 1 atm = 101325 Pa exact */
    ck_assert_double_eq_tol(P_of("3.7 ATM"), 3.7 * ATM, 1e-6);
    ck_assert_double_eq_tol(P_of("23.7 MPa"), 2.37e7, 1e-6);
    ck_assert_double_eq_tol(P_of("23.7MPa"), 2.37e7, 1e-6);
    ck_assert_double_eq_tol(P_of("0.0237 GPa"), 2.37e7, 1e-6);
    ck_assert_double_eq_tol(P_of("2.37e7 Pa"), 2.37e7, 1e-6);
    ck_assert_double_eq_tol(P_of("2.37E+7Pa"), 2.37e7, 1e-6);
    ck_assert_double_eq_tol(P_of("101.325 kPa"), ATM, 1e-9);
    ck_assert_double_eq_tol(P_of("1013.25 hPa"), ATM, 1e-9);
    ck_assert_double_eq_tol(P_of("1013.25 mbar"), ATM, 1e-9); /* 1 mbar = 100 Pa exact */
    ck_assert_double_eq_tol(P_of("237 bar"), 2.37e7, 1e-6);   /* 1 bar = 1e5 Pa exact */
    ck_assert_double_eq_tol(P_of("237 Bar"), 2.37e7, 1e-6);
    ck_assert_double_eq_tol(P_of("237 BAR"), 2.37e7, 1e-6);
    ck_assert_double_eq_tol(P_of("237 bara"), 2.37e7, 1e-6);
    ck_assert_double_eq_tol(P_of("3437.5 psia"), 3437.5 * PSI, 1e-6);
    ck_assert_double_eq_tol(P_of("3437.5 psi"), 3437.5 * PSI, 1e-6);
    ck_assert_double_eq_tol(P_of("3437.5 PSIA"), 3437.5 * PSI, 1e-6);
    /* gauge: + 1 standard atmosphere */
    ck_assert_double_eq_tol(P_of("198.7 barg"), 198.7e5 + ATM, 1e-6);
    ck_assert_double_eq_tol(P_of("198.7 BARG"), 198.7e5 + ATM, 1e-6);
    ck_assert_double_eq_tol(P_of("2885.3 psig"), 2885.3 * PSI + ATM, 1e-6);
    ck_assert_double_eq_tol(P_of("-1 barg"), 1325.0, 1e-9); /* 101325 - 100000 Pa */
    ck_assert_double_eq_tol(P_of("0 psig"), ATM, 1e-9);
    /* the psi factor from the definitions of lb, g_n and in */
    ck_assert_double_eq_tol(P_of("1 psi"), 0.45359237 * 9.80665 / (0.0254 * 0.0254), 1e-9);
    ck_assert_double_eq_tol(P_of("1 psi"), 6894.757293168, 1e-9);
}
END_TEST

START_TEST(steps)
{
    double d = 0.0;
    ck_assert_int_eq(kphi_units_temperature_step("10 C", &d, NULL, NULL), KPHI_OK);
    ck_assert_double_eq_tol(d, 10.0, 1e-12);
    ck_assert_int_eq(kphi_units_temperature_step("12.5 K", &d, NULL, NULL), KPHI_OK);
    ck_assert_double_eq_tol(d, 12.5, 1e-12);
    ck_assert_int_eq(kphi_units_temperature_step("18 F", &d, NULL, NULL), KPHI_OK);
    ck_assert_double_eq_tol(d, 10.0, 1e-12); /* 1 degF = 1/1.8 K as a difference */
    ck_assert_int_eq(kphi_units_temperature_step("18 degR", &d, NULL, NULL), KPHI_OK);
    ck_assert_double_eq_tol(d, 10.0, 1e-12);
    ck_assert_int_eq(kphi_units_pressure_step("25 bar", &d, NULL, NULL), KPHI_OK);
    ck_assert_double_eq_tol(d, 2.5e6, 1e-6);
    ck_assert_int_eq(kphi_units_pressure_step("25 barg", &d, NULL, NULL), KPHI_OK);
    ck_assert_double_eq_tol(d, 2.5e6, 1e-6); /* gauge steps are plain differences */
    ck_assert_int_eq(kphi_units_pressure_step("7.5 psig", &d, NULL, NULL), KPHI_OK);
    ck_assert_double_eq_tol(d, 7.5 * PSI, 1e-9);
    ck_assert_int_eq(kphi_units_pressure_step("0.5 atm", &d, NULL, NULL), KPHI_OK);
    ck_assert_double_eq_tol(d, 0.5 * ATM, 1e-9);
}
END_TEST

START_TEST(temperature_errors)
{
    expect_error(kphi_units_temperature, "450", 4,
                 "'450' has no unit; write e.g. '450 C' or '723.15 K'");
    expect_error(kphi_units_temperature, "450 Z", 8,
                 "unknown temperature unit 'Z' in '450 Z'; expected K, C, F or R");
    expect_error(kphi_units_temperature, "  450Z", 9,
                 "unknown temperature unit 'Z' in '450Z'; expected K, C, F or R");
    expect_error(kphi_units_temperature, "450 Celsius", 8,
                 "unknown temperature unit 'Celsius' in '450 Celsius' (did you mean 'C'?)");
    expect_error(kphi_units_temperature, "450 degK", 8,
                 "unknown temperature unit 'degK' in '450 degK' (did you mean 'K'?)");
    expect_error(kphi_units_temperature, "450 dgC", 8,
                 "unknown temperature unit 'dgC' in '450 dgC' (did you mean 'degC'?)");
    expect_error(kphi_units_temperature, "450 bar", 8,
                 "'bar' in '450 bar' is a pressure unit; expected a temperature unit: "
                 "K, C, F or R");
    expect_error(kphi_units_temperature, "-300 C", 4,
                 "temperature '-300 C' is -26.85 K; it must be above absolute zero");
    expect_error(kphi_units_temperature, "-460 F", 4,
                 "temperature '-460 F' is -0.1833333333 K; it must be above absolute zero");
    expect_error(kphi_units_temperature, "0 K", 4,
                 "temperature '0 K' must be above absolute zero");
    expect_error(kphi_units_temperature, "-273.15 C", 4,
                 "temperature '-273.15 C' is 0 K; it must be above absolute zero");
    expect_error(kphi_units_temperature, "nan K", 4,
                 "temperature must be a finite number, found 'nan K'");
    expect_error(kphi_units_temperature, "-Inf C", 4,
                 "temperature must be a finite number, found '-Inf C'");
    expect_error(kphi_units_temperature, "1e999 K", 4,
                 "temperature must be a finite number, found '1e999 K'");
    expect_error(kphi_units_temperature, "", 4,
                 "empty temperature; write e.g. '450 C' or '723.15 K'");
    expect_error(kphi_units_temperature, "   ", 4,
                 "empty temperature; write e.g. '450 C' or '723.15 K'");
    expect_error(kphi_units_temperature, "hot", 4,
                 "expected a number and a unit for the temperature, e.g. '450 C' or "
                 "'723.15 K'; found 'hot'");
    expect_error(kphi_units_temperature, "C 450", 4,
                 "expected a number and a unit for the temperature, e.g. '450 C' or "
                 "'723.15 K'; found 'C 450'");
    expect_error(kphi_units_temperature, "450,5 C", 7,
                 "unexpected ',' in '450,5 C'; write decimals with a point, e.g. '450.5'");
    expect_error(kphi_units_temperature, "0x1C0 K", 5,
                 "unknown temperature unit 'x1C0 K' in '0x1C0 K'; expected K, C, F or R");
}
END_TEST

START_TEST(pressure_errors)
{
    expect_error(kphi_units_pressure, "200", 4,
                 "'200' has no unit; write e.g. '200 bar' or '20 MPa'");
    expect_error(kphi_units_pressure, "23.7 mPa", 9,
                 "unknown pressure unit 'mPa' in '23.7 mPa' (did you mean 'MPa'?)");
    expect_error(kphi_units_pressure, "23.7 mpa", 9,
                 "unknown pressure unit 'mpa' in '23.7 mpa' (did you mean 'MPa'?)");
    expect_error(kphi_units_pressure, "101.3 kpa", 10,
                 "unknown pressure unit 'kpa' in '101.3 kpa' (did you mean 'kPa'?)");
    expect_error(kphi_units_pressure, "200 bars", 8,
                 "unknown pressure unit 'bars' in '200 bars' (did you mean 'bar'?)");
    expect_error(kphi_units_pressure, "3 atmospheres", 6,
                 "unknown pressure unit 'atmospheres' in '3 atmospheres' (did you mean 'atm'?)");
    expect_error(kphi_units_pressure, "200 Z", 8,
                 "unknown pressure unit 'Z' in '200 Z'; expected Pa, hPa, kPa, MPa, GPa, mbar, "
                 "bar, bara, barg, atm, psi, psia or psig");
    expect_error(kphi_units_pressure, "200 C", 8,
                 "'C' in '200 C' is a temperature unit; expected a pressure unit: Pa, hPa, kPa, "
                 "MPa, GPa, mbar, bar, bara, barg, atm, psi, psia or psig");
    expect_error(kphi_units_pressure, "0 bar", 4, "pressure '0 bar' must be above zero");
    expect_error(kphi_units_pressure, "-23.7 MPa", 4, "pressure '-23.7 MPa' must be above zero");
    expect_error(kphi_units_pressure, "-1.5 barg", 4,
                 "pressure '-1.5 barg' is -48675 Pa absolute; it must be above zero");
    expect_error(kphi_units_pressure, "NaN bar", 4,
                 "pressure must be a finite number, found 'NaN bar'");
    expect_error(kphi_units_pressure, "inf Pa", 4,
                 "pressure must be a finite number, found 'inf Pa'");
    expect_error(kphi_units_pressure, "", 4, "empty pressure; write e.g. '200 bar' or '20 MPa'");
}
END_TEST

START_TEST(step_errors)
{
    expect_error(kphi_units_temperature_step, "10", 4,
                 "'10' has no unit; write e.g. '10 C' or '10 K'");
    expect_error(kphi_units_temperature_step, "0 C", 4, "temperature step '0 C' must be positive");
    expect_error(kphi_units_temperature_step, "-10 C", 4,
                 "temperature step '-10 C' must be positive");
    expect_error(kphi_units_temperature_step, "10 Q", 7,
                 "unknown temperature unit 'Q' in '10 Q'; expected K, C, F or R");
    expect_error(kphi_units_pressure_step, "25", 4,
                 "'25' has no unit; write e.g. '25 bar' or '2.5 MPa'");
    expect_error(kphi_units_pressure_step, "0 bar", 4, "pressure step '0 bar' must be positive");
    expect_error(kphi_units_pressure_step, "-5 barg", 4,
                 "pressure step '-5 barg' must be positive");
    expect_error(kphi_units_pressure_step, "inf bar", 4,
                 "pressure step must be a finite number, found 'inf bar'");
}
END_TEST

START_TEST(error_without_origin)
{
    kphi_error err;
    kphi_error_clear(&err);
    double T = 5.0;
    ck_assert_int_eq(kphi_units_temperature("450", &T, NULL, &err), KPHI_EINPUT);
    ck_assert_str_eq(err.path, "");
    ck_assert_int_eq(err.line, 0);
    ck_assert_int_eq(err.column, 0);
    /* origin with an unknown position keeps the column at 0 */
    kphi_units_origin cl = {"<command line>", {0, 0}};
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_units_temperature("450 Z", &T, &cl, &err), KPHI_EINPUT);
    ck_assert_str_eq(err.path, "<command line>");
    ck_assert_int_eq(err.column, 0);
    /* NULL err is allowed, NULL text is an empty text */
    ck_assert_int_eq(kphi_units_pressure("abc", &T, NULL, NULL), KPHI_EINPUT);
    ck_assert_int_eq(kphi_units_pressure(NULL, &T, &cl, NULL), KPHI_EINPUT);
    ck_assert(T == 5.0);
    /* the first error recorded wins */
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_units_pressure("1 Z", &T, &here, &err), KPHI_EINPUT);
    ck_assert_int_eq(kphi_units_temperature("1", &T, &cl, &err), KPHI_EINPUT);
    ck_assert_str_eq(err.path, "case.yaml");
    ck_assert_str_eq(err.msg, "unknown pressure unit 'Z' in '1 Z'; expected Pa, hPa, kPa, MPa, "
                              "GPa, mbar, bar, bara, barg, atm, psi, psia or psig");
}
END_TEST

START_TEST(unit_names)
{
    char u[16];
    const char *cases[][2] = {
        {"450 degC", "C"},  {"450 \xc2\xb0" "C", "C"}, {"450c", "C"},   {"673.15 K", "K"},
        {"842 degF", "F"},  {"1301.67 R", "R"},        {"200 Bar", "bar"}, {"200 bara", "bar"},
        {"20 MPa", "MPa"},  {"3000 psi", "psia"},      {"3000 PSIA", "psia"},
        {"2885 psig", "psig"}, {"198 barg", "barg"},   {"3.7 atm", "atm"}, {"101.3 kPa", "kPa"},
        {"450", ""},        {"450 Z", ""},             {"C", ""},          {"", ""},
        {"20 mpa", ""},
    };
    for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
        strcpy(u, "junk");
        kphi_units_name(cases[i][0], u, sizeof u);
        ck_assert_msg(strcmp(u, cases[i][1]) == 0, "'%s' gave '%s', want '%s'", cases[i][0], u,
                      cases[i][1]);
    }
    kphi_units_name("3000 psi", u, 3); /* truncated, still terminated */
    ck_assert_str_eq(u, "ps");
    kphi_units_name(NULL, u, sizeof u);
    ck_assert_str_eq(u, "");
}
END_TEST

START_TEST(convert_back)
{
    double v = 0.0;
    ck_assert_int_eq(kphi_units_temperature_to(723.15, "C", &v), KPHI_OK);
    ck_assert_double_eq_tol(v, 450.0, 1e-12);
    ck_assert_int_eq(kphi_units_temperature_to(723.15, "F", &v), KPHI_OK);
    ck_assert_double_eq_tol(v, 842.0, 1e-9);
    ck_assert_int_eq(kphi_units_temperature_to(723.15, "R", &v), KPHI_OK);
    ck_assert_double_eq_tol(v, 1301.67, 1e-9);
    ck_assert_int_eq(kphi_units_temperature_to(723.15, "K", &v), KPHI_OK);
    ck_assert_double_eq_tol(v, 723.15, 1e-12);
    ck_assert_int_eq(kphi_units_temperature_to(723.15, "degC", &v), KPHI_OK);
    ck_assert_double_eq_tol(v, 450.0, 1e-12);
    ck_assert_int_eq(kphi_units_pressure_to(2.37e7, "bar", &v), KPHI_OK);
    ck_assert_double_eq_tol(v, 237.0, 1e-12);
    ck_assert_int_eq(kphi_units_pressure_to(2.37e7, "MPa", &v), KPHI_OK);
    ck_assert_double_eq_tol(v, 23.7, 1e-12);
    ck_assert_int_eq(kphi_units_pressure_to(2.37e7, "Pa", &v), KPHI_OK);
    ck_assert_double_eq_tol(v, 2.37e7, 1e-6);
    ck_assert_int_eq(kphi_units_pressure_to(2.37e7, "kPa", &v), KPHI_OK);
    ck_assert_double_eq_tol(v, 23700.0, 1e-9);
    ck_assert_int_eq(kphi_units_pressure_to(3.7 * ATM, "atm", &v), KPHI_OK);
    ck_assert_double_eq_tol(v, 3.7, 1e-12);
    ck_assert_int_eq(kphi_units_pressure_to(3437.5 * PSI, "psia", &v), KPHI_OK);
    ck_assert_double_eq_tol(v, 3437.5, 1e-9);
    ck_assert_int_eq(kphi_units_pressure_to(198.7e5 + ATM, "barg", &v), KPHI_OK);
    ck_assert_double_eq_tol(v, 198.7, 1e-9);
    ck_assert_int_eq(kphi_units_pressure_to(2885.3 * PSI + ATM, "psig", &v), KPHI_OK);
    ck_assert_double_eq_tol(v, 2885.3, 1e-9);
    v = 99.0;
    ck_assert_int_eq(kphi_units_pressure_to(2.37e7, "mpa", &v), KPHI_EINPUT);
    ck_assert_int_eq(kphi_units_pressure_to(2.37e7, "C", &v), KPHI_EINPUT);
    ck_assert_int_eq(kphi_units_temperature_to(723.15, "bar", &v), KPHI_EINPUT);
    ck_assert_int_eq(kphi_units_temperature_to(723.15, NULL, &v), KPHI_EINPUT);
    ck_assert(v == 99.0);
}
END_TEST

/* Parse "v unit" for a spread of values and every unit name, convert back: same v. */
START_TEST(round_trip)
{
    const char *tu[] = {"K", "C", "F", "R", "degC", "degF", "degR"};
    const char *pu[] = {"Pa", "hPa", "kPa", "MPa", "GPa", "mbar", "bar", "bara",
                        "barg", "atm", "psi", "psia", "psig"};
    const double vals[] = {673.15, 1234.5678, 350.25, 2.37};
    char text[64];
    for (size_t k = 0; k < sizeof vals / sizeof vals[0]; k++) {
        for (size_t i = 0; i < sizeof tu / sizeof tu[0]; i++) {
            double T = 0.0, back = 0.0;
            snprintf(text, sizeof text, "%.17g %s", vals[k], tu[i]);
            ck_assert_int_eq(kphi_units_temperature(text, &T, NULL, NULL), KPHI_OK);
            ck_assert_int_eq(kphi_units_temperature_to(T, tu[i], &back), KPHI_OK);
            ck_assert_double_eq_tol(back, vals[k], 1e-9);
        }
        for (size_t i = 0; i < sizeof pu / sizeof pu[0]; i++) {
            double P = 0.0, back = 0.0;
            snprintf(text, sizeof text, "%.17g%s", vals[k], pu[i]);
            ck_assert_int_eq(kphi_units_pressure(text, &P, NULL, NULL), KPHI_OK);
            ck_assert_int_eq(kphi_units_pressure_to(P, pu[i], &back), KPHI_OK);
            ck_assert_double_eq_tol(back, vals[k], 1e-9 * vals[k]);
        }
    }
}
END_TEST

static Suite *units_suite(void)
{
    Suite *s = suite_create("units");
    TCase *tc = tcase_create("units");
    tcase_add_test(tc, celsius_spellings);
    tcase_add_test(tc, kelvin_fahrenheit_rankine);
    tcase_add_test(tc, pressure_units);
    tcase_add_test(tc, steps);
    tcase_add_test(tc, temperature_errors);
    tcase_add_test(tc, pressure_errors);
    tcase_add_test(tc, step_errors);
    tcase_add_test(tc, error_without_origin);
    tcase_add_test(tc, unit_names);
    tcase_add_test(tc, convert_back);
    tcase_add_test(tc, round_trip);
    suite_add_tcase(s, tc);
    return s;
}

KPHI_TEST_MAIN(units_suite)
