/* kphi plot: charts of a sweep over temperature and pressure, drawn with PLplot into SVG
 * (its native svg device, which writes text as SVG text elements, so the labels stay
 * editable and searchable), PNG (pngcairo) or PDF (pdfcairo).
 *
 * Quantities shown (all computed elsewhere; this module only converts units for display):
 *   conversion X of the key species, in percent: 100 X;
 *   K_phi = prod_i phi_i^nu_i = exp(ln K_phi), dimensionless. In an ideal gas every
 *     fugacity coefficient phi_i = f_i / (y_i P) is 1, so K_phi = 1 (Denbigh 1981, "The
 *     Principles of Chemical Equilibrium", 4th ed., ch. 4; from memory): a grey reference
 *     line;
 *   the product's equilibrium mole fraction, in percent: 100 y.
 * Temperatures arrive in K and pressures in Pa and are shown in the case's display units
 * through kphi_units_temperature_to() and kphi_units_pressure_to().
 *
 * Chart kinds: conversion vs P (one colour per T), conversion vs T (one colour per P),
 * K_phi vs P (one colour per T, one line style per reaction), the equilibrium curve
 * (product mole fraction vs T, one colour per P) and the adiabatic bed (conversion at the
 * adiabatic equilibrium outlet, in percent, vs the bed inlet temperature, one colour per
 * P). Over the equilibrium curve, paths of beds in series may be drawn in the foreground
 * colour (kphi_plot_data_add_path()), outlets labelled. Real gas is drawn solid and ideal
 * gas dashed. Colours run in order of the swept value, from blue (lowest) to dark red
 * (highest). A missing point (NaN) breaks its line; a point with no drawable neighbour is
 * drawn as a marker (filled circle real gas, open circle ideal gas; one shape per reaction
 * for K_phi), which is how a grid with a single x value is shown. The pressure axis is
 * logarithmic when the pressures span a factor of 20 or more. Page: 800 x 560 (pixels for
 * PNG, points for SVG and PDF). At most 24 colour/style series (MAX_CURVES).
 *
 * Output: the chart is drawn into a temporary file beside the target (mkstemp) and
 * renamed over it, so a failure leaves no partial file.
 *
 * PLplot keeps process-wide state; how this module stays clear of it:
 *   - every call makes its own stream (plmkstrm) and ends only that stream (plend1), then
 *     makes the caller's stream current again (plgstrm/plsstrm); plend() is never called,
 *     since it would end every stream of the process;
 *   - the process-wide exit and abort handlers (plsexit, plsabort) are left alone.
 *     Instead plsError() points the new stream's error code and message at local storage,
 *     so PLplot's aborted operations come back as KPHI_EFAILED and are not printed;
 *   - plexit() (print, then exit()) is only reached on conditions ruled out first: the
 *     device must be listed by plgDevs() (else PLplot would prompt on stdin), and the
 *     output file must exist and be writable (else PLplot would retry, then exit);
 *   - plwarn() always prints to stderr; nothing drawn here triggers it (window set before
 *     pllegend, valid colours, texts made valid UTF-8 with '#' escaped);
 *   - left behind for the life of the process: PLplot's loaded drivers, and fontconfig and
 *     pango font caches (pango also starts a helper thread to load fontconfig). They do
 *     not grow with the number of charts and do not change later charts.
 * Only the main thread may draw (PLplot's stream table is not thread-safe).
 *
 * The label texts (PLplot escapes, subscripts, valid UTF-8, number formats) are made in
 * src/plot_text.c, declared in src/plot_internal.h. */
#include "kphi/plot.h"

#include <ctype.h>
#include <errno.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include <plplot.h>

#include "internal.h"
#include "kphi/units.h"
#include "plot_internal.h"

#define MAX_CURVES 24 /* distinct colour/style series a chart may draw */
#define PAGE_W 800    /* page size: pixels for PNG, points for SVG and PDF */
#define PAGE_H 560

/* cmap0 slots: background, foreground (axes, text), grid, reference line, then series. */
enum { COL_BG = 0, COL_FG, COL_GRID, COL_REF, COL_SERIES };

struct kphi_plot_data {
    size_t nT, nP, nR;
    double *T, *P;              /* K, Pa */
    double *X_real, *X_ideal;   /* [iT * nP + iP], fractions */
    double *y_real, *y_ideal;   /* [iT * nP + iP], mole fractions */
    double *Xa_real, *Xa_ideal; /* [iT * nP + iP], adiabatic outlet conversion, fractions */
    size_t n_paths;             /* paths over the equilibrium curve (beds in series) */
    double *path_T[2], *path_y[2]; /* K, mole fractions */
    size_t path_n[2];
    int path_ideal[2];
    double *lnKphi;             /* [(iT * nP + iP) * nR + j] */
    char *title, *conversion, *product, *T_unit, *P_unit;
    char **equations; /* nR strings or NULL each */
};

/* ------------------------------------------------------------------ kinds */

static const char *const kind_names[KPHI_PLOT_N_KINDS] = {
    "conversion-p", "conversion-t", "kphi-p", "curve", "adiabatic"};

int kphi_plot_kind_parse(const char *text, kphi_plot_kind *kind, kphi_error *err)
{
    kphi_mark none = {0, 0};
    if (text == NULL)
        text = "";
    for (size_t i = 0; i < KPHI_PLOT_N_KINDS; i++)
        if (strcmp(text, kind_names[i]) == 0) {
            *kind = (kphi_plot_kind)i;
            return KPHI_OK;
        }
    const char *near = kphi__closest(text, kind_names, KPHI_PLOT_N_KINDS);
    if (near != NULL)
        return kphi_error_set(err, KPHI_EINPUT, "<command line>", none,
                              "unknown plot kind '%s' (did you mean '%s'?)", text, near);
    return kphi_error_set(err, KPHI_EINPUT, "<command line>", none,
                          "unknown plot kind '%s'; expected conversion-p, conversion-t, "
                          "kphi-p, curve or adiabatic",
                          text);
}

const char *kphi_plot_kind_name(kphi_plot_kind kind)
{
    if ((int)kind < 0 || kind >= KPHI_PLOT_N_KINDS)
        return "unknown";
    return kind_names[kind];
}

kphi_plot_kind kphi_plot_default_kind(size_t nT, size_t nP)
{
    return nP > nT ? KPHI_PLOT_CONVERSION_P : KPHI_PLOT_CONVERSION_T;
}

/* ------------------------------------------------------------------- data */

static size_t at_least_one(size_t n)
{
    return n > 0 ? n : 1;
}

kphi_plot_data *kphi_plot_data_alloc(const double T[], size_t nT, const double P[], size_t nP,
                                     size_t n_reactions)
{
    size_t nT1 = at_least_one(nT), nP1 = at_least_one(nP), nR1 = at_least_one(n_reactions);
    if (nT1 > SIZE_MAX / nP1 || nT1 * nP1 > SIZE_MAX / nR1 / sizeof(double))
        return NULL;
    size_t npt = nT1 * nP1;
    kphi_plot_data *d = calloc(1, sizeof *d);
    if (d == NULL)
        return NULL;
    d->nT = nT;
    d->nP = nP;
    d->nR = n_reactions;
    d->T = malloc(nT1 * sizeof *d->T);
    d->P = malloc(nP1 * sizeof *d->P);
    d->X_real = malloc(npt * sizeof(double));
    d->X_ideal = malloc(npt * sizeof(double));
    d->y_real = malloc(npt * sizeof(double));
    d->y_ideal = malloc(npt * sizeof(double));
    d->Xa_real = malloc(npt * sizeof(double));
    d->Xa_ideal = malloc(npt * sizeof(double));
    d->lnKphi = malloc(npt * nR1 * sizeof(double));
    d->equations = calloc(nR1, sizeof *d->equations);
    if (d->T == NULL || d->P == NULL || d->X_real == NULL || d->X_ideal == NULL ||
        d->y_real == NULL || d->y_ideal == NULL || d->Xa_real == NULL || d->Xa_ideal == NULL ||
        d->lnKphi == NULL || d->equations == NULL) {
        kphi_plot_data_free(d);
        return NULL;
    }
    for (size_t i = 0; i < nT; i++)
        d->T[i] = T[i];
    for (size_t i = 0; i < nP; i++)
        d->P[i] = P[i];
    for (size_t k = 0; k < npt; k++)
        d->X_real[k] = d->X_ideal[k] = d->y_real[k] = d->y_ideal[k] = d->Xa_real[k] =
            d->Xa_ideal[k] = NAN;
    for (size_t k = 0; k < npt * nR1; k++)
        d->lnKphi[k] = NAN;
    return d;
}

void kphi_plot_data_free(kphi_plot_data *d)
{
    if (d == NULL)
        return;
    if (d->equations != NULL)
        for (size_t j = 0; j < d->nR; j++)
            free(d->equations[j]);
    free(d->equations);
    free(d->title);
    free(d->conversion);
    free(d->product);
    free(d->T_unit);
    free(d->P_unit);
    free(d->T);
    free(d->P);
    free(d->X_real);
    free(d->X_ideal);
    free(d->y_real);
    free(d->y_ideal);
    free(d->Xa_real);
    free(d->Xa_ideal);
    for (size_t k = 0; k < d->n_paths; k++) {
        free(d->path_T[k]);
        free(d->path_y[k]);
    }
    free(d->lnKphi);
    free(d);
}

/* Replace *slot by a copy of text (NULL leaves it empty). 0, or -1 when out of memory. */
static int set_text(char **slot, const char *text)
{
    char *copy = NULL;
    if (text != NULL) {
        size_t n = strlen(text) + 1;
        copy = malloc(n);
        if (copy == NULL)
            return -1;
        memcpy(copy, text, n);
    }
    free(*slot);
    *slot = copy;
    return 0;
}

int kphi_plot_data_labels(kphi_plot_data *d, const char *title, const char *conversion,
                          const char *product, const char *T_unit, const char *P_unit,
                          const char *const equations[])
{
    if (set_text(&d->title, title) != 0 || set_text(&d->conversion, conversion) != 0 ||
        set_text(&d->product, product) != 0 || set_text(&d->T_unit, T_unit) != 0 ||
        set_text(&d->P_unit, P_unit) != 0)
        return KPHI_ENOMEM;
    for (size_t j = 0; j < d->nR; j++)
        if (set_text(&d->equations[j], equations != NULL ? equations[j] : NULL) != 0)
            return KPHI_ENOMEM;
    return KPHI_OK;
}

void kphi_plot_data_set(kphi_plot_data *d, size_t iT, size_t iP, double X_real, double X_ideal,
                        const double lnKphi[], double y_product_real, double y_product_ideal)
{
    if (d == NULL || iT >= d->nT || iP >= d->nP)
        return;
    size_t k = iT * d->nP + iP;
    d->X_real[k] = X_real;
    d->X_ideal[k] = X_ideal;
    d->y_real[k] = y_product_real;
    d->y_ideal[k] = y_product_ideal;
    for (size_t j = 0; j < d->nR; j++)
        d->lnKphi[k * d->nR + j] = lnKphi != NULL ? lnKphi[j] : NAN;
}

void kphi_plot_data_set_adiabatic(kphi_plot_data *d, size_t iT, size_t iP, double X_out_real,
                                  double X_out_ideal)
{
    if (d == NULL || iT >= d->nT || iP >= d->nP)
        return;
    size_t k = iT * d->nP + iP;
    d->Xa_real[k] = X_out_real;
    d->Xa_ideal[k] = X_out_ideal;
}

int kphi_plot_data_add_path(kphi_plot_data *d, const double T[], const double y[], size_t n,
                            int ideal)
{
    if (d == NULL || d->n_paths >= 2 || n < 2)
        return KPHI_EINPUT;
    size_t k = d->n_paths;
    d->path_T[k] = malloc(n * sizeof(double));
    d->path_y[k] = malloc(n * sizeof(double));
    if (d->path_T[k] == NULL || d->path_y[k] == NULL) {
        free(d->path_T[k]);
        free(d->path_y[k]);
        d->path_T[k] = d->path_y[k] = NULL;
        return KPHI_ENOMEM;
    }
    memcpy(d->path_T[k], T, n * sizeof(double));
    memcpy(d->path_y[k], y, n * sizeof(double));
    d->path_n[k] = n;
    d->path_ideal[k] = ideal != 0;
    d->n_paths++;
    return KPHI_OK;
}

/* -------------------------------------------------------------- the chart */

/* One line to draw: y over the chart's x values, NaN where missing. */
typedef struct {
    double *y;
    int colour; /* series number, 0-based */
    int style;  /* pllsty number: 1 solid, else dashed */
    int marker; /* index into markers[]: 0 real gas, 1 ideal gas, or the reaction */
} line_spec;

/* A chart ready to draw: texts, x values, lines and legend entries. */
typedef struct {
    size_t nx, n_lines, n_colours, n_styles;
    double *x;        /* display units (log10 of them on a log axis) */
    line_spec *lines; /* n_lines */
    size_t n_paths;             /* bed paths (curve kind only), display units */
    double *path_x[2], *path_y[2];
    size_t path_n[2];
    int path_ideal[2];
    int log_x;   /* pressure axis in decades */
    int ref_one; /* grey line at y = 1 (K_phi of an ideal gas) */
    char title[512], xlabel[128], ylabel[128];
    char caption[512]; /* the line under the title: what the chart was drawn at, thinning */
    char colour_text[MAX_CURVES][64];
    char style_text[MAX_CURVES][160];
    int style_of[MAX_CURVES], marker_of[MAX_CURVES];
    double xmin, xmax, ymin, ymax;
} chart;

static void chart_free(chart *c)
{
    if (c->lines != NULL)
        for (size_t i = 0; i < c->n_lines; i++)
            free(c->lines[i].y);
    free(c->lines);
    free(c->x);
    for (size_t k = 0; k < c->n_paths; k++) {
        free(c->path_x[k]);
        free(c->path_y[k]);
    }
}

/* Line styles per reaction (pllsty numbers): solid, long dashes, short dashes, ... */
static int reaction_style(size_t j)
{
    static const int styles[] = {1, 3, 2, 4, 5, 6, 7, 8};
    return styles[j % 8];
}

#define DASHED 3           /* pllsty number for the ideal gas */
#define MARKER_SCALE 0.65  /* marker size, relative to the default character height */

/* Markers (UTF-8): ● ○ ■ □ ▲ △ ◆ ◇ */
static const char *const markers[8] = {"\xe2\x97\x8f", "\xe2\x97\x8b", "\xe2\x96\xa0",
                                       "\xe2\x96\xa1", "\xe2\x96\xb2", "\xe2\x96\xb3",
                                       "\xe2\x97\x86", "\xe2\x97\x87"};

/* The colour series a kind draws from a grid (one per T or per P) and the step k that
 * keeps the lines within MAX_CURVES: every k-th series is drawn (k = 1: all). K_phi draws
 * one line per series and reaction. Only K_phi can be refused: no reactions, or more
 * reactions than lines. */
static int series_step(kphi_plot_kind kind, size_t nT, size_t nP, size_t nR, size_t *n_series,
                       size_t *step, const char *path, kphi_error *err)
{
    kphi_mark none = {0, 0};
    size_t per = 1, n;
    switch (kind) {
    case KPHI_PLOT_CONVERSION_P:
        n = nT;
        break;
    case KPHI_PLOT_CONVERSION_T:
    case KPHI_PLOT_CURVE:
    case KPHI_PLOT_ADIABATIC:
        n = nP;
        break;
    case KPHI_PLOT_KPHI_P:
        if (nR == 0)
            return kphi_error_set(err, KPHI_EINPUT, path, none,
                                  "nothing to plot: the reaction set has no reactions");
        if (nR > MAX_CURVES)
            return kphi_error_set(err, KPHI_EINPUT, path, none,
                                  "too many lines to draw: %zu reactions, at most %d; use plot "
                                  "kind 'conversion-t' or 'conversion-p'",
                                  nR, MAX_CURVES);
        n = nT;
        per = nR;
        break;
    default:
        return kphi_error_set(err, KPHI_EINPUT, path, none, "unknown plot kind %d", (int)kind);
    }
    size_t k = 1;
    while ((n + k - 1) / k * per > MAX_CURVES)
        k++;
    *n_series = n;
    *step = k;
    return KPHI_OK;
}

int kphi_plot_check_grid(kphi_plot_kind kind, size_t nT, size_t nP, size_t n_reactions,
                         kphi_error *err)
{
    size_t n, k;
    return series_step(kind, nT, nP, n_reactions, &n, &k, "<command line>", err);
}

/* "2nd", "3rd", "11th", "21st" */
static const char *ordinal_suffix(size_t k)
{
    if (k % 100 >= 11 && k % 100 <= 13)
        return "th";
    return k % 10 == 1 ? "st" : k % 10 == 2 ? "nd" : k % 10 == 3 ? "rd" : "th";
}

static int add_line(chart *c, size_t nx, int colour, int style, int marker)
{
    line_spec *l = &c->lines[c->n_lines];
    l->y = malloc(nx * sizeof *l->y);
    if (l->y == NULL)
        return -1;
    l->colour = colour;
    l->style = style;
    l->marker = marker;
    c->n_lines++;
    return 0;
}

/* "N#d2#u conversion (%)": the species (user text, with subscripts) and the quantity, or
 * the quantity alone when the species is unknown. */
static void label_with_species(kphi__plot_textbuf *b, const char *species, const char *what)
{
    if (species != NULL && species[0] != '\0') {
        kphi__plot_tb_user(b, species, 1);
        kphi__plot_tb_putc(b, ' ');
    }
    kphi__plot_tb_puts(b, what);
}

/* Fill a chart from the data: every `step`-th colour series (series_step()). */
static int chart_build(const kphi_plot_data *d, kphi_plot_kind kind, size_t step,
                       const char *path, chart *c, kphi_error *err)
{
    kphi_mark none = {0, 0};
    const char *Tu = d->T_unit != NULL && d->T_unit[0] != '\0' ? d->T_unit : "K";
    const char *Pu = d->P_unit != NULL && d->P_unit[0] != '\0' ? d->P_unit : "bar";
    double probe;
    if (kphi_units_temperature_to(300.0, Tu, &probe) != KPHI_OK)
        return kphi_error_set(err, KPHI_EINPUT, path, none,
                              "unknown temperature unit '%s' for the plot; expected K, C, F or R",
                              Tu);
    if (kphi_units_pressure_to(1e5, Pu, &probe) != KPHI_OK)
        return kphi_error_set(err, KPHI_EINPUT, path, none,
                              "unknown pressure unit '%s' for the plot; expected Pa, kPa, MPa, "
                              "bar, atm, psia, barg or psig",
                              Pu);
    char Tlab[32];
    kphi__plot_T_unit_label(Tu, Tlab, sizeof Tlab);

    int x_is_P = kind == KPHI_PLOT_CONVERSION_P || kind == KPHI_PLOT_KPHI_P;
    size_t nx = x_is_P ? d->nP : d->nT;
    size_t ns_all = x_is_P ? d->nT : d->nP;
    size_t ns = (ns_all + step - 1) / step; /* colour series drawn: grid index s * step */
    size_t nr = kind == KPHI_PLOT_KPHI_P ? d->nR : 2;
    c->nx = nx;
    c->n_colours = ns;
    c->x = malloc(nx * sizeof *c->x);
    c->lines = calloc(ns * nr, sizeof *c->lines);
    if (c->x == NULL || c->lines == NULL)
        return kphi_error_set(err, KPHI_ENOMEM, NULL, none, "out of memory for the plot");

    /* x values and colour legend texts, in display units */
    for (size_t i = 0; i < nx; i++) {
        if (x_is_P)
            kphi_units_pressure_to(d->P[i], Pu, &c->x[i]);
        else
            kphi_units_temperature_to(d->T[i], Tu, &c->x[i]);
    }
    /* legend values in display units, all with the same decimals */
    double *sv = malloc(at_least_one(ns) * sizeof *sv);
    if (sv == NULL)
        return kphi_error_set(err, KPHI_ENOMEM, NULL, none, "out of memory for the plot");
    for (size_t s = 0; s < ns; s++) {
        if (x_is_P)
            kphi_units_temperature_to(d->T[s * step], Tu, &sv[s]);
        else
            kphi_units_pressure_to(d->P[s * step], Pu, &sv[s]);
    }
    int dec = kphi__plot_common_decimals(sv, ns);
    for (size_t s = 0; s < ns; s++) {
        char num[48];
        kphi__plot_format_fixed(sv[s], dec, num, sizeof num);
        kphi__plot_textbuf b = {c->colour_text[s], sizeof c->colour_text[s], 0};
        c->colour_text[s][0] = '\0';
        kphi__plot_tb_puts(&b, num);
        kphi__plot_tb_putc(&b, ' ');
        if (x_is_P)
            kphi__plot_tb_puts(&b, Tlab);
        else
            kphi__plot_tb_user(&b, Pu, 0);
    }
    free(sv);

    /* lines */
    for (size_t s = 0; s < ns; s++)
        for (size_t r = 0; r < nr; r++) {
            int style = kind == KPHI_PLOT_KPHI_P ? reaction_style(r) : (r == 0 ? 1 : DASHED);
            int marker = kind == KPHI_PLOT_KPHI_P ? (int)(r % 8) : (int)r; /* r: 0 real, 1 ideal */
            if (add_line(c, at_least_one(nx), (int)s, style, marker) != 0)
                return kphi_error_set(err, KPHI_ENOMEM, NULL, none,
                                      "out of memory for the plot");
            double *y = c->lines[c->n_lines - 1].y;
            for (size_t i = 0; i < nx; i++) {
                size_t iT = x_is_P ? s * step : i, iP = x_is_P ? i : s * step;
                size_t k = iT * d->nP + iP;
                switch (kind) {
                case KPHI_PLOT_CONVERSION_P:
                case KPHI_PLOT_CONVERSION_T:
                    y[i] = 100.0 * (r == 0 ? d->X_real[k] : d->X_ideal[k]);
                    break;
                case KPHI_PLOT_KPHI_P:
                    y[i] = exp(d->lnKphi[k * d->nR + r]);
                    break;
                case KPHI_PLOT_ADIABATIC:
                    y[i] = 100.0 * (r == 0 ? d->Xa_real[k] : d->Xa_ideal[k]);
                    break;
                default:
                    y[i] = 100.0 * (r == 0 ? d->y_real[k] : d->y_ideal[k]);
                    break;
                }
                if (!isfinite(y[i]))
                    y[i] = NAN;
            }
        }

    /* bed paths over the equilibrium curve */
    for (size_t k = 0; kind == KPHI_PLOT_CURVE && k < d->n_paths; k++) {
        size_t n = d->path_n[k];
        c->path_x[k] = malloc(n * sizeof(double));
        c->path_y[k] = malloc(n * sizeof(double));
        c->n_paths = k + 1;
        if (c->path_x[k] == NULL || c->path_y[k] == NULL)
            return kphi_error_set(err, KPHI_ENOMEM, NULL, none, "out of memory for the plot");
        for (size_t i = 0; i < n; i++) {
            if (kphi_units_temperature_to(d->path_T[k][i], Tu, &c->path_x[k][i]) != KPHI_OK)
                c->path_x[k][i] = NAN;
            c->path_y[k][i] = 100.0 * d->path_y[k][i];
        }
        c->path_n[k] = n;
        c->path_ideal[k] = d->path_ideal[k];
    }

    /* style legend */
    if (kind == KPHI_PLOT_KPHI_P) {
        c->n_styles = d->nR > 1 ? d->nR : 0;
        for (size_t j = 0; j < c->n_styles && j < MAX_CURVES; j++) {
            kphi__plot_textbuf b = {c->style_text[j], sizeof c->style_text[j], 0};
            c->style_text[j][0] = '\0';
            if (d->equations[j] != NULL && d->equations[j][0] != '\0')
                kphi__plot_tb_user(&b, d->equations[j], 1);
            else
                snprintf(c->style_text[j], sizeof c->style_text[j], "reaction %zu", j + 1);
            c->style_of[j] = reaction_style(j);
            c->marker_of[j] = (int)(j % 8);
        }
        c->ref_one = 1;
    } else {
        c->n_styles = 2;
        snprintf(c->style_text[0], sizeof c->style_text[0], "real gas");
        snprintf(c->style_text[1], sizeof c->style_text[1], "ideal gas");
        c->style_of[0] = 1;
        c->style_of[1] = DASHED;
        c->marker_of[0] = 0;
        c->marker_of[1] = 1;
    }

    /* axis texts */
    kphi__plot_textbuf xl = {c->xlabel, sizeof c->xlabel, 0}, yl = {c->ylabel, sizeof c->ylabel, 0};
    c->xlabel[0] = c->ylabel[0] = '\0';
    if (x_is_P) {
        kphi__plot_tb_puts(&xl, "pressure (");
        kphi__plot_tb_user(&xl, Pu, 0);
        kphi__plot_tb_puts(&xl, ")");
    } else {
        kphi__plot_tb_puts(&xl, kind == KPHI_PLOT_ADIABATIC ? "bed inlet temperature ("
                                                             : "temperature (");
        kphi__plot_tb_puts(&xl, Tlab);
        kphi__plot_tb_puts(&xl, ")");
    }
    const char *what = "";
    switch (kind) {
    case KPHI_PLOT_CONVERSION_P:
    case KPHI_PLOT_CONVERSION_T:
        label_with_species(&yl, d->conversion, "conversion (%)");
        what = kind == KPHI_PLOT_CONVERSION_P ? "equilibrium conversion vs pressure"
                                              : "equilibrium conversion vs temperature";
        break;
    case KPHI_PLOT_ADIABATIC:
        label_with_species(&yl, d->conversion, "conversion at the outlet (%)");
        what = "adiabatic equilibrium bed outlet";
        break;
    case KPHI_PLOT_KPHI_P:
        kphi__plot_tb_puts(&yl, "K#d\xcf\x86#u (dimensionless)");
        what = "fugacity-coefficient ratio K#d\xcf\x86#u vs pressure";
        break;
    default:
        if (d->product != NULL && d->product[0] != '\0')
            label_with_species(&yl, d->product, "mole fraction (%)");
        else
            kphi__plot_tb_puts(&yl, "product mole fraction (%)");
        what = "equilibrium curve";
        break;
    }
    if (step > 1) {
        kphi__plot_textbuf cb = {c->caption, sizeof c->caption, 0};
        c->caption[0] = '\0';
        char note[160];
        snprintf(note, sizeof note, "every %zu%s of %zu %s drawn", step, ordinal_suffix(step),
                 ns_all, x_is_P ? "temperatures" : "pressures");
        kphi__plot_tb_puts(&cb, note);
    }
    kphi__plot_textbuf tl = {c->title, sizeof c->title, 0};
    c->title[0] = '\0';
    kphi__plot_tb_puts(&tl, what);
    if (d->title != NULL && d->title[0] != '\0') {
        kphi__plot_tb_puts(&tl, ": ");
        kphi__plot_tb_user(&tl, d->title, 0);
    }
    return KPHI_OK;
}

/* Axis ranges; a logarithmic x axis when the values span a factor of 20 or more. */
static int chart_ranges(chart *c)
{
    double xmin = INFINITY, xmax = -INFINITY, ymin = INFINITY, ymax = -INFINITY;
    for (size_t i = 0; i < c->nx; i++)
        if (isfinite(c->x[i])) {
            xmin = fmin(xmin, c->x[i]);
            xmax = fmax(xmax, c->x[i]);
        }
    int any = 0;
    for (size_t l = 0; l < c->n_lines; l++)
        for (size_t i = 0; i < c->nx; i++)
            if (isfinite(c->lines[l].y[i]) && isfinite(c->x[i])) {
                ymin = fmin(ymin, c->lines[l].y[i]);
                ymax = fmax(ymax, c->lines[l].y[i]);
                any = 1;
            }
    if (!any)
        return -1;
    for (size_t k = 0; k < c->n_paths; k++)
        for (size_t i = 0; i < c->path_n[k]; i++)
            if (isfinite(c->path_x[k][i]) && isfinite(c->path_y[k][i])) {
                xmin = fmin(xmin, c->path_x[k][i]);
                xmax = fmax(xmax, c->path_x[k][i]);
                ymin = fmin(ymin, c->path_y[k][i]);
                ymax = fmax(ymax, c->path_y[k][i]);
            }
    if (c->ref_one) {
        ymin = fmin(ymin, 1.0);
        ymax = fmax(ymax, 1.0);
    }
    c->log_x = xmin > 0.0 && xmax / xmin >= 20.0;
    if (c->log_x) {
        for (size_t i = 0; i < c->nx; i++)
            c->x[i] = log10(c->x[i]);
        xmin = log10(xmin);
        xmax = log10(xmax);
    }
    /* pad: 3 % of the span on x, 6 % on y; a single value gets +-10 % (or +-1) */
    double dx = xmax - xmin, dy = ymax - ymin;
    if (dx <= 0.0)
        dx = fmax(fabs(xmin) * 0.2, c->log_x ? 0.2 : 2.0);
    if (dy <= 0.0)
        dy = fmax(fabs(ymin) * 0.2, 2.0);
    c->xmin = xmin - (xmax > xmin ? 0.03 : 0.5) * dx;
    c->xmax = xmax + (xmax > xmin ? 0.03 : 0.5) * dx;
    c->ymin = ymin - (ymax > ymin ? 0.06 : 0.5) * dy;
    c->ymax = ymax + (ymax > ymin ? (c->ref_one ? 0.11 : 0.06) : 0.5) * dy; /* room for a label */
    /* percentages and K_phi are not negative: keep the axis from starting below zero */
    if (ymin >= 0.0 && c->ymin < 0.0)
        c->ymin = 0.0;
    return 0;
}

/* Colour of series s of n: evenly spaced along blue, teal, green, gold, orange, dark red. */
static void series_rgb(size_t s, size_t n, int rgb[3])
{
    static const int anchors[][3] = {{31, 63, 191}, {23, 150, 180}, {44, 160, 44},
                                     {200, 160, 0}, {232, 89, 12},  {165, 15, 21}};
    const double last = 5.0;
    double t = n > 1 ? (double)s / (double)(n - 1) * last : 0.0;
    if (n == 2)
        t = s == 0 ? 0.0 : last; /* blue and dark red */
    int a = (int)floor(t);
    if (a >= 5)
        a = 4;
    double f = t - a;
    for (int k = 0; k < 3; k++)
        rgb[k] = (int)lround(anchors[a][k] * (1.0 - f) + anchors[a + 1][k] * f);
}

/* Draw the polyline of one series: segments between consecutive drawable points, and a
 * marker where a point has no drawable neighbour. */
static void draw_line(const chart *c, const line_spec *l, PLFLT *xs, PLFLT *ys)
{
    size_t i = 0;
    while (i < c->nx) {
        size_t n = 0;
        while (i < c->nx && isfinite(c->x[i]) && isfinite(l->y[i])) {
            xs[n] = c->x[i];
            ys[n] = l->y[i];
            n++;
            i++;
        }
        if (n >= 2)
            plline((PLINT)n, xs, ys);
        else if (n == 1) {
            plschr(0.0, MARKER_SCALE);
            plstring(1, xs, ys, markers[l->marker]);
            plschr(0.0, 1.0);
        }
        if (n == 0)
            i++;
    }
}

/* Legend entries: n lines or markers with texts, drawn at the top right of the subpage,
 * y_off below its top (normalised subpage units). Returns the width, sets *height. */
static double legend(size_t n, const char *const text[], const PLINT colour[],
                     const PLINT style[], const int marker[], int as_markers, double y_off,
                     double *height)
{
    PLINT opt[MAX_CURVES + 2], tcol[MAX_CURVES + 2], snum[MAX_CURVES + 2];
    PLFLT lwid[MAX_CURVES + 2], sscale[MAX_CURVES + 2];
    const char *sym[MAX_CURVES + 2];
    for (size_t k = 0; k < n; k++) {
        opt[k] = as_markers ? PL_LEGEND_SYMBOL : PL_LEGEND_LINE;
        tcol[k] = COL_FG;
        lwid[k] = 2.2;
        sscale[k] = MARKER_SCALE;
        snum[k] = 1;
        sym[k] = markers[marker[k]];
    }
    /* up to 11 entries at full size; up to 17 closer together; then two columns */
    int two_cols = n > 17;
    double tscale = n > 11 ? 0.85 : 0.95, spacing = n > 11 ? 1.6 : 1.9;
    PLINT nrow = two_cols ? (PLINT)((n + 1) / 2) : (PLINT)n;
    PLFLT w = 0.0, h = 0.0;
    pllegend(&w, &h, PL_LEGEND_BACKGROUND,
             PL_POSITION_SUBPAGE | PL_POSITION_RIGHT | PL_POSITION_TOP | PL_POSITION_INSIDE,
             0.012, y_off, 0.06, COL_BG, COL_FG, 1, nrow, two_cols ? 2 : 1, (PLINT)n, opt,
             0.7, tscale, spacing, 0.0, tcol, text, NULL, NULL, NULL, NULL, colour, style, lwid,
             colour, sscale, snum, sym);
    *height = h;
    return w;
}

/* Labels of a logarithmic axis as plain numbers (1, 10, 100) rather than powers of ten.
 * PLplot passes the decade exponent (the axis is in log10 units). */
static void log_label(PLINT axis, PLFLT value, char *label, PLINT length, PLPointer data)
{
    (void)axis;
    (void)data;
    if (length > 0)
        snprintf(label, (size_t)length, "%g", pow(10.0, value));
}

#define VP_LEFT 0.105
#define VP_BOTTOM 0.12
#define VP_TOP 0.87

/* A line of text above the viewport, left-aligned with it, `disp` default character
 * heights above its top, at `scale` times the default size, shrunk when it would run off
 * the page. */
static void top_text(const char *text, double scale, double disp)
{
    PLFLT def_mm, ht_mm, xmin_mm, xmax_mm, ymin_mm, ymax_mm;
    plgchr(&def_mm, &ht_mm);
    plgspa(&xmin_mm, &xmax_mm, &ymin_mm, &ymax_mm);
    (void)ht_mm;
    (void)ymin_mm;
    (void)ymax_mm;
    double avail = (1.0 - VP_LEFT - 0.015) * (xmax_mm - xmin_mm);
    /* width of a sans font, about 0.72 character heights per character of mostly
     * lower-case text (measured on the rendered PNG) */
    double est = 0.72 * def_mm * scale * (double)strlen(text); /* mm */
    double sc = est > avail ? scale * avail / est : scale;
    plschr(0.0, sc);
    plmtex("t", disp * scale / sc, 0.0, 0.0, text);
    plschr(0.0, 1.0);
}

/* Draw the whole chart on the current (initialised) stream. */
static void chart_draw(const chart *c, PLFLT *xs, PLFLT *ys)
{
    int single_x = c->nx == 1; /* markers only: legends show markers too */
    pladv(0);
    plvpor(VP_LEFT, 0.75, VP_BOTTOM, VP_TOP);
    plwind(c->xmin, c->xmax, c->ymin, c->ymax); /* pllegend restores a window: set one */
    plschr(0.0, 1.0);

    /* legends first, right of the plot: they decide its width. Line styles, then colours. */
    const char *text[MAX_CURVES + 2];
    PLINT colour[MAX_CURVES + 2], style[MAX_CURVES + 2];
    int marker[MAX_CURVES + 2];
    size_t n = 0;
    for (size_t s = 0; s < c->n_styles && n < MAX_CURVES; s++, n++) {
        text[n] = c->style_text[s];
        colour[n] = COL_FG;
        style[n] = c->style_of[s];
        marker[n] = c->marker_of[s];
    }
    double w1 = 0.0, h1 = 0.0, w2 = 0.0, h2 = 0.0;
    if (n > 0)
        w1 = legend(n, text, colour, style, marker, single_x, 1.0 - VP_TOP, &h1);
    n = 0;
    for (size_t s = 0; s < c->n_colours && n < MAX_CURVES; s++, n++) {
        text[n] = c->colour_text[s];
        colour[n] = COL_SERIES + (PLINT)s;
        style[n] = 1;
        marker[n] = 0;
    }
    w2 = legend(n, text, colour, style, marker, single_x, 1.0 - VP_TOP + h1 + (h1 > 0 ? 0.03 : 0),
                &h2);
    double right = 1.0 - 0.012 - fmax(w1, w2) - 0.03;
    if (right < 0.5)
        right = 0.5;

    plvpor(VP_LEFT, right, VP_BOTTOM, VP_TOP);
    plwind(c->xmin, c->xmax, c->ymin, c->ymax);
    plcol0(COL_GRID);
    plwidth(0.6);
    pllsty(1);
    plbox(c->log_x ? "gl" : "g", 0.0, 0, "g", 0.0, 0);
    plcol0(COL_FG);
    plwidth(1.0);
    plslabelfunc(log_label, NULL);
    plbox(c->log_x ? "bcnstlo" : "bcnst", 0.0, 0, "bcnstv", 0.0, 0);
    plschr(0.0, 1.05);
    plmtex("b", 2.8, 0.5, 0.5, c->xlabel);
    plmtex("l", 4.2, 0.5, 0.5, c->ylabel);

    /* title and, under it, the caption, left-aligned over the plot */
    int has_caption = c->caption[0] != '\0';
    top_text(c->title, 1.15, has_caption ? 2.5 : 1.5);
    if (has_caption)
        top_text(c->caption, 0.82, 1.0);

    if (c->ref_one) {
        PLFLT rx[2] = {c->xmin, c->xmax}, ry[2] = {1.0, 1.0};
        plcol0(COL_REF);
        plwidth(1.5);
        pllsty(2);
        plline(2, rx, ry);
        pllsty(1);
        /* labelled on the line, at the right, where real-gas lines are furthest from it */
        plschr(0.0, 0.9);
        plptex(c->xmax - 0.015 * (c->xmax - c->xmin), 1.0 + 0.035 * (c->ymax - c->ymin), 1.0,
               0.0, 1.0, "ideal gas: K#d\xcf\x86#u = 1");
        plschr(0.0, 1.0);
    }
    /* ideal gas (dashed) first so real-gas lines lie on top */
    for (int pass = 0; pass < 2; pass++)
        for (size_t l = 0; l < c->n_lines; l++) {
            const line_spec *ln = &c->lines[l];
            if ((pass == 0) != (ln->style != 1))
                continue;
            plcol0(COL_SERIES + ln->colour);
            plwidth(2.2);
            pllsty(ln->style);
            draw_line(c, ln, xs, ys);
        }
    /* bed paths on top: inlet, outlet, cooled inlet, outlet ...; outlets labelled on the
     * real-gas path */
    for (size_t k = 0; k < c->n_paths; k++) {
        size_t np = c->path_n[k];
        for (size_t i = 0; i < np; i++) {
            xs[i] = c->path_x[k][i];
            ys[i] = c->path_y[k][i];
        }
        plcol0(COL_FG);
        plwidth(1.6);
        pllsty(c->path_ideal[k] ? DASHED : 1);
        plline((PLINT)np, xs, ys);
        plschr(0.0, MARKER_SCALE);
        plstring((PLINT)np, xs, ys, markers[c->path_ideal[k] ? 1 : 0]);
        plschr(0.0, 0.85);
        for (size_t i = 1; !c->path_ideal[k] && i < np; i += 2) {
            char lab[32];
            snprintf(lab, sizeof lab, "bed %zu", (i + 1) / 2);
            plptex(xs[i] + 0.012 * (c->xmax - c->xmin), ys[i], 1.0, 0.0, 0.0, lab);
        }
        plschr(0.0, 1.0);
    }
    pllsty(1);
    plwidth(1.0);
}

/* ------------------------------------------------------------------ output */

/* A format: extension, PLplot device, and bytes its file must end with (before any
 * trailing white space), since the devices do not report write errors such as a
 * full disk: PNG ends with the IEND chunk (ISO/IEC 15948:2004 sec. 11.2.5), PDF with
 * "%%EOF" (ISO 32000-1:2008 sec. 7.5.5), SVG with the closing root tag. */
typedef struct {
    const char *ext, *device, *trailer;
    size_t trailer_len;
    int text;            /* white space may follow the trailer */
    const char *package; /* the Debian package that carries the device */
} format_def;

static const format_def formats[] = {
    {".svg", "svg", "</svg>", 6, 1, "libplplot17"},
    {".png", "pngcairo", "IEND\xae\x42\x60\x82", 8, 0, "plplot-driver-cairo"},
    {".pdf", "pdfcairo", "%%EOF", 5, 1, "plplot-driver-cairo"},
};

/* Does the file end with the format's trailer? */
static int complete_file(const char *path, const format_def *f)
{
    FILE *in = fopen(path, "rb");
    if (in == NULL)
        return 0;
    char tail[64];
    if (fseek(in, -(long)sizeof tail, SEEK_END) != 0)
        rewind(in);
    size_t n = fread(tail, 1, sizeof tail, in);
    fclose(in);
    while (f->text && n > 0 && isspace((unsigned char)tail[n - 1]))
        n--;
    return n >= f->trailer_len &&
           memcmp(tail + n - f->trailer_len, f->trailer, f->trailer_len) == 0;
}

static int ext_equal(const char *a, const char *b)
{
    for (; *a != '\0' && *b != '\0'; a++, b++)
        if (tolower((unsigned char)*a) != tolower((unsigned char)*b))
            return 0;
    return *a == *b;
}

static int pick_format(const char *path, const format_def **f, kphi_error *err)
{
    kphi_mark none = {0, 0};
    const char *slash = strrchr(path, '/');
    const char *base = slash != NULL ? slash + 1 : path;
    const char *dot = strrchr(base, '.');
    if (dot == NULL || dot == base)
        return kphi_error_set(err, KPHI_EINPUT, path, none,
                              "plot file has no extension; expected .svg, .png or .pdf");
    for (size_t i = 0; i < sizeof formats / sizeof formats[0]; i++)
        if (ext_equal(dot, formats[i].ext)) {
            *f = &formats[i];
            return KPHI_OK;
        }
    static const char *const exts[] = {".svg", ".png", ".pdf"};
    const char *near = kphi__closest(dot, exts, 3);
    if (near != NULL)
        return kphi_error_set(err, KPHI_EINPUT, path, none,
                              "unknown plot format '%s' (did you mean '%s'?); expected .svg, "
                              ".png or .pdf",
                              dot, near);
    return kphi_error_set(err, KPHI_EINPUT, path, none,
                          "unknown plot format '%s'; expected .svg, .png or .pdf", dot);
}

int kphi_plot_check_path(const char *path, kphi_error *err)
{
    const format_def *f;
    return pick_format(path, &f, err);
}

/* Is the device compiled into this PLplot and its driver installed? */
static int have_device(const char *name)
{
    const char *menu[128], *devs[128];
    const char **pm = menu, **pd = devs;
    int n = 128;
    plgDevs(&pm, &pd, &n);
    for (int i = 0; i < n; i++)
        if (devs[i] != NULL && strcmp(devs[i], name) == 0)
            return 1;
    return 0;
}

/* Draw c into the existing, empty file tmp with PLplot's device dev. */
static int render(const chart *c, const char *dev, const char *tmp, const char *path,
                  kphi_error *err)
{
    kphi_mark none = {0, 0};
    size_t room = at_least_one(c->nx); /* the longest polyline: a curve or a bed path */
    for (size_t k = 0; k < c->n_paths; k++)
        room = c->path_n[k] > room ? c->path_n[k] : room;
    PLFLT *xs = malloc(2 * room * sizeof *xs);
    if (xs == NULL)
        return kphi_error_set(err, KPHI_ENOMEM, NULL, none, "out of memory for the plot");
    PLFLT *ys = xs + room;

    PLINT caller = 0, strm = -1;
    plgstrm(&caller);
    plmkstrm(&strm);
    if (strm < 0) {
        plsstrm(caller);
        free(xs);
        return kphi_error_set(err, KPHI_EFAILED, path, none,
                              "the plotting library has no free stream");
    }
    PLINT code = 0;
    char msg[2048] = "";
    plsError(&code, msg);
    plsdev(dev);
    plsfnam(tmp);
    plspage(0.0, 0.0, PAGE_W, PAGE_H, 0, 0);
    plscmap0n(COL_SERIES + MAX_CURVES);
    plscol0(COL_BG, 255, 255, 255);
    plscol0(COL_FG, 0, 0, 0);
    plscol0(COL_GRID, 222, 222, 222);
    plscol0(COL_REF, 110, 110, 110);
    for (size_t s = 0; s < c->n_colours && s < MAX_CURVES; s++) {
        int rgb[3];
        series_rgb(s, c->n_colours, rgb);
        plscol0(COL_SERIES + (PLINT)s, rgb[0], rgb[1], rgb[2]);
    }
    plinit();
    if (code == 0)
        chart_draw(c, xs, ys);
    plend1();
    plsstrm(caller);
    free(xs);
    if (code != 0) {
        char *nl;
        while ((nl = strchr(msg, '\n')) != NULL)
            *nl = ' ';
        return kphi_error_set(err, KPHI_EFAILED, path, none, "the plotting library failed:%s",
                              msg[0] != '\0' ? msg : " unknown error");
    }
    return KPHI_OK;
}

int kphi_plot_write(const kphi_plot_data *d, kphi_plot_kind kind, const char *path,
                    kphi_error *err)
{
    kphi_mark none = {0, 0};
    if (d == NULL || path == NULL || path[0] == '\0')
        return kphi_error_set(err, KPHI_EINPUT, "<command line>", none,
                              "no plot data or no plot file name");
    const format_def *f = NULL;
    int rc = pick_format(path, &f, err);
    if (rc != KPHI_OK)
        return rc;
    if (d->nT == 0 || d->nP == 0)
        return kphi_error_set(err, KPHI_EINPUT, path, none,
                              "nothing to plot: the sweep has no points");
    size_t n_series, step;
    rc = series_step(kind, d->nT, d->nP, d->nR, &n_series, &step, path, err);
    if (rc != KPHI_OK)
        return rc;

    chart c;
    memset(&c, 0, sizeof c);
    rc = chart_build(d, kind, step, path, &c, err);
    if (rc == KPHI_OK && chart_ranges(&c) != 0)
        rc = kphi_error_set(err, KPHI_EFAILED, path, none,
                            "nothing to plot: every point of the sweep failed");
    if (rc == KPHI_OK && !have_device(f->device))
        rc = kphi_error_set(err, KPHI_EFAILED, path, none,
                            "the plotting library has no '%s' device (Debian package %s)",
                            f->device, f->package);
    if (rc != KPHI_OK) {
        chart_free(&c);
        return rc;
    }

    /* a fresh file beside the target; PLplot opens it by name */
    size_t len = strlen(path);
    char *tmp = malloc(len + sizeof ".tmp-XXXXXX");
    if (tmp == NULL) {
        chart_free(&c);
        return kphi_error_set(err, KPHI_ENOMEM, NULL, none, "out of memory for the plot");
    }
    memcpy(tmp, path, len);
    memcpy(tmp + len, ".tmp-XXXXXX", sizeof ".tmp-XXXXXX");
    int fd = mkstemp(tmp);
    if (fd < 0) {
        rc = kphi_error_set(err, KPHI_EIO, path, none, "cannot write: %s", strerror(errno));
        free(tmp);
        chart_free(&c);
        return rc;
    }
    /* mkstemp makes the file 0600; give it the usual 0666 less the umask. umask() can
     * only be read by setting it, so it is set back at once. */
    mode_t mask = umask(022);
    umask(mask);
    if (fchmod(fd, (mode_t)(0666 & ~mask)) != 0 || close(fd) != 0) {
        rc = kphi_error_set(err, KPHI_EIO, path, none, "cannot write: %s", strerror(errno));
        unlink(tmp);
        free(tmp);
        chart_free(&c);
        return rc;
    }

    rc = render(&c, f->device, tmp, path, err);
    chart_free(&c);
    if (rc == KPHI_OK && !complete_file(tmp, f))
        rc = kphi_error_set(err, KPHI_EIO, path, none,
                            "cannot write: the chart file is incomplete (disk full?)");
    if (rc == KPHI_OK && rename(tmp, path) != 0)
        rc = kphi_error_set(err, KPHI_EIO, path, none, "cannot write: %s", strerror(errno));
    if (rc != KPHI_OK)
        unlink(tmp);
    free(tmp);
    return rc;
}
