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

/* `gwdivide sweep` (sweep.c). */
typedef struct {
    const char *model_path;
    const char *out_dir;        /* NULL: "<model dir>/<model name>-sweep" */
    const char **vary;          /* the --vary arguments, "KEY=FROM:TO:N" */
    int nvary;
    int zip;                    /* 1: pair values in order instead of every combination */
    int quiet;
} gw_sweep_args;

int gw_cmd_sweep(const gw_sweep_args *a);

/* Default output directory for a model path (malloc'ed). */
char *gw_default_out_dir(const char *model_path);

/* Terminal summary of a finished run; out_dir is where the files went. */
void gw_print_summary(FILE *f, const gw_results *r, const char *out_dir);

/* Capture and travel-time zones of the pumping wells into r->capture, with
 * their warnings (run_capture.c). */
int gw_run_capture(gw_results *r, gw_error *err);
/* Its two halves, so the zones can be computed while the divides are:
 * the zones into r->capture (touches nothing else in r; flow: the flow
 * field of r's solution, or NULL to compute it), then their warnings and
 * caution.  gw_capture_wanted: whether the model asks for zones. */
int gw_capture_wanted(const gw_results *r);
int gw_capture_run_zones(gw_results *r, const gw_flowfield *flow, gw_error *err);
int gw_capture_add_notes(gw_results *r, gw_error *err);

/* Catchments, divides, no-divide pairs and stagnation points into
 * r->divides (run_divides.c). */
int gw_run_divides(gw_results *r, gw_error *err);
/* Its two halves: the analysis alone (*out NULL when none is asked for;
 * only reads r and f -- the flow field of r's solution, or NULL to compute
 * it -- so it may run on another thread), then storing it in r with its
 * warning (takes ownership of a, even on failure). */
int gw_run_divides_wanted(const gw_results *r);
int gw_run_divides_compute(const gw_results *r, const gw_flowfield *f, gw_divide_analysis **out,
                           gw_error *err);
int gw_run_divides_store(gw_results *r, gw_divide_analysis *a, gw_error *err);

/* Transect profiles (run_transects.c): computed after the divides, written
 * as transect_<name>.csv into the staged output folder. */
struct gw_outdir;
int gw_run_transects(gw_results *r, gw_error *err);

/* Cross-section mode: hinge points and flow systems into r->section
 * (run_section.c); does nothing for plan-view models. */
int gw_run_section(gw_results *r, gw_error *err);
int gw_write_transects(const gw_results *r, struct gw_outdir *o, gw_error *err);

/* Wall-clock seconds (monotonic). */
double gw_now(void);

/* The one error block of a failed command on stderr: "gwdivide: " and the
 * message, which names the model file (prefixed here when the stage that
 * failed, e.g. the solver, only knew features and cells). */
void gw_print_error(const char *model_path, const gw_error *err);

#endif
