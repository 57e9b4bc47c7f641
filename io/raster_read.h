/* Reading a gridded property from a raster file (GDAL) onto the model grid. */
#ifndef GW_RASTER_READ_H
#define GW_RASTER_READ_H

#include "../solver/error.h"
#include "../solver/grid.h"

/* Sample band `band` (1-based) of raster `path` at the centre of every grid
 * cell (nearest pixel), multiply by `scale`, store in out[k].  Only cells
 * with need[k] != 0 are sampled when `need` is given (others keep out[k]).
 * A cell centre outside the raster or on a nodata/NaN pixel is an error
 * naming the cell (col, row) and its map x, y; `what` starts the message
 * (e.g. "model.yaml:12:5: aquifer.conductivity"). */
int gw_raster_sample(const char *path, int band, double scale, const gw_grid *g,
                     const unsigned char *need, double *out, const char *what, gw_error *err);

#endif
