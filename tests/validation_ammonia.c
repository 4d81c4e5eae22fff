/* Validation of ammonia synthesis, N2 + 3 H2 = 2 NH3, against published data.
 *
 * 1. K(T) against the correlation of Gillespie & Beattie (1930), Phys. Rev. 36, 743,
 *    fitted to the high-pressure equilibrium data then available:
 *      log10 Ka = 2001.6/T - 2.691122 log10 T - 5.519265e-5 T + 1.848863e-7 T^2 + 2.6899
 *    for 1/2 N2 + 3/2 H2 = NH3 with a standard state of 1 atm. Coefficients seen, digit
 *    for digit, as transcribed with that citation in public code (cog-imperial/GPdoemd,
 *    GPdoemd/case_studies/analytic/bffc1990a.py). It sits a few per cent below current
 *    thermochemical tables; tolerance 10 %. The copy shipped in reactions/ammonia.yaml
 *    (K basis gillespie1930: per mole of NH3, 1 atm) must give, for N2 + 3 H2 = 2 NH3 in
 *    kphi's 1 bar basis, K = Ka^2 / 1.01325^2 at 673.15 K and 773.15 K (to 1e-12 in ln K).
 * 2. Equilibrium NH3 mole per cent for a 3:1 H2:N2 feed measured by Larson & Dodge (1923),
 *    J. Am. Chem. Soc. 45, 2918 (doi:10.1021/ja01665a017), and Larson (1924), J. Am. Chem.
 *    Soc. 46, 367 (doi:10.1021/ja01667a011), at 400, 450 and 500 °C, 10 to 1000 atm.
 *    Values seen as transcribed, with those two citations, in public code
 *    (ChemRxnEngLab/ANNH3_NNChemicalEquilibria, HSA_001_XXX/evaluation/TKA_validation_2.py).
 *    That transcription has no 400 °C point above 100 atm and no 500 °C point at 1000 atm;
 *    those four cells come from a smoothed table commonly reproduced from the same papers
 *    (from memory) and are labelled "memory" in the printed table. With Peng-Robinson:
 *    within 1.0 mole-% point from 10 to 100 atm and within 2.5 points at 300 atm, and
 *    closer to the data than the ideal gas from 100 atm up. The deviations at 600 and 1000
 *    atm are printed, not asserted.
 * 3. Every route tried toward the goal of the Beattie-Bridgeman work on the same data
 *    (routes_against_larson_dodge; the routes and their sources are listed there). */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "kphi/kphi.h"
#include "testutil.h"
#include "published_phi.h"

typedef struct {
    kphi_rxnset *set;
    kphi_eos *eos[KPHI_EOS_N_MODELS];
    kphi_equil_work *w;
    kphi_equil_result *res;
    size_t s, r;
} fixture;

static void fx_open(fixture *f)
{
    kphi_error err;
    kphi_error_clear(&err);
    f->set = kphi_rxnset_load_file("reactions/ammonia.yaml", NULL, &err);
    ck_assert_msg(f->set != NULL, "%s", err.msg);
    f->s = kphi_rxnset_n_species(f->set);
    f->r = kphi_rxnset_n_reactions(f->set);
    for (int m = 0; m < KPHI_EOS_N_MODELS; m++) {
        f->eos[m] = kphi_eos_alloc((kphi_eos_model)m, f->s);
        ck_assert_ptr_nonnull(f->eos[m]);
        for (size_t i = 0; i < f->s; i++)
            ck_assert_int_eq(
                kphi_eos_set_species(f->eos[m], i, kphi_rxnset_species(f->set, i), &err), KPHI_OK);
    }
    f->w = kphi_equil_work_alloc(f->s, f->r);
    f->res = kphi_equil_result_alloc(f->s, f->r);
}

static void fx_close(fixture *f)
{
    kphi_equil_result_free(f->res);
    kphi_equil_work_free(f->w);
    for (int m = 0; m < KPHI_EOS_N_MODELS; m++)
        kphi_eos_free(f->eos[m]);
    kphi_rxnset_free(f->set);
}

/* Equilibrium NH3 mole fraction for 1 N2 + 3 H2 with `model` and K basis b. */
static double y_nh3_basis(fixture *f, kphi_eos_model model, double T, double P, size_t b)
{
    double n0[8] = {0};
    n0[kphi_rxnset_species_index(f->set, "N2")] = 1.0;
    n0[kphi_rxnset_species_index(f->set, "H2")] = 3.0;
    kphi_error err;
    kphi_error_clear(&err);
    kphi_equil_options opt = kphi_equil_options_default();
    opt.K_basis = b;
    int rc = kphi_equil_solve(f->set, f->eos[model], T, P, n0, NULL, &opt, f->w, f->res, &err);
    ck_assert_msg(rc == KPHI_OK, "T %g P %g: %s", T, P, err.msg);
    ck_assert(f->res->max_affinity < 1e-10 && f->res->balance_error < 1e-12);
    return f->res->y[kphi_rxnset_species_index(f->set, "NH3")];
}

/* Equilibrium NH3 mole fraction for 1 N2 + 3 H2 with `model`. */
static double y_nh3(fixture *f, kphi_eos_model model, double T, double P)
{
    double n0[8] = {0};
    n0[kphi_rxnset_species_index(f->set, "N2")] = 1.0;
    n0[kphi_rxnset_species_index(f->set, "H2")] = 3.0;
    kphi_error err;
    kphi_error_clear(&err);
    int rc = kphi_equil_solve(f->set, f->eos[model], T, P, n0, NULL, NULL, f->w, f->res, &err);
    ck_assert_msg(rc == KPHI_OK, "T %g P %g: %s", T, P, err.msg);
    ck_assert(f->res->max_affinity < 1e-10 && f->res->balance_error < 1e-12);
    return f->res->y[kphi_rxnset_species_index(f->set, "NH3")];
}

/* NH3 mole % for a 3:1 H2:N2 feed when Kphi of N2 + 3 H2 = 2 NH3 is the constant
 * exp(lnkphi): solve y_NH3^2 / (y_N2 y_H2^3) = K / Kphi (P/P°)^2 for the extent x per mol N2
 * (N2 1-x, H2 3-3x, NH3 2x) by bisection; Ky rises monotonically with x. P in Pa. */
static double y_nh3_fixed_kphi(double lnK, double lnkphi, double P)
{
    double lnky = lnK - lnkphi + 2.0 * log(P / 1e5);
    double lo = 0.0, hi = 1.0;
    for (int it = 0; it < 200; it++) {
        double x = 0.5 * (lo + hi), n = 4.0 - 2.0 * x;
        double yn = (1.0 - x) / n, yh = (3.0 - 3.0 * x) / n, ya = 2.0 * x / n;
        if (2.0 * log(ya) - log(yn) - 3.0 * log(yh) < lnky)
            lo = x;
        else
            hi = x;
    }
    double x = 0.5 * (lo + hi);
    return 100.0 * 2.0 * x / (4.0 - 2.0 * x);
}

/* Gillespie & Beattie (1930), log10 Ka of 1/2 N2 + 3/2 H2 = NH3, Ka in atm^-1 (see the
 * file comment for where the digits were seen). */
static double gb1930_log10Ka(double T)
{
    return 2001.6 / T - 2.691122 * log10(T) - 5.519265e-5 * T + 1.848863e-7 * T * T + 2.6899;
}

START_TEST(shipped_gillespie_beattie_reproduces_the_published_form)
{
    fixture f;
    fx_open(&f);
    long b = kphi_rxnset_K_basis_find(f.set, "gillespie1930");
    ck_assert_int_eq(b, 1);
    const kphi_rxnset_kcorr *k = kphi_rxnset_kcorr_get(f.set, 0, (size_t)b);
    const double Ts[2] = {673.15, 773.15};
    for (int q = 0; q < 2; q++) {
        double lnKa = log(10.0) * gb1930_log10Ka(Ts[q]);
        ck_assert_double_eq_tol(kphi_rxnset_kcorr_lnK_stated(k, Ts[q]), lnKa, 1e-12);
        /* N2 + 3 H2 = 2 NH3 is twice the stated reaction; 1 atm -> 1 bar with dnu = -2 */
        ck_assert_double_eq_tol(kphi_rxnset_kcorr_lnK(k, Ts[q]), 2.0 * lnKa - 2.0 * log(1.01325),
                                1e-12);
    }
    fx_close(&f);
}
END_TEST

START_TEST(K_against_gillespie_beattie)
{
    fixture f;
    fx_open(&f);
    printf("\nK of 1/2 N2 + 3/2 H2 = NH3 (bar^-1): kphi vs Gillespie & Beattie (1930)\n");
    printf("%8s %12s %12s %8s\n", "T/K", "kphi", "G&B 1930", "ratio");
    for (double T = 600.0; T <= 800.0 + 1e-9; T += 25.0) {
        /* Ka in atm^-1 (standard state 1 atm); K in bar^-1 = Ka / 1.01325 */
        double gb = pow(10.0, gb1930_log10Ka(T)) / 1.01325;
        kphi_error err;
        kphi_error_clear(&err);
        double n0[8] = {1.0, 3.0, 0.1, 0.0, 0.0};
        ck_assert_int_eq(kphi_equil_solve(f.set, f.eos[KPHI_EOS_IDEAL], T, 1e5, n0, NULL, NULL,
                                          f.w, f.res, &err),
                         KPHI_OK);
        double k = exp(0.5 * f.res->lnK[0]); /* the set writes N2 + 3 H2 = 2 NH3 */
        printf("%8.2f %12.5g %12.5g %8.4f\n", T, k, gb, k / gb);
        ck_assert_msg(fabs(k / gb - 1.0) < 0.10, "T %g: K %g vs %g", T, k, gb);
    }
    fflush(stdout);
    fx_close(&f);
}
END_TEST

/* Larson & Dodge (1923) and Larson (1924): NH3 mole % at equilibrium, 3:1 H2:N2 feed.
 * Rows 400, 450, 500 °C; columns 10, 30, 50, 100, 300, 600, 1000 atm. LD_SEEN: as
 * transcribed in ChemRxnEngLab/ANNH3_NNChemicalEquilibria (see the file comment), NAN
 * where that table has no value. LD_MEMORY: the four missing cells from the smoothed table
 * commonly reproduced from the same papers (from memory). */
static const double LD_P_ATM[7] = {10.0, 30.0, 50.0, 100.0, 300.0, 600.0, 1000.0};
static const double LD_T_C[3] = {400.0, 450.0, 500.0};
static const double LD_SEEN[3][7] = {
    {3.85, 10.09, 15.11, 24.91, NAN, NAN, NAN},
    {2.04, 5.80, 9.17, 16.35, 35.5, 53.6, 69.4},
    {1.20, 3.48, 5.58, 10.40, 26.2, 42.1, NAN},
};
static const double LD_MEMORY[3][7] = {
    {NAN, NAN, NAN, NAN, 47.00, 65.20, 79.82},
    {NAN, NAN, NAN, NAN, NAN, NAN, NAN},
    {NAN, NAN, NAN, NAN, NAN, NAN, 57.47},
};

START_TEST(nh3_against_larson_dodge)
{
    fixture f;
    fx_open(&f);
    printf("\nNH3 mole %% at equilibrium, 3:1 H2:N2 (Larson & Dodge 1923, Larson 1924)\n");
    printf("(D&S-LR: kphi's K with the pure-gas phi of Dyson & Simon 1968 and Shaw & Wones 1964\n"
           " under the Lewis-Randall rule, as converter models use them; reported only)\n");
    printf("(pr-G&B: Peng-Robinson with K from Gillespie & Beattie 1930, --K gillespie1930; "
           "reported only)\n");
    printf("%6s %7s %8s %6s %8s %8s %8s %8s %8s %8s %8s %8s\n", "T/C", "P/atm", "data", "source",
           "pr", "srk", "rk", "virial", "ideal", "D&S-LR", "pr-data", "pr-G&B");
    for (int a = 0; a < 3; a++)
        for (int b = 0; b < 7; b++) {
            double T = LD_T_C[a] + 273.15, P = LD_P_ATM[b] * 101325.0;
            int seen = !isnan(LD_SEEN[a][b]);
            double data = seen ? LD_SEEN[a][b] : LD_MEMORY[a][b];
            ck_assert(!isnan(data));
            double pr = 100.0 * y_nh3(&f, KPHI_EOS_PR, T, P);
            double srk = 100.0 * y_nh3(&f, KPHI_EOS_SRK, T, P);
            double rk = 100.0 * y_nh3(&f, KPHI_EOS_RK, T, P);
            double vir = NAN;
            {
                double n0[8] = {0};
                n0[kphi_rxnset_species_index(f.set, "N2")] = 1.0;
                n0[kphi_rxnset_species_index(f.set, "H2")] = 3.0;
                kphi_error err;
                kphi_error_clear(&err);
                if (kphi_equil_solve(f.set, f.eos[KPHI_EOS_VIRIAL], T, P, n0, NULL, NULL, f.w,
                                     f.res, &err) == KPHI_OK)
                    vir = 100.0 * f.res->y[kphi_rxnset_species_index(f.set, "NH3")];
            }
            double ig = 100.0 * y_nh3(&f, KPHI_EOS_IDEAL, T, P);
            double dslr = y_nh3_fixed_kphi(f.res->lnK[0], ds_lnkphi(T, LD_P_ATM[b]), P);
            double prgb = 100.0 * y_nh3_basis(&f, KPHI_EOS_PR, T, P, 1);
            printf("%6.0f %7.0f %8.2f %6s %8.2f %8.2f %8.2f %8.2f %8.2f %8.2f %+8.2f %8.2f%s\n",
                   LD_T_C[a], LD_P_ATM[b], data, seen ? "seen" : "memory", pr, srk, rk, vir, ig,
                   dslr, pr - data, prgb,
                   LD_P_ATM[b] > 300.0 ? "  (reported, not asserted)" : "");
            if (LD_P_ATM[b] <= 100.0)
                ck_assert_msg(fabs(pr - data) <= 1.0, "%g C %g atm: pr %.2f vs %.2f", LD_T_C[a],
                              LD_P_ATM[b], pr, data);
            else if (LD_P_ATM[b] <= 300.0)
                ck_assert_msg(fabs(pr - data) <= 2.5, "%g C %g atm: pr %.2f vs %.2f", LD_T_C[a],
                              LD_P_ATM[b], pr, data);
            if (LD_P_ATM[b] >= 100.0 && LD_P_ATM[b] <= 300.0)
                ck_assert_msg(fabs(pr - data) < fabs(ig - data),
                              "%g C %g atm: real gas %.2f not closer than ideal %.2f to %.2f",
                              LD_T_C[a], LD_P_ATM[b], pr, ig, data);
        }
    fflush(stdout);
    fx_close(&f);
}
END_TEST

/* ------------------------------------------------------------------ routes ---- */

/* The routes tried toward the goal of the Beattie-Bridgeman work: the best model within
 * 0.5 points of Larson & Dodge / Larson at every pressure up to 300 atm and within 1.5
 * points at 600 and 1000 atm (400, 450, 500 °C). Each is a published method:
 * - pr, srk: Peng & Robinson (1976), Soave (1972), k_ij = 0 (the baseline);
 * - bb: the Beattie-Bridgeman equation (Beattie & Bridgeman 1928) with Beattie's
 *   combination (A0 square-root mean, a, B0, b, c linear, as Gillespie & Beattie 1930 used
 *   it; from memory), and bb-lor with B0 by Lorentz's rule instead;
 * - bbv: its second virial coefficient in the pressure form, Gillespie & Beattie's (1930)
 *   approximation of the mass-action function, and bbv-lor;
 * - bb-gb, bbv-gb, bbvl-gb (bbv-lor): the same with K from Gillespie & Beattie's own
 *   correlation (the K basis gillespie1930), the K they fitted together with that fugacity
 *   treatment;
 * - bb-LR: Beattie-Bridgeman pure-gas phi under the Lewis-Randall rule;
 * - srk-pen: SRK with the volume translation of Peneloux, Rauzy & Freze (1982), Fluid
 *   Phase Equilib. 8, 7, c_i = 0.40768 (R Tc/Pc)(0.29441 - Z_RA) with the Rackett Z_RA of
 *   Yamada & Gunn (1973), Z_RA = 0.29056 - 0.08775 omega (both from memory); the
 *   translation leaves the phase equilibrium of the untranslated equation unchanged and
 *   moves every ln phi_i by -c_i P/(R T);
 * - pr-q: PR with the effective critical constants of H2 (Prausnitz et al. 1999, after
 *   Gunn, Chueh & Prausnitz 1966), the hydrogen-specific treatment at hand (no published
 *   hydrogen-specific alpha with constants could be seen, so none is tried);
 * - D&S-LR: the pure-gas phi of Dyson & Simon (1968) and Shaw & Wones (1964) under the
 *   Lewis-Randall rule (tests/published_phi.h).
 * Refused states (a model outside its range) count as not meeting the goal. */
typedef enum { R_EOS, R_LR_BB, R_PENELOUX, R_DSLR } route_kind;

typedef struct {
    const char *name;
    route_kind kind;
    kphi_eos_model model;
    int lorentz, quantum, gb;
} route;

enum { N_ROUTES = 13 };
static const route ROUTES[N_ROUTES] = {
    {"pr", R_EOS, KPHI_EOS_PR, 0, 0, 0},          {"srk", R_EOS, KPHI_EOS_SRK, 0, 0, 0},
    {"bb", R_EOS, KPHI_EOS_BB, 0, 0, 0},          {"bb-lor", R_EOS, KPHI_EOS_BB, 1, 0, 0},
    {"bbv", R_EOS, KPHI_EOS_BBV, 0, 0, 0},        {"bbv-lor", R_EOS, KPHI_EOS_BBV, 1, 0, 0},
    {"bb-gb", R_EOS, KPHI_EOS_BB, 0, 0, 1},       {"bbv-gb", R_EOS, KPHI_EOS_BBV, 0, 0, 1},
    {"bbvl-gb", R_EOS, KPHI_EOS_BBV, 1, 0, 1},
    {"bb-LR", R_LR_BB, KPHI_EOS_BB, 0, 0, 0},     {"srk-pen", R_PENELOUX, KPHI_EOS_SRK, 0, 0, 0},
    {"pr-q", R_EOS, KPHI_EOS_PR, 0, 1, 0},        {"D&S-LR", R_DSLR, KPHI_EOS_IDEAL, 0, 0, 0},
};

/* Peneloux c_i in m3/mol from the species' critical constants (see above). */
static double peneloux_c(const kphi_species *sp)
{
    double zra = 0.29056 - 0.08775 * sp->omega;
    return 0.40768 * KPHI_R * sp->Tc / sp->Pc * (0.29441 - zra);
}

/* NH3 % for 1 N2 + 3 H2 when ln phi_i = ln phi_i(eos, y) + shift_i (eos NULL: shift only),
 * by bisection on the extent x per mol N2 of the affinity of N2 + 3 H2 = 2 NH3. */
static double y_nh3_phi(fixture *f, const kphi_eos *eos, const double shift[], double lnK,
                        double T, double P)
{
    size_t iN = (size_t)kphi_rxnset_species_index(f->set, "N2");
    size_t iH = (size_t)kphi_rxnset_species_index(f->set, "H2");
    size_t iA = (size_t)kphi_rxnset_species_index(f->set, "NH3");
    kphi_eos_work *w = kphi_eos_work_alloc(f->s);
    double y[8] = {0}, l[8] = {0}, lo = 0.0, hi = 1.0;
    for (int it = 0; it < 100; it++) {
        double x = 0.5 * (lo + hi), n = 4.0 - 2.0 * x;
        y[iN] = (1.0 - x) / n;
        y[iH] = 3.0 * (1.0 - x) / n;
        y[iA] = 2.0 * x / n;
        if (eos != NULL) {
            kphi_error err;
            kphi_error_clear(&err);
            ck_assert_msg(kphi_eos_eval(eos, T, P, y, l, NULL, NULL, w, &err) == KPHI_OK, "%s",
                          err.msg);
        }
        double A = -lnK - 2.0 * log(P / 1e5) + 2.0 * (log(y[iA]) + l[iA] + shift[iA]) -
                   (log(y[iN]) + l[iN] + shift[iN]) - 3.0 * (log(y[iH]) + l[iH] + shift[iH]);
        if (A < 0.0)
            lo = x;
        else
            hi = x;
    }
    kphi_eos_work_free(w);
    double x = 0.5 * (lo + hi);
    return 100.0 * 2.0 * x / (4.0 - 2.0 * x);
}

/* NH3 % of route r at T (K), P (atm); NAN when the model refuses the state. */
static double route_y(fixture *f, const route *r, kphi_eos *eos, double T, double P_atm,
                      double lnK_tables)
{
    double P = P_atm * 101325.0;
    double shift[8] = {0};
    if (r->kind == R_EOS) {
        double n0[8] = {0};
        n0[kphi_rxnset_species_index(f->set, "N2")] = 1.0;
        n0[kphi_rxnset_species_index(f->set, "H2")] = 3.0;
        kphi_equil_options opt = kphi_equil_options_default();
        opt.K_basis = r->gb ? 1 : 0;
        kphi_error err;
        kphi_error_clear(&err);
        int rc = kphi_equil_solve(f->set, eos, T, P, n0, NULL, &opt, f->w, f->res, &err);
        if (rc == KPHI_EFAILED && strstr(err.msg, "outside its range") != NULL)
            return NAN;
        ck_assert_msg(rc == KPHI_OK, "%s at %g K, %g atm: %s", r->name, T, P_atm, err.msg);
        ck_assert(f->res->max_affinity < 1e-10 && f->res->balance_error < 1e-12);
        return 100.0 * f->res->y[kphi_rxnset_species_index(f->set, "NH3")];
    }
    if (r->kind == R_DSLR)
        return y_nh3_fixed_kphi(lnK_tables, ds_lnkphi(T, P_atm), P);
    for (size_t i = 0; i < f->s; i++) {
        if (r->kind == R_LR_BB) {
            double Z;
            kphi_eos_work *w = kphi_eos_work_alloc(f->s);
            kphi_error err;
            kphi_error_clear(&err);
            int rc = kphi_eos_pure(eos, i, T, P, &Z, &shift[i], w, &err);
            kphi_eos_work_free(w);
            if (rc == KPHI_EFAILED && strstr(err.msg, "outside its range") != NULL)
                return NAN; /* pure NH3 beyond the critical density */
            ck_assert_msg(rc == KPHI_OK, "%s", err.msg);
        } else {
            shift[i] = -peneloux_c(kphi_rxnset_species(f->set, i)) * P / (KPHI_R * T);
        }
    }
    return y_nh3_phi(f, r->kind == R_PENELOUX ? eos : NULL, shift, lnK_tables, T, P);
}

START_TEST(routes_against_larson_dodge)
{
    fixture f;
    fx_open(&f);
    kphi_eos *eos[N_ROUTES];
    for (int r = 0; r < N_ROUTES; r++) {
        eos[r] = kphi_eos_alloc(ROUTES[r].model, f.s);
        ck_assert_ptr_nonnull(eos[r]);
        kphi_eos_set_bb_lorentz(eos[r], ROUTES[r].lorentz);
        for (size_t i = 0; i < f.s; i++)
            ck_assert_int_eq(kphi_eos_set_species(eos[r], i, kphi_rxnset_species(f.set, i), NULL),
                             KPHI_OK);
        kphi_eos_set_quantum(eos[r], ROUTES[r].quantum);
    }
    printf("\nRoutes toward the Larson & Dodge / Larson NH3 mole %%: model - data, points\n");
    printf("%5s %6s %7s", "T/C", "P/atm", "data");
    for (int r = 0; r < N_ROUTES; r++)
        printf(" %7s", ROUTES[r].name);
    printf("\n");
    double dev[N_ROUTES][3][7];
    for (int a = 0; a < 3; a++)
        for (int b = 0; b < 7; b++) {
            double T = LD_T_C[a] + 273.15;
            double data = isnan(LD_SEEN[a][b]) ? LD_MEMORY[a][b] : LD_SEEN[a][b];
            (void)y_nh3(&f, KPHI_EOS_IDEAL, T, 1e5); /* for K of the tables at T */
            double lnK = f.res->lnK[0];
            printf("%5.0f %6.0f %7.2f", LD_T_C[a], LD_P_ATM[b], data);
            for (int r = 0; r < N_ROUTES; r++) {
                double y = route_y(&f, &ROUTES[r], eos[r], T, LD_P_ATM[b], lnK);
                dev[r][a][b] = y - data;
                if (isnan(y))
                    printf(" %7s", "refused");
                else
                    printf(" %+7.2f", y - data);
            }
            printf("%s\n", isnan(LD_SEEN[a][b]) ? "  (data from memory)" : "");
        }
    /* per route: the largest |deviation| up to 300 atm and at 600/1000 atm, over every
     * cell and over the cells seen in the transcription (the goal is on the data; four
     * cells are from memory). The best route is the one nearest the goal on the seen
     * cells, max(worst up to 300 atm / 0.5, worst at 600 and 1000 atm / 1.5). */
    double lo[N_ROUTES][2], hi[N_ROUTES][2]; /* [all, seen] */
    int best = -1;
    for (int r = 0; r < N_ROUTES; r++) {
        lo[r][0] = lo[r][1] = hi[r][0] = hi[r][1] = 0.0;
        for (int a = 0; a < 3; a++)
            for (int b = 0; b < 7; b++) {
                double d = isnan(dev[r][a][b]) ? INFINITY : fabs(dev[r][a][b]);
                double(*w)[2] = LD_P_ATM[b] <= 300.0 ? lo : hi;
                w[r][0] = fmax(w[r][0], d);
                if (!isnan(LD_SEEN[a][b]))
                    w[r][1] = fmax(w[r][1], d);
            }
        if (best < 0 || fmax(lo[r][1] / 0.5, hi[r][1] / 1.5) <
                            fmax(lo[best][1] / 0.5, hi[best][1] / 1.5))
            best = r;
    }
    printf("largest |model - data|, points (goal: 0.5 up to 300 atm, 1.5 at 600 and 1000 atm)\n");
    printf("%-9s %21s %21s   %s\n", "route", "<= 300 atm all/seen", "600-1000 all/seen",
           "goal on all cells / on the seen cells");
    for (int r = 0; r < N_ROUTES; r++)
        printf("%-9s %10.2f %10.2f %10.2f %10.2f   %s / %s\n", ROUTES[r].name, lo[r][0],
               lo[r][1], hi[r][0], hi[r][1],
               lo[r][0] <= 0.5 && hi[r][0] <= 1.5 ? "met" : "not met",
               lo[r][1] <= 0.5 && hi[r][1] <= 1.5 ? "met" : "not met");
    /* the best route against PR point by point: the condition for making it the ammonia
     * set's default model (DEVELOPERS.md) */
    int as_good = 1;
    for (int a = 0; a < 3; a++)
        for (int b = 0; b < 7; b++)
            if (!(fabs(dev[best][a][b]) <= fabs(dev[0][a][b]) + 1e-9))
                as_good = 0;
    printf("best route: %s (largest deviation on the seen cells %.2f points up to 300 atm, "
           "%.2f at 600 and 1000 atm; on every cell %.2f and %.2f); %s as good as pr at every "
           "point\n",
           ROUTES[best].name, lo[best][1], hi[best][1], lo[best][0], hi[best][0],
           as_good ? "" : "not");
    fflush(stdout);
    /* what is met, asserted: bbv with Gillespie & Beattie's K meets the goal on every seen
     * cell, and the 600/1000 atm part on every cell; the one cell it misses up to 300 atm
     * is 400 °C, 300 atm, from memory (printed above) */
    ck_assert_str_eq(ROUTES[best].name, "bbv-gb");
    ck_assert_double_le(lo[best][1], 0.5);
    ck_assert_double_le(hi[best][0], 1.5);
    ck_assert_double_gt(lo[best][0], 0.5); /* the miss, so this line changes if it goes */
    /* the 600/1000 atm goal is met by bbv on the tables' K as well */
    ck_assert_double_le(hi[4][0], 1.5);
    /* bb refuses Larson's 1000 atm states (beyond the critical density) */
    ck_assert(isnan(dev[2][0][6]) && isnan(dev[2][1][6]) && isnan(dev[2][2][6]));
    /* the shipped ammonia set recommends a model other than pr only if it is as good */
    kphi_eos_model rec;
    if (kphi_rxnset_eos(f.set, &rec, NULL))
        ck_assert_msg(rec == KPHI_EOS_PR || (as_good && rec == ROUTES[best].model),
                      "reactions/ammonia.yaml recommends %s", kphi_eos_model_name(rec));
    for (int r = 0; r < N_ROUTES; r++)
        kphi_eos_free(eos[r]);
    fx_close(&f);
}
END_TEST

START_TEST(real_gas_raises_conversion_and_k_identity_holds)
{
    /* At 100-300 bar in the ammonia loop Kphi < 1 (NH3 has phi < 1, H2 and N2 phi > 1),
     * so the real-gas conversion exceeds the ideal one (common practice: the fugacity
     * correction favours synthesis at loop pressure). And K = Kphi Ky (P/P°)^dnu. */
    fixture f;
    fx_open(&f);
    for (double P = 103e5; P <= 300e5; P += 49e5) {
        double yr = y_nh3(&f, KPHI_EOS_PR, 713.15, P);
        double lk = f.res->lnK[0], lkp = f.res->lnKphi[0], lky = f.res->lnKy[0];
        ck_assert_msg(lkp < 0.0, "Kphi %g at %g Pa", exp(lkp), P);
        ck_assert_double_eq_tol(lk, lkp + lky - 2.0 * log(P / 1e5), 1e-9);
        double yi = y_nh3(&f, KPHI_EOS_IDEAL, 713.15, P);
        ck_assert_msg(yr > yi, "P %g: real %g ideal %g", P, yr, yi);
    }
    fx_close(&f);
}
END_TEST

START_TEST(low_pressure_limit_real_equals_ideal)
{
    /* As P -> 0 every phi -> 1 and the real answer equals the ideal one to 1e-6. */
    fixture f;
    fx_open(&f);
    for (int m = 1; m < KPHI_EOS_N_MODELS; m++) {
        double yr = y_nh3(&f, (kphi_eos_model)m, 623.15, 10.0);
        for (size_t i = 0; i < f.s; i++)
            ck_assert_msg(fabs(f.res->lnphi[i]) < 1e-6, "%s: ln phi %g",
                          kphi_eos_model_name((kphi_eos_model)m), f.res->lnphi[i]);
        double yi = y_nh3(&f, KPHI_EOS_IDEAL, 623.15, 10.0);
        ck_assert_msg(fabs(yr - yi) < 1e-6, "%s: %g vs %g",
                      kphi_eos_model_name((kphi_eos_model)m), yr, yi);
    }
    fx_close(&f);
}
END_TEST

static Suite *ammonia_suite(void)
{
    Suite *s = suite_create("validation_ammonia");
    TCase *tc = tcase_create("published");
    tcase_set_timeout(tc, 60);
    tcase_add_test(tc, shipped_gillespie_beattie_reproduces_the_published_form);
    tcase_add_test(tc, K_against_gillespie_beattie);
    tcase_add_test(tc, nh3_against_larson_dodge);
    tcase_add_test(tc, routes_against_larson_dodge);
    tcase_add_test(tc, real_gas_raises_conversion_and_k_identity_holds);
    tcase_add_test(tc, low_pressure_limit_real_equals_ideal);
    suite_add_tcase(s, tc);
    return s;
}

KPHI_TEST_MAIN(ammonia_suite)
