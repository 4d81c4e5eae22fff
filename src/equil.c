/* kphi equil: chemical equilibrium by minimising the Gibbs energy over reaction extents.
 *
 * For species i = 1..s and independent reactions j = 1..r with coefficients nu_ji,
 *   n_i = n0_i + sum_j nu_ji xi_j                                   (mol)
 *   G/RT = sum_i n_i mu_i,  mu_i = g_i°(T)/RT + ln(P/P°) + ln y_i + ln phi_i(T, P, y)
 * (Smith & Missen 1982, "Chemical Reaction Equilibrium Analysis", eq. 2.2-1 and 6.2-x;
 * Denbigh 1981, "The Principles of Chemical Equilibrium", ch. 4). Species in no reaction are
 * inert by construction. The gradient with respect to xi_j is the reaction affinity
 *   A_j = sum_i nu_ji mu_i = -ln K_j + sum_i nu_ji ln(y_i phi_i P/P°),
 * (the terms in d mu_i cancel by the Gibbs-Duhem relation) and the Hessian is
 *   H_jk = sum_il nu_ji nu_kl [delta_il / n_i - 1/n_t + (n_t d ln phi_i/d n_l)/n_t].
 * Newton steps solve H dxi = -A (Cholesky on the diagonally scaled H; when the EOS term
 * makes H indefinite, the ideal part alone is used for that step, which is then a
 * quasi-Newton step on the same function). Each step is truncated so that no amount falls
 * by more than a fraction `boundary` of itself, then backtracked on G (Armijo condition,
 * Nocedal & Wright 2006, "Numerical Optimization", 2nd ed., alg. 3.1). The amounts n are
 * the state and are updated by n += alpha nu^T dxi, so trace species keep their relative
 * precision however close they come to zero.
 *
 * Species that the feed cannot form at all (for example CO2 and H2O when a methanol set
 * is fed only CO and H2) would make the feasible set flat. They are found exactly from the
 * sign pattern of the feed and the stoichiometry by a small linear programme (Dantzig
 * simplex with Bland's rule, Bland 1977, Math. Oper. Res. 2, 103), held at zero, and the
 * extents are confined to the null space of their rows, so the minimiser works in the
 * relative interior (src/equil_start.c). Converged when every affinity that can act is
 * below tol.
 *
 * Cold start with a real-gas model (kphi_equil_solve() only): the first steps minimise
 *   G_f/RT = sum_i n_i [g_i°/RT + ln(P/P°) + ln y_i + ln phi_i(y0)]
 * with ln phi frozen at the start composition y0, an ideal-solution problem whose Hessian
 * is the ideal part alone, so a step costs no EOS evaluation. Once every free affinity of
 * G_f is below FROZEN_SWITCH the EOS is evaluated again and the Newton iteration above
 * continues on the full G/RT; only its own convergence test ends the solve. (This is the
 * first pass of an outer phi loop, used only to get close cheaply before the full Newton
 * steps.) Should anything fail after the frozen phase, the plain iteration from the cold
 * start decides. Warm starts skip the phase.
 *
 * Cost (a solve is a few microseconds, so it matters): one EOS evaluation with its
 * derivative matrix per Newton step (the trial point's, kept when accepted); the loops run
 * over the species the free directions move (an index list kept with the null-space
 * basis); small systems are solved by an inline Cholesky; the logarithms of inert amounts
 * and g°/RT (while T and the thermo data are unchanged) are kept between evaluations and
 * solves. None of these changes the iteration, only what it costs.
 *
 * Files: this one holds the workspace and the minimiser (set, iterate, test, get, solve);
 * src/equil_start.c the species held at zero, the free directions and the starting point;
 * src/equil_k.c the K of each reaction from the chosen basis (tables or a correlation);
 * src/equil_result.c the result, the conversion and the equivalent ideal pressure. The
 * workspace struct is in src/equil_internal.h. */
#include "kphi/equil.h"

#include <float.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_errno.h>
#include <gsl/gsl_blas.h>
#include <gsl/gsl_linalg.h>

#include "equil_internal.h"
#include "kphi/thermo.h"

/* Doubles of thermo data that g°/RT of one species depends on (see set_g0()). */
enum { G0KEY = 17 };

kphi_equil_options kphi_equil_options_default(void)
{
    kphi_equil_options o;
    o.tol_affinity = 1e-10;
    o.max_iter = 300;
    o.boundary = 0.99;
    o.K_basis = KPHI_K_TABLES;
    return o;
}

/* -------------------------------------------------------------- workspace */

kphi_equil_work *kphi_equil_work_alloc(size_t ns, size_t nr)
{
    kphi_equil_work *w = calloc(1, sizeof *w);
    if (w == NULL)
        return NULL;
    size_t s = ns > 0 ? ns : 1, r = nr > 0 ? nr : 1;
    size_t big = s > r ? s : r;
    w->cap_s = ns;
    w->cap_r = nr;
    w->g0T = NAN;
    int ok = 1;
#define GET(field, count, type)                                                               \
    do {                                                                                      \
        w->field = calloc((count), sizeof(type));                                             \
        ok = ok && w->field != NULL;                                                          \
    } while (0)
    GET(n0, s, double);
    GET(lnn0, s, double);
    GET(g0, s, double);
    GET(g0k, s, double);
    GET(lnK, r, double);
    GET(dlnK, r, double);
    GET(kmat, r * r, double);
    GET(kbasis, r, size_t);
    GET(kout, r, int);
    GET(nu, r * s, double);
    GET(basis, r * r, double);
    GET(nueff, r * s, double);
    GET(held, s, int);
    GET(in_rxn, s, int);
    GET(pattern, s, int);
    GET(sup, s, size_t);
    GET(nusum, r, double);
    GET(g0key, s * G0KEY, double);
    GET(Jb, r * s, double);
    GET(n, s, double);
    GET(y, s, double);
    GET(lnphi, s, double);
    GET(lnphi0, s, double);
    GET(mu, s, double);
    GET(xi, r, double);
    GET(grad, r, double);
    GET(aff, r, double);
    GET(J, s * s, double);
    GET(J_try, s * s, double);
    GET(H, r * r, double);
    GET(sc, r, double);
    GET(step, r, double);
    GET(dn, s, double);
    GET(nt_try, s, double);
    GET(y_try, s, double);
    GET(lnphi_try, s, double);
    GET(mu_try, s, double);
    GET(xi_try, r, double);
    GET(svd_a, big * r, double);
    GET(qr, (s + 1) * r, double);
    GET(tau, r, double);
    GET(rows, r * s, double);
    GET(rsum, r, double);
    GET(tmat, r * r, double);
    GET(gl, r, double);
    GET(aug, 2 * r * r, double);
    GET(gsq, r * r, double);
    GET(order, s, size_t);
    GET(svd_v, r * r, double);
    GET(svd_s, r, double);
    GET(svd_w, r, double);
    GET(tab, (s + 1) * (2 * r + s + 2), double);
    GET(bvar, s + 1, size_t);
    GET(dirs, s * r, double);
#undef GET
    w->ew = kphi_eos_work_alloc(ns);
    if (!ok || w->ew == NULL) {
        kphi_equil_work_free(w);
        return NULL;
    }
    return w;
}

void kphi_equil_work_free(kphi_equil_work *w)
{
    if (w == NULL)
        return;
    double *d[] = {w->n0,     w->lnn0,   w->lnphi0,    w->g0,     w->lnK,    w->nu,
                   w->basis,  w->nueff,  w->n,         w->y,      w->lnphi,  w->mu,
                   w->xi,     w->grad,   w->aff,       w->J,      w->J_try,  w->H,
                   w->sc,     w->step,   w->dn,        w->nt_try, w->y_try,  w->lnphi_try,
                   w->mu_try, w->xi_try, w->svd_a,     w->svd_v,  w->svd_s,  w->svd_w,
                   w->tab,    w->dirs,   w->nusum,     w->g0key,  w->Jb, w->qr, w->tau,
                   w->rows,   w->rsum,   w->tmat,      w->gl,     w->aug,    w->gsq,
                   w->g0k,    w->dlnK,   w->kmat};
    for (size_t i = 0; i < sizeof d / sizeof d[0]; i++)
        free(d[i]);
    free(w->held);
    free(w->in_rxn);
    free(w->pattern);
    free(w->sup);
    free(w->order);
    free(w->bvar);
    free(w->kbasis);
    free(w->kout);
    kphi_eos_work_free(w->ew);
    free(w);
}

/* -------------------------------------------------------- function values */

/* mu, G and y at amounts n (lnphi from the EOS). When J is not NULL also the EOS
 * derivative matrix. Returns KPHI_EFAILED when the EOS fails. */
static int evaluate(kphi_equil_work *w, const double *n, double *y, double *lnphi, double *mu,
                    double *G, double *J, kphi_eos_state *st, kphi_error *err)
{
    size_t s = w->s;
    double nt = 0.0;
    for (size_t i = 0; i < s; i++)
        nt += n[i];
    for (size_t i = 0; i < s; i++)
        y[i] = n[i] / nt;
    if (w->frozen) {
        memcpy(lnphi, w->lnphi0, s * sizeof(double));
        if (st != NULL)
            *st = w->st;
    } else {
        int rc = kphi_eos_eval(w->eos, w->T, w->P, y, lnphi, J, st, w->ew, err);
        if (rc != KPHI_OK)
            return rc;
    }
    double g = 0.0;
    double lnnt = log(nt);
    for (size_t i = 0; i < s; i++) {
        if (n[i] > 0.0) {
            /* a species in no reaction keeps n_i = n0_i exactly: its log is cached */
            double lnn = w->in_rxn[i] ? log(n[i]) : w->lnn0[i];
            mu[i] = w->mu0[i] + w->lnP + lnn - lnnt + lnphi[i];
            g += n[i] * mu[i];
        } else {
            mu[i] = -INFINITY;
        }
    }
    *G = g;
    return KPHI_OK;
}

static void gradient(const kphi_equil_work *w, const double *mu, double *grad)
{
    size_t s = w->s;
    for (size_t k = 0; k < w->m; k++) {
        double g = 0.0;
        const double *row = w->nueff + k * s;
        for (size_t q = 0; q < w->nsup; q++) {
            size_t i = w->sup[q];
            if (row[i] != 0.0)
                g += row[i] * mu[i];
        }
        grad[k] = g;
    }
}

static void affinities(kphi_equil_work *w)
{
    size_t s = w->s;
    for (size_t j = 0; j < w->r; j++) {
        double a = 0.0;
        int blocked = 0;
        for (size_t i = 0; i < s; i++) {
            double v = w->nu[j * s + i];
            if (v == 0.0)
                continue;
            if (w->held[i])
                blocked = 1;
            else
                a += v * w->mu[i];
        }
        w->aff[j] = blocked ? NAN : a;
    }
}

/* ------------------------------------------------------------ public API */

/* The data g°/RT of species sp depends on, in a fixed order. */
static void g0_key(const kphi_species *sp, double *key)
{
    key[0] = sp->T_low;
    key[1] = sp->T_mid;
    key[2] = sp->T_high;
    memcpy(key + 3, sp->low, 7 * sizeof(double));
    memcpy(key + 10, sp->high, 7 * sizeof(double));
}

/* g°/RT of every species at T (w->g0), after the data-range check. A sweep asks for the
 * same T again and again (the ideal and the real solve of a point, the points of a row),
 * so g0 is kept when T and the thermo data of every species equal those of the previous
 * call. The key is the data itself, not pointers: another set loaded at the address of a
 * freed one cannot inherit stale values. */
static int set_g0(kphi_equil_work *w, const kphi_rxnset *set, double T, kphi_error *err)
{
    kphi_mark none = {0, 0};
    size_t s = w->s;
    double key[G0KEY];
    int same = T == w->g0T && s <= w->g0n;
    for (size_t i = 0; i < s && same; i++) {
        g0_key(kphi_rxnset_species(set, i), key);
        same = memcmp(key, w->g0key + i * G0KEY, sizeof key) == 0;
    }
    if (same)
        return KPHI_OK;
    w->g0T = NAN;
    for (size_t i = 0; i < s; i++) {
        const kphi_species *sp = kphi_rxnset_species(set, i);
        int rc = kphi_thermo_check_range(sp, T, NULL, none, err);
        if (rc != KPHI_OK)
            return rc;
        w->g0[i] = kphi_thermo_g_rt(sp, T);
        g0_key(sp, w->g0key + i * G0KEY);
    }
    w->g0T = T;
    w->g0n = s;
    return KPHI_OK;
}

/* kphi_equil_set(); with freeze_cold set, a cold start (no usable guess) with a real-gas
 * model begins in the frozen-phi phase (see kphi_equil_solve()). */
static int equil_set(kphi_equil_work *w, const kphi_rxnset *set, const kphi_eos *eos, double T,
                     double P, const double n0[], const double xi_guess[],
                     const kphi_equil_options *opt, int freeze_cold, kphi_error *err)
{
    kphi_mark none = {0, 0};
    size_t s = kphi_rxnset_n_species(set), r = kphi_rxnset_n_reactions(set);
    if (s > w->cap_s || r > w->cap_r || kphi_eos_size(eos) != s)
        return kphi_error_set(err, KPHI_EINPUT, NULL, none,
                              "workspace or EOS sized for a different reaction set");
    if (!(T > 0.0) || !isfinite(T))
        return kphi_error_set(err, KPHI_EINPUT, NULL, none, "T must be > 0 K, got %g K", T);
    if (!(P > 0.0) || !isfinite(P))
        return kphi_error_set(err, KPHI_EINPUT, NULL, none, "P must be > 0, got %g Pa", P);
    w->set = set;
    w->eos = eos;
    w->s = s;
    w->r = r;
    w->T = T;
    w->P = P;
    w->lnP = log(P / KPHI_P_STANDARD);
    w->have_state = 0;
    w->frozen = 0;
    w->iter = 0;
    w->trial_err_iter = -1;
    double total = 0.0, reacting = 0.0;
    for (size_t i = 0; i < s; i++) {
        if (!(n0[i] >= 0.0) || !isfinite(n0[i]))
            return kphi_error_set(err, KPHI_EINPUT, NULL, none,
                                  "feed of %s must be a finite amount >= 0, got %g",
                                  kphi_rxnset_species(set, i)->name, n0[i]);
        w->n0[i] = n0[i];
        total += n0[i];
        w->in_rxn[i] = !kphi_rxnset_is_inert(set, i);
        if (w->in_rxn[i])
            reacting += n0[i];
        else
            w->lnn0[i] = n0[i] > 0.0 ? log(n0[i]) : -INFINITY;
    }
    if (!(total > 0.0))
        return kphi_error_set(err, KPHI_EINPUT, NULL, none, "the feed is empty (all amounts 0)");
    if (!(reacting > 0.0) && r > 0)
        return kphi_error_set(err, KPHI_EINPUT, NULL, none,
                              "the feed holds only inert species; nothing can react");
    const double *nu = kphi_rxnset_nu_matrix(set);
    memcpy(w->nu, nu, r * s * sizeof(double));
    int rc = set_g0(w, set, T, err);
    if (rc != KPHI_OK)
        return rc;
    for (size_t j = 0; j < r; j++) {
        double dg = 0.0;
        for (size_t i = 0; i < s; i++)
            dg += w->nu[j * s + i] * w->g0[i];
        w->lnK[j] = -dg;
    }
    rc = kphi__equil_set_K(w, opt != NULL ? opt->K_basis : KPHI_K_TABLES, err);
    if (rc != KPHI_OK)
        return rc;
    rc = kphi__equil_find_start(w, err);
    if (rc != KPHI_OK)
        return rc;
    /* warm start: use the guess when it keeps every free species strictly positive and
     * every held one exactly at zero */
    int warm = 0;
    if (xi_guess != NULL && r > 0) {
        int ok = 1;
        for (size_t i = 0; i < s && ok; i++) {
            double v = w->n0[i];
            for (size_t j = 0; j < r; j++)
                v += w->nu[j * s + i] * xi_guess[j];
            if (w->held[i])
                ok = fabs(v) <= 1e-300;
            else if (w->in_rxn[i])
                ok = v > 0.0 && isfinite(v);
            w->nt_try[i] = v;
        }
        if (ok) {
            warm = 1;
            memcpy(w->xi, xi_guess, r * sizeof(double));
            for (size_t i = 0; i < s; i++)
                w->n[i] = w->held[i] ? 0.0 : (w->in_rxn[i] ? w->nt_try[i] : w->n0[i]);
        }
    }
    int use_eos = kphi_eos_get_model(eos) != KPHI_EOS_IDEAL;
    w->use_eos = use_eos;
    int freeze = freeze_cold && use_eos && !warm && w->m > 0;
    rc = evaluate(w, w->n, w->y, w->lnphi, w->mu, &w->G, use_eos && !freeze ? w->J : NULL,
                  &w->st, err);
    if (rc != KPHI_OK)
        return rc;
    w->have_J = use_eos && !freeze;
    if (freeze) {
        memcpy(w->lnphi0, w->lnphi, s * sizeof(double));
        w->frozen = 1;
    }
    gradient(w, w->mu, w->grad);
    w->have_state = 1;
    return KPHI_OK;
}

int kphi_equil_set(kphi_equil_work *w, const kphi_rxnset *set, const kphi_eos *eos, double T,
                   double P, const double n0[], const double xi_guess[],
                   const kphi_equil_options *opt, kphi_error *err)
{
    return equil_set(w, set, eos, T, P, n0, xi_guess, opt, 0, err);
}

/* A cold start with a real-gas model first minimises G with ln phi frozen at the start
 * composition (kphi_equil_solve()) until every free affinity is below this, then
 * switches to the full problem. Chosen by instruction counts over ammonia and methanol
 * converter grids (0.1 to 0.5 all work; the full problem's own convergence test decides
 * the answer). */
#define FROZEN_SWITCH 0.2

/* Systems up to this size are solved by the loop in solve_scaled(), larger ones by GSL. */
enum { SMALL_M = 8 };

/* Solve H x = b for x (m x m), with symmetric diagonal scaling; 0 on success, -1 when H is
 * not positive definite. x may be b. */
static int solve_scaled(kphi_equil_work *w, size_t m, const double *b, double *x)
{
    if (m == 1) { /* one free direction (a single reaction): a division */
        double d = w->H[0];
        if (!(d > 0.0) || !isfinite(d))
            return -1;
        x[0] = b[0] / d;
        return isfinite(x[0]) ? 0 : -1;
    }
    for (size_t k = 0; k < m; k++) {
        double d = w->H[k * m + k];
        if (!(d > 0.0) || !isfinite(d))
            return -1;
        w->sc[k] = 1.0 / sqrt(d);
    }
    for (size_t k = 0; k < m; k++)
        for (size_t l = 0; l < m; l++)
            w->H[k * m + l] *= w->sc[k] * w->sc[l];
    if (m <= SMALL_M) {
        /* Cholesky H = L L^T in place (lower triangle; Golub & Van Loan 2013, sec. 4.2),
         * then L z = b, L^T x = z. For these few unknowns a loop beats GSL's blocked
         * routine, whose call overhead would dominate. */
        double *H = w->H;
        for (size_t j = 0; j < m; j++) {
            double d = H[j * m + j];
            for (size_t k = 0; k < j; k++)
                d -= H[j * m + k] * H[j * m + k];
            if (!(d > 0.0) || !isfinite(d))
                return -1;
            d = sqrt(d);
            H[j * m + j] = d;
            for (size_t i = j + 1; i < m; i++) {
                double v = H[i * m + j];
                for (size_t k = 0; k < j; k++)
                    v -= H[i * m + k] * H[j * m + k];
                H[i * m + j] = v / d;
            }
        }
        for (size_t i = 0; i < m; i++) {
            double v = b[i] * w->sc[i];
            for (size_t k = 0; k < i; k++)
                v -= H[i * m + k] * x[k];
            x[i] = v / H[i * m + i];
        }
        for (size_t i = m; i-- > 0;) {
            double v = x[i];
            for (size_t k = i + 1; k < m; k++)
                v -= H[k * m + i] * x[k];
            x[i] = v / H[i * m + i];
        }
        for (size_t k = 0; k < m; k++) {
            x[k] *= w->sc[k];
            if (!isfinite(x[k]))
                return -1;
        }
        return 0;
    }
    gsl_matrix_view Hv = gsl_matrix_view_array(w->H, m, m);
    if (gsl_linalg_cholesky_decomp1(&Hv.matrix) != GSL_SUCCESS)
        return -1;
    for (size_t k = 0; k < m; k++)
        x[k] = b[k] * w->sc[k];
    gsl_vector_view xv = gsl_vector_view_array(x, m);
    if (gsl_linalg_cholesky_svx(&Hv.matrix, &xv.vector) != GSL_SUCCESS)
        return -1;
    for (size_t k = 0; k < m; k++) {
        x[k] *= w->sc[k];
        if (!isfinite(x[k]))
            return -1;
    }
    return 0;
}

/* Newton step with the ideal-gas Hessian in factor form, for when forming H loses it to
 * round-off (a trace species in several reactions gives H entries 1/n_i ~ 1e17 that
 * swamp the rest). Since sum_i n_i = n_t and sum_i nu_ki = nusum_k,
 *   H = M^T M,  M_ik = sqrt(n_i) (nueff_ki/n_i - nusum_k/n_t),
 * with one row per moved species and one for everything else (n_rest = n_t - sum over
 * moved species; its nueff is 0). With M = QR (Householder; Golub & Van Loan 2013,
 * sec. 5.2) the step solves R^T R x = b by two triangular solves, so the condition number
 * that matters is that of R, the square root of H's. 0 on success. */
static int solve_ideal_qr(kphi_equil_work *w, size_t m, const double *R, const double *Rsum,
                          const double *b, double *x)
{
    size_t s = w->s, ns = w->nsup;
    double nt = 0.0, moved = 0.0;
    for (size_t i = 0; i < s; i++)
        nt += w->n[i];
    for (size_t p = 0; p < ns; p++)
        moved += w->n[w->sup[p]];
    size_t rows = 0;
    for (size_t p = 0; p < ns; p++) {
        size_t i = w->sup[p];
        double ni = w->n[i];
        if (!(ni > 0.0))
            continue;
        double sq = sqrt(ni);
        for (size_t k = 0; k < m; k++)
            w->qr[rows * m + k] = sq * (R[k * s + i] / ni - Rsum[k] / nt);
        rows++;
    }
    double rest = nt - moved;
    if (rest > 0.0) {
        double sq = sqrt(rest);
        for (size_t k = 0; k < m; k++)
            w->qr[rows * m + k] = -sq * Rsum[k] / nt;
        rows++;
    }
    if (rows < m)
        return -1;
    gsl_matrix_view A = gsl_matrix_view_array(w->qr, rows, m);
    gsl_vector_view tau = gsl_vector_view_array(w->tau, m);
    if (gsl_linalg_QR_decomp(&A.matrix, &tau.vector) != GSL_SUCCESS)
        return -1;
    for (size_t k = 0; k < m; k++) {
        if (!(w->qr[k * m + k] != 0.0) || !isfinite(w->qr[k * m + k]))
            return -1;
        x[k] = b[k];
    }
    gsl_matrix_const_view Rv = gsl_matrix_const_submatrix(&A.matrix, 0, 0, m, m);
    gsl_vector_view xv = gsl_vector_view_array(x, m);
    if (gsl_blas_dtrsv(CblasUpper, CblasTrans, CblasNonUnit, &Rv.matrix, &xv.vector) !=
            GSL_SUCCESS ||
        gsl_blas_dtrsv(CblasUpper, CblasNoTrans, CblasNonUnit, &Rv.matrix, &xv.vector) !=
            GSL_SUCCESS)
        return -1;
    for (size_t k = 0; k < m; k++)
        if (!isfinite(x[k]))
            return -1;
    return 0;
}

/* Hessian in the free directions; with_eos adds the EOS term (J must be current):
 *   H_kl = sum_i a_i b_i/n_i - (sum_i a_i)(sum_i b_i)/n_t + a^T J b/n_t,
 * a = nueff_k, b = nueff_l, summed over the species the free directions move. */
static void hessian(kphi_equil_work *w, const double *R, const double *Rsum, int with_eos)
{
    size_t s = w->s, m = w->m, ns = w->nsup;
    const size_t *sup = w->sup;
    double nt = 0.0;
    for (size_t i = 0; i < s; i++)
        nt += w->n[i];
    if (with_eos)
        for (size_t l = 0; l < m; l++) {
            const double *b = R + l * s;
            double *Jb = w->Jb + l * s;
            for (size_t p = 0; p < ns; p++) {
                const double *Ji = w->J + sup[p] * s;
                double t = 0.0;
                for (size_t q = 0; q < ns; q++)
                    t += Ji[sup[q]] * b[sup[q]];
                Jb[p] = t;
            }
        }
    for (size_t k = 0; k < m; k++) {
        const double *a = R + k * s;
        for (size_t l = k; l < m; l++) {
            const double *b = R + l * s;
            double h = 0.0;
            for (size_t p = 0; p < ns; p++) {
                size_t i = sup[p];
                if (w->n[i] > 0.0)
                    h += a[i] * b[i] / w->n[i];
            }
            h -= Rsum[k] * Rsum[l] / nt;
            if (with_eos) {
                const double *Jb = w->Jb + l * s;
                double e = 0.0;
                for (size_t p = 0; p < ns; p++)
                    e += a[sup[p]] * Jb[p];
                h += e / nt;
            }
            w->H[k * m + l] = h;
            w->H[l * m + k] = h;
        }
    }
}

static void swap(double **a, double **b)
{
    double *t = *a;
    *a = *b;
    *b = t;
}

/* A local basis of the free directions for this step, T nueff with T = C^-1, where C
 * holds the columns of nueff of the m smallest species whose columns are independent. In
 * it each of those species appears in exactly one direction with coefficient 1, so its
 * 1/n_i term sits on one diagonal entry of the Hessian instead of filling a block that
 * round-off makes singular. This is the choice of components as the most abundant species
 * of Smith & Missen (1982, ch. 6, the stoichiometric algorithm); the Newton step itself is
 * the same in any basis, only its computation is better conditioned. Returns 0, or -1
 * when no such basis is found (the step then uses nueff as it is). */
static int rebase(kphi_equil_work *w)
{
    size_t s = w->s, m = w->m, ns = w->nsup;
    if (m < 2 || ns < m)
        return -1;
    for (size_t p = 0; p < ns; p++) { /* insertion sort by amount, small first */
        size_t i = w->sup[p], q = p;
        while (q > 0 && w->n[w->order[q - 1]] > w->n[i]) {
            w->order[q] = w->order[q - 1];
            q--;
        }
        w->order[q] = i;
    }
    size_t picked[64], np = 0;
    if (m > 64)
        return -1;
    for (size_t p = 0; p < ns && np < m; p++) { /* modified Gram-Schmidt on the columns */
        size_t i = w->order[p];
        double *v = w->gsq + np * m, norm0 = 0.0, norm = 0.0;
        for (size_t k = 0; k < m; k++) {
            v[k] = w->nueff[k * s + i];
            norm0 += v[k] * v[k];
        }
        if (!(norm0 > 0.0))
            continue;
        for (size_t q = 0; q < np; q++) {
            const double *u = w->gsq + q * m;
            double d = 0.0;
            for (size_t k = 0; k < m; k++)
                d += u[k] * v[k];
            for (size_t k = 0; k < m; k++)
                v[k] -= d * u[k];
        }
        for (size_t k = 0; k < m; k++)
            norm += v[k] * v[k];
        if (!(norm > 1e-18 * norm0))
            continue;
        norm = sqrt(norm);
        for (size_t k = 0; k < m; k++)
            v[k] /= norm;
        picked[np++] = i;
    }
    if (np < m)
        return -1;
    /* T = C^-1 by Gauss-Jordan with partial pivoting on [C | I] */
    size_t c2 = 2 * m;
    double *A = w->aug;
    for (size_t k = 0; k < m; k++)
        for (size_t q = 0; q < m; q++) {
            A[k * c2 + q] = w->nueff[k * s + picked[q]];
            A[k * c2 + m + q] = k == q ? 1.0 : 0.0;
        }
    for (size_t col = 0; col < m; col++) {
        size_t piv = col;
        for (size_t k = col + 1; k < m; k++)
            if (fabs(A[k * c2 + col]) > fabs(A[piv * c2 + col]))
                piv = k;
        if (!(fabs(A[piv * c2 + col]) > 1e-12))
            return -1;
        if (piv != col)
            for (size_t q = 0; q < c2; q++) {
                double t = A[col * c2 + q];
                A[col * c2 + q] = A[piv * c2 + q];
                A[piv * c2 + q] = t;
            }
        double d = A[col * c2 + col];
        for (size_t q = 0; q < c2; q++)
            A[col * c2 + q] /= d;
        for (size_t k = 0; k < m; k++) {
            double f = A[k * c2 + col];
            if (k == col || f == 0.0)
                continue;
            for (size_t q = 0; q < c2; q++)
                A[k * c2 + q] -= f * A[col * c2 + q];
        }
    }
    for (size_t k = 0; k < m; k++)
        for (size_t q = 0; q < m; q++)
            w->tmat[k * m + q] = A[k * c2 + m + q];
    for (size_t k = 0; k < m; k++) {
        const double *t = w->tmat + k * m;
        double *row = w->rows + k * s, sum = 0.0, g = 0.0;
        for (size_t p = 0; p < ns; p++) {
            size_t i = w->sup[p];
            double v = 0.0;
            for (size_t q = 0; q < m; q++)
                v += t[q] * w->nueff[q * s + i];
            row[i] = v;
        }
        for (size_t q = 0; q < m; q++) { /* exact 0 and 1 where the construction says so */
            row[picked[q]] = q == k ? 1.0 : 0.0;
            g += t[q] * w->grad[q];
        }
        for (size_t p = 0; p < ns; p++)
            sum += row[w->sup[p]];
        w->rsum[k] = sum;
        w->gl[k] = g;
    }
    return 0;
}

int kphi_equil_iterate(kphi_equil_work *w, const kphi_equil_options *opt, kphi_error *err)
{
    kphi_mark none = {0, 0};
    size_t s = w->s, m = w->m;
    if (!w->have_state)
        return kphi_error_set(err, KPHI_EFAILED, NULL, none, "kphi_equil_set() was not called");
    if (m == 0)
        return KPHI_OK;
    w->iter++;
    int use_eos = w->use_eos && !w->frozen;
    if (use_eos && !w->have_J) {
        int rc = kphi_eos_eval(w->eos, w->T, w->P, w->y, w->lnphi, w->J, NULL, w->ew, err);
        if (rc != KPHI_OK)
            return rc;
        w->have_J = 1;
    }
    /* the step is computed in a local basis R = T nueff (rebase()), or in nueff itself */
    int local = rebase(w) == 0;
    const double *R = local ? w->rows : w->nueff;
    const double *Rsum = local ? w->rsum : w->nusum;
    const double *g = local ? w->gl : w->grad;
    for (size_t k = 0; k < m; k++)
        w->step[k] = -g[k];
    hessian(w, R, Rsum, use_eos);
    if (solve_scaled(w, m, w->step, w->step) != 0) {
        /* EOS term made H indefinite (or it was singular): ideal Hessian alone */
        for (size_t k = 0; k < m; k++)
            w->step[k] = -g[k];
        hessian(w, R, Rsum, 0);
        if (solve_scaled(w, m, w->step, w->step) != 0) {
            /* round-off took the ideal Hessian's definiteness: use its factor form */
            for (size_t k = 0; k < m; k++)
                w->step[k] = -g[k];
            if (solve_ideal_qr(w, m, R, Rsum, w->step, w->step) != 0)
                return kphi_error_set(err, KPHI_EFAILED, NULL, none,
                                      "Newton step failed: the Hessian is singular");
        }
    }
    double slope = 0.0;
    for (size_t k = 0; k < m; k++)
        slope += g[k] * w->step[k];
    if (!(slope < 0.0)) {
        /* not a descent direction (round-off at convergence): nothing to gain */
        return KPHI_OK;
    }
    /* amounts change dn = nueff^T step (only on the support: held species stay at zero,
     * inert ones at their feed); stay a fraction `boundary` inside n > 0 */
    double amax = 1.0;
    for (size_t p = 0; p < w->nsup; p++) {
        size_t i = w->sup[p];
        double d = 0.0;
        for (size_t k = 0; k < m; k++)
            d += R[k * s + i] * w->step[k];
        w->dn[i] = d;
        if (d < 0.0 && w->n[i] > 0.0) {
            double a = opt->boundary * w->n[i] / -d;
            if (a < amax)
                amax = a;
        }
    }
    double alpha = amax;
    double tolG = 1e-13 * (fabs(w->G) + 1.0);
    kphi_eos_state st_try;
    memcpy(w->nt_try, w->n, s * sizeof(double));
    for (int bt = 0; bt < 60; bt++) {
        for (size_t p = 0; p < w->nsup; p++) {
            size_t i = w->sup[p];
            double v = w->n[i] + alpha * w->dn[i];
            w->nt_try[i] = v > 0.0 ? v : w->n[i] * 1e-3;
        }
        double Gt;
        kphi_error e2;
        kphi_error_clear(&e2);
        int rc = evaluate(w, w->nt_try, w->y_try, w->lnphi_try, w->mu_try, &Gt,
                          use_eos ? w->J_try : NULL, &st_try, &e2);
        if (rc == KPHI_OK && Gt <= w->G + 1e-4 * alpha * slope + tolG) {
            if (local) { /* back to the free directions: u = T^T step */
                for (size_t q = 0; q < m; q++) {
                    double u = 0.0;
                    for (size_t k = 0; k < m; k++)
                        u += w->tmat[k * m + q] * w->step[k];
                    w->gl[q] = u;
                }
            }
            const double *u = local ? w->gl : w->step;
            for (size_t k = 0; k < w->r; k++) {
                double dx = 0.0;
                for (size_t q = 0; q < m; q++)
                    dx += w->basis[k * w->r + q] * u[q];
                w->xi[k] += alpha * dx;
            }
            double mv = 0.0;
            for (size_t p = 0; p < w->nsup; p++) {
                size_t i = w->sup[p];
                if (w->n[i] > 0.0) {
                    double rel = fabs(w->nt_try[i] - w->n[i]) / w->n[i];
                    if (rel > mv)
                        mv = rel;
                }
            }
            w->moved = mv;
            swap(&w->n, &w->nt_try);
            swap(&w->y, &w->y_try);
            swap(&w->lnphi, &w->lnphi_try);
            swap(&w->mu, &w->mu_try);
            swap(&w->J, &w->J_try);
            w->G = Gt;
            w->st = st_try;
            w->have_J = use_eos;
            gradient(w, w->mu, w->grad);
            return KPHI_OK;
        }
        if (rc != KPHI_OK) {
            w->trial_err = e2;
            w->trial_err_iter = w->iter;
        }
        if (rc != KPHI_OK && bt == 59) {
            if (err != NULL && err->code == KPHI_OK)
                *err = e2;
            return rc;
        }
        alpha *= 0.5;
    }
    return kphi_error_set(err, KPHI_EFAILED, NULL, none,
                          "line search failed: no step lowers the Gibbs energy");
}

int kphi_equil_test(const kphi_equil_work *w, const kphi_equil_options *opt)
{
    if (!w->have_state)
        return 0;
    for (size_t k = 0; k < w->m; k++)
        if (!(fabs(w->grad[k]) < opt->tol_affinity))
            return 0;
    /* the written reactions that can act must also be converged */
    size_t s = w->s;
    for (size_t j = 0; j < w->r; j++) {
        double a = 0.0;
        int blocked = 0;
        for (size_t i = 0; i < s; i++) {
            double v = w->nu[j * s + i];
            if (v == 0.0)
                continue;
            if (w->held[i])
                blocked = 1;
            else
                a += v * w->mu[i];
        }
        if (!blocked && !(fabs(a) < opt->tol_affinity))
            return 0;
    }
    return 1;
}

void kphi_equil_get(const kphi_equil_work *w, kphi_equil_result *out)
{
    size_t s = w->s, r = w->r;
    kphi_equil_work *mw = (kphi_equil_work *)w; /* affinities() writes scratch only */
    affinities(mw);
    out->n_species = s;
    out->n_reactions = r;
    out->T = w->T;
    out->P = w->P;
    double nt = 0.0;
    for (size_t i = 0; i < s; i++)
        nt += w->n[i];
    out->n_total = nt;
    for (size_t i = 0; i < s; i++) {
        out->n[i] = w->n[i];
        out->y[i] = w->y[i];
        out->lnphi[i] = w->lnphi[i];
        out->held_zero[i] = w->held[i];
    }
    double amax = 0.0;
    for (size_t j = 0; j < r; j++) {
        out->xi[j] = w->xi[j];
        out->lnK[j] = w->lnK[j];
        out->K_basis[j] = w->kbasis[j];
        out->K_outside[j] = w->kout[j];
        double lkp = 0.0, lky = 0.0;
        int blocked = 0;
        for (size_t i = 0; i < s; i++) {
            double v = w->nu[j * s + i];
            if (v == 0.0)
                continue;
            lkp += v * w->lnphi[i];
            if (w->n[i] > 0.0)
                lky += v * log(w->y[i]);
            else
                blocked = 1;
        }
        out->lnKphi[j] = lkp;
        out->lnKy[j] = blocked ? NAN : lky;
        out->affinity[j] = w->aff[j];
        if (!isnan(w->aff[j]) && fabs(w->aff[j]) > amax)
            amax = fabs(w->aff[j]);
    }
    for (size_t k = 0; k < w->m; k++)
        if (fabs(w->grad[k]) > amax)
            amax = fabs(w->grad[k]);
    out->max_affinity = amax;
    out->balance_error = kphi_rxnset_balance_error(w->set, w->n0, w->n);
    out->iterations = w->iter;
    out->eos = w->st;
}

/* Leave the frozen-phi phase: evaluate the EOS (with its derivatives) at the current
 * amounts. */
static int thaw(kphi_equil_work *w, kphi_error *err)
{
    w->frozen = 0;
    int rc = evaluate(w, w->n, w->y, w->lnphi, w->mu, &w->G, w->J, &w->st, err);
    if (rc != KPHI_OK)
        return rc;
    w->have_J = 1;
    gradient(w, w->mu, w->grad);
    return KPHI_OK;
}

static double max_grad(const kphi_equil_work *w)
{
    double g = 0.0;
    for (size_t k = 0; k < w->m; k++)
        g = fmax(g, fabs(w->grad[k]));
    return g;
}

/* The iteration is pressed against the EOS's range: the model refused a trial point in
 * one of the last steps (the virial series beyond half the critical density, say), so
 * the equilibrium lies beyond what the model can describe. */
static int against_eos_limit(const kphi_equil_work *w)
{
    return w->trial_err_iter >= 0 && w->iter - w->trial_err_iter <= 10 &&
           w->trial_err.code != KPHI_OK;
}

/* The EOS's own reason, said as met on the way to equilibrium. */
static int eos_limit_error(const kphi_equil_work *w, kphi_error *err)
{
    kphi_mark none = {0, 0};
    return kphi_error_set(err, w->trial_err.code, NULL, none, "on the way to equilibrium, %.200s",
                          w->trial_err.msg);
}

/* Iterate from the state set in w until converged; fill out. When w starts frozen, the
 * frozen-phi phase runs first (see kphi_equil_solve()). */
static int run(kphi_equil_work *w, const kphi_equil_options *opt, kphi_equil_result *out,
               kphi_error *err)
{
    kphi_mark none = {0, 0};
    if (w->frozen) {
        while (w->iter < opt->max_iter && max_grad(w) > FROZEN_SWITCH) {
            kphi_error e2;
            kphi_error_clear(&e2);
            double G = w->G;
            if (kphi_equil_iterate(w, opt, &e2) != KPHI_OK || !(w->G < G))
                break; /* no progress: the full problem takes over from here */
        }
        int rc = thaw(w, err);
        if (rc != KPHI_OK) {
            kphi_equil_get(w, out);
            return rc;
        }
    }
    int stalled = 0;
    while (!kphi_equil_test(w, opt)) {
        if (w->iter >= opt->max_iter) {
            kphi_equil_get(w, out);
            if (against_eos_limit(w))
                return eos_limit_error(w, err);
            return kphi_error_set(err, KPHI_EFAILED, NULL, none,
                                  "no convergence after %d Newton steps (largest affinity "
                                  "%.3g, tolerance %.3g)",
                                  w->iter, out->max_affinity, opt->tol_affinity);
        }
        double before = max_grad(w), G0 = w->G;
        int rc = kphi_equil_iterate(w, opt, err);
        if (rc != KPHI_OK) {
            kphi_equil_get(w, out);
            return rc;
        }
        double after = max_grad(w);
        /* stalled: neither the affinities, nor G, nor any amount move any more. A trace
         * species stepping towards its far-away equilibrium amount, a factor
         * 1/(1 - boundary) at a time, keeps the largest affinity up for a while and
         * changes G by less than its round-off: that is still progress. */
        int progress = after < before || G0 - w->G > 1e-12 * (fabs(G0) + 1.0) ||
                       w->moved > 1e-6;
        stalled = progress ? 0 : stalled + 1;
        if (stalled > 8) {
            kphi_equil_get(w, out);
            if (against_eos_limit(w))
                return eos_limit_error(w, err);
            return kphi_error_set(err, KPHI_EFAILED, NULL, none,
                                  "Newton iteration stalled at largest affinity %.3g "
                                  "(tolerance %.3g)",
                                  after, opt->tol_affinity);
        }
    }
    /* Newton converges quadratically: one more step from just inside the tolerance costs
     * one EOS evaluation and takes the answer to round-off, so that it no longer depends
     * on the path (cold or warm start, thread count). Kept only if it is no worse. */
    double last = max_grad(w);
    if (last > 1e-3 * opt->tol_affinity && w->iter < opt->max_iter) {
        kphi_error e3;
        kphi_error_clear(&e3);
        (void)kphi_equil_iterate(w, opt, &e3); /* a refused step leaves the state as is */
    }
    kphi_equil_get(w, out);
    return KPHI_OK;
}

int kphi_equil_solve(const kphi_rxnset *set, const kphi_eos *eos, double T, double P,
                     const double n0[], const double xi_guess[], const kphi_equil_options *opt,
                     kphi_equil_work *w, kphi_equil_result *out, kphi_error *err)
{
    kphi_equil_options def = kphi_equil_options_default();
    if (opt == NULL)
        opt = &def;
    int rc = equil_set(w, set, eos, T, P, n0, xi_guess, opt, 1, err);
    if (rc != KPHI_OK)
        return rc;
    if (!w->frozen)
        return run(w, opt, out, err);
    kphi_error e1;
    kphi_error_clear(&e1);
    if (run(w, opt, out, &e1) == KPHI_OK)
        return KPHI_OK;
    /* whatever went wrong after the frozen phase, the plain Newton iteration from the
     * cold start decides (and reports) */
    rc = equil_set(w, set, eos, T, P, n0, xi_guess, opt, 0, err);
    if (rc != KPHI_OK)
        return rc;
    return run(w, opt, out, err);
}
