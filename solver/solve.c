#include "solve.h"

#include "grid_order.h"
#include "lib_threads.h"
#include "parallel.h"
#include "split_factor.h"
#include "super_solve.h"
#include "sysmem.h"

#include <cholmod.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

struct gw_solver {
    gw_grid grid;
    gw_solve_options opt;
    int n;                 /* unknowns */
    int *idx;              /* per cell: unknown number, or -1 (inactive / fixed) */
    int *cell_of;          /* per unknown: cell */
    unsigned char *pattern_active;   /* copies identifying the pattern */
    int *pattern_fixed;
    cholmod_common c;
    cholmod_sparse *A;     /* lower triangle, fixed pattern */
    cholmod_factor *L;     /* whole-grid factor, or NULL when split */
    gw_split *split;       /* two halves side by side (split_factor.h), or NULL */
    int planned;           /* the factorization has been planned and analysed */
    double *xbuf, *work;   /* n each: solution of the solves; scratch of the whole-grid one */
    cholmod_dense *b;
    double *x_factored;    /* A values at the last numeric factorization */
    int have_factor;
    char describe[160];
};

void gw_solve_options_default(gw_solve_options *o)
{
    o->head_tol = 1e-6;
    o->resid_tol = 1e-8;
    o->max_iter = 100;
    o->min_thick = 1e-3;
    /* GW_SPLIT=1 forces the two-halves factorization wherever the grid
     * splits, GW_SPLIT=-1 turns it off (tests run the verification models
     * both ways; benchmarks compare). */
    const char *v = getenv("GW_SPLIT");
    o->split = v && !strcmp(v, "1") ? 1 : v && !strcmp(v, "-1") ? -1 : 0;
}

static double now(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return ts.tv_sec + 1e-9 * ts.tv_nsec;
}

void gw_solver_free(gw_solver *s)
{
    if (!s)
        return;
    if (s->A)
        cholmod_free_sparse(&s->A, &s->c);
    if (s->L)
        cholmod_free_factor(&s->L, &s->c);
    gw_split_free(s->split);
    free(s->xbuf);
    free(s->work);
    if (s->b)
        cholmod_free_dense(&s->b, &s->c);
    cholmod_finish(&s->c);
    free(s->idx);
    free(s->cell_of);
    free(s->pattern_active);
    free(s->pattern_fixed);
    free(s->x_factored);
    free(s);
}

static int unknown(const gw_problem *p, size_t k)
{
    return p->active[k] && p->fixed_feature[k] < 0;
}

gw_solver *gw_solver_new(const gw_problem *p, const gw_solve_options *opt, gw_error *err)
{
    gw_lib_threads_init();
    if (gw_problem_check_bounded(p, err))
        return NULL;
    const gw_grid *g = &p->grid;
    size_t nc = gw_grid_ncells(g);
    gw_solver *s = calloc(1, sizeof *s);
    if (!s) {
        gw_fail(err, "out of memory creating the solver");
        return NULL;
    }
    cholmod_start(&s->c);
    s->c.print = 0;
    s->c.error_handler = NULL;
    s->grid = *g;
    if (opt)
        s->opt = *opt;
    else
        gw_solve_options_default(&s->opt);
    s->idx = malloc(nc * sizeof *s->idx);
    s->pattern_active = malloc(nc);
    s->pattern_fixed = malloc(nc * sizeof *s->pattern_fixed);
    if (!s->idx || !s->pattern_active || !s->pattern_fixed)
        goto oom;
    memcpy(s->pattern_active, p->active, nc);
    int n = 0;
    for (size_t k = 0; k < nc; k++) {
        s->pattern_fixed[k] = p->fixed_feature[k] >= 0;
        s->idx[k] = unknown(p, k) ? n++ : -1;
    }
    s->n = n;
    if (n == 0) {
        gw_solver_free(s);
        gw_fail(err, "the model has no cell with an unknown head (every active cell is fixed)");
        return NULL;
    }
    s->cell_of = malloc((size_t)n * sizeof *s->cell_of);
    if (!s->cell_of)
        goto oom;
    for (size_t k = 0; k < nc; k++)
        if (s->idx[k] >= 0)
            s->cell_of[s->idx[k]] = (int)k;

    /* Lower-triangular pattern: unknowns are numbered in cell order, so the
     * east (k+1) and south (k+nx) neighbours have larger numbers. */
    size_t nnz = 0;
    for (int j = 0; j < n; j++) {
        int k = s->cell_of[j], c = k % g->nx;
        nnz++;
        if (c + 1 < g->nx && s->idx[k + 1] >= 0)
            nnz++;
        if (k + g->nx < (int)nc && s->idx[k + g->nx] >= 0)
            nnz++;
    }
    s->A = cholmod_allocate_sparse(n, n, nnz, 1, 1, -1, CHOLMOD_REAL, &s->c);
    s->b = cholmod_zeros(n, 1, CHOLMOD_REAL, &s->c);
    s->x_factored = calloc(nnz, sizeof(double));
    if (!s->A || !s->b || !s->x_factored)
        goto oom;
    int *Ap = s->A->p, *Ai = s->A->i;
    size_t q = 0;
    for (int j = 0; j < n; j++) {
        int k = s->cell_of[j], c = k % g->nx;
        Ap[j] = (int)q;
        Ai[q++] = j;
        if (c + 1 < g->nx && s->idx[k + 1] >= 0)
            Ai[q++] = s->idx[k + 1];
        if (k + g->nx < (int)nc && s->idx[k + g->nx] >= 0)
            Ai[q++] = s->idx[k + g->nx];
    }
    Ap[n] = (int)q;
    return s;
oom:
    gw_solver_free(s);
    gw_fail(err, "out of memory setting up the conductance matrix");
    return NULL;
}

/* Saturated thickness of cell k at head h (unconfined), with the floor. */
static double sat_thick(const gw_problem *p, const gw_solve_options *o, size_t k, double h)
{
    double b = h - p->bottom[k];
    return b > o->min_thick ? b : o->min_thick;
}

/* Face conductances for the current heads.  Confined and section: harmonic
 * mean of transmissivity.  Unconfined: harmonic mean of K times the
 * arithmetic mean of saturated thickness, which reproduces the Dupuit
 * discharge K (h1^2 - h2^2) / (2 dx) exactly on a uniform strip.  Faces
 * between two fixed cells carry no flow into the unknowns and are dropped so
 * budgets do not count water passing between boundary cells. */
static void face_conductances(const gw_problem *p, const gw_solve_options *o,
                              const double *h, double *cx, double *cy)
{
    const gw_grid *g = &p->grid;
    size_t nc = gw_grid_ncells(g);
    double ax = g->dy / g->dx, ay = g->dx / g->dy;
    for (size_t k = 0; k < nc; k++) {
        cx[k] = cy[k] = 0.0;
        if (!p->active[k])
            continue;
        int c = (int)(k % (size_t)g->nx);
        size_t nb[2] = { c + 1 < g->nx ? k + 1 : (size_t)-1, k + g->nx < nc ? k + g->nx : (size_t)-1 };
        for (int d = 0; d < 2; d++) {
            size_t m = nb[d];
            if (m == (size_t)-1 || !p->active[m])
                continue;
            if (p->fixed_feature[k] >= 0 && p->fixed_feature[m] >= 0)
                continue;
            double ki = p->k[k], kj = p->k[m];
            if (d == 1) {
                ki *= p->anis[k];
                kj *= p->anis[m];
            }
            double cond;
            if (p->type == GW_UNCONFINED) {
                double kh = (ki > 0 && kj > 0) ? 2.0 * ki * kj / (ki + kj) : 0.0;
                cond = kh * 0.5 * (sat_thick(p, o, k, h[k]) + sat_thick(p, o, m, h[m]));
            } else {
                double ti = ki * (p->type == GW_SECTION ? 1.0 : p->thick[k]);
                double tj = kj * (p->type == GW_SECTION ? 1.0 : p->thick[m]);
                cond = (ti > 0 && tj > 0) ? 2.0 * ti * tj / (ti + tj) : 0.0;
            }
            if (d == 0)
                cx[k] = cond * ax;
            else
                cy[k] = cond * ay;
        }
    }
}

/* Link state at head h: 1 when the exchange depends on h. */
static unsigned char link_state(const gw_link *l, double h)
{
    switch (l->kind) {
    case GW_LINK_STREAM: return h > l->floor;
    case GW_LINK_DRAIN: return h > l->ref;
    case GW_LINK_LEAKAGE: return 1;
    }
    return 1;
}

/* Assemble A (values into s->A->x) and b for heads h and link states on. */
static void assemble(gw_solver *s, const gw_problem *p, const double *h, const unsigned char *on,
                     double *cx, double *cy)
{
    const gw_grid *g = &p->grid;
    size_t nc = gw_grid_ncells(g);
    double *Ax = s->A->x, *b = s->b->x;
    int *Ap = s->A->p;
    double area = g->dx * g->dy;
    face_conductances(p, &s->opt, h, cx, cy);
    for (int j = 0; j < s->n; j++) {
        size_t k = (size_t)s->cell_of[j];
        int c = (int)(k % (size_t)g->nx);
        double diag = 0.0, rhs = p->recharge[k] * area;
        /* east, west, south, north faces */
        size_t nb[4] = { c + 1 < g->nx ? k + 1 : (size_t)-1, c > 0 ? k - 1 : (size_t)-1,
                         k + g->nx < nc ? k + g->nx : (size_t)-1, k >= (size_t)g->nx ? k - g->nx : (size_t)-1 };
        double cf[4] = { cx[k], c > 0 ? cx[k - 1] : 0.0, cy[k], k >= (size_t)g->nx ? cy[k - g->nx] : 0.0 };
        int q = Ap[j];
        Ax[q++] = 0.0;   /* diagonal, set below */
        for (int d = 0; d < 4; d++) {
            size_t m = nb[d];
            if (m == (size_t)-1 || !p->active[m])
                continue;
            diag += cf[d];
            if (p->fixed_feature[m] >= 0)
                rhs += cf[d] * p->fixed[m];
            else if (d == 0 || d == 2)
                Ax[q++] = -cf[d];
        }
        Ax[Ap[j]] = diag;
        b[j] = rhs;
    }
    for (int i = 0; i < p->nlinks; i++) {
        const gw_link *l = &p->links[i];
        int j = s->idx[l->cell];
        if (j < 0)
            continue;
        if (on[i]) {
            Ax[Ap[j]] += l->cond;
            b[j] += l->cond * l->ref;
        } else if (l->kind == GW_LINK_STREAM) {
            b[j] += l->cond * (l->ref - l->floor);
        }
    }
    for (int i = 0; i < p->nwells; i++) {
        int j = s->idx[p->wells[i].cell];
        if (j >= 0)
            b[j] -= p->wells[i].rate;
    }
}

/* max_i |b - A h| over unknowns (A symmetric, lower triangle stored). */
static double residual_max(const gw_solver *s, const double *h)
{
    const int *Ap = s->A->p, *Ai = s->A->i;
    const double *Ax = s->A->x, *b = s->b->x;
    double *r = malloc((size_t)s->n * sizeof *r);
    if (!r)
        return INFINITY;
    for (int j = 0; j < s->n; j++)
        r[j] = b[j];
    for (int j = 0; j < s->n; j++) {
        double hj = h[s->cell_of[j]];
        for (int q = Ap[j]; q < Ap[j + 1]; q++) {
            int i = Ai[q];
            r[i] -= Ax[q] * hj;
            if (i != j)
                r[j] -= Ax[q] * h[s->cell_of[i]];
        }
    }
    double mx = 0.0;
    for (int j = 0; j < s->n; j++)
        mx = fmax(mx, fabs(r[j]));
    free(r);
    return mx;
}

/* Scale for the residual: the total water entering the unknown cells. */
static double inflow_scale(const gw_solver *s)
{
    double t = 0.0;
    const double *b = s->b->x;
    for (int j = 0; j < s->n; j++)
        t += fabs(b[j]);
    return t > 0.0 ? t : 1.0;
}

/* Fill-reducing ordering (measured in docs/performance.md).  Small grids:
 * AMD alone -- cheap, and as good as any there; CHOLMOD's default would also
 * try METIS when AMD's fill looks high, which costs more time than it saves.
 * From 50 000 unknowns: the geometric nested dissection of
 * solver/grid_order.h, which costs one pass over the cells and gives a
 * factor as sparse as METIS' (22 % fewer flops than AMD at 250 000 cells). */
#define GW_GRID_ORDER_MIN 50000
static cholmod_factor *analyse(gw_solver *s)
{
    s->c.nmethods = 1;
    s->c.postorder = 1;
    int *perm = NULL;
    if (s->n >= GW_GRID_ORDER_MIN && (perm = malloc((size_t)s->n * sizeof *perm)) &&
        gw_grid_order(s->grid.nx, s->grid.ny, s->idx, s->n, perm) == 0) {
        s->c.method[0].ordering = CHOLMOD_GIVEN;
    } else {
        free(perm);
        perm = NULL;
        s->c.method[0].ordering = CHOLMOD_AMD;
    }
    cholmod_factor *L = cholmod_analyze_p(s->A, perm, NULL, 0, &s->c);
    free(perm);
    return L;
}

/* Whether the factor on hand is of the matrix now assembled (then only the
 * right-hand side changed: a sweep member, or a repeated state). */
static int factor_current(const gw_solver *s)
{
    size_t nnz = (size_t)((int *)s->A->p)[s->n];
    return s->have_factor && memcmp(s->x_factored, s->A->x, nnz * sizeof(double)) == 0;
}

/* Message for a matrix that is not positive definite near unknown j. */
static int singular_at(const gw_solver *s, int j, gw_error *err)
{
    int k = s->cell_of[j];
    return gw_fail(err,
                   "the conductance matrix is singular near column %d, row %d (x %.6g, y %.6g): "
                   "this part of the aquifer has no head-controlling boundary in the current state "
                   "(for instance only drains that have fallen dry, or streams perched above the water table), "
                   "or conductivities, thicknesses or conductances there differ from their neighbours' by "
                   "so many orders of magnitude that the system cannot be solved in double precision",
                   k % s->grid.nx + 1, k / s->grid.nx + 1, gw_grid_xc(&s->grid, k % s->grid.nx),
                   gw_grid_yc(&s->grid, k / s->grid.nx));
}

/* Factorize two halves side by side (split_factor.h) from this many
 * unknowns, when two or more CPUs are online.  On 1 million cells the
 * split saves 0.2 to 0.3 s of a 3 s run, but the triangular solve does not
 * get faster, so a sweep member's share of the first run would rise from
 * 0.07-0.09 to 0.10-0.13 (docs/performance.md); at 4 million it saves
 * 2 to 3 s of 15.  GW_SPLIT=1 forces it at any size. */
#define GW_SPLIT_MIN 2000000

/* Refuse a factorization that cannot fit: its values (8 bytes each) plus
 * the matrix, vectors and CHOLMOD's workspace (about 100 bytes an
 * unknown), against the memory still available. */
static int memory_check(const gw_solver *s, double values, gw_error *err)
{
    double avail = gw_memory_available();
    double need = 8.0 * values + 100.0 * s->n;
    if (avail <= 0.0 || need <= avail)
        return 0;
    return gw_fail(err,
                   "the grid's %d unknown heads need a Cholesky factor of %.3g values, about %.1f GB "
                   "with the matrix, but only %.1f GB of memory is available: use a coarser grid or a "
                   "smaller area (gwdivide solves directly and has no iterative solver for grids "
                   "this large; docs/performance.md)",
                   s->n, values, need / 1073741824.0, avail / 1073741824.0);
}

/* First factorization: choose whole or split, analyse, and check that the
 * factor fits in memory. */
static int plan(gw_solver *s, gw_error *err)
{
    const char *why = NULL;
    int want = s->opt.split > 0 ||
               (s->opt.split == 0 && s->n >= GW_SPLIT_MIN && gw_default_threads() >= 2);
    if (want) {
        s->split = gw_split_new(s->grid.nx, s->grid.ny, s->idx, s->n, s->A, &why, err);
        if (!s->split && !why)
            return -1;
    }
    s->xbuf = malloc((size_t)s->n * sizeof *s->xbuf);
    s->work = s->split ? NULL : malloc((size_t)s->n * sizeof *s->work);
    if (!s->xbuf || (!s->split && !s->work))
        return gw_fail(err, "out of memory setting up the solver");
    if (s->split) {
        snprintf(s->describe, sizeof s->describe,
                 "CHOLMOD %d.%d.%d, ordering grid nested dissection, two halves side by side "
                 "(separating column of %d unknowns), supernodal",
                 CHOLMOD_MAIN_VERSION, CHOLMOD_SUB_VERSION, CHOLMOD_SUBSUB_VERSION,
                 gw_split_separator(s->split));
        if (memory_check(s, gw_split_factor_entries(s->split), err) != 0)
            return -1;
        s->planned = 1;
        return 0;
    }
    s->L = analyse(s);
    if (!s->L || s->c.status < CHOLMOD_OK)
        return gw_fail(err, "sparse analysis failed (CHOLMOD status %d)", s->c.status);
    snprintf(s->describe, sizeof s->describe, "CHOLMOD %d.%d.%d, ordering %s, %s",
             CHOLMOD_MAIN_VERSION, CHOLMOD_SUB_VERSION, CHOLMOD_SUBSUB_VERSION,
             s->L->ordering == CHOLMOD_AMD ? "AMD" : s->L->ordering == CHOLMOD_METIS ? "METIS"
             : s->L->ordering == CHOLMOD_NESDIS ? "nested dissection"
             : s->L->ordering == CHOLMOD_GIVEN ? "grid nested dissection" : "other",
             s->L->is_super ? "supernodal" : "simplicial");
    double values = (double)s->L->xsize > s->c.lnz ? (double)s->L->xsize : s->c.lnz;
    if (memory_check(s, values, err) != 0)
        return -1;
    s->planned = 1;
    return 0;
}

/* current: factor_current(s), computed once per iteration by the caller
 * (comparing the matrix values reads some 50 MB on a million cells). */
static int factorize(gw_solver *s, gw_solution *sol, int current, gw_error *err)
{
    size_t nnz = (size_t)((int *)s->A->p)[s->n];
    if (current)
        return 0;   /* only the right-hand side changed */
    double t0 = now();
    if (!s->planned) {
        int rc = plan(s, err);
        sol->timing.analyse += now() - t0;
        if (rc != 0)
            return -1;
        t0 = now();
    }
    s->have_factor = 0;
    if (s->split) {
        int bad = -1;
        int rc = gw_split_factorize(s->split, s->A, &bad, err);
        sol->timing.factorize += now() - t0;
        sol->factorizations++;
        if (rc > 0)
            return singular_at(s, bad, err);
        if (rc < 0)
            return -1;
    } else {
        int ok = cholmod_factorize(s->A, s->L, &s->c);
        sol->timing.factorize += now() - t0;
        sol->factorizations++;
        if (!ok || s->c.status == CHOLMOD_NOT_POSDEF) {
            int col = (int)s->L->minor;
            if (col >= 0 && col < s->n)
                return singular_at(s, col, err);
            return gw_fail(err, "factorization failed (CHOLMOD status %d)", s->c.status);
        }
    }
    memcpy(s->x_factored, s->A->x, nnz * sizeof(double));
    s->have_factor = 1;
    return 0;
}

/* Heads of the unknowns for the current right-hand side: a pointer to n
 * values, owned by the solver or by *tmp (free with cholmod_free_dense). */
static const double *solve_system(gw_solver *s, cholmod_dense **tmp, gw_error *err)
{
    *tmp = NULL;
    if (s->split)
        return gw_split_solve(s->split, s->b->x, s->xbuf, err) == 0 ? s->xbuf : NULL;
    if (gw_super_solve(s->L, s->b->x, s->xbuf, s->work) == 0)
        return s->xbuf;
    *tmp = cholmod_solve(CHOLMOD_A, s->L, s->b, &s->c);
    if (!*tmp) {
        gw_fail(err, "triangular solve failed (CHOLMOD status %d)", s->c.status);
        return NULL;
    }
    return (*tmp)->x;
}

static int same_pattern(const gw_solver *s, const gw_problem *p)
{
    size_t nc = gw_grid_ncells(&p->grid);
    if (p->grid.nx != s->grid.nx || p->grid.ny != s->grid.ny)
        return 0;
    if (memcmp(s->pattern_active, p->active, nc) != 0)
        return 0;
    for (size_t k = 0; k < nc; k++)
        if (s->pattern_fixed[k] != (p->fixed_feature[k] >= 0))
            return 0;
    return 1;
}

static int alloc_solution(gw_solution *sol, const gw_problem *p, gw_error *err)
{
    int nc = (int)gw_grid_ncells(&p->grid);
    if (sol->head && sol->ncells == nc) {
        free(sol->link_on);
        sol->link_on = malloc((size_t)(p->nlinks ? p->nlinks : 1));
        return sol->link_on ? 0 : gw_fail(err, "out of memory");
    }
    gw_solution_free(sol);
    sol->ncells = nc;
    sol->head = malloc((size_t)nc * sizeof(double));
    sol->cx = calloc((size_t)nc, sizeof(double));
    sol->cy = calloc((size_t)nc, sizeof(double));
    sol->link_on = malloc((size_t)(p->nlinks ? p->nlinks : 1));
    if (!sol->head || !sol->cx || !sol->cy || !sol->link_on) {
        gw_solution_free(sol);
        return gw_fail(err, "out of memory for the solution of %d cells", nc);
    }
    return 0;
}

static int push_history(gw_iter_history *hst, double dh, double res)
{
    double *a = realloc(hst->max_dh, (size_t)(hst->n + 1) * sizeof *a);
    if (!a)
        return -1;
    hst->max_dh = a;
    double *b = realloc(hst->resid, (size_t)(hst->n + 1) * sizeof *b);
    if (!b)
        return -1;
    hst->resid = b;
    hst->max_dh[hst->n] = dh;
    hst->resid[hst->n] = res;
    hst->n++;
    return 0;
}

/* Starting heads for nonlinear problems: the highest boundary head, so that
 * unconfined cells start saturated. */
static double default_start(const gw_problem *p)
{
    double hmax = -INFINITY;
    size_t nc = gw_grid_ncells(&p->grid);
    for (size_t k = 0; k < nc; k++)
        if (p->active[k] && p->fixed_feature[k] >= 0)
            hmax = fmax(hmax, p->fixed[k]);
    for (int i = 0; i < p->nlinks; i++)
        hmax = fmax(hmax, p->links[i].ref);
    if (!isfinite(hmax))
        hmax = 0.0;
    return hmax;
}

int gw_solver_run(gw_solver *s, const gw_problem *p, const double *start, gw_solution *sol, gw_error *err)
{
    if (!same_pattern(s, p))
        return gw_fail(err, "internal: the problem's active/fixed cells differ from the solver's");
    if (alloc_solution(sol, p, err))
        return -1;
    size_t nc = gw_grid_ncells(&p->grid);
    sol->converged = 0;
    sol->iterations = 0;
    sol->factorizations = 0;
    sol->ndry = 0;
    sol->history.n = 0;
    memset(&sol->timing, 0, sizeof sol->timing);

    double *h = sol->head;
    double *cxn = malloc(nc * sizeof *cxn), *cyn = malloc(nc * sizeof *cyn);
    unsigned char *on = malloc((size_t)(p->nlinks ? p->nlinks : 1));
    if (!cxn || !cyn || !on) {
        free(cxn);
        free(cyn);
        free(on);
        return gw_fail(err, "out of memory");
    }
    double h0 = default_start(p);
    for (size_t k = 0; k < nc; k++) {
        if (!p->active[k])
            h[k] = NAN;
        else if (p->fixed_feature[k] >= 0)
            h[k] = p->fixed[k];
        else
            h[k] = start && isfinite(start[k]) ? start[k] : h0;
    }
    for (int i = 0; i < p->nlinks; i++)
        on[i] = link_state(&p->links[i], h[p->links[i].cell]);
    /* Without a start guess, link states from the guess are meaningless:
     * begin with every stream and drain head-dependent. */
    if (!start)
        memset(on, 1, (size_t)p->nlinks);

    int nonlinear = p->type == GW_UNCONFINED;
    int rc = 0, changed = 1;
    double dh = INFINITY;
    for (int it = 0;; it++) {
        double t0 = now();
        /* A linear problem whose links kept their state has the system just
         * solved: only the convergence check remains (saves a pass in sweeps). */
        if (it == 0 || nonlinear || changed)
            assemble(s, p, h, on, cxn, cyn);
        sol->timing.assemble += now() - t0;
        if (it > 0) {
            double res = residual_max(s, h) / inflow_scale(s);
            if (push_history(&sol->history, dh, res)) {
                rc = gw_fail(err, "out of memory");
                break;
            }
            if (!changed && ((!nonlinear) || (dh < s->opt.head_tol && res < s->opt.resid_tol))) {
                sol->converged = 1;
                break;
            }
            if (it >= s->opt.max_iter) {
                char hist[1024];
                int len = 0;
                int from = sol->history.n > 8 ? sol->history.n - 8 : 0;
                for (int i = from; i < sol->history.n && len < (int)sizeof hist - 80; i++)
                    len += snprintf(hist + len, sizeof hist - (size_t)len, "\n  iteration %d: max head change %.3g, residual %.3g",
                                    i + 1, sol->history.max_dh[i], sol->history.resid[i]);
                rc = gw_fail(err,
                             "the solution did not converge in %d iterations (head tolerance %g, residual tolerance %g)%s%s",
                             s->opt.max_iter, s->opt.head_tol, s->opt.resid_tol,
                             changed ? "; streams or drains were still switching between connected and disconnected" : "",
                             hist);
                break;
            }
        }
        /* Drains that fell dry and perched streams may leave an area with
         * no head-controlling boundary; the factorization of such a
         * semi-definite matrix need not fail visibly, so check the links
         * (not needed when the matrix is the one already factorized: it
         * was checked, or is the all-connected start, checked up front). */
        int current = factor_current(s);
        if (changed && (it > 0 || start) && !current &&
            gw_problem_check_bounded_state(p, on, it, err)) {
            rc = -1;
            break;
        }
        if (factorize(s, sol, current, err)) {
            rc = -1;
            break;
        }
        t0 = now();
        cholmod_dense *x = NULL;
        const double *xv = solve_system(s, &x, err);
        sol->timing.solve += now() - t0;
        if (!xv) {
            rc = -1;
            break;
        }
        dh = 0.0;
        for (int j = 0; j < s->n; j++) {
            int k = s->cell_of[j];
            double d = fabs(xv[j] - h[k]);
            if (!(d <= dh))
                dh = d;   /* also catches NaN */
            h[k] = xv[j];
        }
        cholmod_free_dense(&x, &s->c);
        memcpy(sol->cx, cxn, nc * sizeof *cxn);
        memcpy(sol->cy, cyn, nc * sizeof *cyn);
        memcpy(sol->link_on, on, (size_t)p->nlinks);
        changed = 0;
        for (int i = 0; i < p->nlinks; i++) {
            unsigned char st = link_state(&p->links[i], h[p->links[i].cell]);
            if (st != on[i])
                changed = 1;
            on[i] = st;
        }
        sol->iterations = it + 1;
    }
    if (p->type == GW_UNCONFINED)
        for (size_t k = 0; k < nc; k++)
            if (p->active[k] && h[k] <= p->bottom[k])
                sol->ndry++;
    free(cxn);
    free(cyn);
    free(on);
    return rc;
}

int gw_solve(const gw_problem *p, const gw_solve_options *opt, gw_solution *sol, gw_error *err)
{
    gw_solver *s = gw_solver_new(p, opt, err);
    if (!s)
        return -1;
    int rc = gw_solver_run(s, p, NULL, sol, err);
    gw_solver_free(s);
    return rc;
}

void gw_solution_free(gw_solution *sol)
{
    if (!sol)
        return;
    free(sol->head);
    free(sol->cx);
    free(sol->cy);
    free(sol->link_on);
    free(sol->history.max_dh);
    free(sol->history.resid);
    memset(sol, 0, sizeof *sol);
}

const char *gw_solver_describe(const gw_solver *s)
{
    return s->describe[0] ? s->describe : "CHOLMOD (not yet factorized)";
}

int gw_solver_export(const gw_solver *s, const char *prefix, gw_error *err)
{
    size_t len = strlen(prefix) + 16;
    char *path = malloc(len);
    if (!path)
        return gw_fail(err, "out of memory");
    cholmod_common *c = (cholmod_common *)&s->c;
    int rc = 0;
    snprintf(path, len, "%s.mtx", prefix);
    FILE *f = fopen(path, "w");
    if (!f || cholmod_write_sparse(f, s->A, NULL, NULL, c) < 0)
        rc = gw_fail(err, "cannot write %s", path);
    if (f && fclose(f) != 0 && rc == 0)
        rc = gw_fail(err, "cannot write %s", path);
    if (rc == 0) {
        snprintf(path, len, "%s.rhs.mtx", prefix);
        f = fopen(path, "w");
        if (!f || cholmod_write_dense(f, s->b, NULL, c) < 0)
            rc = gw_fail(err, "cannot write %s", path);
        if (f && fclose(f) != 0 && rc == 0)
            rc = gw_fail(err, "cannot write %s", path);
    }
    if (rc == 0) {
        snprintf(path, len, "%s.cells.txt", prefix);
        f = fopen(path, "w");
        if (!f)
            rc = gw_fail(err, "cannot write %s", path);
        else {
            fprintf(f, "# unknown number (1-based) -> grid cell column row (1-based, rows from the north)\n");
            for (int j = 0; j < s->n; j++)
                fprintf(f, "%d %d %d\n", j + 1, s->cell_of[j] % s->grid.nx + 1, s->cell_of[j] / s->grid.nx + 1);
            if (fclose(f) != 0)
                rc = gw_fail(err, "cannot write %s", path);
        }
    }
    free(path);
    return rc;
}
