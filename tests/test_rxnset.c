/* Tests of the rxnset module: the shipped reaction sets, the equation parser, every error
 * a reaction set can raise (with its exact line and column), and reactions derived from
 * the element matrix. Run from the repository root (reactions/ must be reachable).
 *
 * Stoichiometric numbers here are exact small integers or binary fractions fixed by the
 * chemistry of each equation (N2 + 3 H2 = 2 NH3 has dnu = -2), so they are compared with
 * a tolerance of 1e-12. */
#include "kphi/rxnset.h"

#include <check.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "kphi/species.h"
#include "kphi/thermo.h"
#include "testutil.h"

static const double TOL = 1e-12;

static kphi_species_db *load_db(void)
{
    kphi_error err;
    kphi_error_clear(&err);
    kphi_species_db *db = kphi_species_db_load_file(KPHI_SPECIES_FILE, &err);
    ck_assert_msg(db != NULL, "cannot load %s: %s", KPHI_SPECIES_FILE, err.msg);
    return db;
}

/* Load a set from text with the shipped species database. */
static kphi_rxnset *load_text(const char *text, kphi_species_db **db, kphi_error *err)
{
    *db = load_db();
    kphi_error_clear(err);
    return kphi_rxnset_load_string(text, strlen(text), "t.yaml", *db, err);
}

/* The text must fail with KPHI_EINPUT at line:col with exactly msg. */
static void expect_error(const char *text, long line, long col, const char *msg)
{
    kphi_species_db *db = NULL;
    kphi_error err;
    kphi_rxnset *set = load_text(text, &db, &err);
    ck_assert_msg(set == NULL, "accepted: %s", text);
    ck_assert_int_eq(err.code, KPHI_EINPUT);
    ck_assert_str_eq(err.path, "t.yaml");
    ck_assert_str_eq(err.msg, msg);
    ck_assert_int_eq(err.line, line);
    ck_assert_int_eq(err.column, col);
    kphi_species_db_free(db);
}

static size_t idx(const kphi_rxnset *set, const char *name)
{
    long i = kphi_rxnset_species_index(set, name);
    ck_assert_msg(i >= 0, "species %s missing", name);
    return (size_t)i;
}

static double nu(const kphi_rxnset *set, size_t j, const char *name)
{
    return kphi_rxnset_nu(set, j, idx(set, name));
}

/* Every reaction of the set conserves every element: sum_i a_ki nu_ij = 0. */
static void assert_balanced(const kphi_rxnset *set)
{
    for (size_t j = 0; j < kphi_rxnset_n_reactions(set); j++)
        for (size_t k = 0; k < kphi_rxnset_n_elements(set); k++) {
            double s = 0.0;
            for (size_t i = 0; i < kphi_rxnset_n_species(set); i++)
                s += kphi_rxnset_atoms(set, k, i) * kphi_rxnset_nu(set, j, i);
            ck_assert_double_eq_tol(s, 0.0, TOL);
        }
}

/* ---- shipped sets --------------------------------------------------------------------- */

START_TEST(ammonia_set)
{
    kphi_error err;
    kphi_error_clear(&err);
    kphi_rxnset *set = kphi_rxnset_load_file("reactions/ammonia.yaml", NULL, &err);
    ck_assert_msg(set != NULL, "%s:%ld:%ld: %s", err.path, err.line, err.column, err.msg);
    ck_assert_str_eq(kphi_rxnset_name(set), "ammonia synthesis");
    ck_assert_str_eq(kphi_rxnset_path(set), "reactions/ammonia.yaml");
    ck_assert_uint_eq(kphi_rxnset_n_species(set), 5);
    ck_assert_uint_eq(kphi_rxnset_n_reactions(set), 1);
    ck_assert_int_eq(kphi_rxnset_derived(set), 0);
    const char *names[] = {"N2", "H2", "NH3", "CH4", "Ar"};
    for (size_t i = 0; i < 5; i++) {
        ck_assert_str_eq(kphi_rxnset_species(set, i)->name, names[i]);
        ck_assert_int_eq(kphi_rxnset_species_index(set, names[i]), (long)i);
    }
    ck_assert_ptr_null(kphi_rxnset_species(set, 5));
    ck_assert_int_eq(kphi_rxnset_species_index(set, "NH4"), -1);
    ck_assert_str_eq(kphi_rxnset_suggest(set, "nh3"), "NH3");
    ck_assert_double_eq_tol(nu(set, 0, "N2"), -1.0, TOL);
    ck_assert_double_eq_tol(nu(set, 0, "H2"), -3.0, TOL);
    ck_assert_double_eq_tol(nu(set, 0, "NH3"), 2.0, TOL);
    ck_assert_double_eq_tol(nu(set, 0, "CH4"), 0.0, TOL);
    ck_assert_double_eq_tol(nu(set, 0, "Ar"), 0.0, TOL);
    ck_assert_double_eq_tol(kphi_rxnset_nu_matrix(set)[2], 2.0, TOL);
    ck_assert_double_eq_tol(kphi_rxnset_dnu(set, 0), -2.0, TOL);
    ck_assert_str_eq(kphi_rxnset_equation(set, 0), "N2 + 3 H2 = 2 NH3");
    int inert[] = {0, 0, 0, 1, 1};
    double w[] = {1, 0, 0, 0, 0};
    for (size_t i = 0; i < 5; i++) {
        ck_assert_int_eq(kphi_rxnset_is_inert(set, i), inert[i]);
        ck_assert_double_eq_tol(kphi_rxnset_conversion_weights(set)[i], w[i], TOL);
    }
    ck_assert_str_eq(kphi_rxnset_conversion_label(set), "N2");
    /* Elements in first-seen order over N2, H2, NH3, CH4, Ar. */
    ck_assert_uint_eq(kphi_rxnset_n_elements(set), 4);
    ck_assert_str_eq(kphi_rxnset_element(set, 0), "N");
    ck_assert_str_eq(kphi_rxnset_element(set, 1), "H");
    ck_assert_str_eq(kphi_rxnset_element(set, 2), "C");
    ck_assert_str_eq(kphi_rxnset_element(set, 3), "Ar");
    ck_assert_double_eq_tol(kphi_rxnset_atoms(set, 0, 0), 2.0, TOL); /* N in N2 */
    ck_assert_double_eq_tol(kphi_rxnset_atoms(set, 1, 2), 3.0, TOL); /* H in NH3 */
    ck_assert_double_eq_tol(kphi_rxnset_atoms(set, 1, 3), 4.0, TOL); /* H in CH4 */
    ck_assert_double_eq_tol(kphi_rxnset_atoms(set, 2, 0), 0.0, TOL); /* C in N2 */
    ck_assert_double_eq_tol(kphi_rxnset_atoms(set, 3, 4), 1.0, TOL); /* Ar in Ar */
    assert_balanced(set);
    ck_assert_uint_eq(kphi_rxnset_n_kij(set), 0);
    kphi_rxnset_free(set);
}
END_TEST

START_TEST(methanol_set)
{
    kphi_error err;
    kphi_error_clear(&err);
    kphi_rxnset *set = kphi_rxnset_load_file("reactions/methanol.yaml", NULL, &err);
    ck_assert_msg(set != NULL, "%s:%ld:%ld: %s", err.path, err.line, err.column, err.msg);
    ck_assert_uint_eq(kphi_rxnset_n_species(set), 7);
    ck_assert_uint_eq(kphi_rxnset_n_reactions(set), 2);
    ck_assert_double_eq_tol(nu(set, 0, "CO"), -1.0, TOL);
    ck_assert_double_eq_tol(nu(set, 0, "H2"), -2.0, TOL);
    ck_assert_double_eq_tol(nu(set, 0, "CH3OH"), 1.0, TOL);
    ck_assert_double_eq_tol(nu(set, 0, "CO2"), 0.0, TOL);
    ck_assert_double_eq_tol(nu(set, 1, "CO2"), -1.0, TOL);
    ck_assert_double_eq_tol(nu(set, 1, "H2"), -1.0, TOL);
    ck_assert_double_eq_tol(nu(set, 1, "CO"), 1.0, TOL);
    ck_assert_double_eq_tol(nu(set, 1, "H2O"), 1.0, TOL);
    ck_assert_double_eq_tol(kphi_rxnset_dnu(set, 0), -2.0, TOL);
    ck_assert_double_eq_tol(kphi_rxnset_dnu(set, 1), 0.0, TOL);
    ck_assert_str_eq(kphi_rxnset_equation(set, 0), "CO + 2 H2 = CH3OH");
    ck_assert_str_eq(kphi_rxnset_equation(set, 1), "CO2 + H2 = CO + H2O");
    ck_assert_int_eq(kphi_rxnset_is_inert(set, idx(set, "CH4")), 1);
    ck_assert_int_eq(kphi_rxnset_is_inert(set, idx(set, "N2")), 1);
    ck_assert_int_eq(kphi_rxnset_is_inert(set, idx(set, "H2O")), 0);
    const double *w = kphi_rxnset_conversion_weights(set);
    for (size_t i = 0; i < 7; i++) {
        const char *n = kphi_rxnset_species(set, i)->name;
        double want = strcmp(n, "CO") == 0 || strcmp(n, "CO2") == 0 ? 1.0 : 0.0;
        ck_assert_double_eq_tol(w[i], want, TOL);
    }
    ck_assert_str_eq(kphi_rxnset_conversion_label(set), "CO+CO2");
    ck_assert_uint_eq(kphi_rxnset_n_elements(set), 4); /* C, O, H, N */
    assert_balanced(set);
    kphi_rxnset_free(set);
}
END_TEST

START_TEST(reforming_set)
{
    kphi_error err;
    kphi_error_clear(&err);
    kphi_species_db *db = load_db();
    /* A borrowed database this time. */
    kphi_rxnset *set = kphi_rxnset_load_file("reactions/reforming.yaml", db, &err);
    ck_assert_msg(set != NULL, "%s:%ld:%ld: %s", err.path, err.line, err.column, err.msg);
    ck_assert_uint_eq(kphi_rxnset_n_species(set), 6);
    ck_assert_uint_eq(kphi_rxnset_n_reactions(set), 2);
    ck_assert_double_eq_tol(nu(set, 0, "CH4"), -1.0, TOL);
    ck_assert_double_eq_tol(nu(set, 0, "H2O"), -1.0, TOL);
    ck_assert_double_eq_tol(nu(set, 0, "CO"), 1.0, TOL);
    ck_assert_double_eq_tol(nu(set, 0, "H2"), 3.0, TOL);
    ck_assert_double_eq_tol(nu(set, 1, "CO"), -1.0, TOL);
    ck_assert_double_eq_tol(nu(set, 1, "CO2"), 1.0, TOL);
    ck_assert_double_eq_tol(kphi_rxnset_dnu(set, 0), 2.0, TOL);
    ck_assert_double_eq_tol(kphi_rxnset_dnu(set, 1), 0.0, TOL);
    ck_assert_str_eq(kphi_rxnset_equation(set, 0), "CH4 + H2O = CO + 3 H2");
    ck_assert_str_eq(kphi_rxnset_equation(set, 1), "CO + H2O = CO2 + H2");
    for (size_t i = 0; i < 6; i++)
        ck_assert_int_eq(kphi_rxnset_is_inert(set, i),
                         strcmp(kphi_rxnset_species(set, i)->name, "N2") == 0);
    ck_assert_double_eq_tol(kphi_rxnset_conversion_weights(set)[idx(set, "CH4")], 1.0, TOL);
    ck_assert_double_eq_tol(kphi_rxnset_conversion_weights(set)[idx(set, "CO")], 0.0, TOL);
    ck_assert_str_eq(kphi_rxnset_conversion_label(set), "CH4");
    assert_balanced(set);
    kphi_rxnset_free(set);
    kphi_species_db_free(db);
}
END_TEST

/* ---- the equation parser -------------------------------------------------------------- */

START_TEST(fraction_coefficients)
{
    const char *forms[] = {"1/2 N2 + 3/2 H2 = NH3", "0.5 N2 + 1.5 H2 -> NH3",
                           "'1/2 N2+3/2 H2<=>NH3'", "\"  .5N2   +  1.5H2 =>NH3 \""};
    for (size_t f = 0; f < sizeof forms / sizeof forms[0]; f++) {
        char text[256];
        snprintf(text, sizeof text, "species: [N2, H2, NH3]\nreactions:\n  - %s\n", forms[f]);
        kphi_species_db *db = NULL;
        kphi_error err;
        kphi_rxnset *set = load_text(text, &db, &err);
        ck_assert_msg(set != NULL, "%s: %s", forms[f], err.msg);
        ck_assert_double_eq_tol(nu(set, 0, "N2"), -0.5, TOL);
        ck_assert_double_eq_tol(nu(set, 0, "H2"), -1.5, TOL);
        ck_assert_double_eq_tol(nu(set, 0, "NH3"), 1.0, TOL);
        ck_assert_double_eq_tol(kphi_rxnset_dnu(set, 0), -1.0, TOL);
        ck_assert_str_eq(kphi_rxnset_equation(set, 0), "0.5 N2 + 1.5 H2 = NH3");
        ck_assert_str_eq(kphi_rxnset_conversion_label(set), "N2"); /* default */
        ck_assert_str_eq(kphi_rxnset_name(set), "t");             /* from "t.yaml" */
        kphi_rxnset_free(set);
        kphi_species_db_free(db);
    }
}
END_TEST

START_TEST(compact_spelling)
{
    kphi_species_db *db = NULL;
    kphi_error err;
    kphi_rxnset *set = load_text("name: x\nspecies: [NH3, H2, N2]\nreactions: [N2+3H2=2NH3]\n"
                                 "conversion: [H2]\n",
                                 &db, &err);
    ck_assert_msg(set != NULL, "%s", err.msg);
    ck_assert_str_eq(kphi_rxnset_equation(set, 0), "N2 + 3 H2 = 2 NH3");
    ck_assert_double_eq_tol(nu(set, 0, "H2"), -3.0, TOL);
    ck_assert_str_eq(kphi_rxnset_conversion_label(set), "H2");
    ck_assert_double_eq_tol(kphi_rxnset_conversion_weights(set)[1], 1.0, TOL);
    ck_assert_double_eq_tol(kphi_rxnset_conversion_weights(set)[2], 0.0, TOL);
    kphi_rxnset_free(set);
    kphi_species_db_free(db);
}
END_TEST

START_TEST(kij_entries)
{
    kphi_species_db *db = NULL;
    kphi_error err;
    /* -0.0125 is parser input only, not a published k_ij. */
    kphi_rxnset *set = load_text("species: [N2, H2, NH3]\nreactions: [N2 + 3 H2 = 2 NH3]\n"
                                 "kij:\n  - {pair: [NH3, H2], value: -0.0125, source: \"test\"}\n",
                                 &db, &err);
    ck_assert_msg(set != NULL, "%s", err.msg);
    ck_assert_uint_eq(kphi_rxnset_n_kij(set), 1);
    size_t i = 99, j = 99;
    double k = 0.0;
    kphi_rxnset_kij(set, 0, &i, &j, &k);
    ck_assert_uint_eq(i, 2);
    ck_assert_uint_eq(j, 1);
    ck_assert_double_eq_tol(k, -0.0125, TOL);
    kphi_rxnset_free(set);
    kphi_species_db_free(db);
}
END_TEST

/* ---- errors, each at its exact line and column ------------------------------------------ */

#define NH3_HEAD "name: t\nspecies: [N2, H2, NH3]\nreactions:\n" /* reactions from line 4 */

START_TEST(error_unknown_species_in_reaction)
{
    /* "  - " puts the scalar at column 5; "N2 + 3 H2 = 2 " is 14 bytes. */
    expect_error(NH3_HEAD "  - N2 + 3 H2 = 2 NH4\n", 4, 19,
                 "unknown species 'NH4' in reaction 1 (did you mean 'NH3'?)");
    /* Quoted: one more for the quote. */
    expect_error(NH3_HEAD "  - \"N2 + 3 H2 = 2 NH4\"\n", 4, 20,
                 "unknown species 'NH4' in reaction 1 (did you mean 'NH3'?)");
    expect_error("species: [N2, H2, NH3]\nreactions: ['N2 + 3 H2 = 2 NH4']\n", 2, 28,
                 "unknown species 'NH4' in reaction 1 (did you mean 'NH3'?)");
    /* Case matters; the suggestion finds the right spelling. */
    expect_error(NH3_HEAD "  - n2 + 3 H2 = 2 NH3\n", 4, 5,
                 "unknown species 'n2' in reaction 1 (did you mean 'N2'?)");
    expect_error(NH3_HEAD "  - N2 + 3 H2 = 2 NH3 + Xyzzy\n", 4, 25,
                 "unknown species 'Xyzzy' in reaction 1; the set's species are: N2, H2, NH3");
    /* In the database but not in the set's list. */
    expect_error("species: [CH4, H2O, H2]\nreactions:\n  - CH4 + H2O = CO + 3 H2\n", 3, 17,
                 "species 'CO' in reaction 1 is not in this set's species list; add it to "
                 "'species'");
}
END_TEST

START_TEST(error_species_list)
{
    expect_error("name: t\nspecies: [N2, H2, NH4]\n", 2, 19,
                 "unknown species 'NH4' (did you mean 'NH3'?)");
    expect_error("name: t\nspecies: [N2, H2, Xyzzy]\n", 2, 19,
                 "unknown species 'Xyzzy': it is not in the species database");
    expect_error("name: t\nspecies:\n  - N2\n  - H2\n  - N2\n", 5, 5,
                 "species 'N2' is listed twice (first at line 3, column 5)");
    expect_error("name: t\nspecies: [CH4, C(gr), H2]\n", 2, 16,
                 "C(gr) is a condensed reference phase; kphi handles gas-phase reactions only");
    expect_error("name: t\nspecies: []\n", 2, 10, "'species' is empty; list the species of the set");
    expect_error("name: t\nreactions: [N2 + 3 H2 = 2 NH3]\n", 1, 1,
                 "a reaction set needs 'species', e.g. species: [N2, H2, NH3]");
    expect_error("name: t\nspecies: [N2, H2, NH3]\nreaktions: [N2 + 3 H2 = 2 NH3]\n", 3, 1,
                 "unknown key 'reaktions' in a reaction set (did you mean 'reactions'?)");
}
END_TEST

START_TEST(error_unbalanced)
{
    expect_error(NH3_HEAD "  - N2 + 3 H2 = 2 NH3\n  - N2 + 3 H2 = NH3\n", 5, 5,
                 "reaction is not balanced: N 2 on the left, 1 on the right");
    expect_error("species: [CO, H2, CH3OH]\nreactions:\n  - \"CO + H2 = CH3OH\"\n", 3, 5,
                 "reaction is not balanced: H 2 on the left, 4 on the right");
}
END_TEST

START_TEST(error_duplicate)
{
    expect_error(NH3_HEAD "  - N2 + 3 H2 = 2 NH3\n  - N2 + 3 H2 -> 2 NH3\n", 5, 5,
                 "reaction repeats reaction 1 (line 4)");
    expect_error(NH3_HEAD "  - N2 + 3 H2 = 2 NH3\n\n  - 1/2 N2 + 3/2 H2 = NH3\n", 6, 5,
                 "reaction is reaction 1 (line 4) multiplied by 0.5");
    expect_error(NH3_HEAD "  - N2 + 3 H2 = 2 NH3\n  - 2 NH3 = N2 + 3 H2\n", 5, 5,
                 "reaction is reaction 1 (line 4) written backwards");
}
END_TEST

START_TEST(error_dependent)
{
    expect_error("species: [CO, CO2, H2, CH3OH, H2O]\nreactions:\n"
                 "  - CO + 2 H2 = CH3OH\n  - CO2 + H2 = CO + H2O\n"
                 "  - CO2 + 3 H2 = CH3OH + H2O\n",
                 5, 5,
                 "reaction 3 is a linear combination of reactions 1 and 2; the reactions must "
                 "be independent: remove it");
    expect_error("species: [CH4, H2O, CO, H2, CO2, O2]\nreactions:\n"
                 "  - CH4 + H2O = CO + 3 H2\n  - CO + H2O = CO2 + H2\n  - 2 H2 + O2 = 2 H2O\n"
                 "  - CH4 + 2 H2O = CO2 + 4 H2\n",
                 6, 5,
                 "reaction 4 is a linear combination of reactions 1 to 3; the reactions must "
                 "be independent: remove it");
}
END_TEST

START_TEST(error_equation_syntax)
{
    expect_error(NH3_HEAD "  - N2 + 3 H2 =\n", 4, 15, "reaction has no products: nothing after '='");
    expect_error(NH3_HEAD "  - \" -> 2 NH3\"\n", 4, 7,
                 "reaction has no reactants: nothing before '->'");
    expect_error(NH3_HEAD "  - N2 + 3 H2 2 NH3\n", 4, 5,
                 "expected '=' between reactants and products in 'N2 + 3 H2 2 NH3'");
    expect_error(NH3_HEAD "  - N2 + 3 H2 = 2 NH3 = N2\n", 4, 23,
                 "reaction has a second '='; write one '=' between reactants and products");
    expect_error(NH3_HEAD "  - N2 + + 3 H2 = 2 NH3\n", 4, 10,
                 "empty term in reaction 1: expected a species before '+'");
    expect_error(NH3_HEAD "  - N2 + 3 H2 + = 2 NH3\n", 4, 15,
                 "empty term in reaction 1: expected a species after '+'");
    expect_error(NH3_HEAD "  - N2 + 3/0 H2 = 2 NH3\n", 4, 10,
                 "bad coefficient '3/0': expected a positive number such as 2, 0.5 or 3/2");
    expect_error(NH3_HEAD "  - N2 + 0 H2 = 2 NH3\n", 4, 10,
                 "coefficient of H2 must be positive, found '0'");
    expect_error(NH3_HEAD "  - N2 + 3 H2 = 2 NH3 + -1 N2\n", 4, 25,
                 "coefficients must be positive; move the species to the other side instead of "
                 "writing '-'");
    expect_error(NH3_HEAD "  - N2 + 3 H2 + NH3 = 3 NH3\n", 4, 25,
                 "NH3 appears on both sides of the reaction; write the net reaction");
    expect_error(NH3_HEAD "  - N2 + H2 + 2 H2 = 2 NH3\n", 4, 17,
                 "H2 appears twice on the left side; combine the terms into one");
    expect_error(NH3_HEAD "  - N2 + 3 H 2 = 2 NH3\n", 4, 10,
                 "expected a coefficient and one species name, found '3 H 2'");
    /* a reaction may be a mapping {equation, K}; other keys are refused */
    expect_error(NH3_HEAD "  - {eq: N2 + 3 H2 = 2 NH3}\n", 4, 6,
                 "unknown key 'eq' in a reaction; expected one of: equation, K");
    expect_error(NH3_HEAD "  - {equation: {a: b}}\n", 4, 16,
                 "expected a reaction such as 'N2 + 3 H2 = 2 NH3' for reaction 1, found a "
                 "mapping");
    expect_error(NH3_HEAD "  - {K: []}\n", 4, 5,
                 "reaction 1 is a mapping without 'equation'; write equation: N2 + 3 H2 = 2 "
                 "NH3");
    expect_error(NH3_HEAD "  []\n", 4, 3,
                 "'reactions' is empty; leave the key out to derive the reactions from the "
                 "species' elements");
}
END_TEST

START_TEST(error_conversion)
{
    expect_error(NH3_HEAD "  - N2 + 3 H2 = 2 NH3\nconversion: NH3\n", 5, 13,
                 "conversion species 'NH3' is not consumed by any reaction (it is only a "
                 "product); name a reactant");
    expect_error("species: [N2, H2, NH3, Ar]\nreactions: [N2 + 3 H2 = 2 NH3]\n"
                 "conversion: [N2, Ar]\n",
                 3, 18,
                 "conversion species 'Ar' takes part in no reaction (it is inert); name a "
                 "reactant");
    expect_error(NH3_HEAD "  - N2 + 3 H2 = 2 NH3\nconversion: N3\n", 5, 13,
                 "conversion species 'N3' is not in the set's species list (did you mean "
                 "'N2'?)");
    expect_error(NH3_HEAD "  - N2 + 3 H2 = 2 NH3\nconversion: [N2, N2]\n", 5, 18,
                 "'N2' is listed twice in 'conversion'");
}
END_TEST

START_TEST(error_kij)
{
    expect_error(NH3_HEAD "  - N2 + 3 H2 = 2 NH3\nkij:\n  - {pair: [N2, N2], value: 0.01, "
                          "source: s}\n",
                 6, 17, "a k_ij pair needs two different species");
    expect_error(NH3_HEAD "  - N2 + 3 H2 = 2 NH3\nkij:\n  - {pair: [N2, H3], value: 0.01, "
                          "source: s}\n",
                 6, 17, "k_ij species 'H3' is not in the set's species list (did you mean 'H2'?)");
    expect_error(NH3_HEAD "  - N2 + 3 H2 = 2 NH3\nkij:\n  - {pair: [N2, H2], value: 0.01}\n", 6,
                 5, "a 'kij' entry needs 'pair', 'value' and 'source'");
    expect_error(NH3_HEAD "  - N2 + 3 H2 = 2 NH3\nkij:\n"
                          "  - {pair: [N2, H2], value: 0.01, source: s}\n"
                          "  - {pair: [H2, N2], value: 0.02, source: s}\n",
                 7, 12, "k_ij for H2-N2 is given twice");
    expect_error(NH3_HEAD "  - N2 + 3 H2 = 2 NH3\nkij:\n"
                          "  - {pair: [N2, H2], value: 1.5, source: s}\n",
                 6, 29, "k_ij must lie between -1 and 1, found 1.5");
}
END_TEST

/* The key `eos` names the model the set recommends; the loader checks that every species
 * can enter it. */
START_TEST(recommended_eos)
{
    kphi_species_db *db = NULL;
    kphi_error err;
    kphi_rxnset *set = load_text(NH3_HEAD "  - N2 + 3 H2 = 2 NH3\neos: BBV\n", &db, &err);
    ck_assert_msg(set != NULL, "%s", err.msg);
    kphi_eos_model m = KPHI_EOS_PR;
    kphi_mark at = {0, 0};
    ck_assert_int_eq(kphi_rxnset_eos(set, &m, &at), 1);
    ck_assert_int_eq(m, KPHI_EOS_BBV);
    ck_assert_int_eq(at.line, 5);
    ck_assert_int_eq(at.column, 6);
    kphi_rxnset_free(set);
    kphi_species_db_free(db);
    set = load_text(NH3_HEAD "  - N2 + 3 H2 = 2 NH3\n", &db, &err); /* none named */
    ck_assert_int_eq(kphi_rxnset_eos(set, &m, NULL), 0);
    kphi_rxnset_free(set);
    kphi_species_db_free(db);
    db = load_db();
    set = kphi_rxnset_load_file("reactions/ammonia.yaml", db, &err);
    ck_assert_ptr_nonnull(set);
    ck_assert_int_eq(kphi_rxnset_eos(set, NULL, NULL), 0); /* pr stays the default: README */
    kphi_rxnset_free(set);
    kphi_species_db_free(db);
    expect_error(NH3_HEAD "  - N2 + 3 H2 = 2 NH3\neos: bbx\n", 5, 6,
                 "unknown equation of state 'bbx'; did you mean 'bb'? (expected one of: ideal, "
                 "virial, rk, srk, pr, bb, bbv)");
    expect_error(NH3_HEAD "  - N2 + 3 H2 = 2 NH3\neos: [pr]\n", 5, 6,
                 "expected a single value for 'eos' (e.g. pr), found a list");
    expect_error("name: t\nspecies: [CO, H2, CH3OH]\nreactions:\n  - CO + 2 H2 = CH3OH\n"
                 "eos: bb\n",
                 5, 6,
                 "the set recommends 'bb', but species 'CO' has no Beattie-Bridgeman constants "
                 "(key 'beattie_bridgeman' of its species data)");
}
END_TEST

/* More than 64 species or 32 reactions: the error points at the first entry too many. */
START_TEST(error_limits)
{
    char *text = malloc(8192);
    ck_assert_ptr_nonnull(text);
    size_t used = (size_t)sprintf(text, "name: t\nspecies:\n");
    for (int i = 0; i < 65; i++)
        used += (size_t)sprintf(text + used, "  - N2\n");
    expect_error(text, 2 + 65, 5, "too many species: at most 64 in a reaction set");
    used = (size_t)sprintf(text, NH3_HEAD);
    for (int i = 0; i < 33; i++)
        used += (size_t)sprintf(text + used, "  - N2 + 3 H2 = 2 NH3\n");
    expect_error(text, 3 + 33, 5, "too many reactions: at most 32 in a reaction set");
    free(text);
}
END_TEST

START_TEST(error_species_file)
{
    const char *text = "species_file: no-such-file.yaml\nspecies: [N2]\n";
    kphi_error err;
    kphi_error_clear(&err);
    kphi_rxnset *set = kphi_rxnset_load_string(text, strlen(text), "tests/x.yaml", NULL, &err);
    ck_assert_ptr_null(set);
    ck_assert_int_eq(err.code, KPHI_EINPUT);
    ck_assert_int_eq(err.line, 1);
    ck_assert_int_eq(err.column, 15);
    ck_assert_str_eq(err.msg, "cannot read the species database 'tests/no-such-file.yaml': "
                              "cannot open: No such file or directory");
    /* A species_file beside the text's name is found and owned by the set. */
    const char *ok = "species_file: ../reactions/species.yaml\nspecies: [N2, H2, NH3]\n"
                     "reactions: [N2 + 3 H2 = 2 NH3]\n";
    kphi_error_clear(&err);
    set = kphi_rxnset_load_string(ok, strlen(ok), "tests/x.yaml", NULL, &err);
    ck_assert_msg(set != NULL, "%s", err.msg);
    ck_assert_str_eq(kphi_rxnset_species(set, 2)->name, "NH3");
    kphi_rxnset_free(set);
    /* A species_file that is no species database: the species loader's own error, which
     * names that file. */
    const char *wrong = "species_file: ammonia.yaml\nspecies: [N2]\n";
    kphi_error_clear(&err);
    set = kphi_rxnset_load_string(wrong, strlen(wrong), "reactions/x.yaml", NULL, &err);
    ck_assert_ptr_null(set);
    ck_assert_int_eq(err.code, KPHI_EINPUT);
    ck_assert_str_eq(err.path, "reactions/ammonia.yaml");
    ck_assert_int_gt(err.line, 0);
    /* A missing file. */
    kphi_error_clear(&err);
    ck_assert_ptr_null(kphi_rxnset_load_file("reactions/no-such-set.yaml", NULL, &err));
    ck_assert_int_eq(err.code, KPHI_EIO);
}
END_TEST

/* ---- derived reactions ---------------------------------------------------------------- */

/* Rank of the reaction set: no row is a multiple of another for two rows, checked by a
 * nonzero 2x2 minor (the sets here have two reactions). */
static int rank2(const kphi_rxnset *set)
{
    size_t ns = kphi_rxnset_n_species(set);
    for (size_t a = 0; a < ns; a++)
        for (size_t b = a + 1; b < ns; b++) {
            double m = kphi_rxnset_nu(set, 0, a) * kphi_rxnset_nu(set, 1, b) -
                       kphi_rxnset_nu(set, 0, b) * kphi_rxnset_nu(set, 1, a);
            if (fabs(m) > 1e-9)
                return 1;
        }
    return 0;
}

START_TEST(derived_reforming)
{
    kphi_species_db *db = NULL;
    kphi_error err;
    kphi_rxnset *set = load_text("name: d\nspecies: [CH4, H2O, CO, CO2, H2]\n", &db, &err);
    ck_assert_msg(set != NULL, "%s", err.msg);
    ck_assert_int_eq(kphi_rxnset_derived(set), 1);
    /* 5 species, elements C, H, O of rank 3: 5 - 3 = 2 independent reactions. */
    ck_assert_uint_eq(kphi_rxnset_n_elements(set), 3);
    ck_assert_uint_eq(kphi_rxnset_n_reactions(set), 2);
    assert_balanced(set);
    ck_assert_int_eq(rank2(set), 1);
    /* Components CH4, H2O, CO (the first independent columns); one reaction forms each of
     * CO2 and H2, in smallest integers. */
    ck_assert_str_eq(kphi_rxnset_equation(set, 0), "2 H2O + 4 CO = CH4 + 3 CO2");
    ck_assert_str_eq(kphi_rxnset_equation(set, 1), "CH4 + H2O = CO + 3 H2");
    for (size_t j = 0; j < 2; j++)
        for (size_t i = 0; i < 5; i++) {
            double v = kphi_rxnset_nu(set, j, i);
            ck_assert_double_eq_tol(v, nearbyint(v), TOL);
            ck_assert_int_eq(kphi_rxnset_is_inert(set, i), 0);
        }
    ck_assert_str_eq(kphi_rxnset_conversion_label(set), "H2O"); /* first reactant of 1 */
    kphi_rxnset_free(set);
    kphi_species_db_free(db);
}
END_TEST

START_TEST(derived_ammonia)
{
    kphi_species_db *db = NULL;
    kphi_error err;
    kphi_rxnset *set =
        load_text("species: [N2, H2, NH3, Ar]\nconversion: N2\n", &db, &err);
    ck_assert_msg(set != NULL, "%s", err.msg);
    ck_assert_int_eq(kphi_rxnset_derived(set), 1);
    ck_assert_uint_eq(kphi_rxnset_n_reactions(set), 1);
    ck_assert_str_eq(kphi_rxnset_equation(set, 0), "N2 + 3 H2 = 2 NH3");
    ck_assert_double_eq_tol(kphi_rxnset_dnu(set, 0), -2.0, TOL);
    ck_assert_int_eq(kphi_rxnset_is_inert(set, 3), 1); /* Ar: its own element */
    assert_balanced(set);
    kphi_rxnset_free(set);
    kphi_species_db_free(db);
    /* No reaction possible. */
    expect_error("name: t\nspecies: [N2, H2]\n", 2, 10,
                 "no reaction is possible among these species (each amount is fixed by its "
                 "element balance); list more species or give 'reactions'");
}
END_TEST

/* ---- K correlations -------------------------------------------------------------------- */

/* A set whose reaction 1, N2 + 3 H2 = 2 NH3 (dnu = -2), carries the correlation entries
 * that follow (YAML list items at indent 6, from line 6 on). */
#define K_HEAD "name: t\nspecies: [N2, H2, NH3]\nreactions:\n  - equation: N2 + 3 H2 = 2 NH3\n" \
               "    K:\n"
#define K_OK "P_standard: 1 bar, T_range: [600 K, 800 K]"

static kphi_rxnset *load_k(const char *entries, kphi_species_db **db)
{
    char text[2048];
    snprintf(text, sizeof text, "%s%s", K_HEAD, entries);
    kphi_error err;
    kphi_rxnset *set = load_text(text, db, &err);
    ck_assert_msg(set != NULL, "%s: %s", entries, err.msg);
    return set;
}

START_TEST(kcorr_forms_and_values)
{
    kphi_species_db *db = NULL;
    const double T = 687.3; /* K */
    /* ln K form, per the equation, 1 bar: ln K = 1.7 + 11000/T - 3.1 ln T */
    kphi_rxnset *set = load_k("      - {name: a, source: s, ln K: {const: 1.7, 1/T: 11000, "
                              "ln T: -3.1}, " K_OK "}\n",
                              &db);
    ck_assert_uint_eq(kphi_rxnset_n_K_bases(set), 2);
    ck_assert_str_eq(kphi_rxnset_K_basis_name(set, 0), "tables");
    ck_assert_str_eq(kphi_rxnset_K_basis_name(set, 1), "a");
    ck_assert_ptr_null(kphi_rxnset_K_basis_name(set, 2));
    ck_assert_int_eq(kphi_rxnset_K_basis_find(set, "tables"), KPHI_K_TABLES);
    ck_assert_int_eq(kphi_rxnset_K_basis_find(set, "a"), 1);
    ck_assert_int_eq(kphi_rxnset_K_basis_find(set, "b"), -1);
    ck_assert_ptr_null(kphi_rxnset_kcorr_get(set, 0, KPHI_K_TABLES));
    const kphi_rxnset_kcorr *k = kphi_rxnset_kcorr_get(set, 0, 1);
    ck_assert_ptr_nonnull(k);
    ck_assert_str_eq(kphi_rxnset_kcorr_name(k), "a");
    ck_assert_str_eq(kphi_rxnset_kcorr_source(k), "s");
    ck_assert_str_eq(kphi_rxnset_kcorr_note(k), "");
    ck_assert_ptr_null(kphi_rxnset_kcorr_per(k));
    ck_assert_double_eq_tol(kphi_rxnset_kcorr_lnK(k, T), 1.7 + 11000.0 / T - 3.1 * log(T),
                            1e-13);
    ck_assert_double_eq(kphi_rxnset_kcorr_P_standard(k), 1e5);
    double lo, hi;
    kphi_rxnset_kcorr_range(k, &lo, &hi);
    ck_assert_double_eq(lo, 600.0);
    ck_assert_double_eq(hi, 800.0);
    ck_assert_int_eq(kphi_rxnset_kcorr_in_range(k, 599.99), 0);
    ck_assert_int_eq(kphi_rxnset_kcorr_in_range(k, 600.0), 1);
    ck_assert_int_eq(kphi_rxnset_kcorr_in_range(k, 800.01), 0);
    kphi_rxnset_free(set);
    kphi_species_db_free(db);

    /* log10 K form with a log10 T term, per mole of NH3 (s = 2): ln K = 2 ln 10 (sum) */
    set = load_k("      - {name: b, source: s, log10 K: {1/T: 2001.6, log10 T: -2.691122, T: "
                 "-5.519265e-5, T^2: 1.848863e-7, const: 2.6899}, per: NH3, " K_OK "}\n",
                 &db);
    k = kphi_rxnset_kcorr_get(set, 0, 1);
    ck_assert_str_eq(kphi_rxnset_kcorr_per(k), "NH3");
    double l10 = 2001.6 / T - 2.691122 * log10(T) - 5.519265e-5 * T + 1.848863e-7 * T * T +
                 2.6899;
    ck_assert_double_eq_tol(kphi_rxnset_kcorr_lnK_stated(k, T), l10 * log(10.0), 1e-12);
    ck_assert_double_eq_tol(kphi_rxnset_kcorr_lnK(k, T), 2.0 * l10 * log(10.0), 1e-12);
    kphi_rxnset_free(set);
    kphi_species_db_free(db);

    /* per N2 (|nu| = 1) is the equation itself */
    set = load_k("      - {name: c, source: s, ln K: {const: -9.25}, per: N2, " K_OK "}\n", &db);
    ck_assert_double_eq_tol(kphi_rxnset_kcorr_lnK(kphi_rxnset_kcorr_get(set, 0, 1), T), -9.25,
                            1e-15);
    kphi_rxnset_free(set);
    kphi_species_db_free(db);

    /* RT ln K form: ln K = (c1 + c2 T + c7 T ln T) / (R T) with the stated R */
    set = load_k("      - {name: d, source: s, RT ln K: {const: -1.0e5, T: 190.0, T ln T: -25.0}, "
                 "R: 8.3145, " K_OK "}\n",
                 &db);
    k = kphi_rxnset_kcorr_get(set, 0, 1);
    ck_assert_double_eq_tol(kphi_rxnset_kcorr_lnK(k, T),
                            (-1.0e5 + 190.0 * T - 25.0 * T * log(T)) / (8.3145 * T), 1e-12);
    char text[256];
    kphi_rxnset_kcorr_text(k, text, sizeof text);
    ck_assert_str_eq(text, "RT ln K = (-100000 + 190 T - 25 T ln T) J/mol, R = 8.3145 J/(mol K)");
    kphi_rxnset_free(set);
    kphi_species_db_free(db);
}
END_TEST

START_TEST(kcorr_atm_to_bar_is_exact)
{
    /* K = prod (f_i/P_std)^nu_i, so ln K(1 bar) = ln K(1 atm) + dnu ln(101325 Pa / 1e5 Pa):
     * for N2 + 3 H2 = 2 NH3 (dnu = -2) K in bar^-2 is K in atm^-2 / 1.01325^2 (1 atm =
     * 101325 Pa by definition). The same constant stated for 1 atm, 1 bar and 1 MPa. */
    kphi_species_db *db = NULL;
    const double T = 713.7, A = -10.3;
    kphi_rxnset *set = load_k("      - {name: atm, source: s, ln K: {const: -10.3}, P_standard: "
                              "1 atm, T_range: [600 K, 800 K]}\n"
                              "      - {name: bar, source: s, ln K: {const: -10.3}, P_standard: "
                              "1 bar, T_range: [600 K, 800 K]}\n"
                              "      - {name: mpa, source: s, ln K: {const: -10.3}, P_standard: "
                              "1 MPa, T_range: [600 K, 800 K]}\n",
                              &db);
    ck_assert_uint_eq(kphi_rxnset_n_K_bases(set), 4);
    const kphi_rxnset_kcorr *ka = kphi_rxnset_kcorr_get(set, 0, 1);
    const kphi_rxnset_kcorr *kb = kphi_rxnset_kcorr_get(set, 0, 2);
    const kphi_rxnset_kcorr *km = kphi_rxnset_kcorr_get(set, 0, 3);
    ck_assert_double_eq(kphi_rxnset_kcorr_P_standard(ka), 101325.0);
    ck_assert_double_eq(kphi_rxnset_kcorr_lnK(kb, T), A);
    ck_assert_double_eq_tol(kphi_rxnset_kcorr_lnK(ka, T), A - 2.0 * log(1.01325), 1e-15);
    ck_assert_double_eq_tol(kphi_rxnset_kcorr_lnK(km, T), A - 2.0 * log(10.0), 1e-15);
    /* K_bar < K_atm for dnu < 0: 1 atm is the larger unit of pressure */
    ck_assert(kphi_rxnset_kcorr_lnK(ka, T) < kphi_rxnset_kcorr_lnK_stated(ka, T));
    /* the stated value is unchanged by the standard pressure */
    ck_assert_double_eq(kphi_rxnset_kcorr_lnK_stated(ka, T), A);
    /* the van 't Hoff heat does not depend on the standard pressure */
    ck_assert_double_eq(kphi_rxnset_kcorr_dH(ka, T), 0.0);
    kphi_rxnset_free(set);
    kphi_species_db_free(db);
}
END_TEST

START_TEST(kcorr_van_t_hoff_heat)
{
    /* dH = R T^2 d ln K/dT, analytic against a central difference (h = 1e-3 K, truncation
     * error ~ h^2, far below the 1e-6 tolerance), for every term in each form. */
    kphi_species_db *db = NULL;
    kphi_rxnset *set = load_k(
        "      - {name: ln, source: s, ln K: {const: 0.3, 1/T: 9000, 1/T^2: -2.0e5, T: 1.0e-3, "
        "T^2: -2.0e-6, T^3: 1.0e-9, T^4: -1.0e-12, T^5: 1.0e-15, ln T: -2.5, log10 T: 0.7, "
        "T ln T: 1.0e-3}, per: NH3, " K_OK "}\n"
        "      - {name: lg, source: s, log10 K: {1/T: 5139, const: -12.621, T ln T: 2.0e-4}, "
        K_OK "}\n"
        "      - {name: rt, source: s, RT ln K: {const: 7.44140e4, T: 1.89260e2, T^2: 3.2443e-2, "
        "T^3: 7.0432e-6, T^4: -5.6053e-9, T^5: 1.0344e-12, T ln T: -6.4364e1}, R: 8.314, " K_OK
        "}\n",
        &db);
    for (size_t b = 1; b <= 3; b++) {
        const kphi_rxnset_kcorr *k = kphi_rxnset_kcorr_get(set, 0, b);
        for (double T = 480.0; T <= 780.0; T += 75.0) {
            double h = 1e-3;
            double d = (kphi_rxnset_kcorr_lnK(k, T + h) - kphi_rxnset_kcorr_lnK(k, T - h)) /
                       (2.0 * h);
            double fd = KPHI_R * T * T * d, an = kphi_rxnset_kcorr_dH(k, T);
            ck_assert_msg(fabs(an - fd) <= 1e-6 * fabs(an) + 1e-3, "%s T %g: %g vs %g",
                          kphi_rxnset_K_basis_name(set, b), T, an, fd);
        }
    }
    /* log10 K = 5139/T - 12.621 (+ the T ln T term) : the 1/T term gives the constant heat
     * -R ln 10 5139 J/mol */
    double T = 500.0;
    ck_assert_double_eq_tol(kphi_rxnset_kcorr_dH(kphi_rxnset_kcorr_get(set, 0, 2), T) -
                                KPHI_R * T * T * 2.0e-4 * log(10.0) * (log(T) + 1.0),
                            -KPHI_R * log(10.0) * 5139.0, 1e-9);
    char text[256];
    kphi_rxnset_kcorr_text(kphi_rxnset_kcorr_get(set, 0, 2), text, sizeof text);
    ck_assert_str_eq(text, "log10 K = 5139/T + 0.0002 T ln T - 12.621");
    kphi_rxnset_free(set);
    kphi_species_db_free(db);
}
END_TEST

START_TEST(kcorr_shipped_sets)
{
    kphi_error err;
    kphi_error_clear(&err);
    kphi_rxnset *set = kphi_rxnset_load_file("reactions/methanol.yaml", NULL, &err);
    ck_assert_msg(set != NULL, "%s", err.msg);
    ck_assert_uint_eq(kphi_rxnset_n_K_bases(set), 3);
    ck_assert_str_eq(kphi_rxnset_K_basis_name(set, 1), "graaf1986");
    ck_assert_str_eq(kphi_rxnset_K_basis_name(set, 2), "graaf2016");
    ck_assert_str_eq(kphi_rxnset_K_basis_suggest(set, "graaf1968"), "graaf1986");
    for (size_t j = 0; j < 2; j++)
        for (size_t b = 1; b < 3; b++) {
            const kphi_rxnset_kcorr *k = kphi_rxnset_kcorr_get(set, j, b);
            ck_assert_ptr_nonnull(k);
            ck_assert(strlen(kphi_rxnset_kcorr_source(k)) > 20);
            ck_assert(strlen(kphi_rxnset_kcorr_note(k)) > 0);
        }
    /* the reactions keep their equations and the loader's checks */
    ck_assert_str_eq(kphi_rxnset_equation(set, 0), "CO + 2 H2 = CH3OH");
    ck_assert_str_eq(kphi_rxnset_equation(set, 1), "CO2 + H2 = CO + H2O");
    kphi_rxnset_free(set);
    set = kphi_rxnset_load_file("reactions/ammonia.yaml", NULL, &err);
    ck_assert_msg(set != NULL, "%s", err.msg);
    ck_assert_uint_eq(kphi_rxnset_n_K_bases(set), 2);
    const kphi_rxnset_kcorr *k = kphi_rxnset_kcorr_get(set, 0, 1);
    ck_assert_str_eq(kphi_rxnset_kcorr_per(k), "NH3");
    ck_assert_double_eq(kphi_rxnset_kcorr_P_standard(k), 101325.0);
    kphi_rxnset_free(set);
    /* a set with no correlation has the tables basis only */
    set = kphi_rxnset_load_file("reactions/reforming.yaml", NULL, &err);
    ck_assert_msg(set != NULL, "%s", err.msg);
    ck_assert_uint_eq(kphi_rxnset_n_K_bases(set), 1);
    ck_assert_ptr_null(kphi_rxnset_kcorr_get(set, 0, 1));
    kphi_rxnset_free(set);
}
END_TEST

START_TEST(kcorr_errors)
{
    /* entries on line 6; the flow mapping opens at column 9 */
    expect_error(K_HEAD "      - {name: a, source: s, ln K: {const: 1, 1/T^3: 3}, " K_OK "}\n", 6,
                 47, "unknown term '1/T^3' in 'ln K' (did you mean '1/T^2'?)");
    expect_error(K_HEAD "      - {name: a, source: s, ln K: {lnT: 3}, " K_OK "}\n", 6, 37,
                 "unknown term 'lnT' in 'ln K' (did you mean 'ln T'?)");
    expect_error(K_HEAD "      - {name: a, source: s, ln K: {sqrt T: 3}, " K_OK "}\n", 6, 37,
                 "unknown term 'sqrt T' in 'ln K'; the terms are const, 1/T, 1/T^2, T, T^2, "
                 "T^3, T^4, T^5, ln T, log10 T, T ln T");
    expect_error(K_HEAD "      - {name: a, ln K: {const: 1}, " K_OK "}\n", 6, 9,
                 "K correlation 'a' has no 'source': cite the paper (author, year, equation or "
                 "table)");
    expect_error(K_HEAD "      - {name: a, source: '  ', ln K: {const: 1}, " K_OK "}\n", 6, 27,
                 "'source' is empty");
    expect_error(K_HEAD "      - {name: a, source: s, ln K: {const: 1}, P_standard: 1 bar, "
                        "T_range: [800 K, 600 K]}\n",
                 6, 84,
                 "'T_range' is inverted or empty: 600.00 K is not above 800.00 K; write the "
                 "lowest temperature first");
    expect_error(K_HEAD "      - {name: a, source: s, ln K: {const: 1}, P_standard: 1 bar, "
                        "T_range: [600 K]}\n",
                 6, 76,
                 "'T_range' needs two temperatures, lowest first, e.g. [473.15 K, 543.15 K]");
    expect_error(K_HEAD "      - {name: a, source: s, ln K: {const: 1}, T_range: [600 K, 800 K]}\n",
                 6, 9,
                 "K correlation 'a' has no 'P_standard': the standard pressure its K refers to "
                 "(1 bar, or 1 atm in older work)");
    expect_error(K_HEAD "      - {name: a, source: s, ln K: {const: 1}, P_standard: 0 barg, "
                        "T_range: [600 K, 800 K]}\n",
                 6, 60, "'P_standard' is an absolute pressure; 'barg' is a gauge unit");
    expect_error(K_HEAD "      - {name: a, source: s, ln K: {const: 1}, P_standard: 1 bar}\n", 6,
                 9,
                 "K correlation 'a' has no 'T_range': the temperatures it is valid for, e.g. "
                 "[473.15 K, 543.15 K]");
    expect_error(K_HEAD "      - {name: a, source: s, " K_OK "}\n", 6, 9,
                 "K correlation 'a' has no expression: give 'ln K', 'log10 K' or 'RT ln K' as a "
                 "mapping of terms");
    expect_error(K_HEAD "      - {name: a, source: s, ln K: {const: 1}, log10 K: {const: 1}, " K_OK
                        "}\n",
                 6, 48, "K correlation 'a' gives both 'ln K' and 'log10 K'; give one");
    expect_error(K_HEAD "      - {name: a, source: s, ln K: {}, " K_OK "}\n", 6, 36,
                 "'ln K' has no terms; write e.g. {1/T: 5139, const: -12.621}");
    expect_error(K_HEAD "      - {name: a, source: s, ln K: {const: 1, const: 2}, " K_OK "}\n", 6,
                 47, "term 'const' given twice in 'ln K'");
    expect_error(K_HEAD "      - {name: a, source: s, ln K: {const: x}, " K_OK "}\n", 6, 44,
                 "expected a number for the coefficient of 'const', found 'x'");
    expect_error(K_HEAD "      - {name: a, source: s, RT ln K: {const: 1}, " K_OK "}\n", 6, 30,
                 "'RT ln K' needs 'R', the gas constant the coefficients were fitted with, in "
                 "J/(mol K)");
    expect_error(K_HEAD "      - {name: a, source: s, RT ln K: {const: 1}, R: 1.987, " K_OK "}\n",
                 6, 54, "'R' = 1.987 is not the gas constant in J/(mol K) (8.314...)");
    expect_error(K_HEAD "      - {name: a, source: s, ln K: {const: 1}, R: 8.314, " K_OK "}\n", 6,
                 51, "'R' belongs to the 'RT ln K' form only; 'ln K' needs none");
    expect_error(K_HEAD "      - {name: a, source: s, ln K: {const: 1}, per: NH4, " K_OK "}\n", 6,
                 53, "'per: NH4': not a species of reaction 1 (did you mean 'NH3'?)");
    expect_error(K_HEAD "      - {name: a, source: s, ln K: {const: 1}, per: mole, " K_OK "}\n",
                 6, 53,
                 "'per: mole': expected 'equation' or a species of reaction 1 (N2, H2, NH3)");
    expect_error(K_HEAD "      - {source: s, ln K: {const: 1}, " K_OK "}\n", 6, 9,
                 "a K correlation needs a 'name' (the basis chosen with --K)");
    expect_error(K_HEAD "      - {name: tables, source: s, ln K: {const: 1}, " K_OK "}\n", 6, 16,
                 "'tables' is reserved for --K; give the correlation another name");
    expect_error(K_HEAD "      - {name: all, source: s, ln K: {const: 1}, " K_OK "}\n", 6, 16,
                 "'all' is reserved for --K; give the correlation another name");
    expect_error(K_HEAD "      - {name: 'my K', source: s, ln K: {const: 1}, " K_OK "}\n", 6, 16,
                 "K correlation name 'my K' has ' '; use letters, digits, '_', '-' or '.' (it "
                 "is typed after --K)");
    expect_error(K_HEAD "      - {name: a, source: s, ln K: {const: 1}, " K_OK "}\n"
                        "      - {name: a, source: t, ln K: {const: 2}, " K_OK "}\n",
                 7, 16, "reaction 1 has two K correlations named 'a'");
    expect_error(K_HEAD "      - {name: a, source: s, lnK: {const: 1}, " K_OK "}\n", 6, 30,
                 "unknown key 'lnK' in a K correlation (did you mean 'ln K'?)");
    expect_error(K_HEAD "      []\n", 6, 7, "'K' is empty; list correlations or leave the key out");
    expect_error(K_HEAD "      {name: a}\n", 6, 7,
                 "expected a list for 'K' (the reaction's K correlations), found a mapping");
}
END_TEST

static Suite *rxnset_suite(void)
{
    Suite *s = suite_create("rxnset");
    TCase *tc = tcase_create("core");
    tcase_add_test(tc, ammonia_set);
    tcase_add_test(tc, methanol_set);
    tcase_add_test(tc, reforming_set);
    tcase_add_test(tc, fraction_coefficients);
    tcase_add_test(tc, compact_spelling);
    tcase_add_test(tc, kij_entries);
    tcase_add_test(tc, error_unknown_species_in_reaction);
    tcase_add_test(tc, error_species_list);
    tcase_add_test(tc, error_unbalanced);
    tcase_add_test(tc, error_duplicate);
    tcase_add_test(tc, error_dependent);
    tcase_add_test(tc, error_equation_syntax);
    tcase_add_test(tc, error_conversion);
    tcase_add_test(tc, error_kij);
    tcase_add_test(tc, recommended_eos);
    tcase_add_test(tc, error_limits);
    tcase_add_test(tc, error_species_file);
    tcase_add_test(tc, derived_reforming);
    tcase_add_test(tc, kcorr_forms_and_values);
    tcase_add_test(tc, kcorr_atm_to_bar_is_exact);
    tcase_add_test(tc, kcorr_van_t_hoff_heat);
    tcase_add_test(tc, kcorr_shipped_sets);
    tcase_add_test(tc, kcorr_errors);
    tcase_add_test(tc, derived_ammonia);
    suite_add_tcase(s, tc);
    return s;
}

KPHI_TEST_MAIN(rxnset_suite)
