/* kphi loop: a synthesis loop at steady state: make-up, converter, cooler and separator,
 * purge and recycle.
 *
 *   converter inlet  = make-up + recycle  (or recycle only: make-up at the separator)
 *   converter outlet = the gas-phase equilibrium of the inlet at T_out + approach and the
 *                      loop pressure (isothermal converter), or adiabatic beds in series,
 *                      each leaving at the composition in equilibrium at its outlet
 *                      T + approach while closing its energy balance
 *   separator        = the converter outlet (plus the make-up when it joins there) at
 *                      T_sep, P_sep: a flash (kphi_phase_flash()) into vapour and liquid
 *   purge            = f x separator vapour (f given, or solved for an inert mole
 *                      fraction at the converter inlet)
 *   recycle          = (1 - f) x separator vapour, back to loop pressure
 * The recycle is the tear stream: Newton's method on its component flows with a
 * finite-difference Jacobian, damped to keep every flow >= 0 and backtracked on the norm
 * of the residual, converged when every component's residual is below 1e-10 of its flow
 * (Westerberg, Hutchison, Motard & Winter 1979, "Process Flowsheeting", ch. 3-4, for the
 * tearing and the Newton iteration; from memory). The converter model may be a real gas
 * or the ideal gas; the separator is always an equation of state (an ideal gas cannot
 * condense). Flows in mol/s, T in K, P in Pa, duties in W. */
#ifndef KPHI_LOOP_H
#define KPHI_LOOP_H

#include <stddef.h>

#include "kphi/case.h"
#include "kphi/eos.h"
#include "kphi/equil.h"
#include "kphi/error.h"
#include "kphi/phase.h"
#include "kphi/rxnset.h"

#ifdef __cplusplus
extern "C" {
#endif

#define KPHI_LOOP_MAX_BEDS 8

typedef enum { KPHI_LOOP_MAKEUP_AT_CONVERTER = 0, KPHI_LOOP_MAKEUP_AT_SEPARATOR } kphi_loop_makeup_at;
typedef enum { KPHI_LOOP_ISOTHERMAL = 0, KPHI_LOOP_ADIABATIC } kphi_loop_converter;
typedef enum { KPHI_LOOP_PURGE_FRACTION = 0, KPHI_LOOP_PURGE_INERTS } kphi_loop_purge;

/* What defines a loop. Arrays borrowed. */
typedef struct {
    const double *makeup;        /* make-up flows, mol/s, [n_species] (composition times
                                    rate); the make-up arrives at T_sep */
    kphi_loop_makeup_at makeup_at;
    double P;                    /* loop (converter) pressure, Pa */
    kphi_loop_converter converter;
    double T_out;                /* isothermal: converter outlet temperature, K */
    size_t n_beds;               /* adiabatic: beds, 1..KPHI_LOOP_MAX_BEDS */
    double T_in[KPHI_LOOP_MAX_BEDS]; /* adiabatic: inlet temperature of each bed, K */
    double approach;             /* K >= 0: equilibrium taken at outlet T + approach */
    double T_sep, P_sep;         /* separator, K and Pa */
    kphi_loop_purge purge;
    double purge_fraction;       /* KPHI_LOOP_PURGE_FRACTION: f in [0, 1] */
    double inerts_target;        /* KPHI_LOOP_PURGE_INERTS: inert mole fraction at the
                                    converter inlet, (0, 1) */
    size_t K_basis;              /* the converter's K: KPHI_K_TABLES (0) or a K basis of the
                                    set (kphi_equil_options.K_basis); enthalpies stay the
                                    polynomials' */
} kphi_loop_spec;

typedef enum {
    KPHI_LOOP_S_MAKEUP = 0,
    KPHI_LOOP_S_CONVERTER_IN,
    KPHI_LOOP_S_CONVERTER_OUT,
    KPHI_LOOP_S_SEPARATOR_VAPOUR,
    KPHI_LOOP_S_LIQUID,
    KPHI_LOOP_S_PURGE,
    KPHI_LOOP_S_RECYCLE,
    KPHI_LOOP_N_STREAMS
} kphi_loop_stream_id;

/* "makeup", "converter_in", ... (the JSON keys). Borrowed, static. */
const char *kphi_loop_stream_name(kphi_loop_stream_id id);

typedef struct {
    double T, P;             /* K, Pa */
    double *n;               /* mol/s per species, [n_species] */
    double total;            /* mol/s */
    double mass;             /* kg/s */
    double vapour_fraction;  /* molar, 0..1 */
} kphi_loop_stream;

/* A solved loop. Arrays sized at alloc. */
typedef struct {
    size_t n_species;
    kphi_loop_stream stream[KPHI_LOOP_N_STREAMS];
    long product;              /* the product species (first product of reaction 1) */
    double product_rate;       /* product in the liquid, mol/s */
    double purity;             /* product mole fraction in the liquid */
    double purity_mass;        /* product mass fraction in the liquid */
    double per_pass_conversion;/* of the set's conversion species, converter in -> out */
    double overall_conversion; /* see kphi_loop_solve() */
    double recycle_ratio;      /* recycle / make-up, molar */
    double purge_fraction;     /* f */
    double h2_purge_loss;      /* H2 in the purge / H2 in the make-up; NaN without H2 */
    double inerts_in, inerts_out;   /* inert mole fraction at converter inlet, outlet */
    double product_in, product_out; /* product mole fraction there */
    double sn_makeup, sn_in;   /* (H2 - CO2)/(CO + CO2) of make-up and converter inlet;
                                  NaN for sets without H2, CO and CO2 */
    double converter_duty;     /* W: heat the converter releases (isothermal: removed to
                                  hold T_out; adiabatic: removed by the interbed
                                  exchangers) */
    double cooler_duty;        /* W: heat removed to bring the converter outlet to T_sep
                                  (both phases at the separator) */
    size_t n_beds;
    double bed_T_in[KPHI_LOOP_MAX_BEDS], bed_T_out[KPHI_LOOP_MAX_BEDS]; /* K */
    int iterations;            /* Newton iterations on the recycle */
    double residual;           /* largest relative residual of the recycle */
    double balance_error;      /* elements: |make-up - liquid - purge| / make-up, largest */
    int separator_eos_substituted; /* 1 when the separator used PR because the converter
                                      model has no liquid */
} kphi_loop_result;

/* Caller frees with kphi_loop_result_free(). NULL when out of memory. */
kphi_loop_result *kphi_loop_result_alloc(size_t n_species);
void kphi_loop_result_free(kphi_loop_result *r); /* NULL is allowed */
/* Multiply every flow and duty by factor (> 0): the loop is linear in its scale. */
void kphi_loop_result_scale(kphi_loop_result *r, double factor);

/* Workspace: one loop at a time (one per thread). NULL when out of memory. */
typedef struct kphi_loop_work kphi_loop_work;
kphi_loop_work *kphi_loop_work_alloc(size_t n_species, size_t n_reactions);
void kphi_loop_work_free(kphi_loop_work *w); /* NULL is allowed */

/* Solve the loop. conv is the converter's model (any, the ideal gas included), sep the
 * separator's (a cubic). recycle_guess (mol/s, [n_species]) may be NULL: a cold start
 * (recycle = 4 x make-up at the separator's... composition of the make-up). Overall
 * conversion: for a set whose conversion is of one species (ammonia: N2),
 *   1 - (its flow in the purge + in the liquid) / its flow in the make-up;
 * for a list (methanol: CO + CO2), the key element (the first element common to them and
 * the product: C) in the liquid's product over that element in the make-up's listed
 * species. Errors: KPHI_EINPUT (a spec without a steady state: inerts in the make-up and
 * no purge; an empty make-up; bad temperatures), KPHI_EFAILED (the recycle does not
 * converge, a converter or separator calculation fails; the message says which). */
int kphi_loop_solve(const kphi_rxnset *set, const kphi_eos *conv, const kphi_eos *sep,
                    const kphi_loop_spec *spec, const double recycle_guess[],
                    kphi_loop_work *w, kphi_loop_result *out, kphi_error *err);

/* The converter pressure (Pa) at which the loop with converter model conv_ideal (the
 * ideal gas) makes product_rate (mol/s) of liquid product, everything else as spec
 * (the separator keeps spec->P_sep). Brent's method on ln P between P/4 and 4 P.
 * KPHI_EFAILED when no pressure in that range matches. tmp is scratch. */
int kphi_loop_equivalent_pressure(const kphi_rxnset *set, const kphi_eos *conv_ideal,
                                  const kphi_eos *sep, const kphi_loop_spec *spec,
                                  double product_rate, kphi_loop_work *w, kphi_loop_result *tmp,
                                  double *P, kphi_error *err);

/* The loop of a case's `loop` block (kphi_case_get_loop() not NULL) at the case's P:
 * make-up flows in mol/s written into mk[n_species] (the block's rate, or 100 mol/s when
 * it gives none or a production target), the spec into sp (separator P defaulting to the
 * loop pressure, the case's K basis). Returns 1 when the flows are per 100 mol of make-up
 * (neither rate nor production given), else 0. */
int kphi_loop_spec_from_case(const kphi_case *cs, double mk[], kphi_loop_spec *sp);

#ifdef __cplusplus
}
#endif
#endif /* KPHI_LOOP_H */
