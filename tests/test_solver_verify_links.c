/* Verification: head-dependent exchanges (stream with a clogged bed, drain)
 * on a 1-D confined strip with uniform recharge.
 *
 * Set-up: fixed head h0 in the first column (centre x = 0); a stream or drain
 * link of conductance C (per cell = bed conductance per length x DY) in every
 * cell of the last column (centre x = L); the grid ends at x = L + DX/2 with
 * no flow beyond.  Darcy's law and continuity give on 0 <= x <= L
 *     h(x) = h0 + a x - R x^2 / (2 T)
 * and the water balance of the last column's cell (flow from the west face,
 * recharge on its area, exchange q_s with the stream) closes when
 *     T DY h'(L + DX/2) = q_s,
 * i.e. the Darcy flux at the grid edge of the same parabola equals the
 * exchange.  Continuum and scheme agree at the cell centres (the scheme is
 * exact for quadratics; the stream is a line at x = L and the strip between
 * it and the edge drains into it), so heads must match to round-off.
 *
 *  - leaky bed (third-type / Robin condition, derived from Darcy's law across
 *    the bed): q_s = C (stage - h(L)), giving
 *    a (T DY + C L) = C (stage - h0 + R L^2 / (2T)) + R DY (L + DX/2);
 *  - water table below the bed bottom: the bed drains freely, q_s = C (stage -
 *    bed_bottom) is constant (common practice), giving
 *    a = q_s / (T DY) + R (L + DX/2) / T;
 *  - drain: q_s = C (elev - h(L)) while h(L) > elev, else 0 (outflow only). */
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

enum { NX = 41, NY = 3 };
static const double DX = 25.0, DY = 40.0;
static const double L = (NX - 1) * 25.0;
static const double K = 10.0, B = 20.0;            /* T = 200 m2/d */
static const double CLEN = 0.8;                   /* bed conductance per length, m/d */

typedef struct {
    gw_problem *p;
    int ffix, flink;
} strip_t;

static strip_t make_strip(double h0, double rech, gw_link_kind kind, double ref, double floor_)
{
    gw_grid g = {.nx = NX, .ny = NY, .x0 = 0.0, .y0 = 0.0, .dx = DX, .dy = DY};
    gw_error err = {{0}};
    strip_t s;
    s.p = gw_problem_new(&g, GW_CONFINED, &err);
    assert_non_null(s.p);
    s.ffix = gw_problem_add_feature(s.p, "West lake", GW_FEAT_FIXED_HEAD, &err);
    s.flink = gw_problem_add_feature(s.p, kind == GW_LINK_DRAIN ? "Tile drain" : "East creek",
                                     kind == GW_LINK_DRAIN ? GW_FEAT_DRAIN : GW_FEAT_STREAM, &err);
    assert_true(s.ffix > 0 && s.flink > 0);
    for (int r = 0; r < NY; r++)
        for (int c = 0; c < NX; c++) {
            int i = r * NX + c;
            s.p->k[i] = K;
            s.p->thick[i] = B;
            s.p->recharge[i] = rech;
            if (c == 0) { s.p->fixed[i] = h0; s.p->fixed_feature[i] = s.ffix; }
        }
    for (int r = 0; r < NY; r++) {
        gw_link l = {.cell = r * NX + NX - 1, .feature = s.flink, .kind = kind,
                     .cond = CLEN * DY, .ref = ref, .floor = floor_};
        assert_int_equal(gw_problem_add_link(s.p, &l, &err), 0);
    }
    return s;
}

/* Solve, compare every head with h0 + a x - R x^2/(2T), check the balance and
 * the link feature's net exchange (per whole feature). */
static void solve_and_check(strip_t *s, double h0, double rech, double a,
                            double net_expected, unsigned char on_expected, const char *what)
{
    const double T = K * B;
    gw_solve_options o;
    gw_solve_options_default(&o);
    o.head_tol = 1e-11;
    o.resid_tol = 1e-12;
    gw_solution sol = {0};
    gw_error err = {{0}};
    if (gw_solve(s->p, &o, &sol, &err) != 0) fail_msg("%s: solve: %s", what, err.msg);
    assert_true(sol.converged);

    double maxerr = 0.0;
    for (int r = 0; r < NY; r++)
        for (int c = 0; c < NX; c++) {
            double x = c * DX;
            double h = h0 + a * x - rech * x * x / (2.0 * T);
            maxerr = fmax(maxerr, fabs(sol.head[r * NX + c] - h));
        }
    for (int l = 0; l < s->p->nlinks; l++)
        assert_int_equal(sol.link_on[l], on_expected);

    gw_budget b = {0};
    if (gw_budget_compute(s->p, &sol, &b, &err) != 0) fail_msg("budget: %s", err.msg);
    double net = b.feature[s->flink].net;
    print_message("    %s: h(L) = %.6f m, max head error %.3e m; exchange %.8g m3/d "
                  "(closed form %.8g); balance %.3g %%; %d iterations\n",
                  what, sol.head[NX - 1], maxerr, net, net_expected,
                  b.discrepancy_percent, sol.iterations);
    assert_true(maxerr <= 1e-9 * h0);
    assert_true(fabs(net - net_expected) <= 1e-8 * fmax(1.0, fabs(net_expected)));
    assert_true(fabs(b.discrepancy_percent) < 1e-6);
    /* Signs: in/out are never negative, and an outflow-only feature never
     * gives water. */
    assert_true(b.feature[s->flink].in >= 0.0 && b.feature[s->flink].out >= 0.0);
    if (s->p->links[0].kind == GW_LINK_DRAIN)
        assert_true(b.feature[s->flink].in == 0.0);
    gw_state want = net_expected > 0 ? GW_STATE_LOSING
                  : net_expected < 0 ? GW_STATE_GAINING : GW_STATE_NONE;
    assert_int_equal(b.feature[s->flink].state, want);
    gw_budget_free(&b);
    gw_solution_free(&sol);
}

/* Robin closed form: slope a and the head at the stream. */
static double robin_a(double h0, double rech, double stage)
{
    const double T = K * B, C = CLEN * DY;
    return (C * (stage - h0 + rech * L * L / (2.0 * T)) + rech * DY * (L + 0.5 * DX)) /
           (T * DY + C * L);
}

static void test_stream_gaining(void **state)
{
    (void)state;
    const double h0 = 50.0, R = 1e-3, stage = 51.0, bot = 49.0, T = K * B;
    strip_t s = make_strip(h0, R, GW_LINK_STREAM, stage, bot);
    double a = robin_a(h0, R, stage);
    double hL = h0 + a * L - R * L * L / (2.0 * T);
    assert_true(hL > stage);   /* the closed form says: gaining, above the bed */
    solve_and_check(&s, h0, R, a, NY * CLEN * DY * (stage - hL), 1, "gaining stream (Robin)");
    gw_problem_free(s.p);
}

static void test_stream_losing(void **state)
{
    (void)state;
    const double h0 = 50.0, R = 1e-3, stage = 55.0, bot = 49.0, T = K * B;
    strip_t s = make_strip(h0, R, GW_LINK_STREAM, stage, bot);
    double a = robin_a(h0, R, stage);
    double hL = h0 + a * L - R * L * L / (2.0 * T);
    assert_true(hL < stage && hL > bot);   /* losing, still connected */
    solve_and_check(&s, h0, R, a, NY * CLEN * DY * (stage - hL), 1, "losing stream (Robin)");
    gw_problem_free(s.p);
}

/* Losing stream perched above a low water table: constant leakage through
 * the bed, C (stage - bed_bottom). */
static void test_stream_perched(void **state)
{
    (void)state;
    const double h0 = 30.0, R = 2e-4, stage = 51.0, bot = 49.0, T = K * B;
    const double qs = CLEN * DY * (stage - bot);            /* per cell */
    strip_t s = make_strip(h0, R, GW_LINK_STREAM, stage, bot);
    double a = qs / (T * DY) + R * (L + 0.5 * DX) / T;
    double hL = h0 + a * L - R * L * L / (2.0 * T);
    assert_true(hL < bot);   /* the closed form says: water table below the bed */
    solve_and_check(&s, h0, R, a, NY * qs, 0, "perched losing stream");
    gw_problem_free(s.p);
}

static void test_drain_running(void **state)
{
    (void)state;
    const double h0 = 50.0, R = 1e-3, elev = 49.0, T = K * B;
    strip_t s = make_strip(h0, R, GW_LINK_DRAIN, elev, elev);
    double a = robin_a(h0, R, elev);   /* same law as a stream while h > elev */
    double hL = h0 + a * L - R * L * L / (2.0 * T);
    assert_true(hL > elev);
    solve_and_check(&s, h0, R, a, NY * CLEN * DY * (elev - hL), 1, "running drain");
    gw_problem_free(s.p);
}

/* A drain above the water table takes nothing: the east edge is then a
 * no-flow boundary, a = R (L + DX/2) / T. */
static void test_drain_dry(void **state)
{
    (void)state;
    const double h0 = 50.0, R = 1e-3, elev = 60.0, T = K * B;
    strip_t s = make_strip(h0, R, GW_LINK_DRAIN, elev, elev);
    double a = R * (L + 0.5 * DX) / T;
    double hL = h0 + a * L - R * L * L / (2.0 * T);
    assert_true(hL < elev);
    solve_and_check(&s, h0, R, a, 0.0, 0, "dry drain");
    gw_problem_free(s.p);
}

/* The exchange law itself (problem.h), at points on both sides of the
 * switch: stream cut off at the bed bottom, drain outflow only, leakage
 * linear everywhere. */
static void test_link_laws(void **state)
{
    (void)state;
    gw_link st = {.kind = GW_LINK_STREAM, .cond = 2.0, .ref = 10.0, .floor = 8.0};
    assert_true(fabs(gw_link_flux(&st, 12.0) - (-4.0)) < 1e-12);   /* gaining */
    assert_true(fabs(gw_link_flux(&st, 9.0) - 2.0) < 1e-12);       /* losing */
    assert_true(fabs(gw_link_flux(&st, 5.0) - 4.0) < 1e-12);       /* cut off */
    assert_true(fabs(gw_link_flux(&st, -50.0) - 4.0) < 1e-12);
    gw_link dr = {.kind = GW_LINK_DRAIN, .cond = 2.0, .ref = 10.0, .floor = 10.0};
    assert_true(fabs(gw_link_flux(&dr, 11.0) - (-2.0)) < 1e-12);
    assert_true(gw_link_flux(&dr, 9.0) == 0.0);
    gw_link lk = {.kind = GW_LINK_LEAKAGE, .cond = 2.0, .ref = 10.0, .floor = -HUGE_VAL};
    assert_true(fabs(gw_link_flux(&lk, 4.0) - 12.0) < 1e-12);
    assert_true(fabs(gw_link_flux(&lk, 13.0) - (-6.0)) < 1e-12);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_link_laws),
        cmocka_unit_test(test_stream_gaining),
        cmocka_unit_test(test_stream_losing),
        cmocka_unit_test(test_stream_perched),
        cmocka_unit_test(test_drain_running),
        cmocka_unit_test(test_drain_dry),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
