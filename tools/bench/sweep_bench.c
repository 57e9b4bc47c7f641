/* Sweep benchmark: one solver, two runs.  The second run changes only
 * recharge, stream stages and pumping rates, so the conductance matrix is
 * unchanged and the solver must reuse the factorization (solver/solve.h).
 * Builds the problem in memory (no model file), prints one line
 * "key=value ..." for tools/bench/bench.py:
 *
 *     sweep_bench CELLS [unconfined]
 *
 * The problem mirrors tools/bench/make_model.py: K zones, a fixed-head river
 * on the west edge, a leaky stream on the east side, wells, recharge. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "solver/problem.h"
#include "solver/solve.h"

static double now(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return ts.tv_sec + 1e-9 * ts.tv_nsec;
}

static gw_problem *build(int n, gw_aquifer_type type, gw_error *err)
{
    gw_grid g = { n, n, 0.0, 0.0, 10.0, 10.0 };
    gw_problem *p = gw_problem_new(&g, type, err);
    if (!p)
        return NULL;
    for (int r = 0; r < n; r++)
        for (int c = 0; c < n; c++) {
            size_t k = (size_t)r * n + c;
            double u = (c + 0.5) / n, v = 1.0 - (r + 0.5) / n;
            p->active[k] = u + v < 1.0 + 0.6;                 /* corner cut off */
            p->k[k] = 15.0;
            if (u > 0.35 && u < 0.45)
                p->k[k] = 80.0;                               /* gravel channel */
            if (u > 0.10 && u < 0.30 && v > 0.60 && v < 0.72)
                p->k[k] = 0.5;                                /* clay lens */
            p->thick[k] = 30.0;
            p->bottom[k] = 60.0;
            p->recharge[k] = (u > 0.5 && u < 0.75 && v > 0.3 && v < 0.5) ? 0.0011 : 0.0004;
        }
    int river = gw_problem_add_feature(p, "West River", GW_FEAT_FIXED_HEAD, err);
    int brook = gw_problem_add_feature(p, "East Brook", GW_FEAT_STREAM, err);
    if (river < 0 || brook < 0)
        goto fail;
    for (int r = 0; r < n; r++) {
        size_t k = (size_t)r * n;
        p->fixed_feature[k] = river;
        p->fixed[k] = 100.0 + 4.0 * (1.0 - (r + 0.5) / n);
    }
    for (int r = n / 3; r < n - 2; r++) {                     /* stream, south two thirds */
        double v = 1.0 - (r + 0.5) / n;
        int c = (int)(n * (0.86 + 0.05 * sin(6.0 * v)));
        double stage = 101.0 + 3.0 * v;
        gw_link l = { (int)((size_t)r * n + c), brook, GW_LINK_STREAM, 15.0, stage, stage - 1.5 };
        if (p->active[l.cell] && gw_problem_add_link(p, &l, err))
            goto fail;
    }
    double wells[4][3] = { { 0.30, 0.30, 900 }, { 0.55, 0.62, 1500 }, { 0.70, 0.25, 700 }, { 0.22, 0.55, 800 } };
    for (int i = 0; i < 4; i++) {
        char name[32];
        snprintf(name, sizeof name, "Well %d", i + 1);
        int f = gw_problem_add_feature(p, name, GW_FEAT_WELL, err);
        int c = (int)(wells[i][0] * n), r = (int)((1.0 - wells[i][1]) * n);
        gw_well w = { r * n + c, f, wells[i][2] * n * n / 250000.0, 0, 0 };
        if (f < 0 || gw_problem_add_well(p, &w, err))
            goto fail;
    }
    return p;
fail:
    gw_problem_free(p);
    return NULL;
}

int main(int argc, char **argv)
{
    if (argc < 2) {
        fprintf(stderr, "usage: sweep_bench CELLS [unconfined]\n");
        return 2;
    }
    int n = (int)lround(sqrt(atof(argv[1]) / 0.92));
    gw_aquifer_type type = argc > 2 && !strcmp(argv[2], "unconfined") ? GW_UNCONFINED : GW_CONFINED;
    gw_error err = { { 0 } };
    gw_solution s1 = { 0 }, s2 = { 0 };
    gw_solver *sv = NULL;
    int rc = 1;
    gw_problem *p = build(n, type, &err);
    if (!p)
        goto done;

    double t = now();
    sv = gw_solver_new(p, NULL, &err);
    if (!sv || gw_solver_run(sv, p, NULL, &s1, &err))
        goto done;
    double first = now() - t;

    /* The sweep member: 20 % more recharge, stages 0.1 m higher, pumping
     * 10 % lower.  Start from the first run's heads, as a sweep does. */
    size_t nc = (size_t)n * n;
    for (size_t k = 0; k < nc; k++)
        p->recharge[k] *= 1.2;
    for (int i = 0; i < p->nlinks; i++)
        p->links[i].ref += 0.1;
    for (int i = 0; i < p->nwells; i++)
        p->wells[i].rate *= 0.9;
    t = now();
    if (gw_solver_run(sv, p, s1.head, &s2, &err))
        goto done;
    double second = now() - t;

    printf("cells=%d type=%s first=%.4f second=%.4f ratio=%.4f first_factorizations=%d "
           "second_factorizations=%d first_iterations=%d second_iterations=%d "
           "analyse=%.4f factorize=%.4f solve=%.4f second_solve=%.4f second_assemble=%.4f\n",
           (int)nc, type == GW_UNCONFINED ? "unconfined" : "confined", first, second, second / first,
           s1.factorizations, s2.factorizations, s1.iterations, s2.iterations, s1.timing.analyse,
           s1.timing.factorize, s1.timing.solve, s2.timing.solve, s2.timing.assemble);
    rc = 0;
done:
    if (rc)
        fprintf(stderr, "sweep_bench: %s\n", err.msg);
    gw_solution_free(&s1);
    gw_solution_free(&s2);
    gw_solver_free(sv);
    gw_problem_free(p);
    return rc;
}
