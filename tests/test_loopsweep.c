/* Loop and flash grids and the loop diagram: the library's kphi_sweep_loop_run() and
 * kphi_sweep_flash_run() (every point equals a lone solve, the same answers for any thread
 * count and chain cut), and the program's `sweep --loop`, `sweep --flash` and
 * `loop --plot` end to end (CSV and JSON contracts against `kphi loop` and `kphi flash`,
 * grid order, thread-count independence, the chart texts read back from the SVG). The
 * program under test is $KPHI_BIN (tests/run_tests.sh sets it), else bin/kphi. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include <unistd.h>

#include "kphi/kphi.h"
#include "svgtext.h"
#include "testutil.h"

/* ------------------------------------------------------------ running the program */

static const char *kphi_bin(void)
{
    const char *b = getenv("KPHI_BIN");
    return b != NULL && b[0] != '\0' ? b : "bin/kphi";
}

/* Run "kphi ARGS" with stderr to /dev/null; stdout into *out (caller frees). Returns the
 * exit code. */
static int run(const char *args, char **out)
{
    char cmd[2048];
    snprintf(cmd, sizeof cmd, "%s %s 2>/dev/null", kphi_bin(), args);
    FILE *p = popen(cmd, "r");
    ck_assert_ptr_nonnull(p);
    size_t cap = 1 << 16, len = 0, got;
    char *b = malloc(cap);
    ck_assert_ptr_nonnull(b);
    while ((got = fread(b + len, 1, cap - len - 1, p)) > 0) {
        len += got;
        if (cap - len < 4096) {
            cap *= 2;
            b = realloc(b, cap);
            ck_assert_ptr_nonnull(b);
        }
    }
    b[len] = '\0';
    int st = pclose(p);
    *out = b;
    return WIFEXITED(st) ? WEXITSTATUS(st) : -1;
}

/* Line k (0-based) of text into buf[n]; 0 when there is no such line. */
static int line_of(const char *text, size_t k, char *buf, size_t n)
{
    const char *p = text;
    for (size_t i = 0; i < k; i++) {
        p = strchr(p, '\n');
        if (p == NULL)
            return 0;
        p++;
    }
    if (*p == '\0')
        return 0;
    const char *e = strchr(p, '\n');
    size_t len = e != NULL ? (size_t)(e - p) : strlen(p);
    if (len >= n)
        len = n - 1;
    memcpy(buf, p, len);
    buf[len] = '\0';
    return 1;
}

static size_t count_lines(const char *text)
{
    size_t n = 0;
    for (const char *p = text; *p; p++)
        n += *p == '\n';
    return n;
}

/* Field k (0-based) of a CSV line without quoted commas, as a number (NaN when empty). */
static double field(const char *line, size_t k)
{
    const char *p = line;
    for (size_t i = 0; i < k; i++) {
        p = strchr(p, ',');
        ck_assert_msg(p != NULL, "line has no field %zu: %s", k, line);
        p++;
    }
    if (*p == ',' || *p == '\0')
        return NAN;
    return strtod(p, NULL);
}

/* The index of column `name` in a CSV header line. */
static size_t column(const char *header, const char *name)
{
    size_t k = 0, n = strlen(name);
    for (const char *p = header;; k++) {
        if (strncmp(p, name, n) == 0 && (p[n] == ',' || p[n] == '\0'))
            return k;
        p = strchr(p, ',');
        ck_assert_msg(p != NULL, "no column %s", name);
        p++;
    }
}

/* Text field k of a CSV line (up to the next comma) into buf[n]. */
static void text_field(const char *line, size_t k, char *buf, size_t n)
{
    const char *p = line;
    for (size_t i = 0; i < k; i++) {
        p = strchr(p, ',');
        ck_assert_ptr_nonnull(p);
        p++;
    }
    size_t len = strcspn(p, ",");
    if (len >= n)
        len = n - 1;
    memcpy(buf, p, len);
    buf[len] = '\0';
}

/* Does every field of two CSV lines agree, numbers to rel (and 1e-12 absolute)? Field
 * `skip` is not compared. */
static void rows_agree(const char *a, const char *b, double rel, size_t skip)
{
    const char *p = a, *q = b;
    for (size_t k = 0;; k++) {
        char *ea, *eb;
        if (k == skip)
            goto next;
        double x = strtod(p, &ea), y = strtod(q, &eb);
        if (ea != p && eb != q) {
            ck_assert_msg(fabs(x - y) <= rel * fmax(fabs(x), fabs(y)) + 1e-12,
                          "field %zu: %.12g vs %.12g", k, x, y);
        } else {
            size_t la = strcspn(p, ","), lb = strcspn(q, ",");
            ck_assert_msg(la == lb && strncmp(p, q, la) == 0, "field %zu differs: %.*s vs %.*s",
                          k, (int)la, p, (int)lb, q);
        }
    next:
        p = strchr(p, ',');
        q = strchr(q, ',');
        ck_assert_msg((p == NULL) == (q == NULL), "rows have different lengths");
        if (p == NULL)
            break;
        p++;
        q++;
    }
}

typedef struct {
    char dir[64];
} tmpdir;

static void tmpdir_make(tmpdir *t)
{
    snprintf(t->dir, sizeof t->dir, "/tmp/kphi-test-loopsweep-XXXXXX");
    ck_assert_ptr_nonnull(mkdtemp(t->dir));
}

static void tmpdir_remove(tmpdir *t)
{
    char cmd[128];
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", t->dir);
    ck_assert_int_eq(system(cmd), 0);
}

/* Write text into t/name; "@SETS@" becomes the shipped reaction directory. */
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

/* An invented loop with a make-up rate (not a production target), so that `kphi loop` at
 * a grid point and the sweep use the same make-up. */
static const char RATE_LOOP[] =
    "name: rate loop\n"
    "reactions: @SETS@/ammonia.yaml\n"
    "P: 205 bar\n"
    "eos: pr\n"
    "loop:\n"
    "  makeup: {composition: {H2: 73.6, N2: 24.9, CH4: 1.1, Ar: 0.4}, rate: 1130 kmol/h}\n"
    "  converter: {T_out: 455 C, approach: 12 K}\n"
    "  separator: {T: -8 C, P: 199 bar}\n"
    "  purge: {fraction: 2.5 %}\n";

/* ------------------------------------------------------------ library: loop grids */

/* The loop of cases/ammonia_loop.yaml per 100 mol/s of make-up, as kphi loop builds it. */
typedef struct {
    kphi_case *cs;
    kphi_eos *conv, *ideal, *sep;
    double mk[16];
    kphi_loop_spec sp;
} loop_fixture;

static void fixture_load(loop_fixture *f, const char *path)
{
    kphi_error err;
    kphi_error_clear(&err);
    f->cs = kphi_case_load_file(path, &err);
    ck_assert_msg(f->cs != NULL, "%s", err.msg);
    const kphi_case_loop *g = kphi_case_get_loop(f->cs);
    ck_assert_ptr_nonnull(g);
    const kphi_rxnset *set = kphi_case_rxnset(f->cs);
    size_t s = kphi_rxnset_n_species(set);
    ck_assert_uint_le(s, 16);
    /* per 100 mol/s of make-up: the shipped cases give a production target */
    ck_assert_int_eq(kphi_loop_spec_from_case(f->cs, f->mk, &f->sp), 0);
    f->conv = kphi_case_make_eos(f->cs, KPHI_EOS_PR, &err);
    f->ideal = kphi_case_make_eos(f->cs, KPHI_EOS_IDEAL, &err);
    f->sep = kphi_case_make_eos(f->cs, KPHI_EOS_PR, &err);
    ck_assert(f->conv != NULL && f->ideal != NULL && f->sep != NULL);
}

static void fixture_free(loop_fixture *f)
{
    kphi_eos_free(f->conv);
    kphi_eos_free(f->ideal);
    kphi_eos_free(f->sep);
    kphi_case_free(f->cs);
}

enum { LNT = 3, LNP = 7, LMAX_S = 16 };

/* What the tests keep of each loop of a grid. */
typedef struct {
    int ok[2];
    double product[2], recycle_ratio[2], recycle[2][LMAX_S], P_sep, T_conv;
    size_t calls;
    size_t order[LNT * LNP]; /* iT * nP + iP in call order */
} loop_grid;

static int keep_loop(void *ctx, size_t iT, size_t iP, const kphi_sweep_loop_point *pt)
{
    loop_grid *g = ctx;
    loop_grid *cell = &g[1 + iT * LNP + iP];
    g->order[g->calls++] = iT * LNP + iP;
    for (int m = 0; m < 2; m++) {
        cell->ok[m] = pt->loop[m] != NULL;
        ck_assert_msg(cell->ok[m], "loop %d failed at %zu,%zu: %s", m, iT, iP,
                      pt->failure[m] != NULL ? pt->failure[m]->msg : "?");
        cell->product[m] = pt->loop[m]->product_rate;
        cell->recycle_ratio[m] = pt->loop[m]->recycle_ratio;
        for (size_t i = 0; i < pt->loop[m]->n_species && i < LMAX_S; i++)
            cell->recycle[m][i] = pt->loop[m]->stream[KPHI_LOOP_S_RECYCLE].n[i];
    }
    cell->P_sep = pt->spec->P_sep;
    cell->T_conv = pt->spec->T_out;
    return 0;
}

static const double LOOP_T[LNT] = {703.15, 728.15, 753.15};          /* 430, 455, 480 C */
static const double LOOP_P[LNP] = {155e5, 170e5, 185e5, 195e5, 210e5, 232e5, 251e5};

static loop_grid *run_loop_grid(const loop_fixture *f, int threads, size_t chain)
{
    loop_grid *g = calloc(1 + LNT * LNP, sizeof *g);
    ck_assert_ptr_nonnull(g);
    kphi_sweep_options opt = kphi_sweep_options_default();
    opt.threads = threads;
    opt.chain = chain;
    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_sweep_loop_run(kphi_case_rxnset(f->cs), f->conv, f->ideal, f->sep,
                                         &f->sp, LOOP_T, LNT, LOOP_P, LNP, &opt, keep_loop, g,
                                         &err),
                     KPHI_OK);
    ck_assert_uint_eq(g->calls, LNT * LNP);
    return g;
}

/* Grid order, the separator's pressure drop, and every point the answer of a lone, cold
 * kphi_loop_solve() (the warm start from the chain neighbour changes nothing but the
 * Newton steps: both are converged to 1e-10 of every flow). */
START_TEST(loop_grid_points_equal_lone_loops)
{
    loop_fixture f;
    fixture_load(&f, "cases/ammonia_loop.yaml");
    loop_grid *g = run_loop_grid(&f, 2, 3);
    for (size_t k = 0; k < LNT * LNP; k++)
        ck_assert_uint_eq(g->order[k], k); /* T outer, P inner */
    const kphi_rxnset *set = kphi_case_rxnset(f.cs);
    size_t s = kphi_rxnset_n_species(set), r = kphi_rxnset_n_reactions(set);
    kphi_loop_work *w = kphi_loop_work_alloc(s, r);
    kphi_loop_result *res = kphi_loop_result_alloc(s);
    ck_assert(w != NULL && res != NULL);
    double drop = f.sp.P - f.sp.P_sep;
    ck_assert_double_gt(drop, 1e5); /* the shipped case has one: 195 -> 190 bar */
    for (size_t iT = 0; iT < LNT; iT++)
        for (size_t iP = 0; iP < LNP; iP++) {
            const loop_grid *c = &g[1 + iT * LNP + iP];
            ck_assert_double_eq_tol(c->P_sep, LOOP_P[iP] - drop, 1e-6);
            ck_assert_double_eq_tol(c->T_conv, LOOP_T[iT], 1e-12);
            kphi_loop_spec sp = f.sp;
            sp.T_out = LOOP_T[iT];
            sp.P = LOOP_P[iP];
            sp.P_sep = LOOP_P[iP] - drop;
            const kphi_eos *models[2] = {f.conv, f.ideal};
            for (int m = 0; m < 2; m++) {
                kphi_error err;
                kphi_error_clear(&err);
                ck_assert_int_eq(kphi_loop_solve(set, models[m], f.sep, &sp, NULL, w, res, &err),
                                 KPHI_OK);
                ck_assert_double_eq_tol(c->product[m], res->product_rate,
                                        1e-8 * res->product_rate);
                for (size_t i = 0; i < s; i++) {
                    double a = res->stream[KPHI_LOOP_S_RECYCLE].n[i];
                    ck_assert_double_eq_tol(c->recycle[m][i], a, 1e-8 * fabs(a) + 1e-9);
                }
            }
        }
    kphi_loop_result_free(res);
    kphi_loop_work_free(w);
    free(g);
    fixture_free(&f);
}
END_TEST

/* The same numbers, bit for bit, on 1, 2 and 4 threads, for chains that cut the rows
 * (3 of 7 pressures) and chains of whole rows. */
START_TEST(loop_grid_same_for_any_thread_count)
{
    loop_fixture f;
    fixture_load(&f, "cases/ammonia_loop.yaml");
    static const size_t chains[2] = {3, 32};
    for (size_t c = 0; c < 2; c++) {
        loop_grid *one = run_loop_grid(&f, 1, chains[c]);
        for (int threads = 2; threads <= 4; threads += 2) {
            loop_grid *many = run_loop_grid(&f, threads, chains[c]);
            for (size_t k = 1; k <= LNT * LNP; k++)
                for (int m = 0; m < 2; m++) {
                    ck_assert(memcmp(&one[k].product[m], &many[k].product[m], sizeof(double)) ==
                              0);
                    ck_assert(memcmp(one[k].recycle[m], many[k].recycle[m],
                                     sizeof one[k].recycle[m]) == 0);
                }
            free(many);
        }
        free(one);
    }
    fixture_free(&f);
}
END_TEST

/* Physics the grid must show: at fixed make-up a higher loop pressure makes more product
 * and needs less recycle (Le Chatelier; Delta nu = -2); the real-gas converter makes more
 * than the ideal-gas one at these pressures (K_phi < 1 for ammonia). */
START_TEST(loop_grid_trends)
{
    loop_fixture f;
    fixture_load(&f, "cases/ammonia_loop.yaml");
    loop_grid *g = run_loop_grid(&f, 2, 32);
    for (size_t iT = 0; iT < LNT; iT++)
        for (size_t iP = 0; iP < LNP; iP++) {
            const loop_grid *c = &g[1 + iT * LNP + iP];
            ck_assert_double_gt(c->product[0], c->product[1]);
            if (iP > 0) {
                const loop_grid *b = &g[1 + iT * LNP + iP - 1];
                ck_assert_double_gt(c->product[0], b->product[0]);
                ck_assert_double_lt(c->recycle_ratio[0], b->recycle_ratio[0]);
            }
        }
    free(g);
    fixture_free(&f);
}
END_TEST

/* ------------------------------------------------------------ library: flash grids */

enum { FNT = 5, FNP = 3 };

typedef struct {
    size_t calls;
    int n_phases[FNT * FNP];
    double beta[FNT * FNP], y[FNT * FNP][8], T_dew[FNP];
} flash_grid;

static int keep_flash(void *ctx, size_t iT, size_t iP, double T, double P,
                      const kphi_sweep_flash_point *pt)
{
    (void)T;
    (void)P;
    flash_grid *g = ctx;
    size_t k = iT * FNP + iP;
    ck_assert_uint_eq(g->calls++, k);
    ck_assert_ptr_nonnull(pt->flash);
    g->n_phases[k] = (int)pt->flash->n_phases;
    g->beta[k] = pt->flash->phase[0].fraction;
    for (size_t i = 0; i < pt->flash->n && i < 8; i++)
        g->y[k][i] = pt->flash->phase[0].y[i];
    g->T_dew[iP] = pt->T_dew;
    ck_assert_int_eq(pt->dew_found, 1);
    return 0;
}

/* Each point equals a lone kphi_phase_flash() bit for bit, the dew point a lone search,
 * and the answers are the same on 1 and 3 threads. */
START_TEST(flash_grid_points_equal_lone_flashes)
{
    kphi_error err;
    kphi_error_clear(&err);
    kphi_case *cs = kphi_case_load_file("cases/ammonia_separator.yaml", &err);
    ck_assert_msg(cs != NULL, "%s", err.msg);
    kphi_eos *eos = kphi_case_make_eos(cs, KPHI_EOS_PR, &err);
    ck_assert_ptr_nonnull(eos);
    const double *z = kphi_case_feed(cs);
    static const double T[FNT] = {243.15, 258.15, 268.15, 283.15, 301.15};
    static const double P[FNP] = {137e5, 190e5, 263e5};
    flash_grid *g[2];
    for (int run_ = 0; run_ < 2; run_++) {
        g[run_] = calloc(1, sizeof *g[run_]);
        kphi_sweep_options opt = kphi_sweep_options_default();
        opt.threads = run_ == 0 ? 1 : 3;
        opt.chain = 4;
        ck_assert_int_eq(kphi_sweep_flash_run(eos, z, T, FNT, P, FNP, 150.0, 800.0, &opt,
                                              keep_flash, g[run_], &err),
                         KPHI_OK);
        ck_assert_uint_eq(g[run_]->calls, FNT * FNP);
    }
    ck_assert(memcmp(g[0]->y, g[1]->y, sizeof g[0]->y) == 0);
    ck_assert(memcmp(g[0]->beta, g[1]->beta, sizeof g[0]->beta) == 0);
    size_t s = kphi_eos_size(eos);
    kphi_phase_work *w = kphi_phase_work_alloc(s, 0);
    kphi_flash_result *fr = kphi_flash_result_alloc(s);
    for (size_t iT = 0; iT < FNT; iT++)
        for (size_t iP = 0; iP < FNP; iP++) {
            ck_assert_int_eq(kphi_phase_flash(eos, T[iT], P[iP], z, NULL, w, fr, &err), KPHI_OK);
            size_t k = iT * FNP + iP;
            ck_assert_int_eq(g[0]->n_phases[k], (int)fr->n_phases);
            ck_assert(memcmp(&g[0]->beta[k], &fr->phase[0].fraction, sizeof(double)) == 0);
            for (size_t i = 0; i < s; i++)
                ck_assert(memcmp(&g[0]->y[k][i], &fr->phase[0].y[i], sizeof(double)) == 0);
        }
    for (size_t iP = 0; iP < FNP; iP++) {
        int found;
        double Td;
        ck_assert_int_eq(kphi_phase_dew_point(eos, P[iP], z, NAN, 150.0, 800.0, NULL, w, &found,
                                              &Td, &err),
                         KPHI_OK);
        ck_assert_int_eq(found, 1);
        ck_assert(memcmp(&g[0]->T_dew[iP], &Td, sizeof Td) == 0);
    }
    kphi_flash_result_free(fr);
    kphi_phase_work_free(w);
    free(g[0]);
    free(g[1]);
    kphi_eos_free(eos);
    kphi_case_free(cs);
}
END_TEST

START_TEST(flash_grid_refuses_a_model_without_liquid)
{
    kphi_error err;
    kphi_error_clear(&err);
    kphi_case *cs = kphi_case_load_file("cases/ammonia_separator.yaml", &err);
    ck_assert_ptr_nonnull(cs);
    kphi_eos *eos = kphi_case_make_eos(cs, KPHI_EOS_VIRIAL, &err);
    ck_assert_ptr_nonnull(eos);
    double T = 268.15, P = 190e5;
    flash_grid g;
    memset(&g, 0, sizeof g);
    ck_assert_int_eq(kphi_sweep_flash_run(eos, kphi_case_feed(cs), &T, 1, &P, 1, 150.0, 800.0,
                                          NULL, keep_flash, &g, &err),
                     KPHI_EINPUT);
    ck_assert_uint_eq(g.calls, 0);
    kphi_eos_free(eos);
    kphi_case_free(cs);
}
END_TEST

/* ------------------------------------------------------------ the program: sweep --loop */

/* The CSV of sweep --loop: kphi loop's header, two rows per point (real, ideal) in grid
 * order, and each pair equal to kphi loop at that point (a rate, so the same make-up). */
START_TEST(sweep_loop_csv_matches_kphi_loop)
{
    tmpdir t;
    tmpdir_make(&t);
    write_case(&t, "rate.yaml", RATE_LOOP);
    char args[512], *sw, *one, line[8192], want[8192];
    snprintf(args, sizeof args, "sweep %s/rate.yaml --loop --T 440C,455C,470C --P 185bar,205bar",
             t.dir);
    ck_assert_int_eq(run(args, &sw), 0);
    ck_assert_uint_eq(count_lines(sw), 1 + 2 * 3 * 2);
    snprintf(args, sizeof args, "loop %s/rate.yaml --format csv", t.dir);
    ck_assert_int_eq(run(args, &one), 0);
    char head[8192];
    ck_assert(line_of(sw, 0, head, sizeof head));
    ck_assert(line_of(one, 0, want, sizeof want));
    ck_assert_str_eq(head, want);
    size_t cP = column(head, "P_bar"), cT = column(head, "T_conv_K"),
           cS = column(head, "P_sep_bar"), cst = column(head, "status");
    static const double Tc[3] = {713.15, 728.15, 743.15}, Pb[2] = {185.0, 205.0};
    for (size_t k = 0; k < 6; k++)
        for (int m = 0; m < 2; m++) {
            ck_assert(line_of(sw, 1 + 2 * k + (size_t)m, line, sizeof line));
            char conv[16], st[16];
            text_field(line, 0, conv, sizeof conv);
            ck_assert_str_eq(conv, m == 0 ? "real" : "ideal");
            ck_assert_double_eq_tol(field(line, cT), Tc[k / 2], 1e-9);
            ck_assert_double_eq_tol(field(line, cP), Pb[k % 2], 1e-9);
            ck_assert_double_eq_tol(field(line, cS), Pb[k % 2] - 6.0, 1e-9); /* 205 -> 199 */
            text_field(line, cst, st, sizeof st);
            ck_assert_str_eq(st, "ok");
        }
    /* the case's own point (455 C, 205 bar) is rows 7 and 8; kphi loop's rows 1 and 2;
     * only the Newton steps differ (the sweep starts from its neighbour's recycle) */
    size_t cit = column(head, "iterations");
    for (int m = 0; m < 2; m++) {
        ck_assert(line_of(sw, 7 + (size_t)m, line, sizeof line));
        ck_assert(line_of(one, 1 + (size_t)m, want, sizeof want));
        rows_agree(line, want, 1e-7, cit);
    }
    free(sw);
    free(one);
    tmpdir_remove(&t);
}
END_TEST

/* With a production target the make-up that makes it at the case's own point is held over
 * the grid: the row at that point makes the target. */
START_TEST(sweep_loop_production_holds_the_design_makeup)
{
    char *sw, line[8192], head[8192];
    ck_assert_int_eq(run("sweep cases/ammonia_loop.yaml --loop --T 440C,460C --P 175bar,195bar",
                         &sw),
                     0);
    ck_assert(line_of(sw, 0, head, sizeof head));
    size_t ct = column(head, "product_t_d"), cm = column(head, "makeup_mol_s");
    double mk = NAN;
    for (size_t k = 1; line_of(sw, k, line, sizeof line); k++) {
        if (k == 1)
            mk = field(line, cm);
        ck_assert_double_eq_tol(field(line, cm), mk, 1e-9 * mk); /* one make-up everywhere */
    }
    /* 460 C, 195 bar (the case's own T_out and P) is point 3: rows 7 (real) and 8 */
    ck_assert(line_of(sw, 7, line, sizeof line));
    ck_assert_double_eq_tol(field(line, ct), 1500.0, 1e-6); /* the case's production: 1500 t/d */
    ck_assert(line_of(sw, 5, line, sizeof line));
    ck_assert_double_lt(field(line, ct), 1500.0); /* 460 C and 175 bar make less */
    ck_assert(line_of(sw, 3, line, sizeof line));
    ck_assert_double_gt(field(line, ct), 1500.0); /* 440 C and 195 bar more */
    free(sw);
}
END_TEST

START_TEST(sweep_loop_same_for_any_thread_count)
{
    char *a, *b, *c;
    const char *grid = "sweep cases/methanol_loop.yaml --loop --T 235:275:10C --P 60:100:10bar";
    char args[512];
    snprintf(args, sizeof args, "%s --threads 1", grid);
    ck_assert_int_eq(run(args, &a), 0);
    snprintf(args, sizeof args, "%s --threads 2", grid);
    ck_assert_int_eq(run(args, &b), 0);
    snprintf(args, sizeof args, "%s --threads 3 --format json", grid);
    ck_assert_int_eq(run(args, &c), 0);
    ck_assert_str_eq(a, b);
    ck_assert_uint_eq(count_lines(a), 1 + 2 * 25);
    ck_assert_uint_eq(count_lines(c), 25); /* one JSON object per point */
    free(a);
    free(b);
    free(c);
    snprintf(args, sizeof args, "%s --threads 1 --format json", grid);
    ck_assert_int_eq(run(args, &a), 0);
    snprintf(args, sizeof args, "%s --threads 2 --format json", grid);
    ck_assert_int_eq(run(args, &b), 0);
    ck_assert_str_eq(a, b);
    free(a);
    free(b);
}
END_TEST

/* JSON lines: one object per point with the grid values and both converters. */
START_TEST(sweep_loop_json_lines)
{
    char *out, line[65536];
    ck_assert_int_eq(run("sweep cases/ammonia_loop.yaml --loop --T 450C --P 180bar,210bar "
                         "--format json",
                         &out),
                     0);
    ck_assert_uint_eq(count_lines(out), 2);
    for (size_t k = 0; k < 2; k++) {
        ck_assert(line_of(out, k, line, sizeof line));
        const char *start = k == 0 ? "{\"P_bar\": 180, \"T_conv_K\": 723.15, "
                                   : "{\"P_bar\": 210, \"T_conv_K\": 723.15, ";
        ck_assert_msg(strncmp(line, start, strlen(start)) == 0, "%.80s", line);
        ck_assert_ptr_nonnull(strstr(line, "\"P_sep_bar\": "));
        ck_assert_ptr_nonnull(strstr(line, "\"real\": {\"streams\": {\"makeup\": {"));
        ck_assert_ptr_nonnull(strstr(line, "\"ideal\": {\"streams\": "));
        ck_assert_ptr_nonnull(strstr(line, "\"recycle_ratio\": "));
        ck_assert_ptr_nonnull(strstr(line, "\"shift\": {\"product_rate\": "));
        ck_assert(line[strlen(line) - 1] == '}');
    }
    free(out);
}
END_TEST

/* ------------------------------------------------------------ the program: sweep --flash */

/* Every CSV row is kphi flash's row at that T and P, byte for byte; JSON lines are its
 * objects. */
START_TEST(sweep_flash_rows_are_kphi_flash)
{
    char *sw, *one, line[8192], want[8192];
    ck_assert_int_eq(run("sweep cases/ammonia_separator.yaml --flash --T -20C,-5C,15C "
                         "--P 150bar,190bar",
                         &sw),
                     0);
    ck_assert_uint_eq(count_lines(sw), 1 + 6);
    static const char *const Ts[3] = {"-20C", "-5C", "15C"}, *const Ps[2] = {"150bar", "190bar"};
    for (size_t k = 0; k < 6; k++) {
        char args[256];
        snprintf(args, sizeof args, "flash cases/ammonia_separator.yaml --format csv --T %s --P %s",
                 Ts[k / 2], Ps[k % 2]);
        ck_assert_int_eq(run(args, &one), 0);
        if (k == 0) {
            ck_assert(line_of(sw, 0, line, sizeof line));
            ck_assert(line_of(one, 0, want, sizeof want));
            ck_assert_str_eq(line, want);
        }
        ck_assert(line_of(sw, 1 + k, line, sizeof line));
        ck_assert(line_of(one, 1, want, sizeof want));
        ck_assert_str_eq(line, want);
        free(one);
    }
    free(sw);
    ck_assert_int_eq(run("sweep cases/ammonia_separator.yaml --flash --T 5C --P 210bar "
                         "--format json",
                         &sw),
                     0);
    ck_assert_int_eq(run("flash cases/ammonia_separator.yaml --T 5C --P 210bar --format json",
                         &one),
                     0);
    ck_assert_str_eq(sw, one);
    free(sw);
    free(one);
}
END_TEST

START_TEST(sweep_flash_same_for_any_thread_count)
{
    char *a, *b;
    ck_assert_int_eq(run("sweep cases/methanol_separator.yaml --flash --T 20:80:2C "
                         "--P 50:100:5bar --threads 1",
                         &a),
                     0);
    ck_assert_int_eq(run("sweep cases/methanol_separator.yaml --flash --T 20:80:2C "
                         "--P 50:100:5bar --threads 2",
                         &b),
                     0);
    ck_assert_uint_eq(count_lines(a), 1 + 31 * 11);
    ck_assert_str_eq(a, b);
    ck_assert_ptr_null(strstr(a, ",failed,"));
    free(a);
    free(b);
}
END_TEST

/* ------------------------------------------------------------ charts */

/* How many lines of texts equal line. */
static size_t count_text(const char *texts, const char *line)
{
    size_t n = 0, len = strlen(line);
    for (const char *p = texts; p != NULL && *p != '\0';) {
        const char *nl = strchr(p, '\n');
        size_t l = nl != NULL ? (size_t)(nl - p) : strlen(p);
        n += l == len && memcmp(p, line, len) == 0;
        p = nl != NULL ? nl + 1 : NULL;
    }
    return n;
}

static int file_size(const char *path)
{
    struct stat st;
    return stat(path, &st) == 0 ? (int)st.st_size : -1;
}

/* The loop diagram: numbered streams, their names, the units, the table's values (taken
 * from the CSV of the same loop), title and caption. */
START_TEST(loop_diagram_texts)
{
    tmpdir t;
    tmpdir_make(&t);
    char args[512], path[256], *csv, head[8192], row[8192];
    snprintf(path, sizeof path, "%s/loop.svg", t.dir);
    snprintf(args, sizeof args, "loop cases/ammonia_loop.yaml --format csv --plot %s", path);
    ck_assert_int_eq(run(args, &csv), 0);
    char *tx = svg_texts(path);
    ck_assert_ptr_nonnull(tx);
    static const char *const want[] = {
        "synthesis loop: Harrowgate works, ammonia loop 2 (invented scenario)",
        "make-up", "conv. in", "conv. out", "sep. vapour", "liquid", "purge", "recycle",
        "converter", "cooler", "separator", "recycle compressor", "liquid NH3",
        "flow, kmol/h", "T, \xc2\xb0" "C", "P, bar", "NH3, mol %", "outlet 460 \xc2\xb0" "C",
        "1 % of the vapour", "back to 195 bar"};
    for (size_t k = 0; k < sizeof want / sizeof want[0]; k++)
        ck_assert_msg(svg_has_line(tx, want[k]), "no text '%s' in the diagram", want[k]);
    /* the stream numbers 1..7, each twice (on the sketch and over the table) */
    for (int n = 1; n <= 7; n++) {
        char num[16];
        snprintf(num, sizeof num, "%d", n);
        ck_assert_msg(count_text(tx, num) == 2, "stream %d not numbered twice", n);
    }
    ck_assert_ptr_nonnull(strstr(tx, "loop 195 bar"));
    ck_assert_ptr_nonnull(strstr(tx, "purge 1 % of the separator vapour"));
    ck_assert_ptr_nonnull(strstr(tx, "Streams above: real-gas converter (pr)"));
    ck_assert_ptr_nonnull(strstr(tx, "Ideal-gas converter, same make-up"));
    /* table values: the real-gas row of the CSV */
    ck_assert(line_of(csv, 0, head, sizeof head));
    ck_assert(line_of(csv, 1, row, sizeof row));
    char v[64];
    snprintf(v, sizeof v, "\n%.0f\n", 3.6 * field(row, column(head, "recycle_mol_s")));
    ck_assert_msg(strstr(tx, v) != NULL, "no recycle flow %s", v);
    snprintf(v, sizeof v, "\n%.2f\n", 100.0 * field(row, column(head, "x_liquid_NH3")));
    ck_assert_msg(strstr(tx, v) != NULL, "no liquid NH3 mol %% %s", v);
    snprintf(v, sizeof v, "NH3 %.1f t/d", field(row, column(head, "product_t_d")));
    ck_assert_msg(strstr(tx, v) != NULL, "no product %s", v);
    free(tx);
    free(csv);
    /* PNG and PDF by extension */
    static const char *const ext[2] = {"png", "pdf"};
    for (int k = 0; k < 2; k++) {
        snprintf(path, sizeof path, "%s/loop.%s", t.dir, ext[k]);
        snprintf(args, sizeof args, "loop cases/methanol_loop.yaml --plot %s >/dev/null", path);
        ck_assert_int_eq(run(args, &csv), 0);
        free(csv);
        ck_assert_int_gt(file_size(path), 1000);
    }
    /* a bad extension is refused before anything is solved or written */
    snprintf(args, sizeof args, "loop cases/ammonia_loop.yaml --plot %s/loop.gif", t.dir);
    ck_assert_int_eq(run(args, &csv), 2);
    ck_assert_str_eq(csv, "");
    free(csv);
    tmpdir_remove(&t);
}
END_TEST

/* A loop with the make-up at the separator and adiabatic beds, on a per-100-mol basis. */
START_TEST(loop_diagram_makeup_at_separator)
{
    tmpdir t;
    tmpdir_make(&t);
    write_case(&t, "sep.yaml",
               "name: beds loop\n"
               "reactions: @SETS@/ammonia.yaml\n"
               "P: 210 bar\n"
               "loop:\n"
               "  makeup: {composition: {H2: 74.2, N2: 24.6, CH4: 0.9, Ar: 0.3}}\n"
               "  makeup_at: separator\n"
               "  converter: {T_in: 385 C, intercool: [405 C], approach: 8 K}\n"
               "  separator: {T: -12 C}\n"
               "  purge: {inerts: 13 %}\n");
    char args[512], path[256], *out;
    snprintf(path, sizeof path, "%s/beds.svg", t.dir);
    snprintf(args, sizeof args, "loop %s/sep.yaml --plot %s", t.dir, path);
    ck_assert_int_eq(run(args, &out), 0);
    free(out);
    char *tx = svg_texts(path);
    ck_assert_ptr_nonnull(tx);
    ck_assert_ptr_nonnull(strstr(tx, "2 adiabatic beds"));
    ck_assert_ptr_nonnull(strstr(tx, "inlet 385 \xc2\xb0" "C"));
    ck_assert_ptr_nonnull(strstr(tx, "flow, mol/100 mol make-up"));
    ck_assert_ptr_nonnull(strstr(tx, "for 13 % inerts"));
    ck_assert_ptr_nonnull(strstr(tx, "Flows per 100 mol of make-up"));
    ck_assert(svg_has_line(tx, "100")); /* the make-up's flow */
    free(tx);
    tmpdir_remove(&t);
}
END_TEST

START_TEST(sweep_charts_texts)
{
    tmpdir t;
    tmpdir_make(&t);
    char args[512], path[256], *out;
    snprintf(path, sizeof path, "%s/loop.svg", t.dir);
    snprintf(args, sizeof args,
             "sweep cases/ammonia_loop.yaml --loop --T 440C,460C --P 175bar,195bar,220bar "
             "--plot %s -o %s/loop.csv",
             path, t.dir);
    ck_assert_int_eq(run(args, &out), 0);
    free(out);
    char *tx = svg_texts(path);
    ck_assert_ptr_nonnull(tx);
    static const char *const want[] = {
        "loop production vs pressure: Harrowgate works, ammonia loop 2 (invented scenario)",
        "loop pressure (bar)", "NH3 product (t/d)", "recycle ratio (mol/mol)",
        "real-gas converter", "ideal-gas converter", "converter outlet",
        "440 \xc2\xb0" "C", "460 \xc2\xb0" "C", "purge 1 %"};
    for (size_t k = 0; k < sizeof want / sizeof want[0]; k++)
        ck_assert_msg(strstr(tx, want[k]) != NULL, "no text '%s' in the loop chart", want[k]);
    free(tx);
    snprintf(path, sizeof path, "%s/sep.svg", t.dir);
    snprintf(args, sizeof args,
             "sweep cases/ammonia_separator.yaml --flash --plot %s -o %s/sep.csv", path, t.dir);
    ck_assert_int_eq(run(args, &out), 0);
    free(out);
    tx = svg_texts(path);
    ck_assert_ptr_nonnull(tx);
    static const char *const want2[] = {
        "product in the separator vapour: Harrowgate works, loop 2 cold separator (invented "
        "scenario)",
        "separator temperature (\xc2\xb0" "C)", "NH3 in the vapour (mol %)", "separator P",
        "150 bar", "190 bar", "250 bar"};
    for (size_t k = 0; k < sizeof want2 / sizeof want2[0]; k++)
        ck_assert_msg(strstr(tx, want2[k]) != NULL, "no text '%s' in the separator chart",
                      want2[k]);
    ck_assert_ptr_null(strstr(tx, "ideal gas"));
    free(tx);
    tmpdir_remove(&t);
}
END_TEST

static Suite *loopsweep_suite(void)
{
    Suite *s = suite_create("loopsweep");
    TCase *lib = tcase_create("library");
    tcase_set_timeout(lib, 120);
    tcase_add_test(lib, loop_grid_points_equal_lone_loops);
    tcase_add_test(lib, loop_grid_same_for_any_thread_count);
    tcase_add_test(lib, loop_grid_trends);
    tcase_add_test(lib, flash_grid_points_equal_lone_flashes);
    tcase_add_test(lib, flash_grid_refuses_a_model_without_liquid);
    suite_add_tcase(s, lib);
    TCase *cli = tcase_create("program");
    tcase_set_timeout(cli, 120);
    tcase_add_test(cli, sweep_loop_csv_matches_kphi_loop);
    tcase_add_test(cli, sweep_loop_production_holds_the_design_makeup);
    tcase_add_test(cli, sweep_loop_same_for_any_thread_count);
    tcase_add_test(cli, sweep_loop_json_lines);
    tcase_add_test(cli, sweep_flash_rows_are_kphi_flash);
    tcase_add_test(cli, sweep_flash_same_for_any_thread_count);
    tcase_add_test(cli, loop_diagram_texts);
    tcase_add_test(cli, loop_diagram_makeup_at_separator);
    tcase_add_test(cli, sweep_charts_texts);
    suite_add_tcase(s, cli);
    return s;
}

KPHI_TEST_MAIN(loopsweep_suite)
