#include "upstream.h"

#include <stdlib.h>
#include <string.h>

void gw_upstream_free(gw_upstream *u)
{
    free(u->cell);
    free(u->mark);
    memset(u, 0, sizeof *u);
}

static void add(gw_upstream *u, size_t k)
{
    u->mark[k] = 1;
    u->cell[u->n++] = (int)k;
}

int gw_upstream_of_feature(const gw_flowfield *f, int feature, gw_upstream *u, gw_error *err)
{
    const gw_grid *g = &f->grid;
    size_t nc = gw_grid_ncells(g);
    const size_t nx = (size_t)g->nx;
    if (!u->mark) {
        u->mark = calloc(nc ? nc : 1, 1);
        u->cell = malloc((nc ? nc : 1) * sizeof *u->cell);
        if (!u->mark || !u->cell) {
            gw_upstream_free(u);
            return gw_fail(err, "out of memory finding the cells upstream of a feature");
        }
    } else {
        for (long i = 0; i < u->n; i++)
            u->mark[u->cell[i]] = 0;
    }
    u->n = 0;
    for (int i = 0; i < f->nexch; i++) {
        const gw_exchange *e = &f->exch[i];
        if (e->feature == feature && e->q < 0.0 && f->active[e->cell] && !u->mark[e->cell])
            add(u, (size_t)e->cell);
    }
    /* Breadth first against the flow: the set doubles as the queue. */
    for (long h = 0; h < u->n; h++) {
        size_t k = (size_t)u->cell[h];
        size_t col = k % nx;
        if (col > 0 && f->qe[k - 1] > 0.0 && !u->mark[k - 1] && f->active[k - 1])
            add(u, k - 1);
        if (col + 1 < nx && f->qe[k] < 0.0 && !u->mark[k + 1] && f->active[k + 1])
            add(u, k + 1);
        if (k >= nx && f->qs[k - nx] > 0.0 && !u->mark[k - nx] && f->active[k - nx])
            add(u, k - nx);
        if (k + nx < nc && f->qs[k] < 0.0 && !u->mark[k + nx] && f->active[k + nx])
            add(u, k + nx);
    }
    return 0;
}
