#include "map_section.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "map_canvas.h"
#include "map_contour.h"
#include "map_labels.h"
#include "map_ramp.h"

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif

#ifndef GWDIVIDE_VERSION
#define GWDIVIDE_VERSION "dev"
#endif

/* The page: plot box in px and the section window it shows. */
typedef struct {
    gw_map_canvas cv;
    double fs;
    double px0, py0, px1, py1;
    double xmin, xmax, zmin, zmax;
    double sx, ve;              /* px per length along x; vertical exaggeration */
} page;

static double X(const page *pg, double x) { return pg->px0 + (x - pg->xmin) * pg->sx; }
static double Y(const page *pg, double z) { return pg->py1 - (z - pg->zmin) * pg->sx * pg->ve; }

/* Flow-system fills: three OKLab lightness steps (local lightest,
 * regional darkest) with distinct hues, so colour and greyscale both
 * separate them; dark line work stays readable on all three. */
static void kind_rgb(int kind, double rgb[3])
{
    static const double L[3] = { 0.965, 0.87, 0.76 }, C[3] = { 0.045, 0.06, 0.06 }, H[3] = { 95, 165, 250 };
    if (kind < 0 || kind > 2) {
        rgb[0] = rgb[1] = rgb[2] = 0.99;
        return;
    }
    gw_oklch_to_srgb(L[kind], C[kind], H[kind], rgb);
}

static const double EQ_RGB[3] = { 0.36, 0.24, 0.14 };     /* equipotentials: umber */
static const double FLOW_RGB[3] = { 0.08, 0.14, 0.36 };   /* flow lines: navy */
static const double WT_RGB[3] = { 0.0, 0.33, 0.72 };      /* water table */
static const double LINK_RGB[3] = { 0.55, 0.27, 0.05 };   /* seepage faces, drains, streams */

static double nice_down(double v)
{
    if (!(v > 1.0)) return 1.0;
    double p = pow(10.0, floor(log10(v))), m = v / p;
    return (m >= 5 ? 5 : m >= 2.5 ? 2.5 : m >= 2 ? 2 : 1) * p;
}

/* Vertical extent: the base of the grid to the top of the highest active cell. */
static void z_extent(const gw_problem *p, double *zmin, double *zmax)
{
    const gw_grid *g = &p->grid;
    *zmin = g->y0;
    *zmax = gw_grid_ytop(g);
    for (int r = 0; r < g->ny; r++)
        for (int c = 0; c < g->nx; c++)
            if (p->active[(size_t)r * g->nx + c]) {
                *zmax = gw_grid_ytop(g) - r * g->dy;
                return;
            }
}

double gw_section_map_exaggeration(const gw_problem *p, int width)
{
    (void)width;   /* the target shape does not depend on the pixel size */
    double zmin, zmax;
    z_extent(p, &zmin, &zmax);
    double xext = p->grid.nx * p->grid.dx, zext = zmax - zmin;
    if (!(zext > 0)) return 1.0;
    return nice_down(0.4 * xext / zext);
}

/* Clip to the saturated section: below the water table (the head of the
 * topmost fixed cell, within that cell) or, in columns without one, below
 * the top of the highest active cell.  Keeps the stepped cells of a
 * sloping water table from showing above its line. */
static void clip_saturated(page *pg, const gw_problem *p)
{
    const gw_grid *g = &p->grid;
    cairo_t *cr = pg->cv.cr;
    cairo_new_path(cr);
    cairo_move_to(cr, X(pg, pg->xmin), Y(pg, pg->zmin));
    for (int c = 0; c < g->nx; c++) {
        double z = pg->zmin;
        for (int r = 0; r < g->ny; r++) {
            size_t k = (size_t)r * g->nx + c;
            if (!p->active[k]) continue;
            double zt = gw_grid_ytop(g) - r * g->dy;
            z = zt;
            if (p->fixed_feature[k] >= 0 && p->fixed[k] < zt && p->fixed[k] > zt - g->dy) z = p->fixed[k];
            break;
        }
        if (c == 0) cairo_line_to(cr, X(pg, g->x0), Y(pg, z));
        cairo_line_to(cr, X(pg, gw_grid_xc(g, c)), Y(pg, z));
        if (c == g->nx - 1) cairo_line_to(cr, X(pg, pg->xmax), Y(pg, z));
    }
    cairo_line_to(cr, X(pg, pg->xmax), Y(pg, pg->zmin));
    cairo_close_path(cr);
    cairo_clip(cr);
}

/* Fill every active cell with the colour of its flow system. */
static void draw_systems(page *pg, const gw_problem *p, const int *kind)
{
    const gw_grid *g = &p->grid;
    cairo_t *cr = pg->cv.cr;
    cairo_save(cr);
    cairo_set_antialias(cr, CAIRO_ANTIALIAS_NONE);
    for (int r = 0; r < g->ny; r++)
        for (int c = 0; c < g->nx; c++) {
            size_t k = (size_t)r * g->nx + c;
            if (!p->active[k]) continue;
            int kd = kind[k];
            /* fixed (water-table) cells take the system below them */
            for (int rr = r + 1; kd < 0 && p->fixed_feature[k] >= 0 && rr < g->ny && rr < r + 4; rr++)
                kd = kind[(size_t)rr * g->nx + c];
            double rgb[3];
            kind_rgb(kd, rgb);
            double zt = gw_grid_ytop(g) - r * g->dy;
            double x0 = floor(X(pg, g->x0 + c * g->dx)), x1 = ceil(X(pg, g->x0 + (c + 1) * g->dx));
            double y0 = floor(Y(pg, zt)), y1 = ceil(Y(pg, zt - g->dy));
            cairo_rectangle(cr, x0, y0, x1 - x0, y1 - y0);
            cairo_set_source_rgb(cr, rgb[0], rgb[1], rgb[2]);
            cairo_fill(cr);
        }
    cairo_restore(cr);
}

static void poly_px(const page *pg, const double *xz, int n, double *pxy)
{
    for (int i = 0; i < n; i++) {
        pxy[2 * i] = X(pg, xz[2 * i]);
        pxy[2 * i + 1] = Y(pg, xz[2 * i + 1]);
    }
}

static void stroke_poly(cairo_t *cr, const double *pxy, int n)
{
    cairo_new_path(cr);
    for (int i = 0; i < n; i++) {
        if (i == 0) cairo_move_to(cr, pxy[0], pxy[1]);
        else cairo_line_to(cr, pxy[2 * i], pxy[2 * i + 1]);
    }
    cairo_stroke(cr);
}

/* Equipotentials with labels on the major ones (white halo). */
static int draw_equipotentials(page *pg, const gw_problem *p, const gw_solution *sol, double interval,
                               const char *L, gw_error *err)
{
    const gw_grid *g = &p->grid;
    size_t n = gw_grid_ncells(g);
    double *h = malloc(n * sizeof *h);
    if (!h) return gw_fail(err, "out of memory drawing the section");
    for (size_t k = 0; k < n; k++) h[k] = p->active[k] ? sol->head[k] : NAN;
    gw_contour_set cs = { 0 };
    int rc = gw_contour_trace(g, h, interval, &cs, err);
    free(h);
    if (rc != 0) return -1;
    cairo_t *cr = pg->cv.cr;
    gw_label_set ls;
    gw_labels_init(&ls, pg->px0 + 2, pg->py0 + 2, pg->px1 - 2, pg->py1 - 2, 4 * pg->fs);
    int every = gw_contour_major_every(interval);
    gw_text_style st = { 8, 0, 0.5, 0.5, 2.2 * pg->fs, EQ_RGB[0], EQ_RGB[1], EQ_RGB[2] };
    typedef struct { gw_label_box b; char t[32]; } lab;
    lab *labs = NULL;
    int nl = 0, capl = 0;
    for (int i = 0; i < cs.nlines && rc == 0; i++) {
        const gw_contour_line *cl = &cs.line[i];
        double *pxy = malloc((size_t)cl->n * 2 * sizeof *pxy);
        if (!pxy) { rc = gw_fail(err, "out of memory drawing the section"); break; }
        poly_px(pg, cl->xy, cl->n, pxy);
        int major = gw_contour_index(cl->level, interval) % every == 0;
        cairo_set_source_rgb(cr, EQ_RGB[0], EQ_RGB[1], EQ_RGB[2]);
        cairo_set_line_width(cr, (major ? 1.5 : 0.8) * pg->fs);
        stroke_poly(cr, pxy, cl->n);
        if (major) {
            char t[32], nb[24];
            snprintf(t, sizeof t, "%s", gw_fmt_num(nb, sizeof nb, cl->level, 6));
            double w, hh;
            gw_canvas_text_size(&pg->cv, t, &st, &w, &hh);
            gw_label_box out[3];
            int got = gw_labels_along_line(&ls, pxy, cl->n, w + 4 * pg->fs, hh, 320 * pg->fs, out, 3);
            for (int j = 0; j < got; j++) {
                if (nl == capl) {
                    capl = capl ? 2 * capl : 32;
                    lab *nlb = realloc(labs, (size_t)capl * sizeof *nlb);
                    if (!nlb) { rc = gw_fail(err, "out of memory drawing the section"); break; }
                    labs = nlb;
                }
                labs[nl].b = out[j];
                snprintf(labs[nl].t, sizeof labs[nl].t, "%s", t);
                nl++;
            }
        }
        free(pxy);
    }
    for (int i = 0; i < nl; i++) {
        cairo_save(cr);
        cairo_translate(cr, labs[i].b.cx, labs[i].b.cy);
        cairo_rotate(cr, labs[i].b.angle);
        gw_canvas_text(&pg->cv, 0, 0, labs[i].t, &st);
        cairo_restore(cr);
    }
    free(labs);
    gw_labels_free(&ls);
    gw_contour_set_free(&cs);
    (void)L;
    return rc;
}

/* Arrowhead at the middle (by length in px) of a polyline. */
static void arrow_mid(cairo_t *cr, const double *pxy, int n, double size)
{
    double total = 0;
    for (int i = 0; i + 1 < n; i++)
        total += hypot(pxy[2 * i + 2] - pxy[2 * i], pxy[2 * i + 3] - pxy[2 * i + 1]);
    if (total < 6 * size) return;
    double acc = 0;
    for (int i = 0; i + 1 < n; i++) {
        double dx = pxy[2 * i + 2] - pxy[2 * i], dy = pxy[2 * i + 3] - pxy[2 * i + 1], l = hypot(dx, dy);
        if (acc + l >= 0.5 * total && l > 0) {
            double f = (0.5 * total - acc) / l, x = pxy[2 * i] + f * dx, y = pxy[2 * i + 1] + f * dy;
            double ux = dx / l, uy = dy / l;
            cairo_new_path(cr);
            cairo_move_to(cr, x + size * ux, y + size * uy);
            cairo_line_to(cr, x - size * ux + 0.6 * size * uy, y - size * uy - 0.6 * size * ux);
            cairo_line_to(cr, x - size * ux - 0.6 * size * uy, y - size * uy + 0.6 * size * ux);
            cairo_close_path(cr);
            cairo_fill(cr);
            return;
        }
        acc += l;
    }
}

/* Flow lines from the faces where water enters in the recharge areas,
 * spaced so each carries an equal share of that inflow. */
static int draw_flow_lines(page *pg, const gw_problem *p, const gw_solution *sol, const gw_section *s,
                           int nlines, double *carried, gw_error *err)
{
    *carried = nlines > 0 ? s->recharge_flux / nlines : 0;
    double *seeds = malloc((size_t)(nlines > 0 ? nlines : 1) * 2 * sizeof *seeds);
    int ns = 0;
    if (!seeds) return gw_fail(err, "out of memory drawing the section");
    if (gw_section_flow_seeds(p, sol, s, nlines, seeds, &ns, err) != 0) {
        free(seeds);
        return -1;
    }
    /* the seeds share the water entering through faces, which is the
     * recharge less what enters straight into recharged cells */
    cairo_t *cr = pg->cv.cr;
    for (int j = 0; j < ns; j++) {
        gw_section_line ln = { 0 };
        int end;
        double t, zmin;
        gw_error e2 = { { 0 } };
        if (gw_section_trace(p, sol, seeds[2 * j], seeds[2 * j + 1], &ln, &end, &t, &zmin, &e2) != 0) {
            if (strstr(e2.msg, "out of memory")) {
                free(seeds);
                return gw_fail(err, "%s", e2.msg);
            }
            continue;   /* a seed on an awkward face: leave that line out */
        }
        double *pxy = malloc((size_t)(ln.n > 0 ? ln.n : 1) * 2 * sizeof *pxy);
        if (!pxy) {
            gw_section_line_free(&ln);
            free(seeds);
            return gw_fail(err, "out of memory drawing the section");
        }
        poly_px(pg, ln.xz, ln.n, pxy);
        cairo_set_source_rgb(cr, FLOW_RGB[0], FLOW_RGB[1], FLOW_RGB[2]);
        cairo_set_line_width(cr, 1.1 * pg->fs);
        cairo_set_line_join(cr, CAIRO_LINE_JOIN_ROUND);
        stroke_poly(cr, pxy, ln.n);
        arrow_mid(cr, pxy, ln.n, 5 * pg->fs);
        free(pxy);
        gw_section_line_free(&ln);
    }
    free(seeds);
    return 0;
}

static void draw_divides(page *pg, const gw_section *s)
{
    cairo_t *cr = pg->cv.cr;
    for (int pass = 0; pass < 2; pass++)
        for (int i = 0; i < s->ndivides; i++) {
            const gw_section_line *d = &s->divide[i];
            double *pxy = malloc((size_t)(d->n > 0 ? d->n : 1) * 2 * sizeof *pxy);
            if (!pxy) return;   /* decoration only */
            poly_px(pg, d->xz, d->n, pxy);
            cairo_save(cr);
            if (pass == 0) {
                cairo_set_source_rgba(cr, 1, 1, 1, 0.85);
                cairo_set_line_width(cr, 4.2 * pg->fs);
            } else {
                double dash[2] = { 9 * pg->fs, 5 * pg->fs };
                cairo_set_dash(cr, dash, 2, 0);
                cairo_set_source_rgb(cr, 0.05, 0.05, 0.07);
                cairo_set_line_width(cr, 2.0 * pg->fs);
            }
            stroke_poly(cr, pxy, d->n);
            cairo_restore(cr);
            free(pxy);
        }
}

static void hinge_symbol(cairo_t *cr, double x, double y, double r)
{
    cairo_new_path(cr);
    cairo_arc(cr, x, y, r, 0, 2 * M_PI);
    cairo_set_source_rgb(cr, 1, 1, 1);
    cairo_fill_preserve(cr);
    cairo_set_source_rgb(cr, 0.05, 0.05, 0.07);
    cairo_set_line_width(cr, 0.45 * r);
    cairo_stroke(cr);
    cairo_new_path(cr);
    cairo_arc(cr, x, y, 0.35 * r, 0, 2 * M_PI);
    cairo_fill(cr);
}

/* Water table, the recharge / discharge band above the plot, hinge points
 * and head-dependent cells. */
static void draw_top(page *pg, const gw_problem *p, const gw_section *s)
{
    cairo_t *cr = pg->cv.cr;
    const gw_grid *g = &p->grid;
    double fs = pg->fs;
    /* link cells (seepage faces, drains, streams): small squares */
    for (int i = 0; i < p->nlinks; i++) {
        int k = p->links[i].cell;
        double x = X(pg, gw_grid_xc(g, k % g->nx)), y = Y(pg, gw_grid_yc(g, k / g->nx));
        double h = 3.2 * fs;
        cairo_rectangle(cr, x - h, y - h, 2 * h, 2 * h);
        cairo_set_source_rgb(cr, LINK_RGB[0], LINK_RGB[1], LINK_RGB[2]);
        cairo_fill(cr);
    }
    /* the water table: where the topmost active cell of a column is fixed
     * (a top of seepage faces or recharge has no given water table) */
    cairo_save(cr);
    cairo_rectangle(cr, pg->px0, pg->py0 - 2 * fs, pg->px1 - pg->px0, pg->py1 - pg->py0 + 2 * fs);
    cairo_clip(cr);
    cairo_new_path(cr);
    int pen = 0;
    for (int i = 0; i < s->ntop; i++) {
        int c = s->top[i].col, r = 0;
        while (r < g->ny && !p->active[(size_t)r * g->nx + c]) r++;
        if (r >= g->ny || p->fixed_feature[(size_t)r * g->nx + c] < 0) {
            pen = 0;
            continue;
        }
        double x = X(pg, s->top[i].x), y = Y(pg, s->top[i].z);
        if (!pen) cairo_move_to(cr, x, y); else cairo_line_to(cr, x, y);
        pen = 1;
    }
    cairo_set_source_rgb(cr, WT_RGB[0], WT_RGB[1], WT_RGB[2]);
    cairo_set_line_width(cr, 2.6 * fs);
    cairo_set_line_join(cr, CAIRO_LINE_JOIN_ROUND);
    cairo_stroke(cr);
    cairo_restore(cr);
    /* band: recharge areas light with a dark outline, discharge areas dark */
    double by0 = pg->py0 - 24 * fs, by1 = pg->py0 - 8 * fs;
    gw_text_style st = { 8, 1, 0.5, 0.5, 0, 1, 1, 1 };
    for (int a = 0; a < s->nareas; a++) {
        const gw_section_area *ar = &s->area[a];
        double x0 = X(pg, ar->x0), x1 = X(pg, ar->x1);
        cairo_rectangle(cr, x0, by0, x1 - x0, by1 - by0);
        if (ar->recharge) cairo_set_source_rgb(cr, 0.86, 0.91, 0.97);
        else cairo_set_source_rgb(cr, 0.08, 0.14, 0.36);
        cairo_fill_preserve(cr);
        cairo_set_source_rgb(cr, 0.08, 0.14, 0.36);
        cairo_set_line_width(cr, 1.0 * fs);
        cairo_stroke(cr);
        const char *word = ar->recharge ? "recharge" : "discharge";
        double w;
        gw_canvas_text_size(&pg->cv, word, &st, &w, NULL);
        if (w + 6 * fs > x1 - x0) word = ar->recharge ? "R" : "D";
        gw_canvas_text_size(&pg->cv, word, &st, &w, NULL);
        if (w + 3 * fs > x1 - x0) continue;
        st.r = st.g = st.b = ar->recharge ? 0.08 : 1.0;
        gw_canvas_text(&pg->cv, 0.5 * (x0 + x1), 0.5 * (by0 + by1), word, &st);
    }
    for (int i = 0; i < s->nhinges; i++) {
        double x = X(pg, s->hinge[i].x), y = Y(pg, s->hinge[i].z);
        cairo_save(cr);
        double dash[2] = { 2 * fs, 2 * fs };
        cairo_set_dash(cr, dash, 2, 0);
        cairo_move_to(cr, x, by1);
        cairo_line_to(cr, x, y);
        cairo_set_source_rgba(cr, 0.05, 0.05, 0.07, 0.6);
        cairo_set_line_width(cr, 1.0 * fs);
        cairo_stroke(cr);
        cairo_restore(cr);
        hinge_symbol(cr, x, y, 4.5 * fs);
    }
}

static void draw_axes(page *pg, const char *L)
{
    cairo_t *cr = pg->cv.cr;
    double fs = pg->fs;
    char nb[32], buf[96];
    cairo_rectangle(cr, pg->px0, pg->py0, pg->px1 - pg->px0, pg->py1 - pg->py0);
    cairo_set_source_rgb(cr, 0.2, 0.2, 0.22);
    cairo_set_line_width(cr, 1.2 * fs);
    cairo_stroke(cr);
    gw_text_style ax = { 9, 0, 0.5, 0, 0, 0.25, 0.25, 0.27 };
    double ds = gw_contour_nice_interval(pg->xmin, pg->xmax, 10);
    for (double d = ceil(pg->xmin / ds) * ds; d <= pg->xmax + 1e-9 * ds; d += ds) {
        cairo_move_to(cr, X(pg, d), pg->py1);
        cairo_line_to(cr, X(pg, d), pg->py1 + 5 * fs);
        gw_canvas_text(&pg->cv, X(pg, d), pg->py1 + 8 * fs, gw_fmt_num(nb, sizeof nb, d, 8), &ax);
    }
    double zs = gw_contour_nice_interval(pg->zmin, pg->zmax, 6);
    gw_text_style ay = { 9, 0, 1, 0.5, 0, 0.25, 0.25, 0.27 };
    for (double z = ceil(pg->zmin / zs) * zs; z <= pg->zmax + 1e-9 * zs; z += zs) {
        cairo_move_to(cr, pg->px0 - 5 * fs, Y(pg, z));
        cairo_line_to(cr, pg->px0, Y(pg, z));
        gw_canvas_text(&pg->cv, pg->px0 - 8 * fs, Y(pg, z), gw_fmt_num(nb, sizeof nb, z, 8), &ay);
    }
    cairo_set_line_width(cr, 1.0 * fs);
    cairo_stroke(cr);
    gw_text_style xl = { 10, 0, 0.5, 0, 0, 0.15, 0.15, 0.15 };
    snprintf(buf, sizeof buf, "Distance along the section (%s)", L);
    gw_canvas_text(&pg->cv, 0.5 * (pg->px0 + pg->px1), pg->py1 + 28 * fs, buf, &xl);
    snprintf(buf, sizeof buf, "Elevation (%s)", L);
    cairo_save(cr);
    cairo_translate(cr, 22 * fs, 0.5 * (pg->py0 + pg->py1));
    cairo_rotate(cr, -M_PI / 2);
    gw_canvas_text(&pg->cv, 0, 0, buf, &xl);
    cairo_restore(cr);
}

/* One legend item: symbol drawn by kind at (x, y), text after it.
 * Returns the x where the next item starts. */
static double legend_item(page *pg, double x, double y, int what, const char *text)
{
    cairo_t *cr = pg->cv.cr;
    double fs = pg->fs, w = 34 * fs;
    double rgb[3];
    cairo_save(cr);
    switch (what) {
    case 0: case 1: case 2:
        kind_rgb(what, rgb);
        cairo_rectangle(cr, x, y - 8 * fs, w, 16 * fs);
        cairo_set_source_rgb(cr, rgb[0], rgb[1], rgb[2]);
        cairo_fill_preserve(cr);
        cairo_set_source_rgb(cr, 0.4, 0.4, 0.42);
        cairo_set_line_width(cr, 0.8 * fs);
        cairo_stroke(cr);
        break;
    case 3:
        cairo_set_source_rgb(cr, EQ_RGB[0], EQ_RGB[1], EQ_RGB[2]);
        cairo_set_line_width(cr, 1.5 * fs);
        cairo_move_to(cr, x, y);
        cairo_line_to(cr, x + w, y);
        cairo_stroke(cr);
        break;
    case 4: {
        double p[4] = { x, y, x + w, y };
        cairo_set_source_rgb(cr, FLOW_RGB[0], FLOW_RGB[1], FLOW_RGB[2]);
        cairo_set_line_width(cr, 1.1 * fs);
        stroke_poly(cr, p, 2);
        arrow_mid(cr, p, 2, 5 * fs);
        break;
    }
    case 5: {
        double dash[2] = { 9 * fs, 5 * fs };
        cairo_set_dash(cr, dash, 2, 0);
        cairo_set_source_rgb(cr, 0.05, 0.05, 0.07);
        cairo_set_line_width(cr, 2.0 * fs);
        cairo_move_to(cr, x, y);
        cairo_line_to(cr, x + w, y);
        cairo_stroke(cr);
        break;
    }
    case 6:
        cairo_set_source_rgb(cr, WT_RGB[0], WT_RGB[1], WT_RGB[2]);
        cairo_set_line_width(cr, 2.6 * fs);
        cairo_move_to(cr, x, y);
        cairo_line_to(cr, x + w, y);
        cairo_stroke(cr);
        break;
    case 7:
        hinge_symbol(cr, x + 0.5 * w, y, 4.5 * fs);
        break;
    case 8:
        cairo_rectangle(cr, x + 0.5 * w - 3.2 * fs, y - 3.2 * fs, 6.4 * fs, 6.4 * fs);
        cairo_set_source_rgb(cr, LINK_RGB[0], LINK_RGB[1], LINK_RGB[2]);
        cairo_fill(cr);
        break;
    case 9: case 10:
        cairo_rectangle(cr, x, y - 7 * fs, w, 14 * fs);
        if (what == 9) cairo_set_source_rgb(cr, 0.86, 0.91, 0.97);
        else cairo_set_source_rgb(cr, 0.08, 0.14, 0.36);
        cairo_fill_preserve(cr);
        cairo_set_source_rgb(cr, 0.08, 0.14, 0.36);
        cairo_set_line_width(cr, 1.0 * fs);
        cairo_stroke(cr);
        break;
    }
    cairo_restore(cr);
    gw_text_style st = { 9, 0, 0, 0.5, 0, 0.12, 0.12, 0.14 };
    gw_canvas_text(&pg->cv, x + w + 7 * fs, y, text, &st);
    double tw;
    gw_canvas_text_size(&pg->cv, text, &st, &tw, NULL);
    return x + w + 7 * fs + tw + 26 * fs;
}

int gw_map_section_write(const gw_section_map *o, const gw_problem *p, const gw_solution *sol,
                         const gw_section *s, const char *path, gw_error *err)
{
    if (p->type != GW_SECTION) return gw_fail(err, "section map: the model is not a cross-section");
    const gw_grid *g = &p->grid;
    const char *L = o->length_unit ? o->length_unit : "m", *T = o->time_unit ? o->time_unit : "day";
    int W = o->width > 0 ? o->width : 1400;
    if (W < 600) W = 600;
    if (W > 8000) W = 8000;
    page pg;
    memset(&pg, 0, sizeof pg);
    pg.fs = W / 1400.0;
    double fs = pg.fs;
    pg.xmin = g->x0;
    pg.xmax = g->x0 + g->nx * g->dx;
    z_extent(p, &pg.zmin, &pg.zmax);
    pg.ve = gw_section_map_exaggeration(p, W);
    pg.px0 = 96 * fs;
    pg.px1 = W - 36 * fs;
    pg.py0 = 124 * fs;
    pg.sx = (pg.px1 - pg.px0) / (pg.xmax - pg.xmin);
    double ph = (pg.zmax - pg.zmin) * pg.sx * pg.ve;
    if (ph > 2.0 * W) {   /* a tall, narrow section: cap the height */
        pg.ve *= 2.0 * W / ph;
        ph = 2.0 * W;
    }
    pg.py1 = pg.py0 + ph;
    int H = (int)ceil(pg.py1 + 60 * fs + 86 * fs);
    if (gw_canvas_init(&pg.cv, W, H, err) != 0) return -1;

    int rc = -1;
    size_t nc = gw_grid_ncells(g);
    int *kind = malloc(nc * sizeof *kind);
    if (!kind) {
        gw_fail(err, "out of memory drawing the section");
        goto done;
    }
    /* one trace pair per cell up to ~100k cells, then per block */
    int stride = (int)ceil(sqrt((double)nc / 100000.0));
    if (gw_section_cell_kinds(p, sol, s, stride, kind, err) != 0) goto done;

    double hmin = HUGE_VAL, hmax = -HUGE_VAL;
    for (size_t k = 0; k < nc; k++)
        if (p->active[k] && isfinite(sol->head[k])) {
            hmin = fmin(hmin, sol->head[k]);
            hmax = fmax(hmax, sol->head[k]);
        }
    double interval = o->contour_interval > 0 ? o->contour_interval
                                               : gw_contour_nice_interval(hmin, hmax, 16);
    if (hmax > hmin && (hmax - hmin) / interval > 400) interval = gw_contour_nice_interval(hmin, hmax, 16);

    cairo_save(pg.cv.cr);
    cairo_rectangle(pg.cv.cr, pg.px0, pg.py0, pg.px1 - pg.px0, pg.py1 - pg.py0);
    cairo_clip(pg.cv.cr);
    clip_saturated(&pg, p);
    draw_systems(&pg, p, kind);
    if (hmax > hmin && draw_equipotentials(&pg, p, sol, interval, L, err) != 0) {
        cairo_restore(pg.cv.cr);
        goto done;
    }
    int nlines = o->nflow_lines > 0 ? o->nflow_lines : 36;
    double carried = 0;
    if (draw_flow_lines(&pg, p, sol, s, nlines, &carried, err) != 0) {
        cairo_restore(pg.cv.cr);
        goto done;
    }
    draw_divides(&pg, s);
    cairo_restore(pg.cv.cr);
    draw_top(&pg, p, s);
    draw_axes(&pg, L);

    /* title, subtitle (states the vertical exaggeration) */
    char buf[400], nb[32], nb2[32], nb3[32];
    gw_text_style t = { 17, 1, 0, 0, 0, 0.1, 0.1, 0.12 };
    gw_canvas_text(&pg.cv, pg.px0, 14 * fs, o->title && *o->title ? o->title : "Cross-section", &t);
    snprintf(buf, sizeof buf,
             "Vertical section, vertical exaggeration %sx. Equipotentials every %s %s of head; %d flow lines, "
             "each carrying %s %s2/%s per %s of width.",
             gw_fmt_num(nb, sizeof nb, pg.ve, 4), gw_fmt_num(nb2, sizeof nb2, interval, 4), L, nlines,
             gw_fmt_num(nb3, sizeof nb3, carried, 3), L, T, L);
    gw_text_style sub = { 10.5, 0, 0, 0, 0, 0.3, 0.3, 0.3 };
    gw_canvas_text(&pg.cv, pg.px0, 46 * fs, buf, &sub);
    snprintf(buf, sizeof buf, "Band above: recharge and discharge areas along the top; %d hinge point%s.",
             s->nhinges, s->nhinges == 1 ? "" : "s");
    gw_canvas_text(&pg.cv, pg.px0, 68 * fs, buf, &sub);

    /* legend: two rows below the axis title */
    double ly = pg.py1 + 62 * fs, x = pg.px0;
    x = legend_item(&pg, x, ly, 0, "local system");
    x = legend_item(&pg, x, ly, 1, "intermediate system");
    x = legend_item(&pg, x, ly, 2, "regional system");
    x = legend_item(&pg, x, ly, 9, "recharge area");
    x = legend_item(&pg, x, ly, 10, "discharge area");
    ly += 26 * fs;
    x = pg.px0;
    x = legend_item(&pg, x, ly, 3, "equipotential");
    x = legend_item(&pg, x, ly, 4, "flow line");
    x = legend_item(&pg, x, ly, 5, "dividing streamline");
    x = legend_item(&pg, x, ly, 6, "water table");
    x = legend_item(&pg, x, ly, 7, "hinge point");
    if (p->nlinks > 0) legend_item(&pg, x, ly, 8, "seepage / drain cell");
    gw_text_style ft = { 7.5, 0, 1, 1, 0, 0.45, 0.45, 0.45 };
    snprintf(buf, sizeof buf, "gwdivide %s - steady state, per unit width; screening results", GWDIVIDE_VERSION);
    gw_canvas_text(&pg.cv, W - 10 * fs, H - 6 * fs, buf, &ft);

    char units[96], desc[160];
    snprintf(units, sizeof units, "head and distance in %s; flow in %s2/%s per %s of width", L, L, T, L);
    snprintf(desc, sizeof desc, "Cross-section: flow systems, equipotentials, flow lines; vertical exaggeration %gx",
             pg.ve);
    gw_png_meta meta = { o->title ? o->title : "Cross-section", units, NULL, desc };
    rc = gw_canvas_write_png(&pg.cv, path, &meta, err);
done:
    free(kind);
    gw_canvas_free(&pg.cv);
    return rc;
}
