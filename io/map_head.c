#include "map_head.h"

#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "../solver/observe.h"
#include "map_contour.h"
#include "map_frame.h"
#include "map_ramp.h"

typedef struct {
    double hmin, hmax;
} range;

static const double GAIN_RGB[3] = {0.06, 0.18, 0.45};   /* deep navy: solid line */
static const double LOSE_RGB[3] = {0.96, 0.56, 0.16};   /* orange core, dark casing */
static const double LOSE_CASE[3] = {0.36, 0.16, 0.02};
static const double DRAIN_RGB[3] = {0.38, 0.22, 0.08};

static double ramp_t(const range *r, double h)
{
    return (h - r->hmin) / (r->hmax - r->hmin);
}

/* Continuous fill: each pixel takes the bilinear head at its map position;
 * pixels over inactive cells stay blank. */
static void fill_heads(gw_map_page *pg, const gw_grid *g, const double *head, const range *r)
{
    gw_map_canvas *c = &pg->cv;
    cairo_surface_flush(c->surface);
    unsigned char *data = cairo_image_surface_get_data(c->surface);
    int stride = cairo_image_surface_get_stride(c->surface);
    int x0 = (int)ceil(c->fx0), x1 = (int)floor(c->fx1), y0 = (int)ceil(c->fy0), y1 = (int)floor(c->fy1);
    /* 256-entry table: banding is invisible at this depth and it is fast. */
    uint32_t lut[256];
    for (int i = 0; i < 256; i++) {
        double rgb[3];
        gw_ramp_rgb(i / 255.0, rgb);
        lut[i] = 0xff000000u | ((uint32_t)lround(rgb[0] * 255) << 16) |
                 ((uint32_t)lround(rgb[1] * 255) << 8) | (uint32_t)lround(rgb[2] * 255);
    }
    for (int py = y0; py < y1; py++) {
        uint32_t *row = (uint32_t *)(data + (size_t)py * stride);
        double y = c->ymin + (c->fy1 - (py + 0.5)) / c->scale;
        for (int px = x0; px < x1; px++) {
            double x = c->xmin + (px + 0.5 - c->fx0) / c->scale;
            int col, rw;
            if (gw_grid_locate(g, x, y, &col, &rw) != 0) continue;
            if (!isfinite(head[(size_t)rw * g->nx + col])) continue;
            double h = gw_head_at(g, head, x, y);
            if (!isfinite(h)) continue;
            double t = ramp_t(r, h);
            int i = (int)lround(t * 255);
            row[px] = lut[i < 0 ? 0 : i > 255 ? 255 : i];
        }
    }
    cairo_surface_mark_dirty(c->surface);
}

/* Fixed-head cells: blank with a diagonal hatch, so they read as "boundary"
 * in colour and in greyscale. */
static int draw_fixed(gw_map_page *pg, const gw_problem *p)
{
    const gw_grid *g = &p->grid;
    cairo_t *cr = pg->cv.cr;
    int any = 0;
    cairo_new_path(cr);
    for (int r = 0; r < g->ny; r++)
        for (int col = 0; col < g->nx; col++) {
            size_t k = (size_t)r * g->nx + col;
            if (!p->active[k] || p->fixed_feature[k] < 0) continue;
            double x = gw_canvas_px(&pg->cv, g->x0 + col * g->dx);
            double y = gw_canvas_py(&pg->cv, gw_grid_ytop(g) - r * g->dy);
            cairo_rectangle(cr, x, y, g->dx * pg->cv.scale + 0.5, g->dy * pg->cv.scale + 0.5);
            any = 1;
        }
    if (!any) return 0;
    cairo_save(cr);
    cairo_set_source_rgb(cr, 0.93, 0.95, 0.98);
    cairo_fill_preserve(cr);
    cairo_clip(cr);
    cairo_new_path(cr);
    double step = 6 * pg->fs, span = pg->cv.width + pg->cv.height;
    for (double d = -pg->cv.height; d < span; d += step) {
        cairo_move_to(cr, d, 0);
        cairo_line_to(cr, d + pg->cv.height, pg->cv.height);
    }
    cairo_set_source_rgb(cr, GAIN_RGB[0], GAIN_RGB[1], GAIN_RGB[2]);
    cairo_set_line_width(cr, 1.2 * pg->fs);
    cairo_stroke(cr);
    cairo_restore(cr);
    return 1;
}

/* Contour lines in pixels, with their label boxes. */
typedef struct {
    double *pxy;
    int n;
    double level;
    int major;
} px_line;

static void rect_path(cairo_t *cr, const gw_label_box *b)
{
    double c = cos(b->angle), s = sin(b->angle), hw = 0.5 * b->w + 2, hh = 0.5 * b->h;
    static const double sx[4] = {-1, 1, 1, -1}, sy[4] = {-1, -1, 1, 1};
    for (int i = 0; i < 4; i++) {
        double u = sx[i] * hw, v = sy[i] * hh;
        double x = b->cx + u * c - v * s, y = b->cy + u * s + v * c;
        if (i == 0) cairo_move_to(cr, x, y); else cairo_line_to(cr, x, y);
    }
    cairo_close_path(cr);
}

/* Per-length exchange of each stream or drain cell, for line widths:
 * q[k] = net flux of the reach / length of the feature's line in cell k. */
typedef struct {
    int *reach_of;     /* per cell: reach index for the current feature, -1 */
    double *len;       /* per cell: line length inside (map units) */
} reach_index;

static void seg_pieces(const gw_grid *g, const gw_map_path *pa, double piece,
                       void (*fn)(void *, double, double, double, double), void *ctx)
{
    for (int i = 0; i + 1 < pa->n; i++) {
        double xa = pa->xy[2 * i], ya = pa->xy[2 * i + 1];
        double xb = pa->xy[2 * i + 2], yb = pa->xy[2 * i + 3];
        double L = hypot(xb - xa, yb - ya);
        int m = (int)ceil(L / piece);
        if (m < 1) m = 1;
        for (int j = 0; j < m; j++) {
            double t0 = (double)j / m, t1 = (double)(j + 1) / m;
            fn(ctx, xa + t0 * (xb - xa), ya + t0 * (yb - ya), xa + t1 * (xb - xa), ya + t1 * (yb - ya));
        }
    }
    (void)g;
}

typedef struct {
    gw_map_page *pg;
    const gw_grid *g;
    const gw_budget *b;
    reach_index *ri;
    double qmax;       /* largest |q| per length over all features */
    int pass;          /* 0 lengths, 1 qmax, 2 casing, 3 core */
    int drain;
    int gaining_seen, losing_seen, still_seen;
} stream_ctx;

static double piece_q(stream_ctx *s, double xm, double ym, int *has)
{
    int col, row;
    *has = 0;
    if (gw_grid_locate(s->g, xm, ym, &col, &row) != 0) return 0;
    size_t k = (size_t)row * s->g->nx + col;
    int ri = s->ri->reach_of[k];
    if (ri < 0 || !(s->ri->len[k] > 0)) return 0;
    *has = 1;
    const gw_reach *r = &s->b->reach[ri];
    return (r->in - r->out) / s->ri->len[k];
}

/* Drawn width (px) of a stream or drain carrying q per length: area-like
 * growth (sqrt) so that small exchanges stay visible next to large ones. */
static double stream_width(double fs, double q, double qmax)
{
    return (2.0 + 5.5 * sqrt(fabs(q) / qmax)) * fs;
}

/* Largest of 1, 2, 5 x 10^k not above v (v > 0). */
static double round_down(double v)
{
    double p = pow(10, floor(log10(v)));
    double m = v / p;
    return (m >= 5 ? 5 : m >= 2 ? 2 : 1) * p;
}

static void stream_piece(void *ctx, double xa, double ya, double xb, double yb)
{
    stream_ctx *s = ctx;
    double xm = 0.5 * (xa + xb), ym = 0.5 * (ya + yb);
    if (s->pass == 0) {
        int col, row;
        if (gw_grid_locate(s->g, xm, ym, &col, &row) == 0)
            s->ri->len[(size_t)row * s->g->nx + col] += hypot(xb - xa, yb - ya);
        return;
    }
    int has;
    double q = piece_q(s, xm, ym, &has);
    if (s->pass == 1) {
        if (fabs(q) > s->qmax) s->qmax = fabs(q);
        return;
    }
    gw_map_page *pg = s->pg;
    cairo_t *cr = pg->cv.cr;
    double fs = pg->fs;
    int still = !has || !(s->qmax > 0) || fabs(q) < 1e-6 * s->qmax;
    double w = still ? 2.0 * fs : stream_width(fs, q, s->qmax);
    cairo_new_path(cr);
    cairo_move_to(cr, gw_canvas_px(&pg->cv, xa), gw_canvas_py(&pg->cv, ya));
    cairo_line_to(cr, gw_canvas_px(&pg->cv, xb), gw_canvas_py(&pg->cv, yb));
    cairo_set_line_cap(cr, CAIRO_LINE_CAP_ROUND);
    if (s->drain) {
        if (s->pass == 2) return;
        cairo_set_source_rgb(cr, DRAIN_RGB[0], DRAIN_RGB[1], DRAIN_RGB[2]);
        cairo_set_line_width(cr, w);
        cairo_stroke(cr);
        return;
    }
    if (still) {
        if (s->pass == 3) {
            cairo_set_source_rgb(cr, 0.45, 0.45, 0.48);
            cairo_set_line_width(cr, w);
            cairo_stroke(cr);
            s->still_seen = 1;
        }
        return;
    }
    if (q < 0) {   /* aquifer loses water to the stream: gaining reach */
        if (s->pass == 2) {
            cairo_set_source_rgb(cr, 1, 1, 1);
            cairo_set_line_width(cr, w + 2.5 * fs);
        } else {
            cairo_set_source_rgb(cr, GAIN_RGB[0], GAIN_RGB[1], GAIN_RGB[2]);
            cairo_set_line_width(cr, w);
            s->gaining_seen = 1;
        }
    } else {
        if (s->pass == 2) {
            cairo_set_source_rgb(cr, LOSE_CASE[0], LOSE_CASE[1], LOSE_CASE[2]);
            cairo_set_line_width(cr, w + 3.0 * fs);
        } else {
            cairo_set_source_rgb(cr, LOSE_RGB[0], LOSE_RGB[1], LOSE_RGB[2]);
            cairo_set_line_width(cr, w - 0.5 * fs);
            s->losing_seen = 1;
        }
    }
    cairo_stroke(cr);
}

static void index_feature(reach_index *ri, const gw_budget *b, int f, int set)
{
    for (int i = 0; i < b->nreaches; i++)
        if (b->reach[i].feature == f) {
            ri->reach_of[b->reach[i].cell] = set ? i : -1;
            ri->len[b->reach[i].cell] = 0;
        }
}

/* Streams and drains with their geometry; returns legend flags in ctx. */
static int draw_streams(gw_map_page *pg, const gw_problem *p, const gw_budget *b,
                        const gw_map_layers *l, stream_ctx *s, gw_error *err)
{
    const gw_grid *g = &p->grid;
    size_t nc = gw_grid_ncells(g);
    reach_index ri = {malloc(nc * sizeof(int)), calloc(nc, sizeof(double))};
    if (!ri.reach_of || !ri.len) {
        free(ri.reach_of);
        free(ri.len);
        return gw_fail(err, "out of memory drawing streams");
    }
    for (size_t k = 0; k < nc; k++) ri.reach_of[k] = -1;
    memset(s, 0, sizeof *s);
    s->pg = pg;
    s->g = g;
    s->b = b;
    s->ri = &ri;
    double piece = 0.25 * (g->dx < g->dy ? g->dx : g->dy);
    static const gw_budget empty = {0};
    if (!b) s->b = &empty;
    for (int pass = 1; pass <= 3; pass++) {
        for (int i = 0; i < l->ngeoms; i++) {
            const gw_map_geom *ge = &l->geoms[i];
            gw_feature_type t = p->features[ge->feature].type;
            if (t != GW_FEAT_STREAM && t != GW_FEAT_DRAIN) continue;
            s->drain = (t == GW_FEAT_DRAIN);
            index_feature(&ri, s->b, ge->feature, 1);
            s->pass = 0;
            seg_pieces(g, &ge->path, piece, stream_piece, s);
            s->pass = pass;
            seg_pieces(g, &ge->path, piece, stream_piece, s);
            index_feature(&ri, s->b, ge->feature, 0);
        }
    }
    free(ri.reach_of);
    free(ri.len);
    return 0;
}

/* Link cells whose feature has no drawn geometry: small squares. */
static void draw_link_cells(gw_map_page *pg, const gw_problem *p, const gw_budget *b,
                            const gw_map_layers *l)
{
    cairo_t *cr = pg->cv.cr;
    const gw_grid *g = &p->grid;
    for (int i = 0; i < p->nlinks; i++) {
        const gw_link *lk = &p->links[i];
        if (lk->kind == GW_LINK_LEAKAGE) continue;
        int drawn = 0;
        for (int j = 0; j < l->ngeoms; j++)
            if (l->geoms[j].feature == lk->feature) drawn = 1;
        if (drawn) continue;
        int col = lk->cell % g->nx, row = lk->cell / g->nx;
        double x = gw_canvas_px(&pg->cv, gw_grid_xc(g, col)), y = gw_canvas_py(&pg->cv, gw_grid_yc(g, row));
        double s = fmax(3 * pg->fs, 0.6 * g->dx * pg->cv.scale);
        cairo_rectangle(cr, x - 0.5 * s, y - 0.5 * s, s, s);
        const double *rgb = lk->kind == GW_LINK_DRAIN ? DRAIN_RGB : GAIN_RGB;
        if (b && lk->kind == GW_LINK_STREAM) {
            for (int r = 0; r < b->nreaches; r++)
                if (b->reach[r].feature == lk->feature && b->reach[r].cell == lk->cell &&
                    b->reach[r].in > b->reach[r].out)
                    rgb = LOSE_RGB;
        }
        cairo_set_source_rgb(cr, rgb[0], rgb[1], rgb[2]);
        cairo_fill(cr);
    }
}

static void legend_line(gw_map_page *pg, const char *text, const double rgb[3], double w,
                        const double *casing, int dashed)
{
    double sx, sy;
    gw_map_legend_row(pg, text, &sx, &sy);
    cairo_t *cr = pg->cv.cr;
    double fs = pg->fs;
    cairo_save(cr);
    cairo_new_path(cr);
    cairo_move_to(cr, sx - 14 * fs, sy);
    cairo_line_to(cr, sx + 14 * fs, sy);
    cairo_set_line_cap(cr, CAIRO_LINE_CAP_ROUND);
    if (dashed) {
        gw_map_stroke_divide(cr, w);
    } else {
        if (casing) {
            cairo_set_source_rgb(cr, casing[0], casing[1], casing[2]);
            cairo_set_line_width(cr, w + 3 * fs);
            cairo_stroke_preserve(cr);
        }
        cairo_set_source_rgb(cr, rgb[0], rgb[1], rgb[2]);
        cairo_set_line_width(cr, w);
        cairo_stroke(cr);
    }
    cairo_restore(cr);
}

static void draw_colour_bar(gw_map_page *pg, const range *r, double interval, const char *unit)
{
    gw_map_canvas *c = &pg->cv;
    cairo_t *cr = c->cr;
    double fs = pg->fs;
    double bx = pg->panel_x0 + 8 * fs, by = pg->legend_y + 4 * fs, bw = 24 * fs, bh = 165 * fs;
    for (int i = 0; i < (int)bh; i++) {
        double rgb[3];
        gw_ramp_rgb(1.0 - (i + 0.5) / bh, rgb);
        cairo_rectangle(cr, bx, by + i, bw, 1.01);
        cairo_set_source_rgb(cr, rgb[0], rgb[1], rgb[2]);
        cairo_fill(cr);
    }
    cairo_rectangle(cr, bx, by, bw, bh);
    cairo_set_source_rgb(cr, 0.2, 0.2, 0.22);
    cairo_set_line_width(cr, 1);
    cairo_stroke(cr);
    /* Tick every k-th contour level so that at most ~8 labels show. */
    long i0 = (long)ceil(r->hmin / interval - 1e-9), i1 = (long)floor(r->hmax / interval + 1e-9);
    long k = 1;
    while ((i1 - i0) / k > 7) k = (k == 1) ? 2 : (k == 2) ? 5 : k * 2;
    gw_text_style st = gw_map_style(pg, 9.5, 0);
    char buf[64];
    for (long i = i0; i <= i1; i++) {
        if (i % k) continue;
        double v = i * interval;
        double y = by + bh * (1.0 - (v - r->hmin) / (r->hmax - r->hmin));
        cairo_new_path(cr);
        cairo_move_to(cr, bx + bw, y);
        cairo_line_to(cr, bx + bw + 5 * fs, y);
        cairo_set_source_rgb(cr, 0.2, 0.2, 0.22);
        cairo_stroke(cr);
        gw_canvas_text(c, bx + bw + 8 * fs, y, gw_fmt_num(buf, sizeof buf, v, 10), &st);
    }
    char lab[96];
    snprintf(lab, sizeof lab, "contour interval %s %s", gw_fmt_num(buf, sizeof buf, interval, 6), unit);
    gw_text_style s2 = gw_map_style(pg, 9, 0);
    s2.r = s2.g = s2.b = 0.3;
    s2.valign = 0;
    gw_canvas_text(c, bx, by + bh + 8 * fs, lab, &s2);
    pg->legend_y = by + bh + 36 * fs;
}

/* Height (px at 1400 wide) the legend below will take, counting the rows
 * that may appear (stream rows whenever streams are drawn). */
static double legend_height(const gw_problem *p, const gw_budget *b, const gw_map_layers *l)
{
    int rows = 2;   /* contour, inactive area */
    int stream = 0, drain = 0, fixed = 0, pump = 0, inj = 0, stag[3] = {0, 0, 0};
    for (int i = 0; i < l->ngeoms; i++) {
        gw_feature_type t = p->features[l->geoms[i].feature].type;
        stream |= t == GW_FEAT_STREAM;
        drain |= t == GW_FEAT_DRAIN;
    }
    for (int k = 0; k < p->nfeatures; k++) fixed |= p->features[k].type == GW_FEAT_FIXED_HEAD;
    for (int i = 0; i < p->nwells; i++) {
        if (p->wells[i].rate < 0) inj = 1; else pump = 1;
    }
    for (int i = 0; i < l->nstag; i++) stag[l->stag[i].type] = 1;
    if (stream) rows += b ? 6 : 1;   /* gaining, losing, still, width heading and two samples */
    rows += drain + fixed + (l->ndivides > 0) + pump + inj + (l->nobs > 0 ? 2 : 0) + stag[0] + stag[1] + stag[2];
    return 28 + 205 + 28 + 25.0 * rows + 10;   /* headings, colour bar, rows, margin */
}

int gw_map_head_write(const gw_problem *p, const double *head, const gw_budget *b,
                      const gw_map_layers *l, const char *path, gw_error *err)
{
    const gw_grid *g = &p->grid;
    size_t nc = gw_grid_ncells(g);
    range r = {HUGE_VAL, -HUGE_VAL};
    for (size_t k = 0; k < nc; k++)
        if (p->active[k] && isfinite(head[k])) {
            if (head[k] < r.hmin) r.hmin = head[k];
            if (head[k] > r.hmax) r.hmax = head[k];
        }
    if (!(r.hmax >= r.hmin)) return gw_fail(err, "head map: no active cell has a head");
    if (r.hmax - r.hmin < 1e-9 * (1 + fabs(r.hmax))) {   /* flat field: a one-colour map */
        r.hmin -= 0.5;
        r.hmax += 0.5;
    }
    const char *lu = l->length_unit ? l->length_unit : "m";
    const char *tu = l->time_unit ? l->time_unit : "day";
    double interval = l->contour_interval > 0 ? l->contour_interval
                                              : gw_contour_nice_interval(r.hmin, r.hmax, 12);
    /* Too fine for the head range (results.c warns): the automatic one. */
    if ((r.hmax - r.hmin) / interval > 400) interval = gw_contour_nice_interval(r.hmin, r.hmax, 12);
    char sub[256], ibuf[32];
    snprintf(sub, sizeof sub, "Steady-state hydraulic head (%s), contours every %s %s", lu,
             gw_fmt_num(ibuf, sizeof ibuf, interval, 6), lu);

    gw_map_page pg;
    if (gw_map_page_begin_legend(&pg, g, l->width, l->title ? l->title : "Head map", sub,
                                 legend_height(p, b, l), err) != 0)
        return -1;
    int rc = -1;
    gw_contour_set cs = {0};
    px_line *pl = NULL;
    int npl = 0;
    cairo_t *cr = pg.cv.cr;
    double fs = pg.fs;

    fill_heads(&pg, g, head, &r);
    int have_fixed = draw_fixed(&pg, p);
    if (gw_contour_trace(g, head, interval, &cs, err) != 0) goto done;

    /* ---- layout: feature lines and symbols first, then their labels, then
     * contour labels, so no label lands on a stream, drain or divide.
     * Clearances: half the widest stream stroke with its casing (5.25 px
     * at 1400 px) plus a margin; half a cased divide plus a margin. */
    if (gw_map_reserve_features(&pg, p, l, 7 * fs, 5 * fs) != 0) goto oom;
    if (gw_map_place_wells(&pg, p) != 0) goto oom;
    if (gw_map_place_stagnation(&pg, l) != 0) goto oom;
    gw_text_style ost = gw_map_style(&pg, 9.5, 0);
    ost.halo = 2.5 * fs;
    for (int i = 0; i < l->nobs; i++) {
        double x = gw_canvas_px(&pg.cv, l->obs[i].x), y = gw_canvas_py(&pg.cv, l->obs[i].y);
        gw_label_box bx = {x, y, 14 * fs, 14 * fs, 0};
        if (gw_labels_reserve(&pg.labels, &bx) != 0) goto oom;
    }
    for (int i = 0; i < l->nobs; i++) {
        const gw_map_obs *o = &l->obs[i];
        double x = gw_canvas_px(&pg.cv, o->x), y = gw_canvas_py(&pg.cv, o->y);
        char txt[120], nb[32];
        if (isfinite(o->observed) && isfinite(o->simulated)) {
            double res = o->observed - o->simulated;
            snprintf(txt, sizeof txt, "%s %s%s %s", o->name ? o->name : "obs", res >= 0 ? "+" : "",
                     gw_fmt_num(nb, sizeof nb, res, 3), lu);
        } else {
            snprintf(txt, sizeof txt, "%s", o->name ? o->name : "obs");
        }
        if (gw_map_point_label(&pg, x, y, 12 * fs, txt, &ost) < 0) goto oom;
    }
    {
        gw_text_style fst = gw_map_style(&pg, 10, 1), dst;
        fst.r = GAIN_RGB[0]; fst.g = GAIN_RGB[1]; fst.b = GAIN_RGB[2];
        fst.halo = 2.5 * fs;
        dst = fst;
        dst.r = DRAIN_RGB[0]; dst.g = DRAIN_RGB[1]; dst.b = DRAIN_RGB[2];
        if (gw_map_place_feature_names(&pg, p, l, &fst, &dst, 11 * fs) != 0) goto oom;
    }

    pl = calloc((size_t)(cs.nlines ? cs.nlines : 1), sizeof *pl);
    if (!pl) goto oom;
    for (int i = 0; i < cs.nlines; i++) {
        pl[i].pxy = malloc((size_t)cs.line[i].n * 2 * sizeof(double));
        if (!pl[i].pxy) goto oom;
        npl++;
        for (int k = 0; k < cs.line[i].n; k++) {
            pl[i].pxy[2 * k] = gw_canvas_px(&pg.cv, cs.line[i].xy[2 * k]);
            pl[i].pxy[2 * k + 1] = gw_canvas_py(&pg.cv, cs.line[i].xy[2 * k + 1]);
        }
        pl[i].n = cs.line[i].n;
        pl[i].level = cs.line[i].level;
        pl[i].major = gw_contour_index(cs.line[i].level, interval) % gw_contour_major_every(interval) == 0;
    }
    int first_label = pg.ntext;
    gw_text_style cst = gw_map_style(&pg, 9, 0);
    cst.r = cst.g = cst.b = 0.12;
    for (int pass = 0; pass < 2; pass++) {   /* major contours claim room first */
        for (int i = 0; i < npl; i++) {
            if (pl[i].major != (pass == 0)) continue;
            char txt[32];
            gw_fmt_num(txt, sizeof txt, pl[i].level, 10);
            gw_text_style s = cst;
            s.bold = pl[i].major;
            double w, h;
            gw_canvas_text_size(&pg.cv, txt, &s, &w, &h);
            gw_label_box boxes[8];
            int n = gw_labels_along_line(&pg.labels, pl[i].pxy, pl[i].n, w + 4 * fs, h, 420 * fs, boxes, 8);
            if (n < 0) goto oom;
            for (int j = 0; j < n; j++) {
                boxes[j].w -= 4 * fs;
                if (gw_map_queue_text(&pg, &boxes[j], txt, &s) != 0) goto oom;
            }
        }
    }
    int last_label = pg.ntext;

    /* ---- drawing: contours broken under their labels */
    cairo_save(cr);
    cairo_new_path(cr);
    cairo_rectangle(cr, 0, 0, pg.cv.width, pg.cv.height);
    for (int i = first_label; i < last_label; i++) rect_path(cr, &pg.text[i].box);
    cairo_set_fill_rule(cr, CAIRO_FILL_RULE_EVEN_ODD);
    cairo_clip(cr);
    cairo_rectangle(cr, pg.cv.fx0, pg.cv.fy0, pg.cv.fx1 - pg.cv.fx0, pg.cv.fy1 - pg.cv.fy0);
    cairo_clip(cr);
    cairo_set_line_join(cr, CAIRO_LINE_JOIN_ROUND);
    for (int i = 0; i < npl; i++) {
        cairo_new_path(cr);
        for (int k = 0; k < pl[i].n; k++) {
            if (k == 0) cairo_move_to(cr, pl[i].pxy[0], pl[i].pxy[1]);
            else cairo_line_to(cr, pl[i].pxy[2 * k], pl[i].pxy[2 * k + 1]);
        }
        cairo_set_source_rgba(cr, 0.08, 0.08, 0.1, pl[i].major ? 0.85 : 0.55);
        cairo_set_line_width(cr, (pl[i].major ? 1.6 : 0.9) * fs);
        cairo_stroke(cr);
    }
    cairo_restore(cr);

    stream_ctx sc;
    if (draw_streams(&pg, p, b, l, &sc, err) != 0) goto done;
    draw_link_cells(&pg, p, b, l);
    gw_map_draw_divides(&pg, l);
    gw_map_draw_stagnation(&pg, l);
    gw_map_draw_wells(&pg, p);
    for (int i = 0; i < l->nobs; i++)
        gw_map_sym_obs(cr, gw_canvas_px(&pg.cv, l->obs[i].x), gw_canvas_py(&pg.cv, l->obs[i].y), 6 * fs);

    /* ---- legend */
    char hd[96];
    snprintf(hd, sizeof hd, "Head (%s)", lu);
    gw_map_legend_heading(&pg, hd);
    draw_colour_bar(&pg, &r, interval, lu);
    int have_drain = 0, have_stream_geom = 0;
    for (int i = 0; i < l->ngeoms; i++) {
        gw_feature_type t = p->features[l->geoms[i].feature].type;
        if (t == GW_FEAT_DRAIN) have_drain = 1;
        if (t == GW_FEAT_STREAM) have_stream_geom = 1;
    }
    gw_map_legend_heading(&pg, "Features");
    char major_txt[96], mb[32];
    snprintf(major_txt, sizeof major_txt, "Contour (heavy every %s %s)",
             gw_fmt_num(mb, sizeof mb, interval * gw_contour_major_every(interval), 6), lu);
    legend_line(&pg, major_txt, (const double[3]){0.1, 0.1, 0.12}, 1.4 * fs, NULL, 0);
    if (sc.gaining_seen || (have_stream_geom && !b))
        legend_line(&pg, "Gaining stream (aquifer to stream)", GAIN_RGB, 5 * fs, NULL, 0);
    if (sc.losing_seen) legend_line(&pg, "Losing stream (stream to aquifer)", LOSE_RGB, 4.5 * fs, LOSE_CASE, 0);
    if ((sc.gaining_seen || sc.losing_seen) && sc.qmax > 0) {
        /* Width scale: two sample widths at round rates, so a reader can
         * read the exchange off the map. */
        double sx, sy;
        char txt[128], nb[32];
        gw_map_legend_row(&pg, "Line width shows the exchange:", &sx, &sy);
        double v1 = round_down(sc.qmax), v2 = round_down(0.2 * sc.qmax);
        double vs[2] = {v1, v2};
        for (int i = 0; i < 2; i++) {
            snprintf(txt, sizeof txt, "%s %s\u00b3/%s per %s of stream", gw_fmt_num(nb, sizeof nb, vs[i], 3),
                     lu, tu, lu);
            legend_line(&pg, txt, (const double[3]){0.3, 0.3, 0.33}, stream_width(fs, vs[i], sc.qmax), NULL, 0);
        }
    }
    if (sc.still_seen) legend_line(&pg, "Stream, no exchange", (const double[3]){0.45, 0.45, 0.48}, 2 * fs, NULL, 0);
    if (have_drain) legend_line(&pg, "Drain", DRAIN_RGB, 3.5 * fs, NULL, 0);
    if (have_fixed) {
        double sx, sy;
        gw_map_legend_row(&pg, "Fixed head", &sx, &sy);
        cairo_save(cr);
        cairo_rectangle(cr, sx - 12 * fs, sy - 8 * fs, 24 * fs, 16 * fs);
        cairo_set_source_rgb(cr, 0.93, 0.95, 0.98);
        cairo_fill_preserve(cr);
        cairo_clip_preserve(cr);
        cairo_set_source_rgb(cr, GAIN_RGB[0], GAIN_RGB[1], GAIN_RGB[2]);
        cairo_set_line_width(cr, 1.2 * fs);
        cairo_stroke(cr);
        for (double d = -16 * fs; d < 24 * fs; d += 6 * fs) {
            cairo_move_to(cr, sx - 12 * fs + d, sy - 8 * fs);
            cairo_line_to(cr, sx - 12 * fs + d + 16 * fs, sy + 8 * fs);
        }
        cairo_stroke(cr);
        cairo_restore(cr);
    }
    if (l->ndivides > 0) legend_line(&pg, "Groundwater divide", NULL, 2.4 * fs, NULL, 1);
    if (p->nwells > 0) {
        double maxq = 0;
        int inj = 0, pump = 0;
        for (int i = 0; i < p->nwells; i++) {
            if (fabs(p->wells[i].rate) > maxq) maxq = fabs(p->wells[i].rate);
            if (p->wells[i].rate < 0) inj = 1; else pump = 1;
        }
        char txt[128], nb[32];
        double sx, sy;
        if (pump) {
            snprintf(txt, sizeof txt, "Pumping well, %s %s\u00b3/%s", gw_fmt_num(nb, sizeof nb, maxq, 4), lu, tu);
            gw_map_legend_row(&pg, txt, &sx, &sy);
            gw_map_sym_well(cr, sx, sy, gw_map_well_radius(&pg, maxq, maxq), 0);
        }
        if (inj) {
            gw_map_legend_row(&pg, "Injection well", &sx, &sy);
            gw_map_sym_well(cr, sx, sy, gw_map_well_radius(&pg, maxq / 2, maxq), 1);
        }
    }
    if (l->nobs > 0) {
        double sx, sy;
        gw_map_legend_row(&pg, "Observation well:", &sx, &sy);
        gw_map_sym_obs(cr, sx, sy, 6 * fs);
        gw_map_legend_row(&pg, "residual = observed - simulated", &sx, &sy);
    }
    if (l->nstag > 0) {
        static const char *nm[3] = {"Head maximum", "Saddle (stagnation point)", "Head minimum"};
        int seen[3] = {0, 0, 0};
        for (int i = 0; i < l->nstag; i++) seen[l->stag[i].type] = 1;
        for (int t = 0; t < 3; t++)
            if (seen[t]) {
                double sx, sy;
                gw_map_legend_row(&pg, nm[t], &sx, &sy);
                gw_map_sym_stag(cr, sx, sy, 7 * fs, (gw_map_stag_type)t);
            }
    }
    {
        double sx, sy;
        gw_map_legend_row(&pg, "Inactive area: blank", &sx, &sy);
        cairo_rectangle(cr, sx - 12 * fs, sy - 8 * fs, 24 * fs, 16 * fs);
        cairo_set_source_rgb(cr, 0.4, 0.4, 0.42);
        cairo_set_line_width(cr, 1);
        cairo_stroke(cr);
    }

    gw_map_page_finish(&pg, lu, l->crs);
    char units[160];
    snprintf(units, sizeof units, "head in %s; flow in %s3/%s", lu, lu, tu);
    gw_png_meta meta = {l->title ? l->title : "Head map", units, l->crs,
                        "Steady-state hydraulic head with contours"};
    rc = gw_canvas_write_png(&pg.cv, path, &meta, err);
    goto done;
oom:
    gw_fail(err, "out of memory drawing the head map");
done:
    for (int i = 0; i < npl; i++) free(pl[i].pxy);
    free(pl);
    gw_contour_set_free(&cs);
    gw_map_page_free(&pg);
    return rc;
}
