/* kphi solve --plot: the equilibrium curve of the case (the product's equilibrium mole
 * fraction against T at the case's P and feed, real gas and ideal gas), with the path of
 * the adiabatic beds over it when --adiabatic or --intercool gave them.
 *
 * Beds in series with indirect cooling keep the element amounts of the converter feed, so
 * every bed's equilibrium lies on this one curve: a bed runs from the inlet point
 * (T_in, y_in) to the outlet (T_out, y_out) on the curve, drawn as a straight segment (the
 * path inside the bed depends on kinetics; for one reaction and constant heat capacity it
 * is the straight adiabatic operating line); the interbed exchanger then moves the gas
 * back to T_in of the next bed at constant y. The curve is
 * drawn over the temperatures of the case and of the beds, 30 K beyond on either side,
 * within the species' data range; 81 points, solved by kphi_sweep_run() as a one-pressure
 * grid (a point where a model fails is left out and the line breaks there). The solved
 * point of the case is marked on the curve.
 *
 * Also here: the texts every chart of a case carries (title, caption), shared with
 * sweep --plot. */
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"
#include "kphi/kphi.h"
#include "kphi/plot.h"
#include "kphi/sweep.h"

enum { CURVE_POINTS = 81 };

/* What the sweep callback fills: the plot data and the product shown. */
typedef struct {
    kphi_plot_data *d;
    long key;
} curve_ctx;

/* [lo, hi]: the temperatures to show, within the data range of every species. */
static void curve_range(const kphi_rxnset *set, double T, const kphi_cli_beds *b, double *lo,
                        double *hi)
{
    double a = T, z = T;
    for (size_t k = 0; b != NULL && k < b->n_beds; k++)
        for (int m = 0; m < 2; m++) {
            a = fmin(a, fmin(b->T_in[k], b->out[k][m]->T));
            z = fmax(z, fmax(b->T_in[k], b->out[k][m]->T));
        }
    a -= 30.0;
    z += 30.0;
    for (size_t i = 0; i < kphi_rxnset_n_species(set); i++) {
        const kphi_species *sp = kphi_rxnset_species(set, i);
        a = fmax(a, sp->T_low);
        z = fmin(z, sp->T_high);
    }
    *lo = a;
    *hi = z;
}

/* The path of one model (m = 0 the case's model, 1 the ideal gas): inlet and outlet of
 * every bed, the product's mole fraction carried through each interbed exchanger. */
static int add_bed_path(kphi_plot_data *d, const kphi_rxnset *set, const double *feed,
                        const kphi_cli_beds *b, size_t key, int m, int ideal)
{
    double T[2 * KPHI_REPORT_MAX_BEDS], y[2 * KPHI_REPORT_MAX_BEDS];
    double nt = 0.0;
    for (size_t i = 0; i < kphi_rxnset_n_species(set); i++)
        nt += feed[i];
    double y_in = nt > 0.0 ? feed[key] / nt : NAN;
    size_t n = 0;
    for (size_t k = 0; k < b->n_beds && k < KPHI_REPORT_MAX_BEDS; k++) {
        T[n] = b->T_in[k];
        y[n++] = y_in;
        T[n] = b->out[k][m]->T;
        y[n++] = b->out[k][m]->y[key];
        y_in = b->out[k][m]->y[key];
    }
    return kphi_plot_data_add_path(d, T, y, n, ideal);
}

/* The sweep's callback: each solved temperature goes into the plot data. */
static int store_point(void *ctx, size_t iT, size_t iP, double T, double P,
                       const kphi_report_point *pt, const kphi_error *failure)
{
    (void)T;
    (void)P;
    (void)failure;
    const curve_ctx *c = ctx;
    if (pt != NULL)
        kphi_cli_plot_store(c->d, iT, iP, pt, c->key);
    return 0;
}

int kphi_cli_plot_ideal_arg(const char *text, int *show, kphi_error *err)
{
    kphi_mark top = {1, 1};
    if (strcmp(text, "yes") == 0 || strcmp(text, "no") == 0) {
        *show = text[0] == 'y';
        return KPHI_OK;
    }
    return kphi_error_set(err, KPHI_EINPUT, "<command line>", top,
                          "--plot-ideal: expected yes or no, found '%.60s'", text);
}

void kphi_cli_append(char *buf, size_t n, size_t *used, const char *fmt, ...)
{
    if (*used >= n)
        return;
    va_list ap;
    va_start(ap, fmt);
    int w = vsnprintf(buf + *used, n - *used, fmt, ap);
    va_end(ap);
    if (w > 0)
        *used = *used + (size_t)w < n ? *used + (size_t)w : n - 1;
}

int kphi_cli_plot_labels(kphi_plot_data *d, const kphi_case *cs, kphi_eos_model model,
                         const char *T_unit, const char *P_unit, double P_at)
{
    const kphi_rxnset *set = kphi_case_rxnset(cs);
    size_t r = kphi_rxnset_n_reactions(set), s = kphi_rxnset_n_species(set);
    const char *eqs[64];
    for (size_t j = 0; j < r && j < 64; j++)
        eqs[j] = kphi_rxnset_equation(set, j);
    /* the case's name (its `name:`, else its file's stem) */
    const char *title = kphi_case_name(cs);
    /* caption: reaction set; feed in mol %; model; the pressure it was drawn at */
    char cap[512];
    size_t used = 0;
    kphi_cli_append(cap, sizeof cap, &used, "%s; feed (mol %%)", kphi_rxnset_name(set));
    const double *feed = kphi_case_feed(cs);
    double tot = 0.0;
    for (size_t i = 0; i < s; i++)
        tot += feed[i];
    for (size_t i = 0, k = 0; i < s && tot > 0.0; i++)
        if (feed[i] > 0.0)
            kphi_cli_append(cap, sizeof cap, &used, "%s %s %.3g", k++ ? "," : "",
                   kphi_rxnset_species(set, i)->name, 100.0 * feed[i] / tot);
    kphi_cli_append(cap, sizeof cap, &used, "; %s", kphi_eos_model_title(model));
    size_t kb = kphi_case_K_basis(cs);
    if (kb != KPHI_K_TABLES)
        kphi_cli_append(cap, sizeof cap, &used, "; K: %s", kphi_rxnset_K_basis_name(set, kb));
    double v;
    if (isfinite(P_at) && kphi_units_pressure_to(P_at, P_unit, &v) == KPHI_OK)
        kphi_cli_append(cap, sizeof cap, &used, "; at %.4g %s", v, P_unit);
    long key = kphi_rxnset_first_product(set);
    if (kphi_plot_data_labels(d, title, kphi_rxnset_conversion_label(set),
                              key >= 0 ? kphi_rxnset_species(set, (size_t)key)->name : "", T_unit,
                              P_unit, eqs) != KPHI_OK ||
        kphi_plot_data_caption(d, cap) != KPHI_OK)
        return KPHI_ENOMEM;
    return KPHI_OK;
}

int kphi_cli_solve_plot(const kphi_case *cs, kphi_eos_model model, const kphi_report_point *pt,
                        const kphi_cli_beds *beds, int show_ideal, const char *path,
                        kphi_error *err)
{
    kphi_mark none = {0, 0};
    const kphi_rxnset *set = kphi_case_rxnset(cs);
    size_t r = kphi_rxnset_n_reactions(set);
    long key = kphi_rxnset_first_product(set);
    if (key < 0)
        return kphi_error_set(err, KPHI_EINPUT, path, none,
                              "--plot: the reaction set has no reaction, so no equilibrium curve");
    const double *feed = kphi_case_feed(cs);
    double P = kphi_case_P(cs), lo, hi;
    curve_range(set, kphi_case_T(cs), beds, &lo, &hi);
    double Tg[CURVE_POINTS];
    for (int k = 0; k < CURVE_POINTS; k++)
        Tg[k] = lo + (hi - lo) * (double)k / (CURVE_POINTS - 1);

    kphi_eos *eos = kphi_case_make_eos(cs, model, err);
    kphi_eos *ig = eos != NULL ? kphi_case_make_eos(cs, KPHI_EOS_IDEAL, err) : NULL;
    kphi_plot_data *d = kphi_plot_data_alloc(Tg, CURVE_POINTS, &P, 1, r);
    int rc = KPHI_OK;
    if (eos == NULL || ig == NULL)
        rc = err->code != KPHI_OK ? (int)err->code : KPHI_ENOMEM;
    else if (d == NULL)
        rc = kphi_error_set(err, KPHI_ENOMEM, NULL, none, "out of memory for the plot");
    if (rc == KPHI_OK) {
        kphi_plot_data_show_ideal(d, show_ideal);
        if (pt != NULL && pt->real != NULL && pt->ideal != NULL)
            kphi_plot_data_set_point(d, pt->real->T, pt->real->y[key], pt->ideal->y[key]);
        if (kphi_cli_plot_labels(d, cs, model, kphi_case_T_unit(cs), kphi_case_P_unit(cs), P) !=
            KPHI_OK)
            rc = kphi_error_set(err, KPHI_ENOMEM, NULL, none, "out of memory for the plot");
    }
    if (rc == KPHI_OK) {
        curve_ctx c = {d, key};
        kphi_sweep_options opt = kphi_sweep_options_default();
        opt.threads = 1; /* 81 points: not worth waking a thread pool */
        opt.equiv_pressure = 0; /* the curve needs no equivalent pressures */
        opt.equil.K_basis = kphi_case_K_basis(cs); /* one basis: solve refuses --K all here */
        rc = kphi_sweep_run(set, eos, ig, feed, Tg, CURVE_POINTS, &P, 1, &opt, store_point, &c,
                            err);
    }
    if (rc == KPHI_OK && beds != NULL && beds->n_beds > 0) {
        int only_ideal = model == KPHI_EOS_IDEAL;
        int p1 = add_bed_path(d, set, feed, beds, (size_t)key, only_ideal ? 1 : 0, 0);
        int p2 = only_ideal ? KPHI_OK : add_bed_path(d, set, feed, beds, (size_t)key, 1, 1);
        if (p1 != KPHI_OK || p2 != KPHI_OK)
            rc = kphi_error_set(err, KPHI_ENOMEM, NULL, none, "out of memory for the plot");
    }
    if (rc == KPHI_OK)
        rc = kphi_plot_write(d, KPHI_PLOT_CURVE, path, err);
    kphi_plot_data_free(d);
    kphi_eos_free(ig);
    kphi_eos_free(eos);
    return rc;
}
