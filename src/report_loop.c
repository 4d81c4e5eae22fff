/* kphi report, the loop: the answer of `kphi loop` as a table (stream table and key
 * figures), CSV (one row per converter model) or JSON (DESIGN.md's loop contract).
 * Flows are in mol/s in the library; the table shows kmol/h and t/d (or mol per 100 mol
 * of make-up when no rate was given), duties in MW. */
#include "kphi/report.h"

#include <math.h>
#include <string.h>

#include "kphi/units.h"
#include "report_internal.h"

#define jnum kphi__report_jnum
#define jstr kphi__report_jstr
#define cnum kphi__report_cnum

#define KMOL_H (3600.0 / 1000.0)    /* mol/s -> kmol/h */
#define T_D (86400.0 / 1000.0)      /* kg/s -> t/d */

static double molar_mass(const kphi_rxnset *set, long i)
{
    return i >= 0 ? kphi_rxnset_species(set, (size_t)i)->molar_mass : NAN;
}

/* ---------------------------------------------------------------- table */

static void temp_cell(char *b, size_t n, double T, const char *unit)
{
    double v;
    if (!isfinite(T))
        snprintf(b, n, "-");
    else if (unit != NULL && kphi_units_temperature_to(T, unit, &v) == 0)
        snprintf(b, n, "%.2f", v);
    else
        snprintf(b, n, "%.2f", T);
}

static double pres_value(double P, const char *unit)
{
    double v;
    if (unit != NULL && kphi_units_pressure_to(P, unit, &v) == 0)
        return v;
    return P / 1e5;
}

static void spec_lines(FILE *out, const kphi_report_loop *lp, const char *tu, const char *pu)
{
    const kphi_loop_spec *sp = lp->spec;
    char a[32], b[32];
    fprintf(out, "loop pressure %.4g %s; ", pres_value(sp->P, pu), pu);
    if (sp->converter == KPHI_LOOP_ISOTHERMAL) {
        temp_cell(a, sizeof a, sp->T_out, tu);
        temp_cell(b, sizeof b, sp->T_out + sp->approach, tu);
        fprintf(out, "converter outlet %s %s", a, tu);
        if (sp->approach > 0.0)
            fprintf(out, ", approach %.4g K (the equilibrium at %s %s)", sp->approach, b, tu);
    } else {
        fprintf(out, "%zu adiabatic bed%s, inlets", sp->n_beds, sp->n_beds > 1 ? "s" : "");
        for (size_t k = 0; k < sp->n_beds; k++) {
            temp_cell(a, sizeof a, sp->T_in[k], tu);
            fprintf(out, "%s %s", k > 0 ? "," : "", a);
        }
        fprintf(out, " %s", tu);
        if (sp->approach > 0.0)
            fprintf(out, ", approach %.4g K", sp->approach);
    }
    temp_cell(a, sizeof a, sp->T_sep, tu);
    fprintf(out, "\nseparator %s %s, %.4g %s; make-up joins at the %s; ", a, tu,
            pres_value(sp->P_sep, pu), pu,
            sp->makeup_at == KPHI_LOOP_MAKEUP_AT_SEPARATOR ? "separator" : "converter");
    if (sp->purge == KPHI_LOOP_PURGE_FRACTION)
        fprintf(out, "purge %.4g %% of the separator vapour\n", 100.0 * sp->purge_fraction);
    else
        fprintf(out, "purge set for %.4g %% inerts at the converter inlet\n",
                100.0 * sp->inerts_target);
}

static void stream_table(FILE *out, const kphi_report_loop *lp, const kphi_loop_result *r,
                         const char *tu, const char *pu)
{
    const kphi_rxnset *set = lp->set;
    size_t s = kphi_rxnset_n_species(set);
    static const char *const heads[KPHI_LOOP_N_STREAMS] = {
        "make-up", "conv. in", "conv. out", "sep. vap.", "liquid", "purge", "recycle"};
    fprintf(out, "%-22s", "stream");
    for (int k = 0; k < KPHI_LOOP_N_STREAMS; k++)
        fprintf(out, " %10s", heads[k]);
    char lab[48];
    snprintf(lab, sizeof lab, "T, %s", tu);
    fprintf(out, "\n%-22s", lab);
    for (int k = 0; k < KPHI_LOOP_N_STREAMS; k++) {
        char c[32];
        temp_cell(c, sizeof c, r->stream[k].T, tu);
        fprintf(out, " %10s", c);
    }
    snprintf(lab, sizeof lab, "P, %s", pu);
    fprintf(out, "\n%-22s", lab);
    for (int k = 0; k < KPHI_LOOP_N_STREAMS; k++)
        fprintf(out, " %10.4g", pres_value(r->stream[k].P, pu));
    fprintf(out, "\n%-22s", lp->basis ? "flow, mol/100 mol" : "flow, kmol/h");
    for (int k = 0; k < KPHI_LOOP_N_STREAMS; k++)
        fprintf(out, " %10.5g", r->stream[k].total * (lp->basis ? 1.0 : KMOL_H));
    fprintf(out, "\n%-22s", lp->basis ? "mass, kg/100 mol" : "mass, t/h");
    for (int k = 0; k < KPHI_LOOP_N_STREAMS; k++)
        fprintf(out, " %10.5g", r->stream[k].mass * (lp->basis ? 1.0 : 3.6));
    fprintf(out, "\n%-22s", "vapour fraction");
    for (int k = 0; k < KPHI_LOOP_N_STREAMS; k++)
        fprintf(out, " %10.4g", r->stream[k].vapour_fraction);
    fputc('\n', out);
    for (size_t i = 0; i < s; i++) {
        snprintf(lab, sizeof lab, "%s, mol %%", kphi_rxnset_species(set, i)->name);
        fprintf(out, "%-22s", lab);
        for (int k = 0; k < KPHI_LOOP_N_STREAMS; k++) {
            const kphi_loop_stream *st = &r->stream[k];
            fprintf(out, " %10.4f", st->total > 0.0 ? 100.0 * st->n[i] / st->total : 0.0);
        }
        fputc('\n', out);
    }
}

/* One key-figure line: label, the two values and their difference (fmt for each). */
static void kline(FILE *out, const char *label, const char *fmt, double a, double b, int two,
                  double scale)
{
    char c1[32], c2[32], c3[32];
    snprintf(c1, sizeof c1, fmt, a * scale);
    if (!isfinite(a))
        snprintf(c1, sizeof c1, "-");
    fprintf(out, "%-44s %12s", label, c1);
    if (two) {
        snprintf(c2, sizeof c2, fmt, b * scale);
        if (!isfinite(b))
            snprintf(c2, sizeof c2, "-");
        char f3[16];
        snprintf(f3, sizeof f3, "%%+%s", fmt + 1);
        snprintf(c3, sizeof c3, f3, (a - b) * scale);
        if (!isfinite(a - b))
            snprintf(c3, sizeof c3, "-");
        fprintf(out, " %12s %12s", c2, c3);
    }
    fputc('\n', out);
}

static int loop_table(FILE *out, const kphi_report_loop *lp, kphi_error *err)
{
    const kphi_rxnset *set = lp->set;
    const kphi_loop_result *re = lp->res[0], *id = lp->res[1];
    int two = id != NULL;
    const char *tu = lp->T_unit != NULL ? lp->T_unit : "C";
    const char *pu = lp->P_unit != NULL ? lp->P_unit : "bar";
    double tmp;
    if (kphi_units_temperature_to(300.0, tu, &tmp) != 0)
        tu = "K";
    if (kphi_units_pressure_to(1e5, pu, &tmp) != 0)
        pu = "bar";
    fprintf(out, "%s: loop", kphi_rxnset_name(set));
    if (lp->source != NULL)
        fprintf(out, "  (%s)", lp->source);
    fputc('\n', out);
    spec_lines(out, lp, tu, pu);
    fprintf(out, "converter EOS: %s, %s (and the ideal gas for comparison); separator EOS: %s\n",
            kphi_eos_model_name(lp->model), kphi_eos_model_title(lp->model),
            kphi_eos_model_name(kphi_eos_get_model(lp->sep)));
    if (lp->spec->K_basis != KPHI_K_TABLES)
        fprintf(out, "converter K: %s (a published correlation; the species' polynomials where "
                     "it has none); energy balances use the polynomials\n",
                kphi_rxnset_K_basis_name(set, lp->spec->K_basis));
    if (lp->basis)
        fputs("flows per 100 mol of make-up (the case gives no make-up rate or production)\n",
              out);
    fputs("\nstreams, real-gas converter\n", out);
    stream_table(out, lp, re, tu, pu);

    long p = re->product;
    const char *pname = p >= 0 ? kphi_rxnset_species(set, (size_t)p)->name : "product";
    const char *key = kphi_rxnset_conversion_label(set);
    fprintf(out, "\n%-44s %12s", "key figures", "real gas");
    if (two)
        fprintf(out, " %12s %12s", "ideal gas", "difference");
    fputc('\n', out);
    char lab[96];
    double M = molar_mass(set, p);
    double r1 = id != NULL ? id->product_rate : NAN;
    if (lp->basis) {
        snprintf(lab, sizeof lab, "%s liquid product, mol/100 mol make-up", pname);
        kline(out, lab, "%.4f", re->product_rate, r1, two, 1.0);
    } else {
        snprintf(lab, sizeof lab, "%s liquid product, t/d", pname);
        kline(out, lab, "%.2f", re->product_rate * M, r1 * M, two, T_D);
        snprintf(lab, sizeof lab, "%s liquid product, kmol/h", pname);
        kline(out, lab, "%.3f", re->product_rate, r1, two, KMOL_H);
    }
    snprintf(lab, sizeof lab, "%s in the liquid, mol %%", pname);
    kline(out, lab, "%.3f", re->purity, id ? id->purity : NAN, two, 100.0);
    snprintf(lab, sizeof lab, "%s in the liquid, mass %%", pname);
    kline(out, lab, "%.3f", re->purity_mass, id ? id->purity_mass : NAN, two, 100.0);
    snprintf(lab, sizeof lab, "per-pass conversion of %s, %%", key);
    kline(out, lab, "%.3f", re->per_pass_conversion, id ? id->per_pass_conversion : NAN, two, 100.0);
    snprintf(lab, sizeof lab, "overall conversion of %s, %%", key);
    kline(out, lab, "%.3f", re->overall_conversion, id ? id->overall_conversion : NAN, two, 100.0);
    kline(out, "recycle ratio (recycle / make-up, molar)", "%.4f", re->recycle_ratio,
          id ? id->recycle_ratio : NAN, two, 1.0);
    kline(out, "purge, % of separator vapour", "%.4f", re->purge_fraction,
          id ? id->purge_fraction : NAN, two, 100.0);
    if (isfinite(re->h2_purge_loss))
        kline(out, "H2 lost in the purge, % of make-up H2", "%.3f", re->h2_purge_loss,
              id ? id->h2_purge_loss : NAN, two, 100.0);
    kline(out, "inerts at converter inlet, mol %", "%.3f", re->inerts_in, id ? id->inerts_in : NAN,
          two, 100.0);
    kline(out, "inerts at converter outlet, mol %", "%.3f", re->inerts_out,
          id ? id->inerts_out : NAN, two, 100.0);
    snprintf(lab, sizeof lab, "%s at converter inlet, mol %%", pname);
    kline(out, lab, "%.3f", re->product_in, id ? id->product_in : NAN, two, 100.0);
    snprintf(lab, sizeof lab, "%s at converter outlet, mol %%", pname);
    kline(out, lab, "%.3f", re->product_out, id ? id->product_out : NAN, two, 100.0);
    if (isfinite(re->sn_makeup)) {
        kline(out, "stoichiometric number (H2-CO2)/(CO+CO2), make-up", "%.4f", re->sn_makeup,
              id ? id->sn_makeup : NAN, two, 1.0);
        kline(out, "stoichiometric number, converter inlet", "%.4f", re->sn_in,
              id ? id->sn_in : NAN, two, 1.0);
        long iw = kphi_rxnset_species_index(set, "H2O");
        const kphi_loop_stream *L = &re->stream[KPHI_LOOP_S_LIQUID];
        if (iw >= 0 && L->mass > 0.0 && p >= 0) {
            fprintf(out, "%-44s %12.3f\n", "crude: product, mass %",
                    100.0 * L->n[p] * M / L->mass);
            fprintf(out, "%-44s %12.3f\n", "crude: water, mass %",
                    100.0 * L->n[iw] * molar_mass(set, iw) / L->mass);
        }
    }
    const char *du = lp->basis ? "kW/100 mol/s" : "MW";
    double dscale = lp->basis ? 1e-3 : 1e-6;
    snprintf(lab, sizeof lab, "converter heat release, %s", du);
    kline(out, lab, "%.4g", re->converter_duty, id ? id->converter_duty : NAN, two, dscale);
    snprintf(lab, sizeof lab, "cooler duty to the separator, %s", du);
    kline(out, lab, "%.4g", re->cooler_duty, id ? id->cooler_duty : NAN, two, dscale);
    if (re->n_beds > 0) {
        for (size_t k = 0; k < re->n_beds; k++) {
            char a[32];
            temp_cell(a, sizeof a, re->bed_T_in[k], tu);
            snprintf(lab, sizeof lab, "bed %zu outlet (inlet %s), %s", k + 1, a, tu);
            double x, y2 = NAN;
            kphi_units_temperature_to(re->bed_T_out[k], tu, &x);
            if (id != NULL)
                kphi_units_temperature_to(id->bed_T_out[k], tu, &y2);
            kline(out, lab, "%.2f", x, y2, two, 1.0);
        }
    }
    if (two) {
        if (isfinite(lp->P_equiv))
            fprintf(out, "equivalent ideal-gas loop pressure: %.4g %s (the ideal-gas converter "
                         "needs %+.4g bar more to make as much %s)\n",
                    pres_value(lp->P_equiv, pu), pu, (lp->P_equiv - lp->spec->P) / 1e5, pname);
        else
            fprintf(out, "equivalent ideal-gas loop pressure: not found (%s)\n",
                    lp->P_equiv_note != NULL ? lp->P_equiv_note : "no pressure matches");
    }
    fprintf(out, "recycle converged in %d Newton steps (residual %.1e); element balance "
                 "make-up = liquid + purge to %.1e\n",
            re->iterations, re->residual, re->balance_error);
    fputs("Equilibrium limits for screening, not a design basis.\n", out);
    return kphi__report_io_error(out, err);
}

/* ---------------------------------------------------------------- JSON */

static void json_stream(FILE *out, const kphi_rxnset *set, const kphi_loop_stream *st)
{
    size_t s = kphi_rxnset_n_species(set);
    fputs("{\"T_K\": ", out);
    jnum(out, st->T);
    fputs(", \"P_bar\": ", out);
    jnum(out, st->P / 1e5);
    fputs(", \"mol_s\": ", out);
    jnum(out, st->total);
    fputs(", \"kg_s\": ", out);
    jnum(out, st->mass);
    fputs(", \"vapour_fraction\": ", out);
    jnum(out, st->vapour_fraction);
    fputs(", \"y\": {", out);
    for (size_t i = 0; i < s; i++) {
        if (i > 0)
            fputs(", ", out);
        jstr(out, kphi_rxnset_species(set, i)->name);
        fputs(": ", out);
        jnum(out, st->total > 0.0 ? st->n[i] / st->total : 0.0);
    }
    fputs("}}", out);
}

static void json_result(FILE *out, const kphi_rxnset *set, const kphi_loop_result *r)
{
    fputs("{\"streams\": {", out);
    for (int k = 0; k < KPHI_LOOP_N_STREAMS; k++) {
        if (k > 0)
            fputs(", ", out);
        jstr(out, kphi_loop_stream_name((kphi_loop_stream_id)k));
        fputs(": ", out);
        json_stream(out, set, &r->stream[k]);
    }
    long p = r->product;
    double M = molar_mass(set, p);
    fputs("}, \"product\": {\"species\": ", out);
    jstr(out, p >= 0 ? kphi_rxnset_species(set, (size_t)p)->name : "");
    fputs(", \"mol_s\": ", out);
    jnum(out, r->product_rate);
    fputs(", \"kmol_h\": ", out);
    jnum(out, r->product_rate * KMOL_H);
    fputs(", \"t_d\": ", out);
    jnum(out, r->product_rate * M * T_D);
    fputs(", \"purity\": ", out);
    jnum(out, r->purity);
    fputs(", \"purity_mass\": ", out);
    jnum(out, r->purity_mass);
    fputs("}", out);
    struct {
        const char *k;
        double v;
    } f[] = {{"per_pass_conversion", r->per_pass_conversion},
             {"overall_conversion", r->overall_conversion},
             {"recycle_ratio", r->recycle_ratio},
             {"purge_fraction", r->purge_fraction},
             {"h2_purge_loss", r->h2_purge_loss},
             {"inerts_converter_in", r->inerts_in},
             {"inerts_converter_out", r->inerts_out},
             {"product_converter_in", r->product_in},
             {"product_converter_out", r->product_out},
             {"stoichiometric_number_makeup", r->sn_makeup},
             {"stoichiometric_number_converter_in", r->sn_in},
             {"converter_duty_kW", r->converter_duty / 1e3},
             {"cooler_duty_kW", r->cooler_duty / 1e3},
             {"residual", r->residual},
             {"balance_error", r->balance_error}};
    for (size_t k = 0; k < sizeof f / sizeof f[0]; k++) {
        fprintf(out, ", \"%s\": ", f[k].k);
        jnum(out, f[k].v);
    }
    fprintf(out, ", \"iterations\": %d", r->iterations);
    long iw = kphi_rxnset_species_index(set, "H2O");
    const kphi_loop_stream *L = &r->stream[KPHI_LOOP_S_LIQUID];
    if (isfinite(r->sn_makeup) && iw >= 0 && p >= 0 && L->mass > 0.0) {
        fputs(", \"crude\": {\"product_mass_pct\": ", out);
        jnum(out, 100.0 * L->n[p] * M / L->mass);
        fputs(", \"H2O_mass_pct\": ", out);
        jnum(out, 100.0 * L->n[iw] * molar_mass(set, iw) / L->mass);
        fputc('}', out);
    }
    if (r->n_beds > 0) {
        fputs(", \"beds\": [", out);
        for (size_t k = 0; k < r->n_beds; k++) {
            fputs(k > 0 ? ", {\"T_in_K\": " : "{\"T_in_K\": ", out);
            jnum(out, r->bed_T_in[k]);
            fputs(", \"T_out_K\": ", out);
            jnum(out, r->bed_T_out[k]);
            fputc('}', out);
        }
        fputc(']', out);
    }
    fputc('}', out);
}

static int loop_json(FILE *out, const kphi_report_loop *lp, kphi_error *err)
{
    const kphi_rxnset *set = lp->set;
    fputs("{\"case\": ", out);
    jstr(out, lp->source != NULL ? lp->source : "");
    fputs(", \"reaction_set\": ", out);
    jstr(out, kphi_rxnset_name(set));
    fputs(", \"eos\": ", out);
    jstr(out, kphi_eos_model_name(lp->model));
    fputs(", \"K_basis\": ", out);
    jstr(out, kphi_rxnset_K_basis_name(set, lp->spec->K_basis));
    fputs(", \"separator_eos\": ", out);
    jstr(out, kphi_eos_model_name(kphi_eos_get_model(lp->sep)));
    fputs(", \"P_bar\": ", out);
    jnum(out, lp->spec->P / 1e5);
    fprintf(out, ", \"basis\": \"%s\"", lp->basis ? "per 100 mol of make-up" : "mol/s");
    fputs(", \"kij\": ", out);
    kphi__report_kij_json(out, set, lp->sep);
    fputs(", \"alpha\": ", out);
    kphi_report_alpha_json(out, set, lp->sep);
    fputs(", \"real\": ", out);
    json_result(out, set, lp->res[0]);
    if (lp->res[1] != NULL) {
        fputs(", \"ideal\": ", out);
        json_result(out, set, lp->res[1]);
        double M = molar_mass(set, lp->res[0]->product);
        double d = lp->res[0]->product_rate - lp->res[1]->product_rate;
        fputs(", \"shift\": {\"product_rate\": ", out);
        jnum(out, d);
        fputs(", \"product_t_d\": ", out);
        jnum(out, d * M * T_D);
        fputs(", \"P_equiv_ideal_bar\": ", out);
        jnum(out, lp->P_equiv / 1e5);
        if (!isfinite(lp->P_equiv)) {
            fputs(", \"P_equiv_note\": ", out);
            jstr(out, lp->P_equiv_note != NULL ? lp->P_equiv_note : "not found");
        }
        fputc('}', out);
    }
    fputs("}\n", out);
    return kphi__report_io_error(out, err);
}

/* ---------------------------------------------------------------- CSV */

int kphi_report_loop_csv_header(FILE *out, const kphi_rxnset *set, kphi_error *err)
{
    size_t s = kphi_rxnset_n_species(set);
    fputs("converter,P_bar,T_conv_K,T_sep_K,P_sep_bar,product_mol_s,product_t_d,purity,"
          "per_pass_conversion,overall_conversion,recycle_ratio,purge_fraction,h2_purge_loss,"
          "inerts_converter_in,inerts_converter_out,product_converter_in,"
          "product_converter_out,converter_duty_kW,cooler_duty_kW",
          out);
    for (int k = 0; k < KPHI_LOOP_N_STREAMS; k++)
        fprintf(out, ",%s_mol_s", kphi_loop_stream_name((kphi_loop_stream_id)k));
    for (size_t i = 0; i < s; i++)
        fprintf(out, ",y_converter_in_%s", kphi_rxnset_species(set, i)->name);
    for (size_t i = 0; i < s; i++)
        fprintf(out, ",y_converter_out_%s", kphi_rxnset_species(set, i)->name);
    for (size_t i = 0; i < s; i++)
        fprintf(out, ",x_liquid_%s", kphi_rxnset_species(set, i)->name);
    fputs(",iterations,balance_error,status,message\n", out);
    return kphi__report_io_error(out, err);
}

int kphi_report_loop_csv_row(FILE *out, const kphi_rxnset *set, const char *converter,
                             const kphi_loop_spec *sp, const kphi_loop_result *r,
                             kphi_error *err)
{
    size_t s = kphi_rxnset_n_species(set);
    double M = molar_mass(set, r->product);
    double Tc = sp->converter == KPHI_LOOP_ADIABATIC ? sp->T_in[0] : sp->T_out;
    double v[] = {sp->P / 1e5,
                  Tc,
                  sp->T_sep,
                  sp->P_sep / 1e5,
                  r->product_rate,
                  r->product_rate * M * T_D,
                  r->purity,
                  r->per_pass_conversion,
                  r->overall_conversion,
                  r->recycle_ratio,
                  r->purge_fraction,
                  r->h2_purge_loss,
                  r->inerts_in,
                  r->inerts_out,
                  r->product_in,
                  r->product_out,
                  r->converter_duty / 1e3,
                  r->cooler_duty / 1e3};
    fputs(converter, out);
    for (size_t k = 0; k < sizeof v / sizeof v[0]; k++) {
        fputc(',', out);
        cnum(out, v[k]);
    }
    for (int k = 0; k < KPHI_LOOP_N_STREAMS; k++) {
        fputc(',', out);
        cnum(out, r->stream[k].total);
    }
    const kphi_loop_stream *ci = &r->stream[KPHI_LOOP_S_CONVERTER_IN],
                           *co = &r->stream[KPHI_LOOP_S_CONVERTER_OUT],
                           *L = &r->stream[KPHI_LOOP_S_LIQUID];
    for (size_t i = 0; i < s; i++) {
        fputc(',', out);
        cnum(out, ci->n[i] / ci->total);
    }
    for (size_t i = 0; i < s; i++) {
        fputc(',', out);
        cnum(out, co->n[i] / co->total);
    }
    for (size_t i = 0; i < s; i++) {
        fputc(',', out);
        if (L->total > 0.0)
            cnum(out, L->n[i] / L->total);
    }
    fprintf(out, ",%d,", r->iterations);
    cnum(out, r->balance_error);
    fputs(",ok,\n", out);
    return kphi__report_io_error(out, err);
}

/* A CSV text field: quoted, quotes doubled, line breaks dropped (RFC 4180 sec. 2). */
static void csv_text(FILE *out, const char *s)
{
    fputc('"', out);
    for (const char *p = s != NULL ? s : ""; *p; p++) {
        if (*p == '"')
            fputc('"', out);
        if (*p != '\n' && *p != '\r')
            fputc(*p, out);
    }
    fputc('"', out);
}

int kphi_report_loop_csv_failed_row(FILE *out, const kphi_rxnset *set, const char *converter,
                                    const kphi_loop_spec *sp, const char *message,
                                    kphi_error *err)
{
    size_t s = kphi_rxnset_n_species(set);
    double Tc = sp->converter == KPHI_LOOP_ADIABATIC ? sp->T_in[0] : sp->T_out;
    double v[] = {sp->P / 1e5, Tc, sp->T_sep, sp->P_sep / 1e5};
    fputs(converter, out);
    for (size_t k = 0; k < sizeof v / sizeof v[0]; k++) {
        fputc(',', out);
        cnum(out, v[k]);
    }
    /* the other 14 key figures, 7 stream flows, 3 compositions, iterations, balance */
    for (size_t k = 0; k < 14 + KPHI_LOOP_N_STREAMS + 3 * s + 2; k++)
        fputc(',', out);
    fputs(",failed,", out);
    csv_text(out, message);
    fputc('\n', out);
    return kphi__report_io_error(out, err);
}

int kphi_report_loop_json_point(FILE *out, const kphi_rxnset *set, const kphi_loop_spec *sp,
                                const kphi_loop_result *const res[2],
                                const char *const failure[2], kphi_error *err)
{
    double Tc = sp->converter == KPHI_LOOP_ADIABATIC ? sp->T_in[0] : sp->T_out;
    fputs("{\"P_bar\": ", out);
    jnum(out, sp->P / 1e5);
    fputs(", \"T_conv_K\": ", out);
    jnum(out, Tc);
    fputs(", \"T_sep_K\": ", out);
    jnum(out, sp->T_sep);
    fputs(", \"P_sep_bar\": ", out);
    jnum(out, sp->P_sep / 1e5);
    static const char *const key[2] = {"real", "ideal"};
    for (int m = 0; m < 2; m++) {
        fprintf(out, ", \"%s\": ", key[m]);
        if (res[m] != NULL) {
            json_result(out, set, res[m]);
        } else {
            fputs("{\"status\": \"failed\", \"message\": ", out);
            jstr(out, failure[m] != NULL ? failure[m] : "failed");
            fputc('}', out);
        }
    }
    if (res[0] != NULL && res[1] != NULL) {
        double M = molar_mass(set, res[0]->product);
        double d = res[0]->product_rate - res[1]->product_rate;
        fputs(", \"shift\": {\"product_rate\": ", out);
        jnum(out, d);
        fputs(", \"product_t_d\": ", out);
        jnum(out, d * M * T_D);
        fputc('}', out);
    }
    fputs("}\n", out);
    return kphi__report_io_error(out, err);
}

int kphi_report_loop_write(FILE *out, kphi_report_format fmt, const kphi_report_loop *lp,
                           kphi_error *err)
{
    switch (fmt) {
    case KPHI_REPORT_JSON:
        return loop_json(out, lp, err);
    case KPHI_REPORT_CSV: {
        int rc = kphi_report_loop_csv_header(out, lp->set, err);
        if (rc == KPHI_OK)
            rc = kphi_report_loop_csv_row(out, lp->set, "real", lp->spec, lp->res[0], err);
        if (rc == KPHI_OK && lp->res[1] != NULL)
            rc = kphi_report_loop_csv_row(out, lp->set, "ideal", lp->spec, lp->res[1], err);
        return rc;
    }
    default:
        return loop_table(out, lp, err);
    }
}
