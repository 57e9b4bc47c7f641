#include "transect.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "observe.h"

/* Volumetric flux (L^3/T) from cell k to its east / south neighbour, from
 * the face conductances of the final solve.  A face with no conductance
 * (grid edge, inactive neighbour) carries nothing, even next to a NAN head. */
static double flux_east(const gw_problem *p, const gw_solution *sol, int col, int row)
{
    const gw_grid *g = &p->grid;
    if (col < 0 || col >= g->nx - 1) return 0.0;
    return gw_flow_east(sol, (size_t)row * g->nx + col);
}

static double flux_south(const gw_problem *p, const gw_solution *sol, int col, int row)
{
    const gw_grid *g = &p->grid;
    if (row < 0 || row >= g->ny - 1) return 0.0;
    return gw_flow_south(sol, g->nx, (size_t)row * g->nx + col);
}

int gw_flux_at(const gw_problem *p, const gw_solution *sol, double x, double y, double *qx,
               double *qy)
{
    const gw_grid *g = &p->grid;
    int col, row;
    *qx = *qy = NAN;
    if (gw_grid_locate(g, x, y, &col, &row) != 0) return -1;
    if (!p->active[(size_t)row * g->nx + col]) return -1;
    double u = gw_grid_u(g, x) - col;                 /* 0 at the west face */
    double w = (double)(g->ny - row) - gw_grid_v(g, y); /* 0 at the south face */
    if (u < 0) u = 0; else if (u > 1) u = 1;
    if (w < 0) w = 0; else if (w > 1) w = 1;
    double qw = flux_east(p, sol, col - 1, row), qe = flux_east(p, sol, col, row);
    /* Northward-positive flux through the south and north faces. */
    double qsouth = -flux_south(p, sol, col, row), qnorth = -flux_south(p, sol, col, row - 1);
    *qx = ((1.0 - u) * qw + u * qe) / g->dy;
    *qy = ((1.0 - w) * qsouth + w * qnorth) / g->dx;
    return 0;
}

static void fill_sample(const gw_problem *p, const gw_solution *sol, double tx, double ty,
                        double dist, double x, double y, gw_transect_sample *s)
{
    double qx, qy;
    s->dist = dist;
    s->x = x;
    s->y = y;
    s->head = gw_head_at(&p->grid, sol->head, x, y);
    if (gw_flux_at(p, sol, x, y, &qx, &qy) != 0) {
        s->head = NAN;   /* outside the active area: no head either */
        s->qa = s->qn = NAN;
        return;
    }
    s->qa = qx * tx + qy * ty;
    s->qn = -qx * ty + qy * tx;   /* left normal (-ty, tx) */
}

static int cross_cmp(const void *pa, const void *pb)
{
    const gw_transect_crossing *a = pa, *b = pb;
    if (a->at.dist != b->at.dist) return a->at.dist < b->at.dist ? -1 : 1;
    return (int)a->kind - (int)b->kind;
}

/* Append to a growable crossing list. */
static int push_cross(gw_transect_crossing **v, int *n, int *cap, const gw_transect_crossing *c)
{
    if (*n == *cap) {
        int nc = *cap ? 2 * *cap : 8;
        gw_transect_crossing *nv = realloc(*v, (size_t)nc * sizeof *nv);
        if (!nv) return -1;
        *v = nv;
        *cap = nc;
    }
    (*v)[(*n)++] = *c;
    return 0;
}

int gw_transect_divide_crossings(const double *xy, int npts, const gw_divides *d,
                                 gw_transect_crossing **out, int *n, gw_error *err)
{
    *out = NULL;
    *n = 0;
    if (!d || npts < 2) return 0;
    int cap = 0;
    double total = 0.0;
    for (int s = 0; s + 1 < npts; s++) {
        double ax = xy[2 * s], ay = xy[2 * s + 1];
        double ex = xy[2 * s + 2] - ax, ey = xy[2 * s + 3] - ay;
        double len = hypot(ex, ey);
        for (int i = 0; i < d->n; i++) {
            const gw_divide *dv = &d->d[i];
            for (int j = 0; j + 1 < dv->npts; j++) {
                double cx = dv->xy[2 * j], cy = dv->xy[2 * j + 1];
                double fx = dv->xy[2 * j + 2] - cx, fy = dv->xy[2 * j + 3] - cy;
                double den = ex * fy - ey * fx;
                if (den == 0.0) continue;   /* parallel: touching, not crossing */
                double t = ((cx - ax) * fy - (cy - ay) * fx) / den;
                double u = ((cx - ax) * ey - (cy - ay) * ex) / den;
                if (t < 0.0 || t > 1.0 || u < 0.0 || u > 1.0) continue;
                gw_transect_crossing c;
                c.at.dist = total + t * len;
                c.at.x = ax + t * ex;
                c.at.y = ay + t * ey;
                c.at.head = c.at.qn = c.at.qa = NAN;
                c.kind = GW_CROSS_DIVIDE;
                c.a = dv->a;
                c.b = dv->b;
                c.divide = i;
                /* A hit on a shared vertex is found twice: keep one. */
                int dup = 0;
                for (int m = 0; m < *n; m++)
                    if ((*out)[m].divide == i && fabs((*out)[m].at.dist - c.at.dist) <= 1e-9 * (1.0 + fabs(c.at.dist)))
                        dup = 1;
                if (!dup && push_cross(out, n, &cap, &c) != 0) {
                    free(*out);
                    *out = NULL;
                    *n = 0;
                    return gw_fail(err, "out of memory (transect crossings)");
                }
            }
        }
        total += len;
    }
    if (*n > 1) qsort(*out, (size_t)*n, sizeof **out, cross_cmp);
    return 0;
}

/* Point and unit direction of the polyline at distance `dist`. */
static void point_at(const double *xy, int npts, const double *seg_start, double dist, double *x,
                     double *y, double *tx, double *ty)
{
    int s = 0;
    while (s + 2 < npts && seg_start[s + 1] < dist) s++;
    double ax = xy[2 * s], ay = xy[2 * s + 1];
    double ex = xy[2 * s + 2] - ax, ey = xy[2 * s + 3] - ay, len = hypot(ex, ey);
    double f = len > 0 ? (dist - seg_start[s]) / len : 0.0;
    if (f < 0) f = 0; else if (f > 1) f = 1;
    *x = ax + f * ex;
    *y = ay + f * ey;
    *tx = len > 0 ? ex / len : 1.0;
    *ty = len > 0 ? ey / len : 0.0;
}

/* Sign changes of the along-line flux between consecutive samples (zeros
 * skipped), placed by linear interpolation in distance. */
static int flux_reversals(const gw_problem *p, const gw_solution *sol, const double *xy, int npts,
                          const double *seg_start, gw_transect *t, gw_transect_crossing **v,
                          int *n, int *cap)
{
    int last = -1;   /* last sample with a non-zero finite along-line flux */
    for (int i = 0; i < t->n; i++) {
        double q = t->s[i].qa;
        if (!isfinite(q)) { last = -1; continue; }
        if (q == 0.0) continue;
        if (last >= 0 && (q > 0) != (t->s[last].qa > 0)) {
            const gw_transect_sample *a = &t->s[last], *b = &t->s[i];
            double f = a->qa / (a->qa - b->qa);
            double dist = a->dist + f * (b->dist - a->dist), x, y, tx, ty;
            point_at(xy, npts, seg_start, dist, &x, &y, &tx, &ty);
            gw_transect_crossing c;
            fill_sample(p, sol, tx, ty, dist, x, y, &c.at);
            c.kind = a->qa < 0 ? GW_CROSS_DIVERGING : GW_CROSS_CONVERGING;
            c.a = c.b = c.divide = -1;
            if (push_cross(v, n, cap, &c) != 0) return -1;
        }
        last = i;
    }
    return 0;
}

int gw_transect_compute(const gw_problem *p, const gw_solution *sol, const double *xy, int npts,
                        double spacing, const gw_divides *d, gw_transect *t, gw_error *err)
{
    memset(t, 0, sizeof *t);
    if (!xy || npts < 2) return gw_fail(err, "a transect needs at least two vertices");
    const gw_grid *g = &p->grid;
    if (!(spacing > 0)) spacing = 0.5 * (g->dx < g->dy ? g->dx : g->dy);

    /* Count samples first; keep the total bounded for absurd lines. */
    double total = 0.0;
    for (int s = 0; s + 1 < npts; s++)
        total += hypot(xy[2 * s + 2] - xy[2 * s], xy[2 * s + 3] - xy[2 * s + 1]);
    if (!isfinite(total)) return gw_fail(err, "a transect vertex is not a finite number");
    const double max_samples = 2e6;
    if (total / spacing > max_samples) spacing = total / max_samples;
    size_t cap = (size_t)npts;
    for (int s = 0; s + 1 < npts; s++) {
        double len = hypot(xy[2 * s + 2] - xy[2 * s], xy[2 * s + 3] - xy[2 * s + 1]);
        cap += (size_t)ceil(len / spacing) + 1;
    }
    t->s = malloc(cap * sizeof *t->s);
    double *seg_start = malloc((size_t)npts * sizeof *seg_start);
    if (!t->s || !seg_start) {
        free(seg_start);
        gw_transect_free(t);
        return gw_fail(err, "out of memory (transect of %zu samples)", cap);
    }

    double dist0 = 0.0;
    for (int s = 0; s + 1 < npts; s++) {
        double ax = xy[2 * s], ay = xy[2 * s + 1];
        double ex = xy[2 * s + 2] - ax, ey = xy[2 * s + 3] - ay;
        double len = hypot(ex, ey);
        seg_start[s] = dist0;
        if (len == 0.0) continue;   /* repeated vertex */
        double tx = ex / len, ty = ey / len;
        int m = (int)ceil(len / spacing);
        if (m < 1) m = 1;
        for (int i = (t->n == 0 ? 0 : 1); i <= m; i++) {
            double f = (double)i / m;
            fill_sample(p, sol, tx, ty, dist0 + f * len, ax + f * ex, ay + f * ey, &t->s[t->n++]);
        }
        dist0 += len;
    }
    seg_start[npts - 1] = dist0;
    t->length = dist0;

    gw_transect_crossing *v = NULL;
    int n = 0, vcap = 0;
    if (gw_transect_divide_crossings(xy, npts, d, &v, &n, err) != 0) {
        free(seg_start);
        gw_transect_free(t);
        return -1;
    }
    vcap = n;
    /* Head and flux at each divide crossing, on its own segment. */
    for (int i = 0; i < n; i++) {
        double x, y, tx, ty;
        point_at(xy, npts, seg_start, v[i].at.dist, &x, &y, &tx, &ty);
        fill_sample(p, sol, tx, ty, v[i].at.dist, v[i].at.x, v[i].at.y, &v[i].at);
    }
    if (flux_reversals(p, sol, xy, npts, seg_start, t, &v, &n, &vcap) != 0) {
        free(v);
        free(seg_start);
        gw_transect_free(t);
        return gw_fail(err, "out of memory (transect crossings)");
    }
    free(seg_start);
    if (n > 1) qsort(v, (size_t)n, sizeof *v, cross_cmp);
    t->c = v;
    t->ncross = n;
    return 0;
}

void gw_transect_free(gw_transect *t)
{
    if (!t) return;
    free(t->s);
    free(t->c);
    memset(t, 0, sizeof *t);
}
