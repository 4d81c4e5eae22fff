/* kphi solve and kphi check.
 *
 * solve's --approach SPECIES=Y and --adiabatic add, after the point's own report, the
 * approach temperature of a measured outlet and the adiabatic equilibrium outlet of the
 * bed (kphi_equil_approach_temperature(), kphi_equil_adiabatic_outlet(); the equations
 * and their sources are in src/equil_energy.c), for the chosen model and the ideal gas;
 * --intercool T2,T3,... adds further adiabatic beds, the gas cooled to T2, T3, ... at
 * constant composition before each (kphi_equil_adiabatic_beds()).
 * The answers reach the report module in kphi_report_point.energy (kphi_report_energy),
 * which writes them as table lines after the conversion block, JSON members and trailing
 * CSV columns. Without these options energy is NULL and nothing changes. */
#include <ctype.h>
#include <errno.h>
#include <getopt.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"
#include "kphi/kphi.h"
#include "kphi/plot.h"

enum { OPT_T = 1000, OPT_P, OPT_EOS, OPT_FEED, OPT_QUANTUM, OPT_FORMAT, OPT_APPROACH,
       OPT_ADIABATIC, OPT_INTERCOOL, OPT_PLOT, OPT_PHASES,
       OPT_PLOT_IDEAL, OPT_K, OPT_APPROACH_DT };

static const struct option solve_opts[] = {
    {"T", required_argument, NULL, OPT_T},
    {"P", required_argument, NULL, OPT_P},
    {"eos", required_argument, NULL, OPT_EOS},
    {"feed", required_argument, NULL, OPT_FEED},
    {"quantum", no_argument, NULL, OPT_QUANTUM},
    {"format", required_argument, NULL, OPT_FORMAT},
    {"approach", required_argument, NULL, OPT_APPROACH},
    {"adiabatic", no_argument, NULL, OPT_ADIABATIC},
    {"intercool", required_argument, NULL, OPT_INTERCOOL},
    {"plot", required_argument, NULL, OPT_PLOT},
    {"phases", required_argument, NULL, OPT_PHASES},
    {"plot-ideal", required_argument, NULL, OPT_PLOT_IDEAL},
    {"K", required_argument, NULL, OPT_K},
    {"approach-dT", required_argument, NULL, OPT_APPROACH_DT},
    {"output", required_argument, NULL, 'o'},
    {"help", no_argument, NULL, 'h'},
    {NULL, 0, NULL, 0}};

/* The phase test of a point: mode, workspace and where the phases go (one per model). */
typedef struct {
    int gas_only;             /* --phases gas */
    kphi_phase_work *pw;
    kphi_flash_result *fr;
} point_phases;

/* Solve one point with `model` and the K basis of opt at the case's T + dT (dT:
 * --approach-dT, else 0; the ideal-gas answer is solved alongside), and its equivalent
 * ideal-gas pressure from the ideal answer (why it is undefined into note). With a cubic
 * model the real-gas answer goes through kphi_phase_equil_solve(): two phases where the
 * stability test says so (or, with --phases gas, the gas kept and tested). */
static int solve_point(const kphi_case *c, kphi_eos_model model, const kphi_equil_options *opt,
                       double dT, kphi_equil_work *w, kphi_equil_result *real,
                       kphi_equil_result *ideal,
                       kphi_equil_result *const tmp[2], char note[160],
                       const point_phases *ph, kphi_report_point *pt, kphi_error *err)
{
    const kphi_rxnset *set = kphi_case_rxnset(c);
    const double *feed = kphi_case_feed(c);
    double T = kphi_case_T(c) + dT, P = kphi_case_P(c);
    kphi_eos *eos = kphi_case_make_eos(c, model, err);
    kphi_eos *ig = kphi_case_make_eos(c, KPHI_EOS_IDEAL, err);
    int rc = (eos == NULL || ig == NULL) ? (err != NULL ? (int)err->code : KPHI_ENOMEM) : KPHI_OK;
    if (rc == KPHI_OK)
        rc = kphi_equil_solve(set, ig, T, P, feed, NULL, opt, w, ideal, err);
    int tested = ph != NULL && kphi_phase_model_ok(model);
    if (rc == KPHI_OK && tested)
        rc = kphi_phase_equil_solve(set, eos, T, P, feed, NULL, ph->gas_only, opt, NULL, w,
                                    ph->pw, real, ph->fr, err);
    else if (rc == KPHI_OK)
        rc = kphi_equil_solve(set, eos, T, P, feed, NULL, opt, w, real, err);
    if (rc == KPHI_OK) {
        const double *wt = kphi_rxnset_conversion_weights(set);
        pt->phases = tested ? ph->fr : NULL;
        pt->gas_only = tested && ph->gas_only;
        pt->gas_unstable = tested && ph->gas_only && kphi_phase_gas_unstable(ph->fr, NULL);
        pt->set = set;
        pt->feed = feed;
        pt->model = model;
        /* the Beattie-Bridgeman models use their own constants, not critical ones */
        pt->quantum = kphi_case_quantum(c) && model != KPHI_EOS_BB && model != KPHI_EOS_BBV;
        pt->real = real;
        pt->ideal = ideal;
        pt->X_real = kphi_equil_conversion(real, feed, wt);
        pt->X_ideal = kphi_equil_conversion(ideal, feed, wt);
        pt->P_equiv = NAN;
        pt->T_unit = kphi_case_T_unit(c);
        pt->P_unit = kphi_case_P_unit(c);
        pt->source = kphi_case_path(c);
        pt->case_name = kphi_case_name(c);
        pt->K_basis = opt->K_basis;
        if (model == KPHI_EOS_IDEAL) {
            pt->P_equiv = P;
        } else {
            kphi_error e2;
            kphi_error_clear(&e2);
            double Peq;
            if (kphi_equil_equivalent_pressure_from(set, ig, T, feed, wt, pt->X_real, ideal, &Peq,
                                                    w, tmp, &e2) == KPHI_OK) {
                pt->P_equiv = Peq;
            } else {
                snprintf(note, 160, "%.159s", e2.msg);
                pt->P_equiv_note = note;
            }
        }
    }
    kphi_eos_free(eos);
    kphi_eos_free(ig);
    return rc;
}

/* ------------------------------------------------ --approach and --adiabatic */

static const char CMDLINE[] = "<command line>";

/* Reacting species as "N2, H2, NH3" for messages. */
static void reacting_list(const kphi_rxnset *set, char *list, size_t n)
{
    size_t used = 0;
    list[0] = '\0';
    for (size_t m = 0; m < kphi_rxnset_n_species(set); m++) {
        if (kphi_rxnset_is_inert(set, m))
            continue;
        int w = snprintf(list + used, n - used, "%s%s", used > 0 ? ", " : "",
                         kphi_rxnset_species(set, m)->name);
        if (w < 0 || (size_t)w >= n - used)
            break;
        used += (size_t)w;
    }
}

/* "NH3=0.165": a species the reactions move and a mole fraction in (0, 1). Errors point
 * at <command line>, column within the value. */
static int parse_approach(const kphi_rxnset *set, const char *text, size_t *k, double *y,
                          long *value_column, kphi_error *err)
{
    kphi_mark at = {1, 1};
    const char *eq = strchr(text, '=');
    if (eq == NULL)
        return kphi_error_set(err, KPHI_EINPUT, CMDLINE, at,
                              "expected SPECIES=Y (a measured outlet mole fraction, e.g. "
                              "NH3=0.165); found '%.60s' with no '='",
                              text);
    const char *a = text, *b = eq;
    while (a < b && isspace((unsigned char)*a))
        a++;
    while (b > a && isspace((unsigned char)b[-1]))
        b--;
    at.column = (long)(a - text) + 1;
    if (a == b)
        return kphi_error_set(err, KPHI_EINPUT, CMDLINE, at,
                              "missing species before '='; expected e.g. NH3=0.165");
    char name[64];
    size_t len = (size_t)(b - a) < sizeof name - 1 ? (size_t)(b - a) : sizeof name - 1;
    memcpy(name, a, len);
    name[len] = '\0';
    char list[160];
    reacting_list(set, list, sizeof list);
    long i = kphi_rxnset_species_index(set, name);
    if (i < 0) {
        const char *near = kphi_rxnset_suggest(set, name);
        if (near != NULL)
            return kphi_error_set(err, KPHI_EINPUT, CMDLINE, at,
                                  "unknown species '%s' in --approach (did you mean '%s'?)",
                                  name, near);
        return kphi_error_set(err, KPHI_EINPUT, CMDLINE, at,
                              "unknown species '%s' in --approach; give one the reactions "
                              "move: %s",
                              name, list);
    }
    if (kphi_rxnset_is_inert(set, (size_t)i))
        return kphi_error_set(err, KPHI_EINPUT, CMDLINE, at,
                              "'%s' is inert (in no reaction), so its mole fraction tells no "
                              "temperature; give one the reactions move: %s",
                              name, list);
    const char *v = eq + 1;
    at.column = (long)(v - text) + 1;
    char *end = NULL;
    errno = 0;
    double val = strtod(v, &end);
    while (end != NULL && isspace((unsigned char)*end))
        end++;
    if (end == v || end == NULL || *end != '\0' || errno == ERANGE || !isfinite(val))
        return kphi_error_set(err, KPHI_EINPUT, CMDLINE, at,
                              "'%.40s' is not a number; expected a measured mole fraction "
                              "between 0 and 1, e.g. %s=0.165",
                              v, name);
    if (!(val > 0.0 && val < 1.0))
        return kphi_error_set(err, KPHI_EINPUT, CMDLINE, at,
                              "measured y_%s = %g is outside (0, 1); give a mole fraction, "
                              "not a percentage",
                              name, val);
    *k = (size_t)i;
    *y = val;
    *value_column = at.column;
    return KPHI_OK;
}

/* "CO=0.031,CO2=0.052,H2=0.61,...": a whole outlet analysis for the approach per reaction.
 * Species of the set, each once, mole fractions in [0, 1] summing to 1 within 2 % (then
 * normalised; a sum of 100 means percentages and is refused); species not named are 0.
 * Errors point at <command line>, column within the text. */
static int parse_analysis(const kphi_rxnset *set, const char *text, double y[], kphi_error *err)
{
    size_t s = kphi_rxnset_n_species(set);
    for (size_t i = 0; i < s; i++)
        y[i] = -1.0; /* not named yet */
    const char *p = text;
    for (;;) {
        const char *end = strchr(p, ',');
        size_t len = end != NULL ? (size_t)(end - p) : strlen(p);
        kphi_mark at = {1, (long)(p - text) + 1};
        const char *eq = memchr(p, '=', len);
        if (eq == NULL)
            return kphi_error_set(err, KPHI_EINPUT, CMDLINE, at,
                                  "expected SPECIES=Y in the analysis, found '%.*s'",
                                  (int)(len < 40 ? len : 40), p);
        const char *a = p, *b = eq;
        while (a < b && isspace((unsigned char)*a))
            a++;
        while (b > a && isspace((unsigned char)b[-1]))
            b--;
        char name[64];
        size_t nl = (size_t)(b - a) < sizeof name - 1 ? (size_t)(b - a) : sizeof name - 1;
        memcpy(name, a, nl);
        name[nl] = '\0';
        at.column = (long)(a - text) + 1;
        long i = kphi_rxnset_species_index(set, name);
        if (i < 0) {
            const char *near = kphi_rxnset_suggest(set, name);
            if (near != NULL)
                return kphi_error_set(err, KPHI_EINPUT, CMDLINE, at,
                                      "unknown species '%s' in the analysis (did you mean "
                                      "'%s'?)",
                                      name, near);
            return kphi_error_set(err, KPHI_EINPUT, CMDLINE, at,
                                  "unknown species '%s' in the analysis; the reaction set has "
                                  "no such species",
                                  name);
        }
        if (y[i] >= 0.0)
            return kphi_error_set(err, KPHI_EINPUT, CMDLINE, at,
                                  "'%s' is given twice in the analysis", name);
        char num[64];
        size_t vl = len - (size_t)(eq + 1 - p);
        at.column = (long)(eq + 1 - text) + 1;
        if (vl >= sizeof num)
            vl = sizeof num - 1;
        memcpy(num, eq + 1, vl);
        num[vl] = '\0';
        char *stop = NULL;
        errno = 0;
        double v = strtod(num, &stop);
        while (stop != NULL && isspace((unsigned char)*stop))
            stop++;
        if (stop == num || stop == NULL || *stop != '\0' || errno == ERANGE || !isfinite(v))
            return kphi_error_set(err, KPHI_EINPUT, CMDLINE, at,
                                  "'%s' is not a number; expected the measured mole fraction "
                                  "of %s",
                                  num, name);
        if (!(v >= 0.0 && v <= 1.0))
            return kphi_error_set(err, KPHI_EINPUT, CMDLINE, at,
                                  "y_%s = %g is outside [0, 1]; give mole fractions, not "
                                  "percentages",
                                  name, v);
        y[i] = v;
        if (end == NULL)
            break;
        p = end + 1;
    }
    double sum = 0.0;
    for (size_t i = 0; i < s; i++) {
        if (y[i] < 0.0)
            y[i] = 0.0;
        sum += y[i];
    }
    kphi_mark top = {1, 1};
    if (!(fabs(sum - 1.0) <= 0.02))
        return kphi_error_set(err, KPHI_EINPUT, CMDLINE, top,
                              "the analysis sums to %.4g; give the mole fractions of the whole "
                              "outlet (inerts too), summing to 1",
                              sum);
    for (size_t i = 0; i < s; i++)
        y[i] /= sum;
    return KPHI_OK;
}

/* Parse --intercool: the inlet temperatures of beds 2, 3, ... into T_in[1 ..]; *n_beds
 * counts the first bed too. */
static int parse_intercool(const char *text, double T_in[], size_t *n_beds, kphi_error *err)
{
    size_t n = 1;
    const char *p = text;
    for (;;) {
        const char *end = strchr(p, ',');
        size_t len = end != NULL ? (size_t)(end - p) : strlen(p);
        kphi_mark at = {1, (long)(p - text) + 1};
        if (n >= KPHI_REPORT_MAX_BEDS)
            return kphi_error_set(err, KPHI_EINPUT, CMDLINE, at,
                                  "too many beds: at most %d temperatures after the first bed",
                                  KPHI_REPORT_MAX_BEDS - 1);
        char item[64];
        if (len == 0 || len >= sizeof item)
            return kphi_error_set(err, KPHI_EINPUT, CMDLINE, at,
                                  "expected a bed inlet temperature such as 420C, found '%.*s'",
                                  (int)(len < 40 ? len : 40), p);
        memcpy(item, p, len);
        item[len] = '\0';
        kphi_units_origin origin = {CMDLINE, at};
        int rc = kphi_units_temperature(item, &T_in[n], &origin, err);
        if (rc != KPHI_OK)
            return rc;
        n++;
        if (end == NULL)
            break;
        p = end + 1;
    }
    *n_beds = n;
    return KPHI_OK;
}

/* What --approach and --adiabatic found; index [0] the chosen model, [1] the ideal gas. */
typedef struct {
    int approach, adiabatic;
    size_t k;       /* approach species */
    double y_meas;  /* its measured mole fraction */
    long y_column;  /* where that value starts in the --approach text */
    double T_eq[2]; /* K */
    double T_out[2];
    double X_out[2];
    kphi_equil_result *out[2]; /* the adiabatic outlets of the first bed */
    size_t n_beds;  /* beds in the train (1 without --intercool) */
    double T_in[KPHI_REPORT_MAX_BEDS];                       /* K, bed inlets */
    kphi_equil_result *bed[KPHI_REPORT_MAX_BEDS][2];         /* outlets; bed[0] = out */
    double X_bed[KPHI_REPORT_MAX_BEDS][2];
    size_t key;     /* species shown in the adiabatic line */
    int ideal_only; /* the model is the ideal gas: one answer */
    int analysis;   /* --approach with a whole analysis: approach per reaction */
    double *y_an;   /* [n_species] the analysis, normalised */
    kphi_equil_reaction_temperature *rxn[2]; /* [n_reactions]: model, ideal gas */
    double dT;      /* --approach-dT, K (0 without) */
    int outlet_dT;  /* --approach-dT given */
} extras;

/* A measured outlet lies between its feed and the equilibrium the feed moves towards: a
 * y_meas on the other side of the feed's mole fraction (e.g. less NH3 than the feed when the
 * equilibrium at the outlet temperature holds more) is an error in the analysis or the
 * feed, refused with KPHI_EINPUT at the value on the command line. eq is the equilibrium
 * at the case's T with the chosen model. */
static int check_approach_side(const kphi_case *c, const extras *x, const kphi_equil_result *eq,
                               kphi_error *err)
{
    const kphi_rxnset *set = kphi_case_rxnset(c);
    const double *feed = kphi_case_feed(c);
    double total = 0.0;
    for (size_t i = 0; i < kphi_rxnset_n_species(set); i++)
        total += feed[i];
    double y_feed = feed[x->k] / total, y_eq = eq->y[x->k];
    if ((x->y_meas - y_feed) * (y_eq - y_feed) >= 0.0)
        return KPHI_OK;
    const char *name = kphi_rxnset_species(set, x->k)->name;
    double Tu;
    const char *tu = kphi_case_T_unit(c);
    if (tu == NULL || kphi_units_temperature_to(eq->T, tu, &Tu) != 0) {
        tu = "K";
        Tu = eq->T;
    }
    int below = x->y_meas < y_feed;
    kphi_mark at = {1, x->y_column};
    return kphi_error_set(err, KPHI_EINPUT, CMDLINE, at,
                          "measured y_%s = %g is %s the feed's %.4g, but at %.2f %s the "
                          "reactions %s y_%s towards %.4g: the outlet cannot be %s in %s than "
                          "its feed; check the analysis and the feed",
                          name, x->y_meas, below ? "below" : "above", y_feed, Tu, tu,
                          below ? "raise" : "lower", name, y_eq, below ? "leaner" : "richer",
                          name);
}

static int compute_extras(const kphi_case *c, kphi_eos_model model,
                          const kphi_equil_options *opt, extras *x, kphi_equil_work *w,
                          kphi_equil_result *tmp, kphi_error *err)
{
    const kphi_rxnset *set = kphi_case_rxnset(c);
    const double *feed = kphi_case_feed(c);
    double T = kphi_case_T(c), P = kphi_case_P(c);
    kphi_mark none = {0, 0};
    x->ideal_only = model == KPHI_EOS_IDEAL;
    long key = kphi_rxnset_first_product(set);
    x->key = key >= 0 ? (size_t)key : 0;
    int rc = KPHI_OK;
    for (int m = 0; m < 2 && rc == KPHI_OK; m++) {
        kphi_eos_model mm = m == 0 ? model : KPHI_EOS_IDEAL;
        const char *label = m == 0 && !x->ideal_only ? kphi_eos_model_name(model) : "ideal gas";
        kphi_eos *eos = kphi_case_make_eos(c, mm, err);
        if (eos == NULL)
            return err->code != KPHI_OK ? (int)err->code : KPHI_ENOMEM;
        kphi_error e;
        kphi_error_clear(&e);
        if (x->analysis) {
            rc = kphi_equil_reaction_approach(set, eos, T, P, x->y_an, opt, w, x->rxn[m], &e);
            if (rc != KPHI_OK)
                kphi_error_set(err, e.code, NULL, none, "--approach (%s): %.200s", label, e.msg);
        } else if (x->approach) {
            rc = kphi_equil_approach_temperature(set, eos, T, P, feed, x->k, x->y_meas, opt, w,
                                                 tmp, &e);
            if (rc == KPHI_OK)
                x->T_eq[m] = tmp->T;
            else
                kphi_error_set(err, e.code, NULL, none, "--approach (%s): %.200s", label, e.msg);
        }
        if (rc == KPHI_OK && x->adiabatic) {
            kphi_equil_result *outs[KPHI_REPORT_MAX_BEDS];
            x->T_in[0] = T;
            x->bed[0][m] = x->out[m];
            for (size_t b = 0; b < x->n_beds; b++)
                outs[b] = x->bed[b][m];
            rc = kphi_equil_adiabatic_beds(set, eos, x->T_in, x->n_beds, P, feed, opt, w, outs,
                                           &e);
            if (rc == KPHI_OK) {
                const double *wt = kphi_rxnset_conversion_weights(set);
                for (size_t b = 0; b < x->n_beds; b++)
                    x->X_bed[b][m] = kphi_equil_conversion(x->bed[b][m], feed, wt);
                x->T_out[m] = x->out[m]->T;
                x->X_out[m] = x->X_bed[0][m];
            } else {
                /* bad input here is a bed temperature given on the command line (the case's
                 * own T was checked by the main solve) */
                kphi_mark top = {1, 1};
                int cmd = e.code == KPHI_EINPUT;
                kphi_error_set(err, e.code, cmd ? CMDLINE : NULL, cmd ? top : none,
                               "%s (%s): %.200s", x->n_beds > 1 ? "--intercool" : "--adiabatic",
                               label, e.msg);
            }
        }
        kphi_eos_free(eos);
    }
    return rc;
}

int kphi_cli_solve(int argc, char **argv)
{
    const char *T = NULL, *P = NULL, *eos = NULL, *feed = NULL, *out = NULL;
    const char *format = "table", *approach = NULL, *intercool = NULL, *plot = NULL;
    const char *phases = "auto", *approach_dT = NULL;
    const char *plot_ideal = NULL;
    const char *Kname = NULL;
    int quantum = 0, adiabatic = 0, c;
    optind = 1;
    opterr = 0;
    while ((c = getopt_long(argc, argv, ":ho:", solve_opts, NULL)) != -1) {
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
        case OPT_APPROACH:
            approach = optarg;
            break;
        case OPT_ADIABATIC:
            adiabatic = 1;
            break;
        case OPT_INTERCOOL:
            intercool = optarg;
            adiabatic = 1;
            break;
        case OPT_PLOT:
            plot = optarg;
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
        case 'o':
            out = optarg;
            break;
        case 'h':
            return kphi_cli_help_command(stdout, "solve");
        case ':':
            return kphi_cli_bad_option("solve", solve_opts, argv, optind, 1);
        default:
            return kphi_cli_bad_option("solve", solve_opts, argv, optind, 0);
        }
    }
    const char *path = NULL;
    int usage = kphi_cli_case_arg(argc, argv, optind, "solve", &path);
    if (usage != 0)
        return usage;

    kphi_error err;
    kphi_error_clear(&err);
    kphi_report_format fmt;
    int gas_only = 0;
    if (kphi_cli_phases_arg(phases, &gas_only, &err) != KPHI_OK)
        return kphi_cli_report(&err, NULL);
    if (kphi_cli_option_error(kphi_report_format_parse(format, &fmt, &err), "--format", &err) !=
        KPHI_OK)
        return kphi_cli_report(&err, NULL);
    int all = eos != NULL && strcmp(eos, "all") == 0;
    if (plot != NULL && kphi_cli_plot_arg(plot, &err) != KPHI_OK)
        return kphi_cli_report(&err, NULL); /* before anything is written */
    int show_ideal = 1;
    if (plot_ideal != NULL && kphi_cli_plot_ideal_arg(plot_ideal, &show_ideal, &err) != KPHI_OK)
        return kphi_cli_report(&err, NULL);
    if (plot_ideal != NULL && plot == NULL)
        return kphi_cli_refuse("--plot-ideal", "there is no chart to draw; add --plot FILE");
    if (plot != NULL && all) {
        return kphi_cli_refuse("--plot", "needs one model; it cannot be combined with --eos all");
    }

    if (approach_dT != NULL && (approach != NULL || adiabatic || all)) {
        /* one meaning of the case's T at a time */
        kphi_mark top = {1, 1};
        const char *other = approach != NULL ? "--approach"
                            : all            ? "--eos all"
                            : intercool != NULL ? "--intercool"
                                                : "--adiabatic";
        char why[160];
        if (all)
            snprintf(why, sizeof why, "--approach-dT needs one model");
        else if (approach != NULL)
            snprintf(why, sizeof why, "--approach-dT sets an outlet's distance from "
                                      "equilibrium, --approach measures it; run them one at a "
                                      "time");
        else
            snprintf(why, sizeof why, "--approach-dT reads the case's T as an outlet, %s as a "
                                      "bed inlet; run them one at a time",
                     other);
        kphi_error_set(&err, KPHI_EINPUT, CMDLINE, top, "--approach-dT and %s cannot be combined: %s",
                       other, why);
        return kphi_cli_report(&err, NULL);
    }
    if (approach != NULL && adiabatic) {
        /* the case's T cannot be both the measured outlet and the bed inlet */
        kphi_mark top = {1, 1};
        const char *other = intercool != NULL ? "--intercool" : "--adiabatic";
        kphi_error_set(&err, KPHI_EINPUT, CMDLINE, top,
                       "--approach and %s cannot be combined: --approach reads the case's T "
                       "as the measured outlet temperature, %s as the inlet temperature of a "
                       "bed; run them one at a time",
                       other, other);
        return kphi_cli_report(&err, NULL);
    }

    char species[1024];
    kphi_case *cs =
        kphi_case_load_file_default(path, kphi_cli_species_default(species, sizeof species), &err);
    if (cs == NULL)
        return kphi_cli_report(&err, path);
    kphi_cli_overrides ov = {feed, T, P, all ? NULL : eos, quantum, 0};
    int rc = kphi_cli_apply_overrides(cs, &ov, &err);
    if (rc == KPHI_OK && Kname != NULL)
        rc = kphi_cli_option_error(kphi_case_set_K(cs, Kname, &err), "--K", &err);
    int allK = rc == KPHI_OK && kphi_case_K_basis(cs) == KPHI_CASE_K_ALL;
    if (allK && (all || plot != NULL || approach != NULL || adiabatic)) {
        /* 'all' compares the bases at one point with one model and nothing else */
        const char *with = all ? "--eos all"
                               : (plot != NULL ? "--plot"
                                               : (approach != NULL ? "--approach"
                                                                   : (intercool != NULL
                                                                          ? "--intercool"
                                                                          : "--adiabatic")));
        kphi_error e;
        kphi_error_clear(&e);
        kphi_case_require_one_K(cs, &e);
        kphi_mark top = {1, 1};
        if (Kname != NULL)
            rc = kphi_error_set(&err, KPHI_EINPUT, CMDLINE, top,
                                "--K all compares the K bases at one point; it cannot be "
                                "combined with %s",
                                with);
        else
            rc = kphi_error_set(&err, KPHI_EINPUT, e.path, (kphi_mark){e.line, e.column},
                                "K: all compares the K bases at one point; %s needs one "
                                "(pass --K NAME)",
                                with);
    }
    extras ex;
    memset(&ex, 0, sizeof ex);
    ex.adiabatic = adiabatic;
    ex.n_beds = 1;
    if (rc == KPHI_OK && intercool != NULL)
        rc = kphi_cli_option_error(parse_intercool(intercool, ex.T_in, &ex.n_beds, &err),
                                   "--intercool", &err);
    if (rc == KPHI_OK && approach != NULL && strchr(approach, ',') != NULL) {
        /* a whole analysis: the approach per reaction */
        ex.approach = 1;
        ex.analysis = 1;
        size_t ns = kphi_rxnset_n_species(kphi_case_rxnset(cs));
        size_t nr = kphi_rxnset_n_reactions(kphi_case_rxnset(cs));
        ex.y_an = calloc(ns, sizeof *ex.y_an);
        ex.rxn[0] = calloc(nr + 1, sizeof *ex.rxn[0]);
        ex.rxn[1] = calloc(nr + 1, sizeof *ex.rxn[1]);
        if (ex.y_an == NULL || ex.rxn[0] == NULL || ex.rxn[1] == NULL) {
            kphi_mark none = {0, 0};
            rc = kphi_error_set(&err, KPHI_ENOMEM, NULL, none, "out of memory");
        } else {
            rc = kphi_cli_option_error(parse_analysis(kphi_case_rxnset(cs), approach, ex.y_an,
                                                      &err),
                                       "--approach", &err);
        }
    } else if (rc == KPHI_OK && approach != NULL) {
        ex.approach = 1;
        rc = kphi_cli_option_error(
            parse_approach(kphi_case_rxnset(cs), approach, &ex.k, &ex.y_meas, &ex.y_column, &err),
            "--approach", &err);
    }
    if (rc == KPHI_OK && all && (ex.approach || ex.adiabatic)) {
        kphi_mark top = {1, 1};
        rc = kphi_error_set(&err, KPHI_EINPUT, CMDLINE, top,
                            "%s: needs one model; it cannot be combined with --eos all",
                            ex.approach ? "--approach"
                                        : (intercool != NULL ? "--intercool" : "--adiabatic"));
    }
    if (rc == KPHI_OK && (isnan(kphi_case_T(cs)) || isnan(kphi_case_P(cs)))) {
        kphi_mark top = {1, 1};
        rc = kphi_error_set(&err, KPHI_EINPUT, path, top,
                            isnan(kphi_case_T(cs))
                                ? "missing T: the case gives only a sweep over T; add 'T: 450 C' "
                                  "or pass --T"
                                : "missing P: the case gives only a sweep over P; add 'P: 200 "
                                  "bar' or pass --P");
    }
    if (rc == KPHI_OK && approach_dT != NULL) {
        ex.outlet_dT = 1;
        rc = kphi_cli_approach_dT(cs, approach_dT, 0, &ex.dT, &err);
    }
    if (rc != KPHI_OK) {
        free(ex.y_an);
        free(ex.rxn[0]);
        free(ex.rxn[1]);
        kphi_case_free(cs);
        return kphi_cli_report(&err, path);
    }

    const kphi_rxnset *set = kphi_case_rxnset(cs);
    size_t s = kphi_rxnset_n_species(set), r = kphi_rxnset_n_reactions(set);
    /* the runs: one, every model (--eos all) or every K basis (--K all) */
    enum { NM = KPHI_EOS_N_MODELS };
    size_t nm = all ? NM : (allK ? kphi_rxnset_n_K_bases(set) : 1);
    kphi_equil_options opt = kphi_equil_options_default();
    if (!allK)
        opt.K_basis = kphi_case_K_basis(cs);
    kphi_eos_model *models = calloc(nm, sizeof *models);
    size_t *bases = calloc(nm, sizeof *bases);
    for (size_t k = 0; k < nm && models != NULL && bases != NULL; k++) {
        models[k] = all ? (kphi_eos_model)k : kphi_case_eos(cs);
        bases[k] = allK ? k : opt.K_basis;
    }
    kphi_equil_work *w = kphi_equil_work_alloc(s, r);
    /* real, ideal per run; two scratch */
    kphi_equil_result **res = calloc(2 * nm + 2, sizeof *res);
    kphi_report_point *pts = calloc(nm, sizeof *pts);
    char (*why)[256] = calloc(nm, sizeof *why);
    char (*notes)[160] = calloc(nm, sizeof *notes);
    int ok = w != NULL && models != NULL && bases != NULL && res != NULL && pts != NULL &&
             why != NULL && notes != NULL;
    for (size_t k = 0; ok && k < 2 * nm + 2; k++) {
        res[k] = kphi_equil_result_alloc(s, r);
        ok = ok && res[k] != NULL;
    }
    kphi_phase_work *pw = kphi_phase_work_alloc(s, r);
    kphi_flash_result **frs = calloc(nm, sizeof *frs);
    ok = ok && pw != NULL && frs != NULL;
    for (size_t k = 0; ok && k < nm; k++) {
        frs[k] = kphi_flash_result_alloc(s);
        ok = ok && frs[k] != NULL;
    }
    size_t n_kij = 0;
    kphi_case_kij_entry *kij = kphi_cli_case_kij(cs, &n_kij);
    if (!ok && rc == KPHI_OK) {
        kphi_mark none = {0, 0};
        rc = kphi_error_set(&err, KPHI_ENOMEM, NULL, none, "out of memory");
    }
    /* with --eos all a model that fails here (e.g. the virial series beyond its range, or
     * bb for a species without Beattie-Bridgeman constants: the case itself was checked
     * above), and with --K all a basis that fails, becomes a row saying why; the others
     * are still compared */
    size_t n_ok = 0;
    for (size_t k = 0; k < nm && rc == KPHI_OK; k++) {
        kphi_error e1;
        kphi_error_clear(&e1);
        memset(&pts[k], 0, sizeof pts[k]);
        point_phases php = {gas_only, pw, frs[k]};
        kphi_equil_options run_opt = opt;
        run_opt.K_basis = bases[k];
        kphi_equil_result *const scratch[2] = {res[2 * nm], res[2 * nm + 1]};
        int r1 = solve_point(cs, models[k], &run_opt, ex.dT, w, res[2 * k], res[2 * k + 1],
                             scratch, notes[k], &php, &pts[k], &e1);
        pts[k].n_kij = n_kij;
        pts[k].kij = kij;
        if (r1 == KPHI_OK) {
            n_ok++;
        } else if ((all || allK) && (r1 == KPHI_EFAILED || (all && r1 == KPHI_EINPUT))) {
            snprintf(why[k], sizeof why[k], "%s", e1.msg);
            pts[k].set = set;
            pts[k].feed = kphi_case_feed(cs);
            pts[k].model = models[k];
            pts[k].K_basis = bases[k];
            pts[k].real = pts[k].ideal = NULL;
            pts[k].failed = why[k];
        } else {
            err = e1;
            rc = r1;
        }
    }
    if (rc == KPHI_OK && ex.approach && !ex.analysis)
        rc = kphi_cli_option_error(check_approach_side(cs, &ex, pts[0].real, &err), "--approach",
                                   &err);
    if (rc == KPHI_OK && (ex.approach || ex.adiabatic)) {
        for (int m = 0; m < 2 && rc == KPHI_OK; m++) {
            ex.out[m] = kphi_equil_result_alloc(s, r);
            int ok_m = ex.out[m] != NULL;
            for (size_t b = 1; b < ex.n_beds && ok_m; b++) {
                ex.bed[b][m] = kphi_equil_result_alloc(s, r);
                ok_m = ex.bed[b][m] != NULL;
            }
            if (!ok_m) {
                kphi_mark none = {0, 0};
                rc = kphi_error_set(&err, KPHI_ENOMEM, NULL, none, "out of memory");
            }
        }
        if (rc == KPHI_OK)
            rc = compute_extras(cs, models[0], &opt, &ex, w, res[2 * nm], &err);
    }
    if (rc == KPHI_OK && n_ok == 0) {
        kphi_mark none = {0, 0};
        rc = kphi_error_set(&err, KPHI_EFAILED, NULL, none, "every %s failed here; first: %s",
                            allK ? "K basis" : "model", why[0]);
    }
    kphi_report_energy en; /* the energy answers of pts[0]; read again for the warnings */
    if (rc == KPHI_OK) {
        kphi_cli_output o;
        rc = kphi_cli_output_open(&o, out, &err);
        /* pts[0].energy points to en; the warnings read it after the report is written */
        memset(&en, 0, sizeof en);
        if (rc == KPHI_OK) {
            if (all)
                rc = kphi_report_compare_write(o.f, fmt, pts, nm, &err);
            else if (allK)
                rc = kphi_report_K_compare_write(o.f, fmt, pts, nm, &err);
            else if (ex.approach || ex.adiabatic || ex.outlet_dT) {
                memset(&en, 0, sizeof en);
                en.outlet_approach = ex.outlet_dT;
                en.outlet_dT = ex.dT;
                en.reaction_approach = ex.analysis;
                en.y_analysis = ex.y_an;
                en.rxn[0] = ex.rxn[0];
                en.rxn[1] = ex.rxn[1];
                en.approach = ex.approach && !ex.analysis;
                en.approach_species = ex.k;
                en.y_measured = ex.y_meas;
                en.adiabatic = ex.adiabatic;
                en.key_species = ex.key;
                for (int m = 0; m < 2; m++) {
                    en.T_eq[m] = ex.T_eq[m];
                    en.T_out[m] = ex.T_out[m];
                    en.X_out[m] = ex.X_out[m];
                    en.out[m] = ex.out[m];
                }
                en.n_beds = ex.n_beds;
                for (size_t b = 0; b < ex.n_beds; b++) {
                    en.bed_T_in[b] = ex.T_in[b];
                    for (int m = 0; m < 2; m++) {
                        en.bed_X_out[b][m] = ex.X_bed[b][m];
                        en.bed_out[b][m] = ex.bed[b][m];
                    }
                }
                pts[0].energy = &en;
                rc = kphi_report_point_write(o.f, fmt, &pts[0], &err);
            }
            else
                rc = kphi_report_point_write(o.f, fmt, &pts[0], &err);
            /* the report is kept whatever becomes of the chart */
            int rc2 = kphi_cli_output_close(&o, rc == KPHI_OK, &err);
            if (rc == KPHI_OK)
                rc = rc2;
            /* a table on the terminal shows its warnings itself; the comparison over K
             * bases does not, so each basis's go to stderr */
            if (rc == KPHI_OK && !all && !allK &&
                (fmt != KPHI_REPORT_TABLE || o.final[0] != '\0'))
                kphi_report_warnings(&pts[0], kphi_cli_warning, (void *)path);
            for (size_t k = 0; rc == KPHI_OK && allK && k < nm; k++)
                kphi_report_warnings(&pts[k], kphi_cli_warning, (void *)path);
            if (rc == KPHI_OK && plot != NULL) {
                kphi_cli_beds beds;
                memset(&beds, 0, sizeof beds);
                beds.n_beds = ex.adiabatic ? ex.n_beds : 0;
                beds.T_in = ex.T_in;
                for (size_t b = 0; b < beds.n_beds; b++)
                    for (int m = 0; m < 2; m++)
                        beds.out[b][m] = ex.bed[b][m];
                rc = kphi_cli_solve_plot(cs, models[0], &pts[0], ex.adiabatic ? &beds : NULL,
                                         show_ideal, plot, &err);
            }
        }
    }
    int code = 0;
    if (rc != KPHI_OK) {
        if (err.code == KPHI_EFAILED && err.path[0] == '\0' && strstr(err.msg, "at T =") == NULL) {
            char msg[sizeof err.msg];
            snprintf(msg, sizeof msg, "%s", err.msg);
            snprintf(err.msg, sizeof err.msg, "at T = %.2f K, P = %.4g bar: %.180s", kphi_case_T(cs),
                     kphi_case_P(cs) / 1e5, msg);
        }
        code = kphi_cli_report(&err, path);
    }
    for (size_t k = 0; res != NULL && k < 2 * nm + 2; k++)
        kphi_equil_result_free(res[k]);
    free(res);
    free(pts);
    free(why);
    free(notes);
    free(models);
    free(bases);
    kphi_equil_result_free(ex.out[0]);
    kphi_equil_result_free(ex.out[1]);
    for (size_t b = 1; b < KPHI_REPORT_MAX_BEDS; b++) {
        kphi_equil_result_free(ex.bed[b][0]);
        kphi_equil_result_free(ex.bed[b][1]);
    }
    kphi_equil_work_free(w);
    kphi_phase_work_free(pw);
    for (size_t k = 0; frs != NULL && k < nm; k++)
        kphi_flash_result_free(frs[k]);
    free(frs);
    free(kij);
    free(ex.y_an);
    free(ex.rxn[0]);
    free(ex.rxn[1]);
    kphi_case_free(cs);
    return code;
}

/* --------------------------------------------------------------- check */

/* A file is a reaction set when it has a top-level `species:` key, a species database
 * when it has a top-level `sources:` key, and a case otherwise. */
static int file_kind(const char *path)
{
    FILE *f = fopen(path, "r");
    if (f == NULL)
        return 0;
    char line[512];
    int kind = 0;
    /* 'sources' wins wherever it is: a species database may list its species first. */
    while (kind != 2 && fgets(line, sizeof line, f) != NULL) {
        if (strncmp(line, "sources:", 8) == 0)
            kind = 2;
        else if (strncmp(line, "species:", 8) == 0)
            kind = 1;
    }
    fclose(f);
    return kind;
}

/* The reaction set, with K at T when T is finite; feed (NULL for a set alone) decides
 * whether the headline conversion is defined. */
static void print_rxnset(const kphi_rxnset *set, double T, const double *feed)
{
    size_t s = kphi_rxnset_n_species(set), r = kphi_rxnset_n_reactions(set);
    printf("reaction set: %s (%s)\n", kphi_rxnset_name(set), kphi_rxnset_path(set));
    printf("species (%zu):", s);
    for (size_t i = 0; i < s; i++)
        printf(" %s%s", kphi_rxnset_species(set, i)->name,
               kphi_rxnset_is_inert(set, i) ? " (inert)" : "");
    printf("\nelements (%zu):", kphi_rxnset_n_elements(set));
    for (size_t k = 0; k < kphi_rxnset_n_elements(set); k++)
        printf(" %s", kphi_rxnset_element(set, k));
    printf("\nreactions (%zu%s), atom-balanced and independent:\n", r,
           kphi_rxnset_derived(set) ? ", derived from the element matrix" : "");
    for (size_t j = 0; j < r; j++) {
        printf("  %zu. %-30s dnu = %g", j + 1, kphi_rxnset_equation(set, j),
               kphi_rxnset_dnu(set, j));
        if (isfinite(T)) {
            double dg = 0.0;
            int in = 1;
            for (size_t i = 0; i < s; i++) {
                const kphi_species *sp = kphi_rxnset_species(set, i);
                double nu = kphi_rxnset_nu(set, j, i);
                if (nu != 0.0) {
                    in = in && kphi_thermo_in_range(sp, T);
                    dg += nu * kphi_thermo_g(sp, T);
                }
            }
            if (in)
                printf("   K(%.2f K) = %.5g", T, exp(-dg / (KPHI_R * T)));
        }
        putchar('\n');
        for (size_t b = 1; b < kphi_rxnset_n_K_bases(set); b++) {
            const kphi_rxnset_kcorr *k = kphi_rxnset_kcorr_get(set, j, b);
            if (k == NULL)
                continue;
            char text[512];
            double lo, hi, Pstd = kphi_rxnset_kcorr_P_standard(k);
            kphi_rxnset_kcorr_text(k, text, sizeof text);
            kphi_rxnset_kcorr_range(k, &lo, &hi);
            const char *per = kphi_rxnset_kcorr_per(k);
            printf("     K %s: %s\n", kphi_rxnset_kcorr_name(k), text);
            char pstd[32];
            if (Pstd == 101325.0)
                snprintf(pstd, sizeof pstd, "1 atm");
            else
                snprintf(pstd, sizeof pstd, "%.6g bar", Pstd / 1e5);
            printf("       %s%s, P_standard %s, valid %.2f-%.2f K",
                   per != NULL ? "per mol " : "per the equation", per != NULL ? per : "", pstd,
                   lo, hi);
            if (isfinite(T))
                printf("; K(%.2f K) = %.5g%s", T, exp(kphi_rxnset_kcorr_lnK(k, T)),
                       kphi_rxnset_kcorr_in_range(k, T) ? "" : " (extrapolated)");
            printf("\n       %s\n", kphi_rxnset_kcorr_source(k));
        }
    }
    if (kphi_rxnset_n_K_bases(set) > 1) {
        printf("K bases:");
        for (size_t b = 0; b < kphi_rxnset_n_K_bases(set); b++)
            printf("%s %s", b ? "," : "", kphi_rxnset_K_basis_name(set, b));
        printf(" (choose with --K NAME or the case key 'K'; K(T) above is per the equation as "
               "written, P° = 1 bar)\n");
    }
    if (feed == NULL) { /* a set alone: its own k_ij (a case lists those in effect) */
        for (size_t m = 0; m < kphi_rxnset_n_kij(set); m++) {
            size_t i = 0, j = 0;
            double k = 0.0;
            kphi_rxnset_kij(set, m, &i, &j, &k);
            const char *src = kphi_rxnset_kij_source(set, m);
            printf("%s%s-%s = %g (%s)\n", m == 0 ? "k_ij: " : "      ",
                   kphi_rxnset_species(set, i)->name, kphi_rxnset_species(set, j)->name, k,
                   src != NULL ? src : "no source given");
        }
        if (kphi_rxnset_n_kij(set) == 0)
            printf("k_ij: none given (0 for every pair)\n");
    }
    kphi_eos_model rec;
    if (kphi_rxnset_eos(set, &rec, NULL))
        printf("recommended equation of state: %s, %s (cases that name none use it)\n",
               kphi_eos_model_name(rec), kphi_eos_model_title(rec));
    char why[160];
    if (feed != NULL && kphi_report_conversion_note(set, feed, why, sizeof why))
        printf("headline conversion: %s, %s\n", kphi_rxnset_conversion_label(set), why);
    else
        printf("headline conversion: %s\n", kphi_rxnset_conversion_label(set));
}

int kphi_cli_check(int argc, char **argv)
{
    static const struct option opts[] = {{"help", no_argument, NULL, 'h'}, {NULL, 0, NULL, 0}};
    int c;
    optind = 1;
    opterr = 0;
    while ((c = getopt_long(argc, argv, "h", opts, NULL)) != -1) {
        if (c == 'h')
            return kphi_cli_help_command(stdout, "check");
        return kphi_cli_bad_option("check", opts, argv, optind, 0);
    }
    if (argc - optind != 1)
        return kphi_cli_usage_error("check", "%s",
                                    "'check' needs one file: a case, a reaction set or a "
                                    "species database");
    const char *path = argv[optind];
    kphi_error err;
    kphi_error_clear(&err);
    int kind = file_kind(path);
    if (kind == 2) {
        kphi_species_db *db = kphi_species_db_load_file(path, &err);
        if (db == NULL)
            return kphi_cli_report(&err, path);
        printf("species database %s: %zu species, all values with their sources\n", path,
               kphi_species_db_count(db));
        kphi_species_db_free(db);
        return 0;
    }
    if (kind == 1) {
        char species[1024];
        kphi_rxnset *set = kphi_rxnset_load_file_default(
            path, NULL, kphi_cli_species_default(species, sizeof species), &err);
        if (set == NULL)
            return kphi_cli_report(&err, path);
        print_rxnset(set, 723.15, NULL);
        kphi_rxnset_free(set);
        return 0;
    }
    char species[1024];
    kphi_case *cs =
        kphi_case_load_file_default(path, kphi_cli_species_default(species, sizeof species), &err);
    if (cs == NULL)
        return kphi_cli_report(&err, path);
    if (kphi_case_validate(cs, &err) != KPHI_OK) {
        kphi_case_free(cs);
        return kphi_cli_report(&err, path);
    }
    const kphi_rxnset *set = kphi_case_rxnset(cs);
    printf("case: %s  (%s)\n", kphi_case_name(cs), path);
    double T = kphi_case_T(cs), P = kphi_case_P(cs);
    if (isnan(T))
        printf("T: only the sweep's");
    else
        printf("T = %.2f K", T);
    if (isnan(P))
        printf("   P: only the sweep's");
    else
        printf("   P = %.4g bar", P / 1e5);
    printf("   eos = %s%s\n", kphi_eos_model_name(kphi_case_eos(cs)),
           kphi_case_quantum(cs) ? " (quantum H2/He)" : "");
    {
        size_t n_kij = 0;
        kphi_case_kij_entry *kij = kphi_cli_case_kij(cs, &n_kij);
        kphi_report_kij_lines(stdout, set, kij, n_kij, "k_ij in effect: ");
        free(kij);
    }
    const double *feed = kphi_case_feed(cs);
    double tot = 0.0;
    for (size_t i = 0; i < kphi_rxnset_n_species(set); i++)
        tot += feed[i];
    printf("feed:");
    for (size_t i = 0; i < kphi_rxnset_n_species(set); i++)
        printf(" %s=%g (%.2f%%)", kphi_rxnset_species(set, i)->name, feed[i],
               100.0 * feed[i] / tot);
    putchar('\n');
    kphi_equil_indicator ind[KPHI_EQUIL_MAX_INDICATORS];
    size_t n_ind = kphi_equil_indicators(set, feed, ind);
    for (size_t k = 0; k < n_ind; k++) {
        if (isfinite(ind[k].value))
            printf("feed %s %s = %.4f\n", ind[k].title, ind[k].formula, ind[k].value);
        else
            printf("feed %s %s: undefined (%s is 0)\n", ind[k].title, ind[k].formula,
                   ind[k].zero);
    }
    printf("sweep grid: %zu T x %zu P = %zu points\n", kphi_case_sweep_n_T(cs),
           kphi_case_sweep_n_P(cs), kphi_case_sweep_n_T(cs) * kphi_case_sweep_n_P(cs));
    print_rxnset(set, isnan(T) ? kphi_case_sweep_T(cs)[0] : T, feed);
    kphi_case_free(cs);
    return 0;
}
