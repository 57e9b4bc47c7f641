/* Verification: 1-D strips between two fixed heads with uniform recharge.
 *
 *  - confined: h(x) = h1 + (h2 - h1) x / L + R x (L - x) / (2 T)
 *    (derived from Darcy's law q = -T dh/dx and continuity dq/dx = R; the
 *    standard textbook result, e.g. Fetter, Applied Hydrogeology).
 *  - unconfined (Dupuit 1863; Fetter, Applied Hydrogeology):
 *    b^2 = b1^2 + (b2^2 - b1^2) x / L + R x (L - x) / K, b = h - base.
 *
 * Both are quadratics (in h, resp. b^2), and the 5-point cell-centred scheme
 * reproduces quadratics exactly at the cell centres: the central second
 * difference of a quadratic equals its second derivative, and the face flux
 * (difference quotient between two centres) equals the exact Darcy flux at
 * the face midway between them.  So the tests ask for round-off agreement,
 * not "small" errors.
 *
 * The analytic boundaries x = 0 and x = L are the centres of the fixed-head
 * cells in the first and last columns.  Every row is identical (ny = 3), so
 * the result shows the 2-D code reduces to the 1-D problem. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <cmocka.h>

#include "solver/budget.h"
#include "solver/observe.h"
#include "solver/problem.h"
#include "solver/solve.h"
#include "fixture_strip.h"

enum { NX = 41, NY = 3 };
static const double DX = 25.0, DY = 40.0;   /* unequal on purpose */
static const double L = (NX - 1) * 25.0;    /* distance between the fixed-cell centres */

/* Strip with fixed heads ha (west column) and hb (east column), each its own
 * feature, and uniform recharge. */
static gw_problem *strip(gw_aquifer_type type, double k, double thick_or_base,
                         double ha, double hb, double rech)
{
    gw_grid g = {.nx = NX, .ny = NY, .x0 = 0.0, .y0 = 0.0, .dx = DX, .dy = DY};
    return fixture_strip(&g, type, k, thick_or_base, ha, hb, rech);
}

static void solve_tight(const gw_problem *p, gw_solution *sol)
{
    fixture_solve_tight(p, sol, 1e-11);
    assert_true(sol->converged);
}

/* Global water balance closes (DESIGN: < 1e-6 percent on every test model). */
static void check_balance(const gw_problem *p, const gw_solution *sol, gw_budget *b)
{
    gw_error err = {{0}};
    if (gw_budget_compute(p, sol, b, &err) != 0) fail_msg("budget: %s", err.msg);
    print_message("    balance: in %.10g out %.10g discrepancy %.3g %%\n",
                  b->total_in, b->total_out, b->discrepancy_percent);
    assert_true(fabs(b->discrepancy_percent) < 1e-6);
}

/* ---- confined ---------------------------------------------------------- */

static const double T_K = 10.0, T_B = 20.0;          /* T = 200 m2/d */
static const double C_H1 = 50.0, C_H2 = 48.0, C_R = 1e-3;

static double conf_h(double x, double T)
{
    return C_H1 + (C_H2 - C_H1) * x / L + C_R * x * (L - x) / (2.0 * T);
}
/* Darcy flux per unit width in +x: q = -T dh/dx. */
static double conf_q(double x, double T)
{
    return -T * ((C_H2 - C_H1) / L + C_R * (L - 2.0 * x) / (2.0 * T));
}

static void test_confined_parabola(void **state)
{
    (void)state;
    const double T = T_K * T_B;
    gw_problem *p = strip(GW_CONFINED, T_K, T_B, C_H1, C_H2, C_R);
    gw_solution sol = {0};
    solve_tight(p, &sol);

    double maxerr = 0.0, hmax = 0.0;
    for (int r = 0; r < NY; r++)
        for (int c = 0; c < NX; c++) {
            double x = c * DX, h = sol.head[r * NX + c];
            maxerr = fmax(maxerr, fabs(h - conf_h(x, T)));
            hmax = fmax(hmax, fabs(conf_h(x, T)));
        }
    print_message("    confined strip: max |h - parabola| = %.3e m (rel %.3e)\n",
                  maxerr, maxerr / hmax);
    assert_true(maxerr <= 1e-9 * hmax);

    /* Face fluxes: the flow between two centres equals the exact Darcy flux
     * at the face between them, q(x_face) * DY. */
    double maxq = 0.0, qscale = fabs(C_R) * L;
    for (int r = 0; r < NY; r++)
        for (int c = 0; c + 1 < NX; c++) {
            int i = r * NX + c;
            double num = sol.cx[i] * (sol.head[i] - sol.head[i + 1]);
            maxq = fmax(maxq, fabs(num - conf_q((c + 0.5) * DX, T) * DY));
        }
    print_message("    confined strip: max face-flux error %.3e m3/d (scale %.3g)\n",
                  maxq, qscale * DY);
    assert_true(maxq <= 1e-9 * qscale * DY);

    /* Each end's fixed-head outflow: the fixed cell also receives the recharge
     * on its own area, so it passes on the Darcy flux at the OUTER edge of the
     * fixed cell (x = -DX/2, resp. L + DX/2) of the same parabola. */
    gw_budget b = {0};
    check_balance(p, &sol, &b);
    double west = NY * conf_q(-0.5 * DX, T) * DY * -1.0;   /* westward out */
    double east = NY * conf_q(L + 0.5 * DX, T) * DY;       /* eastward out */
    double netw = b.feature[1].net, nete = b.feature[2].net;
    print_message("    west outflow %.10g (analytic %.10g), east %.10g (analytic %.10g)\n",
                  -netw, west, -nete, east);
    assert_true(fabs(-netw - west) <= 1e-9 * fabs(west));
    assert_true(fabs(-nete - east) <= 1e-9 * fabs(east));
    /* Recharge over the whole strip, including the fixed cells. */
    double rtot = C_R * NX * DX * NY * DY;
    assert_true(fabs(b.feature[0].in - rtot) <= 1e-12 * rtot);
    assert_int_equal(b.feature[1].state, GW_STATE_GAINING);
    assert_int_equal(b.feature[2].state, GW_STATE_GAINING);

    gw_budget_free(&b);
    gw_solution_free(&sol);
    gw_problem_free(p);
}

/* With no recharge the head is linear and uniform flow T (h1-h2)/L crosses
 * every face: one end gains, the other loses. */
static void test_confined_linear(void **state)
{
    (void)state;
    const double T = T_K * T_B;
    gw_problem *p = strip(GW_CONFINED, T_K, T_B, C_H1, C_H2, 0.0);
    gw_solution sol = {0};
    solve_tight(p, &sol);
    double maxerr = 0.0;
    for (int r = 0; r < NY; r++)
        for (int c = 0; c < NX; c++)
            maxerr = fmax(maxerr, fabs(sol.head[r * NX + c] -
                                       (C_H1 + (C_H2 - C_H1) * c * DX / L)));
    print_message("    linear strip: max error %.3e m\n", maxerr);
    assert_true(maxerr <= 1e-9 * C_H1);
    /* Bilinear interpolation between centres is exact for a linear field
     * (observation heads, observe.h): points between the fixed-cell centres,
     * including ones on a centre and on the middle row. */
    const double px[] = {12.5, 100.0, 333.3, 512.5, 987.6, 1012.5};
    const double py[] = {20.0, 60.0, 77.7, 100.0, 41.0, 99.0};
    double maxobs = 0.0;
    for (int i = 0; i < 6; i++) {
        gw_grid g = p->grid;
        double h = gw_head_at(&g, sol.head, px[i], py[i]);
        double x = px[i] - 0.5 * DX;   /* from the west fixed-cell centre */
        maxobs = fmax(maxobs, fabs(h - (C_H1 + (C_H2 - C_H1) * x / L)));
    }
    print_message("    bilinear observation heads: max error %.3e m\n", maxobs);
    assert_true(maxobs <= 1e-9 * C_H1);
    gw_budget b = {0};
    check_balance(p, &sol, &b);
    double q = NY * T * (C_H1 - C_H2) / L * DY;   /* Darcy */
    assert_true(fabs(b.feature[1].net - q) <= 1e-9 * q);
    assert_true(fabs(b.feature[2].net + q) <= 1e-9 * q);
    assert_int_equal(b.feature[1].state, GW_STATE_LOSING);
    assert_int_equal(b.feature[2].state, GW_STATE_GAINING);
    gw_budget_free(&b);
    gw_solution_free(&sol);
    gw_problem_free(p);
}

/* ---- unconfined (Dupuit) ---------------------------------------------- */

static const double U_K = 10.0, U_BASE = 2.0, U_H1 = 12.0, U_H2 = 10.0, U_R = 5e-4;

/* Dupuit (1863); Fetter, Applied Hydrogeology: b^2 parabola. */
static double dup_b2(double x)
{
    double b1 = U_H1 - U_BASE, b2 = U_H2 - U_BASE;
    return b1 * b1 + (b2 * b2 - b1 * b1) * x / L + U_R * x * (L - x) / U_K;
}
/* Dupuit discharge per unit width: q = -K b db/dx = -(K/2) d(b^2)/dx. */
static double dup_q(double x)
{
    double b1 = U_H1 - U_BASE, b2 = U_H2 - U_BASE;
    return -0.5 * U_K * ((b2 * b2 - b1 * b1) / L + U_R * (L - 2.0 * x) / U_K);
}

static void test_dupuit_strip(void **state)
{
    (void)state;
    gw_problem *p = strip(GW_UNCONFINED, U_K, U_BASE, U_H1, U_H2, U_R);
    gw_solution sol = {0};
    solve_tight(p, &sol);
    double maxerr = 0.0;
    for (int r = 0; r < NY; r++)
        for (int c = 0; c < NX; c++) {
            double h = sol.head[r * NX + c];
            maxerr = fmax(maxerr, fabs(h - (U_BASE + sqrt(dup_b2(c * DX)))));
        }
    print_message("    Dupuit strip: max |h - Dupuit| = %.3e m after %d iterations\n",
                  maxerr, sol.iterations);
    /* Within 0.01 m for any consistent scheme; the arithmetic mean of the
     * saturated thickness at faces makes the scheme exact for b^2 quadratics,
     * so only the nonlinear iteration tolerance remains. */
    assert_true(maxerr < 0.01);
    assert_true(maxerr < 1e-7);
    assert_int_equal(sol.ndry, 0);

    gw_budget b = {0};
    check_balance(p, &sol, &b);
    double west = -NY * dup_q(-0.5 * DX) * DY, east = NY * dup_q(L + 0.5 * DX) * DY;
    print_message("    west outflow %.10g (Dupuit %.10g), east %.10g (Dupuit %.10g)\n",
                  -b.feature[1].net, west, -b.feature[2].net, east);
    assert_true(fabs(-b.feature[1].net - west) <= 1e-6 * fabs(west));
    assert_true(fabs(-b.feature[2].net - east) <= 1e-6 * fabs(east));
    gw_budget_free(&b);
    gw_solution_free(&sol);
    gw_problem_free(p);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_confined_parabola),
        cmocka_unit_test(test_confined_linear),
        cmocka_unit_test(test_dupuit_strip),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
