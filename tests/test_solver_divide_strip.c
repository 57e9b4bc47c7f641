/* Divides on 1-D strips between two fixed-head lines with uniform recharge.
 *
 *  - confined: head is the parabola h = h1 + (h2 - h1) x/L + R x (L - x)/(2T),
 *    the flux q = -T dh/dx vanishes at x_d = L/2 - (T/R)(h1 - h2)/L, and
 *    there is no divide when (T/R)|h1 - h2|/L > L/2 (derived from Darcy's
 *    law and continuity; the standard textbook result, e.g. Fetter, Applied
 *    Hydrogeology).
 *  - unconfined (Dupuit 1863; Fetter, Applied Hydrogeology): with b the
 *    saturated thickness, x_d = L/2 - K (b1^2 - b2^2) / (2 R L).
 *
 * Requirement (DESIGN.md): the divide within a tenth of a cell of x_d.  The
 * face flux is linear in x and exact at the faces on both strips, so the
 * interpolated zero should agree to round-off; the tests print the error.
 * x = 0 and x = L are the centres of the fixed-head columns. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <cmocka.h>

#include "solver/budget.h"
#include "solver/divide.h"
#include "solver/problem.h"
#include "solver/solve.h"
#include "fixture_strip.h"

enum { NX = 41, NY = 3 };
static const double DX = 25.0, DY = 40.0;
static const double L = (NX - 1) * 25.0;

static gw_problem *strip(gw_aquifer_type type, double k, double thick_or_base, double ha,
                         double hb, double rech)
{
    gw_grid g = {.nx = NX, .ny = NY, .x0 = 0.0, .y0 = 0.0, .dx = DX, .dy = DY};
    return fixture_strip(&g, type, k, thick_or_base, ha, hb, rech);
}

static void analyse(const gw_problem *p, gw_solution *sol, gw_budget *b, gw_divide_analysis *a)
{
    fixture_solve_tight(p, sol, 1e-11);
    gw_error err = {{0}};
    if (gw_budget_compute(p, sol, b, &err)) fail_msg("budget: %s", err.msg);
    if (gw_divide_analysis_run(p, sol, a, &err)) fail_msg("divides: %s", err.msg);
}

/* The one divide must separate the canals and sit at x_d on every vertex;
 * it must span the strip from the south to the north edge. */
static void check_divide(const gw_divide_analysis *a, double xd, const char *label)
{
    assert_int_equal(a->divides.n, 1);
    const gw_divide *d = &a->divides.d[0];
    assert_int_equal(d->a, 1);
    assert_int_equal(d->b, 2);
    double maxerr = 0.0, ymin = INFINITY, ymax = -INFINITY;
    for (int i = 0; i < d->npts; i++) {
        double x = d->xy[2 * i] - 0.5 * DX;   /* from the west fixed-cell centre */
        maxerr = fmax(maxerr, fabs(x - xd));
        ymin = fmin(ymin, d->xy[2 * i + 1]);
        ymax = fmax(ymax, d->xy[2 * i + 1]);
    }
    print_message("    %-34s x_d = %8.3f m  max |error| = %.2e m (%.2e cells)\n", label, xd,
                  maxerr, maxerr / DX);
    assert_true(maxerr < 0.1 * DX);
    assert_true(fabs(ymin) < 1e-9 && fabs(ymax - NY * DY) < 1e-9);
    assert_int_equal(a->nno_divide, 0);
}

/* No divide: the higher canal only loses, all of it to the lower one. */
static void check_no_divide(const gw_divide_analysis *a, const gw_budget *b, int losing,
                            int gaining, const char *label)
{
    assert_int_equal(a->divides.n, 0);
    assert_true(a->nno_divide >= 1);
    const gw_no_divide *nd = &a->no_divide[0];
    assert_int_equal(nd->losing, losing);
    assert_int_equal(nd->receiving, gaining);
    char line[256];
    gw_no_divide_describe(nd, losing == 1 ? "West canal" : "East canal",
                          gaining == 1 ? "West canal" : "East canal", "m", "day", line, sizeof line);
    print_message("    %-34s %s\n", label, line);
    /* What the losing canal puts in is its budget inflow, and all of it
     * reaches the other canal: water balance of the strip. */
    assert_true(b->feature[losing].out == 0.0);
    assert_true(fabs(nd->loss - b->feature[losing].in) <= 1e-9 * b->feature[losing].in);
    assert_true(fabs(nd->delivered - nd->loss) <= 1e-9 * nd->loss);
}

typedef struct {
    double k, thick, rech, h1, h2;
} strip_case;

static void test_confined_cases(void **state)
{
    (void)state;
    /* T/R and head differences chosen to put x_d in the middle, off-centre
     * on either side, inside the first/last cell and beyond the ends. */
    const strip_case cs[] = {
        {10, 20, 1e-3, 50.0, 50.0},    /* equal heads: L/2 */
        {10, 20, 1e-3, 51.0, 50.0},    /* x_d = 300 */
        {10, 20, 1e-3, 50.0, 51.5},    /* x_d = 800 */
        {5, 10, 5e-4, 53.0, 50.0},     /* T/R = 1e5: x_d = 200 */
        {50, 20, 2e-3, 50.5, 50.0},    /* T/R = 5e5: x_d = 250 */
        {10, 20, 1e-3, 52.4, 50.0},    /* x_d = 20 (0.8 cell) */
        {10, 20, 1e-3, 52.45, 50.0},   /* x_d = 10, inside the fixed cell */
        {10, 20, 1e-3, 50.0, 52.45},   /* x_d = 990, inside the east fixed cell */
        {10, 20, 1e-3, 52.6, 50.0},    /* x_d = -20: no divide (just past) */
        {10, 20, 1e-3, 54.0, 50.0},    /* x_d = -300: no divide */
        {10, 20, 1e-3, 50.0, 56.0},    /* x_d = 1700: no divide, east loses */
    };
    for (size_t i = 0; i < sizeof cs / sizeof cs[0]; i++) {
        const strip_case *c = &cs[i];
        double T = c->k * c->thick;
        double xd = L / 2 - (T / c->rech) * (c->h1 - c->h2) / L;
        gw_problem *p = strip(GW_CONFINED, c->k, c->thick, c->h1, c->h2, c->rech);
        gw_solution sol = {0};
        gw_budget b = {0};
        gw_divide_analysis a;
        analyse(p, &sol, &b, &a);
        char label[96];
        snprintf(label, sizeof label, "confined T/R=%.0e dh=%+.2f:", T / c->rech, c->h1 - c->h2);
        /* The discrete model puts the fixed line's half cell outside [0, L];
         * the no-divide cases are chosen beyond half a cell from the ends. */
        if (xd > 0 && xd < L)
            check_divide(&a, xd, label);
        else if (xd < 0)
            check_no_divide(&a, &b, 1, 2, label);
        else
            check_no_divide(&a, &b, 2, 1, label);
        gw_divide_analysis_free(&a);
        gw_budget_free(&b);
        gw_solution_free(&sol);
        gw_problem_free(p);
    }
}

static void test_dupuit_cases(void **state)
{
    (void)state;
    const double K = 10.0, R = 1e-3;
    const double hs[][2] = { {20.0, 20.0}, {20.0, 18.0}, {18.0, 20.0}, {15.0, 14.0} };
    for (size_t i = 0; i < sizeof hs / sizeof hs[0]; i++) {
        double h1 = hs[i][0], h2 = hs[i][1];
        /* Base at 0, so b = h (Dupuit 1863; Fetter, Applied Hydrogeology). */
        double xd = L / 2 - K * (h1 * h1 - h2 * h2) / (2 * R * L);
        gw_problem *p = strip(GW_UNCONFINED, K, 0.0, h1, h2, R);
        gw_solution sol = {0};
        gw_budget b = {0};
        gw_divide_analysis a;
        analyse(p, &sol, &b, &a);
        char label[96];
        snprintf(label, sizeof label, "Dupuit h1=%.1f h2=%.1f:", h1, h2);
        check_divide(&a, xd, label);
        gw_divide_analysis_free(&a);
        gw_budget_free(&b);
        gw_solution_free(&sol);
        gw_problem_free(p);
    }
}

/* With recharge the only source, each canal's catchment collects exactly
 * what the canal takes out: x_d R per unit width to the west (continuity). */
static void test_strip_catchments(void **state)
{
    (void)state;
    gw_problem *p = strip(GW_CONFINED, 10, 20, 51.0, 50.0, 1e-3);
    gw_solution sol = {0};
    gw_budget b = {0};
    gw_divide_analysis a;
    analyse(p, &sol, &b, &a);
    for (int f = 1; f <= 2; f++) {
        double rel = fabs(a.catchments.recharge[f] - b.feature[f].out) / b.feature[f].out;
        print_message("    feature %d: catchment %.6g m2, recharge %.8g, outflow %.8g m3/d, rel diff %.1e\n",
                      f, a.catchments.area[f], a.catchments.recharge[f], b.feature[f].out, rel);
        assert_true(rel < 1e-9);
    }
    /* West catchment from the west model edge to x_d = 300 (cell centres at
     * x = 0 are 12.5 m from the edge). */
    double xd = 300.0;
    double west_area = (xd + 0.5 * DX) * NY * DY;
    print_message("    west catchment area %.6g, expected (x_d + dx/2) * width = %.6g\n",
                  a.catchments.area[1], west_area);
    assert_true(fabs(a.catchments.area[1] - west_area) < 1e-6 * west_area);
    gw_divide_analysis_free(&a);
    gw_budget_free(&b);
    gw_solution_free(&sol);
    gw_problem_free(p);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_confined_cases),
        cmocka_unit_test(test_dupuit_cases),
        cmocka_unit_test(test_strip_catchments),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
