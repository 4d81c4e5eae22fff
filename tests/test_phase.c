/* Unit tests of the phase module: the stability test, the isothermal flash, dew and bubble
 * points and pure-component vapour pressures, each answer checked against the conditions
 * that define it, recomputed here from fresh EOS evaluations rather than read back from
 * the module:
 *   - equal fugacities in both phases: |ln(x_i phi_i^L) - ln(y_i phi_i^V)| < 1e-10 for
 *     every component of the feed (the module's tolerance, kphi_phase_options_default());
 *   - material balance beta y_i + (1 - beta) x_i = z_i to 1e-12;
 *   - the tangent-plane condition (Michelsen 1982a, Fluid Phase Equilib. 9, 1): at a
 *     converged split the tangent-plane distance of any trial composition w,
 *       tpd(w) = sum_i w_i [ln w_i + ln phi_i(w) - ln x_i - ln phi_i(x)],
 *     is >= 0 (here >= -1e-9 over random trials and the pure components), and the
 *     stability test finds each phase of the split stable;
 *   - the Gibbs energy of the split, sum over phases of fraction * sum_i c_i (ln c_i +
 *     ln phi_i), lies below that of the single phase of the feed;
 *   - Clapeyron's equation at a computed vapour pressure, dP/dT = (h_V - h_L)/(T (v_V -
 *     v_L)), with the enthalpies and volumes of the two roots from the EOS.
 * A random search over mixtures of the ammonia and methanol sets closes the file (TCase
 * "property"; see random_flashes).
 *
 * Mixtures: the species of cases/ammonia_converter.yaml and cases/methanol_converter.yaml
 * (invented scenario) with their data from reactions/species.yaml, built by
 * kphi_case_make_eos(); the converter effluent is the case's own equilibrium at 450 C from
 * kphi_equil_solve(). Compositions below are test inputs, not data. Units: K, Pa, mol. */
#include "kphi/phase.h"

#include <check.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "kphi/kphi.h"
#include "testutil.h"

#define AMMONIA_CASE "cases/ammonia_converter.yaml"
#define METHANOL_CASE "cases/methanol_converter.yaml"
#define MAXN 8

static const double FUG_TOL = 1e-10;     /* issue 10: |ln f_i^V - ln f_i^L| */
static const double BALANCE_TOL = 1e-12; /* issue 10: material balance */
static const double TPD_TOL = 1e-9;      /* tangent-plane distance >= -TPD_TOL */

/* ------------------------------------------------------------------ fixtures --- */

/* A case's mixture with one model, and the workspaces the tests use. */
typedef struct {
    kphi_case *c;
    const kphi_rxnset *set;
    kphi_eos *eos;
    size_t n;
    kphi_phase_work *w;
    kphi_flash_result *r;
    kphi_eos_work *ew;
} mix;

static mix mix_open(const char *path, kphi_eos_model model)
{
    mix m;
    kphi_error err;
    kphi_error_clear(&err);
    m.c = kphi_case_load_file(path, &err);
    ck_assert_msg(m.c != NULL, "%s: %s", path, err.msg);
    m.set = kphi_case_rxnset(m.c);
    m.n = kphi_rxnset_n_species(m.set);
    ck_assert(m.n <= MAXN);
    m.eos = kphi_case_make_eos(m.c, model, &err);
    ck_assert_msg(m.eos != NULL, "%s", err.msg);
    m.w = kphi_phase_work_alloc(m.n, 0);
    m.r = kphi_flash_result_alloc(m.n);
    m.ew = kphi_eos_work_alloc(m.n);
    ck_assert(m.w != NULL && m.r != NULL && m.ew != NULL);
    return m;
}

static void mix_close(mix *m)
{
    kphi_eos_work_free(m->ew);
    kphi_flash_result_free(m->r);
    kphi_phase_work_free(m->w);
    kphi_eos_free(m->eos);
    kphi_case_free(m->c);
}

static size_t idx(const mix *m, const char *name)
{
    long k = kphi_rxnset_species_index(m->set, name);
    ck_assert_msg(k >= 0, "no species %s", name);
    return (size_t)k;
}

/* Composition from name/amount pairs (others zero). */
static void compose(const mix *m, double z[], const char *const names[], const double amt[],
                    size_t k)
{
    for (size_t i = 0; i < m->n; i++)
        z[i] = 0.0;
    for (size_t j = 0; j < k; j++)
        z[idx(m, names[j])] = amt[j];
}

static kphi_eos_model model_of(int k)
{
    return k == 0 ? KPHI_EOS_PR : KPHI_EOS_SRK;
}

/* The ammonia case's converter effluent: the equilibrium of its feed at 450 C and its P. */
static void effluent(const mix *m, double y[])
{
    kphi_equil_work *ew = kphi_equil_work_alloc(m->n, kphi_rxnset_n_reactions(m->set));
    kphi_equil_result *res = kphi_equil_result_alloc(m->n, kphi_rxnset_n_reactions(m->set));
    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_equil_solve(m->set, m->eos, 723.15, kphi_case_P(m->c),
                                      kphi_case_feed(m->c), NULL, NULL, ew, res, &err),
                     KPHI_OK);
    memcpy(y, res->y, m->n * sizeof(double));
    ck_assert_double_gt(y[idx(m, "NH3")], 0.1); /* a converter outlet, not the inlet */
    kphi_equil_result_free(res);
    kphi_equil_work_free(ew);
}

/* ------------------------------------------------------ independent checks --- */

/* ln phi of composition c with the root of lower Gibbs energy, evaluated here. */
static kphi_eos_state eval_stable(const mix *m, double T, double P, const double c[],
                                  double lnphi[])
{
    kphi_eos_state st;
    kphi_error err;
    kphi_error_clear(&err);
    int rc = kphi_eos_eval_root(m->eos, KPHI_EOS_ROOT_STABLE, T, P, c, lnphi, NULL, &st, m->ew,
                                &err);
    ck_assert_msg(rc == KPHI_OK, "%s", err.msg);
    return st;
}

/* G/RT per mole of a phase: sum_i c_i (ln c_i + ln phi_i). */
static double g_phase(const mix *m, double T, double P, const double c[])
{
    double l[MAXN], g = 0.0;
    (void)eval_stable(m, T, P, c, l);
    for (size_t i = 0; i < m->n; i++)
        if (c[i] > 0.0)
            g += c[i] * (log(c[i]) + l[i]);
    return g;
}

static void normalise(size_t n, const double z[], double zs[])
{
    double s = 0.0;
    for (size_t i = 0; i < n; i++)
        s += z[i];
    for (size_t i = 0; i < n; i++)
        zs[i] = z[i] / s;
}

/* Tangent-plane distance of trial w from the reference phase ref (its ln phi lref). */
static double tpd(const mix *m, double T, double P, const double ref[], const double lref[],
                  const double wt[])
{
    double l[MAXN], t = 0.0;
    (void)eval_stable(m, T, P, wt, l);
    for (size_t i = 0; i < m->n; i++)
        if (wt[i] > 0.0)
            t += wt[i] * (log(wt[i]) + l[i] - log(ref[i]) - lref[i]);
    return t;
}

/* Everything a two-phase answer r of feed z at T, P must satisfy (see the file comment). */
static void assert_split(const mix *m, double T, double P, const double z[],
                         const kphi_flash_result *r)
{
    size_t n = m->n;
    double zs[MAXN], l0[MAXN], l1[MAXN];
    normalise(n, z, zs);
    ck_assert_int_eq(r->n_phases, 2);
    const double *y = r->phase[0].y, *x = r->phase[1].y;
    double beta = r->phase[0].fraction;
    ck_assert_msg(beta > 0.0 && beta < 1.0, "beta %g", beta);
    ck_assert_double_le(fabs(beta + r->phase[1].fraction - 1.0), 1e-15);
    ck_assert_double_gt(r->phase[0].v, r->phase[1].v); /* phase[0] is the lighter */
    kphi_eos_state s0 = eval_stable(m, T, P, y, l0), s1 = eval_stable(m, T, P, x, l1);
    ck_assert_double_le(fabs(s0.Z - r->phase[0].Z), 1e-12);
    ck_assert_double_le(fabs(s1.Z - r->phase[1].Z), 1e-12);
    ck_assert_double_le(fabs(s0.v - r->phase[0].v), 1e-12 * s0.v);
    double sy = 0.0, sx = 0.0;
    for (size_t i = 0; i < n; i++) {
        sy += y[i];
        sx += x[i];
        ck_assert_double_le(fabs(l0[i] - r->phase[0].lnphi[i]), 1e-12);
        ck_assert_double_le(fabs(l1[i] - r->phase[1].lnphi[i]), 1e-12);
        double bal = fabs(beta * y[i] + (1.0 - beta) * x[i] - zs[i]);
        ck_assert_msg(bal <= BALANCE_TOL, "balance of %zu: %g", i, bal);
        if (zs[i] > 0.0) {
            double d = log(y[i]) + l0[i] - log(x[i]) - l1[i];
            ck_assert_msg(fabs(d) < FUG_TOL, "ln f_V - ln f_L of %s = %g at %.9g K, %g bar, "
                          "beta %.3g (reported residual %.3g)",
                          kphi_rxnset_species(m->set, i)->name, d, T, P / 1e5, beta,
                          r->residual);
            ck_assert_double_le(fabs(r->K[i] / (y[i] / x[i]) - 1.0), 1e-12);
        } else { /* absent from the feed: absent from both phases, K finite */
            ck_assert_double_eq(y[i], 0.0);
            ck_assert_double_eq(x[i], 0.0);
            ck_assert_msg(isfinite(r->K[i]) && r->K[i] > 0.0, "K of absent %zu = %g", i,
                          r->K[i]);
        }
    }
    ck_assert_double_le(fabs(sy - 1.0), 1e-14);
    ck_assert_double_le(fabs(sx - 1.0), 1e-14);
    ck_assert_double_le(r->balance_error, BALANCE_TOL);
    ck_assert_double_lt(r->residual, FUG_TOL);
    ck_assert_double_lt(r->tm_min, 0.0); /* the feed was found unstable */
}

/* The tangent plane at a split: tpd >= -TPD_TOL for the pure components present and
 * n_random random compositions of them; the stability test finds both phases stable; G of
 * the split below G of the single phase. */
static void assert_split_is_minimum(const mix *m, double T, double P, const double z[],
                                    const kphi_flash_result *r, int n_random)
{
    size_t n = m->n;
    double zs[MAXN], lref[MAXN], wt[MAXN];
    normalise(n, z, zs);
    const double *y = r->phase[0].y;
    (void)eval_stable(m, T, P, y, lref);
    uint64_t s = 0x2545f4914f6cdd1dULL; /* xorshift64 (Marsaglia 2003), fixed seed */
    double worst = INFINITY;
    for (int k = -(int)n; k < n_random; k++) {
        if (k < 0) { /* the pure components present */
            size_t p = (size_t)(k + (int)n);
            if (!(zs[p] > 0.0))
                continue;
            for (size_t i = 0; i < n; i++)
                wt[i] = i == p ? 1.0 : 0.0;
        } else {
            double sum = 0.0;
            for (size_t i = 0; i < n; i++) {
                s ^= s << 13;
                s ^= s >> 7;
                s ^= s << 17;
                double u = (double)(s >> 11) * (1.0 / 9007199254740992.0);
                wt[i] = zs[i] > 0.0 ? -log(u + 1e-300) : 0.0; /* uniform on the simplex */
                sum += wt[i];
            }
            for (size_t i = 0; i < n; i++)
                wt[i] /= sum;
        }
        double t = tpd(m, T, P, y, lref, wt);
        worst = fmin(worst, t);
    }
    ck_assert_msg(worst >= -TPD_TOL, "a trial phase has tangent-plane distance %g", worst);
    for (int p = 0; p < 2; p++) {
        int stable = 0;
        double tm = NAN;
        kphi_error err;
        kphi_error_clear(&err);
        ck_assert_int_eq(kphi_phase_stability(m->eos, T, P, r->phase[p].y, NULL, m->w, &stable,
                                              NULL, &tm, &err),
                         KPHI_OK);
        ck_assert_msg(stable == 1 && tm >= -TPD_TOL, "phase %d of the split: tm = %g", p, tm);
    }
    double beta = r->phase[0].fraction;
    double g2 = beta * g_phase(m, T, P, r->phase[0].y) +
                (1.0 - beta) * g_phase(m, T, P, r->phase[1].y);
    double g1 = g_phase(m, T, P, zs);
    ck_assert_msg(g2 < g1, "G/RT of the split %.15g, of one phase %.15g", g2, g1);
}

static int flash(const mix *m, double T, double P, const double z[])
{
    kphi_error err;
    kphi_error_clear(&err);
    int rc = kphi_phase_flash(m->eos, T, P, z, NULL, m->w, m->r, &err);
    ck_assert_msg(rc == KPHI_OK, "flash at %g K, %g bar: %s", T, P / 1e5, err.msg);
    return rc;
}

/* ---------------------------------------------------------------- stability --- */

/* The converter effluent is one gas at the converter's 450 C and 195 bar, and splits at
 * separator conditions (-5 C, same pressure) with a trial phase that is nearly pure
 * ammonia. */
START_TEST(effluent_stable_hot_unstable_cold)
{
    mix m = mix_open(AMMONIA_CASE, model_of(_i));
    double y[MAXN], trial[MAXN], tm = NAN;
    int stable = -1;
    effluent(&m, y);
    const double P = 195e5;
    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_phase_stability(m.eos, 723.15, P, y, NULL, m.w, &stable, trial, &tm,
                                          &err),
                     KPHI_OK);
    ck_assert_int_eq(stable, 1);
    ck_assert_double_ge(tm, -1e-9);
    ck_assert_int_eq(kphi_phase_stability(m.eos, 268.15, P, y, NULL, m.w, &stable, trial, &tm,
                                          &err),
                     KPHI_OK);
    ck_assert_int_eq(stable, 0);
    ck_assert_double_lt(tm, -1e-3);
    ck_assert_double_gt(trial[idx(&m, "NH3")], 0.9);
    double s = 0.0;
    for (size_t i = 0; i < m.n; i++)
        s += trial[i];
    ck_assert_double_le(fabs(s - 1.0), 1e-14);
    /* the flash agrees: one phase, gas-like, at 450 C */
    flash(&m, 723.15, P, y);
    ck_assert_int_eq(m.r->n_phases, 1);
    ck_assert_int_eq(m.r->phase[0].kind, KPHI_PHASE_VAPOUR);
    ck_assert_double_eq(m.r->phase[0].fraction, 1.0);
    for (size_t i = 0; i < m.n; i++) {
        ck_assert_double_le(fabs(m.r->phase[0].y[i] - y[i]), 1e-15);
        ck_assert(isnan(m.r->K[i]));
    }
    mix_close(&m);
}
END_TEST

/* Methanol-water (x = 0.05) at 348 K and 1 atm, between its bubble and dew points: the
 * tangent-plane distance, scanned here over the binary's compositions with the root of
 * lower Gibbs energy at each, falls well below zero at a methanol-rich vapour, so the
 * stability test must find the liquid unstable and the flash must split it. (Wilson's
 * vapour-like start is water-rich enough that its lower-G root is the liquid one.) */
START_TEST(vapour_found_in_water_rich_liquid)
{
    mix m = mix_open(METHANOL_CASE, model_of(_i));
    size_t me = idx(&m, "CH3OH"), wa = idx(&m, "H2O");
    const double T = 348.0, P = 101325.0;
    double z[MAXN] = {0}, lz[MAXN], wt[MAXN] = {0}, trial[MAXN], tm = NAN;
    z[me] = 0.05;
    z[wa] = 0.95;
    (void)eval_stable(&m, T, P, z, lz);
    double scan = INFINITY;
    for (double a = 1e-4; a < 1.0; a += 1e-3) {
        wt[me] = a;
        wt[wa] = 1.0 - a;
        scan = fmin(scan, tpd(&m, T, P, z, lz, wt));
    }
    ck_assert_double_lt(scan, -0.05);
    int stable = -1;
    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_phase_stability(m.eos, T, P, z, NULL, m.w, &stable, trial, &tm, &err),
                     KPHI_OK);
    ck_assert_int_eq(stable, 0);
    ck_assert_double_le(tm, scan + 1e-6); /* the stationary point is the scan's minimum */
    ck_assert_double_gt(trial[me], 0.5);
    flash(&m, T, P, z);
    assert_split(&m, T, P, z, m.r);
    assert_split_is_minimum(&m, T, P, z, m.r, 200);
    ck_assert_int_eq(m.r->phase[0].kind, KPHI_PHASE_VAPOUR);
    mix_close(&m);
}
END_TEST

/* Water with a little methanol and dissolved N2 at 428 K and 150 bar (a mixture the
 * random search below met): the tangent-plane distance of pure N2 from the feed is
 * negative, so a N2-rich gas forms, yet both of Wilson's trial phases fall back onto the
 * feed from their starts. The test must find the feed unstable and the flash split it. */
START_TEST(gas_found_over_water)
{
    mix m = mix_open(METHANOL_CASE, model_of(_i));
    size_t n2 = idx(&m, "N2");
    const double T = 427.87, P = 150.69e5;
    double z[MAXN], lz[MAXN], wt[MAXN] = {0}, tm = NAN;
    const char *const nm[3] = {"CH3OH", "H2O", "N2"};
    const double amt[3] = {0.258, 19.356, 0.018};
    compose(&m, z, nm, amt, 3);
    double zs[MAXN];
    normalise(m.n, z, zs);
    (void)eval_stable(&m, T, P, zs, lz);
    wt[n2] = 1.0;
    ck_assert_double_lt(tpd(&m, T, P, zs, lz, wt), -0.01);
    int stable = -1;
    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_phase_stability(m.eos, T, P, z, NULL, m.w, &stable, NULL, &tm, &err),
                     KPHI_OK);
    ck_assert_int_eq(stable, 0);
    flash(&m, T, P, z);
    assert_split(&m, T, P, z, m.r);
    assert_split_is_minimum(&m, T, P, z, m.r, 200);
    ck_assert_double_gt(m.r->phase[0].y[n2], 0.5);
    mix_close(&m);
}
END_TEST

/* Methanol-water with a little CO at 287 K and 1.8 bar (met by the random search below):
 * with the shipped k_ij = 0, PR splits the liquid in two beside the CO-rich vapour. The
 * two-phase flash must say that a third phase forms instead of answering; the split it
 * reached (left in the result) lies above the tangent plane at a pure component, by
 * fresh evaluations here. */
START_TEST(third_phase_refused)
{
    mix m = mix_open(METHANOL_CASE, KPHI_EOS_PR);
    const double T = 287.13, P = 1.83e5;
    double z[MAXN], lref[MAXN], wt[MAXN];
    const char *const nm[3] = {"CO", "CH3OH", "H2O"};
    const double amt[3] = {0.009, 3.71, 4.76};
    compose(&m, z, nm, amt, 3);
    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_phase_flash(m.eos, T, P, z, NULL, m.w, m.r, &err), KPHI_EFAILED);
    ck_assert_msg(strstr(err.msg, "third phase") != NULL, "%s", err.msg);
    ck_assert_int_eq(m.r->n_phases, 2);
    (void)eval_stable(&m, T, P, m.r->phase[0].y, lref);
    double least = INFINITY;
    for (size_t p = 0; p < m.n; p++) {
        if (!(z[p] > 0.0))
            continue;
        for (size_t i = 0; i < m.n; i++)
            wt[i] = i == p ? 1.0 : 0.0;
        least = fmin(least, tpd(&m, T, P, m.r->phase[0].y, lref, wt));
    }
    ck_assert_double_lt(least, -1e-3);
    mix_close(&m);
}
END_TEST

/* --------------------------------------------------------------------- flash --- */

/* The effluent through an ammonia separator at -5 C and 195 bar: a vapour and a liquid
 * that is nearly pure ammonia, meeting every condition of assert_split() and
 * assert_split_is_minimum(); and at two further separator temperatures. */
START_TEST(separator_flash)
{
    mix m = mix_open(AMMONIA_CASE, model_of(_i));
    double y[MAXN];
    effluent(&m, y);
    const double P = 195e5, Ts[3] = {268.15, 248.15, 293.15};
    for (int k = 0; k < 3; k++) {
        flash(&m, Ts[k], P, y);
        assert_split(&m, Ts[k], P, y, m.r);
        assert_split_is_minimum(&m, Ts[k], P, y, m.r, 200);
        ck_assert_int_eq(m.r->phase[0].kind, KPHI_PHASE_VAPOUR);
        ck_assert_int_eq(m.r->phase[1].kind, KPHI_PHASE_LIQUID);
        ck_assert_double_gt(m.r->phase[1].y[idx(&m, "NH3")], 0.9);
        ck_assert_double_gt(m.r->phase[0].fraction, 0.5); /* mostly gas */
        ck_assert_int_gt(m.r->iterations, 0);
        /* the vapour is lighter than the liquid by far, even at 195 bar */
        ck_assert_double_gt(m.r->phase[0].v, 2.0 * m.r->phase[1].v);
    }
    mix_close(&m);
}
END_TEST

/* Argon absent from the feed stays absent (x = y = 0) with a finite K (its infinite-
 * dilution ratio phi^L/phi^V), and a 1e-12 trace of it is carried with full relative
 * precision: its K is that same limit, and the rest of the answer does not move beyond
 * what a 1e-12 trace can move it. */
START_TEST(absent_and_trace_component)
{
    mix m = mix_open(AMMONIA_CASE, model_of(_i));
    double y[MAXN], y0[MAXN], yt[MAXN], x0[MAXN], K0[MAXN];
    effluent(&m, y);
    size_t ar = idx(&m, "Ar");
    const double T = 268.15, P = 195e5;
    memcpy(y0, y, sizeof y0);
    y0[ar] = 0.0;
    flash(&m, T, P, y0);
    assert_split(&m, T, P, y0, m.r);
    ck_assert_double_eq(m.r->phase[0].y[ar], 0.0);
    ck_assert_double_eq(m.r->phase[1].y[ar], 0.0);
    double b0 = m.r->phase[0].fraction;
    memcpy(x0, m.r->phase[1].y, m.n * sizeof(double));
    memcpy(K0, m.r->K, m.n * sizeof(double));
    double s = 0.0;
    for (size_t i = 0; i < m.n; i++)
        s += y0[i];
    memcpy(yt, y0, sizeof yt);
    yt[ar] = 1e-12 * s;
    flash(&m, T, P, yt);
    assert_split(&m, T, P, yt, m.r); /* includes |ln f_V - ln f_L| < 1e-10 for the trace */
    ck_assert_double_gt(m.r->phase[0].y[ar], 0.0);
    ck_assert_double_gt(m.r->phase[1].y[ar], 0.0);
    ck_assert_double_le(fabs(m.r->K[ar] / K0[ar] - 1.0), 1e-8);
    ck_assert_double_le(fabs(m.r->phase[0].fraction - b0), 1e-10);
    for (size_t i = 0; i < m.n; i++)
        if (i != ar)
            ck_assert_double_le(fabs(m.r->phase[1].y[i] - x0[i]), 1e-10);
    mix_close(&m);
}
END_TEST

/* A pure component is one phase on either side of its vapour pressure: ammonia alone at
 * -5 C is a liquid at 195 bar and a gas at 1 bar (its vapour pressure there is about 3.5
 * bar, validation_phase.c). */
START_TEST(pure_component_one_phase)
{
    mix m = mix_open(AMMONIA_CASE, model_of(_i));
    size_t nh3 = idx(&m, "NH3");
    double z[MAXN] = {0};
    z[nh3] = 2.7;
    flash(&m, 268.15, 195e5, z);
    ck_assert_int_eq(m.r->n_phases, 1);
    ck_assert_int_eq(m.r->phase[0].kind, KPHI_PHASE_LIQUID);
    ck_assert_double_eq(m.r->phase[0].y[nh3], 1.0);
    ck_assert_double_lt(m.r->phase[0].Z, 0.5);
    ck_assert_double_eq(m.r->residual, 0.0);
    double v_liquid = m.r->phase[0].v;
    flash(&m, 268.15, 1.0e5, z);
    ck_assert_int_eq(m.r->n_phases, 1);
    ck_assert_int_eq(m.r->phase[0].kind, KPHI_PHASE_VAPOUR);
    ck_assert_double_gt(m.r->phase[0].Z, 0.9);
    ck_assert_double_gt(m.r->phase[0].v, 100.0 * v_liquid);
    int stable = 0;
    ck_assert_int_eq(kphi_phase_stability(m.eos, 268.15, 195e5, z, NULL, m.w, &stable, NULL,
                                          NULL, NULL),
                     KPHI_OK);
    ck_assert_int_eq(stable, 1);
    mix_close(&m);
}
END_TEST

/* The same split from other starts: after flashes elsewhere in the same workspace, in a
 * fresh workspace, with the feed scaled by 1e3, and with the species listed in reverse
 * order (another EOS object built from the same data). */
START_TEST(same_answer_from_other_starts)
{
    kphi_eos_model model = model_of(_i);
    mix m = mix_open(AMMONIA_CASE, model);
    double y[MAXN], ys[MAXN], x_ref[MAXN], v_ref[MAXN];
    effluent(&m, y);
    const double T = 263.15, P = 187e5;
    flash(&m, T, P, y);
    memcpy(v_ref, m.r->phase[0].y, m.n * sizeof(double));
    memcpy(x_ref, m.r->phase[1].y, m.n * sizeof(double));
    double b_ref = m.r->phase[0].fraction;
    /* elsewhere first, then back */
    flash(&m, T + 31.0, P * 0.7, y);
    flash(&m, T - 17.0, P, y);
    flash(&m, T, P, y);
    for (size_t i = 0; i < m.n; i++) {
        ck_assert_double_eq(m.r->phase[0].y[i], v_ref[i]);
        ck_assert_double_eq(m.r->phase[1].y[i], x_ref[i]);
    }
    /* fresh workspace, scaled feed */
    kphi_phase_work *w2 = kphi_phase_work_alloc(m.n, 3);
    for (size_t i = 0; i < m.n; i++)
        ys[i] = 1e3 * y[i];
    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_phase_flash(m.eos, T, P, ys, NULL, w2, m.r, &err), KPHI_OK);
    ck_assert_double_le(fabs(m.r->phase[0].fraction - b_ref), 1e-10);
    for (size_t i = 0; i < m.n; i++) {
        ck_assert_double_le(fabs(m.r->phase[0].y[i] - v_ref[i]), 1e-10);
        ck_assert_double_le(fabs(m.r->phase[1].y[i] - x_ref[i]), 1e-10);
    }
    kphi_phase_work_free(w2);
    /* species in reverse order */
    size_t n = m.n;
    kphi_eos *rev = kphi_eos_alloc(model, n);
    kphi_phase_work *wr = kphi_phase_work_alloc(n, 0);
    kphi_flash_result *rr = kphi_flash_result_alloc(n);
    double yr[MAXN];
    for (size_t i = 0; i < n; i++) {
        ck_assert_int_eq(kphi_eos_set_species(rev, n - 1 - i, kphi_rxnset_species(m.set, i),
                                              NULL),
                         KPHI_OK);
        yr[n - 1 - i] = y[i];
    }
    ck_assert_int_eq(kphi_phase_flash(rev, T, P, yr, NULL, wr, rr, &err), KPHI_OK);
    ck_assert_double_le(fabs(rr->phase[0].fraction - b_ref), 1e-10);
    for (size_t i = 0; i < n; i++) {
        ck_assert_double_le(fabs(rr->phase[0].y[n - 1 - i] - v_ref[i]), 1e-10);
        ck_assert_double_le(fabs(rr->phase[1].y[n - 1 - i] - x_ref[i]), 1e-10);
    }
    kphi_flash_result_free(rr);
    kphi_phase_work_free(wr);
    kphi_eos_free(rev);
    mix_close(&m);
}
END_TEST

/* ------------------------------------------------------- dew and bubble points --- */

/* Liquid fraction of a flash (0 for a one-phase vapour answer). */
static double liquid_fraction(const kphi_flash_result *r)
{
    if (r->n_phases == 1)
        return r->phase[0].kind == KPHI_PHASE_LIQUID ? 1.0 : 0.0;
    return r->phase[1].fraction;
}

/* The dew point of the effluent at 195 bar: just above it one vapour, just below it two
 * phases whose liquid fraction vanishes linearly at the dew line (beta -> 1), with the
 * liquid's composition continuous there; the stability test changes its verdict across
 * it. */
START_TEST(dew_point_of_effluent)
{
    mix m = mix_open(AMMONIA_CASE, model_of(_i));
    double y[MAXN], Td = NAN;
    effluent(&m, y);
    const double P = 195e5;
    int found = 0;
    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_msg(kphi_phase_dew_point(m.eos, P, y, NAN, 150.0, 700.0, NULL, m.w, &found, &Td,
                                       &err) == KPHI_OK,
                  "%s", err.msg);
    ck_assert_int_eq(found, 1);
    ck_assert(Td > 250.0 && Td < 400.0);
    flash(&m, Td + 1e-3, P, y);
    ck_assert_int_eq(m.r->n_phases, 1);
    ck_assert_int_eq(m.r->phase[0].kind, KPHI_PHASE_VAPOUR);
    double L[4], xl[4][MAXN];
    const double dT[4] = {1e-3, 1e-4, 1e-5, 1e-6};
    for (int k = 0; k < 4; k++) {
        flash(&m, Td - dT[k], P, y);
        assert_split(&m, Td - dT[k], P, y, m.r);
        L[k] = liquid_fraction(m.r);
        memcpy(xl[k], m.r->phase[1].y, m.n * sizeof(double));
    }
    ck_assert_double_lt(L[0], 1e-2);
    ck_assert_msg(L[0] / L[1] > 8.0 && L[0] / L[1] < 12.0, "L %g, %g", L[0], L[1]);
    ck_assert_msg(L[1] / L[2] > 8.0 && L[1] / L[2] < 12.0, "L %g, %g", L[1], L[2]);
    ck_assert_msg(L[2] / L[3] > 8.0 && L[2] / L[3] < 12.0, "L %g, %g", L[2], L[3]);
    for (size_t i = 0; i < m.n; i++)
        ck_assert_double_le(fabs(xl[2][i] - xl[3][i]), 1e-4);
    int stable = -1;
    ck_assert_int_eq(kphi_phase_stability(m.eos, Td + 1e-3, P, y, NULL, m.w, &stable, NULL,
                                          NULL, &err),
                     KPHI_OK);
    ck_assert_int_eq(stable, 1);
    ck_assert_int_eq(kphi_phase_stability(m.eos, Td - 1e-3, P, y, NULL, m.w, &stable, NULL,
                                          NULL, &err),
                     KPHI_OK);
    ck_assert_int_eq(stable, 0);
    /* a start near the answer gives the same dew point */
    double Td2 = NAN;
    ck_assert_int_eq(kphi_phase_dew_point(m.eos, P, y, Td + 7.0, 150.0, 700.0, NULL, m.w,
                                          &found, &Td2, &err),
                     KPHI_OK);
    ck_assert_int_eq(found, 1);
    ck_assert_double_le(fabs(Td2 - Td), 1e-7);
    /* a gas with no condensable component has no dew point in range */
    double hn[MAXN] = {0};
    hn[idx(&m, "H2")] = 3.0;
    hn[idx(&m, "N2")] = 1.0;
    ck_assert_int_eq(kphi_phase_dew_point(m.eos, P, hn, NAN, 150.0, 700.0, NULL, m.w, &found,
                                          &Td2, &err),
                     KPHI_OK);
    ck_assert_int_eq(found, 0);
    mix_close(&m);
}
END_TEST

/* The bubble point of a crude-methanol-like liquid (methanol, water, a little CO2) at
 * 10 bar: just below it one liquid, just above it two phases whose vapour fraction
 * vanishes linearly at the bubble line (beta -> 0). */
START_TEST(bubble_point_of_liquid)
{
    mix m = mix_open(METHANOL_CASE, model_of(_i));
    double z[MAXN], Tb = NAN;
    const char *const nm[3] = {"CH3OH", "H2O", "CO2"};
    const double amt[3] = {0.6, 0.38, 0.02};
    compose(&m, z, nm, amt, 3);
    const double P = 10e5;
    int found = 0;
    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_msg(kphi_phase_bubble_point(m.eos, P, z, NAN, 250.0, 600.0, NULL, m.w, &found,
                                          &Tb, &err) == KPHI_OK,
                  "%s", err.msg);
    ck_assert_int_eq(found, 1);
    ck_assert(Tb > 300.0 && Tb < 450.0);
    flash(&m, Tb - 1e-3, P, z);
    ck_assert_int_eq(m.r->n_phases, 1);
    ck_assert_int_eq(m.r->phase[0].kind, KPHI_PHASE_LIQUID);
    double V[3];
    const double dT[3] = {1e-3, 1e-4, 1e-5};
    for (int k = 0; k < 3; k++) {
        flash(&m, Tb + dT[k], P, z);
        assert_split(&m, Tb + dT[k], P, z, m.r);
        V[k] = m.r->phase[0].fraction;
        ck_assert_int_eq(m.r->phase[1].kind, KPHI_PHASE_LIQUID);
    }
    ck_assert_double_lt(V[0], 1e-2);
    ck_assert_msg(V[0] / V[1] > 8.0 && V[0] / V[1] < 12.0, "V %g, %g", V[0], V[1]);
    ck_assert_msg(V[1] / V[2] > 8.0 && V[1] / V[2] < 12.0, "V %g, %g", V[1], V[2]);
    mix_close(&m);
}
END_TEST

/* The dew point of the same liquid-rich mixture lies above its bubble point, with the
 * mirror behaviour: one vapour just above it, a vanishing liquid just below. */
START_TEST(dew_point_of_liquid)
{
    mix m = mix_open(METHANOL_CASE, model_of(_i));
    double z[MAXN], Tb = NAN, Td = NAN;
    const char *const nm[3] = {"CH3OH", "H2O", "CO2"};
    const double amt[3] = {0.6, 0.38, 0.02};
    compose(&m, z, nm, amt, 3);
    const double P = 10e5;
    int found = 0;
    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_phase_bubble_point(m.eos, P, z, NAN, 250.0, 600.0, NULL, m.w, &found,
                                             &Tb, &err),
                     KPHI_OK);
    ck_assert_int_eq(found, 1);
    ck_assert_msg(kphi_phase_dew_point(m.eos, P, z, NAN, 250.0, 600.0, NULL, m.w, &found, &Td,
                                       &err) == KPHI_OK,
                  "%s", err.msg);
    ck_assert_int_eq(found, 1);
    ck_assert_msg(Td > Tb + 1.0, "T_dew %g, T_bubble %g", Td, Tb);
    flash(&m, Td + 1e-3, P, z);
    ck_assert_int_eq(m.r->n_phases, 1);
    ck_assert_int_eq(m.r->phase[0].kind, KPHI_PHASE_VAPOUR);
    flash(&m, Td - 1e-3, P, z);
    assert_split(&m, Td - 1e-3, P, z, m.r);
    ck_assert_double_lt(liquid_fraction(m.r), 1e-2);
    mix_close(&m);
}
END_TEST

/* Temperature (K) where kphi's vapour pressure of species i is P, by bisection. */
static double saturation_temperature(const mix *m, size_t i, double P, double lo, double hi)
{
    for (int it = 0; it < 60; it++) {
        double T = 0.5 * (lo + hi), Ps;
        ck_assert_int_eq(kphi_phase_vapour_pressure(m->eos, i, T, NULL, m->w, &Ps, NULL),
                         KPHI_OK);
        if (Ps > P)
            hi = T;
        else
            lo = T;
    }
    return 0.5 * (lo + hi);
}

/* Methanol-water at 1 atm: bubble points between the two normal boiling points (kphi's
 * own, from its vapour pressures), one liquid just below each and one vapour just above
 * the dew point, two phases between them with a vanishing vapour at the bubble line; and
 * the limits x -> 0 and x -> 1 reach the pure components' boiling points. (Shipped
 * k_ij = 0: with it, PR and SRK split methanol-water into two liquids between about
 * x = 0.06 and 0.45 at 320-340 K, where the bubble point found is that of a metastable
 * liquid; those x are left out here, see validation_phase.c.) */
START_TEST(binary_bubble_points_at_1_atm)
{
    mix m = mix_open(METHANOL_CASE, model_of(_i));
    size_t me = idx(&m, "CH3OH"), wa = idx(&m, "H2O");
    const double P = 101325.0; /* 1 atm */
    double Tm = saturation_temperature(&m, me, P, 300.0, 400.0);
    double Tw = saturation_temperature(&m, wa, P, 330.0, 420.0);
    ck_assert(Tm < Tw);
    const double xs[7] = {1e-6, 0.01, 0.05, 0.5, 0.9, 0.99, 1.0 - 1e-6};
    for (int k = 0; k < 7; k++) {
        double z[MAXN] = {0}, Tb = NAN, Td = NAN;
        z[me] = xs[k];
        z[wa] = 1.0 - xs[k];
        int found = 0;
        kphi_error err;
        kphi_error_clear(&err);
        ck_assert_msg(kphi_phase_bubble_point(m.eos, P, z, NAN, 250.0, 500.0, NULL, m.w, &found,
                                              &Tb, &err) == KPHI_OK,
                      "x = %g: %s", xs[k], err.msg);
        ck_assert_msg(found == 1, "x = %g: no bubble point", xs[k]);
        ck_assert_msg(Tb > Tm - 1e-6 && Tb < Tw + 1e-6, "x = %g: T_bubble %g", xs[k], Tb);
        ck_assert_msg(kphi_phase_dew_point(m.eos, P, z, NAN, 250.0, 500.0, NULL, m.w, &found,
                                           &Td, &err) == KPHI_OK,
                      "x = %g: %s", xs[k], err.msg);
        ck_assert_msg(found == 1 && Td >= Tb - 1e-6 && Td < Tw + 1e-6,
                      "x = %g: T_dew %g, T_bubble %g", xs[k], Td, Tb);
        flash(&m, Tb - 1e-4, P, z);
        ck_assert_int_eq(m.r->n_phases, 1);
        ck_assert_int_eq(m.r->phase[0].kind, KPHI_PHASE_LIQUID);
        flash(&m, Td + 1e-4, P, z);
        ck_assert_int_eq(m.r->n_phases, 1);
        ck_assert_int_eq(m.r->phase[0].kind, KPHI_PHASE_VAPOUR);
        /* between them two phases; near the bubble line a vanishing vapour (the two
         * lines of the nearly pure feeds lie 1e-3 K and 3e-7 K apart) */
        flash(&m, 0.5 * (Tb + Td), P, z);
        assert_split(&m, 0.5 * (Tb + Td), P, z, m.r);
        if (Td - Tb > 1e-2) {
            double T1 = Tb + 1e-3 * (Td - Tb);
            flash(&m, T1, P, z);
            assert_split(&m, T1, P, z, m.r);
            ck_assert_double_lt(m.r->phase[0].fraction, 0.05);
        }
        if (k == 0)
            ck_assert_double_le(fabs(Tb - Tw), 1e-2);
        if (k == 6)
            ck_assert_double_le(fabs(Tb - Tm), 1e-2);
    }
    mix_close(&m);
}
END_TEST

/* --------------------------------------------------------- vapour pressure --- */

/* For NH3, CH3OH and H2O at several T < Tc: at the computed vapour pressure both roots
 * have the same fugacity; a flash of the pure component at P_sat (1 + 1e-6) is a liquid
 * and at P_sat (1 - 1e-6) a vapour; and dP_sat/dT by central differences matches
 * Clapeyron's equation with the EOS's own enthalpies and volumes of the two roots. */
START_TEST(vapour_pressure_consistent)
{
    kphi_eos_model model = model_of(_i);
    const char *const cases[2] = {AMMONIA_CASE, METHANOL_CASE};
    const char *const names[3] = {"NH3", "CH3OH", "H2O"};
    const double R = 8.314462618;
    mix mm[2] = {mix_open(cases[0], model), mix_open(cases[1], model)};
    for (int s = 0; s < 3; s++) {
        mix *m = &mm[s == 0 ? 0 : 1];
        size_t i = idx(m, names[s]);
        double Tc, Pc, z[MAXN] = {0};
        z[i] = 1.0;
        kphi_eos_critical(m->eos, i, 300.0, &Tc, &Pc);
        const double trs[4] = {0.55, 0.7, 0.85, 0.95};
        for (int k = 0; k < 4; k++) {
            double T = trs[k] * Tc, Ps = NAN;
            kphi_error err;
            kphi_error_clear(&err);
            ck_assert_msg(kphi_phase_vapour_pressure(m->eos, i, T, NULL, m->w, &Ps, &err) ==
                              KPHI_OK,
                          "%s: %s", names[s], err.msg);
            ck_assert(Ps > 0.0 && Ps < Pc);
            double lL[MAXN], lV[MAXN];
            kphi_eos_state sL, sV;
            ck_assert_int_eq(kphi_eos_eval_root(m->eos, KPHI_EOS_ROOT_LIQUID, T, Ps, z, lL, NULL,
                                                &sL, m->ew, NULL),
                             KPHI_OK);
            ck_assert_int_eq(kphi_eos_eval_root(m->eos, KPHI_EOS_ROOT_GAS, T, Ps, z, lV, NULL,
                                                &sV, m->ew, NULL),
                             KPHI_OK);
            ck_assert_double_lt(sL.Z, 0.5 * sV.Z); /* two distinct roots */
            ck_assert_msg(fabs(lL[i] - lV[i]) < 1e-10, "%s at %g K: %g", names[s], T,
                          lL[i] - lV[i]);
            flash(m, T, Ps * (1.0 + 1e-6), z);
            ck_assert_int_eq(m->r->n_phases, 1);
            ck_assert_int_eq(m->r->phase[0].kind, KPHI_PHASE_LIQUID);
            flash(m, T, Ps * (1.0 - 1e-6), z);
            ck_assert_int_eq(m->r->n_phases, 1);
            ck_assert_int_eq(m->r->phase[0].kind, KPHI_PHASE_VAPOUR);
            /* Clapeyron: dP/dT = (h_V - h_L) / (T (v_V - v_L)) */
            const double h = 1e-3;
            double Pp, Pm;
            ck_assert_int_eq(kphi_phase_vapour_pressure(m->eos, i, T + h, NULL, m->w, &Pp, NULL),
                             KPHI_OK);
            ck_assert_int_eq(kphi_phase_vapour_pressure(m->eos, i, T - h, NULL, m->w, &Pm, NULL),
                             KPHI_OK);
            double fd = (Pp - Pm) / (2.0 * h);
            double cl = (sV.h_dep - sL.h_dep) / (T * (sV.v - sL.v));
            ck_assert_msg(fabs(fd / cl - 1.0) < 1e-5, "%s at %g K: dP/dT %g, Clapeyron %g",
                          names[s], T, fd, cl);
            ck_assert_double_le(fabs(sV.v - sV.Z * R * T / Ps), 1e-12 * sV.v);
        }
        /* at and above Tc there is no vapour pressure */
        double Ps;
        kphi_error err;
        kphi_error_clear(&err);
        ck_assert_int_eq(kphi_phase_vapour_pressure(m->eos, i, Tc, NULL, m->w, &Ps, &err),
                         KPHI_EINPUT);
        ck_assert_ptr_nonnull(strstr(err.msg, "critical"));
    }
    kphi_error err;
    kphi_error_clear(&err);
    double Ps;
    ck_assert_int_eq(kphi_phase_vapour_pressure(mm[0].eos, mm[0].n, 300.0, NULL, mm[0].w, &Ps,
                                                &err),
                     KPHI_EINPUT);
    mix_close(&mm[0]);
    mix_close(&mm[1]);
}
END_TEST

/* ------------------------------------------------------------------- errors --- */

/* Models without a liquid root, bad feeds, bad states and mismatched workspaces are
 * refused with KPHI_EINPUT and a message, by every entry point. */
START_TEST(bad_input_is_refused)
{
    mix m = mix_open(AMMONIA_CASE, KPHI_EOS_PR);
    size_t n = m.n;
    double y[MAXN], Ps, Td, trial[MAXN], tm;
    int found, stable;
    effluent(&m, y);
    kphi_error err;
    const kphi_eos_model gas_only[2] = {KPHI_EOS_IDEAL, KPHI_EOS_VIRIAL};
    for (int k = 0; k < 2; k++) {
        kphi_error_clear(&err);
        kphi_eos *g = kphi_case_make_eos(m.c, gas_only[k], &err);
        ck_assert_ptr_nonnull(g);
        ck_assert_int_eq(kphi_phase_model_ok(gas_only[k]), 0);
        ck_assert_int_eq(kphi_phase_flash(g, 268.15, 195e5, y, NULL, m.w, m.r, &err),
                         KPHI_EINPUT);
        ck_assert_ptr_nonnull(strstr(err.msg, "cubic"));
        kphi_error_clear(&err);
        ck_assert_int_eq(kphi_phase_stability(g, 268.15, 195e5, y, NULL, m.w, &stable, trial,
                                              &tm, &err),
                         KPHI_EINPUT);
        kphi_error_clear(&err);
        ck_assert_int_eq(kphi_phase_dew_point(g, 195e5, y, NAN, 150.0, 700.0, NULL, m.w, &found,
                                              &Td, &err),
                         KPHI_EINPUT);
        kphi_error_clear(&err);
        ck_assert_int_eq(kphi_phase_bubble_point(g, 195e5, y, NAN, 150.0, 700.0, NULL, m.w,
                                                 &found, &Td, &err),
                         KPHI_EINPUT);
        kphi_error_clear(&err);
        ck_assert_int_eq(kphi_phase_vapour_pressure(g, idx(&m, "NH3"), 268.15, NULL, m.w, &Ps,
                                                    &err),
                         KPHI_EINPUT);
        kphi_eos_free(g);
    }
    ck_assert_int_eq(kphi_phase_model_ok(KPHI_EOS_RK), 1);
    /* feeds: negative, NaN, infinite, all zero */
    const double bad[4] = {-0.1, NAN, INFINITY, 0.0};
    for (int k = 0; k < 4; k++) {
        double z[MAXN];
        memcpy(z, y, sizeof z);
        if (k < 3)
            z[idx(&m, "N2")] = bad[k];
        else
            for (size_t i = 0; i < n; i++)
                z[i] = 0.0;
        kphi_error_clear(&err);
        ck_assert_int_eq(kphi_phase_flash(m.eos, 268.15, 195e5, z, NULL, m.w, m.r, &err),
                         KPHI_EINPUT);
        ck_assert(err.msg[0] != '\0');
        kphi_error_clear(&err);
        ck_assert_int_eq(kphi_phase_stability(m.eos, 268.15, 195e5, z, NULL, m.w, &stable,
                                              NULL, NULL, &err),
                         KPHI_EINPUT);
        kphi_error_clear(&err);
        ck_assert_int_eq(kphi_phase_dew_point(m.eos, 195e5, z, NAN, 150.0, 700.0, NULL, m.w,
                                              &found, &Td, &err),
                         KPHI_EINPUT);
    }
    /* T and P not positive or not finite */
    const double badv[3] = {0.0, -268.15, NAN};
    for (int k = 0; k < 3; k++) {
        kphi_error_clear(&err);
        ck_assert_int_eq(kphi_phase_flash(m.eos, badv[k], 195e5, y, NULL, m.w, m.r, &err),
                         KPHI_EINPUT);
        ck_assert_ptr_nonnull(strstr(err.msg, "temperature"));
        kphi_error_clear(&err);
        ck_assert_int_eq(kphi_phase_flash(m.eos, 268.15, badv[k] * 1e5, y, NULL, m.w, m.r,
                                          &err),
                         KPHI_EINPUT);
        ck_assert_ptr_nonnull(strstr(err.msg, "pressure"));
        kphi_error_clear(&err);
        ck_assert_int_eq(kphi_phase_stability(m.eos, badv[k], 195e5, y, NULL, m.w, &stable,
                                              NULL, NULL, &err),
                         KPHI_EINPUT);
        kphi_error_clear(&err);
        ck_assert_int_eq(kphi_phase_dew_point(m.eos, badv[k] * 1e5, y, NAN, 150.0, 700.0, NULL,
                                              m.w, &found, &Td, &err),
                         KPHI_EINPUT);
        kphi_error_clear(&err);
        ck_assert_int_eq(kphi_phase_vapour_pressure(m.eos, idx(&m, "NH3"), badv[k], NULL, m.w,
                                                    &Ps, &err),
                         KPHI_EINPUT);
    }
    /* a search range that is not a range */
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_phase_dew_point(m.eos, 195e5, y, NAN, 400.0, 300.0, NULL, m.w, &found,
                                          &Td, &err),
                     KPHI_EINPUT);
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_phase_bubble_point(m.eos, 195e5, y, NAN, 0.0, 300.0, NULL, m.w,
                                             &found, &Td, &err),
                     KPHI_EINPUT);
    /* workspace and result of the wrong size */
    kphi_phase_work *small = kphi_phase_work_alloc(n - 1, 0);
    kphi_flash_result *rs = kphi_flash_result_alloc(n + 1);
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_phase_flash(m.eos, 268.15, 195e5, y, NULL, small, m.r, &err),
                     KPHI_EINPUT);
    ck_assert_ptr_nonnull(strstr(err.msg, "workspace"));
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_phase_flash(m.eos, 268.15, 195e5, y, NULL, m.w, rs, &err),
                     KPHI_EINPUT);
    ck_assert_ptr_nonnull(strstr(err.msg, "result"));
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_phase_flash(m.eos, 268.15, 195e5, y, NULL, NULL, m.r, &err),
                     KPHI_EINPUT);
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_phase_stability(m.eos, 268.15, 195e5, y, NULL, small, &stable, NULL,
                                          NULL, &err),
                     KPHI_EINPUT);
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_phase_dew_point(m.eos, 195e5, y, NAN, 150.0, 700.0, NULL, small,
                                          &found, &Td, &err),
                     KPHI_EINPUT);
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_phase_vapour_pressure(m.eos, idx(&m, "NH3"), 268.15, NULL, small,
                                                &Ps, &err),
                     KPHI_EINPUT);
    kphi_flash_result_free(rs);
    kphi_phase_work_free(small);
    /* the first error recorded wins */
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_phase_flash(m.eos, -1.0, 195e5, y, NULL, m.w, m.r, &err), KPHI_EINPUT);
    char first[sizeof err.msg];
    memcpy(first, err.msg, sizeof first);
    ck_assert_int_eq(kphi_phase_flash(m.eos, 268.15, -1.0, y, NULL, m.w, m.r, &err), KPHI_EINPUT);
    ck_assert_str_eq(err.msg, first);
    /* NULL err and NULL optional outputs are allowed */
    ck_assert_int_eq(kphi_phase_flash(m.eos, -1.0, 195e5, y, NULL, m.w, m.r, NULL), KPHI_EINPUT);
    ck_assert_int_eq(kphi_phase_stability(m.eos, 268.15, 195e5, y, NULL, m.w, NULL, NULL, NULL,
                                          NULL),
                     KPHI_OK);
    ck_assert_str_eq(kphi_phase_kind_name(KPHI_PHASE_VAPOUR), "vapour");
    ck_assert_str_eq(kphi_phase_kind_name(KPHI_PHASE_LIQUID), "liquid");
    mix_close(&m);
}
END_TEST

/* A result copied keeps its own arrays and the source's numbers. */
START_TEST(result_copy)
{
    mix m = mix_open(AMMONIA_CASE, KPHI_EOS_PR);
    double y[MAXN];
    effluent(&m, y);
    flash(&m, 268.15, 195e5, y);
    kphi_flash_result *c = kphi_flash_result_alloc(m.n);
    double *keep = c->phase[1].y;
    kphi_flash_result_copy(c, m.r);
    ck_assert_ptr_eq(c->phase[1].y, keep);
    ck_assert_ptr_ne(c->phase[1].y, m.r->phase[1].y);
    ck_assert_int_eq(c->n_phases, 2);
    ck_assert_double_eq(c->phase[0].fraction, m.r->phase[0].fraction);
    for (size_t i = 0; i < m.n; i++) {
        ck_assert_double_eq(c->phase[1].y[i], m.r->phase[1].y[i]);
        ck_assert_double_eq(c->phase[0].lnphi[i], m.r->phase[0].lnphi[i]);
        ck_assert_double_eq(c->K[i], m.r->K[i]);
    }
    kphi_flash_result_free(c);
    kphi_flash_result_free(NULL);
    kphi_phase_work_free(NULL);
    mix_close(&m);
}
END_TEST

/* ----------------------------------------------------------------- property --- */

/* Random flashes. Each problem: one of the two shipped sets (ammonia: N2 H2 NH3 CH4 Ar;
 * methanol: CO CO2 H2 CH3OH H2O CH4 N2) with PR or SRK, T uniform in 200-700 K, P
 * log-uniform in 1-400 bar, each feed amount zero (20 %), 1e-12 (10 %) or log-uniform in
 * 1e-3..1e2 mol (at least one present). A flash must converge or fail with KPHI_EFAILED
 * and a message. A converged answer is checked against fresh EOS evaluations:
 *   two phases: |ln(x phi^L) - ln(y phi^V)| < 1e-9 for every component of the feed, the
 *     balance to 1e-12, 0 < beta < 1, both phases stable by kphi_phase_stability(), the
 *     Gibbs energy of the split below that of the feed as one phase;
 *   one phase: the stability test finds the feed stable;
 *   both: the tangent-plane distance from the answer's (first) phase of the pure
 *     components present and of 24 random compositions of them is >= -1e-9;
 *   the same answer (phase count, fractions and compositions to 1e-8) for the feed with
 *     the species listed in reverse order (another EOS object, other sums and starts).
 * Random numbers: splitmix64 (Steele, Lea & Flood 2014, OOPSLA; as in test_property.c),
 * one stream per problem from (seed, index), so any problem replays alone.
 * Environment: KPHI_SEED (default below) changes the problems, KPHI_FLASH_N their number
 * (default 2000), KPHI_FLASH_PROBLEM=k runs problem k alone and prints it. */

#define FLASH_SEED 20261201ULL
#define FLASH_N 2000L

typedef struct {
    uint64_t s;
} rng;

static uint64_t rng_next(rng *r)
{
    uint64_t q = (r->s += 0x9e3779b97f4a7c15ULL);
    q = (q ^ (q >> 30)) * 0xbf58476d1ce4e5b9ULL;
    q = (q ^ (q >> 27)) * 0x94d049bb133111ebULL;
    return q ^ (q >> 31);
}

static double rng_uniform(rng *r) /* [0, 1) */
{
    return (double)(rng_next(r) >> 11) * (1.0 / 9007199254740992.0);
}

typedef struct {
    long index;
    int set, mod; /* set 0 ammonia, 1 methanol; mod 0 PR, 1 SRK */
    double T, P;
    double z[MAXN];
} flash_problem;

typedef struct {
    mix m[2][2];          /* [set][model] */
    kphi_eos *rev[2][2];  /* the same mixtures with the species in reverse order */
    kphi_flash_result *rr[2];
    kphi_phase_work *wr[2];
} flash_context;

static flash_problem make_flash_problem(const flash_context *c, uint64_t seed, long k)
{
    rng r = {seed ^ ((uint64_t)k * 0xd1b54a32d192ed03ULL)};
    (void)rng_next(&r);
    flash_problem p;
    memset(&p, 0, sizeof p);
    p.index = k;
    p.set = (int)(rng_uniform(&r) * 2.0);
    p.mod = (int)(rng_uniform(&r) * 2.0);
    p.T = 200.0 + 500.0 * rng_uniform(&r);
    p.P = 1e5 * pow(400.0, rng_uniform(&r));
    size_t n = c->m[p.set][p.mod].n;
    int any = 0;
    for (size_t i = 0; i < n; i++) {
        double u = rng_uniform(&r), v = rng_uniform(&r);
        p.z[i] = u < 0.2 ? 0.0 : u < 0.3 ? 1e-12 : 1e-3 * pow(1e5, v);
        any += p.z[i] >= 1e-3;
    }
    if (!any)
        p.z[(size_t)(rng_uniform(&r) * (double)n)] = 1.0;
    return p;
}

static void describe_flash(const flash_context *c, const flash_problem *p, uint64_t seed,
                           char *buf, size_t len)
{
    const mix *m = &c->m[p->set][p->mod];
    size_t used = (size_t)snprintf(buf, len, "problem %ld: %s, %s, T = %.17g K, P = %.17g Pa, z =",
                                   p->index, p->set == 0 ? "ammonia" : "methanol",
                                   kphi_eos_model_name(kphi_eos_get_model(m->eos)), p->T, p->P);
    for (size_t i = 0; i < m->n && used < len; i++)
        used += (size_t)snprintf(buf + used, len - used, " %s %.17g",
                                 kphi_rxnset_species(m->set, i)->name, p->z[i]);
    if (used < len)
        snprintf(buf + used, len - used,
                 "\n  replay: KPHI_SEED=%llu KPHI_FLASH_PROBLEM=%ld build/tests/test_phase",
                 (unsigned long long)seed, p->index);
}

typedef struct {
    long tried, two, one, one_liquid, failed_msg, third, bad;
    double worst_fug, worst_bal, worst_tpd, worst_rev, worst_dg;
} flash_tally;

/* Checks of one converged answer r; returns 0 or writes why and returns 1. */
static int check_flash(flash_context *c, const flash_problem *p, const kphi_flash_result *r,
                       flash_tally *t, char *why, size_t len)
{
    mix *m = &c->m[p->set][p->mod];
    size_t n = m->n;
    double zs[MAXN], l0[MAXN], l1[MAXN], wt[MAXN];
    normalise(n, p->z, zs);
    kphi_error err;
    kphi_error_clear(&err);
    const double *ref = r->phase[0].y;
    if (r->n_phases == 2) {
        const double *y = r->phase[0].y, *x = r->phase[1].y;
        double beta = r->phase[0].fraction;
        if (!(beta > 0.0 && beta < 1.0)) {
            snprintf(why, len, "two phases with beta = %.17g", beta);
            return 1;
        }
        (void)eval_stable(m, p->T, p->P, y, l0);
        (void)eval_stable(m, p->T, p->P, x, l1);
        for (size_t i = 0; i < n; i++) {
            double bal = fabs(beta * y[i] + (1.0 - beta) * x[i] - zs[i]);
            t->worst_bal = fmax(t->worst_bal, bal);
            if (!(bal <= BALANCE_TOL)) {
                snprintf(why, len, "balance of %s off by %.3g",
                         kphi_rxnset_species(m->set, i)->name, bal);
                return 1;
            }
            if (zs[i] > 0.0) {
                double d = fabs(log(y[i]) + l0[i] - log(x[i]) - l1[i]);
                t->worst_fug = fmax(t->worst_fug, d);
                if (!(d < 1e-9)) {
                    snprintf(why, len, "fugacities of %s differ by %.3g (ln)",
                             kphi_rxnset_species(m->set, i)->name, d);
                    return 1;
                }
            } else if (y[i] != 0.0 || x[i] != 0.0) {
                snprintf(why, len, "absent %s appears in a phase",
                         kphi_rxnset_species(m->set, i)->name);
                return 1;
            }
        }
        for (int q = 0; q < 2; q++) {
            int stable = 0;
            double tm = NAN;
            if (kphi_phase_stability(m->eos, p->T, p->P, r->phase[q].y, NULL, m->w, &stable,
                                     NULL, &tm, &err) != KPHI_OK ||
                !stable) {
                snprintf(why, len, "phase %d of the split is not stable (tm = %.3g) %s", q, tm,
                         err.msg);
                return 1;
            }
        }
        double g2 = beta * g_phase(m, p->T, p->P, y) + (1.0 - beta) * g_phase(m, p->T, p->P, x);
        double g1 = g_phase(m, p->T, p->P, zs);
        t->worst_dg = fmax(t->worst_dg, g2 - g1);
        if (!(g2 < g1)) {
            snprintf(why, len, "G/RT of the split %.17g is not below one phase's %.17g", g2, g1);
            return 1;
        }
    } else {
        int stable = 0;
        double tm = NAN;
        if (kphi_phase_stability(m->eos, p->T, p->P, zs, NULL, m->w, &stable, NULL, &tm,
                                 &err) != KPHI_OK ||
            !stable) {
            snprintf(why, len, "one phase, but the stability test finds tm = %.3g %s", tm,
                     err.msg);
            return 1;
        }
    }
    /* tangent plane from the (first) phase */
    double lref[MAXN];
    (void)eval_stable(m, p->T, p->P, ref, lref);
    rng g = {(uint64_t)p->index * 7919u + 17u};
    for (int k = -(int)n; k < 24; k++) {
        if (k < 0) {
            size_t q = (size_t)(k + (int)n);
            if (!(zs[q] > 0.0))
                continue;
            for (size_t i = 0; i < n; i++)
                wt[i] = i == q ? 1.0 : 0.0;
        } else {
            double sum = 0.0;
            for (size_t i = 0; i < n; i++) {
                wt[i] = zs[i] > 0.0 ? -log(rng_uniform(&g) + 1e-300) : 0.0;
                sum += wt[i];
            }
            for (size_t i = 0; i < n; i++)
                wt[i] /= sum;
        }
        double d = tpd(m, p->T, p->P, ref, lref, wt);
        t->worst_tpd = fmin(t->worst_tpd, d);
        if (!(d >= -TPD_TOL)) {
            size_t used = (size_t)snprintf(why, len,
                                           "%s answer: a trial composition has tangent-plane "
                                           "distance %.3g:",
                                           r->n_phases == 2 ? "two-phase" : "one-phase", d);
            for (size_t i = 0; i < n && used < len; i++)
                used += (size_t)snprintf(why + used, len - used, " %.3g", wt[i]);
            return 1;
        }
    }
    /* the species in reverse order */
    double zr[MAXN];
    for (size_t i = 0; i < n; i++)
        zr[n - 1 - i] = p->z[i];
    kphi_flash_result *rr = c->rr[p->set];
    kphi_error_clear(&err);
    int rc = kphi_phase_flash(c->rev[p->set][p->mod], p->T, p->P, zr, NULL, c->wr[p->set], rr,
                              &err);
    if (rc != KPHI_OK) {
        snprintf(why, len, "in reverse species order the flash fails: %s", err.msg);
        return 1;
    }
    if (rr->n_phases != r->n_phases) {
        snprintf(why, len, "in reverse species order %zu phase(s), not %zu", rr->n_phases,
                 r->n_phases);
        return 1;
    }
    double dev = 0.0;
    for (size_t q = 0; q < r->n_phases; q++) {
        dev = fmax(dev, fabs(rr->phase[q].fraction - r->phase[q].fraction));
        for (size_t i = 0; i < n; i++)
            dev = fmax(dev, fabs(rr->phase[q].y[n - 1 - i] - r->phase[q].y[i]));
    }
    t->worst_rev = fmax(t->worst_rev, dev);
    if (!(dev <= 1e-8)) {
        snprintf(why, len, "in reverse species order the answer moves by %.3g", dev);
        return 1;
    }
    return 0;
}

START_TEST(random_flashes)
{
    const char *se = getenv("KPHI_SEED"), *ne = getenv("KPHI_FLASH_N"),
               *one = getenv("KPHI_FLASH_PROBLEM");
    uint64_t seed = se != NULL && se[0] != '\0' ? strtoull(se, NULL, 0) : FLASH_SEED;
    long n_problems = ne != NULL && ne[0] != '\0' ? strtol(ne, NULL, 10) : FLASH_N;
    int single = one != NULL && one[0] != '\0';
    long first = single ? strtol(one, NULL, 10) : 0;
    flash_context *c = malloc(sizeof *c);
    ck_assert_ptr_nonnull(c);
    const char *const cases[2] = {AMMONIA_CASE, METHANOL_CASE};
    for (int s = 0; s < 2; s++) {
        for (int k = 0; k < 2; k++) {
            c->m[s][k] = mix_open(cases[s], model_of(k));
            size_t n = c->m[s][k].n;
            c->rev[s][k] = kphi_eos_alloc(model_of(k), n);
            ck_assert_ptr_nonnull(c->rev[s][k]);
            for (size_t i = 0; i < n; i++)
                ck_assert_int_eq(kphi_eos_set_species(c->rev[s][k], n - 1 - i,
                                                      kphi_rxnset_species(c->m[s][k].set, i),
                                                      NULL),
                                 KPHI_OK);
        }
        c->rr[s] = kphi_flash_result_alloc(c->m[s][0].n);
        c->wr[s] = kphi_phase_work_alloc(c->m[s][0].n, 0);
    }
    flash_tally t;
    memset(&t, 0, sizeof t);
    t.worst_dg = -INFINITY;
    t.worst_tpd = INFINITY;
    struct timespec t0, t1;
    clock_gettime(CLOCK_MONOTONIC, &t0);
    for (long k = first; single ? k == first : k < n_problems; k++) {
        flash_problem p = make_flash_problem(c, seed, k);
        mix *m = &c->m[p.set][p.mod];
        char why[512] = "", what[1024];
        if (single) {
            describe_flash(c, &p, seed, what, sizeof what);
            printf("property: %s\n", what);
        }
        kphi_error err;
        kphi_error_clear(&err);
        t.tried++;
        int rc = kphi_phase_flash(m->eos, p.T, p.P, p.z, NULL, m->w, m->r, &err);
        int bad = 0;
        if (rc == KPHI_EFAILED && err.code == KPHI_EFAILED && err.msg[0] != '\0') {
            t.failed_msg++;
            t.third += strstr(err.msg, "third phase") != NULL;
            if (single)
                printf("property: failed with a message: %s\n", err.msg);
        } else if (rc != KPHI_OK) {
            snprintf(why, sizeof why, "status %d, message '%s'", rc, err.msg);
            bad = 1;
        } else {
            if (m->r->n_phases == 2)
                t.two++;
            else {
                t.one++;
                t.one_liquid += m->r->phase[0].kind == KPHI_PHASE_LIQUID;
            }
            bad = check_flash(c, &p, m->r, &t, why, sizeof why);
        }
        if (bad && ++t.bad <= 20) {
            describe_flash(c, &p, seed, what, sizeof what);
            printf("property (flash) FAILED: %s\n  %s\n", why, what);
        }
    }
    clock_gettime(CLOCK_MONOTONIC, &t1);
    double el = (double)(t1.tv_sec - t0.tv_sec) + 1e-9 * (double)(t1.tv_nsec - t0.tv_nsec);
    printf("property: flash, seed %llu: %ld mixtures, %ld two-phase, %ld one-phase (%ld "
           "liquid-like), %ld failed with a message (%ld: a third phase forms), %ld broke a "
           "property; worst |ln f_V - "
           "ln f_L| %.2g, balance %.2g, tangent-plane distance %.2g, G(split) - G(one phase) "
           "%.2g, change in reverse order %.2g; %.1f s\n",
           (unsigned long long)seed, t.tried, t.two, t.one, t.one_liquid, t.failed_msg, t.third,
           t.bad,
           t.worst_fug, t.worst_bal, t.worst_tpd, t.worst_dg, t.worst_rev, el);
    fflush(stdout);
    for (int s = 0; s < 2; s++) {
        for (int k = 0; k < 2; k++) {
            mix_close(&c->m[s][k]);
            kphi_eos_free(c->rev[s][k]);
        }
        kphi_flash_result_free(c->rr[s]);
        kphi_phase_work_free(c->wr[s]);
    }
    free(c);
    ck_assert_msg(t.bad == 0, "%ld of %ld random flashes broke a property (seed %llu)", t.bad,
                  t.tried, (unsigned long long)seed);
    if (!single) { /* not vacuous: both kinds of answer occur often */
        ck_assert_int_gt(t.two, t.tried / 10);
        ck_assert_int_gt(t.one, t.tried / 10);
    }
}
END_TEST

static Suite *phase_suite(void)
{
    Suite *s = suite_create("phase");
    TCase *st = tcase_create("stability");
    tcase_add_loop_test(st, effluent_stable_hot_unstable_cold, 0, 2);
    tcase_add_loop_test(st, vapour_found_in_water_rich_liquid, 0, 2);
    tcase_add_loop_test(st, gas_found_over_water, 0, 2);
    tcase_add_test(st, third_phase_refused);
    suite_add_tcase(s, st);
    TCase *fl = tcase_create("flash");
    tcase_set_timeout(fl, 60);
    tcase_add_loop_test(fl, separator_flash, 0, 2);
    tcase_add_loop_test(fl, absent_and_trace_component, 0, 2);
    tcase_add_loop_test(fl, pure_component_one_phase, 0, 2);
    tcase_add_loop_test(fl, same_answer_from_other_starts, 0, 2);
    tcase_add_test(fl, result_copy);
    suite_add_tcase(s, fl);
    TCase *sat = tcase_create("saturation");
    tcase_set_timeout(sat, 60);
    tcase_add_loop_test(sat, dew_point_of_effluent, 0, 2);
    tcase_add_loop_test(sat, bubble_point_of_liquid, 0, 2);
    tcase_add_loop_test(sat, dew_point_of_liquid, 0, 2);
    tcase_add_loop_test(sat, binary_bubble_points_at_1_atm, 0, 2);
    tcase_add_loop_test(sat, vapour_pressure_consistent, 0, 2);
    suite_add_tcase(s, sat);
    TCase *pr = tcase_create("property");
    tcase_set_timeout(pr, 600);
    tcase_add_test(pr, random_flashes);
    suite_add_tcase(s, pr);
    TCase *e = tcase_create("errors");
    tcase_add_test(e, bad_input_is_refused);
    suite_add_tcase(s, e);
    return s;
}

KPHI_TEST_MAIN(phase_suite)
