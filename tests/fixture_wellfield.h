/* Shared set-up of the well-field tests (a header, not a test program):
 * uniform regional flow plus pumping wells (and image wells across a
 * straight stream), with the analytic head of the Javandel and Tsang (1986)
 * potential fixed on a ring of cells around the grid, so the boundary is
 * exact and the tests measure the interior scheme, the tracking and the
 * zones.  Include after <cmocka.h>; needs only the solver. */
#ifndef GW_FIXTURE_WELLFIELD_H
#define GW_FIXTURE_WELLFIELD_H

#include <math.h>
#include <stdio.h>

#include "solver/flowfield.h"
#include "solver/problem.h"
#include "solver/solve.h"

static const double PI = 3.14159265358979323846;
static const double DX = 10.0;                /* m */
static const double K = 10.0, B = 10.0, POR = 0.25;

typedef struct {
    double qreg;      /* Darcy flux of the ambient flow, m/d (sign: +x) */
    double qw;        /* pumping of each well, m3/d */
    int nw;
    double wx[2], wy[2];
    double stream_d;  /* > 0: image well across a stream at x = 0 */
} field;

/* Analytic head: ambient flow plus wells (and their images). */
static double head_at(const field *fd, double x, double y)
{
    double h = 100.0 - fd->qreg / K * x;
    for (int i = 0; i < fd->nw; i++) {
        double r2 = (x - fd->wx[i]) * (x - fd->wx[i]) + (y - fd->wy[i]) * (y - fd->wy[i]);
        h += fd->qw / (4.0 * PI * K * B) * log(r2);
        if (fd->stream_d > 0) {
            double i2 = (x + fd->wx[i]) * (x + fd->wx[i]) + (y - fd->wy[i]) * (y - fd->wy[i]);
            h -= fd->qw / (4.0 * PI * K * B) * log(i2);
        }
    }
    return h;
}

typedef struct {
    gw_problem *p;
    gw_solution sol;
    gw_flowfield ff;
    int f_ring, f_stream, f_well[2];
} model;

/* Grid with cell centres on multiples of DX from the origin; west..east and
 * south..north in cells.  With a stream, column 0 is the stream (its own
 * fixed-head feature). */
static void build(model *m, const field *fd, int west, int east, int south, int north)
{
    gw_grid g = {.nx = west + east + 1, .ny = south + north + 1, .dx = DX, .dy = DX};
    g.x0 = -(west + 0.5) * DX;
    g.y0 = -(south + 0.5) * DX;
    gw_error err = {{0}};
    m->p = gw_problem_new(&g, GW_CONFINED, &err);
    assert_non_null(m->p);
    m->f_ring = gw_problem_add_feature(m->p, "Far field", GW_FEAT_FIXED_HEAD, &err);
    m->f_stream = fd->stream_d > 0 ? gw_problem_add_feature(m->p, "Creek", GW_FEAT_FIXED_HEAD, &err) : -1;
    for (int r = 0; r < g.ny; r++)
        for (int c = 0; c < g.nx; c++) {
            int k = r * g.nx + c;
            m->p->k[k] = K;
            m->p->thick[k] = B;
            m->p->porosity[k] = POR;
            double x = gw_grid_xc(&g, c), y = gw_grid_yc(&g, r);
            if (fd->stream_d > 0 && c == 0) {
                m->p->fixed[k] = head_at(fd, x, y);
                m->p->fixed_feature[k] = m->f_stream;
            } else if (r == 0 || c == 0 || r == g.ny - 1 || c == g.nx - 1) {
                m->p->fixed[k] = head_at(fd, x, y);
                m->p->fixed_feature[k] = m->f_ring;
            }
        }
    for (int i = 0; i < fd->nw; i++) {
        char name[32];
        snprintf(name, sizeof name, "Well %d", i + 1);
        m->f_well[i] = gw_problem_add_feature(m->p, name, GW_FEAT_WELL, &err);
        int col, row;
        assert_int_equal(gw_grid_locate(&g, fd->wx[i], fd->wy[i], &col, &row), 0);
        gw_well w = {.cell = row * g.nx + col, .feature = m->f_well[i], .rate = fd->qw,
                     .x = fd->wx[i], .y = fd->wy[i]};
        assert_int_equal(gw_problem_add_well(m->p, &w, &err), 0);
    }
    m->sol = (gw_solution){0};
    if (gw_solve(m->p, NULL, &m->sol, &err) != 0) fail_msg("solve: %s", err.msg);
    if (gw_flowfield_compute(m->p, &m->sol, &m->ff, &err) != 0) fail_msg("flow field: %s", err.msg);
}

static void drop(model *m)
{
    gw_flowfield_free(&m->ff);
    gw_solution_free(&m->sol);
    gw_problem_free(m->p);
}

#endif
