#include "map_frame.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "map_contour.h"

#ifndef GWDIVIDE_VERSION
#define GWDIVIDE_VERSION "dev"
#endif

static const double PI = 3.14159265358979323846;

gw_text_style gw_map_style(const gw_map_page *pg, double size, int bold)
{
    (void)pg;
    gw_text_style st = {size, bold, 0, 0.5, 0, 0.1, 0.1, 0.12};
    return st;
}

int gw_map_page_begin(gw_map_page *pg, const gw_grid *g, int width, const char *title,
                      const char *subtitle, gw_error *err)
{
    return gw_map_page_begin_legend(pg, g, width, title, subtitle, 0, err);
}

int gw_map_page_begin_legend(gw_map_page *pg, const gw_grid *g, int width, const char *title,
                             const char *subtitle, double legend_px, gw_error *err)
{
    memset(pg, 0, sizeof *pg);
    if (width <= 0) width = 1400;
    if (width < 600) width = 600;
    if (width > 8000) width = 8000;
    double fs = width / 1400.0;
    double top = 84 * fs, left = 64 * fs, bottom = 50 * fs, panel = 330 * fs, gap = 34 * fs;
    double mapw = width - left - gap - panel - 16 * fs;
    double ew = g->nx * g->dx, eh = g->ny * g->dy;
    double maph = mapw * eh / ew;
    if (maph > 1.25 * width) maph = 1.25 * width;
    if (maph < 690 * fs) maph = 690 * fs;   /* room for the legend; a wide grid is centred */
    /* The legend runs from top + 4 to height - 125 (scale bar, arrow). */
    if (maph < (legend_px + 4 + 125) * fs - bottom) maph = (legend_px + 4 + 125) * fs - bottom;
    int height = (int)ceil(top + maph + bottom);
    if (gw_canvas_init(&pg->cv, width, height, err) != 0) return -1;
    pg->g = g;
    pg->fs = fs;
    gw_canvas_fit(&pg->cv, left, top, left + mapw, top + maph, g->x0, g->y0, g->x0 + ew, g->y0 + eh);
    pg->panel_x0 = width - panel - 8 * fs;
    pg->panel_x1 = width - 12 * fs;
    pg->legend_y = top + 4 * fs;
    pg->legend_bottom = height - 125 * fs;
    gw_labels_init(&pg->labels, pg->cv.fx0 + 2, pg->cv.fy0 + 2, pg->cv.fx1 - 2, pg->cv.fy1 - 2, 3 * fs);

    gw_text_style t = gw_map_style(pg, 17, 1);
    t.valign = 0;
    gw_canvas_text(&pg->cv, left, 16 * fs, title && *title ? title : "Groundwater model", &t);
    if (subtitle) {
        gw_text_style s = gw_map_style(pg, 11, 0);
        s.valign = 0;
        s.r = s.g = s.b = 0.3;
        gw_canvas_text(&pg->cv, left, 50 * fs, subtitle, &s);
    }
    return 0;
}

void gw_map_page_free(gw_map_page *pg)
{
    gw_canvas_free(&pg->cv);
    gw_labels_free(&pg->labels);
    free(pg->text);
    pg->text = NULL;
    pg->ntext = pg->captext = 0;
}

int gw_map_queue_text(gw_map_page *pg, const gw_label_box *b, const char *text,
                      const gw_text_style *st)
{
    if (pg->ntext == pg->captext) {
        int nc = pg->captext ? 2 * pg->captext : 32;
        gw_map_text *nt = realloc(pg->text, (size_t)nc * sizeof *nt);
        if (!nt) return -1;
        pg->text = nt;
        pg->captext = nc;
    }
    gw_map_text *t = &pg->text[pg->ntext++];
    t->box = *b;
    snprintf(t->text, sizeof t->text, "%s", text);
    t->st = *st;
    return 0;
}

static void flush_text(gw_map_page *pg)
{
    cairo_t *cr = pg->cv.cr;
    for (int i = 0; i < pg->ntext; i++) {
        gw_map_text *t = &pg->text[i];
        gw_text_style s = t->st;
        s.halign = 0.5;
        s.valign = 0.5;
        cairo_save(cr);
        cairo_translate(cr, t->box.cx, t->box.cy);
        cairo_rotate(cr, t->box.angle);
        gw_canvas_text(&pg->cv, 0, 0, t->text, &s);
        cairo_restore(cr);
    }
}

void gw_map_legend_heading(gw_map_page *pg, const char *text)
{
    gw_text_style st = gw_map_style(pg, 11.5, 1);
    st.valign = 0;
    gw_canvas_text(&pg->cv, pg->panel_x0, pg->legend_y, text, &st);
    pg->legend_y += 28 * pg->fs;
}

void gw_map_legend_row(gw_map_page *pg, const char *text, double *sx, double *sy)
{
    double fs = pg->fs, rh = 25 * fs;
    gw_text_style st = gw_map_style(pg, 10.5, 0);
    double cy = pg->legend_y + 0.5 * rh;
    gw_canvas_text(&pg->cv, pg->panel_x0 + 48 * fs, cy, text, &st);
    *sx = pg->panel_x0 + 20 * fs;
    *sy = cy;
    pg->legend_y += rh;
}

void gw_map_legend_gap(gw_map_page *pg, double px)
{
    pg->legend_y += px * pg->fs;
}

void gw_map_path_add(gw_map_page *pg, const gw_map_path *p, int polygon)
{
    cairo_t *cr = pg->cv.cr;
    for (int i = 0; i < p->n; i++) {
        double x = gw_canvas_px(&pg->cv, p->xy[2 * i]), y = gw_canvas_py(&pg->cv, p->xy[2 * i + 1]);
        if (i == 0) cairo_move_to(cr, x, y); else cairo_line_to(cr, x, y);
    }
    if (polygon) cairo_close_path(cr);
}

int gw_map_reserve_path(gw_map_page *pg, const gw_map_path *p, int polygon, double clear, int tag)
{
    if (p->n < 2) return 0;
    double *pxy = malloc((size_t)p->n * 2 * sizeof(double));
    if (!pxy) return -1;
    for (int i = 0; i < p->n; i++) {
        pxy[2 * i] = gw_canvas_px(&pg->cv, p->xy[2 * i]);
        pxy[2 * i + 1] = gw_canvas_py(&pg->cv, p->xy[2 * i + 1]);
    }
    int rc = gw_labels_reserve_line(&pg->labels, pxy, p->n, polygon, clear, tag);
    free(pxy);
    return rc;
}

int gw_map_reserve_features(gw_map_page *pg, const gw_problem *p, const gw_map_layers *l,
                            double line_clear, double divide_clear)
{
    for (int i = 0; i < l->ngeoms; i++) {
        gw_feature_type t = p->features[l->geoms[i].feature].type;
        if (t != GW_FEAT_STREAM && t != GW_FEAT_DRAIN) continue;
        if (gw_map_reserve_path(pg, &l->geoms[i].path, l->geoms[i].polygon, line_clear,
                                GW_MAP_TAG_GEOM + i) != 0)
            return -1;
    }
    for (int i = 0; i < l->ndivides; i++)
        if (gw_map_reserve_path(pg, &l->divides[i].line, 0, divide_clear, GW_MAP_TAG_DIVIDE + i) != 0)
            return -1;
    return 0;
}

int gw_map_place_feature_names(gw_map_page *pg, const gw_problem *p, const gw_map_layers *l,
                               const gw_text_style *st, const gw_text_style *drain_st, double off)
{
    for (int i = 0; i < l->ngeoms; i++) {
        const gw_map_geom *ge = &l->geoms[i];
        const char *name = p->features[ge->feature].name;
        int n = ge->path.n;
        if (!name || n < 2) continue;
        const gw_text_style *s = p->features[ge->feature].type == GW_FEAT_DRAIN ? drain_st : st;
        double w, h;
        gw_canvas_text_size(&pg->cv, name, s, &w, &h);
        double *pxy = malloc((size_t)n * 4 * sizeof(double));
        if (!pxy) return -1;
        double *q = pxy + 2 * n;
        for (int k = 0; k < n; k++) {
            pxy[2 * k] = gw_canvas_px(&pg->cv, ge->path.xy[2 * k]);
            pxy[2 * k + 1] = gw_canvas_py(&pg->cv, ge->path.xy[2 * k + 1]);
        }
        /* The line shifted sideways by `off` plus half the text height: a
         * label laid along it sits beside the feature, not on it. */
        gw_label_box box;
        int got = 0;
        for (int side = -1; side <= 1 && !got; side += 2) {
            for (int k = 0; k < n; k++) {
                int a = k > 0 ? k - 1 : k, b = k + 1 < n ? k + 1 : k;
                double dx = pxy[2 * b] - pxy[2 * a], dy = pxy[2 * b + 1] - pxy[2 * a + 1];
                double L = hypot(dx, dy);
                double nx = L > 0 ? -dy / L : 0, ny = L > 0 ? dx / L : 0;
                double o = side * (0.5 * h + off);
                q[2 * k] = pxy[2 * k] + nx * o;
                q[2 * k + 1] = pxy[2 * k + 1] + ny * o;
            }
            got = gw_labels_along_line(&pg->labels, q, n, w, h, 1e9, &box, 1);
            if (got < 0) { free(pxy); return -1; }
        }
        free(pxy);
        if (got == 1 && gw_map_queue_text(pg, &box, name, s) != 0) return -1;
    }
    return 0;
}

void gw_map_sym_well(cairo_t *cr, double x, double y, double r, int injecting)
{
    cairo_save(cr);
    cairo_new_path(cr);
    cairo_arc(cr, x, y, r + 1.5, 0, 2 * PI);
    cairo_set_source_rgb(cr, 1, 1, 1);
    cairo_fill(cr);
    cairo_arc(cr, x, y, r, 0, 2 * PI);
    if (injecting) {
        cairo_set_source_rgb(cr, 1, 1, 1);
        cairo_fill_preserve(cr);
        cairo_set_source_rgb(cr, 0.45, 0.12, 0.35);
        cairo_set_line_width(cr, 2.2);
        cairo_stroke(cr);
    } else {
        cairo_set_source_rgb(cr, 0.45, 0.12, 0.35);   /* deep plum: not on the ramp */
        cairo_fill(cr);
    }
    cairo_arc(cr, x, y, r > 4 ? 2.2 : 1.2, 0, 2 * PI);
    cairo_set_source_rgb(cr, 1, 1, 1);
    cairo_fill(cr);
    cairo_restore(cr);
}

void gw_map_sym_obs(cairo_t *cr, double x, double y, double s)
{
    cairo_save(cr);
    cairo_new_path(cr);
    cairo_move_to(cr, x, y - s);
    cairo_line_to(cr, x + s, y);
    cairo_line_to(cr, x, y + s);
    cairo_line_to(cr, x - s, y);
    cairo_close_path(cr);
    cairo_set_source_rgb(cr, 1, 1, 1);
    cairo_fill_preserve(cr);
    cairo_set_source_rgb(cr, 0.1, 0.1, 0.12);
    cairo_set_line_width(cr, 1.8);
    cairo_stroke(cr);
    cairo_restore(cr);
}

void gw_map_sym_stag(cairo_t *cr, double x, double y, double s, gw_map_stag_type t)
{
    cairo_save(cr);
    cairo_new_path(cr);
    if (t == GW_STAG_SADDLE) {
        cairo_move_to(cr, x - s, y - s);
        cairo_line_to(cr, x + s, y + s);
        cairo_move_to(cr, x + s, y - s);
        cairo_line_to(cr, x - s, y + s);
        cairo_set_line_cap(cr, CAIRO_LINE_CAP_ROUND);
        cairo_set_source_rgb(cr, 1, 1, 1);
        cairo_set_line_width(cr, 5.5);
        cairo_stroke_preserve(cr);
        cairo_set_source_rgb(cr, 0.1, 0.1, 0.12);
        cairo_set_line_width(cr, 2.4);
        cairo_stroke(cr);
    } else {
        double d = (t == GW_STAG_MAXIMUM) ? -1 : 1;   /* apex up for a maximum */
        cairo_move_to(cr, x, y + d * s);
        cairo_line_to(cr, x + s, y - d * 0.7 * s);
        cairo_line_to(cr, x - s, y - d * 0.7 * s);
        cairo_close_path(cr);
        cairo_set_source_rgb(cr, 0.1, 0.1, 0.12);
        cairo_fill_preserve(cr);
        cairo_set_source_rgb(cr, 1, 1, 1);
        cairo_set_line_width(cr, 1.5);
        cairo_stroke(cr);
    }
    cairo_restore(cr);
}

void gw_map_stroke_divide(cairo_t *cr, double w)
{
    static const double dash[2] = {11, 6};
    cairo_save(cr);
    cairo_set_line_join(cr, CAIRO_LINE_JOIN_ROUND);
    cairo_set_source_rgba(cr, 1, 1, 1, 0.85);
    cairo_set_line_width(cr, w + 3);
    cairo_stroke_preserve(cr);
    cairo_set_dash(cr, dash, 2, 0);
    cairo_set_source_rgb(cr, 0.08, 0.08, 0.1);
    cairo_set_line_width(cr, w);
    cairo_stroke(cr);
    cairo_restore(cr);
}

double gw_map_well_radius(const gw_map_page *pg, double rate, double maxrate)
{
    double rmin = 5 * pg->fs, rmax = 14 * pg->fs;
    if (!(maxrate > 0)) return rmin;
    /* Area proportional to rate reads right; sqrt keeps small wells visible. */
    return rmin + (rmax - rmin) * sqrt(fabs(rate) / maxrate);
}

int gw_map_point_label(gw_map_page *pg, double x, double y, double off, const char *text,
                       const gw_text_style *st)
{
    double w, h;
    gw_canvas_text_size(&pg->cv, text, st, &w, &h);
    static const double dirs[8][2] = {{1, 0}, {1, -1}, {1, 1}, {-1, 0}, {-1, -1}, {-1, 1}, {0, -1}, {0, 1}};
    for (int k = 0; k < 8; k++) {
        double cx = x + dirs[k][0] * (off + 0.5 * w), cy = y + dirs[k][1] * (off + 0.5 * h);
        if (dirs[k][0] == 0) cx = x;
        gw_label_box b = {cx, cy, w, h, 0};
        int r = gw_labels_try(&pg->labels, &b);
        if (r < 0) return -1;
        if (r == 1) {
            gw_text_style s = *st;
            s.halo = s.halo > 0 ? s.halo : 2.5 * pg->fs;
            return gw_map_queue_text(pg, &b, text, &s) == 0 ? 1 : -1;
        }
    }
    return 0;
}

static double max_rate(const gw_problem *p)
{
    double maxq = 0;
    for (int i = 0; i < p->nwells; i++)
        if (fabs(p->wells[i].rate) > maxq) maxq = fabs(p->wells[i].rate);
    return maxq;
}

int gw_map_place_wells(gw_map_page *pg, const gw_problem *p)
{
    double maxq = max_rate(p);
    for (int i = 0; i < p->nwells; i++) {
        const gw_well *w = &p->wells[i];
        double x = gw_canvas_px(&pg->cv, w->x), y = gw_canvas_py(&pg->cv, w->y);
        double r = gw_map_well_radius(pg, w->rate, maxq);
        gw_label_box b = {x, y, 2 * r + 4, 2 * r + 4, 0};
        if (gw_labels_reserve(&pg->labels, &b) != 0) return -1;
    }
    gw_text_style st = gw_map_style(pg, 10, 1);
    st.r = 0.35; st.g = 0.08; st.b = 0.28;
    for (int i = 0; i < p->nwells; i++) {
        const gw_well *w = &p->wells[i];
        double x = gw_canvas_px(&pg->cv, w->x), y = gw_canvas_py(&pg->cv, w->y);
        double r = gw_map_well_radius(pg, w->rate, maxq);
        const char *name = (w->feature >= 0 && w->feature < p->nfeatures) ? p->features[w->feature].name : "well";
        if (gw_map_point_label(pg, x, y, r + 7 * pg->fs, name, &st) < 0) return -1;
    }
    return 0;
}

void gw_map_draw_wells(gw_map_page *pg, const gw_problem *p)
{
    double maxq = max_rate(p);
    for (int i = 0; i < p->nwells; i++) {
        const gw_well *w = &p->wells[i];
        double x = gw_canvas_px(&pg->cv, w->x), y = gw_canvas_py(&pg->cv, w->y);
        gw_map_sym_well(pg->cv.cr, x, y, gw_map_well_radius(pg, w->rate, maxq), w->rate < 0);
    }
}

void gw_map_draw_divides(gw_map_page *pg, const gw_map_layers *l)
{
    for (int i = 0; i < l->ndivides; i++) {
        cairo_new_path(pg->cv.cr);
        gw_map_path_add(pg, &l->divides[i].line, 0);
        gw_map_stroke_divide(pg->cv.cr, 2.4 * pg->fs);
    }
}

int gw_map_place_stagnation(gw_map_page *pg, const gw_map_layers *l)
{
    double s = 7 * pg->fs;
    for (int i = 0; i < l->nstag; i++) {
        double x = gw_canvas_px(&pg->cv, l->stag[i].x), y = gw_canvas_py(&pg->cv, l->stag[i].y);
        gw_label_box b = {x, y, 2 * s + 4, 2 * s + 4, 0};
        if (gw_labels_reserve(&pg->labels, &b) != 0) return -1;
    }
    return 0;
}

void gw_map_draw_stagnation(gw_map_page *pg, const gw_map_layers *l)
{
    double s = 7 * pg->fs;
    for (int i = 0; i < l->nstag; i++) {
        double x = gw_canvas_px(&pg->cv, l->stag[i].x), y = gw_canvas_py(&pg->cv, l->stag[i].y);
        gw_map_sym_stag(pg->cv.cr, x, y, s, l->stag[i].type);
    }
}

/* Coordinate ticks: a round interval whose labels do not collide. */
static void draw_ticks(gw_map_page *pg)
{
    gw_map_canvas *c = &pg->cv;
    cairo_t *cr = c->cr;
    gw_text_style st = gw_map_style(pg, 9, 0);
    st.r = st.g = st.b = 0.25;
    char buf[64];
    for (int axis = 0; axis < 2; axis++) {
        double lo = axis == 0 ? c->xmin : c->ymin, hi = axis == 0 ? c->xmax : c->ymax;
        double span_px = (hi - lo) * c->scale;
        int target = (int)(span_px / (150 * pg->fs));
        if (target < 2) target = 2;
        double step = gw_contour_nice_interval(lo, hi, target);
        for (int tries = 0; tries < 6; tries++) {   /* widen until labels fit */
            double wmax = 0, w;
            for (double v = ceil(lo / step) * step; v <= hi + 1e-9 * step; v += step) {
                gw_canvas_text_size(c, gw_fmt_num(buf, sizeof buf, v, 12), &st, &w, NULL);
                if (w > wmax) wmax = w;
            }
            if (step * c->scale > wmax + 18 * pg->fs) break;
            step *= 2;
        }
        for (double v = ceil(lo / step) * step; v <= hi + 1e-9 * step; v += step) {
            gw_fmt_num(buf, sizeof buf, fabs(v) < 1e-9 * step ? 0 : v, 12);
            double w;
            gw_canvas_text_size(c, buf, &st, &w, NULL);
            cairo_new_path(cr);
            if (axis == 0) {
                double x = gw_canvas_px(c, v);
                cairo_move_to(cr, x, c->fy1);
                cairo_line_to(cr, x, c->fy1 + 6 * pg->fs);
                cairo_move_to(cr, x, c->fy0);
                cairo_line_to(cr, x, c->fy0 - 6 * pg->fs);
                cairo_set_source_rgb(cr, 0.25, 0.25, 0.25);
                cairo_set_line_width(cr, 1);
                cairo_stroke(cr);
                if (x - 0.5 * w < c->fx0 - 30 * pg->fs || x + 0.5 * w > c->fx1 + 30 * pg->fs) continue;
                gw_text_style s = st;
                s.halign = 0.5;
                s.valign = 0;
                gw_canvas_text(c, x, c->fy1 + 8 * pg->fs, buf, &s);
            } else {
                double y = gw_canvas_py(c, v);
                cairo_move_to(cr, c->fx0, y);
                cairo_line_to(cr, c->fx0 - 6 * pg->fs, y);
                cairo_move_to(cr, c->fx1, y);
                cairo_line_to(cr, c->fx1 + 6 * pg->fs, y);
                cairo_set_source_rgb(cr, 0.25, 0.25, 0.25);
                cairo_set_line_width(cr, 1);
                cairo_stroke(cr);
                if (y - 0.5 * w < c->fy0 - 20 * pg->fs || y + 0.5 * w > c->fy1 + 20 * pg->fs) continue;
                cairo_save(cr);
                cairo_translate(cr, c->fx0 - 9 * pg->fs, y);
                cairo_rotate(cr, -0.5 * PI);
                gw_text_style s = st;
                s.halign = 0.5;
                s.valign = 1;
                /* Text drawn in rotated space at the origin. */
                gw_map_canvas tmp = *c;
                gw_canvas_text(&tmp, 0, 0, buf, &s);
                cairo_restore(cr);
            }
        }
    }
}

static void draw_north_and_scale(gw_map_page *pg, const char *unit)
{
    gw_map_canvas *c = &pg->cv;
    cairo_t *cr = c->cr;
    double fs = pg->fs;
    /* North arrow: the grid's y axis points north (map coordinates). */
    double ax = pg->panel_x1 - 44 * fs, ay = c->height - 100 * fs;
    cairo_new_path(cr);
    cairo_move_to(cr, ax, ay - 26 * fs);
    cairo_line_to(cr, ax + 11 * fs, ay + 14 * fs);
    cairo_line_to(cr, ax, ay + 6 * fs);
    cairo_close_path(cr);
    cairo_set_source_rgb(cr, 0.1, 0.1, 0.12);
    cairo_fill(cr);
    cairo_move_to(cr, ax, ay - 26 * fs);
    cairo_line_to(cr, ax - 11 * fs, ay + 14 * fs);
    cairo_line_to(cr, ax, ay + 6 * fs);
    cairo_close_path(cr);
    cairo_set_source_rgb(cr, 1, 1, 1);
    cairo_fill_preserve(cr);
    cairo_set_source_rgb(cr, 0.1, 0.1, 0.12);
    cairo_set_line_width(cr, 1.2);
    cairo_stroke(cr);
    gw_text_style st = gw_map_style(pg, 12, 1);
    st.halign = 0.5;
    st.valign = 1;
    gw_canvas_text(c, ax, ay - 28 * fs, "N", &st);

    /* Scale bar: a round length no wider than the panel. */
    double maxpx = (pg->panel_x1 - pg->panel_x0) - 110 * fs;
    double len = gw_contour_nice_interval(0, maxpx / c->scale, 1);
    while (len * c->scale > maxpx) len /= 2;
    double px = len * c->scale;
    double sx = pg->panel_x0 + 8 * fs, sy = c->height - 108 * fs, bh = 7 * fs;
    for (int i = 0; i < 4; i++) {
        cairo_rectangle(cr, sx + i * px / 4, sy, px / 4, bh);
        if (i % 2 == 0) cairo_set_source_rgb(cr, 0.1, 0.1, 0.12); else cairo_set_source_rgb(cr, 1, 1, 1);
        cairo_fill(cr);
    }
    cairo_rectangle(cr, sx, sy, px, bh);
    cairo_set_source_rgb(cr, 0.1, 0.1, 0.12);
    cairo_set_line_width(cr, 1);
    cairo_stroke(cr);
    gw_text_style lt = gw_map_style(pg, 9, 0);
    lt.halign = 0.5;
    lt.valign = 0;
    char buf[64], b2[80];
    gw_canvas_text(c, sx, sy + bh + 4 * fs, "0", &lt);
    gw_canvas_text(c, sx + px / 2, sy + bh + 4 * fs, gw_fmt_num(buf, sizeof buf, len / 2, 6), &lt);
    snprintf(b2, sizeof b2, "%s %s", gw_fmt_num(buf, sizeof buf, len, 6), unit ? unit : "");
    lt.halign = 0;
    gw_canvas_text(c, sx + px - 6 * fs, sy + bh + 4 * fs, b2, &lt);
}

void gw_map_page_finish(gw_map_page *pg, const char *length_unit, const char *crs)
{
    gw_map_canvas *c = &pg->cv;
    cairo_t *cr = c->cr;
    flush_text(pg);
    cairo_new_path(cr);
    cairo_rectangle(cr, c->fx0, c->fy0, c->fx1 - c->fx0, c->fy1 - c->fy0);
    cairo_set_source_rgb(cr, 0.15, 0.15, 0.17);
    cairo_set_line_width(cr, 1.3);
    cairo_stroke(cr);
    draw_ticks(pg);
    draw_north_and_scale(pg, length_unit);
    char buf[256];
    gw_text_style st = gw_map_style(pg, 8.5, 0);
    st.r = st.g = st.b = 0.38;
    st.valign = 1;
    snprintf(buf, sizeof buf, "Coordinates in %s%s%s", length_unit ? length_unit : "map units",
             crs ? ", " : "", crs ? crs : "");
    gw_canvas_text(c, pg->panel_x0, c->height - 48 * pg->fs, buf, &st);
    snprintf(buf, sizeof buf, "gwdivide %s - steady-state screening result", GWDIVIDE_VERSION);
    gw_canvas_text(c, pg->panel_x0, c->height - 30 * pg->fs, buf, &st);
    gw_canvas_text(c, pg->panel_x0, c->height - 12 * pg->fs, "See report for cautions.", &st);
}
