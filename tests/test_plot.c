/* Tests of kphi plot: kind names, the default kind, and charts written as SVG, PNG and PDF.
 *
 * The grids below hold made-up, smooth values (conversion rising with P and falling with
 * T, as in ammonia synthesis) only so that there is something to draw; no value here is a
 * result to compare against. The checks are about files and errors: the right magic
 * bytes (PNG signature, ISO/IEC 15948:2004 sec. 5.2; "%PDF-" header, ISO 32000-1:2008
 * sec. 7.5.2; SVG is XML, W3C SVG 1.1 sec. 1.2), no temporary file left behind, nothing
 * printed, and the error codes of plot.h. */
#include "kphi/plot.h"

#include <dirent.h>
#include <fcntl.h>
#include <math.h>
#include <signal.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/resource.h>
#include <sys/stat.h>
#include <unistd.h>

#include <plplot.h>

#include "plot_internal.h"
#include "svgtext.h"
#include "testutil.h"

/* Under AddressSanitizer: fontconfig (used through pango by PLplot's cairo devices) keeps
 * font caches for the life of the process and never frees them. Those are not leaks of
 * ours, and they do not grow with the number of charts (checked by hand: 1, 5 and 20 charts
 * leave the same ~80 kB). Suppress the allocations made inside fontconfig, so that our own
 * leaks still show, and keep LeakSanitizer from printing the list of suppressions used. */
#if defined(__SANITIZE_ADDRESS__)
const char *__lsan_default_suppressions(void);
const char *__lsan_default_options(void);
const char *__lsan_default_suppressions(void)
{
    return "leak:libfontconfig.so\n";
}
const char *__lsan_default_options(void)
{
    return "print_suppressions=0";
}
#endif

/* ------------------------------------------------------------------ helpers */

static const double T3[] = {673.15, 698.15, 723.15};              /* K */
static const double P4[] = {5.07e6, 1.013e7, 2.026e7, 2.37e7};   /* Pa */

/* Made-up smooth values for point (T, P): see the file comment. */
static double made_up_X(double T, double P)
{
    return 0.6 * (1.0 - exp(-P / 1.2e7)) * exp(-(T - 673.15) / 250.0);
}

/* A grid nT x nP x nR filled with made-up values. */
static kphi_plot_data *grid(size_t nT, size_t nP, size_t nR)
{
    double T[64], P[64];
    ck_assert(nT <= 64 && nP <= 64 && nR <= 8);
    for (size_t i = 0; i < nT; i++)
        T[i] = 648.15 + 12.5 * (double)i;
    for (size_t i = 0; i < nP; i++)
        P[i] = 5.07e6 + 1.7e6 * (double)i;
    kphi_plot_data *d = kphi_plot_data_alloc(T, nT, P, nP, nR);
    ck_assert_ptr_nonnull(d);
    static const char *const eqs[] = {"N2 + 3 H2 = 2 NH3", "CO2 + H2 = CO + H2O",
                                      "CO + 2 H2 = CH3OH", "r4", "r5", "r6", "r7", "r8"};
    ck_assert_int_eq(kphi_plot_data_labels(d, "ammonia synthesis, Peng-Robinson", "N2", "NH3",
                                           "C", "bar", eqs),
                     KPHI_OK);
    for (size_t i = 0; i < nT; i++)
        for (size_t j = 0; j < nP; j++) {
            double X = made_up_X(T[i], P[j]);
            double lnK[8];
            for (size_t r = 0; r < nR; r++)
                lnK[r] = -0.013 * (double)(r + 1) * P[j] / 1e6;
            kphi_plot_data_set(d, i, j, X, 0.93 * X, lnK, X / (2.0 - X), 0.93 * X / (2.0 - X));
            kphi_plot_data_set_adiabatic(d, i, j, 0.41 * X, 0.39 * X, T[i] + 120.0 * X,
                                         T[i] + 112.0 * X);
            kphi_plot_data_set_loop(d, i, j, 1480.0 * X, 1466.0 * X, 1.3 / X, 1.45 / X);
            kphi_plot_data_set_flash(d, i, j, 0.02 + 0.1 * X);
        }
    return d;
}

typedef struct {
    char dir[64];
} tmpdir;

static void tmpdir_make(tmpdir *t)
{
    snprintf(t->dir, sizeof t->dir, "/tmp/kphi-test-plot-XXXXXX");
    ck_assert_ptr_nonnull(mkdtemp(t->dir));
}

/* Number of entries in the directory, "." and ".." left out. */
static int count_entries(const char *dir)
{
    DIR *dp = opendir(dir);
    ck_assert_ptr_nonnull(dp);
    int n = 0;
    struct dirent *e;
    while ((e = readdir(dp)) != NULL)
        if (strcmp(e->d_name, ".") != 0 && strcmp(e->d_name, "..") != 0)
            n++;
    closedir(dp);
    return n;
}

static void tmpdir_remove(tmpdir *t)
{
    DIR *dp = opendir(t->dir);
    if (dp == NULL)
        return;
    struct dirent *e;
    char path[512];
    while ((e = readdir(dp)) != NULL) {
        if (strcmp(e->d_name, ".") == 0 || strcmp(e->d_name, "..") == 0)
            continue;
        snprintf(path, sizeof path, "%s/%s", t->dir, e->d_name);
        if (unlink(path) != 0)
            rmdir(path);
    }
    closedir(dp);
    rmdir(t->dir);
}

/* First n bytes of a file into buf; returns the file size, -1 if it does not exist. */
static long file_head(const char *path, char *buf, size_t n)
{
    struct stat st;
    if (stat(path, &st) != 0)
        return -1;
    FILE *f = fopen(path, "rb");
    ck_assert_ptr_nonnull(f);
    memset(buf, 0, n);
    size_t got = fread(buf, 1, n, f);
    (void)got;
    fclose(f);
    return (long)st.st_size;
}

static int is_png(const char *head)
{
    return memcmp(head, "\x89PNG\r\n\x1a\n", 8) == 0;
}

static int is_svg(const char *head)
{
    return strncmp(head, "<?xml", 5) == 0 || strncmp(head, "<svg", 4) == 0;
}

static int is_pdf(const char *head)
{
    return strncmp(head, "%PDF-", 5) == 0;
}

/* Write a chart with stdout and stderr sent to a file; returns the status and stores how
 * many bytes were printed. */
static int write_quietly(const kphi_plot_data *d, kphi_plot_kind kind, const char *path,
                         kphi_error *err, long *printed)
{
    char log[] = "/tmp/kphi-test-plot-log-XXXXXX";
    int fd = mkstemp(log);
    ck_assert_int_ge(fd, 0);
    fflush(stdout);
    fflush(stderr);
    int out = dup(STDOUT_FILENO), errfd = dup(STDERR_FILENO);
    dup2(fd, STDOUT_FILENO);
    dup2(fd, STDERR_FILENO);
    int rc = kphi_plot_write(d, kind, path, err);
    fflush(stdout);
    fflush(stderr);
    dup2(out, STDOUT_FILENO);
    dup2(errfd, STDERR_FILENO);
    close(out);
    close(errfd);
    struct stat st;
    ck_assert_int_eq(fstat(fd, &st), 0);
    *printed = (long)st.st_size;
    close(fd);
    unlink(log);
    return rc;
}

/* -------------------------------------------------------------------- kinds */

START_TEST(kind_names_round_trip)
{
    for (int k = 0; k < KPHI_PLOT_N_KINDS; k++) {
        kphi_plot_kind kind = KPHI_PLOT_N_KINDS;
        kphi_error err;
        kphi_error_clear(&err);
        const char *name = kphi_plot_kind_name((kphi_plot_kind)k);
        ck_assert_int_eq(kphi_plot_kind_parse(name, &kind, &err), KPHI_OK);
        ck_assert_int_eq(kind, k);
    }
    ck_assert_str_eq(kphi_plot_kind_name(KPHI_PLOT_CONVERSION_P), "conversion-p");
    ck_assert_str_eq(kphi_plot_kind_name(KPHI_PLOT_CONVERSION_T), "conversion-t");
    ck_assert_str_eq(kphi_plot_kind_name(KPHI_PLOT_KPHI_P), "kphi-p");
    ck_assert_str_eq(kphi_plot_kind_name(KPHI_PLOT_CURVE), "curve");
    ck_assert_str_eq(kphi_plot_kind_name(KPHI_PLOT_ADIABATIC), "adiabatic");
}
END_TEST

START_TEST(kind_typo_did_you_mean)
{
    kphi_plot_kind kind = KPHI_PLOT_CURVE;
    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_plot_kind_parse("conversoin-t", &kind, &err), KPHI_EINPUT);
    ck_assert_int_eq(err.code, KPHI_EINPUT);
    ck_assert_str_eq(err.path, "<command line>");
    ck_assert_ptr_nonnull(strstr(err.msg, "'conversoin-t'"));
    ck_assert_ptr_nonnull(strstr(err.msg, "did you mean 'conversion-t'"));
    ck_assert_int_eq(kind, KPHI_PLOT_CURVE); /* untouched */

    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_plot_kind_parse("kphi_p", &kind, &err), KPHI_EINPUT);
    ck_assert_ptr_nonnull(strstr(err.msg, "did you mean 'kphi-p'"));
}
END_TEST

START_TEST(kind_unknown_lists_kinds)
{
    kphi_plot_kind kind;
    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_plot_kind_parse("histogram", &kind, &err), KPHI_EINPUT);
    ck_assert_ptr_null(strstr(err.msg, "did you mean"));
    ck_assert_ptr_nonnull(strstr(err.msg, "conversion-p"));
    ck_assert_ptr_nonnull(strstr(err.msg, "curve"));
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_plot_kind_parse("", &kind, &err), KPHI_EINPUT);
    ck_assert_int_eq(kphi_plot_kind_parse("curve", &kind, NULL), KPHI_OK); /* err may be NULL */
    ck_assert_int_eq(kind, KPHI_PLOT_CURVE);
}
END_TEST

START_TEST(default_kind_follows_the_longer_axis)
{
    ck_assert_int_eq(kphi_plot_default_kind(3, 15), KPHI_PLOT_CONVERSION_P);
    ck_assert_int_eq(kphi_plot_default_kind(21, 4), KPHI_PLOT_CONVERSION_T);
    ck_assert_int_eq(kphi_plot_default_kind(5, 5), KPHI_PLOT_CONVERSION_T);
    ck_assert_int_eq(kphi_plot_default_kind(1, 2), KPHI_PLOT_CONVERSION_P);
}
END_TEST

/* ------------------------------------------------------------------- output */

START_TEST(every_kind_as_svg_png_pdf)
{
    tmpdir t;
    tmpdir_make(&t);
    kphi_plot_data *d = grid(3, 9, 2);
    static const char *const exts[] = {"svg", "png", "pdf"};
    int written = 0;
    for (int k = 0; k < KPHI_PLOT_N_KINDS; k++)
        for (int e = 0; e < 3; e++) {
            char path[256], head[16];
            snprintf(path, sizeof path, "%s/%s.%s", t.dir, kphi_plot_kind_name((kphi_plot_kind)k),
                     exts[e]);
            kphi_error err;
            kphi_error_clear(&err);
            long printed = -1;
            int rc = write_quietly(d, (kphi_plot_kind)k, path, &err, &printed);
            ck_assert_msg(rc == KPHI_OK, "%s: %s", path, err.msg);
            ck_assert_msg(printed == 0, "%s: %ld bytes printed", path, printed);
            long size = file_head(path, head, sizeof head);
            ck_assert_msg(size > 1000, "%s: %ld bytes", path, size);
            if (e == 0)
                ck_assert_msg(is_svg(head), "%s is not SVG", path);
            else if (e == 1)
                ck_assert_msg(is_png(head), "%s is not PNG", path);
            else
                ck_assert_msg(is_pdf(head), "%s is not PDF", path);
            written++;
            ck_assert_int_eq(count_entries(t.dir), written); /* no temporary file left */
        }
    kphi_plot_data_free(d);
    tmpdir_remove(&t);
}
END_TEST

START_TEST(bed_paths_over_the_curve)
{
    /* two paths (real solid, ideal dashed) over the equilibrium curve; a third one and a
     * one-point path are refused; other kinds ignore the paths */
    tmpdir t;
    tmpdir_make(&t);
    kphi_plot_data *d = grid(21, 1, 1);
    const double T[6] = {653.15, 797.1, 673.15, 749.4, 683.15, 726.8};
    const double y[6] = {0.031, 0.126, 0.126, 0.183, 0.183, 0.218};
    const double yi[6] = {0.031, 0.123, 0.123, 0.177, 0.177, 0.208};
    ck_assert_int_eq(kphi_plot_data_add_path(d, T, y, 6, 0), KPHI_OK);
    ck_assert_int_eq(kphi_plot_data_add_path(d, T, y, 1, 1), KPHI_EINPUT);
    ck_assert_int_eq(kphi_plot_data_add_path(d, T, yi, 6, 1), KPHI_OK);
    ck_assert_int_eq(kphi_plot_data_add_path(d, T, yi, 6, 1), KPHI_EINPUT);
    const kphi_plot_kind kinds[2] = {KPHI_PLOT_CURVE, KPHI_PLOT_CONVERSION_T};
    for (int k = 0; k < 2; k++) {
        char path[256], head[16];
        snprintf(path, sizeof path, "%s/beds-%d.svg", t.dir, k);
        kphi_error err;
        kphi_error_clear(&err);
        long printed = -1;
        ck_assert_msg(write_quietly(d, kinds[k], path, &err, &printed) == KPHI_OK, "%s",
                      err.msg);
        ck_assert_int_eq(printed, 0);
        ck_assert_int_gt(file_head(path, head, sizeof head), 1000);
        ck_assert(is_svg(head));
    }
    kphi_plot_data_free(d);
    tmpdir_remove(&t);
}
END_TEST

START_TEST(svg_is_complete_xml)
{
    tmpdir t;
    tmpdir_make(&t);
    kphi_plot_data *d = grid(4, 6, 1);
    char path[256];
    snprintf(path, sizeof path, "%s/chart.SVG", t.dir); /* extension in capitals */
    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_plot_write(d, KPHI_PLOT_CONVERSION_P, path, &err), KPHI_OK);
    FILE *f = fopen(path, "rb");
    ck_assert_ptr_nonnull(f);
    char buf[4096];
    fseek(f, -(long)64, SEEK_END);
    size_t n = fread(buf, 1, 63, f);
    buf[n] = '\0';
    fclose(f);
    ck_assert_ptr_nonnull(strstr(buf, "</svg>")); /* the document was closed */
    kphi_plot_data_free(d);
    tmpdir_remove(&t);
}
END_TEST

/* SVG keeps its labels as text (PLplot's native svg device; the cairo one draws glyph
 * outlines): the title, axis labels and legend entries can be read back. */
START_TEST(svg_labels_are_text)
{
    tmpdir t;
    tmpdir_make(&t);
    kphi_plot_data *d = grid(4, 3, 1);
    char path[256];
    snprintf(path, sizeof path, "%s/chart.svg", t.dir);
    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_plot_write(d, KPHI_PLOT_CONVERSION_T, path, &err), KPHI_OK);
    char *texts = svg_texts(path);
    ck_assert_ptr_nonnull(texts);
    ck_assert_msg(strstr(texts, "equilibrium conversion vs temperature") != NULL, "%s", texts);
    ck_assert_msg(svg_has_line(texts, "real gas") && svg_has_line(texts, "ideal gas"), "%s",
                  texts);
    ck_assert_msg(svg_has_line(texts, "temperature (\xc2\xb0" "C)"), "%s", texts);
    ck_assert_msg(svg_has_line(texts, "N2 conversion (%)"), "%s", texts); /* 2 as subscript */
    free(texts);
    kphi_plot_data_free(d);
    tmpdir_remove(&t);
}
END_TEST

/* Labels that would overlap are moved up, each as little as it can; labels apart in x
 * stay where they are. */
START_TEST(labels_are_placed_apart)
{
    kphi__plot_label lab[4] = {
        {400.0, 12.6, 30.0, 1.0, 1, 0.0}, /* left of x = 400 */
        {405.0, 12.9, 30.0, 1.0, 1, 0.0}, /* overlaps the first: moved above it */
        {410.0, 13.0, 30.0, 1.0, 0, 0.0}, /* right of x = 410: apart from both in x */
        {365.0, 13.5, 10.0, 1.0, 1, 0.0}, /* left of 365: ends before 370, apart in x */
    };
    kphi__plot_place_labels(lab, 4);
    ck_assert_double_eq_tol(lab[0].y_at, 12.6, 1e-12);
    ck_assert_double_eq_tol(lab[1].y_at, 13.6, 1e-12);
    ck_assert_double_eq_tol(lab[2].y_at, 13.0, 1e-12);
    ck_assert_double_eq_tol(lab[3].y_at, 13.5, 1e-12);
    /* eight labels at one point: a stack, one height apart */
    kphi__plot_label many[8];
    for (int k = 0; k < 8; k++)
        many[k] = (kphi__plot_label){500.0, 20.0 + 0.01 * k, 25.0, 0.8, 0, 0.0};
    kphi__plot_place_labels(many, 8);
    for (int k = 1; k < 8; k++)
        ck_assert_double_eq_tol(many[k].y_at - many[k - 1].y_at, 0.8, 1e-12);
}
END_TEST

START_TEST(replaces_an_existing_file_with_usual_permissions)
{
    tmpdir t;
    tmpdir_make(&t);
    char path[256], head[16];
    snprintf(path, sizeof path, "%s/old.png", t.dir);
    FILE *f = fopen(path, "w");
    ck_assert_ptr_nonnull(f);
    fputs("not a picture\n", f);
    fclose(f);
    kphi_plot_data *d = grid(3, 5, 1);
    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_plot_write(d, KPHI_PLOT_CURVE, path, &err), KPHI_OK);
    ck_assert_int_gt(file_head(path, head, sizeof head), 1000);
    ck_assert(is_png(head));
    ck_assert_int_eq(count_entries(t.dir), 1);
    mode_t mask = umask(022);
    umask(mask);
    struct stat st;
    ck_assert_int_eq(stat(path, &st), 0);
    ck_assert_int_eq(st.st_mode & 0777, 0666 & ~mask); /* not mkstemp's 0600 */
    kphi_plot_data_free(d);
    tmpdir_remove(&t);
}
END_TEST

START_TEST(unknown_extension_is_input_error)
{
    tmpdir t;
    tmpdir_make(&t);
    kphi_plot_data *d = grid(3, 4, 1);
    char path[256];
    kphi_error err;

    snprintf(path, sizeof path, "%s/chart.jpg", t.dir);
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_plot_write(d, KPHI_PLOT_CONVERSION_P, path, &err), KPHI_EINPUT);
    ck_assert_ptr_nonnull(strstr(err.msg, "'.jpg'"));
    ck_assert_ptr_nonnull(strstr(err.msg, ".svg, .png or .pdf"));

    snprintf(path, sizeof path, "%s/chart.pnf", t.dir);
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_plot_write(d, KPHI_PLOT_CONVERSION_P, path, &err), KPHI_EINPUT);
    ck_assert_ptr_nonnull(strstr(err.msg, "did you mean '.png'"));

    snprintf(path, sizeof path, "%s/chart", t.dir);
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_plot_write(d, KPHI_PLOT_CONVERSION_P, path, &err), KPHI_EINPUT);
    ck_assert_ptr_nonnull(strstr(err.msg, "no extension"));

    snprintf(path, sizeof path, "%s/.svg", t.dir); /* a hidden file, not an extension */
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_plot_write(d, KPHI_PLOT_CONVERSION_P, path, &err), KPHI_EINPUT);

    ck_assert_int_eq(count_entries(t.dir), 0);
    kphi_plot_data_free(d);
    tmpdir_remove(&t);
}
END_TEST

/* More series than a chart shows are thinned to every k-th one, and the caption says so;
 * only a K_phi chart of more reactions than lines is refused. */
START_TEST(many_series_are_thinned)
{
    tmpdir t;
    tmpdir_make(&t);
    char path[256];
    snprintf(path, sizeof path, "%s/many.svg", t.dir);
    kphi_error err;

    /* 25 temperatures vs P: every 2nd, 13 lines (648.15 K = 375 °C, then 400, 425 ...) */
    kphi_plot_data *d = grid(25, 3, 1);
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_plot_write(d, KPHI_PLOT_CONVERSION_P, path, &err), KPHI_OK);
    char *s = svg_texts(path);
    ck_assert_ptr_nonnull(s);
    ck_assert_msg(svg_has_line(s, "every 2nd of 25 temperatures drawn"), "%s", s);
    ck_assert_msg(svg_has_line(s, "375 \xc2\xb0" "C") && svg_has_line(s, "400 \xc2\xb0" "C") &&
                      !svg_has_line(s, "387.5 \xc2\xb0" "C") &&
                      svg_has_line(s, "675 \xc2\xb0" "C"),
                  "%s", s);
    free(s);
    /* 3 lines vs T: all drawn, no note */
    ck_assert_int_eq(kphi_plot_write(d, KPHI_PLOT_CONVERSION_T, path, &err), KPHI_OK);
    s = svg_texts(path);
    ck_assert_msg(strstr(s, "every") == NULL, "%s", s);
    free(s);
    kphi_plot_data_free(d);

    /* 9 temperatures x 3 reactions = 27 K_phi lines: every 2nd temperature, 15 lines */
    d = grid(9, 4, 3);
    ck_assert_int_eq(kphi_plot_write(d, KPHI_PLOT_KPHI_P, path, &err), KPHI_OK);
    s = svg_texts(path);
    ck_assert_msg(svg_has_line(s, "every 2nd of 9 temperatures drawn"), "%s", s);
    free(s);
    kphi_plot_data_free(d);
    /* 64 pressures vs T: every 3rd */
    d = grid(2, 64, 1);
    ck_assert_int_eq(kphi_plot_write(d, KPHI_PLOT_CURVE, path, &err), KPHI_OK);
    s = svg_texts(path);
    ck_assert_msg(svg_has_line(s, "every 3rd of 64 pressures drawn"), "%s", s);
    free(s);
    kphi_plot_data_free(d);
    ck_assert_int_eq(err.code, KPHI_OK);

    /* what can be known before a sweep */
    ck_assert_int_eq(kphi_plot_check_grid(KPHI_PLOT_CONVERSION_P, 1000, 3, 1, &err), KPHI_OK);
    ck_assert_int_eq(kphi_plot_check_grid(KPHI_PLOT_ADIABATIC, 3, 1000, 1, &err), KPHI_OK);
    ck_assert_int_eq(kphi_plot_check_grid(KPHI_PLOT_KPHI_P, 1000, 3, 24, &err), KPHI_OK);
    ck_assert_int_eq(kphi_plot_check_grid(KPHI_PLOT_KPHI_P, 2, 3, 25, &err), KPHI_EINPUT);
    ck_assert_ptr_nonnull(strstr(err.msg, "25 reactions"));
    ck_assert_str_eq(err.path, "<command line>");
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_plot_check_grid(KPHI_PLOT_KPHI_P, 2, 3, 0, &err), KPHI_EINPUT);
    ck_assert_int_eq(count_entries(t.dir), 1);
    tmpdir_remove(&t);
}
END_TEST

START_TEST(unwritable_path_is_io_error)
{
    kphi_plot_data *d = grid(3, 4, 1);
    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_plot_write(d, KPHI_PLOT_CONVERSION_P, "/nonexistent-dir/x.svg", &err),
                     KPHI_EIO);
    ck_assert_str_eq(err.path, "/nonexistent-dir/x.svg");
    ck_assert_ptr_nonnull(strstr(err.msg, "cannot write"));
    ck_assert_int_ne(access("/nonexistent-dir/x.svg", F_OK), 0);

    /* the target is a directory: drawn, then the rename fails; the temporary goes too */
    tmpdir t;
    tmpdir_make(&t);
    char path[256];
    snprintf(path, sizeof path, "%s/taken.png", t.dir);
    ck_assert_int_eq(mkdir(path, 0755), 0);
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_plot_write(d, KPHI_PLOT_CONVERSION_P, path, &err), KPHI_EIO);
    ck_assert_int_eq(count_entries(t.dir), 1); /* only the directory */
    kphi_plot_data_free(d);
    tmpdir_remove(&t);
}
END_TEST

/* A full disk, played by a file-size limit: the cairo devices do not report the failed
 * writes, so the truncated file must be caught, reported and removed. */
START_TEST(truncated_output_is_io_error)
{
    tmpdir t;
    tmpdir_make(&t);
    kphi_plot_data *d = grid(3, 9, 1);
    struct rlimit old;
    ck_assert_int_eq(getrlimit(RLIMIT_FSIZE, &old), 0);
    void (*old_handler)(int) = signal(SIGXFSZ, SIG_IGN); /* else the process is killed */
    static const char *const exts[] = {"svg", "png", "pdf"};
    for (int e = 0; e < 3; e++) {
        char path[256];
        snprintf(path, sizeof path, "%s/full.%s", t.dir, exts[e]);
        struct rlimit small = old;
        small.rlim_cur = 4096; /* bytes; every chart here is larger */
        ck_assert_int_eq(setrlimit(RLIMIT_FSIZE, &small), 0);
        kphi_error err;
        kphi_error_clear(&err);
        int rc = kphi_plot_write(d, KPHI_PLOT_CONVERSION_P, path, &err);
        ck_assert_int_eq(setrlimit(RLIMIT_FSIZE, &old), 0);
        ck_assert_msg(rc == KPHI_EIO, "%s: status %d (%s)", path, rc, err.msg);
        ck_assert_ptr_nonnull(strstr(err.msg, "incomplete"));
        ck_assert_int_eq(count_entries(t.dir), 0);
    }
    signal(SIGXFSZ, old_handler);
    kphi_plot_data_free(d);
    tmpdir_remove(&t);
}
END_TEST

START_TEST(missing_points_break_lines)
{
    tmpdir t;
    tmpdir_make(&t);
    kphi_plot_data *d = kphi_plot_data_alloc(T3, 3, P4, 4, 2);
    ck_assert_ptr_nonnull(d);
    ck_assert_int_eq(kphi_plot_data_labels(d, NULL, NULL, NULL, NULL, NULL, NULL), KPHI_OK);
    double lnK[2] = {-0.21, NAN};
    /* T3[0]: only P4[0] and P4[2] (isolated points); T3[1]: P4[1..3]; T3[2]: nothing */
    kphi_plot_data_set(d, 0, 0, 0.173, 0.168, lnK, 0.095, 0.092);
    kphi_plot_data_set(d, 0, 2, 0.341, NAN, lnK, 0.206, NAN);
    for (size_t j = 1; j < 4; j++)
        kphi_plot_data_set(d, 1, j, made_up_X(T3[1], P4[j]), NAN, NULL, INFINITY, 0.11);
    kphi_plot_data_set(d, 7, 0, 0.5, 0.5, lnK, 0.5, 0.5); /* out of range: ignored */
    kphi_plot_data_set_adiabatic(d, 0, 0, 0.071, 0.069, 801.3, 798.6);
    kphi_plot_data_set_adiabatic(d, 1, 2, 0.093, NAN, 822.4, NAN);
    kphi_plot_data_set_adiabatic(d, 1, 3, INFINITY, 0.088, NAN, 815.2);
    kphi_plot_data_set_adiabatic(d, 0, 9, 0.5, 0.5, 800.0, 800.0); /* out of range */
    kphi_plot_data_set_loop(d, 0, 0, 1502.5, 1490.1, 2.7, 2.9);
    kphi_plot_data_set_loop(d, 1, 2, 1511.0, NAN, 2.5, NAN);
    kphi_plot_data_set_loop(d, 1, 3, INFINITY, 1500.4, NAN, 2.6);
    kphi_plot_data_set_loop(d, 9, 0, 1.0, 1.0, 1.0, 1.0); /* out of range */
    kphi_plot_data_set_flash(d, 0, 0, 0.051);
    kphi_plot_data_set_flash(d, 1, 1, 0.063);
    kphi_plot_data_set_flash(d, 1, 3, NAN);
    kphi_plot_data_set_flash(d, 0, 7, 0.5); /* out of range */
    for (int k = 0; k < KPHI_PLOT_N_KINDS; k++) {
        char path[256], head[16];
        snprintf(path, sizeof path, "%s/gaps-%d.png", t.dir, k);
        kphi_error err;
        kphi_error_clear(&err);
        long printed = -1;
        ck_assert_msg(write_quietly(d, (kphi_plot_kind)k, path, &err, &printed) == KPHI_OK,
                      "%s: %s", path, err.msg);
        ck_assert_int_eq(printed, 0);
        ck_assert_int_gt(file_head(path, head, sizeof head), 1000);
        ck_assert(is_png(head));
    }
    kphi_plot_data_free(d);
    tmpdir_remove(&t);
}
END_TEST

START_TEST(single_point_grid_draws_markers)
{
    tmpdir t;
    tmpdir_make(&t);
    kphi_plot_data *d = kphi_plot_data_alloc(T3 + 2, 1, P4 + 3, 1, 1);
    ck_assert_ptr_nonnull(d);
    double lnK = -0.137;
    kphi_plot_data_set(d, 0, 0, 0.287, 0.262, &lnK, 0.168, 0.151);
    kphi_plot_data_set_adiabatic(d, 0, 0, 0.113, 0.108, 806.2, 803.9);
    kphi_plot_data_set_loop(d, 0, 0, 1497.3, 1488.2, 2.71, 2.98);
    kphi_plot_data_set_flash(d, 0, 0, 0.0506);
    for (int k = 0; k < KPHI_PLOT_N_KINDS; k++) {
        char path[256], head[16];
        snprintf(path, sizeof path, "%s/one-%d.svg", t.dir, k);
        kphi_error err;
        kphi_error_clear(&err);
        ck_assert_msg(kphi_plot_write(d, (kphi_plot_kind)k, path, &err) == KPHI_OK, "%s",
                      err.msg);
        ck_assert_int_gt(file_head(path, head, sizeof head), 1000);
        ck_assert(is_svg(head));
    }
    kphi_plot_data_free(d);
    tmpdir_remove(&t);
}
END_TEST

START_TEST(nothing_to_draw_is_refused)
{
    tmpdir t;
    tmpdir_make(&t);
    char path[256];
    snprintf(path, sizeof path, "%s/empty.svg", t.dir);
    kphi_error err;

    kphi_plot_data *d = kphi_plot_data_alloc(T3, 3, P4, 4, 1); /* every point missing */
    ck_assert_ptr_nonnull(d);
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_plot_write(d, KPHI_PLOT_CONVERSION_T, path, &err), KPHI_EFAILED);
    ck_assert_ptr_nonnull(strstr(err.msg, "every point"));
    kphi_plot_data_free(d);

    d = kphi_plot_data_alloc(T3, 3, P4, 0, 1); /* no pressures */
    ck_assert_ptr_nonnull(d);
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_plot_write(d, KPHI_PLOT_CONVERSION_T, path, &err), KPHI_EINPUT);
    kphi_plot_data_free(d);

    d = kphi_plot_data_alloc(T3, 3, P4, 4, 1); /* no adiabatic outlets stored */
    ck_assert_ptr_nonnull(d);
    kphi_plot_data_set(d, 0, 0, 0.2, 0.19, NULL, 0.1, 0.09);
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_plot_write(d, KPHI_PLOT_ADIABATIC, path, &err), KPHI_EFAILED);
    ck_assert_ptr_nonnull(strstr(err.msg, "every point"));
    kphi_plot_data_free(d);

    d = kphi_plot_data_alloc(T3, 3, P4, 4, 0); /* no reactions: no K_phi */
    ck_assert_ptr_nonnull(d);
    kphi_plot_data_set(d, 0, 0, 0.2, 0.19, NULL, 0.1, 0.09);
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_plot_write(d, KPHI_PLOT_KPHI_P, path, &err), KPHI_EINPUT);
    kphi_plot_data_free(d);

    ck_assert_int_eq(count_entries(t.dir), 0);
    tmpdir_remove(&t);
    kphi_plot_data_free(NULL); /* allowed */
}
END_TEST

START_TEST(display_units)
{
    tmpdir t;
    tmpdir_make(&t);
    char path[256];
    snprintf(path, sizeof path, "%s/units.svg", t.dir);
    kphi_plot_data *d = grid(3, 4, 1);
    static const char *const T_units[] = {"K", "C", "F", "R", "degC"};
    static const char *const P_units[] = {"Pa", "kPa", "MPa", "bar", "atm", "psia", "psig"};
    for (size_t i = 0; i < 5; i++)
        for (size_t j = 0; j < 7; j++) {
            kphi_error err;
            kphi_error_clear(&err);
            ck_assert_int_eq(
                kphi_plot_data_labels(d, "t", "N2", "NH3", T_units[i], P_units[j], NULL),
                KPHI_OK);
            ck_assert_msg(kphi_plot_write(d, KPHI_PLOT_CONVERSION_P, path, &err) == KPHI_OK,
                          "%s %s: %s", T_units[i], P_units[j], err.msg);
        }
    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_plot_data_labels(d, "t", "N2", "NH3", "Celsius", "bar", NULL), KPHI_OK);
    ck_assert_int_eq(kphi_plot_write(d, KPHI_PLOT_CONVERSION_T, path, &err), KPHI_EINPUT);
    ck_assert_ptr_nonnull(strstr(err.msg, "'Celsius'"));
    ck_assert_int_eq(count_entries(t.dir), 1);
    kphi_plot_data_free(d);
    tmpdir_remove(&t);
}
END_TEST

START_TEST(awkward_texts_are_drawn)
{
    tmpdir t;
    tmpdir_make(&t);
    char path[256], head[16];
    snprintf(path, sizeof path, "%s/texts.png", t.dir);
    kphi_plot_data *d = grid(3, 4, 2);
    /* PLplot's escape character, bytes that are not UTF-8, a control character, and a
     * title far longer than the page */
    char longtitle[1200];
    memset(longtitle, 'w', sizeof longtitle - 1);
    longtitle[sizeof longtitle - 1] = '\0';
    longtitle[300] = '\xc3'; /* a two-byte character cut by the truncation, perhaps */
    longtitle[301] = '\xa9';
    static const char *const eqs[] = {"A#2 = B", "C\xff = \tD"};
    ck_assert_int_eq(kphi_plot_data_labels(d, "loop #2 \xe9t\xe9 #d", "N2#", "NH3\x80", "C",
                                           "bar", eqs),
                     KPHI_OK);
    for (int k = 0; k < KPHI_PLOT_N_KINDS; k++) {
        kphi_error err;
        kphi_error_clear(&err);
        long printed = -1;
        ck_assert_msg(write_quietly(d, (kphi_plot_kind)k, path, &err, &printed) == KPHI_OK,
                      "%s", err.msg);
        ck_assert_int_eq(printed, 0);
    }
    ck_assert_int_eq(kphi_plot_data_labels(d, longtitle, "N2", "NH3", "K", "MPa", eqs), KPHI_OK);
    kphi_error err;
    kphi_error_clear(&err);
    long printed = -1;
    ck_assert_msg(write_quietly(d, KPHI_PLOT_KPHI_P, path, &err, &printed) == KPHI_OK, "%s",
                  err.msg);
    ck_assert_int_eq(printed, 0);
    ck_assert_int_gt(file_head(path, head, sizeof head), 1000);
    ck_assert(is_png(head));
    kphi_plot_data_free(d);
    tmpdir_remove(&t);
}
END_TEST

/* PLplot streams are process-wide: the caller's current stream must be current again. */
START_TEST(callers_plplot_stream_is_restored)
{
    tmpdir t;
    tmpdir_make(&t);
    char path[256];
    snprintf(path, sizeof path, "%s/stream.png", t.dir);
    PLINT mine = -1, now = -1;
    plmkstrm(&mine);
    ck_assert_int_gt(mine, 0);
    kphi_plot_data *d = grid(3, 4, 1);
    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_plot_write(d, KPHI_PLOT_CONVERSION_P, path, &err), KPHI_OK);
    plgstrm(&now);
    ck_assert_int_eq(now, mine);
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_plot_write(d, KPHI_PLOT_CURVE, path, &err), KPHI_OK);
    plgstrm(&now);
    ck_assert_int_eq(now, mine);
    plend1(); /* ends the test's own stream only */
    kphi_plot_data_free(d);
    tmpdir_remove(&t);
}
END_TEST

/* ------------------------------------------------------------- loop diagram */

/* An invented loop in plain numbers (kmol/h, K, Pa), as the loop command hands it over. */
static void made_up_loop(kphi_plot_loop *lp)
{
    memset(lp, 0, sizeof *lp);
    static const double flow[7] = {7914.2, 29270.0, 25578.0, 21791.0, 3786.3, 435.82, 21355.0};
    static const double y[7] = {0.0, 0.0373, 0.187, 0.0511, 0.9692, 0.0511, 0.0511};
    for (int k = 0; k < KPHI_PLOT_LOOP_STREAMS; k++) {
        lp->stream[k].flow = flow[k];
        lp->stream[k].T = k == 1 ? NAN : k == 2 ? 733.15 : 268.15;
        lp->stream[k].P = k == 0 || k == 1 || k == 2 || k == 6 ? 195e5 : 190e5;
        lp->stream[k].y_product = y[k];
    }
    lp->title = "made-up loop";
    lp->caption = "ammonia synthesis; Peng-Robinson; loop 195 bar";
    lp->product = "NH3";
    lp->flow_unit = "kmol/h";
    lp->T_unit = "C";
    lp->P_unit = "bar";
    lp->converter_note[0] = "outlet 460 \xc2\xb0" "C";
    lp->cooler_note[0] = "removes 134 MW";
    lp->separator_note[1] = "190 bar";
    lp->purge_note[0] = "2 % of the vapour";
    lp->notes[0] = "key figures";
}

START_TEST(loop_diagram_in_every_format)
{
    tmpdir t;
    tmpdir_make(&t);
    kphi_plot_loop lp;
    made_up_loop(&lp);
    static const char *const exts[] = {"svg", "png", "pdf"};
    for (int at_sep = 0; at_sep < 2; at_sep++) {
        lp.makeup_at_separator = at_sep;
        for (int e = 0; e < 3; e++) {
            char path[256], head[16];
            snprintf(path, sizeof path, "%s/loop%d.%s", t.dir, at_sep, exts[e]);
            kphi_error err;
            kphi_error_clear(&err);
            ck_assert_msg(kphi_plot_loop_write(&lp, path, &err) == KPHI_OK, "%s", err.msg);
            ck_assert_int_gt(file_head(path, head, sizeof head), 1000);
            ck_assert(e == 0 ? is_svg(head) : e == 1 ? is_png(head) : is_pdf(head));
        }
    }
    /* table cells, read back from the SVG text */
    char path[256];
    snprintf(path, sizeof path, "%s/loop0.svg", t.dir);
    char *tx = svg_texts(path);
    ck_assert_ptr_nonnull(tx);
    ck_assert(svg_has_line(tx, "29270")); /* flows as whole kmol/h */
    ck_assert(svg_has_line(tx, "436"));
    ck_assert(svg_has_line(tx, "96.92")); /* mol % with two decimals */
    ck_assert(svg_has_line(tx, "460.0")); /* T in the display unit */
    ck_assert(svg_has_line(tx, "-"));     /* the converter inlet has no single T */
    ck_assert(svg_has_line(tx, "synthesis loop: made-up loop"));
    free(tx);
    tmpdir_remove(&t);
}
END_TEST

START_TEST(loop_diagram_bad_input)
{
    tmpdir t;
    tmpdir_make(&t);
    kphi_plot_loop lp;
    made_up_loop(&lp);
    char path[256];
    kphi_error err;
    snprintf(path, sizeof path, "%s/loop.jpg", t.dir);
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_plot_loop_write(&lp, path, &err), KPHI_EINPUT);
    snprintf(path, sizeof path, "%s/loop.svg", t.dir);
    lp.T_unit = "Celsius";
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_plot_loop_write(&lp, path, &err), KPHI_EINPUT);
    ck_assert_ptr_nonnull(strstr(err.msg, "'Celsius'"));
    lp.T_unit = "C";
    /* awkward texts are drawn: escapes, bytes that are not UTF-8, a very long note */
    char longnote[900];
    memset(longnote, 'w', sizeof longnote - 1);
    longnote[sizeof longnote - 1] = '\0';
    lp.title = "loop #2 \xe9t\xe9 #d";
    lp.product = "NH3\x80";
    lp.notes[1] = longnote;
    lp.cooler_note[1] = longnote;
    kphi_error_clear(&err);
    ck_assert_msg(kphi_plot_loop_write(&lp, path, &err) == KPHI_OK, "%s", err.msg);
    ck_assert_int_eq(count_entries(t.dir), 1); /* the refused ones left no file */
    tmpdir_remove(&t);
}
END_TEST

static Suite *plot_suite(void)
{
    Suite *s = suite_create("plot");
    TCase *tc = tcase_create("kinds");
    tcase_add_test(tc, kind_names_round_trip);
    tcase_add_test(tc, kind_typo_did_you_mean);
    tcase_add_test(tc, kind_unknown_lists_kinds);
    tcase_add_test(tc, default_kind_follows_the_longer_axis);
    suite_add_tcase(s, tc);

    tc = tcase_create("write");
    tcase_set_timeout(tc, 60);
    tcase_add_test(tc, every_kind_as_svg_png_pdf);
    tcase_add_test(tc, svg_is_complete_xml);
    tcase_add_test(tc, svg_labels_are_text);
    tcase_add_test(tc, labels_are_placed_apart);
    tcase_add_test(tc, bed_paths_over_the_curve);
    tcase_add_test(tc, replaces_an_existing_file_with_usual_permissions);
    tcase_add_test(tc, unknown_extension_is_input_error);
    tcase_add_test(tc, many_series_are_thinned);
    tcase_add_test(tc, unwritable_path_is_io_error);
    tcase_add_test(tc, truncated_output_is_io_error);
    tcase_add_test(tc, missing_points_break_lines);
    tcase_add_test(tc, single_point_grid_draws_markers);
    tcase_add_test(tc, nothing_to_draw_is_refused);
    tcase_add_test(tc, display_units);
    tcase_add_test(tc, awkward_texts_are_drawn);
    tcase_add_test(tc, callers_plplot_stream_is_restored);
    tcase_add_test(tc, loop_diagram_in_every_format);
    tcase_add_test(tc, loop_diagram_bad_input);
    suite_add_tcase(s, tc);
    return s;
}

KPHI_TEST_MAIN(plot_suite)
