/* kphi report, phases: the answer of a flash (`kphi flash`) as a table, CSV or JSON, and
 * the phase block that solve's answers carry when the gas condenses.
 *
 * Molar enthalpy of a phase: h = sum_i y_i h_i°(T) + h_dep(T, P, y), h_i° from the
 * species' NASA polynomials on the elemental reference scale (kphi_thermo_h()) and
 * h_dep the EOS departure of that phase's root; so a liquid's enthalpy holds its heat of
 * condensation as the EOS gives it. */
#include "kphi/report.h"

#include <math.h>
#include <string.h>

#include "kphi/thermo.h"
#include "kphi/units.h"
#include "report_internal.h"

#define jnum kphi__report_jnum
#define jstr kphi__report_jstr
#define cnum kphi__report_cnum

static const char *phase_label(const kphi_flash_result *ph, size_t k)
{
    if (ph->n_phases == 2 && ph->phase[0].kind == ph->phase[1].kind)
        return k == 0 ? (ph->phase[0].kind == KPHI_PHASE_LIQUID ? "liquid 1" : "vapour 1")
                      : (ph->phase[1].kind == KPHI_PHASE_LIQUID ? "liquid 2" : "vapour 2");
    return kphi_phase_kind_name(ph->phase[k].kind);
}

/* ---------------------------------------------------------------- table */

void kphi_report_phases_table(FILE *out, const kphi_rxnset *set, const kphi_flash_result *ph)
{
    size_t s = kphi_rxnset_n_species(set);
    if (ph->n_phases < 2) {
        fprintf(out, "phases: one %s phase (the stability test finds no second phase)\n",
                ph->phase[0].kind == KPHI_PHASE_LIQUID ? "liquid-like" : "gas-like");
        return;
    }
    fprintf(out, "phases: two, %s %.2f %% and %s %.2f %% of the total (molar)\n",
            phase_label(ph, 0), 100.0 * ph->phase[0].fraction, phase_label(ph, 1),
            100.0 * ph->phase[1].fraction);
    char h0[24], h1[24];
    snprintf(h0, sizeof h0, "%s y", phase_label(ph, 0));
    snprintf(h1, sizeof h1, "%s x", phase_label(ph, 1));
    fprintf(out, "%-8s %12s %12s %12s %11s %11s\n", "species", h0, h1, "K = y/x", "phi y",
            "phi x");
    for (size_t i = 0; i < s; i++)
        fprintf(out, "%-8s %12.6g %12.6g %12.5g %11.5g %11.5g\n",
                kphi_rxnset_species(set, i)->name, ph->phase[0].y[i], ph->phase[1].y[i],
                ph->K[i], exp(ph->phase[0].lnphi[i]), exp(ph->phase[1].lnphi[i]));
    fprintf(out, "%-8s %12.5f %12.5f\n", "Z", ph->phase[0].Z, ph->phase[1].Z);
}

/* "50.44 C (323.59 K)" in the case's unit. */
static void fmt_temp(char *buf, size_t n, double T, const char *unit)
{
    double Tu;
    if (unit == NULL || strcmp(unit, "K") == 0 || kphi_units_temperature_to(T, unit, &Tu) != 0)
        snprintf(buf, n, "%.2f K", T);
    else
        snprintf(buf, n, "%.2f %s (%.2f K)", Tu, unit, T);
}

static void saturation_lines(FILE *out, const kphi_report_flash *fl)
{
    const kphi_flash_result *ph = fl->flash;
    double Pu;
    const char *pu = fl->P_unit != NULL ? fl->P_unit : "bar";
    if (kphi_units_pressure_to(ph->P, pu, &Pu) != 0) {
        pu = "bar";
        Pu = ph->P / 1e5;
    }
    char lo[48], hi[48], t[48];
    fmt_temp(lo, sizeof lo, fl->T_search_lo, fl->T_unit);
    fmt_temp(hi, sizeof hi, fl->T_search_hi, fl->T_unit);
    if (fl->dew_found) {
        fmt_temp(t, sizeof t, fl->T_dew, fl->T_unit);
        fprintf(out, "dew point at %.4g %s: %s (a liquid forms when the mixture is cooled "
                     "below it)\n",
                Pu, pu, t);
    } else {
        fprintf(out, "dew point at %.4g %s: none between %s and %s\n", Pu, pu, lo, hi);
    }
    if (fl->bubble_found) {
        fmt_temp(t, sizeof t, fl->T_bubble, fl->T_unit);
        fprintf(out, "bubble point at %.4g %s: %s (a vapour forms when the liquid is heated "
                     "above it)\n",
                Pu, pu, t);
    } else {
        fprintf(out, "bubble point at %.4g %s: none between %s and %s (the mixture does not "
                     "condense completely there: it holds a gas far above its critical "
                     "point)\n",
                Pu, pu, lo, hi);
    }
}

static void alpha_lines(FILE *out, const kphi_rxnset *set, const kphi_eos *eos)
{
    size_t s = kphi_rxnset_n_species(set);
    for (size_t i = 0; i < s; i++) {
        const kphi_alpha_spec *a = kphi_eos_alpha(eos, i);
        if (a == NULL)
            continue;
        fprintf(out, "alpha of %s: %s, c = [", kphi_rxnset_species(set, i)->name,
                kphi_alpha_form_name(a->form));
        for (size_t k = 0; k < a->n_c; k++)
            fprintf(out, "%s%.6g", k > 0 ? ", " : "", a->c[k]);
        fputs("]\n", out);
    }
}

static int flash_table(FILE *out, const kphi_report_flash *fl, kphi_error *err)
{
    const kphi_rxnset *set = fl->set;
    const kphi_flash_result *ph = fl->flash;
    size_t s = kphi_rxnset_n_species(set);
    kphi_eos_model model = kphi_eos_get_model(fl->eos);
    fprintf(out, "%s: %s", kphi_rxnset_name(set), fl->dew_only ? "dew and bubble points" : "flash");
    if (fl->source != NULL)
        fprintf(out, "  (%s)", fl->source);
    fputc('\n', out);
    char tb[64];
    fmt_temp(tb, sizeof tb, ph->T, fl->T_unit);
    double Pu;
    const char *pu = fl->P_unit != NULL ? fl->P_unit : "bar";
    if (kphi_units_pressure_to(ph->P, pu, &Pu) != 0) {
        pu = "bar";
        Pu = ph->P / 1e5;
    }
    if (fl->dew_only)
        fprintf(out, "P = %.4g %s   EOS: %s, %s\n", Pu, pu, kphi_eos_model_name(model),
                kphi_eos_model_title(model));
    else
        fprintf(out, "T = %s   P = %.4g %s   EOS: %s, %s\n", tb, Pu, pu,
                kphi_eos_model_name(model), kphi_eos_model_title(model));
    double total = 0.0;
    for (size_t i = 0; i < s; i++)
        total += fl->feed[i];
    if (!fl->dew_only) {
        if (ph->n_phases == 2)
            fprintf(out, "two phases: %s %.4g and %s %.4g of the %.5g fed (%.2f %% and %.2f %%, "
                         "molar)\n\n",
                    phase_label(ph, 0), ph->phase[0].fraction * total, phase_label(ph, 1),
                    ph->phase[1].fraction * total, total, 100.0 * ph->phase[0].fraction,
                    100.0 * ph->phase[1].fraction);
        else
            fprintf(out, "one phase, %s-like: the stability test finds no second phase\n\n",
                    ph->phase[0].kind == KPHI_PHASE_LIQUID ? "liquid" : "gas");
        size_t np = ph->n_phases;
        fprintf(out, "%-8s %11s %9s", "species", "feed", "z");
        char h[2][24];
        for (size_t k = 0; k < np; k++) {
            snprintf(h[k], sizeof h[k], "%s %s", phase_label(ph, k), k == 0 ? "y" : "x");
            fprintf(out, " %12s", np == 2 ? h[k] : phase_label(ph, k));
        }
        if (np == 2)
            fprintf(out, " %11s", "K = y/x");
        for (size_t k = 0; k < np; k++) {
            char b[24];
            snprintf(b, sizeof b, "phi %s", np == 2 ? (k == 0 ? "y" : "x") : "");
            fprintf(out, " %10s", b);
        }
        fputc('\n', out);
        for (size_t i = 0; i < s; i++) {
            fprintf(out, "%-8s %11.5g %9.5f", kphi_rxnset_species(set, i)->name, fl->feed[i],
                    fl->feed[i] / total);
            for (size_t k = 0; k < np; k++)
                fprintf(out, " %12.6g", ph->phase[k].y[i]);
            if (np == 2)
                fprintf(out, " %11.5g", ph->K[i]);
            for (size_t k = 0; k < np; k++)
                fprintf(out, " %10.5g", exp(ph->phase[k].lnphi[i]));
            fputc('\n', out);
        }
        fprintf(out, "%-30s", "amount");
        for (size_t k = 0; k < np; k++)
            fprintf(out, " %12.6g", ph->phase[k].fraction * total);
        fprintf(out, "\n%-30s", "Z");
        for (size_t k = 0; k < np; k++)
            fprintf(out, " %12.5f", ph->phase[k].Z);
        fprintf(out, "\n%-30s", "molar volume, cm3/mol");
        for (size_t k = 0; k < np; k++)
            fprintf(out, " %12.5g", ph->phase[k].v * 1e6);
        fprintf(out, "\n%-30s", "molar enthalpy, kJ/mol");
        for (size_t k = 0; k < np; k++)
            fprintf(out, " %12.5g", kphi_phase_molar_enthalpy(set, ph, k) / 1e3);
        fputs("\n  (enthalpy on the elemental reference scale: ideal-gas h° plus the EOS "
              "departure)\n",
              out);
        if (np == 2)
            fprintf(out, "largest |ln f_vapour - ln f_liquid| %.1e   material balance %.1e   "
                         "iterations %d\n",
                    ph->residual, ph->balance_error, ph->iterations);
    }
    saturation_lines(out, fl);
    alpha_lines(out, set, fl->eos);
    fputs("Phase equilibrium for screening, not a design basis.\n", out);
    return kphi__report_io_error(out, err);
}

/* ---------------------------------------------------------------- JSON */

static void json_species_map(FILE *out, const kphi_rxnset *set, const double v[], int use_exp)
{
    size_t s = kphi_rxnset_n_species(set);
    fputc('{', out);
    for (size_t i = 0; i < s; i++) {
        if (i > 0)
            fputs(", ", out);
        jstr(out, kphi_rxnset_species(set, i)->name);
        fputs(": ", out);
        jnum(out, use_exp ? exp(v[i]) : v[i]);
    }
    fputc('}', out);
}

void kphi_report_phases_json(FILE *out, const kphi_rxnset *set, const kphi_flash_result *ph)
{
    fputc('[', out);
    for (size_t k = 0; k < ph->n_phases; k++) {
        const kphi_phase_state *a = &ph->phase[k];
        fputs(k > 0 ? ", {\"kind\": " : "{\"kind\": ", out);
        jstr(out, kphi_phase_kind_name(a->kind));
        fputs(", \"fraction\": ", out);
        jnum(out, a->fraction);
        fputs(", \"y\": ", out);
        json_species_map(out, set, a->y, 0);
        fputs(", \"phi\": ", out);
        json_species_map(out, set, a->lnphi, 1);
        fputs(", \"Z\": ", out);
        jnum(out, a->Z);
        fputs(", \"v_m3_mol\": ", out);
        jnum(out, a->v);
        fputs(", \"h_J_mol\": ", out);
        jnum(out, kphi_phase_molar_enthalpy(set, ph, k));
        fputc('}', out);
    }
    fputc(']', out);
}

void kphi_report_alpha_json(FILE *out, const kphi_rxnset *set, const kphi_eos *eos)
{
    size_t s = kphi_rxnset_n_species(set);
    int first = 1;
    fputc('[', out);
    for (size_t i = 0; i < s; i++) {
        const kphi_alpha_spec *a = kphi_eos_alpha(eos, i);
        if (a == NULL)
            continue;
        fputs(first ? "{\"species\": " : ", {\"species\": ", out);
        first = 0;
        jstr(out, kphi_rxnset_species(set, i)->name);
        fputs(", \"form\": ", out);
        jstr(out, kphi_alpha_form_name(a->form));
        fputs(", \"constants\": [", out);
        for (size_t k = 0; k < a->n_c; k++) {
            if (k > 0)
                fputs(", ", out);
            jnum(out, a->c[k]);
        }
        fputs("], \"source\": ", out);
        jstr(out, a->source != NULL ? a->source : "");
        fputc('}', out);
    }
    fputc(']', out);
}

/* Nonzero k_ij of the model as [{"pair": [A, B], "value": k}]. */
void kphi__report_kij_json(FILE *out, const kphi_rxnset *set, const kphi_eos *eos)
{
    size_t s = kphi_rxnset_n_species(set);
    int first = 1;
    fputc('[', out);
    for (size_t i = 0; i < s; i++)
        for (size_t j = i + 1; j < s; j++) {
            double k = kphi_eos_get_kij(eos, i, j);
            if (k == 0.0)
                continue;
            fputs(first ? "{\"pair\": [" : ", {\"pair\": [", out);
            first = 0;
            jstr(out, kphi_rxnset_species(set, i)->name);
            fputs(", ", out);
            jstr(out, kphi_rxnset_species(set, j)->name);
            fputs("], \"value\": ", out);
            jnum(out, k);
            fputc('}', out);
        }
    fputc(']', out);
}

static int flash_json(FILE *out, const kphi_report_flash *fl, kphi_error *err)
{
    const kphi_rxnset *set = fl->set;
    const kphi_flash_result *ph = fl->flash;
    size_t s = kphi_rxnset_n_species(set);
    fputs("{\"case\": ", out);
    jstr(out, fl->source != NULL ? fl->source : "");
    fputs(", \"T_K\": ", out);
    jnum(out, fl->dew_only ? NAN : ph->T);
    fputs(", \"P_bar\": ", out);
    jnum(out, ph->P / 1e5);
    fputs(", \"eos\": ", out);
    jstr(out, kphi_eos_model_name(kphi_eos_get_model(fl->eos)));
    fputs(", \"kij\": ", out);
    kphi__report_kij_json(out, set, fl->eos);
    fputs(", \"alpha\": ", out);
    kphi_report_alpha_json(out, set, fl->eos);
    fputs(", \"feed\": ", out);
    json_species_map(out, set, fl->feed, 0);
    if (!fl->dew_only) {
        fputs(", \"phases\": ", out);
        kphi_report_phases_json(out, set, ph);
        fputs(", \"K_values\": ", out);
        if (ph->n_phases == 2) {
            json_species_map(out, set, ph->K, 0);
        } else {
            fputc('{', out);
            for (size_t i = 0; i < s; i++) {
                fputs(i > 0 ? ", " : "", out);
                jstr(out, kphi_rxnset_species(set, i)->name);
                fputs(": null", out);
            }
            fputc('}', out);
        }
        fputs(", \"residual\": ", out);
        jnum(out, ph->residual);
        fputs(", \"balance_error\": ", out);
        jnum(out, ph->balance_error);
        fprintf(out, ", \"iterations\": %d", ph->iterations);
    }
    fputs(", \"dew_point_K\": ", out);
    jnum(out, fl->dew_found ? fl->T_dew : NAN);
    fputs(", \"bubble_point_K\": ", out);
    jnum(out, fl->bubble_found ? fl->T_bubble : NAN);
    fputs(", \"search_range_K\": [", out);
    jnum(out, fl->T_search_lo);
    fputs(", ", out);
    jnum(out, fl->T_search_hi);
    fputc(']', out);
    if (fl->note != NULL) {
        fputs(", \"note\": ", out);
        jstr(out, fl->note);
    }
    fputs("}\n", out);
    return kphi__report_io_error(out, err);
}

/* ---------------------------------------------------------------- CSV */

int kphi_report_flash_csv_header(FILE *out, const kphi_rxnset *set, kphi_error *err)
{
    size_t s = kphi_rxnset_n_species(set);
    fputs("T_K,P_bar,vapour_fraction", out);
    const char *pre[] = {"z_", "y_", "x_", "K_"};
    for (size_t k = 0; k < 4; k++)
        for (size_t i = 0; i < s; i++)
            fprintf(out, ",%s%s", pre[k], kphi_rxnset_species(set, i)->name);
    fputs(",Z_vapour,Z_liquid,dew_point_K,bubble_point_K,status,message\n", out);
    return kphi__report_io_error(out, err);
}

/* A CSV text field: quoted, quotes doubled, line breaks dropped (RFC 4180 sec. 2). */
static void csv_text(FILE *out, const char *s)
{
    fputc('"', out);
    for (const char *p = s; *p; p++) {
        if (*p == '"')
            fputc('"', out);
        if (*p != '\n' && *p != '\r')
            fputc(*p, out);
    }
    fputc('"', out);
}

int kphi_report_flash_csv_row(FILE *out, const kphi_report_flash *fl, kphi_error *err)
{
    const kphi_rxnset *set = fl->set;
    const kphi_flash_result *ph = fl->flash;
    size_t s = kphi_rxnset_n_species(set);
    double total = 0.0;
    for (size_t i = 0; i < s; i++)
        total += fl->feed[i];
    /* which phase is the vapour, which the liquid */
    const kphi_phase_state *V = NULL, *L = NULL;
    if (ph->n_phases == 2) {
        V = &ph->phase[0];
        L = &ph->phase[1];
    } else if (ph->phase[0].kind == KPHI_PHASE_LIQUID) {
        L = &ph->phase[0];
    } else {
        V = &ph->phase[0];
    }
    cnum(out, fl->dew_only ? NAN : ph->T);
    fputc(',', out);
    cnum(out, ph->P / 1e5);
    fputc(',', out);
    if (!fl->dew_only)
        cnum(out, V != NULL ? V->fraction : 0.0);
    for (size_t i = 0; i < s; i++) {
        fputc(',', out);
        cnum(out, fl->feed[i] / total);
    }
    for (size_t i = 0; i < s; i++) {
        fputc(',', out);
        if (V != NULL && !fl->dew_only)
            cnum(out, V->y[i]);
    }
    for (size_t i = 0; i < s; i++) {
        fputc(',', out);
        if (L != NULL && !fl->dew_only)
            cnum(out, L->y[i]);
    }
    for (size_t i = 0; i < s; i++) {
        fputc(',', out);
        if (ph->n_phases == 2 && !fl->dew_only)
            cnum(out, ph->K[i]);
    }
    fputc(',', out);
    if (V != NULL && !fl->dew_only)
        cnum(out, V->Z);
    fputc(',', out);
    if (L != NULL && !fl->dew_only)
        cnum(out, L->Z);
    fputc(',', out);
    cnum(out, fl->dew_found ? fl->T_dew : NAN);
    fputc(',', out);
    cnum(out, fl->bubble_found ? fl->T_bubble : NAN);
    fputs(",ok,", out);
    if (fl->note != NULL)
        csv_text(out, fl->note);
    fputc('\n', out);
    return kphi__report_io_error(out, err);
}

int kphi_report_flash_csv_failed_row(FILE *out, const kphi_rxnset *set, const double feed[],
                                     double T, double P, const char *message, kphi_error *err)
{
    size_t s = kphi_rxnset_n_species(set);
    double total = 0.0;
    for (size_t i = 0; i < s; i++)
        total += feed[i];
    cnum(out, T);
    fputc(',', out);
    cnum(out, P / 1e5);
    fputc(',', out);
    for (size_t i = 0; i < s; i++) {
        fputc(',', out);
        cnum(out, feed[i] / total);
    }
    for (size_t k = 0; k < 3 * s + 4; k++) /* y, x, K, Z_vapour, Z_liquid, dew, bubble */
        fputc(',', out);
    fputs(",failed,", out);
    csv_text(out, message != NULL ? message : "failed");
    fputc('\n', out);
    return kphi__report_io_error(out, err);
}

int kphi_report_flash_json_failed(FILE *out, const char *source, double T, double P,
                                  const char *message, kphi_error *err)
{
    fputs("{\"case\": ", out);
    jstr(out, source != NULL ? source : "");
    fputs(", \"T_K\": ", out);
    jnum(out, T);
    fputs(", \"P_bar\": ", out);
    jnum(out, P / 1e5);
    fputs(", \"status\": \"failed\", \"message\": ", out);
    jstr(out, message != NULL ? message : "failed");
    fputs("}\n", out);
    return kphi__report_io_error(out, err);
}



int kphi_report_flash_write(FILE *out, kphi_report_format fmt, const kphi_report_flash *fl,
                            kphi_error *err)
{
    switch (fmt) {
    case KPHI_REPORT_JSON:
        return flash_json(out, fl, err);
    case KPHI_REPORT_CSV: {
        int rc = kphi_report_flash_csv_header(out, fl->set, err);
        return rc == KPHI_OK ? kphi_report_flash_csv_row(out, fl, err) : rc;
    }
    default:
        return flash_table(out, fl, err);
    }
}
