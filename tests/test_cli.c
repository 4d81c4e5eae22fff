/* End-to-end tests of the kphi program on the shipped cases: the output contracts of
 * DESIGN.md (JSON keys, CSV columns), exit codes, files written whole or not at all, and
 * sweep output identical for any thread count. The program under test is $KPHI_BIN
 * (tests/run_tests.sh sets it), else bin/kphi. Bad inputs are covered by tests/bad/. */
#include <ctype.h>
#include <dirent.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include <unistd.h>

#include "kphi/kphi.h"
#include "testutil.h"

typedef struct {
    char *out;   /* standard output */
    size_t len;
    int status;  /* exit code */
} run_result;

static const char *kphi_bin(void)
{
    const char *b = getenv("KPHI_BIN");
    return b != NULL && b[0] != '\0' ? b : "bin/kphi";
}

/* Run "kphi ARGS" through the shell, stderr to /dev/null, capturing stdout. */
static run_result run(const char *args)
{
    char cmd[2048];
    snprintf(cmd, sizeof cmd, "%s %s%s", kphi_bin(), args,
             strstr(args, " 2>") != NULL ? "" : " 2>/dev/null");
    FILE *p = popen(cmd, "r");
    ck_assert_ptr_nonnull(p);
    run_result r = {NULL, 0, -1};
    size_t cap = 1 << 16;
    r.out = malloc(cap);
    ck_assert_ptr_nonnull(r.out);
    size_t got;
    while ((got = fread(r.out + r.len, 1, cap - r.len - 1, p)) > 0) {
        r.len += got;
        if (cap - r.len < 4096) {
            cap *= 2;
            r.out = realloc(r.out, cap);
            ck_assert_ptr_nonnull(r.out);
        }
    }
    r.out[r.len] = '\0';
    int st = pclose(p);
    r.status = WIFEXITED(st) ? WEXITSTATUS(st) : -1;
    return r;
}

/* Run "kphi ARGS" capturing stdout (the result) and stderr (*err_text, caller frees). */
static run_result run_err(const char *args, char **err_text)
{
    char tmpl[] = "/tmp/kphi-test-stderr-XXXXXX";
    int fd = mkstemp(tmpl);
    ck_assert_int_ge(fd, 0);
    close(fd);
    char redirected[2048];
    snprintf(redirected, sizeof redirected, "%s 2>%s", args, tmpl);
    run_result r = run(redirected);
    FILE *f = fopen(tmpl, "r");
    ck_assert_ptr_nonnull(f);
    size_t cap = 1 << 14, len = 0, got;
    char *e = malloc(cap);
    ck_assert_ptr_nonnull(e);
    while ((got = fread(e + len, 1, cap - len - 1, f)) > 0) {
        len += got;
        if (cap - len < 1024) {
            cap *= 2;
            e = realloc(e, cap);
            ck_assert_ptr_nonnull(e);
        }
    }
    e[len] = '\0';
    fclose(f);
    unlink(tmpl);
    *err_text = e;
    return r;
}

static size_t count_char(const char *s, size_t n, char c)
{
    size_t k = 0;
    for (size_t i = 0; i < n; i++)
        k += s[i] == c;
    return k;
}

START_TEST(solve_json_has_the_contract_keys)
{
    run_result r = run("solve cases/ammonia_converter.yaml --format json");
    ck_assert_int_eq(r.status, 0);
    const char *keys[] = {"\"T_K\": 723.15", "\"P_bar\": 195", "\"eos\": \"pr\"",
                          "\"species\": [", "\"name\": \"NH3\"", "\"feed\": ", "\"y\": ",
                          "\"y_ideal\": ", "\"phi\": ", "\"reactions\": [",
                          "\"equation\": \"N2 + 3 H2 = 2 NH3\"", "\"K\": ", "\"Kphi\": ",
                          "\"Ky\": ", "\"dnu\": -2", "\"conversion\": {\"species\": \"N2\"",
                          "\"real\": ", "\"ideal\": ", "\"shift\": "};
    for (size_t k = 0; k < sizeof keys / sizeof keys[0]; k++)
        ck_assert_msg(strstr(r.out, keys[k]) != NULL, "missing %s in %s", keys[k], r.out);
    /* one object on one line, braces and brackets balanced */
    ck_assert_uint_eq(count_char(r.out, r.len, '\n'), 1);
    ck_assert_uint_eq(count_char(r.out, r.len, '{'), count_char(r.out, r.len, '}'));
    ck_assert_uint_eq(count_char(r.out, r.len, '['), count_char(r.out, r.len, ']'));
    free(r.out);
}
END_TEST

/* Number of comma-separated fields on each line; all lines must agree. */
static size_t csv_fields(const char *s, size_t *lines)
{
    size_t fields = 0, cur = 1, n = 0;
    int quoted = 0;
    for (const char *p = s; *p; p++) {
        if (*p == '"')
            quoted = !quoted;
        else if (*p == ',' && !quoted)
            cur++;
        else if (*p == '\n') {
            if (n == 0)
                fields = cur;
            else
                ck_assert_uint_eq(cur, fields);
            n++;
            cur = 1;
        }
    }
    *lines = n;
    return fields;
}

START_TEST(sweep_csv_columns_and_grid)
{
    run_result r = run("sweep cases/methanol_converter.yaml --T 480:540:20K --P 50bar,100bar");
    ck_assert_int_eq(r.status, 0);
    ck_assert_msg(strncmp(r.out, "T_K,P_bar,X_real,X_ideal,shift,y_CO,y_CO2,", 42) == 0, "%.80s",
                  r.out);
    size_t lines;
    size_t fields = csv_fields(r.out, &lines);
    ck_assert_uint_eq(lines, 1 + 4 * 2); /* header + 4 T x 2 P, T outer */
    /* 5 leading + 3 x 7 species + 3 x 2 reactions + Z, status, message, P_equiv_ideal_bar,
     * vapour_fraction + x_ of 7 species */
    ck_assert_uint_eq(fields, 5 + 21 + 6 + 4 + 1 + 7);
    ck_assert_ptr_nonnull(strstr(r.out, "\n480,50,"));
    ck_assert_ptr_nonnull(strstr(r.out, "\n480,100,"));
    ck_assert_ptr_nonnull(strstr(r.out, "\n540,100,"));
    ck_assert(strstr(r.out, "\n480,50,") < strstr(r.out, "\n480,100,"));
    free(r.out);
}
END_TEST

START_TEST(sweep_adiabatic_columns)
{
    /* --adiabatic appends the outlet block to every row; a failed point (the virial model
     * refuses 900 bar) keeps the header's column count with empty cells */
    run_result r = run("sweep cases/ammonia_converter.yaml --T 380C,400C --P 150bar,900bar "
                       "--eos virial --adiabatic");
    ck_assert_int_eq(r.status, 0);
    ck_assert_ptr_nonnull(strstr(r.out, ",Z,status,message,P_equiv_ideal_bar,vapour_fraction,"
                                        "x_N2,x_H2,x_NH3,x_CH4,x_Ar,T_out_K,"
                                        "T_out_ideal_K,X_adiabatic_real,X_adiabatic_ideal,"
                                        "y_out_N2,"));
    size_t lines;
    size_t fields = csv_fields(r.out, &lines);
    ck_assert_uint_eq(lines, 1 + 2 * 2);
    /* 5 leading + 3 x 5 species + 3 x 1 reaction + Z, status, message, P_equiv + 4 + 2 x 5 */
    ck_assert_uint_eq(fields, 5 + 15 + 3 + 4 + 6 + 4 + 10); /* 6: vapour_fraction, x_ */
    ck_assert_ptr_nonnull(strstr(r.out, ",failed,"));
    ck_assert_ptr_nonnull(strstr(r.out, ",ok,"));
    free(r.out);
    run_result j = run("sweep cases/ammonia_converter.yaml --T 400C --P 150bar --adiabatic "
                       "--format json");
    ck_assert_int_eq(j.status, 0);
    ck_assert_ptr_nonnull(strstr(j.out, "\"adiabatic\": {\"T_out_K\": "));
    free(j.out);
}
END_TEST

/* The value in column `name` of the first data row of a CSV text (unquoted numbers). */
static double csv_value(const char *csv, const char *name)
{
    const char *row = strchr(csv, '\n');
    ck_assert_ptr_nonnull(row);
    row++;
    size_t want = 0, col = 0, nlen = strlen(name);
    int found = 0;
    for (const char *p = csv; p < row - 1 && !found; col++) {
        const char *e = p;
        while (*e != ',' && *e != '\n')
            e++;
        if ((size_t)(e - p) == nlen && strncmp(p, name, nlen) == 0) {
            want = col;
            found = 1;
        }
        p = e + 1;
    }
    ck_assert_msg(found, "no column %s", name);
    const char *p = row;
    for (size_t c = 0; c < want; c++) {
        p = strchr(p, ',');
        ck_assert_ptr_nonnull(p);
        p++;
    }
    return strtod(p, NULL);
}

START_TEST(solve_intercooled_beds)
{
    /* three beds: the first fed at the case's 380 C, the gas cooled to 400 C and 410 C
     * before beds 2 and 3. Conversion rises bed by bed; bed 2 is the single adiabatic bed
     * fed with bed 1's outlet gas (its mole fractions as --feed) at 400 C */
    run_result r = run("solve cases/ammonia_converter.yaml --T 380C --intercool 400C,410C "
                       "--format csv");
    ck_assert_int_eq(r.status, 0);
    size_t lines;
    size_t fields = csv_fields(r.out, &lines);
    ck_assert_uint_eq(lines, 2);
    /* 27 columns of the point + vapour_fraction and 5 x_ + 4 + 2 x 5 of bed 1 + 7 per
     * further bed */
    ck_assert_uint_eq(fields, 27 + 6 + 14 + 2 * 7);
    double X1 = csv_value(r.out, "X_adiabatic_real"), X2 = csv_value(r.out, "bed2_X_real");
    double X3 = csv_value(r.out, "bed3_X_real");
    ck_assert_msg(X1 > 0.05 && X2 > X1 + 0.02 && X3 > X2 + 0.02, "X %g %g %g", X1, X2, X3);
    ck_assert_double_eq_tol(csv_value(r.out, "bed2_T_in_K"), 673.15, 1e-9);
    ck_assert_double_eq_tol(csv_value(r.out, "bed3_T_in_K"), 683.15, 1e-9);
    ck_assert(csv_value(r.out, "bed3_X_ideal") < X3); /* real gas converts more */
    char args[512];
    snprintf(args, sizeof args,
             "solve cases/ammonia_converter.yaml --T 400C --adiabatic --format csv "
             "--feed N2=%.12g,H2=%.12g,NH3=%.12g,CH4=%.12g,Ar=%.12g",
             csv_value(r.out, "y_out_N2"), csv_value(r.out, "y_out_H2"),
             csv_value(r.out, "y_out_NH3"), csv_value(r.out, "y_out_CH4"),
             csv_value(r.out, "y_out_Ar"));
    run_result b = run(args);
    ck_assert_int_eq(b.status, 0);
    ck_assert_double_eq_tol(csv_value(b.out, "T_out_K"), csv_value(r.out, "bed2_T_out_K"), 1e-6);
    ck_assert_double_eq_tol(csv_value(b.out, "y_out_NH3"), csv_value(r.out, "bed2_y_NH3"), 1e-9);
    free(b.out);
    free(r.out);
    run_result j = run("solve cases/ammonia_converter.yaml --T 380C --intercool 400C "
                       "--format json");
    ck_assert_int_eq(j.status, 0);
    ck_assert_ptr_nonnull(strstr(j.out, "\"beds\": [{\"bed\": 2, \"T_in_K\": 673.15, "));
    free(j.out);
    /* --plot: the equilibrium curve with the bed path, written whole */
    char dir[] = "/tmp/kphi-test-cli-XXXXXX";
    ck_assert_ptr_nonnull(mkdtemp(dir));
    char cmd[256], file[128];
    snprintf(file, sizeof file, "%s/beds.svg", dir);
    snprintf(cmd, sizeof cmd, "solve cases/ammonia_converter.yaml --T 380C --intercool 400C "
                              "--plot %s", file);
    run_result p = run(cmd);
    ck_assert_int_eq(p.status, 0);
    struct stat st;
    ck_assert_int_eq(stat(file, &st), 0);
    ck_assert_int_gt(st.st_size, 1000);
    free(p.out);
    unlink(file);
    rmdir(dir);
}
END_TEST

START_TEST(intercool_that_heats_says_so_and_warns)
{
    /* bed 1 from 380 C leaves near 524 C; an "intercooler" to 600 C heats the gas, and
     * bed 2 then decomposes NH3: the table says "heated to" and every format warns */
    char *e = NULL;
    run_result r = run_err("solve cases/ammonia_converter.yaml --T 380C --intercool 600C", &e);
    ck_assert_int_eq(r.status, 0);
    ck_assert_msg(strstr(r.out, "bed 2, heated to 600.00 C") != NULL, "%s", r.out);
    ck_assert_ptr_null(strstr(r.out, "cooled to"));
    ck_assert_ptr_nonnull(strstr(r.out, "warning: bed 2 runs backwards (real gas and ideal "
                                        "gas): NH3 falls from "));
    ck_assert_msg(e[0] == '\0', "a table on stdout warns in itself: %s", e); /* not twice */
    free(r.out);
    free(e);
    r = run_err("solve cases/ammonia_converter.yaml --T 380C --intercool 600C --format json", &e);
    ck_assert_int_eq(r.status, 0);
    ck_assert_ptr_nonnull(strstr(r.out, "\"warnings\": [\"bed 2 runs backwards"));
    ck_assert_ptr_nonnull(strstr(e, "cases/ammonia_converter.yaml: warning: bed 2 runs "
                                    "backwards"));
    ck_assert_uint_eq(count_char(e, strlen(e), '\n'), 1);
    free(r.out);
    free(e);
    /* a real intercooler: "cooled to", no warning */
    r = run_err("solve cases/ammonia_converter.yaml --T 380C --intercool 400C --format csv", &e);
    ck_assert_int_eq(r.status, 0);
    ck_assert_str_eq(e, "");
    free(r.out);
    free(e);
    r = run("solve cases/ammonia_converter.yaml --T 380C --intercool 400C");
    ck_assert_ptr_nonnull(strstr(r.out, "bed 2, cooled to 400.00 C"));
    ck_assert_ptr_null(strstr(r.out, "warning"));
    free(r.out);
}
END_TEST

/* A word "nan", "inf" or "infinity" (any case, any sign) in text: what printf makes of a
 * non-finite number. Words are runs of letters and digits. */
static const char *nan_or_inf(const char *text)
{
    for (const char *p = text; *p;) {
        if (!isalnum((unsigned char)*p)) {
            p++;
            continue;
        }
        const char *b = p;
        while (isalnum((unsigned char)*p))
            p++;
        size_t n = (size_t)(p - b);
        if ((n == 3 && (strncasecmp(b, "nan", 3) == 0 || strncasecmp(b, "inf", 3) == 0)) ||
            (n == 8 && strncasecmp(b, "infinity", 8) == 0))
            return b;
    }
    return NULL;
}

/* Every shipped reaction set with odd feeds (each species alone: pure NH3, pure inert, ...;
 * every species but one: no N2, no CO, ...; CO + H2 only) through every output format of
 * solve, solve --eos all, solve --adiabatic, sweep, flash and check: no output and no
 * message may hold a nan or an inf. A conversion of a species absent from the feed is
 * undefined and must say so in words. */
START_TEST(no_nan_or_inf_in_any_output)
{
    char cwd[1024];
    ck_assert_ptr_nonnull(getcwd(cwd, sizeof cwd));
    char dir[] = "/tmp/kphi-test-odd-XXXXXX";
    ck_assert_ptr_nonnull(mkdtemp(dir));
    static const char *const cmds[] = {
        "solve %s",
        "solve %s --format csv",
        "solve %s --format json",
        "solve %s --eos all",
        "solve %s --eos all --format csv",
        "solve %s --eos all --format json",
        "solve %s --adiabatic",
        "solve %s --adiabatic --format json",
        "sweep %s --T 600K,700K --P 50bar,150bar",
        "sweep %s --T 600K,700K --P 50bar,150bar --format json",
        "flash %s",
        "flash %s --T 250K --format csv",
        "flash %s --T 250K --format json",
        "check %s"};
    static const char *const sets[] = {"ammonia", "methanol", "reforming"};
    size_t n_runs = 0, n_undefined = 0;
    for (size_t q = 0; q < sizeof sets / sizeof sets[0]; q++) {
        char set_path[1200];
        snprintf(set_path, sizeof set_path, "%s/reactions/%s.yaml", cwd, sets[q]);
        kphi_error e;
        kphi_error_clear(&e);
        kphi_rxnset *set = kphi_rxnset_load_file(set_path, NULL, &e);
        ck_assert_msg(set != NULL, "%s", e.msg);
        size_t s = kphi_rxnset_n_species(set);
        /* feeds: 0..s-1 one species alone, s..2s-1 all but one, 2s CO + H2 (when the set
         * has both) */
        for (size_t f = 0; f <= 2 * s; f++) {
            char feed[512] = "";
            size_t used = 0;
            if (f == 2 * s) {
                if (kphi_rxnset_species_index(set, "CO") < 0 ||
                    kphi_rxnset_species_index(set, "H2") < 0)
                    continue;
                snprintf(feed, sizeof feed, "CO: 1, H2: 2");
            } else {
                for (size_t i = 0; i < s; i++) {
                    int take = f < s ? i == f : i != f - s;
                    if (take)
                        used += (size_t)snprintf(feed + used, sizeof feed - used, "%s%s: %zu",
                                                 used ? ", " : "",
                                                 kphi_rxnset_species(set, i)->name, i + 1);
                }
            }
            char case_path[256];
            snprintf(case_path, sizeof case_path, "%s/odd.yaml", dir);
            FILE *c = fopen(case_path, "w");
            ck_assert_ptr_nonnull(c);
            fprintf(c, "reactions: %s\nfeed: {%s}\nT: 650 K\nP: 100 bar\n", set_path, feed);
            fclose(c);
            for (size_t k = 0; k < sizeof cmds / sizeof cmds[0]; k++) {
                char args[512];
                snprintf(args, sizeof args, cmds[k], case_path);
                char *err_text = NULL;
                run_result r = run_err(args, &err_text);
                const char *bad = nan_or_inf(r.out);
                ck_assert_msg(bad == NULL, "'%.12s' in the output of %s with feed {%s}: %s", bad,
                              cmds[k], feed, r.out);
                bad = nan_or_inf(err_text);
                ck_assert_msg(bad == NULL, "'%.12s' in the message of %s with feed {%s}: %s",
                              bad, cmds[k], feed, err_text);
                ck_assert_msg(r.status == 0 || r.status == 1 || r.status == 2, "%s: exit %d",
                              args, r.status);
                n_undefined += strstr(r.out, "undefined") != NULL;
                n_runs++;
                free(r.out);
                free(err_text);
            }
        }
        kphi_rxnset_free(set);
    }
    ck_assert_uint_gt(n_runs, 400);
    ck_assert_uint_gt(n_undefined, 20); /* conversions of absent species said in words */
    char rm[128];
    snprintf(rm, sizeof rm, "rm -rf %s", dir);
    ck_assert_int_eq(system(rm), 0);
}
END_TEST

/* The number after `key` in a JSON text ("key": 1.5), NaN for null or when missing. */
static double json_value(const char *json, const char *key)
{
    char pat[128];
    snprintf(pat, sizeof pat, "\"%s\": ", key);
    const char *p = strstr(json, pat);
    if (p == NULL)
        return NAN;
    p += strlen(pat);
    if (strncmp(p, "null", 4) == 0)
        return NAN;
    return strtod(p, NULL);
}

START_TEST(equivalent_pressure_in_every_format)
{
    /* solve and sweep give the same equivalent ideal-gas pressure in table, CSV and JSON */
    run_result j = run("solve cases/ammonia_converter.yaml --T 400C --P 250bar --format json");
    ck_assert_int_eq(j.status, 0);
    double Pj = json_value(j.out, "P_equiv_ideal_bar");
    ck_assert_msg(Pj > 260.0 && Pj < 400.0, "%g", Pj); /* the real gas converts more */
    run_result c = run("sweep cases/ammonia_converter.yaml --T 380C,400C --P 150bar,250bar");
    ck_assert_int_eq(c.status, 0);
    ck_assert_ptr_nonnull(strstr(c.out, ",message,P_equiv_ideal_bar,vapour_fraction,x_N2,"));
    const char *row = strstr(c.out, "\n673.15,250,");
    ck_assert_ptr_nonnull(row);
    size_t col = 0;
    for (const char *h = c.out; h < strstr(c.out, "P_equiv_ideal_bar"); h++)
        col += *h == ',';
    const char *cell = row + 1;
    for (size_t k = 0; k < col; k++)
        cell = strchr(cell, ',') + 1;
    ck_assert_double_eq_tol(strtod(cell, NULL), Pj, 1e-9 * Pj);
    run_result s = run("sweep cases/ammonia_converter.yaml --T 400C --P 250bar --format json");
    ck_assert_double_eq_tol(json_value(s.out, "P_equiv_ideal_bar"), Pj, 1e-9 * Pj);
    free(j.out);
    free(c.out);
    free(s.out);
    /* a difference of pressure has no gauge: the case in barg reads the shift in bar */
    run_result g = run("solve cases/ammonia_converter.yaml --P 185barg");
    ck_assert_int_eq(g.status, 0);
    ck_assert_msg(strstr(g.out, "equivalent ideal-gas pressure: ") != NULL &&
                      strstr(g.out, " barg (the ideal gas needs +") != NULL &&
                      strstr(g.out, " bar to match the real-gas conversion)") != NULL,
                  "%s", g.out);
    free(g.out);
    /* complete conversion: no pressure matches; said in words, null, empty cell */
    const char *args = "solve cases/ammonia_converter.yaml --feed N2=1,H2=30 --T 150C --P 300bar";
    char cmd[512];
    run_result t = run(args);
    ck_assert_ptr_nonnull(strstr(t.out, "equivalent ideal-gas pressure: undefined: the "
                                        "conversion is complete"));
    snprintf(cmd, sizeof cmd, "%s --format json", args);
    run_result u = run(cmd);
    ck_assert_ptr_nonnull(strstr(u.out, "\"P_equiv_ideal_bar\": null, \"P_equiv_note\": "
                                        "\"undefined: the conversion is complete"));
    snprintf(cmd, sizeof cmd, "%s --format csv", args);
    run_result v = run(cmd);
    ck_assert_msg(v.out[v.len - 1] == '\n' && v.out[v.len - 2] == ',', "%s", v.out);
    free(t.out);
    free(u.out);
    free(v.out);
}
END_TEST

START_TEST(table_keeps_small_values)
{
    /* K, Kphi, Ky and phi in significant digits: the Kphi of CO + 2 H2 = CH3OH at 150 C,
     * 9000 bar (PR) is 2.14e-4 and must not shrink to "0.00021"; phi of CO is above 400 */
    run_result r = run("solve cases/methanol_converter.yaml --T 150C --P 9000bar");
    ck_assert_int_eq(r.status, 0);
    run_result j = run("solve cases/methanol_converter.yaml --T 150C --P 9000bar --format json");
    double kphi1 = json_value(j.out, "Kphi");
    ck_assert_msg(kphi1 > 1e-4 && kphi1 < 1e-3, "%g", kphi1);
    char want[64];
    snprintf(want, sizeof want, " %#.6g ", kphi1);
    ck_assert_msg(strstr(r.out, want) != NULL, "no '%s' in %s", want, r.out);
    snprintf(want, sizeof want, " %#.6g\n", json_value(j.out, "phi")); /* CO, the first */
    ck_assert_msg(strstr(r.out, want) != NULL, "no '%s' in %s", want, r.out);
    free(r.out);
    free(j.out);
}
END_TEST

START_TEST(case_name_and_kij_everywhere)
{
    const char *name = "Harrowgate works, loop 2 converter inlet (invented scenario)";
    run_result t = run("solve cases/ammonia_converter.yaml");
    char want[256];
    snprintf(want, sizeof want, "%s  (cases/ammonia_converter.yaml)\nreaction set: ammonia "
                                "synthesis\n", name);
    ck_assert_msg(strncmp(t.out, want, strlen(want)) == 0, "%s", t.out);
    ck_assert_ptr_nonnull(strstr(t.out, "\nk_ij: 0 from the k_ij file for NH3-H2, NH3-N2, "
                                        "NH3-CH4, NH3-Ar, N2-H2, CH4-H2 (no published value "
                                        "seen; see the file's notes)\n"));
    free(t.out);
    run_result j = run("solve cases/ammonia_converter.yaml --format json");
    snprintf(want, sizeof want, "\"reaction_set\": \"ammonia synthesis\", \"case\": \"%s\", "
                                "\"kij\": [{\"pair\": [\"NH3\", \"H2\"], \"value\": 0, "
                                "\"source\": \"No published value", name);
    ck_assert_msg(strstr(j.out, want) != NULL, "%s", j.out);
    free(j.out);
    run_result w = run("sweep cases/ammonia_converter.yaml --T 400C --P 150bar --format json");
    ck_assert_ptr_nonnull(strstr(w.out, want));
    free(w.out);
    run_result c = run("sweep cases/ammonia_converter.yaml --T 400C --P 150bar");
    ck_assert(strncmp(c.out, "T_K,P_bar,", 10) == 0); /* CSV stays pure columns */
    free(c.out);
    /* a case without a name, with k_ij of its own: the file's stem and every k_ij with its
     * source in check, table and JSON */
    char cwd[1024];
    ck_assert_ptr_nonnull(getcwd(cwd, sizeof cwd));
    char dir[] = "/tmp/kphi-test-name-XXXXXX";
    ck_assert_ptr_nonnull(mkdtemp(dir));
    char path[256], args[512];
    snprintf(path, sizeof path, "%s/loop_b.yaml", dir);
    FILE *f = fopen(path, "w");
    ck_assert_ptr_nonnull(f);
    fprintf(f, "reactions: %s/reactions/methanol.yaml\nfeed: {CO: 1, CO2: 0.3, H2: 2.6}\n"
               "T: 250 C\nP: 80 bar\nkij_file: none\n"
               "kij: [{pair: [CO2, H2], value: -0.12, source: \"invented for a test\"}]\n",
            cwd);
    fclose(f);
    snprintf(args, sizeof args, "solve %s", path);
    t = run(args);
    ck_assert_msg(strncmp(t.out, "loop_b  (", 9) == 0, "%s", t.out);
    ck_assert_ptr_nonnull(strstr(t.out, "\nreaction set: methanol synthesis\n"));
    ck_assert_ptr_nonnull(strstr(t.out, "\nk_ij: CO2-H2 = -0.12 (case; invented for a test)\n"));
    free(t.out);
    snprintf(args, sizeof args, "solve %s --format json", path);
    j = run(args);
    ck_assert_ptr_nonnull(strstr(j.out, "\"case\": \"loop_b\", \"kij\": [{\"pair\": [\"CO2\", "
                                        "\"H2\"], \"value\": -0.12, \"source\": \"invented for "
                                        "a test\", \"from\": \"case\"}]"));
    free(j.out);
    snprintf(args, sizeof args, "check %s", path);
    c = run(args);
    ck_assert_int_eq(c.status, 0);
    ck_assert_ptr_nonnull(strstr(c.out, "case: loop_b  ("));
    ck_assert_ptr_nonnull(strstr(c.out, "k_ij in effect: CO2-H2 = -0.12 (case; invented for a "
                                        "test)\n"));
    free(c.out);
    unlink(path);
    rmdir(dir);
}
END_TEST

/* The value of column `name` in the data row of a one-row CSV text, as text. */
static void csv_cell(const char *csv, const char *name, char *buf, size_t n)
{
    const char *row = strchr(csv, '\n') + 1;
    size_t col = 0, nlen = strlen(name);
    int found = 0;
    for (const char *p = csv; p < row - 1 && !found;) {
        const char *e = p;
        while (*e != ',' && *e != '\n')
            e++;
        if ((size_t)(e - p) == nlen && strncmp(p, name, nlen) == 0)
            found = 1;
        else
            col++;
        p = e + 1;
    }
    ck_assert_msg(found, "no column %s", name);
    const char *p = row;
    for (size_t c = 0; c < col; c++)
        p = strchr(p, ',') + 1;
    size_t len = strcspn(p, ",\n");
    ck_assert_uint_lt(len, n);
    memcpy(buf, p, len);
    buf[len] = '\0';
}

START_TEST(approach_dT_is_the_equilibrium_at_T_plus_dT)
{
    /* the outlet of --approach-dT 10K at 450 C holds the equilibrium of 460 C: every
     * column but T_K (and the trailing block) equals solve --T 460C's, in solve and sweep */
    run_result a = run("solve cases/ammonia_converter.yaml --approach-dT 10K --format csv");
    run_result b = run("solve cases/ammonia_converter.yaml --T 460C --format csv");
    ck_assert_int_eq(a.status, 0);
    ck_assert_int_eq(b.status, 0);
    const char *cols[] = {"X_real", "X_ideal", "y_NH3", "y_ideal_NH3", "phi_NH3", "K_1",
                          "Kphi_1", "Z", "P_equiv_ideal_bar"};
    char va[64], vb[64];
    for (size_t k = 0; k < sizeof cols / sizeof cols[0]; k++) {
        csv_cell(a.out, cols[k], va, sizeof va);
        csv_cell(b.out, cols[k], vb, sizeof vb);
        ck_assert_msg(strcmp(va, vb) == 0, "%s: %s vs %s", cols[k], va, vb);
    }
    csv_cell(a.out, "T_K", va, sizeof va);
    ck_assert_str_eq(va, "723.15"); /* the outlet */
    csv_cell(a.out, "approach_dT_K", va, sizeof va);
    ck_assert_str_eq(va, "10");
    csv_cell(a.out, "T_eq_K", va, sizeof va);
    ck_assert_str_eq(va, "733.15");
    free(a.out);
    free(b.out);
    run_result j = run("solve cases/ammonia_converter.yaml --approach-dT 18F --format json");
    ck_assert_ptr_nonnull(strstr(j.out, "\"T_K\": 723.15, "));
    ck_assert_ptr_nonnull(strstr(j.out, "\"approach_dT\": {\"dT_K\": 10, \"T_eq_K\": 733.15}"));
    free(j.out);
    run_result t = run("solve cases/ammonia_converter.yaml --approach-dT 10K");
    ck_assert_ptr_nonnull(strstr(t.out, "T = 450.00 C (723.15 K)"));
    ck_assert_ptr_nonnull(strstr(t.out, "outlet at a +10.00 K approach to equilibrium: the "
                                        "composition above is the equilibrium at 460.00 C"));
    free(t.out);
    /* the sweep: each row the equilibrium at its T + dT, under its own T */
    run_result c = run("sweep cases/ammonia_converter.yaml --T 440C,450C --P 195bar "
                       "--approach-dT 10K");
    run_result d = run("sweep cases/ammonia_converter.yaml --T 450C,460C --P 195bar");
    ck_assert_int_eq(c.status, 0);
    const char *rc = strchr(c.out, '\n') + 1, *rd = strchr(d.out, '\n') + 1;
    ck_assert(strncmp(rc, "713.15,195,", 11) == 0 && strncmp(rd, "723.15,195,", 11) == 0);
    /* same row from P_bar on, up to the end of d's row; c's row adds ,10,723.15 */
    const char *ec = strchr(rc, '\n'), *ed = strchr(rd, '\n');
    size_t nd = (size_t)(ed - rd) - 6;
    ck_assert_uint_eq((size_t)(ec - rc) - 6, nd + strlen(",10,723.15"));
    ck_assert(memcmp(rc + 6, rd + 6, nd) == 0);
    ck_assert(strncmp(rc + 6 + nd, ",10,723.15", 10) == 0);
    free(c.out);
    free(d.out);
}
END_TEST

START_TEST(approach_per_reaction_from_an_analysis)
{
    /* the methanol equilibrium at 250 C, given back as a measured outlet analysis at
     * 250 C: both reactions are at equilibrium there (approach 0 to 1e-6 K) */
    run_result j = run("solve cases/methanol_converter.yaml --format json");
    ck_assert_int_eq(j.status, 0);
    const char *names[] = {"CO", "CO2", "H2", "CH3OH", "H2O", "CH4", "N2"};
    char analysis[512] = "";
    size_t used = 0;
    const char *p = j.out;
    for (size_t k = 0; k < 7; k++) {
        char key[64];
        snprintf(key, sizeof key, "{\"name\": \"%s\"", names[k]);
        p = strstr(j.out, key);
        ck_assert_ptr_nonnull(p);
        double y = json_value(p, "y");
        used += (size_t)snprintf(analysis + used, sizeof analysis - used, "%s%s=%.15g",
                                 k ? "," : "", names[k], y);
    }
    free(j.out);
    char args[800];
    snprintf(args, sizeof args, "solve cases/methanol_converter.yaml --approach %s --format csv",
             analysis);
    run_result c = run(args);
    ck_assert_int_eq(c.status, 0);
    ck_assert_double_eq_tol(csv_value(c.out, "rxn1_T_eq_K"), 523.15, 1e-6);
    ck_assert_double_eq_tol(csv_value(c.out, "rxn2_T_eq_K"), 523.15, 1e-6);
    ck_assert_double_eq_tol(csv_value(c.out, "rxn1_dT_K"), 0.0, 1e-6);
    free(c.out);
    /* an analysis short of equilibrium (less methanol, more CO): reaction 1 is at
     * equilibrium above the outlet temperature; the table says it per reaction */
    run_result t = run("solve cases/methanol_converter.yaml --approach "
                       "CO=0.03,CO2=0.035,H2=0.64,CH3OH=0.10,H2O=0.012,CH4=0.14,N2=0.043");
    ck_assert_int_eq(t.status, 0);
    ck_assert_ptr_nonnull(strstr(t.out, "approach per reaction: the measured outlet at 250.00 C "
                                        "is at equilibrium in\n  CO + 2 H2 = CH3OH "));
    ck_assert_ptr_nonnull(strstr(t.out, "approach +"));
    free(t.out);
    /* without water the shift reaction has no answer: said in words and JSON */
    run_result w = run("solve cases/methanol_converter.yaml --approach "
                       "CO=0.03,CO2=0.035,H2=0.652,CH3OH=0.10,CH4=0.14,N2=0.043 --format json");
    ck_assert_int_eq(w.status, 0);
    ck_assert_ptr_nonnull(strstr(w.out, "\"T_eq_K\": null, \"T_eq_ideal_K\": null, \"dT_K\": "
                                        "null, \"dT_ideal_K\": null, \"note\": \"undefined: "
                                        "the analysis holds no H2O\"}"));
    free(w.out);
}
END_TEST

START_TEST(synthesis_gas_indicators_shown)
{
    run_result c = run("check cases/methanol_converter.yaml");
    ck_assert_ptr_nonnull(strstr(c.out, "\nfeed stoichiometric number SN = (H2 - CO2)/(CO + "
                                        "CO2) = 4.9925\nfeed carbon-oxide ratio CO2/(CO + "
                                        "CO2) = 0.2687\n"));
    free(c.out);
    run_result t = run("solve cases/methanol_converter.yaml");
    ck_assert_ptr_nonnull(strstr(t.out, "\nstoichiometric number SN = (H2 - CO2)/(CO + CO2):  "
                                        "feed 4.9925   equilibrium "));
    free(t.out);
    run_result j = run("solve cases/methanol_converter.yaml --format json");
    ck_assert_ptr_nonnull(strstr(j.out, "\"indicators\": [{\"name\": \"SN\", \"formula\": "
                                        "\"(H2 - CO2)/(CO + CO2)\", \"feed\": 4.992537313, "
                                        "\"real\": "));
    free(j.out);
    run_result a = run("solve cases/ammonia_converter.yaml --format json");
    ck_assert_ptr_nonnull(strstr(a.out, "\"indicators\": [{\"name\": \"H2/N2\", \"formula\": "
                                        "\"H2/N2\", \"feed\": 3, "));
    free(a.out);
    run_result k = run("check cases/ammonia_converter.yaml");
    ck_assert_ptr_nonnull(strstr(k.out, "\nfeed hydrogen-nitrogen ratio H2/N2 = 3.0000\n"));
    free(k.out);
}
END_TEST

START_TEST(per_command_help_and_one_line_usage_errors)
{
    /* kphi COMMAND --help: that command's options only */
    run_result h = run("solve --help");
    ck_assert_int_eq(h.status, 0);
    ck_assert(strncmp(h.out, "Usage: kphi solve CASE.yaml", 27) == 0);
    ck_assert_ptr_nonnull(strstr(h.out, "--approach-dT DT"));
    ck_assert_ptr_nonnull(strstr(h.out, "--intercool LIST"));
    ck_assert_ptr_nonnull(strstr(h.out, "not a design basis"));
    ck_assert_ptr_null(strstr(h.out, "--threads"));
    ck_assert_ptr_null(strstr(h.out, "--data"));
    free(h.out);
    h = run("sweep --help");
    ck_assert(strncmp(h.out, "Usage: kphi sweep CASE.yaml", 27) == 0);
    ck_assert_ptr_nonnull(strstr(h.out, "--threads N"));
    ck_assert_ptr_nonnull(strstr(h.out, "--eos MODEL")); /* in full, not "as for solve" */
    ck_assert_ptr_null(strstr(h.out, "--intercool"));
    free(h.out);
    h = run("species -h");
    ck_assert(strncmp(h.out, "Usage: kphi species", 19) == 0);
    ck_assert_ptr_nonnull(strstr(h.out, "--data FILE"));
    ck_assert_ptr_null(strstr(h.out, "--eos"));
    free(h.out);
    h = run("help check");
    ck_assert(strncmp(h.out, "Usage: kphi check FILE.yaml", 27) == 0);
    free(h.out);
    h = run("--help"); /* everything */
    ck_assert_ptr_nonnull(strstr(h.out, "Options of solve:"));
    ck_assert_ptr_nonnull(strstr(h.out, "Options of sweep:"));
    ck_assert_ptr_nonnull(strstr(h.out, "Options of species:"));
    free(h.out);
    /* a bad option: one line on stderr, nothing before it, exit 2 */
    const char *bad[] = {"solve --bogus cases/ammonia_converter.yaml",
                         "solve --approch NH3=0.1 cases/ammonia_converter.yaml",
                         "solve --a cases/ammonia_converter.yaml",
                         "sweep -x cases/ammonia_converter.yaml",
                         "species --bogus",
                         "species --data",
                         "check --bogus cases/ammonia_converter.yaml",
                         "solve cases/ammonia_converter.yaml --T"};
    const char *want[] = {"kphi: error: unknown option '--bogus' for 'solve'; see 'kphi solve "
                          "--help'\n",
                          "kphi: error: unknown option '--approch' for 'solve' (did you mean "
                          "'--approach'?); see 'kphi solve --help'\n",
                          "kphi: error: ambiguous option '--a': it could be --approach, "
                          "--adiabatic, --approach-dT; see 'kphi solve --help'\n",
                          "kphi: error: unknown option '-x' for 'sweep'; see 'kphi sweep "
                          "--help'\n",
                          "kphi: error: unknown option '--bogus' for 'species'; see 'kphi "
                          "species --help'\n",
                          "kphi: error: option '--data' needs a value; see 'kphi species "
                          "--help'\n",
                          "kphi: error: unknown option '--bogus' for 'check'; see 'kphi check "
                          "--help'\n",
                          "kphi: error: option '--T' needs a value; see 'kphi solve --help'\n"};
    for (size_t k = 0; k < sizeof bad / sizeof bad[0]; k++) {
        char *e = NULL;
        run_result r = run_err(bad[k], &e);
        ck_assert_int_eq(r.status, 2);
        ck_assert_uint_eq(r.len, 0);
        ck_assert_str_eq(e, want[k]);
        free(r.out);
        free(e);
    }
}
END_TEST

START_TEST(sweep_same_for_any_thread_count)
{
    run_result a = run("sweep cases/ammonia_converter.yaml --T 350:550:7C --P 50:400:35bar "
                       "--threads 1");
    run_result b = run("sweep cases/ammonia_converter.yaml --T 350:550:7C --P 50:400:35bar "
                       "--threads 2");
    run_result c = run("sweep cases/ammonia_converter.yaml --T 350:550:7C --P 50:400:35bar "
                       "--threads 3 --format csv");
    ck_assert_int_eq(a.status, 0);
    ck_assert_uint_eq(a.len, b.len);
    ck_assert(memcmp(a.out, b.out, a.len) == 0);
    ck_assert_uint_eq(a.len, c.len);
    ck_assert(memcmp(a.out, c.out, a.len) == 0);
    free(a.out);
    free(b.out);
    free(c.out);
}
END_TEST

START_TEST(sweep_json_lines)
{
    run_result r = run("sweep cases/ammonia_converter.yaml --T 400C,450C --P 150bar,250bar "
                       "--format json");
    ck_assert_int_eq(r.status, 0);
    ck_assert_uint_eq(count_char(r.out, r.len, '\n'), 4);
    for (const char *p = r.out; *p; p = strchr(p, '\n') + 1)
        ck_assert_msg(strncmp(p, "{\"T_K\": ", 8) == 0, "%.60s", p);
    free(r.out);
}
END_TEST

START_TEST(output_files_are_whole_or_absent)
{
    char dir[] = "/tmp/kphi-cli-XXXXXX";
    ck_assert_ptr_nonnull(mkdtemp(dir));
    char path[256], args[512];
    snprintf(path, sizeof path, "%s/out.csv", dir);
    /* a good run writes the file with the usual permissions and leaves nothing else */
    snprintf(args, sizeof args, "sweep cases/ammonia_converter.yaml -o %s", path);
    run_result r = run(args);
    ck_assert_int_eq(r.status, 0);
    free(r.out);
    struct stat st;
    ck_assert_int_eq(stat(path, &st), 0);
    ck_assert(st.st_size > 1000);
    off_t good = st.st_size;
    /* a run that fails on input leaves the earlier file as it was */
    snprintf(args, sizeof args, "sweep cases/ammonia_converter.yaml --T 550:350:10C -o %s",
             path);
    r = run(args);
    ck_assert_int_eq(r.status, 2);
    free(r.out);
    ck_assert_int_eq(stat(path, &st), 0);
    ck_assert(st.st_size == good);
    /* no temporary files anywhere in the directory */
    char ls[512];
    snprintf(ls, sizeof ls, "ls -A %s | grep -c tmp-", dir);
    FILE *p = popen(ls, "r");
    int n = -1;
    ck_assert_int_eq(fscanf(p, "%d", &n), 1);
    pclose(p);
    ck_assert_int_eq(n, 0);
    snprintf(ls, sizeof ls, "rm -rf %s", dir);
    ck_assert_int_eq(system(ls), 0);
}
END_TEST

START_TEST(exit_codes)
{
    run_result r = run("--version");
    ck_assert_int_eq(r.status, 0);
    ck_assert_ptr_nonnull(strstr(r.out, "kphi "));
    free(r.out);
    r = run("--help");
    ck_assert_int_eq(r.status, 0);
    ck_assert_ptr_nonnull(strstr(r.out, "not a design basis"));
    free(r.out);
    r = run("solve");
    ck_assert_int_eq(r.status, 2);
    free(r.out);
    /* the virial series refuses this density: the calculation fails, exit 1 */
    r = run("solve cases/ammonia_converter.yaml --eos virial --P 900bar --T 350C");
    ck_assert_int_eq(r.status, 1);
    ck_assert_uint_eq(r.len, 0);
    free(r.out);
    r = run("check cases/methanol_converter.yaml");
    ck_assert_int_eq(r.status, 0);
    ck_assert_ptr_nonnull(strstr(r.out, "CO + 2 H2 = CH3OH"));
    free(r.out);
    /* a plot name kphi cannot write is refused before any row is written */
    r = run("sweep cases/ammonia_converter.yaml --plot /tmp/kphi-never.bmp");
    ck_assert_int_eq(r.status, 2);
    ck_assert_uint_eq(r.len, 0);
    free(r.out);
}
END_TEST

/* Run "kphi ARGS" capturing stderr only (stdout to /dev/null). */
static run_result run_stderr(const char *args)
{
    char cmd[2048];
    snprintf(cmd, sizeof cmd, "%s %s 2>&1 >/dev/null", kphi_bin(), args);
    FILE *p = popen(cmd, "r");
    ck_assert_ptr_nonnull(p);
    run_result r = {NULL, 0, -1};
    r.out = malloc(1 << 16);
    ck_assert_ptr_nonnull(r.out);
    r.len = fread(r.out, 1, (1 << 16) - 1, p);
    r.out[r.len] = '\0';
    int st = pclose(p);
    r.status = WIFEXITED(st) ? WEXITSTATUS(st) : -1;
    return r;
}

START_TEST(solve_K_all_equals_single_basis_runs)
{
    /* --K all prints, for every basis, the very object a run with that basis prints */
    const char *bases[] = {"tables", "graaf1986", "graaf2016"};
    run_result all = run("solve cases/methanol_converter.yaml --K all --format json");
    ck_assert_int_eq(all.status, 0);
    ck_assert(all.out[0] == '[');
    for (size_t b = 0; b < 3; b++) {
        char args[256];
        snprintf(args, sizeof args, "solve cases/methanol_converter.yaml --K %s --format json",
                 bases[b]);
        run_result one = run(args);
        ck_assert_int_eq(one.status, 0);
        ck_assert(one.len > 100 && one.out[one.len - 1] == '\n');
        one.out[one.len - 1] = '\0';
        ck_assert_msg(strstr(all.out, one.out) != NULL, "--K %s differs from --K all", bases[b]);
        char key[64];
        snprintf(key, sizeof key, "\"K_basis\": \"%s\"", bases[b]);
        ck_assert_msg(strstr(one.out, key) != NULL, "no %s in %s", key, one.out);
        free(one.out);
    }
    free(all.out);
    /* the table: one row per basis and the spread; the tables row is the default answer */
    run_result t = run("solve cases/methanol_converter.yaml --K all");
    ck_assert_int_eq(t.status, 0);
    ck_assert_ptr_nonnull(strstr(t.out, "\ngraaf1986 "));
    ck_assert_ptr_nonnull(strstr(t.out, "\ngraaf2016 "));
    ck_assert_ptr_nonnull(strstr(t.out, "spread of the real-gas conversion over the K bases: "));
    run_result d = run("solve cases/methanol_converter.yaml");
    const char *x = strstr(d.out, "real gas ");
    ck_assert_ptr_nonnull(x);
    char row[64];
    snprintf(row, sizeof row, "\ntables            %.6s", x + 9);
    ck_assert_msg(strstr(t.out, row) != NULL, "no '%s' in\n%s", row + 1, t.out);
    ck_assert_ptr_nonnull(strstr(d.out, "K: tables (the species' polynomials); the set also "
                                        "offers graaf1986, graaf2016"));
    free(t.out);
    free(d.out);
    /* CSV: a leading K_basis column, one row per basis */
    run_result c = run("solve cases/ammonia_converter.yaml --K all --format csv");
    ck_assert_int_eq(c.status, 0);
    ck_assert(strncmp(c.out, "K_basis,T_K,P_bar,X_real,", 25) == 0);
    ck_assert_ptr_nonnull(strstr(c.out, "\ntables,723.15,195,"));
    ck_assert_ptr_nonnull(strstr(c.out, "\ngillespie1930,723.15,195,"));
    free(c.out);
}
END_TEST

START_TEST(solve_K_reports_basis_heat_and_warnings)
{
    run_result r = run("solve cases/methanol_converter.yaml --K graaf1986 --format json");
    ck_assert_int_eq(r.status, 0);
    const char *keys[] = {"\"K_basis\": \"graaf1986\"", "\"K_source\": \"Graaf, Sijtsema",
                          "\"K_range_K\": [473.15, 543.15]", "\"K_extrapolated\": false",
                          "\"dH_vant_Hoff_kJ_mol\": ", "\"dH_polynomials_kJ_mol\": ",
                          "\"dH_difference_kJ_mol\": ", "\"warnings\": []"};
    for (size_t k = 0; k < sizeof keys / sizeof keys[0]; k++)
        ck_assert_msg(strstr(r.out, keys[k]) != NULL, "missing %s in %s", keys[k], r.out);
    free(r.out);
    /* the table says where K came from and compares the heats once */
    r = run("solve cases/methanol_converter.yaml --K graaf1986");
    ck_assert_ptr_nonnull(strstr(r.out, "K of reaction 1: graaf1986, Graaf, Sijtsema"));
    ck_assert_ptr_nonnull(strstr(r.out, "K of reaction 2: graaf1986, "));
    ck_assert_ptr_nonnull(strstr(r.out, "heat of reaction at 523.15 K, van 't Hoff of the K "
                                        "correlation vs the polynomials'"));
    /* log10 K = 5139/T - 12.621: dH = -R ln 10 5139 J/mol = -98.38 kJ/mol at any T */
    ck_assert_ptr_nonnull(strstr(r.out, "\n  1: -98.38 vs "));
    free(r.out);
    /* outside the range: the answer is given, with a warning on stderr and in JSON */
    r = run("solve cases/methanol_converter.yaml --K graaf1986 --T 300C --format json");
    ck_assert_int_eq(r.status, 0);
    ck_assert_ptr_nonnull(strstr(r.out, "\"K_extrapolated\": true"));
    ck_assert_ptr_nonnull(strstr(r.out, "\"warnings\": [\"K of reaction 1 (graaf1986) "
                                        "extrapolated: T = 573.15 K is outside its validity "
                                        "range 473.15-543.15 K\", \"K of reaction 2"));
    free(r.out);
    /* a table on standard output carries the warnings itself; other formats on stderr */
    r = run("solve cases/methanol_converter.yaml --K graaf1986 --T 300C");
    ck_assert_ptr_nonnull(strstr(r.out, "\nwarning: K of reaction 1 (graaf1986) extrapolated: T "
                                        "= 573.15 K is outside its validity range "
                                        "473.15-543.15 K\n"));
    ck_assert_ptr_nonnull(strstr(r.out, "K of reaction 1: graaf1986, Graaf, Sijtsema, Stamhuis & "
                                        "Joosten (1986), Chem. Eng. Sci. 41, 2883, eq. 11; valid "
                                        "473.15-543.15 K (EXTRAPOLATED here)\n"));
    free(r.out);
    r = run_stderr("solve cases/methanol_converter.yaml --K graaf1986 --T 300C --format json");
    ck_assert_int_eq(r.status, 0);
    ck_assert_str_eq(r.out, "cases/methanol_converter.yaml: warning: K of reaction 1 (graaf1986) "
                            "extrapolated: T = 573.15 K is outside its validity range "
                            "473.15-543.15 K\n"
                            "cases/methanol_converter.yaml: warning: K of reaction 2 (graaf1986) "
                            "extrapolated: T = 573.15 K is outside its validity range "
                            "473.15-543.15 K\n");
    free(r.out);
    /* an adiabatic outlet outside the range is warned about too */
    r = run_stderr("solve cases/ammonia_converter.yaml --K gillespie1930 --T 300C --adiabatic "
                   "--format json");
    ck_assert_int_eq(r.status, 0);
    ck_assert_ptr_nonnull(strstr(r.out, "T = 573.15 K is outside"));
    free(r.out);
    /* a bed inlet inside the range whose outlet is above it: only the outlets are warned */
    r = run_stderr("solve cases/methanol_converter.yaml --K graaf1986 --T 240C --adiabatic "
                   "--format csv");
    ck_assert_int_eq(r.status, 0);
    ck_assert_ptr_nonnull(strstr(r.out, "cases/methanol_converter.yaml: warning: K of reaction 1 "
                                        "(graaf1986) extrapolated at an adiabatic bed outlet "
                                        "(real gas): T = "));
    ck_assert_ptr_null(strstr(r.out, "approach"));
    ck_assert_uint_eq(count_char(r.out, r.len, '\n'), 4); /* 2 reactions x 2 outlets */
    free(r.out);
    /* in range: silent */
    r = run_stderr("solve cases/methanol_converter.yaml --K graaf1986 --format json");
    ck_assert_int_eq(r.status, 0);
    ck_assert_str_eq(r.out, "");
    free(r.out);
}
END_TEST

START_TEST(sweep_and_check_with_K)
{
    run_result r = run("sweep cases/methanol_converter.yaml --K graaf1986 --T 200C,290C "
                       "--P 80bar");
    ck_assert_int_eq(r.status, 0);
    /* 473.15 K in range; 563.15 K extrapolated, said in the message column */
    ck_assert_ptr_nonnull(strstr(r.out, ",ok,,"));
    ck_assert_ptr_nonnull(strstr(r.out, ",ok,K_1 extrapolated; K_2 extrapolated,"));
    run_result t = run("sweep cases/methanol_converter.yaml --T 200C,290C --P 80bar");
    ck_assert(strcmp(r.out, t.out) != 0);
    free(t.out);
    free(r.out);
    r = run_stderr("sweep cases/methanol_converter.yaml --K graaf1986 --T 200C,290C --P 80bar");
    ck_assert_ptr_nonnull(strstr(r.out, "warning: K of reaction 1 (graaf1986) extrapolated at 1 "
                                        "of 2 points"));
    free(r.out);
    /* the loop's converter on a K basis: said in the table and JSON, and a different answer */
    r = run("loop cases/methanol_loop.yaml --K graaf1986 --format json");
    ck_assert_int_eq(r.status, 0);
    ck_assert_ptr_nonnull(strstr(r.out, "\"K_basis\": \"graaf1986\""));
    t = run("loop cases/methanol_loop.yaml --format json");
    ck_assert_int_eq(t.status, 0);
    ck_assert_ptr_nonnull(strstr(t.out, "\"K_basis\": \"tables\""));
    const char *xa = strstr(r.out, "\"per_pass_conversion\": "), *xb = strstr(t.out,
                                                                         "\"per_pass_conversion\": ");
    ck_assert(xa != NULL && xb != NULL && atof(xa + 23) < atof(xb + 23));
    free(t.out);
    free(r.out);
    r = run("loop cases/methanol_loop.yaml --K graaf1986");
    ck_assert_ptr_nonnull(strstr(r.out, "\nconverter K: graaf1986 (a published correlation"));
    free(r.out);
    r = run("check reactions/methanol.yaml");
    ck_assert_int_eq(r.status, 0);
    ck_assert_ptr_nonnull(strstr(r.out, "K graaf1986: log10 K = 5139/T - 12.621\n"));
    ck_assert_ptr_nonnull(strstr(r.out, "K graaf1986: log10 K = -2073/T + 2.029\n"));
    ck_assert_ptr_nonnull(strstr(r.out, "per the equation, P_standard 1 bar, valid 473.15-543.15 K"));
    ck_assert_ptr_nonnull(strstr(r.out, "K bases: tables, graaf1986, graaf2016"));
    free(r.out);
    r = run("check reactions/ammonia.yaml");
    ck_assert_ptr_nonnull(strstr(r.out, "per mol NH3, P_standard 1 atm, valid 598.15-1225.15 K"));
    free(r.out);
}
END_TEST

static Suite *cli_suite(void)
{
    Suite *s = suite_create("cli");
    TCase *tc = tcase_create("end to end");
    tcase_set_timeout(tc, 120);
    tcase_add_test(tc, solve_json_has_the_contract_keys);
    tcase_add_test(tc, sweep_csv_columns_and_grid);
    tcase_add_test(tc, sweep_adiabatic_columns);
    tcase_add_test(tc, solve_intercooled_beds);
    tcase_add_test(tc, intercool_that_heats_says_so_and_warns);
    tcase_add_test(tc, equivalent_pressure_in_every_format);
    tcase_add_test(tc, table_keeps_small_values);
    tcase_add_test(tc, case_name_and_kij_everywhere);
    tcase_add_test(tc, approach_dT_is_the_equilibrium_at_T_plus_dT);
    tcase_add_test(tc, approach_per_reaction_from_an_analysis);
    tcase_add_test(tc, synthesis_gas_indicators_shown);
    tcase_add_test(tc, per_command_help_and_one_line_usage_errors);
    tcase_add_test(tc, sweep_same_for_any_thread_count);
    tcase_add_test(tc, sweep_json_lines);
    tcase_add_test(tc, output_files_are_whole_or_absent);
    tcase_add_test(tc, exit_codes);
    tcase_add_test(tc, solve_K_all_equals_single_basis_runs);
    tcase_add_test(tc, solve_K_reports_basis_heat_and_warnings);
    tcase_add_test(tc, sweep_and_check_with_K);
    suite_add_tcase(s, tc);
    TCase *odd = tcase_create("odd feeds");
    tcase_set_timeout(odd, 900);
    tcase_add_test(odd, no_nan_or_inf_in_any_output);
    suite_add_tcase(s, odd);
    return s;
}

KPHI_TEST_MAIN(cli_suite)
