/* Fuzz target (libFuzzer) for kphi's three YAML loaders and the command-line override
 * parsers.
 *
 * Concept: coverage-guided fuzzing (Serebryany 2016, "Continuous fuzzing with libFuzzer and
 * AddressSanitizer", IEEE SecDev) feeds mutated inputs to the loaders under
 * AddressSanitizer and UndefinedBehaviorSanitizer; any crash, leak, sanitizer report or
 * hang is a finding. No equations and no physical units here: the property checked is
 * "bad input gives a status code and a one-line message, never a crash", plus:
 *   - every failure has a status other than KPHI_OK and a non-empty message, and every
 *     KPHI_EINPUT from a file names that file with a line number (file:line:column);
 *   - a successful load gives a consistent object (species and reactions within limits).
 *
 * One input goes, in turn, to
 *   1. kphi_species_db_load_string (as a species database),
 *   2. kphi_rxnset_load_string with the shipped species database (as a reaction set),
 *   3. kphi_case_load_file + kphi_case_validate + kphi_case_make_eos, after writing it to
 *      a temporary case file laid out so that the shipped cases' `../reactions/...` and
 *      the bad-input catalogue's `../../reactions/...` both resolve,
 *   4. the override setters kphi_case_set_T/_P/_feed/_eos/_sweep_T/_sweep_P (its first
 *      line, as typed after --T etc.) on the shipped ammonia case, reset before each input.
 *
 * Environment: KPHI_SOURCE_DIR (else the compile-time KPHI_SOURCE_DIR) is the repository
 * root; KPHI_FUZZ_TMP (else a new directory under /tmp) holds the temporary case file.
 * fuzz/run.sh sets both and removes the temporary directory afterwards. */
#include <errno.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include <gsl/gsl_errno.h>

#include "kphi/case.h"
#include "kphi/error.h"
#include "kphi/rxnset.h"
#include "kphi/species.h"

#ifndef KPHI_SOURCE_DIR
#define KPHI_SOURCE_DIR "."
#endif

int LLVMFuzzerInitialize(int *argc, char ***argv);
int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

/* The fuzzer's process-wide context: set once in LLVMFuzzerInitialize, then read only.
 * (A test harness, not library code: the no-mutable-statics rule is for src/.) */
static kphi_species_db *shipped_db;
static char case_file[4096];
static kphi_case *base; /* the shipped ammonia case, reset before each use */

static void die(const char *what)
{
    fprintf(stderr, "fuzz_loaders: %s: %s\n", what, strerror(errno));
    abort();
}

static void link_reactions(const char *src, const char *dir)
{
    char target[4096], link[4096];
    snprintf(target, sizeof target, "%s/reactions", src);
    snprintf(link, sizeof link, "%s/reactions", dir);
    if (symlink(target, link) != 0 && errno != EEXIST)
        die(link);
}

int LLVMFuzzerInitialize(int *argc, char ***argv)
{
    (void)argc;
    (void)argv;
    gsl_set_error_handler_off();
    const char *src = getenv("KPHI_SOURCE_DIR");
    if (src == NULL || src[0] == '\0')
        src = KPHI_SOURCE_DIR;
    char path[4096];
    snprintf(path, sizeof path, "%s/reactions/species.yaml", src);
    kphi_error err;
    kphi_error_clear(&err);
    shipped_db = kphi_species_db_load_file(path, &err);
    if (shipped_db == NULL) {
        fprintf(stderr, "fuzz_loaders: cannot load %s: %s\n", path, err.msg);
        abort();
    }
    snprintf(path, sizeof path, "%s/cases/ammonia_converter.yaml", src);
    base = kphi_case_load_file(path, &err);
    if (base == NULL) {
        fprintf(stderr, "fuzz_loaders: cannot load %s: %s\n", path, err.msg);
        abort();
    }

    /* tmp/reactions -> src/reactions, tmp/a/reactions -> src/reactions, case in tmp/a/b/ */
    char tmp[4096];
    const char *given = getenv("KPHI_FUZZ_TMP");
    if (given != NULL && given[0] != '\0') {
        snprintf(tmp, sizeof tmp, "%s", given);
    } else {
        snprintf(tmp, sizeof tmp, "/tmp/kphi-fuzz-XXXXXX");
        if (mkdtemp(tmp) == NULL)
            die("mkdtemp");
    }
    char a[4096], b[4096];
    snprintf(a, sizeof a, "%s/a", tmp);
    snprintf(b, sizeof b, "%s/a/b", tmp);
    if ((mkdir(a, 0700) != 0 && errno != EEXIST) || (mkdir(b, 0700) != 0 && errno != EEXIST))
        die("mkdir");
    link_reactions(src, tmp);
    link_reactions(src, a);
    snprintf(case_file, sizeof case_file, "%s/case.yaml", b);
    return 0;
}

/* A failure must carry a code and a message; KPHI_EINPUT about `file` must point at a line
 * of it (or of another input file it names). */
static void check_failure(const kphi_error *err, const char *what)
{
    if (err->code == KPHI_OK || err->msg[0] == '\0') {
        fprintf(stderr, "fuzz_loaders: %s failed without a code or message (code %d)\n", what,
                (int)err->code);
        abort();
    }
    if (err->code == KPHI_EINPUT && err->path[0] == '\0') {
        fprintf(stderr, "fuzz_loaders: %s: input error without a file: %s\n", what, err->msg);
        abort();
    }
    if (strchr(err->msg, '\n') != NULL) {
        fprintf(stderr, "fuzz_loaders: %s: message spans lines: %s\n", what, err->msg);
        abort();
    }
}

static void fuzz_species(const uint8_t *data, size_t size)
{
    kphi_error err;
    kphi_error_clear(&err);
    kphi_species_db *db = kphi_species_db_load_string((const char *)data, size, "fuzz.yaml",
                                                      &err);
    if (db == NULL) {
        check_failure(&err, "species db");
        return;
    }
    for (size_t i = 0; i < kphi_species_db_count(db); i++) {
        const kphi_species *sp = kphi_species_db_get(db, i);
        if (sp == NULL || kphi_species_db_find(db, sp->name) == NULL)
            abort();
        (void)kphi_species_db_suggest(db, sp->name);
    }
    kphi_species_db_free(db);
}

static void fuzz_rxnset(const uint8_t *data, size_t size)
{
    kphi_error err;
    kphi_error_clear(&err);
    kphi_rxnset *set = kphi_rxnset_load_string((const char *)data, size, "fuzz.yaml", shipped_db,
                                               &err);
    if (set == NULL) {
        check_failure(&err, "reaction set");
        return;
    }
    size_t ns = kphi_rxnset_n_species(set), nr = kphi_rxnset_n_reactions(set);
    if (ns == 0 || nr == 0 || nr >= ns)
        abort(); /* independent reactions among ns species: at most ns - 1 */
    for (size_t j = 0; j < nr; j++)
        if (kphi_rxnset_equation(set, j) == NULL)
            abort();
    if (kphi_rxnset_conversion_label(set) == NULL)
        abort();
    kphi_rxnset_free(set);
}

static void exercise_case(kphi_case *c)
{
    kphi_error err;
    kphi_error_clear(&err);
    if (kphi_case_validate(c, &err) != KPHI_OK) {
        check_failure(&err, "case validate");
        return;
    }
    kphi_error_clear(&err);
    kphi_eos *eos = kphi_case_make_eos(c, kphi_case_eos(c), &err);
    if (eos == NULL)
        check_failure(&err, "case eos");
    kphi_eos_free(eos);
}

static void fuzz_case(const uint8_t *data, size_t size)
{
    FILE *f = fopen(case_file, "wb");
    if (f == NULL)
        die(case_file);
    if (size > 0 && fwrite(data, 1, size, f) != size)
        die("fwrite");
    if (fclose(f) != 0)
        die("fclose");
    kphi_error err;
    kphi_error_clear(&err);
    kphi_case *c = kphi_case_load_file(case_file, &err);
    if (c == NULL) {
        check_failure(&err, "case");
        return;
    }
    exercise_case(c);
    kphi_case_free(c);
}

/* Put the shipped case back to the same state before every input, so that runs replay. */
static void reset_base(void)
{
    kphi_error err;
    kphi_error_clear(&err);
    if (kphi_case_set_T(base, "450 C", &err) != KPHI_OK ||
        kphi_case_set_P(base, "195 bar", &err) != KPHI_OK ||
        kphi_case_set_feed(base, "H2=67.2,N2=22.4,NH3=3.1,CH4=4.6,Ar=2.7", &err) != KPHI_OK ||
        kphi_case_set_eos(base, "pr", &err) != KPHI_OK ||
        kphi_case_set_sweep_T(base, "380:520:10C", &err) != KPHI_OK ||
        kphi_case_set_sweep_P(base, "100bar,200bar", &err) != KPHI_OK) {
        fprintf(stderr, "fuzz_loaders: cannot reset the base case: %s\n", err.msg);
        abort();
    }
}

/* The first line of the input as typed after each override option. */
static void fuzz_overrides(const uint8_t *data, size_t size)
{
    char text[512];
    size_t n = 0;
    while (n < size && n + 1 < sizeof text && data[n] != '\n' && data[n] != '\0') {
        text[n] = (char)data[n];
        n++;
    }
    text[n] = '\0';
    reset_base();
    int (*const setters[])(kphi_case *, const char *, kphi_error *) = {
        kphi_case_set_T,   kphi_case_set_P,       kphi_case_set_feed,
        kphi_case_set_eos, kphi_case_set_sweep_T, kphi_case_set_sweep_P};
    for (size_t k = 0; k < sizeof setters / sizeof setters[0]; k++) {
        kphi_error err;
        kphi_error_clear(&err);
        if (setters[k](base, text, &err) != KPHI_OK) {
            check_failure(&err, "override");
            if (strcmp(err.path, "<command line>") != 0 || err.line != 1 || err.column < 1) {
                fprintf(stderr, "fuzz_loaders: override error not at <command line>:1:N: %s\n",
                        err.msg);
                abort();
            }
        }
    }
    exercise_case(base);
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    fuzz_species(data, size);
    fuzz_rxnset(data, size);
    fuzz_case(data, size);
    fuzz_overrides(data, size);
    return 0;
}
