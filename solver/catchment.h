/* Catchments: for every active cell, the share of the water passing through
 * it (its recharge and what it receives from upstream) that ends in each
 * discharge feature.
 *
 * Method: flux-weighted partition on the downhill flux graph.  Face fluxes
 * run from higher to lower head, so the graph is acyclic; cells are ordered
 * downstream first (Kahn's algorithm, ties broken by cell number) and the
 * share of feature F in cell k is
 *     frac_F[k] = (sink_F[k] + sum_out q_km frac_F[m]) / (sink[k] + sum_out q_km),
 * i.e. water leaving a cell is a mix of everything that entered it.  The
 * partition is linear, so with recharge the only source the recharge
 * collected on a feature's catchment equals its outflow to round-off. */
#ifndef GW_CATCHMENT_H
#define GW_CATCHMENT_H

#include "flowfield.h"
#include "problem.h"

typedef struct {
    int nfeatures;             /* = problem nfeatures */
    int *dominant;             /* per cell: feature with the largest share, -1 none */
    double *dominant_share;    /* per cell: that share (0..1) */
    unsigned char *discharge;  /* per feature: 1 if it takes water out somewhere */
    double *area;              /* per feature: sum of cell area x share, L^2 */
    double *recharge;          /* per feature: recharge ending in it, L^3/T */
    double *received;          /* per feature: all water ending in it, L^3/T */
    /* delivered[s * nfeatures + f]: water entering the aquifer from feature
     * s (0 = recharge) that ends in feature f, L^3/T. */
    double *delivered;
    double *source;            /* per feature: water it puts into the aquifer */
    /* per feature: area of the cells sending only part of their water to it
     * (share strictly between 1e-12 and 1 - 1e-12), L^2; 0 where the
     * feature takes no water. */
    double *mixed_area;
    long unresolved;           /* active cells left out of the ordering (should be 0) */
} gw_catchments;

int gw_catchments_compute(const gw_problem *p, const gw_flowfield *f, gw_catchments *c,
                          gw_error *err);
void gw_catchments_free(gw_catchments *c);

/* Share field of one feature (frac[k], 0..1; 0 for inactive cells and cells
 * without throughput), e.g. for a well's contributing area map.  frac has
 * one entry per grid cell. */
int gw_catchment_share(const gw_problem *p, const gw_flowfield *f, int feature, double *frac,
                       gw_error *err);

#endif
