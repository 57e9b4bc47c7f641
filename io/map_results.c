#include "map_results.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "map_budget.h"
#include "map_catchment.h"
#include "map_head.h"
#include "map_layers.h"
#include "map_profile.h"
#include "map_section.h"
#include "report_html.h"

/* Everything gw_maps_write allocates, freed in one place. */
typedef struct {
    gw_map_layers l;
    gw_map_divide *div;
    gw_map_stag *stag;
    gw_map_catchment *cat;
    gw_map_capture *cap;
    gw_map_tt_zone *tt;
    double *ringxy;          /* all ring vertices, packed */
    gw_map_path *rings;      /* further rings of the zones, packed */
} layers_buf;

static void buf_free(layers_buf *b)
{
    gw_map_layers_free(&b->l);
    free(b->div);
    free(b->stag);
    free(b->cat);
    free(b->cap);
    free(b->tt);
    free(b->ringxy);
    free(b->rings);
}

static void pack_one(const gw_capring *rg, double **cursor, gw_map_path *out)
{
    double *p = *cursor;
    for (int i = 0; i < rg->n; i++) {
        p[2 * i] = rg->x[i];
        p[2 * i + 1] = rg->y[i];
    }
    out->xy = p;
    out->n = rg->n;
    *cursor = p + 2 * rg->n;
}

/* The largest outer ring into *out, every other ring (parts, holes) into
 * *rings (advanced past them). */
static int pack_ring(const gw_capzone *z, double **cursor, gw_map_path *out,
                     gw_map_path **rings, const gw_map_path **first, int *nrings)
{
    out->xy = NULL;
    out->n = 0;
    *first = *rings;
    *nrings = 0;
    if (z->outer < 0 || z->outer >= z->nring) return 0;
    pack_one(&z->ring[z->outer], cursor, out);
    for (int i = 0; i < z->nring; i++)
        if (i != z->outer) {
            pack_one(&z->ring[i], cursor, *rings);
            ++*rings;
            ++*nrings;
        }
    return 0;
}

static int build_layers(const gw_results *r, layers_buf *b, gw_error *err)
{
    memset(b, 0, sizeof *b);
    gw_map_layers_init(&b->l);
    const gw_problem *p = r->problem;
    if (gw_map_layers_from_model(&b->l, r->model, p, r->obs_simulated, err) != 0) return -1;
    if (r->divides) {
        const gw_divide_analysis *a = r->divides;
        int nd = a->divides.n;
        b->div = calloc((size_t)(nd ? nd : 1), sizeof *b->div);
        b->stag = calloc((size_t)(a->nstagnation ? a->nstagnation : 1), sizeof *b->stag);
        b->cat = calloc((size_t)p->nfeatures, sizeof *b->cat);
        if (!b->div || !b->stag || !b->cat) return gw_fail(err, "out of memory preparing the maps");
        for (int i = 0; i < nd; i++) {
            const gw_divide *d = &a->divides.d[i];
            b->div[i].between[0] = d->a >= 0 && d->a < p->nfeatures ? p->features[d->a].name : "?";
            b->div[i].between[1] = d->b >= 0 && d->b < p->nfeatures ? p->features[d->b].name : "?";
            b->div[i].line.xy = d->xy;
            b->div[i].line.n = d->npts;
        }
        for (int i = 0; i < a->nstagnation; i++)
            b->stag[i] = (gw_map_stag){a->stagnation[i].x, a->stagnation[i].y, a->stagnation[i].head,
                                       (gw_map_stag_type)a->stagnation[i].type};
        int nc = 0;
        const gw_catchments *c = &a->catchments;
        for (int f = 1; f < p->nfeatures && f < c->nfeatures; f++)
            if (c->discharge && c->discharge[f] && c->area && c->area[f] > 0)
                b->cat[nc++] = (gw_map_catchment){f, c->area[f], c->recharge ? c->recharge[f] : NAN};
        b->l.divides = b->div;
        b->l.ndivides = nd;
        b->l.stag = b->stag;
        b->l.nstag = a->nstagnation;
        b->l.catchment_of = c->dominant;
        b->l.catchments = b->cat;
        b->l.ncatchments = nc;
    }
    if (r->capture && r->capture->nzone > 0) {
        const gw_capture *cp = r->capture;
        long nv = 0, nz = 0, nr = 0;
        for (int i = 0; i < cp->nzone; i++) {
            const gw_capture_zone *z = &cp->zone[i];
            for (int t = -1; t < z->nttz; t++) {
                const gw_capzone *cz = t < 0 ? &z->capture : &z->ttz[t];
                for (int k = 0; cz->outer >= 0 && k < cz->nring; k++) nv += cz->ring[k].n;
                nr += cz->nring;
                if (t >= 0) nz++;
            }
        }
        b->cap = calloc((size_t)cp->nzone, sizeof *b->cap);
        b->tt = calloc((size_t)(nz ? nz : 1), sizeof *b->tt);
        b->ringxy = malloc((size_t)(nv ? nv : 1) * 2 * sizeof(double));
        b->rings = calloc((size_t)(nr ? nr : 1), sizeof *b->rings);
        if (!b->cap || !b->tt || !b->ringxy || !b->rings)
            return gw_fail(err, "out of memory preparing the maps");
        double *cur = b->ringxy;
        gw_map_path *rcur = b->rings;
        gw_map_tt_zone *tz = b->tt;
        for (int i = 0; i < cp->nzone; i++) {
            const gw_capture_zone *z = &cp->zone[i];
            gw_map_capture *mc = &b->cap[i];
            mc->well = z->feature >= 0 && z->feature < p->nfeatures ? p->features[z->feature].name : "well";
            mc->area = z->capture.area;
            pack_ring(&z->capture, &cur, &mc->polygon, &rcur, &mc->rings, &mc->nrings);
            mc->zones = tz;
            for (int t = 0; t < z->nttz; t++) {
                tz->time = z->ttz[t].time;
                tz->area = z->ttz[t].area;
                pack_ring(&z->ttz[t], &cur, &tz->polygon, &rcur, &tz->rings, &tz->nrings);
                tz++;
            }
            mc->nzones = z->nttz;
        }
        b->l.capture = b->cap;
        b->l.ncapture = cp->nzone;
    }
    return 0;
}

/* Distance along polyline t where segment (a, b) crosses it; -1 if not. */
static double crossing(const double *t, int nt, double ax, double ay, double bx, double by)
{
    double acc = 0;
    for (int i = 0; i + 1 < nt; i++) {
        double px = t[2 * i], py = t[2 * i + 1], qx = t[2 * i + 2], qy = t[2 * i + 3];
        double rx = qx - px, ry = qy - py, sx = bx - ax, sy = by - ay;
        double den = rx * sy - ry * sx;
        if (fabs(den) > 1e-300) {
            double u = ((ax - px) * sy - (ay - py) * sx) / den;
            double v = ((ax - px) * ry - (ay - py) * rx) / den;
            if (u >= 0 && u <= 1 && v >= 0 && v <= 1) return acc + u * hypot(rx, ry);
        }
        acc += hypot(rx, ry);
    }
    return -1;
}

static int write_profiles(const gw_results *r, const gw_map_layers *l, gw_outdir *o,
                          gw_report_image *img, int *nimg, char names[][64], char caps[][160],
                          gw_error *err)
{
    const gw_model *m = r->model;
    enum { NS = 400 };
    for (int i = 0; i < m->ntransects && *nimg < 12; i++) {
        const gw_transect_spec *t = &m->transects[i];
        if (t->line.n < 2) continue;
        double dist[NS], head[NS];
        if (gw_profile_sample(&r->problem->grid, r->solution.head, t->line.xy, t->line.n, NS, dist, head,
                              err) != 0)
            return -1;
        gw_profile_mark marks[32];
        int nm = 0;
        for (int d = 0; d < l->ndivides; d++)
            for (int k = 0; k + 1 < l->divides[d].line.n && nm < 32; k++) {
                const double *xy = l->divides[d].line.xy;
                double s = crossing(t->line.xy, t->line.n, xy[2 * k], xy[2 * k + 1], xy[2 * k + 2], xy[2 * k + 3]);
                if (s >= 0) marks[nm++] = (gw_profile_mark){s, -1};
            }
        char sub[160];
        snprintf(sub, sizeof sub, "Transect %s: head along the line from its first vertex", t->name ? t->name : "");
        gw_profile_curve cu = {"simulated head", dist, head, NS};
        gw_profile_chart pc = {m->title, sub, m->length_unit, m->crs, m->map_width, &cu, 1, marks, nm};
        snprintf(names[*nimg], 64, "profile_%d.png", i + 1);
        const char *path = gw_outdir_path(o, names[*nimg], err);
        if (!path || gw_map_profile_write(&pc, path, err) != 0) return -1;
        snprintf(caps[*nimg], 160, "Head profile along transect %s (triangles: divide crossings).",
                 t->name ? t->name : "");
        img[*nimg] = (gw_report_image){path, caps[*nimg]};
        (*nimg)++;
    }
    return 0;
}

int gw_maps_write(const gw_results *r, gw_outdir *o, gw_error *err)
{
    if (!r->model || !r->problem || !r->have_solution) return gw_fail(err, "maps: no solution to draw");
    layers_buf b;
    int rc = -1;
    gw_report_image img[12];
    char names[12][64];
    char caps[12][160];
    int nimg = 0;
    const char *path;
    if (build_layers(r, &b, err) != 0) goto done;

    unsigned set = r->model->map_set ? r->model->map_set : GW_MAP_ALL;   /* output.maps */
    if (r->problem->type == GW_SECTION) {
        /* A section's y is elevation: section.png replaces the plan-view head map. */
        const gw_model *m = r->model;
        gw_section_map sm = {m->title, m->length_unit, m->time_unit, m->map_width, m->contour_interval, 0};
        if ((set & GW_MAP_HEAD) && r->section) {
            if (!(path = gw_outdir_path(o, "section.png", err)) ||
                gw_map_section_write(&sm, r->problem, &r->solution, r->section, path, err) != 0)
                goto done;
            img[nimg++] = (gw_report_image){path, "Cross-section: flow systems (Toth 1963) shaded, "
                                                  "equipotentials, flow lines, dividing streamlines, water "
                                                  "table with recharge and discharge areas, hinge points."};
        }
    } else if (set & GW_MAP_HEAD) {
        if (!(path = gw_outdir_path(o, "head.png", err)) ||
            gw_map_head_write(r->problem, r->solution.head, r->have_budget ? &r->budget : NULL, &b.l, path,
                              err) != 0)
            goto done;
        img[nimg++] = (gw_report_image){path, "Head map: steady-state heads, contours, streams by gaining "
                                              "and losing reaches, wells, observation residuals, divides."};
    }
    if ((set & GW_MAP_CATCHMENTS) && b.l.catchment_of) {
        if (!(path = gw_outdir_path(o, "catchments.png", err)) ||
            gw_map_catchment_write(r->problem, &b.l, path, err) != 0)
            goto done;
        img[nimg++] = (gw_report_image){path, "Catchment map: where the water of each discharge feature "
                                              "comes from, divides, capture and travel-time zones."};
    }
    if ((set & GW_MAP_BUDGET) && r->have_budget) {
        if (!(path = gw_outdir_path(o, "budget.png", err)) ||
            gw_map_budget_write(r->problem, &r->budget, &b.l, path, err) != 0)
            goto done;
        img[nimg++] = (gw_report_image){path, "Water budget per feature, with the global balance."};
    }
    if ((set & GW_MAP_PROFILES) && write_profiles(r, &b.l, o, img, &nimg, names, caps, err) != 0) goto done;
    if (!(path = gw_outdir_path(o, "report.html", err)) ||
        gw_report_html_write(r, &b.l, img, nimg, path, err) != 0)
        goto done;
    rc = 0;
done:
    buf_free(&b);
    return rc;
}
