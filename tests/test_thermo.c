/* Tests of the thermo module on the shipped data: continuity of Cp, H, S at T_mid,
 * H(298.15 K) equal to the enthalpy of formation stated by the source of each
 * polynomial, G = H - T S, g/RT, and the data-range check. */
#include "kphi/thermo.h"

#include <check.h>
#include <math.h>
#include <string.h>

#include "testutil.h"

static kphi_species_db *load_data(void)
{
    kphi_error err;
    kphi_error_clear(&err);
    kphi_species_db *db = kphi_species_db_load_file(KPHI_SPECIES_FILE, &err);
    if (db == NULL) {
        char buf[600];
        kphi_error_format(&err, buf, sizeof buf);
        ck_abort_msg("%s", buf);
    }
    return db;
}

static double rel(double a, double b)
{
    double scale = fmax(fabs(a), fabs(b));
    return scale > 0.0 ? fabs(a - b) / scale : 0.0;
}

START_TEST(continuous_at_t_mid)
{
    /* The low range holds at T_mid, the high range just above it: both polynomials
     * must give the same Cp, H and S there (tolerance 1e-6 relative, common practice
     * for published NASA fits, which are constrained to join at T_mid). */
    kphi_species_db *db = load_data();
    for (size_t i = 0; i < kphi_species_db_count(db); i++) {
        const kphi_species *sp = kphi_species_db_get(db, i);
        double Tm = sp->T_mid, Tp = nextafter(sp->T_mid, INFINITY);
        ck_assert_msg(rel(kphi_thermo_cp(sp, Tm), kphi_thermo_cp(sp, Tp)) < 1e-6, "Cp of %s",
                      sp->name);
        /* H of an element passes through 0 at 298.15 K, not at T_mid; compare with RT */
        double dh = fabs(kphi_thermo_h(sp, Tm) - kphi_thermo_h(sp, Tp));
        double hscale = fmax(fabs(kphi_thermo_h(sp, Tm)), KPHI_R * Tm);
        ck_assert_msg(dh / hscale < 1e-6, "H of %s", sp->name);
        ck_assert_msg(rel(kphi_thermo_s(sp, Tm), kphi_thermo_s(sp, Tp)) < 1e-6, "S of %s",
                      sp->name);
    }
    kphi_species_db_free(db);
}
END_TEST

START_TEST(h_at_298_is_enthalpy_of_formation)
{
    /* dfH(298.15 K) in J/mol as stated in the header of the table entry each polynomial
     * was taken from (seen): Burcat & Ruscic 2005 entries, NH3 from the Gurvich 1989
     * anharmonic fit of McBride et al. 1993 (HF298/R = -5525.28 K). Elements in their
     * reference state: 0. Tolerance 5 J/mol (the fits reproduce their own HF298). */
    static const struct {
        const char *name;
        double dfH;
    } cases[] = {
        {"N2", 0.0},          {"H2", 0.0},           {"O2", 0.0},          {"Ar", 0.0},
        {"He", 0.0},          {"C(gr)", 0.0},        {"NH3", -45567.0} /* the chosen dfH, see species.yaml */,    {"H2O", -241826.0},
        {"CO", -110530.0},    {"CO2", -393510.0},    {"CH4", -74600.0},    {"CH3OH", -200940.0},
    };
    kphi_species_db *db = load_data();
    for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
        const kphi_species *sp = kphi_species_db_find(db, cases[i].name);
        ck_assert_ptr_nonnull(sp);
        double h = kphi_thermo_h(sp, KPHI_T_REF);
        ck_assert_msg(fabs(h - cases[i].dfH) < 5.0, "%s: H(298.15) = %.1f J/mol, want %.1f",
                      sp->name, h, cases[i].dfH);
    }
    kphi_species_db_free(db);
}
END_TEST

START_TEST(g_is_h_minus_ts)
{
    static const double T[] = {250.0, 673.15, 1000.0, 1234.5, 4321.0};
    kphi_species_db *db = load_data();
    for (size_t i = 0; i < kphi_species_db_count(db); i++) {
        const kphi_species *sp = kphi_species_db_get(db, i);
        for (size_t k = 0; k < sizeof T / sizeof T[0]; k++) {
            double g = kphi_thermo_g(sp, T[k]);
            double h = kphi_thermo_h(sp, T[k]), s = kphi_thermo_s(sp, T[k]);
            /* exact identities up to rounding: tolerance 1e-9 of |H| + T|S| */
            double tol = 1e-9 * (fabs(h) + T[k] * fabs(s));
            ck_assert_double_eq_tol(g, h - T[k] * s, tol);
            ck_assert_double_eq_tol(kphi_thermo_g_rt(sp, T[k]) * KPHI_R * T[k], g, tol);
        }
    }
    kphi_species_db_free(db);
}
END_TEST

START_TEST(cp_is_dh_dt_and_t_ds_dt)
{
    /* Cp = dH/dT = T dS/dT, checked by central differences (step 0.01 K, tolerance
     * 1e-6 relative) inside each range, away from T_mid. */
    static const double T[] = {345.6, 789.0, 1543.2, 3456.7};
    const double d = 0.01;
    kphi_species_db *db = load_data();
    for (size_t i = 0; i < kphi_species_db_count(db); i++) {
        const kphi_species *sp = kphi_species_db_get(db, i);
        for (size_t k = 0; k < sizeof T / sizeof T[0]; k++) {
            double cp = kphi_thermo_cp(sp, T[k]);
            double dh = (kphi_thermo_h(sp, T[k] + d) - kphi_thermo_h(sp, T[k] - d)) / (2 * d);
            double ds = (kphi_thermo_s(sp, T[k] + d) - kphi_thermo_s(sp, T[k] - d)) / (2 * d);
            ck_assert_msg(rel(cp, dh) < 1e-6, "%s at %g K: Cp %g, dH/dT %g", sp->name, T[k], cp,
                          dh);
            ck_assert_msg(rel(cp, T[k] * ds) < 1e-6, "%s at %g K: Cp %g, T dS/dT %g", sp->name,
                          T[k], cp, T[k] * ds);
        }
    }
    kphi_species_db_free(db);
}
END_TEST

START_TEST(monatomic_gas_has_cp_five_halves_r)
{
    /* Ar and He: Cp = 5/2 R exactly at every T (ideal monatomic gas, translational
     * degrees of freedom only; electronic excitation negligible below 6000 K as the
     * source's coefficients a2..a5 = 0 state). */
    kphi_species_db *db = load_data();
    const kphi_species *ar = kphi_species_db_find(db, "Ar");
    ck_assert_double_eq_tol(kphi_thermo_cp(ar, 673.15), 2.5 * KPHI_R, 1e-12);
    ck_assert_double_eq_tol(kphi_thermo_cp(kphi_species_db_find(db, "He"), 2345.6), 2.5 * KPHI_R,
                            1e-12);
    kphi_species_db_free(db);
}
END_TEST

START_TEST(range_check)
{
    kphi_species_db *db = load_data();
    const kphi_species *ch4 = kphi_species_db_find(db, "CH4");
    kphi_mark at = {7, 4};
    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_thermo_check_range(ch4, 673.15, "case.yaml", at, &err), KPHI_OK);
    ck_assert_int_eq(err.code, KPHI_OK);
    ck_assert_int_eq(kphi_thermo_check_range(ch4, 200.0, "case.yaml", at, &err), KPHI_OK);
    ck_assert_int_eq(kphi_thermo_check_range(ch4, 6000.0, "case.yaml", at, &err), KPHI_OK);
    ck_assert_int_eq(kphi_thermo_check_range(ch4, 6500.0, "case.yaml", at, &err), KPHI_EINPUT);
    ck_assert_str_eq(err.msg, "T = 6500 K is outside the data range of CH4 (200-6000 K)");
    ck_assert_str_eq(err.path, "case.yaml");
    ck_assert_int_eq(err.line, 7);
    ck_assert_int_eq(err.column, 4);
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_thermo_check_range(ch4, 199.5, NULL, at, &err), KPHI_EINPUT);
    ck_assert_str_eq(err.msg, "T = 199.5 K is outside the data range of CH4 (200-6000 K)");
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_thermo_check_range(ch4, NAN, NULL, at, &err), KPHI_EINPUT);
    ck_assert_int_eq(kphi_thermo_check_range(ch4, 6500.0, NULL, at, NULL), KPHI_EINPUT);
    ck_assert_int_eq(kphi_thermo_in_range(ch4, 1000.0), 1);
    ck_assert_int_eq(kphi_thermo_in_range(ch4, 6000.5), 0);
    kphi_species_db_free(db);
}
END_TEST

static Suite *thermo_suite(void)
{
    Suite *s = suite_create("thermo");
    TCase *tc = tcase_create("core");
    tcase_add_test(tc, continuous_at_t_mid);
    tcase_add_test(tc, h_at_298_is_enthalpy_of_formation);
    tcase_add_test(tc, g_is_h_minus_ts);
    tcase_add_test(tc, cp_is_dh_dt_and_t_ds_dt);
    tcase_add_test(tc, monatomic_gas_has_cp_five_halves_r);
    tcase_add_test(tc, range_check);
    suite_add_tcase(s, tc);
    return s;
}

KPHI_TEST_MAIN(thermo_suite)
