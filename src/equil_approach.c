/* kphi equil, approach per reaction: how far each reaction of a measured outlet analysis
 * is from equilibrium, as a temperature.
 *
 * For reaction j and the measured outlet composition y at the outlet's T and P, the
 * mass-action ratio with the fugacities of the model (Denbigh 1981, "The Principles of
 * Chemical Equilibrium", 4th ed., eq. 4.27, with the activity f_i/P° = y_i phi_i P/P°):
 *   ln Q_j = sum_i nu_ij ln(y_i phi_i(T, P, y) P/P°),     P° = 1 bar,
 * phi from the equation of state at the measured composition (1 for the ideal gas). The
 * reaction is at equilibrium at the temperature T_j where
 *   ln K_j(T_j) = -sum_i nu_ij g_i°(T_j)/(R T_j) = ln Q_j,
 * and its approach to equilibrium is dT_j = T_j - T (K). With a K basis in the options, a
 * reaction that has a correlation there takes ln K_j(T) from it
 * (kphi_rxnset_kcorr_lnK()), as the minimiser does. Q_j is a property of the gas as
 * measured; only K_j varies with the trial temperature, so each T_j is a root of one
 * smooth function of T, found by stepping outward from T (8, 16, 32 ... K) within the
 * range where every species of reaction j has thermo data, then Brent's method to 1e-9 K
 * (Brent 1973, "Algorithms for Minimization without Derivatives", ch. 4, from memory;
 * gsl_root_fsolver_brent). By van 't Hoff, d ln K_j/dT = dH_j/(R T^2), so ln K_j is
 * monotonic wherever dH_j keeps its sign and the root is unique there.
 *
 * A reaction in which a species of the analysis is 0 has Q_j = 0 or infinity and no such
 * temperature: that is reported per reaction, not as an error. */
#include "kphi/equil.h"

#include <math.h>
#include <string.h>

#include <gsl/gsl_errno.h>
#include <gsl/gsl_roots.h>

#include "equil_internal.h"
#include "kphi/thermo.h"

#define STEP0 8.0      /* K, first bracket step */
#define T_TOL 1e-9     /* K, Brent interval */
#define MAX_BRENT 200

static const kphi_mark none = {0, 0};

typedef struct {
    const kphi_rxnset *set;
    size_t j;
    double lnQ;
    const kphi_rxnset_kcorr *kc; /* the reaction's correlation in the chosen basis, or NULL */
} lnk_params;

/* ln K_j(T) - ln Q_j. */
static double lnk_fn(double T, void *vp)
{
    const lnk_params *p = vp;
    if (p->kc != NULL)
        return kphi_rxnset_kcorr_lnK(p->kc, T) - p->lnQ;
    double dg = 0.0;
    for (size_t i = 0; i < kphi_rxnset_n_species(p->set); i++) {
        double nu = kphi_rxnset_nu(p->set, p->j, i);
        if (nu != 0.0)
            dg += nu * kphi_thermo_g(kphi_rxnset_species(p->set, i), T);
    }
    return -dg / (KPHI_R * T) - p->lnQ;
}

/* The range where every species of reaction j has thermo data. */
static void reaction_range(const kphi_rxnset *set, size_t j, double *lo, double *hi)
{
    double a = 0.0, b = INFINITY;
    for (size_t i = 0; i < kphi_rxnset_n_species(set); i++) {
        if (kphi_rxnset_nu(set, j, i) == 0.0)
            continue;
        const kphi_species *sp = kphi_rxnset_species(set, i);
        a = fmax(a, sp->T_low);
        b = fmin(b, sp->T_high);
    }
    *lo = a;
    *hi = b;
}

/* Root of lnk_fn nearest T in [lo, hi]: NAN when there is none. */
static double reaction_root(lnk_params *p, double T, double lo, double hi, int *gsl_failed)
{
    double f0 = lnk_fn(T, p);
    if (f0 == 0.0)
        return T;
    /* step outward on both sides alternately; the first sign change brackets the root
     * nearest T */
    double a = NAN, b = NAN, fa = NAN;
    double up = T, dn = T, fup = f0, fdn = f0, step = STEP0;
    for (int k = 0; k < 64 && isnan(a); k++, step *= 2.0) {
        if (up < hi) {
            double t = fmin(up + step, hi), ft = lnk_fn(t, p);
            if (ft * fup <= 0.0) {
                a = up;
                b = t;
                fa = fup;
                break;
            }
            up = t;
            fup = ft;
        }
        if (dn > lo) {
            double t = fmax(dn - step, lo), ft = lnk_fn(t, p);
            if (ft * fdn <= 0.0) {
                a = t;
                b = dn;
                fa = ft;
                break;
            }
            dn = t;
            fdn = ft;
        }
        if (!(up < hi) && !(dn > lo))
            break;
    }
    if (isnan(a))
        return NAN;
    if (fa == 0.0)
        return a;
    gsl_function F = {lnk_fn, p};
    gsl_root_fsolver *s = gsl_root_fsolver_alloc(gsl_root_fsolver_brent);
    if (s == NULL) {
        *gsl_failed = GSL_ENOMEM;
        return NAN;
    }
    int rc = gsl_root_fsolver_set(s, &F, a, b);
    double root = NAN;
    for (int it = 0; rc == GSL_SUCCESS && it < MAX_BRENT; it++) {
        rc = gsl_root_fsolver_iterate(s);
        if (rc != GSL_SUCCESS)
            break;
        root = gsl_root_fsolver_root(s);
        if (gsl_root_test_interval(gsl_root_fsolver_x_lower(s), gsl_root_fsolver_x_upper(s),
                                   T_TOL, 0.0) == GSL_SUCCESS)
            break;
    }
    gsl_root_fsolver_free(s);
    if (rc != GSL_SUCCESS) {
        *gsl_failed = rc;
        return NAN;
    }
    return root;
}

int kphi_equil_reaction_approach(const kphi_rxnset *set, const kphi_eos *eos, double T, double P,
                                 const double y[], const kphi_equil_options *opt,
                                 kphi_equil_work *w, kphi_equil_reaction_temperature out[],
                                 kphi_error *err)
{
    size_t s = kphi_rxnset_n_species(set), r = kphi_rxnset_n_reactions(set);
    size_t basis = opt != NULL ? opt->K_basis : KPHI_K_TABLES;
    if (basis >= kphi_rxnset_n_K_bases(set))
        return kphi_error_set(err, KPHI_EINPUT, NULL, none,
                              "approach per reaction: the set has no K basis %zu", basis);
    if (s > w->cap_s || kphi_eos_size(eos) != s)
        return kphi_error_set(err, KPHI_EINPUT, NULL, none,
                              "approach per reaction: the workspace or model does not fit the "
                              "reaction set (%zu species)",
                              s);
    if (!(T > 0.0) || !isfinite(T) || !(P > 0.0) || !isfinite(P))
        return kphi_error_set(err, KPHI_EINPUT, NULL, none,
                              "approach per reaction: needs T > 0 and P > 0, got T = %g K, "
                              "P = %g Pa",
                              T, P);
    double sum = 0.0;
    for (size_t i = 0; i < s; i++) {
        if (!(y[i] >= 0.0 && y[i] <= 1.0))
            return kphi_error_set(err, KPHI_EINPUT, NULL, none,
                                  "approach per reaction: y_%s = %g is not a mole fraction",
                                  kphi_rxnset_species(set, i)->name, y[i]);
        sum += y[i];
    }
    if (!(fabs(sum - 1.0) < 1e-9))
        return kphi_error_set(err, KPHI_EINPUT, NULL, none,
                              "approach per reaction: the mole fractions sum to %.12g, not 1",
                              sum);
    /* the minimiser's trial-point array is scratch between solves */
    double *lnphi = w->lnphi_try;
    if (kphi_eos_get_model(eos) == KPHI_EOS_IDEAL) {
        for (size_t i = 0; i < s; i++)
            lnphi[i] = 0.0;
    } else {
        int rc = kphi_eos_eval(eos, T, P, y, lnphi, NULL, NULL, w->ew, err);
        if (rc != KPHI_OK)
            return rc;
    }
    double lnp = log(P / KPHI_P_STANDARD);
    for (size_t j = 0; j < r; j++) {
        kphi_equil_reaction_temperature *o = &out[j];
        o->lnQ = 0.0;
        o->T_eq = NAN;
        o->status = KPHI_APPROACH_OK;
        o->absent = -1;
        for (size_t i = 0; i < s; i++) {
            double nu = kphi_rxnset_nu(set, j, i);
            if (nu == 0.0)
                continue;
            if (!(y[i] > 0.0)) {
                o->status = KPHI_APPROACH_ABSENT;
                o->absent = (long)i;
                o->lnQ = NAN;
                break;
            }
            o->lnQ += nu * (log(y[i]) + lnphi[i] + lnp);
        }
        if (o->status != KPHI_APPROACH_OK)
            continue;
        double lo, hi;
        reaction_range(set, j, &lo, &hi);
        lnk_params p = {set, j, o->lnQ,
                        basis != KPHI_K_TABLES ? kphi_rxnset_kcorr_get(set, j, basis) : NULL};
        int gsl_failed = GSL_SUCCESS;
        double Tstart = fmin(fmax(T, lo), hi);
        o->T_eq = reaction_root(&p, Tstart, lo, hi, &gsl_failed);
        if (gsl_failed != GSL_SUCCESS)
            return kphi_error_set(err, gsl_failed == GSL_ENOMEM ? KPHI_ENOMEM : KPHI_EFAILED,
                                  NULL, none, "approach per reaction: root search failed (%s)",
                                  gsl_strerror(gsl_failed));
        if (isnan(o->T_eq)) {
            o->status = KPHI_APPROACH_NO_ROOT;
            o->T_lo = lo;
            o->T_hi = hi;
        }
    }
    return KPHI_OK;
}
