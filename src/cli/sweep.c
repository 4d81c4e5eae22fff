/* kphi sweep: equilibrium over a grid of T and P, streamed as CSV or JSON lines, with an
 * optional chart. */
#include <errno.h>
#include <getopt.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include <unistd.h>

#include "cli.h"
#include "kphi/kphi.h"
#include "kphi/plot.h"
#include "kphi/sweep.h"

enum {
    OPT_T = 1000,
    OPT_P,
    OPT_EOS,
    OPT_FEED,
    OPT_QUANTUM,
    OPT_FORMAT,
    OPT_PLOT,
    OPT_PLOT_KIND,
    OPT_THREADS,
    OPT_FORCE,
    OPT_ADIABATIC,
    OPT_PHASES,
    OPT_PLOT_IDEAL,
    OPT_K,
    OPT_APPROACH_DT,
    OPT_LOOP,
    OPT_FLASH,
    OPT_PURGE
};

static const struct option sweep_opts[] = {
    {"T", required_argument, NULL, OPT_T},
    {"P", required_argument, NULL, OPT_P},
    {"eos", required_argument, NULL, OPT_EOS},
    {"feed", required_argument, NULL, OPT_FEED},
    {"quantum", no_argument, NULL, OPT_QUANTUM},
    {"format", required_argument, NULL, OPT_FORMAT},
    {"plot", required_argument, NULL, OPT_PLOT},
    {"plot-kind", required_argument, NULL, OPT_PLOT_KIND},
    {"threads", required_argument, NULL, OPT_THREADS},
    {"force", no_argument, NULL, OPT_FORCE},
    {"adiabatic", no_argument, NULL, OPT_ADIABATIC},
    {"phases", required_argument, NULL, OPT_PHASES},
    {"plot-ideal", required_argument, NULL, OPT_PLOT_IDEAL},
    {"K", required_argument, NULL, OPT_K},
    {"approach-dT", required_argument, NULL, OPT_APPROACH_DT},
    {"loop", no_argument, NULL, OPT_LOOP},
    {"flash", no_argument, NULL, OPT_FLASH},
    {"purge", required_argument, NULL, OPT_PURGE},
    {"output", required_argument, NULL, 'o'},
    {"help", no_argument, NULL, 'h'},
    {NULL, 0, NULL, 0}};


static double now_seconds(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

typedef struct {
    FILE *out;
    kphi_report_format fmt;
    const kphi_rxnset *set;
    kphi_eos_model model;
    int quantum;
    kphi_plot_data *plot;
    long product;       /* species shown by the equilibrium curve, or -1 */
    const kphi_report_energy *columns; /* NULL, or the trailing blocks of every row */
    const char *case_name;
    size_t n_kij;
    const kphi_case_kij_entry *kij;
    size_t done, total, failed;
    size_t K_outside[KPHI_CLI_K_COUNT_MAX]; /* points whose K of reaction j was extrapolated */
    double t0, last_draw;
    int progress;       /* stderr is a terminal */
    int drawn;
    kphi_error err;
} sweep_ctx;

static void draw_progress(sweep_ctx *c, int final)
{
    double t = now_seconds();
    double el = t - c->t0;
    if (!final && (el < 1.0 || t - c->last_draw < 0.2))
        return;
    c->last_draw = t;
    double rate = el > 0.0 ? (double)c->done / el : 0.0;
    double left = rate > 0.0 ? (double)(c->total - c->done) / rate : 0.0;
    int width = 30, fill = (int)(width * (double)c->done / (double)c->total);
    char bar[64];
    for (int k = 0; k < width; k++)
        bar[k] = k < fill ? '#' : '.';
    bar[width] = '\0';
    fprintf(stderr, "\r[%s] %zu/%zu points  %.0f points/s  %.0f s left ", bar, c->done, c->total,
            rate, left);
    if (final)
        fputc('\n', stderr);
    c->drawn = 1;
}

static int emit_point(void *vc, size_t iT, size_t iP, double T, double P,
                      const kphi_report_point *pt, const kphi_error *failure)
{
    sweep_ctx *c = vc;
    int rc = KPHI_OK;
    if (pt != NULL) {
        kphi_report_point p = *pt;
        p.quantum = c->quantum;
        p.case_name = c->case_name;
        p.n_kij = c->n_kij;
        p.kij = c->kij;
        if (c->fmt == KPHI_REPORT_JSON) {
            rc = kphi_report_json_point(c->out, &p, &c->err);
            fputc('\n', c->out);
        } else {
            rc = kphi_report_csv_row(c->out, &p, 0, &c->err);
        }
        if (c->plot != NULL)
            kphi_cli_plot_store(c->plot, iT, iP, pt, c->product);
        for (size_t j = 0; j < kphi_rxnset_n_reactions(c->set) && j < KPHI_CLI_K_COUNT_MAX; j++)
            c->K_outside[j] += pt->real->K_outside[j] != 0;
    } else {
        c->failed++;
        if (c->fmt == KPHI_REPORT_JSON) {
            rc = kphi_report_json_failed(c->out, NULL, T, P, failure->msg, &c->err);
            fputc('\n', c->out);
        } else {
            rc = kphi_report_csv_failed_row(c->out, c->set, T, P, failure->msg, 0, c->columns,
                                            &c->err);
        }
    }
    c->done++;
    if (c->progress)
        draw_progress(c, 0);
    if (rc == KPHI_OK && ferror(c->out)) {
        kphi_mark none = {0, 0};
        rc = kphi_error_set(&c->err, KPHI_EIO, NULL, none, "write error on output");
    }
    return rc;
}

int kphi_cli_sweep(int argc, char **argv)
{
    const char *T = NULL, *P = NULL, *eos = NULL, *feed = NULL, *out = NULL, *plot = NULL;
    const char *format = "csv", *plot_kind = NULL, *phases = NULL, *plot_ideal = NULL;
    const char *Kname = NULL, *approach_dT = NULL, *purge = NULL;
    int quantum = 0, force = 0, threads = 0, adiabatic = 0, loop = 0, flash = 0, c;
    optind = 1;
    opterr = 0;
    while ((c = getopt_long(argc, argv, ":ho:", sweep_opts, NULL)) != -1) {
        switch (c) {
        case OPT_T:
            T = optarg;
            break;
        case OPT_P:
            P = optarg;
            break;
        case OPT_EOS:
            eos = optarg;
            break;
        case OPT_FEED:
            feed = optarg;
            break;
        case OPT_QUANTUM:
            quantum = 1;
            break;
        case OPT_FORMAT:
            format = optarg;
            break;
        case OPT_PLOT:
            plot = optarg;
            break;
        case OPT_PLOT_KIND:
            plot_kind = optarg;
            break;
        case OPT_THREADS: {
            char *end;
            errno = 0;
            long v = strtol(optarg, &end, 10);
            if (*optarg == '\0' || *end != '\0' || errno != 0 || v < 1 || v > 1024) {
                kphi_error e;
                kphi_error_clear(&e);
                kphi_mark at = {1, 1};
                kphi_error_set(&e, KPHI_EINPUT, "<command line>", at,
                               "--threads: expected a whole number from 1 to 1024, found '%s'",
                               optarg);
                return kphi_cli_report(&e, NULL);
            }
            threads = (int)v;
            break;
        }
        case OPT_FORCE:
            force = 1;
            break;
        case OPT_ADIABATIC:
            adiabatic = 1;
            break;
        case OPT_PHASES:
            phases = optarg;
            break;
        case OPT_PLOT_IDEAL:
            plot_ideal = optarg;
            break;
        case OPT_K:
            Kname = optarg;
            break;
        case OPT_APPROACH_DT:
            approach_dT = optarg;
            break;
        case OPT_LOOP:
            loop = 1;
            break;
        case OPT_FLASH:
            flash = 1;
            break;
        case OPT_PURGE:
            purge = optarg;
            break;
        case 'o':
            out = optarg;
            break;
        case 'h':
            return kphi_cli_help_command(stdout, "sweep");
        case ':':
            return kphi_cli_bad_option("sweep", sweep_opts, argv, optind, 1);
        default:
            return kphi_cli_bad_option("sweep", sweep_opts, argv, optind, 0);
        }
    }
    const char *path = NULL;
    int usage = kphi_cli_case_arg(argc, argv, optind, "sweep", &path);
    if (usage != 0)
        return usage;
    if (loop || flash) {
        kphi_cli_sweep_args a = {T,         P,      eos,        feed,  out,
                                 plot,      plot_kind, phases, plot_ideal, Kname, purge,
                                 quantum,   force,  threads,    adiabatic, KPHI_REPORT_CSV};
        if (loop && flash)
            return kphi_cli_refuse("--flash", "--loop and --flash are different sweeps; give "
                                              "one of them");
        if (approach_dT != NULL)
            return kphi_cli_refuse("--approach-dT",
                                   loop ? "a loop takes its approach from the loop block "
                                          "('converter: {approach: 10 K}')"
                                        : "a flash has no reaction, so no approach");
        kphi_error e;
        kphi_error_clear(&e);
        if (kphi_cli_option_error(kphi_report_format_parse(format, &a.fmt, &e), "--format", &e) !=
            KPHI_OK)
            return kphi_cli_report(&e, NULL);
        if (a.fmt == KPHI_REPORT_TABLE)
            return kphi_cli_refuse("--format", "sweep writes csv or json, not a table");
        return loop ? kphi_cli_sweep_loop(path, &a) : kphi_cli_sweep_flash(path, &a);
    }
    kphi_error err;
    kphi_error_clear(&err);
    if (purge != NULL) {
        kphi_mark top = {1, 1};
        kphi_error_set(&err, KPHI_EINPUT, "<command line>", top,
                       "--purge belongs to a loop sweep; add --loop (and a case with a loop "
                       "block)");
        return kphi_cli_report(&err, NULL);
    }
    if (phases == NULL)
        phases = "auto";
    kphi_report_format fmt;
    if (kphi_cli_option_error(kphi_report_format_parse(format, &fmt, &err), "--format", &err) !=
        KPHI_OK)
        return kphi_cli_report(&err, NULL);
    int gas_only = 0;
    if (kphi_cli_phases_arg(phases, &gas_only, &err) != KPHI_OK)
        return kphi_cli_report(&err, NULL);
    kphi_mark at_value = {1, 1};
    if (fmt == KPHI_REPORT_TABLE)
        return kphi_cli_refuse("--format", "sweep writes csv or json, not a table");
    if (eos != NULL && strcmp(eos, "all") == 0) {
        return kphi_cli_refuse("--eos", "'all' is for solve; sweep one model at a time");
    }
    kphi_plot_kind kind = KPHI_PLOT_CONVERSION_P;
    if (plot_kind != NULL &&
        kphi_cli_option_error(kphi_plot_kind_parse(plot_kind, &kind, &err), "--plot-kind",
                              &err) != KPHI_OK)
        return kphi_cli_report(&err, NULL);
    if (plot != NULL && kphi_cli_plot_arg(plot, &err) != KPHI_OK)
        return kphi_cli_report(&err, NULL); /* before anything is written */
    if (plot_kind != NULL && plot == NULL) {
        kphi_error_set(&err, KPHI_EINPUT, "<command line>", at_value,
                       "--plot-kind chooses the chart of --plot, which is not given; add "
                       "--plot FILE (.svg, .png or .pdf) or leave --plot-kind out");
        return kphi_cli_report(&err, NULL);
    }
    int show_ideal = 1;
    if (plot_ideal != NULL && kphi_cli_plot_ideal_arg(plot_ideal, &show_ideal, &err) != KPHI_OK)
        return kphi_cli_report(&err, NULL);
    if (plot_ideal != NULL && plot == NULL)
        return kphi_cli_refuse("--plot-ideal", "there is no chart to draw; add --plot FILE");
    if (plot_kind != NULL && kind == KPHI_PLOT_ADIABATIC && !adiabatic) {
        kphi_error_set(&err, KPHI_EINPUT, "<command line>", at_value,
                       "--plot-kind adiabatic draws the adiabatic bed outlet: add --adiabatic");
        return kphi_cli_report(&err, NULL);
    }

    if (approach_dT != NULL && adiabatic) {
        kphi_error_set(&err, KPHI_EINPUT, "<command line>", at_value,
                       "--approach-dT and --adiabatic cannot be combined: --approach-dT reads "
                       "each T as an outlet, --adiabatic as a bed inlet; run them one at a time");
        return kphi_cli_report(&err, NULL);
    }

    char species[1024];
    kphi_case *cs =
        kphi_case_load_file_default(path, kphi_cli_species_default(species, sizeof species), &err);
    if (cs == NULL)
        return kphi_cli_report(&err, path);
    kphi_cli_overrides ov = {feed, T, P, eos, quantum, 1};
    int rc = kphi_cli_apply_overrides(cs, &ov, &err);
    if (rc == KPHI_OK && Kname != NULL && strcmp(Kname, "all") == 0)
        rc = kphi_error_set(&err, KPHI_EINPUT, "<command line>", at_value,
                            "--K: 'all' is for solve; sweep one K basis at a time");
    if (rc == KPHI_OK && Kname != NULL)
        rc = kphi_cli_option_error(kphi_case_set_K(cs, Kname, &err), "--K", &err);
    if (rc == KPHI_OK)
        rc = kphi_case_require_one_K(cs, &err);
    double dT = 0.0;
    if (rc == KPHI_OK && approach_dT != NULL)
        rc = kphi_cli_approach_dT(cs, approach_dT, 1, &dT, &err);
    size_t nT = kphi_case_sweep_n_T(cs), nP = kphi_case_sweep_n_P(cs);
    if (rc == KPHI_OK && (nT == 0 || nP == 0)) {
        kphi_mark none = {0, 0};
        rc = kphi_error_set(&err, KPHI_EINPUT, NULL, none,
                            "the sweep grid is empty: give T and P, a sweep block, or --T/--P");
    }
    if (rc == KPHI_OK)
        rc = kphi_cli_grid_limit(nT, nP, force, &err);
    if (plot != NULL && plot_kind == NULL)
        kind = adiabatic ? KPHI_PLOT_ADIABATIC : kphi_plot_default_kind(nT, nP);
    if (rc == KPHI_OK && plot != NULL) /* the chart can be drawn: checked before solving */
        rc = kphi_cli_option_error(kphi_plot_check_grid(kind, nT, nP,
                                                        kphi_rxnset_n_reactions(
                                                            kphi_case_rxnset(cs)),
                                                        &err),
                                   "--plot", &err);
    if (rc != KPHI_OK) {
        kphi_case_free(cs);
        return kphi_cli_report(&err, path);
    }
    const kphi_rxnset *set = kphi_case_rxnset(cs);
    kphi_eos *real = kphi_case_make_eos(cs, kphi_case_eos(cs), &err);
    kphi_eos *ig = real != NULL ? kphi_case_make_eos(cs, KPHI_EOS_IDEAL, &err) : NULL;
    if (real == NULL || ig == NULL) {
        kphi_eos_free(real);
        kphi_case_free(cs);
        return kphi_cli_report(&err, path);
    }

    sweep_ctx ctx;
    memset(&ctx, 0, sizeof ctx);
    kphi_error_clear(&ctx.err);
    ctx.fmt = fmt;
    ctx.set = set;
    ctx.model = kphi_case_eos(cs);
    ctx.quantum = kphi_case_quantum(cs);
    ctx.case_name = kphi_case_name(cs);
    kphi_case_kij_entry *kij = kphi_cli_case_kij(cs, &ctx.n_kij);
    ctx.kij = kij;
    ctx.total = nT * nP;
    ctx.product = kphi_rxnset_first_product(set);
    ctx.progress = isatty(STDERR_FILENO);
    ctx.t0 = now_seconds();
    if (plot != NULL) {
        ctx.plot = kphi_plot_data_alloc(kphi_case_sweep_T(cs), nT, kphi_case_sweep_P(cs), nP,
                                        kphi_rxnset_n_reactions(set));
        if (ctx.plot != NULL)
            kphi_plot_data_show_ideal(ctx.plot, show_ideal);
        if (ctx.plot == NULL ||
            kphi_cli_plot_labels(ctx.plot, cs, ctx.model, kphi_case_sweep_T_unit(cs),
                                 kphi_case_sweep_P_unit(cs), NAN) != KPHI_OK) {
            kphi_mark none = {0, 0};
            rc = kphi_error_set(&err, KPHI_ENOMEM, NULL, none, "out of memory for the plot");
        }
    }
    kphi_cli_output o;
    o.f = NULL;
    if (rc == KPHI_OK)
        rc = kphi_cli_output_open(&o, out, &err);
    if (rc == KPHI_OK) {
        ctx.out = o.f;
        kphi_report_energy columns;
        memset(&columns, 0, sizeof columns);
        columns.adiabatic = adiabatic;
        columns.outlet_approach = approach_dT != NULL;
        columns.outlet_dT = dT;
        ctx.columns = adiabatic || approach_dT != NULL ? &columns : NULL;
        if (fmt == KPHI_REPORT_CSV)
            rc = kphi_report_csv_header(o.f, set, 0, ctx.columns, &err);
        kphi_sweep_options sopt = kphi_sweep_options_default();
        sopt.threads = threads;
        sopt.adiabatic = adiabatic;
        sopt.phases = gas_only ? 2 : 1;
        sopt.equil.K_basis = kphi_case_K_basis(cs);
        sopt.approach_dT = dT;
        if (rc == KPHI_OK)
            rc = kphi_sweep_run(set, real, ig, kphi_case_feed(cs), kphi_case_sweep_T(cs), nT,
                                kphi_case_sweep_P(cs), nP, &sopt, emit_point, &ctx, &err);
        if (rc != KPHI_OK && ctx.err.code != KPHI_OK && err.code == KPHI_OK)
            err = ctx.err;
        if (ctx.progress && ctx.drawn)
            draw_progress(&ctx, 1);
        /* the rows are kept whatever becomes of the chart */
        int rc2 = kphi_cli_output_close(&o, rc == KPHI_OK, &err);
        if (rc == KPHI_OK)
            rc = rc2;
        if (rc == KPHI_OK && ctx.plot != NULL)
            rc = kphi_plot_write(ctx.plot, kind, plot, &err);
    }
    int code = 0;
    if (rc != KPHI_OK)
        code = kphi_cli_report(&err, path);
    else if (ctx.failed > 0)
        fprintf(stderr, "%s: warning: %zu of %zu points failed; their rows say why\n", path,
                ctx.failed, ctx.total);
    if (rc == KPHI_OK)
        kphi_cli_K_outside_summary(path, set, kphi_case_K_basis(cs), ctx.K_outside, ctx.total,
                                   "");
    kphi_plot_data_free(ctx.plot);
    free(kij);
    kphi_eos_free(real);
    kphi_eos_free(ig);
    kphi_case_free(cs);
    return code;
}
