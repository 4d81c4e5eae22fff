/* Validation of the phase module against published data.
 *
 * 1. Vapour pressures of NH3, CH3OH and H2O from PR and SRK with the default alpha of
 *    reactions/species.yaml (Mathias & Copeman 1983 form, c2 and c3 fitted by
 *    tools/fit_alpha.c), within 3 % of published correlations at every point checked
 *    between -30 and +60 C (issue 10). The deviations of the models' own alpha (Soave 1972;
 *    Peng & Robinson 1976/1978) are printed beside them, not asserted. Correlations:
 *    - H2O: Wagner & Pruss (1993), J. Phys. Chem. Ref. Data 22, 783 (the IAPWS saturation
 *      equation; coefficients seen as transcribed in mpimet/moist_thermodynamics,
 *      moist_thermodynamics/saturation_vapor_pressures.py, function liq_wagner_pruss). The
 *      fit's own target: a check of the fit, not of independent data.
 *      Independent: Bridgeman & Aldrich (1964), J. Heat Transfer 86, 279, as the NIST
 *      Chemistry WebBook's Antoine fits (log10 P/bar = A - B/(T/K + C): 273-303 K and
 *      304-333 K), seen as transcribed on www.watervaporpressure.com/antoine-equation
 *      (which copies the WebBook).
 *      Water is checked from 0.01 C (273.16 K, the triple point): below it the stable
 *      phase is ice, where neither equation applies.
 *    - NH3: Stull (1947), Ind. Eng. Chem. 39, 517, as the NIST Chemistry WebBook's Antoine
 *      fit for 239.6-371.5 K (4.86886, 1113.928, -10.409), seen on the WebBook's ammonia
 *      page (the fit's target). Independent: Reid, Prausnitz & Sherwood (1977), "The
 *      Properties of Gases and Liquids", 3rd ed., Appendix A, ln(P/mmHg) = 16.9481 -
 *      2132.50/(T/K - 32.98), 179-261 K, seen as transcribed in Himmelblau, "Basic
 *      Principles and Calculations in Chemical Engineering", Appendix H, Table H.1; it
 *      covers -30..-12 C only.
 *    - CH3OH: Reid, Prausnitz & Sherwood (1977), Appendix A, ln(P/mmHg) = 18.5875 -
 *      3626.55/(T/K - 34.29), 257-364 K, seen as transcribed in Himmelblau, Appendix H,
 *      Table H.1 (the fit's target). Independent: Ambrose & Sprake (1970), J. Chem.
 *      Thermodyn. 2, 631 (journal details from memory), as the NIST WebBook's Antoine fit
 *      log10(P/bar) = 5.20409 - 1581.341/(T/K - 33.50), 288.1-356.83 K, seen as
 *      transcribed in jrhmanning/Music_python, repository/Antoine.py. Methanol is checked
 *      from -15 C: no correlation below 257 K was seen.
 *    Tolerance: 3 % against the correlation the constants were fitted to (issue 10);
 *    against an independent one, 3 % plus the two correlations' own disagreement at that
 *    temperature, since each fit carries its own error (at most 0.9 %: NH3 at -30 C). The
 *    one point that needs it: SRK water at 0.01 C, +2.95 % from Wagner & Pruss and
 *    +3.02 % from the Bridgeman & Aldrich fit, which lies 0.07 % below the IAPWS equation
 *    there. The fitted SRK constants of water are at the edge of 3 % at 0 C.
 *
 * 2. NH3 left in compressed 3:1 H2/N2 over liquid ammonia. Larson & Black (1925), J. Am.
 *    Chem. Soc. 47, 1015, "The concentration of ammonia in a compressed mixture of
 *    hydrogen and nitrogen over liquid ammonia": only the introduction was seen (at
 *    datapdf.com), not the data table. It states that the uncondensed ammonia had been
 *    taken as its vapour pressure over pure liquid ammonia, X = 100 p_t/p (Harker), and
 *    that "the amount of uncondensed ammonia is much greater than that calculated by this
 *    expression". Checked here in that qualitative form: at -10, 0 and +10 C and 100, 200
 *    and 300 bar the separator vapour's y_NH3 from a flash exceeds p_sat(T)/P, with
 *    p_sat from the Stull (1947) correlation above. The values are printed.
 *
 * 3. Methanol-water at 1 atm. No citable T-x-y table was seen, so the bubble and dew
 *    temperatures of x = 0.1 ... 0.9 are printed with the shipped k_ij (none: 0), not
 *    checked against data. With k_ij = 0 both cubics split methanol-water into two liquids
 *    near x = 0.06-0.45 below about 340 K; a bubble point whose liquid is itself unstable
 *    is marked. Asserted: the pure-component limits, the bubble temperature of x = 1 -
 *    1e-9 (x = 1e-9) within 1 K of the normal boiling point of methanol (water) from the
 *    correlations of section 1.
 * Units: T in K, P in Pa inside; C and bar in the printouts. */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "kphi/kphi.h"
#include "testutil.h"

#define MAXN 8

/* ------------------------------------------------------------- correlations --- */

/* Wagner & Pruss (1993): ln(p/pc) = (Tc/T)(a1 t + a2 t^1.5 + a3 t^3 + a4 t^3.5 + a5 t^4 +
 * a6 t^7.5), t = 1 - T/Tc; Tc = 647.096 K, pc = 22.064 MPa. Pa. */
static double psat_water_wp(double T)
{
    static const double a[6] = {-7.85951783, 1.84408259, -11.7866497,
                                22.6807411,  -15.9618719, 1.80122502};
    const double Tc = 647.096, pc = 22.064e6, t = 1.0 - T / Tc;
    double s = a[0] * t + a[1] * pow(t, 1.5) + a[2] * t * t * t + a[3] * pow(t, 3.5) +
               a[4] * pow(t, 4.0) + a[5] * pow(t, 7.5);
    return pc * exp(Tc / T * s);
}

/* Bridgeman & Aldrich (1964) as the NIST WebBook's Antoine fits. Pa. */
static double psat_water_ba(double T)
{
    if (T <= 303.0)
        return 1e5 * pow(10.0, 5.40221 - 1838.675 / (T - 31.737)); /* 273-303 K */
    return 1e5 * pow(10.0, 5.20389 - 1733.926 / (T - 39.485));     /* 304-333 K */
}

/* Stull (1947) as the NIST WebBook's Antoine fit, 239.6-371.5 K. Pa. */
static double psat_nh3_stull(double T)
{
    return 1e5 * pow(10.0, 4.86886 - 1113.928 / (T - 10.409));
}

/* Reid, Prausnitz & Sherwood (1977), App. A, 179-261 K. Pa (1 mmHg = 133.322368 Pa). */
static double psat_nh3_rps(double T)
{
    return 133.322368 * exp(16.9481 - 2132.50 / (T - 32.98));
}

/* Reid, Prausnitz & Sherwood (1977), App. A, 257-364 K. Pa. */
static double psat_meoh_rps(double T)
{
    return 133.322368 * exp(18.5875 - 3626.55 / (T - 34.29));
}

/* Ambrose & Sprake (1970) as the NIST WebBook's Antoine fit, 288.1-356.83 K. Pa. */
static double psat_meoh_as(double T)
{
    return 1e5 * pow(10.0, 5.20409 - 1581.341 / (T - 33.50));
}

/* ---------------------------------------------------------------- helpers --- */

static kphi_species_db *load_db(void)
{
    kphi_error err;
    kphi_error_clear(&err);
    kphi_species_db *db = kphi_species_db_load_file(KPHI_SPECIES_FILE, &err);
    ck_assert_msg(db != NULL, "%s", err.msg);
    return db;
}

/* One species alone, with its default alpha (standard = 0) or the model's own. */
static kphi_eos *pure_eos(const kphi_species_db *db, const char *name, kphi_eos_model model,
                          int standard)
{
    kphi_eos *eos = kphi_eos_alloc(model, 1);
    ck_assert_ptr_nonnull(eos);
    kphi_eos_set_standard_alpha(eos, standard);
    const kphi_species *sp = kphi_species_db_find(db, name);
    ck_assert_ptr_nonnull(sp);
    ck_assert_int_eq(kphi_eos_set_species(eos, 0, sp, NULL), KPHI_OK);
    return eos;
}

static double vapour_pressure(const kphi_eos *eos, double T, kphi_phase_work *w)
{
    double P = NAN;
    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_msg(kphi_phase_vapour_pressure(eos, 0, T, NULL, w, &P, &err) == KPHI_OK,
                  "%s at %g K: %s", kphi_eos_model_name(kphi_eos_get_model(eos)), T, err.msg);
    return P;
}

/* ---------------------------------------------------- 1. vapour pressures --- */

typedef struct {
    const char *species;
    const char *source; /* short name for the printout; full citation above */
    int independent;    /* 0: the correlation the alpha constants were fitted to */
    double (*psat)(double);
    double (*fitted)(double); /* for an independent one: the fit's correlation */
    size_t n;
    double T[7]; /* K */
} psat_check;

static const psat_check CHECKS[] = {
    {"NH3", "Stull 1947 (NIST)", 0, psat_nh3_stull, NULL, 7,
     {243.15, 258.15, 273.15, 288.15, 303.15, 318.15, 333.15}},
    {"NH3", "RPS 1977 App. A", 1, psat_nh3_rps, psat_nh3_stull, 4,
     {243.15, 248.15, 253.15, 258.15}},
    {"CH3OH", "RPS 1977 App. A", 0, psat_meoh_rps, NULL, 6,
     {258.15, 273.15, 288.15, 303.15, 318.15, 333.15}},
    {"CH3OH", "Ambrose & Sprake 1970 (NIST)", 1, psat_meoh_as, psat_meoh_rps, 4,
     {288.15, 303.15, 318.15, 333.15}},
    {"H2O", "Wagner & Pruss 1993", 0, psat_water_wp, NULL, 5,
     {273.16, 288.15, 303.15, 318.15, 333.15}},
    {"H2O", "Bridgeman & Aldrich 1964 (NIST)", 1, psat_water_ba, psat_water_wp, 6,
     {273.16, 288.15, 298.15, 313.15, 323.15, 333.0}},
};

START_TEST(vapour_pressures)
{
    kphi_species_db *db = load_db();
    kphi_phase_work *w = kphi_phase_work_alloc(1, 0);
    const kphi_eos_model models[2] = {KPHI_EOS_PR, KPHI_EOS_SRK};
    double worst = 0.0;
    int over3 = 0;
    printf("\nVapour pressure: kphi against published correlations (deviation 100 (P/P_ref - "
           "1), %%;\n'fitted' = the Mathias-Copeman alpha of species.yaml, asserted within "
           "3 %%; 'own' = the model's own alpha, printed only)\n");
    printf("%-6s %-31s %-5s %8s %11s | %7s %7s | %7s %7s\n", "", "reference", "", "T/C",
           "P_ref/bar", "PR fit", "PR own", "SRK fit", "SRK own");
    for (size_t c = 0; c < sizeof CHECKS / sizeof CHECKS[0]; c++) {
        const psat_check *k = &CHECKS[c];
        kphi_eos *eos[2][2];
        for (int m = 0; m < 2; m++)
            for (int s = 0; s < 2; s++)
                eos[m][s] = pure_eos(db, k->species, models[m], s);
        for (size_t j = 0; j < k->n; j++) {
            double T = k->T[j], Pref = k->psat(T), dev[2][2];
            for (int m = 0; m < 2; m++)
                for (int s = 0; s < 2; s++)
                    dev[m][s] = 100.0 * (vapour_pressure(eos[m][s], T, w) / Pref - 1.0);
            printf("%-6s %-31s %-5s %8.2f %11.5g | %+7.2f %+7.2f | %+7.2f %+7.2f\n",
                   k->species, k->source, k->independent ? "indep" : "fit", T - 273.15,
                   Pref / 1e5, dev[0][0], dev[0][1], dev[1][0], dev[1][1]);
            /* 3 %, plus for an independent correlation its own disagreement with the
             * fitted one at T (see the file comment) */
            double spread = k->fitted != NULL ? 100.0 * fabs(Pref / k->fitted(T) - 1.0) : 0.0;
            for (int m = 0; m < 2; m++) {
                worst = fmax(worst, fabs(dev[m][0]));
                ck_assert_msg(fabs(dev[m][0]) < 3.0 + spread,
                              "%s %s at %g K: %+.2f %% from %s (allowed %.2f %%)",
                              kphi_eos_model_name(models[m]), k->species, T, dev[m][0],
                              k->source, 3.0 + spread);
                over3 += fabs(dev[m][0]) >= 3.0;
            }
        }
        for (int m = 0; m < 2; m++)
            for (int s = 0; s < 2; s++)
                kphi_eos_free(eos[m][s]);
    }
    printf("largest deviation with the fitted alpha: %.2f %% (%d point(s) at 3 %% or more, "
           "all against an independent correlation)\n",
           worst, over3);
    fflush(stdout);
    kphi_phase_work_free(w);
    kphi_species_db_free(db);
}
END_TEST

/* ------------------------------------- 2. NH3 over liquid ammonia (Larson & Black) --- */

START_TEST(ammonia_over_liquid_ammonia)
{
    kphi_error err;
    kphi_error_clear(&err);
    kphi_case *c = kphi_case_load_file("cases/ammonia_converter.yaml", &err);
    ck_assert_msg(c != NULL, "%s", err.msg);
    const kphi_rxnset *set = kphi_case_rxnset(c);
    size_t n = kphi_rxnset_n_species(set);
    long h2 = kphi_rxnset_species_index(set, "H2"), n2 = kphi_rxnset_species_index(set, "N2"),
         nh3 = kphi_rxnset_species_index(set, "NH3");
    ck_assert(h2 >= 0 && n2 >= 0 && nh3 >= 0 && n <= MAXN);
    /* 3:1 H2/N2 with enough ammonia that a liquid forms at every point */
    double z[MAXN] = {0};
    z[h2] = 0.75 * 0.6;
    z[n2] = 0.25 * 0.6;
    z[nh3] = 0.4;
    const kphi_eos_model models[2] = {KPHI_EOS_PR, KPHI_EOS_SRK};
    const double Ts[3] = {263.15, 273.15, 283.15}, Ps[3] = {100e5, 200e5, 300e5};
    kphi_phase_work *w = kphi_phase_work_alloc(n, 0);
    kphi_flash_result *r = kphi_flash_result_alloc(n);
    printf("\nNH3 in the vapour over liquid ammonia, 3:1 H2/N2 (Larson & Black 1925: 'much "
           "greater' than p_sat/P; p_sat from Stull 1947)\n");
    printf("%6s %7s | %9s | %9s %6s | %9s %6s\n", "T/C", "P/bar", "p_sat/P", "y PR", "ratio",
           "y SRK", "ratio");
    for (int i = 0; i < 3; i++) {
        for (int j = 0; j < 3; j++) {
            double T = Ts[i], P = Ps[j], harker = psat_nh3_stull(T) / P, y[2];
            for (int m = 0; m < 2; m++) {
                kphi_eos *eos = kphi_case_make_eos(c, models[m], &err);
                ck_assert_ptr_nonnull(eos);
                kphi_error_clear(&err);
                ck_assert_msg(kphi_phase_flash(eos, T, P, z, NULL, w, r, &err) == KPHI_OK,
                              "%s", err.msg);
                ck_assert_int_eq(r->n_phases, 2);
                ck_assert_int_eq(r->phase[0].kind, KPHI_PHASE_VAPOUR);
                ck_assert_double_gt(r->phase[1].y[nh3], 0.9); /* over liquid ammonia */
                y[m] = r->phase[0].y[nh3];
                ck_assert_msg(y[m] > harker, "%s at %g K, %g bar: y_NH3 %g, p_sat/P %g",
                              kphi_eos_model_name(models[m]), T, P / 1e5, y[m], harker);
                kphi_eos_free(eos);
            }
            printf("%6.1f %7.0f | %9.5f | %9.5f %6.3f | %9.5f %6.3f\n", T - 273.15, P / 1e5,
                   harker, y[0], y[0] / harker, y[1], y[1] / harker);
        }
    }
    fflush(stdout);
    kphi_flash_result_free(r);
    kphi_phase_work_free(w);
    kphi_case_free(c);
}
END_TEST

/* ------------------------------------------------- 3. methanol-water at 1 atm --- */

/* Temperature (K) where p(T) = P, by bisection on [lo, hi]. */
static double boiling_point(double (*p)(double), double P, double lo, double hi)
{
    for (int it = 0; it < 100; it++) {
        double T = 0.5 * (lo + hi);
        if (p(T) > P)
            hi = T;
        else
            lo = T;
    }
    return 0.5 * (lo + hi);
}

START_TEST(methanol_water_at_1_atm)
{
    kphi_error err;
    kphi_error_clear(&err);
    kphi_case *c = kphi_case_load_file("cases/methanol_converter.yaml", &err);
    ck_assert_msg(c != NULL, "%s", err.msg);
    const kphi_rxnset *set = kphi_case_rxnset(c);
    size_t n = kphi_rxnset_n_species(set);
    long me = kphi_rxnset_species_index(set, "CH3OH"), wa = kphi_rxnset_species_index(set, "H2O");
    ck_assert(me >= 0 && wa >= 0 && n <= MAXN);
    const double P = 101325.0; /* 1 atm */
    /* normal boiling points from the correlations of section 1 */
    double Tb_me = boiling_point(psat_meoh_rps, P, 300.0, 360.0);
    double Tb_me2 = boiling_point(psat_meoh_as, P, 300.0, 356.0);
    double Tb_wa = boiling_point(psat_water_wp, P, 350.0, 400.0);
    printf("\nMethanol-water at 1 atm, k_ij = 0 (no published table seen: printed, not "
           "checked)\nnormal boiling points: methanol %.2f K (RPS 1977), %.2f K (Ambrose & "
           "Sprake 1970); water %.2f K (Wagner & Pruss 1993)\n",
           Tb_me, Tb_me2, Tb_wa);
    const kphi_eos_model models[2] = {KPHI_EOS_PR, KPHI_EOS_SRK};
    kphi_phase_work *w = kphi_phase_work_alloc(n, 0);
    kphi_flash_result *r = kphi_flash_result_alloc(n);
    for (int m = 0; m < 2; m++) {
        kphi_eos *eos = kphi_case_make_eos(c, models[m], &err);
        ck_assert_ptr_nonnull(eos);
        printf("%s: %5s %10s %10s %8s\n", kphi_eos_model_name(models[m]), "x", "T_bub/C",
               "T_dew/C", "y_bub");
        for (int k = 0; k <= 10; k++) {
            double x = k == 0 ? 1e-9 : k == 10 ? 1.0 - 1e-9 : 0.1 * k;
            double z[MAXN] = {0}, Tb = NAN, Td = NAN;
            z[me] = x;
            z[wa] = 1.0 - x;
            int fb = 0, fd = 0;
            kphi_error_clear(&err);
            ck_assert_msg(kphi_phase_bubble_point(eos, P, z, NAN, 250.0, 450.0, NULL, w, &fb,
                                                  &Tb, &err) == KPHI_OK,
                          "%s", err.msg);
            ck_assert_msg(kphi_phase_dew_point(eos, P, z, NAN, 250.0, 450.0, NULL, w, &fd, &Td,
                                               &err) == KPHI_OK,
                          "%s", err.msg);
            ck_assert_int_eq(fb, 1);
            ck_assert_int_eq(fd, 1);
            /* the liquid at its bubble point: stable, or itself split in two liquids */
            int stable = 1;
            ck_assert_int_eq(kphi_phase_stability(eos, Tb - 1e-3, P, z, NULL, w, &stable, NULL,
                                                  NULL, &err),
                             KPHI_OK);
            double yb = NAN;
            if (stable && kphi_phase_flash(eos, Tb + 1e-4, P, z, NULL, w, r, &err) == KPHI_OK &&
                r->n_phases == 2 && r->phase[0].kind == KPHI_PHASE_VAPOUR)
                yb = r->phase[0].y[me];
            char ys[16] = "-";
            if (isfinite(yb))
                snprintf(ys, sizeof ys, "%.3f", yb);
            printf("%s  %9.3g %10.2f %10.2f %8s%s\n", kphi_eos_model_name(models[m]), x,
                   Tb - 273.15, Td - 273.15, ys,
                   stable ? "" : "  (the liquid splits in two there: a metastable bubble point)");
            if (k == 10) /* pure methanol: its normal boiling point */
                ck_assert_msg(fabs(Tb - Tb_me) < 1.0, "%s: %g K, RPS 1977: %g K",
                              kphi_eos_model_name(models[m]), Tb, Tb_me);
            if (k == 0) /* pure water */
                ck_assert_msg(fabs(Tb - Tb_wa) < 1.0, "%s: %g K, Wagner & Pruss: %g K",
                              kphi_eos_model_name(models[m]), Tb, Tb_wa);
            if (k == 0 || k == 10)
                ck_assert_double_le(fabs(Td - Tb), 1e-3);
        }
        kphi_eos_free(eos);
    }
    fflush(stdout);
    kphi_flash_result_free(r);
    kphi_phase_work_free(w);
    kphi_case_free(c);
}
END_TEST

static Suite *validation_phase_suite(void)
{
    Suite *s = suite_create("validation_phase");
    TCase *tc = tcase_create("published");
    tcase_set_timeout(tc, 60);
    tcase_add_test(tc, vapour_pressures);
    tcase_add_test(tc, ammonia_over_liquid_ammonia);
    tcase_add_test(tc, methanol_water_at_1_atm);
    suite_add_tcase(s, tc);
    return s;
}

KPHI_TEST_MAIN(validation_phase_suite)
