/* Shared set-up of the solver tests (a header, not a test program): the 1-D
 * strip between two fixed-head canals, and a solve with tight tolerances.
 * Include after <cmocka.h>; needs only the solver (test_solver_*.c link
 * gwsolver alone). */
#ifndef GW_FIXTURE_STRIP_H
#define GW_FIXTURE_STRIP_H

#include "solver/problem.h"
#include "solver/solve.h"

/* Strip on grid g (origin and cell sizes from g) with uniform conductivity
 * k and recharge rech; fixed heads ha in the first column (feature 1, "West
 * canal") and hb in the last (feature 2, "East canal").  thick_or_base is
 * the thickness of a confined aquifer, the base of an unconfined one.  Every
 * row is identical, so the 2-D model is the 1-D problem. */
static inline gw_problem *fixture_strip(const gw_grid *g, gw_aquifer_type type, double k,
                                        double thick_or_base, double ha, double hb, double rech)
{
    gw_error err;
    gw_problem *p = gw_problem_new(g, type, &err);
    assert_non_null(p);
    int fw = gw_problem_add_feature(p, "West canal", GW_FEAT_FIXED_HEAD, &err);
    int fe = gw_problem_add_feature(p, "East canal", GW_FEAT_FIXED_HEAD, &err);
    assert_true(fw == 1 && fe == 2);
    for (int r = 0; r < g->ny; r++)
        for (int c = 0; c < g->nx; c++) {
            int i = r * g->nx + c;
            p->k[i] = k;
            if (type == GW_CONFINED)
                p->thick[i] = thick_or_base;
            else
                p->bottom[i] = thick_or_base;
            p->recharge[i] = rech;
            if (c == 0) { p->fixed[i] = ha; p->fixed_feature[i] = fw; }
            if (c == g->nx - 1) { p->fixed[i] = hb; p->fixed_feature[i] = fe; }
        }
    return p;
}

/* Solve to head_tol (and a 1e-12 residual), failing the test on an error. */
static inline void fixture_solve_tight(const gw_problem *p, gw_solution *sol, double head_tol)
{
    gw_solve_options o;
    gw_solve_options_default(&o);
    o.head_tol = head_tol;
    o.resid_tol = 1e-12;
    gw_error err = {{0}};
    if (gw_solve(p, &o, sol, &err)) fail_msg("solve: %s", err.msg);
}

#endif
