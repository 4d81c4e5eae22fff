/* kphi rxnset, the equilibrium-constant correlations: published K(T) of a reaction, read
 * from the reaction set beside its equation, grouped into K bases by name, and evaluated.
 *
 * A correlation states a sum of terms c_k t_k(T) (T in K):
 *   t = 1, 1/T, 1/T^2, T, T^2, T^3, T^4, T^5, ln T, log10 T, T ln T,
 * as one of three forms (what the sum equals):
 *   ln K = S(T),   log10 K = S(T),   R T ln K = S(T)  (S in J/mol, with the R it was
 * fitted with), so L(T) = S, ln 10 S or S/(R T) is the stated ln K. The forms cover
 * the published ones used here: log10 K = a/T + b (Graaf et al. 1986), log10 Ka with a
 * log10 T, T and T^2 term (Gillespie & Beattie 1930), and (1/RT)(c1 + c2 T + ... + c6 T^5
 * + c7 T ln T) (Graaf & Winkelman 2016).
 *
 * Stated K refers to a standard pressure P_std (1 atm or 1 bar) and to the reaction as
 * written, or per mole of one of its species (then the set's equation is s = |nu_k| times
 * the stated reaction). kphi works with P° = 1 bar and the equation as written:
 *   K = prod (f_i / P°)^nu_i = prod (f_i / P_std)^nu_i (P_std / P°)^dnu,
 * so  ln K = s L(T) + dnu ln(P_std / P°),  dnu = sum nu_i of the equation as written.
 * For 1 atm, P_std/P° = 1.01325 exactly (1 atm = 101325 Pa by definition): ammonia
 * synthesis (dnu = -2) has K_bar = K_atm / 1.01325^2, smaller.
 *
 * The van 't Hoff heat of reaction of a correlation (Denbigh 1981, "The Principles of
 * Chemical Equilibrium", 4th ed., eq. 4.29, from memory):
 *   dH = -R d ln K / d(1/T) = R T^2 d ln K / dT = s R T^2 dL/dT,
 * with dL/dT = S', ln 10 S' or (T S' - S)/(R T^2); the P_std term is constant in T.
 *
 * Loader rules (each a file:line:column error): a known term with a finite coefficient,
 * one form, R with the RT ln K form only, a source, P_standard an absolute pressure,
 * T_range two temperatures in increasing order, 'per' the word 'equation' or a species of
 * the reaction, a name of letters, digits, '_', '-' or '.' that is neither 'tables' nor
 * 'all', and no name twice on one reaction. */
#include "rxnset_internal.h"

#include <ctype.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "internal.h"
#include "kphi/thermo.h"
#include "kphi/units.h"

enum { NAME_MAX_CHARS = 40 };

static const double LN10 = 2.302585092994045684; /* ln 10 */

static const char *const TERM_KEYS[KPHI__K_NTERMS] = {
    "const", "1/T", "1/T^2", "T", "T^2", "T^3", "T^4", "T^5", "ln T", "log10 T", "T ln T"};

static const char *const FORM_KEYS[3] = {"ln K", "log10 K", "RT ln K"};

static const char *const ENTRY_KEYS[] = {"name",       "source",  "note", "ln K", "log10 K",
                                         "RT ln K",    "R",       "P_standard", "T_range",
                                         "per"};

/* t_k(T) and dt_k/dT. */
static void term_values(double T, double t[KPHI__K_NTERMS], double dt[KPHI__K_NTERMS])
{
    double lnT = log(T);
    t[0] = 1.0;
    dt[0] = 0.0;
    t[1] = 1.0 / T;
    dt[1] = -1.0 / (T * T);
    t[2] = 1.0 / (T * T);
    dt[2] = -2.0 / (T * T * T);
    t[3] = T;
    dt[3] = 1.0;
    t[4] = T * T;
    dt[4] = 2.0 * T;
    t[5] = T * T * T;
    dt[5] = 3.0 * T * T;
    t[6] = t[5] * T;
    dt[6] = 4.0 * t[5];
    t[7] = t[6] * T;
    dt[7] = 5.0 * t[6];
    t[8] = lnT;
    dt[8] = 1.0 / T;
    t[9] = log10(T);
    dt[9] = 1.0 / (T * LN10);
    t[10] = T * lnT;
    dt[10] = lnT + 1.0;
}

/* The stated ln K, L(T), and dL/dT. */
static void stated(const kphi_rxnset_kcorr *k, double T, double *L, double *dL)
{
    double t[KPHI__K_NTERMS], dt[KPHI__K_NTERMS];
    term_values(T, t, dt);
    double S = 0.0, dS = 0.0;
    for (size_t m = 0; m < KPHI__K_NTERMS; m++) {
        if (k->coef[m] != 0.0) {
            S += k->coef[m] * t[m];
            dS += k->coef[m] * dt[m];
        }
    }
    switch (k->form) {
    case KPHI__K_LOG10:
        *L = LN10 * S;
        *dL = LN10 * dS;
        break;
    case KPHI__K_RTLN:
        *L = S / (k->R * T);
        *dL = (T * dS - S) / (k->R * T * T);
        break;
    case KPHI__K_LN:
    default:
        *L = S;
        *dL = dS;
        break;
    }
}

/* ---- evaluation and accessors ------------------------------------------------------- */

double kphi_rxnset_kcorr_lnK_stated(const kphi_rxnset_kcorr *k, double T)
{
    double L, dL;
    stated(k, T, &L, &dL);
    return L;
}

double kphi_rxnset_kcorr_lnK(const kphi_rxnset_kcorr *k, double T)
{
    return k->scale * kphi_rxnset_kcorr_lnK_stated(k, T) +
           k->dnu * log(k->P_std / KPHI_P_STANDARD);
}

double kphi_rxnset_kcorr_dH(const kphi_rxnset_kcorr *k, double T)
{
    double L, dL;
    stated(k, T, &L, &dL);
    return k->scale * KPHI_R * T * T * dL;
}

const char *kphi_rxnset_kcorr_name(const kphi_rxnset_kcorr *k)
{
    return k->name;
}

const char *kphi_rxnset_kcorr_source(const kphi_rxnset_kcorr *k)
{
    return k->source;
}

const char *kphi_rxnset_kcorr_note(const kphi_rxnset_kcorr *k)
{
    return k->note != NULL ? k->note : "";
}

const char *kphi_rxnset_kcorr_per(const kphi_rxnset_kcorr *k)
{
    return k->per;
}

void kphi_rxnset_kcorr_range(const kphi_rxnset_kcorr *k, double *T_min, double *T_max)
{
    if (T_min != NULL)
        *T_min = k->T_min;
    if (T_max != NULL)
        *T_max = k->T_max;
}

int kphi_rxnset_kcorr_in_range(const kphi_rxnset_kcorr *k, double T)
{
    return T >= k->T_min && T <= k->T_max;
}

double kphi_rxnset_kcorr_P_standard(const kphi_rxnset_kcorr *k)
{
    return k->P_std;
}

int kphi_rxnset_kcorr_text(const kphi_rxnset_kcorr *k, char *buf, size_t n)
{
    static const char *const FMT[KPHI__K_NTERMS] = {
        "%.10g", "%.10g/T", "%.10g/T^2", "%.10g T", "%.10g T^2", "%.10g T^3",
        "%.10g T^4", "%.10g T^5", "%.10g ln T", "%.10g log10 T", "%.10g T ln T"};
    /* the order published forms are usually written in: 1/T terms first, constant last */
    static const size_t ORDER[KPHI__K_NTERMS] = {1, 2, 8, 9, 10, 3, 4, 5, 6, 7, 0};
    /* RT ln K is a polynomial with the constant first */
    static const size_t ORDER_RT[KPHI__K_NTERMS] = {0, 3, 4, 5, 6, 7, 10, 8, 9, 1, 2};
    size_t used = 0;
    int total = 0;
#define PUT(...)                                                                              \
    do {                                                                                      \
        int w_ = snprintf(buf != NULL && used < n ? buf + used : NULL,                        \
                          buf != NULL && used < n ? n - used : 0, __VA_ARGS__);                \
        if (w_ > 0) {                                                                         \
            total += w_;                                                                      \
            used += (size_t)w_;                                                               \
        }                                                                                     \
    } while (0)
    if (buf != NULL && n > 0)
        buf[0] = '\0';
    PUT("%s = %s", FORM_KEYS[k->form], k->form == KPHI__K_RTLN ? "(" : "");
    int first = 1;
    for (size_t q = 0; q < KPHI__K_NTERMS; q++) {
        size_t m = k->form == KPHI__K_RTLN ? ORDER_RT[q] : ORDER[q];
        double c = k->coef[m];
        if (c == 0.0)
            continue;
        if (!first)
            PUT(" %c ", c < 0.0 ? '-' : '+');
        PUT(FMT[m], first ? c : fabs(c));
        first = 0;
    }
    if (first)
        PUT("0");
    if (k->form == KPHI__K_RTLN)
        PUT(") J/mol, R = %.10g J/(mol K)", k->R);
#undef PUT
    return total;
}

/* ---- bases -------------------------------------------------------------------------- */

size_t kphi_rxnset_n_K_bases(const kphi_rxnset *set)
{
    return set->n_bases > 0 ? set->n_bases : 1;
}

const char *kphi_rxnset_K_basis_name(const kphi_rxnset *set, size_t b)
{
    if (b == KPHI_K_TABLES)
        return "tables";
    return b < set->n_bases ? set->basis[b] : NULL;
}

long kphi_rxnset_K_basis_find(const kphi_rxnset *set, const char *name)
{
    if (name == NULL)
        return -1;
    if (strcmp(name, "tables") == 0)
        return KPHI_K_TABLES;
    for (size_t b = 1; b < set->n_bases; b++)
        if (strcmp(set->basis[b], name) == 0)
            return (long)b;
    return -1;
}

const char *kphi_rxnset_K_basis_suggest(const kphi_rxnset *set, const char *name)
{
    const char *tables = "tables";
    if (set->n_bases <= 1)
        return kphi__closest(name, &tables, 1);
    const char *near = kphi__closest(name, (const char *const *)set->basis, set->n_bases);
    return near;
}

const kphi_rxnset_kcorr *kphi_rxnset_kcorr_get(const kphi_rxnset *set, size_t j, size_t b)
{
    if (b == KPHI_K_TABLES || b >= set->n_bases || j >= set->n_reactions)
        return NULL;
    long m = set->kmap[b * set->n_reactions + j];
    return m >= 0 ? &set->kcorr[m] : NULL;
}

void kphi__rxnset_free_kcorr(kphi_rxnset *set)
{
    for (size_t m = 0; m < set->n_kcorr; m++) {
        free(set->kcorr[m].name);
        free(set->kcorr[m].source);
        free(set->kcorr[m].note);
        free(set->kcorr[m].per);
    }
    free(set->kcorr);
    if (set->basis != NULL)
        for (size_t b = 0; b < set->n_bases; b++)
            free(set->basis[b]);
    free(set->basis);
    free(set->kmap);
}

int kphi__rxnset_build_bases(kphi__rxnset_loader *L, kphi_error *err)
{
    kphi_rxnset *set = L->set;
    size_t nr = set->n_reactions, cap = set->n_kcorr + 1;
    set->basis = calloc(cap, sizeof *set->basis);
    if (set->basis == NULL || (set->basis[0] = strdup("tables")) == NULL)
        return kphi__rxnset_nomem(L, err);
    set->n_bases = 1;
    for (size_t m = 0; m < set->n_kcorr; m++) {
        size_t b = 1;
        while (b < set->n_bases && strcmp(set->basis[b], set->kcorr[m].name) != 0)
            b++;
        if (b == set->n_bases) {
            if ((set->basis[b] = strdup(set->kcorr[m].name)) == NULL)
                return kphi__rxnset_nomem(L, err);
            set->n_bases++;
        }
    }
    set->kmap = malloc(set->n_bases * (nr > 0 ? nr : 1) * sizeof *set->kmap);
    if (set->kmap == NULL)
        return kphi__rxnset_nomem(L, err);
    for (size_t q = 0; q < set->n_bases * nr; q++)
        set->kmap[q] = -1;
    for (size_t m = 0; m < set->n_kcorr; m++) {
        long b = kphi_rxnset_K_basis_find(set, set->kcorr[m].name);
        set->kmap[(size_t)b * nr + set->kcorr[m].reaction] = (long)m;
    }
    return KPHI_OK;
}

/* ---- the loader --------------------------------------------------------------------- */

static int copy_text(kphi__rxnset_loader *L, yaml_node_t *node, const char *what, char **out,
                     kphi_error *err)
{
    const char *s = kphi__yaml_scalar(node);
    if (s == NULL)
        return kphi__yaml_expect(L->y, node, YAML_SCALAR_NODE, what, err);
    while (isspace((unsigned char)*s))
        s++;
    if (*s == '\0')
        return kphi__yaml_error(L->y, node, KPHI_EINPUT, err, "%s is empty", what);
    *out = strdup(s);
    return *out != NULL ? KPHI_OK : kphi__rxnset_nomem(L, err);
}

static int check_name(kphi__rxnset_loader *L, yaml_node_t *node, const char *s, kphi_error *err)
{
    size_t len = strlen(s);
    if (len > NAME_MAX_CHARS)
        return kphi__yaml_error(L->y, node, KPHI_EINPUT, err,
                                "a K correlation name has at most %d characters",
                                NAME_MAX_CHARS);
    for (size_t i = 0; i < len; i++) {
        unsigned char ch = (unsigned char)s[i];
        if (!(isalnum(ch) || ch == '_' || ch == '-' || ch == '.'))
            return kphi__yaml_error(L->y, node, KPHI_EINPUT, err,
                                    "K correlation name '%s' has '%c'; use letters, digits, "
                                    "'_', '-' or '.' (it is typed after --K)",
                                    s, ch);
    }
    if (strcmp(s, "tables") == 0 || strcmp(s, "all") == 0)
        return kphi__yaml_error(L->y, node, KPHI_EINPUT, err,
                                "'%s' is reserved for --K; give the correlation another name",
                                s);
    return KPHI_OK;
}

static int load_terms(kphi__rxnset_loader *L, yaml_node_t *map, const char *form,
                      kphi_rxnset_kcorr *k, kphi_error *err)
{
    char what[48];
    snprintf(what, sizeof what, "'%s' (a mapping of terms)", form);
    int rc = kphi__yaml_expect(L->y, map, YAML_MAPPING_NODE, what, err);
    if (rc != KPHI_OK)
        return rc;
    if (map->data.mapping.pairs.top == map->data.mapping.pairs.start)
        return kphi__yaml_error(L->y, map, KPHI_EINPUT, err,
                                "'%s' has no terms; write e.g. {1/T: 5139, const: -12.621}",
                                form);
    int given[KPHI__K_NTERMS] = {0};
    for (yaml_node_pair_t *p = map->data.mapping.pairs.start; p < map->data.mapping.pairs.top;
         p++) {
        yaml_node_t *key = kphi__yaml_node(L->y, p->key);
        yaml_node_t *val = kphi__yaml_node(L->y, p->value);
        const char *s = kphi__yaml_scalar(key);
        if (s == NULL)
            return kphi__yaml_error(L->y, key, KPHI_EINPUT, err,
                                    "a term of '%s' must be a plain name such as 1/T", form);
        size_t m = 0;
        while (m < KPHI__K_NTERMS && strcmp(s, TERM_KEYS[m]) != 0)
            m++;
        if (m == KPHI__K_NTERMS) {
            const char *near = kphi__closest(s, TERM_KEYS, KPHI__K_NTERMS);
            if (near != NULL)
                return kphi__yaml_error(L->y, key, KPHI_EINPUT, err,
                                        "unknown term '%s' in '%s' (did you mean '%s'?)", s,
                                        form, near);
            return kphi__yaml_error(L->y, key, KPHI_EINPUT, err,
                                    "unknown term '%s' in '%s'; the terms are const, 1/T, "
                                    "1/T^2, T, T^2, T^3, T^4, T^5, ln T, log10 T, T ln T",
                                    s, form);
        }
        if (given[m])
            return kphi__yaml_error(L->y, key, KPHI_EINPUT, err, "term '%s' given twice in '%s'",
                                    s, form);
        given[m] = 1;
        char vwhat[64];
        snprintf(vwhat, sizeof vwhat, "the coefficient of '%s'", s);
        rc = kphi__yaml_double(L->y, val, vwhat, &k->coef[m], err);
        if (rc != KPHI_OK)
            return rc;
    }
    return KPHI_OK;
}

static int load_range(kphi__rxnset_loader *L, yaml_node_t *node, kphi_rxnset_kcorr *k,
                      kphi_error *err)
{
    int rc = kphi__yaml_expect(L->y, node, YAML_SEQUENCE_NODE,
                               "'T_range' (two temperatures, e.g. [473.15 K, 543.15 K])", err);
    if (rc != KPHI_OK)
        return rc;
    if (node->data.sequence.items.top - node->data.sequence.items.start != 2)
        return kphi__yaml_error(L->y, node, KPHI_EINPUT, err,
                                "'T_range' needs two temperatures, lowest first, e.g. "
                                "[473.15 K, 543.15 K]");
    double T[2];
    yaml_node_t *item[2];
    for (int q = 0; q < 2; q++) {
        item[q] = kphi__yaml_node(L->y, node->data.sequence.items.start[q]);
        const char *s = kphi__yaml_scalar(item[q]);
        if (s == NULL)
            return kphi__yaml_expect(L->y, item[q], YAML_SCALAR_NODE,
                                     "a temperature in 'T_range'", err);
        kphi_units_origin origin = {L->y->path, kphi__yaml_mark(item[q])};
        rc = kphi_units_temperature(s, &T[q], &origin, err);
        if (rc != KPHI_OK)
            return rc;
    }
    if (!(T[1] > T[0]))
        return kphi__yaml_error(L->y, item[1], KPHI_EINPUT, err,
                                "'T_range' is inverted or empty: %.2f K is not above %.2f K; "
                                "write the lowest temperature first",
                                T[1], T[0]);
    k->T_min = T[0];
    k->T_max = T[1];
    return KPHI_OK;
}

static int load_P_standard(kphi__rxnset_loader *L, yaml_node_t *node, kphi_rxnset_kcorr *k,
                           kphi_error *err)
{
    const char *s = kphi__yaml_scalar(node);
    if (s == NULL)
        return kphi__yaml_expect(L->y, node, YAML_SCALAR_NODE,
                                 "'P_standard' (a pressure such as 1 atm or 1 bar)", err);
    char unit[16];
    kphi_units_name(s, unit, sizeof unit);
    if (strcmp(unit, "barg") == 0 || strcmp(unit, "psig") == 0)
        return kphi__yaml_error(L->y, node, KPHI_EINPUT, err,
                                "'P_standard' is an absolute pressure; '%s' is a gauge unit",
                                unit);
    kphi_units_origin origin = {L->y->path, kphi__yaml_mark(node)};
    return kphi_units_pressure(s, &k->P_std, &origin, err);
}

static int load_per(kphi__rxnset_loader *L, yaml_node_t *node, size_t j, kphi_rxnset_kcorr *k,
                    kphi_error *err)
{
    kphi_rxnset *set = L->set;
    const char *s = kphi__yaml_scalar(node);
    if (s == NULL)
        return kphi__yaml_expect(L->y, node, YAML_SCALAR_NODE,
                                 "'per' (equation, or a species of the reaction)", err);
    k->scale = 1.0;
    if (strcmp(s, "equation") == 0)
        return KPHI_OK;
    const char *in_rxn[64];
    char list[160] = "";
    size_t n_in = 0, used = 0;
    long found = -1;
    for (size_t i = 0; i < set->n_species; i++) {
        if (set->nu[j * set->n_species + i] == 0.0)
            continue;
        if (n_in < 64)
            in_rxn[n_in++] = set->species[i].name;
        int w = snprintf(list + used, sizeof list - used, "%s%s", used ? ", " : "",
                         set->species[i].name);
        if (w > 0 && (size_t)w < sizeof list - used)
            used += (size_t)w;
        if (strcmp(set->species[i].name, s) == 0)
            found = (long)i;
    }
    if (found < 0) {
        const char *near = kphi__closest(s, in_rxn, n_in);
        if (near != NULL)
            return kphi__yaml_error(L->y, node, KPHI_EINPUT, err,
                                    "'per: %s': not a species of reaction %zu (did you mean "
                                    "'%s'?)",
                                    s, j + 1, near);
        return kphi__yaml_error(L->y, node, KPHI_EINPUT, err,
                                "'per: %s': expected 'equation' or a species of reaction %zu "
                                "(%s)",
                                s, j + 1, list);
    }
    k->scale = fabs(set->nu[j * set->n_species + (size_t)found]);
    k->per = strdup(s);
    return k->per != NULL ? KPHI_OK : kphi__rxnset_nomem(L, err);
}

static int load_entry(kphi__rxnset_loader *L, yaml_node_t *entry, size_t j, kphi_rxnset_kcorr *k,
                      kphi_error *err)
{
    kphi__yaml *y = L->y;
    kphi_rxnset *set = L->set;
    int rc = kphi__yaml_check_keys(y, entry, ENTRY_KEYS, sizeof ENTRY_KEYS / sizeof ENTRY_KEYS[0],
                                   "a K correlation", err);
    if (rc != KPHI_OK)
        return rc;
    k->reaction = j;
    k->scale = 1.0;
    k->R = NAN;
    double dnu = 0.0;
    for (size_t i = 0; i < set->n_species; i++)
        dnu += set->nu[j * set->n_species + i];
    k->dnu = dnu;

    yaml_node_t *name = kphi__yaml_map_get(y, entry, "name", NULL);
    if (name == NULL)
        return kphi__yaml_error(y, entry, KPHI_EINPUT, err,
                                "a K correlation needs a 'name' (the basis chosen with --K)");
    if ((rc = copy_text(L, name, "'name'", &k->name, err)) != KPHI_OK)
        return rc;
    if ((rc = check_name(L, name, k->name, err)) != KPHI_OK)
        return rc;
    for (size_t m = 0; m < set->n_kcorr && &set->kcorr[m] != k; m++)
        if (set->kcorr[m].reaction == j && strcmp(set->kcorr[m].name, k->name) == 0)
            return kphi__yaml_error(y, name, KPHI_EINPUT, err,
                                    "reaction %zu has two K correlations named '%s'", j + 1,
                                    k->name);

    yaml_node_t *source = kphi__yaml_map_get(y, entry, "source", NULL);
    if (source == NULL)
        return kphi__yaml_error(y, entry, KPHI_EINPUT, err,
                                "K correlation '%s' has no 'source': cite the paper (author, "
                                "year, equation or table)",
                                k->name);
    if ((rc = copy_text(L, source, "'source'", &k->source, err)) != KPHI_OK)
        return rc;
    yaml_node_t *note = kphi__yaml_map_get(y, entry, "note", NULL);
    if (note != NULL && (rc = copy_text(L, note, "'note'", &k->note, err)) != KPHI_OK)
        return rc;

    yaml_node_t *form = NULL;
    yaml_node_t *form_key = NULL;
    for (int f = 0; f < 3; f++) {
        yaml_node_t *kn = NULL;
        yaml_node_t *v = kphi__yaml_map_get(y, entry, FORM_KEYS[f], &kn);
        if (v == NULL)
            continue;
        if (form != NULL) {
            /* point at the one written second */
            int later = kn->start_mark.index > form_key->start_mark.index;
            return kphi__yaml_error(y, later ? kn : form_key, KPHI_EINPUT, err,
                                    "K correlation '%s' gives both '%s' and '%s'; give one",
                                    k->name, FORM_KEYS[later ? k->form : (kphi__k_form)f],
                                    FORM_KEYS[later ? (kphi__k_form)f : k->form]);
        }
        form = v;
        form_key = kn;
        k->form = (kphi__k_form)f;
    }
    if (form == NULL)
        return kphi__yaml_error(y, entry, KPHI_EINPUT, err,
                                "K correlation '%s' has no expression: give 'ln K', 'log10 K' "
                                "or 'RT ln K' as a mapping of terms",
                                k->name);
    if ((rc = load_terms(L, form, FORM_KEYS[k->form], k, err)) != KPHI_OK)
        return rc;
    yaml_node_t *R = kphi__yaml_map_get(y, entry, "R", NULL);
    if (k->form == KPHI__K_RTLN) {
        if (R == NULL)
            return kphi__yaml_error(y, form_key, KPHI_EINPUT, err,
                                    "'RT ln K' needs 'R', the gas constant the coefficients "
                                    "were fitted with, in J/(mol K)");
        if ((rc = kphi__yaml_double(y, R, "'R'", &k->R, err)) != KPHI_OK)
            return rc;
        if (!(k->R > 8.0 && k->R < 8.7))
            return kphi__yaml_error(y, R, KPHI_EINPUT, err,
                                    "'R' = %g is not the gas constant in J/(mol K) (8.314...)",
                                    k->R);
    } else if (R != NULL) {
        return kphi__yaml_error(y, R, KPHI_EINPUT, err,
                                "'R' belongs to the 'RT ln K' form only; '%s' needs none",
                                FORM_KEYS[k->form]);
    }

    yaml_node_t *P = kphi__yaml_map_get(y, entry, "P_standard", NULL);
    if (P == NULL)
        return kphi__yaml_error(y, entry, KPHI_EINPUT, err,
                                "K correlation '%s' has no 'P_standard': the standard pressure "
                                "its K refers to (1 bar, or 1 atm in older work)",
                                k->name);
    if ((rc = load_P_standard(L, P, k, err)) != KPHI_OK)
        return rc;
    yaml_node_t *range = kphi__yaml_map_get(y, entry, "T_range", NULL);
    if (range == NULL)
        return kphi__yaml_error(y, entry, KPHI_EINPUT, err,
                                "K correlation '%s' has no 'T_range': the temperatures it is "
                                "valid for, e.g. [473.15 K, 543.15 K]",
                                k->name);
    if ((rc = load_range(L, range, k, err)) != KPHI_OK)
        return rc;
    yaml_node_t *per = kphi__yaml_map_get(y, entry, "per", NULL);
    if (per != NULL && (rc = load_per(L, per, j, k, err)) != KPHI_OK)
        return rc;
    return KPHI_OK;
}

int kphi__rxnset_load_kcorr(kphi__rxnset_loader *L, yaml_node_t *node, size_t j,
                            kphi_error *err)
{
    kphi_rxnset *set = L->set;
    int rc = kphi__yaml_expect(L->y, node, YAML_SEQUENCE_NODE,
                               "'K' (the reaction's K correlations)", err);
    if (rc != KPHI_OK)
        return rc;
    size_t n = (size_t)(node->data.sequence.items.top - node->data.sequence.items.start);
    if (n == 0)
        return kphi__yaml_error(L->y, node, KPHI_EINPUT, err,
                                "'K' is empty; list correlations or leave the key out");
    kphi_rxnset_kcorr *grown = realloc(set->kcorr, (set->n_kcorr + n) * sizeof *grown);
    if (grown == NULL)
        return kphi__rxnset_nomem(L, err);
    set->kcorr = grown;
    for (size_t q = 0; q < n; q++) {
        kphi_rxnset_kcorr *k = &set->kcorr[set->n_kcorr];
        memset(k, 0, sizeof *k);
        set->n_kcorr++; /* counted at once, so a failed entry is freed with the set */
        rc = load_entry(L, kphi__yaml_node(L->y, node->data.sequence.items.start[q]), j, k, err);
        if (rc != KPHI_OK)
            return rc;
    }
    return KPHI_OK;
}
