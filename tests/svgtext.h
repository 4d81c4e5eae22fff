/* Test helper: the texts of an SVG chart as PLplot's native svg device writes them, one
 * <text> element per line, its <tspan> parts joined, character references (&#x72; &#114;)
 * and the predefined entities decoded to UTF-8 (XML 1.0, sec. 4.1 and 4.6). Used by
 * tests that read the labels of a chart. */
#ifndef KPHI_TEST_SVGTEXT_H
#define KPHI_TEST_SVGTEXT_H

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* Append code point cp as UTF-8 (RFC 3629). */
static size_t svgtext_utf8(char *o, unsigned long cp)
{
    if (cp < 0x80) {
        o[0] = (char)cp;
        return 1;
    }
    if (cp < 0x800) {
        o[0] = (char)(0xC0 | (cp >> 6));
        o[1] = (char)(0x80 | (cp & 0x3F));
        return 2;
    }
    if (cp < 0x10000) {
        o[0] = (char)(0xE0 | (cp >> 12));
        o[1] = (char)(0x80 | ((cp >> 6) & 0x3F));
        o[2] = (char)(0x80 | (cp & 0x3F));
        return 3;
    }
    o[0] = (char)(0xF0 | (cp >> 18));
    o[1] = (char)(0x80 | ((cp >> 12) & 0x3F));
    o[2] = (char)(0x80 | ((cp >> 6) & 0x3F));
    o[3] = (char)(0x80 | (cp & 0x3F));
    return 4;
}

/* The texts of the SVG file at path, one element per line; NULL when it cannot be read.
 * Caller frees. */
static char *svg_texts(const char *path)
{
    FILE *f = fopen(path, "rb");
    if (f == NULL)
        return NULL;
    fseek(f, 0, SEEK_END);
    long size = ftell(f);
    rewind(f);
    char *in = malloc((size_t)size + 1);
    char *out = malloc((size_t)size + 1);
    if (in == NULL || out == NULL || fread(in, 1, (size_t)size, f) != (size_t)size) {
        fclose(f);
        free(in);
        free(out);
        return NULL;
    }
    fclose(f);
    in[size] = '\0';
    size_t n = 0;
    const char *p = in;
    while ((p = strstr(p, "<text")) != NULL) {
        const char *end = strstr(p, "</text>");
        if (end == NULL)
            break;
        p = strchr(p, '>');
        if (p == NULL || p > end)
            break;
        p++;
        while (p < end) {
            if (*p == '<') { /* a tspan tag: skip it */
                while (p < end && *p != '>')
                    p++;
                p++;
            } else if (*p == '&') {
                unsigned long cp = 0;
                if (p[1] == '#' && p[2] == 'x')
                    cp = strtoul(p + 3, NULL, 16);
                else if (p[1] == '#')
                    cp = strtoul(p + 2, NULL, 10);
                else if (strncmp(p, "&amp;", 5) == 0)
                    cp = '&';
                else if (strncmp(p, "&lt;", 4) == 0)
                    cp = '<';
                else if (strncmp(p, "&gt;", 4) == 0)
                    cp = '>';
                else if (strncmp(p, "&quot;", 6) == 0)
                    cp = '"';
                else if (strncmp(p, "&apos;", 6) == 0)
                    cp = '\'';
                n += svgtext_utf8(out + n, cp);
                p = strchr(p, ';') + 1;
            } else {
                out[n++] = *p++;
            }
        }
        out[n++] = '\n';
        p = end + 7;
    }
    out[n] = '\0';
    free(in);
    return out;
}

/* Does a line of texts equal line exactly? */
static int svg_has_line(const char *texts, const char *line)
{
    size_t len = strlen(line);
    for (const char *p = texts; p != NULL && *p != '\0';) {
        const char *nl = strchr(p, '\n');
        size_t l = nl != NULL ? (size_t)(nl - p) : strlen(p);
        if (l == len && memcmp(p, line, len) == 0)
            return 1;
        p = nl != NULL ? nl + 1 : NULL;
    }
    return 0;
}

#endif /* KPHI_TEST_SVGTEXT_H */
