/* Head contours.  GDAL traces them (GDALContourGenerateEx on an in-memory
 * raster of cell-centred heads into an in-memory vector layer); this module
 * picks round intervals and hands back plain polylines in map coordinates. */
#ifndef GW_MAP_CONTOUR_H
#define GW_MAP_CONTOUR_H

#include "../solver/error.h"
#include "../solver/grid.h"

typedef struct {
    double level;
    double *xy;        /* x0, y0, x1, y1, ... map coordinates (owned) */
    int n;             /* vertices */
    int closed;        /* first vertex == last vertex */
} gw_contour_line;

typedef struct {
    gw_contour_line *line;   /* owned */
    int nlines;
    double interval;         /* spacing of the levels */
} gw_contour_set;

/* A round interval (1, 2, 2.5 or 5 times a power of ten) giving about
 * `target` contour levels across [hmin, hmax]. */
double gw_contour_nice_interval(double hmin, double hmax, int target);

/* Contours of the cell-centred field `head` (NAN = inactive, left out) at
 * every multiple of `interval`.  Lines are linear interpolations between
 * cell centres. */
int gw_contour_trace(const gw_grid *g, const double *head, double interval,
                     gw_contour_set *out, gw_error *err);

void gw_contour_set_free(gw_contour_set *s);

/* Index (0, 1, ...) of `level` as a multiple of interval. */
long gw_contour_index(double level, double interval);

/* Every how many intervals a "major" (heavier, labelled first) contour
 * falls, so that majors land on round values: 5 for intervals 1 and 2
 * (x 10^k), 4 for 2.5, 2 for 5. */
int gw_contour_major_every(double interval);

#endif
