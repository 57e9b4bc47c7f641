#include "track.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

const char *gw_track_end_name(gw_track_end e)
{
    switch (e) {
    case GW_END_NONE: return "none";
    case GW_END_SINK: return "sink";
    case GW_END_STOP_CELL: return "stop_cell";
    case GW_END_BOUNDARY: return "boundary";
    case GW_END_INACTIVE: return "inactive";
    case GW_END_STAGNATION: return "stagnation";
    case GW_END_TIME: return "time";
    case GW_END_MAX_STEPS: return "max_steps";
    }
    return "none";
}

void gw_track_options_default(gw_track_options *o)
{
    o->backward = 0;
    o->max_time = 0.0;
    o->max_steps = 0;
    o->weak = GW_WEAK_THRESHOLD;
    o->weak_threshold = 0.5;
    o->stop_mask = NULL;
    o->record_path = 0;
    o->no_length = 0;
    o->cells = NULL;
    o->face_hook = NULL;
    o->face_ctx = NULL;
}

void gw_track_result_free(gw_track_result *r)
{
    if (!r)
        return;
    free(r->px);
    free(r->py);
    r->px = r->py = NULL;
    r->npath = r->cap = 0;
}

/* Face fluxes of cell k in the tracking direction, L^3/T:
 * fx1 west face, fx2 east face (positive eastward), fy1 south face, fy2
 * north face (positive northward). */
typedef struct {
    double fx1, fx2, fy1, fy2;
} cell_flux;

static cell_flux face_fluxes_at(const gw_flowfield *f, int k, int col, int row, double sgn)
{
    const gw_grid *g = &f->grid;
    cell_flux c;
    c.fx1 = col > 0 ? f->qe[k - 1] : 0.0;
    c.fx2 = col + 1 < g->nx ? f->qe[k] : 0.0;
    c.fy1 = row + 1 < g->ny ? -f->qs[k] : 0.0;
    c.fy2 = row > 0 ? -f->qs[k - g->nx] : 0.0;
    c.fx1 *= sgn; c.fx2 *= sgn; c.fy1 *= sgn; c.fy2 *= sgn;
    return c;
}

static cell_flux face_fluxes(const gw_flowfield *f, int k, double sgn)
{
    return face_fluxes_at(f, k, k % f->grid.nx, k / f->grid.nx, sgn);
}

static int usable(const gw_flowfield *f, int k)
{
    return f->active[k] && f->sat_thick[k] > 0.0 && f->porosity[k] > 0.0;
}

/* Time for a particle at p (distance from face 1, 0 <= p <= len) to leave
 * the cell along one axis, with velocity v1 at face 1 and v2 at face 2;
 * dir = +1 (face 2) or -1 (face 1).  HUGE_VAL when it cannot leave.
 * The logarithm is taken only when needed (exit_time): until then lo..hi
 * brackets the time, since the speed moves monotonically from v_p to
 * v_face, so the time lies between dist / v_p and dist / v_face. */
typedef struct {
    double t, lo, hi;     /* t valid when !lazy */
    double z, a, dir;
    int lazy;
} exit_est;

/* a = (v2 - v1) / len, the velocity gradient, computed by the caller. */
static void exit_estimate(double v1, double v2, double a, double len, double p, exit_est *e)
{
    double vp = v1 + a * p;
    double dist, z;
    e->dir = 0.0;
    e->lazy = 0;
    e->t = e->lo = e->hi = HUGE_VAL;
    if (vp > 0.0) {
        if (v2 <= 0.0)
            return;
        e->dir = 1.0;
        dist = len - p;
    } else if (vp < 0.0) {
        if (v1 >= 0.0)
            return;
        e->dir = -1.0;
        dist = -p;
    } else {
        return;
    }
    /* v_face / v_p = 1 + a dist / vp; log1p keeps precision when a -> 0. */
    z = a * dist / vp;
    if (fabs(z) < 1e-12) {
        e->t = e->lo = e->hi = dist / vp;
        return;
    }
    if (z <= -1.0)
        return;
    /* t = (dist / vp) log1p(z) / z, and log1p(z) / z lies in [1/(1+z), 1]. */
    double base = dist / vp, inv = 1.0 / (1.0 + z);
    e->lo = inv < 1.0 ? base * inv : base;
    e->hi = inv < 1.0 ? base : base * inv;
    e->z = z;
    e->a = a;
    e->lazy = 1;
}

static double exit_time(exit_est *e)
{
    if (e->lazy) {
        e->t = log1p(e->z) / e->a;
        e->lazy = 0;
    }
    return e->t;
}

/* Exit times along x and y: exact for the axis left first; the other
 * one is exact too unless the brackets show it comes clearly later, in
 * which case it is reported as HUGE_VAL (nothing downstream needs it: the
 * step is decided by the earlier time alone). */
static void exit_times(exit_est *ex, exit_est *ey, double *tx, double *ty)
{
    const double margin = 1.0 + 1e-9;   /* far above the brackets' round-off */
    if (ex->hi * margin < ey->lo) {
        *tx = exit_time(ex);
        *ty = HUGE_VAL;
    } else if (ey->hi * margin < ex->lo) {
        *tx = HUGE_VAL;
        *ty = exit_time(ey);
    } else {
        *tx = exit_time(ex);
        *ty = exit_time(ey);
    }
}

/* Position after time t from p with linear velocity v1 + a s. */
static double advance(double v1, double a, double len, double p, double t)
{
    double vp = v1 + a * p;
    double at = a * t;
    double np = fabs(at) < 1e-12 ? p + vp * t : p + vp * expm1(at) / a;
    if (np < 0.0) np = 0.0;
    if (np > len) np = len;
    return np;
}

static int push_vertex(gw_track_result *r, double x, double y, gw_error *err)
{
    if (r->npath == r->cap) {
        int nc = r->cap ? 2 * r->cap : 64;
        double *nx = realloc(r->px, (size_t)nc * sizeof *nx);
        if (!nx)
            return gw_fail(err, "out of memory recording a path");
        r->px = nx;
        double *ny = realloc(r->py, (size_t)nc * sizeof *ny);
        if (!ny)
            return gw_fail(err, "out of memory recording a path");
        r->py = ny;
        r->cap = nc;
    }
    r->px[r->npath] = x;
    r->py[r->npath] = y;
    r->npath++;
    return 0;
}

void gw_track_velocity(const gw_flowfield *f, double x, double y, double *vx, double *vy)
{
    const gw_grid *g = &f->grid;
    int col, row;
    *vx = *vy = 0.0;
    if (gw_grid_locate(g, x, y, &col, &row) != 0)
        return;
    int k = row * g->nx + col;
    if (!usable(f, k))
        return;
    cell_flux c = face_fluxes(f, k, 1.0);
    double bn = f->sat_thick[k] * f->porosity[k];
    double px = x - (g->x0 + col * g->dx), py = y - (gw_grid_ytop(g) - (row + 1) * g->dy);
    double tx = px / g->dx, ty = py / g->dy;
    *vx = ((1.0 - tx) * c.fx1 + tx * c.fx2) / (g->dy * bn);
    *vy = ((1.0 - ty) * c.fy1 + ty * c.fy2) / (g->dx * bn);
}

int gw_track_sink_stops(const gw_flowfield *f, int k, const gw_track_options *o, double *frac)
{
    double s = o->backward ? f->src[k] : f->sink[k];
    double other = o->backward ? f->sink[k] : f->src[k];
    *frac = 0.0;
    if (!(s > 0.0))
        return 0;
    cell_flux c = face_fluxes(f, k, o->backward ? -1.0 : 1.0);
    double qin = 0.0;
    int hasout = 0;
    if (c.fx1 > 0) qin += c.fx1; else if (c.fx1 < 0) hasout = 1;
    if (c.fx2 < 0) qin -= c.fx2; else if (c.fx2 > 0) hasout = 1;
    if (c.fy1 > 0) qin += c.fy1; else if (c.fy1 < 0) hasout = 1;
    if (c.fy2 < 0) qin -= c.fy2; else if (c.fy2 > 0) hasout = 1;
    double thru = other + qin;
    double fr = thru > 0.0 ? s / thru : 1.0;
    *frac = fr > 1.0 ? 1.0 : fr;
    int stop = !hasout;
    switch (o->weak) {
    case GW_WEAK_STOP: stop = 1; break;
    case GW_WEAK_PASS: break;
    case GW_WEAK_THRESHOLD: stop = stop || *frac >= o->weak_threshold; break;
    }
    return stop;
}

/* What tracking needs of one cell, in one record: face fluxes in the
 * tracking direction, 1 / (saturated thickness x porosity), and the
 * sink (source when backward) test.  Built on the fly from the flow field,
 * or copied from a gw_track_cells table (one cache line per cell instead of
 * about nine spread over the flow field's arrays) -- the same numbers
 * either way, so the paths are the same. */
typedef struct {
    double vx1, vx2, vy1, vy2;   /* seepage velocity at the faces, tracking direction */
    double ax, ay;               /* velocity gradients (v2 - v1) / length */
    double frac;          /* share of the throughput the sink takes (gw_track_sink_stops) */
    unsigned char usable; /* active, saturated, porous */
    unsigned char stops;  /* the sink stops paths (weak-sink rule) */
    unsigned char sink;   /* has a sink (forward; source backward) at all */
} cell_rec;   /* 59 bytes: one 64-byte cache line */

struct gw_track_cells {
    cell_rec *rec;        /* ncells */
    int backward;
    gw_weak_rule weak;
    double weak_threshold;
};

static void build_rec(const gw_flowfield *f, int k, int col, int row, const gw_track_options *o,
                      cell_rec *c)
{
    memset(c, 0, sizeof *c);
    c->usable = (unsigned char)usable(f, k);
    if (!c->usable)
        return;
    const gw_grid *g = &f->grid;
    cell_flux q = face_fluxes_at(f, k, col, row, o->backward ? -1.0 : 1.0);
    double ibn = 1.0 / (f->sat_thick[k] * f->porosity[k]);
    double ix = ibn / g->dy, iy = ibn / g->dx;
    c->vx1 = q.fx1 * ix;
    c->vx2 = q.fx2 * ix;
    c->vy1 = q.fy1 * iy;
    c->vy2 = q.fy2 * iy;
    c->ax = (c->vx2 - c->vx1) / g->dx;
    c->ay = (c->vy2 - c->vy1) / g->dy;
    c->stops = (unsigned char)gw_track_sink_stops(f, k, o, &c->frac);
    c->sink = (o->backward ? f->src[k] : f->sink[k]) > 0.0;
}

gw_track_cells *gw_track_cells_new(const gw_flowfield *f, const gw_track_options *o,
                                   gw_error *err)
{
    const gw_grid *g = &f->grid;
    size_t nc = gw_grid_ncells(g);
    gw_track_cells *t = malloc(sizeof *t);
    /* Records aligned to cache lines (size rounded up for aligned_alloc). */
    size_t bytes = (nc ? nc : 1) * sizeof(cell_rec);
    cell_rec *rec = sizeof(cell_rec) == 64 ? aligned_alloc(64, bytes) : malloc(bytes);
    if (!t || !rec) {
        free(t);
        free(rec);
        gw_fail(err, "out of memory preparing %zu cells for particle tracking", nc);
        return NULL;
    }
    for (int row = 0; row < g->ny; row++)
        for (int col = 0; col < g->nx; col++) {
            int k = row * g->nx + col;
            build_rec(f, k, col, row, o, &rec[k]);
        }
    t->rec = rec;
    t->backward = o->backward;
    t->weak = o->weak;
    t->weak_threshold = o->weak_threshold;
    return t;
}

void gw_track_cells_free(gw_track_cells *t)
{
    if (!t)
        return;
    free(t->rec);
    free(t);
}

/* Record of cell k: from the table when it was prepared for these options. */
static const cell_rec *get_rec(const gw_flowfield *f, int k, int col, int row,
                               const gw_track_options *o, int use_table, cell_rec *tmp)
{
    if (use_table)
        return &o->cells->rec[k];
    build_rec(f, k, col, row, o, tmp);
    return tmp;
}

/* Decide whether a path stops on entering (or starting in) cell k.
 * Returns the end reason or GW_END_NONE; updates the weak-sink record. */
static gw_track_end check_cell(const cell_rec *c, int k, const gw_track_options *o,
                               gw_track_result *r)
{
    if (!c->usable)
        return GW_END_INACTIVE;
    if (o->stop_mask && o->stop_mask[k]) {
        r->end_fraction = 1.0;
        r->stop_value = o->stop_mask[k];
        return GW_END_STOP_CELL;
    }
    if (c->stops) {
        r->end_fraction = c->frac;
        return GW_END_SINK;
    }
    if (c->frac > 0.0) {
        r->weak_passed++;
        r->retained *= 1.0 - c->frac;
    }
    return GW_END_NONE;
}

int gw_track(const gw_flowfield *f, double x, double y, const gw_track_options *o,
             gw_track_result *r, gw_error *err)
{
    const gw_grid *g = &f->grid;
    gw_track_options def;
    if (!o) {
        gw_track_options_default(&def);
        o = &def;
    }
    const int use_table = o->cells && o->cells->backward == o->backward &&
                          o->cells->weak == o->weak &&
                          o->cells->weak_threshold == o->weak_threshold;
    cell_rec tmp;
    double *keep_x = r->px, *keep_y = r->py;
    int keep_cap = r->cap;
    *r = (gw_track_result){.end = GW_END_NONE, .x = x, .y = y, .cell = -1, .feature = -1,
                           .retained = 1.0, .px = keep_x, .py = keep_y, .cap = keep_cap};
    long max_steps = o->max_steps > 0 ? o->max_steps : 4L * (g->nx + g->ny) + 1000;
    int col, row;
    if (o->record_path && push_vertex(r, x, y, err) != 0)
        return -1;
    if (gw_grid_locate(g, x, y, &col, &row) != 0) {
        r->end = GW_END_BOUNDARY;
        return 0;
    }
    int k = row * g->nx + col;
    r->cell = k;
    const cell_rec *c = get_rec(f, k, col, row, o, use_table, &tmp);
    gw_track_end e = check_cell(c, k, o, r);
    const double ytop = gw_grid_ytop(g);
    double px = x - (g->x0 + col * g->dx), py = y - (ytop - (row + 1) * g->dy);
    if (px < 0) px = 0;
    if (px > g->dx) px = g->dx;
    if (py < 0) py = 0;
    if (py > g->dy) py = g->dy;

    while (e == GW_END_NONE) {
        if (r->steps >= max_steps) {
            e = GW_END_MAX_STEPS;
            break;
        }
        const double vx1 = c->vx1, vy1 = c->vy1, ax = c->ax, ay = c->ay;
        exit_est ex, ey;
        double tx, ty;
        exit_estimate(vx1, c->vx2, ax, g->dx, px, &ex);
        exit_estimate(vy1, c->vy2, ay, g->dy, py, &ey);
        exit_times(&ex, &ey, &tx, &ty);
        const double dirx = ex.dir, diry = ey.dir;
        double t = tx < ty ? tx : ty;
        double remain = o->max_time > 0 ? o->max_time - r->time : HUGE_VAL;
        if (t == HUGE_VAL && remain == HUGE_VAL) {
            /* Cannot leave: the water ends here, in a sink or stagnant. */
            if (c->sink) {
                e = GW_END_SINK;
                if (r->end_fraction == 0.0) r->end_fraction = 1.0;
            } else {
                e = GW_END_STAGNATION;
            }
            break;
        }
        if (remain <= t) {
            double nx = advance(vx1, ax, g->dx, px, remain);
            double ny = advance(vy1, ay, g->dy, py, remain);
            if (!o->no_length)
                r->length += sqrt((nx - px) * (nx - px) + (ny - py) * (ny - py));
            px = nx;
            py = ny;
            r->time += remain;
            e = GW_END_TIME;
            break;
        }
        /* Leave through the face reached first (both at a corner). */
        int exit_x = tx <= ty * (1.0 + 1e-12);
        int exit_y = ty <= tx * (1.0 + 1e-12);
        double nx = exit_x ? (dirx > 0 ? g->dx : 0.0) : advance(vx1, ax, g->dx, px, t);
        double ny = exit_y ? (diry > 0 ? g->dy : 0.0) : advance(vy1, ay, g->dy, py, t);
        if (!o->no_length)
            r->length += sqrt((nx - px) * (nx - px) + (ny - py) * (ny - py));
        r->time += t;
        r->steps++;
        int ncol = col + (exit_x ? (int)dirx : 0);
        int nrow = row - (exit_y ? (int)diry : 0);   /* north = row - 1 */
        if (o->record_path &&
            push_vertex(r, g->x0 + col * g->dx + nx, ytop - (row + 1) * g->dy + ny, err) != 0)
            return -1;
        if (ncol < 0 || ncol >= g->nx || nrow < 0 || nrow >= g->ny) {
            px = nx;
            py = ny;
            e = GW_END_BOUNDARY;
            break;
        }
        int nk = nrow * g->nx + ncol;
        if (o->face_hook && exit_x != exit_y) {
            int v = o->face_hook(o->face_ctx, k, nk, exit_x ? ny : nx);
            if (v) {
                px = nx;
                py = ny;
                r->end_fraction = 1.0;
                r->stop_value = v;
                e = GW_END_STOP_CELL;
                break;
            }
        }
        c = get_rec(f, nk, ncol, nrow, o, use_table, &tmp);
        if (!c->usable) {
            px = nx;
            py = ny;
            e = GW_END_INACTIVE;
            break;
        }
        /* Same point in the new cell's local coordinates. */
        if (exit_x) px = dirx > 0 ? 0.0 : g->dx; else px = nx;
        if (exit_y) py = diry > 0 ? 0.0 : g->dy; else py = ny;
        col = ncol;
        row = nrow;
        k = nk;
        r->cell = k;
        e = check_cell(c, k, o, r);
    }
    r->end = e;
    r->x = g->x0 + col * g->dx + px;
    r->y = ytop - (row + 1) * g->dy + py;
    if (!o->backward && (e == GW_END_SINK || e == GW_END_STOP_CELL) && f->sink_feature)
        r->feature = f->sink_feature[k];
    if (o->record_path && e != GW_END_NONE && push_vertex(r, r->x, r->y, err) != 0)
        return -1;
    return 0;
}
