/* kphi species: the species data and the source of every value. The database is the
 * --data file, else the one kphi_cli_species_file() finds (src/cli/datadir.c: the current
 * directory's reactions/, $KPHI_DATA, the installed copy beside the program, the source
 * tree, the PREFIX it was built for). */
#include <getopt.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "cli.h"
#include "kphi/kphi.h"

static int find_species_file(const char *given, char *buf, size_t n)
{
    if (given != NULL) {
        snprintf(buf, n, "%s", given);
        return 0;
    }
    kphi_cli_species_file(buf, n);
    return 0;
}

static void print_species(const kphi_species *sp)
{
    printf("%s", sp->name);
    printf("  (");
    for (size_t k = 0; k < sp->n_elements; k++)
        printf("%s%s%g", k ? " " : "", sp->element[k], sp->count[k]);
    printf(")%s\n", sp->phase == KPHI_PHASE_CONDENSED ? "  condensed, element reference only" : "");
    printf("  molar mass    %.5f g/mol (IUPAC standard atomic weights)\n", sp->molar_mass * 1e3);
    printf("  thermo        NASA 7-coefficient polynomials, %g-%g-%g K\n", sp->T_low, sp->T_mid,
           sp->T_high);
    printf("                dfH(298.15 K) = %.3f kJ/mol, S(298.15 K) = %.3f J/(mol K)\n",
           kphi_thermo_h(sp, KPHI_T_REF) / 1e3, kphi_thermo_s(sp, KPHI_T_REF));
    printf("                source: %s\n", sp->src_thermo != NULL ? sp->src_thermo : "");
    if (sp->src_dfH != NULL)
        printf("                dfH(298.15 K) chosen: %.3f kJ/mol (the polynomials give %.3f)\n"
               "                source of that choice: %s\n",
               kphi_thermo_h(sp, KPHI_T_REF) / 1e3,
               (kphi_thermo_h(sp, KPHI_T_REF) - sp->dfH_shift) / 1e3, sp->src_dfH);
    if (sp->has_critical) {
        printf("  critical      Tc = %.2f K, Pc = %.3f bar, omega = %.4f", sp->Tc, sp->Pc / 1e5,
               sp->omega);
        if (sp->Vc > 0.0)
            printf(", Vc = %.1f cm3/mol", sp->Vc * 1e6);
        if (sp->Zc > 0.0)
            printf(", Zc = %.3f", sp->Zc);
        if (sp->dipole > 0.0)
            printf(", dipole = %.2f D", sp->dipole);
        printf("\n                source: %s\n", sp->src_critical != NULL ? sp->src_critical : "");
    } else {
        printf("  critical      none (only the ideal-gas model can use this species)\n");
    }
    if (sp->has_quantum)
        printf("  quantum gas   Tc0 = %.2f K, Pc0 = %.2f bar, c1 = %.1f K, c2 = %.1f K\n"
               "                source: %s\n",
               sp->q_Tc0, sp->q_Pc0 / 1e5, sp->q_c1, sp->q_c2,
               sp->src_quantum != NULL ? sp->src_quantum : "");
    if (sp->has_bb)
        printf("  Beattie-Bridgeman  A0 = %.5g atm L2/mol2, a = %.5g, B0 = %.5g, b = %.5g L/mol, "
               "c = %.5g L K3/mol\n                source: %s\n",
               sp->bb_A0 / 0.101325, sp->bb_a * 1e3, sp->bb_B0 * 1e3, sp->bb_b * 1e3,
               sp->bb_c * 1e3, sp->src_bb != NULL ? sp->src_bb : "");
    if (sp->note != NULL && sp->note[0] != '\0')
        printf("  note          %s\n", sp->note);
}

int kphi_cli_species(int argc, char **argv)
{
    static const struct option opts[] = {{"data", required_argument, NULL, 'd'},
                                         {"help", no_argument, NULL, 'h'},
                                         {NULL, 0, NULL, 0}};
    const char *data = NULL;
    int c;
    optind = 1;
    opterr = 0;
    while ((c = getopt_long(argc, argv, ":h", opts, NULL)) != -1) {
        switch (c) {
        case 'd':
            data = optarg;
            break;
        case 'h':
            return kphi_cli_help_command(stdout, "species");
        case ':':
            return kphi_cli_bad_option("species", opts, argv, optind, 1);
        default:
            return kphi_cli_bad_option("species", opts, argv, optind, 0);
        }
    }
    if (argc - optind > 1)
        return kphi_cli_usage_error("species", "'species' takes at most one NAME, got '%s'",
                                    argv[optind + 1]);
    char path[1024];
    find_species_file(data, path, sizeof path);
    kphi_error err;
    kphi_error_clear(&err);
    kphi_species_db *db = kphi_species_db_load_file(path, &err);
    if (db == NULL)
        return kphi_cli_report(&err, path);
    int rc = 0;
    if (optind < argc) {
        const char *name = argv[optind];
        const kphi_species *sp = kphi_species_db_find(db, name);
        if (sp == NULL) {
            const char *near = kphi_species_db_suggest(db, name);
            if (near != NULL)
                fprintf(stderr, "%s: error: unknown species '%s' (did you mean '%s'?)\n", path,
                        name, near);
            else
                fprintf(stderr, "%s: error: unknown species '%s'; 'kphi species' lists them\n",
                        path, name);
            rc = 2;
        } else {
            print_species(sp);
        }
    } else {
        printf("%zu species in %s\n\n", kphi_species_db_count(db), path);
        for (size_t i = 0; i < kphi_species_db_count(db); i++) {
            print_species(kphi_species_db_get(db, i));
            putchar('\n');
        }
    }
    kphi_species_db_free(db);
    return rc;
}
