/* A grid's conductance matrix factorized as two halves side by side.
 *
 * One column of cells (the separator S) cuts the unknowns into a west part
 * W and an east part E that do not touch.  The principal submatrices
 * A[W+S] and A[E+S] are factorized by CHOLMOD at the same time, each with
 * the separator ordered last; the last blocks of their factors give the
 * two halves' Schur complements (Lss Lss' = Ass - B' A^-1 B), whose sum
 * minus Ass is the separator's dense Schur complement, factorized by
 * LAPACK.  A solve is one forward and one backward pass per half (side by
 * side again) around a dense solve on the separator: block Gaussian
 * elimination (e.g. Golub and Van Loan, Matrix Computations, on block LU;
 * cited from memory), exact in exact arithmetic.
 *
 * Why: CHOLMOD 3 factorizes the elimination tree one supernode after the
 * other, and the supernodes of a two-dimensional grid are mostly too small
 * for multithreaded BLAS to use a second core; two independent halves
 * are. */
#ifndef GW_SPLIT_FACTOR_H
#define GW_SPLIT_FACTOR_H

#include "error.h"

#include <cholmod.h>

typedef struct gw_split gw_split;

/* Plan and analyse the split of the n unknowns of an nx x ny grid (idx:
 * per cell its unknown number, or -1) for matrix A (n x n, lower triangle
 * stored, the pattern that will be factorized).  Returns NULL with *why
 * set to a reason when the grid has no useful split (then factorize A
 * whole); NULL with err set when out of memory or CHOLMOD fails. */
gw_split *gw_split_new(int nx, int ny, const int *idx, int n, const cholmod_sparse *A,
                       const char **why, gw_error *err);
void gw_split_free(gw_split *sp);

/* Factorize A's current values.  On a matrix that is not positive definite
 * returns 1 with *bad_unknown set to an unknown near the failure; -1 with
 * err set on other failures; 0 on success. */
int gw_split_factorize(gw_split *sp, const cholmod_sparse *A, int *bad_unknown, gw_error *err);

/* Solve A x = b with the last factorization (x and b of length n, may not
 * alias). */
int gw_split_solve(gw_split *sp, const double *b, double *x, gw_error *err);

/* Unknowns on the separator, and the values (doubles) the factorization
 * holds: both halves' factors and the dense blocks of the separator. */
int gw_split_separator(const gw_split *sp);
double gw_split_factor_entries(const gw_split *sp);

#endif
