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
 *      (the CLI run as a child process; its maximum RSS from wait4()).
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
    kphi_case_free(nh3);
    kphi_case_free(meoh);
    return 0;
}
