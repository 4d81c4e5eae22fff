/* kphi command-line program: shared declarations of its subcommands. */
#ifndef KPHI_CLI_H
#define KPHI_CLI_H

#include <stdio.h>

#include "kphi/error.h"

/* An output that is a temporary file renamed into place when complete, or stdout. */
typedef struct {
    FILE *f;
    char final[1024];
    char tmp[1100];
} kphi_cli_output;

int kphi_cli_output_open(kphi_cli_output *o, const char *path, kphi_error *err);
/* ok = 0 discards the temporary file. */
int kphi_cli_output_close(kphi_cli_output *o, int ok, kphi_error *err);

/* Print err as one line (fallback_path when it names no file); returns the exit code. */
int kphi_cli_report(const kphi_error *err, const char *fallback_path);
/* Prefix the message of a command-line error with the option it came from ("--P: ..."),
 * and point it at <command line>:1:1 when it has no position. Returns rc. */
int kphi_cli_option_error(int rc, const char *option, kphi_error *err);
/* Print "kphi: error: ..." plus a hint; returns 2. */
int kphi_cli_usage_error(const char *fmt, const char *arg);

void kphi_cli_help(FILE *f);
int kphi_cli_solve(int argc, char **argv);
int kphi_cli_sweep(int argc, char **argv);
int kphi_cli_check(int argc, char **argv);

#endif /* KPHI_CLI_H */
