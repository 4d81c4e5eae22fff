/* kphi sweep, the scheduler: chains of grid points solved in parallel (OpenMP) and handed
 * to the caller in grid order, shared by the equilibrium, loop and flash sweeps.
 *
 * Solved chains wait in a ring of buffers (a few chains per thread). Each thread
 * repeatedly (1) emits the next chain in grid order when it is solved and no other thread
 * is emitting, else (2) claims the next unsolved chain while the ring has room and solves
 * it, else (3) sleeps briefly. Emission (the caller's callback, typically text formatting)
 * is serial by nature; this way it overlaps solving, the emitting thread never waits for
 * a slower solver while solved chains are ready, and an idle thread sleeps instead of
 * spinning (spinning waits cost dearly when the cores are shared with other programs).
 * All shared state is guarded by one lock held for a few instructions at a time; the
 * solving and the callback run outside it. What a chain holds and how it is solved is the
 * caller's (kphi__sweep_plan); the answer of a chain depends only on the chain, so the
 * output is the same for any thread count. */
#include "sweep_internal.h"

#include <string.h>
#include <time.h>

#ifdef _OPENMP
#include <omp.h>
#endif

/* Shared scheduling state; guarded by lock. */
typedef struct {
#ifdef _OPENMP
    omp_lock_t lock;
#endif
    long next_claim; /* next chain to solve */
    long next_emit;  /* next chain to emit */
    int emitting;    /* a thread is inside the callback */
    int stop;        /* the callback asked to stop */
    int rc;          /* its value */
} sched;

static void sched_lock(sched *q)
{
#ifdef _OPENMP
    omp_set_lock(&q->lock);
#else
    (void)q;
#endif
}

static void sched_unlock(sched *q)
{
#ifdef _OPENMP
    omp_unset_lock(&q->lock);
#else
    (void)q;
#endif
}

/* Nothing to do for a moment: give the core away (50 us, well below the time to emit or
 * solve a chain). */
static void idle(void)
{
    struct timespec ts = {0, 50000};
    nanosleep(&ts, NULL);
}

void kphi__sweep_size(size_t n_chains, int threads, int *n_threads, size_t *n_ring)
{
    int nth = 1;
#ifdef _OPENMP
    nth = threads > 0 ? threads : omp_get_max_threads();
#else
    (void)threads;
#endif
    if (nth < 1)
        nth = 1;
    if (n_chains > 0 && (size_t)nth > n_chains)
        nth = (int)n_chains;
    size_t nring = (size_t)nth * KPHI__SWEEP_RING_PER_THREAD;
    if (nring > n_chains)
        nring = n_chains > 0 ? n_chains : 1;
    if (nring > KPHI__SWEEP_RING_MAX)
        nring = KPHI__SWEEP_RING_MAX;
    *n_threads = nth;
    *n_ring = nring;
}

int kphi__sweep_schedule(const kphi__sweep_plan *p)
{
    if (p->n_chains == 0)
        return 0;
    sched q;
    memset(&q, 0, sizeof q);
#ifdef _OPENMP
    omp_init_lock(&q.lock);
#endif
    long nr = (long)p->n_ring;
    if (nr > KPHI__SWEEP_RING_MAX)
        nr = KPHI__SWEEP_RING_MAX; /* kphi__sweep_size() never asks for more */
    if (nr < 1)
        nr = 1;
    const long nc = (long)p->n_chains;
    /* held[b]: the solved chain buffer b holds, -1 when free or being solved */
    long held[KPHI__SWEEP_RING_MAX];
    for (long b = 0; b < nr; b++)
        held[b] = -1;
#pragma omp parallel num_threads(p->threads)
    {
        int t = 0;
#ifdef _OPENMP
        t = omp_get_thread_num();
#endif
        for (;;) {
            sched_lock(&q);
            if (q.stop || q.next_emit >= nc) {
                sched_unlock(&q);
                break;
            }
            long b = q.next_emit % nr;
            if (!q.emitting && held[b] == q.next_emit) {
                /* (1) emit the next chain in grid order */
                long c = q.next_emit;
                q.emitting = 1;
                sched_unlock(&q);
                int e = p->emit(p->ctx, (size_t)c, (size_t)b);
                sched_lock(&q);
                held[b] = -1;
                q.next_emit = c + 1;
                q.emitting = 0;
                if (e != 0 && !q.stop) {
                    q.stop = 1;
                    q.rc = e;
                }
                sched_unlock(&q);
            } else if (q.next_claim < nc && q.next_claim < q.next_emit + nr) {
                /* (2) solve the next chain into its buffer */
                long c = q.next_claim++;
                sched_unlock(&q);
                p->solve(p->ctx, t, (size_t)c, (size_t)(c % nr));
                sched_lock(&q);
                held[c % nr] = c;
                sched_unlock(&q);
            } else {
                /* (3) wait for the emitter or a solver */
                sched_unlock(&q);
                idle();
            }
        }
    }
#ifdef _OPENMP
    omp_destroy_lock(&q.lock);
#endif
    return q.rc;
}

size_t kphi__sweep_chain_len(size_t asked, size_t n)
{
    size_t len = asked > 0 ? asked : 32;
    return len < n ? len : n;
}

void kphi__sweep_chain_points(size_t chain, size_t len, size_t total, size_t *k0, size_t *k1)
{
    *k0 = chain * len;
    *k1 = *k0 + len < total ? *k0 + len : total;
}
