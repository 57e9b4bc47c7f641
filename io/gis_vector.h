/* Reading geometry and attributes from GIS vector layers (GeoPackage,
 * Shapefile, GeoJSON, anything OGR opens), reprojected to the grid's CRS.
 *
 * This module knows nothing of the model file: it answers "give me the
 * lines / polygons / points of this layer, filtered by this SQL condition,
 * with these attributes, in this CRS".  model_layers.h uses it to resolve
 * the `{file, layer, where}` form; results_gpkg.c shares the CRS helper. */
#ifndef GW_GIS_VECTOR_H
#define GW_GIS_VECTOR_H

#include "../solver/error.h"

/* Expected geometry of the features read. */
typedef enum { GW_VGEOM_POINT = 0, GW_VGEOM_LINE, GW_VGEOM_POLYGON } gw_vgeom;

typedef struct {
    const char *file;          /* path to open */
    const char *layer;         /* NULL: the file must hold exactly one layer */
    const char *where;         /* OGR SQL attribute filter; NULL: every feature */
    gw_vgeom kind;
    const char *target_crs;    /* grid CRS (anything OSRSetFromUserInput takes); NULL: none */
    int assume_crs;            /* layer without a CRS: take it as already in target_crs */
    const char *name_field;    /* attribute naming each feature; NULL: no names */
    const char *const *fields; /* numeric attributes wanted per feature */
    int nfields;
    const char *what;          /* prefix for messages, e.g. "m.yaml:12:5: streams[0].line" */
} gw_vquery;

typedef struct {
    long fid;
    char *name;                /* owned; NULL without name_field */
    double *xy;                /* owned: x0, y0, x1, y1, ... in the target CRS */
    int n;                     /* vertices; polygons: the outer ring, closed */
    double *values;            /* owned: nfields values, NAN where the attribute is empty */
} gw_vfeature;

/* Read every feature selected by q.  Errors (each names q->what, the file
 * and, where it applies, the layer and feature id): file cannot be opened,
 * layer missing (the message lists the layers there are), bad `where`, a
 * selection with no features, empty or wrong geometry type, multi-part
 * geometry, polygon holes, a missing attribute, a non-numeric value, a
 * layer without CRS when the grid has one (unless assume_crs), a layer in
 * degrees when the grid has no CRS, and a failed reprojection. */
int gw_vector_read(const gw_vquery *q, gw_vfeature **out, int *nout, gw_error *err);
void gw_vfeatures_free(gw_vfeature *f, int n);

/* "EPSG:32633" and friends -> a spatial reference in x=east, y=north order.
 * Returns an OGRSpatialReferenceH (as void *, so this header stays free of
 * GDAL headers) or NULL with err filled; free with gw_gis_srs_free. */
void *gw_gis_srs(const char *crs, gw_error *err);
void gw_gis_srs_free(void *srs);

#endif
