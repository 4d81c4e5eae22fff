/* kphi sweep --flash: placeholder until the flash grid lands. */
#include "cli.h"

int kphi_cli_sweep_flash(const char *path, const kphi_cli_sweep_args *a)
{
    (void)path;
    (void)a;
    return kphi_cli_refuse("--flash", "not yet available");
}
