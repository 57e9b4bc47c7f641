/* A drawing surface for one map or chart: a cairo image surface, the
 * transform from map coordinates to pixels, text helpers, and the PNG
 * writer (libpng, with tEXt chunks naming title, units, CRS and program
 * version so a copied image still says what it shows). */
#ifndef GW_MAP_CANVAS_H
#define GW_MAP_CANVAS_H

#include <cairo.h>

#include "../solver/error.h"

typedef struct {
    cairo_surface_t *surface;
    cairo_t *cr;
    int width, height;          /* pixels */
    double font_scale;          /* 1 at 1400 px wide; text grows with the image */
    /* Map frame (pixels) and the map window it shows (equal scale in x, y). */
    double fx0, fy0, fx1, fy1;
    double xmin, ymin, xmax, ymax;
    double scale;               /* pixels per map length unit */
} gw_map_canvas;

/* White canvas of width x height pixels. */
int gw_canvas_init(gw_map_canvas *c, int width, int height, gw_error *err);
void gw_canvas_free(gw_map_canvas *c);

/* Fit the map window [xmin,xmax] x [ymin,ymax] into the pixel box
 * (bx0,by0)-(bx1,by1) at one scale, centred; sets the frame. */
void gw_canvas_fit(gw_map_canvas *c, double bx0, double by0, double bx1, double by1,
                   double xmin, double ymin, double xmax, double ymax);

static inline double gw_canvas_px(const gw_map_canvas *c, double x)
{
    return c->fx0 + (x - c->xmin) * c->scale;
}
static inline double gw_canvas_py(const gw_map_canvas *c, double y)
{
    return c->fy1 - (y - c->ymin) * c->scale;
}

/* Text.  size is in points at 1400 px width (scaled by font_scale).
 * halign: 0 left, 0.5 centre, 1 right; valign likewise (0 top, 1 bottom,
 * measured on the font's ascent/descent so lines of text align).  A
 * non-zero halo draws a white outline first so text stays legible on
 * colour fills. */
typedef struct {
    double size;
    int bold;
    double halign, valign;
    double halo;            /* outline width in px, 0 = none */
    double r, g, b;
} gw_text_style;

void gw_canvas_text(gw_map_canvas *c, double x, double y, const char *s, const gw_text_style *st);
/* Width and height (ascent + descent) of s in pixels. */
void gw_canvas_text_size(gw_map_canvas *c, const char *s, const gw_text_style *st,
                         double *w, double *h);
/* Select the style's font on c->cr (for rotated text drawn by the caller). */
void gw_canvas_font(gw_map_canvas *c, const gw_text_style *st);

/* Metadata written as PNG tEXt chunks (NULL fields are left out). */
typedef struct {
    const char *title;
    const char *units;      /* e.g. "head in m; flow in m3/day" */
    const char *crs;
    const char *description;
} gw_png_meta;

/* Write the canvas as an RGB PNG.  "Software" names gwdivide and its
 * version. */
int gw_canvas_write_png(gw_map_canvas *c, const char *path, const gw_png_meta *meta,
                        gw_error *err);

/* Round number formatting: at most `sig` significant digits, no trailing
 * zeros ("12.5", "1200", "0.004").  Returns buf. */
char *gw_fmt_num(char *buf, int len, double v, int sig);

#endif
