/* Verification: steady well in a leaky confined aquifer.
 *
 * de Glee (1930); Hantush and Jacob (1955), steady limit:
 *     s(r) = Q / (2 pi T) K0(r / lambda),   lambda = sqrt(T c),
 * where c is the resistance of the aquitard (time) above which the head is
 * h0.  K0 comes from the GNU Scientific Library (reference library).
 *
 * Every cell has a leakage link (conductance DX DY / c, head h0 beyond the
 * aquitard); there are no fixed heads at all, so this also checks that a
 * problem bounded only by leakage is accepted and solved.  The grid reaches
 * 6.4 lambda from the well, where K0 is below 1e-3 of its value near the
 * well, so the no-flow grid edge does not matter at the compared points
 * (r <= 3 lambda). */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <cmocka.h>

#include <gsl/gsl_sf_bessel.h>

#include "solver/budget.h"
#include "solver/problem.h"
#include "solver/solve.h"

enum { N = 201 };
static const double PI = 3.14159265358979323846;
static const double DX = 20.0;
static const double K = 5.0, B = 20.0, RES = 1000.0, Q = 400.0, H0 = 30.0;

static void test_de_glee(void **state)
{
    (void)state;
    const double T = K * B, lambda = sqrt(T * RES), A = Q / (2.0 * PI * T);
    gw_grid g = {.nx = N, .ny = N, .x0 = 0.0, .y0 = 0.0, .dx = DX, .dy = DX};
    gw_error err = {{0}};
    gw_problem *p = gw_problem_new(&g, GW_CONFINED, &err);
    assert_non_null(p);
    int fl = gw_problem_add_feature(p, "Aquitard", GW_FEAT_LEAKAGE, &err);
    int fw = gw_problem_add_feature(p, "Supply well", GW_FEAT_WELL, &err);
    assert_true(fl > 0 && fw > 0);
    for (int i = 0; i < N * N; i++) {
        p->k[i] = K;
        p->thick[i] = B;
        gw_link l = {.cell = i, .feature = fl, .kind = GW_LINK_LEAKAGE,
                     .cond = DX * DX / RES, .ref = H0, .floor = -HUGE_VAL};
        assert_int_equal(gw_problem_add_link(p, &l, &err), 0);
    }
    const int mid = N / 2, wcell = mid * N + mid;
    const double xw = gw_grid_xc(&g, mid), yw = gw_grid_yc(&g, mid);
    gw_well w = {.cell = wcell, .feature = fw, .rate = Q, .x = xw, .y = yw};
    assert_int_equal(gw_problem_add_well(p, &w, &err), 0);

    gw_solution sol = {0};
    if (gw_solve(p, NULL, &sol, &err) != 0) fail_msg("solve: %s", err.msg);

    double maxrel = 0.0;
    for (int r = 0; r < N; r++)
        for (int c = 0; c < N; c++) {
            double x = gw_grid_xc(&g, c) - xw, y = gw_grid_yc(&g, r) - yw;
            double rr = sqrt(x * x + y * y);
            if (rr < 3.0 * DX || rr > 3.0 * lambda) continue;
            double s_an = A * gsl_sf_bessel_K0(rr / lambda);
            double s_num = H0 - sol.head[r * N + c];
            maxrel = fmax(maxrel, fabs(s_num - s_an) / s_an);
        }
    /* Well cell: the drawdown of the equivalent radius of the 5-point grid,
     * r0 = exp(-gamma) / (2 sqrt 2) dx = 0.1985 dx (asymptotics of the square
     * lattice Green's function, McCrea and Whipple 1940; from memory), and
     * Peaceman's (1978) 0.208 dx (from memory), inside the leaky solution. */
    const double R0_LATTICE = 0.56145948356688517 / (2.0 * sqrt(2.0));
    double s_w = H0 - sol.head[wcell];
    double s_lat = A * gsl_sf_bessel_K0(R0_LATTICE * DX / lambda);
    double s_pea = A * gsl_sf_bessel_K0(0.208 * DX / lambda);
    double rel_lat = fabs(s_w - s_lat) / s_lat, rel_pea = fabs(s_w - s_pea) / s_pea;
    print_message("    lambda = %.1f m: max rel. error (3 dx <= r <= 3 lambda) %.3e\n"
                  "    well cell s = %.5f m; at 0.1985 dx %.5f m (rel %.2e); "
                  "at 0.208 dx %.5f m (rel %.2e)\n",
                  lambda, maxrel, s_w, s_lat, rel_lat, s_pea, rel_pea);
    assert_true(maxrel < 0.01);
    assert_true(rel_lat < 0.002);
    assert_true(rel_pea < 0.02);

    gw_budget b = {0};
    if (gw_budget_compute(p, &sol, &b, &err) != 0) fail_msg("budget: %s", err.msg);
    print_message("    leakage in %.8g, well out %.8g, discrepancy %.3g %%\n",
                  b.feature[fl].in, b.feature[fw].out, b.discrepancy_percent);
    assert_true(fabs(b.discrepancy_percent) < 1e-6);
    /* All the pumped water comes through the aquitard. */
    assert_true(fabs(b.feature[fl].net - Q) <= 1e-8 * Q);
    assert_int_equal(b.feature[fl].state, GW_STATE_LOSING);
    gw_budget_free(&b);
    gw_solution_free(&sol);
    gw_problem_free(p);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_de_glee),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
