/* Internal: the reaction-set object and the loader state, shared by the three sources of
 * the rxnset module: src/rxnset.c (the loader: species, checks on each reaction, conversion,
 * k_ij, accessors), src/rxnset_parse.c (equation text to coefficients and back, and the
 * reactions derived from the element matrix) and src/rxnset_k.c (equilibrium-constant
 * correlations: their schema, the K bases, evaluation). Not part of the public API. */
#ifndef KPHI_RXNSET_INTERNAL_H
#define KPHI_RXNSET_INTERNAL_H

#include <stddef.h>

#include "kphi/error.h"
#include "kphi/rxnset.h"
#include "kphi/species.h"
#include "yamlutil.h"

enum { KPHI__RXNSET_MAX_REACTIONS = 32 }; /* reactions in one set */

/* Terms a K correlation may sum (src/rxnset_k.c holds their names and functions). */
enum { KPHI__K_NTERMS = 11 };
/* Forms of a correlation: what the sum of its terms is. */
typedef enum { KPHI__K_LN = 0, KPHI__K_LOG10, KPHI__K_RTLN } kphi__k_form;

struct kphi_rxnset_kcorr {
    char *name, *source, *note;
    char *per;                    /* species name, or NULL: per the equation as written */
    size_t reaction;              /* index of its reaction */
    kphi__k_form form;
    double R;                     /* J/(mol K), the RT ln K form only */
    double coef[KPHI__K_NTERMS];  /* 0 for terms not given */
    double T_min, T_max;          /* K */
    double P_std;                 /* Pa */
    double scale;                 /* s: ln K of the equation = s ln K stated (+ P term) */
    double dnu;                   /* of the equation as written */
};

struct kphi_rxnset {
    char *name;
    char *path;
    kphi_species_db *own_db; /* non-NULL when the set loaded its database */
    size_t n_species, n_reactions, n_elements, n_kij;
    kphi_species *species;   /* copies of the database records */
    const char **names;      /* species[i].name, for suggestions */
    kphi_mark *species_mark; /* entry in the set's `species` list */
    int *inert;
    double *nu; /* n_reactions x n_species, row-major */
    char **equation;
    kphi_mark *reaction_mark;
    int derived;
    char (*element)[KPHI_ELEMENT_NAME_MAX];
    double *atoms; /* n_elements x n_species, row-major */
    double *weights;
    char *conv_label;
    size_t *kij_i, *kij_j;
    double *kij;
    char **kij_src; /* [n_kij] the published source of each */
    kphi_rxnset_kcorr *kcorr; /* every K correlation, in file order */
    size_t n_kcorr;
    char **basis;             /* n_bases names; basis[0] is "tables" */
    size_t n_bases;
    long *kmap;               /* [n_bases * n_reactions]: index into kcorr, or -1 */
    int has_eos;              /* key `eos`: the recommended equation of state */
    kphi_eos_model eos;
    kphi_mark eos_mark;
};

/* State while loading. */
typedef struct {
    kphi__yaml *y;
    kphi_rxnset *set;
    const kphi_species_db *db;
    const char *species_default; /* species file when the set names none and has none
                                    beside it; NULL: none */
    size_t *first_reactant; /* per reaction: species of the first term left of '=' */
    size_t *order;          /* per reaction: species in the order written (n_species each) */
    size_t *n_order;        /* per reaction: terms written */
} kphi__rxnset_loader;

/* KPHI_ENOMEM "out of memory" at L's file; returns KPHI_ENOMEM. In src/rxnset.c. */
int kphi__rxnset_nomem(const kphi__rxnset_loader *L, kphi_error *err);

/* Parse the equation in scalar `node` into row j of L->set->nu (zeroed by the caller) and
 * record its terms in L->order / L->n_order and its first reactant in L->first_reactant.
 * Errors: KPHI_EINPUT pointing at the term (unknown species, bad coefficient, a species
 * twice, no '=', empty side). */
int kphi__rxnset_parse_equation(kphi__rxnset_loader *L, yaml_node_t *node, size_t j,
                                kphi_error *err);

/* "N2 + 3 H2 = 2 NH3" from row j of set->nu, terms in the order `ord` (n_ord entries).
 * Caller frees; NULL when out of memory. */
char *kphi__rxnset_equation_text(const kphi_rxnset *set, size_t j, const size_t *ord,
                                 size_t n_ord);

/* Read the list `node` of K correlations of reaction j (its coefficients already parsed
 * and checked) into L->set->kcorr. Errors: KPHI_EINPUT pointing at the entry (unknown
 * key or term, missing name, source, expression, P_standard or T_range, inverted range,
 * a 'per' species not in the reaction, a name given twice), KPHI_ENOMEM. In
 * src/rxnset_k.c. */
int kphi__rxnset_load_kcorr(kphi__rxnset_loader *L, yaml_node_t *node, size_t j,
                            kphi_error *err);

/* Build set->basis and set->kmap from set->kcorr once every reaction is loaded. */
int kphi__rxnset_build_bases(kphi__rxnset_loader *L, kphi_error *err);

/* Free the correlations and the bases of set. */
void kphi__rxnset_free_kcorr(kphi_rxnset *set);

/* Independent reactions from the null space of the element matrix (set->atoms); fills
 * set->nu, set->reaction_mark, set->equation (allocated here, entries NULL) and
 * set->n_reactions. Errors point at species_node: KPHI_EINPUT when no reaction is possible
 * or there are more than KPHI__RXNSET_MAX_REACTIONS; KPHI_ENOMEM. */
int kphi__rxnset_derive_reactions(kphi__rxnset_loader *L, yaml_node_t *species_node,
                                  kphi_error *err);

#endif /* KPHI_RXNSET_INTERNAL_H */
