/* The gwdivide command: sub-commands and shared helpers.  Only this folder
 * prints; everything below returns error values. */
#ifndef GW_CLI_H
#define GW_CLI_H

#include <stdio.h>

#include "../../io/results.h"

/* Exit status (DESIGN.md). */
enum { GW_EXIT_OK = 0, GW_EXIT_REJECTED = 1, GW_EXIT_USAGE = 2 };

typedef struct {
    const char *model_path;
    const char *out_dir;        /* NULL: "<model dir>/<model name>-results" */
    const char *export_prefix;  /* NULL: no matrix export */
    int quiet;
} gw_run_args;

int gw_cmd_run(const gw_run_args *a);
int gw_cmd_check(const char *model_path);

/* Default output directory for a model path (malloc'ed). */
char *gw_default_out_dir(const char *model_path);

/* Terminal summary of a finished run; out_dir is where the files went. */
void gw_print_summary(FILE *f, const gw_results *r, const char *out_dir);

/* Wall-clock seconds (monotonic). */
double gw_now(void);

#endif
