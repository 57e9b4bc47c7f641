/* Fill-reducing ordering of the unknowns of a structured grid by geometric
 * nested dissection.
 *
 * The five-point matrix couples each cell only with its four neighbours, so
 * one diagonal line of cells splits a piece of the grid into two halves that
 * do not touch.  Numbering the two halves first (recursively, the same way)
 * and the separating line last keeps the Cholesky factor sparse (George
 * 1973, "Nested dissection of a regular finite element mesh", SIAM J. Numer.
 * Anal. 10) at the cost of one pass over the cells, instead of the seconds a
 * general graph partitioner (METIS) needs on a million cells; the factor is
 * as sparse as METIS' (measured in docs/performance.md).  Cells without an
 * unknown (inactive or fixed head) are skipped, so irregular active areas
 * are handled: the ordering stays valid, only separators may be longer than
 * needed. */
#ifndef GW_GRID_ORDER_H
#define GW_GRID_ORDER_H

/* idx: per cell (k = row * nx + col) the unknown number 0..n-1, or -1.
 * Splits the grid recursively until pieces have at most about leaf_cells cells and
 * sets set[j] to the part of unknown j; parts are numbered 0.. in
 * elimination order (pieces before the separator that splits them), which is
 * the constraint-set form CHOLMOD's constrained minimum degree (cholmod_camd)
 * takes.  Returns the number of parts, or -1 if idx is not a numbering of
 * exactly n unknowns. */
int gw_grid_dissect(int nx, int ny, const int *idx, int n, int leaf_cells, int *set);

/* Pure nested dissection down to single cells: perm[i] is the unknown
 * eliminated i-th (CHOLMOD's UserPerm convention).  Returns 0 or -1. */
int gw_grid_order(int nx, int ny, const int *idx, int n, int *perm);

#endif
