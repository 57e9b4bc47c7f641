#include "report_json.h"

#include <errno.h>
#include <math.h>
#include <string.h>

#include "json_writer.h"
#include "transect_csv.h"

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
    gw_json_kv_double(j, "divides", r->timing.divides);
    gw_json_kv_double(j, "tracking", r->timing.tracking);
    gw_json_kv_double(j, "outputs", r->timing.outputs);
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
    /* [{"between": [str, str], "line": [[x, y], ...]}], plus "closed" for a
     * divide that loops round a catchment. */
    const gw_divides *d = r->divides ? &r->divides->divides : NULL;
    gw_json_key(j, "divides");
    gw_json_array_begin(j);
    for (int i = 0; d && i < d->n; i++) {
        gw_json_object_begin(j);
        gw_json_key(j, "between");
        gw_json_array_begin_inline(j);
        gw_json_string(j, gw_results_feature_name(r, d->d[i].a));
        gw_json_string(j, gw_results_feature_name(r, d->d[i].b));
        gw_json_array_end(j);
        gw_json_key(j, "line");
        gw_json_array_begin(j);
        for (int k = 0; k < d->d[i].npts; k++)
            gw_json_pair(j, d->d[i].xy[2 * k], d->d[i].xy[2 * k + 1]);
        gw_json_array_end(j);
        if (d->d[i].closed) gw_json_kv_bool(j, "closed", 1);
        gw_json_object_end(j);
    }
    gw_json_array_end(j);
    /* Features whose water reaches another with no divide between them. */
    const gw_divide_analysis *a = r->divides;
    gw_json_key(j, "no_divide");
    gw_json_array_begin(j);
    for (int i = 0; a && i < a->nno_divide; i++) {
        const gw_no_divide *nd = &a->no_divide[i];
        gw_json_object_begin_inline(j);
        gw_json_key(j, "between");
        gw_json_array_begin_inline(j);
        gw_json_string(j, gw_results_feature_name(r, nd->losing));
        gw_json_string(j, gw_results_feature_name(r, nd->receiving));
        gw_json_array_end(j);
        gw_json_kv_double(j, "loss", nd->loss);
        gw_json_kv_double(j, "reaching", nd->delivered);
        gw_json_object_end(j);
    }
    gw_json_array_end(j);
}

static void write_stagnation_points(gw_json *j, const gw_results *r)
{
    /* [{"at": [x, y], "head": f, "type": "maximum|saddle|minimum"}] */
    const gw_divide_analysis *a = r->divides;
    gw_json_key(j, "stagnation_points");
    gw_json_array_begin(j);
    for (int i = 0; a && i < a->nstagnation; i++) {
        const gw_stagnation *s = &a->stagnation[i];
        gw_json_object_begin_inline(j);
        gw_json_kv_pair(j, "at", s->x, s->y);
        gw_json_kv_double(j, "head", s->head);
        gw_json_kv_string(j, "type", gw_stag_type_name(s->type));
        gw_json_object_end(j);
    }
    gw_json_array_end(j);
}

static void write_catchments(gw_json *j, const gw_results *r)
{
    /* [{"feature": str, "area": f, "recharge": f}], plus "received": all
     * water ending in the feature (recharge and water from other features). */
    const gw_catchments *c = r->divides ? &r->divides->catchments : NULL;
    gw_json_key(j, "catchments");
    gw_json_array_begin(j);
    for (int f = 0; c && f < c->nfeatures; f++) {
        if (!c->discharge[f]) continue;
        gw_json_object_begin_inline(j);
        gw_json_kv_string(j, "feature", gw_results_feature_name(r, f));
        gw_json_kv_double(j, "area", c->area[f]);
        gw_json_kv_double(j, "recharge", c->recharge[f]);
        gw_json_kv_double(j, "received", c->received[f]);
        gw_json_object_end(j);
    }
    gw_json_array_end(j);
}

static void write_hinge_points(gw_json *j, const gw_results *r)
{
    /* cross-section mode: [{"at": [x, z]}] */
    const gw_section *s = r->section;
    gw_json_key(j, "hinge_points");
    gw_json_array_begin(j);
    for (int i = 0; s && i < s->nhinges; i++) {
        gw_json_object_begin_inline(j);
        gw_json_kv_pair(j, "at", s->hinge[i].x, s->hinge[i].z);
        gw_json_object_end(j);
    }
    gw_json_array_end(j);
    if (!s)
        return;
    /* Cross-section extras: areas along the top, Toth (1963) flow systems
     * and the dividing streamlines between them.  Flows are per unit width. */
    gw_json_key(j, "section");
    gw_json_object_begin(j);
    gw_json_kv_double(j, "recharge_length", s->recharge_length);
    gw_json_kv_double(j, "discharge_length", s->discharge_length);
    gw_json_kv_double(j, "recharge", s->recharge_flux);
    gw_json_kv_double(j, "discharge", s->discharge_flux);
    gw_json_kv_double(j, "recharge_rate", s->recharge_rate);
    gw_json_kv_double(j, "discharge_rate", s->discharge_rate);
    gw_json_kv_double(j, "unassigned", s->other_flux);
    gw_json_key(j, "areas");
    gw_json_array_begin(j);
    for (int i = 0; i < s->nareas; i++) {
        gw_json_object_begin_inline(j);
        gw_json_kv_string(j, "type", s->area[i].recharge ? "recharge" : "discharge");
        gw_json_kv_pair(j, "x", s->area[i].x0, s->area[i].x1);
        gw_json_kv_double(j, "flow", s->area[i].flux);
        gw_json_object_end(j);
    }
    gw_json_array_end(j);
    gw_json_object_end(j);
    gw_json_key(j, "flow_systems");
    gw_json_array_begin(j);
    for (int i = 0; i < s->nsystems; i++) {
        const gw_flow_system *y = &s->system[i];
        gw_json_object_begin_inline(j);
        gw_json_kv_string(j, "type", gw_system_kind_name(y->kind));
        gw_json_kv_pair(j, "recharge_x", y->x_from, y->x_to);
        gw_json_kv_pair(j, "discharge_x", s->area[y->discharge_area].x0, s->area[y->discharge_area].x1);
        gw_json_kv_double(j, "flow", y->flux);
        gw_json_kv_double(j, "bottom", y->bottom);
        gw_json_kv_double(j, "depth", y->depth);
        gw_json_kv_pair(j, "travel_time", y->time_min, y->time_max);
        gw_json_object_end(j);
    }
    gw_json_array_end(j);
    gw_json_key(j, "section_divides");
    gw_json_array_begin(j);
    for (int i = 0; i < s->ndivides; i++) {
        gw_json_object_begin_inline(j);
        gw_json_key(j, "line");
        gw_json_array_begin_inline(j);
        for (int k = 0; k < s->divide[i].n; k++)
            gw_json_pair(j, s->divide[i].xz[2 * k], s->divide[i].xz[2 * k + 1]);
        gw_json_array_end(j);
        gw_json_object_end(j);
    }
    gw_json_array_end(j);
}

/* A closed ring [[x, y], ..., first point again]; [] when empty. */
static void write_ring(gw_json *j, const gw_capring *rg)
{
    gw_json_array_begin(j);
    for (int i = 0; rg && i <= rg->n && rg->n > 0; i++)
        gw_json_pair(j, rg->x[i % rg->n], rg->y[i % rg->n]);
    gw_json_array_end(j);
}

/* "holes" of outer ring `outer` (clockwise rings), when it has any. */
static void write_holes(gw_json *j, const gw_capzone *z, int outer)
{
    int any = 0;
    for (int i = 0; i < z->nring; i++) {
        if (gw_capzone_parent(z, i) != outer) continue;
        if (!any) {
            gw_json_key(j, "holes");
            gw_json_array_begin(j);
            any = 1;
        }
        write_ring(j, &z->ring[i]);
    }
    if (any) gw_json_array_end(j);
}

/* "area" (holes subtracted), "polygon" (largest outer ring, counter-
 * clockwise), "holes" (its holes, clockwise) and, when the zone has
 * further separate parts, "parts": [{"area", "polygon", "holes"}]. */
static void write_capzone(gw_json *j, const gw_capzone *z)
{
    gw_json_kv_double(j, "area", z->area);
    gw_json_key(j, "polygon");
    write_ring(j, z->outer >= 0 ? &z->ring[z->outer] : NULL);
    if (z->outer < 0) return;
    write_holes(j, z, z->outer);
    int any = 0;
    for (int i = 0; i < z->nring; i++) {
        if (i == z->outer || !(z->ring[i].area > 0)) continue;
        if (!any) {
            gw_json_key(j, "parts");
            gw_json_array_begin(j);
            any = 1;
        }
        double a = z->ring[i].area;
        for (int h = 0; h < z->nring; h++)
            if (gw_capzone_parent(z, h) == i) a += z->ring[h].area;
        gw_json_object_begin(j);
        gw_json_kv_double(j, "area", a);
        gw_json_key(j, "polygon");
        write_ring(j, &z->ring[i]);
        write_holes(j, z, i);
        gw_json_object_end(j);
    }
    if (any) gw_json_array_end(j);
}

static void write_capture_zones(gw_json *j, const gw_results *r)
{
    /* [{"well": str, "area": f, "polygon": [[x, y], ...],
     *   "travel_time_zones": [{"time": f, "area": f, "polygon": [...]}]}]
     * plus the pumping, the split of the well's water by source (rates and
     * fractions; "recharge" for areal recharge, else the feature's name),
     * the induced stream share and how strong a sink the well cell is. */
    gw_json_key(j, "capture_zones");
    gw_json_array_begin(j);
    const gw_capture *c = r->capture;
    for (int i = 0; c && i < c->nzone; i++) {
        const gw_capture_zone *z = &c->zone[i];
        gw_json_object_begin(j);
        gw_json_kv_string(j, "well", gw_results_feature_name(r, z->feature));
        gw_json_kv_double(j, "pumping", z->rate);
        write_capzone(j, &z->capture);
        double stream = 0.0;
        gw_json_key(j, "sources");
        gw_json_object_begin(j);
        for (int f = 0; f < c->nfeatures; f++) {
            if (!(z->source[f] > 1e-12 * z->rate)) continue;
            gw_json_kv_double(j, f == 0 ? "recharge" : gw_results_feature_name(r, f), z->source[f]);
            if (r->problem->features[f].type == GW_FEAT_STREAM) stream += z->source[f];
        }
        gw_json_object_end(j);
        gw_json_key(j, "source_fractions");
        gw_json_object_begin(j);
        for (int f = 0; f < c->nfeatures; f++)
            if (z->source[f] > 1e-12 * z->rate)
                gw_json_kv_double(j, f == 0 ? "recharge" : gw_results_feature_name(r, f),
                                  z->source[f] / z->rate);
        gw_json_object_end(j);
        gw_json_kv_double(j, "stream_fraction", stream / z->rate);
        gw_json_kv_double(j, "well_cell_share", z->well_cell_share);
        gw_json_kv_double(j, "weak_sink_path_fraction", z->weak_pass_share);
        gw_json_kv_int(j, "paths", z->seeds);
        gw_json_kv_int(j, "points_decided", z->classified);   /* lattice points needing no path */
        gw_json_kv_int(j, "paths_stopped_between_known_paths", z->known_stops);
        gw_json_key(j, "path_ends");
        gw_json_object_begin(j);
        for (int e = GW_END_SINK; e <= GW_END_MAX_STEPS; e++)
            if (z->ends[e] > 0) gw_json_kv_int(j, gw_track_end_name((gw_track_end)e), z->ends[e]);
        gw_json_object_end(j);
        gw_json_key(j, "travel_time_zones");
        gw_json_array_begin(j);
        for (int t = 0; t < z->nttz; t++) {
            gw_json_object_begin(j);
            gw_json_kv_double(j, "time", z->ttz[t].time);
            write_capzone(j, &z->ttz[t]);
            gw_json_object_end(j);
        }
        gw_json_array_end(j);
        gw_json_object_end(j);
    }
    gw_json_array_end(j);
}
static void write_transects(gw_json *j, const gw_results *r)
{
    /* [{"name", "file", "length", "divide_crossings": [{"distance", "at",
     * "head", "between"}], "flow_reversals": [{"distance", "at", "type"}]}]:
     * where divides cross each transect (solver/transect.h), and where the
     * flux along it changes direction ("diverging" on a divide met
     * square-on, "converging" at a gaining stream). */
    gw_json_key(j, "transects");
    gw_json_array_begin(j);
    for (int i = 0; i < r->ntransects && r->model && i < r->model->ntransects; i++) {
        const gw_transect *t = &r->transects[i];
        char file[256];
        gw_transect_file_name(r->model, i, file, sizeof file);
        gw_json_object_begin(j);
        gw_json_kv_string(j, "name", r->model->transects[i].name);
        gw_json_kv_string(j, "file", file);
        gw_json_kv_double(j, "length", t->length);
        for (int pass = 0; pass < 2; pass++) {
            gw_json_key(j, pass == 0 ? "divide_crossings" : "flow_reversals");
            gw_json_array_begin(j);
            for (int c = 0; c < t->ncross; c++) {
                const gw_transect_crossing *x = &t->c[c];
                if ((x->kind == GW_CROSS_DIVIDE) != (pass == 0)) continue;
                gw_json_object_begin_inline(j);
                gw_json_kv_double(j, "distance", x->at.dist);
                gw_json_kv_pair(j, "at", x->at.x, x->at.y);
                gw_json_kv_double(j, "head", x->at.head);
                if (pass == 0) {
                    gw_json_key(j, "between");
                    gw_json_array_begin_inline(j);
                    gw_json_string(j, gw_results_feature_name(r, x->a));
                    gw_json_string(j, gw_results_feature_name(r, x->b));
                    gw_json_array_end(j);
                } else {
                    gw_json_kv_string(j, "type", x->kind == GW_CROSS_DIVERGING ? "diverging" : "converging");
                }
                gw_json_object_end(j);
            }
            gw_json_array_end(j);
        }
        gw_json_object_end(j);
    }
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
    write_transects(&j, r);
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
