/* kphi loop --plot: the loop diagram of a solved loop (kphi_plot_loop_write(),
 * src/plot_loop.c). The streams drawn and tabulated are those of the loop with the
 * real-gas converter (the case's model); the key-figure lines under the table quote the
 * ideal-gas converter beside it. Flows in kmol/h, or mol per 100 mol of make-up when the
 * case gives no rate or production; temperatures and pressures in the case's units. */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "cli.h"
#include "kphi/kphi.h"
#include "kphi/plot.h"

#define KMOL_H 3.6          /* mol/s -> kmol/h */
#define T_D (86400.0 / 1e3) /* kg/s -> t/d */

/* "460 °C", "733.15 K": a temperature in the display unit. */
static void temp_text(char *buf, size_t n, double T, const char *unit)
{
    double v;
    if (!isfinite(T) || kphi_units_temperature_to(T, unit, &v) != KPHI_OK) {
        snprintf(buf, n, "-");
        return;
    }
    int deg = strcmp(unit, "C") == 0 || strcmp(unit, "F") == 0;
    snprintf(buf, n, "%.4g %s%s", v, deg ? "\xc2\xb0" : "", unit);
}

static void pres_text(char *buf, size_t n, double P, const char *unit)
{
    double v;
    if (kphi_units_pressure_to(P, unit, &v) == KPHI_OK)
        snprintf(buf, n, "%.4g %s", v, unit);
    else
        snprintf(buf, n, "%.4g bar", P / 1e5);
}

/* The product rate as the table shows it: t/d with a rate, mol/100 mol on a basis. */
static void product_text(char *buf, size_t n, const kphi_report_loop *lp,
                         const kphi_loop_result *r, double M)
{
    if (lp->basis)
        snprintf(buf, n, "%.3f mol/100 mol make-up", r->product_rate);
    else
        snprintf(buf, n, "%.1f t/d", r->product_rate * M * T_D);
}

int kphi_cli_loop_plot(const kphi_case *cs, const kphi_report_loop *lp, const char *path,
                       kphi_error *err)
{
    const kphi_rxnset *set = lp->set;
    const kphi_loop_spec *sp = lp->spec;
    const kphi_loop_result *re = lp->res[0], *id = lp->res[1];
    const char *tu = lp->T_unit != NULL ? lp->T_unit : "C";
    const char *pu = lp->P_unit != NULL ? lp->P_unit : "bar";
    long p = re->product;
    const char *pname = p >= 0 ? kphi_rxnset_species(set, (size_t)p)->name : "product";
    double M = p >= 0 ? kphi_rxnset_species(set, (size_t)p)->molar_mass : NAN;

    kphi_plot_loop d;
    memset(&d, 0, sizeof d);
    d.title = kphi_case_name(cs);
    d.product = pname;
    d.flow_unit = lp->basis ? "mol/100 mol make-up" : "kmol/h";
    d.T_unit = tu;
    d.P_unit = pu;
    d.makeup_at_separator = sp->makeup_at == KPHI_LOOP_MAKEUP_AT_SEPARATOR;
    for (int k = 0; k < KPHI_PLOT_LOOP_STREAMS && k < KPHI_LOOP_N_STREAMS; k++) {
        const kphi_loop_stream *st = &re->stream[k];
        d.stream[k].flow = st->total * (lp->basis ? 1.0 : KMOL_H);
        d.stream[k].T = st->T;
        d.stream[k].P = st->P;
        d.stream[k].y_product = p >= 0 && st->total > 0.0 ? st->n[p] / st->total : NAN;
    }

    /* the boxes' notes */
    /* duties: MW, or on a basis kJ per mol of make-up (the loop is solved for 100 mol/s) */
    const char *du = lp->basis ? "kJ/mol" : "MW";
    double dscale = lp->basis ? 1e-3 / 100.0 : 1e-6;
    char conv[2][64], cool[2][64], sep[2][64], comp[64], purge[2][64], a[32], b[32];
    if (sp->converter == KPHI_LOOP_ISOTHERMAL) {
        temp_text(a, sizeof a, sp->T_out, tu);
        snprintf(conv[0], sizeof conv[0], "outlet %s", a);
    } else {
        temp_text(a, sizeof a, sp->T_in[0], tu);
        snprintf(conv[0], sizeof conv[0], "%zu adiabatic bed%s", sp->n_beds,
                 sp->n_beds > 1 ? "s" : "");
        snprintf(conv[1], sizeof conv[1], "inlet %s", a);
    }
    if (sp->converter == KPHI_LOOP_ISOTHERMAL)
        snprintf(conv[1], sizeof conv[1], "releases %.3g %s", re->converter_duty * dscale, du);
    temp_text(a, sizeof a, sp->T_sep, tu);
    snprintf(cool[0], sizeof cool[0], "to %s", a);
    snprintf(cool[1], sizeof cool[1], "removes %.3g %s", re->cooler_duty * dscale, du);
    pres_text(b, sizeof b, sp->P_sep, pu);
    snprintf(sep[0], sizeof sep[0], "%s", a);
    snprintf(sep[1], sizeof sep[1], "%s", b);
    pres_text(b, sizeof b, sp->P, pu);
    snprintf(comp, sizeof comp, "back to %s", b);
    snprintf(purge[0], sizeof purge[0], "%.3g %% of the vapour", 100.0 * re->purge_fraction);
    purge[1][0] = '\0';
    if (sp->purge == KPHI_LOOP_PURGE_INERTS)
        snprintf(purge[1], sizeof purge[1], "for %.3g %% inerts", 100.0 * sp->inerts_target);
    const char *cn[2] = {conv[0], conv[1]}, *cl[2] = {cool[0], cool[1]};
    const char *sn[2] = {sep[0], sep[1]}, *cp[2] = {comp, NULL};
    memcpy(d.converter_note, cn, sizeof cn);
    memcpy(d.cooler_note, cl, sizeof cl);
    memcpy(d.separator_note, sn, sizeof sn);
    memcpy(d.compressor_note, cp, sizeof cp);
    d.purge_note[0] = purge[0];
    d.purge_note[1] = purge[1];

    /* caption: set, models, loop pressure, converter, purge */
    char cap[512];
    size_t used = 0;
    pres_text(b, sizeof b, sp->P, pu);
    kphi_eos_model sm = kphi_eos_get_model(lp->sep);
    size_t n = sizeof cap;
    if (sm == lp->model)
        kphi_cli_append(cap, n, &used, "%s; %s; loop %s", kphi_rxnset_name(set),
                        kphi_eos_model_title(lp->model), b);
    else
        kphi_cli_append(cap, n, &used, "%s; converter %s, separator %s; loop %s",
                        kphi_rxnset_name(set), kphi_eos_model_title(lp->model),
                        kphi_eos_model_title(sm), b);
    if (sp->approach > 0.0)
        kphi_cli_append(cap, n, &used, "; approach %.3g K", sp->approach);
    if (sp->purge == KPHI_LOOP_PURGE_FRACTION)
        kphi_cli_append(cap, n, &used, "; purge %.3g %% of the separator vapour",
                        100.0 * sp->purge_fraction);
    else
        kphi_cli_append(cap, n, &used, "; purge for %.3g %% inerts at the converter inlet",
                        100.0 * sp->inerts_target);
    if (sp->K_basis != KPHI_K_TABLES)
        kphi_cli_append(cap, n, &used, "; K: %s", kphi_rxnset_K_basis_name(set, sp->K_basis));
    d.caption = cap;

    /* key figures: the real-gas converter drawn, the ideal-gas one beside it */
    char n1[320], n2[320], pr[64], pi[64];
    product_text(pr, sizeof pr, lp, re, M);
    snprintf(n1, sizeof n1,
             "Streams above: real-gas converter (%s). %s %s, per-pass %s conversion %.1f %%, "
             "recycle ratio %.2f.",
             kphi_eos_model_name(lp->model), pname, pr, kphi_rxnset_conversion_label(set),
             100.0 * re->per_pass_conversion, re->recycle_ratio);
    d.notes[0] = n1;
    if (id != NULL) {
        product_text(pi, sizeof pi, lp, id, M);
        double diff = re->product_rate - id->product_rate;
        char dd[64];
        if (lp->basis)
            snprintf(dd, sizeof dd, "%+.3f", diff);
        else
            snprintf(dd, sizeof dd, "%+.1f t/d", diff * M * T_D);
        snprintf(n2, sizeof n2,
                 "Ideal-gas converter, same make-up: %s %s (the real gas makes %s), recycle "
                 "ratio %.2f.",
                 pname, pi, dd, id->recycle_ratio);
        d.notes[1] = n2;
    }
    d.notes[2] = lp->basis ? "Flows per 100 mol of make-up and duties per mol of it (the case "
                             "gives no rate). Equilibrium limits for screening, not a design "
                             "basis."
                           : "Equilibrium limits for screening, not a design basis.";
    return kphi_plot_loop_write(&d, path, err);
}
