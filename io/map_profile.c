#include "map_profile.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>

#include "../solver/observe.h"
#include "map_canvas.h"
#include "map_contour.h"
#include "map_ramp.h"

int gw_profile_sample(const gw_grid *g, const double *head, const double *xy, int n, int ns,
                      double *dist, double *hs, gw_error *err)
{
    if (n < 2 || ns < 2) return gw_fail(err, "a transect needs at least two vertices");
    double total = 0;
    for (int i = 1; i < n; i++) total += hypot(xy[2 * i] - xy[2 * i - 2], xy[2 * i + 1] - xy[2 * i - 1]);
    if (!(total > 0)) return gw_fail(err, "the transect has zero length");
    int seg = 0;
    double segstart = 0;
    for (int j = 0; j < ns; j++) {
        double t = total * j / (ns - 1);
        for (;;) {
            double L = hypot(xy[2 * seg + 2] - xy[2 * seg], xy[2 * seg + 3] - xy[2 * seg + 1]);
            if (t <= segstart + L || seg == n - 2) {
                double f = L > 0 ? (t - segstart) / L : 0;
                if (f > 1) f = 1;
                double x = xy[2 * seg] + f * (xy[2 * seg + 2] - xy[2 * seg]);
                double y = xy[2 * seg + 1] + f * (xy[2 * seg + 3] - xy[2 * seg + 1]);
                dist[j] = t;
                hs[j] = gw_head_at(g, head, x, y);
                break;
            }
            segstart += L;
            seg++;
        }
    }
    return 0;
}

int gw_map_profile_write(const gw_profile_chart *pc, const char *path, gw_error *err)
{
    int W = pc->width > 0 ? pc->width : 1400;
    if (W < 600) W = 600;
    if (W > 8000) W = 8000;
    double fs = W / 1400.0;
    int H = (int)(W * 0.55);
    double dmin = HUGE_VAL, dmax = -HUGE_VAL, hmin = HUGE_VAL, hmax = -HUGE_VAL;
    for (int c = 0; c < pc->ncurves; c++)
        for (int i = 0; i < pc->curves[c].n; i++) {
            double d = pc->curves[c].dist[i], h = pc->curves[c].head[i];
            if (!isfinite(d) || !isfinite(h)) continue;
            if (d < dmin) dmin = d;
            if (d > dmax) dmax = d;
            if (h < hmin) hmin = h;
            if (h > hmax) hmax = h;
        }
    if (!(dmax > dmin)) return gw_fail(err, "profile chart: no heads along the transect");
    if (!(hmax > hmin)) { hmin -= 0.5; hmax += 0.5; }
    double pad = 0.06 * (hmax - hmin);
    hmin -= pad;
    hmax += pad;

    gw_map_canvas cv;
    if (gw_canvas_init(&cv, W, H, err) != 0) return -1;
    cairo_t *cr = cv.cr;
    const char *lu = pc->length_unit ? pc->length_unit : "m";
    double px0 = 100 * fs, px1 = W - 300 * fs, py0 = 100 * fs, py1 = H - 80 * fs;
    gw_text_style t = {17, 1, 0, 0, 0, 0.1, 0.1, 0.12};
    gw_canvas_text(&cv, px0, 16 * fs, pc->title ? pc->title : "Head profile", &t);
    gw_text_style s = {11, 0, 0, 0, 0, 0.3, 0.3, 0.3};
    if (pc->subtitle) gw_canvas_text(&cv, px0, 50 * fs, pc->subtitle, &s);

#define PX(d) (px0 + ((d) - dmin) / (dmax - dmin) * (px1 - px0))
#define PY(h) (py1 - ((h) - hmin) / (hmax - hmin) * (py1 - py0))
    char nb[32], buf[128];
    gw_text_style ax = {9, 0, 0.5, 0, 0, 0.3, 0.3, 0.3};
    double ds = gw_contour_nice_interval(dmin, dmax, 8);
    for (double d = ceil(dmin / ds) * ds; d <= dmax + 1e-9 * ds; d += ds) {
        cairo_move_to(cr, PX(d), py0);
        cairo_line_to(cr, PX(d), py1);
        gw_canvas_text(&cv, PX(d), py1 + 6 * fs, gw_fmt_num(nb, sizeof nb, d, 8), &ax);
    }
    double hs = gw_contour_nice_interval(hmin, hmax, 7);
    gw_text_style ay = {9, 0, 1, 0.5, 0, 0.3, 0.3, 0.3};
    for (double h = ceil(hmin / hs) * hs; h <= hmax + 1e-9 * hs; h += hs) {
        cairo_move_to(cr, px0, PY(h));
        cairo_line_to(cr, px1, PY(h));
        gw_canvas_text(&cv, px0 - 6 * fs, PY(h), gw_fmt_num(nb, sizeof nb, h, 8), &ay);
    }
    cairo_set_source_rgb(cr, 0.88, 0.88, 0.9);
    cairo_set_line_width(cr, 1);
    cairo_stroke(cr);
    cairo_rectangle(cr, px0, py0, px1 - px0, py1 - py0);
    cairo_set_source_rgb(cr, 0.2, 0.2, 0.22);
    cairo_stroke(cr);
    gw_text_style xl = {10, 0, 0.5, 0, 0, 0.15, 0.15, 0.15};
    snprintf(buf, sizeof buf, "Distance along transect (%s)", lu);
    gw_canvas_text(&cv, 0.5 * (px0 + px1), py1 + 28 * fs, buf, &xl);
    snprintf(buf, sizeof buf, "Head (%s)", lu);
    gw_text_style yl = {10, 0, 0, 1, 0, 0.15, 0.15, 0.15};
    gw_canvas_text(&cv, px0, py0 - 8 * fs, buf, &yl);

    /* Curves: lightness steps along our ramp plus dash patterns, so a
     * greyscale copy still tells them apart. */
    static const double dashes[4][2] = {{0, 0}, {10, 5}, {3, 4}, {14, 4}};
    gw_text_style lg = {10, 0, 0, 0.5, 0, 0.1, 0.1, 0.12};
    for (int c = 0; c < pc->ncurves; c++) {
        const gw_profile_curve *cu = &pc->curves[c];
        double rgb[3];
        gw_ramp_rgb(pc->ncurves > 1 ? 0.6 * c / (pc->ncurves - 1) : 0.1, rgb);
        cairo_save(cr);
        cairo_rectangle(cr, px0, py0, px1 - px0, py1 - py0);
        cairo_clip(cr);
        cairo_new_path(cr);
        int pen = 0;
        for (int i = 0; i < cu->n; i++) {
            if (!isfinite(cu->head[i])) { pen = 0; continue; }
            if (!pen) cairo_move_to(cr, PX(cu->dist[i]), PY(cu->head[i]));
            else cairo_line_to(cr, PX(cu->dist[i]), PY(cu->head[i]));
            pen = 1;
        }
        if (c % 4) {
            double d[2] = {dashes[c % 4][0] * fs, dashes[c % 4][1] * fs};
            cairo_set_dash(cr, d, 2, 0);
        }
        cairo_set_source_rgb(cr, rgb[0], rgb[1], rgb[2]);
        cairo_set_line_width(cr, 2.5 * fs);
        cairo_set_line_join(cr, CAIRO_LINE_JOIN_ROUND);
        cairo_stroke(cr);
        cairo_restore(cr);
        /* Legend entry. */
        double ly = py0 + 10 * fs + 26 * fs * c;
        cairo_save(cr);
        cairo_move_to(cr, px1 + 24 * fs, ly);
        cairo_line_to(cr, px1 + 60 * fs, ly);
        if (c % 4) {
            double d[2] = {dashes[c % 4][0] * fs, dashes[c % 4][1] * fs};
            cairo_set_dash(cr, d, 2, 0);
        }
        cairo_set_source_rgb(cr, rgb[0], rgb[1], rgb[2]);
        cairo_set_line_width(cr, 2.5 * fs);
        cairo_stroke(cr);
        cairo_restore(cr);
        snprintf(buf, sizeof buf, "%.36s", cu->label ? cu->label : "head");
        gw_canvas_text(&cv, px1 + 68 * fs, ly, buf, &lg);
    }
    /* Divide crossings.  For all curves (-1): a triangle on the axis and a
     * thin vertical line.  For one curve of several (a sweep): a ringed dot
     * on that curve in its colour and a small triangle of the same colour
     * on the axis, so each run's divide can be told from the others. */
    int on_curve = 0;
    for (int m = 0; m < pc->nmarks; m++) {
        double x = PX(pc->marks[m].dist);
        if (x < px0 || x > px1) continue;
        int c = pc->marks[m].curve;
        double rgb[3] = {0.1, 0.1, 0.12};
        if (c >= 0 && c < pc->ncurves) {
            gw_ramp_rgb(pc->ncurves > 1 ? 0.6 * c / (pc->ncurves - 1) : 0.1, rgb);
            const gw_profile_curve *cu = &pc->curves[c];
            double h = NAN;   /* head on the curve at the crossing */
            for (int i = 0; i + 1 < cu->n; i++)
                if (cu->dist[i] <= pc->marks[m].dist && pc->marks[m].dist <= cu->dist[i + 1]) {
                    double L = cu->dist[i + 1] - cu->dist[i];
                    double f = L > 0 ? (pc->marks[m].dist - cu->dist[i]) / L : 0;
                    h = cu->head[i] + f * (cu->head[i + 1] - cu->head[i]);
                    break;
                }
            if (isfinite(h)) {
                cairo_new_path(cr);
                cairo_arc(cr, x, PY(h), 5.5 * fs, 0, 2 * 3.14159265358979323846);
                cairo_set_source_rgb(cr, 1, 1, 1);
                cairo_fill_preserve(cr);
                cairo_set_source_rgb(cr, rgb[0], rgb[1], rgb[2]);
                cairo_set_line_width(cr, 2.5 * fs);
                cairo_stroke(cr);
                on_curve = 1;
            }
        } else {
            cairo_save(cr);
            static const double dd[2] = {4, 4};
            cairo_set_dash(cr, dd, 2, 0);
            cairo_move_to(cr, x, py0);
            cairo_line_to(cr, x, py1);
            cairo_set_source_rgba(cr, 0.1, 0.1, 0.12, 0.7);
            cairo_set_line_width(cr, 1.2 * fs);
            cairo_stroke(cr);
            cairo_restore(cr);
        }
        cairo_new_path(cr);
        cairo_move_to(cr, x, py0);
        cairo_line_to(cr, x - 6 * fs, py0 - 10 * fs);
        cairo_line_to(cr, x + 6 * fs, py0 - 10 * fs);
        cairo_close_path(cr);
        cairo_set_source_rgb(cr, rgb[0], rgb[1], rgb[2]);
        cairo_fill(cr);
    }
    if (pc->nmarks > 0) {
        double ly = py0 + 10 * fs + 26 * fs * pc->ncurves + 10 * fs;
        cairo_new_path(cr);
        cairo_move_to(cr, px1 + 42 * fs, ly + 6 * fs);
        cairo_line_to(cr, px1 + 36 * fs, ly - 4 * fs);
        cairo_line_to(cr, px1 + 48 * fs, ly - 4 * fs);
        cairo_close_path(cr);
        cairo_set_source_rgb(cr, 0.1, 0.1, 0.12);
        cairo_fill(cr);
        gw_canvas_text(&cv, px1 + 68 * fs, ly, "Divide crossing", &lg);
        if (on_curve) {
            ly += 26 * fs;
            cairo_new_path(cr);
            cairo_arc(cr, px1 + 42 * fs, ly, 5.5 * fs, 0, 2 * 3.14159265358979323846);
            cairo_set_source_rgb(cr, 1, 1, 1);
            cairo_fill_preserve(cr);
            cairo_set_source_rgb(cr, 0.1, 0.1, 0.12);
            cairo_set_line_width(cr, 2.5 * fs);
            cairo_stroke(cr);
            gw_canvas_text(&cv, px1 + 68 * fs, ly, "Divide on that run's curve", &lg);
        }
    }
#undef PX
#undef PY
    char units[64];
    snprintf(units, sizeof units, "head and distance in %s", lu);
    gw_png_meta meta = {pc->title ? pc->title : "Head profile", units, pc->crs, "Head along a transect"};
    int rc = gw_canvas_write_png(&cv, path, &meta, err);
    gw_canvas_free(&cv);
    return rc;
}
