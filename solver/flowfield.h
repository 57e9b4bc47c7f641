/* Cell-face Darcy fluxes and seepage velocities from a solved problem, plus
 * each cell's exchange with the outside (recharge, wells, streams, drains,
 * leakage, fixed heads), all consistent with the budgets to round-off.
 * Shared by divides/catchments and particle tracking. */
#ifndef GW_FLOWFIELD_H
#define GW_FLOWFIELD_H

#include "budget.h"
#include "problem.h"
#include "solve.h"

typedef struct {
    int cell, feature;
    double q;          /* L^3/T, positive into the aquifer */
} gw_exchange;

typedef struct {
    gw_grid grid;
    /* Volumetric flux, L^3/T, through cell faces:
     *   qe[k]: from cell k to its east neighbour (negative = westward)
     *   qs[k]: from cell k to its south neighbour (row+1; negative = northward)
     * Zero at the grid edge and next to inactive cells. */
    double *qe, *qs;
    /* Per-cell exchange with the outside, L^3/T, both >= 0:
     *   src[k]  water entering the aquifer in cell k (recharge, losing
     *           stream reaches, injection, fixed-head supply, leakage in)
     *   sink[k] water leaving the aquifer in cell k (gaining reaches, drains,
     *           pumping, fixed-head outflow, leakage out) */
    double *src, *sink;
    /* Which feature takes the sink of cell k (the largest one when several
     * share a cell); -1 where sink[k] == 0. */
    int *sink_feature;
    /* Saturated thickness per cell (L) and porosity, for seepage velocity:
     * v = q / (face length * thickness * porosity). */
    double *sat_thick;
    double *porosity;
    const unsigned char *active;   /* borrowed from the problem */
    /* Every exchange except positive recharge: one entry per link, well,
     * fixed-head cell and cell of negative recharge, so analyses can
     * attribute water to features exactly.  q > 0 enters the aquifer. */
    gw_exchange *exch;
    int nexch;
} gw_flowfield;

int gw_flowfield_compute(const gw_problem *p, const gw_solution *sol, gw_flowfield *f, gw_error *err);
void gw_flowfield_free(gw_flowfield *f);

#endif
