/* kphi sweep, loop grids: a synthesis loop (kphi_loop_solve(), src/loop.c) over converter
 * temperature x loop pressure, in parallel on the sweep's scheduler (src/sweep_sched.c).
 *
 * At grid point (T_i, P_j) the loop is base with
 *   converter temperature T_i: the outlet T of an isothermal converter, or the first
 *     bed's inlet T of adiabatic beds (further beds keep their inlet temperatures);
 *   loop pressure P_j, and separator pressure P_j - (base P - base P_sep): the pressure
 *     drop from converter to separator is held;
 * each solved with the converter model and with the ideal-gas converter (the separator
 * always with its equation of state).
 *
 * Chains run along P at one T: a row of nP points is cut into pieces of `chain` points,
 * fixed by nP and chain alone. Within a chain each loop starts its recycle (the tear
 * stream of kphi_loop_solve()) from the recycle of the previous point's loop of the same
 * converter model, which saves Newton steps; if that start fails the point is solved
 * again from the cold start. The answer at a point thus depends on its chain only, never
 * on the thread that solved it: the output is the same for any thread count. Each thread
 * owns one kphi_loop_work; results live in a ring of chain buffers allocated once. */
#include "kphi/sweep.h"

#include <stdlib.h>
#include <string.h>

#include "sweep_internal.h"

typedef struct {
    kphi_loop_spec spec;
    kphi_loop_result *res[2];
    int status[2];
    kphi_error err[2];
} loop_slot;

typedef struct {
    const kphi_rxnset *set;
    const kphi_eos *model[2], *sep;
    const kphi_loop_spec *base;
    const double *T, *P;
    size_t nP, chain, per_row; /* chains per T row */
    kphi_loop_work **works;
    loop_slot **ring;
    kphi_sweep_loop_emit emit;
    void *ctx;
} loop_ctx;

/* Chain c: the row iT and the pressures [j0, j1). */
static void chain_span(const loop_ctx *c, size_t chain, size_t *iT, size_t *j0, size_t *j1)
{
    *iT = chain / c->per_row;
    *j0 = (chain % c->per_row) * c->chain;
    *j1 = *j0 + c->chain < c->nP ? *j0 + c->chain : c->nP;
}

/* The loop at grid point (iT, iP). */
static void point_spec(const loop_ctx *c, size_t iT, size_t iP, kphi_loop_spec *sp)
{
    const kphi_loop_spec *b = c->base;
    *sp = *b;
    sp->P = c->P[iP];
    sp->P_sep = c->P[iP] - (b->P - b->P_sep);
    if (b->converter == KPHI_LOOP_ADIABATIC)
        sp->T_in[0] = c->T[iT];
    else
        sp->T_out = c->T[iT];
}

static void loop_solve_chain(void *vc, int t, size_t chain, size_t buffer)
{
    const loop_ctx *c = vc;
    size_t iT, j0, j1;
    chain_span(c, chain, &iT, &j0, &j1);
    loop_slot *sl = c->ring[buffer];
    const double *prev[2] = {NULL, NULL};
    for (size_t j = j0; j < j1; j++) {
        loop_slot *q = &sl[j - j0];
        point_spec(c, iT, j, &q->spec);
        for (int m = 0; m < 2; m++) {
            kphi_error_clear(&q->err[m]);
            q->status[m] = kphi_loop_solve(c->set, c->model[m], c->sep, &q->spec, prev[m],
                                           c->works[t], q->res[m], &q->err[m]);
            if (q->status[m] != KPHI_OK && prev[m] != NULL) {
                kphi_error_clear(&q->err[m]); /* a poor start must not decide the answer */
                q->status[m] = kphi_loop_solve(c->set, c->model[m], c->sep, &q->spec, NULL,
                                               c->works[t], q->res[m], &q->err[m]);
            }
            prev[m] = q->status[m] == KPHI_OK ? q->res[m]->stream[KPHI_LOOP_S_RECYCLE].n : NULL;
        }
    }
}

static int loop_emit_chain(void *vc, size_t chain, size_t buffer)
{
    const loop_ctx *c = vc;
    size_t iT, j0, j1;
    chain_span(c, chain, &iT, &j0, &j1);
    int rc = 0;
    for (size_t j = j0; j < j1 && rc == 0; j++) {
        const loop_slot *q = &c->ring[buffer][j - j0];
        kphi_sweep_loop_point pt;
        pt.spec = &q->spec;
        for (int m = 0; m < 2; m++) {
            pt.loop[m] = q->status[m] == KPHI_OK ? q->res[m] : NULL;
            pt.failure[m] = q->status[m] == KPHI_OK ? NULL : &q->err[m];
        }
        rc = c->emit(c->ctx, iT, j, &pt);
    }
    return rc;
}

int kphi_sweep_loop_run(const kphi_rxnset *set, const kphi_eos *conv, const kphi_eos *ideal,
                        const kphi_eos *sep, const kphi_loop_spec *base, const double T[],
                        size_t nT, const double P[], size_t nP, const kphi_sweep_options *opt,
                        kphi_sweep_loop_emit emit, void *ctx, kphi_error *err)
{
    kphi_mark none = {0, 0};
    kphi_sweep_options def = kphi_sweep_options_default();
    if (opt == NULL)
        opt = &def;
    if (nT == 0 || nP == 0)
        return KPHI_OK;
    size_t s = kphi_rxnset_n_species(set), r = kphi_rxnset_n_reactions(set);
    size_t chain = kphi__sweep_chain_len(opt->chain, nP);
    size_t per_row = (nP + chain - 1) / chain, nchains = nT * per_row;
    int nth;
    size_t nring;
    kphi__sweep_size(nchains, opt->threads, &nth, &nring);

    kphi_loop_work **works = calloc((size_t)nth, sizeof *works);
    loop_slot **ring = calloc(nring, sizeof *ring);
    int ok = works != NULL && ring != NULL;
    for (int t = 0; ok && t < nth; t++) {
        works[t] = kphi_loop_work_alloc(s, r);
        ok = works[t] != NULL;
    }
    for (size_t g = 0; ok && g < nring; g++) {
        ring[g] = calloc(chain, sizeof *ring[g]);
        ok = ring[g] != NULL;
        for (size_t k = 0; ok && k < chain; k++)
            for (int m = 0; ok && m < 2; m++) {
                ring[g][k].res[m] = kphi_loop_result_alloc(s);
                ok = ring[g][k].res[m] != NULL;
            }
    }
    int rc = KPHI_OK;
    if (!ok) {
        rc = kphi_error_set(err, KPHI_ENOMEM, NULL, none, "out of memory for the loop sweep");
    } else {
        loop_ctx c = {set, {conv, ideal}, sep, base, T, P, nP, chain, per_row, works, ring,
                      emit, ctx};
        kphi__sweep_plan plan = {nchains, nth, nring, &c, loop_solve_chain, loop_emit_chain};
        rc = kphi__sweep_schedule(&plan);
    }
    for (int t = 0; works != NULL && t < nth; t++)
        kphi_loop_work_free(works[t]);
    for (size_t g = 0; ring != NULL && g < nring; g++) {
        for (size_t k = 0; ring[g] != NULL && k < chain; k++)
            for (int m = 0; m < 2; m++)
                kphi_loop_result_free(ring[g][k].res[m]);
        free(ring[g]);
    }
    free(works);
    free(ring);
    return rc;
}
