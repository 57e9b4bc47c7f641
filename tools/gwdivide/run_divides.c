/* The divides stage of `gwdivide run`: catchments, divides between them,
 * features that feed others with no divide between them, and stagnation
 * points (solver/divide.h).  Plan-view models only: a cross-section has
 * hinge points instead. */
#include <stdlib.h>

#include "../../solver/divide.h"
#include "cli.h"

int gw_run_divides(gw_results *r, gw_error *err)
{
    const gw_problem *p = r->problem;
    if (!r->model->divides || p->type == GW_SECTION || !r->have_solution)
        return 0;
    gw_divide_analysis *a = calloc(1, sizeof *a);
    if (!a)
        return gw_fail(err, "out of memory");
    if (gw_divide_analysis_run(p, &r->solution, a, err) != 0) {
        free(a);
        return gw_fail_prefix(err, "divides: ");
    }
    r->divides = a;
    if (a->catchments.unresolved > 0 &&
        gw_strlist_add(&r->warnings,
                       "%ld active cells could not be ordered along the flow (heads not finite?); "
                       "they belong to no catchment", a->catchments.unresolved) != 0)
        return gw_fail(err, "out of memory");
    return 0;
}
