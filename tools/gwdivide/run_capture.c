/* The capture-zone stage of `gwdivide run`: flow field, Pollock tracking
 * and zone tracing for every pumping well, plus the warnings a reader of
 * the zones needs (weak well cells, weak sinks passed, unfinished paths). */
#include <errno.h>
#include <stdio.h>
#include <stdlib.h>

#include "../../solver/capture.h"
#include "../../solver/flowfield.h"
#include "../../solver/parallel.h"
#include "cli.h"

static int warn_zone(gw_results *r, const gw_capture_zone *z, gw_error *err)
{
    const char *name = gw_results_feature_name(r, z->feature);
    if (z->well_cell_share < 0.999 &&
        gw_strlist_add(&r->warnings,
                       "well '%s' takes only %.0f %% of the water entering its cell (a weak sink); its "
                       "capture zone is drawn as if it took all of it, so it is larger than the area "
                       "that really feeds the well", name, 100.0 * z->well_cell_share) != 0)
        return gw_fail(err, "out of memory");
    if (z->weak_pass_share > 0.0 &&
        gw_strlist_add(&r->warnings,
                       "%.0f %% of the paths into well '%s' pass a stream, drain or well cell that takes "
                       "part of the water; as little as %.0f %% of the water on such a path reaches the well",
                       100.0 * z->weak_pass_share, name, 100.0 * z->min_retained) != 0)
        return gw_fail(err, "out of memory");
    if (z->ends[GW_END_MAX_STEPS] > 0 &&
        gw_strlist_add(&r->warnings,
                       "%ld paths traced for well '%s' were stopped after the maximum number of cells",
                       z->ends[GW_END_MAX_STEPS], name) != 0)
        return gw_fail(err, "out of memory");
    if (z->capture.outer < 0 &&
        gw_strlist_add(&r->warnings, "no capture zone could be drawn for well '%s' (no path reaches it)",
                       name) != 0)
        return gw_fail(err, "out of memory");
    return 0;
}

/* Threads for tracking: GW_THREADS when set (1 to GW_MAX_THREADS), else
 * 0 (the solver's default, the online CPUs up to 8).  The zones do not
 * depend on it. */
static int capture_threads(int *threads, gw_error *err)
{
    const char *v = getenv("GW_THREADS");
    *threads = 0;
    if (!v || !*v)
        return 0;
    char *end;
    errno = 0;
    long n = strtol(v, &end, 10);
    if (errno || *end || n < 1 || n > GW_MAX_THREADS)
        return gw_fail(err, "environment variable GW_THREADS is '%s'; expected a whole number "
                            "of threads from 1 to %d", v, GW_MAX_THREADS);
    *threads = (int)n;
    return 0;
}

int gw_capture_wanted(const gw_results *r)
{
    const gw_problem *p = r->problem;
    return r->model->capture && p->type != GW_SECTION && p->nwells > 0 && r->have_solution;
}

int gw_capture_run_zones(gw_results *r, const gw_flowfield *flow, gw_error *err)
{
    const gw_model *m = r->model;
    const gw_problem *p = r->problem;
    if (!gw_capture_wanted(r))
        return 0;
    gw_capture_options o;
    gw_capture_options_default(&o);
    if (capture_threads(&o.threads, err) != 0)
        return -1;
    gw_flowfield ff = {0};
    if (!flow && gw_flowfield_compute(p, &r->solution, &ff, err) != 0)
        return -1;
    const gw_flowfield *f = flow ? flow : &ff;
    o.times = m->travel_times;
    o.ntimes = m->ntravel_times;
    gw_capture *c = calloc(1, sizeof *c);
    if (!c) {
        gw_flowfield_free(&ff);
        return gw_fail(err, "out of memory");
    }
    int rc = gw_capture_compute(p, f, &o, c, err);
    gw_flowfield_free(&ff);
    if (rc != 0) {
        free(c);
        return -1;
    }
    r->capture = c;
    return 0;
}

int gw_capture_add_notes(gw_results *r, gw_error *err)
{
    const gw_model *m = r->model;
    const gw_capture *c = r->capture;
    if (!c)
        return 0;
    for (int i = 0; i < c->nzone; i++)
        if (warn_zone(r, &c->zone[i], err) != 0)
            return -1;
    char por[64];
    if (m->porosity.kind == GW_PROP_VALUE)
        snprintf(por, sizeof por, "%g here", m->porosity.value);
    else
        snprintf(por, sizeof por, "as mapped");
    if (c->nzone > 0 &&
        gw_strlist_add(&r->cautions,
                       "Capture zones are steady-state areas (unlimited time); travel times are in "
                       "proportion to the effective porosity (%s) and ignore dispersion, storage and "
                       "travel through the unsaturated zone.", por) != 0)
        return gw_fail(err, "out of memory");
    return 0;
}

int gw_run_capture(gw_results *r, gw_error *err)
{
    if (gw_capture_run_zones(r, NULL, err) != 0)
        return -1;
    return gw_capture_add_notes(r, err);
}
