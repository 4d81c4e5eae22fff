/* kphi plot, the texts: chart labels as PLplot expects them, kept apart from the drawing
 * in src/plot.c.
 *
 * PLplot reads '#' as its escape character ("#d" and "#u" lower and raise the baseline
 * for subscripts) and refuses malformed UTF-8, so user text (titles, species names,
 * equations, unit names) is escaped ('#' -> "##"), control characters and bytes that are
 * not UTF-8 become '?' (the valid sequences, overlong forms and surrogates excluded, are
 * those of RFC 3629 sec. 4), and in chemical formulas the digits after a letter or ')'
 * are set as subscripts ("NH3" -> "NH#d3#u"). Texts go into fixed-size buffers that
 * truncate quietly, never inside an escape or a character. Numbers are shown with the
 * fewest decimals (0 to 3) that keep 1e-6 relative, so 723.15 K prints as "723.15" and
 * 450.0000001 C as "450". Values arrive already in the case's display units; no unit
 * conversion happens here. */
#include "plot_internal.h"

#include <ctype.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

/* Append a group of bytes only if all of it fits, so that truncation never splits an
 * escape or a UTF-8 character (PLplot refuses malformed UTF-8). */
static void tb_group(kphi__plot_textbuf *b, const char *s, size_t n)
{
    if (b->len + n < b->n) {
        memcpy(b->s + b->len, s, n);
        b->len += n;
        b->s[b->len] = '\0';
    } else {
        b->n = b->len + 1; /* full: nothing after the cut */
    }
}

void kphi__plot_tb_putc(kphi__plot_textbuf *b, char c)
{
    tb_group(b, &c, 1);
}

/* Append our own text (which may hold escapes and UTF-8) as one group. */
void kphi__plot_tb_puts(kphi__plot_textbuf *b, const char *s)
{
    tb_group(b, s, strlen(s));
}

/* Length of the valid UTF-8 sequence at p (1 to 4), or 0 when it is not valid UTF-8
 * (overlong forms and surrogates included, RFC 3629 sec. 4). */
static size_t utf8_len(const unsigned char *p)
{
    if (p[0] < 0x80)
        return 1;
    size_t n;
    unsigned long cp;
    if ((p[0] & 0xE0) == 0xC0) {
        n = 2;
        cp = p[0] & 0x1Fu;
    } else if ((p[0] & 0xF0) == 0xE0) {
        n = 3;
        cp = p[0] & 0x0Fu;
    } else if ((p[0] & 0xF8) == 0xF0) {
        n = 4;
        cp = p[0] & 0x07u;
    } else {
        return 0;
    }
    for (size_t i = 1; i < n; i++) {
        if ((p[i] & 0xC0) != 0x80)
            return 0;
        cp = (cp << 6) | (p[i] & 0x3Fu);
    }
    static const unsigned long least[5] = {0, 0, 0x80, 0x800, 0x10000};
    if (cp < least[n] || cp > 0x10FFFF || (cp >= 0xD800 && cp <= 0xDFFF))
        return 0;
    return n;
}

/* Append user text: PLplot's escape character '#' becomes "##", control characters and
 * bytes that are not UTF-8 become '?'. With chem set, digits that follow a letter or ')'
 * are set as subscripts: "NH3" -> "NH#d3#u". */
void kphi__plot_tb_user(kphi__plot_textbuf *b, const char *s, int chem)
{
    if (s == NULL)
        return;
    const unsigned char *p = (const unsigned char *)s;
    while (*p != '\0') {
        if (*p == '#') {
            tb_group(b, "##", 2);
            p++;
        } else if (chem && isdigit(*p) && p > (const unsigned char *)s &&
                   (isalpha(p[-1]) || p[-1] == ')')) {
            char sub[40] = "#d";
            size_t n = 2;
            while (isdigit(*p) && n < sizeof sub - 3)
                sub[n++] = (char)*p++;
            memcpy(sub + n, "#u", 2);
            tb_group(b, sub, n + 2);
        } else if (*p < 0x20 || *p == 0x7F) {
            tb_group(b, "?", 1);
            p++;
        } else {
            size_t n = utf8_len(p);
            if (n == 0) {
                tb_group(b, "?", 1);
                p++;
            } else {
                tb_group(b, (const char *)p, n);
                p += n;
            }
        }
    }
}

/* Shortest of %.0f .. %.3f that shows v to 1e-6 relative, else %.4g: 723.15 K -> "723.15",
 * 450.0000001 C -> "450". */
void kphi__plot_format_value(double v, char *buf, size_t n)
{
    double scale = fabs(v) > 1.0 ? fabs(v) : 1.0;
    double p10 = 1.0;
    for (int dec = 0; dec <= 3; dec++, p10 *= 10.0)
        if (fabs(v - round(v * p10) / p10) <= 1e-6 * scale) {
            snprintf(buf, n, "%.*f", dec, round(v * p10) / p10 + 0.0);
            return;
        }
    snprintf(buf, n, "%.4g", v);
}

/* Fewest decimals (0 to 3) that show v to 1e-6 relative; 4 when none does. */
static int decimals_needed(double v)
{
    double scale = fabs(v) > 1.0 ? fabs(v) : 1.0;
    double p10 = 1.0;
    for (int dec = 0; dec <= 3; dec++, p10 *= 10.0)
        if (fabs(v - round(v * p10) / p10) <= 1e-6 * scale)
            return dec;
    return 4;
}

int kphi__plot_common_decimals(const double v[], size_t n)
{
    int dec = 0;
    for (size_t i = 0; i < n; i++)
        if (isfinite(v[i])) {
            int d = decimals_needed(v[i]);
            dec = d > dec ? d : dec;
        }
    return dec > 3 ? -1 : dec;
}

void kphi__plot_format_fixed(double v, int dec, char *buf, size_t n)
{
    if (dec < 0) {
        snprintf(buf, n, "%.4g", v);
        return;
    }
    double p10 = 1.0;
    for (int k = 0; k < dec; k++)
        p10 *= 10.0;
    snprintf(buf, n, "%.*f", dec, round(v * p10) / p10 + 0.0);
}

/* Display form of a temperature unit name: "C", "degC", "°C" -> "°C"; "K" -> "K". */
void kphi__plot_T_unit_label(const char *unit, char *buf, size_t n)
{
    const char *u = unit;
    if (strncmp(u, "deg", 3) == 0 || strncmp(u, "Deg", 3) == 0 || strncmp(u, "DEG", 3) == 0)
        u += 3;
    else if (strncmp(u, "\xc2\xb0", 2) == 0)
        u += 2;
    char c = (char)toupper((unsigned char)u[0]);
    if (u[0] != '\0' && u[1] == '\0' && (c == 'C' || c == 'F' || c == 'R'))
        snprintf(buf, n, "\xc2\xb0%c", c);
    else if (u[0] != '\0' && u[1] == '\0' && c == 'K')
        snprintf(buf, n, "K");
    else
        snprintf(buf, n, "%s", unit);
}

/* Greedy placement: labels in order of their anchors' height (ties by x); each starts at
 * its anchor's height and is moved up past every placed label it would overlap (their
 * boxes overlap in x and are nearer than the mean of their heights in y), until it
 * overlaps none. The order is found by insertion (a chart has a few dozen labels). */
void kphi__plot_place_labels(kphi__plot_label lab[], size_t n)
{
    size_t order[64];
    if (n > 64)
        n = 64;
    for (size_t i = 0; i < n; i++) {
        size_t k = i;
        while (k > 0 && (lab[order[k - 1]].y > lab[i].y ||
                         (lab[order[k - 1]].y == lab[i].y && lab[order[k - 1]].x > lab[i].x))) {
            order[k] = order[k - 1];
            k--;
        }
        order[k] = i;
    }
    for (size_t a = 0; a < n; a++) {
        kphi__plot_label *l = &lab[order[a]];
        double x0 = l->left ? l->x - l->w : l->x, x1 = l->left ? l->x : l->x + l->w;
        l->y_at = l->y;
        for (size_t pass = 0; pass <= a; pass++) {
            int moved = 0;
            for (size_t b = 0; b < a; b++) {
                const kphi__plot_label *o = &lab[order[b]];
                double o0 = o->left ? o->x - o->w : o->x, o1 = o->left ? o->x : o->x + o->w;
                double gap = 0.5 * (l->h + o->h);
                if (x0 < o1 && o0 < x1 && fabs(l->y_at - o->y_at) < gap) {
                    l->y_at = o->y_at + gap;
                    moved = 1;
                }
            }
            if (!moved)
                break;
        }
    }
}
