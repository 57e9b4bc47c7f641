/* The discretized groundwater problem: everything the solver needs, already
 * placed on the grid.  No file formats here: io/ builds this from a model
 * file; tests build it directly.
 *
 * Units are the user's (length L, time T).  Sign convention everywhere:
 * a positive flux ENTERS the aquifer. */
#ifndef GW_PROBLEM_H
#define GW_PROBLEM_H

#include "error.h"
#include "grid.h"

typedef enum {
    GW_CONFINED = 0,   /* T = K * thickness, fixed */
    GW_UNCONFINED,     /* T = K * (h - bottom), Dupuit */
    GW_SECTION         /* vertical section per unit width: T = K, y is elevation */
} gw_aquifer_type;

typedef enum {
    GW_FEAT_RECHARGE = 0,
    GW_FEAT_FIXED_HEAD,
    GW_FEAT_STREAM,
    GW_FEAT_DRAIN,
    GW_FEAT_WELL,
    GW_FEAT_LEAKAGE
} gw_feature_type;

/* Report word for a feature type ("fixed_head", "stream", ...). */
const char *gw_feature_type_name(gw_feature_type t);

typedef struct {
    char *name;              /* owned */
    gw_feature_type type;
} gw_feature;

/* Head-dependent exchange between one cell and an outside water body.
 * Flux into the aquifer q:
 *   stream : cond * (ref - max(h, floor))   floor = bed bottom
 *   drain  : cond * (ref - h) if h > ref, else 0   (floor = ref)
 *   leakage: cond * (ref - h)                      (floor = -HUGE_VAL) */
typedef enum { GW_LINK_STREAM = 0, GW_LINK_DRAIN, GW_LINK_LEAKAGE } gw_link_kind;

typedef struct {
    int cell;
    int feature;       /* index into gw_problem.features */
    gw_link_kind kind;
    double cond;       /* L^2/T: e.g. bed conductance per length x length in cell */
    double ref;        /* stage, drain elevation, or head beyond the aquitard */
    double floor;      /* see above */
} gw_link;

typedef struct {
    int cell;
    int feature;
    double rate;       /* L^3/T, positive withdraws water from the aquifer */
    double x, y;       /* map position (for observation-style interpolation, tracking) */
} gw_well;

typedef struct {
    gw_grid grid;
    gw_aquifer_type type;

    /* Per-cell arrays, length nx*ny, all owned. */
    unsigned char *active;   /* 1 = takes part */
    double *k;               /* hydraulic conductivity along x, L/T */
    double *anis;            /* Ky/Kx (section: Kvertical/Khorizontal) */
    double *thick;           /* confined saturated thickness, L (unused otherwise) */
    double *bottom;          /* unconfined base elevation, L (unused otherwise) */
    double *recharge;        /* L/T, positive into the aquifer */
    double *porosity;        /* effective porosity, for travel times */
    double *fixed;           /* fixed head where fixed_feature >= 0 */
    int *fixed_feature;      /* -1: not fixed; else feature index */

    gw_link *links;  int nlinks;
    gw_well *wells;  int nwells;
    gw_feature *features; int nfeatures;   /* feature 0 is always recharge */
} gw_problem;

/* Allocate a problem with every per-cell array for grid g, all cells active,
 * no fixed heads, zero recharge, k = 1, anis = 1, thick = 1, bottom = 0,
 * porosity = 0.25, and the recharge feature named "Recharge". */
gw_problem *gw_problem_new(const gw_grid *g, gw_aquifer_type type, gw_error *err);
void gw_problem_free(gw_problem *p);

/* Append a feature; returns its index or -1 (allocation failure). */
int gw_problem_add_feature(gw_problem *p, const char *name, gw_feature_type t, gw_error *err);
int gw_problem_add_link(gw_problem *p, const gw_link *l, gw_error *err);
int gw_problem_add_well(gw_problem *p, const gw_well *w, gw_error *err);

/* Deep copy (for sweeps that perturb values). */
gw_problem *gw_problem_clone(const gw_problem *p, gw_error *err);

/* Check the problem can have a steady solution: every 4-connected group of
 * active, non-fixed cells must touch a fixed head, or hold a stream, drain or
 * leakage link.  On failure the message gives the group's extent in map
 * coordinates. */
int gw_problem_check_bounded(const gw_problem *p, gw_error *err);
/* The same for one state of the links during the iterations (link_on[i] = 1
 * when link i is head-dependent): fails, naming the area and the iteration,
 * when drains gone dry or perched streams leave an area without a boundary. */
int gw_problem_check_bounded_state(const gw_problem *p, const unsigned char *link_on, int iteration,
                                   gw_error *err);

#endif
