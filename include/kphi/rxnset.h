/* kphi rxnset: a reaction set: its species, its independent reactions, and which
 * species' conversion is the headline.
 *
 * Loaded from YAML (see reactions/ammonia.yaml). Equations are parsed from text
 * ("N2 + 3 H2 = 2 NH3"); each reaction is checked for atom balance and the set for
 * linear independence (rank of the stoichiometric matrix, by singular values). Species
 * listed but in no reaction are inert. A set with species and no reactions gets an
 * independent set derived from the null space of the element matrix (Smith & Missen 1982,
 * "Chemical Reaction Equilibrium Analysis", ch. 2). Species data come from a species
 * database: the file named by the key `species_file` (relative to the set), else
 * `species.yaml` beside the set, else the caller's default
 * (kphi_rxnset_load_file_default()). */
#ifndef KPHI_RXNSET_H
#define KPHI_RXNSET_H

#include <stddef.h>

#include "kphi/error.h"
#include "kphi/species.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef struct kphi_rxnset kphi_rxnset;

/* Load a reaction set. When db is NULL the set loads (and owns) its species database;
 * otherwise db is borrowed and must outlive the set. Caller frees with
 * kphi_rxnset_free(). Errors (err names file:line:column): KPHI_EIO, KPHI_EINPUT (bad
 * YAML, unknown key or species, unbalanced, duplicate or dependent reaction, condensed
 * species, conversion species not a reactant), KPHI_ENOMEM. */
kphi_rxnset *kphi_rxnset_load_file(const char *path, const kphi_species_db *db,
                                   kphi_error *err);
/* As kphi_rxnset_load_file(); with db NULL, a set that has no `species_file` key and no
 * species.yaml beside it loads its species from the file species_default (NULL: none;
 * the error then names the missing species.yaml beside the set). */
kphi_rxnset *kphi_rxnset_load_file_default(const char *path, const kphi_species_db *db,
                                           const char *species_default, kphi_error *err);

/* Same from a string; `name` stands for the path in messages. db must not be NULL unless
 * the text names a species_file with an absolute path. */
kphi_rxnset *kphi_rxnset_load_string(const char *text, size_t len, const char *name,
                                     const kphi_species_db *db, kphi_error *err);

void kphi_rxnset_free(kphi_rxnset *set); /* NULL is allowed */

const char *kphi_rxnset_name(const kphi_rxnset *set); /* borrowed */
const char *kphi_rxnset_path(const kphi_rxnset *set); /* borrowed */

size_t kphi_rxnset_n_species(const kphi_rxnset *set);
/* Species i in the order of the file's `species` list. Borrowed, valid while set lives. */
const kphi_species *kphi_rxnset_species(const kphi_rxnset *set, size_t i);
/* Index of a species by name, or -1. */
long kphi_rxnset_species_index(const kphi_rxnset *set, const char *name);
/* Closest species name for "did you mean", or NULL. Borrowed. */
const char *kphi_rxnset_suggest(const kphi_rxnset *set, const char *name);
/* 1 when species i takes part in no reaction. */
int kphi_rxnset_is_inert(const kphi_rxnset *set, size_t i);

size_t kphi_rxnset_n_reactions(const kphi_rxnset *set);
/* Stoichiometric coefficient of species i in reaction j (products > 0). */
double kphi_rxnset_nu(const kphi_rxnset *set, size_t j, size_t i);
/* Row-major n_reactions x n_species matrix of nu. Borrowed. */
const double *kphi_rxnset_nu_matrix(const kphi_rxnset *set);
/* Sum of nu over the gas species of reaction j (delta nu). */
double kphi_rxnset_dnu(const kphi_rxnset *set, size_t j);
/* The first product of reaction 1 (NH3, CH3OH): the species reports and charts show as
 * "the product" (equilibrium curve, adiabatic outlet line). -1 when the set has no
 * reaction. */
long kphi_rxnset_first_product(const kphi_rxnset *set);
/* Equation as text in a canonical spelling, "N2 + 3 H2 = 2 NH3". Borrowed. */
const char *kphi_rxnset_equation(const kphi_rxnset *set, size_t j);
/* 1 when the reactions were derived from the element matrix, not written in the file. */
int kphi_rxnset_derived(const kphi_rxnset *set);

/* Elements present in the set's species, in first-seen order. */
size_t kphi_rxnset_n_elements(const kphi_rxnset *set);
const char *kphi_rxnset_element(const kphi_rxnset *set, size_t k);
/* Atoms of element k in species i. */
double kphi_rxnset_atoms(const kphi_rxnset *set, size_t k, size_t i);

/* The headline conversion (key `conversion`: one species, "N2", or a list whose amounts
 * are summed, [CO, CO2] for carbon oxides in methanol synthesis):
 *   X = 1 - sum_i w_i n_i / sum_i w_i n0_i,
 * with w_i = 1 for the listed species and 0 otherwise. Weights: [n_species], borrowed.
 * Label: "N2" or "CO+CO2", borrowed. Defaults to the first reactant of reaction 1. */
const double *kphi_rxnset_conversion_weights(const kphi_rxnset *set);
const char *kphi_rxnset_conversion_label(const kphi_rxnset *set);

/* Binary interaction parameters given in the set (key `kij`). */
size_t kphi_rxnset_n_kij(const kphi_rxnset *set);
void kphi_rxnset_kij(const kphi_rxnset *set, size_t m, size_t *i, size_t *j, double *kij);
/* The published source given with k_ij number m (borrowed, valid while set lives). */
const char *kphi_rxnset_kij_source(const kphi_rxnset *set, size_t m);

#ifdef __cplusplus
}
#endif
#endif /* KPHI_RXNSET_H */
