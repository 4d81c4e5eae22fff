/* kphi plot: charts of a sweep, written as SVG, PNG or PDF (by file extension).
 *
 * Kinds: conversion vs P (one line per T, real gas solid, ideal gas dashed), conversion vs
 * T (one line per P), Kphi vs P (one line per T, one panel or line style per reaction),
 * the equilibrium curve (product mole fraction vs T, one line per P, real solid and
 * ideal dashed), and the adiabatic bed (conversion at the adiabatic equilibrium outlet vs
 * the bed inlet temperature, one line per P, over a second panel with the outlet
 * temperature; needs kphi_plot_data_set_adiabatic()), the loop (liquid product over a
 * second panel with the recycle ratio, against loop pressure, one line per converter
 * temperature, real-gas converter solid and ideal-gas converter dashed) and the separator
 * (the product's mole fraction in the separator vapour against separator temperature, one
 * line per pressure). Axis labels carry units; every chart has a legend, a title and,
 * when given or when series were thinned, a caption line. */
#ifndef KPHI_PLOT_H
#define KPHI_PLOT_H

#include <stddef.h>

#include "kphi/error.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef enum {
    KPHI_PLOT_CONVERSION_P = 0, /* "conversion-p" */
    KPHI_PLOT_CONVERSION_T,     /* "conversion-t" */
    KPHI_PLOT_KPHI_P,           /* "kphi-p" */
    KPHI_PLOT_CURVE,            /* "curve" */
    KPHI_PLOT_ADIABATIC,        /* "adiabatic": outlet conversion vs bed inlet T */
    KPHI_PLOT_LOOP,             /* "loop": loop production and recycle ratio vs loop P, one
                                   line per converter T (kphi_plot_data_set_loop()) */
    KPHI_PLOT_SEPARATOR,        /* "separator": the product left in the separator vapour vs
                                   separator T, one line per P (kphi_plot_data_set_flash()) */
    KPHI_PLOT_N_KINDS
} kphi_plot_kind;

/* Parse a kind name; KPHI_EINPUT with did-you-mean, path "<command line>". */
int kphi_plot_kind_parse(const char *text, kphi_plot_kind *kind, kphi_error *err);
const char *kphi_plot_kind_name(kphi_plot_kind kind);
/* A sensible default for a grid of nT x nP points: conversion vs P when there are more
 * pressures than temperatures, else conversion vs T. */
kphi_plot_kind kphi_plot_default_kind(size_t nT, size_t nP);

/* Data of a sweep grid (nT temperatures x nP pressures, n_reactions reactions). Opaque. */
typedef struct kphi_plot_data kphi_plot_data;

/* T[nT] in K and P[nP] in Pa are copied. Caller frees with kphi_plot_data_free(). NULL
 * when out of memory. Every point starts as missing (NaN). */
kphi_plot_data *kphi_plot_data_alloc(const double T[], size_t nT, const double P[], size_t nP,
                                     size_t n_reactions);
void kphi_plot_data_free(kphi_plot_data *d); /* NULL is allowed */

/* Texts for titles and legends (copied): the chart title (reaction-set name and EOS), the
 * conversion label ("N2", "CO+CO2"), the product shown by the equilibrium curve ("NH3"),
 * the display units for T ("C", "K", "F") and P ("bar", "atm", "MPa", ...), and the
 * equation of each reaction (for Kphi legends). Returns KPHI_ENOMEM or KPHI_OK. */
int kphi_plot_data_labels(kphi_plot_data *d, const char *title, const char *conversion,
                          const char *product, const char *T_unit, const char *P_unit,
                          const char *const equations[]);

/* Store point (iT, iP): conversions (fractions), ln Kphi per reaction, and the product's
 * mole fraction real and ideal. A failed point stays missing (lines break there). */
void kphi_plot_data_set(kphi_plot_data *d, size_t iT, size_t iP, double X_real, double X_ideal,
                        const double lnKphi[], double y_product_real, double y_product_ideal);

/* Store the headline conversion (fraction) and the temperature (K) at the adiabatic
 * equilibrium outlet of a bed fed at point (iT, iP), real gas and ideal gas: the data of
 * the "adiabatic" kind. */
void kphi_plot_data_set_adiabatic(kphi_plot_data *d, size_t iT, size_t iP, double X_out_real,
                                  double X_out_ideal, double T_out_real, double T_out_ideal);

/* Store point (iT, iP) of a loop grid (kind "loop"; iT the converter temperature, iP the
 * loop pressure): the liquid product rate in the unit set by kphi_plot_data_loop_unit()
 * and the recycle ratio (recycle / make-up, molar), with the real-gas and the ideal-gas
 * converter. NaN leaves a value missing. */
void kphi_plot_data_set_loop(kphi_plot_data *d, size_t iT, size_t iP, double product_real,
                             double product_ideal, double recycle_real, double recycle_ideal);
/* The unit of the loop's product rate as the axis shows it ("t/d", "mol/100 mol make-up";
 * copied). KPHI_OK or KPHI_ENOMEM. */
int kphi_plot_data_loop_unit(kphi_plot_data *d, const char *unit);

/* Store point (iT, iP) of a flash grid (kind "separator"): the product's mole fraction in
 * the vapour (0..1; NaN: missing, e.g. no vapour). */
void kphi_plot_data_set_flash(kphi_plot_data *d, size_t iT, size_t iP, double y_vapour);

/* A heading over the legend of the coloured series, e.g. "converter outlet" (copied; NULL:
 * none). KPHI_OK or KPHI_ENOMEM. */
int kphi_plot_data_series_heading(kphi_plot_data *d, const char *heading);

/* The caption line drawn under the title (copied; NULL: none), e.g. the reaction set, the
 * feed, the EOS and the pressure a curve was drawn at. A note on thinned series is added
 * to it. Returns KPHI_OK or KPHI_ENOMEM. */
int kphi_plot_data_caption(kphi_plot_data *d, const char *caption);

/* Draw the ideal-gas lines, paths and marks (show = 1, the default), or only the real gas
 * (show = 0; kind "kphi-p" then also leaves out the ideal-gas reference line). */
void kphi_plot_data_show_ideal(kphi_plot_data *d, int show);

/* Mark one solved point on the equilibrium-curve chart (kind "curve"): temperature T in K
 * and the product's mole fraction, real gas and ideal gas; labelled with its values. */
void kphi_plot_data_set_point(kphi_plot_data *d, double T, double y_real, double y_ideal);

/* Add a path to the equilibrium-curve chart (kind "curve"): points (T[k] in K, y[k] the
 * product's mole fraction), drawn in the foreground colour over the curves, solid for the
 * real gas and dashed when `ideal` is nonzero, with a marker at every point; on the real
 * gas path (or the only one drawn) the points 0, 2, 4 ... are labelled with the inlet
 * temperatures of beds 1, 2, 3 ... and the points 1, 3, 5 ... with their outlet
 * temperatures, labels moved apart where they would overlap. Made for adiabatic
 * beds in series: inlet, outlet, cooled inlet, outlet ... . At most two paths; T and y are
 * copied. Returns KPHI_OK, KPHI_ENOMEM, or KPHI_EINPUT (a third path, or n < 2). */
int kphi_plot_data_add_path(kphi_plot_data *d, const double T[], const double y[], size_t n,
                            int ideal);

/* Check, before any work is done, that path names a format kphi_plot_write() can write
 * (.svg, .png or .pdf, any case). Errors: KPHI_EINPUT naming path, as kphi_plot_write()
 * would give them. Writability is not checked. */
int kphi_plot_check_path(const char *path, kphi_error *err);

/* Check, before any work is done, that a grid of nT x nP points with n_reactions can be
 * drawn as `kind`: only "kphi-p" can be refused (no reactions, or more than 24). A grid
 * with more series than a chart shows (24 lines; 24 / n_reactions temperatures for
 * "kphi-p") is thinned by kphi_plot_write() to every k-th temperature or pressure, which
 * the caption says. KPHI_EINPUT at "<command line>". */
int kphi_plot_check_grid(kphi_plot_kind kind, size_t nT, size_t nP, size_t n_reactions,
                         kphi_error *err);

/* Draw the chart into path; the format follows the extension (.svg, .png, .pdf). More
 * series than fit are thinned to every k-th one (see kphi_plot_check_grid()).
 * Errors: KPHI_EINPUT (unknown extension, a "kphi-p" chart of too many reactions),
 * KPHI_EIO (cannot write), KPHI_EFAILED (the plotting library failed). The file is
 * written to a temporary name and renamed, so a failure leaves no partial file. */
int kphi_plot_write(const kphi_plot_data *d, kphi_plot_kind kind, const char *path,
                    kphi_error *err);

/* ------------------------------------------------------------ loop diagram
 * (src/plot_loop.c)
 *
 * A synthesis loop drawn as an engineer sketches it: make-up, converter, cooler,
 * separator, purge and recycle compressor as plain boxes joined by numbered streams
 * (1 make-up, 2 converter inlet, 3 converter outlet, 4 separator vapour, 5 liquid
 * product, 6 purge, 7 recycle), with a table of each stream's flow, T, P and product
 * mole fraction under it. The data are plain numbers in display units and texts, so the
 * plot module knows nothing of how a loop is solved. */

#define KPHI_PLOT_LOOP_STREAMS 7

/* One numbered stream. */
typedef struct {
    double flow;      /* in the diagram's flow_unit */
    double T;         /* K; NaN: no single temperature (shown as "-") */
    double P;         /* Pa */
    double y_product; /* the product's mole fraction, 0..1 */
} kphi_plot_loop_stream;

/* A loop diagram. Texts are borrowed and may be NULL (not drawn); each box has a name
 * drawn by the plot and up to two note lines of the caller's (e.g. "outlet 460 °C",
 * "55.5 MW released"). */
typedef struct {
    const char *title;            /* the case's name */
    const char *caption;          /* the line under the title: model, pressure, purge */
    const char *product;          /* the product species ("NH3"), subscripted when drawn */
    const char *flow_unit;        /* "kmol/h", "mol/100 mol make-up" */
    const char *T_unit, *P_unit;  /* display units ("C", "bar") */
    int makeup_at_separator;      /* 1: the make-up joins the cooled gas before the
                                     separator; 0: the recycle before the converter */
    kphi_plot_loop_stream stream[KPHI_PLOT_LOOP_STREAMS]; /* streams 1..7 in that order */
    const char *converter_note[2], *cooler_note[2], *separator_note[2], *compressor_note[2];
    const char *purge_note[2];    /* under the purge arrow, e.g. "2 % of the vapour" */
    const char *notes[3];         /* lines under the stream table (key figures) */
} kphi_plot_loop;

/* Draw the diagram into path (.svg, .png or .pdf by extension), written to a temporary
 * file and renamed. Errors: KPHI_EINPUT (unknown extension, a unit that is not a
 * temperature or pressure unit), KPHI_EIO, KPHI_EFAILED (the plotting library failed),
 * KPHI_ENOMEM. Main thread only. */
int kphi_plot_loop_write(const kphi_plot_loop *lp, const char *path, kphi_error *err);

#ifdef __cplusplus
}
#endif
#endif /* KPHI_PLOT_H */
