/* kphi command-line program: where the species data are found.
 *
 * `kphi species` (without --data) and every reaction set that names no `species_file` and
 * has no species.yaml beside it use the first readable of:
 *   1. reactions/species.yaml in the current directory;
 *   2. $KPHI_DATA/reactions/species.yaml;
 *   3. ../share/kphi/reactions/species.yaml beside the program (an installed tree, wherever
 *      it was installed or moved to: the program's own path from /proc/self/exe);
 *   4. ../reactions/species.yaml beside the program (the program in the source tree,
 *      bin/kphi);
 *   5. PREFIX/share/kphi/reactions/species.yaml, the directory `make install` was built for
 *      (KPHI_DATADIR; the Makefile rebuilds this file when PREFIX changes). */
#include <limits.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "cli.h"

#ifndef KPHI_DATADIR
#define KPHI_DATADIR "/usr/local/share/kphi"
#endif

static int readable(const char *path)
{
    return access(path, R_OK) == 0;
}

int kphi_cli_species_file(char *buf, size_t n)
{
    if (n == 0)
        return 0;
    snprintf(buf, n, "reactions/species.yaml");
    if (readable(buf))
        return 1;
    const char *env = getenv("KPHI_DATA");
    if (env != NULL && env[0] != '\0') {
        snprintf(buf, n, "%s/reactions/species.yaml", env);
        if (readable(buf))
            return 1;
    }
    char exe[PATH_MAX];
    ssize_t len = readlink("/proc/self/exe", exe, sizeof exe - 1);
    if (len > 0) {
        exe[len] = '\0';
        char *slash = strrchr(exe, '/');
        if (slash != NULL) {
            *slash = '\0'; /* the program's directory */
            static const char *const rel[] = {"../share/kphi/reactions/species.yaml",
                                              "../reactions/species.yaml"};
            for (size_t k = 0; k < sizeof rel / sizeof rel[0]; k++) {
                int w = snprintf(buf, n, "%s/%s", exe, rel[k]);
                if (w > 0 && (size_t)w < n && readable(buf))
                    return 1;
            }
        }
    }
    snprintf(buf, n, "%s/reactions/species.yaml", KPHI_DATADIR);
    return readable(buf);
}

const char *kphi_cli_species_default(char *buf, size_t n)
{
    return kphi_cli_species_file(buf, n) ? buf : NULL;
}
