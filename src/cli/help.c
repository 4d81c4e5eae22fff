/* kphi command-line program: the help text and the caution it carries. `kphi --help`
 * shows every command; `kphi COMMAND --help` that command's usage and options only. Both
 * are put together from the pieces below. */
#include <stdio.h>
#include <string.h>

#include "cli.h"

static const char CAUTION[] =
    "Caution: kphi computes equilibrium limits for screening, not a design basis. The gases\n"
    "involved are toxic, flammable and at high pressure: pressure equipment follows local\n"
    "codes and licensed engineering practice.\n";

static const char INTRO[] =
    "Chemical equilibrium of high-pressure gas reactions by Gibbs-energy minimisation,\n"
    "with equation-of-state fugacity coefficients; every answer is given for the real\n"
    "gas and the ideal gas side by side.\n";

static const char COMMANDS[] =
    "Commands:\n"
    "  solve CASE.yaml    equilibrium at one T and P\n"
    "  sweep CASE.yaml    equilibrium over a grid of T and P (CSV, JSON lines, plot)\n"
    "  flash CASE.yaml    the case's feed split into phases at T and P, without\n"
    "                     reaction, with its dew and bubble points\n"
    "  loop CASE.yaml     the synthesis loop of the case's loop block at steady state\n"
    "  check FILE.yaml    validate a case or reaction set and print what it defines\n"
    "  species [NAME]     list the species data and where each value comes from\n";

/* Options a case-driven command shares. */
static const char CASE_OPTIONS[] =
    "  --eos MODEL        pr (default), srk, rk, virial, bb, bbv, ideal%s\n"
    "  --feed LIST        feed amounts, e.g. N2=1,H2=3,Ar=0.05 (replaces the case's)\n"
    "  --quantum          effective critical constants for H2 and He (Prausnitz)\n"
    "  --K BASIS          where K comes from: tables (default, the species'\n"
    "                     polynomials), a correlation the reaction set carries\n"
    "                     (kphi check SET lists them)%s\n";

/* --phases of solve and sweep. */
static const char PHASES_OPTION[] =
    "  --phases MODE      auto (default): two phases where the stability test finds the\n"
    "                     gas would condense; gas: the gas answer only, tested and\n"
    "                     warned about\n";

static const char SOLVE_OPTIONS[] =
    "  --format FMT       table (default), csv or json\n"
    "  -o, --output FILE  write to FILE instead of standard output\n"
    "  --approach SP=Y    approach to equilibrium of a measured outlet: the case's T\n"
    "                     is the outlet temperature, Y the measured mole fraction of\n"
    "                     species SP (e.g. NH3=0.165); reports the temperature at\n"
    "                     which Y is the equilibrium, and T_eq - T; given a whole\n"
    "                     analysis (CO=0.03,CO2=0.035,H2=0.64,...) the approach of\n"
    "                     each reaction: where its K equals the analysis' Q\n"
    "  --approach-dT DT   an outlet DT from equilibrium (e.g. 10K): its composition\n"
    "                     is the equilibrium at T + DT\n"
    "  --adiabatic        adiabatic equilibrium outlet of a bed: the case's T is the\n"
    "                     inlet temperature; reports the outlet T, y and conversion\n"
    "  --intercool LIST   further adiabatic beds after the first, the gas cooled to\n"
    "                     each listed inlet temperature (e.g. 400C,410C); implies\n"
    "                     --adiabatic\n"
    "  --plot FILE        also draw the equilibrium curve at the case's P (.svg,\n"
    "                     .png or .pdf), with the path of the beds when\n"
    "                     --adiabatic or --intercool is given\n"
    "  --plot-ideal no    leave the ideal-gas lines out of the chart (default yes)\n";

static const char SWEEP_OPTIONS[] =
    "  --format FMT       csv (default) or json (one object per line)\n"
    "  -o, --output FILE  write to FILE instead of standard output\n"
    "  --plot FILE        also draw a chart (.svg, .png or .pdf)\n"
    "  --plot-kind KIND   conversion-p, conversion-t, kphi-p, curve or\n"
    "                     adiabatic (the default with --adiabatic); loop with\n"
    "                     --loop, separator with --flash\n"
    "  --plot-ideal no    leave the ideal-gas lines out of the chart (default yes)\n"
    "  --threads N        threads for the sweep (default: all cores)\n"
    "  --force            allow grids over 1e8 points\n"
    "  --approach-dT DT   each T an outlet DT from equilibrium (e.g. 10K): its\n"
    "                     composition is the equilibrium at T + DT\n"
    "  --adiabatic        read each T as a bed inlet temperature and add the\n"
    "                     adiabatic equilibrium outlet (T, conversion, y) to\n"
    "                     every row\n"
    "  --loop             the case's loop block over converter T x loop P: the rows\n"
    "                     of kphi loop for the real- and the ideal-gas converter;\n"
    "                     --purge 2% (or inerts=12%) applies to every point\n"
    "  --flash            the case's feed flashed over T x P: the rows of kphi flash\n";

static const char FLASH_OPTIONS[] =
    "  --T TEMP           temperature, e.g. -5C\n"
    "  --P PRES           pressure, e.g. 190bar\n"
    "  --eos MODEL        pr (default), srk or rk (a cubic)\n"
    "  --feed LIST        the mixture, e.g. NH3=20,H2=58,N2=19 (replaces the case's)\n"
    "  --quantum          effective critical constants for H2 and He (Prausnitz)\n"
    "  --format FMT       table (default), csv or json\n"
    "  -o, --output FILE  write to FILE instead of standard output\n"
    "  --dew-point        only the dew and bubble points at P\n";

static const char LOOP_OPTIONS[] =
    "  --T TEMP           converter outlet T (or the first bed's inlet T)\n"
    "  --P PRES           loop pressure\n"
    "  --eos MODEL        the converter's model (the separator's too if a cubic, else pr)\n"
    "  --purge SPEC       purge fraction, e.g. 2%, or an inert target, inerts=12%\n"
    "  --K BASIS          where K comes from (as for solve; one basis)\n"
    "  --quantum          effective critical constants for H2 and He (Prausnitz)\n"
    "  --format FMT       table (default), csv or json\n"
    "  -o, --output FILE  write to FILE instead of standard output\n"
    "  --plot FILE        also draw the loop diagram (.svg, .png or .pdf): the\n"
    "                     units, the numbered streams and their flow, T, P and product\n";

static const char SPECIES_OPTIONS[] =
    "  --data FILE        species database (default: reactions/species.yaml, then\n"
    "                     $KPHI_DATA/reactions/species.yaml, then the installed one)\n";

static const char EXIT_STATUS[] =
    "Exit status: 0 success, 1 the calculation failed, 2 bad input or usage.\n";

static void solve_options(FILE *f)
{
    fputs("  --T TEMP           temperature, e.g. 450C, 723.15K, 842F\n"
          "  --P PRES           pressure, e.g. 200bar, 300atm, 20MPa, 3000psia, 190barg\n",
          f);
    fprintf(f, CASE_OPTIONS, ", or all to compare", ", or all to compare");
    fputs(PHASES_OPTION, f);
    fputs(SOLVE_OPTIONS, f);
}

static void sweep_options(FILE *f)
{
    fputs("  --T RANGE          e.g. 350:550:10C (from:to:step) or 400C,450C,500C\n"
          "  --P RANGE          e.g. 50:400:25bar or 100bar,200bar\n",
          f);
    fprintf(f, CASE_OPTIONS, "", ", one at a time");
    fputs(PHASES_OPTION, f);
    fputs(SWEEP_OPTIONS, f);
}

void kphi_cli_help(FILE *f)
{
    fprintf(f, "Usage: kphi COMMAND [OPTION]... FILE\n%s\n%s\n", INTRO, COMMANDS);
    fputs("Options of solve:\n", f);
    solve_options(f);
    fputs("Options of sweep:\n", f);
    sweep_options(f);
    fprintf(f, "Options of flash:\n%s", FLASH_OPTIONS);
    fprintf(f, "Options of loop:\n%s", LOOP_OPTIONS);
    fprintf(f, "Options of species:\n%s\n", SPECIES_OPTIONS);
    fputs("  -h, --help         show this help and exit (COMMAND --help: that command's)\n"
          "  -V, --version      show the version and exit\n\n",
          f);
    fprintf(f, "%s\n%s", EXIT_STATUS, CAUTION);
}

int kphi_cli_help_command(FILE *f, const char *cmd)
{
    if (strcmp(cmd, "solve") == 0) {
        fputs("Usage: kphi solve CASE.yaml [OPTION]...\n"
              "Equilibrium at the case's T and P, real gas and ideal gas side by side.\n\n"
              "Options:\n",
              f);
        solve_options(f);
    } else if (strcmp(cmd, "sweep") == 0) {
        fputs("Usage: kphi sweep CASE.yaml [OPTION]...\n"
              "Equilibrium over a grid of T and P (the case's sweep block, or --T and --P\n"
              "ranges), streamed as CSV or JSON lines, with an optional chart.\n\n"
              "Options:\n",
              f);
        sweep_options(f);
    } else if (strcmp(cmd, "flash") == 0) {
        fputs("Usage: kphi flash CASE.yaml [OPTION]...\n"
              "The case's feed split into phases at T and P without reaction (how much liquid\n"
              "drops out in a separator, what stays in the gas), with its dew and bubble\n"
              "points at P.\n\n"
              "Options:\n",
              f);
        fputs(FLASH_OPTIONS, f);
    } else if (strcmp(cmd, "loop") == 0) {
        fputs("Usage: kphi loop CASE.yaml [OPTION]...\n"
              "The synthesis loop of the case's loop block (make-up, converter, separator,\n"
              "purge, recycle) at steady state, for the real-gas and the ideal-gas\n"
              "converter (see cases/ammonia_loop.yaml).\n\n"
              "Options:\n",
              f);
        fputs(LOOP_OPTIONS, f);
    } else if (strcmp(cmd, "check") == 0) {
        fputs("Usage: kphi check FILE.yaml\n"
              "Validate a case, a reaction set or a species database and print what it\n"
              "defines (a case: T, P, model, k_ij in effect, feed and its indicators, the\n"
              "sweep grid and its reaction set).\n\n"
              "Options:\n",
              f);
    } else if (strcmp(cmd, "species") == 0) {
        fputs("Usage: kphi species [NAME] [OPTION]...\n"
              "The species data (all, or the one named) and the source of every value.\n\n"
              "Options:\n",
              f);
        fputs(SPECIES_OPTIONS, f);
    } else {
        return 2;
    }
    fprintf(f, "  -h, --help         show this help and exit\n\n%s\n%s", EXIT_STATUS, CAUTION);
    return 0;
}
