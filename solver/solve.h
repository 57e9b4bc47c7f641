/* Steady-state solution of the 2-D groundwater flow equation.
 *
 * Unknowns are the heads of active, non-fixed cells.  The five-point
 * conductance matrix is symmetric positive definite; CHOLMOD factorizes it.
 * The symbolic analysis is done once per gw_solver and reused across the
 * nonlinear iterations (unconfined transmissivity, stream/drain switching)
 * and across later runs on problems with the same active/fixed pattern
 * (sweeps).  A numeric factorization is skipped when the matrix values did
 * not change since the last one (only right-hand sides changed). */
#ifndef GW_SOLVE_H
#define GW_SOLVE_H

#include "error.h"
#include "problem.h"

typedef struct {
    double head_tol;     /* max |dh| between iterations, L (default 1e-6) */
    double resid_tol;    /* max cell balance residual / total inflow (default 1e-8) */
    int max_iter;        /* nonlinear iterations (default 100) */
    double min_thick;    /* unconfined: saturated-thickness floor, L (default 1e-3) */
    /* Factorize the grid as two halves side by side (split_factor.h):
     * 0 automatic (from 2 million unknowns with two or more CPUs), 1 whenever
     * the grid has a useful split, -1 never.  Same heads to round-off.
     * The default comes from GW_SPLIT in the environment when it is set
     * to 1 or -1 (for tests and benchmarks). */
    int split;
} gw_solve_options;

void gw_solve_options_default(gw_solve_options *o);

/* Wall-clock seconds spent per stage (cumulative over iterations). */
typedef struct {
    double assemble, analyse, factorize, solve;
} gw_solve_timing;

typedef struct {
    int n;            /* length of the history */
    double *max_dh;   /* per iteration */
    double *resid;    /* per iteration: max balance residual / total inflow */
} gw_iter_history;

typedef struct {
    int ncells;
    double *head;     /* per cell; NAN for inactive cells */
    /* Face conductances (L^2/T) used in the final linear solve, so budgets
     * and fluxes are consistent with the heads to round-off:
     *   cx[k] between cell k and its east neighbour k+1 (0 at the east edge
     *         or where either side is inactive)
     *   cy[k] between cell k and its south neighbour k+nx (row+1). */
    double *cx, *cy;
    /* Final state of each link: 1 if head-dependent (h above floor). */
    unsigned char *link_on;
    int converged;
    int iterations;
    int factorizations;
    int ndry;          /* unconfined cells whose head is at or below bottom */
    gw_iter_history history;
    gw_solve_timing timing;
} gw_solution;

typedef struct gw_solver gw_solver;

/* Prepare a solver for problems with p's active/fixed pattern (symbolic
 * analysis happens at the first solve).  Checks gw_problem_check_bounded. */
gw_solver *gw_solver_new(const gw_problem *p, const gw_solve_options *opt, gw_error *err);
void gw_solver_free(gw_solver *s);

/* Solve p (which must have the pattern the solver was made for).  sol is
 * filled (arrays allocated on first use and reused after).  On
 * non-convergence sol->converged = 0, the function returns -1 and the error
 * names the iteration history; sol still holds the last iterate.  If
 * `start` is non-NULL it is the initial head guess for nonlinear problems. */
int gw_solver_run(gw_solver *s, const gw_problem *p, const double *start,
                  gw_solution *sol, gw_error *err);

/* Export the last factorized system (unknown-cell numbering, lower
 * triangle) in Matrix Market form: PREFIX.mtx, PREFIX.rhs.mtx, and
 * PREFIX.cells.txt (the grid cell index of each unknown). */
int gw_solver_export(const gw_solver *s, const char *prefix, gw_error *err);

/* Which BLAS/ordering CHOLMOD used, for reports. */
const char *gw_solver_describe(const gw_solver *s);

/* Convenience: one-shot solve. */
int gw_solve(const gw_problem *p, const gw_solve_options *opt, gw_solution *sol, gw_error *err);

void gw_solution_free(gw_solution *sol);   /* frees arrays, not the struct */

/* Flow (L^3/T, or L^2/T per unit width in a section) from cell k to its east
 * (k+1) / south (k+nx) neighbour through the final solve's conductances.  A
 * face with no conductance (grid edge, inactive neighbour, fixed-fixed)
 * carries nothing, and the neighbour's head (maybe NAN) is not read. */
static inline double gw_flow_east(const gw_solution *s, size_t k)
{
    return s->cx[k] != 0.0 ? s->cx[k] * (s->head[k] - s->head[k + 1]) : 0.0;
}

static inline double gw_flow_south(const gw_solution *s, int nx, size_t k)
{
    return s->cy[k] != 0.0 ? s->cy[k] * (s->head[k] - s->head[k + (size_t)nx]) : 0.0;
}

#endif
