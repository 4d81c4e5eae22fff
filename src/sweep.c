/* kphi sweep: a grid of equilibrium solutions over T and P, solved in parallel with
 * OpenMP and delivered in grid order.
 *
 * The grid (T outer, P inner) is cut into chains of a fixed number of consecutive points.
 * Within a chain each point starts from the extents of the previous point (warm start), so
 * the answer at a point depends only on its chain, never on which thread solved it or
 * what that thread solved before: the output is identical for any thread count.
 *
 * Each solved point also gets its equivalent ideal-gas pressure (opt->equiv_pressure),
 * searched from the point's own ideal-gas answer with warm starts
 * (kphi_equil_equivalent_pressure_from(), src/equil_result.c): the search starts from the
 * point, not from the chain, so it too is independent of the thread.
 *
 * With opt->phases (a cubic model) the real-gas answer of each point goes through
 * kphi_phase_equil_solve() (src/phase_rxn.c): the stability test of the equilibrium gas,
 * and the simultaneous chemical and phase equilibrium when it is unstable, warm-started
 * like the gas solve from the previous point of the chain.
 *
 * With opt->adiabatic each solved point also gets the adiabatic equilibrium outlet of a
 * bed fed at the point's T (kphi_equil_adiabatic_outlet(), whose energy balance and
 * sources are in src/equil_energy.c), for the model and the ideal gas. Those searches
 * start cold, so they too are independent of the chain and the thread.
 *
 * Scheduling (src/sweep_sched.c): solved chains wait in a ring of buffers, a few per
 * thread, and are emitted in grid order while other threads go on solving. Every thread
 * owns its workspace, allocated once before the loop, and the ring is allocated once:
 * nothing is allocated per point. */
#include "kphi/sweep.h"

#include "kphi/phase.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "sweep_internal.h"

kphi_sweep_options kphi_sweep_options_default(void)
{
    kphi_sweep_options o;
    o.threads = 0;
    o.chain = 32;
    o.adiabatic = 0;
    o.equiv_pressure = 1;
    o.phases = 0;
    o.approach_dT = 0.0;
    o.equil = kphi_equil_options_default();
    return o;
}

typedef struct {
    kphi_equil_result *real, *ideal;
    double X_real, X_ideal;
    kphi_equil_result *out[2]; /* adiabatic outlets, model and ideal gas (opt->adiabatic) */
    double X_out[2];
    kphi_flash_result *ph;     /* phases of the real answer (opt->phases) */
    double P_equiv;  /* Pa, NaN when undefined or not asked for */
    char note[160];  /* why P_equiv is undefined, "" otherwise */
    int status;
    kphi_error err;
} slot;

static void free_slots(slot *sl, size_t n)
{
    if (sl == NULL)
        return;
    for (size_t k = 0; k < n; k++) {
        kphi_equil_result_free(sl[k].real);
        kphi_equil_result_free(sl[k].ideal);
        kphi_equil_result_free(sl[k].out[0]);
        kphi_equil_result_free(sl[k].out[1]);
        kphi_flash_result_free(sl[k].ph);
    }
    free(sl);
}

/* The adiabatic outlets of one solved point (cold-started searches: the result does not
 * depend on the chain). A failure makes the point a failed one, saying which model. */
static void solve_outlets(const kphi_rxnset *set, const kphi_eos *eos, const kphi_eos *ideal,
                          const double *feed, double T, double P, const kphi_sweep_options *opt,
                          kphi_equil_work *w, slot *s)
{
    const double *wt = kphi_rxnset_conversion_weights(set);
    for (int m = 0; m < 2 && s->status == KPHI_OK; m++) {
        const kphi_eos *model = m == 0 ? eos : ideal;
        kphi_error e;
        kphi_error_clear(&e);
        s->status = kphi_equil_adiabatic_outlet(set, model, T, P, feed, &opt->equil, w,
                                                s->out[m], &e);
        if (s->status == KPHI_OK) {
            s->X_out[m] = kphi_equil_conversion(s->out[m], feed, wt);
        } else {
            kphi_mark none = {0, 0};
            const char *label = m == 0 && kphi_eos_get_model(eos) != KPHI_EOS_IDEAL
                                    ? kphi_eos_model_name(kphi_eos_get_model(eos))
                                    : "ideal gas";
            kphi_error_set(&s->err, e.code, NULL, none, "adiabatic outlet (%s): %.200s", label,
                           e.msg);
        }
    }
}

/* The equivalent ideal-gas pressure of a solved point, searched from its own ideal-gas
 * answer (kphi_equil_equivalent_pressure_from()); why it is undefined into s->note. */
static void solve_equiv(const kphi_rxnset *set, const kphi_eos *eos, const kphi_eos *ideal,
                        const double *feed, double T, kphi_equil_work *w,
                        kphi_equil_result *const tmp[2], slot *s)
{
    s->P_equiv = NAN;
    s->note[0] = '\0';
    if (kphi_eos_get_model(eos) == KPHI_EOS_IDEAL) {
        s->P_equiv = s->ideal->P;
        return;
    }
    kphi_error e;
    kphi_error_clear(&e);
    double Peq;
    if (kphi_equil_equivalent_pressure_from(set, ideal, T, feed,
                                            kphi_rxnset_conversion_weights(set), s->X_real,
                                            s->ideal, &Peq, w, tmp, &e) == KPHI_OK)
        s->P_equiv = Peq;
    else
        snprintf(s->note, sizeof s->note, "%.159s", e.msg);
}

/* Solve one chain [k0, k1) of the grid into slots sl[0 .. k1-k0); tmp: two scratch
 * results of the thread. */
static void solve_chain(const kphi_rxnset *set, const kphi_eos *eos, const kphi_eos *ideal,
                        const double *feed, const double *T, const double *P, size_t nP,
                        size_t k0, size_t k1, const kphi_sweep_options *opt, kphi_equil_work *w,
                        kphi_phase_work *pw, kphi_equil_result *const tmp[2], slot *sl)
{
    int tested = opt->phases != 0 && pw != NULL;
    const double *wt = kphi_rxnset_conversion_weights(set);
    const double *prev_real = NULL, *prev_ideal = NULL;
    for (size_t k = k0; k < k1; k++) {
        slot *s = &sl[k - k0];
        double Tk = T[k / nP] + opt->approach_dT, Pk = P[k % nP];
        kphi_error_clear(&s->err);
        s->status = kphi_equil_solve(set, ideal, Tk, Pk, feed, prev_ideal, &opt->equil, w,
                                     s->ideal, &s->err);
        if (s->status != KPHI_OK && prev_ideal != NULL) {
            kphi_error_clear(&s->err); /* a poor warm start must not decide the answer */
            s->status = kphi_equil_solve(set, ideal, Tk, Pk, feed, NULL, &opt->equil, w,
                                         s->ideal, &s->err);
        }
        if (s->status == KPHI_OK && tested) {
            int gas_only = opt->phases == 2;
            s->status = kphi_phase_equil_solve(set, eos, Tk, Pk, feed, prev_real, gas_only,
                                               &opt->equil, NULL, w, pw, s->real, s->ph,
                                               &s->err);
            if (s->status != KPHI_OK && prev_real != NULL) {
                kphi_error_clear(&s->err);
                s->status = kphi_phase_equil_solve(set, eos, Tk, Pk, feed, NULL, gas_only,
                                                   &opt->equil, NULL, w, pw, s->real, s->ph,
                                                   &s->err);
            }
        } else if (s->status == KPHI_OK) {
            s->status = kphi_equil_solve(set, eos, Tk, Pk, feed, prev_real, &opt->equil, w,
                                         s->real, &s->err);
            if (s->status != KPHI_OK && prev_real != NULL) {
                kphi_error_clear(&s->err);
                s->status = kphi_equil_solve(set, eos, Tk, Pk, feed, NULL, &opt->equil, w,
                                             s->real, &s->err);
            }
        }
        if (s->status == KPHI_OK) {
            s->X_real = kphi_equil_conversion(s->real, feed, wt);
            s->X_ideal = kphi_equil_conversion(s->ideal, feed, wt);
            prev_real = s->real->xi;
            prev_ideal = s->ideal->xi;
            s->P_equiv = NAN;
            s->note[0] = '\0';
            if (opt->equiv_pressure)
                solve_equiv(set, eos, ideal, feed, Tk, w, tmp, s);
            if (opt->adiabatic)
                solve_outlets(set, eos, ideal, feed, Tk, Pk, opt, w, s);
        } else {
            prev_real = prev_ideal = NULL;
        }
    }
}

/* Hand the points of one solved chain [k0, k1) to the callback; returns its first nonzero
 * value, or 0. */
static int emit_chain(const kphi_rxnset *set, const kphi_eos *eos, const double *feed,
                      const double *T, const double *P, size_t nP, size_t k0, size_t k1,
                      const slot *sl, const kphi_sweep_options *opt, int phases,
                      kphi_sweep_emit emit,
                      void *ctx)
{
    int rc = 0;
    long key = kphi_rxnset_first_product(set);
    for (size_t k = k0; k < k1 && rc == 0; k++) {
        const slot *q = &sl[k - k0];
        size_t iT = k / nP, iP = k % nP;
        if (q->status == KPHI_OK) {
            kphi_report_point pt;
            memset(&pt, 0, sizeof pt);
            pt.set = set;
            pt.feed = feed;
            pt.model = kphi_eos_get_model(eos);
            pt.real = q->real;
            pt.ideal = q->ideal;
            pt.X_real = q->X_real;
            pt.X_ideal = q->X_ideal;
            pt.P_equiv = q->P_equiv;
            pt.P_equiv_note = q->note[0] != '\0' ? q->note : NULL;
            if (phases != 0 && q->ph != NULL) {
                pt.phases = q->ph;
                pt.gas_only = phases == 2;
                pt.gas_unstable = phases == 2 && kphi_phase_gas_unstable(q->ph, NULL);
            }
            for (size_t j = 0; j < kphi_rxnset_n_reactions(set); j++)
                if (q->real->K_basis[j] != KPHI_K_TABLES)
                    pt.K_basis = q->real->K_basis[j]; /* the basis the sweep was asked for */
            kphi_report_energy en;
            memset(&en, 0, sizeof en);
            if (opt->approach_dT != 0.0) {
                en.outlet_approach = 1;
                en.outlet_dT = opt->approach_dT;
                pt.energy = &en;
            }
            if (opt->adiabatic) {
                en.adiabatic = 1;
                en.key_species = key >= 0 ? (size_t)key : 0;
                for (int m = 0; m < 2; m++) {
                    en.T_out[m] = q->out[m]->T;
                    en.X_out[m] = q->X_out[m];
                    en.out[m] = q->out[m];
                }
                pt.energy = &en;
            }
            rc = emit(ctx, iT, iP, T[iT], P[iP], &pt, NULL);
        } else {
            rc = emit(ctx, iT, iP, T[iT], P[iP], NULL, &q->err);
        }
    }
    return rc;
}

/* What the scheduler's callbacks need (kphi__sweep_plan). */
typedef struct {
    const kphi_rxnset *set;
    const kphi_eos *eos, *ideal;
    const double *feed, *T, *P;
    size_t nP, total, chain;
    const kphi_sweep_options *opt;
    int tested;
    kphi_equil_work **works;
    kphi_phase_work **pworks;
    kphi_equil_result **scratch;
    slot **ring; /* [n_ring][chain] */
    kphi_sweep_emit emit;
    void *ctx;
} run_ctx;

static void run_solve(void *vc, int t, size_t chain, size_t buffer)
{
    const run_ctx *c = vc;
    size_t k0, k1;
    kphi__sweep_chain_points(chain, c->chain, c->total, &k0, &k1);
    solve_chain(c->set, c->eos, c->ideal, c->feed, c->T, c->P, c->nP, k0, k1, c->opt,
                c->works[t], c->tested ? c->pworks[t] : NULL, &c->scratch[2 * t],
                c->ring[buffer]);
}

static int run_emit(void *vc, size_t chain, size_t buffer)
{
    const run_ctx *c = vc;
    size_t k0, k1;
    kphi__sweep_chain_points(chain, c->chain, c->total, &k0, &k1);
    return emit_chain(c->set, c->eos, c->feed, c->T, c->P, c->nP, k0, k1, c->ring[buffer],
                      c->opt, c->tested ? c->opt->phases : 0, c->emit, c->ctx);
}

int kphi_sweep_run(const kphi_rxnset *set, const kphi_eos *eos, const kphi_eos *ideal,
                   const double feed[], const double T[], size_t nT, const double P[], size_t nP,
                   const kphi_sweep_options *opt, kphi_sweep_emit emit, void *ctx,
                   kphi_error *err)
{
    kphi_mark none = {0, 0};
    kphi_sweep_options def = kphi_sweep_options_default();
    if (opt == NULL)
        opt = &def;
    size_t s = kphi_rxnset_n_species(set), r = kphi_rxnset_n_reactions(set);
    size_t total = nT * nP;
    if (total == 0)
        return KPHI_OK;
    size_t chain = kphi__sweep_chain_len(opt->chain, total);
    size_t nchains = (total + chain - 1) / chain;
    int nth;
    size_t nring;
    kphi__sweep_size(nchains, opt->threads, &nth, &nring);

    /* per thread a workspace and two scratch results; the ring of chain slots; all
     * allocated once */
    int tested = opt->phases != 0 && kphi_phase_model_ok(kphi_eos_get_model(eos));
    kphi_equil_work **works = calloc((size_t)nth, sizeof *works);
    kphi_phase_work **pworks = calloc((size_t)nth, sizeof *pworks);
    kphi_equil_result **scratch = calloc(2 * (size_t)nth, sizeof *scratch);
    slot **ring = calloc(nring, sizeof *ring);
    int ok = works != NULL && scratch != NULL && ring != NULL && pworks != NULL;
    for (int t = 0; ok && t < nth; t++) {
        works[t] = kphi_equil_work_alloc(s, r);
        if (tested) {
            pworks[t] = kphi_phase_work_alloc(s, r);
            ok = pworks[t] != NULL;
        }
        scratch[2 * t] = kphi_equil_result_alloc(s, r);
        scratch[2 * t + 1] = kphi_equil_result_alloc(s, r);
        ok = ok && works[t] != NULL && scratch[2 * t] != NULL && scratch[2 * t + 1] != NULL;
    }
    for (size_t g = 0; ok && g < nring; g++) {
        ring[g] = calloc(chain, sizeof *ring[g]);
        ok = ring[g] != NULL;
        for (size_t k = 0; ok && k < chain; k++) {
            ring[g][k].real = kphi_equil_result_alloc(s, r);
            ring[g][k].ideal = kphi_equil_result_alloc(s, r);
            ok = ring[g][k].real != NULL && ring[g][k].ideal != NULL;
            if (ok && tested) {
                ring[g][k].ph = kphi_flash_result_alloc(s);
                ok = ring[g][k].ph != NULL;
            }
            for (int m = 0; ok && opt->adiabatic && m < 2; m++) {
                ring[g][k].out[m] = kphi_equil_result_alloc(s, r);
                ok = ring[g][k].out[m] != NULL;
            }
        }
    }
    int rc = KPHI_OK;
    if (!ok) {
        rc = kphi_error_set(err, KPHI_ENOMEM, NULL, none, "out of memory for the sweep");
    } else {
        run_ctx c = {set,   eos,   ideal,  feed,    T,       P,    nP,   total, chain,
                     opt,   tested, works, pworks, scratch, ring, emit, ctx};
        kphi__sweep_plan plan = {nchains, nth, nring, &c, run_solve, run_emit};
        rc = kphi__sweep_schedule(&plan);
    }
    for (int t = 0; works != NULL && t < nth; t++)
        kphi_equil_work_free(works[t]);
    for (int t = 0; pworks != NULL && t < nth; t++)
        kphi_phase_work_free(pworks[t]);
    free(pworks);
    for (size_t k = 0; scratch != NULL && k < 2 * (size_t)nth; k++)
        kphi_equil_result_free(scratch[k]);
    free(scratch);
    for (size_t g = 0; ring != NULL && g < nring; g++)
        free_slots(ring[g], ring[g] != NULL ? chain : 0);
    free(works);
    free(ring);
    return rc;
}
