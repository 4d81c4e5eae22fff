/* kphi command-line program: the help text and the caution it carries. */
#include <stdio.h>

#include "cli.h"

static const char CAUTION[] =
    "Caution: kphi computes equilibrium limits for screening, not a design basis. The gases\n"
    "involved are toxic, flammable and at high pressure: pressure equipment follows local\n"
    "codes and licensed engineering practice.\n";

void kphi_cli_help(FILE *f)
{
    fprintf(f,
            "Usage: kphi COMMAND [OPTION]... FILE\n"
            "Chemical equilibrium of high-pressure gas reactions by Gibbs-energy minimisation,\n"
            "with equation-of-state fugacity coefficients; every answer is given for the real\n"
            "gas and the ideal gas side by side.\n"
            "\n"
            "Commands:\n"
            "  solve CASE.yaml    equilibrium at one T and P\n"
            "  sweep CASE.yaml    equilibrium over a grid of T and P (CSV, JSON lines, plot)\n"
            "  check FILE.yaml    validate a case or reaction set and print what it defines\n"
            "  species [NAME]     list the species data and where each value comes from\n"
            "\n"
            "Options of solve:\n"
            "  --T TEMP           temperature, e.g. 450C, 723.15K, 842F\n"
            "  --P PRES           pressure, e.g. 200bar, 300atm, 20MPa, 3000psia, 190barg\n"
            "  --eos MODEL        pr (default), srk, rk, virial, ideal, or all to compare\n"
            "  --feed LIST        feed amounts, e.g. N2=1,H2=3,Ar=0.05 (replaces the case's)\n"
            "  --quantum          effective critical constants for H2 and He (Prausnitz)\n"
            "  --format FMT       table (default), csv or json\n"
            "  -o, --output FILE  write to FILE instead of standard output\n"
            "  --approach SP=Y    approach to equilibrium of a measured outlet: the case's T\n"
            "                     is the outlet temperature, Y the measured mole fraction of\n"
            "                     species SP (e.g. NH3=0.165); reports the temperature at\n"
            "                     which Y is the equilibrium, and T_eq - T\n"
            "  --adiabatic        adiabatic equilibrium outlet of a bed: the case's T is the\n"
            "                     inlet temperature; reports the outlet T, y and conversion\n"
            "  --intercool LIST   further adiabatic beds after the first, the gas cooled to\n"
            "                     each listed inlet temperature (e.g. 400C,410C); implies\n"
            "                     --adiabatic\n"
            "  --plot FILE        also draw the equilibrium curve at the case's P (.svg,\n"
            "                     .png or .pdf), with the path of the beds when\n"
            "                     --adiabatic or --intercool is given\n"
            "Options of sweep:\n"
            "  --T RANGE          e.g. 350:550:10C (from:to:step) or 400C,450C,500C\n"
            "  --P RANGE          e.g. 50:400:25bar or 100bar,200bar\n"
            "  --eos, --feed, --quantum as for solve\n"
            "  --format FMT       csv (default) or json (one object per line)\n"
            "  -o, --output FILE  write to FILE instead of standard output\n"
            "  --plot FILE        also draw a chart (.svg, .png or .pdf)\n"
            "  --plot-kind KIND   conversion-p, conversion-t, kphi-p, curve or\n"
            "                     adiabatic (the default with --adiabatic)\n"
            "  --threads N        threads for the sweep (default: all cores)\n"
            "  --force            allow grids over 1e8 points\n"
            "  --adiabatic        read each T as a bed inlet temperature and add the\n"
            "                     adiabatic equilibrium outlet (T, conversion, y) to\n"
            "                     every row\n"
            "Options of species:\n"
            "  --data FILE        species database (default: reactions/species.yaml, then\n"
            "                     $KPHI_DATA/reactions/species.yaml, then the installed one)\n"
            "\n"
            "  -h, --help         show this help and exit\n"
            "  -V, --version      show the version and exit\n"
            "\n"
            "Exit status: 0 success, 1 the calculation failed, 2 bad input or usage.\n"
            "\n%s",
            CAUTION);
}
