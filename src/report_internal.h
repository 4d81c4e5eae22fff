/* Internal: what the sources of the report module share: number and string writers of
 * src/report.c used by src/report_phase.c and src/report_k.c, and the K-basis parts of a
 * point's report in src/report_k.c (header lines, JSON members, warnings; the comparison
 * over K bases is public). Not part of the public API. */
#ifndef KPHI_REPORT_INTERNAL_H
#define KPHI_REPORT_INTERNAL_H

#include <stdio.h>

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

#endif /* KPHI_REPORT_INTERNAL_H */
