/* The catchment map: each discharge feature's catchment in its own colour,
 * divides, well capture zones and their travel-time zones, on the same
 * frame, legend, scale bar and north arrow as the head map. */
#ifndef GW_MAP_CATCHMENT_H
#define GW_MAP_CATCHMENT_H

#include "../solver/error.h"
#include "../solver/problem.h"
#include "map_layers.h"

/* Needs l->catchment_of (per-cell feature index, -1 none). */
int gw_map_catchment_write(const gw_problem *p, const gw_map_layers *l, const char *path,
                           gw_error *err);

#endif
