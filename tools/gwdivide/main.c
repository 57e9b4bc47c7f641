/* gwdivide: command-line entry point.  Parses the arguments and hands over
 * to run.c / check.c. */
#include <stdio.h>
#include <string.h>

#include "cli.h"

static const char *usage_text =
    "Usage:\n"
    "  gwdivide run MODEL.yaml [--out DIR] [--export-matrix PREFIX] [--quiet]\n"
    "  gwdivide check MODEL.yaml\n"
    "  gwdivide --help | --version\n";

static const char *help_text =
    "\n"
    "gwdivide solves steady-state two-dimensional groundwater flow on a regular\n"
    "grid and reports groundwater divides, stream gains and losses, water budgets\n"
    "and well capture zones.  It is a screening and cross-checking tool.\n"
    "\n"
    "Commands:\n"
    "  run MODEL.yaml     solve the model and write the results\n"
    "  check MODEL.yaml   validate the model file without solving\n"
    "\n"
    "Options of run:\n"
    "  --out DIR               results folder (default: MODEL-results beside the\n"
    "                          model file); created when missing\n"
    "  --export-matrix PREFIX  also write the factorized linear system as\n"
    "                          PREFIX.mtx, PREFIX.rhs.mtx and PREFIX.cells.txt\n"
    "  --quiet                 print nothing but errors\n"
    "\n"
    "Results: report.json, budget.csv, heads.tif (and maps and GIS layers when\n"
    "enabled in the model file).  Exit status: 0 success, 1 model rejected\n"
    "(nothing written), 2 bad usage.  The model-file reference is in\n"
    "docs/model-format.md.\n";

static int usage_error(const char *fmt, const char *arg)
{
    fputs("gwdivide: ", stderr);
    fprintf(stderr, fmt, arg);
    fputs("\n", stderr);
    fputs(usage_text, stderr);
    return GW_EXIT_USAGE;
}

/* Option with a value, as "--opt VALUE" or "--opt=VALUE".  Returns 1 when
 * argv[*i] is this option (value in *val, NULL when missing). */
static int take_value(int argc, char **argv, int *i, const char *opt, const char **val)
{
    size_t n = strlen(opt);
    const char *a = argv[*i];
    if (strncmp(a, opt, n) != 0) return 0;
    if (a[n] == '=') { *val = a + n + 1; return 1; }
    if (a[n] != 0) return 0;
    *val = (*i + 1 < argc) ? argv[++*i] : NULL;
    return 1;
}

static int main_run(int argc, char **argv)
{
    gw_run_args a = {0};
    for (int i = 2; i < argc; i++) {
        const char *v = NULL;
        if (take_value(argc, argv, &i, "--out", &v)) {
            if (!v || !*v) return usage_error("%s needs a directory", "--out");
            a.out_dir = v;
        } else if (take_value(argc, argv, &i, "--export-matrix", &v)) {
            if (!v || !*v) return usage_error("%s needs a file-name prefix", "--export-matrix");
            a.export_prefix = v;
        } else if (!strcmp(argv[i], "--quiet") || !strcmp(argv[i], "-q")) {
            a.quiet = 1;
        } else if (argv[i][0] == '-' && argv[i][1] != 0) {
            return usage_error("unknown option %s", argv[i]);
        } else if (a.model_path) {
            return usage_error("one model file at a time (extra argument %s)", argv[i]);
        } else {
            a.model_path = argv[i];
        }
    }
    if (!a.model_path) return usage_error("%s needs a model file", "run");
    return gw_cmd_run(&a);
}

static int main_check(int argc, char **argv)
{
    const char *model = NULL;
    for (int i = 2; i < argc; i++) {
        if (argv[i][0] == '-' && argv[i][1] != 0) return usage_error("unknown option %s", argv[i]);
        if (model) return usage_error("one model file at a time (extra argument %s)", argv[i]);
        model = argv[i];
    }
    if (!model) return usage_error("%s needs a model file", "check");
    return gw_cmd_check(model);
}

int main(int argc, char **argv)
{
    if (argc < 2) return usage_error("%s", "missing command");
    const char *cmd = argv[1];
    if (!strcmp(cmd, "--help") || !strcmp(cmd, "-h") || !strcmp(cmd, "help")) {
        fputs(usage_text, stdout);
        fputs(help_text, stdout);
        return GW_EXIT_OK;
    }
    if (!strcmp(cmd, "--version")) {
        printf("gwdivide %s\n", GWDIVIDE_VERSION);
        return GW_EXIT_OK;
    }
    if (!strcmp(cmd, "run")) return main_run(argc, argv);
    if (!strcmp(cmd, "check")) return main_check(argc, argv);
    return usage_error("unknown command %s", cmd);
}
