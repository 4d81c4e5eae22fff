/* Internal: the workspace of the phase module, shared by its sources: src/phase.c
 * (stability test, flash), src/phase_sat.c (dew and bubble points, vapour pressure) and
 * src/phase_rxn.c (chemical and phase equilibrium). Not part of the public API. */
#ifndef KPHI_PHASE_INTERNAL_H
#define KPHI_PHASE_INTERNAL_H

#include <stddef.h>

#include "kphi/eos.h"
#include "kphi/phase.h"

struct kphi_phase_work {
    size_t n, r;         /* capacities: species, reactions */
    kphi_eos_work *ew;
    double *block;       /* one allocation for every array below */
    size_t *act;         /* [n] indices of the components present */
    size_t na;           /* how many */
    double *z;           /* [n] feed mole fractions */
    double *d;           /* [n] ln z_i + ln phi_i(z) (stability test) */
    double *W;           /* [n] trial amounts */
    double *wn;          /* [n] normalised trial composition */
    double *lnphi;       /* [n] scratch ln phi */
    double *lnphi2;      /* [n] scratch ln phi */
    double *kw;          /* [n] Wilson K */
    double *lnK, *lnK1, *lnK2; /* [n] current and two earlier ln K (extrapolation) */
    double *x, *y;       /* [n] liquid and vapour mole fractions */
    double *lnphiL, *lnphiV; /* [n] */
    double *v, *l;       /* [n] vapour and liquid amounts */
    double *vt, *lt;     /* [n] trial amounts */
    double *JV, *JL;     /* [n*n] n_t d ln phi_i/d n_j of each phase */
    double *H;           /* [(n+r)^2] Hessian */
    double *g, *step, *sc; /* [n+r] gradient, step, scaling */
    double *trial;       /* [n] trial composition of the stability test */
    int feed_liquid;     /* the feed set by kphi__phase_feed() took a liquid-like root */
    kphi_eos_root trial_root; /* root of a trial phase in kphi__phase_stationary(): the
                              vapour one for a vapour-like trial, the liquid one for a
                              liquid-like trial; KPHI_EOS_ROOT_STABLE (the lower G) unless
                              a caller sets it for one search */
    double *tmp;         /* [n] scratch */
    /* chemical and phase equilibrium (src/phase_rxn.c) */
    double *nu;          /* [r*n] stoichiometry */
    double *g0;          /* [n] mu°/RT + ln(P/P°) per species, consistent with ln K */
    double *basis;       /* [r*r] free extent directions in columns 0..m-1 */
    double *nueff;       /* [r*n] basis^T nu */
    double *svd_a, *svd_v, *svd_s, *svd_w; /* [n*r], [r*r], [r], [r] */
    double *ntot, *ntot_t; /* [n] total amounts (current, trial) */
    double *eta;         /* [r] coordinates in the free directions */
    double *ngas;        /* [n] amounts at the start of the Newton iteration */
    double *JVt, *JLt;   /* [n*(n+r)] d v/d unknowns, d l/d unknowns */
    double *HJ;          /* [n*(n+r)] a phase Hessian times J */
    double *dvs;         /* [n] changes of the totals per unit Newton step */
    double *rho, *rho_t; /* [n] ln(v_i/l_i), current and trial */
    double *xi0;         /* [r] extents there */
};

/* Evaluate ln phi (and, when J is not NULL, n_t d ln phi/d n) of composition c (mole
 * fractions, the full vector; sums to 1) with the root of lower Gibbs energy. */
int kphi__phase_eval(const kphi_eos *eos, double T, double P, const double c[], double lnphi[],
                     double J[], kphi_eos_state *st, kphi_phase_work *w, kphi_error *err);

/* Wilson's (1968) K-value estimate of species i at T, P. */
double kphi__phase_wilson(const kphi_eos *eos, size_t i, double T, double P);

/* Wilson's K of every component present (w->kw; 0 for the others), and from it the trial
 * amounts W_i = z_i K_i (vapour-like) or z_i / K_i (liquid-like, `liquid` 1) of the feed set
 * up by kphi__phase_feed(), K kept within 1e-200..1e200 and W above 1e-300; W is 0 for
 * components absent from the feed. */
void kphi__phase_wilson_trial(const kphi_eos *eos, double T, double P, int liquid,
                              kphi_phase_work *w, double W[]);

/* Stationary point of the tangent-plane distance from the start W (amounts, [n], on the
 * active components of w), against d (w->d), with full convergence. On return W holds the
 * stationary point, *tm its distance, *lnsum ln sum W, *trivial 1 when it collapsed onto
 * the feed. */
int kphi__phase_stationary(const kphi_eos *eos, double T, double P, const double z[],
                           double W[], const kphi_phase_options *opt, kphi_phase_work *w,
                           int full, double *tm, double *lnsum, int *trivial, kphi_error *err);

/* Set w->z (normalised), w->act and w->na from z[n]; w->d from the feed's ln phi.
 * Errors: KPHI_EINPUT (negative, non-finite, all zero). *feed_liquid gets the feed
 * root's liquid_like flag. */
int kphi__phase_feed(const kphi_eos *eos, double T, double P, const double z[],
                     kphi_phase_work *w, int *feed_liquid, kphi_error *err);

/* Phase ph of an answer from composition c, its ln phi and EOS state (kind from the root),
 * holding `fraction` of the whole. */
void kphi__phase_fill(kphi_phase_state *ph, size_t n, const double c[], const double lnphi[],
                      const kphi_eos_state *st, double fraction);

/* out as one phase of composition c at T, P (K NaN, no second phase, no residual); the
 * caller sets iterations and tm_min. */
void kphi__phase_one(kphi_flash_result *out, size_t n, double T, double P, const double c[],
                     const double lnphi[], const kphi_eos_state *st);

/* Fill out as one phase of composition w->z (with the root of lower Gibbs energy). */
int kphi__phase_single(const kphi_eos *eos, double T, double P, kphi_phase_work *w,
                       kphi_flash_result *out, kphi_error *err);

/* Flash of the composition already set up by kphi__phase_feed(), starting from ln K on
 * the active components (w->lnK). Fills out. Returns KPHI__PHASE_ONE (no error recorded)
 * when the iteration settles on one phase (every K on one side of 1, or beta outside
 * (0, 1)). */
#define KPHI__PHASE_ONE (-1)
int kphi__phase_split(const kphi_eos *eos, double T, double P, const kphi_phase_options *opt,
                      kphi_phase_work *w, kphi_flash_result *out, kphi_error *err);

/* Cholesky solve of the symmetric m x m system H s = -g with diagonal scaling and, when
 * H is not positive definite, a growing shift. H is overwritten. */
int kphi__phase_newton_solve(double *H, const double *g, double *s, double *sc, size_t m);

/* The least tangent-plane distance of nearly pure trial phases from the tangent plane of
 * the phase y (a phase of a converged split): below -tol_tm a third phase forms. */
int kphi__phase_third_phase(const kphi_eos *eos, double T, double P, const double y[],
                            const kphi_phase_options *opt, kphi_phase_work *w, double *tm,
                            kphi_error *err);

#endif /* KPHI_PHASE_INTERNAL_H */
