/* section.png: a vertical cross-section drawn with vertical exaggeration.
 * Flow systems shaded (local, intermediate, regional: three lightness
 * steps, so a greyscale copy keeps them apart), equipotentials (head
 * contours), flow lines spaced by equal flow, the dividing streamlines
 * between systems, the water table with its recharge and discharge areas,
 * hinge points, and head-dependent cells (seepage faces, drains, streams).
 * The subtitle states the vertical exaggeration. */
#ifndef GW_MAP_SECTION_H
#define GW_MAP_SECTION_H

#include "../solver/error.h"
#include "../solver/problem.h"
#include "../solver/section.h"
#include "../solver/solve.h"

typedef struct {
    const char *title;
    const char *length_unit, *time_unit;
    int width;                 /* px, 0: 1400 */
    double contour_interval;   /* head between equipotentials, 0: automatic */
    int nflow_lines;           /* 0: 36 */
} gw_section_map;

/* The vertical exaggeration the map will use for grid g at `width` px: a
 * round number (1, 2, 2.5, 5 x 10^k) that makes the section about 0.4 times
 * as tall as it is wide on the page, never below 1. */
double gw_section_map_exaggeration(const gw_problem *p, int width);

int gw_map_section_write(const gw_section_map *o, const gw_problem *p, const gw_solution *sol,
                         const gw_section *s, const char *path, gw_error *err);

#endif
