/* kphi rxnset: a reaction set: its species, its independent reactions, and which
 * species' conversion is the headline figure.
 *
 * Concept and equations (Smith & Missen 1982, "Chemical Reaction Equilibrium Analysis:
 * Theory and Algorithms", Wiley, ch. 2; section and equation numbers from memory):
 *   - Reaction j is written sum_i nu_ij A_i = 0 with nu_ij > 0 for products and < 0 for
 *     reactants; amounts change as n = n0 + nu^T xi (xi: extents, mol).
 *   - Element (atom) balance of every reaction: sum_i a_ki nu_ij = 0 for each element k,
 *     a_ki = atoms of element k in species i (the element or formula matrix A).
 *   - The reactions must be linearly independent: rank(nu) = number of reactions. The
 *     largest independent set has N - rank(A) reactions (N species); when the file gives
 *     species only, such a set is built from the null space of A in the canonical form of
 *     Smith & Missen ch. 2: the reduced row echelon form of A over the species in file
 *     order makes the first rank(A) independent columns the "components", and each other
 *     species gets one reaction that forms it (coefficient +1 before scaling to integers)
 *     from the components.
 *   - Numerical rank is the number of singular values above a tolerance relative to the
 *     largest (Golub & Van Loan 1996, "Matrix Computations", 3rd ed., sec. 2.5.5 and 5.5.8,
 *     from memory): singular values come from gsl_linalg_SV_decomp.
 *   - Delta nu of reaction j is sum_i nu_ij (every species in a set is a gas).
 *   - Headline conversion X = 1 - sum_i w_i n_i / sum_i w_i n0_i with w_i = 1 for the
 *     species named by `conversion` (carbon oxides CO + CO2 in methanol synthesis).
 * Amounts are dimensionless stoichiometric numbers here; no physical units enter this file.
 *
 * Equation text ("N2 + 3 H2 = 2 NH3", fractions allowed, one separator of "=", "->", "=>"
 * or "<=>"), its parser, the canonical text and the derivation of reactions from the
 * element matrix are in src/rxnset_parse.c; the set object and the loader state shared by
 * the two files are in src/rxnset_internal.h.
 *
 * Positions: every species entry and reaction keeps its YAML mark, so the checks here
 * (balance, duplicates, independence) point at the reaction's line and column. */
#include "kphi/rxnset.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <gsl/gsl_errno.h>
#include <gsl/gsl_linalg.h>
#include <gsl/gsl_matrix.h>
#include <gsl/gsl_vector.h>

#include "internal.h"
#include "rxnset_internal.h"
#include "yamlutil.h"

enum {
    MAX_SPECIES = 64, /* species in one set */
    MAX_PATH = 1024   /* resolved species-file path */
};

/* Singular values at or below RANK_RTOL * (largest) count as zero. Coefficients are
 * small numbers typed by people, so an exact dependence leaves ~1e-15 relative. */
static const double RANK_RTOL = 1e-9;
/* Relative tolerance of the atom balance and of "proportional" for duplicate reactions. */
static const double BALANCE_RTOL = 1e-9;

int kphi__rxnset_nomem(const kphi__rxnset_loader *L, kphi_error *err)
{
    kphi_mark none = {0, 0};
    return kphi_error_set(err, KPHI_ENOMEM, L->y->path, none, "out of memory");
}

static long find_species(const kphi_rxnset *set, const char *name)
{
    for (size_t i = 0; i < set->n_species; i++)
        if (strcmp(set->species[i].name, name) == 0)
            return (long)i;
    return -1;
}

/* ---- numerical rank ------------------------------------------------------------------ */

/* Numerical rank of the first m rows of the m x n row-major matrix a, from its singular
 * values (the matrix or its transpose, whichever has at least as many rows as columns). */
static int numerical_rank(const double *a, size_t m, size_t n, size_t *rank, const char *path,
                          kphi_error *err)
{
    kphi_mark none = {0, 0};
    *rank = 0;
    if (m == 0 || n == 0)
        return KPHI_OK;
    size_t M = m >= n ? m : n, N = m >= n ? n : m;
    gsl_matrix *A = gsl_matrix_alloc(M, N);
    gsl_matrix *V = gsl_matrix_alloc(N, N);
    gsl_vector *S = gsl_vector_alloc(N);
    gsl_vector *work = gsl_vector_alloc(N);
    int rc = KPHI_OK;
    if (A == NULL || V == NULL || S == NULL || work == NULL) {
        rc = kphi_error_set(err, KPHI_ENOMEM, path, none, "out of memory");
        goto done;
    }
    for (size_t r = 0; r < m; r++)
        for (size_t c = 0; c < n; c++) {
            if (m >= n)
                gsl_matrix_set(A, r, c, a[r * n + c]);
            else
                gsl_matrix_set(A, c, r, a[r * n + c]);
        }
    int status = gsl_linalg_SV_decomp(A, V, S, work);
    if (status != GSL_SUCCESS) {
        rc = kphi_error_set(err, KPHI_EFAILED, path, none,
                            "singular value decomposition of the stoichiometric matrix failed: %s",
                            gsl_strerror(status));
        goto done;
    }
    double smax = gsl_vector_get(S, 0); /* sorted, largest first */
    for (size_t i = 0; i < N; i++)
        if (smax > 0.0 && gsl_vector_get(S, i) > RANK_RTOL * smax)
            (*rank)++;
done:
    gsl_vector_free(work);
    gsl_vector_free(S);
    gsl_matrix_free(V);
    gsl_matrix_free(A);
    return rc;
}

/* ---- checks on one reaction ------------------------------------------------------------ */

static int check_balance(kphi__rxnset_loader *L, size_t j, kphi_error *err)
{
    kphi_rxnset *set = L->set;
    const double *row = set->nu + j * set->n_species;
    for (size_t k = 0; k < set->n_elements; k++) {
        double left = 0.0, right = 0.0;
        for (size_t i = 0; i < set->n_species; i++) {
            double a = set->atoms[k * set->n_species + i] * row[i];
            if (a < 0.0)
                left -= a;
            else
                right += a;
        }
        double scale = fmax(1.0, fmax(left, right));
        if (fabs(left - right) > BALANCE_RTOL * scale)
            return kphi_error_set(err, KPHI_EINPUT, L->y->path, set->reaction_mark[j],
                                  "reaction is not balanced: %s %g on the left, %g on the right",
                                  set->element[k], left, right);
    }
    return KPHI_OK;
}

/* Reaction j against every earlier one: same or proportional coefficients. */
static int check_duplicate(kphi__rxnset_loader *L, size_t j, kphi_error *err)
{
    kphi_rxnset *set = L->set;
    size_t ns = set->n_species;
    const double *b = set->nu + j * ns;
    for (size_t r = 0; r < j; r++) {
        const double *a = set->nu + r * ns;
        double f = 0.0, amax = 0.0;
        int same_pattern = 1;
        for (size_t i = 0; i < ns && same_pattern; i++) {
            same_pattern = (a[i] == 0.0) == (b[i] == 0.0);
            if (a[i] != 0.0 && f == 0.0)
                f = b[i] / a[i];
            if (fabs(b[i]) > amax)
                amax = fabs(b[i]);
        }
        if (!same_pattern || f == 0.0)
            continue;
        int prop = 1;
        for (size_t i = 0; i < ns && prop; i++)
            prop = fabs(b[i] - f * a[i]) <= BALANCE_RTOL * amax;
        if (!prop)
            continue;
        kphi_mark at = set->reaction_mark[j];
        long line = set->reaction_mark[r].line;
        if (fabs(f - 1.0) <= BALANCE_RTOL)
            return kphi_error_set(err, KPHI_EINPUT, L->y->path, at,
                                  "reaction repeats reaction %zu (line %ld)", r + 1, line);
        if (fabs(f + 1.0) <= BALANCE_RTOL)
            return kphi_error_set(err, KPHI_EINPUT, L->y->path, at,
                                  "reaction is reaction %zu (line %ld) written backwards", r + 1,
                                  line);
        return kphi_error_set(err, KPHI_EINPUT, L->y->path, at,
                              "reaction is reaction %zu (line %ld) multiplied by %g", r + 1, line,
                              f);
    }
    return KPHI_OK;
}

/* Rows 0..j must be independent (rows 0..j-1 already are). */
static int check_independent(kphi__rxnset_loader *L, size_t j, kphi_error *err)
{
    kphi_rxnset *set = L->set;
    size_t rank = 0;
    int rc = numerical_rank(set->nu, j + 1, set->n_species, &rank, L->y->path, err);
    if (rc != KPHI_OK)
        return rc;
    if (rank > j)
        return KPHI_OK;
    kphi_mark at = set->reaction_mark[j];
    if (j == 1)
        return kphi_error_set(err, KPHI_EINPUT, L->y->path, at,
                              "reaction 2 is a multiple of reaction 1; the reactions must be "
                              "independent: remove it");
    if (j == 2)
        return kphi_error_set(err, KPHI_EINPUT, L->y->path, at,
                              "reaction 3 is a linear combination of reactions 1 and 2; the "
                              "reactions must be independent: remove it");
    return kphi_error_set(err, KPHI_EINPUT, L->y->path, at,
                          "reaction %zu is a linear combination of reactions 1 to %zu; the "
                          "reactions must be independent: remove it",
                          j + 1, j);
}

/* ---- the loader ----------------------------------------------------------------------- */

void kphi_rxnset_free(kphi_rxnset *set)
{
    if (set == NULL)
        return;
    if (set->equation != NULL)
        for (size_t j = 0; j < set->n_reactions; j++)
            free(set->equation[j]);
    free(set->equation);
    free(set->name);
    free(set->path);
    free(set->species);
    free(set->names);
    free(set->species_mark);
    free(set->inert);
    free(set->nu);
    free(set->reaction_mark);
    free(set->element);
    free(set->atoms);
    free(set->weights);
    free(set->conv_label);
    free(set->kij_i);
    free(set->kij_j);
    free(set->kij);
    for (size_t m = 0; set->kij_src != NULL && m < set->n_kij; m++)
        free(set->kij_src[m]);
    free(set->kij_src);
    kphi__rxnset_free_kcorr(set);
    kphi_species_db_free(set->own_db);
    free(set);
}

/* Directory part of path joined with rel (rel itself when absolute or path has no '/'). */
static int resolve_path(char *out, size_t n, const char *path, const char *rel)
{
    const char *slash = strrchr(path, '/');
    int w;
    if (rel[0] == '/' || slash == NULL)
        w = snprintf(out, n, "%s", rel);
    else
        w = snprintf(out, n, "%.*s/%s", (int)(slash - path), path, rel);
    return w >= 0 && (size_t)w < n ? 0 : -1;
}

static int load_species_db(kphi__rxnset_loader *L, yaml_node_t *root, kphi_error *err)
{
    yaml_node_t *key = NULL;
    yaml_node_t *node = kphi__yaml_map_get(L->y, root, "species_file", &key);
    const char *rel = "species.yaml";
    if (node != NULL) {
        rel = kphi__yaml_scalar(node);
        if (rel == NULL || rel[0] == '\0')
            return kphi__yaml_error(L->y, node, KPHI_EINPUT, err,
                                    "expected a file name for 'species_file'");
    }
    if (L->db != NULL)
        return KPHI_OK;
    char full[MAX_PATH];
    if (resolve_path(full, sizeof full, L->set->path, rel) != 0)
        return kphi__yaml_error(L->y, node != NULL ? node : root, KPHI_EINPUT, err,
                                "species file path is too long");
    /* no species_file and no species.yaml beside the set: the caller's default */
    if (node == NULL && L->species_default != NULL && access(full, F_OK) != 0 &&
        strlen(L->species_default) < sizeof full)
        snprintf(full, sizeof full, "%s", L->species_default);
    kphi_error e;
    kphi_error_clear(&e);
    L->set->own_db = kphi_species_db_load_file(full, &e);
    if (L->set->own_db == NULL) {
        if (e.code == KPHI_EIO)
            return kphi__yaml_error(L->y, node != NULL ? node : root, KPHI_EINPUT, err,
                                    "cannot read the species database '%s': %s%s", full, e.msg,
                                    node == NULL ? " (set 'species_file')" : "");
        if (err != NULL && err->code == KPHI_OK)
            *err = e;
        return e.code != KPHI_OK ? (int)e.code : KPHI_EINPUT;
    }
    L->db = L->set->own_db;
    return KPHI_OK;
}

static int load_species(kphi__rxnset_loader *L, yaml_node_t *list, kphi_error *err)
{
    kphi_rxnset *set = L->set;
    int rc = kphi__yaml_expect(L->y, list, YAML_SEQUENCE_NODE, "'species' (a list of names)",
                               err);
    if (rc != KPHI_OK)
        return rc;
    size_t n = (size_t)(list->data.sequence.items.top - list->data.sequence.items.start);
    if (n == 0)
        return kphi__yaml_error(L->y, list, KPHI_EINPUT, err,
                                "'species' is empty; list the species of the set");
    if (n > MAX_SPECIES) {
        yaml_node_t *extra = kphi__yaml_node(L->y, list->data.sequence.items.start[MAX_SPECIES]);
        return kphi__yaml_error(L->y, extra, KPHI_EINPUT, err,
                                "too many species: at most %d in a reaction set", MAX_SPECIES);
    }
    set->species = calloc(n, sizeof *set->species);
    set->names = calloc(n, sizeof *set->names);
    set->species_mark = calloc(n, sizeof *set->species_mark);
    set->inert = calloc(n, sizeof *set->inert);
    set->weights = calloc(n, sizeof *set->weights);
    if (set->species == NULL || set->names == NULL || set->species_mark == NULL ||
        set->inert == NULL || set->weights == NULL)
        return kphi__rxnset_nomem(L, err);
    for (size_t i = 0; i < n; i++) {
        yaml_node_t *item = kphi__yaml_node(L->y, list->data.sequence.items.start[i]);
        const char *name = kphi__yaml_scalar(item);
        if (name == NULL || name[0] == '\0')
            return kphi__yaml_error(L->y, item, KPHI_EINPUT, err,
                                    "expected a species name in 'species'");
        const kphi_species *sp = kphi_species_db_find(L->db, name);
        if (sp == NULL) {
            const char *near = kphi_species_db_suggest(L->db, name);
            if (near != NULL)
                return kphi__yaml_error(L->y, item, KPHI_EINPUT, err,
                                        "unknown species '%s' (did you mean '%s'?)", name, near);
            return kphi__yaml_error(L->y, item, KPHI_EINPUT, err,
                                    "unknown species '%s': it is not in the species database",
                                    name);
        }
        for (size_t k = 0; k < set->n_species; k++)
            if (strcmp(set->species[k].name, name) == 0)
                return kphi__yaml_error(L->y, item, KPHI_EINPUT, err,
                                        "species '%s' is listed twice (first at line %ld, column "
                                        "%ld)",
                                        name, set->species_mark[k].line,
                                        set->species_mark[k].column);
        if (sp->phase != KPHI_PHASE_GAS)
            return kphi__yaml_error(L->y, item, KPHI_EINPUT, err,
                                    "%s is a condensed reference phase; kphi handles gas-phase "
                                    "reactions only",
                                    name);
        set->species[i] = *sp;
        set->names[i] = set->species[i].name;
        set->species_mark[i] = kphi__yaml_mark(item);
        set->n_species = i + 1;
    }
    return KPHI_OK;
}

static int build_elements(kphi__rxnset_loader *L, kphi_error *err)
{
    kphi_rxnset *set = L->set;
    size_t ns = set->n_species, cap = ns * KPHI_SPECIES_MAX_ELEMENTS;
    set->element = calloc(cap, sizeof *set->element);
    if (set->element == NULL)
        return kphi__rxnset_nomem(L, err);
    for (size_t i = 0; i < ns; i++)
        for (size_t e = 0; e < set->species[i].n_elements && e < KPHI_SPECIES_MAX_ELEMENTS; e++) {
            const char *el = set->species[i].element[e];
            size_t k = 0;
            while (k < set->n_elements && strcmp(set->element[k], el) != 0)
                k++;
            if (k == set->n_elements)
                kphi__strlcpy(set->element[set->n_elements++], el, KPHI_ELEMENT_NAME_MAX);
        }
    set->atoms = calloc(set->n_elements * ns + 1, sizeof *set->atoms);
    if (set->atoms == NULL)
        return kphi__rxnset_nomem(L, err);
    for (size_t k = 0; k < set->n_elements; k++)
        for (size_t i = 0; i < ns; i++)
            set->atoms[k * ns + i] = kphi_species_atoms(&set->species[i], set->element[k]);
    return KPHI_OK;
}

static int load_reactions(kphi__rxnset_loader *L, yaml_node_t *list, kphi_error *err)
{
    kphi_rxnset *set = L->set;
    int rc = kphi__yaml_expect(L->y, list, YAML_SEQUENCE_NODE,
                               "'reactions' (a list of equations)", err);
    if (rc != KPHI_OK)
        return rc;
    size_t nr = (size_t)(list->data.sequence.items.top - list->data.sequence.items.start);
    if (nr == 0)
        return kphi__yaml_error(L->y, list, KPHI_EINPUT, err,
                                "'reactions' is empty; leave the key out to derive the "
                                "reactions from the species' elements");
    if (nr > KPHI__RXNSET_MAX_REACTIONS) {
        yaml_node_t *extra =
            kphi__yaml_node(L->y, list->data.sequence.items.start[KPHI__RXNSET_MAX_REACTIONS]);
        return kphi__yaml_error(L->y, extra, KPHI_EINPUT, err,
                                "too many reactions: at most %d in a reaction set",
                                KPHI__RXNSET_MAX_REACTIONS);
    }
    size_t ns = set->n_species;
    set->nu = calloc(nr * ns, sizeof *set->nu);
    set->reaction_mark = calloc(nr, sizeof *set->reaction_mark);
    set->equation = calloc(nr, sizeof *set->equation);
    L->order = calloc(nr * ns, sizeof *L->order);
    L->n_order = calloc(nr, sizeof *L->n_order);
    L->first_reactant = calloc(nr, sizeof *L->first_reactant);
    if (set->nu == NULL || set->reaction_mark == NULL || set->equation == NULL ||
        L->order == NULL || L->n_order == NULL || L->first_reactant == NULL)
        return kphi__rxnset_nomem(L, err);
    set->n_reactions = nr;
    for (size_t j = 0; j < nr; j++) {
        yaml_node_t *item = kphi__yaml_node(L->y, list->data.sequence.items.start[j]);
        yaml_node_t *kcorr = NULL;
        if (item != NULL && item->type == YAML_MAPPING_NODE) {
            /* {equation: "...", K: [...]}: an equation with its K correlations */
            static const char *const keys[] = {"equation", "K"};
            rc = kphi__yaml_check_keys(L->y, item, keys, 2, "a reaction", err);
            if (rc != KPHI_OK)
                return rc;
            yaml_node_t *eq = kphi__yaml_map_get(L->y, item, "equation", NULL);
            if (eq == NULL)
                return kphi__yaml_error(L->y, item, KPHI_EINPUT, err,
                                        "reaction %zu is a mapping without 'equation'; write "
                                        "equation: N2 + 3 H2 = 2 NH3",
                                        j + 1);
            kcorr = kphi__yaml_map_get(L->y, item, "K", NULL);
            item = eq;
        }
        set->reaction_mark[j] = kphi__yaml_mark(item);
        rc = kphi__rxnset_parse_equation(L, item, j, err);
        if (rc == KPHI_OK)
            rc = check_balance(L, j, err);
        if (rc == KPHI_OK)
            rc = check_duplicate(L, j, err);
        if (rc == KPHI_OK)
            rc = check_independent(L, j, err);
        if (rc == KPHI_OK && kcorr != NULL)
            rc = kphi__rxnset_load_kcorr(L, kcorr, j, err);
        if (rc != KPHI_OK)
            return rc;
    }
    return KPHI_OK;
}

/* Derived reactions: terms in species order; first reactant likewise. */
static int order_by_species(kphi__rxnset_loader *L, kphi_error *err)
{
    kphi_rxnset *set = L->set;
    size_t nr = set->n_reactions, ns = set->n_species;
    L->order = calloc(nr * ns, sizeof *L->order);
    L->n_order = calloc(nr, sizeof *L->n_order);
    L->first_reactant = calloc(nr, sizeof *L->first_reactant);
    if (L->order == NULL || L->n_order == NULL || L->first_reactant == NULL)
        return kphi__rxnset_nomem(L, err);
    for (size_t j = 0; j < nr; j++) {
        int have = 0;
        for (size_t i = 0; i < ns; i++) {
            double c = set->nu[j * ns + i];
            if (c == 0.0)
                continue;
            L->order[j * ns + L->n_order[j]++] = i;
            if (c < 0.0 && !have) {
                L->first_reactant[j] = i;
                have = 1;
            }
        }
    }
    return KPHI_OK;
}

static int conversion_entry(kphi__rxnset_loader *L, yaml_node_t *item, kphi_error *err)
{
    kphi_rxnset *set = L->set;
    const char *name = kphi__yaml_scalar(item);
    if (name == NULL || name[0] == '\0')
        return kphi__yaml_error(L->y, item, KPHI_EINPUT, err,
                                "expected a species name (or a list of names) for 'conversion'");
    long k = find_species(set, name);
    if (k < 0) {
        const char *near = kphi__closest(name, set->names, set->n_species);
        if (near != NULL)
            return kphi__yaml_error(L->y, item, KPHI_EINPUT, err,
                                    "conversion species '%s' is not in the set's species list "
                                    "(did you mean '%s'?)",
                                    name, near);
        return kphi__yaml_error(L->y, item, KPHI_EINPUT, err,
                                "conversion species '%s' is not in the set's species list",
                                name);
    }
    if (set->weights[k] != 0.0)
        return kphi__yaml_error(L->y, item, KPHI_EINPUT, err,
                                "'%s' is listed twice in 'conversion'", name);
    int consumed = 0, produced = 0;
    for (size_t j = 0; j < set->n_reactions; j++) {
        double c = set->nu[j * set->n_species + (size_t)k];
        consumed |= c < 0.0;
        produced |= c > 0.0;
    }
    if (!consumed && !produced)
        return kphi__yaml_error(L->y, item, KPHI_EINPUT, err,
                                "conversion species '%s' takes part in no reaction (it is "
                                "inert); name a reactant",
                                name);
    /* Derived reactions have arbitrary directions: taking part is enough. */
    if (!consumed && !set->derived)
        return kphi__yaml_error(L->y, item, KPHI_EINPUT, err,
                                "conversion species '%s' is not consumed by any reaction (it is "
                                "only a product); name a reactant",
                                name);
    set->weights[k] = 1.0;
    return KPHI_OK;
}

static int load_conversion(kphi__rxnset_loader *L, yaml_node_t *node, kphi_error *err)
{
    kphi_rxnset *set = L->set;
    int rc = KPHI_OK;
    if (node == NULL) {
        set->weights[L->first_reactant[0]] = 1.0;
    } else if (node->type == YAML_SEQUENCE_NODE) {
        size_t n = (size_t)(node->data.sequence.items.top - node->data.sequence.items.start);
        if (n == 0)
            return kphi__yaml_error(L->y, node, KPHI_EINPUT, err,
                                    "'conversion' is empty; name a species such as N2");
        for (size_t m = 0; m < n && rc == KPHI_OK; m++)
            rc = conversion_entry(L, kphi__yaml_node(L->y, node->data.sequence.items.start[m]),
                                  err);
    } else {
        rc = conversion_entry(L, node, err);
    }
    if (rc != KPHI_OK)
        return rc;
    size_t len = 1;
    for (size_t i = 0; i < set->n_species; i++)
        if (set->weights[i] != 0.0)
            len += strlen(set->species[i].name) + 1;
    set->conv_label = malloc(len);
    if (set->conv_label == NULL)
        return kphi__rxnset_nomem(L, err);
    set->conv_label[0] = '\0';
    /* Label in the order the user listed them (the species order when defaulted). */
    if (node != NULL && node->type == YAML_SEQUENCE_NODE) {
        for (yaml_node_item_t *it = node->data.sequence.items.start;
             it < node->data.sequence.items.top; it++) {
            if (it != node->data.sequence.items.start)
                strcat(set->conv_label, "+");
            strcat(set->conv_label, kphi__yaml_scalar(kphi__yaml_node(L->y, *it)));
        }
    } else {
        for (size_t i = 0; i < set->n_species; i++)
            if (set->weights[i] != 0.0)
                strcat(set->conv_label, set->species[i].name);
    }
    return KPHI_OK;
}

static int kij_species(kphi__rxnset_loader *L, yaml_node_t *item, size_t *out, kphi_error *err)
{
    const char *name = kphi__yaml_scalar(item);
    if (name == NULL)
        return kphi__yaml_error(L->y, item, KPHI_EINPUT, err, "expected a species name in 'pair'");
    long k = find_species(L->set, name);
    if (k < 0) {
        const char *near = kphi__closest(name, L->set->names, L->set->n_species);
        if (near != NULL)
            return kphi__yaml_error(L->y, item, KPHI_EINPUT, err,
                                    "k_ij species '%s' is not in the set's species list (did you "
                                    "mean '%s'?)",
                                    name, near);
        return kphi__yaml_error(L->y, item, KPHI_EINPUT, err,
                                "k_ij species '%s' is not in the set's species list", name);
    }
    *out = (size_t)k;
    return KPHI_OK;
}

static int load_kij(kphi__rxnset_loader *L, yaml_node_t *list, kphi_error *err)
{
    static const char *const keys[] = {"pair", "value", "source"};
    kphi_rxnset *set = L->set;
    int rc = kphi__yaml_expect(L->y, list, YAML_SEQUENCE_NODE, "'kij'", err);
    if (rc != KPHI_OK)
        return rc;
    size_t n = (size_t)(list->data.sequence.items.top - list->data.sequence.items.start);
    set->kij_i = calloc(n + 1, sizeof *set->kij_i);
    set->kij_j = calloc(n + 1, sizeof *set->kij_j);
    set->kij = calloc(n + 1, sizeof *set->kij);
    set->kij_src = calloc(n + 1, sizeof *set->kij_src);
    if (set->kij_i == NULL || set->kij_j == NULL || set->kij == NULL || set->kij_src == NULL)
        return kphi__rxnset_nomem(L, err);
    for (size_t m = 0; m < n; m++) {
        yaml_node_t *entry = kphi__yaml_node(L->y, list->data.sequence.items.start[m]);
        rc = kphi__yaml_check_keys(L->y, entry, keys, 3, "a 'kij' entry", err);
        if (rc != KPHI_OK)
            return rc;
        yaml_node_t *pair = kphi__yaml_map_get(L->y, entry, "pair", NULL);
        yaml_node_t *value = kphi__yaml_map_get(L->y, entry, "value", NULL);
        yaml_node_t *source = kphi__yaml_map_get(L->y, entry, "source", NULL);
        if (pair == NULL || value == NULL || source == NULL)
            return kphi__yaml_error(L->y, entry, KPHI_EINPUT, err,
                                    "a 'kij' entry needs 'pair', 'value' and 'source'");
        rc = kphi__yaml_expect(L->y, pair, YAML_SEQUENCE_NODE, "'pair' (two species)", err);
        if (rc != KPHI_OK)
            return rc;
        if (pair->data.sequence.items.top - pair->data.sequence.items.start != 2)
            return kphi__yaml_error(L->y, pair, KPHI_EINPUT, err,
                                    "'pair' needs exactly two species");
        size_t a = 0, b = 0;
        yaml_node_t *second = kphi__yaml_node(L->y, pair->data.sequence.items.start[1]);
        rc = kij_species(L, kphi__yaml_node(L->y, pair->data.sequence.items.start[0]), &a, err);
        if (rc == KPHI_OK)
            rc = kij_species(L, second, &b, err);
        if (rc != KPHI_OK)
            return rc;
        if (a == b)
            return kphi__yaml_error(L->y, second, KPHI_EINPUT, err,
                                    "a k_ij pair needs two different species");
        for (size_t q = 0; q < set->n_kij; q++)
            if ((set->kij_i[q] == a && set->kij_j[q] == b) ||
                (set->kij_i[q] == b && set->kij_j[q] == a))
                return kphi__yaml_error(L->y, pair, KPHI_EINPUT, err,
                                        "k_ij for %s-%s is given twice", set->species[a].name,
                                        set->species[b].name);
        double v = 0.0;
        rc = kphi__yaml_double(L->y, value, "'value'", &v, err);
        if (rc != KPHI_OK)
            return rc;
        if (v <= -1.0 || v >= 1.0)
            return kphi__yaml_error(L->y, value, KPHI_EINPUT, err,
                                    "k_ij must lie between -1 and 1, found %g", v);
        const char *src = kphi__yaml_scalar(source);
        if (src == NULL || src[0] == '\0')
            return kphi__yaml_error(L->y, source, KPHI_EINPUT, err,
                                    "expected the published source of the k_ij value");
        set->kij_src[set->n_kij] = strdup(src);
        if (set->kij_src[set->n_kij] == NULL)
            return kphi__rxnset_nomem(L, err);
        set->kij_i[set->n_kij] = a;
        set->kij_j[set->n_kij] = b;
        set->kij[set->n_kij] = v;
        set->n_kij++;
    }
    return KPHI_OK;
}

static int set_name(kphi__rxnset_loader *L, yaml_node_t *root, kphi_error *err)
{
    kphi_rxnset *set = L->set;
    yaml_node_t *node = kphi__yaml_map_get(L->y, root, "name", NULL);
    if (node != NULL) {
        const char *s = kphi__yaml_scalar(node);
        if (s == NULL)
            return kphi__yaml_expect(L->y, node, YAML_SCALAR_NODE, "'name'", err);
        set->name = strdup(s);
    } else {
        /* Default: the file name without directory and extension. */
        const char *base = strrchr(set->path, '/');
        base = base != NULL ? base + 1 : set->path;
        set->name = strdup(base);
        if (set->name != NULL) {
            char *dot = strrchr(set->name, '.');
            if (dot != NULL && dot != set->name)
                *dot = '\0';
        }
    }
    return set->name != NULL ? KPHI_OK : kphi__rxnset_nomem(L, err);
}

/* eos: MODEL, the set's recommended equation of state. It must be one every species of
 * the set can enter: bb and bbv need Beattie-Bridgeman constants. */
static int load_eos(kphi__rxnset_loader *L, yaml_node_t *node, kphi_error *err)
{
    kphi_rxnset *set = L->set;
    const char *text = kphi__yaml_scalar(node);
    if (text == NULL)
        return kphi__yaml_expect(L->y, node, YAML_SCALAR_NODE, "'eos' (e.g. pr)", err);
    kphi_mark at = kphi__yaml_mark(node);
    kphi_eos_model m;
    int rc = kphi_eos_model_parse(text, &m, set->path, at, err);
    if (rc != KPHI_OK)
        return rc;
    for (size_t i = 0; i < set->n_species; i++) {
        const kphi_species *sp = &set->species[i];
        if ((m == KPHI_EOS_BB || m == KPHI_EOS_BBV) && !sp->has_bb)
            return kphi__yaml_error(L->y, node, KPHI_EINPUT, err,
                                    "the set recommends '%s', but species '%s' has no "
                                    "Beattie-Bridgeman constants (key 'beattie_bridgeman' of "
                                    "its species data)",
                                    kphi_eos_model_name(m), sp->name);
    }
    set->has_eos = 1;
    set->eos = m;
    set->eos_mark = at;
    return KPHI_OK;
}

static int load_set(kphi__rxnset_loader *L, kphi_error *err)
{
    static const char *const keys[] = {"name",       "species_file", "species", "reactions",
                                       "conversion", "kij",          "eos"};
    kphi_rxnset *set = L->set;
    yaml_node_t *root = kphi__yaml_root(L->y);
    int rc = kphi__yaml_check_kind(L->y, root, KPHI__KIND_RXNSET,
                                   "; 'reactions' of a case must name a reaction-set file such "
                                   "as reactions/ammonia.yaml",
                                   err);
    if (rc == KPHI_OK)
        rc = kphi__yaml_check_keys(L->y, root, keys, sizeof keys / sizeof keys[0],
                                   "a reaction set", err);
    if (rc != KPHI_OK)
        return rc;
    if ((rc = set_name(L, root, err)) != KPHI_OK)
        return rc;
    if ((rc = load_species_db(L, root, err)) != KPHI_OK)
        return rc;
    yaml_node_t *species = kphi__yaml_map_get(L->y, root, "species", NULL);
    if (species == NULL)
        return kphi__yaml_error(L->y, root, KPHI_EINPUT, err,
                                "a reaction set needs 'species', e.g. species: [N2, H2, NH3]");
    if ((rc = load_species(L, species, err)) != KPHI_OK)
        return rc;
    if ((rc = build_elements(L, err)) != KPHI_OK)
        return rc;
    yaml_node_t *reactions = kphi__yaml_map_get(L->y, root, "reactions", NULL);
    if (reactions != NULL) {
        rc = load_reactions(L, reactions, err);
    } else {
        set->derived = 1;
        rc = kphi__rxnset_derive_reactions(L, species, err);
        if (rc == KPHI_OK)
            rc = order_by_species(L, err);
        for (size_t j = 0; j < set->n_reactions && rc == KPHI_OK; j++) {
            rc = check_balance(L, j, err); /* guards the derivation itself */
            if (rc == KPHI_OK)
                rc = check_independent(L, j, err);
        }
    }
    if (rc != KPHI_OK)
        return rc;
    for (size_t j = 0; j < set->n_reactions; j++) {
        set->equation[j] = kphi__rxnset_equation_text(set, j, L->order + j * set->n_species,
                                                      L->n_order[j]);
        if (set->equation[j] == NULL)
            return kphi__rxnset_nomem(L, err);
    }
    for (size_t i = 0; i < set->n_species; i++) {
        set->inert[i] = 1;
        for (size_t j = 0; j < set->n_reactions; j++)
            if (set->nu[j * set->n_species + i] != 0.0)
                set->inert[i] = 0;
    }
    if ((rc = kphi__rxnset_build_bases(L, err)) != KPHI_OK)
        return rc;
    if ((rc = load_conversion(L, kphi__yaml_map_get(L->y, root, "conversion", NULL), err)) !=
        KPHI_OK)
        return rc;
    yaml_node_t *kij = kphi__yaml_map_get(L->y, root, "kij", NULL);
    if (kij != NULL && (rc = load_kij(L, kij, err)) != KPHI_OK)
        return rc;
    yaml_node_t *eos = kphi__yaml_map_get(L->y, root, "eos", NULL);
    if (eos != NULL && (rc = load_eos(L, eos, err)) != KPHI_OK)
        return rc;
    return KPHI_OK;
}

static kphi_rxnset *load_parsed(kphi__yaml *y, const char *path, const kphi_species_db *db,
                                const char *species_default, kphi_error *err)
{
    kphi_mark none = {0, 0};
    kphi_rxnset *set = calloc(1, sizeof *set);
    if (set == NULL || (set->path = strdup(path)) == NULL) {
        free(set);
        kphi__yaml_free(y);
        kphi_error_set(err, KPHI_ENOMEM, path, none, "out of memory");
        return NULL;
    }
    kphi__rxnset_loader L = {y, set, db, species_default, NULL, NULL, NULL};
    int rc = load_set(&L, err);
    free(L.order);
    free(L.n_order);
    free(L.first_reactant);
    kphi__yaml_free(y);
    if (rc != KPHI_OK) {
        kphi_rxnset_free(set);
        return NULL;
    }
    return set;
}

kphi_rxnset *kphi_rxnset_load_file(const char *path, const kphi_species_db *db,
                                   kphi_error *err)
{
    return kphi_rxnset_load_file_default(path, db, NULL, err);
}

kphi_rxnset *kphi_rxnset_load_file_default(const char *path, const kphi_species_db *db,
                                           const char *species_default, kphi_error *err)
{
    kphi__yaml y;
    if (kphi__yaml_load_file(&y, path, err) != KPHI_OK)
        return NULL;
    return load_parsed(&y, path, db, species_default, err);
}

/* With db NULL, `name` is taken as the path the text came from: a relative species_file
 * (or the default species.yaml) is looked up beside it. */
kphi_rxnset *kphi_rxnset_load_string(const char *text, size_t len, const char *name,
                                     const kphi_species_db *db, kphi_error *err)
{
    kphi__yaml y;
    if (name == NULL)
        name = "<string>";
    if (kphi__yaml_load_string(&y, text, len, name, err) != KPHI_OK)
        return NULL;
    return load_parsed(&y, name, db, NULL, err);
}

/* ---- accessors ------------------------------------------------------------------------ */

const char *kphi_rxnset_name(const kphi_rxnset *set)
{
    return set->name;
}

int kphi_rxnset_eos(const kphi_rxnset *set, kphi_eos_model *model, kphi_mark *at)
{
    if (!set->has_eos)
        return 0;
    if (model != NULL)
        *model = set->eos;
    if (at != NULL)
        *at = set->eos_mark;
    return 1;
}

const char *kphi_rxnset_path(const kphi_rxnset *set)
{
    return set->path;
}

size_t kphi_rxnset_n_species(const kphi_rxnset *set)
{
    return set->n_species;
}

const kphi_species *kphi_rxnset_species(const kphi_rxnset *set, size_t i)
{
    return i < set->n_species ? &set->species[i] : NULL;
}

long kphi_rxnset_species_index(const kphi_rxnset *set, const char *name)
{
    return name != NULL ? find_species(set, name) : -1;
}

const char *kphi_rxnset_suggest(const kphi_rxnset *set, const char *name)
{
    return kphi__closest(name, set->names, set->n_species);
}

int kphi_rxnset_is_inert(const kphi_rxnset *set, size_t i)
{
    return i < set->n_species ? set->inert[i] : 0;
}

long kphi_rxnset_first_product(const kphi_rxnset *set)
{
    if (set->n_reactions == 0)
        return -1;
    for (size_t i = 0; i < set->n_species; i++)
        if (kphi_rxnset_nu(set, 0, i) > 0.0)
            return (long)i;
    return -1;
}

size_t kphi_rxnset_n_reactions(const kphi_rxnset *set)
{
    return set->n_reactions;
}

double kphi_rxnset_nu(const kphi_rxnset *set, size_t j, size_t i)
{
    if (j >= set->n_reactions || i >= set->n_species)
        return 0.0;
    return set->nu[j * set->n_species + i];
}

const double *kphi_rxnset_nu_matrix(const kphi_rxnset *set)
{
    return set->nu;
}

double kphi_rxnset_dnu(const kphi_rxnset *set, size_t j)
{
    double s = 0.0;
    if (j < set->n_reactions)
        for (size_t i = 0; i < set->n_species; i++)
            s += set->nu[j * set->n_species + i];
    return s;
}

const char *kphi_rxnset_equation(const kphi_rxnset *set, size_t j)
{
    return j < set->n_reactions ? set->equation[j] : NULL;
}

int kphi_rxnset_derived(const kphi_rxnset *set)
{
    return set->derived;
}

size_t kphi_rxnset_n_elements(const kphi_rxnset *set)
{
    return set->n_elements;
}

const char *kphi_rxnset_element(const kphi_rxnset *set, size_t k)
{
    return k < set->n_elements ? set->element[k] : NULL;
}

double kphi_rxnset_atoms(const kphi_rxnset *set, size_t k, size_t i)
{
    if (k >= set->n_elements || i >= set->n_species)
        return 0.0;
    return set->atoms[k * set->n_species + i];
}

double kphi_rxnset_balance_error(const kphi_rxnset *set, const double a[], const double b[])
{
    size_t s = set->n_species;
    double amax = 0.0, worst = 0.0;
    for (size_t k = 0; k < set->n_elements; k++) {
        const double *at = &set->atoms[k * s];
        double ea = 0.0, eb = 0.0;
        for (size_t i = 0; i < s; i++) {
            ea += at[i] * a[i];
            eb += at[i] * b[i];
        }
        if (ea > amax)
            amax = ea;
        if (fabs(eb - ea) > worst)
            worst = fabs(eb - ea);
    }
    return worst / (amax > 0.0 ? amax : 1.0);
}

const double *kphi_rxnset_conversion_weights(const kphi_rxnset *set)
{
    return set->weights;
}

const char *kphi_rxnset_conversion_label(const kphi_rxnset *set)
{
    return set->conv_label;
}

size_t kphi_rxnset_n_kij(const kphi_rxnset *set)
{
    return set->n_kij;
}

const char *kphi_rxnset_kij_source(const kphi_rxnset *set, size_t m)
{
    return m < set->n_kij && set->kij_src != NULL ? set->kij_src[m] : NULL;
}

void kphi_rxnset_kij(const kphi_rxnset *set, size_t m, size_t *i, size_t *j, double *kij)
{
    if (m >= set->n_kij)
        return;
    if (i != NULL)
        *i = set->kij_i[m];
    if (j != NULL)
        *j = set->kij_j[m];
    if (kij != NULL)
        *kij = set->kij[m];
}
