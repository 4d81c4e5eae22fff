/* Unit tests of the eos module: invariants every model must keep on the same mixtures.
 *
 * The mixture is an ammonia-loop gas, H2/N2/NH3/CH4/Ar at 723.15 K and 23.7 MPa. Critical
 * constants are from Poling, Prausnitz & O'Connell (2001), "The Properties of Gases and
 * Liquids", 5th ed., Appendix A: the values carried in reactions/species.yaml, where Tc,
 * Pc and omega were seen as reproduced from that appendix and most Vc and Zc are from
 * memory (see the notes there; H2O and CH3OH partly from memory). The quantum-gas
 * constants of H2 are from Prausnitz, Lichtenthaler & de Azevedo (1999), 3rd ed., ch. 5
 * (Tc0 = 43.6 K,
 * Pc0 = 20.5 bar, c1 = 21.8 K, c2 = 44.2 K; from memory, agreeing with secondary uses
 * of the same constants). The k_ij used here are test values, not published parameters. */
#include "kphi/eos.h"

#include <check.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "testutil.h"

#define NS 5
enum { H2 = 0, N2, NH3, CH4, AR };

static const double T0 = 723.15; /* K */
static const double P0 = 23.7e6; /* Pa */
static const double Y0[NS] = {0.5931, 0.1977, 0.1214, 0.0527, 0.0351};

/* A species record filled by hand: M in kg/mol, Tc in K, Pc in bar, Vc in cm3/mol. */
static kphi_species make_species(const char *name, double M, double Tc, double Pc_bar,
                                 double Vc_cm3, double Zc, double omega, long line)
{
    kphi_species sp;
    memset(&sp, 0, sizeof sp);
    snprintf(sp.name, sizeof sp.name, "%s", name);
    sp.molar_mass = M;
    sp.has_critical = 1;
    sp.Tc = Tc;
    sp.Pc = Pc_bar * 1e5;
    sp.Vc = Vc_cm3 * 1e-6;
    sp.Zc = Zc;
    sp.omega = omega;
    sp.src_thermo = sp.src_critical = sp.src_quantum = sp.note = "";
    sp.path = "test_species.yaml";
    sp.mark.line = line;
    sp.mark.column = 3;
    return sp;
}

/* Beattie-Bridgeman constants in Beattie & Bridgeman's units (A0 atm L2/mol2; a, B0, b
 * L/mol; c L K3/mol), converted to SI as the species loader does. */
static kphi_species with_bb(kphi_species s, double A0, double a, double B0, double b, double c)
{
    s.has_bb = 1;
    s.bb_A0 = A0 * 0.101325;
    s.bb_a = a * 1e-3;
    s.bb_B0 = B0 * 1e-3;
    s.bb_b = b * 1e-3;
    s.bb_c = c * 1e-3;
    s.src_bb = "";
    return s;
}

/* Poling, Prausnitz & O'Connell 2001, App. A (as in reactions/species.yaml): Tc K, Pc bar,
 * Vc cm3/mol, Zc, omega. Beattie-Bridgeman constants as in reactions/species.yaml: H2, N2,
 * Ar seen in a textbook table reproducing Beattie & Bridgeman (1928) (in kPa-m3 units,
 * A0 / 101.325 here), NH3 (Beattie & Lawrence 1930) and CH4 (Beattie & Bridgeman 1928)
 * from memory. */
static kphi_species sp_h2(void)
{
    kphi_species s = make_species("H2", 2.01588e-3, 33.19, 13.13, 64.147, 0.305, -0.216, 10);
    s = with_bb(s, 20.0117 / 101.325, -0.00506, 0.02096, -0.04359, 504.0);
    s.has_quantum = 1;
    s.q_Tc0 = 43.6;    /* K, Prausnitz et al. 1999 (from memory) */
    s.q_Pc0 = 20.5e5;  /* Pa */
    s.q_c1 = 21.8;     /* K */
    s.q_c2 = 44.2;     /* K */
    return s;
}
static kphi_species sp_n2(void)
{
    return with_bb(make_species("N2", 28.0134e-3, 126.20, 33.98, 89.20, 0.289, 0.037, 20),
                   136.2315 / 101.325, 0.02617, 0.05046, -0.00691, 4.20e4);
}
static kphi_species sp_nh3(void)
{
    return with_bb(make_species("NH3", 17.0305e-3, 405.40, 113.53, 72.47, 0.244, 0.256, 30),
                   2.3930, 0.17031, 0.03415, 0.19112, 476.87e4);
}
static kphi_species sp_ch4(void)
{
    return with_bb(make_species("CH4", 16.0425e-3, 190.56, 45.99, 98.60, 0.286, 0.011, 40),
                   2.2769, 0.01855, 0.05587, -0.01587, 12.83e4);
}
static kphi_species sp_ar(void)
{
    return with_bb(make_species("Ar", 39.948e-3, 150.86, 48.98, 74.57, 0.291, -0.002, 50),
                   130.7802 / 101.325, 0.02328, 0.03931, 0.0, 5.99e4);
}
static kphi_species sp_h2o(void)
{
    return make_species("H2O", 18.0153e-3, 647.14, 220.64, 55.95, 0.229, 0.344, 60);
}
static kphi_species sp_meoh(void)
{
    return make_species("CH3OH", 32.042e-3, 512.64, 80.97, 118.0, 0.224, 0.565, 70);
}

/* The ammonia-loop mixture for a model, with two test k_ij. */
static kphi_eos *loop_eos(kphi_eos_model model, int quantum)
{
    kphi_eos *eos = kphi_eos_alloc(model, NS);
    ck_assert_ptr_nonnull(eos);
    kphi_species sp[NS] = {sp_h2(), sp_n2(), sp_nh3(), sp_ch4(), sp_ar()};
    for (size_t i = 0; i < NS; i++) {
        kphi_error err;
        kphi_error_clear(&err);
        ck_assert_int_eq(kphi_eos_set_species(eos, i, &sp[i], &err), KPHI_OK);
    }
    kphi_eos_set_kij(eos, N2, NH3, 0.0613);  /* test value */
    kphi_eos_set_kij(eos, H2, CH4, -0.0271); /* test value */
    kphi_eos_set_quantum(eos, quantum);
    return eos;
}

/* Loop index -> model and quantum switch: every model, quantum off and on. */
static kphi_eos_model model_of(int k)
{
    return (kphi_eos_model)(k % KPHI_EOS_N_MODELS);
}
static int quantum_of(int k)
{
    return k >= KPHI_EOS_N_MODELS;
}

static void eval_ok(const kphi_eos *eos, double T, double P, const double y[], double lnphi[],
                    double dlnphi[], kphi_eos_state *st, kphi_eos_work *w)
{
    kphi_error err;
    kphi_error_clear(&err);
    int rc = kphi_eos_eval(eos, T, P, y, lnphi, dlnphi, st, w, &err);
    ck_assert_msg(rc == KPHI_OK, "%s at T=%g P=%g: %s",
                  kphi_eos_model_name(kphi_eos_get_model(eos)), T, P, err.msg);
}

/* 1 for the cubics: the models with liquid-like roots. */
static int cubic(kphi_eos_model m)
{
    return m == KPHI_EOS_RK || m == KPHI_EOS_SRK || m == KPHI_EOS_PR;
}

/* ------------------------------------------------------------------ invariants --- */

START_TEST(phi_to_one_at_low_pressure)
{
    kphi_eos *eos = loop_eos(model_of(_i), quantum_of(_i));
    kphi_eos_work *w = kphi_eos_work_alloc(NS);
    double lnphi[NS];
    kphi_eos_state st;
    eval_ok(eos, T0, 1.0, Y0, lnphi, NULL, &st, w); /* 1 Pa */
    for (size_t i = 0; i < NS; i++)
        ck_assert_double_le(fabs(lnphi[i]), 1e-6);
    ck_assert_double_le(fabs(st.Z - 1.0), 1e-6);
    ck_assert_double_le(fabs(st.h_dep), 1e-3); /* J/mol */
    kphi_eos_work_free(w);
    kphi_eos_free(eos);
}
END_TEST

START_TEST(gibbs_duhem_and_symmetry)
{
    kphi_eos *eos = loop_eos(model_of(_i), quantum_of(_i));
    kphi_eos_work *w = kphi_eos_work_alloc(NS);
    double lnphi[NS], d[NS * NS];
    eval_ok(eos, T0, P0, Y0, lnphi, d, NULL, w);
    for (size_t l = 0; l < NS; l++) {
        double s = 0.0;
        for (size_t i = 0; i < NS; i++)
            s += Y0[i] * d[i * NS + l];
        ck_assert_double_le(fabs(s), 1e-10); /* sum_i y_i n dln phi_i/dn_l = 0 */
    }
    for (size_t i = 0; i < NS; i++)
        for (size_t l = 0; l < NS; l++)
            ck_assert_double_le(fabs(d[i * NS + l] - d[l * NS + i]), 1e-13);
    kphi_eos_work_free(w);
    kphi_eos_free(eos);
}
END_TEST

/* n_t d ln phi_i/d n_l against a central difference in n_l (n_t = 1 at the base point). */
START_TEST(derivatives_match_finite_difference)
{
    kphi_eos_model model = model_of(_i);
    kphi_eos *eos = loop_eos(model, quantum_of(_i));
    kphi_eos_work *w = kphi_eos_work_alloc(NS);
    double lnphi[NS], d[NS * NS], lp[NS], lm[NS], yp[NS], ym[NS];
    const double h = 1e-5;
    /* two states: the loop gas at 23.7 MPa, and a leaner one at 8.3 MPa */
    const double Ps[2] = {P0, 8.3e6};
    const double Ys[2][NS] = {{0.5931, 0.1977, 0.1214, 0.0527, 0.0351},
                              {0.2113, 0.0722, 0.4631, 0.1876, 0.0658}};
    for (int k = 0; k < 2; k++) {
        eval_ok(eos, T0, Ps[k], Ys[k], lnphi, d, NULL, w);
        for (size_t l = 0; l < NS; l++) {
            double np = 1.0 + h, nm = 1.0 - h;
            for (size_t i = 0; i < NS; i++) {
                yp[i] = (Ys[k][i] + (i == l ? h : 0.0)) / np;
                ym[i] = (Ys[k][i] - (i == l ? h : 0.0)) / nm;
            }
            eval_ok(eos, T0, Ps[k], yp, lp, NULL, NULL, w);
            eval_ok(eos, T0, Ps[k], ym, lm, NULL, NULL, w);
            for (size_t i = 0; i < NS; i++) {
                double fd = (lp[i] - lm[i]) / (2.0 * h);
                ck_assert_msg(fabs(fd - d[i * NS + l]) < 1e-6,
                              "%s: d ln phi_%zu/d n_%zu = %.10g, finite difference %.10g",
                              kphi_eos_model_name(model), i, l, d[i * NS + l], fd);
            }
        }
    }
    if (model != KPHI_EOS_IDEAL) {
        double mx = 0.0;
        for (size_t k = 0; k < NS * NS; k++)
            mx = fmax(mx, fabs(d[k]));
        ck_assert_double_gt(mx, 1e-3); /* the check is not vacuous */
    }
    kphi_eos_work_free(w);
    kphi_eos_free(eos);
}
END_TEST

START_TEST(departures_are_consistent)
{
    kphi_eos_model model = model_of(_i);
    kphi_eos *eos = loop_eos(model, quantum_of(_i));
    kphi_eos_work *w = kphi_eos_work_alloc(NS);
    double lnphi[NS], l2[NS];
    kphi_eos_state st, sp, sm;
    const double R = 8.314462618;
    eval_ok(eos, T0, P0, Y0, lnphi, NULL, &st, w);
    double sum = 0.0;
    for (size_t i = 0; i < NS; i++)
        sum += Y0[i] * lnphi[i];
    /* g_dep/RT = sum y_i ln phi_i */
    ck_assert_double_le(fabs(st.g_dep / (R * T0) - sum), 1e-12);
    /* s_dep = (h_dep - g_dep)/T */
    ck_assert_double_le(fabs(st.s_dep - (st.h_dep - st.g_dep) / T0), 1e-9);
    /* h_dep = -R T^2 d(g_dep/RT)/dT at fixed P and y */
    const double dT = 0.01;
    eval_ok(eos, T0 + dT, P0, Y0, l2, NULL, &sp, w);
    eval_ok(eos, T0 - dT, P0, Y0, l2, NULL, &sm, w);
    double dg = (sp.g_dep / (R * (T0 + dT)) - sm.g_dep / (R * (T0 - dT))) / (2.0 * dT);
    double hfd = -R * T0 * T0 * dg;
    ck_assert_msg(fabs(st.h_dep - hfd) < 1e-6 * fabs(st.h_dep) + 1e-4,
                  "%s: h_dep %.8g J/mol, finite difference %.8g", kphi_eos_model_name(model),
                  st.h_dep, hfd);
    if (model == KPHI_EOS_IDEAL) {
        ck_assert_double_eq(st.Z, 1.0);
        ck_assert_double_eq(st.h_dep, 0.0);
    } else {
        ck_assert_double_gt(fabs(st.Z - 1.0), 0.01); /* not vacuous: a real-gas state */
        ck_assert_int_eq(st.n_roots >= 1, 1);
        ck_assert_int_eq(st.may_condense, 0);
    }
    kphi_eos_work_free(w);
    kphi_eos_free(eos);
}
END_TEST

/* A temperature-dependent k_ij, k(T) = k0 + k1 (T - T_ref) (invented values, for the
 * identity only): h_dep keeps equal to -R T^2 d(g_dep/RT)/dT, so the derivative of k_ij
 * reaches the departure enthalpy; k_ij at T is the linear form; a slope of zero gives
 * exactly the constant k_ij's answer. */
START_TEST(kij_temperature_dependence)
{
    kphi_eos_model model = _i == 0 ? KPHI_EOS_SRK : KPHI_EOS_PR;
    kphi_eos *eos = loop_eos(model, 0);
    kphi_eos_work *w = kphi_eos_work_alloc(NS);
    const double R = 8.314462618, T = 512.37;
    kphi_eos_set_kij_linear(eos, 0, 2, 0.071, 3.3e-4, 400.0); /* H2-NH3 */
    ck_assert_double_eq_tol(kphi_eos_get_kij_at(eos, 0, 2, T), 0.071 + 3.3e-4 * 112.37, 1e-15);
    ck_assert_double_eq_tol(kphi_eos_get_kij_at(eos, 2, 0, T), 0.071 + 3.3e-4 * 112.37, 1e-15);
    double lnphi[NS], l2[NS];
    kphi_eos_state st, sp, sm;
    eval_ok(eos, T, P0, Y0, lnphi, NULL, &st, w);
    const double dT = 0.01;
    eval_ok(eos, T + dT, P0, Y0, l2, NULL, &sp, w);
    eval_ok(eos, T - dT, P0, Y0, l2, NULL, &sm, w);
    double dg = (sp.g_dep / (R * (T + dT)) - sm.g_dep / (R * (T - dT))) / (2.0 * dT);
    double hfd = -R * T * T * dg;
    ck_assert_msg(fabs(st.h_dep - hfd) < 1e-6 * fabs(st.h_dep) + 1e-4, "h_dep %.8g, fd %.8g",
                  st.h_dep, hfd);
    /* the same state with the constant k_ij of the same value at T */
    kphi_eos *e2 = loop_eos(model, 0);
    kphi_eos_set_kij(e2, 0, 2, kphi_eos_get_kij_at(eos, 0, 2, T));
    kphi_eos_state s2;
    eval_ok(e2, T, P0, Y0, l2, NULL, &s2, w);
    for (size_t i = 0; i < NS; i++)
        ck_assert_double_eq_tol(l2[i], lnphi[i], 1e-13);
    ck_assert_double_eq_tol(s2.Z, st.Z, 1e-13);
    ck_assert_double_gt(fabs(s2.h_dep - st.h_dep), 1.0); /* the slope moves h_dep, J/mol */
    kphi_eos_free(e2);
    kphi_eos_work_free(w);
    kphi_eos_free(eos);
}
END_TEST

/* Soave's temperature function alpha^1/2 = 1 + m (1 - Tr^1/2) passes through zero at
 * Tr = (1 + 1/m)^2, for N2 near 1030 K (SRK) and 1390 K (PR). The mixture a must stay smooth: the
 * departure enthalpy continuous across that temperature (the form with |alpha^1/2| jumped
 * by about 3 J/mol here) and equal to -R T^2 d(g_dep/RT)/dT by central differences
 * straddling it (the same relation and tolerance as departures_are_consistent). m as in
 * Soave (1972) and Peng & Robinson (1976), the file comment of src/eos.c. */
START_TEST(departure_smooth_where_alpha_changes_sign)
{
    const kphi_eos_model models[2] = {KPHI_EOS_SRK, KPHI_EOS_PR};
    const double w = 0.037; /* omega of N2, sp_n2() */
    const double R = 8.314462618;
    for (int k = 0; k < 2; k++) {
        double m = models[k] == KPHI_EOS_SRK ? 0.480 + 1.574 * w - 0.176 * w * w
                                             : 0.37464 + 1.54226 * w - 0.26992 * w * w;
        double Tx = 126.20 * (1.0 + 1.0 / m) * (1.0 + 1.0 / m);
        ck_assert(Tx > 900.0 && Tx < 1500.0); /* SRK near 1030 K, PR near 1390 K */
        kphi_eos *eos = loop_eos(models[k], 0);
        kphi_eos_work *wk = kphi_eos_work_alloc(NS);
        double lnphi[NS];
        kphi_eos_state lo, hi, mid, sp, sm;
        const double d = 1e-4, dT = 0.01;
        eval_ok(eos, Tx - d, P0, Y0, lnphi, NULL, &lo, wk);
        eval_ok(eos, Tx + d, P0, Y0, lnphi, NULL, &hi, wk);
        ck_assert_msg(fabs(hi.h_dep - lo.h_dep) < 1e-2, "%s: h_dep jumps by %g J/mol at %g K",
                      kphi_eos_model_name(models[k]), hi.h_dep - lo.h_dep, Tx);
        eval_ok(eos, Tx, P0, Y0, lnphi, NULL, &mid, wk);
        eval_ok(eos, Tx + dT, P0, Y0, lnphi, NULL, &sp, wk);
        eval_ok(eos, Tx - dT, P0, Y0, lnphi, NULL, &sm, wk);
        double dg = (sp.g_dep / (R * (Tx + dT)) - sm.g_dep / (R * (Tx - dT))) / (2.0 * dT);
        double hfd = -R * Tx * Tx * dg;
        ck_assert_msg(fabs(mid.h_dep - hfd) < 1e-6 * fabs(mid.h_dep) + 1e-4,
                      "%s: h_dep %.8g J/mol, finite difference %.8g",
                      kphi_eos_model_name(models[k]), mid.h_dep, hfd);
        kphi_eos_work_free(wk);
        kphi_eos_free(eos);
    }
}
END_TEST

/* A species split into two identical halves behaves as the pure species; the mixture at
 * y = e_i gives the pure-component values and ln phi = g_dep/RT. */
START_TEST(pure_component_limit)
{
    kphi_eos_model model = model_of(_i);
    kphi_eos *one = kphi_eos_alloc(model, 1), *two = kphi_eos_alloc(model, 2);
    kphi_eos_work *w = kphi_eos_work_alloc(2);
    kphi_species n2 = sp_n2();
    /* Zc left out, so Zc = Pc Vc/(R Tc) and the virial combining rule gives Pc_12 = Pc
     * for two identical halves (with the tabulated Zc it differs by ~1%) */
    n2.Zc = 0.0;
    ck_assert_int_eq(kphi_eos_set_species(one, 0, &n2, NULL), KPHI_OK);
    ck_assert_int_eq(kphi_eos_set_species(two, 0, &n2, NULL), KPHI_OK);
    ck_assert_int_eq(kphi_eos_set_species(two, 1, &n2, NULL), KPHI_OK);
    const double T = 412.37, P = 13.7e6;
    double l1[1], l2[2], Z, lnp;
    kphi_eos_state s1, s2;
    const double y1[1] = {1.0}, y2[2] = {0.3172, 0.6828};
    eval_ok(one, T, P, y1, l1, NULL, &s1, w);
    eval_ok(two, T, P, y2, l2, NULL, &s2, w);
    ck_assert_double_le(fabs(l2[0] - l1[0]), 1e-12);
    ck_assert_double_le(fabs(l2[1] - l1[0]), 1e-12);
    ck_assert_double_le(fabs(s2.Z - s1.Z), 1e-12);
    ck_assert_double_le(fabs(l1[0] - s1.g_dep / (8.314462618 * T)), 1e-12);
    ck_assert_int_eq(kphi_eos_pure(two, 1, T, P, &Z, &lnp, w, NULL), KPHI_OK);
    ck_assert_double_le(fabs(lnp - l1[0]), 1e-12);
    ck_assert_double_le(fabs(Z - s1.Z), 1e-12);
    kphi_eos_work_free(w);
    kphi_eos_free(one);
    kphi_eos_free(two);
}
END_TEST

START_TEST(kij_is_symmetric)
{
    kphi_eos_model model = model_of(_i);
    kphi_eos *a = loop_eos(model, 0), *b = loop_eos(model, 0), *c = loop_eos(model, 0);
    kphi_eos_work *w = kphi_eos_work_alloc(NS);
    ck_assert_double_eq(kphi_eos_get_kij(a, NH3, N2), 0.0613);
    ck_assert_double_eq(kphi_eos_get_kij(a, N2, NH3), 0.0613);
    ck_assert_double_eq(kphi_eos_get_kij(a, H2, N2), 0.0); /* all others start at 0 */
    kphi_eos_set_kij(a, CH4, NH3, 0.0917);
    kphi_eos_set_kij(b, NH3, CH4, 0.0917);
    double la[NS], lb[NS], lc[NS], da[NS * NS], db[NS * NS];
    eval_ok(a, T0, P0, Y0, la, da, NULL, w);
    eval_ok(b, T0, P0, Y0, lb, db, NULL, w);
    eval_ok(c, T0, P0, Y0, lc, NULL, NULL, w);
    for (size_t i = 0; i < NS; i++)
        ck_assert_double_eq(la[i], lb[i]);
    for (size_t k = 0; k < NS * NS; k++)
        ck_assert_double_eq(da[k], db[k]);
    if (model != KPHI_EOS_IDEAL) /* k_ij has an effect */
        ck_assert_double_gt(fabs(la[NH3] - lc[NH3]), 1e-5);
    kphi_eos_work_free(w);
    kphi_eos_free(a);
    kphi_eos_free(b);
    kphi_eos_free(c);
}
END_TEST

/* --------------------------------------------------------------- single cases --- */

START_TEST(ideal_is_ideal)
{
    kphi_eos *eos = kphi_eos_alloc(KPHI_EOS_IDEAL, 2);
    kphi_eos_work *w = kphi_eos_work_alloc(2);
    kphi_species bare;
    memset(&bare, 0, sizeof bare);
    snprintf(bare.name, sizeof bare.name, "X");
    bare.molar_mass = 0.05;
    /* the ideal gas needs no critical constants */
    ck_assert_int_eq(kphi_eos_set_species(eos, 0, &bare, NULL), KPHI_OK);
    ck_assert_int_eq(kphi_eos_set_species(eos, 1, &bare, NULL), KPHI_OK);
    double y[2] = {0.25, 0.75}, l[2], d[4];
    kphi_eos_state st;
    eval_ok(eos, 673.15, 31.4e6, y, l, d, &st, w);
    ck_assert_double_eq(st.Z, 1.0);
    ck_assert_double_eq(l[0], 0.0);
    ck_assert_double_eq(d[3], 0.0);
    ck_assert_int_eq(st.may_condense, 0);
    ck_assert_int_eq(kphi_eos_model_needs_critical(KPHI_EOS_IDEAL), 0);
    ck_assert_int_eq(kphi_eos_model_needs_critical(KPHI_EOS_PR), 1);
    kphi_eos_work_free(w);
    kphi_eos_free(eos);
}
END_TEST

/* Below its vapour pressure water is a gas with one stable root; well above it the
 * liquid-like root has the lower Gibbs energy. At 350 K water's Psat is ~0.42 bar and
 * methanol's at 300 K ~0.19 bar (steam tables / Poling et al. 2001 App. A vapour
 * pressures, from memory). SRK and PR reproduce vapour pressures through omega (Soave
 * 1972; Peng & Robinson 1976), so they flag 1 atm already; RK (no omega) puts Psat of
 * such polar fluids higher, so all cubics are checked at 10 bar. Methanol, omega > 0.491,
 * takes the 1978 PR kappa. */
START_TEST(liquid_like_root_flagged)
{
    kphi_eos_model model = model_of(_i);
    if (!cubic(model))
        return;
    kphi_eos *eos = kphi_eos_alloc(model, 2);
    kphi_eos_work *w = kphi_eos_work_alloc(2);
    kphi_species a = sp_h2o(), b = sp_meoh();
    ck_assert_int_eq(kphi_eos_set_species(eos, 0, &a, NULL), KPHI_OK);
    ck_assert_int_eq(kphi_eos_set_species(eos, 1, &b, NULL), KPHI_OK);
    double Z, lnp;
    kphi_eos_state st;
    double l[2];
    const double water[2] = {1.0, 0.0}, meoh[2] = {0.0, 1.0};
    eval_ok(eos, 350.0, 10.0e5, water, l, NULL, &st, w);
    ck_assert_int_eq(st.may_condense, 1);
    eval_ok(eos, 300.0, 10.0e5, meoh, l, NULL, &st, w);
    ck_assert_int_eq(st.may_condense, 1);
    eval_ok(eos, 350.0, 0.2e5, water, l, NULL, &st, w);
    ck_assert_int_eq(st.may_condense, 0);
    ck_assert_double_gt(st.Z, 0.95);
    eval_ok(eos, 300.0, 0.05e5, meoh, l, NULL, &st, w);
    ck_assert_int_eq(st.may_condense, 0);
    if (model != KPHI_EOS_RK) {
        eval_ok(eos, 350.0, 1.013e5, water, l, NULL, &st, w);
        ck_assert_int_eq(st.n_roots, 3);
        ck_assert_int_eq(st.may_condense, 1);
        ck_assert_double_gt(st.Z, 0.9); /* the vapour root is still the one returned */
        eval_ok(eos, 300.0, 1.013e5, meoh, l, NULL, &st, w);
        ck_assert_int_eq(st.may_condense, 1);
        ck_assert_int_eq(kphi_eos_pure(eos, 0, 350.0, 1.013e5, &Z, &lnp, w, NULL), KPHI_OK);
        ck_assert_double_gt(Z, 0.9);
    }
    /* far above Tc the same species are plain gases */
    eval_ok(eos, 823.15, 10.0e5, water, l, NULL, &st, w);
    ck_assert_int_eq(st.may_condense, 0);
    ck_assert_int_eq(st.n_roots, 1);
    kphi_eos_work_free(w);
    kphi_eos_free(eos);
}
END_TEST

/* Pure-component PR evaluated independently here (Peng & Robinson 1976 eqs. 9-18; the
 * 1978 kappa of Robinson & Peng for omega > 0.491) against the module. */
static double pr_pure_lnphi(double T, double P, double Tc, double Pc, double w, double *Zout)
{
    const double R = 8.314462618;
    double k = w > 0.491 ? 0.379642 + 1.48503 * w - 0.164423 * w * w + 0.016666 * w * w * w
                         : 0.37464 + 1.54226 * w - 0.26992 * w * w;
    double al = 1.0 + k * (1.0 - sqrt(T / Tc));
    double a = 0.45724 * R * R * Tc * Tc / Pc * al * al, b = 0.07780 * R * Tc / Pc;
    double A = a * P / (R * R * T * T), B = b * P / (R * T);
    double Z = 1.0; /* Newton from the ideal gas: converges to the vapour root here */
    for (int it = 0; it < 100; it++) {
        double f = Z * Z * Z + (B - 1.0) * Z * Z + (A - 3.0 * B * B - 2.0 * B) * Z -
                   (A * B - B * B - B * B * B);
        double df = 3.0 * Z * Z + 2.0 * (B - 1.0) * Z + (A - 3.0 * B * B - 2.0 * B);
        Z -= f / df;
    }
    *Zout = Z;
    double s2 = sqrt(2.0);
    return Z - 1.0 - log(Z - B) -
           A / (2.0 * s2 * B) * log((Z + (1.0 + s2) * B) / (Z + (1.0 - s2) * B));
}

START_TEST(pr_pure_matches_independent_formula)
{
    kphi_eos *eos = kphi_eos_alloc(KPHI_EOS_PR, 2);
    kphi_eos_work *w = kphi_eos_work_alloc(2);
    kphi_species a = sp_meoh(), b = sp_n2();
    ck_assert_int_eq(kphi_eos_set_species(eos, 0, &a, NULL), KPHI_OK);
    ck_assert_int_eq(kphi_eos_set_species(eos, 1, &b, NULL), KPHI_OK);
    double Z, lnp, Zr;
    ck_assert_int_eq(kphi_eos_pure(eos, 0, 483.15, 7.9e5, &Z, &lnp, w, NULL), KPHI_OK);
    double ref = pr_pure_lnphi(483.15, 7.9e5, 512.64, 80.97e5, 0.565, &Zr);
    ck_assert_double_le(fabs(lnp - ref), 1e-10);
    ck_assert_double_le(fabs(Z - Zr), 1e-10);
    ck_assert_double_lt(lnp, -0.03); /* a visibly non-ideal state */
    ck_assert_int_eq(kphi_eos_pure(eos, 1, 298.15, 21.3e6, &Z, &lnp, w, NULL), KPHI_OK);
    ref = pr_pure_lnphi(298.15, 21.3e6, 126.20, 33.98e5, 0.037, &Zr);
    ck_assert_double_le(fabs(lnp - ref), 1e-10);
    ck_assert_double_le(fabs(Z - Zr), 1e-10);
    kphi_eos_work_free(w);
    kphi_eos_free(eos);
}
END_TEST

/* The virial series is refused where it has no business: NH3 near its critical
 * temperature at 20 MPa gives Z = 1 + BP/RT < 0.5. */
START_TEST(virial_out_of_range_fails)
{
    kphi_eos *eos = kphi_eos_alloc(KPHI_EOS_VIRIAL, 1);
    kphi_eos_work *w = kphi_eos_work_alloc(1);
    kphi_species s = sp_nh3();
    ck_assert_int_eq(kphi_eos_set_species(eos, 0, &s, NULL), KPHI_OK);
    const double y[1] = {1.0};
    double l[1];
    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_eos_eval(eos, 420.0, 20.0e6, y, l, NULL, NULL, w, &err), KPHI_EFAILED);
    ck_assert_ptr_nonnull(strstr(err.msg, "virial"));
    ck_assert_ptr_nonnull(strstr(err.msg, "0.5"));
    kphi_error_clear(&err); /* fine at low pressure */
    ck_assert_int_eq(kphi_eos_eval(eos, 420.0, 1.0e5, y, l, NULL, NULL, w, &err), KPHI_OK);
    kphi_eos_work_free(w);
    kphi_eos_free(eos);
}
END_TEST

START_TEST(quantum_critical_constants)
{
    kphi_eos *eos = loop_eos(KPHI_EOS_PR, 0);
    double Tc, Pc;
    const double T = 300.0, M = 2.01588;
    kphi_eos_critical(eos, H2, T, &Tc, &Pc);
    ck_assert_double_eq(Tc, 33.19); /* switched off: classical */
    ck_assert_double_eq(Pc, 13.13e5);
    kphi_eos_set_quantum(eos, 1);
    kphi_eos_critical(eos, H2, T, &Tc, &Pc);
    /* Tc = Tc0/(1 + c1/(M T)), Pc = Pc0/(1 + c2/(M T)), M in g/mol */
    ck_assert_double_le(fabs(Tc - 43.6 / (1.0 + 21.8 / (M * T))), 1e-12);
    ck_assert_double_le(fabs(Pc - 20.5e5 / (1.0 + 44.2 / (M * T))), 1e-6);
    kphi_eos_critical(eos, N2, T, &Tc, &Pc); /* no quantum constants: unchanged */
    ck_assert_double_eq(Tc, 126.20);
    kphi_eos_work *w = kphi_eos_work_alloc(NS);
    double l1[NS], l0[NS];
    eval_ok(eos, T0, P0, Y0, l1, NULL, NULL, w);
    kphi_eos_set_quantum(eos, 0);
    eval_ok(eos, T0, P0, Y0, l0, NULL, NULL, w);
    ck_assert_double_gt(fabs(l1[H2] - l0[H2]), 1e-4);
    kphi_eos_work_free(w);
    kphi_eos_free(eos);
}
END_TEST

/* ------------------------------------------------------------------ roots --- */

static void eval_root_ok(const kphi_eos *eos, kphi_eos_root root, double T, double P,
                         const double y[], double lnphi[], double dlnphi[], kphi_eos_state *st,
                         kphi_eos_work *w)
{
    kphi_error err;
    kphi_error_clear(&err);
    int rc = kphi_eos_eval_root(eos, root, T, P, y, lnphi, dlnphi, st, w, &err);
    ck_assert_msg(rc == KPHI_OK, "%s root %d at T=%g P=%g: %s",
                  kphi_eos_model_name(kphi_eos_get_model(eos)), (int)root, T, P, err.msg);
}

/* Pure water at 350 K over a range of pressures around its vapour pressure (about
 * 0.42 bar there, see liquid_like_root_flagged): where the cubic has three roots, the gas
 * and liquid roots differ, each reports its own Z, v = Z R T/P and flag, and STABLE takes
 * the one of lower g_dep; with one root all three choices agree. Both outcomes of STABLE
 * must occur over the range (the check is not vacuous). The gas choice is what
 * kphi_eos_eval() returns. */
START_TEST(root_choice_on_three_roots)
{
    kphi_eos_model model = model_of(_i);
    if (!cubic(model))
        return;
    kphi_eos *eos = kphi_eos_alloc(model, 2);
    kphi_eos_work *w = kphi_eos_work_alloc(2);
    kphi_species a = sp_h2o(), b = sp_meoh();
    ck_assert_int_eq(kphi_eos_set_species(eos, 0, &a, NULL), KPHI_OK);
    ck_assert_int_eq(kphi_eos_set_species(eos, 1, &b, NULL), KPHI_OK);
    const double y[2] = {1.0, 0.0}, T = 350.0, R = 8.314462618;
    int chose_gas = 0, chose_liquid = 0;
    for (double P = 0.02e5; P < 40e5; P *= 1.7) {
        double lg[2], ll[2], ls[2], le[2];
        kphi_eos_state g, l, s, e;
        eval_root_ok(eos, KPHI_EOS_ROOT_GAS, T, P, y, lg, NULL, &g, w);
        eval_root_ok(eos, KPHI_EOS_ROOT_LIQUID, T, P, y, ll, NULL, &l, w);
        eval_root_ok(eos, KPHI_EOS_ROOT_STABLE, T, P, y, ls, NULL, &s, w);
        eval_ok(eos, T, P, y, le, NULL, &e, w);
        ck_assert_double_eq(e.Z, g.Z);
        ck_assert_double_eq(le[0], lg[0]);
        ck_assert_double_le(fabs(g.v - g.Z * R * T / P), 1e-12 * g.v);
        ck_assert_double_le(fabs(l.v - l.Z * R * T / P), 1e-12 * l.v);
        ck_assert_int_eq(g.n_roots, l.n_roots);
        if (g.n_roots == 3) {
            ck_assert_double_lt(l.Z, 0.1 * g.Z);
            ck_assert_int_eq(l.liquid_like, 1);
            ck_assert_int_eq(g.liquid_like, 0);
            ck_assert_double_gt(fabs(ll[0] - lg[0]), 1e-6);
            /* ln phi of the pure component is g_dep/RT on either root */
            ck_assert_double_le(fabs(ll[0] - l.g_dep / (R * T)), 1e-12);
            ck_assert_double_le(fabs(lg[0] - g.g_dep / (R * T)), 1e-12);
            const kphi_eos_state *lower = l.g_dep < g.g_dep ? &l : &g;
            ck_assert_double_eq(s.Z, lower->Z);
            ck_assert_double_eq(s.g_dep, lower->g_dep);
            ck_assert_int_eq(s.liquid_like, lower->liquid_like);
            ck_assert_int_eq(g.may_condense, l.g_dep < g.g_dep);
            chose_gas += lower == &g;
            chose_liquid += lower == &l;
        } else {
            ck_assert_double_eq(l.Z, g.Z);
            ck_assert_double_eq(s.Z, g.Z);
            ck_assert_double_eq(ls[0], lg[0]);
        }
    }
    ck_assert_int_gt(chose_gas, 0);
    ck_assert_int_gt(chose_liquid, 0);
    kphi_eos_work_free(w);
    kphi_eos_free(eos);
}
END_TEST

/* Models with one root answer every root choice alike. */
START_TEST(one_root_models_ignore_choice)
{
    const kphi_eos_model models[4] = {KPHI_EOS_IDEAL, KPHI_EOS_VIRIAL, KPHI_EOS_BB,
                                      KPHI_EOS_BBV};
    for (int k = 0; k < 4; k++) {
        kphi_eos *eos = loop_eos(models[k], 0);
        kphi_eos_work *w = kphi_eos_work_alloc(NS);
        double lg[NS], ll[NS];
        kphi_eos_state g, l;
        eval_root_ok(eos, KPHI_EOS_ROOT_GAS, 412.3, 3.1e6, Y0, lg, NULL, &g, w);
        eval_root_ok(eos, KPHI_EOS_ROOT_LIQUID, 412.3, 3.1e6, Y0, ll, NULL, &l, w);
        ck_assert_double_eq(g.Z, l.Z);
        for (size_t i = 0; i < NS; i++)
            ck_assert_double_eq(lg[i], ll[i]);
        ck_assert_int_eq(l.liquid_like, 0);
        kphi_eos_work_free(w);
        kphi_eos_free(eos);
    }
}
END_TEST

/* The liquid root passes the invariants the gas root passes above: Gibbs-Duhem,
 * symmetry, n_t d ln phi_i/d n_l against central differences, g_dep/RT = sum y ln phi,
 * h_dep = -R T^2 d(g_dep/RT)/dT. States: an ammonia-rich liquid with dissolved loop gas
 * at separator conditions (268.15 K, 19.5 MPa; a dense single root) and at 0.8 MPa
 * (three roots: the liquid one is taken, the gas one checked too). */
START_TEST(liquid_root_invariants)
{
    kphi_eos_model model = model_of(_i);
    if (!cubic(model))
        return;
    kphi_eos *eos = loop_eos(model, quantum_of(_i));
    kphi_eos_work *w = kphi_eos_work_alloc(NS);
    const double R = 8.314462618, T = 268.15, h = 1e-5, dT = 0.01;
    const double X[NS] = {0.0110, 0.0061, 0.9704, 0.0084, 0.0041}; /* H2 N2 NH3 CH4 Ar */
    const double Ps[2] = {19.5e6, 0.8e6};
    const kphi_eos_root roots[3] = {KPHI_EOS_ROOT_LIQUID, KPHI_EOS_ROOT_LIQUID,
                                    KPHI_EOS_ROOT_GAS};
    int three = 0;
    for (int k = 0; k < 3; k++) {
        double P = Ps[k == 0 ? 0 : 1];
        kphi_eos_root root = roots[k];
        double lnphi[NS], d[NS * NS], lp[NS], lm[NS], yp[NS], ym[NS];
        kphi_eos_state st, sp, sm;
        eval_root_ok(eos, root, T, P, X, lnphi, d, &st, w);
        if (root == KPHI_EOS_ROOT_LIQUID) {
            ck_assert_int_eq(st.liquid_like, 1);
            ck_assert_double_lt(st.Z, 0.3);
        } else {
            ck_assert_int_eq(st.liquid_like, 0);
        }
        three += st.n_roots == 3;
        for (size_t l = 0; l < NS; l++) {
            double sum = 0.0;
            for (size_t i = 0; i < NS; i++) {
                sum += X[i] * d[i * NS + l];
                ck_assert_double_le(fabs(d[i * NS + l] - d[l * NS + i]),
                                    1e-12 * (1.0 + fabs(d[i * NS + l])));
            }
            ck_assert_msg(fabs(sum) < 1e-9, "%s root %d: Gibbs-Duhem %g",
                          kphi_eos_model_name(model), (int)root, sum);
            double np = 1.0 + h, nm = 1.0 - h;
            for (size_t i = 0; i < NS; i++) {
                yp[i] = (X[i] + (i == l ? h : 0.0)) / np;
                ym[i] = (X[i] - (i == l ? h : 0.0)) / nm;
            }
            eval_root_ok(eos, root, T, P, yp, lp, NULL, NULL, w);
            eval_root_ok(eos, root, T, P, ym, lm, NULL, NULL, w);
            for (size_t i = 0; i < NS; i++) {
                double fd = (lp[i] - lm[i]) / (2.0 * h);
                ck_assert_msg(fabs(fd - d[i * NS + l]) < 1e-6 * (1.0 + fabs(fd)),
                              "%s root %d: d ln phi_%zu/d n_%zu = %.10g, finite difference "
                              "%.10g",
                              kphi_eos_model_name(model), (int)root, i, l, d[i * NS + l], fd);
            }
        }
        double sum = 0.0;
        for (size_t i = 0; i < NS; i++)
            sum += X[i] * lnphi[i];
        ck_assert_double_le(fabs(st.g_dep / (R * T) - sum), 1e-12 * (1.0 + fabs(sum)));
        eval_root_ok(eos, root, T + dT, P, X, lp, NULL, &sp, w);
        eval_root_ok(eos, root, T - dT, P, X, lm, NULL, &sm, w);
        double dg = (sp.g_dep / (R * (T + dT)) - sm.g_dep / (R * (T - dT))) / (2.0 * dT);
        double hfd = -R * T * T * dg;
        ck_assert_msg(fabs(st.h_dep - hfd) < 1e-6 * fabs(st.h_dep) + 1e-4,
                      "%s root %d: h_dep %.8g J/mol, finite difference %.8g",
                      kphi_eos_model_name(model), (int)root, st.h_dep, hfd);
    }
    ck_assert_int_gt(three, 0); /* the three-root state was reached */
    kphi_eos_work_free(w);
    kphi_eos_free(eos);
}
END_TEST

/* ------------------------------------------------------- Mathias-Copeman alpha --- */

/* A mixture of NH3, H2O and N2 with the species data of reactions/species.yaml, whose
 * NH3 and H2O carry Mathias-Copeman alpha constants for PR and SRK (standard = 1: the
 * model's own alpha instead). */
static kphi_eos *mc_eos(const kphi_species_db *db, kphi_eos_model model, int standard)
{
    const char *const names[3] = {"NH3", "H2O", "N2"};
    kphi_eos *eos = kphi_eos_alloc(model, 3);
    ck_assert_ptr_nonnull(eos);
    kphi_eos_set_standard_alpha(eos, standard);
    for (size_t i = 0; i < 3; i++) {
        const kphi_species *sp = kphi_species_db_find(db, names[i]);
        ck_assert_ptr_nonnull(sp);
        ck_assert_int_eq(kphi_eos_set_species(eos, i, sp, NULL), KPHI_OK);
    }
    return eos;
}

/* The Mathias & Copeman (1983) alpha, alpha^1/2 = 1 + c1 q + c2 q^2 + c3 q^3 below Tc and
 * 1 + c1 q above (q = 1 - Tr^1/2), with c1 the model's own slope m(omega):
 *  - h_dep = -R T^2 d(g_dep/RT)/dT (central differences) below, near and above the
 *    critical temperatures of NH3 (405.4 K) and H2O (647.14 K);
 *  - g_dep and h_dep continuous at Tr = 1 of each (the q^2, q^3 terms and their first
 *    derivatives vanish there);
 *  - above both critical temperatures the answer is the model's own alpha (to the six
 *    decimals c1 is given with), below it differs; kphi_eos_set_standard_alpha() switches the constants off. */
START_TEST(mathias_copeman_alpha)
{
    kphi_eos_model model = _i == 0 ? KPHI_EOS_PR : KPHI_EOS_SRK;
    kphi_error err;
    kphi_error_clear(&err);
    kphi_species_db *db = kphi_species_db_load_file(KPHI_SPECIES_FILE, &err);
    ck_assert_msg(db != NULL, "%s", err.msg);
    kphi_eos *mc = mc_eos(db, model, 0), *std = mc_eos(db, model, 1);
    kphi_eos_work *w = kphi_eos_work_alloc(3);
    const double y[3] = {0.35, 0.25, 0.40}, P = 1.0e5, R = 8.314462618, dT = 0.01;
    /* which species carry the constants */
    for (size_t i = 0; i < 3; i++) {
        const kphi_alpha_spec *a = kphi_eos_alpha(mc, i);
        ck_assert_ptr_null(kphi_eos_alpha(std, i));
        if (i == 2) {
            ck_assert_ptr_null(a);
            continue;
        }
        ck_assert_ptr_nonnull(a);
        ck_assert_int_eq(a->form, KPHI_ALPHA_MATHIAS_COPEMAN);
        ck_assert_str_eq(a->model, kphi_eos_model_name(model));
        /* c1 = m(omega), carried to six decimals in species.yaml */
        ck_assert_double_le(fabs(a->c[0] - kphi_eos_alpha_slope(model, kphi_eos_acentric(mc, i))),
                            1e-6);
    }
    double Tc[2], Pc;
    kphi_eos_critical(mc, 0, 300.0, &Tc[0], &Pc);
    kphi_eos_critical(mc, 1, 300.0, &Tc[1], &Pc);
    ck_assert(Tc[0] > 400.0 && Tc[0] < 410.0 && Tc[1] > 640.0 && Tc[1] < 650.0);
    const double Ts[7] = {352.7, Tc[0] - 0.5, Tc[0] + 0.5, 503.9, Tc[1] - 0.5, Tc[1] + 0.5,
                          771.3};
    for (int k = 0; k < 7; k++) {
        double T = Ts[k], l0[3], l1[3];
        kphi_eos_state st, sp, sm;
        eval_ok(mc, T, P, y, l0, NULL, &st, w);
        eval_ok(mc, T + dT, P, y, l1, NULL, &sp, w);
        eval_ok(mc, T - dT, P, y, l1, NULL, &sm, w);
        double dg = (sp.g_dep / (R * (T + dT)) - sm.g_dep / (R * (T - dT))) / (2.0 * dT);
        double hfd = -R * T * T * dg;
        ck_assert_msg(fabs(st.h_dep - hfd) < 1e-6 * fabs(st.h_dep) + 1e-4,
                      "%s at %g K: h_dep %.8g J/mol, finite difference %.8g",
                      kphi_eos_model_name(model), T, st.h_dep, hfd);
        eval_ok(std, T, P, y, l1, NULL, &sp, w);
        if (T > Tc[1]) { /* above both: the model's own alpha, up to c1 being carried to
                            six decimals (|c1 - m| <= 5e-7) */
            for (size_t i = 0; i < 3; i++)
                ck_assert_double_le(fabs(l0[i] - l1[i]), 1e-9);
        } else { /* water below its Tc: the fitted constants act (q^2 is 6e-8 at
                    Tc - 0.5 K, so the change there is small, but above round-off) */
            double least = k == 0 ? 1e-5 : 1e-12;
            ck_assert_double_gt(fabs(l0[1] - l1[1]), least);
        }
    }
    for (int c = 0; c < 2; c++) { /* continuity at Tr = 1 */
        double l[3];
        kphi_eos_state lo, hi;
        eval_ok(mc, Tc[c] - 1e-7, P, y, l, NULL, &lo, w);
        eval_ok(mc, Tc[c] + 1e-7, P, y, l, NULL, &hi, w);
        ck_assert_msg(fabs(hi.h_dep - lo.h_dep) < 1e-4, "h_dep jumps by %g J/mol at %g K",
                      hi.h_dep - lo.h_dep, Tc[c]);
        ck_assert_double_le(fabs(hi.g_dep - lo.g_dep), 1e-4);
    }
    kphi_eos_work_free(w);
    kphi_eos_free(mc);
    kphi_eos_free(std);
    kphi_species_db_free(db);
}
END_TEST

/* ------------------------------------------------------------------- errors --- */

/* ------------------------------------------------------- Beattie-Bridgeman --- */

/* The mixture constants of Beattie's combination (src/eos_bb.c): A0 by the square-root
 * mean, a, B0, b, c linear; and P from the equation as Beattie & Bridgeman (1928) write
 * it, P = R T (1 - eps)(v + B)/v^2 - A/v^2, at molar volume v (SI). */
static double bb_pressure(const kphi_species sp[], const double y[], size_t n, double T,
                          double v)
{
    double s = 0.0, a = 0.0, B0 = 0.0, b = 0.0, c = 0.0;
    for (size_t i = 0; i < n; i++) {
        s += y[i] * sqrt(sp[i].bb_A0);
        a += y[i] * sp[i].bb_a;
        B0 += y[i] * sp[i].bb_B0;
        b += y[i] * sp[i].bb_b;
        c += y[i] * sp[i].bb_c;
    }
    double A = s * s * (1.0 - a / v), B = B0 * (1.0 - b / v), eps = c / (v * T * T * T);
    return 8.314462618 * T * (1.0 - eps) * (v + B) / (v * v) - A / (v * v);
}

/* The root the module returns satisfies the equation written out independently, for pure
 * N2 and NH3 and for the loop gas at several states; Z = P v/(R T). */
START_TEST(bb_root_satisfies_the_equation)
{
    kphi_eos *eos = loop_eos(KPHI_EOS_BB, 0);
    kphi_eos_set_kij(eos, N2, NH3, 0.0); /* the written-out form has no k_ij */
    kphi_eos_set_kij(eos, H2, CH4, 0.0);
    kphi_eos_work *w = kphi_eos_work_alloc(NS);
    const kphi_species sp[NS] = {sp_h2(), sp_n2(), sp_nh3(), sp_ch4(), sp_ar()};
    const double Ts[3] = {673.15, 723.15, 773.15}, Ps[3] = {1.013e6, 10.13e6, 30.4e6};
    const double pure_n2[NS] = {0, 1, 0, 0, 0}, pure_nh3[NS] = {0, 0, 1, 0, 0};
    const double *ys[3] = {Y0, pure_n2, pure_nh3};
    for (int a = 0; a < 3; a++)
        for (int b = 0; b < 3; b++)
            for (int k = 0; k < 3; k++) {
                double l[NS];
                kphi_eos_state st;
                eval_ok(eos, Ts[a], Ps[b], ys[k], l, NULL, &st, w);
                double P = bb_pressure(sp, ys[k], NS, Ts[a], st.v);
                ck_assert_msg(fabs(P - Ps[b]) < 1e-10 * Ps[b], "%g K, %g Pa, y %d: P(v) = %.12g",
                              Ts[a], Ps[b], k, P);
                ck_assert_double_le(fabs(st.Z - Ps[b] * st.v / (8.314462618 * Ts[a])), 1e-12);
            }
    kphi_eos_work_free(w);
    kphi_eos_free(eos);
}
END_TEST

/* At low pressure bb and bbv agree: the second virial coefficient of the full equation is
 * bbv's B, so (Z - 1) and ln phi differ by terms of order P^2 (here at 0.5 bar, to 1e-3
 * of their size), linear or Lorentz B0 alike. */
START_TEST(bb_and_bbv_agree_at_low_pressure)
{
    for (int lor = 0; lor < 2; lor++) {
        kphi_eos *full = loop_eos(KPHI_EOS_BB, 0), *vir = loop_eos(KPHI_EOS_BBV, 0);
        kphi_eos_set_bb_lorentz(full, lor);
        kphi_eos_set_bb_lorentz(vir, lor);
        kphi_eos_work *w = kphi_eos_work_alloc(NS);
        double lf[NS], lv[NS];
        kphi_eos_state sf, sv;
        eval_ok(full, 512.3, 0.5e5, Y0, lf, NULL, &sf, w);
        eval_ok(vir, 512.3, 0.5e5, Y0, lv, NULL, &sv, w);
        ck_assert_double_gt(fabs(sv.Z - 1.0), 1e-5);
        ck_assert_double_le(fabs(sf.Z - sv.Z), 1e-3 * fabs(sv.Z - 1.0));
        for (size_t i = 0; i < NS; i++)
            ck_assert_msg(fabs(lf[i] - lv[i]) <= 1e-3 * fabs(lv[i]) + 1e-12,
                          "lorentz %d, species %zu: %.10g vs %.10g", lor, i, lf[i], lv[i]);
        kphi_eos_work_free(w);
        kphi_eos_free(full);
        kphi_eos_free(vir);
    }
}
END_TEST

/* Lorentz's B0: the same answer for a pure species (B0_ii = B0_i), another for the
 * mixture, and the invariants of the linear form (Gibbs-Duhem, symmetry, finite
 * differences, h_dep from g_dep). */
START_TEST(bb_lorentz_b0)
{
    kphi_eos_model model = _i == 0 ? KPHI_EOS_BB : KPHI_EOS_BBV;
    kphi_eos *lin = loop_eos(model, 0), *lor = loop_eos(model, 0);
    kphi_eos_set_bb_lorentz(lor, 1);
    kphi_eos_work *w = kphi_eos_work_alloc(NS);
    const double R = 8.314462618, T = 741.3, P = 21.9e6, h = 1e-5, dT = 0.01;
    const double pure[NS] = {0, 0, 1, 0, 0};
    double l1[NS], l2[NS], d[NS * NS], lp[NS], lm[NS], yp[NS], ym[NS];
    kphi_eos_state s1, s2, sp, sm;
    eval_ok(lin, T, P, pure, l1, NULL, &s1, w);
    eval_ok(lor, T, P, pure, l2, NULL, &s2, w);
    ck_assert_double_le(fabs(l1[NH3] - l2[NH3]), 1e-12);
    ck_assert_double_le(fabs(s1.Z - s2.Z), 1e-12);
    eval_ok(lin, T, P, Y0, l1, NULL, &s1, w);
    eval_ok(lor, T, P, Y0, l2, d, &s2, w);
    ck_assert_double_gt(fabs(l1[NH3] - l2[NH3]), 1e-4);
    for (size_t l = 0; l < NS; l++) {
        double sum = 0.0;
        for (size_t i = 0; i < NS; i++) {
            sum += Y0[i] * d[i * NS + l];
            ck_assert_double_le(fabs(d[i * NS + l] - d[l * NS + i]), 1e-13);
        }
        ck_assert_double_le(fabs(sum), 1e-10);
        for (size_t i = 0; i < NS; i++) {
            yp[i] = (Y0[i] + (i == l ? h : 0.0)) / (1.0 + h);
            ym[i] = (Y0[i] - (i == l ? h : 0.0)) / (1.0 - h);
        }
        eval_ok(lor, T, P, yp, lp, NULL, NULL, w);
        eval_ok(lor, T, P, ym, lm, NULL, NULL, w);
        for (size_t i = 0; i < NS; i++)
            ck_assert_double_le(fabs((lp[i] - lm[i]) / (2.0 * h) - d[i * NS + l]), 1e-6);
    }
    eval_ok(lor, T + dT, P, Y0, lp, NULL, &sp, w);
    eval_ok(lor, T - dT, P, Y0, lm, NULL, &sm, w);
    double hfd = -R * T * T * (sp.g_dep / (R * (T + dT)) - sm.g_dep / (R * (T - dT))) / (2 * dT);
    ck_assert_double_le(fabs(s2.h_dep - hfd), 1e-6 * fabs(s2.h_dep) + 1e-4);
    kphi_eos_work_free(w);
    kphi_eos_free(lin);
    kphi_eos_free(lor);
}
END_TEST

/* bb and bbv refuse states beyond their range with the reason: pure NH3 (Tc 405.4 K) at
 * 450 K and 900 bar (denser than the critical density for bb, Z < 0.5 for bbv), at 350 K
 * and 100 bar (subcritical, above its vapour pressure of about 38 bar, from memory: more
 * than half the critical density for bb) and at 300 K and 60 bar (above its vapour
 * pressure of about 10 bar, from memory: the bb isotherm turns first). Both answer the
 * same species at low pressure. */
START_TEST(bb_refuses_beyond_its_range)
{
    const kphi_eos_model models[2] = {KPHI_EOS_BB, KPHI_EOS_BBV};
    for (int k = 0; k < 2; k++) {
        kphi_eos *eos = kphi_eos_alloc(models[k], 1);
        kphi_eos_work *w = kphi_eos_work_alloc(1);
        kphi_species s = sp_nh3();
        ck_assert_int_eq(kphi_eos_set_species(eos, 0, &s, NULL), KPHI_OK);
        const double y[1] = {1.0}, Ts[3] = {450.0, 350.0, 300.0}, Ps[3] = {900e5, 100e5, 60e5};
        static const char *const why[2][3] = {{"exceed the pseudo-critical density",
                                               "below the pseudo-critical temperature",
                                               "isotherm turns"},
                                              {"Z = ", "Z = ", "Z = "}};
        double l[1];
        kphi_error err;
        for (int q = 0; q < 3; q++) {
            kphi_error_clear(&err);
            ck_assert_int_eq(kphi_eos_eval(eos, Ts[q], Ps[q], y, l, NULL, NULL, w, &err),
                             KPHI_EFAILED);
            ck_assert_ptr_nonnull(strstr(err.msg, kphi_eos_model_name(models[k])));
            ck_assert_ptr_nonnull(strstr(err.msg, "cubic"));
            ck_assert_msg(strstr(err.msg, why[k][q]) != NULL, "%s", err.msg);
        }
        kphi_error_clear(&err);
        ck_assert_int_eq(kphi_eos_eval(eos, 450.0, 5e5, y, l, NULL, NULL, w, &err), KPHI_OK);
        ck_assert_double_lt(l[0], -0.01);
        kphi_eos_work_free(w);
        kphi_eos_free(eos);
    }
}
END_TEST

/* A species without Beattie-Bridgeman constants cannot enter bb or bbv. */
START_TEST(bb_needs_its_constants)
{
    const kphi_eos_model models[2] = {KPHI_EOS_BB, KPHI_EOS_BBV};
    for (int k = 0; k < 2; k++) {
        kphi_eos *eos = kphi_eos_alloc(models[k], 2);
        kphi_species s = sp_h2o();
        kphi_error err;
        kphi_error_clear(&err);
        ck_assert_int_eq(kphi_eos_set_species(eos, 1, &s, &err), KPHI_EINPUT);
        ck_assert_str_eq(err.path, "test_species.yaml");
        ck_assert_int_eq(err.line, 60);
        ck_assert_ptr_nonnull(strstr(err.msg, "'H2O' has no Beattie-Bridgeman constants"));
        s = sp_n2();
        s.bb_A0 = -1.0;
        kphi_error_clear(&err);
        ck_assert_int_eq(kphi_eos_set_species(eos, 0, &s, &err), KPHI_EINPUT);
        ck_assert_ptr_nonnull(strstr(err.msg, "A0 and B0 must be positive"));
        kphi_eos_free(eos);
    }
}
END_TEST

START_TEST(missing_critical_constants)
{
    kphi_eos *eos = kphi_eos_alloc(KPHI_EOS_SRK, 2);
    kphi_species s = sp_ch4();
    s.has_critical = 0;
    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_eos_set_species(eos, 1, &s, &err), KPHI_EINPUT);
    ck_assert_str_eq(err.path, "test_species.yaml");
    ck_assert_int_eq(err.line, 40);
    ck_assert_int_eq(err.column, 3);
    ck_assert_ptr_nonnull(strstr(err.msg, "'CH4'"));
    ck_assert_ptr_nonnull(strstr(err.msg, "critical"));
    char buf[400];
    kphi_error_format(&err, buf, sizeof buf);
    ck_assert_ptr_nonnull(strstr(buf, "test_species.yaml:40:3: error:"));
    /* a slot never set is refused at evaluation, not read */
    kphi_eos_work *w = kphi_eos_work_alloc(2);
    double y[2] = {0.5, 0.5}, l[2];
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_eos_eval(eos, 500.0, 1e6, y, l, NULL, NULL, w, &err), KPHI_EINPUT);
    /* bad Tc */
    s = sp_ch4();
    s.Tc = -1.0;
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_eos_set_species(eos, 0, &s, &err), KPHI_EINPUT);
    ck_assert_ptr_nonnull(strstr(err.msg, "critical temperature"));
    kphi_eos_work_free(w);
    kphi_eos_free(eos);
}
END_TEST

START_TEST(bad_state_is_refused)
{
    kphi_eos *eos = loop_eos(KPHI_EOS_PR, 0);
    kphi_eos_work *w = kphi_eos_work_alloc(NS), *small = kphi_eos_work_alloc(2);
    double l[NS];
    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_eos_eval(eos, -5.0, P0, Y0, l, NULL, NULL, w, &err), KPHI_EINPUT);
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_eos_eval(eos, T0, 0.0, Y0, l, NULL, NULL, w, &err), KPHI_EINPUT);
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_eos_eval(eos, T0, P0, Y0, l, NULL, NULL, small, &err), KPHI_EINPUT);
    double ybad[NS] = {0.5, 0.5, 0.5, 0.0, 0.0};
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_eos_eval(eos, T0, P0, ybad, l, NULL, NULL, w, &err), KPHI_EINPUT);
    ck_assert_ptr_nonnull(strstr(err.msg, "sum"));
    kphi_eos_work_free(w);
    kphi_eos_work_free(small);
    kphi_eos_free(eos);
}
END_TEST

START_TEST(model_names_parse)
{
    kphi_eos_model m = KPHI_EOS_IDEAL;
    kphi_mark at = {7, 6};
    for (int k = 0; k < KPHI_EOS_N_MODELS; k++) {
        ck_assert_int_eq(kphi_eos_model_parse(kphi_eos_model_name((kphi_eos_model)k), &m,
                                              "case.yaml", at, NULL),
                         KPHI_OK);
        ck_assert_int_eq(m, k);
    }
    ck_assert_int_eq(kphi_eos_model_parse("Virial", &m, "case.yaml", at, NULL), KPHI_OK);
    ck_assert_int_eq(m, KPHI_EOS_VIRIAL);
    ck_assert_int_eq(kphi_eos_model_parse("PR", &m, "case.yaml", at, NULL), KPHI_OK);
    ck_assert_int_eq(m, KPHI_EOS_PR);

    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_eos_model_parse("vrial", &m, "case.yaml", at, &err), KPHI_EINPUT);
    ck_assert_str_eq(err.path, "case.yaml");
    ck_assert_int_eq(err.line, 7);
    ck_assert_int_eq(err.column, 6);
    ck_assert_ptr_nonnull(strstr(err.msg, "'vrial'"));
    ck_assert_ptr_nonnull(strstr(err.msg, "did you mean 'virial'?"));
    ck_assert_ptr_nonnull(strstr(err.msg, "ideal, virial, rk, srk, pr"));

    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_eos_model_parse("SRKK", &m, "case.yaml", at, &err), KPHI_EINPUT);
    ck_assert_ptr_nonnull(strstr(err.msg, "did you mean 'srk'?"));

    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_eos_model_parse("benedict", &m, "case.yaml", at, &err), KPHI_EINPUT);
    ck_assert_ptr_null(strstr(err.msg, "did you mean"));
    ck_assert_ptr_nonnull(strstr(err.msg, "expected one of"));
    ck_assert_str_eq(kphi_eos_model_name(KPHI_EOS_SRK), "srk");
}
END_TEST

static Suite *eos_suite(void)
{
    Suite *s = suite_create("eos");
    TCase *inv = tcase_create("invariants");
    int nloop = 2 * KPHI_EOS_N_MODELS; /* every model, quantum gases off and on */
    tcase_add_loop_test(inv, phi_to_one_at_low_pressure, 0, nloop);
    tcase_add_test(inv, departure_smooth_where_alpha_changes_sign);
    tcase_add_loop_test(inv, gibbs_duhem_and_symmetry, 0, nloop);
    tcase_add_loop_test(inv, derivatives_match_finite_difference, 0, nloop);
    tcase_add_loop_test(inv, departures_are_consistent, 0, nloop);
    tcase_add_loop_test(inv, pure_component_limit, 0, KPHI_EOS_N_MODELS);
    tcase_add_loop_test(inv, kij_is_symmetric, 0, KPHI_EOS_N_MODELS);
    tcase_add_loop_test(inv, kij_temperature_dependence, 0, 2);
    tcase_add_loop_test(inv, liquid_like_root_flagged, 0, KPHI_EOS_N_MODELS);
    suite_add_tcase(s, inv);
    TCase *roots = tcase_create("roots");
    tcase_add_loop_test(roots, root_choice_on_three_roots, 0, KPHI_EOS_N_MODELS);
    tcase_add_test(roots, one_root_models_ignore_choice);
    tcase_add_loop_test(roots, liquid_root_invariants, 0, nloop);
    tcase_add_loop_test(roots, mathias_copeman_alpha, 0, 2);
    suite_add_tcase(s, roots);
    TCase *one = tcase_create("cases");
    tcase_add_test(one, ideal_is_ideal);
    tcase_add_test(one, pr_pure_matches_independent_formula);
    tcase_add_test(one, virial_out_of_range_fails);
    tcase_add_test(one, quantum_critical_constants);
    tcase_add_test(one, bb_root_satisfies_the_equation);
    tcase_add_test(one, bb_and_bbv_agree_at_low_pressure);
    tcase_add_loop_test(one, bb_lorentz_b0, 0, 2);
    tcase_add_test(one, bb_refuses_beyond_its_range);
    suite_add_tcase(s, one);
    TCase *e = tcase_create("errors");
    tcase_add_test(e, missing_critical_constants);
    tcase_add_test(e, bb_needs_its_constants);
    tcase_add_test(e, bad_state_is_refused);
    tcase_add_test(e, model_names_parse);
    suite_add_tcase(s, e);
    return s;
}

KPHI_TEST_MAIN(eos_suite)
