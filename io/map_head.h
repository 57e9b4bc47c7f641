/* The head map: coloured heads, labelled contours, streams by gaining or
 * losing (width by exchange rate per length), fixed heads, drains, wells
 * sized by rate, observation wells with residuals, divides, stagnation
 * points, legend, scale bar, north arrow and map coordinates. */
#ifndef GW_MAP_HEAD_H
#define GW_MAP_HEAD_H

#include "../solver/budget.h"
#include "../solver/error.h"
#include "../solver/problem.h"
#include "map_layers.h"

/* head: per cell, NAN where inactive.  b may be NULL (streams then drawn
 * without gaining/losing).  Writes a PNG at path. */
int gw_map_head_write(const gw_problem *p, const double *head, const gw_budget *b,
                      const gw_map_layers *l, const char *path, gw_error *err);

#endif
