/* kphi command-line program: what the subcommands share — usage and option errors, the
 * one-line error report, the case-file argument, command-line overrides of a case, the
 * --plot file-name check, storing a solved point in plot data, and output files written to
 * a temporary file that is renamed into place (removed on an interrupt). */
#include <errno.h>
#include <getopt.h>
#include <math.h>
#include <signal.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "cli.h"
#include "kphi/kphi.h"
#include "kphi/plot.h"

int kphi_cli_usage_error(const char *cmd, const char *fmt, const char *arg)
{
    fputs("kphi: error: ", stderr);
    fprintf(stderr, fmt, arg);
    if (cmd != NULL)
        fprintf(stderr, "; see 'kphi %s --help'\n", cmd);
    else
        fputs("; see 'kphi --help'\n", stderr);
    return 2;
}

/* Edit distance of a and b (each at most 63 characters), for "did you mean". */
static size_t edits(const char *a, const char *b)
{
    size_t la = strlen(a), lb = strlen(b);
    if (la > 63 || lb > 63)
        return (size_t)-1;
    size_t row[64];
    for (size_t j = 0; j <= lb; j++)
        row[j] = j;
    for (size_t i = 1; i <= la; i++) {
        size_t diag = row[0];
        row[0] = i;
        for (size_t j = 1; j <= lb; j++) {
            size_t up = row[j];
            size_t best = diag + (a[i - 1] != b[j - 1]);
            if (up + 1 < best)
                best = up + 1;
            if (row[j - 1] + 1 < best)
                best = row[j - 1] + 1;
            row[j] = best;
            diag = up;
        }
    }
    return row[lb];
}

int kphi_cli_bad_option(const char *cmd, const struct option *opts, char **argv, int ind,
                        int missing_value)
{
    const char *arg = ind >= 1 ? argv[ind - 1] : "";
    if (missing_value)
        return kphi_cli_usage_error(cmd, "option '%s' needs a value", arg);
    if (optopt != 0) { /* an unknown short option */
        char shown[3] = {'-', (char)optopt, '\0'};
        char text[64];
        snprintf(text, sizeof text, "unknown option '%s' for '%s'", shown, cmd);
        return kphi_cli_usage_error(cmd, "%s", text);
    }
    /* the long option's name, without dashes and value */
    char name[64];
    const char *p = arg;
    while (*p == '-')
        p++;
    size_t len = strcspn(p, "=");
    if (len >= sizeof name)
        len = sizeof name - 1;
    memcpy(name, p, len);
    name[len] = '\0';
    char msg[512];
    size_t n_prefix = 0, used = 0;
    for (const struct option *o = opts; o->name != NULL; o++)
        if (len > 0 && strncmp(o->name, name, len) == 0) {
            int w = snprintf(msg + used, sizeof msg - used, "%s--%s", n_prefix ? ", " : "",
                             o->name);
            if (w > 0 && (size_t)w < sizeof msg - used)
                used += (size_t)w;
            n_prefix++;
        }
    char text[700];
    if (n_prefix > 1) {
        snprintf(text, sizeof text, "ambiguous option '--%s': it could be %s", name, msg);
        return kphi_cli_usage_error(cmd, "%s", text);
    }
    const char *near = NULL;
    size_t best = len / 3 > 1 ? len / 3 : 1;
    for (const struct option *o = opts; o->name != NULL; o++) {
        size_t d = edits(name, o->name);
        if (d <= best) {
            best = d;
            near = o->name;
        }
    }
    if (near != NULL)
        snprintf(text, sizeof text, "unknown option '%.60s' for '%s' (did you mean '--%s'?)",
                 arg, cmd, near);
    else
        snprintf(text, sizeof text, "unknown option '%.60s' for '%s'", arg, cmd);
    return kphi_cli_usage_error(cmd, "%s", text);
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
        return kphi_cli_usage_error(cmd, "%s", msg);
    }
    if (argc - first > 1) {
        snprintf(msg, sizeof msg, "'%s' takes one case file; unexpected '%%s'", cmd);
        return kphi_cli_usage_error(cmd, msg, argv[first + 1]);
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

void kphi_cli_warning(void *path, const char *text)
{
    fprintf(stderr, "%s: warning: %s\n", (const char *)path, text);
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

void kphi_cli_watch_signals(void)
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

/* ------------------------------------------------------------ --approach-dT */

int kphi_cli_approach_dT(const kphi_case *cs, const char *text, int axes, double *dT,
                         kphi_error *err)
{
    kphi_mark at = {1, 1};
    const char *p = text;
    while (*p == ' ')
        p++;
    double sign = 1.0;
    if (*p == '-' || *p == '+') {
        sign = *p == '-' ? -1.0 : 1.0;
        p++;
    }
    kphi_units_origin origin = {"<command line>", {1, (long)(p - text) + 1}};
    double v = 0.0;
    int rc = kphi_units_temperature_step(p, &v, &origin, err);
    if (rc != KPHI_OK)
        return kphi_cli_option_error(rc, "--approach-dT", err);
    *dT = sign * v;
    /* every temperature the points are solved at, T + dT, in the data range */
    const kphi_rxnset *set = kphi_case_rxnset(cs);
    double lo = 0.0, hi = INFINITY;
    for (size_t i = 0; i < kphi_rxnset_n_species(set); i++) {
        lo = fmax(lo, kphi_rxnset_species(set, i)->T_low);
        hi = fmin(hi, kphi_rxnset_species(set, i)->T_high);
    }
    size_t n = axes ? kphi_case_sweep_n_T(cs) : 1;
    const double *T = axes ? kphi_case_sweep_T(cs) : NULL;
    for (size_t k = 0; k < n; k++) {
        double t = (axes ? T[k] : kphi_case_T(cs)) + *dT;
        if (!(t >= lo && t <= hi))
            return kphi_error_set(err, KPHI_EINPUT, "<command line>", at,
                                  "--approach-dT: T + dT = %.2f K lies outside %.0f-%.0f K, the "
                                  "range where every species of the set has thermo data",
                                  t, lo, hi);
    }
    return KPHI_OK;
}

/* ------------------------------------------------------------ case echo */

kphi_case_kij_entry *kphi_cli_case_kij(const kphi_case *cs, size_t *n)
{
    *n = kphi_case_n_kij(cs);
    if (*n == 0)
        return NULL;
    kphi_case_kij_entry *k = calloc(*n, sizeof *k);
    if (k == NULL) {
        *n = 0;
        return NULL;
    }
    for (size_t m = 0; m < *n; m++)
        kphi_case_kij(cs, m, &k[m]);
    return k;
}

/* ------------------------------------------------------------ plot data */

void kphi_cli_plot_store(kphi_plot_data *d, size_t iT, size_t iP, const kphi_report_point *pt,
                         long product)
{
    double yr = product >= 0 ? pt->real->y[product] : NAN;
    double yi = product >= 0 ? pt->ideal->y[product] : NAN;
    kphi_plot_data_set(d, iT, iP, pt->X_real, pt->X_ideal, pt->real->lnKphi, yr, yi);
    if (pt->energy != NULL && pt->energy->adiabatic)
        kphi_plot_data_set_adiabatic(d, iT, iP, pt->energy->X_out[0], pt->energy->X_out[1],
                                     pt->energy->T_out[0], pt->energy->T_out[1]);
}

int kphi_cli_phases_arg(const char *text, int *gas_only, kphi_error *err)
{
    kphi_mark at = {1, 1};
    if (strcmp(text, "auto") == 0 || strcmp(text, "gas") == 0) {
        *gas_only = strcmp(text, "gas") == 0;
        return KPHI_OK;
    }
    return kphi_error_set(err, KPHI_EINPUT, "<command line>", at,
                          "--phases: '%.40s' is not a choice; expected 'auto' (two phases where "
                          "the stability test finds the gas would condense) or 'gas' (the gas "
                          "answer only, tested and warned about)",
                          text);
}

int kphi_cli_refuse(const char *opt, const char *why)
{
    kphi_error e;
    kphi_error_clear(&e);
    kphi_mark at = {1, 1};
    kphi_error_set(&e, KPHI_EINPUT, "<command line>", at, "%s: %s", opt, why);
    return kphi_cli_report(&e, NULL);
}

void kphi_cli_K_outside_summary(const char *path, const kphi_rxnset *set, size_t basis,
                                const size_t K_outside[], size_t total, const char *where)
{
    for (size_t j = 0; j < kphi_rxnset_n_reactions(set) && j < KPHI_CLI_K_COUNT_MAX; j++) {
        const kphi_rxnset_kcorr *k = kphi_rxnset_kcorr_get(set, j, basis);
        if (k == NULL || K_outside[j] == 0)
            continue;
        double lo, hi;
        kphi_rxnset_kcorr_range(k, &lo, &hi);
        fprintf(stderr,
                "%s: warning: K of reaction %zu (%s) extrapolated at %s%zu of %zu points: "
                "outside its validity range %.2f-%.2f K\n",
                path, j + 1, kphi_rxnset_kcorr_name(k), where, K_outside[j], total, lo, hi);
    }
}

#define MAX_POINTS_UNFORCED 1e8

int kphi_cli_grid_limit(size_t nT, size_t nP, int force, kphi_error *err)
{
    if ((double)nT * (double)nP <= MAX_POINTS_UNFORCED || force)
        return KPHI_OK;
    kphi_mark none = {0, 0};
    return kphi_error_set(err, KPHI_EINPUT, "<command line>", none,
                          "the grid has %.4g points (%zu T x %zu P), over 1e8; pass --force "
                          "to run it anyway",
                          (double)nT * (double)nP, nT, nP);
}

int kphi_cli_flash_model(kphi_eos_model model, const char *eos_opt, const char *path,
                         kphi_error *err)
{
    if (kphi_phase_model_ok(model))
        return KPHI_OK;
    kphi_mark top = {1, 1};
    return kphi_error_set(err, KPHI_EINPUT, eos_opt != NULL ? "<command line>" : path, top,
                          "a flash needs a cubic equation of state (rk, srk or pr); '%s' has "
                          "no liquid root (pass --eos pr)",
                          kphi_eos_model_name(model));
}
