/* Published pure-gas fugacity-coefficient correlations of ammonia converter design, shared
 * by tests/validation_kphi.c and tests/validation_ammonia.c. Sources and the transcriptions
 * seen are documented at the top of tests/validation_kphi.c. T in K, P in atm. */
#ifndef KPHI_PUBLISHED_PHI_H
#define KPHI_PUBLISHED_PHI_H

#include <math.h>

/* Dyson & Simon (1968), Ind. Eng. Chem. Fundam. 7, 605: phi of N2. */
static inline double ds_phi_n2(double T, double P)
{
    return 0.93431737 + 0.3101804e-3 * T + 0.295896e-3 * P - 0.2707279e-6 * T * T +
           0.4775207e-6 * P * P;
}

/* Dyson & Simon (1968): phi of NH3. */
static inline double ds_phi_nh3(double T, double P)
{
    return 0.1438996 + 0.2028538e-2 * T - 0.4487672e-3 * P - 0.1142945e-5 * T * T +
           0.2761216e-6 * P * P;
}

/* Shaw & Wones (1964), Am. J. Sci. 262, 918: ln phi of H2. */
static inline double sw_lnphi_h2(double T, double P)
{
    double c1 = exp(-3.8402 * pow(T, 0.125) + 0.5410);
    double c2 = exp(-0.1263 * sqrt(T) - 15.980);
    double c3 = 300.0 * exp(-0.011901 * T - 5.941);
    return c1 * P - c2 * P * P + c3 * (exp(-P / 300.0) - 1.0);
}

/* ln Kphi of N2 + 3 H2 = 2 NH3 from the three correlations (Lewis-Randall rule). */
static inline double ds_lnkphi(double T, double P)
{
    return 2.0 * log(ds_phi_nh3(T, P)) - log(ds_phi_n2(T, P)) - 3.0 * sw_lnphi_h2(T, P);
}

#endif /* KPHI_PUBLISHED_PHI_H */
