/* End-to-end tests of the charts the kphi program draws (sweep --plot, solve --plot):
 * what they say, read back from the SVG text (PLplot's native svg device writes labels as
 * text), and that a chart never costs the data. The program under test is $KPHI_BIN
 * (tests/run_tests.sh sets it), else bin/kphi. Cases are written into a temporary
 * directory and name the shipped reaction set by absolute path. */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include <unistd.h>

#include "svgtext.h"
#include "testutil.h"

static const char *kphi_bin(void)
{
    const char *b = getenv("KPHI_BIN");
    return b != NULL && b[0] != '\0' ? b : "bin/kphi";
}

typedef struct {
    char dir[64];
} tmpdir;

static void tmpdir_make(tmpdir *t)
{
    snprintf(t->dir, sizeof t->dir, "/tmp/kphi-test-charts-XXXXXX");
    ck_assert_ptr_nonnull(mkdtemp(t->dir));
}

static void tmpdir_remove(tmpdir *t)
{
    char cmd[128];
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", t->dir);
    ck_assert_int_eq(system(cmd), 0);
}

/* Run "kphi ARGS" through the shell with stdout and stderr to files in t; returns the exit
 * code. */
static int run(const tmpdir *t, const char *args)
{
    char cmd[2048];
    snprintf(cmd, sizeof cmd, "%s %s >%s/stdout 2>%s/stderr", kphi_bin(), args, t->dir, t->dir);
    int st = system(cmd);
    return WIFEXITED(st) ? WEXITSTATUS(st) : -1;
}

/* Write text into t/name; the reaction-set path "@SETS@" becomes the shipped one. */
static void write_case(const tmpdir *t, const char *name, const char *text)
{
    char path[256], cwd[512];
    snprintf(path, sizeof path, "%s/%s", t->dir, name);
    ck_assert_ptr_nonnull(getcwd(cwd, sizeof cwd));
    FILE *f = fopen(path, "w");
    ck_assert_ptr_nonnull(f);
    for (const char *p = text; *p;) {
        if (strncmp(p, "@SETS@", 6) == 0) {
            fprintf(f, "%s/reactions", cwd);
            p += 6;
        } else {
            fputc(*p++, f);
        }
    }
    fclose(f);
}

/* The chart texts of t/name (caller frees). */
static char *texts_of(const tmpdir *t, const char *name)
{
    char path[256];
    snprintf(path, sizeof path, "%s/%s", t->dir, name);
    char *s = svg_texts(path);
    ck_assert_msg(s != NULL, "cannot read %s", path);
    return s;
}

/* ------------------------------------------------------------ pressure labels */

/* A case with P in barg and a sweep grid in bar: the chart speaks the grid's unit with
 * one rounding for all values, as the CSV does in absolute bar. */
START_TEST(pressure_labels_in_the_grid_unit)
{
    tmpdir t;
    tmpdir_make(&t);
    write_case(&t, "gauge.yaml",
               "reactions: @SETS@/ammonia.yaml\n"
               "feed: {H2: 67.2, N2: 22.4, NH3: 3.1, CH4: 4.6, Ar: 2.7}\n"
               "T: 450 C\nP: 185 barg\n"
               "sweep:\n  T: {from: 380 C, to: 500 C, step: 40 C}\n"
               "  P: [150 bar, 200 bar, 250 bar]\n");
    char args[512];
    snprintf(args, sizeof args, "sweep %s/gauge.yaml -o %s/out.csv --plot %s/t.svg", t.dir,
             t.dir, t.dir);
    ck_assert_int_eq(run(&t, args), 0);
    char *s = texts_of(&t, "t.svg");
    ck_assert_msg(svg_has_line(s, "150 bar") && svg_has_line(s, "200 bar") &&
                      svg_has_line(s, "250 bar"),
                  "%s", s);
    ck_assert_msg(strstr(s, "barg") == NULL, "%s", s);
    free(s);
    /* conversion vs pressure: the axis in the grid's unit too */
    snprintf(args, sizeof args, "sweep %s/gauge.yaml -o /dev/null --plot %s/p.svg --plot-kind "
                                "conversion-p",
             t.dir, t.dir);
    ck_assert_int_eq(run(&t, args), 0);
    s = texts_of(&t, "p.svg");
    ck_assert_msg(svg_has_line(s, "pressure (bar)"), "%s", s);
    free(s);
    /* a grid on the command line: its unit, written once at the end */
    snprintf(args, sizeof args, "sweep %s/gauge.yaml --P 15:25:5MPa -o /dev/null --plot %s/m.svg",
             t.dir, t.dir);
    ck_assert_int_eq(run(&t, args), 0);
    s = texts_of(&t, "m.svg");
    ck_assert_msg(svg_has_line(s, "15 MPa") && svg_has_line(s, "20 MPa") &&
                      svg_has_line(s, "25 MPa"),
                  "%s", s);
    free(s);
    /* a grid in barg: shown in barg, every value with the same decimals */
    snprintf(args, sizeof args,
             "sweep %s/gauge.yaml --P 148.5barg,198.987barg -o /dev/null --plot %s/g.svg", t.dir,
             t.dir);
    ck_assert_int_eq(run(&t, args), 0);
    s = texts_of(&t, "g.svg");
    ck_assert_msg(svg_has_line(s, "148.500 barg") && svg_has_line(s, "198.987 barg"), "%s", s);
    free(s);
    tmpdir_remove(&t);
}
END_TEST

/* ---------------------------------------------------------- fit for a report */

/* Title with the case's name, a caption with set, feed, model and pressure, the solved
 * point, and the inlet and outlet temperature of every bed. */
START_TEST(solve_chart_says_what_it_shows)
{
    tmpdir t;
    tmpdir_make(&t);
    char args[512];
    snprintf(args, sizeof args,
             "solve cases/ammonia_converter.yaml --T 380C --intercool 400C,410C --plot %s/b.svg",
             t.dir);
    ck_assert_int_eq(run(&t, args), 0);
    char *s = texts_of(&t, "b.svg");
    ck_assert_msg(svg_has_line(s, "equilibrium curve: Harrowgate works, loop 2 converter inlet (invented scenario)"), "%s", s);
    ck_assert_msg(svg_has_line(s, "ammonia synthesis; feed (mol %) N2 22.4, H2 67.2, NH3 3.1, "
                                  "CH4 4.6, Ar 2.7; Peng-Robinson (1976/1978); at 195 bar"),
                  "%s", s);
    /* the bed temperatures of the table (523.96, 476.28, 453.62 C), to the degree */
    const char *beds[] = {"bed 1 in 380 \xc2\xb0" "C", "bed 1 out 524 \xc2\xb0" "C",
                          "bed 2 in 400 \xc2\xb0" "C", "bed 2 out 476 \xc2\xb0" "C",
                          "bed 3 in 410 \xc2\xb0" "C", "bed 3 out 454 \xc2\xb0" "C"};
    for (size_t k = 0; k < sizeof beds / sizeof beds[0]; k++)
        ck_assert_msg(svg_has_line(s, beds[k]), "missing '%s' in\n%s", beds[k], s);
    /* the solved point: 380 C, y_NH3 of the isothermal equilibrium there */
    ck_assert_msg(strstr(s, "solved 380 \xc2\xb0" "C: ") != NULL, "%s", s);
    ck_assert_msg(svg_has_line(s, "ideal gas"), "%s", s);
    free(s);
    /* without the ideal gas */
    snprintf(args, sizeof args,
             "solve cases/ammonia_converter.yaml --plot %s/r.svg --plot-ideal no", t.dir);
    ck_assert_int_eq(run(&t, args), 0);
    s = texts_of(&t, "r.svg");
    ck_assert_msg(svg_has_line(s, "real gas") && !svg_has_line(s, "ideal gas"), "%s", s);
    free(s);
    /* --plot-ideal needs a chart and a yes or no */
    ck_assert_int_eq(run(&t, "solve cases/ammonia_converter.yaml --plot-ideal no"), 2);
    snprintf(args, sizeof args, "sweep cases/ammonia_converter.yaml --plot %s/x.svg "
                                "--plot-ideal maybe", t.dir);
    ck_assert_int_eq(run(&t, args), 2);
    tmpdir_remove(&t);
}
END_TEST

/* The adiabatic sweep chart: outlet conversion and, in a second panel, outlet T. Sweep
 * charts carry the case's name and the caption too; --plot-ideal no leaves the dashed
 * lines and their legend out. */
START_TEST(sweep_charts_for_a_report)
{
    tmpdir t;
    tmpdir_make(&t);
    char args[512];
    snprintf(args, sizeof args,
             "sweep cases/ammonia_converter.yaml --T 360:420:20C --P 150bar,250bar --adiabatic "
             "-o /dev/null --plot %s/a.svg",
             t.dir);
    ck_assert_int_eq(run(&t, args), 0);
    char *s = texts_of(&t, "a.svg");
    ck_assert_msg(svg_has_line(s, "adiabatic equilibrium bed outlet: Harrowgate works, loop 2 converter "
                                  "inlet (invented scenario)"), "%s",
                  s);
    ck_assert_msg(svg_has_line(s, "N2 conversion (%)") && svg_has_line(s, "outlet T (\xc2\xb0" "C)"),
                  "%s", s);
    ck_assert_msg(svg_has_line(s, "bed inlet temperature (\xc2\xb0" "C)"), "%s", s);
    ck_assert_msg(strstr(s, "feed (mol %) N2 22.4") != NULL, "%s", s);
    free(s);
    snprintf(args, sizeof args,
             "sweep cases/ammonia_converter.yaml -o /dev/null --plot %s/c.svg --plot-ideal no",
             t.dir);
    ck_assert_int_eq(run(&t, args), 0);
    s = texts_of(&t, "c.svg");
    ck_assert_msg(svg_has_line(s, "real gas") && !svg_has_line(s, "ideal gas"), "%s", s);
    free(s);
    tmpdir_remove(&t);
}
END_TEST

/* ------------------------------------------------------- the data comes first */

static size_t count_lines(const char *path)
{
    FILE *f = fopen(path, "r");
    if (f == NULL)
        return 0;
    size_t n = 0;
    int ch;
    while ((ch = fgetc(f)) != EOF)
        n += ch == '\n';
    fclose(f);
    return n;
}

/* A grid with more temperatures than a chart has lines is drawn thinned (the caption
 * says so), and the CSV is whole; a chart that cannot be written never costs the CSV. */
START_TEST(many_lines_keep_the_data)
{
    tmpdir t;
    tmpdir_make(&t);
    char args[512], path[256];
    snprintf(args, sizeof args,
             "sweep cases/ammonia_converter.yaml --T 350:550:5C -o %s/rows.csv --plot %s/p.svg "
             "--plot-kind conversion-p",
             t.dir, t.dir);
    ck_assert_int_eq(run(&t, args), 0);
    snprintf(path, sizeof path, "%s/rows.csv", t.dir);
    ck_assert_uint_eq(count_lines(path), 1 + 41 * 5); /* header + 41 T x 5 P */
    char *s = texts_of(&t, "p.svg");
    ck_assert_msg(strstr(s, "every 2nd of 41 temperatures drawn") != NULL, "%s", s);
    ck_assert_msg(svg_has_line(s, "350 \xc2\xb0" "C") && svg_has_line(s, "550 \xc2\xb0" "C") &&
                      !svg_has_line(s, "355 \xc2\xb0" "C"),
                  "%s", s);
    free(s);
    /* the chart's directory does not exist: exit 2 naming it, the rows are written */
    snprintf(args, sizeof args,
             "sweep cases/ammonia_converter.yaml --T 400:440:20C -o %s/kept.csv --plot "
             "%s/no-such-dir/p.svg",
             t.dir, t.dir);
    ck_assert_int_eq(run(&t, args), 2);
    snprintf(path, sizeof path, "%s/kept.csv", t.dir);
    ck_assert_uint_eq(count_lines(path), 1 + 3 * 5);
    /* solve: the report is kept too */
    snprintf(args, sizeof args,
             "solve cases/ammonia_converter.yaml --format csv -o %s/point.csv --plot "
             "%s/no-such-dir/c.svg",
             t.dir, t.dir);
    ck_assert_int_eq(run(&t, args), 2);
    snprintf(path, sizeof path, "%s/point.csv", t.dir);
    ck_assert_uint_eq(count_lines(path), 2);
    tmpdir_remove(&t);
}
END_TEST

static Suite *charts_suite(void)
{
    Suite *s = suite_create("charts");
    TCase *tc = tcase_create("cli");
    tcase_set_timeout(tc, 120);
    tcase_add_test(tc, pressure_labels_in_the_grid_unit);
    tcase_add_test(tc, many_lines_keep_the_data);
    tcase_add_test(tc, solve_chart_says_what_it_shows);
    tcase_add_test(tc, sweep_charts_for_a_report);
    suite_add_tcase(s, tc);
    return s;
}

KPHI_TEST_MAIN(charts_suite)
