/* Transects: head and groundwater flux sampled along a polyline, and the
 * places where groundwater divides cross it.
 *
 * Flux is the Darcy flux per unit width (L^2/T; in a vertical section, per
 * unit width into the page, i.e. L/T), interpolated from the face fluxes of
 * the final linear solve as in Pollock's (1988) semi-analytical scheme:
 * inside a cell the x component varies linearly between the west and east
 * face values and the y component between the south and north face values,
 * so the field is exactly the one the budgets see.  Components are given
 * along the line (positive in the drawing direction) and normal to it
 * (positive to the LEFT of the drawing direction).  Head is the bilinear
 * value between cell centres (gw_head_at). */
#ifndef GW_TRANSECT_H
#define GW_TRANSECT_H

#include "divide.h"
#include "problem.h"
#include "solve.h"

typedef struct {
    double dist;       /* along the line from its first vertex, L */
    double x, y;
    double head;       /* NAN outside the active area */
    double qn, qa;     /* flux per unit width normal to / along the line; NAN outside */
} gw_transect_sample;

typedef enum {
    GW_CROSS_DIVIDE = 0,   /* a divide polyline crosses the line */
    GW_CROSS_DIVERGING,    /* the along-line flux turns from backward to forward */
    GW_CROSS_CONVERGING    /* the along-line flux turns from forward to backward */
} gw_cross_kind;

typedef struct {
    gw_transect_sample at;
    gw_cross_kind kind;
    int a, b;          /* DIVIDE: the two features it separates; else -1 */
    int divide;        /* DIVIDE: index into the gw_divides; else -1 */
} gw_transect_crossing;

typedef struct {
    double length;                 /* of the polyline, L */
    int n;
    gw_transect_sample *s;         /* owned, by distance */
    int ncross;
    gw_transect_crossing *c;       /* owned, by distance */
} gw_transect;

/* Darcy flux per unit width at (x, y), Pollock interpolation of the face
 * fluxes.  Returns -1 (and NANs) outside the grid or in an inactive cell. */
int gw_flux_at(const gw_problem *p, const gw_solution *sol, double x, double y, double *qx,
               double *qy);

/* Sample the polyline xy (npts >= 2 vertices) every `spacing` (<= 0: half
 * the smaller cell side) and at every vertex; record where the along-line
 * flux changes sign (linear interpolation between samples) and, when d is
 * not NULL, where each divide polyline crosses the line.  Crossings are
 * sorted by distance. */
int gw_transect_compute(const gw_problem *p, const gw_solution *sol, const double *xy, int npts,
                        double spacing, const gw_divides *d, gw_transect *t, gw_error *err);
void gw_transect_free(gw_transect *t);

/* Distances along the polyline where divide polylines cross it (exact
 * segment intersections), without sampling; same crossing records as
 * above with only dist, x, y, a, b, divide filled (head and flux NAN). */
int gw_transect_divide_crossings(const double *xy, int npts, const gw_divides *d,
                                 gw_transect_crossing **out, int *n, gw_error *err);

#endif
