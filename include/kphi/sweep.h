/* kphi sweep: equilibrium over a grid of temperatures and pressures, in parallel, with
 * results delivered in grid order.
 *
 * The grid is T outer, P inner: point k is (T[k / nP], P[k % nP]). Points are solved in
 * fixed chains of `chain` consecutive points; inside a chain each point warm-starts from
 * the previous one. Chains are shared among threads (OpenMP); each solved chain is handed to
 * the caller's callback in grid order while other threads go on solving, so emission
 * overlaps solving, memory stays flat however large the grid (a few chains per thread are
 * held), and the output is the same for any thread count. */
#ifndef KPHI_SWEEP_H
#define KPHI_SWEEP_H

#include <stddef.h>

#include "kphi/eos.h"
#include "kphi/equil.h"
#include "kphi/error.h"
#include "kphi/loop.h"
#include "kphi/phase.h"
#include "kphi/report.h"
#include "kphi/rxnset.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef struct {
    int threads;       /* 0: all cores (OpenMP default) */
    size_t chain;      /* points per warm-start chain; 32 */
    int adiabatic;     /* 1: each point's T is also a bed inlet temperature, and the point
                          carries the adiabatic equilibrium outlet for the model and the
                          ideal gas (kphi_equil_adiabatic_outlet(), cold-started, so the
                          output stays the same for any thread count) in pt->energy. A
                          point whose outlet search fails is a failed point. 0 by default */
    double approach_dT;/* K, 0 by default: each point (grid T) is an outlet at this approach
                          to equilibrium, its composition the equilibrium at T + approach_dT;
                          pt->energy then says so (outlet_approach). Not with adiabatic */
    int equiv_pressure;/* 1 (default): each point carries its equivalent ideal-gas pressure
                          in pt->P_equiv, or NaN with the reason in pt->P_equiv_note
                          (kphi_equil_equivalent_pressure_from(), started from the point's own
                          ideal-gas answer); 0 leaves P_equiv NaN and saves the search */
    int phases;        /* 0 (default): the gas answer, untested; 1: two phases where the
                          stability test finds the gas would condense
                          (kphi_phase_equil_solve()), the point's phases in pt->phases;
                          2: the gas answer tested (pt->gas_unstable). Only for cubic models;
                          others stay untested */
    kphi_equil_options equil;
} kphi_sweep_options;

kphi_sweep_options kphi_sweep_options_default(void);

/* Called once per point in grid order. Calls are serialised (never two at once, each one
 * finished before the next begins) but may run on any of the sweep's threads, not only
 * the calling one: ctx needs no lock of its own, but the callback must not rely on
 * thread-local state (and must not draw with PLplot; collect the data and draw after the
 * sweep). On success pt is the point and failure is NULL; when the
 * point failed pt is NULL and failure says why. Return 0 to go on, nonzero to stop the
 * sweep: no further point is emitted and kphi_sweep_run returns that value. All pointers
 * are valid only during the call. */
typedef int (*kphi_sweep_emit)(void *ctx, size_t iT, size_t iP, double T, double P,
                               const kphi_report_point *pt, const kphi_error *failure);

/* Solve the grid. `eos` is the real-gas model, `ideal` an ideal-gas model of the same set
 * (both borrowed, read-only, shared by the threads). feed[n_species]. T[nT] in K, P[nP] in
 * Pa. Errors: KPHI_ENOMEM; a failed point is not an error of the sweep. */
int kphi_sweep_run(const kphi_rxnset *set, const kphi_eos *eos, const kphi_eos *ideal,
                   const double feed[], const double T[], size_t nT, const double P[], size_t nP,
                   const kphi_sweep_options *opt, kphi_sweep_emit emit, void *ctx,
                   kphi_error *err);

/* ------------------------------------------------------------ loop grids
 * (src/sweep_loop.c) */

/* One point of a loop grid: the loop as solved there, and its answer with the converter
 * model ([0]) and with the ideal-gas converter ([1]); loop[m] is NULL when that loop
 * failed, failure[m] saying why. Valid only during the callback. */
typedef struct {
    const kphi_loop_spec *spec;
    const kphi_loop_result *loop[2];
    const kphi_error *failure[2];
} kphi_sweep_loop_point;

/* Called once per point, in grid order, serialised as kphi_sweep_emit. Return nonzero
 * to stop the sweep. */
typedef int (*kphi_sweep_loop_emit)(void *ctx, size_t iT, size_t iP,
                                    const kphi_sweep_loop_point *pt);

/* The loop `base` over a grid of converter temperatures T[nT] (K: the outlet temperature
 * of an isothermal converter, the first bed's inlet temperature of adiabatic beds) and
 * loop pressures P[nP] (Pa), T outer and P inner; the separator keeps base's pressure
 * drop P - P_sep, everything else is base's (its make-up array is shared, read-only).
 * Each point is solved with the converter model conv and with the ideal gas ideal (a
 * KPHI_EOS_IDEAL model of the set), the separator with sep. Chains of opt->chain points
 * (32 by default) run along P at one T and never cross to the next T; each point
 * warm-starts its recycle from the previous point of its chain (kphi_loop_solve()'s
 * recycle_guess) and starts cold when that fails, so the output is the same for any
 * thread count. Of opt only threads and chain are used (opt may be NULL). Errors:
 * KPHI_ENOMEM; a failed point is not an error of the sweep. */
int kphi_sweep_loop_run(const kphi_rxnset *set, const kphi_eos *conv, const kphi_eos *ideal,
                        const kphi_eos *sep, const kphi_loop_spec *base, const double T[],
                        size_t nT, const double P[], size_t nP, const kphi_sweep_options *opt,
                        kphi_sweep_loop_emit emit, void *ctx, kphi_error *err);

/* ------------------------------------------------------------ flash grids
 * (src/sweep_flash.c) */

/* One point of a flash grid: the split at (T, P) (NULL when the flash failed, failure
 * saying why) and the dew and bubble points of the feed at this P (found 0: none in the
 * search range; sat_note non-NULL when a search failed, saying why). Valid only during
 * the callback. */
typedef struct {
    const kphi_flash_result *flash;
    const kphi_error *failure;
    int dew_found, bubble_found;
    double T_dew, T_bubble; /* K; NaN when not found */
    const char *sat_note;
} kphi_sweep_flash_point;

typedef int (*kphi_sweep_flash_emit)(void *ctx, size_t iT, size_t iP, double T, double P,
                                     const kphi_sweep_flash_point *pt);

/* The feed z[n] (amounts, the model's species) flashed at every point of T[nT] x P[nP]
 * (K, Pa; T outer, P inner) with the cubic model eos (kphi_phase_flash()), and its dew and
 * bubble points at each P searched over [T_lo, T_hi] (kphi_phase_dew_point(),
 * kphi_phase_bubble_point()), in parallel. Every flash and search starts cold, so the
 * output is the same for any thread count. Of opt only threads and chain are used (opt
 * may be NULL). Errors: KPHI_ENOMEM, KPHI_EINPUT (not a cubic model); a failed point is
 * not an error of the sweep. */
int kphi_sweep_flash_run(const kphi_eos *eos, const double z[], const double T[], size_t nT,
                         const double P[], size_t nP, double T_lo, double T_hi,
                         const kphi_sweep_options *opt, kphi_sweep_flash_emit emit, void *ctx,
                         kphi_error *err);

#ifdef __cplusplus
}
#endif
#endif /* KPHI_SWEEP_H */
