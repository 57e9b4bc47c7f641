/* Stagnation points: where the Darcy flux vanishes.  Cell-centre fluxes
 * (face fluxes averaged to the centre, per unit width) are interpolated
 * bilinearly over the square between four neighbouring cell centres; where
 * both components change sign there, the zero is solved for exactly (a
 * quadratic) and classified with the flux Jacobian J = grad q:
 * det J < 0 saddle; otherwise div q > 0 (water spreads out) a head maximum,
 * div q < 0 a head minimum.  Squares touching a fixed-head, stream, drain or
 * well cell or an inactive cell are skipped: the flux there is not smooth. */
#ifndef GW_STAGNATION_H
#define GW_STAGNATION_H

#include "flowfield.h"
#include "problem.h"
#include "solve.h"

typedef enum { GW_STAGNATION_MAXIMUM = 0, GW_STAGNATION_SADDLE, GW_STAGNATION_MINIMUM } gw_stag_type;
const char *gw_stag_type_name(gw_stag_type t);   /* "maximum", "saddle", "minimum" */

typedef struct {
    double x, y;       /* map coordinates */
    double head;       /* bilinear head there */
    gw_stag_type type;
    int cell;          /* cell holding the point */
} gw_stagnation;

/* *pts is malloc'ed (NULL when *n == 0). */
int gw_stagnation_find(const gw_problem *p, const gw_solution *sol, const gw_flowfield *f,
                       gw_stagnation **pts, int *n, gw_error *err);

#endif
