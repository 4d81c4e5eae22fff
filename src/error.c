/* kphi error reporting and small shared helpers.
 *
 * An error is a status code, the input file, a 1-based line and column, and a message.
 * The first error recorded wins, so the deepest, most specific report is the one the user
 * sees. Nothing here allocates: a kphi_error lives in the caller's memory. */
#include "kphi/error.h"

#include <ctype.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "internal.h"
#include "version.h"

void kphi_error_clear(kphi_error *err)
{
    if (err == NULL)
        return;
    err->code = KPHI_OK;
    err->path[0] = '\0';
    err->line = 0;
    err->column = 0;
    err->msg[0] = '\0';
}

/* Messages quote the user's text, which may hold line breaks (a plain scalar folded over
 * blank lines, "\n" in a quoted one) or terminal escapes ("\e"): an error stays one line
 * of plain text, so every control character becomes a space. */
static void one_line(char *s)
{
    for (; *s != '\0'; s++)
        if ((unsigned char)*s < 0x20 || *s == 0x7f)
            *s = ' ';
}

int kphi_error_set(kphi_error *err, kphi_status code, const char *path, kphi_mark at,
                   const char *fmt, ...)
{
    if (err == NULL || err->code != KPHI_OK)
        return code;
    err->code = code;
    kphi__strlcpy(err->path, path != NULL ? path : "", sizeof err->path);
    one_line(err->path);
    err->line = at.line;
    err->column = at.column;
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(err->msg, sizeof err->msg, fmt, ap);
    va_end(ap);
    one_line(err->msg);
    return code;
}

int kphi_error_format(const kphi_error *err, char *buf, size_t n)
{
    if (err == NULL)
        return snprintf(buf, n, "error: unknown error");
    const char *msg = err->msg[0] != '\0' ? err->msg : "unknown error";
    if (err->path[0] == '\0')
        return snprintf(buf, n, "error: %s", msg);
    if (err->line <= 0)
        return snprintf(buf, n, "%s: error: %s", err->path, msg);
    if (err->column <= 0)
        return snprintf(buf, n, "%s:%ld: error: %s", err->path, err->line, msg);
    return snprintf(buf, n, "%s:%ld:%ld: error: %s", err->path, err->line, err->column, msg);
}

int kphi_error_exit_code(kphi_status code)
{
    switch (code) {
    case KPHI_OK:
        return 0;
    case KPHI_EINPUT:
    case KPHI_EIO:
        return 2;
    case KPHI_EFAILED:
    case KPHI_ENOMEM:
    default:
        return 1;
    }
}

const char *kphi_version(void)
{
    return KPHI_VERSION;
}

/* 1 when the number in text lies on the same side of the limit (as %g prints it) as v. */
static int same_side(const char *text, double v, double limit)
{
    char lim[32];
    snprintf(lim, sizeof lim, "%g", limit);
    double a = strtod(text, NULL), b = strtod(lim, NULL);
    return v == limit || (v > limit && a > b) || (v < limit && a < b);
}

const char *kphi__fmt_beyond(char *buf, const char *fmt, double v, double limit)
{
    snprintf(buf, 32, fmt, v);
    for (int p = 3; p <= 17 && !same_side(buf, v, limit); p++)
        snprintf(buf, 32, "%.*g", p, v);
    return buf;
}

void kphi__strlcpy(char *dst, const char *src, size_t n)
{
    if (n == 0)
        return;
    size_t len = strlen(src);
    if (len >= n)
        len = n - 1;
    memcpy(dst, src, len);
    dst[len] = '\0';
}

long kphi__char_offset(const char *s, size_t off)
{
    long n = 0;
    for (size_t i = 0; i < off && s[i] != '\0'; i++)
        if (((unsigned char)s[i] & 0xC0) != 0x80)
            n++;
    return n;
}

/* Case-insensitive Levenshtein distance of two short words (capped at 63 bytes). */
static size_t edit_distance(const char *a, const char *b)
{
    enum { MAXW = 64 };
    size_t la = strlen(a), lb = strlen(b);
    if (la >= MAXW)
        la = MAXW - 1;
    if (lb >= MAXW)
        lb = MAXW - 1;
    size_t prev[MAXW], cur[MAXW];
    for (size_t j = 0; j <= lb; j++)
        prev[j] = j;
    for (size_t i = 1; i <= la; i++) {
        cur[0] = i;
        for (size_t j = 1; j <= lb; j++) {
            int same = tolower((unsigned char)a[i - 1]) == tolower((unsigned char)b[j - 1]);
            size_t best = prev[j - 1] + (same ? 0 : 1);
            if (prev[j] + 1 < best)
                best = prev[j] + 1;
            if (cur[j - 1] + 1 < best)
                best = cur[j - 1] + 1;
            cur[j] = best;
        }
        memcpy(prev, cur, (lb + 1) * sizeof prev[0]);
    }
    return prev[lb];
}

const char *kphi__closest(const char *word, const char *const cands[], size_t n)
{
    if (word == NULL || word[0] == '\0')
        return NULL;
    size_t limit = strlen(word) / 3;
    if (limit < 1)
        limit = 1;
    const char *best = NULL;
    size_t best_d = limit + 1;
    for (size_t i = 0; i < n; i++) {
        if (cands[i] == NULL)
            continue;
        size_t d = edit_distance(word, cands[i]);
        if (d < best_d) {
            best_d = d;
            best = cands[i];
        }
    }
    return best;
}
