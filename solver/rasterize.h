/* Putting map geometry onto the grid: which cells a polyline crosses (and how
 * much of it lies in each), and which cells a polygon covers. */
#ifndef GW_RASTERIZE_H
#define GW_RASTERIZE_H

#include "error.h"
#include "grid.h"

/* One straight piece of a polyline lying inside one cell.  A cell crossed
 * twice by a curving line gets two pieces. */
typedef struct {
    int cell;        /* k = row * nx + col */
    double length;   /* length of the piece in map units */
    double s_mid;    /* distance along the whole line to the piece's midpoint */
    int segment;     /* index of the line segment (vertex i to i+1) it lies on */
} gw_line_piece;

/* Cut polyline xy[0..2*npts) (x, y pairs) at every grid line.  Parts outside
 * the grid are dropped.  *pieces is malloc'ed (caller frees); *npieces may be
 * 0 when the line misses the grid.  A one-point "line" yields the cell holding
 * the point with length 0.  Returns -1 only on allocation failure. */
int gw_rasterize_line(const gw_grid *g, const double *xy, int npts,
                      gw_line_piece **pieces, int *npieces, gw_error *err);

/* Cumulative distance along the polyline at each vertex (cum[0] = 0). */
void gw_polyline_chainage(const double *xy, int npts, double *cum);

/* Value at distance s along a line with one value per vertex (linear in
 * between, by distance); nvals == 1 means a constant. */
double gw_interp_chainage(const double *cum, const double *vals, int nvals, double s);

/* Mark mask[k] = value for every cell whose centre lies inside the closed
 * polygon xy[0..2*npts) (even-odd rule; closing the ring is optional).
 * Returns the number of cells marked. */
long gw_rasterize_polygon(const gw_grid *g, const double *xy, int npts,
                          unsigned char *mask, unsigned char value);

/* Point-in-polygon test (even-odd rule). */
int gw_point_in_polygon(double x, double y, const double *xy, int npts);

#endif
