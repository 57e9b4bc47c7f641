/* Reading the `{file, layer, where}` form of lines, polygons and points.
 *
 * The model parser keeps such geometry as a reference (gw_path.layer_file,
 * layer_name, layer_where, with xy == NULL).  gw_model_resolve_layers()
 * replaces every reference by the vertices read with GDAL/OGR, before the
 * grid-dependent checks run.  This is the one place vector layers are read. */
#ifndef GW_MODEL_LAYERS_H
#define GW_MODEL_LAYERS_H

#include "model.h"

/* Expected shape of a layer geometry. */
typedef enum { GW_GEOM_POINT = 0, GW_GEOM_LINE, GW_GEOM_POLYGON } gw_geom_kind;

/* Read one geometry of the given kind into p (p->xy, p->n), reprojected
 * to `crs` (the grid's; NULL when it has none).  The layer filtered by
 * `where` must hold exactly one feature.  Errors name the model file
 * position p->src and `what`. */
int gw_path_read_layer(gw_path *p, gw_geom_kind kind, const char *crs, const char *what, gw_error *err);

/* Resolve every layer reference in m.  Returns 0, or -1 with err filled. */
int gw_model_resolve_layers(gw_model *m, gw_error *err);

#endif
