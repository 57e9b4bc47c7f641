#include "map_catchment.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "map_frame.h"
#include "map_ramp.h"

static const double LINE_RGB[3] = {0.06, 0.18, 0.45};
static const double ZONE_RGB[3] = {0.45, 0.12, 0.35};

/* Colour slot of feature f: its position among the listed catchments, so
 * the legend and the fill agree. */
static int slot_of(const gw_map_layers *l, int f)
{
    for (int i = 0; i < l->ncatchments; i++)
        if (l->catchments[i].feature == f) return i;
    return l->ncatchments + f;
}

static void fill_catchments(gw_map_page *pg, const gw_problem *p, const gw_map_layers *l)
{
    const gw_grid *g = &p->grid;
    cairo_t *cr = pg->cv.cr;
    double w = g->dx * pg->cv.scale, h = g->dy * pg->cv.scale;
    int nslots = l->ncatchments + p->nfeatures;
    for (int s = 0; s < nslots; s++) {
        int any = 0;
        cairo_new_path(cr);
        for (int r = 0; r < g->ny; r++)
            for (int c = 0; c < g->nx; c++) {
                size_t k = (size_t)r * g->nx + c;
                int f = l->catchment_of[k];
                if (f < 0 || !p->active[k] || slot_of(l, f) != s) continue;
                cairo_rectangle(cr, gw_canvas_px(&pg->cv, g->x0 + c * g->dx),
                                gw_canvas_py(&pg->cv, gw_grid_ytop(g) - r * g->dy), w + 0.6, h + 0.6);
                any = 1;
            }
        if (!any) continue;
        double rgb[3];
        gw_palette_rgb(s, rgb);
        cairo_set_source_rgb(cr, rgb[0], rgb[1], rgb[2]);
        cairo_fill(cr);
    }
}

static void draw_feature_lines(gw_map_page *pg, const gw_problem *p, const gw_map_layers *l)
{
    cairo_t *cr = pg->cv.cr;
    for (int i = 0; i < l->ngeoms; i++) {
        const gw_map_geom *ge = &l->geoms[i];
        cairo_new_path(cr);
        gw_map_path_add(pg, &ge->path, ge->polygon);
        cairo_set_line_cap(cr, CAIRO_LINE_CAP_ROUND);
        cairo_set_line_join(cr, CAIRO_LINE_JOIN_ROUND);
        double w = (p->features[ge->feature].type == GW_FEAT_DRAIN ? 2.5 : 3.5) * pg->fs;
        cairo_set_source_rgb(cr, 1, 1, 1);
        cairo_set_line_width(cr, w + 2.5 * pg->fs);
        cairo_stroke_preserve(cr);
        cairo_set_source_rgb(cr, LINE_RGB[0], LINE_RGB[1], LINE_RGB[2]);
        cairo_set_line_width(cr, w);
        cairo_stroke(cr);
    }
}

/* A zone's outline: its main ring and every further ring (parts, holes);
 * fills and clips use the even-odd rule so holes stay open. */
static void zone_path(gw_map_page *pg, const gw_map_path *polygon, const gw_map_path *rings,
                      int nrings)
{
    cairo_set_fill_rule(pg->cv.cr, CAIRO_FILL_RULE_EVEN_ODD);
    gw_map_path_add(pg, polygon, 1);
    for (int k = 0; rings && k < nrings; k++)
        if (rings[k].n >= 3) gw_map_path_add(pg, &rings[k], 1);
}

/* Capture zone: heavy outline over a light hatch; travel-time zones dotted
 * inside it, each labelled with its time. */
static void draw_capture(gw_map_page *pg, const gw_map_layers *l, int *have_tt)
{
    cairo_t *cr = pg->cv.cr;
    double fs = pg->fs;
    for (int i = 0; i < l->ncapture; i++) {
        const gw_map_capture *cz = &l->capture[i];
        if (cz->polygon.n >= 3) {
            cairo_save(cr);
            cairo_new_path(cr);
            zone_path(pg, &cz->polygon, cz->rings, cz->nrings);
            cairo_clip_preserve(cr);
            cairo_set_source_rgba(cr, 1, 1, 1, 0.35);
            cairo_fill(cr);
            cairo_new_path(cr);
            for (double d = -pg->cv.height; d < pg->cv.width; d += 7 * fs) {
                cairo_move_to(cr, d, pg->cv.height);
                cairo_line_to(cr, d + pg->cv.height, 0);
            }
            cairo_set_source_rgba(cr, ZONE_RGB[0], ZONE_RGB[1], ZONE_RGB[2], 0.55);
            cairo_set_line_width(cr, 1 * fs);
            cairo_stroke(cr);
            cairo_restore(cr);
        }
        for (int z = 0; z < cz->nzones; z++) {
            if (cz->zones[z].polygon.n < 3) continue;
            static const double dots[2] = {1, 4};
            cairo_save(cr);
            cairo_new_path(cr);
            zone_path(pg, &cz->zones[z].polygon, cz->zones[z].rings, cz->zones[z].nrings);
            cairo_set_source_rgb(cr, 1, 1, 1);
            cairo_set_line_width(cr, 3.5 * fs);
            cairo_stroke_preserve(cr);
            double d2[2] = {dots[0] * fs, dots[1] * fs};
            cairo_set_dash(cr, d2, 2, 0);
            cairo_set_line_cap(cr, CAIRO_LINE_CAP_ROUND);
            cairo_set_source_rgb(cr, ZONE_RGB[0], ZONE_RGB[1], ZONE_RGB[2]);
            cairo_set_line_width(cr, 2.6 * fs);
            cairo_stroke(cr);
            cairo_restore(cr);
            *have_tt = 1;
        }
        if (cz->polygon.n >= 3) {
            cairo_new_path(cr);
            zone_path(pg, &cz->polygon, cz->rings, cz->nrings);
            cairo_set_line_join(cr, CAIRO_LINE_JOIN_ROUND);
            cairo_set_source_rgb(cr, ZONE_RGB[0], ZONE_RGB[1], ZONE_RGB[2]);
            cairo_set_line_width(cr, 2.8 * fs);
            cairo_stroke(cr);
            cairo_set_fill_rule(cr, CAIRO_FILL_RULE_WINDING);
        }
    }
}

/* Obstacle tag of travel-time zone z of capture zone i. */
static int zone_tag(const gw_map_layers *l, int i, int z)
{
    int k = 0;
    for (int j = 0; j < i; j++) k += l->capture[j].nzones + 1;
    return GW_MAP_TAG_ZONE + k + 1 + z;
}

/* Keep labels off the capture and travel-time zone outlines. */
static int reserve_zones(gw_map_page *pg, const gw_map_layers *l)
{
    for (int i = 0; i < l->ncapture; i++) {
        const gw_map_capture *cz = &l->capture[i];
        if (cz->polygon.n >= 3 &&
            gw_map_reserve_path(pg, &cz->polygon, 1, 4 * pg->fs, zone_tag(l, i, 0) - 1) != 0)
            return -1;
        for (int z = 0; z < cz->nzones; z++)
            if (cz->zones[z].polygon.n >= 3 &&
                gw_map_reserve_path(pg, &cz->zones[z].polygon, 1, 4 * pg->fs, zone_tag(l, i, z)) != 0)
                return -1;
    }
    return 0;
}

static int place_tt_labels(gw_map_page *pg, const gw_map_layers *l)
{
    gw_text_style st = gw_map_style(pg, 9, 1);
    st.r = ZONE_RGB[0]; st.g = ZONE_RGB[1]; st.b = ZONE_RGB[2];
    st.halo = 2.5 * pg->fs;
    for (int i = 0; i < l->ncapture; i++)
        for (int z = 0; z < l->capture[i].nzones; z++) {
            const gw_map_tt_zone *tz = &l->capture[i].zones[z];
            if (tz->polygon.n < 3) continue;
            char txt[64], nb[32];
            snprintf(txt, sizeof txt, "%s %s", gw_fmt_num(nb, sizeof nb, tz->time, 4),
                     l->time_unit ? l->time_unit : "day");
            double w, h;
            gw_canvas_text_size(&pg->cv, txt, &st, &w, &h);
            int n = tz->polygon.n;
            double *pxy = malloc((size_t)(n + 1) * 2 * sizeof(double));
            if (!pxy) return -1;
            for (int k = 0; k <= n; k++) {
                pxy[2 * k] = gw_canvas_px(&pg->cv, tz->polygon.xy[2 * (k % n)]);
                pxy[2 * k + 1] = gw_canvas_py(&pg->cv, tz->polygon.xy[2 * (k % n) + 1]);
            }
            gw_label_box b;
            pg->labels.skip_tag = zone_tag(l, i, z);   /* it sits on its own line */
            int got = gw_labels_along_line(&pg->labels, pxy, n + 1, w + 4, h, 1e9, &b, 1);
            pg->labels.skip_tag = -1;
            free(pxy);
            if (got < 0) return -1;
            if (got == 1 && gw_map_queue_text(pg, &b, txt, &st) != 0) return -1;
        }
    return 0;
}

/* Feature names beside their lines.  A catchment whose feature has no
 * drawn line (cells given without geometry) is named at the centre of its
 * cells instead; the areas are in the legend. */
static int place_names(gw_map_page *pg, const gw_problem *p, const gw_map_layers *l)
{
    const gw_grid *g = &p->grid;
    gw_text_style st = gw_map_style(pg, 10.5, 1);
    st.r = LINE_RGB[0]; st.g = LINE_RGB[1]; st.b = LINE_RGB[2];
    st.halo = 3 * pg->fs;
    if (gw_map_place_feature_names(pg, p, l, &st, &st, 8 * pg->fs) != 0) return -1;
    for (int i = 0; i < l->ncatchments; i++) {
        int f = l->catchments[i].feature;
        int drawn = 0;
        for (int j = 0; j < l->ngeoms; j++)
            if (l->geoms[j].feature == f) drawn = 1;
        /* A well's catchment is its capture area: the well label names it. */
        if (drawn || f < 0 || f >= p->nfeatures || p->features[f].type == GW_FEAT_WELL) continue;
        double sx = 0, sy = 0;
        long n = 0;
        for (int r = 0; r < g->ny; r++)
            for (int c = 0; c < g->nx; c++)
                if (l->catchment_of[(size_t)r * g->nx + c] == f) {
                    sx += gw_grid_xc(g, c);
                    sy += gw_grid_yc(g, r);
                    n++;
                }
        if (n == 0) continue;
        const char *name = p->features[f].name;
        double w, h;
        gw_canvas_text_size(&pg->cv, name, &st, &w, &h);
        double x = gw_canvas_px(&pg->cv, sx / n), y = gw_canvas_py(&pg->cv, sy / n);
        /* Try the centre, then nudge up or down. */
        for (int k = 0; k < 7; k++) {
            double dy = (k % 2 ? 1 : -1) * ((k + 1) / 2) * 1.6 * h;
            gw_label_box b = {x, y + dy, w, h, 0};
            int rr = gw_labels_try(&pg->labels, &b);
            if (rr < 0) return -1;
            if (rr == 1) {
                if (gw_map_queue_text(pg, &b, name, &st) != 0) return -1;
                break;
            }
        }
    }
    return 0;
}

int gw_map_catchment_write(const gw_problem *p, const gw_map_layers *l, const char *path,
                           gw_error *err)
{
    if (!l->catchment_of) return gw_fail(err, "catchment map: no catchments were computed");
    const char *lu = l->length_unit ? l->length_unit : "m";
    gw_map_page pg;
    char sub[200];
    snprintf(sub, sizeof sub, "Catchments of the discharge features%s",
             l->ncapture ? ", well capture zones and travel-time zones" : "");
    if (gw_map_page_begin(&pg, &p->grid, l->width, l->title ? l->title : "Catchment map", sub, err) != 0)
        return -1;
    int rc = -1;
    cairo_t *cr = pg.cv.cr;
    double fs = pg.fs;
    int have_tt = 0;

    fill_catchments(&pg, p, l);
    /* Well and feature names may cross the zone outlines (they carry a
     * halo); the zone labels then keep off everything. */
    if (gw_map_reserve_features(&pg, p, l, 5 * fs, 5 * fs) != 0 || gw_map_place_wells(&pg, p) != 0 ||
        place_names(&pg, p, l) != 0 || reserve_zones(&pg, l) != 0 || place_tt_labels(&pg, l) != 0)
        goto oom;
    draw_capture(&pg, l, &have_tt);
    draw_feature_lines(&pg, p, l);
    gw_map_draw_divides(&pg, l);
    gw_map_draw_wells(&pg, p);

    gw_map_legend_heading(&pg, "Catchment (area)");
    for (int i = 0; i < l->ncatchments && pg.legend_y < pg.legend_bottom - 160 * fs; i++) {
        int f = l->catchments[i].feature;
        if (f < 0 || f >= p->nfeatures) continue;
        char txt[160], nb[32];
        snprintf(txt, sizeof txt, "%.60s, %s %s\u00b2", p->features[f].name,
                 gw_fmt_num(nb, sizeof nb, l->catchments[i].area, 3), lu);
        double sx, sy, rgb[3];
        gw_map_legend_row(&pg, txt, &sx, &sy);
        gw_palette_rgb(slot_of(l, f), rgb);
        cairo_rectangle(cr, sx - 12 * fs, sy - 8 * fs, 24 * fs, 16 * fs);
        cairo_set_source_rgb(cr, rgb[0], rgb[1], rgb[2]);
        cairo_fill_preserve(cr);
        cairo_set_source_rgb(cr, 0.3, 0.3, 0.3);
        cairo_set_line_width(cr, 1);
        cairo_stroke(cr);
    }
    gw_map_legend_gap(&pg, 10);
    gw_map_legend_heading(&pg, "Features");
    double sx, sy;
    if (l->ngeoms) {
        gw_map_legend_row(&pg, "Stream, drain or fixed head", &sx, &sy);
        cairo_move_to(cr, sx - 14 * fs, sy);
        cairo_line_to(cr, sx + 14 * fs, sy);
        cairo_set_source_rgb(cr, LINE_RGB[0], LINE_RGB[1], LINE_RGB[2]);
        cairo_set_line_width(cr, 3.5 * fs);
        cairo_stroke(cr);
    }
    if (l->ndivides) {
        gw_map_legend_row(&pg, "Groundwater divide", &sx, &sy);
        cairo_move_to(cr, sx - 14 * fs, sy);
        cairo_line_to(cr, sx + 14 * fs, sy);
        gw_map_stroke_divide(cr, 2.4 * fs);
    }
    if (l->ncapture) {
        gw_map_legend_row(&pg, "Capture zone of a well", &sx, &sy);
        cairo_rectangle(cr, sx - 12 * fs, sy - 8 * fs, 24 * fs, 16 * fs);
        cairo_set_source_rgb(cr, ZONE_RGB[0], ZONE_RGB[1], ZONE_RGB[2]);
        cairo_set_line_width(cr, 2.5 * fs);
        cairo_stroke(cr);
    }
    if (have_tt) {
        static const double dots[2] = {1, 4};
        gw_map_legend_row(&pg, "Travel-time zone (labelled)", &sx, &sy);
        cairo_save(cr);
        double d2[2] = {dots[0] * fs, dots[1] * fs};
        cairo_set_dash(cr, d2, 2, 0);
        cairo_set_line_cap(cr, CAIRO_LINE_CAP_ROUND);
        cairo_move_to(cr, sx - 14 * fs, sy);
        cairo_line_to(cr, sx + 14 * fs, sy);
        cairo_set_source_rgb(cr, ZONE_RGB[0], ZONE_RGB[1], ZONE_RGB[2]);
        cairo_set_line_width(cr, 2.6 * fs);
        cairo_stroke(cr);
        cairo_restore(cr);
    }
    if (p->nwells) {
        gw_map_legend_row(&pg, "Well (size: pumping rate)", &sx, &sy);
        gw_map_sym_well(cr, sx, sy, 8 * fs, 0);
    }
    gw_map_page_finish(&pg, lu, l->crs);
    char units[128];
    snprintf(units, sizeof units, "areas in %s2", lu);
    gw_png_meta meta = {l->title ? l->title : "Catchment map", units, l->crs,
                        "Catchments, divides and capture zones"};
    rc = gw_canvas_write_png(&pg.cv, path, &meta, err);
    goto done;
oom:
    gw_fail(err, "out of memory drawing the catchment map");
done:
    gw_map_page_free(&pg);
    return rc;
}
