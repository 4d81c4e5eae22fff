/* Tests of the energy part of equil (src/equil_energy.c): the mixture enthalpy, the
 * adiabatic equilibrium outlet and the approach temperature, on the shipped ammonia and
 * methanol sets with the ideal gas and Peng-Robinson.
 *
 * Feeds are the invented converter cases cases/ammonia_converter.yaml and
 * cases/methanol_converter.yaml; conditions are chosen with some entropy (673.15 K,
 * 19.5 MPa; 498.15 K, 7.9 MPa). No check here compares with a published number: they
 * are consistency checks of the energy balance and of the roots,
 * and one comparison with the constant-heat-capacity estimate of the temperature rise
 * (common practice), with its tolerance stated. */
#include "kphi/equil.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include "kphi/rxnset.h"
#include "kphi/thermo.h"
#include "testutil.h"

typedef struct {
    kphi_rxnset *set;
    kphi_eos *eos;
    kphi_equil_work *w;
    kphi_equil_result *res, *chk;
    size_t s, r;
    double n0[8];
    double T, P; /* inlet / outlet temperature K, pressure Pa */
} fixture;

static const char *const AMMONIA_NAMES[] = {"N2", "H2", "NH3", "CH4", "Ar"};
static const double AMMONIA_FEED[] = {22.4, 67.2, 3.1, 4.6, 2.7}; /* cases/ammonia_converter */
static const char *const METHANOL_NAMES[] = {"CO", "CO2", "H2", "CH3OH", "H2O", "CH4", "N2"};
static const double METHANOL_FEED[] = {9.8, 3.6, 70.5, 0.6, 0.4, 11.9, 3.2};

static void fx_open_set(fixture *f, kphi_rxnset *set, kphi_eos_model model)
{
    kphi_error err;
    kphi_error_clear(&err);
    f->set = set;
    f->s = kphi_rxnset_n_species(f->set);
    f->r = kphi_rxnset_n_reactions(f->set);
    ck_assert_uint_le(f->s, 8);
    f->eos = kphi_eos_alloc(model, f->s);
    ck_assert_ptr_nonnull(f->eos);
    for (size_t i = 0; i < f->s; i++)
        ck_assert_int_eq(kphi_eos_set_species(f->eos, i, kphi_rxnset_species(f->set, i), &err),
                         KPHI_OK);
    f->w = kphi_equil_work_alloc(f->s, f->r);
    f->res = kphi_equil_result_alloc(f->s, f->r);
    f->chk = kphi_equil_result_alloc(f->s, f->r);
    ck_assert_ptr_nonnull(f->w);
    ck_assert_ptr_nonnull(f->res);
    ck_assert_ptr_nonnull(f->chk);
    for (size_t i = 0; i < 8; i++)
        f->n0[i] = 0.0;
}

static void fx_open(fixture *f, int methanol, kphi_eos_model model)
{
    const char *path = methanol ? "reactions/methanol.yaml" : "reactions/ammonia.yaml";
    kphi_error err;
    kphi_error_clear(&err);
    kphi_rxnset *set = kphi_rxnset_load_file(path, NULL, &err);
    ck_assert_msg(set != NULL, "%s: %s", path, err.msg);
    fx_open_set(f, set, model);
    const char *const *names = methanol ? METHANOL_NAMES : AMMONIA_NAMES;
    const double *amt = methanol ? METHANOL_FEED : AMMONIA_FEED;
    size_t k = methanol ? 7 : 5;
    for (size_t m = 0; m < k; m++) {
        long i = kphi_rxnset_species_index(f->set, names[m]);
        ck_assert_msg(i >= 0, "species %s", names[m]);
        f->n0[i] = amt[m];
    }
    f->T = methanol ? 498.15 : 673.15;
    f->P = methanol ? 7.9e6 : 19.5e6;
}

static void fx_close(fixture *f)
{
    kphi_equil_result_free(f->res);
    kphi_equil_result_free(f->chk);
    kphi_equil_work_free(f->w);
    kphi_eos_free(f->eos);
    kphi_rxnset_free(f->set);
}

static size_t index_of(const fixture *f, const char *name)
{
    long i = kphi_rxnset_species_index(f->set, name);
    ck_assert_msg(i >= 0, "species %s", name);
    return (size_t)i;
}

/* The enthalpy written out here from the thermo and eos modules, independently of
 * kphi_equil_enthalpy(): sum n_i h_i°(T) + n_t h_dep(T, P, y). */
static double enthalpy_by_hand(const fixture *f, double T, double P, const double *n)
{
    double nt = 0.0, h = 0.0, y[8], lnphi[8];
    for (size_t i = 0; i < f->s; i++)
        nt += n[i];
    for (size_t i = 0; i < f->s; i++) {
        y[i] = n[i] / nt;
        if (n[i] > 0.0)
            h += n[i] * kphi_thermo_h(kphi_rxnset_species(f->set, i), T);
    }
    kphi_eos_work *ew = kphi_eos_work_alloc(f->s);
    ck_assert_ptr_nonnull(ew);
    kphi_eos_state st;
    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_eos_eval(f->eos, T, P, y, lnphi, NULL, &st, ew, &err), KPHI_OK);
    kphi_eos_work_free(ew);
    return h + nt * st.h_dep;
}

/* The heat of reaction of the change n0 -> n at T (J): |sum_i (n_i - n0_i) h_i°(T)|. */
static double reaction_heat(const fixture *f, double T, const double *n)
{
    double q = 0.0;
    for (size_t i = 0; i < f->s; i++)
        if (n[i] != f->n0[i])
            q += (n[i] - f->n0[i]) * kphi_thermo_h(kphi_rxnset_species(f->set, i), T);
    return fabs(q);
}

/* ------------------------------------------------------------------ enthalpy */

START_TEST(enthalpy_matches_thermo_plus_departure)
{
    const kphi_eos_model models[] = {KPHI_EOS_IDEAL, KPHI_EOS_PR, KPHI_EOS_SRK, KPHI_EOS_VIRIAL};
    for (int methanol = 0; methanol < 2; methanol++)
        for (size_t m = 0; m < 4; m++) {
            fixture f;
            fx_open(&f, methanol, models[m]);
            kphi_error err;
            kphi_error_clear(&err);
            double H;
            ck_assert_int_eq(
                kphi_equil_enthalpy(f.set, f.eos, f.T, f.P, f.n0, f.w, &H, &err), KPHI_OK);
            double Hh = enthalpy_by_hand(&f, f.T, f.P, f.n0);
            /* the same sums in the same order: agreement to round-off, 1e-12 relative */
            ck_assert_msg(fabs(H - Hh) <= 1e-12 * fabs(Hh), "H %.15g vs %.15g", H, Hh);
            /* at the equilibrium, the departure term is the result's own h_dep */
            ck_assert_int_eq(kphi_equil_solve(f.set, f.eos, f.T, f.P, f.n0, NULL, NULL, f.w,
                                              f.res, &err),
                             KPHI_OK);
            double hig = 0.0;
            for (size_t i = 0; i < f.s; i++)
                if (f.res->n[i] > 0.0)
                    hig += f.res->n[i] * kphi_thermo_h(kphi_rxnset_species(f.set, i), f.T);
            ck_assert_int_eq(
                kphi_equil_enthalpy(f.set, f.eos, f.T, f.P, f.res->n, f.w, &H, &err), KPHI_OK);
            double dep = H - hig, want = f.res->n_total * f.res->eos.h_dep;
            ck_assert_msg(fabs(dep - want) <= 1e-9 * fabs(hig) + 1e-9,
                          "departure %.12g vs %.12g", dep, want);
            if (models[m] == KPHI_EOS_IDEAL)
                ck_assert_msg(dep == 0.0, "ideal gas departure %g", dep);
            else
                ck_assert_msg(dep != 0.0, "real gas without departure");
            /* the workspace's solution is untouched by the enthalpy call */
            kphi_equil_get(f.w, f.chk);
            for (size_t i = 0; i < f.s; i++)
                ck_assert_double_eq(f.chk->n[i], f.res->n[i]);
            fx_close(&f);
        }
}
END_TEST

/* --------------------------------------------------------- adiabatic outlet */

START_TEST(adiabatic_energy_balance_closes)
{
    const kphi_eos_model models[] = {KPHI_EOS_IDEAL, KPHI_EOS_PR};
    for (int methanol = 0; methanol < 2; methanol++)
        for (size_t m = 0; m < 2; m++) {
            fixture f;
            fx_open(&f, methanol, models[m]);
            kphi_error err;
            kphi_error_clear(&err);
            int rc = kphi_equil_adiabatic_outlet(f.set, f.eos, f.T, f.P, f.n0, NULL, f.w,
                                                 f.res, &err);
            ck_assert_msg(rc == KPHI_OK, "%s", err.msg);
            ck_assert_msg(f.res->max_affinity < 1e-10, "affinity %g", f.res->max_affinity);
            double T_out = f.res->T;
            double H_in = enthalpy_by_hand(&f, f.T, f.P, f.n0);
            double H_out = enthalpy_by_hand(&f, T_out, f.P, f.res->n);
            double q = reaction_heat(&f, f.T, f.res->n);
            /* the reactions did something: at least 1 kJ per 100 mol of feed */
            ck_assert_msg(q > 1e3, "reaction heat %g J", q);
            /* closes to 1e-6 of the reaction heat (Brent stops within 1e-9 K) */
            ck_assert_msg(fabs(H_out - H_in) <= 1e-6 * q, "%s %s: H_out - H_in = %g J, q = %g J",
                          methanol ? "methanol" : "ammonia", kphi_eos_model_name(models[m]),
                          H_out - H_in, q);
            /* both syntheses release heat: the bed heats up */
            ck_assert_msg(T_out > f.T + 10.0, "T_out %g, T_in %g", T_out, f.T);
            /* and the outlet is the equilibrium at T_out */
            ck_assert_int_eq(kphi_equil_solve(f.set, f.eos, T_out, f.P, f.n0, NULL, NULL, f.w,
                                              f.chk, &err),
                             KPHI_OK);
            for (size_t i = 0; i < f.s; i++)
                ck_assert_double_eq_tol(f.chk->y[i], f.res->y[i], 1e-12);
            fx_close(&f);
        }
}
END_TEST

START_TEST(adiabatic_feed_at_equilibrium_stays)
{
    const kphi_eos_model models[] = {KPHI_EOS_IDEAL, KPHI_EOS_PR};
    for (int methanol = 0; methanol < 2; methanol++)
        for (size_t m = 0; m < 2; m++) {
            fixture f;
            fx_open(&f, methanol, models[m]);
            kphi_error err;
            kphi_error_clear(&err);
            ck_assert_int_eq(kphi_equil_solve(f.set, f.eos, f.T, f.P, f.n0, NULL, NULL, f.w,
                                              f.chk, &err),
                             KPHI_OK);
            double feq[8];
            memcpy(feq, f.chk->n, f.s * sizeof(double));
            memcpy(f.n0, feq, sizeof feq);
            int rc = kphi_equil_adiabatic_outlet(f.set, f.eos, f.T, f.P, feq, NULL, f.w, f.res,
                                                 &err);
            ck_assert_msg(rc == KPHI_OK, "%s", err.msg);
            ck_assert_msg(fabs(f.res->T - f.T) < 1e-6, "T_out - T_in = %g K", f.res->T - f.T);
            fx_close(&f);
        }
}
END_TEST

/* A train of three beds with intercooling: each bed's outlet is the single-bed adiabatic
 * outlet of the previous outlet's composition fed at the next inlet temperature; the
 * energy balance closes over every bed; with the gas cooled between beds the conversion
 * rises from bed to bed. The first inlet is the fixture's T; the next two are chosen below
 * the first outlet temperature, as intercooling does. */
START_TEST(beds_in_series_chain_single_beds)
{
    const kphi_eos_model models[] = {KPHI_EOS_IDEAL, KPHI_EOS_PR};
    for (int methanol = 0; methanol < 2; methanol++)
        for (size_t m = 0; m < 2; m++) {
            fixture f;
            fx_open(&f, methanol, models[m]);
            kphi_error err;
            kphi_error_clear(&err);
            const double T_in[3] = {f.T, f.T + 17.3, f.T + 23.9};
            kphi_equil_result *out[3];
            for (int k = 0; k < 3; k++) {
                out[k] = kphi_equil_result_alloc(f.s, f.r);
                ck_assert_ptr_nonnull(out[k]);
            }
            int rc = kphi_equil_adiabatic_beds(f.set, f.eos, T_in, 3, f.P, f.n0, NULL, f.w,
                                               out, &err);
            ck_assert_msg(rc == KPHI_OK, "%s", err.msg);
            const double *wt = kphi_rxnset_conversion_weights(f.set);
            double X_prev = 0.0;
            for (int k = 0; k < 3; k++) {
                const double *feed = k == 0 ? f.n0 : out[k - 1]->n;
                ck_assert_int_eq(kphi_equil_adiabatic_outlet(f.set, f.eos, T_in[k], f.P, feed,
                                                             NULL, f.w, f.res, &err),
                                 KPHI_OK);
                ck_assert_double_eq_tol(out[k]->T, f.res->T, 1e-9);
                for (size_t i = 0; i < f.s; i++)
                    ck_assert_double_eq_tol(out[k]->n[i], f.res->n[i], 1e-9);
                double H_in = enthalpy_by_hand(&f, T_in[k], f.P, feed);
                double H_out = enthalpy_by_hand(&f, out[k]->T, f.P, out[k]->n);
                double q = reaction_heat(&f, T_in[k], out[k]->n);
                ck_assert_msg(fabs(H_out - H_in) <= 1e-6 * fabs(q) + 1e-6,
                              "bed %d: H_out - H_in = %g J, q = %g J", k + 1, H_out - H_in, q);
                ck_assert_msg(out[k]->T > T_in[k], "bed %d: T_out %g <= T_in %g", k + 1,
                              out[k]->T, T_in[k]);
                if (k + 1 < 3)
                    ck_assert(T_in[k + 1] < out[k]->T); /* cooled between beds */
                double X = kphi_equil_conversion(out[k], f.n0, wt);
                ck_assert_msg(X > X_prev, "bed %d: X %g <= %g", k + 1, X, X_prev);
                X_prev = X;
            }
            /* an empty train is refused */
            ck_assert_int_eq(kphi_equil_adiabatic_beds(f.set, f.eos, T_in, 0, f.P, f.n0, NULL,
                                                       f.w, out, &err),
                             KPHI_EINPUT);
            for (int k = 0; k < 3; k++)
                kphi_equil_result_free(out[k]);
            fx_close(&f);
        }
}
END_TEST

/* Ammonia synthesis releases heat: the adiabatic outlet is hotter than the inlet and
 * converts less than the isothermal equilibrium at the inlet temperature. The temperature
 * rise agrees with the constant-heat-capacity estimate (common practice)
 *   dT = -dH_r(T_in) dxi / sum_i n_out,i Cp_i(T_m),   T_m = (T_in + T_out)/2,
 * dH_r from kphi_thermo_h and Cp from kphi_thermo_cp (both at fixed T; ideal gas): the
 * exact balance uses the mean of Cp over [T_in, T_out] instead of its value at the
 * midpoint, so the two differ by the curvature of Cp only. Tolerance 1 %. */
START_TEST(ammonia_adiabatic_rise_physical)
{
    fixture f;
    fx_open(&f, 0, KPHI_EOS_IDEAL);
    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_int_eq(
        kphi_equil_solve(f.set, f.eos, f.T, f.P, f.n0, NULL, NULL, f.w, f.chk, &err), KPHI_OK);
    ck_assert_int_eq(
        kphi_equil_adiabatic_outlet(f.set, f.eos, f.T, f.P, f.n0, NULL, f.w, f.res, &err),
        KPHI_OK);
    const double *wt = kphi_rxnset_conversion_weights(f.set);
    double X_iso = kphi_equil_conversion(f.chk, f.n0, wt);
    double X_ad = kphi_equil_conversion(f.res, f.n0, wt);
    double T_in = f.T, T_out = f.res->T;
    ck_assert_msg(T_out > T_in, "T_out %g <= T_in %g", T_out, T_in);
    ck_assert_msg(X_ad < X_iso && X_ad > 0.0, "X adiabatic %g, isothermal %g", X_ad, X_iso);
    size_t knh3 = index_of(&f, "NH3");
    double dxi = (f.res->n[knh3] - f.n0[knh3]) / 2.0; /* N2 + 3 H2 = 2 NH3 */
    double dH = 0.0, cp = 0.0, Tm = 0.5 * (T_in + T_out);
    for (size_t i = 0; i < f.s; i++) {
        const kphi_species *sp = kphi_rxnset_species(f.set, i);
        dH += kphi_rxnset_nu(f.set, 0, i) * kphi_thermo_h(sp, T_in);
        cp += f.res->n[i] * kphi_thermo_cp(sp, Tm);
    }
    ck_assert_msg(dH < 0.0, "dH_r = %g J/mol", dH);
    double est = -dH * dxi / cp;
    double rise = T_out - T_in;
    ck_assert_msg(fabs(rise - est) <= 0.01 * rise, "rise %.4f K, constant-Cp estimate %.4f K",
                  rise, est);
    fx_close(&f);
}
END_TEST

/* A set whose data range ends at 3500 K (CH3OH, McBride et al. 1993 high range) burning
 * hydrogen in oxygen from 2500 K: the energy balance does not close below 3500 K. */
START_TEST(adiabatic_unreachable_fails)
{
    kphi_error err;
    kphi_error_clear(&err);
    kphi_species_db *db = kphi_species_db_load_file(KPHI_SPECIES_FILE, &err);
    ck_assert_msg(db != NULL, "%s", err.msg);
    const char *text = "name: burner\nspecies: [H2, O2, H2O, CH3OH]\nreactions:\n"
                       "  - 2 H2 + O2 = 2 H2O\n";
    kphi_rxnset *set = kphi_rxnset_load_string(text, strlen(text), "<burner>", db, &err);
    ck_assert_msg(set != NULL, "%s", err.msg);
    fixture f;
    fx_open_set(&f, set, KPHI_EOS_IDEAL);
    f.n0[0] = 2.0;
    f.n0[1] = 1.0;
    int rc = kphi_equil_adiabatic_outlet(f.set, f.eos, 2500.0, 1e7, f.n0, NULL, f.w, f.res, &err);
    ck_assert_int_eq(rc, KPHI_EFAILED);
    ck_assert_msg(strstr(err.msg, "no adiabatic equilibrium outlet") != NULL, "%s", err.msg);
    ck_assert_msg(strstr(err.msg, "3500") != NULL, "%s", err.msg);
    fx_close(&f);
    kphi_species_db_free(db);
}
END_TEST

/* Where the equation of state changes root (a mixture that may condense), H(T) of the
 * equilibrium mixture jumps, and a root search would close in on the jump. The answer must
 * be a failure saying so, never that temperature. The case came from the random adiabatic
 * beds of tests/test_property.c (seed 1): methanol and water with traces of CO, H2 and
 * CH4, SRK, fed at 359.65 K and 20.93 bar; the balance jumped by 2.5e5 J near 328.6 K. */
START_TEST(adiabatic_refuses_a_jump)
{
    fixture f;
    fx_open(&f, 1, KPHI_EOS_SRK);
    memset(f.n0, 0, sizeof f.n0);
    f.n0[index_of(&f, "CO")] = 0.0061793399348865092;
    f.n0[index_of(&f, "H2")] = 0.035323697017997396;
    f.n0[index_of(&f, "CH3OH")] = 9.2837370610178986;
    f.n0[index_of(&f, "H2O")] = 53.275152093546772;
    f.n0[index_of(&f, "CH4")] = 0.4609287296355386;
    kphi_error err;
    kphi_error_clear(&err);
    int rc = kphi_equil_adiabatic_outlet(f.set, f.eos, 359.64754584539185, 20.92804309697269e5,
                                         f.n0, NULL, f.w, f.res, &err);
    ck_assert_int_eq(rc, KPHI_EFAILED);
    ck_assert_msg(strstr(err.msg, "jumps through zero") != NULL, "%s", err.msg);
    ck_assert_msg(strstr(err.msg, "may condense") != NULL, "%s", err.msg);
    fx_close(&f);
}
END_TEST

/* ------------------------------------------------------- approach temperature */

START_TEST(approach_reproduces_measured_y)
{
    const kphi_eos_model models[] = {KPHI_EOS_IDEAL, KPHI_EOS_PR};
    for (int methanol = 0; methanol < 2; methanol++)
        for (size_t m = 0; m < 2; m++) {
            fixture f;
            fx_open(&f, methanol, models[m]);
            size_t k = index_of(&f, methanol ? "CH3OH" : "NH3");
            kphi_error err;
            kphi_error_clear(&err);
            ck_assert_int_eq(kphi_equil_solve(f.set, f.eos, f.T, f.P, f.n0, NULL, NULL, f.w,
                                              f.chk, &err),
                             KPHI_OK);
            double y_at_T = f.chk->y[k];
            /* a measured outlet short of equilibrium: 0.73 of the equilibrium rise */
            double y_meas = f.n0[k] / 100.0 + 0.73 * (y_at_T - f.n0[k] / 100.0);
            int rc = kphi_equil_approach_temperature(f.set, f.eos, f.T, f.P, f.n0, k, y_meas,
                                                     NULL, f.w, f.res, &err);
            ck_assert_msg(rc == KPHI_OK, "%s", err.msg);
            double T_eq = f.res->T;
            /* exothermic: less product is the equilibrium of a hotter bed */
            ck_assert_msg(T_eq > f.T, "T_eq %g, T %g", T_eq, f.T);
            /* an independent solve at T_eq reproduces the measured value to 1e-9 */
            ck_assert_int_eq(kphi_equil_solve(f.set, f.eos, T_eq, f.P, f.n0, NULL, NULL, f.w,
                                              f.chk, &err),
                             KPHI_OK);
            ck_assert_msg(fabs(f.chk->y[k] - y_meas) < 1e-9, "y %.15g vs %.15g", f.chk->y[k],
                          y_meas);
            ck_assert_msg(fabs(f.res->y[k] - y_meas) < 1e-9, "y %.15g vs %.15g", f.res->y[k],
                          y_meas);
            /* the equilibrium value at T itself gives T back (to 1e-6 K) */
            rc = kphi_equil_approach_temperature(f.set, f.eos, f.T, f.P, f.n0, k, y_at_T, NULL,
                                                 f.w, f.res, &err);
            ck_assert_msg(rc == KPHI_OK, "%s", err.msg);
            ck_assert_msg(fabs(f.res->T - f.T) < 1e-6, "T_eq - T = %g K", f.res->T - f.T);
            /* a reactant works too: N2 / CO above its equilibrium fraction */
            size_t kr = index_of(&f, methanol ? "CO" : "N2");
            double yr = f.chk->y[kr];
            rc = kphi_equil_approach_temperature(f.set, f.eos, f.T, f.P, f.n0, kr, yr, NULL, f.w,
                                                 f.res, &err);
            ck_assert_msg(rc == KPHI_OK, "%s", err.msg);
            ck_assert_msg(fabs(f.res->T - T_eq) < 1e-5, "via reactant %.9g, product %.9g",
                          f.res->T, T_eq);
            fx_close(&f);
        }
}
END_TEST

START_TEST(approach_errors)
{
    fixture f;
    fx_open(&f, 0, KPHI_EOS_PR);
    kphi_error err;
    size_t knh3 = index_of(&f, "NH3"), kar = index_of(&f, "Ar");
    const double bad_y[] = {0.0, 1.0, 1.5, -0.2, NAN};
    for (size_t m = 0; m < sizeof bad_y / sizeof bad_y[0]; m++) {
        kphi_error_clear(&err);
        ck_assert_int_eq(kphi_equil_approach_temperature(f.set, f.eos, f.T, f.P, f.n0, knh3,
                                                         bad_y[m], NULL, f.w, f.res, &err),
                         KPHI_EINPUT);
        ck_assert_msg(strstr(err.msg, "between 0 and 1") != NULL, "%s", err.msg);
    }
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_equil_approach_temperature(f.set, f.eos, f.T, f.P, f.n0, kar, 0.03,
                                                     NULL, f.w, f.res, &err),
                     KPHI_EINPUT);
    ck_assert_msg(strstr(err.msg, "Ar is inert") != NULL, "%s", err.msg);
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_equil_approach_temperature(f.set, f.eos, f.T, f.P, f.n0, f.s, 0.1,
                                                     NULL, f.w, f.res, &err),
                     KPHI_EINPUT);
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_equil_approach_temperature(f.set, f.eos, 150.0, f.P, f.n0, knh3, 0.1,
                                                     NULL, f.w, f.res, &err),
                     KPHI_EINPUT);
    /* complete conversion of this feed gives y_NH3 = 47.9 / 55.2 = 0.868: 0.95 is never
     * the equilibrium; ideal gas, so every temperature of the range can be solved */
    fixture g;
    fx_open(&g, 0, KPHI_EOS_IDEAL);
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_equil_approach_temperature(g.set, g.eos, g.T, g.P, g.n0, knh3, 0.95,
                                                     NULL, g.w, g.res, &err),
                     KPHI_EFAILED);
    ck_assert_msg(strstr(err.msg, "y_NH3 = 0.95 is above the equilibrium limit at every "
                                  "temperature in the data range") != NULL,
                  "%s", err.msg);
    fx_close(&g);
    fx_close(&f);
}
END_TEST

START_TEST(enthalpy_and_adiabatic_errors)
{
    fixture f;
    fx_open(&f, 0, KPHI_EOS_PR);
    kphi_error err;
    double H, n[8];
    memcpy(n, f.n0, sizeof n);
    n[1] = -1.0;
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_equil_enthalpy(f.set, f.eos, f.T, f.P, n, f.w, &H, &err), KPHI_EINPUT);
    ck_assert_msg(strstr(err.msg, "H2") != NULL, "%s", err.msg);
    for (size_t i = 0; i < 8; i++)
        n[i] = 0.0;
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_equil_enthalpy(f.set, f.eos, f.T, f.P, n, f.w, &H, &err), KPHI_EINPUT);
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_equil_enthalpy(f.set, f.eos, f.T, -1.0, f.n0, f.w, &H, &err),
                     KPHI_EINPUT);
    kphi_error_clear(&err);
    ck_assert_int_eq(
        kphi_equil_adiabatic_outlet(f.set, f.eos, 150.0, f.P, f.n0, NULL, f.w, f.res, &err),
        KPHI_EINPUT);
    ck_assert_msg(strstr(err.msg, "outside the species data range") != NULL, "%s", err.msg);
    kphi_error_clear(&err);
    ck_assert_int_eq(
        kphi_equil_adiabatic_outlet(f.set, f.eos, 6500.0, f.P, f.n0, NULL, f.w, f.res, &err),
        KPHI_EINPUT);
    fx_close(&f);
}
END_TEST

START_TEST(energy_with_a_K_correlation)
{
    /* With a K basis (Graaf et al. 1986 for methanol, Gillespie & Beattie 1930 for
     * ammonia) the energy balance still uses the polynomials' enthalpies: the adiabatic
     * outlet closes H_out = H_in by hand, its K is the correlation's at T_out, and the
     * approach temperature gives the measured y back; the outlet differs from the tables'
     * because K does. */
    for (int methanol = 0; methanol < 2; methanol++) {
        fixture f;
        fx_open(&f, methanol, KPHI_EOS_PR);
        kphi_equil_options opt = kphi_equil_options_default();
        opt.K_basis = 1; /* graaf1986, gillespie1930 */
        kphi_error err;
        kphi_error_clear(&err);
        int rc = kphi_equil_adiabatic_outlet(f.set, f.eos, f.T, f.P, f.n0, &opt, f.w, f.res,
                                             &err);
        ck_assert_msg(rc == KPHI_OK, "%s", err.msg);
        double T_out = f.res->T;
        double H_in = enthalpy_by_hand(&f, f.T, f.P, f.n0);
        double H_out = enthalpy_by_hand(&f, T_out, f.P, f.res->n);
        double q = reaction_heat(&f, f.T, f.res->n);
        ck_assert_msg(fabs(H_out - H_in) <= 1e-6 * q, "H_out - H_in = %g J, q = %g J",
                      H_out - H_in, q);
        for (size_t j = 0; j < f.r; j++) {
            const kphi_rxnset_kcorr *k = kphi_rxnset_kcorr_get(f.set, j, 1);
            ck_assert_double_eq_tol(f.res->lnK[j], kphi_rxnset_kcorr_lnK(k, T_out), 1e-14);
            ck_assert_uint_eq(f.res->K_basis[j], 1);
        }
        ck_assert_int_eq(kphi_equil_adiabatic_outlet(f.set, f.eos, f.T, f.P, f.n0, NULL, f.w,
                                                     f.chk, &err),
                         KPHI_OK);
        ck_assert_msg(fabs(f.chk->T - T_out) > 1e-3, "tables %g, correlation %g", f.chk->T,
                      T_out);
        size_t kp = index_of(&f, methanol ? "CH3OH" : "NH3");
        ck_assert_int_eq(kphi_equil_solve(f.set, f.eos, f.T, f.P, f.n0, NULL, &opt, f.w, f.chk,
                                          &err),
                         KPHI_OK);
        double y_meas = f.n0[kp] / 100.0 + 0.6 * (f.chk->y[kp] - f.n0[kp] / 100.0);
        rc = kphi_equil_approach_temperature(f.set, f.eos, f.T, f.P, f.n0, kp, y_meas, &opt, f.w,
                                             f.res, &err);
        ck_assert_msg(rc == KPHI_OK, "%s", err.msg);
        ck_assert_msg(fabs(f.res->y[kp] - y_meas) < 1e-9, "y %.15g vs %.15g", f.res->y[kp],
                      y_meas);
        ck_assert_double_eq_tol(
            f.res->lnK[0], kphi_rxnset_kcorr_lnK(kphi_rxnset_kcorr_get(f.set, 0, 1), f.res->T),
            1e-14);
        fx_close(&f);
    }
}
END_TEST

START_TEST(reaction_approach_of_an_equilibrium_gas)
{
    /* an equilibrium outlet analysed at its own temperature is at equilibrium in every
     * reaction: each T_eq returns T (real gas, phi at that composition). With the ideal
     * gas, phi = 1 does not depend on the outlet temperature, so the same gas read as
     * measured 25 K lower still gives every T_eq at the equilibrium temperature */
    for (int methanol = 0; methanol < 2; methanol++)
        for (int ideal = 0; ideal < 4; ideal++) {
            /* ideal 0, 1: PR, ideal gas with K from the tables; 2, 3: the same with K from
             * the set's first correlation (graaf1986, gillespie1930) */
            fixture f;
            fx_open(&f, methanol, ideal % 2 ? KPHI_EOS_IDEAL : KPHI_EOS_PR);
            kphi_equil_options opt = kphi_equil_options_default();
            opt.K_basis = ideal >= 2 ? 1 : KPHI_K_TABLES;
            kphi_error err;
            kphi_error_clear(&err);
            ck_assert_int_eq(kphi_equil_solve(f.set, f.eos, f.T, f.P, f.n0, NULL, &opt, f.w,
                                              f.res, &err),
                             KPHI_OK);
            kphi_equil_reaction_temperature out[4];
            double T_meas = ideal % 2 ? f.T - 25.0 : f.T;
            ck_assert_int_eq(kphi_equil_reaction_approach(f.set, f.eos, T_meas, f.P, f.res->y,
                                                          &opt, f.w, out, &err),
                             KPHI_OK);
            for (size_t j = 0; j < f.r; j++) {
                ck_assert_int_eq(out[j].status, KPHI_APPROACH_OK);
                ck_assert_msg(fabs(out[j].T_eq - f.T) < 1e-6, "%s reaction %zu: %.9f vs %.9f",
                              methanol ? "methanol" : "ammonia", j + 1, out[j].T_eq, f.T);
                ck_assert_double_eq_tol(out[j].lnQ, f.res->lnK[j], 1e-8);
            }
            fx_close(&f);
        }
}
END_TEST

START_TEST(reaction_approach_of_a_gas_short_of_equilibrium)
{
    /* a methanol converter outlet halfway to equilibrium (the extents halved, at 498.15 K):
     * both reactions are at equilibrium above the outlet temperature (they are exothermic
     * in the forward direction the gas still has to go), so each approach is positive */
    fixture f;
    fx_open(&f, 1, KPHI_EOS_PR);
    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_equil_solve(f.set, f.eos, f.T, f.P, f.n0, NULL, NULL, f.w, f.res,
                                      &err),
                     KPHI_OK);
    double n[8], nt = 0.0, y[8];
    for (size_t i = 0; i < f.s; i++) {
        n[i] = f.n0[i];
        for (size_t j = 0; j < f.r; j++)
            n[i] += 0.5 * kphi_rxnset_nu(f.set, j, i) * f.res->xi[j];
        nt += n[i];
    }
    for (size_t i = 0; i < f.s; i++)
        y[i] = n[i] / nt;
    kphi_equil_reaction_temperature out[4];
    ck_assert_int_eq(kphi_equil_reaction_approach(f.set, f.eos, f.T, f.P, y, NULL, f.w, out,
                                                  &err),
                     KPHI_OK);
    /* reaction 1, CO + 2 H2 = CH3OH (dH < 0): Q below K(T), so T_eq > T */
    ck_assert_int_eq(out[0].status, KPHI_APPROACH_OK);
    ck_assert_msg(out[0].T_eq > f.T + 1.0, "%g", out[0].T_eq);
    ck_assert_msg(out[0].lnQ < f.res->lnK[0], "%g %g", out[0].lnQ, f.res->lnK[0]);
    /* and K(T_eq) = Q: a second look with the thermo module */
    double dg = 0.0;
    for (size_t i = 0; i < f.s; i++)
        dg += kphi_rxnset_nu(f.set, 0, i) * kphi_thermo_g(kphi_rxnset_species(f.set, i),
                                                          out[0].T_eq);
    ck_assert_double_eq_tol(-dg / (KPHI_R * out[0].T_eq), out[0].lnQ, 1e-8);
    /* an analysis without water: the shift reaction has no Q, said per reaction */
    long h2o = kphi_rxnset_species_index(f.set, "H2O");
    double dry = 1.0 - y[h2o];
    for (size_t i = 0; i < f.s; i++)
        y[i] = (long)i == h2o ? 0.0 : y[i] / dry;
    ck_assert_int_eq(kphi_equil_reaction_approach(f.set, f.eos, f.T, f.P, y, NULL, f.w, out,
                                                  &err),
                     KPHI_OK);
    ck_assert_int_eq(out[0].status, KPHI_APPROACH_OK);
    ck_assert_int_eq(out[1].status, KPHI_APPROACH_ABSENT);
    ck_assert_int_eq(out[1].absent, h2o);
    ck_assert(isnan(out[1].T_eq));
    /* fractions that do not sum to 1 are refused */
    y[0] += 0.01;
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_equil_reaction_approach(f.set, f.eos, f.T, f.P, y, NULL, f.w, out,
                                                  &err),
                     KPHI_EINPUT);
    fx_close(&f);
}
END_TEST

static Suite *energy_suite(void)
{
    Suite *s = suite_create("energy");
    TCase *tc = tcase_create("core");
    tcase_set_timeout(tc, 60);
    tcase_add_test(tc, enthalpy_matches_thermo_plus_departure);
    tcase_add_test(tc, adiabatic_energy_balance_closes);
    tcase_add_test(tc, adiabatic_feed_at_equilibrium_stays);
    tcase_add_test(tc, beds_in_series_chain_single_beds);
    tcase_add_test(tc, ammonia_adiabatic_rise_physical);
    tcase_add_test(tc, adiabatic_unreachable_fails);
    tcase_add_test(tc, adiabatic_refuses_a_jump);
    tcase_add_test(tc, approach_reproduces_measured_y);
    tcase_add_test(tc, approach_errors);
    tcase_add_test(tc, reaction_approach_of_an_equilibrium_gas);
    tcase_add_test(tc, reaction_approach_of_a_gas_short_of_equilibrium);
    tcase_add_test(tc, enthalpy_and_adiabatic_errors);
    tcase_add_test(tc, energy_with_a_K_correlation);
    suite_add_tcase(s, tc);
    return s;
}

KPHI_TEST_MAIN(energy_suite)
