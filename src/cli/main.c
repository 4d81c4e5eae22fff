/* kphi command-line program: dispatch to solve, sweep, check and species.
 *
 * Exit codes: 0 success, 1 the calculation failed, 2 bad input or usage. Every error is
 * one line on stderr, "file:line:column: error: message". Output files are written to a
 * temporary file beside the target and renamed into place only when complete, so a failed
 * run never leaves a partial file and never spoils an earlier one (src/cli/common.c). The
 * subcommands are in solve.c (solve, check), sweep.c and species.c; what they share is in
 * common.c and the help text in help.c. */
#include <stdio.h>
#include <string.h>

#include <gsl/gsl_errno.h>

#include "cli.h"
#include "kphi/kphi.h"

#if defined(__SANITIZE_ADDRESS__)
/* Font caches that fontconfig (under PLplot's cairo devices) keeps for the life of the
 * process are not leaks of ours; LeakSanitizer reads this hook. */
const char *__lsan_default_suppressions(void);
const char *__lsan_default_suppressions(void)
{
    return "leak:libfontconfig.so\n";
}
#endif

int main(int argc, char **argv)
{
    gsl_set_error_handler_off();
    kphi_cli_watch_signals();
    if (argc < 2) {
        kphi_cli_help(stderr);
        return 2;
    }
    const char *cmd = argv[1];
    if (strcmp(cmd, "help") == 0 && argc > 2) { /* kphi help solve */
        if (kphi_cli_help_command(stdout, argv[2]) == 0)
            return 0;
        return kphi_cli_usage_error(NULL, "no help for '%s'; commands are solve, sweep, flash, "
                                          "loop, check and species",
                                    argv[2]);
    }
    if (strcmp(cmd, "--help") == 0 || strcmp(cmd, "-h") == 0 || strcmp(cmd, "help") == 0) {
        kphi_cli_help(stdout);
        return 0;
    }
    if (strcmp(cmd, "--version") == 0 || strcmp(cmd, "-V") == 0) {
        printf("kphi %s\n", kphi_version());
        printf("Chemical equilibrium of high-pressure gas reactions with fugacity corrections.\n");
        return 0;
    }
    if (strcmp(cmd, "solve") == 0)
        return kphi_cli_solve(argc - 1, argv + 1);
    if (strcmp(cmd, "sweep") == 0)
        return kphi_cli_sweep(argc - 1, argv + 1);
    if (strcmp(cmd, "loop") == 0)
        return kphi_cli_loop(argc - 1, argv + 1);
    if (strcmp(cmd, "flash") == 0)
        return kphi_cli_flash(argc - 1, argv + 1);
    if (strcmp(cmd, "check") == 0)
        return kphi_cli_check(argc - 1, argv + 1);
    if (strcmp(cmd, "species") == 0)
        return kphi_cli_species(argc - 1, argv + 1);
    static const char *const cmds[] = {"solve", "sweep", "flash", "loop", "check", "species"};
    size_t nc = sizeof cmds / sizeof cmds[0];
    const char *near = NULL;
    /* "did you mean" for a mistyped command */
    for (size_t i = 0; i < nc && near == NULL; i++)
        if (strncmp(cmd, cmds[i], 3) == 0)
            near = cmds[i];
    if (near != NULL) {
        fprintf(stderr, "kphi: error: unknown command '%s' (did you mean '%s'?)\n", cmd, near);
        return 2;
    }
    return kphi_cli_usage_error(NULL, "unknown command '%s'; expected solve, sweep, flash, loop, "
                                      "check or species",
                                cmd);
}
