/* Internal: what the sources of the sweep module share: src/sweep.c (equilibrium grids),
 * src/sweep_loop.c (loop grids), src/sweep_flash.c (flash grids) and src/sweep_sched.c
 * (the scheduler all three run on). Not part of the public API. */
#ifndef KPHI_SWEEP_INTERNAL_H
#define KPHI_SWEEP_INTERNAL_H

#include <stddef.h>

/* Chains each thread may have solved ahead of emission. */
enum { KPHI__SWEEP_RING_PER_THREAD = 4, KPHI__SWEEP_RING_MAX = 4096 };

/* A grid cut into n_chains chains, solved by `threads` threads into n_ring buffers and
 * emitted in chain order. The caller owns the buffers: chain c is solved into and emitted
 * from buffer c % n_ring, and solve() of thread t may use that thread's workspace. */
typedef struct {
    size_t n_chains;
    int threads;   /* >= 1 */
    size_t n_ring; /* 1 .. n_chains */
    void *ctx;
    void (*solve)(void *ctx, int thread, size_t chain, size_t buffer);
    int (*emit)(void *ctx, size_t chain, size_t buffer); /* nonzero: stop */
} kphi__sweep_plan;

/* The threads and ring of a grid of n_chains chains with `threads` asked for (0: all
 * cores): at most one thread per chain, KPHI__SWEEP_RING_PER_THREAD buffers per thread,
 * at most one buffer per chain, at most KPHI__SWEEP_RING_MAX. */
void kphi__sweep_size(size_t n_chains, int threads, int *n_threads, size_t *n_ring);

/* The points per warm-start chain: `asked` (kphi_sweep_options.chain), 32 when it is 0,
 * and at most n (the points there are to chain). */
size_t kphi__sweep_chain_len(size_t asked, size_t n);

/* The points [*k0, *k1) of chain `chain` when a grid of `total` points is cut into chains
 * of `len` consecutive points (the last one may be shorter). */
void kphi__sweep_chain_points(size_t chain, size_t len, size_t total, size_t *k0, size_t *k1);

/* Run the plan (src/sweep_sched.c): each thread repeatedly (1) emits the next chain in
 * order when it is solved and no other thread is emitting, else (2) claims the next
 * unsolved chain while the ring has room and solves it, else (3) sleeps briefly. Emission
 * is serialised and in chain order; solving overlaps it. Returns the first nonzero value
 * emit() returned (no chain is emitted after it), or 0. */
int kphi__sweep_schedule(const kphi__sweep_plan *p);

#endif /* KPHI_SWEEP_INTERNAL_H */
