/* kphi species, binary interaction parameters: the k_ij file (reactions/kij.yaml).
 *
 * One entry per equation of state and pair, with an optional linear temperature
 * dependence and the source of each value:
 *   sources: {KEY: "full citation", ...}
 *   kij:
 *     - {eos: pr, pair: [NH3, H2], value: 0.0, source: KEY}
 *     - {eos: srk, pair: [CO2, H2], value: -0.12, dkdT: 2.0e-4, T_ref: 300, source: KEY,
 *        note: "..."}
 * k_ij(T) = value + dkdT (T - T_ref), T in K (T_ref defaults to 298.15 K). Every error is
 * KPHI_EINPUT with file:line:column. Species names are checked against a species database
 * when one is given. */
#include "kphi/species.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "internal.h"
#include "yamlutil.h"

enum { KIJ_MAX_SOURCES = 64 };

struct kphi_kij_db {
    size_t n;
    kphi_kij_entry *e;
    char **notes;      /* [n] owned, or NULL */
    size_t n_src;
    char *src_key[KIJ_MAX_SOURCES];
    char *src_text[KIJ_MAX_SOURCES];
    char *path;
};

static const char *const MODELS[] = {"rk", "srk", "pr"};

void kphi_kij_db_free(kphi_kij_db *db)
{
    if (db == NULL)
        return;
    for (size_t i = 0; i < db->n && db->notes != NULL; i++)
        free(db->notes[i]);
    free(db->notes);
    for (size_t i = 0; i < db->n_src; i++) {
        free(db->src_key[i]);
        free(db->src_text[i]);
    }
    free(db->e);
    free(db->path);
    free(db);
}

size_t kphi_kij_db_count(const kphi_kij_db *db)
{
    return db != NULL ? db->n : 0;
}

const kphi_kij_entry *kphi_kij_db_get(const kphi_kij_db *db, size_t m)
{
    return db != NULL && m < db->n ? &db->e[m] : NULL;
}

const char *kphi_kij_db_path(const kphi_kij_db *db)
{
    return db != NULL ? db->path : "";
}

double kphi_kij_entry_value(const kphi_kij_entry *e, double T)
{
    return e->value + e->dkdT * (T - e->T_ref);
}

static int load_sources(kphi__yaml *y, yaml_node_t *map, kphi_kij_db *db, kphi_error *err)
{
    int rc = kphi__yaml_expect(y, map, YAML_MAPPING_NODE, "'sources' (KEY: citation)", err);
    if (rc != KPHI_OK)
        return rc;
    for (yaml_node_pair_t *p = map->data.mapping.pairs.start; p < map->data.mapping.pairs.top;
         p++) {
        yaml_node_t *k = kphi__yaml_node(y, p->key), *v = kphi__yaml_node(y, p->value);
        const char *ks = kphi__yaml_scalar(k), *vs = kphi__yaml_scalar(v);
        if (ks == NULL || vs == NULL)
            return kphi__yaml_error(y, k, KPHI_EINPUT, err,
                                    "a source is a key and a citation in quotes");
        if (db->n_src == KIJ_MAX_SOURCES)
            return kphi__yaml_error(y, k, KPHI_EINPUT, err, "too many sources (at most %d)",
                                    KIJ_MAX_SOURCES);
        db->src_key[db->n_src] = strdup(ks);
        db->src_text[db->n_src] = strdup(vs);
        if (db->src_key[db->n_src] == NULL || db->src_text[db->n_src] == NULL)
            return kphi__yaml_error(y, k, KPHI_ENOMEM, err, "out of memory");
        db->n_src++;
    }
    return KPHI_OK;
}

static int load_entry(kphi__yaml *y, yaml_node_t *map, kphi_kij_db *db, size_t idx,
                      const kphi_species_db *names, kphi_error *err)
{
    static const char *const keys[] = {"eos", "pair", "value", "dkdT", "T_ref", "source", "note"};
    int rc = kphi__yaml_expect(y, map, YAML_MAPPING_NODE, "a 'kij' entry", err);
    if (rc == KPHI_OK)
        rc = kphi__yaml_check_keys(y, map, keys, sizeof keys / sizeof keys[0], "a 'kij' entry",
                                   err);
    if (rc != KPHI_OK)
        return rc;
    kphi_kij_entry *e = &db->e[idx];
    memset(e, 0, sizeof *e);
    e->T_ref = 298.15;
    e->mark = kphi__yaml_mark(map);
    const char *need[] = {"eos", "pair", "value", "source"};
    for (size_t k = 0; k < 4; k++)
        if (kphi__yaml_map_get(y, map, need[k], NULL) == NULL)
            return kphi__yaml_error(y, map, KPHI_EINPUT, err,
                                    "a 'kij' entry needs 'eos', 'pair', 'value' and 'source'; "
                                    "'%s' is missing",
                                    need[k]);
    yaml_node_t *node = kphi__yaml_map_get(y, map, "eos", NULL);
    const char *m = kphi__yaml_scalar(node);
    size_t mi = 0;
    while (m != NULL && mi < 3 && strcmp(m, MODELS[mi]) != 0)
        mi++;
    if (m == NULL || mi == 3) {
        const char *near = m != NULL ? kphi__closest(m, MODELS, 3) : NULL;
        return kphi__yaml_error(y, node, KPHI_EINPUT, err,
                                "'eos' of a k_ij entry is '%s'%s%s%s; expected rk, srk or pr",
                                m != NULL ? m : "not a word", near ? " (did you mean '" : "",
                                near ? near : "", near ? "'?)" : "");
    }
    kphi__strlcpy(e->model, m, sizeof e->model);
    node = kphi__yaml_map_get(y, map, "pair", NULL);
    rc = kphi__yaml_expect(y, node, YAML_SEQUENCE_NODE, "'pair' (two species)", err);
    if (rc != KPHI_OK)
        return rc;
    if (node->data.sequence.items.top - node->data.sequence.items.start != 2)
        return kphi__yaml_error(y, node, KPHI_EINPUT, err, "'pair' needs exactly two species");
    for (int k = 0; k < 2; k++) {
        yaml_node_t *sp = kphi__yaml_node(y, node->data.sequence.items.start[k]);
        const char *name = kphi__yaml_scalar(sp);
        if (name == NULL || name[0] == '\0' || strlen(name) >= KPHI_SPECIES_NAME_MAX)
            return kphi__yaml_error(y, sp, KPHI_EINPUT, err, "expected a species name");
        if (names != NULL && kphi_species_db_find(names, name) == NULL) {
            const char *near = kphi_species_db_suggest(names, name);
            return kphi__yaml_error(y, sp, KPHI_EINPUT, err,
                                    "unknown species '%s' in a k_ij pair%s%s%s", name,
                                    near ? " (did you mean '" : "", near ? near : "",
                                    near ? "'?)" : "");
        }
        kphi__strlcpy(k == 0 ? e->a : e->b, name, KPHI_SPECIES_NAME_MAX);
    }
    if (strcmp(e->a, e->b) == 0)
        return kphi__yaml_error(y, node, KPHI_EINPUT, err,
                                "a k_ij pair needs two different species");
    for (size_t q = 0; q < idx; q++) {
        const kphi_kij_entry *o = &db->e[q];
        if (strcmp(o->model, e->model) == 0 &&
            ((strcmp(o->a, e->a) == 0 && strcmp(o->b, e->b) == 0) ||
             (strcmp(o->a, e->b) == 0 && strcmp(o->b, e->a) == 0)))
            return kphi__yaml_error(y, node, KPHI_EINPUT, err,
                                    "k_ij of %s-%s for %s is given twice (first at line %ld)",
                                    e->a, e->b, e->model, o->mark.line);
    }
    node = kphi__yaml_map_get(y, map, "value", NULL);
    if ((rc = kphi__yaml_double(y, node, "'value'", &e->value, err)) != KPHI_OK)
        return rc;
    if (!(e->value > -1.0 && e->value < 1.0))
        return kphi__yaml_error(y, node, KPHI_EINPUT, err,
                                "k_ij must lie between -1 and 1, found %g", e->value);
    if ((node = kphi__yaml_map_get(y, map, "dkdT", NULL)) != NULL &&
        (rc = kphi__yaml_double(y, node, "'dkdT' (per K)", &e->dkdT, err)) != KPHI_OK)
        return rc;
    if ((node = kphi__yaml_map_get(y, map, "T_ref", NULL)) != NULL) {
        if ((rc = kphi__yaml_double(y, node, "'T_ref' (K)", &e->T_ref, err)) != KPHI_OK)
            return rc;
        if (!(e->T_ref > 0.0))
            return kphi__yaml_error(y, node, KPHI_EINPUT, err,
                                    "'T_ref' is a temperature in K and must be positive");
    }
    node = kphi__yaml_map_get(y, map, "source", NULL);
    const char *key = kphi__yaml_scalar(node);
    e->source = NULL;
    for (size_t s = 0; key != NULL && s < db->n_src; s++)
        if (strcmp(db->src_key[s], key) == 0)
            e->source = db->src_text[s];
    if (e->source == NULL) {
        const char *near = key != NULL ? kphi__closest(key, (const char *const *)db->src_key,
                                                      db->n_src)
                                       : NULL;
        return kphi__yaml_error(y, node, KPHI_EINPUT, err,
                                "unknown source '%s'%s%s%s; sources are defined under 'sources'",
                                key != NULL ? key : "", near ? " (did you mean '" : "",
                                near ? near : "", near ? "'?)" : "");
    }
    e->note = "";
    if ((node = kphi__yaml_map_get(y, map, "note", NULL)) != NULL) {
        const char *note = kphi__yaml_scalar(node);
        if (note == NULL)
            return kphi__yaml_expect(y, node, YAML_SCALAR_NODE, "'note'", err);
        db->notes[idx] = strdup(note);
        if (db->notes[idx] == NULL)
            return kphi__yaml_error(y, node, KPHI_ENOMEM, err, "out of memory");
        e->note = db->notes[idx];
    }
    return KPHI_OK;
}

kphi_kij_db *kphi_kij_db_load_file(const char *path, const kphi_species_db *names,
                                   kphi_error *err)
{
    kphi__yaml y;
    if (kphi__yaml_load_file(&y, path, err) != KPHI_OK)
        return NULL;
    kphi_kij_db *db = calloc(1, sizeof *db);
    int rc = KPHI_OK;
    if (db == NULL || (db->path = strdup(path)) == NULL) {
        kphi_error_set(err, KPHI_ENOMEM, path, (kphi_mark){0, 0}, "out of memory");
        kphi_kij_db_free(db);
        kphi__yaml_free(&y);
        return NULL;
    }
    static const char *const keys[] = {"sources", "kij"};
    yaml_node_t *root = kphi__yaml_root(&y);
    rc = kphi__yaml_expect(&y, root, YAML_MAPPING_NODE, "a k_ij file (sources, kij)", err);
    if (rc == KPHI_OK)
        rc = kphi__yaml_check_keys(&y, root, keys, 2, "the k_ij file", err);
    yaml_node_t *src = rc == KPHI_OK ? kphi__yaml_map_get(&y, root, "sources", NULL) : NULL;
    yaml_node_t *list = rc == KPHI_OK ? kphi__yaml_map_get(&y, root, "kij", NULL) : NULL;
    if (rc == KPHI_OK && (src == NULL || list == NULL))
        rc = kphi__yaml_error(&y, root, KPHI_EINPUT, err,
                              "a k_ij file needs 'sources' and 'kij'");
    if (rc == KPHI_OK)
        rc = load_sources(&y, src, db, err);
    if (rc == KPHI_OK)
        rc = kphi__yaml_expect(&y, list, YAML_SEQUENCE_NODE, "'kij' (a list of entries)", err);
    if (rc == KPHI_OK) {
        size_t n = (size_t)(list->data.sequence.items.top - list->data.sequence.items.start);
        db->e = calloc(n > 0 ? n : 1, sizeof *db->e);
        db->notes = calloc(n > 0 ? n : 1, sizeof *db->notes);
        if (db->e == NULL || db->notes == NULL)
            rc = kphi__yaml_error(&y, list, KPHI_ENOMEM, err, "out of memory");
        for (size_t m = 0; rc == KPHI_OK && m < n; m++) {
            rc = load_entry(&y, kphi__yaml_node(&y, list->data.sequence.items.start[m]), db, m,
                            names, err);
            if (rc == KPHI_OK)
                db->n = m + 1;
        }
    }
    kphi__yaml_free(&y);
    if (rc != KPHI_OK) {
        kphi_kij_db_free(db);
        return NULL;
    }
    return db;
}
