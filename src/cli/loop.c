/* kphi loop: the synthesis loop of a case's `loop` block at steady state, with the
 * converter as the case's model and as the ideal gas (the separator always with an
 * equation of state), the difference in product and the loop pressure the ideal-gas
 * converter would need to make as much (kphi_loop_solve(), kphi_loop_equivalent_pressure()
 * in src/loop.c; writers in src/report_loop.c).
 *
 * Flows: the make-up composition is scaled to its `rate`; with `production` the loop is
 * solved per 100 mol/s of make-up and every flow scaled so the real-gas loop makes the
 * asked product (the loop is linear in its scale); the ideal-gas loop gets the same
 * make-up. Without either, flows are per 100 mol of make-up. */
#include <getopt.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"
#include "kphi/kphi.h"

enum { OPT_T = 1000, OPT_P, OPT_EOS, OPT_PURGE, OPT_FORMAT, OPT_QUANTUM, OPT_K, OPT_PLOT };

static const struct option loop_opts[] = {{"T", required_argument, NULL, OPT_T},
                                          {"P", required_argument, NULL, OPT_P},
                                          {"eos", required_argument, NULL, OPT_EOS},
                                          {"purge", required_argument, NULL, OPT_PURGE},
                                          {"quantum", no_argument, NULL, OPT_QUANTUM},
                                          {"format", required_argument, NULL, OPT_FORMAT},
                                          {"K", required_argument, NULL, OPT_K},
                                          {"output", required_argument, NULL, 'o'},
                                          {"plot", required_argument, NULL, OPT_PLOT},
                                          {"help", no_argument, NULL, 'h'},
                                          {NULL, 0, NULL, 0}};

int kphi_cli_loop(int argc, char **argv)
{
    const char *T = NULL, *P = NULL, *eos = NULL, *purge = NULL, *out = NULL;
    const char *format = "table", *Kname = NULL, *plot = NULL;
    int quantum = 0, c;
    optind = 1;
    opterr = 0;
    while ((c = getopt_long(argc, argv, ":ho:", loop_opts, NULL)) != -1) {
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
        case OPT_PURGE:
            purge = optarg;
            break;
        case OPT_K:
            Kname = optarg;
            break;
        case OPT_QUANTUM:
            quantum = 1;
            break;
        case OPT_FORMAT:
            format = optarg;
            break;
        case 'o':
            out = optarg;
            break;
        case OPT_PLOT:
            plot = optarg;
            break;
        case 'h':
            return kphi_cli_help_command(stdout, "loop");
        case ':':
            return kphi_cli_bad_option("loop", loop_opts, argv, optind, 1);
        default:
            return kphi_cli_bad_option("loop", loop_opts, argv, optind, 0);
        }
    }
    const char *path = NULL;
    int usage = kphi_cli_case_arg(argc, argv, optind, "loop", &path);
    if (usage != 0)
        return usage;
    kphi_error err;
    kphi_error_clear(&err);
    kphi_report_format fmt;
    if (kphi_cli_option_error(kphi_report_format_parse(format, &fmt, &err), "--format", &err) !=
        KPHI_OK)
        return kphi_cli_report(&err, NULL);
    if (plot != NULL && kphi_cli_plot_arg(plot, &err) != KPHI_OK)
        return kphi_cli_report(&err, NULL); /* before anything is solved or written */
    if (eos != NULL && strcmp(eos, "all") == 0)
        return kphi_cli_refuse("--eos", "a loop needs one converter model, not 'all'");
    char species[1024];
    kphi_case *cs =
        kphi_case_load_file_default(path, kphi_cli_species_default(species, sizeof species), &err);
    if (cs == NULL)
        return kphi_cli_report(&err, path);
    int rc = KPHI_OK;
    if (kphi_case_get_loop(cs) == NULL) {
        kphi_mark top = {1, 1};
        rc = kphi_error_set(&err, KPHI_EINPUT, path, top,
                            "the case has no 'loop' block (make-up, converter, separator, "
                            "purge); see cases/ammonia_loop.yaml");
    }
    if (rc == KPHI_OK && P != NULL)
        rc = kphi_cli_option_error(kphi_case_set_P(cs, P, &err), "--P", &err);
    if (rc == KPHI_OK && eos != NULL)
        rc = kphi_cli_option_error(kphi_case_set_eos(cs, eos, &err), "--eos", &err);
    if (rc == KPHI_OK && T != NULL)
        rc = kphi_cli_option_error(kphi_case_set_loop_T(cs, T, &err), "--T", &err);
    if (rc == KPHI_OK && purge != NULL)
        rc = kphi_cli_option_error(kphi_case_set_purge(cs, purge, &err), "--purge", &err);
    if (rc == KPHI_OK && Kname != NULL)
        rc = kphi_cli_option_error(kphi_case_set_K(cs, Kname, &err), "--K", &err);
    if (rc == KPHI_OK)
        rc = kphi_case_require_one_K(cs, &err);
    if (quantum)
        kphi_case_set_quantum(cs, 1);
    if (rc == KPHI_OK && isnan(kphi_case_P(cs))) {
        kphi_mark top = {1, 1};
        rc = kphi_error_set(&err, KPHI_EINPUT, path, top,
                            "missing P: the loop pressure is the case's P; add 'P: 195 bar' or "
                            "pass --P");
    }
    if (rc == KPHI_OK)
        rc = kphi_case_validate_loop(cs, &err);
    if (rc != KPHI_OK) {
        kphi_case_free(cs);
        return kphi_cli_report(&err, path);
    }

    const kphi_rxnset *set = kphi_case_rxnset(cs);
    size_t s = kphi_rxnset_n_species(set), r = kphi_rxnset_n_reactions(set);
    kphi_eos_model model = kphi_case_eos(cs);
    kphi_eos_model sep_model = kphi_phase_model_ok(model) ? model : KPHI_EOS_PR;
    kphi_eos *conv = kphi_case_make_eos(cs, model, &err);
    kphi_eos *ideal = kphi_case_make_eos(cs, KPHI_EOS_IDEAL, &err);
    kphi_eos *sep = kphi_case_make_eos(cs, sep_model, &err);
    kphi_loop_work *w = kphi_loop_work_alloc(s, r);
    kphi_loop_result *res[2] = {kphi_loop_result_alloc(s), kphi_loop_result_alloc(s)};
    kphi_loop_result *tmp = kphi_loop_result_alloc(s);
    double *mk = calloc(s > 0 ? s : 1, sizeof(double));
    if (conv == NULL || ideal == NULL || sep == NULL || w == NULL || res[0] == NULL ||
        res[1] == NULL || tmp == NULL || mk == NULL) {
        if (err.code == KPHI_OK)
            kphi_error_set(&err, KPHI_ENOMEM, NULL, (kphi_mark){0, 0}, "out of memory");
        rc = err.code;
    }
    kphi_loop_spec sp;
    int basis = 0;
    if (rc == KPHI_OK)
        basis = kphi_loop_spec_from_case(cs, mk, &sp);
    if (rc == KPHI_OK)
        rc = kphi_loop_solve(set, conv, sep, &sp, NULL, w, res[0], &err);
    const kphi_case_loop *g = kphi_case_get_loop(cs);
    if (rc == KPHI_OK && g->flow == KPHI_CASE_MAKEUP_PRODUCTION) {
        long p = res[0]->product;
        double made = p >= 0 ? res[0]->product_rate * kphi_rxnset_species(set, (size_t)p)->molar_mass
                             : 0.0;
        if (!(made > 0.0)) {
            kphi_mark top = {1, 1};
            rc = kphi_error_set(&err, KPHI_EINPUT, path, top,
                                "the loop makes no liquid product at these conditions, so no "
                                "make-up rate gives the production asked for");
        } else {
            double f = g->production / made;
            for (size_t i = 0; i < s; i++)
                mk[i] *= f;
            kphi_loop_result_scale(res[0], f);
        }
    }
    if (rc == KPHI_OK)
        rc = kphi_loop_solve(set, ideal, sep, &sp, NULL, w, res[1], &err);
    kphi_report_loop lp;
    memset(&lp, 0, sizeof lp);
    lp.P_equiv = NAN;
    char note[sizeof err.msg] = "";
    if (rc == KPHI_OK) {
        kphi_error e2;
        kphi_error_clear(&e2);
        double Peq;
        if (kphi_loop_equivalent_pressure(set, ideal, sep, &sp, res[0]->product_rate, w, tmp, &Peq,
                                          &e2) == KPHI_OK)
            lp.P_equiv = Peq;
        else
            snprintf(note, sizeof note, "%s", e2.msg);
    }
    if (rc == KPHI_OK) {
        lp.set = set;
        lp.model = model;
        lp.sep = sep;
        lp.spec = &sp;
        lp.res[0] = res[0];
        lp.res[1] = res[1];
        lp.basis = basis;
        lp.P_equiv_note = note[0] != '\0' ? note : NULL;
        lp.T_unit = isnan(kphi_case_T(cs)) ? "C" : kphi_case_T_unit(cs);
        lp.P_unit = kphi_case_P_unit(cs);
        lp.source = kphi_case_path(cs);
        if (sep_model != model)
            fprintf(stderr, "%s: warning: the separator uses %s: the '%s' model has no liquid\n",
                    path, kphi_eos_model_name(sep_model), kphi_eos_model_name(model));
        kphi_cli_output o;
        memset(&o, 0, sizeof o);
        rc = kphi_cli_output_open(&o, out, &err);
        if (rc == KPHI_OK) {
            rc = kphi_report_loop_write(o.f, fmt, &lp, &err);
            int rc2 = kphi_cli_output_close(&o, rc == KPHI_OK, &err);
            if (rc == KPHI_OK)
                rc = rc2;
        }
        if (rc == KPHI_OK && plot != NULL) /* after the report, which it never costs */
            rc = kphi_cli_loop_plot(cs, &lp, plot, &err);
        /* a K correlation used outside its range at a converter equilibrium (the outlet, or
         * each bed's outlet, plus the approach) */
        for (size_t j = 0; rc == KPHI_OK && j < r; j++) {
            const kphi_rxnset_kcorr *k = kphi_rxnset_kcorr_get(set, j, sp.K_basis);
            size_t nb = sp.converter == KPHI_LOOP_ADIABATIC ? res[0]->n_beds : 1;
            for (size_t b = 0; k != NULL && b < nb && b < KPHI_LOOP_MAX_BEDS; b++) {
                double Teq = (sp.converter == KPHI_LOOP_ADIABATIC ? res[0]->bed_T_out[b]
                                                                   : sp.T_out) +
                             sp.approach;
                double lo, hi;
                kphi_rxnset_kcorr_range(k, &lo, &hi);
                if (!kphi_rxnset_kcorr_in_range(k, Teq))
                    fprintf(stderr,
                            "%s: warning: K of reaction %zu (%s) extrapolated at the converter "
                            "equilibrium: T = %.2f K is outside its validity range %.2f-%.2f "
                            "K\n",
                            path, j + 1, kphi_rxnset_kcorr_name(k), Teq, lo, hi);
            }
        }
    }
    free(mk);
    kphi_loop_result_free(tmp);
    kphi_loop_result_free(res[0]);
    kphi_loop_result_free(res[1]);
    kphi_loop_work_free(w);
    kphi_eos_free(conv);
    kphi_eos_free(ideal);
    kphi_eos_free(sep);
    int code = rc == KPHI_OK ? 0 : kphi_cli_report(&err, path);
    kphi_case_free(cs);
    return code;
}
