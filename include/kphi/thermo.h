/* kphi thermo: ideal-gas standard-state properties of a species at temperature T.
 *
 * From the NASA 7-coefficient polynomials of kphi_species (McBride, Gordon & Reno 1993,
 * NASA TM-4513). Standard pressure P° = 1 bar. H is on the elemental reference scale
 * (H(298.15 K) of an element in its reference state is 0), so G of a reaction is
 * sum nu_i G_i. All functions are pure and allocation-free. */
#ifndef KPHI_THERMO_H
#define KPHI_THERMO_H

#include "kphi/species.h"

#ifdef __cplusplus
extern "C" {
#endif

#define KPHI_R 8.314462618 /* J/(mol K), CODATA 2018 (exact since the 2019 SI) */
#define KPHI_P_STANDARD 1.0e5 /* Pa, standard pressure P° = 1 bar */
#define KPHI_T_REF 298.15     /* K */

/* 1 when T_low <= T <= T_high for sp. */
int kphi_thermo_in_range(const kphi_species *sp, double T);

double kphi_thermo_cp(const kphi_species *sp, double T); /* J/(mol K) */
double kphi_thermo_h(const kphi_species *sp, double T);  /* J/mol */
double kphi_thermo_s(const kphi_species *sp, double T);  /* J/(mol K), at P° */
double kphi_thermo_g(const kphi_species *sp, double T);  /* J/mol, H - T S, at P° */

/* g°(T)/RT, the dimensionless standard chemical potential used by the minimiser. */
double kphi_thermo_g_rt(const kphi_species *sp, double T);

/* Check T against the data range of sp; KPHI_EINPUT with a message naming the species
 * and its range when outside. path/at point at the input that set T. */
int kphi_thermo_check_range(const kphi_species *sp, double T, const char *path, kphi_mark at,
                            kphi_error *err);

#ifdef __cplusplus
}
#endif
#endif /* KPHI_THERMO_H */
