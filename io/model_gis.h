/* The model's features read from GIS layers: geometry reprojected to
 * grid.crs, values from attributes (`stage: {field: STAGE}`), and whole
 * layers turned into one feature per row (`name: {field: NAME}`).
 * Called by gw_model_resolve_layers (model_layers.h) before the grid checks. */
#ifndef GW_MODEL_GIS_H
#define GW_MODEL_GIS_H

#include "model.h"
#include "model_layers.h"

/* Read one layer geometry of the given kind into p (exactly one feature
 * must be selected), reprojected to `crs` (NULL: none). */
int gw_model_read_path(gw_path *p, gw_geom_kind kind, const char *crs, const char *what, gw_error *err);

/* Expand per-row features and read attribute values of fixed heads,
 * streams, drains, wells and observations.  Features left with a plain
 * layer reference are handled by gw_path_read_layer afterwards.  Checks
 * that names stay unique after expansion. */
int gw_model_read_gis(gw_model *m, gw_error *err);

#endif
