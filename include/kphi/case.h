/* kphi case: a converter point or sweep a user runs: reaction set, feed, T, P, EOS,
 * options and sweep grid, read from YAML and overridable from the command line.
 *
 * Case files (see cases/ammonia_converter.yaml):
 *   reactions: ../reactions/ammonia.yaml   # relative to the case file
 *   feed: {H2: 72.0, N2: 24.0, CH4: 2.5, Ar: 1.5}
 *   T: 450 C
 *   P: 200 bar
 *   eos: pr                  # default pr
 *   quantum: false           # effective critical constants for H2, He
 *   kij: [{pair: [N2, H2], value: 0.0}]
 *   sweep: {T: {from: 380 C, to: 520 C, step: 10 C}, P: [100 bar, 150 bar]}
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
    double value;
    const char *source;
    int from_case;
} kphi_case_kij_entry;

/* How many k_ij are in effect, and entry m (KPHI_EINPUT when m is out of range). The
 * same values kphi_case_make_eos() applies to a cubic model. */
size_t kphi_case_n_kij(const kphi_case *c);
int kphi_case_kij(const kphi_case *c, size_t m, kphi_case_kij_entry *out);

/* Build the mixture model for this case with the given model: species constants, k_ij
 * from the set then the case, quantum option. Caller frees with kphi_eos_free().
 * Errors: KPHI_EINPUT (missing critical constants), KPHI_ENOMEM. */
kphi_eos *kphi_case_make_eos(const kphi_case *c, kphi_eos_model model, kphi_error *err);

/* Sweep grid (from the case's `sweep` block or the overrides). When an axis is not
 * given it has one value, the case's T or P. Borrowed arrays, K and Pa. */
size_t kphi_case_sweep_n_T(const kphi_case *c);
const double *kphi_case_sweep_T(const kphi_case *c);
size_t kphi_case_sweep_n_P(const kphi_case *c);
const double *kphi_case_sweep_P(const kphi_case *c);

#ifdef __cplusplus
}
#endif
#endif /* KPHI_CASE_H */
