/* kphi equil, energy: the enthalpy of a gas mixture, the adiabatic equilibrium outlet
 * temperature of a bed, and the approach temperature of a measured outlet.
 *
 * Mixture enthalpy (J), elemental reference scale (kphi_thermo_h(); McBride, Gordon &
 * Reno 1993, NASA TM-4513, eq. 2 for h°/RT) plus the residual enthalpy of the model:
 *   H(T, P, n) = sum_i n_i h_i°(T) + n_t h_dep(T, P, y),   y_i = n_i / n_t,
 * h_dep = H - H_ig from the equation of state (kphi_eos_eval(); 0 for the ideal gas).
 * Because h° carries the enthalpies of formation, H of a reacting mixture changes with
 * composition at fixed T by the heats of reaction: one balance covers both.
 *
 * Adiabatic equilibrium outlet (steady-flow energy balance of an adiabatic bed with no
 * shaft work, outlet at chemical equilibrium; Smith, Van Ness & Abbott 2005, "Introduction
 * to Chemical Engineering Thermodynamics", 7th ed., ch. 4, heat effects of reactions,
 * from memory):
 *   f(T) = H(T, P, n_eq(T)) - H(T_in, P, n0) = 0,
 * n_eq(T) the equilibrium amounts at T, P from feed n0. f increases with T (the frozen heat
 * capacity plus sum_j dH_j dxi_j/dT, and by van 't Hoff dxi_j/dT has the sign of dH_j), so
 * the root lies above T_in when f(T_in) < 0 (exothermic sets heat up) and below it when
 * f(T_in) > 0 (endothermic sets cool down).
 *
 * Beds in series with intercooling: the outlet of bed k, brought to the next inlet
 * temperature at constant composition (an indirect heat exchanger), is the feed of bed
 * k + 1, whose adiabatic equilibrium outlet is found as above.
 *
 * Approach temperature: the temperature T_eq at which the equilibrium mole fraction of a
 * species k at the same P and feed equals a measured value,
 *   g(T) = y_k,eq(T) - y_meas = 0;
 * the approach is dT = T_eq - T_outlet (K).
 *
 * Both roots: bracket by stepping outward from the start temperature (steps 8, 16, 32 ...
 * K, capped at 50 K for sets with several reactions, where y_k(T) need not be monotonic,
 * so the root nearest the start is found), clamped to the range in which every species of
 * the set has thermo data; then Brent's method on T (Brent 1973, "Algorithms for
 * Minimization without Derivatives", ch. 4, from memory; gsl_root_fsolver_brent) to an
 * interval below 1e-9 K. The root finder is allocated once per call; each function value
 * is one kphi_equil_solve() on the caller's workspace, which does not allocate. */
#include "kphi/equil.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include <gsl/gsl_errno.h>
#include <gsl/gsl_roots.h>

#include "equil_internal.h"
#include "internal.h"
#include "kphi/thermo.h"

#define STEP0 8.0        /* K, first bracket step */
#define STEP_MULTI 50.0  /* K, largest step when y_k(T) may not be monotonic */
#define T_TOL 1e-9       /* K, Brent interval */
#define MAX_BRENT 200

static const kphi_mark none = {0, 0};

int kphi_equil_enthalpy(const kphi_rxnset *set, const kphi_eos *eos, double T, double P,
                        const double n[], kphi_equil_work *w, double *H, kphi_error *err)
{
    size_t s = kphi_rxnset_n_species(set);
    if (s > w->cap_s || kphi_eos_size(eos) != s)
        return kphi_error_set(err, KPHI_EINPUT, NULL, none,
                              "enthalpy: the workspace or model does not fit the reaction set "
                              "(%zu species)",
                              s);
    if (!(T > 0.0) || !isfinite(T) || !(P > 0.0) || !isfinite(P))
        return kphi_error_set(err, KPHI_EINPUT, NULL, none,
                              "enthalpy: needs T > 0 and P > 0, got T = %g K, P = %g Pa", T, P);
    double nt = 0.0, h = 0.0;
    for (size_t i = 0; i < s; i++) {
        if (!(n[i] >= 0.0) || !isfinite(n[i]))
            return kphi_error_set(err, KPHI_EINPUT, NULL, none,
                                  "enthalpy: amount of %s is %g; expected >= 0",
                                  kphi_rxnset_species(set, i)->name, n[i]);
        nt += n[i];
        if (n[i] > 0.0)
            h += n[i] * kphi_thermo_h(kphi_rxnset_species(set, i), T);
    }
    if (!(nt > 0.0))
        return kphi_error_set(err, KPHI_EINPUT, NULL, none,
                              "enthalpy: the mixture is empty (total amount 0)");
    if (kphi_eos_get_model(eos) != KPHI_EOS_IDEAL) {
        /* the minimiser's trial-point arrays are scratch between steps */
        double *y = w->y_try, *lnphi = w->lnphi_try;
        for (size_t i = 0; i < s; i++)
            y[i] = n[i] / nt;
        kphi_eos_state st;
        int rc = kphi_eos_eval(eos, T, P, y, lnphi, NULL, &st, w->ew, err);
        if (rc != KPHI_OK)
            return rc;
        h += nt * st.h_dep;
    }
    *H = h;
    return KPHI_OK;
}

/* ------------------------------------------------------------ shared root finding */

/* The temperature range in which every species of the set has thermo data. */
static void data_range(const kphi_rxnset *set, double *lo, double *hi)
{
    double a = 0.0, b = INFINITY;
    for (size_t i = 0; i < kphi_rxnset_n_species(set); i++) {
        const kphi_species *sp = kphi_rxnset_species(set, i);
        if (sp->T_low > a)
            a = sp->T_low;
        if (sp->T_high < b)
            b = sp->T_high;
    }
    *lo = a;
    *hi = b;
}

typedef struct {
    const kphi_rxnset *set;
    const kphi_eos *eos;
    double P;
    const double *n0;
    const kphi_equil_options *opt;
    kphi_equil_work *w;
    kphi_equil_result *res;
    double H_in;     /* adiabatic: J */
    size_t k;        /* approach: species */
    double y_meas;   /* approach: measured mole fraction */
    int failed;      /* a function value could not be computed */
    double T_failed; /* where */
    kphi_error e;    /* why (the first failure) */
} energy_params;

static void params_init(energy_params *p, const kphi_rxnset *set, const kphi_eos *eos,
                        double P, const double n0[], const kphi_equil_options *opt,
                        kphi_equil_work *w, kphi_equil_result *res)
{
    memset(p, 0, sizeof *p);
    p->set = set;
    p->eos = eos;
    p->P = P;
    p->n0 = n0;
    p->opt = opt;
    p->w = w;
    p->res = res;
    kphi_error_clear(&p->e);
}

static double solve_at(double T, energy_params *p)
{
    kphi_error e;
    kphi_error_clear(&e);
    if (kphi_equil_solve(p->set, p->eos, T, p->P, p->n0, NULL, p->opt, p->w, p->res, &e) !=
        KPHI_OK) {
        if (!p->failed) {
            p->e = e;
            p->T_failed = T;
        }
        p->failed = 1;
        return NAN;
    }
    return 0.0;
}

static double adiabatic_fn(double T, void *vp)
{
    energy_params *p = vp;
    if (isnan(solve_at(T, p)))
        return NAN;
    kphi_error e;
    kphi_error_clear(&e);
    double H;
    if (kphi_equil_enthalpy(p->set, p->eos, T, p->P, p->res->n, p->w, &H, &e) != KPHI_OK) {
        if (!p->failed) {
            p->e = e;
            p->T_failed = T;
        }
        p->failed = 1;
        return NAN;
    }
    return H - p->H_in;
}

static double approach_fn(double T, void *vp)
{
    energy_params *p = vp;
    if (isnan(solve_at(T, p)))
        return NAN;
    return p->res->y[p->k] - p->y_meas;
}

/* Step outward from T0 (value f0, nonzero) towards lo (when down) and hi (when up),
 * alternating sides, until the sign changes. Returns 1 with the bracket [*a, *b] (a < b),
 * or 0 with the range actually covered in [*reach_lo, *reach_hi]; a side stops at the
 * first point where the function cannot be evaluated (p->failed records it). */
static int bracket(double (*fn)(double, void *), energy_params *p, double T0, double f0,
                   double lo, double hi, int down, int up, double max_step, double *a,
                   double *b, double *reach_lo, double *reach_hi)
{
    double prev[2] = {T0, T0};
    int alive[2] = {down && T0 > lo, up && T0 < hi};
    double d = STEP0;
    *reach_lo = *reach_hi = T0;
    while (alive[0] || alive[1]) {
        for (int side = 1; side >= 0; side--) { /* up first: the usual direction */
            if (!alive[side])
                continue;
            double T = side ? prev[1] + d : prev[0] - d;
            if (side && T >= hi) {
                T = hi;
                alive[1] = 0;
            } else if (!side && T <= lo) {
                T = lo;
                alive[0] = 0;
            }
            double f = fn(T, p);
            if (isnan(f)) {
                alive[side] = 0;
                continue;
            }
            if (side)
                *reach_hi = T;
            else
                *reach_lo = T;
            if (f == 0.0 || (f > 0.0) != (f0 > 0.0)) {
                *a = side ? prev[1] : T;
                *b = side ? T : prev[0];
                return 1;
            }
            prev[side] = T;
        }
        d = 2.0 * d > max_step ? max_step : 2.0 * d;
    }
    return 0;
}

/* Brent's method on [a, b] (fn changes sign over it). */
static int brent(double (*fn)(double, void *), energy_params *p, double a, double b,
                 double *root, kphi_error *err)
{
    gsl_function F = {fn, p};
    gsl_root_fsolver *s = gsl_root_fsolver_alloc(gsl_root_fsolver_brent);
    if (s == NULL)
        return kphi_error_set(err, KPHI_ENOMEM, NULL, none, "out of memory");
    int rc = gsl_root_fsolver_set(s, &F, a, b);
    double x = NAN;
    for (int it = 0; rc == GSL_SUCCESS && it < MAX_BRENT; it++) {
        rc = gsl_root_fsolver_iterate(s);
        if (rc != GSL_SUCCESS || p->failed)
            break;
        x = gsl_root_fsolver_root(s);
        double lo = gsl_root_fsolver_x_lower(s), hi = gsl_root_fsolver_x_upper(s);
        if (gsl_root_test_interval(lo, hi, T_TOL, 0.0) == GSL_SUCCESS)
            break;
    }
    gsl_root_fsolver_free(s);
    if (p->failed)
        return kphi_error_set(err, p->e.code == KPHI_OK ? KPHI_EFAILED : p->e.code, NULL, none,
                              "at T = %.2f K: %.200s", p->T_failed, p->e.msg);
    if (rc != GSL_SUCCESS || !isfinite(x))
        return kphi_error_set(err, KPHI_EFAILED, NULL, none, "root search on T failed (%s)",
                              rc != GSL_SUCCESS ? gsl_strerror(rc) : "no root");
    *root = x;
    return KPHI_OK;
}

/* Brent's method also converges on a jump of fn through zero, as where the equation of
 * state changes from one root to another (a mixture that may condense). At a true root fn
 * is below tol (a continuous function changes by |fn'| T_TOL over the last interval);
 * otherwise there is no answer to give. `what` names fn and its unit for the message. */
static int check_root(double (*fn)(double, void *), energy_params *p, double T, double tol,
                      const char *what, kphi_error *err)
{
    double f = fn(T, p);
    if (p->failed)
        return kphi_error_set(err, p->e.code == KPHI_OK ? KPHI_EFAILED : p->e.code, NULL, none,
                              "at T = %.2f K: %.200s", p->T_failed, p->e.msg);
    if (!(fabs(f) <= tol))
        return kphi_error_set(err, KPHI_EFAILED, NULL, none,
                              "%s jumps through zero at T = %.2f K (by %.3g): the EOS "
                              "changes root there (the mixture may condense); no gas-phase "
                              "answer",
                              what, T, f);
    return KPHI_OK;
}

/* The final solve at the root, into out. */
static int finish(energy_params *p, double T, kphi_equil_result *out, kphi_error *err)
{
    return kphi_equil_solve(p->set, p->eos, T, p->P, p->n0, NULL, p->opt, p->w, out, err);
}

static int check_T(const kphi_rxnset *set, double T, const char *what, kphi_error *err)
{
    double lo, hi;
    data_range(set, &lo, &hi);
    char v[32];
    if (!(T >= lo && T <= hi))
        return kphi_error_set(err, KPHI_EINPUT, NULL, none,
                              "%s %s K is outside the species data range (%g-%g K)", what,
                              kphi__fmt_beyond(v, "%g", T, T < lo ? lo : hi), lo, hi);
    return KPHI_OK;
}

/* ------------------------------------------------------------ adiabatic outlet */

int kphi_equil_adiabatic_outlet(const kphi_rxnset *set, const kphi_eos *eos, double T_in,
                                double P, const double n0[], const kphi_equil_options *opt,
                                kphi_equil_work *w, kphi_equil_result *out, kphi_error *err)
{
    int rc = check_T(set, T_in, "inlet temperature", err);
    if (rc != KPHI_OK)
        return rc;
    energy_params p;
    params_init(&p, set, eos, P, n0, opt, w, out);
    rc = kphi_equil_enthalpy(set, eos, T_in, P, n0, w, &p.H_in, err);
    if (rc != KPHI_OK)
        return rc;
    double f0 = adiabatic_fn(T_in, &p);
    if (p.failed)
        return kphi_error_set(err, p.e.code, NULL, none, "at the inlet T = %.2f K: %.200s", T_in,
                              p.e.msg);
    if (f0 == 0.0)
        return finish(&p, T_in, out, err);
    double lo, hi, a, b, rlo, rhi;
    data_range(set, &lo, &hi);
    int up = f0 < 0.0; /* heat released at T_in: the outlet is hotter */
    if (!bracket(adiabatic_fn, &p, T_in, f0, lo, hi, !up, up, INFINITY, &a, &b, &rlo, &rhi)) {
        double edge = up ? rhi : rlo;
        if (p.failed)
            return kphi_error_set(err, KPHI_EFAILED, NULL, none,
                                  "no adiabatic equilibrium outlet found between %.2f and %.2f K: "
                                  "the equilibrium fails at %.2f K (%.120s)",
                                  up ? T_in : edge, up ? edge : T_in, p.T_failed, p.e.msg);
        return kphi_error_set(err, KPHI_EFAILED, NULL, none,
                              "no adiabatic equilibrium outlet in the species data range "
                              "(%g-%g K): the energy balance does not close %s %.2f K",
                              lo, hi, up ? "below" : "above", edge);
    }
    double T_out;
    p.failed = 0; /* a failure on the far side of the start while bracketing is moot */
    rc = brent(adiabatic_fn, &p, a, b, &T_out, err);
    if (rc == KPHI_OK) {
        /* 1e-6 of n0 R T_in (J): far above |dH/dT| T_TOL, far below any jump */
        double nt = 0.0;
        for (size_t i = 0; i < kphi_rxnset_n_species(set); i++)
            nt += n0[i];
        rc = check_root(adiabatic_fn, &p, T_out, 1e-6 * nt * KPHI_R * T_in,
                        "the energy balance (J)", err);
    }
    if (rc != KPHI_OK)
        return rc;
    return finish(&p, T_out, out, err);
}

/* ------------------------------------------------------------ beds in series */

int kphi_equil_adiabatic_beds(const kphi_rxnset *set, const kphi_eos *eos, const double T_in[],
                              size_t n_beds, double P, const double n0[],
                              const kphi_equil_options *opt, kphi_equil_work *w,
                              kphi_equil_result *const out[], kphi_error *err)
{
    if (n_beds == 0 || out == NULL || T_in == NULL)
        return kphi_error_set(err, KPHI_EINPUT, NULL, none,
                              "adiabatic beds: give at least one bed inlet temperature");
    for (size_t k = 0; k < n_beds; k++) {
        const double *feed = k == 0 ? n0 : out[k - 1]->n;
        kphi_error e;
        kphi_error_clear(&e);
        int rc = kphi_equil_adiabatic_outlet(set, eos, T_in[k], P, feed, opt, w, out[k], &e);
        if (rc != KPHI_OK && n_beds == 1)
            return kphi_error_set(err, e.code, NULL, none, "%s", e.msg);
        if (rc != KPHI_OK)
            return kphi_error_set(err, e.code, NULL, none, "bed %zu: %.200s", k + 1, e.msg);
    }
    return KPHI_OK;
}

/* ------------------------------------------------------------ approach temperature */

int kphi_equil_approach_temperature(const kphi_rxnset *set, const kphi_eos *eos, double T,
                                    double P, const double n0[], size_t k, double y_meas,
                                    const kphi_equil_options *opt, kphi_equil_work *w,
                                    kphi_equil_result *out, kphi_error *err)
{
    size_t s = kphi_rxnset_n_species(set);
    if (k >= s)
        return kphi_error_set(err, KPHI_EINPUT, NULL, none,
                              "approach: species index %zu is not in the set (%zu species)", k,
                              s);
    const char *name = kphi_rxnset_species(set, k)->name;
    if (kphi_rxnset_is_inert(set, k))
        return kphi_error_set(err, KPHI_EINPUT, NULL, none,
                              "approach: %s is inert (in no reaction), so its equilibrium mole "
                              "fraction does not tell a temperature",
                              name);
    if (!(y_meas > 0.0 && y_meas < 1.0))
        return kphi_error_set(err, KPHI_EINPUT, NULL, none,
                              "approach: measured y_%s = %g must lie strictly between 0 and 1",
                              name, y_meas);
    int rc = check_T(set, T, "outlet temperature", err);
    if (rc != KPHI_OK)
        return rc;
    energy_params p;
    params_init(&p, set, eos, P, n0, opt, w, out);
    p.k = k;
    p.y_meas = y_meas;
    double g0 = approach_fn(T, &p);
    if (p.failed)
        return kphi_error_set(err, p.e.code, NULL, none, "at T = %.2f K: %.200s", T, p.e.msg);
    if (g0 == 0.0)
        return finish(&p, T, out, err);
    double lo, hi, a, b, rlo, rhi;
    data_range(set, &lo, &hi);
    double max_step = kphi_rxnset_n_reactions(set) > 1 ? STEP_MULTI : INFINITY;
    if (!bracket(approach_fn, &p, T, g0, lo, hi, 1, 1, max_step, &a, &b, &rlo, &rhi)) {
        const char *where = g0 > 0.0 ? "below" : "above";
        if (rlo <= lo && rhi >= hi)
            return kphi_error_set(err, KPHI_EFAILED, NULL, none,
                                  "y_%s = %.4g is %s the equilibrium limit at every temperature "
                                  "in the data range (%g-%g K)",
                                  name, y_meas, where, lo, hi);
        return kphi_error_set(err, KPHI_EFAILED, NULL, none,
                              "y_%s = %.4g is %s the equilibrium value at every temperature "
                              "from %.2f to %.2f K; the equilibrium fails at %.2f K (%.100s)",
                              name, y_meas, where, rlo, rhi, p.T_failed, p.e.msg);
    }
    double T_eq;
    p.failed = 0;
    rc = brent(approach_fn, &p, a, b, &T_eq, err);
    if (rc == KPHI_OK)
        rc = check_root(approach_fn, &p, T_eq, 1e-8, "y_eq - y_measured", err);
    if (rc != KPHI_OK)
        return rc;
    return finish(&p, T_eq, out, err);
}
