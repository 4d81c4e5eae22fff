/* kphi sweep --flash: the case's feed flashed over its T x P grid without reaction
 * (kphi_sweep_flash_run(), src/sweep_flash.c), the separator designer's question over a
 * range: how much product stays in the vapour (and so goes round with the recycle), how
 * much liquid drops out, what dissolves in it. CSV rows with the columns of `kphi flash
 * --format csv` (T_K, P_bar, vapour_fraction, z_, y_ (vapour), x_ (liquid), K_, Z of
 * each phase, the dew and bubble points of the feed at that P), or JSON lines (each the
 * object `kphi flash --format json` prints at that T and P), and the chart 'separator':
 * the product's mole fraction in the vapour against separator temperature, one line per
 * pressure. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"
#include "kphi/kphi.h"
#include "kphi/plot.h"
#include "kphi/sweep.h"


typedef struct {
    FILE *out;
    kphi_report_format fmt;
    kphi_report_flash fl; /* set, feed, eos, units, source: the same for every point */
    kphi_plot_data *plot;
    long product;
    size_t failed;
    kphi_error err;
} flash_sweep_ctx;

static int emit_flash(void *vc, size_t iT, size_t iP, double T, double P,
                      const kphi_sweep_flash_point *pt)
{
    flash_sweep_ctx *c = vc;
    int rc;
    if (pt->flash == NULL) {
        c->failed++;
        const char *why = pt->failure != NULL ? pt->failure->msg : "failed";
        rc = c->fmt == KPHI_REPORT_JSON
                 ? kphi_report_flash_json_failed(c->out, c->fl.source, T, P, why, &c->err)
                 : kphi_report_flash_csv_failed_row(c->out, c->fl.set, c->fl.feed, T, P, why,
                                                    &c->err);
        return rc;
    }
    kphi_report_flash fl = c->fl;
    fl.flash = pt->flash;
    fl.dew_found = pt->dew_found;
    fl.bubble_found = pt->bubble_found;
    fl.T_dew = pt->T_dew;
    fl.T_bubble = pt->T_bubble;
    fl.note = pt->sat_note;
    rc = c->fmt == KPHI_REPORT_JSON ? kphi_report_flash_write(c->out, KPHI_REPORT_JSON, &fl,
                                                              &c->err)
                                    : kphi_report_flash_csv_row(c->out, &fl, &c->err);
    if (c->plot != NULL && c->product >= 0) {
        /* the product in the vapour: the lighter phase of a split, the feed when it is all
         * gas, none when it is all liquid */
        const kphi_flash_result *f = pt->flash;
        double y = NAN;
        if (f->n_phases == 2 || f->phase[0].kind == KPHI_PHASE_VAPOUR)
            y = f->phase[0].y[c->product];
        kphi_plot_data_set_flash(c->plot, iT, iP, y);
    }
    return rc;
}

static int refuse_options(const kphi_cli_sweep_args *a)
{
    if (a->adiabatic)
        return kphi_cli_refuse("--adiabatic", "a flash has no reaction and no bed; leave it out "
                                              "with --flash");
    if (a->K != NULL)
        return kphi_cli_refuse("--K", "a flash has no reaction, so no K; leave it out with "
                                      "--flash");
    if (a->phases != NULL)
        return kphi_cli_refuse("--phases", "a flash always finds the phases; leave it out with "
                                           "--flash");
    if (a->purge != NULL)
        return kphi_cli_refuse("--purge", "the purge belongs to a loop sweep (--loop)");
    if (a->eos != NULL && strcmp(a->eos, "all") == 0)
        return kphi_cli_refuse("--eos", "a flash needs one model (rk, srk or pr), not 'all'");
    if (a->plot_kind != NULL && strcmp(a->plot_kind, "separator") != 0)
        return kphi_cli_refuse("--plot-kind", "sweep --flash draws the chart 'separator' (the "
                                              "product left in the vapour against separator "
                                              "temperature)");
    if (a->plot_kind != NULL && a->plot == NULL)
        return kphi_cli_refuse("--plot-kind", "it chooses the chart of --plot, which is not "
                                              "given; add --plot FILE");
    if (a->plot_ideal != NULL)
        return kphi_cli_refuse("--plot-ideal", "the separator chart has no ideal-gas lines (an "
                                               "ideal gas does not condense)");
    return 0;
}

int kphi_cli_sweep_flash(const char *path, const kphi_cli_sweep_args *a)
{
    kphi_error err;
    kphi_error_clear(&err);
    const kphi_report_format fmt = a->fmt;
    int code = refuse_options(a);
    if (code != 0)
        return code;
    if (a->plot != NULL && kphi_cli_plot_arg(a->plot, &err) != KPHI_OK)
        return kphi_cli_report(&err, NULL); /* before anything is written */

    char species[1024];
    kphi_case *cs =
        kphi_case_load_file_default(path, kphi_cli_species_default(species, sizeof species), &err);
    if (cs == NULL)
        return kphi_cli_report(&err, path);
    kphi_cli_overrides ov = {a->feed, a->T, a->P, a->eos, a->quantum, 1};
    int rc = kphi_cli_apply_overrides(cs, &ov, &err);
    kphi_eos_model model = kphi_case_eos(cs);
    if (rc == KPHI_OK)
        rc = kphi_cli_flash_model(model, a->eos, path, &err);
    size_t nT = kphi_case_sweep_n_T(cs), nP = kphi_case_sweep_n_P(cs);
    if (rc == KPHI_OK)
        rc = kphi_cli_grid_limit(nT, nP, a->force, &err);
    if (rc != KPHI_OK) {
        kphi_case_free(cs);
        return kphi_cli_report(&err, path);
    }
    const kphi_rxnset *set = kphi_case_rxnset(cs);
    kphi_eos *mix = kphi_case_make_eos(cs, model, &err);
    if (mix == NULL) {
        kphi_case_free(cs);
        return kphi_cli_report(&err, path);
    }
    flash_sweep_ctx ctx;
    memset(&ctx, 0, sizeof ctx);
    kphi_error_clear(&ctx.err);
    ctx.fmt = fmt;
    ctx.fl.set = set;
    ctx.fl.feed = kphi_case_feed(cs);
    ctx.fl.eos = mix;
    ctx.fl.T_search_lo = KPHI_CLI_T_SEARCH_LO;
    ctx.fl.T_search_hi = KPHI_CLI_T_SEARCH_HI;
    ctx.fl.T_unit = kphi_case_sweep_T_unit(cs);
    ctx.fl.P_unit = kphi_case_sweep_P_unit(cs);
    ctx.fl.source = kphi_case_path(cs);
    ctx.product = kphi_rxnset_first_product(set);
    const double *Tg = kphi_case_sweep_T(cs), *Pg = kphi_case_sweep_P(cs);
    if (a->plot != NULL) {
        ctx.plot = kphi_plot_data_alloc(Tg, nT, Pg, nP, kphi_rxnset_n_reactions(set));
        if (ctx.plot == NULL ||
            kphi_cli_plot_labels(ctx.plot, cs, model, kphi_case_sweep_T_unit(cs),
                                 kphi_case_sweep_P_unit(cs), NAN) != KPHI_OK ||
            kphi_plot_data_series_heading(ctx.plot, "separator P") != KPHI_OK)
            rc = kphi_error_set(&err, KPHI_ENOMEM, NULL, (kphi_mark){0, 0},
                                "out of memory for the plot");
    }
    kphi_cli_output o;
    memset(&o, 0, sizeof o);
    if (rc == KPHI_OK)
        rc = kphi_cli_output_open(&o, a->out, &err);
    if (rc == KPHI_OK) {
        ctx.out = o.f;
        if (fmt == KPHI_REPORT_CSV)
            rc = kphi_report_flash_csv_header(o.f, set, &err);
        kphi_sweep_options sopt = kphi_sweep_options_default();
        sopt.threads = a->threads;
        if (rc == KPHI_OK)
            rc = kphi_sweep_flash_run(mix, ctx.fl.feed, Tg, nT, Pg, nP, KPHI_CLI_T_SEARCH_LO,
                                      KPHI_CLI_T_SEARCH_HI, &sopt, emit_flash, &ctx, &err);
        if (rc != KPHI_OK && ctx.err.code != KPHI_OK && err.code == KPHI_OK)
            err = ctx.err;
        int rc2 = kphi_cli_output_close(&o, rc == KPHI_OK, &err);
        if (rc == KPHI_OK)
            rc = rc2;
        if (rc == KPHI_OK && ctx.plot != NULL) /* after the rows, which it never costs */
            rc = kphi_plot_write(ctx.plot, KPHI_PLOT_SEPARATOR, a->plot, &err);
    }
    code = 0;
    if (rc != KPHI_OK)
        code = kphi_cli_report(&err, path);
    else if (ctx.failed > 0)
        fprintf(stderr, "%s: warning: %zu of %zu flashes failed; their rows say why\n", path,
                ctx.failed, nT * nP);
    kphi_plot_data_free(ctx.plot);
    kphi_eos_free(mix);
    kphi_case_free(cs);
    return code;
}
