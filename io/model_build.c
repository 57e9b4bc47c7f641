/* gw_model (map coordinates, named features) -> gw_problem (cells).
 *
 * Lines are cut at grid lines (gw_rasterize_line).  Values given per vertex
 * vary linearly with distance along the line, so the value at a piece's
 * midpoint is the piece's average; a cell holding several pieces of one
 * feature gets their length-weighted average, and one link whose
 * conductance is the conductance per length times the length in the cell. */
#include "model.h"

#include "../solver/rasterize.h"
#include "gis_raster.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

typedef enum { C_ANY = 0, C_POSITIVE, C_FRACTION } gw_constraint;

#define AT(s) (s).file ? (s).file : "(model)", (s).line, (s).col

static void cell_xy(const gw_grid *g, int k, int *c, int *r, double *x, double *y)
{
    *c = k % g->nx;
    *r = k / g->nx;
    *x = gw_grid_xc(g, *c);
    *y = gw_grid_yc(g, *r);
}

static int check_cells(const gw_model *m, const gw_property *prop, const char *name, gw_constraint c,
                       const unsigned char *active, const double *v, gw_error *err)
{
    const gw_grid *g = &m->grid;
    size_t n = gw_grid_ncells(g);
    for (size_t k = 0; k < n; k++) {
        if (!active[k]) continue;
        double x = v[k];
        int ok = isfinite(x) && (c == C_ANY || (c == C_POSITIVE && x > 0.0) ||
                                 (c == C_FRACTION && x > 0.0 && x <= 1.0));
        if (!ok) {
            int col, row;
            double cx, cy;
            cell_xy(g, (int)k, &col, &row, &cx, &cy);
            return gw_fail(err, "%s:%d:%d: %s is %g in cell col %d, row %d (x %g, y %g); it must be %s",
                           AT(prop->src), name, x, col, row, cx, cy,
                           c == C_POSITIVE ? "greater than zero" : c == C_FRACTION ? "in (0, 1]" : "finite");
        }
    }
    return 0;
}

/* Fill v (one value per cell) from a property; checks values of active cells. */
static int fill_property(const gw_model *m, const gw_property *prop, const char *name, gw_constraint c,
                         const unsigned char *active, double *v, gw_error *err)
{
    const gw_grid *g = &m->grid;
    size_t n = gw_grid_ncells(g);
    for (size_t k = 0; k < n; k++) v[k] = prop->value;
    if (prop->kind == GW_PROP_RASTER) {
        char what[512];
        snprintf(what, sizeof what, "%s:%d:%d: %s", AT(prop->src), name);
        /* Conductivity-like properties average geometrically, the rest by
         * area (gis_raster.h states why). */
        gw_raster_query q = { prop->raster, prop->band, prop->scale,
                              (prop == &m->conductivity || prop == &m->anisotropy) ? GW_RESAMPLE_GEOMEAN
                                                                                   : GW_RESAMPLE_MEAN,
                              m->aquifer_type == GW_SECTION ? NULL : m->crs, what, 0 };
        if (gw_raster_resample(&q, g, active, v, err) < 0) return -1;
    } else if (prop->kind == GW_PROP_ZONES && prop->nzones > 0) {
        unsigned char *mask = malloc(n);
        if (!mask) return gw_fail(err, "out of memory placing %s zones", name);
        for (int z = 0; z < prop->nzones; z++) {       /* later zones win */
            const gw_zone *zo = &prop->zones[z];
            memset(mask, 0, n);
            gw_rasterize_polygon(g, zo->polygon.xy, zo->polygon.n, mask, 1);
            for (size_t k = 0; k < n; k++)
                if (mask[k]) v[k] = zo->value;
        }
        free(mask);
    }
    return check_cells(m, prop, name, c, active, v, err);
}

/* Per-cell sums of the pieces of one line feature. */
typedef struct {
    int cell;
    double len;
    double a, b, c;   /* length-weighted sums of up to three interpolated values */
    int npoint;       /* zero-length pieces (a line touching a cell at a point) */
} cell_sum;

static int cmp_piece(const void *x, const void *y)
{
    const gw_line_piece *a = x, *b = y;
    if (a->cell != b->cell) return a->cell < b->cell ? -1 : 1;
    return (a->s_mid > b->s_mid) - (a->s_mid < b->s_mid);
}

/* Cut line `path` into cells and sum len * value for up to three per-vertex
 * value sets (NULL = unused).  *out (malloc'ed) holds one entry per cell. */
static int line_cells(const gw_grid *g, const gw_path *path, const gw_values *va, const gw_values *vb,
                      const gw_values *vc, cell_sum **out, int *nout, gw_error *err)
{
    gw_line_piece *pc = NULL;
    int npc = 0;
    *out = NULL;
    *nout = 0;
    if (gw_rasterize_line(g, path->xy, path->n, &pc, &npc, err) < 0) return -1;
    double *cum = malloc((size_t)(path->n > 0 ? path->n : 1) * sizeof *cum);
    cell_sum *cs = malloc((size_t)(npc > 0 ? npc : 1) * sizeof *cs);
    if (!cum || !cs) {
        free(pc); free(cum); free(cs);
        return gw_fail(err, "out of memory placing a line on the grid");
    }
    gw_polyline_chainage(path->xy, path->n, cum);
    qsort(pc, (size_t)npc, sizeof *pc, cmp_piece);
    int n = 0;
    for (int i = 0; i < npc; i++) {
        if (n == 0 || cs[n - 1].cell != pc[i].cell)
            cs[n++] = (cell_sum){ .cell = pc[i].cell };
        cell_sum *s = &cs[n - 1];
        /* Zero-length pieces count with weight 1 only while the cell has no
         * length at all (then their values are averaged). */
        double w = pc[i].length;
        double fa = va ? gw_interp_chainage(cum, va->v, va->n, pc[i].s_mid) : 0.0;
        double fb = vb ? gw_interp_chainage(cum, vb->v, vb->n, pc[i].s_mid) : 0.0;
        double fc = vc ? gw_interp_chainage(cum, vc->v, vc->n, pc[i].s_mid) : 0.0;
        if (w > 0.0) {
            if (s->len == 0.0 && s->npoint) { s->a = s->b = s->c = 0.0; s->npoint = 0; }
            s->len += w;
            s->a += w * fa; s->b += w * fb; s->c += w * fc;
        } else if (s->len == 0.0) {
            s->npoint++;
            s->a += fa; s->b += fb; s->c += fc;
        }
    }
    free(pc);
    free(cum);
    *out = cs;
    *nout = n;
    return 0;
}

static int add_fixed(const gw_model *m, gw_problem *p, const gw_fixed_spec *f, gw_error *err)
{
    const gw_grid *g = &m->grid;
    int fi = gw_problem_add_feature(p, f->name, GW_FEAT_FIXED_HEAD, err);
    if (fi < 0) return -1;
    int used = 0;
    if (f->is_polygon) {
        size_t n = gw_grid_ncells(g);
        unsigned char *mask = calloc(n, 1);
        if (!mask) return gw_fail(err, "out of memory placing fixed head '%s'", f->name);
        gw_rasterize_polygon(g, f->geom.xy, f->geom.n, mask, 1);
        for (size_t k = 0; k < n; k++)
            if (mask[k] && p->active[k]) {
                p->fixed[k] = f->head.v[0];
                p->fixed_feature[k] = fi;
                used++;
            }
        free(mask);
    } else {
        cell_sum *cs;
        int ncs;
        if (line_cells(g, &f->geom, &f->head, NULL, NULL, &cs, &ncs, err) < 0) return -1;
        for (int i = 0; i < ncs; i++) {
            int k = cs[i].cell;
            if (!p->active[k]) continue;
            double wsum = cs[i].len > 0.0 ? cs[i].len : (double)cs[i].npoint;
            if (!(wsum > 0.0)) continue;
            p->fixed[k] = cs[i].a / wsum;
            p->fixed_feature[k] = fi;
            used++;
        }
        free(cs);
    }
    if (!used)
        return gw_fail(err, "%s:%d:%d: fixed head '%s' covers no active cell", AT(f->src), f->name);
    return 0;
}

/* Streams and drains: one link per active cell the line crosses. */
static int add_line_links(const gw_model *m, gw_problem *p, const char *word, const char *name, gw_src src,
                          gw_feature_type ft, gw_link_kind lk, const gw_path *line, const gw_values *ref,
                          const gw_values *floor_v, const gw_values *cond, gw_error *err)
{
    int fi = gw_problem_add_feature(p, name, ft, err);
    if (fi < 0) return -1;
    cell_sum *cs;
    int ncs, used = 0;
    if (line_cells(&m->grid, line, ref, floor_v, cond, &cs, &ncs, err) < 0) return -1;
    for (int i = 0; i < ncs; i++) {
        if (!p->active[cs[i].cell] || !(cs[i].len > 0.0)) continue;
        double L = cs[i].len;
        gw_link l = { .cell = cs[i].cell, .feature = fi, .kind = lk, .cond = cs[i].c,
                      .ref = cs[i].a / L, .floor = floor_v ? cs[i].b / L : cs[i].a / L };
        if (gw_problem_add_link(p, &l, err) < 0) { free(cs); return -1; }
        used++;
    }
    free(cs);
    if (!used)
        return gw_fail(err, "%s:%d:%d: %s '%s' crosses no active cell", AT(src), word, name);
    return 0;
}

static int add_leakage(const gw_model *m, gw_problem *p, const gw_leakage_spec *lk, gw_error *err)
{
    const gw_grid *g = &m->grid;
    int fi = gw_problem_add_feature(p, lk->name, GW_FEAT_LEAKAGE, err);
    if (fi < 0) return -1;
    size_t n = gw_grid_ncells(g);
    unsigned char *mask = NULL;
    if (lk->polygon.n) {
        mask = calloc(n, 1);
        if (!mask) return gw_fail(err, "out of memory placing leakage '%s'", lk->name);
        gw_rasterize_polygon(g, lk->polygon.xy, lk->polygon.n, mask, 1);
    }
    int used = 0;
    double cond = g->dx * g->dy / lk->resistance;
    for (size_t k = 0; k < n; k++) {
        if (!p->active[k] || (mask && !mask[k])) continue;
        gw_link l = { .cell = (int)k, .feature = fi, .kind = GW_LINK_LEAKAGE, .cond = cond,
                      .ref = lk->head, .floor = -HUGE_VAL };
        if (gw_problem_add_link(p, &l, err) < 0) { free(mask); return -1; }
        used++;
    }
    free(mask);
    if (!used)
        return gw_fail(err, "%s:%d:%d: leakage '%s' covers no active cell", AT(lk->src), lk->name);
    return 0;
}

static int add_well(const gw_model *m, gw_problem *p, const gw_well_spec *w, gw_error *err)
{
    const gw_grid *g = &m->grid;
    int c, r;
    if (gw_grid_locate(g, w->x, w->y, &c, &r) != 0)
        return gw_fail(err, "%s:%d:%d: well '%s' at (%g, %g) lies outside the grid", AT(w->src), w->name,
                       w->x, w->y);
    int k = r * g->nx + c;
    if (!p->active[k])
        return gw_fail(err, "%s:%d:%d: well '%s' at (%g, %g) lies in inactive cell col %d, row %d", AT(w->src),
                       w->name, w->x, w->y, c, r);
    int fi = gw_problem_add_feature(p, w->name, GW_FEAT_WELL, err);
    if (fi < 0) return -1;
    gw_well wl = { .cell = k, .feature = fi, .rate = w->pumping, .x = w->x, .y = w->y };
    return gw_problem_add_well(p, &wl, err);
}

/* Water table (section): the cells its line crosses are fixed at the
 * elevation given along it (by default the line's own elevation), and the
 * cells above the topmost crossed cell of each column leave the model, so
 * the active section ends at the water table. */
static int add_water_table(const gw_model *m, gw_problem *p, const gw_water_table_spec *w, gw_error *err)
{
    const gw_grid *g = &m->grid;
    gw_values own = { 0 };
    const gw_values *ev = &w->elevation;
    if (!ev->v) {
        own.v = malloc((size_t)(w->line.n > 0 ? w->line.n : 1) * sizeof *own.v);
        if (!own.v) return gw_fail(err, "out of memory placing the water table");
        for (int i = 0; i < w->line.n; i++) own.v[i] = w->line.xy[2 * i + 1];
        own.n = w->line.n;
        ev = &own;
    }
    cell_sum *cs;
    int ncs;
    int rc = line_cells(g, &w->line, ev, NULL, NULL, &cs, &ncs, err);
    free(own.v);
    if (rc < 0) return -1;
    int *top = malloc((size_t)g->nx * sizeof *top);
    int fi = top ? gw_problem_add_feature(p, w->name, GW_FEAT_FIXED_HEAD, err) : -1;
    if (fi < 0) {
        free(cs);
        free(top);
        return top ? -1 : gw_fail(err, "out of memory placing the water table");
    }
    for (int c = 0; c < g->nx; c++) top[c] = g->ny;
    for (int i = 0; i < ncs; i++)
        if (cs[i].len > 0.0 && cs[i].cell / g->nx < top[cs[i].cell % g->nx])
            top[cs[i].cell % g->nx] = cs[i].cell / g->nx;
    for (int c = 0; c < g->nx; c++)   /* rows count down from the top edge */
        for (int r = 0; r < top[c] && top[c] < g->ny; r++) p->active[(size_t)r * g->nx + c] = 0;
    int used = 0;
    for (int i = 0; i < ncs; i++) {
        int k = cs[i].cell;
        if (!p->active[k] || !(cs[i].len > 0.0)) continue;
        p->fixed[k] = cs[i].a / cs[i].len;
        p->fixed_feature[k] = fi;
        used++;
    }
    free(cs);
    free(top);
    if (!used)
        return gw_fail(err, "%s:%d:%d: water table '%s' crosses no active cell", AT(w->src), w->name);
    return 0;
}

/* Seepage face (section): outflow-only links where the line lies above
 * `elevation`.  Water leaves at atmospheric pressure, so the reference head
 * is the line's own elevation in the cell.  The conductance is that of the
 * half cell between the cell centre and the face: K_n x (length of line in
 * the cell, per unit width) / (half the cell's extent across the line),
 * K_n the conductivity normal to the line (horizontal K, vertical K = K x
 * anisotropy).  Outflow is then limited by the aquifer, not by the face. */
static int add_seepage(const gw_model *m, gw_problem *p, const gw_seepage_spec *sp, gw_error *err)
{
    const gw_grid *g = &m->grid;
    const gw_path *ln = &sp->line;
    int fi = gw_problem_add_feature(p, sp->name, GW_FEAT_DRAIN, err);
    if (fi < 0) return -1;
    gw_line_piece *pc = NULL;
    int npc = 0, used = 0;
    if (gw_rasterize_line(g, ln->xy, ln->n, &pc, &npc, err) < 0) return -1;
    double *cum = malloc((size_t)ln->n * sizeof *cum), *ys = malloc((size_t)ln->n * sizeof *ys);
    if (!cum || !ys) {
        free(pc); free(cum); free(ys);
        return gw_fail(err, "out of memory placing seepage face '%s'", sp->name);
    }
    for (int i = 0; i < ln->n; i++) ys[i] = ln->xy[2 * i + 1];
    gw_polyline_chainage(ln->xy, ln->n, cum);
    qsort(pc, (size_t)npc, sizeof *pc, cmp_piece);
    for (int i = 0; i < npc;) {
        int k = pc[i].cell;
        double len = 0.0, ysum = 0.0, cond = 0.0;
        for (; i < npc && pc[i].cell == k; i++) {
            double y = gw_interp_chainage(cum, ys, ln->n, pc[i].s_mid);
            if (!(pc[i].length > 0.0) || !(y > sp->elevation) || !p->active[k]) continue;
            int sg = pc[i].segment;
            double tx = ln->xy[2 * sg + 2] - ln->xy[2 * sg], ty = ln->xy[2 * sg + 3] - ln->xy[2 * sg + 1];
            double tl = hypot(tx, ty), nx = -ty / tl, ny = tx / tl;
            double kn = p->k[k] * (nx * nx + p->anis[k] * ny * ny);
            double half = 0.5 * (fabs(nx) * g->dx + fabs(ny) * g->dy);
            len += pc[i].length;
            ysum += pc[i].length * y;
            cond += kn * pc[i].length / half;
        }
        if (!(len > 0.0)) continue;
        gw_link l = { .cell = k, .feature = fi, .kind = GW_LINK_DRAIN, .cond = cond,
                      .ref = ysum / len, .floor = ysum / len };
        if (gw_problem_add_link(p, &l, err) < 0) {
            free(pc); free(cum); free(ys);
            return -1;
        }
        used++;
    }
    free(pc);
    free(cum);
    free(ys);
    if (!used)
        return gw_fail(err, "%s:%d:%d: seepage face '%s': no part of its line above elevation %g crosses an "
                       "active cell", AT(sp->src), sp->name, sp->elevation);
    return 0;
}

static int build_cells(const gw_model *m, gw_problem *p, gw_error *err)
{
    const gw_grid *g = &m->grid;
    size_t n = gw_grid_ncells(g);
    if (m->active.n) {
        memset(p->active, 0, n);
        if (gw_rasterize_polygon(g, m->active.xy, m->active.n, p->active, 1) == 0)
            return gw_fail(err, "%s:%d:%d: aquifer.active polygon contains no cell centre", AT(m->active.src));
    }
    if (m->active_raster) {   /* mask raster: majority of each cell, nodata or outside = inactive */
        double *mask = malloc(n * sizeof *mask);
        if (!mask) return gw_fail(err, "out of memory");
        gw_raster_query q = { m->active_raster, m->active_band, 1.0, GW_RESAMPLE_MAJORITY,
                              m->aquifer_type == GW_SECTION ? NULL : m->crs, "aquifer.active.raster", 1 };
        int rc = gw_raster_resample(&q, g, NULL, mask, err);
        size_t on = 0;
        for (size_t k = 0; rc == 0 && k < n; k++) {
            if (!(isfinite(mask[k]) && mask[k] != 0.0)) p->active[k] = 0;
            on += p->active[k];
        }
        free(mask);
        if (rc < 0) return -1;
        if (on == 0) return gw_fail(err, "aquifer.active.raster %s leaves no active cell", m->active_raster);
    }
    if (fill_property(m, &m->conductivity, "aquifer.conductivity", C_POSITIVE, p->active, p->k, err) < 0 ||
        fill_property(m, &m->anisotropy, "aquifer.anisotropy", C_POSITIVE, p->active, p->anis, err) < 0 ||
        fill_property(m, &m->porosity, "aquifer.porosity", C_FRACTION, p->active, p->porosity, err) < 0 ||
        fill_property(m, &m->recharge, "recharge", C_ANY, p->active, p->recharge, err) < 0)
        return -1;
    if (m->aquifer_type == GW_SECTION) {
        for (size_t k = 0; k < n; k++) p->thick[k] = 1.0;    /* per unit width: T = K */
    } else if (m->thickness.given &&
               fill_property(m, &m->thickness, "aquifer.thickness", C_POSITIVE, p->active, p->thick, err) < 0) {
        return -1;
    }
    if (m->bottom.given && fill_property(m, &m->bottom, "aquifer.bottom", C_ANY, p->active, p->bottom, err) < 0)
        return -1;
    return 0;
}

/* In a vertical section, recharge crosses the water table: it enters the
 * uppermost active cell of each column only, as R x dx per unit width
 * (stored as a rate over the cell's dx x dy so budgets need no special case). */
static void section_recharge_on_top(gw_problem *p)
{
    const gw_grid *g = &p->grid;
    for (int c = 0; c < g->nx; c++) {
        int top = 1;
        for (int r = 0; r < g->ny; r++) {
            size_t k = (size_t)r * g->nx + c;
            if (!p->active[k])
                continue;
            p->recharge[k] = top ? p->recharge[k] / g->dy : 0.0;
            top = 0;
        }
    }
}

gw_problem *gw_model_build(const gw_model *m, gw_error *err)
{
    gw_problem *p = gw_problem_new(&m->grid, m->aquifer_type, err);
    if (!p) return NULL;
    if (build_cells(m, p, err) < 0) goto fail;
    if (m->water_table && add_water_table(m, p, m->water_table, err) < 0) goto fail;
    for (int i = 0; i < m->nfixed; i++)
        if (add_fixed(m, p, &m->fixed[i], err) < 0) goto fail;
    for (int i = 0; i < m->nstreams; i++) {
        const gw_stream_spec *s = &m->streams[i];
        if (add_line_links(m, p, "stream", s->name, s->src, GW_FEAT_STREAM, GW_LINK_STREAM, &s->line,
                           &s->stage, &s->bed_bottom, &s->bed_conductance, err) < 0)
            goto fail;
    }
    for (int i = 0; i < m->ndrains; i++) {
        const gw_drain_spec *d = &m->drains[i];
        if (add_line_links(m, p, "drain", d->name, d->src, GW_FEAT_DRAIN, GW_LINK_DRAIN, &d->line,
                           &d->elevation, NULL, &d->conductance, err) < 0)
            goto fail;
    }
    for (int i = 0; i < m->nwells; i++)
        if (add_well(m, p, &m->wells[i], err) < 0) goto fail;
    for (int i = 0; i < m->nleakage; i++)
        if (add_leakage(m, p, &m->leakage[i], err) < 0) goto fail;
    for (int i = 0; i < m->nseepage; i++)
        if (add_seepage(m, p, &m->seepage[i], err) < 0) goto fail;
    if (m->aquifer_type == GW_SECTION)
        section_recharge_on_top(p);
    if (gw_problem_check_bounded(p, err) < 0) {
        gw_fail_prefix(err, "%s: ", m->path ? m->path : "(model)");
        goto fail;
    }
    return p;
fail:
    gw_problem_free(p);
    return NULL;
}
