/* kphi report: write solutions as a text table, CSV or JSON.
 *
 * One point is the real-gas and the ideal-gas solution at the same T, P and feed. The
 * JSON object follows the contract of DESIGN.md; CSV holds one header and one row per
 * point with the sweep's leading columns (T_K,P_bar,X_real,X_ideal,shift,y_<species>...)
 * followed by y_ideal_, phi_ and per-reaction K_, Kphi_, Ky_ columns, then Z, status,
 * message and P_equiv_ideal_bar (empty when undefined), then the optional blocks. Every
 * report says where each reaction's K came from when the set offers K correlations
 * (src/report_k.c). Writers never allocate on the heap and report write errors as
 * KPHI_EIO. */
#ifndef KPHI_REPORT_H
#define KPHI_REPORT_H

#include <stdio.h>

#include "kphi/case.h"
#include "kphi/eos.h"
#include "kphi/equil.h"
#include "kphi/loop.h"
#include "kphi/phase.h"
#include "kphi/error.h"
#include "kphi/rxnset.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef enum { KPHI_REPORT_TABLE = 0, KPHI_REPORT_CSV, KPHI_REPORT_JSON } kphi_report_format;

/* "table", "csv", "json". KPHI_EINPUT with did-you-mean otherwise. */
int kphi_report_format_parse(const char *text, kphi_report_format *fmt, kphi_error *err);

/* Beds a report can show in a train (`solve --intercool`: the first bed and up to 7 more). */
#define KPHI_REPORT_MAX_BEDS 8

/* Answers of `solve --approach` and `solve --adiabatic` at one point; index [0] is the
 * chosen model, [1] the ideal gas. All pointers borrowed. */
typedef struct {
    int approach;                  /* 1 when the approach block is shown */
    size_t approach_species;       /* species whose outlet mole fraction was measured */
    double y_measured;             /* that mole fraction */
    double T_eq[2];                /* K: where y_measured is the equilibrium */
    int adiabatic;                 /* 1 when the adiabatic block is shown */
    size_t key_species;            /* species the adiabatic line shows (NH3, CH3OH) */
    double T_out[2];               /* K: adiabatic equilibrium outlet */
    double X_out[2];               /* headline conversion there, fraction */
    const kphi_equil_result *out[2]; /* the outlet solutions */
    /* a train of beds with intercooling (kphi_equil_adiabatic_beds()): n_beds > 1 shows
     * beds 2 .. n_beds after the first, whose answers are the fields above */
    size_t n_beds;
    double bed_T_in[KPHI_REPORT_MAX_BEDS];     /* K, inlet of each bed ([0]: the case's T) */
    double bed_X_out[KPHI_REPORT_MAX_BEDS][2]; /* headline conversion at each outlet, from
                                                  the converter feed, fraction */
    const kphi_equil_result *bed_out[KPHI_REPORT_MAX_BEDS][2]; /* the outlets */
    /* an outlet at a given approach to equilibrium (--approach-dT): the point's real and
     * ideal solutions are the equilibrium at T + outlet_dT, and the point stands for the
     * outlet at T (T_K in JSON and CSV is T; the block adds dT and T_eq) */
    int outlet_approach;
    double outlet_dT;              /* K */
    /* the approach per reaction of a measured outlet analysis (--approach with a whole
     * composition, kphi_equil_reaction_approach()) */
    int reaction_approach;
    const double *y_analysis;      /* [n_species], the analysis, normalised */
    const kphi_equil_reaction_temperature *rxn[2]; /* [n_reactions]: model, ideal gas */
} kphi_report_energy;

/* Everything a report of one point shows. All pointers borrowed. */
typedef struct {
    const kphi_rxnset *set;
    const double *feed;            /* [n_species], the feed amounts as given */
    kphi_eos_model model;
    int quantum;                   /* quantum-gas constants on */
    const kphi_equil_result *real; /* solution with the model */
    const kphi_equil_result *ideal;/* solution with the ideal gas */
    double X_real, X_ideal;        /* headline conversion, fractions */
    double P_equiv;                /* Pa: ideal-gas pressure giving X_real; NaN if unknown */
    const char *P_equiv_note;      /* NULL, or why P_equiv is undefined ("undefined: ...";
                                      table line, JSON P_equiv_note) */
    const char *T_unit, *P_unit;   /* units for display ("C", "bar") */
    const char *source;            /* case file, for the title; may be NULL */
    const char *case_name;         /* the case's name (kphi_case_name()); NULL: none shown */
    size_t n_kij;                  /* k_ij in effect (kphi_case_kij()), echoed in the table */
    const kphi_case_kij_entry *kij;/* and JSON; NULL when n_kij is 0 */
    const char *failed;            /* NULL, or why this model failed here (compare only;
                                      real and ideal may then be NULL) */
    const kphi_report_energy *energy; /* NULL, or the approach/adiabatic answers */
    const kphi_flash_result *phases;  /* NULL: no phase test (ideal gas, virial); else the
                                         phases of the real-gas answer: two when the gas
                                         condenses (kphi_phase_equil_solve()), one otherwise */
    int gas_only;                  /* 1: `--phases gas`, the gas answer kept as gas */
    int gas_unstable;              /* with gas_only: the stability test finds the gas answer
                                      unstable (a liquid would form); tm_min in phases */
    size_t K_basis;                /* the K basis asked for (kphi_equil_options.K_basis);
                                      which basis each reaction used is in the results */
} kphi_report_point;

/* The warnings of a point that the table prints as "warning: ..." lines and the JSON
 * object lists under "warnings": a gas answer that the stability test finds unstable
 * (`--phases gas`), or, for a model without a phase test, a liquid-like EOS root of lower
 * Gibbs energy; a bed of --adiabatic or --intercool that runs backwards (its product
 * leaves in a smaller amount than it came in); a K correlation used outside its validity
 * range, at the solved T or at a temperature an energy answer found (approach
 * temperature, adiabatic outlets). Calls fn once per warning with one line of text (no newline, valid only during the
 * call) and returns how many there were. */
typedef void (*kphi_report_warning_fn)(void *ctx, const char *text);
size_t kphi_report_warnings(const kphi_report_point *pt, kphi_report_warning_fn fn, void *ctx);

/* The headline conversion X = 1 - sum w n / sum w n0 is undefined when the feed holds
 * none of the species it is of: then 1, with buf (n bytes) saying so ("undefined: the
 * feed holds no N2"), which the table prints in place of the numbers and JSON gives as
 * conversion.reason beside null values. 0 when the conversion is defined (buf untouched). */
int kphi_report_conversion_note(const kphi_rxnset *set, const double feed[], char *buf,
                                size_t n);

/* The k_ij in effect as table lines, the first starting with lead: one line per value
 * from the reaction set or the case (or a nonzero one from the k_ij file), and one line
 * naming the pairs the k_ij file sets to 0; "none given" when there are none. */
void kphi_report_kij_lines(FILE *out, const kphi_rxnset *set, const kphi_case_kij_entry kij[],
                           size_t n, const char *lead);

/* One point in the chosen format. */
int kphi_report_point_write(FILE *out, kphi_report_format fmt, const kphi_report_point *pt,
                            kphi_error *err);

/* Several models at one point (`solve --eos all`): a comparison table, a CSV with one
 * row per model (leading column `eos`), or a JSON array of point objects. */
int kphi_report_compare_write(FILE *out, kphi_report_format fmt, const kphi_report_point pts[],
                              size_t n, kphi_error *err);

/* Every K basis of the set at one point (`solve --K all`), pts[k] solved with basis
 * pts[k].K_basis (or failed, with `failed` set): a comparison table with one row per
 * basis and the spread of the real-gas conversion in points, a CSV with a leading column
 * `K_basis`, or a JSON array of point objects. */
int kphi_report_K_compare_write(FILE *out, kphi_report_format fmt, const kphi_report_point pts[],
                                size_t n, kphi_error *err);


/* CSV header, row of one point, and row of a failed point (used by solve and sweep). After
 * P_equiv_ideal_bar come the phase columns vapour_fraction, x_<species> (the liquid's
 * composition; empty with one phase or without a phase test), then any energy columns.
 * energy: NULL, or the approach/adiabatic blocks the rows carry (only its `approach` and
 * `adiabatic` flags are read): the header then names their trailing columns and a failed
 * row leaves them empty, so every row has the header's column count. A failed row holds
 * the conditions, empty values, status `failed` and the message. */
int kphi_report_csv_header(FILE *out, const kphi_rxnset *set, int with_eos_column,
                           const kphi_report_energy *energy, kphi_error *err);
int kphi_report_csv_row(FILE *out, const kphi_report_point *pt, int with_eos_column,
                        kphi_error *err);
int kphi_report_csv_failed_row(FILE *out, const kphi_rxnset *set, double T, double P,
                               const char *message, int with_eos_column,
                               const kphi_report_energy *energy, kphi_error *err);

/* JSON object of one point on one line (no trailing newline). */
int kphi_report_json_point(FILE *out, const kphi_report_point *pt, kphi_error *err);

/* JSON object of a point that failed, on one line (no trailing newline):
 * {"eos": ..., "T_K": ..., "P_bar": ..., "status": "failed", "message": ...}; eos is left
 * out when NULL, T_K and P_bar when T or P is NaN. T in K, P in Pa. */
int kphi_report_json_failed(FILE *out, const char *eos, double T, double P,
                            const char *message, kphi_error *err);

/* ------------------------------------------------------------ phases
 * (src/report_phase.c) */

/* Everything a report of one flash (`kphi flash`) shows. All pointers borrowed. */
typedef struct {
    const kphi_rxnset *set;
    const double *feed;            /* [n_species], the feed amounts as given */
    const kphi_eos *eos;           /* the mixture model (its alpha functions are listed) */
    const kphi_flash_result *flash;
    int dew_found, bubble_found;   /* 1 when the point was found in the search range */
    double T_dew, T_bubble;        /* K (NaN when not found) */
    double T_search_lo, T_search_hi; /* K: the range searched for them */
    int dew_only;                  /* 1: report only the dew and bubble points */
    const char *T_unit, *P_unit;   /* units for display */
    const char *source;            /* case file, for the title; may be NULL */
    const char *note;              /* NULL, or a remark for the CSV message column and the
                                      JSON "note" (e.g. why a dew-point search failed) */
} kphi_report_flash;

/* One flash in the chosen format: a table (phase amounts, compositions, K values, phi,
 * Z, molar volume, enthalpy, dew and bubble points), a CSV header and row, or one JSON
 * object (DESIGN.md's flash contract). */
int kphi_report_flash_write(FILE *out, kphi_report_format fmt, const kphi_report_flash *fl,
                            kphi_error *err);
/* The CSV of kphi_report_flash_write() in parts, for `sweep --flash`: the header, one row,
 * and the row of a flash that failed (T_K, P_bar, the feed's z_, empty values, status
 * "failed" and the message); and the JSON line of a failed flash ({"case", "T_K",
 * "P_bar", "status": "failed", "message"}). */
int kphi_report_flash_csv_header(FILE *out, const kphi_rxnset *set, kphi_error *err);
int kphi_report_flash_csv_row(FILE *out, const kphi_report_flash *fl, kphi_error *err);
int kphi_report_flash_csv_failed_row(FILE *out, const kphi_rxnset *set, const double feed[],
                                     double T, double P, const char *message, kphi_error *err);
int kphi_report_flash_json_failed(FILE *out, const char *source, double T, double P,
                                  const char *message, kphi_error *err);

/* The phases of an answer as table lines ("two phases: ..." and a composition table, or
 * one line saying the mixture is one phase and of which kind), as used by solve. */
void kphi_report_phases_table(FILE *out, const kphi_rxnset *set, const kphi_flash_result *ph);

/* The JSON array of phases ([{"kind", "fraction", "y", "phi", "Z", "v_m3_mol",
 * "h_J_mol"}, ...]) of an answer; h is the phase's molar enthalpy on the elemental
 * reference scale (ideal-gas h_i° from the species data plus the EOS departure). */
void kphi_report_phases_json(FILE *out, const kphi_rxnset *set, const kphi_flash_result *ph);

/* The JSON array of the alpha functions that are not the model's own
 * ([{"species", "form", "constants", "source"}]); [] when there are none. */
void kphi_report_alpha_json(FILE *out, const kphi_rxnset *set, const kphi_eos *eos);

/* ------------------------------------------------------------ the loop
 * (src/report_loop.c) */

/* Everything a report of one loop (`kphi loop`) shows. All pointers borrowed. */
typedef struct {
    const kphi_rxnset *set;
    kphi_eos_model model;          /* the real-gas converter's model */
    const kphi_eos *sep;           /* the separator's model (its alpha functions listed) */
    const kphi_loop_spec *spec;    /* the loop as solved (make-up flows in mol/s) */
    const kphi_loop_result *res[2];/* [0] real-gas converter, [1] ideal-gas converter; [1]
                                      may be NULL */
    int basis;                     /* 1: flows are per 100 mol of make-up (no rate given) */
    double P_equiv;                /* Pa: loop pressure the ideal-gas converter needs to make
                                      the real-gas product; NaN when not found */
    const char *P_equiv_note;      /* why P_equiv is NaN, or NULL */
    const char *T_unit, *P_unit;   /* units for display */
    const char *source;            /* case file; may be NULL */
} kphi_report_loop;

/* One loop in the chosen format: a table (stream table of the real-gas loop, key figures
 * for both converters side by side), CSV (one row per converter model, key figures and
 * stream flows) or JSON (DESIGN.md's loop contract). */
int kphi_report_loop_write(FILE *out, kphi_report_format fmt, const kphi_report_loop *lp,
                           kphi_error *err);

/* CSV of loop key figures, shared with `sweep --loop`: the header, and a row for result r
 * of converter model `model` ("real" or "ideal" in the converter column). */
int kphi_report_loop_csv_header(FILE *out, const kphi_rxnset *set, kphi_error *err);
int kphi_report_loop_csv_row(FILE *out, const kphi_rxnset *set, const char *converter,
                             const kphi_loop_spec *spec, const kphi_loop_result *r,
                             kphi_error *err);
/* The row of a loop that failed: converter, the spec's P_bar, T_conv_K, T_sep_K and
 * P_sep_bar, empty figures, status "failed" and the message (quoted). */
int kphi_report_loop_csv_failed_row(FILE *out, const kphi_rxnset *set, const char *converter,
                                    const kphi_loop_spec *spec, const char *message,
                                    kphi_error *err);
/* One line of JSON for one point of a loop sweep: {"P_bar", "T_conv_K", "T_sep_K",
 * "P_sep_bar", "real": R, "ideal": R, "shift": {"product_rate", "product_t_d"}}, R the
 * object `kphi loop --format json` gives under "real" (streams, product, key figures), or
 * {"status": "failed", "message"} when res[m] is NULL (failure[m] the reason); "shift"
 * only when both loops were solved. */
int kphi_report_loop_json_point(FILE *out, const kphi_rxnset *set, const kphi_loop_spec *spec,
                                const kphi_loop_result *const res[2],
                                const char *const failure[2], kphi_error *err);

#ifdef __cplusplus
}
#endif
#endif /* KPHI_REPORT_H */
