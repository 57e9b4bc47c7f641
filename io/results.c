#include "results.h"

#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

int gw_strlist_add(gw_strlist *l, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    int n = vsnprintf(NULL, 0, fmt, ap);
    va_end(ap);
    if (n < 0) return -1;
    char *s = malloc((size_t)n + 1);
    if (!s) return -1;
    va_start(ap, fmt);
    vsnprintf(s, (size_t)n + 1, fmt, ap);
    va_end(ap);
    if (l->n == l->cap) {
        int cap = l->cap ? 2 * l->cap : 8;
        char **p = realloc(l->item, (size_t)cap * sizeof *p);
        if (!p) { free(s); return -1; }
        l->item = p;
        l->cap = cap;
    }
    l->item[l->n++] = s;
    return 0;
}

void gw_strlist_free(gw_strlist *l)
{
    for (int i = 0; i < l->n; i++) free(l->item[i]);
    free(l->item);
    memset(l, 0, sizeof *l);
}

void gw_results_init(gw_results *r)
{
    memset(r, 0, sizeof *r);
}

void gw_results_free(gw_results *r)
{
    if (!r) return;
    /* ---- free analysis results here (see results.h) ---- */
    gw_capture_free(r->capture);
    free(r->capture);
    gw_divide_analysis_free(r->divides);
    free(r->divides);
    for (int i = 0; i < r->ntransects; i++) gw_transect_free(&r->transects[i]);
    free(r->transects);
    gw_section_free(r->section);
    free(r->section);

    /* ---- end of analysis results ---- */
    free(r->obs_simulated);
    if (r->have_budget) gw_budget_free(&r->budget);
    if (r->have_solution) gw_solution_free(&r->solution);
    free(r->solver_method);
    gw_problem_free(r->problem);
    gw_model_free(r->model);
    gw_strlist_free(&r->warnings);
    gw_strlist_free(&r->cautions);
    memset(r, 0, sizeof *r);
}

const char *gw_results_feature_name(const gw_results *r, int i)
{
    if (!r->problem || i < 0 || i >= r->problem->nfeatures || !r->problem->features[i].name) return "";
    return r->problem->features[i].name;
}

int gw_results_observe(gw_results *r, gw_error *err)
{
    const gw_model *m = r->model;
    if (!m || !r->problem || !r->have_solution) return gw_fail(err, "internal error: observations before a solution");
    r->nobs = m->nobs;
    if (m->nobs == 0) return 0;
    r->obs_simulated = malloc((size_t)m->nobs * sizeof *r->obs_simulated);
    double *obs = malloc((size_t)m->nobs * sizeof *obs);
    double *sim = malloc((size_t)m->nobs * sizeof *sim);
    if (!r->obs_simulated || !obs || !sim) {
        free(obs);
        free(sim);
        return gw_fail(err, "out of memory");
    }
    int n = 0;
    for (int i = 0; i < m->nobs; i++) {
        const gw_obs_spec *o = &m->obs[i];
        double h = gw_head_at(&r->problem->grid, r->solution.head, o->x, o->y);
        r->obs_simulated[i] = h;
        if (isnan(h)) {
            if (gw_strlist_add(&r->warnings, "observation well %s at (%g, %g) is not inside the active area; "
                               "no simulated head", o->name, o->x, o->y) != 0)
                goto oom;
            continue;
        }
        if (!isnan(o->head)) {
            obs[n] = o->head;
            sim[n] = h;
            n++;
        }
    }
    gw_residual_stats_compute(obs, sim, n, &r->obs_stats);
    free(obs);
    free(sim);
    return 0;
oom:
    free(obs);
    free(sim);
    return gw_fail(err, "out of memory");
}

/* "N cells went dry" with where: the block of columns/rows they span, its
 * map extent, and the driest cell, so the user can find them on the map. */
static int warn_dry(gw_results *r)
{
    const gw_solution *s = &r->solution;
    const gw_problem *p = r->problem;
    const gw_grid *g = &p->grid;
    int cmin = g->nx, cmax = -1, rmin = g->ny, rmax = -1, worst = -1;
    double depth = -1.0;
    for (int k = 0; k < s->ncells && p->type == GW_UNCONFINED; k++) {
        if (!p->active[k] || !(s->head[k] <= p->bottom[k])) continue;
        int c = k % g->nx, rw = k / g->nx;
        if (c < cmin) cmin = c;
        if (c > cmax) cmax = c;
        if (rw < rmin) rmin = rw;
        if (rw > rmax) rmax = rw;
        if (p->bottom[k] - s->head[k] > depth) { depth = p->bottom[k] - s->head[k]; worst = k; }
    }
    const char *u = r->model && r->model->length_unit ? r->model->length_unit : "";
    if (worst < 0)
        return gw_strlist_add(&r->warnings, "%d cell%s went dry (head at or below the aquifer bottom); "
                              "results there are not meaningful", s->ndry, s->ndry == 1 ? "" : "s");
    return gw_strlist_add(&r->warnings,
                          "%d cell%s went dry (head at or below the aquifer bottom), within columns %d-%d, "
                          "rows %d-%d (x %.6g to %.6g, y %.6g to %.6g); the driest is column %d, row %d "
                          "(x %.6g, y %.6g), %.3g %s below the bottom; results there are not meaningful",
                          s->ndry, s->ndry == 1 ? "" : "s", cmin + 1, cmax + 1, rmin + 1, rmax + 1,
                          g->x0 + cmin * g->dx, g->x0 + (cmax + 1) * g->dx,
                          gw_grid_ytop(g) - (rmax + 1) * g->dy, gw_grid_ytop(g) - rmin * g->dy,
                          worst % g->nx + 1, worst / g->nx + 1, gw_grid_xc(g, worst % g->nx),
                          gw_grid_yc(g, worst / g->nx), depth, u);
}

/* A pumping well whose cell went dry: the aquifer cannot deliver that rate
 * there in steady state, and the heads, budgets and capture zone around it
 * only mean the pumping was imposed.  One warning per well feature. */
static int warn_dry_wells(gw_results *r)
{
    const gw_solution *s = &r->solution;
    const gw_problem *p = r->problem;
    const gw_grid *g = &p->grid;
    const char *u = r->model && r->model->length_unit ? r->model->length_unit : "";
    const char *t = r->model && r->model->time_unit ? r->model->time_unit : "";
    for (int f = 0; f < p->nfeatures && p->type == GW_UNCONFINED; f++) {
        if (p->features[f].type != GW_FEAT_WELL)
            continue;
        double rate = 0.0, depth = -1.0;
        int worst = -1;
        for (int i = 0; i < p->nwells; i++) {
            const gw_well *w = &p->wells[i];
            if (w->feature != f || !p->active[w->cell])
                continue;
            rate += w->rate;
            double d = p->bottom[w->cell] - s->head[w->cell];
            if (w->rate > 0.0 && d >= 0.0 && d > depth) {
                depth = d;
                worst = w->cell;
            }
        }
        if (worst < 0)
            continue;
        if (gw_strlist_add(&r->warnings,
                           "well '%s' is in a cell that went dry (column %d, row %d; x %.6g, y %.6g; head "
                           "%.3g %s below the aquifer bottom): the aquifer cannot deliver its pumping of "
                           "%.6g %s3/%s there in steady state, so the heads, budgets and capture zone around it "
                           "are not meaningful; lower the rate, or check conductivity, bottom and "
                           "recharge near the well",
                           p->features[f].name, worst % g->nx + 1, worst / g->nx + 1,
                           gw_grid_xc(g, worst % g->nx), gw_grid_yc(g, worst / g->nx), depth, u,
                           rate, u, t) != 0)
            return -1;
    }
    return 0;
}

int gw_results_check(gw_results *r, gw_error *err)
{
    if (r->have_solution) {
        const gw_solution *s = &r->solution;
        if (!s->converged &&
            gw_strlist_add(&r->warnings, "the solution did not converge in %d iterations", s->iterations) != 0)
            return gw_fail(err, "out of memory");
        if (s->ndry > 0 && (warn_dry(r) != 0 || warn_dry_wells(r) != 0))
            return gw_fail(err, "out of memory");
    }
    if (r->have_solution && r->model && r->model->contour_interval > 0) {
        double lo = HUGE_VAL, hi = -HUGE_VAL;
        for (int k = 0; k < r->solution.ncells; k++)
            if (isfinite(r->solution.head[k])) {
                lo = fmin(lo, r->solution.head[k]);
                hi = fmax(hi, r->solution.head[k]);
            }
        /* The maps and contour layers fall back to an automatic interval
         * past 400 levels (map_head.c, results_gpkg.c, map_section.c). */
        if (hi > lo && (hi - lo) / r->model->contour_interval > 400 &&
            gw_strlist_add(&r->warnings, "output.contour_interval %g gives more than 400 contours over the head "
                           "range %.6g to %.6g; maps and contour layers use an automatic interval instead",
                           r->model->contour_interval, lo, hi) != 0)
            return gw_fail(err, "out of memory");
    }
    if (r->have_budget && fabs(r->budget.discrepancy_percent) > 1e-3 &&
        gw_strlist_add(&r->warnings, "the water balance does not close: discrepancy %.3g %%",
                       r->budget.discrepancy_percent) != 0)
        return gw_fail(err, "out of memory");
    return 0;
}

int gw_results_add_cautions(gw_results *r, gw_error *err)
{
    static const char *text[] = {
        "Screening tool: results support, and do not replace, a site investigation.",
        "Steady state, two-dimensional flow in plan view under Dupuit assumptions: no storage, no "
        "vertical flow within the aquifer.",
        "Divides, catchments and capture zones are sensitive to recharge and hydraulic conductivity; "
        "test how they move with plausible ranges before relying on them.",
        "Wellhead protection areas and similar decisions are set under local regulation and require "
        "licensed professional judgement.",
    };
    /* A vertical section has vertical flow but none across its plane. */
    static const char *section_text[] = {
        "Screening tool: results support, and do not replace, a site investigation.",
        "Steady state, two-dimensional flow in a vertical section per unit width: no storage, and no "
        "flow into or out of the plane of the section (the section must follow the flow).",
        "The top boundary (a water table of given heads, or recharge with seepage faces) is prescribed, "
        "not a computed free surface: recharge and discharge areas, hinge points and flow systems follow "
        "from it and from the conductivity and anisotropy; test how they move with plausible ranges "
        "before relying on them.",
    };
    int sec = r->problem && r->problem->type == GW_SECTION;
    const char **t = sec ? section_text : text;
    size_t n = sec ? sizeof section_text / sizeof *section_text : sizeof text / sizeof *text;
    for (size_t i = 0; i < n; i++)
        if (gw_strlist_add(&r->cautions, "%s", t[i]) != 0) return gw_fail(err, "out of memory");
    return 0;
}
