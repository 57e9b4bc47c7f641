#include "report_json.h"

#include <errno.h>
#include <math.h>
#include <string.h>

#include "json_writer.h"

static const char *aquifer_word(gw_aquifer_type t)
{
    switch (t) {
    case GW_CONFINED: return "confined";
    case GW_UNCONFINED: return "unconfined";
    case GW_SECTION: return "section";
    }
    return "confined";
}

static void write_grid(gw_json *j, const gw_results *r)
{
    const gw_problem *p = r->problem;
    const gw_grid *g = &p->grid;
    long active = 0;
    for (size_t k = 0; k < gw_grid_ncells(g); k++) active += p->active[k] != 0;
    gw_json_key(j, "grid");
    gw_json_object_begin(j);
    gw_json_kv_int(j, "columns", g->nx);
    gw_json_kv_int(j, "rows", g->ny);
    gw_json_kv_pair(j, "cell_size", g->dx, g->dy);
    gw_json_kv_pair(j, "origin", g->x0, g->y0);
    gw_json_kv_int(j, "active_cells", active);
    gw_json_kv_string(j, "crs", r->model ? r->model->crs : NULL);
    gw_json_kv_string(j, "aquifer_type", aquifer_word(p->type));
    gw_json_object_end(j);
}

static void write_solver(gw_json *j, const gw_results *r)
{
    const gw_solution *s = &r->solution;
    gw_json_key(j, "solver");
    gw_json_object_begin(j);
    gw_json_kv_bool(j, "converged", r->have_solution && s->converged);
    gw_json_kv_int(j, "iterations", r->have_solution ? s->iterations : 0);
    gw_json_kv_int(j, "factorizations", r->have_solution ? s->factorizations : 0);
    gw_json_kv_string(j, "method", r->solver_method);
    gw_json_key(j, "seconds");
    gw_json_object_begin(j);
    gw_json_kv_double(j, "read", r->timing.read);
    gw_json_kv_double(j, "build", r->timing.build);
    gw_json_kv_double(j, "assemble", s->timing.assemble);
    gw_json_kv_double(j, "analyse", s->timing.analyse);
    gw_json_kv_double(j, "factorize", s->timing.factorize);
    gw_json_kv_double(j, "solve", s->timing.solve);
    gw_json_kv_double(j, "budget", r->timing.budget);
    gw_json_kv_double(j, "analysis", r->timing.analysis);
    gw_json_object_end(j);
    gw_json_object_end(j);
}

static void write_balance_and_features(gw_json *j, const gw_results *r)
{
    const gw_budget *b = &r->budget;
    gw_json_key(j, "balance");
    gw_json_object_begin(j);
    gw_json_kv_double(j, "inflow", b->total_in);
    gw_json_kv_double(j, "outflow", b->total_out);
    gw_json_kv_double(j, "discrepancy_percent", b->discrepancy_percent);
    gw_json_object_end(j);

    gw_json_key(j, "features");
    gw_json_array_begin(j);
    for (int i = 0; i < b->nfeatures && i < r->problem->nfeatures; i++) {
        const gw_feature_budget *fb = &b->feature[i];
        gw_json_object_begin_inline(j);
        gw_json_kv_string(j, "name", gw_results_feature_name(r, i));
        gw_json_kv_string(j, "type", gw_feature_type_name(r->problem->features[i].type));
        gw_json_kv_double(j, "inflow", fb->in);
        gw_json_kv_double(j, "outflow", fb->out);
        gw_json_kv_double(j, "net", fb->net);
        gw_json_kv_string(j, "state", gw_state_name(fb->state));
        gw_json_object_end(j);
    }
    gw_json_array_end(j);
}

static void write_observations(gw_json *j, const gw_results *r)
{
    const gw_model *m = r->model;
    gw_json_key(j, "observations");
    gw_json_array_begin(j);
    for (int i = 0; i < r->nobs && m && i < m->nobs; i++) {
        const gw_obs_spec *o = &m->obs[i];
        double sim = r->obs_simulated ? r->obs_simulated[i] : NAN;
        gw_json_object_begin_inline(j);
        gw_json_kv_string(j, "name", o->name);
        gw_json_kv_pair(j, "at", o->x, o->y);
        gw_json_kv_double(j, "observed", o->head);          /* NAN -> null */
        gw_json_kv_double(j, "simulated", sim);
        gw_json_kv_double(j, "residual", o->head - sim);    /* observed - simulated */
        gw_json_object_end(j);
    }
    gw_json_array_end(j);
    gw_json_key(j, "observation_stats");
    gw_json_object_begin_inline(j);
    gw_json_kv_int(j, "count", r->obs_stats.n);
    if (r->obs_stats.n > 0) {
        gw_json_kv_double(j, "mean_error", r->obs_stats.mean_error);
        gw_json_kv_double(j, "mean_abs_error", r->obs_stats.mean_abs_error);
        gw_json_kv_double(j, "rms_error", r->obs_stats.rms_error);
    }
    gw_json_object_end(j);
}

static void write_strings(gw_json *j, const char *key, const gw_strlist *l)
{
    gw_json_key(j, key);
    gw_json_array_begin(j);
    for (int i = 0; i < l->n; i++) gw_json_string(j, l->item[i]);
    gw_json_array_end(j);
}

/* ---- Analysis sections -------------------------------------------------
 * Each writes its key and an array.  Until the analysis module fills its
 * field in gw_results, the array is empty; replace the body of each function
 * with the real emitter (keys per DESIGN.md). */

static void write_divides(gw_json *j, const gw_results *r)
{
    /* [{"between": [str, str], "line": [[x, y], ...]}] */
    (void)r;
    gw_json_key(j, "divides");
    gw_json_array_begin(j);
    gw_json_array_end(j);
}

static void write_stagnation_points(gw_json *j, const gw_results *r)
{
    /* [{"at": [x, y], "head": f, "type": "maximum|saddle|minimum"}] */
    (void)r;
    gw_json_key(j, "stagnation_points");
    gw_json_array_begin(j);
    gw_json_array_end(j);
}

static void write_catchments(gw_json *j, const gw_results *r)
{
    /* [{"feature": str, "area": f, "recharge": f}] */
    (void)r;
    gw_json_key(j, "catchments");
    gw_json_array_begin(j);
    gw_json_array_end(j);
}

static void write_hinge_points(gw_json *j, const gw_results *r)
{
    /* cross-section mode: [{"at": [x, z]}] */
    (void)r;
    gw_json_key(j, "hinge_points");
    gw_json_array_begin(j);
    gw_json_array_end(j);
}

static void write_capture_zones(gw_json *j, const gw_results *r)
{
    /* [{"well": str, "area": f, "polygon": [[x, y], ...],
     *   "travel_time_zones": [{"time": f, "area": f, "polygon": [...]}]}] */
    (void)r;
    gw_json_key(j, "capture_zones");
    gw_json_array_begin(j);
    gw_json_array_end(j);
}
/* ---- end of analysis sections ------------------------------------------ */

int gw_report_json_write(const gw_results *r, FILE *f, gw_error *err)
{
    if (!r->model || !r->problem || !r->have_budget)
        return gw_fail(err, "internal error: report written before the budget");
    gw_json j;
    gw_json_init(&j, f);
    gw_json_object_begin(&j);
    gw_json_kv_string(&j, "schema", GW_REPORT_SCHEMA);
    gw_json_kv_string(&j, "generator", "gwdivide " GWDIVIDE_VERSION);
    gw_json_kv_string(&j, "title", r->model->title ? r->model->title : "");
    gw_json_key(&j, "units");
    gw_json_object_begin_inline(&j);
    gw_json_kv_string(&j, "length", r->model->length_unit);
    gw_json_kv_string(&j, "time", r->model->time_unit);
    gw_json_object_end(&j);
    write_grid(&j, r);
    write_solver(&j, r);
    write_balance_and_features(&j, r);
    write_divides(&j, r);
    write_stagnation_points(&j, r);
    write_observations(&j, r);
    write_catchments(&j, r);
    write_hinge_points(&j, r);
    write_capture_zones(&j, r);
    /* ---- further report sections go here ---- */
    write_strings(&j, "warnings", &r->warnings);
    write_strings(&j, "cautions", &r->cautions);
    gw_json_object_end(&j);
    return gw_json_finish(&j, err);
}

int gw_report_json_save(const gw_results *r, const char *path, gw_error *err)
{
    FILE *f = fopen(path, "w");
    if (!f) return gw_fail(err, "cannot write %s: %s", path, strerror(errno));
    int rc = gw_report_json_write(r, f, err);
    if (rc) gw_fail_prefix(err, "%s: ", path);
    if (fclose(f) != 0 && rc == 0) rc = gw_fail(err, "cannot write %s: %s", path, strerror(errno));
    return rc;
}
