/* Verification: steady radial flow to a pumping well in a confined aquifer.
 *
 *  - Thiem (1906): s(r) = Q / (2 pi T) ln(Re / r).
 *  - Well-cell head: Peaceman (1978) equivalent well-block radius; for square
 *    cells r0 = 0.208 dx (from memory; his radial-flow argument gives
 *    dx exp(-pi/2), his numerical runs about 0.2 dx).  The asymptotics of the
 *    square-lattice Green's function give exactly r0 = exp(-gamma)/(2 sqrt 2)
 *    dx = 0.1985 dx for the infinite 5-point grid (McCrea and Whipple 1940;
 *    from memory), so the well cell is checked tightly against 0.1985 dx and
 *    loosely (2 %) against 0.208 dx.
 *  - Anisotropy Ky = a Kx: the coordinate change y' = y / sqrt(a) turns it
 *    into an isotropic problem with T' = sqrt(Tx Ty) (standard result, e.g.
 *    Bear, Dynamics of Fluids in Porous Media, 1972), so
 *    s = Q / (2 pi sqrt(Tx Ty)) ln(Re' / r'), r' = sqrt(x^2 + y^2 / a);
 *    the well cell uses Peaceman's (1983) radius for rectangular cells,
 *    r0 = 0.14 sqrt(dx^2 + dy^2) (from memory), applied to the cells as they
 *    appear in the transformed coordinates (DX by DX / sqrt(a)).
 *
 * The grid is square with the well at the centre cell.  Every cell whose
 * (transformed) distance from the well is >= Re is a fixed-head cell holding
 * the Thiem head at its own centre, so the outer boundary is exactly the
 * analytic solution (no staircase circle) and the test measures the interior
 * scheme and the point-sink treatment only. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <cmocka.h>

#include "solver/budget.h"
#include "solver/problem.h"
#include "solver/solve.h"

enum { N = 121 };                 /* columns, well in column 60 */
static const double PI = 3.14159265358979323846;
static const double DX = 10.0;    /* m */
static const double K = 5.0, B = 20.0, Q = 500.0, H0 = 50.0, RE = 500.0;

typedef struct {
    double maxrel_far;   /* max relative drawdown error at r >= 3 dx */
    double rel_well;     /* relative error of the well-cell drawdown */
    double rel_peaceman; /* same against Peaceman's 0.208 dx (square cells) */
} well_result;

/* Solve the well problem with Ky = a Kx.  Returns the errors. */
static well_result run_well(double a)
{
    /* Rows: the ellipse r' = Re reaches y = Re sqrt(a); keep two cells beyond. */
    const int half_rows = (int)ceil(RE * sqrt(a) / DX) + 2;
    const int NR = 2 * half_rows + 1;
    gw_grid g = {.nx = N, .ny = NR, .x0 = 0.0, .y0 = 0.0, .dx = DX, .dy = DX};
    gw_error err = {{0}};
    gw_problem *p = gw_problem_new(&g, GW_CONFINED, &err);
    assert_non_null(p);
    int fb = gw_problem_add_feature(p, "Outer ring", GW_FEAT_FIXED_HEAD, &err);
    int fw = gw_problem_add_feature(p, "Supply well", GW_FEAT_WELL, &err);
    assert_true(fb > 0 && fw > 0);

    const int mid = N / 2, midr = half_rows, wcell = midr * N + mid;
    const double xw = gw_grid_xc(&g, mid), yw = gw_grid_yc(&g, midr);
    const double Teq = K * B * sqrt(a);               /* sqrt(Tx Ty) */
    const double A = Q / (2.0 * PI * Teq);
    for (int r = 0; r < NR; r++)
        for (int c = 0; c < N; c++) {
            int i = r * N + c;
            p->k[i] = K;
            p->anis[i] = a;
            p->thick[i] = B;
            double x = gw_grid_xc(&g, c) - xw, y = gw_grid_yc(&g, r) - yw;
            double rt = sqrt(x * x + y * y / a);
            if (rt >= RE) {
                p->fixed[i] = H0 - A * log(RE / rt);   /* Thiem beyond Re */
                p->fixed_feature[i] = fb;
            }
        }
    gw_well w = {.cell = wcell, .feature = fw, .rate = Q, .x = xw, .y = yw};
    assert_int_equal(gw_problem_add_well(p, &w, &err), 0);

    gw_solution sol = {0};
    if (gw_solve(p, NULL, &sol, &err) != 0) fail_msg("solve: %s", err.msg);

    well_result res = {0};
    for (int r = 0; r < NR; r++)
        for (int c = 0; c < N; c++) {
            int i = r * N + c;
            double x = gw_grid_xc(&g, c) - xw, y = gw_grid_yc(&g, r) - yw;
            double rt = sqrt(x * x + y * y / a);
            if (p->fixed_feature[i] >= 0 || rt < 3.0 * DX) continue;
            double s_num = H0 - sol.head[i], s_an = A * log(RE / rt);
            res.maxrel_far = fmax(res.maxrel_far, fabs(s_num - s_an) / s_an);
        }
    /* Equivalent well-block radius in the transformed (isotropic) coordinates,
     * where the cells are DX by DX/sqrt(a): square cells, lattice value
     * 0.1985 dx and Peaceman (1978) 0.208 dx; rectangular cells, Peaceman
     * (1983) 0.14 sqrt(dx^2 + dy^2) (all from memory, see the top). */
    const double R0_LATTICE = 0.56145948356688517 / (2.0 * sqrt(2.0));
    double r0 = (a == 1.0) ? R0_LATTICE * DX : 0.14 * sqrt(DX * DX + DX * DX / a);
    double s_w = H0 - sol.head[wcell], s_w_an = A * log(RE / r0);
    res.rel_well = fabs(s_w - s_w_an) / s_w_an;
    res.rel_peaceman = fabs(s_w - A * log(RE / (0.208 * DX))) / s_w_an;
    print_message("    a = %g: max rel. error (r' >= 3 dx) %.3e; well cell s = %.5f m, "
                  "expected %.5f m (r0 = %.4f dx), rel %.3e\n",
                  a, res.maxrel_far, s_w, s_w_an, r0 / DX, res.rel_well);
    if (a == 1.0)
        print_message("    well cell vs Peaceman 0.208 dx: rel %.3e\n", res.rel_peaceman);

    gw_budget b = {0};
    if (gw_budget_compute(p, &sol, &b, &err) != 0) fail_msg("budget: %s", err.msg);
    print_message("    balance discrepancy %.3g %%; ring supplies %.8g, well takes %.8g\n",
                  b.discrepancy_percent, b.feature[fb].net, -b.feature[fw].net);
    assert_true(fabs(b.discrepancy_percent) < 1e-6);
    /* Continuity: the ring supplies exactly the pumping rate. */
    assert_true(fabs(b.feature[fb].net - Q) <= 1e-8 * Q);
    assert_true(fabs(b.feature[fw].out - Q) <= 1e-12 * Q);
    gw_budget_free(&b);
    gw_solution_free(&sol);
    gw_problem_free(p);
    return res;
}

static void test_thiem_isotropic(void **state)
{
    (void)state;
    well_result r = run_well(1.0);
    /* Thiem (1906) drawdown beyond 3 cells: within 1 %. */
    assert_true(r.maxrel_far < 0.01);
    /* Well-cell head: lattice radius 0.1985 dx within 0.2 %, Peaceman (1978)
     * 0.208 dx within 2 %. */
    assert_true(r.rel_well < 0.002);
    assert_true(r.rel_peaceman < 0.02);
}

static void test_thiem_anisotropic(void **state)
{
    (void)state;
    well_result r = run_well(4.0);
    /* Coordinate transformation (Bear 1972): within 2 % beyond 3 cells. */
    assert_true(r.maxrel_far < 0.02);
    /* Peaceman (1983) anisotropic well block: within 2 %. */
    assert_true(r.rel_well < 0.02);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_thiem_isotropic),
        cmocka_unit_test(test_thiem_anisotropic),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
