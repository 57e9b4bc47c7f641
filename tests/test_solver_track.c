/* Particle tracking (Pollock 1988/1989 semi-analytical method).
 *
 *  - Travel time along the upgradient axis of a well in uniform flow:
 *    t(x) = (n/q) (x - a ln(1 + x/a)), a = Q / (2 pi B q), x the distance
 *    upgradient (integrating dt = n dx / (q + Q/(2 pi B x)), the axis
 *    velocity of the Javandel and Tsang (1986) complex potential).
 *  - Backward tracking retraces forward tracking.
 *  - Travel times do not depend on how the path is cut into pieces, and a
 *    fine Runge-Kutta integration of the same interpolated velocity field
 *    converges to Pollock's closed form (it has no step size).
 *  - Every way a path can end is reported, and weak sinks are reported
 *    with the share of water they take.
 *  - The compact per-cell table (gw_track_cells) gives the same paths, bit
 *    for bit, as tracking straight from the flow field.
 *
 * The well-in-uniform-flow problem is built with the analytic head on a ring
 * of fixed-head cells around the grid, so the boundary is exact and the test
 * measures the interior scheme and the tracking. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <cmocka.h>

#include "solver/track.h"
#include "fixture_wellfield.h"

static const double QREG = 0.01;              /* regional Darcy flux, m/d, eastward */
static const double QW = 50.0;                /* pumping, m3/d */

/* Uniform eastward flow qreg plus, when qw is not 0, one well at the origin
 * in the centre of a cell: west and east columns, 2 hh + 1 rows. */
static void build_jt(model *m, int west, int east, int hh, double qreg, double qw)
{
    field fd = {.qreg = qreg, .qw = qw, .nw = qw != 0.0};
    build(m, &fd, west, east, hh, hh);
}

static double t_axis(double x, double a)
{
    return POR / QREG * (x - a * log1p(x / a));
}

static void test_axis_travel_time(void **state)
{
    (void)state;
    model m;
    build_jt(&m, 160, 60, 50, QREG, QW);
    const double a = QW / (2.0 * PI * B * QREG);
    gw_track_options o;
    gw_track_options_default(&o);
    gw_error err = {{0}};
    /* The path stops on entering the well cell, at x = dx/2. */
    const double xs[] = {50, 100, 200, 400, 800, 1200};
    for (size_t i = 0; i < sizeof xs / sizeof xs[0]; i++) {
        gw_track_result r = {0};
        assert_int_equal(gw_track(&m.ff, -xs[i], 0.0, &o, &r, &err), 0);
        double t_an = t_axis(xs[i], a) - t_axis(0.5 * DX, a);
        print_message("    x = %6.0f m upgradient: t = %10.2f d, analytic %10.2f d, rel %.2e (%s, well fraction %.3f)\n",
                      xs[i], r.time, t_an, (r.time - t_an) / t_an, gw_track_end_name(r.end),
                      r.end_fraction);
        assert_int_equal(r.end, GW_END_SINK);
        assert_int_equal(r.cell, m.p->wells[0].cell);
        assert_true(r.feature == m.p->wells[0].feature);
        /* Closed form from the Javandel and Tsang (1986) potential: 2 %. */
        if (xs[i] >= 100.0) assert_true(fabs(r.time - t_an) < 0.02 * t_an);
    }
    drop(&m);
}

static void test_uniform_flow_exact(void **state)
{
    (void)state;
    /* No well: the flow is uniform, so time = n L / q exactly (Darcy). */
    model m;
    build_jt(&m, 40, 40, 10, QREG, 0.0);
    gw_track_options o;
    gw_track_options_default(&o);
    o.max_time = 10000.0;
    gw_track_result r = {0};
    gw_error err = {{0}};
    assert_int_equal(gw_track(&m.ff, -301.3, 17.0, &o, &r, &err), 0);
    assert_int_equal(r.end, GW_END_TIME);
    double dist = QREG / POR * o.max_time;
    print_message("    uniform flow: moved %.6f m in %.0f d, expected %.6f m\n", r.x + 301.3,
                  o.max_time, dist);
    assert_true(fabs(r.x + 301.3 - dist) < 1e-6 * dist);
    assert_true(fabs(r.y - 17.0) < 1e-6);
    drop(&m);
}

static void test_backward_retraces_forward(void **state)
{
    (void)state;
    model m;
    build_jt(&m, 160, 60, 50, QREG, QW);
    gw_error err = {{0}};
    gw_track_options o;
    gw_track_options_default(&o);
    const double starts[][2] = {{-900.0, 60.0}, {-300.0, -110.0}, {-150.0, 173.0}, {40.0, 70.0}};
    for (size_t i = 0; i < 4; i++) {
        gw_track_result full = {0}, fw = {0}, bw = {0};
        assert_int_equal(gw_track(&m.ff, starts[i][0], starts[i][1], &o, &full, &err), 0);
        /* Forward for part of the time, then backward for the same time. */
        gw_track_options of = o, ob = o;
        of.max_time = full.end == GW_END_SINK ? 0.7 * full.time : 5000.0;
        assert_int_equal(gw_track(&m.ff, starts[i][0], starts[i][1], &of, &fw, &err), 0);
        assert_int_equal(fw.end, GW_END_TIME);
        ob.backward = 1;
        ob.max_time = of.max_time;
        assert_int_equal(gw_track(&m.ff, fw.x, fw.y, &ob, &bw, &err), 0);
        double miss = hypot(bw.x - starts[i][0], bw.y - starts[i][1]);
        print_message("    start (%.0f, %.0f): forward %.1f d to (%.2f, %.2f), back to within %.2e m\n",
                      starts[i][0], starts[i][1], of.max_time, fw.x, fw.y, miss);
        assert_int_equal(bw.end, GW_END_TIME);
        assert_true(miss < 1e-6 * DX);
    }
    /* Backward from the well cell's west face reaches the west boundary,
     * and forward from there returns to the well in the same time. */
    gw_track_options ob = o;
    ob.backward = 1;
    gw_track_result bw = {0}, fw = {0};
    assert_int_equal(gw_track(&m.ff, -0.5 * DX - 1e-9, 2.0, &ob, &bw, &err), 0);
    assert_int_equal(gw_track(&m.ff, bw.x, bw.y, &o, &fw, &err), 0);
    print_message("    backward from the well: %s after %.1f d at (%.1f, %.1f); forward back: %s after %.1f d\n",
                  gw_track_end_name(bw.end), bw.time, bw.x, bw.y, gw_track_end_name(fw.end), fw.time);
    assert_int_equal(fw.end, GW_END_SINK);
    assert_true(fabs(fw.time - bw.time) < 1e-6 * bw.time);
    drop(&m);
}

static void test_step_independence(void **state)
{
    (void)state;
    model m;
    build_jt(&m, 160, 60, 50, QREG, QW);
    gw_error err = {{0}};
    gw_track_options o;
    gw_track_options_default(&o);
    const double x0 = -700.0, y0 = 95.0;
    gw_track_result one = {0};
    assert_int_equal(gw_track(&m.ff, x0, y0, &o, &one, &err), 0);
    assert_int_equal(one.end, GW_END_SINK);
    const double T = 0.7 * one.time;
    o.max_time = T;
    assert_int_equal(gw_track(&m.ff, x0, y0, &o, &one, &err), 0);
    assert_int_equal(one.end, GW_END_TIME);
    /* The same time in 1000 pieces lands on the same point. */
    double x = x0, y = y0;
    o.max_time = T / 1000.0;
    for (int i = 0; i < 1000; i++) {
        gw_track_result r = {0};
        assert_int_equal(gw_track(&m.ff, x, y, &o, &r, &err), 0);
        x = r.x;
        y = r.y;
    }
    double d_pieces = hypot(x - one.x, y - one.y);
    /* Classical RK4 on the same interpolated velocity: converges to Pollock. */
    double prev = HUGE_VAL;
    for (int n = 200; n <= 20000; n *= 10) {
        double h = T / n, px = x0, py = y0;
        for (int i = 0; i < n; i++) {
            double k1x, k1y, k2x, k2y, k3x, k3y, k4x, k4y;
            gw_track_velocity(&m.ff, px, py, &k1x, &k1y);
            gw_track_velocity(&m.ff, px + 0.5 * h * k1x, py + 0.5 * h * k1y, &k2x, &k2y);
            gw_track_velocity(&m.ff, px + 0.5 * h * k2x, py + 0.5 * h * k2y, &k3x, &k3y);
            gw_track_velocity(&m.ff, px + h * k3x, py + h * k3y, &k4x, &k4y);
            px += h / 6.0 * (k1x + 2 * k2x + 2 * k3x + k4x);
            py += h / 6.0 * (k1y + 2 * k2y + 2 * k3y + k4y);
        }
        double d = hypot(px - one.x, py - one.y);
        print_message("    RK4 with %5d steps ends %.3e m from Pollock's point\n", n, d);
        assert_true(d < prev);
        prev = d;
    }
    print_message("    1000 pieces end %.3e m from one piece (path length %.1f m)\n", d_pieces,
                  one.length);
    assert_true(d_pieces < 1e-6 * DX);
    assert_true(prev < 1e-3 * DX);
    drop(&m);
}

static void test_end_reasons(void **state)
{
    (void)state;
    /* Strip 30 x 5 cells: fixed heads at both ends, uniform recharge, so a
     * divide runs down the middle column; one inactive cell; one weak
     * drain-like stream cell. */
    gw_grid g = {.nx = 31, .ny = 5, .x0 = 0, .y0 = 0, .dx = DX, .dy = DX};
    gw_error err = {{0}};
    gw_problem *p = gw_problem_new(&g, GW_CONFINED, &err);
    assert_non_null(p);
    int fa = gw_problem_add_feature(p, "West ditch", GW_FEAT_FIXED_HEAD, &err);
    int fbk = gw_problem_add_feature(p, "East ditch", GW_FEAT_FIXED_HEAD, &err);
    for (int r = 0; r < g.ny; r++)
        for (int c = 0; c < g.nx; c++) {
            int k = r * g.nx + c;
            p->k[k] = K;
            p->thick[k] = B;
            p->recharge[k] = 0.001;
            if (c == 0) { p->fixed[k] = 50.0; p->fixed_feature[k] = fa; }
            if (c == g.nx - 1) { p->fixed[k] = 50.0; p->fixed_feature[k] = fbk; }
        }
    p->active[0 * g.nx + 5] = 0;
    gw_solution sol = {0};
    gw_flowfield ff = {0};
    if (gw_solve(p, NULL, &sol, &err) != 0) fail_msg("solve: %s", err.msg);
    if (gw_flowfield_compute(p, &sol, &ff, &err) != 0) fail_msg("flow field: %s", err.msg);
    gw_track_options o;
    gw_track_options_default(&o);
    gw_track_result r = {0};
    const double yc = gw_grid_yc(&g, 2), xmid = gw_grid_xc(&g, 15);

    assert_int_equal(gw_track(&ff, -5.0, yc, &o, &r, &err), 0);
    assert_int_equal(r.end, GW_END_BOUNDARY);
    assert_int_equal(gw_track(&ff, gw_grid_xc(&g, 5), gw_grid_yc(&g, 0), &o, &r, &err), 0);
    assert_int_equal(r.end, GW_END_INACTIVE);
    /* Near the divide the path runs slowly to the nearer ditch. */
    assert_int_equal(gw_track(&ff, xmid + 2.0, yc, &o, &r, &err), 0);
    print_message("    from 2 m east of the divide: %s (feature %d) after %.0f d\n",
                  gw_track_end_name(r.end), r.feature, r.time);
    assert_int_equal(r.end, GW_END_SINK);
    assert_int_equal(r.feature, fbk);
    /* Backward from a ditch cell: ends where the water came from -- the
     * recharge of the cells at the divide. */
    o.backward = 1;
    assert_int_equal(gw_track(&ff, gw_grid_xc(&g, 3), yc + 1.0, &o, &r, &err), 0);
    print_message("    backward from near the west ditch: %s at x = %.2f after %.0f d\n",
                  gw_track_end_name(r.end), r.x, r.time);
    assert_true(r.end == GW_END_SINK || r.end == GW_END_STAGNATION);
    o.backward = 0;
    assert_int_equal(gw_track(&ff, gw_grid_xc(&g, 12), yc, &o, &r, &err), 0);
    assert_int_equal(r.end, GW_END_SINK);
    assert_int_equal(r.feature, fa);
    o.max_steps = 3;
    assert_int_equal(gw_track(&ff, gw_grid_xc(&g, 12), yc, &o, &r, &err), 0);
    assert_int_equal(r.end, GW_END_MAX_STEPS);
    assert_int_equal(r.steps, 3);
    o.max_steps = 0;
    o.max_time = 1.0;
    assert_int_equal(gw_track(&ff, gw_grid_xc(&g, 12), yc, &o, &r, &err), 0);
    assert_int_equal(r.end, GW_END_TIME);
    o.max_time = 0.0;
    /* Record the path: vertices start at the seed and end at the end. */
    o.record_path = 1;
    assert_int_equal(gw_track(&ff, gw_grid_xc(&g, 12), yc, &o, &r, &err), 0);
    assert_true(r.npath >= 2);
    assert_true(fabs(r.px[0] - gw_grid_xc(&g, 12)) < 1e-12);
    assert_true(fabs(r.px[r.npath - 1] - r.x) < 1e-12);
    gw_track_result_free(&r);
    o.record_path = 0;
    for (int e = GW_END_NONE; e <= GW_END_MAX_STEPS; e++)
        assert_non_null(gw_track_end_name((gw_track_end)e));
    /* Without recharge the water stands still: stagnation. */
    gw_flowfield_free(&ff);
    for (size_t k = 0; k < gw_grid_ncells(&g); k++)
        p->recharge[k] = 0.0;
    if (gw_solve(p, NULL, &sol, &err) != 0) fail_msg("solve: %s", err.msg);
    if (gw_flowfield_compute(p, &sol, &ff, &err) != 0) fail_msg("flow field: %s", err.msg);
    assert_int_equal(gw_track(&ff, xmid, yc, &o, &r, &err), 0);
    assert_int_equal(r.end, GW_END_STAGNATION);
    gw_flowfield_free(&ff);
    gw_solution_free(&sol);
    gw_problem_free(p);
}

static void test_weak_sink(void **state)
{
    (void)state;
    /* Uniform eastward flow through a strip; a drain in the middle cell of
     * the middle row takes only part of the water passing through it. */
    gw_grid g = {.nx = 41, .ny = 5, .x0 = 0, .y0 = 0, .dx = DX, .dy = DX};
    gw_error err = {{0}};
    gw_problem *p = gw_problem_new(&g, GW_CONFINED, &err);
    int fw = gw_problem_add_feature(p, "West", GW_FEAT_FIXED_HEAD, &err);
    int fe = gw_problem_add_feature(p, "East", GW_FEAT_FIXED_HEAD, &err);
    int fd = gw_problem_add_feature(p, "Tile drain", GW_FEAT_DRAIN, &err);
    for (int r = 0; r < g.ny; r++)
        for (int c = 0; c < g.nx; c++) {
            int k = r * g.nx + c;
            p->k[k] = K;
            p->thick[k] = B;
            if (c == 0) { p->fixed[k] = 52.0; p->fixed_feature[k] = fw; }
            if (c == g.nx - 1) { p->fixed[k] = 48.0; p->fixed_feature[k] = fe; }
        }
    int dcell = 2 * g.nx + 20;
    gw_link l = {.cell = dcell, .feature = fd, .kind = GW_LINK_DRAIN, .cond = 0.5, .ref = 49.0};
    assert_int_equal(gw_problem_add_link(p, &l, &err), 0);
    gw_solution sol = {0};
    gw_flowfield ff = {0};
    if (gw_solve(p, NULL, &sol, &err) != 0) fail_msg("solve: %s", err.msg);
    if (gw_flowfield_compute(p, &sol, &ff, &err) != 0) fail_msg("flow field: %s", err.msg);
    /* Share of the cell's throughput the drain takes, from the budget law. */
    double take = -gw_link_flux(&l, sol.head[dcell]);
    double thru = take + ff.qe[dcell];
    if (ff.qs[dcell] > 0) thru += ff.qs[dcell];
    if (ff.qs[dcell - g.nx] < 0) thru -= ff.qs[dcell - g.nx];
    double frac = take / thru;
    gw_track_options o;
    gw_track_options_default(&o);
    gw_track_result r = {0};
    const double y = gw_grid_yc(&g, 2);
    o.weak = GW_WEAK_STOP;
    assert_int_equal(gw_track(&ff, 55.0, y, &o, &r, &err), 0);
    print_message("    drain takes %.4f of the water through its cell; stop rule: %s, fraction %.4f\n",
                  frac, gw_track_end_name(r.end), r.end_fraction);
    assert_true(frac > 0.01 && frac < 0.99);
    assert_int_equal(r.end, GW_END_SINK);
    assert_int_equal(r.feature, fd);
    assert_true(fabs(r.end_fraction - frac) < 1e-9);
    o.weak = GW_WEAK_PASS;
    assert_int_equal(gw_track(&ff, 55.0, y, &o, &r, &err), 0);
    print_message("    pass rule: %s (feature %d), passed %d weak sink(s), retained %.4f\n",
                  gw_track_end_name(r.end), r.feature, r.weak_passed, r.retained);
    assert_int_equal(r.end, GW_END_SINK);
    assert_int_equal(r.feature, fe);
    assert_int_equal(r.weak_passed, 1);
    assert_true(fabs(r.retained - (1.0 - frac)) < 1e-9);
    /* Threshold rule: stops only when the share reaches the threshold. */
    o.weak = GW_WEAK_THRESHOLD;
    o.weak_threshold = frac * 0.99;
    assert_int_equal(gw_track(&ff, 55.0, y, &o, &r, &err), 0);
    assert_int_equal(r.feature, fd);
    o.weak_threshold = frac * 1.01;
    assert_int_equal(gw_track(&ff, 55.0, y, &o, &r, &err), 0);
    assert_int_equal(r.feature, fe);
    gw_flowfield_free(&ff);
    gw_solution_free(&sol);
    gw_problem_free(p);
}

/* Track from (x, y) with and without a per-cell table prepared for o; the
 * results must agree bit for bit.  Returns the end reason. */
static gw_track_end same_with_table(const gw_flowfield *ff, double x, double y,
                                    const gw_track_options *o, const gw_track_cells *t)
{
    gw_error err = {{0}};
    gw_track_options ot = *o;
    ot.cells = t;
    gw_track_result a = {0}, b = {0};
    assert_int_equal(gw_track(ff, x, y, o, &a, &err), 0);
    assert_int_equal(gw_track(ff, x, y, &ot, &b, &err), 0);
    assert_int_equal(a.end, b.end);
    assert_int_equal(a.cell, b.cell);
    assert_int_equal(a.feature, b.feature);
    assert_int_equal(a.steps, b.steps);
    assert_int_equal(a.weak_passed, b.weak_passed);
    assert_true(a.x == b.x && a.y == b.y && a.time == b.time && a.length == b.length);
    assert_true(a.end_fraction == b.end_fraction && a.retained == b.retained);
    return a.end;
}

static void test_cell_table_same_paths(void **state)
{
    (void)state;
    gw_error err = {{0}};
    /* Well in uniform flow: forward and backward, with and without a time
     * limit, from a lattice of starts around the well. */
    model m;
    build_jt(&m, 60, 30, 25, QREG, QW);
    int ends[GW_END_MAX_STEPS + 1] = {0};
    for (int back = 0; back < 2; back++) {
        gw_track_options o;
        gw_track_options_default(&o);
        o.backward = back;
        gw_track_cells *t = gw_track_cells_new(&m.ff, &o, &err);
        assert_non_null(t);
        for (double x = -580.0; x < 280.0; x += 37.3)
            for (double y = -230.0; y < 240.0; y += 41.9) {
                o.max_time = 0.0;
                ends[same_with_table(&m.ff, x, y, &o, t)]++;
                o.max_time = 2000.0;
                ends[same_with_table(&m.ff, x, y, &o, t)]++;
            }
        gw_track_cells_free(t);
    }
    print_message("    well field: %d paths ending in a sink or source, %d time-limited, "
                  "identical with the table\n", ends[GW_END_SINK], ends[GW_END_TIME]);
    assert_true(ends[GW_END_SINK] > 0 && ends[GW_END_TIME] > 0);
    drop(&m);
    /* A weak drain under each weak-sink rule; a table made for other
     * options is not used (the path is still the same). */
    gw_grid g = {.nx = 41, .ny = 5, .x0 = 0, .y0 = 0, .dx = DX, .dy = DX};
    gw_problem *p = gw_problem_new(&g, GW_CONFINED, &err);
    assert_non_null(p);
    int fw = gw_problem_add_feature(p, "West", GW_FEAT_FIXED_HEAD, &err);
    int fe = gw_problem_add_feature(p, "East", GW_FEAT_FIXED_HEAD, &err);
    int fd = gw_problem_add_feature(p, "Tile drain", GW_FEAT_DRAIN, &err);
    for (int r = 0; r < g.ny; r++)
        for (int c = 0; c < g.nx; c++) {
            int k = r * g.nx + c;
            p->k[k] = K;
            p->thick[k] = B;
            p->recharge[k] = 0.0005;
            if (c == 0) { p->fixed[k] = 52.0; p->fixed_feature[k] = fw; }
            if (c == g.nx - 1) { p->fixed[k] = 48.0; p->fixed_feature[k] = fe; }
        }
    gw_link l = {.cell = 2 * g.nx + 20, .feature = fd, .kind = GW_LINK_DRAIN, .cond = 0.5, .ref = 49.0};
    assert_int_equal(gw_problem_add_link(p, &l, &err), 0);
    gw_solution sol = {0};
    gw_flowfield ff = {0};
    if (gw_solve(p, NULL, &sol, &err) != 0) fail_msg("solve: %s", err.msg);
    if (gw_flowfield_compute(p, &sol, &ff, &err) != 0) fail_msg("flow field: %s", err.msg);
    const gw_weak_rule rules[3] = {GW_WEAK_STOP, GW_WEAK_PASS, GW_WEAK_THRESHOLD};
    int passed = 0;
    for (int i = 0; i < 3; i++) {
        gw_track_options o;
        gw_track_options_default(&o);
        o.weak = rules[i];
        gw_track_cells *t = gw_track_cells_new(&ff, &o, &err);
        gw_track_options other = o;
        other.weak = rules[(i + 1) % 3];
        for (double y = 1.0; y < 50.0; y += 2.0) {
            same_with_table(&ff, 55.0, y, &o, t);
            same_with_table(&ff, 55.0, y, &other, t);
            gw_track_result r = {0};
            gw_track_options ot = o;
            ot.cells = t;
            assert_int_equal(gw_track(&ff, 55.0, y, &ot, &r, &err), 0);
            passed += r.weak_passed;
        }
        gw_track_cells_free(t);
    }
    assert_true(passed > 0);
    gw_flowfield_free(&ff);
    gw_solution_free(&sol);
    gw_problem_free(p);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_uniform_flow_exact),
        cmocka_unit_test(test_axis_travel_time),
        cmocka_unit_test(test_backward_retraces_forward),
        cmocka_unit_test(test_step_independence),
        cmocka_unit_test(test_end_reasons),
        cmocka_unit_test(test_weak_sink),
        cmocka_unit_test(test_cell_table_same_paths),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
