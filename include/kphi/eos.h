/* kphi eos: equations of state for gas mixtures: compressibility, fugacity coefficients,
 * their composition derivatives, and departure functions.
 *
 * Models: ideal gas; truncated virial (second coefficient from the Tsonopoulos 1974
 * correlation with published combining rules); and the generic two-parameter cubic
 *   P = RT/(v - b) - a(T)/((v + eps b)(v + sig b))
 * as Redlich-Kwong (1949), Soave-Redlich-Kwong (Soave 1972) and Peng-Robinson (1976,
 * with the 1978 alpha function for omega > 0.491). Van der Waals one-fluid mixing with
 * binary k_ij. The gas is the largest real root; when a smaller (liquid-like) root has a
 * lower Gibbs energy the state carries a warning. Optional effective critical constants
 * for quantum gases (H2, He, Ne) after Prausnitz, Lichtenthaler & de Azevedo.
 * The Beattie-Bridgeman (1928) equation of state with Beattie's combination rules (bb),
 * explicit in P with the molar volume, for gases up to the critical density; and its
 * second virial coefficient alone in the pressure form (bbv), the approximation Gillespie
 * & Beattie (1930) used for the ammonia equilibrium. Both need each species'
 * Beattie-Bridgeman constants; neither has a liquid root.
 * SI throughout: T in K, P in Pa, energies J/mol. */
#ifndef KPHI_EOS_H
#define KPHI_EOS_H

#include <stddef.h>

#include "kphi/error.h"
#include "kphi/species.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef enum {
    KPHI_EOS_IDEAL = 0,
    KPHI_EOS_VIRIAL,
    KPHI_EOS_RK,
    KPHI_EOS_SRK,
    KPHI_EOS_PR,
    KPHI_EOS_BB,  /* Beattie-Bridgeman (1928), gas only, to the critical density */
    KPHI_EOS_BBV, /* its second virial coefficient: Gillespie & Beattie's (1930) form */
    KPHI_EOS_N_MODELS
} kphi_eos_model;

/* "ideal", "virial", "rk", "srk", "pr", "bb", "bbv". Borrowed, static. */
const char *kphi_eos_model_name(kphi_eos_model model);

/* Display title with the published source, "Peng-Robinson (1976/1978)". Borrowed. */
const char *kphi_eos_model_title(kphi_eos_model model);

/* Parse a model name (case-insensitive). KPHI_EINPUT with "did you mean" for unknown
 * names; path/at locate the text in its input. */
int kphi_eos_model_parse(const char *text, kphi_eos_model *model, const char *path,
                         kphi_mark at, kphi_error *err);

/* 1 when the model needs critical constants (all but ideal). */
int kphi_eos_model_needs_critical(kphi_eos_model model);

/* A mixture model: the species' constants, k_ij, and options. Opaque. */
typedef struct kphi_eos kphi_eos;

/* Caller frees with kphi_eos_free(). NULL when out of memory. All k_ij start at 0 and
 * quantum-gas constants start switched off. */
kphi_eos *kphi_eos_alloc(kphi_eos_model model, size_t n_species);
void kphi_eos_free(kphi_eos *eos); /* NULL is allowed */

kphi_eos_model kphi_eos_get_model(const kphi_eos *eos);
size_t kphi_eos_size(const kphi_eos *eos);

/* Copy the constants of species sp into slot i. KPHI_EINPUT when the model needs
 * critical constants and sp has none (message names the species and sp->path:mark). */
int kphi_eos_set_species(kphi_eos *eos, size_t i, const kphi_species *sp, kphi_error *err);

/* Binary interaction parameter, symmetric: sets k_ij and k_ji (independent of T). */
void kphi_eos_set_kij(kphi_eos *eos, size_t i, size_t j, double kij);
/* The same with a linear temperature dependence, k_ij(T) = kij + dkdT (T - T_ref), T and
 * T_ref in K; its derivative enters the departure enthalpy. */
void kphi_eos_set_kij_linear(kphi_eos *eos, size_t i, size_t j, double kij, double dkdT,
                             double T_ref);
/* k_ij as set (at T_ref for a temperature-dependent one), and k_ij at T (K). */
double kphi_eos_get_kij(const kphi_eos *eos, size_t i, size_t j);
double kphi_eos_get_kij_at(const kphi_eos *eos, size_t i, size_t j, double T);

/* Switch the quantum-gas effective critical constants on (1) or off (0). Species
 * without such constants keep their classical ones. */
void kphi_eos_set_quantum(kphi_eos *eos, int on);

/* Scratch memory for one evaluation at a time; one per thread. */
typedef struct kphi_eos_work kphi_eos_work;
kphi_eos_work *kphi_eos_work_alloc(size_t n_species); /* NULL when out of memory */
void kphi_eos_work_free(kphi_eos_work *w);            /* NULL is allowed */

/* What an evaluation returns besides ln phi. */
typedef struct {
    double Z;           /* compressibility factor of the gas root, - */
    double h_dep;       /* H - H_ig at T, P, J/mol */
    double g_dep;       /* G - G_ig at T, P, J/mol */
    double s_dep;       /* S - S_ig at T, P, J/(mol K) */
    double v;           /* molar volume of the chosen root, m3/mol */
    int n_roots;        /* real cubic roots with v > b (1 for ideal and virial) */
    int may_condense;   /* gas root only: 1 when a liquid-like root has the lower Gibbs
                           energy (a hint; the phase module's stability test decides) */
    int liquid_like;    /* 1 when the chosen root is the liquid-like one: the smallest of
                           three distinct roots, or a single dense root (Z below the
                           cubic's critical Z and T below the pseudo-critical T of Kay's
                           rule, common practice) */
} kphi_eos_state;

/* Which root of a cubic an evaluation takes. Ideal gas and virial have one root. */
typedef enum {
    KPHI_EOS_ROOT_GAS = 0, /* the largest (vapour-like) root: the gas-only solve */
    KPHI_EOS_ROOT_LIQUID,  /* the smallest root with v > b (liquid-like when there are
                              three; the only root otherwise) */
    KPHI_EOS_ROOT_STABLE   /* of the two, the one with the lower Gibbs energy */
} kphi_eos_root;

/* Evaluate the mixture of mole fractions y[n] (sum 1, all >= 0) at T (K) and P (Pa).
 * Writes lnphi[n]; when dlnphi is not NULL also the n*n row-major matrix
 *   dlnphi[i*n + l] = n_t * d(ln phi_i)/d(n_l)   (T, P and the other n fixed),
 * which is symmetric and depends on y only; when state is not NULL also Z and the
 * departure functions. No allocation. Errors: KPHI_EFAILED (no physical root, e.g. the
 * pressure lies beyond the covolume, the virial series is outside its range (Z < 0.5),
 * or the Beattie-Bridgeman density beyond its range); the message says which. */
int kphi_eos_eval(const kphi_eos *eos, double T, double P, const double y[], double lnphi[],
                  double dlnphi[], kphi_eos_state *state, kphi_eos_work *w, kphi_error *err);

/* Same, with the root chosen by `root`; kphi_eos_eval() is root KPHI_EOS_ROOT_GAS. */
int kphi_eos_eval_root(const kphi_eos *eos, kphi_eos_root root, double T, double P,
                       const double y[], double lnphi[], double dlnphi[], kphi_eos_state *state,
                       kphi_eos_work *w, kphi_error *err);

/* Pure-component convenience: Z and ln phi of species i alone. */
int kphi_eos_pure(const kphi_eos *eos, size_t i, double T, double P, double *Z, double *lnphi,
                  kphi_eos_work *w, kphi_error *err);

/* Critical constants actually used for species i at T (effective ones for quantum
 * gases when switched on). Tc in K, Pc in Pa. */
void kphi_eos_critical(const kphi_eos *eos, size_t i, double T, double *Tc, double *Pc);

/* bb and bbv: combine B0 by Lorentz's rule, B0_ij = ((B0_i^1/3 + B0_j^1/3)/2)^3, instead
 * of linearly (on = 1); the default (0) is Beattie's linear combination. */
void kphi_eos_set_bb_lorentz(kphi_eos *eos, int on);

/* Use the model's own alpha function for every species (on = 1), ignoring the alpha
 * entries of the species data; by default (0) a species whose data carry an alpha for
 * this model (e.g. Mathias-Copeman constants for NH3, CH3OH, H2O with PR) uses it.
 * Call before kphi_eos_set_species(). */
void kphi_eos_set_standard_alpha(kphi_eos *eos, int on);

/* The alpha function species i uses when it is not the model's own: a borrowed copy of
 * the species data's entry (valid while eos lives), or NULL. */
const kphi_alpha_spec *kphi_eos_alpha(const kphi_eos *eos, size_t i);

/* The slope m(omega) of the model's own alpha^1/2 = 1 + m (1 - Tr^1/2): Soave (1972)
 * for SRK, Peng & Robinson (1976; 1978 above omega = 0.491) for PR; 0 for other models. */
double kphi_eos_alpha_slope(kphi_eos_model model, double omega);

/* Acentric factor of species i (0 when the slot has no critical constants). */
double kphi_eos_acentric(const kphi_eos *eos, size_t i);

#ifdef __cplusplus
}
#endif
#endif /* KPHI_EOS_H */
