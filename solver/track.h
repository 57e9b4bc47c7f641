/* Particle tracking by Pollock's semi-analytical method (Pollock 1988,
 * "Semianalytical computation of path lines for finite-difference models",
 * Ground Water 26(6); Pollock 1989, USGS Open-File Report
 * 89-381).  Within a cell each velocity component varies linearly between
 * its two faces, so the time to reach each face has a closed form
 * (t = ln(v_face / v_p) / A, A = velocity gradient) and no step size is
 * involved.  Seepage velocity at a face: v = q / (face length x saturated
 * thickness x porosity), with the cell's own thickness and porosity.
 *
 * Tracking runs forward (with the flow) or backward (against it).  A path
 * ends for exactly one recorded reason (gw_track_end).  Weak sinks -- cells
 * whose sink takes only part of the water passing through -- follow an
 * explicit rule, and the share of water the path "survives" when it passes
 * one is reported, never hidden. */
#ifndef GW_TRACK_H
#define GW_TRACK_H

#include "error.h"
#include "flowfield.h"

typedef enum {
    GW_END_NONE = 0,      /* still moving (internal) */
    GW_END_SINK,          /* stopped in a cell with a sink (forward) or source (backward) */
    GW_END_STOP_CELL,     /* reached a cell in the caller's stop mask */
    GW_END_BOUNDARY,      /* tried to leave the grid */
    GW_END_INACTIVE,      /* started in or tried to enter an inactive or dry cell */
    GW_END_STAGNATION,    /* velocity vanishes inside a cell that has no sink/source */
    GW_END_TIME,          /* reached the time limit */
    GW_END_MAX_STEPS      /* crossed the maximum number of cells */
} gw_track_end;

/* Report word for an end reason ("sink", "boundary", ...). */
const char *gw_track_end_name(gw_track_end e);

/* What to do in a cell whose sink (forward; source when backward) takes
 * only part of the water passing through it. */
typedef enum {
    GW_WEAK_STOP = 0,     /* stop in every cell with a sink */
    GW_WEAK_PASS,         /* stop only where the cell has no way out */
    GW_WEAK_THRESHOLD     /* stop where the sink takes >= weak_threshold of the water */
} gw_weak_rule;

typedef struct {
    int backward;                 /* 0 forward, 1 backward */
    double max_time;              /* stop after this travel time (<= 0: unlimited) */
    long max_steps;               /* cell crossings (<= 0: 4 (nx + ny) + 1000) */
    gw_weak_rule weak;            /* default GW_WEAK_THRESHOLD */
    double weak_threshold;        /* default 0.5 (common practice: majority rule) */
    /* Optional, borrowed, length ncells: nonzero cells always stop the path
     * on entry (e.g. the cells of the well whose capture zone is wanted);
     * the value found there is returned in gw_track_result.stop_value, so
     * callers can also mark cells whose outcome is already known. */
    const unsigned char *stop_mask;
    int record_path;              /* keep the vertices of the path */
    int no_length;                /* skip the path length (result length 0): one square
                                   * root less per cell, for callers that ignore it */
    /* Optional, borrowed: per-cell data from gw_track_cells_new for the
     * same flow field; used when its direction and weak-sink rule match
     * these options.  Same paths, faster when many are tracked. */
    const struct gw_track_cells *cells;
    /* Optional: called each time the path crosses a face from cell k into
     * neighbour nk (not at a corner), with the crossing's position along
     * the face (metres from its west end for a north/south face, from its
     * south end for an east/west face).  A nonzero return stops the path
     * there as a stop-mask cell would (GW_END_STOP_CELL, stop_value = the
     * return), so callers that already know a nearby path's fate can end
     * this one early. */
    int (*face_hook)(void *ctx, int k, int nk, double along);
    void *face_ctx;
} gw_track_options;

void gw_track_options_default(gw_track_options *o);

/* Tracking data of every cell in one compact table (about 64 bytes a
 * cell), for callers that track many paths on one flow field: direction
 * and weak-sink rule are taken from o.  NULL on allocation failure. */
typedef struct gw_track_cells gw_track_cells;
gw_track_cells *gw_track_cells_new(const gw_flowfield *f, const gw_track_options *o,
                                   gw_error *err);
void gw_track_cells_free(gw_track_cells *t);

typedef struct {
    gw_track_end end;
    double x, y;          /* end position, map coordinates */
    int cell;             /* cell where the path ended (-1 outside the grid) */
    int feature;          /* forward sink end: feature taking the sink there; else -1 */
    double time;          /* travel time, T (always >= 0, also when backward) */
    double length;        /* path length, L (sum of straight pieces per cell) */
    long steps;           /* cells crossed */
    /* Share of the cell's throughput taken by the sink (source when
     * backward) of the end cell; 1 for a strong sink, 0 when not a sink. */
    double end_fraction;
    int stop_value;       /* GW_END_STOP_CELL: stop_mask value of the end cell */
    /* Weak sinks passed through: their number, and the product of
     * (1 - sink share) over them, i.e. the share of the water at the start
     * that is still on this path at its end (fully mixed cells assumed). */
    int weak_passed;
    double retained;
    /* Path vertices (entry point of every cell and the end) when
     * record_path is set; owned, free with gw_track_result_free. */
    double *px, *py;
    int npath, cap;
} gw_track_result;

/* Track one particle from map point (x, y).  Returns 0 (the result says how
 * the path ended) or -1 on allocation failure while recording the path. */
int gw_track(const gw_flowfield *f, double x, double y, const gw_track_options *o,
             gw_track_result *r, gw_error *err);

void gw_track_result_free(gw_track_result *r);

/* Whether a path stops at the sink (forward; source when backward) of
 * cell k under o's weak-sink rule, ignoring o->stop_mask; *frac gets the
 * share of the cell's throughput that the sink takes (0 without one).
 * The same test gw_track applies on entering a cell. */
int gw_track_sink_stops(const gw_flowfield *f, int k, const gw_track_options *o, double *frac);

/* Seepage velocity (vx east, vy north) at map point (x, y), L/T, from the
 * same linear interpolation the tracking uses; 0/0 outside active cells. */
void gw_track_velocity(const gw_flowfield *f, double x, double y, double *vx, double *vy);

#endif
