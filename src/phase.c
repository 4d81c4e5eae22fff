/* kphi phase: stability test and isothermal two-phase flash (phi-phi, one cubic EOS for
 * both phases).
 *
 * Stability (Michelsen 1982a, Fluid Phase Equilib. 9, 1; Michelsen & Mollerup 2007,
 * ch. 10). For a feed z with d_i = ln z_i + ln phi_i(z), the modified tangent-plane
 * distance of trial amounts W is
 *   tm(W) = 1 + sum_i W_i (ln W_i + ln phi_i(w) - d_i - 1),   w = W / sum W,
 * whose stationary points satisfy ln W_i = d_i - ln phi_i(w) (successive substitution)
 * and where tm = 1 - sum W_i. The feed is unstable when some stationary point has tm < 0.
 * Trial phases start from Wilson's K (Wilson 1968, as given by Michelsen & Mollerup 2007,
 * ch. 10): K_i = (Pc_i/P) exp(5.373 (1 + omega_i)(1 - Tc_i/T)), vapour-like W = z K,
 * liquid-like W = z / K, each trial evaluated on its own root of the cubic (the vapour
 * root for the vapour-like trial, the liquid root for the liquid-like one; where the
 * cubic has one root both are that root). A stationary point with tm < 0 on either root
 * proves instability, as the Gibbs energy of the lower root is lower still. When neither
 * finds one, each component present starts a further trial, nearly pure, on the root of
 * lower Gibbs energy. After
 * `ss_iter` substitutions the iteration turns to Newton steps in alpha_i = 2 sqrt(W_i),
 * with gradient sqrt(W_i) g_i and Hessian
 *   delta_ij + sqrt(W_i W_j) (n_t d ln phi_i/d n_j)/sum W + (g_i / 2) delta_ij,
 * g_i = ln W_i + ln phi_i(w) - d_i (Michelsen & Mollerup 2007, ch. 10), backtracked on tm.
 *
 * Flash (Michelsen 1982b, Fluid Phase Equilib. 9, 21; Michelsen & Mollerup 2007, ch. 11).
 * Given K, the vapour fraction beta solves Rachford & Rice (1952):
 *   sum_i z_i (K_i - 1) / (1 + beta (K_i - 1)) = 0,
 * by Newton's method inside the window (1/(1 - K_max), 1/(1 - K_min)) where the sum is
 * monotone, with bisection when a step leaves the bracket (Whitson & Michelsen 1989,
 * Fluid Phase Equilib. 53, 51: the "negative flash" allows beta outside [0, 1] while
 * iterating). x_i = z_i/(1 + beta(K_i - 1)), y_i = K_i x_i, and successive substitution
 * ln K_i <- ln phi_i^L(x) - ln phi_i^V(y). Every fifth step the dominant-eigenvalue
 * extrapolation ln K += lambda/(1 - lambda) (ln K - ln K_prev), lambda = (dK_k . dK_k-1)/
 * (dK_k-1 . dK_k-1) (Michelsen 1982b), kept only when it lowers the Gibbs energy. After
 * `ss_iter` steps, or when the error falls by less than a factor 0.8 a step near the
 * solution (close to a critical point), Newton steps on the vapour amounts v (liquid
 * l = z - v) minimise
 *   G/RT = sum_i v_i ln(y_i phi_i^V) + l_i ln(x_i phi_i^L)
 * with gradient g_i = ln(y_i phi_i^V) - ln(x_i phi_i^L) and Hessian
 *   (delta_ij / y_i - 1 + J^V_ij)/V + (delta_ij / x_i - 1 + J^L_ij)/L,
 * J = n_t d ln phi/d n (Michelsen & Mollerup 2007, ch. 11), truncated to 0 < v_i < z_i
 * and backtracked on G; where the decrease G should show is below its round-off, a step
 * is accepted when it lowers max |g_i| instead. The amounts of the smaller phase are the
 * ones stepped, the other phase's follow by difference, so that a phase of 1e-9 of the
 * feed keeps its relative precision. Converged when max |g_i| < tol over the components
 * of the feed. Material balance holds by construction (l = z - v). Components absent
 * from the feed are left out of the iteration; their K is phi^L/phi^V at infinite
 * dilution. A converged split is tested once more from the vapour's tangent plane with
 * nearly pure trial phases: one below it means a third phase forms, and the flash then
 * fails with a message instead of answering (it finds two phases at most).
 *
 * Each phase of a split is evaluated with the root of lower Gibbs energy
 * (kphi_eos_eval_root(), KPHI_EOS_ROOT_STABLE). */
#include "kphi/phase.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_errno.h>
#include <gsl/gsl_linalg.h>

#include "kphi/thermo.h"
#include "phase_internal.h"

static const kphi_mark no_mark = {0, 0};

kphi_phase_options kphi_phase_options_default(void)
{
    kphi_phase_options o;
    o.tol = 1e-10;
    o.tol_tm = 1e-9;
    o.max_iter = 200;
    o.ss_iter = 12;
    return o;
}

const char *kphi_phase_kind_name(kphi_phase_kind kind)
{
    return kind == KPHI_PHASE_LIQUID ? "liquid" : "vapour";
}

int kphi_phase_model_ok(kphi_eos_model model)
{
    return model == KPHI_EOS_RK || model == KPHI_EOS_SRK || model == KPHI_EOS_PR;
}

/* ------------------------------------------------------------------ results --- */

double kphi_phase_molar_enthalpy(const kphi_rxnset *set, const kphi_flash_result *ph, size_t k)
{
    size_t s = kphi_rxnset_n_species(set);
    const kphi_phase_state *a = &ph->phase[k];
    double h = a->h_dep;
    for (size_t i = 0; i < s && i < ph->n; i++)
        if (a->y[i] > 0.0)
            h += a->y[i] * kphi_thermo_h(kphi_rxnset_species(set, i), ph->T);
    return h;
}

kphi_flash_result *kphi_flash_result_alloc(size_t n)
{
    kphi_flash_result *r = calloc(1, sizeof *r);
    if (r == NULL)
        return NULL;
    size_t na = n > 0 ? n : 1;
    r->n = n;
    r->K = calloc(na, sizeof(double));
    for (int k = 0; k < 2; k++) {
        r->phase[k].y = calloc(na, sizeof(double));
        r->phase[k].lnphi = calloc(na, sizeof(double));
    }
    if (r->K == NULL || r->phase[0].y == NULL || r->phase[0].lnphi == NULL ||
        r->phase[1].y == NULL || r->phase[1].lnphi == NULL) {
        kphi_flash_result_free(r);
        return NULL;
    }
    return r;
}

void kphi_flash_result_free(kphi_flash_result *r)
{
    if (r == NULL)
        return;
    free(r->K);
    for (int k = 0; k < 2; k++) {
        free(r->phase[k].y);
        free(r->phase[k].lnphi);
    }
    free(r);
}

void kphi_flash_result_copy(kphi_flash_result *dst, const kphi_flash_result *src)
{
    size_t n = src->n < dst->n ? src->n : dst->n;
    double *K = dst->K;
    double *py[2] = {dst->phase[0].y, dst->phase[1].y};
    double *pl[2] = {dst->phase[0].lnphi, dst->phase[1].lnphi};
    size_t dn = dst->n;
    *dst = *src;
    dst->n = dn;
    dst->K = K;
    memcpy(K, src->K, n * sizeof(double));
    for (int k = 0; k < 2; k++) {
        dst->phase[k].y = py[k];
        dst->phase[k].lnphi = pl[k];
        memcpy(py[k], src->phase[k].y, n * sizeof(double));
        memcpy(pl[k], src->phase[k].lnphi, n * sizeof(double));
    }
}

/* ---------------------------------------------------------------- workspace --- */

kphi_phase_work *kphi_phase_work_alloc(size_t n_species, size_t n_reactions)
{
    size_t n = n_species > 0 ? n_species : 1;
    size_t r = n_reactions > 0 ? n_reactions : 1;
    size_t m = n + r;
    if (n > 4096 || r > 4096)
        return NULL;
    kphi_phase_work *w = calloc(1, sizeof *w);
    if (w == NULL)
        return NULL;
    w->n = n_species;
    w->r = n_reactions;
    w->trial_root = KPHI_EOS_ROOT_STABLE;
    w->ew = kphi_eos_work_alloc(n);
    w->act = calloc(n, sizeof *w->act);
    /* every double array of the workspace and its length: summed for the one block, then
     * carved from it in this order */
    const struct {
        double **p;
        size_t len;
    } part[] = {
        {&w->z, n},         {&w->d, n},         {&w->W, n},         {&w->wn, n},
        {&w->lnphi, n},     {&w->lnphi2, n},    {&w->kw, n},        {&w->lnK, n},
        {&w->lnK1, n},      {&w->lnK2, n},      {&w->x, n},         {&w->y, n},
        {&w->lnphiL, n},    {&w->lnphiV, n},    {&w->v, n},         {&w->l, n},
        {&w->vt, n},        {&w->lt, n},        {&w->trial, n},     {&w->tmp, n},
        {&w->g0, n},        {&w->ntot, n},      {&w->ntot_t, n},    {&w->ngas, n},
        {&w->dvs, n},       {&w->rho, n},       {&w->rho_t, n},     {&w->JV, n * n},
        {&w->JL, n * n},    {&w->H, m * m},     {&w->g, m},         {&w->step, m},
        {&w->sc, m},        {&w->nu, r * n},    {&w->nueff, r * n}, {&w->basis, r * r},
        {&w->svd_a, n * r}, {&w->svd_v, r * r}, {&w->svd_s, r},     {&w->svd_w, r},
        {&w->eta, r},       {&w->xi0, r},       {&w->JVt, n * m},   {&w->JLt, n * m},
        {&w->HJ, n * m},
    };
    const size_t n_part = sizeof part / sizeof part[0];
    size_t nd = 0;
    for (size_t k = 0; k < n_part; k++)
        nd += part[k].len;
    w->block = calloc(nd, sizeof(double));
    if (w->ew == NULL || w->act == NULL || w->block == NULL) {
        kphi_phase_work_free(w);
        return NULL;
    }
    double *q = w->block;
    for (size_t k = 0; k < n_part; k++) {
        *part[k].p = q;
        q += part[k].len;
    }
    return w;
}

void kphi_phase_work_free(kphi_phase_work *w)
{
    if (w == NULL)
        return;
    kphi_eos_work_free(w->ew);
    free(w->act);
    free(w->block);
    free(w);
}

/* ------------------------------------------------------------------ helpers --- */

int kphi__phase_eval(const kphi_eos *eos, double T, double P, const double c[], double lnphi[],
                     double J[], kphi_eos_state *st, kphi_phase_work *w, kphi_error *err)
{
    return kphi_eos_eval_root(eos, KPHI_EOS_ROOT_STABLE, T, P, c, lnphi, J, st, w->ew, err);
}

double kphi__phase_wilson(const kphi_eos *eos, size_t i, double T, double P)
{
    double Tc, Pc;
    kphi_eos_critical(eos, i, T, &Tc, &Pc);
    double om = kphi_eos_acentric(eos, i);
    return Pc / P * exp(5.373 * (1.0 + om) * (1.0 - Tc / T));
}

void kphi__phase_wilson_trial(const kphi_eos *eos, double T, double P, int liquid,
                              kphi_phase_work *w, double W[])
{
    for (size_t i = 0; i < w->n; i++)
        w->kw[i] = W[i] = 0.0;
    for (size_t k = 0; k < w->na; k++) {
        size_t i = w->act[k];
        double K = kphi__phase_wilson(eos, i, T, P);
        w->kw[i] = K;
        if (!(K > 1e-200))
            K = 1e-200;
        if (K > 1e200)
            K = 1e200;
        W[i] = liquid ? w->z[i] / K : w->z[i] * K;
        if (!(W[i] > 1e-300))
            W[i] = 1e-300;
    }
}

static int check_args(const kphi_eos *eos, double T, double P, const kphi_phase_work *w,
                      kphi_error *err)
{
    if (!kphi_phase_model_ok(kphi_eos_get_model(eos)))
        return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark,
                              "two phases need a cubic equation of state (rk, srk or pr); "
                              "'%s' has no liquid root",
                              kphi_eos_model_name(kphi_eos_get_model(eos)));
    if (w == NULL || w->n != kphi_eos_size(eos))
        return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark,
                              "phase workspace is for %zu species, the mixture has %zu",
                              w != NULL ? w->n : (size_t)0, kphi_eos_size(eos));
    if (!(isfinite(T) && T > 0.0))
        return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark,
                              "temperature %g K is not positive", T);
    if (!(isfinite(P) && P > 0.0))
        return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark, "pressure %g Pa is not positive",
                              P);
    return KPHI_OK;
}

int kphi__phase_feed(const kphi_eos *eos, double T, double P, const double z[],
                     kphi_phase_work *w, int *feed_liquid, kphi_error *err)
{
    size_t n = w->n;
    double sum = 0.0;
    for (size_t i = 0; i < n; i++) {
        if (!(isfinite(z[i]) && z[i] >= 0.0))
            return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark,
                                  "amount of component %zu is %g; expected a value >= 0", i,
                                  z[i]);
        sum += z[i];
    }
    if (!(sum > 0.0) || !isfinite(sum))
        return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark,
                              "the mixture is empty: every amount is zero");
    w->na = 0;
    for (size_t i = 0; i < n; i++) {
        w->z[i] = z[i] / sum;
        if (w->z[i] > 0.0)
            w->act[w->na++] = i;
    }
    kphi_eos_state st;
    int rc = kphi__phase_eval(eos, T, P, w->z, w->lnphi, NULL, &st, w, err);
    if (rc != KPHI_OK)
        return rc;
    for (size_t i = 0; i < n; i++)
        w->d[i] = w->z[i] > 0.0 ? log(w->z[i]) + w->lnphi[i] : 0.0;
    w->feed_liquid = st.liquid_like;
    if (feed_liquid != NULL)
        *feed_liquid = st.liquid_like;
    return KPHI_OK;
}

void kphi__phase_fill(kphi_phase_state *ph, size_t n, const double c[], const double lnphi[],
                      const kphi_eos_state *st, double fraction)
{
    ph->kind = st->liquid_like ? KPHI_PHASE_LIQUID : KPHI_PHASE_VAPOUR;
    ph->fraction = fraction;
    memcpy(ph->y, c, n * sizeof(double));
    memcpy(ph->lnphi, lnphi, n * sizeof(double));
    ph->Z = st->Z;
    ph->v = st->v;
    ph->h_dep = st->h_dep;
    ph->g_dep = st->g_dep;
}

int kphi__phase_single(const kphi_eos *eos, double T, double P, kphi_phase_work *w,
                       kphi_flash_result *out, kphi_error *err)
{
    size_t n = w->n;
    kphi_eos_state st;
    int rc = kphi__phase_eval(eos, T, P, w->z, w->lnphi, NULL, &st, w, err);
    if (rc != KPHI_OK)
        return rc;
    kphi__phase_one(out, n, T, P, w->z, w->lnphi, &st);
    return KPHI_OK;
}

void kphi__phase_one(kphi_flash_result *out, size_t n, double T, double P, const double c[],
                     const double lnphi[], const kphi_eos_state *st)
{
    out->T = T;
    out->P = P;
    out->n_phases = 1;
    kphi__phase_fill(&out->phase[0], n, c, lnphi, st, 1.0);
    out->phase[1].fraction = 0.0;
    for (size_t i = 0; i < n; i++) {
        out->K[i] = NAN;
        out->phase[1].y[i] = 0.0;
        out->phase[1].lnphi[i] = 0.0;
    }
    out->residual = 0.0;
    out->balance_error = 0.0;
}

/* Cholesky of the diagonally scaled matrix, shifted until positive definite. */
int kphi__phase_newton_solve(double *H, const double *g, double *s, double *sc, size_t m)
{
    for (size_t i = 0; i < m; i++) {
        double h = H[i * m + i];
        sc[i] = h > 0.0 && isfinite(h) ? 1.0 / sqrt(h) : 1.0;
    }
    for (size_t i = 0; i < m; i++)
        for (size_t j = 0; j < m; j++)
            H[i * m + j] *= sc[i] * sc[j];
    for (size_t i = 0; i < m; i++)
        s[i] = H[i * m + i]; /* the scaled diagonal, restored after a failed attempt */
    double shift = 0.0;
    for (int attempt = 0; attempt < 30; attempt++) {
        /* in-place Cholesky, lower triangle; the upper triangle keeps the matrix */
        int ok = 1;
        for (size_t j = 0; j < m && ok; j++) {
            double dsum = H[j * m + j] + shift;
            for (size_t k = 0; k < j; k++)
                dsum -= H[j * m + k] * H[j * m + k];
            if (!(dsum > 1e-14)) {
                ok = 0;
                break;
            }
            double ljj = sqrt(dsum);
            H[j * m + j] = ljj;
            for (size_t i = j + 1; i < m; i++) {
                double v = H[j * m + i]; /* upper triangle: the original (i, j) */
                for (size_t k = 0; k < j; k++)
                    v -= H[i * m + k] * H[j * m + k];
                H[i * m + j] = v / ljj;
            }
        }
        if (ok) {
            for (size_t i = 0; i < m; i++) {
                double v = -g[i] * sc[i];
                for (size_t k = 0; k < i; k++)
                    v -= H[i * m + k] * s[k];
                s[i] = v / H[i * m + i];
            }
            for (size_t ii = m; ii-- > 0;) {
                double v = s[ii];
                for (size_t k = ii + 1; k < m; k++)
                    v -= H[k * m + ii] * s[k];
                s[ii] = v / H[ii * m + ii];
            }
            for (size_t i = 0; i < m; i++)
                s[i] *= sc[i];
            return KPHI_OK;
        }
        /* restore the lower triangle from the upper one and shift */
        for (size_t i = 0; i < m; i++) {
            for (size_t j = 0; j < i; j++)
                H[i * m + j] = H[j * m + i];
        }
        for (size_t i = 0; i < m; i++)
            H[i * m + i] = s[i];
        shift = shift == 0.0 ? 1e-8 : shift * 10.0;
    }
    return KPHI_EFAILED;
}

/* ---------------------------------------------------------------- stability --- */

/* tm and the gradient g_i = ln W_i + ln phi_i(w) - d_i at W (active components). */
static int tm_at(const kphi_eos *eos, double T, double P, const double W[], double J[],
                 kphi_phase_work *w, double *tm, double *sumW, kphi_eos_state *st,
                 kphi_error *err)
{
    size_t n = w->n;
    double s = 0.0;
    for (size_t k = 0; k < w->na; k++)
        s += W[w->act[k]];
    for (size_t i = 0; i < n; i++)
        w->wn[i] = 0.0;
    for (size_t k = 0; k < w->na; k++)
        w->wn[w->act[k]] = W[w->act[k]] / s;
    int rc = kphi_eos_eval_root(eos, w->trial_root, T, P, w->wn, w->lnphi2, J, st, w->ew, err);
    if (rc != KPHI_OK)
        return rc;
    double t = 1.0;
    for (size_t k = 0; k < w->na; k++) {
        size_t i = w->act[k];
        double gi = log(W[i]) + w->lnphi2[i] - w->d[i];
        w->g[k] = gi;
        t += W[i] * (gi - 1.0);
    }
    *tm = t;
    *sumW = s;
    return KPHI_OK;
}

int kphi__phase_stationary(const kphi_eos *eos, double T, double P, const double z[],
                           double W[], const kphi_phase_options *opt, kphi_phase_work *w,
                           int full, double *tm_out, double *lnsum, int *trivial,
                           kphi_error *err)
{
    size_t na = w->na;
    double tm = 0.0, sumW = 1.0;
    kphi_eos_state st;
    int rc;
    *trivial = 0;
    double tol = full ? opt->tol : 1e-8;
    int ss_next = 0;
    for (int it = 0; it < opt->max_iter; it++) {
        int newton = it >= opt->ss_iter && !ss_next;
        ss_next = 0;
        rc = tm_at(eos, T, P, W, newton ? w->JV : NULL, w, &tm, &sumW, &st, err);
        if (rc != KPHI_OK)
            return rc;
        double gmax = 0.0, dist = 0.0;
        for (size_t k = 0; k < na; k++) {
            size_t i = w->act[k];
            if (fabs(w->g[k]) > gmax)
                gmax = fabs(w->g[k]);
            double dl = log(w->wn[i]) - log(z[i]);
            dist += dl * dl;
        }
        if (dist < 1e-10) {
            /* the feed's composition: the trivial solution (W may still differ from z by a
             * factor, which the next substitution removes) */
            *trivial = 1;
            break;
        }
        if (!full && tm < -opt->tol_tm && it >= 2)
            break; /* clearly unstable: enough for a flash's start */
        if (gmax < tol)
            break;
        if (dist < 1e-4 && tm > -opt->tol_tm && it > 3 && !full) {
            *trivial = 1;
            break;
        }
        if (!newton) {
            for (size_t k = 0; k < na; k++) {
                size_t i = w->act[k];
                W[i] = exp(w->d[i] - w->lnphi2[i]);
            }
            continue;
        }
        /* Newton in alpha = 2 sqrt(W) */
        size_t m = na;
        for (size_t a = 0; a < m; a++) {
            size_t i = w->act[a];
            double si = sqrt(W[i]);
            for (size_t b = 0; b < m; b++) {
                size_t j = w->act[b];
                w->H[a * m + b] = si * sqrt(W[j]) * w->JV[i * w->n + j] / sumW;
            }
            w->H[a * m + a] += 1.0 + 0.5 * w->g[a];
            w->tmp[a] = si * w->g[a];
        }
        if (kphi__phase_newton_solve(w->H, w->tmp, w->step, w->sc, m) != KPHI_OK) {
            for (size_t k = 0; k < na; k++) {
                size_t i = w->act[k];
                W[i] = exp(w->d[i] - w->lnphi2[i]);
            }
            continue;
        }
        double tm0 = tm;
        double t = 1.0;
        int descent = 0;
        for (int ls = 0; ls < 10; ls++) {
            for (size_t a = 0; a < m; a++) {
                size_t i = w->act[a];
                double al = 2.0 * sqrt(W[i]) + t * w->step[a];
                if (al < 1e-150)
                    al = 1e-150;
                w->vt[i] = 0.25 * al * al;
            }
            double tmt, sw;
            rc = tm_at(eos, T, P, w->vt, NULL, w, &tmt, &sw, &st, err);
            if (rc != KPHI_OK)
                return rc;
            if (tmt <= tm0 + 1e-14 * fabs(tm0) + 1e-300) {
                descent = 1;
                break;
            }
            t *= 0.5;
        }
        if (descent) {
            for (size_t a = 0; a < m; a++)
                W[w->act[a]] = w->vt[w->act[a]];
        } else {
            /* no descent along the Newton direction (a root change of the trial phase, or
             * round-off near the stationary point): a substitution step next */
            ss_next = 1;
        }
    }
    *tm_out = tm;
    *lnsum = log(sumW);
    return KPHI_OK;
}

/* Trial phases from each component present, nearly pure, on the root of lower Gibbs
 * energy, until one has tm < -tol_tm; *best and *best_kind (0 when the trial is lighter
 * than the feed, 1 when denser) and w->trial are updated when a trial goes below *best. */
static int pure_trials(const kphi_eos *eos, double T, double P, const kphi_phase_options *opt,
                       kphi_phase_work *w, int full, double *best, int *best_kind,
                       kphi_error *err)
{
    size_t n = w->n;
    for (size_t q = 0; q < w->na && !(*best < -opt->tol_tm); q++) {
        size_t p = w->act[q];
        /* from a gas-like feed only components below their critical temperature can make a
         * phase of their own at T (a liquid rich in them): a nearly pure supercritical gas
         * lies next to the feed and the vapour-like trial covers it. From a liquid-like
         * feed every component is tried (N2 over water forms a gas). */
        double Tc, Pc;
        kphi_eos_critical(eos, p, T, &Tc, &Pc);
        if (!w->feed_liquid && !(Tc > T))
            continue;
        for (size_t i = 0; i < n; i++)
            w->W[i] = 0.0;
        for (size_t k = 0; k < w->na; k++) {
            size_t i = w->act[k];
            w->W[i] = i == p ? 1.0 : 1e-3 * w->z[i];
        }
        double tm, lnsum;
        int trivial;
        int rc = kphi__phase_stationary(eos, T, P, w->z, w->W, opt, w, full, &tm, &lnsum,
                                        &trivial, err);
        if (rc != KPHI_OK)
            return rc;
        if (trivial || !(tm < *best))
            continue;
        *best = tm;
        double s = 0.0;
        for (size_t k = 0; k < w->na; k++)
            s += w->W[w->act[k]];
        for (size_t i = 0; i < n; i++)
            w->trial[i] = w->z[i] > 0.0 ? w->W[i] / s : 0.0;
        kphi_eos_state st_t, st_z;
        rc = kphi__phase_eval(eos, T, P, w->trial, w->lnphi2, NULL, &st_t, w, err);
        if (rc == KPHI_OK)
            rc = kphi__phase_eval(eos, T, P, w->z, w->lnphi2, NULL, &st_z, w, err);
        if (rc != KPHI_OK)
            return rc;
        *best_kind = st_t.v > st_z.v ? 0 : 1;
    }
    return KPHI_OK;
}

/* Both trial phases; the most unstable (or least stable) trial in w->trial. Returns the
 * kind of that trial through *kind (0 vapour-like, 1 liquid-like). */
static int stability_core(const kphi_eos *eos, double T, double P, const kphi_phase_options *opt,
                          kphi_phase_work *w, int full, int *stable, double *tm_min, int *kind,
                          kphi_error *err)
{
    size_t n = w->n;
    double best = INFINITY;
    int best_kind = -1;
    for (int t = 0; t < 2; t++) {
        kphi__phase_wilson_trial(eos, T, P, t == 1, w, w->W);
        double tm, lnsum;
        int trivial;
        /* each trial on its own root: from Wilson's start a vapour-like trial can be dense
         * enough that its lower-G root is the liquid one, and on that root substitution
         * falls back onto the feed (methanol-water at 348 K, 1 atm) */
        w->trial_root = t == 0 ? KPHI_EOS_ROOT_GAS : KPHI_EOS_ROOT_LIQUID;
        int rc = kphi__phase_stationary(eos, T, P, w->z, w->W, opt, w, full, &tm, &lnsum,
                                        &trivial, err);
        w->trial_root = KPHI_EOS_ROOT_STABLE;
        if (rc != KPHI_OK)
            return rc;
        if (trivial)
            tm = 0.0;
        if (tm < best) {
            best = tm;
            best_kind = t;
            double s = 0.0;
            for (size_t k = 0; k < w->na; k++)
                s += w->W[w->act[k]];
            for (size_t i = 0; i < n; i++)
                w->trial[i] = w->z[i] > 0.0 ? w->W[i] / s : 0.0;
        }
    }
    /* When neither found the feed unstable: a trial of each component present, nearly
     * pure, on the root of lower Gibbs energy. The two Wilson trials can both fall onto the
     * feed where the phase that would form is far from either (an N2-rich gas over water
     * with a little dissolved N2 at 428 K and 150 bar). Nearly pure components are the
     * usual further starts, above all for liquid-liquid splits (Michelsen & Mollerup
     * 2007, ch. 10; from memory). */
    if (!(best < -opt->tol_tm)) {
        int rc = pure_trials(eos, T, P, opt, w, full, &best, &best_kind, err);
        if (rc != KPHI_OK)
            return rc;
    }
    *stable = !(best < -opt->tol_tm);
    if (tm_min != NULL)
        *tm_min = best;
    if (kind != NULL)
        *kind = best_kind;
    return KPHI_OK;
}

int kphi_phase_stability(const kphi_eos *eos, double T, double P, const double z[],
                         const kphi_phase_options *opt, kphi_phase_work *w, int *stable,
                         double trial[], double *tm_min, kphi_error *err)
{
    kphi_phase_options dflt = kphi_phase_options_default();
    if (opt == NULL)
        opt = &dflt;
    int rc = check_args(eos, T, P, w, err);
    if (rc == KPHI_OK)
        rc = kphi__phase_feed(eos, T, P, z, w, NULL, err);
    int st = 1;
    if (rc == KPHI_OK && w->na > 1)
        rc = stability_core(eos, T, P, opt, w, 0, &st, tm_min, NULL, err);
    else if (rc == KPHI_OK) {
        memcpy(w->trial, w->z, w->n * sizeof(double));
        if (tm_min != NULL)
            *tm_min = 0.0;
    }
    if (rc != KPHI_OK)
        return rc;
    if (stable != NULL)
        *stable = st;
    if (trial != NULL)
        memcpy(trial, w->trial, w->n * sizeof(double));
    return KPHI_OK;
}

/* ------------------------------------------------------------ Rachford-Rice --- */

/* Vapour fraction for K (active components) by Newton's method inside the window. */
static double rachford_rice(const kphi_phase_work *w, const double K[], double beta0)
{
    double kmin = INFINITY, kmax = -INFINITY;
    for (size_t k = 0; k < w->na; k++) {
        double Ki = K[w->act[k]];
        if (Ki < kmin)
            kmin = Ki;
        if (Ki > kmax)
            kmax = Ki;
    }
    if (!(kmax > 1.0) )
        return -INFINITY; /* all K <= 1: liquid */
    if (!(kmin < 1.0))
        return INFINITY; /* all K >= 1: vapour */
    double lo = 1.0 / (1.0 - kmax), hi = 1.0 / (1.0 - kmin);
    double b = beta0 > lo && beta0 < hi ? beta0 : 0.5 * (lo + hi);
    if (!(b > lo && b < hi))
        b = 0.5;
    for (int it = 0; it < 200; it++) {
        double f = 0.0, df = 0.0;
        for (size_t k = 0; k < w->na; k++) {
            size_t i = w->act[k];
            double km1 = K[i] - 1.0;
            double den = 1.0 + b * km1;
            double t = km1 / den;
            f += w->z[i] * t;
            df -= w->z[i] * t * t;
        }
        if (f == 0.0)
            return b; /* the root itself (the bracket below would move past it) */
        if (f > 0.0)
            lo = b;
        else
            hi = b;
        double bn = df < 0.0 ? b - f / df : 0.5 * (lo + hi);
        if (!(bn > lo && bn < hi))
            bn = 0.5 * (lo + hi);
        if (fabs(bn - b) <= 1e-15 * (1.0 + fabs(b)))
            return bn;
        b = bn;
    }
    return b;
}

/* x, y from K and beta on the active components (zero elsewhere), normalised. */
static void split_from_K(kphi_phase_work *w, const double K[], double beta)
{
    size_t n = w->n;
    for (size_t i = 0; i < n; i++)
        w->x[i] = w->y[i] = 0.0;
    double sx = 0.0, sy = 0.0;
    for (size_t k = 0; k < w->na; k++) {
        size_t i = w->act[k];
        double xi = w->z[i] / (1.0 + beta * (K[i] - 1.0));
        w->x[i] = xi;
        w->y[i] = K[i] * xi;
        sx += w->x[i];
        sy += w->y[i];
    }
    for (size_t k = 0; k < w->na; k++) {
        size_t i = w->act[k];
        w->x[i] /= sx;
        w->y[i] /= sy;
    }
}

/* Gibbs energy G/RT of the split v (vapour), l (liquid) on the active components, with
 * the phases' ln phi in w->lnphiV, w->lnphiL (and J when wanted). */
static int split_gibbs(const kphi_eos *eos, double T, double P, const double v[],
                       const double l[], int want_J, kphi_phase_work *w, double *G,
                       kphi_eos_state *stV, kphi_eos_state *stL, kphi_error *err)
{
    size_t n = w->n;
    double V = 0.0, L = 0.0;
    for (size_t k = 0; k < w->na; k++) {
        size_t i = w->act[k];
        V += v[i];
        L += l[i];
    }
    for (size_t i = 0; i < n; i++)
        w->x[i] = w->y[i] = 0.0;
    for (size_t k = 0; k < w->na; k++) {
        size_t i = w->act[k];
        w->y[i] = v[i] / V;
        w->x[i] = l[i] / L;
    }
    int rc = kphi__phase_eval(eos, T, P, w->y, w->lnphiV, want_J ? w->JV : NULL, stV, w, err);
    if (rc == KPHI_OK)
        rc = kphi__phase_eval(eos, T, P, w->x, w->lnphiL, want_J ? w->JL : NULL, stL, w, err);
    if (rc != KPHI_OK)
        return rc;
    double g = 0.0;
    for (size_t k = 0; k < w->na; k++) {
        size_t i = w->act[k];
        if (v[i] > 0.0)
            g += v[i] * (log(w->y[i]) + w->lnphiV[i]);
        if (l[i] > 0.0)
            g += l[i] * (log(w->x[i]) + w->lnphiL[i]);
    }
    *G = g;
    return KPHI_OK;
}

/* ---------------------------------------------------------------------- flash --- */

/* Fill out from the converged split held in w (x, y, lnphiL, lnphiV, beta). */
static void fill_split(const kphi_eos *eos, double T, double P, kphi_phase_work *w, double beta,
                       const kphi_eos_state *stV, const kphi_eos_state *stL, double resid,
                       int iter, kphi_flash_result *out)
{
    size_t n = w->n;
    (void)eos;
    out->T = T;
    out->P = P;
    out->n_phases = 2;
    int swap = stV->v < stL->v; /* phase[0] is the lighter */
    const double *c0 = swap ? w->x : w->y, *c1 = swap ? w->y : w->x;
    const double *l0 = swap ? w->lnphiL : w->lnphiV, *l1 = swap ? w->lnphiV : w->lnphiL;
    kphi__phase_fill(&out->phase[0], n, c0, l0, swap ? stL : stV, swap ? 1.0 - beta : beta);
    kphi__phase_fill(&out->phase[1], n, c1, l1, swap ? stV : stL, swap ? beta : 1.0 - beta);
    if (out->phase[0].kind == KPHI_PHASE_LIQUID && out->phase[1].kind == KPHI_PHASE_LIQUID)
        out->phase[0].kind = KPHI_PHASE_LIQUID; /* two liquids: both say so */
    double bal = 0.0;
    for (size_t i = 0; i < n; i++) {
        out->K[i] = c1[i] > 0.0 ? c0[i] / c1[i] : exp(l1[i] - l0[i]);
        double e = fabs(out->phase[0].fraction * c0[i] + out->phase[1].fraction * c1[i] -
                        w->z[i]);
        if (e > bal)
            bal = e;
    }
    out->residual = resid;
    out->balance_error = bal;
    out->iterations = iter;
}

int kphi__phase_split(const kphi_eos *eos, double T, double P, const kphi_phase_options *opt,
                      kphi_phase_work *w, kphi_flash_result *out, kphi_error *err)
{
    size_t n = w->n, na = w->na;
    double beta = 0.5;
    double err_prev = INFINITY;
    kphi_eos_state stV, stL;
    int rc, it = 0, newton = 0;
    double *K = w->tmp;
    double resid = INFINITY;
    int n_ss = 0;

    /* successive substitution with extrapolation */
    for (; it < opt->max_iter && !newton; it++) {
        for (size_t k = 0; k < na; k++) {
            size_t i = w->act[k];
            K[i] = exp(w->lnK[i]);
        }
        beta = rachford_rice(w, K, beta);
        if (!isfinite(beta))
            return KPHI__PHASE_ONE; /* one phase: the caller decides */
        split_from_K(w, K, beta);
        rc = kphi__phase_eval(eos, T, P, w->y, w->lnphiV, NULL, &stV, w, err);
        if (rc == KPHI_OK)
            rc = kphi__phase_eval(eos, T, P, w->x, w->lnphiL, NULL, &stL, w, err);
        if (rc != KPHI_OK)
            return rc;
        resid = 0.0;
        for (size_t k = 0; k < na; k++) {
            size_t i = w->act[k];
            double lk = w->lnphiL[i] - w->lnphiV[i];
            double e = fabs(lk - w->lnK[i]);
            if (e > resid)
                resid = e;
            w->lnK2[i] = w->lnK1[i];
            w->lnK1[i] = w->lnK[i];
            w->lnK[i] = lk;
        }
        n_ss++;
        if (resid < opt->tol && beta > 0.0 && beta < 1.0) {
            fill_split(eos, T, P, w, beta, &stV, &stL, resid, it + 1, out);
            return KPHI_OK;
        }
        /* dominant-eigenvalue extrapolation every fifth step */
        if (n_ss % 5 == 0 && n_ss >= 5) {
            double num = 0.0, den = 0.0;
            for (size_t k = 0; k < na; k++) {
                size_t i = w->act[k];
                double d1 = w->lnK[i] - w->lnK1[i], d0 = w->lnK1[i] - w->lnK2[i];
                num += d1 * d0;
                den += d0 * d0;
            }
            double lam = den > 0.0 ? num / den : 0.0;
            if (lam > 0.0 && lam < 0.98) {
                double f = lam / (1.0 - lam);
                for (size_t k = 0; k < na; k++) {
                    size_t i = w->act[k];
                    w->lnK[i] += f * (w->lnK[i] - w->lnK1[i]);
                }
            }
        }
        if (n_ss >= opt->ss_iter || (resid < 1e-3 && resid > 0.8 * err_prev))
            newton = beta > 0.0 && beta < 1.0;
        if (n_ss >= 3 * opt->ss_iter && !(beta > 0.0 && beta < 1.0))
            return KPHI__PHASE_ONE;
        err_prev = resid;
    }

    /* Newton steps on the amounts of the smaller phase; the other phase's follow by
     * difference (the other way round the small amounts would carry the cancellation
     * error of z - v, about 1e-16 of z, and near a dew line stall the iteration) */
    int liq_var = beta > 0.5;
    for (size_t i = 0; i < n; i++)
        w->v[i] = w->l[i] = 0.0;
    for (size_t k = 0; k < na; k++) {
        size_t i = w->act[k];
        if (liq_var) {
            w->l[i] = (1.0 - beta) * w->x[i];
            w->v[i] = w->z[i] - w->l[i];
        } else {
            w->v[i] = beta * w->y[i];
            w->l[i] = w->z[i] - w->v[i];
        }
        if (!(w->l[i] > 0.0)) {
            w->v[i] = w->z[i] * (1.0 - 1e-12);
            w->l[i] = w->z[i] - w->v[i];
        }
        if (!(w->v[i] > 0.0)) {
            w->v[i] = w->z[i] * 1e-12;
            w->l[i] = w->z[i] - w->v[i];
        }
    }
    double G;
    rc = split_gibbs(eos, T, P, w->v, w->l, 1, w, &G, &stV, &stL, err);
    if (rc != KPHI_OK)
        return rc;
    for (; it < opt->max_iter; it++) {
        double V = 0.0, L = 0.0;
        for (size_t k = 0; k < na; k++) {
            V += w->v[w->act[k]];
            L += w->l[w->act[k]];
        }
        resid = 0.0;
        for (size_t a = 0; a < na; a++) {
            size_t i = w->act[a];
            double ga = log(w->y[i]) + w->lnphiV[i] - log(w->x[i]) - w->lnphiL[i];
            w->g[a] = ga;
            if (fabs(ga) > resid)
                resid = fabs(ga);
        }
        if (resid < opt->tol) {
            fill_split(eos, T, P, w, V, &stV, &stL, resid, it, out);
            return KPHI_OK;
        }
        for (size_t a = 0; a < na; a++) {
            size_t i = w->act[a];
            for (size_t b = 0; b < na; b++) {
                size_t j = w->act[b];
                w->H[a * na + b] = (w->JV[i * n + j] - 1.0) / V + (w->JL[i * n + j] - 1.0) / L;
            }
            w->H[a * na + a] += 1.0 / (V * w->y[i]) + 1.0 / (L * w->x[i]);
        }
        if (kphi__phase_newton_solve(w->H, w->g, w->step, w->sc, na) != KPHI_OK)
            return kphi_error_set(err, KPHI_EFAILED, NULL, no_mark,
                                  "flash at T = %.2f K, P = %.4g bar: singular Newton matrix",
                                  T, P / 1e5);
        /* fraction to the boundary 0 < v < z */
        double t = 1.0;
        for (size_t a = 0; a < na; a++) {
            size_t i = w->act[a];
            double s = w->step[a];
            if (s < 0.0 && w->v[i] + t * s <= 0.0)
                t = 0.99 * w->v[i] / -s;
            if (s > 0.0 && w->l[i] - t * s <= 0.0)
                t = 0.99 * w->l[i] / s;
        }
        double slope = 0.0;
        for (size_t a = 0; a < na; a++)
            slope += w->g[a] * w->step[a];
        double Gt = G;
        int accepted = 0;
        /* a decrease of G this small is lost in its round-off (sum of terms of order
         * one): such a step is judged by the fugacity differences instead */
        int by_residual = -slope < 1e-13 * (fabs(G) + 1.0);
        for (int ls = 0; ls < 40; ls++) {
            for (size_t a = 0; a < na; a++) {
                size_t i = w->act[a];
                if (liq_var) {
                    w->lt[i] = w->l[i] - t * w->step[a];
                    w->vt[i] = w->z[i] - w->lt[i];
                } else {
                    w->vt[i] = w->v[i] + t * w->step[a];
                    w->lt[i] = w->z[i] - w->vt[i];
                }
            }
            rc = split_gibbs(eos, T, P, w->vt, w->lt, 1, w, &Gt, &stV, &stL, err);
            if (rc != KPHI_OK)
                return rc;
            if (by_residual) {
                double rt = 0.0;
                for (size_t a = 0; a < na; a++) {
                    size_t i = w->act[a];
                    rt = fmax(rt, fabs(log(w->y[i]) + w->lnphiV[i] - log(w->x[i]) -
                                       w->lnphiL[i]));
                }
                if (rt < resid) {
                    accepted = 1;
                    break;
                }
            } else if (Gt <= G + 1e-4 * t * slope || fabs(Gt - G) <= 1e-15 * fabs(G)) {
                accepted = 1;
                break;
            }
            t *= 0.5;
        }
        if (!accepted)
            return kphi_error_set(err, KPHI_EFAILED, NULL, no_mark,
                                  "flash at T = %.2f K, P = %.4g bar: no descent step (largest "
                                  "fugacity difference %.2g)",
                                  T, P / 1e5, resid);
        for (size_t a = 0; a < na; a++) {
            size_t i = w->act[a];
            w->v[i] = w->vt[i];
            w->l[i] = w->lt[i];
        }
        G = Gt;
    }
    return kphi_error_set(err, KPHI_EFAILED, NULL, no_mark,
                          "flash at T = %.2f K, P = %.4g bar did not converge in %d iterations "
                          "(largest fugacity difference %.2g)",
                          T, P / 1e5, opt->max_iter, resid);
}

int kphi_phase_flash(const kphi_eos *eos, double T, double P, const double z[],
                     const kphi_phase_options *opt, kphi_phase_work *w, kphi_flash_result *out,
                     kphi_error *err)
{
    kphi_phase_options dflt = kphi_phase_options_default();
    if (opt == NULL)
        opt = &dflt;
    int rc = check_args(eos, T, P, w, err);
    if (rc != KPHI_OK)
        return rc;
    if (out == NULL || out->n != w->n)
        return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark,
                              "flash result is for %zu species, the mixture has %zu",
                              out != NULL ? out->n : (size_t)0, w->n);
    rc = kphi__phase_feed(eos, T, P, z, w, NULL, err);
    if (rc != KPHI_OK)
        return rc;
    out->iterations = 0;
    out->tm_min = 0.0;
    if (w->na < 2)
        return kphi__phase_single(eos, T, P, w, out, err);
    int stable = 1, kind = 0;
    double tm_min = 0.0;
    rc = stability_core(eos, T, P, opt, w, 0, &stable, &tm_min, &kind, err);
    if (rc != KPHI_OK)
        return rc;
    if (stable) {
        rc = kphi__phase_single(eos, T, P, w, out, err);
        out->tm_min = tm_min;
        return rc;
    }
    /* start from the unstable trial: a vapour-like trial is y (x = z), a liquid-like one
     * is x (y = z) */
    for (size_t k = 0; k < w->na; k++) {
        size_t i = w->act[k];
        double r = kind == 0 ? w->trial[i] / w->z[i] : w->z[i] / w->trial[i];
        w->lnK[i] = log(r);
        w->lnK1[i] = w->lnK2[i] = w->lnK[i];
    }
    rc = kphi__phase_split(eos, T, P, opt, w, out, err);
    if (rc == KPHI__PHASE_ONE) {
        /* the split collapsed to one phase although the test found the feed unstable:
         * retry from Wilson's K */
        for (size_t k = 0; k < w->na; k++) {
            size_t i = w->act[k];
            w->lnK[i] = w->lnK1[i] = w->lnK2[i] = log(w->kw[i]);
        }
        rc = kphi__phase_split(eos, T, P, opt, w, out, err);
        if (rc == KPHI__PHASE_ONE)
            return kphi_error_set(err, KPHI_EFAILED, NULL, no_mark,
                                  "flash at T = %.2f K, P = %.4g bar: the stability test finds "
                                  "the mixture unstable (tm = %.3g) but no two-phase split was "
                                  "found",
                                  T, P / 1e5, tm_min);
    }
    if (rc != KPHI_OK)
        return rc;
    out->tm_min = tm_min;
    /* The two phases share one tangent plane (equal fugacities); a trial phase below it
     * means that a third phase forms, and the split is then not the equilibrium. Wilson's
     * trials from either phase lead back to the two phases, so the nearly pure components
     * are tried, from the vapour's tangent plane. This flash finds at most two phases: it
     * says so rather than answer. */
    double best = 0.0;
    rc = kphi__phase_third_phase(eos, T, P, out->phase[0].y, opt, w, &best, err);
    if (rc != KPHI_OK)
        return rc;
    if (best < -opt->tol_tm)
        return kphi_error_set(err, KPHI_EFAILED, NULL, no_mark,
                              "flash at T = %.2f K, P = %.4g bar: a third phase forms (below "
                              "the tangent plane of the two-phase split by %.3g); this flash "
                              "finds at most two phases",
                              T, P / 1e5, -best);
    return KPHI_OK;
}

int kphi__phase_third_phase(const kphi_eos *eos, double T, double P, const double y[],
                            const kphi_phase_options *opt, kphi_phase_work *w, double *tm,
                            kphi_error *err)
{
    double best = 0.0;
    int bk = 0;
    int rc = kphi__phase_feed(eos, T, P, y, w, NULL, err);
    /* The trials from the vapour's tangent plane are nearly pure components below their
     * critical temperature (pure_trials()). With at most one such component present the
     * only phase it can make is the liquid the split already has (a second liquid needs
     * two components that can each be liquid at T): nothing to test. */
    size_t sub = 0;
    for (size_t k = 0; rc == KPHI_OK && k < w->na; k++) {
        double Tc, Pc;
        kphi_eos_critical(eos, w->act[k], T, &Tc, &Pc);
        sub += Tc > T;
    }
    if (rc == KPHI_OK && w->na > 1 && (w->feed_liquid || sub > 1))
        rc = pure_trials(eos, T, P, opt, w, 0, &best, &bk, err);
    *tm = best;
    return rc;
}
