/* Groundwater divides: the boundaries between catchments, as polylines in
 * map coordinates, each tagged with the two features it separates.
 *
 * A boundary face lies between two active cells whose dominant features
 * differ.  Faces are chained through the grid corners into polylines (one
 * feature pair per polyline; a corner where three catchments meet ends the
 * lines).  Each face is then moved along its normal to where the normal
 * Darcy flux changes sign, by linear interpolation between the neighbouring
 * face fluxes of the same row (vertical faces) or column (horizontal faces);
 * this is exact for the 1-D strip, whose flux is linear in x.  The polyline
 * runs through the moved face midpoints. */
#ifndef GW_DIVIDE_H
#define GW_DIVIDE_H

#include "budget.h"
#include "catchment.h"
#include "flowfield.h"
#include "problem.h"
#include "stagnation.h"

typedef struct {
    int a, b;          /* the two features, a < b */
    int npts;
    double *xy;        /* x, y pairs, owned */
    int closed;        /* 1: a loop (first point repeated at the end) */
} gw_divide;

typedef struct {
    int n;
    gw_divide *d;
} gw_divides;

int gw_divides_compute(const gw_problem *p, const gw_flowfield *f, const gw_catchments *c,
                       gw_divides *out, gw_error *err);
void gw_divides_free(gw_divides *d);

/* Two features with no divide between them although water passes from one
 * to the other: `losing` puts `loss` into the aquifer and `delivered` of it
 * ends in `receiving` (L^3/T). */
typedef struct {
    int losing, receiving;
    double loss, delivered;
} gw_no_divide;

/* Pairs (A, B), A not recharge, A != B, where A's water reaches B (at least
 * 1 % of A's inflow) and no divide separates A and B.  *list is malloc'ed
 * (may be NULL when *n == 0). */
int gw_no_divide_find(const gw_catchments *c, const gw_divides *d, gw_no_divide **list, int *n,
                      gw_error *err);

/* One summary sentence, e.g. "no divide between A and B: A loses 12.5
 * m3/day to the aquifer, all of it ends in B". */
void gw_no_divide_describe(const gw_no_divide *nd, const char *name_a, const char *name_b,
                           const char *length_unit, const char *time_unit, char *buf, size_t len);

/* Everything above in one bundle, as the command uses it. */
typedef struct {
    gw_catchments catchments;
    gw_divides divides;
    gw_no_divide *no_divide;
    int nno_divide;
    gw_stagnation *stagnation;
    int nstagnation;
} gw_divide_analysis;

/* Flow field, catchments, divides, no-divide pairs and stagnation points of
 * a solved problem. */
int gw_divide_analysis_run(const gw_problem *p, const gw_solution *sol, gw_divide_analysis *a,
                           gw_error *err);
/* The same from a flow field already computed from sol (read only, so other
 * threads may use it meanwhile). */
int gw_divide_analysis_run_flow(const gw_problem *p, const gw_solution *sol,
                                const gw_flowfield *f, gw_divide_analysis *a, gw_error *err);
void gw_divide_analysis_free(gw_divide_analysis *a);

#endif
