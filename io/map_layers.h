/* Everything the maps draw besides the solved field itself, as plain data.
 * The pointers are borrowed: a gw_map_layers owns nothing unless it was
 * filled by gw_map_layers_from_model(), which allocates the arrays (not the
 * strings, which stay the model's) and is undone by gw_map_layers_free(). */
#ifndef GW_MAP_LAYERS_H
#define GW_MAP_LAYERS_H

#include "../solver/error.h"
#include "../solver/problem.h"
#include "model.h"

typedef struct {
    const double *xy;   /* x0, y0, x1, y1, ... map coordinates */
    int n;              /* vertices */
} gw_map_path;

/* A feature's geometry as the user drew it (streams, drains, fixed-head
 * lines or lake polygons); `feature` indexes gw_problem.features. */
typedef struct {
    int feature;
    gw_map_path path;
    int polygon;
} gw_map_geom;

typedef struct {
    const char *name;
    double x, y;
    double observed;    /* NAN when not measured */
    double simulated;   /* NAN when outside the active area */
} gw_map_obs;

typedef enum { GW_STAG_MAXIMUM = 0, GW_STAG_SADDLE, GW_STAG_MINIMUM } gw_map_stag_type;

typedef struct {
    double x, y, head;
    gw_map_stag_type type;
} gw_map_stag;

typedef struct {
    const char *between[2];   /* feature names */
    gw_map_path line;
} gw_map_divide;

typedef struct {
    double time;              /* T */
    double area;              /* L^2 */
    gw_map_path polygon;
    /* Further rings (separate parts, holes): drawn with `polygon` under the
     * even-odd rule, so holes stay open; may be NULL. */
    const gw_map_path *rings;
    int nrings;
} gw_map_tt_zone;

typedef struct {
    const char *well;
    double area;
    gw_map_path polygon;
    const gw_map_path *rings;   /* as in gw_map_tt_zone */
    int nrings;
    const gw_map_tt_zone *zones;
    int nzones;
} gw_map_capture;

/* A catchment: the cells whose recharge ends in one discharge feature. */
typedef struct {
    int feature;              /* index into gw_problem.features */
    double area, recharge;    /* L^2, L^3/T */
} gw_map_catchment;

typedef struct {
    const char *title;
    const char *length_unit, *time_unit;
    const char *crs;                 /* NULL when unknown */
    int width;                       /* image width, px (0: 1400) */
    double contour_interval;         /* 0: chosen from the head range */

    const gw_map_geom *geoms;        int ngeoms;
    const gw_map_obs *obs;           int nobs;
    const gw_map_divide *divides;    int ndivides;
    const gw_map_stag *stag;         int nstag;
    /* Per cell: index into gw_problem.features of the feature the cell's
     * water ends in, -1 for none/inactive.  NULL: no catchment map. */
    const int *catchment_of;
    const gw_map_catchment *catchments; int ncatchments;
    const gw_map_capture *capture;   int ncapture;

    /* Owned arrays when filled by gw_map_layers_from_model(). */
    void *owned_[2];
} gw_map_layers;

void gw_map_layers_init(gw_map_layers *l);

/* Fill title, units, CRS, size, contour interval, feature geometry
 * (matched to problem features by name and type) and observation wells
 * from the model; `simulated` holds the simulated head per model
 * observation (may be NULL).  Analysis layers (divides, catchments,
 * capture zones) are set by the caller. */
int gw_map_layers_from_model(gw_map_layers *l, const gw_model *m, const gw_problem *p,
                             const double *simulated, gw_error *err);

void gw_map_layers_free(gw_map_layers *l);

#endif
