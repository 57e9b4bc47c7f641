#include "rasterize.h"

#include <math.h>
#include <stdlib.h>

void gw_polyline_chainage(const double *xy, int npts, double *cum)
{
    if (npts <= 0)
        return;
    cum[0] = 0.0;
    for (int i = 1; i < npts; i++)
        cum[i] = cum[i - 1] + hypot(xy[2 * i] - xy[2 * i - 2], xy[2 * i + 1] - xy[2 * i - 1]);
}

double gw_interp_chainage(const double *cum, const double *vals, int nvals, double s)
{
    if (nvals <= 1)
        return vals[0];
    if (s <= cum[0])
        return vals[0];
    for (int i = 1; i < nvals; i++) {
        if (s <= cum[i]) {
            double span = cum[i] - cum[i - 1];
            double w = span > 0.0 ? (s - cum[i - 1]) / span : 1.0;
            return vals[i - 1] + w * (vals[i] - vals[i - 1]);
        }
    }
    return vals[nvals - 1];
}

/* Index of the cell along one axis holding fractional coordinate t, with
 * points on the far edge belonging to the last cell; -1 outside. */
static int axis_cell(double t, int n)
{
    if (!(t >= 0.0) || t > n)
        return -1;
    int i = (int)floor(t);
    return i >= n ? n - 1 : i;
}

static int cmp_double(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

/* Append the integer crossings of coordinate a(t) = a1 + t (a2 - a1),
 * t in (0, 1), limited to grid lines 0..n. */
static int add_crossings(double a1, double a2, int n, double *t, int nt)
{
    if (a1 == a2)
        return nt;
    double lo = fmin(a1, a2), hi = fmax(a1, a2);
    double kmin = fmax(ceil(lo), 0.0), kmax = fmin(floor(hi), (double)n);
    for (double k = kmin; k <= kmax; k += 1.0) {
        double tt = (k - a1) / (a2 - a1);
        if (tt > 0.0 && tt < 1.0)
            t[nt++] = tt;
    }
    return nt;
}

int gw_rasterize_line(const gw_grid *g, const double *xy, int npts,
                      gw_line_piece **pieces, int *npieces, gw_error *err)
{
    *pieces = NULL;
    *npieces = 0;
    if (npts <= 0)
        return 0;
    if (npts == 1) {
        int c, r;
        if (gw_grid_locate(g, xy[0], xy[1], &c, &r) != 0)
            return 0;
        gw_line_piece *p = malloc(sizeof *p);
        if (!p)
            return gw_fail(err, "out of memory rasterizing a line");
        *p = (gw_line_piece){ .cell = r * g->nx + c, .length = 0.0, .s_mid = 0.0, .segment = 0 };
        *pieces = p;
        *npieces = 1;
        return 0;
    }
    size_t cap = 0, n = 0;
    gw_line_piece *out = NULL;
    double *t = NULL;
    size_t tcap = 0;
    double s0 = 0.0;
    for (int i = 0; i + 1 < npts; i++) {
        double xa = xy[2 * i], ya = xy[2 * i + 1], xb = xy[2 * i + 2], yb = xy[2 * i + 3];
        double len = hypot(xb - xa, yb - ya);
        if (!(len > 0.0) || !isfinite(len)) {
            s0 += isfinite(len) ? len : 0.0;
            continue;
        }
        double ua = gw_grid_u(g, xa), ub = gw_grid_u(g, xb);
        double va = gw_grid_v(g, ya), vb = gw_grid_v(g, yb);
        /* Crossings are bounded by the grid size, not by the segment. */
        double span = fmin(fabs(ub - ua), (double)g->nx + 1) + fmin(fabs(vb - va), (double)g->ny + 1) + 4;
        if ((size_t)span > tcap) {
            size_t nc = (size_t)span + 16;
            double *tn = realloc(t, nc * sizeof *tn);
            if (!tn) {
                free(t);
                free(out);
                return gw_fail(err, "out of memory rasterizing a line");
            }
            t = tn;
            tcap = nc;
        }
        int nt = 0;
        t[nt++] = 0.0;
        nt = add_crossings(ua, ub, g->nx, t, nt);
        nt = add_crossings(va, vb, g->ny, t, nt);
        t[nt++] = 1.0;
        qsort(t, (size_t)nt, sizeof *t, cmp_double);
        for (int j = 0; j + 1 < nt; j++) {
            double dt = t[j + 1] - t[j];
            if (dt <= 1e-12)
                continue;
            double tm = 0.5 * (t[j] + t[j + 1]);
            int c = axis_cell(ua + tm * (ub - ua), g->nx);
            int r = axis_cell(va + tm * (vb - va), g->ny);
            if (c < 0 || r < 0)
                continue;
            int cell = r * g->nx + c;
            double plen = dt * len, smid = s0 + tm * len;
            if (n > 0 && out[n - 1].cell == cell && out[n - 1].segment == i) {
                /* same cell, same segment: merge (pieces split by a crossing of the other axis at a corner) */
                double L = out[n - 1].length + plen;
                out[n - 1].s_mid = (out[n - 1].s_mid * out[n - 1].length + smid * plen) / L;
                out[n - 1].length = L;
                continue;
            }
            if (n == cap) {
                size_t nc = cap ? 2 * cap : 64;
                gw_line_piece *on = realloc(out, nc * sizeof *on);
                if (!on) {
                    free(t);
                    free(out);
                    return gw_fail(err, "out of memory rasterizing a line");
                }
                out = on;
                cap = nc;
            }
            out[n++] = (gw_line_piece){ .cell = cell, .length = plen, .s_mid = smid, .segment = i };
        }
        s0 += len;
    }
    free(t);
    *pieces = out;
    *npieces = (int)n;
    return 0;
}

int gw_point_in_polygon(double x, double y, const double *xy, int npts)
{
    int inside = 0;
    for (int i = 0, j = npts - 1; i < npts; j = i++) {
        double xi = xy[2 * i], yi = xy[2 * i + 1], xj = xy[2 * j], yj = xy[2 * j + 1];
        if ((yi > y) != (yj > y)) {
            double xc = xi + (y - yi) * (xj - xi) / (yj - yi);
            if (x < xc)
                inside = !inside;
        }
    }
    return inside;
}

long gw_rasterize_polygon(const gw_grid *g, const double *xy, int npts,
                          unsigned char *mask, unsigned char value)
{
    if (npts < 3)
        return 0;
    double *xs = malloc((size_t)npts * sizeof *xs);
    if (!xs)
        return -1;
    long count = 0;
    for (int r = 0; r < g->ny; r++) {
        double y = gw_grid_yc(g, r);
        int nxs = 0;
        /* Scanline at the row's centre: even-odd crossings of every edge. */
        for (int i = 0, j = npts - 1; i < npts; j = i++) {
            double xi = xy[2 * i], yi = xy[2 * i + 1], xj = xy[2 * j], yj = xy[2 * j + 1];
            if ((yi > y) != (yj > y))
                xs[nxs++] = xi + (y - yi) * (xj - xi) / (yj - yi);
        }
        if (nxs < 2)
            continue;
        qsort(xs, (size_t)nxs, sizeof *xs, cmp_double);
        for (int m = 0; m + 1 < nxs; m += 2) {
            /* centres strictly inside [xs[m], xs[m+1]) */
            double ca = (xs[m] - g->x0) / g->dx - 0.5, cb = (xs[m + 1] - g->x0) / g->dx - 0.5;
            double c0 = fmax(ceil(ca), 0.0), c1 = fmin(ceil(cb) - 1.0, (double)g->nx - 1);
            for (double c = c0; c <= c1; c += 1.0) {
                mask[(size_t)r * g->nx + (size_t)c] = value;
                count++;
            }
        }
    }
    free(xs);
    return count;
}
