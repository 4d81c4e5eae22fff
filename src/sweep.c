/* kphi sweep: a grid of equilibrium solutions over T and P, solved in parallel with
 * OpenMP and delivered in grid order.
 *
 * The grid (T outer, P inner) is cut into chains of a fixed number of consecutive points.
 * Within a chain each point starts from the extents of the previous point (warm start), so
 * the answer at a point depends only on its chain, never on which thread solved it: the
 * output is identical for any thread count. A block of chains is solved in parallel, then
 * emitted in order on the calling thread; the next block follows. Every thread owns its
 * workspace, allocated once before the loop. */
#include "kphi/sweep.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#ifdef _OPENMP
#include <omp.h>
#endif

kphi_sweep_options kphi_sweep_options_default(void)
{
    kphi_sweep_options o;
    o.threads = 0;
    o.chain = 32;
    o.equil = kphi_equil_options_default();
    return o;
}

typedef struct {
    kphi_equil_result *real, *ideal;
    double X_real, X_ideal;
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
    }
    free(sl);
}

/* Solve one chain [k0, k1) of the grid into slots sl[0 .. k1-k0). */
static void solve_chain(const kphi_rxnset *set, const kphi_eos *eos, const kphi_eos *ideal,
                        const double *feed, const double *T, const double *P, size_t nP,
                        size_t k0, size_t k1, const kphi_sweep_options *opt, kphi_equil_work *w,
                        slot *sl)
{
    const double *wt = kphi_rxnset_conversion_weights(set);
    const double *prev_real = NULL, *prev_ideal = NULL;
    for (size_t k = k0; k < k1; k++) {
        slot *s = &sl[k - k0];
        double Tk = T[k / nP], Pk = P[k % nP];
        kphi_error_clear(&s->err);
        s->status = kphi_equil_solve(set, ideal, Tk, Pk, feed, prev_ideal, &opt->equil, w,
                                     s->ideal, &s->err);
        if (s->status != KPHI_OK && prev_ideal != NULL) {
            kphi_error_clear(&s->err); /* a poor warm start must not decide the answer */
            s->status = kphi_equil_solve(set, ideal, Tk, Pk, feed, NULL, &opt->equil, w,
                                         s->ideal, &s->err);
        }
        if (s->status == KPHI_OK) {
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
        } else {
            prev_real = prev_ideal = NULL;
        }
    }
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
    size_t chain = opt->chain > 0 ? opt->chain : 32;
    int nth = 1;
#ifdef _OPENMP
    nth = opt->threads > 0 ? opt->threads : omp_get_max_threads();
#endif
    if (nth < 1)
        nth = 1;
    size_t chains_per_block = (size_t)nth * 4;
    size_t block = chains_per_block * chain;
    if (block > total)
        block = total;
    slot *sl = calloc(block, sizeof *sl);
    int ok = sl != NULL;
    for (size_t k = 0; ok && k < block; k++) {
        sl[k].real = kphi_equil_result_alloc(s, r);
        sl[k].ideal = kphi_equil_result_alloc(s, r);
        ok = sl[k].real != NULL && sl[k].ideal != NULL;
    }
    kphi_equil_work **works = calloc((size_t)nth, sizeof *works);
    ok = ok && works != NULL;
    for (int t = 0; ok && t < nth; t++) {
        works[t] = kphi_equil_work_alloc(s, r);
        ok = works[t] != NULL;
    }
    int rc = KPHI_OK;
    if (!ok)
        rc = kphi_error_set(err, KPHI_ENOMEM, NULL, none, "out of memory for the sweep");
    for (size_t b0 = 0; rc == KPHI_OK && b0 < total; b0 += block) {
        size_t b1 = b0 + block < total ? b0 + block : total;
        size_t nchains = (b1 - b0 + chain - 1) / chain;
        long nc = (long)nchains;
#pragma omp parallel for schedule(dynamic, 1) num_threads(nth)
        for (long c = 0; c < nc; c++) {
            int t = 0;
#ifdef _OPENMP
            t = omp_get_thread_num();
#endif
            size_t k0 = b0 + (size_t)c * chain;
            size_t k1 = k0 + chain < b1 ? k0 + chain : b1;
            solve_chain(set, eos, ideal, feed, T, P, nP, k0, k1, opt, works[t], sl + (k0 - b0));
        }
        for (size_t k = b0; k < b1 && rc == KPHI_OK; k++) {
            slot *q = &sl[k - b0];
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
                pt.P_equiv = NAN;
                rc = emit(ctx, iT, iP, T[iT], P[iP], &pt, NULL);
            } else {
                rc = emit(ctx, iT, iP, T[iT], P[iP], NULL, &q->err);
            }
        }
    }
    if (works != NULL)
        for (int t = 0; t < nth; t++)
            kphi_equil_work_free(works[t]);
    free(works);
    free_slots(sl, block);
    return rc;
}
