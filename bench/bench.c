/* kphi benchmark: prints its figures; run by `make bench`.
 *
 *   1. microseconds per solve (median of 15 batches) for ammonia and methanol converter
 *      points with the ideal gas and Peng-Robinson, cold start;
 *   2. a 200 x 200 Peng-Robinson ammonia sweep (each point real + ideal, CSV rows written
 *      to /dev/null): wall time and points per second on 1 thread and on all cores
 *      (median of 5 runs), and the time spent inside the row callback: the callback runs
 *      serially (grid order), so on several threads it bounds the wall time from below;
 *   3. a 200 x 20 ammonia sweep with the adiabatic bed outlet at every point (sweep
 *      --adiabatic: a root search on T with some 20-40 equilibrium solves per model and
 *      point), on all cores, median of 3 runs;
 *   4. peak resident memory of `kphi sweep` over a 1000 x 1000 grid streamed to /dev/null
 *      (the CLI run as a child process; its maximum RSS from wait4());
 *   5. microseconds per flash of the ammonia separator case (cases/ammonia_separator.yaml,
 *      -5 C, 190 bar) and per chemical and phase equilibrium of the methanol converter
 *      feed (cases/methanol_converter.yaml) at 60 C, 78 bar, where a liquid forms
 *      (kphi_phase_equil_solve()), median of 15 batches;
 *   6. milliseconds per loop solve (kphi_loop_solve(), Peng-Robinson converter, cold
 *      start) of cases/ammonia_loop.yaml and cases/methanol_loop.yaml, median of 15
 *      batches, and a 21 x 21 ammonia loop sweep over loop pressure x converter outlet
 *      temperature (each point the real-gas and the ideal-gas converter, cold start,
 *      OpenMP over the points with one kphi_loop_work per thread): wall seconds on 1
 *      thread and on all cores, median of 3.
 * Usage: kphi_bench KPHI_BINARY */
#define _DEFAULT_SOURCE 1 /* wait4() */
#include <math.h>
#include <spawn.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/resource.h>
#include <sys/time.h>
#include <sys/wait.h>
#include <time.h>

#ifdef _OPENMP
#include <omp.h>
#endif

#include <gsl/gsl_errno.h>

#include "kphi/kphi.h"
#include "kphi/sweep.h"

extern char **environ;

static double now(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

static int cmp_double(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

static double median(double *v, size_t n)
{
    qsort(v, n, sizeof *v, cmp_double);
    return n % 2 ? v[n / 2] : 0.5 * (v[n / 2 - 1] + v[n / 2]);
}

static kphi_case *load(const char *path)
{
    kphi_error err;
    kphi_error_clear(&err);
    kphi_case *c = kphi_case_load_file(path, &err);
    if (c == NULL || kphi_case_validate(c, &err) != KPHI_OK) {
        char line[512];
        kphi_error_format(&err, line, sizeof line);
        fprintf(stderr, "bench: %s\n", line);
        exit(1);
    }
    return c;
}

/* Median microseconds per cold-start solve at the case's T and P. */
static double time_solve(const kphi_case *c, kphi_eos_model model)
{
    kphi_error err;
    kphi_error_clear(&err);
    const kphi_rxnset *set = kphi_case_rxnset(c);
    size_t s = kphi_rxnset_n_species(set), r = kphi_rxnset_n_reactions(set);
    kphi_eos *eos = kphi_case_make_eos(c, model, &err);
    kphi_equil_work *w = kphi_equil_work_alloc(s, r);
    kphi_equil_result *res = kphi_equil_result_alloc(s, r);
    if (eos == NULL || w == NULL || res == NULL)
        exit(1);
    const double *feed = kphi_case_feed(c);
    double T = kphi_case_T(c), P = kphi_case_P(c);
    enum { BATCHES = 15, PER = 2000 };
    double t[BATCHES];
    for (int b = 0; b < BATCHES; b++) {
        double t0 = now();
        for (int k = 0; k < PER; k++) {
            /* vary P a little so nothing is cached between solves */
            double Pk = P * (1.0 + 1e-4 * (double)(k % 7));
            if (kphi_equil_solve(set, eos, T, Pk, feed, NULL, NULL, w, res, &err) != KPHI_OK) {
                fprintf(stderr, "bench: solve failed: %s\n", err.msg);
                exit(1);
            }
        }
        t[b] = (now() - t0) / PER * 1e6;
    }
    kphi_equil_result_free(res);
    kphi_equil_work_free(w);
    kphi_eos_free(eos);
    return median(t, BATCHES);
}

typedef struct {
    FILE *out;
    const kphi_rxnset *set;
    size_t n;
    double busy; /* seconds inside the callback */
} sink;

static int to_sink(void *ctx, size_t iT, size_t iP, double T, double P,
                   const kphi_report_point *pt, const kphi_error *failure)
{
    (void)iT;
    (void)iP;
    sink *s = ctx;
    s->n++;
    double t0 = now();
    int rc = pt != NULL ? kphi_report_csv_row(s->out, pt, 0, NULL)
                        : kphi_report_csv_failed_row(s->out, s->set, T, P, failure->msg, 0,
                                                     NULL, NULL);
    s->busy += now() - t0;
    return rc;
}

/* Wall seconds of an nT x nP PR sweep over the ammonia case, T from T0 to T1 (K), P from
 * P0 to P1 (Pa); *busy: seconds in the callback. */
typedef struct {
    size_t nT, nP;
    double T0, T1, P0, P1;
    int adiabatic;
} grid_spec;

static double time_sweep(const kphi_case *c, const grid_spec *g, int threads, size_t *points,
                         double *busy)
{
    kphi_error err;
    kphi_error_clear(&err);
    const kphi_rxnset *set = kphi_case_rxnset(c);
    kphi_eos *pr = kphi_case_make_eos(c, KPHI_EOS_PR, &err);
    kphi_eos *ig = kphi_case_make_eos(c, KPHI_EOS_IDEAL, &err);
    double *T = malloc(g->nT * sizeof *T), *P = malloc(g->nP * sizeof *P);
    for (size_t k = 0; k < g->nT; k++)
        T[k] = g->T0 + (g->T1 - g->T0) * (double)k / (double)(g->nT - 1);
    for (size_t k = 0; k < g->nP; k++)
        P[k] = g->P0 + (g->P1 - g->P0) * (double)k / (double)(g->nP - 1);
    sink s = {fopen("/dev/null", "w"), set, 0, 0.0};
    kphi_sweep_options opt = kphi_sweep_options_default();
    opt.threads = threads;
    opt.adiabatic = g->adiabatic;
    double t0 = now();
    int rc = kphi_sweep_run(set, pr, ig, kphi_case_feed(c), T, g->nT, P, g->nP, &opt, to_sink,
                            &s, &err);
    double dt = now() - t0;
    if (rc != KPHI_OK) {
        fprintf(stderr, "bench: sweep failed: %s\n", err.msg);
        exit(1);
    }
    fclose(s.out);
    *points = s.n;
    *busy = s.busy;
    free(T);
    free(P);
    kphi_eos_free(pr);
    kphi_eos_free(ig);
    return dt;
}

/* Peak RSS in MB of `kphi sweep` over a 1000 x 1000 grid written to /dev/null. */
static double peak_memory(const char *kphi, double *seconds)
{
    char *argv[] = {(char *)kphi,
                    "sweep",
                    "cases/ammonia_converter.yaml",
                    "--T",
                    "350:550:0.2002002002C",
                    "--P",
                    "50:400:0.35035035035bar",
                    "-o",
                    "/dev/null",
                    NULL};
    pid_t pid;
    double t0 = now();
    if (posix_spawn(&pid, kphi, NULL, NULL, argv, environ) != 0)
        return NAN;
    int status;
    struct rusage ru;
    if (wait4(pid, &status, 0, &ru) < 0 || !WIFEXITED(status) || WEXITSTATUS(status) != 0)
        return NAN;
    *seconds = now() - t0;
    return (double)ru.ru_maxrss / 1024.0;
}

/* ------------------------------------------------------ phases and the loop */

/* A loop case, checked for the loop. */
static kphi_case *load_loop(const char *path)
{
    kphi_error err;
    kphi_error_clear(&err);
    kphi_case *c = kphi_case_load_file(path, &err);
    if (c == NULL || kphi_case_validate_loop(c, &err) != KPHI_OK) {
        char line[512];
        kphi_error_format(&err, line, sizeof line);
        fprintf(stderr, "bench: %s\n", line);
        exit(1);
    }
    return c;
}

static void fail(const char *what, const kphi_error *err)
{
    fprintf(stderr, "bench: %s failed: %s\n", what, err->msg);
    exit(1);
}

/* Median microseconds per flash of the case's feed at its T and P (P varied by up to
 * 6e-4 so that nothing carries over). */
static double time_flash(const kphi_case *c)
{
    kphi_error err;
    kphi_error_clear(&err);
    size_t s = kphi_rxnset_n_species(kphi_case_rxnset(c));
    kphi_eos *eos = kphi_case_make_eos(c, KPHI_EOS_PR, &err);
    kphi_phase_work *w = kphi_phase_work_alloc(s, 0);
    kphi_flash_result *res = kphi_flash_result_alloc(s);
    if (eos == NULL || w == NULL || res == NULL)
        exit(1);
    enum { BATCHES = 15, PER = 2000 };
    double t[BATCHES], T = kphi_case_T(c), P = kphi_case_P(c);
    for (int b = 0; b < BATCHES; b++) {
        double t0 = now();
        for (int k = 0; k < PER; k++)
            if (kphi_phase_flash(eos, T, P * (1.0 + 1e-4 * (double)(k % 7)), kphi_case_feed(c),
                                 NULL, w, res, &err) != KPHI_OK)
                fail("flash", &err);
        t[b] = (now() - t0) / PER * 1e6;
    }
    if (res->n_phases != 2)
        fprintf(stderr, "bench: the separator flash gave one phase\n");
    kphi_flash_result_free(res);
    kphi_phase_work_free(w);
    kphi_eos_free(eos);
    return median(t, BATCHES);
}

/* Median microseconds per chemical and phase equilibrium of the case's feed at T, P (all
 * at the same T and P, so that a solve that fails near P does not stop the benchmark);
 * *stalled counts the failures over P(1 + k 1e-4), k = 0..6, each tried once. */
static double time_phase_equil(const kphi_case *c, double T, double P, size_t *phases,
                               int *stalled)
{
    kphi_error err;
    kphi_error_clear(&err);
    const kphi_rxnset *set = kphi_case_rxnset(c);
    size_t s = kphi_rxnset_n_species(set), r = kphi_rxnset_n_reactions(set);
    kphi_eos *eos = kphi_case_make_eos(c, KPHI_EOS_PR, &err);
    kphi_equil_work *ew = kphi_equil_work_alloc(s, r);
    kphi_phase_work *pw = kphi_phase_work_alloc(s, r);
    kphi_equil_result *res = kphi_equil_result_alloc(s, r);
    kphi_flash_result *ph = kphi_flash_result_alloc(s);
    if (eos == NULL || ew == NULL || pw == NULL || res == NULL || ph == NULL)
        exit(1);
    *stalled = 0;
    for (int k = 0; k < 7; k++) {
        kphi_error e;
        kphi_error_clear(&e);
        if (kphi_phase_equil_solve(set, eos, T, P * (1.0 + 1e-4 * (double)k), kphi_case_feed(c),
                                   NULL, 0, NULL, NULL, ew, pw, res, ph, &e) != KPHI_OK)
            ++*stalled;
    }
    enum { BATCHES = 15, PER = 200 };
    double t[BATCHES];
    for (int b = 0; b < BATCHES; b++) {
        double t0 = now();
        for (int k = 0; k < PER; k++)
            if (kphi_phase_equil_solve(set, eos, T, P, kphi_case_feed(c), NULL, 0, NULL, NULL, ew,
                                       pw, res, ph, &err) != KPHI_OK)
                fail("phase equilibrium", &err);
        t[b] = (now() - t0) / PER * 1e6;
    }
    *phases = ph->n_phases;
    kphi_flash_result_free(ph);
    kphi_equil_result_free(res);
    kphi_phase_work_free(pw);
    kphi_equil_work_free(ew);
    kphi_eos_free(eos);
    return median(t, BATCHES);
}

/* Median milliseconds per cold-start loop solve with the PR converter; *newton: the
 * Newton steps of one solve. */
static double time_loop(const kphi_case *c, int *newton)
{
    kphi_error err;
    kphi_error_clear(&err);
    const kphi_rxnset *set = kphi_case_rxnset(c);
    size_t s = kphi_rxnset_n_species(set), r = kphi_rxnset_n_reactions(set);
    kphi_eos *pr = kphi_case_make_eos(c, KPHI_EOS_PR, &err);
    kphi_loop_work *w = kphi_loop_work_alloc(s, r);
    kphi_loop_result *res = kphi_loop_result_alloc(s);
    double *mk = calloc(s, sizeof *mk);
    if (pr == NULL || w == NULL || res == NULL || mk == NULL)
        exit(1);
    kphi_loop_spec sp;
    (void)kphi_loop_spec_from_case(c, mk, &sp); /* per 100 mol/s: production cases */
    double P = sp.P;
    enum { BATCHES = 15, PER = 20 };
    double t[BATCHES];
    for (int b = 0; b < BATCHES; b++) {
        double t0 = now();
        for (int k = 0; k < PER; k++) {
            sp.P = P * (1.0 + 1e-4 * (double)(k % 7));
            if (kphi_loop_solve(set, pr, pr, &sp, NULL, w, res, &err) != KPHI_OK)
                fail("loop", &err);
        }
        t[b] = (now() - t0) / PER * 1e3;
    }
    *newton = res->iterations;
    free(mk);
    kphi_loop_result_free(res);
    kphi_loop_work_free(w);
    kphi_eos_free(pr);
    return median(t, BATCHES);
}

/* Wall seconds of an n x n loop sweep over P (P/1.3 .. 1.3 P) x T_out (T_out - 40 K ..
 * T_out + 40 K) of the case, each point solved with the real-gas and the ideal-gas
 * converter from a cold start; *failed counts points without an answer. */
static double time_loop_sweep(const kphi_case *c, int n, int threads, int *failed)
{
    kphi_error err;
    kphi_error_clear(&err);
    const kphi_rxnset *set = kphi_case_rxnset(c);
    size_t s = kphi_rxnset_n_species(set), r = kphi_rxnset_n_reactions(set);
    kphi_eos *pr = kphi_case_make_eos(c, KPHI_EOS_PR, &err);
    kphi_eos *ig = kphi_case_make_eos(c, KPHI_EOS_IDEAL, &err);
    double *mk = calloc(s, sizeof *mk);
    if (pr == NULL || ig == NULL || mk == NULL)
        exit(1);
    kphi_loop_spec base;
    (void)kphi_loop_spec_from_case(c, mk, &base);
    int bad = 0;
    double t0 = now();
#pragma omp parallel num_threads(threads) reduction(+ : bad)
    {
        kphi_loop_work *w = kphi_loop_work_alloc(s, r);
        kphi_loop_result *res = kphi_loop_result_alloc(s);
        if (w == NULL || res == NULL)
            exit(1);
#pragma omp for schedule(dynamic, 1)
        for (int k = 0; k < n * n; k++) {
            kphi_loop_spec sp = base;
            double a = (double)(k / n) / (double)(n - 1), b = (double)(k % n) / (double)(n - 1);
            sp.P = base.P / 1.3 * pow(1.3 * 1.3, a);
            sp.P_sep = sp.P * base.P_sep / base.P;
            sp.T_out = base.T_out - 40.0 + 80.0 * b;
            kphi_error e;
            kphi_error_clear(&e);
            if (kphi_loop_solve(set, pr, pr, &sp, NULL, w, res, &e) != KPHI_OK)
                bad++;
            kphi_error_clear(&e);
            if (kphi_loop_solve(set, ig, pr, &sp, NULL, w, res, &e) != KPHI_OK)
                bad++;
        }
        kphi_loop_result_free(res);
        kphi_loop_work_free(w);
    }
    double dt = now() - t0;
    *failed = bad;
    free(mk);
    kphi_eos_free(pr);
    kphi_eos_free(ig);
    return dt;
}

int main(int argc, char **argv)
{
    gsl_set_error_handler_off();
    if (argc < 2) {
        fprintf(stderr, "usage: kphi_bench KPHI_BINARY\n");
        return 2;
    }
    kphi_case *nh3 = load("cases/ammonia_converter.yaml");
    kphi_case *meoh = load("cases/methanol_converter.yaml");
    int cores = 1;
#ifdef _OPENMP
    cores = omp_get_max_threads();
#endif
    printf("kphi %s benchmark (%d cores)\n\n", kphi_version(), cores);
    printf("single solves, cold start, median of 15 batches of 2000:\n");
    printf("  ammonia  ideal  %7.2f us/solve\n", time_solve(nh3, KPHI_EOS_IDEAL));
    printf("  ammonia  pr     %7.2f us/solve   (target <= 5)\n", time_solve(nh3, KPHI_EOS_PR));
    printf("  methanol ideal  %7.2f us/solve\n", time_solve(meoh, KPHI_EOS_IDEAL));
    printf("  methanol pr     %7.2f us/solve   (target <= 10)\n", time_solve(meoh, KPHI_EOS_PR));
    fflush(stdout);

    /* Beattie-Bridgeman (src/eos_bb.c): the full equation and its second-virial form */
    printf("  ammonia  bb     %7.2f us/solve   (target <= 10)\n", time_solve(nh3, KPHI_EOS_BB));
    printf("  ammonia  bbv    %7.2f us/solve\n", time_solve(nh3, KPHI_EOS_BBV));
    fflush(stdout);

    printf("\n200 x 200 pr ammonia sweep (real + ideal per point, CSV to /dev/null), median "
           "of 5:\n");
    int threads[2] = {1, cores};
    const grid_spec plain = {200, 200, 623.15, 823.15, 50e5, 400e5, 0}; /* 350-550 C */
    for (int k = 0; k < (cores > 1 ? 2 : 1); k++) {
        double t[5], b[5];
        size_t pts = 0;
        for (int rep = 0; rep < 5; rep++)
            t[rep] = time_sweep(nh3, &plain, threads[k], &pts, &b[rep]);
        double m = median(t, 5), mb = median(b, 5);
        printf("  %d thread%s  %6.3f s   %8.0f points/s   (CSV callback %.3f s)%s\n", threads[k],
               threads[k] > 1 ? "s" : " ", m, (double)pts / m, mb,
               threads[k] > 1 ? "   (target <= 0.5 s on 2 cores)" : "");
        fflush(stdout);
    }
    {
        const grid_spec beds = {200, 20, 573.15, 773.15, 100e5, 300e5, 1}; /* inlet 300-500 C */
        double t[3], b[3];
        size_t pts = 0;
        for (int rep = 0; rep < 3; rep++)
            t[rep] = time_sweep(nh3, &beds, cores, &pts, &b[rep]);
        double m = median(t, 3);
        printf("\n200 x 20 pr ammonia sweep --adiabatic (bed outlet per point, real + ideal), "
               "%d thread%s, median of 3:\n  %6.3f s   %8.0f points/s\n",
               cores, cores > 1 ? "s" : "", m, (double)pts / m);
        fflush(stdout);
    }
    double secs = NAN;
    double mb = peak_memory(argv[1], &secs);
    printf("\n1000 x 1000 pr sweep through the CLI to /dev/null: peak memory %.1f MB, %.1f s "
           "(target < 20 MB)\n",
           mb, secs);
    fflush(stdout);

    kphi_case *sep = load("cases/ammonia_separator.yaml");
    printf("\nphases, pr, median of 15 batches:\n");
    printf("  flash, ammonia separator (-5 C, 190 bar)            %8.2f us   (target <= 20)\n",
           time_flash(sep));
    size_t np = 0;
    int stalled = 0;
    double us = time_phase_equil(meoh, 333.15, 78e5, &np, &stalled);
    printf("  reactive methanol, converter feed at 60 C, 78 bar    %8.2f us   (%zu phase%s; "
           "target <= 200)\n",
           us, np, np == 1 ? "" : "s");
    if (stalled)
        printf("    (%d of 7 solves at 78.00-78.05 bar did not converge)\n", stalled);
    us = time_phase_equil(nh3, kphi_case_T(nh3), kphi_case_P(nh3), &np, &stalled);
    printf("  ammonia converter with the phase test (one gas phase) %7.2f us   (the solve "
           "alone: above)\n",
           us);
    fflush(stdout);
    kphi_case_free(sep);

    kphi_case *lnh3 = load_loop("cases/ammonia_loop.yaml");
    kphi_case *lmeoh = load_loop("cases/methanol_loop.yaml");
    int it_n = 0, it_m = 0;
    printf("\nloop solves, pr converter, cold start, median of 15 batches of 20:\n");
    double ms = time_loop(lnh3, &it_n);
    printf("  ammonia loop  (cases/ammonia_loop.yaml)   %7.3f ms   (%d Newton steps; target <= "
           "2)\n",
           ms, it_n);
    ms = time_loop(lmeoh, &it_m);
    printf("  methanol loop (cases/methanol_loop.yaml)  %7.3f ms   (%d Newton steps; target <= "
           "5)\n",
           ms, it_m);
    fflush(stdout);
    printf("\n21 x 21 ammonia loop sweep (P 150-254 bar x T_out 420-500 C; real + ideal per "
           "point, cold start), median of 3:\n");
    for (int k = 0; k < (cores > 1 ? 2 : 1); k++) {
        double t[3];
        int failed = 0;
        for (int rep = 0; rep < 3; rep++)
            t[rep] = time_loop_sweep(lnh3, 21, threads[k], &failed);
        printf("  %d thread%s  %6.3f s%s%s\n", threads[k], threads[k] > 1 ? "s" : " ",
               median(t, 3), threads[k] > 1 ? "   (target <= 2 s on 2 cores)" : "",
               failed ? "   SOME POINTS FAILED" : "");
        if (failed)
            printf("  (%d of %d solves failed)\n", failed, 2 * 21 * 21);
        fflush(stdout);
    }
    kphi_case_free(lnh3);
    kphi_case_free(lmeoh);
    kphi_case_free(nh3);
    kphi_case_free(meoh);
    return 0;
}
