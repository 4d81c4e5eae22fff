/* kphi eos, Beattie-Bridgeman part: the equation of state of Beattie & Bridgeman (1928),
 * Proc. Am. Acad. Arts Sci. 63, 229 (journal details from memory),
 *   P = R T (1 - eps)(v + B)/v^2 - A/v^2,  A = A0 (1 - a/v),  B = B0 (1 - b/v),
 *   eps = c/(v T^3),
 * for gas mixtures (model bb), and its second virial coefficient (model bbv).
 *
 * Units: SI (T in K, P in Pa, v in m3/mol, A0 in Pa m6/mol2, a, B0, b in m3/mol, c in
 * m3 K3/mol), R = KPHI_R.
 *
 * Mixtures. Beattie's combination of the constants as used by Gillespie & Beattie (1930),
 * Phys. Rev. 36, 743, for the ammonia equilibrium (from memory; the paper could not be
 * seen): A0 = (sum_i y_i A0_i^1/2)^2, and a, B0, b, c linear in the mole fractions. A
 * binary k_ij, when set, scales the cross term A0_ij = (A0_i A0_j)^1/2 (1 - k_ij), as in
 * the cubics (none is published for this model; the shipped sets set none). The
 * alternative combination of B0 by Lorentz's rule, B0_ij = ((B0_i^1/3 + B0_j^1/3)/2)^3,
 * B0 = sum sum y_i y_j B0_ij, is switched on with kphi_eos_set_bb_lorentz().
 *
 * Expanded in the molar density rho = 1/v the equation is a virial series that ends at
 * the fourth coefficient,
 *   Z = 1 + B2 rho + B3 rho^2 + B4 rho^3,
 *   B2 = B0 - A0/(R T) - c/T^3,  B3 = -B0 b + a A0/(R T) - B0 c/T^3,  B4 = B0 b c/T^3,
 * so the reduced residual Helmholtz energy of n moles in V is exact and polynomial:
 *   F = A_res/(R T) = sum_k G_k(n)/V^k,
 *   G_1 = n L_B0 - Q_A/(R T) - n L_c/T^3,
 *   G_2 = (-n L_B0 L_b + L_a Q_A/(R T) - n L_B0 L_c/T^3)/2,
 *   G_3 = n L_B0 L_b L_c/(3 T^3),
 * with the linear forms L_x = sum_i n_i x_i, Q_A = sum_i sum_j n_i n_j A0_ij, and n L_B0
 * replaced by sum sum n_i n_j B0_ij under Lorentz's rule. Every term is a constant times
 * a product of linear and quadratic forms in n, so its gradient and Hessian in n follow
 * from the product rule (term_weights(), assemble()). Then, in reduced form (n = 1, V = v),
 * following Michelsen & Mollerup (2007), "Thermodynamic Models: Fundamentals and
 * Computational Aspects", 2nd ed., ch. 2:
 *   ln phi_i = dF/dn_i - ln Z,
 *   n d ln phi_i/d n_j |_(T,P) = n d2F/dn_i dn_j + 1 + n (dP/dn_i)(dP/dn_j)/(R T dP/dV),
 *   (G - G_ig)/(R T) = F + Z - 1 - ln Z,  (H - H_ig)/(R T) = Z - 1 - T (dF/dT)_(V,n),
 *   S - S_ig = (H - G)/T.
 *
 * The gas root. P(rho) is a quartic in rho; the root is found by Newton's method kept
 * inside a bracket on which P rises monotonically with rho (the first turning point of
 * the isotherm, found from the quadratic d2P/drho2, bounds the bracket when there is one).
 *
 * Range. Beattie & Bridgeman fitted the constants to compressibility data at densities up
 * to about the critical one, and their equation is commonly held reliable to about that
 * density (Beattie & Bridgeman 1928; Cengel & Boles, "Thermodynamics: An Engineering
 * Approach", ch. 3, give about 0.8 of the critical density; both from memory). kphi
 * refuses (KPHI_EFAILED) states whose density exceeds KPHI__BB_RHO_R = 1 times the
 * pseudo-critical density 1/sum_i y_i Vc_i (Kay's rule, as the virial model uses), and
 * isotherms that turn below it. Below the pseudo-critical temperature sum_i y_i Tc_i the
 * limit is KPHI__BB_RHO_R_SUB = 0.5 (a choice, the virial model's limit): the equation has
 * no liquid, and saturated vapours are below half the critical density except within a
 * few kelvin of Tc, so a denser "gas" there is one that condenses. tests/validation_eos.c checks Z of N2, CH4 and H2 against
 * reference equations over that range. Beyond it the equation goes wrong quickly: for the
 * ammonia-rich mixtures of Larson's 1000 atm measurements (reduced densities 1.4-1.5) it
 * puts the equilibrium NH3 5-12 points low.
 *
 * Second virial form (bbv). B_ij = B0_ij - A0_ij/(R T) - (c_i + c_j)/(2 T^3), with B0_ij
 * = (B0_i + B0_j)/2 (or Lorentz's rule), is the second virial coefficient the equation
 * implies; used in the pressure form Z = 1 + B P/(R T) of the virial model (src/eos.c) it
 * is the low-pressure approximation of Gillespie & Beattie (1930) for the mass-action
 * function of the ammonia equilibrium (from memory). They applied it to the measurements
 * up to 1000 atm, where it does better than the full equation (tests/validation_ammonia.c).
 * There it serves as a correlation, far beyond the densities where a truncated virial
 * series means anything physically: Larson's 1000 atm equilibria lie at 1.4-1.55 times the
 * pseudo-critical density. kphi allows it to KPHI__BBV_RHO_R = 2 times the pseudo-critical
 * density (those states with a margin for the solver's path toward them; a choice) and to
 * Z >= 0.5. */
#include "eos_internal.h"

#include <math.h>
#include <string.h>

#include "kphi/thermo.h"

static const kphi_mark no_mark = {0, 0};

/* The factors of the terms of F: linear forms (one, B0, b, a, c) and quadratic forms
 * (A0, and B0 under Lorentz's rule). */
enum { F_ONE, F_B0, F_B, F_A, F_C, F_QA, F_QB, N_FACTORS };

/* The temperature function a term is multiplied by: 1, 1/(R T) or 1/T^3. */
enum { T_ONE, T_RT, T_T3 };

typedef struct {
    int k;      /* power of 1/V */
    double m;   /* multiplier */
    int tf;     /* temperature function */
    int nf;     /* factors */
    int f[4];
} term;

/* The seven terms of G_1..G_3 (file comment), B0 linear and by Lorentz's rule. */
static const term TERMS_LINEAR[7] = {
    {1, 1.0, T_ONE, 2, {F_ONE, F_B0}},
    {1, -1.0, T_RT, 1, {F_QA}},
    {1, -1.0, T_T3, 2, {F_ONE, F_C}},
    {2, -0.5, T_ONE, 3, {F_ONE, F_B0, F_B}},
    {2, 0.5, T_RT, 2, {F_A, F_QA}},
    {2, -0.5, T_T3, 3, {F_ONE, F_B0, F_C}},
    {3, 1.0 / 3.0, T_T3, 4, {F_ONE, F_B0, F_B, F_C}},
};
static const term TERMS_LORENTZ[7] = {
    {1, 1.0, T_ONE, 1, {F_QB}},
    {1, -1.0, T_RT, 1, {F_QA}},
    {1, -1.0, T_T3, 2, {F_ONE, F_C}},
    {2, -0.5, T_ONE, 2, {F_QB, F_B}},
    {2, 0.5, T_RT, 2, {F_A, F_QA}},
    {2, -0.5, T_T3, 2, {F_QB, F_C}},
    {3, 1.0 / 3.0, T_T3, 3, {F_QB, F_B, F_C}},
};

/* One evaluation's factors at n = y: values, T d(value)/dT, gradients (vectors of n). */
typedef struct {
    const kphi_eos *eos;
    size_t n;
    double T;
    double val[N_FACTORS];
    double valT[N_FACTORS];
    const double *grad[N_FACTORS];
    double coef[3];  /* 1, 1/(R T), 1/T^3 */
    double expo[3];  /* T d ln(coef)/dT: 0, -1, -3 */
    const double *mat[N_FACTORS]; /* [n*n] matrices of the quadratic factors, else NULL */
} factors;

/* B0_ij by Lorentz's rule. */
static double lorentz_b0(const kphi__eos_comp *ci, const kphi__eos_comp *cj)
{
    double m = 0.5 * (ci->bb_B13 + cj->bb_B13);
    return m * m * m;
}

/* Fill the factors at composition y (w->e, w->bbg, w->bbq hold the vectors). */
static void factors_set(factors *fx, const kphi_eos *eos, double T, const double y[],
                        kphi_eos_work *w)
{
    size_t n = eos->n;
    const kphi__eos_comp *c = eos->c;
    fx->eos = eos;
    fx->n = n;
    fx->T = T;
    double *one = w->e, *b0 = w->bbg, *b = w->bbg + n, *a = w->bbg + 2 * n,
           *cc = w->bbg + 3 * n, *gqa = w->bbq, *gqb = w->bbq + n;
    double L[5] = {0.0, 0.0, 0.0, 0.0, 0.0};
    for (size_t i = 0; i < n; i++) {
        one[i] = 1.0;
        b0[i] = c[i].bb_B0;
        b[i] = c[i].bb_b;
        a[i] = c[i].bb_a;
        cc[i] = c[i].bb_c;
        L[0] += y[i];
        L[1] += y[i] * b0[i];
        L[2] += y[i] * b[i];
        L[3] += y[i] * a[i];
        L[4] += y[i] * cc[i];
    }
    const double *vec[5] = {one, b0, b, a, cc};
    for (int f = F_ONE; f <= F_C; f++) {
        fx->val[f] = L[f];
        fx->valT[f] = 0.0;
        fx->grad[f] = vec[f];
    }
    /* Q_A = y^T M_A y with M_A,ij = s_i s_j (1 - k_ij(T)), its gradient 2 M_A y and
     * T dQ_A/dT; the Lorentz B0 form likewise (matrices in w->Bij, w->dBij) */
    double *ma = w->Bij, *mb = w->dBij;
    double qa = 0.0, qat = 0.0;
    for (size_t i = 0; i < n; i++) {
        double g = 0.0, gt = 0.0;
        for (size_t j = 0; j < n; j++) {
            double Tdomk = 0.0, om = eos->any_kij ? kphi__eos_omk(eos, i, j, T, &Tdomk) : 1.0;
            double ss = c[i].bb_s * c[j].bb_s;
            ma[i * n + j] = ss * om;
            g += ss * om * y[j];
            gt += ss * Tdomk * y[j];
        }
        gqa[i] = 2.0 * g;
        qa += y[i] * g;
        qat += y[i] * gt;
    }
    fx->val[F_QA] = qa;
    fx->valT[F_QA] = qat;
    fx->grad[F_QA] = gqa;
    fx->mat[F_QA] = ma;
    double qb = 0.0;
    for (size_t i = 0; i < n && eos->bb_lorentz; i++) {
        double g = 0.0;
        for (size_t j = 0; j < n; j++) {
            mb[i * n + j] = lorentz_b0(&c[i], &c[j]);
            g += mb[i * n + j] * y[j];
        }
        gqb[i] = 2.0 * g;
        qb += y[i] * g;
    }
    fx->val[F_QB] = qb;
    fx->valT[F_QB] = 0.0;
    fx->grad[F_QB] = gqb;
    fx->mat[F_QB] = eos->bb_lorentz ? mb : NULL;
    for (int f = F_ONE; f <= F_C; f++)
        fx->mat[f] = NULL;
    fx->coef[T_ONE] = 1.0;
    fx->coef[T_RT] = 1.0 / (KPHI_R * T);
    fx->coef[T_T3] = 1.0 / (T * T * T);
    fx->expo[T_ONE] = 0.0;
    fx->expo[T_RT] = -1.0;
    fx->expo[T_T3] = -3.0;
}

/* Product of the factor values of t, leaving out positions skip1 and skip2 (-1: none). */
static double others(const factors *fx, const term *t, int skip1, int skip2)
{
    double p = 1.0;
    for (int k = 0; k < t->nf; k++)
        if (k != skip1 && k != skip2)
            p *= fx->val[t->f[k]];
    return p;
}

/* Value of term t and T d(value)/dT. */
static double term_value(const factors *fx, const term *t, double *TdG)
{
    double C = t->m * fx->coef[t->tf];
    double G = C * others(fx, t, -1, -1);
    double dT = fx->expo[t->tf] * G;
    for (int k = 0; k < t->nf; k++)
        if (fx->valT[t->f[k]] != 0.0)
            dT += C * fx->valT[t->f[k]] * others(fx, t, k, -1);
    *TdG = dT;
    return G;
}

/* The derivatives of the terms are sums over the factors' gradients (vectors of n) and,
 * for the Hessian, over their pairs and the quadratic factors' matrices:
 *   d(C prod f)/dn_i = sum_k C prod_(l != k) f_l g_k,i,
 *   d2(C prod f)/dn_i dn_j = sum_(k != l) C prod_(m != k, l) f_m g_k,i g_l,j
 *                          + sum_k C prod_(l != k) f_l 2 M_k,ij.
 * Each term adds only scalar weights here: gw[f] and gv[f] on the gradient of factor f
 * (times rho^k for F_i, times -k rho^(k+1) for d2F/dn_i dV), W[f][g] on the outer product
 * of two gradients and mw[f] on a factor's matrix (times rho^k); the vectors are combined
 * once per evaluation (assemble()). */
typedef struct {
    double gw[N_FACTORS], gv[N_FACTORS], mw[N_FACTORS];
    double W[N_FACTORS][N_FACTORS];
} weights;

static void term_weights(const factors *fx, const term *t, double wg, double wv, weights *q)
{
    double C = t->m * fx->coef[t->tf];
    for (int k = 0; k < t->nf; k++) {
        int fk = t->f[k];
        double pk = C * others(fx, t, k, -1);
        q->gw[fk] += wg * pk;
        q->gv[fk] += wv * pk;
        if (fx->mat[fk] != NULL)
            q->mw[fk] += 2.0 * wg * pk;
        for (int l = 0; l < t->nf; l++)
            if (l != k)
                q->W[fk][t->f[l]] += wg * C * others(fx, t, k, l);
    }
}

/* F_i, F_iV (gi, gv) and, with H not NULL, the Hessian H[n*n] from the weights; u[7n] is
 * scratch. */
static void assemble(const factors *fx, const weights *q, double gi[], double gv[], double H[],
                     double u[])
{
    size_t n = fx->n;
    for (size_t i = 0; i < n; i++) {
        double a = 0.0, b = 0.0;
        for (int f = 0; f < N_FACTORS; f++) {
            a += q->gw[f] * fx->grad[f][i];
            b += q->gv[f] * fx->grad[f][i];
        }
        gi[i] = a;
        gv[i] = b;
    }
    if (H == NULL)
        return;
    /* u_f = sum_g W[f][g] grad_g; H = sum_f grad_f u_f^T + sum_f mw[f] M_f (symmetric) */
    int used[N_FACTORS], nu = 0;
    for (int f = 0; f < N_FACTORS; f++) {
        int any = 0;
        for (int g = 0; g < N_FACTORS; g++)
            any |= q->W[f][g] != 0.0;
        if (!any)
            continue;
        double *uf = u + (size_t)nu * n;
        for (size_t j = 0; j < n; j++)
            uf[j] = 0.0;
        for (int g = 0; g < N_FACTORS; g++) {
            double wfg = q->W[f][g];
            if (wfg == 0.0)
                continue;
            const double *gg = fx->grad[g];
            for (size_t j = 0; j < n; j++)
                uf[j] += wfg * gg[j];
        }
        used[nu++] = f;
    }
    for (size_t i = 0; i < n; i++)
        for (size_t j = i; j < n; j++) {
            double v = 0.0;
            for (int k = 0; k < nu; k++)
                v += fx->grad[used[k]][i] * u[(size_t)k * n + j];
            for (int f = F_QA; f <= F_QB; f++)
                if (fx->mat[f] != NULL)
                    v += q->mw[f] * fx->mat[f][i * n + j];
            H[i * n + j] = H[j * n + i] = v;
        }
}

/* The same derivatives written out for Beattie's linear B0 (the default), where every
 * factor but Q_A is a linear form: with w_k the weight of the terms of 1/V^k and the
 * term constants C1..C7 of TERMS_LINEAR,
 *   d/dn_i = al_1 + al_B B0_i + al_b b_i + al_c c_i + al_a a_i + al_A (dQ_A/dn_i),
 *   d2/dn_i dn_j = al_B (B0_i + B0_j) + al_b (b_i + b_j) + al_c (c_i + c_j)
 *                + W_Bb (B0_i b_j + b_i B0_j) + W_Bc (B0_i c_j + c_i B0_j)
 *                + W_bc (b_i c_j + c_i b_j) + W_aA (a_i dQ_A/dn_j + dQ_A/dn_i a_j)
 *                + 2 al_A M_A,ij
 * (al_* with the Hessian's weights), the sums of term_weights() and assemble() for this
 * table, without their loops: about half the cost of an evaluation. */
static void linear_coefs(const factors *fx, const double wk[3], double al[6])
{
    const double k_ = fx->coef[T_RT], th = fx->coef[T_T3];
    const double B = fx->val[F_B0], b = fx->val[F_B], a = fx->val[F_A], c = fx->val[F_C];
    const double QA = fx->val[F_QA];
    const double C4 = -0.5, C5 = 0.5 * k_, C6 = -0.5 * th, C7 = th / 3.0;
    al[0] = wk[0] * (B - th * c) + wk[1] * (C4 * B * b + C6 * B * c) + wk[2] * C7 * B * b * c;
    al[1] = wk[0] + wk[1] * (C4 * b + C6 * c) + wk[2] * C7 * b * c; /* B0 */
    al[2] = wk[1] * C4 * B + wk[2] * C7 * B * c;                     /* b */
    al[3] = -wk[0] * th + wk[1] * C6 * B + wk[2] * C7 * B * b;       /* c */
    al[4] = wk[1] * C5 * QA;                                         /* a */
    al[5] = -wk[0] * k_ + wk[1] * C5 * a;                            /* dQ_A/dn */
}

static void linear_derivatives(const factors *fx, double rho, double gi[], double gv[],
                               double H[])
{
    size_t n = fx->n;
    const double *B = fx->grad[F_B0], *b = fx->grad[F_B], *a = fx->grad[F_A],
                 *c = fx->grad[F_C], *gA = fx->grad[F_QA];
    const double wg[3] = {rho, rho * rho, rho * rho * rho};
    const double wv[3] = {-wg[1], -2.0 * wg[2], -3.0 * wg[2] * rho};
    double ag[6], av[6];
    linear_coefs(fx, wg, ag);
    linear_coefs(fx, wv, av);
    for (size_t i = 0; i < n; i++) {
        gi[i] = ag[0] + ag[1] * B[i] + ag[2] * b[i] + ag[3] * c[i] + ag[4] * a[i] + ag[5] * gA[i];
        gv[i] = av[0] + av[1] * B[i] + av[2] * b[i] + av[3] * c[i] + av[4] * a[i] + av[5] * gA[i];
    }
    if (H == NULL)
        return;
    const double th = fx->coef[T_T3];
    const double Bm = fx->val[F_B0], bm = fx->val[F_B], cm = fx->val[F_C];
    const double WBb = -0.5 * wg[1] + wg[2] * th / 3.0 * cm;
    const double WBc = -0.5 * th * wg[1] + wg[2] * th / 3.0 * bm;
    const double Wbc = wg[2] * th / 3.0 * Bm;
    const double WaA = 0.5 * fx->coef[T_RT] * wg[1];
    const double *M = fx->mat[F_QA];
    for (size_t i = 0; i < n; i++)
        for (size_t j = i; j < n; j++) {
            double v = ag[1] * (B[i] + B[j]) + ag[2] * (b[i] + b[j]) + ag[3] * (c[i] + c[j]) +
                       WBb * (B[i] * b[j] + b[i] * B[j]) + WBc * (B[i] * c[j] + c[i] * B[j]) +
                       Wbc * (b[i] * c[j] + c[i] * b[j]) + WaA * (a[i] * gA[j] + gA[i] * a[j]) +
                       2.0 * ag[5] * M[i * n + j];
            H[i * n + j] = H[j * n + i] = v;
        }
}

/* f(rho) = rho Z(rho) - pi and f'(rho), Z = 1 + b1 rho + b2 rho^2 + b3 rho^3. */
static double pfun(const double b[3], double pi, double rho, double *df)
{
    *df = 1.0 + rho * (2.0 * b[0] + rho * (3.0 * b[1] + rho * 4.0 * b[2]));
    return rho * (1.0 + rho * (b[0] + rho * (b[1] + rho * b[2]))) - pi;
}

/* The upper end of the bracket: rho_lim, or the first rho in (0, rho_lim) where
 * f' = 1 + 2 b1 rho + 3 b2 rho^2 + 4 b3 rho^3 falls to zero (the isotherm turns). */
static double monotone_end(const double b[3], double rho_lim, int *turns)
{
    *turns = 0;
    double low = 1.0 + fmin(0.0, 2.0 * b[0]) * rho_lim +
                 fmin(0.0, 3.0 * b[1]) * rho_lim * rho_lim +
                 fmin(0.0, 4.0 * b[2]) * rho_lim * rho_lim * rho_lim;
    if (low > 0.0)
        return rho_lim; /* f' > 0 throughout: nothing to look for */
    /* f' is monotone between the zeros of f'' = 2 b1 + 6 b2 rho + 12 b3 rho^2 */
    double brk[4] = {0.0, rho_lim, rho_lim, rho_lim};
    size_t nb = 1;
    double qa = 12.0 * b[2], qb = 6.0 * b[1], qc = 2.0 * b[0];
    if (qa != 0.0) {
        double D = qb * qb - 4.0 * qa * qc;
        if (D >= 0.0) {
            double t = -0.5 * (qb + copysign(sqrt(D), qb));
            double r1 = t / qa, r2 = t != 0.0 ? qc / t : r1;
            double lo = fmin(r1, r2), hi = fmax(r1, r2);
            if (lo > 0.0 && lo < rho_lim)
                brk[nb++] = lo;
            if (hi > 0.0 && hi < rho_lim && hi > lo)
                brk[nb++] = hi;
        }
    } else if (qb != 0.0) {
        double r = -qc / qb;
        if (r > 0.0 && r < rho_lim)
            brk[nb++] = r;
    }
    brk[nb++] = rho_lim;
    for (size_t k = 0; k + 1 < nb; k++) {
        double a = brk[k], c = brk[k + 1], d;
        pfun(b, 0.0, c, &d);
        if (d > 0.0)
            continue;
        for (int it = 0; it < 100; it++) { /* f'(a) > 0 >= f'(c) */
            double m = 0.5 * (a + c);
            pfun(b, 0.0, m, &d);
            if (d > 0.0)
                a = m;
            else
                c = m;
        }
        *turns = 1;
        return a;
    }
    return rho_lim;
}

int kphi__eos_eval_bb(const kphi_eos *eos, double T, double P, const double y[],
                      double lnphi[], double dlnphi[], kphi_eos_state *st, kphi_eos_work *w,
                      kphi_error *err)
{
    size_t n = eos->n;
    const term *terms = eos->bb_lorentz ? TERMS_LORENTZ : TERMS_LINEAR;
    factors fx;
    factors_set(&fx, eos, T, y, w);

    /* the virial coefficients of Z(rho): b_k = sum over the terms of 1/V^k of k G */
    double G[7], TG[7], b[3] = {0.0, 0.0, 0.0};
    for (int t = 0; t < 7; t++) {
        G[t] = term_value(&fx, &terms[t], &TG[t]);
        b[terms[t].k - 1] += terms[t].k * G[t];
    }

    /* the gas root rho in (0, rho_hi], P rising with rho on the whole bracket */
    double vcm = 0.0, Tpc = 0.0;
    for (size_t i = 0; i < n; i++) {
        vcm += y[i] * eos->c[i].vc13 * eos->c[i].vc13 * eos->c[i].vc13;
        Tpc += y[i] * eos->c[i].Tc;
    }
    const double rho_r_max = T >= Tpc ? KPHI__BB_RHO_R : KPHI__BB_RHO_R_SUB;
    const double pi = P / (KPHI_R * T), rho_lim = rho_r_max / vcm;
    int turns;
    double rho_hi = monotone_end(b, rho_lim, &turns), d;
    double f_hi = pfun(b, pi, rho_hi, &d);
    if (!(f_hi >= 0.0)) {
        if (turns)
            return kphi_error_set(err, KPHI_EFAILED, NULL, no_mark,
                                  "bb outside its range: no gas root at T = %.2f K, P = "
                                  "%.4g bar, the Beattie-Bridgeman isotherm turns (dP/drho "
                                  "<= 0) at a reduced density of %.2f, below that pressure "
                                  "(use a cubic equation of state)",
                                  T, P / 1e5, rho_hi * vcm);
    {
        if (T < Tpc)
            return kphi_error_set(err, KPHI_EFAILED, NULL, no_mark,
                                  "bb outside its range: at T = %.2f K, below the "
                                  "pseudo-critical temperature "
                                  "%.1f K, P = %.4g bar would take the gas past %.2g of the "
                                  "pseudo-critical density (Kay's rule), where it may "
                                  "condense and the Beattie-Bridgeman equation has no liquid "
                                  "(use a cubic equation of state)",
                                  T, Tpc, P / 1e5, rho_r_max);
        return kphi_error_set(err, KPHI_EFAILED, NULL, no_mark,
                              "bb outside its range: the density at T = %.2f K, P = %.4g "
                              "bar would exceed the "
                              "pseudo-critical density of the mixture (reduced density > "
                              "%.2g, Kay's rule), beyond which the Beattie-Bridgeman equation "
                              "is not reliable (use a cubic equation of state)",
                              T, P / 1e5, rho_r_max);
    }
    }
    double lo = 0.0, hi = rho_hi;
    /* start from the root of the series cut after B2, rho (1 + b1 rho) = pi */
    double disc = 1.0 + 4.0 * b[0] * pi;
    double rho = disc > 0.0 ? 2.0 * pi / (1.0 + sqrt(disc)) : pi;
    if (!(rho > lo && rho < hi))
        rho = 0.5 * (lo + hi);
    for (int it = 0; it < 100; it++) {
        double f = pfun(b, pi, rho, &d);
        if (f < 0.0)
            lo = rho;
        else
            hi = rho;
        double next = rho - f / d;
        if (!(next > lo && next < hi))
            next = 0.5 * (lo + hi);
        double step = fabs(next - rho);
        rho = next;
        if (step <= 1e-15 * rho || hi - lo <= 1e-15 * hi)
            break;
    }
    const double Z = 1.0 + rho * (b[0] + rho * (b[1] + rho * b[2]));
    const double lnZ = log(Z);

    /* F, T dF/dT, dF/dn_i, d2F/dn_i dV, d2F/dV2 and (optionally) d2F/dn_i dn_j */
    double F = 0.0, TFT = 0.0, FVV = 0.0;
    double *Fi = w->bbF, *FiV = w->bbF + n;
    weights q;
    memset(&q, 0, sizeof q);
    for (int t = 0; t < 7; t++) {
        int k = terms[t].k;
        double rk = rho;
        for (int m = 1; m < k; m++)
            rk *= rho; /* rho^k */
        F += G[t] * rk;
        TFT += TG[t] * rk;
        FVV += k * (k + 1) * G[t] * rk * rho * rho;
        if (eos->bb_lorentz)
            term_weights(&fx, &terms[t], rk, -k * rk * rho, &q);
    }
    if (eos->bb_lorentz)
        assemble(&fx, &q, Fi, FiV, dlnphi, w->bbu);
    else
        linear_derivatives(&fx, rho, Fi, FiV, dlnphi);
    for (size_t i = 0; i < n; i++)
        lnphi[i] = Fi[i] - lnZ;
    if (dlnphi != NULL) {
        /* n dln phi_i/dn_j = F_ij + 1 - p_i p_j/q with p_i = rho - F_iV (dP/dn_i/(R T))
         * and q = rho^2 + F_VV (-dP/dV/(R T) = rho^2 dP/drho/(R T) > 0 on the bracket) */
        double qV = rho * rho + FVV;
        for (size_t i = 0; i < n; i++) {
            double pi_ = rho - FiV[i];
            for (size_t j = i; j < n; j++) {
                double v = dlnphi[i * n + j] + 1.0 - pi_ * (rho - FiV[j]) / qV;
                dlnphi[i * n + j] = dlnphi[j * n + i] = v;
            }
        }
    }
    if (st != NULL) {
        const double RT = KPHI_R * T;
        double gres = F + Z - 1.0 - lnZ;
        double hres = Z - 1.0 - TFT;
        st->Z = Z;
        st->g_dep = gres * RT;
        st->h_dep = hres * RT;
        st->s_dep = (hres - gres) * KPHI_R;
        st->v = 1.0 / rho;
        st->n_roots = 1;
        st->may_condense = 0;
        st->liquid_like = 0;
    }
    return KPHI_OK;
}

void kphi__eos_bb_virial(const kphi_eos *eos, size_t i, size_t j, double T, double *B,
                         double *TdB)
{
    const kphi__eos_comp *ci = &eos->c[i], *cj = &eos->c[j];
    double Tdomk, omk = kphi__eos_omk(eos, i, j, T, &Tdomk);
    double ss = ci->bb_s * cj->bb_s / (KPHI_R * T);
    double cij = 0.5 * (ci->bb_c + cj->bb_c) / (T * T * T);
    double b0 = eos->bb_lorentz ? lorentz_b0(ci, cj) : 0.5 * (ci->bb_B0 + cj->bb_B0);
    *B = b0 - ss * omk - cij;
    *TdB = ss * (omk - Tdomk) + 3.0 * cij;
}
