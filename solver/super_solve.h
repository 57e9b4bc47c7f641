/* Forward and backward substitution with a supernodal Cholesky factor.
 *
 * The solve of a sweep member (only the right-hand side changed) is one
 * pass down and one pass up the factor, memory bound.  CHOLMOD 3 calls the
 * BLAS twice per supernode for it, and most supernodes of a grid hold a
 * few columns, so the calls' own overhead (buffer allocation, locking,
 * thread checks in OpenBLAS) costs as much as the arithmetic.  These loops
 * read the factor once per pass in the order it is stored. */
#ifndef GW_SUPER_SOLVE_H
#define GW_SUPER_SOLVE_H

#include <cholmod.h>

/* Whether L is a factor these routines take: supernodal LL', real, as
 * cholmod_factorize leaves it for a supernodal analysis. */
int gw_super_solve_ok(const cholmod_factor *L);

/* In place, in the factor's own (permuted) order: y := L^-1 y, and
 * y := L'^-1 y. */
void gw_super_lsolve(const cholmod_factor *L, double *y);
void gw_super_ltsolve(const cholmod_factor *L, double *y);

/* x = A^-1 b for A = P' L L' P.  work: L->n doubles.  x and b may not
 * alias.  Returns 0, or -1 when L is not such a factor. */
int gw_super_solve(const cholmod_factor *L, const double *b, double *x, double *work);

#endif
