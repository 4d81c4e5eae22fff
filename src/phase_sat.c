/* kphi phase: saturation: dew and bubble temperatures of a mixture at P, and the vapour
 * pressure of a pure component.
 *
 * Dew point (Michelsen & Mollerup 2007, ch. 12, the stability-based formulation): the
 * feed z is the vapour (its vapour root); at the stationary point W of the tangent-plane
 * distance of a liquid-like trial phase (on the liquid root), tm = 1 - sum W_i, so the
 * dew point is the root in T of
 *   f(T) = ln sum_i W_i(T)
 * (f > 0: a liquid can form, below the dew point; f < 0 or no non-trivial stationary
 * point: the gas is stable). Bubble point: the same with z the liquid (liquid root) and a
 * vapour-like trial (vapour root). The start is Wilson's K (1968): the temperature where sum z_i / K_i = 1 (dew)
 * or sum z_i K_i = 1 (bubble), found by bisection. From there the search steps in T
 * (10, 20, 40 ... K, the stationary point carried from step to step) until f changes
 * sign, then runs Brent's method (gsl_root_fsolver_brent; Brent 1973, ch. 4) to 1e-9 K,
 * every function value a fully converged stationary point warm-started from the last.
 *
 * Vapour pressure of a pure component at T < Tc: the pressure where the liquid and the
 * vapour root have the same fugacity, ln phi_L(P) = ln phi_V(P). Newton's method on
 * ln P with d(ln phi_L - ln phi_V)/d ln P = Z_L - Z_V, kept inside a bracket (the
 * difference is positive below the vapour pressure), from the estimate
 * P = Pc exp(5.373 (1 + omega)(1 - Tc/T)) (Wilson 1968). */
#include "kphi/phase.h"

#include <math.h>
#include <string.h>

#include <gsl/gsl_errno.h>
#include <gsl/gsl_roots.h>

#include "phase_internal.h"

static const kphi_mark no_mark = {0, 0};

typedef struct {
    const kphi_eos *eos;
    double P;
    const double *z;
    int dew; /* 1 dew point, 0 bubble point */
    const kphi_phase_options *opt;
    kphi_phase_work *w;
    double *Wwarm;  /* the last non-trivial stationary point (amounts), [n] */
    int have_warm;
    int rc;
    kphi_error *err;
} sat_ctx;

/* The stationary point of the tangent-plane distance from the trial amounts in w->W, the
 * trial phase on the root of the other side of the saturation point (liquid for a dew
 * point, vapour for a bubble point). */
static int sat_stationary(const sat_ctx *c, double T, double *lnsum, int *trivial)
{
    kphi_phase_work *w = c->w;
    double tm;
    w->trial_root = c->dew ? KPHI_EOS_ROOT_LIQUID : KPHI_EOS_ROOT_GAS;
    int rc = kphi__phase_stationary(c->eos, T, c->P, w->z, w->W, c->opt, w, 1, &tm, lnsum,
                                    trivial, c->err);
    w->trial_root = KPHI_EOS_ROOT_STABLE;
    return rc;
}

/* ln sum W at T (positive: two phases), or -1 when the stationary point is trivial. */
static double sat_f(double T, void *p)
{
    sat_ctx *c = p;
    kphi_phase_work *w = c->w;
    if (c->rc != KPHI_OK)
        return NAN;
    int rc = kphi__phase_feed(c->eos, T, c->P, c->z, w, NULL, c->err);
    if (rc != KPHI_OK) {
        c->rc = rc;
        return NAN;
    }
    /* d_i = ln z_i + ln phi_i(z) of the feed as the phase at its saturation point: the
     * vapour (dew point) or the liquid (bubble point) root, not the root of lower G,
     * which beyond the saturation point is the other phase */
    rc = kphi_eos_eval_root(c->eos, c->dew ? KPHI_EOS_ROOT_GAS : KPHI_EOS_ROOT_LIQUID, T,
                            c->P, w->z, w->lnphi, NULL, NULL, w->ew, c->err);
    if (rc != KPHI_OK) {
        c->rc = rc;
        return NAN;
    }
    size_t n = w->n;
    for (size_t i = 0; i < n; i++)
        w->d[i] = w->z[i] > 0.0 ? log(w->z[i]) + w->lnphi[i] : 0.0;
    /* start: the last stationary point, else Wilson's K */
    kphi__phase_wilson_trial(c->eos, T, c->P, c->dew, w, w->W);
    for (size_t k = 0; c->have_warm && k < w->na; k++) {
        size_t i = w->act[k];
        if (c->Wwarm[i] > 0.0)
            w->W[i] = c->Wwarm[i] > 1e-300 ? c->Wwarm[i] : 1e-300;
    }
    double lnsum;
    int trivial;
    rc = sat_stationary(c, T, &lnsum, &trivial);
    if (rc == KPHI_OK && trivial && c->have_warm) {
        /* the warm start may have fallen onto the feed: try Wilson's K as well */
        kphi__phase_wilson_trial(c->eos, T, c->P, c->dew, w, w->W);
        rc = sat_stationary(c, T, &lnsum, &trivial);
    }
    if (rc != KPHI_OK) {
        c->rc = rc;
        return NAN;
    }
    if (trivial)
        return -1.0;
    memcpy(c->Wwarm, w->W, n * sizeof(double));
    c->have_warm = 1;
    return lnsum;
}

/* Temperature where sum z_i / K_i (dew) or sum z_i K_i (bubble) with Wilson's K is 1, by
 * bisection on [T_min, T_max]; the middle of the range when there is none. */
static double wilson_estimate(const kphi_eos *eos, double P, const double z[], size_t n,
                              int dew, double T_min, double T_max)
{
    double lo = T_min, hi = T_max;
    for (int it = 0; it < 100; it++) {
        double T = 0.5 * (lo + hi), s = 0.0, zs = 0.0;
        for (size_t i = 0; i < n; i++) {
            if (!(z[i] > 0.0))
                continue;
            double K = kphi__phase_wilson(eos, i, T, P);
            s += dew ? z[i] / K : z[i] * K;
            zs += z[i];
        }
        s /= zs;
        /* both sums fall as T rises for the dew form and rise for the bubble form */
        if (dew ? s > 1.0 : s < 1.0)
            lo = T;
        else
            hi = T;
    }
    return 0.5 * (lo + hi);
}

static int saturation(const kphi_eos *eos, double P, const double z[], double T_start,
                      double T_min, double T_max, const kphi_phase_options *opt,
                      kphi_phase_work *w, int dew, int *found, double *T_out, kphi_error *err)
{
    kphi_phase_options dflt = kphi_phase_options_default();
    if (opt == NULL)
        opt = &dflt;
    const char *what = dew ? "dew point" : "bubble point";
    if (!kphi_phase_model_ok(kphi_eos_get_model(eos)))
        return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark,
                              "the %s needs a cubic equation of state (rk, srk or pr)", what);
    if (w == NULL || w->n != kphi_eos_size(eos))
        return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark,
                              "phase workspace does not match the mixture");
    if (!(isfinite(P) && P > 0.0))
        return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark, "pressure %g Pa is not positive",
                              P);
    if (!(T_min > 0.0 && T_max > T_min && isfinite(T_max)))
        return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark,
                              "%s search range %g..%g K is not a range of positive "
                              "temperatures",
                              what, T_min, T_max);
    size_t n = w->n;
    /* the stationary point is carried in w->ntot (not used by the flash functions) */
    sat_ctx c = {eos, P, z, dew, opt, w, w->ntot, 0, KPHI_OK, err};
    double T0 = isfinite(T_start) ? T_start : wilson_estimate(eos, P, z, n, dew, T_min, T_max);
    if (T0 < T_min)
        T0 = T_min;
    if (T0 > T_max)
        T0 = T_max;
    /* f > 0 on the two-phase side: below the dew point, above the bubble point */
    double f0 = sat_f(T0, &c);
    if (c.rc != KPHI_OK)
        return c.rc;
    double two_side = dew ? -1.0 : 1.0; /* direction from the one-phase side into two */
    double dir = f0 > 0.0 ? -two_side : two_side;
    double Ta = T0, fa = f0, Tb = T0, fb = f0;
    double step = 10.0;
    int bracket = 0;
    for (int k = 0; k < 60; k++) {
        double Tn = Ta + dir * step;
        if (Tn < T_min)
            Tn = T_min;
        if (Tn > T_max)
            Tn = T_max;
        if (Tn == Ta)
            break;
        double fn = sat_f(Tn, &c);
        if (c.rc != KPHI_OK)
            return c.rc;
        if ((fn > 0.0) != (fa > 0.0)) {
            Tb = Tn;
            fb = fn;
            bracket = 1;
            break;
        }
        Ta = Tn;
        fa = fn;
        if (step < 40.0)
            step *= 2.0;
    }
    if (!bracket) {
        *found = 0;
        *T_out = NAN;
        return KPHI_OK;
    }
    /* Brent's method between Ta and Tb */
    double lo = Ta < Tb ? Ta : Tb, hi = Ta < Tb ? Tb : Ta;
    (void)fb;
    gsl_function F = {sat_f, &c};
    gsl_root_fsolver *s = gsl_root_fsolver_alloc(gsl_root_fsolver_brent);
    if (s == NULL)
        return kphi_error_set(err, KPHI_ENOMEM, NULL, no_mark, "out of memory");
    int status = gsl_root_fsolver_set(s, &F, lo, hi);
    double root = 0.5 * (lo + hi);
    for (int it = 0; status == GSL_SUCCESS && it < 200; it++) {
        status = gsl_root_fsolver_iterate(s);
        if (c.rc != KPHI_OK)
            break;
        root = gsl_root_fsolver_root(s);
        double a = gsl_root_fsolver_x_lower(s), b = gsl_root_fsolver_x_upper(s);
        if (b - a < 1e-9 + 1e-13 * b) {
            status = GSL_SUCCESS;
            break;
        }
    }
    gsl_root_fsolver_free(s);
    if (c.rc != KPHI_OK)
        return c.rc;
    if (status != GSL_SUCCESS)
        return kphi_error_set(err, KPHI_EFAILED, NULL, no_mark,
                              "%s at P = %.4g bar: root search failed (%s)", what, P / 1e5,
                              gsl_strerror(status));
    *found = 1;
    *T_out = root;
    return KPHI_OK;
}

int kphi_phase_dew_point(const kphi_eos *eos, double P, const double z[], double T_start,
                         double T_min, double T_max, const kphi_phase_options *opt,
                         kphi_phase_work *w, int *found, double *T, kphi_error *err)
{
    return saturation(eos, P, z, T_start, T_min, T_max, opt, w, 1, found, T, err);
}

int kphi_phase_bubble_point(const kphi_eos *eos, double P, const double z[], double T_start,
                            double T_min, double T_max, const kphi_phase_options *opt,
                            kphi_phase_work *w, int *found, double *T, kphi_error *err)
{
    return saturation(eos, P, z, T_start, T_min, T_max, opt, w, 0, found, T, err);
}

int kphi_phase_vapour_pressure(const kphi_eos *eos, size_t i, double T,
                               const kphi_phase_options *opt, kphi_phase_work *w, double *P_out,
                               kphi_error *err)
{
    kphi_phase_options dflt = kphi_phase_options_default();
    if (opt == NULL)
        opt = &dflt;
    size_t n = kphi_eos_size(eos);
    if (!kphi_phase_model_ok(kphi_eos_get_model(eos)))
        return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark,
                              "the vapour pressure needs a cubic equation of state (rk, srk or "
                              "pr)");
    if (i >= n || w == NULL || w->n != n)
        return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark,
                              "species %zu is out of range, or the workspace does not match",
                              i);
    double Tc, Pc;
    kphi_eos_critical(eos, i, T, &Tc, &Pc);
    if (!(T > 0.0 && T < Tc))
        return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark,
                              "no vapour pressure at T = %.2f K: at or above the critical "
                              "temperature %.2f K",
                              T, Tc);
    double *c = w->tmp;
    for (size_t k = 0; k < n; k++)
        c[k] = 0.0;
    c[i] = 1.0;
    double om = kphi_eos_acentric(eos, i);
    double lnP = log(Pc) + 5.373 * (1.0 + om) * (1.0 - Tc / T);
    double lo = -INFINITY, hi = log(Pc) + 1.0; /* bracket on ln P */
    for (int it = 0; it < opt->max_iter; it++) {
        double P = exp(lnP);
        kphi_eos_state sL, sV;
        int rc = kphi_eos_eval_root(eos, KPHI_EOS_ROOT_LIQUID, T, P, c, w->lnphiL, NULL, &sL,
                                    w->ew, err);
        if (rc == KPHI_OK)
            rc = kphi_eos_eval_root(eos, KPHI_EOS_ROOT_GAS, T, P, c, w->lnphiV, NULL, &sV,
                                    w->ew, err);
        if (rc != KPHI_OK)
            return rc;
        double next;
        if (sL.Z == sV.Z) {
            /* one root: a dense one lies above the vapour pressure, a light one below */
            if (sL.liquid_like || sL.Z < 0.3)
                hi = lnP;
            else
                lo = lnP;
            next = isfinite(lo) ? 0.5 * (lo + hi) : lnP - 1.0;
        } else {
            double F = w->lnphiL[i] - w->lnphiV[i];
            if (fabs(F) < 1e-12) {
                *P_out = P;
                return KPHI_OK;
            }
            if (F > 0.0)
                lo = lnP;
            else
                hi = lnP;
            next = lnP - F / (sL.Z - sV.Z);
            if (!(next > lo && next < hi))
                next = isfinite(lo) ? 0.5 * (lo + hi) : lnP - 1.0;
        }
        if (fabs(next - lnP) < 1e-14) {
            *P_out = exp(next);
            return KPHI_OK;
        }
        lnP = next;
    }
    return kphi_error_set(err, KPHI_EFAILED, NULL, no_mark,
                          "vapour pressure at T = %.2f K did not converge", T);
}
