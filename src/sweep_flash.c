/* kphi sweep, flash grids: a feed flashed over temperature x pressure (kphi_phase_flash(),
 * src/phase.c), the separator designer's chart, in parallel on the sweep's scheduler
 * (src/sweep_sched.c), with the feed's dew and bubble points at each pressure
 * (src/phase_sat.c).
 *
 * The saturation searches come first, one per pressure, shared among the threads (an
 * OpenMP loop); then the grid (T outer, P inner) in chains of `chain` points. A flash
 * takes no starting guess here, so every answer depends on its point alone and the output
 * is the same for any thread count. Each thread owns one kphi_phase_work; the results
 * live in a ring of chain buffers allocated once. */
#include "kphi/sweep.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "sweep_internal.h"

#ifdef _OPENMP
#include <omp.h>
#endif

typedef struct {
    kphi_flash_result *fl;
    int status;
    kphi_error err;
} flash_slot;

/* The dew and bubble points at one pressure. */
typedef struct {
    int dew_found, bubble_found;
    double T_dew, T_bubble;
    char note[200];
} sat_point;

typedef struct {
    const kphi_eos *eos;
    const double *z, *T, *P;
    size_t nP, total, chain;
    const sat_point *sat;
    kphi_phase_work **works;
    flash_slot **ring;
    kphi_sweep_flash_emit emit;
    void *ctx;
} flash_ctx;

static void flash_solve_chain(void *vc, int t, size_t chain, size_t buffer)
{
    const flash_ctx *c = vc;
    size_t k0, k1;
    kphi__sweep_chain_points(chain, c->chain, c->total, &k0, &k1);
    for (size_t k = k0; k < k1; k++) {
        flash_slot *q = &c->ring[buffer][k - k0];
        kphi_error_clear(&q->err);
        q->status = kphi_phase_flash(c->eos, c->T[k / c->nP], c->P[k % c->nP], c->z, NULL,
                                     c->works[t], q->fl, &q->err);
    }
}

static int flash_emit_chain(void *vc, size_t chain, size_t buffer)
{
    const flash_ctx *c = vc;
    size_t k0, k1;
    kphi__sweep_chain_points(chain, c->chain, c->total, &k0, &k1);
    int rc = 0;
    for (size_t k = k0; k < k1 && rc == 0; k++) {
        const flash_slot *q = &c->ring[buffer][k - k0];
        size_t iT = k / c->nP, iP = k % c->nP;
        const sat_point *sp = &c->sat[iP];
        kphi_sweep_flash_point pt;
        pt.flash = q->status == KPHI_OK ? q->fl : NULL;
        pt.failure = q->status == KPHI_OK ? NULL : &q->err;
        pt.dew_found = sp->dew_found;
        pt.bubble_found = sp->bubble_found;
        pt.T_dew = sp->T_dew;
        pt.T_bubble = sp->T_bubble;
        pt.sat_note = sp->note[0] != '\0' ? sp->note : NULL;
        rc = c->emit(c->ctx, iT, iP, c->T[iT], c->P[iP], &pt);
    }
    return rc;
}

/* The saturation searches of every pressure, shared among nth threads. */
static void solve_saturation(const kphi_eos *eos, const double *z, const double *P, size_t nP,
                             double T_lo, double T_hi, kphi_phase_work **works, int nth,
                             sat_point *sat)
{
    const long n = (long)nP;
#pragma omp parallel for schedule(dynamic, 1) num_threads(nth)
    for (long j = 0; j < n; j++) {
        int t = 0;
#ifdef _OPENMP
        t = omp_get_thread_num();
#endif
        sat_point *s = &sat[j];
        kphi_error e;
        kphi_error_clear(&e);
        s->note[0] = '\0';
        s->T_dew = s->T_bubble = NAN;
        s->dew_found = s->bubble_found = 0;
        if (kphi_phase_dew_point(eos, P[j], z, NAN, T_lo, T_hi, NULL, works[t], &s->dew_found,
                                 &s->T_dew, &e) != KPHI_OK) {
            s->dew_found = 0;
            s->T_dew = NAN;
            snprintf(s->note, sizeof s->note, "dew point: %.180s", e.msg);
        }
        kphi_error_clear(&e);
        if (kphi_phase_bubble_point(eos, P[j], z, NAN, T_lo, T_hi, NULL, works[t],
                                    &s->bubble_found, &s->T_bubble, &e) != KPHI_OK) {
            s->bubble_found = 0;
            s->T_bubble = NAN;
            if (s->note[0] == '\0')
                snprintf(s->note, sizeof s->note, "bubble point: %.180s", e.msg);
        }
        if (!s->dew_found)
            s->T_dew = NAN;
        if (!s->bubble_found)
            s->T_bubble = NAN;
    }
}

int kphi_sweep_flash_run(const kphi_eos *eos, const double z[], const double T[], size_t nT,
                         const double P[], size_t nP, double T_lo, double T_hi,
                         const kphi_sweep_options *opt, kphi_sweep_flash_emit emit, void *ctx,
                         kphi_error *err)
{
    kphi_mark none = {0, 0};
    kphi_sweep_options def = kphi_sweep_options_default();
    if (opt == NULL)
        opt = &def;
    if (!kphi_phase_model_ok(kphi_eos_get_model(eos)))
        return kphi_error_set(err, KPHI_EINPUT, NULL, none,
                              "a flash needs a cubic equation of state (rk, srk or pr)");
    size_t total = nT * nP, s = kphi_eos_size(eos);
    if (total == 0)
        return KPHI_OK;
    size_t chain = kphi__sweep_chain_len(opt->chain, total);
    size_t nchains = (total + chain - 1) / chain;
    int nth;
    size_t nring;
    kphi__sweep_size(nchains, opt->threads, &nth, &nring);
    int nth_sat = nth; /* the searches may use as many threads as the grid */
    if (nth_sat < 1)
        nth_sat = 1;

    kphi_phase_work **works = calloc((size_t)nth, sizeof *works);
    flash_slot **ring = calloc(nring, sizeof *ring);
    sat_point *sat = calloc(nP, sizeof *sat);
    int ok = works != NULL && ring != NULL && sat != NULL;
    for (int t = 0; ok && t < nth; t++) {
        works[t] = kphi_phase_work_alloc(s, 0);
        ok = works[t] != NULL;
    }
    for (size_t g = 0; ok && g < nring; g++) {
        ring[g] = calloc(chain, sizeof *ring[g]);
        ok = ring[g] != NULL;
        for (size_t k = 0; ok && k < chain; k++) {
            ring[g][k].fl = kphi_flash_result_alloc(s);
            ok = ring[g][k].fl != NULL;
        }
    }
    int rc = KPHI_OK;
    if (!ok) {
        rc = kphi_error_set(err, KPHI_ENOMEM, NULL, none, "out of memory for the flash sweep");
    } else {
        solve_saturation(eos, z, P, nP, T_lo, T_hi, works, nth_sat, sat);
        flash_ctx c = {eos, z, T, P, nP, total, chain, sat, works, ring, emit, ctx};
        kphi__sweep_plan plan = {nchains, nth, nring, &c, flash_solve_chain, flash_emit_chain};
        rc = kphi__sweep_schedule(&plan);
    }
    for (int t = 0; works != NULL && t < nth; t++)
        kphi_phase_work_free(works[t]);
    for (size_t g = 0; ring != NULL && g < nring; g++) {
        for (size_t k = 0; ring[g] != NULL && k < chain; k++)
            kphi_flash_result_free(ring[g][k].fl);
        free(ring[g]);
    }
    free(works);
    free(ring);
    free(sat);
    return rc;
}
