/* Internal helpers shared by several modules. Not part of the public API. */
#ifndef KPHI_INTERNAL_H
#define KPHI_INTERNAL_H

#include <stddef.h>

/* Closest candidate to word by case-insensitive edit distance, when within
 * max(1, strlen(word)/3) edits; else NULL. Shared by every "did you mean". */
const char *kphi__closest(const char *word, const char *const cands[], size_t n);

/* Characters (not bytes) in the first `off` bytes of the UTF-8 text s: input columns
 * count characters. */
long kphi__char_offset(const char *s, size_t off);

/* v for a message that compares it with limit ("P = 10000.4 bar is above 10000 bar"):
 * printed with fmt (one double conversion, e.g. "%.4g" or "%.2f"), or, when that would
 * put it on the wrong side of the limit as printed with %g ("1e+04 bar is above 10000
 * bar"), with the fewest significant digits that do not. buf holds at least 32 bytes;
 * returns buf. */
const char *kphi__fmt_beyond(char *buf, const char *fmt, double v, double limit);

/* Copy at most n-1 bytes of src into dst and terminate it. */
void kphi__strlcpy(char *dst, const char *src, size_t n);

#endif /* KPHI_INTERNAL_H */
