/* Gridded properties from rasters, resampled onto the model grid by a rule
 * chosen for what the values mean; and adopting a raster's grid.
 *
 * Each model cell takes every raster pixel it overlaps, weighted by the
 * overlapping area (exact rectangle overlap, so a raster finer, coarser or
 * shifted against the grid is handled the same way):
 *   GEOMEAN  conductivity: exp(sum w ln v / sum w).  Flow through a random
 *            mix of conductivities is governed by about the geometric mean
 *            in 2-D (Matheron 1967; de Marsily, Quantitative Hydrogeology
 *            1986, from memory), and it keeps one gravel pixel from
 *            dominating a clay cell as an arithmetic mean would.
 *   MEAN     recharge, elevations, thickness, porosity: area average (keeps
 *            the volume of recharge and of aquifer).
 *   MAJORITY masks and class maps: the value covering most of the cell.
 * A raster in another CRS than the grid is first warped to it (nearest
 * pixel, at the raster's own resolution) through GDAL.
 *
 * Nodata: parts of a cell on nodata pixels are left out of the average; a
 * cell more than half on nodata (or outside the raster) is an error when it
 * is needed, naming the cell col, row and its centre's map x, y. */
#ifndef GW_GIS_RASTER_H
#define GW_GIS_RASTER_H

#include "../solver/error.h"
#include "../solver/grid.h"

typedef enum { GW_RESAMPLE_GEOMEAN = 0, GW_RESAMPLE_MEAN, GW_RESAMPLE_MAJORITY } gw_resample_rule;

/* Name of a rule ("geometric mean", "area average", "majority"). */
const char *gw_resample_rule_name(gw_resample_rule r);

typedef struct {
    const char *path;          /* raster file */
    int band;                  /* 1-based */
    double scale;              /* multiplies every value */
    gw_resample_rule rule;
    const char *grid_crs;      /* NULL: the raster is taken as in grid coordinates */
    const char *what;          /* message prefix, e.g. "m.yaml:8:17: aquifer.conductivity" */
    int missing_ok;            /* masks: cells on nodata or off the raster get NAN, no error */
} gw_raster_query;

/* Fill out[k] for every cell with need[k] != 0 (every cell when need is
 * NULL); other cells keep out[k] unless the raster covers them well.
 * GEOMEAN rejects values <= 0 naming the cell. */
int gw_raster_resample(const gw_raster_query *q, const gw_grid *g, const unsigned char *need, double *out,
                       gw_error *err);

/* `grid: {like: PATH}`: the grid of a north-up raster (columns, rows,
 * lower-left corner, cell size) and its CRS as WKT (*crs malloc'ed, NULL
 * when the raster has none). */
int gw_raster_grid_like(const char *path, const char *what, gw_grid *g, char **crs, gw_error *err);

#endif
