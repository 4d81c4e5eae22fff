/* Internal: what the sources of the report module share: src/report.c (table, CSV and
 * JSON writers), src/report_phase.c and src/report_loop.c (their number and string writers
 * come from src/report.c) and src/report_num.c (number formatting). Not part of the
 * public API. */
#ifndef KPHI_REPORT_INTERNAL_H
#define KPHI_REPORT_INTERNAL_H

#include <math.h>
#include <stddef.h>
#include <stdio.h>
#include <string.h>

#include "kphi/error.h"

void kphi__report_jnum(FILE *out, double v);         /* JSON number; null if not finite */
void kphi__report_jstr(FILE *out, const char *s);    /* JSON string with escapes */
void kphi__report_cnum(FILE *out, double v);         /* CSV number; empty if not finite */
int kphi__report_io_error(FILE *out, kphi_error *err); /* KPHI_EIO after a write error */

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

#endif /* KPHI_REPORT_INTERNAL_H */
