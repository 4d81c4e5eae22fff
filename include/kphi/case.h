/* kphi case: a converter point or sweep a user runs: reaction set, feed, T, P, EOS,
 * options and sweep grid, read from YAML and overridable from the command line.
 *
 * Case files (see cases/ammonia_converter.yaml):
 *   reactions: ../reactions/ammonia.yaml   # relative to the case file
 *   feed: {H2: 72.0, N2: 24.0, CH4: 2.5, Ar: 1.5}
 *   T: 450 C
 *   P: 200 bar
 *   eos: pr                  # default: the set's recommended model (key eos), else pr
 *   quantum: false           # effective critical constants for H2, He
 *   kij: [{pair: [N2, H2], value: 0.0}]
 *   sweep: {T: {from: 380 C, to: 520 C, step: 10 C}, P: [100 bar, 150 bar]}
 *   K: tables                # or a K basis of the set (graaf1986), or all
 * Values given on the command line carry the path "<command line>". */
#ifndef KPHI_CASE_H
#define KPHI_CASE_H

#include <stddef.h>

#include "kphi/eos.h"
#include "kphi/error.h"
#include "kphi/rxnset.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef struct kphi_case kphi_case;

/* Load a case and the reaction set it names (owned by the case). Caller frees with
 * kphi_case_free(). Errors (file:line:column): KPHI_EIO, KPHI_EINPUT (bad YAML,
 * unknown key, unknown species in feed, negative or non-finite amount, bad unit, bad
 * sweep), KPHI_ENOMEM. T and P may be missing here; kphi_case_validate() checks. */
kphi_case *kphi_case_load_file(const char *path, kphi_error *err);
/* As kphi_case_load_file(), the reaction set loaded with kphi_rxnset_load_file_default()
 * and species_default (a species database file for a set that names none and has none
 * beside it; NULL: none). */
kphi_case *kphi_case_load_file_default(const char *path, const char *species_default,
                                       kphi_error *err);
void kphi_case_free(kphi_case *c); /* NULL is allowed */

const char *kphi_case_path(const kphi_case *c);
/* The case's title: its `name:`, else the file name without directory and extension
 * ("ammonia_converter"). Borrowed, valid while c lives. */
const char *kphi_case_name(const kphi_case *c);
const kphi_rxnset *kphi_case_rxnset(const kphi_case *c); /* borrowed */

/* Command-line overrides, text as typed ("450C", "300 atm", "N2=1,H2=3,Ar=0.05", "pr"). A
 * --feed replaces the whole feed. KPHI_EINPUT with path "<command line>". */
int kphi_case_set_T(kphi_case *c, const char *text, kphi_error *err);
int kphi_case_set_P(kphi_case *c, const char *text, kphi_error *err);
int kphi_case_set_feed(kphi_case *c, const char *text, kphi_error *err);
int kphi_case_set_eos(kphi_case *c, const char *text, kphi_error *err);
void kphi_case_set_quantum(kphi_case *c, int on);

/* The K basis: "tables", a correlation name of the set (kphi_rxnset_K_basis_find()) or
 * "all" (every basis, compared at one point). KPHI_EINPUT with did-you-mean. */
#define KPHI_CASE_K_ALL ((size_t)-1)
int kphi_case_set_K(kphi_case *c, const char *text, kphi_error *err);
/* KPHI_K_TABLES (default), a basis index of the set, or KPHI_CASE_K_ALL. */
size_t kphi_case_K_basis(const kphi_case *c);
/* KPHI_EINPUT pointing at where 'all' was given (case key or --K) when the basis is
 * KPHI_CASE_K_ALL; for commands that need one basis (sweep, plots). */
int kphi_case_require_one_K(const kphi_case *c, kphi_error *err);
/* Sweep axes: "350:550:10C" (from:to:step with one unit at the end or on each part),
 * or a comma list "100bar,200bar,300bar", or a single value. */
int kphi_case_set_sweep_T(kphi_case *c, const char *text, kphi_error *err);
int kphi_case_set_sweep_P(kphi_case *c, const char *text, kphi_error *err);

/* Check that the case is complete and in range: T and P given, feed with a positive sum
 * over the reacting species, T inside every species' data range. KPHI_EINPUT pointing at
 * the offending entry. */
int kphi_case_validate(const kphi_case *c, kphi_error *err);

double kphi_case_T(const kphi_case *c); /* K, NaN when not given */
double kphi_case_P(const kphi_case *c); /* Pa, NaN when not given */
/* Unit the user wrote T and P in ("C", "bar"), for display. Borrowed. */
const char *kphi_case_T_unit(const kphi_case *c);
const char *kphi_case_P_unit(const kphi_case *c);
/* Feed amounts, one per species of the set (0 for species not named). Borrowed. */
const double *kphi_case_feed(const kphi_case *c);
kphi_eos_model kphi_case_eos(const kphi_case *c);
int kphi_case_quantum(const kphi_case *c);

/* One binary interaction parameter in effect: the set's k_ij, each replaced by the case's
 * for the same pair, then the case's other pairs. source is the citation given with it
 * (borrowed; NULL when the case gave none); from_case 1 when it comes from the case. */
typedef struct {
    size_t i, j;        /* species indices in the set */
    double value;       /* at T_ref when dkdT is not 0 */
    double dkdT, T_ref; /* k_ij(T) = value + dkdT (T - T_ref); 0 and 298.15 K when constant */
    const char *source;
    int from_case;
    int from_file;      /* 1 when it comes from the k_ij file (reactions/kij.yaml) */
} kphi_case_kij_entry;

/* How many k_ij are in effect for the case's model, and entry m (KPHI_EINPUT when m is out
 * of range): first the k_ij file's entries for that model and pairs of the set (the file
 * kij.yaml beside the reaction set, or the case's `kij_file`; `kij_file: none` for
 * none), each replaced by the set's k_ij for the same pair, each of those by the case's.
 * The same values kphi_case_make_eos() applies to a cubic model. */
size_t kphi_case_n_kij(const kphi_case *c);
int kphi_case_kij(const kphi_case *c, size_t m, kphi_case_kij_entry *out);

/* The k_ij file the case uses (NULL when none). Borrowed. */
const kphi_kij_db *kphi_case_kij_db(const kphi_case *c);

/* Build the mixture model for this case with the given model: species constants, k_ij
 * from the k_ij file (entries of that model), then the set, then the case, quantum
 * option. Caller frees with kphi_eos_free().
 * Errors: KPHI_EINPUT (missing critical constants), KPHI_ENOMEM. */
kphi_eos *kphi_case_make_eos(const kphi_case *c, kphi_eos_model model, kphi_error *err);

/* Sweep grid (from the case's `sweep` block or the overrides). When an axis is not
 * given it has one value, the case's T or P. Borrowed arrays, K and Pa. */
size_t kphi_case_sweep_n_T(const kphi_case *c);
const double *kphi_case_sweep_T(const kphi_case *c);
size_t kphi_case_sweep_n_P(const kphi_case *c);
const double *kphi_case_sweep_P(const kphi_case *c);
/* Unit each sweep axis was written in ("bar" for [150 bar, 200 bar], "C" for
 * 350:550:10C), for display; the case's T or P unit when the axis is not given. Borrowed. */
const char *kphi_case_sweep_T_unit(const kphi_case *c);
const char *kphi_case_sweep_P_unit(const kphi_case *c);

/* ------------------------------------------------------------ the loop block
 * (src/case_loop.c; schema there and in README) */

#define KPHI_CASE_LOOP_MAX_BEDS 8

typedef enum {
    KPHI_CASE_MAKEUP_BASIS = 0, /* neither rate nor production: per 100 mol of make-up */
    KPHI_CASE_MAKEUP_RATE,      /* `rate`: mol/s of make-up */
    KPHI_CASE_MAKEUP_PRODUCTION /* `production`: kg/s of liquid product */
} kphi_case_makeup_flow;

/* A case's `loop` block in SI. */
typedef struct {
    const double *makeup;        /* composition as given (any basis), [n_species] */
    kphi_case_makeup_flow flow;
    double rate;                 /* mol/s (KPHI_CASE_MAKEUP_RATE) */
    double production;           /* kg/s (KPHI_CASE_MAKEUP_PRODUCTION) */
    int makeup_at_separator;     /* 1: the make-up joins before the separator */
    int adiabatic;               /* 1: adiabatic beds from T_in; 0: isothermal at T_out */
    double T_out;                /* K */
    size_t n_beds;
    double T_in[KPHI_CASE_LOOP_MAX_BEDS]; /* K */
    double approach;             /* K, >= 0 */
    double T_sep;                /* K */
    double P_sep;                /* Pa; NaN: the loop pressure (the case's P) */
    int purge_inerts;            /* 1: purge solved for inerts_target */
    double purge_fraction;       /* of the separator vapour, 0..1 */
    double inerts_target;        /* inert mole fraction at the converter inlet */
} kphi_case_loop;

/* The case's loop block, or NULL when it has none. Borrowed, valid while c lives. */
const kphi_case_loop *kphi_case_get_loop(const kphi_case *c);
/* Overrides from `kphi loop`: --T sets the converter outlet T (or the first bed's inlet
 * T); --purge "2%" the purge fraction, "inerts=12%" an inert target. KPHI_EINPUT at
 * <command line>, also when the case has no loop block. */
int kphi_case_set_loop_T(kphi_case *c, const char *text, kphi_error *err);
int kphi_case_set_purge(kphi_case *c, const char *text, kphi_error *err);
/* Check the loop block against the case: separator colder than the converter and not
 * above the loop pressure, purge and inert level within 0..100 %. KPHI_EINPUT pointing at
 * the value (also when there is no loop block). */
int kphi_case_validate_loop(const kphi_case *c, kphi_error *err);
/* The grid of a loop sweep: the sweep's T axis read as converter temperatures (the outlet
 * of an isothermal converter, the first bed's inlet of adiabatic beds; without a T axis,
 * the loop block's one) and its P axis as loop pressures (without one, the case's P).
 * Borrowed arrays, K and Pa. Checks every value: a converter temperature above the
 * separator's and inside every species' data range (at T + approach for an isothermal
 * converter), a loop pressure below the ceiling and above the separator's pressure drop
 * (case P - separator P, held over the grid). KPHI_EINPUT pointing at the axis value, or
 * at the case when it has no loop block. */
int kphi_case_loop_grid(const kphi_case *c, const double **T, size_t *nT, const double **P,
                        size_t *nP, kphi_error *err);

#ifdef __cplusplus
}
#endif
#endif /* KPHI_CASE_H */
