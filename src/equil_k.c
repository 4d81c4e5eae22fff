/* kphi equil, the K of each reaction: from the species' polynomials (the tables), or from
 * a published correlation of the reaction set (a K basis, src/rxnset_k.c).
 *
 * The minimiser works on G/RT = sum_i n_i mu_i with mu_i = g_i°/RT + ln(P/P°) + ln y_i +
 * ln phi_i, whose gradient along reaction j is the affinity
 *   A_j = sum_i nu_ji mu_i = -ln K_j + sum_i nu_ji ln(y_i phi_i P/P°),
 * ln K_j = -sum_i nu_ji g_i°/RT. To solve with other values ln K'_j, the standard chemical
 * potentials are shifted within the row space of the stoichiometric matrix:
 *   g'_i = g_i°/RT + (nu^T c)_i,   (nu nu^T) c = ln K - ln K'   (r x r, r reactions),
 * so that -sum_i nu_ji g'_i = ln K'_j for every j, and the affinities (gradient and
 * Hessian of G alike) are those of K' exactly. A shift in the row space of nu changes G by
 * c . (nu n), a linear function of the extents: the problem stays convex in the ideal
 * part and the minimum is the equilibrium with K'. nu nu^T is symmetric positive
 * definite because the reactions are independent (the loader checks the rank); it is
 * factored by Cholesky in the workspace (Golub & Van Loan 1996, "Matrix Computations",
 * 3rd ed., alg. 4.2.1, from memory). Species in no reaction are untouched.
 *
 * Only g°/RT moves: the enthalpies of the energy balance (src/equil_energy.c) stay those
 * of the polynomials, as the design asks. Cost: one correlation per reaction and an r x r
 * Cholesky per set-up, nothing per Newton step; with the tables basis nothing at all. */
#include "equil_internal.h"

#include <math.h>
#include <string.h>

int kphi__equil_set_K(kphi_equil_work *w, size_t b, kphi_error *err)
{
    kphi_mark none = {0, 0};
    const kphi_rxnset *set = w->set;
    size_t s = w->s, r = w->r;
    size_t nb = kphi_rxnset_n_K_bases(set);
    w->mu0 = w->g0;
    if (b >= nb)
        return kphi_error_set(err, KPHI_EINPUT, NULL, none,
                              "K basis %zu: the reaction set '%s' has %zu (0 = tables)", b,
                              kphi_rxnset_name(set), nb);
    int any = 0;
    for (size_t j = 0; j < r; j++) {
        const kphi_rxnset_kcorr *k = kphi_rxnset_kcorr_get(set, j, b);
        w->kbasis[j] = KPHI_K_TABLES;
        w->kout[j] = 0;
        w->dlnK[j] = 0.0;
        if (k == NULL)
            continue;
        double lk = kphi_rxnset_kcorr_lnK(k, w->T);
        if (!isfinite(lk))
            return kphi_error_set(err, KPHI_EFAILED, NULL, none,
                                  "K correlation '%s' of reaction %zu is not finite at T = "
                                  "%.2f K",
                                  kphi_rxnset_kcorr_name(k), j + 1, w->T);
        w->dlnK[j] = w->lnK[j] - lk;
        w->lnK[j] = lk;
        w->kbasis[j] = b;
        w->kout[j] = !kphi_rxnset_kcorr_in_range(k, w->T);
        any = 1;
    }
    if (!any)
        return KPHI_OK;
    /* M = nu nu^T, lower Cholesky factor in place (row-major, lower triangle) */
    double *M = w->kmat;
    for (size_t j = 0; j < r; j++)
        for (size_t l = 0; l <= j; l++) {
            double a = 0.0;
            for (size_t i = 0; i < s; i++)
                a += w->nu[j * s + i] * w->nu[l * s + i];
            M[j * r + l] = a;
        }
    for (size_t j = 0; j < r; j++) {
        double d = M[j * r + j];
        for (size_t q = 0; q < j; q++)
            d -= M[j * r + q] * M[j * r + q];
        if (!(d > 0.0))
            return kphi_error_set(err, KPHI_EFAILED, NULL, none,
                                  "the reactions are not independent (nu nu^T is singular); "
                                  "K cannot be set per reaction");
        M[j * r + j] = sqrt(d);
        for (size_t l = j + 1; l < r; l++) {
            double a = M[l * r + j];
            for (size_t q = 0; q < j; q++)
                a -= M[l * r + q] * M[j * r + q];
            M[l * r + j] = a / M[j * r + j];
        }
    }
    /* c: forward then back substitution, in dlnK's place */
    double *c = w->dlnK;
    for (size_t j = 0; j < r; j++) {
        double a = c[j];
        for (size_t q = 0; q < j; q++)
            a -= M[j * r + q] * c[q];
        c[j] = a / M[j * r + j];
    }
    for (size_t j = r; j-- > 0;) {
        double a = c[j];
        for (size_t q = j + 1; q < r; q++)
            a -= M[q * r + j] * c[q];
        c[j] = a / M[j * r + j];
    }
    for (size_t i = 0; i < s; i++) {
        double g = w->g0[i];
        for (size_t j = 0; j < r; j++)
            g += w->nu[j * s + i] * c[j];
        w->g0k[i] = g;
    }
    w->mu0 = w->g0k;
    return KPHI_OK;
}
