/* Transects (solver/transect.h) on the confined 1-D strip between two
 * fixed-head columns with uniform recharge.
 *
 * Reference (derived from Darcy's law and continuity; the standard textbook
 * result, e.g. Fetter, Applied Hydrogeology): with x measured from the west
 * fixed-cell centre,
 *     h(x) = h1 + (h2 - h1) x/L + R x (L - x)/(2T),
 *     q(x) = -T dh/dx = R (x - x_d),   x_d = L/2 - (T/R)(h1 - h2)/L.
 * The flux field is (q(x), 0) everywhere, so along a line at angle theta to
 * the x axis the along-line flux is q cos(theta) and the flux to the left of
 * the line is -q sin(theta); both vanish at x = x_d, wherever the line
 * crosses it, and the divide polyline must cross the line there too.
 * Requirement (DESIGN.md): divides within a tenth of a cell. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <cmocka.h>

#include "solver/divide.h"
#include "solver/problem.h"
#include "solver/solve.h"
#include "solver/transect.h"
#include "fixture_strip.h"

enum { NX = 41, NY = 9 };
static const double DX = 25.0, DY = 20.0;
static const double L = (NX - 1) * 25.0;
static const double K = 15.0, B = 12.0, R = 0.0008, H1 = 50.0, H2 = 49.0;

static gw_problem *strip(void)
{
    gw_grid g = {.nx = NX, .ny = NY, .x0 = 0.0, .y0 = 0.0, .dx = DX, .dy = DY};
    return fixture_strip(&g, GW_CONFINED, K, B, H1, H2, R);
}

static double x_d(void) { return L / 2 - (K * B / R) * (H1 - H2) / L; }

/* Solve the strip and cut it with the two-vertex line (x0,y0)-(x1,y1). */
static void cut(double x0, double y0, double x1, double y1, double spacing)
{
    gw_problem *p = strip();
    gw_solution sol = {0};
    gw_divide_analysis a;
    gw_transect t;
    gw_error err = {{0}};
    gw_solve_options o;
    gw_solve_options_default(&o);
    if (gw_solve(p, &o, &sol, &err)) fail_msg("solve: %s", err.msg);
    if (gw_divide_analysis_run(p, &sol, &a, &err)) fail_msg("divides: %s", err.msg);
    double xy[4] = {x0, y0, x1, y1};
    if (gw_transect_compute(p, &sol, xy, 2, spacing, &a.divides, &t, &err)) fail_msg("transect: %s", err.msg);

    double len = hypot(x1 - x0, y1 - y0), ct = (x1 - x0) / len, st = (y1 - y0) / len;
    assert_true(fabs(t.length - len) < 1e-9 * len);
    double xc = DX / 2, T = K * B, herr = 0, qerr = 0;
    int inner = 0;
    for (int i = 0; i < t.n; i++) {
        const gw_transect_sample *s = &t.s[i];
        double x = s->x - xc;
        herr = fmax(herr, fabs(s->head - (H1 + (H2 - H1) * x / L + R * x * (L - x) / (2 * T))));
        if (x < DX / 2 || x > L - DX / 2) continue;   /* fixed-head cells: flux ends there */
        inner++;
        double q = R * (x - x_d());
        qerr = fmax(qerr, fabs(s->qa - q * ct) + fabs(s->qn + q * st));
    }
    printf("# line (%g,%g)-(%g,%g): %d samples, head error %.2g, flux error %.2g\n", x0, y0, x1, y1,
           t.n, herr, qerr);
    assert_true(inner > 10);
    /* Bilinear head between the nodes of a parabola: error <= R dx^2 / (8T). */
    assert_true(herr <= 1.001 * R * DX * DX / (8 * T));
    assert_true(qerr < 1e-9);

    int ndiv = 0, nrev = 0;
    for (int c = 0; c < t.ncross; c++) {
        const gw_transect_crossing *x = &t.c[c];
        double err_x = fabs(x->at.x - xc - x_d());
        if (x->kind == GW_CROSS_DIVIDE) {
            ndiv++;
            assert_int_equal(x->a, 1);
            assert_int_equal(x->b, 2);
            assert_true(err_x <= 0.1 * DX);
            /* The reported distance is the distance along the line. */
            assert_true(fabs(x->at.dist - hypot(x->at.x - x0, x->at.y - y0)) < 1e-6);
        } else if (x->kind == GW_CROSS_DIVERGING) {
            nrev++;
            assert_true(err_x <= 0.1 * DX);
        }
    }
    assert_int_equal(ndiv, 1);
    assert_int_equal(nrev, 1);
    for (int c = 1; c < t.ncross; c++) assert_true(t.c[c].at.dist >= t.c[c - 1].at.dist);

    gw_transect_free(&t);
    gw_divide_analysis_free(&a);
    gw_solution_free(&sol);
    gw_problem_free(p);
}

static void test_along_the_strip(void **state)
{
    (void)state;
    cut(DX / 2, 90.0, L + DX / 2, 90.0, 0.0);
}

static void test_slanted_line(void **state)
{
    (void)state;
    cut(DX / 2, 10.0, L + DX / 2, 170.0, 7.0);
}

static void test_backwards_line(void **state)
{
    /* Drawn east to west: the along-line flux changes sign the other way
     * round, but the divide is still "flow divides" at x_d. */
    (void)state;
    cut(L + DX / 2, 100.0, DX / 2, 60.0, 0.0);
}

static void test_flux_outside(void **state)
{
    (void)state;
    gw_problem *p = strip();
    gw_solution sol = {0};
    gw_error err = {{0}};
    gw_solve_options o;
    gw_solve_options_default(&o);
    if (gw_solve(p, &o, &sol, &err)) fail_msg("solve: %s", err.msg);
    double qx, qy;
    assert_int_equal(gw_flux_at(p, &sol, -5.0, 10.0, &qx, &qy), -1);
    assert_true(isnan(qx) && isnan(qy));
    /* A line with one vertex is refused with a message. */
    gw_transect t;
    double xy[2] = {10, 10};
    assert_int_equal(gw_transect_compute(p, &sol, xy, 1, 0.0, NULL, &t, &err), -1);
    assert_true(err.msg[0] != 0);
    gw_solution_free(&sol);
    gw_problem_free(p);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_along_the_strip),
        cmocka_unit_test(test_slanted_line),
        cmocka_unit_test(test_backwards_line),
        cmocka_unit_test(test_flux_outside),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
