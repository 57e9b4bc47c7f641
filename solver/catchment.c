#include "catchment.h"

#include "upstream.h"

#include <stdlib.h>
#include <string.h>

/* Downstream-first order of the active cells.  A cell is ready once every
 * neighbour it sends water to has been placed; heads strictly decrease along
 * positive fluxes, so every cell is placed unless heads are not finite. */
static long downstream_order(const gw_flowfield *f, int *order, long *nplaced)
{
    const gw_grid *g = &f->grid;
    size_t nc = gw_grid_ncells(g);
    int nx = g->nx;
    unsigned char *outdeg = calloc(nc, 1);
    if (!outdeg)
        return -1;
    long nactive = 0, head = 0, tail = 0;
    for (size_t k = 0; k < nc; k++) {
        if (!f->active[k])
            continue;
        nactive++;
        int c = (int)(k % (size_t)nx);
        int d = 0;
        if (f->qe[k] > 0) d++;
        if (c > 0 && f->qe[k - 1] < 0) d++;
        if (f->qs[k] > 0) d++;
        if (k >= (size_t)nx && f->qs[k - nx] < 0) d++;
        outdeg[k] = (unsigned char)d;
        if (d == 0)
            order[tail++] = (int)k;
    }
    while (head < tail) {
        size_t k = (size_t)order[head++];
        int c = (int)(k % (size_t)nx);
        /* Upstream neighbours: those sending water into k. */
        size_t up[4];
        int nu = 0;
        if (c > 0 && f->qe[k - 1] > 0) up[nu++] = k - 1;
        if (f->qe[k] < 0) up[nu++] = k + 1;
        if (k >= (size_t)nx && f->qs[k - nx] > 0) up[nu++] = k - nx;
        if (f->qs[k] < 0) up[nu++] = k + nx;
        for (int i = 0; i < nu; i++)
            if (--outdeg[up[i]] == 0)
                order[tail++] = (int)up[i];
    }
    free(outdeg);
    *nplaced = tail;
    return nactive - tail;
}

/* One partition pass for a feature whose per-cell sink is in sf, over the
 * cells upstream of it (mark); frac stays 0 elsewhere. */
static void share_pass(const gw_flowfield *f, const int *order, long n, const double *sf,
                       const unsigned char *mark, double *frac)
{
    int nx = f->grid.nx;
    for (long i = 0; i < n; i++) {
        size_t k = (size_t)order[i];
        if (!mark[k])
            continue;
        int c = (int)(k % (size_t)nx);
        double num = sf[k], den = f->sink[k], q;
        if ((q = f->qe[k]) > 0) { num += q * frac[k + 1]; den += q; }
        if (c > 0 && (q = -f->qe[k - 1]) > 0) { num += q * frac[k - 1]; den += q; }
        if ((q = f->qs[k]) > 0) { num += q * frac[k + nx]; den += q; }
        if (k >= (size_t)nx && (q = -f->qs[k - nx]) > 0) { num += q * frac[k - nx]; den += q; }
        frac[k] = den > 0 ? num / den : 0.0;
    }
}

void gw_catchments_free(gw_catchments *c)
{
    if (!c)
        return;
    free(c->dominant);
    free(c->dominant_share);
    free(c->discharge);
    free(c->area);
    free(c->recharge);
    free(c->received);
    free(c->delivered);
    free(c->source);
    free(c->mixed_area);
    memset(c, 0, sizeof *c);
}

/* Shared work arrays for the passes. */
typedef struct {
    int *order;
    long nplaced, unresolved;
    double *sf, *frac;    /* zero outside the current feature's upstream cells */
    gw_upstream up;
} work;

static void work_free(work *w)
{
    free(w->order);
    free(w->sf);
    free(w->frac);
    gw_upstream_free(&w->up);
}

static int work_init(const gw_flowfield *f, work *w)
{
    size_t nc = gw_grid_ncells(&f->grid);
    memset(w, 0, sizeof *w);
    w->order = malloc(nc * sizeof *w->order);
    w->sf = calloc(nc, sizeof *w->sf);
    w->frac = calloc(nc, sizeof *w->frac);
    if (!w->order || !w->sf || !w->frac)
        return -1;
    w->unresolved = downstream_order(f, w->order, &w->nplaced);
    return w->unresolved < 0 ? -1 : 0;
}

/* Fill w->frac for feature feat over w->up, its upstream cells (w->sf is
 * left zeroed; the caller clears frac with clear_pass). */
static int feature_pass(const gw_flowfield *f, work *w, int feat, gw_error *err)
{
    if (gw_upstream_of_feature(f, feat, &w->up, err) != 0)
        return -1;
    for (int i = 0; i < f->nexch; i++)
        if (f->exch[i].feature == feat && f->exch[i].q < 0)
            w->sf[f->exch[i].cell] -= f->exch[i].q;
    share_pass(f, w->order, w->nplaced, w->sf, w->up.mark, w->frac);
    for (int i = 0; i < f->nexch; i++)
        if (f->exch[i].feature == feat)
            w->sf[f->exch[i].cell] = 0.0;
    return 0;
}

static void clear_pass(work *w)
{
    for (long i = 0; i < w->up.n; i++)
        w->frac[w->up.cell[i]] = 0.0;
}

int gw_catchment_share(const gw_problem *p, const gw_flowfield *f, int feature, double *frac,
                       gw_error *err)
{
    if (feature < 0 || feature >= p->nfeatures)
        return gw_fail(err, "catchment of feature %d: no such feature", feature);
    work w;
    if (work_init(f, &w)) {
        work_free(&w);
        return gw_fail(err, "out of memory computing catchments");
    }
    int rc = feature_pass(f, &w, feature, err);
    if (rc == 0)
        memcpy(frac, w.frac, gw_grid_ncells(&f->grid) * sizeof *frac);
    work_free(&w);
    return rc;
}

int gw_catchments_compute(const gw_problem *p, const gw_flowfield *f, gw_catchments *c,
                          gw_error *err)
{
    memset(c, 0, sizeof *c);
    const gw_grid *g = &f->grid;
    size_t nc = gw_grid_ncells(g);
    int nf = p->nfeatures;
    double area = g->dx * g->dy;
    c->nfeatures = nf;
    c->dominant = malloc(nc * sizeof *c->dominant);
    c->dominant_share = calloc(nc, sizeof *c->dominant_share);
    c->discharge = calloc((size_t)nf, 1);
    c->area = calloc((size_t)nf, sizeof *c->area);
    c->recharge = calloc((size_t)nf, sizeof *c->recharge);
    c->received = calloc((size_t)nf, sizeof *c->received);
    c->delivered = calloc((size_t)nf * (size_t)nf, sizeof *c->delivered);
    c->source = calloc((size_t)nf, sizeof *c->source);
    c->mixed_area = calloc((size_t)nf, sizeof *c->mixed_area);
    work w;
    int rc = work_init(f, &w);
    if (rc || !c->dominant || !c->dominant_share || !c->discharge || !c->area || !c->recharge ||
        !c->received || !c->delivered || !c->source || !c->mixed_area) {
        work_free(&w);
        gw_catchments_free(c);
        return gw_fail(err, "out of memory computing catchments");
    }
    c->unresolved = w.unresolved;
    for (size_t k = 0; k < nc; k++)
        c->dominant[k] = -1;
    for (int i = 0; i < f->nexch; i++) {
        const gw_exchange *e = &f->exch[i];
        if (e->feature < 0 || e->feature >= nf)
            continue;
        if (e->q < 0)
            c->discharge[e->feature] = 1;
        else
            c->source[e->feature] += e->q;
    }
    for (size_t k = 0; k < nc; k++)
        if (f->active[k] && p->recharge[k] > 0)
            c->source[0] += p->recharge[k] * area;

    for (int feat = 0; feat < nf; feat++) {
        if (!c->discharge[feat])
            continue;
        if (feature_pass(f, &w, feat, err) != 0) {
            work_free(&w);
            gw_catchments_free(c);
            return -1;
        }
        const double *fr = w.frac;
        double a = 0.0, r = 0.0, mixed = 0.0;
        for (long u = 0; u < w.up.n; u++) {
            size_t k = (size_t)w.up.cell[u];
            if (fr[k] > 1e-12 && fr[k] < 1.0 - 1e-12)
                mixed += area;
            if (!f->active[k] || fr[k] <= 0.0)
                continue;
            a += area * fr[k];
            if (p->recharge[k] > 0)
                r += p->recharge[k] * area * fr[k];
            /* Strictly larger: the lower feature index wins ties. */
            if (fr[k] > c->dominant_share[k]) {
                c->dominant_share[k] = fr[k];
                c->dominant[k] = feat;
            }
        }
        c->area[feat] = a;
        c->mixed_area[feat] = mixed;
        c->recharge[feat] = r;
        double *del = c->delivered;
        del[0 * nf + feat] = r;
        double tot = r;
        for (int i = 0; i < f->nexch; i++) {
            const gw_exchange *e = &f->exch[i];
            if (e->q > 0 && e->feature >= 0 && e->feature < nf) {
                del[(size_t)e->feature * nf + feat] += e->q * fr[e->cell];
                tot += e->q * fr[e->cell];
            }
        }
        c->received[feat] = tot;
        clear_pass(&w);
    }
    work_free(&w);
    return 0;
}
