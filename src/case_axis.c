/* kphi case, the sweep axes: a temperature or pressure axis from a YAML node (a
 * {from, to, step} range, a list, or a single value) or from text as on the command line
 * ("350:550:10C", "350C:550C:10C", "100bar,200bar", "100,150,200 bar", "450 C"). The
 * loader and the overrides that call these are in src/case.c.
 *
 * Range grid: x_k = from + k*step for k = 0, 1, ..., K with K the largest integer such that
 * x_K <= to + tol, tol = min(1e-9*max(|from|, |to|), 1e-6*step); each point is computed
 * from k, never by adding steps, and a last point within that tolerance of `to` is set to
 * `to` exactly. At most 1e6 points per axis (the grid as a whole may be larger).
 *
 * Units inside: K and Pa (see units.c for the spellings the user may write); a step is a
 * difference, so "10 C" is 10 K. Errors point into the case file, or at "<command line>"
 * line 1 and the column (1-based, in characters) of the offending item. */
#include "case_internal.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "internal.h"
#include "kphi/units.h"

#define SWEEP_MAX_POINTS 1000000.0 /* 1e6 per axis: the axis is stored, and memory must stay flat */
#define RANGE_REL_TOL 1e-9
#define RANGE_STEP_TOL 1e-6 /* the slack never adds a point: at most this fraction of a step */

void kphi__case_axis_clear(kphi__case_axis *a)
{
    free(a->v);
    free(a->marks);
    memset(a, 0, sizeof *a);
}

int kphi__case_parse_value(kphi__case_quantity q, int step, const char *text, const char *path,
                           kphi_mark at, double *out, kphi_error *err)
{
    kphi_units_origin o = {path, at};
    if (q == KPHI__CASE_TEMPERATURE)
        return step ? kphi_units_temperature_step(text, out, &o, err)
                    : kphi_units_temperature(text, out, &o, err);
    return step ? kphi_units_pressure_step(text, out, &o, err)
                : kphi_units_pressure(text, out, &o, err);
}

static const char *axis_name(kphi__case_quantity q)
{
    return q == KPHI__CASE_TEMPERATURE ? "sweep T" : "sweep P";
}

/* Fill a with the grid from, from+step, ... up to and including `to` (see the top). */
static int make_range(kphi__case_axis *a, kphi__case_quantity q, double from, double to,
                      double step, const char *texts[3], const char *unit, const char *path,
                      const kphi_mark marks[3], kphi_error *err)
{
    if (from > to)
        return kphi_error_set(err, KPHI_EINPUT, path, marks[0],
                              "%s range is empty: from '%s' is above to '%s'", axis_name(q),
                              texts[0], texts[1]);
    double tol = fmin(RANGE_REL_TOL * fmax(fabs(from), fabs(to)), RANGE_STEP_TOL * step);
    double last = floor((to - from + tol) / step);
    if (!(last + 1.0 <= SWEEP_MAX_POINTS))
        return kphi_error_set(err, KPHI_EINPUT, path, marks[2],
                              "%s from '%s' to '%s' in steps of '%s' has %.0f points; at most "
                              "%.0f are allowed",
                              axis_name(q), texts[0], texts[1], texts[2], last + 1.0,
                              SWEEP_MAX_POINTS);
    size_t n = (size_t)last + 1;
    double *v = malloc(n * sizeof *v);
    kphi_mark *m = malloc(2 * sizeof *m);
    if (v == NULL || m == NULL) {
        free(v);
        free(m);
        return kphi__case_nomem(err, path);
    }
    for (size_t k = 0; k < n; k++)
        v[k] = from + (double)k * step;
    if (fabs(v[n - 1] - to) <= tol)
        v[n - 1] = to;
    m[0] = marks[0];
    m[1] = marks[1];
    kphi__case_axis_clear(a);
    a->given = 1;
    a->is_range = 1;
    a->n = n;
    a->v = v;
    a->marks = m;
    kphi__strlcpy(a->path, path, sizeof a->path);
    kphi__strlcpy(a->unit, unit, sizeof a->unit);
    return KPHI_OK;
}

static int make_list(kphi__case_axis *a, double *v, kphi_mark *m, size_t n, const char *unit,
                     const char *path)
{
    kphi__case_axis_clear(a);
    a->given = 1;
    a->n = n;
    a->v = v;
    a->marks = m;
    kphi__strlcpy(a->path, path, sizeof a->path);
    kphi__strlcpy(a->unit, unit, sizeof a->unit);
    return KPHI_OK;
}

/* The unit an axis is shown in: that of its first value, or `fallback` (the unit written
 * at the end of a command-line axis) when the first value has none. */
static void axis_unit(const char *first, const char *fallback, char unit[16])
{
    kphi_units_name(first, unit, 16);
    if (unit[0] == '\0') {
        char buf[KPHI__CASE_PART_MAX];
        snprintf(buf, sizeof buf, "1 %s", fallback);
        kphi_units_name(buf, unit, 16);
    }
}

/* A part [b, e) of an axis text, trimmed. */
typedef struct {
    size_t b, e;
} span;

static int ends_in_number(const char *text, span s)
{
    char ch = text[s.e - 1];
    return (ch >= '0' && ch <= '9') || ch == '.';
}

/* Parse part s of text; when it is a bare number and `unit` is not empty, as if the unit
 * were written after it. */
static int parse_part(kphi__case_quantity q, int step, const char *text, span s,
                      const char *unit, const char *path, kphi_mark at, double *out,
                      char shown[KPHI__CASE_PART_MAX], kphi_error *err)
{
    char buf[KPHI__CASE_PART_MAX];
    size_t len = s.e - s.b;
    if (len + strlen(unit) + 2 > sizeof buf)
        return kphi_error_set(err, KPHI_EINPUT, path, kphi__case_shift(at, text, s.b),
                              "%s value is too long", axis_name(q));
    memcpy(buf, text + s.b, len);
    buf[len] = '\0';
    if (unit[0] != '\0' && ends_in_number(text, s)) {
        buf[len] = ' ';
        memcpy(buf + len + 1, unit, strlen(unit) + 1);
    }
    /* messages show the value with the unit it takes ("from '400 C' is above to '300 C'"
     * for 400:300:10C) */
    kphi__strlcpy(shown, buf, KPHI__CASE_PART_MAX);
    return kphi__case_parse_value(q, step, buf, path, kphi__case_shift(at, text, s.b), out, err);
}

/* Axis from text as on the command line: "350:550:10C", "350C:550C:10C",
 * "100bar,200bar", "100,150,200 bar" or "450 C". A part without a unit takes the unit of
 * the last part. */
int kphi__case_axis_parse_text(kphi__case_axis *a, kphi__case_quantity q, const char *text,
                               const char *path, kphi_mark at, kphi_error *err)
{
    enum { MAX_PARTS = 4096 };
    size_t len = strlen(text);
    int ranged = strchr(text, ':') != NULL;
    char sep = ranged ? ':' : ',';
    size_t n_parts = 1;
    for (size_t i = 0; i < len; i++)
        n_parts += text[i] == sep;
    if (n_parts > MAX_PARTS)
        return kphi_error_set(err, KPHI_EINPUT, path, at,
                              "%s list has %zu values; give at most %d, or a from:to:step range",
                              axis_name(q), n_parts, MAX_PARTS);
    if (ranged && n_parts != 3)
        return kphi_error_set(err, KPHI_EINPUT, path, at,
                              "expected from:to:step for the %s, e.g. '%s'; found %zu parts in "
                              "'%s'",
                              axis_name(q),
                              q == KPHI__CASE_TEMPERATURE ? "350:550:10C" : "50:300:25bar",
                              n_parts, text);
    span *parts = malloc(n_parts * sizeof *parts);
    double *v = malloc(n_parts * sizeof *v);
    kphi_mark *m = malloc(n_parts * sizeof *m);
    if (parts == NULL || v == NULL || m == NULL) {
        free(parts);
        free(v);
        free(m);
        return kphi__case_nomem(err, path);
    }
    size_t k = 0, b = 0;
    for (size_t i = 0; i <= len; i++) {
        if (i < len && text[i] != sep)
            continue;
        span s = {b, i};
        while (s.b < s.e && kphi__case_is_blank(text[s.b]))
            s.b++;
        while (s.e > s.b && kphi__case_is_blank(text[s.e - 1]))
            s.e--;
        parts[k++] = s;
        b = i + 1;
    }
    int rc = KPHI_OK;
    for (k = 0; k < n_parts && rc == KPHI_OK; k++)
        if (parts[k].b == parts[k].e)
            rc = n_parts == 1
                     ? kphi_error_set(err, KPHI_EINPUT, path, at, "empty %s value; write e.g. %s",
                                      axis_name(q),
                                      q == KPHI__CASE_TEMPERATURE ? "'350:550:10C'"
                                                                  : "'100bar,200bar'")
                     : kphi_error_set(err, KPHI_EINPUT, path,
                                      kphi__case_shift(at, text, parts[k].b),
                                      "empty item in the %s '%s'", axis_name(q), text);

    /* The unit of the last part, for the parts written without one. */
    char unit[KPHI__CASE_PART_MAX] = "";
    span last = parts[n_parts - 1];
    if (rc == KPHI_OK && !ends_in_number(text, last)) {
        size_t ub = last.e;
        while (ub > last.b && !kphi__case_is_blank(text[ub - 1]) &&
               !ends_in_number(text, (span){last.b, ub}))
            ub--;
        if (last.e - ub < sizeof unit) {
            memcpy(unit, text + ub, last.e - ub);
            unit[last.e - ub] = '\0';
        }
    }
    char shown[3][KPHI__CASE_PART_MAX];
    /* The last part first, so that an error in its unit is reported where it is. */
    if (rc == KPHI_OK)
        rc = parse_part(q, ranged, text, last, "", path, at, &v[n_parts - 1],
                        shown[ranged ? 2 : 0], err);
    for (k = 0; k + 1 < n_parts && rc == KPHI_OK; k++)
        rc = parse_part(q, 0, text, parts[k], unit, path, at, &v[k], shown[ranged ? k : 0],
                        err);
    for (k = 0; k < n_parts; k++)
        m[k] = kphi__case_shift(at, text, parts[k].b);
    char shown_unit[16] = "";
    if (rc == KPHI_OK)
        axis_unit(shown[0], unit, shown_unit);
    if (rc == KPHI_OK && ranged) {
        const char *texts[3] = {shown[0], shown[1], shown[2]};
        rc = make_range(a, q, v[0], v[1], v[2], texts, shown_unit, path, m, err);
        free(v);
        free(m);
    } else if (rc == KPHI_OK) {
        rc = make_list(a, v, m, n_parts, shown_unit, path);
    } else {
        free(v);
        free(m);
    }
    free(parts);
    return rc;
}

/* Axis from the YAML node of sweep.T or sweep.P. */
int kphi__case_axis_parse_node(kphi__case_axis *a, kphi__case_quantity q, kphi__yaml *y,
                               yaml_node_t *node, const char *path, kphi_error *err)
{
    const char *name = axis_name(q);
    const char *s = kphi__yaml_scalar(node);
    if (s != NULL)
        return kphi__case_axis_parse_text(a, q, s, path, kphi__case_text_mark(node), err);

    if (node->type == YAML_SEQUENCE_NODE) {
        size_t n = (size_t)(node->data.sequence.items.top - node->data.sequence.items.start);
        if (n == 0)
            return kphi__yaml_error(y, node, KPHI_EINPUT, err,
                                    "%s list is empty; give at least one value", name);
        double *v = malloc(n * sizeof *v);
        kphi_mark *m = malloc(n * sizeof *m);
        if (v == NULL || m == NULL) {
            free(v);
            free(m);
            return kphi__case_nomem(err, path);
        }
        int rc = KPHI_OK;
        char unit[16] = "";
        for (size_t k = 0; k < n && rc == KPHI_OK; k++) {
            yaml_node_t *item = kphi__yaml_node(y, node->data.sequence.items.start[k]);
            const char *t = kphi__yaml_scalar(item);
            char what[48];
            snprintf(what, sizeof what, "a value of the %s list", name);
            if (t == NULL)
                rc = kphi__yaml_expect(y, item, YAML_SCALAR_NODE, what, err);
            else {
                m[k] = kphi__case_text_mark(item);
                rc = kphi__case_parse_value(q, 0, t, path, m[k], &v[k], err);
                if (k == 0)
                    axis_unit(t, "", unit);
            }
        }
        if (rc != KPHI_OK) {
            free(v);
            free(m);
            return rc;
        }
        return make_list(a, v, m, n, unit, path);
    }

    static const char *const keys[] = {"from", "to", "step"};
    char what[48];
    snprintf(what, sizeof what, "the %s range", name);
    int rc = kphi__yaml_check_keys(y, node, keys, 3, what, err);
    if (rc != KPHI_OK)
        return rc;
    double val[3];
    const char *texts[3];
    kphi_mark marks[3];
    for (int k = 0; k < 3; k++) {
        yaml_node_t *item = kphi__yaml_map_get(y, node, keys[k], NULL);
        if (item == NULL)
            return kphi__yaml_error(
                y, node, KPHI_EINPUT, err, "missing '%s' in the %s range; write e.g. %s",
                keys[k], name,
                q == KPHI__CASE_TEMPERATURE ? "{from: 380 C, to: 520 C, step: 10 C}"
                                 : "{from: 100 bar, to: 300 bar, step: 25 bar}");
        texts[k] = kphi__yaml_scalar(item);
        if (texts[k] == NULL) {
            char w[48];
            snprintf(w, sizeof w, "'%s' of the %s range", keys[k], name);
            return kphi__yaml_expect(y, item, YAML_SCALAR_NODE, w, err);
        }
        marks[k] = kphi__case_text_mark(item);
        rc = kphi__case_parse_value(q, k == 2, texts[k], path, marks[k], &val[k], err);
        if (rc != KPHI_OK)
            return rc;
    }
    char unit[16];
    axis_unit(texts[0], "", unit);
    return make_range(a, q, val[0], val[1], val[2], texts, unit, path, marks, err);
}
