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

/* Inputs are read whole; 16 MiB is far beyond any real species, set or case file. YAML
 * collections nested deeper than MAX_DEPTH are refused before libyaml builds the document:
 * kphi's deepest schema path is 5 levels, and libyaml's scanner spends time proportional
 * to the nesting depth on every token (an unclosed "[[[[..." of 100 000 levels took
 * half a minute). */
enum { MAX_INPUT_BYTES = 16 * 1024 * 1024, MAX_DEPTH = 64 };

/* Byte offset of a reader error (bytes that are not UTF-8, control characters). libyaml
 * points an invalid trailing byte at itself; point at the byte that started the sequence,
 * which is the one the user typed (an 'é' saved as Latin-1 is one byte 0xE9). */
static size_t reader_offset(const yaml_parser_t *p, const unsigned char *text, size_t len)
{
    size_t off = p->problem_offset;
    if (p->problem != NULL && strcmp(p->problem, "invalid trailing UTF-8 octet") == 0)
        for (size_t k = 1; k <= 3 && k <= off; k++)
            if (off - k < len && (text[off - k] & 0xC0) == 0xC0) {
                off -= k;
                break;
            }
    return off;
}

/* Position of libyaml's problem, 1-based. Scanner and parser errors carry a mark; reader
 * errors carry only a byte offset, which is turned into a line and a column in
 * characters here. */
static kphi_mark problem_mark(const yaml_parser_t *p, const unsigned char *text, size_t len)
{
    kphi_mark at = {(long)p->problem_mark.line + 1, (long)p->problem_mark.column + 1};
    if (p->error != YAML_READER_ERROR)
        return at;
    at.line = 1;
    at.column = 1;
    size_t off = reader_offset(p, text, len);
    for (size_t i = 0; i < off && i < len; i++) {
        if (text[i] == '\n' || (text[i] == '\r' && (i + 1 >= len || text[i + 1] != '\n'))) {
            at.line++;
            at.column = 1;
        } else if ((text[i] & 0xC0) != 0x80 && text[i] != '\r') {
            at.column++;
        }
    }
    return at;
}

/* Record libyaml's error: its problem text, its context, and a hint for the common cases. */
static int parse_error(const kphi__yaml *y, const yaml_parser_t *p, const unsigned char *text,
                       size_t len, kphi_error *err)
{
    kphi_mark at = problem_mark(p, text, len);
    const char *problem = p->problem != NULL ? p->problem : "unreadable YAML";
    if (p->error == YAML_MEMORY_ERROR)
        return kphi_error_set(err, KPHI_ENOMEM, y->path, at, "out of memory reading YAML");
    if (p->error == YAML_READER_ERROR) {
        size_t off = reader_offset(p, text, len);
        if (strstr(problem, "UTF-8") != NULL && off < len)
            return kphi_error_set(err, KPHI_EINPUT, y->path, at,
                                  "the file is not UTF-8 text: byte 0x%02X here (%s); save "
                                  "it as UTF-8",
                                  (unsigned)text[off], problem);
        return kphi_error_set(err, KPHI_EINPUT, y->path, at, "invalid YAML: %s (U+%04X)",
                              problem, (unsigned)p->problem_value);
    }
    size_t index = p->problem_mark.index;
    if (p->error == YAML_SCANNER_ERROR && index < len && text[index] == '\t')
        return kphi_error_set(err, KPHI_EINPUT, y->path, at,
                              "invalid YAML: a tab character where YAML expects spaces; indent "
                              "with spaces, not tabs");
    if (p->context != NULL)
        return kphi_error_set(err, KPHI_EINPUT, y->path, at, "invalid YAML: %s %s", problem,
                              p->context);
    return kphi_error_set(err, KPHI_EINPUT, y->path, at, "invalid YAML: %s", problem);
}

static kphi_mark event_mark(const yaml_event_t *ev)
{
    kphi_mark m = {(long)ev->start_mark.line + 1, (long)ev->start_mark.column + 1};
    return m;
}

/* A first pass over the events, before the document is built: syntax errors, more than one
 * document, nesting deeper than MAX_DEPTH, and NUL characters inside a value (written as
 * "\0" in a double-quoted scalar; C strings would silently end there). */
static int scan_events(const kphi__yaml *y, const unsigned char *text, size_t len,
                       kphi_error *err)
{
    kphi_mark none = {0, 0};
    yaml_parser_t p;
    if (!yaml_parser_initialize(&p))
        return kphi_error_set(err, KPHI_ENOMEM, y->path, none, "out of memory");
    yaml_parser_set_input_string(&p, text, len);
    int rc = KPHI_OK, depth = 0, docs = 0, done = 0;
    while (rc == KPHI_OK && !done) {
        yaml_event_t ev;
        if (!yaml_parser_parse(&p, &ev)) {
            rc = parse_error(y, &p, text, len, err);
            break;
        }
        switch (ev.type) {
        case YAML_DOCUMENT_START_EVENT:
            if (++docs > 1)
                rc = kphi_error_set(err, KPHI_EINPUT, y->path, event_mark(&ev),
                                    "a second YAML document starts here; a kphi input file "
                                    "holds one document (remove the '---' line or split the "
                                    "file)");
            break;
        case YAML_SEQUENCE_START_EVENT:
        case YAML_MAPPING_START_EVENT:
            if (++depth > MAX_DEPTH)
                rc = kphi_error_set(err, KPHI_EINPUT, y->path, event_mark(&ev),
                                    "lists and mappings nested more than %d levels deep",
                                    MAX_DEPTH);
            break;
        case YAML_SEQUENCE_END_EVENT:
        case YAML_MAPPING_END_EVENT:
            depth--;
            break;
        case YAML_SCALAR_EVENT:
            if (memchr(ev.data.scalar.value, '\0', ev.data.scalar.length) != NULL)
                rc = kphi_error_set(err, KPHI_EINPUT, y->path, event_mark(&ev),
                                    "a NUL character ('\\0') inside a value is not allowed");
            break;
        case YAML_STREAM_END_EVENT:
            done = 1;
            break;
        default:
            break;
        }
        yaml_event_delete(&ev);
    }
    yaml_parser_delete(&p);
    return rc;
}

/* Check, then build the document of text[len]. */
static int load_text(kphi__yaml *y, const unsigned char *text, size_t len, kphi_error *err)
{
    kphi_mark none = {0, 0};
    int rc = scan_events(y, text, len, err);
    if (rc != KPHI_OK)
        return rc;
    yaml_parser_t parser;
    if (!yaml_parser_initialize(&parser))
        return kphi_error_set(err, KPHI_ENOMEM, y->path, none, "out of memory");
    yaml_parser_set_input_string(&parser, text, len);
    if (!yaml_parser_load(&parser, &y->doc)) {
        rc = parse_error(y, &parser, text, len, err);
        yaml_parser_delete(&parser);
        return rc;
    }
    yaml_parser_delete(&parser);
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
    /* Read it whole (it may have grown since stat), so that error positions can look at
     * the text. */
    size_t cap = (size_t)st.st_size + 1, len = 0;
    unsigned char *text = malloc(cap);
    int rc = KPHI_OK;
    while (text != NULL && rc == KPHI_OK) {
        len += fread(text + len, 1, cap - len, f);
        if (ferror(f))
            rc = kphi_error_set(err, KPHI_EIO, path, none, "cannot read: %s", strerror(errno));
        else if (len < cap)
            break;
        else if (cap > MAX_INPUT_BYTES)
            rc = kphi_error_set(err, KPHI_EINPUT, path, none,
                                "file is over %d bytes; input files are limited to %d bytes",
                                MAX_INPUT_BYTES, MAX_INPUT_BYTES);
        else {
            unsigned char *more = realloc(text, 2 * cap);
            if (more == NULL) {
                free(text);
                text = NULL;
            } else {
                text = more;
                cap *= 2;
            }
        }
    }
    fclose(f);
    if (text == NULL)
        return kphi_error_set(err, KPHI_ENOMEM, path, none, "out of memory");
    if (rc == KPHI_OK)
        rc = load_text(y, text, len, err);
    free(text);
    return rc;
}

int kphi__yaml_load_string(kphi__yaml *y, const char *text, size_t len, const char *name,
                           kphi_error *err)
{
    memset(y, 0, sizeof *y);
    kphi__strlcpy(y->path, name != NULL ? name : "<string>", sizeof y->path);
    return load_text(y, (const unsigned char *)text, len, err);
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

/* Keys that only one kind of file has, per kind; and the kinds' names. */
static const char *const KIND_KEYS[3][6] = {
    {"feed", "T", "P", "eos", "quantum", "sweep"},
    {"species_file", "conversion", "species", NULL, NULL, NULL},
    {"sources", NULL, NULL, NULL, NULL, NULL},
};
static const char *const KIND_NAMES[3] = {"a case file", "a reaction set", "a species database"};

/* First key of root that belongs to `kind` only, or NULL. */
static yaml_node_t *kind_key(kphi__yaml *y, yaml_node_t *root, int kind)
{
    for (yaml_node_pair_t *p = root->data.mapping.pairs.start; p < root->data.mapping.pairs.top;
         p++) {
        yaml_node_t *k = kphi__yaml_node(y, p->key);
        const char *s = kphi__yaml_scalar(k);
        for (size_t i = 0; s != NULL && i < 6 && KIND_KEYS[kind][i] != NULL; i++)
            if (strcmp(s, KIND_KEYS[kind][i]) == 0)
                return k;
    }
    return NULL;
}

int kphi__yaml_check_kind(kphi__yaml *y, yaml_node_t *root, kphi__yaml_kind want,
                          const char *hint, kphi_error *err)
{
    if (root == NULL || root->type != YAML_MAPPING_NODE)
        return KPHI_OK;
    /* 'species' is shared by sets and databases, so 'sources' decides first. */
    static const int order[3] = {KPHI__KIND_SPECIES_DB, KPHI__KIND_CASE, KPHI__KIND_RXNSET};
    for (int i = 0; i < 3; i++) {
        if (i == 1 && kind_key(y, root, (int)want) != NULL)
            return KPHI_OK;
        yaml_node_t *k = order[i] != (int)want ? kind_key(y, root, order[i]) : NULL;
        if (k != NULL)
            return kphi__yaml_error(y, k, KPHI_EINPUT, err, "'%s' makes this %s, not %s%s",
                                    kphi__yaml_scalar(k), KIND_NAMES[order[i]],
                                    KIND_NAMES[want], hint != NULL ? hint : "");
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
    if (!isfinite(v) || (errno == ERANGE && fabs(v) > 1.0)) /* underflow to ~0 is fine */
        return kphi__yaml_error(y, node, KPHI_EINPUT, err,
                                "%s must be a finite number, found '%s'", what, s);
    *out = v;
    return KPHI_OK;
}
