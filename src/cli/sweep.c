/* kphi sweep: placeholder until the sweep module lands (issue 4). */
#include "cli.h"

int kphi_cli_sweep(int argc, char **argv)
{
    (void)argc;
    (void)argv;
    return kphi_cli_usage_error("%s", "'sweep' is not available in this build yet");
}
