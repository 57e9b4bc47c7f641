/* The layers of results.gpkg, put together from one run's gw_results.
 * Field names carry their units (head_m, inflow_m3_per_day, area_m2); each
 * layer's description says the same in words. */
#include "results_gpkg.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "../solver/capture.h"
#include "../solver/divide.h"
#include "../solver/rasterize.h"
#include "../solver/stagnation.h"

typedef struct {
    char L[32];       /* length unit for field names, e.g. "m" */
    char A[40];       /* area, "m2" */
    char Q[80];       /* flow, "m3_per_day" */
    char T[32];       /* time, "day" */
    const char *lw, *tw;   /* the units as the user wrote them */
} units;

static void units_of(const gw_model *m, units *u)
{
    u->lw = m->length_unit ? m->length_unit : "";
    u->tw = m->time_unit ? m->time_unit : "";
    gw_field_unit(u->lw, u->L, sizeof u->L);
    gw_field_unit(u->tw, u->T, sizeof u->T);
    snprintf(u->A, sizeof u->A, "%s2", u->L);
    snprintf(u->Q, sizeof u->Q, "%s3_per_%s", u->L, u->T);
}

/* Signed area of a ring (shoelace; positive = counter-clockwise). */
static double ring_signed_area(const gw_capring *r)
{
    double a2 = 0.0;
    for (int j = 0; j < r->n; j++) {
        int k = (j + 1) % r->n;
        a2 += r->x[j] * r->y[k] - r->x[k] * r->y[j];
    }
    return 0.5 * a2;
}

/* ---- line features cut to one cell ------------------------------------ */

/* Liang-Barsky: the part of segment p0-p1 inside [xa,xb] x [ya,yb]. */
static int clip_segment(double xa, double xb, double ya, double yb, const double *p0, const double *p1, double *q0,
                        double *q1)
{
    double t0 = 0.0, t1 = 1.0, dx = p1[0] - p0[0], dy = p1[1] - p0[1];
    double p[4] = {-dx, dx, -dy, dy}, q[4] = {p0[0] - xa, xb - p0[0], p0[1] - ya, yb - p0[1]};
    for (int i = 0; i < 4; i++) {
        if (p[i] == 0.0) {
            if (q[i] < 0.0) return 0;
        } else {
            double t = q[i] / p[i];
            if (p[i] < 0.0) { if (t > t1) return 0; if (t > t0) t0 = t; }
            else { if (t < t0) return 0; if (t < t1) t1 = t; }
        }
    }
    if (t1 - t0 <= 1e-12) return 0;
    q0[0] = p0[0] + t0 * dx; q0[1] = p0[1] + t0 * dy;
    q1[0] = p0[0] + t1 * dx; q1[1] = p0[1] + t1 * dy;
    return 1;
}

/* Pieces of polyline xy inside the cell box, joined where they touch.
 * parts/n receive up to maxparts pieces in buf (room for 2 * npts + 2 * maxparts
 * vertices).  Returns the number of parts and the total length. */
static int clip_polyline(const double *xy, int npts, double xa, double xb, double ya, double yb, double *buf,
                         double **parts, int *n, int maxparts, double *length)
{
    int np = 0, used = 0;
    *length = 0.0;
    for (int s = 0; s + 1 < npts; s++) {
        double a[2], b[2];
        if (!clip_segment(xa, xb, ya, yb, xy + 2 * s, xy + 2 * s + 2, a, b)) continue;
        *length += hypot(b[0] - a[0], b[1] - a[1]);
        double *last = np ? parts[np - 1] + 2 * (n[np - 1] - 1) : NULL;
        if (last && fabs(last[0] - a[0]) < 1e-9 * (1 + fabs(a[0])) && fabs(last[1] - a[1]) < 1e-9 * (1 + fabs(a[1])) &&
            parts[np - 1] + 2 * n[np - 1] == buf + 2 * used) {
            buf[2 * used] = b[0];
            buf[2 * used + 1] = b[1];
            used++;
            n[np - 1]++;
            continue;
        }
        if (np == maxparts) break;
        parts[np] = buf + 2 * used;
        buf[2 * used] = a[0]; buf[2 * used + 1] = a[1];
        buf[2 * used + 2] = b[0]; buf[2 * used + 3] = b[1];
        used += 2;
        n[np++] = 2;
    }
    return np;
}

/* The model line of feature `name` (fixed-head line, stream or drain). */
static const gw_path *feature_line(const gw_model *m, const char *name)
{
    for (int i = 0; i < m->nstreams; i++)
        if (m->streams[i].name && !strcmp(m->streams[i].name, name)) return &m->streams[i].line;
    for (int i = 0; i < m->ndrains; i++)
        if (m->drains[i].name && !strcmp(m->drains[i].name, name)) return &m->drains[i].line;
    for (int i = 0; i < m->nfixed; i++)
        if (!m->fixed[i].is_polygon && m->fixed[i].name && !strcmp(m->fixed[i].name, name)) return &m->fixed[i].geom;
    return NULL;
}

static const char *reach_state(double in, double out)
{
    /* The aquifer's signs: water out of the aquifer into the stream makes
     * the reach gaining. */
    if (out > in) return "gaining";
    if (in > out) return "losing";
    return "none";
}

static int layer_reaches(gw_gpkg *g, const gw_results *r, const units *u, gw_error *err)
{
    const gw_problem *p = r->problem;
    const gw_grid *gr = &p->grid;
    char f_len[64], f_in[120], f_out[120], f_net[120], f_stage[64], f_head[64], desc[400];
    snprintf(f_len, sizeof f_len, "length_%s", u->L);
    snprintf(f_in, sizeof f_in, "inflow_%s", u->Q);
    snprintf(f_out, sizeof f_out, "outflow_%s", u->Q);
    snprintf(f_net, sizeof f_net, "net_%s", u->Q);
    snprintf(f_stage, sizeof f_stage, "level_%s", u->L);
    snprintf(f_head, sizeof f_head, "head_%s", u->L);
    gw_field fl[] = {{"feature", GW_FIELD_TEXT}, {"type", GW_FIELD_TEXT}, {"col", GW_FIELD_INT},
                     {"row", GW_FIELD_INT},      {f_len, GW_FIELD_REAL},  {f_in, GW_FIELD_REAL},
                     {f_out, GW_FIELD_REAL},     {f_net, GW_FIELD_REAL},  {"state", GW_FIELD_TEXT},
                     {f_stage, GW_FIELD_REAL},   {f_head, GW_FIELD_REAL}};
    snprintf(desc, sizeof desc,
             "Reaches (one per feature and cell) of streams, drains and fixed-head lines. inflow = water entering "
             "the aquifer from the feature, outflow = water leaving the aquifer to it, net = inflow - outflow, "
             "in %s3/%s; state gaining = the stream takes water from the aquifer. level = stage, drain "
             "elevation or fixed head (%s); head = aquifer head in the cell (%s).",
             u->lw, u->tw, u->lw, u->lw);
    if (gw_gpkg_layer(g, "stream_reaches", GW_VGEOM_LINE, fl, 11, desc, err) != 0) return -1;
    for (int i = 0; i < r->budget.nreaches; i++) {
        const gw_reach *rc = &r->budget.reach[i];
        if (rc->feature < 0 || rc->feature >= p->nfeatures) continue;
        gw_feature_type t = p->features[rc->feature].type;
        if (t != GW_FEAT_STREAM && t != GW_FEAT_DRAIN && t != GW_FEAT_FIXED_HEAD) continue;
        const char *name = p->features[rc->feature].name;
        const gw_path *line = feature_line(r->model, name);
        if (!line || line->n < 2 || !line->xy) continue;
        int col = rc->cell % gr->nx, row = rc->cell / gr->nx;
        double xa = gr->x0 + col * gr->dx, xb = xa + gr->dx;
        double yb = gw_grid_ytop(gr) - row * gr->dy, ya = yb - gr->dy;
        double *buf = malloc((size_t)(4 * line->n + 8) * sizeof *buf);
        double *parts[32];
        int n[32];
        if (!buf) return gw_fail(err, "out of memory");
        double len;
        int np = clip_polyline(line->xy, line->n, xa, xb, ya, yb, buf, parts, n, 32, &len);
        double level = NAN;
        if (t == GW_FEAT_FIXED_HEAD) level = p->fixed[rc->cell];
        for (int l = 0; l < p->nlinks && t != GW_FEAT_FIXED_HEAD; l++)
            if (p->links[l].feature == rc->feature && p->links[l].cell == rc->cell) { level = p->links[l].ref; break; }
        gw_fvalue v[11] = {{.s = name},
                           {.s = gw_feature_type_name(t)},
                           {.i = col},
                           {.i = row},
                           {.d = len},
                           {.d = rc->in},
                           {.d = rc->out},
                           {.d = rc->in - rc->out},
                           {.s = reach_state(rc->in, rc->out)},
                           {.d = level},
                           {.d = r->solution.head[rc->cell]}};
        int e = np > 0 ? gw_gpkg_add(g, (const double *const *)parts, n, np, v, err) : 0;
        free(buf);
        if (e != 0) return -1;
    }
    return 0;
}

static int layer_wells(gw_gpkg *g, const gw_results *r, const units *u, gw_error *err)
{
    const gw_problem *p = r->problem;
    char f_q[120], f_h[64], f_out[120], desc[300];
    snprintf(f_q, sizeof f_q, "pumping_%s", u->Q);
    snprintf(f_out, sizeof f_out, "withdrawn_%s", u->Q);
    snprintf(f_h, sizeof f_h, "cell_head_%s", u->L);
    gw_field fl[] = {{"name", GW_FIELD_TEXT}, {f_q, GW_FIELD_REAL}, {f_out, GW_FIELD_REAL}, {f_h, GW_FIELD_REAL},
                     {"col", GW_FIELD_INT},   {"row", GW_FIELD_INT}};
    snprintf(desc, sizeof desc,
             "Wells. pumping: rate in the model file (%s3/%s, positive withdraws); withdrawn: net water taken from "
             "the aquifer in the budget; cell_head: head of the well's cell (%s), not the head in the well bore.",
             u->lw, u->tw, u->lw);
    if (gw_gpkg_layer(g, "wells", GW_VGEOM_POINT, fl, 6, desc, err) != 0) return -1;
    for (int i = 0; i < p->nwells; i++) {
        const gw_well *w = &p->wells[i];
        double xy[2] = {w->x, w->y};
        const double *part = xy;
        int one = 1;
        double net = NAN;
        if (r->have_budget && w->feature < r->budget.nfeatures) net = -r->budget.feature[w->feature].net;
        gw_fvalue v[6] = {{.s = gw_results_feature_name(r, w->feature)},
                          {.d = w->rate},
                          {.d = net},
                          {.d = r->solution.head[w->cell]},
                          {.i = w->cell % p->grid.nx},
                          {.i = w->cell / p->grid.nx}};
        if (gw_gpkg_add(g, &part, &one, 1, v, err) != 0) return -1;
    }
    return 0;
}

static int layer_observations(gw_gpkg *g, const gw_results *r, const units *u, gw_error *err)
{
    const gw_model *m = r->model;
    char f_o[64], f_s[64], f_r[64], desc[300];
    snprintf(f_o, sizeof f_o, "observed_head_%s", u->L);
    snprintf(f_s, sizeof f_s, "simulated_head_%s", u->L);
    snprintf(f_r, sizeof f_r, "residual_%s", u->L);
    gw_field fl[] = {{"name", GW_FIELD_TEXT}, {f_o, GW_FIELD_REAL}, {f_s, GW_FIELD_REAL}, {f_r, GW_FIELD_REAL}};
    snprintf(desc, sizeof desc,
             "Observation wells: observed and simulated head (%s, bilinear between cell centres) and residual = "
             "observed - simulated.",
             u->lw);
    if (gw_gpkg_layer(g, "observations", GW_VGEOM_POINT, fl, 4, desc, err) != 0) return -1;
    for (int i = 0; i < m->nobs; i++) {
        const gw_obs_spec *o = &m->obs[i];
        double xy[2] = {o->x, o->y};
        const double *part = xy;
        int one = 1;
        double sim = (r->obs_simulated && i < r->nobs) ? r->obs_simulated[i] : NAN;
        gw_fvalue v[4] = {{.s = o->name}, {.d = o->head}, {.d = sim}, {.d = o->head - sim}};
        if (gw_gpkg_add(g, &part, &one, 1, v, err) != 0) return -1;
    }
    return 0;
}

static int layer_contours(gw_gpkg *g, const gw_results *r, const units *u, gw_error *err)
{
    char f_h[64], desc[200];
    snprintf(f_h, sizeof f_h, "head_%s", u->L);
    snprintf(desc, sizeof desc, "Head contours (%s) of the cell-centre heads.", u->lw);
    return gw_gpkg_contours(g, "head_contours", &r->problem->grid, r->solution.head, r->model->contour_interval, f_h,
                            desc, err);
}

/* ---- analysis layers ---------------------------------------------------- */

int gw_gpkg_write_divides(gw_gpkg *g, const gw_results *r, const gw_divide_analysis *da, gw_error *err);
int gw_gpkg_write_divides(gw_gpkg *g, const gw_results *r, const gw_divide_analysis *da, gw_error *err)
{
    units u;
    units_of(r->model, &u);
    const gw_problem *p = r->problem;
    char f_len[64], f_a[64], f_ra[64], f_rch[120], f_h[64], desc[400];

    snprintf(f_len, sizeof f_len, "length_%s", u.L);
    gw_field fd[] = {{"feature_a", GW_FIELD_TEXT}, {"feature_b", GW_FIELD_TEXT}, {f_len, GW_FIELD_REAL}};
    snprintf(desc, sizeof desc, "Groundwater divides: lines separating the catchments of feature_a and feature_b "
                                "(length in %s).", u.lw);
    if (gw_gpkg_layer(g, "divides", GW_VGEOM_LINE, fd, 3, desc, err) != 0) return -1;
    for (int i = 0; i < da->divides.n; i++) {
        const gw_divide *d = &da->divides.d[i];
        double len = 0;
        for (int k = 0; k + 1 < d->npts; k++) len += hypot(d->xy[2 * k + 2] - d->xy[2 * k], d->xy[2 * k + 3] - d->xy[2 * k + 1]);
        const double *part = d->xy;
        gw_fvalue v[3] = {{.s = gw_results_feature_name(r, d->a)}, {.s = gw_results_feature_name(r, d->b)}, {.d = len}};
        if (d->npts >= 2 && gw_gpkg_add(g, &part, &d->npts, 1, v, err) != 0) return -1;
    }

    /* Catchments: polygons of the cells whose water mostly ends in each
     * feature; report_area is the report's share-weighted area. */
    const gw_catchments *c = &da->catchments;
    char f_m[64];
    snprintf(f_a, sizeof f_a, "area_%s", u.A);
    snprintf(f_ra, sizeof f_ra, "report_area_%s", u.A);
    snprintf(f_m, sizeof f_m, "mixed_area_%s", u.A);
    snprintf(f_rch, sizeof f_rch, "recharge_%s", u.Q);
    gw_field fc[] = {{"feature", GW_FIELD_TEXT}, {"type", GW_FIELD_TEXT}, {f_ra, GW_FIELD_REAL},
                     {f_m, GW_FIELD_REAL},       {f_rch, GW_FIELD_REAL}};
    enum { NF = 5 };
    size_t ncell = gw_grid_ncells(&p->grid);
    gw_fvalue *vals = calloc((size_t)(p->nfeatures ? p->nfeatures : 1) * NF, sizeof *vals);
    double *share = malloc(ncell * sizeof *share);
    gw_flowfield ff;
    memset(&ff, 0, sizeof ff);
    if (!vals || !share) {
        free(vals);
        free(share);
        return gw_fail(err, "out of memory");
    }
    /* mixed_area: cells sending only part of their water to the feature.
     * The polygon (dominant cells) and the share-weighted report area can
     * differ by at most this much, since they agree on every other cell. */
    /* The catchment analysis keeps these areas; recompute them only when
     * it did not. */
    int rc = c->mixed_area ? 0 : gw_flowfield_compute(p, &r->solution, &ff, err);
    for (int f = 0; rc == 0 && f < p->nfeatures; f++) {
        double mixed = 0.0;
        if (c->mixed_area) {
            mixed = c->dominant && c->area && c->area[f] > 0.0 ? c->mixed_area[f] : 0.0;
        } else if (c->dominant && c->area && c->area[f] > 0.0) {
            rc = gw_catchment_share(p, &ff, f, share, err);
            for (size_t k = 0; rc == 0 && k < ncell; k++)
                if (share[k] > 1e-12 && share[k] < 1.0 - 1e-12) mixed += p->grid.dx * p->grid.dy;
        }
        vals[NF * f + 0].s = p->features[f].name;
        vals[NF * f + 1].s = gw_feature_type_name(p->features[f].type);
        vals[NF * f + 2].d = c->area ? c->area[f] : NAN;
        vals[NF * f + 3].d = mixed;
        vals[NF * f + 4].d = c->recharge ? c->recharge[f] : NAN;
    }
    gw_flowfield_free(&ff);
    free(share);
    snprintf(desc, sizeof desc,
             "Catchments: cells whose water mostly ends in the feature (dominant share), one multipolygon per "
             "feature. area = polygon area (%s2); report_area = area weighted by each cell's share, as in "
             "report.json; mixed_area = area of cells sending only part of their water to the feature (the two "
             "areas differ by at most this); recharge ending in the feature (%s3/%s).",
             u.lw, u.lw, u.tw);
    if (rc == 0)
        rc = gw_gpkg_class_polygons(g, "catchments", &p->grid, c->dominant, p->nfeatures, fc, NF, vals, f_a, desc,
                                    err);
    free(vals);
    if (rc != 0) return -1;

    snprintf(f_h, sizeof f_h, "head_%s", u.L);
    gw_field fs[] = {{"type", GW_FIELD_TEXT}, {f_h, GW_FIELD_REAL}};
    snprintf(desc, sizeof desc, "Stagnation points (zero Darcy flux): maximum, saddle or minimum of head (%s).", u.lw);
    if (gw_gpkg_layer(g, "stagnation_points", GW_VGEOM_POINT, fs, 2, desc, err) != 0) return -1;
    for (int i = 0; i < da->nstagnation; i++) {
        const gw_stagnation *s = &da->stagnation[i];
        double xy[2] = {s->x, s->y};
        const double *part = xy;
        int one = 1;
        gw_fvalue v[2] = {{.s = gw_stag_type_name(s->type)}, {.d = s->head}};
        if (gw_gpkg_add(g, &part, &one, 1, v, err) != 0) return -1;
    }
    return 0;
}

/* One capture or travel-time zone as a feature: each outer ring followed
 * by the holes that lie in it, orientation fixed (outer counter-clockwise). */
static int add_zone(gw_gpkg *g, const gw_capzone *z, const gw_fvalue *v, gw_error *err)
{
    if (z->nring <= 0) return 0;
    double **xy = calloc((size_t)z->nring, sizeof *xy);
    double **parts = calloc((size_t)z->nring, sizeof *parts);
    int *n = calloc((size_t)z->nring, sizeof *n);
    int rc = -1, np = 0;
    if (!xy || !parts || !n) { gw_fail(err, "out of memory"); goto done; }
    for (int i = 0; i < z->nring; i++) {
        const gw_capring *r = &z->ring[i];
        if (!(xy[i] = malloc((size_t)(r->n > 0 ? r->n : 1) * 2 * sizeof **xy))) { gw_fail(err, "out of memory"); goto done; }
        /* store outer rings counter-clockwise and holes clockwise */
        int flip = (r->area > 0) != (ring_signed_area(r) > 0);
        for (int j = 0; j < r->n; j++) {
            int s = flip ? r->n - 1 - j : j;
            xy[i][2 * j] = r->x[s];
            xy[i][2 * j + 1] = r->y[s];
        }
    }
    for (int i = 0; i < z->nring; i++) {
        if (!(z->ring[i].area > 0) || z->ring[i].n < 3) continue;
        parts[np] = xy[i];
        n[np++] = z->ring[i].n;
        for (int h = 0; h < z->nring; h++)
            if (z->ring[h].area < 0 && z->ring[h].n >= 3 &&
                gw_point_in_polygon(xy[h][0], xy[h][1], xy[i], z->ring[i].n)) {
                parts[np] = xy[h];
                n[np++] = z->ring[h].n;
            }
    }
    rc = np > 0 ? gw_gpkg_add(g, (const double *const *)parts, n, np, v, err) : 0;
done:
    for (int i = 0; xy && i < z->nring; i++) free(xy[i]);
    free(xy);
    free(parts);
    free(n);
    return rc;
}

int gw_gpkg_write_capture(gw_gpkg *g, const gw_results *r, const gw_capture *c, gw_error *err);
int gw_gpkg_write_capture(gw_gpkg *g, const gw_results *r, const gw_capture *c, gw_error *err)
{
    units u;
    units_of(r->model, &u);
    char f_a[64], f_q[120], f_t[64], desc[400];
    snprintf(f_a, sizeof f_a, "area_%s", u.A);
    snprintf(f_q, sizeof f_q, "pumping_%s", u.Q);
    snprintf(f_t, sizeof f_t, "time_%s", u.T);
    gw_field fc[] = {{"well", GW_FIELD_TEXT}, {f_q, GW_FIELD_REAL}, {f_a, GW_FIELD_REAL}};
    snprintf(desc, sizeof desc,
             "Steady-state capture zones (contributing areas) of pumping wells: the ground whose recharge ends in "
             "the well. area in %s2, holes subtracted; pumping in %s3/%s.",
             u.lw, u.lw, u.tw);
    if (gw_gpkg_layer(g, "capture_zones", GW_VGEOM_POLYGON, fc, 3, desc, err) != 0) return -1;
    for (int i = 0; i < c->nzone; i++) {
        const gw_capture_zone *z = &c->zone[i];
        gw_fvalue v[3] = {{.s = gw_results_feature_name(r, z->feature)}, {.d = z->rate}, {.d = z->capture.area}};
        if (add_zone(g, &z->capture, v, err) != 0) return -1;
    }
    gw_field ft[] = {{"well", GW_FIELD_TEXT}, {f_t, GW_FIELD_REAL}, {f_a, GW_FIELD_REAL}};
    snprintf(desc, sizeof desc,
             "Travel-time zones of pumping wells: the ground from which water reaches the well within `time` "
             "(%s), by advective particle tracking. area in %s2.",
             u.tw, u.lw);
    if (gw_gpkg_layer(g, "travel_time_zones", GW_VGEOM_POLYGON, ft, 3, desc, err) != 0) return -1;
    for (int i = 0; i < c->nzone; i++) {
        const gw_capture_zone *z = &c->zone[i];
        for (int t = 0; t < z->nttz; t++) {
            gw_fvalue v[3] = {{.s = gw_results_feature_name(r, z->feature)}, {.d = z->ttz[t].time},
                              {.d = z->ttz[t].area}};
            if (add_zone(g, &z->ttz[t], v, err) != 0) return -1;
        }
    }
    return 0;
}

int gw_gpkg_write_base(gw_gpkg *g, const gw_results *r, gw_error *err);
int gw_gpkg_write_base(gw_gpkg *g, const gw_results *r, gw_error *err)
{
    units u;
    units_of(r->model, &u);
    if (layer_contours(g, r, &u, err) != 0) return -1;
    if (r->have_budget && layer_reaches(g, r, &u, err) != 0) return -1;
    if (layer_wells(g, r, &u, err) != 0) return -1;
    if (layer_observations(g, r, &u, err) != 0) return -1;
    return 0;
}

int gw_results_gpkg_write(const gw_results *r, const char *path, gw_error *err)
{
    if (!r->model || !r->problem || !r->have_solution) return gw_fail(err, "internal error: results.gpkg before a solution");
    gw_gpkg *g = gw_gpkg_create(path, r->problem->type == GW_SECTION ? NULL : r->model->crs, err);
    if (!g) return -1;
    if (gw_gpkg_write_base(g, r, err) != 0) goto fail;
    if (r->divides && gw_gpkg_write_divides(g, r, r->divides, err) != 0) goto fail;
    if (r->capture && gw_gpkg_write_capture(g, r, r->capture, err) != 0) goto fail;
    return gw_gpkg_close(g, err);
fail:
    gw_gpkg_abort(g);
    return gw_fail_prefix(err, "results.gpkg: ");
}
