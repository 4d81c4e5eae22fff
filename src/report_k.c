/* kphi report, the K basis: where each reaction's equilibrium constant came from (the
 * species' polynomials, "tables", or a published correlation of the reaction set), its
 * warnings, the comparison of the correlation's heat of reaction with the polynomials',
 * and the side-by-side answer for every K basis (`solve --K all`).
 *
 * Heats of reaction at the solved T, J/mol of the equation as written:
 *   polynomials:  dH = sum_i nu_i h_i°(T)  (kphi_thermo_h(), elemental reference scale);
 *   correlation:  dH = -R d ln K / d(1/T)  (van 't Hoff; kphi_rxnset_kcorr_dH()).
 * The energy answers (adiabatic outlet, approach temperature) use the first; the table and
 * JSON show both once, so a user sees whether the two bases are consistent. */
#include "kphi/report.h"

#include <math.h>
#include <string.h>

#include "kphi/thermo.h"
#include "report_internal.h"

static const char TABLES_SOURCE[] =
    "the species' thermochemistry: K = exp(-sum nu g°/RT) from their NASA polynomials";

/* The correlation of reaction j in the point's basis, or NULL. */
static const kphi_rxnset_kcorr *corr(const kphi_report_point *pt, size_t j)
{
    return kphi_rxnset_kcorr_get(pt->set, j, pt->K_basis);
}

static double dH_polynomials(const kphi_rxnset *set, size_t j, double T)
{
    double h = 0.0;
    for (size_t i = 0; i < kphi_rxnset_n_species(set); i++) {
        double nu = kphi_rxnset_nu(set, j, i);
        if (nu != 0.0)
            h += nu * kphi_thermo_h(kphi_rxnset_species(set, i), T);
    }
    return h;
}

/* ---- warnings ----------------------------------------------------------------------- */

/* Each K warning of pt: for every temperature the answer stands on (the solved T, the
 * approach temperatures, the adiabatic outlets), every reaction whose correlation does not
 * cover it. */
size_t kphi__report_K_warnings(const kphi_report_point *pt, kphi_report_warning_fn fn,
                               void *ctx)
{
    if (pt->K_basis == KPHI_K_TABLES || pt->real == NULL)
        return 0;
    enum { MAX_T = 4 + 2 * KPHI_REPORT_MAX_BEDS };
    double Ts[MAX_T];
    const char *what[MAX_T];
    size_t n = 0;
    Ts[n] = pt->real->T;
    what[n++] = "";
    const kphi_report_energy *x = pt->energy;
    if (x != NULL && x->approach)
        for (int m = 0; m < 2; m++) {
            Ts[n] = x->T_eq[m];
            what[n++] = m == 0 ? " at the approach temperature (real gas)"
                               : " at the approach temperature (ideal gas)";
        }
    if (x != NULL && x->adiabatic) {
        size_t nb = x->n_beds > 1 ? x->n_beds : 1;
        for (size_t b = 0; b < nb && b < KPHI_REPORT_MAX_BEDS; b++)
            for (int m = 0; m < 2; m++) {
                const kphi_equil_result *o = b == 0 ? x->out[m] : x->bed_out[b][m];
                if (o == NULL)
                    continue;
                Ts[n] = o->T;
                what[n++] = m == 0 ? " at an adiabatic bed outlet (real gas)"
                                   : " at an adiabatic bed outlet (ideal gas)";
            }
    }
    size_t count = 0;
    size_t r = kphi_rxnset_n_reactions(pt->set);
    for (size_t t = 0; t < n; t++) {
        int seen = 0;
        for (size_t u = 0; u < t && !seen; u++)
            seen = Ts[u] == Ts[t];
        if (seen || !isfinite(Ts[t]))
            continue;
        for (size_t j = 0; j < r; j++) {
            const kphi_rxnset_kcorr *k = corr(pt, j);
            if (k == NULL || kphi_rxnset_kcorr_in_range(k, Ts[t]))
                continue;
            double lo, hi;
            kphi_rxnset_kcorr_range(k, &lo, &hi);
            char msg[256];
            snprintf(msg, sizeof msg,
                     "K of reaction %zu (%s) extrapolated%s: T = %.2f K is outside its validity "
                     "range %.2f-%.2f K",
                     j + 1, kphi_rxnset_kcorr_name(k), what[t], Ts[t], lo, hi);
            if (fn != NULL)
                fn(ctx, msg);
            count++;
        }
    }
    return count;
}

void kphi__report_K_csv_note(FILE *out, const kphi_report_point *pt, int *first)
{
    if (pt->K_basis == KPHI_K_TABLES)
        return;
    for (size_t j = 0; j < kphi_rxnset_n_reactions(pt->set); j++)
        if (pt->real->K_outside[j]) {
            fprintf(out, "%sK_%zu extrapolated", *first ? "" : "; ", j + 1);
            *first = 0;
        }
}

/* ---- table and JSON of one point ---------------------------------------------------- */

void kphi__report_K_header(FILE *out, const kphi_report_point *pt)
{
    const kphi_rxnset *set = pt->set;
    size_t nb = kphi_rxnset_n_K_bases(set), r = kphi_rxnset_n_reactions(set);
    if (nb <= 1)
        return;
    if (pt->K_basis == KPHI_K_TABLES) {
        fputs("K: tables (the species' polynomials); the set also offers", out);
        for (size_t b = 1; b < nb; b++)
            fprintf(out, "%s %s", b > 1 ? "," : "", kphi_rxnset_K_basis_name(set, b));
        fputs(" (--K NAME, or --K all)\n", out);
        return;
    }
    const char *name = kphi_rxnset_K_basis_name(set, pt->K_basis);
    for (size_t j = 0; j < r; j++) {
        const kphi_rxnset_kcorr *k = corr(pt, j);
        if (k == NULL) {
            fprintf(out, "K of reaction %zu: tables (the species' polynomials; %s has no K for "
                         "it)\n",
                    j + 1, name);
            continue;
        }
        double lo, hi;
        kphi_rxnset_kcorr_range(k, &lo, &hi);
        fprintf(out, "K of reaction %zu: %s, %s; valid %.2f-%.2f K%s\n", j + 1, name,
                kphi_rxnset_kcorr_source(k), lo, hi,
                pt->real->K_outside[j] ? " (EXTRAPOLATED here)" : "");
    }
}

void kphi__report_K_heat(FILE *out, const kphi_report_point *pt)
{
    const kphi_rxnset *set = pt->set;
    double T = pt->real->T;
    int first = 1;
    for (size_t j = 0; j < kphi_rxnset_n_reactions(set); j++) {
        const kphi_rxnset_kcorr *k = corr(pt, j);
        if (k == NULL)
            continue;
        double hv = kphi_rxnset_kcorr_dH(k, T), hp = dH_polynomials(set, j, T);
        if (first)
            fprintf(out, "heat of reaction at %.2f K, van 't Hoff of the K correlation vs the "
                         "polynomials' (which every energy balance uses):\n ",
                    T);
        fprintf(out, "%s%zu: %.2f vs %.2f kJ/mol (%+.2f)", first ? " " : "; ", j + 1, hv / 1e3,
                hp / 1e3, (hv - hp) / 1e3);
        first = 0;
    }
    if (!first)
        fputc('\n', out);
}

void kphi__report_K_json(FILE *out, const kphi_report_point *pt, size_t j)
{
    const kphi_rxnset *set = pt->set;
    if (kphi_rxnset_n_K_bases(set) <= 1)
        return; /* the set offers no choice: the output stays as it was */
    const kphi_rxnset_kcorr *k = corr(pt, j);
    fputs(", \"K_basis\": ", out);
    kphi__report_jstr(out, k != NULL ? kphi_rxnset_kcorr_name(k) : "tables");
    fputs(", \"K_source\": ", out);
    kphi__report_jstr(out, k != NULL ? kphi_rxnset_kcorr_source(k) : TABLES_SOURCE);
    if (k == NULL)
        return;
    double lo, hi, T = pt->real->T;
    kphi_rxnset_kcorr_range(k, &lo, &hi);
    fputs(", \"K_range_K\": [", out);
    kphi__report_jnum(out, lo);
    fputs(", ", out);
    kphi__report_jnum(out, hi);
    fprintf(out, "], \"K_extrapolated\": %s", pt->real->K_outside[j] ? "true" : "false");
    double hv = kphi_rxnset_kcorr_dH(k, T), hp = dH_polynomials(set, j, T);
    fputs(", \"dH_vant_Hoff_kJ_mol\": ", out);
    kphi__report_jnum(out, hv / 1e3);
    fputs(", \"dH_polynomials_kJ_mol\": ", out);
    kphi__report_jnum(out, hp / 1e3);
    fputs(", \"dH_difference_kJ_mol\": ", out);
    kphi__report_jnum(out, (hv - hp) / 1e3);
}

/* ---- every basis side by side -------------------------------------------------------- */

int kphi_report_K_compare_write(FILE *out, kphi_report_format fmt, const kphi_report_point pts[],
                                size_t n, kphi_error *err)
{
    kphi_mark none = {0, 0};
    if (n == 0)
        return KPHI_OK;
    const kphi_rxnset *set = pts[0].set;
    size_t r = kphi_rxnset_n_reactions(set);
    const kphi_report_point *first = NULL;
    for (size_t k = 0; k < n && first == NULL; k++)
        if (pts[k].failed == NULL)
            first = &pts[k];
    if (first == NULL)
        return kphi_error_set(err, KPHI_EFAILED, NULL, none, "every K basis failed");
    if (fmt == KPHI_REPORT_JSON) {
        fputc('[', out);
        for (size_t k = 0; k < n; k++) {
            if (k)
                fputs(",\n ", out);
            int rc = pts[k].failed != NULL
                         ? kphi_report_json_failed(out, NULL, NAN, NAN, pts[k].failed, err)
                         : kphi_report_json_point(out, &pts[k], err);
            if (rc != KPHI_OK)
                return rc;
        }
        fputs("]\n", out);
    } else if (fmt == KPHI_REPORT_CSV) {
        fputs("K_basis,", out);
        int rc = kphi_report_csv_header(out, set, 0, NULL, err);
        for (size_t k = 0; k < n && rc == KPHI_OK; k++) {
            fprintf(out, "%s,", kphi_rxnset_K_basis_name(set, pts[k].K_basis));
            if (pts[k].failed != NULL)
                rc = kphi_report_csv_failed_row(out, set, first->real->T, first->real->P,
                                                pts[k].failed, 0, NULL, err);
            else
                rc = kphi_report_csv_row(out, &pts[k], 0, err);
        }
        if (rc != KPHI_OK)
            return rc;
    } else {
        kphi__report_title(out, first);
        kphi__report_conditions(out, first);
        fprintf(out, "   EOS: %s   every K basis\n\n", kphi_eos_model_name(first->model));
        fprintf(out, "%-14s %9s %9s %8s", "K basis", "X real", "X ideal", "shift");
        char head[48];
        for (size_t j = 0; j < r; j++) {
            snprintf(head, sizeof head, "K_%zu", j + 1);
            fprintf(out, " %11s", head);
        }
        kphi__report_y_heads(out, set);
        fputc('\n', out);
        double xmin = INFINITY, xmax = -INFINITY;
        for (size_t k = 0; k < n; k++) {
            const kphi_report_point *p = &pts[k];
            const char *name = kphi_rxnset_K_basis_name(set, p->K_basis);
            if (p->failed != NULL) {
                fprintf(out, "%-14s failed: %s\n", name, p->failed);
                continue;
            }
            fprintf(out, "%-14s %9.4f %9.4f %+8.2f", name, p->X_real, p->X_ideal,
                    100.0 * (p->X_real - p->X_ideal));
            for (size_t j = 0; j < r; j++)
                fprintf(out, " %11.5g", exp(p->real->lnK[j]));
            kphi__report_y_cells(out, set, p->real->y);
            fputc('\n', out);
            xmin = fmin(xmin, p->X_real);
            xmax = fmax(xmax, p->X_real);
        }
        fprintf(out, "\n(conversion of %s; K_j of reaction j, P° = 1 bar:",
                kphi_rxnset_conversion_label(set));
        kphi__report_equations(out, set);
        for (size_t k = 0; k < n; k++) {
            size_t b = pts[k].K_basis;
            if (b == KPHI_K_TABLES) {
                fprintf(out, "  %-14s %s\n", kphi_rxnset_K_basis_name(set, b), TABLES_SOURCE);
                continue;
            }
            for (size_t j = 0; j < r; j++) {
                const kphi_rxnset_kcorr *c = kphi_rxnset_kcorr_get(set, j, b);
                fprintf(out, "  %-14s %zu: ", j == 0 ? kphi_rxnset_K_basis_name(set, b) : "",
                        j + 1);
                if (c == NULL) {
                    fputs("tables (no correlation for this reaction)\n", out);
                    continue;
                }
                double lo, hi;
                kphi_rxnset_kcorr_range(c, &lo, &hi);
                fprintf(out, "%s; valid %.2f-%.2f K\n", kphi_rxnset_kcorr_source(c), lo, hi);
            }
        }
        if (isfinite(xmin))
            fprintf(out, "spread of the real-gas conversion over the K bases: %.2f points\n",
                    100.0 * (xmax - xmin));
        fputs("Equilibrium limit for screening, not a design basis.\n", out);
    }
    if (ferror(out))
        return kphi_error_set(err, KPHI_EIO, NULL, none, "write error on output");
    return KPHI_OK;
}
