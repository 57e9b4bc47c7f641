/* Maps and report.html for one run: builds the map layers from the run's
 * results (model geometry, divides, catchments, stagnation points, capture
 * zones) and writes head.png, catchments.png, budget.png, one
 * profile_<n>.png per transect and report.html into the staged output
 * folder. */
#ifndef GW_MAP_RESULTS_H
#define GW_MAP_RESULTS_H

#include "../solver/error.h"
#include "outdir.h"
#include "results.h"

int gw_maps_write(const gw_results *r, gw_outdir *o, gw_error *err);

#endif
