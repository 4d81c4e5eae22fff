/* kphi flash: the case's feed split into phases at T, P without reaction (the separator
 * question: how much liquid drops out, what stays in the gas), with the dew and bubble
 * points of the feed at P. `--dew-point` prints only those two temperatures.
 *
 * The flash, the stability test and the saturation searches are in src/phase.c and
 * src/phase_sat.c; the writers in src/report_phase.c. */
#include <getopt.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "cli.h"
#include "kphi/kphi.h"

enum { OPT_T = 1000, OPT_P, OPT_EOS, OPT_FEED, OPT_QUANTUM, OPT_FORMAT, OPT_DEW };

static const struct option flash_opts[] = {{"T", required_argument, NULL, OPT_T},
                                           {"P", required_argument, NULL, OPT_P},
                                           {"eos", required_argument, NULL, OPT_EOS},
                                           {"feed", required_argument, NULL, OPT_FEED},
                                           {"quantum", no_argument, NULL, OPT_QUANTUM},
                                           {"format", required_argument, NULL, OPT_FORMAT},
                                           {"dew-point", no_argument, NULL, OPT_DEW},
                                           {"output", required_argument, NULL, 'o'},
                                           {"help", no_argument, NULL, 'h'},
                                           {NULL, 0, NULL, 0}};

#define T_SEARCH_LO KPHI_CLI_T_SEARCH_LO /* cli.h */
#define T_SEARCH_HI KPHI_CLI_T_SEARCH_HI

int kphi_cli_flash(int argc, char **argv)
{
    const char *T = NULL, *P = NULL, *eos = NULL, *feed = NULL, *out = NULL;
    const char *format = "table";
    int quantum = 0, dew_only = 0, c;
    optind = 1;
    opterr = 0;
    while ((c = getopt_long(argc, argv, ":ho:", flash_opts, NULL)) != -1) {
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
        case OPT_DEW:
            dew_only = 1;
            break;
        case 'o':
            out = optarg;
            break;
        case 'h':
            return kphi_cli_help_command(stdout, "flash");
        case ':':
            return kphi_cli_bad_option("flash", flash_opts, argv, optind, 1);
        default:
            return kphi_cli_bad_option("flash", flash_opts, argv, optind, 0);
        }
    }
    const char *path = NULL;
    int usage = kphi_cli_case_arg(argc, argv, optind, "flash", &path);
    if (usage != 0)
        return usage;
    kphi_error err;
    kphi_error_clear(&err);
    kphi_report_format fmt;
    if (kphi_cli_option_error(kphi_report_format_parse(format, &fmt, &err), "--format", &err) !=
        KPHI_OK)
        return kphi_cli_report(&err, NULL);
    if (eos != NULL && strcmp(eos, "all") == 0)
        return kphi_cli_refuse("--eos", "a flash needs one model (rk, srk or pr), not 'all'");
    char species[1024];
    kphi_case *cs =
        kphi_case_load_file_default(path, kphi_cli_species_default(species, sizeof species), &err);
    if (cs == NULL)
        return kphi_cli_report(&err, path);
    kphi_cli_overrides ov = {feed, T, P, eos, quantum, 0};
    int rc = kphi_cli_apply_overrides(cs, &ov, &err);
    kphi_eos_model model = kphi_case_eos(cs);
    if (rc == KPHI_OK)
        rc = kphi_cli_flash_model(model, eos, path, &err);
    if (rc == KPHI_OK && ((!dew_only && isnan(kphi_case_T(cs))) || isnan(kphi_case_P(cs)))) {
        kphi_mark top = {1, 1};
        rc = kphi_error_set(&err, KPHI_EINPUT, path, top,
                            isnan(kphi_case_P(cs))
                                ? "missing P: add 'P: 190 bar' to the case or pass --P"
                                : "missing T: add 'T: -5 C' to the case or pass --T");
    }
    if (rc != KPHI_OK) {
        kphi_case_free(cs);
        return kphi_cli_report(&err, path);
    }

    const kphi_rxnset *set = kphi_case_rxnset(cs);
    size_t s = kphi_rxnset_n_species(set);
    const double *z = kphi_case_feed(cs);
    double Tk = dew_only ? 300.0 : kphi_case_T(cs), Pa = kphi_case_P(cs);
    kphi_eos *mix = kphi_case_make_eos(cs, model, &err);
    kphi_phase_work *w = kphi_phase_work_alloc(s, 0);
    kphi_flash_result *fr = kphi_flash_result_alloc(s);
    if (mix == NULL || w == NULL || fr == NULL) {
        if (mix != NULL)
            kphi_error_set(&err, KPHI_ENOMEM, NULL, (kphi_mark){0, 0}, "out of memory");
        rc = err.code != KPHI_OK ? (int)err.code : KPHI_ENOMEM;
    }
    kphi_report_flash fl;
    memset(&fl, 0, sizeof fl);
    if (rc == KPHI_OK && !dew_only)
        rc = kphi_phase_flash(mix, Tk, Pa, z, NULL, w, fr, &err);
    if (rc == KPHI_OK && dew_only) {
        fr->T = Tk;
        fr->P = Pa;
        fr->n_phases = 1;
    }
    if (rc == KPHI_OK)
        rc = kphi_phase_dew_point(mix, Pa, z, NAN, T_SEARCH_LO, T_SEARCH_HI, NULL, w,
                                  &fl.dew_found, &fl.T_dew, &err);
    if (rc == KPHI_OK)
        rc = kphi_phase_bubble_point(mix, Pa, z, NAN, T_SEARCH_LO, T_SEARCH_HI, NULL, w,
                                     &fl.bubble_found, &fl.T_bubble, &err);
    kphi_cli_output o;
    memset(&o, 0, sizeof o);
    if (rc == KPHI_OK) {
        fl.set = set;
        fl.feed = z;
        fl.eos = mix;
        fl.flash = fr;
        fl.T_search_lo = T_SEARCH_LO;
        fl.T_search_hi = T_SEARCH_HI;
        fl.dew_only = dew_only;
        fl.T_unit = kphi_case_T_unit(cs);
        fl.P_unit = kphi_case_P_unit(cs);
        fl.source = kphi_case_path(cs);
        rc = kphi_cli_output_open(&o, out, &err);
        if (rc == KPHI_OK) {
            rc = kphi_report_flash_write(o.f, fmt, &fl, &err);
            int rc2 = kphi_cli_output_close(&o, rc == KPHI_OK, &err);
            if (rc == KPHI_OK)
                rc = rc2;
        }
    }
    kphi_flash_result_free(fr);
    kphi_phase_work_free(w);
    kphi_eos_free(mix);
    int code = rc == KPHI_OK ? 0 : kphi_cli_report(&err, path);
    kphi_case_free(cs);
    return code;
}
