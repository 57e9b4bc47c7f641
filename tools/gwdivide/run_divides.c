/* The divides stage of `gwdivide run`: catchments, divides between them,
 * features that feed others with no divide between them, and stagnation
 * points (solver/divide.h).  Plan-view models only: a cross-section has
 * hinge points instead. */
#include <stdlib.h>

#include "../../solver/divide.h"
#include "cli.h"

int gw_run_divides_wanted(const gw_results *r)
{
    return r->model->divides && r->problem->type != GW_SECTION && r->have_solution;
}

int gw_run_divides_compute(const gw_results *r, const gw_flowfield *f, gw_divide_analysis **out,
                           gw_error *err)
{
    const gw_problem *p = r->problem;
    *out = NULL;
    if (!gw_run_divides_wanted(r))
        return 0;
    gw_divide_analysis *a = calloc(1, sizeof *a);
    if (!a)
        return gw_fail(err, "out of memory");
    if ((f ? gw_divide_analysis_run_flow(p, &r->solution, f, a, err)
           : gw_divide_analysis_run(p, &r->solution, a, err)) != 0) {
        free(a);
        return gw_fail_prefix(err, "divides: ");
    }
    *out = a;
    return 0;
}

int gw_run_divides_store(gw_results *r, gw_divide_analysis *a, gw_error *err)
{
    if (!a)
        return 0;
    r->divides = a;
    if (a->catchments.unresolved > 0 &&
        gw_strlist_add(&r->warnings,
                       "%ld active cells could not be ordered along the flow (heads not finite?); "
                       "they belong to no catchment", a->catchments.unresolved) != 0)
        return gw_fail(err, "out of memory");
    return 0;
}

int gw_run_divides(gw_results *r, gw_error *err)
{
    gw_divide_analysis *a;
    if (gw_run_divides_compute(r, NULL, &a, err) != 0)
        return -1;
    return gw_run_divides_store(r, a, err);
}
