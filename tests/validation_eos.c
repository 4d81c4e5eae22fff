/* Validation of the eos module against published data.
 *
 * 1. Compressibility factors of pure N2, CH4 and H2 at 300-700 K and 100-300 bar.
 *    Reference Z values are computed here from published reference correlations:
 *    - N2 and CH4: the 12-term "short" Helmholtz equations of Span & Wagner (2003),
 *      Int. J. Thermophys. 24, 41-109 (their nonpolar functional form, exponents and
 *      fluid-specific coefficients; table numbers from memory). They follow the reference
 *      equations of Span et al. (2000, N2) and Setzmann & Wagner (1991, CH4) to about
 *      0.2% in density here (from memory). Coefficients from memory, agreeing digit for
 *      digit with a secondary transcription; checked below against the published test
 *      value P(700 K, 200 kg/m3) = 51.268 MPa for N2 (Span & Wagner 2003, Table III,
 *      seen in a secondary transcription).
 *    - H2: the density equation of Lemmon, Huber & Leachman (2008), J. Res. NIST 113,
 *      341-350 (Z = 1 + sum a_i (100 K/T)^b_i (P/MPa)^c_i, nine terms),
 *      which matches the Leachman et al. (2009) reference equation within 0.01% from 220
 *      to 1000 K up to 70 MPa. Coefficients as printed there, seen in three independent
 *      transcriptions; checked below against Z(273.15/298.15/323.15 K, 100 bar) =
 *      1.0637/1.0601/1.0567 tabulated by the Hydrogen Analysis Resource Center (from the
 *      Leachman et al. 2009 equation; seen in a secondary transcription).
 *    Tolerances: cubic equations of state represent supercritical gas Z to a few percent
 *    (Poling, Prausnitz & O'Connell 2001, ch. 4); here every point within 5% and the mean
 *    over each grid within 2.5%. The virial series truncated after B is checked only where
 *    the reference density is below 0.35 of the critical density (common practice: the
 *    two-term series serves up to roughly half the critical density), within 2%.
 *    H2 is checked with its classical constants for the cubics and with the quantum-gas
 *    effective constants for the virial (Prausnitz, Lichtenthaler & de Azevedo 1999,
 *    ch. 5, recommend them for second virial coefficients of quantum gases).
 * 2. The vapour pressure at Tr = 0.7. The acentric factor is defined by
 *    omega = -1 - log10(Psat/Pc) at Tr = 0.7 (Pitzer et al. 1955), and the alpha
 *    functions of SRK (Soave 1972) and PR (Peng & Robinson 1976; Robinson & Peng 1978 for
 *    omega > 0.491) were fitted to reproduce it. Psat is found here as the pressure where
 *    the module's liquid-like root starts to have the lower Gibbs energy; -1 - log10(Pr)
 *    must return omega within 0.01 (common practice for the quality of those fits).
 * 3. Beattie-Bridgeman (bb, bbv): the Z of item 1 with the constants of
 *    reactions/species.yaml (bb_pure_gas_z_against_reference states its sources and
 *    tolerances), and N2 up to the model's range limit, the critical density.
 *
 * Critical constants: Poling, Prausnitz & O'Connell (2001), "The Properties of Gases and
 * Liquids", 5th ed., Appendix A, the values carried in reactions/species.yaml (Tc, Pc,
 * omega seen as reproduced from that appendix; Vc, Zc partly from memory). H2 quantum-gas
 * constants: Prausnitz et al. (1999), 3rd ed., ch. 5 (Tc0 = 43.6 K, Pc0 = 20.5 bar,
 * c1 = 21.8 K, c2 = 44.2 K; from memory, agreeing with secondary uses).
 *
 * Open: no textbook worked example of a Peng-Robinson fugacity coefficient could be seen
 * to reproduce to its printed digits; none is invented here. */
#include "kphi/eos.h"

#include <check.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "testutil.h"

/* ----------------------------------------------------- reference correlations --- */

/* Span & Wagner (2003), nonpolar short form: exponents d_i, t_i, c_i. */
static const double sw_d[12] = {1, 1, 1, 2, 3, 7, 2, 5, 1, 4, 3, 4};
static const double sw_t[12] = {0.25, 1.125, 1.5, 1.375, 0.25, 0.875,
                                0.625, 1.75, 3.625, 3.625, 14.5, 12.0};
static const int sw_c[12] = {0, 0, 0, 0, 0, 0, 1, 1, 2, 2, 3, 3};

typedef struct {
    double n[12]; /* coefficients */
    double Tc;    /* K, reducing temperature */
    double rhoc;  /* mol/m3, reducing density */
} sw_fluid;

/* Span & Wagner (2003), nitrogen and methane (from memory, see the file comment);
 * reducing parameters Tc = 126.192 K, rho_c = 313.3 kg/m3 / 28.013 g/mol (N2) and
 * Tc = 190.564 K, rho_c = 162.66 kg/m3 / 16.043 g/mol (CH4). */
static const sw_fluid sw_n2 = {{0.92296567, -0.25575012e1, 0.64482463, 0.1083102e-1,
                                0.73924167e-1, 0.23532962e-3, 0.18024854, -0.45660299e-1,
                                -0.1552106, -0.3811149e-1, -0.31962422e-1, 0.15513532e-1},
                               126.192,
                               313.3 / 28.013e-3};
static const sw_fluid sw_ch4 = {{0.89269676, -0.25438282e1, 0.64980978, 0.20793471e-1,
                                 0.70189104e-1, 0.23700378e-3, 0.16653334, -0.43855669e-1,
                                 -0.1572678, -0.35311675e-1, -0.29570024e-1, 0.14019842e-1},
                                190.564,
                                162.66 / 16.043e-3};
static const double R_SW = 8.31451; /* J/(mol K), the gas constant of Span & Wagner 2003 */

/* Z = 1 + delta d(alpha_r)/d(delta) at T (K) and molar density rho (mol/m3). */
static double sw_z(const sw_fluid *f, double T, double rho)
{
    double tau = f->Tc / T, del = rho / f->rhoc, s = 0.0;
    for (int i = 0; i < 12; i++) {
        double term = f->n[i] * pow(del, sw_d[i]) * pow(tau, sw_t[i]);
        if (sw_c[i] == 0) {
            s += term * sw_d[i];
        } else {
            double dc = pow(del, sw_c[i]);
            s += term * exp(-dc) * (sw_d[i] - sw_c[i] * dc);
        }
    }
    return 1.0 + s;
}

/* Z at T (K) and P (Pa), density found by successive substitution (gas states). */
static double sw_z_tp(const sw_fluid *f, double T, double P, double *rho_out)
{
    double rho = P / (R_SW * T);
    for (int k = 0; k < 500; k++) {
        double rn = P / (R_SW * T * sw_z(f, T, rho));
        if (fabs(rn - rho) <= 1e-14 * rho) {
            rho = rn;
            break;
        }
        rho = rn;
    }
    double Z = sw_z(f, T, rho);
    ck_assert_double_le(fabs(rho * R_SW * T * Z - P), 1e-9 * P); /* converged */
    *rho_out = rho;
    return Z;
}

/* Lemmon, Huber & Leachman (2008), normal hydrogen: a_i, b_i, c_i as printed. */
static double h2_z(double T, double P)
{
    static const double a[9] = {0.05888460,   -0.06136111,  -0.002650473,
                                0.002731125,  0.001802374,  -0.001150707,
                                0.9588528e-4, -0.1109040e-6, 0.1264403e-9};
    static const double b[9] = {1.325, 1.87, 2.5, 2.8, 2.938, 3.14, 3.37, 3.75, 4.0};
    static const double c[9] = {1.0, 1.0, 2.0, 2.0, 2.42, 2.63, 3.0, 4.0, 5.0};
    double s = 0.0;
    for (int i = 0; i < 9; i++)
        s += a[i] * pow(100.0 / T, b[i]) * pow(P / 1e6, c[i]);
    return 1.0 + s;
}

START_TEST(reference_correlations_transcribed)
{
    /* Span & Wagner 2003, Table III: N2 at 700 K and 200 kg/m3, P = 51.268 MPa */
    double rho = 200.0 / 28.013e-3;
    double P = rho * R_SW * 700.0 * sw_z(&sw_n2, 700.0, rho);
    ck_assert_double_le(fabs(P / 1e6 - 51.268), 0.001); /* MPa, printed digits */
    /* HyARC table from the Leachman et al. 2009 equation: Z of H2 at 100 bar */
    ck_assert_double_le(fabs(h2_z(273.15, 1e7) - 1.0637), 1.5e-4);
    ck_assert_double_le(fabs(h2_z(298.15, 1e7) - 1.0601), 1.5e-4);
    ck_assert_double_le(fabs(h2_z(323.15, 1e7) - 1.0567), 1.5e-4);
}
END_TEST

/* ------------------------------------------------------------------- species --- */

static kphi_species make_species(const char *name, double M, double Tc, double Pc_bar,
                                 double Vc_cm3, double Zc, double omega)
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
    sp.path = "validation_eos.c";
    return sp;
}

/* Poling et al. 2001, App. A (as in reactions/species.yaml): M kg/mol, Tc K, Pc bar,
 * Vc cm3/mol, Zc, omega */
static kphi_species val_species(int k)
{
    switch (k) {
    case 0:
        return make_species("N2", 28.0134e-3, 126.20, 33.98, 89.20, 0.289, 0.037);
    case 1:
        return make_species("CH4", 16.0425e-3, 190.56, 45.99, 98.60, 0.286, 0.011);
    default: {
        kphi_species s = make_species("H2", 2.01588e-3, 33.19, 13.13, 64.147, 0.305, -0.216);
        s.has_quantum = 1;
        s.q_Tc0 = 43.6;   /* K */
        s.q_Pc0 = 20.5e5; /* Pa */
        s.q_c1 = 21.8;    /* K */
        s.q_c2 = 44.2;    /* K */
        return s;
    }
    }
}

/* Reference Z and reduced density of species k (0 N2, 1 CH4, 2 H2) at T, P. */
static double reference_z(int k, double T, double P, double *rho_red)
{
    double rho, Z;
    if (k == 0) {
        Z = sw_z_tp(&sw_n2, T, P, &rho);
        *rho_red = rho / sw_n2.rhoc;
    } else if (k == 1) {
        Z = sw_z_tp(&sw_ch4, T, P, &rho);
        *rho_red = rho / sw_ch4.rhoc;
    } else {
        Z = h2_z(T, P);
        rho = P / (8.314462618 * T * Z);
        *rho_red = rho / 15508.0; /* rho_c of normal H2, 15.508 mol/L (Leachman et al.
                                     2009; from memory) */
    }
    return Z;
}

/* Loop index: species k = _i / 4, model = 1 + _i % 4 (virial, rk, srk, pr). */
START_TEST(pure_gas_z_against_reference)
{
    int k = _i / 4;
    kphi_eos_model model = (kphi_eos_model)(1 + _i % 4);
    int quantum = (k == 2 && model == KPHI_EOS_VIRIAL);
    kphi_species sp = val_species(k);
    kphi_eos *eos = kphi_eos_alloc(model, 1);
    kphi_eos_work *w = kphi_eos_work_alloc(1);
    ck_assert_int_eq(kphi_eos_set_species(eos, 0, &sp, NULL), KPHI_OK);
    kphi_eos_set_quantum(eos, quantum);
    const double Ts[5] = {300.0, 400.0, 500.0, 600.0, 700.0};
    const double Ps[3] = {100e5, 200e5, 300e5};
    int nT = k == 1 ? 4 : 5; /* the CH4 reference stops at 625 K */
    double sum = 0.0;
    int count = 0;
    for (int a = 0; a < nT; a++) {
        for (int b = 0; b < 3; b++) {
            double rr, zref = reference_z(k, Ts[a], Ps[b], &rr);
            if (model == KPHI_EOS_VIRIAL && rr > 0.35)
                continue;
            double Z, lnphi;
            kphi_error err;
            kphi_error_clear(&err);
            int rc = kphi_eos_pure(eos, 0, Ts[a], Ps[b], &Z, &lnphi, w, &err);
            ck_assert_msg(rc == KPHI_OK, "%s %s: %s", sp.name, kphi_eos_model_name(model),
                          err.msg);
            double dev = (Z - zref) / zref;
            double tol = model == KPHI_EOS_VIRIAL ? 0.02 : 0.05;
            ck_assert_msg(fabs(dev) <= tol, "%s %s at %.0f K, %.0f bar: Z = %.5f, reference %.5f",
                          sp.name, kphi_eos_model_name(model), Ts[a], Ps[b] / 1e5, Z, zref);
            sum += fabs(dev);
            count++;
        }
    }
    ck_assert_int_ge(count, 3);
    if (model != KPHI_EOS_VIRIAL)
        ck_assert_msg(sum / count <= 0.025, "%s %s: mean deviation %.2f%%", sp.name,
                      kphi_eos_model_name(model), 100.0 * sum / count);
    kphi_eos_work_free(w);
    kphi_eos_free(eos);
}
END_TEST

/* Beattie-Bridgeman constants of species k (0 N2, 1 CH4, 2 H2) as in
 * reactions/species.yaml, converted to SI: N2 and H2 seen in a textbook table reproducing
 * Beattie & Bridgeman (1928) in kPa m3/kmol units (N2: A0 136.2315, a 0.02617, B0 0.05046,
 * b -0.00691, c 4.20e4; H2: A0 20.0117, a -0.00506, B0 0.02096, b -0.04359, c 504); CH4
 * (Beattie & Bridgeman 1928) from memory in atm L/mol units (A0 2.2769, a 0.01855, B0
 * 0.05587, b -0.01587, c 12.83e4). */
static kphi_species bb_species(int k)
{
    kphi_species s = val_species(k);
    static const double kpa[3][5] = {{136.2315, 0.02617, 0.05046, -0.00691, 4.20e4},
                                     {2.2769 * 101.325, 0.01855, 0.05587, -0.01587, 12.83e4},
                                     {20.0117, -0.00506, 0.02096, -0.04359, 504.0}};
    s.has_bb = 1;
    s.bb_A0 = kpa[k][0] * 1e-3; /* kPa m6/kmol2 -> Pa m6/mol2 */
    s.bb_a = kpa[k][1] * 1e-3;  /* m3/kmol -> m3/mol */
    s.bb_B0 = kpa[k][2] * 1e-3;
    s.bb_b = kpa[k][3] * 1e-3;
    s.bb_c = kpa[k][4] * 1e-3;
    s.has_quantum = 0;
    return s;
}

/* Beattie-Bridgeman (bb) and its second virial form (bbv): pure-gas Z of N2, CH4 and H2
 * on the grid of pure_gas_z_against_reference (300-700 K, 100-300 bar), printed beside
 * the reference equations and PR. Asserted for bb: every point within 2.5 % and the mean
 * per gas within 1.1 % (what it achieves here: worst 2.25 %, H2 at 300 K and 300 bar,
 * where Beattie-Bridgeman overshoots; means 0.28 % N2, 0.42 % CH4, 1.03 % H2; the cubics
 * are held to 5 %/2.5 %). CH4 at 300 K and 300 bar lies beyond the critical density and
 * is refused, as it must be. bbv within 3 % where the reference density is below 0.35 of
 * the critical (as for the virial model). Then bb for N2 up to its range limit, the
 * critical density: 400-700 K and 400-800 bar, within 1.5 % wherever bb accepts the state
 * (worst -1.46 % at 500 K, 600 bar, 0.96 of the critical density), refused only beyond
 * 0.95 of the reference critical density (kphi's limit uses Kay's Vc, 89.2 cm3/mol for N2,
 * the reference 1/rho_c = 89.4 cm3/mol). */
START_TEST(bb_pure_gas_z_against_reference)
{
    const double Ts[5] = {300.0, 400.0, 500.0, 600.0, 700.0};
    const double Ps[3] = {100e5, 200e5, 300e5};
    static const char *const names[3] = {"N2", "CH4", "H2"};
    printf("\nPure-gas Z: Beattie-Bridgeman (bb, bbv) and PR vs reference equations\n");
    printf("%4s %6s %6s %9s %9s %8s %9s %8s %9s %8s\n", "gas", "T/K", "P/bar", "reference",
           "bb", "dev %", "bbv", "dev %", "pr", "dev %");
    double worst_bb = 0.0;
    for (int k = 0; k < 3; k++) {
        kphi_species sp = bb_species(k);
        kphi_eos *bb = kphi_eos_alloc(KPHI_EOS_BB, 1), *bbv = kphi_eos_alloc(KPHI_EOS_BBV, 1),
                 *pr = kphi_eos_alloc(KPHI_EOS_PR, 1);
        kphi_eos_work *w = kphi_eos_work_alloc(1);
        ck_assert_int_eq(kphi_eos_set_species(bb, 0, &sp, NULL), KPHI_OK);
        ck_assert_int_eq(kphi_eos_set_species(bbv, 0, &sp, NULL), KPHI_OK);
        ck_assert_int_eq(kphi_eos_set_species(pr, 0, &sp, NULL), KPHI_OK);
        int nT = k == 1 ? 4 : 5; /* the CH4 reference stops at 625 K */
        double sum = 0.0;
        int count = 0;
        for (int a = 0; a < nT; a++)
            for (int b = 0; b < 3; b++) {
                double rr, zref = reference_z(k, Ts[a], Ps[b], &rr), z1, z2, z3, l;
                ck_assert_int_eq(kphi_eos_pure(pr, 0, Ts[a], Ps[b], &z3, &l, w, NULL), KPHI_OK);
                int vok = kphi_eos_pure(bbv, 0, Ts[a], Ps[b], &z2, &l, w, NULL) == KPHI_OK;
                int ok = kphi_eos_pure(bb, 0, Ts[a], Ps[b], &z1, &l, w, NULL) == KPHI_OK;
                double d1 = ok ? 100.0 * (z1 / zref - 1.0) : NAN;
                double d2 = vok ? 100.0 * (z2 / zref - 1.0) : NAN;
                printf("%4s %6.0f %6.0f %9.5f %9.5f %+8.2f %9.5f %+8.2f %9.5f %+8.2f%s\n",
                       names[k], Ts[a], Ps[b] / 1e5, zref, ok ? z1 : NAN, d1, vok ? z2 : NAN, d2,
                       z3, 100.0 * (z3 / zref - 1.0), ok ? "" : "  bb refused: beyond its range");
                if (!ok) { /* only beyond the critical density (CH4 at 300 K, 300 bar) */
                    ck_assert_msg(rr > 0.95, "%s refused at %g K, %g bar, rho/rho_c %.2f",
                                  names[k], Ts[a], Ps[b] / 1e5, rr);
                    continue;
                }
                ck_assert_msg(fabs(d1) <= 2.5, "%s bb at %g K, %g bar: %.2f %%", names[k],
                              Ts[a], Ps[b] / 1e5, d1);
                if (rr <= 0.35)
                    ck_assert_msg(vok && fabs(d2) <= 3.0, "%s bbv at %g K, %g bar: %.2f %%",
                                  names[k], Ts[a], Ps[b] / 1e5, d2);
                worst_bb = fmax(worst_bb, fabs(d1));
                sum += fabs(d1);
                count++;
            }
        ck_assert_msg(sum / count <= 1.1, "%s bb: mean deviation %.2f %%", names[k], sum / count);
        printf("%4s bb mean |deviation| %.2f %%\n", names[k], sum / count);
        kphi_eos_work_free(w);
        kphi_eos_free(bb);
        kphi_eos_free(bbv);
        kphi_eos_free(pr);
    }
    printf("bb worst |deviation| %.2f %%\n", worst_bb);
    /* N2 up to the critical density (Span et al. 2000: rho_c = 313.3 kg/m3, as sw_n2) */
    kphi_species sp = bb_species(0);
    kphi_eos *bb = kphi_eos_alloc(KPHI_EOS_BB, 1);
    kphi_eos_work *w = kphi_eos_work_alloc(1);
    ck_assert_int_eq(kphi_eos_set_species(bb, 0, &sp, NULL), KPHI_OK);
    printf("%4s %6s %6s %9s %9s %8s %10s\n", "gas", "T/K", "P/bar", "reference", "bb", "dev %",
           "rho/rho_c");
    int accepted = 0, refused = 0;
    for (double T = 400.0; T <= 700.0; T += 100.0)
        for (double P = 400e5; P <= 800e5 + 1; P += 100e5) {
            double rr, zref = reference_z(0, T, P, &rr), z, l;
            kphi_error err;
            kphi_error_clear(&err);
            int rc = kphi_eos_pure(bb, 0, T, P, &z, &l, w, &err);
            if (rc != KPHI_OK) {
                /* refused only beyond the limit (Kay's Vc = 89.2 cm3/mol here, 3 % above
                 * the reference's 1/rho_c) */
                ck_assert_int_eq(rc, KPHI_EFAILED);
                ck_assert_msg(rr > 0.95, "refused at %g K, %g bar, rho/rho_c %.2f", T, P / 1e5, rr);
                printf("%4s %6.0f %6.0f %9.5f %9s %8s %10.3f  refused\n", "N2", T, P / 1e5, zref,
                       "-", "-", rr);
                refused++;
                continue;
            }
            double d = 100.0 * (z / zref - 1.0);
            printf("%4s %6.0f %6.0f %9.5f %9.5f %+8.2f %10.3f\n", "N2", T, P / 1e5, zref, z, d,
                   rr);
            ck_assert_msg(fabs(d) <= 1.5, "N2 bb at %g K, %g bar: %.2f %%", T, P / 1e5, d);
            accepted++;
        }
    ck_assert_int_gt(accepted, 6);
    ck_assert_int_gt(refused, 0);
    fflush(stdout);
    kphi_eos_work_free(w);
    kphi_eos_free(bb);
}
END_TEST

/* The effective constants of Prausnitz et al. (1999) improve the virial Z of H2. */
START_TEST(quantum_constants_improve_h2_virial)
{
    kphi_species sp = val_species(2);
    kphi_eos *eos = kphi_eos_alloc(KPHI_EOS_VIRIAL, 1);
    kphi_eos_work *w = kphi_eos_work_alloc(1);
    ck_assert_int_eq(kphi_eos_set_species(eos, 0, &sp, NULL), KPHI_OK);
    double dev[2] = {0.0, 0.0};
    for (int q = 0; q < 2; q++) {
        kphi_eos_set_quantum(eos, q);
        for (double T = 323.15; T < 750.0; T += 100.0) {
            double rr, zref = reference_z(2, T, 150e5, &rr), Z, l;
            ck_assert_int_eq(kphi_eos_pure(eos, 0, T, 150e5, &Z, &l, w, NULL), KPHI_OK);
            dev[q] += fabs(Z - zref) / zref;
        }
    }
    ck_assert_double_lt(dev[1], 0.5 * dev[0]);
    kphi_eos_work_free(w);
    kphi_eos_free(eos);
}
END_TEST

/* Vapour pressure at Tr = 0.7 returns omega (Pitzer et al. 1955; Soave 1972; Peng &
 * Robinson 1976; Robinson & Peng 1978). Loop: model srk/pr times five omegas. */
START_TEST(vapour_pressure_reproduces_omega)
{
    static const double omegas[5] = {0.011, 0.2, 0.344, 0.565, 0.8};
    kphi_eos_model model = _i < 5 ? KPHI_EOS_SRK : KPHI_EOS_PR;
    double omega = omegas[_i % 5];
    const double Tc = 507.6, Pc = 30.25e5; /* any fluid: only the reduced state matters */
    kphi_species sp = make_species("X", 0.08618, Tc, Pc / 1e5, 0.0, 0.0, omega);
    kphi_eos *eos = kphi_eos_alloc(model, 1);
    kphi_eos_work *w = kphi_eos_work_alloc(1);
    ck_assert_int_eq(kphi_eos_set_species(eos, 0, &sp, NULL), KPHI_OK);
    const double T = 0.7 * Tc, y[1] = {1.0};
    double l[1], lo = 1e2, hi = Pc;
    kphi_eos_state st;
    ck_assert_int_eq(kphi_eos_eval(eos, T, lo, y, l, NULL, &st, w, NULL), KPHI_OK);
    ck_assert_int_eq(st.may_condense, 0);
    ck_assert_int_eq(kphi_eos_eval(eos, T, hi, y, l, NULL, &st, w, NULL), KPHI_OK);
    ck_assert_int_eq(st.may_condense, 1);
    for (int it = 0; it < 60; it++) {
        double mid = sqrt(lo * hi);
        ck_assert_int_eq(kphi_eos_eval(eos, T, mid, y, l, NULL, &st, w, NULL), KPHI_OK);
        if (st.may_condense)
            hi = mid;
        else
            lo = mid;
    }
    double omega_eos = -1.0 - log10(sqrt(lo * hi) / Pc);
    ck_assert_msg(fabs(omega_eos - omega) <= 0.01, "%s: omega %.3f gives %.4f",
                  kphi_eos_model_name(model), omega, omega_eos);
    kphi_eos_work_free(w);
    kphi_eos_free(eos);
}
END_TEST

static Suite *validation_eos_suite(void)
{
    Suite *s = suite_create("validation_eos");
    TCase *tc = tcase_create("published");
    tcase_add_test(tc, reference_correlations_transcribed);
    tcase_add_loop_test(tc, pure_gas_z_against_reference, 0, 12);
    tcase_add_test(tc, bb_pure_gas_z_against_reference);
    tcase_add_test(tc, quantum_constants_improve_h2_virial);
    tcase_add_loop_test(tc, vapour_pressure_reproduces_omega, 0, 10);
    suite_add_tcase(s, tc);
    return s;
}

KPHI_TEST_MAIN(validation_eos_suite)
