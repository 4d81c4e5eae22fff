/* Internal: what the two sources of the case module share: src/case.c (the case loader,
 * command-line overrides, validation, accessors) and src/case_axis.c (T and P values and
 * sweep axes from YAML nodes or command-line text). Not part of the public API. */
#ifndef KPHI_CASE_INTERNAL_H
#define KPHI_CASE_INTERNAL_H

#include <stddef.h>

#include "kphi/case.h"
#include "kphi/error.h"
#include "kphi/rxnset.h"
#include "yamlutil.h"

enum {
    KPHI__CASE_PATH_MAX = 256, /* a path kept for messages */
    KPHI__CASE_PART_MAX = 128  /* one item of an override or axis text */
};

typedef enum { KPHI__CASE_TEMPERATURE, KPHI__CASE_PRESSURE } kphi__case_quantity;

/* One sweep axis, in K or Pa. */
typedef struct {
    int given;        /* 0: the axis is the case's single T or P */
    int is_range;     /* marks[0], marks[1] are the `from` and `to` entries */
    size_t n;
    double *v;
    kphi_mark *marks; /* n marks for a list, 2 for a range */
    char path[KPHI__CASE_PATH_MAX];
    char unit[16];    /* the unit the axis was written in ("bar", "C"), for display */
} kphi__case_axis;

/* In src/case.c: small helpers. */

/* KPHI_ENOMEM "out of memory" at path (no position); returns KPHI_ENOMEM. */
int kphi__case_nomem(kphi_error *err, const char *path);
/* 1 for a blank or a tab. */
int kphi__case_is_blank(char ch);
/* Mark `off` bytes into a text that starts at `at` (kept 0 when unknown); columns count
 * characters, not bytes. */
kphi_mark kphi__case_shift(kphi_mark at, const char *text, size_t off);
/* Mark of the first character of a scalar's text (one column after a quote). */
kphi_mark kphi__case_text_mark(const yaml_node_t *node);

/* In src/case_axis.c. */

/* One temperature (K) or pressure (Pa) from text such as "450 C" or "200 bar"; with step
 * set, a difference ("10 C" is 10 K). Errors (KPHI_EINPUT) point at `at` in path. */
int kphi__case_parse_value(kphi__case_quantity q, int step, const char *text, const char *path,
                           kphi_mark at, double *out, kphi_error *err);
/* Free the values of a and zero it. */
void kphi__case_axis_clear(kphi__case_axis *a);
/* Axis from text as on the command line ("350:550:10C", "100bar,200bar", "100,150,200 bar",
 * "450 C"); replaces a only on success. KPHI_EINPUT pointing into text, KPHI_ENOMEM. */
int kphi__case_axis_parse_text(kphi__case_axis *a, kphi__case_quantity q, const char *text,
                               const char *path, kphi_mark at, kphi_error *err);
/* Axis from the YAML node of sweep.T or sweep.P: a {from, to, step} range, a list, or a
 * scalar in the command-line form; replaces a only on success. */
int kphi__case_axis_parse_node(kphi__case_axis *a, kphi__case_quantity q, kphi__yaml *y,
                               yaml_node_t *node, const char *path, kphi_error *err);

/* In src/case_loop.c: the `loop` block. */
typedef struct kphi__case_loop kphi__case_loop;
int kphi__case_loop_load(kphi__case_loop **out, const kphi_rxnset *set, const char *path,
                         kphi__yaml *y, yaml_node_t *node, kphi_error *err);
void kphi__case_loop_free(kphi__case_loop *l);
const kphi_case_loop *kphi__case_loop_public(const kphi__case_loop *l);
int kphi__case_loop_set_purge(kphi__case_loop *l, const char *text, kphi_error *err);
int kphi__case_loop_set_T(kphi__case_loop *l, const char *text, kphi_error *err);
/* P: the loop pressure (Pa, NaN when not given), P_path where it came from. */
int kphi__case_loop_validate(const kphi__case_loop *l, const kphi_rxnset *set, double P,
                             const char *P_path, kphi_error *err);

#endif /* KPHI_CASE_INTERNAL_H */
