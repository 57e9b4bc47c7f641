/* Raw CHOLMOD baseline: read a symmetric Matrix Market system written by
 * `gwdivide run --export-matrix PREFIX`, then analyse, factorize and solve it
 * with CHOLMOD's default settings, nothing else.  Prints one line
 * "key=value ..." for tools/bench/bench.py:
 *
 *     cholmod_raw PREFIX [amd|metis|nesdis|default]
 *
 * The optional second argument forces one ordering (for the ordering study
 * in docs/performance.md); the default is CHOLMOD's own choice. */
#include <cholmod.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/resource.h>
#include <time.h>

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

int main(int argc, char **argv)
{
    if (argc < 2) {
        fprintf(stderr, "usage: cholmod_raw PREFIX [amd|metis|nesdis|default]\n");
        return 2;
    }
    cholmod_common c;
    cholmod_start(&c);
    if (argc > 2 && strcmp(argv[2], "default") != 0) {
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
    L = cholmod_analyze(A, &c);
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
    printf("n=%d nnz_A=%ld nnz_L=%.0f flops=%.4g ordering=%s read=%.4f analyse=%.4f factorize=%.4f "
           "solve=%.4f residual=%.3g peak_mb=%.1f\n",
           (int)A->nrow, (long)cholmod_nnz(A, &c), c.lnz, c.fl, ord, t_read, t_analyse, t_factor,
           t_solve, rel, ru.ru_maxrss / 1024.0);
    rc = 0;
done:
    cholmod_free_dense(&x, &c);
    cholmod_free_dense(&b, &c);
    cholmod_free_factor(&L, &c);
    cholmod_free_sparse(&A, &c);
    cholmod_finish(&c);
    return rc;
}
