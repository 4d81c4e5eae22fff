/* kphi phase: chemical equilibrium when the gas condenses.
 *
 * After the gas-phase equilibrium (kphi_equil_solve()), the stability test (src/phase.c)
 * runs on the equilibrium gas. When it is unstable, the total Gibbs energy of vapour and
 * liquid
 *   G/RT = sum_i v_i (g_i + ln y_i + ln phi_i^V) + l_i (g_i + ln x_i + ln phi_i^L),
 *   g_i = mu_i°/RT + ln(P/P°),  n = n0 + nu^T xi,  l = n - v,
 * is minimised over the reaction extents and the vapour amounts v (Smith & Missen 1982,
 * "Chemical Reaction Equilibrium Analysis", ch. 6 and 9, for the formulation; Michelsen &
 * Mollerup 2007, ch. 11, for the phase part). The unknowns are the coordinates eta of the
 * extent in the free directions N (xi = xi_gas + N eta; N spans the null space of the
 * reactions' columns of the species the feed cannot form, which stay at zero) and v on
 * the species present. Gradient and Hessian (H^V = (delta_ij/y_i - 1 + J^V_ij)/V, H^L the
 * same for the liquid, J = n_t d ln phi/d n, e = N^T nu):
 *   dG/dv_i = ln(y_i phi_i^V) - ln(x_i phi_i^L),   dG/deta_k = sum_i e_ki mu_i^L,
 *   d2G/dv dv = H^V + H^L,   d2G/dv deta = -H^L e^T,   d2G/deta deta = e H^L e^T.
 * Newton steps with this Hessian (Cholesky of the scaled matrix, shifted when not positive
 * definite), truncated to keep every v_i > 0 and l_i > 0 and backtracked on G (Armijo).
 * Converged when every affinity and every ln(f_i^V/f_i^L) is below the tolerances of the
 * gas solve and the flash. A phase that shrinks below 1e-12 of the whole is dropped and
 * the rest solved as one phase (the root of lower Gibbs energy), then tested again.
 *
 * The g_i need only be consistent with the reactions' ln K: any g with nu g = -ln K gives
 * the same G up to a constant on the reaction manifold, so g is taken as the least-norm
 * solution nu^T (nu nu^T)^-1 (-ln K) plus ln(P/P°); this way the K that the gas solve
 * used (whatever its basis) is the K of the two-phase answer. */
#include "kphi/phase.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_errno.h>
#include <gsl/gsl_linalg.h>

#include "phase_internal.h"

static const kphi_mark no_mark = {0, 0};

#define P_STD 1e5 /* P°, Pa */

typedef struct {
    const kphi_rxnset *set;
    const kphi_eos *eos;
    double T, P;
    size_t s, r, m;   /* species, reactions, free directions */
    int two;          /* 1: vapour and liquid; 0: one phase */
    const double *n0;
    const double *xi0; /* extents of the gas answer */
} rx;

/* Free directions: the null space of the columns of nu for held species, by SVD.
 * Writes w->basis (columns 0..m-1), w->nueff (rows 0..m-1) and returns m. */
static size_t free_directions(const rx *p, const int held[], kphi_phase_work *w)
{
    size_t r = p->r, s = p->s;
    const double *nu = w->nu;
    size_t nh = 0;
    for (size_t i = 0; i < s; i++)
        nh += held[i] != 0;
    size_t m = r;
    if (nh == 0) {
        for (size_t a = 0; a < r; a++)
            for (size_t b = 0; b < r; b++)
                w->basis[a * r + b] = a == b;
    } else {
        size_t rows = nh > r ? nh : r;
        /* svd_a holds the rows x r matrix A[k][j] = nu[j][held_k], zero-padded */
        double *A = w->svd_a;
        for (size_t k = 0; k < rows * r; k++)
            A[k] = 0.0;
        size_t k = 0;
        for (size_t i = 0; i < s; i++) {
            if (!held[i])
                continue;
            for (size_t j = 0; j < r; j++)
                A[k * r + j] = nu[j * s + i];
            k++;
        }
        gsl_matrix_view Am = gsl_matrix_view_array(A, rows, r);
        gsl_matrix_view Vm = gsl_matrix_view_array(w->svd_v, r, r);
        gsl_vector_view Sv = gsl_vector_view_array(w->svd_s, r);
        gsl_vector_view Wv = gsl_vector_view_array(w->svd_w, r);
        gsl_linalg_SV_decomp(&Am.matrix, &Vm.matrix, &Sv.vector, &Wv.vector);
        double smax = w->svd_s[0] > 0.0 ? w->svd_s[0] : 1.0;
        m = 0;
        for (size_t j = 0; j < r; j++) {
            if (w->svd_s[j] > 1e-10 * smax)
                continue;
            for (size_t a = 0; a < r; a++)
                w->basis[a * r + m] = w->svd_v[a * r + j];
            m++;
        }
    }
    for (size_t k = 0; k < m; k++) {
        for (size_t i = 0; i < s; i++) {
            double e = 0.0;
            for (size_t j = 0; j < r; j++)
                e += w->basis[j * r + k] * nu[j * s + i];
            w->nueff[k * s + i] = fabs(e) < 1e-14 ? 0.0 : e;
        }
    }
    return m;
}

/* g_i: least-norm solution of nu g = -ln K, plus ln(P/P°). */
static int standard_potentials(const rx *p, const double lnK[], kphi_phase_work *w)
{
    size_t r = p->r, s = p->s;
    const double *nu = w->nu;
    double lnp = log(p->P / P_STD);
    for (size_t i = 0; i < s; i++)
        w->g0[i] = lnp;
    if (r == 0)
        return KPHI_OK;
    double *M = w->svd_v; /* r x r: nu nu^T */
    for (size_t a = 0; a < r; a++)
        for (size_t b = 0; b < r; b++) {
            double v = 0.0;
            for (size_t i = 0; i < s; i++)
                v += nu[a * s + i] * nu[b * s + i];
            M[a * r + b] = v;
        }
    for (size_t a = 0; a < r; a++)
        w->svd_w[a] = -lnK[a];
    gsl_matrix_view Mm = gsl_matrix_view_array(M, r, r);
    gsl_vector_view bv = gsl_vector_view_array(w->svd_w, r);
    gsl_vector_view xv = gsl_vector_view_array(w->svd_s, r);
    if (gsl_linalg_cholesky_decomp1(&Mm.matrix) != GSL_SUCCESS ||
        gsl_linalg_cholesky_solve(&Mm.matrix, &bv.vector, &xv.vector) != GSL_SUCCESS)
        return KPHI_EFAILED;
    for (size_t i = 0; i < s; i++) {
        double v = 0.0;
        for (size_t a = 0; a < r; a++)
            v += nu[a * s + i] * w->svd_s[a];
        w->g0[i] += v;
    }
    return KPHI_OK;
}

/* G/RT of the state (v, l) and the phases' ln phi (w->lnphiV, w->lnphiL), J when
 * want_J; the phases' mole fractions in w->y, w->x. One phase: l holds everything and is
 * evaluated into w->lnphiL/w->x (and JL); v is not read. */
static int gibbs(const rx *p, const double v[], const double l[], int want_J,
                 kphi_phase_work *w, double *G, kphi_eos_state *stV, kphi_eos_state *stL,
                 kphi_error *err)
{
    size_t s = p->s;
    double V = 0.0, L = 0.0;
    for (size_t i = 0; i < s; i++) {
        V += p->two ? v[i] : 0.0;
        L += l[i];
    }
    for (size_t i = 0; i < s; i++) {
        w->y[i] = p->two && V > 0.0 ? v[i] / V : 0.0;
        w->x[i] = l[i] / L;
    }
    int rc = KPHI_OK;
    if (p->two)
        rc = kphi__phase_eval(p->eos, p->T, p->P, w->y, w->lnphiV, want_J ? w->JV : NULL, stV,
                              w, err);
    if (rc == KPHI_OK)
        rc = kphi__phase_eval(p->eos, p->T, p->P, w->x, w->lnphiL, want_J ? w->JL : NULL, stL,
                              w, err);
    if (rc != KPHI_OK)
        return rc;
    double g = 0.0;
    for (size_t i = 0; i < s; i++) {
        if (p->two && v[i] > 0.0)
            g += v[i] * (w->g0[i] + log(w->y[i]) + w->lnphiV[i]);
        if (l[i] > 0.0)
            g += l[i] * (w->g0[i] + log(w->x[i]) + w->lnphiL[i]);
    }
    *G = g;
    return KPHI_OK;
}

/* v and l from the totals n and the split variables rho: v_i = n_i s_i, l_i = n_i (1 - s_i),
 * s_i = 1/(1 + exp(-rho_i)) (one phase: l = n). */
static void split_of(const rx *p, const double n[], const double rho[], double v[], double l[])
{
    for (size_t i = 0; i < p->s; i++) {
        if (!p->two) {
            v[i] = 0.0;
            l[i] = n[i];
            continue;
        }
        double r = rho[i];
        /* s and 1 - s each computed without cancellation */
        double e = exp(-fabs(r));
        double big = 1.0 / (1.0 + e), small = e / (1.0 + e);
        double s = r >= 0.0 ? big : small, c = r >= 0.0 ? small : big;
        v[i] = n[i] * s;
        l[i] = n[i] * c;
    }
}

/* The largest |mu_i^V - mu_i^L| and |affinity| of the state whose phase data gibbs() left
 * in w (totals n, amounts v, l). */
static double residual_of(const rx *p, const double n[], const double v[], const double l[],
                          const kphi_phase_work *w)
{
    size_t s = p->s;
    double r = 0.0;
    for (size_t i = 0; i < s && p->two; i++)
        if (n[i] > 0.0)
            r = fmax(r, fabs(log(w->y[i]) + w->lnphiV[i] - log(w->x[i]) - w->lnphiL[i]));
    for (size_t k = 0; k < p->m; k++) {
        double gk = 0.0;
        for (size_t i = 0; i < s; i++) {
            if (!(n[i] > 0.0))
                continue;
            double mu = w->g0[i] + log(w->x[i]) + w->lnphiL[i];
            if (p->two)
                mu = (v[i] * (w->g0[i] + log(w->y[i]) + w->lnphiV[i]) + l[i] * mu) / n[i];
            gk += w->nueff[k * s + i] * mu;
        }
        r = fmax(r, fabs(gk));
    }
    return r;
}

/* Newton iteration from the state (w->eta, w->ntot, w->rho). The unknowns are eta (the
 * extents in the free directions) and, with two phases, rho_i = ln(v_i / l_i) for each
 * species present: v_i = n_i s_i, l_i = n_i (1 - s_i), s_i the logistic function of rho_i.
 * A reaction moves both phases of a species in proportion, so a trace species (1e-15 of
 * the whole) does not couple its split and the extents through its 1/n_i terms, which in
 * amount variables makes the Newton matrix singular in round-off; and both amounts stay
 * positive for any rho. With J_v = d v/d(rho, eta), J_l = d l/d(rho, eta),
 *   g_rho_i = (v_i l_i / n_i)(mu_i^V - mu_i^L),   g_eta_k = sum_i e_ki (s_i mu_i^V +
 *   (1 - s_i) mu_i^L),   H = J_v^T H^V J_v + J_l^T H^L J_l,
 * H^V = (delta_ij/y_i - 1 + J^V_ij)/V and H^L likewise; the second derivatives of the map
 * (rho, eta) -> (v, l) multiply mu^V - mu^L and vanish at the answer, so they are left out
 * (the steps are still backtracked on G). Returns KPHI_OK when converged, KPHI__PHASE_ONE
 * when a phase vanished. */
static int newton(rx *p, const kphi_equil_options *eo, const kphi_phase_options *po,
                  kphi_phase_work *w, int *iters, double *resid, kphi_eos_state *stV,
                  kphi_eos_state *stL, kphi_error *err)
{
    size_t s = p->s, m = p->m;
    size_t *act = w->act;
    size_t na = 0;
    for (size_t i = 0; i < s; i++)
        if (w->ntot[i] > 0.0)
            act[na++] = i;
    size_t nv = p->two ? na : 0;
    size_t dim = m + nv;
    double G;
    split_of(p, w->ntot, w->rho, w->v, w->l);
    int rc = gibbs(p, w->v, w->l, 1, w, &G, stV, stL, err);
    if (rc != KPHI_OK)
        return rc;
    for (int it = 0; it < eo->max_iter; it++) {
        double V = 0.0, L = 0.0;
        for (size_t a = 0; a < na; a++) {
            size_t i = act[a];
            V += p->two ? w->v[i] : 0.0;
            L += w->l[i];
        }
        double nt = V + L;
        if (p->two && (V < 1e-12 * nt || L < 1e-12 * nt))
            return KPHI__PHASE_ONE;
        /* gradient */
        double rv = 0.0, ra = 0.0;
        for (size_t a = 0; a < nv; a++) {
            size_t i = act[a];
            double d = log(w->y[i]) + w->lnphiV[i] - log(w->x[i]) - w->lnphiL[i];
            w->g[a] = w->v[i] * w->l[i] / w->ntot[i] * d;
            if (fabs(d) > rv)
                rv = fabs(d);
        }
        for (size_t k = 0; k < m; k++) {
            double gk = 0.0;
            for (size_t a = 0; a < na; a++) {
                size_t i = act[a];
                double muL = w->g0[i] + log(w->x[i]) + w->lnphiL[i];
                double mu = muL;
                if (p->two) {
                    double muV = w->g0[i] + log(w->y[i]) + w->lnphiV[i];
                    mu = (w->v[i] * muV + w->l[i] * muL) / w->ntot[i];
                }
                gk += w->nueff[k * s + i] * mu;
            }
            w->g[nv + k] = gk;
            if (fabs(gk) > ra)
                ra = fabs(gk);
        }
        *resid = rv > ra ? rv : ra;
        *iters = it;
        if (rv < po->tol && ra < eo->tol_affinity)
            return KPHI_OK;
        /* J_v, J_l (na x dim): columns 0..nv-1 the rho_a, nv.. the eta_k */
        double *Jv = w->JVt, *Jl = w->JLt;
        for (size_t q = 0; q < na * dim; q++)
            Jv[q] = Jl[q] = 0.0;
        for (size_t a = 0; a < na; a++) {
            size_t i = act[a];
            double si = p->two ? w->v[i] / w->ntot[i] : 0.0;
            if (a < nv) {
                double d = w->v[i] * w->l[i] / w->ntot[i];
                Jv[a * dim + a] = d;
                Jl[a * dim + a] = -d;
            }
            for (size_t k = 0; k < m; k++) {
                double e = w->nueff[k * s + i];
                Jv[a * dim + nv + k] = si * e;
                Jl[a * dim + nv + k] = (1.0 - si) * e;
            }
        }
        /* H = J_v^T H^V J_v + J_l^T H^L J_l, through M = H^phase J (na x dim) */
        double *H = w->H, *M = w->HJ;
        for (size_t q = 0; q < dim * dim; q++)
            H[q] = 0.0;
        for (int ph = p->two ? 0 : 1; ph < 2; ph++) {
            const double *J = ph == 0 ? Jv : Jl;
            const double *Jm = ph == 0 ? w->JV : w->JL;
            const double *c = ph == 0 ? w->y : w->x;
            double amt = ph == 0 ? V : L;
            for (size_t a = 0; a < na; a++) {
                size_t i = act[a];
                for (size_t col = 0; col < dim; col++) {
                    double v = 0.0;
                    for (size_t b = 0; b < na; b++) {
                        double Jb = J[b * dim + col];
                        if (Jb == 0.0)
                            continue;
                        size_t j = act[b];
                        double h = (Jm[i * s + j] - 1.0 + (i == j ? 1.0 / c[i] : 0.0)) / amt;
                        v += h * Jb;
                    }
                    M[a * dim + col] = v;
                }
            }
            for (size_t r1 = 0; r1 < dim; r1++)
                for (size_t c1 = r1; c1 < dim; c1++) {
                    double v = 0.0;
                    for (size_t a = 0; a < na; a++)
                        v += J[a * dim + r1] * M[a * dim + c1];
                    H[r1 * dim + c1] += v;
                    if (c1 != r1)
                        H[c1 * dim + r1] += v;
                }
        }
        if (kphi__phase_newton_solve(H, w->g, w->step, w->sc, dim) != KPHI_OK)
            return kphi_error_set(err, KPHI_EFAILED, NULL, no_mark,
                                  "chemical and phase equilibrium at T = %.2f K, P = %.4g bar: "
                                  "singular Newton matrix",
                                  p->T, p->P / 1e5);
        /* the step: n_i + t dn_i > 0 (at most `boundary` of the way), |t drho| <= 10 */
        double t = 1.0;
        for (size_t a = 0; a < na; a++) {
            size_t i = act[a];
            double dn = 0.0;
            for (size_t k = 0; k < m; k++)
                dn += w->nueff[k * s + i] * w->step[nv + k];
            w->dvs[i] = dn;
            if (dn < 0.0 && w->ntot[i] + t * dn <= 0.0)
                t = eo->boundary * w->ntot[i] / -dn;
            if (a < nv && fabs(t * w->step[a]) > 10.0)
                t = 10.0 / fabs(w->step[a]);
        }
        double slope = 0.0;
        for (size_t q = 0; q < dim; q++)
            slope += w->g[q] * w->step[q];
        int accepted = 0;
        double Gt = G;
        /* near the answer the decrease of G a step promises (-slope) lies below G's
         * round-off: then the full step is taken when it lowers the residual */
        int tiny = -slope < 1e-12 * (fabs(G) + 1.0);
        for (int ls = 0; ls < 50; ls++) {
            int ok = 1;
            for (size_t i = 0; i < s; i++) {
                w->ntot_t[i] = w->ntot[i];
                w->rho_t[i] = w->rho[i];
            }
            for (size_t a = 0; a < na; a++) {
                size_t i = act[a];
                w->ntot_t[i] = w->ntot[i] + t * w->dvs[i];
                if (a < nv)
                    w->rho_t[i] = w->rho[i] + t * w->step[a];
                if (!(w->ntot_t[i] > 0.0))
                    ok = 0;
            }
            if (ok) {
                split_of(p, w->ntot_t, w->rho_t, w->vt, w->lt);
                rc = gibbs(p, w->vt, w->lt, 1, w, &Gt, stV, stL, err);
                if (rc != KPHI_OK)
                    return rc;
                if (tiny ? residual_of(p, w->ntot_t, w->vt, w->lt, w) < *resid
                         : Gt <= G + 1e-4 * t * slope) {
                    accepted = 1;
                    break;
                }
            }
            t *= 0.5;
        }
        if (!accepted) {
            split_of(p, w->ntot, w->rho, w->v, w->l);
            (void)gibbs(p, w->v, w->l, 1, w, &G, stV, stL, err);
            if (*resid < 1e3 * po->tol && *resid < 1e3 * eo->tol_affinity)
                return KPHI_OK; /* round-off floor just above the tolerance */
            return kphi_error_set(err, KPHI_EFAILED, NULL, no_mark,
                                  "chemical and phase equilibrium at T = %.2f K, P = %.4g bar: "
                                  "no descent step (residual %.2g)",
                                  p->T, p->P / 1e5, *resid);
        }
        for (size_t k = 0; k < m; k++)
            w->eta[k] += t * w->step[nv + k];
        memcpy(w->ntot, w->ntot_t, s * sizeof(double));
        memcpy(w->rho, w->rho_t, s * sizeof(double));
        memcpy(w->v, w->vt, s * sizeof(double));
        memcpy(w->l, w->lt, s * sizeof(double));
        G = Gt;
    }
    return kphi_error_set(err, KPHI_EFAILED, NULL, no_mark,
                          "chemical and phase equilibrium at T = %.2f K, P = %.4g bar did not "
                          "converge in %d iterations (residual %.2g)",
                          p->T, p->P / 1e5, eo->max_iter, *resid);
}

/* The answer from the state in w (phase data current from the last gibbs() call). */
static void fill(const rx *p, kphi_phase_work *w, const kphi_eos_state *stV,
                 const kphi_eos_state *stL, int iters, double resid, kphi_equil_result *out,
                 kphi_flash_result *ph)
{
    size_t s = p->s, r = p->r;
    double nt = 0.0, V = 0.0;
    for (size_t i = 0; i < s; i++) {
        nt += w->ntot[i];
        V += p->two ? w->v[i] : 0.0;
    }
    /* the phase whose y, phi the reactions report: the vapour when there is one */
    const double *yr = p->two ? w->y : w->x;
    const double *lr = p->two ? w->lnphiV : w->lnphiL;
    const kphi_eos_state *sr = p->two ? stV : stL;
    out->T = p->T;
    out->P = p->P;
    out->n_total = nt;
    for (size_t i = 0; i < s; i++) {
        out->n[i] = w->ntot[i];
        out->y[i] = w->ntot[i] / nt;
        out->lnphi[i] = lr[i];
    }
    double lnp = log(p->P / P_STD), amax = 0.0;
    for (size_t j = 0; j < r; j++) {
        double xi = p->xi0[j];
        for (size_t k = 0; k < p->m; k++)
            xi += w->basis[j * r + k] * w->eta[k];
        out->xi[j] = xi;
        double lkp = 0.0, lky = 0.0, dnu = 0.0;
        int blocked = 0;
        for (size_t i = 0; i < s; i++) {
            double v = w->nu[j * s + i];
            if (v == 0.0)
                continue;
            lkp += v * lr[i];
            dnu += v;
            if (yr[i] > 0.0)
                lky += v * log(yr[i]);
            else
                blocked = 1;
        }
        out->lnKphi[j] = lkp;
        out->lnKy[j] = blocked ? NAN : lky;
        double a = blocked ? NAN : -out->lnK[j] + lky + lkp + dnu * lnp;
        out->affinity[j] = a;
        if (!isnan(a) && fabs(a) > amax)
            amax = fabs(a);
    }
    out->max_affinity = amax > resid ? amax : resid;
    out->balance_error = kphi_rxnset_balance_error(p->set, p->n0, w->ntot);
    out->iterations += iters;
    out->eos = *sr;

    ph->T = p->T;
    ph->P = p->P;
    ph->iterations = iters;
    ph->residual = p->two ? resid : 0.0;
    if (!p->two) {
        kphi__phase_one(ph, s, p->T, p->P, w->x, w->lnphiL, stL);
        ph->iterations = iters;
        return;
    }
    int swap = stV->v < stL->v;
    double beta = V / nt;
    const double *c[2] = {swap ? w->x : w->y, swap ? w->y : w->x};
    const double *l[2] = {swap ? w->lnphiL : w->lnphiV, swap ? w->lnphiV : w->lnphiL};
    const kphi_eos_state *st[2] = {swap ? stL : stV, swap ? stV : stL};
    double fr[2] = {swap ? 1.0 - beta : beta, swap ? beta : 1.0 - beta};
    ph->n_phases = 2;
    for (int k = 0; k < 2; k++)
        kphi__phase_fill(&ph->phase[k], s, c[k], l[k], st[k], fr[k]);
    double bal = 0.0;
    for (size_t i = 0; i < s; i++) {
        ph->K[i] = c[1][i] > 0.0 ? c[0][i] / c[1][i] : exp(l[1][i] - l[0][i]);
        double e = fabs(fr[0] * c[0][i] + fr[1] * c[1][i] - w->ntot[i] / nt);
        if (e > bal)
            bal = e;
    }
    ph->balance_error = bal;
}

/* The start of the two-phase iteration from a flash of n (total nt): rho_i = ln(v_i/l_i)
 * of the flash's split (the totals stay those of the gas answer, so its element balance is
 * kept). */
static void split_start(size_t s, const double n[], const kphi_flash_result *ph, double nt,
                        double rho[])
{
    for (size_t i = 0; i < s; i++) {
        double vi = ph->phase[0].fraction * ph->phase[0].y[i] * nt;
        double li = ph->phase[1].fraction * ph->phase[1].y[i] * nt;
        if (!(n[i] > 0.0))
            vi = li = 1.0;
        if (!(vi > 1e-12 * n[i]))
            vi = 1e-12 * n[i]; /* a trace the flash left out of a phase */
        if (!(li > 1e-12 * n[i]))
            li = 1e-12 * n[i];
        rho[i] = log(vi / li);
    }
}

int kphi_phase_gas_unstable(const kphi_flash_result *phases, const kphi_phase_options *opt)
{
    kphi_phase_options d = kphi_phase_options_default();
    if (opt == NULL)
        opt = &d;
    return phases != NULL && phases->n_phases == 1 && phases->tm_min < -opt->tol_tm;
}

int kphi_phase_equil_solve(const kphi_rxnset *set, const kphi_eos *eos, double T, double P,
                           const double n0[], const double xi_guess[], int gas_only,
                           const kphi_equil_options *eq_opt, const kphi_phase_options *ph_opt,
                           kphi_equil_work *ew, kphi_phase_work *pw, kphi_equil_result *out,
                           kphi_flash_result *phases, kphi_error *err)
{
    kphi_equil_options edf = kphi_equil_options_default();
    kphi_phase_options pdf = kphi_phase_options_default();
    if (eq_opt == NULL)
        eq_opt = &edf;
    if (ph_opt == NULL)
        ph_opt = &pdf;
    size_t s = kphi_rxnset_n_species(set), r = kphi_rxnset_n_reactions(set);
    if (!kphi_phase_model_ok(kphi_eos_get_model(eos)))
        return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark,
                              "two phases need a cubic equation of state (rk, srk or pr); "
                              "'%s' has no liquid root",
                              kphi_eos_model_name(kphi_eos_get_model(eos)));
    if (pw == NULL || pw->n != s || pw->r < r || phases == NULL || phases->n != s)
        return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark,
                              "phase workspace or result does not match the reaction set "
                              "(%zu species, %zu reactions)",
                              s, r);
    int rc = kphi_equil_solve(set, eos, T, P, n0, xi_guess, eq_opt, ew, out, err);
    if (rc != KPHI_OK)
        return rc;
    /* stability of the equilibrium gas */
    int stable = 1;
    double tm_min = 0.0;
    rc = kphi_phase_stability(eos, T, P, out->n, ph_opt, pw, &stable, NULL, &tm_min, err);
    if (rc != KPHI_OK)
        return rc;
    int feed_liquid = 0;
    rc = kphi__phase_feed(eos, T, P, out->n, pw, &feed_liquid, err);
    if (rc != KPHI_OK)
        return rc;
    if (gas_only) {
        /* the gas answer as it is: its own (largest) root */
        kphi_eos_state st;
        rc = kphi_eos_eval_root(eos, KPHI_EOS_ROOT_GAS, T, P, pw->z, pw->lnphi, NULL, &st, pw->ew,
                                err);
        if (rc != KPHI_OK)
            return rc;
        kphi__phase_one(phases, s, T, P, pw->z, pw->lnphi, &st);
        phases->iterations = 0;
        phases->tm_min = stable ? (tm_min < 0.0 ? 0.0 : tm_min) : tm_min;
        return KPHI_OK;
    }
    if (stable && !out->eos.may_condense) {
        rc = kphi__phase_single(eos, T, P, pw, phases, err);
        phases->tm_min = tm_min;
        return rc;
    }

    /* the problem */
    rx p = {set, eos, T, P, s, r, 0, 0, n0, NULL};
    const double *nu = kphi_rxnset_nu_matrix(set);
    memcpy(pw->nu, nu, r * s * sizeof(double));
    double *xi_gas = pw->xi0;
    double *ngas = pw->ngas;
    memcpy(xi_gas, out->xi, r * sizeof(double));
    memcpy(ngas, out->n, s * sizeof(double));
    p.xi0 = xi_gas;
    p.m = free_directions(&p, out->held_zero, pw);
    if (standard_potentials(&p, out->lnK, pw) != KPHI_OK)
        return kphi_error_set(err, KPHI_EFAILED, NULL, no_mark,
                              "reactions are dependent: nu nu^T is singular");
    for (size_t k = 0; k < r; k++)
        pw->eta[k] = 0.0;

    /* the start: a flash of the gas answer (or one liquid phase when it is stable) */
    kphi_eos_state stV, stL;
    int iters = 0, gas_iters = out->iterations;
    double resid = 0.0;
    out->iterations = gas_iters;
    if (!stable) {
        rc = kphi_phase_flash(eos, T, P, ngas, ph_opt, pw, phases, err);
        if (rc != KPHI_OK)
            return rc;
        p.two = phases->n_phases == 2;
    }
    /* the state: the totals and the splits */
    memcpy(pw->ntot, ngas, s * sizeof(double));
    if (p.two) {
        double nt = 0.0;
        for (size_t i = 0; i < s; i++)
            nt += ngas[i];
        split_start(s, ngas, phases, nt, pw->rho);
    }
    for (int attempt = 0; attempt < 4; attempt++) {
        rc = newton(&p, eq_opt, ph_opt, pw, &iters, &resid, &stV, &stL, err);
        if (rc == KPHI__PHASE_ONE) {
            /* keep the phase that holds nearly everything, as one phase */
            p.two = 0;
            continue;
        }
        if (rc != KPHI_OK)
            return rc;
        out->iterations = gas_iters;
        fill(&p, pw, &stV, &stL, iters, resid, out, phases);
        if (p.two) {
            /* a third phase below the common tangent plane: the split is not the answer */
            double tm3 = 0.0;
            rc = kphi__phase_third_phase(eos, T, P, phases->phase[0].y, ph_opt, pw, &tm3, err);
            if (rc != KPHI_OK)
                return rc;
            if (tm3 < -ph_opt->tol_tm)
                return kphi_error_set(err, KPHI_EFAILED, NULL, no_mark,
                                      "chemical and phase equilibrium at T = %.2f K, P = %.4g "
                                      "bar: a third phase forms (below the tangent plane of the "
                                      "two-phase answer by %.3g); kphi finds at most two phases",
                                      T, P / 1e5, -tm3);
            break;
        }
        /* one phase: is it stable? */
        rc = kphi_phase_stability(eos, T, P, pw->ntot, ph_opt, pw, &stable, NULL, &tm_min, err);
        if (rc != KPHI_OK)
            return rc;
        if (stable)
            break;
        memcpy(ngas, pw->ntot, s * sizeof(double));
        for (size_t k = 0; k < r; k++)
            xi_gas[k] = out->xi[k];
        p.xi0 = xi_gas;
        for (size_t k = 0; k < r; k++)
            pw->eta[k] = 0.0;
        rc = kphi_phase_flash(eos, T, P, ngas, ph_opt, pw, phases, err);
        if (rc != KPHI_OK)
            return rc;
        if (phases->n_phases != 2)
            break;
        double nt = 0.0;
        for (size_t i = 0; i < s; i++)
            nt += ngas[i];
        memcpy(pw->ntot, ngas, s * sizeof(double));
        split_start(s, ngas, phases, nt, pw->rho);
        p.two = 1;
    }
    phases->tm_min = tm_min;
    return KPHI_OK;
}
