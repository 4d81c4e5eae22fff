/* kphi eos: equations of state for gas mixtures (compressibility, fugacity coefficients,
 * their composition derivatives, departure functions).
 *
 * Units: T in K, P in Pa, molar volumes in m3/mol, energies in J/mol, R = KPHI_R.
 *
 * Ideal gas: Z = 1, ln phi_i = 0, all departures 0.
 *
 * Truncated virial (pressure form), Z = 1 + B P/(R T), with B = sum_i sum_j y_i y_j B_ij,
 *   ln phi_i = (2 sum_j y_j B_ij - B) P/(R T),
 *   n_t d ln phi_i/d n_l = 2 (B_il - sum_j y_j B_ij - sum_j y_j B_lj + B) P/(R T),
 *   G - G_ig = B P,  H - H_ig = P (B - T dB/dT),  S - S_ig = -P dB/dT
 * (Prausnitz, Lichtenthaler & de Azevedo 1999, ch. 5; Poling, Prausnitz & O'Connell 2001,
 * chs. 4-6). The series is used only while Z >= 0.5; below that it fails (KPHI_EFAILED).
 * B_ij from the nonpolar form of the Tsonopoulos (1974) correlation, AIChE J. 20, 263:
 *   B_ij Pc_ij/(R Tc_ij) = f0(Tr) + omega_ij f1(Tr),  Tr = T/Tc_ij,
 *   f0 = 0.1445 - 0.330/Tr - 0.1385/Tr^2 - 0.0121/Tr^3 - 0.000607/Tr^8,
 *   f1 = 0.0637 + 0.331/Tr^2 - 0.423/Tr^3 - 0.008/Tr^8.
 * The polar term of Tsonopoulos (a/Tr^6 - b/Tr^8) is not included: its a and b are
 * class-specific and the species records do not carry them.
 * Combining rules (Tsonopoulos 1974; Prausnitz et al. 1999, ch. 5; Poling et al. 2001,
 * ch. 5; chapter numbers from memory): Tc_ij = sqrt(Tc_i Tc_j)(1 - k_ij),
 * omega_ij = (omega_i + omega_j)/2,
 * Pc_ij = Zc_ij R Tc_ij / Vc_ij with Zc_ij = (Zc_i + Zc_j)/2 and
 * Vc_ij = ((Vc_i^(1/3) + Vc_j^(1/3))/2)^3, i.e. Pc_ij = 4 R Tc_ij (Zc_i + Zc_j) /
 * (Vc_i^(1/3) + Vc_j^(1/3))^3. For i = j the species' own Tc and Pc are used.
 * When a species lacks Vc or Zc: Zc = Pc Vc/(R Tc) if only Vc is given, Vc = Zc R Tc/Pc if
 * only Zc is given, and with neither Zc = 0.291 - 0.080 omega (the corresponding-states
 * relation of Pitzer et al. 1955, as quoted in Reid, Prausnitz & Poling 1987, ch. 2; from
 * memory) and Vc = Zc R Tc/Pc.
 *
 * Generic two-parameter cubic (Poling et al. 2001, sec. 4-6 and Table 4-6, from memory;
 * Michelsen & Mollerup 2007, ch. 3):
 *   P = R T/(v - b) - a(T)/((v + d1 b)(v + d2 b)),
 *   RK (Redlich & Kwong 1949):  d1 = 1, d2 = 0, Omega_a = 0.42748, Omega_b = 0.08664,
 *                               alpha = Tr^-1/2;
 *   SRK (Soave 1972):           d1 = 1, d2 = 0, same Omegas,
 *                               alpha = [1 + m (1 - Tr^1/2)]^2,
 *                               m = 0.480 + 1.574 w - 0.176 w^2;
 *   PR (Peng & Robinson 1976):  d1 = 1 + sqrt 2, d2 = 1 - sqrt 2, Omega_a = 0.45724,
 *                               Omega_b = 0.07780, alpha as SRK with
 *                               m = 0.37464 + 1.54226 w - 0.26992 w^2 (w <= 0.491) and
 *                               m = 0.379642 + 1.48503 w - 0.164423 w^2 + 0.016666 w^3
 *                               (w > 0.491; Robinson & Peng 1978, GPA RR-28, from memory).
 *   a_i = Omega_a R^2 Tc^2/Pc alpha(T/Tc), b_i = Omega_b R Tc/Pc.
 * For SRK and PR sqrt(a_i) is taken with the signed alpha^1/2 = 1 + m (1 - Tr^1/2), the
 * form in which Soave (1972) and Peng & Robinson (1976) write the temperature function.
 * It changes sign above Tr = (1 + 1/m)^2 (N2 near 1390 K, CO near 1410 K, Ar near 2030 K),
 * where alpha = (alpha^1/2)^2 has passed through zero and rises again, outside the range
 * the function was fitted for. With |alpha^1/2| instead, sqrt(a_i a_j) of a mixture would
 * have a kink in T there and the departure enthalpy a jump (found by the random adiabatic
 * beds of tests/test_property.c); with the signed form a(T) stays smooth. Below that
 * temperature the two are the same.
 * Van der Waals one-fluid mixing: a = sum sum y_i y_j sqrt(a_i a_j)(1 - k_ij),
 * b = sum y_i b_i. With A = a P/(RT)^2, B = b P/(RT) the cubic in Z is
 *   Z^3 + ((d1+d2-1)B - 1) Z^2 + (A + d1 d2 B^2 - (d1+d2)(B + B^2)) Z
 *       - (A B + d1 d2 (B^2 + B^3)) = 0,
 * solved by Newton's method from Z = 1 + B, an upper bound on the gas root, with the other
 * two roots from the deflated quadratic, and by gsl_poly_solve_cubic plus Newton polishing
 * whenever that fast path is in doubt (see cubic_roots()). The gas is the largest real
 * root with Z > B. With three roots above B, the smallest (liquid-like) one is
 * compared by its Gibbs energy; may_condense is set when it is lower.
 *   ln phi_i = (b_i/b)(Z - 1) - ln(Z - B)
 *              - A/(B (d1 - d2)) (2 sum_j y_j a_ij/a - b_i/b) ln((Z + d1 B)/(Z + d2 B))
 * (the generic-cubic form of Poling et al. 2001, ch. 6, and Michelsen & Mollerup 2007,
 * ch. 3).
 * Composition derivatives follow Michelsen & Mollerup (2007), chs. 2-3: with the reduced
 * residual Helmholtz energy F(n, T, V) = A_res/(R T) = -n ln(1 - B/V) - D(T)/(R T) f(V, B),
 * B = sum n_i b_i, D = sum sum n_i n_j a_ij, f = ln((V + d1 B)/(V + d2 B))/((d1 - d2) B),
 *   n_t d ln phi_i/d n_j |_(T,P) = n_t F_ij + 1 + n_t (dP/dn_i)(dP/dn_j)/(R T dP/dV).
 * All of it is evaluated in reduced form (n_t = 1, V = Z, b_i -> b_i P/(RT),
 * a_ij -> a_ij P/(RT)^2); the matrix is symmetric and sum_i y_i (row i) = 0.
 * Departure functions at T, P (Poling et al. 2001, ch. 6):
 *   (G - G_ig)/(RT) = Z - 1 - ln(Z - B) - A/(B (d1 - d2)) L,
 *   (H - H_ig)/(RT) = Z - 1 - T (dF/dT)_(V,n),  (S - S_ig) = (H - G)/T,
 * with da/dT analytic (and, for quantum gases, the temperature dependence of the
 * effective Tc and Pc included).
 *
 * Quantum gases (Prausnitz, Lichtenthaler & de Azevedo 1999, ch. 5, after Gunn, Chueh &
 * Prausnitz 1966; from memory): when switched on, species with quantum constants use
 *   Tc = Tc0/(1 + c1/(M T)),  Pc = Pc0/(1 + c2/(M T)),  M in g/mol,
 * in every model, with the species' own omega (their Vc and Zc stay as given, so the
 * virial cross Pc_ij follows the effective Tc_ij only). Note: these constants improve the
 * virial B of H2 markedly; the cubics' alpha functions were fitted with classical
 * constants and do better without them (see tests/validation_eos.c).
 *
 * Evaluation never allocates; all per-call state lives in kphi_eos_work. A PR evaluation of
 * five species with the derivative matrix costs about 1.5k instructions; the per-species
 * a_i(T) needs no transcendental function but one sqrt(T) per call, so it is recomputed
 * rather than cached per T (a cache in the workspace would need a key that survives an
 * eos being freed and another allocated at the same address, and checking it would cost
 * about as much). */
#include "kphi/eos.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_poly.h>

#include "eos_internal.h"
#include "internal.h"
#include "kphi/thermo.h"

static const char *const model_names[KPHI_EOS_N_MODELS] = {"ideal", "virial", "rk", "srk",
                                                           "pr",    "bb",     "bbv"};

static const kphi_mark no_mark = {0, 0};

#define SQRT2 1.41421356237309504880

/* ---------------------------------------------------------------- model names --- */

const char *kphi_eos_model_name(kphi_eos_model model)
{
    if ((int)model < 0 || model >= KPHI_EOS_N_MODELS)
        return "unknown";
    return model_names[model];
}

const char *kphi_eos_model_title(kphi_eos_model model)
{
    static const char *const titles[KPHI_EOS_N_MODELS] = {
        "ideal gas",
        "virial (Tsonopoulos 1974)",
        "Redlich-Kwong (1949)",
        "Soave-Redlich-Kwong (1972)",
        "Peng-Robinson (1976/1978)",
        "Beattie-Bridgeman (1928)",
        "Beattie-Bridgeman second virial (Gillespie & Beattie 1930)"};
    if ((int)model < 0 || model >= KPHI_EOS_N_MODELS)
        return "unknown";
    return titles[model];
}

static int same_nocase(const char *a, const char *b)
{
    for (;; a++, b++) {
        int ca = (unsigned char)*a, cb = (unsigned char)*b;
        if (ca >= 'A' && ca <= 'Z')
            ca += 'a' - 'A';
        if (cb >= 'A' && cb <= 'Z')
            cb += 'a' - 'A';
        if (ca != cb)
            return 0;
        if (ca == '\0')
            return 1;
    }
}

/* "ideal, virial, rk, srk, pr, bb, bbv": the names of the table, for messages. */
static const char *model_list(char *buf, size_t size)
{
    size_t used = 0;
    buf[0] = '\0';
    for (int k = 0; k < KPHI_EOS_N_MODELS && used < size; k++) {
        int m = snprintf(buf + used, size - used, "%s%s", k ? ", " : "", model_names[k]);
        if (m < 0)
            break;
        used += (size_t)m;
    }
    return buf;
}

int kphi_eos_model_parse(const char *text, kphi_eos_model *model, const char *path,
                         kphi_mark at, kphi_error *err)
{
    char list[96];
    model_list(list, sizeof list);
    if (text == NULL || text[0] == '\0')
        return kphi_error_set(err, KPHI_EINPUT, path, at,
                              "missing equation of state (expected one of: %s)", list);
    for (int k = 0; k < KPHI_EOS_N_MODELS; k++) {
        if (same_nocase(text, model_names[k])) {
            if (model != NULL)
                *model = (kphi_eos_model)k;
            return KPHI_OK;
        }
    }
    const char *near = kphi__closest(text, model_names, KPHI_EOS_N_MODELS);
    if (near != NULL)
        return kphi_error_set(err, KPHI_EINPUT, path, at,
                              "unknown equation of state '%.40s'; did you mean '%s'? "
                              "(expected one of: %s)",
                              text, near, list);
    return kphi_error_set(err, KPHI_EINPUT, path, at,
                          "unknown equation of state '%.40s' (expected one of: %s)", text,
                          list);
}

int kphi_eos_model_needs_critical(kphi_eos_model model)
{
    return model != KPHI_EOS_IDEAL;
}

/* ------------------------------------------------------------- object set-up --- */

kphi_eos *kphi_eos_alloc(kphi_eos_model model, size_t n_species)
{
    if ((int)model < 0 || model >= KPHI_EOS_N_MODELS)
        return NULL;
    size_t n = n_species;
    size_t nn = n * n;
    if (n != 0 && nn / n != n)
        return NULL;
    kphi_eos *eos = calloc(1, sizeof *eos);
    if (eos == NULL)
        return NULL;
    eos->model = model;
    eos->n = n;
    eos->c = calloc(n > 0 ? n : 1, sizeof *eos->c);
    eos->kij = calloc(nn > 0 ? nn : 1, sizeof *eos->kij);
    eos->omk = calloc(nn > 0 ? nn : 1, sizeof *eos->omk);
    eos->kslope = calloc(nn > 0 ? nn : 1, sizeof *eos->kslope);
    eos->kzero = calloc(nn > 0 ? nn : 1, sizeof *eos->kzero);
    eos->pfac = calloc(nn > 0 ? nn : 1, sizeof *eos->pfac);
    if (eos->c == NULL || eos->kij == NULL || eos->omk == NULL || eos->pfac == NULL ||
        eos->kslope == NULL || eos->kzero == NULL) {
        kphi_eos_free(eos);
        return NULL;
    }
    for (size_t k = 0; k < nn; k++)
        eos->omk[k] = 1.0;
    switch (model) {
    case KPHI_EOS_RK:
    case KPHI_EOS_SRK:
        /* Poling et al. 2001, Table 4-6 (from memory) */
        eos->d1 = 1.0;
        eos->d2 = 0.0;
        eos->omega_a = 0.42748;
        eos->omega_b = 0.08664;
        eos->zc_eos = 1.0 / 3.0;
        break;
    case KPHI_EOS_PR:
        /* Peng & Robinson 1976 (from memory) */
        eos->d1 = 1.0 + SQRT2;
        eos->d2 = 1.0 - SQRT2;
        eos->omega_a = 0.45724;
        eos->omega_b = 0.07780;
        eos->zc_eos = 0.3074;
        break;
    default:
        break;
    }
    return eos;
}

void kphi_eos_free(kphi_eos *eos)
{
    if (eos == NULL)
        return;
    free(eos->c);
    free(eos->kij);
    free(eos->omk);
    free(eos->kslope);
    free(eos->kzero);
    free(eos->pfac);
    free(eos);
}

kphi_eos_model kphi_eos_get_model(const kphi_eos *eos)
{
    return eos->model;
}

size_t kphi_eos_size(const kphi_eos *eos)
{
    return eos->n;
}

/* Alpha slope m(omega) of SRK and PR. */
static double alpha_slope(kphi_eos_model model, double w)
{
    if (model == KPHI_EOS_SRK)
        return 0.480 + w * (1.574 - 0.176 * w); /* Soave 1972 */
    if (model == KPHI_EOS_PR) {
        if (w > 0.491) /* Robinson & Peng 1978 */
            return 0.379642 + w * (1.48503 + w * (-0.164423 + w * 0.016666));
        return 0.37464 + w * (1.54226 - 0.26992 * w); /* Peng & Robinson 1976 */
    }
    return 0.0;
}

/* Pc_ij/Tc_ij of the virial combining rule for the pair i, j (both set). */
static void update_pfac(kphi_eos *eos, size_t i)
{
    size_t n = eos->n;
    const kphi__eos_comp *ci = &eos->c[i];
    for (size_t j = 0; j < n; j++) {
        const kphi__eos_comp *cj = &eos->c[j];
        double f = 0.0;
        if (ci->set && cj->set && ci->has_critical && cj->has_critical) {
            double v = ci->vc13 + cj->vc13;
            f = 4.0 * KPHI_R * (ci->Zc + cj->Zc) / (v * v * v);
        }
        eos->pfac[i * n + j] = f;
        eos->pfac[j * n + i] = f;
    }
}

int kphi_eos_set_species(kphi_eos *eos, size_t i, const kphi_species *sp, kphi_error *err)
{
    if (i >= eos->n)
        return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark,
                              "species slot %zu is out of range (the mixture has %zu)", i,
                              eos->n);
    const char *name = sp->name;
    const char *path = sp->path;
    kphi_mark at = sp->mark;
    int needs = kphi_eos_model_needs_critical(eos->model);
    kphi__eos_comp c;
    memset(&c, 0, sizeof c);
    c.M = sp->molar_mass * 1000.0;

    if (needs && !sp->has_critical)
        return kphi_error_set(err, KPHI_EINPUT, path, at,
                              "species '%s' has no critical constants (Tc, Pc, omega), which "
                              "the '%s' equation of state needs",
                              name, kphi_eos_model_name(eos->model));
    if (sp->has_critical) {
        if (!(isfinite(sp->Tc) && sp->Tc > 0.0))
            return kphi_error_set(err, KPHI_EINPUT, path, at,
                                  "species '%s': critical temperature %g K is not positive",
                                  name, sp->Tc);
        if (!(isfinite(sp->Pc) && sp->Pc > 0.0))
            return kphi_error_set(err, KPHI_EINPUT, path, at,
                                  "species '%s': critical pressure %g Pa is not positive", name,
                                  sp->Pc);
        if (!isfinite(sp->omega))
            return kphi_error_set(err, KPHI_EINPUT, path, at,
                                  "species '%s': acentric factor is not a number", name);
        if (!(isfinite(sp->Vc) && sp->Vc >= 0.0) || !(isfinite(sp->Zc) && sp->Zc >= 0.0))
            return kphi_error_set(err, KPHI_EINPUT, path, at,
                                  "species '%s': Vc and Zc must be >= 0 (0 when not given)",
                                  name);
        c.has_critical = 1;
        c.Tc = sp->Tc;
        c.Pc = sp->Pc;
        c.omega = sp->omega;
        double Zc = sp->Zc, Vc = sp->Vc;
        if (Vc > 0.0 && Zc <= 0.0)
            Zc = c.Pc * Vc / (KPHI_R * c.Tc);
        else if (Zc <= 0.0)
            Zc = 0.291 - 0.080 * c.omega; /* Pitzer et al. 1955 (from memory) */
        if (Vc <= 0.0)
            Vc = Zc * KPHI_R * c.Tc / c.Pc;
        if (!(Zc > 0.0))
            return kphi_error_set(err, KPHI_EINPUT, path, at,
                                  "species '%s': no usable critical compressibility (Zc = "
                                  "%g)",
                                  name, Zc);
        c.Zc = Zc;
        c.vc13 = cbrt(Vc);
        c.m = alpha_slope(eos->model, c.omega);
        for (size_t k = 0; k < sp->n_alpha && !eos->standard_alpha; k++) {
            if (strcmp(sp->alpha[k].model, kphi_eos_model_name(eos->model)) == 0) {
                c.has_alpha = 1;
                c.alpha = sp->alpha[k];
            }
        }
        c.sqa = sqrt(eos->omega_a) * KPHI_R * c.Tc / sqrt(c.Pc);
        c.rstc = 1.0 / sqrt(c.Tc);
        c.ob = eos->omega_b * c.Tc / c.Pc;
    }
    if (sp->has_quantum) {
        if (!(sp->q_Tc0 > 0.0 && sp->q_Pc0 > 0.0 && sp->q_c1 >= 0.0 && sp->q_c2 >= 0.0 &&
              isfinite(sp->q_Tc0) && isfinite(sp->q_Pc0) && isfinite(sp->q_c1) &&
              isfinite(sp->q_c2)))
            return kphi_error_set(err, KPHI_EINPUT, path, at,
                                  "species '%s': quantum-gas constants must be positive "
                                  "(Tc0, Pc0) and >= 0 (c1, c2)",
                                  name);
        if (!(c.M > 0.0))
            return kphi_error_set(err, KPHI_EINPUT, path, at,
                                  "species '%s': quantum-gas constants need a molar mass > 0",
                                  name);
        c.has_quantum = 1;
        c.q_Tc0 = sp->q_Tc0;
        c.q_Pc0 = sp->q_Pc0;
        c.q_c1 = sp->q_c1;
        c.q_c2 = sp->q_c2;
    }
    if (sp->has_bb) {
        if (!(isfinite(sp->bb_A0) && sp->bb_A0 > 0.0 && isfinite(sp->bb_B0) &&
              sp->bb_B0 > 0.0 && isfinite(sp->bb_c) && sp->bb_c >= 0.0 &&
              isfinite(sp->bb_a) && isfinite(sp->bb_b)))
            return kphi_error_set(err, KPHI_EINPUT, path, at,
                                  "species '%s': Beattie-Bridgeman A0 and B0 must be positive, "
                                  "c >= 0, a and b finite",
                                  name);
        c.has_bb = 1;
        c.bb_s = sqrt(sp->bb_A0);
        c.bb_a = sp->bb_a;
        c.bb_B0 = sp->bb_B0;
        c.bb_b = sp->bb_b;
        c.bb_c = sp->bb_c;
        c.bb_B13 = cbrt(sp->bb_B0);
    }
    if ((eos->model == KPHI_EOS_BB || eos->model == KPHI_EOS_BBV) && !c.has_bb)
        return kphi_error_set(err, KPHI_EINPUT, path, at,
                              "species '%s' has no Beattie-Bridgeman constants (key "
                              "'beattie_bridgeman' of its species data), which the '%s' "
                              "equation of state needs",
                              name, kphi_eos_model_name(eos->model));
    c.set = 1;
    if (!eos->c[i].set)
        eos->n_set++;
    eos->c[i] = c;
    update_pfac(eos, i);
    return KPHI_OK;
}

void kphi_eos_set_kij_linear(kphi_eos *eos, size_t i, size_t j, double kij, double dkdT,
                             double T_ref)
{
    size_t n = eos->n;
    if (i >= n || j >= n || i == j)
        return;
    eos->kij[i * n + j] = eos->kij[j * n + i] = kij;
    eos->omk[i * n + j] = eos->omk[j * n + i] = 1.0 - kij;
    eos->kslope[i * n + j] = eos->kslope[j * n + i] = dkdT;
    eos->kzero[i * n + j] = eos->kzero[j * n + i] = kij - dkdT * T_ref;
    eos->any_kij = 0;
    eos->any_kT = 0;
    for (size_t k = 0; k < n * n; k++) {
        if (eos->kij[k] != 0.0 || eos->kslope[k] != 0.0)
            eos->any_kij = 1;
        if (eos->kslope[k] != 0.0)
            eos->any_kT = 1;
    }
}

void kphi_eos_set_kij(kphi_eos *eos, size_t i, size_t j, double kij)
{
    kphi_eos_set_kij_linear(eos, i, j, kij, 0.0, 298.15);
}

double kphi_eos_get_kij_at(const kphi_eos *eos, size_t i, size_t j, double T)
{
    size_t n = eos->n;
    if (i >= n || j >= n)
        return 0.0;
    if (eos->kslope[i * n + j] == 0.0)
        return eos->kij[i * n + j];
    return eos->kzero[i * n + j] + eos->kslope[i * n + j] * T;
}

double kphi_eos_get_kij(const kphi_eos *eos, size_t i, size_t j)
{
    size_t n = eos->n;
    if (i >= n || j >= n)
        return 0.0;
    return eos->kij[i * n + j];
}

void kphi_eos_set_quantum(kphi_eos *eos, int on)
{
    eos->quantum = on != 0;
}

void kphi_eos_set_bb_lorentz(kphi_eos *eos, int on)
{
    eos->bb_lorentz = on != 0;
}

double kphi__eos_omk(const kphi_eos *eos, size_t i, size_t j, double T, double *Tdomk)
{
    size_t q = i * eos->n + j;
    if (eos->kslope[q] == 0.0) {
        *Tdomk = 0.0;
        return eos->omk[q];
    }
    *Tdomk = -eos->kslope[q] * T;
    return 1.0 - (eos->kzero[q] + eos->kslope[q] * T);
}

/* Effective critical constants of species i at T, and their logarithmic temperature
 * derivatives th = T dln Tc/dT, pi = T dln Pc/dT (0 for classical constants). */
static void critical_at(const kphi_eos *eos, size_t i, double T, double *Tc, double *Pc,
                        double *th, double *pi)
{
    const kphi__eos_comp *c = &eos->c[i];
    if (eos->quantum && c->has_quantum) {
        double x1 = c->q_c1 / (c->M * T), x2 = c->q_c2 / (c->M * T);
        *Tc = c->q_Tc0 / (1.0 + x1);
        *Pc = c->q_Pc0 / (1.0 + x2);
        *th = x1 / (1.0 + x1);
        *pi = x2 / (1.0 + x2);
    } else {
        *Tc = c->Tc;
        *Pc = c->Pc;
        *th = 0.0;
        *pi = 0.0;
    }
}

void kphi_eos_critical(const kphi_eos *eos, size_t i, double T, double *Tc, double *Pc)
{
    double th, pi, tc = 0.0, pc = 0.0;
    if (i < eos->n)
        critical_at(eos, i, T, &tc, &pc, &th, &pi);
    if (Tc != NULL)
        *Tc = tc;
    if (Pc != NULL)
        *Pc = pc;
}

double kphi_eos_alpha_slope(kphi_eos_model model, double omega)
{
    return alpha_slope(model, omega);
}

void kphi_eos_set_standard_alpha(kphi_eos *eos, int on)
{
    eos->standard_alpha = on != 0;
}

const kphi_alpha_spec *kphi_eos_alpha(const kphi_eos *eos, size_t i)
{
    if (i >= eos->n || !eos->c[i].has_alpha)
        return NULL;
    return &eos->c[i].alpha;
}

double kphi_eos_acentric(const kphi_eos *eos, size_t i)
{
    return i < eos->n ? eos->c[i].omega : 0.0;
}

/* ------------------------------------------------------------------ workspace --- */

kphi_eos_work *kphi_eos_work_alloc(size_t n_species)
{
    size_t n = n_species > 0 ? n_species : 1;
    size_t nn = n * n;
    if (nn / n != n || nn > ((size_t)-1) / sizeof(double) / 4)
        return NULL;
    kphi_eos_work *w = calloc(1, sizeof *w);
    if (w == NULL)
        return NULL;
    w->block = calloc(34 * n + 3 * nn, sizeof(double));
    if (w->block == NULL) {
        free(w);
        return NULL;
    }
    w->n = n_species;
    double *q = w->block;
    double **vec[] = {&w->s,  &w->t,  &w->beta, &w->tbeta, &w->S,    &w->abar, &w->p,
                      &w->Tc, &w->Pc, &w->th,   &w->pi,    &w->bsum, &w->yb,   &w->lb,
                      &w->e,  &w->g,  &w->h,    &w->pq};
    for (size_t k = 0; k < sizeof vec / sizeof vec[0]; k++) {
        *vec[k] = q;
        q += n;
    }
    w->bbg = q;
    q += 4 * n;
    w->bbu = q;
    q += 7 * n;
    w->bbq = q;
    q += 2 * n;
    w->bbF = q;
    q += 2 * n;
    w->Bij = q;
    q += nn;
    w->dBij = q;
    q += nn;
    w->omT = q;
    return w;
}

void kphi_eos_work_free(kphi_eos_work *w)
{
    if (w == NULL)
        return;
    free(w->block);
    free(w);
}

/* --------------------------------------------------------------- evaluation --- */

static void ideal_out(size_t n, double T, double P, double lnphi[], double dlnphi[],
                      kphi_eos_state *st)
{
    for (size_t i = 0; i < n; i++)
        lnphi[i] = 0.0;
    if (dlnphi != NULL)
        for (size_t k = 0; k < n * n; k++)
            dlnphi[k] = 0.0;
    if (st != NULL) {
        st->Z = 1.0;
        st->h_dep = st->g_dep = st->s_dep = 0.0;
        st->v = KPHI_R * T / P;
        st->n_roots = 1;
        st->may_condense = 0;
        st->liquid_like = 0;
    }
}

/* Tsonopoulos (1974) nonpolar f0 + w f1 at x = 1/Tr, and Tr d(f0 + w f1)/dTr. */
static void tsonopoulos(double x, double w, double *F, double *TrdF)
{
    double x2 = x * x, x3 = x2 * x, x4 = x2 * x2, x8 = x4 * x4;
    double f0 = 0.1445 - 0.330 * x - 0.1385 * x2 - 0.0121 * x3 - 0.000607 * x8;
    double f1 = 0.0637 + 0.331 * x2 - 0.423 * x3 - 0.008 * x8;
    double g0 = 0.330 * x + 0.2770 * x2 + 0.0363 * x3 + 0.004856 * x8;
    double g1 = -0.662 * x2 + 1.269 * x3 + 0.064 * x8;
    *F = f0 + w * f1;
    *TrdF = g0 + w * g1;
}

static int eval_virial(const kphi_eos *eos, double T, double P, const double y[],
                       double lnphi[], double dlnphi[], kphi_eos_state *st, kphi_eos_work *w,
                       kphi_error *err)
{
    size_t n = eos->n;
    const kphi__eos_comp *c = eos->c;
    const int bbv = eos->model == KPHI_EOS_BBV;
    for (size_t i = 0; i < n; i++)
        critical_at(eos, i, T, &w->Tc[i], &w->Pc[i], &w->th[i], &w->pi[i]);
    for (size_t i = 0; i < n && bbv; i++)
        for (size_t j = i; j < n; j++) {
            double B, TdB;
            kphi__eos_bb_virial(eos, i, j, T, &B, &TdB);
            w->Bij[i * n + j] = w->Bij[j * n + i] = B;
            w->dBij[i * n + j] = w->dBij[j * n + i] = TdB;
        }
    for (size_t i = 0; i < n && !bbv; i++) {
        for (size_t j = i; j < n; j++) {
            double Tcij, Pcij, wij, th, pi;
            if (i == j) {
                Tcij = w->Tc[i];
                Pcij = w->Pc[i];
                wij = c[i].omega;
                th = w->th[i];
                pi = w->pi[i];
            } else {
                Tcij = sqrt(w->Tc[i] * w->Tc[j]) *
                       (1.0 - kphi_eos_get_kij_at(eos, i, j, T));
                if (!(Tcij > 0.0))
                    return kphi_error_set(err, KPHI_EFAILED, NULL, no_mark,
                                          "virial: k_ij >= 1 for species %zu and %zu gives "
                                          "no cross critical temperature",
                                          i, j);
                Pcij = eos->pfac[i * n + j] * Tcij;
                wij = 0.5 * (c[i].omega + c[j].omega);
                th = 0.5 * (w->th[i] + w->th[j]);
                pi = th;
            }
            double F, TrdF;
            tsonopoulos(Tcij / T, wij, &F, &TrdF);
            double scale = KPHI_R * Tcij / Pcij;
            double B = scale * F;
            double TdB = scale * ((th - pi) * F + TrdF * (1.0 - th));
            w->Bij[i * n + j] = w->Bij[j * n + i] = B;
            w->dBij[i * n + j] = w->dBij[j * n + i] = TdB;
        }
    }
    double B = 0.0, TdB = 0.0;
    for (size_t i = 0; i < n; i++) {
        double sb = 0.0, sd = 0.0;
        const double *Bi = &w->Bij[i * n], *Di = &w->dBij[i * n];
        for (size_t j = 0; j < n; j++) {
            sb += y[j] * Bi[j];
            sd += y[j] * Di[j];
        }
        w->bsum[i] = sb;
        B += y[i] * sb;
        TdB += y[i] * sd;
    }
    double prt = P / (KPHI_R * T);
    double Z = 1.0 + B * prt;
    char shown[32];
    const char *what = bbv ? "bbv (Beattie-Bridgeman second virial)" : "virial equation";
    if (!(Z >= 0.5))
        return kphi_error_set(err, KPHI_EFAILED, NULL, no_mark,
                              "%s outside its range: Z = %s < 0.5 at T = %.2f K, P = %.4g "
                              "bar (use a cubic equation of state)",
                              what, kphi__fmt_beyond(shown, "%.3f", Z, 0.5), T, P / 1e5);
    /* The series truncated after B holds up to about half the critical density, V_r >= 2
     * (common practice; Smith, Van Ness & Abbott 2005, "Introduction to Chemical
     * Engineering Thermodynamics", 7th ed., sec. 3.6, from memory). Pseudo-critical volume
     * by Kay's rule, sum y_i Vc_i. The Beattie-Bridgeman form serves as Gillespie &
     * Beattie's (1930) approximation for the mass-action function, which they applied to
     * the ammonia equilibrium up to 1000 atm: it is allowed to KPHI__BBV_RHO_R, beyond the
     * densities of the Larson & Dodge / Larson data it is validated on (see
     * src/eos_bb.c). */
    double vcm = 0.0;
    for (size_t i = 0; i < n; i++)
        vcm += y[i] * c[i].vc13 * c[i].vc13 * c[i].vc13;
    double rho_r = prt / Z * vcm, rho_max = bbv ? KPHI__BBV_RHO_R : 0.5;
    if (!(rho_r <= rho_max))
        return kphi_error_set(err, KPHI_EFAILED, NULL, no_mark,
                              "%s outside its range: reduced density %s > %.2g at T = %.2f "
                              "K, P = %.4g bar (use a cubic equation of state)",
                              what, kphi__fmt_beyond(shown, "%.2f", rho_r, rho_max), rho_max, T,
                              P / 1e5);
    for (size_t i = 0; i < n; i++)
        lnphi[i] = (2.0 * w->bsum[i] - B) * prt;
    if (dlnphi != NULL) {
        for (size_t i = 0; i < n; i++) {
            for (size_t l = i; l < n; l++) {
                double v = 2.0 * (w->Bij[i * n + l] - w->bsum[i] - w->bsum[l] + B) * prt;
                dlnphi[i * n + l] = dlnphi[l * n + i] = v;
            }
        }
    }
    if (st != NULL) {
        st->Z = Z;
        st->g_dep = B * P;
        st->h_dep = P * (B - TdB);
        st->s_dep = -P * TdB / T;
        st->v = Z / prt;
        st->n_roots = 1;
        st->may_condense = 0;
        st->liquid_like = 0;
    }
    return KPHI_OK;
}

/* Value of the cubic and a Newton step toward its root. */
static double polish_root(double z, double c2, double c1, double c0)
{
    for (int k = 0; k < 2; k++) {
        double f = ((z + c2) * z + c1) * z + c0;
        double df = (3.0 * z + 2.0 * c2) * z + c1;
        if (df == 0.0)
            break;
        double zn = z - f / df;
        double fn = ((zn + c2) * zn + c1) * zn + c0;
        if (!(fabs(fn) < fabs(f)))
            break;
        z = zn;
    }
    return z;
}

/* A single cubic root is taken as liquid-like when its Z is below the cubic's own
 * critical compressibility (1/3 for RK and SRK, 0.3074 for PR; Peng & Robinson 1976 give
 * 0.307) and T is below the pseudo-critical temperature sum_i y_i Tc_i (Kay 1936). Common
 * practice for a warning, not a phase-stability test. Called only for such dense roots. */
static int liquid_like_single(const kphi_eos *eos, double T, const double y[])
{
    double Tpc = 0.0, Tc, Pc, th, pi;
    for (size_t i = 0; i < eos->n; i++) {
        critical_at(eos, i, T, &Tc, &Pc, &th, &pi);
        Tpc += y[i] * Tc;
    }
    return T < Tpc;
}

/* Reduced residual Gibbs energy (G - G_ig)/(RT) of a cubic root z. */
static double cubic_gres(double z, double A, double B, double d1, double d2)
{
    double L = log((z + d1 * B) / (z + d2 * B));
    return z - 1.0 - log(z - B) - A * L / (B * (d1 - d2));
}

/* The real roots of z^3 + c2 z^2 + c1 z + c0 = 0 that the cubic needs: the largest in
 * *zmax and, when all three are real (return value 3; else 1), the other two in
 * *zmin <= *zmid, each polished by Newton steps.
 *
 * Fast path: with a >= 0 every root Z > B satisfies Z = Z/(Z - B) - A Z/Q <= Z/(Z - B)
 * (Q = (Z + d1 B)(Z + d2 B) > 0 for d2 > -1), so Z - B <= 1 and z0 = 1 + B lies above the
 * gas root. Where f(z0) > 0, f'(z0) > 0 and f''(z0) > 0, Newton's method from z0 falls
 * monotonically onto the largest root (the cubic is convex there; Press et al. 2007,
 * "Numerical Recipes", 3rd ed., sec. 9.4, from memory); deflation, f = (z - zmax)(z^2 + p z + q), gives
 * the other two. Any doubt (a rising or non-monotone step, slow convergence, a root close
 * to the largest, another root above it) falls back to gsl_poly_solve_cubic, which is
 * also the path for near-double roots. The start depends on the coefficients only, so
 * the result does not depend on earlier calls. */
static int cubic_roots(double c2, double c1, double c0, double B, double *zmax, double *zmin,
                       double *zmid)
{
    double z = 1.0 + B;
    double f = ((z + c2) * z + c1) * z + c0;
    double df = (3.0 * z + 2.0 * c2) * z + c1;
    int fast = f > 0.0 && df > 0.0 && 3.0 * z + c2 > 0.0 && isfinite(f);
    for (int k = 0; fast; k++) {
        double dz = f / df;
        z -= dz;
        if (!(dz >= -1e-15 * z) || k == 40) {
            fast = 0;
            break;
        }
        if (dz <= 1e-12 * z)
            break;
        f = ((z + c2) * z + c1) * z + c0;
        df = (3.0 * z + 2.0 * c2) * z + c1;
        if (!(df > 0.0))
            fast = 0;
    }
    if (fast) {
        df = (3.0 * z + 2.0 * c2) * z + c1; /* f'(zmax): the root's separation */
        double p = c2 + z, q = c1 + p * z, D = p * p - 4.0 * q;
        if (df > 1e-6 && isfinite(D)) {
            *zmax = z;
            if (D < 0.0)
                return 1;
            double t = -0.5 * (p + copysign(sqrt(D), p));
            double r1 = t, r2 = t != 0.0 ? q / t : 0.0;
            double lo = r1 < r2 ? r1 : r2, hi = r1 < r2 ? r2 : r1;
            double near = B - 1e-6 * fabs(B) - 1e-14; /* only roots near Z > B matter */
            if (lo > near)
                lo = polish_root(lo, c2, c1, c0);
            if (hi > near)
                hi = polish_root(hi, c2, c1, c0);
            if (hi < z) {
                *zmin = lo;
                *zmid = hi;
                return 3;
            }
        }
    }
    double x0 = 0.0, x1 = 0.0, x2 = 0.0;
    int nr = gsl_poly_solve_cubic(c2, c1, c0, &x0, &x1, &x2);
    *zmax = polish_root(nr == 3 ? x2 : x0, c2, c1, c0);
    if (nr != 3)
        return 1;
    *zmin = polish_root(x0, c2, c1, c0);
    *zmid = polish_root(x1, c2, c1, c0);
    return 3;
}

static int eval_cubic(const kphi_eos *eos, kphi_eos_root root, double T, double P,
                      const double y[], double lnphi[], double dlnphi[], kphi_eos_state *st,
                      kphi_eos_work *w, kphi_error *err)
{
    size_t n = eos->n;
    const kphi__eos_comp *c = eos->c;
    const int rk = eos->model == KPHI_EOS_RK;
    const double d1 = eos->d1, d2 = eos->d2, dd = d1 - d2, ds = d1 + d2, dp = d1 * d2;
    const double sqrtT = sqrt(T);
    const double pt = P / T;
    const double prt = P / (KPHI_R * T);
    const double prt2 = prt / (KPHI_R * T); /* P/(RT)^2 */
    const int quantum = eos->quantum;

    /* Per-species sqrt(a_i), T d sqrt(a_i)/dT, reduced b_i and T db_i/dT. Classical
     * constants (th = pi = 0) take the short branch: no transcendental function but the
     * one sqrt(T) per call. */
    double B = 0.0, Bt = 0.0;
    for (size_t i = 0; i < n; i++) {
        const kphi__eos_comp *ci = &c[i];
        double s, t, beta, tbeta = 0.0;
        if (quantum && ci->has_quantum) {
            double Tc, Pc, th, pi;
            critical_at(eos, i, T, &Tc, &Pc, &th, &pi);
            double sqa = sqrt(eos->omega_a) * KPHI_R * Tc / sqrt(Pc);
            double rstc = 1.0 / sqrt(Tc);
            beta = eos->omega_b * Tc / Pc * P / T;
            tbeta = beta * (th - pi);
            if (rk) {
                double q = sqrt(sqrtT * rstc); /* Tr^(1/4) */
                s = sqa / q;
                t = s * (th - 0.5 * pi - 0.25 * (1.0 - th));
            } else {
                double sq = sqrtT * rstc; /* Tr^(1/2) */
                double g = 1.0 + ci->m * (1.0 - sq);
                s = sqa * g; /* signed alpha^1/2: see the file comment */
                t = sqa * ((th - 0.5 * pi) * g - 0.5 * ci->m * sq * (1.0 - th));
            }
        } else {
            beta = ci->ob * pt;
            if (rk) {
                s = ci->sqa / sqrt(sqrtT * ci->rstc); /* Tr^(-1/4) */
                t = -0.25 * s;
            } else if (ci->has_alpha) {
                double sq = sqrtT * ci->rstc; /* Tr^(1/2) */
                double q = 1.0 - sq, g, dg;
                const double *a = ci->alpha.c; /* Mathias-Copeman */
                if (q > 0.0) {
                    g = 1.0 + q * (a[0] + q * (a[1] + q * a[2]));
                    dg = a[0] + q * (2.0 * a[1] + 3.0 * q * a[2]);
                } else {
                    g = 1.0 + a[0] * q;
                    dg = a[0];
                }
                s = ci->sqa * g;
                t = -ci->sqa * 0.5 * sq * dg; /* T dq/dT = -Tr^(1/2)/2 */
            } else {
                double sq = sqrtT * ci->rstc; /* Tr^(1/2) */
                double g = 1.0 + ci->m * (1.0 - sq);
                s = ci->sqa * g; /* signed alpha^1/2: see the file comment */
                t = -ci->sqa * 0.5 * ci->m * sq;
            }
        }
        w->s[i] = s;
        w->t[i] = t;
        w->beta[i] = beta;
        w->tbeta[i] = tbeta;
        B += y[i] * beta;
        Bt += y[i] * tbeta;
    }
    if (!(B > 0.0))
        return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark,
                              "mole fractions are all zero: no mixture to evaluate");

    /* Mixture a: S_i = sum_j y_j (1 - k_ij) s_j, a = sum y_i s_i S_i. Without k_ij every
     * S_i is the same sum. A temperature-dependent k_ij (k = k0 + k1 T) is evaluated at T
     * into the workspace, and adds -sum sum y_i y_j s_i s_j T k1_ij to T da/dT. */
    double a = 0.0, at = 0.0, akt = 0.0;
    const double *omk = eos->omk;
    if (eos->any_kT) {
        for (size_t q = 0; q < n * n; q++)
            w->omT[q] = 1.0 - (eos->kzero[q] + eos->kslope[q] * T);
        omk = w->omT;
        for (size_t i = 0; i < n; i++)
            for (size_t j = 0; j < n; j++)
                akt += y[i] * y[j] * w->s[i] * w->s[j] * eos->kslope[i * n + j] * T;
    }
    if (eos->any_kij) {
        for (size_t i = 0; i < n; i++) {
            const double *om = &omk[i * n];
            double Si = 0.0;
            for (size_t j = 0; j < n; j++)
                Si += y[j] * om[j] * w->s[j];
            w->S[i] = Si;
        }
    } else {
        double S0 = 0.0;
        for (size_t j = 0; j < n; j++)
            S0 += y[j] * w->s[j];
        for (size_t i = 0; i < n; i++)
            w->S[i] = S0;
    }
    for (size_t i = 0; i < n; i++) {
        double Si = w->S[i];
        w->abar[i] = w->s[i] * Si * prt2;
        a += y[i] * w->s[i] * Si;
        at += y[i] * w->t[i] * Si;
    }
    const double A = a * prt2;
    const double At = (2.0 * at - akt) * prt2; /* T da/dT P/(RT)^2 */

    /* Cubic in Z. */
    const double c2 = (ds - 1.0) * B - 1.0;
    const double c1 = A + dp * B * B - ds * (B + B * B);
    const double c0 = -(A * B + dp * (B * B + B * B * B));
    double zmax = 0.0, zmin = 0.0, zmid = 0.0;
    int nr = cubic_roots(c2, c1, c0, B, &zmax, &zmin, &zmid);
    if (!(zmax > B) || !isfinite(zmax))
        return kphi_error_set(err, KPHI_EFAILED, NULL, no_mark,
                              "%s: no physical root (Z > B) at T = %.2f K, P = %.4g Pa",
                              kphi_eos_model_name(eos->model), T, P);
    int n_roots = 1, may_condense = 0, three = 0;
    double zliq = zmax;
    if (nr == 3) {
        n_roots = (zmin > B) + (zmid > B) + 1;
        if (zmin > B && zmax - zmin > 1e-9 * zmax) {
            three = 1;
            zliq = zmin;
            if (cubic_gres(zmin, A, B, d1, d2) < cubic_gres(zmax, A, B, d1, d2))
                may_condense = 1;
        }
    }
    int single_dense = !three && zmax < eos->zc_eos && liquid_like_single(eos, T, y);
    if (single_dense)
        may_condense = 1;
    double Z = zmax;
    int liquid_like = single_dense;
    if (three && (root == KPHI_EOS_ROOT_LIQUID || (root == KPHI_EOS_ROOT_STABLE && may_condense))) {
        Z = zliq;
        liquid_like = 1;
    }

    /* ln phi_i and the reduced residual Gibbs energy. */
    const double zmb = Z - B;
    const double lzmb = log(zmb);
    const double q1 = Z + d1 * B, q2 = Z + d2 * B, Q = q1 * q2;
    const double L = log(q1 / q2);
    const double phi = L / (B * dd);   /* reduced f(V, B) */
    const double zm1b = (Z - 1.0) / B; /* (Z - 1)/B */
    const double AoB = A / B;
    for (size_t i = 0; i < n; i++)
        lnphi[i] = w->beta[i] * zm1b - lzmb - phi * (2.0 * w->abar[i] - AoB * w->beta[i]);

    /* d f/dB in reduced form: (L_B - L/B)/(B dd), L_B = dd Z/Q. */
    const double phiB = (Z / Q - phi) / B;

    if (dlnphi != NULL) {
        /* n_t d ln phi_i/d n_j = e_i + e_j + b_i h_j + g_i b_j - kap om_ij s_i s_j
         *                        + p_i p_j / pV, the terms of
         * (b_i + b_j)/(Z - B) + b_i b_j/(Z - B)^2 - 2 a_ij f - 2 (abar_i b_j + abar_j b_i) f_B
         * - A f_BB b_i b_j + 1 + p_i p_j/pV grouped per species (a_ij = om_ij s_i s_j P/(RT)^2) */
        const double phiBB = ((-d1 * d1 / (q1 * q1) + d2 * d2 / (q2 * q2)) / dd - 2.0 * phiB) / B;
        const double izmb = 1.0 / zmb, izmb2 = izmb * izmb, iQ = 1.0 / Q, iQ2 = iQ * iQ;
        const double QB = ds * Z + 2.0 * dp * B; /* dQ/dB */
        const double QV = 2.0 * Z + ds * B;      /* dQ/dV */
        const double pV = -izmb2 + A * QV * iQ2;
        const double ipV = 1.0 / pV;
        const double cbb = izmb2 - A * phiBB;
        const double kap = 2.0 * phi * prt2;
        double *e = w->e, *g = w->g, *h = w->h, *pq = w->pq;
        for (size_t i = 0; i < n; i++) {
            const double bi = w->beta[i], ai = w->abar[i];
            w->p[i] = izmb + bi * izmb2 - 2.0 * ai * iQ + A * bi * QB * iQ2;
            e[i] = bi * izmb + 0.5;
            g[i] = -2.0 * ai * phiB;
            h[i] = cbb * bi + g[i];
            pq[i] = w->p[i] * ipV;
        }
        for (size_t i = 0; i < n; i++) {
            const double bi = w->beta[i], ei = e[i], gi = g[i], pi = w->p[i];
            const double ksi = kap * w->s[i];
            const double *om = &omk[i * n];
            for (size_t j = i; j < n; j++) {
                double v = ei + e[j] + bi * h[j] + gi * w->beta[j] - ksi * om[j] * w->s[j] +
                           pi * pq[j];
                dlnphi[i * n + j] = dlnphi[j * n + i] = v;
            }
        }
    }

    if (st != NULL) {
        const double RT = KPHI_R * T;
        double gres = Z - 1.0 - lzmb - A * phi;
        double hres = Z - 1.0 - Bt / zmb + phi * (At - A) + A * phiB * Bt;
        st->Z = Z;
        st->g_dep = gres * RT;
        st->h_dep = hres * RT;
        st->s_dep = (hres - gres) * KPHI_R;
        st->v = Z / prt;
        st->n_roots = n_roots;
        st->may_condense = may_condense;
        st->liquid_like = liquid_like;
    }
    return KPHI_OK;
}

int kphi_eos_eval(const kphi_eos *eos, double T, double P, const double y[], double lnphi[],
                  double dlnphi[], kphi_eos_state *state, kphi_eos_work *w, kphi_error *err)
{
    return kphi_eos_eval_root(eos, KPHI_EOS_ROOT_GAS, T, P, y, lnphi, dlnphi, state, w, err);
}

int kphi_eos_eval_root(const kphi_eos *eos, kphi_eos_root root, double T, double P,
                       const double y[], double lnphi[], double dlnphi[], kphi_eos_state *state,
                       kphi_eos_work *w, kphi_error *err)
{
    size_t n = eos->n;
    if (!(isfinite(T) && T > 0.0))
        return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark,
                              "temperature %g K is not positive", T);
    if (!(isfinite(P) && P > 0.0))
        return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark, "pressure %g Pa is not positive",
                              P);
    double sum = 0.0;
    for (size_t i = 0; i < n; i++) {
        if (!(y[i] >= 0.0))
            return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark,
                                  "mole fraction %zu is %g; expected a value >= 0", i, y[i]);
        sum += y[i];
    }
    if (n > 0 && !(fabs(sum - 1.0) <= 1e-6))
        return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark,
                              "mole fractions sum to %.9g; expected 1", sum);
    if (eos->model == KPHI_EOS_IDEAL) {
        ideal_out(n, T, P, lnphi, dlnphi, state);
        return KPHI_OK;
    }
    if (w == NULL || w->n < n)
        return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark,
                              "equation-of-state workspace is for %zu species, the mixture has "
                              "%zu",
                              w != NULL ? w->n : (size_t)0, n);
    for (size_t i = 0; eos->n_set < n && i < n; i++)
        if (!eos->c[i].set)
            return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark,
                                  "species slot %zu of the equation of state was never set", i);
    if (eos->model == KPHI_EOS_VIRIAL || eos->model == KPHI_EOS_BBV)
        return eval_virial(eos, T, P, y, lnphi, dlnphi, state, w, err);
    if (eos->model == KPHI_EOS_BB)
        return kphi__eos_eval_bb(eos, T, P, y, lnphi, dlnphi, state, w, err);
    return eval_cubic(eos, root, T, P, y, lnphi, dlnphi, state, w, err);
}

int kphi_eos_pure(const kphi_eos *eos, size_t i, double T, double P, double *Z, double *lnphi,
                  kphi_eos_work *w, kphi_error *err)
{
    size_t n = eos->n;
    if (i >= n)
        return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark,
                              "species %zu is out of range (the mixture has %zu)", i, n);
    if (w == NULL || w->n < n)
        return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark,
                              "equation-of-state workspace is for %zu species, the mixture has "
                              "%zu",
                              w != NULL ? w->n : (size_t)0, n);
    for (size_t k = 0; k < n; k++)
        w->yb[k] = 0.0;
    w->yb[i] = 1.0;
    kphi_eos_state st;
    int rc = kphi_eos_eval(eos, T, P, w->yb, w->lb, NULL, &st, w, err);
    if (rc != KPHI_OK)
        return rc;
    if (Z != NULL)
        *Z = st.Z;
    if (lnphi != NULL)
        *lnphi = w->lb[i];
    return KPHI_OK;
}
