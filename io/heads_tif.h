/* heads.tif: the head of every cell as a single-band Float64 GeoTIFF.
 *
 * Rows run from the north edge as in solver/grid.h, so the head array is
 * written as it is.  Cells without a head (NaN: inactive) carry the nodata
 * value.  The model's CRS, when given, is attached; a cross-section has none
 * (its y is elevation, not northing). */
#ifndef GW_HEADS_TIF_H
#define GW_HEADS_TIF_H

#include "../solver/error.h"
#include "../solver/grid.h"

#define GW_HEADS_NODATA (-9999.0)

/* Write nx*ny values `v` (NAN = no data) over grid g to `path`.  `crs` may be
 * NULL; anything GDAL's SetFromUserInput accepts ("EPSG:32633", WKT, a PROJ
 * string).  `description` names the band (e.g. "head (m)"). */
int gw_write_grid_tif(const char *path, const gw_grid *g, const double *v, const char *crs,
                      const char *description, gw_error *err);

/* Check a CRS string without writing anything (for model validation). */
int gw_crs_check(const char *crs, gw_error *err);

#endif
