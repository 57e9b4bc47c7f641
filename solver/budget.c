#include "budget.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

const char *gw_state_name(gw_state s)
{
    switch (s) {
    case GW_STATE_GAINING: return "gaining";
    case GW_STATE_LOSING: return "losing";
    case GW_STATE_MIXED: return "mixed";
    case GW_STATE_NONE: break;
    }
    return "none";
}

double gw_link_flux(const gw_link *l, double h)
{
    switch (l->kind) {
    case GW_LINK_STREAM: return l->cond * (l->ref - (h > l->floor ? h : l->floor));
    case GW_LINK_DRAIN: return h > l->ref ? l->cond * (l->ref - h) : 0.0;
    case GW_LINK_LEAKAGE: return l->cond * (l->ref - h);
    }
    return 0.0;
}

double gw_link_flux_in_state(const gw_link *l, int on, double h)
{
    if (on)
        return l->cond * (l->ref - h);
    return l->kind == GW_LINK_STREAM ? l->cond * (l->ref - l->floor) : 0.0;
}

static void add_flux(double q, double *in, double *out)
{
    if (q > 0)
        *in += q;
    else
        *out -= q;
}

int gw_budget_compute(const gw_problem *p, const gw_solution *sol, gw_budget *b, gw_error *err)
{
    memset(b, 0, sizeof *b);
    const gw_grid *g = &p->grid;
    size_t nc = gw_grid_ncells(g);
    const double *h = sol->head;
    double area = g->dx * g->dy;
    size_t nfixed = 0;
    for (size_t k = 0; k < nc; k++)
        if (p->active[k] && p->fixed_feature[k] >= 0)
            nfixed++;
    b->nfeatures = p->nfeatures;
    b->feature = calloc((size_t)p->nfeatures, sizeof *b->feature);
    size_t nr = (size_t)p->nlinks + (size_t)p->nwells + nfixed;
    b->reach = calloc(nr ? nr : 1, sizeof *b->reach);
    /* Per-cell other exchange, needed for the fixed-head balance. */
    double *other = calloc(nc, sizeof *other);
    if (!b->feature || !b->reach || !other) {
        free(other);
        gw_budget_free(b);
        return gw_fail(err, "out of memory computing budgets");
    }
    gw_feature_budget *fb = b->feature;
    /* Recharge over every active cell (negative recharge is an outflow). */
    for (size_t k = 0; k < nc; k++) {
        if (!p->active[k])
            continue;
        double q = p->recharge[k] * area;
        add_flux(q, &fb[0].in, &fb[0].out);
        other[k] += q;
    }
    int n = 0;
    /* Reaches are grouped by feature: walk features in order. */
    for (int f = 1; f < p->nfeatures; f++) {
        for (int i = 0; i < p->nlinks; i++) {
            const gw_link *l = &p->links[i];
            if (l->feature != f || !p->active[l->cell])
                continue;
            double q = gw_link_flux_in_state(l, sol->link_on[i], h[l->cell]);
            gw_reach *r = &b->reach[n++];
            r->feature = f;
            r->cell = l->cell;
            add_flux(q, &r->in, &r->out);
            other[l->cell] += q;
        }
        for (int i = 0; i < p->nwells; i++) {
            const gw_well *w = &p->wells[i];
            if (w->feature != f || !p->active[w->cell])
                continue;
            gw_reach *r = &b->reach[n++];
            r->feature = f;
            r->cell = w->cell;
            add_flux(-w->rate, &r->in, &r->out);
            other[w->cell] -= w->rate;
        }
    }
    /* Fixed-head cells supply what balances them: net flow out to the
     * neighbours minus everything else entering the cell. */
    for (int f = 1; f < p->nfeatures; f++) {
        if (p->features[f].type != GW_FEAT_FIXED_HEAD)
            continue;
        for (size_t k = 0; k < nc; k++) {
            if (!p->active[k] || p->fixed_feature[k] != f)
                continue;
            int c = (int)(k % (size_t)g->nx);
            double outflow = 0.0;
            if (c + 1 < g->nx) outflow += gw_flow_east(sol, k);
            if (c > 0) outflow -= gw_flow_east(sol, k - 1);
            if (k + g->nx < nc) outflow += gw_flow_south(sol, g->nx, k);
            if (k >= (size_t)g->nx) outflow -= gw_flow_south(sol, g->nx, k - g->nx);
            double q = outflow - other[k];
            gw_reach *r = &b->reach[n++];
            r->feature = f;
            r->cell = (int)k;
            add_flux(q, &r->in, &r->out);
        }
    }
    b->nreaches = n;
    free(other);

    /* Totals and states.  Reaches with a negligible net are ignored when
     * judging gaining/losing, so round-off does not make a stream "mixed". */
    double scale = fb[0].in + fb[0].out;
    for (int i = 0; i < n; i++)
        scale += b->reach[i].in + b->reach[i].out;
    double tiny = 1e-10 * scale;
    unsigned char *gain = calloc((size_t)p->nfeatures, 1), *lose = calloc((size_t)p->nfeatures, 1);
    if (!gain || !lose) {
        free(gain);
        free(lose);
        gw_budget_free(b);
        return gw_fail(err, "out of memory computing budgets");
    }
    for (int i = 0; i < n; i++) {
        gw_reach *r = &b->reach[i];
        fb[r->feature].in += r->in;
        fb[r->feature].out += r->out;
        double net = r->in - r->out;
        if (net < -tiny)
            gain[r->feature] = 1;
        else if (net > tiny)
            lose[r->feature] = 1;
    }
    if (fb[0].in - fb[0].out > tiny) lose[0] = 1;
    if (fb[0].out - fb[0].in > tiny) gain[0] = 1;
    for (int f = 0; f < p->nfeatures; f++) {
        fb[f].net = fb[f].in - fb[f].out;
        fb[f].state = gain[f] && lose[f] ? GW_STATE_MIXED : gain[f] ? GW_STATE_GAINING
                    : lose[f] ? GW_STATE_LOSING : GW_STATE_NONE;
        b->total_in += fb[f].in;
        b->total_out += fb[f].out;
    }
    free(gain);
    free(lose);
    double mean = 0.5 * (b->total_in + b->total_out);
    b->discrepancy_percent = mean > 0 ? 100.0 * (b->total_in - b->total_out) / mean : 0.0;
    return 0;
}

void gw_budget_free(gw_budget *b)
{
    if (!b)
        return;
    free(b->feature);
    free(b->reach);
    memset(b, 0, sizeof *b);
}
