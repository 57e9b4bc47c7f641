/* The model as the user described it (map coordinates, named features),
 * before it is put on the grid.  Parsed from YAML by model_yaml.c, turned
 * into a gw_problem by model_build.c.  Every item remembers where in the
 * model file it came from, so later errors can name file:line:column. */
#ifndef GW_MODEL_H
#define GW_MODEL_H

#include "../solver/error.h"
#include "../solver/grid.h"
#include "../solver/problem.h"

typedef struct {
    const char *file;   /* points into gw_model.path (not owned separately) */
    int line, col;      /* 1-based; 0 when unknown */
} gw_src;

/* A polyline, polygon ring or point list in map coordinates. */
typedef struct {
    double *xy;    /* x0, y0, x1, y1, ... (owned) */
    int n;         /* number of vertices */
    gw_src src;
    /* Layer form {file, layer, where}: xy is NULL and n == 0 until
     * gw_model_resolve_layers() (model_layers.h) reads the geometry.
     * layer_file is resolved relative to the model file; all owned. */
    char *layer_file, *layer_name, *layer_where;
    int assume_crs;        /* layer without CRS: its coordinates are in grid.crs */
    /* `name: {field: F}` on the feature: one feature per row of the layer,
     * named from attribute F (owned; expanded by gw_model_resolve_layers). */
    char *name_field;
} gw_path;

/* Per-vertex values along a line: n == 1 is a constant. */
typedef struct {
    double *v;     /* owned */
    int n;
    gw_src src;
    char *field;   /* {field: F}: read from attribute F of the feature's layer (owned) */
} gw_values;

typedef struct {
    char *name;
    gw_path polygon;
    double value;
    gw_src src;
} gw_zone;

typedef enum { GW_PROP_VALUE = 0, GW_PROP_RASTER, GW_PROP_ZONES } gw_prop_kind;

/* A gridded property: a number, a raster, or a background value with zones
 * (later zones win where they overlap). */
typedef struct {
    gw_prop_kind kind;
    double value;          /* VALUE, and the background for ZONES */
    char *raster;          /* RASTER: path, resolved relative to the model file */
    int band;              /* RASTER: 1-based */
    double scale;          /* RASTER: multiplier */
    gw_zone *zones; int nzones;
    int given;             /* 0 when the key was absent (default used) */
    gw_src src;
} gw_property;

typedef struct {
    char *name;
    gw_path geom;          /* line, or polygon when is_polygon */
    int is_polygon;
    gw_values head;        /* one value or one per vertex */
    gw_src src;
} gw_fixed_spec;

typedef struct {
    char *name;
    gw_path line;
    gw_values stage, bed_bottom, bed_conductance;   /* per length, L/T */
    gw_src src;
} gw_stream_spec;

typedef struct {
    char *name;
    gw_path line;
    gw_values elevation, conductance;                /* per length, L/T */
    gw_src src;
} gw_drain_spec;

typedef struct {
    char *name;
    double x, y;           /* copied from `at` once it is known */
    double pumping;        /* L^3/T, positive withdraws */
    char *pumping_field;   /* {field: F}: from the layer's attribute F (owned) */
    gw_path at;            /* one vertex; or a layer form until resolved */
    gw_src src;
} gw_well_spec;

typedef struct {
    char *name;
    double x, y;           /* copied from `at` once it is known */
    double head;           /* NAN when not given */
    char *head_field;      /* {field: F}: from the layer's attribute F (owned) */
    gw_path at;
    gw_src src;
} gw_obs_spec;

typedef struct {
    char *name;
    gw_path polygon;       /* n == 0: everywhere */
    double head;           /* head beyond the aquitard */
    double resistance;     /* T */
    gw_src src;
} gw_leakage_spec;

typedef struct {
    char *name;
    gw_path line;
    gw_src src;
} gw_transect_spec;

/* Cross-section top (aquifer.type: section only).  The water table fixes
 * the cells its line crosses at `elevation` (per vertex, linear along the
 * line; when not given, the line's own elevations) and makes every cell
 * above it in the same column inactive.  A seepage face lets water out,
 * never in, where its line lies above `elevation` (model_build.c). */
typedef struct {
    char *name;
    gw_path line;
    gw_values elevation;   /* n == 0: the line's own elevations */
    gw_src src;
} gw_water_table_spec;

typedef struct {
    char *name;
    gw_path line;
    double elevation;      /* the face starts above this elevation */
    gw_src src;
} gw_seepage_spec;

typedef struct {
    char *path;                 /* the model file as given */
    char *dir;                  /* its directory, for relative paths */
    char *title;
    char *length_unit, *time_unit;

    gw_grid grid;
    char *crs;                  /* NULL when not given */

    gw_aquifer_type aquifer_type;
    gw_property conductivity, thickness, bottom, anisotropy, porosity;
    gw_path active;             /* n == 0: every cell active */
    char *active_raster;        /* mask raster (non-zero = active, majority per cell); NULL: none */
    int active_band;

    gw_property recharge;       /* rate + zones */

    gw_fixed_spec *fixed;      int nfixed;
    gw_stream_spec *streams;   int nstreams;
    gw_drain_spec *drains;     int ndrains;
    gw_well_spec *wells;       int nwells;
    gw_obs_spec *obs;          int nobs;
    gw_leakage_spec *leakage;  int nleakage;
    gw_water_table_spec *water_table;   /* section only; NULL: none */
    gw_seepage_spec *seepage;  int nseepage;

    /* analysis: */
    int divides;                /* default 1 */
    double *travel_times; int ntravel_times;
    gw_transect_spec *transects; int ntransects;
    int capture;                /* 1 when analysis.capture given or wells exist */

    /* output: */
    int maps;                   /* default 1; 0: no maps and no report.html */
    unsigned map_set;           /* GW_MAP_* bits drawn when maps is on; default GW_MAP_ALL */
    double contour_interval;    /* 0: automatic */
    int map_width;              /* pixels, default 1400 */

    /* solver: */
    double head_tol, resid_tol; int max_iter;
} gw_model;

/* output.maps as a list names the maps to draw (true: all of them). */
enum {
    GW_MAP_HEAD = 1,          /* head.png */
    GW_MAP_CATCHMENTS = 2,    /* catchments.png */
    GW_MAP_BUDGET = 4,        /* budget.png */
    GW_MAP_PROFILES = 8,      /* profile_N.png, and sweep_profile_*.png in sweeps */
    GW_MAP_ALL = 15
};

/* Parse and validate a model file.  On any problem returns NULL with a
 * message "FILE:LINE:COL: what is wrong (key or feature name)"; several
 * problems are listed one per line when they can all be found. */
gw_model *gw_model_load(const char *path, gw_error *err);

/* Same, from a string (tests, sweeps).  `path` names it in messages and sets
 * the directory for relative paths. */
gw_model *gw_model_load_string(const char *text, const char *path, gw_error *err);

void gw_model_free(gw_model *m);

/* Put the model on its grid.  Errors name the feature and the cell or map
 * position (a line that misses the grid, a well outside it, ...). */
gw_problem *gw_model_build(const gw_model *m, gw_error *err);

#endif
