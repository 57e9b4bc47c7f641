/* Profile charts: head along a transect, one curve per case (a sweep's
 * values, or a single run), with divide crossings marked. */
#ifndef GW_MAP_PROFILE_H
#define GW_MAP_PROFILE_H

#include "../solver/error.h"

typedef struct {
    const char *label;        /* e.g. "recharge 0.0004 m/day" */
    const double *dist;       /* distance along the transect, L */
    const double *head;       /* NAN where the line leaves the active area */
    int n;
} gw_profile_curve;

typedef struct {
    double dist;              /* where a divide crosses the transect */
    int curve;                /* which curve it belongs to (-1: all) */
} gw_profile_mark;

typedef struct {
    const char *title;
    const char *subtitle;     /* e.g. transect name */
    const char *length_unit;
    const char *crs;
    int width;                /* px (0: 1400) */
    const gw_profile_curve *curves; int ncurves;
    const gw_profile_mark *marks;   int nmarks;
} gw_profile_chart;

int gw_map_profile_write(const gw_profile_chart *pc, const char *path, gw_error *err);

/* Sample the cell-centred head field along polyline xy (n vertices) at
 * `ns` evenly spaced points: dist and head receive ns values each. */
#include "../solver/grid.h"
int gw_profile_sample(const gw_grid *g, const double *head, const double *xy, int n, int ns,
                      double *dist, double *hs, gw_error *err);

#endif
