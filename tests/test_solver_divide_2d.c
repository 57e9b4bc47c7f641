/* Divides and stagnation points on 2-D models.
 *
 *  - Saddle point of a well in uniform flow: the stagnation point lies
 *    Q / (2 pi B q) downgradient of the well (Javandel and Tsang 1986,
 *    Ground Water 24(5)), B thickness, q the regional Darcy flux.
 *  - A recharge mound on a square with fixed-head edges has its head maximum
 *    at the centre (symmetry).
 *  - Symmetry: a model mirror-symmetric about x = xm (curved streams,
 *    heterogeneous conductivity) gives divides that are mirror images. */
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
#include "solver/rasterize.h"
#include "solver/solve.h"
#include "fixture_strip.h"

static void solve_analyse(const gw_problem *p, gw_solution *sol, gw_divide_analysis *a)
{
    fixture_solve_tight(p, sol, 1e-11);
    gw_error err = {{0}};
    if (gw_divide_analysis_run(p, sol, a, &err)) fail_msg("divides: %s", err.msg);
}

static void test_well_saddle(void **state)
{
    (void)state;
    enum { N = 201 };
    const double dx = 10.0, K = 10.0, B = 10.0, h1 = 101.0, h2 = 100.0;
    gw_grid g = {.nx = N, .ny = N, .x0 = 0, .y0 = 0, .dx = dx, .dy = dx};
    gw_error err;
    gw_problem *p = gw_problem_new(&g, GW_CONFINED, &err);
    assert_non_null(p);
    int fw = gw_problem_add_feature(p, "West edge", GW_FEAT_FIXED_HEAD, &err);
    int fe = gw_problem_add_feature(p, "East edge", GW_FEAT_FIXED_HEAD, &err);
    int fwell = gw_problem_add_feature(p, "Supply well", GW_FEAT_WELL, &err);
    for (int r = 0; r < N; r++)
        for (int c = 0; c < N; c++) {
            int i = r * N + c;
            p->k[i] = K;
            p->thick[i] = B;
            if (c == 0) { p->fixed[i] = h1; p->fixed_feature[i] = fw; }
            if (c == N - 1) { p->fixed[i] = h2; p->fixed_feature[i] = fe; }
        }
    /* Regional flux q = K (h1 - h2) / L; choose Q for a saddle 10 cells out. */
    double q = K * (h1 - h2) / ((N - 1) * dx);
    double xs_expected = 100.0;
    double Q = 2.0 * 3.14159265358979323846 * B * q * xs_expected;
    int mid = N / 2;
    gw_well w = {.cell = mid * N + mid, .feature = fwell, .rate = Q,
                 .x = gw_grid_xc(&g, mid), .y = gw_grid_yc(&g, mid)};
    assert_true(gw_problem_add_well(p, &w, &err) == 0);

    gw_solution sol = {0};
    gw_divide_analysis a;
    solve_analyse(p, &sol, &a);
    int nsaddle = 0;
    double best = INFINITY;
    for (int i = 0; i < a.nstagnation; i++) {
        const gw_stagnation *s = &a.stagnation[i];
        print_message("    stagnation point (%.3f, %.3f) head %.5f %s\n", s->x, s->y, s->head,
                      gw_stag_type_name(s->type));
        if (s->type == GW_STAGNATION_SADDLE) {
            nsaddle++;
            best = hypot(s->x - (w.x + xs_expected), s->y - w.y);
        }
    }
    print_message("    Javandel-Tsang saddle %.1f m downgradient of the well: error %.3f m (%.3f cells)\n",
                  xs_expected, best, best / dx);
    assert_int_equal(nsaddle, 1);
    assert_true(best < dx);   /* within a cell */
    gw_divide_analysis_free(&a);
    gw_solution_free(&sol);
    gw_problem_free(p);
}

static void test_mound_maximum(void **state)
{
    (void)state;
    enum { N = 41 };
    const double dx = 10.0;
    gw_grid g = {.nx = N, .ny = N, .x0 = 500, .y0 = 200, .dx = dx, .dy = dx};
    gw_error err;
    gw_problem *p = gw_problem_new(&g, GW_CONFINED, &err);
    assert_non_null(p);
    int fe = gw_problem_add_feature(p, "Ditch", GW_FEAT_FIXED_HEAD, &err);
    for (int r = 0; r < N; r++)
        for (int c = 0; c < N; c++) {
            int i = r * N + c;
            p->k[i] = 5.0;
            p->thick[i] = 10.0;
            p->recharge[i] = 1e-3;
            if (r == 0 || c == 0 || r == N - 1 || c == N - 1) {
                p->fixed[i] = 10.0;
                p->fixed_feature[i] = fe;
            }
        }
    gw_solution sol = {0};
    gw_divide_analysis a;
    solve_analyse(p, &sol, &a);
    double xc = gw_grid_xc(&g, N / 2), yc = gw_grid_yc(&g, N / 2);
    for (int i = 0; i < a.nstagnation; i++)
        print_message("    stagnation point (%.6f, %.6f) head %.6f %s (centre %.1f, %.1f)\n",
                      a.stagnation[i].x, a.stagnation[i].y, a.stagnation[i].head,
                      gw_stag_type_name(a.stagnation[i].type), xc, yc);
    assert_int_equal(a.nstagnation, 1);
    assert_int_equal(a.stagnation[0].type, GW_STAGNATION_MAXIMUM);
    assert_true(hypot(a.stagnation[0].x - xc, a.stagnation[0].y - yc) < 1e-6 * dx);
    /* The head there is the highest cell head. */
    double hmax = -INFINITY;
    for (int i = 0; i < N * N; i++)
        hmax = fmax(hmax, sol.head[i]);
    assert_true(fabs(a.stagnation[0].head - hmax) < 1e-9 * hmax);
    assert_int_equal(a.divides.n, 0);   /* one feature: nothing to divide */
    gw_divide_analysis_free(&a);
    gw_solution_free(&sol);
    gw_problem_free(p);
}

/* Distance from (x, y) to polyline d. */
static double dist_to_line(const gw_divide *d, double x, double y)
{
    double best = INFINITY;
    for (int i = 0; i + 1 < d->npts; i++) {
        double ax = d->xy[2 * i], ay = d->xy[2 * i + 1];
        double bx = d->xy[2 * i + 2], by = d->xy[2 * i + 3];
        double vx = bx - ax, vy = by - ay, l2 = vx * vx + vy * vy;
        double t = l2 > 0 ? ((x - ax) * vx + (y - ay) * vy) / l2 : 0.0;
        t = fmin(1.0, fmax(0.0, t));
        best = fmin(best, hypot(ax + t * vx - x, ay + t * vy - y));
    }
    if (d->npts == 1)
        best = hypot(d->xy[0] - x, d->xy[1] - y);
    return best;
}

static double hash01(unsigned u)
{
    u ^= u >> 16; u *= 0x7feb352dU; u ^= u >> 15; u *= 0x846ca68bU; u ^= u >> 16;
    return (u & 0xffffff) / (double)0x1000000;
}

/* with_lake: a fixed-head lake along the north edge adds two divides
 * (brook|lake, mirror images of each other); without it the only divide
 * is brook|brook, on the axis. */
static void symmetric_case(int with_lake)
{
    enum { NX = 61, NY = 50 };
    const double dx = 20.0;
    gw_grid g = {.nx = NX, .ny = NY, .x0 = 0, .y0 = 0, .dx = dx, .dy = dx};
    double xm = 0.5 * NX * dx;
    gw_error err = {{0}};
    gw_problem *p = gw_problem_new(&g, GW_CONFINED, &err);
    assert_non_null(p);
    int fa = gw_problem_add_feature(p, "West brook", GW_FEAT_STREAM, &err);
    int fb = gw_problem_add_feature(p, "East brook", GW_FEAT_STREAM, &err);
    int fn = gw_problem_add_feature(p, "North lake", GW_FEAT_FIXED_HEAD, &err);
    for (int r = 0; r < NY; r++)
        for (int c = 0; c < NX; c++) {
            int i = r * NX + c, cm = c < NX - 1 - c ? c : NX - 1 - c;
            /* Heterogeneous, mirror-symmetric conductivity (factor 10 range). */
            p->k[i] = 2.0 * pow(10.0, hash01((unsigned)(r * 1000 + cm)));
            p->thick[i] = 20.0;
            p->recharge[i] = 5e-4;
            if (with_lake && r == 0) { p->fixed[i] = 19.0; p->fixed_feature[i] = fn; }
        }
    /* A curved brook in the west half, and its mirror image. */
    double line[2 * 40];
    for (int i = 0; i < 40; i++) {
        double y = 990.0 - 25.0 * i;
        line[2 * i] = 230.0 + 90.0 * sin(y / 160.0);
        line[2 * i + 1] = y;
    }
    gw_line_piece *pc = NULL;
    int npc = 0;
    assert_int_equal(gw_rasterize_line(&g, line, 40, &pc, &npc, &err), 0);
    assert_true(npc > 40);
    for (int i = 0; i < npc; i++) {
        int r = pc[i].cell / NX, c = pc[i].cell % NX;
        if (r == 0)
            continue;
        double stage = 20.0 + 1e-3 * pc[i].s_mid * 0.5;
        gw_link l = {.cell = pc[i].cell, .feature = fa, .kind = GW_LINK_STREAM,
                     .cond = 0.5 * pc[i].length, .ref = stage, .floor = 10.0};
        assert_int_equal(gw_problem_add_link(p, &l, &err), 0);
        l.cell = r * NX + (NX - 1 - c);
        l.feature = fb;
        assert_int_equal(gw_problem_add_link(p, &l, &err), 0);
    }
    free(pc);

    gw_solution sol = {0};
    gw_divide_analysis a;
    solve_analyse(p, &sol, &a);
    int nab = 0;
    double err_axis = 0.0, err_mirror = 0.0;
    for (int i = 0; i < a.divides.n; i++) {
        const gw_divide *d = &a.divides.d[i];
        print_message("    divide %d|%d: %d points, from (%.1f, %.1f) to (%.1f, %.1f)\n", d->a, d->b,
                      d->npts, d->xy[0], d->xy[1], d->xy[2 * d->npts - 2], d->xy[2 * d->npts - 1]);
        if (d->a == fa && d->b == fb) {
            nab++;
            for (int j = 0; j < d->npts; j++)
                err_axis = fmax(err_axis, fabs(d->xy[2 * j] - xm));
        }
        /* Every vertex's mirror image lies on a divide of the mirrored pair. */
        int ma = d->a == fa ? fb : d->a == fb ? fa : d->a;
        int mb = d->b == fa ? fb : d->b == fb ? fa : d->b;
        if (ma > mb) { int t = ma; ma = mb; mb = t; }
        for (int j = 0; j < d->npts; j++) {
            double best = INFINITY;
            for (int m = 0; m < a.divides.n; m++)
                if (a.divides.d[m].a == ma && a.divides.d[m].b == mb)
                    best = fmin(best, dist_to_line(&a.divides.d[m], 2 * xm - d->xy[2 * j], d->xy[2 * j + 1]));
            err_mirror = fmax(err_mirror, best);
        }
    }
    print_message("    symmetric model (%s lake): %d divides; west|east divide off the axis by %.2e m, "
                  "mirror mismatch %.2e m (%.2e cells)\n", with_lake ? "with" : "no", a.divides.n, err_axis, err_mirror, err_mirror / dx);
    if (with_lake)
        assert_true(a.divides.n >= 2);
    else
        assert_true(nab >= 1 && nab == a.divides.n);
    assert_true(err_axis < 1e-6 * dx);
    assert_true(err_mirror < 0.05 * dx);
    gw_divide_analysis_free(&a);
    gw_solution_free(&sol);
    gw_problem_free(p);
}

static void test_symmetric_divides(void **state)
{
    (void)state;
    symmetric_case(0);
    symmetric_case(1);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_well_saddle),
        cmocka_unit_test(test_mound_maximum),
        cmocka_unit_test(test_symmetric_divides),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
