/* The cell-centred model grid and its map coordinates.
 *
 * Cells are numbered k = row * nx + col.  Rows count from the NORTH edge
 * (row 0 is the top row, as in a raster), columns from the west edge, so a
 * head array can be written to a GeoTIFF without flipping.  In cross-section
 * mode "north" is simply the top of the section (highest elevation). */
#ifndef GW_GRID_H
#define GW_GRID_H

#include <stddef.h>

typedef struct {
    int nx, ny;        /* columns, rows */
    double x0, y0;     /* lower-left (south-west) corner in map coordinates */
    double dx, dy;     /* cell size along x and y */
} gw_grid;

static inline size_t gw_grid_ncells(const gw_grid *g) { return (size_t)g->nx * (size_t)g->ny; }
static inline double gw_grid_xc(const gw_grid *g, int col) { return g->x0 + (col + 0.5) * g->dx; }
static inline double gw_grid_yc(const gw_grid *g, int row) { return g->y0 + (g->ny - row - 0.5) * g->dy; }
static inline double gw_grid_ytop(const gw_grid *g) { return g->y0 + g->ny * g->dy; }

/* Cell holding map point (x, y).  Returns 0 and sets col/row when the point
 * lies inside the grid (points on the east/north edge belong to the last
 * cell), -1 otherwise. */
int gw_grid_locate(const gw_grid *g, double x, double y, int *col, int *row);

/* Fractional cell coordinates: u = (x - x0)/dx, v = (ytop - y)/dy. */
static inline double gw_grid_u(const gw_grid *g, double x) { return (x - g->x0) / g->dx; }
static inline double gw_grid_v(const gw_grid *g, double y) { return (gw_grid_ytop(g) - y) / g->dy; }

#endif
