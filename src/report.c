/* kphi report: text table, CSV and JSON writers for equilibrium results.
 *
 * Per reaction j the report shows K = exp(-dG°/RT), K_phi = prod phi_i^nu_ij,
 * K_y = prod y_i^nu_ij and dnu = sum_i nu_ij, and checks the identity
 *   K = K_phi K_y (P/P°)^dnu                 (Denbigh 1981, "The Principles of Chemical
 * Equilibrium", 4th ed., eq. 4.27), P° = 1 bar, which holds at equilibrium to the
 * affinity tolerance: the table prints the ratio of the two sides. Conversion shift is
 * X_real - X_ideal, in percentage points in the table and as a fraction in CSV/JSON. */
#include "kphi/report.h"

#include <math.h>
#include <string.h>

#include "internal.h"
#include "report_internal.h"
#include "kphi/thermo.h"
#include "report_internal.h"
#include "kphi/units.h"
#include "report_internal.h"

int kphi_report_format_parse(const char *text, kphi_report_format *fmt, kphi_error *err)
{
    static const char *const names[] = {"table", "csv", "json"};
    for (size_t i = 0; i < 3; i++)
        if (strcmp(text, names[i]) == 0) {
            *fmt = (kphi_report_format)i;
            return KPHI_OK;
        }
    kphi_mark none = {0, 0};
    const char *near = kphi__closest(text, names, 3);
    if (near != NULL)
        return kphi_error_set(err, KPHI_EINPUT, "<command line>", none,
                              "unknown format '%s' (did you mean '%s'?)", text, near);
    return kphi_error_set(err, KPHI_EINPUT, "<command line>", none,
                          "unknown format '%s'; expected table, csv or json", text);
}

static int io_error(FILE *out, kphi_error *err)
{
    if (ferror(out)) {
        kphi_mark none = {0, 0};
        return kphi_error_set(err, KPHI_EIO, NULL, none, "write error on output");
    }
    return KPHI_OK;
}

/* JSON number or null for non-finite values. */
static void jnum(FILE *out, double v)
{
    if (isfinite(v)) {
        char b[32];
        fwrite(b, 1, (size_t)kphi__report_g10(b, v), out);
    } else {
        fputs("null", out);
    }
}

/* JSON string with the escapes RFC 8259 requires. */
static void jstr(FILE *out, const char *s)
{
    fputc('"', out);
    for (const unsigned char *p = (const unsigned char *)s; *p; p++) {
        if (*p == '"' || *p == '\\')
            fprintf(out, "\\%c", *p);
        else if (*p < 0x20)
            fprintf(out, "\\u%04x", *p);
        else
            fputc(*p, out);
    }
    fputc('"', out);
}

static void cnum(FILE *out, double v)
{
    if (isfinite(v)) {
        char b[32];
        fwrite(b, 1, (size_t)kphi__report_g10(b, v), out);
    }
}

/* kphi_report_warnings() callback of the JSON writer: one more string of warnings[]. */
typedef struct {
    FILE *out;
    int n;
} json_warnings;

static void json_warning(void *ctx, const char *text)
{
    json_warnings *j = ctx;
    if (j->n++ > 0)
        fputs(", ", j->out);
    jstr(j->out, text);
}

size_t kphi_report_warnings(const kphi_report_point *pt, kphi_report_warning_fn fn, void *ctx)
{
    if (pt == NULL || pt->failed != NULL || pt->real == NULL)
        return 0;
    size_t n = 0;
    char b[320];
    if (pt->phases != NULL && pt->gas_only && pt->gas_unstable) {
        snprintf(b, sizeof b,
                 "the stability test finds this gas unstable (tangent-plane distance %.3g): a "
                 "liquid would form here, so the gas-only answer is not the stable one "
                 "(--phases auto solves both phases)",
                 pt->phases->tm_min);
        fn(ctx, b);
        n++;
    } else if (pt->phases == NULL && pt->real->eos.may_condense) {
        fn(ctx, "a liquid-like root of the EOS has the lower Gibbs energy: the mixture may "
                "condense here (this model has no phase test)");
        n++;
    }
    n += kphi__report_energy_warnings(pt, fn, ctx);
    return n + kphi__report_K_warnings(pt, fn, ctx);
}

/* The liquid of a two-phase answer, or NULL. */
static const kphi_phase_state *liquid_of(const kphi_report_point *pt)
{
    const kphi_flash_result *ph = pt->phases;
    if (ph == NULL || ph->n_phases != 2)
        return NULL;
    return &ph->phase[1];
}

/* CSV phase columns: vapour_fraction, x_<species>. */
static void phase_csv(FILE *out, const kphi_report_point *pt)
{
    size_t s = kphi_rxnset_n_species(pt->set);
    const kphi_phase_state *L = pt != NULL && pt->real != NULL ? liquid_of(pt) : NULL;
    fputc(',', out);
    if (pt != NULL && pt->phases != NULL && pt->real != NULL)
        cnum(out, pt->phases->n_phases == 2
                      ? pt->phases->phase[0].fraction
                      : (pt->phases->phase[0].kind == KPHI_PHASE_LIQUID ? 0.0 : 1.0));
    for (size_t i = 0; i < s; i++) {
        fputc(',', out);
        if (L != NULL)
            cnum(out, L->y[i]);
    }
}

/* A table cell: v printed with fmt (one double conversion, `width` wide), or `word`
 * right-aligned in the same width when v is not finite: no nan or inf reaches a table. */
static const char *cell(char buf[48], const char *fmt, int width, double v, const char *word)
{
    if (isfinite(v))
        snprintf(buf, 48, fmt, v);
    else
        snprintf(buf, 48, "%*s", width, word);
    return buf;
}

int kphi_report_conversion_note(const kphi_rxnset *set, const double feed[], char *buf,
                                size_t n)
{
    const double *w = kphi_rxnset_conversion_weights(set);
    size_t s = kphi_rxnset_n_species(set), used = 0, named = 0, total = 0;
    double b = 0.0;
    for (size_t i = 0; i < s; i++) {
        b += w[i] * feed[i];
        total += w[i] != 0.0;
    }
    if (b > 0.0)
        return 0;
    if (n == 0)
        return 1;
    buf[0] = '\0';
    int k = snprintf(buf, n, "undefined: the feed holds no ");
    used = k > 0 && (size_t)k < n ? (size_t)k : n - 1;
    for (size_t i = 0; i < s && used + 1 < n; i++) {
        if (w[i] == 0.0)
            continue;
        named++;
        k = snprintf(buf + used, n - used, "%s%s",
                     named == 1 ? "" : (named == total ? " or " : ", "),
                     kphi_rxnset_species(set, i)->name);
        used += k > 0 && (size_t)k < n - used ? (size_t)k : n - used - 1;
    }
    return 1;
}

/* Species held at zero in reaction j of r, as "CO2 and H2O" (empty when none). */
static int held_in_reaction(const kphi_rxnset *set, const kphi_equil_result *r, size_t j,
                            char *buf, size_t n)
{
    size_t used = 0, count = 0, total = 0;
    for (size_t i = 0; i < r->n_species; i++)
        total += r->held_zero[i] && kphi_rxnset_nu(set, j, i) != 0.0;
    buf[0] = '\0';
    for (size_t i = 0; i < r->n_species && used + 1 < n; i++) {
        if (!r->held_zero[i] || kphi_rxnset_nu(set, j, i) == 0.0)
            continue;
        count++;
        int k = snprintf(buf + used, n - used, "%s%s",
                         count == 1 ? "" : (count == total ? " and " : ", "),
                         kphi_rxnset_species(set, i)->name);
        used += k > 0 && (size_t)k < n - used ? (size_t)k : n - used - 1;
    }
    return count > 0;
}

/* "indicators": [{"name", "formula", "feed", "real", "ideal"}] (kphi_equil_indicators()),
 * null where undefined, with a note. */
static void json_indicators(FILE *out, const kphi_report_point *pt)
{
    kphi_equil_indicator f[KPHI_EQUIL_MAX_INDICATORS], a[KPHI_EQUIL_MAX_INDICATORS],
        b[KPHI_EQUIL_MAX_INDICATORS];
    size_t n = kphi_equil_indicators(pt->set, pt->feed, f);
    kphi_equil_indicators(pt->set, pt->real->n, a);
    kphi_equil_indicators(pt->set, pt->ideal->n, b);
    fputs(", \"indicators\": [", out);
    for (size_t k = 0; k < n; k++) {
        fputs(k ? ", {\"name\": " : "{\"name\": ", out);
        jstr(out, f[k].name);
        fputs(", \"formula\": ", out);
        jstr(out, f[k].formula);
        fputs(", \"feed\": ", out);
        jnum(out, f[k].value);
        fputs(", \"real\": ", out);
        jnum(out, a[k].value);
        fputs(", \"ideal\": ", out);
        jnum(out, b[k].value);
        if (!isfinite(f[k].value) || !isfinite(a[k].value) || !isfinite(b[k].value)) {
            char note[96];
            snprintf(note, sizeof note, "undefined where %s is 0", f[k].zero);
            fputs(", \"note\": ", out);
            jstr(out, note);
        }
        fputc('}', out);
    }
    fputc(']', out);
}

/* The indicators as table lines: feed and equilibrium (model and ideal gas). */
static void table_indicators(FILE *out, const kphi_report_point *pt)
{
    kphi_equil_indicator f[KPHI_EQUIL_MAX_INDICATORS], a[KPHI_EQUIL_MAX_INDICATORS],
        b[KPHI_EQUIL_MAX_INDICATORS];
    size_t n = kphi_equil_indicators(pt->set, pt->feed, f);
    kphi_equil_indicators(pt->set, pt->real->n, a);
    kphi_equil_indicators(pt->set, pt->ideal->n, b);
    for (size_t k = 0; k < n; k++) {
        char c0[48], c1[48], c2[48], und[40];
        snprintf(und, sizeof und, "undefined (%.12s is 0)", f[k].zero);
        cell(c0, "%.4f", 0, f[k].value, und);
        cell(c1, "%.4f", 0, a[k].value, und);
        cell(c2, "%.4f", 0, b[k].value, und);
        if (pt->model == KPHI_EOS_IDEAL)
            fprintf(out, "%s %s:  feed %s   equilibrium %s\n", f[k].title, f[k].formula, c0, c2);
        else
            fprintf(out, "%s %s:  feed %s   equilibrium %s (real gas), %s (ideal gas)\n",
                    f[k].title, f[k].formula, c0, c1, c2);
    }
}

int kphi_report_json_point(FILE *out, const kphi_report_point *pt, kphi_error *err)
{
    const kphi_rxnset *set = pt->set;
    const kphi_equil_result *re = pt->real, *id = pt->ideal;
    size_t s = kphi_rxnset_n_species(set), r = kphi_rxnset_n_reactions(set);
    fputs("{\"T_K\": ", out);
    jnum(out, kphi__report_point_T(pt));
    fputs(", \"P_bar\": ", out);
    jnum(out, re->P / 1e5);
    fputs(", \"eos\": ", out);
    jstr(out, kphi_eos_model_name(pt->model));
    fprintf(out, ", \"quantum\": %s", pt->quantum ? "true" : "false");
    fputs(", \"reaction_set\": ", out);
    jstr(out, kphi_rxnset_name(set));
    if (pt->case_name != NULL) {
        fputs(", \"case\": ", out);
        jstr(out, pt->case_name);
        fputs(", \"kij\": [", out);
        for (size_t m = 0; m < pt->n_kij; m++) {
            const kphi_case_kij_entry *k = &pt->kij[m];
            fputs(m > 0 ? ", {\"pair\": [" : "{\"pair\": [", out);
            jstr(out, kphi_rxnset_species(set, k->i)->name);
            fputs(", ", out);
            jstr(out, kphi_rxnset_species(set, k->j)->name);
            fputs("], \"value\": ", out);
            jnum(out, k->value);
            fputs(", \"source\": ", out);
            if (k->source != NULL)
                jstr(out, k->source);
            else
                fputs("null", out);
            if (k->dkdT != 0.0) {
                fputs(", \"dkdT\": ", out);
                jnum(out, k->dkdT);
                fputs(", \"T_ref_K\": ", out);
                jnum(out, k->T_ref);
            }
            fprintf(out, ", \"from\": \"%s\"}",
                    k->from_case ? "case" : k->from_file ? "k_ij file" : "reaction set");
        }
        fputc(']', out);
    }
    fputs(", \"species\": [", out);
    for (size_t i = 0; i < s; i++) {
        fputs(i ? ", {\"name\": " : "{\"name\": ", out);
        jstr(out, kphi_rxnset_species(set, i)->name);
        fputs(", \"feed\": ", out);
        jnum(out, pt->feed[i]);
        fputs(", \"n\": ", out);
        jnum(out, re->n[i]);
        fputs(", \"y\": ", out);
        jnum(out, re->y[i]);
        fputs(", \"n_ideal\": ", out);
        jnum(out, id->n[i]);
        fputs(", \"y_ideal\": ", out);
        jnum(out, id->y[i]);
        fputs(", \"phi\": ", out);
        jnum(out, exp(re->lnphi[i]));
        fputc('}', out);
    }
    fputs("], \"reactions\": [", out);
    for (size_t j = 0; j < r; j++) {
        double dnu = kphi_rxnset_dnu(set, j);
        fputs(j ? ", {\"equation\": " : "{\"equation\": ", out);
        jstr(out, kphi_rxnset_equation(set, j));
        fputs(", \"K\": ", out);
        jnum(out, exp(re->lnK[j]));
        fputs(", \"Kphi\": ", out);
        jnum(out, exp(re->lnKphi[j]));
        fputs(", \"Ky\": ", out);
        jnum(out, exp(re->lnKy[j]));
        fputs(", \"Ky_ideal\": ", out);
        jnum(out, exp(id->lnKy[j]));
        fputs(", \"dnu\": ", out);
        jnum(out, dnu);
        fputs(", \"affinity\": ", out);
        jnum(out, re->affinity[j]);
        char held[160];
        if (held_in_reaction(set, re, j, held, sizeof held)) {
            char note[256];
            snprintf(note, sizeof note,
                     "%s held at zero (the feed cannot form %s): Ky and the affinity are "
                     "undefined",
                     held, strstr(held, " and ") != NULL ? "them" : "it");
            fputs(", \"note\": ", out);
            jstr(out, note);
        }
        kphi__report_K_json(out, pt, j);
        fputc('}', out);
    }
    fputs("], \"conversion\": {\"species\": ", out);
    jstr(out, kphi_rxnset_conversion_label(set));
    fputs(", \"real\": ", out);
    jnum(out, pt->X_real);
    fputs(", \"ideal\": ", out);
    jnum(out, pt->X_ideal);
    fputs(", \"shift\": ", out);
    jnum(out, pt->X_real - pt->X_ideal);
    char why[160];
    if (kphi_report_conversion_note(set, pt->feed, why, sizeof why)) {
        fputs(", \"reason\": ", out);
        jstr(out, why);
    }
    fputs("}, \"P_equiv_ideal_bar\": ", out);
    jnum(out, pt->P_equiv / 1e5);
    if (!isfinite(pt->P_equiv) && pt->P_equiv_note != NULL) {
        fputs(", \"P_equiv_note\": ", out);
        jstr(out, pt->P_equiv_note);
    }
    json_indicators(out, pt);
    fputs(", \"Z\": ", out);
    jnum(out, re->eos.Z);
    fputs(", \"h_dep_J_mol\": ", out);
    jnum(out, re->eos.h_dep);
    fprintf(out, ", \"iterations\": %d, \"max_affinity\": ", re->iterations);
    jnum(out, re->max_affinity);
    fputs(", \"balance_error\": ", out);
    jnum(out, re->balance_error);
    if (pt->phases != NULL) {
        fprintf(out, ", \"phase_mode\": \"%s\", \"phases\": ", pt->gas_only ? "gas" : "auto");
        kphi_report_phases_json(out, set, pt->phases);
        if (pt->phases->n_phases == 2) {
            fputs(", \"K_values\": {", out);
            for (size_t i = 0; i < s; i++) {
                fputs(i ? ", " : "", out);
                jstr(out, kphi_rxnset_species(set, i)->name);
                fputs(": ", out);
                jnum(out, pt->phases->K[i]);
            }
            fputc('}', out);
        }
    }
    fputs(", \"warnings\": [", out);
    json_warnings jw = {out, 0};
    kphi_report_warnings(pt, json_warning, &jw);
    fputc(']', out);
    kphi__report_energy_json(out, pt);
    fputc('}', out);
    return io_error(out, err);
}

static int csv_header(FILE *out, const kphi_rxnset *set, int with_eos_column,
                      const kphi_report_energy *energy, kphi_error *err)
{
    size_t s = kphi_rxnset_n_species(set), r = kphi_rxnset_n_reactions(set);
    if (with_eos_column)
        fputs("eos,", out);
    fputs("T_K,P_bar,X_real,X_ideal,shift", out);
    for (size_t i = 0; i < s; i++)
        fprintf(out, ",y_%s", kphi_rxnset_species(set, i)->name);
    for (size_t i = 0; i < s; i++)
        fprintf(out, ",y_ideal_%s", kphi_rxnset_species(set, i)->name);
    for (size_t i = 0; i < s; i++)
        fprintf(out, ",phi_%s", kphi_rxnset_species(set, i)->name);
    for (size_t j = 0; j < r; j++)
        fprintf(out, ",K_%zu,Kphi_%zu,Ky_%zu", j + 1, j + 1, j + 1);
    fputs(",Z,status,message,P_equiv_ideal_bar,vapour_fraction", out);
    for (size_t i = 0; i < s; i++)
        fprintf(out, ",x_%s", kphi_rxnset_species(set, i)->name);
    kphi__report_energy_csv(out, set, energy, NAN, KPHI__ENERGY_CSV_HEADER);
    fputc('\n', out);
    return io_error(out, err);
}

int kphi_report_json_failed(FILE *out, const char *eos, double T, double P,
                            const char *message, kphi_error *err)
{
    const char *sep = "{";
    if (eos != NULL) {
        fputs("{\"eos\": ", out);
        jstr(out, eos);
        sep = ", ";
    }
    if (!isnan(T) && !isnan(P)) {
        fprintf(out, "%s\"T_K\": ", sep);
        jnum(out, T);
        fputs(", \"P_bar\": ", out);
        jnum(out, P / 1e5);
        sep = ", ";
    }
    fprintf(out, "%s\"status\": \"failed\", \"message\": ", sep);
    jstr(out, message);
    fputc('}', out);
    return io_error(out, err);
}

int kphi_report_csv_header(FILE *out, const kphi_rxnset *set, int with_eos_column,
                           const kphi_report_energy *energy, kphi_error *err)
{
    return csv_header(out, set, with_eos_column, energy, err);
}

int kphi_report_csv_row(FILE *out, const kphi_report_point *pt, int with_eos_column,
                        kphi_error *err)
{
    const kphi_rxnset *set = pt->set;
    const kphi_equil_result *re = pt->real, *id = pt->ideal;
    size_t s = kphi_rxnset_n_species(set), r = kphi_rxnset_n_reactions(set);
    /* built in memory, one write per row (src/report_internal.h) */
    kphi__report_row row;
    row.out = out;
    row.n = 0;
    if (with_eos_column) {
        kphi__row_str(&row, kphi_eos_model_name(pt->model));
        kphi__row_char(&row, ',');
    }
    kphi__row_num(&row, kphi__report_point_T(pt));
    kphi__row_char(&row, ',');
    kphi__row_num(&row, re->P / 1e5);
    kphi__row_char(&row, ',');
    kphi__row_num(&row, pt->X_real);
    kphi__row_char(&row, ',');
    kphi__row_num(&row, pt->X_ideal);
    kphi__row_char(&row, ',');
    kphi__row_num(&row, pt->X_real - pt->X_ideal);
    for (size_t i = 0; i < s; i++) {
        kphi__row_char(&row, ',');
        kphi__row_num(&row, re->y[i]);
    }
    for (size_t i = 0; i < s; i++) {
        kphi__row_char(&row, ',');
        kphi__row_num(&row, id->y[i]);
    }
    for (size_t i = 0; i < s; i++) {
        kphi__row_char(&row, ',');
        kphi__row_num(&row, exp(re->lnphi[i]));
    }
    for (size_t j = 0; j < r; j++) {
        kphi__row_char(&row, ',');
        kphi__row_num(&row, exp(re->lnK[j]));
        kphi__row_char(&row, ',');
        kphi__row_num(&row, exp(re->lnKphi[j]));
        kphi__row_char(&row, ',');
        kphi__row_num(&row, exp(re->lnKy[j]));
    }
    kphi__row_char(&row, ',');
    kphi__row_num(&row, re->eos.Z);
    kphi__row_flush(&row);
    const char *msg = NULL;
    if (pt->phases != NULL && pt->phases->n_phases == 2)
        msg = "two phases";
    else if (pt->phases != NULL && pt->gas_only && pt->gas_unstable)
        msg = "gas unstable: a liquid would form";
    else if (pt->phases == NULL && re->eos.may_condense)
        msg = "may condense";
    fputs(",ok,", out);
    int first_note = msg == NULL;
    if (msg != NULL)
        fputs(msg, out);
    kphi__report_K_csv_note(out, pt, &first_note);
    fputc(',', out);
    cnum(out, pt->P_equiv / 1e5);
    phase_csv(out, pt);
    kphi__report_energy_csv(out, set, pt->energy, kphi__report_point_T(pt),
                            KPHI__ENERGY_CSV_ROW);
    fputc('\n', out);
    return io_error(out, err);
}

int kphi_report_csv_failed_row(FILE *out, const kphi_rxnset *set, double T, double P,
                               const char *message, int with_eos_column,
                               const kphi_report_energy *energy, kphi_error *err)
{
    size_t s = kphi_rxnset_n_species(set), r = kphi_rxnset_n_reactions(set);
    if (with_eos_column)
        fputc(',', out);
    cnum(out, T);
    fputc(',', out);
    cnum(out, P / 1e5);
    fputs(",,,", out);
    for (size_t k = 0; k < 3 * s + 3 * r + 1; k++)
        fputc(',', out);
    fputs(",failed,\"", out);
    for (const char *p = message; *p; p++) {
        if (*p == '"')
            fputc('"', out);
        if (*p != '\n')
            fputc(*p, out);
    }
    fputs("\",", out); /* P_equiv_ideal_bar empty */
    for (size_t i = 0; i <= s; i++)  /* vapour_fraction and x_ empty */
        fputc(',', out);
    kphi__report_energy_csv(out, set, energy, T, KPHI__ENERGY_CSV_EMPTY);
    fputc('\n', out);
    return io_error(out, err);
}

/* ---------------------------------------------------------------- table */

static void write_conditions(FILE *out, const kphi_report_point *pt)
{
    double T = kphi__report_point_T(pt), P = pt->real->P;
    double Tu, Pu;
    const char *tu = pt->T_unit != NULL ? pt->T_unit : "K";
    const char *pu = pt->P_unit != NULL ? pt->P_unit : "bar";
    if (kphi_units_temperature_to(T, tu, &Tu) != 0) {
        tu = "K";
        Tu = T;
    }
    if (kphi_units_pressure_to(P, pu, &Pu) != 0) {
        pu = "bar";
        Pu = P / 1e5;
    }
    if (strcmp(tu, "K") == 0)
        fprintf(out, "T = %.2f K", T);
    else
        fprintf(out, "T = %.2f %s (%.2f K)", Tu, tu, T);
    if (strcmp(pu, "bar") == 0)
        fprintf(out, "   P = %.4g bar", Pu);
    else
        fprintf(out, "   P = %.4g %s (%.4g bar)", Pu, pu, P / 1e5);
}

/* kphi_report_warnings() callback of the table: one "warning: ..." line. */
static void table_warning(void *ctx, const char *text)
{
    fprintf((FILE *)ctx, "warning: %s\n", text);
}

/* The unit of a pressure difference: a gauge unit's absolute counterpart (a difference
 * has no gauge: +25 barg would read as 26 bar absolute). */
static const char *difference_unit(const char *unit)
{
    if (strcmp(unit, "barg") == 0)
        return "bar";
    if (strcmp(unit, "psig") == 0)
        return "psi";
    return unit;
}

/* The title lines: the case's name and file, then the reaction set's name (without a
 * case name: the set's name and the file, as one line). */
static void write_title(FILE *out, const kphi_report_point *pt)
{
    const kphi_rxnset *set = pt->set;
    if (pt->case_name != NULL) {
        fprintf(out, "%s", pt->case_name);
        if (pt->source != NULL)
            fprintf(out, "  (%s)", pt->source);
        fprintf(out, "\nreaction set: %s\n", kphi_rxnset_name(set));
        return;
    }
    fprintf(out, "%s", kphi_rxnset_name(set));
    if (pt->source != NULL)
        fprintf(out, "  (%s)", pt->source);
    fputc('\n', out);
}

/* The k_ij in effect, one line each, when the report was given them (case_name set). */
static void write_kij(FILE *out, const kphi_report_point *pt)
{
    if (pt->case_name == NULL)
        return;
    kphi_report_kij_lines(out, pt->set, pt->kij, pt->n_kij, "k_ij: ");
}

void kphi__report_conditions(FILE *out, const kphi_report_point *pt)
{
    write_conditions(out, pt);
}

void kphi__report_title(FILE *out, const kphi_report_point *pt)
{
    write_title(out, pt);
}

static int write_table(FILE *out, const kphi_report_point *pt, kphi_error *err)
{
    const kphi_rxnset *set = pt->set;
    const kphi_equil_result *re = pt->real, *id = pt->ideal;
    size_t s = kphi_rxnset_n_species(set), r = kphi_rxnset_n_reactions(set);
    write_title(out, pt);
    write_conditions(out, pt);
    fprintf(out, "   EOS: %s, %s%s\n", kphi_eos_model_name(pt->model), kphi_eos_model_title(pt->model),
            pt->quantum ? ", quantum-gas constants for H2/He" : "");
    if (pt->model != KPHI_EOS_IDEAL)
        write_kij(out, pt);
    kphi__report_K_header(out, pt);
    fputc('\n', out);

    double feed_total = 0.0;
    for (size_t i = 0; i < s; i++)
        feed_total += pt->feed[i];
    fprintf(out, "%-8s %11s %9s %12s %9s %11s %9s\n", "species", "feed", "y feed", "n real",
            "y real", "y ideal", "phi");
    for (size_t i = 0; i < s; i++) {
        const char *name = kphi_rxnset_species(set, i)->name;
        fprintf(out, "%-8s %11.5g %9.5f %12.6g %9.5f %11.5f %#9.6g%s\n", name, pt->feed[i],
                pt->feed[i] / feed_total, re->n[i], re->y[i], id->y[i], exp(re->lnphi[i]),
                kphi_rxnset_is_inert(set, i) ? "  inert" : "");
    }
    fprintf(out, "%-8s %11.5g %9s %12.6g\n\n", "total", feed_total, "", re->n_total);
    if (pt->phases != NULL && pt->gas_only) {
        fputs("phases: gas only (--phases gas)\n\n", out);
    } else if (pt->phases != NULL) {
        kphi_report_phases_table(out, set, pt->phases);
        if (pt->phases->n_phases == 2)
            fputs("  (n and y real above are of both phases together; phi, Kphi and Ky of the "
                  "vapour)\n",
                  out);
        fputc('\n', out);
    }

    fprintf(out, "%-28s %12s %10s %12s %12s %5s %10s\n", "reaction", "K", "Kphi", "Ky",
            "Ky ideal", "dnu", "check");
    for (size_t j = 0; j < r; j++) {
        double dnu = kphi_rxnset_dnu(set, j);
        double lhs = re->lnKphi[j] + re->lnKy[j] + dnu * log(re->P / KPHI_P_STANDARD);
        double ratio = exp(re->lnK[j] - lhs);
        char c1[48], c2[48], c3[48], c4[48];
        fprintf(out, "%-28s %s %s %s %s %5g ", kphi_rxnset_equation(set, j),
                cell(c1, "%12.5g", 12, exp(re->lnK[j]), "n/a"),
                cell(c2, "%#10.6g", 10, exp(re->lnKphi[j]), "n/a"),
                cell(c3, "%12.5g", 12, exp(re->lnKy[j]), "held"),
                cell(c4, "%12.5g", 12, exp(id->lnKy[j]), "held"), dnu);
        if (isfinite(ratio))
            fprintf(out, "%10.8f\n", ratio);
        else
            fprintf(out, "%10s\n", "held");
    }
    fputs("  (check = K / (Kphi Ky (P/P°)^dnu), 1 at equilibrium; P° = 1 bar)\n", out);
    kphi__report_K_heat(out, pt);
    fputc('\n', out);

    char why[160];
    if (kphi_report_conversion_note(set, pt->feed, why, sizeof why) ||
        !isfinite(pt->X_real - pt->X_ideal))
        fprintf(out, "conversion of %s:  %s\n", kphi_rxnset_conversion_label(set),
                why[0] != '\0' ? why : "undefined");
    else
        fprintf(out, "conversion of %s:  real gas %.4f   ideal gas %.4f   shift %+.2f points\n",
                kphi_rxnset_conversion_label(set), pt->X_real, pt->X_ideal,
                100.0 * (pt->X_real - pt->X_ideal));
    if (isfinite(pt->P_equiv) && pt->model != KPHI_EOS_IDEAL) {
        double Pu;
        const char *pu = pt->P_unit != NULL ? pt->P_unit : "bar";
        if (kphi_units_pressure_to(pt->P_equiv, pu, &Pu) != 0) {
            pu = "bar";
            Pu = pt->P_equiv / 1e5;
        }
        double Pnow;
        if (kphi_units_pressure_to(re->P, pu, &Pnow) != 0)
            Pnow = re->P / 1e5;
        fprintf(out,
                "equivalent ideal-gas pressure: %.4g %s (the ideal gas needs %+.4g %s to "
                "match the real-gas conversion)\n",
                Pu, pu, Pu - Pnow, difference_unit(pu));
    } else if (pt->P_equiv_note != NULL && pt->model != KPHI_EOS_IDEAL) {
        fprintf(out, "equivalent ideal-gas pressure: %s\n", pt->P_equiv_note);
    }
    table_indicators(out, pt);
    int held = 0;
    for (size_t i = 0; i < s; i++)
        held = held || re->held_zero[i];
    if (held) {
        fputs("held at zero (the feed cannot form them with these reactions):", out);
        for (size_t i = 0; i < s; i++)
            if (re->held_zero[i])
                fprintf(out, " %s", kphi_rxnset_species(set, i)->name);
        fputc('\n', out);
    }
    kphi__report_energy_table(out, pt);
    fprintf(out, "Z = %.5f   Newton steps %d (ideal %d)   largest affinity %.1e   "
                 "element balance %.1e\n",
            re->eos.Z, re->iterations, id->iterations, re->max_affinity, re->balance_error);
    kphi_report_warnings(pt, table_warning, out);
    fputs("Equilibrium limit for screening, not a design basis.\n", out);
    return io_error(out, err);
}

int kphi_report_point_write(FILE *out, kphi_report_format fmt, const kphi_report_point *pt,
                            kphi_error *err)
{
    int rc;
    switch (fmt) {
    case KPHI_REPORT_JSON:
        rc = kphi_report_json_point(out, pt, err);
        fputc('\n', out);
        return rc != KPHI_OK ? rc : io_error(out, err);
    case KPHI_REPORT_CSV:
        rc = csv_header(out, pt->set, 0, pt->energy, err);
        return rc != KPHI_OK ? rc : kphi_report_csv_row(out, pt, 0, err);
    case KPHI_REPORT_TABLE:
    default:
        return write_table(out, pt, err);
    }
}

int kphi_report_compare_write(FILE *out, kphi_report_format fmt, const kphi_report_point pts[],
                              size_t n, kphi_error *err)
{
    if (n == 0)
        return KPHI_OK;
    const kphi_rxnset *set = pts[0].set;
    size_t r = kphi_rxnset_n_reactions(set);
    const kphi_report_point *first = NULL; /* the first model that did not fail */
    for (size_t k = 0; k < n && first == NULL; k++)
        if (pts[k].failed == NULL)
            first = &pts[k];
    if (first == NULL) {
        kphi_mark none = {0, 0};
        return kphi_error_set(err, KPHI_EFAILED, NULL, none, "every model failed");
    }
    if (fmt == KPHI_REPORT_JSON) {
        fputc('[', out);
        for (size_t k = 0; k < n; k++) {
            if (k)
                fputs(",\n ", out);
            if (pts[k].failed != NULL) {
                int rc = kphi_report_json_failed(out, kphi_eos_model_name(pts[k].model), NAN,
                                                 NAN, pts[k].failed, err);
                if (rc != KPHI_OK)
                    return rc;
                continue;
            }
            int rc = kphi_report_json_point(out, &pts[k], err);
            if (rc != KPHI_OK)
                return rc;
        }
        fputs("]\n", out);
        return io_error(out, err);
    }
    if (fmt == KPHI_REPORT_CSV) {
        int rc = kphi_report_csv_header(out, set, 1, NULL, err);
        for (size_t k = 0; k < n && rc == KPHI_OK; k++) {
            if (pts[k].failed != NULL) {
                fprintf(out, "%s", kphi_eos_model_name(pts[k].model));
                rc = kphi_report_csv_failed_row(out, set, first->real->T, first->real->P,
                                                pts[k].failed, 1, NULL, err);
            } else {
                rc = kphi_report_csv_row(out, &pts[k], 1, err);
            }
        }
        return rc;
    }
    write_title(out, first);
    write_conditions(out, first);
    fputs("   all equations of state\n", out);
    write_kij(out, first);
    fputc('\n', out);
    fprintf(out, "%-7s %9s %9s %8s %9s %7s", "eos", "X real", "X ideal", "shift", "Z", "liq %");
    char head[48];
    for (size_t j = 0; j < r; j++) {
        snprintf(head, sizeof head, "Kphi_%zu", j + 1);
        fprintf(out, " %9s", head);
    }
    kphi__report_y_heads(out, set);
    fputc('\n', out);
    double xmin = INFINITY, xmax = -INFINITY;
    for (size_t k = 0; k < n; k++) {
        const kphi_report_point *p = &pts[k];
        if (p->failed != NULL) {
            fprintf(out, "%-7s failed: %s\n", kphi_eos_model_name(p->model), p->failed);
            continue;
        }
        char c1[48], c2[48], c3[48], c4[48];
        fprintf(out, "%-7s %s %s %s %s", kphi_eos_model_name(p->model),
                cell(c1, "%9.4f", 9, p->X_real, "undef"),
                cell(c2, "%9.4f", 9, p->X_ideal, "undef"),
                cell(c3, "%+8.2f", 8, 100.0 * (p->X_real - p->X_ideal), "undef"),
                cell(c4, "%9.5f", 9, p->real->eos.Z, "n/a"));
        /* the liquid's share of a two-phase answer; "-" without a phase test */
        if (p->phases == NULL)
            fprintf(out, " %7s", "-");
        else if (p->phases->n_phases == 2)
            fprintf(out, " %7.2f", 100.0 * p->phases->phase[1].fraction);
        else
            fprintf(out, " %7.2f", p->phases->phase[0].kind == KPHI_PHASE_LIQUID ? 100.0 : 0.0);
        for (size_t j = 0; j < r; j++)
            fprintf(out, " %s", cell(c1, "%#9.6g", 9, exp(p->real->lnKphi[j]), "n/a"));
        kphi__report_y_cells(out, set, p->real->y);
        fputc('\n', out);
        if (p->model != KPHI_EOS_IDEAL && isfinite(p->X_real)) {
            xmin = fmin(xmin, p->X_real);
            xmax = fmax(xmax, p->X_real);
        }
    }
    fprintf(out, "\n(shift in points of conversion of %s; liq %%: the liquid's molar share of "
                 "the real-gas answer, - without a phase test; Kphi_j for reaction j:",
            kphi_rxnset_conversion_label(set));
    kphi__report_equations(out, set);
    char why[160];
    if (kphi_report_conversion_note(set, first->feed, why, sizeof why))
        fprintf(out, "conversion of %s: %s\n", kphi_rxnset_conversion_label(set), why);
    if (isfinite(xmin))
        fprintf(out, "spread of the real-gas conversion over the models: %.2f points\n",
                100.0 * (xmax - xmin));
    fputs("Equilibrium limit for screening, not a design basis.\n", out);
    return io_error(out, err);
}

/* ------------------------------------------------ shared with report_phase.c */

void kphi__report_y_heads(FILE *out, const kphi_rxnset *set)
{
    char head[48];
    for (size_t i = 0; i < kphi_rxnset_n_species(set); i++)
        if (!kphi_rxnset_is_inert(set, i)) {
            snprintf(head, sizeof head, "y_%.20s", kphi_rxnset_species(set, i)->name);
            fprintf(out, " %9s", head);
        }
}

void kphi__report_y_cells(FILE *out, const kphi_rxnset *set, const double *y)
{
    for (size_t i = 0; i < kphi_rxnset_n_species(set); i++)
        if (!kphi_rxnset_is_inert(set, i))
            fprintf(out, " %9.5f", y[i]);
}

void kphi__report_equations(FILE *out, const kphi_rxnset *set)
{
    size_t r = kphi_rxnset_n_reactions(set);
    for (size_t j = 0; j < r; j++)
        fprintf(out, " %zu: %s%s", j + 1, kphi_rxnset_equation(set, j), j + 1 < r ? ";" : ")\n");
    if (r == 0)
        fputs(")\n", out);
}

void kphi__report_jnum(FILE *out, double v)
{
    jnum(out, v);
}

void kphi__report_jstr(FILE *out, const char *s)
{
    jstr(out, s);
}

void kphi__report_cnum(FILE *out, double v)
{
    cnum(out, v);
}

int kphi__report_io_error(FILE *out, kphi_error *err)
{
    return io_error(out, err);
}

void kphi_report_kij_lines(FILE *out, const kphi_rxnset *set, const kphi_case_kij_entry kij[],
                           size_t n, const char *lead)
{
    size_t shown = 0, zeros = 0;
    for (size_t m = 0; m < n; m++)
        zeros += kij[m].from_file && kij[m].value == 0.0 && kij[m].dkdT == 0.0;
    for (size_t m = 0; m < n; m++) {
        const kphi_case_kij_entry *k = &kij[m];
        if (k->from_file && k->value == 0.0 && k->dkdT == 0.0)
            continue;
        fprintf(out, "%s%s-%s = %g", shown == 0 ? lead : "      ",
                kphi_rxnset_species(set, k->i)->name, kphi_rxnset_species(set, k->j)->name,
                k->value);
        if (k->dkdT != 0.0)
            fprintf(out, " %+g/K from %g K", k->dkdT, k->T_ref);
        fprintf(out, " (%s%s%s)\n",
                k->from_case ? "case" : k->from_file ? "k_ij file" : "reaction set",
                k->source != NULL ? "; " : ", no source given", k->source != NULL ? k->source : "");
        shown++;
    }
    if (zeros > 0) {
        fprintf(out, "%s0 from the k_ij file for", shown == 0 ? lead : "      ");
        for (size_t m = 0, c = 0; m < n; m++)
            if (kij[m].from_file && kij[m].value == 0.0 && kij[m].dkdT == 0.0)
                fprintf(out, "%s %s-%s", c++ > 0 ? "," : "",
                        kphi_rxnset_species(set, kij[m].i)->name,
                        kphi_rxnset_species(set, kij[m].j)->name);
        fputs(" (no published value seen; see the file's notes)\n", out);
        shown++;
    }
    if (shown == 0)
        fprintf(out, "%snone given (0 for every pair)\n", lead);
}
