#include "section.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

const char *gw_system_kind_name(gw_system_kind k)
{
    switch (k) {
    case GW_SYSTEM_LOCAL: return "local";
    case GW_SYSTEM_INTERMEDIATE: return "intermediate";
    case GW_SYSTEM_REGIONAL: return "regional";
    }
    return "local";
}

void gw_section_options_default(gw_section_options *o)
{
    o->seeds_per_face = 4;
    o->divide_tol = 1e-4;
    o->zero_flux = 1e-9;
}

void gw_section_line_free(gw_section_line *l)
{
    if (!l)
        return;
    free(l->xz);
    l->xz = NULL;
    l->n = 0;
}

void gw_section_free(gw_section *s)
{
    if (!s)
        return;
    free(s->top);
    free(s->hinge);
    free(s->area);
    free(s->system);
    for (int i = 0; i < s->ndivides; i++)
        gw_section_line_free(&s->divide[i]);
    free(s->divide);
    memset(s, 0, sizeof *s);
}

/* ---- Streamline tracing (Pollock 1988) --------------------------------- */

/* Along one axis of a cell of length len, velocity linear from v1 (low
 * face) to v2 (high face), particle at p.  Returns +1 / -1 for the face it
 * leaves through (time in *t), 0 when it cannot leave along this axis. */
static int axis_exit(double v1, double v2, double len, double p, double *t)
{
    double a = (v2 - v1) / len, vp = v1 + a * p;
    int uniform = fabs(a) * len <= 1e-10 * fmax(fabs(v1), fabs(v2));
    if (vp > 0.0 && v2 > 0.0) {
        *t = uniform ? (len - p) / vp : log(v2 / vp) / a;
        return 1;
    }
    if (vp < 0.0 && v1 < 0.0) {
        *t = uniform ? -p / vp : log(v1 / vp) / a;
        return -1;
    }
    return 0;
}

static double axis_move(double v1, double v2, double len, double p, double t)
{
    double a = (v2 - v1) / len, vp = v1 + a * p;
    if (fabs(a) * len <= 1e-10 * fmax(fabs(v1), fabs(v2)))
        return p + vp * t;
    return p + vp * expm1(a * t) / a;
}

static int line_push(gw_section_line *l, int *cap, double x, double z)
{
    if (!l)
        return 0;
    if (l->n == *cap) {
        int nc = *cap ? 2 * *cap : 32;
        double *d = realloc(l->xz, 2 * (size_t)nc * sizeof *d);
        if (!d)
            return -1;
        l->xz = d;
        *cap = nc;
    }
    l->xz[2 * l->n] = x;
    l->xz[2 * l->n + 1] = z;
    l->n++;
    return 0;
}

/* Trace from (x, z) in non-fixed active cell k.  *end_cell: fixed cell the
 * water enters, or the cell where it stops (a sink), or -1 (stalled). */
static int trace_from(const gw_problem *p, const gw_solution *sol, double x, double z, int k,
                      double dir, gw_section_line *line, int *end_cell, double *time, double *zmin,
                      gw_error *err)
{
    const gw_grid *g = &p->grid;
    size_t nc = gw_grid_ncells(g);
    double ytop = gw_grid_ytop(g);
    int cap = 0;
    *time = 0.0;
    *zmin = z;
    *end_cell = -1;
    if (line) {
        line->xz = NULL;
        line->n = 0;
    }
    if (line_push(line, &cap, x, z))
        goto oom;
    for (size_t step = 0; step < 4 * nc + 100; step++) {
        int r = k / g->nx, c = k % g->nx;
        double n = p->porosity[k] > 0.0 ? p->porosity[k] : 1.0;
        double xi = fmin(fmax(x - (g->x0 + c * g->dx), 0.0), g->dx);
        double eta = fmin(fmax((ytop - r * g->dy) - z, 0.0), g->dy);   /* down from the top face */
        /* dir -1 traces backward, to where the water came from */
        double qw = c > 0 ? dir * gw_flow_east(sol, (size_t)k - 1) : 0.0, qe = dir * gw_flow_east(sol, (size_t)k);
        double qn = r > 0 ? dir * gw_flow_south(sol, g->nx, (size_t)k - (size_t)g->nx) : 0.0;
        double qs = dir * gw_flow_south(sol, g->nx, (size_t)k);
        double vx1 = qw / (g->dy * n), vx2 = qe / (g->dy * n);
        double vd1 = qn / (g->dx * n), vd2 = qs / (g->dx * n);
        double tx = HUGE_VAL, td = HUGE_VAL;
        int ex = axis_exit(vx1, vx2, g->dx, xi, &tx), ed = axis_exit(vd1, vd2, g->dy, eta, &td);
        if (!ex)
            tx = HUGE_VAL;
        if (!ed)
            td = HUGE_VAL;
        if (!ex && !ed) {
            /* No way out: a strong sink (ends here) or a stagnation point. */
            *end_cell = -1;
            for (int i = 0; i < p->nlinks; i++)
                if (p->links[i].cell == k)
                    *end_cell = k;
            for (int i = 0; i < p->nwells; i++)
                if (p->wells[i].cell == k && dir * p->wells[i].rate > 0)
                    *end_cell = k;
            if (dir < 0 && p->recharge[k] > 0.0)
                *end_cell = k;
            return 0;
        }
        double t = fmin(tx, td);
        if (tx <= td) {
            xi = ex > 0 ? g->dx : 0.0;
            eta = axis_move(vd1, vd2, g->dy, eta, t);
        } else {
            eta = ed > 0 ? g->dy : 0.0;
            xi = axis_move(vx1, vx2, g->dx, xi, t);
        }
        x = g->x0 + c * g->dx + xi;
        z = ytop - r * g->dy - eta;
        *time += t;
        if (z < *zmin)
            *zmin = z;
        if (line_push(line, &cap, x, z))
            goto oom;
        int m = tx <= td ? k + ex : k + ed * g->nx;
        if (m < 0 || (size_t)m >= nc || !p->active[m])
            return 0;   /* cannot happen with zero edge fluxes; treat as stalled */
        if (p->fixed_feature[m] >= 0) {
            *end_cell = m;
            return 0;
        }
        /* A weak sink on the top (a seepage face, drain or gaining stream
         * in the topmost active cell) ends the streamline: water reaching
         * it leaves there, and passing on would follow the top row to
         * nowhere.  Only top cells are checked, which keeps this cheap. */
        if (dir > 0 && (m < g->nx || !p->active[m - g->nx]))
            for (int i = 0; i < p->nlinks; i++)
                if (p->links[i].cell == m && sol->head[m] > p->links[i].ref) {
                    *end_cell = m;
                    return 0;
                }
        k = m;
    }
    return 0;   /* step limit: stalled */
oom:
    gw_section_line_free(line);
    return gw_fail(err, "out of memory tracing a streamline");
}

int gw_section_trace(const gw_problem *p, const gw_solution *sol, double x, double z,
                     gw_section_line *line, int *end_cell, double *time, double *zmin,
                     gw_error *err)
{
    int c, r;
    if (gw_grid_locate(&p->grid, x, z, &c, &r))
        return gw_fail(err, "streamline start (%g, %g) is outside the section", x, z);
    int k = r * p->grid.nx + c;
    if (!p->active[k] || p->fixed_feature[k] >= 0)
        return gw_fail(err, "streamline start (%g, %g) is not in an active, non-fixed cell", x, z);
    return trace_from(p, sol, x, z, k, 1.0, line, end_cell, time, zmin, err);
}

/* ---- Top boundary, hinge points, areas --------------------------------- */

static int area_of_x(const gw_section *s, double x)
{
    int a = 0;
    while (a < s->nhinges && s->hinge[a].x < x)
        a++;
    return a < s->nareas ? a : s->nareas - 1;
}

/* Water table at x, linear between top columns. */
static double wt_at(const gw_section *s, double x)
{
    if (x <= s->top[0].x)
        return s->top[0].z;
    for (int i = 1; i < s->ntop; i++)
        if (x <= s->top[i].x) {
            double f = (x - s->top[i - 1].x) / (s->top[i].x - s->top[i - 1].x);
            return s->top[i - 1].z + f * (s->top[i].z - s->top[i - 1].z);
        }
    return s->top[s->ntop - 1].z;
}

/* A water table that slopes across the rows is a staircase of cells: flat
 * treads (fixed cells with a non-fixed cell below) and risers (the side of
 * a fixed cell one step lower, facing a non-fixed cell below the tread).
 * The flow through a riser is the horizontal flow below the water table
 * crossing its slope (q . n = qz - qx dz/dx along the line), which the
 * continuum spreads along the slope but the grid concentrates at the
 * step, giving cell-sized discharge spots and false hinge points.  So the
 * riser flow is moved, in equal parts, to the columns of the tread it lies
 * under.  The solution and the totals are unchanged; a flat top has no
 * risers. */
static void spread_risers(const gw_problem *p, const gw_solution *sol, const int *toprow, double *flux)
{
    const gw_grid *g = &p->grid;
    int nx = g->nx;
    /* bottom row of each column's crust: the fixed cells from its top down */
    int *cb = malloc((size_t)nx * sizeof *cb);
    if (!cb)
        return;   /* analysis goes on with the unspread fluxes */
    for (int c = 0; c < nx; c++) {
        cb[c] = toprow[c];
        while (cb[c] >= 0 && cb[c] + 1 < g->ny) {
            size_t k = (size_t)(cb[c] + 1) * (size_t)nx + (size_t)c;
            if (!p->active[k] || p->fixed_feature[k] < 0)
                break;
            cb[c]++;
        }
    }
    for (int c = 0; c < nx; c++) {
        int thick = cb[c] - toprow[c] + 1;
        if (toprow[c] < 0 || thick > 8)
            continue;   /* a fixed side or block, not a water-table crust */
        for (int side = -1; side <= 1; side += 2) {
            int nc = c + side;
            if (nc < 0 || nc >= nx || toprow[nc] < 0)
                continue;
            int feat = p->fixed_feature[(size_t)cb[nc] * (size_t)nx + (size_t)nc];
            for (int r = cb[nc] + 1; r <= cb[c] && r - cb[nc] <= thick; r++) {
                size_t k = (size_t)r * (size_t)nx + (size_t)c, m = k + (size_t)(long)side;
                if (p->fixed_feature[k] != feat || !p->active[m] || p->fixed_feature[m] >= 0)
                    continue;
                /* flow from fixed cell k into the aquifer through the riser */
                double q = side > 0 ? gw_flow_east(sol, k) : -gw_flow_east(sol, m);
                int j = nc, n = 0;
                while (j >= 0 && j < nx && toprow[j] == toprow[nc]) {
                    n++;
                    j += side;
                }
                flux[c] -= q;
                for (j = nc; j >= 0 && j < nx && toprow[j] == toprow[nc]; j += side)
                    flux[j] += q / n;
            }
        }
    }
    free(cb);
}

static int build_top(const gw_problem *p, const gw_solution *sol, const gw_budget *b,
                     const gw_section_options *o, gw_section *s, gw_error *err)
{
    const gw_grid *g = &p->grid;
    int nx = g->nx;
    double area = g->dx * g->dy;
    double *flux = calloc((size_t)nx, sizeof *flux);
    int *toprow = malloc((size_t)nx * sizeof *toprow);
    if (!flux || !toprow) {
        free(flux);
        free(toprow);
        return gw_fail(err, "out of memory analysing the section top");
    }
    for (int c = 0; c < nx; c++)
        toprow[c] = -1;
    /* Exchange with the outside per column: reaches of everything but
     * wells (a fixed cell's reach already nets out the recharge inside it,
     * so adding recharge gives what the cell passes to the aquifer). */
    for (int i = 0; i < b->nreaches; i++) {
        const gw_reach *rc = &b->reach[i];
        if (p->features[rc->feature].type == GW_FEAT_WELL)
            continue;
        int c = rc->cell % nx, r = rc->cell / nx;
        flux[c] += rc->in - rc->out;
        if (toprow[c] < 0 || r < toprow[c])
            toprow[c] = r;
    }
    for (size_t k = 0; k < gw_grid_ncells(g); k++) {
        if (!p->active[k] || p->recharge[k] == 0.0)
            continue;
        int c = (int)(k % (size_t)nx), r = (int)(k / (size_t)nx);
        flux[c] += p->recharge[k] * area;
        if (toprow[c] < 0 || r < toprow[c])
            toprow[c] = r;
    }
    spread_risers(p, sol, toprow, flux);
    int nt = 0;
    for (int c = 0; c < nx; c++)
        nt += toprow[c] >= 0;
    s->top = calloc(nt ? (size_t)nt : 1, sizeof *s->top);
    s->hinge = calloc(nt ? (size_t)nt : 1, sizeof *s->hinge);
    s->area = calloc((size_t)nt + 1, sizeof *s->area);
    if (!s->top || !s->hinge || !s->area) {
        free(flux);
        free(toprow);
        return gw_fail(err, "out of memory analysing the section top");
    }
    double fmaxabs = 0.0;
    for (int c = 0; c < nx; c++) {
        if (toprow[c] < 0)
            continue;
        gw_section_top *t = &s->top[s->ntop++];
        t->col = c;
        t->x = gw_grid_xc(g, c);
        t->z = sol->head[(size_t)toprow[c] * (size_t)nx + (size_t)c];
        t->flux = flux[c];
        t->rate = flux[c] / g->dx;
        fmaxabs = fmax(fmaxabs, fabs(flux[c]));
    }
    free(flux);
    free(toprow);
    if (s->ntop == 0)
        return gw_fail(err, "the section has no top boundary (fixed heads, seepage or recharge)");

    /* Hinge points: sign changes of the top flux, placed by linear
     * interpolation of the rate between the two nearest columns that carry
     * flow (columns with negligible flow in between are skipped). */
    /* Negligible: relative to the largest top flux, and to the round-off of
     * a face flux (conductance x head), so a still water table has none. */
    double cmax = 0.0, hmax = 0.0;
    for (size_t k = 0; k < gw_grid_ncells(g); k++) {
        cmax = fmax(cmax, fmax(sol->cx[k], sol->cy[k]));
        if (p->active[k])
            hmax = fmax(hmax, fabs(sol->head[k]));
    }
    double tiny = fmax(o->zero_flux * fmaxabs, 1e-10 * cmax * hmax);
    int prev = -1, psign = 0;
    for (int i = 0; i < s->ntop; i++) {
        double q = s->top[i].flux;
        int sg = q > tiny ? 1 : q < -tiny ? -1 : 0;
        if (!sg)
            continue;
        if (psign && sg != psign) {
            const gw_section_top *a = &s->top[prev], *c = &s->top[i];
            double f = a->rate / (a->rate - c->rate);
            s->hinge[s->nhinges].x = a->x + f * (c->x - a->x);
            s->hinge[s->nhinges].z = a->z + f * (c->z - a->z);
            s->nhinges++;
        }
        prev = i;
        psign = sg;
    }
    if (psign == 0)
        return 0;   /* no flow through the top: no areas */

    /* Areas between hinges. */
    s->nareas = s->nhinges + 1;
    for (int a = 0; a < s->nareas; a++) {
        gw_section_area *ar = &s->area[a];
        ar->x0 = a == 0 ? s->top[0].x - 0.5 * g->dx : s->hinge[a - 1].x;
        ar->x1 = a == s->nhinges ? s->top[s->ntop - 1].x + 0.5 * g->dx : s->hinge[a].x;
        ar->zmax = -HUGE_VAL;
        ar->zmin = HUGE_VAL;
        ar->recharge = -1;
    }
    for (int i = 0; i < s->ntop; i++) {
        const gw_section_top *t = &s->top[i];
        gw_section_area *ar = &s->area[area_of_x(s, t->x)];
        ar->zmax = fmax(ar->zmax, t->z);
        ar->zmin = fmin(ar->zmin, t->z);
        if (t->flux > tiny && ar->recharge != 0) {
            ar->recharge = 1;
            ar->flux += t->flux;
        } else if (t->flux < -tiny && ar->recharge != 1) {
            ar->recharge = 0;
            ar->flux -= t->flux;
        }
    }
    for (int a = 0; a < s->nareas; a++) {
        gw_section_area *ar = &s->area[a];
        double len = ar->x1 - ar->x0;
        if (ar->recharge == 1) {
            s->recharge_length += len;
            s->recharge_flux += ar->flux;
        } else {
            ar->recharge = 0;
            s->discharge_length += len;
            s->discharge_flux += ar->flux;
        }
    }
    s->recharge_rate = s->recharge_length > 0 ? s->recharge_flux / s->recharge_length : 0.0;
    s->discharge_rate = s->discharge_length > 0 ? s->discharge_flux / s->discharge_length : 0.0;
    return 0;
}

/* ---- Flow systems ------------------------------------------------------ */

/* A face through which water leaves a fixed (water-table) cell into the
 * aquifer, in a recharge area.  Seeds on it are at fraction f in [0, 1]. */
typedef struct {
    int cell;          /* the non-fixed cell the water enters */
    double xa, za;     /* face start (f = 0) */
    double xb, zb;     /* face end (f = 1) */
    double flux;       /* L^2/T through the face */
    int area;          /* recharge area */
} seed_face;

typedef struct {
    double s;          /* face index + fraction */
    int area, label;   /* recharge area; discharge area or -1 */
    double zmin, xlow, time;
} sample;

typedef struct {
    const gw_problem *p;
    const gw_solution *sol;
    gw_section *sec;
    seed_face *face;
    int nfaces;
} ctx;

static void seed_point(const ctx *c, double s, int *fi, double *x, double *z)
{
    int i = (int)floor(s);
    if (i >= c->nfaces)
        i = c->nfaces - 1;
    if (i < 0)
        i = 0;
    double f = s - i;
    const seed_face *sf = &c->face[i];
    *fi = i;
    *x = sf->xa + f * (sf->xb - sf->xa);
    *z = sf->za + f * (sf->zb - sf->za);
}

/* Area (index) where a streamline ends: end is the fixed or link cell it
 * reached (or, traced backward, the source cell); -1 when it stalled or
 * ended at a well.  want_recharge says which kind of area the end must be
 * (1 for backward traces).  Water reaching the water table inside an area
 * of the other kind (at its edge, or at a riser of a stepped water table)
 * would, in the continuum, go on just below the water table the way it was
 * heading: it belongs to the next area of the right kind that way (the
 * nearest one when it did not move along x). */
static int end_area(const gw_problem *p, const gw_section *s, int end, const gw_section_line *path,
                    int want_recharge)
{
    if (end < 0 || s->nareas == 0)
        return -1;
    int ok = p->fixed_feature[end] >= 0 || (want_recharge && p->recharge[end] > 0.0);
    for (int i = 0; i < p->nlinks && !ok; i++)
        ok = p->links[i].cell == end;
    if (!ok)
        return -1;
    double xe = gw_grid_xc(&p->grid, end % p->grid.nx);
    int a = area_of_x(s, xe);
    if (s->area[a].recharge == want_recharge)
        return a;
    int lo = a - 1, hi = a + 1;
    double dl = lo >= 0 ? xe - s->area[lo].x1 : HUGE_VAL;
    double dh = hi < s->nareas ? s->area[hi].x0 - xe : HUGE_VAL;
    double dx = path && path->n > 1 ? path->xz[2 * (path->n - 1)] - path->xz[0] : 0.0;
    if (dx > 0.0 && hi < s->nareas)
        a = hi;
    else if (dx < 0.0 && lo >= 0)
        a = lo;
    else
        a = dl <= dh ? lo : hi;
    return a >= 0 && a < s->nareas ? a : -1;
}

/* Trace the seed at s; fills smp and (if line) the path. */
static int run_seed(ctx *c, double s, sample *smp, gw_section_line *line, gw_error *err)
{
    int fi, end;
    double x, z, t, zmin;
    seed_point(c, s, &fi, &x, &z);
    gw_section_line tmp = {0};
    if (trace_from(c->p, c->sol, x, z, c->face[fi].cell, 1.0, &tmp, &end, &t, &zmin, err))
        return -1;
    c->sec->ntraced++;
    smp->s = s;
    smp->area = c->face[fi].area;
    smp->zmin = zmin;
    smp->time = t;
    smp->xlow = x;
    for (int i = 0; i < tmp.n; i++)
        if (tmp.xz[2 * i + 1] <= zmin) {
            smp->xlow = tmp.xz[2 * i];
            break;
        }
    smp->label = end_area(c->p, c->sec, end, &tmp, 0);
    if (line)
        *line = tmp;
    else
        gw_section_line_free(&tmp);
    return 0;
}

static int cmp_face(const void *a, const void *b)
{
    const seed_face *u = a, *v = b;
    double xu = 0.5 * (u->xa + u->xb), xv = 0.5 * (v->xa + v->xb);
    if (xu != xv)
        return xu < xv ? -1 : 1;
    double zu = 0.5 * (u->za + u->zb), zv = 0.5 * (v->za + v->zb);
    return zu > zv ? -1 : zu < zv ? 1 : 0;
}

static int cmp_sample(const void *a, const void *b)
{
    double u = ((const sample *)a)->s, v = ((const sample *)b)->s;
    return u < v ? -1 : u > v ? 1 : 0;
}

static int collect_faces(ctx *c, gw_error *err)
{
    const gw_problem *p = c->p;
    const gw_grid *g = &p->grid;
    gw_section *s = c->sec;
    size_t nc = gw_grid_ncells(g);
    double ytop = gw_grid_ytop(g);
    int cap = 64;
    c->face = malloc((size_t)cap * sizeof *c->face);
    if (!c->face)
        return gw_fail(err, "out of memory collecting streamline seeds");
    for (int t = 0; t < s->ntop; t++) {
        int col = s->top[t].col;
        if (!(s->top[t].flux > 0.0) || !s->area[area_of_x(s, s->top[t].x)].recharge)
            continue;
        for (int r = 0; r < g->ny; r++) {
            size_t k = (size_t)r * (size_t)g->nx + (size_t)col;
            if (!p->active[k] || p->fixed_feature[k] < 0)
                continue;
            double xl = g->x0 + col * g->dx, yt = ytop - r * g->dy;
            /* neighbours: south, north, east, west; flux out of k into them */
            struct { long m; double q, xa, za, xb, zb; } nb[4] = {
                { k + g->nx < nc ? (long)(k + g->nx) : -1, k + g->nx < nc ? gw_flow_south(c->sol, g->nx, k) : 0,
                  xl, yt - g->dy, xl + g->dx, yt - g->dy },
                { r > 0 ? (long)(k - g->nx) : -1, r > 0 ? -gw_flow_south(c->sol, g->nx, k - g->nx) : 0,
                  xl, yt, xl + g->dx, yt },
                { col + 1 < g->nx ? (long)k + 1 : -1, col + 1 < g->nx ? gw_flow_east(c->sol, k) : 0,
                  xl + g->dx, yt, xl + g->dx, yt - g->dy },
                { col > 0 ? (long)k - 1 : -1, col > 0 ? -gw_flow_east(c->sol, k - 1) : 0,
                  xl, yt, xl, yt - g->dy },
            };
            for (int d = 0; d < 4; d++) {
                if (nb[d].m < 0 || !(nb[d].q > 0.0) || !p->active[nb[d].m] ||
                    p->fixed_feature[nb[d].m] >= 0)
                    continue;
                if (c->nfaces == cap) {
                    cap *= 2;
                    seed_face *nf = realloc(c->face, (size_t)cap * sizeof *nf);
                    if (!nf)
                        return gw_fail(err, "out of memory collecting streamline seeds");
                    c->face = nf;
                }
                seed_face *f = &c->face[c->nfaces++];
                f->cell = (int)nb[d].m;
                f->xa = nb[d].xa;
                f->za = nb[d].za;
                f->xb = nb[d].xb;
                f->zb = nb[d].zb;
                f->flux = nb[d].q;
                f->area = area_of_x(s, s->top[t].x);
            }
        }
    }
    qsort(c->face, (size_t)c->nfaces, sizeof *c->face, cmp_face);
    return 0;
}

/* Flux of faces over s in [a, b). */
static double seed_flux(const ctx *c, double a, double b)
{
    double q = 0.0;
    for (int i = (int)floor(a); i < c->nfaces && i < b; i++) {
        double lo = fmax(a, (double)i), hi = fmin(b, (double)i + 1.0);
        if (hi > lo)
            q += c->face[i].flux * (hi - lo);
    }
    return q;
}

static int add_divide(gw_section *s, gw_section_line *l, int *cap, gw_error *err)
{
    if (s->ndivides == *cap) {
        int nc = *cap ? 2 * *cap : 8;
        gw_section_line *d = realloc(s->divide, (size_t)nc * sizeof *d);
        if (!d) {
            gw_section_line_free(l);
            return gw_fail(err, "out of memory storing dividing streamlines");
        }
        s->divide = d;
        *cap = nc;
    }
    s->divide[s->ndivides++] = *l;
    return 0;
}

/* Toth (1963): see section.h. */
static gw_system_kind classify(const gw_section *s, int recharge_area, int discharge_area)
{
    int hi_area = 0, lo_area = 0;
    double zhi = -HUGE_VAL, zlo = HUGE_VAL;
    for (int t = 0; t < s->ntop; t++) {
        if (s->top[t].z > zhi) { zhi = s->top[t].z; hi_area = area_of_x(s, s->top[t].x); }
        if (s->top[t].z < zlo) { zlo = s->top[t].z; lo_area = area_of_x(s, s->top[t].x); }
    }
    if (recharge_area == hi_area && discharge_area == lo_area)
        return GW_SYSTEM_REGIONAL;
    return abs(recharge_area - discharge_area) == 1 ? GW_SYSTEM_LOCAL : GW_SYSTEM_INTERMEDIATE;
}

static int find_systems(ctx *c, const gw_section_options *o, gw_error *err)
{
    gw_section *s = c->sec;
    const gw_grid *g = &c->p->grid;
    int rc = -1;
    if (collect_faces(c, err))
        return -1;
    if (c->nfaces == 0)
        return 0;
    int per = o->seeds_per_face > 0 ? o->seeds_per_face : 1;
    size_t cap = (size_t)c->nfaces * (size_t)per + 64, n = 0;
    sample *sm = malloc(cap * sizeof *sm);
    gw_flow_system *sys = NULL;
    int dcap = 0;
    if (!sm)
        return gw_fail(err, "out of memory tracing flow systems");
    for (int i = 0; i < c->nfaces; i++)
        for (int j = 0; j < per; j++)
            if (run_seed(c, i + (j + 0.5) / per, &sm[n++], NULL, err))
                goto done;
    /* Bisect between neighbouring seeds that reach different discharge
     * areas: the limit is a dividing streamline.  Both limits join the
     * samples (they bound the depth of the two systems). */
    size_t nbase = n;
    for (size_t i = 0; i + 1 < nbase; i++) {
        sample lo = sm[i], hi = sm[i + 1];
        if (lo.area != hi.area || lo.label == hi.label)
            continue;
        /* tolerance in s: divide_tol cells of face length */
        double tol = o->divide_tol;
        for (int it = 0; it < 60 && hi.s - lo.s > tol; it++) {
            sample mid;
            if (run_seed(c, 0.5 * (lo.s + hi.s), &mid, NULL, err))
                goto done;
            if (mid.label == lo.label)
                lo = mid;
            else
                hi = mid;
        }
        if (n + 2 > cap) {
            cap *= 2;
            sample *ns = realloc(sm, cap * sizeof *ns);
            if (!ns) {
                gw_fail(err, "out of memory tracing flow systems");
                goto done;
            }
            sm = ns;
        }
        sm[n++] = lo;
        sm[n++] = hi;
        gw_section_line line;
        sample tmp;
        if (run_seed(c, lo.s, &tmp, &line, err) || add_divide(s, &line, &dcap, err))
            goto done;
    }
    qsort(sm, n, sizeof *sm, cmp_sample);

    /* Runs of samples with the same (recharge area, discharge area) make
     * up flow systems; runs with the same pair merge. */
    sys = calloc(n, sizeof *sys);
    if (!sys) {
        gw_fail(err, "out of memory tracing flow systems");
        goto done;
    }
    size_t i = 0;
    while (i < n) {
        size_t j = i;
        while (j + 1 < n && sm[j + 1].area == sm[i].area && sm[j + 1].label == sm[i].label)
            j++;
        /* Run limits in s: mid-way to the neighbouring samples; where the
         * recharge area changes, at the face boundary. */
        double a = i == 0 ? 0.0 : 0.5 * (sm[i - 1].s + sm[i].s);
        double b = j + 1 == n ? (double)c->nfaces : 0.5 * (sm[j].s + sm[j + 1].s);
        if (i > 0 && sm[i - 1].area != sm[i].area)
            a = fmax(floor(sm[i].s), sm[i - 1].s);
        if (j + 1 < n && sm[j + 1].area != sm[j].area)
            b = fmin(floor(sm[j + 1].s), sm[j + 1].s);
        double q = seed_flux(c, a, b);
        int fi;
        double xa, za, xb, zb;
        seed_point(c, a, &fi, &xa, &za);
        seed_point(c, fmax(a, b - 1e-12), &fi, &xb, &zb);   /* just inside the run */
        if (sm[i].label < 0) {
            s->other_flux += q;
        } else {
            gw_flow_system *f = NULL;
            for (int k = 0; k < s->nsystems; k++)
                if (sys[k].recharge_area == sm[i].area && sys[k].discharge_area == sm[i].label)
                    f = &sys[k];
            if (!f) {
                f = &sys[s->nsystems++];
                f->recharge_area = sm[i].area;
                f->discharge_area = sm[i].label;
                f->x_from = HUGE_VAL;
                f->x_to = -HUGE_VAL;
                f->bottom = HUGE_VAL;
                f->time_min = HUGE_VAL;
                f->time_max = 0.0;
                f->depth = 0.0;
            }
            f->flux += q;
            f->x_from = fmin(f->x_from, fmin(xa, xb));
            f->x_to = fmax(f->x_to, fmax(xa, xb));
            for (size_t k = i; k <= j; k++) {
                if (sm[k].zmin < f->bottom) {
                    f->bottom = sm[k].zmin;
                    f->depth = wt_at(s, sm[k].xlow) - sm[k].zmin;
                }
                f->time_min = fmin(f->time_min, sm[k].time);
                f->time_max = fmax(f->time_max, sm[k].time);
            }
        }
        i = j + 1;
    }
    for (int k = 0; k < s->nsystems; k++)
        sys[k].kind = classify(s, sys[k].recharge_area, sys[k].discharge_area);
    /* order by where the recharge starts */
    for (int a = 1; a < s->nsystems; a++)
        for (int b2 = a; b2 > 0 && sys[b2].x_from < sys[b2 - 1].x_from; b2--) {
            gw_flow_system t = sys[b2];
            sys[b2] = sys[b2 - 1];
            sys[b2 - 1] = t;
        }
    s->system = sys;
    sys = NULL;
    (void)g;
    rc = 0;
done:
    free(sm);
    free(sys);
    return rc;
}

int gw_section_analyse(const gw_problem *p, const gw_solution *sol, const gw_budget *b,
                       const gw_section_options *opt, gw_section *s, gw_error *err)
{
    memset(s, 0, sizeof *s);
    gw_section_options o;
    if (opt)
        o = *opt;
    else
        gw_section_options_default(&o);
    if (p->type != GW_SECTION)
        return gw_fail(err, "cross-section analysis needs aquifer type section");
    if (build_top(p, sol, b, &o, s, err)) {
        gw_section_free(s);
        return -1;
    }
    if (s->nareas == 0)
        return 0;
    ctx c = { .p = p, .sol = sol, .sec = s };
    int rc = find_systems(&c, &o, err);
    free(c.face);
    if (rc)
        gw_section_free(s);
    return rc;
}

int gw_section_cell_kinds(const gw_problem *p, const gw_solution *sol, const gw_section *s, int stride,
                          int *kind, gw_error *err)
{
    const gw_grid *g = &p->grid;
    size_t nc = gw_grid_ncells(g);
    for (size_t k = 0; k < nc; k++)
        kind[k] = -1;
    if (p->type != GW_SECTION || s->nareas == 0)
        return 0;
    if (stride < 1)
        stride = 1;
    for (int r0 = 0; r0 < g->ny; r0 += stride)
        for (int c0 = 0; c0 < g->nx; c0 += stride) {
            /* trace from the centre cell of the block, fill the block */
            int r = r0 + stride / 2 < g->ny ? r0 + stride / 2 : g->ny - 1;
            int c = c0 + stride / 2 < g->nx ? c0 + stride / 2 : g->nx - 1;
            int k = r * g->nx + c;
            if (!p->active[k] || p->fixed_feature[k] >= 0)
                continue;
            gw_section_line fw = { 0 }, bw = { 0 };
            int ef, eb;
            double t, zmin, x = gw_grid_xc(g, c), z = gw_grid_yc(g, r);
            if (trace_from(p, sol, x, z, k, 1.0, &fw, &ef, &t, &zmin, err) ||
                trace_from(p, sol, x, z, k, -1.0, &bw, &eb, &t, &zmin, err)) {
                gw_section_line_free(&fw);
                return -1;
            }
            int da = end_area(p, s, ef, &fw, 0), ra = end_area(p, s, eb, &bw, 1);
            gw_section_line_free(&fw);
            gw_section_line_free(&bw);
            int kd = da >= 0 && ra >= 0 ? (int)classify(s, ra, da) : -1;
            for (int rr = r0; rr < r0 + stride && rr < g->ny; rr++)
                for (int cc = c0; cc < c0 + stride && cc < g->nx; cc++) {
                    size_t m = (size_t)rr * (size_t)g->nx + (size_t)cc;
                    if (p->active[m] && p->fixed_feature[m] < 0)
                        kind[m] = kd;
                }
        }
    return 0;
}

int gw_section_flow_seeds(const gw_problem *p, const gw_solution *sol, const gw_section *s, int n,
                          double *xz, int *nout, gw_error *err)
{
    *nout = 0;
    if (s->nareas == 0 || n <= 0)
        return 0;
    ctx c = { .p = p, .sol = sol, .sec = (gw_section *)s };   /* collect_faces only reads it */
    if (collect_faces(&c, err)) {
        free(c.face);
        return -1;
    }
    const gw_grid *g = &p->grid;
    double total = 0.0, acc = 0.0;
    for (int i = 0; i < c.nfaces; i++)
        total += c.face[i].flux;
    for (int i = 0, j = 0; i < c.nfaces && j < n && total > 0.0; i++) {
        double q = c.face[i].flux;
        while (j < n && (j + 0.5) * total / n <= acc + q) {
            double f = ((j + 0.5) * total / n - acc) / q;
            int fi, k = c.face[i].cell;
            double x, z;
            seed_point(&c, i + f, &fi, &x, &z);
            /* nudge off the face into the cell the water enters */
            double xc = gw_grid_xc(g, k % g->nx), zc = gw_grid_yc(g, k / g->nx);
            xz[2 * *nout] = x + 1e-6 * (xc - x);
            xz[2 * *nout + 1] = z + 1e-6 * (zc - z);
            (*nout)++;
            j++;
        }
        acc += q;
    }
    free(c.face);
    return 0;
}
