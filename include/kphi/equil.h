/* kphi equil: the Gibbs-energy minimiser over reaction extents, and its result.
 *
 * Unknowns are the extents xi of the set's independent reactions, n = n0 + nu^T xi.
 * Minimises G/RT = sum n_i [g_i°(T)/RT + ln(P/P°) + ln y_i + ln phi_i(T, P, y)] by
 * Newton steps with the analytic Hessian (ideal part delta_il/n_i - 1/n_t plus the EOS
 * term d ln phi_i/d n_l), truncated to keep every n_i > 0 and backtracked on G
 * (Smith & Missen 1982, ch. 6; Nocedal & Wright 2006, alg. 3.1). Species that the
 * feed cannot form at all are held at exactly zero (found by linear programming on the
 * stoichiometry, not by thresholds). Converged when every |affinity| < tol. */
#ifndef KPHI_EQUIL_H
#define KPHI_EQUIL_H

#include <stddef.h>

#include "kphi/eos.h"
#include "kphi/error.h"
#include "kphi/rxnset.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef struct {
    double tol_affinity; /* converged when max |A_j| < this (dimensionless, A/RT); 1e-10 */
    int max_iter;        /* Newton iterations before KPHI_EFAILED; 300 */
    double boundary;     /* fraction of the distance to n_i = 0 a step may go; 0.99 */
} kphi_equil_options;

kphi_equil_options kphi_equil_options_default(void);

/* One solution. Arrays sized at alloc; fields are filled by kphi_equil_solve(). */
typedef struct {
    size_t n_species, n_reactions;
    double T, P;          /* K, Pa */
    double *n;            /* mol, [n_species] */
    double *y;            /* mole fractions, [n_species] */
    double *lnphi;        /* ln fugacity coefficients, [n_species] */
    double *xi;           /* reaction extents, mol, [n_reactions] */
    double *lnK;          /* ln K = -dG°/RT, [n_reactions] */
    double *lnKphi;       /* ln prod phi_i^nu, [n_reactions] */
    double *lnKy;         /* ln prod y_i^nu, [n_reactions] */
    double *affinity;     /* -ln K + sum nu ln(y phi P/P°), [n_reactions]; NaN when a
                             reaction involves a species held at zero */
    int *held_zero;       /* 1 for species the feed cannot form, [n_species] */
    double n_total;       /* mol */
    double max_affinity;  /* max |affinity| over reactions that can proceed */
    double balance_error; /* max over elements of |b - b0| / max(b0) */
    int iterations;
    kphi_eos_state eos;   /* Z and departure functions at the solution */
} kphi_equil_result;

/* Caller frees with kphi_equil_result_free(). NULL when out of memory. */
kphi_equil_result *kphi_equil_result_alloc(size_t n_species, size_t n_reactions);
void kphi_equil_result_free(kphi_equil_result *r); /* NULL is allowed */
/* Copy src into dst of the same sizes. */
void kphi_equil_result_copy(kphi_equil_result *dst, const kphi_equil_result *src);

/* Workspace for one solve at a time (one per thread). */
typedef struct kphi_equil_work kphi_equil_work;
kphi_equil_work *kphi_equil_work_alloc(size_t n_species, size_t n_reactions);
void kphi_equil_work_free(kphi_equil_work *w); /* NULL is allowed */

/* Set up a problem in w: set and eos (same species order, eos size = n_species) are
 * borrowed until the next set. n0[n_species] >= 0 with a positive sum. xi_guess may be
 * NULL (cold start) or the extents of a neighbouring solution (warm start; ignored when
 * it is not strictly feasible). Errors: KPHI_EINPUT for a bad feed, KPHI_EFAILED. */
int kphi_equil_set(kphi_equil_work *w, const kphi_rxnset *set, const kphi_eos *eos, double T,
                   double P, const double n0[], const double xi_guess[], kphi_error *err);
/* One Newton step. KPHI_EFAILED when the EOS fails or no descent step exists. */
int kphi_equil_iterate(kphi_equil_work *w, const kphi_equil_options *opt, kphi_error *err);
/* 1 when converged by opt, else 0. */
int kphi_equil_test(const kphi_equil_work *w, const kphi_equil_options *opt);
/* Fill a result from the current state of w. */
void kphi_equil_get(const kphi_equil_work *w, kphi_equil_result *out);

/* set + iterate until test or max_iter + get. opt may be NULL for the defaults.
 * Errors: KPHI_EINPUT (bad feed), KPHI_EFAILED (no convergence, EOS failure; the
 * message says which). */
int kphi_equil_solve(const kphi_rxnset *set, const kphi_eos *eos, double T, double P,
                     const double n0[], const double xi_guess[], const kphi_equil_options *opt,
                     kphi_equil_work *w, kphi_equil_result *out, kphi_error *err);

/* Conversion X = 1 - sum w_i n_i / sum w_i n0_i (weights from
 * kphi_rxnset_conversion_weights()); NaN when sum w_i n0_i = 0. */
double kphi_equil_conversion(const kphi_equil_result *r, const double n0[],
                             const double weights[]);

/* The pressure (Pa) at which the ideal-gas model gives conversion X (weights w) at T
 * from feed n0 (the "equivalent ideal pressure"). Brackets on ln P between 1e2 and
 * 1e10 Pa. KPHI_EFAILED when X is not reachable in that range. ideal_eos must be an
 * ideal-gas model of the set's size. */
int kphi_equil_equivalent_pressure(const kphi_rxnset *set, const kphi_eos *ideal_eos, double T,
                                   const double n0[], const double weights[], double X, double *P,
                                   kphi_equil_work *w, kphi_equil_result *tmp, kphi_error *err);

#ifdef __cplusplus
}
#endif
#endif /* KPHI_EQUIL_H */
