/* Everything one run produced, in one place, for the report writers and the
 * terminal summary.  A gw_results owns what it points to; gw_results_free
 * releases it all. */
#ifndef GW_RESULTS_H
#define GW_RESULTS_H

#include "../solver/budget.h"
#include "../solver/capture.h"
#include "../solver/divide.h"
#include "../solver/error.h"
#include "../solver/observe.h"
#include "../solver/problem.h"
#include "../solver/section.h"
#include "../solver/solve.h"
#include "../solver/transect.h"
#include "model.h"

/* A growable list of owned strings. */
typedef struct {
    char **item;
    int n, cap;
} gw_strlist;

int gw_strlist_add(gw_strlist *l, const char *fmt, ...) __attribute__((format(printf, 2, 3)));
void gw_strlist_free(gw_strlist *l);

/* Wall-clock seconds per stage of the run (the solver's own stages are in
 * solution.timing). */
typedef struct {
    double read, build, solve, budget, analysis, outputs, total;
    double divides, tracking;   /* parts of analysis: flow field + divides, capture tracking */
} gw_run_timing;

typedef struct {
    gw_model *model;          /* owned */
    gw_problem *problem;      /* owned */
    gw_solution solution;     /* arrays owned */
    int have_solution;
    gw_budget budget;         /* arrays owned */
    int have_budget;
    char *solver_method;      /* owned copy of gw_solver_describe(), may be NULL */

    /* Observation wells, in model order (model->obs[i]). */
    int nobs;
    double *obs_simulated;    /* owned; NAN where no active cell surrounds the point */
    gw_residual_stats obs_stats;

    gw_strlist warnings;      /* things the user should look at */
    gw_strlist cautions;      /* standing limits of the method */
    gw_run_timing timing;

    /* ---- Analysis results (added by the analysis modules) -------------
     * Add one owned pointer per analysis here (divides and stagnation
     * points, catchments, capture zones, maps, ...), free it in
     * gw_results_free (marked spot in results.c) and emit it in
     * report_json.c (marked spots) and, if useful, in the summary.  NULL
     * means "not computed". */

    gw_capture *capture;      /* well capture and travel-time zones (run_capture.c) */
    gw_divide_analysis *divides; /* catchments, divides, stagnation points (run_divides.c) */
    gw_transect *transects;   /* one per model->transects[i] (run_transects.c) */
    int ntransects;
    gw_section *section;      /* cross-section hinge points and flow systems (run_section.c) */

    /* ---- end of analysis results ------------------------------------- */
} gw_results;

void gw_results_init(gw_results *r);
void gw_results_free(gw_results *r);

/* Simulated heads and residual statistics at the model's observation wells
 * (needs model, problem and solution).  Warns about wells outside the
 * active area. */
int gw_results_observe(gw_results *r, gw_error *err);

/* Warnings that follow from the solution itself: non-convergence, dry
 * cells, a balance that does not close. */
int gw_results_check(gw_results *r, gw_error *err);

/* The standing cautions shown with every result. */
int gw_results_add_cautions(gw_results *r, gw_error *err);

/* Name of feature i ("" when out of range). */
const char *gw_results_feature_name(const gw_results *r, int i);

#endif
