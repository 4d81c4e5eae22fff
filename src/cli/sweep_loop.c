/* kphi sweep --loop: the case's synthesis loop over converter temperature x loop pressure
 * (kphi_sweep_loop_run(), src/sweep_loop.c), as CSV (two rows per grid point, the
 * real-gas converter then the ideal-gas converter, with the columns of `kphi loop
 * --format csv`) or JSON lines (one object per point), and a chart of the liquid product
 * and the recycle ratio against loop pressure, one line per converter temperature.
 *
 * The grid: the sweep's T axis read as converter temperatures (outlet of an isothermal
 * converter, first bed inlet of adiabatic beds) and its P axis as loop pressures; the
 * separator keeps the case's pressure drop (kphi_case_loop_grid()). The make-up is the
 * case's at every point: its `rate`, or with `production` the make-up that makes the
 * production at the case's own T and P (solved once before the grid), or 100 mol/s on a
 * per-100-mol basis; so the product rate shows how the loop answers a change of pressure
 * or temperature with the same make-up. The equivalent ideal-gas pressure of `kphi loop`
 * is not searched per point (it costs a loop solve per Brent step). */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"
#include "kphi/kphi.h"
#include "kphi/plot.h"
#include "kphi/sweep.h"

#define T_D (86400.0 / 1e3) /* kg/s -> t/d */

typedef struct {
    FILE *out;
    kphi_report_format fmt;
    const kphi_rxnset *set;
    kphi_plot_data *plot;
    int basis;       /* flows per 100 mol of make-up */
    double M;        /* molar mass of the product, kg/mol */
    size_t failed;   /* loops that failed (real and ideal counted apart) */
    size_t K_basis;  /* the converter's K basis */
    /* points whose real-gas converter used reaction j's K correlation outside its range */
    size_t K_outside[KPHI_CLI_K_COUNT_MAX];
    kphi_error err;
} loop_sweep_ctx;

/* Count the reactions whose K correlation was used outside its range at the real-gas
 * converter's equilibrium temperatures (outlet + approach, or every bed's). */
static void count_K_outside(loop_sweep_ctx *c, const kphi_loop_spec *sp,
                            const kphi_loop_result *r)
{
    if (r == NULL)
        return;
    for (size_t j = 0; j < kphi_rxnset_n_reactions(c->set) && j < KPHI_CLI_K_COUNT_MAX; j++) {
        const kphi_rxnset_kcorr *k = kphi_rxnset_kcorr_get(c->set, j, c->K_basis);
        size_t nb = sp->converter == KPHI_LOOP_ADIABATIC ? r->n_beds : 1;
        int out = 0;
        for (size_t b = 0; k != NULL && b < nb && b < KPHI_LOOP_MAX_BEDS; b++) {
            double T = (sp->converter == KPHI_LOOP_ADIABATIC ? r->bed_T_out[b] : sp->T_out) +
                       sp->approach;
            out |= !kphi_rxnset_kcorr_in_range(k, T);
        }
        c->K_outside[j] += out;
    }
}

/* The product rate as the chart shows it: t/d, or mol per 100 mol of make-up. */
static double product_shown(const loop_sweep_ctx *c, const kphi_loop_result *r)
{
    if (r == NULL)
        return NAN;
    return c->basis ? r->product_rate : r->product_rate * c->M * T_D;
}

static int emit_loop(void *vc, size_t iT, size_t iP, const kphi_sweep_loop_point *pt)
{
    loop_sweep_ctx *c = vc;
    int rc = KPHI_OK;
    const char *why[2];
    for (int m = 0; m < 2; m++) {
        why[m] = pt->failure[m] != NULL ? pt->failure[m]->msg : NULL;
        c->failed += pt->loop[m] == NULL;
    }
    if (c->fmt == KPHI_REPORT_JSON) {
        rc = kphi_report_loop_json_point(c->out, c->set, pt->spec, pt->loop, why, &c->err);
    } else {
        static const char *const conv[2] = {"real", "ideal"};
        for (int m = 0; m < 2 && rc == KPHI_OK; m++)
            rc = pt->loop[m] != NULL
                     ? kphi_report_loop_csv_row(c->out, c->set, conv[m], pt->spec, pt->loop[m],
                                                &c->err)
                     : kphi_report_loop_csv_failed_row(c->out, c->set, conv[m], pt->spec,
                                                       why[m], &c->err);
    }
    count_K_outside(c, pt->spec, pt->loop[0]);
    if (c->plot != NULL)
        kphi_plot_data_set_loop(c->plot, iT, iP, product_shown(c, pt->loop[0]),
                                product_shown(c, pt->loop[1]),
                                pt->loop[0] != NULL ? pt->loop[0]->recycle_ratio : NAN,
                                pt->loop[1] != NULL ? pt->loop[1]->recycle_ratio : NAN);
    return rc;
}

/* Options that mean nothing for a loop sweep: 0, or the exit code after saying so. */
static int refuse_options(const kphi_cli_sweep_args *a)
{
    if (a->feed != NULL)
        return kphi_cli_refuse("--feed", "a loop sweep is fed by the loop block's make-up; "
                                         "change 'makeup' in the case instead");
    if (a->adiabatic)
        return kphi_cli_refuse("--adiabatic", "a loop sweep takes its converter from the loop "
                                              "block ('converter: {T_in: ...}' for adiabatic "
                                              "beds)");
    if (a->phases != NULL)
        return kphi_cli_refuse("--phases", "a loop's converter is the gas-phase equilibrium "
                                           "and its separator always a flash");
    if (a->eos != NULL && strcmp(a->eos, "all") == 0)
        return kphi_cli_refuse("--eos", "a loop sweep needs one converter model, not 'all'");
    if (a->K != NULL && strcmp(a->K, "all") == 0)
        return kphi_cli_refuse("--K", "'all' is for solve; sweep one K basis at a time");
    if (a->plot_kind != NULL && strcmp(a->plot_kind, "loop") != 0)
        return kphi_cli_refuse("--plot-kind", "sweep --loop draws the chart 'loop' (product "
                                              "and recycle ratio against loop pressure)");
    if (a->plot_kind != NULL && a->plot == NULL)
        return kphi_cli_refuse("--plot-kind", "it chooses the chart of --plot, which is not "
                                              "given; add --plot FILE");
    if (a->plot_ideal != NULL && a->plot == NULL)
        return kphi_cli_refuse("--plot-ideal", "there is no chart to draw; add --plot FILE");
    return 0;
}

/* The case with the command line's values, checked for a loop sweep; NULL after an
 * error report (*code the exit code). */
static kphi_case *load_case(const char *path, const kphi_cli_sweep_args *a, int *code)
{
    kphi_error err;
    kphi_error_clear(&err);
    char species[1024];
    kphi_case *cs =
        kphi_case_load_file_default(path, kphi_cli_species_default(species, sizeof species), &err);
    if (cs == NULL) {
        *code = kphi_cli_report(&err, path);
        return NULL;
    }
    int rc = KPHI_OK;
    if (kphi_case_get_loop(cs) == NULL)
        rc = kphi_case_validate_loop(cs, &err); /* says there is no loop block */
    if (rc == KPHI_OK && a->T != NULL)
        rc = kphi_cli_option_error(kphi_case_set_sweep_T(cs, a->T, &err), "--T", &err);
    if (rc == KPHI_OK && a->P != NULL)
        rc = kphi_cli_option_error(kphi_case_set_sweep_P(cs, a->P, &err), "--P", &err);
    if (rc == KPHI_OK && a->eos != NULL)
        rc = kphi_cli_option_error(kphi_case_set_eos(cs, a->eos, &err), "--eos", &err);
    if (rc == KPHI_OK && a->purge != NULL)
        rc = kphi_cli_option_error(kphi_case_set_purge(cs, a->purge, &err), "--purge", &err);
    if (rc == KPHI_OK && a->K != NULL)
        rc = kphi_cli_option_error(kphi_case_set_K(cs, a->K, &err), "--K", &err);
    if (rc == KPHI_OK)
        rc = kphi_case_require_one_K(cs, &err);
    if (a->quantum)
        kphi_case_set_quantum(cs, 1);
    if (rc == KPHI_OK && isnan(kphi_case_P(cs))) {
        kphi_mark top = {1, 1};
        rc = kphi_error_set(&err, KPHI_EINPUT, path, top,
                            "missing P: the loop pressure is the case's P (the separator "
                            "keeps its pressure drop over the sweep); add 'P: 195 bar'");
    }
    if (rc == KPHI_OK)
        rc = kphi_case_validate_loop(cs, &err);
    if (rc != KPHI_OK) {
        *code = kphi_cli_report(&err, path);
        kphi_case_free(cs);
        return NULL;
    }
    return cs;
}

/* The caption of the chart: reaction set, make-up, model, separator, purge. */
static void loop_caption(char *cap, size_t n, const kphi_case *cs, const kphi_loop_spec *sp,
                         kphi_eos_model model, int basis)
{
    const kphi_rxnset *set = kphi_case_rxnset(cs);
    const kphi_case_loop *g = kphi_case_get_loop(cs);
    size_t s = kphi_rxnset_n_species(set), used = 0;
    double tot = 0.0;
    for (size_t i = 0; i < s; i++)
        tot += g->makeup[i];
    cap[0] = '\0';
    kphi_cli_append(cap, n, &used, "%s; make-up", kphi_rxnset_name(set));
    for (size_t i = 0, k = 0; i < s; i++)
        if (g->makeup[i] > 0.0)
            kphi_cli_append(cap, n, &used, "%s %s %.3g", k++ ? "," : "",
                            kphi_rxnset_species(set, i)->name, 100.0 * g->makeup[i] / tot);
    double Tsep;
    if (kphi_units_temperature_to(sp->T_sep, "C", &Tsep) != KPHI_OK)
        Tsep = sp->T_sep - 273.15;
    kphi_cli_append(cap, n, &used, " mol %%; %s; separator %.4g \xc2\xb0" "C, loop P - %.3g bar; ",
                    kphi_eos_model_name(model), Tsep, (sp->P - sp->P_sep) / 1e5);
    if (sp->purge == KPHI_LOOP_PURGE_FRACTION)
        kphi_cli_append(cap, n, &used, "purge %.3g %%", 100.0 * sp->purge_fraction);
    else
        kphi_cli_append(cap, n, &used, "purge for %.3g %% inerts", 100.0 * sp->inerts_target);
    if (basis)
        kphi_cli_append(cap, n, &used, "; per 100 mol of make-up");
}

int kphi_cli_sweep_loop(const char *path, const kphi_cli_sweep_args *a)
{
    kphi_error err;
    kphi_error_clear(&err);
    const kphi_report_format fmt = a->fmt;
    int code = refuse_options(a);
    if (code != 0)
        return code;
    if (a->plot != NULL && kphi_cli_plot_arg(a->plot, &err) != KPHI_OK)
        return kphi_cli_report(&err, NULL); /* before anything is written */
    int show_ideal = 1;
    if (a->plot_ideal != NULL && kphi_cli_plot_ideal_arg(a->plot_ideal, &show_ideal, &err) !=
                                     KPHI_OK)
        return kphi_cli_report(&err, NULL);

    kphi_case *cs = load_case(path, a, &code);
    if (cs == NULL)
        return code;
    const double *Tg, *Pg;
    size_t nT, nP;
    int rc = kphi_case_loop_grid(cs, &Tg, &nT, &Pg, &nP, &err);
    if (rc == KPHI_OK)
        rc = kphi_cli_grid_limit(nT, nP, a->force, &err);
    if (rc != KPHI_OK) {
        kphi_case_free(cs);
        return kphi_cli_report(&err, path);
    }
    const kphi_case_loop *g = kphi_case_get_loop(cs);
    const kphi_rxnset *set = kphi_case_rxnset(cs);
    size_t s = kphi_rxnset_n_species(set), r = kphi_rxnset_n_reactions(set);
    kphi_eos_model model = kphi_case_eos(cs);
    kphi_eos_model sep_model = kphi_phase_model_ok(model) ? model : KPHI_EOS_PR;
    kphi_eos *conv = kphi_case_make_eos(cs, model, &err);
    kphi_eos *ideal = conv != NULL ? kphi_case_make_eos(cs, KPHI_EOS_IDEAL, &err) : NULL;
    kphi_eos *sep = ideal != NULL ? kphi_case_make_eos(cs, sep_model, &err) : NULL;
    double *mk = calloc(s > 0 ? s : 1, sizeof(double));
    if (conv == NULL || ideal == NULL || sep == NULL || mk == NULL) {
        if (err.code == KPHI_OK)
            kphi_error_set(&err, KPHI_ENOMEM, NULL, (kphi_mark){0, 0}, "out of memory");
        rc = err.code;
    }
    kphi_loop_spec sp;
    int basis = 0;
    if (rc == KPHI_OK)
        basis = kphi_loop_spec_from_case(cs, mk, &sp);
    long prod = kphi_rxnset_first_product(set);
    double M = prod >= 0 ? kphi_rxnset_species(set, (size_t)prod)->molar_mass : NAN;
    if (rc == KPHI_OK && g->flow == KPHI_CASE_MAKEUP_PRODUCTION) {
        /* the make-up that makes the production at the case's own point, held over the grid */
        kphi_loop_work *w = kphi_loop_work_alloc(s, r);
        kphi_loop_result *res = kphi_loop_result_alloc(s);
        if (w == NULL || res == NULL)
            rc = kphi_error_set(&err, KPHI_ENOMEM, NULL, (kphi_mark){0, 0}, "out of memory");
        if (rc == KPHI_OK)
            rc = kphi_loop_solve(set, conv, sep, &sp, NULL, w, res, &err);
        double made = rc == KPHI_OK ? res->product_rate * M : 0.0;
        if (rc == KPHI_OK && !(made > 0.0)) {
            kphi_mark top = {1, 1};
            rc = kphi_error_set(&err, KPHI_EINPUT, path, top,
                                "the loop makes no liquid product at the case's own conditions, "
                                "so no make-up rate gives the production asked for");
        }
        for (size_t i = 0; rc == KPHI_OK && i < s; i++)
            mk[i] *= g->production / made;
        kphi_loop_result_free(res);
        kphi_loop_work_free(w);
    }
    if (rc == KPHI_OK && sep_model != model)
        fprintf(stderr, "%s: warning: the separator uses %s: the '%s' model has no liquid\n",
                path, kphi_eos_model_name(sep_model), kphi_eos_model_name(model));

    loop_sweep_ctx ctx;
    memset(&ctx, 0, sizeof ctx);
    kphi_error_clear(&ctx.err);
    ctx.fmt = fmt;
    ctx.set = set;
    ctx.basis = basis;
    ctx.M = M;
    ctx.K_basis = sp.K_basis;
    int T_given = !(Tg == &g->T_out || Tg == &g->T_in[0]);
    const char *Tu = T_given ? kphi_case_sweep_T_unit(cs) : "C";
    if (rc == KPHI_OK && a->plot != NULL) {
        ctx.plot = kphi_plot_data_alloc(Tg, nT, Pg, nP, r);
        char cap[512];
        loop_caption(cap, sizeof cap, cs, &sp, model, basis);
        if (ctx.plot == NULL ||
            kphi_cli_plot_labels(ctx.plot, cs, model, Tu, kphi_case_sweep_P_unit(cs), NAN) !=
                KPHI_OK ||
            kphi_plot_data_caption(ctx.plot, cap) != KPHI_OK ||
            kphi_plot_data_loop_unit(ctx.plot, basis ? "mol/100 mol make-up" : "t/d") !=
                KPHI_OK ||
            kphi_plot_data_series_heading(ctx.plot, g->adiabatic ? "bed 1 inlet"
                                                                 : "converter outlet") !=
                KPHI_OK)
            rc = kphi_error_set(&err, KPHI_ENOMEM, NULL, (kphi_mark){0, 0},
                                "out of memory for the plot");
        else
            kphi_plot_data_show_ideal(ctx.plot, show_ideal);
    }
    kphi_cli_output o;
    memset(&o, 0, sizeof o);
    if (rc == KPHI_OK)
        rc = kphi_cli_output_open(&o, a->out, &err);
    if (rc == KPHI_OK) {
        ctx.out = o.f;
        if (fmt == KPHI_REPORT_CSV)
            rc = kphi_report_loop_csv_header(o.f, set, &err);
        kphi_sweep_options sopt = kphi_sweep_options_default();
        sopt.threads = a->threads;
        if (rc == KPHI_OK)
            rc = kphi_sweep_loop_run(set, conv, ideal, sep, &sp, Tg, nT, Pg, nP, &sopt,
                                     emit_loop, &ctx, &err);
        if (rc != KPHI_OK && ctx.err.code != KPHI_OK && err.code == KPHI_OK)
            err = ctx.err;
        int rc2 = kphi_cli_output_close(&o, rc == KPHI_OK, &err);
        if (rc == KPHI_OK)
            rc = rc2;
        if (rc == KPHI_OK && ctx.plot != NULL) /* after the rows, which it never costs */
            rc = kphi_plot_write(ctx.plot, KPHI_PLOT_LOOP, a->plot, &err);
    }
    code = 0;
    if (rc != KPHI_OK)
        code = kphi_cli_report(&err, path);
    else if (ctx.failed > 0)
        fprintf(stderr, "%s: warning: %zu of %zu loops failed (real- and ideal-gas converter "
                        "counted apart); their rows say why\n",
                path, ctx.failed, 2 * nT * nP);
    if (rc == KPHI_OK)
        kphi_cli_K_outside_summary(path, set, sp.K_basis, ctx.K_outside, nT * nP,
                                   "the converter equilibrium of ");
    kphi_plot_data_free(ctx.plot);
    free(mk);
    kphi_eos_free(conv);
    kphi_eos_free(ideal);
    kphi_eos_free(sep);
    kphi_case_free(cs);
    return code;
}
