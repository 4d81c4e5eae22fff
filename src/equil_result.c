/* kphi equil, the result of a solve: allocation and copy, the headline conversion and the
 * equivalent ideal pressure. None of it looks inside the workspace; the minimiser itself
 * is in src/equil.c.
 *
 * Conversion of the key species (weights w_i from the reaction set, 1 for the species
 * named by `conversion`, 0 otherwise; amounts in mol, X a fraction):
 *   X = 1 - sum_i w_i n_i / sum_i w_i n0_i.
 * The equivalent ideal pressure is the pressure P (Pa) at which the ideal-gas model gives
 * the same X at the same T and feed: the root of
 *   f(ln P) = X_ideal(T, P) - X
 * by Brent's method on ln P between 1e2 and 1e10 Pa (Brent 1973, "Algorithms for
 * Minimization without Derivatives", ch. 4, from memory; gsl_root_fsolver_brent).
 * kphi_equil_equivalent_pressure_from() finds the same root from a nearby ideal-gas
 * solution (the point's own): Newton steps on ln P with the slope dX/d ln P of each
 * ideal-gas solution from the implicit function theorem (ideal_slope()), each solve
 * warm-started from the previous one, safeguarded by bisection once the root is
 * bracketed; three or four warm solves instead of some forty cold ones. */
#include "kphi/equil.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_errno.h>
#include <gsl/gsl_roots.h>

/* ---------------------------------------------------------------- results */

kphi_equil_result *kphi_equil_result_alloc(size_t ns, size_t nr)
{
    kphi_equil_result *r = calloc(1, sizeof *r);
    if (r == NULL)
        return NULL;
    size_t nsa = ns > 0 ? ns : 1, nra = nr > 0 ? nr : 1;
    r->n_species = ns;
    r->n_reactions = nr;
    r->n = calloc(nsa, sizeof(double));
    r->y = calloc(nsa, sizeof(double));
    r->lnphi = calloc(nsa, sizeof(double));
    r->held_zero = calloc(nsa, sizeof(int));
    r->xi = calloc(nra, sizeof(double));
    r->lnK = calloc(nra, sizeof(double));
    r->lnKphi = calloc(nra, sizeof(double));
    r->lnKy = calloc(nra, sizeof(double));
    r->affinity = calloc(nra, sizeof(double));
    r->K_basis = calloc(nra, sizeof(size_t));
    r->K_outside = calloc(nra, sizeof(int));
    if (!r->n || !r->y || !r->lnphi || !r->held_zero || !r->xi || !r->lnK || !r->lnKphi ||
        !r->lnKy || !r->affinity || !r->K_basis || !r->K_outside) {
        kphi_equil_result_free(r);
        return NULL;
    }
    return r;
}

void kphi_equil_result_free(kphi_equil_result *r)
{
    if (r == NULL)
        return;
    free(r->n);
    free(r->y);
    free(r->lnphi);
    free(r->held_zero);
    free(r->xi);
    free(r->lnK);
    free(r->lnKphi);
    free(r->lnKy);
    free(r->affinity);
    free(r->K_basis);
    free(r->K_outside);
    free(r);
}

void kphi_equil_result_copy(kphi_equil_result *dst, const kphi_equil_result *src)
{
    size_t s = src->n_species, r = src->n_reactions;
    double *n = dst->n, *y = dst->y, *lp = dst->lnphi, *xi = dst->xi, *lk = dst->lnK;
    double *lkp = dst->lnKphi, *lky = dst->lnKy, *a = dst->affinity;
    int *h = dst->held_zero, *ko = dst->K_outside;
    size_t *kb = dst->K_basis;
    *dst = *src;
    dst->n = n;
    dst->y = y;
    dst->lnphi = lp;
    dst->xi = xi;
    dst->lnK = lk;
    dst->lnKphi = lkp;
    dst->lnKy = lky;
    dst->affinity = a;
    dst->held_zero = h;
    dst->K_basis = kb;
    dst->K_outside = ko;
    memcpy(n, src->n, s * sizeof *n);
    memcpy(y, src->y, s * sizeof *y);
    memcpy(lp, src->lnphi, s * sizeof *lp);
    memcpy(h, src->held_zero, s * sizeof *h);
    memcpy(xi, src->xi, r * sizeof *xi);
    memcpy(lk, src->lnK, r * sizeof *lk);
    memcpy(lkp, src->lnKphi, r * sizeof *lkp);
    memcpy(lky, src->lnKy, r * sizeof *lky);
    memcpy(a, src->affinity, r * sizeof *a);
    memcpy(kb, src->K_basis, r * sizeof *kb);
    memcpy(ko, src->K_outside, r * sizeof *ko);
}

double kphi_equil_conversion(const kphi_equil_result *r, const double n0[], const double w[])
{
    double a = 0.0, b = 0.0;
    for (size_t i = 0; i < r->n_species; i++) {
        a += w[i] * r->n[i];
        b += w[i] * n0[i];
    }
    if (!(b > 0.0))
        return NAN;
    return 1.0 - a / b;
}

/* ------------------------------------------------------------ indicators */

/* Amount of the species called name, or NaN when the set has no such species. */
static double amount_of(const kphi_rxnset *set, const double *n, const char *name)
{
    long i = kphi_rxnset_species_index(set, name);
    return i >= 0 ? n[i] : NAN;
}

static double ratio(double a, double b)
{
    return b != 0.0 ? a / b : NAN;
}

/* Stoichiometric number of methanol synthesis gas, SN = (H2 - CO2)/(CO + CO2), 2 for a gas
 * whose hydrogen just suffices for CO + 2 H2 = CH3OH and CO2 + 3 H2 = CH3OH + H2O (common
 * practice); CO2/(CO + CO2), the share of carbon oxides as CO2; H2/N2, 3 for ammonia
 * synthesis gas of stoichiometric make-up. */
size_t kphi_equil_indicators(const kphi_rxnset *set, const double n[],
                             kphi_equil_indicator out[KPHI_EQUIL_MAX_INDICATORS])
{
    size_t k = 0;
    double co = amount_of(set, n, "CO"), co2 = amount_of(set, n, "CO2");
    double h2 = amount_of(set, n, "H2"), n2 = amount_of(set, n, "N2");
    double nh3 = amount_of(set, n, "NH3");
    if (!isnan(co) && !isnan(co2) && !isnan(h2)) {
        out[k++] = (kphi_equil_indicator){"stoichiometric number SN =", "SN",
                                          "(H2 - CO2)/(CO + CO2)", "CO + CO2",
                                          ratio(h2 - co2, co + co2)};
        out[k++] = (kphi_equil_indicator){"carbon-oxide ratio", "CO2/COx", "CO2/(CO + CO2)",
                                          "CO + CO2", ratio(co2, co + co2)};
    }
    if (!isnan(h2) && !isnan(n2) && !isnan(nh3))
        out[k++] = (kphi_equil_indicator){"hydrogen-nitrogen ratio", "H2/N2", "H2/N2", "N2",
                                          ratio(h2, n2)};
    return k;
}

/* ------------------------------------------------ equivalent ideal pressure */

typedef struct {
    const kphi_rxnset *set;
    const kphi_eos *eos;
    double T;
    const double *n0, *w;
    double X;
    const kphi_equil_options *opt;
    kphi_equil_work *work;
    kphi_equil_result *res;
    int failed;
} eqp_params;

static double eqp_fn(double lnP, void *vp)
{
    eqp_params *p = vp;
    kphi_error e;
    kphi_error_clear(&e);
    if (kphi_equil_solve(p->set, p->eos, p->T, exp(lnP), p->n0, NULL, p->opt, p->work, p->res,
                         &e) !=
        KPHI_OK) {
        p->failed = 1;
        return NAN;
    }
    return kphi_equil_conversion(p->res, p->n0, p->w) - p->X;
}

int kphi_equil_equivalent_pressure(const kphi_rxnset *set, const kphi_eos *ideal_eos, double T,
                                   const double n0[], const double w[], double X, double *P,
                                   const kphi_equil_options *opt, kphi_equil_work *work,
                                   kphi_equil_result *tmp, kphi_error *err)
{
    kphi_mark none = {0, 0};
    if (kphi_eos_get_model(ideal_eos) != KPHI_EOS_IDEAL)
        return kphi_error_set(err, KPHI_EINPUT, NULL, none,
                              "equivalent pressure needs the ideal-gas model");
    eqp_params p = {set, ideal_eos, T, n0, w, X, opt, work, tmp, 0};
    double lo = log(1e2), hi = log(1e10);
    double flo = eqp_fn(lo, &p), fhi = eqp_fn(hi, &p);
    if (p.failed || !(flo * fhi < 0.0))
        return kphi_error_set(err, KPHI_EFAILED, NULL, none,
                              "no pressure between 1 mbar and 100 kbar gives conversion %.6g "
                              "in the ideal-gas model",
                              X);
    gsl_function F = {eqp_fn, &p};
    gsl_root_fsolver *s = gsl_root_fsolver_alloc(gsl_root_fsolver_brent);
    if (s == NULL)
        return kphi_error_set(err, KPHI_ENOMEM, NULL, none, "out of memory");
    int rc = gsl_root_fsolver_set(s, &F, lo, hi);
    double root = NAN;
    for (int it = 0; rc == GSL_SUCCESS && it < 200; it++) {
        rc = gsl_root_fsolver_iterate(s);
        if (rc != GSL_SUCCESS || p.failed)
            break;
        root = gsl_root_fsolver_root(s);
        double a = gsl_root_fsolver_x_lower(s), b = gsl_root_fsolver_x_upper(s);
        if (gsl_root_test_interval(a, b, 1e-12, 0.0) == GSL_SUCCESS)
            break;
    }
    gsl_root_fsolver_free(s);
    if (rc != GSL_SUCCESS || p.failed || !isfinite(root))
        return kphi_error_set(err, KPHI_EFAILED, NULL, none,
                              "equivalent pressure: root search failed (%s)",
                              rc != GSL_SUCCESS ? gsl_strerror(rc) : "solver failure");
    *P = exp(root);
    return KPHI_OK;
}

/* ------------------------------------- equivalent ideal pressure from a nearby point */

/* Bounds of the search on ln P (Pa): 1 mbar and 100 kbar, as kphi_equil_equivalent_pressure. */
#define EQP_LO 4.605170185988091  /* ln 1e2 */
#define EQP_HI 23.025850929940457 /* ln 1e10 */
/* Conversions within this of 0 or 1 leave nothing for a pressure to match: the
 * equilibrium is complete (or nil) to parts per million, and the real-gas shift lies in a
 * residual no analysis resolves, so a pressure "worth" it would be a number without use. */
#define EQP_X_EDGE 1e-6
/* Converged when a step on ln P is below this (a relative change of P), or the
 * conversion is matched to EQP_F_TOL (beyond the minimiser's own precision). */
#define EQP_TOL 1e-12
#define EQP_F_TOL 1e-13
#define EQP_NEWTON_LAST 1e-6
/* Reactions the analytic slope handles (stack arrays); larger sets use secant slopes. */
#define EQP_RMAX 12

/* dX/d ln P of the ideal-gas equilibrium r at fixed T and feed, from the implicit
 * function theorem on the affinities A_j = -ln K_j + sum_i nu_ij ln y_i + dnu_j ln(P/P°):
 *   H dxi/d ln P = -dnu,   H_jk = sum_i nu_ij nu_ik / n_i - dnu_j dnu_k / n_t,
 *   dX/d ln P = -sum_i w_i sum_j nu_ij dxi_j/d ln P / sum_i w_i n0_i.
 * dxi/d ln P goes to dxi[] (EQP_RMAX entries) for a first-order warm start. NaN when a
 * reaction involves a species at zero, the set has more than EQP_RMAX reactions, or H is
 * singular (the caller then probes with a step instead). */
static double ideal_slope(const kphi_rxnset *set, const kphi_equil_result *r, const double *n0,
                          const double *w, double dxi[])
{
    enum { RMAX = EQP_RMAX };
    size_t s = r->n_species, m = r->n_reactions;
    if (m == 0 || m > RMAX || !(r->n_total > 0.0))
        return NAN;
    double H[RMAX][RMAX + 1], dnu[RMAX];
    for (size_t j = 0; j < m; j++) {
        dnu[j] = kphi_rxnset_dnu(set, j);
        for (size_t i = 0; i < s; i++)
            if (kphi_rxnset_nu(set, j, i) != 0.0 && !(r->n[i] > 0.0))
                return NAN;
    }
    for (size_t j = 0; j < m; j++) {
        for (size_t k = 0; k < m; k++) {
            double h = -dnu[j] * dnu[k] / r->n_total;
            for (size_t i = 0; i < s; i++) {
                double a = kphi_rxnset_nu(set, j, i), b = kphi_rxnset_nu(set, k, i);
                if (a != 0.0 && b != 0.0)
                    h += a * b / r->n[i];
            }
            H[j][k] = h;
        }
        H[j][m] = -dnu[j];
    }
    /* Gaussian elimination with partial pivoting on [H | -dnu] */
    for (size_t c = 0; c < m; c++) {
        size_t p = c;
        for (size_t q = c + 1; q < m; q++)
            if (fabs(H[q][c]) > fabs(H[p][c]))
                p = q;
        if (!(fabs(H[p][c]) > 0.0))
            return NAN;
        for (size_t k = 0; k <= m && p != c; k++) {
            double t = H[c][k];
            H[c][k] = H[p][k];
            H[p][k] = t;
        }
        for (size_t q = c + 1; q < m; q++) {
            double f = H[q][c] / H[c][c];
            for (size_t k = c; k <= m; k++)
                H[q][k] -= f * H[c][k];
        }
    }
    for (size_t c = m; c-- > 0;) {
        double v = H[c][m];
        for (size_t k = c + 1; k < m; k++)
            v -= H[c][k] * dxi[k];
        dxi[c] = v / H[c][c];
    }
    double num = 0.0, den = 0.0;
    for (size_t i = 0; i < s; i++) {
        if (w[i] == 0.0)
            continue;
        den += w[i] * n0[i];
        for (size_t j = 0; j < m; j++)
            num += w[i] * kphi_rxnset_nu(set, j, i) * dxi[j];
    }
    double slope = -num / den;
    return isfinite(slope) ? slope : NAN;
}

/* X_ideal(exp(u)) - X into *f, solving into out warm-started from the extents xi_guess
 * (may be NULL), with the K basis of opt. */
static int eqp_eval(const kphi_rxnset *set, const kphi_eos *eos, double T, const double *n0,
                    const double *w, double X, double u, const double *xi_guess,
                    const kphi_equil_options *opt, kphi_equil_work *work,
                    kphi_equil_result *out, double *f)
{
    kphi_error e;
    kphi_error_clear(&e);
    int rc = kphi_equil_solve(set, eos, T, exp(u), n0, xi_guess, opt, work, out, &e);

    if (rc != KPHI_OK && xi_guess != NULL) {
        kphi_error_clear(&e);
        rc = kphi_equil_solve(set, eos, T, exp(u), n0, NULL, opt, work, out, &e);
    }
    if (rc != KPHI_OK)
        return rc;
    *f = kphi_equil_conversion(out, n0, w) - X;
    return isfinite(*f) ? KPHI_OK : KPHI_EFAILED;
}

int kphi_equil_equivalent_pressure_from(const kphi_rxnset *set, const kphi_eos *ideal_eos,
                                        double T, const double n0[], const double w[], double X,
                                        const kphi_equil_result *start, double *P,
                                        kphi_equil_work *work, kphi_equil_result *const tmp[2],
                                        kphi_error *err)
{
    kphi_mark none = {0, 0};
    if (kphi_eos_get_model(ideal_eos) != KPHI_EOS_IDEAL)
        return kphi_error_set(err, KPHI_EINPUT, NULL, none,
                              "equivalent pressure needs the ideal-gas model");
    if (!isfinite(X))
        return kphi_error_set(err, KPHI_EFAILED, NULL, none,
                              "undefined: there is no conversion to match");
    if (fabs(X) < EQP_X_EDGE) /* the messages below say 1e-6 */
        return kphi_error_set(err, KPHI_EFAILED, NULL, none,
                              "undefined: the conversion is 0 (within 1e-6), which no pressure "
                              "changes");
    if (X > 1.0 - EQP_X_EDGE)
        return kphi_error_set(err, KPHI_EFAILED, NULL, none,
                              "undefined: the conversion is complete (1 to within 1e-6), "
                              "which no single pressure matches");
    if (start == NULL || !(start->P > 0.0))
        return kphi_error_set(err, KPHI_EINPUT, NULL, none,
                              "equivalent pressure: no starting solution");
    /* the K basis of the start, so that every ideal-gas solve has the K X was found with */
    kphi_equil_options opt = kphi_equil_options_default();
    for (size_t j = 0; j < start->n_reactions; j++)
        if (start->K_basis[j] != KPHI_K_TABLES)
            opt.K_basis = start->K_basis[j];
    double ua = log(start->P), fa = kphi_equil_conversion(start, n0, w) - X;
    if (fa == 0.0) {
        *P = start->P;
        return KPHI_OK;
    }
    if (!isfinite(fa))
        return kphi_error_set(err, KPHI_EFAILED, NULL, none,
                              "undefined: there is no conversion to match");
    /* Newton steps on u = ln P with the analytic slope of each solution (a secant slope
     * when there is none, a small probe at the very start); steps of at most a factor
     * e^2 in P, kept inside [EQP_LO, EQP_HI] and, once the sign of f has changed, inside
     * the bracket (bisection when a step would leave it) */
    double u = ua, f = fa, u_prev = NAN, f_prev = NAN;
    double lo = NAN, hi = NAN, flo = NAN; /* bracket once the sign changes */
    const kphi_equil_result *last = start;
    int cur = 0, rc = KPHI_OK, done = 0;
    for (int it = 0; it < 100 && !done; it++) {
        double dxi[EQP_RMAX], xi_guess[EQP_RMAX];
        double slope = ideal_slope(set, last, n0, w, dxi), step;
        int newton = isfinite(slope) && slope != 0.0;
        if (!newton && !isnan(u_prev))
            slope = (f - f_prev) / (u - u_prev);
        if (isfinite(slope) && slope != 0.0)
            step = fmax(-2.0, fmin(2.0, -f / slope));
        else if (isnan(u_prev))
            step = u + 0.05 <= EQP_HI ? 0.05 : -0.05;
        else
            step = 2.0 * (u - u_prev); /* flat: go outwards */
        /* a Newton step leaves an error of the order of its square (the curvature of
         * X(ln P) is of order one): a step below sqrt(EQP_TOL) is taken without a
         * further solve */
        if (fabs(step) < (newton ? EQP_NEWTON_LAST : EQP_TOL)) {
            u += step;
            break;
        }
        double next = fmin(fmax(u + step, EQP_LO), EQP_HI);
        if (!isnan(lo) && !(next > lo && next < hi))
            next = 0.5 * (lo + hi);
        if (next == u) {
            rc = KPHI_EFAILED; /* at a bound with the same sign: no root inside */
            break;
        }
        /* warm start: the extents of the last solution, moved along dxi/d ln P when the
         * slope is the analytic one (first-order prediction); the minimiser falls back
         * to the plain last extents, then a cold start, if that is not feasible */
        const double *guess = last->xi;
        if (newton) {
            for (size_t j = 0; j < last->n_reactions; j++)
                xi_guess[j] = last->xi[j] + dxi[j] * (next - u);
            guess = xi_guess;
        }
        double fn;
        rc = eqp_eval(set, ideal_eos, T, n0, w, X, next, guess, &opt, work, tmp[cur], &fn);
        if (rc != KPHI_OK)
            break;
        last = tmp[cur];
        cur ^= 1;
        if (fn * f < 0.0) {
            lo = fmin(u, next);
            hi = fmax(u, next);
            flo = u < next ? f : fn;
        } else if (!isnan(lo)) {
            if ((fn < 0.0) == (flo < 0.0))
                lo = next;
            else
                hi = next;
        }
        done = fabs(next - u) < EQP_TOL || fabs(fn) < EQP_F_TOL ||
               (!isnan(lo) && hi - lo < EQP_TOL);
        u_prev = u;
        f_prev = f;
        u = next;
        f = fn;
    }
    if (rc != KPHI_OK || !isfinite(u))
        return kphi_error_set(err, KPHI_EFAILED, NULL, none,
                              "undefined: no pressure between 1 mbar and 100 kbar gives the "
                              "ideal gas this conversion");
    *P = exp(u);
    return KPHI_OK;
}
