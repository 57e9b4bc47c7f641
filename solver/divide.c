#include "divide.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* A boundary face between two catchments. */
typedef struct {
    long v0, v1;        /* grid corners it joins: j * (nx + 1) + i */
    int a, b;           /* feature pair, a < b */
    double mx, my;      /* moved face midpoint */
    double ox, oy;      /* the move, applied to line ends too */
} bedge;

typedef struct {
    long v;
    int e;
} vref;

static int vref_cmp(const void *pa, const void *pb)
{
    const vref *a = pa, *b = pb;
    if (a->v != b->v)
        return a->v < b->v ? -1 : 1;
    return a->e - b->e;
}

/* Zero of the normal flux near face s0 of a line of faces.  F[0..2] are the
 * fluxes at faces s0-1, s0, s0+1 and ok[] says which exist (inside the grid,
 * both cells active).  Returns the zero's offset from s0 in face spacings:
 * a sign change next to the face wins; if a neighbour face is missing (the
 * grid edge or an inactive area), the two remaining faces are extrapolated
 * up to one spacing, as the field beyond is unknown; otherwise 0. */
static double zero_offset(const double F[3], const int ok[3])
{
    if (!ok[1])
        return 0.0;
    if (F[1] == 0.0)
        return 0.0;
    double best = 2.0;
    for (int side = -1; side <= 1; side += 2) {
        int j = 1 + side;
        if (!ok[j] || F[j] * F[1] > 0)
            continue;
        /* Linear zero between face s0 (value F1) and face s0+side. */
        double s = side * F[1] / (F[1] - F[j]);
        if (fabs(s) < fabs(best))
            best = s;
    }
    if (best <= 1.0 && best >= -1.0)
        return best;
    if (ok[0] != ok[2]) {
        int j = ok[0] ? 0 : 2, side = j - 1;
        if (F[j] != F[1]) {
            double s = side * F[1] / (F[1] - F[j]);
            /* Only towards the missing face, at most one spacing. */
            if (s * side < 0 && fabs(s) <= 1.0)
                return s;
        }
    }
    return 0.0;
}

static int both_active(const unsigned char *act, size_t a, size_t b)
{
    return act[a] && act[b];
}

/* Collect and refine the boundary faces. */
static int collect_edges(const gw_flowfield *f, const gw_catchments *c, bedge **out, int *nout)
{
    const gw_grid *g = &f->grid;
    int nx = g->nx, ny = g->ny;
    const int *dom = c->dominant;
    const unsigned char *act = f->active;
    int n = 0, cap = 0;
    bedge *e = NULL;
    double ytop = gw_grid_ytop(g);
    for (int r = 0; r < ny; r++)
        for (int col = 0; col < nx; col++) {
            size_t k = (size_t)r * nx + col;
            if (!act[k] || dom[k] < 0)
                continue;
            for (int d = 0; d < 2; d++) {
                size_t m;
                if (d == 0) {
                    if (col + 1 >= nx) continue;
                    m = k + 1;
                } else {
                    if (r + 1 >= ny) continue;
                    m = k + nx;
                }
                if (!act[m] || dom[m] < 0 || dom[m] == dom[k])
                    continue;
                if (n == cap) {
                    cap = cap ? 2 * cap : 256;
                    bedge *t = realloc(e, (size_t)cap * sizeof *t);
                    if (!t) {
                        free(e);
                        return -1;
                    }
                    e = t;
                }
                bedge *b = &e[n++];
                b->a = dom[k] < dom[m] ? dom[k] : dom[m];
                b->b = dom[k] < dom[m] ? dom[m] : dom[k];
                double F[3] = {0, 0, 0};
                int ok[3] = {0, 0, 0};
                if (d == 0) {
                    /* Vertical face between columns col and col+1: x flux
                     * along the row. */
                    for (int i = 0; i < 3; i++) {
                        int j = col - 1 + i;
                        if (j < 0 || j + 1 >= nx) continue;
                        size_t kj = (size_t)r * nx + j;
                        ok[i] = both_active(act, kj, kj + 1);
                        F[i] = f->qe[kj];
                    }
                    double s = zero_offset(F, ok);
                    b->v0 = (long)r * (nx + 1) + col + 1;
                    b->v1 = (long)(r + 1) * (nx + 1) + col + 1;
                    b->ox = s * g->dx;
                    b->oy = 0.0;
                    b->mx = g->x0 + (col + 1) * g->dx + b->ox;
                    b->my = gw_grid_yc(g, r);
                } else {
                    /* Horizontal face between rows r and r+1: y flux along
                     * the column. */
                    for (int i = 0; i < 3; i++) {
                        int j = r - 1 + i;
                        if (j < 0 || j + 1 >= ny) continue;
                        size_t kj = (size_t)j * nx + col;
                        ok[i] = both_active(act, kj, kj + nx);
                        F[i] = f->qs[kj];
                    }
                    double s = zero_offset(F, ok);
                    b->v0 = (long)(r + 1) * (nx + 1) + col;
                    b->v1 = (long)(r + 1) * (nx + 1) + col + 1;
                    b->ox = 0.0;
                    b->oy = -s * g->dy;   /* rows count southward */
                    b->mx = gw_grid_xc(g, col);
                    b->my = ytop - (r + 1) * g->dy + b->oy;
                }
            }
        }
    *out = e;
    *nout = n;
    return 0;
}

typedef struct {
    const bedge *e;
    const vref *vr;
    int nvr;
    int nx;
    const gw_grid *g;
} net;

/* Range of vr entries at corner v. */
static int corner_range(const net *nt, long v, int *lo)
{
    int a = 0, b = nt->nvr;
    while (a < b) {
        int mid = (a + b) / 2;
        if (nt->vr[mid].v < v) a = mid + 1; else b = mid;
    }
    *lo = a;
    int hi = a;
    while (hi < nt->nvr && nt->vr[hi].v == v)
        hi++;
    return hi - a;
}

/* Number of edges of pair (a, b) at corner v, and the one other than
 * `skip` (the first found). */
static int pair_degree(const net *nt, long v, int a, int b, int skip, int *other)
{
    int lo, cnt = corner_range(nt, v, &lo), deg = 0;
    *other = -1;
    for (int i = lo; i < lo + cnt; i++) {
        const bedge *x = &nt->e[nt->vr[i].e];
        if (x->a != a || x->b != b)
            continue;
        deg++;
        if (nt->vr[i].e != skip && *other < 0)
            *other = nt->vr[i].e;
    }
    return deg;
}

typedef struct {
    double *xy;
    int n, cap;
} ptbuf;

static int pt_add(ptbuf *p, double x, double y)
{
    if (p->n == p->cap) {
        int c = p->cap ? 2 * p->cap : 16;
        double *t = realloc(p->xy, 2 * (size_t)c * sizeof *t);
        if (!t)
            return -1;
        p->xy = t;
        p->cap = c;
    }
    p->xy[2 * p->n] = x;
    p->xy[2 * p->n + 1] = y;
    p->n++;
    return 0;
}

/* End point of a line at corner v reached through edge e: at the edge of
 * the active area the corner is moved with the face so the line meets the
 * boundary at the refined position; at a junction it stays put. */
static int add_end(const net *nt, ptbuf *pb, long v, int e)
{
    int lo;
    int total = corner_range(nt, v, &lo);
    double x = nt->g->x0 + (double)(v % (nt->nx + 1)) * nt->g->dx;
    double y = gw_grid_ytop(nt->g) - (double)(v / (nt->nx + 1)) * nt->g->dy;
    if (total == 1) {
        x += nt->e[e].ox;
        y += nt->e[e].oy;
    }
    return pt_add(pb, x, y);
}

static int push_divide(gw_divides *out, int *cap, int a, int b, ptbuf *pb, int closed)
{
    if (out->n == *cap) {
        int c = *cap ? 2 * *cap : 8;
        gw_divide *t = realloc(out->d, (size_t)c * sizeof *t);
        if (!t)
            return -1;
        out->d = t;
        *cap = c;
    }
    out->d[out->n++] = (gw_divide){ a, b, pb->n, pb->xy, closed };
    pb->xy = NULL;
    pb->n = pb->cap = 0;
    return 0;
}

/* Walk a chain from corner v through edge e until it ends or closes. */
static int walk(const net *nt, unsigned char *seen, long v, int e, int loop, gw_divides *out,
                int *cap)
{
    ptbuf pb = {0};
    int a = nt->e[e].a, b = nt->e[e].b, first = e;
    if (!loop && add_end(nt, &pb, v, e))
        goto oom;
    for (;;) {
        seen[e] = 1;
        if (pt_add(&pb, nt->e[e].mx, nt->e[e].my))
            goto oom;
        long w = nt->e[e].v0 == v ? nt->e[e].v1 : nt->e[e].v0;
        int nxt;
        int deg = pair_degree(nt, w, a, b, e, &nxt);
        if (deg != 2 || nxt < 0) {
            if (add_end(nt, &pb, w, e))
                goto oom;
            break;
        }
        if (seen[nxt]) {
            if (nxt == first && loop && pt_add(&pb, pb.xy[0], pb.xy[1]))
                goto oom;
            break;
        }
        v = w;
        e = nxt;
    }
    if (push_divide(out, cap, a, b, &pb, loop))
        goto oom;
    return 0;
oom:
    free(pb.xy);
    return -1;
}

void gw_divides_free(gw_divides *d)
{
    if (!d)
        return;
    for (int i = 0; i < d->n; i++)
        free(d->d[i].xy);
    free(d->d);
    memset(d, 0, sizeof *d);
}

int gw_divides_compute(const gw_problem *p, const gw_flowfield *f, const gw_catchments *c,
                       gw_divides *out, gw_error *err)
{
    (void)p;
    memset(out, 0, sizeof *out);
    bedge *e = NULL;
    int ne = 0, cap = 0;
    vref *vr = NULL;
    unsigned char *seen = NULL;
    if (collect_edges(f, c, &e, &ne))
        goto oom;
    if (ne == 0)
        return 0;
    vr = malloc(2 * (size_t)ne * sizeof *vr);
    seen = calloc((size_t)ne, 1);
    if (!vr || !seen)
        goto oom;
    for (int i = 0; i < ne; i++) {
        vr[2 * i] = (vref){ e[i].v0, i };
        vr[2 * i + 1] = (vref){ e[i].v1, i };
    }
    qsort(vr, 2 * (size_t)ne, sizeof *vr, vref_cmp);
    net nt = { e, vr, 2 * ne, f->grid.nx, &f->grid };
    /* Open chains first, started at a corner where the chain ends. */
    for (int i = 0; i < ne; i++) {
        if (seen[i])
            continue;
        long ends[2] = { e[i].v0, e[i].v1 };
        for (int s = 0; s < 2 && !seen[i]; s++) {
            int other;
            if (pair_degree(&nt, ends[s], e[i].a, e[i].b, i, &other) != 2 &&
                walk(&nt, seen, ends[s], i, 0, out, &cap))
                goto oom;
        }
    }
    /* What is left are closed loops. */
    for (int i = 0; i < ne; i++)
        if (!seen[i] && walk(&nt, seen, e[i].v0, i, 1, out, &cap))
            goto oom;
    free(e);
    free(vr);
    free(seen);
    return 0;
oom:
    free(e);
    free(vr);
    free(seen);
    gw_divides_free(out);
    return gw_fail(err, "out of memory tracing divides");
}

int gw_no_divide_find(const gw_catchments *c, const gw_divides *d, gw_no_divide **list, int *n,
                      gw_error *err)
{
    *list = NULL;
    *n = 0;
    int nf = c->nfeatures, cap = 0;
    for (int s = 1; s < nf; s++) {
        if (!(c->source[s] > 0))
            continue;
        for (int t = 0; t < nf; t++) {
            double del = c->delivered[(size_t)s * nf + t];
            if (t == s || !c->discharge[t] || !(del >= 0.01 * c->source[s]))
                continue;
            int a = s < t ? s : t, b = s < t ? t : s, found = 0;
            for (int i = 0; i < d->n && !found; i++)
                found = d->d[i].a == a && d->d[i].b == b;
            if (found)
                continue;
            if (*n == cap) {
                cap = cap ? 2 * cap : 4;
                gw_no_divide *tmp = realloc(*list, (size_t)cap * sizeof *tmp);
                if (!tmp) {
                    free(*list);
                    *list = NULL;
                    *n = 0;
                    return gw_fail(err, "out of memory listing features without a divide");
                }
                *list = tmp;
            }
            (*list)[(*n)++] = (gw_no_divide){ s, t, c->source[s], del };
        }
    }
    return 0;
}

void gw_no_divide_describe(const gw_no_divide *nd, const char *name_a, const char *name_b,
                           const char *length_unit, const char *time_unit, char *buf, size_t len)
{
    double share = nd->loss > 0 ? nd->delivered / nd->loss : 0.0;
    char part[48];
    if (share >= 0.999)
        snprintf(part, sizeof part, "all of it");
    else
        snprintf(part, sizeof part, "%.3g %% of it", 100.0 * share);
    snprintf(buf, len, "no divide between %s and %s: %s loses %.4g %s3/%s to the aquifer, %s ends in %s",
             name_a, name_b, name_a, nd->loss, length_unit, time_unit, part, name_b);
}

void gw_divide_analysis_free(gw_divide_analysis *a)
{
    if (!a)
        return;
    gw_catchments_free(&a->catchments);
    gw_divides_free(&a->divides);
    free(a->no_divide);
    free(a->stagnation);
    memset(a, 0, sizeof *a);
}

int gw_divide_analysis_run(const gw_problem *p, const gw_solution *sol, gw_divide_analysis *a,
                           gw_error *err)
{
    memset(a, 0, sizeof *a);
    gw_flowfield f;
    if (gw_flowfield_compute(p, sol, &f, err))
        return -1;
    int rc = gw_divide_analysis_run_flow(p, sol, &f, a, err);
    gw_flowfield_free(&f);
    return rc;
}

int gw_divide_analysis_run_flow(const gw_problem *p, const gw_solution *sol,
                                const gw_flowfield *f, gw_divide_analysis *a, gw_error *err)
{
    memset(a, 0, sizeof *a);
    if (gw_catchments_compute(p, f, &a->catchments, err) ||
        gw_divides_compute(p, f, &a->catchments, &a->divides, err) ||
        gw_no_divide_find(&a->catchments, &a->divides, &a->no_divide, &a->nno_divide, err) ||
        gw_stagnation_find(p, sol, f, &a->stagnation, &a->nstagnation, err)) {
        gw_divide_analysis_free(a);
        return -1;
    }
    return 0;
}
