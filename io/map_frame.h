/* The common layout of a plan-view map: title band, map frame with map
 * coordinates on its edges, a side panel holding the legend, north arrow and
 * scale bar, and the symbols both maps share (wells, divides, stagnation
 * points, feature lines). */
#ifndef GW_MAP_FRAME_H
#define GW_MAP_FRAME_H

#include "../solver/budget.h"
#include "../solver/grid.h"
#include "../solver/problem.h"
#include "map_canvas.h"
#include "map_labels.h"
#include "map_layers.h"

/* Text placed during layout and drawn last, on top of everything. */
typedef struct {
    gw_label_box box;
    char text[120];
    gw_text_style st;
} gw_map_text;

typedef struct {
    gw_map_canvas cv;
    gw_label_set labels;       /* everything placed inside the frame */
    const gw_grid *g;
    double fs;                 /* font scale */
    double panel_x0, panel_x1; /* legend panel, px */
    double legend_y;           /* next legend row */
    double legend_bottom;      /* rows must stay above (north arrow, scale bar) */
    gw_map_text *text;         /* queued labels (owned) */
    int ntext, captext;
} gw_map_page;

/* Lay out a page for grid g at `width` px (0: 1400) and draw the title
 * band.  The frame shows the whole grid. */
int gw_map_page_begin(gw_map_page *pg, const gw_grid *g, int width, const char *title,
                      const char *subtitle, gw_error *err);
/* Same, with the page made tall enough for a legend `legend_px` high (at
 * 1400 px width) above the scale bar and north arrow. */
int gw_map_page_begin_legend(gw_map_page *pg, const gw_grid *g, int width, const char *title,
                             const char *subtitle, double legend_px, gw_error *err);
void gw_map_page_free(gw_map_page *pg);

/* Queued labels, frame outline, coordinate ticks and labels, north arrow,
 * scale bar and the footer.  Call after the map content. */
void gw_map_page_finish(gw_map_page *pg, const char *length_unit, const char *crs);

/* Legend: a heading, then rows of (symbol, text).  gw_map_legend_row writes
 * the text and returns the centre of the symbol slot in (*sx, *sy). */
void gw_map_legend_heading(gw_map_page *pg, const char *text);
void gw_map_legend_row(gw_map_page *pg, const char *text, double *sx, double *sy);
void gw_map_legend_gap(gw_map_page *pg, double px);

/* Symbols. */
void gw_map_sym_well(cairo_t *cr, double x, double y, double radius, int injecting);
void gw_map_sym_stag(cairo_t *cr, double x, double y, double size, gw_map_stag_type t);
void gw_map_sym_obs(cairo_t *cr, double x, double y, double size);
/* Dashed divide with a light casing. */
void gw_map_stroke_divide(cairo_t *cr, double width);

/* Path of a map polyline on the canvas (closed when polygon). */
void gw_map_path_add(gw_map_page *pg, const gw_map_path *p, int polygon);

/* Keep labels off a drawn map line: record path p (map coordinates) in
 * pg->labels as an obstacle `clear` px wide on each side, under `tag`.
 * Returns 0, -1 out of memory. */
int gw_map_reserve_path(gw_map_page *pg, const gw_map_path *p, int polygon, double clear, int tag);

/* Tags of the obstacle lines the maps reserve. */
enum { GW_MAP_TAG_GEOM = 0, GW_MAP_TAG_DIVIDE = 100000, GW_MAP_TAG_ZONE = 200000 };

/* Reserve every stream and drain line (clearance line_clear px) and every
 * divide (divide_clear px), so no label is put across them. */
int gw_map_reserve_features(gw_map_page *pg, const gw_problem *p, const gw_map_layers *l,
                            double line_clear, double divide_clear);

/* One name per drawn feature, beside its line (`off` px from it, on
 * whichever side has room), near the middle of the line.  Drains take
 * drain_st, the others st. */
int gw_map_place_feature_names(gw_map_page *pg, const gw_problem *p, const gw_map_layers *l,
                               const gw_text_style *st, const gw_text_style *drain_st, double off);

/* Radius (px) of a well symbol for |rate| against the largest |rate|. */
double gw_map_well_radius(const gw_map_page *pg, double rate, double maxrate);

/* Layout happens before drawing so that labels avoid symbols and contour
 * lines can be broken under their labels:
 *   gw_map_place_*  reserve symbol areas and queue labels;
 *   gw_map_draw_*   draw the symbols (labels come at gw_map_page_finish). */
int gw_map_place_wells(gw_map_page *pg, const gw_problem *p);
void gw_map_draw_wells(gw_map_page *pg, const gw_problem *p);
int gw_map_place_stagnation(gw_map_page *pg, const gw_map_layers *l);
void gw_map_draw_stagnation(gw_map_page *pg, const gw_map_layers *l);
void gw_map_draw_divides(gw_map_page *pg, const gw_map_layers *l);

/* Queue text in box b (rotated by b->angle). */
int gw_map_queue_text(gw_map_page *pg, const gw_label_box *b, const char *text,
                      const gw_text_style *st);

/* Place a point label near (x, y) px at the first free spot of eight
 * around it, `off` px away, and queue it.  Returns 1 placed, 0 no room,
 * -1 out of memory. */
int gw_map_point_label(gw_map_page *pg, double x, double y, double off, const char *text,
                       const gw_text_style *st);

/* Shared text styles. */
gw_text_style gw_map_style(const gw_map_page *pg, double size, int bold);

#endif
