/* Internal: the workspace of the equil module, shared by its sources: src/equil.c
 * (the minimiser: set, iterate, test, get, solve), src/equil_start.c (which species the
 * feed cannot form, the free directions and a strictly interior starting point) and
 * src/equil_k.c (the K of each reaction from the chosen basis).
 * src/equil_result.c uses the public API only; src/equil_energy.c borrows the trial-point
 * arrays (y_try, lnphi_try) and the EOS workspace as scratch between steps. Not part of
 * the public API. */
#ifndef KPHI_EQUIL_INTERNAL_H
#define KPHI_EQUIL_INTERNAL_H

#include <stddef.h>

#include "kphi/eos.h"
#include "kphi/equil.h"
#include "kphi/error.h"
#include "kphi/rxnset.h"

struct kphi_equil_work {
    size_t cap_s, cap_r; /* capacities from alloc */

    /* the problem, from kphi_equil_set() */
    const kphi_rxnset *set;
    const kphi_eos *eos;
    size_t s, r, m; /* species, reactions, free directions (m <= r) */
    double T, P, lnP;
    double *n0;     /* [s] */
    double *lnn0;   /* [s] ln n0 of species in no reaction (their amount never changes) */
    double *g0;     /* g°/RT [s] from the polynomials (kept between solves, see set_g0()) */
    double *g0k;    /* [s] g°/RT shifted so that the reactions have the chosen K */
    const double *mu0; /* g0, or g0k when some K comes from a correlation */
    double *lnK;    /* [r] the K used */
    double *dlnK;   /* [r] ln K_tables - ln K, then the shift c (src/equil_k.c) */
    double *kmat;   /* [r*r] Cholesky factor of nu nu^T (src/equil_k.c) */
    size_t *kbasis; /* [r] basis of each K (KPHI_K_TABLES or the options' basis) */
    int *kout;      /* [r] 1 when T is outside that correlation's range */
    double *nu;     /* [r*s] */
    double *basis;  /* [r*r]: columns 0..m-1 span the free extent directions */
    double *nueff;  /* [r*s]: rows 0..m-1, basis^T nu */
    int *held;      /* [s] species held at zero */
    int *in_rxn;    /* [s] species in some reaction */
    int *pattern;   /* [s] zero pattern of the last feed (to reuse the basis) */
    const kphi_rxnset *pattern_set;
    size_t *sup;    /* [s] species moved by some free direction (nonzero column of nueff) */
    size_t nsup;
    double *nusum;  /* [r] sum_i nueff[k][i] */
    double *g0key;  /* [s * G0KEY] the thermo data g0 was computed from (set_g0()) */
    double g0T;     /* the temperature of g0; NaN when g0 is not valid */
    size_t g0n;     /* g0 and g0key are valid for species 0 .. g0n-1 at g0T */
    double *Jb;     /* [r*s] J nueff_l on the support, for the Hessian */

    /* the state */
    double *n, *y, *lnphi, *mu, *xi; /* [s], [s], [s], [s], [r] */
    double nt, G;
    double *grad;   /* [r] gradient in the free directions */
    double *aff;    /* [r] affinities of the written reactions */
    kphi_eos_state st;
    int iter;
    int have_state;

    /* scratch */
    double *J;      /* [s*s] EOS composition derivatives at the current state */
    double *J_try;  /* [s*s] the same at the trial point; swapped with J on acceptance */
    int have_J;     /* J is current */
    int use_eos;    /* the model is not the ideal gas (J and its Hessian term are used) */
    int frozen;     /* frozen-phi phase: ln phi stays at lnphi0, the ideal Hessian is exact */
    double *lnphi0; /* [s] ln phi at the cold start */
    double *H;      /* [r*r] */
    double *sc;     /* [r] Hessian scaling */
    double *step;   /* [r] */
    double *dn;     /* [s] */
    double *nt_try, *y_try, *lnphi_try, *mu_try; /* [s] each */
    double *xi_try; /* [r] */
    double *svd_a, *svd_v, *svd_s, *svd_w; /* [max(s,r)*r], [r*r], [r], [r] */
    double *qr, *tau; /* [(s+1)*r], [r]: factor form of the ideal Hessian */
    /* local basis of the free directions for one step (see rebase()) */
    double *rows;   /* [r*s] T nueff */
    double *rsum;   /* [r] T nusum */
    double *tmat;   /* [r*r] T */
    double *gl;     /* [r] T grad */
    double *aug;    /* [r*2r] Gauss-Jordan scratch */
    double *gsq;    /* [r*r] Gram-Schmidt scratch */
    size_t *order;  /* [s] support species by amount */
    double moved;   /* largest |dn_i|/n_i of the last accepted step */
    double *tab;    /* simplex tableau [(s+1) * (2r + s + 2)] */
    size_t *bvar;   /* [s+1] basic variable of each tableau row */
    double *dirs;   /* [s*r] feasible directions found while clearing held species */
    size_t ndirs;
    kphi_eos_work *ew;
    /* the last trial point the EOS refused (outside its range) and the Newton step it
     * happened in (-1: none since kphi_equil_set()); when the iteration then stalls
     * against that limit, this is the reason given */
    kphi_error trial_err;
    int trial_err_iter;
};

/* Decide which species the feed cannot form (held at zero), the free directions (basis,
 * nueff, sup, nusum) and a strictly interior starting point (w->xi, w->n), from w->set,
 * w->nu, w->n0 and w->in_rxn as set by kphi_equil_set(). The LP and the basis are kept
 * for the next call with the same set and zero pattern of the feed. Allocates nothing.
 * Errors: KPHI_EFAILED (SVD failure, or no starting composition). In src/equil_start.c. */
int kphi__equil_find_start(kphi_equil_work *w, kphi_error *err);

/* The K of each reaction in basis b of w->set at w->T: w->lnK holds the tables' ln K on
 * entry and the chosen one on return; w->mu0 points at the standard chemical potentials
 * to minimise with (w->g0, or w->g0k shifted by nu^T c with (nu nu^T) c = dlnK, which
 * changes every affinity by exactly -dlnK_j and nothing else); w->kbasis and w->kout say
 * where each K came from. Allocates nothing. Errors: KPHI_EINPUT (no basis b in the set),
 * KPHI_EFAILED (nu nu^T not positive definite: dependent reactions). In src/equil_k.c. */
int kphi__equil_set_K(kphi_equil_work *w, size_t b, kphi_error *err);

#endif /* KPHI_EQUIL_INTERNAL_H */
