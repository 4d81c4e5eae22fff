/* Internal: the label texts of the plot module, shared by its two sources: src/plot.c
 * (data, chart layout, drawing and output through PLplot) and src/plot_text.c (the texts
 * handed to PLplot). Not part of the public API. */
#ifndef KPHI_PLOT_INTERNAL_H
#define KPHI_PLOT_INTERNAL_H

#include <stddef.h>

/* A fixed-size text buffer that truncates quietly (labels are short). Set it up as
 * {buffer, size, 0} with buffer[0] = '\0'; the text stays terminated and never splits an
 * escape or a UTF-8 character. */
typedef struct {
    char *s;
    size_t n, len;
} kphi__plot_textbuf;

/* Append one character of our own text. */
void kphi__plot_tb_putc(kphi__plot_textbuf *b, char c);
/* Append our own text (which may hold PLplot escapes and UTF-8) as one group. */
void kphi__plot_tb_puts(kphi__plot_textbuf *b, const char *s);
/* Append user text: '#' becomes "##", control characters and bytes that are not UTF-8
 * become '?'; with chem set, digits after a letter or ')' become subscripts
 * ("NH3" -> "NH#d3#u"). s may be NULL (nothing appended). */
void kphi__plot_tb_user(kphi__plot_textbuf *b, const char *s, int chem);
/* Shortest of %.0f .. %.3f that shows v to 1e-6 relative, else %.4g, into buf[n]. */
void kphi__plot_format_value(double v, char *buf, size_t n);
/* Decimals (0 to 3) that show every one of v[n] to 1e-6 relative, so that a legend
 * rounds all its values alike ("150", "200", "250"; "148.987", "198.987"); -1 when some
 * value needs more (then each is shown with %.4g). */
int kphi__plot_common_decimals(const double v[], size_t n);
/* v with dec decimals (kphi__plot_common_decimals()), or %.4g when dec < 0. */
void kphi__plot_format_fixed(double v, int dec, char *buf, size_t n);
/* Display form of a temperature unit name into buf[n]: "C", "degC", "°C" -> "°C";
 * "K" -> "K"; anything else unchanged. */
void kphi__plot_T_unit_label(const char *unit, char *buf, size_t n);

#endif /* KPHI_PLOT_INTERNAL_H */
