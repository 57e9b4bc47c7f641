#include "super_solve.h"

int gw_super_solve_ok(const cholmod_factor *L)
{
    return L && L->is_super && L->is_ll && L->xtype == CHOLMOD_REAL;
}

/* L y = y, supernode by supernode: the diagonal block by columns, then
 * its columns' entries below it into the later rows. */
void gw_super_lsolve(const cholmod_factor *L, double *y)
{
    const int nsuper = (int)L->nsuper;
    const int *super = L->super, *pi = L->pi, *px = L->px, *s = L->s;
    const double *Lx = L->x;
    for (int k = 0; k < nsuper; k++) {
        const int k1 = super[k], nscol = super[k + 1] - k1;
        const int nsrow = pi[k + 1] - pi[k];
        const int *rows = s + pi[k];
        const double *Lk = Lx + px[k];
        for (int j = 0; j < nscol; j++) {
            const double *col = Lk + (size_t)j * nsrow;
            double yj = y[k1 + j] / col[j];
            y[k1 + j] = yj;
            for (int i = j + 1; i < nscol; i++)
                y[k1 + i] -= col[i] * yj;
            for (int r = nscol; r < nsrow; r++)
                y[rows[r]] -= col[r] * yj;
        }
    }
}

/* L' y = y, the supernodes in reverse: each column takes the entries below
 * the block from rows already solved, then the block backwards. */
void gw_super_ltsolve(const cholmod_factor *L, double *y)
{
    const int *super = L->super, *pi = L->pi, *px = L->px, *s = L->s;
    const double *Lx = L->x;
    for (int k = (int)L->nsuper - 1; k >= 0; k--) {
        const int k1 = super[k], nscol = super[k + 1] - k1;
        const int nsrow = pi[k + 1] - pi[k];
        const int *rows = s + pi[k];
        const double *Lk = Lx + px[k];
        for (int j = nscol - 1; j >= 0; j--) {
            const double *col = Lk + (size_t)j * nsrow;
            double t = y[k1 + j];
            for (int r = nscol; r < nsrow; r++)
                t -= col[r] * y[rows[r]];
            for (int i = j + 1; i < nscol; i++)
                t -= col[i] * y[k1 + i];
            y[k1 + j] = t / col[j];
        }
    }
}

int gw_super_solve(const cholmod_factor *L, const double *b, double *x, double *work)
{
    if (!gw_super_solve_ok(L))
        return -1;
    const int n = (int)L->n;
    const int *Perm = L->Perm;
    for (int i = 0; i < n; i++)
        work[i] = b[Perm[i]];
    gw_super_lsolve(L, work);
    gw_super_ltsolve(L, work);
    for (int i = 0; i < n; i++)
        x[Perm[i]] = work[i];
    return 0;
}
