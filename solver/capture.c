#include "capture.h"

#include "parallel.h"
#include "path_fate.h"
#include "upstream.h"

#include <limits.h>
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
    o->threads = 0;
    o->track_all = 0;
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

/* The cells in downstream-first order with their outflow faces listed in
 * that order (east, west, south, north), built once and swept once per
 * well: a sweep then streams through memory instead of recomputing every
 * face from the grid. */
typedef struct {
    long *order;
    long norder, ncycle;
    long *ptr;        /* norder + 1: faces of order[i] are ptr[i] .. ptr[i+1]-1 */
    long *to;         /* neighbour cell */
    double *q;        /* flux out through the face, > 0 */
} flow_graph;

static void flow_graph_free(flow_graph *g)
{
    free(g->order);
    free(g->ptr);
    free(g->to);
    free(g->q);
    memset(g, 0, sizeof *g);
}

static int flow_graph_build(const gw_flowfield *f, flow_graph *fg, gw_error *err)
{
    size_t nc = gw_grid_ncells(&f->grid);
    memset(fg, 0, sizeof *fg);
    fg->order = malloc((nc ? nc : 1) * sizeof *fg->order);
    if (!fg->order)
        return gw_fail(err, "out of memory ordering cells for capture zones");
    if (flow_order(f, fg->order, &fg->norder, &fg->ncycle, err) != 0) {
        flow_graph_free(fg);
        return -1;
    }
    long nf = 0;
    for (long i = 0; i < fg->norder; i++)
        for (int d = 0; d < 4; d++) {
            long j;
            if (face_out(f, (size_t)fg->order[i], d, &j) > 0.0)
                nf++;
        }
    fg->ptr = malloc((size_t)(fg->norder + 1) * sizeof *fg->ptr);
    fg->to = malloc((size_t)(nf ? nf : 1) * sizeof *fg->to);
    fg->q = malloc((size_t)(nf ? nf : 1) * sizeof *fg->q);
    if (!fg->ptr || !fg->to || !fg->q) {
        flow_graph_free(fg);
        return gw_fail(err, "out of memory ordering cells for capture zones");
    }
    long e = 0;
    for (long i = 0; i < fg->norder; i++) {
        fg->ptr[i] = e;
        for (int d = 0; d < 4; d++) {
            long j;
            double q = face_out(f, (size_t)fg->order[i], d, &j);
            if (q > 0.0) {   /* implies a neighbour j >= 0 */
                fg->to[e] = j;
                fg->q[e++] = q;
            }
        }
    }
    fg->ptr[fg->norder] = e;
    return 0;
}

static void share_from_order(const gw_flowfield *f, const flow_graph *fg,
                             const double *gout, const double *fout,
                             const unsigned char *mark, double *w)
{
    size_t nc = gw_grid_ncells(&f->grid);
    const long norder = fg->norder, ncycle = fg->ncycle;
    for (size_t k = 0; k < nc; k++)
        w[k] = 0.0;
    int sweeps = ncycle > 0 ? 50 : 1;
    for (int s = 0; s < sweeps; s++) {
        long from = s == 0 ? 0 : norder - ncycle;
        for (long i = from; i < norder; i++) {
            size_t k = (size_t)fg->order[i];
            if (!mark[k])
                continue;   /* not upstream of the feature: share 0 */
            double out = gout[k], num = fout[k];
            for (long e = fg->ptr[i]; e < fg->ptr[i + 1]; e++) {
                long j = fg->to[e];
                double q = fg->q[e];
                if (f->active[j]) {
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

/* ---- Where the tracking rules send each cell's water ------------------- */

/* Cell classes for one well: the well's own cells, cells decided from the
 * reach share (all in / all out) and the band between, where paths are
 * tracked.  Also the stop_mask values tracking reports back. */
enum { CL_BAND = 0, CL_WELL = 1, CL_IN = 2, CL_OUT = 3 };

/* A cell is decided without tracking when its reach share is within this of
 * 0 or 1.  The mixing partition smears a path-line boundary over a band a
 * few cells wide; 1e-9 of the water is far below what a lattice of a few
 * seeds per cell can resolve, so a cell this close to 1 holds no seed whose
 * path misses the well (and likewise near 0). */
#define DECIDE_EPS 1e-9

static int usable_cell(const gw_flowfield *f, size_t k)
{
    return f->active[k] && f->sat_thick[k] > 0.0 && f->porosity[k] > 0.0;
}

/* Reach share r[k]: the part of the water leaving cell k that the tracking
 * rules deliver to the well -- 1 in the well's cells, 0 where a path stops
 * at another sink (weak-sink rule of t) or cannot enter, else the
 * flux-weighted mean over the outflow faces (a path leaves a Pollock cell
 * only through a face with outflow).  r = 1 or 0 then means every path
 * from the cell ends in the well, or none does, apart from sets of zero
 * width.  For the weak-sink warning: pw[k], the share of the captured
 * water that passes a weak sink of another feature, and wr[k], the share
 * of it such sinks leave (both flux-weighted: an estimate for the seeds
 * that are not tracked all the way). */
static void reach_pass(const gw_flowfield *f, const flow_graph *fg, const unsigned char *cls,
                       const unsigned char *thru, const double *sfrac,
                       const unsigned char *mark, double *r, double *pw, double *wr)
{
    size_t nc = gw_grid_ncells(&f->grid);
    for (size_t k = 0; k < nc; k++) {
        r[k] = pw[k] = 0.0;
        wr[k] = 1.0;
    }
    const long norder = fg->norder, ncycle = fg->ncycle;
    int sweeps = ncycle > 0 ? 50 : 1;
    for (int s = 0; s < sweeps; s++) {
        long from = s == 0 ? 0 : norder - ncycle;
        for (long i = from; i < norder; i++) {
            size_t k = (size_t)fg->order[i];
            if (!mark[k])
                continue;   /* no path from here reaches the well */
            double rk = 0.0, pk = 0.0, wk = 1.0, frac;
            if (cls[k] == CL_WELL) {
                rk = 1.0;
            } else if (thru[k]) {
                frac = sfrac[k];
                double out = 0.0, num = 0.0, nump = 0.0, numw = 0.0;
                for (long e = fg->ptr[i]; e < fg->ptr[i + 1]; e++) {
                    long j = fg->to[e];
                    double q = fg->q[e];
                    out += q;
                    if (r[j] > 0.0) {
                        double a = q * r[j];
                        num += a;
                        nump += a * pw[j];
                        numw += a * wr[j];
                    }
                }
                if (out > 0.0 && num > 0.0) {
                    rk = num / out;
                    pk = nump / num;
                    wk = numw / num;
                }
                if (frac > 0.0) {
                    pk = 1.0;
                    wk *= 1.0 - frac;
                }
            }
            r[k] = rk > 1.0 ? 1.0 : rk;
            pw[k] = pk;
            wr[k] = wk;
        }
    }
}

/* ---- Zone tracing ------------------------------------------------------ */

typedef struct {
    const gw_flowfield *f;
    /* Unlimited time: stop in the well (CL_WELL) and in decided cells
     * (CL_IN, CL_OUT).  Time-limited: stop in the well and CL_OUT only. */
    gw_track_options topt, ttopt;
    int refine;
    int threads;          /* for gw_parallel_for */
    /* Capture-zone edges: downstream rank of each cell (flow_graph order)
     * and the closeness, along x and y faces, at which known paths decide
     * a new one (see "Known paths"). */
    const long *rank;
    double tol_x, tol_y;
    gw_fate_map *known;   /* time-unlimited paths tracked so far */
    int track_all;        /* do not use them (gw_capture_options.track_all) */
    struct known_slot *slot;   /* KNOWN_BATCH, one per batch item */
    long known_stops;     /* paths stopped between known paths */
    /* Lattice: NX x NY nodes, x east (I), y north (J); the outermost ring
     * of nodes lies on the box edge and counts as outside. */
    int NX, NY;
    double *xs, *ys;
    unsigned char *cap;   /* node captured (unlimited time) */
    double *time;         /* travel time of captured nodes (HUGE_VAL: beyond the longest) */
    /* Scratch for one zone. */
    int *emap;            /* lattice edge -> point index */
    double *px, *py;
    int *next;
    int *pa, *pb;         /* lattice nodes inside / outside each point's edge */
    int np, pcap;
} lattice;

/* Bisection of crossing pt: halve the lattice edge between its inside and
 * outside nodes `refine` times by the caller's test (1 in, 0 out, -1 on
 * error) and put the point in the middle of the last interval (writes
 * only px[pt], py[pt]). */
typedef int (*point_test)(void *ctx, double x, double y, gw_error *err);

static int bisect_crossing(lattice *L, long pt, point_test inside, void *ctx, gw_error *err)
{
    int a = L->pa[pt], b = L->pb[pt];
    double ax = L->xs[a % L->NX], ay = L->ys[a / L->NX];
    double bx = L->xs[b % L->NX], by = L->ys[b / L->NX];
    for (int k = 0; k < L->refine; k++) {
        double mx = 0.5 * (ax + bx), my = 0.5 * (ay + by);
        int in = inside(ctx, mx, my, err);
        if (in < 0)
            return -1;
        if (in) { ax = mx; ay = my; } else { bx = mx; by = my; }
    }
    L->px[pt] = 0.5 * (ax + bx);
    L->py[pt] = 0.5 * (ay + by);
    return 0;
}

/* New boundary point on the edge from lattice node a (inside) to b
 * (outside); its position is found later by bisect_crossing. */
static int add_point(lattice *L, int a, int b, gw_error *err)
{
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
        int *na = realloc(L->pa, (size_t)nc * sizeof *na);
        if (!na) return gw_fail(err, "out of memory tracing a capture zone");
        L->pa = na;
        int *nb = realloc(L->pb, (size_t)nc * sizeof *nb);
        if (!nb) return gw_fail(err, "out of memory tracing a capture zone");
        L->pb = nb;
        L->pcap = nc;
    }
    L->pa[L->np] = a;
    L->pb[L->np] = b;
    L->next[L->np] = -1;
    return L->np++;
}

typedef struct {
    lattice *L;
    double tlim;
} bisect_job;

/* Whether the path from (x, y) reaches the well within the job's time. */
static int within_time(void *ctx, double x, double y, gw_error *err)
{
    const bisect_job *j = ctx;
    gw_track_options o = j->L->ttopt;
    o.max_time = j->tlim * (1.0 + 1e-9);
    gw_track_result r = {0};
    if (gw_track(j->L->f, x, y, &o, &r, err) != 0)
        return -1;
    return r.end == GW_END_STOP_CELL && r.stop_value == CL_WELL && r.time <= j->tlim;
}

/* Crossing i of a travel-time zone edge (parallel item). */
static int bisect_point(void *ctx, long i, gw_error *err)
{
    bisect_job *j = ctx;
    return bisect_crossing(j->L, i, within_time, j, err);
}

/* ---- Known paths ---------------------------------------------------------
 *
 * A path near a capture-zone edge hugs the edge, and the edge is a path
 * line: followed alone, such a path runs all the way down to the
 * stagnation point before it turns in or out, and so does every seed in
 * the undecided band.  Path lines do not cross, so every face crossing of
 * every tracked path is kept with its fate (solver/path_fate.h), and a
 * later path stops at the first face where it passes between two known
 * paths of the same fate, each within a quarter of the seed spacing.  Only
 * a zone or hole narrower than that could hide between them, far below
 * what the lattice resolves (zones are drawn from seeds a spacing apart);
 * a path that passes between paths of different fates -- right on an
 * edge -- is tracked on.  Paths are tracked downstream first, in batches
 * of fixed size, so results do not depend on the thread count.  Only
 * time-unlimited zones use this: travel-time zone edges are not path
 * lines. */

/* Crossings per batch, and the closeness at which known paths decide, as
 * a share of the seed spacing. */
#define KNOWN_BATCH 16
#define KNOWN_TOL 0.25

/* What one batch item's paths crossed, and how many known paths stopped. */
struct known_slot {
    gw_crossing_log log;
    long stops;
};

typedef struct {
    const lattice *L;
    gw_crossing_log *log;   /* this path's crossings are appended */
    int oom, stopped;
} path_watch;

/* face_hook: stop where known paths decide, else log the crossing. */
static int watch_face(void *ctx, int k, int nk, double along)
{
    path_watch *w = ctx;
    size_t face = gw_face_id(k, nk);
    int fate = gw_fate_map_lookup(w->L->known, face, along,
                                  gw_face_is_ew(face) ? w->L->tol_y : w->L->tol_x);
    if (fate >= 0) {
        w->stopped = 1;
        return fate ? CL_IN : CL_OUT;
    }
    if (gw_crossing_log_add(w->log, face, along) != 0)
        w->oom = 1;
    return 0;
}

/* Track a time-unlimited path from (x, y) with the known paths' help; its
 * crossings are logged with its fate.  1 captured, 0 not, -1 on error. */
static int known_track(const lattice *L, double x, double y, struct known_slot *slot,
                       gw_track_result *r, gw_error *err)
{
    gw_crossing_log *log = &slot->log;
    path_watch w = {.L = L, .log = log};
    gw_track_options o = L->topt;
    if (!L->track_all) {
        o.face_hook = watch_face;
        o.face_ctx = &w;
    }
    long from = log->n;
    *r = (gw_track_result){0};
    if (gw_track(L->f, x, y, &o, r, err) != 0)
        return -1;
    if (w.oom)
        return gw_fail(err, "out of memory tracing a capture zone");
    int in = r->end == GW_END_STOP_CELL && r->stop_value != CL_OUT;
    gw_crossing_log_set_fate(log, from, (unsigned char)in);
    slot->stops += w.stopped;
    return in;
}

/* Downstream rank of the cell holding map point (x, y). */
static long rank_at(const lattice *L, double x, double y)
{
    int col, row;
    if (gw_grid_locate(&L->f->grid, x, y, &col, &row) != 0)
        return LONG_MAX;
    return L->rank[(size_t)row * L->f->grid.nx + col];
}

/* Sort item[0..n) by key[item], downstream first; ties keep their order
 * (merge sort, so no shared state). */
static int sort_downstream(long *item, const long *key, long n)
{
    long *tmp = malloc((size_t)(n ? n : 1) * sizeof *tmp);
    if (!tmp)
        return -1;
    for (long width = 1; width < n; width *= 2) {
        for (long lo = 0; lo < n; lo += 2 * width) {
            long mid = lo + width < n ? lo + width : n;
            long hi = lo + 2 * width < n ? lo + 2 * width : n;
            long i = lo, j = mid, t = lo;
            while (i < mid && j < hi)
                tmp[t++] = key[item[j]] < key[item[i]] ? item[j++] : item[i++];
            while (i < mid) tmp[t++] = item[i++];
            while (j < hi) tmp[t++] = item[j++];
        }
        memcpy(item, tmp, (size_t)n * sizeof *item);
    }
    free(tmp);
    return 0;
}

typedef int (*known_item_fn)(void *ctx, long item, struct known_slot *slot, gw_error *err);

typedef struct {
    lattice *L;
    const long *item;
    known_item_fn fn;
    void *ctx;
} known_batch;

static int known_batch_item(void *ctx, long i, gw_error *err)
{
    const known_batch *b = ctx;
    struct known_slot *slot = &b->L->slot[i];
    slot->log.n = 0;
    slot->stops = 0;
    return b->fn(b->ctx, b->item[i], slot, err);
}

typedef long (*known_key_fn)(void *ctx, long item);

/* Run fn on items 0..n-1, downstream first (key: a cell's rank), a batch
 * at a time; what each batch's paths crossed is learned before the next
 * batch starts. */
static int known_run(lattice *L, long n, known_key_fn key_fn, known_item_fn fn, void *ctx,
                     gw_error *err)
{
    long *item = malloc((size_t)(n ? n : 1) * sizeof *item);
    long *key = malloc((size_t)(n ? n : 1) * sizeof *key);
    int rc = -1;
    if (!item || !key) {
        gw_fail(err, "out of memory tracing a capture zone");
        goto done;
    }
    for (long i = 0; i < n; i++) {
        item[i] = i;
        key[i] = key_fn(ctx, i);
    }
    if (sort_downstream(item, key, n) != 0) {
        gw_fail(err, "out of memory tracing a capture zone");
        goto done;
    }
    for (long b0 = 0; b0 < n; b0 += KNOWN_BATCH) {
        long nb = n - b0 < KNOWN_BATCH ? n - b0 : KNOWN_BATCH;
        known_batch job = {.L = L, .item = item + b0, .fn = fn, .ctx = ctx};
        if (gw_parallel_for(L->threads, nb, known_batch_item, &job, err) != 0)
            goto done;
        for (long i = 0; i < nb; i++) {
            if (gw_fate_map_learn(L->known, &L->slot[i].log) != 0) {
                gw_fail(err, "out of memory tracing a capture zone");
                goto done;
            }
            L->known_stops += L->slot[i].stops;
        }
    }
    rc = 0;
done:
    free(item);
    free(key);
    return rc;
}

typedef struct {
    const lattice *L;
    struct known_slot *slot;
} edge_test;

/* Whether the path from (x, y) reaches the well, with the known paths' help. */
static int reaches_well(void *ctx, double x, double y, gw_error *err)
{
    const edge_test *t = ctx;
    gw_track_result r;
    return known_track(t->L, x, y, t->slot, &r, err);
}

/* Bisect crossing pt of a time-unlimited zone edge (batch item). */
static int bisect_edge(void *ctx, long pt, struct known_slot *slot, gw_error *err)
{
    lattice *L = ctx;
    edge_test t = {.L = L, .slot = slot};
    return bisect_crossing(L, pt, reaches_well, &t, err);
}

/* Downstream rank of crossing pt (the midpoint of its lattice edge). */
static long edge_key(void *ctx, long pt)
{
    const lattice *L = ctx;
    int a = L->pa[pt], b = L->pb[pt];
    return rank_at(L, 0.5 * (L->xs[a % L->NX] + L->xs[b % L->NX]),
                   0.5 * (L->ys[a / L->NX] + L->ys[b / L->NX]));
}

static int bisect_edges(lattice *L, gw_error *err)
{
    return known_run(L, L->np, edge_key, bisect_edge, L, err);
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
    /* Number the boundary points in scan order, bisect them all (in
     * parallel: each is its own set of paths), then link them.  Point
     * numbers and positions do not depend on the thread count. */
    for (int pass = 0; pass < 2; pass++) {
        if (pass == 1) {
            if (tlim == HUGE_VAL) {
                if (bisect_edges(L, err) != 0)
                    return -1;
            } else {
                bisect_job job = {.L = L, .tlim = tlim};
                if (gw_parallel_for(L->threads, L->np, bisect_point, &job, err) != 0)
                    return -1;
            }
        }
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
                    if (L->emap[eid[e]] < 0) {
                        int q = iu ? add_point(L, from[e], to[e], err)
                                   : add_point(L, to[e], from[e], err);
                        if (q < 0)
                            return -1;
                        L->emap[eid[e]] = q;
                    }
                    pt[e] = L->emap[eid[e]];
                }
                if (pass == 0)
                    continue;
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

/* Even-odd test of point (x, y) against a ring. */
static int ring_contains(const gw_capring *rg, double x, double y)
{
    int in = 0;
    for (int i = 0, j = rg->n - 1; i < rg->n; j = i++)
        if ((rg->y[i] > y) != (rg->y[j] > y) &&
            x < rg->x[j] + (rg->x[i] - rg->x[j]) * (y - rg->y[j]) / (rg->y[i] - rg->y[j]))
            in = !in;
    return in;
}

int gw_capzone_parent(const gw_capzone *z, int ring)
{
    if (ring < 0 || ring >= z->nring || !(z->ring[ring].area < 0.0) || z->ring[ring].n < 1)
        return -1;
    /* Rings never cross, so one vertex of the hole decides. */
    double x = z->ring[ring].x[0], y = z->ring[ring].y[0];
    int best = -1;
    for (int i = 0; i < z->nring; i++)
        if (z->ring[i].area > 0.0 && (best < 0 || z->ring[i].area < z->ring[best].area) &&
            ring_contains(&z->ring[i], x, y))
            best = i;
    return best;
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

/* Work arrays of one well (length ncells), with the flow graph, cell table
 * and sink rule all wells share (read only). */
typedef struct {
    const flow_graph *fg;
    /* thru[k]: a path may pass cell k (usable, its sink does not stop it,
     * gw_track_sink_stops); sfrac[k]: the share that sink takes there. */
    const unsigned char *thru;
    const double *sfrac;
    double *fout, *w, *reach, *pw, *wr;
    unsigned char *cls, *cmask, *tmask;
    const gw_track_cells *cells;   /* compact per-cell tracking data */
    const long *rank;              /* cell -> position in fg->order */
    gw_upstream up;                /* cells upstream of the well */
} workspace;

static void workspace_free(workspace *ws)
{
    free(ws->fout);
    free(ws->w);
    free(ws->reach);
    free(ws->pw);
    free(ws->wr);
    free(ws->cls);
    free(ws->cmask);
    free(ws->tmask);
    gw_upstream_free(&ws->up);
}

static int workspace_init(workspace *ws, size_t nc)
{
    memset(ws, 0, sizeof *ws);
    ws->fout = malloc(nc * sizeof *ws->fout);
    ws->w = malloc(nc * sizeof *ws->w);
    ws->reach = malloc(nc * sizeof *ws->reach);
    ws->pw = malloc(nc * sizeof *ws->pw);
    ws->wr = malloc(nc * sizeof *ws->wr);
    ws->cls = malloc(nc);
    ws->cmask = malloc(nc);
    ws->tmask = malloc(nc);
    return ws->fout && ws->w && ws->reach && ws->pw && ws->wr && ws->cls &&
           ws->cmask && ws->tmask ? 0 : -1;
}

/* Lattice nodes are decided coarse to fine: nodes in cells the reach
 * share decides cost nothing; the other nodes are tracked only at the
 * corners of blocks of COARSE x COARSE lattice squares, and a block is
 * tracked node by node only where its known nodes disagree or a
 * neighbouring block's edge shows the boundary entering it (so a boundary
 * is followed from block to block and never cut).  The nodes of the
 * remaining blocks take their corners' state.  Only zones or holes that
 * fit wholly inside one block (under two cells across at the default
 * seeding) can be missed, against all of the capture set otherwise. */
#define COARSE 4

enum { ND_UNKNOWN = 0, ND_IN = 1, ND_OUT = 2 };

typedef struct {
    lattice *L;
    const gw_grid *g;
    const workspace *ws;
    gw_capture_zone *cz;
    int s, c0, r1;
    unsigned char *st;     /* node state */
    /* Nodes waiting to be tracked: list, their paths, node -> list slot. */
    size_t *todo;
    struct node_path *path;
    long ntodo, todo_cap;
    int *slot;
    long ncap;             /* captured nodes */
    double npass;          /* expected number of them that pass a weak sink */
} seeding;

/* Record node n as captured; pass / kept: its share of passing a weak sink
 * of another feature and the water such sinks leave. */
static void set_in(seeding *sd, size_t n, double pass, double kept)
{
    sd->st[n] = ND_IN;
    sd->L->cap[n] = 1;
    sd->ncap++;
    sd->npass += pass;
    if (pass > 0.0 && kept < sd->cz->min_retained)
        sd->cz->min_retained = kept;
}

static size_t node_cell(const seeding *sd, size_t n)
{
    int I = (int)(n % (size_t)sd->L->NX), J = (int)(n / (size_t)sd->L->NX);
    int col = sd->c0 + (I - 1) / sd->s, row = sd->r1 - (J - 1) / sd->s;
    return (size_t)row * sd->g->nx + col;
}

/* State of node n without tracking where the cell decides it. */
static void decide_free(seeding *sd, size_t n)
{
    const lattice *L = sd->L;
    int I = (int)(n % (size_t)L->NX), J = (int)(n / (size_t)L->NX);
    if (I == 0 || J == 0 || I == L->NX - 1 || J == L->NY - 1) {
        sd->st[n] = ND_OUT;
        return;
    }
    size_t k = node_cell(sd, n);
    switch (sd->ws->cls[k]) {
    case CL_OUT: sd->st[n] = ND_OUT; sd->cz->classified++; break;
    case CL_WELL: sd->L->time[n] = 0.0; set_in(sd, n, 0.0, 1.0); sd->cz->classified++; break;
    case CL_IN: set_in(sd, n, sd->ws->pw[k], sd->ws->wr[k]); sd->cz->classified++; break;
    default: break;
    }
}

/* What the seeding needs of one tracked path. */
struct node_path {
    gw_track_end end;
    int stop_value, cell, weak_passed;
    double retained;
};

/* Queue node n for tracking unless it is known or already queued. */
static int want_node(seeding *sd, size_t n, gw_error *err)
{
    if (sd->st[n] != ND_UNKNOWN || sd->slot[n] >= 0)
        return 0;
    if (sd->ntodo == sd->todo_cap) {
        long nc = sd->todo_cap ? 2 * sd->todo_cap : 1024;
        size_t *nt = realloc(sd->todo, (size_t)nc * sizeof *nt);
        if (!nt)
            return gw_fail(err, "out of memory for the capture-zone lattice");
        sd->todo = nt;
        struct node_path *np = realloc(sd->path, (size_t)nc * sizeof *np);
        if (!np)
            return gw_fail(err, "out of memory for the capture-zone lattice");
        sd->path = np;
        sd->todo_cap = nc;
    }
    sd->slot[n] = (int)sd->ntodo;
    sd->todo[sd->ntodo++] = n;
    return 0;
}

/* Track queued node i with the known paths' help (batch item; writes
 * only path[i] and its log). */
static int track_node(void *ctx, long i, struct known_slot *slot, gw_error *err)
{
    seeding *sd = ctx;
    const lattice *L = sd->L;
    size_t n = sd->todo[i];
    gw_track_result r;
    if (known_track(L, L->xs[n % (size_t)L->NX], L->ys[n / (size_t)L->NX], slot, &r, err) < 0)
        return -1;
    sd->path[i] = (struct node_path){.end = r.end, .stop_value = r.stop_value, .cell = r.cell,
                                     .weak_passed = r.weak_passed, .retained = r.retained};
    return 0;
}

/* Downstream rank of queued node i's cell. */
static long node_key(void *ctx, long i)
{
    const seeding *sd = ctx;
    return sd->ws->rank[node_cell(sd, sd->todo[i])];
}

/* Track every queued node, downstream first; the queue is then emptied
 * by apply_node. */
static int track_queued(seeding *sd, gw_error *err)
{
    return known_run(sd->L, sd->ntodo, node_key, track_node, sd, err);
}

/* State of node n from its tracked path (if still unknown); called in a
 * fixed node order so counts and sums do not depend on the threads. */
static void apply_node(seeding *sd, size_t n)
{
    if (sd->st[n] != ND_UNKNOWN)
        return;
    const struct node_path *r = &sd->path[sd->slot[n]];
    sd->slot[n] = -1;
    sd->cz->seeds++;
    sd->cz->ends[r->end]++;
    if (r->end != GW_END_STOP_CELL || r->stop_value == CL_OUT) {
        sd->st[n] = ND_OUT;
        return;
    }
    /* Ended in the well, or in a cell all of whose paths do: the weak sinks
     * passed so far, then that cell's record. */
    int tail = r->stop_value == CL_IN;
    set_in(sd, n, r->weak_passed ? 1.0 : tail ? sd->ws->pw[r->cell] : 0.0,
           r->retained * (tail ? sd->ws->wr[r->cell] : 1.0));
}

/* Node range of block index b along an axis of nn nodes. */
static void block_span(int b, int nn, int *lo, int *hi)
{
    *lo = b * COARSE;
    *hi = *lo + COARSE < nn - 1 ? *lo + COARSE : nn - 1;
}

static int seed_lattice(seeding *sd, gw_error *err)
{
    lattice *L = sd->L;
    const int NX = L->NX, NY = L->NY;
    const size_t nn = (size_t)NX * NY;
    const int BX = (NX - 2) / COARSE + 1, BY = (NY - 2) / COARSE + 1;
    const size_t nb = (size_t)BX * BY;
    int rc = -1;
    sd->st = calloc(nn, 1);
    sd->slot = malloc(nn * sizeof *sd->slot);
    sd->todo = NULL;
    sd->path = NULL;
    sd->ntodo = sd->todo_cap = 0;
    unsigned char *flag = calloc(nb, 1);
    int *queue = malloc(nb * sizeof *queue);
    if (!sd->st || !sd->slot || !flag || !queue) {
        gw_fail(err, "out of memory for the capture-zone lattice");
        goto done;
    }
    for (size_t n = 0; n < nn; n++) {
        L->time[n] = HUGE_VAL;
        sd->slot[n] = -1;
        decide_free(sd, n);
    }
    /* Block corners: track them all, then record them in scan order. */
#define CORNERS(BODY)                                                                         \
    for (int J = 0; J < NY; J = J + COARSE < NY - 1 ? J + COARSE : (J == NY - 1 ? NY : NY - 1)) \
        for (int I = 0; I < NX; I = I + COARSE < NX - 1 ? I + COARSE : (I == NX - 1 ? NX : NX - 1)) { \
            size_t n = (size_t)J * NX + I;                                                     \
            BODY;                                                                              \
        }
    CORNERS(if (want_node(sd, n, err) != 0) goto done)
    if (track_queued(sd, err) != 0)
        goto done;
    CORNERS(apply_node(sd, n))
#undef CORNERS
    sd->ntodo = 0;
    /* Blocks whose known nodes disagree. */
    long head = 0, tail = 0;
    for (int by = 0; by < BY; by++)
        for (int bx = 0; bx < BX; bx++) {
            int i0, i1, j0, j1, seen = 0;
            block_span(bx, NX, &i0, &i1);
            block_span(by, NY, &j0, &j1);
            for (int J = j0; J <= j1 && !flag[by * BX + bx]; J++)
                for (int I = i0; I <= i1; I++) {
                    int v = sd->st[(size_t)J * NX + I];
                    if (v == ND_UNKNOWN)
                        continue;
                    if (seen && v != seen) {
                        flag[by * BX + bx] = 1;
                        queue[tail++] = by * BX + bx;
                        break;
                    }
                    seen = v;
                }
        }
    /* Track every node of a flagged block, then flag the neighbours whose
     * shared edge shows a state other than their corners'.  The queue is
     * taken a wave at a time: the nodes of all blocks queued so far are
     * tracked together, then the blocks are finished in queue order --
     * the same order, counts and flags as one block at a time. */
    long wave_end = head;
    while (head < tail) {
        if (head == wave_end) {
            wave_end = tail;
            sd->ntodo = 0;
            for (long q = head; q < wave_end; q++) {
                int i0, i1, j0, j1;
                block_span(queue[q] % BX, NX, &i0, &i1);
                block_span(queue[q] / BX, NY, &j0, &j1);
                for (int J = j0; J <= j1; J++)
                    for (int I = i0; I <= i1; I++)
                        if (want_node(sd, (size_t)J * NX + I, err) != 0)
                            goto done;
            }
            if (track_queued(sd, err) != 0)
                goto done;
        }
        int b = queue[head++], bx = b % BX, by = b / BX;
        int i0, i1, j0, j1;
        block_span(bx, NX, &i0, &i1);
        block_span(by, NY, &j0, &j1);
        for (int J = j0; J <= j1; J++)
            for (int I = i0; I <= i1; I++)
                apply_node(sd, (size_t)J * NX + I);
        static const int DX4[4] = {1, -1, 0, 0}, DY4[4] = {0, 0, 1, -1};
        for (int d = 0; d < 4; d++) {
            int nbx = bx + DX4[d], nby = by + DY4[d];
            if (nbx < 0 || nby < 0 || nbx >= BX || nby >= BY || flag[nby * BX + nbx])
                continue;
            int corner = sd->st[(size_t)j0 * NX + (DX4[d] > 0 ? i1 : i0)];
            if (DY4[d] > 0)
                corner = sd->st[(size_t)j1 * NX + i0];
            int differs = 0;
            if (DX4[d] != 0) {
                int I = DX4[d] > 0 ? i1 : i0;
                for (int J = j0; J <= j1; J++)
                    differs |= sd->st[(size_t)J * NX + I] != corner;
            } else {
                int J = DY4[d] > 0 ? j1 : j0;
                for (int I = i0; I <= i1; I++)
                    differs |= sd->st[(size_t)J * NX + I] != corner;
            }
            if (differs) {
                flag[nby * BX + nbx] = 1;
                queue[tail++] = nby * BX + nbx;
            }
        }
    }
    /* Unflagged blocks: every known node agrees; the rest follow. */
    for (int by = 0; by < BY; by++)
        for (int bx = 0; bx < BX; bx++) {
            if (flag[by * BX + bx])
                continue;
            int i0, i1, j0, j1;
            block_span(bx, NX, &i0, &i1);
            block_span(by, NY, &j0, &j1);
            int v = sd->st[(size_t)j0 * NX + i0];
            for (int J = j0; J <= j1; J++)
                for (int I = i0; I <= i1; I++) {
                    size_t n = (size_t)J * NX + I;
                    if (sd->st[n] != ND_UNKNOWN)
                        continue;
                    sd->cz->classified++;
                    if (v == ND_IN) {
                        size_t k = node_cell(sd, n);
                        set_in(sd, n, sd->ws->pw[k], sd->ws->wr[k]);
                    } else {
                        sd->st[n] = ND_OUT;
                    }
                }
        }
    rc = 0;
done:
    free(sd->st);
    sd->st = NULL;
    free(sd->slot);
    sd->slot = NULL;
    free(sd->todo);
    free(sd->path);
    sd->todo = NULL;
    sd->path = NULL;
    free(flag);
    free(queue);
    return rc;
}

/* Travel times of the captured nodes that reach the well within tmax:
 * flood outwards from the well's cells over the cells holding such nodes
 * (plus a fringe of one cell), tracking each captured node there with the
 * time limit.  Zones are path-connected to the well, so nothing inside
 * them is missed, and nodes far up the capture zone are never tracked. */
static int node_times(lattice *L, const unsigned char *cls, const gw_grid *g, int s, int c0,
                      int r0, int c1, int r1, double tmax, gw_error *err)
{
    int bw = c1 - c0 + 1, bh = r1 - r0 + 1;
    size_t nb = (size_t)bw * bh;
    unsigned char *vis = calloc(nb, 1);
    int *queue = malloc(nb * sizeof *queue);
    if (!vis || !queue) {
        free(vis);
        free(queue);
        return gw_fail(err, "out of memory for travel-time zones");
    }
    long head = 0, tail = 0;
    for (int row = r0; row <= r1; row++)
        for (int col = c0; col <= c1; col++)
            if (cls[(size_t)row * g->nx + col] == CL_WELL) {
                int b = (row - r0) * bw + (col - c0);
                vis[b] = 1;
                queue[tail++] = b;
            }
    gw_track_options o = L->ttopt;
    o.max_time = tmax * (1.0 + 1e-9);
    int rc = 0;
    while (head < tail) {
        int b = queue[head++];
        int col = c0 + b % bw, row = r0 + b / bw;
        int hot = cls[(size_t)row * g->nx + col] == CL_WELL;
        for (int j = 0; j < s && !hot; j++)
            for (int i = 0; i < s; i++) {
                size_t n = (size_t)(1 + (r1 - row) * s + j) * L->NX + 1 + (col - c0) * s + i;
                if (!L->cap[n])
                    continue;
                gw_track_result r = {0};
                if (gw_track(L->f, L->xs[n % L->NX], L->ys[n / L->NX], &o, &r, err) != 0) {
                    rc = -1;
                    goto done;
                }
                if (r.end == GW_END_STOP_CELL && r.stop_value == CL_WELL && r.time <= o.max_time) {
                    L->time[n] = r.time;
                    hot = 1;
                }
            }
        if (hot) {
            /* The well's nodes have time 0 (set by the caller); finish the
             * cell's other nodes before spreading. */
            for (int j = 0; j < s; j++)
                for (int i = 0; i < s; i++) {
                    size_t n = (size_t)(1 + (r1 - row) * s + j) * L->NX + 1 + (col - c0) * s + i;
                    if (!L->cap[n] || L->time[n] < HUGE_VAL ||
                        cls[(size_t)row * g->nx + col] == CL_WELL)
                        continue;
                    gw_track_result r = {0};
                    if (gw_track(L->f, L->xs[n % L->NX], L->ys[n / L->NX], &o, &r, err) != 0) {
                        rc = -1;
                        goto done;
                    }
                    if (r.end == GW_END_STOP_CELL && r.stop_value == CL_WELL &&
                        r.time <= o.max_time)
                        L->time[n] = r.time;
                }
            for (int dr = -1; dr <= 1; dr++)
                for (int dc = -1; dc <= 1; dc++) {
                    int cc = col + dc, rr = row + dr;
                    if (cc < c0 || cc > c1 || rr < r0 || rr > r1)
                        continue;
                    int nb2 = (rr - r0) * bw + (cc - c0);
                    if (vis[nb2] || cls[(size_t)rr * g->nx + cc] == CL_OUT)
                        continue;
                    vis[nb2] = 1;
                    queue[tail++] = nb2;
                }
        }
    }
done:
    free(vis);
    free(queue);
    return rc;
}

/* One well feature: zones by tracking, in the cells the reach share leaves
 * undecided. */
static int one_well(const gw_problem *p, const gw_flowfield *f, const gw_capture_options *o,
                    int inner_threads, workspace *ws, const double *times, gw_capture_zone *cz,
                    gw_error *err)
{
    const gw_grid *g = &p->grid;
    size_t nc = gw_grid_ncells(g);
    const int s = o->seeds_per_cell > 0 ? o->seeds_per_cell : 2;
    int rc = -1;
    lattice L = {0};
    gw_track_options_default(&L.topt);
    L.topt.weak = o->weak;
    L.topt.weak_threshold = o->weak_threshold;
    L.topt.no_length = 1;   /* zones use where and when paths end, not how far they went */
    L.topt.cells = ws->cells;
    /* Cells the well takes water from stop every path. */
    for (size_t k = 0; k < nc; k++)
        ws->cls[k] = ws->fout[k] > 0.0 ? CL_WELL : CL_BAND;
    reach_pass(f, ws->fg, ws->cls, ws->thru, ws->sfrac, ws->up.mark, ws->reach, ws->pw, ws->wr);
    int c0 = g->nx, c1 = -1, r0 = g->ny, r1 = -1;
    for (size_t k = 0; k < nc; k++) {
        double r = ws->reach[k];
        if (ws->cls[k] != CL_WELL)
            ws->cls[k] = !(r > DECIDE_EPS) ? CL_OUT : r >= 1.0 - DECIDE_EPS ? CL_IN : CL_BAND;
        ws->cmask[k] = ws->cls[k];
        ws->tmask[k] = ws->cls[k] == CL_IN ? 0 : ws->cls[k];
        if (ws->cls[k] == CL_OUT)
            continue;
        int col = (int)(k % (size_t)g->nx), row = (int)(k / (size_t)g->nx);
        if (col < c0) c0 = col;
        if (col > c1) c1 = col;
        if (row < r0) r0 = row;
        if (row > r1) r1 = row;
    }
    cz->capture.outer = -1;
    cz->min_retained = 1.0;
    if (c1 < 0) {
        rc = 0;
        goto done;
    }
    /* One cell of margin, so the zone never touches the lattice edge. */
    if (c0 > 0) c0--;
    if (r0 > 0) r0--;
    if (c1 + 1 < g->nx) c1++;
    if (r1 + 1 < g->ny) r1++;
    L.f = f;
    L.topt.stop_mask = ws->cmask;
    L.ttopt = L.topt;
    L.ttopt.stop_mask = ws->tmask;
    L.refine = o->refine > 0 ? o->refine : 10;
    L.rank = ws->rank;
    L.track_all = o->track_all;
    L.tol_x = KNOWN_TOL * g->dx / s;
    L.tol_y = KNOWN_TOL * g->dy / s;
    L.threads = inner_threads;
    L.NX = (c1 - c0 + 1) * s + 2;
    L.NY = (r1 - r0 + 1) * s + 2;
    size_t nn = (size_t)L.NX * L.NY;
    L.xs = malloc((size_t)L.NX * sizeof *L.xs);
    L.ys = malloc((size_t)L.NY * sizeof *L.ys);
    L.cap = calloc(nn, 1);
    L.time = malloc(nn * sizeof *L.time);
    L.emap = malloc(2 * nn * sizeof *L.emap);
    L.known = gw_fate_map_new();
    L.slot = calloc(KNOWN_BATCH, sizeof *L.slot);
    if (!L.xs || !L.ys || !L.cap || !L.time || !L.emap || !L.known || !L.slot) {
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
    seeding sd = {.L = &L, .g = g, .ws = ws, .cz = cz, .s = s, .c0 = c0, .r1 = r1};
    if (seed_lattice(&sd, err) != 0)
        goto done;
    long ncap = sd.ncap;
    double npass = sd.npass;
    cz->weak_pass_share = ncap ? npass / (double)ncap : 0.0;
    if (trace_zone(&L, HUGE_VAL, &cz->capture, err) != 0)
        goto done;
    cz->known_stops = L.known_stops;
    cz->ttz = calloc((size_t)(o->ntimes > 0 ? o->ntimes : 1), sizeof *cz->ttz);
    if (!cz->ttz) {
        gw_fail(err, "out of memory for travel-time zones");
        goto done;
    }
    if (o->ntimes > 0 &&
        node_times(&L, ws->cls, g, s, c0, r0, c1, r1, times[o->ntimes - 1], err) != 0)
        goto done;
    for (int i = 0; i < o->ntimes; i++) {
        if (trace_zone(&L, times[i], &cz->ttz[i], err) != 0)
            goto done;
        cz->nttz++;
    }
    rc = 0;
done:
    free(L.xs);
    free(L.ys);
    free(L.cap);
    free(L.time);
    free(L.emap);
    gw_fate_map_free(L.known);
    if (L.slot)
        for (int i = 0; i < KNOWN_BATCH; i++)
            gw_crossing_log_free(&L.slot[i].log);
    free(L.slot);
    free(L.px);
    free(L.py);
    free(L.next);
    free(L.pa);
    free(L.pb);
    return rc;
}

/* The wells, each with its own work arrays: zones of different wells are
 * independent, so they are computed side by side (each also tracking on
 * several threads), and every zone is the same whatever ran where. */
typedef struct {
    const gw_problem *p;
    const gw_flowfield *f;
    const gw_capture_options *opt;
    const flow_graph *fg;
    const gw_track_cells *cells;
    const long *rank;
    const unsigned char *thru;
    const double *sfrac;
    const double *times;
    int inner_threads;    /* threads within one well's zone */
    const int *order;     /* zones, largest pumping first */
    gw_capture *out;
} wells_job;

static int well_item(void *ctx, long i, gw_error *err)
{
    const wells_job *j = ctx;
    const gw_problem *p = j->p;
    const gw_flowfield *f = j->f;
    const gw_grid *g = &p->grid;
    size_t nc = gw_grid_ncells(g);
    const double *gin = f->src, *gout = f->sink;
    gw_capture_zone *cz = &j->out->zone[j->order[i]];
    workspace ws;
    if (workspace_init(&ws, nc) != 0) {
        workspace_free(&ws);
        return gw_fail(err, "out of memory for capture zones");
    }
    ws.fg = j->fg;
    ws.cells = j->cells;
    ws.rank = j->rank;
    ws.thru = j->thru;
    ws.sfrac = j->sfrac;
    double *fout = ws.fout, *w = ws.w;
    feature_out(f, cz->feature, fout, nc);
    /* Only the cells upstream of the well can send it water. */
    if (gw_upstream_of_feature(f, cz->feature, &ws.up, err) != 0) {
        workspace_free(&ws);
        return -1;
    }
    share_from_order(f, ws.fg, gout, fout, ws.up.mark, w);
    /* Source split: each feature's inflow times the share reaching the well. */
    double area = g->dx * g->dy;
    for (long u = 0; u < ws.up.n; u++) {
        size_t k = (size_t)ws.up.cell[u];
        if (p->active[k] && p->recharge[k] > 0.0)
            cz->source[0] += p->recharge[k] * area * w[k];
    }
    for (int e = 0; e < f->nexch; e++) {
        const gw_exchange *x = &f->exch[e];
        if (x->q > 0.0 && x->feature >= 0 && x->feature < p->nfeatures)
            cz->source[x->feature] += x->q * w[x->cell];
    }
    /* How strong a sink the well's cells are. */
    double take = 0.0, thru = 0.0;
    for (long u = 0; u < ws.up.n; u++) {
        size_t k = (size_t)ws.up.cell[u];
        if (!(fout[k] > 0.0))
            continue;
        take += fout[k];
        thru += gin[k];
        for (int d = 0; d < 4; d++) {
            long nb;
            double q = face_out(f, k, d, &nb);
            if (q < 0.0) thru -= q;
        }
    }
    cz->well_cell_share = thru > 0.0 ? (take < thru ? take / thru : 1.0) : 1.0;
    int rc = one_well(p, f, j->opt, j->inner_threads, &ws, j->times, cz, err);
    if (rc != 0)
        gw_fail_prefix(err, "capture zone of well '%s': ", p->features[cz->feature].name);
    workspace_free(&ws);
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
    out->nfeatures = p->nfeatures;
    double *times = malloc((size_t)(opt->ntimes > 0 ? opt->ntimes : 1) * sizeof *times);
    flow_graph fg = {0};
    gw_track_cells *cells = NULL;
    unsigned char *thru = NULL;
    double *sfrac = NULL;
    long *rank = NULL;
    int *order = NULL;
    int rc = -1;
    if (!times) {
        gw_fail(err, "out of memory for capture zones");
        goto done;
    }
    for (int i = 0; i < opt->ntimes; i++)
        times[i] = opt->times[i];
    qsort(times, (size_t)opt->ntimes, sizeof *times, cmp_double);
    /* One zone per pumping well feature, in feature order. */
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
    }
    if (out->nzone == 0) {
        rc = 0;
        goto done;
    }
    if (flow_graph_build(f, &fg, err) != 0)
        goto done;
    gw_track_options to;
    gw_track_options_default(&to);
    to.weak = opt->weak;
    to.weak_threshold = opt->weak_threshold;
    if (!(cells = gw_track_cells_new(f, &to, err)))
        goto done;
    size_t nc = gw_grid_ncells(&p->grid);
    thru = malloc(nc ? nc : 1);
    sfrac = malloc((nc ? nc : 1) * sizeof *sfrac);
    rank = malloc((nc ? nc : 1) * sizeof *rank);
    if (!thru || !sfrac || !rank) {
        gw_fail(err, "out of memory for capture zones");
        goto done;
    }
    for (size_t k = 0; k < nc; k++)
        rank[k] = LONG_MAX;
    for (long i = 0; i < fg.norder; i++)
        rank[fg.order[i]] = i;
    for (size_t k = 0; k < nc; k++) {
        sfrac[k] = 0.0;
        thru[k] = usable_cell(f, k) && !gw_track_sink_stops(f, (int)k, &to, &sfrac[k]);
    }
    wells_job job = {.p = p, .f = f, .opt = opt, .fg = &fg, .cells = cells, .rank = rank, .thru = thru,
                     .sfrac = sfrac, .times = times, .out = out};
    /* Wells side by side first: threads within a well only where there are
     * fewer wells than threads (each zone's batches are small, and nested
     * threads would only contend). */
    int threads = opt->threads > 0 ? opt->threads : gw_default_threads();
    job.inner_threads = threads / out->nzone > 1 ? threads / out->nzone : 1;
    /* Largest pumping (roughly the largest zone) first, so the last zone
     * to start is a small one and the threads finish together. */
    order = malloc((size_t)out->nzone * sizeof *order);
    if (!order) {
        gw_fail(err, "out of memory for capture zones");
        goto done;
    }
    for (int i = 0; i < out->nzone; i++) {
        int z = i;
        while (z > 0 && out->zone[order[z - 1]].rate < out->zone[i].rate) {
            order[z] = order[z - 1];
            z--;
        }
        order[z] = i;
    }
    job.order = order;
    if (gw_parallel_for(threads, out->nzone, well_item, &job, err) != 0)
        goto done;
    rc = 0;
done:
    if (rc != 0)
        gw_capture_free(out);
    flow_graph_free(&fg);
    gw_track_cells_free(cells);
    free(thru);
    free(sfrac);
    free(rank);
    free(order);
    free(times);
    return rc;
}
