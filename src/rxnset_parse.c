/* kphi rxnset, the equations: reaction text to stoichiometric coefficients, coefficients
 * back to canonical text, and reactions derived from the element matrix when a set lists
 * species only. The loader that calls these is src/rxnset.c.
 *
 * Reaction j is written sum_i nu_ij A_i = 0 with nu_ij > 0 for products and < 0 for
 * reactants (Smith & Missen 1982, "Chemical Reaction Equilibrium Analysis: Theory and
 * Algorithms", Wiley, ch. 2; from memory). Coefficients are dimensionless stoichiometric
 * numbers; no physical units enter this file.
 *
 * Equation text: "a A + b B = c C + d D". Coefficients are optional (1), positive, and
 * written as integers, decimals or simple fractions ("1/2 N2 + 3/2 H2 = NH3"); the
 * separator is one of "=", "->", "=>" or "<=>"; whitespace is free; species names are
 * case-sensitive and must be in the set's `species` list; '+' always separates terms (so
 * names may not contain '+'). A species may appear only once per reaction: the same
 * species twice on one side, or on both sides, is rejected (write the net reaction), so
 * every coefficient the user sees is the one the solver uses.
 *
 * Positions: an error inside an equation points at the term: the column of the reaction's
 * scalar plus the byte offset in the text (plus 1 for the opening quote of a quoted
 * scalar; block and multi-line scalars point at the scalar's start).
 *
 * Derived reactions: when the file gives species only, the largest independent set has
 * N - rank(A) reactions (N species, A the element or formula matrix, a_ki = atoms of
 * element k in species i). It is built from the null space of A in the canonical form of
 * Smith & Missen ch. 2: the reduced row echelon form of A over the species in file order
 * makes the first rank(A) independent columns the "components", and each other species
 * gets one reaction that forms it (coefficient +1 before scaling to integers) from the
 * components. */
#include "rxnset_internal.h"

#include <ctype.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "internal.h"

enum {
    MAX_DENOM = 1000, /* largest denominator tried when making derived coefficients integer */
    LIST_CHARS = 160  /* room for a list of names inside a message */
};

/* Mark of byte `off` inside a scalar node's text. */
static kphi_mark mark_at(const yaml_node_t *node, size_t off)
{
    kphi_mark m = kphi__yaml_mark(node);
    if (node == NULL || node->type != YAML_SCALAR_NODE)
        return m;
    if (node->end_mark.line != node->start_mark.line)
        return m; /* folded over lines: offsets no longer map to columns */
    switch (node->data.scalar.style) {
    case YAML_PLAIN_SCALAR_STYLE:
        m.column += (long)off;
        break;
    case YAML_SINGLE_QUOTED_SCALAR_STYLE:
    case YAML_DOUBLE_QUOTED_SCALAR_STYLE:
        m.column += 1 + (long)off;
        break;
    default:
        break; /* literal or folded block: the text starts on a later line */
    }
    return m;
}

/* Names joined by ", " into buf (with "..." when they do not fit). */
static void join_names(char *buf, size_t n, const char *const names[], size_t count)
{
    size_t used = 0;
    buf[0] = '\0';
    for (size_t i = 0; i < count; i++) {
        int w = snprintf(buf + used, n - used, "%s%s", i ? ", " : "", names[i]);
        if (w < 0 || (size_t)w >= n - used) {
            if (n >= 4) {
                size_t at = used < n - 4 ? used : n - 4;
                memcpy(buf + at, "...", 4);
            }
            return;
        }
        used += (size_t)w;
    }
}

/* ---- equation parsing ---------------------------------------------------------------- */

static int is_space(char c)
{
    return c == ' ' || c == '\t' || c == '\n' || c == '\r';
}

/* Parse the coefficient at s[*i]: digits with an optional decimal point, then optionally
 * '/' and a positive integer. Returns 0 when there is no valid coefficient. */
static int parse_coefficient(const char *s, size_t end, size_t *i, double *value)
{
    size_t p = *i, digits = 0;
    char buf[64];
    size_t nb = 0;
    while (p < end && (isdigit((unsigned char)s[p]) || s[p] == '.')) {
        if (isdigit((unsigned char)s[p]))
            digits++;
        if (nb + 1 < sizeof buf)
            buf[nb++] = s[p];
        p++;
    }
    buf[nb] = '\0';
    if (digits == 0 || strchr(buf, '.') != strrchr(buf, '.'))
        return 0;
    double v = strtod(buf, NULL);
    if (p < end && s[p] == '/') {
        p++;
        size_t q = p;
        double den = 0.0;
        while (p < end && isdigit((unsigned char)s[p])) {
            den = 10.0 * den + (s[p] - '0');
            p++;
        }
        if (p == q || den == 0.0)
            return 0;
        v /= den;
    }
    if (!isfinite(v))
        return 0;
    *i = p;
    *value = v;
    return 1;
}

/* One term s[a..b) (already trimmed, not empty) on one side (sign -1 left, +1 right) of
 * reaction j. */
static int parse_term(kphi__rxnset_loader *L, yaml_node_t *node, const char *s, size_t a,
                      size_t b, int sign, size_t j, double *row, kphi_error *err)
{
    kphi_rxnset *set = L->set;
    const char *path = L->y->path;
    char name[KPHI_SPECIES_NAME_MAX + 8];
    double coef = 1.0;
    size_t name_at = a, coef_end = a;

    /* A whole term that is a species name of the set is that species (names may start
     * with a digit); otherwise a leading number is the coefficient. */
    size_t len = b - a;
    int whole = 0;
    if (len < KPHI_SPECIES_NAME_MAX) {
        memcpy(name, s + a, len);
        name[len] = '\0';
        whole = kphi_rxnset_species_index(set, name) >= 0;
    }
    if (!whole) {
        if (s[a] == '-')
            return kphi_error_set(err, KPHI_EINPUT, path, mark_at(node, a),
                                  "coefficients must be positive; move the species to the other "
                                  "side instead of writing '-'");
        if (isdigit((unsigned char)s[a]) || s[a] == '.') {
            size_t p = a;
            if (!parse_coefficient(s, b, &p, &coef)) {
                size_t q = a;
                while (q < b && !is_space(s[q]))
                    q++;
                return kphi_error_set(err, KPHI_EINPUT, path, mark_at(node, a),
                                      "bad coefficient '%.*s': expected a positive number such "
                                      "as 2, 0.5 or 3/2",
                                      (int)(q - a), s + a);
            }
            coef_end = p;
            while (p < b && is_space(s[p]))
                p++;
            if (p == b)
                return kphi_error_set(err, KPHI_EINPUT, path, mark_at(node, a),
                                      "coefficient '%.*s' has no species after it", (int)(b - a),
                                      s + a);
            name_at = p;
        }
        for (size_t p = name_at; p < b; p++)
            if (is_space(s[p]))
                return kphi_error_set(err, KPHI_EINPUT, path, mark_at(node, a),
                                      "expected a coefficient and one species name, found '%.*s'",
                                      (int)(b - a), s + a);
        len = b - name_at;
        if (len >= sizeof name)
            len = sizeof name - 1;
        memcpy(name, s + name_at, len);
        name[len] = '\0';
        if (b - name_at >= KPHI_SPECIES_NAME_MAX)
            return kphi_error_set(err, KPHI_EINPUT, path, mark_at(node, name_at),
                                  "unknown species '%.*s' in reaction %zu (names are at most %d "
                                  "characters)",
                                  (int)(b - name_at), s + name_at, j + 1,
                                  KPHI_SPECIES_NAME_MAX - 1);
    }
    if (coef <= 0.0)
        return kphi_error_set(err, KPHI_EINPUT, path, mark_at(node, a),
                              "coefficient of %s must be positive, found '%.*s'", name,
                              (int)(coef_end - a), s + a);

    long k = kphi_rxnset_species_index(set, name);
    kphi_mark at = mark_at(node, name_at);
    if (k < 0) {
        /* A species of the database first: H2O is not a misspelt H2. */
        if (L->db != NULL && kphi_species_db_find(L->db, name) != NULL)
            return kphi_error_set(err, KPHI_EINPUT, path, at,
                                  "species '%s' in reaction %zu is not in this set's species "
                                  "list; add it to 'species'",
                                  name, j + 1);
        const char *near = kphi__closest(name, set->names, set->n_species);
        if (near != NULL)
            return kphi_error_set(err, KPHI_EINPUT, path, at,
                                  "unknown species '%s' in reaction %zu (did you mean '%s'?)",
                                  name, j + 1, near);
        char list[LIST_CHARS];
        join_names(list, sizeof list, set->names, set->n_species);
        return kphi_error_set(err, KPHI_EINPUT, path, at,
                              "unknown species '%s' in reaction %zu; the set's species are: %s",
                              name, j + 1, list);
    }
    if (row[k] != 0.0) {
        if ((row[k] < 0.0) == (sign < 0))
            return kphi_error_set(err, KPHI_EINPUT, path, at,
                                  "%s appears twice on the %s side; combine the terms into one",
                                  name, sign < 0 ? "left" : "right");
        return kphi_error_set(err, KPHI_EINPUT, path, at,
                              "%s appears on both sides of the reaction; write the net reaction",
                              name);
    }
    row[k] = sign * coef;
    size_t *ord = L->order + j * set->n_species;
    ord[L->n_order[j]++] = (size_t)k;
    return KPHI_OK;
}

/* One side s[a..b) of reaction j. */
static int parse_side(kphi__rxnset_loader *L, yaml_node_t *node, const char *s, size_t a,
                      size_t b, int sign, size_t j, double *row, const char *sep,
                      size_t sep_off, kphi_error *err)
{
    const char *path = L->y->path;
    size_t p = a;
    while (p < b && is_space(s[p]))
        p++;
    if (p == b) {
        if (sign < 0)
            return kphi_error_set(err, KPHI_EINPUT, path, mark_at(node, sep_off),
                                  "reaction has no reactants: nothing before '%s'", sep);
        return kphi_error_set(err, KPHI_EINPUT, path, mark_at(node, sep_off),
                              "reaction has no products: nothing after '%s'", sep);
    }
    p = a;
    for (;;) {
        size_t q = p;
        while (q < b && s[q] != '+')
            q++;
        size_t ta = p, tb = q;
        while (ta < tb && is_space(s[ta]))
            ta++;
        while (tb > ta && is_space(s[tb - 1]))
            tb--;
        if (ta == tb) {
            size_t at = q < b ? q : (p > a ? p - 1 : p);
            return kphi_error_set(err, KPHI_EINPUT, path, mark_at(node, at),
                                  "empty term in reaction %zu: expected a species %s '+'", j + 1,
                                  q < b ? "before" : "after");
        }
        int rc = parse_term(L, node, s, ta, tb, sign, j, row, err);
        if (rc != KPHI_OK)
            return rc;
        if (q >= b)
            break;
        p = q + 1;
    }
    return KPHI_OK;
}

static size_t separator_at(const char *s)
{
    if (strncmp(s, "<=>", 3) == 0)
        return 3;
    if (strncmp(s, "=>", 2) == 0 || strncmp(s, "->", 2) == 0)
        return 2;
    return s[0] == '=' ? 1 : 0;
}

int kphi__rxnset_parse_equation(kphi__rxnset_loader *L, yaml_node_t *node, size_t j,
                                kphi_error *err)
{
    kphi_rxnset *set = L->set;
    const char *path = L->y->path;
    const char *s = kphi__yaml_scalar(node);
    if (s == NULL)
        return kphi__yaml_error(L->y, node, KPHI_EINPUT, err,
                                "expected a reaction such as 'N2 + 3 H2 = 2 NH3' for reaction "
                                "%zu, found %s",
                                j + 1,
                                node != NULL && node->type == YAML_MAPPING_NODE ? "a mapping"
                                                                                 : "a list");
    size_t n = strlen(s), sep_off = 0, sep_len = 0;
    for (size_t i = 0; i < n;) {
        size_t l = separator_at(s + i);
        if (l == 0) {
            i++;
            continue;
        }
        if (sep_len != 0)
            return kphi_error_set(err, KPHI_EINPUT, path, mark_at(node, i),
                                  "reaction has a second '%.*s'; write one '=' between "
                                  "reactants and products",
                                  (int)l, s + i);
        sep_off = i;
        sep_len = l;
        i += l;
    }
    if (sep_len == 0) {
        size_t p = 0;
        while (p < n && is_space(s[p]))
            p++;
        if (p == n)
            return kphi__yaml_error(L->y, node, KPHI_EINPUT, err,
                                    "reaction %zu is empty; expected e.g. 'N2 + 3 H2 = 2 NH3'",
                                    j + 1);
        return kphi__yaml_error(L->y, node, KPHI_EINPUT, err,
                                "expected '=' between reactants and products in '%s'", s);
    }
    char sep[4];
    memcpy(sep, s + sep_off, sep_len);
    sep[sep_len] = '\0';
    double *row = set->nu + j * set->n_species;
    int rc = parse_side(L, node, s, 0, sep_off, -1, j, row, sep, sep_off, err);
    if (rc == KPHI_OK)
        L->first_reactant[j] = L->order[j * set->n_species];
    if (rc == KPHI_OK)
        rc = parse_side(L, node, s, sep_off + sep_len, n, +1, j, row, sep, sep_off, err);
    return rc;
}

/* ---- canonical text ------------------------------------------------------------------- */

static int append_term(char *buf, size_t n, size_t *used, int first, double c, const char *name)
{
    int w;
    if (fabs(c - 1.0) <= 1e-12)
        w = snprintf(buf + *used, n - *used, "%s%s", first ? "" : " + ", name);
    else
        w = snprintf(buf + *used, n - *used, "%s%g %s", first ? "" : " + ", c, name);
    if (w < 0 || (size_t)w >= n - *used)
        return -1;
    *used += (size_t)w;
    return 0;
}

/* "N2 + 3 H2 = 2 NH3" from row j, terms in the order `ord` (n_ord entries). */
char *kphi__rxnset_equation_text(const kphi_rxnset *set, size_t j, const size_t *ord,
                                 size_t n_ord)
{
    size_t n = set->n_species * (KPHI_SPECIES_NAME_MAX + 32) + 8;
    char *buf = malloc(n);
    if (buf == NULL)
        return NULL;
    const double *row = set->nu + j * set->n_species;
    size_t used = 0;
    buf[0] = '\0';
    for (int side = -1; side <= 1; side += 2) {
        int first = 1;
        if (side > 0) {
            memcpy(buf + used, " = ", 4);
            used += 3;
        }
        for (size_t t = 0; t < n_ord; t++) {
            double c = row[ord[t]];
            if ((side < 0 && c >= 0.0) || (side > 0 && c <= 0.0))
                continue;
            if (append_term(buf, n, &used, first, fabs(c), set->species[ord[t]].name) != 0) {
                free(buf);
                return NULL;
            }
            first = 0;
        }
    }
    return buf;
}

/* ---- derived reactions ---------------------------------------------------------------- */

static long gcd_long(long a, long b)
{
    if (a < 0)
        a = -a;
    if (b < 0)
        b = -b;
    while (b != 0) {
        long t = a % b;
        a = b;
        b = t;
    }
    return a;
}

/* Smallest denominator q <= MAX_DENOM with x*q within tol of an integer, or 0. */
static long denominator_of(double x)
{
    for (long q = 1; q <= MAX_DENOM; q++) {
        double v = x * (double)q;
        if (fabs(v - nearbyint(v)) <= 1e-9 * fmax(1.0, fabs(v)))
            return q;
    }
    return 0;
}

/* Scale v[n] to the smallest integers when its entries are rational with small
 * denominators; otherwise leave it as it is. */
static void make_integer(double *v, size_t n)
{
    long lcm = 1;
    for (size_t i = 0; i < n; i++) {
        if (v[i] == 0.0)
            continue;
        long q = denominator_of(v[i]);
        if (q == 0)
            return;
        lcm = lcm / gcd_long(lcm, q) * q;
        if (lcm > 1000000L)
            return;
    }
    long g = 0;
    for (size_t i = 0; i < n; i++) {
        v[i] = nearbyint(v[i] * (double)lcm);
        if (v[i] != 0.0)
            g = gcd_long(g, (long)fabs(v[i]));
    }
    if (g > 1)
        for (size_t i = 0; i < n; i++)
            v[i] /= (double)g;
    for (size_t i = 0; i < n; i++)
        if (v[i] == 0.0)
            v[i] = 0.0; /* no negative zero */
}

/* Reactions from the null space of the element matrix: reduced row echelon form of A
 * (n_elements x n_species, partial pivoting within each column, columns in file order);
 * pivot columns are the components, each free column f gives the reaction forming species
 * f from the components. Fills set->nu (allocated here) and n_reactions. */
int kphi__rxnset_derive_reactions(kphi__rxnset_loader *L, yaml_node_t *species_node,
                                  kphi_error *err)
{
    kphi_rxnset *set = L->set;
    size_t ne = set->n_elements, ns = set->n_species;
    double *R = malloc(ne * ns * sizeof *R);
    size_t *pivcol = malloc((ne + 1) * sizeof *pivcol);
    int *is_pivot = calloc(ns, sizeof *is_pivot);
    int rc = KPHI_OK;
    if (R == NULL || pivcol == NULL || is_pivot == NULL) {
        rc = kphi__rxnset_nomem(L, err);
        goto done;
    }
    memcpy(R, set->atoms, ne * ns * sizeof *R);
    double amax = 0.0;
    for (size_t i = 0; i < ne * ns; i++)
        amax = fmax(amax, fabs(R[i]));
    double tol = 1e-9 * amax;
    size_t rank = 0;
    for (size_t c = 0; c < ns && rank < ne; c++) {
        size_t p = rank;
        for (size_t r = rank + 1; r < ne; r++)
            if (fabs(R[r * ns + c]) > fabs(R[p * ns + c]))
                p = r;
        if (fabs(R[p * ns + c]) <= tol)
            continue;
        for (size_t k = 0; k < ns; k++) {
            double t = R[p * ns + k];
            R[p * ns + k] = R[rank * ns + k];
            R[rank * ns + k] = t;
        }
        double piv = R[rank * ns + c];
        for (size_t k = 0; k < ns; k++)
            R[rank * ns + k] /= piv;
        for (size_t r = 0; r < ne; r++) {
            if (r == rank)
                continue;
            double f = R[r * ns + c];
            if (f == 0.0)
                continue;
            for (size_t k = 0; k < ns; k++)
                R[r * ns + k] -= f * R[rank * ns + k];
            R[r * ns + c] = 0.0;
        }
        pivcol[rank++] = c;
        is_pivot[c] = 1;
    }
    size_t nr = ns - rank;
    if (nr == 0) {
        rc = kphi__yaml_error(L->y, species_node, KPHI_EINPUT, err,
                              "no reaction is possible among these species (each amount is fixed "
                              "by its element balance); list more species or give 'reactions'");
        goto done;
    }
    if (nr > KPHI__RXNSET_MAX_REACTIONS) {
        rc = kphi__yaml_error(L->y, species_node, KPHI_EINPUT, err,
                              "these species give %zu independent reactions; at most %d are "
                              "allowed in a reaction set",
                              nr, KPHI__RXNSET_MAX_REACTIONS);
        goto done;
    }
    set->nu = calloc(nr * ns, sizeof *set->nu);
    set->reaction_mark = calloc(nr, sizeof *set->reaction_mark);
    set->equation = calloc(nr, sizeof *set->equation);
    if (set->nu == NULL || set->reaction_mark == NULL || set->equation == NULL) {
        rc = kphi__rxnset_nomem(L, err);
        goto done;
    }
    set->n_reactions = nr;
    size_t j = 0;
    for (size_t f = 0; f < ns; f++) {
        if (is_pivot[f])
            continue;
        double *v = set->nu + j * ns;
        v[f] = 1.0;
        for (size_t q = 0; q < rank; q++)
            v[pivcol[q]] = -R[q * ns + f];
        make_integer(v, ns);
        set->reaction_mark[j] = kphi__yaml_mark(species_node);
        j++;
    }
done:
    free(is_pivot);
    free(pivcol);
    free(R);
    return rc;
}
