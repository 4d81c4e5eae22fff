/* kphi error reporting: a status code plus a message that points into the input.
 *
 * Every function that can fail takes a `kphi_error *err` (NULL allowed) as its last
 * argument and returns 0 (KPHI_OK) on success or a kphi_status. The first error recorded
 * in a kphi_error wins; later calls to kphi_error_set() leave it unchanged. Reporting
 * never allocates. */
#ifndef KPHI_ERROR_H
#define KPHI_ERROR_H

#include <stddef.h>

#ifdef __cplusplus
extern "C" {
#endif

typedef enum {
    KPHI_OK = 0,
    KPHI_EINPUT,  /* bad input or usage (CLI exit 2) */
    KPHI_EIO,     /* file cannot be read or written (CLI exit 2) */
    KPHI_EFAILED, /* the calculation failed (CLI exit 1) */
    KPHI_ENOMEM   /* out of memory (CLI exit 1) */
} kphi_status;

/* Position in an input text: 1-based line and column, 0 when unknown. */
typedef struct {
    long line, column;
} kphi_mark;

typedef struct {
    kphi_status code;
    char path[256];    /* input file, "<string>" or "<command line>"; "" when none */
    long line, column; /* 1-based; 0 when not about input text */
    char msg[256];
} kphi_error;

/* Reset to "no error". */
void kphi_error_clear(kphi_error *err);

/* Record an error unless one is already recorded. path may be NULL. The message is a
 * printf format. Returns `code`, so `return kphi_error_set(err, ...)` reads well. Path and
 * message stay one line: control characters (line breaks from quoted input) become spaces. */
int kphi_error_set(kphi_error *err, kphi_status code, const char *path, kphi_mark at,
                   const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 5, 6)))
#endif
    ;

/* Write the one-line form "path:line:column: error: msg" (path and position left out
 * when unknown) into buf of size n; returns the length it wanted, as snprintf does. */
int kphi_error_format(const kphi_error *err, char *buf, size_t n);

/* Exit code for the CLI: 0 for KPHI_OK, 2 for EINPUT/EIO, 1 otherwise. */
int kphi_error_exit_code(kphi_status code);

/* Library version string, e.g. "0.1.0". Borrowed, static storage. */
const char *kphi_version(void);

#ifdef __cplusplus
}
#endif
#endif /* KPHI_ERROR_H */
