/* results.gpkg: the run's results as GIS layers (one GeoPackage, every layer
 * in the grid's CRS, units in the field names and in each layer's
 * description).
 *
 * Two levels: a small writer for plain data (points, polylines, polygons
 * with attributes; contour lines and polygons of a cell-class raster through
 * GDAL's own algorithms), and gw_results_gpkg_write(), which puts the layers
 * of one run together from gw_results. */
#ifndef GW_RESULTS_GPKG_H
#define GW_RESULTS_GPKG_H

#include "../solver/error.h"
#include "../solver/grid.h"
#include "gis_vector.h"
#include "results.h"

typedef enum { GW_FIELD_INT = 0, GW_FIELD_REAL, GW_FIELD_TEXT } gw_field_type;

typedef struct {
    const char *name;
    gw_field_type type;
} gw_field;

/* One attribute value; REAL NAN and TEXT NULL are written as empty (NULL). */
typedef struct {
    long i;
    double d;
    const char *s;
} gw_fvalue;

typedef struct gw_gpkg gw_gpkg;

/* Create `path` (replacing nothing: the file must not exist).  `crs` may be
 * NULL (layers then carry no CRS). */
gw_gpkg *gw_gpkg_create(const char *path, const char *crs, gw_error *err);

/* Start a layer; features added next go into it.  POLYGON layers hold
 * multipolygons, LINE layers multilinestrings, POINT layers points.
 * `description` lands in the GeoPackage's layer description. */
int gw_gpkg_layer(gw_gpkg *g, const char *name, gw_vgeom kind, const gw_field *fields, int nfields,
                  const char *description, gw_error *err);

/* Add one feature to the current layer.  parts[i] holds n[i] vertices (x, y
 * pairs): for a LINE layer each part is one polyline; for a POLYGON layer
 * each part is a ring (closing vertex optional): a counter-clockwise ring
 * starts a polygon, a clockwise ring after it is one of its holes; for a
 * POINT layer one part of one vertex.  vals has one entry
 * per field. */
int gw_gpkg_add(gw_gpkg *g, const double *const *parts, const int *n, int nparts, const gw_fvalue *vals,
                gw_error *err);

/* Head contours of grid values v (NAN = no data) with GDAL's contour
 * generator, as layer `name` with fields "id" and `level_field`. */
int gw_gpkg_contours(gw_gpkg *g, const char *name, const gw_grid *grid, const double *v, double interval,
                     const char *level_field, const char *description, gw_error *err);

/* Polygons of a per-cell class raster (cls[k] >= 0; -1 = none) with GDAL's
 * polygonize, merged into one multipolygon per class, as layer `name`.  For
 * class c, row attributes come from vals[c * nfields ...]; `area_field`
 * (REAL, may be NULL) receives the polygon area.  Classes without cells get
 * no row.  `nclasses` bounds the class values. */
int gw_gpkg_class_polygons(gw_gpkg *g, const char *name, const gw_grid *grid, const int *cls, int nclasses,
                           const gw_field *fields, int nfields, const gw_fvalue *vals, const char *area_field,
                           const char *description, gw_error *err);

/* Finish: commit and close.  Returns 0, or -1 (the file is then removed). */
int gw_gpkg_close(gw_gpkg *g, gw_error *err);

/* Abandon: close and remove the file. */
void gw_gpkg_abort(gw_gpkg *g);

/* A unit for a field name: "m3/day" -> "m3_per_day", other characters that
 * do not belong in a field name -> '_'.  Writes into buf. */
void gw_field_unit(const char *unit, char *buf, size_t len);

/* Every layer of one run into `path` (see docs/gis.md for the list). */
int gw_results_gpkg_write(const gw_results *r, const char *path, gw_error *err);

#endif
