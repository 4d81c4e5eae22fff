/* Tests of the Gibbs minimiser: invariants on every shipped reaction set, closed-form
 * answers, extreme equilibrium constants, trace and absent species, scaling. */
#include "kphi/equil.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include <gsl/gsl_roots.h>

#include "kphi/rxnset.h"
#include "kphi/thermo.h"
#include "testutil.h"

typedef struct {
    kphi_rxnset *set;
    kphi_eos *eos;
    kphi_equil_work *w;
    kphi_equil_result *res;
    size_t s, r;
} fixture;

static void fx_open(fixture *f, const char *path, kphi_eos_model model)
{
    kphi_error err;
    kphi_error_clear(&err);
    f->set = kphi_rxnset_load_file(path, NULL, &err);
    ck_assert_msg(f->set != NULL, "%s: %s", path, err.msg);
    f->s = kphi_rxnset_n_species(f->set);
    f->r = kphi_rxnset_n_reactions(f->set);
    f->eos = kphi_eos_alloc(model, f->s);
    ck_assert_ptr_nonnull(f->eos);
    for (size_t i = 0; i < f->s; i++)
        ck_assert_int_eq(kphi_eos_set_species(f->eos, i, kphi_rxnset_species(f->set, i), &err),
                         KPHI_OK);
    f->w = kphi_equil_work_alloc(f->s, f->r);
    f->res = kphi_equil_result_alloc(f->s, f->r);
    ck_assert_ptr_nonnull(f->w);
    ck_assert_ptr_nonnull(f->res);
}

static void fx_close(fixture *f)
{
    kphi_equil_result_free(f->res);
    kphi_equil_work_free(f->w);
    kphi_eos_free(f->eos);
    kphi_rxnset_free(f->set);
}

static void feed_of(const kphi_rxnset *set, double *n0, const char *names[], const double amt[],
                    size_t k)
{
    for (size_t i = 0; i < kphi_rxnset_n_species(set); i++)
        n0[i] = 0.0;
    for (size_t m = 0; m < k; m++) {
        long i = kphi_rxnset_species_index(set, names[m]);
        ck_assert_msg(i >= 0, "species %s", names[m]);
        n0[i] = amt[m];
    }
}

/* The invariants every converged answer satisfies (DESIGN.md): element balance to 1e-12
 * relative, every affinity that can act below 1e-10, all n_i >= 0, inerts untouched. */
static void assert_invariants(const fixture *f, const double *n0)
{
    const kphi_equil_result *r = f->res;
    ck_assert_msg(r->balance_error <= 1e-12, "balance %g", r->balance_error);
    ck_assert_msg(r->max_affinity < 1e-10, "affinity %g", r->max_affinity);
    for (size_t i = 0; i < f->s; i++) {
        ck_assert_msg(r->n[i] >= 0.0 && isfinite(r->n[i]), "n[%zu] = %g", i, r->n[i]);
        if (kphi_rxnset_is_inert(f->set, i))
            ck_assert_msg(r->n[i] == n0[i], "inert %zu moved: %.17g -> %.17g", i, n0[i], r->n[i]);
    }
    for (size_t j = 0; j < f->r; j++)
        if (!isnan(r->affinity[j]))
            ck_assert_msg(fabs(r->affinity[j]) < 1e-10, "A[%zu] = %g", j, r->affinity[j]);
}

/* ---------------------------------------------------------------- ammonia */

typedef struct {
    double lnK, P;
} nh3_params;

/* 1 N2 + 3 H2 feed, extent x per mol N2: Ky (P/P°)^-2 ... written as ln form */
static double nh3_fn(double x, void *vp)
{
    const nh3_params *p = vp;
    double nt = 4.0 - 2.0 * x;
    double yN2 = (1.0 - x) / nt, yH2 = 3.0 * (1.0 - x) / nt, yNH3 = 2.0 * x / nt;
    return 2.0 * log(yNH3) - log(yN2) - 3.0 * log(yH2) - 2.0 * log(p->P / 1e5) - p->lnK;
}

/* Root in x of nh3_fn for lnK and P (Pa): the closed-form NH3 extent per mol N2. */
static double nh3_extent(double lnK, double P)
{
    nh3_params p = {lnK, P};
    gsl_function F = {nh3_fn, &p};
    gsl_root_fsolver *s = gsl_root_fsolver_alloc(gsl_root_fsolver_brent);
    gsl_root_fsolver_set(s, &F, 1e-12, 1.0 - 1e-12);
    for (int it = 0; it < 200; it++) {
        gsl_root_fsolver_iterate(s);
        if (gsl_root_test_interval(gsl_root_fsolver_x_lower(s), gsl_root_fsolver_x_upper(s),
                                   1e-15, 0.0) == GSL_SUCCESS)
            break;
    }
    double x = gsl_root_fsolver_root(s);
    gsl_root_fsolver_free(s);
    return x;
}

START_TEST(ammonia_ideal_closed_form)
{
    /* Ideal gas, 3:1 H2:N2 at 450 C and 300 atm: the NH3 mole fraction from the minimiser
     * equals the root of the closed-form mass-action equation with the same K. */
    fixture f;
    fx_open(&f, "reactions/ammonia.yaml", KPHI_EOS_IDEAL);
    const char *names[] = {"N2", "H2"};
    const double amt[] = {1.0, 3.0};
    double n0[16];
    feed_of(f.set, n0, names, amt, 2);
    double T = 723.15, P = 300.0 * 101325.0;
    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_equil_solve(f.set, f.eos, T, P, n0, NULL, NULL, f.w, f.res, &err),
                     KPHI_OK);
    assert_invariants(&f, n0);
    double x = nh3_extent(f.res->lnK[0], P);
    double y_closed = 2.0 * x / (4.0 - 2.0 * x);
    long k = kphi_rxnset_species_index(f.set, "NH3");
    printf("ammonia ideal 450 C 300 atm: y_NH3 = %.10f (closed form %.10f)\n", f.res->y[k],
           y_closed);
    ck_assert_double_eq_tol(f.res->y[k], y_closed, 1e-9);
    fx_close(&f);
}
END_TEST

START_TEST(ammonia_conversion_rises_with_P_falls_with_T)
{
    fixture f;
    fx_open(&f, "reactions/ammonia.yaml", KPHI_EOS_IDEAL);
    const char *names[] = {"N2", "H2", "CH4", "Ar"};
    const double amt[] = {23.7, 71.3, 3.1, 1.9};
    double n0[16];
    feed_of(f.set, n0, names, amt, 4);
    const double *wt = kphi_rxnset_conversion_weights(f.set);
    kphi_error err;
    kphi_error_clear(&err);
    double prev = -1.0;
    for (double P = 31.7e5; P < 400e5; P *= 1.6) {
        ck_assert_int_eq(kphi_equil_solve(f.set, f.eos, 713.15, P, n0, NULL, NULL, f.w, f.res,
                                          &err),
                         KPHI_OK);
        assert_invariants(&f, n0);
        double X = kphi_equil_conversion(f.res, n0, wt);
        ck_assert_msg(X > prev, "X(P) not rising at %g Pa: %g after %g", P, X, prev);
        prev = X;
    }
    prev = 2.0;
    for (double T = 600.15; T < 900.0; T += 37.0) {
        ck_assert_int_eq(kphi_equil_solve(f.set, f.eos, T, 213e5, n0, NULL, NULL, f.w, f.res,
                                          &err),
                         KPHI_OK);
        assert_invariants(&f, n0);
        double X = kphi_equil_conversion(f.res, n0, wt);
        ck_assert_msg(X < prev, "X(T) not falling at %g K: %g after %g", T, X, prev);
        prev = X;
    }
    fx_close(&f);
}
END_TEST

START_TEST(scaling_feed_scales_amounts)
{
    fixture f;
    fx_open(&f, "reactions/methanol.yaml", KPHI_EOS_IDEAL);
    const char *names[] = {"CO", "CO2", "H2", "CH4", "N2"};
    const double amt[] = {9.3, 4.1, 67.2, 12.5, 6.9};
    double n0[16], n1[16], y0[16], nn0[16];
    feed_of(f.set, n0, names, amt, 5);
    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_equil_solve(f.set, f.eos, 523.15, 81e5, n0, NULL, NULL, f.w, f.res,
                                      &err),
                     KPHI_OK);
    assert_invariants(&f, n0);
    for (size_t i = 0; i < f.s; i++) {
        y0[i] = f.res->y[i];
        nn0[i] = f.res->n[i];
        n1[i] = 1000.0 * n0[i];
    }
    ck_assert_int_eq(kphi_equil_solve(f.set, f.eos, 523.15, 81e5, n1, NULL, NULL, f.w, f.res,
                                      &err),
                     KPHI_OK);
    assert_invariants(&f, n1);
    for (size_t i = 0; i < f.s; i++) {
        ck_assert_double_eq_tol(f.res->y[i], y0[i], 1e-10);
        ck_assert_double_eq_tol(f.res->n[i], 1000.0 * nn0[i], 1e-8 * (1000.0 * nn0[i] + 1e-300));
    }
    fx_close(&f);
}
END_TEST

START_TEST(every_set_many_conditions)
{
    /* every shipped set, ideal gas, over T and P, from varied feeds: invariants hold */
    const char *sets[] = {"reactions/ammonia.yaml", "reactions/methanol.yaml",
                          "reactions/reforming.yaml"};
    for (size_t k = 0; k < 3; k++) {
        fixture f;
        fx_open(&f, sets[k], KPHI_EOS_IDEAL);
        double n0[16];
        kphi_error err;
        for (int v = 0; v < 4; v++) {
            for (size_t i = 0; i < f.s; i++)
                n0[i] = (v == 0) ? 1.0 : 0.37 + 0.91 * (double)((i * 7 + (size_t)v * 3) % 5);
            for (double T = 400.15; T < 1200.0; T += 113.0)
                for (double P = 0.73e5; P < 500e5; P *= 3.9) {
                    kphi_error_clear(&err);
                    int rc =
                        kphi_equil_solve(f.set, f.eos, T, P, n0, NULL, NULL, f.w, f.res, &err);
                    ck_assert_msg(rc == KPHI_OK, "%s T=%g P=%g: %s", sets[k], T, P, err.msg);
                    assert_invariants(&f, n0);
                }
        }
        fx_close(&f);
    }
}
END_TEST

START_TEST(methanol_without_co2_holds_co2_and_h2o_at_zero)
{
    /* CO + H2 only: with CO + 2 H2 = CH3OH and CO2 + H2 = CO + H2O, n_CO2 + n_H2O is
     * conserved, so both stay exactly zero and only methanol forms. */
    fixture f;
    fx_open(&f, "reactions/methanol.yaml", KPHI_EOS_IDEAL);
    const char *names[] = {"CO", "H2", "N2"};
    const double amt[] = {1.0, 2.2, 0.1};
    double n0[16];
    feed_of(f.set, n0, names, amt, 3);
    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_equil_solve(f.set, f.eos, 513.15, 73e5, n0, NULL, NULL, f.w, f.res,
                                      &err),
                     KPHI_OK);
    assert_invariants(&f, n0);
    long co2 = kphi_rxnset_species_index(f.set, "CO2");
    long h2o = kphi_rxnset_species_index(f.set, "H2O");
    long meoh = kphi_rxnset_species_index(f.set, "CH3OH");
    ck_assert(f.res->n[co2] == 0.0 && f.res->n[h2o] == 0.0);
    ck_assert(f.res->held_zero[co2] && f.res->held_zero[h2o]);
    ck_assert(f.res->n[meoh] > 0.01);
    fx_close(&f);
}
END_TEST

START_TEST(trace_species_converge)
{
    /* 1e-15 of the feed as CO2 (and none as H2O): the trace must still converge */
    fixture f;
    fx_open(&f, "reactions/methanol.yaml", KPHI_EOS_IDEAL);
    const char *names[] = {"CO", "H2", "CO2", "CH4"};
    const double amt[] = {1.0, 2.2, 3.2e-15, 1e-15};
    double n0[16];
    feed_of(f.set, n0, names, amt, 4);
    kphi_error err;
    kphi_error_clear(&err);
    int rc = kphi_equil_solve(f.set, f.eos, 513.15, 73e5, n0, NULL, NULL, f.w, f.res, &err);
    ck_assert_msg(rc == KPHI_OK, "%s", err.msg);
    assert_invariants(&f, n0);
    long h2o = kphi_rxnset_species_index(f.set, "H2O");
    ck_assert(f.res->n[h2o] > 0.0 && f.res->n[h2o] < 1e-14);
    fx_close(&f);
}
END_TEST

/* A = B with g_B - g_A = dg RT at 500 K: K = exp(-dg). Constant Cp = 3.5 R. */
static kphi_species_db *iso_db(double dg_rt)
{
    char text[2048];
    double T = 500.0, a6b = dg_rt * T; /* g_B/RT - g_A/RT = a6b/T = dg_rt */
    snprintf(text, sizeof text,
             "sources: {X: \"invented isomer pair for a numerical test\"}\n"
             "species:\n"
             "  - name: A\n"
             "    elements: {N: 2}\n"
             "    thermo: {source: X, T_range: [200.0, 1000.0, 3000.0],\n"
             "             low: [3.5, 0, 0, 0, 0, 0, 0], high: [3.5, 0, 0, 0, 0, 0, 0]}\n"
             "    critical: {Tc: 126.2, Pc: 33.9, omega: 0.04, source: X}\n"
             "  - name: B\n"
             "    elements: {N: 2}\n"
             "    thermo: {source: X, T_range: [200.0, 1000.0, 3000.0],\n"
             "             low: [3.5, 0, 0, 0, 0, %.17g, 0], high: [3.5, 0, 0, 0, 0, %.17g, 0]}\n"
             "    critical: {Tc: 126.2, Pc: 33.9, omega: 0.04, source: X}\n",
             a6b, a6b);
    kphi_error err;
    kphi_error_clear(&err);
    kphi_species_db *db = kphi_species_db_load_string(text, strlen(text), "<iso>", &err);
    ck_assert_msg(db != NULL, "%s", err.msg);
    return db;
}

START_TEST(extreme_K_converges)
{
    const double dgs[] = {-69.0775527898, 69.0775527898, -20.0, 0.0, 35.0}; /* K 1e30, 1e-30 */
    for (size_t k = 0; k < sizeof dgs / sizeof dgs[0]; k++) {
        kphi_species_db *db = iso_db(dgs[k]);
        const char *text = "name: isomers\nspecies: [A, B]\nreactions:\n  - A = B\n";
        kphi_error err;
        kphi_error_clear(&err);
        kphi_rxnset *set = kphi_rxnset_load_string(text, strlen(text), "<iso set>", db, &err);
        ck_assert_msg(set != NULL, "%s", err.msg);
        kphi_eos *eos = kphi_eos_alloc(KPHI_EOS_IDEAL, 2);
        for (size_t i = 0; i < 2; i++)
            kphi_eos_set_species(eos, i, kphi_rxnset_species(set, i), &err);
        kphi_equil_work *w = kphi_equil_work_alloc(2, 1);
        kphi_equil_result *r = kphi_equil_result_alloc(2, 1);
        double n0[2] = {1.0, 0.0};
        int rc = kphi_equil_solve(set, eos, 500.0, 1e5, n0, NULL, NULL, w, r, &err);
        ck_assert_msg(rc == KPHI_OK, "dg %g: %s", dgs[k], err.msg);
        /* y_B / y_A = K exactly for an ideal isomerisation */
        double lnratio = log(r->n[1]) - log(r->n[0]);
        ck_assert_msg(fabs(lnratio - (-dgs[k])) < 1e-9, "dg %g: ln(nB/nA) = %.12g", dgs[k],
                      lnratio);
        ck_assert(isfinite(r->n[0]) && isfinite(r->n[1]) && r->n[0] > 0.0 && r->n[1] > 0.0);
        ck_assert_double_eq_tol(r->n[0] + r->n[1], 1.0, 1e-14);
        kphi_equil_result_free(r);
        kphi_equil_work_free(w);
        kphi_eos_free(eos);
        kphi_rxnset_free(set);
        kphi_species_db_free(db);
    }
}
END_TEST

START_TEST(warm_start_gives_same_answer)
{
    fixture f;
    fx_open(&f, "reactions/reforming.yaml", KPHI_EOS_IDEAL);
    const char *names[] = {"CH4", "H2O", "CO2", "H2"};
    const double amt[] = {1.0, 3.1, 0.05, 0.2};
    double n0[16], xi[8], y[16];
    feed_of(f.set, n0, names, amt, 4);
    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_equil_solve(f.set, f.eos, 1073.15, 27.3e5, n0, NULL, NULL, f.w, f.res,
                                      &err),
                     KPHI_OK);
    for (size_t j = 0; j < f.r; j++)
        xi[j] = f.res->xi[j];
    ck_assert_int_eq(kphi_equil_solve(f.set, f.eos, 1093.15, 27.3e5, n0, NULL, NULL, f.w, f.res,
                                      &err),
                     KPHI_OK);
    for (size_t i = 0; i < f.s; i++)
        y[i] = f.res->y[i];
    int cold = f.res->iterations;
    ck_assert_int_eq(kphi_equil_solve(f.set, f.eos, 1093.15, 27.3e5, n0, xi, NULL, f.w, f.res,
                                      &err),
                     KPHI_OK);
    assert_invariants(&f, n0);
    for (size_t i = 0; i < f.s; i++)
        ck_assert_double_eq_tol(f.res->y[i], y[i], 1e-10);
    ck_assert_int_le(f.res->iterations, cold);
    fx_close(&f);
}
END_TEST

START_TEST(bad_feed_is_input_error)
{
    fixture f;
    fx_open(&f, "reactions/ammonia.yaml", KPHI_EOS_IDEAL);
    double n0[16] = {0};
    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_equil_solve(f.set, f.eos, 700.0, 1e7, n0, NULL, NULL, f.w, f.res, &err),
                     KPHI_EINPUT);
    n0[0] = -1.0;
    n0[1] = 3.0;
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_equil_solve(f.set, f.eos, 700.0, 1e7, n0, NULL, NULL, f.w, f.res, &err),
                     KPHI_EINPUT);
    n0[0] = 1.0;
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_equil_solve(f.set, f.eos, 700.0, -1e7, n0, NULL, NULL, f.w, f.res, &err),
                     KPHI_EINPUT);
    fx_close(&f);
}
END_TEST

START_TEST(equivalent_pressure_from_a_nearby_point)
{
    /* the local search from the point's own ideal-gas answer finds the same pressure as
     * the full-range Brent search (to 1e-9 relative), on the PR answers of the ammonia and
     * methanol sets over T and P; the ideal gas at that pressure gives the real-gas
     * conversion back */
    const char *sets[] = {"reactions/ammonia.yaml", "reactions/methanol.yaml"};
    for (size_t k = 0; k < 2; k++) {
        fixture f, g;
        fx_open(&f, sets[k], KPHI_EOS_PR);
        fx_open(&g, sets[k], KPHI_EOS_IDEAL);
        kphi_equil_result *id = kphi_equil_result_alloc(f.s, f.r);
        kphi_equil_result *t0 = kphi_equil_result_alloc(f.s, f.r);
        kphi_equil_result *t1 = kphi_equil_result_alloc(f.s, f.r);
        kphi_equil_result *const tmp[2] = {t0, t1};
        double n0[16];
        for (size_t i = 0; i < f.s; i++)
            n0[i] = 0.37 + 0.91 * (double)((i * 7 + 3) % 5);
        const double *wt = kphi_rxnset_conversion_weights(f.set);
        int n = 0;
        for (double T = 473.15; T < 800.0; T += 61.3)
            for (double P = 13.7e5; P < 600e5; P *= 2.3) {
                kphi_error err;
                kphi_error_clear(&err);
                ck_assert_int_eq(kphi_equil_solve(f.set, f.eos, T, P, n0, NULL, NULL, f.w, f.res,
                                                  &err), KPHI_OK);
                ck_assert_int_eq(kphi_equil_solve(g.set, g.eos, T, P, n0, NULL, NULL, f.w, id,
                                                  &err), KPHI_OK);
                double X = kphi_equil_conversion(f.res, n0, wt), Pa = NAN, Pb = NAN;
                int ra = kphi_equil_equivalent_pressure(g.set, g.eos, T, n0, wt, X, &Pa, NULL,
                                                        f.w, t0, &err);
                int rb = kphi_equil_equivalent_pressure_from(g.set, g.eos, T, n0, wt, X, id, &Pb,
                                                             f.w, tmp, &err);
                ck_assert_msg(ra == rb, "%s T=%g P=%g X=%.12g: %d %d %s", sets[k], T, P, X, ra, rb, err.msg);
                if (ra != KPHI_OK)
                    continue;
                ck_assert_msg(fabs(Pb / Pa - 1.0) < 1e-9, "%s T=%g P=%g: %.12g vs %.12g",
                              sets[k], T, P, Pb, Pa);
                ck_assert_int_eq(kphi_equil_solve(g.set, g.eos, T, Pb, n0, NULL, NULL, f.w, id,
                                                  &err), KPHI_OK);
                ck_assert_double_eq_tol(kphi_equil_conversion(id, n0, wt), X, 1e-11);
                n++;
            }
        ck_assert_int_eq(n, 30); /* 6 T x 5 P, all defined */
        kphi_equil_result_free(id);
        kphi_equil_result_free(t0);
        kphi_equil_result_free(t1);
        fx_close(&g);
        fx_close(&f);
    }
}
END_TEST

START_TEST(equivalent_pressure_undefined_says_why)
{
    fixture g;
    fx_open(&g, "reactions/ammonia.yaml", KPHI_EOS_IDEAL);
    kphi_equil_result *t0 = kphi_equil_result_alloc(g.s, g.r);
    kphi_equil_result *t1 = kphi_equil_result_alloc(g.s, g.r);
    kphi_equil_result *const tmp[2] = {t0, t1};
    const char *names[] = {"N2", "H2"};
    const double amt[] = {1.0, 3.0};
    double n0[8], P = NAN;
    feed_of(g.set, n0, names, amt, 2);
    const double *wt = kphi_rxnset_conversion_weights(g.set);
    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_equil_solve(g.set, g.eos, 723.15, 195e5, n0, NULL, NULL, g.w, g.res,
                                      &err), KPHI_OK);
    /* complete, nil and undefined conversions: nothing to match */
    const double Xs[] = {1.0, 1.0 - 1e-7, 3e-7, NAN};
    const char *why[] = {"complete", "complete", "is 0", "no conversion"};
    for (size_t k = 0; k < 4; k++) {
        kphi_error_clear(&err);
        ck_assert_int_eq(kphi_equil_equivalent_pressure_from(g.set, g.eos, 723.15, n0, wt, Xs[k],
                                                             g.res, &P, g.w, tmp, &err),
                         KPHI_EFAILED);
        ck_assert_msg(strncmp(err.msg, "undefined: ", 11) == 0 && strstr(err.msg, why[k]),
                      "%s", err.msg);
    }
    /* 0.9999 of N2 at 723 K is out of reach below 1e10 Pa for the ideal gas */
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_equil_equivalent_pressure_from(g.set, g.eos, 723.15, n0, wt, 0.9999,
                                                         g.res, &P, g.w, tmp, &err),
                     KPHI_EFAILED);
    ck_assert_msg(strstr(err.msg, "no pressure between 1 mbar and 100 kbar"), "%s", err.msg);
    kphi_equil_result_free(t0);
    kphi_equil_result_free(t1);
    fx_close(&g);
}
END_TEST

START_TEST(virial_beyond_its_range_says_so)
{
    /* the virial series over 150-700 C, 10-1000 bar for an ammonia loop gas: where it
     * fails, it fails with its own out-of-range reason (also when the equilibrium lies
     * just beyond the limit and the iteration is pressed against it), never as a stalled
     * Newton iteration */
    fixture f;
    fx_open(&f, "reactions/ammonia.yaml", KPHI_EOS_VIRIAL);
    const char *names[] = {"H2", "N2", "NH3", "CH4", "Ar"};
    const double amt[] = {67.2, 22.4, 3.1, 4.6, 2.7};
    double n0[8];
    feed_of(f.set, n0, names, amt, 5);
    int failed = 0, pressed = 0;
    for (int iT = 0; iT <= 55; iT++)
        for (int iP = 1; iP <= 100; iP++) {
            double T = 423.15 + 10.0 * iT, P = 10e5 * iP;
            kphi_error err;
            kphi_error_clear(&err);
            if (kphi_equil_solve(f.set, f.eos, T, P, n0, NULL, NULL, f.w, f.res, &err) ==
                KPHI_OK) {
                assert_invariants(&f, n0);
                continue;
            }
            failed++;
            ck_assert_int_eq(err.code, KPHI_EFAILED);
            ck_assert_msg(strstr(err.msg, "virial equation outside its range") != NULL,
                          "T=%g P=%g: %s", T, P, err.msg);
            pressed += strncmp(err.msg, "on the way to equilibrium, ", 27) == 0;
            /* a value at the limit is not printed as the limit ("0.50 > 0.5") */
            ck_assert_msg(strstr(err.msg, "density 0.50 > 0.5") == NULL &&
                              strstr(err.msg, "Z = 0.500 < 0.5") == NULL,
                          "%s", err.msg);
        }
    ck_assert_int_gt(failed, 100);
    ck_assert_int_gt(pressed, 10); /* the case that used to read "stalled" */
    fx_close(&f);
}
END_TEST

/* ---------------------------------------------------------------- K bases */

/* An ammonia set from text with one K correlation entry (species data from the shipped
 * database, found beside the name "reactions/t.yaml"). */
static kphi_rxnset *nh3_with_K(const char *entry)
{
    char text[1024];
    snprintf(text, sizeof text,
             "name: t\nspecies: [N2, H2, NH3, CH4, Ar]\nreactions:\n"
             "  - equation: N2 + 3 H2 = 2 NH3\n    K:\n      - %s\n",
             entry);
    kphi_error err;
    kphi_error_clear(&err);
    kphi_rxnset *set = kphi_rxnset_load_string(text, strlen(text), "reactions/t.yaml", NULL, &err);
    ck_assert_msg(set != NULL, "%s", err.msg);
    return set;
}

START_TEST(K_basis_one_atm_sign_through_the_solver)
{
    /* Ideal gas, 1 N2 + 3 H2, and a correlation stating ln K = -11.9 for a 1 atm standard
     * state. By definition of that K, y_NH3^2 / (y_N2 y_H2^3) = K (P / 1 atm)^2, so at
     * P = 50 atm ln Ky = -11.9 + 2 ln 50; in kphi's 1 bar basis the same K is ln K_bar =
     * -11.9 - 2 ln 1.01325. The opposite sign of the conversion would move Ky by a factor
     * 1.01325^4 (5 %). */
    kphi_rxnset *set = nh3_with_K("{name: atm, source: s, ln K: {const: -11.9}, P_standard: "
                                  "1 atm, T_range: [600 K, 800 K]}");
    size_t s = kphi_rxnset_n_species(set), r = kphi_rxnset_n_reactions(set);
    kphi_eos *ig = kphi_eos_alloc(KPHI_EOS_IDEAL, s);
    kphi_error err;
    kphi_error_clear(&err);
    for (size_t i = 0; i < s; i++)
        ck_assert_int_eq(kphi_eos_set_species(ig, i, kphi_rxnset_species(set, i), &err), KPHI_OK);
    kphi_equil_work *w = kphi_equil_work_alloc(s, r);
    kphi_equil_result *res = kphi_equil_result_alloc(s, r);
    double n0[5] = {1.0, 3.0, 0.0, 0.0, 0.0};
    double P = 50.0 * 101325.0, T = 701.3;
    kphi_equil_options opt = kphi_equil_options_default();
    opt.K_basis = (size_t)kphi_rxnset_K_basis_find(set, "atm");
    ck_assert_int_eq(kphi_equil_solve(set, ig, T, P, n0, NULL, &opt, w, res, &err), KPHI_OK);
    ck_assert_uint_eq(res->K_basis[0], opt.K_basis);
    ck_assert_int_eq(res->K_outside[0], 0);
    /* Ky from the solved y against K_atm (P/atm)^2 = exp(-11.9) 50^2 */
    ck_assert_double_eq_tol(res->lnKy[0], -11.9 + 2.0 * log(50.0), 1e-9);
    /* and the same through the closed form in bar: ln K_bar = -11.9 - 2 ln 1.01325 */
    double x = nh3_extent(-11.9 - 2.0 * log(1.01325), P);
    ck_assert_double_eq_tol(res->y[2], 2.0 * x / (4.0 - 2.0 * x), 1e-9);
    ck_assert_double_eq_tol(res->lnK[0], -11.9 - 2.0 * log(1.01325), 1e-14);
    /* outside the range: the same answer, flagged */
    ck_assert_int_eq(kphi_equil_solve(set, ig, 590.0, P, n0, NULL, &opt, w, res, &err), KPHI_OK);
    ck_assert_int_eq(res->K_outside[0], 1);
    /* a basis the set does not have */
    opt.K_basis = 2;
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_equil_solve(set, ig, T, P, n0, NULL, &opt, w, res, &err), KPHI_EINPUT);
    ck_assert_str_eq(err.msg, "K basis 2: the reaction set 't' has 2 (0 = tables)");
    kphi_equil_result_free(res);
    kphi_equil_work_free(w);
    kphi_eos_free(ig);
    kphi_rxnset_free(set);
}
END_TEST

START_TEST(K_basis_equal_to_tables_gives_the_tables_answer)
{
    /* A correlation that states exactly the tables' ln K at T must give the tables' answer
     * with every model: the shift of g°/RT changes nothing else. */
    fixture f;
    for (int m = 0; m < KPHI_EOS_N_MODELS; m++) {
        fx_open(&f, "reactions/ammonia.yaml", (kphi_eos_model)m);
        const char *names[] = {"N2", "H2", "NH3", "Ar"};
        const double amt[] = {22.4, 67.2, 3.1, 2.7};
        double n0[16];
        feed_of(f.set, n0, names, amt, 4);
        double T = 717.4, P = 152e5;
        kphi_error err;
        kphi_error_clear(&err);
        ck_assert_int_eq(kphi_equil_solve(f.set, f.eos, T, P, n0, NULL, NULL, f.w, f.res, &err),
                         KPHI_OK);
        double lnK = f.res->lnK[0], y[16];
        memcpy(y, f.res->y, f.s * sizeof *y);
        char entry[256];
        snprintf(entry, sizeof entry,
                 "{name: same, source: s, ln K: {const: %.17g}, P_standard: 1 bar, T_range: "
                 "[600 K, 800 K]}",
                 lnK);
        kphi_rxnset *set = nh3_with_K(entry);
        kphi_equil_options opt = kphi_equil_options_default();
        opt.K_basis = 1;
        ck_assert_int_eq(kphi_equil_solve(set, f.eos, T, P, n0, NULL, &opt, f.w, f.res, &err),
                         KPHI_OK);
        for (size_t i = 0; i < f.s; i++)
            ck_assert_msg(fabs(f.res->y[i] - y[i]) < 1e-12, "%s: y[%zu] %.15g vs %.15g",
                          kphi_eos_model_name((kphi_eos_model)m), i, f.res->y[i], y[i]);
        kphi_rxnset_free(set);
        fx_close(&f);
    }
}
END_TEST

START_TEST(K_basis_methanol_two_reactions)
{
    /* Both methanol reactions from Graaf et al. (1986) (reactions/methanol.yaml): the
     * answer has the correlations' K, K = Kphi Ky (P/P°)^dnu holds for each reaction, the
     * invariants hold, and a warm start gives the cold answer; with CO and H2 only the
     * shift reaction is blocked and CO2, H2O stay at zero. */
    fixture f;
    fx_open(&f, "reactions/methanol.yaml", KPHI_EOS_PR);
    const char *names[] = {"CO", "CO2", "H2", "CH4", "N2"};
    const double amt[] = {10.3, 3.7, 71.9, 9.6, 4.5}; /* a made-up loop gas */
    double n0[16];
    feed_of(f.set, n0, names, amt, 5);
    kphi_equil_options opt = kphi_equil_options_default();
    opt.K_basis = (size_t)kphi_rxnset_K_basis_find(f.set, "graaf1986");
    kphi_error err;
    kphi_error_clear(&err);
    double T = 517.3, P = 76.4e5;
    ck_assert_int_eq(kphi_equil_solve(f.set, f.eos, T, P, n0, NULL, &opt, f.w, f.res, &err),
                     KPHI_OK);
    assert_invariants(&f, n0);
    for (size_t j = 0; j < 2; j++) {
        const kphi_rxnset_kcorr *k = kphi_rxnset_kcorr_get(f.set, j, opt.K_basis);
        ck_assert_double_eq_tol(f.res->lnK[j], kphi_rxnset_kcorr_lnK(k, T), 1e-14);
        ck_assert_uint_eq(f.res->K_basis[j], opt.K_basis);
        double dnu = kphi_rxnset_dnu(f.set, j);
        ck_assert_double_eq_tol(f.res->lnK[j],
                                f.res->lnKphi[j] + f.res->lnKy[j] + dnu * log(P / 1e5), 1e-9);
    }
    /* Graaf's K1 is below the tables': less methanol than with the tables */
    long meoh = kphi_rxnset_species_index(f.set, "CH3OH");
    double y_graaf = f.res->y[meoh];
    double xi[2] = {f.res->xi[0], f.res->xi[1]};
    ck_assert_int_eq(kphi_equil_solve(f.set, f.eos, T, P, n0, NULL, NULL, f.w, f.res, &err),
                     KPHI_OK);
    ck_assert_msg(f.res->y[meoh] > y_graaf, "tables %g, graaf1986 %g", f.res->y[meoh], y_graaf);
    /* warm start from a neighbouring point */
    ck_assert_int_eq(kphi_equil_solve(f.set, f.eos, T + 2.0, P, n0, NULL, &opt, f.w, f.res, &err),
                     KPHI_OK);
    ck_assert_int_eq(kphi_equil_solve(f.set, f.eos, T, P, n0, f.res->xi, &opt, f.w, f.res, &err),
                     KPHI_OK);
    ck_assert_double_eq_tol(f.res->y[meoh], y_graaf, 1e-12);
    ck_assert_double_eq_tol(f.res->xi[0], xi[0], 1e-9);
    /* CO and H2 only */
    const char *n2[] = {"CO", "H2", "N2"};
    const double a2[] = {1.0, 2.2, 0.1};
    feed_of(f.set, n0, n2, a2, 3);
    ck_assert_int_eq(kphi_equil_solve(f.set, f.eos, T, P, n0, NULL, &opt, f.w, f.res, &err),
                     KPHI_OK);
    assert_invariants(&f, n0);
    long co2 = kphi_rxnset_species_index(f.set, "CO2");
    ck_assert(f.res->n[co2] == 0.0 && f.res->held_zero[co2]);
    ck_assert_double_eq_tol(f.res->lnK[0],
                            kphi_rxnset_kcorr_lnK(kphi_rxnset_kcorr_get(f.set, 0, opt.K_basis), T),
                            1e-14);
    fx_close(&f);
}
END_TEST

START_TEST(synthesis_gas_indicators)
{
    /* the methanol case's feed (cases/methanol_converter.yaml, invented): SN =
     * (70.5 - 3.6)/(9.8 + 3.6), CO2/(CO + CO2) = 3.6/13.4; ammonia H2/N2 = 67.2/22.4 */
    fixture f;
    fx_open(&f, "reactions/methanol.yaml", KPHI_EOS_IDEAL);
    const char *names[] = {"CO", "CO2", "H2", "CH4", "N2", "H2O", "CH3OH"};
    const double amt[] = {9.8, 3.6, 70.5, 11.9, 3.2, 0.4, 0.6};
    double n0[8];
    feed_of(f.set, n0, names, amt, 7);
    kphi_equil_indicator ind[KPHI_EQUIL_MAX_INDICATORS];
    ck_assert_uint_eq(kphi_equil_indicators(f.set, n0, ind), 2); /* no H2/N2 without NH3 */
    ck_assert_str_eq(ind[0].name, "SN");
    ck_assert_double_eq_tol(ind[0].value, (70.5 - 3.6) / 13.4, 1e-14);
    ck_assert_str_eq(ind[1].name, "CO2/COx");
    ck_assert_double_eq_tol(ind[1].value, 3.6 / 13.4, 1e-15);
    /* CO + 2 H2 = CH3OH alone keeps SN: a feed at SN = 2 stays at 2 */
    const char *n2[] = {"CO", "H2"};
    const double a2[] = {1.3, 2.6};
    feed_of(f.set, n0, n2, a2, 2);
    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_equil_solve(f.set, f.eos, 498.15, 7.9e6, n0, NULL, NULL, f.w, f.res,
                                      &err),
                     KPHI_OK);
    kphi_equil_indicators(f.set, f.res->n, ind);
    ck_assert_double_eq_tol(ind[0].value, 2.0, 1e-12);
    ck_assert_double_eq(ind[1].value, 0.0);
    /* no carbon oxides: undefined */
    const char *n3[] = {"H2", "CH3OH"};
    feed_of(f.set, n0, n3, a2, 2);
    kphi_equil_indicators(f.set, n0, ind);
    ck_assert(isnan(ind[0].value) && isnan(ind[1].value));
    ck_assert_str_eq(ind[0].zero, "CO + CO2");
    fx_close(&f);
    fx_open(&f, "reactions/ammonia.yaml", KPHI_EOS_IDEAL);
    const char *n4[] = {"N2", "H2", "NH3"};
    const double a4[] = {22.4, 67.2, 3.1};
    feed_of(f.set, n0, n4, a4, 3);
    ck_assert_uint_eq(kphi_equil_indicators(f.set, n0, ind), 1);
    ck_assert_str_eq(ind[0].name, "H2/N2");
    ck_assert_double_eq_tol(ind[0].value, 3.0, 1e-15);
    fx_close(&f);
}
END_TEST

static Suite *equil_suite(void)
{
    Suite *s = suite_create("equil");
    TCase *tc = tcase_create("core");
    tcase_set_timeout(tc, 60);
    tcase_add_test(tc, ammonia_ideal_closed_form);
    tcase_add_test(tc, ammonia_conversion_rises_with_P_falls_with_T);
    tcase_add_test(tc, scaling_feed_scales_amounts);
    tcase_add_test(tc, every_set_many_conditions);
    tcase_add_test(tc, methanol_without_co2_holds_co2_and_h2o_at_zero);
    tcase_add_test(tc, trace_species_converge);
    tcase_add_test(tc, extreme_K_converges);
    tcase_add_test(tc, warm_start_gives_same_answer);
    tcase_add_test(tc, bad_feed_is_input_error);
    tcase_add_test(tc, equivalent_pressure_from_a_nearby_point);
    tcase_add_test(tc, equivalent_pressure_undefined_says_why);
    tcase_add_test(tc, virial_beyond_its_range_says_so);
    tcase_add_test(tc, K_basis_one_atm_sign_through_the_solver);
    tcase_add_test(tc, K_basis_equal_to_tables_gives_the_tables_answer);
    tcase_add_test(tc, K_basis_methanol_two_reactions);
    tcase_add_test(tc, synthesis_gas_indicators);
    suite_add_tcase(s, tc);
    return s;
}

KPHI_TEST_MAIN(equil_suite)
