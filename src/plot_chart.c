/* kphi plot, the chart: from the data of a sweep to what is drawn (series, lines, panels,
 * legends, texts, ranges) and the drawing itself with PLplot, on a stream src/plot.c has
 * opened for the output file.
 *
 * Layout: a title, under it a caption line (what the chart was drawn at: reaction set,
 * feed, EOS, pressure; and a note when the series were thinned to every k-th one), the
 * plot, legends at the right (line styles, then one entry per colour series). The
 * adiabatic kind stacks two panels over one x axis: the conversion at the bed outlet
 * (top) and the outlet temperature (bottom). Over the equilibrium curve, bed paths are
 * drawn with the inlet and outlet temperature of every bed beside its points; the labels
 * are moved apart where they would overlap (kphi__plot_place_labels(), src/plot_text.c),
 * with a thin leader line back to a point a label had to leave. The solved point of
 * `solve --plot` is a diamond (filled: real gas, open: ideal gas) labelled with its
 * values. The ideal gas may be left out (kphi_plot_data_show_ideal()).
 *
 * Quantities shown (all computed elsewhere; this file only converts units for display):
 * conversion and mole fractions in percent (100 X, 100 y); K_phi = exp(ln K_phi),
 * dimensionless, with the ideal gas's K_phi = 1 as a grey line (every phi_i = 1 in an ideal
 * gas: Denbigh 1981, "The Principles of Chemical Equilibrium", 4th ed., ch. 4; from
 * memory); temperatures in the case's unit through kphi_units_temperature_to(), pressures
 * through kphi_units_pressure_to(). */
#include "plot_internal.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <plplot.h>

#include "kphi/units.h"

#define MAX_CURVES KPHI__PLOT_MAX_CURVES
#define DASHED 3          /* pllsty number for the ideal gas */
#define MARKER_SCALE 0.65 /* marker size, relative to the default character height */
#define LABEL_SCALE 0.8   /* bed and point labels, relative to the default character height */

/* Markers (UTF-8): ● ○ ■ □ ▲ △ ◆ ◇ */
static const char *const markers[8] = {"\xe2\x97\x8f", "\xe2\x97\x8b", "\xe2\x96\xa0",
                                       "\xe2\x96\xa1", "\xe2\x96\xb2", "\xe2\x96\xb3",
                                       "\xe2\x97\x86", "\xe2\x97\x87"};
enum { MARK_POINT_REAL = 6, MARK_POINT_IDEAL = 7 };

static size_t at_least_one(size_t n)
{
    return n > 0 ? n : 1;
}

void kphi__plot_chart_free(kphi__plot_chart *c)
{
    for (size_t p = 0; p < 2; p++) {
        if (c->panel[p].lines != NULL)
            for (size_t i = 0; i < c->panel[p].n_lines; i++)
                free(c->panel[p].lines[i].y);
        free(c->panel[p].lines);
    }
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

int kphi__plot_series_step(kphi_plot_kind kind, size_t nT, size_t nP, size_t nR,
                           size_t *n_series, size_t *step, const char *path, kphi_error *err)
{
    kphi_mark none = {0, 0};
    size_t per = 1, n;
    switch (kind) {
    case KPHI_PLOT_CONVERSION_P:
    case KPHI_PLOT_LOOP:
        n = nT;
        break;
    case KPHI_PLOT_CONVERSION_T:
    case KPHI_PLOT_SEPARATOR:
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
    return kphi__plot_series_step(kind, nT, nP, n_reactions, &n, &k, "<command line>", err);
}

/* "2nd", "3rd", "11th", "21st" */
static const char *ordinal_suffix(size_t k)
{
    if (k % 100 >= 11 && k % 100 <= 13)
        return "th";
    return k % 10 == 1 ? "st" : k % 10 == 2 ? "nd" : k % 10 == 3 ? "rd" : "th";
}

static int add_line(kphi__plot_panel *p, size_t nx, int colour, int style, int marker)
{
    kphi__plot_line *l = &p->lines[p->n_lines];
    l->y = malloc(nx * sizeof *l->y);
    if (l->y == NULL)
        return -1;
    l->colour = colour;
    l->style = style;
    l->marker = marker;
    p->n_lines++;
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

/* The value of line r (0 real gas, 1 ideal gas, or the reaction for K_phi) of panel p at
 * grid point k. Temperatures (the adiabatic outlet) in the display unit Tu. */
static double point_value(const kphi_plot_data *d, kphi_plot_kind kind, size_t p, size_t r,
                          size_t k, const char *Tu)
{
    double v;
    switch (kind) {
    case KPHI_PLOT_CONVERSION_P:
    case KPHI_PLOT_CONVERSION_T:
        return 100.0 * (r == 0 ? d->X_real[k] : d->X_ideal[k]);
    case KPHI_PLOT_KPHI_P:
        return exp(d->lnKphi[k * d->nR + r]);
    case KPHI_PLOT_ADIABATIC:
        if (p == 0)
            return 100.0 * (r == 0 ? d->Xa_real[k] : d->Xa_ideal[k]);
        v = r == 0 ? d->Ta_real[k] : d->Ta_ideal[k];
        return isfinite(v) && kphi_units_temperature_to(v, Tu, &v) == KPHI_OK ? v : NAN;
    case KPHI_PLOT_LOOP:
        if (p == 0)
            return r == 0 ? d->lp_real[k] : d->lp_ideal[k];
        return r == 0 ? d->rr_real[k] : d->rr_ideal[k];
    case KPHI_PLOT_SEPARATOR:
        return 100.0 * d->y_vap[k];
    default:
        return 100.0 * (r == 0 ? d->y_real[k] : d->y_ideal[k]);
    }
}

int kphi__plot_chart_build(const kphi_plot_data *d, kphi_plot_kind kind, size_t step,
                           const char *path, kphi__plot_chart *c, kphi_error *err)
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
    char *Tlab = c->T_label;
    kphi__plot_T_unit_label(Tu, Tlab, sizeof c->T_label);
    c->hide_ideal = d->hide_ideal;

    int x_is_P = kind == KPHI_PLOT_CONVERSION_P || kind == KPHI_PLOT_KPHI_P ||
                 kind == KPHI_PLOT_LOOP;
    size_t nx = x_is_P ? d->nP : d->nT;
    size_t ns_all = x_is_P ? d->nT : d->nP;
    size_t ns = (ns_all + step - 1) / step; /* colour series drawn: grid index s * step */
    size_t nr = kind == KPHI_PLOT_KPHI_P ? d->nR : (d->hide_ideal ? 1 : 2);
    if (kind == KPHI_PLOT_SEPARATOR)
        nr = 1; /* a flash has no ideal-gas counterpart */
    c->nx = nx;
    c->n_colours = ns;
    c->n_panels = kind == KPHI_PLOT_ADIABATIC || kind == KPHI_PLOT_LOOP ? 2 : 1;
    c->x = malloc(at_least_one(nx) * sizeof *c->x);
    int ok = c->x != NULL;
    for (size_t p = 0; p < c->n_panels; p++) {
        c->panel[p].lines = calloc(at_least_one(ns * nr), sizeof *c->panel[p].lines);
        ok = ok && c->panel[p].lines != NULL;
    }
    if (!ok)
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
    for (size_t s = 0; s < ns && s < MAX_CURVES; s++) {
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
    for (size_t p = 0; p < c->n_panels; p++)
        for (size_t s = 0; s < ns; s++)
            for (size_t r = 0; r < nr; r++) {
                int style = kind == KPHI_PLOT_KPHI_P ? reaction_style(r) : (r == 0 ? 1 : DASHED);
                int marker = kind == KPHI_PLOT_KPHI_P ? (int)(r % 8) : (int)r; /* real, ideal */
                if (add_line(&c->panel[p], at_least_one(nx), (int)s, style, marker) != 0)
                    return kphi_error_set(err, KPHI_ENOMEM, NULL, none,
                                          "out of memory for the plot");
                double *y = c->panel[p].lines[c->panel[p].n_lines - 1].y;
                for (size_t i = 0; i < nx; i++) {
                    size_t iT = x_is_P ? s * step : i, iP = x_is_P ? i : s * step;
                    y[i] = point_value(d, kind, p, r, iT * d->nP + iP, Tu);
                    if (!isfinite(y[i]))
                        y[i] = NAN;
                }
            }

    /* bed paths and the solved point over the equilibrium curve */
    for (size_t k = 0; kind == KPHI_PLOT_CURVE && k < d->n_paths; k++) {
        if (d->hide_ideal && d->path_ideal[k])
            continue;
        size_t n = d->path_n[k], m = c->n_paths;
        c->path_x[m] = malloc(n * sizeof(double));
        c->path_y[m] = malloc(n * sizeof(double));
        c->n_paths = m + 1;
        if (c->path_x[m] == NULL || c->path_y[m] == NULL)
            return kphi_error_set(err, KPHI_ENOMEM, NULL, none, "out of memory for the plot");
        for (size_t i = 0; i < n; i++) {
            if (kphi_units_temperature_to(d->path_T[k][i], Tu, &c->path_x[m][i]) != KPHI_OK)
                c->path_x[m][i] = NAN;
            c->path_y[m][i] = 100.0 * d->path_y[k][i];
        }
        c->path_n[m] = n;
        c->path_ideal[m] = d->path_ideal[k];
    }
    if (kind == KPHI_PLOT_CURVE && d->has_point &&
        kphi_units_temperature_to(d->point_T, Tu, &c->point_x) == KPHI_OK) {
        c->has_point = 1;
        c->point_y[0] = 100.0 * d->point_y[0];
        c->point_y[1] = d->hide_ideal ? NAN : 100.0 * d->point_y[1];
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
        c->panel[0].ref_one = !d->hide_ideal;
    } else if (kind == KPHI_PLOT_SEPARATOR) {
        c->n_styles = 0;
    } else {
        c->n_styles = d->hide_ideal ? 1 : 2;
        snprintf(c->style_text[0], sizeof c->style_text[0],
                 kind == KPHI_PLOT_LOOP ? "real-gas converter" : "real gas");
        snprintf(c->style_text[1], sizeof c->style_text[1],
                 kind == KPHI_PLOT_LOOP ? "ideal-gas converter" : "ideal gas");
        c->style_of[0] = 1;
        c->style_of[1] = DASHED;
        c->marker_of[0] = 0;
        c->marker_of[1] = 1;
    }

    /* axis texts */
    kphi__plot_textbuf xl = {c->xlabel, sizeof c->xlabel, 0};
    kphi__plot_textbuf yl = {c->panel[0].ylabel, sizeof c->panel[0].ylabel, 0};
    c->xlabel[0] = c->panel[0].ylabel[0] = c->panel[1].ylabel[0] = '\0';
    if (x_is_P) {
        kphi__plot_tb_puts(&xl, kind == KPHI_PLOT_LOOP ? "loop pressure (" : "pressure (");
        kphi__plot_tb_user(&xl, Pu, 0);
        kphi__plot_tb_puts(&xl, ")");
    } else {
        kphi__plot_tb_puts(&xl, kind == KPHI_PLOT_ADIABATIC    ? "bed inlet temperature ("
                                : kind == KPHI_PLOT_SEPARATOR ? "separator temperature ("
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
    case KPHI_PLOT_ADIABATIC: {
        label_with_species(&yl, d->conversion, "conversion (%)");
        kphi__plot_textbuf y2 = {c->panel[1].ylabel, sizeof c->panel[1].ylabel, 0};
        kphi__plot_tb_puts(&y2, "outlet T (");
        kphi__plot_tb_puts(&y2, Tlab);
        kphi__plot_tb_puts(&y2, ")");
        what = "adiabatic equilibrium bed outlet";
        break;
    }
    case KPHI_PLOT_LOOP: {
        label_with_species(&yl, d->product, "product (");
        kphi__plot_tb_user(&yl, d->loop_unit != NULL ? d->loop_unit : "mol/s", 0);
        kphi__plot_tb_puts(&yl, ")");
        kphi__plot_textbuf y2 = {c->panel[1].ylabel, sizeof c->panel[1].ylabel, 0};
        kphi__plot_tb_puts(&y2, "recycle ratio (mol/mol)");
        what = "loop production vs pressure";
        break;
    }
    case KPHI_PLOT_SEPARATOR:
        label_with_species(&yl, d->product, "in the vapour (mol %)");
        what = "product in the separator vapour";
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
    kphi__plot_textbuf tl = {c->title, sizeof c->title, 0};
    c->title[0] = '\0';
    kphi__plot_tb_puts(&tl, what);
    if (d->title != NULL && d->title[0] != '\0') {
        kphi__plot_tb_puts(&tl, ": ");
        kphi__plot_tb_user(&tl, d->title, 0);
    }
    kphi__plot_textbuf hb = {c->heading, sizeof c->heading, 0};
    c->heading[0] = '\0';
    kphi__plot_tb_user(&hb, d->heading, 0);
    kphi__plot_textbuf cb = {c->caption, sizeof c->caption, 0};
    c->caption[0] = '\0';
    kphi__plot_tb_user(&cb, d->caption, 0);
    if (step > 1) {
        char note[160];
        snprintf(note, sizeof note, "%severy %zu%s of %zu %s drawn", c->caption[0] ? "; " : "",
                 step, ordinal_suffix(step), ns_all, x_is_P ? "temperatures" : "pressures");
        kphi__plot_tb_puts(&cb, note);
    }
    return KPHI_OK;
}

int kphi__plot_chart_ranges(kphi__plot_chart *c)
{
    double xmin = INFINITY, xmax = -INFINITY;
    for (size_t i = 0; i < c->nx; i++)
        if (isfinite(c->x[i])) {
            xmin = fmin(xmin, c->x[i]);
            xmax = fmax(xmax, c->x[i]);
        }
    for (size_t p = 0; p < c->n_panels; p++) {
        kphi__plot_panel *pn = &c->panel[p];
        double ymin = INFINITY, ymax = -INFINITY;
        int any = 0;
        for (size_t l = 0; l < pn->n_lines; l++)
            for (size_t i = 0; i < c->nx; i++)
                if (isfinite(pn->lines[l].y[i]) && isfinite(c->x[i])) {
                    ymin = fmin(ymin, pn->lines[l].y[i]);
                    ymax = fmax(ymax, pn->lines[l].y[i]);
                    any = 1;
                }
        if (!any)
            return -1;
        for (size_t k = 0; p == 0 && k < c->n_paths; k++)
            for (size_t i = 0; i < c->path_n[k]; i++)
                if (isfinite(c->path_x[k][i]) && isfinite(c->path_y[k][i])) {
                    xmin = fmin(xmin, c->path_x[k][i]);
                    xmax = fmax(xmax, c->path_x[k][i]);
                    ymin = fmin(ymin, c->path_y[k][i]);
                    ymax = fmax(ymax, c->path_y[k][i]);
                }
        if (pn->ref_one) {
            ymin = fmin(ymin, 1.0);
            ymax = fmax(ymax, 1.0);
        }
        /* pad 6 % of the span; a single value gets +-10 % (or +-1) */
        double dy = ymax - ymin;
        if (dy <= 0.0)
            dy = fmax(fabs(ymin) * 0.2, 2.0);
        pn->ymin = ymin - (ymax > ymin ? 0.06 : 0.5) * dy;
        pn->ymax = ymax + (ymax > ymin ? (pn->ref_one ? 0.11 : 0.06) : 0.5) * dy;
        /* percentages and K_phi are not negative: keep the axis from starting below zero */
        if (ymin >= 0.0 && pn->ymin < 0.0)
            pn->ymin = 0.0;
    }
    c->log_x = xmin > 0.0 && xmax / xmin >= 20.0;
    if (c->log_x) {
        for (size_t i = 0; i < c->nx; i++)
            c->x[i] = log10(c->x[i]);
        xmin = log10(xmin);
        xmax = log10(xmax);
    }
    /* pad 3 % of the span; a single value gets +-10 % (or +-1) */
    double dx = xmax - xmin;
    if (dx <= 0.0)
        dx = fmax(fabs(xmin) * 0.2, c->log_x ? 0.2 : 2.0);
    c->xmin = xmin - (xmax > xmin ? 0.03 : 0.5) * dx;
    c->xmax = xmax + (xmax > xmin ? 0.03 : 0.5) * dx;
    return 0;
}

/* Colour of series s of n: evenly spaced along blue, teal, green, gold, orange, dark red. */
void kphi__plot_series_rgb(size_t s, size_t n, int rgb[3])
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

size_t kphi__plot_chart_room(const kphi__plot_chart *c)
{
    size_t room = at_least_one(c->nx); /* the longest polyline: a curve or a bed path */
    for (size_t k = 0; k < c->n_paths; k++)
        room = c->path_n[k] > room ? c->path_n[k] : room;
    return room;
}

/* Draw the polyline of one series: segments between consecutive drawable points, and a
 * marker where a point has no drawable neighbour. */
static void draw_line(const kphi__plot_chart *c, const kphi__plot_line *l, PLFLT *xs, PLFLT *ys)
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

/* Legends stand this far from the right edge (normalised subpage units): PLplot sizes
 * them with its own font metrics, and the cairo devices' text runs a little wider. */
#define LEGEND_X 0.03

/* Legend entries: n lines or markers with texts, drawn at the top right of the subpage,
 * y_off below its top (normalised subpage units), under a heading (a line of text
 * without a symbol) when heading is not NULL. Returns the width, sets *height. */
static double legend(size_t n, const char *const text_in[], const PLINT colour_in[],
                     const PLINT style_in[], const int marker_in[], int as_markers,
                     const char *heading, double y_off, double *height)
{
    PLINT opt[MAX_CURVES + 3], tcol[MAX_CURVES + 3], snum[MAX_CURVES + 3];
    PLINT colour[MAX_CURVES + 3], style[MAX_CURVES + 3];
    PLFLT lwid[MAX_CURVES + 3], sscale[MAX_CURVES + 3];
    const char *sym[MAX_CURVES + 3], *text[MAX_CURVES + 3];
    size_t h = heading != NULL && heading[0] != '\0';
    if (h) {
        opt[0] = PL_LEGEND_NONE;
        tcol[0] = KPHI__COL_FG;
        lwid[0] = 1.0;
        sscale[0] = MARKER_SCALE;
        snum[0] = 1;
        sym[0] = markers[0];
        colour[0] = KPHI__COL_FG;
        style[0] = 1;
        text[0] = heading;
    }
    for (size_t k = 0; k < n; k++) {
        opt[h + k] = as_markers ? PL_LEGEND_SYMBOL : PL_LEGEND_LINE;
        tcol[h + k] = KPHI__COL_FG;
        lwid[h + k] = 2.2;
        sscale[h + k] = MARKER_SCALE;
        snum[h + k] = 1;
        sym[h + k] = markers[marker_in[k]];
        colour[h + k] = colour_in[k];
        style[h + k] = style_in[k];
        text[h + k] = text_in[k];
    }
    n += h;
    /* up to 11 entries at full size; up to 17 closer together; then two columns */
    int two_cols = n > 17;
    double tscale = n > 11 ? 0.85 : 0.95, spacing = n > 11 ? 1.6 : 1.9;
    PLINT nrow = two_cols ? (PLINT)((n + 1) / 2) : (PLINT)n;
    PLFLT w = 0.0, ht = 0.0;
    pllegend(&w, &ht, PL_LEGEND_BACKGROUND,
             PL_POSITION_SUBPAGE | PL_POSITION_RIGHT | PL_POSITION_TOP | PL_POSITION_INSIDE,
             LEGEND_X, y_off, 0.06, KPHI__COL_BG, KPHI__COL_FG, 1, nrow, two_cols ? 2 : 1,
             (PLINT)n, opt, 0.7, tscale, spacing, 0.0, tcol, text, NULL, NULL, NULL, NULL,
             colour, style, lwid, colour, sscale, snum, sym);
    *height = ht;
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
#define VP_LEFT_WIDE 0.125 /* y numbers of 5 or more characters ("1500", "-0.25") */

/* The left edge of the plot: wider when some panel's y numbers run long. */
static double vp_left(const kphi__plot_chart *c)
{
    for (size_t p = 0; p < c->n_panels; p++)
        if (fabs(c->panel[p].ymax) >= 1000.0 || fabs(c->panel[p].ymin) >= 1000.0)
            return VP_LEFT_WIDE;
    return VP_LEFT;
}
#define VP_BOTTOM 0.12
#define VP_TOP 0.87
#define VP_SPLIT 0.495 /* two panels: the lower one ends here, the upper one starts 0.035 above */

/* A line of text above the viewport, left-aligned with it, `disp` default character
 * heights above its top, at `scale` times the default size, shrunk when it would run off
 * the page. */
static void top_text(const char *text, double scale, double disp, double left)
{
    double def_mm, ht_mm, w_mm, h_mm;
    kphi__plot_page_mm(&def_mm, &ht_mm, &w_mm, &h_mm);
    double avail = (1.0 - left - 0.015) * w_mm;
    /* width of a sans font, about 0.72 character heights per character of mostly
     * lower-case text (measured on the rendered PNG) */
    double est = 0.72 * def_mm * scale * (double)strlen(text); /* mm */
    double sc = est > avail ? scale * avail / est : scale;
    plschr(0.0, sc);
    plmtex("t", disp * scale / sc, 0.0, 0.0, text);
    plschr(0.0, 1.0);
}

/* A temperature label: "524 °C", or with a prefix, "bed 2 in 400 °C". */
static void temperature_label(char *buf, size_t n, const char *prefix, double T,
                              const char *unit)
{
    char num[32];
    kphi__plot_format_fixed(T, 0, num, sizeof num);
    snprintf(buf, n, "%s%s%s %s", prefix, prefix[0] ? " " : "", num, unit);
}

/* The labels over the equilibrium curve: inlet and outlet temperature of every bed on
 * the real-gas path (or the only path drawn), and the solved point; placed apart. */
static void draw_point_labels(const kphi__plot_chart *c, double right)
{
    enum { MAX_LABELS = 40 };
    kphi__plot_label lab[MAX_LABELS];
    char text[MAX_LABELS][128];
    size_t n = 0;
    /* world units per mm of the viewport, and the size of a label's characters */
    double def_mm, ht_mm, w_mm, h_mm;
    plschr(0.0, LABEL_SCALE);
    kphi__plot_page_mm(&def_mm, &ht_mm, &w_mm, &h_mm);
    double vw = (right - vp_left(c)) * w_mm;
    double vh = (VP_TOP - VP_BOTTOM) * h_mm;
    double wx = (c->xmax - c->xmin) / vw, wy = (c->panel[0].ymax - c->panel[0].ymin) / vh;
    double gap = 2.0 * wx; /* 2 mm between a point and its label */
    size_t p = 0;
    while (p < c->n_paths && c->path_ideal[p] && c->n_paths > 1)
        p++;
    for (size_t i = 0; p < c->n_paths && i < c->path_n[p] && n + 1 < MAX_LABELS; i++) {
        char prefix[32];
        snprintf(prefix, sizeof prefix, "bed %zu %s", i / 2 + 1, i % 2 == 0 ? "in" : "out");
        temperature_label(text[n], sizeof text[n], prefix, c->path_x[p][i], c->T_label);
        lab[n].x = c->path_x[p][i] + (i % 2 == 0 ? -gap : gap);
        lab[n].y = c->path_y[p][i];
        lab[n].left = i % 2 == 0;
        n++;
    }
    if (c->has_point && n < MAX_LABELS) {
        char num[32];
        temperature_label(text[n], sizeof text[n], "solved", c->point_x, c->T_label);
        kphi__plot_format_fixed(c->point_y[0], 1, num, sizeof num);
        size_t len = strlen(text[n]);
        snprintf(text[n] + len, sizeof text[n] - len, ": %s %%", num);
        lab[n].x = c->point_x + gap;
        lab[n].y = c->point_y[0];
        lab[n].left = 0;
        n++;
    }
    for (size_t k = 0; k < n; k++) {
        /* about 0.65 character heights per character of digits and short words */
        lab[k].w = 0.65 * ht_mm * (double)strlen(text[k]) * wx;
        lab[k].h = 1.35 * ht_mm * wy;
        /* a label that would leave the plot goes to the other side of its point */
        if (!lab[k].left && lab[k].x + lab[k].w > c->xmax) {
            lab[k].left = 1;
            lab[k].x -= 2.0 * gap;
            lab[k].y += 0.7 * lab[k].h; /* above the cooling line that leaves an outlet */
        } else if (lab[k].left && lab[k].x - lab[k].w < c->xmin) {
            lab[k].left = 0;
            lab[k].x += 2.0 * gap;
        }
    }
    kphi__plot_place_labels(lab, n);
    for (size_t k = 0; k < n; k++) {
        if (lab[k].y_at - lab[k].y > 0.6 * lab[k].h) { /* moved: a leader line back */
            PLFLT lx[2] = {lab[k].x + (lab[k].left ? gap : -gap), lab[k].x};
            PLFLT ly[2] = {lab[k].y, lab[k].y_at};
            plcol0(KPHI__COL_REF);
            plwidth(0.6);
            pllsty(1);
            plline(2, lx, ly);
            plcol0(KPHI__COL_FG);
        }
        plptex(lab[k].x, lab[k].y_at, 1.0, 0.0, lab[k].left ? 1.0 : 0.0, text[k]);
    }
    plschr(0.0, 1.0);
    plwidth(1.0);
}

/* The box, grid and y label of panel p in viewport [VP_LEFT, right] x [y0, y1]; x numbers
 * and the x label only on the lowest panel. */
static void panel_frame(const kphi__plot_chart *c, size_t p, double right, double y0, double y1)
{
    const kphi__plot_panel *pn = &c->panel[p];
    int lowest = p + 1 == c->n_panels;
    double left = vp_left(c);
    plvpor(left, right, y0, y1);
    plwind(c->xmin, c->xmax, pn->ymin, pn->ymax);
    plcol0(KPHI__COL_GRID);
    plwidth(0.6);
    pllsty(1);
    plbox(c->log_x ? "gl" : "g", 0.0, 0, "g", 0.0, 0);
    plcol0(KPHI__COL_FG);
    plwidth(1.0);
    plslabelfunc(log_label, NULL);
    const char *xopt = c->log_x ? (lowest ? "bcnstlo" : "bcstlo") : (lowest ? "bcnst" : "bcst");
    plbox(xopt, 0.0, 0, "bcnstv", 0.0, 0);
    plschr(0.0, c->n_panels > 1 ? 0.95 : 1.05);
    if (lowest)
        plmtex("b", c->n_panels > 1 ? 3.0 : 2.8, 0.5, 0.5, c->xlabel);
    plmtex("l", left > VP_LEFT ? 5.0 : 4.2, 0.5, 0.5, pn->ylabel);
    plschr(0.0, 1.0);
}

void kphi__plot_chart_draw(const kphi__plot_chart *c, PLFLT *xs, PLFLT *ys)
{
    int single_x = c->nx == 1; /* markers only: legends show markers too */
    pladv(0);
    plvpor(vp_left(c), 0.75, VP_BOTTOM, VP_TOP);
    plwind(c->xmin, c->xmax, c->panel[0].ymin, c->panel[0].ymax); /* pllegend needs one */
    plschr(0.0, 1.0);

    /* legends first, right of the plot: they decide its width. Line styles, then colours. */
    const char *text[MAX_CURVES + 2];
    PLINT colour[MAX_CURVES + 2], style[MAX_CURVES + 2];
    int marker[MAX_CURVES + 2];
    size_t n = 0;
    for (size_t s = 0; s < c->n_styles && n < MAX_CURVES; s++, n++) {
        text[n] = c->style_text[s];
        colour[n] = KPHI__COL_FG;
        style[n] = c->style_of[s];
        marker[n] = c->marker_of[s];
    }
    double w1 = 0.0, h1 = 0.0, w2 = 0.0, h2 = 0.0;
    if (n > 0)
        w1 = legend(n, text, colour, style, marker, single_x, NULL, 1.0 - VP_TOP, &h1);
    n = 0;
    for (size_t s = 0; s < c->n_colours && n < MAX_CURVES; s++, n++) {
        text[n] = c->colour_text[s];
        colour[n] = KPHI__COL_SERIES + (PLINT)s;
        style[n] = 1;
        marker[n] = 0;
    }
    w2 = legend(n, text, colour, style, marker, single_x, c->heading,
                1.0 - VP_TOP + h1 + (h1 > 0 ? 0.03 : 0), &h2);
    double right = 1.0 - LEGEND_X - fmax(w1, w2) - 0.05;
    if (right < 0.5)
        right = 0.5;

    for (size_t p = c->n_panels; p-- > 0;) {
        const kphi__plot_panel *pn = &c->panel[p];
        double y0 = VP_BOTTOM, y1 = VP_TOP;
        if (c->n_panels == 2) {
            y0 = p == 0 ? VP_SPLIT + 0.035 : VP_BOTTOM;
            y1 = p == 0 ? VP_TOP : VP_SPLIT;
        }
        panel_frame(c, p, right, y0, y1);
        if (pn->ref_one) {
            PLFLT rx[2] = {c->xmin, c->xmax}, ry[2] = {1.0, 1.0};
            plcol0(KPHI__COL_REF);
            plwidth(1.5);
            pllsty(2);
            plline(2, rx, ry);
            pllsty(1);
            /* labelled on the line, at the right, where real-gas lines are furthest from it */
            plschr(0.0, 0.9);
            plptex(c->xmax - 0.015 * (c->xmax - c->xmin),
                   1.0 + 0.035 * (pn->ymax - pn->ymin), 1.0, 0.0, 1.0,
                   "ideal gas: K#d\xcf\x86#u = 1");
            plschr(0.0, 1.0);
        }
        /* ideal gas (dashed) first so real-gas lines lie on top */
        for (int pass = 0; pass < 2; pass++)
            for (size_t l = 0; l < pn->n_lines; l++) {
                const kphi__plot_line *ln = &pn->lines[l];
                if ((pass == 0) != (ln->style != 1))
                    continue;
                plcol0(KPHI__COL_SERIES + ln->colour);
                plwidth(2.2);
                pllsty(ln->style);
                draw_line(c, ln, xs, ys);
            }
    }
    /* the first panel's window is current again (panels are drawn bottom up) */
    /* bed paths on top: inlet, outlet, cooled inlet, outlet ... */
    for (size_t k = 0; k < c->n_paths; k++) {
        size_t np = c->path_n[k];
        for (size_t i = 0; i < np; i++) {
            xs[i] = c->path_x[k][i];
            ys[i] = c->path_y[k][i];
        }
        plcol0(KPHI__COL_FG);
        plwidth(1.6);
        pllsty(c->path_ideal[k] ? DASHED : 1);
        plline((PLINT)np, xs, ys);
        plschr(0.0, MARKER_SCALE);
        plstring((PLINT)np, xs, ys, markers[c->path_ideal[k] ? 1 : 0]);
        plschr(0.0, 1.0);
    }
    if (c->has_point) { /* the solved point: diamonds, filled real gas, open ideal gas */
        plcol0(KPHI__COL_FG);
        plschr(0.0, 1.1);
        for (int m = 1; m >= 0; m--)
            if (isfinite(c->point_y[m])) {
                PLFLT px = c->point_x, py = c->point_y[m];
                plstring(1, &px, &py, markers[m == 0 ? MARK_POINT_REAL : MARK_POINT_IDEAL]);
            }
        plschr(0.0, 1.0);
    }
    if (c->n_paths > 0 || c->has_point)
        draw_point_labels(c, right);
    pllsty(1);
    plwidth(1.0);

    /* title and, under it, the caption, left-aligned over the plot */
    plcol0(KPHI__COL_FG);
    int has_caption = c->caption[0] != '\0';
    top_text(c->title, 1.15, has_caption ? 2.5 : 1.5, vp_left(c));
    if (has_caption)
        top_text(c->caption, 0.82, 1.0, vp_left(c));
}
