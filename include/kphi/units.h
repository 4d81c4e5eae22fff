/* kphi units: parse engineering quantities written as text into SI.
 *
 * Temperature: K, C (or degC), F (or degF), R. Pressure: Pa, kPa, MPa, bar, atm, psia,
 * psi (taken as absolute), and the gauge units barg and psig (1 atm = 101325 Pa added).
 * A number without a unit is rejected, since "450" could be K or C. Spaces between the
 * number and the unit are optional: "450C", "450 C", "20 MPa". Units are case-sensitive
 * where SI needs it (MPa, not mpa) but "c", "k", "f", "Bar", "ATM" are accepted as
 * unambiguous. */
#ifndef KPHI_UNITS_H
#define KPHI_UNITS_H

#include "kphi/error.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Where a parsed text came from, for error messages. path may be "<command line>". */
typedef struct {
    const char *path;
    kphi_mark at;
} kphi_units_origin;

/* Absolute temperature in K. Errors: KPHI_EINPUT (no number, no unit, unknown unit,
 * T <= 0 K). origin may be NULL. */
int kphi_units_temperature(const char *text, double *T, const kphi_units_origin *origin,
                           kphi_error *err);

/* Temperature difference in K ("10 C" is 10 K, "18 F" is 10 K); must be > 0. Used for
 * sweep steps. */
int kphi_units_temperature_step(const char *text, double *dT, const kphi_units_origin *origin,
                                kphi_error *err);

/* Absolute pressure in Pa. Gauge units add 101325 Pa. Errors: KPHI_EINPUT (no number,
 * no unit, unknown unit, absolute P <= 0). */
int kphi_units_pressure(const char *text, double *P, const kphi_units_origin *origin,
                        kphi_error *err);

/* Pressure difference in Pa ("25 bar" is 2.5e6 Pa; gauge and absolute units alike);
 * must be > 0. Used for sweep steps. */
int kphi_units_pressure_step(const char *text, double *dP, const kphi_units_origin *origin,
                             kphi_error *err);

/* Molar flow in mol/s: "1200 kmol/h", "333 mol/s", "kmol/s", "mol/h", "kmol/d". Must be
 * > 0. Errors: KPHI_EINPUT (no number, no unit, unknown unit, not positive). */
int kphi_units_molar_flow(const char *text, double *n_dot, const kphi_units_origin *origin,
                          kphi_error *err);

/* Mass flow in kg/s: "1500 t/d", "62.5 t/h", "kg/h", "kg/s"; "MTPD" is t/d. Must be > 0. */
int kphi_units_mass_flow(const char *text, double *m_dot, const kphi_units_origin *origin,
                         kphi_error *err);

/* A fraction written as a percentage, "2 %" or "2%", returned as 0.02. The unit is
 * required (a bare 0.02 could be 2 % or 0.02 %). Any finite value; callers check the
 * range. */
int kphi_units_percent(const char *text, double *fraction, const kphi_units_origin *origin,
                       kphi_error *err);

/* Name of the unit a text used ("C", "bar", ...), for echoing ranges back in the same
 * unit; writes "" when none is found. */
void kphi_units_name(const char *text, char *unit, size_t n);

/* Convert back for display: K to the named temperature unit (K, C, F, R) and Pa to the
 * named pressure unit (Pa, kPa, MPa, bar, atm, psia, barg, psig). Return 0, or
 * KPHI_EINPUT for an unknown unit name. */
int kphi_units_temperature_to(double T, const char *unit, double *value);
int kphi_units_pressure_to(double P, const char *unit, double *value);

#ifdef __cplusplus
}
#endif
#endif /* KPHI_UNITS_H */
