/* Geometric nested dissection of the grid (solver/grid_order.h).
 *
 * Checks: the ordering is a permutation of the unknowns, also with inactive
 * and fixed cells; the separating diagonal of the whole grid is eliminated
 * last;
 * the Cholesky factor of the five-point matrix is much sparser than with the
 * natural (row by row) numbering -- a banded factor holds about n * nx
 * entries, nested dissection O(n log n) (George 1973, SIAM J. Numer. Anal.
 * 10, 345-363); and a solve with the ordering gives the same heads as
 * CHOLMOD's AMD ordering (a permutation changes only round-off). */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <cmocka.h>

#include <cholmod.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "solver/grid_order.h"

/* Number the unknowns of an nx x ny grid, skipping a disc of inactive cells
 * and the west column (fixed heads), as gw_solver does. */
static int *numbering(int nx, int ny, int *n)
{
    int *idx = malloc((size_t)nx * ny * sizeof *idx);
    *n = 0;
    for (int r = 0; r < ny; r++)
        for (int c = 0; c < nx; c++) {
            double dr = r - ny / 3.0, dc = c - nx / 3.0;
            int skip = c == 0 || dr * dr + dc * dc < (nx / 6.0) * (nx / 6.0);
            idx[r * nx + c] = skip ? -1 : (*n)++;
        }
    return idx;
}

static void test_permutation(void **state)
{
    (void)state;
    int sizes[][2] = { { 1, 1 }, { 7, 3 }, { 40, 25 }, { 3, 90 } };
    for (size_t t = 0; t < sizeof sizes / sizeof sizes[0]; t++) {
        int nx = sizes[t][0], ny = sizes[t][1], n;
        int *idx = numbering(nx, ny, &n);
        int *perm = malloc((size_t)(n ? n : 1) * sizeof *perm);
        char *seen = calloc((size_t)(n ? n : 1), 1);
        assert_int_equal(gw_grid_order(nx, ny, idx, n, perm), 0);
        for (int i = 0; i < n; i++) {
            assert_true(perm[i] >= 0 && perm[i] < n);
            assert_false(seen[perm[i]]);
            seen[perm[i]] = 1;
        }
        free(seen);
        free(perm);
        free(idx);
    }
}

static void test_separator_last(void **state)
{
    (void)state;
    /* 9 x 5 all unknowns: col + row runs 0..12 and col - row -4..8; the
     * first cut is the diagonal col - row = 2 (5 cells), eliminated last. */
    int nx = 9, ny = 5, n = nx * ny, idx[45], perm[45];
    for (int k = 0; k < n; k++)
        idx[k] = k;
    assert_int_equal(gw_grid_order(nx, ny, idx, n, perm), 0);
    for (int i = n - 5; i < n; i++)
        assert_int_equal(perm[i] % nx - perm[i] / nx, 2);
}

static void test_rejects_bad_numbering(void **state)
{
    (void)state;
    int idx[4] = { 0, 1, 1, -1 }, perm[3];
    assert_int_equal(gw_grid_order(2, 2, idx, 3, perm), -1);   /* duplicate */
    int idx2[4] = { 0, 1, -1, -1 };
    assert_int_equal(gw_grid_order(2, 2, idx2, 3, perm), -1);  /* too few */
}

/* Five-point matrix (lower triangle) of the numbered cells, plus a small
 * diagonal shift so it is positive definite without boundary cells. */
static cholmod_sparse *five_point(int nx, int ny, const int *idx, int n, cholmod_common *c)
{
    cholmod_triplet *T = cholmod_allocate_triplet(n, n, 3 * (size_t)n, -1, CHOLMOD_REAL, c);
    int *Ti = T->i, *Tj = T->j;
    double *Tx = T->x;
    size_t q = 0;
    for (int r = 0; r < ny; r++)
        for (int cc = 0; cc < nx; cc++) {
            int j = idx[r * nx + cc];
            if (j < 0)
                continue;
            Ti[q] = j, Tj[q] = j, Tx[q++] = 4.01;
            if (cc + 1 < nx && idx[r * nx + cc + 1] >= 0)
                Ti[q] = idx[r * nx + cc + 1], Tj[q] = j, Tx[q++] = -1.0;
            if (r + 1 < ny && idx[(r + 1) * nx + cc] >= 0)
                Ti[q] = idx[(r + 1) * nx + cc], Tj[q] = j, Tx[q++] = -1.0;
        }
    T->nnz = q;
    cholmod_sparse *A = cholmod_triplet_to_sparse(T, q, c);
    cholmod_free_triplet(&T, c);
    return A;
}

static cholmod_factor *analyse(cholmod_sparse *A, int ordering, int *perm, cholmod_common *c)
{
    c->nmethods = 1;
    c->method[0].ordering = ordering;
    c->postorder = 1;
    return cholmod_analyze_p(A, perm, NULL, 0, c);
}

static void test_fill_and_solution(void **state)
{
    (void)state;
    int nx = 120, ny = 100, n;
    int *idx = numbering(nx, ny, &n);
    int *perm = malloc((size_t)n * sizeof *perm);
    assert_int_equal(gw_grid_order(nx, ny, idx, n, perm), 0);
    cholmod_common c;
    cholmod_start(&c);
    c.print = 0;
    cholmod_sparse *A = five_point(nx, ny, idx, n, &c);
    assert_non_null(A);

    cholmod_factor *Ln = analyse(A, CHOLMOD_NATURAL, NULL, &c);
    double lnz_natural = c.lnz;
    cholmod_factor *Lg = analyse(A, CHOLMOD_GIVEN, perm, &c);
    double lnz_grid = c.lnz;
    cholmod_factor *La = analyse(A, CHOLMOD_AMD, NULL, &c);
    assert_non_null(Ln);
    assert_non_null(Lg);
    assert_non_null(La);
    /* Natural order: about n * nx entries; nested dissection: a few times
     * n log2 n.  Ask for at least a factor 3 here (n * nx / (n log2 n) is 9). */
    assert_true(lnz_grid * 3.0 < lnz_natural);

    cholmod_dense *b = cholmod_ones(n, 1, CHOLMOD_REAL, &c);
    assert_true(cholmod_factorize(A, Lg, &c));
    assert_true(cholmod_factorize(A, La, &c));
    cholmod_dense *xg = cholmod_solve(CHOLMOD_A, Lg, b, &c);
    cholmod_dense *xa = cholmod_solve(CHOLMOD_A, La, b, &c);
    double *g = xg->x, *a = xa->x, worst = 0.0;
    for (int j = 0; j < n; j++)
        worst = fmax(worst, fabs(g[j] - a[j]) / fabs(a[j]));
    assert_true(worst < 1e-10);

    cholmod_free_dense(&xg, &c);
    cholmod_free_dense(&xa, &c);
    cholmod_free_dense(&b, &c);
    cholmod_free_factor(&Ln, &c);
    cholmod_free_factor(&Lg, &c);
    cholmod_free_factor(&La, &c);
    cholmod_free_sparse(&A, &c);
    cholmod_finish(&c);
    free(perm);
    free(idx);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_permutation),
        cmocka_unit_test(test_separator_last),
        cmocka_unit_test(test_rejects_bad_numbering),
        cmocka_unit_test(test_fill_and_solution),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
