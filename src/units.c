/* kphi units: engineering temperatures and pressures written as text, parsed into SI.
 *
 * A quantity is a number, optional spaces or tabs, then a unit: "450 C", "450C",
 * "20 MPa", "3000 psia", "-0.5 barg". Leading and trailing blanks are ignored. The number
 * is decimal (sign, digits, optional point, optional exponent); hexadecimal, "nan" and
 * "inf" are refused, as is a number without a unit ("450" could be K or C).
 *
 * Conversions (NIST SP 811, Thompson & Taylor 2008, "Guide for the Use of the
 * International System of Units (SI)", appendix B.8; cited from memory):
 *   T/K = t/degC + 273.15                        (exact, by definition of the Celsius scale)
 *   T/K = (t/degF + 459.67) / 1.8                (exact)
 *   T/K = (T/degR) / 1.8                          (exact)
 *   1 bar = 1e5 Pa, 1 mbar = 100 Pa              (exact)
 *   1 atm = 101 325 Pa                           (exact, standard atmosphere)
 *   1 psi = 1 lbf/in^2 = 0.453 592 37 kg * 9.806 65 m/s^2 / (0.0254 m)^2
 *         = 6894.757 293 168 361 Pa               (exact; SP 811 B.8 lists it rounded as
 *                                                  6.894 757 E+03)
 * Gauge units (barg, psig) are relative to one standard atmosphere: P = p_g + 101 325 Pa.
 * That is a convention (common practice); a plant's local barometric pressure differs.
 * Differences (sweep steps) use the same factors without offsets: 10 C and 18 F are both
 * a step of 10 K; 25 barg is a step of 2.5e6 Pa.
 *
 * Spelling of units. Temperature: K, C, degC, °C, F, degF, °F, R, degR, °R, in any
 * letter case ("c", "k", "DEGF"). Pressure: the pascal family Pa, hPa, kPa, MPa, GPa is
 * case-sensitive, because SI prefixes are ("mPa" is a millipascal, which no converter
 * runs at: it is refused with "did you mean 'MPa'?"); mbar is exact for the same reason
 * (Mbar would be a megabar); bar, bara, barg, atm, psi, psia and psig accept any letter
 * case ("BAR", "Atm", "PSIG"). psi is absolute, as psia. Output units are SI: K and Pa.
 *
 * Error columns: when an origin is given, err->column is origin->at.column plus the
 * offset in characters (UTF-8 aware) of the offending part of the text: the number for a
 * missing unit or a value out of range, the unit for an unknown unit. */
#include "kphi/units.h"

#include <errno.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "internal.h"

#define ATM_PA 101325.0                                       /* Pa, exact */
#define PSI_PA (0.45359237 * 9.80665 / (0.0254 * 0.0254))   /* Pa, exact by definition */

enum { NUM_MAX = 64 };

typedef enum { TEMPERATURE, PRESSURE } quantity;

/* A unit: value in SI = (v + add) / per for temperature; v * per + add for pressure. */
typedef struct {
    const char *name;  /* spelling accepted */
    const char *canon; /* name reported by kphi_units_name() */
    int fold;          /* 1: any letter case */
    double per;
    double add;
} unit_def;

static const unit_def temperature_units[] = {
    {"K", "K", 1, 1.0, 0.0},       {"C", "C", 1, 1.0, 273.15},
    {"degC", "C", 1, 1.0, 273.15}, {"\xc2\xb0" "C", "C", 1, 1.0, 273.15},
    {"F", "F", 1, 1.8, 459.67},    {"degF", "F", 1, 1.8, 459.67},
    {"\xc2\xb0" "F", "F", 1, 1.8, 459.67},
    {"R", "R", 1, 1.8, 0.0},       {"degR", "R", 1, 1.8, 0.0},
    {"\xc2\xb0" "R", "R", 1, 1.8, 0.0},
};

static const unit_def pressure_units[] = {
    {"Pa", "Pa", 0, 1.0, 0.0},      {"hPa", "hPa", 0, 1.0e2, 0.0},
    {"kPa", "kPa", 0, 1.0e3, 0.0},  {"MPa", "MPa", 0, 1.0e6, 0.0},
    {"GPa", "GPa", 0, 1.0e9, 0.0},  {"mbar", "mbar", 0, 1.0e2, 0.0},
    {"bar", "bar", 1, 1.0e5, 0.0},  {"bara", "bar", 1, 1.0e5, 0.0},
    {"barg", "barg", 1, 1.0e5, ATM_PA}, {"atm", "atm", 1, ATM_PA, 0.0},
    {"psi", "psia", 1, PSI_PA, 0.0},    {"psia", "psia", 1, PSI_PA, 0.0},
    {"psig", "psig", 1, PSI_PA, ATM_PA},
};

/* Words that are not units here but close to one: "did you mean" only. */
typedef struct {
    const char *word;
    const char *suggest;
} alias;

static const alias temperature_aliases[] = {
    {"K", "K"},          {"C", "C"},         {"F", "F"},           {"R", "R"},
    {"degC", "degC"},    {"degF", "degF"},   {"degR", "degR"},     {"degK", "K"},
    {"\xc2\xb0" "K", "K"}, {"kelvin", "K"},  {"celsius", "C"},     {"centigrade", "C"},
    {"fahrenheit", "F"}, {"rankine", "R"},   {"\xc2\xba" "C", "\xc2\xb0" "C"},
};

static const alias pressure_aliases[] = {
    {"Pa", "Pa"},         {"hPa", "hPa"},     {"kPa", "kPa"},   {"MPa", "MPa"},
    {"GPa", "GPa"},       {"bar", "bar"},     {"mbar", "mbar"}, {"bara", "bara"},
    {"barg", "barg"},     {"atm", "atm"},     {"psi", "psi"},   {"psia", "psia"},
    {"psig", "psig"},     {"pascal", "Pa"},   {"pascals", "Pa"}, {"atmosphere", "atm"},
    {"atmospheres", "atm"}, {"bars", "bar"},
};

#define COUNT(a) (sizeof(a) / sizeof((a)[0]))

static int is_blank(char ch)
{
    return ch == ' ' || ch == '\t';
}

static int is_digit(char ch)
{
    return ch >= '0' && ch <= '9';
}

static char ascii_lower(char ch)
{
    return (ch >= 'A' && ch <= 'Z') ? (char)(ch - 'A' + 'a') : ch;
}

/* Compare a counted text with a NUL-terminated name; case-insensitive for ASCII when
 * fold is set. */
static int same_name(const char *s, size_t len, const char *name, int fold)
{
    if (strlen(name) != len)
        return 0;
    for (size_t i = 0; i < len; i++) {
        char a = s[i], b = name[i];
        if (fold) {
            a = ascii_lower(a);
            b = ascii_lower(b);
        }
        if (a != b)
            return 0;
    }
    return 1;
}

static const unit_def *find_unit(quantity q, const char *s, size_t len)
{
    const unit_def *tab = q == TEMPERATURE ? temperature_units : pressure_units;
    size_t n = q == TEMPERATURE ? COUNT(temperature_units) : COUNT(pressure_units);
    for (size_t i = 0; i < n; i++)
        if (same_name(s, len, tab[i].name, tab[i].fold))
            return &tab[i];
    return NULL;
}

/* The pieces of "  450.5 degC  ". */
typedef struct {
    size_t num_start, num_len;   /* 0 length: no number */
    size_t unit_start, unit_len; /* 0 length: no unit */
    size_t end;                  /* end of the trimmed text */
} pieces;

static void split(const char *text, pieces *p)
{
    size_t i = 0, len = strlen(text);
    while (len > 0 && is_blank(text[len - 1]))
        len--;
    while (i < len && is_blank(text[i]))
        i++;
    p->num_start = i;
    p->end = len;
    size_t j = i;
    if (j < len && (text[j] == '+' || text[j] == '-'))
        j++;
    size_t digits = 0;
    while (j < len && is_digit(text[j])) {
        j++;
        digits++;
    }
    if (j < len && text[j] == '.') {
        j++;
        while (j < len && is_digit(text[j])) {
            j++;
            digits++;
        }
    }
    if (digits == 0) {
        p->num_len = 0;
        p->unit_start = i;
        p->unit_len = len - i;
        return;
    }
    if (j < len && (text[j] == 'e' || text[j] == 'E')) {
        size_t k = j + 1;
        if (k < len && (text[k] == '+' || text[k] == '-'))
            k++;
        if (k < len && is_digit(text[k])) {
            while (k < len && is_digit(text[k]))
                k++;
            j = k;
        }
    }
    p->num_len = j - i;
    while (j < len && is_blank(text[j]))
        j++;
    p->unit_start = j;
    p->unit_len = len - j;
}

typedef struct {
    quantity q;
    int step;
    const char *what; /* "temperature", "pressure step", ... */
} request;

static int fail(kphi_error *err, const kphi_units_origin *origin, const char *text, size_t off,
                const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 5, 6)))
#endif
    ;

/* Record an error at byte `off` of text, shifted by the origin's mark. */
static int fail(kphi_error *err, const kphi_units_origin *origin, const char *text, size_t off,
                const char *fmt, ...)
{
    if (err == NULL || err->code != KPHI_OK)
        return KPHI_EINPUT;
    kphi_mark at = {0, 0};
    const char *path = NULL;
    if (origin != NULL) {
        path = origin->path;
        at = origin->at;
        if (at.line > 0 && at.column > 0)
            at.column += kphi__char_offset(text, off);
    }
    char msg[sizeof err->msg];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(msg, sizeof msg, fmt, ap);
    va_end(ap);
    return kphi_error_set(err, KPHI_EINPUT, path, at, "%s", msg);
}

/* Quote at most 64 bytes of user text in messages. */
static void clip(char *dst, size_t n, const char *src, size_t len)
{
    if (len >= n)
        len = n - 1;
    memcpy(dst, src, len);
    dst[len] = '\0';
}

static const char *expected_list(quantity q)
{
    return q == TEMPERATURE
               ? "K, C, F or R"
               : "Pa, hPa, kPa, MPa, GPa, mbar, bar, bara, barg, atm, psi, psia or psig";
}

static const char *suggest_unit(quantity q, const char *word)
{
    const alias *tab = q == TEMPERATURE ? temperature_aliases : pressure_aliases;
    size_t n = q == TEMPERATURE ? COUNT(temperature_aliases) : COUNT(pressure_aliases);
    const char *words[COUNT(pressure_aliases) > COUNT(temperature_aliases)
                          ? COUNT(pressure_aliases)
                          : COUNT(temperature_aliases)];
    for (size_t i = 0; i < n; i++)
        words[i] = tab[i].word;
    const char *near = kphi__closest(word, words, n);
    if (near == NULL)
        return NULL;
    /* A one-letter word is one edit from every one-letter unit: only suggest for it when
     * it matches apart from letter case. */
    if (strlen(word) < 2 && !same_name(word, strlen(word), near, 1))
        return NULL;
    for (size_t i = 0; i < n; i++)
        if (tab[i].word == near)
            return tab[i].suggest;
    return NULL;
}

/* The number of a quantity's text split into p: into *v, its digits into num and the
 * trimmed text (for messages) into shown. KPHI_EINPUT for an empty text, no number, NaN or
 * infinity, or a number too long or out of range; `what` names the quantity ("pressure",
 * "molar flow"), example shows a correct text. */
static int read_number(const char *text, const pieces *p, const char *what, const char *example,
                       char num[NUM_MAX + 1], char shown[NUM_MAX + 1], double *v,
                       const kphi_units_origin *origin, kphi_error *err)
{
    clip(shown, NUM_MAX + 1, text + p->num_start, p->end - p->num_start);
    const size_t at_num = p->num_start;
    if (p->end == p->num_start)
        return fail(err, origin, text, at_num, "empty %s; write e.g. %s", what, example);
    if (p->num_len == 0) {
        const char *s = text + p->num_start;
        if (*s == '+' || *s == '-')
            s++;
        if (same_name(s, 3, "nan", 1) || same_name(s, 3, "inf", 1))
            return fail(err, origin, text, at_num, "%s must be a finite number, found '%s'",
                        what, shown);
        return fail(err, origin, text, at_num,
                    "expected a number and a unit for the %s, e.g. %s; found '%s'", what,
                    example, shown);
    }
    if (p->num_len > NUM_MAX)
        return fail(err, origin, text, at_num, "the number in the %s '%s' is too long", what,
                    shown);
    clip(num, NUM_MAX + 1, text + p->num_start, p->num_len);
    errno = 0;
    char *end = NULL;
    *v = strtod(num, &end);
    if (end == NULL || *end != '\0' || !isfinite(*v) || (errno == ERANGE && fabs(*v) > 1.0))
        return fail(err, origin, text, at_num, "%s must be a finite number, found '%s'", what,
                    shown);
    return KPHI_OK;
}

static int parse(const char *text, const request *rq, double *out,
                 const kphi_units_origin *origin, kphi_error *err)
{
    char shown[NUM_MAX + 1], unit[NUM_MAX + 1], num[NUM_MAX + 1];
    if (text == NULL)
        text = "";
    pieces p;
    split(text, &p);
    const int temp = rq->q == TEMPERATURE;
    const char *kind = temp ? "temperature" : "pressure";
    const char *example = temp ? "'450 C' or '723.15 K'" : "'200 bar' or '20 MPa'";
    const size_t at_num = p.num_start, at_unit = p.unit_start;
    double v;
    int rc = read_number(text, &p, rq->what, example, num, shown, &v, origin, err);
    if (rc != KPHI_OK)
        return rc;

    if (p.unit_len == 0) {
        char hint[3 * NUM_MAX];
        if (temp && rq->step)
            snprintf(hint, sizeof hint, "'%s C' or '%s K'", num, num);
        else if (temp)
            snprintf(hint, sizeof hint, "'%s C' or '%.10g K'", num, v + 273.15);
        else
            snprintf(hint, sizeof hint, "'%s bar' or '%.10g MPa'", num, v / 10.0);
        return fail(err, origin, text, at_num, "'%s' has no unit; write e.g. %s", shown, hint);
    }

    const char *us = text + p.unit_start;
    const unit_def *u = find_unit(rq->q, us, p.unit_len);
    if (u == NULL) {
        clip(unit, sizeof unit, us, p.unit_len);
        if (us[0] == ',' && p.unit_len > 1 && is_digit(us[1]))
            return fail(err, origin, text, at_unit,
                        "unexpected ',' in '%s'; write decimals with a point, e.g. '%s.5'",
                        shown, num);
        if (find_unit(temp ? PRESSURE : TEMPERATURE, us, p.unit_len) != NULL)
            return fail(err, origin, text, at_unit,
                        "'%s' in '%s' is a %s unit; expected a %s unit: %s", unit, shown,
                        temp ? "pressure" : "temperature", kind, expected_list(rq->q));
        const char *near = suggest_unit(rq->q, unit);
        if (near != NULL)
            return fail(err, origin, text, at_unit,
                        "unknown %s unit '%s' in '%s' (did you mean '%s'?)", kind, unit, shown,
                        near);
        return fail(err, origin, text, at_unit, "unknown %s unit '%s' in '%s'; expected %s",
                    kind, unit, shown, expected_list(rq->q));
    }

    double si;
    if (rq->step) {
        si = temp ? v / u->per : v * u->per;
        if (!(si > 0.0))
            return fail(err, origin, text, at_num, "%s '%s' must be positive", rq->what, shown);
    } else if (temp) {
        si = (v + u->add) / u->per;
        if (!(si > 0.0) && strcmp(u->canon, "K") == 0)
            return fail(err, origin, text, at_num,
                        "temperature '%s' must be above absolute zero", shown);
        if (!(si > 0.0))
            return fail(err, origin, text, at_num,
                        "temperature '%s' is %.10g K; it must be above absolute zero", shown,
                        si);
    } else {
        si = v * u->per + u->add;
        if (!(si > 0.0) && u->add != 0.0)
            return fail(err, origin, text, at_num,
                        "pressure '%s' is %.10g Pa absolute; it must be above zero", shown, si);
        if (!(si > 0.0))
            return fail(err, origin, text, at_num, "pressure '%s' must be above zero", shown);
    }
    if (!isfinite(si))
        return fail(err, origin, text, at_num, "%s '%s' is out of range", rq->what, shown);
    *out = si;
    return KPHI_OK;
}

int kphi_units_temperature(const char *text, double *T, const kphi_units_origin *origin,
                           kphi_error *err)
{
    const request rq = {TEMPERATURE, 0, "temperature"};
    return parse(text, &rq, T, origin, err);
}

int kphi_units_temperature_step(const char *text, double *dT, const kphi_units_origin *origin,
                                kphi_error *err)
{
    const request rq = {TEMPERATURE, 1, "temperature step"};
    return parse(text, &rq, dT, origin, err);
}

int kphi_units_pressure(const char *text, double *P, const kphi_units_origin *origin,
                        kphi_error *err)
{
    const request rq = {PRESSURE, 0, "pressure"};
    return parse(text, &rq, P, origin, err);
}

int kphi_units_pressure_step(const char *text, double *dP, const kphi_units_origin *origin,
                             kphi_error *err)
{
    const request rq = {PRESSURE, 1, "pressure step"};
    return parse(text, &rq, dP, origin, err);
}

/* ------------------------------------------------ flows and percentages */

/* A unit of a quantity that is a plain multiple of its SI unit. */
typedef struct {
    const char *name;
    int fold;
    double per; /* SI value of one unit */
} linear_unit;

static const linear_unit molar_flow_units[] = {
    {"mol/s", 0, 1.0},           {"kmol/s", 0, 1e3},          {"mol/h", 0, 1.0 / 3600.0},
    {"kmol/h", 0, 1e3 / 3600.0}, {"kmol/d", 0, 1e3 / 86400.0}, {"mol/min", 0, 1.0 / 60.0},
};

static const linear_unit mass_flow_units[] = {
    {"kg/s", 0, 1.0},         {"kg/h", 0, 1.0 / 3600.0},   {"t/h", 0, 1e3 / 3600.0},
    {"t/d", 0, 1e3 / 86400.0}, {"MTPD", 1, 1e3 / 86400.0}, {"tpd", 1, 1e3 / 86400.0},
    {"kg/d", 0, 1.0 / 86400.0},
};

static const linear_unit percent_units[] = {{"%", 0, 0.01}};

static int parse_linear(const char *text, const linear_unit *tab, size_t n, const char *what,
                        const char *example, const char *expected, int positive, double *out,
                        const kphi_units_origin *origin, kphi_error *err)
{
    char shown[NUM_MAX + 1], unit[NUM_MAX + 1], num[NUM_MAX + 1];
    if (text == NULL)
        text = "";
    pieces p;
    split(text, &p);
    double v;
    int rc = read_number(text, &p, what, example, num, shown, &v, origin, err);
    if (rc != KPHI_OK)
        return rc;
    if (p.unit_len == 0)
        return fail(err, origin, text, p.num_start, "'%s' has no unit; write e.g. %s", shown,
                    example);
    const char *us = text + p.unit_start;
    for (size_t i = 0; i < n; i++) {
        if (same_name(us, p.unit_len, tab[i].name, tab[i].fold)) {
            double si = v * tab[i].per;
            if (positive && !(si > 0.0))
                return fail(err, origin, text, p.num_start, "%s '%s' must be positive", what,
                            shown);
            *out = si;
            return KPHI_OK;
        }
    }
    clip(unit, sizeof unit, us, p.unit_len);
    const char *names[8];
    size_t k = 0;
    for (size_t i = 0; i < n && k < 8; i++)
        names[k++] = tab[i].name;
    const char *near = kphi__closest(unit, names, k);
    if (near != NULL)
        return fail(err, origin, text, p.unit_start,
                    "unknown unit '%s' in the %s '%s' (did you mean '%s'?)", unit, what, shown,
                    near);
    return fail(err, origin, text, p.unit_start, "unknown unit '%s' in the %s '%s'; expected %s",
                unit, what, shown, expected);
}

int kphi_units_molar_flow(const char *text, double *n_dot, const kphi_units_origin *origin,
                          kphi_error *err)
{
    return parse_linear(text, molar_flow_units, COUNT(molar_flow_units), "molar flow",
                        "'1200 kmol/h' or '333 mol/s'",
                        "mol/s, kmol/s, mol/min, mol/h, kmol/h or kmol/d", 1, n_dot, origin, err);
}

int kphi_units_mass_flow(const char *text, double *m_dot, const kphi_units_origin *origin,
                         kphi_error *err)
{
    return parse_linear(text, mass_flow_units, COUNT(mass_flow_units), "mass flow",
                        "'1500 t/d' or '62.5 t/h'", "kg/s, kg/h, kg/d, t/h, t/d or MTPD", 1,
                        m_dot, origin, err);
}

int kphi_units_percent(const char *text, double *fraction, const kphi_units_origin *origin,
                       kphi_error *err)
{
    return parse_linear(text, percent_units, COUNT(percent_units), "percentage", "'2 %'", "%",
                        0, fraction, origin, err);
}

void kphi_units_name(const char *text, char *unit, size_t n)
{
    if (unit == NULL || n == 0)
        return;
    unit[0] = '\0';
    if (text == NULL)
        return;
    pieces p;
    split(text, &p);
    if (p.num_len == 0 || p.unit_len == 0)
        return;
    const unit_def *u = find_unit(TEMPERATURE, text + p.unit_start, p.unit_len);
    if (u == NULL)
        u = find_unit(PRESSURE, text + p.unit_start, p.unit_len);
    if (u != NULL)
        kphi__strlcpy(unit, u->canon, n);
}

int kphi_units_temperature_to(double T, const char *unit, double *value)
{
    const unit_def *u = unit != NULL ? find_unit(TEMPERATURE, unit, strlen(unit)) : NULL;
    if (u == NULL)
        return KPHI_EINPUT;
    *value = T * u->per - u->add;
    return KPHI_OK;
}

int kphi_units_pressure_to(double P, const char *unit, double *value)
{
    const unit_def *u = unit != NULL ? find_unit(PRESSURE, unit, strlen(unit)) : NULL;
    if (u == NULL)
        return KPHI_EINPUT;
    *value = (P - u->add) / u->per;
    return KPHI_OK;
}
