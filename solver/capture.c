#include "capture.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

void gw_capture_options_default(gw_capture_options *o)
{
    o->seeds_per_cell = 2;
    o->refine = 10;
    o->times = NULL;
    o->ntimes = 0;
    o->weak = GW_WEAK_THRESHOLD;
    o->weak_threshold = 0.5;
}

/* ---- Flux-weighted partition ------------------------------------------ */

/* Flux leaving cell k towards neighbour d (0 E, 1 W, 2 S, 3 N); sets *j to
 * the neighbour, returns 0 (and *j = -1) where there is none. */
static double face_out(const gw_flowfield *f, size_t k, int d, long *j)
{
    const gw_grid *g = &f->grid;
    int col = (int)(k % (size_t)g->nx), row = (int)(k / (size_t)g->nx);
    *j = -1;
    switch (d) {
    case 0: if (col + 1 >= g->nx) return 0.0; *j = (long)k + 1; return f->qe[k];
    case 1: if (col == 0) return 0.0; *j = (long)k - 1; return -f->qe[k - 1];
    case 2: if (row + 1 >= g->ny) return 0.0; *j = (long)k + g->nx; return f->qs[k];
    default: if (row == 0) return 0.0; *j = (long)k - g->nx; return -f->qs[k - (size_t)g->nx];
    }
}

/* Cells ordered downstream first (Kahn's algorithm on the face fluxes).
 * Steady Darcy flow runs downhill, so the graph has no cycles; any cell left
 * over (flux round-off) is appended and handled by extra sweeps. */
static int flow_order(const gw_flowfield *f, long *order, long *norder, long *ncycle,
                      gw_error *err)
{
    size_t nc = gw_grid_ncells(&f->grid);
    int *nout = calloc(nc, sizeof *nout);
    unsigned char *done = calloc(nc, 1);
    if (!nout || !done) {
        free(nout);
        free(done);
        return gw_fail(err, "out of memory ordering cells for capture zones");
    }
    long head = 0, tail = 0;
    for (size_t k = 0; k < nc; k++) {
        if (!f->active[k])
            continue;
        for (int d = 0; d < 4; d++) {
            long j;
            if (face_out(f, k, d, &j) > 0.0 && j >= 0 && f->active[j])
                nout[k]++;
        }
        if (nout[k] == 0)
            order[tail++] = (long)k;
    }
    while (head < tail) {
        long k = order[head++];
        done[k] = 1;
        for (int d = 0; d < 4; d++) {
            long j;
            double q = face_out(f, (size_t)k, d, &j);   /* q < 0: j flows into k */
            if (j >= 0 && q < 0.0 && f->active[j] && --nout[j] == 0)
                order[tail++] = j;
        }
    }
    long left = 0;
    for (size_t k = 0; k < nc; k++)
        if (f->active[k] && !done[k]) {
            order[tail++] = (long)k;
            left++;
        }
    *norder = tail;
    *ncycle = left;
    free(nout);
    free(done);
    return 0;
}

static void share_from_order(const gw_flowfield *f, const long *order, long norder, long ncycle,
                             const double *gout, const double *fout, double *w)
{
    size_t nc = gw_grid_ncells(&f->grid);
    for (size_t k = 0; k < nc; k++)
        w[k] = 0.0;
    int sweeps = ncycle > 0 ? 50 : 1;
    for (int s = 0; s < sweeps; s++) {
        long from = s == 0 ? 0 : norder - ncycle;
        for (long i = from; i < norder; i++) {
            size_t k = (size_t)order[i];
            double out = gout[k], num = fout[k];
            for (int d = 0; d < 4; d++) {
                long j;
                double q = face_out(f, k, d, &j);
                if (q > 0.0 && j >= 0 && f->active[j]) {
                    out += q;
                    num += q * w[j];
                }
            }
            double v = out > 0.0 ? num / out : 0.0;
            w[k] = v < 0.0 ? 0.0 : v > 1.0 ? 1.0 : v;
        }
    }
}

/* Withdrawal of feature `feature` per cell, from the flow field's
 * exchanges (the same numbers as the budget reaches). */
static void feature_out(const gw_flowfield *f, int feature, double *fout, size_t nc)
{
    for (size_t k = 0; k < nc; k++)
        fout[k] = 0.0;
    for (int i = 0; i < f->nexch; i++)
        if (f->exch[i].feature == feature && f->exch[i].q < 0.0)
            fout[f->exch[i].cell] -= f->exch[i].q;
}

int gw_capture_share(const gw_flowfield *f, int feature, double *w, gw_error *err)
{
    size_t nc = gw_grid_ncells(&f->grid);
    double *fout = malloc(nc * sizeof *fout);
    long *order = malloc(nc * sizeof *order);
    long norder = 0, ncycle = 0;
    int rc = -1;
    if (!fout || !order) {
        gw_fail(err, "out of memory computing capture shares");
        goto done;
    }
    feature_out(f, feature, fout, nc);
    if (flow_order(f, order, &norder, &ncycle, err) != 0)
        goto done;
    share_from_order(f, order, norder, ncycle, f->sink, fout, w);
    rc = 0;
done:
    free(fout);
    free(order);
    return rc;
}

/* ---- Zone tracing ------------------------------------------------------ */

typedef struct {
    const gw_flowfield *f;
    gw_track_options topt;
    int refine;
    /* Lattice: NX x NY nodes, x east (I), y north (J); the outermost ring
     * of nodes lies on the box edge and counts as outside. */
    int NX, NY;
    double *xs, *ys;
    unsigned char *cap;   /* node captured (unlimited time) */
    double *time;         /* travel time of captured nodes */
    /* Scratch for one zone. */
    int *emap;            /* lattice edge -> point index */
    double *px, *py;
    int *next;
    int np, pcap;
} lattice;

static int inside_point(lattice *L, double x, double y, double tlim, gw_error *err)
{
    gw_track_result r = {0};
    gw_track_options o = L->topt;
    if (tlim < HUGE_VAL)
        o.max_time = tlim * (1.0 + 1e-9);
    if (gw_track(L->f, x, y, &o, &r, err) != 0)
        return -1;
    return r.end == GW_END_STOP_CELL && r.time <= tlim;
}

/* Crossing point on the lattice edge from node a (inside) to b (outside). */
static int crossing(lattice *L, int eid, int a, int b, double tlim, gw_error *err)
{
    if (L->emap[eid] >= 0)
        return L->emap[eid];
    double ax = L->xs[a % L->NX], ay = L->ys[a / L->NX];
    double bx = L->xs[b % L->NX], by = L->ys[b / L->NX];
    for (int i = 0; i < L->refine; i++) {
        double mx = 0.5 * (ax + bx), my = 0.5 * (ay + by);
        int in = inside_point(L, mx, my, tlim, err);
        if (in < 0)
            return -1;
        if (in) { ax = mx; ay = my; } else { bx = mx; by = my; }
    }
    if (L->np == L->pcap) {
        int nc = L->pcap ? 2 * L->pcap : 256;
        double *nx = realloc(L->px, (size_t)nc * sizeof *nx);
        if (!nx) return gw_fail(err, "out of memory tracing a capture zone");
        L->px = nx;
        double *ny = realloc(L->py, (size_t)nc * sizeof *ny);
        if (!ny) return gw_fail(err, "out of memory tracing a capture zone");
        L->py = ny;
        int *nn = realloc(L->next, (size_t)nc * sizeof *nn);
        if (!nn) return gw_fail(err, "out of memory tracing a capture zone");
        L->next = nn;
        L->pcap = nc;
    }
    L->px[L->np] = 0.5 * (ax + bx);
    L->py[L->np] = 0.5 * (ay + by);
    L->next[L->np] = -1;
    L->emap[eid] = L->np;
    return L->np++;
}

static void zone_free(gw_capzone *z)
{
    for (int i = 0; i < z->nring; i++) {
        free(z->ring[i].x);
        free(z->ring[i].y);
    }
    free(z->ring);
    z->ring = NULL;
    z->nring = 0;
}

/* Trace the boundary of {captured and time <= tlim} into rings. */
static int trace_zone(lattice *L, double tlim, gw_capzone *z, gw_error *err)
{
    const int NX = L->NX, NY = L->NY;
    memset(z, 0, sizeof *z);
    z->time = tlim;
    z->outer = -1;
    L->np = 0;
    for (size_t i = 0; i < 2 * (size_t)NX * NY; i++)
        L->emap[i] = -1;
#define IN(n) (L->cap[n] && L->time[n] <= tlim)
    for (int J = 0; J + 1 < NY; J++)
        for (int I = 0; I + 1 < NX; I++) {
            int a = J * NX + I, b = a + 1, c = a + NX + 1, d = a + NX;
            int ia = IN(a), ib = IN(b), ic = IN(c), id = IN(d);
            if (ia == ib && ib == ic && ic == id)
                continue;
            /* Square edges counter-clockwise: a->b, b->c, c->d, d->a. */
            const int from[4] = {a, b, c, d}, to[4] = {b, c, d, a};
            const int eid[4] = {2 * a, 2 * b + 1, 2 * d, 2 * a + 1};
            const int in[4] = {ia, ib, ic, id};
            int pt[4], kind[4];   /* kind: 1 exit (in -> out), 2 entry */
            for (int e = 0; e < 4; e++) {
                int iu = in[e], iv = in[(e + 1) % 4];
                kind[e] = 0;
                pt[e] = -1;
                if (iu == iv)
                    continue;
                kind[e] = iu ? 1 : 2;
                pt[e] = iu ? crossing(L, eid[e], from[e], to[e], tlim, err)
                           : crossing(L, eid[e], to[e], from[e], tlim, err);
                if (pt[e] < 0)
                    return -1;
            }
            /* Inside on the left: join each exit to the next entry. */
            for (int e = 0; e < 4; e++) {
                if (kind[e] != 1)
                    continue;
                for (int s = 1; s < 4; s++) {
                    int e2 = (e + s) % 4;
                    if (kind[e2] == 2) {
                        L->next[pt[e]] = pt[e2];
                        break;
                    }
                }
            }
        }
#undef IN
    /* Follow the links into closed rings. */
    unsigned char *seen = calloc((size_t)L->np + 1, 1);
    if (!seen)
        return gw_fail(err, "out of memory tracing a capture zone");
    double best = 0.0;
    for (int s = 0; s < L->np; s++) {
        if (seen[s] || L->next[s] < 0)
            continue;
        int n = 0;
        for (int q = s; q >= 0 && !seen[q]; q = L->next[q]) {
            seen[q] = 1;
            n++;
        }
        gw_capring rg = {0};
        rg.x = malloc((size_t)n * sizeof *rg.x);
        rg.y = malloc((size_t)n * sizeof *rg.y);
        gw_capring *nr = realloc(z->ring, (size_t)(z->nring + 1) * sizeof *nr);
        if (!rg.x || !rg.y || !nr) {
            free(rg.x);
            free(rg.y);
            if (nr) z->ring = nr;
            free(seen);
            zone_free(z);
            return gw_fail(err, "out of memory tracing a capture zone");
        }
        z->ring = nr;
        int m = 0;
        for (int q = s; m < n; q = L->next[q]) {
            rg.x[m] = L->px[q];
            rg.y[m] = L->py[q];
            m++;
        }
        rg.n = n;
        double a2 = 0.0;
        for (int i = 0; i < n; i++) {
            int j = (i + 1) % n;
            a2 += rg.x[i] * rg.y[j] - rg.x[j] * rg.y[i];
        }
        rg.area = 0.5 * a2;
        z->area += rg.area;
        if (rg.area > best) {
            best = rg.area;
            z->outer = z->nring;
        }
        z->ring[z->nring++] = rg;
    }
    free(seen);
    return 0;
}

/* ---- Capture zones ----------------------------------------------------- */

static void capture_zone_free(gw_capture_zone *c)
{
    zone_free(&c->capture);
    for (int i = 0; i < c->nttz; i++)
        zone_free(&c->ttz[i]);
    free(c->ttz);
    free(c->source);
}

void gw_capture_free(gw_capture *c)
{
    if (!c)
        return;
    for (int i = 0; i < c->nzone; i++)
        capture_zone_free(&c->zone[i]);
    free(c->zone);
    memset(c, 0, sizeof *c);
}

static int cmp_double(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

/* One well feature: source split from w, zones by tracking. */
static int one_well(const gw_problem *p, const gw_flowfield *f, const gw_capture_options *o,
                    const double *w, const double *fout, const double *times,
                    gw_capture_zone *cz, gw_error *err)
{
    const gw_grid *g = &p->grid;
    size_t nc = gw_grid_ncells(g);
    const int s = o->seeds_per_cell > 0 ? o->seeds_per_cell : 2;
    int rc = -1;
    lattice L = {0};
    unsigned char *stop = calloc(nc, 1), *cand = calloc(nc, 1);
    if (!stop || !cand) {
        gw_fail(err, "out of memory for capture zones");
        goto done;
    }
    /* Cells the well takes water from stop every path; candidates are cells
     * with a share above round-off, and their neighbours. */
    int c0 = g->nx, c1 = -1, r0 = g->ny, r1 = -1;
    for (size_t k = 0; k < nc; k++) {
        if (fout[k] > 0.0)
            stop[k] = 1;
        if (!(w[k] > 1e-6 || stop[k]))
            continue;
        int col = (int)(k % (size_t)g->nx), row = (int)(k / (size_t)g->nx);
        for (int dr = -1; dr <= 1; dr++)
            for (int dc = -1; dc <= 1; dc++) {
                int cc = col + dc, rr = row + dr;
                if (cc < 0 || rr < 0 || cc >= g->nx || rr >= g->ny)
                    continue;
                cand[(size_t)rr * g->nx + cc] = 1;
                if (cc < c0) c0 = cc;
                if (cc > c1) c1 = cc;
                if (rr < r0) r0 = rr;
                if (rr > r1) r1 = rr;
            }
    }
    cz->capture.outer = -1;
    if (c1 < 0) {
        rc = 0;
        goto done;
    }
    L.f = f;
    gw_track_options_default(&L.topt);
    L.topt.weak = o->weak;
    L.topt.weak_threshold = o->weak_threshold;
    L.topt.stop_mask = stop;
    L.refine = o->refine > 0 ? o->refine : 10;
    L.NX = (c1 - c0 + 1) * s + 2;
    L.NY = (r1 - r0 + 1) * s + 2;
    size_t nn = (size_t)L.NX * L.NY;
    L.xs = malloc((size_t)L.NX * sizeof *L.xs);
    L.ys = malloc((size_t)L.NY * sizeof *L.ys);
    L.cap = calloc(nn, 1);
    L.time = malloc(nn * sizeof *L.time);
    L.emap = malloc(2 * nn * sizeof *L.emap);
    if (!L.xs || !L.ys || !L.cap || !L.time || !L.emap) {
        gw_fail(err, "out of memory for the capture-zone lattice");
        goto done;
    }
    const double xw = g->x0 + c0 * g->dx, ys = gw_grid_ytop(g) - (r1 + 1) * g->dy;
    for (int I = 0; I < L.NX; I++)
        L.xs[I] = I == 0 ? xw : I == L.NX - 1 ? g->x0 + (c1 + 1) * g->dx
                : xw + (I - 0.5) * g->dx / s;
    for (int J = 0; J < L.NY; J++)
        L.ys[J] = J == 0 ? ys : J == L.NY - 1 ? gw_grid_ytop(g) - r0 * g->dy
                : ys + (J - 0.5) * g->dy / s;
    long ncap = 0, nweak = 0;
    cz->min_retained = 1.0;
    for (int J = 0; J < L.NY; J++)
        for (int I = 0; I < L.NX; I++) {
            size_t n = (size_t)J * L.NX + I;
            L.time[n] = HUGE_VAL;
            if (I == 0 || J == 0 || I == L.NX - 1 || J == L.NY - 1)
                continue;
            int col = c0 + (I - 1) / s, row = r1 - (J - 1) / s;
            if (!cand[(size_t)row * g->nx + col])
                continue;
            gw_track_result r = {0};
            if (gw_track(f, L.xs[I], L.ys[J], &L.topt, &r, err) != 0)
                goto done;
            cz->seeds++;
            cz->ends[r.end]++;
            if (r.end == GW_END_STOP_CELL) {
                L.cap[n] = 1;
                L.time[n] = r.time;
                ncap++;
                if (r.weak_passed) {
                    nweak++;
                    if (r.retained < cz->min_retained)
                        cz->min_retained = r.retained;
                }
            }
        }
    cz->weak_pass_share = ncap ? (double)nweak / ncap : 0.0;
    if (trace_zone(&L, HUGE_VAL, &cz->capture, err) != 0)
        goto done;
    cz->ttz = calloc((size_t)(o->ntimes > 0 ? o->ntimes : 1), sizeof *cz->ttz);
    if (!cz->ttz) {
        gw_fail(err, "out of memory for travel-time zones");
        goto done;
    }
    for (int i = 0; i < o->ntimes; i++) {
        if (trace_zone(&L, times[i], &cz->ttz[i], err) != 0)
            goto done;
        cz->nttz++;
    }
    rc = 0;
done:
    free(stop);
    free(cand);
    free(L.xs);
    free(L.ys);
    free(L.cap);
    free(L.time);
    free(L.emap);
    free(L.px);
    free(L.py);
    free(L.next);
    return rc;
}

int gw_capture_compute(const gw_problem *p, const gw_flowfield *f,
                       const gw_capture_options *opt, gw_capture *out, gw_error *err)
{
    memset(out, 0, sizeof *out);
    gw_capture_options def;
    if (!opt) {
        gw_capture_options_default(&def);
        opt = &def;
    }
    for (int i = 0; i < opt->ntimes; i++)
        if (!(opt->times[i] > 0.0) || !isfinite(opt->times[i]))
            return gw_fail(err, "travel time %d is %g; travel times must be positive", i + 1,
                           opt->times[i]);
    const gw_grid *g = &p->grid;
    size_t nc = gw_grid_ncells(g);
    out->nfeatures = p->nfeatures;
    const double *gin = f->src, *gout = f->sink;
    double *fout = malloc(nc * sizeof *fout), *w = malloc(nc * sizeof *w);
    long *order = malloc(nc * sizeof *order);
    double *times = malloc((size_t)(opt->ntimes > 0 ? opt->ntimes : 1) * sizeof *times);
    long norder = 0, ncycle = 0;
    int rc = -1;
    if (!fout || !w || !order || !times) {
        gw_fail(err, "out of memory for capture zones");
        goto done;
    }
    for (int i = 0; i < opt->ntimes; i++)
        times[i] = opt->times[i];
    qsort(times, (size_t)opt->ntimes, sizeof *times, cmp_double);
    if (flow_order(f, order, &norder, &ncycle, err) != 0)
        goto done;
    for (int ft = 0; ft < p->nfeatures; ft++) {
        if (p->features[ft].type != GW_FEAT_WELL)
            continue;
        double rate = 0.0;
        for (int i = 0; i < p->nwells; i++)
            if (p->wells[i].feature == ft && p->active[p->wells[i].cell])
                rate += p->wells[i].rate;
        if (!(rate > 0.0))
            continue;   /* injection or idle wells have no capture zone */
        gw_capture_zone *nz = realloc(out->zone, (size_t)(out->nzone + 1) * sizeof *nz);
        if (!nz) {
            gw_fail(err, "out of memory for capture zones");
            goto done;
        }
        out->zone = nz;
        gw_capture_zone *cz = &out->zone[out->nzone++];
        memset(cz, 0, sizeof *cz);
        cz->feature = ft;
        cz->rate = rate;
        cz->source = calloc((size_t)p->nfeatures, sizeof *cz->source);
        if (!cz->source) {
            gw_fail(err, "out of memory for capture zones");
            goto done;
        }
        feature_out(f, ft, fout, nc);
        share_from_order(f, order, norder, ncycle, gout, fout, w);
        /* Source split: each feature's inflow times the share reaching the well. */
        double area = g->dx * g->dy;
        for (size_t k = 0; k < nc; k++)
            if (p->active[k] && p->recharge[k] > 0.0)
                cz->source[0] += p->recharge[k] * area * w[k];
        for (int i = 0; i < f->nexch; i++) {
            const gw_exchange *e = &f->exch[i];
            if (e->q > 0.0 && e->feature >= 0 && e->feature < p->nfeatures)
                cz->source[e->feature] += e->q * w[e->cell];
        }
        /* How strong a sink the well's cells are. */
        double take = 0.0, thru = 0.0;
        for (size_t k = 0; k < nc; k++) {
            if (!(fout[k] > 0.0))
                continue;
            take += fout[k];
            thru += gin[k];
            for (int d = 0; d < 4; d++) {
                long j;
                double q = face_out(f, k, d, &j);
                if (q < 0.0) thru -= q;
            }
        }
        cz->well_cell_share = thru > 0.0 ? (take < thru ? take / thru : 1.0) : 1.0;
        if (one_well(p, f, opt, w, fout, times, cz, err) != 0) {
            gw_fail_prefix(err, "capture zone of well '%s': ", p->features[ft].name);
            goto done;
        }
    }
    rc = 0;
done:
    if (rc != 0)
        gw_capture_free(out);
    free(fout);
    free(w);
    free(order);
    free(times);
    return rc;
}
