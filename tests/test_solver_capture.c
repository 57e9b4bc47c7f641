/* Capture zones, travel-time zones and the source split of pumping wells.
 *
 *  - One well in uniform flow (Javandel and Tsang 1986): the capture-zone
 *    boundary y = (Q / 2Bq)(1 - phi/pi), phi = atan2(y, -x) (x measured
 *    downstream from the well); so width Q/(Bq) far upgradient, Q/(2Bq)
 *    across the well, stagnation point Q/(2 pi B q) downgradient.
 *  - The travel-time zone along the upgradient axis of the same well:
 *    t = (n/q)(x - a ln(1 + x/a)), a = Q/(2 pi B q).
 *  - A well with no regional flow: the t zone is a circle of radius
 *    sqrt(Q t / (pi n B)) (volume balance).
 *  - A well fed only by recharge R: capture area = Q / R (volume balance:
 *    no water crosses the zone boundary, which is made of path lines).
 *  - A well beside a fully penetrating stream with ambient flow q towards
 *    the stream (method of images): the stream gives the well
 *    Q (2/pi)(atan(sqrt(rho - 1)) - sqrt(rho - 1)/rho), rho = Q/(pi q B d),
 *    when rho > 1 (integrating the image-well inflow along the stream; the
 *    same result as Wilson 1993, from memory).
 *
 *  - Tracking runs on several threads; the zones must be the same, bit
 *    for bit, for 1, 2 and 3 threads, and the same whether or not paths
 *    stop between known paths of the same fate.
 *
 * The heads on a ring of fixed-head cells around each grid are the
 * analytic ones, so the boundary is exact and the tests measure the
 * interior scheme, the tracking and the zone tracing. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <cmocka.h>

#include "solver/capture.h"
#include "solver/catchment.h"
#include "fixture_wellfield.h"

/* Extent of the ring's crossings with the vertical line x = X. */
static double width_at(const gw_capring *rg, double X)
{
    double lo = HUGE_VAL, hi = -HUGE_VAL;
    for (int i = 0; i < rg->n; i++) {
        int j = (i + 1) % rg->n;
        double a = rg->x[i] - X, b = rg->x[j] - X;
        if ((a < 0) == (b < 0))
            continue;
        double y = rg->y[i] + (rg->y[j] - rg->y[i]) * a / (a - b);
        if (y < lo) lo = y;
        if (y > hi) hi = y;
    }
    return hi > lo ? hi - lo : 0.0;
}

/* Exact half-width of the Javandel and Tsang zone at distance X upstream. */
static double jt_half_width(double X, double Y)
{
    double y = Y;
    for (int i = 0; i < 200; i++)
        y = Y * (1.0 - atan2(y, X) / PI);
    return y;
}

static double t_axis(double x, double a, double q)
{
    return POR / q * (x - a * log1p(x / a));
}

static void test_uniform_flow_well(void **state)
{
    (void)state;
    const double q = 0.01, Q = 50.0;
    field fd = {.qreg = q, .qw = Q, .nw = 1};
    model m;
    build(&m, &fd, 260, 60, 70, 70);
    const double Y = Q / (2.0 * B * q), a = Q / (2.0 * PI * B * q);
    /* Travel time whose zone reaches 600 m up the axis. */
    const double T = t_axis(600.0, a, q) - t_axis(0.5 * DX, a, q);
    gw_capture_options o;
    gw_capture_options_default(&o);
    o.times = &T;
    o.ntimes = 1;
    gw_capture c = {0};
    gw_error err = {{0}};
    if (gw_capture_compute(m.p, &m.ff, &o, &c, &err) != 0) fail_msg("capture: %s", err.msg);
    assert_int_equal(c.nzone, 1);
    gw_capture_zone *z = &c.zone[0];
    assert_true(z->capture.outer >= 0);
    const gw_capring *rg = &z->capture.ring[z->capture.outer];
    print_message("    %ld seeds tracked, %ld decided without a path, %d rings, outer ring %d vertices, "
                  "area %.0f m2, well cell share %.3f\n", z->seeds, z->classified, z->capture.nring,
                  rg->n, z->capture.area, z->well_cell_share);
    /* Only seeds near the boundary are tracked (capture.h). */
    assert_true(z->seeds < z->classified);
    /* Width across the well: Q/(2Bq) (Javandel and Tsang 1986), 3 %. */
    double w0 = width_at(rg, 0.0);
    print_message("    width at the well %.2f m, analytic Q/(2Bq) = %.2f m\n", w0, Y);
    assert_true(fabs(w0 - Y) < 0.03 * Y);
    /* Stagnation point a = Q/(2 pi B q) downgradient, 3 %. */
    double xmax = -HUGE_VAL;
    for (int i = 0; i < rg->n; i++)
        if (rg->x[i] > xmax) xmax = rg->x[i];
    print_message("    stagnation point at x = %.2f m, analytic %.2f m\n", xmax, a);
    assert_true(fabs(xmax - a) < 0.03 * a);
    /* Upgradient widths on the exact boundary curve (2 %), approaching
     * Q/(Bq) far upgradient (Javandel and Tsang 1986). */
    const double st[] = {250.0, 500.0, 1000.0, 2000.0};
    for (int i = 0; i < 4; i++) {
        double w = width_at(rg, -st[i]), wa = 2.0 * jt_half_width(st[i], Y);
        print_message("    width %5.0f m upgradient %.2f m, exact curve %.2f m, Q/(Bq) = %.0f m\n",
                      st[i], w, wa, 2.0 * Y);
        assert_true(fabs(w - wa) < 0.02 * wa);
    }
    assert_true(fabs(width_at(rg, -2500.0) - 2.0 * Y) < 0.05 * 2.0 * Y);
    /* Source split: all of the well's water comes through the far field. */
    print_message("    sources: far field %.6f, recharge %.3g; pumping %.6f\n",
                  z->source[m.f_ring], z->source[0], Q);
    assert_true(fabs(z->source[m.f_ring] - Q) < 1e-6 * Q);
    /* Travel-time zone: reaches 600 m up the axis (closed form above). */
    assert_int_equal(z->nttz, 1);
    const gw_capzone *tz = &z->ttz[0];
    assert_true(tz->outer >= 0);
    double xmin = HUGE_VAL;
    for (int i = 0; i < tz->ring[tz->outer].n; i++)
        if (tz->ring[tz->outer].x[i] < xmin) xmin = tz->ring[tz->outer].x[i];
    print_message("    %.0f d zone reaches %.2f m upgradient, analytic 600 m; area %.0f m2\n", T,
                  -xmin, tz->area);
    assert_true(fabs(-xmin - 600.0) < 0.02 * 600.0);
    assert_true(tz->area < z->capture.area);
    gw_capture_free(&c);
    drop(&m);
}

static void test_radial_time_zones(void **state)
{
    (void)state;
    const double Q = 50.0;
    field fd = {.qreg = 0.0, .qw = Q, .nw = 1};
    model m;
    build(&m, &fd, 30, 30, 30, 30);
    const double times[] = {3534.0, 1000.0};
    gw_capture_options o;
    gw_capture_options_default(&o);
    o.times = times;
    o.ntimes = 2;
    gw_capture c = {0};
    gw_error err = {{0}};
    if (gw_capture_compute(m.p, &m.ff, &o, &c, &err) != 0) fail_msg("capture: %s", err.msg);
    assert_int_equal(c.nzone, 1);
    gw_capture_zone *z = &c.zone[0];
    assert_int_equal(z->nttz, 2);
    for (int i = 0; i < 2; i++) {
        const gw_capzone *tz = &z->ttz[i];
        double r = sqrt(Q * tz->time / (PI * POR * B));
        const gw_capring *rg = &tz->ring[tz->outer];
        double rmin = HUGE_VAL, rmax = 0.0;
        for (int j = 0; j < rg->n; j++) {
            double rr = hypot(rg->x[j], rg->y[j]);
            if (rr < rmin) rmin = rr;
            if (rr > rmax) rmax = rr;
        }
        print_message("    t = %5.0f d: area %.0f m2, circle %.0f m2 (r = %.1f m); radii %.1f..%.1f m\n",
                      tz->time, tz->area, PI * r * r, r, rmin, rmax);
        /* Volume balance: pi r^2 n B = Q t; area within 2 %, radius 3 %. */
        assert_true(fabs(tz->area - PI * r * r) < 0.02 * PI * r * r);
        assert_true(rmin > 0.97 * r && rmax < 1.03 * r);
    }
    /* Zones are sorted by time. */
    assert_true(z->ttz[0].time < z->ttz[1].time);
    gw_capture_free(&c);
    drop(&m);
}

/* Share of the well's water induced from the stream (method of images). */
static double induced_share(double rho)
{
    double s = sqrt(rho - 1.0);
    return 2.0 / PI * (atan(s) - s / rho);
}

static void test_well_near_stream(void **state)
{
    (void)state;
    const double q = 0.01, d = 200.0;
    const double rhos[] = {2.0, 4.0};
    for (int i = 0; i < 2; i++) {
        double Q = rhos[i] * PI * q * B * d;
        /* Ambient flow towards the stream at x = 0 (westward). */
        field fd = {.qreg = -q, .qw = Q, .nw = 1, .wx = {d}, .wy = {0.0}, .stream_d = d};
        model m;
        build(&m, &fd, 0, 100, 80, 80);
        gw_capture c = {0};
        gw_error err = {{0}};
        if (gw_capture_compute(m.p, &m.ff, NULL, &c, &err) != 0) fail_msg("capture: %s", err.msg);
        assert_int_equal(c.nzone, 1);
        gw_capture_zone *z = &c.zone[0];
        double share = z->source[m.f_stream] / z->rate, an = induced_share(rhos[i]);
        double sum = 0.0;
        for (int f = 0; f < c.nfeatures; f++)
            sum += z->source[f];
        print_message("    rho = %.0f: stream gives %.4f of the well's water, analytic %.4f; "
                      "sources add to %.6f of the pumping; zone area %.0f m2\n",
                      rhos[i], share, an, sum / z->rate, z->capture.area);
        /* Image-well result (above): within 3 % of the pumping... */
        assert_true(fabs(share - an) < 0.03);
        /* ...and the split accounts for all the water (to round-off). */
        assert_true(fabs(sum - z->rate) < 1e-9 * z->rate);
        gw_capture_free(&c);
        drop(&m);
    }
}

static void test_recharge_fed_well(void **state)
{
    (void)state;
    /* 100 x 60 cells, a creek (fixed head) along the east edge, no-flow
     * elsewhere, uniform recharge. */
    gw_grid g = {.nx = 100, .ny = 60, .x0 = 0, .y0 = 0, .dx = DX, .dy = DX};
    gw_error err = {{0}};
    gw_problem *p = gw_problem_new(&g, GW_CONFINED, &err);
    int fc = gw_problem_add_feature(p, "Creek", GW_FEAT_FIXED_HEAD, &err);
    int fw = gw_problem_add_feature(p, "Supply well", GW_FEAT_WELL, &err);
    const double R = 0.001, Q = 100.0;
    for (size_t k = 0; k < gw_grid_ncells(&g); k++) {
        p->k[k] = K;
        p->thick[k] = B;
        p->porosity[k] = POR;
        p->recharge[k] = R;
        if ((int)(k % g.nx) == g.nx - 1) { p->fixed[k] = 20.0; p->fixed_feature[k] = fc; }
    }
    gw_well w = {.cell = 30 * g.nx + 30, .feature = fw, .rate = Q, .x = 305.0, .y = 295.0};
    assert_int_equal(gw_problem_add_well(p, &w, &err), 0);
    gw_solution sol = {0};
    gw_flowfield ff = {0};
    if (gw_solve(p, NULL, &sol, &err) != 0) fail_msg("solve: %s", err.msg);
    if (gw_flowfield_compute(p, &sol, &ff, &err) != 0) fail_msg("flow field: %s", err.msg);
    gw_capture c = {0};
    if (gw_capture_compute(p, &ff, NULL, &c, &err) != 0) fail_msg("capture: %s", err.msg);
    assert_int_equal(c.nzone, 1);
    gw_capture_zone *z = &c.zone[0];
    print_message("    capture area %.0f m2, Q/R = %.0f m2; recharge gives %.6f of the pumping; "
                  "%d ring(s)\n", z->capture.area, Q / R, z->source[0] / Q, z->capture.nring);
    /* Volume balance: R A = Q, within 2 %. */
    assert_true(fabs(z->capture.area - Q / R) < 0.02 * Q / R);
    assert_true(fabs(z->source[0] - Q) < 1e-9 * Q);
    assert_true(fabs(z->source[fc]) < 1e-9 * Q);
    /* The share map is 1 in the well cell and falls to 0 far away. */
    double *wsh = malloc(gw_grid_ncells(&g) * sizeof *wsh);
    assert_non_null(wsh);
    assert_int_equal(gw_catchment_share(p, &ff, fw, wsh, &err), 0);
    double tot = 0.0;
    for (size_t k = 0; k < gw_grid_ncells(&g); k++)
        tot += wsh[k] * R * g.dx * g.dy;
    print_message("    share map: well cell %.3f, recharge-weighted total %.4f of Q\n", wsh[w.cell],
                  tot / Q);
    assert_true(wsh[w.cell] == 1.0);
    assert_true(fabs(tot - Q) < 1e-9 * Q);
    free(wsh);
    gw_capture_free(&c);
    gw_flowfield_free(&ff);
    gw_solution_free(&sol);
    gw_problem_free(p);
}

static void test_two_wells(void **state)
{
    (void)state;
    /* Two equal wells across the ambient flow share it symmetrically, and
     * far upgradient they take a strip of total width 2Q/(Bq) (continuity). */
    const double q = 0.01, Q = 30.0;
    field fd = {.qreg = q, .qw = Q, .nw = 2, .wx = {0.0, 0.0}, .wy = {-100.0, 100.0}};
    model m;
    build(&m, &fd, 260, 60, 80, 80);
    gw_capture c = {0};
    gw_error err = {{0}};
    if (gw_capture_compute(m.p, &m.ff, NULL, &c, &err) != 0) fail_msg("capture: %s", err.msg);
    assert_int_equal(c.nzone, 2);
    double wsum = 0.0;
    for (int i = 0; i < 2; i++) {
        const gw_capzone *zz = &c.zone[i].capture;
        wsum += width_at(&zz->ring[zz->outer], -2500.0);
        print_message("    %s: area %.0f m2, far field gives %.6f of %.1f\n",
                      m.p->features[c.zone[i].feature].name, zz->area,
                      c.zone[i].source[m.f_ring], c.zone[i].rate);
        assert_true(fabs(c.zone[i].source[m.f_ring] - Q) < 1e-6 * Q);
    }
    print_message("    combined width 2500 m upgradient %.1f m, 2Q/(Bq) = %.1f m\n", wsum,
                  2.0 * Q / (B * q));
    assert_true(fabs(c.zone[0].capture.area - c.zone[1].capture.area) <
                0.01 * c.zone[0].capture.area);
    assert_true(fabs(wsum - 2.0 * Q / (B * q)) < 0.05 * 2.0 * Q / (B * q));
    gw_capture_free(&c);
    drop(&m);
}

/* Every number of two zones equal, bit for bit. */
static void same_zone(const gw_capzone *a, const gw_capzone *b)
{
    assert_true(a->time == b->time && a->area == b->area);
    assert_int_equal(a->nring, b->nring);
    assert_int_equal(a->outer, b->outer);
    for (int i = 0; i < a->nring; i++) {
        assert_int_equal(a->ring[i].n, b->ring[i].n);
        assert_true(a->ring[i].area == b->ring[i].area);
        assert_memory_equal(a->ring[i].x, b->ring[i].x, (size_t)a->ring[i].n * sizeof(double));
        assert_memory_equal(a->ring[i].y, b->ring[i].y, (size_t)a->ring[i].n * sizeof(double));
    }
}

static void test_threads_same_zones(void **state)
{
    (void)state;
    /* The two-well field above, with travel-time zones. */
    const double q = 0.01, Q = 30.0;
    field fd = {.qreg = q, .qw = Q, .nw = 2, .wx = {0.0, 0.0}, .wy = {-100.0, 100.0}};
    model m;
    build(&m, &fd, 160, 60, 60, 60);
    const double times[2] = {2000.0, 8000.0};
    gw_capture c[3];
    gw_error err = {{0}};
    for (int t = 0; t < 3; t++) {
        gw_capture_options o;
        gw_capture_options_default(&o);
        o.times = times;
        o.ntimes = 2;
        o.threads = t + 1;
        if (gw_capture_compute(m.p, &m.ff, &o, &c[t], &err) != 0) fail_msg("capture: %s", err.msg);
    }
    for (int t = 1; t < 3; t++) {
        assert_int_equal(c[t].nzone, c[0].nzone);
        for (int i = 0; i < c[0].nzone; i++) {
            const gw_capture_zone *a = &c[0].zone[i], *b = &c[t].zone[i];
            assert_int_equal(a->seeds, b->seeds);
            assert_int_equal(a->classified, b->classified);
            assert_memory_equal(a->ends, b->ends, sizeof a->ends);
            assert_true(a->weak_pass_share == b->weak_pass_share &&
                        a->min_retained == b->min_retained);
            assert_memory_equal(a->source, b->source, (size_t)c[0].nfeatures * sizeof(double));
            same_zone(&a->capture, &b->capture);
            assert_int_equal(a->nttz, b->nttz);
            for (int k = 0; k < a->nttz; k++)
                same_zone(&a->ttz[k], &b->ttz[k]);
        }
    }
    /* Not vacuous: both wells have a capture zone and both time zones,
     * found by tracking. */
    assert_int_equal(c[0].nzone, 2);
    for (int i = 0; i < 2; i++) {
        assert_true(c[0].zone[i].seeds > 0 && c[0].zone[i].capture.nring > 0);
        assert_int_equal(c[0].zone[i].nttz, 2);
        assert_true(c[0].zone[i].ttz[0].area > 0.0 &&
                    c[0].zone[i].ttz[0].area < c[0].zone[i].ttz[1].area);
    }
    print_message("    1, 2 and 3 threads: identical zones (%ld + %ld seeds tracked, %d + %d ring vertices)\n",
                  c[0].zone[0].seeds, c[0].zone[1].seeds,
                  c[0].zone[0].capture.ring[c[0].zone[0].capture.outer].n,
                  c[0].zone[1].capture.ring[c[0].zone[1].capture.outer].n);
    for (int t = 0; t < 3; t++)
        gw_capture_free(&c[t]);
    drop(&m);
}

/* Ring structure: holes belong to the smallest outer ring around them
 * (plane geometry; the rings below are squares with known areas). */
/* Largest distance between corresponding ring vertices of two zones; -1
 * when their rings differ in number or size. */
static double max_shift(const gw_capzone *a, const gw_capzone *b)
{
    if (a->nring != b->nring)
        return -1.0;
    double d = 0.0;
    for (int i = 0; i < a->nring; i++) {
        if (a->ring[i].n != b->ring[i].n)
            return -1.0;
        for (int k = 0; k < a->ring[i].n; k++)
            d = fmax(d, hypot(a->ring[i].x[k] - b->ring[i].x[k], a->ring[i].y[k] - b->ring[i].y[k]));
    }
    return d;
}

/* Stopping a path between known paths of the same fate (path_fate.h) must
 * not move the zones: the same fields with every path followed to its end
 * give the same rings.  A different decision anywhere would move a vertex
 * by at least a bisection step (5 m / 2^10 here). */
static void test_known_paths_same_zones(void **state)
{
    (void)state;
    const double q = 0.01;
    const field fields[3] = {
        {.qreg = q, .qw = 50.0, .nw = 1},
        {.qreg = q, .qw = 30.0, .nw = 2, .wx = {0.0, 0.0}, .wy = {-100.0, 100.0}},
        {.qreg = -q, .qw = 2.0 * PI * q * B * 200.0, .nw = 1, .wx = {200.0}, .stream_d = 200.0},
    };
    const int box[3][4] = {{260, 60, 70, 70}, {160, 60, 60, 60}, {0, 100, 80, 80}};
    for (int i = 0; i < 3; i++) {
        model m;
        build(&m, &fields[i], box[i][0], box[i][1], box[i][2], box[i][3]);
        gw_capture c[2];
        gw_error err = {{0}};
        for (int t = 0; t < 2; t++) {
            gw_capture_options o;
            gw_capture_options_default(&o);
            o.track_all = t;
            if (gw_capture_compute(m.p, &m.ff, &o, &c[t], &err) != 0) fail_msg("capture: %s", err.msg);
        }
        assert_int_equal(c[0].nzone, c[1].nzone);
        for (int w = 0; w < c[0].nzone; w++) {
            double d = max_shift(&c[0].zone[w].capture, &c[1].zone[w].capture);
            print_message("    field %d well %d: %d rings, %d vertices, %ld paths stopped between "
                          "known paths; largest shift with every path followed %.3g m\n", i + 1,
                          w + 1, c[0].zone[w].capture.nring,
                          c[0].zone[w].capture.ring[c[0].zone[w].capture.outer].n,
                          c[0].zone[w].known_stops, d);
            /* Not vacuous: the shortcut was taken, and only when asked. */
            assert_true(c[0].zone[w].known_stops > 0);
            assert_int_equal(c[1].zone[w].known_stops, 0);
            assert_true(d >= 0.0 && d < 1e-9);
            assert_true(c[0].zone[w].capture.area == c[1].zone[w].capture.area);
            assert_int_equal(c[0].zone[w].seeds, c[1].zone[w].seeds);
        }
        for (int t = 0; t < 2; t++)
            gw_capture_free(&c[t]);
        drop(&m);
    }
}

static void test_ring_parents(void **state)
{
    (void)state;
    static double ox[] = {0, 100, 100, 0}, oy[] = {0, 0, 100, 100};       /* outer, ccw */
    static double hx[] = {40, 40, 60, 60}, hy[] = {40, 60, 60, 40};       /* hole, cw */
    static double px[] = {200, 210, 210, 200}, py[] = {0, 0, 10, 10};     /* second part */
    static double qx[] = {203, 203, 207, 207}, qy[] = {3, 7, 7, 3};       /* its hole */
    gw_capring rg[4] = {{ox, oy, 4, 10000.0}, {hx, hy, 4, -400.0}, {px, py, 4, 100.0},
                        {qx, qy, 4, -16.0}};
    gw_capzone z = {.time = HUGE_VAL, .area = 9684.0, .ring = rg, .nring = 4, .outer = 0};
    assert_int_equal(gw_capzone_parent(&z, 0), -1);
    assert_int_equal(gw_capzone_parent(&z, 1), 0);
    assert_int_equal(gw_capzone_parent(&z, 2), -1);
    assert_int_equal(gw_capzone_parent(&z, 3), 2);
    assert_int_equal(gw_capzone_parent(&z, 7), -1);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_uniform_flow_well),
        cmocka_unit_test(test_radial_time_zones),
        cmocka_unit_test(test_well_near_stream),
        cmocka_unit_test(test_recharge_fed_well),
        cmocka_unit_test(test_two_wells),
        cmocka_unit_test(test_ring_parents),
        cmocka_unit_test(test_threads_same_zones),
        cmocka_unit_test(test_known_paths_same_zones),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
