/* kphi species: the data of one chemical species and the database that holds them.
 *
 * A database is loaded from a YAML file (reactions/species.yaml). Each species has its
 * elemental formula, molar mass (computed from IUPAC standard atomic weights), ideal-gas
 * thermochemistry as NASA 7-coefficient two-range polynomials (McBride, Gordon & Reno
 * 1993, NASA TM-4513, eq. 1-3 for the form), critical constants for the equations of
 * state, optional Beattie-Bridgeman (1928) constants, and the published source of every
 * value. Units in the YAML file: Tc in K, Pc in bar, Vc in cm3/mol, T ranges in K, the
 * Beattie-Bridgeman constants in the units the block names; in this API everything is SI. */
#ifndef KPHI_SPECIES_H
#define KPHI_SPECIES_H

#include <stddef.h>

#include "kphi/error.h"

#ifdef __cplusplus
extern "C" {
#endif

#define KPHI_SPECIES_NAME_MAX 24 /* bytes, with the terminating NUL */
#define KPHI_SPECIES_MAX_ELEMENTS 6
#define KPHI_ELEMENT_NAME_MAX 4

typedef enum { KPHI_PHASE_GAS = 0, KPHI_PHASE_CONDENSED } kphi_phase;

#define KPHI_SPECIES_MAX_ALPHA 4 /* alpha functions per species (one per cubic model) */

/* Forms of the cubic's temperature function alpha(Tr) other than the model's own. */
typedef enum {
    KPHI_ALPHA_MATHIAS_COPEMAN = 1 /* Mathias & Copeman (1983): alpha^1/2 = 1 + c1 q + c2 q^2
                                      + c3 q^3, q = 1 - Tr^1/2, for Tr < 1; 1 + c1 q above */
} kphi_alpha_form;

/* An alpha function for one cubic model. */
typedef struct {
    char model[8];        /* "pr", "srk" (the model name of kphi_eos_model_name()) */
    kphi_alpha_form form;
    size_t n_c;           /* constants used: 3 (Mathias-Copeman) */
    double c[3];
    const char *source;   /* full citation; borrowed from the db */
    kphi_mark mark;       /* where the entry is in the file */
} kphi_alpha_spec;

/* Published name of an alpha form, "Mathias-Copeman 1983". Borrowed, static. */
const char *kphi_alpha_form_name(kphi_alpha_form form);

/* One species. A plain record: owned by its database (or copied into a reaction set). */
typedef struct {
    char name[KPHI_SPECIES_NAME_MAX];
    kphi_phase phase; /* condensed species (C(gr)) serve only as element references */
    size_t n_elements;
    char element[KPHI_SPECIES_MAX_ELEMENTS][KPHI_ELEMENT_NAME_MAX]; /* "N", "Ar", ... */
    double count[KPHI_SPECIES_MAX_ELEMENTS];                        /* atoms per molecule */
    double molar_mass;                                              /* kg/mol */

    /* NASA 7-coefficient polynomials: Cp/R = a1 + a2 T + a3 T^2 + a4 T^3 + a5 T^4,
     * H/RT = a1 + a2 T/2 + a3 T^2/3 + a4 T^3/4 + a5 T^4/5 + a6/T,
     * S/R = a1 ln T + a2 T + a3 T^2/2 + a4 T^3/3 + a5 T^4/4 + a7.
     * low[] holds on [T_low, T_mid], high[] on [T_mid, T_high]. H is on the scale where
     * elements in their reference state have H(298.15 K) = 0, so H(298.15) = dfH. */
    double T_low, T_mid, T_high; /* K */
    double low[7], high[7];

    int has_critical;   /* 1 when Tc, Pc, omega are given */
    double Tc;          /* K */
    double Pc;          /* Pa */
    double omega;       /* acentric factor, - */
    double Vc;          /* m3/mol, 0 when not given */
    double Zc;          /* -, 0 when not given */
    double dipole;      /* debye, 0 when not given */

    int has_quantum;    /* effective critical constants for quantum gases (H2, He, Ne) */
    double q_Tc0, q_Pc0, q_c1, q_c2; /* K, Pa, K, K: Tc = Tc0/(1 + c1/(M T)),
                                        Pc = Pc0/(1 + c2/(M T)), M in g/mol */

    int has_bb;         /* Beattie-Bridgeman (1928) constants (key `beattie_bridgeman`), SI: */
    double bb_A0;       /* Pa m6/mol2 */
    double bb_a, bb_B0, bb_b; /* m3/mol */
    double bb_c;        /* m3 K3/mol */

    size_t n_alpha;     /* alpha functions for particular models (key `alpha`) */
    kphi_alpha_spec alpha[KPHI_SPECIES_MAX_ALPHA];
    const char *src_thermo;   /* full citation of the thermo data; borrowed from db */
    const char *src_critical; /* full citation of the critical data; "" when none */
    const char *src_quantum;  /* full citation of the quantum-gas constants */
    const char *src_bb;       /* full citation of the Beattie-Bridgeman constants ("" or NULL
                                 when none) */
    const char *src_dfH;      /* citation of a chosen enthalpy of formation, or NULL */
    double dfH_shift;         /* J/mol added to H by that choice (0 when none) */
    const char *note;         /* free text from the file (e.g. "from memory"), or "" */

    const char *path; /* file the species was read from; borrowed */
    kphi_mark mark;   /* where its entry starts in that file */
} kphi_species;

typedef struct kphi_species_db kphi_species_db;

/* Load a species database. Caller frees with kphi_species_db_free(). Errors: KPHI_EIO
 * (cannot open), KPHI_EINPUT (bad YAML, unknown key, bad element, inconsistent ranges;
 * err names file:line:column), KPHI_ENOMEM. */
kphi_species_db *kphi_species_db_load_file(const char *path, kphi_error *err);

/* Same, from a string in memory; `name` is used as the path in messages. */
kphi_species_db *kphi_species_db_load_string(const char *text, size_t len, const char *name,
                                             kphi_error *err);

void kphi_species_db_free(kphi_species_db *db); /* NULL is allowed */

size_t kphi_species_db_count(const kphi_species_db *db);

/* Species i (0 <= i < count), in file order. Borrowed, valid while db lives. */
const kphi_species *kphi_species_db_get(const kphi_species_db *db, size_t i);

/* Species by exact name, or NULL. Borrowed, valid while db lives. */
const kphi_species *kphi_species_db_find(const kphi_species_db *db, const char *name);

/* The closest name to `name` (edit distance, case-insensitive) when it is close enough
 * to suggest ("did you mean"), else NULL. Borrowed. */
const char *kphi_species_db_suggest(const kphi_species_db *db, const char *name);

/* Full citation for a source key used in the file, or NULL. */
const char *kphi_species_db_source(const kphi_species_db *db, const char *key);

/* Atoms of `element` per molecule of sp (0 when absent). */
double kphi_species_atoms(const kphi_species *sp, const char *element);

/* Molar mass in kg/mol of a formula given by element symbols and counts, from IUPAC
 * standard atomic weights. Returns KPHI_EINPUT for an unknown element. */
int kphi_species_molar_mass(size_t n, const char element[][KPHI_ELEMENT_NAME_MAX],
                            const double count[], double *M, kphi_error *err);

/* ------------------------------------------------- binary interaction parameters
 * (src/species_kij.c): the k_ij file, reactions/kij.yaml. */

/* One k_ij of the file: k_ij(T) = value + dkdT (T - T_ref) for model `model`. */
typedef struct {
    char model[8];                       /* "rk", "srk", "pr" */
    char a[KPHI_SPECIES_NAME_MAX], b[KPHI_SPECIES_NAME_MAX]; /* the pair */
    double value;                        /* at T_ref */
    double dkdT;                         /* 1/K, 0 when not given */
    double T_ref;                        /* K, 298.15 when not given */
    const char *source;                  /* full citation; borrowed from the db */
    const char *note;                    /* "" when none; borrowed */
    kphi_mark mark;                      /* where the entry is in the file */
} kphi_kij_entry;

typedef struct kphi_kij_db kphi_kij_db;

/* Load a k_ij file. names (may be NULL) is a species database the pairs are checked
 * against. Caller frees with kphi_kij_db_free(). Errors (file:line:column): KPHI_EIO,
 * KPHI_EINPUT (unknown key, model, species or source; a pair given twice for one model;
 * |k| >= 1), KPHI_ENOMEM. */
kphi_kij_db *kphi_kij_db_load_file(const char *path, const kphi_species_db *names,
                                   kphi_error *err);
void kphi_kij_db_free(kphi_kij_db *db); /* NULL is allowed */
size_t kphi_kij_db_count(const kphi_kij_db *db);           /* 0 for NULL */
const kphi_kij_entry *kphi_kij_db_get(const kphi_kij_db *db, size_t m); /* borrowed */
const char *kphi_kij_db_path(const kphi_kij_db *db);       /* borrowed */
/* k_ij of an entry at T (K). */
double kphi_kij_entry_value(const kphi_kij_entry *e, double T);

#ifdef __cplusplus
}
#endif
#endif /* KPHI_SPECIES_H */
