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

#include "kphi/eos.h"
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
 * species, conversion species not a reactant, a bad K correlation: unknown term, missing
 * source, inverted range, ...), KPHI_ENOMEM. */
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
/* Element balance of amounts b against amounts a (mol, [n_species] each):
 * max_k |b_k - a_k| / max_k a_k with x_k = sum_i atoms(k, i) x_i (divided by 1 when a holds
 * no atoms). */
double kphi_rxnset_balance_error(const kphi_rxnset *set, const double a[], const double b[]);

/* The headline conversion (key `conversion`: one species, "N2", or a list whose amounts
 * are summed, [CO, CO2] for carbon oxides in methanol synthesis):
 *   X = 1 - sum_i w_i n_i / sum_i w_i n0_i,
 * with w_i = 1 for the listed species and 0 otherwise. Weights: [n_species], borrowed.
 * Label: "N2" or "CO+CO2", borrowed. Defaults to the first reactant of reaction 1. */
const double *kphi_rxnset_conversion_weights(const kphi_rxnset *set);
const char *kphi_rxnset_conversion_label(const kphi_rxnset *set);

/* The equation of state the set recommends (key `eos`, e.g. eos: bbv): 1 and *model when
 * the set names one, else 0. Cases that name no model use it (kphi_case_eos()). The
 * loader checks that the model can be built for every species of the set (bb and bbv need
 * Beattie-Bridgeman constants). at (may be NULL) receives where the key is in the file. */
int kphi_rxnset_eos(const kphi_rxnset *set, kphi_eos_model *model, kphi_mark *at);

/* Binary interaction parameters given in the set (key `kij`). */
size_t kphi_rxnset_n_kij(const kphi_rxnset *set);
void kphi_rxnset_kij(const kphi_rxnset *set, size_t m, size_t *i, size_t *j, double *kij);
/* The published source given with k_ij number m (borrowed, valid while set lives). */
const char *kphi_rxnset_kij_source(const kphi_rxnset *set, size_t m);

/* ------------------------------------------------ equilibrium-constant correlations
 * (src/rxnset_k.c)
 *
 * A reaction written as a mapping may carry published correlations of its equilibrium
 * constant beside the K that kphi computes from the species' thermochemistry:
 *
 *   reactions:
 *     - equation: CO + 2 H2 = CH3OH
 *       K:
 *         - name: graaf1986                    # the basis this correlation belongs to
 *           source: "Graaf et al. (1986), Chem. Eng. Sci. 41, 2883, eq. 11"
 *           log10 K: {1/T: 5139, const: -12.621}   # or 'ln K', or 'RT ln K' with R
 *           P_standard: 1 bar                  # the standard pressure K refers to
 *           T_range: [473.15 K, 543.15 K]      # validity range
 *           per: equation                      # or a species: per mole of it
 *           note: "where the digits were seen"
 *
 * Terms of the sum: const, 1/T, 1/T^2, T, T^2, T^3, T^4, T^5, ln T, log10 T, T ln T (T in
 * K). 'RT ln K' (J/mol) needs 'R', the gas constant the coefficients were fitted with.
 * Correlations of the same name on different reactions form one K basis. Basis 0 is
 * "tables": K = exp(-sum_i nu_i g_i°(T)/RT) from the species' polynomials; bases 1 .. n-1
 * are the correlation names in the order they first appear in the file. A reaction with
 * no correlation in a basis keeps its tables K there. */

#define KPHI_K_TABLES 0 /* the basis index of K from the species' thermochemistry */

typedef struct kphi_rxnset_kcorr kphi_rxnset_kcorr;

/* Number of K bases, tables included (>= 1). */
size_t kphi_rxnset_n_K_bases(const kphi_rxnset *set);
/* Name of basis b ("tables" for 0), NULL when b is out of range. Borrowed. */
const char *kphi_rxnset_K_basis_name(const kphi_rxnset *set, size_t b);
/* Index of the basis called name ("tables" is 0), or -1. */
long kphi_rxnset_K_basis_find(const kphi_rxnset *set, const char *name);
/* Closest basis name for "did you mean", or NULL. Borrowed. */
const char *kphi_rxnset_K_basis_suggest(const kphi_rxnset *set, const char *name);
/* The correlation of reaction j in basis b; NULL for tables, or when reaction j has none
 * in b. Borrowed, valid while set lives. */
const kphi_rxnset_kcorr *kphi_rxnset_kcorr_get(const kphi_rxnset *set, size_t j, size_t b);

const char *kphi_rxnset_kcorr_name(const kphi_rxnset_kcorr *k);   /* borrowed */
const char *kphi_rxnset_kcorr_source(const kphi_rxnset_kcorr *k); /* borrowed */
const char *kphi_rxnset_kcorr_note(const kphi_rxnset_kcorr *k);   /* "" when none */
/* Species the correlation is per mole of, or NULL when it is per the equation as
 * written. Borrowed. */
const char *kphi_rxnset_kcorr_per(const kphi_rxnset_kcorr *k);
/* Validity range, K. */
void kphi_rxnset_kcorr_range(const kphi_rxnset_kcorr *k, double *T_min, double *T_max);
/* 1 when T_min <= T <= T_max. */
int kphi_rxnset_kcorr_in_range(const kphi_rxnset_kcorr *k, double T);
/* Standard pressure the stated K refers to, Pa. */
double kphi_rxnset_kcorr_P_standard(const kphi_rxnset_kcorr *k);
/* ln K of the reaction as written in the set, standard pressure P° = 1 bar, at T (K):
 *   ln K = s L(T) + dnu ln(P_standard / P°),
 * L the stated ln K (its sum times 1, ln 10 or 1/(R T)), s = 1 per equation or |nu_k|
 * per mole of species k, dnu of the equation as written
 * (K_bar = K_std (P_std/P°)^dnu, since K = prod (f_i/P_std)^nu_i). Any T > 0. */
double kphi_rxnset_kcorr_lnK(const kphi_rxnset_kcorr *k, double T);
/* ln K as the correlation states it (per its `per`, at its standard pressure). */
double kphi_rxnset_kcorr_lnK_stated(const kphi_rxnset_kcorr *k, double T);
/* The correlation's van 't Hoff heat of the reaction as written, J/mol:
 *   dH = -R d ln K / d(1/T) = R T^2 d ln K / dT,  R = KPHI_R. */
double kphi_rxnset_kcorr_dH(const kphi_rxnset_kcorr *k, double T);
/* The expression as text, "log10 K = 5139/T - 12.621", into buf of size n; returns the
 * length it wanted, as snprintf does. */
int kphi_rxnset_kcorr_text(const kphi_rxnset_kcorr *k, char *buf, size_t n);

#ifdef __cplusplus
}
#endif
#endif /* KPHI_RXNSET_H */
