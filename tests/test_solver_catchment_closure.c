/* Catchment closure on a 2-D model: a curved stream (placed with
 * gw_rasterize_line), a drain, a pumping well and a fixed-head edge, on
 * heterogeneous conductivity.
 *
 * Check (water balance, i.e. continuity of Darcy flow): with recharge the
 * only source, the recharge collected on each feature's catchment equals
 * what the feature takes from the aquifer; the requirement is 1 %, the
 * exact flux-weighted partition should give round-off.  With a losing
 * stream as well, the water each feature receives from all sources equals
 * its budget outflow, and every source's water is accounted for once. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <cmocka.h>

#include "solver/budget.h"
#include "solver/catchment.h"
#include "solver/divide.h"
#include "solver/flowfield.h"
#include "solver/problem.h"
#include "solver/rasterize.h"
#include "solver/solve.h"
#include "solver/upstream.h"
#include "fixture_strip.h"

enum { NX = 90, NY = 70 };
static const double DX = 15.0, DY = 15.0;

static double hash01(unsigned u)
{
    u ^= u >> 16; u *= 0x7feb352dU; u ^= u >> 15; u *= 0x846ca68bU; u ^= u >> 16;
    return (u & 0xffffff) / (double)0x1000000;
}

/* stream_stage: stage at the stream's upstream end (falls 2 m along it);
 * base: river head, the drain sits 0.2 m above it. */
static gw_problem *model(gw_aquifer_type type, double stream_stage, double base)
{
    gw_grid g = {.nx = NX, .ny = NY, .x0 = 1000, .y0 = 5000, .dx = DX, .dy = DY};
    gw_error err = {{0}};
    gw_problem *p = gw_problem_new(&g, type, &err);
    assert_non_null(p);
    int fs = gw_problem_add_feature(p, "Mill creek", GW_FEAT_STREAM, &err);
    int fd = gw_problem_add_feature(p, "Field drain", GW_FEAT_DRAIN, &err);
    int fw = gw_problem_add_feature(p, "Well 2", GW_FEAT_WELL, &err);
    int fh = gw_problem_add_feature(p, "River", GW_FEAT_FIXED_HEAD, &err);
    for (int r = 0; r < NY; r++)
        for (int c = 0; c < NX; c++) {
            int i = r * NX + c;
            /* Log-uniform conductivity over two orders of magnitude, in
             * 5 x 5 cell blocks. */
            p->k[i] = 0.5 * pow(10.0, 2.0 * hash01((unsigned)((r / 5) * 97 + c / 5)));
            p->thick[i] = 25.0;
            p->bottom[i] = 0.0;
            p->recharge[i] = 3e-4 * (1.0 + hash01((unsigned)i + 7777u));
            if (c == NX - 1) { p->fixed[i] = base; p->fixed_feature[i] = fh; }
            /* An inactive corner, to exercise the edges of the active area. */
            if (r < 12 && c < 15) p->active[i] = 0;
        }
    /* Curved stream from north to south through the west third. */
    double line[2 * 30];
    for (int i = 0; i < 30; i++) {
        double y = 5000 + NY * DY - 1.0 - i * (NY * DY - 2.0) / 29.0;
        line[2 * i] = 1000 + 400 + 150 * sin((y - 5000) / 170.0);
        line[2 * i + 1] = y;
    }
    gw_line_piece *pc = NULL;
    int npc = 0;
    assert_int_equal(gw_rasterize_line(&g, line, 30, &pc, &npc, &err), 0);
    double cum[30];
    gw_polyline_chainage(line, 30, cum);
    for (int i = 0; i < npc; i++) {
        if (!p->active[pc[i].cell])
            continue;
        double stage = stream_stage - 2.0 * pc[i].s_mid / cum[29];
        gw_link l = {.cell = pc[i].cell, .feature = fs, .kind = GW_LINK_STREAM,
                     .cond = 0.3 * pc[i].length, .ref = stage, .floor = stage - 15.0};
        assert_int_equal(gw_problem_add_link(p, &l, &err), 0);
    }
    free(pc);
    /* Straight drain in the south-east. */
    for (int c = 45; c < 75; c++) {
        gw_link l = {.cell = 55 * NX + c, .feature = fd, .kind = GW_LINK_DRAIN,
                     .cond = 2.0 * DX, .ref = base + 0.2, .floor = base + 0.2};
        assert_int_equal(gw_problem_add_link(p, &l, &err), 0);
    }
    gw_well w = {.cell = 20 * NX + 60, .feature = fw, .rate = 60.0};
    assert_int_equal(gw_problem_add_well(p, &w, &err), 0);
    return p;
}

static void run(const gw_problem *p, gw_solution *sol, gw_budget *b, gw_catchments *c)
{
    fixture_solve_tight(p, sol, 1e-10);
    gw_error err = {{0}};
    if (gw_budget_compute(p, sol, b, &err)) fail_msg("budget: %s", err.msg);
    gw_flowfield f;
    if (gw_flowfield_compute(p, sol, &f, &err)) fail_msg("flow field: %s", err.msg);
    if (gw_catchments_compute(p, &f, c, &err)) fail_msg("catchments: %s", err.msg);
    gw_flowfield_free(&f);
    assert_int_equal(c->unresolved, 0);
}

static void test_recharge_only(void **state)
{
    (void)state;
    gw_problem *p = model(GW_CONFINED, 24.0, 24.0);
    gw_solution sol = {0};
    gw_budget b = {0};
    gw_catchments c;
    run(p, &sol, &b, &c);
    double scale = b.total_in, area_sum = 0.0, worst = 0.0;
    long nact = 0;
    for (int i = 0; i < NX * NY; i++)
        nact += p->active[i];
    for (int f = 1; f < p->nfeatures; f++) {
        double rel = b.feature[f].out > 0 ? fabs(c.recharge[f] - b.feature[f].out) / b.feature[f].out : 0;
        print_message("    %-12s catchment %10.1f m2  recharge collected %10.5f  outflow %10.5f m3/d  rel diff %.1e\n",
                      p->features[f].name, c.area[f], c.recharge[f], b.feature[f].out, rel);
        /* The set-up must make recharge the only source. */
        assert_true(b.feature[f].in <= 1e-12 * scale);
        assert_true(b.feature[f].out > 0);
        assert_true(rel < 0.01);      /* the requirement */
        assert_true(rel < 1e-8);      /* what the exact partition gives */
        worst = fmax(worst, rel);
        area_sum += c.area[f];
    }
    /* Every active cell's water ends somewhere: the catchments tile the
     * active area. */
    double act_area = nact * DX * DY;
    print_message("    worst rel diff %.1e; catchment areas sum %.6g of active %.6g m2\n", worst,
                  area_sum, act_area);
    assert_true(fabs(area_sum - act_area) < 1e-9 * act_area);
    gw_catchments_free(&c);
    gw_budget_free(&b);
    gw_solution_free(&sol);
    gw_problem_free(p);
}

/* Losing upper stream reaches (stage high), unconfined: closure over all
 * sources. */
static void test_losing_stream(void **state)
{
    (void)state;
    gw_problem *p = model(GW_UNCONFINED, 34.0, 30.0);
    gw_solution sol = {0};
    gw_budget b = {0};
    gw_catchments c;
    run(p, &sol, &b, &c);
    int nf = p->nfeatures;
    print_message("    Mill creek: in %.5f out %.5f m3/d (%s)\n", b.feature[1].in, b.feature[1].out,
                  gw_state_name(b.feature[1].state));
    assert_true(b.feature[1].in > 0);
    double worst = 0.0;
    for (int f = 0; f < nf; f++) {
        if (b.feature[f].out > 0) {
            double rel = fabs(c.received[f] - b.feature[f].out) / b.feature[f].out;
            print_message("    %-12s receives %10.5f, budget outflow %10.5f m3/d, rel diff %.1e\n",
                          p->features[f].name, c.received[f], b.feature[f].out, rel);
            worst = fmax(worst, rel);
        }
        /* A source's water is split among the discharge features, once. */
        if (c.source[f] > 0) {
            double sum = 0.0;
            for (int t = 0; t < nf; t++)
                sum += c.delivered[(size_t)f * nf + t];
            assert_true(fabs(c.source[f] - b.feature[f].in) < 1e-9 * b.total_in);
            assert_true(fabs(sum - c.source[f]) < 1e-8 * c.source[f]);
        }
    }
    print_message("    worst rel diff %.1e\n", worst);
    assert_true(worst < 1e-8);
    gw_catchments_free(&c);
    gw_budget_free(&b);
    gw_solution_free(&sol);
    gw_problem_free(p);
}

/* The upstream sets that limit the share passes, against a plain fixed
 * point: a cell is upstream of a feature if the feature takes water in it,
 * or if it sends water across a face to a cell that is (repeated sweeps
 * until nothing changes).  And the share is zero outside the set. */
static void test_upstream_sets(void **state)
{
    (void)state;
    gw_problem *p = model(GW_CONFINED, 26.5, 24.0);   /* losing upper reaches too */
    gw_solution sol = {0};
    fixture_solve_tight(p, &sol, 1e-10);
    gw_error err = {{0}};
    gw_flowfield f;
    if (gw_flowfield_compute(p, &sol, &f, &err)) fail_msg("flow field: %s", err.msg);
    const int n = NX * NY;
    unsigned char *ref = malloc(n);
    double *share = malloc(n * sizeof *share);
    assert_non_null(ref);
    assert_non_null(share);
    gw_upstream u = {0};
    for (int feat = 1; feat < p->nfeatures; feat++) {
        memset(ref, 0, n);
        for (int i = 0; i < f.nexch; i++)
            if (f.exch[i].feature == feat && f.exch[i].q < 0.0 && p->active[f.exch[i].cell])
                ref[f.exch[i].cell] = 1;
        for (int changed = 1; changed;) {
            changed = 0;
            for (int k = 0; k < n; k++) {
                if (ref[k] || !p->active[k])
                    continue;
                int c = k % NX;
                int to = (c + 1 < NX && f.qe[k] > 0 && ref[k + 1]) ||
                         (c > 0 && f.qe[k - 1] < 0 && ref[k - 1]) ||
                         (k + NX < n && f.qs[k] > 0 && ref[k + NX]) ||
                         (k >= NX && f.qs[k - NX] < 0 && ref[k - NX]);
                if (to) {
                    ref[k] = 1;
                    changed = 1;
                }
            }
        }
        if (gw_upstream_of_feature(&f, feat, &u, &err)) fail_msg("upstream: %s", err.msg);
        if (gw_catchment_share(p, &f, feat, share, &err)) fail_msg("share: %s", err.msg);
        long nref = 0, outside = 0;
        for (int k = 0; k < n; k++) {
            nref += ref[k];
            assert_int_equal(u.mark[k], ref[k]);
            if (!u.mark[k] && share[k] != 0.0)
                outside++;
        }
        print_message("    %-12s %5ld cells upstream (fixed point %ld), share outside them: %ld cells\n",
                      p->features[feat].name, u.n, nref, outside);
        assert_int_equal(u.n, nref);
        assert_true(u.n > 0);
        assert_int_equal(outside, 0);
    }
    gw_upstream_free(&u);
    free(ref);
    free(share);
    gw_flowfield_free(&f);
    gw_solution_free(&sol);
    gw_problem_free(p);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_recharge_only),
        cmocka_unit_test(test_losing_stream),
        cmocka_unit_test(test_upstream_sets),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
