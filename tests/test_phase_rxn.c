/* Tests of chemical equilibrium with a liquid (kphi_phase_equil_solve(), src/phase_rxn.c):
 * worked cases of the shipped sets where the equilibrium gas condenses, and random
 * problems (1000 per run) in and around the two-phase region, each answer checked against
 * what defines it, computed here independently of the solver:
 *   - element balance of the whole against the feed, relative 1e-12;
 *   - every affinity that can act, A_j = sum_i nu_ij [g_i°(T)/RT + ln(x_i phi_i P/P°)]
 *     from the species data and a fresh EOS evaluation of each phase, |A_j| <= 1e-9;
 *   - each species has the same fugacity in both phases: |ln(y phi^V) - ln(x phi^L)|
 *     <= 1e-9;
 *   - phase balance: fraction-weighted phase compositions give the overall one, 1e-12;
 *   - a plain flash (kphi_phase_flash()) of the total composition gives the same phases
 *     (fractions and compositions to 1e-7);
 *   - each phase is stable by the stability test;
 *   - K = Kphi Ky (P/P°)^dnu with the vapour's y and phi.
 * Random problems: the ammonia and methanol sets, PR and SRK, T uniform 250-450 K, P
 * log-uniform 20-400 bar, feeds with random amounts (zero for some species). Seeded
 * (splitmix64; Steele, Lea & Flood 2014), KPHI_SEED and KPHI_PHASE_RXN_N change them,
 * KPHI_PHASE_RXN_PROBLEM=k replays one. A problem that does not converge must fail with
 * KPHI_EFAILED and a message. */
#include "kphi/phase.h"

#include <check.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "kphi/case.h"
#include "kphi/thermo.h"
#include "testutil.h"

#define P_STD 1e5

typedef struct {
    kphi_case *cs;
    const kphi_rxnset *set;
    size_t s, r;
} setup;

static setup open_case(const char *path)
{
    setup u;
    kphi_error err;
    kphi_error_clear(&err);
    u.cs = kphi_case_load_file(path, &err);
    ck_assert_msg(u.cs != NULL, "%s", err.msg);
    u.set = kphi_case_rxnset(u.cs);
    u.s = kphi_rxnset_n_species(u.set);
    u.r = kphi_rxnset_n_reactions(u.set);
    return u;
}

/* Checks of one answer; returns the number of broken properties (and prints them). */
static int check_answer(const setup *u, const kphi_eos *eos, double T, double P,
                        const double n0[], const kphi_equil_result *res,
                        const kphi_flash_result *ph, kphi_phase_work *pw, const char *label)
{
    size_t s = u->s, r = u->r;
    int bad = 0;
    /* element balance */
    double worst = 0.0, bmax = 0.0;
    for (size_t e = 0; e < kphi_rxnset_n_elements(u->set); e++) {
        double b0 = 0.0, b = 0.0;
        for (size_t i = 0; i < s; i++) {
            b0 += kphi_rxnset_atoms(u->set, e, i) * n0[i];
            b += kphi_rxnset_atoms(u->set, e, i) * res->n[i];
        }
        bmax = fmax(bmax, b0);
        worst = fmax(worst, fabs(b - b0));
    }
    if (!(worst <= 1e-12 * bmax)) {
        printf("%s: element balance %.3g\n", label, worst / bmax);
        bad++;
    }
    /* fresh EOS evaluation of each phase */
    kphi_eos_work *ew = kphi_eos_work_alloc(s);
    double lnphi[2][32];
    for (size_t k = 0; k < ph->n_phases; k++) {
        kphi_eos_state st;
        kphi_error e;
        kphi_error_clear(&e);
        int rc = kphi_eos_eval_root(eos, KPHI_EOS_ROOT_STABLE, T, P, ph->phase[k].y, lnphi[k],
                                    NULL, &st, ew, &e);
        ck_assert_msg(rc == KPHI_OK, "%s: %s", label, e.msg);
    }
    /* affinities from the species data, in the first phase */
    for (size_t j = 0; j < r; j++) {
        double A = 0.0;
        int blocked = 0;
        for (size_t i = 0; i < s; i++) {
            double nu = kphi_rxnset_nu(u->set, j, i);
            if (nu == 0.0)
                continue;
            if (!(ph->phase[0].y[i] > 0.0)) {
                blocked = 1;
                break;
            }
            A += nu * (kphi_thermo_g_rt(kphi_rxnset_species(u->set, i), T) + log(P / P_STD) +
                       log(ph->phase[0].y[i]) + lnphi[0][i]);
        }
        if (!blocked && !(fabs(A) <= 1e-9)) {
            printf("%s: affinity %zu is %.3g\n", label, j + 1, A);
            bad++;
        }
    }
    if (ph->n_phases == 2) {
        for (size_t i = 0; i < s; i++) {
            if (!(ph->phase[0].y[i] > 0.0 && ph->phase[1].y[i] > 0.0))
                continue;
            double d = log(ph->phase[0].y[i]) + lnphi[0][i] - log(ph->phase[1].y[i]) -
                       lnphi[1][i];
            if (!(fabs(d) <= 1e-9)) {
                printf("%s: fugacities of %s differ by %.3g\n", label,
                       kphi_rxnset_species(u->set, i)->name, d);
                bad++;
            }
        }
        double nt = res->n_total;
        for (size_t i = 0; i < s; i++) {
            double z = res->n[i] / nt;
            double m = ph->phase[0].fraction * ph->phase[0].y[i] +
                       ph->phase[1].fraction * ph->phase[1].y[i];
            if (!(fabs(m - z) <= 1e-12)) {
                printf("%s: phase balance of %s off by %.3g\n", label,
                       kphi_rxnset_species(u->set, i)->name, m - z);
                bad++;
            }
        }
        /* a plain flash of the whole reproduces the phases */
        kphi_flash_result *f = kphi_flash_result_alloc(s);
        kphi_error e;
        kphi_error_clear(&e);
        int rc = kphi_phase_flash(eos, T, P, res->n, NULL, pw, f, &e);
        if (rc != KPHI_OK || f->n_phases != 2) {
            printf("%s: the flash of the whole gives %s\n", label,
                   rc != KPHI_OK ? e.msg : "one phase");
            bad++;
        } else {
            double dmax = fabs(f->phase[0].fraction - ph->phase[0].fraction);
            for (size_t k = 0; k < 2; k++)
                for (size_t i = 0; i < s; i++)
                    dmax = fmax(dmax, fabs(f->phase[k].y[i] - ph->phase[k].y[i]));
            if (!(dmax <= 1e-7)) {
                printf("%s: the flash of the whole differs by %.3g\n", label, dmax);
                bad++;
            }
        }
        kphi_flash_result_free(f);
        /* each phase stable */
        for (size_t k = 0; k < 2; k++) {
            int stable = 0;
            double tm;
            kphi_error_clear(&e);
            rc = kphi_phase_stability(eos, T, P, ph->phase[k].y, NULL, pw, &stable, NULL, &tm, &e);
            if (rc != KPHI_OK || !stable) {
                printf("%s: phase %zu is not stable (tm %.3g)\n", label, k, tm);
                bad++;
            }
        }
    }
    /* K = Kphi Ky (P/P°)^dnu */
    for (size_t j = 0; j < r; j++) {
        if (!isfinite(res->lnKy[j]))
            continue;
        double c = res->lnK[j] - res->lnKphi[j] - res->lnKy[j] -
                   kphi_rxnset_dnu(u->set, j) * log(P / P_STD);
        if (!(fabs(c) <= 1e-9)) {
            printf("%s: K check of reaction %zu off by %.3g\n", label, j + 1, c);
            bad++;
        }
    }
    kphi_eos_work_free(ew);
    return bad;
}

static int solve_and_check(const setup *u, kphi_eos_model model, double T, double P,
                           const double n0[], const char *label, int *two, int *failed)
{
    kphi_error err;
    kphi_error_clear(&err);
    kphi_eos *eos = kphi_case_make_eos(u->cs, model, &err);
    kphi_equil_work *ew = kphi_equil_work_alloc(u->s, u->r);
    kphi_phase_work *pw = kphi_phase_work_alloc(u->s, u->r);
    kphi_equil_result *res = kphi_equil_result_alloc(u->s, u->r);
    kphi_flash_result *ph = kphi_flash_result_alloc(u->s);
    int rc = kphi_phase_equil_solve(u->set, eos, T, P, n0, NULL, 0, NULL, NULL, ew, pw, res, ph,
                                    &err);
    int bad = 0;
    if (rc == KPHI_OK) {
        bad = check_answer(u, eos, T, P, n0, res, ph, pw, label);
        *two = ph->n_phases == 2;
    } else {
        *failed = 1;
        if (getenv("KPHI_PHASE_RXN_VERBOSE") != NULL)
            printf("%s: %s\n", label, err.msg);
        if (rc != KPHI_EFAILED || err.msg[0] == '\0') {
            printf("%s: failed with code %d '%s'\n", label, rc, err.msg);
            bad++;
        }
    }
    kphi_flash_result_free(ph);
    kphi_equil_result_free(res);
    kphi_phase_work_free(pw);
    kphi_equil_work_free(ew);
    kphi_eos_free(eos);
    return bad;
}

/* Worked cases: crude methanol condenses out of the equilibrium at 40-100 C and 78 bar
 * (two phases, liquid rich in CH3OH and H2O); at 250 C the gas is stable and the answer is
 * the gas-phase one. Ammonia at 25 C and 200 bar goes almost completely to liquid NH3. */
START_TEST(worked_cases)
{
    setup m = open_case("cases/methanol_converter.yaml");
    const double *feed = kphi_case_feed(m.cs);
    const double Ts[] = {313.15, 333.15, 373.15};
    for (size_t k = 0; k < 3; k++) {
        int two = 0, failed = 0;
        char label[64];
        snprintf(label, sizeof label, "methanol %.2f K", Ts[k]);
        ck_assert_int_eq(solve_and_check(&m, KPHI_EOS_PR, Ts[k], 78e5, feed, label, &two, &failed),
                         0);
        ck_assert_int_eq(failed, 0);
        ck_assert_int_eq(two, 1);
    }
    int two = 0, failed = 0;
    ck_assert_int_eq(solve_and_check(&m, KPHI_EOS_PR, 523.15, 80e5, feed, "methanol 250 C", &two,
                                     &failed),
                     0);
    ck_assert_int_eq(two, 0);
    kphi_case_free(m.cs);
    setup a = open_case("cases/ammonia_converter.yaml");
    ck_assert_int_eq(solve_and_check(&a, KPHI_EOS_SRK, 298.15, 200e5, kphi_case_feed(a.cs),
                                     "ammonia 25 C", &two, &failed),
                     0);
    ck_assert_int_eq(failed, 0);
    kphi_case_free(a.cs);
}
END_TEST

static uint64_t splitmix(uint64_t *x)
{
    uint64_t z = (*x += 0x9e3779b97f4a7c15ULL);
    z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9ULL;
    z = (z ^ (z >> 27)) * 0x94d049bb133111ebULL;
    return z ^ (z >> 31);
}

static double uniform(uint64_t *x)
{
    return (double)(splitmix(x) >> 11) * (1.0 / 9007199254740992.0);
}

START_TEST(random_problems)
{
    const char *es = getenv("KPHI_SEED"), *en = getenv("KPHI_PHASE_RXN_N");
    const char *ep = getenv("KPHI_PHASE_RXN_PROBLEM");
    uint64_t seed = es != NULL ? strtoull(es, NULL, 10) : 20261202ULL;
    long n = en != NULL ? atol(en) : 1000;
    long only = ep != NULL ? atol(ep) : -1;
    setup sets[2] = {open_case("cases/ammonia_converter.yaml"),
                     open_case("cases/methanol_converter.yaml")};
    long bad = 0, two = 0, failed = 0;
    for (long k = 0; k < n; k++) {
        if (only >= 0 && k != only)
            continue;
        uint64_t x = seed ^ (0x632be59bd9b4e019ULL * (uint64_t)(k + 1));
        const setup *u = &sets[splitmix(&x) % 2];
        kphi_eos_model model = splitmix(&x) % 2 ? KPHI_EOS_PR : KPHI_EOS_SRK;
        double T = 250.0 + 200.0 * uniform(&x);
        double P = 20e5 * pow(20.0, uniform(&x));
        double n0[32];
        int any = 0;
        for (size_t i = 0; i < u->s; i++) {
            n0[i] = uniform(&x) < 0.2 ? 0.0 : pow(10.0, -2.0 + 3.0 * uniform(&x));
            any = any || (n0[i] > 0.0 && !kphi_rxnset_is_inert(u->set, i));
        }
        if (!any)
            n0[0] = 1.0;
        char label[160];
        snprintf(label, sizeof label, "problem %ld (seed %llu, %s, %s, %.2f K, %.2f bar)", k,
                 (unsigned long long)seed, kphi_rxnset_name(u->set), kphi_eos_model_name(model),
                 T, P / 1e5);
        int is_two = 0, is_failed = 0;
        int b = solve_and_check(u, model, T, P, n0, label, &is_two, &is_failed);
        if (b != 0)
            printf("  replay: KPHI_SEED=%llu KPHI_PHASE_RXN_PROBLEM=%ld "
                   "build/tests/test_phase_rxn\n",
                   (unsigned long long)seed, k);
        bad += b != 0;
        two += is_two;
        failed += is_failed;
    }
    printf("phase_rxn: seed %llu, %ld problems, %ld with two phases, %ld failed with a "
           "message, %ld broke a property\n",
           (unsigned long long)seed, only >= 0 ? 1 : n, two, failed, bad);
    kphi_case_free(sets[0].cs);
    kphi_case_free(sets[1].cs);
    ck_assert_int_eq(bad, 0);
    if (only < 0 && n >= 100)
        ck_assert_msg(two > n / 10, "only %ld of %ld problems had two phases", two, n);
}
END_TEST

static Suite *phase_rxn_suite(void)
{
    Suite *s = suite_create("phase_rxn");
    TCase *t = tcase_create("answers");
    tcase_set_timeout(t, 300);
    tcase_add_test(t, worked_cases);
    tcase_add_test(t, random_problems);
    suite_add_tcase(s, t);
    return s;
}

KPHI_TEST_MAIN(phase_rxn_suite)
