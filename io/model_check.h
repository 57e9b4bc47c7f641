/* Checks of a parsed model that need the grid and the final geometry (after
 * layer references are read): per-vertex value counts, points inside the
 * grid, lines and polygons that touch it, stage above bed bottom. */
#ifndef GW_MODEL_CHECK_H
#define GW_MODEL_CHECK_H

#include "model.h"

/* Returns 0, or -1 with every problem found, one per line, as
 * "FILE:LINE:COL: feature: message". */
int gw_model_check(const gw_model *m, gw_error *err);

#endif
