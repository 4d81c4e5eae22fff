/* kphi thermo: ideal-gas standard-state Cp, H, S and G of one species at T.
 *
 * NASA 7-coefficient polynomials (McBride, Gordon & Reno 1993, NASA TM-4513, eqs. 1-3):
 *   Cp/R = a1 + a2 T + a3 T^2 + a4 T^3 + a5 T^4
 *   H/RT = a1 + a2 T/2 + a3 T^2/3 + a4 T^3/4 + a5 T^4/5 + a6/T
 *   S/R  = a1 ln T + a2 T + a3 T^2/2 + a4 T^3/3 + a5 T^4/4 + a7
 *   G = H - T S,  G/RT = H/RT - S/R
 * with the low-range coefficients for T <= T_mid (T_mid belongs to the low range) and
 * the high-range ones above. S is at the standard pressure P° = 1 bar. H is on the
 * elemental reference scale, so H(298.15 K) is the enthalpy of formation.
 *
 * Units: T in K; Cp and S in J/(mol K); H and G in J/mol; R = KPHI_R J/(mol K).
 * Outside [T_low, T_high] the nearest range is extrapolated; callers that take T from
 * input check it first with kphi_thermo_check_range(). Everything here is pure and
 * allocation-free. */
#include "kphi/thermo.h"

#include <math.h>

#include "internal.h"

/* Coefficients of the range that holds T. */
static const double *coeffs(const kphi_species *sp, double T)
{
    return T <= sp->T_mid ? sp->low : sp->high;
}

static double cp_r(const double a[7], double T)
{
    return a[0] + T * (a[1] + T * (a[2] + T * (a[3] + T * a[4])));
}

static double h_rt(const double a[7], double T)
{
    return a[0] + T * (a[1] / 2.0 + T * (a[2] / 3.0 + T * (a[3] / 4.0 + T * a[4] / 5.0))) +
           a[5] / T;
}

static double s_r(const double a[7], double T)
{
    return a[0] * log(T) + T * (a[1] + T * (a[2] / 2.0 + T * (a[3] / 3.0 + T * a[4] / 4.0))) +
           a[6];
}

int kphi_thermo_in_range(const kphi_species *sp, double T)
{
    return T >= sp->T_low && T <= sp->T_high;
}

double kphi_thermo_cp(const kphi_species *sp, double T)
{
    return KPHI_R * cp_r(coeffs(sp, T), T);
}

double kphi_thermo_h(const kphi_species *sp, double T)
{
    return KPHI_R * T * h_rt(coeffs(sp, T), T);
}

double kphi_thermo_s(const kphi_species *sp, double T)
{
    return KPHI_R * s_r(coeffs(sp, T), T);
}

double kphi_thermo_g_rt(const kphi_species *sp, double T)
{
    const double *a = coeffs(sp, T);
    return h_rt(a, T) - s_r(a, T);
}

double kphi_thermo_g(const kphi_species *sp, double T)
{
    return KPHI_R * T * kphi_thermo_g_rt(sp, T);
}

int kphi_thermo_check_range(const kphi_species *sp, double T, const char *path, kphi_mark at,
                            kphi_error *err)
{
    if (isfinite(T) && kphi_thermo_in_range(sp, T))
        return KPHI_OK;
    char v[32];
    kphi__fmt_beyond(v, "%g", T, T < sp->T_low ? sp->T_low : sp->T_high);
    return kphi_error_set(err, KPHI_EINPUT, path, at,
                          "T = %s K is outside the data range of %s (%g-%g K)", v, sp->name,
                          sp->T_low, sp->T_high);
}
