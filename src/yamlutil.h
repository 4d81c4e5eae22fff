/* Internal: shared YAML helpers for the three loaders (species, rxnset, case).
 *
 * Loads a whole document with libyaml's document API (yaml_parser_load) and offers
 * lookups that keep the source mark of every node, converted to 1-based line/column.
 * libyaml returns 1 on success and counts lines and columns from 0: both are converted
 * here and nowhere else. Not part of the public API. */
#ifndef KPHI_YAMLUTIL_H
#define KPHI_YAMLUTIL_H

#include <stddef.h>
#include <yaml.h>

#include "kphi/error.h"

typedef struct {
    yaml_document_t doc;
    int loaded;       /* 1 when doc must be deleted */
    char path[256];   /* for messages */
} kphi__yaml;

/* Read and parse a file (KPHI_EIO when it cannot be opened or is not a regular file;
 * KPHI_EINPUT for a syntax error, with libyaml's problem text and position, for bytes
 * that are not UTF-8, for a second document, for nesting deeper than 64 levels and for a
 * NUL character inside a value; an empty document is KPHI_EINPUT "file is empty"). On
 * error nothing needs freeing. */
int kphi__yaml_load_file(kphi__yaml *y, const char *path, kphi_error *err);
int kphi__yaml_load_string(kphi__yaml *y, const char *text, size_t len, const char *name,
                           kphi_error *err);
void kphi__yaml_free(kphi__yaml *y);

yaml_node_t *kphi__yaml_root(kphi__yaml *y);
yaml_node_t *kphi__yaml_node(kphi__yaml *y, yaml_node_item_t id);

/* 1-based mark of a node's start. */
kphi_mark kphi__yaml_mark(const yaml_node_t *node);

/* Value of key in a mapping node, or NULL. *key_node (may be NULL) gets the key node. */
yaml_node_t *kphi__yaml_map_get(kphi__yaml *y, yaml_node_t *map, const char *key,
                                yaml_node_t **key_node);

/* Check that every key of `map` is in allowed[n]; otherwise KPHI_EINPUT at the key:
 * "unknown key 'tempreature' in <what> (did you mean 'temperature'?); expected one of: ..."
 * Also rejects duplicate keys and non-scalar keys. */
int kphi__yaml_check_keys(kphi__yaml *y, yaml_node_t *map, const char *const allowed[],
                          size_t n, const char *what, kphi_error *err);

/* The three kinds of kphi input file. */
typedef enum { KPHI__KIND_CASE, KPHI__KIND_RXNSET, KPHI__KIND_SPECIES_DB } kphi__yaml_kind;

/* Refuse a file of another kind, told apart by keys only that kind has (a species
 * database has 'sources'; a case 'feed', 'T', 'P', 'eos', 'quantum' or 'sweep'; a reaction
 * set 'species', 'species_file' or 'conversion'), when it has none of the keys of `want`:
 * KPHI_EINPUT at that key, "'feed' makes this a case file, not a reaction set<hint>".
 * Catches a case whose 'reactions' names itself or another case, and the like. */
int kphi__yaml_check_kind(kphi__yaml *y, yaml_node_t *root, kphi__yaml_kind want,
                          const char *hint, kphi_error *err);

/* Type checks with a message "expected a <what> for 'key', found a sequence". */
int kphi__yaml_expect(kphi__yaml *y, yaml_node_t *node, yaml_node_type_t type,
                      const char *what, kphi_error *err);

/* Scalar text (NUL-terminated by libyaml), or NULL when node is not a scalar. */
const char *kphi__yaml_scalar(const yaml_node_t *node);

/* Parse a scalar as a finite double (strict: the whole text, no NaN/inf). */
int kphi__yaml_double(kphi__yaml *y, yaml_node_t *node, const char *what, double *out,
                      kphi_error *err);

/* Record an error at a node's mark. Returns code. */
int kphi__yaml_error(kphi__yaml *y, yaml_node_t *node, kphi_status code, kphi_error *err,
                     const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 5, 6)))
#endif
    ;

#endif /* KPHI_YAMLUTIL_H */
