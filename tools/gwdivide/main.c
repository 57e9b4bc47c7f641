/* gwdivide: command-line entry point.  Parses the arguments and hands over
 * to run.c / check.c / sweep.c. */
#include <stdio.h>
#include <string.h>

#include "cli.h"

static const char *usage_text =
    "Usage:\n"
    "  gwdivide run MODEL.yaml [--out DIR] [--export-matrix PREFIX] [--quiet]\n"
    "  gwdivide check MODEL.yaml\n"
    "  gwdivide sweep MODEL.yaml --vary KEY=FROM:TO:N [--vary ...] [--zip] [--out DIR] [--quiet]\n"
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
    "  sweep MODEL.yaml   solve the model again for a range of values of some of\n"
    "                     its numbers; report how budgets and divides move\n"
    "\n"
    "Options of run:\n"
    "  --out DIR               results folder (default: MODEL-results beside the\n"
    "                          model file); created when missing\n"
    "  --export-matrix PREFIX  also write the factorized linear system as\n"
    "                          PREFIX.mtx, PREFIX.rhs.mtx and PREFIX.cells.txt\n"
    "  --quiet                 print nothing but errors\n"
    "\n"
    "Options of sweep:\n"
    "  --vary KEY=FROM:TO:N    N evenly spaced values from FROM to TO (or\n"
    "                          KEY=V1,V2,...) for the number at KEY, the dotted\n"
    "                          path in the model file; list items by name or by\n"
    "                          position from 0: recharge.rate,\n"
    "                          aquifer.conductivity, streams[East Creek].stage\n"
    "                          (every vertex; stage[1] for one),\n"
    "                          wells[Supply well 1].pumping,\n"
    "                          recharge.zones[orchard].rate.  Repeatable: every\n"
    "                          combination of the values is run\n"
    "  --zip                   pair the values of the --vary options in order\n"
    "                          instead (all need the same count)\n"
    "  --out DIR               results folder (default: MODEL-sweep beside the\n"
    "                          model file): sweep.csv, sweep_divides.json\n"
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

/* The model file (one only); anything else starting with '-' is an unknown
 * option.  Returns 0 when taken, else the usage exit status. */
static int take_model(const char *arg, const char **model)
{
    if (arg[0] == '-' && arg[1] != 0) return usage_error("unknown option %s", arg);
    if (*model) return usage_error("one model file at a time (extra argument %s)", arg);
    *model = arg;
    return 0;
}

/* Arguments shared by the solving commands (run, sweep): --out DIR,
 * --quiet / -q and the model file.  Returns 0 when argv[*i] was taken,
 * else the usage exit status. */
static int take_common(int argc, char **argv, int *i, const char **out_dir, int *quiet, const char **model)
{
    const char *v = NULL;
    if (take_value(argc, argv, i, "--out", &v)) {
        if (!v || !*v) return usage_error("%s needs a directory", "--out");
        *out_dir = v;
        return 0;
    }
    if (!strcmp(argv[*i], "--quiet") || !strcmp(argv[*i], "-q")) {
        *quiet = 1;
        return 0;
    }
    return take_model(argv[*i], model);
}

static int main_run(int argc, char **argv)
{
    gw_run_args a = {0};
    for (int i = 2; i < argc; i++) {
        const char *v = NULL;
        if (take_value(argc, argv, &i, "--export-matrix", &v)) {
            if (!v || !*v) return usage_error("%s needs a file-name prefix", "--export-matrix");
            a.export_prefix = v;
        } else {
            int rc = take_common(argc, argv, &i, &a.out_dir, &a.quiet, &a.model_path);
            if (rc) return rc;
        }
    }
    if (!a.model_path) return usage_error("%s needs a model file", "run");
    return gw_cmd_run(&a);
}

static int main_check(int argc, char **argv)
{
    const char *model = NULL;
    for (int i = 2; i < argc; i++) {
        int rc = take_model(argv[i], &model);
        if (rc) return rc;
    }
    if (!model) return usage_error("%s needs a model file", "check");
    return gw_cmd_check(model);
}

static int main_sweep(int argc, char **argv)
{
    gw_sweep_args a = {0};
    const char *vary[64];
    for (int i = 2; i < argc; i++) {
        const char *v = NULL;
        if (take_value(argc, argv, &i, "--vary", &v)) {
            if (!v || !*v) return usage_error("%s needs KEY=FROM:TO:N", "--vary");
            if (a.nvary == (int)(sizeof vary / sizeof vary[0])) return usage_error("too many %s options", "--vary");
            vary[a.nvary++] = v;
        } else if (!strcmp(argv[i], "--zip")) {
            a.zip = 1;
        } else {
            int rc = take_common(argc, argv, &i, &a.out_dir, &a.quiet, &a.model_path);
            if (rc) return rc;
        }
    }
    if (!a.model_path) return usage_error("%s needs a model file", "sweep");
    if (a.nvary == 0) return usage_error("%s needs at least one --vary KEY=FROM:TO:N", "sweep");
    a.vary = vary;
    return gw_cmd_sweep(&a);
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
    if (!strcmp(cmd, "sweep")) return main_sweep(argc, argv);
    return usage_error("unknown command %s", cmd);
}
