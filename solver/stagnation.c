#include "stagnation.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

const char *gw_stag_type_name(gw_stag_type t)
{
    switch (t) {
    case GW_STAGNATION_MAXIMUM: return "maximum";
    case GW_STAGNATION_SADDLE: return "saddle";
    case GW_STAGNATION_MINIMUM: return "minimum";
    }
    return "unknown";
}

/* Real roots of c2 t^2 + c1 t + c0 = 0 (coefficients scaled to order one);
 * returns their number (0..2), or -1 when the equation vanishes identically
 * (a line of zero flux, not a point). */
static int quad_roots(double c2, double c1, double c0, double t[2])
{
    double m = fmax(fabs(c2), fmax(fabs(c1), fabs(c0)));
    if (m < 1e-14)
        return -1;
    c2 /= m; c1 /= m; c0 /= m;
    if (fabs(c2) < 1e-12) {
        if (fabs(c1) < 1e-12)
            return 0;
        t[0] = -c0 / c1;
        return 1;
    }
    double disc = c1 * c1 - 4.0 * c2 * c0;
    if (disc < 0) {
        if (disc < -1e-12)
            return 0;
        disc = 0;
    }
    double qq = -0.5 * (c1 + copysign(sqrt(disc), c1));
    t[0] = qq / c2;
    if (qq == 0.0)
        return 1;
    t[1] = c0 / qq;
    return 2;
}

static int push_point(gw_stagnation **pts, int *n, int *cap, const gw_stagnation *s)
{
    if (*n == *cap) {
        int c = *cap ? 2 * *cap : 8;
        gw_stagnation *t = realloc(*pts, (size_t)c * sizeof *t);
        if (!t)
            return -1;
        *pts = t;
        *cap = c;
    }
    (*pts)[(*n)++] = *s;
    return 0;
}

int gw_stagnation_find(const gw_problem *p, const gw_solution *sol, const gw_flowfield *f,
                       gw_stagnation **pts, int *npts, gw_error *err)
{
    *pts = NULL;
    *npts = 0;
    const gw_grid *g = &f->grid;
    size_t nc = gw_grid_ncells(g);
    int nx = g->nx, ny = g->ny, cap = 0;
    double *ux = malloc(nc * sizeof *ux), *uy = malloc(nc * sizeof *uy);
    unsigned char *skip = malloc(nc);
    if (!ux || !uy || !skip)
        goto oom;
    /* Cells where the flux field is not smooth: boundary and feature cells. */
    for (size_t k = 0; k < nc; k++)
        skip[k] = !f->active[k] || p->fixed_feature[k] >= 0;
    for (int i = 0; i < p->nlinks; i++)
        if (p->links[i].kind != GW_LINK_LEAKAGE)
            skip[p->links[i].cell] = 1;
    for (int i = 0; i < p->nwells; i++)
        skip[p->wells[i].cell] = 1;
    /* Cell-centre flux per unit width, map orientation (y north). */
    double vmax = 0.0;
    for (size_t k = 0; k < nc; k++) {
        ux[k] = uy[k] = 0.0;
        if (!f->active[k])
            continue;
        int c = (int)(k % (size_t)nx);
        double qw = c > 0 ? f->qe[k - 1] : 0.0, qn = k >= (size_t)nx ? f->qs[k - nx] : 0.0;
        ux[k] = 0.5 * (qw + f->qe[k]) / g->dy;
        uy[k] = -0.5 * (qn + f->qs[k]) / g->dx;
        vmax = fmax(vmax, fmax(fabs(ux[k]), fabs(uy[k])));
    }
    if (vmax > 0) {
        /* Below this a component counts as zero: round-off of symmetric or
         * one-dimensional fields must not create points. */
        double tol = 1e-9;
        double dedup = 1e-6;
        for (int r = 0; r + 1 < ny; r++)
            for (int c = 0; c + 1 < nx; c++) {
                size_t k[4] = { (size_t)r * nx + c, (size_t)r * nx + c + 1,
                                (size_t)(r + 1) * nx + c, (size_t)(r + 1) * nx + c + 1 };
                if (skip[k[0]] || skip[k[1]] || skip[k[2]] || skip[k[3]])
                    continue;
                double vx[4], vy[4];
                int px = 0, mx = 0, zx = 0, py = 0, my = 0, zy = 0;
                for (int i = 0; i < 4; i++) {
                    vx[i] = ux[k[i]] / vmax;
                    vy[i] = uy[k[i]] / vmax;
                    if (fabs(vx[i]) < tol) vx[i] = 0.0;
                    if (fabs(vy[i]) < tol) vy[i] = 0.0;
                    px |= vx[i] > 0; mx |= vx[i] < 0; zx |= vx[i] == 0;
                    py |= vy[i] > 0; my |= vy[i] < 0; zy |= vy[i] == 0;
                }
                /* Both components must reach zero inside the square, and
                 * neither may vanish on all four corners (a line of zeros,
                 * as in a 1-D field, has no isolated point). */
                if (!(px || mx) || !(py || my) || !((px && mx) || zx) || !((py && my) || zy))
                    continue;
                /* v(s,t) = v0 + v1 s + v2 t + v3 s t; s east, t south. */
                double a0 = vx[0], a1 = vx[1] - vx[0], a2 = vx[2] - vx[0],
                       a3 = vx[0] - vx[1] - vx[2] + vx[3];
                double b0 = vy[0], b1 = vy[1] - vy[0], b2 = vy[2] - vy[0],
                       b3 = vy[0] - vy[1] - vy[2] + vy[3];
                double ts[2];
                int nr = quad_roots(b2 * a3 - b3 * a2, b0 * a3 + b2 * a1 - b1 * a2 - b3 * a0,
                                    b0 * a1 - b1 * a0, ts);
                for (int i = 0; i < nr; i++) {
                    double t = ts[i], eps = 1e-9;
                    if (t < -eps || t > 1 + eps)
                        continue;
                    t = fmin(1.0, fmax(0.0, t));
                    double da = a1 + a3 * t, db = b1 + b3 * t, s;
                    if (fabs(da) >= fabs(db) && fabs(da) > 1e-14)
                        s = -(a0 + a2 * t) / da;
                    else if (fabs(db) > 1e-14)
                        s = -(b0 + b2 * t) / db;
                    else
                        continue;
                    if (s < -eps || s > 1 + eps)
                        continue;
                    s = fmin(1.0, fmax(0.0, s));
                    double rx = a0 + a1 * s + a2 * t + a3 * s * t;
                    double ry = b0 + b1 * s + b2 * t + b3 * s * t;
                    if (fabs(rx) > 1e-8 || fabs(ry) > 1e-8)
                        continue;
                    /* Flux Jacobian in map coordinates (d/dy = -d/dt / dy). */
                    double jxx = (a1 + a3 * t) / g->dx, jxy = -(a2 + a3 * s) / g->dy;
                    double jyx = (b1 + b3 * t) / g->dx, jyy = -(b2 + b3 * s) / g->dy;
                    double det = jxx * jyy - jxy * jyx, tr = jxx + jyy;
                    gw_stagnation sp;
                    sp.x = gw_grid_xc(g, c) + s * g->dx;
                    sp.y = gw_grid_yc(g, r) - t * g->dy;
                    const double *h = sol->head;
                    sp.head = (1 - s) * (1 - t) * h[k[0]] + s * (1 - t) * h[k[1]] +
                              (1 - s) * t * h[k[2]] + s * t * h[k[3]];
                    if (det < 0)
                        sp.type = GW_STAGNATION_SADDLE;
                    else if (tr > 0)
                        sp.type = GW_STAGNATION_MAXIMUM;
                    else if (tr < 0)
                        sp.type = GW_STAGNATION_MINIMUM;
                    else
                        continue;   /* degenerate: no isolated point */
                    int col, row;
                    sp.cell = gw_grid_locate(g, sp.x, sp.y, &col, &row) == 0 ? row * nx + col : -1;
                    /* Points on a shared edge or corner are found twice. */
                    int dup = 0;
                    for (int j = 0; j < *npts && !dup; j++)
                        dup = fabs((*pts)[j].x - sp.x) < dedup * g->dx &&
                              fabs((*pts)[j].y - sp.y) < dedup * g->dy;
                    if (!dup && push_point(pts, npts, &cap, &sp))
                        goto oom;
                }
            }
    }
    free(ux);
    free(uy);
    free(skip);
    return 0;
oom:
    free(ux);
    free(uy);
    free(skip);
    free(*pts);
    *pts = NULL;
    *npts = 0;
    return gw_fail(err, "out of memory locating stagnation points");
}
