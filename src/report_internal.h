/* Internal: what the sources of the report module share: src/report.c (table, CSV and
 * JSON writers), src/report_phase.c and src/report_loop.c (their number and string writers
 * come from src/report.c), src/report_num.c (number formatting) and the K-basis parts of
 * a point's report in src/report_k.c (header lines, JSON members, warnings; the comparison
 * over K bases is public), and the optional approach and adiabatic blocks of a point in
 * src/report_energy.c. Not part of the public API. */
#ifndef KPHI_REPORT_INTERNAL_H
#define KPHI_REPORT_INTERNAL_H

#include <math.h>
#include <stddef.h>
#include <stdio.h>
#include <string.h>

#include "kphi/error.h"
#include "kphi/report.h"

void kphi__report_jnum(FILE *out, double v);         /* JSON number; null if not finite */
void kphi__report_jstr(FILE *out, const char *s);    /* JSON string with escapes */
void kphi__report_cnum(FILE *out, double v);         /* CSV number; empty if not finite */
int kphi__report_io_error(FILE *out, kphi_error *err); /* KPHI_EIO after a write error */
/* "T = 450.00 C (723.15 K)   P = 195 bar" in the point's display units, no newline. */
void kphi__report_conditions(FILE *out, const kphi_report_point *pt);
/* The title lines of a point's table (case name and file, reaction set). */
void kphi__report_title(FILE *out, const kphi_report_point *pt);
/* The comparison tables' mole-fraction columns, one per species that is not inert: the
 * headings " y_NH3 ..." and a row's cells, each 9 wide, no newline. */
void kphi__report_y_heads(FILE *out, const kphi_rxnset *set);
void kphi__report_y_cells(FILE *out, const kphi_rxnset *set, const double *y);
/* " 1: N2 + 3 H2 = 2 NH3; 2: ...)" and a newline: the reactions that a table's
 * numbered columns stand for. */
void kphi__report_equations(FILE *out, const kphi_rxnset *set);

/* In src/report_k.c. */

/* Lines under the table's title saying where each reaction's K comes from; nothing when
 * the set carries no K correlation. */
void kphi__report_K_header(FILE *out, const kphi_report_point *pt);
/* One table line comparing each correlation's van 't Hoff heat with the polynomials'
 * reaction enthalpy at the solved T; nothing when every K is from the tables. */
void kphi__report_K_heat(FILE *out, const kphi_report_point *pt);
/* The K members of reaction j's JSON object: , "K_basis": ..., "K_source": ... (and for a
 * correlation its range, "K_extrapolated" and the two heats of reaction). */
void kphi__report_K_json(FILE *out, const kphi_report_point *pt, size_t j);
/* The K warnings of pt, for kphi_report_warnings(): a correlation used outside its
 * validity range at the solved T or at a temperature an energy answer found. Calls fn once
 * per warning; returns how many. */
size_t kphi__report_K_warnings(const kphi_report_point *pt, kphi_report_warning_fn fn,
                               void *ctx);
/* "K_1 extrapolated" for each reaction whose K is outside its correlation's range at the
 * point's T, for the CSV message column (no commas), "; " between them unless *first. */
void kphi__report_K_csv_note(FILE *out, const kphi_report_point *pt, int *first);

/* In src/report_energy.c. */

/* The temperature a point stands for, K: its solution's, or with an outlet approach
 * (--approach-dT) the outlet temperature, outlet_dT below the equilibrium's. */
double kphi__report_point_T(const kphi_report_point *pt);
/* The optional blocks (pt->energy; nothing when it is NULL). */
void kphi__report_energy_table(FILE *f, const kphi_report_point *pt);
void kphi__report_energy_json(FILE *f, const kphi_report_point *pt);
/* Their warnings (a bed that runs backwards), one call of fn each; returns how many. */
size_t kphi__report_energy_warnings(const kphi_report_point *pt, kphi_report_warning_fn fn,
                                    void *ctx);
/* CSV columns of the blocks: the header names, a row's values, or a failed row's empty
 * cells. T (K) is the point's temperature. */
typedef enum {
    KPHI__ENERGY_CSV_ROW = 0,
    KPHI__ENERGY_CSV_HEADER,
    KPHI__ENERGY_CSV_EMPTY
} kphi__energy_csv_mode;
void kphi__report_energy_csv(FILE *f, const kphi_rxnset *set, const kphi_report_energy *x,
                             double T, kphi__energy_csv_mode mode);

/* The text printf("%.10g", v) gives, into buf (at least 32 bytes); returns its length.
 * In src/report_num.c. */
int kphi__report_g10(char *buf, double v);

/* A row of text built in memory and written with one fwrite: a CSV row has some thirty
 * numbers, and a locked stdio call per number and per comma cost as much as the
 * numbers. Flushed when full, so rows of any length are written whole. No heap. */
typedef struct {
    FILE *out;
    size_t n;
    char b[4096];
} kphi__report_row;

static inline void kphi__row_flush(kphi__report_row *r)
{
    if (r->n > 0)
        fwrite(r->b, 1, r->n, r->out);
    r->n = 0;
}

static inline void kphi__row_char(kphi__report_row *r, char c)
{
    if (r->n + 1 > sizeof r->b)
        kphi__row_flush(r);
    r->b[r->n++] = c;
}

static inline void kphi__row_str(kphi__report_row *r, const char *s)
{
    size_t len = strlen(s);
    if (r->n + len > sizeof r->b)
        kphi__row_flush(r);
    if (len > sizeof r->b) {
        fwrite(s, 1, len, r->out);
        return;
    }
    memcpy(r->b + r->n, s, len);
    r->n += len;
}

/* A number as %.10g; nothing for NaN or infinity (an empty CSV cell). */
static inline void kphi__row_num(kphi__report_row *r, double v)
{
    if (!isfinite(v))
        return;
    if (r->n + 32 > sizeof r->b)
        kphi__row_flush(r);
    r->n += (size_t)kphi__report_g10(r->b + r->n, v);
}

/* The nonzero k_ij of a model as a JSON array [{"pair": [A, B], "value": k}]
 * (src/report_phase.c; flash and loop answers). */
void kphi__report_kij_json(FILE *out, const kphi_rxnset *set, const kphi_eos *eos);

#endif /* KPHI_REPORT_INTERNAL_H */
