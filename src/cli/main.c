/* kphi command-line program: solve, sweep, check, species.
 *
 * Exit codes: 0 success, 1 the calculation failed, 2 bad input or usage. Every error is
 * one line on stderr, "file:line:column: error: message". Output files are written to a
 * temporary file beside the target and renamed into place only when complete, so a failed
 * run never leaves a partial file and never spoils an earlier one. */
#include <errno.h>
#include <getopt.h>
#include <signal.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include <gsl/gsl_errno.h>

#include "cli.h"
#include "kphi/plot.h"
#include "kphi/kphi.h"

#ifndef KPHI_DATADIR
#define KPHI_DATADIR "/usr/local/share/kphi"
#endif

#if defined(__SANITIZE_ADDRESS__)
/* Font caches that fontconfig (under PLplot's cairo devices) keeps for the life of the
 * process are not leaks of ours; LeakSanitizer reads this hook. */
const char *__lsan_default_suppressions(void);
const char *__lsan_default_suppressions(void)
{
    return "leak:libfontconfig.so\n";
}
#endif

static const char CAUTION[] =
    "Caution: kphi computes equilibrium limits for screening, not a design basis. The gases\n"
    "involved are toxic, flammable and at high pressure: pressure equipment follows local\n"
    "codes and licensed engineering practice.\n";

void kphi_cli_help(FILE *f)
{
    fprintf(f,
            "Usage: kphi COMMAND [OPTION]... FILE\n"
            "Chemical equilibrium of high-pressure gas reactions by Gibbs-energy minimisation,\n"
            "with equation-of-state fugacity coefficients; every answer is given for the real\n"
            "gas and the ideal gas side by side.\n"
            "\n"
            "Commands:\n"
            "  solve CASE.yaml    equilibrium at one T and P\n"
            "  sweep CASE.yaml    equilibrium over a grid of T and P (CSV, JSON lines, plot)\n"
            "  check FILE.yaml    validate a case or reaction set and print what it defines\n"
            "  species [NAME]     list the species data and where each value comes from\n"
            "\n"
            "Options of solve:\n"
            "  --T TEMP           temperature, e.g. 450C, 723.15K, 842F\n"
            "  --P PRES           pressure, e.g. 200bar, 300atm, 20MPa, 3000psia, 190barg\n"
            "  --eos MODEL        pr (default), srk, rk, virial, ideal, or all to compare\n"
            "  --feed LIST        feed amounts, e.g. N2=1,H2=3,Ar=0.05 (replaces the case's)\n"
            "  --quantum          effective critical constants for H2 and He (Prausnitz)\n"
            "  --format FMT       table (default), csv or json\n"
            "  -o, --output FILE  write to FILE instead of standard output\n"
            "  --approach SP=Y    approach to equilibrium of a measured outlet: the case's T\n"
            "                     is the outlet temperature, Y the measured mole fraction of\n"
            "                     species SP (e.g. NH3=0.165); reports the temperature at\n"
            "                     which Y is the equilibrium, and T_eq - T\n"
            "  --adiabatic        adiabatic equilibrium outlet of a bed: the case's T is the\n"
            "                     inlet temperature; reports the outlet T, y and conversion\n"
            "  --intercool LIST   further adiabatic beds after the first, the gas cooled to\n"
            "                     each listed inlet temperature (e.g. 400C,410C); implies\n"
            "                     --adiabatic\n"
            "  --plot FILE        also draw the equilibrium curve at the case's P (.svg,\n"
            "                     .png or .pdf), with the path of the beds when\n"
            "                     --adiabatic or --intercool is given\n"
            "Options of sweep:\n"
            "  --T RANGE          e.g. 350:550:10C (from:to:step) or 400C,450C,500C\n"
            "  --P RANGE          e.g. 50:400:25bar or 100bar,200bar\n"
            "  --eos, --feed, --quantum as for solve\n"
            "  --format FMT       csv (default) or json (one object per line)\n"
            "  -o, --output FILE  write to FILE instead of standard output\n"
            "  --plot FILE        also draw a chart (.svg, .png or .pdf)\n"
            "  --plot-kind KIND   conversion-p, conversion-t, kphi-p, curve or\n"
            "                     adiabatic (the default with --adiabatic)\n"
            "  --threads N        threads for the sweep (default: all cores)\n"
            "  --force            allow grids over 1e8 points\n"
            "  --adiabatic        read each T as a bed inlet temperature and add the\n"
            "                     adiabatic equilibrium outlet (T, conversion, y) to\n"
            "                     every row\n"
            "Options of species:\n"
            "  --data FILE        species database (default: reactions/species.yaml, then\n"
            "                     $KPHI_DATA/reactions/species.yaml, then the installed one)\n"
            "\n"
            "  -h, --help         show this help and exit\n"
            "  -V, --version      show the version and exit\n"
            "\n"
            "Exit status: 0 success, 1 the calculation failed, 2 bad input or usage.\n"
            "\n%s",
            CAUTION);
}

int kphi_cli_usage_error(const char *fmt, const char *arg)
{
    fputs("kphi: error: ", stderr);
    fprintf(stderr, fmt, arg);
    fputs("\nTry 'kphi --help' for more information.\n", stderr);
    return 2;
}

int kphi_cli_option_error(int rc, const char *option, kphi_error *err)
{
    if (rc == KPHI_OK || err == NULL || strcmp(err->path, "<command line>") != 0)
        return rc;
    if (err->line <= 0) { /* the whole value: point at its start */
        err->line = 1;
        err->column = 1;
    }
    if (strncmp(err->msg, option, strlen(option)) == 0)
        return rc;
    char msg[sizeof err->msg];
    snprintf(msg, sizeof msg, "%s", err->msg);
    snprintf(err->msg, sizeof err->msg, "%s: %.200s", option, msg);
    return rc;
}

int kphi_cli_plot_arg(const char *plot, kphi_error *err)
{
    kphi_error e;
    kphi_error_clear(&e);
    int rc = kphi_plot_check_path(plot, &e);
    if (rc != KPHI_OK) {
        kphi_mark top = {1, 1};
        kphi_error_set(err, rc, "<command line>", top, "--plot '%.200s': %.200s", plot, e.msg);
    }
    return rc;
}

int kphi_cli_case_arg(int argc, char **argv, int first, const char *cmd, const char **path)
{
    char msg[160];
    if (first >= argc) {
        snprintf(msg, sizeof msg, "'%s' needs a case file, e.g. kphi %s "
                                  "cases/ammonia_converter.yaml",
                 cmd, cmd);
        return kphi_cli_usage_error("%s", msg);
    }
    if (argc - first > 1) {
        snprintf(msg, sizeof msg, "'%s' takes one case file; unexpected '%%s'", cmd);
        return kphi_cli_usage_error(msg, argv[first + 1]);
    }
    *path = argv[first];
    return 0;
}

int kphi_cli_apply_overrides(kphi_case *cs, const kphi_cli_overrides *o, kphi_error *err)
{
    int rc = KPHI_OK;
    if (o->feed != NULL)
        rc = kphi_cli_option_error(kphi_case_set_feed(cs, o->feed, err), "--feed", err);
    if (rc == KPHI_OK && o->T != NULL)
        rc = kphi_cli_option_error(o->axes ? kphi_case_set_sweep_T(cs, o->T, err)
                                           : kphi_case_set_T(cs, o->T, err),
                                   "--T", err);
    if (rc == KPHI_OK && o->P != NULL)
        rc = kphi_cli_option_error(o->axes ? kphi_case_set_sweep_P(cs, o->P, err)
                                           : kphi_case_set_P(cs, o->P, err),
                                   "--P", err);
    if (rc == KPHI_OK && o->eos != NULL)
        rc = kphi_cli_option_error(kphi_case_set_eos(cs, o->eos, err), "--eos", err);
    if (o->quantum)
        kphi_case_set_quantum(cs, 1);
    if (rc == KPHI_OK)
        rc = kphi_case_validate(cs, err);
    return rc;
}

int kphi_cli_report(const kphi_error *err, const char *fallback_path)
{
    kphi_error e = *err;
    if (e.path[0] == '\0' && fallback_path != NULL)
        snprintf(e.path, sizeof e.path, "%s", fallback_path);
    char line[1024];
    kphi_error_format(&e, line, sizeof line);
    fprintf(stderr, "%s\n", line);
    return kphi_error_exit_code(e.code);
}

/* ------------------------------------------------------------ output files */

/* The temporary file being written, so that an interrupt (Ctrl-C, kill) removes it
 * instead of leaving it beside the target. Program state, not library state: the
 * library keeps no globals. */
static char pending_tmp[1100];
static volatile sig_atomic_t pending_set;

static void on_signal(int sig)
{
    if (pending_set)
        unlink(pending_tmp); /* async-signal-safe */
    signal(sig, SIG_DFL);
    raise(sig);
}

static void watch_signals(void)
{
    static const int sigs[] = {SIGINT, SIGTERM, SIGHUP, SIGPIPE};
    for (size_t k = 0; k < sizeof sigs / sizeof sigs[0]; k++)
        signal(sigs[k], on_signal);
}

int kphi_cli_output_open(kphi_cli_output *o, const char *path, kphi_error *err)
{
    kphi_mark none = {0, 0};
    o->final[0] = '\0';
    o->tmp[0] = '\0';
    if (path == NULL || strcmp(path, "-") == 0) {
        o->f = stdout;
        return KPHI_OK;
    }
    snprintf(o->final, sizeof o->final, "%s", path);
    int w = snprintf(o->tmp, sizeof o->tmp, "%s.tmp-XXXXXX", path);
    if (w < 0 || (size_t)w >= sizeof o->tmp)
        return kphi_error_set(err, KPHI_EINPUT, path, none, "output path is too long");
    int fd = mkstemp(o->tmp);
    if (fd < 0) {
        o->tmp[0] = '\0';
        return kphi_error_set(err, KPHI_EIO, path, none, "cannot write: %s", strerror(errno));
    }
    memcpy(pending_tmp, o->tmp, sizeof pending_tmp);
    pending_set = 1;
    o->f = fdopen(fd, "w");
    if (o->f == NULL) {
        pending_set = 0;
        close(fd);
        unlink(o->tmp);
        o->tmp[0] = '\0';
        return kphi_error_set(err, KPHI_EIO, path, none, "cannot write: %s", strerror(errno));
    }
    return KPHI_OK;
}

int kphi_cli_output_close(kphi_cli_output *o, int ok, kphi_error *err)
{
    kphi_mark none = {0, 0};
    if (o->f == NULL)
        return KPHI_OK;
    if (o->f == stdout) {
        o->f = NULL;
        if (fflush(stdout) != 0 && ok)
            return kphi_error_set(err, KPHI_EIO, "<stdout>", none, "write error: %s",
                                  strerror(errno));
        return KPHI_OK;
    }
    int bad = ferror(o->f);
    pending_set = 0; /* from here this function removes or renames the file itself */
    /* mkstemp() made the file 0600; give it the mode a plain fopen() would have */
    mode_t mask = umask(0);
    umask(mask);
    if (fchmod(fileno(o->f), 0666 & ~mask) != 0)
        bad = 1;
    if (fclose(o->f) != 0)
        bad = 1;
    o->f = NULL;
    if (!ok || bad) {
        unlink(o->tmp);
        if (ok && bad)
            return kphi_error_set(err, KPHI_EIO, o->final, none, "write error");
        return KPHI_OK;
    }
    if (rename(o->tmp, o->final) != 0) {
        int e = errno;
        unlink(o->tmp);
        return kphi_error_set(err, KPHI_EIO, o->final, none, "cannot write: %s", strerror(e));
    }
    return KPHI_OK;
}

/* --------------------------------------------------------------- species */

static int find_species_file(const char *given, char *buf, size_t n)
{
    if (given != NULL) {
        snprintf(buf, n, "%s", given);
        return 0;
    }
    if (access("reactions/species.yaml", R_OK) == 0) {
        snprintf(buf, n, "reactions/species.yaml");
        return 0;
    }
    const char *env = getenv("KPHI_DATA");
    if (env != NULL && env[0] != '\0') {
        snprintf(buf, n, "%s/reactions/species.yaml", env);
        if (access(buf, R_OK) == 0)
            return 0;
    }
    snprintf(buf, n, "%s/reactions/species.yaml", KPHI_DATADIR);
    return 0;
}

static void print_species(const kphi_species *sp)
{
    printf("%s", sp->name);
    printf("  (");
    for (size_t k = 0; k < sp->n_elements; k++)
        printf("%s%s%g", k ? " " : "", sp->element[k], sp->count[k]);
    printf(")%s\n", sp->phase == KPHI_PHASE_CONDENSED ? "  condensed, element reference only" : "");
    printf("  molar mass    %.5f g/mol (IUPAC standard atomic weights)\n", sp->molar_mass * 1e3);
    printf("  thermo        NASA 7-coefficient polynomials, %g-%g-%g K\n", sp->T_low, sp->T_mid,
           sp->T_high);
    printf("                dfH(298.15 K) = %.3f kJ/mol, S(298.15 K) = %.3f J/(mol K)\n",
           kphi_thermo_h(sp, KPHI_T_REF) / 1e3, kphi_thermo_s(sp, KPHI_T_REF));
    printf("                source: %s\n", sp->src_thermo != NULL ? sp->src_thermo : "");
    if (sp->src_dfH != NULL)
        printf("                dfH(298.15 K) chosen: %.3f kJ/mol (the polynomials give %.3f)\n"
               "                source of that choice: %s\n",
               kphi_thermo_h(sp, KPHI_T_REF) / 1e3,
               (kphi_thermo_h(sp, KPHI_T_REF) - sp->dfH_shift) / 1e3, sp->src_dfH);
    if (sp->has_critical) {
        printf("  critical      Tc = %.2f K, Pc = %.3f bar, omega = %.4f", sp->Tc, sp->Pc / 1e5,
               sp->omega);
        if (sp->Vc > 0.0)
            printf(", Vc = %.1f cm3/mol", sp->Vc * 1e6);
        if (sp->Zc > 0.0)
            printf(", Zc = %.3f", sp->Zc);
        if (sp->dipole > 0.0)
            printf(", dipole = %.2f D", sp->dipole);
        printf("\n                source: %s\n", sp->src_critical != NULL ? sp->src_critical : "");
    } else {
        printf("  critical      none (only the ideal-gas model can use this species)\n");
    }
    if (sp->has_quantum)
        printf("  quantum gas   Tc0 = %.2f K, Pc0 = %.2f bar, c1 = %.1f K, c2 = %.1f K\n"
               "                source: %s\n",
               sp->q_Tc0, sp->q_Pc0 / 1e5, sp->q_c1, sp->q_c2,
               sp->src_quantum != NULL ? sp->src_quantum : "");
    if (sp->note != NULL && sp->note[0] != '\0')
        printf("  note          %s\n", sp->note);
}

static int cmd_species(int argc, char **argv)
{
    static const struct option opts[] = {{"data", required_argument, NULL, 'd'},
                                         {"help", no_argument, NULL, 'h'},
                                         {NULL, 0, NULL, 0}};
    const char *data = NULL;
    int c;
    optind = 1;
    while ((c = getopt_long(argc, argv, "h", opts, NULL)) != -1) {
        switch (c) {
        case 'd':
            data = optarg;
            break;
        case 'h':
            kphi_cli_help(stdout);
            return 0;
        default:
            return kphi_cli_usage_error("%s", "bad option for 'species'");
        }
    }
    if (argc - optind > 1)
        return kphi_cli_usage_error("'species' takes at most one NAME, got '%s'", argv[optind + 1]);
    char path[1024];
    find_species_file(data, path, sizeof path);
    kphi_error err;
    kphi_error_clear(&err);
    kphi_species_db *db = kphi_species_db_load_file(path, &err);
    if (db == NULL)
        return kphi_cli_report(&err, path);
    int rc = 0;
    if (optind < argc) {
        const char *name = argv[optind];
        const kphi_species *sp = kphi_species_db_find(db, name);
        if (sp == NULL) {
            const char *near = kphi_species_db_suggest(db, name);
            if (near != NULL)
                fprintf(stderr, "%s: error: unknown species '%s' (did you mean '%s'?)\n", path,
                        name, near);
            else
                fprintf(stderr, "%s: error: unknown species '%s'; 'kphi species' lists them\n",
                        path, name);
            rc = 2;
        } else {
            print_species(sp);
        }
    } else {
        printf("%zu species in %s\n\n", kphi_species_db_count(db), path);
        for (size_t i = 0; i < kphi_species_db_count(db); i++) {
            print_species(kphi_species_db_get(db, i));
            putchar('\n');
        }
    }
    kphi_species_db_free(db);
    return rc;
}

/* ------------------------------------------------------------------ main */

int main(int argc, char **argv)
{
    gsl_set_error_handler_off();
    watch_signals();
    if (argc < 2) {
        kphi_cli_help(stderr);
        return 2;
    }
    const char *cmd = argv[1];
    if (strcmp(cmd, "--help") == 0 || strcmp(cmd, "-h") == 0 || strcmp(cmd, "help") == 0) {
        kphi_cli_help(stdout);
        return 0;
    }
    if (strcmp(cmd, "--version") == 0 || strcmp(cmd, "-V") == 0) {
        printf("kphi %s\n", kphi_version());
        printf("Chemical equilibrium of high-pressure gas reactions with fugacity corrections.\n");
        return 0;
    }
    if (strcmp(cmd, "solve") == 0)
        return kphi_cli_solve(argc - 1, argv + 1);
    if (strcmp(cmd, "sweep") == 0)
        return kphi_cli_sweep(argc - 1, argv + 1);
    if (strcmp(cmd, "check") == 0)
        return kphi_cli_check(argc - 1, argv + 1);
    if (strcmp(cmd, "species") == 0)
        return cmd_species(argc - 1, argv + 1);
    static const char *const cmds[] = {"solve", "sweep", "check", "species"};
    size_t nc = sizeof cmds / sizeof cmds[0];
    const char *near = NULL;
    /* "did you mean" for a mistyped command */
    for (size_t i = 0; i < nc && near == NULL; i++)
        if (strncmp(cmd, cmds[i], 3) == 0)
            near = cmds[i];
    if (near != NULL) {
        fprintf(stderr, "kphi: error: unknown command '%s' (did you mean '%s'?)\n", cmd, near);
        return 2;
    }
    return kphi_cli_usage_error("unknown command '%s'; expected solve, sweep, check or species",
                                cmd);
}
