/* The cross-section stage of `gwdivide run`: recharge and discharge areas,
 * hinge points and flow systems (solver/section.h), with warnings for water
 * that never reaches the top. */
#include <math.h>
#include <stdlib.h>

#include "../../solver/section.h"
#include "cli.h"

int gw_run_section(gw_results *r, gw_error *err)
{
    if (!r->problem || r->problem->type != GW_SECTION || !r->have_solution || !r->have_budget)
        return 0;
    r->section = calloc(1, sizeof *r->section);
    if (!r->section) return gw_fail(err, "out of memory");
    if (gw_section_analyse(r->problem, &r->solution, &r->budget, NULL, r->section, err) != 0) {
        free(r->section);
        r->section = NULL;
        return gw_fail_prefix(err, "cross-section: ");
    }
    const gw_section *s = r->section;
    const char *L = r->model ? r->model->length_unit : "", *T = r->model ? r->model->time_unit : "";
    if (s->nareas == 0 &&
        gw_strlist_add(&r->warnings, "cross-section: no water enters or leaves through the top, so "
                                     "there are no recharge or discharge areas") != 0)
        return gw_fail(err, "out of memory");
    if (s->recharge_flux > 0 && s->other_flux > 1e-6 * s->recharge_flux &&
        gw_strlist_add(&r->warnings,
                       "cross-section: %.4g %s2/%s of the recharge (%.2g %%) ends at wells or stagnation "
                       "points and belongs to no flow system",
                       s->other_flux, L, T, 100.0 * s->other_flux / s->recharge_flux) != 0)
        return gw_fail(err, "out of memory");
    return 0;
}
