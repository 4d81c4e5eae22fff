/* Tests of the species module: loading reactions/species.yaml, molar masses from the
 * IUPAC 2013 standard atomic weights, unit conversion to SI, look-ups, and every error
 * path of the loader with its exact line and column. */
#include "kphi/species.h"

#include <check.h>
#include <math.h>
#include <string.h>

#include "testutil.h"

static const char *const REQUIRED[] = {"N2", "H2",    "NH3", "Ar", "CH4", "CO",
                                       "CO2", "H2O", "CH3OH", "He", "O2", "C(gr)"};
enum { N_REQUIRED = sizeof REQUIRED / sizeof REQUIRED[0] };

static kphi_species_db *load_data(void)
{
    kphi_error err;
    kphi_error_clear(&err);
    kphi_species_db *db = kphi_species_db_load_file(KPHI_SPECIES_FILE, &err);
    if (db == NULL) {
        char buf[600];
        kphi_error_format(&err, buf, sizeof buf);
        ck_abort_msg("%s", buf);
    }
    return db;
}

START_TEST(data_file_has_every_required_species)
{
    kphi_species_db *db = load_data();
    ck_assert_uint_ge(kphi_species_db_count(db), N_REQUIRED);
    for (size_t i = 0; i < N_REQUIRED; i++) {
        const kphi_species *sp = kphi_species_db_find(db, REQUIRED[i]);
        ck_assert_msg(sp != NULL, "species %s missing", REQUIRED[i]);
        ck_assert_str_eq(sp->name, REQUIRED[i]);
        ck_assert_uint_gt(sp->n_elements, 0);
        ck_assert(sp->molar_mass > 1.0e-3 && sp->molar_mass < 0.2);
        ck_assert(sp->src_thermo != NULL && strlen(sp->src_thermo) > 20);
        ck_assert(sp->T_low < sp->T_mid && sp->T_mid < sp->T_high);
        ck_assert_str_eq(sp->path, KPHI_SPECIES_FILE);
        ck_assert_int_gt(sp->mark.line, 0);
        ck_assert_int_gt(sp->mark.column, 0);
        if (sp->phase == KPHI_PHASE_GAS) {
            ck_assert_msg(sp->has_critical, "%s has no critical constants", sp->name);
            ck_assert(sp->src_critical != NULL && strlen(sp->src_critical) > 20);
            ck_assert(sp->Tc > 0.0 && sp->Pc > 1.0e5);
        }
        ck_assert(sp->note != NULL);
    }
    const kphi_species *gr = kphi_species_db_find(db, "C(gr)");
    ck_assert_int_eq(gr->phase, KPHI_PHASE_CONDENSED);
    ck_assert_int_eq(kphi_species_db_find(db, "NH3")->phase, KPHI_PHASE_GAS);
    kphi_species_db_free(db);
}
END_TEST

START_TEST(molar_masses_follow_iupac_2013)
{
    /* IUPAC 2013 conventional atomic weights (Meija et al. 2016, Pure Appl. Chem. 88,
     * 265, Table 3): H 1.008, C 12.011, N 14.007, O 15.999, Ar 39.948, He 4.002602.
     * Sums by hand; tolerance 1e-3 g/mol. */
    static const struct {
        const char *name;
        double M_g;
    } cases[] = {
        {"NH3", 17.031},  {"N2", 28.014},  {"H2", 2.016},   {"H2O", 18.015},
        {"CO2", 44.009},  {"CO", 28.010},  {"CH4", 16.043}, {"CH3OH", 32.042},
        {"Ar", 39.948},   {"He", 4.002602}, {"O2", 31.998}, {"C(gr)", 12.011},
    };
    kphi_species_db *db = load_data();
    for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
        const kphi_species *sp = kphi_species_db_find(db, cases[i].name);
        ck_assert_ptr_nonnull(sp);
        ck_assert_double_eq_tol(sp->molar_mass * 1.0e3, cases[i].M_g, 1.0e-3);
    }
    kphi_species_db_free(db);
}
END_TEST

START_TEST(formula_and_lookups)
{
    kphi_species_db *db = load_data();
    const kphi_species *nh3 = kphi_species_db_find(db, "NH3");
    ck_assert_double_eq(kphi_species_atoms(nh3, "H"), 3.0);
    ck_assert_double_eq(kphi_species_atoms(nh3, "N"), 1.0);
    ck_assert_double_eq(kphi_species_atoms(nh3, "C"), 0.0);
    ck_assert_ptr_null(kphi_species_db_find(db, "NH4"));
    ck_assert_ptr_null(kphi_species_db_find(db, "nh3")); /* exact names only */
    ck_assert_str_eq(kphi_species_db_suggest(db, "NH4"), "NH3");
    ck_assert_str_eq(kphi_species_db_suggest(db, "ch3oh"), "CH3OH");
    ck_assert_ptr_null(kphi_species_db_suggest(db, "Xenonfluoride"));
    ck_assert_ptr_nonnull(kphi_species_db_source(db, "POLING2001"));
    ck_assert_ptr_null(kphi_species_db_source(db, "NOSUCHKEY"));
    /* file order is kept: the first entry of reactions/species.yaml is N2 */
    ck_assert_str_eq(kphi_species_db_get(db, 0)->name, "N2");
    ck_assert_ptr_null(kphi_species_db_get(db, kphi_species_db_count(db)));
    kphi_species_db_free(db);
}
END_TEST

START_TEST(units_are_converted_to_si)
{
    kphi_species_db *db = load_data();
    /* Values as written in reactions/species.yaml (Poling et al. 2001, App. A): N2
     * Pc 33.98 bar, Vc 89.20 cm3/mol; H2 quantum Pc0 20.5 bar (Prausnitz et al. 1999,
     * from memory). Exact conversions, tolerance 1e-9 relative. */
    const kphi_species *n2 = kphi_species_db_find(db, "N2");
    ck_assert_double_eq_tol(n2->Pc, 33.98e5, 33.98e5 * 1e-12);
    ck_assert_double_eq_tol(n2->Vc, 89.20e-6, 89.20e-6 * 1e-12);
    ck_assert_double_eq_tol(n2->Tc, 126.20, 1e-12);
    ck_assert_double_eq_tol(n2->omega, 0.037, 1e-15);
    const kphi_species *h2 = kphi_species_db_find(db, "H2");
    ck_assert_int_eq(h2->has_quantum, 1);
    ck_assert_double_eq_tol(h2->q_Pc0, 20.5e5, 1e-6);
    ck_assert_double_eq_tol(h2->q_Tc0, 43.6, 1e-12);
    ck_assert_int_eq(n2->has_quantum, 0);
    ck_assert_str_eq(h2->src_quantum, kphi_species_db_source(db, "PRAUSNITZ1999"));
    ck_assert_str_eq(n2->src_quantum, "");
    kphi_species_db_free(db);
}
END_TEST

/* The Beattie-Bridgeman blocks: the units the block names are converted exactly to SI
 * (A0: 1 atm L2/mol2 = 0.101325 Pa m6/mol2, 1 kPa m6/kmol2 = 1e-3 Pa m6/mol2; volumes:
 * 1 L/mol = 1 m3/kmol = 1e-3 m3/mol). Digits as written in reactions/species.yaml: N2 in
 * kPa-m3 units as seen in a textbook table reproducing Beattie & Bridgeman (1928)
 * (A0 136.2315, a 0.02617, B0 0.05046, b -0.00691, c 4.20e4); NH3 in atm-L units,
 * Beattie & Lawrence (1930), from memory (A0 2.3930, c 476.87e4). The ammonia-loop
 * species all carry one; CO, H2O and CH3OH none. */
START_TEST(beattie_bridgeman_constants)
{
    kphi_species_db *db = load_data();
    const kphi_species *n2 = kphi_species_db_find(db, "N2");
    ck_assert_int_eq(n2->has_bb, 1);
    ck_assert_double_eq_tol(n2->bb_A0, 136.2315e-3, 1e-15);
    ck_assert_double_eq_tol(n2->bb_a, 0.02617e-3, 1e-18);
    ck_assert_double_eq_tol(n2->bb_B0, 0.05046e-3, 1e-18);
    ck_assert_double_eq_tol(n2->bb_b, -0.00691e-3, 1e-18);
    ck_assert_double_eq_tol(n2->bb_c, 4.20e4 * 1e-3, 1e-12);
    ck_assert_str_eq(n2->src_bb, kphi_species_db_source(db, "BB1928_TABLE"));
    const kphi_species *nh3 = kphi_species_db_find(db, "NH3");
    ck_assert_double_eq_tol(nh3->bb_A0, 2.3930 * 0.101325, 1e-15);
    ck_assert_double_eq_tol(nh3->bb_c, 476.87e4 * 1e-3, 1e-9);
    /* the two units agree: H2 printed as 20.0117 kPa m6/kmol2 is 0.1975 atm L2/mol2 */
    ck_assert_double_eq_tol(kphi_species_db_find(db, "H2")->bb_A0 / 0.101325, 0.1975, 1e-6);
    static const char *const with[] = {"N2", "H2", "NH3", "CH4", "Ar", "CO2"};
    for (size_t k = 0; k < sizeof with / sizeof with[0]; k++) {
        const kphi_species *sp = kphi_species_db_find(db, with[k]);
        ck_assert_msg(sp->has_bb && strlen(sp->src_bb) > 20, "%s", with[k]);
    }
    static const char *const without[] = {"CO", "H2O", "CH3OH"};
    for (size_t k = 0; k < sizeof without / sizeof without[0]; k++) {
        const kphi_species *sp = kphi_species_db_find(db, without[k]);
        ck_assert_int_eq(sp->has_bb, 0);
        ck_assert_str_eq(sp->src_bb, "");
    }
    kphi_species_db_free(db);
}
END_TEST

START_TEST(molar_mass_of_formula)
{
    const char el[3][KPHI_ELEMENT_NAME_MAX] = {"C", "H", "O"};
    const double n[3] = {1, 4, 1};
    double M = 0;
    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_int_eq(kphi_species_molar_mass(3, el, n, &M, &err), KPHI_OK);
    ck_assert_double_eq_tol(M, 32.042e-3, 1e-9); /* 12.011 + 4*1.008 + 15.999, IUPAC 2013 */
    const char bad[1][KPHI_ELEMENT_NAME_MAX] = {"Qq"};
    ck_assert_int_eq(kphi_species_molar_mass(1, bad, n, &M, &err), KPHI_EINPUT);
    ck_assert_ptr_nonnull(strstr(err.msg, "unknown element 'Qq'"));
}
END_TEST

START_TEST(missing_file_is_eio)
{
    kphi_error err;
    kphi_error_clear(&err);
    ck_assert_ptr_null(kphi_species_db_load_file("reactions/no-such-file.yaml", &err));
    ck_assert_int_eq(err.code, KPHI_EIO);
}
END_TEST

/* ---- error paths, each with the exact position ----------------------------------- */

/* A valid two-line-source, one-species file; the cases below change one line of it. */
#define L01 "sources:\n"
#define L02 "  S1: \"Author, A. (2001). A table of constants.\"\n"
#define L03 "species:\n"
#define L04 "  - name: N2\n"
#define L05 "    elements: {N: 2}\n"
#define L06 "    thermo:\n"
#define L07 "      source: S1\n"
#define L08 "      T_range: [200.0, 1000.0, 6000.0]\n"
#define L09 "      low: [3.5, 0, 0, 0, 0, -1000.0, 3.0]\n"
#define L10 "      high: [3.5, 0, 0, 0, 0, -1000.0, 3.0]\n"
#define L11 "    critical: {Tc: 126.2, Pc: 33.98, omega: 0.037, source: S1}\n"
#define VALID L01 L02 L03 L04 L05 L06 L07 L08 L09 L10 L11

static void expect_error(const char *text, long line, long column, const char *fragment)
{
    kphi_error err;
    kphi_error_clear(&err);
    kphi_species_db *db = kphi_species_db_load_string(text, strlen(text), "mem.yaml", &err);
    char buf[600];
    kphi_error_format(&err, buf, sizeof buf);
    ck_assert_msg(db == NULL, "loaded although invalid");
    ck_assert_int_eq(err.code, KPHI_EINPUT);
    ck_assert_str_eq(err.path, "mem.yaml");
    ck_assert_msg(err.line == line && err.column == column, "want %ld:%ld, got: %s", line,
                  column, buf);
    ck_assert_msg(strstr(err.msg, fragment) != NULL, "'%s' not in: %s", fragment, buf);
}

START_TEST(valid_minimal_text_loads)
{
    kphi_error err;
    kphi_error_clear(&err);
    const char *text = VALID;
    kphi_species_db *db = kphi_species_db_load_string(text, strlen(text), "mem.yaml", &err);
    ck_assert_ptr_nonnull(db);
    const kphi_species *sp = kphi_species_db_get(db, 0);
    ck_assert_str_eq(sp->path, "mem.yaml");
    ck_assert_int_eq(sp->mark.line, 4);
    ck_assert_int_eq(sp->mark.column, 5);
    ck_assert_str_eq(sp->src_thermo, "Author, A. (2001). A table of constants.");
    ck_assert_double_eq_tol(sp->Pc, 33.98e5, 1e-6);
    ck_assert_double_eq(sp->Vc, 0.0); /* not given */
    kphi_species_db_free(db);
}
END_TEST

START_TEST(broken_yaml)
{
    /* "N2: x" puts a mapping value where a plain scalar was expected */
    expect_error(L01 L02 L03 "  - name: N2: x\n" L05 L06 L07 L08 L09 L10 L11, 4, 13,
                 "mapping values are not allowed");
}
END_TEST

START_TEST(unknown_key_with_suggestion)
{
    expect_error(L01 L02 L03 "  - nam: N2\n" L05 L06 L07 L08 L09 L10 L11, 4, 5,
                 "unknown key 'nam' in species entry 1 (did you mean 'name'?)");
    expect_error(L01 L02 L03 L04 L05 L06 L07 L08 L09 L10
                 "    critical: {Tc: 126.2, Pc: 33.98, omeg: 0.037, source: S1}\n",
                 11, 38, "did you mean 'omega'?");
}
END_TEST

START_TEST(unknown_element)
{
    expect_error(L01 L02 L03 L04 "    elements: {Nx: 2}\n" L06 L07 L08 L09 L10 L11, 5, 16,
                 "unknown element 'Nx' in N2");
    expect_error(L01 L02 L03 L04 "    elements: {N: -2}\n" L06 L07 L08 L09 L10 L11, 5, 19,
                 "must be positive");
}
END_TEST

START_TEST(bad_t_range)
{
    expect_error(L01 L02 L03 L04 L05 L06 L07 "      T_range: [1000.0, 200.0, 6000.0]\n" L09
                     L10 L11,
                 8, 16, "strictly increasing");
    expect_error(L01 L02 L03 L04 L05 L06 L07 "      T_range: [200.0, 1000.0]\n" L09 L10 L11, 8,
                 16, "expected 3 temperatures");
}
END_TEST

START_TEST(missing_coefficient)
{
    expect_error(L01 L02 L03 L04 L05 L06 L07 L08 "      low: [3.5, 0, 0, 0, 0, -1000.0]\n" L10
                     L11,
                 9, 12, "expected 7 coefficients a1..a7 in 'low', found 6");
    /* one too many: the error points at the eighth number */
    expect_error(L01 L02 L03 L04 L05 L06 L07 L08 L09
                 "      high: [3.5, 0, 0, 0, 0, -1000.0, 3.0, 9.9]\n" L11,
                 10, 45, "found 8");
    expect_error(L01 L02 L03 L04 L05 L06 L07 L08 L09 "      high: [3.5, 0, 0, zero, 0, 0, 0]\n" L11,
                 10, 25, "expected a number for item 4 of 'high', found 'zero'");
    /* a missing key is reported where the 'thermo' mapping starts */
    expect_error(L01 L02 L03 L04 L05 L06 L07 L08 L10 L11, 7, 7,
                 "missing key 'low' in 'thermo' of N2");
}
END_TEST

START_TEST(duplicate_name)
{
    expect_error(VALID L04 L05 L06 L07 L08 L09 L10 L11, 12, 11,
                 "species 'N2' defined twice (first at line 4)");
}
END_TEST

START_TEST(unknown_source_key)
{
    expect_error(L01 L02 L03 L04 L05 L06 "      source: S2\n" L08 L09 L10 L11, 7, 15,
                 "unknown source 'S2' (did you mean 'S1'?)");
    expect_error(L01 L02 L03 L04 L05 L06 L07 L08 L09 L10
                 "    critical: {Tc: 126.2, Pc: 33.98, omega: 0.037, source: POLING}\n",
                 11, 60, "unknown source 'POLING'");
}
END_TEST

START_TEST(unphysical_critical_constants)
{
    expect_error(L01 L02 L03 L04 L05 L06 L07 L08 L09 L10
                 "    critical: {Tc: 126.2, Pc: -33.98, omega: 0.037, source: S1}\n",
                 11, 31, "Pc of N2 must be a positive pressure");
    expect_error(L01 L02 L03 L04 L05 L06 L07 L08 L09 L10
                 "    critical: {Tc: 0, Pc: 33.98, omega: 0.037, source: S1}\n",
                 11, 20, "Tc of N2 must be a positive temperature");
    expect_error(L01 L02 L03 L04 L05 L06 L07 L08 L09 L10
                 "    critical: {Tc: 126.2, Pc: 33.98, source: S1}\n",
                 11, 15, "missing key 'omega'");
    /* a gas without critical constants */
    expect_error(L01 L02 L03 L04 L05 L06 L07 L08 L09 L10, 4, 5, "missing key 'critical'");
}
END_TEST

START_TEST(bad_phase_and_structure)
{
    expect_error(L01 L02 L03 L04 "    phase: liquid\n" L05 L06 L07 L08 L09 L10 L11, 5, 12,
                 "unknown phase 'liquid'");
    expect_error(L01 L02 "species: N2\n", 3, 10, "expected a list for 'species'");
    expect_error(L01 L02 L03 L04 L05 L06 L07 L08 L09 L10 L11 "extra: 1\n", 12, 1,
                 "unknown key 'extra'");
    expect_error(L01 "  S1: \"a\"\n  S1: \"b\"\n" L03 L04 L05 L06 L07 L08 L09 L10 L11, 3, 3,
                 "source 'S1' given twice");
}
END_TEST

START_TEST(bad_beattie_bridgeman)
{
#define BB(x) L01 L02 L03 L04 L05 L06 L07 L08 L09 L10 L11 "    beattie_bridgeman: " x "\n"
    expect_error(BB("{units: bar-L, A0: 1.3445, a: 0.02617, B0: 0.05046, b: -0.00691, c: "
                    "4.2e4, source: S1}"),
                 12, 32, "unknown units 'bar-L'");
    expect_error(BB("{units: atm-L, A0: -1.3445, a: 0.02617, B0: 0.05046, b: -0.00691, c: "
                    "4.2e4, source: S1}"),
                 12, 43, "A0 of N2 must be positive");
    expect_error(BB("{units: atm-L, A0: 1.3445, a: 0.02617, B0: 0, b: -0.00691, c: 4.2e4, "
                    "source: S1}"),
                 12, 67, "B0 of N2 must be positive");
    expect_error(BB("{units: atm-L, A0: 1.3445, a: 0.02617, B0: 0.05046, b: -0.00691, c: -4, "
                    "source: S1}"),
                 12, 92, "c of N2 must be >= 0");
    expect_error(BB("{units: atm-L, A0: 1.3445, a: 0.02617, B0: 0.05046, b: -0.00691, "
                    "source: S1}"),
                 12, 24, "missing key 'c'");
    expect_error(BB("{units: atm-L, A0: 1.3445, a: 0.02617, B0: 0.05046, b: -0.00691, c: 4.2e4, "
                    "source: S9}"),
                 12, 107, "unknown source 'S9'");
    expect_error(BB("{units: atm-L, A0: 1.3445, a: 0.02617, B00: 0.05046, b: -0.00691, c: 4.2e4, "
                    "source: S1}"),
                 12, 63, "unknown key 'B00'");
    expect_error(BB("[1.3445, 0.02617]"), 12, 24, "'beattie_bridgeman' of N2");
#undef BB
    /* a condensed reference has no critical constants, so no Beattie-Bridgeman block */
    expect_error(L01 L02 L03 L04 L05 "    phase: condensed\n" L06 L07 L08 L09 L10
                 "    beattie_bridgeman: {units: atm-L, A0: 1, a: 0, B0: 0.05, b: 0, c: 0, "
                 "source: S1}\n",
                 12, 24, "needs its critical constants");
}
END_TEST

/* The shipped k_ij file loads against the shipped species, every pair the issue names
 * is there for PR and SRK, and every entry names its source. */
START_TEST(kij_file_loads)
{
    kphi_species_db *db = load_data();
    kphi_error err;
    kphi_error_clear(&err);
    kphi_kij_db *k = kphi_kij_db_load_file("reactions/kij.yaml", db, &err);
    ck_assert_msg(k != NULL, "%s:%ld:%ld: %s", err.path, err.line, err.column, err.msg);
    static const char *const pairs[][2] = {
        {"NH3", "H2"},   {"NH3", "N2"},   {"NH3", "CH4"},  {"NH3", "Ar"},   {"CH3OH", "H2"},
        {"CH3OH", "CO"}, {"CH3OH", "CO2"}, {"CH3OH", "H2O"}, {"CH3OH", "CH4"}, {"CH3OH", "N2"},
        {"H2O", "CO2"},  {"H2O", "H2"},   {"H2O", "CH4"},  {"H2O", "CO"},   {"CO2", "H2"},
        {"CO2", "CH4"},  {"CO", "H2"},    {"N2", "H2"},    {"CH4", "H2"}};
    for (size_t p = 0; p < sizeof pairs / sizeof pairs[0]; p++)
        for (int m = 0; m < 2; m++) {
            const char *model = m == 0 ? "pr" : "srk";
            int found = 0;
            for (size_t q = 0; q < kphi_kij_db_count(k); q++) {
                const kphi_kij_entry *e = kphi_kij_db_get(k, q);
                ck_assert_ptr_nonnull(e->source);
                ck_assert_uint_gt(strlen(e->source), 20);
                if (strcmp(e->model, model) == 0 &&
                    ((strcmp(e->a, pairs[p][0]) == 0 && strcmp(e->b, pairs[p][1]) == 0) ||
                     (strcmp(e->a, pairs[p][1]) == 0 && strcmp(e->b, pairs[p][0]) == 0)))
                    found = 1;
            }
            ck_assert_msg(found, "no %s k_ij for %s-%s", model, pairs[p][0], pairs[p][1]);
        }
    /* the linear form */
    const kphi_kij_entry *e = kphi_kij_db_get(k, 0);
    kphi_kij_entry t = *e;
    t.value = 0.05;
    t.dkdT = 2e-4;
    t.T_ref = 300.0;
    ck_assert_double_eq_tol(kphi_kij_entry_value(&t, 350.0), 0.06, 1e-15);
    kphi_kij_db_free(k);
    /* an unknown species in a pair is refused when a species database is given */
    kphi_error_clear(&err);
    k = kphi_kij_db_load_file("tests/bad/data/kij_bad_value.yaml", db, &err);
    ck_assert_ptr_null(k);
    ck_assert_int_eq(err.code, KPHI_EINPUT);
    ck_assert_int_eq(err.line, 3);
    kphi_species_db_free(db);
}
END_TEST

static Suite *species_suite(void)
{
    Suite *s = suite_create("species");
    TCase *tc = tcase_create("data");
    tcase_add_test(tc, data_file_has_every_required_species);
    tcase_add_test(tc, molar_masses_follow_iupac_2013);
    tcase_add_test(tc, formula_and_lookups);
    tcase_add_test(tc, units_are_converted_to_si);
    tcase_add_test(tc, beattie_bridgeman_constants);
    tcase_add_test(tc, molar_mass_of_formula);
    tcase_add_test(tc, missing_file_is_eio);
    suite_add_tcase(s, tc);
    TCase *te = tcase_create("errors");
    tcase_add_test(te, valid_minimal_text_loads);
    tcase_add_test(te, broken_yaml);
    tcase_add_test(te, unknown_key_with_suggestion);
    tcase_add_test(te, unknown_element);
    tcase_add_test(te, bad_t_range);
    tcase_add_test(te, missing_coefficient);
    tcase_add_test(te, kij_file_loads);
    tcase_add_test(te, duplicate_name);
    tcase_add_test(te, unknown_source_key);
    tcase_add_test(te, unphysical_critical_constants);
    tcase_add_test(te, bad_phase_and_structure);
    tcase_add_test(te, bad_beattie_bridgeman);
    suite_add_tcase(s, te);
    return s;
}

KPHI_TEST_MAIN(species_suite)
