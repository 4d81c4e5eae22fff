/* kphi case, the `loop` block: make-up, where it joins, converter, separator and purge of
 * a synthesis loop (kphi loop). Schema (our own; DESIGN.md):
 *
 *   loop:
 *     makeup: {composition: {H2: 74.0, N2: 24.7, CH4: 1.0, Ar: 0.3}, rate: 1200 kmol/h}
 *                                 # or production: 1500 t/d (liquid product), or neither
 *                                 # (per 100 mol of make-up)
 *     makeup_at: converter        # or separator
 *     converter: {T_out: 460 C, approach: 10 K}
 *                                 # or {T_in: 380 C, intercool: [400 C, 410 C], approach: 10 K}
 *     separator: {T: -5 C, P: 195 bar}   # P defaults to the loop pressure (the case's P)
 *     purge: {fraction: 2 %}      # or {inerts: 12 %} at the converter inlet
 *
 * Values are kept in SI with the mark of the text they came from, so later checks
 * (kphi_case_validate_loop()) point at the right line. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "case_internal.h"
#include "internal.h"
#include "kphi/case.h"
#include "kphi/thermo.h"
#include "kphi/units.h"

struct kphi__case_loop {
    kphi_case_loop pub;
    double *makeup;           /* [n] */
    char path[KPHI__CASE_PATH_MAX];
    kphi_mark at_block, at_makeup, at_flow, at_T, at_approach, at_sep_T, at_sep_P, at_purge;
    kphi_mark at_bed[KPHI_CASE_LOOP_MAX_BEDS];
    const char *purge_path;   /* path of the purge value ("<command line>" after --purge) */
    const char *T_path;
};

static const char CMDLINE[] = "<command line>";

void kphi__case_loop_free(kphi__case_loop *l)
{
    if (l == NULL)
        return;
    free(l->makeup);
    free(l);
}

const kphi_case_loop *kphi__case_loop_public(const kphi__case_loop *l)
{
    return l != NULL ? &l->pub : NULL;
}

static int check(kphi__yaml *y, yaml_node_t *map, const char *const keys[], size_t n,
                 const char *what, kphi_error *err)
{
    int rc = kphi__yaml_expect(y, map, YAML_MAPPING_NODE, what, err);
    if (rc == KPHI_OK)
        rc = kphi__yaml_check_keys(y, map, keys, n, what, err);
    return rc;
}

/* A scalar parsed by one of the units functions. */
typedef int (*unit_fn)(const char *, double *, const kphi_units_origin *, kphi_error *);

static int scalar_unit(kphi__yaml *y, yaml_node_t *node, const char *path, const char *what,
                       unit_fn fn, double *out, kphi_mark *at, kphi_error *err)
{
    const char *s = kphi__yaml_scalar(node);
    if (s == NULL)
        return kphi__yaml_expect(y, node, YAML_SCALAR_NODE, what, err);
    kphi_units_origin o = {path, kphi__case_text_mark(node)};
    if (at != NULL)
        *at = o.at;
    return fn(s, out, &o, err);
}

static int temp_step(const char *s, double *v, const kphi_units_origin *o, kphi_error *err)
{
    /* an approach of 0 K is allowed: parse as a step unless the number is zero */
    char *end = NULL;
    double x = strtod(s, &end);
    if (end != s && x < 0.0)
        return kphi_error_set(err, KPHI_EINPUT, o->path, o->at,
                              "the approach '%s' is negative; it must be zero or positive (the "
                              "equilibrium is taken that much above the outlet temperature)",
                              s);
    if (end != s && x == 0.0) {
        /* the unit of "0 K" checked on "1 K"; an error is reported on the text as written */
        const char *u = end;
        while (*u == ' ' || *u == '\t')
            u++;
        if (*u == '\0')
            return kphi_error_set(err, KPHI_EINPUT, o->path, o->at,
                                  "'%s' has no unit; write e.g. '0 K' or '10 K'", s);
        double one, T;
        char buf[80];
        snprintf(buf, sizeof buf, "1%s", end);
        if (kphi_units_temperature_step(buf, &one, o, NULL) != KPHI_OK)
            return kphi_units_temperature(s, &T, o, err);
        *v = 0.0;
        return KPHI_OK;
    }
    return kphi_units_temperature_step(s, v, o, err);
}

static int load_makeup(kphi__case_loop *l, const kphi_rxnset *set, kphi__yaml *y,
                       yaml_node_t *node, kphi_error *err)
{
    static const char *const keys[] = {"composition", "rate", "production"};
    int rc = check(y, node, keys, 3, "'makeup' of the loop", err);
    if (rc != KPHI_OK)
        return rc;
    l->at_makeup = kphi__yaml_mark(node);
    yaml_node_t *comp = kphi__yaml_map_get(y, node, "composition", NULL);
    if (comp == NULL)
        return kphi__yaml_error(y, node, KPHI_EINPUT, err,
                                "the loop's 'makeup' needs a 'composition' (species: amount)");
    rc = kphi__yaml_expect(y, comp, YAML_MAPPING_NODE, "'composition' (species: amount)", err);
    if (rc != KPHI_OK)
        return rc;
    double sum = 0.0;
    for (yaml_node_pair_t *p = comp->data.mapping.pairs.start; p < comp->data.mapping.pairs.top;
         p++) {
        yaml_node_t *k = kphi__yaml_node(y, p->key), *v = kphi__yaml_node(y, p->value);
        const char *name = kphi__yaml_scalar(k);
        if (name == NULL)
            return kphi__yaml_error(y, k, KPHI_EINPUT, err,
                                    "a key in the make-up composition must be a species name");
        long i = kphi_rxnset_species_index(set, name);
        if (i < 0) {
            const char *near = kphi_rxnset_suggest(set, name);
            if (near != NULL)
                return kphi__yaml_error(y, k, KPHI_EINPUT, err,
                                        "unknown species '%s' in the make-up (did you mean "
                                        "'%s'?)",
                                        name, near);
            char list[160] = "";
            for (size_t j = 0; j < kphi_rxnset_n_species(set); j++) {
                size_t len = strlen(list);
                snprintf(list + len, sizeof list - len, "%s%s", j > 0 ? ", " : "",
                         kphi_rxnset_species(set, j)->name);
            }
            return kphi__yaml_error(y, k, KPHI_EINPUT, err,
                                    "unknown species '%s' in the make-up; the reaction set has %s",
                                    name, list);
        }
        double x;
        char what[64];
        snprintf(what, sizeof what, "the make-up amount of '%s'", name);
        rc = kphi__yaml_double(y, v, what, &x, err);
        if (rc != KPHI_OK)
            return rc;
        if (x < 0.0)
            return kphi__yaml_error(y, v, KPHI_EINPUT, err,
                                    "the make-up amount of '%s' must be zero or positive, found "
                                    "'%s'",
                                    name, kphi__yaml_scalar(v));
        l->makeup[i] = x;
        sum += x;
    }
    if (!(sum > 0.0))
        return kphi__yaml_error(y, comp, KPHI_EINPUT, err,
                                "the make-up composition is empty (every amount is zero)");
    yaml_node_t *rate = kphi__yaml_map_get(y, node, "rate", NULL);
    yaml_node_t *prod = kphi__yaml_map_get(y, node, "production", NULL);
    if (rate != NULL && prod != NULL)
        return kphi__yaml_error(y, prod, KPHI_EINPUT, err,
                                "give the make-up 'rate' or the 'production', not both");
    if (rate != NULL) {
        l->pub.flow = KPHI_CASE_MAKEUP_RATE;
        return scalar_unit(y, rate, l->path, "'rate' (e.g. 1200 kmol/h)", kphi_units_molar_flow,
                           &l->pub.rate, &l->at_flow, err);
    }
    if (prod != NULL) {
        l->pub.flow = KPHI_CASE_MAKEUP_PRODUCTION;
        return scalar_unit(y, prod, l->path, "'production' (e.g. 1500 t/d)",
                           kphi_units_mass_flow, &l->pub.production, &l->at_flow, err);
    }
    return KPHI_OK;
}

static int load_converter(kphi__case_loop *l, kphi__yaml *y, yaml_node_t *node, kphi_error *err)
{
    static const char *const keys[] = {"T_out", "T_in", "intercool", "approach"};
    int rc = check(y, node, keys, 4, "'converter' of the loop", err);
    if (rc != KPHI_OK)
        return rc;
    yaml_node_t *to = kphi__yaml_map_get(y, node, "T_out", NULL);
    yaml_node_t *ti = kphi__yaml_map_get(y, node, "T_in", NULL);
    yaml_node_t *ic = kphi__yaml_map_get(y, node, "intercool", NULL);
    yaml_node_t *ap = kphi__yaml_map_get(y, node, "approach", NULL);
    if ((to == NULL) == (ti == NULL))
        return kphi__yaml_error(y, to != NULL ? ti : node, KPHI_EINPUT, err,
                                to != NULL ? "give the converter 'T_out' (isothermal) or 'T_in' "
                                             "(adiabatic beds), not both"
                                           : "the loop's 'converter' needs 'T_out' (isothermal, "
                                             "e.g. 460 C) or 'T_in' (adiabatic beds, e.g. 380 C)");
    if (ic != NULL && to != NULL)
        return kphi__yaml_error(y, ic, KPHI_EINPUT, err,
                                "'intercool' needs adiabatic beds: give 'T_in' instead of "
                                "'T_out'");
    if (to != NULL) {
        rc = scalar_unit(y, to, l->path, "'T_out' (e.g. 460 C)", kphi_units_temperature,
                         &l->pub.T_out, &l->at_T, err);
    } else {
        l->pub.adiabatic = 1;
        l->pub.n_beds = 1;
        rc = scalar_unit(y, ti, l->path, "'T_in' (e.g. 380 C)", kphi_units_temperature,
                         &l->pub.T_in[0], &l->at_bed[0], err);
        l->at_T = l->at_bed[0];
        if (rc == KPHI_OK && ic != NULL) {
            rc = kphi__yaml_expect(y, ic, YAML_SEQUENCE_NODE,
                                   "'intercool' (a list of bed inlet temperatures)", err);
            for (yaml_node_item_t *it = rc == KPHI_OK ? ic->data.sequence.items.start : NULL;
                 rc == KPHI_OK && it < ic->data.sequence.items.top; it++) {
                yaml_node_t *v = kphi__yaml_node(y, *it);
                if (l->pub.n_beds == KPHI_CASE_LOOP_MAX_BEDS)
                    return kphi__yaml_error(y, v, KPHI_EINPUT, err,
                                            "too many beds: at most %d inlet temperatures after "
                                            "the first bed",
                                            KPHI_CASE_LOOP_MAX_BEDS - 1);
                size_t b = l->pub.n_beds++;
                rc = scalar_unit(y, v, l->path, "a bed inlet temperature (e.g. 400 C)",
                                 kphi_units_temperature, &l->pub.T_in[b], &l->at_bed[b], err);
            }
        }
    }
    if (rc == KPHI_OK && ap != NULL)
        rc = scalar_unit(y, ap, l->path, "'approach' (e.g. 10 K)", temp_step, &l->pub.approach,
                         &l->at_approach, err);
    return rc;
}

static int load_separator(kphi__case_loop *l, kphi__yaml *y, yaml_node_t *node, kphi_error *err)
{
    static const char *const keys[] = {"T", "P"};
    int rc = check(y, node, keys, 2, "'separator' of the loop", err);
    if (rc != KPHI_OK)
        return rc;
    yaml_node_t *t = kphi__yaml_map_get(y, node, "T", NULL), *p = kphi__yaml_map_get(y, node, "P", NULL);
    if (t == NULL)
        return kphi__yaml_error(y, node, KPHI_EINPUT, err,
                                "the loop's 'separator' needs its temperature 'T' (e.g. -5 C)");
    rc = scalar_unit(y, t, l->path, "'T' of the separator (e.g. -5 C)", kphi_units_temperature,
                     &l->pub.T_sep, &l->at_sep_T, err);
    if (rc == KPHI_OK && p != NULL)
        rc = scalar_unit(y, p, l->path, "'P' of the separator (e.g. 190 bar)",
                         kphi_units_pressure, &l->pub.P_sep, &l->at_sep_P, err);
    return rc;
}

static int load_purge(kphi__case_loop *l, kphi__yaml *y, yaml_node_t *node, kphi_error *err)
{
    static const char *const keys[] = {"fraction", "inerts"};
    int rc = check(y, node, keys, 2, "'purge' of the loop", err);
    if (rc != KPHI_OK)
        return rc;
    yaml_node_t *f = kphi__yaml_map_get(y, node, "fraction", NULL);
    yaml_node_t *in = kphi__yaml_map_get(y, node, "inerts", NULL);
    if ((f == NULL) == (in == NULL))
        return kphi__yaml_error(y, f != NULL ? in : node, KPHI_EINPUT, err,
                                f != NULL ? "give the purge 'fraction' or the 'inerts' level, "
                                            "not both"
                                          : "the loop's 'purge' needs 'fraction' (of the "
                                            "separator vapour, e.g. 2 %%) or 'inerts' (at the "
                                            "converter inlet, e.g. 12 %%)");
    l->purge_path = l->path;
    if (f != NULL)
        return scalar_unit(y, f, l->path, "the purge 'fraction' (e.g. 2 %)", kphi_units_percent,
                           &l->pub.purge_fraction, &l->at_purge, err);
    l->pub.purge_inerts = 1;
    return scalar_unit(y, in, l->path, "the purge 'inerts' level (e.g. 12 %)", kphi_units_percent,
                       &l->pub.inerts_target, &l->at_purge, err);
}

int kphi__case_loop_load(kphi__case_loop **out, const kphi_rxnset *set, const char *path,
                         kphi__yaml *y, yaml_node_t *node, kphi_error *err)
{
    static const char *const keys[] = {"makeup", "makeup_at", "converter", "separator", "purge"};
    int rc = check(y, node, keys, 5, "the 'loop' block", err);
    if (rc != KPHI_OK)
        return rc;
    size_t n = kphi_rxnset_n_species(set);
    kphi__case_loop *l = calloc(1, sizeof *l);
    if (l == NULL || (l->makeup = calloc(n > 0 ? n : 1, sizeof(double))) == NULL) {
        kphi__case_loop_free(l);
        return kphi__case_nomem(err, path);
    }
    snprintf(l->path, sizeof l->path, "%s", path);
    l->T_path = l->path;
    l->purge_path = l->path;
    l->pub.makeup = l->makeup;
    l->pub.P_sep = NAN;
    l->pub.T_out = NAN;
    l->at_block = kphi__yaml_mark(node);
    const char *need[] = {"makeup", "converter", "separator", "purge"};
    for (size_t k = 0; k < 4 && rc == KPHI_OK; k++)
        if (kphi__yaml_map_get(y, node, need[k], NULL) == NULL)
            rc = kphi__yaml_error(y, node, KPHI_EINPUT, err,
                                  "the 'loop' block needs '%s' (see "
                                  "cases/ammonia_loop.yaml)",
                                  need[k]);
    if (rc == KPHI_OK)
        rc = load_makeup(l, set, y, kphi__yaml_map_get(y, node, "makeup", NULL), err);
    yaml_node_t *at = kphi__yaml_map_get(y, node, "makeup_at", NULL);
    if (rc == KPHI_OK && at != NULL)
        rc = kphi__yaml_expect(y, at, YAML_SCALAR_NODE, "'makeup_at' (converter or separator)",
                               err);
    if (rc == KPHI_OK && at != NULL) {
        const char *s = kphi__yaml_scalar(at);
        if (s != NULL && strcmp(s, "converter") == 0)
            l->pub.makeup_at_separator = 0;
        else if (s != NULL && strcmp(s, "separator") == 0)
            l->pub.makeup_at_separator = 1;
        else {
            static const char *const where[] = {"converter", "separator"};
            const char *near = s != NULL ? kphi__closest(s, where, 2) : NULL;
            char hint[48] = "";
            if (near != NULL)
                snprintf(hint, sizeof hint, " (did you mean '%s'?)", near);
            rc = kphi__yaml_error(y, at, KPHI_EINPUT, err,
                                  "'makeup_at' is '%s'%s; expected 'converter' (the make-up "
                                  "joins the recycle before the converter) or 'separator' "
                                  "(before the separator)",
                                  s != NULL ? s : "not a word", hint);
        }
    }
    if (rc == KPHI_OK)
        rc = load_converter(l, y, kphi__yaml_map_get(y, node, "converter", NULL), err);
    if (rc == KPHI_OK)
        rc = load_separator(l, y, kphi__yaml_map_get(y, node, "separator", NULL), err);
    if (rc == KPHI_OK)
        rc = load_purge(l, y, kphi__yaml_map_get(y, node, "purge", NULL), err);
    if (rc != KPHI_OK) {
        kphi__case_loop_free(l);
        return rc;
    }
    *out = l;
    return KPHI_OK;
}

int kphi__case_loop_set_purge(kphi__case_loop *l, const char *text, kphi_error *err)
{
    kphi_units_origin o = {CMDLINE, {1, 1}};
    double f;
    const char *v = text;
    int inerts = 0;
    if (strncmp(text, "inerts=", 7) == 0) {
        inerts = 1;
        v = text + 7;
        o.at.column = 8;
    }
    if (!inerts && strncmp(text, "inerts", 6) == 0)
        return kphi_error_set(err, KPHI_EINPUT, CMDLINE, o.at,
                              "'%s' is not a purge; write a fraction of the separator vapour "
                              "('2%%') or an inert level at the converter inlet ('inerts=12%%')",
                              text);
    int rc = kphi_units_percent(v, &f, &o, err);
    if (rc != KPHI_OK)
        return rc;
    l->pub.purge_inerts = inerts;
    if (inerts)
        l->pub.inerts_target = f;
    else
        l->pub.purge_fraction = f;
    l->purge_path = CMDLINE;
    l->at_purge = o.at;
    return KPHI_OK;
}

int kphi__case_loop_set_T(kphi__case_loop *l, const char *text, kphi_error *err)
{
    kphi_units_origin o = {CMDLINE, {1, 1}};
    double T;
    int rc = kphi_units_temperature(text, &T, &o, err);
    if (rc != KPHI_OK)
        return rc;
    if (l->pub.adiabatic)
        l->pub.T_in[0] = T;
    else
        l->pub.T_out = T;
    l->T_path = CMDLINE;
    l->at_T = o.at;
    if (l->pub.adiabatic)
        l->at_bed[0] = o.at;
    return KPHI_OK;
}

/* Every species of the set has thermo data at T (the duties need enthalpies there). */
static int in_range(const kphi_rxnset *set, double T, const char *path, kphi_mark at,
                    kphi_error *err)
{
    for (size_t i = 0; i < kphi_rxnset_n_species(set); i++) {
        int rc = kphi_thermo_check_range(kphi_rxnset_species(set, i), T, path, at, err);
        if (rc != KPHI_OK)
            return rc;
    }
    return KPHI_OK;
}

int kphi__case_loop_validate(const kphi__case_loop *l, const kphi_rxnset *set, double P,
                             const char *P_path, kphi_error *err)
{
    const kphi_case_loop *g = &l->pub;
    int rc = in_range(set, g->T_sep, l->path, l->at_sep_T, err);
    if (rc == KPHI_OK && !g->adiabatic)
        rc = in_range(set, g->T_out + g->approach, l->T_path, l->at_T, err);
    for (size_t b = 0; rc == KPHI_OK && g->adiabatic && b < g->n_beds; b++)
        rc = in_range(set, g->T_in[b], b == 0 ? l->T_path : l->path, l->at_bed[b], err);
    if (rc != KPHI_OK)
        return rc;
    /* the make-up must hold every element of the product */
    long prod = kphi_rxnset_first_product(set);
    for (size_t e = 0; prod >= 0 && e < kphi_rxnset_n_elements(set); e++) {
        if (!(kphi_rxnset_atoms(set, e, (size_t)prod) > 0.0))
            continue;
        double have = 0.0;
        for (size_t i = 0; i < kphi_rxnset_n_species(set); i++)
            have += kphi_rxnset_atoms(set, e, i) * g->makeup[i];
        if (!(have > 0.0))
            return kphi_error_set(err, KPHI_EINPUT, l->path, l->at_makeup,
                                  "the make-up cannot make %s: none of its species holds %s",
                                  kphi_rxnset_species(set, (size_t)prod)->name,
                                  kphi_rxnset_element(set, e));
    }
    double conv_T = g->adiabatic ? g->T_in[0] : g->T_out;
    for (size_t b = 1; b < g->n_beds; b++)
        if (g->T_in[b] < conv_T)
            conv_T = g->T_in[b];
    if (!(g->T_sep < conv_T))
        return kphi_error_set(err, KPHI_EINPUT, l->path, l->at_sep_T,
                              "separator temperature %.2f C is not below the converter's %.2f "
                              "C%s: the separator cools the converter outlet",
                              g->T_sep - 273.15, conv_T - 273.15,
                              g->adiabatic ? " (its coldest bed inlet)" : "");
    if (isfinite(g->P_sep) && isfinite(P) && g->P_sep > P * (1.0 + 1e-12))
        return kphi_error_set(err, KPHI_EINPUT, l->path, l->at_sep_P,
                              "separator pressure %.4g bar is above the loop pressure %.4g bar "
                              "(%s); the separator is downstream of the converter",
                              g->P_sep / 1e5, P / 1e5,
                              P_path != NULL && strcmp(P_path, CMDLINE) == 0 ? "--P"
                                                                             : "the case's P");
    if (!(g->approach >= 0.0))
        return kphi_error_set(err, KPHI_EINPUT, l->path, l->at_approach,
                              "approach %.4g K must be zero or positive", g->approach);
    if (g->purge_inerts) {
        if (!(g->inerts_target > 0.0 && g->inerts_target < 1.0))
            return kphi_error_set(err, KPHI_EINPUT, l->purge_path, l->at_purge,
                                  "inert level %.4g %% at the converter inlet: expected above 0 "
                                  "%% and below 100 %%",
                                  100.0 * g->inerts_target);
    } else if (!(g->purge_fraction >= 0.0 && g->purge_fraction <= 1.0)) {
        return kphi_error_set(err, KPHI_EINPUT, l->purge_path, l->at_purge,
                              "purge fraction %.4g %% is outside 0 .. 100 %% of the separator "
                              "vapour",
                              100.0 * g->purge_fraction);
    } else if (g->purge_fraction == 0.0) {
        /* the inerts the make-up brings have no way out: no steady state */
        char list[160] = "";
        for (size_t i = 0; i < kphi_rxnset_n_species(set); i++)
            if (kphi_rxnset_is_inert(set, i) && g->makeup[i] > 0.0) {
                size_t len = strlen(list);
                snprintf(list + len, sizeof list - len, "%s%s", len > 0 ? ", " : "",
                         kphi_rxnset_species(set, i)->name);
            }
        if (list[0] != '\0')
            return kphi_error_set(err, KPHI_EINPUT, l->purge_path, l->at_purge,
                                  "a purge of 0 %% has no steady state: the inerts of the "
                                  "make-up (%s) would build up without limit; purge some of "
                                  "the separator vapour",
                                  list);
    }
    return KPHI_OK;
}
