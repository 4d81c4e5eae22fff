/* kphi loop: the synthesis loop at steady state (make-up, converter, cooler and separator,
 * purge, recycle).
 *
 * Unknowns: the recycle's component flows R (mol/s) of every species that can flow, and,
 * when the purge is set by an inert level, ln f (f the purge fraction). One pass through
 * the loop from R:
 *   converter inlet  n_in  = R (+ make-up M when it joins there),
 *   converter outlet n_out = equilibrium of n_in (isothermal: at T_out + approach; or the
 *                            adiabatic beds, see bed_outlet()),
 *   separator feed         = n_out (+ M when the make-up joins at the separator),
 *   flash at T_sep, P_sep  -> vapour V, liquid L,
 *   purge f V, recycle (1 - f) V,
 * and the residuals F_i = (1 - f) V_i(R) - R_i (and, for an inert target,
 * F_f = sum_inerts n_in,i / sum n_in,i - target). Newton's method with a forward-difference
 * Jacobian (step 1e-7 of the flow plus 1e-9 of the make-up; 1e-7 in ln f), solved by LU
 * decomposition (gsl_linalg_LU_decomp); each step is cut to keep every flow >= 0 and f
 * below 1 (at most 99 % of the way to a bound), ln f by at most 2 per step, and halved
 * until the residual norm, each residual scaled by its flow at the current point (fixed
 * during the search, so that the Newton step is a descent direction), falls (Dennis &
 * Schnabel 1983, "Numerical Methods for Unconstrained Optimization and Nonlinear
 * Equations", ch. 6, for the backtracking; from memory). Converged when every
 * |F_i| <= 1e-10 (|R_i| + 1e-12 sum M), |F_f| <= 1e-12, and the element balance these
 * residuals leave (make-up - liquid - purge = sum_i a_ei F_i) is within 2.5e-11 of the
 * make-up's largest element flow: a recycle several times the make-up would otherwise
 * let the balance miss 1e-10. The cold start is R = 4 M. With an inert target the
 * recycle is first solved (to 1e-3) at a purge estimated from the inert balance, then R
 * and ln f together: the inert level at the inlet depends on f only through R, so the
 * joint iteration from far away drives f to a bound.
 *
 * Adiabatic beds with an approach (bed_outlet()): the outlet temperature T of a bed fed n_k
 * at T_k is the root of
 *   H(T, P, n_eq(T + dT)) - H(T_k, P, n_k) = 0,
 * n_eq(T') the gas equilibrium at T' (kphi_equil_solve()), H from kphi_equil_enthalpy();
 * with dT = 0 this is kphi_equil_adiabatic_outlet(), which is called then. Bracketed by
 * steps of 8, 16, 32 ... K from T_k, then Brent's method to 1e-9 K.
 *
 * Energy: the converter duty is the heat released, H(in) - H(out) at T_out for the
 * isothermal converter (both at T_out: the heat of reaction that is removed), and the sum
 * of the interbed exchangers' duties for adiabatic beds; the cooler duty is H of the
 * converter outlet (converter model) minus H of the separator's two phases
 * (kphi_phase_molar_enthalpy(), separator model), the make-up joining at the separator
 * being taken as arriving at T_sep. Both in W, positive when heat is removed. */
#include "kphi/loop.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_errno.h>
#include <gsl/gsl_linalg.h>
#include <gsl/gsl_permutation.h>
#include <gsl/gsl_roots.h>

#include "kphi/thermo.h"

static const kphi_mark no_mark = {0, 0};

#define REL_TOL 1e-10
#define MAX_NEWTON 60
#define T_TOL 1e-9
#define BAL_TOL 2.5e-11 /* element balance left by the residuals, of the make-up's */

static const char *const STREAM_NAMES[KPHI_LOOP_N_STREAMS] = {
    "makeup", "converter_in", "converter_out", "separator_vapour", "liquid", "purge", "recycle"};

const char *kphi_loop_stream_name(kphi_loop_stream_id id)
{
    if ((int)id < 0 || id >= KPHI_LOOP_N_STREAMS)
        return "unknown";
    return STREAM_NAMES[id];
}

struct kphi_loop_work {
    size_t s, r;
    kphi_equil_work *ew;
    kphi_equil_result *eq;              /* converter outlet / scratch */
    kphi_equil_result *beds[KPHI_LOOP_MAX_BEDS];
    kphi_phase_work *pw;
    kphi_flash_result *fl;
    gsl_permutation *perm;
    gsl_root_fsolver *brent;
    size_t *act;                        /* [s] species that can flow */
    double *block;
    double *x, *xt, *dx, *F, *Ft, *Fp;  /* [s+1] */
    double *J;                          /* [(s+1)^2] */
    double *n_in, *n_out, *feed, *vap, *liq, *R; /* [s] */
    double *xi;                         /* [r] warm start of the converter */
    int have_xi;
    /* the current evaluation's extras */
    double bed_T_out[KPHI_LOOP_MAX_BEDS];
    double conv_duty;
    double bmax;                        /* largest element flow of the make-up, mol/s */
};

kphi_loop_work *kphi_loop_work_alloc(size_t n_species, size_t n_reactions)
{
    size_t s = n_species > 0 ? n_species : 1, r = n_reactions > 0 ? n_reactions : 1;
    size_t m = s + 1;
    kphi_loop_work *w = calloc(1, sizeof *w);
    if (w == NULL)
        return NULL;
    w->s = n_species;
    w->r = n_reactions;
    w->ew = kphi_equil_work_alloc(n_species, n_reactions);
    w->eq = kphi_equil_result_alloc(n_species, n_reactions);
    int ok = w->ew != NULL && w->eq != NULL;
    for (size_t k = 0; k < KPHI_LOOP_MAX_BEDS && ok; k++) {
        w->beds[k] = kphi_equil_result_alloc(n_species, n_reactions);
        ok = w->beds[k] != NULL;
    }
    w->pw = kphi_phase_work_alloc(n_species, 0);
    w->fl = kphi_flash_result_alloc(n_species);
    w->perm = gsl_permutation_alloc(m);
    w->brent = gsl_root_fsolver_alloc(gsl_root_fsolver_brent);
    w->act = calloc(s, sizeof *w->act);
    w->block = calloc(6 * m + m * m + 6 * s + r, sizeof(double));
    if (!ok || w->pw == NULL || w->fl == NULL || w->perm == NULL || w->brent == NULL ||
        w->act == NULL || w->block == NULL) {
        kphi_loop_work_free(w);
        return NULL;
    }
    double *q = w->block;
    double **vm[] = {&w->x, &w->xt, &w->dx, &w->F, &w->Ft, &w->Fp};
    for (size_t k = 0; k < 6; k++) {
        *vm[k] = q;
        q += m;
    }
    w->J = q;
    q += m * m;
    double **vs[] = {&w->n_in, &w->n_out, &w->feed, &w->vap, &w->liq, &w->R};
    for (size_t k = 0; k < 6; k++) {
        *vs[k] = q;
        q += s;
    }
    w->xi = q;
    return w;
}

void kphi_loop_work_free(kphi_loop_work *w)
{
    if (w == NULL)
        return;
    kphi_equil_work_free(w->ew);
    kphi_equil_result_free(w->eq);
    for (size_t k = 0; k < KPHI_LOOP_MAX_BEDS; k++)
        kphi_equil_result_free(w->beds[k]);
    kphi_phase_work_free(w->pw);
    kphi_flash_result_free(w->fl);
    if (w->perm != NULL)
        gsl_permutation_free(w->perm);
    if (w->brent != NULL)
        gsl_root_fsolver_free(w->brent);
    free(w->act);
    free(w->block);
    free(w);
}

kphi_loop_result *kphi_loop_result_alloc(size_t n_species)
{
    kphi_loop_result *r = calloc(1, sizeof *r);
    if (r == NULL)
        return NULL;
    r->n_species = n_species;
    for (int k = 0; k < KPHI_LOOP_N_STREAMS; k++) {
        r->stream[k].n = calloc(n_species > 0 ? n_species : 1, sizeof(double));
        if (r->stream[k].n == NULL) {
            kphi_loop_result_free(r);
            return NULL;
        }
    }
    return r;
}

void kphi_loop_result_free(kphi_loop_result *r)
{
    if (r == NULL)
        return;
    for (int k = 0; k < KPHI_LOOP_N_STREAMS; k++)
        free(r->stream[k].n);
    free(r);
}

void kphi_loop_result_scale(kphi_loop_result *r, double factor)
{
    for (int k = 0; k < KPHI_LOOP_N_STREAMS; k++) {
        kphi_loop_stream *st = &r->stream[k];
        for (size_t i = 0; i < r->n_species; i++)
            st->n[i] *= factor;
        st->total *= factor;
        st->mass *= factor;
    }
    r->product_rate *= factor;
    r->converter_duty *= factor;
    r->cooler_duty *= factor;
}

/* ------------------------------------------------------------ one pass */

typedef struct {
    const kphi_rxnset *set;
    const kphi_eos *conv, *sep;
    const kphi_loop_spec *sp;
    kphi_loop_work *w;
    kphi_error *err;
    /* bed search */
    const double *n_bed;
    double T_bed, H_bed, dT;
    int rc;
    double f_fixed;  /* the purge fraction when it is not solved for */
    double tol;      /* relative residual of the recycle: REL_TOL, or looser on the way */
} ctx;

/* H(T, P, n_eq(T + dT)) - H_in for the bed search. */
static double bed_f(double T, void *p)
{
    ctx *c = p;
    if (c->rc != KPHI_OK)
        return NAN;
    kphi_loop_work *w = c->w;
    kphi_equil_options o = kphi_equil_options_default();
    o.K_basis = c->sp->K_basis;
    int rc = kphi_equil_solve(c->set, c->conv, T + c->dT, c->sp->P, c->n_bed, NULL, &o, w->ew,
                              w->eq, c->err);
    double H = 0.0;
    if (rc == KPHI_OK)
        rc = kphi_equil_enthalpy(c->set, c->conv, T, c->sp->P, w->eq->n, w->ew, &H, c->err);
    if (rc != KPHI_OK) {
        c->rc = rc;
        return NAN;
    }
    return H - c->H_bed;
}

/* Adiabatic bed with an approach: outlet T and composition (into out). */
static int bed_outlet(ctx *c, const double n[], double T_in, kphi_equil_result *out, double *T_out)
{
    kphi_loop_work *w = c->w;
    const kphi_loop_spec *sp = c->sp;
    if (sp->approach == 0.0) {
        kphi_equil_options o = kphi_equil_options_default();
        o.K_basis = sp->K_basis;
        int rc = kphi_equil_adiabatic_outlet(c->set, c->conv, T_in, sp->P, n, &o, w->ew, out,
                                             c->err);
        if (rc == KPHI_OK)
            *T_out = out->T;
        return rc;
    }
    double H_in;
    int rc = kphi_equil_enthalpy(c->set, c->conv, T_in, sp->P, n, w->ew, &H_in, c->err);
    if (rc != KPHI_OK)
        return rc;
    c->n_bed = n;
    c->T_bed = T_in;
    c->H_bed = H_in;
    c->dT = sp->approach;
    c->rc = KPHI_OK;
    double f0 = bed_f(T_in, c);
    if (c->rc != KPHI_OK)
        return c->rc;
    double dir = f0 < 0.0 ? 1.0 : -1.0, step = 8.0, Ta = T_in, Tb = T_in;
    int found = f0 == 0.0;
    for (int k = 0; k < 40 && !found; k++) {
        Tb = Ta + dir * step;
        if (Tb < 200.0 || Tb > 3000.0)
            break;
        double fb = bed_f(Tb, c);
        if (c->rc != KPHI_OK)
            return c->rc;
        if ((fb > 0.0) != (f0 > 0.0)) {
            found = 1;
            break;
        }
        Ta = Tb;
        step *= 2.0;
    }
    if (!found)
        return kphi_error_set(c->err, KPHI_EFAILED, NULL, no_mark,
                              "adiabatic bed fed at %.2f K: no outlet temperature closes the "
                              "energy balance",
                              T_in);
    double root = T_in;
    if (f0 != 0.0) {
        gsl_function F = {bed_f, c};
        double lo = Ta < Tb ? Ta : Tb, hi = Ta < Tb ? Tb : Ta;
        int st = gsl_root_fsolver_set(w->brent, &F, lo, hi);
        for (int it = 0; st == GSL_SUCCESS && it < 200; it++) {
            st = gsl_root_fsolver_iterate(w->brent);
            if (c->rc != KPHI_OK)
                return c->rc;
            root = gsl_root_fsolver_root(w->brent);
            if (gsl_root_fsolver_x_upper(w->brent) - gsl_root_fsolver_x_lower(w->brent) < T_TOL)
                break;
        }
        if (st != GSL_SUCCESS)
            return kphi_error_set(c->err, KPHI_EFAILED, NULL, no_mark,
                                  "adiabatic bed fed at %.2f K: %s", T_in, gsl_strerror(st));
    }
    kphi_equil_options o = kphi_equil_options_default();
    o.K_basis = sp->K_basis;
    rc = kphi_equil_solve(c->set, c->conv, root + sp->approach, sp->P, n, NULL, &o, w->ew, out,
                          c->err);
    *T_out = root;
    return rc;
}

/* The converter from w->n_in: outlet amounts in w->n_out, bed temperatures and the
 * converter duty in w. */
static int converter(ctx *c)
{
    kphi_loop_work *w = c->w;
    const kphi_loop_spec *sp = c->sp;
    size_t s = w->s;
    int rc;
    if (sp->converter == KPHI_LOOP_ISOTHERMAL) {
        kphi_equil_options o = kphi_equil_options_default();
        o.K_basis = sp->K_basis;
        rc = kphi_equil_solve(c->set, c->conv, sp->T_out + sp->approach, sp->P, w->n_in,
                              w->have_xi ? w->xi : NULL, &o, w->ew, w->eq, c->err);
        if (rc != KPHI_OK)
            return rc;
        memcpy(w->n_out, w->eq->n, s * sizeof(double));
        memcpy(w->xi, w->eq->xi, w->r * sizeof(double));
        w->have_xi = 1;
        double Hi, Ho;
        rc = kphi_equil_enthalpy(c->set, c->conv, sp->T_out, sp->P, w->n_in, w->ew, &Hi, c->err);
        if (rc == KPHI_OK)
            rc = kphi_equil_enthalpy(c->set, c->conv, sp->T_out, sp->P, w->n_out, w->ew, &Ho,
                                     c->err);
        w->conv_duty = Hi - Ho;
        return rc;
    }
    const double *n = w->n_in;
    w->conv_duty = 0.0;
    for (size_t b = 0; b < sp->n_beds; b++) {
        rc = bed_outlet(c, n, sp->T_in[b], w->beds[b], &w->bed_T_out[b]);
        if (rc != KPHI_OK) {
            if (c->err != NULL && sp->n_beds > 1) {
                char m[sizeof c->err->msg];
                memcpy(m, c->err->msg, sizeof m);
                m[sizeof m - 16] = '\0';
                snprintf(c->err->msg, sizeof c->err->msg, "bed %zu: %.200s", b + 1, m);
            }
            return rc;
        }
        n = w->beds[b]->n;
        if (b + 1 < sp->n_beds) {
            double Ha, Hb;
            rc = kphi_equil_enthalpy(c->set, c->conv, w->bed_T_out[b], sp->P, n, w->ew, &Ha,
                                     c->err);
            if (rc == KPHI_OK)
                rc = kphi_equil_enthalpy(c->set, c->conv, sp->T_in[b + 1], sp->P, n, w->ew, &Hb,
                                         c->err);
            if (rc != KPHI_OK)
                return rc;
            w->conv_duty += Ha - Hb;
        }
    }
    memcpy(w->n_out, n, s * sizeof(double));
    return KPHI_OK;
}

static int is_inert(const kphi_rxnset *set, size_t i)
{
    return kphi_rxnset_is_inert(set, i);
}

/* One pass from x (recycle flows of the active species, then f when solved). Fills
 * F (residuals) and the streams in w. */
static int pass(ctx *c, const double x[], size_t na, int solve_f, double F[])
{
    kphi_loop_work *w = c->w;
    const kphi_loop_spec *sp = c->sp;
    size_t s = w->s;
    double f = solve_f ? exp(x[na]) : c->f_fixed;
    for (size_t i = 0; i < s; i++)
        w->R[i] = 0.0;
    for (size_t a = 0; a < na; a++)
        w->R[w->act[a]] = x[a] > 0.0 ? x[a] : 0.0;
    double tot = 0.0;
    for (size_t i = 0; i < s; i++) {
        w->n_in[i] = w->R[i] + (sp->makeup_at == KPHI_LOOP_MAKEUP_AT_CONVERTER ? sp->makeup[i] : 0.0);
        tot += w->n_in[i];
    }
    if (!(tot > 0.0))
        return kphi_error_set(c->err, KPHI_EFAILED, NULL, no_mark,
                              "the converter inlet is empty (no recycle and the make-up joins "
                              "at the separator)");
    int rc = converter(c);
    if (rc != KPHI_OK)
        return rc;
    for (size_t i = 0; i < s; i++)
        w->feed[i] = w->n_out[i] + (sp->makeup_at == KPHI_LOOP_MAKEUP_AT_SEPARATOR ? sp->makeup[i] : 0.0);
    rc = kphi_phase_flash(c->sep, sp->T_sep, sp->P_sep, w->feed, NULL, w->pw, w->fl, c->err);
    if (rc != KPHI_OK)
        return rc;
    double Nf = 0.0;
    for (size_t i = 0; i < s; i++)
        Nf += w->feed[i];
    const kphi_flash_result *fl = w->fl;
    for (size_t i = 0; i < s; i++) {
        if (fl->n_phases == 2) {
            w->vap[i] = fl->phase[0].fraction * fl->phase[0].y[i] * Nf;
            w->liq[i] = w->feed[i] - w->vap[i];
            if (w->liq[i] < 0.0) {
                w->liq[i] = 0.0;
                w->vap[i] = w->feed[i];
            }
        } else if (fl->phase[0].kind == KPHI_PHASE_LIQUID) {
            w->vap[i] = 0.0;
            w->liq[i] = w->feed[i];
        } else {
            w->vap[i] = w->feed[i];
            w->liq[i] = 0.0;
        }
    }
    for (size_t a = 0; a < na; a++) {
        size_t i = w->act[a];
        F[a] = (1.0 - f) * w->vap[i] - w->R[i];
    }
    if (solve_f) {
        double inert = 0.0;
        for (size_t i = 0; i < s; i++)
            if (is_inert(c->set, i))
                inert += w->n_in[i];
        F[na] = inert / tot - sp->inerts_target;
    }
    return KPHI_OK;
}

/* Scaled residual: max over components of |F_i| / (|x_i| + floor), and the f equation. */
static double scaled_norm(const double F[], const double x[], size_t na, int solve_f, double floor)
{
    double m = 0.0;
    for (size_t a = 0; a < na; a++) {
        double v = fabs(F[a]) / (fabs(x[a]) + floor);
        if (v > m)
            m = v;
    }
    if (solve_f && fabs(F[na]) * 100.0 > m)
        m = fabs(F[na]) * 100.0;
    return m;
}

static double mw(const kphi_rxnset *set, size_t i)
{
    return kphi_rxnset_species(set, i)->molar_mass;
}

static void set_stream(const kphi_rxnset *set, kphi_loop_stream *st, const double n[], size_t s,
                       double T, double P, double vf)
{
    st->T = T;
    st->P = P;
    st->total = 0.0;
    st->mass = 0.0;
    for (size_t i = 0; i < s; i++) {
        st->n[i] = n[i];
        st->total += n[i];
        st->mass += n[i] * mw(set, i);
    }
    st->vapour_fraction = vf;
}

/* Mole fraction of species named `name` in stream st, or -1 when the set lacks it. */
static double flow_of(const kphi_rxnset *set, const double n[], const char *name)
{
    long i = kphi_rxnset_species_index(set, name);
    return i < 0 ? -1.0 : n[i];
}

static double stoich_number(const kphi_rxnset *set, const double n[])
{
    double h2 = flow_of(set, n, "H2"), co = flow_of(set, n, "CO"), co2 = flow_of(set, n, "CO2");
    if (h2 < 0.0 || co < 0.0 || co2 < 0.0 || !(co + co2 > 0.0))
        return NAN;
    return (h2 - co2) / (co + co2);
}

/* Overall conversion (see loop.h). */
static double overall_conversion(const kphi_rxnset *set, const kphi_loop_result *r)
{
    size_t s = r->n_species;
    const double *wt = kphi_rxnset_conversion_weights(set);
    const double *M = r->stream[KPHI_LOOP_S_MAKEUP].n;
    const double *Pg = r->stream[KPHI_LOOP_S_PURGE].n;
    const double *L = r->stream[KPHI_LOOP_S_LIQUID].n;
    size_t nkey = 0;
    for (size_t i = 0; i < s; i++)
        nkey += wt[i] != 0.0;
    long prod = r->product;
    if (nkey > 1 && prod >= 0) {
        /* the first element common to every listed species and the product */
        for (size_t e = 0; e < kphi_rxnset_n_elements(set); e++) {
            int common = kphi_rxnset_atoms(set, e, (size_t)prod) > 0.0;
            for (size_t i = 0; i < s && common; i++)
                if (wt[i] != 0.0 && !(kphi_rxnset_atoms(set, e, i) > 0.0))
                    common = 0;
            if (!common)
                continue;
            double in = 0.0;
            for (size_t i = 0; i < s; i++)
                if (wt[i] != 0.0)
                    in += kphi_rxnset_atoms(set, e, i) * M[i];
            return in > 0.0 ? kphi_rxnset_atoms(set, e, (size_t)prod) * L[prod] / in : NAN;
        }
    }
    double in = 0.0, out = 0.0;
    for (size_t i = 0; i < s; i++) {
        in += wt[i] * M[i];
        out += wt[i] * (Pg[i] + L[i]);
    }
    return in > 0.0 ? 1.0 - out / in : NAN;
}

/* Everything of the answer from the converged pass held in w. */
static int fill(ctx *c, double f, int iters, double resid, kphi_loop_result *out)
{
    kphi_loop_work *w = c->w;
    const kphi_loop_spec *sp = c->sp;
    const kphi_rxnset *set = c->set;
    size_t s = w->s;
    double *tmp = w->Fp; /* s+1 */
    const kphi_flash_result *fl = w->fl;
    set_stream(set, &out->stream[KPHI_LOOP_S_MAKEUP], sp->makeup, s, sp->T_sep, sp->P, 1.0);
    double Tin = sp->converter == KPHI_LOOP_ADIABATIC ? sp->T_in[0] : NAN;
    double Tout = sp->converter == KPHI_LOOP_ADIABATIC ? w->bed_T_out[sp->n_beds - 1] : sp->T_out;
    set_stream(set, &out->stream[KPHI_LOOP_S_CONVERTER_IN], w->n_in, s, Tin, sp->P, 1.0);
    set_stream(set, &out->stream[KPHI_LOOP_S_CONVERTER_OUT], w->n_out, s, Tout, sp->P, 1.0);
    set_stream(set, &out->stream[KPHI_LOOP_S_SEPARATOR_VAPOUR], w->vap, s, sp->T_sep, sp->P_sep,
               1.0);
    set_stream(set, &out->stream[KPHI_LOOP_S_LIQUID], w->liq, s, sp->T_sep, sp->P_sep, 0.0);
    for (size_t i = 0; i < s; i++)
        tmp[i] = f * w->vap[i];
    set_stream(set, &out->stream[KPHI_LOOP_S_PURGE], tmp, s, sp->T_sep, sp->P_sep, 1.0);
    for (size_t i = 0; i < s; i++)
        tmp[i] = (1.0 - f) * w->vap[i];
    set_stream(set, &out->stream[KPHI_LOOP_S_RECYCLE], tmp, s, sp->T_sep, sp->P, 1.0);

    const kphi_loop_stream *L = &out->stream[KPHI_LOOP_S_LIQUID];
    const kphi_loop_stream *Ci = &out->stream[KPHI_LOOP_S_CONVERTER_IN];
    const kphi_loop_stream *Co = &out->stream[KPHI_LOOP_S_CONVERTER_OUT];
    const kphi_loop_stream *M = &out->stream[KPHI_LOOP_S_MAKEUP];
    long prod = kphi_rxnset_first_product(set);
    out->product = prod;
    out->product_rate = prod >= 0 ? L->n[prod] : NAN;
    out->purity = prod >= 0 && L->total > 0.0 ? L->n[prod] / L->total : NAN;
    out->purity_mass = prod >= 0 && L->mass > 0.0 ? L->n[prod] * mw(set, (size_t)prod) / L->mass : NAN;
    const double *wt = kphi_rxnset_conversion_weights(set);
    double a = 0.0, b = 0.0;
    for (size_t i = 0; i < s; i++) {
        a += wt[i] * Ci->n[i];
        b += wt[i] * Co->n[i];
    }
    out->per_pass_conversion = a > 0.0 ? 1.0 - b / a : NAN;
    out->overall_conversion = overall_conversion(set, out);
    out->recycle_ratio = M->total > 0.0 ? out->stream[KPHI_LOOP_S_RECYCLE].total / M->total : NAN;
    out->purge_fraction = f;
    long h2 = kphi_rxnset_species_index(set, "H2");
    out->h2_purge_loss = h2 >= 0 && M->n[h2] > 0.0
                             ? out->stream[KPHI_LOOP_S_PURGE].n[h2] / M->n[h2]
                             : NAN;
    double ii = 0.0, io = 0.0;
    for (size_t i = 0; i < s; i++)
        if (is_inert(set, i)) {
            ii += Ci->n[i];
            io += Co->n[i];
        }
    out->inerts_in = ii / Ci->total;
    out->inerts_out = io / Co->total;
    out->product_in = prod >= 0 ? Ci->n[prod] / Ci->total : NAN;
    out->product_out = prod >= 0 ? Co->n[prod] / Co->total : NAN;
    out->sn_makeup = stoich_number(set, M->n);
    out->sn_in = stoich_number(set, Ci->n);
    out->n_beds = sp->converter == KPHI_LOOP_ADIABATIC ? sp->n_beds : 0;
    for (size_t k = 0; k < out->n_beds; k++) {
        out->bed_T_in[k] = sp->T_in[k];
        out->bed_T_out[k] = w->bed_T_out[k];
    }
    out->converter_duty = w->conv_duty;
    /* cooler: converter outlet (converter model) -> separator phases (separator model) */
    double Hco;
    int rc = kphi_equil_enthalpy(set, c->conv, Tout, sp->P, w->n_out, w->ew, &Hco, c->err);
    if (rc != KPHI_OK)
        return rc;
    double Nf = 0.0;
    for (size_t i = 0; i < s; i++)
        Nf += w->feed[i];
    double Hsep = 0.0;
    for (size_t k = 0; k < fl->n_phases; k++)
        Hsep += fl->phase[k].fraction * Nf * kphi_phase_molar_enthalpy(set, fl, k);
    double Hmk = 0.0;
    if (sp->makeup_at == KPHI_LOOP_MAKEUP_AT_SEPARATOR) {
        rc = kphi_equil_enthalpy(set, c->sep, sp->T_sep, sp->P_sep, sp->makeup, w->ew, &Hmk, c->err);
        if (rc != KPHI_OK)
            return rc;
    }
    out->cooler_duty = Hco + Hmk - Hsep;
    out->iterations = iters;
    out->residual = resid;
    /* element balance: make-up = liquid + purge */
    for (size_t i = 0; i < s; i++)
        tmp[i] = L->n[i] + out->stream[KPHI_LOOP_S_PURGE].n[i];
    out->balance_error = kphi_rxnset_balance_error(set, M->n, tmp);
    return KPHI_OK;
}

static int check_spec(const kphi_rxnset *set, const kphi_eos *conv, const kphi_eos *sep,
                      const kphi_loop_spec *sp, kphi_error *err)
{
    size_t s = kphi_rxnset_n_species(set);
    if (kphi_eos_size(conv) != s || kphi_eos_size(sep) != s)
        return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark,
                              "the models are not of the reaction set's size");
    if (!kphi_phase_model_ok(kphi_eos_get_model(sep)))
        return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark,
                              "the separator needs a cubic equation of state (rk, srk or pr)");
    double tot = 0.0, inert = 0.0;
    for (size_t i = 0; i < s; i++) {
        if (!(isfinite(sp->makeup[i]) && sp->makeup[i] >= 0.0))
            return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark,
                                  "make-up flow of %s is %g; expected a value >= 0",
                                  kphi_rxnset_species(set, i)->name, sp->makeup[i]);
        tot += sp->makeup[i];
        if (is_inert(set, i))
            inert += sp->makeup[i];
    }
    if (!(tot > 0.0))
        return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark, "the make-up is empty");
    if (!(sp->P > 0.0 && sp->P_sep > 0.0 && sp->T_sep > 0.0))
        return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark,
                              "loop pressure, separator pressure and temperature must be "
                              "positive");
    if (!(sp->approach >= 0.0 && isfinite(sp->approach)))
        return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark,
                              "approach %g K: expected a value >= 0", sp->approach);
    if (sp->converter == KPHI_LOOP_ISOTHERMAL && !(sp->T_out > 0.0))
        return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark,
                              "converter outlet temperature is not positive");
    if (sp->converter == KPHI_LOOP_ADIABATIC &&
        !(sp->n_beds >= 1 && sp->n_beds <= KPHI_LOOP_MAX_BEDS))
        return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark,
                              "adiabatic converter with %zu beds (1 to %d)", sp->n_beds,
                              KPHI_LOOP_MAX_BEDS);
    if (sp->purge == KPHI_LOOP_PURGE_FRACTION) {
        if (!(sp->purge_fraction >= 0.0 && sp->purge_fraction <= 1.0))
            return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark,
                                  "purge fraction %g is outside 0..1", sp->purge_fraction);
        if (sp->purge_fraction >= 1.0 && sp->makeup_at == KPHI_LOOP_MAKEUP_AT_SEPARATOR)
            return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark,
                                  "nothing reaches the converter: the make-up joins at the "
                                  "separator and a purge of 100 %% takes all its vapour");
        if (sp->purge_fraction == 0.0 && inert > 0.0)
            return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark,
                                  "no steady state: the make-up carries inerts and nothing is "
                                  "purged, so they build up without limit (set a purge)");
    } else {
        if (!(sp->inerts_target > 0.0 && sp->inerts_target < 1.0))
            return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark,
                                  "inert target %g is outside (0, 1)", sp->inerts_target);
        if (!(inert > 0.0))
            return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark,
                                  "the make-up carries no inert species, so no purge holds "
                                  "%.4g %% inerts at the converter inlet",
                                  100.0 * sp->inerts_target);
    }
    return KPHI_OK;
}

/* Converged: every component's residual within REL_TOL of its flow, the inert level
 * within 1e-12 of its target, and the element balance the residuals leave (make-up -
 * liquid - purge = sum_i a_ei F_i) within BAL_TOL of the make-up's. */
static int converged(const ctx *c, const double x[], const double F[], size_t na, int solve_f,
                     double floor)
{
    kphi_loop_work *w = c->w;
    for (size_t a = 0; a < na; a++)
        if (!(fabs(F[a]) <= c->tol * (fabs(x[a]) + floor)))
            return 0;
    if (c->tol > REL_TOL)
        return 1;
    if (solve_f && !(fabs(F[na]) <= 1e-12))
        return 0;
    for (size_t e = 0; e < kphi_rxnset_n_elements(c->set); e++) {
        double b = 0.0;
        for (size_t a = 0; a < na; a++)
            b += kphi_rxnset_atoms(c->set, e, w->act[a]) * F[a];
        if (!(fabs(b) <= BAL_TOL * w->bmax))
            return 0;
    }
    return 1;
}

/* Newton's method on w->x (na recycle flows, then ln f when solve_f) from the pass
 * already evaluated there (w->F). *iters counts the steps; *norm is the final scaled
 * residual. */
static int newton(ctx *c, size_t na, int solve_f, double floor, double mtot, int *iters,
                  double *norm_out)
{
    kphi_loop_work *w = c->w;
    const kphi_loop_spec *sp = c->sp;
    kphi_error *err = c->err;
    size_t m = na + (size_t)solve_f;
    double norm = scaled_norm(w->F, w->x, na, solve_f, floor);
    int it, rc;
    for (it = 0; it < MAX_NEWTON; it++) {
        if (converged(c, w->x, w->F, na, solve_f, floor))
            break;
        /* forward-difference Jacobian; where a pass fails (a flash that does not converge
         * at that one point), a backward difference, then a step ten times larger */
        for (size_t b = 0; b < m; b++) {
            double h0 = b < na ? 1e-7 * fabs(w->x[b]) + 1e-9 * mtot : 1e-7, h = h0;
            static const double tries[3] = {1.0, -1.0, 10.0};
            for (int k = 0; k < 3; k++) {
                memcpy(w->xt, w->x, m * sizeof(double));
                h = tries[k] * h0;
                if (b < na && w->xt[b] + h < 0.0)
                    continue;
                w->xt[b] += h;
                if (err != NULL && k > 0)
                    kphi_error_clear(err);
                rc = pass(c, w->xt, na, solve_f, w->Fp);
                if (rc == KPHI_OK)
                    break;
            }
            if (rc != KPHI_OK)
                return rc;
            for (size_t a = 0; a < m; a++)
                w->J[a * m + b] = (w->Fp[a] - w->F[a]) / h;
        }
        gsl_matrix_view Jm = gsl_matrix_view_array(w->J, m, m);
        gsl_vector_view bv = gsl_vector_view_array(w->F, m);
        gsl_vector_view xv = gsl_vector_view_array(w->dx, m);
        gsl_permutation *perm = w->perm; /* allocated for s + 1; used for the first m */
        perm->size = m;
        int sg;
        int st = gsl_linalg_LU_decomp(&Jm.matrix, perm, &sg);
        if (st == GSL_SUCCESS)
            st = gsl_linalg_LU_solve(&Jm.matrix, perm, &bv.vector, &xv.vector);
        perm->size = w->s + 1;
        if (st != GSL_SUCCESS)
            return kphi_error_set(err, KPHI_EFAILED, NULL, no_mark,
                                  "loop: the recycle's Jacobian is singular");
        for (size_t a = 0; a < m; a++)
            w->dx[a] = -w->dx[a];
        /* keep flows >= 0, ln f < 0 (f < 1) and ln f within a factor e^2 per step */
        double lam = 1.0;
        for (size_t a = 0; a < na; a++)
            if (w->dx[a] < 0.0 && w->x[a] + lam * w->dx[a] < 0.0)
                lam = w->x[a] > 0.0 ? 0.99 * w->x[a] / -w->dx[a] : 0.0;
        if (solve_f) {
            if (fabs(lam * w->dx[na]) > 2.0)
                lam = 2.0 / fabs(w->dx[na]);
            if (w->x[na] + lam * w->dx[na] >= 0.0)
                lam = 0.99 * -w->x[na] / w->dx[na];
        }
        if (!(lam > 0.0))
            lam = 1e-3;
        int accepted = 0;
        double nt = norm;
        for (int ls = 0; ls < 40; ls++) {
            for (size_t a = 0; a < m; a++)
                w->xt[a] = w->x[a] + lam * w->dx[a];
            for (size_t a = 0; a < na; a++)
                if (w->xt[a] < 0.0)
                    w->xt[a] = 0.0;
            rc = pass(c, w->xt, na, solve_f, w->Ft);
            if (rc == KPHI_OK) {
                /* scaled by the flows of the current point, so that the Newton step
                 * is a descent direction of this norm */
                nt = scaled_norm(w->Ft, w->x, na, solve_f, floor);
                if (nt < (1.0 - 1e-4 * lam) * norm || converged(c, w->xt, w->Ft, na, solve_f, floor)) {
                    accepted = 1;
                    break;
                }
            } else if (lam < 1e-6) {
                return rc;
            }
            if (err != NULL)
                kphi_error_clear(err);
            lam *= 0.5;
        }
        if (!accepted)
            return kphi_error_set(err, KPHI_EFAILED, NULL, no_mark,
                                  "loop: the recycle does not converge (residual %.2g after %d "
                                  "Newton steps)%s",
                                  norm, *iters + it,
                                  sp->purge == KPHI_LOOP_PURGE_FRACTION && sp->purge_fraction == 0.0
                                      ? "; with no purge the product must leave as liquid: "
                                        "does the separator condense it?"
                                      : "");
        memcpy(w->x, w->xt, m * sizeof(double));
        memcpy(w->F, w->Ft, m * sizeof(double));
        norm = scaled_norm(w->F, w->x, na, solve_f, floor);
    }
    *iters += it;
    *norm_out = norm;
    if (it == MAX_NEWTON)
        return kphi_error_set(err, KPHI_EFAILED, NULL, no_mark,
                              "loop: the recycle did not converge in %d Newton steps (residual "
                              "%.2g)",
                              *iters, norm);
    return KPHI_OK;
}

/* Inert mole fraction at the converter inlet of the last pass. */
static double inlet_inerts(const ctx *c)
{
    const kphi_loop_work *w = c->w;
    double in = 0.0, tot = 0.0;
    for (size_t i = 0; i < w->s; i++) {
        tot += w->n_in[i];
        if (is_inert(c->set, i))
            in += w->n_in[i];
    }
    return in / tot;
}

/* The inert target was not met: say why when a purge at either end of its range shows
 * the target out of reach. The inlet's inerts fall as the purge grows: a purge of 0.1 %,
 * then 0.01 % of the separator vapour (warm from the first), shows nearly the most inerts
 * any purge gives, the rest leaving dissolved in the liquid; 100 % gives the fewest (the
 * once-through inlet). Otherwise the reason is prefixed. */
static int unreachable_inerts(ctx *c, size_t na, double floor, double mtot)
{
    kphi_loop_work *w = c->w;
    const kphi_loop_spec *sp = c->sp;
    char why[sizeof c->err->msg];
    snprintf(why, sizeof why, "%s", c->err != NULL ? c->err->msg : "");
    static const double probe[3] = {1e-3, 1e-4, 1.0};
    double y_small = NAN, f_small = NAN;
    for (int k = 0; k < 3; k++) {
        kphi_error e2;
        kphi_error_clear(&e2);
        ctx d = *c;
        d.err = &e2;
        d.f_fixed = probe[k];
        d.tol = 1e-6;
        w->have_xi = 0;
        for (size_t a = 0; a < na; a++)
            if (k == 0 || k == 2)
                w->x[a] = k == 0 ? 4.0 * sp->makeup[w->act[a]] : 0.0;
        int it = 0, rc = pass(&d, w->x, na, 0, w->F);
        double norm;
        if (rc == KPHI_OK && k < 2)
            rc = newton(&d, na, 0, floor, mtot, &it, &norm);
        if (rc == KPHI_OK)
            rc = pass(&d, w->x, na, 0, w->F);
        if (rc != KPHI_OK) {
            if (k == 0)
                k = 1; /* no warm start for 0.01 % */
            continue;
        }
        double y = inlet_inerts(&d);
        if (k < 2 && y < sp->inerts_target) {
            y_small = y;
            f_small = probe[k];
        }
        if (k == 2 && y > sp->inerts_target) {
            kphi_error_clear(c->err);
            return kphi_error_set(c->err, KPHI_EINPUT, NULL, no_mark,
                                  "no purge found for %.4g %% inerts at the converter inlet: "
                                  "even a purge of 100 %% of the separator vapour leaves %.4g "
                                  "%%; ask for more inerts",
                                  100.0 * sp->inerts_target, 100.0 * y);
        }
    }
    kphi_error_clear(c->err);
    if (!isnan(y_small))
        return kphi_error_set(c->err, KPHI_EINPUT, NULL, no_mark,
                              "no purge found for %.4g %% inerts at the converter inlet: a purge "
                              "of %g %% of the separator vapour holds only %.4g %% (the rest "
                              "leave dissolved in the liquid); ask for fewer inerts",
                              100.0 * sp->inerts_target, 100.0 * f_small, 100.0 * y_small);
    return kphi_error_set(c->err, KPHI_EFAILED, NULL, no_mark,
                          "no purge found for %.4g %% inerts at the converter inlet: %.180s",
                          100.0 * sp->inerts_target, why);
}

int kphi_loop_solve(const kphi_rxnset *set, const kphi_eos *conv, const kphi_eos *sep,
                    const kphi_loop_spec *sp, const double recycle_guess[], kphi_loop_work *w,
                    kphi_loop_result *out, kphi_error *err)
{
    size_t s = kphi_rxnset_n_species(set);
    if (w == NULL || w->s != s || out == NULL || out->n_species != s)
        return kphi_error_set(err, KPHI_EINPUT, NULL, no_mark,
                              "loop workspace or result does not match the reaction set");
    int rc = check_spec(set, conv, sep, sp, err);
    if (rc != KPHI_OK)
        return rc;
    ctx c = {set, conv, sep, sp, w, err, NULL, 0.0, 0.0, 0.0, KPHI_OK, sp->purge_fraction,
             REL_TOL};
    w->have_xi = 0;
    double mtot = 0.0, mtot_inert = 0.0;
    for (size_t i = 0; i < s; i++) {
        mtot += sp->makeup[i];
        if (is_inert(set, i))
            mtot_inert += sp->makeup[i];
    }
    w->bmax = 0.0;
    for (size_t e = 0; e < kphi_rxnset_n_elements(set); e++) {
        double b = 0.0;
        for (size_t i = 0; i < s; i++)
            b += kphi_rxnset_atoms(set, e, i) * sp->makeup[i];
        if (b > w->bmax)
            w->bmax = b;
    }
    /* species that can flow: every species but inerts absent from the make-up */
    size_t na = 0;
    for (size_t i = 0; i < s; i++)
        if (!(is_inert(set, i) && sp->makeup[i] == 0.0))
            w->act[na++] = i;
    int solve_f = sp->purge == KPHI_LOOP_PURGE_INERTS;
    double floor = 1e-12 * mtot;

    if (!solve_f && sp->purge_fraction >= 1.0) {
        /* once through: nothing comes back */
        for (size_t a = 0; a < na; a++)
            w->x[a] = 0.0;
        rc = pass(&c, w->x, na, 0, w->F);
        if (rc != KPHI_OK)
            return rc;
        return fill(&c, 1.0, 0, 0.0, out);
    }
    for (size_t a = 0; a < na; a++) {
        size_t i = w->act[a];
        w->x[a] = recycle_guess != NULL && isfinite(recycle_guess[i]) && recycle_guess[i] >= 0.0
                      ? recycle_guess[i]
                      : 4.0 * sp->makeup[i];
    }
    int iters = 0;
    double norm = 0.0;
    if (solve_f) {
        /* First the recycle at a fixed purge estimated from the inert balance (every inert
         * leaves with the purge, f V_I = M_I, and the vapour's inerts are about those of
         * the converter inlet at the target with the starting recycle R: f = M_I /
         * (y_target (M + R))); then the recycle and ln f together from that steady state.
         * The joint iteration started far from a steady state drives f to a bound, because
         * the inert level at the inlet depends on f only through the recycle. */
        double rtot = 0.0;
        for (size_t a = 0; a < na; a++)
            rtot += w->x[a];
        double f0 = mtot_inert / (sp->inerts_target * (mtot + rtot));
        if (!(f0 >= 1e-4))
            f0 = 1e-4;
        if (f0 > 0.5)
            f0 = 0.5;
        c.f_fixed = f0;
        c.tol = 1e-3; /* near enough for the joint iteration */
        rc = pass(&c, w->x, na, 0, w->F);
        if (rc == KPHI_OK)
            rc = newton(&c, na, 0, floor, mtot, &iters, &norm);
        if (rc != KPHI_OK)
            return rc == KPHI_EFAILED ? unreachable_inerts(&c, na, floor, mtot) : rc;
        c.tol = REL_TOL;
        w->x[na] = log(f0);
    }
    rc = pass(&c, w->x, na, solve_f, w->F);
    if (rc == KPHI_OK)
        rc = newton(&c, na, solve_f, floor, mtot, &iters, &norm);
    if (rc != KPHI_OK)
        return solve_f && rc == KPHI_EFAILED ? unreachable_inerts(&c, na, floor, mtot) : rc;
    /* the state in w is that of the last pass, the one at x: the converged start, or the
     * trial the line search accepted (the Jacobian's passes come before it) */
    return fill(&c, solve_f ? exp(w->x[na]) : sp->purge_fraction, iters, norm, out);
}

/* ---------------------------------------------------- equivalent pressure */

typedef struct {
    const kphi_rxnset *set;
    const kphi_eos *conv, *sep;
    kphi_loop_spec spec;
    double target;
    kphi_loop_work *w;
    kphi_loop_result *tmp;
    kphi_error *err;
    int rc;
    int warm;
} eq_ctx;

static double eq_f(double lnP, void *p)
{
    eq_ctx *c = p;
    if (c->rc != KPHI_OK)
        return NAN;
    c->spec.P = exp(lnP);
    const double *guess = c->warm ? c->tmp->stream[KPHI_LOOP_S_RECYCLE].n : NULL;
    int rc = kphi_loop_solve(c->set, c->conv, c->sep, &c->spec, guess, c->w, c->tmp, c->err);
    if (rc != KPHI_OK) {
        c->rc = rc;
        return NAN;
    }
    c->warm = 1;
    return c->tmp->product_rate - c->target;
}

int kphi_loop_equivalent_pressure(const kphi_rxnset *set, const kphi_eos *conv_ideal,
                                  const kphi_eos *sep, const kphi_loop_spec *spec,
                                  double product_rate, kphi_loop_work *w, kphi_loop_result *tmp,
                                  double *P, kphi_error *err)
{
    eq_ctx c = {set, conv_ideal, sep, *spec, product_rate, w, tmp, err, KPHI_OK, 0};
    double lo = log(spec->P / 4.0), hi = log(spec->P * 4.0);
    double flo = eq_f(lo, &c);
    if (c.rc != KPHI_OK)
        return c.rc;
    c.warm = 0;
    double fhi = eq_f(hi, &c);
    if (c.rc != KPHI_OK)
        return c.rc;
    if ((flo > 0.0) == (fhi > 0.0))
        return kphi_error_set(err, KPHI_EFAILED, NULL, no_mark,
                              "no converter pressure between %.4g and %.4g bar makes the same "
                              "product with the ideal gas",
                              exp(lo) / 1e5, exp(hi) / 1e5);
    gsl_function F = {eq_f, &c};
    gsl_root_fsolver *br = gsl_root_fsolver_alloc(gsl_root_fsolver_brent);
    if (br == NULL)
        return kphi_error_set(err, KPHI_ENOMEM, NULL, no_mark, "out of memory");
    int st = gsl_root_fsolver_set(br, &F, lo, hi);
    double root = 0.5 * (lo + hi);
    for (int it = 0; st == GSL_SUCCESS && it < 100; it++) {
        st = gsl_root_fsolver_iterate(br);
        if (c.rc != KPHI_OK)
            break;
        root = gsl_root_fsolver_root(br);
        if (gsl_root_fsolver_x_upper(br) - gsl_root_fsolver_x_lower(br) < 1e-10)
            break;
    }
    gsl_root_fsolver_free(br);
    if (c.rc != KPHI_OK)
        return c.rc;
    if (st != GSL_SUCCESS)
        return kphi_error_set(err, KPHI_EFAILED, NULL, no_mark,
                              "equivalent ideal-gas loop pressure: %s", gsl_strerror(st));
    *P = exp(root);
    return KPHI_OK;
}

int kphi_loop_spec_from_case(const kphi_case *cs, double mk[], kphi_loop_spec *sp)
{
    const kphi_case_loop *g = kphi_case_get_loop(cs);
    size_t s = kphi_rxnset_n_species(kphi_case_rxnset(cs));
    double tot = 0.0;
    for (size_t i = 0; i < s; i++)
        tot += g->makeup[i];
    double scale = g->flow == KPHI_CASE_MAKEUP_RATE ? g->rate / tot : 100.0 / tot;
    for (size_t i = 0; i < s; i++)
        mk[i] = g->makeup[i] * scale;
    memset(sp, 0, sizeof *sp);
    sp->makeup = mk;
    sp->makeup_at = g->makeup_at_separator ? KPHI_LOOP_MAKEUP_AT_SEPARATOR
                                           : KPHI_LOOP_MAKEUP_AT_CONVERTER;
    sp->P = kphi_case_P(cs);
    sp->converter = g->adiabatic ? KPHI_LOOP_ADIABATIC : KPHI_LOOP_ISOTHERMAL;
    sp->T_out = g->T_out;
    sp->n_beds = g->n_beds;
    for (size_t k = 0; k < g->n_beds && k < KPHI_LOOP_MAX_BEDS; k++)
        sp->T_in[k] = g->T_in[k];
    sp->approach = g->approach;
    sp->T_sep = g->T_sep;
    sp->P_sep = isfinite(g->P_sep) ? g->P_sep : sp->P;
    sp->purge = g->purge_inerts ? KPHI_LOOP_PURGE_INERTS : KPHI_LOOP_PURGE_FRACTION;
    sp->purge_fraction = g->purge_fraction;
    sp->inerts_target = g->inerts_target;
    size_t kb = kphi_case_K_basis(cs); /* 'all' is refused before a loop is solved */
    sp->K_basis = kb != KPHI_CASE_K_ALL ? kb : KPHI_K_TABLES;
    return g->flow == KPHI_CASE_MAKEUP_BASIS;
}
