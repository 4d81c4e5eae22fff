/* kphi report, the optional blocks of a point: the approach to equilibrium of a measured
 * outlet, the adiabatic bed outlet and beds in series; as table lines, JSON members and
 * trailing CSV columns (kphi_report_energy). The rest of the report is in src/report.c;
 * what the sources share is in src/report_internal.h. */
#include "report_internal.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include "kphi/units.h"

static void jnum(FILE *f, double v)
{
    kphi__report_jnum(f, v);
}

static void jstr(FILE *f, const char *s)
{
    kphi__report_jstr(f, s);
}

static void cnum(FILE *f, double v)
{
    kphi__report_cnum(f, v);
}

/* A conversion for a sentence: "0.1889", or "undefined" (no key species in the feed). */
static const char *fmt_X(char buf[48], double X)
{
    if (isfinite(X))
        snprintf(buf, 48, "%.4f", X);
    else
        snprintf(buf, 48, "undefined");
    return buf;
}

static double feed_total(const kphi_report_point *pt)
{
    double t = 0.0;
    for (size_t i = 0; i < kphi_rxnset_n_species(pt->set); i++)
        t += pt->feed[i];
    return t;
}

/* A temperature in the display unit, "478.30 C" or "751.45 K". */
static void fmt_T(char *buf, size_t n, double T, const char *unit)
{
    double v;
    if (unit == NULL || kphi_units_temperature_to(T, unit, &v) != 0) {
        unit = "K";
        v = T;
    }
    snprintf(buf, n, "%.2f %s", v, unit);
}

/* What the exchanger before bed b + 1 does to the gas leaving bed b: "cooled to",
 * "heated to", or "brought to" when the real-gas and ideal-gas outlets lie on either side
 * of the next inlet temperature. */
static const char *interbed_verb(const kphi_report_energy *x, size_t b, int ideal_only)
{
    int cool = 0, heat = 0;
    for (int m = ideal_only ? 1 : 0; m < 2; m++) {
        double T_prev = x->bed_out[b - 1][m]->T;
        cool += x->bed_T_in[b] < T_prev;
        heat += x->bed_T_in[b] > T_prev;
    }
    if (cool > 0 && heat == 0)
        return "cooled to";
    if (heat > 0 && cool == 0)
        return "heated to";
    return "brought to";
}

/* A bed runs backwards when its product leaves in a smaller amount than it came in (the
 * inlet temperature is above where the inlet gas is at equilibrium): one warning per bed,
 * naming the models it happens in. */
size_t kphi__report_energy_warnings(const kphi_report_point *pt, kphi_report_warning_fn fn, void *ctx)
{
    const kphi_report_energy *x = pt->energy;
    if (x == NULL || !x->adiabatic)
        return 0;
    const kphi_rxnset *set = pt->set;
    size_t k = x->key_species, n = 0;
    const char *key = kphi_rxnset_species(set, k)->name;
    int ideal_only = pt->model == KPHI_EOS_IDEAL;
    size_t nb = x->n_beds > 1 ? x->n_beds : 1;
    for (size_t b = 0; b < nb && b < KPHI_REPORT_MAX_BEDS; b++) {
        double n_in[2], n_out[2];
        int back[2] = {0, 0};
        for (int m = ideal_only ? 1 : 0; m < 2; m++) {
            const kphi_equil_result *o = b == 0 ? x->out[m] : x->bed_out[b][m];
            n_in[m] = b == 0 ? pt->feed[k] : x->bed_out[b - 1][m]->n[k];
            n_out[m] = o->n[k];
            back[m] = n_out[m] < n_in[m] * (1.0 - 1e-12);
        }
        if (!back[0] && !back[1])
            continue;
        int m = back[0] ? 0 : 1;
        char tin[48], text[512];
        fmt_T(tin, sizeof tin, b == 0 ? pt->real->T : x->bed_T_in[b], pt->T_unit);
        snprintf(text, sizeof text,
                 "bed %zu runs backwards (%s): %s falls from %.6g to %.6g mol per %.6g mol of "
                 "converter feed; at its inlet, %s, the gas holds more %s than the equilibrium "
                 "allows, so the bed decomposes it",
                 b + 1,
                 ideal_only ? "ideal gas"
                            : (back[0] && back[1] ? "real gas and ideal gas"
                                                  : (back[0] ? "real gas" : "ideal gas")),
                 key, n_in[m], n_out[m], feed_total(pt), tin, key);
        fn(ctx, text);
        n++;
    }
    return n;
}

double kphi__report_point_T(const kphi_report_point *pt)
{
    const kphi_report_energy *x = pt->energy;
    if (x != NULL && x->outlet_approach)
        return pt->real->T - x->outlet_dT;
    return pt->real->T;
}

/* Why reaction j has no approach temperature ("" when it has one). */
static const char *reaction_note(const kphi_report_point *pt,
                                 const kphi_equil_reaction_temperature *a, char *buf, size_t n)
{
    buf[0] = '\0';
    if (a->status == KPHI_APPROACH_ABSENT && a->absent >= 0)
        snprintf(buf, n, "undefined: the analysis holds no %s",
                 kphi_rxnset_species(pt->set, (size_t)a->absent)->name);
    else if (a->status == KPHI_APPROACH_NO_ROOT)
        snprintf(buf, n, "undefined: K never equals the mass-action ratio between %.0f and "
                         "%.0f K",
                 a->T_lo, a->T_hi);
    return buf;
}

static void reaction_approach_table(FILE *f, const kphi_report_point *pt, double T)
{
    const kphi_report_energy *x = pt->energy;
    int ideal_only = pt->model == KPHI_EOS_IDEAL;
    char tm[48];
    fmt_T(tm, sizeof tm, T, pt->T_unit);
    fprintf(f, "approach per reaction: the measured outlet at %s is at equilibrium in\n", tm);
    for (size_t j = 0; j < kphi_rxnset_n_reactions(pt->set); j++) {
        char note[160], t0[48], t1[48];
        fprintf(f, "  %-28s ", kphi_rxnset_equation(pt->set, j));
        const kphi_equil_reaction_temperature *a = &x->rxn[0][j], *b = &x->rxn[1][j];
        if (reaction_note(pt, ideal_only ? b : a, note, sizeof note)[0] != '\0') {
            fprintf(f, "%s\n", note);
            continue;
        }
        fmt_T(t1, sizeof t1, b->T_eq, pt->T_unit);
        if (ideal_only) {
            fprintf(f, "at %s: approach %+.2f K (ideal gas)\n", t1, b->T_eq - T);
            continue;
        }
        fmt_T(t0, sizeof t0, a->T_eq, pt->T_unit);
        if (b->status == KPHI_APPROACH_OK)
            fprintf(f, "at %s: approach %+.2f K (real gas); ideal gas: %s, %+.2f K\n", t0,
                    a->T_eq - T, t1, b->T_eq - T);
        else
            fprintf(f, "at %s: approach %+.2f K (real gas); ideal gas: %s\n", t0, a->T_eq - T,
                    reaction_note(pt, b, note, sizeof note));
    }
}

static void reaction_approach_json(FILE *f, const kphi_report_point *pt, double T)
{
    const kphi_report_energy *x = pt->energy;
    const kphi_rxnset *set = pt->set;
    fputs(", \"approach_reactions\": {\"y_measured\": {", f);
    for (size_t i = 0; i < kphi_rxnset_n_species(set); i++) {
        if (i > 0)
            fputs(", ", f);
        jstr(f, kphi_rxnset_species(set, i)->name);
        fputs(": ", f);
        jnum(f, x->y_analysis[i]);
    }
    fputs("}, \"reactions\": [", f);
    for (size_t j = 0; j < kphi_rxnset_n_reactions(set); j++) {
        const kphi_equil_reaction_temperature *a = &x->rxn[0][j], *b = &x->rxn[1][j];
        fputs(j > 0 ? ", {\"equation\": " : "{\"equation\": ", f);
        jstr(f, kphi_rxnset_equation(set, j));
        fputs(", \"Q\": ", f);
        jnum(f, exp(a->lnQ));
        fputs(", \"Q_ideal\": ", f);
        jnum(f, exp(b->lnQ));
        fputs(", \"T_eq_K\": ", f);
        jnum(f, a->T_eq);
        fputs(", \"T_eq_ideal_K\": ", f);
        jnum(f, b->T_eq);
        fputs(", \"dT_K\": ", f);
        jnum(f, a->T_eq - T);
        fputs(", \"dT_ideal_K\": ", f);
        jnum(f, b->T_eq - T);
        char note[160];
        if (reaction_note(pt, a, note, sizeof note)[0] != '\0' ||
            reaction_note(pt, b, note, sizeof note)[0] != '\0') {
            fputs(", \"note\": ", f);
            jstr(f, note);
        }
        fputc('}', f);
    }
    fputs("]}", f);
}

void kphi__report_energy_table(FILE *f, const kphi_report_point *pt)
{
    const kphi_report_energy *x = pt->energy;
    if (x == NULL)
        return;
    const kphi_rxnset *set = pt->set;
    const char *tu = pt->T_unit;
    double T = kphi__report_point_T(pt);
    int ideal_only = pt->model == KPHI_EOS_IDEAL;
    char t0[48], t1[48], x0[48], x1[48];
    if (x->outlet_approach) {
        fmt_T(t0, sizeof t0, pt->real->T, tu);
        fprintf(f,
                "outlet at a %+.2f K approach to equilibrium: the composition above is the "
                "equilibrium at %s (as are K, Kphi, Ky and phi)\n",
                x->outlet_dT, t0);
    }
    if (x->reaction_approach)
        reaction_approach_table(f, pt, T);
    if (x->approach) {
        const char *name = kphi_rxnset_species(set, x->approach_species)->name;
        fmt_T(t0, sizeof t0, x->T_eq[0], tu);
        fmt_T(t1, sizeof t1, x->T_eq[1], tu);
        if (ideal_only)
            fprintf(f,
                    "approach to equilibrium: measured y_%s = %.4f is the equilibrium at %s "
                    "(ideal gas); approach %.2f K\n",
                    name, x->y_measured, t1, x->T_eq[1] - T);
        else
            fprintf(f,
                    "approach to equilibrium: measured y_%s = %.4f is the equilibrium at %s "
                    "(real gas) and %s (ideal gas); approach %.2f K (real gas), %.2f K "
                    "(ideal gas)\n",
                    name, x->y_measured, t0, t1, x->T_eq[0] - T, x->T_eq[1] - T);
    }
    if (x->adiabatic) {
        size_t k = x->key_species;
        const char *key = kphi_rxnset_species(set, k)->name;
        const char *xl = kphi_rxnset_conversion_label(set);
        fmt_T(t0, sizeof t0, x->T_out[0], tu);
        fmt_T(t1, sizeof t1, x->T_out[1], tu);
        if (ideal_only)
            fprintf(f,
                    "adiabatic equilibrium outlet: T = %s, y_%s = %.4f, X(%s) = %s (ideal "
                    "gas)\n",
                    t1, key, x->out[1]->y[k], xl, fmt_X(x1, x->X_out[1]));
        else
            fprintf(f,
                    "adiabatic equilibrium outlet: T = %s, y_%s = %.4f, X(%s) = %s (real "
                    "gas); ideal gas: T = %s, y_%s = %.4f, X(%s) = %s\n",
                    t0, key, x->out[0]->y[k], xl, fmt_X(x0, x->X_out[0]), t1, key,
                    x->out[1]->y[k], xl, fmt_X(x1, x->X_out[1]));
        for (size_t b = 1; b < x->n_beds && b < KPHI_REPORT_MAX_BEDS; b++) {
            char tin[48];
            fmt_T(tin, sizeof tin, x->bed_T_in[b], tu);
            fmt_T(t0, sizeof t0, x->bed_out[b][0]->T, tu);
            fmt_T(t1, sizeof t1, x->bed_out[b][1]->T, tu);
            const char *how = interbed_verb(x, b, ideal_only);
            if (ideal_only)
                fprintf(f, "  bed %zu, %s %s: outlet T = %s, y_%s = %.4f, X(%s) = %s "
                           "(ideal gas)\n",
                        b + 1, how, tin, t1, key, x->bed_out[b][1]->y[k], xl,
                        fmt_X(x1, x->bed_X_out[b][1]));
            else
                fprintf(f, "  bed %zu, %s %s: outlet T = %s, y_%s = %.4f, X(%s) = %s "
                           "(real gas); ideal gas: T = %s, y_%s = %.4f, X(%s) = %s\n",
                        b + 1, how, tin, t0, key, x->bed_out[b][0]->y[k], xl,
                        fmt_X(x0, x->bed_X_out[b][0]), t1, key, x->bed_out[b][1]->y[k], xl,
                        fmt_X(x1, x->bed_X_out[b][1]));
        }
    }
}

/* The members of one adiabatic outlet, model [0] and ideal gas [1]: "T_out_K": ...,
 * "T_out_ideal_K", "conversion_real", "conversion_ideal", "y_out": {...}, "y_out_ideal". */
static void json_outlet(FILE *f, const kphi_rxnset *set, const double T_out[2],
                        const double X_out[2], const kphi_equil_result *const out[2])
{
    fputs("\"T_out_K\": ", f);
    jnum(f, T_out[0]);
    fputs(", \"T_out_ideal_K\": ", f);
    jnum(f, T_out[1]);
    fputs(", \"conversion_real\": ", f);
    jnum(f, X_out[0]);
    fputs(", \"conversion_ideal\": ", f);
    jnum(f, X_out[1]);
    for (int m = 0; m < 2; m++) {
        fputs(m == 0 ? ", \"y_out\": {" : ", \"y_out_ideal\": {", f);
        for (size_t i = 0; i < kphi_rxnset_n_species(set); i++) {
            if (i > 0)
                fputs(", ", f);
            jstr(f, kphi_rxnset_species(set, i)->name);
            fputs(": ", f);
            jnum(f, out[m]->y[i]);
        }
        fputc('}', f);
    }
}

void kphi__report_energy_json(FILE *f, const kphi_report_point *pt)
{
    const kphi_report_energy *x = pt->energy;
    if (x == NULL)
        return;
    const kphi_rxnset *set = pt->set;
    double T = kphi__report_point_T(pt);
    if (x->outlet_approach) {
        fputs(", \"approach_dT\": {\"dT_K\": ", f);
        jnum(f, x->outlet_dT);
        fputs(", \"T_eq_K\": ", f);
        jnum(f, pt->real->T);
        fputc('}', f);
    }
    if (x->reaction_approach)
        reaction_approach_json(f, pt, T);
    if (x->approach) {
        fputs(", \"approach\": {\"species\": ", f);
        jstr(f, kphi_rxnset_species(set, x->approach_species)->name);
        fputs(", \"y_measured\": ", f);
        jnum(f, x->y_measured);
        fputs(", \"T_eq_K\": ", f);
        jnum(f, x->T_eq[0]);
        fputs(", \"T_eq_ideal_K\": ", f);
        jnum(f, x->T_eq[1]);
        fputs(", \"dT_K\": ", f);
        jnum(f, x->T_eq[0] - T);
        fputs(", \"dT_ideal_K\": ", f);
        jnum(f, x->T_eq[1] - T);
        fputc('}', f);
    }
    if (x->adiabatic) {
        fputs(", \"adiabatic\": {", f);
        json_outlet(f, set, x->T_out, x->X_out, x->out);
        if (x->n_beds > 1) {
            fputs(", \"beds\": [", f);
            for (size_t b = 1; b < x->n_beds && b < KPHI_REPORT_MAX_BEDS; b++) {
                fprintf(f, "%s{\"bed\": %zu, \"T_in_K\": ", b > 1 ? ", " : "", b + 1);
                jnum(f, x->bed_T_in[b]);
                fputs(", ", f);
                const double T_out[2] = {x->bed_out[b][0]->T, x->bed_out[b][1]->T};
                json_outlet(f, set, T_out, x->bed_X_out[b], x->bed_out[b]);
                fputc('}', f);
            }
            fputc(']', f);
        }
        fputc('}', f);
    }
}

void kphi__report_energy_csv(FILE *f, const kphi_rxnset *set, const kphi_report_energy *x, double T,
                       kphi__energy_csv_mode mode)
{
    if (x == NULL)
        return;
    size_t s = kphi_rxnset_n_species(set);
    if (x->outlet_approach) {
        if (mode == KPHI__ENERGY_CSV_HEADER) {
            fputs(",approach_dT_K,T_eq_K", f);
        } else {
            fputc(',', f);
            cnum(f, x->outlet_dT);
            fputc(',', f);
            if (mode == KPHI__ENERGY_CSV_ROW)
                cnum(f, T + x->outlet_dT);
        }
    }
    for (size_t j = 0; x->reaction_approach && j < kphi_rxnset_n_reactions(set); j++) {
        if (mode == KPHI__ENERGY_CSV_HEADER) {
            fprintf(f, ",rxn%zu_T_eq_K,rxn%zu_T_eq_ideal_K,rxn%zu_dT_K,rxn%zu_dT_ideal_K", j + 1,
                    j + 1, j + 1, j + 1);
        } else if (mode == KPHI__ENERGY_CSV_EMPTY) {
            fputs(",,,,", f);
        } else {
            const double v[4] = {x->rxn[0][j].T_eq, x->rxn[1][j].T_eq, x->rxn[0][j].T_eq - T,
                                 x->rxn[1][j].T_eq - T};
            for (size_t k = 0; k < 4; k++) {
                fputc(',', f);
                cnum(f, v[k]);
            }
        }
    }
    if (x->approach) {
        if (mode == KPHI__ENERGY_CSV_HEADER) {
            fputs(",approach_species,y_measured,T_eq_K,T_eq_ideal_K,dT_K,dT_ideal_K", f);
        } else if (mode == KPHI__ENERGY_CSV_EMPTY) {
            fputs(",,,,,,", f);
        } else {
            fprintf(f, ",%s", kphi_rxnset_species(set, x->approach_species)->name);
            const double v[5] = {x->y_measured, x->T_eq[0], x->T_eq[1], x->T_eq[0] - T,
                                 x->T_eq[1] - T};
            for (size_t k = 0; k < 5; k++) {
                fputc(',', f);
                cnum(f, v[k]);
            }
        }
    }
    if (x->adiabatic) {
        if (mode == KPHI__ENERGY_CSV_HEADER) {
            fputs(",T_out_K,T_out_ideal_K,X_adiabatic_real,X_adiabatic_ideal", f);
            for (int m = 0; m < 2; m++)
                for (size_t i = 0; i < s; i++)
                    fprintf(f, ",y_out_%s%s", m == 0 ? "" : "ideal_",
                            kphi_rxnset_species(set, i)->name);
        } else if (mode == KPHI__ENERGY_CSV_EMPTY) {
            for (size_t k = 0; k < 4 + 2 * s; k++)
                fputc(',', f);
        } else {
            const double v[4] = {x->T_out[0], x->T_out[1], x->X_out[0], x->X_out[1]};
            for (size_t k = 0; k < 4; k++) {
                fputc(',', f);
                cnum(f, v[k]);
            }
            for (int m = 0; m < 2; m++)
                for (size_t i = 0; i < s; i++) {
                    fputc(',', f);
                    cnum(f, x->out[m]->y[i]);
                }
        }
        const char *key = kphi_rxnset_species(set, x->key_species)->name;
        for (size_t b = 1; b < x->n_beds && b < KPHI_REPORT_MAX_BEDS; b++) {
            if (mode == KPHI__ENERGY_CSV_HEADER) {
                fprintf(f,
                        ",bed%zu_T_in_K,bed%zu_T_out_K,bed%zu_T_out_ideal_K,bed%zu_X_real,"
                        "bed%zu_X_ideal,bed%zu_y_%s,bed%zu_y_ideal_%s",
                        b + 1, b + 1, b + 1, b + 1, b + 1, b + 1, key, b + 1, key);
            } else if (mode == KPHI__ENERGY_CSV_EMPTY) {
                fputs(",,,,,,,", f);
            } else {
                const double v[7] = {x->bed_T_in[b],
                                     x->bed_out[b][0]->T,
                                     x->bed_out[b][1]->T,
                                     x->bed_X_out[b][0],
                                     x->bed_X_out[b][1],
                                     x->bed_out[b][0]->y[x->key_species],
                                     x->bed_out[b][1]->y[x->key_species]};
                for (size_t k = 0; k < 7; k++) {
                    fputc(',', f);
                    cnum(f, v[k]);
                }
            }
        }
    }
}

