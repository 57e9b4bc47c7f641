#include "map_labels.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

static const double PI = 3.14159265358979323846;

void gw_labels_init(gw_label_set *s, double x0, double y0, double x1, double y1, double gap)
{
    memset(s, 0, sizeof *s);
    s->x0 = x0; s->y0 = y0; s->x1 = x1; s->y1 = y1;
    s->gap = gap;
    s->skip_tag = -1;
}

void gw_labels_free(gw_label_set *s)
{
    free(s->box);
    free(s->seg);
    s->box = NULL;
    s->seg = NULL;
    s->n = s->cap = 0;
    s->nseg = s->capseg = 0;
}

static void corners(const gw_label_box *b, double grow, double px[4], double py[4])
{
    double c = cos(b->angle), sn = sin(b->angle);
    double hw = 0.5 * b->w + grow, hh = 0.5 * b->h + grow;
    static const double sx[4] = {-1, 1, 1, -1}, sy[4] = {-1, -1, 1, 1};
    for (int i = 0; i < 4; i++) {
        double u = sx[i] * hw, v = sy[i] * hh;
        px[i] = b->cx + u * c - v * sn;
        py[i] = b->cy + u * sn + v * c;
    }
}

/* Separating-axis test for two convex quadrilaterals: they are disjoint iff
 * some edge normal separates their projections. */
int gw_labels_overlap(const gw_label_box *a, const gw_label_box *b, double gap)
{
    double ax[4], ay[4], bx[4], by[4];
    corners(a, 0.5 * gap, ax, ay);
    corners(b, 0.5 * gap, bx, by);
    double axes[4][2] = {{cos(a->angle), sin(a->angle)}, {-sin(a->angle), cos(a->angle)},
                         {cos(b->angle), sin(b->angle)}, {-sin(b->angle), cos(b->angle)}};
    for (int k = 0; k < 4; k++) {
        double amin = HUGE_VAL, amax = -HUGE_VAL, bmin = HUGE_VAL, bmax = -HUGE_VAL;
        for (int i = 0; i < 4; i++) {
            double pa = ax[i] * axes[k][0] + ay[i] * axes[k][1];
            double pb = bx[i] * axes[k][0] + by[i] * axes[k][1];
            if (pa < amin) amin = pa;
            if (pa > amax) amax = pa;
            if (pb < bmin) bmin = pb;
            if (pb > bmax) bmax = pb;
        }
        if (amax <= bmin || bmax <= amin) return 0;
    }
    return 1;
}

int gw_labels_inside(const gw_label_set *s, const gw_label_box *b)
{
    double px[4], py[4];
    corners(b, 0, px, py);
    for (int i = 0; i < 4; i++)
        if (px[i] < s->x0 || px[i] > s->x1 || py[i] < s->y0 || py[i] > s->y1) return 0;
    return 1;
}

int gw_labels_reserve(gw_label_set *s, const gw_label_box *b)
{
    if (s->n == s->cap) {
        int nc = s->cap ? 2 * s->cap : 32;
        gw_label_box *nb = realloc(s->box, (size_t)nc * sizeof *nb);
        if (!nb) return -1;
        s->box = nb;
        s->cap = nc;
    }
    s->box[s->n++] = *b;
    return 0;
}

int gw_labels_reserve_line(gw_label_set *s, const double *pxy, int n, int closed, double clear,
                           int tag)
{
    int nseg = closed ? n : n - 1;
    for (int i = 0; i < nseg; i++) {
        int j = (i + 1) % n;
        if (s->nseg == s->capseg) {
            int nc = s->capseg ? 2 * s->capseg : 64;
            gw_label_seg *ns = realloc(s->seg, (size_t)nc * sizeof *ns);
            if (!ns) return -1;
            s->seg = ns;
            s->capseg = nc;
        }
        s->seg[s->nseg++] = (gw_label_seg){pxy[2 * i], pxy[2 * i + 1], pxy[2 * j], pxy[2 * j + 1], clear, tag};
    }
    return 0;
}

/* Does segment (u0,v0)-(u1,v1) meet the box |u| <= a, |v| <= b?  Clip the
 * segment's parameter range against the four slabs (Liang-Barsky). */
static int seg_meets_box(double u0, double v0, double u1, double v1, double a, double b)
{
    double t0 = 0, t1 = 1;
    double p[4] = {-(u1 - u0), u1 - u0, -(v1 - v0), v1 - v0};
    double q[4] = {u0 + a, a - u0, v0 + b, b - v0};
    for (int k = 0; k < 4; k++) {
        if (p[k] == 0) {
            if (q[k] < 0) return 0;   /* parallel and outside this slab */
            continue;
        }
        double r = q[k] / p[k];
        if (p[k] < 0) {
            if (r > t1) return 0;
            if (r > t0) t0 = r;
        } else {
            if (r < t0) return 0;
            if (r < t1) t1 = r;
        }
    }
    return t0 <= t1;
}

int gw_labels_hits_line(const gw_label_set *s, const gw_label_box *b)
{
    double c = cos(b->angle), sn = sin(b->angle);
    double reach = 0.5 * hypot(b->w, b->h);
    for (int i = 0; i < s->nseg; i++) {
        const gw_label_seg *g = &s->seg[i];
        if (g->tag == s->skip_tag && s->skip_tag >= 0) continue;
        double m = reach + g->clear;   /* cheap reject on bounding boxes first */
        if (fmax(g->x0, g->x1) < b->cx - m || fmin(g->x0, g->x1) > b->cx + m ||
            fmax(g->y0, g->y1) < b->cy - m || fmin(g->y0, g->y1) > b->cy + m)
            continue;
        /* Into the label's frame; the box grown by the clearance (square
         * corners: slightly cautious). */
        double ax = g->x0 - b->cx, ay = g->y0 - b->cy, bx = g->x1 - b->cx, by = g->y1 - b->cy;
        double u0 = ax * c + ay * sn, v0 = -ax * sn + ay * c;
        double u1 = bx * c + by * sn, v1 = -bx * sn + by * c;
        if (seg_meets_box(u0, v0, u1, v1, 0.5 * b->w + g->clear, 0.5 * b->h + g->clear)) return 1;
    }
    return 0;
}

int gw_labels_try(gw_label_set *s, const gw_label_box *b)
{
    if (!gw_labels_inside(s, b)) return 0;
    if (gw_labels_hits_line(s, b)) return 0;
    for (int i = 0; i < s->n; i++)
        if (gw_labels_overlap(&s->box[i], b, s->gap)) return 0;
    return gw_labels_reserve(s, b) == 0 ? 1 : -1;
}

/* Point at arc length t along the polyline; seg receives the segment. */
static void point_at(const double *p, const double *cum, int n, double t, double *x, double *y)
{
    int i = 0;
    while (i < n - 2 && cum[i + 1] < t) i++;
    double len = cum[i + 1] - cum[i];
    double f = len > 0 ? (t - cum[i]) / len : 0;
    *x = p[2 * i] + f * (p[2 * i + 2] - p[2 * i]);
    *y = p[2 * i + 1] + f * (p[2 * i + 3] - p[2 * i + 1]);
}

int gw_labels_along_line(gw_label_set *s, const double *pxy, int n, double w, double h,
                         double spacing, gw_label_box *out, int max)
{
    if (n < 2 || max <= 0) return 0;
    double *cum = malloc((size_t)n * sizeof(double));
    if (!cum) return -1;
    cum[0] = 0;
    for (int i = 1; i < n; i++)
        cum[i] = cum[i - 1] + hypot(pxy[2 * i] - pxy[2 * i - 2], pxy[2 * i + 1] - pxy[2 * i - 1]);
    double total = cum[n - 1];
    int placed = 0;
    double last = -HUGE_VAL;
    double step = h > 4 ? 0.5 * h : 2;
    double start = spacing < total ? 0.5 * spacing : 0.5 * total;
    double tlo = 0.5 * w + 2, thi = total - 0.5 * w - 2;
    int ncand = thi >= tlo ? (int)((thi - tlo) / step) + 1 : 0;
    double mid = 0.5 * (tlo + thi);
    /* Single label: candidates alternate either side of the middle.
     * Several: scan from `start` along the line. */
    for (int k = 0; k < ncand && placed < max; k++) {
        double t;
        if (max == 1) {
            double off = ((k + 1) / 2) * step;
            t = (k % 2) ? mid + off : mid - off;
            if (t < tlo || t > thi) continue;
        } else {
            t = tlo + k * step;
            if (t < start && placed == 0 && total > spacing) continue;
        }
        if (t - last < spacing) continue;
        double xa, ya, xb, yb, xm, ym;
        point_at(pxy, cum, n, t - 0.5 * w, &xa, &ya);
        point_at(pxy, cum, n, t + 0.5 * w, &xb, &yb);
        point_at(pxy, cum, n, t, &xm, &ym);
        double chord = hypot(xb - xa, yb - ya);
        if (chord < 0.92 * w) continue;   /* bends too much under the label */
        /* Midpoint must sit near the chord, or the text floats off the line. */
        double cx = 0.5 * (xa + xb), cy = 0.5 * (ya + yb);
        if (hypot(xm - cx, ym - cy) > 0.25 * h) continue;
        double ang = atan2(yb - ya, xb - xa);
        if (ang > 0.5 * PI) ang -= PI;       /* keep text upright */
        if (ang < -0.5 * PI) ang += PI;
        gw_label_box b = {xm, ym, w, h, ang};
        int r = gw_labels_try(s, &b);
        if (r < 0) {
            free(cum);
            return -1;
        }
        if (r == 1) {
            out[placed++] = b;
            last = t;
        }
    }
    free(cum);
    return placed;
}
