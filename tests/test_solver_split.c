/* The grid factorized as two halves side by side (solver/split_factor.h)
 * against the whole-grid factorization of the same problem.
 *
 * Block Gaussian elimination on the separating column is exact in exact
 * arithmetic (e.g. Golub and Van Loan, Matrix Computations, from memory), so
 * the two must give the same heads to round-off, and the water balance
 * (Darcy flow and continuity) must close to round-off either way.  The
 * published verification models run again with the split forced
 * (tests/CMakeLists.txt, *_split), and SciPy solves the exported matrix
 * against split heads (check_scipy_matrix_split).  Here: a heterogeneous
 * confined model, the same model unconfined (several refactorizations), a
 * sweep-like second run reusing the factor, a separating column broken by
 * fixed-head cells, and a grid with no useful split (falls back). */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <cmocka.h>

#include "solver/budget.h"
#include "solver/problem.h"
#include "solver/solve.h"

/* Heterogeneous model in the spirit of tools/bench/make_model.py: K zones,
 * a fixed-head river on the west edge (and, with mid_river, fixed heads in
 * every third row across the middle two fifths, so the separating column
 * is broken by them), a leaky stream, a well, two recharge rates, an
 * inactive corner. */
static gw_problem *model(int nx, int ny, gw_aquifer_type type, int mid_river)
{
    gw_error err = {{0}};
    gw_grid g = {nx, ny, 0.0, 0.0, 20.0, 20.0};
    gw_problem *p = gw_problem_new(&g, type, &err);
    assert_non_null(p);
    for (int r = 0; r < ny; r++)
        for (int c = 0; c < nx; c++) {
            size_t k = (size_t)r * nx + c;
            double u = (c + 0.5) / nx, v = 1.0 - (r + 0.5) / ny;
            p->active[k] = u + v < 1.6;
            p->k[k] = u > 0.35 && u < 0.45 ? 80.0 : (u > 0.1 && u < 0.3 && v > 0.6) ? 0.5 : 12.0;
            p->thick[k] = 30.0;
            p->bottom[k] = 60.0;
            p->recharge[k] = u > 0.5 && v < 0.5 ? 0.0011 : 0.0004;
        }
    int river = gw_problem_add_feature(p, "West River", GW_FEAT_FIXED_HEAD, &err);
    int brook = gw_problem_add_feature(p, "East Brook", GW_FEAT_STREAM, &err);
    int well = gw_problem_add_feature(p, "Well", GW_FEAT_WELL, &err);
    assert_true(river >= 0 && brook >= 0 && well >= 0);
    for (int r = 0; r < ny; r++) {
        size_t k = (size_t)r * nx;
        p->fixed_feature[k] = river;
        p->fixed[k] = 100.0 + 4.0 * (1.0 - (r + 0.5) / ny);
        for (int c = 3 * nx / 10; mid_river && r % 3 == 0 && c <= 7 * nx / 10; c++) {
            k = (size_t)r * nx + c;
            p->fixed_feature[k] = river;
            p->fixed[k] = 101.0;
        }
    }
    for (int r = ny / 3; r < ny - 2; r++) {
        double v = 1.0 - (r + 0.5) / ny;
        int c = (int)(nx * (0.86 + 0.05 * sin(6.0 * v)));
        double stage = 101.0 + 3.0 * v;
        gw_link l = {(int)((size_t)r * nx + c), brook, GW_LINK_STREAM, 15.0, stage, stage - 1.5};
        if (p->active[l.cell])
            assert_int_equal(gw_problem_add_link(p, &l, &err), 0);
    }
    gw_well w = {(ny / 2) * nx + nx / 3, well, 400.0, 0, 0};
    assert_int_equal(gw_problem_add_well(p, &w, &err), 0);
    return p;
}

/* Solve p with the given split setting; heads into h (ncells). */
static void solve(gw_problem *p, int split, double *h, char *method, size_t mlen, int *iters,
                  double *discrepancy)
{
    gw_solve_options o;
    gw_solve_options_default(&o);
    o.split = split;
    gw_error err = {{0}};
    gw_solver *s = gw_solver_new(p, &o, &err);
    if (!s) fail_msg("solver: %s", err.msg);
    gw_solution sol = {0};
    if (gw_solver_run(s, p, NULL, &sol, &err)) fail_msg("solve: %s", err.msg);
    memcpy(h, sol.head, gw_grid_ncells(&p->grid) * sizeof *h);
    snprintf(method, mlen, "%s", gw_solver_describe(s));
    *iters = sol.iterations;
    gw_budget b = {0};
    if (gw_budget_compute(p, &sol, &b, &err)) fail_msg("budget: %s", err.msg);
    *discrepancy = b.discrepancy_percent;
    gw_budget_free(&b);
    gw_solution_free(&sol);
    gw_solver_free(s);
}

/* Largest head difference over active cells, and the head range. */
static double max_diff(const gw_problem *p, const double *a, const double *b, double *range)
{
    double d = 0.0, lo = HUGE_VAL, hi = -HUGE_VAL;
    for (size_t k = 0; k < gw_grid_ncells(&p->grid); k++) {
        if (!p->active[k])
            continue;
        d = fmax(d, fabs(a[k] - b[k]));
        lo = fmin(lo, a[k]);
        hi = fmax(hi, a[k]);
    }
    *range = hi - lo;
    return d;
}

static void compare(gw_aquifer_type type, int mid_river, const char *label)
{
    const int nx = 160, ny = 120;
    gw_problem *p = model(nx, ny, type, mid_river);
    double *h0 = malloc((size_t)nx * ny * sizeof *h0), *h1 = malloc((size_t)nx * ny * sizeof *h1);
    assert_non_null(h0);
    assert_non_null(h1);
    char m0[200], m1[200];
    int it0, it1;
    double d0, d1, range;
    solve(p, -1, h0, m0, sizeof m0, &it0, &d0);
    solve(p, 1, h1, m1, sizeof m1, &it1, &d1);
    double d = max_diff(p, h0, h1, &range);
    print_message("    %s: whole %d iteration(s), split %d; max |dh| %.3g m of a %.3g m range; "
                  "balance %.2g %% / %.2g %%\n      %s\n", label, it0, it1, d, range, d0, d1, m1);
    assert_non_null(strstr(m1, "two halves"));
    assert_null(strstr(m0, "two halves"));
    int ns = 0;
    assert_int_equal(sscanf(strstr(m1, "column of "), "column of %d", &ns), 1);
    if (mid_river)
        assert_true(ns > 0 && ns < 100);   /* 120 rows, a third of them fixed */
    assert_int_equal(it0, it1);
    assert_true(d <= 1e-10 * range);
    assert_true(fabs(d0) < 1e-8 && fabs(d1) < 1e-8);
    free(h0);
    free(h1);
    gw_problem_free(p);
}

static void test_confined(void **state)
{
    (void)state;
    compare(GW_CONFINED, 0, "confined");
}

static void test_unconfined(void **state)
{
    (void)state;
    compare(GW_UNCONFINED, 0, "unconfined");
}

static void test_broken_separator(void **state)
{
    (void)state;
    compare(GW_CONFINED, 1, "fixed heads across the middle");
}

/* A second run that changes only recharge and pumping reuses the split
 * factor (no factorization) and matches a fresh whole solve. */
static void test_sweep_member(void **state)
{
    (void)state;
    const int nx = 160, ny = 120;
    gw_problem *p = model(nx, ny, GW_CONFINED, 0);
    gw_solve_options o;
    gw_solve_options_default(&o);
    o.split = 1;
    gw_error err = {{0}};
    gw_solver *s = gw_solver_new(p, &o, &err);
    assert_non_null(s);
    gw_solution s1 = {0}, s2 = {0};
    assert_int_equal(gw_solver_run(s, p, NULL, &s1, &err), 0);
    for (int i = 0; i < nx * ny; i++)
        p->recharge[i] *= 1.3;
    p->wells[0].rate *= 0.5;
    assert_int_equal(gw_solver_run(s, p, s1.head, &s2, &err), 0);
    assert_int_equal(s2.factorizations, 0);
    double *h = malloc((size_t)nx * ny * sizeof *h);
    char m[200];
    int it;
    double disc, range;
    solve(p, -1, h, m, sizeof m, &it, &disc);
    double d = max_diff(p, h, s2.head, &range);
    print_message("    sweep member: %d factorizations, max |dh| %.3g m against a fresh whole solve\n",
                  s2.factorizations, d);
    assert_true(d <= 1e-10 * range);
    free(h);
    gw_solution_free(&s1);
    gw_solution_free(&s2);
    gw_solver_free(s);
    gw_problem_free(p);
}

/* Three columns: no column has a quarter of the unknowns on either side
 * with room for both halves, so the solver factorizes the grid whole. */
static void test_no_split(void **state)
{
    (void)state;
    gw_problem *p = model(3, 200, GW_CONFINED, 0);
    double *h0 = malloc(600 * sizeof *h0), *h1 = malloc(600 * sizeof *h1);
    char m0[200], m1[200];
    int it0, it1;
    double d0, d1, range;
    solve(p, -1, h0, m0, sizeof m0, &it0, &d0);
    solve(p, 1, h1, m1, sizeof m1, &it1, &d1);
    assert_null(strstr(m1, "two halves"));
    assert_true(max_diff(p, h0, h1, &range) == 0.0);
    free(h0);
    free(h1);
    gw_problem_free(p);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_confined),
        cmocka_unit_test(test_unconfined),
        cmocka_unit_test(test_broken_separator),
        cmocka_unit_test(test_sweep_member),
        cmocka_unit_test(test_no_split),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
