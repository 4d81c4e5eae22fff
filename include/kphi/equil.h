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
    size_t K_basis;      /* where each K comes from: KPHI_K_TABLES (default) from the
                            species' polynomials, or a basis of the set
                            (kphi_rxnset_K_basis_find()): reactions with a correlation in
                            it take K from the correlation, the others from the tables. The
                            solve minimises G with g°/RT of the reacting species shifted by
                            nu^T c, (nu nu^T) c = ln K_tables - ln K, so every affinity is
                            -ln K + sum nu ln(y phi P/P°) with the chosen K (no allocation:
                            the shift uses the workspace). Enthalpies (adiabatic outlet,
                            approach temperature) stay those of the polynomials. */
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
    size_t *K_basis;      /* basis each reaction's K came from (KPHI_K_TABLES or the
                             options' basis), [n_reactions] */
    int *K_outside;       /* 1 when T is outside the validity range of that correlation
                             (K extrapolated), [n_reactions] */
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
 * it is not strictly feasible). opt (NULL: defaults) gives the K basis. Errors:
 * KPHI_EINPUT for a bad feed or a K basis the set does not have, KPHI_EFAILED. */
int kphi_equil_set(kphi_equil_work *w, const kphi_rxnset *set, const kphi_eos *eos, double T,
                   double P, const double n0[], const double xi_guess[],
                   const kphi_equil_options *opt, kphi_error *err);
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

/* Synthesis-gas indicators of a composition, as loop designers quote them. */
#define KPHI_EQUIL_MAX_INDICATORS 3
typedef struct {
    const char *title;   /* what a table line says before the formula ("stoichiometric
                            number SN =", "carbon-oxide ratio", "hydrogen-nitrogen ratio") */
    const char *name;    /* "SN", "CO2/COx", "H2/N2" */
    const char *formula; /* "(H2 - CO2)/(CO + CO2)", ... */
    const char *zero;    /* the denominator, for "undefined where ... is 0" */
    double value;        /* NaN when the denominator is 0 */
} kphi_equil_indicator;

/* The indicators that apply to the set, of amounts n[n_species] (any basis; the feed or an
 * equilibrium): with CO, CO2 and H2 in the set the stoichiometric number
 * SN = (H2 - CO2)/(CO + CO2) and the carbon-oxide ratio CO2/(CO + CO2); with H2, N2 and NH3
 * the H2/N2 ratio. Fills out[] (at most KPHI_EQUIL_MAX_INDICATORS, strings static) and
 * returns how many. */
size_t kphi_equil_indicators(const kphi_rxnset *set, const double n[],
                             kphi_equil_indicator out[KPHI_EQUIL_MAX_INDICATORS]);

/* The pressure (Pa) at which the ideal-gas model gives conversion X (weights w) at T
 * from feed n0 (the "equivalent ideal pressure"). Brackets on ln P between 1e2 and
 * 1e10 Pa. KPHI_EFAILED when X is not reachable in that range. ideal_eos must be an
 * ideal-gas model of the set's size. opt (NULL: defaults) must give the K basis X was
 * computed with. */
int kphi_equil_equivalent_pressure(const kphi_rxnset *set, const kphi_eos *ideal_eos, double T,
                                   const double n0[], const double weights[], double X, double *P,
                                   const kphi_equil_options *opt, kphi_equil_work *w,
                                   kphi_equil_result *tmp, kphi_error *err);

/* The same root searched from a nearby ideal-gas solution `start` (of the same T, feed
 * and K basis, at start->P; usually the point's own ideal-gas answer; every solve uses the
 * K basis recorded in start->K_basis): secant steps on ln P with
 * warm starts, then regula falsi (Illinois) once bracketed, to 1e-12 in ln P, within 1e2
 * to 1e10 Pa. tmp[0] and tmp[1] are two distinct results of the set's size (scratch; one
 * holds the last solution on return). The equivalent pressure is undefined, and the
 * function returns KPHI_EFAILED with a message starting "undefined: " that says why, when
 * X is not finite, within 1e-6 of 0 or of 1 (the equilibrium is nil or complete to parts
 * per million: a shift in a residual no analysis resolves), or when no pressure in the
 * range gives X. KPHI_EINPUT for a model that is not
 * the ideal gas or a missing start. */
int kphi_equil_equivalent_pressure_from(const kphi_rxnset *set, const kphi_eos *ideal_eos,
                                        double T, const double n0[], const double weights[],
                                        double X, const kphi_equil_result *start, double *P,
                                        kphi_equil_work *w, kphi_equil_result *const tmp[2],
                                        kphi_error *err);

/* ------------------------------------------------------------------ energy
 * (src/equil_energy.c) */

/* Enthalpy of the gas mixture n[n_species] (mol) at T (K) and P (Pa), in J:
 *   H = sum_i n_i h_i°(T) + n_t h_dep(T, P, y),   y = n / n_t,
 * h_i° from kphi_thermo_h() (elemental reference scale, so heats of reaction are
 * included), h_dep from eos (0 for the ideal gas). eos has the set's size and order.
 * Uses only w's scratch (no allocation) and leaves a solution held in w intact.
 * Errors: KPHI_EINPUT (a negative or non-finite amount, an empty mixture, T or P not
 * positive, w or eos of the wrong size), KPHI_EFAILED (the EOS has no gas root). */
int kphi_equil_enthalpy(const kphi_rxnset *set, const kphi_eos *eos, double T, double P,
                        const double n[], kphi_equil_work *w, double *H, kphi_error *err);

/* Adiabatic equilibrium outlet of a bed: the temperature T_out at which the equilibrium
 * mixture from feed n0 at P carries the feed's enthalpy at the inlet temperature T_in,
 *   H(T_out, P, n_eq(T_out)) = H(T_in, P, n0),
 * with H from kphi_equil_enthalpy() for the model eos (real gas or ideal). Searched from
 * T_in upwards when the reactions release heat at T_in, downwards when they take it up,
 * within the range where every species of the set has thermo data; Brent's method on T
 * to 1e-9 K. On success out holds the equilibrium at T_out (out->T is T_out, K).
 * opt may be NULL (defaults). Errors: KPHI_EINPUT (T_in outside the data range, bad
 * feed), KPHI_EFAILED (no root in the data range, or the equilibrium fails on the way;
 * the message says which and where). */
int kphi_equil_adiabatic_outlet(const kphi_rxnset *set, const kphi_eos *eos, double T_in,
                                double P, const double n0[], const kphi_equil_options *opt,
                                kphi_equil_work *w, kphi_equil_result *out, kphi_error *err);

/* A train of adiabatic beds with cooling between them (indirect intercooling: the
 * composition is kept, only the temperature changes). Bed 1 is fed n0 at T_in[0]; the
 * outlet of bed k, brought to T_in[k] at constant composition, feeds bed k + 1. Each bed
 * runs to its adiabatic equilibrium outlet (kphi_equil_adiabatic_outlet()); out[k] holds
 * the outlet of bed k + 1 (out[k]->n its amounts, out[k]->T its temperature). The bed
 * outlets are the equilibrium limit of such a converter: real beds stop short of them.
 * n_beds >= 1; out[] are n_beds distinct results of the set's size. Errors: as for
 * kphi_equil_adiabatic_outlet(), the message naming the bed ("bed 2: ..."). */
int kphi_equil_adiabatic_beds(const kphi_rxnset *set, const kphi_eos *eos, const double T_in[],
                              size_t n_beds, double P, const double n0[],
                              const kphi_equil_options *opt, kphi_equil_work *w,
                              kphi_equil_result *const out[], kphi_error *err);

/* Approach temperature: the temperature T_eq (K) at which the equilibrium mole fraction
 * of species k from feed n0 at P equals the measured y_meas. T (K) is the measured outlet
 * temperature: the search starts there and returns the root nearest it (sets with one
 * reaction have one root; with several, the bracket is found by scanning outwards in
 * steps of at most 50 K); the approach to equilibrium is T_eq - T. On success out holds
 * the equilibrium at T_eq (out->T is T_eq, out->y[k] equals y_meas to the solver's
 * precision). opt may be NULL. Errors: KPHI_EINPUT (k out of range, k inert, y_meas not
 * in (0, 1), T outside the data range), KPHI_EFAILED (y_meas is above or below the
 * equilibrium value at every temperature of the data range, or the equilibrium fails on
 * the way; the message says which). */
int kphi_equil_approach_temperature(const kphi_rxnset *set, const kphi_eos *eos, double T,
                                    double P, const double n0[], size_t k, double y_meas,
                                    const kphi_equil_options *opt, kphi_equil_work *w,
                                    kphi_equil_result *out, kphi_error *err);

/* ------------------------------------------------------- approach per reaction
 * (src/equil_approach.c) */

typedef enum {
    KPHI_APPROACH_OK = 0,  /* T_eq found */
    KPHI_APPROACH_ABSENT,  /* a species of the reaction is 0 in the analysis (`absent`) */
    KPHI_APPROACH_NO_ROOT  /* K never equals Q in the data range [T_lo, T_hi] */
} kphi_approach_status;

/* How far one reaction of a measured outlet is from equilibrium. */
typedef struct {
    double lnQ;     /* ln of the mass-action ratio prod (y phi P/P°)^nu; NaN when absent */
    double T_eq;    /* K: where K(T_eq) = Q; NaN unless status is KPHI_APPROACH_OK */
    kphi_approach_status status;
    long absent;    /* KPHI_APPROACH_ABSENT: the species with y = 0; else -1 */
    double T_lo, T_hi; /* KPHI_APPROACH_NO_ROOT: the range searched, K */
} kphi_equil_reaction_temperature;

/* Approach to equilibrium per reaction of a measured outlet analysis y[n_species] (mole
 * fractions summing to 1) at its temperature T (K) and pressure P (Pa): for each reaction
 * j the temperature T_eq at which K_j equals the mass-action ratio Q_j of the analysis,
 * with phi from eos at (T, P, y) (1 for the ideal gas) and K from the basis of opt (NULL:
 * the tables; KPHI_EINPUT for a basis the set does not have); the approach is T_eq - T. Each
 * T_eq is the root nearest T within the range where the reaction's species have thermo
 * data. out[n_reactions]. Uses w's scratch only (no allocation besides GSL's root finder)
 * and leaves a solution held in w intact. A reaction with no answer is not an error: its
 * status says why. Errors: KPHI_EINPUT (bad T, P or y, or sizes), KPHI_EFAILED (the EOS
 * has no root at the measured state). */
int kphi_equil_reaction_approach(const kphi_rxnset *set, const kphi_eos *eos, double T, double P,
                                 const double y[], const kphi_equil_options *opt,
                                 kphi_equil_work *w, kphi_equil_reaction_temperature out[],
                                 kphi_error *err);

#ifdef __cplusplus
}
#endif
#endif /* KPHI_EQUIL_H */
