/* Tests of kphi case: loading cases, command-line overrides, feed parsing, sweep grids and
 * every error path with its exact file:line:column. Small cases are written into a
 * temporary directory and name the shipped reaction sets by absolute path; the shipped
 * cases and the bad-input catalogue (tests/bad/case_*) are loaded as they are. Run from
 * the repository root.
 *
 * Unit factors used in expected values: 1 bar = 1e5 Pa, 1 atm = 101325 Pa,
 * T/K = t/degC + 273.15, T/K = (t/degF + 459.67)/1.8, 1 psi = 6894.757293168361 Pa
 * (NIST SP 811, Thompson & Taylor 2008, appendix B.8; from memory, exact by
 * definition). */
#include "kphi/case.h"

#include <dirent.h>
#include <limits.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "kphi/rxnset.h"
#include "testutil.h"

#define PSI 6894.757293168361 /* Pa */

/* ---------------------------------------------------------------- helpers */

typedef struct {
    char dir[64];
    char rx[PATH_MAX]; /* absolute path of the repository's reactions/ */
    char files[8][PATH_MAX + 64];
    size_t n;
} tmpdir;

static void tmp_init(tmpdir *t)
{
    memset(t, 0, sizeof *t);
    strcpy(t->dir, "/tmp/kphi_test_case_XXXXXX");
    ck_assert_ptr_nonnull(mkdtemp(t->dir));
    ck_assert_ptr_nonnull(getcwd(t->rx, sizeof t->rx - 16));
    strcat(t->rx, "/reactions");
}

static const char *tmp_write(tmpdir *t, const char *name, const char *text)
{
    ck_assert_uint_lt(t->n, 8);
    char *path = t->files[t->n++];
    char dir[sizeof t->dir];
    memcpy(dir, t->dir, sizeof dir);
    snprintf(path, sizeof t->files[0], "%s/%s", dir, name);
    FILE *f = fopen(path, "w");
    ck_assert_ptr_nonnull(f);
    fputs(text, f);
    ck_assert_int_eq(fclose(f), 0);
    return path;
}

static void tmp_done(tmpdir *t)
{
    for (size_t i = 0; i < t->n; i++)
        unlink(t->files[i]);
    rmdir(t->dir);
}

/* Write case.yaml: line 1 names <repo>/reactions/<set>, `body` starts on line 2. */
static const char *write_case(tmpdir *t, const char *set, const char *body)
{
    size_t n = strlen(t->rx) + strlen(set) + strlen(body) + 16;
    char *text = malloc(n);
    ck_assert_ptr_nonnull(text);
    snprintf(text, n, "reactions: %s/%s\n%s", t->rx, set, body);
    const char *path = tmp_write(t, "case.yaml", text);
    free(text);
    return path;
}

static kphi_case *load_body(tmpdir *t, const char *body, kphi_error *err)
{
    kphi_error_clear(err);
    return kphi_case_load_file(write_case(t, "ammonia.yaml", body), err);
}

static void check_error(const kphi_error *err, kphi_status code, const char *path, long line,
                        long column, const char *msg)
{
    ck_assert_int_eq(err->code, code);
    ck_assert_str_eq(err->path, path);
    ck_assert_msg(err->line == line && err->column == column, "at %ld:%ld, want %ld:%ld (%s)",
                  err->line, err->column, line, column, err->msg);
    ck_assert_str_eq(err->msg, msg);
}

/* Load body (reactions: line first) and expect a load error at line:column. */
static void load_fails(const char *body, kphi_status code, long line, long column,
                       const char *msg)
{
    tmpdir t;
    tmp_init(&t);
    kphi_error err;
    kphi_case *c = load_body(&t, body, &err);
    ck_assert_ptr_null(c);
    check_error(&err, code, t.files[0], line, column, msg);
    tmp_done(&t);
}

/* Load body fine, then expect kphi_case_validate() to fail at line:column. */
static void validate_fails(const char *body, long line, long column, const char *msg)
{
    tmpdir t;
    tmp_init(&t);
    kphi_error err;
    kphi_case *c = load_body(&t, body, &err);
    ck_assert_msg(c != NULL, "load: %s", err.msg);
    ck_assert_int_eq(kphi_case_validate(c, &err), KPHI_EINPUT);
    check_error(&err, KPHI_EINPUT, t.files[0], line, column, msg);
    kphi_case_free(c);
    tmp_done(&t);
}

static size_t idx(const kphi_case *c, const char *name)
{
    long i = kphi_rxnset_species_index(kphi_case_rxnset(c), name);
    ck_assert_msg(i >= 0, "no species %s", name);
    return (size_t)i;
}

/* ---------------------------------------------------------------- shipped cases */

START_TEST(ammonia_converter)
{
    kphi_error err;
    kphi_error_clear(&err);
    kphi_case *c = kphi_case_load_file("cases/ammonia_converter.yaml", &err);
    ck_assert_msg(c != NULL, "%s", err.msg);
    ck_assert_int_eq(kphi_case_validate(c, &err), KPHI_OK);
    ck_assert_str_eq(kphi_case_path(c), "cases/ammonia_converter.yaml");
    ck_assert_double_eq_tol(kphi_case_T(c), 723.15, 1e-9); /* 450 C */
    ck_assert_double_eq_tol(kphi_case_P(c), 195e5, 1e-6);  /* 195 bar */
    ck_assert_str_eq(kphi_case_T_unit(c), "C");
    ck_assert_str_eq(kphi_case_P_unit(c), "bar");
    ck_assert_int_eq(kphi_case_eos(c), KPHI_EOS_PR);
    ck_assert_int_eq(kphi_case_quantum(c), 0);
    const double *feed = kphi_case_feed(c);
    ck_assert_double_eq_tol(feed[idx(c, "H2")], 67.2, 1e-12);
    ck_assert_double_eq_tol(feed[idx(c, "N2")], 22.4, 1e-12);
    ck_assert_double_eq_tol(feed[idx(c, "NH3")], 3.1, 1e-12);
    ck_assert_double_eq_tol(feed[idx(c, "CH4")], 4.6, 1e-12);
    ck_assert_double_eq_tol(feed[idx(c, "Ar")], 2.7, 1e-12);
    /* 380 C to 520 C in steps of 10 C: 15 points, both ends included */
    ck_assert_uint_eq(kphi_case_sweep_n_T(c), 15);
    const double *T = kphi_case_sweep_T(c);
    for (size_t k = 0; k < 15; k++)
        ck_assert_double_eq_tol(T[k], 653.15 + 10.0 * (double)k, 1e-9);
    ck_assert(T[14] == 520.0 + 273.15); /* the last point is `to` exactly */
    ck_assert_uint_eq(kphi_case_sweep_n_P(c), 5);
    const double *P = kphi_case_sweep_P(c);
    for (size_t k = 0; k < 5; k++)
        ck_assert_double_eq_tol(P[k], 100e5 + 50e5 * (double)k, 1e-6);

    kphi_eos *eos = kphi_case_make_eos(c, kphi_case_eos(c), &err);
    ck_assert_msg(eos != NULL, "%s", err.msg);
    ck_assert_int_eq(kphi_eos_get_model(eos), KPHI_EOS_PR);
    ck_assert_uint_eq(kphi_eos_size(eos), kphi_rxnset_n_species(kphi_case_rxnset(c)));
    kphi_eos_free(eos);
    eos = kphi_case_make_eos(c, KPHI_EOS_IDEAL, &err);
    ck_assert_ptr_nonnull(eos);
    ck_assert_int_eq(kphi_eos_get_model(eos), KPHI_EOS_IDEAL);
    kphi_eos_free(eos);
    kphi_case_free(c);
}
END_TEST

START_TEST(methanol_converter)
{
    kphi_error err;
    kphi_error_clear(&err);
    kphi_case *c = kphi_case_load_file("cases/methanol_converter.yaml", &err);
    ck_assert_msg(c != NULL, "%s", err.msg);
    ck_assert_int_eq(kphi_case_validate(c, &err), KPHI_OK);
    ck_assert_double_eq_tol(kphi_case_T(c), 523.15, 1e-9); /* 250 C */
    ck_assert_double_eq_tol(kphi_case_P(c), 80e5, 1e-6);
    const double *feed = kphi_case_feed(c);
    ck_assert_double_eq_tol(feed[idx(c, "CO")], 9.8, 1e-12);
    ck_assert_double_eq_tol(feed[idx(c, "CO2")], 3.6, 1e-12);
    ck_assert_double_eq_tol(feed[idx(c, "H2")], 70.5, 1e-12);
    ck_assert_double_eq_tol(feed[idx(c, "CH3OH")], 0.6, 1e-12);
    ck_assert_uint_eq(kphi_case_sweep_n_T(c), 11); /* 200, 210, ..., 300 C */
    ck_assert(kphi_case_sweep_T(c)[10] == 300.0 + 273.15);
    ck_assert_double_eq_tol(kphi_case_sweep_T(c)[0], 473.15, 1e-9);
    ck_assert_uint_eq(kphi_case_sweep_n_P(c), 6);
    ck_assert_double_eq_tol(kphi_case_sweep_P(c)[5], 100e5, 1e-6);
    kphi_eos *eos = kphi_case_make_eos(c, KPHI_EOS_SRK, &err);
    ck_assert_msg(eos != NULL, "%s", err.msg);
    kphi_eos_free(eos);
    kphi_case_free(c);
}
END_TEST

/* ---------------------------------------------------------------- loading */

START_TEST(minimal_case_defaults)
{
    tmpdir t;
    tmp_init(&t);
    kphi_error err;
    kphi_case *c = load_body(&t, "feed: {N2: 1, H2: 3}\n", &err);
    ck_assert_msg(c != NULL, "%s", err.msg);
    ck_assert(isnan(kphi_case_T(c)));
    ck_assert(isnan(kphi_case_P(c)));
    ck_assert_str_eq(kphi_case_T_unit(c), "K"); /* defaults when not written */
    ck_assert_str_eq(kphi_case_P_unit(c), "bar");
    ck_assert_int_eq(kphi_case_eos(c), KPHI_EOS_PR);
    ck_assert_int_eq(kphi_case_quantum(c), 0);
    ck_assert_str_eq(kphi_case_name(c), "case"); /* no 'name': the stem of case.yaml */
    /* only the k_ij file's entries (reactions/kij.yaml beside the set), all 0 for now */
    for (size_t m = 0; m < kphi_case_n_kij(c); m++) {
        kphi_case_kij_entry k;
        ck_assert_int_eq(kphi_case_kij(c, m, &k), KPHI_OK);
        ck_assert_int_eq(k.from_file, 1);
        ck_assert_double_eq(k.value, 0.0);
    }
    ck_assert_double_eq(kphi_case_feed(c)[idx(c, "NH3")], 0.0);
    /* no sweep: one point, the case's T and P */
    ck_assert_int_eq(kphi_case_set_T(c, "673.15 K", &err), KPHI_OK);
    ck_assert_int_eq(kphi_case_set_P(c, "23.7 MPa", &err), KPHI_OK);
    ck_assert_uint_eq(kphi_case_sweep_n_T(c), 1);
    ck_assert_uint_eq(kphi_case_sweep_n_P(c), 1);
    ck_assert_double_eq_tol(kphi_case_sweep_T(c)[0], 673.15, 1e-12);
    ck_assert_double_eq_tol(kphi_case_sweep_P(c)[0], 2.37e7, 1e-6);
    ck_assert_str_eq(kphi_case_T_unit(c), "K");
    ck_assert_str_eq(kphi_case_P_unit(c), "MPa");
    ck_assert_int_eq(kphi_case_validate(c, &err), KPHI_OK);
    kphi_case_free(c);
    tmp_done(&t);
}
END_TEST

/* A set that recommends a model (key eos) gives it to cases that name none; a case's own
 * eos and the command line override it. */
START_TEST(set_recommends_a_model)
{
    tmpdir t;
    tmp_init(&t);
    char set[PATH_MAX + 256], body[2 * PATH_MAX + 128];
    snprintf(set, sizeof set,
             "name: ammonia, recommending bbv\nspecies_file: %s/species.yaml\n"
             "species: [N2, H2, NH3]\nreactions:\n  - N2 + 3 H2 = 2 NH3\neos: bbv\n",
             t.rx);
    const char *sp = tmp_write(&t, "set.yaml", set);
    kphi_error err;
    for (int k = 0; k < 2; k++) {
        snprintf(body, sizeof body, "reactions: %s\nfeed: {N2: 1, H2: 3}\n%s", sp,
                 k == 0 ? "" : "eos: srk\n");
        kphi_error_clear(&err);
        kphi_case *c = kphi_case_load_file(tmp_write(&t, k == 0 ? "a.yaml" : "b.yaml", body),
                                           &err);
        ck_assert_msg(c != NULL, "%s", err.msg);
        ck_assert_int_eq(kphi_case_eos(c), k == 0 ? KPHI_EOS_BBV : KPHI_EOS_SRK);
        ck_assert_int_eq(kphi_case_set_eos(c, "pr", &err), KPHI_OK);
        ck_assert_int_eq(kphi_case_eos(c), KPHI_EOS_PR);
        kphi_case_free(c);
    }
    tmp_done(&t);
}
END_TEST

START_TEST(full_schema)
{
    tmpdir t;
    tmp_init(&t);
    kphi_error err;
    kphi_case *c = load_body(&t,
                             "name: \"loop B, test\"\n"
                             "feed:\n"
                             "  N2: 24.0\n"
                             "  H2: 72.0\n"
                             "  Ar: 1e-15\n"
                             "T: 842 degF\n"
                             "P: 2885.3 psig\n"
                             "eos: SRK\n"
                             "quantum: yes\n"
                             "kij:\n"
                             "  - {pair: [N2, H2], value: 0.083, source: \"invented for a test\"}\n"
                             "  - {pair: [Ar, NH3], value: -0.01}\n"
                             "sweep:\n"
                             "  T: \"350:550:10C\"\n"
                             "  P: 150 bar\n",
                             &err);
    ck_assert_msg(c != NULL, "%s", err.msg);
    ck_assert_double_eq_tol(kphi_case_T(c), 723.15, 1e-9);
    ck_assert_double_eq_tol(kphi_case_P(c), 2885.3 * PSI + 101325.0, 1e-6);
    ck_assert_str_eq(kphi_case_T_unit(c), "F");
    ck_assert_str_eq(kphi_case_P_unit(c), "psig");
    ck_assert_int_eq(kphi_case_eos(c), KPHI_EOS_SRK);
    ck_assert_int_eq(kphi_case_quantum(c), 1);
    ck_assert_double_eq_tol(kphi_case_feed(c)[idx(c, "Ar")], 1e-15, 1e-30); /* legal */
    ck_assert_uint_eq(kphi_case_sweep_n_T(c), 21);
    ck_assert(kphi_case_sweep_T(c)[20] == 550.0 + 273.15);
    ck_assert_uint_eq(kphi_case_sweep_n_P(c), 1);
    ck_assert_double_eq_tol(kphi_case_sweep_P(c)[0], 150e5, 1e-6);
    ck_assert_int_eq(kphi_case_validate(c, &err), KPHI_OK);
    kphi_eos *eos = kphi_case_make_eos(c, KPHI_EOS_PR, &err);
    ck_assert_msg(eos != NULL, "%s", err.msg);
    ck_assert_double_eq_tol(kphi_eos_get_kij(eos, idx(c, "H2"), idx(c, "N2")), 0.083, 1e-15);
    ck_assert_double_eq_tol(kphi_eos_get_kij(eos, idx(c, "NH3"), idx(c, "Ar")), -0.01, 1e-15);
    kphi_eos_free(eos);
    ck_assert_str_eq(kphi_case_name(c), "loop B, test");
    /* the k_ij file's entries first (those the case does not replace), then the case's */
    size_t nk = kphi_case_n_kij(c), first = 0;
    while (first < nk) {
        kphi_case_kij_entry e;
        ck_assert_int_eq(kphi_case_kij(c, first, &e), KPHI_OK);
        if (!e.from_file)
            break;
        ck_assert(!(e.i == idx(c, "N2") && e.j == idx(c, "H2")) &&
                  !(e.i == idx(c, "H2") && e.j == idx(c, "N2")));
        first++;
    }
    ck_assert_uint_eq(nk - first, 2);
    kphi_case_kij_entry k;
    ck_assert_int_eq(kphi_case_kij(c, first, &k), KPHI_OK);
    ck_assert_uint_eq(k.i, idx(c, "N2"));
    ck_assert_uint_eq(k.j, idx(c, "H2"));
    ck_assert_double_eq(k.value, 0.083);
    ck_assert_str_eq(k.source, "invented for a test");
    ck_assert_int_eq(k.from_case, 1);
    ck_assert_int_eq(kphi_case_kij(c, first + 1, &k), KPHI_OK);
    ck_assert_ptr_null(k.source); /* none given */
    ck_assert_int_eq(kphi_case_kij(c, first + 2, &k), KPHI_EINPUT);
    kphi_case_free(c);
    tmp_done(&t);
}
END_TEST

START_TEST(kij_in_effect_set_then_case)
{
    /* the set's k_ij with their sources, one replaced by the case's for the same pair
     * (written the other way round), and the case's own pair after them */
    tmpdir t;
    tmp_init(&t);
    char set_text[PATH_MAX + 512];
    snprintf(set_text, sizeof set_text,
             "name: test set\n"
             "species_file: %s/species.yaml\n"
             "species: [N2, H2, NH3, CH4, Ar]\n"
             "reactions: [N2 + 3 H2 = 2 NH3]\n"
             "conversion: N2\n"
             "kij:\n"
             "  - {pair: [N2, H2], value: 0.05, source: \"invented for a test, A\"}\n"
             "  - {pair: [CH4, N2], value: 0.03, source: \"invented for a test, B\"}\n",
             t.rx);
    const char *set = tmp_write(&t, "set.yaml", set_text);
    char case_text[PATH_MAX + 512];
    snprintf(case_text, sizeof case_text,
             "reactions: %s\nfeed: {N2: 1, H2: 3}\nT: 700 K\nP: 100 bar\n"
             "kij: [{pair: [H2, N2], value: -0.02, source: \"invented, C\"}, "
             "{pair: [Ar, NH3], value: 0.1}]\n",
             set);
    kphi_error err;
    kphi_error_clear(&err);
    kphi_case *c = kphi_case_load_file(tmp_write(&t, "loop 7.yaml", case_text), &err);
    ck_assert_msg(c != NULL, "%s", err.msg);
    ck_assert_str_eq(kphi_case_name(c), "loop 7");
    ck_assert_uint_eq(kphi_case_n_kij(c), 3);
    kphi_case_kij_entry k[3];
    for (size_t m = 0; m < 3; m++)
        ck_assert_int_eq(kphi_case_kij(c, m, &k[m]), KPHI_OK);
    ck_assert_uint_eq(k[0].i, idx(c, "CH4")); /* the set's, not overridden */
    ck_assert_double_eq(k[0].value, 0.03);
    ck_assert_str_eq(k[0].source, "invented for a test, B");
    ck_assert_int_eq(k[0].from_case, 0);
    ck_assert_uint_eq(k[1].i, idx(c, "H2")); /* the case's value for N2-H2 */
    ck_assert_double_eq(k[1].value, -0.02);
    ck_assert_str_eq(k[1].source, "invented, C");
    ck_assert_int_eq(k[1].from_case, 1);
    ck_assert_double_eq(k[2].value, 0.1);
    /* the values the EOS gets are the ones listed */
    kphi_eos *eos = kphi_case_make_eos(c, KPHI_EOS_PR, &err);
    ck_assert_ptr_nonnull(eos);
    for (size_t m = 0; m < 3; m++)
        ck_assert_double_eq(kphi_eos_get_kij(eos, k[m].i, k[m].j), k[m].value);
    kphi_eos_free(eos);
    kphi_case_free(c);
    tmp_done(&t);
}
END_TEST

START_TEST(load_errors)
{
    load_fails("feeds: {N2: 1, H2: 3}\n", KPHI_EINPUT, 2, 1,
               "unknown key 'feeds' in the case file (did you mean 'feed'?)");
    load_fails("feed: {N2: 1, H3: 3}\n", KPHI_EINPUT, 2, 15,
               "unknown species 'H3' in the feed (did you mean 'H2'?)");
    load_fails("feed: {N2: 1, Xe: 3}\n", KPHI_EINPUT, 2, 15,
               "unknown species 'Xe' in the feed; the reaction set has N2, H2, NH3, CH4, Ar");
    load_fails("feed: {N2: 1, N2: 3}\n", KPHI_EINPUT, 2, 15,
               "species 'N2' given twice in the feed");
    load_fails("feed: {N2: 1, H2: -3}\n", KPHI_EINPUT, 2, 19,
               "the feed amount of 'H2' must be zero or positive, found '-3'");
    load_fails("feed: {N2: 1, H2: .nan}\n", KPHI_EINPUT, 2, 19,
               "expected a number for the feed amount of 'H2', found '.nan'");
    load_fails("feed: {N2: 1, H2: nan}\n", KPHI_EINPUT, 2, 19,
               "the feed amount of 'H2' must be a finite number, found 'nan'");
    load_fails("feed: {N2: 1, H2: [3]}\n", KPHI_EINPUT, 2, 19,
               "expected a single value for the feed amount of 'H2', found a list");
    load_fails("feed: [N2, H2]\n", KPHI_EINPUT, 2, 7,
               "expected a mapping for 'feed' (species: amount), found a list");
    load_fails("T: [450 C]\n", KPHI_EINPUT, 2, 4,
               "expected a single value for 'T' (e.g. 450 C), found a list");
    load_fails("T: 450\n", KPHI_EINPUT, 2, 4,
               "'450' has no unit; write e.g. '450 C' or '723.15 K'");
    load_fails("T: '450 Z'\n", KPHI_EINPUT, 2, 9,
               "unknown temperature unit 'Z' in '450 Z'; expected K, C, F or R");
    load_fails("P: 20 mPa\n", KPHI_EINPUT, 2, 7,
               "unknown pressure unit 'mPa' in '20 mPa' (did you mean 'MPa'?)");
    load_fails("P: -1.5 barg\n", KPHI_EINPUT, 2, 4,
               "pressure '-1.5 barg' is -48675 Pa absolute; it must be above zero");
    load_fails("eos: prr\n", KPHI_EINPUT, 2, 6,
               "unknown equation of state 'prr'; did you mean 'pr'? (expected one of: ideal, "
               "virial, rk, srk, pr, bb, bbv)");
    load_fails("eos: {pr: 1}\n", KPHI_EINPUT, 2, 6,
               "expected a single value for 'eos' (e.g. pr), found a mapping");
    load_fails("quantum: maybe\n", KPHI_EINPUT, 2, 10,
               "expected true or false for 'quantum', found 'maybe'");
    load_fails("name: [a]\n", KPHI_EINPUT, 2, 7,
               "expected a single value for 'name', found a list");
}
END_TEST

START_TEST(kij_errors)
{
    load_fails("kij: {pair: [N2, H2]}\n", KPHI_EINPUT, 2, 6,
               "expected a list for 'kij' (a list of {pair: [A, B], value: k}), found a mapping");
    load_fails("kij: [{pair: [N2, H2], vale: 0.1}]\n", KPHI_EINPUT, 2, 24,
               "unknown key 'vale' in a 'kij' entry (did you mean 'value'?)");
    load_fails("kij: [{pair: [N2, H2]}]\n", KPHI_EINPUT, 2, 7,
               "a 'kij' entry needs 'pair' and 'value', e.g. {pair: [N2, H2], value: 0.0}");
    load_fails("kij: [{pair: [N2, H3], value: 0.1}]\n", KPHI_EINPUT, 2, 19,
               "unknown species 'H3' in 'kij' (did you mean 'H2'?)");
    load_fails("kij: [{pair: [N2, N2], value: 0.1}]\n", KPHI_EINPUT, 2, 14,
               "'pair' names N2 twice; k_ij is between two different species");
    load_fails("kij: [{pair: [N2, H2, Ar], value: 0.1}]\n", KPHI_EINPUT, 2, 14,
               "'pair' names 3 species; expected two, e.g. [N2, H2]");
    load_fails("kij: [{pair: N2, value: 0.1}]\n", KPHI_EINPUT, 2, 14,
               "expected a list for 'pair' (two species), found a single value");
    load_fails("kij: [{pair: [N2, H2], value: x}]\n", KPHI_EINPUT, 2, 31,
               "expected a number for 'value' of a 'kij' entry, found 'x'");
    load_fails("kij: [{pair: [N2, H2], value: 0.1, source: [a]}]\n", KPHI_EINPUT, 2, 44,
               "expected a single value for 'source' of a 'kij' entry, found a list");
    load_fails("kij:\n"
               "  - {pair: [N2, H2], value: 0.1}\n"
               "  - {pair: [H2, N2], value: 0.2}\n",
               KPHI_EINPUT, 4, 12, "k_ij of H2-N2 given twice");
}
END_TEST

START_TEST(file_errors)
{
    tmpdir t;
    tmp_init(&t);
    kphi_error err;
    kphi_error_clear(&err);

    /* the case file itself is missing */
    char missing[PATH_MAX + 32];
    snprintf(missing, sizeof missing, "%s/none.yaml", t.dir);
    ck_assert_ptr_null(kphi_case_load_file(missing, &err));
    ck_assert_int_eq(err.code, KPHI_EIO);
    ck_assert_str_eq(err.path, missing);
    ck_assert_str_eq(err.msg, "cannot open: No such file or directory");

    /* the reaction set is missing: reported at the `reactions:` value */
    const char *p = tmp_write(&t, "case.yaml", "# a case\nreactions: 'amonia.yaml'\n");
    kphi_error_clear(&err);
    ck_assert_ptr_null(kphi_case_load_file(p, &err));
    check_error(&err, KPHI_EIO, p, 2, 13,
                "cannot open 'amonia.yaml': No such file or directory");

    /* a directory is not a reaction set */
    p = tmp_write(&t, "dir.yaml", "reactions: .\n");
    kphi_error_clear(&err);
    ck_assert_ptr_null(kphi_case_load_file(p, &err));
    check_error(&err, KPHI_EIO, p, 1, 12, "cannot open '.': not a regular file");

    p = tmp_write(&t, "nores.yaml", "# nothing\nT: 450 C\n");
    kphi_error_clear(&err);
    ck_assert_ptr_null(kphi_case_load_file(p, &err));
    check_error(&err, KPHI_EINPUT, p, 1, 1,
                "missing 'reactions': name the reaction set, e.g. 'reactions: "
                "../reactions/ammonia.yaml' (relative to the case file)");

    p = tmp_write(&t, "list.yaml", "- reactions\n- feed\n");
    kphi_error_clear(&err);
    ck_assert_ptr_null(kphi_case_load_file(p, &err));
    check_error(&err, KPHI_EINPUT, p, 1, 1, "expected a mapping for the case file, found a list");

    p = tmp_write(&t, "rlist.yaml", "reactions: [a, b]\n");
    kphi_error_clear(&err);
    ck_assert_ptr_null(kphi_case_load_file(p, &err));
    check_error(&err, KPHI_EINPUT, p, 1, 12,
                "expected a single value for 'reactions' (a file name), found a list");

    p = tmp_write(&t, "empty.yaml", "# only a comment\n");
    kphi_error_clear(&err);
    ck_assert_ptr_null(kphi_case_load_file(p, &err));
    check_error(&err, KPHI_EINPUT, p, 1, 1, "file is empty");

    /* NULL err and NULL path are allowed */
    ck_assert_ptr_null(kphi_case_load_file(p, NULL));
    ck_assert_ptr_null(kphi_case_load_file(NULL, NULL));
    kphi_case_free(NULL);
    tmp_done(&t);
}
END_TEST

/* ---------------------------------------------------------------- validation */

START_TEST(validate_errors)
{
    validate_fails("feed: {N2: 1, H2: 3}\nP: 200 bar\n", 1, 1,
                   "missing T: add 'T: 450 C' to the case or pass --T");
    validate_fails("feed: {N2: 1, H2: 3}\nT: 450 C\n", 1, 1,
                   "missing P: add 'P: 200 bar' to the case or pass --P");
    validate_fails("T: 450 C\nP: 200 bar\n", 1, 1,
                   "missing feed: add 'feed: {NAME: AMOUNT, ...}' to the case or pass --feed");
    validate_fails("feed: {N2: 0, H2: 0.0}\nT: 450 C\nP: 200 bar\n", 2, 7,
                   "the feed is all zero; give a positive amount of at least one reacting "
                   "species (N2, H2, NH3)");
    validate_fails("feed: {}\nT: 450 C\nP: 200 bar\n", 2, 7,
                   "the feed is all zero; give a positive amount of at least one reacting "
                   "species (N2, H2, NH3)");
    validate_fails("feed:\n  CH4: 2.5\n  Ar: 1.5\n  H2: 0\nT: 450 C\nP: 200 bar\n", 3, 3,
                   "the feed holds only inert species; give a positive amount of at least one "
                   "reacting species (N2, H2, NH3)");
    validate_fails("feed: {N2: 1, H2: 3}\nT: 150 K\nP: 200 bar\n", 3, 4,
                   "T = 150 K is outside the data range of N2 (200-6000 K)");
    validate_fails("feed: {N2: 1, H2: 3}\nT: 450 C\nP: 200 bar\n"
                   "sweep: {T: [450 C, 6000 C]}\n",
                   5, 20, "T = 6273.15 K is outside the data range of N2 (200-6000 K)");
    /* a range is checked at its ends: `from` ... */
    validate_fails("feed: {N2: 1, H2: 3}\nT: 450 C\nP: 200 bar\n"
                   "sweep: {T: {from: 100 K, to: 800 K, step: 50 K}}\n",
                   5, 19, "T = 100 K is outside the data range of N2 (200-6000 K)");
    /* ... and `to` */
    validate_fails("feed: {N2: 1, H2: 3}\nT: 450 C\nP: 200 bar\n"
                   "sweep: {T: {from: 5000 K, to: 7000 K, step: 500 K}}\n",
                   5, 31, "T = 7000 K is outside the data range of N2 (200-6000 K)");
    /* one species alone is fine; 1e-15 of one reacting species is enough */
    tmpdir t;
    tmp_init(&t);
    kphi_error err;
    kphi_case *c = load_body(&t, "feed: {NH3: 1, Ar: 0}\nT: 450 C\nP: 200 bar\n", &err);
    ck_assert_ptr_nonnull(c);
    ck_assert_int_eq(kphi_case_validate(c, &err), KPHI_OK);
    ck_assert_int_eq(kphi_case_set_feed(c, "CH4=5,H2=1e-15", &err), KPHI_OK);
    ck_assert_int_eq(kphi_case_validate(c, &err), KPHI_OK);
    /* overrides are reported at "<command line>" */
    ck_assert_int_eq(kphi_case_set_feed(c, "CH4=5, Ar=1", &err), KPHI_OK);
    ck_assert_int_eq(kphi_case_validate(c, &err), KPHI_EINPUT);
    check_error(&err, KPHI_EINPUT, "<command line>", 1, 1,
                "the feed holds only inert species; give a positive amount of at least one "
                "reacting species (N2, H2, NH3)");
    ck_assert_int_eq(kphi_case_set_feed(c, "N2=1,H2=3", &err), KPHI_OK);
    ck_assert_int_eq(kphi_case_set_T(c, "6100 K", &err), KPHI_OK);
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_case_validate(c, &err), KPHI_EINPUT);
    check_error(&err, KPHI_EINPUT, "<command line>", 1, 1,
                "T = 6100 K is outside the data range of N2 (200-6000 K)");
    ck_assert_int_eq(kphi_case_set_T(c, "450 C", &err), KPHI_OK);
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_case_set_sweep_T(c, "450C, 6500 C", &err), KPHI_OK);
    ck_assert_int_eq(kphi_case_validate(c, &err), KPHI_EINPUT);
    check_error(&err, KPHI_EINPUT, "<command line>", 1, 7,
                "T = 6773.15 K is outside the data range of N2 (200-6000 K)");
    kphi_case_free(c);
    tmp_done(&t);
}
END_TEST

/* ---------------------------------------------------------------- overrides */

START_TEST(overrides)
{
    kphi_error err;
    kphi_error_clear(&err);
    kphi_case *c = kphi_case_load_file("cases/ammonia_converter.yaml", &err);
    ck_assert_ptr_nonnull(c);
    ck_assert_int_eq(kphi_case_set_T(c, "500F", &err), KPHI_OK);
    ck_assert_double_eq_tol(kphi_case_T(c), (500.0 + 459.67) / 1.8, 1e-9);
    ck_assert_str_eq(kphi_case_T_unit(c), "F");
    ck_assert_int_eq(kphi_case_set_P(c, "300atm", &err), KPHI_OK);
    ck_assert_double_eq_tol(kphi_case_P(c), 300.0 * 101325.0, 1e-6);
    ck_assert_str_eq(kphi_case_P_unit(c), "atm");
    ck_assert_int_eq(kphi_case_set_eos(c, "Virial", &err), KPHI_OK);
    ck_assert_int_eq(kphi_case_eos(c), KPHI_EOS_VIRIAL);
    kphi_case_set_quantum(c, 1);
    ck_assert_int_eq(kphi_case_quantum(c), 1);
    kphi_case_set_quantum(c, 0);
    ck_assert_int_eq(kphi_case_quantum(c), 0);
    ck_assert_int_eq(kphi_case_set_feed(c, "N2=1,H2=3,Ar=0.05", &err), KPHI_OK);
    const double *f = kphi_case_feed(c);
    ck_assert_double_eq(f[idx(c, "N2")], 1.0);
    ck_assert_double_eq(f[idx(c, "H2")], 3.0);
    ck_assert_double_eq(f[idx(c, "Ar")], 0.05);
    ck_assert_double_eq(f[idx(c, "CH4")], 0.0); /* replaced, not merged */
    ck_assert_double_eq(f[idx(c, "NH3")], 0.0);
    ck_assert_int_eq(kphi_case_set_feed(c, " NH3 = 2.5e-1 , N2=0 ", &err), KPHI_OK);
    ck_assert_double_eq(kphi_case_feed(c)[idx(c, "NH3")], 0.25);
    ck_assert_double_eq(kphi_case_feed(c)[idx(c, "H2")], 0.0);
    ck_assert_int_eq(kphi_case_validate(c, &err), KPHI_OK);
    kphi_case_free(c);
}
END_TEST

/* Run one override on the ammonia case and check the error at "<command line>":1:column. */
typedef int (*setter)(kphi_case *, const char *, kphi_error *);

static void override_fails(setter fn, const char *text, long column, const char *msg)
{
    kphi_error err;
    kphi_error_clear(&err);
    kphi_case *c = kphi_case_load_file("cases/ammonia_converter.yaml", &err);
    ck_assert_ptr_nonnull(c);
    double feed0 = kphi_case_feed(c)[idx(c, "N2")];
    size_t nT = kphi_case_sweep_n_T(c), nP = kphi_case_sweep_n_P(c);
    double T = kphi_case_T(c), P = kphi_case_P(c);
    ck_assert_int_eq(fn(c, text, &err), KPHI_EINPUT);
    check_error(&err, KPHI_EINPUT, "<command line>", 1, column, msg);
    /* nothing changed */
    ck_assert(kphi_case_feed(c)[idx(c, "N2")] == feed0);
    ck_assert_uint_eq(kphi_case_sweep_n_T(c), nT);
    ck_assert_uint_eq(kphi_case_sweep_n_P(c), nP);
    ck_assert(kphi_case_T(c) == T && kphi_case_P(c) == P);
    ck_assert_int_eq(kphi_case_eos(c), KPHI_EOS_PR);
    kphi_case_free(c);
}

START_TEST(override_errors)
{
    override_fails(kphi_case_set_T, "450", 1,
                   "'450' has no unit; write e.g. '450 C' or '723.15 K'");
    override_fails(kphi_case_set_T, "450 Z", 5,
                   "unknown temperature unit 'Z' in '450 Z'; expected K, C, F or R");
    override_fails(kphi_case_set_P, "0 bar", 1, "pressure '0 bar' must be above zero");
    override_fails(kphi_case_set_P, NULL, 1, "empty pressure; write e.g. '200 bar' or '20 MPa'");
    override_fails(kphi_case_set_eos, "pengrobinson", 1,
                   "unknown equation of state 'pengrobinson' (expected one of: ideal, virial, "
                   "rk, srk, pr, bb, bbv)");
    override_fails(kphi_case_set_feed, "N2=1,H3=3", 6,
                   "unknown species 'H3' in --feed (did you mean 'H2'?)");
    override_fails(kphi_case_set_feed, "N2=1,Xe=3", 6,
                   "unknown species 'Xe' in --feed; the reaction set has N2, H2, NH3, CH4, Ar");
    override_fails(kphi_case_set_feed, "N2=1, H2=-3", 10,
                   "the feed amount of 'H2' must be zero or positive, found '-3'");
    override_fails(kphi_case_set_feed, "N2=abc", 4,
                   "expected a number for the feed amount of 'N2', found 'abc'");
    override_fails(kphi_case_set_feed, "N2=", 4,
                   "expected a number for the feed amount of 'N2', found ''");
    override_fails(kphi_case_set_feed, "N2=1, H2= inf", 11,
                   "the feed amount of 'H2' must be a finite number, found 'inf'");
    override_fails(kphi_case_set_feed, "N2=1,H2", 6, "expected NAME=AMOUNT in --feed, found 'H2'");
    override_fails(kphi_case_set_feed, "N2=1,=3", 6, "expected NAME=AMOUNT in --feed, found '=3'");
    override_fails(kphi_case_set_feed, "N2=1,,H2=3", 6,
                   "empty item in --feed; expected NAME=AMOUNT");
    override_fails(kphi_case_set_feed, "N2=1,H2=3,", 11,
                   "empty item in --feed; expected NAME=AMOUNT");
    override_fails(kphi_case_set_feed, "N2=1,N2=2", 6, "species 'N2' given twice in --feed");
    override_fails(kphi_case_set_feed, "  ", 1,
                   "empty --feed; expected NAME=AMOUNT,..., e.g. 'N2=1,H2=3'");
}
END_TEST

/* ---------------------------------------------------------------- sweep grids */

static kphi_case *ammonia(void)
{
    kphi_case *c = kphi_case_load_file("cases/ammonia_converter.yaml", NULL);
    ck_assert_ptr_nonnull(c);
    return c;
}

START_TEST(K_basis_key_and_override)
{
    tmpdir t;
    tmp_init(&t);
    kphi_error err;
    /* default: tables */
    kphi_case *c = load_body(&t, "feed: {N2: 1, H2: 3}\nT: 450 C\nP: 200 bar\n", &err);
    ck_assert_msg(c != NULL, "%s", err.msg);
    ck_assert_uint_eq(kphi_case_K_basis(c), KPHI_K_TABLES);
    ck_assert_int_eq(kphi_case_require_one_K(c, &err), KPHI_OK);
    /* the command line picks a basis by name, 'all', or the tables again */
    ck_assert_int_eq(kphi_case_set_K(c, "gillespie1930", &err), KPHI_OK);
    ck_assert_uint_eq(kphi_case_K_basis(c), 1);
    ck_assert_int_eq(kphi_case_set_K(c, "all", &err), KPHI_OK);
    ck_assert_uint_eq(kphi_case_K_basis(c), KPHI_CASE_K_ALL);
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_case_require_one_K(c, &err), KPHI_EINPUT);
    check_error(&err, KPHI_EINPUT, "<command line>", 1, 1,
                "K 'all' compares the K bases at one point (solve); here give one: tables or a "
                "correlation name");
    ck_assert_int_eq(kphi_case_set_K(c, "tables", &err), KPHI_OK);
    ck_assert_uint_eq(kphi_case_K_basis(c), KPHI_K_TABLES);
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_case_set_K(c, "gillespie1903", &err), KPHI_EINPUT);
    check_error(&err, KPHI_EINPUT, "<command line>", 1, 1,
                "unknown K basis 'gillespie1903' (did you mean 'gillespie1930'?)");
    ck_assert_uint_eq(kphi_case_K_basis(c), KPHI_K_TABLES); /* unchanged */
    kphi_case_free(c);
    tmp_done(&t);
    /* the case key */
    tmp_init(&t);
    c = load_body(&t, "feed: {N2: 1, H2: 3}\nT: 450 C\nP: 200 bar\nK: gillespie1930\n", &err);
    ck_assert_msg(c != NULL, "%s", err.msg);
    ck_assert_uint_eq(kphi_case_K_basis(c), 1);
    kphi_case_free(c);
    tmp_done(&t);
    tmp_init(&t);
    c = load_body(&t, "feed: {N2: 1, H2: 3}\nT: 450 C\nP: 200 bar\nK: all\n", &err);
    ck_assert_msg(c != NULL, "%s", err.msg);
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_case_require_one_K(c, &err), KPHI_EINPUT);
    check_error(&err, KPHI_EINPUT, t.files[0], 5, 4,
                "K 'all' compares the K bases at one point (solve); here give one: tables or a "
                "correlation name");
    kphi_case_free(c);
    tmp_done(&t);
    load_fails("K: graaf1986\n", KPHI_EINPUT, 2, 4,
               "unknown K basis 'graaf1986'; the reaction set 'ammonia synthesis' offers: "
               "tables, gillespie1930, all");
    load_fails("K: [tables]\n", KPHI_EINPUT, 2, 4,
               "expected a single value for 'K' (tables, a correlation name, or all), found a "
               "list");
}
END_TEST

START_TEST(range_grids)
{
    kphi_error err;
    kphi_error_clear(&err);
    kphi_case *c = ammonia();
    /* from:to:step with the unit once at the end */
    ck_assert_int_eq(kphi_case_set_sweep_T(c, "350:550:10C", &err), KPHI_OK);
    ck_assert_uint_eq(kphi_case_sweep_n_T(c), 21);
    for (size_t k = 0; k < 21; k++)
        ck_assert_double_eq_tol(kphi_case_sweep_T(c)[k], 623.15 + 10.0 * (double)k, 1e-9);
    ck_assert(kphi_case_sweep_T(c)[20] == 550.0 + 273.15);
    /* units on each part, mixed */
    ck_assert_int_eq(kphi_case_set_sweep_T(c, "623.15K : 550 C : 10 K", &err), KPHI_OK);
    ck_assert_uint_eq(kphi_case_sweep_n_T(c), 21);
    /* a step that does not reach `to`: the last point stays below it */
    ck_assert_int_eq(kphi_case_set_sweep_T(c, "350:550:15C", &err), KPHI_OK);
    ck_assert_uint_eq(kphi_case_sweep_n_T(c), 14); /* 350, 365, ..., 545 C */
    ck_assert_double_eq_tol(kphi_case_sweep_T(c)[13], 545.0 + 273.15, 1e-9);
    /* Fahrenheit steps: 18 F = 10 K */
    ck_assert_int_eq(kphi_case_set_sweep_T(c, "662:1022:18F", &err), KPHI_OK);
    ck_assert_uint_eq(kphi_case_sweep_n_T(c), 21); /* 662 F = 350 C, 1022 F = 550 C */
    ck_assert_double_eq_tol(kphi_case_sweep_T(c)[0], 623.15, 1e-9);
    ck_assert_double_eq_tol(kphi_case_sweep_T(c)[20], 823.15, 1e-9);
    /* (0.3 - 0.1)/0.1 is 1.9999999999999998 in binary: `to` is still included, exactly */
    ck_assert_int_eq(kphi_case_set_sweep_T(c, "0.1:0.3:0.1K", &err), KPHI_OK);
    ck_assert_uint_eq(kphi_case_sweep_n_T(c), 3);
    ck_assert(kphi_case_sweep_T(c)[2] == 0.3);
    ck_assert_double_eq_tol(kphi_case_sweep_T(c)[1], 0.2, 1e-15);
    /* from == to: one point */
    ck_assert_int_eq(kphi_case_set_sweep_T(c, "450:450:10C", &err), KPHI_OK);
    ck_assert_uint_eq(kphi_case_sweep_n_T(c), 1);
    /* a long grid is computed as from + k*step: no drift after 1e5 steps */
    ck_assert_int_eq(kphi_case_set_sweep_T(c, "300:400:0.001K", &err), KPHI_OK);
    ck_assert_uint_eq(kphi_case_sweep_n_T(c), 100001);
    ck_assert(kphi_case_sweep_T(c)[100000] == 400.0);
    ck_assert_double_eq_tol(kphi_case_sweep_T(c)[50000], 350.0, 1e-9);
    /* pressure ranges, gauge included */
    ck_assert_int_eq(kphi_case_set_sweep_P(c, "50:400:25bar", &err), KPHI_OK);
    ck_assert_uint_eq(kphi_case_sweep_n_P(c), 15);
    ck_assert(kphi_case_sweep_P(c)[14] == 400e5);
    ck_assert_int_eq(kphi_case_set_sweep_P(c, "0:10:5barg", &err), KPHI_OK);
    ck_assert_uint_eq(kphi_case_sweep_n_P(c), 3);
    ck_assert_double_eq_tol(kphi_case_sweep_P(c)[0], 101325.0, 1e-9);
    ck_assert_double_eq_tol(kphi_case_sweep_P(c)[2], 1101325.0, 1e-9);
    ck_assert_int_eq(err.code, KPHI_OK);
    kphi_case_free(c);
}
END_TEST

START_TEST(list_grids)
{
    kphi_error err;
    kphi_error_clear(&err);
    kphi_case *c = ammonia();
    ck_assert_int_eq(kphi_case_set_sweep_P(c, "100bar,200bar", &err), KPHI_OK);
    ck_assert_uint_eq(kphi_case_sweep_n_P(c), 2);
    ck_assert_double_eq_tol(kphi_case_sweep_P(c)[1], 200e5, 1e-6);
    /* the unit of the last item applies to bare numbers before it */
    ck_assert_int_eq(kphi_case_set_sweep_P(c, "100, 150,23.7 MPa", &err), KPHI_OK);
    ck_assert_uint_eq(kphi_case_sweep_n_P(c), 3);
    ck_assert_double_eq_tol(kphi_case_sweep_P(c)[0], 100e6, 1e-6);
    ck_assert_double_eq_tol(kphi_case_sweep_P(c)[2], 23.7e6, 1e-6);
    /* the order is kept as given */
    ck_assert_int_eq(kphi_case_set_sweep_T(c, "500 C,400 C,673.15K", &err), KPHI_OK);
    ck_assert_uint_eq(kphi_case_sweep_n_T(c), 3);
    ck_assert_double_eq_tol(kphi_case_sweep_T(c)[0], 773.15, 1e-9);
    ck_assert_double_eq_tol(kphi_case_sweep_T(c)[2], 673.15, 1e-12);
    /* a single value */
    ck_assert_int_eq(kphi_case_set_sweep_T(c, "842 degF", &err), KPHI_OK);
    ck_assert_uint_eq(kphi_case_sweep_n_T(c), 1);
    ck_assert_double_eq_tol(kphi_case_sweep_T(c)[0], 723.15, 1e-9);
    ck_assert_int_eq(err.code, KPHI_OK);
    kphi_case_free(c);
}
END_TEST

/* The unit a grid was written in is kept for display (chart labels), apart from the
 * case's own P unit. */
START_TEST(grid_units)
{
    tmpdir t;
    tmp_init(&t);
    kphi_error err;
    kphi_case *c = load_body(&t,
                             "feed: {N2: 1, H2: 3}\nT: 450 C\nP: 185 barg\n"
                             "sweep: {T: {from: 653.15 K, to: 753.15 K, step: 50 K},\n"
                             "        P: [150 bar, 200 bar, 250 bar]}\n",
                             &err);
    ck_assert_msg(c != NULL, "%s", err.msg);
    ck_assert_str_eq(kphi_case_P_unit(c), "barg");
    ck_assert_str_eq(kphi_case_sweep_P_unit(c), "bar");
    ck_assert_str_eq(kphi_case_sweep_T_unit(c), "K");
    /* command line: the unit at the end, or that of the first item */
    ck_assert_int_eq(kphi_case_set_sweep_P(c, "15:25:5MPa", &err), KPHI_OK);
    ck_assert_str_eq(kphi_case_sweep_P_unit(c), "MPa");
    ck_assert_int_eq(kphi_case_set_sweep_P(c, "2000 psig, 3000 psia", &err), KPHI_OK);
    ck_assert_str_eq(kphi_case_sweep_P_unit(c), "psig");
    ck_assert_int_eq(kphi_case_set_sweep_T(c, "380C:520C:10C", &err), KPHI_OK);
    ck_assert_str_eq(kphi_case_sweep_T_unit(c), "C");
    kphi_case_free(c);
    /* no sweep block: the case's own units */
    c = load_body(&t, "feed: {N2: 1, H2: 3}\nT: 842 F\nP: 185 barg\n", &err);
    ck_assert_msg(c != NULL, "%s", err.msg);
    ck_assert_str_eq(kphi_case_sweep_P_unit(c), "barg");
    ck_assert_str_eq(kphi_case_sweep_T_unit(c), "F");
    kphi_case_free(c);
    tmp_done(&t);
}
END_TEST

/* A reaction set with no species_file and no species.yaml beside it takes its species
 * from the caller's default; without one the error names the missing file. */
START_TEST(species_default_for_a_set_elsewhere)
{
    tmpdir t;
    tmp_init(&t);
    tmp_write(&t, "set.yaml",
              "name: own set\nspecies: [N2, H2, NH3]\nreactions:\n  - N2 + 3 H2 = 2 NH3\n");
    const char *path = tmp_write(&t, "case.yaml",
                                 "reactions: set.yaml\nfeed: {N2: 1, H2: 3}\nT: 450 C\n"
                                 "P: 200 bar\n");
    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_ptr_null(kphi_case_load_file(path, &err));
    ck_assert_ptr_nonnull(strstr(err.msg, "species.yaml"));
    kphi_error_clear(&err);
    kphi_case *c = kphi_case_load_file_default(path, KPHI_SPECIES_FILE, &err);
    ck_assert_msg(c != NULL, "%s", err.msg);
    ck_assert_uint_eq(kphi_rxnset_n_species(kphi_case_rxnset(c)), 3);
    kphi_case_free(c);
    tmp_done(&t);
}
END_TEST

START_TEST(grid_errors)
{
    override_fails(kphi_case_set_sweep_T, "550:350:10C", 1,
                   "sweep T range is empty: from '550 C' is above to '350 C'");
    override_fails(kphi_case_set_sweep_T, "350:550:0C", 9,
                   "temperature step '0C' must be positive");
    override_fails(kphi_case_set_sweep_T, "350:550:-10C", 9,
                   "temperature step '-10C' must be positive");
    override_fails(kphi_case_set_sweep_T, "350:550", 1,
                   "expected from:to:step for the sweep T, e.g. '350:550:10C'; found 2 parts in "
                   "'350:550'");
    override_fails(kphi_case_set_sweep_T, "350:550:10", 9,
                   "'10' has no unit; write e.g. '10 C' or '10 K'");
    override_fails(kphi_case_set_sweep_T, "350:550:10Z", 11,
                   "unknown temperature unit 'Z' in '10Z'; expected K, C, F or R");
    override_fails(kphi_case_set_sweep_T, "nan:550:10C", 1,
                   "temperature must be a finite number, found 'nan'");
    override_fails(kphi_case_set_sweep_T, "350:inf:10C", 5,
                   "temperature must be a finite number, found 'inf'");
    override_fails(kphi_case_set_sweep_T, "-300:550:10C", 1,
                   "temperature '-300 C' is -26.85 K; it must be above absolute zero");
    override_fails(kphi_case_set_sweep_T, "", 1, "empty sweep T value; write e.g. '350:550:10C'");
    override_fails(kphi_case_set_sweep_P, "100bar,,200bar", 8,
                   "empty item in the sweep P '100bar,,200bar'");
    override_fails(kphi_case_set_sweep_P, "100bar,200", 8,
                   "'200' has no unit; write e.g. '200 bar' or '20 MPa'");
    override_fails(kphi_case_set_sweep_P, "100 bar, 0 bar", 10,
                   "pressure '0 bar' must be above zero");
    override_fails(kphi_case_set_sweep_P, "1:2:3:4bar", 1,
                   "expected from:to:step for the sweep P, e.g. '50:300:25bar'; found 4 parts in "
                   "'1:2:3:4bar'");
    override_fails(kphi_case_set_sweep_P, "50:400:0bar", 8,
                   "pressure step '0bar' must be positive");

    /* more than 1e6 points on one axis */
    kphi_error err;
    kphi_error_clear(&err);
    kphi_case *c = ammonia();
    ck_assert_int_eq(kphi_case_set_sweep_T(c, "300:400:1e-4K", &err), KPHI_EINPUT);
    ck_assert_int_eq(err.column, 9);
    ck_assert_msg(strncmp(err.msg, "sweep T from '300 K' to '400 K' in steps of '1e-4K' has "
                                   "1000001",
                          63) == 0, "%s", err.msg);
    ck_assert_ptr_nonnull(strstr(err.msg, " points; at most 1000000 are allowed"));
    ck_assert_uint_eq(kphi_case_sweep_n_T(c), 15); /* unchanged */
    kphi_case_free(c);
}
END_TEST

START_TEST(yaml_sweep_errors)
{
    load_fails("sweep: {T: []}\n", KPHI_EINPUT, 2, 12,
               "sweep T list is empty; give at least one value");
    load_fails("sweep: {T: {from: 380 C, to: 520 C}}\n", KPHI_EINPUT, 2, 12,
               "missing 'step' in the sweep T range; write e.g. {from: 380 C, to: 520 C, step: "
               "10 C}");
    load_fails("sweep: {P: {from: 100 bar, step: 10 bar}}\n", KPHI_EINPUT, 2, 12,
               "missing 'to' in the sweep P range; write e.g. {from: 100 bar, to: 300 bar, step: "
               "25 bar}");
    load_fails("sweep: {T: {from: 380 C, to: 520 C, stp: 10 C}}\n", KPHI_EINPUT, 2, 37,
               "unknown key 'stp' in the sweep T range (did you mean 'step'?)");
    load_fails("sweep: {T: {from: [380 C], to: 520 C, step: 10 C}}\n", KPHI_EINPUT, 2, 19,
               "expected a single value for 'from' of the sweep T range, found a list");
    load_fails("sweep: {T: {from: 520 C, to: 380 C, step: 10 C}}\n", KPHI_EINPUT, 2, 19,
               "sweep T range is empty: from '520 C' is above to '380 C'");
    load_fails("sweep: {T: {from: 380 C, to: 520 C, step: 0 C}}\n", KPHI_EINPUT, 2, 43,
               "temperature step '0 C' must be positive");
    load_fails("sweep: {P: [100 bar, 150]}\n", KPHI_EINPUT, 2, 22,
               "'150' has no unit; write e.g. '150 bar' or '15 MPa'");
    load_fails("sweep: {P: [100 bar, [150 bar]]}\n", KPHI_EINPUT, 2, 22,
               "expected a single value for a value of the sweep P list, found a list");
    load_fails("sweep:\n  T: \"350:550:10Z\"\n", KPHI_EINPUT, 3, 17,
               "unknown temperature unit 'Z' in '10Z'; expected K, C, F or R");
    load_fails("sweep: {temperature: [450 C]}\n", KPHI_EINPUT, 2, 9,
               "unknown key 'temperature' in 'sweep'; expected one of: T, P");
    load_fails("sweep: [450 C]\n", KPHI_EINPUT, 2, 8,
               "expected a mapping for 'sweep', found a list");
}
END_TEST

/* ---------------------------------------------------------------- bad-input catalogue */

/* Every tests/bad/case_*.yaml gives, through load and validate, exactly the line its .err
 * file holds (the CLI's `check` does the same). */
/* ---------------------------------------------------------------- the loop block */

/* The parts of a good loop block, each one line (lines 4 to 7 after "P:" and "loop:"). */
#define LOOP_P "P: 195 bar\nloop:\n"
#define LOOP_MK "  makeup: {composition: {H2: 74.0, N2: 24.7, CH4: 1.0, Ar: 0.3}}\n"
#define LOOP_CV "  converter: {T_out: 460 C}\n"
#define LOOP_SP "  separator: {T: -5 C}\n"
#define LOOP_PG "  purge: {fraction: 2 %}\n"

START_TEST(loop_block)
{
    tmpdir t;
    tmp_init(&t);
    kphi_error err;
    /* every key, an adiabatic converter with intercooling, an inert target */
    kphi_case *c = load_body(&t,
                             LOOP_P "  makeup: {composition: {H2: 74.0, N2: 24.7, CH4: 1.0, Ar: "
                                    "0.3}, rate: 1200 kmol/h}\n"
                                    "  makeup_at: separator\n"
                                    "  converter: {T_in: 380 C, intercool: [400 C, 410 C], "
                                    "approach: 12.5 K}\n"
                                    "  separator: {T: -5 C, P: 190 bar}\n"
                                    "  purge: {inerts: 12 %}\n",
                             &err);
    ck_assert_msg(c != NULL, "%s", err.msg);
    const kphi_case_loop *g = kphi_case_get_loop(c);
    ck_assert_ptr_nonnull(g);
    ck_assert_double_eq(g->makeup[idx(c, "H2")], 74.0);
    ck_assert_double_eq(g->makeup[idx(c, "Ar")], 0.3);
    ck_assert_double_eq(g->makeup[idx(c, "NH3")], 0.0);
    ck_assert_int_eq(g->flow, KPHI_CASE_MAKEUP_RATE);
    ck_assert_double_eq_tol(g->rate, 1200.0 * 1000.0 / 3600.0, 1e-9); /* 1 h = 3600 s */
    ck_assert_int_eq(g->makeup_at_separator, 1);
    ck_assert_int_eq(g->adiabatic, 1);
    ck_assert_uint_eq(g->n_beds, 3);
    ck_assert_double_eq_tol(g->T_in[0], 653.15, 1e-9);
    ck_assert_double_eq_tol(g->T_in[1], 673.15, 1e-9);
    ck_assert_double_eq_tol(g->T_in[2], 683.15, 1e-9);
    ck_assert_double_eq_tol(g->approach, 12.5, 1e-12);
    ck_assert_double_eq_tol(g->T_sep, 268.15, 1e-9);
    ck_assert_double_eq_tol(g->P_sep, 190e5, 1e-6);
    ck_assert_int_eq(g->purge_inerts, 1);
    ck_assert_double_eq_tol(g->inerts_target, 0.12, 1e-15);
    ck_assert_int_eq(kphi_case_validate_loop(c, &err), KPHI_OK);
    kphi_case_free(c);
    tmp_done(&t);
    /* the smallest block: defaults */
    tmp_init(&t);
    c = load_body(&t, LOOP_P LOOP_MK LOOP_CV LOOP_SP LOOP_PG, &err);
    ck_assert_msg(c != NULL, "%s", err.msg);
    g = kphi_case_get_loop(c);
    ck_assert_int_eq(g->flow, KPHI_CASE_MAKEUP_BASIS);
    ck_assert_int_eq(g->makeup_at_separator, 0);
    ck_assert_int_eq(g->adiabatic, 0);
    ck_assert_double_eq_tol(g->T_out, 733.15, 1e-9);
    ck_assert_double_eq(g->approach, 0.0);
    ck_assert(isnan(g->P_sep)); /* the loop pressure */
    ck_assert_int_eq(g->purge_inerts, 0);
    ck_assert_double_eq_tol(g->purge_fraction, 0.02, 1e-15);
    ck_assert_int_eq(kphi_case_validate_loop(c, &err), KPHI_OK);
    kphi_case_free(c);
    tmp_done(&t);
    /* production; an approach of 0 in any temperature unit */
    tmp_init(&t);
    c = load_body(&t,
                  LOOP_P "  makeup: {composition: {H2: 3, N2: 1}, production: 1500 t/d}\n"
                         "  converter: {T_out: 460 C, approach: 0 C}\n" LOOP_SP
                         "  purge: {fraction: 0 %}\n",
                  &err);
    ck_assert_msg(c != NULL, "%s", err.msg);
    g = kphi_case_get_loop(c);
    ck_assert_int_eq(g->flow, KPHI_CASE_MAKEUP_PRODUCTION);
    ck_assert_double_eq_tol(g->production, 1500.0 * 1000.0 / 86400.0, 1e-12); /* 1 d = 86400 s */
    ck_assert_double_eq(g->approach, 0.0);
    /* no inerts in the make-up: no purge is a steady state */
    ck_assert_int_eq(kphi_case_validate_loop(c, &err), KPHI_OK);
    kphi_case_free(c);
    tmp_done(&t);
    /* a case without a loop block */
    kphi_error_clear(&err);
    c = kphi_case_load_file("cases/ammonia_converter.yaml", &err);
    ck_assert_ptr_nonnull(c);
    ck_assert_ptr_null(kphi_case_get_loop(c));
    ck_assert_int_eq(kphi_case_validate_loop(c, &err), KPHI_EINPUT);
    check_error(&err, KPHI_EINPUT, "cases/ammonia_converter.yaml", 1, 1,
                "the case has no 'loop' block (make-up, converter, separator, purge); see "
                "cases/ammonia_loop.yaml");
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_case_set_purge(c, "5%", &err), KPHI_EINPUT);
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_case_set_loop_T(c, "450 C", &err), KPHI_EINPUT);
    kphi_case_free(c);
    /* the shipped loop cases */
    const char *shipped[] = {"cases/ammonia_loop.yaml", "cases/methanol_loop.yaml"};
    for (int k = 0; k < 2; k++) {
        kphi_error_clear(&err);
        c = kphi_case_load_file(shipped[k], &err);
        ck_assert_msg(c != NULL, "%s: %s", shipped[k], err.msg);
        ck_assert_ptr_nonnull(kphi_case_get_loop(c));
        ck_assert_int_eq(kphi_case_validate_loop(c, &err), KPHI_OK);
        kphi_case_free(c);
    }
}
END_TEST

/* Each key of the loop block wrong, missing or absurd: a load error at line:column. */
START_TEST(loop_load_errors)
{
    load_fails("loop: [1, 2]\n", KPHI_EINPUT, 2, 7,
               "expected a mapping for the 'loop' block, found a list");
    load_fails(LOOP_P "  makup: {}\n" LOOP_MK LOOP_CV LOOP_SP LOOP_PG, KPHI_EINPUT, 4, 3,
               "unknown key 'makup' in the 'loop' block (did you mean 'makeup'?)");
    load_fails(LOOP_P LOOP_CV LOOP_SP LOOP_PG, KPHI_EINPUT, 4, 3,
               "the 'loop' block needs 'makeup' (see cases/ammonia_loop.yaml)");
    load_fails(LOOP_P LOOP_MK LOOP_SP LOOP_PG, KPHI_EINPUT, 4, 3,
               "the 'loop' block needs 'converter' (see cases/ammonia_loop.yaml)");
    load_fails(LOOP_P LOOP_MK LOOP_CV LOOP_PG, KPHI_EINPUT, 4, 3,
               "the 'loop' block needs 'separator' (see cases/ammonia_loop.yaml)");
    load_fails(LOOP_P LOOP_MK LOOP_CV LOOP_SP, KPHI_EINPUT, 4, 3,
               "the 'loop' block needs 'purge' (see cases/ammonia_loop.yaml)");
    /* makeup */
    load_fails(LOOP_P "  makeup: [H2]\n" LOOP_CV LOOP_SP LOOP_PG, KPHI_EINPUT, 4, 11,
               "expected a mapping for 'makeup' of the loop, found a list");
    load_fails(LOOP_P "  makeup: {composition: {H2: 74.0, N2: 24.7}, rates: 3 mol/s}\n" LOOP_CV
                   LOOP_SP LOOP_PG,
               KPHI_EINPUT, 4, 47, "unknown key 'rates' in 'makeup' of the loop (did you mean 'rate'?)");
    load_fails(LOOP_P "  makeup: {rate: 3 mol/s}\n" LOOP_CV LOOP_SP LOOP_PG, KPHI_EINPUT, 4, 11,
               "the loop's 'makeup' needs a 'composition' (species: amount)");
    load_fails(LOOP_P "  makeup: {composition: [H2, N2]}\n" LOOP_CV LOOP_SP LOOP_PG, KPHI_EINPUT,
               4, 25, "expected a mapping for 'composition' (species: amount), found a list");
    load_fails(LOOP_P "  makeup: {composition: {H2: 74.0, N3: 24.7}}\n" LOOP_CV LOOP_SP LOOP_PG,
               KPHI_EINPUT, 4, 36, "unknown species 'N3' in the make-up (did you mean 'N2'?)");
    load_fails(LOOP_P "  makeup: {composition: {H2: 74.0, Xe: 24.7}}\n" LOOP_CV LOOP_SP LOOP_PG,
               KPHI_EINPUT, 4, 36,
               "unknown species 'Xe' in the make-up; the reaction set has N2, H2, NH3, CH4, Ar");
    load_fails(LOOP_P "  makeup: {composition: {H2: 74.0, N2: -24.7}}\n" LOOP_CV LOOP_SP LOOP_PG,
               KPHI_EINPUT, 4, 40,
               "the make-up amount of 'N2' must be zero or positive, found '-24.7'");
    load_fails(LOOP_P "  makeup: {composition: {H2: 74.0, N2: lots}}\n" LOOP_CV LOOP_SP LOOP_PG,
               KPHI_EINPUT, 4, 40, "expected a number for the make-up amount of 'N2', found 'lots'");
    load_fails(LOOP_P "  makeup: {composition: {H2: 0, N2: 0}}\n" LOOP_CV LOOP_SP LOOP_PG,
               KPHI_EINPUT, 4, 25, "the make-up composition is empty (every amount is zero)");
    load_fails(LOOP_P "  makeup: {composition: {H2: 74.0, N2: 24.7}, rate: 1200}\n" LOOP_CV LOOP_SP
                   LOOP_PG,
               KPHI_EINPUT, 4, 53, "'1200' has no unit; write e.g. '1200 kmol/h' or '333 mol/s'");
    load_fails(LOOP_P "  makeup: {composition: {H2: 74.0, N2: 24.7}, rate: 1200 kmol/x}\n" LOOP_CV
                   LOOP_SP LOOP_PG,
               KPHI_EINPUT, 4, 58,
               "unknown unit 'kmol/x' in the molar flow '1200 kmol/x' (did you mean 'kmol/s'?)");
    load_fails(LOOP_P "  makeup: {composition: {H2: 74.0, N2: 24.7}, rate: -5 mol/s}\n" LOOP_CV
                   LOOP_SP LOOP_PG,
               KPHI_EINPUT, 4, 53, "molar flow '-5 mol/s' must be positive");
    load_fails(LOOP_P "  makeup: {composition: {H2: 74.0, N2: 24.7}, production: 1500}\n" LOOP_CV
                   LOOP_SP LOOP_PG,
               KPHI_EINPUT, 4, 59, "'1500' has no unit; write e.g. '1500 t/d' or '62.5 t/h'");
    load_fails(LOOP_P "  makeup: {composition: {H2: 3, N2: 1}, rate: 9 mol/s, production: 9 t/d}\n"
                   LOOP_CV LOOP_SP LOOP_PG,
               KPHI_EINPUT, 4, 68, "give the make-up 'rate' or the 'production', not both");
    /* makeup_at */
    load_fails(LOOP_P LOOP_MK "  makeup_at: seperator\n" LOOP_CV LOOP_SP LOOP_PG, KPHI_EINPUT, 5,
               14,
               "'makeup_at' is 'seperator' (did you mean 'separator'?); expected 'converter' (the "
               "make-up joins the recycle before the converter) or 'separator' (before the "
               "separator)");
    load_fails(LOOP_P LOOP_MK "  makeup_at: [converter]\n" LOOP_CV LOOP_SP LOOP_PG, KPHI_EINPUT, 5,
               14,
               "expected a single value for 'makeup_at' (converter or separator), found a list");
    /* converter */
    load_fails(LOOP_P LOOP_MK "  converter: [460 C]\n" LOOP_SP LOOP_PG, KPHI_EINPUT, 5, 14,
               "expected a mapping for 'converter' of the loop, found a list");
    load_fails(LOOP_P LOOP_MK "  converter: {T_out: 460 C, Tout: 3}\n" LOOP_SP LOOP_PG,
               KPHI_EINPUT, 5, 29,
               "unknown key 'Tout' in 'converter' of the loop (did you mean 'T_out'?)");
    load_fails(LOOP_P LOOP_MK "  converter: {approach: 10 K}\n" LOOP_SP LOOP_PG, KPHI_EINPUT, 5,
               14,
               "the loop's 'converter' needs 'T_out' (isothermal, e.g. 460 C) or 'T_in' "
               "(adiabatic beds, e.g. 380 C)");
    load_fails(LOOP_P LOOP_MK "  converter: {T_out: 460 C, T_in: 380 C}\n" LOOP_SP LOOP_PG,
               KPHI_EINPUT, 5, 35,
               "give the converter 'T_out' (isothermal) or 'T_in' (adiabatic beds), not both");
    load_fails(LOOP_P LOOP_MK "  converter: {T_out: 460 C, intercool: [400 C]}\n" LOOP_SP LOOP_PG,
               KPHI_EINPUT, 5, 40,
               "'intercool' needs adiabatic beds: give 'T_in' instead of 'T_out'");
    load_fails(LOOP_P LOOP_MK "  converter: {T_in: 380 C, intercool: 400 C}\n" LOOP_SP LOOP_PG,
               KPHI_EINPUT, 5, 39,
               "expected a list for 'intercool' (a list of bed inlet temperatures), found a "
               "single value");
    load_fails(LOOP_P LOOP_MK "  converter: {T_in: 380 C, intercool: [400 C, 410]}\n" LOOP_SP
                   LOOP_PG,
               KPHI_EINPUT, 5, 47, "'410' has no unit; write e.g. '410 C' or '683.15 K'");
    load_fails(LOOP_P LOOP_MK "  converter: {T_in: 380 C, intercool: [1 C, 2 C, 3 C, 4 C, 5 C, 6 "
                              "C, 7 C, 8 C]}\n" LOOP_SP LOOP_PG,
               KPHI_EINPUT, 5, 75, "too many beds: at most 7 inlet temperatures after the first bed");
    load_fails(LOOP_P LOOP_MK "  converter: {T_out: 460}\n" LOOP_SP LOOP_PG, KPHI_EINPUT, 5, 22,
               "'460' has no unit; write e.g. '460 C' or '733.15 K'");
    load_fails(LOOP_P LOOP_MK "  converter: {T_out: 460 C, approach: 10}\n" LOOP_SP LOOP_PG,
               KPHI_EINPUT, 5, 39, "'10' has no unit; write e.g. '10 C' or '10 K'");
    load_fails(LOOP_P LOOP_MK "  converter: {T_out: 460 C, approach: 0}\n" LOOP_SP LOOP_PG,
               KPHI_EINPUT, 5, 39, "'0' has no unit; write e.g. '0 K' or '10 K'");
    load_fails(LOOP_P LOOP_MK "  converter: {T_out: 460 C, approach: 0.0 Q}\n" LOOP_SP LOOP_PG,
               KPHI_EINPUT, 5, 43, "unknown temperature unit 'Q' in '0.0 Q'; expected K, C, F or R");
    load_fails(LOOP_P LOOP_MK "  converter: {T_out: 460 C, approach: -10 K}\n" LOOP_SP LOOP_PG,
               KPHI_EINPUT, 5, 39,
               "the approach '-10 K' is negative; it must be zero or positive (the equilibrium is "
               "taken that much above the outlet temperature)");
    /* separator */
    load_fails(LOOP_P LOOP_MK LOOP_CV "  separator: {P: 190 bar}\n" LOOP_PG, KPHI_EINPUT, 6, 14,
               "the loop's 'separator' needs its temperature 'T' (e.g. -5 C)");
    load_fails(LOOP_P LOOP_MK LOOP_CV "  separator: {T: -5 C, p: 190 bar}\n" LOOP_PG, KPHI_EINPUT,
               6, 24, "unknown key 'p' in 'separator' of the loop (did you mean 'P'?)");
    load_fails(LOOP_P LOOP_MK LOOP_CV "  separator: {T: -5}\n" LOOP_PG, KPHI_EINPUT, 6, 18,
               "'-5' has no unit; write e.g. '-5 C' or '268.15 K'");
    load_fails(LOOP_P LOOP_MK LOOP_CV "  separator: {T: -5 C, P: 190 psu}\n" LOOP_PG, KPHI_EINPUT,
               6, 31, "unknown pressure unit 'psu' in '190 psu' (did you mean 'psi'?)");
    /* purge */
    load_fails(LOOP_P LOOP_MK LOOP_CV LOOP_SP "  purge: 2 %\n", KPHI_EINPUT, 7, 10,
               "expected a mapping for 'purge' of the loop, found a single value");
    load_fails(LOOP_P LOOP_MK LOOP_CV LOOP_SP "  purge: {fractoin: 2 %}\n", KPHI_EINPUT, 7, 11,
               "unknown key 'fractoin' in 'purge' of the loop (did you mean 'fraction'?)");
    load_fails(LOOP_P LOOP_MK LOOP_CV LOOP_SP "  purge: {}\n", KPHI_EINPUT, 7, 10,
               "the loop's 'purge' needs 'fraction' (of the separator vapour, e.g. 2 %) or "
               "'inerts' (at the converter inlet, e.g. 12 %)");
    load_fails(LOOP_P LOOP_MK LOOP_CV LOOP_SP "  purge: {fraction: 2 %, inerts: 12 %}\n",
               KPHI_EINPUT, 7, 34, "give the purge 'fraction' or the 'inerts' level, not both");
    load_fails(LOOP_P LOOP_MK LOOP_CV LOOP_SP "  purge: {fraction: 2}\n", KPHI_EINPUT, 7, 21,
               "'2' has no unit; write e.g. '2 %'");
}
END_TEST

/* Load body fine, then expect kphi_case_validate_loop() to fail at line:column. */
static void validate_loop_fails(const char *body, long line, long column, const char *msg)
{
    tmpdir t;
    tmp_init(&t);
    kphi_error err;
    kphi_case *c = load_body(&t, body, &err);
    ck_assert_msg(c != NULL, "load: %s", err.msg);
    ck_assert_int_eq(kphi_case_validate_loop(c, &err), KPHI_EINPUT);
    check_error(&err, KPHI_EINPUT, t.files[0], line, column, msg);
    kphi_case_free(c);
    tmp_done(&t);
}

/* Values that load but make no loop: a separator not colder than the converter or above
 * its pressure, a purge outside 0 .. 100 %, no purge with inerts, a make-up that cannot
 * make the product, temperatures outside the species data. */
START_TEST(loop_validate_errors)
{
    validate_loop_fails(LOOP_P LOOP_MK LOOP_CV "  separator: {T: 480 C}\n" LOOP_PG, 6, 18,
                        "separator temperature 480.00 C is not below the converter's 460.00 C: "
                        "the separator cools the converter outlet");
    validate_loop_fails(LOOP_P LOOP_MK "  converter: {T_in: 380 C, intercool: [400 C, -10 C]}\n"
                                       LOOP_SP LOOP_PG,
                        6, 18,
                        "separator temperature -5.00 C is not below the converter's -10.00 C (its "
                        "coldest bed inlet): the separator cools the converter outlet");
    validate_loop_fails(LOOP_P LOOP_MK LOOP_CV "  separator: {T: -5 C, P: 210 bar}\n" LOOP_PG, 6,
                        27,
                        "separator pressure 210 bar is above the loop pressure 195 bar (the "
                        "case's P); the separator is downstream of the converter");
    validate_loop_fails(LOOP_P LOOP_MK LOOP_CV LOOP_SP "  purge: {fraction: -2 %}\n", 7, 21,
                        "purge fraction -2 % is outside 0 .. 100 % of the separator vapour");
    validate_loop_fails(LOOP_P LOOP_MK LOOP_CV LOOP_SP "  purge: {fraction: 120 %}\n", 7, 21,
                        "purge fraction 120 % is outside 0 .. 100 % of the separator vapour");
    validate_loop_fails(LOOP_P LOOP_MK LOOP_CV LOOP_SP "  purge: {fraction: 0 %}\n", 7, 21,
                        "a purge of 0 % has no steady state: the inerts of the make-up (CH4, Ar) "
                        "would build up without limit; purge some of the separator vapour");
    validate_loop_fails(LOOP_P LOOP_MK LOOP_CV LOOP_SP "  purge: {inerts: 0 %}\n", 7, 19,
                        "inert level 0 % at the converter inlet: expected above 0 % and below "
                        "100 %");
    validate_loop_fails(LOOP_P LOOP_MK LOOP_CV LOOP_SP "  purge: {inerts: 100 %}\n", 7, 19,
                        "inert level 100 % at the converter inlet: expected above 0 % and below "
                        "100 %");
    validate_loop_fails(LOOP_P "  makeup: {composition: {H2: 98.7, CH4: 1.0, Ar: 0.3}}\n" LOOP_CV
                               LOOP_SP LOOP_PG,
                        4, 11, "the make-up cannot make NH3: none of its species holds N");
    validate_loop_fails(LOOP_P LOOP_MK LOOP_CV "  separator: {T: -250 C}\n" LOOP_PG, 6, 18,
                        "T = 23.15 K is outside the data range of N2 (200-6000 K)");
    /* --P below the separator pressure names the option */
    tmpdir t;
    tmp_init(&t);
    kphi_error err;
    kphi_case *c = load_body(&t, LOOP_P LOOP_MK LOOP_CV "  separator: {T: -5 C, P: 190 bar}\n"
                                 LOOP_PG, &err);
    ck_assert_msg(c != NULL, "%s", err.msg);
    ck_assert_int_eq(kphi_case_set_P(c, "180 bar", &err), KPHI_OK);
    ck_assert_int_eq(kphi_case_validate_loop(c, &err), KPHI_EINPUT);
    check_error(&err, KPHI_EINPUT, t.files[0], 6, 27,
                "separator pressure 190 bar is above the loop pressure 180 bar (--P); the "
                "separator is downstream of the converter");
    kphi_case_free(c);
    tmp_done(&t);
}
END_TEST

/* --T and --purge of kphi loop. */
START_TEST(loop_overrides)
{
    kphi_error err;
    kphi_error_clear(&err);
    kphi_case *c = kphi_case_load_file("cases/ammonia_loop.yaml", &err);
    ck_assert_ptr_nonnull(c);
    ck_assert_int_eq(kphi_case_set_loop_T(c, "452.5C", &err), KPHI_OK);
    ck_assert_double_eq_tol(kphi_case_get_loop(c)->T_out, 725.65, 1e-9);
    ck_assert_int_eq(kphi_case_set_purge(c, "3.5%", &err), KPHI_OK);
    ck_assert_int_eq(kphi_case_get_loop(c)->purge_inerts, 0);
    ck_assert_double_eq_tol(kphi_case_get_loop(c)->purge_fraction, 0.035, 1e-15);
    ck_assert_int_eq(kphi_case_set_purge(c, "inerts=11.5 %", &err), KPHI_OK);
    ck_assert_int_eq(kphi_case_get_loop(c)->purge_inerts, 1);
    ck_assert_double_eq_tol(kphi_case_get_loop(c)->inerts_target, 0.115, 1e-15);
    ck_assert_int_eq(kphi_case_validate_loop(c, &err), KPHI_OK);
    /* errors point into the command line, and the value given there is what is refused */
    ck_assert_int_eq(kphi_case_set_purge(c, "inerts=0%", &err), KPHI_OK);
    ck_assert_int_eq(kphi_case_validate_loop(c, &err), KPHI_EINPUT);
    check_error(&err, KPHI_EINPUT, "<command line>", 1, 8,
                "inert level 0 % at the converter inlet: expected above 0 % and below 100 %");
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_case_set_purge(c, "0%", &err), KPHI_OK);
    ck_assert_int_eq(kphi_case_validate_loop(c, &err), KPHI_EINPUT);
    check_error(&err, KPHI_EINPUT, "<command line>", 1, 1,
                "a purge of 0 % has no steady state: the inerts of the make-up (CH4, Ar) would "
                "build up without limit; purge some of the separator vapour");
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_case_set_loop_T(c, "-10 C", &err), KPHI_OK);
    ck_assert_int_eq(kphi_case_set_purge(c, "2%", &err), KPHI_OK);
    ck_assert_int_eq(kphi_case_validate_loop(c, &err), KPHI_EINPUT);
    ck_assert_str_eq(err.path, "cases/ammonia_loop.yaml"); /* the separator's T is the culprit */
    ck_assert_ptr_nonnull(strstr(err.msg, "is not below the converter's -10.00 C"));
    kphi_case_free(c);
    /* --T on an adiabatic converter sets the first bed's inlet */
    tmpdir t;
    tmp_init(&t);
    c = load_body(&t, LOOP_P LOOP_MK "  converter: {T_in: 380 C, intercool: [400 C]}\n" LOOP_SP
                      LOOP_PG, &err);
    ck_assert_msg(c != NULL, "%s", err.msg);
    ck_assert_int_eq(kphi_case_set_loop_T(c, "371 C", &err), KPHI_OK);
    ck_assert_double_eq_tol(kphi_case_get_loop(c)->T_in[0], 644.15, 1e-9);
    ck_assert_double_eq_tol(kphi_case_get_loop(c)->T_in[1], 673.15, 1e-9);
    kphi_case_free(c);
    tmp_done(&t);
}
END_TEST

static void loop_override_fails(setter fn, const char *text, long column, const char *msg)
{
    kphi_error err;
    kphi_error_clear(&err);
    kphi_case *c = kphi_case_load_file("cases/ammonia_loop.yaml", &err);
    ck_assert_ptr_nonnull(c);
    double f0 = kphi_case_get_loop(c)->purge_fraction, T0 = kphi_case_get_loop(c)->T_out;
    ck_assert_int_eq(fn(c, text, &err), KPHI_EINPUT);
    check_error(&err, KPHI_EINPUT, "<command line>", 1, column, msg);
    ck_assert(kphi_case_get_loop(c)->purge_fraction == f0 && kphi_case_get_loop(c)->T_out == T0);
    ck_assert_int_eq(kphi_case_get_loop(c)->purge_inerts, 0);
    kphi_case_free(c);
}

START_TEST(loop_override_errors)
{
    loop_override_fails(kphi_case_set_purge, "2", 1, "'2' has no unit; write e.g. '2 %'");
    loop_override_fails(kphi_case_set_purge, "abc", 1,
                        "expected a number and a unit for the percentage, e.g. '2 %'; found "
                        "'abc'");
    loop_override_fails(kphi_case_set_purge, "inerts=abc", 8,
                        "expected a number and a unit for the percentage, e.g. '2 %'; found "
                        "'abc'");
    loop_override_fails(kphi_case_set_purge, "inerts:12%", 1,
                        "'inerts:12%' is not a purge; write a fraction of the separator vapour "
                        "('2%') or an inert level at the converter inlet ('inerts=12%')");
    loop_override_fails(kphi_case_set_loop_T, "450", 1,
                        "'450' has no unit; write e.g. '450 C' or '723.15 K'");
    loop_override_fails(kphi_case_set_loop_T, "450Q", 4,
                        "unknown temperature unit 'Q' in '450Q'; expected K, C, F or R");
}
END_TEST

START_TEST(bad_catalogue)
{
    DIR *d = opendir("tests/bad");
    ck_assert_ptr_nonnull(d);
    struct dirent *e;
    int seen = 0;
    while ((e = readdir(d)) != NULL) {
        size_t len = strlen(e->d_name);
        if (strncmp(e->d_name, "case_", 5) != 0 || len < 5 || strcmp(e->d_name + len - 4, ".err"))
            continue;
        char errpath[512], yamlpath[512], want[1024] = "", line[1024];
        int want_exit = -1;
        snprintf(errpath, sizeof errpath, "tests/bad/%s", e->d_name);
        snprintf(yamlpath, sizeof yamlpath, "tests/bad/%.*s.yaml", (int)(len - 4), e->d_name);
        FILE *f = fopen(errpath, "r");
        ck_assert_ptr_nonnull(f);
        while (fgets(line, sizeof line, f) != NULL) {
            line[strcspn(line, "\n")] = '\0';
            if (strncmp(line, "exit: ", 6) == 0)
                want_exit = atoi(line + 6);
            else if (strncmp(line, "args: ", 6) == 0)
                ck_assert_str_eq(line, "args: check");
            else
                snprintf(want, sizeof want, "%s", line);
        }
        fclose(f);
        kphi_error err;
        kphi_error_clear(&err);
        kphi_case *c = kphi_case_load_file(yamlpath, &err);
        if (c != NULL)
            kphi_case_validate(c, &err);
        kphi_case_free(c);
        char got[1024];
        kphi_error_format(&err, got, sizeof got);
        ck_assert_msg(strcmp(got, want) == 0, "%s:\n got  %s\n want %s", yamlpath, got, want);
        ck_assert_int_eq(kphi_error_exit_code(err.code), want_exit);
        seen++;
    }
    closedir(d);
    ck_assert_int_ge(seen, 13);
}
END_TEST

static Suite *case_suite(void)
{
    Suite *s = suite_create("case");
    TCase *tc = tcase_create("case");
    tcase_set_timeout(tc, 60);
    tcase_add_test(tc, ammonia_converter);
    tcase_add_test(tc, methanol_converter);
    tcase_add_test(tc, minimal_case_defaults);
    tcase_add_test(tc, set_recommends_a_model);
    tcase_add_test(tc, full_schema);
    tcase_add_test(tc, kij_in_effect_set_then_case);
    tcase_add_test(tc, load_errors);
    tcase_add_test(tc, kij_errors);
    tcase_add_test(tc, file_errors);
    tcase_add_test(tc, validate_errors);
    tcase_add_test(tc, overrides);
    tcase_add_test(tc, override_errors);
    tcase_add_test(tc, K_basis_key_and_override);
    tcase_add_test(tc, range_grids);
    tcase_add_test(tc, list_grids);
    tcase_add_test(tc, grid_errors);
    tcase_add_test(tc, grid_units);
    tcase_add_test(tc, species_default_for_a_set_elsewhere);
    tcase_add_test(tc, yaml_sweep_errors);
    tcase_add_test(tc, loop_block);
    tcase_add_test(tc, loop_load_errors);
    tcase_add_test(tc, loop_validate_errors);
    tcase_add_test(tc, loop_overrides);
    tcase_add_test(tc, loop_override_errors);
    tcase_add_test(tc, bad_catalogue);
    suite_add_tcase(s, tc);
    return s;
}

KPHI_TEST_MAIN(case_suite)
