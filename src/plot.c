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
 * P, with the outlet temperature in a second panel). Over the equilibrium curve, paths of
 * beds in series may be drawn in the foreground colour (kphi_plot_data_add_path()), inlet
 * and outlet temperatures labelled, and the solved point marked. Real gas is drawn solid
 * and ideal gas dashed (or left out). A grid with more series than fit is drawn with
 * every k-th one, which the caption says. Colours run in order of the swept value, from blue (lowest) to dark red
 * (highest). A missing point (NaN) breaks its line; a point with no drawable neighbour is
 * drawn as a marker (filled circle real gas, open circle ideal gas; one shape per reaction
 * for K_phi), which is how a grid with a single x value is shown. The pressure axis is
 * logarithmic when the pressures span a factor of 20 or more. Page: 800 x 560 (pixels for
 * PNG, points for SVG and PDF). At most 24 colour/style series (KPHI__PLOT_MAX_CURVES).
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
 * This file holds the kinds, the data and the output; the chart (layout, lines, panels,
 * legends, drawing) is in src/plot_chart.c and the label texts (PLplot escapes,
 * subscripts, valid UTF-8, number formats, label placement) in src/plot_text.c, declared
 * in src/plot_internal.h. */
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

#define PAGE_W 800    /* page size: pixels for PNG, points for SVG and PDF */
#define PAGE_H 560


/* ------------------------------------------------------------------ kinds */

static const char *const kind_names[KPHI_PLOT_N_KINDS] = {
    "conversion-p", "conversion-t", "kphi-p", "curve", "adiabatic", "loop", "separator"};

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
                          "kphi-p, curve, adiabatic, loop or separator",
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
    d->Ta_real = malloc(npt * sizeof(double));
    d->Ta_ideal = malloc(npt * sizeof(double));
    d->lp_real = malloc(npt * sizeof(double));
    d->lp_ideal = malloc(npt * sizeof(double));
    d->rr_real = malloc(npt * sizeof(double));
    d->rr_ideal = malloc(npt * sizeof(double));
    d->y_vap = malloc(npt * sizeof(double));
    d->lnKphi = malloc(npt * nR1 * sizeof(double));
    d->equations = calloc(nR1, sizeof *d->equations);
    if (d->T == NULL || d->P == NULL || d->X_real == NULL || d->X_ideal == NULL ||
        d->y_real == NULL || d->y_ideal == NULL || d->Xa_real == NULL || d->Xa_ideal == NULL ||
        d->Ta_real == NULL || d->Ta_ideal == NULL || d->lp_real == NULL || d->lp_ideal == NULL ||
        d->rr_real == NULL || d->rr_ideal == NULL || d->y_vap == NULL ||
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
            d->Xa_ideal[k] = d->Ta_real[k] = d->Ta_ideal[k] = d->lp_real[k] = d->lp_ideal[k] =
                d->rr_real[k] = d->rr_ideal[k] = d->y_vap[k] = NAN;
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
    free(d->Ta_real);
    free(d->Ta_ideal);
    free(d->lp_real);
    free(d->lp_ideal);
    free(d->rr_real);
    free(d->rr_ideal);
    free(d->y_vap);
    free(d->loop_unit);
    free(d->heading);
    free(d->caption);
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
                                  double X_out_ideal, double T_out_real, double T_out_ideal)
{
    if (d == NULL || iT >= d->nT || iP >= d->nP)
        return;
    size_t k = iT * d->nP + iP;
    d->Xa_real[k] = X_out_real;
    d->Xa_ideal[k] = X_out_ideal;
    d->Ta_real[k] = T_out_real;
    d->Ta_ideal[k] = T_out_ideal;
}

void kphi_plot_data_set_loop(kphi_plot_data *d, size_t iT, size_t iP, double product_real,
                             double product_ideal, double recycle_real, double recycle_ideal)
{
    if (d == NULL || iT >= d->nT || iP >= d->nP)
        return;
    size_t k = iT * d->nP + iP;
    d->lp_real[k] = product_real;
    d->lp_ideal[k] = product_ideal;
    d->rr_real[k] = recycle_real;
    d->rr_ideal[k] = recycle_ideal;
}

int kphi_plot_data_loop_unit(kphi_plot_data *d, const char *unit)
{
    return set_text(&d->loop_unit, unit) == 0 ? KPHI_OK : KPHI_ENOMEM;
}

void kphi_plot_data_set_flash(kphi_plot_data *d, size_t iT, size_t iP, double y_vapour)
{
    if (d == NULL || iT >= d->nT || iP >= d->nP)
        return;
    d->y_vap[iT * d->nP + iP] = y_vapour;
}

int kphi_plot_data_series_heading(kphi_plot_data *d, const char *heading)
{
    return set_text(&d->heading, heading) == 0 ? KPHI_OK : KPHI_ENOMEM;
}

int kphi_plot_data_caption(kphi_plot_data *d, const char *caption)
{
    return set_text(&d->caption, caption) == 0 ? KPHI_OK : KPHI_ENOMEM;
}

void kphi_plot_data_show_ideal(kphi_plot_data *d, int show)
{
    if (d != NULL)
        d->hide_ideal = !show;
}

void kphi_plot_data_set_point(kphi_plot_data *d, double T, double y_real, double y_ideal)
{
    if (d == NULL)
        return;
    d->has_point = 1;
    d->point_T = T;
    d->point_y[0] = y_real;
    d->point_y[1] = y_ideal;
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

/* Draw with draw(ctx) into the existing, empty file tmp with PLplot's device dev, n_colours
 * series colours set up in the colour map. */
static int render(kphi__plot_draw_fn draw, void *ctx, size_t n_colours, const char *dev,
                  const char *tmp, const char *path, kphi_error *err)
{
    kphi_mark none = {0, 0};
    PLINT caller = 0, strm = -1;
    plgstrm(&caller);
    plmkstrm(&strm);
    if (strm < 0) {
        plsstrm(caller);
        return kphi_error_set(err, KPHI_EFAILED, path, none,
                              "the plotting library has no free stream");
    }
    PLINT code = 0;
    char msg[2048] = "";
    plsError(&code, msg);
    plsdev(dev);
    plsfnam(tmp);
    plspage(0.0, 0.0, PAGE_W, PAGE_H, 0, 0);
    plscmap0n(KPHI__COL_SERIES + KPHI__PLOT_MAX_CURVES);
    plscol0(KPHI__COL_BG, 255, 255, 255);
    plscol0(KPHI__COL_FG, 0, 0, 0);
    plscol0(KPHI__COL_GRID, 222, 222, 222);
    plscol0(KPHI__COL_REF, 110, 110, 110);
    for (size_t s = 0; s < n_colours && s < KPHI__PLOT_MAX_CURVES; s++) {
        int rgb[3];
        kphi__plot_series_rgb(s, n_colours, rgb);
        plscol0(KPHI__COL_SERIES + (PLINT)s, rgb[0], rgb[1], rgb[2]);
    }
    plinit();
    if (code == 0)
        draw(ctx);
    plend1();
    plsstrm(caller);
    if (code != 0) {
        char *nl;
        while ((nl = strchr(msg, '\n')) != NULL)
            *nl = ' ';
        return kphi_error_set(err, KPHI_EFAILED, path, none, "the plotting library failed:%s",
                              msg[0] != '\0' ? msg : " unknown error");
    }
    return KPHI_OK;
}

void kphi__plot_page_mm(double *def_mm, double *cur_mm, double *width_mm, double *height_mm)
{
    PLFLT def, cur, xmin_mm, xmax_mm, ymin_mm, ymax_mm;
    plgchr(&def, &cur);
    plgspa(&xmin_mm, &xmax_mm, &ymin_mm, &ymax_mm);
    *def_mm = def;
    *cur_mm = cur;
    *width_mm = xmax_mm - xmin_mm;
    *height_mm = ymax_mm - ymin_mm;
}

int kphi__plot_output(const char *path, kphi__plot_draw_fn draw, void *ctx, size_t n_colours,
                      kphi_error *err)
{
    kphi_mark none = {0, 0};
    const format_def *f = NULL;
    int rc = pick_format(path, &f, err);
    if (rc != KPHI_OK)
        return rc;
    if (!have_device(f->device))
        return kphi_error_set(err, KPHI_EFAILED, path, none,
                              "the plotting library has no '%s' device (Debian package %s)",
                              f->device, f->package);

    /* a fresh file beside the target; PLplot opens it by name */
    size_t len = strlen(path);
    char *tmp = malloc(len + sizeof ".tmp-XXXXXX");
    if (tmp == NULL)
        return kphi_error_set(err, KPHI_ENOMEM, NULL, none, "out of memory for the plot");
    memcpy(tmp, path, len);
    memcpy(tmp + len, ".tmp-XXXXXX", sizeof ".tmp-XXXXXX");
    int fd = mkstemp(tmp);
    if (fd < 0) {
        rc = kphi_error_set(err, KPHI_EIO, path, none, "cannot write: %s", strerror(errno));
        free(tmp);
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
        return rc;
    }

    rc = render(draw, ctx, n_colours, f->device, tmp, path, err);
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

/* What a chart's drawing needs: the chart and room for its longest polyline. */
typedef struct {
    const kphi__plot_chart *c;
    PLFLT *xs, *ys;
} chart_draw;

static void draw_chart(void *ctx)
{
    chart_draw *cd = ctx;
    kphi__plot_chart_draw(cd->c, cd->xs, cd->ys);
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
    rc = kphi__plot_series_step(kind, d->nT, d->nP, d->nR, &n_series, &step, path, err);
    if (rc != KPHI_OK)
        return rc;

    kphi__plot_chart c;
    memset(&c, 0, sizeof c);
    rc = kphi__plot_chart_build(d, kind, step, path, &c, err);
    if (rc == KPHI_OK && kphi__plot_chart_ranges(&c) != 0)
        rc = kphi_error_set(err, KPHI_EFAILED, path, none,
                            "nothing to plot: every point of the sweep failed");
    PLFLT *xs = NULL;
    size_t room = kphi__plot_chart_room(&c);
    if (rc == KPHI_OK) {
        xs = malloc(2 * room * sizeof *xs);
        if (xs == NULL)
            rc = kphi_error_set(err, KPHI_ENOMEM, NULL, none, "out of memory for the plot");
    }
    if (rc == KPHI_OK) {
        chart_draw cd = {&c, xs, xs + room};
        rc = kphi__plot_output(path, draw_chart, &cd, c.n_colours, err);
    }
    free(xs);
    kphi__plot_chart_free(&c);
    return rc;
}
