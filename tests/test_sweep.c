/* Tests of the sweep: grid order, identical output for any thread count and chain length,
 * agreement with single solves, failed points as rows, early stop, and the adiabatic
 * outlets of `sweep --adiabatic` (the same as single searches, for any thread count). */
#include "kphi/sweep.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "kphi/kphi.h"
#include "testutil.h"

typedef struct {
    size_t n, cap;
    double *T, *P, *X;  /* per emitted point, in emission order */
    double *Tout[2];    /* adiabatic outlet (model, ideal gas) when the point has one */
    size_t *iT, *iP;
    int *failed;
    size_t stop_after;  /* 0: never stop */
    char *csv;          /* every row formatted, concatenated */
    size_t csv_len, csv_cap;
} collect;

static void collect_init(collect *c, size_t cap)
{
    memset(c, 0, sizeof *c);
    c->cap = cap;
    c->T = calloc(cap, sizeof(double));
    c->P = calloc(cap, sizeof(double));
    c->X = calloc(cap, sizeof(double));
    c->Tout[0] = calloc(cap, sizeof(double));
    c->Tout[1] = calloc(cap, sizeof(double));
    c->iT = calloc(cap, sizeof(size_t));
    c->iP = calloc(cap, sizeof(size_t));
    c->failed = calloc(cap, sizeof(int));
    c->csv_cap = cap * 1024;
    c->csv = calloc(c->csv_cap, 1);
}

static void collect_free(collect *c)
{
    free(c->T);
    free(c->P);
    free(c->X);
    free(c->Tout[0]);
    free(c->Tout[1]);
    free(c->iT);
    free(c->iP);
    free(c->failed);
    free(c->csv);
}

static int on_point(void *ctx, size_t iT, size_t iP, double T, double P,
                    const kphi_report_point *pt, const kphi_error *failure)
{
    collect *c = ctx;
    ck_assert_uint_lt(c->n, c->cap);
    size_t k = c->n++;
    c->T[k] = T;
    c->P[k] = P;
    c->iT[k] = iT;
    c->iP[k] = iP;
    c->failed[k] = pt == NULL;
    c->X[k] = pt != NULL ? pt->X_real : NAN;
    for (int m = 0; m < 2; m++)
        c->Tout[m][k] = pt != NULL && pt->energy != NULL ? pt->energy->T_out[m] : NAN;
    char row[4096];
    FILE *f = fmemopen(row, sizeof row, "w");
    ck_assert_ptr_nonnull(f);
    if (pt != NULL)
        kphi_report_csv_row(f, pt, 0, NULL);
    else
        fprintf(f, "failed %s\n", failure->msg);
    long len = ftell(f);
    fclose(f);
    ck_assert(c->csv_len + (size_t)len < c->csv_cap);
    memcpy(c->csv + c->csv_len, row, (size_t)len);
    c->csv_len += (size_t)len;
    if (c->stop_after > 0 && c->n >= c->stop_after)
        return 7;
    return 0;
}

typedef struct {
    kphi_case *cs;
    kphi_eos *real, *ideal;
} setup;

static void setup_open(setup *s, const char *path, kphi_eos_model model)
{
    kphi_error err;
    kphi_error_clear(&err);
    s->cs = kphi_case_load_file(path, &err);
    ck_assert_msg(s->cs != NULL, "%s", err.msg);
    ck_assert_int_eq(kphi_case_validate(s->cs, &err), KPHI_OK);
    s->real = kphi_case_make_eos(s->cs, model, &err);
    s->ideal = kphi_case_make_eos(s->cs, KPHI_EOS_IDEAL, &err);
    ck_assert(s->real != NULL && s->ideal != NULL);
}

static void setup_close(setup *s)
{
    kphi_eos_free(s->real);
    kphi_eos_free(s->ideal);
    kphi_case_free(s->cs);
}

static int run_opt(setup *s, const double *T, size_t nT, const double *P, size_t nP,
                   int threads, size_t chain, int adiabatic, collect *c)
{
    kphi_sweep_options opt = kphi_sweep_options_default();
    opt.threads = threads;
    opt.chain = chain;
    opt.adiabatic = adiabatic;
    kphi_error err;
    kphi_error_clear(&err);
    return kphi_sweep_run(kphi_case_rxnset(s->cs), s->real, s->ideal, kphi_case_feed(s->cs), T,
                          nT, P, nP, &opt, on_point, c, &err);
}

static int run(setup *s, const double *T, size_t nT, const double *P, size_t nP, int threads,
               size_t chain, collect *c)
{
    return run_opt(s, T, nT, P, nP, threads, chain, 0, c);
}

START_TEST(grid_order_and_identical_for_any_threads)
{
    setup s;
    setup_open(&s, "cases/ammonia_converter.yaml", KPHI_EOS_PR);
    enum { NT = 23, NP = 17 };
    double T[NT], P[NP];
    for (size_t k = 0; k < NT; k++)
        T[k] = 633.15 + 8.7 * (double)k;
    for (size_t k = 0; k < NP; k++)
        P[k] = 47e5 + 21.3e5 * (double)k;
    collect ref;
    collect_init(&ref, NT * NP);
    ck_assert_int_eq(run(&s, T, NT, P, NP, 1, 32, &ref), 0);
    ck_assert_uint_eq(ref.n, NT * NP);
    for (size_t k = 0; k < ref.n; k++) {
        ck_assert_uint_eq(ref.iT[k], k / NP);
        ck_assert_uint_eq(ref.iP[k], k % NP);
        ck_assert(ref.T[k] == T[k / NP] && ref.P[k] == P[k % NP]);
        ck_assert(!ref.failed[k]);
    }
    const int threads[] = {2, 3, 5};
    for (size_t t = 0; t < 3; t++) {
        collect c;
        collect_init(&c, NT * NP);
        ck_assert_int_eq(run(&s, T, NT, P, NP, threads[t], 32, &c), 0);
        ck_assert_uint_eq(c.csv_len, ref.csv_len);
        ck_assert_msg(memcmp(c.csv, ref.csv, ref.csv_len) == 0, "output differs at %d threads",
                      threads[t]);
        collect_free(&c);
    }
    collect_free(&ref);
    setup_close(&s);
}
END_TEST

START_TEST(sweep_agrees_with_single_solves)
{
    /* warm starts change the path, never the answer beyond the solver tolerance */
    setup s;
    setup_open(&s, "cases/methanol_converter.yaml", KPHI_EOS_PR);
    enum { NT = 6, NP = 5 };
    double T[NT], P[NP];
    for (size_t k = 0; k < NT; k++)
        T[k] = 483.15 + 13.1 * (double)k;
    for (size_t k = 0; k < NP; k++)
        P[k] = 41e5 + 17.9e5 * (double)k;
    collect c;
    collect_init(&c, NT * NP);
    ck_assert_int_eq(run(&s, T, NT, P, NP, 2, 7, &c), 0);
    const kphi_rxnset *set = kphi_case_rxnset(s.cs);
    size_t ns = kphi_rxnset_n_species(set), nr = kphi_rxnset_n_reactions(set);
    kphi_equil_work *w = kphi_equil_work_alloc(ns, nr);
    kphi_equil_result *r = kphi_equil_result_alloc(ns, nr);
    kphi_error err;
    kphi_error_clear(&err);
    for (size_t k = 0; k < c.n; k++) {
        ck_assert_int_eq(kphi_equil_solve(set, s.real, c.T[k], c.P[k], kphi_case_feed(s.cs), NULL,
                                          NULL, w, r, &err),
                         KPHI_OK);
        double X = kphi_equil_conversion(r, kphi_case_feed(s.cs),
                                         kphi_rxnset_conversion_weights(set));
        ck_assert_double_eq_tol(c.X[k], X, 1e-9);
    }
    kphi_equil_result_free(r);
    kphi_equil_work_free(w);
    collect_free(&c);
    setup_close(&s);
}
END_TEST

START_TEST(failed_points_are_rows_and_stop_works)
{
    /* virial fails (Z < 0.5) at high pressure and low temperature: those points come back
     * as failures in their place, the others as answers */
    setup s;
    setup_open(&s, "cases/ammonia_converter.yaml", KPHI_EOS_VIRIAL);
    double T[2] = {523.15, 823.15};
    double P[3] = {50e5, 3000e5, 100e5};
    collect c;
    collect_init(&c, 6);
    ck_assert_int_eq(run(&s, T, 2, P, 3, 2, 2, &c), 0);
    ck_assert_uint_eq(c.n, 6);
    ck_assert(!c.failed[0] && c.failed[1] && !c.failed[2]);
    ck_assert(strstr(c.csv, "failed ") != NULL);
    collect_free(&c);

    collect d;
    collect_init(&d, 6);
    d.stop_after = 4;
    ck_assert_int_eq(run(&s, T, 2, P, 3, 2, 1, &d), 7);
    ck_assert_uint_eq(d.n, 4);
    collect_free(&d);
    setup_close(&s);
}
END_TEST

START_TEST(adiabatic_outlets_match_single_searches)
{
    /* sweep --adiabatic: each point carries the adiabatic outlet of a bed fed at the
     * point's T, for the model and the ideal gas; the searches are cold-started, so the
     * rows are the same for any thread count and chain length, and each outlet equals a
     * single call of kphi_equil_adiabatic_outlet() to 1e-9 K */
    const char *cases[2] = {"cases/ammonia_converter.yaml", "cases/methanol_converter.yaml"};
    const double T0[2] = {633.15, 473.15}, dT[2] = {19.7, 8.3};
    const double P0[2] = {97e5, 43e5}, dP[2] = {61e5, 23e5};
    for (int cc = 0; cc < 2; cc++) {
        setup s;
        setup_open(&s, cases[cc], KPHI_EOS_PR);
        enum { NT = 4, NP = 3 };
        double T[NT], P[NP];
        for (size_t k = 0; k < NT; k++)
            T[k] = T0[cc] + dT[cc] * (double)k;
        for (size_t k = 0; k < NP; k++)
            P[k] = P0[cc] + dP[cc] * (double)k;
        collect a, b;
        collect_init(&a, NT * NP);
        collect_init(&b, NT * NP);
        ck_assert_int_eq(run_opt(&s, T, NT, P, NP, 1, 32, 1, &a), 0);
        ck_assert_int_eq(run_opt(&s, T, NT, P, NP, 3, 5, 1, &b), 0);
        ck_assert_uint_eq(a.n, NT * NP);
        ck_assert_uint_eq(a.csv_len, b.csv_len);
        ck_assert_msg(memcmp(a.csv, b.csv, a.csv_len) == 0, "%s: rows differ", cases[cc]);
        const kphi_rxnset *set = kphi_case_rxnset(s.cs);
        size_t ns = kphi_rxnset_n_species(set), nr = kphi_rxnset_n_reactions(set);
        kphi_equil_work *w = kphi_equil_work_alloc(ns, nr);
        kphi_equil_result *r = kphi_equil_result_alloc(ns, nr);
        kphi_error err;
        kphi_error_clear(&err);
        for (size_t k = 0; k < a.n; k++) {
            ck_assert(!a.failed[k]);
            for (int m = 0; m < 2; m++) {
                const kphi_eos *eos = m == 0 ? s.real : s.ideal;
                ck_assert_int_eq(kphi_equil_adiabatic_outlet(set, eos, a.T[k], a.P[k],
                                                             kphi_case_feed(s.cs), NULL, w, r,
                                                             &err),
                                 KPHI_OK);
                ck_assert_double_eq_tol(a.Tout[m][k], r->T, 1e-9);
                /* exothermic synthesis: the bed heats up */
                ck_assert(a.Tout[m][k] > a.T[k] + 1.0);
            }
        }
        kphi_equil_result_free(r);
        kphi_equil_work_free(w);
        collect_free(&a);
        collect_free(&b);
        setup_close(&s);
    }
}
END_TEST

static Suite *sweep_suite(void)
{
    Suite *s = suite_create("sweep");
    TCase *tc = tcase_create("core");
    tcase_set_timeout(tc, 60);
    tcase_add_test(tc, grid_order_and_identical_for_any_threads);
    tcase_add_test(tc, sweep_agrees_with_single_solves);
    tcase_add_test(tc, failed_points_are_rows_and_stop_works);
    tcase_add_test(tc, adiabatic_outlets_match_single_searches);
    suite_add_tcase(s, tc);
    return s;
}

KPHI_TEST_MAIN(sweep_suite)
