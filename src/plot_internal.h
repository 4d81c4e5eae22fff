/* Internal: what the three sources of the plot module share: src/plot.c (kinds, data,
 * output through PLplot), src/plot_chart.c (chart layout and drawing) and src/plot_text.c
 * (the texts handed to PLplot, label placement). Not part of the public API. */
#ifndef KPHI_PLOT_INTERNAL_H
#define KPHI_PLOT_INTERNAL_H

#include <stddef.h>

#include "kphi/error.h"
#include "kphi/plot.h"

#define KPHI__PLOT_MAX_CURVES 24 /* distinct colour/style series a chart may draw */

/* cmap0 slots: background, foreground (axes, text), grid, reference line, then series. */
enum { KPHI__COL_BG = 0, KPHI__COL_FG, KPHI__COL_GRID, KPHI__COL_REF, KPHI__COL_SERIES };


/* A fixed-size text buffer that truncates quietly (labels are short). Set it up as
 * {buffer, size, 0} with buffer[0] = '\0'; the text stays terminated and never splits an
 * escape or a UTF-8 character. */
typedef struct {
    char *s;
    size_t n, len;
} kphi__plot_textbuf;

/* Append one character of our own text. */
void kphi__plot_tb_putc(kphi__plot_textbuf *b, char c);
/* Append our own text (which may hold PLplot escapes and UTF-8) as one group. */
void kphi__plot_tb_puts(kphi__plot_textbuf *b, const char *s);
/* Append user text: '#' becomes "##", control characters and bytes that are not UTF-8
 * become '?'; with chem set, digits after a letter or ')' become subscripts
 * ("NH3" -> "NH#d3#u"). s may be NULL (nothing appended). */
void kphi__plot_tb_user(kphi__plot_textbuf *b, const char *s, int chem);
/* Shortest of %.0f .. %.3f that shows v to 1e-6 relative, else %.4g, into buf[n]. */
void kphi__plot_format_value(double v, char *buf, size_t n);
/* Decimals (0 to 3) that show every one of v[n] to 1e-6 relative, so that a legend
 * rounds all its values alike ("150", "200", "250"; "148.987", "198.987"); -1 when some
 * value needs more (then each is shown with %.4g). */
int kphi__plot_common_decimals(const double v[], size_t n);
/* v with dec decimals (kphi__plot_common_decimals()), or %.4g when dec < 0. */
void kphi__plot_format_fixed(double v, int dec, char *buf, size_t n);
/* Display form of a temperature unit name into buf[n]: "C", "degC", "°C" -> "°C";
 * "K" -> "K"; anything else unchanged. */
void kphi__plot_T_unit_label(const char *unit, char *buf, size_t n);

struct kphi_plot_data {
    size_t nT, nP, nR;
    double *T, *P;              /* K, Pa */
    double *X_real, *X_ideal;   /* [iT * nP + iP], fractions */
    double *y_real, *y_ideal;   /* [iT * nP + iP], mole fractions */
    double *Xa_real, *Xa_ideal; /* [iT * nP + iP], adiabatic outlet conversion, fractions */
    double *Ta_real, *Ta_ideal; /* [iT * nP + iP], adiabatic outlet temperature, K */
    double *lp_real, *lp_ideal; /* [iT * nP + iP], loop product rate, in loop_unit */
    double *rr_real, *rr_ideal; /* [iT * nP + iP], loop recycle ratio */
    double *y_vap;              /* [iT * nP + iP], product mole fraction in the vapour */
    int hide_ideal;             /* draw the real gas only */
    int has_point;              /* a solved point marked on the curve */
    double point_T, point_y[2]; /* K; mole fractions, real and ideal */
    size_t n_paths;             /* paths over the equilibrium curve (beds in series) */
    double *path_T[2], *path_y[2]; /* K, mole fractions */
    size_t path_n[2];
    int path_ideal[2];
    double *lnKphi;             /* [(iT * nP + iP) * nR + j] */
    char *title, *conversion, *product, *T_unit, *P_unit, *caption, *loop_unit, *heading;
    char **equations; /* nR strings or NULL each */
};

/* One line to draw: y over the chart's x values, NaN where missing. */
typedef struct {
    double *y;
    int colour; /* series number, 0-based */
    int style;  /* pllsty number: 1 solid, else dashed */
    int marker; /* index into the markers: 0 real gas, 1 ideal gas, or the reaction */
} kphi__plot_line;

/* A panel: its lines, y label and range. */
typedef struct {
    kphi__plot_line *lines;
    size_t n_lines;
    char ylabel[128];
    double ymin, ymax;
    int ref_one; /* grey line at y = 1 (K_phi of an ideal gas) */
} kphi__plot_panel;

/* A chart ready to draw: texts, x values, one or two panels (stacked, sharing x) and
 * legend entries; bed paths and the solved point belong to the first panel. */
typedef struct {
    size_t nx, n_colours, n_styles, n_panels;
    double *x; /* display units (log10 of them on a log axis) */
    kphi__plot_panel panel[2];
    size_t n_paths; /* bed paths (curve kind only), display units */
    double *path_x[2], *path_y[2];
    size_t path_n[2];
    int path_ideal[2];
    int has_point;           /* the solved point (curve kind only), display units */
    double point_x, point_y[2];
    int hide_ideal;
    char T_label[32];        /* the temperature unit as shown: "°C" */
    int log_x;               /* pressure axis in decades */
    char title[512], xlabel[128];
    char caption[512];       /* the line under the title */
    char colour_text[KPHI__PLOT_MAX_CURVES][64];
    char heading[64];        /* over the colour legend; "" for none */
    char style_text[KPHI__PLOT_MAX_CURVES][160];
    int style_of[KPHI__PLOT_MAX_CURVES], marker_of[KPHI__PLOT_MAX_CURVES];
    double xmin, xmax;
} kphi__plot_chart;

/* In src/plot.c: the output. */

/* Draws on the current, initialised PLplot stream. */
typedef void (*kphi__plot_draw_fn)(void *ctx);
/* Draw with draw(ctx) into path (.svg, .png, .pdf by extension) with n_colours series
 * colours in the colour map from KPHI__COL_SERIES on: a fresh PLplot stream on a temporary
 * file beside path, checked complete and renamed over it, so a failure leaves no partial
 * file. Errors as kphi_plot_write(). Main thread only. */
int kphi__plot_output(const char *path, kphi__plot_draw_fn draw, void *ctx, size_t n_colours,
                      kphi_error *err);
/* The current stream's character height at scale 1 (plschr's default) and as now scaled,
 * and its page's width and height, all in mm. */
void kphi__plot_page_mm(double *def_mm, double *cur_mm, double *width_mm, double *height_mm);

/* In src/plot_chart.c. */

/* The colour series of a kind (one per T or P) and the step k: every k-th is drawn so that
 * the lines stay within KPHI__PLOT_MAX_CURVES. KPHI_EINPUT at path for a K_phi chart of no
 * or too many reactions. */
int kphi__plot_series_step(kphi_plot_kind kind, size_t nT, size_t nP, size_t nR,
                           size_t *n_series, size_t *step, const char *path, kphi_error *err);
/* Fill c (zeroed by the caller) from d; c is freed by kphi__plot_chart_free() either way. */
int kphi__plot_chart_build(const kphi_plot_data *d, kphi_plot_kind kind, size_t step,
                           const char *path, kphi__plot_chart *c, kphi_error *err);
/* Axis ranges; -1 when no point can be drawn. */
int kphi__plot_chart_ranges(kphi__plot_chart *c);
void kphi__plot_chart_free(kphi__plot_chart *c);
/* Colour of series s of n (0-255 RGB). */
void kphi__plot_series_rgb(size_t s, size_t n, int rgb[3]);
/* Draw the chart on the current, initialised PLplot stream; xs and ys hold room for the
 * longest polyline (kphi__plot_chart_room()). */
void kphi__plot_chart_draw(const kphi__plot_chart *c, double *xs, double *ys);
size_t kphi__plot_chart_room(const kphi__plot_chart *c);

/* In src/plot_text.c: label placement. */

/* A label near a point of the plot, in world coordinates: anchor (x, y), drawn left of it
 * (right-justified) when left is set, else right of it; w and h its width and height.
 * kphi__plot_place_labels() sets y_at, where it is drawn. */
typedef struct {
    double x, y, w, h;
    int left;
    double y_at;
} kphi__plot_label;

/* Move labels up, in order of their anchors' height, until no two overlap; each stays as
 * close to its anchor as that allows. */
void kphi__plot_place_labels(kphi__plot_label lab[], size_t n);

#endif /* KPHI_PLOT_INTERNAL_H */
