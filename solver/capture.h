/* Capture zones (steady state, unlimited time) and travel-time zones of
 * pumping wells, with the split of each well's water by source.
 *
 * Zones: seeds on a lattice of s x s points per cell.  A "reach share"
 * on the cell graph (the water of each cell that the tracking rules send to
 * the well: 1 in the well's cells, 0 at sinks that stop a path, else the
 * flux-weighted mean over the outflow faces) decides most seeds at once:
 * in cells whose share is 1 (to 1e-9) every path ends in the well, in cells
 * whose share is 0 none does.  Only seeds in the band between are tracked
 * forward (Pollock, see track.h), and each path stops as soon as it enters a
 * decided cell, so tracking costs (band seeds) x (cells crossed in the
 * band), not (zone seeds) x (path length).  A seed is inside when its path
 * ends in a cell the well takes water from (those cells always stop a
 * path: a conservative choice for weak well cells, whose share is
 * reported).  The boundary between inside and outside seeds is located by
 * bisection along each lattice edge and traced into closed rings (marching
 * squares), so polygons are refined well below the cell size.  Travel
 * times are tracked only for captured seeds near the well: outwards from
 * the well's cells while some seed of a cell arrives within the longest
 * requested time, each path cut off at that time.
 *
 * Source split: a flux-weighted partition on the cell-face fluxes.  w[k],
 * the share of the water passing through cell k that ends in the well, is
 * found downstream-first: w = (well withdrawal in k + sum over outflow faces
 * q w_neighbour) / (all water leaving k).  The well's water from feature f
 * is then the sum of f's inflow in each cell times w.  Cells are assumed
 * fully mixed, and the shares add up to the pumping rate to round-off. */
#ifndef GW_CAPTURE_H
#define GW_CAPTURE_H

#include "error.h"
#include "flowfield.h"
#include "problem.h"
#include "track.h"

/* A closed ring of map points (not repeated at the end).  area is signed:
 * positive for an outer boundary (counter-clockwise), negative for a hole. */
typedef struct {
    double *x, *y;
    int n;
    double area;
} gw_capring;

typedef struct {
    double time;      /* travel-time limit, T; HUGE_VAL for the capture zone */
    double area;      /* L^2, holes subtracted */
    gw_capring *ring;
    int nring;
    int outer;        /* index of the largest outer ring, -1 when empty */
} gw_capzone;

typedef struct {
    int feature;            /* the well's feature index */
    double rate;            /* total pumping, L^3/T */
    gw_capzone capture;        /* unlimited time */
    gw_capzone *ttz;           /* one per requested travel time, ascending */
    int nttz;
    /* Well's water by source feature, L^3/T, length nfeatures (feature 0 is
     * recharge); sums to `rate` to round-off. */
    double *source;
    /* Share of the water entering the well's cells that the well takes
     * (1 = strong sink; below 1 the zone is drawn as if it took all). */
    double well_cell_share;
    /* Captured seeds whose paths passed a weak sink of another feature:
     * their share of all captured seeds, and the smallest share of water a
     * captured path kept after passing them (see gw_track_result.retained). */
    double weak_pass_share;
    double min_retained;
    long seeds;                     /* seeds tracked for the capture zone */
    /* Seeds tracked, by end reason; "stop_cell" includes paths stopped on
     * entering a cell decided by the reach share. */
    long ends[GW_END_MAX_STEPS + 1];
    long classified;                /* seeds decided by the reach share alone */
    /* Paths (seeds and edge bisections) stopped between known paths of
     * the same fate instead of followed to their end (path_fate.h). */
    long known_stops;
} gw_capture_zone;

typedef struct {
    int nzone;
    gw_capture_zone *zone;   /* one per pumping well feature, feature order */
    int nfeatures;           /* length of each source array */
} gw_capture;

typedef struct {
    int seeds_per_cell;      /* s: s x s seeds per cell (default 2) */
    int refine;              /* bisection steps per boundary crossing (default 10) */
    const double *times;     /* travel-time limits, T (borrowed; may be NULL) */
    int ntimes;
    gw_weak_rule weak;       /* rule at sinks of other features (default threshold) */
    double weak_threshold;   /* default 0.5 */
    /* Threads tracking paths (<= 0: the online CPUs, at most 8).  The
     * zones are the same, bit for bit, whatever the number. */
    int threads;
    /* 1: follow every path to its end instead of stopping it between
     * known paths of the same fate (see solver/path_fate.h); slower, the
     * same zones -- kept for checks. */
    int track_all;
} gw_capture_options;

void gw_capture_options_default(gw_capture_options *o);

/* Ring structure of a zone: for a hole (area < 0), the index of the
 * smallest outer ring that contains it; -1 for an outer ring or a hole
 * found in none.  A zone is then the outer rings, each minus its holes. */
int gw_capzone_parent(const gw_capzone *z, int ring);

/* Capture zones of every pumping well feature (wells with rate > 0), from
 * the flow field of p's solution. */
int gw_capture_compute(const gw_problem *p, const gw_flowfield *f,
                       const gw_capture_options *o, gw_capture *out, gw_error *err);
void gw_capture_free(gw_capture *c);

#endif
