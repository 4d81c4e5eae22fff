/* kphi command-line program: shared declarations of its subcommands.
 *
 * main.c only dispatches. What the subcommands share lives in common.c (output files,
 * signals, errors, overrides, argument checks, plot data) and help.c (help text); each
 * subcommand is in its own file (solve.c with check, solve_plot.c, sweep.c, species.c). */
#ifndef KPHI_CLI_H
#define KPHI_CLI_H

#include <stdio.h>

#include "kphi/case.h"
#include "kphi/equil.h"
#include "kphi/error.h"
#include "kphi/plot.h"
#include "kphi/report.h"

/* An output that is a temporary file renamed into place when complete, or stdout. */
typedef struct {
    FILE *f;
    char final[1024];
    char tmp[1100];
} kphi_cli_output;

/* Remove the pending temporary output file on SIGINT, SIGTERM, SIGHUP and SIGPIPE, then
 * die of the signal. Called once by main(). */
void kphi_cli_watch_signals(void);
int kphi_cli_output_open(kphi_cli_output *o, const char *path, kphi_error *err);
/* ok = 0 discards the temporary file. */
int kphi_cli_output_close(kphi_cli_output *o, int ok, kphi_error *err);

/* Print err as one line (fallback_path when it names no file); returns the exit code. */
int kphi_cli_report(const kphi_error *err, const char *fallback_path);
/* A kphi_report_warning_fn: "PATH: warning: TEXT" on stderr, path the case file. */
void kphi_cli_warning(void *path, const char *text);
/* Prefix the message of a command-line error with the option it came from ("--P: ..."),
 * and point it at <command line>:1:1 when it has no position. Returns rc. */
int kphi_cli_option_error(int rc, const char *option, kphi_error *err);
/* Print one line "kphi: error: MESSAGE; see 'kphi CMD --help'" (cmd NULL: 'kphi
 * --help'), the message fmt with one string arg; returns the exit code 2. */
int kphi_cli_usage_error(const char *cmd, const char *fmt, const char *arg);

/* The option getopt_long() refused (argv[ind - 1]; optopt for a short one) as one usage
 * line: a missing value, an ambiguous abbreviation (naming the candidates) or an unknown
 * option with "did you mean". opterr must be 0. Returns 2. */
struct option;
int kphi_cli_bad_option(const char *cmd, const struct option *opts, char **argv, int ind,
                        int missing_value);

/* `kphi CMD --help`: the usage and options of that command (help.c). 0, or 2 for an
 * unknown command. */
int kphi_cli_help_command(FILE *f, const char *cmd);

/* --approach-dT TEXT: a signed temperature difference ("10K", "-15 C", "18F"; K and C
 * alike) into *dT (K), with every T + dT of the case (axes 0: its T; 1: its sweep grid)
 * inside the data range of the set. KPHI_EINPUT at <command line> naming the option. */
int kphi_cli_approach_dT(const kphi_case *cs, const char *text, int axes, double *dT,
                         kphi_error *err);

/* The k_ij in effect for the case (kphi_case_kij()) as an array for kphi_report_point;
 * caller frees. NULL with *n = 0 when there are none (or no memory). */
kphi_case_kij_entry *kphi_cli_case_kij(const kphi_case *cs, size_t *n);

/* Check a --plot file name before any work: KPHI_EINPUT at <command line>:1:1 naming the
 * option and the file when kphi_plot_write() could not write that format. */
int kphi_cli_plot_arg(const char *plot, kphi_error *err);

/* The whole help text with the caution (help.c). */
void kphi_cli_help(FILE *f);
/* The one case file a subcommand takes, after its options: 0 with *path set, or the
 * exit code 2 after a usage message. */
int kphi_cli_case_arg(int argc, char **argv, int first, const char *cmd, const char **path);

/* Command-line values that replace the case's; NULL fields are left alone. */
typedef struct {
    const char *feed, *T, *P, *eos;
    int quantum;
    int axes; /* T and P are sweep axes (sweep), not single values (solve) */
} kphi_cli_overrides;

/* Apply the overrides in the order feed, T, P, eos, quantum, then validate the case.
 * Errors name the option they came from. */
int kphi_cli_apply_overrides(kphi_case *cs, const kphi_cli_overrides *o, kphi_error *err);

/* The adiabatic beds solve found (--adiabatic: one; --intercool: several): inlet
 * temperatures (K) and outlets, [k][0] the case's model and [k][1] the ideal gas. */
typedef struct {
    size_t n_beds;
    const double *T_in;
    const kphi_equil_result *out[KPHI_REPORT_MAX_BEDS][2];
} kphi_cli_beds;

/* Store a solved sweep point in plot data: conversions, ln Kphi, the product's mole
 * fraction (product < 0: none) and, when the point has them, the adiabatic outlets.
 * Shared by sweep --plot and solve --plot (common.c). */
void kphi_cli_plot_store(kphi_plot_data *d, size_t iT, size_t iP, const kphi_report_point *pt,
                         long product);

/* The texts of a chart of the case: title (the case's name, kphi_case_name()), axis units
 * T_unit and P_unit, and the caption: reaction set, feed in mol %, the model, and "at P"
 * when P_at (Pa) is finite. KPHI_OK or KPHI_ENOMEM. src/cli/solve_plot.c. */
int kphi_cli_plot_labels(kphi_plot_data *d, const kphi_case *cs, kphi_eos_model model,
                         const char *T_unit, const char *P_unit, double P_at);

/* Append printf-style text to buf[n] at *used, truncating quietly (chart captions).
 * solve_plot.c. */
void kphi_cli_append(char *buf, size_t n, size_t *used, const char *fmt, ...)
    __attribute__((format(printf, 4, 5)));

/* --plot-ideal yes|no: *show set; KPHI_EINPUT at <command line> otherwise. */
int kphi_cli_plot_ideal_arg(const char *text, int *show, kphi_error *err);

/* solve --plot: the equilibrium curve of the case at its P (product mole fraction against
 * T, the model and the ideal gas unless show_ideal is 0), the solved point pt marked on
 * it, with the bed path over it when beds is not NULL. Written to path (.svg, .png,
 * .pdf) through kphi_plot_write(). src/cli/solve_plot.c. */
int kphi_cli_solve_plot(const kphi_case *cs, kphi_eos_model model, const kphi_report_point *pt,
                        const kphi_cli_beds *beds, int show_ideal, const char *path,
                        kphi_error *err);

/* The species database to use when none is named (src/cli/datadir.c: the current
 * directory's reactions/, $KPHI_DATA, the installed data beside the program, the source
 * tree, the PREFIX it was built for). kphi_cli_species_file() writes the first readable
 * one into buf and returns 1, or writes the last place tried and returns 0;
 * kphi_cli_species_default() returns buf or NULL. */
int kphi_cli_species_file(char *buf, size_t n);
const char *kphi_cli_species_default(char *buf, size_t n);

int kphi_cli_solve(int argc, char **argv);
int kphi_cli_sweep(int argc, char **argv);
/* The options of `kphi sweep` as typed (NULL or 0 when not given), for its variants; fmt
 * is --format, already parsed and csv or json. */
typedef struct {
    const char *T, *P, *eos, *feed, *out, *plot, *plot_kind, *phases, *plot_ideal;
    const char *K, *purge;
    int quantum, force, threads, adiabatic;
    kphi_report_format fmt;
} kphi_cli_sweep_args;
/* sweep --loop: the case's loop over converter T x loop P (sweep_loop.c). */
int kphi_cli_sweep_loop(const char *path, const kphi_cli_sweep_args *a);
/* The temperatures searched for dew and bubble points, K (flash, sweep --flash): wide
 * enough for ammonia and methanol separators and converter effluents, and inside what the
 * cubic describes. */
#define KPHI_CLI_T_SEARCH_LO 150.0
#define KPHI_CLI_T_SEARCH_HI 800.0
/* sweep --flash: the case's feed flashed over T x P (sweep_flash.c). */
int kphi_cli_sweep_flash(const char *path, const kphi_cli_sweep_args *a);
/* A refusal of option `opt` with `why` at <command line>:1:1 (exit 2). */
int kphi_cli_refuse(const char *opt, const char *why);
/* Reactions whose extrapolated K a sweep counts (a set has at most 32). */
#define KPHI_CLI_K_COUNT_MAX 32
/* After a sweep, one warning on stderr per reaction whose K correlation (for `basis`) was
 * used outside its validity range: at K_outside[j] of `total` points; `where` stands before
 * "%zu of %zu points" ("" or "the converter equilibrium of "). */
void kphi_cli_K_outside_summary(const char *path, const kphi_rxnset *set, size_t basis,
                                const size_t K_outside[], size_t total, const char *where);
/* KPHI_EINPUT when a grid of nT x nP points is over 1e8 and --force was not given. */
int kphi_cli_grid_limit(size_t nT, size_t nP, int force, kphi_error *err);
/* KPHI_EINPUT when `model` has no liquid root (a flash needs rk, srk or pr); the error
 * stands at the command line when --eos (`eos_opt`) chose the model, else at `path`. */
int kphi_cli_flash_model(kphi_eos_model model, const char *eos_opt, const char *path,
                         kphi_error *err);
int kphi_cli_flash(int argc, char **argv);
/* --phases auto|gas: *gas_only 0 or 1; KPHI_EINPUT at <command line> otherwise. */
int kphi_cli_phases_arg(const char *text, int *gas_only, kphi_error *err);
int kphi_cli_loop(int argc, char **argv);
/* loop --plot: the loop diagram of a solved loop (lp: the real-gas loop drawn, the
 * ideal-gas one quoted in the key figures) into path (.svg, .png, .pdf). loop_plot.c. */
int kphi_cli_loop_plot(const kphi_case *cs, const kphi_report_loop *lp, const char *path,
                       kphi_error *err);
int kphi_cli_check(int argc, char **argv);
int kphi_cli_species(int argc, char **argv);

#endif /* KPHI_CLI_H */
