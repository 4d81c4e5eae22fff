/* Internal YAML helpers shared by the species, reaction-set and case loaders.
 *
 * A file is loaded whole with libyaml's document API; every node keeps its start mark,
 * which is turned into a 1-based line and column here (libyaml counts from 0 and returns 1
 * on success: both conventions end in this file). */
#include "yamlutil.h"

#include <errno.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>

#include "internal.h"

enum { MAX_INPUT_BYTES = 16 * 1024 * 1024 };

static int load_with(kphi__yaml *y, yaml_parser_t *parser, kphi_error *err)
{
    if (!yaml_parser_load(parser, &y->doc)) {
        kphi_mark at = {(long)parser->problem_mark.line + 1, (long)parser->problem_mark.column + 1};
        const char *problem = parser->problem != NULL ? parser->problem : "unreadable YAML";
        int code;
        if (parser->error == YAML_MEMORY_ERROR)
            code = kphi_error_set(err, KPHI_ENOMEM, y->path, at, "out of memory reading YAML");
        else if (parser->context != NULL)
            code = kphi_error_set(err, KPHI_EINPUT, y->path, at, "invalid YAML: %s %s", problem,
                                  parser->context);
        else
            code = kphi_error_set(err, KPHI_EINPUT, y->path, at, "invalid YAML: %s", problem);
        yaml_parser_delete(parser);
        return code;
    }
    yaml_parser_delete(parser);
    y->loaded = 1;
    if (yaml_document_get_root_node(&y->doc) == NULL) {
        kphi__yaml_free(y);
        kphi_mark at = {1, 1};
        return kphi_error_set(err, KPHI_EINPUT, y->path, at, "file is empty");
    }
    return KPHI_OK;
}

int kphi__yaml_load_file(kphi__yaml *y, const char *path, kphi_error *err)
{
    kphi_mark none = {0, 0};
    memset(y, 0, sizeof *y);
    kphi__strlcpy(y->path, path, sizeof y->path);
    struct stat st;
    if (stat(path, &st) != 0)
        return kphi_error_set(err, KPHI_EIO, path, none, "cannot open: %s", strerror(errno));
    if (!S_ISREG(st.st_mode))
        return kphi_error_set(err, KPHI_EIO, path, none, "not a regular file");
    if (st.st_size > MAX_INPUT_BYTES)
        return kphi_error_set(err, KPHI_EINPUT, path, none,
                              "file is %lld bytes; input files are limited to %d bytes",
                              (long long)st.st_size, MAX_INPUT_BYTES);
    FILE *f = fopen(path, "rb");
    if (f == NULL)
        return kphi_error_set(err, KPHI_EIO, path, none, "cannot open: %s", strerror(errno));
    yaml_parser_t parser;
    if (!yaml_parser_initialize(&parser)) {
        fclose(f);
        return kphi_error_set(err, KPHI_ENOMEM, path, none, "out of memory");
    }
    yaml_parser_set_input_file(&parser, f);
    int rc = load_with(y, &parser, err);
    fclose(f);
    return rc;
}

int kphi__yaml_load_string(kphi__yaml *y, const char *text, size_t len, const char *name,
                           kphi_error *err)
{
    kphi_mark none = {0, 0};
    memset(y, 0, sizeof *y);
    kphi__strlcpy(y->path, name != NULL ? name : "<string>", sizeof y->path);
    yaml_parser_t parser;
    if (!yaml_parser_initialize(&parser))
        return kphi_error_set(err, KPHI_ENOMEM, y->path, none, "out of memory");
    yaml_parser_set_input_string(&parser, (const unsigned char *)text, len);
    return load_with(y, &parser, err);
}

void kphi__yaml_free(kphi__yaml *y)
{
    if (y != NULL && y->loaded) {
        yaml_document_delete(&y->doc);
        y->loaded = 0;
    }
}

yaml_node_t *kphi__yaml_root(kphi__yaml *y)
{
    return y->loaded ? yaml_document_get_root_node(&y->doc) : NULL;
}

yaml_node_t *kphi__yaml_node(kphi__yaml *y, yaml_node_item_t id)
{
    return yaml_document_get_node(&y->doc, id);
}

kphi_mark kphi__yaml_mark(const yaml_node_t *node)
{
    kphi_mark m = {0, 0};
    if (node != NULL) {
        m.line = (long)node->start_mark.line + 1;
        m.column = (long)node->start_mark.column + 1;
    }
    return m;
}

const char *kphi__yaml_scalar(const yaml_node_t *node)
{
    if (node == NULL || node->type != YAML_SCALAR_NODE)
        return NULL;
    return (const char *)node->data.scalar.value;
}

yaml_node_t *kphi__yaml_map_get(kphi__yaml *y, yaml_node_t *map, const char *key,
                                yaml_node_t **key_node)
{
    if (map == NULL || map->type != YAML_MAPPING_NODE)
        return NULL;
    for (yaml_node_pair_t *p = map->data.mapping.pairs.start; p < map->data.mapping.pairs.top;
         p++) {
        yaml_node_t *k = kphi__yaml_node(y, p->key);
        const char *s = kphi__yaml_scalar(k);
        if (s != NULL && strcmp(s, key) == 0) {
            if (key_node != NULL)
                *key_node = k;
            return kphi__yaml_node(y, p->value);
        }
    }
    return NULL;
}

int kphi__yaml_error(kphi__yaml *y, yaml_node_t *node, kphi_status code, kphi_error *err,
                     const char *fmt, ...)
{
    if (err == NULL || err->code != KPHI_OK)
        return code;
    char msg[sizeof err->msg];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(msg, sizeof msg, fmt, ap);
    va_end(ap);
    return kphi_error_set(err, code, y->path, kphi__yaml_mark(node), "%s", msg);
}

static const char *type_name(yaml_node_type_t t)
{
    switch (t) {
    case YAML_SCALAR_NODE:
        return "a single value";
    case YAML_SEQUENCE_NODE:
        return "a list";
    case YAML_MAPPING_NODE:
        return "a mapping";
    default:
        return "nothing";
    }
}

int kphi__yaml_expect(kphi__yaml *y, yaml_node_t *node, yaml_node_type_t type,
                      const char *what, kphi_error *err)
{
    if (node != NULL && node->type == type)
        return KPHI_OK;
    return kphi__yaml_error(y, node, KPHI_EINPUT, err, "expected %s for %s, found %s",
                            type_name(type), what,
                            node != NULL ? type_name(node->type) : "nothing");
}

int kphi__yaml_check_keys(kphi__yaml *y, yaml_node_t *map, const char *const allowed[],
                          size_t n, const char *what, kphi_error *err)
{
    int rc = kphi__yaml_expect(y, map, YAML_MAPPING_NODE, what, err);
    if (rc != KPHI_OK)
        return rc;
    for (yaml_node_pair_t *p = map->data.mapping.pairs.start; p < map->data.mapping.pairs.top;
         p++) {
        yaml_node_t *k = kphi__yaml_node(y, p->key);
        const char *s = kphi__yaml_scalar(k);
        if (s == NULL)
            return kphi__yaml_error(y, k, KPHI_EINPUT, err, "a key in %s must be a plain name",
                                    what);
        int ok = 0;
        for (size_t i = 0; i < n && !ok; i++)
            ok = strcmp(s, allowed[i]) == 0;
        if (!ok) {
            char list[160] = "";
            size_t used = 0;
            for (size_t i = 0; i < n; i++) {
                int w = snprintf(list + used, sizeof list - used, "%s%s", i ? ", " : "",
                                 allowed[i]);
                if (w < 0 || (size_t)w >= sizeof list - used)
                    break;
                used += (size_t)w;
            }
            const char *near = kphi__closest(s, allowed, n);
            if (near != NULL)
                return kphi__yaml_error(y, k, KPHI_EINPUT, err,
                                        "unknown key '%s' in %s (did you mean '%s'?)", s, what,
                                        near);
            return kphi__yaml_error(y, k, KPHI_EINPUT, err,
                                    "unknown key '%s' in %s; expected one of: %s", s, what, list);
        }
        for (yaml_node_pair_t *q = map->data.mapping.pairs.start; q < p; q++) {
            const char *t = kphi__yaml_scalar(kphi__yaml_node(y, q->key));
            if (t != NULL && strcmp(s, t) == 0)
                return kphi__yaml_error(y, k, KPHI_EINPUT, err, "key '%s' given twice in %s", s,
                                        what);
        }
    }
    return KPHI_OK;
}

int kphi__yaml_double(kphi__yaml *y, yaml_node_t *node, const char *what, double *out,
                      kphi_error *err)
{
    const char *s = kphi__yaml_scalar(node);
    if (s == NULL)
        return kphi__yaml_expect(y, node, YAML_SCALAR_NODE, what, err);
    char *end = NULL;
    errno = 0;
    double v = strtod(s, &end);
    while (end != NULL && (*end == ' ' || *end == '\t'))
        end++;
    if (end == s || end == NULL || *end != '\0')
        return kphi__yaml_error(y, node, KPHI_EINPUT, err, "expected a number for %s, found '%s'",
                                what, s);
    if (!isfinite(v) || errno == ERANGE)
        return kphi__yaml_error(y, node, KPHI_EINPUT, err,
                                "%s must be a finite number, found '%s'", what, s);
    *out = v;
    return KPHI_OK;
}
