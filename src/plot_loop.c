/* kphi plot, the loop diagram: a synthesis loop drawn as a flowsheet sketch, with a stream
 * table under it.
 *
 * Layout (page 800 x 560, world coordinates 0..100 across and 0..70 up, 8 units of the
 * page per world unit either way, so circles stay round):
 *
 *         +------(7)------[recycle compressor]<------+------(6)------> purge
 *         |                                          |(4)
 *   (1)-->o--(2)-->[converter]--(3)-->[cooler]---->[separator]
 *                                                    |(5)
 *                                                    v liquid product
 *
 * With the make-up joining at the separator, stream 1 rises into the cooled gas between
 * the cooler and the separator, and the recycle runs straight into the converter. Units are
 * plain rectangles (a pale fill, a thin outline, the name and up to two note lines);
 * streams are lines with arrowheads and a numbered tag; the product stream is drawn in a
 * colour of its own. Under the sketch a table gives, per stream, the flow, T, P and the
 * product's mole fraction, and under that up to three lines of key figures. Everything
 * shown is computed elsewhere; this file converts T and P to the display units
 * (kphi_units_temperature_to(), kphi_units_pressure_to()) and places text. */
#include "plot_internal.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include <plplot.h>

#include "kphi/units.h"

/* colour slots (after the chart's fixed ones) */
enum { COL_STREAM = KPHI__COL_SERIES, COL_FILL, COL_PRODUCT, COL_EDGE, N_COLOURS = 4 };

#define MAIN_Y 45.0   /* the converter line */
#define TOP_Y 56.5    /* vapour, purge and recycle */
#define TAG_R 1.55    /* numbered tag radius */
#define ARROW 1.5     /* arrowhead length */

typedef struct {
    double x0, y0, x1, y1;
} box;

/* The units' boxes. */
static const box CONVERTER = {17.5, 38.5, 35.0, 51.5};
static const box COOLER = {41.5, 40.5, 57.0, 49.5};
static const box SEPARATOR = {65.5, 36.5, 78.5, 52.0};
static const box COMPRESSOR = {37.0, 53.5, 60.0, 59.5};
#define MIX_X 11.0
#define JOIN_X 60.5   /* make-up at the separator: where it joins */
#define SEP_X 72.0    /* the separator's axis */

typedef struct {
    const kphi_plot_loop *lp;
    char T_label[32];  /* "°C" */
    const char *Tu, *Pu;
} loop_draw;

/* ------------------------------------------------------------------ shapes */

static void set_colour(int slot)
{
    plcol0(slot);
}

static void line2(double xa, double ya, double xb, double yb)
{
    PLFLT x[2] = {xa, xb}, y[2] = {ya, yb};
    plline(2, x, y);
}

/* An arrowhead with its tip at (x, y), pointing along (dx, dy) (a unit vector). */
static void arrowhead(double x, double y, double dx, double dy)
{
    double nx = -dy, ny = dx, w = 0.45 * ARROW;
    PLFLT ax[3] = {x, x - ARROW * dx + w * nx, x - ARROW * dx - w * nx};
    PLFLT ay[3] = {y, y - ARROW * dy + w * ny, y - ARROW * dy - w * ny};
    plfill(3, ax, ay);
}

/* A stream: a polyline of n points, an arrowhead at its end. */
static void stream_path(const double *x, const double *y, size_t n, int colour)
{
    PLFLT px[8], py[8];
    for (size_t k = 0; k < n && k < 8; k++) {
        px[k] = x[k];
        py[k] = y[k];
    }
    set_colour(colour);
    plwidth(2.0);
    pllsty(1);
    /* stop the line where the arrowhead starts, so its tip stays sharp */
    double dx = px[n - 1] - px[n - 2], dy = py[n - 1] - py[n - 2];
    double len = sqrt(dx * dx + dy * dy);
    dx /= len;
    dy /= len;
    PLFLT tipx = px[n - 1], tipy = py[n - 1];
    px[n - 1] -= 0.8 * ARROW * dx;
    py[n - 1] -= 0.8 * ARROW * dy;
    plline((PLINT)n, px, py);
    plwidth(1.0);
    arrowhead(tipx, tipy, dx, dy);
}

/* A numbered tag on a stream: a white disc with the stream's colour around the number. */
static void tag(double x, double y, int number, int colour)
{
    set_colour(KPHI__COL_BG);
    plarc(x, y, TAG_R, TAG_R, 0.0, 360.0, 0.0, 1);
    set_colour(colour);
    plwidth(1.4);
    plarc(x, y, TAG_R, TAG_R, 0.0, 360.0, 0.0, 0);
    plwidth(1.0);
    char num[16];
    snprintf(num, sizeof num, "%d", number);
    set_colour(KPHI__COL_FG);
    plschr(0.0, 0.78);
    plptex(x, y - 0.1, 1.0, 0.0, 0.5, num);
    plschr(0.0, 1.0);
}

/* The scale (at most `scale` times the default height) at which text, already in
 * PLplot's form, is at most max_w world units wide: a sans font is about 0.8 character
 * heights wide per character of mixed text with digits (checked on the rendered PNG,
 * whose cairo text runs widest). */
static double fit_scale(const char *text, double scale, double max_w)
{
    double def_mm, ht_mm, w_mm, h_mm;
    kphi__plot_page_mm(&def_mm, &ht_mm, &w_mm, &h_mm);
    double per_mm = 100.0 / w_mm; /* world units per mm */
    size_t chars = 0;
    for (const unsigned char *p = (const unsigned char *)text; *p; p++)
        chars += (*p & 0xC0) != 0x80 && *p != '#'; /* UTF-8 characters, escapes roughly */
    double est = 0.8 * def_mm * scale * (double)chars * per_mm;
    return est > max_w ? scale * max_w / est : scale;
}

/* Text in PLplot's form at (x, y) (just 0 left, 0.5 centred, 1 right), at `scale` times
 * the default height, shrunk to at most max_w world units wide. */
static void fit_text(double x, double y, double just, double scale, const char *text,
                     double max_w)
{
    plschr(0.0, fit_scale(text, scale, max_w));
    plptex(x, y, 1.0, 0.0, just, text);
    plschr(0.0, 1.0);
}

/* User text into buf[n] in PLplot's form (escaped; chem: subscripted formulas). */
static const char *plain(char *buf, size_t n, const char *s, int chem)
{
    kphi__plot_textbuf b = {buf, n, 0};
    buf[0] = '\0';
    kphi__plot_tb_user(&b, s, chem);
    return buf;
}

/* A small text at (x, y): just 0 left, 0.5 centred, 1 right; user text escaped; at most
 * max_w world units wide. */
static void text_at(double x, double y, double just, double scale, const char *s, int chem,
                    double max_w)
{
    if (s == NULL || s[0] == '\0')
        return;
    char buf[512];
    fit_text(x, y, just, scale, plain(buf, sizeof buf, s, chem), max_w);
}

/* A unit: a filled rectangle with its name and up to two note lines, centred, at the
 * scales name_sc and note_sc (common to all boxes, see box_scales()). */
static void unit_box(const box *b, const char *name, const char *const note[2], double name_sc,
                     double note_sc)
{
    PLFLT x[5] = {b->x0, b->x1, b->x1, b->x0, b->x0};
    PLFLT y[5] = {b->y0, b->y0, b->y1, b->y1, b->y0};
    set_colour(COL_FILL);
    plfill(4, x, y);
    set_colour(COL_EDGE);
    plwidth(1.3);
    plline(5, x, y);
    plwidth(1.0);
    set_colour(KPHI__COL_FG);
    double cx = 0.5 * (b->x0 + b->x1), cy = 0.5 * (b->y0 + b->y1);
    size_t nn = 0;
    for (size_t k = 0; k < 2; k++)
        nn += note != NULL && note[k] != NULL && note[k][0] != '\0';
    double top = cy + 1.55 * (double)nn - 0.45; /* the name's line */
    plschr(0.0, name_sc);
    plptex(cx, top, 1.0, 0.0, 0.5, name);
    plschr(0.0, note_sc);
    double yk = top;
    char buf[256];
    for (size_t k = 0; k < 2; k++)
        if (note != NULL && note[k] != NULL && note[k][0] != '\0') {
            yk -= 3.0;
            plptex(cx, yk, 1.0, 0.0, 0.5, plain(buf, sizeof buf, note[k], 0));
        }
    plschr(0.0, 1.0);
}

/* The units drawn as boxes. */
enum { N_UNITS = 4 };
static const box *const UNIT_BOX[N_UNITS] = {&CONVERTER, &COOLER, &SEPARATOR, &COMPRESSOR};
static const char *const UNIT_NAME[N_UNITS] = {"converter", "cooler", "separator",
                                               "recycle compressor"};

static const char *const *unit_notes(const kphi_plot_loop *lp, size_t u)
{
    switch (u) {
    case 0:
        return lp->converter_note;
    case 1:
        return lp->cooler_note;
    case 2:
        return lp->separator_note;
    default:
        return lp->compressor_note;
    }
}

/* One scale for every box name and one for every note line, the largest at which each
 * fits inside its box with a margin. */
static void box_scales(const kphi_plot_loop *lp, double *name_sc, double *note_sc)
{
    *name_sc = 0.92;
    *note_sc = 0.72;
    char buf[256];
    for (size_t u = 0; u < N_UNITS; u++) {
        double room = UNIT_BOX[u]->x1 - UNIT_BOX[u]->x0 - 2.0;
        *name_sc = fmin(*name_sc, fit_scale(UNIT_NAME[u], 0.92, room));
        const char *const *note = unit_notes(lp, u);
        for (size_t k = 0; k < 2; k++)
            if (note[k] != NULL && note[k][0] != '\0')
                *note_sc = fmin(*note_sc, fit_scale(plain(buf, sizeof buf, note[k], 0), 0.72,
                                                    room));
    }
    *note_sc = fmin(*note_sc, 0.8 * *name_sc);
}

/* ------------------------------------------------------------------ numbers */

/* A flow with three or more significant digits for a table cell (the thresholds allow for
 * rounding: 99.97 is "100", not "100.0"). */
static void format_flow(double v, char *buf, size_t n)
{
    double a = fabs(v);
    if (!isfinite(v))
        snprintf(buf, n, "-");
    else if (a >= 99.95)
        snprintf(buf, n, "%.0f", v);
    else if (a >= 9.995)
        snprintf(buf, n, "%.1f", v);
    else if (a >= 0.01 || a == 0.0)
        snprintf(buf, n, "%.2f", v);
    else
        snprintf(buf, n, "%.2g", v);
}

/* ------------------------------------------------------------------ the sketch */

static void draw_sketch(const kphi_plot_loop *lp)
{
    int at_sep = lp->makeup_at_separator != 0;
    double mid_conv = 0.5 * (CONVERTER.y0 + CONVERTER.y1);
    (void)mid_conv;
    /* 1 make-up */
    if (!at_sep) {
        double x[2] = {2.0, MIX_X - 0.6}, y[2] = {MAIN_Y, MAIN_Y};
        stream_path(x, y, 2, COL_STREAM);
        tag(5.2, MAIN_Y, 1, COL_STREAM);
        text_at(2.0, MAIN_Y + 2.4, 0.0, 0.78, "make-up", 0, 96.0);
        set_colour(COL_STREAM);
        plarc(MIX_X, MAIN_Y, 0.6, 0.6, 0.0, 360.0, 0.0, 1);
    } else {
        double x[2] = {JOIN_X, JOIN_X}, y[2] = {29.0, MAIN_Y - 0.5};
        stream_path(x, y, 2, COL_STREAM);
        tag(JOIN_X, 34.0, 1, COL_STREAM);
        text_at(JOIN_X - 1.0, 29.5, 1.0, 0.78, "make-up", 0, 96.0);
        set_colour(COL_STREAM);
        plarc(JOIN_X, MAIN_Y, 0.6, 0.6, 0.0, 360.0, 0.0, 1);
    }
    /* 7 recycle: from the split over the separator, left through the compressor, down
     * to the converter line */
    {
        double x[2] = {SEP_X, COMPRESSOR.x1}, y[2] = {TOP_Y, TOP_Y};
        set_colour(COL_STREAM);
        plwidth(2.0);
        line2(x[0], y[0], x[1], y[1]);
        double x2[4] = {COMPRESSOR.x0, MIX_X, MIX_X, at_sep ? MIX_X + 2.0 : MIX_X};
        double y2[4] = {TOP_Y, TOP_Y, MAIN_Y + (at_sep ? 0.0 : 0.6), MAIN_Y};
        if (at_sep) {
            /* straight into the converter: a corner, then along the main line */
            double x3[3] = {COMPRESSOR.x0, MIX_X, MIX_X}, y3[3] = {TOP_Y, TOP_Y, MAIN_Y};
            PLFLT px[3], py[3];
            for (int k = 0; k < 3; k++) {
                px[k] = x3[k];
                py[k] = y3[k];
            }
            plline(3, px, py);
        } else {
            stream_path(x2, y2, 3, COL_STREAM);
        }
        plwidth(1.0);
        tag(0.5 * (MIX_X + COMPRESSOR.x0), TOP_Y, 7, COL_STREAM);
        text_at(0.5 * (MIX_X + COMPRESSOR.x0), TOP_Y + 2.4, 0.5, 0.78, "recycle", 0, 96.0);
    }
    /* 2 converter inlet */
    {
        double x[2] = {MIX_X + (at_sep ? 0.0 : 0.6), CONVERTER.x0}, y[2] = {MAIN_Y, MAIN_Y};
        stream_path(x, y, 2, COL_STREAM);
        tag(0.5 * (MIX_X + CONVERTER.x0) + 0.3, MAIN_Y, 2, COL_STREAM);
    }
    /* 3 converter outlet */
    {
        double x[2] = {CONVERTER.x1, COOLER.x0}, y[2] = {MAIN_Y, MAIN_Y};
        stream_path(x, y, 2, COL_STREAM);
        tag(0.5 * (CONVERTER.x1 + COOLER.x0), MAIN_Y, 3, COL_STREAM);
    }
    /* the cooled gas into the separator */
    {
        double x[2] = {COOLER.x1, SEPARATOR.x0}, y[2] = {MAIN_Y, MAIN_Y};
        stream_path(x, y, 2, COL_STREAM);
    }
    /* 4 separator vapour, up to the split */
    {
        set_colour(COL_STREAM);
        plwidth(2.0);
        line2(SEP_X, SEPARATOR.y1, SEP_X, TOP_Y);
        plwidth(1.0);
        plarc(SEP_X, TOP_Y, 0.6, 0.6, 0.0, 360.0, 0.0, 1);
        tag(SEP_X, 0.5 * (SEPARATOR.y1 + TOP_Y), 4, COL_STREAM);
    }
    /* 6 purge */
    {
        double x[2] = {SEP_X + 0.6, 97.5}, y[2] = {TOP_Y, TOP_Y};
        stream_path(x, y, 2, COL_STREAM);
        tag(84.0, TOP_Y, 6, COL_STREAM);
        text_at(97.5, TOP_Y + 2.4, 1.0, 0.78, "purge", 0, 96.0);
        text_at(97.5, TOP_Y - 3.6, 1.0, 0.68, lp->purge_note[0], 0, 18.5);
        text_at(97.5, TOP_Y - 6.1, 1.0, 0.68, lp->purge_note[1], 0, 18.5);
    }
    /* 5 liquid product */
    {
        double x[2] = {SEP_X, SEP_X}, y[2] = {SEPARATOR.y0, 28.5};
        stream_path(x, y, 2, COL_PRODUCT);
        tag(SEP_X, 32.6, 5, COL_PRODUCT);
        char lab[96];
        kphi__plot_textbuf b = {lab, sizeof lab, 0};
        lab[0] = '\0';
        kphi__plot_tb_puts(&b, "liquid ");
        kphi__plot_tb_user(&b, lp->product != NULL ? lp->product : "product", 1);
        set_colour(KPHI__COL_FG);
        plschr(0.0, 0.78);
        plptex(SEP_X + 2.2, 29.2, 1.0, 0.0, 0.0, lab);
        plschr(0.0, 1.0);
    }
    /* the units, over the lines that end at them */
    double name_sc, note_sc;
    box_scales(lp, &name_sc, &note_sc);
    for (size_t u = 0; u < N_UNITS; u++)
        unit_box(UNIT_BOX[u], UNIT_NAME[u], unit_notes(lp, u), name_sc, note_sc);
}

/* ------------------------------------------------------------------ the table */

static void draw_table(const loop_draw *ld)
{
    const kphi_plot_loop *lp = ld->lp;
    static const char *const names[KPHI_PLOT_LOOP_STREAMS] = {
        "make-up", "conv. in", "conv. out", "sep. vapour", "liquid", "purge", "recycle"};
    const double x_lab = 2.0, x0 = 27.0, w = 10.2;
    const double y_head = 25.0, dy = 2.9;
    char buf[160], num[48];
    /* header: number tags and names */
    for (int k = 0; k < KPHI_PLOT_LOOP_STREAMS; k++) {
        double cx = x0 + w * (k + 0.5);
        tag(cx, y_head + 0.2, k + 1, k == 4 ? COL_PRODUCT : COL_STREAM);
        set_colour(KPHI__COL_FG);
        plschr(0.0, 0.72);
        plptex(cx, y_head - 3.4, 1.0, 0.0, 0.5, names[k]);
        plschr(0.0, 1.0);
    }
    set_colour(KPHI__COL_GRID);
    plwidth(0.8);
    line2(x_lab, y_head - 4.7, x0 + 7 * w, y_head - 4.7);
    plwidth(1.0);
    /* rows: flow, T, P, product */
    for (int row = 0; row < 4; row++) {
        double y = y_head - 4.7 - dy * (row + 1) + 0.7;
        kphi__plot_textbuf b = {buf, sizeof buf, 0};
        buf[0] = '\0';
        switch (row) {
        case 0:
            kphi__plot_tb_puts(&b, "flow, ");
            kphi__plot_tb_user(&b, lp->flow_unit != NULL ? lp->flow_unit : "mol/s", 0);
            break;
        case 1:
            kphi__plot_tb_puts(&b, "T, ");
            kphi__plot_tb_puts(&b, ld->T_label);
            break;
        case 2:
            kphi__plot_tb_puts(&b, "P, ");
            kphi__plot_tb_user(&b, ld->Pu, 0);
            break;
        default:
            kphi__plot_tb_user(&b, lp->product != NULL ? lp->product : "product", 1);
            kphi__plot_tb_puts(&b, ", mol %");
            break;
        }
        set_colour(KPHI__COL_FG);
        plschr(0.0, 0.74);
        plptex(x_lab, y, 1.0, 0.0, 0.0, buf);
        for (int k = 0; k < KPHI_PLOT_LOOP_STREAMS; k++) {
            const kphi_plot_loop_stream *st = &lp->stream[k];
            double v;
            switch (row) {
            case 0:
                format_flow(st->flow, num, sizeof num);
                break;
            case 1:
                if (isfinite(st->T) && kphi_units_temperature_to(st->T, ld->Tu, &v) == KPHI_OK)
                    snprintf(num, sizeof num, "%.1f", v);
                else
                    snprintf(num, sizeof num, "-");
                break;
            case 2:
                if (isfinite(st->P) && kphi_units_pressure_to(st->P, ld->Pu, &v) == KPHI_OK)
                    kphi__plot_format_value(v, num, sizeof num);
                else
                    snprintf(num, sizeof num, "-");
                break;
            default:
                if (isfinite(st->y_product))
                    snprintf(num, sizeof num, "%.2f", 100.0 * st->y_product);
                else
                    snprintf(num, sizeof num, "-");
                break;
            }
            plptex(x0 + w * (k + 0.5), y, 1.0, 0.0, 0.5, num);
        }
        plschr(0.0, 1.0);
    }
    /* key figures under the table, all at the size the longest allows */
    double y = y_head - 4.7 - dy * 4 - 2.3, sc = 0.72;
    char note[3][512];
    for (size_t k = 0; k < 3; k++)
        if (lp->notes[k] != NULL && lp->notes[k][0] != '\0')
            sc = fmin(sc, fit_scale(plain(note[k], sizeof note[k], lp->notes[k], 0), 0.72, 96.0));
    set_colour(KPHI__COL_FG);
    plschr(0.0, sc);
    for (size_t k = 0; k < 3; k++)
        if (lp->notes[k] != NULL && lp->notes[k][0] != '\0') {
            plptex(x_lab, y, 1.0, 0.0, 0.0, note[k]);
            y -= 2.45;
        }
    plschr(0.0, 1.0);
}

static void draw_loop(void *ctx)
{
    const loop_draw *ld = ctx;
    const kphi_plot_loop *lp = ld->lp;
    plscol0(COL_STREAM, 38, 70, 125);
    plscol0(COL_FILL, 236, 241, 247);
    plscol0(COL_PRODUCT, 165, 15, 21);
    plscol0(COL_EDGE, 60, 60, 60);
    pladv(0);
    plvpor(0.0, 1.0, 0.0, 1.0);
    plwind(0.0, 100.0, 0.0, 70.0);
    plschr(0.0, 1.0);
    draw_sketch(lp);
    draw_table(ld);
    /* title and caption, left-aligned at the top */
    set_colour(KPHI__COL_FG);
    char buf[512];
    kphi__plot_textbuf b = {buf, sizeof buf, 0};
    buf[0] = '\0';
    kphi__plot_tb_puts(&b, "synthesis loop");
    if (lp->title != NULL && lp->title[0] != '\0') {
        kphi__plot_tb_puts(&b, ": ");
        kphi__plot_tb_user(&b, lp->title, 0);
    }
    fit_text(2.0, 66.3, 0.0, 1.1, buf, 96.0);
    text_at(2.0, 62.9, 0.0, 0.78, lp->caption, 0, 96.0);
}

int kphi_plot_loop_write(const kphi_plot_loop *lp, const char *path, kphi_error *err)
{
    kphi_mark none = {0, 0};
    if (lp == NULL || path == NULL || path[0] == '\0')
        return kphi_error_set(err, KPHI_EINPUT, "<command line>", none,
                              "no loop data or no plot file name");
    int rc = kphi_plot_check_path(path, err);
    if (rc != KPHI_OK)
        return rc;
    loop_draw ld;
    memset(&ld, 0, sizeof ld);
    ld.lp = lp;
    ld.Tu = lp->T_unit != NULL && lp->T_unit[0] != '\0' ? lp->T_unit : "K";
    ld.Pu = lp->P_unit != NULL && lp->P_unit[0] != '\0' ? lp->P_unit : "bar";
    double probe;
    if (kphi_units_temperature_to(300.0, ld.Tu, &probe) != KPHI_OK)
        return kphi_error_set(err, KPHI_EINPUT, path, none,
                              "unknown temperature unit '%s' for the plot; expected K, C, F or R",
                              ld.Tu);
    if (kphi_units_pressure_to(1e5, ld.Pu, &probe) != KPHI_OK)
        return kphi_error_set(err, KPHI_EINPUT, path, none,
                              "unknown pressure unit '%s' for the plot", ld.Pu);
    kphi__plot_T_unit_label(ld.Tu, ld.T_label, sizeof ld.T_label);
    return kphi__plot_output(path, draw_loop, &ld, 0, err);
}
