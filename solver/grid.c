#include "grid.h"

#include <math.h>

int gw_grid_locate(const gw_grid *g, double x, double y, int *col, int *row)
{
    double u = gw_grid_u(g, x), v = gw_grid_v(g, y);
    if (!(u >= 0.0 && u <= g->nx && v >= 0.0 && v <= g->ny))
        return -1;
    int c = (int)floor(u), r = (int)floor(v);
    if (c >= g->nx) c = g->nx - 1;
    if (r >= g->ny) r = g->ny - 1;
    *col = c;
    *row = r;
    return 0;
}
