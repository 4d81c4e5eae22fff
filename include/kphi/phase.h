/* kphi phase: phase stability, the isothermal two-phase flash, dew and bubble points,
 * pure-component vapour pressures, and chemical equilibrium when the gas condenses.
 *
 * Every phase is described by the same equation of state (phi-phi): a phase's fugacity
 * of species i is f_i = x_i phi_i(T, P, x) P, with phi from kphi_eos_eval_root() on the
 * root of lower Gibbs energy. Needs a cubic model (RK, SRK, PR): the ideal gas cannot
 * condense and the truncated virial equation has no liquid root.
 *
 * Methods (Michelsen & Mollerup 2007, "Thermodynamic Models: Fundamentals and
 * Computational Aspects", 2nd ed., chs. 9-12; Michelsen 1982a, Fluid Phase Equilib. 9, 1
 * and 1982b, ibid. 9, 21):
 *  - stability: Michelsen's tangent-plane distance, tm(W) = 1 + sum W_i (ln W_i +
 *    ln phi_i(w) - d_i - 1), d_i = ln z_i + ln phi_i(z), from a vapour-like (W = z K) and
 *    a liquid-like (W = z / K) trial with Wilson's K (Wilson 1968); successive
 *    substitution, then Newton steps in alpha_i = 2 sqrt(W_i). The feed is unstable when
 *    a stationary point has tm < 0.
 *  - flash: Rachford-Rice (1952) solved by Newton's method kept inside its window
 *    (1/(1 - K_max), 1/(1 - K_min)) by bisection (Whitson & Michelsen 1989); successive
 *    substitution on ln K with the dominant-eigenvalue extrapolation (Michelsen 1982b);
 *    then Newton steps on the vapour amounts that minimise the Gibbs energy of the split,
 *    backtracked on G. Converged when |ln(x_i phi_i^L) - ln(y_i phi_i^V)| < tol for every
 *    component of the feed.
 *  - dew and bubble points at P: the temperature at which the stationary point of the
 *    liquid-like (dew) or vapour-like (bubble) trial phase has sum W_i = 1, i.e. tm = 0
 *    (Michelsen & Mollerup 2007, ch. 12), by Brent's method on T after a bracketing scan.
 *  - vapour pressure: equal fugacity of the two roots of the pure component, Newton's
 *    method on ln P with d ln(phi_L/phi_V)/d ln P = Z_L - Z_V.
 *  - reactive: the Gibbs energy of both phases together minimised over the reaction
 *    extents and the vapour amounts (n = n0 + nu^T xi, liquid = n - vapour), Newton steps
 *    with the exact Hessian, backtracked on G (Smith & Missen 1982, ch. 6, applied to two
 *    phases). At the answer every affinity vanishes and each species has the same fugacity
 *    in both phases.
 * SI throughout: T in K, P in Pa, amounts in mol. */
#ifndef KPHI_PHASE_H
#define KPHI_PHASE_H

#include <stddef.h>

#include "kphi/eos.h"
#include "kphi/equil.h"
#include "kphi/error.h"
#include "kphi/rxnset.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef struct {
    double tol;      /* flash converged when max |ln f_i^V - ln f_i^L| < tol; 1e-10 */
    double tol_tm;   /* a stationary point with tm < -tol_tm is unstable; 1e-9 */
    int max_iter;    /* iterations of a flash, a stability trial or a root search; 200 */
    int ss_iter;     /* successive-substitution steps before Newton steps; 12 */
} kphi_phase_options;

kphi_phase_options kphi_phase_options_default(void);

typedef enum { KPHI_PHASE_VAPOUR = 0, KPHI_PHASE_LIQUID } kphi_phase_kind;

/* "vapour", "liquid". Borrowed, static. */
const char *kphi_phase_kind_name(kphi_phase_kind kind);

/* One phase of an answer. */
typedef struct {
    kphi_phase_kind kind; /* liquid-like or vapour-like root (see kphi_eos_state) */
    double fraction;      /* molar share of the whole, 0..1 */
    double *y;            /* mole fractions, [n] */
    double *lnphi;        /* ln fugacity coefficients, [n] */
    double Z;             /* compressibility factor, - */
    double v;             /* molar volume, m3/mol */
    double h_dep;         /* H - H_ig at T, P, J/mol */
    double g_dep;         /* G - G_ig at T, P, J/mol */
} kphi_phase_state;

/* The answer of a flash (or the phase part of a reactive answer). Two phases: phase[0]
 * is the lighter (larger molar volume: the vapour), phase[1] the denser. One phase:
 * phase[0] holds the feed, its kind says whether it is gas-like or liquid-like. */
typedef struct {
    size_t n;              /* species */
    double T, P;           /* K, Pa */
    size_t n_phases;       /* 1 or 2 */
    kphi_phase_state phase[2];
    double *K;             /* K_i = y_i/x_i of a split ([n]); for a species absent from
                              the feed, phi_i^L/phi_i^V at infinite dilution; with one
                              phase, NaN */
    double tm_min;         /* least tangent-plane distance the stability test found (< 0:
                              the feed was unstable), - */
    int iterations;        /* flash iterations (successive substitution + Newton) */
    double residual;       /* max |ln f_i^V - ln f_i^L| at the answer (0 for one phase) */
    double balance_error;  /* max_i |beta y_i + (1 - beta) x_i - z_i| */
} kphi_flash_result;

/* Caller frees with kphi_flash_result_free(). NULL when out of memory. */
kphi_flash_result *kphi_flash_result_alloc(size_t n_species);
void kphi_flash_result_free(kphi_flash_result *r); /* NULL is allowed */
void kphi_flash_result_copy(kphi_flash_result *dst, const kphi_flash_result *src);

/* Workspace for one calculation at a time (one per thread). n_reactions may be 0 when
 * only flashes are wanted. Owns an EOS workspace. NULL when out of memory. */
typedef struct kphi_phase_work kphi_phase_work;
kphi_phase_work *kphi_phase_work_alloc(size_t n_species, size_t n_reactions);
void kphi_phase_work_free(kphi_phase_work *w); /* NULL is allowed */

/* Stability test of the mixture z[n] (mole fractions or amounts, >= 0, positive sum) at
 * T, P. *stable is 1 when no trial phase has tm < -tol_tm. trial (may be NULL, [n]) gets
 * the composition of the most unstable trial phase (or of the least stable one when
 * stable); *tm_min (may be NULL) its tangent-plane distance. opt may be NULL.
 * Errors: KPHI_EINPUT (not a cubic model, a bad composition, T or P not positive),
 * KPHI_EFAILED (the EOS fails). */
int kphi_phase_stability(const kphi_eos *eos, double T, double P, const double z[],
                         const kphi_phase_options *opt, kphi_phase_work *w, int *stable,
                         double trial[], double *tm_min, kphi_error *err);

/* Isothermal flash of z[n] (amounts or fractions, >= 0, positive sum) at T, P: one or
 * two phases, out filled (out->n must equal the EOS size). opt may be NULL.
 * Errors: KPHI_EINPUT (as above), KPHI_EFAILED (no convergence in max_iter, the EOS
 * fails, or a third phase forms, which this flash does not find; the message says which;
 * in the last case out holds the two-phase split reached). */
int kphi_phase_flash(const kphi_eos *eos, double T, double P, const double z[],
                     const kphi_phase_options *opt, kphi_phase_work *w, kphi_flash_result *out,
                     kphi_error *err);

/* Dew-point temperature (K) of z at P: the highest temperature at which a liquid first
 * forms when the gas is cooled. Searched from T_start (K; NaN: from an estimate with
 * Wilson's K) within [T_min, T_max] (K). *found is 0 when the mixture stays one phase over
 * that whole range (no dew point there) and 1 otherwise. Errors: KPHI_EINPUT,
 * KPHI_EFAILED (the EOS fails, the root search does not converge). */
int kphi_phase_dew_point(const kphi_eos *eos, double P, const double z[], double T_start,
                         double T_min, double T_max, const kphi_phase_options *opt,
                         kphi_phase_work *w, int *found, double *T, kphi_error *err);

/* Bubble-point temperature (K) of z at P: the lowest temperature at which a vapour
 * first forms when the liquid is heated. As kphi_phase_dew_point(); a mixture holding a
 * gas far above its critical point (H2, N2) has none: *found = 0. */
int kphi_phase_bubble_point(const kphi_eos *eos, double P, const double z[], double T_start,
                            double T_min, double T_max, const kphi_phase_options *opt,
                            kphi_phase_work *w, int *found, double *T, kphi_error *err);

/* Vapour pressure (Pa) of pure species i at T (K) below its critical temperature (the
 * model's own critical point: T < Tc of the species). Errors: KPHI_EINPUT (T >= Tc, i
 * out of range, not a cubic), KPHI_EFAILED (no convergence). */
int kphi_phase_vapour_pressure(const kphi_eos *eos, size_t i, double T,
                               const kphi_phase_options *opt, kphi_phase_work *w, double *P,
                               kphi_error *err);

/* Chemical and phase equilibrium of feed n0 at T, P: the gas-phase equilibrium is
 * solved first (kphi_equil_solve() with ew, warm-started from xi_guess when not NULL);
 * when the stability test finds it unstable, the total Gibbs energy of vapour and liquid
 * is minimised over the extents and the split. out holds the whole (n the total amounts,
 * y the overall mole fractions, xi, lnK; lnphi, lnKphi and lnKy are those of the vapour
 * phase, so that K = Kphi Ky (P/P°)^dnu holds with the vapour's y; affinity from the
 * common chemical potentials; eos the vapour's state); phases the phase split
 * (phases->n_phases 1 when the gas is stable). When the whole becomes a single
 * liquid-like phase, that phase is phases->phase[0]. With gas_only the gas answer is kept
 * (the largest root) and only tested: phases holds it as one phase and phases->tm_min < 0
 * says it is unstable. eq_opt and ph_opt may be NULL. Errors: KPHI_EINPUT (bad feed, not
 * a cubic model), KPHI_EFAILED (no convergence; the message says which). */
int kphi_phase_equil_solve(const kphi_rxnset *set, const kphi_eos *eos, double T, double P,
                           const double n0[], const double xi_guess[], int gas_only,
                           const kphi_equil_options *eq_opt, const kphi_phase_options *ph_opt,
                           kphi_equil_work *ew, kphi_phase_work *pw, kphi_equil_result *out,
                           kphi_flash_result *phases, kphi_error *err);

/* 1 when an answer of kphi_phase_equil_solve() with gas_only found the gas unstable. */
int kphi_phase_gas_unstable(const kphi_flash_result *phases, const kphi_phase_options *opt);

/* Molar enthalpy (J/mol) of phase k of an answer, on the elemental reference scale of
 * the species data: h = sum_i y_i h_i°(T) + h_dep (kphi_thermo_h() plus the EOS
 * departure of that phase's root). set gives the species in the answer's order. */
double kphi_phase_molar_enthalpy(const kphi_rxnset *set, const kphi_flash_result *ph, size_t k);

/* 1 when the model can describe a liquid (the cubics). */
int kphi_phase_model_ok(kphi_eos_model model);

#ifdef __cplusplus
}
#endif
#endif /* KPHI_PHASE_H */
