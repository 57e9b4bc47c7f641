#include "super_solve.h"

int gw_super_solve(const cholmod_factor *L, const double *b, double *x, double *work)
{
    if (!L->is_super || !L->is_ll || L->xtype != CHOLMOD_REAL)
        return -1;
    const int n = (int)L->n, nsuper = (int)L->nsuper;
    const int *Perm = L->Perm, *super = L->super, *pi = L->pi, *px = L->px, *s = L->s;
    const double *Lx = L->x;
    double *y = work;
    for (int i = 0; i < n; i++)
        y[i] = b[Perm[i]];
    /* L y = P b, supernode by supernode: the diagonal block by columns,
     * then its columns' entries below it into the later rows. */
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
    /* L' z = y, the supernodes in reverse: each column takes the entries
     * below the block from rows already solved, then the block backwards. */
    for (int k = nsuper - 1; k >= 0; k--) {
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
    for (int i = 0; i < n; i++)
        x[Perm[i]] = y[i];
    return 0;
}
