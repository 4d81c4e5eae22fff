/* Validation of the synthesis loop (src/loop.c) against published and common-practice
 * figures of operating loops, on the shipped invented cases cases/ammonia_loop.yaml and
 * cases/methanol_loop.yaml. The cases are invented scenarios; what is checked is that the
 * loop they describe lands where operating loops are known to run. Every value below
 * names where it comes from:
 *
 *  - "Synthetic Nitrogen Products", ch. 6 (ammonia synthesis), p. 163: "The reaction
 *    pressure is normally in the range of 150 to 250 bar, and temperatures are in the
 *    range of 350 C to 550 C. At the usual commercial converter operating conditions, the
 *    conversion achieved per pass is only 20% to 30%." Seen in a copy of that page at
 *    scribd.com/document/672150775; the book's author and year (G. R. Maxwell, 2004) are
 *    from memory.
 *  - NH3 at the outlet of a modern converter at 150-250 bar: 15-20 mol % (common practice).
 *  - Inerts (CH4 + Ar) at the converter inlet of an ammonia loop: 10-15 mol % (common
 *    practice).
 *  - NH3 in the recycle gas leaving a chilled separator (about -10 to 0 C, 150-250 bar):
 *    2-5 mol % (common practice, from memory).
 *  - Methanol loops: recycle ratio (recycle / make-up, molar) 3-5 (common practice); crude
 *    methanol from a make-up holding CO2 carries 5-20 mass % water (common practice, from
 *    memory: the more CO2 the make-up brings, the more water).
 *
 * The NH3 left in the recycle gas depends on the binary parameters of NH3 with H2 and N2.
 * While the reaction set and case give none (k_ij = 0), Peng-Robinson puts the fugacity
 * coefficient of NH3 in the separator vapour near 0.44, and the recycle gas holds more NH3
 * than operating loops show. The check then asserts that this is the reason: the vapour's
 * NH3 equals Raoult's law with the Poynting correction divided by that fugacity
 * coefficient, with the vapour pressure of Stull (1947, Ind. Eng. Chem. 39, 517) as the
 * Antoine fit of the NIST Chemistry WebBook (log10 P/bar = 4.86886 - 1113.928/(T -
 * 10.409); seen as quoted in reactions/species.yaml) and the saturated liquid density of
 * NH3 at -5 C, 0.645 g/cm3 (from memory). Once k_ij for an NH3 pair are in effect, the
 * common-practice range is asserted instead. */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "kphi/kphi.h"
#include "testutil.h"

#define R_GAS 8.314462618 /* J/(mol K), CODATA 2018 (exact since the 2019 SI) */

typedef struct {
    kphi_case *cs;
    const kphi_rxnset *set;
    kphi_eos *pr, *ideal;
    kphi_loop_work *w;
    kphi_loop_result *res[2]; /* real gas, ideal gas */
    double mk[16];
    kphi_loop_spec sp;
} fixture;

/* The case's loop at its own conditions, per 100 mol/s of make-up (the figures checked do
 * not depend on the scale). */
static void fx_open(fixture *f, const char *path)
{
    memset(f, 0, sizeof *f);
    kphi_error err;
    kphi_error_clear(&err);
    f->cs = kphi_case_load_file(path, &err);
    ck_assert_msg(f->cs != NULL, "%s: %s", path, err.msg);
    ck_assert_int_eq(kphi_case_validate_loop(f->cs, &err), KPHI_OK);
    f->set = kphi_case_rxnset(f->cs);
    size_t s = kphi_rxnset_n_species(f->set);
    ck_assert_uint_le(s, 16);
    kphi_loop_spec *sp = &f->sp;
    /* per 100 mol/s of make-up: the shipped cases give a production target */
    ck_assert_int_eq(kphi_loop_spec_from_case(f->cs, f->mk, sp), 0);
    f->pr = kphi_case_make_eos(f->cs, KPHI_EOS_PR, &err);
    f->ideal = kphi_case_make_eos(f->cs, KPHI_EOS_IDEAL, &err);
    f->w = kphi_loop_work_alloc(s, kphi_rxnset_n_reactions(f->set));
    f->res[0] = kphi_loop_result_alloc(s);
    f->res[1] = kphi_loop_result_alloc(s);
    ck_assert(f->pr != NULL && f->ideal != NULL && f->w != NULL && f->res[0] != NULL &&
              f->res[1] != NULL);
    const kphi_eos *conv[2] = {f->pr, f->ideal};
    for (int k = 0; k < 2; k++) {
        kphi_error_clear(&err);
        ck_assert_msg(kphi_loop_solve(f->set, conv[k], f->pr, sp, NULL, f->w, f->res[k], &err) ==
                          KPHI_OK,
                      "%s: %s", path, err.msg);
    }
}

static void fx_close(fixture *f)
{
    kphi_loop_result_free(f->res[0]);
    kphi_loop_result_free(f->res[1]);
    kphi_loop_work_free(f->w);
    kphi_eos_free(f->pr);
    kphi_eos_free(f->ideal);
    kphi_case_free(f->cs);
}

static size_t idx(const fixture *f, const char *name)
{
    long i = kphi_rxnset_species_index(f->set, name);
    ck_assert_msg(i >= 0, "species %s", name);
    return (size_t)i;
}

static double y_of(const kphi_loop_result *r, kphi_loop_stream_id id, size_t i)
{
    return r->stream[id].n[i] / r->stream[id].total;
}

/* Print "name: real x, ideal y (range lo-hi, source)" and assert the real-gas figure. */
static void in_range(const char *what, double real, double ideal, double lo, double hi,
                     const char *source)
{
    printf("  %-44s %8.3f (ideal-gas converter %8.3f)   %s %g-%g\n", what, real, ideal, source,
           lo, hi);
    ck_assert_msg(real >= lo && real <= hi, "%s = %g, outside %g-%g (%s)", what, real, lo, hi,
                  source);
}

/* 1 when a k_ij of NH3 with H2 or N2 is in effect for the case. */
static int nh3_kij_given(const fixture *f)
{
    size_t nh3 = idx(f, "NH3"), h2 = idx(f, "H2"), n2 = idx(f, "N2");
    for (size_t m = 0; m < kphi_case_n_kij(f->cs); m++) {
        kphi_case_kij_entry e;
        ck_assert_int_eq(kphi_case_kij(f->cs, m, &e), KPHI_OK);
        size_t o = e.i == nh3 ? e.j : e.j == nh3 ? e.i : (size_t)-1;
        if ((o == h2 || o == n2) && e.value != 0.0)
            return 1;
    }
    return 0;
}

START_TEST(ammonia_loop_figures)
{
    fixture f;
    fx_open(&f, "cases/ammonia_loop.yaml");
    const kphi_loop_result *r = f.res[0], *id = f.res[1];
    size_t nh3 = idx(&f, "NH3");
    printf("\nammonia loop (cases/ammonia_loop.yaml): %.4g bar, converter outlet %.2f C, "
           "separator %.2f C\n",
           f.sp.P / 1e5, f.sp.T_out - 273.15, f.sp.T_sep - 273.15);
    in_range("NH3 at converter outlet, mol %", 100.0 * r->product_out, 100.0 * id->product_out,
             15.0, 20.0, "common practice");
    in_range("per-pass conversion of N2, %", 100.0 * r->per_pass_conversion,
             100.0 * id->per_pass_conversion, 20.0, 30.0,
             "Synthetic Nitrogen Products ch. 6 p. 163:");
    in_range("inerts at converter inlet, mol %", 100.0 * r->inerts_in, 100.0 * id->inerts_in,
             10.0, 15.0, "common practice");

    /* NH3 in the recycle gas */
    double y_rec = y_of(r, KPHI_LOOP_S_RECYCLE, nh3);
    if (nh3_kij_given(&f)) {
        in_range("NH3 in the recycle gas, mol %", 100.0 * y_rec,
                 100.0 * y_of(id, KPHI_LOOP_S_RECYCLE, nh3), 2.0, 5.0,
                 "common practice (from memory)");
    } else {
        /* the separator flashed again here, for the NH3 fugacity coefficient */
        size_t s = kphi_rxnset_n_species(f.set);
        kphi_phase_work *pw = kphi_phase_work_alloc(s, 0);
        kphi_flash_result *fl = kphi_flash_result_alloc(s);
        ck_assert(pw != NULL && fl != NULL);
        double feed[16];
        for (size_t i = 0; i < s; i++)
            feed[i] = r->stream[KPHI_LOOP_S_CONVERTER_OUT].n[i] +
                      (f.sp.makeup_at == KPHI_LOOP_MAKEUP_AT_SEPARATOR ? f.mk[i] : 0.0);
        kphi_error err;
        kphi_error_clear(&err);
        ck_assert_int_eq(kphi_phase_flash(f.pr, f.sp.T_sep, f.sp.P_sep, feed, NULL, pw, fl, &err),
                         KPHI_OK);
        ck_assert_uint_eq(fl->n_phases, 2);
        double T = f.sp.T_sep, P = f.sp.P_sep;
        double phi_v = exp(fl->phase[0].lnphi[nh3]);
        double x = fl->phase[1].y[nh3];
        double p_sat = 1e5 * pow(10.0, 4.86886 - 1113.928 / (T - 10.409)); /* Stull 1947 */
        double v_l = 17.0305e-3 / 645.0; /* m3/mol: M / rho, rho = 0.645 g/cm3 (from memory) */
        double y_est = x * p_sat * exp(v_l * (P - p_sat) / (R_GAS * T)) / (phi_v * P);
        printf("  %-44s %8.3f (ideal-gas converter %8.3f)   common practice 2-5 (from "
               "memory):\n"
               "    above it with k_ij = 0 for the NH3 pairs: phi_NH3 in the vapour %.3f; "
               "Raoult + Poynting / phi gives %.3f\n",
               "NH3 in the recycle gas, mol %", 100.0 * y_rec,
               100.0 * y_of(id, KPHI_LOOP_S_RECYCLE, nh3), phi_v, 100.0 * y_est);
        /* the excess is the fugacity coefficient's: the liquid side agrees with the
         * published vapour pressure within 10 % (phi of the saturated vapour, about 0.96,
         * and the liquid's compressibility are left out) */
        ck_assert_msg(fabs(y_rec / y_est - 1.0) < 0.10, "y_NH3 %g vs Raoult-Poynting/phi %g",
                      y_rec, y_est);
        ck_assert_msg(phi_v < 0.6, "phi_NH3 %g: the NH3 excess is not the fugacity coefficient's",
                      phi_v);
        ck_assert_msg(y_rec > 0.02 && y_rec < 0.07, "y_NH3 in the recycle gas %g", y_rec);
        kphi_flash_result_free(fl);
        kphi_phase_work_free(pw);
    }
    fflush(stdout);
    fx_close(&f);
}
END_TEST

START_TEST(methanol_loop_figures)
{
    fixture f;
    fx_open(&f, "cases/methanol_loop.yaml");
    const kphi_loop_result *r = f.res[0], *id = f.res[1];
    printf("\nmethanol loop (cases/methanol_loop.yaml): %.4g bar, converter outlet %.2f C, "
           "separator %.2f C\n",
           f.sp.P / 1e5, f.sp.T_out - 273.15, f.sp.T_sep - 273.15);
    in_range("recycle ratio (recycle / make-up, molar)", r->recycle_ratio, id->recycle_ratio, 3.0,
             5.0, "common practice");
    size_t h2o = idx(&f, "H2O");
    double m_w = kphi_rxnset_species(f.set, h2o)->molar_mass;
    double w[2];
    for (int k = 0; k < 2; k++) {
        const kphi_loop_stream *L = &f.res[k]->stream[KPHI_LOOP_S_LIQUID];
        w[k] = L->n[h2o] * m_w / L->mass;
    }
    in_range("water in the crude, mass %", 100.0 * w[0], 100.0 * w[1], 5.0, 20.0,
             "common practice (from memory)");
    printf("  %-44s %8.3f (ideal-gas converter %8.3f)   set by the case's purge target\n",
           "inerts at converter inlet, mol %", 100.0 * r->inerts_in, 100.0 * id->inerts_in);
    fflush(stdout);
    fx_close(&f);
}
END_TEST

static Suite *loop_validation_suite(void)
{
    Suite *s = suite_create("validation_loop");
    TCase *tc = tcase_create("loop");
    tcase_set_timeout(tc, 60);
    tcase_add_test(tc, ammonia_loop_figures);
    tcase_add_test(tc, methanol_loop_figures);
    suite_add_tcase(s, tc);
    return s;
}

KPHI_TEST_MAIN(loop_validation_suite)
