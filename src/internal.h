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

/* Copy at most n-1 bytes of src into dst and terminate it. */
void kphi__strlcpy(char *dst, const char *src, size_t n);

#endif /* KPHI_INTERNAL_H */
