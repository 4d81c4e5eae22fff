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
 * Minimization without Derivatives", ch. 4, from memory; gsl_root_fsolver_brent). */
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
    if (!r->n || !r->y || !r->lnphi || !r->held_zero || !r->xi || !r->lnK || !r->lnKphi ||
        !r->lnKy || !r->affinity) {
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
    free(r);
}

void kphi_equil_result_copy(kphi_equil_result *dst, const kphi_equil_result *src)
{
    size_t s = src->n_species, r = src->n_reactions;
    double *n = dst->n, *y = dst->y, *lp = dst->lnphi, *xi = dst->xi, *lk = dst->lnK;
    double *lkp = dst->lnKphi, *lky = dst->lnKy, *a = dst->affinity;
    int *h = dst->held_zero;
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
    memcpy(n, src->n, s * sizeof *n);
    memcpy(y, src->y, s * sizeof *y);
    memcpy(lp, src->lnphi, s * sizeof *lp);
    memcpy(h, src->held_zero, s * sizeof *h);
    memcpy(xi, src->xi, r * sizeof *xi);
    memcpy(lk, src->lnK, r * sizeof *lk);
    memcpy(lkp, src->lnKphi, r * sizeof *lkp);
    memcpy(lky, src->lnKy, r * sizeof *lky);
    memcpy(a, src->affinity, r * sizeof *a);
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

/* ------------------------------------------------ equivalent ideal pressure */

typedef struct {
    const kphi_rxnset *set;
    const kphi_eos *eos;
    double T;
    const double *n0, *w;
    double X;
    kphi_equil_work *work;
    kphi_equil_result *res;
    int failed;
} eqp_params;

static double eqp_fn(double lnP, void *vp)
{
    eqp_params *p = vp;
    kphi_error e;
    kphi_error_clear(&e);
    if (kphi_equil_solve(p->set, p->eos, p->T, exp(lnP), p->n0, NULL, NULL, p->work, p->res, &e) !=
        KPHI_OK) {
        p->failed = 1;
        return NAN;
    }
    return kphi_equil_conversion(p->res, p->n0, p->w) - p->X;
}

int kphi_equil_equivalent_pressure(const kphi_rxnset *set, const kphi_eos *ideal_eos, double T,
                                   const double n0[], const double w[], double X, double *P,
                                   kphi_equil_work *work, kphi_equil_result *tmp,
                                   kphi_error *err)
{
    kphi_mark none = {0, 0};
    if (kphi_eos_get_model(ideal_eos) != KPHI_EOS_IDEAL)
        return kphi_error_set(err, KPHI_EINPUT, NULL, none,
                              "equivalent pressure needs the ideal-gas model");
    eqp_params p = {set, ideal_eos, T, n0, w, X, work, tmp, 0};
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
