/* Supernodal forward and backward substitution (solver/super_solve.h)
 * against CHOLMOD's own cholmod_solve on the same factor (the reference
 * library), and against the residual of the system itself.
 *
 * Matrices: five-point grid matrices (as the solver assembles) with
 * conductances drawn at random over four orders of magnitude, a grid with
 * holes, and one with a dense-ish block, each factorized supernodal with
 * AMD and with METIS' nested dissection so that the supernodes take many
 * shapes (one column, wide blocks, long off-diagonal parts). */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdlib.h>
#include <cmocka.h>

#include "solver/super_solve.h"

static double urand(unsigned *st)
{
    *st = *st * 1664525u + 1013904223u;
    return (*st >> 8) / 16777216.0;
}

/* Lower triangle of an SPD five-point matrix on nx x ny cells, cells with
 * hole(c, r) left out; extra > 0 also couples each cell to the one `extra`
 * columns east (a wider stencil, for denser supernodes). */
static cholmod_sparse *grid_matrix(int nx, int ny, int holes, int extra, unsigned seed,
                                   cholmod_common *c)
{
    int *idx = malloc((size_t)nx * ny * sizeof *idx);
    int n = 0;
    for (int r = 0; r < ny; r++)
        for (int q = 0; q < nx; q++) {
            int in = !(holes && ((q / 7 + r / 5) % 4 == 1) && (q % 7) > 1 && (r % 5) > 1);
            idx[r * nx + q] = in ? n++ : -1;
        }
    cholmod_triplet *T = cholmod_allocate_triplet((size_t)n, (size_t)n, (size_t)n * 4, -1,
                                                  CHOLMOD_REAL, c);
    double *diag = calloc((size_t)n, sizeof *diag);
    int *Ti = T->i, *Tj = T->j;
    double *Tx = T->x;
    size_t t = 0;
    for (int r = 0; r < ny; r++)
        for (int q = 0; q < nx; q++) {
            int j = idx[r * nx + q];
            if (j < 0)
                continue;
            int nb[3] = {q + 1 < nx ? idx[r * nx + q + 1] : -1, r + 1 < ny ? idx[(r + 1) * nx + q] : -1,
                         extra > 0 && q + extra < nx ? idx[r * nx + q + extra] : -1};
            for (int d = 0; d < 3; d++) {
                if (nb[d] < 0)
                    continue;
                double g = pow(10.0, 4.0 * urand(&seed) - 2.0);
                Ti[t] = nb[d];
                Tj[t] = j;
                Tx[t++] = -g;
                diag[j] += g;
                diag[nb[d]] += g;
            }
            diag[j] += 1e-3 * urand(&seed);   /* a little leakage: strictly SPD */
        }
    for (int j = 0; j < n; j++) {
        Ti[t] = j;
        Tj[t] = j;
        Tx[t++] = diag[j];
    }
    T->nnz = t;
    cholmod_sparse *A = cholmod_triplet_to_sparse(T, t, c);
    cholmod_free_triplet(&T, c);
    free(diag);
    free(idx);
    return A;
}

static void check(int nx, int ny, int holes, int extra, int ordering, const char *label)
{
    cholmod_common c;
    cholmod_start(&c);
    c.print = 0;
    cholmod_sparse *A = grid_matrix(nx, ny, holes, extra, 12345u + (unsigned)nx, &c);
    assert_non_null(A);
    c.nmethods = 1;
    c.method[0].ordering = ordering;
    c.supernodal = CHOLMOD_SUPERNODAL;
    cholmod_factor *L = cholmod_analyze(A, &c);
    assert_non_null(L);
    assert_true(cholmod_factorize(A, L, &c));
    assert_true(L->is_super);
    size_t n = A->nrow;
    cholmod_dense *B = cholmod_zeros(n, 1, CHOLMOD_REAL, &c);
    double *b = B->x;
    unsigned st = 99;
    for (size_t i = 0; i < n; i++)
        b[i] = urand(&st) - 0.5;
    cholmod_dense *X = cholmod_solve(CHOLMOD_A, L, B, &c);
    double *x = malloc(n * sizeof *x), *work = malloc(n * sizeof *work);
    assert_int_equal(gw_super_solve(L, b, x, work), 0);
    const double *xr = X->x;
    double dmax = 0.0, xmax = 0.0;
    for (size_t i = 0; i < n; i++) {
        dmax = fmax(dmax, fabs(x[i] - xr[i]));
        xmax = fmax(xmax, fabs(xr[i]));
    }
    /* Residual of the system: r = b - A x (A symmetric, lower stored). */
    cholmod_dense *Xd = cholmod_zeros(n, 1, CHOLMOD_REAL, &c);
    for (size_t i = 0; i < n; i++)
        ((double *)Xd->x)[i] = x[i];
    cholmod_dense *R = cholmod_copy_dense(B, &c);
    double one[2] = {1, 0}, minus[2] = {-1, 0};
    cholmod_sdmult(A, 0, minus, one, Xd, R, &c);
    double rmax = 0.0, bmax = 0.0;
    for (size_t i = 0; i < n; i++) {
        rmax = fmax(rmax, fabs(((double *)R->x)[i]));
        bmax = fmax(bmax, fabs(b[i]));
    }
    print_message("    %s: %zu unknowns, %zu supernodes; max |x - cholmod_solve| %.2e of max |x| %.2e; "
                  "residual %.2e of max |b| %.2e\n", label, n, (size_t)L->nsuper, dmax, xmax, rmax, bmax);
    assert_true(dmax <= 1e-10 * xmax);
    assert_true(rmax <= 1e-9 * bmax);
    free(x);
    free(work);
    cholmod_free_dense(&X, &c);
    cholmod_free_dense(&B, &c);
    cholmod_free_dense(&Xd, &c);
    cholmod_free_dense(&R, &c);
    cholmod_free_factor(&L, &c);
    cholmod_free_sparse(&A, &c);
    cholmod_finish(&c);
}

static void test_grid_amd(void **state)
{
    (void)state;
    check(90, 70, 0, 0, CHOLMOD_AMD, "90 x 70 grid, AMD");
}

static void test_grid_metis(void **state)
{
    (void)state;
    check(120, 100, 0, 0, CHOLMOD_METIS, "120 x 100 grid, METIS");
}

static void test_holes_and_wide_stencil(void **state)
{
    (void)state;
    check(80, 60, 1, 0, CHOLMOD_AMD, "80 x 60 grid with holes, AMD");
    check(60, 50, 1, 9, CHOLMOD_METIS, "60 x 50 grid, holes, couplings 9 columns apart, METIS");
}

/* A simplicial factor is not for this routine: it says so, and the solver
 * falls back to cholmod_solve. */
static void test_simplicial_refused(void **state)
{
    (void)state;
    cholmod_common c;
    cholmod_start(&c);
    c.print = 0;
    cholmod_sparse *A = grid_matrix(10, 8, 0, 0, 7u, &c);
    c.supernodal = CHOLMOD_SIMPLICIAL;
    cholmod_factor *L = cholmod_analyze(A, &c);
    assert_true(cholmod_factorize(A, L, &c));
    double b[80] = {0}, x[80], work[80];
    assert_int_equal(gw_super_solve(L, b, x, work), -1);
    cholmod_free_factor(&L, &c);
    cholmod_free_sparse(&A, &c);
    cholmod_finish(&c);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_grid_amd),
        cmocka_unit_test(test_grid_metis),
        cmocka_unit_test(test_holes_and_wide_stencil),
        cmocka_unit_test(test_simplicial_refused),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
