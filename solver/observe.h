/* Simulated heads at points: bilinear interpolation between the four
 * surrounding active cell centres (exact at a centre), and residual
 * statistics. */
#ifndef GW_OBSERVE_H
#define GW_OBSERVE_H

#include "grid.h"

/* Head at map point (x, y).  Near edges and inactive cells the weights of
 * missing centres are dropped and the rest renormalized; NAN when no active
 * centre surrounds the point. */
double gw_head_at(const gw_grid *g, const double *head, double x, double y);

typedef struct {
    int n;            /* observations with an observed head */
    double mean_error, mean_abs_error, rms_error;   /* of observed - simulated */
} gw_residual_stats;

void gw_residual_stats_compute(const double *observed, const double *simulated, int n,
                               gw_residual_stats *st);

#endif
