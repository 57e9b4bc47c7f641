#include "split_factor.h"

#include "grid_order.h"
#include "lib_threads.h"
#include "parallel.h"
#include "super_solve.h"

#include <stdlib.h>
#include <string.h>

/* BLAS and LAPACK, Fortran interface (Debian's libblas.so.3 and
 * liblapack.so.3 export these; single-character arguments only). */
void dsyrk_(const char *uplo, const char *trans, const int *n, const int *k, const double *alpha,
            const double *a, const int *lda, const double *beta, double *c, const int *ldc);
void dtrmv_(const char *uplo, const char *trans, const char *diag, const int *n, const double *a,
            const int *lda, double *x, const int *incx);
void dpotrf_(const char *uplo, const int *n, double *a, const int *lda, int *info);
void dpotrs_(const char *uplo, const int *n, const int *nrhs, const double *a, const int *lda,
             double *b, const int *ldb, int *info);

/* Largest separator: its dense Schur complement takes ns^2 doubles. */
#define MAX_SEPARATOR 6000

/* One half: the unknowns of one side (local 0..nd-1, in global order) and
 * the separator after them (local nd..m-1, north to south). */
typedef struct {
    cholmod_common c;
    int started;
    int nd, m;
    int *glob;            /* local -> global unknown */
    cholmod_sparse *M;    /* A[side + S], lower triangle, local numbering */
    size_t *src;          /* per entry of M: its position in A->x */
    cholmod_factor *L;
    double *Lss;          /* last ns x ns block of L, lower, column-major */
    int bad;              /* local unknown where the factorization failed, or -1 */
    double *w;            /* m: forward-solve result, kept for the backward pass */
    double *g;            /* ns: L21 * w1 */
    int failed;           /* CHOLMOD failure other than "not positive definite" */
} half;

struct gw_split {
    int n, ns;
    int *sep;             /* separator: global unknowns, north to south */
    half h[2];
    double *C;            /* Schur complement of the separator, then its Cholesky factor */
    /* Entries of A inside the separator (Ass): position in A->x, row, column. */
    size_t *ass_src;
    int *ass_i, *ass_j, nass;
    double lnz;
    /* Solve context. */
    const double *b;
    double *x, *xs;
};

static void half_free(half *h)
{
    if (h->started) {
        if (h->M) cholmod_free_sparse(&h->M, &h->c);
        if (h->L) cholmod_free_factor(&h->L, &h->c);
        cholmod_finish(&h->c);
    }
    free(h->glob);
    free(h->src);
    free(h->Lss);
    free(h->g);
    free(h->w);
    memset(h, 0, sizeof *h);
}

void gw_split_free(gw_split *sp)
{
    if (!sp)
        return;
    half_free(&sp->h[0]);
    half_free(&sp->h[1]);
    free(sp->sep);
    free(sp->C);
    free(sp->ass_src);
    free(sp->ass_i);
    free(sp->ass_j);
    free(sp->xs);
    free(sp);
}

int gw_split_separator(const gw_split *sp)
{
    return sp->ns;
}

double gw_split_factor_entries(const gw_split *sp)
{
    return sp->lnz;
}

/* Build half d's matrix pattern and its entry map from A.  loc[j]: local
 * number of global unknown j in this half, or -1. */
static int half_matrix(half *h, const cholmod_sparse *A, const int *loc)
{
    const int *Ap = A->p, *Ai = A->i;
    int n = (int)A->ncol;
    int *cnt = calloc((size_t)h->m + 1, sizeof *cnt);
    if (!cnt)
        return -1;
    int *Mp = NULL, *Mi = NULL;
    /* Pass 0 counts each local column's entries, pass 1 places them. */
    for (int pass = 0; pass < 2; pass++) {
        size_t nnz = 0;
        for (int j = 0; j < n; j++) {
            if (loc[j] < 0)
                continue;
            for (int p = Ap[j]; p < Ap[j + 1]; p++) {
                int i = Ai[p];
                if (loc[i] < 0)
                    continue;
                int li = loc[i], lj = loc[j];
                int col = li < lj ? li : lj, row = li < lj ? lj : li;
                nnz++;
                if (pass == 0) {
                    cnt[col]++;
                    continue;
                }
                int q = cnt[col]++;
                /* Keep each column's rows sorted (a handful per column). */
                while (q > Mp[col] && Mi[q - 1] > row) {
                    Mi[q] = Mi[q - 1];
                    h->src[q] = h->src[q - 1];
                    q--;
                }
                Mi[q] = row;
                h->src[q] = (size_t)p;
            }
        }
        if (pass == 1)
            break;
        h->M = cholmod_allocate_sparse((size_t)h->m, (size_t)h->m, nnz, 1, 1, -1, CHOLMOD_REAL,
                                       &h->c);
        h->src = malloc((nnz ? nnz : 1) * sizeof *h->src);
        if (!h->M || !h->src) {
            free(cnt);
            return -1;
        }
        Mp = h->M->p;
        Mi = h->M->i;
        Mp[0] = 0;
        for (int c = 0; c < h->m; c++)
            Mp[c + 1] = Mp[c] + cnt[c];
        for (int c = 0; c < h->m; c++)
            cnt[c] = Mp[c];
    }
    free(cnt);
    return 0;
}

typedef struct {
    gw_split *sp;
    int nx, ny, cs;
    const int *idx;
    const cholmod_sparse *A;
    int status[2];        /* 0 ok, 1 no useful split, -1 out of memory / CHOLMOD */
} plan_job;

/* Number, build, order and analyse one half (parallel item). */
static int plan_half(void *ctx, long d, gw_error *err)
{
    (void)err;
    plan_job *j = ctx;
    gw_split *sp = j->sp;
    half *h = &sp->h[d];
    const int nx = j->nx, ny = j->ny, cs = j->cs;
    const int c0 = d == 0 ? 0 : cs + 1, c1 = d == 0 ? cs - 1 : nx - 1, w = c1 - c0 + 1;
    int *loc = malloc((size_t)sp->n * sizeof *loc);
    int *sub = malloc((size_t)w * (size_t)ny * sizeof *sub);
    int *perm = NULL;
    j->status[d] = -1;
    if (!loc || !sub)
        goto done;
    for (int i = 0; i < sp->n; i++)
        loc[i] = -1;
    /* Side unknowns in global (row-major) order, then the separator. */
    int nd = 0;
    for (int r = 0; r < ny; r++)
        for (int c = c0; c <= c1; c++) {
            int u = j->idx[(size_t)r * nx + c];
            sub[(size_t)r * w + (c - c0)] = u >= 0 ? nd : -1;
            if (u >= 0)
                loc[u] = nd++;
        }
    h->nd = nd;
    h->m = nd + sp->ns;
    for (int t = 0; t < sp->ns; t++)
        loc[sp->sep[t]] = nd + t;
    h->glob = malloc((size_t)h->m * sizeof *h->glob);
    perm = malloc((size_t)h->m * sizeof *perm);
    if (!h->glob || !perm)
        goto done;
    for (int i = 0; i < sp->n; i++)
        if (loc[i] >= 0)
            h->glob[loc[i]] = i;
    if (half_matrix(h, j->A, loc) != 0)
        goto done;
    /* The side by the grid's nested dissection, the separator last. */
    if (gw_grid_order(w, ny, sub, nd, perm) != 0)
        goto done;
    for (int t = 0; t < sp->ns; t++)
        perm[nd + t] = nd + t;
    h->c.nmethods = 1;
    h->c.method[0].ordering = CHOLMOD_GIVEN;
    h->c.postorder = 0;          /* keep the separator last */
    h->c.supernodal = CHOLMOD_SUPERNODAL;
    h->L = cholmod_analyze_p(h->M, perm, NULL, 0, &h->c);
    if (!h->L || h->c.status < CHOLMOD_OK)
        goto done;
    const int *P = h->L->Perm;
    for (int t = 0; t < sp->ns; t++)
        if (P[nd + t] != nd + t) {
            j->status[d] = 1;   /* CHOLMOD reordered the separator */
            goto done;
        }
    h->Lss = calloc((size_t)sp->ns * (size_t)sp->ns, sizeof *h->Lss);
    h->g = malloc((size_t)sp->ns * sizeof *h->g);
    h->w = malloc((size_t)h->m * sizeof *h->w);
    if (!h->Lss || !h->g || !h->w)
        goto done;
    j->status[d] = 0;
done:
    free(loc);
    free(sub);
    free(perm);
    return 0;
}

gw_split *gw_split_new(int nx, int ny, const int *idx, int n, const cholmod_sparse *A,
                       const char **why, gw_error *err)
{
    *why = NULL;
    /* The separator: the column with half the unknowns on either side. */
    long *cnt = calloc((size_t)nx, sizeof *cnt);
    if (!cnt) {
        gw_fail(err, "out of memory planning the factorization");
        return NULL;
    }
    for (int r = 0; r < ny; r++)
        for (int c = 0; c < nx; c++)
            if (idx[(size_t)r * nx + c] >= 0)
                cnt[c]++;
    int cs = -1;
    long before = 0;
    for (int c = 0; c < nx; c++) {
        if (2 * (before + cnt[c]) >= n) {
            cs = c;
            break;
        }
        before += cnt[c];
    }
    long ns = cs >= 0 ? cnt[cs] : 0, after = n - before - ns;
    free(cnt);
    if (cs <= 0 || cs >= nx - 1 || 4 * before < n || 4 * after < n || ns < 1) {
        *why = "the active area has no column with a quarter of the unknowns on either side";
        return NULL;
    }
    if (ns > MAX_SEPARATOR) {
        *why = "the separating column is too long for a dense Schur complement";
        return NULL;
    }
    gw_split *sp = calloc(1, sizeof *sp);
    if (!sp) {
        gw_fail(err, "out of memory planning the factorization");
        return NULL;
    }
    sp->n = n;
    sp->ns = (int)ns;
    sp->sep = malloc((size_t)ns * sizeof *sp->sep);
    sp->C = malloc((size_t)ns * (size_t)ns * sizeof *sp->C);
    sp->xs = malloc((size_t)ns * sizeof *sp->xs);
    int *sloc = malloc((size_t)n * sizeof *sloc);
    if (!sp->sep || !sp->C || !sp->xs || !sloc)
        goto oom;
    for (int i = 0; i < n; i++)
        sloc[i] = -1;
    int t = 0;
    for (int r = 0; r < ny; r++) {
        int u = idx[(size_t)r * nx + cs];
        if (u >= 0) {
            sloc[u] = t;
            sp->sep[t++] = u;
        }
    }
    /* Ass: entries of A with row and column on the separator. */
    const int *Ap = A->p, *Ai = A->i;
    for (int pass = 0; pass < 2; pass++) {
        sp->nass = 0;
        for (int s = 0; s < sp->ns; s++) {
            int j = sp->sep[s];
            for (int p = Ap[j]; p < Ap[j + 1]; p++)
                if (sloc[Ai[p]] >= 0) {
                    if (pass == 1) {
                        sp->ass_src[sp->nass] = (size_t)p;
                        sp->ass_i[sp->nass] = sloc[Ai[p]];
                        sp->ass_j[sp->nass] = s;
                    }
                    sp->nass++;
                }
        }
        if (pass == 0) {
            sp->ass_src = malloc((size_t)(sp->nass ? sp->nass : 1) * sizeof *sp->ass_src);
            sp->ass_i = malloc((size_t)(sp->nass ? sp->nass : 1) * sizeof *sp->ass_i);
            sp->ass_j = malloc((size_t)(sp->nass ? sp->nass : 1) * sizeof *sp->ass_j);
            if (!sp->ass_src || !sp->ass_i || !sp->ass_j)
                goto oom;
        }
    }
    free(sloc);
    sloc = NULL;
    for (int d = 0; d < 2; d++) {
        cholmod_start(&sp->h[d].c);
        sp->h[d].started = 1;
        sp->h[d].c.print = 0;
        sp->h[d].c.error_handler = NULL;
    }
    plan_job job = {.sp = sp, .nx = nx, .ny = ny, .cs = cs, .idx = idx, .A = A};
    int prev = gw_blas_threads(1);
    int rc = gw_parallel_for(2, 2, plan_half, &job, err);
    gw_blas_threads(prev);
    if (rc != 0)
        goto fail;
    if (job.status[0] < 0 || job.status[1] < 0)
        goto oom;
    if (job.status[0] > 0 || job.status[1] > 0) {
        *why = "CHOLMOD did not keep the separator last";
        gw_split_free(sp);
        return NULL;
    }
    sp->lnz = (double)sp->h[0].L->xsize + (double)sp->h[1].L->xsize + 3.0 * (double)ns * (double)ns;
    return sp;
oom:
    gw_fail(err, "out of memory (or CHOLMOD failure) analysing the two halves of the grid");
fail:
    free(sloc);
    gw_split_free(sp);
    return NULL;
}

/* Copy the last ns columns of half h's supernodal factor into h->Lss. */
static void extract_lss(half *h, int ns)
{
    const cholmod_factor *L = h->L;
    const int *super = L->super, *pi = L->pi, *px = L->px, *s = L->s;
    const double *x = L->x;
    for (long k = (long)L->nsuper - 1; k >= 0 && super[k + 1] > h->nd; k--) {
        int k1 = super[k], k2 = super[k + 1];
        int nsrow = pi[k + 1] - pi[k];
        for (int j = k1 > h->nd ? k1 : h->nd; j < k2; j++)
            for (int r = j - k1; r < nsrow; r++) {
                int i = s[pi[k] + r];
                h->Lss[(size_t)(i - h->nd) + (size_t)(j - h->nd) * ns] = x[px[k] + (size_t)(j - k1) * nsrow + r];
            }
    }
}

typedef struct {
    gw_split *sp;
    const cholmod_sparse *A;
} factor_job;

static int factor_half(void *ctx, long d, gw_error *err)
{
    (void)err;
    factor_job *j = ctx;
    half *h = &j->sp->h[d];
    const double *Ax = j->A->x;
    double *Mx = h->M->x;
    size_t nnz = (size_t)((int *)h->M->p)[h->m];
    for (size_t q = 0; q < nnz; q++)
        Mx[q] = Ax[h->src[q]];
    h->bad = -1;
    h->failed = 0;
    int ok = cholmod_factorize(h->M, h->L, &h->c);
    if (h->c.status == CHOLMOD_NOT_POSDEF || (ok && h->L->minor < (size_t)h->m)) {
        size_t mi = h->L->minor < (size_t)h->m ? h->L->minor : (size_t)h->m - 1;
        h->bad = h->glob[((const int *)h->L->Perm)[mi]];
        return 0;
    }
    if (!ok || h->c.status < CHOLMOD_OK || !gw_super_solve_ok(h->L)) {
        h->failed = 1;
        return 0;
    }
    memset(h->Lss, 0, (size_t)j->sp->ns * (size_t)j->sp->ns * sizeof *h->Lss);
    extract_lss(h, j->sp->ns);
    return 0;
}

int gw_split_factorize(gw_split *sp, const cholmod_sparse *A, int *bad_unknown, gw_error *err)
{
    factor_job job = {.sp = sp, .A = A};
    int prev = gw_blas_threads(1);
    int rc = gw_parallel_for(2, 2, factor_half, &job, err);
    gw_blas_threads(prev);
    if (rc != 0)
        return -1;
    for (int d = 0; d < 2; d++) {
        if (sp->h[d].bad >= 0) {
            *bad_unknown = sp->h[d].bad;
            return 1;
        }
        if (sp->h[d].failed)
            return gw_fail(err, "factorization of one half of the grid failed (CHOLMOD status %d)",
                           sp->h[d].c.status);
    }
    /* C = Lss1 Lss1' + Lss2 Lss2' - Ass: the separator's Schur complement
     * (each Lss Lss' is Ass minus that half's part). */
    const int ns = sp->ns;
    const double one = 1.0, zero = 0.0;
    dsyrk_("L", "N", &ns, &ns, &one, sp->h[0].Lss, &ns, &zero, sp->C, &ns);
    dsyrk_("L", "N", &ns, &ns, &one, sp->h[1].Lss, &ns, &one, sp->C, &ns);
    const double *Ax = A->x;
    for (int e = 0; e < sp->nass; e++)
        sp->C[(size_t)sp->ass_i[e] + (size_t)sp->ass_j[e] * ns] -= Ax[sp->ass_src[e]];
    int info = 0;
    dpotrf_("L", &ns, sp->C, &ns, &info);
    if (info > 0) {
        *bad_unknown = sp->sep[info - 1];
        return 1;
    }
    if (info < 0)
        return gw_fail(err, "dense factorization of the separator failed (LAPACK info %d)", info);
    return 0;
}

/* Forward pass of half d: w = L^-1 P [b_side; 0], g = L21 w1 = -Lss w_s. */
static int forward_half(void *ctx, long d, gw_error *err)
{
    (void)err;
    gw_split *sp = ctx;
    half *h = &sp->h[d];
    const int *P = h->L->Perm;
    for (int i = 0; i < h->m; i++)
        h->w[i] = P[i] < h->nd ? sp->b[h->glob[P[i]]] : 0.0;
    gw_super_lsolve(h->L, h->w);
    const int ns = sp->ns, inc = 1;
    memcpy(h->g, h->w + h->nd, (size_t)ns * sizeof *h->g);
    dtrmv_("L", "N", "N", &ns, h->Lss, &ns, h->g, &inc);
    for (int t = 0; t < ns; t++)
        h->g[t] = -h->g[t];
    return 0;
}

/* Backward pass of half d: with v = [w1; Lss' xs], z = L'^-1 v has
 * z_s = xs and z1 = L11'^-1 (w1 - L21' xs): the side's heads. */
static int backward_half(void *ctx, long d, gw_error *err)
{
    (void)err;
    gw_split *sp = ctx;
    half *h = &sp->h[d];
    const int ns = sp->ns, inc = 1;
    double *v = h->w;
    memcpy(v + h->nd, sp->xs, (size_t)ns * sizeof *v);
    dtrmv_("L", "T", "N", &ns, h->Lss, &ns, v + h->nd, &inc);
    gw_super_ltsolve(h->L, v);
    const int *P = h->L->Perm;
    for (int i = 0; i < h->m; i++)
        if (P[i] < h->nd)
            sp->x[h->glob[P[i]]] = v[i];
    return 0;
}

int gw_split_solve(gw_split *sp, const double *b, double *x, gw_error *err)
{
    sp->b = b;
    sp->x = x;
    int prev = gw_blas_threads(1);
    int rc = gw_parallel_for(2, 2, forward_half, sp, err);
    if (rc == 0) {
        const int ns = sp->ns, one = 1;
        for (int t = 0; t < ns; t++)
            sp->xs[t] = b[sp->sep[t]] - sp->h[0].g[t] - sp->h[1].g[t];
        int info = 0;
        dpotrs_("L", &ns, &one, sp->C, &ns, sp->xs, &ns, &info);
        if (info != 0)
            rc = gw_fail(err, "dense solve on the separator failed (LAPACK info %d)", info);
        for (int t = 0; rc == 0 && t < ns; t++)
            x[sp->sep[t]] = sp->xs[t];
    }
    if (rc == 0)
        rc = gw_parallel_for(2, 2, backward_half, sp, err);
    gw_blas_threads(prev);
    return rc;
}
