/* kphi species: the species database and its YAML loader.
 *
 * Concept: one record per chemical species with its elemental formula, molar mass,
 * ideal-gas NASA 7-coefficient polynomials (McBride, Gordon & Reno 1993, NASA TM-4513,
 * eqs. 1-3 for the form), critical constants for the equations of state, optional
 * effective critical constants for quantum gases, and the full citation of every value.
 *
 * Molar mass: M = sum_e n_e A_e / 1000 kg/mol, with A_e the conventional standard
 * atomic weights of IUPAC 2013 (Meija et al. 2016, Pure Appl. Chem. 88, 265-291,
 * Table 3; "conventional values" for the elements given as intervals).
 *
 * Units: the file gives T in K, Pc and Pc0 in bar, Vc in cm3/mol, the Beattie-Bridgeman
 * constants in atm-L or kPa-m3 units as the block says (see the header of
 * reactions/species.yaml); they are converted here to Pa and m3/mol. Every error is
 * KPHI_EINPUT (or KPHI_EIO / KPHI_ENOMEM) with the file, line and column of the
 * offending node. */
#include "kphi/species.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "internal.h"
#include "yamlutil.h"

enum { MAX_SOURCES = 64 };

static const double BAR = 1.0e5;     /* Pa per bar */
static const double CM3 = 1.0e-6;    /* m3 per cm3 */

/* IUPAC 2013 conventional standard atomic weights, g/mol (Meija et al. 2016, Table 3).
 * H, C, N, O, S, Cl are given by IUPAC as intervals; the conventional values are used. */
static const struct {
    const char *symbol;
    double weight;
} ATOMIC_WEIGHTS[] = {
    {"H", 1.008},      {"He", 4.002602}, {"C", 12.011},    {"N", 14.007},
    {"O", 15.999},     {"F", 18.998403163}, {"Ne", 20.1797}, {"S", 32.06},
    {"Cl", 35.45},     {"Ar", 39.948},   {"Kr", 83.798},   {"Xe", 131.293},
};
#define N_ELEMENTS (sizeof ATOMIC_WEIGHTS / sizeof ATOMIC_WEIGHTS[0])

struct kphi_species_db {
    size_t n;
    kphi_species *sp;
    const char **names; /* sp[i].name, for kphi__closest */
    char **notes;       /* owned note strings (NULL when none) */
    size_t n_src;
    char *src_key[MAX_SOURCES];
    char *src_text[MAX_SOURCES];
    char *path; /* owned copy of the file name */
};

static const char *const ROOT_KEYS[] = {"sources", "species"};
static const char *const SPECIES_KEYS[] = {"name",    "elements", "phase", "thermo",
                                           "critical", "quantum", "alpha", "beattie_bridgeman",
                                           "note"};
static const char *const BB_KEYS[] = {"units", "A0", "a", "B0", "b", "c", "source", "note"};
/* Units of a `beattie_bridgeman` block and their factors to SI: A0 to Pa m6/mol2, the
 * volumes a, B0, b to m3/mol, c to m3 K3/mol. atm-L: A0 in atm L2/mol2, a, B0, b in L/mol,
 * c in L K3/mol (Beattie & Bridgeman's own units, 1 atm = 101325 Pa); kPa-m3: A0 in kPa
 * m6/kmol2, a, B0, b in m3/kmol, c in m3 K3/kmol (the units of engineering tables). */
static const char *const BB_UNITS[] = {"atm-L", "kPa-m3"};
static const double BB_A0_SI[] = {101325.0 * 1e-6, 1e3 * 1e-6};
static const double BB_VOL_SI = 1e-3; /* L/mol and m3/kmol alike */
static const char *const ALPHA_KEYS[] = {"eos", "form", "c", "source", "note"};
static const char *const ALPHA_FORMS[] = {"mathias-copeman"};
static const char *const ALPHA_MODELS[] = {"pr", "srk"};
static const char *const THERMO_KEYS[] = {"source", "T_range", "low", "high", "dfH", "dfH_source"};
static const char *const CRITICAL_KEYS[] = {"Tc", "Pc", "Vc", "Zc", "omega", "dipole", "source"};
static const char *const QUANTUM_KEYS[] = {"Tc0", "Pc0", "c1", "c2", "source"};
#define NKEYS(a) (sizeof(a) / sizeof((a)[0]))

/* The same symbols as ATOMIC_WEIGHTS, as the plain list kphi__closest takes. */
static const char *const ELEMENT_SYMBOLS[] = {"H", "He", "C", "N", "O", "F",
                                              "Ne", "S", "Cl", "Ar", "Kr", "Xe"};
_Static_assert(sizeof ELEMENT_SYMBOLS / sizeof ELEMENT_SYMBOLS[0] == N_ELEMENTS,
               "ELEMENT_SYMBOLS must list the symbols of ATOMIC_WEIGHTS");

static int element_weight(const char *symbol, double *w)
{
    for (size_t i = 0; i < N_ELEMENTS; i++)
        if (strcmp(symbol, ATOMIC_WEIGHTS[i].symbol) == 0) {
            *w = ATOMIC_WEIGHTS[i].weight;
            return 1;
        }
    return 0;
}

int kphi_species_molar_mass(size_t n, const char element[][KPHI_ELEMENT_NAME_MAX],
                            const double count[], double *M, kphi_error *err)
{
    kphi_mark none = {0, 0};
    double sum = 0.0;
    for (size_t i = 0; i < n; i++) {
        double w;
        if (!element_weight(element[i], &w)) {
            const char *near = kphi__closest(element[i], ELEMENT_SYMBOLS, N_ELEMENTS);
            if (near != NULL)
                return kphi_error_set(err, KPHI_EINPUT, NULL, none,
                                      "unknown element '%s' (did you mean '%s'?)", element[i],
                                      near);
            return kphi_error_set(err, KPHI_EINPUT, NULL, none,
                                  "unknown element '%s'; known: H He C N O F Ne S Cl Ar Kr Xe",
                                  element[i]);
        }
        sum += count[i] * w;
    }
    *M = sum * 1.0e-3;
    return KPHI_OK;
}

/* ---- loader --------------------------------------------------------------------- */

typedef struct {
    kphi__yaml *y;
    kphi_species_db *db;
    kphi_error *err;
} loader;

static int need(loader *L, yaml_node_t *map, const char *key, const char *what,
                yaml_node_t **out)
{
    *out = kphi__yaml_map_get(L->y, map, key, NULL);
    if (*out == NULL)
        return kphi__yaml_error(L->y, map, KPHI_EINPUT, L->err, "missing key '%s' in %s", key,
                                what);
    return KPHI_OK;
}

static int load_sources(loader *L, yaml_node_t *map)
{
    int rc = kphi__yaml_expect(L->y, map, YAML_MAPPING_NODE, "'sources'", L->err);
    if (rc != KPHI_OK)
        return rc;
    for (yaml_node_pair_t *p = map->data.mapping.pairs.start; p < map->data.mapping.pairs.top;
         p++) {
        yaml_node_t *k = kphi__yaml_node(L->y, p->key);
        yaml_node_t *v = kphi__yaml_node(L->y, p->value);
        const char *key = kphi__yaml_scalar(k);
        if (key == NULL || key[0] == '\0')
            return kphi__yaml_error(L->y, k, KPHI_EINPUT, L->err,
                                    "a source key must be a plain name");
        for (size_t i = 0; i < L->db->n_src; i++)
            if (strcmp(L->db->src_key[i], key) == 0)
                return kphi__yaml_error(L->y, k, KPHI_EINPUT, L->err,
                                        "source '%s' given twice in 'sources'", key);
        const char *text = kphi__yaml_scalar(v);
        if (text == NULL)
            return kphi__yaml_expect(L->y, v, YAML_SCALAR_NODE, "a source citation", L->err);
        if (text[0] == '\0')
            return kphi__yaml_error(L->y, v, KPHI_EINPUT, L->err,
                                    "empty citation for source '%s'", key);
        if (L->db->n_src >= MAX_SOURCES)
            return kphi__yaml_error(L->y, k, KPHI_EINPUT, L->err,
                                    "too many sources (at most %d)", MAX_SOURCES);
        char *ck = strdup(key), *ct = strdup(text);
        if (ck == NULL || ct == NULL) {
            free(ck);
            free(ct);
            return kphi__yaml_error(L->y, k, KPHI_ENOMEM, L->err, "out of memory");
        }
        L->db->src_key[L->db->n_src] = ck;
        L->db->src_text[L->db->n_src] = ct;
        L->db->n_src++;
    }
    return KPHI_OK;
}

/* Resolve a `source: KEY` node to its citation (owned by the db). */
static int resolve_source(loader *L, yaml_node_t *node, const char **out)
{
    const char *key = kphi__yaml_scalar(node);
    if (key == NULL)
        return kphi__yaml_expect(L->y, node, YAML_SCALAR_NODE, "'source'", L->err);
    for (size_t i = 0; i < L->db->n_src; i++)
        if (strcmp(L->db->src_key[i], key) == 0) {
            *out = L->db->src_text[i];
            return KPHI_OK;
        }
    const char *near = kphi__closest(key, (const char *const *)L->db->src_key, L->db->n_src);
    if (near != NULL)
        return kphi__yaml_error(L->y, node, KPHI_EINPUT, L->err,
                                "unknown source '%s' (did you mean '%s'?); sources are "
                                "defined under 'sources'",
                                key, near);
    return kphi__yaml_error(L->y, node, KPHI_EINPUT, L->err,
                            "unknown source '%s'; sources are defined under 'sources'", key);
}

static int get_number(loader *L, yaml_node_t *map, const char *key, const char *what,
                      int required, double *out, yaml_node_t **node_out)
{
    yaml_node_t *v = kphi__yaml_map_get(L->y, map, key, NULL);
    if (node_out != NULL)
        *node_out = v;
    if (v == NULL) {
        if (required)
            return kphi__yaml_error(L->y, map, KPHI_EINPUT, L->err, "missing key '%s' in %s",
                                    key, what);
        return KPHI_OK;
    }
    char label[96];
    snprintf(label, sizeof label, "'%s'", key);
    return kphi__yaml_double(L->y, v, label, out, L->err);
}

/* Read a list of exactly n numbers. */
static int number_list(loader *L, yaml_node_t *seq, const char *key, double out[], size_t n,
                       const char *what_n)
{
    char label[64];
    snprintf(label, sizeof label, "'%s'", key);
    int rc = kphi__yaml_expect(L->y, seq, YAML_SEQUENCE_NODE, label, L->err);
    if (rc != KPHI_OK)
        return rc;
    size_t got = (size_t)(seq->data.sequence.items.top - seq->data.sequence.items.start);
    if (got != n) {
        yaml_node_t *at = seq;
        if (got > n)
            at = kphi__yaml_node(L->y, seq->data.sequence.items.start[n]);
        return kphi__yaml_error(L->y, at, KPHI_EINPUT, L->err,
                                "expected %zu %s in '%s', found %zu", n, what_n, key, got);
    }
    for (size_t i = 0; i < n; i++) {
        yaml_node_t *item = kphi__yaml_node(L->y, seq->data.sequence.items.start[i]);
        char item_label[96];
        snprintf(item_label, sizeof item_label, "item %zu of '%s'", i + 1, key);
        rc = kphi__yaml_double(L->y, item, item_label, &out[i], L->err);
        if (rc != KPHI_OK)
            return rc;
    }
    return KPHI_OK;
}

static int load_elements(loader *L, yaml_node_t *map, kphi_species *sp)
{
    char what[64];
    snprintf(what, sizeof what, "'elements' of %s", sp->name);
    int rc = kphi__yaml_expect(L->y, map, YAML_MAPPING_NODE, what, L->err);
    if (rc != KPHI_OK)
        return rc;
    size_t n = (size_t)(map->data.mapping.pairs.top - map->data.mapping.pairs.start);
    if (n == 0)
        return kphi__yaml_error(L->y, map, KPHI_EINPUT, L->err,
                                "'elements' of %s is empty; expected e.g. {N: 1, H: 3}",
                                sp->name);
    if (n > KPHI_SPECIES_MAX_ELEMENTS)
        return kphi__yaml_error(L->y, map, KPHI_EINPUT, L->err,
                                "%s has %zu elements; at most %d are supported", sp->name, n,
                                KPHI_SPECIES_MAX_ELEMENTS);
    size_t i = 0;
    for (yaml_node_pair_t *p = map->data.mapping.pairs.start; p < map->data.mapping.pairs.top;
         p++, i++) {
        yaml_node_t *k = kphi__yaml_node(L->y, p->key);
        yaml_node_t *v = kphi__yaml_node(L->y, p->value);
        const char *sym = kphi__yaml_scalar(k);
        double w;
        if (sym == NULL || sym[0] == '\0')
            return kphi__yaml_error(L->y, k, KPHI_EINPUT, L->err,
                                    "an element must be a symbol such as 'N'");
        if (strlen(sym) >= KPHI_ELEMENT_NAME_MAX || !element_weight(sym, &w)) {
            const char *near = kphi__closest(sym, ELEMENT_SYMBOLS, N_ELEMENTS);
            if (near != NULL)
                return kphi__yaml_error(L->y, k, KPHI_EINPUT, L->err,
                                        "unknown element '%s' in %s (did you mean '%s'?)",
                                        sym, sp->name, near);
            return kphi__yaml_error(L->y, k, KPHI_EINPUT, L->err,
                                    "unknown element '%s' in %s; known: H He C N O F Ne S "
                                    "Cl Ar Kr Xe",
                                    sym, sp->name);
        }
        for (size_t j = 0; j < i; j++)
            if (strcmp(sp->element[j], sym) == 0)
                return kphi__yaml_error(L->y, k, KPHI_EINPUT, L->err,
                                        "element '%s' given twice in %s", sym, sp->name);
        double c;
        char label[64];
        snprintf(label, sizeof label, "the count of '%s'", sym);
        rc = kphi__yaml_double(L->y, v, label, &c, L->err);
        if (rc != KPHI_OK)
            return rc;
        if (!(c > 0.0))
            return kphi__yaml_error(L->y, v, KPHI_EINPUT, L->err,
                                    "the count of '%s' in %s must be positive, found %g", sym,
                                    sp->name, c);
        kphi__strlcpy(sp->element[i], sym, KPHI_ELEMENT_NAME_MAX);
        sp->count[i] = c;
    }
    sp->n_elements = n;
    const char(*symbols)[KPHI_ELEMENT_NAME_MAX] = (const char(*)[KPHI_ELEMENT_NAME_MAX])sp->element;
    return kphi_species_molar_mass(sp->n_elements, symbols, sp->count, &sp->molar_mass, L->err);
}

static int load_thermo(loader *L, yaml_node_t *map, kphi_species *sp)
{
    char what[64];
    snprintf(what, sizeof what, "'thermo' of %s", sp->name);
    int rc = kphi__yaml_check_keys(L->y, map, THERMO_KEYS, NKEYS(THERMO_KEYS), what, L->err);
    if (rc != KPHI_OK)
        return rc;
    yaml_node_t *src, *range, *low, *high;
    if ((rc = need(L, map, "source", what, &src)) != KPHI_OK ||
        (rc = need(L, map, "T_range", what, &range)) != KPHI_OK ||
        (rc = need(L, map, "low", what, &low)) != KPHI_OK ||
        (rc = need(L, map, "high", what, &high)) != KPHI_OK)
        return rc;
    if ((rc = resolve_source(L, src, &sp->src_thermo)) != KPHI_OK)
        return rc;
    double t[3];
    if ((rc = number_list(L, range, "T_range", t, 3, "temperatures (T_low, T_mid, T_high)")) !=
        KPHI_OK)
        return rc;
    if (!(t[0] > 0.0 && t[0] < t[1] && t[1] < t[2]))
        return kphi__yaml_error(L->y, range, KPHI_EINPUT, L->err,
                                "T_range of %s must be strictly increasing positive "
                                "temperatures [T_low, T_mid, T_high] in K, found [%g, %g, %g]",
                                sp->name, t[0], t[1], t[2]);
    sp->T_low = t[0];
    sp->T_mid = t[1];
    sp->T_high = t[2];
    if ((rc = number_list(L, low, "low", sp->low, 7, "coefficients a1..a7")) != KPHI_OK)
        return rc;
    if ((rc = number_list(L, high, "high", sp->high, 7, "coefficients a1..a7")) != KPHI_OK)
        return rc;
    /* Optional `dfH` (kJ/mol at 298.15 K) with `dfH_source`: a chosen enthalpy of formation
     * replaces the one the polynomials imply. Both a6 move by the same constant, so Cp and S
     * are untouched and H stays continuous at T_mid (McBride, Gordon & Reno 1993, eq. 2: a6
     * is the integration constant of H). */
    yaml_node_t *dfh_node = kphi__yaml_map_get(L->y, map, "dfH", NULL);
    yaml_node_t *dfh_src = kphi__yaml_map_get(L->y, map, "dfH_source", NULL);
    if ((dfh_node == NULL) != (dfh_src == NULL))
        return kphi__yaml_error(L->y, dfh_node != NULL ? dfh_node : dfh_src, KPHI_EINPUT, L->err,
                                "'dfH' and 'dfH_source' go together in %s", what);
    if (dfh_node != NULL) {
        double dfh;
        if ((rc = kphi__yaml_double(L->y, dfh_node, "dfH (kJ/mol)", &dfh, L->err)) != KPHI_OK)
            return rc;
        if ((rc = resolve_source(L, dfh_src, &sp->src_dfH)) != KPHI_OK)
            return rc;
        const double T = 298.15, R = 8.314462618;
        const double *a = sp->T_mid >= T ? sp->low : sp->high;
        double h_rt = a[0] + a[1] * T / 2 + a[2] * T * T / 3 + a[3] * T * T * T / 4 +
                      a[4] * T * T * T * T / 5 + a[5] / T;
        double shift = (dfh * 1e3 - h_rt * R * T) / R; /* K */
        sp->low[5] += shift;
        sp->high[5] += shift;
        sp->dfH_shift = shift * R;
    }
    return KPHI_OK;
}

static int load_critical(loader *L, yaml_node_t *map, kphi_species *sp)
{
    char what[64];
    snprintf(what, sizeof what, "'critical' of %s", sp->name);
    int rc = kphi__yaml_check_keys(L->y, map, CRITICAL_KEYS, NKEYS(CRITICAL_KEYS), what, L->err);
    if (rc != KPHI_OK)
        return rc;
    yaml_node_t *src, *node;
    if ((rc = need(L, map, "source", what, &src)) != KPHI_OK)
        return rc;
    if ((rc = resolve_source(L, src, &sp->src_critical)) != KPHI_OK)
        return rc;
    double Tc = 0, Pc = 0, omega = 0, Vc = 0, Zc = 0, dipole = 0;
    if ((rc = get_number(L, map, "Tc", what, 1, &Tc, &node)) != KPHI_OK)
        return rc;
    if (!(Tc > 0.0))
        return kphi__yaml_error(L->y, node, KPHI_EINPUT, L->err,
                                "Tc of %s must be a positive temperature in K, found %g",
                                sp->name, Tc);
    if ((rc = get_number(L, map, "Pc", what, 1, &Pc, &node)) != KPHI_OK)
        return rc;
    if (!(Pc > 0.0))
        return kphi__yaml_error(L->y, node, KPHI_EINPUT, L->err,
                                "Pc of %s must be a positive pressure in bar, found %g",
                                sp->name, Pc);
    if ((rc = get_number(L, map, "omega", what, 1, &omega, &node)) != KPHI_OK)
        return rc;
    if (!(omega > -1.0 && omega < 3.0))
        return kphi__yaml_error(L->y, node, KPHI_EINPUT, L->err,
                                "acentric factor of %s must lie between -1 and 3, found %g",
                                sp->name, omega);
    if ((rc = get_number(L, map, "Vc", what, 0, &Vc, &node)) != KPHI_OK)
        return rc;
    if (node != NULL && !(Vc > 0.0))
        return kphi__yaml_error(L->y, node, KPHI_EINPUT, L->err,
                                "Vc of %s must be a positive volume in cm3/mol, found %g",
                                sp->name, Vc);
    if ((rc = get_number(L, map, "Zc", what, 0, &Zc, &node)) != KPHI_OK)
        return rc;
    if (node != NULL && !(Zc > 0.0 && Zc < 1.0))
        return kphi__yaml_error(L->y, node, KPHI_EINPUT, L->err,
                                "Zc of %s must lie between 0 and 1, found %g", sp->name, Zc);
    if ((rc = get_number(L, map, "dipole", what, 0, &dipole, &node)) != KPHI_OK)
        return rc;
    if (node != NULL && !(dipole >= 0.0))
        return kphi__yaml_error(L->y, node, KPHI_EINPUT, L->err,
                                "dipole moment of %s must be >= 0 debye, found %g", sp->name,
                                dipole);
    sp->has_critical = 1;
    sp->Tc = Tc;
    sp->Pc = Pc * BAR;
    sp->omega = omega;
    sp->Vc = Vc * CM3;
    sp->Zc = Zc;
    sp->dipole = dipole;
    return KPHI_OK;
}

static int load_quantum(loader *L, yaml_node_t *map, kphi_species *sp)
{
    char what[64];
    snprintf(what, sizeof what, "'quantum' of %s", sp->name);
    int rc = kphi__yaml_check_keys(L->y, map, QUANTUM_KEYS, NKEYS(QUANTUM_KEYS), what, L->err);
    if (rc != KPHI_OK)
        return rc;
    yaml_node_t *src;
    if ((rc = need(L, map, "source", what, &src)) != KPHI_OK)
        return rc;
    if ((rc = resolve_source(L, src, &sp->src_quantum)) != KPHI_OK)
        return rc;
    const char *keys[4] = {"Tc0", "Pc0", "c1", "c2"};
    double v[4];
    for (int i = 0; i < 4; i++) {
        yaml_node_t *node;
        if ((rc = get_number(L, map, keys[i], what, 1, &v[i], &node)) != KPHI_OK)
            return rc;
        if (!(v[i] > 0.0))
            return kphi__yaml_error(L->y, node, KPHI_EINPUT, L->err,
                                    "%s of %s must be positive, found %g", keys[i], sp->name,
                                    v[i]);
    }
    sp->has_quantum = 1;
    sp->q_Tc0 = v[0];
    sp->q_Pc0 = v[1] * BAR;
    sp->q_c1 = v[2];
    sp->q_c2 = v[3];
    return KPHI_OK;
}

const char *kphi_alpha_form_name(kphi_alpha_form form)
{
    switch (form) {
    case KPHI_ALPHA_MATHIAS_COPEMAN:
        return "Mathias-Copeman 1983";
    }
    return "unknown";
}

/* alpha: [{eos: pr, form: mathias-copeman, c: [c1, c2, c3], source: KEY}, ...] */
static int load_alpha(loader *L, yaml_node_t *seq, kphi_species *sp)
{
    int rc = kphi__yaml_expect(L->y, seq, YAML_SEQUENCE_NODE,
                               "'alpha' (a list of {eos, form, c, source})", L->err);
    if (rc != KPHI_OK)
        return rc;
    char what[64];
    snprintf(what, sizeof what, "an 'alpha' entry of %s", sp->name);
    for (yaml_node_item_t *it = seq->data.sequence.items.start; it < seq->data.sequence.items.top;
         it++) {
        yaml_node_t *map = kphi__yaml_node(L->y, *it);
        rc = kphi__yaml_expect(L->y, map, YAML_MAPPING_NODE, "an 'alpha' entry", L->err);
        if (rc == KPHI_OK)
            rc = kphi__yaml_check_keys(L->y, map, ALPHA_KEYS, NKEYS(ALPHA_KEYS), what, L->err);
        if (rc != KPHI_OK)
            return rc;
        if (sp->n_alpha == KPHI_SPECIES_MAX_ALPHA)
            return kphi__yaml_error(L->y, map, KPHI_EINPUT, L->err,
                                    "too many 'alpha' entries for %s (at most %d)", sp->name,
                                    KPHI_SPECIES_MAX_ALPHA);
        kphi_alpha_spec *a = &sp->alpha[sp->n_alpha];
        memset(a, 0, sizeof *a);
        a->mark = kphi__yaml_mark(map);
        yaml_node_t *node;
        if ((rc = need(L, map, "eos", what, &node)) != KPHI_OK)
            return rc;
        const char *model = kphi__yaml_scalar(node);
        if (model == NULL)
            return kphi__yaml_expect(L->y, node, YAML_SCALAR_NODE, "'eos'", L->err);
        size_t mi = 0;
        while (mi < NKEYS(ALPHA_MODELS) && strcmp(model, ALPHA_MODELS[mi]) != 0)
            mi++;
        if (mi == NKEYS(ALPHA_MODELS))
            return kphi__yaml_error(L->y, node, KPHI_EINPUT, L->err,
                                    "'eos' of an alpha entry is '%s'; expected pr or srk "
                                    "(the cubics with a Soave-type alpha)",
                                    model);
        for (size_t k = 0; k < sp->n_alpha; k++)
            if (strcmp(sp->alpha[k].model, model) == 0)
                return kphi__yaml_error(L->y, node, KPHI_EINPUT, L->err,
                                        "a second alpha for '%s' in %s (first at line %ld)",
                                        model, sp->name, sp->alpha[k].mark.line);
        kphi__strlcpy(a->model, model, sizeof a->model);
        if ((rc = need(L, map, "form", what, &node)) != KPHI_OK)
            return rc;
        const char *form = kphi__yaml_scalar(node);
        if (form == NULL)
            return kphi__yaml_expect(L->y, node, YAML_SCALAR_NODE, "'form'", L->err);
        if (strcmp(form, ALPHA_FORMS[0]) == 0) {
            a->form = KPHI_ALPHA_MATHIAS_COPEMAN;
            a->n_c = 3;
        } else {
            const char *near = kphi__closest(form, ALPHA_FORMS, NKEYS(ALPHA_FORMS));
            return kphi__yaml_error(L->y, node, KPHI_EINPUT, L->err,
                                    "unknown alpha form '%s'%s%s%s; expected mathias-copeman",
                                    form, near ? " (did you mean '" : "", near ? near : "",
                                    near ? "'?)" : "");
        }
        if ((rc = need(L, map, "c", what, &node)) != KPHI_OK ||
            (rc = number_list(L, node, "c", a->c, a->n_c, "constants")) != KPHI_OK)
            return rc;
        if ((rc = need(L, map, "source", what, &node)) != KPHI_OK ||
            (rc = resolve_source(L, node, &a->source)) != KPHI_OK)
            return rc;
        node = kphi__yaml_map_get(L->y, map, "note", NULL);
        if (node != NULL && kphi__yaml_scalar(node) == NULL)
            return kphi__yaml_expect(L->y, node, YAML_SCALAR_NODE, "'note'", L->err);
        sp->n_alpha++;
    }
    return KPHI_OK;
}

/* beattie_bridgeman: {units: atm-L | kPa-m3, A0, a, B0, b, c, source: KEY, note}: the five
 * constants of P = R T (1 - eps)(v + B)/v^2 - A/v^2, A = A0 (1 - a/v), B = B0 (1 - b/v),
 * eps = c/(v T^3) (Beattie & Bridgeman 1928), each as the source prints it. */
static int load_bb(loader *L, yaml_node_t *map, kphi_species *sp)
{
    char what[64];
    snprintf(what, sizeof what, "'beattie_bridgeman' of %s", sp->name);
    int rc = kphi__yaml_expect(L->y, map, YAML_MAPPING_NODE, what, L->err);
    if (rc == KPHI_OK)
        rc = kphi__yaml_check_keys(L->y, map, BB_KEYS, NKEYS(BB_KEYS), what, L->err);
    if (rc != KPHI_OK)
        return rc;
    yaml_node_t *node;
    if ((rc = need(L, map, "units", what, &node)) != KPHI_OK)
        return rc;
    const char *units = kphi__yaml_scalar(node);
    if (units == NULL)
        return kphi__yaml_expect(L->y, node, YAML_SCALAR_NODE, "'units'", L->err);
    size_t u = 0;
    while (u < NKEYS(BB_UNITS) && strcmp(units, BB_UNITS[u]) != 0)
        u++;
    if (u == NKEYS(BB_UNITS)) {
        const char *near = kphi__closest(units, BB_UNITS, NKEYS(BB_UNITS));
        return kphi__yaml_error(L->y, node, KPHI_EINPUT, L->err,
                                "unknown units '%s' for the Beattie-Bridgeman constants of "
                                "%s%s%s%s; expected atm-L or kPa-m3",
                                units, sp->name, near ? " (did you mean '" : "",
                                near ? near : "", near ? "'?)" : "");
    }
    if ((rc = need(L, map, "source", what, &node)) != KPHI_OK ||
        (rc = resolve_source(L, node, &sp->src_bb)) != KPHI_OK)
        return rc;
    static const char *const keys[5] = {"A0", "a", "B0", "b", "c"};
    double v[5];
    for (int k = 0; k < 5; k++) {
        if ((rc = get_number(L, map, keys[k], what, 1, &v[k], &node)) != KPHI_OK)
            return rc;
        /* A0 enters the mixture through its square root; B0 and c are a covolume and a
         * temperature-dependent correction, both >= 0 for every published gas */
        if ((k == 0 || k == 2) && !(v[k] > 0.0))
            return kphi__yaml_error(L->y, node, KPHI_EINPUT, L->err,
                                    "Beattie-Bridgeman %s of %s must be positive, found %g",
                                    keys[k], sp->name, v[k]);
        if (k == 4 && !(v[k] >= 0.0))
            return kphi__yaml_error(L->y, node, KPHI_EINPUT, L->err,
                                    "Beattie-Bridgeman c of %s must be >= 0, found %g",
                                    sp->name, v[k]);
    }
    node = kphi__yaml_map_get(L->y, map, "note", NULL);
    if (node != NULL && kphi__yaml_scalar(node) == NULL)
        return kphi__yaml_expect(L->y, node, YAML_SCALAR_NODE, "'note'", L->err);
    sp->has_bb = 1;
    sp->bb_A0 = v[0] * BB_A0_SI[u];
    sp->bb_a = v[1] * BB_VOL_SI;
    sp->bb_B0 = v[2] * BB_VOL_SI;
    sp->bb_b = v[3] * BB_VOL_SI;
    sp->bb_c = v[4] * BB_VOL_SI;
    return KPHI_OK;
}

static int load_species(loader *L, yaml_node_t *map, size_t index)
{
    kphi_species_db *db = L->db;
    kphi_species *sp = &db->sp[index];
    char what[64];
    const char *peek = kphi__yaml_scalar(kphi__yaml_map_get(L->y, map, "name", NULL));
    if (peek != NULL && peek[0] != '\0' && strlen(peek) < KPHI_SPECIES_NAME_MAX)
        snprintf(what, sizeof what, "species '%s'", peek);
    else
        snprintf(what, sizeof what, "species entry %zu", index + 1);
    int rc = kphi__yaml_check_keys(L->y, map, SPECIES_KEYS, NKEYS(SPECIES_KEYS), what, L->err);
    if (rc != KPHI_OK)
        return rc;
    sp->path = db->path;
    sp->mark = kphi__yaml_mark(map);
    sp->src_critical = "";
    sp->src_quantum = "";
    sp->src_bb = "";
    sp->note = "";

    yaml_node_t *node;
    if ((rc = need(L, map, "name", what, &node)) != KPHI_OK)
        return rc;
    const char *name = kphi__yaml_scalar(node);
    if (name == NULL)
        return kphi__yaml_expect(L->y, node, YAML_SCALAR_NODE, "'name'", L->err);
    if (name[0] == '\0')
        return kphi__yaml_error(L->y, node, KPHI_EINPUT, L->err, "empty species name");
    if (strlen(name) >= KPHI_SPECIES_NAME_MAX)
        return kphi__yaml_error(L->y, node, KPHI_EINPUT, L->err,
                                "species name '%s' is too long (at most %d characters)", name,
                                KPHI_SPECIES_NAME_MAX - 1);
    for (size_t j = 0; j < index; j++)
        if (strcmp(db->sp[j].name, name) == 0)
            return kphi__yaml_error(L->y, node, KPHI_EINPUT, L->err,
                                    "species '%s' defined twice (first at line %ld)", name,
                                    db->sp[j].mark.line);
    kphi__strlcpy(sp->name, name, sizeof sp->name);
    db->names[index] = sp->name;

    sp->phase = KPHI_PHASE_GAS;
    if ((node = kphi__yaml_map_get(L->y, map, "phase", NULL)) != NULL) {
        const char *ph = kphi__yaml_scalar(node);
        if (ph != NULL && strcmp(ph, "gas") == 0)
            sp->phase = KPHI_PHASE_GAS;
        else if (ph != NULL && strcmp(ph, "condensed") == 0)
            sp->phase = KPHI_PHASE_CONDENSED;
        else if (ph == NULL)
            return kphi__yaml_expect(L->y, node, YAML_SCALAR_NODE, "'phase'", L->err);
        else
            return kphi__yaml_error(L->y, node, KPHI_EINPUT, L->err,
                                    "unknown phase '%s' for %s; expected 'gas' or 'condensed'",
                                    ph, sp->name);
    }

    if ((rc = need(L, map, "elements", what, &node)) != KPHI_OK ||
        (rc = load_elements(L, node, sp)) != KPHI_OK)
        return rc;
    if ((rc = need(L, map, "thermo", what, &node)) != KPHI_OK ||
        (rc = load_thermo(L, node, sp)) != KPHI_OK)
        return rc;

    node = kphi__yaml_map_get(L->y, map, "critical", NULL);
    if (node != NULL) {
        if ((rc = load_critical(L, node, sp)) != KPHI_OK)
            return rc;
    } else if (sp->phase == KPHI_PHASE_GAS) {
        return kphi__yaml_error(L->y, map, KPHI_EINPUT, L->err,
                                "missing key 'critical' in %s (required for a gas; only "
                                "'phase: condensed' references may omit it)",
                                what);
    }
    node = kphi__yaml_map_get(L->y, map, "quantum", NULL);
    if (node != NULL && (rc = load_quantum(L, node, sp)) != KPHI_OK)
        return rc;
    node = kphi__yaml_map_get(L->y, map, "alpha", NULL);
    if (node != NULL) {
        if (!sp->has_critical)
            return kphi__yaml_error(L->y, node, KPHI_EINPUT, L->err,
                                    "'alpha' of %s needs its critical constants", sp->name);
        if ((rc = load_alpha(L, node, sp)) != KPHI_OK)
            return rc;
    }

    node = kphi__yaml_map_get(L->y, map, "beattie_bridgeman", NULL);
    if (node != NULL) {
        if (!sp->has_critical)
            return kphi__yaml_error(L->y, node, KPHI_EINPUT, L->err,
                                    "'beattie_bridgeman' of %s needs its critical constants "
                                    "(the model's density limit uses Vc)",
                                    sp->name);
        if ((rc = load_bb(L, node, sp)) != KPHI_OK)
            return rc;
    }

    node = kphi__yaml_map_get(L->y, map, "note", NULL);
    if (node != NULL) {
        const char *note = kphi__yaml_scalar(node);
        if (note == NULL)
            return kphi__yaml_expect(L->y, node, YAML_SCALAR_NODE, "'note'", L->err);
        db->notes[index] = strdup(note);
        if (db->notes[index] == NULL)
            return kphi__yaml_error(L->y, node, KPHI_ENOMEM, L->err, "out of memory");
        sp->note = db->notes[index];
    }
    return KPHI_OK;
}

static int load_root(loader *L)
{
    yaml_node_t *root = kphi__yaml_root(L->y);
    int rc = kphi__yaml_check_kind(L->y, root, KPHI__KIND_SPECIES_DB,
                                   "; 'species_file' must name a species database such as "
                                   "reactions/species.yaml",
                                   L->err);
    if (rc == KPHI_OK)
        rc = kphi__yaml_check_keys(L->y, root, ROOT_KEYS, NKEYS(ROOT_KEYS), "the species file",
                                   L->err);
    if (rc != KPHI_OK)
        return rc;
    yaml_node_t *sources, *list;
    if ((rc = need(L, root, "sources", "the species file", &sources)) != KPHI_OK ||
        (rc = need(L, root, "species", "the species file", &list)) != KPHI_OK)
        return rc;
    if ((rc = load_sources(L, sources)) != KPHI_OK)
        return rc;
    if ((rc = kphi__yaml_expect(L->y, list, YAML_SEQUENCE_NODE, "'species'", L->err)) != KPHI_OK)
        return rc;
    size_t n = (size_t)(list->data.sequence.items.top - list->data.sequence.items.start);
    if (n == 0)
        return kphi__yaml_error(L->y, list, KPHI_EINPUT, L->err, "'species' is empty");
    kphi_species_db *db = L->db;
    db->sp = calloc(n, sizeof *db->sp);
    db->names = calloc(n, sizeof *db->names);
    db->notes = calloc(n, sizeof *db->notes);
    if (db->sp == NULL || db->names == NULL || db->notes == NULL)
        return kphi__yaml_error(L->y, list, KPHI_ENOMEM, L->err, "out of memory");
    for (size_t i = 0; i < n; i++) {
        db->n = i + 1; /* entries [0, i] are owned from here on */
        yaml_node_t *item = kphi__yaml_node(L->y, list->data.sequence.items.start[i]);
        if ((rc = load_species(L, item, i)) != KPHI_OK)
            return rc;
    }
    return KPHI_OK;
}

static kphi_species_db *db_new(const char *path, kphi_error *err)
{
    kphi_species_db *db = calloc(1, sizeof *db);
    if (db != NULL)
        db->path = strdup(path);
    if (db == NULL || db->path == NULL) {
        kphi_mark none = {0, 0};
        free(db);
        kphi_error_set(err, KPHI_ENOMEM, path, none, "out of memory");
        return NULL;
    }
    return db;
}

static kphi_species_db *finish(kphi__yaml *y, kphi_species_db *db, int rc, kphi_error *err)
{
    if (rc == KPHI_OK) {
        loader L = {y, db, err};
        rc = load_root(&L);
    }
    kphi__yaml_free(y);
    if (rc != KPHI_OK) {
        kphi_species_db_free(db);
        return NULL;
    }
    return db;
}

kphi_species_db *kphi_species_db_load_file(const char *path, kphi_error *err)
{
    kphi__yaml y;
    kphi_species_db *db = db_new(path, err);
    if (db == NULL)
        return NULL;
    int rc = kphi__yaml_load_file(&y, path, err);
    if (rc != KPHI_OK) {
        kphi_species_db_free(db);
        return NULL;
    }
    return finish(&y, db, rc, err);
}

kphi_species_db *kphi_species_db_load_string(const char *text, size_t len, const char *name,
                                             kphi_error *err)
{
    kphi__yaml y;
    if (name == NULL)
        name = "<string>";
    kphi_species_db *db = db_new(name, err);
    if (db == NULL)
        return NULL;
    int rc = kphi__yaml_load_string(&y, text, len, name, err);
    if (rc != KPHI_OK) {
        kphi_species_db_free(db);
        return NULL;
    }
    return finish(&y, db, rc, err);
}

void kphi_species_db_free(kphi_species_db *db)
{
    if (db == NULL)
        return;
    if (db->notes != NULL)
        for (size_t i = 0; i < db->n; i++)
            free(db->notes[i]);
    for (size_t i = 0; i < db->n_src; i++) {
        free(db->src_key[i]);
        free(db->src_text[i]);
    }
    free(db->notes);
    free(db->names);
    free(db->sp);
    free(db->path);
    free(db);
}

size_t kphi_species_db_count(const kphi_species_db *db)
{
    return db != NULL ? db->n : 0;
}

const kphi_species *kphi_species_db_get(const kphi_species_db *db, size_t i)
{
    return db != NULL && i < db->n ? &db->sp[i] : NULL;
}

const kphi_species *kphi_species_db_find(const kphi_species_db *db, const char *name)
{
    if (db == NULL || name == NULL)
        return NULL;
    for (size_t i = 0; i < db->n; i++)
        if (strcmp(db->sp[i].name, name) == 0)
            return &db->sp[i];
    return NULL;
}

const char *kphi_species_db_suggest(const kphi_species_db *db, const char *name)
{
    if (db == NULL || name == NULL)
        return NULL;
    return kphi__closest(name, db->names, db->n);
}

const char *kphi_species_db_source(const kphi_species_db *db, const char *key)
{
    if (db == NULL || key == NULL)
        return NULL;
    for (size_t i = 0; i < db->n_src; i++)
        if (strcmp(db->src_key[i], key) == 0)
            return db->src_text[i];
    return NULL;
}

double kphi_species_atoms(const kphi_species *sp, const char *element)
{
    if (sp == NULL || element == NULL)
        return 0.0;
    for (size_t i = 0; i < sp->n_elements; i++)
        if (strcmp(sp->element[i], element) == 0)
            return sp->count[i];
    return 0.0;
}
