/* kphi case: one converter point or sweep as a user writes it: the reaction set, the feed,
 * T and P, the equation of state, k_ij overrides and the sweep grid, read from YAML and
 * overridable from the command line.
 *
 * Schema (paths relative to the case file; keys are case-sensitive):
 *   reactions: ../reactions/ammonia.yaml        required
 *   feed: {H2: 72.0, N2: 24.0, CH4: 2.5, Ar: 1.5}  any consistent molar basis, amounts >= 0
 *   T: 450 C                                    see units.c for the spellings
 *   P: 200 bar
 *   eos: pr                                     ideal, virial, rk, srk or pr (default pr)
 *   quantum: false                              effective critical constants of H2, He
 *   kij: [{pair: [N2, H2], value: 0.0, source: "..."}]   applied after the set's k_ij
 *   sweep: {T: {from: 380 C, to: 520 C, step: 10 C}, P: [100 bar, 150 bar, 200 bar]}
 *   K: tables                                   tables (default), a K basis of the set
 *                                               (a correlation name), or all
 *   name: "a title"
 * A sweep axis is a {from, to, step} range, a list, or a single value; a single scalar may
 * also be written as on the command line: "350:550:10C" or "100bar,200bar". Axes and
 * their range grid are parsed in src/case_axis.c; what the two files share is in
 * src/case_internal.h.
 *
 * Units inside: K, Pa, mol (feed amounts on any molar basis). The unit the user wrote T
 * and P in is kept for display only. Errors point into the case file, or at
 * "<command line>" line 1 and the column (1-based, in characters) of the offending item of
 * an override. */
#include "kphi/case.h"

#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>

#include "case_internal.h"
#include "internal.h"
#include "kphi/thermo.h"
#include "kphi/units.h"
#include "yamlutil.h"

#define CMDLINE "<command line>"

enum { UNIT_MAX_LEN = 16 };

/* Where a value came from. */
typedef struct {
    char path[KPHI__CASE_PATH_MAX];
    kphi_mark at;
} source;

struct kphi_case {
    char *path;
    char *name;
    kphi_rxnset *set;
    size_t n;        /* species */
    double *feed;    /* [n] */
    int feed_given;
    source feed_src; /* the feed mapping, or the --feed text */
    double T, P;     /* K, Pa; NaN when not given */
    char T_unit[UNIT_MAX_LEN], P_unit[UNIT_MAX_LEN];
    source T_src, P_src;
    kphi_eos_model eos;
    int quantum;
    size_t K_basis;   /* KPHI_K_TABLES, a basis of the set, or KPHI_CASE_K_ALL */
    source K_src;
    size_t n_kij;
    size_t *kij_i, *kij_j; /* [n_kij] */
    double *kij_v;
    char **kij_src;        /* [n_kij] the 'source' given, or NULL */
    kphi__case_axis sweep_T, sweep_P;
    kphi__case_loop *loop; /* NULL without a `loop` block */
    kphi_kij_db *kijdb;    /* the k_ij file, or NULL */
    const char *species_default; /* while loading: for the reaction set; borrowed */
};

/* ---------------------------------------------------------------- small helpers */

static void set_source(source *s, const char *path, kphi_mark at)
{
    kphi__strlcpy(s->path, path != NULL ? path : "", sizeof s->path);
    s->at = at;
}

int kphi__case_nomem(kphi_error *err, const char *path)
{
    kphi_mark none = {0, 0};
    return kphi_error_set(err, KPHI_ENOMEM, path, none, "out of memory");
}

int kphi__case_is_blank(char ch)
{
    return ch == ' ' || ch == '\t';
}

/* Mark `off` bytes into a text that starts at `at` (kept 0 when unknown). */
kphi_mark kphi__case_shift(kphi_mark at, const char *text, size_t off)
{
    if (at.line > 0 && at.column > 0)
        at.column += kphi__char_offset(text, off);
    return at;
}

/* Mark of the first character of a scalar's text: a quoted scalar starts one column after
 * its quote. */
kphi_mark kphi__case_text_mark(const yaml_node_t *node)
{
    kphi_mark m = kphi__yaml_mark(node);
    if (node != NULL && node->type == YAML_SCALAR_NODE &&
        (node->data.scalar.style == YAML_SINGLE_QUOTED_SCALAR_STYLE ||
         node->data.scalar.style == YAML_DOUBLE_QUOTED_SCALAR_STYLE))
        m.column += 1;
    return m;
}

/* "N2, H2, NH3" of the species with (want_inert) or without reactions, clipped. */
static void species_list(const kphi_rxnset *set, int want_inert, char *buf, size_t n)
{
    size_t used = 0;
    buf[0] = '\0';
    for (size_t i = 0; i < kphi_rxnset_n_species(set); i++) {
        if ((kphi_rxnset_is_inert(set, i) != 0) != (want_inert != 0))
            continue;
        int w = snprintf(buf + used, n - used, "%s%s", used ? ", " : "",
                         kphi_rxnset_species(set, i)->name);
        if (w < 0 || (size_t)w >= n - used) {
            if (n > 4 && used + 4 < n)
                snprintf(buf + used, n - used, "%s...", used ? ", " : "");
            return;
        }
        used += (size_t)w;
    }
}

static void all_species(const kphi_rxnset *set, char *buf, size_t n)
{
    size_t used = 0;
    buf[0] = '\0';
    for (size_t i = 0; i < kphi_rxnset_n_species(set); i++) {
        int w = snprintf(buf + used, n - used, "%s%s", used ? ", " : "",
                         kphi_rxnset_species(set, i)->name);
        if (w < 0 || (size_t)w >= n - used)
            return;
        used += (size_t)w;
    }
}

/* Species index, or an error at `at`: "unknown species 'N3' in the feed (did you mean
 * 'N2'?)". */
static int lookup_species(const kphi_case *c, const char *name, const char *where,
                          const char *path, kphi_mark at, size_t *index, kphi_error *err)
{
    long i = kphi_rxnset_species_index(c->set, name);
    if (i >= 0) {
        *index = (size_t)i;
        return KPHI_OK;
    }
    const char *near = kphi_rxnset_suggest(c->set, name);
    if (near != NULL)
        return kphi_error_set(err, KPHI_EINPUT, path, at,
                              "unknown species '%s' in %s (did you mean '%s'?)", name, where,
                              near);
    char list[160];
    all_species(c->set, list, sizeof list);
    return kphi_error_set(err, KPHI_EINPUT, path, at,
                          "unknown species '%s' in %s; the reaction set has %s", name, where,
                          list);
}

/* Strict finite number: the whole text, blanks around allowed. */
static int parse_amount(const char *s, double *v)
{
    char *end = NULL;
    errno = 0;
    while (kphi__case_is_blank(*s))
        s++;
    double x = strtod(s, &end);
    if (end == s)
        return 1;
    while (kphi__case_is_blank(*end))
        end++;
    if (*end != '\0')
        return 1;
    if (!isfinite(x) || (errno == ERANGE && fabs(x) > 1.0))
        return 2;
    *v = x;
    return 0;
}

/* ---------------------------------------------------------------- loading */

static kphi_case *case_alloc(const char *path)
{
    kphi_case *c = calloc(1, sizeof *c);
    if (c == NULL)
        return NULL;
    c->path = malloc(strlen(path) + 1);
    if (c->path == NULL) {
        free(c);
        return NULL;
    }
    memcpy(c->path, path, strlen(path) + 1);
    c->T = NAN;
    c->P = NAN;
    kphi__strlcpy(c->T_unit, "K", sizeof c->T_unit);
    kphi__strlcpy(c->P_unit, "bar", sizeof c->P_unit);
    c->eos = KPHI_EOS_PR;
    kphi_mark top = {1, 1};
    set_source(&c->T_src, path, top);
    set_source(&c->P_src, path, top);
    set_source(&c->feed_src, path, top);
    return c;
}

/* Open the reaction set named by the `reactions:` value, relative to the case file. */
static int load_rxnset(kphi_case *c, kphi__yaml *y, yaml_node_t *root, kphi_error *err)
{
    yaml_node_t *key = NULL;
    yaml_node_t *node = kphi__yaml_map_get(y, root, "reactions", &key);
    if (node == NULL) {
        kphi_mark top = {1, 1};
        return kphi_error_set(err, KPHI_EINPUT, c->path, top,
                              "missing 'reactions': name the reaction set, e.g. "
                              "'reactions: ../reactions/ammonia.yaml' (relative to the case file)");
    }
    const char *rel = kphi__yaml_scalar(node);
    if (rel == NULL)
        return kphi__yaml_expect(y, node, YAML_SCALAR_NODE, "'reactions' (a file name)", err);
    if (rel[0] == '\0')
        return kphi__yaml_error(y, node, KPHI_EINPUT, err,
                                "'reactions' is empty; name a reaction-set file");
    size_t dir_len = 0;
    if (rel[0] != '/') {
        const char *slash = strrchr(c->path, '/');
        dir_len = slash != NULL ? (size_t)(slash - c->path) + 1 : 0;
    }
    char *full = malloc(dir_len + strlen(rel) + 1);
    if (full == NULL)
        return kphi__case_nomem(err, c->path);
    memcpy(full, c->path, dir_len);
    memcpy(full + dir_len, rel, strlen(rel) + 1);
    struct stat st;
    int rc = KPHI_OK;
    kphi_mark at = kphi__case_text_mark(node);
    if (stat(full, &st) != 0)
        rc = kphi_error_set(err, KPHI_EIO, c->path, at, "cannot open '%s': %s", rel,
                            strerror(errno));
    else if (!S_ISREG(st.st_mode))
        rc = kphi_error_set(err, KPHI_EIO, c->path, at, "cannot open '%s': not a regular file",
                            rel);
    if (rc == KPHI_OK) {
        kphi_error local;
        kphi_error_clear(&local);
        c->set = kphi_rxnset_load_file_default(full, NULL, c->species_default, &local);
        if (c->set == NULL) {
            if (local.code == KPHI_OK)
                kphi__case_nomem(&local, full);
            rc = local.code;
            if (err != NULL && err->code == KPHI_OK)
                *err = local;
        }
    }
    free(full);
    if (rc != KPHI_OK)
        return rc;
    c->n = kphi_rxnset_n_species(c->set);
    c->feed = calloc(c->n > 0 ? c->n : 1, sizeof *c->feed);
    return c->feed != NULL ? KPHI_OK : kphi__case_nomem(err, c->path);
}

static int load_feed(kphi_case *c, kphi__yaml *y, yaml_node_t *node, kphi_error *err)
{
    int rc = kphi__yaml_expect(y, node, YAML_MAPPING_NODE, "'feed' (species: amount)", err);
    if (rc != KPHI_OK)
        return rc;
    char *seen = calloc(c->n > 0 ? c->n : 1, 1);
    if (seen == NULL)
        return kphi__case_nomem(err, c->path);
    for (yaml_node_pair_t *p = node->data.mapping.pairs.start;
         p < node->data.mapping.pairs.top && rc == KPHI_OK; p++) {
        yaml_node_t *k = kphi__yaml_node(y, p->key);
        yaml_node_t *v = kphi__yaml_node(y, p->value);
        const char *name = kphi__yaml_scalar(k);
        size_t i = 0;
        if (name == NULL) {
            rc = kphi__yaml_error(y, k, KPHI_EINPUT, err,
                                  "a key in 'feed' must be a species name");
            break;
        }
        rc = lookup_species(c, name, "the feed", c->path, kphi__case_text_mark(k), &i, err);
        if (rc != KPHI_OK)
            break;
        if (seen[i]) {
            rc = kphi__yaml_error(y, k, KPHI_EINPUT, err, "species '%s' given twice in the feed",
                                  name);
            break;
        }
        seen[i] = 1;
        char what[64];
        snprintf(what, sizeof what, "the feed amount of '%s'", name);
        double x = 0.0;
        rc = kphi__yaml_double(y, v, what, &x, err);
        if (rc == KPHI_OK && x < 0.0)
            rc = kphi__yaml_error(y, v, KPHI_EINPUT, err,
                                  "the feed amount of '%s' must be zero or positive, found '%s'",
                                  name, kphi__yaml_scalar(v));
        if (rc == KPHI_OK)
            c->feed[i] = x;
    }
    free(seen);
    if (rc == KPHI_OK) {
        c->feed_given = 1;
        set_source(&c->feed_src, c->path, kphi__yaml_mark(node));
    }
    return rc;
}

static int load_quantity(kphi_case *c, kphi__yaml *y, yaml_node_t *node,
                         kphi__case_quantity q, kphi_error *err)
{
    const char *s = kphi__yaml_scalar(node);
    if (s == NULL)
        return kphi__yaml_expect(y, node, YAML_SCALAR_NODE,
                                 q == KPHI__CASE_TEMPERATURE ? "'T' (e.g. 450 C)"
                                                             : "'P' (e.g. 200 bar)",
                                 err);
    kphi_mark at = kphi__case_text_mark(node);
    double v = 0.0;
    int rc = kphi__case_parse_value(q, 0, s, c->path, at, &v, err);
    if (rc != KPHI_OK)
        return rc;
    if (q == KPHI__CASE_TEMPERATURE) {
        c->T = v;
        kphi_units_name(s, c->T_unit, sizeof c->T_unit);
        set_source(&c->T_src, c->path, at);
    } else {
        c->P = v;
        kphi_units_name(s, c->P_unit, sizeof c->P_unit);
        set_source(&c->P_src, c->path, at);
    }
    return KPHI_OK;
}

static int load_bool(kphi__yaml *y, yaml_node_t *node, const char *key, int *out,
                     kphi_error *err)
{
    static const char *const yes[] = {"true", "True", "TRUE", "yes", "Yes", "YES"};
    static const char *const no[] = {"false", "False", "FALSE", "no", "No", "NO"};
    const char *s = kphi__yaml_scalar(node);
    for (size_t i = 0; s != NULL && i < sizeof yes / sizeof yes[0]; i++) {
        if (strcmp(s, yes[i]) == 0) {
            *out = 1;
            return KPHI_OK;
        }
        if (strcmp(s, no[i]) == 0) {
            *out = 0;
            return KPHI_OK;
        }
    }
    if (s == NULL)
        return kphi__yaml_expect(y, node, YAML_SCALAR_NODE, key, err);
    return kphi__yaml_error(y, node, KPHI_EINPUT, err,
                            "expected true or false for '%s', found '%s'",
                            key, s);
}

static int load_kij(kphi_case *c, kphi__yaml *y, yaml_node_t *node, kphi_error *err)
{
    int rc = kphi__yaml_expect(y, node, YAML_SEQUENCE_NODE,
                               "'kij' (a list of {pair: [A, B], value: k})", err);
    if (rc != KPHI_OK)
        return rc;
    size_t n = (size_t)(node->data.sequence.items.top - node->data.sequence.items.start);
    if (n == 0)
        return KPHI_OK;
    c->kij_i = malloc(n * sizeof *c->kij_i);
    c->kij_j = malloc(n * sizeof *c->kij_j);
    c->kij_v = malloc(n * sizeof *c->kij_v);
    c->kij_src = calloc(n, sizeof *c->kij_src);
    if (c->kij_i == NULL || c->kij_j == NULL || c->kij_v == NULL || c->kij_src == NULL)
        return kphi__case_nomem(err, c->path);
    static const char *const keys[] = {"pair", "value", "source"};
    for (size_t m = 0; m < n; m++) {
        yaml_node_t *entry = kphi__yaml_node(y, node->data.sequence.items.start[m]);
        rc = kphi__yaml_check_keys(y, entry, keys, 3, "a 'kij' entry", err);
        if (rc != KPHI_OK)
            return rc;
        yaml_node_t *pair = kphi__yaml_map_get(y, entry, "pair", NULL);
        yaml_node_t *value = kphi__yaml_map_get(y, entry, "value", NULL);
        yaml_node_t *src = kphi__yaml_map_get(y, entry, "source", NULL);
        if (pair == NULL || value == NULL)
            return kphi__yaml_error(y, entry, KPHI_EINPUT, err,
                                    "a 'kij' entry needs 'pair' and 'value', e.g. "
                                    "{pair: [N2, H2], value: 0.0}");
        if (src != NULL && kphi__yaml_scalar(src) == NULL)
            return kphi__yaml_expect(y, src, YAML_SCALAR_NODE, "'source' of a 'kij' entry", err);
        rc = kphi__yaml_expect(y, pair, YAML_SEQUENCE_NODE, "'pair' (two species)", err);
        if (rc != KPHI_OK)
            return rc;
        size_t len = (size_t)(pair->data.sequence.items.top - pair->data.sequence.items.start);
        if (len != 2)
            return kphi__yaml_error(y, pair, KPHI_EINPUT, err,
                                    "'pair' names %zu species; expected two, e.g. [N2, H2]", len);
        size_t idx[2];
        for (size_t k = 0; k < 2; k++) {
            yaml_node_t *sp = kphi__yaml_node(y, pair->data.sequence.items.start[k]);
            const char *name = kphi__yaml_scalar(sp);
            if (name == NULL)
                return kphi__yaml_expect(y, sp, YAML_SCALAR_NODE, "a species of 'pair'", err);
            rc = lookup_species(c, name, "'kij'", c->path, kphi__case_text_mark(sp), &idx[k], err);
            if (rc != KPHI_OK)
                return rc;
        }
        if (idx[0] == idx[1])
            return kphi__yaml_error(y, pair, KPHI_EINPUT, err,
                                    "'pair' names %s twice; k_ij is between two different species",
                                    kphi_rxnset_species(c->set, idx[0])->name);
        for (size_t q = 0; q < c->n_kij; q++)
            if ((c->kij_i[q] == idx[0] && c->kij_j[q] == idx[1]) ||
                (c->kij_i[q] == idx[1] && c->kij_j[q] == idx[0]))
                return kphi__yaml_error(y, pair, KPHI_EINPUT, err, "k_ij of %s-%s given twice",
                                        kphi_rxnset_species(c->set, idx[0])->name,
                                        kphi_rxnset_species(c->set, idx[1])->name);
        double k = 0.0;
        rc = kphi__yaml_double(y, value, "'value' of a 'kij' entry", &k, err);
        if (rc != KPHI_OK)
            return rc;
        const char *text = src != NULL ? kphi__yaml_scalar(src) : NULL;
        if (text != NULL && text[0] != '\0') {
            if ((c->kij_src[c->n_kij] = malloc(strlen(text) + 1)) == NULL)
                return kphi__case_nomem(err, c->path);
            memcpy(c->kij_src[c->n_kij], text, strlen(text) + 1);
        }
        c->kij_i[c->n_kij] = idx[0];
        c->kij_j[c->n_kij] = idx[1];
        c->kij_v[c->n_kij] = k;
        c->n_kij++;
    }
    return KPHI_OK;
}

static int load_sweep(kphi_case *c, kphi__yaml *y, yaml_node_t *node, kphi_error *err)
{
    static const char *const keys[] = {"T", "P"};
    int rc = kphi__yaml_check_keys(y, node, keys, 2, "'sweep'", err);
    yaml_node_t *t = kphi__yaml_map_get(y, node, "T", NULL);
    yaml_node_t *p = kphi__yaml_map_get(y, node, "P", NULL);
    if (rc == KPHI_OK && t != NULL)
        rc = kphi__case_axis_parse_node(&c->sweep_T, KPHI__CASE_TEMPERATURE, y, t, c->path,
                                        err);
    if (rc == KPHI_OK && p != NULL)
        rc = kphi__case_axis_parse_node(&c->sweep_P, KPHI__CASE_PRESSURE, y, p, c->path, err);
    return rc;
}

/* The k_ij file: `kij_file` of the case (relative to it; `none` for none), else kij.yaml
 * beside the reaction-set file when there is one. */
static int load_kij_file(kphi_case *c, kphi__yaml *y, yaml_node_t *root, kphi_error *err)
{
    yaml_node_t *node = kphi__yaml_map_get(y, root, "kij_file", NULL);
    const char *base = c->path, *rel = "kij.yaml";
    if (node != NULL) {
        rel = kphi__yaml_scalar(node);
        if (rel == NULL || rel[0] == '\0')
            return kphi__yaml_error(y, node, KPHI_EINPUT, err,
                                    "expected a file name (or 'none') for 'kij_file'");
        if (strcmp(rel, "none") == 0)
            return KPHI_OK;
    } else {
        base = kphi_rxnset_path(c->set);
    }
    size_t dir_len = 0;
    if (rel[0] != '/') {
        const char *slash = strrchr(base, '/');
        dir_len = slash != NULL ? (size_t)(slash - base) + 1 : 0;
    }
    char *full = malloc(dir_len + strlen(rel) + 1);
    if (full == NULL)
        return kphi__case_nomem(err, c->path);
    memcpy(full, base, dir_len);
    memcpy(full + dir_len, rel, strlen(rel) + 1);
    struct stat st;
    int rc = KPHI_OK;
    if (stat(full, &st) != 0 || !S_ISREG(st.st_mode)) {
        if (node != NULL)
            rc = kphi_error_set(err, KPHI_EIO, c->path, kphi__case_text_mark(node),
                                "cannot open the k_ij file '%s'", rel);
        free(full);
        return rc;
    }
    c->kijdb = kphi_kij_db_load_file(full, NULL, err);
    if (c->kijdb == NULL)
        rc = err != NULL && err->code != KPHI_OK ? (int)err->code : kphi__case_nomem(err, full);
    free(full);
    return rc;
}

/* K basis from text ("tables", a correlation name of the set, "all"). */
static int parse_K(kphi_case *c, const char *text, const char *path, kphi_mark at,
                   kphi_error *err)
{
    size_t b;
    if (strcmp(text, "all") == 0) {
        b = KPHI_CASE_K_ALL;
    } else {
        long f = kphi_rxnset_K_basis_find(c->set, text);
        if (f < 0) {
            char list[200] = "";
            size_t used = 0, nb = kphi_rxnset_n_K_bases(c->set);
            for (size_t q = 0; q < nb; q++) {
                int w = snprintf(list + used, sizeof list - used, "%s, ",
                                 kphi_rxnset_K_basis_name(c->set, q));
                if (w > 0 && (size_t)w < sizeof list - used)
                    used += (size_t)w;
            }
            const char *near = kphi_rxnset_K_basis_suggest(c->set, text);
            if (near != NULL)
                return kphi_error_set(err, KPHI_EINPUT, path, at,
                                      "unknown K basis '%s' (did you mean '%s'?)", text, near);
            return kphi_error_set(err, KPHI_EINPUT, path, at,
                                  "unknown K basis '%s'; the reaction set '%s' offers: %sall",
                                  text, kphi_rxnset_name(c->set), list);
        }
        b = (size_t)f;
    }
    c->K_basis = b;
    set_source(&c->K_src, path, at);
    return KPHI_OK;
}

static int load_doc(kphi_case *c, kphi__yaml *y, kphi_error *err)
{
    static const char *const keys[] = {"reactions", "feed",  "T",     "P",   "eos",
                                       "quantum",   "kij",   "sweep", "name",
                                       "loop",      "kij_file",  "K"};
    yaml_node_t *root = kphi__yaml_root(y);
    int rc = kphi__yaml_check_kind(y, root, KPHI__KIND_CASE,
                                   "; a case names its reaction set with 'reactions: FILE' and "
                                   "gives feed, T and P",
                                   err);
    if (rc == KPHI_OK)
        rc = kphi__yaml_check_keys(y, root, keys, sizeof keys / sizeof keys[0], "the case file",
                                   err);
    if (rc == KPHI_OK)
        rc = load_rxnset(c, y, root, err);
    if (rc == KPHI_OK)
        rc = load_kij_file(c, y, root, err);
    yaml_node_t *node;
    if (rc == KPHI_OK && (node = kphi__yaml_map_get(y, root, "name", NULL)) != NULL) {
        const char *s = kphi__yaml_scalar(node);
        if (s == NULL)
            rc = kphi__yaml_expect(y, node, YAML_SCALAR_NODE, "'name'", err);
        else if ((c->name = malloc(strlen(s) + 1)) == NULL)
            rc = kphi__case_nomem(err, c->path);
        else
            memcpy(c->name, s, strlen(s) + 1);
    }
    if (rc == KPHI_OK && (node = kphi__yaml_map_get(y, root, "feed", NULL)) != NULL)
        rc = load_feed(c, y, node, err);
    if (rc == KPHI_OK && (node = kphi__yaml_map_get(y, root, "T", NULL)) != NULL)
        rc = load_quantity(c, y, node, KPHI__CASE_TEMPERATURE, err);
    if (rc == KPHI_OK && (node = kphi__yaml_map_get(y, root, "P", NULL)) != NULL)
        rc = load_quantity(c, y, node, KPHI__CASE_PRESSURE, err);
    if (rc == KPHI_OK) /* the set's recommended model, when it names one, else pr */
        (void)kphi_rxnset_eos(c->set, &c->eos, NULL);
    if (rc == KPHI_OK && (node = kphi__yaml_map_get(y, root, "eos", NULL)) != NULL) {
        const char *s = kphi__yaml_scalar(node);
        if (s == NULL)
            rc = kphi__yaml_expect(y, node, YAML_SCALAR_NODE, "'eos' (e.g. pr)", err);
        else
            rc = kphi_eos_model_parse(s, &c->eos, c->path, kphi__case_text_mark(node), err);
    }
    if (rc == KPHI_OK && (node = kphi__yaml_map_get(y, root, "quantum", NULL)) != NULL)
        rc = load_bool(y, node, "quantum", &c->quantum, err);
    if (rc == KPHI_OK && (node = kphi__yaml_map_get(y, root, "K", NULL)) != NULL) {
        const char *s = kphi__yaml_scalar(node);
        if (s == NULL)
            rc = kphi__yaml_expect(y, node, YAML_SCALAR_NODE,
                                   "'K' (tables, a correlation name, or all)", err);
        else
            rc = parse_K(c, s, c->path, kphi__case_text_mark(node), err);
    }
    if (rc == KPHI_OK && (node = kphi__yaml_map_get(y, root, "kij", NULL)) != NULL)
        rc = load_kij(c, y, node, err);
    if (rc == KPHI_OK && (node = kphi__yaml_map_get(y, root, "sweep", NULL)) != NULL)
        rc = load_sweep(c, y, node, err);
    if (rc == KPHI_OK && (node = kphi__yaml_map_get(y, root, "loop", NULL)) != NULL)
        rc = kphi__case_loop_load(&c->loop, c->set, c->path, y, node, err);
    return rc;
}

kphi_case *kphi_case_load_file(const char *path, kphi_error *err)
{
    return kphi_case_load_file_default(path, NULL, err);
}

kphi_case *kphi_case_load_file_default(const char *path, const char *species_default,
                                       kphi_error *err)
{
    kphi_error local;
    kphi_error_clear(&local);
    if (path == NULL) {
        kphi_mark none = {0, 0};
        kphi_error_set(err, KPHI_EINPUT, NULL, none, "no case file given");
        return NULL;
    }
    kphi__yaml y;
    if (kphi__yaml_load_file(&y, path, &local) != KPHI_OK) {
        if (err != NULL && err->code == KPHI_OK)
            *err = local;
        return NULL;
    }
    kphi_case *c = case_alloc(path);
    if (c != NULL)
        c->species_default = species_default;
    int rc = c != NULL ? load_doc(c, &y, &local) : kphi__case_nomem(&local, path);
    if (c != NULL)
        c->species_default = NULL;
    kphi__yaml_free(&y);
    if (rc == KPHI_OK && c->name == NULL) {
        /* no 'name': the file name without directory and extension */
        const char *base = strrchr(path, '/');
        base = base != NULL ? base + 1 : path;
        size_t len = strlen(base);
        const char *dot = strrchr(base, '.');
        if (dot != NULL && dot != base)
            len = (size_t)(dot - base);
        if ((c->name = malloc(len + 1)) == NULL)
            rc = kphi__case_nomem(&local, path);
        else {
            memcpy(c->name, base, len);
            c->name[len] = '\0';
        }
    }
    if (rc != KPHI_OK) {
        if (local.code == KPHI_OK)
            kphi__case_nomem(&local, path);
        if (err != NULL && err->code == KPHI_OK)
            *err = local;
        kphi_case_free(c);
        return NULL;
    }
    return c;
}

void kphi_case_free(kphi_case *c)
{
    if (c == NULL)
        return;
    kphi_rxnset_free(c->set);
    kphi__case_loop_free(c->loop);
    kphi_kij_db_free(c->kijdb);
    free(c->path);
    free(c->name);
    free(c->feed);
    free(c->kij_i);
    free(c->kij_j);
    free(c->kij_v);
    for (size_t m = 0; c->kij_src != NULL && m < c->n_kij; m++)
        free(c->kij_src[m]);
    free(c->kij_src);
    kphi__case_axis_clear(&c->sweep_T);
    kphi__case_axis_clear(&c->sweep_P);
    free(c);
}

/* ---------------------------------------------------------------- overrides */

static kphi_mark cmdline_at(void)
{
    kphi_mark at = {1, 1};
    return at;
}

static int set_quantity(kphi_case *c, const char *text, kphi__case_quantity q,
                        kphi_error *err)
{
    double v = 0.0;
    int rc = kphi__case_parse_value(q, 0, text, CMDLINE, cmdline_at(), &v, err);
    if (rc != KPHI_OK)
        return rc;
    if (q == KPHI__CASE_TEMPERATURE) {
        c->T = v;
        kphi_units_name(text, c->T_unit, sizeof c->T_unit);
        set_source(&c->T_src, CMDLINE, cmdline_at());
    } else {
        c->P = v;
        kphi_units_name(text, c->P_unit, sizeof c->P_unit);
        set_source(&c->P_src, CMDLINE, cmdline_at());
    }
    return KPHI_OK;
}

int kphi_case_set_T(kphi_case *c, const char *text, kphi_error *err)
{
    return set_quantity(c, text != NULL ? text : "", KPHI__CASE_TEMPERATURE, err);
}

int kphi_case_set_P(kphi_case *c, const char *text, kphi_error *err)
{
    return set_quantity(c, text != NULL ? text : "", KPHI__CASE_PRESSURE, err);
}

int kphi_case_set_K(kphi_case *c, const char *text, kphi_error *err)
{
    return parse_K(c, text != NULL ? text : "", CMDLINE, cmdline_at(), err);
}

size_t kphi_case_K_basis(const kphi_case *c)
{
    return c->K_basis;
}

int kphi_case_require_one_K(const kphi_case *c, kphi_error *err)
{
    if (c->K_basis != KPHI_CASE_K_ALL)
        return KPHI_OK;
    return kphi_error_set(err, KPHI_EINPUT, c->K_src.path, c->K_src.at,
                          "K 'all' compares the K bases at one point (solve); here give one: "
                          "tables or a correlation name");
}

int kphi_case_set_eos(kphi_case *c, const char *text, kphi_error *err)
{
    kphi_eos_model m;
    int rc = kphi_eos_model_parse(text != NULL ? text : "", &m, CMDLINE, cmdline_at(), err);
    if (rc != KPHI_OK)
        return rc;
    c->eos = m;
    return KPHI_OK;
}

void kphi_case_set_quantum(kphi_case *c, int on)
{
    c->quantum = on != 0;
}

/* --feed "N2=1,H2=3,Ar=0.05": replaces the whole feed; on error the feed is unchanged. */
int kphi_case_set_feed(kphi_case *c, const char *text, kphi_error *err)
{
    const kphi_mark at = cmdline_at();
    if (text == NULL)
        text = "";
    double *feed = calloc(c->n > 0 ? c->n : 1, sizeof *feed);
    char *seen = calloc(c->n > 0 ? c->n : 1, 1);
    if (feed == NULL || seen == NULL) {
        free(feed);
        free(seen);
        return kphi__case_nomem(err, CMDLINE);
    }
    int rc = KPHI_OK;
    size_t len = strlen(text), b = 0;
    size_t first = 0;
    while (first < len && kphi__case_is_blank(text[first]))
        first++;
    if (first == len)
        rc = kphi_error_set(err, KPHI_EINPUT, CMDLINE, at,
                            "empty --feed; expected NAME=AMOUNT,..., e.g. 'N2=1,H2=3'");
    for (size_t i = 0; i <= len && rc == KPHI_OK; i++) {
        if (i < len && text[i] != ',')
            continue;
        size_t s = b, e = i;
        b = i + 1;
        while (s < e && kphi__case_is_blank(text[s]))
            s++;
        while (e > s && kphi__case_is_blank(text[e - 1]))
            e--;
        char item[KPHI__CASE_PART_MAX];
        size_t n = e - s < sizeof item ? e - s : sizeof item - 1;
        memcpy(item, text + s, n);
        item[n] = '\0';
        if (s == e) {
            rc = kphi_error_set(err, KPHI_EINPUT, CMDLINE, kphi__case_shift(at, text, s),
                                "empty item in --feed; expected NAME=AMOUNT");
            break;
        }
        char *eq = strchr(item, '=');
        if (eq == NULL || eq == item) {
            rc = kphi_error_set(err, KPHI_EINPUT, CMDLINE, kphi__case_shift(at, text, s),
                                "expected NAME=AMOUNT in --feed, found '%s'", item);
            break;
        }
        /* name: item[0, eq) trimmed; amount: after '=' */
        size_t name_end = (size_t)(eq - item);
        while (name_end > 0 && kphi__case_is_blank(item[name_end - 1]))
            name_end--;
        *eq = '\0';
        item[name_end] = '\0';
        size_t idx = 0;
        rc = lookup_species(c, item, "--feed", CMDLINE, kphi__case_shift(at, text, s), &idx, err);
        if (rc != KPHI_OK)
            break;
        if (seen[idx]) {
            rc = kphi_error_set(err, KPHI_EINPUT, CMDLINE, kphi__case_shift(at, text, s),
                                "species '%s' given twice in --feed", item);
            break;
        }
        seen[idx] = 1;
        const char *amount = eq + 1;
        size_t amount_off = s + (size_t)(amount - item);
        while (kphi__case_is_blank(*amount)) {
            amount++;
            amount_off++;
        }
        double x = 0.0;
        int bad = parse_amount(amount, &x);
        if (bad == 1)
            rc = kphi_error_set(err, KPHI_EINPUT, CMDLINE, kphi__case_shift(at, text, amount_off),
                                "expected a number for the feed amount of '%s', found '%s'",
                                item, amount);
        else if (bad == 2)
            rc = kphi_error_set(err, KPHI_EINPUT, CMDLINE, kphi__case_shift(at, text, amount_off),
                                "the feed amount of '%s' must be a finite number, found '%s'",
                                item, amount);
        else if (x < 0.0)
            rc = kphi_error_set(err, KPHI_EINPUT, CMDLINE, kphi__case_shift(at, text, amount_off),
                                "the feed amount of '%s' must be zero or positive, found '%s'",
                                item, amount);
        else
            feed[idx] = x;
    }
    free(seen);
    if (rc != KPHI_OK) {
        free(feed);
        return rc;
    }
    free(c->feed);
    c->feed = feed;
    c->feed_given = 1;
    set_source(&c->feed_src, CMDLINE, at);
    return KPHI_OK;
}

int kphi_case_set_sweep_T(kphi_case *c, const char *text, kphi_error *err)
{
    kphi__case_axis a;
    memset(&a, 0, sizeof a);
    int rc = kphi__case_axis_parse_text(&a, KPHI__CASE_TEMPERATURE, text != NULL ? text : "",
                                        CMDLINE, cmdline_at(), err);
    if (rc == KPHI_OK) {
        kphi__case_axis_clear(&c->sweep_T);
        c->sweep_T = a;
    }
    return rc;
}

int kphi_case_set_sweep_P(kphi_case *c, const char *text, kphi_error *err)
{
    kphi__case_axis a;
    memset(&a, 0, sizeof a);
    int rc = kphi__case_axis_parse_text(&a, KPHI__CASE_PRESSURE, text != NULL ? text : "",
                                        CMDLINE, cmdline_at(), err);
    if (rc == KPHI_OK) {
        kphi__case_axis_clear(&c->sweep_P);
        c->sweep_P = a;
    }
    return rc;
}

/* ---------------------------------------------------------------- validation */

/* Above this pressure no gas-phase model here means anything: the cubics and the virial
 * were fitted to gases well below it, and real mixtures are liquids or solids there. */
#define P_CEILING 1e9 /* Pa, 10 000 bar */

static int check_ceiling(double P, const char *path, kphi_mark at, kphi_error *err)
{
    char v[32];
    if (P > P_CEILING)
        return kphi_error_set(err, KPHI_EINPUT, path, at,
                              "P = %s bar is above 10000 bar, beyond the range of any "
                              "gas-phase model in kphi",
                              kphi__fmt_beyond(v, "%.6g", P / 1e5, P_CEILING / 1e5));
    return KPHI_OK;
}

int kphi_case_validate(const kphi_case *c, kphi_error *err)
{
    kphi_mark top = {1, 1};
    /* T and P may be left out when the sweep gives that axis (kphi solve checks again) */
    if (isnan(c->T) && !c->sweep_T.given)
        return kphi_error_set(err, KPHI_EINPUT, c->path, top,
                              "missing T: add 'T: 450 C' to the case or pass --T");
    if (isnan(c->P) && !c->sweep_P.given)
        return kphi_error_set(err, KPHI_EINPUT, c->path, top,
                              "missing P: add 'P: 200 bar' to the case or pass --P");
    if (!isnan(c->P)) {
        int rc = check_ceiling(c->P, c->P_src.path, c->P_src.at, err);
        if (rc != KPHI_OK)
            return rc;
    }
    for (size_t k = 0; c->sweep_P.given && k < c->sweep_P.n; k++) {
        const kphi__case_axis *a = &c->sweep_P;
        kphi_mark at = a->is_range ? a->marks[k == 0 ? 0 : 1] : a->marks[k];
        int rc = check_ceiling(a->v[k], a->path, at, err);
        if (rc != KPHI_OK)
            return rc;
    }
    if (!c->feed_given)
        return kphi_error_set(err, KPHI_EINPUT, c->path, top,
                              "missing feed: add 'feed: {NAME: AMOUNT, ...}' to the case or "
                              "pass --feed");
    double total = 0.0, reacting = 0.0;
    for (size_t i = 0; i < c->n; i++) {
        total += c->feed[i];
        if (!kphi_rxnset_is_inert(c->set, i))
            reacting += c->feed[i];
    }
    char list[128];
    species_list(c->set, 0, list, sizeof list);
    if (!(total > 0.0))
        return kphi_error_set(err, KPHI_EINPUT, c->feed_src.path, c->feed_src.at,
                              "the feed is all zero; give a positive amount of at least one "
                              "reacting species (%s)",
                              list);
    if (!(reacting > 0.0))
        return kphi_error_set(err, KPHI_EINPUT, c->feed_src.path, c->feed_src.at,
                              "the feed holds only inert species; give a positive amount of at "
                              "least one reacting species (%s)",
                              list);
    for (size_t i = 0; i < c->n; i++) {
        const kphi_species *sp = kphi_rxnset_species(c->set, i);
        int rc = isnan(c->T) ? KPHI_OK
                             : kphi_thermo_check_range(sp, c->T, c->T_src.path, c->T_src.at, err);
        if (rc != KPHI_OK)
            return rc;
        const kphi__case_axis *a = &c->sweep_T;
        for (size_t k = 0; a->given && k < a->n; k++) {
            /* A range is monotone and a data range is an interval: its ends suffice. */
            if (a->is_range && k != 0 && k != a->n - 1)
                continue;
            kphi_mark at = a->is_range ? a->marks[k == 0 ? 0 : 1] : a->marks[k];
            rc = kphi_thermo_check_range(sp, a->v[k], a->path, at, err);
            if (rc != KPHI_OK)
                return rc;
        }
    }
    return KPHI_OK;
}

/* ---------------------------------------------------------------- accessors */

const char *kphi_case_path(const kphi_case *c)
{
    return c->path;
}

const kphi_rxnset *kphi_case_rxnset(const kphi_case *c)
{
    return c->set;
}

double kphi_case_T(const kphi_case *c)
{
    return c->T;
}

double kphi_case_P(const kphi_case *c)
{
    return c->P;
}

const char *kphi_case_T_unit(const kphi_case *c)
{
    return c->T_unit;
}

const char *kphi_case_P_unit(const kphi_case *c)
{
    return c->P_unit;
}

const double *kphi_case_feed(const kphi_case *c)
{
    return c->feed;
}

kphi_eos_model kphi_case_eos(const kphi_case *c)
{
    return c->eos;
}

int kphi_case_quantum(const kphi_case *c)
{
    return c->quantum;
}

/* The k_ij in effect, in order: the set's (skipping pairs the case gives again), then the
 * case's. Returns how many; with out != NULL fills entry number `want`. */
/* Entry m of the k_ij file applies to model `model` and a pair of the set: 1 with i, j. */
static int file_kij(const kphi_case *c, size_t m, kphi_eos_model model, size_t *i, size_t *j)
{
    const kphi_kij_entry *e = kphi_kij_db_get(c->kijdb, m);
    if (e == NULL || strcmp(e->model, kphi_eos_model_name(model)) != 0)
        return 0;
    long a = kphi_rxnset_species_index(c->set, e->a), b = kphi_rxnset_species_index(c->set, e->b);
    if (a < 0 || b < 0)
        return 0;
    *i = (size_t)a;
    *j = (size_t)b;
    return 1;
}

static int same_pair(size_t i, size_t j, size_t a, size_t b)
{
    return (i == a && j == b) || (i == b && j == a);
}

static size_t kij_for_model(const kphi_case *c, kphi_eos_model model, size_t want,
                            kphi_case_kij_entry *out)
{
    size_t n = 0;
    for (size_t m = 0; m < kphi_kij_db_count(c->kijdb); m++) {
        size_t i = 0, j = 0;
        if (!file_kij(c, m, model, &i, &j))
            continue;
        int overridden = 0;
        for (size_t q = 0; q < kphi_rxnset_n_kij(c->set) && !overridden; q++) {
            size_t a = 0, b = 0;
            double k;
            kphi_rxnset_kij(c->set, q, &a, &b, &k);
            overridden = same_pair(i, j, a, b);
        }
        for (size_t q = 0; q < c->n_kij && !overridden; q++)
            overridden = same_pair(i, j, c->kij_i[q], c->kij_j[q]);
        if (overridden)
            continue;
        if (out != NULL && n == want) {
            const kphi_kij_entry *e = kphi_kij_db_get(c->kijdb, m);
            memset(out, 0, sizeof *out);
            out->i = i;
            out->j = j;
            out->value = e->value;
            out->dkdT = e->dkdT;
            out->T_ref = e->T_ref;
            out->source = e->source;
            out->from_file = 1;
        }
        n++;
    }
    for (size_t m = 0; m < kphi_rxnset_n_kij(c->set); m++) {
        size_t i = 0, j = 0;
        double k = 0.0;
        kphi_rxnset_kij(c->set, m, &i, &j, &k);
        int overridden = 0;
        for (size_t q = 0; q < c->n_kij && !overridden; q++)
            overridden = same_pair(i, j, c->kij_i[q], c->kij_j[q]);
        if (overridden)
            continue;
        if (out != NULL && n == want) {
            memset(out, 0, sizeof *out);
            out->i = i;
            out->j = j;
            out->value = k;
            out->T_ref = 298.15;
            out->source = kphi_rxnset_kij_source(c->set, m);
        }
        n++;
    }
    for (size_t q = 0; q < c->n_kij; q++) {
        if (out != NULL && n == want) {
            memset(out, 0, sizeof *out);
            out->i = c->kij_i[q];
            out->j = c->kij_j[q];
            out->value = c->kij_v[q];
            out->T_ref = 298.15;
            out->source = c->kij_src != NULL ? c->kij_src[q] : NULL;
            out->from_case = 1;
        }
        n++;
    }
    return n;
}

static size_t kij_in_effect(const kphi_case *c, size_t want, kphi_case_kij_entry *out)
{
    return kij_for_model(c, c->eos, want, out);
}

const kphi_kij_db *kphi_case_kij_db(const kphi_case *c)
{
    return c->kijdb;
}

size_t kphi_case_n_kij(const kphi_case *c)
{
    return kij_in_effect(c, 0, NULL);
}

int kphi_case_kij(const kphi_case *c, size_t m, kphi_case_kij_entry *out)
{
    if (m >= kij_in_effect(c, 0, NULL))
        return KPHI_EINPUT;
    kij_in_effect(c, m, out);
    return KPHI_OK;
}

const char *kphi_case_name(const kphi_case *c)
{
    return c->name;
}

kphi_eos *kphi_case_make_eos(const kphi_case *c, kphi_eos_model model, kphi_error *err)
{
    kphi_eos *eos = kphi_eos_alloc(model, c->n);
    if (eos == NULL) {
        kphi__case_nomem(err, c->path);
        return NULL;
    }
    for (size_t i = 0; i < c->n; i++) {
        if (kphi_eos_set_species(eos, i, kphi_rxnset_species(c->set, i), err) != KPHI_OK) {
            kphi_eos_free(eos);
            return NULL;
        }
    }
    if (kphi_eos_model_needs_critical(model)) {
        size_t nk = kij_for_model(c, model, 0, NULL);
        for (size_t m = 0; m < nk; m++) {
            kphi_case_kij_entry e;
            kij_for_model(c, model, m, &e);
            kphi_eos_set_kij_linear(eos, e.i, e.j, e.value, e.dkdT, e.T_ref);
        }
    }
    kphi_eos_set_quantum(eos, c->quantum);
    return eos;
}

size_t kphi_case_sweep_n_T(const kphi_case *c)
{
    return c->sweep_T.given ? c->sweep_T.n : 1;
}

const double *kphi_case_sweep_T(const kphi_case *c)
{
    return c->sweep_T.given ? c->sweep_T.v : &c->T;
}

size_t kphi_case_sweep_n_P(const kphi_case *c)
{
    return c->sweep_P.given ? c->sweep_P.n : 1;
}

const double *kphi_case_sweep_P(const kphi_case *c)
{
    return c->sweep_P.given ? c->sweep_P.v : &c->P;
}

const char *kphi_case_sweep_T_unit(const kphi_case *c)
{
    return c->sweep_T.given && c->sweep_T.unit[0] != '\0' ? c->sweep_T.unit : c->T_unit;
}

const char *kphi_case_sweep_P_unit(const kphi_case *c)
{
    return c->sweep_P.given && c->sweep_P.unit[0] != '\0' ? c->sweep_P.unit : c->P_unit;
}

/* ------------------------------------------------------------ the loop block */

const kphi_case_loop *kphi_case_get_loop(const kphi_case *c)
{
    return kphi__case_loop_public(c->loop);
}

static int no_loop(const kphi_case *c, kphi_error *err)
{
    kphi_mark top = {1, 1};
    return kphi_error_set(err, KPHI_EINPUT, c->path, top,
                          "the case has no 'loop' block (make-up, converter, separator, "
                          "purge); see cases/ammonia_loop.yaml");
}

int kphi_case_set_loop_T(kphi_case *c, const char *text, kphi_error *err)
{
    if (c->loop == NULL)
        return no_loop(c, err);
    return kphi__case_loop_set_T(c->loop, text, err);
}

int kphi_case_set_purge(kphi_case *c, const char *text, kphi_error *err)
{
    if (c->loop == NULL)
        return no_loop(c, err);
    return kphi__case_loop_set_purge(c->loop, text, err);
}

int kphi_case_validate_loop(const kphi_case *c, kphi_error *err)
{
    if (c->loop == NULL)
        return no_loop(c, err);
    return kphi__case_loop_validate(c->loop, c->set, c->P, c->P_src.path, err);
}

/* The mark of value k of a sweep axis (the `from` or `to` entry of a range). */
static kphi_mark axis_mark(const kphi__case_axis *a, size_t k)
{
    if (a->marks == NULL)
        return (kphi_mark){1, 1};
    if (a->is_range)
        return a->marks[k == 0 ? 0 : 1];
    return a->marks[k];
}

int kphi_case_loop_grid(const kphi_case *c, const double **T, size_t *nT, const double **P,
                        size_t *nP, kphi_error *err)
{
    if (c->loop == NULL)
        return no_loop(c, err);
    const kphi_case_loop *g = kphi__case_loop_public(c->loop);
    const kphi__case_axis *aT = &c->sweep_T, *aP = &c->sweep_P;
    /* the axes, or the loop's own converter temperature and the case's P */
    *T = aT->given ? aT->v : (g->adiabatic ? &g->T_in[0] : &g->T_out);
    *nT = aT->given ? aT->n : 1;
    *P = aP->given ? aP->v : &c->P;
    *nP = aP->given ? aP->n : 1;
    double drop = isfinite(g->P_sep) && isfinite(c->P) ? c->P - g->P_sep : 0.0;
    for (size_t k = 0; aT->given && k < aT->n; k++) {
        double Tk = aT->v[k];
        kphi_mark at = axis_mark(aT, k);
        if (!(g->T_sep < Tk))
            return kphi_error_set(err, KPHI_EINPUT, aT->path, at,
                                  "converter temperature %.2f K of the sweep is not above the "
                                  "separator's %.2f K: the separator cools the converter outlet",
                                  Tk, g->T_sep);
        double Teq = g->adiabatic ? Tk : Tk + g->approach; /* where the converter is solved */
        for (size_t i = 0; i < c->n; i++) {
            int rc = kphi_thermo_check_range(kphi_rxnset_species(c->set, i), Teq, aT->path, at,
                                             err);
            if (rc != KPHI_OK)
                return rc;
        }
    }
    for (size_t k = 0; aP->given && k < aP->n; k++) {
        kphi_mark at = axis_mark(aP, k);
        int rc = check_ceiling(aP->v[k], aP->path, at, err);
        if (rc != KPHI_OK)
            return rc;
        if (!(aP->v[k] - drop > 0.0))
            return kphi_error_set(err, KPHI_EINPUT, aP->path, at,
                                  "loop pressure %.4g bar of the sweep leaves no separator "
                                  "pressure: the loop block's separator is %.4g bar below the "
                                  "case's P",
                                  aP->v[k] / 1e5, drop / 1e5);
    }
    return KPHI_OK;
}
