#include "flowfield.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

/* Saturated thickness floor for unconfined cells at or below their base:
 * the solver's default floor, so seepage velocities stay finite. */
#define GW_FF_MIN_THICK 1e-3

void gw_flowfield_free(gw_flowfield *f)
{
    if (!f)
        return;
    free(f->qe);
    free(f->qs);
    free(f->src);
    free(f->sink);
    free(f->sink_feature);
    free(f->sat_thick);
    free(f->porosity);
    free(f->exch);
    memset(f, 0, sizeof *f);
}

static int push_exch(gw_flowfield *f, int *cap, int cell, int feature, double q)
{
    if (f->nexch == *cap) {
        int nc = *cap ? 2 * *cap : 64;
        gw_exchange *e = realloc(f->exch, (size_t)nc * sizeof *e);
        if (!e)
            return -1;
        f->exch = e;
        *cap = nc;
    }
    f->exch[f->nexch++] = (gw_exchange){ cell, feature, q };
    return 0;
}

int gw_flowfield_compute(const gw_problem *p, const gw_solution *sol, gw_flowfield *f, gw_error *err)
{
    memset(f, 0, sizeof *f);
    const gw_grid *g = &p->grid;
    size_t nc = gw_grid_ncells(g);
    int nx = g->nx;
    const double *h = sol->head;
    double area = g->dx * g->dy;
    f->grid = *g;
    f->active = p->active;
    f->qe = calloc(nc, sizeof *f->qe);
    f->qs = calloc(nc, sizeof *f->qs);
    f->src = calloc(nc, sizeof *f->src);
    f->sink = calloc(nc, sizeof *f->sink);
    f->sink_feature = malloc(nc * sizeof *f->sink_feature);
    f->sat_thick = calloc(nc, sizeof *f->sat_thick);
    f->porosity = malloc(nc * sizeof *f->porosity);
    double *big = calloc(nc, sizeof *big);   /* largest single sink so far */
    int cap = 0;
    if (!f->qe || !f->qs || !f->src || !f->sink || !f->sink_feature || !f->sat_thick ||
        !f->porosity || !big)
        goto oom;
    memcpy(f->porosity, p->porosity, nc * sizeof *f->porosity);

    for (size_t k = 0; k < nc; k++) {
        f->sink_feature[k] = -1;
        if (!p->active[k])
            continue;
        int c = (int)(k % (size_t)nx);
        /* cx/cy are zero at edges and next to inactive cells, where the
         * neighbour head may be NAN: test before multiplying. */
        if (c + 1 < nx)
            f->qe[k] = gw_flow_east(sol, k);
        if (k + nx < nc)
            f->qs[k] = gw_flow_south(sol, nx, k);
        switch (p->type) {
        case GW_CONFINED: f->sat_thick[k] = p->thick[k]; break;
        case GW_UNCONFINED: {
            double b = h[k] - p->bottom[k];
            f->sat_thick[k] = b > GW_FF_MIN_THICK ? b : GW_FF_MIN_THICK;
            break;
        }
        case GW_SECTION: f->sat_thick[k] = 1.0; break;
        }
    }

    /* Exchanges, in the order gw_budget_compute sums them; `big`
     * temporarily holds the cell's other exchange for the fixed heads. */
    double *other = big;
    for (size_t k = 0; k < nc; k++) {
        if (!p->active[k])
            continue;
        double q = p->recharge[k] * area;
        other[k] += q;
        if (q > 0)
            f->src[k] += q;
        else if (q < 0 && push_exch(f, &cap, (int)k, 0, q))
            goto oom;
    }
    for (int i = 0; i < p->nlinks; i++) {
        const gw_link *l = &p->links[i];
        if (!p->active[l->cell])
            continue;
        double q = gw_link_flux_in_state(l, sol->link_on[i], h[l->cell]);
        other[l->cell] += q;
        if (push_exch(f, &cap, l->cell, l->feature, q))
            goto oom;
    }
    for (int i = 0; i < p->nwells; i++) {
        const gw_well *w = &p->wells[i];
        if (!p->active[w->cell])
            continue;
        other[w->cell] -= w->rate;
        if (push_exch(f, &cap, w->cell, w->feature, -w->rate))
            goto oom;
    }
    for (size_t k = 0; k < nc; k++) {
        int fe = p->fixed_feature[k];
        if (!p->active[k] || fe < 0 || fe >= p->nfeatures ||
            p->features[fe].type != GW_FEAT_FIXED_HEAD)
            continue;
        int c = (int)(k % (size_t)nx);
        double out = f->qe[k] + f->qs[k];
        if (c > 0) out -= f->qe[k - 1];
        if (k >= (size_t)nx) out -= f->qs[k - nx];
        if (push_exch(f, &cap, (int)k, fe, out - other[k]))
            goto oom;
    }
    /* Split into src/sink and find the largest sink per cell. */
    memset(big, 0, nc * sizeof *big);
    for (int i = 0; i < f->nexch; i++) {
        const gw_exchange *e = &f->exch[i];
        if (e->q > 0) {
            f->src[e->cell] += e->q;
        } else if (e->q < 0) {
            f->sink[e->cell] -= e->q;
            if (-e->q > big[e->cell]) {
                big[e->cell] = -e->q;
                f->sink_feature[e->cell] = e->feature;
            }
        }
    }
    free(big);
    return 0;
oom:
    free(big);
    gw_flowfield_free(f);
    return gw_fail(err, "out of memory computing the flow field (%zu cells)", nc);
}
