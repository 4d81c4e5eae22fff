/* Internal: number and string writers of src/report.c that src/report_phase.c shares.
 * Not part of the public API. */
#ifndef KPHI_REPORT_INTERNAL_H
#define KPHI_REPORT_INTERNAL_H

#include <stdio.h>

#include "kphi/error.h"

void kphi__report_jnum(FILE *out, double v);         /* JSON number; null if not finite */
void kphi__report_jstr(FILE *out, const char *s);    /* JSON string with escapes */
void kphi__report_cnum(FILE *out, double v);         /* CSV number; empty if not finite */
int kphi__report_io_error(FILE *out, kphi_error *err); /* KPHI_EIO after a write error */

#endif /* KPHI_REPORT_INTERNAL_H */
