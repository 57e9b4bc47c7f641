/* A small solved model for the map tests: a valley between a fixed-head
 * creek (west) and a leaky-bed stream (east, losing at its upstream end),
 * a tile drain, a pumping well, an inactive corner, observation wells.
 * (The corner is kept away from the fixed-head cells.) */
#ifndef TEST_MAP_FIXTURE_H
#define TEST_MAP_FIXTURE_H

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "io/map_layers.h"
#include "solver/budget.h"
#include "solver/observe.h"
#include "solver/problem.h"
#include "solver/rasterize.h"
#include "solver/solve.h"

typedef struct {
    gw_problem *p;
    gw_solution sol;
    gw_budget b;
    gw_map_layers l;
    double stream_xy[6], drain_xy[4], creek_xy[4], divide_xy[8];
    gw_map_geom geoms[3];
    gw_map_obs obs[3];
    gw_map_divide div;
    gw_map_stag stag[1];
} map_fixture;

static int fixture_build(map_fixture *f, gw_error *err)
{
    memset(f, 0, sizeof *f);
    const int NX = 80, NY = 50;
    gw_grid g = {.nx = NX, .ny = NY, .x0 = 500000.0, .y0 = 4100000.0, .dx = 25.0, .dy = 25.0};
    gw_problem *p = gw_problem_new(&g, GW_CONFINED, err);
    if (!p) return -1;
    f->p = p;
    int fc = gw_problem_add_feature(p, "West Creek", GW_FEAT_FIXED_HEAD, err);
    int fs = gw_problem_add_feature(p, "East Brook", GW_FEAT_STREAM, err);
    int fd = gw_problem_add_feature(p, "Tile drain", GW_FEAT_DRAIN, err);
    int fw = gw_problem_add_feature(p, "Supply well 1", GW_FEAT_WELL, err);
    if (fc < 0 || fs < 0 || fd < 0 || fw < 0) return -1;
    for (int r = 0; r < NY; r++)
        for (int c = 0; c < NX; c++) {
            size_t k = (size_t)r * NX + c;
            p->k[k] = 15.0;
            p->thick[k] = 20.0;
            p->recharge[k] = 0.0006;
            if (c - r > 72) p->active[k] = 0;         /* inactive north-east corner */
            if (c == 0 && p->active[k]) {
                p->fixed[k] = 100.0;
                p->fixed_feature[k] = fc;
            }
        }
    /* East Brook runs south along column 70, stage falling from 104 to 100.5 m. */
    for (int r = 0; r < NY; r++) {
        double stage = 104.0 - 3.5 * r / (NY - 1);
        gw_link l = {.cell = r * NX + 70, .feature = fs, .kind = GW_LINK_STREAM, .cond = 0.8 * 25.0,
                     .ref = stage, .floor = stage - 2.0};
        if (gw_problem_add_link(p, &l, err) != 0) return -1;
    }
    /* Drain along row 40 from column 30 to 45. */
    for (int c = 30; c <= 45; c++) {
        gw_link l = {.cell = 40 * NX + c, .feature = fd, .kind = GW_LINK_DRAIN, .cond = 1.5 * 25.0,
                     .ref = 101.0, .floor = 101.0};
        if (gw_problem_add_link(p, &l, err) != 0) return -1;
    }
    gw_well w = {.cell = 25 * NX + 45, .feature = fw, .rate = 900.0,
                 .x = gw_grid_xc(&g, 45), .y = gw_grid_yc(&g, 25)};
    if (gw_problem_add_well(p, &w, err) != 0) return -1;
    if (gw_solve(p, NULL, &f->sol, err) != 0) return -1;
    if (gw_budget_compute(p, &f->sol, &f->b, err) != 0) return -1;

    double xs = gw_grid_xc(&g, 70);
    double ytop = gw_grid_ytop(&g);
    double sxy[6] = {xs, ytop, xs + 5, ytop - 600, xs, g.y0};
    memcpy(f->stream_xy, sxy, sizeof sxy);
    double dxy[4] = {gw_grid_xc(&g, 30), gw_grid_yc(&g, 40), gw_grid_xc(&g, 45), gw_grid_yc(&g, 40)};
    memcpy(f->drain_xy, dxy, sizeof dxy);
    double cxy[4] = {gw_grid_xc(&g, 0), ytop - 250, gw_grid_xc(&g, 0), g.y0};
    memcpy(f->creek_xy, cxy, sizeof cxy);
    f->geoms[0] = (gw_map_geom){fs, {f->stream_xy, 3}, 0};
    f->geoms[1] = (gw_map_geom){fd, {f->drain_xy, 2}, 0};
    f->geoms[2] = (gw_map_geom){fc, {f->creek_xy, 2}, 0};

    static const char *names[3] = {"OW-1", "OW-2", "OW-3"};
    const double ox[3] = {500400, 501200, 501600}, oy[3] = {4100900, 4100300, 4100950};
    for (int i = 0; i < 3; i++) {
        double sim = gw_head_at(&g, f->sol.head, ox[i], oy[i]);
        f->obs[i] = (gw_map_obs){names[i], ox[i], oy[i], sim + 0.15 * (i - 1), sim};
    }
    /* An illustrative divide and stagnation point (the map tests do not
     * compute them; they check drawing only). */
    double vxy[8] = {501050, ytop, 501000, 4100800, 500950, 4100400, 501000, g.y0};
    memcpy(f->divide_xy, vxy, sizeof vxy);
    f->div = (gw_map_divide){{"West Creek", "East Brook"}, {f->divide_xy, 4}};
    f->stag[0] = (gw_map_stag){500950, 4100600, 103.0, GW_STAG_SADDLE};

    gw_map_layers_init(&f->l);
    f->l.title = "Hypothetical valley between two creeks";
    f->l.length_unit = "m";
    f->l.time_unit = "day";
    f->l.crs = "EPSG:32633";
    f->l.geoms = f->geoms;
    f->l.ngeoms = 3;
    f->l.obs = f->obs;
    f->l.nobs = 3;
    f->l.divides = &f->div;
    f->l.ndivides = 1;
    f->l.stag = f->stag;
    f->l.nstag = 1;
    return 0;
}

static void fixture_free(map_fixture *f)
{
    gw_budget_free(&f->b);
    gw_solution_free(&f->sol);
    gw_problem_free(f->p);
}

#endif
