/* Raw CHOLMOD baseline: read a symmetric Matrix Market system written by
 * `gwdivide run --export-matrix PREFIX`, then analyse, factorize and solve it
 * with CHOLMOD's default settings, nothing else.  Prints one line
 * "key=value ..." for tools/bench/bench.py:
 *
 *     cholmod_raw PREFIX [amd|metis|nesdis|grid|grid:LEAF|default]
 *
 * The optional second argument forces one ordering (for the ordering study
 * in docs/performance.md); the default is CHOLMOD's own choice.  "grid" is
 * the geometric nested dissection of solver/grid_order.h, built from the
 * cell list PREFIX.cells.txt that the export writes beside the matrix;
 * "grid:LEAF" stops the dissection at LEAF cells and lets CHOLMOD's
 * constrained minimum degree (CAMD) order within the parts. */
#include <cholmod.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/resource.h>
#include <time.h>

#include "solver/grid_order.h"

static double now(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return ts.tv_sec + 1e-9 * ts.tv_nsec;
}

static FILE *open_with_suffix(const char *prefix, const char *suffix)
{
    size_t n = strlen(prefix) + strlen(suffix) + 1;
    char *path = malloc(n);
    if (!path)
        return NULL;
    snprintf(path, n, "%s%s", prefix, suffix);
    FILE *f = fopen(path, "r");
    if (!f)
        fprintf(stderr, "cholmod_raw: cannot open %s\n", path);
    free(path);
    return f;
}

/* Read PREFIX.cells.txt ("unknown column row" per line, 1-based) and order
 * the unknowns with the grid nested dissection: pure (leaf 0), or split into
 * pieces of at most `leaf` cells ordered by CHOLMOD's constrained minimum
 * degree (CAMD) within the dissection's parts. */
static int *grid_permutation(const char *prefix, cholmod_sparse *A, int leaf, cholmod_common *c)
{
    int n = (int)A->nrow;
    FILE *f = open_with_suffix(prefix, ".cells.txt");
    if (!f)
        return NULL;
    int *col = malloc((size_t)n * sizeof *col), *row = malloc((size_t)n * sizeof *row);
    int *perm = malloc((size_t)n * sizeof *perm), *idx = NULL;
    int nx = 0, ny = 0, j, cc, rr, got = 0;
    char line[256];
    while (col && row && perm && fgets(line, sizeof line, f)) {
        if (line[0] == '#' || sscanf(line, "%d %d %d", &j, &cc, &rr) != 3 || j < 1 || j > n)
            continue;
        col[j - 1] = cc - 1;
        row[j - 1] = rr - 1;
        nx = cc > nx ? cc : nx;
        ny = rr > ny ? rr : ny;
        got++;
    }
    fclose(f);
    if (got == n && (idx = malloc((size_t)nx * (size_t)ny * sizeof *idx))) {
        for (size_t k = 0; k < (size_t)nx * (size_t)ny; k++)
            idx[k] = -1;
        for (j = 0; j < n; j++)
            idx[(size_t)row[j] * (size_t)nx + (size_t)col[j]] = j;
    }
    int fail = !idx;
    if (!fail && leaf <= 0)
        fail = gw_grid_order(nx, ny, idx, n, perm) != 0;
    else if (!fail) {
        int *set = malloc((size_t)n * sizeof *set);
        fail = !set || gw_grid_dissect(nx, ny, idx, n, leaf, set) < 0 ||
               !cholmod_camd(A, NULL, 0, set, perm, c);
        free(set);
    }
    if (fail) {
        fprintf(stderr, "cholmod_raw: bad cell list for %s\n", prefix);
        free(perm);
        perm = NULL;
    }
    free(idx);
    free(col);
    free(row);
    return perm;
}

/* The BLAS library actually mapped into this process (the symlink chain of
 * libblas.so.3 is chosen by Debian's alternatives system), or "unknown". */
static void loaded_blas(char *out, size_t len)
{
    snprintf(out, len, "unknown");
    FILE *f = fopen("/proc/self/maps", "r");
    if (!f)
        return;
    char line[512];
    while (fgets(line, sizeof line, f)) {
        char *path = strchr(line, '/');
        if (path && (strstr(path, "blas") || strstr(path, "mkl"))) {
            path[strcspn(path, "\n")] = 0;
            snprintf(out, len, "%s", path);
            break;
        }
    }
    fclose(f);
}

int main(int argc, char **argv)
{
    if (argc < 2) {
        fprintf(stderr, "usage: cholmod_raw PREFIX [amd|metis|nesdis|grid|grid:LEAF|default]\n");
        return 2;
    }
    cholmod_common c;
    cholmod_start(&c);
    int use_grid = argc > 2 && !strncmp(argv[2], "grid", 4);
    int leaf = use_grid && argv[2][4] == ':' ? atoi(argv[2] + 5) : 0;
    if (use_grid) {
        c.nmethods = 1;
        c.method[0].ordering = CHOLMOD_GIVEN;
        c.postorder = 1;
    } else if (argc > 2 && strcmp(argv[2], "default") != 0) {
        c.nmethods = 1;
        c.method[0].ordering = !strcmp(argv[2], "amd")      ? CHOLMOD_AMD
                               : !strcmp(argv[2], "metis")  ? CHOLMOD_METIS
                               : !strcmp(argv[2], "nesdis") ? CHOLMOD_NESDIS
                                                            : CHOLMOD_AMD;
        c.postorder = 1;
    }
    int rc = 1;
    cholmod_sparse *A = NULL;
    cholmod_dense *b = NULL, *x = NULL;
    cholmod_factor *L = NULL;

    double t = now();
    FILE *f = open_with_suffix(argv[1], ".mtx");
    if (f) {
        A = cholmod_read_sparse(f, &c);
        fclose(f);
    }
    f = open_with_suffix(argv[1], ".rhs.mtx");
    if (f) {
        b = cholmod_read_dense(f, &c);
        fclose(f);
    }
    double t_read = now() - t;
    if (!A || !b || A->stype == 0) {
        fprintf(stderr, "cholmod_raw: could not read a symmetric system from %s\n", argv[1]);
        goto done;
    }

    t = now();
    int *perm = NULL;
    if (use_grid) {
        perm = grid_permutation(argv[1], A, leaf, &c);
        if (!perm)
            goto done;
    }
    L = cholmod_analyze_p(A, perm, NULL, 0, &c);
    free(perm);
    double t_analyse = now() - t;
    t = now();
    int ok = L && cholmod_factorize(A, L, &c) && c.status == CHOLMOD_OK;
    double t_factor = now() - t;
    if (!ok) {
        fprintf(stderr, "cholmod_raw: factorization failed (status %d)\n", c.status);
        goto done;
    }
    t = now();
    x = cholmod_solve(CHOLMOD_A, L, b, &c);
    double t_solve = now() - t;
    if (!x)
        goto done;

    /* Relative residual |b - A x| / |b| (A symmetric, one triangle stored). */
    double one[2] = {1, 0}, minus[2] = {-1, 0};
    cholmod_dense *r = cholmod_copy_dense(b, &c);
    cholmod_sdmult(A, 0, minus, one, x, r, &c);
    double rel = cholmod_norm_dense(r, 2, &c) / cholmod_norm_dense(b, 2, &c);
    cholmod_free_dense(&r, &c);

    const char *ord = L->ordering == CHOLMOD_AMD      ? "AMD"
                      : L->ordering == CHOLMOD_METIS  ? "METIS"
                      : L->ordering == CHOLMOD_NESDIS ? "NESDIS"
                      : L->ordering == CHOLMOD_GIVEN  ? "given"
                                                      : "other";
    struct rusage ru;
    getrusage(RUSAGE_SELF, &ru);
    char blas[256];
    loaded_blas(blas, sizeof blas);
    printf("n=%d nnz_A=%ld nnz_L=%.0f flops=%.4g ordering=%s read=%.4f analyse=%.4f factorize=%.4f "
           "solve=%.4f residual=%.3g peak_mb=%.1f blas=%s\n",
           (int)A->nrow, (long)cholmod_nnz(A, &c), c.lnz, c.fl, ord, t_read, t_analyse, t_factor,
           t_solve, rel, ru.ru_maxrss / 1024.0, blas);
    rc = 0;
done:
    cholmod_free_dense(&x, &c);
    cholmod_free_dense(&b, &c);
    cholmod_free_factor(&L, &c);
    cholmod_free_sparse(&A, &c);
    cholmod_finish(&c);
    return rc;
}
