/* Internal: what the sources of the eos module share: the mixture object, the
 * per-species constants and the workspace (src/eos.c: model names, set-up, ideal gas,
 * virial and the cubics; src/eos_bb.c: the Beattie-Bridgeman equation of state and its
 * second virial coefficient). Not part of the public API. */
#ifndef KPHI_EOS_INTERNAL_H
#define KPHI_EOS_INTERNAL_H

#include <stddef.h>

#include "kphi/eos.h"

/* The constants of one species, as used by the models. */
typedef struct {
    int set;              /* 1 once kphi_eos_set_species() filled the slot */
    int has_critical;     /* Tc, Pc, omega given */
    double Tc, Pc, omega; /* classical, K, Pa, - */
    double M;             /* molar mass, g/mol (quantum gases) */
    double Zc;            /* after the fallback rules, - */
    double vc13;          /* Vc^(1/3) after the fallback rules, (m3/mol)^(1/3) */
    double m;             /* alpha slope of SRK/PR */
    double sqa;           /* sqrt(Omega_a) R Tc/sqrt(Pc): sqrt(a_i) at alpha = 1 */
    double rstc;          /* 1/sqrt(Tc), K^-1/2 */
    double ob;            /* Omega_b Tc/Pc, K/Pa: b_i P/(R T) = ob P/T */
    int has_quantum;
    double q_Tc0, q_Pc0, q_c1, q_c2; /* K, Pa, K, K */
    int has_alpha;        /* 1: alpha below instead of the model's own */
    kphi_alpha_spec alpha;
    int has_bb;           /* Beattie-Bridgeman constants (bb, bbv), SI: */
    double bb_s;          /* sqrt(A0), (Pa m6)^1/2/mol */
    double bb_a, bb_B0, bb_b; /* m3/mol */
    double bb_c;          /* m3 K3/mol */
    double bb_B13;        /* B0^(1/3), for the Lorentz combination */
} kphi__eos_comp;

struct kphi_eos {
    kphi_eos_model model;
    size_t n;
    int quantum;
    int standard_alpha;      /* 1: ignore the species' alpha entries */
    double d1, d2;           /* the cubic's eps and sigma */
    double omega_a, omega_b; /* cubic constants */
    double zc_eos;           /* critical compressibility of the cubic */
    kphi__eos_comp *c;       /* [n] */
    double *kij;             /* [n*n] */
    double *omk;             /* [n*n] 1 - k_ij (at T_ref for a temperature-dependent k_ij) */
    double *kslope;          /* [n*n] d k_ij/dT, 1/K */
    double *kzero;           /* [n*n] k_ij extrapolated to T = 0 (k_ij(T) = kzero + kslope T) */
    int any_kij;             /* 1 when some k_ij != 0 */
    int any_kT;              /* 1 when some k_ij depends on T */
    size_t n_set;            /* slots filled by kphi_eos_set_species() */
    double *pfac;            /* [n*n] Pc_ij/Tc_ij of the virial combining rule, Pa/K */
    int bb_lorentz;          /* bb, bbv: B0 by Lorentz's rule instead of linearly */
};

struct kphi_eos_work {
    size_t n;
    double *block; /* one allocation holding everything below */
    double *s;     /* [n] sqrt(a_i) */
    double *t;     /* [n] T d sqrt(a_i)/dT */
    double *beta;  /* [n] b_i P/(R T) */
    double *tbeta; /* [n] (T db_i/dT) P/(R T) */
    double *S;     /* [n] sum_j y_j (1 - k_ij) sqrt(a_j) */
    double *abar;  /* [n] sum_j y_j a_ij P/(R T)^2 */
    double *p;     /* [n] reduced dP/dn_i */
    double *Tc;    /* [n] effective Tc at T */
    double *Pc;    /* [n] effective Pc at T */
    double *th;    /* [n] T dln Tc/dT */
    double *pi;    /* [n] T dln Pc/dT */
    double *bsum;  /* [n] sum_j y_j B_ij */
    double *yb;    /* [n] composition for kphi_eos_pure */
    double *lb;    /* [n] ln phi for kphi_eos_pure */
    double *Bij;   /* [n*n] virial B_ij, m3/mol; bb: the matrix of the A0 form */
    double *dBij;  /* [n*n] T dB_ij/dT, m3/mol; bb: the matrix of the Lorentz B0 form */
    double *omT;   /* [n*n] 1 - k_ij(T) for a temperature-dependent k_ij */
    double *e, *g, *h, *pq; /* [n] each: per-species terms of the cubic's derivative matrix */
    double *bbg;   /* [4n] Beattie-Bridgeman: the constants B0, b, a, c per species */
    double *bbu;   /* [7n] the weighted sums of the factor gradients (Hessian assembly) */
    double *bbq;   /* [2n] gradients of the quadratic factors (A0 and the Lorentz B0) */
    double *bbF;   /* [2n] d F/d n_i and d^2 F/d n_i d V of the residual Helmholtz energy */
};

/* Density limits, reduced by the pseudo-critical density 1/sum y_i Vc_i (Kay's rule):
 * the full Beattie-Bridgeman equation (bb) and its second-virial form (bbv); see the file
 * comment of src/eos_bb.c for the choice. */
#define KPHI__BB_RHO_R 1.0
#define KPHI__BB_RHO_R_SUB 0.5 /* bb below the pseudo-critical temperature */
#define KPHI__BBV_RHO_R 2.0

/* Beattie-Bridgeman (model bb) at T (K), P (Pa), mole fractions y: ln phi, the matrix
 * n_t d ln phi_i/d n_l (when dlnphi is not NULL) and the state (when st is not NULL).
 * KPHI_EFAILED beyond the equation's density range. Called by kphi_eos_eval_root() after
 * it checked T, P, y and the workspace. */
int kphi__eos_eval_bb(const kphi_eos *eos, double T, double P, const double y[],
                      double lnphi[], double dlnphi[], kphi_eos_state *st, kphi_eos_work *w,
                      kphi_error *err);

/* The second virial coefficient of the pair i, j from the Beattie-Bridgeman constants
 * (model bbv) at T (K): *B in m3/mol and *TdB = T dB/dT. */
void kphi__eos_bb_virial(const kphi_eos *eos, size_t i, size_t j, double T, double *B,
                         double *TdB);

/* 1 - k_ij at T for the pair i, j (the constant or the linear form of
 * kphi_eos_set_kij_linear()), and T d(1 - k_ij)/dT. */
double kphi__eos_omk(const kphi_eos *eos, size_t i, size_t j, double T, double *Tdomk);

#endif /* KPHI_EOS_INTERNAL_H */
