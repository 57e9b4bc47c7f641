#include "problem.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

const char *gw_feature_type_name(gw_feature_type t)
{
    switch (t) {
    case GW_FEAT_RECHARGE: return "recharge";
    case GW_FEAT_FIXED_HEAD: return "fixed_head";
    case GW_FEAT_STREAM: return "stream";
    case GW_FEAT_DRAIN: return "drain";
    case GW_FEAT_WELL: return "well";
    case GW_FEAT_LEAKAGE: return "leakage";
    }
    return "unknown";
}

static char *dup_str(const char *s)
{
    size_t n = strlen(s) + 1;
    char *d = malloc(n);
    if (d)
        memcpy(d, s, n);
    return d;
}

gw_problem *gw_problem_new(const gw_grid *g, gw_aquifer_type type, gw_error *err)
{
    if (g->nx <= 0 || g->ny <= 0 || !(g->dx > 0) || !(g->dy > 0)) {
        gw_fail(err, "grid must have positive columns, rows and cell size");
        return NULL;
    }
    size_t n = gw_grid_ncells(g);
    gw_problem *p = calloc(1, sizeof *p);
    if (!p)
        goto oom;
    p->grid = *g;
    p->type = type;
    p->active = malloc(n);
    p->k = malloc(n * sizeof(double));
    p->anis = malloc(n * sizeof(double));
    p->thick = malloc(n * sizeof(double));
    p->bottom = malloc(n * sizeof(double));
    p->recharge = malloc(n * sizeof(double));
    p->porosity = malloc(n * sizeof(double));
    p->fixed = malloc(n * sizeof(double));
    p->fixed_feature = malloc(n * sizeof(int));
    if (!p->active || !p->k || !p->anis || !p->thick || !p->bottom || !p->recharge ||
        !p->porosity || !p->fixed || !p->fixed_feature)
        goto oom;
    for (size_t i = 0; i < n; i++) {
        p->active[i] = 1;
        p->k[i] = 1.0;
        p->anis[i] = 1.0;
        p->thick[i] = 1.0;
        p->bottom[i] = 0.0;
        p->recharge[i] = 0.0;
        p->porosity[i] = 0.25;
        p->fixed[i] = 0.0;
        p->fixed_feature[i] = -1;
    }
    if (gw_problem_add_feature(p, "Recharge", GW_FEAT_RECHARGE, err) < 0) {
        gw_problem_free(p);
        return NULL;
    }
    return p;
oom:
    gw_problem_free(p);
    gw_fail(err, "out of memory for a %d x %d grid", g->nx, g->ny);
    return NULL;
}

void gw_problem_free(gw_problem *p)
{
    if (!p)
        return;
    free(p->active);
    free(p->k);
    free(p->anis);
    free(p->thick);
    free(p->bottom);
    free(p->recharge);
    free(p->porosity);
    free(p->fixed);
    free(p->fixed_feature);
    free(p->links);
    free(p->wells);
    for (int i = 0; i < p->nfeatures; i++)
        free(p->features[i].name);
    free(p->features);
    free(p);
}

/* Grow *arr (of *n items of size sz) by one; capacity doubles at powers of two. */
static void *grow(void *arr, int n, size_t sz)
{
    if (n > 0 && (n & (n - 1)) != 0)
        return arr;
    size_t cap = n ? 2 * (size_t)n : 4;
    return realloc(arr, cap * sz);
}

int gw_problem_add_feature(gw_problem *p, const char *name, gw_feature_type t, gw_error *err)
{
    gw_feature *f = grow(p->features, p->nfeatures, sizeof *f);
    if (!f)
        return gw_fail(err, "out of memory adding feature %s", name);
    p->features = f;
    char *nm = dup_str(name);
    if (!nm)
        return gw_fail(err, "out of memory adding feature %s", name);
    f[p->nfeatures] = (gw_feature){ .name = nm, .type = t };
    return p->nfeatures++;
}

int gw_problem_add_link(gw_problem *p, const gw_link *l, gw_error *err)
{
    gw_link *a = grow(p->links, p->nlinks, sizeof *a);
    if (!a)
        return gw_fail(err, "out of memory adding a link");
    p->links = a;
    a[p->nlinks++] = *l;
    return 0;
}

int gw_problem_add_well(gw_problem *p, const gw_well *w, gw_error *err)
{
    gw_well *a = grow(p->wells, p->nwells, sizeof *a);
    if (!a)
        return gw_fail(err, "out of memory adding a well");
    p->wells = a;
    a[p->nwells++] = *w;
    return 0;
}

static void *dup_mem(const void *src, size_t bytes)
{
    if (!src || bytes == 0)
        return NULL;
    void *d = malloc(bytes);
    if (d)
        memcpy(d, src, bytes);
    return d;
}

gw_problem *gw_problem_clone(const gw_problem *p, gw_error *err)
{
    size_t n = gw_grid_ncells(&p->grid);
    gw_problem *q = calloc(1, sizeof *q);
    if (!q)
        goto oom;
    q->grid = p->grid;
    q->type = p->type;
    q->active = dup_mem(p->active, n);
    q->k = dup_mem(p->k, n * sizeof(double));
    q->anis = dup_mem(p->anis, n * sizeof(double));
    q->thick = dup_mem(p->thick, n * sizeof(double));
    q->bottom = dup_mem(p->bottom, n * sizeof(double));
    q->recharge = dup_mem(p->recharge, n * sizeof(double));
    q->porosity = dup_mem(p->porosity, n * sizeof(double));
    q->fixed = dup_mem(p->fixed, n * sizeof(double));
    q->fixed_feature = dup_mem(p->fixed_feature, n * sizeof(int));
    if (!q->active || !q->k || !q->anis || !q->thick || !q->bottom || !q->recharge ||
        !q->porosity || !q->fixed || !q->fixed_feature)
        goto oom;
    /* capacity must follow grow()'s power-of-two rule */
    for (int i = 0; i < p->nlinks; i++)
        if (gw_problem_add_link(q, &p->links[i], err))
            goto fail;
    for (int i = 0; i < p->nwells; i++)
        if (gw_problem_add_well(q, &p->wells[i], err))
            goto fail;
    for (int i = 0; i < p->nfeatures; i++)
        if (gw_problem_add_feature(q, p->features[i].name, p->features[i].type, err) < 0)
            goto fail;
    return q;
oom:
    gw_fail(err, "out of memory copying the problem");
fail:
    gw_problem_free(q);
    return NULL;
}

/* One pass over the connected active areas.  A link anchors its cell when
 * its conductance is positive and, with link_on given, it is head-dependent
 * in that state (a dry drain or a perched stream does not hold a head). */
static int check_areas(const gw_problem *p, const unsigned char *link_on, int iteration, gw_error *err);

int gw_problem_check_bounded(const gw_problem *p, gw_error *err)
{
    return check_areas(p, NULL, 0, err);
}

int gw_problem_check_bounded_state(const gw_problem *p, const unsigned char *link_on, int iteration,
                                   gw_error *err)
{
    return check_areas(p, link_on, iteration, err);
}

static int check_areas(const gw_problem *p, const unsigned char *link_on, int iteration, gw_error *err)
{
    const gw_grid *g = &p->grid;
    size_t n = gw_grid_ncells(g);
    unsigned char *anchor = calloc(n, 1);
    int *comp = malloc(n * sizeof *comp);
    int *stack = malloc(n * sizeof *stack);
    if (!anchor || !comp || !stack) {
        free(anchor);
        free(comp);
        free(stack);
        return gw_fail(err, "out of memory checking the boundary conditions");
    }
    for (int i = 0; i < p->nlinks; i++)
        if (p->links[i].cond > 0.0 && (!link_on || link_on[i]))
            anchor[p->links[i].cell] = 1;
    for (size_t k = 0; k < n; k++)
        comp[k] = -1;
    int rc = 0, ncomp = 0;
    for (size_t s = 0; s < n && rc == 0; s++) {
        if (!p->active[s] || p->fixed_feature[s] >= 0 || comp[s] >= 0)
            continue;
        int top = 0, bounded = 0;
        int cmin = g->nx, cmax = -1, rmin = g->ny, rmax = -1;
        long count = 0;
        stack[top++] = (int)s;
        comp[s] = ncomp;
        while (top > 0) {
            int k = stack[--top];
            int r = k / g->nx, c = k % g->nx;
            count++;
            if (c < cmin) cmin = c;
            if (c > cmax) cmax = c;
            if (r < rmin) rmin = r;
            if (r > rmax) rmax = r;
            if (anchor[k])
                bounded = 1;
            int nb[4] = { c > 0 ? k - 1 : -1, c + 1 < g->nx ? k + 1 : -1,
                          r > 0 ? k - g->nx : -1, r + 1 < g->ny ? k + g->nx : -1 };
            for (int j = 0; j < 4; j++) {
                int m = nb[j];
                if (m < 0 || !p->active[m])
                    continue;
                if (p->fixed_feature[m] >= 0) {
                    bounded = 1;
                    continue;
                }
                if (comp[m] < 0) {
                    comp[m] = ncomp;
                    stack[top++] = m;
                }
            }
        }
        if (!bounded && link_on)
            rc = gw_fail(err,
                         "after iteration %d, an active area of %ld cells (columns %d-%d, rows %d-%d; x %.6g to %.6g, "
                         "y %.6g to %.6g) has no head-controlling boundary left: its drains have fallen dry and its "
                         "streams are perched above the water table (head below the bed bottom), so the conductance "
                         "matrix is singular and there is no steady solution; less pumping, more recharge, or a "
                         "fixed head, leakage or stream that stays connected would give one",
                         iteration, count, cmin + 1, cmax + 1, rmin + 1, rmax + 1, g->x0 + cmin * g->dx,
                         g->x0 + (cmax + 1) * g->dx, gw_grid_ytop(g) - (rmax + 1) * g->dy,
                         gw_grid_ytop(g) - rmin * g->dy);
        else if (!bounded)
            rc = gw_fail(err,
                         "an active area of %ld cells (columns %d-%d, rows %d-%d; x %.6g to %.6g, y %.6g to %.6g) "
                         "touches no fixed head, stream, drain or leakage, so it has no steady solution: "
                         "connect it to a head-controlling boundary or make it inactive",
                         count, cmin + 1, cmax + 1, rmin + 1, rmax + 1, g->x0 + cmin * g->dx,
                         g->x0 + (cmax + 1) * g->dx, gw_grid_ytop(g) - (rmax + 1) * g->dy,
                         gw_grid_ytop(g) - rmin * g->dy);
        ncomp++;
    }
    free(anchor);
    free(comp);
    free(stack);
    return rc;
}
