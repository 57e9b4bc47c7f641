/* Contour tracing (GDAL through io/map_contour) against an analytic field.
 *
 * A cone h = A - B r has circular contours of radius r = (A - level) / B
 * (exact, from the definition).  Contours traced from cell-centred values
 * interpolate linearly between centres, so a vertex lies off the circle by
 * at most the chord error of the cone's radial profile along a grid line,
 * which is below a few hundredths of a cell away from the apex; we allow
 * 0.05 dx beyond three cells from the apex. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdlib.h>
#include <cmocka.h>

#include "io/map_contour.h"

static void test_cone_radii(void **state)
{
    (void)state;
    enum { N = 101 };
    const double DX = 10.0, A = 100.0, B = 0.02;
    gw_grid g = {.nx = N, .ny = N, .x0 = 1000.0, .y0 = 2000.0, .dx = DX, .dy = DX};
    double xc = gw_grid_xc(&g, N / 2), yc = gw_grid_yc(&g, N / 2);
    double *h = malloc(sizeof(double) * N * N);
    assert_non_null(h);
    for (int r = 0; r < N; r++)
        for (int c = 0; c < N; c++)
            h[r * N + c] = A - B * hypot(gw_grid_xc(&g, c) - xc, gw_grid_yc(&g, r) - yc);

    gw_contour_set cs;
    gw_error err = {{0}};
    assert_int_equal(gw_contour_trace(&g, h, 1.0, &cs, &err), 0);
    /* Levels 91..99 are full circles inside the grid (r = 50..450 <= 500). */
    int seen[10] = {0};
    double worst = 0;
    for (int i = 0; i < cs.nlines; i++) {
        const gw_contour_line *L = &cs.line[i];
        double r0 = (A - L->level) / B;
        if (r0 > 450 + 1e-9) continue;    /* clipped by the grid edge */
        if (r0 < 3 * DX) continue;        /* the apex itself (level 100) */
        int lv = (int)lround(L->level);
        assert_true(lv >= 91 && lv <= 99);
        seen[lv - 90]++;
        assert_true(L->closed);
        for (int k = 0; k < L->n; k++) {
            double r = hypot(L->xy[2 * k] - xc, L->xy[2 * k + 1] - yc);
            if (r0 < 3 * DX) continue;
            double e = fabs(r - r0);
            if (e > worst) worst = e;
        }
    }
    for (int lv = 91; lv <= 99; lv++) assert_int_equal(seen[lv - 90], 1);
    print_message("cone contours: worst radius error %.4f m (%.4f dx)\n", worst, worst / DX);
    assert_true(worst < 0.05 * DX);
    gw_contour_set_free(&cs);
    free(h);
}

/* Inactive cells (NAN) are left out: no contour vertex may fall inside the
 * square spanned by inactive cell centres. */
static void test_inactive_hole(void **state)
{
    (void)state;
    enum { N = 40 };
    gw_grid g = {.nx = N, .ny = N, .x0 = 0, .y0 = 0, .dx = 1, .dy = 1};
    double *h = malloc(sizeof(double) * N * N);
    assert_non_null(h);
    for (int r = 0; r < N; r++)
        for (int c = 0; c < N; c++) {
            h[r * N + c] = gw_grid_xc(&g, c);   /* plane rising to the east */
            if (r >= 10 && r < 30 && c >= 10 && c < 30) h[r * N + c] = NAN;
        }
    gw_contour_set cs;
    gw_error err = {{0}};
    assert_int_equal(gw_contour_trace(&g, h, 2.0, &cs, &err), 0);
    assert_true(cs.nlines > 0);
    for (int i = 0; i < cs.nlines; i++)
        for (int k = 0; k < cs.line[i].n; k++) {
            double x = cs.line[i].xy[2 * k], y = cs.line[i].xy[2 * k + 1];
            /* Plane contours are vertical lines x = level (exact); GDAL ends a
             * line at the edge of a nodata cell with a short extension, so
             * end vertices may stray by a fraction of a cell. */
            assert_true(fabs(x - cs.line[i].level) < 0.25);
            int in_hole = x > 10.5 + 1e-9 && x < 29.5 - 1e-9 && y > 10.5 + 1e-9 && y < 29.5 - 1e-9;
            assert_false(in_hole);
        }
    gw_contour_set_free(&cs);
    free(h);
}

/* Round intervals: 1, 2, 2.5 or 5 times a power of ten (common practice
 * for map contours), about the requested number of levels. */
static void test_nice_interval(void **state)
{
    (void)state;
    assert_true(fabs(gw_contour_nice_interval(0, 10, 10) - 1.0) < 1e-12);
    assert_true(fabs(gw_contour_nice_interval(99.5, 102.7, 12) - 0.25) < 1e-12);
    assert_true(fabs(gw_contour_nice_interval(0, 1000, 5) - 200.0) < 1e-9);
    for (double range = 0.013; range < 5e4; range *= 1.37) {
        double iv = gw_contour_nice_interval(50, 50 + range, 10);
        double m = iv / pow(10, floor(log10(iv) + 1e-12));
        assert_true(fabs(m - 1) < 1e-9 || fabs(m - 2) < 1e-9 || fabs(m - 2.5) < 1e-9 ||
                    fabs(m - 5) < 1e-9 || fabs(m - 10) < 1e-9);
        double nlev = range / iv;
        assert_true(nlev > 5 && nlev < 20);
    }
    assert_int_equal(gw_contour_major_every(0.25), 4);
    assert_int_equal(gw_contour_major_every(0.5), 2);
    assert_int_equal(gw_contour_major_every(2.0), 5);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_cone_radii),
        cmocka_unit_test(test_inactive_hole),
        cmocka_unit_test(test_nice_interval),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
