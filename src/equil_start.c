/* kphi equil, the feasible start: which species the feed cannot form, the directions in
 * which the extents are free, and a strictly interior starting point for the minimiser in
 * src/equil.c.
 *
 * With n = n0 + nu^T xi (mol), a species i in some reaction with n0_i = 0 can be formed
 * only if some direction d gives (nu^T d)_i > 0 while every other such species stays
 * >= 0. Species that no feasible direction can form (for example CO2 and H2O when a
 * methanol set is fed only CO and H2) would make the feasible set flat. They are found
 * exactly from the sign pattern of the feed and the stoichiometry, not by thresholds: a
 * small linear programme
 *   maximise sum_{i held} (nu^T d)_i  subject to (nu^T d)_i >= 0 (i held), |d|_1 <= 1,
 * with d = p - q, p, q >= 0, solved by the Dantzig simplex with Bland's rule (Bland 1977,
 * Math. Oper. Res. 2, 103), releases at least one species per solve; those left are held
 * at zero. The free directions are an orthonormal basis of the null space of the held
 * rows of nu^T, from its singular value decomposition (Golub & Van Loan 2013, "Matrix
 * Computations", 4th ed., sec. 2.4), so the minimiser works in the relative interior.
 * The starting point goes half way along a ray of the directions found to the first
 * species that would run out. Amounts in mol, extents in mol; directions dimensionless.
 *
 * Everything here depends only on the reaction set and the zero pattern of the feed, so a
 * sweep computes the LP and the basis once (kept in the workspace). No allocation. */
#include "equil_internal.h"

#include <math.h>
#include <string.h>

#include <gsl/gsl_errno.h>
#include <gsl/gsl_linalg.h>
#include <gsl/gsl_matrix.h>
#include <gsl/gsl_vector.h>

/* Maximise c.x subject to A x <= b (b >= 0), x >= 0, for a tableau already laid out in
 * w->tab with `rows` constraint rows and `cols` columns (variables + slacks + rhs). The
 * objective row is row `rows` holding -c. Dantzig simplex with Bland's rule (Bland 1977),
 * which cannot cycle. Returns 0 at the optimum, -1 if unbounded (cannot happen for the
 * normalised problem below). */
static int simplex_bland(double *tab, size_t *bvar, size_t rows, size_t cols)
{
    const double eps = 1e-12;
    size_t rhs = cols - 1;
    for (int guard = 0; guard < 10000; guard++) {
        size_t enter = rhs;
        for (size_t c = 0; c < rhs; c++)
            if (tab[rows * cols + c] < -eps) {
                enter = c;
                break;
            }
        if (enter == rhs)
            return 0;
        size_t leave = rows;
        double best = INFINITY;
        for (size_t i = 0; i < rows; i++) {
            double a = tab[i * cols + enter];
            if (a > eps) {
                double ratio = tab[i * cols + rhs] / a;
                if (ratio < best - eps || (ratio <= best + eps && leave < rows &&
                                           bvar[i] < bvar[leave])) {
                    best = ratio;
                    leave = i;
                }
            }
        }
        if (leave == rows)
            return -1;
        double piv = tab[leave * cols + enter];
        for (size_t c = 0; c < cols; c++)
            tab[leave * cols + c] /= piv;
        for (size_t i = 0; i <= rows; i++) {
            if (i == leave)
                continue;
            double f = tab[i * cols + enter];
            if (f != 0.0)
                for (size_t c = 0; c < cols; c++)
                    tab[i * cols + c] -= f * tab[leave * cols + c];
        }
        bvar[leave] = enter;
    }
    return -1;
}

/* Find a direction d (|d|_1 <= 1) that keeps every currently held species >= 0 and makes
 * as many of them as possible > 0: maximise sum_{i held} (nu^T d)_i subject to
 * (nu^T d)_i >= 0 for held i. With d = p - q, p, q >= 0 all right-hand sides are >= 0, so
 * the origin is a feasible basis. Writes d into dir; returns the optimum. */
static double release_direction(kphi_equil_work *w, double *dir)
{
    size_t s = w->s, r = w->r;
    size_t nh = 0;
    for (size_t i = 0; i < s; i++)
        nh += (size_t)w->held[i];
    size_t rows = nh + 1, nvar = 2 * r, cols = nvar + rows + 1;
    double *tab = w->tab;
    memset(tab, 0, (rows + 1) * cols * sizeof *tab);
    size_t row = 0;
    for (size_t i = 0; i < s; i++) {
        if (!w->held[i])
            continue;
        for (size_t j = 0; j < r; j++) {
            double a = w->nu[j * s + i];
            tab[row * cols + j] = -a;    /* -(nu^T p)_i + (nu^T q)_i <= 0 */
            tab[row * cols + r + j] = a;
            tab[rows * cols + j] -= a;   /* objective: maximise sum (nu^T (p - q))_i */
            tab[rows * cols + r + j] += a;
        }
        tab[row * cols + nvar + row] = 1.0;
        w->bvar[row] = nvar + row;
        row++;
    }
    for (size_t j = 0; j < nvar; j++)
        tab[row * cols + j] = 1.0; /* sum p + sum q <= 1 */
    tab[row * cols + nvar + row] = 1.0;
    tab[row * cols + cols - 1] = 1.0;
    w->bvar[row] = nvar + row;
    if (simplex_bland(tab, w->bvar, rows, cols) != 0)
        return 0.0;
    for (size_t j = 0; j < r; j++)
        dir[j] = 0.0;
    for (size_t i = 0; i < rows; i++) {
        size_t v = w->bvar[i];
        double val = tab[i * cols + cols - 1];
        if (v < r)
            dir[v] += val;
        else if (v < nvar)
            dir[v - r] -= val;
    }
    return tab[rows * cols + cols - 1];
}

/* Free directions: an orthonormal basis of {d : (nu^T d)_i = 0 for held i}, by SVD of the
 * held rows (Golub & Van Loan 2013, "Matrix Computations", 4th ed., sec. 2.4). */
static int free_basis(kphi_equil_work *w, kphi_error *err)
{
    size_t s = w->s, r = w->r;
    size_t nh = 0;
    for (size_t i = 0; i < s; i++)
        nh += (size_t)w->held[i];
    if (nh == 0) {
        memset(w->basis, 0, r * r * sizeof(double));
        for (size_t j = 0; j < r; j++)
            w->basis[j * r + j] = 1.0;
        w->m = r;
        return KPHI_OK;
    }
    size_t rows = nh > r ? nh : r;
    memset(w->svd_a, 0, rows * r * sizeof(double));
    size_t row = 0;
    for (size_t i = 0; i < s; i++) {
        if (!w->held[i])
            continue;
        for (size_t j = 0; j < r; j++)
            w->svd_a[row * r + j] = w->nu[j * s + i];
        row++;
    }
    gsl_matrix_view A = gsl_matrix_view_array(w->svd_a, rows, r);
    gsl_matrix_view V = gsl_matrix_view_array(w->svd_v, r, r);
    gsl_vector_view S = gsl_vector_view_array(w->svd_s, r);
    gsl_vector_view W = gsl_vector_view_array(w->svd_w, r);
    int rc = gsl_linalg_SV_decomp(&A.matrix, &V.matrix, &S.vector, &W.vector);
    if (rc != GSL_SUCCESS) {
        kphi_mark none = {0, 0};
        return kphi_error_set(err, KPHI_EFAILED, NULL, none, "singular value decomposition: %s",
                              gsl_strerror(rc));
    }
    double smax = w->svd_s[0];
    size_t m = 0;
    for (size_t k = 0; k < r; k++) {
        if (w->svd_s[k] > 1e-10 * (smax > 1.0 ? smax : 1.0))
            continue;
        for (size_t j = 0; j < r; j++)
            w->basis[j * r + m] = w->svd_v[j * r + k];
        m++;
    }
    w->m = m;
    return KPHI_OK;
}

/* Release held species direction by direction; each LP frees at least one. The
 * directions found are kept in w->dirs (w->ndirs of them). */
static void release_all(kphi_equil_work *w)
{
    size_t s = w->s, r = w->r;
    w->ndirs = 0;
    for (size_t pass = 0; pass < s; pass++) {
        double *d = w->dirs + w->ndirs * r;
        if (release_direction(w, d) <= 1e-9)
            break;
        int freed = 0;
        for (size_t i = 0; i < s; i++) {
            if (!w->held[i])
                continue;
            double v = 0.0;
            for (size_t j = 0; j < r; j++)
                v += w->nu[j * s + i] * d[j];
            if (v > 1e-9) {
                w->held[i] = 0;
                freed = 1;
            }
        }
        w->ndirs++;
        if (!freed)
            break;
    }
}

/* Decide which species the feed cannot form (exactly, from signs and stoichiometry), the
 * free directions, and a strictly interior starting point xi (in w->xi, n in w->n). The
 * LP and the basis depend only on the set and the zero pattern of the feed, so a sweep
 * computes them once. */
int kphi__equil_find_start(kphi_equil_work *w, kphi_error *err)
{
    kphi_mark none = {0, 0};
    size_t s = w->s, r = w->r;
    int same = w->pattern_set == w->set;
    for (size_t i = 0; i < s; i++) {
        int z = w->in_rxn[i] && w->n0[i] == 0.0;
        same = same && (w->pattern[i] == z);
        w->pattern[i] = z;
    }
    if (!same) {
        w->pattern_set = NULL;
        for (size_t i = 0; i < s; i++)
            w->held[i] = w->pattern[i];
        release_all(w);
        int rc = free_basis(w, err);
        if (rc != KPHI_OK)
            return rc;
        size_t m = w->m;
        for (size_t k = 0; k < m; k++)
            for (size_t i = 0; i < s; i++) {
                double v = 0.0;
                if (!w->held[i])
                    for (size_t j = 0; j < r; j++)
                        v += w->basis[j * r + k] * w->nu[j * s + i];
                w->nueff[k * s + i] = v; /* exactly zero in the held columns */
            }
        w->nsup = 0;
        for (size_t i = 0; i < s; i++) {
            int moved = 0;
            for (size_t k = 0; k < m; k++)
                moved = moved || w->nueff[k * s + i] != 0.0;
            if (moved)
                w->sup[w->nsup++] = i;
        }
        for (size_t k = 0; k < m; k++) {
            double sa = 0.0;
            for (size_t q = 0; q < w->nsup; q++)
                sa += w->nueff[k * s + w->sup[q]];
            w->nusum[k] = sa;
        }
        w->pattern_set = w->set;
    }
    /* along the ray alpha * sum_k t_k d_k (falling weights t_k, so a later direction never
     * undoes an earlier one) every released species grows; go half way to the first
     * species that would run out */
    for (size_t j = 0; j < r; j++)
        w->xi[j] = 0.0;
    double t = 1.0;
    for (size_t k = 0; k < w->ndirs; k++, t *= 1e-3)
        for (size_t j = 0; j < r; j++)
            w->xi[j] += t * w->dirs[k * r + j];
    double amax = INFINITY;
    for (size_t i = 0; i < s; i++) {
        double dv = 0.0;
        for (size_t j = 0; j < r; j++)
            dv += w->nu[j * s + i] * w->xi[j];
        w->dn[i] = dv;
        if (w->held[i] || !w->in_rxn[i])
            continue;
        if (w->n0[i] == 0.0 && !(dv > 0.0))
            return kphi_error_set(err, KPHI_EFAILED, NULL, none,
                                  "could not find a starting composition for this feed");
        if (dv < 0.0 && w->n0[i] / -dv < amax)
            amax = w->n0[i] / -dv;
    }
    double alpha = w->ndirs == 0 ? 0.0 : (isfinite(amax) ? 0.5 * amax : 1.0);
    for (size_t j = 0; j < r; j++)
        w->xi[j] *= alpha;
    for (size_t i = 0; i < s; i++)
        w->n[i] = w->held[i] ? 0.0 : w->n0[i] + alpha * w->dn[i];
    return KPHI_OK;
}
