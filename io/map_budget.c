#include "map_budget.h"

#include <math.h>
#include <stdio.h>

#include "map_canvas.h"
#include "map_contour.h"

/* Inflow dark, outflow light: the two stay apart in greyscale. */
static const double IN_RGB[3] = {0.13, 0.33, 0.50};
static const double OUT_RGB[3] = {0.93, 0.68, 0.38};

int gw_map_budget_write(const gw_problem *p, const gw_budget *b, const gw_map_layers *l,
                        const char *path, gw_error *err)
{
    int W = l->width > 0 ? l->width : 1400;
    if (W < 600) W = 600;
    if (W > 8000) W = 8000;
    double fs = W / 1400.0;
    int nf = b->nfeatures < p->nfeatures ? b->nfeatures : p->nfeatures;
    double row = 40 * fs, top = 130 * fs;
    int H = (int)ceil(top + row * (nf > 0 ? nf : 1) + 150 * fs);
    gw_map_canvas cv;
    if (gw_canvas_init(&cv, W, H, err) != 0) return -1;
    cairo_t *cr = cv.cr;
    const char *lu = l->length_unit ? l->length_unit : "m";
    const char *tu = l->time_unit ? l->time_unit : "day";
    char unit[64], buf[256], nb[32], nb2[32], nb3[32];
    snprintf(unit, sizeof unit, "%s\u00b3/%s", lu, tu);

    gw_text_style t = {17 * 1.0, 1, 0, 0, 0, 0.1, 0.1, 0.12};
    gw_canvas_text(&cv, 40 * fs, 16 * fs, l->title ? l->title : "Water budget", &t);
    gw_text_style s = {11, 0, 0, 0, 0, 0.3, 0.3, 0.3};
    snprintf(buf, sizeof buf, "Water budget per feature (%s): inflow enters the aquifer, outflow leaves it", unit);
    gw_canvas_text(&cv, 40 * fs, 50 * fs, buf, &s);

    double maxv = 0;
    for (int i = 0; i < nf; i++) {
        if (b->feature[i].in > maxv) maxv = b->feature[i].in;
        if (b->feature[i].out > maxv) maxv = b->feature[i].out;
    }
    if (!(maxv > 0)) maxv = 1;
    double labw = 330 * fs, x0 = 40 * fs + labw, x1 = W - 40 * fs;
    double cx = 0.5 * (x0 + x1), half = 0.5 * (x1 - x0) - 90 * fs;   /* room for values */
    double sc = half / maxv;

    /* Axis with round ticks. */
    double step = gw_contour_nice_interval(0, maxv, 3);
    gw_text_style ax = {9, 0, 0.5, 0, 0, 0.35, 0.35, 0.35};
    double ytop = top - 10 * fs, ybot = top + row * nf + 4 * fs;
    for (double v = 0; v <= maxv * 1.0001; v += step)
        for (int side = -1; side <= 1; side += 2) {
            if (v == 0 && side == 1) continue;
            double x = cx + side * v * sc;
            cairo_new_path(cr);
            cairo_move_to(cr, x, ytop);
            cairo_line_to(cr, x, ybot);
            cairo_set_source_rgb(cr, 0.85, 0.85, 0.87);
            cairo_set_line_width(cr, 1);
            cairo_stroke(cr);
            gw_canvas_text(&cv, x, ybot + 6 * fs, gw_fmt_num(nb, sizeof nb, v, 4), &ax);
        }
    gw_text_style hd = {10.5, 1, 0.5, 1, 0, 0.1, 0.1, 0.12};
    gw_canvas_text(&cv, cx - 0.5 * half, ytop - 6 * fs, "\u2190 outflow (to the feature)", &hd);
    gw_canvas_text(&cv, cx + 0.5 * half, ytop - 6 * fs, "inflow (from the feature) \u2192", &hd);

    gw_text_style nm = {10.5, 0, 1, 0.5, 0, 0.1, 0.1, 0.12};
    gw_text_style val = {9.5, 0, 0, 0.5, 0, 0.15, 0.15, 0.17};
    for (int i = 0; i < nf; i++) {
        double y = top + row * i + 0.5 * row;
        if (i % 2 == 0) {
            cairo_rectangle(cr, 30 * fs, y - 0.5 * row, W - 60 * fs, row);
            cairo_set_source_rgb(cr, 0.965, 0.965, 0.975);
            cairo_fill(cr);
        }
        const char *state = gw_state_name(b->feature[i].state);
        snprintf(buf, sizeof buf, "%.40s (%s%s%s)", p->features[i].name ? p->features[i].name : "?",
                 gw_feature_type_name(p->features[i].type),
                 p->features[i].type == GW_FEAT_STREAM ? ", " : "",
                 p->features[i].type == GW_FEAT_STREAM ? state : "");
        gw_canvas_text(&cv, x0 - 14 * fs, y, buf, &nm);
        double bh = 0.62 * row;
        double in = b->feature[i].in, out = b->feature[i].out;
        if (out > 0) {
            cairo_rectangle(cr, cx - out * sc, y - 0.5 * bh, out * sc, bh);
            cairo_set_source_rgb(cr, OUT_RGB[0], OUT_RGB[1], OUT_RGB[2]);
            cairo_fill_preserve(cr);
            cairo_set_source_rgb(cr, 0.45, 0.3, 0.12);
            cairo_set_line_width(cr, 1);
            cairo_stroke(cr);
            gw_text_style v = val;
            v.halign = 1;
            gw_canvas_text(&cv, cx - out * sc - 6 * fs, y, gw_fmt_num(nb, sizeof nb, out, 4), &v);
        }
        if (in > 0) {
            cairo_rectangle(cr, cx, y - 0.5 * bh, in * sc, bh);
            cairo_set_source_rgb(cr, IN_RGB[0], IN_RGB[1], IN_RGB[2]);
            cairo_fill(cr);
            gw_canvas_text(&cv, cx + in * sc + 6 * fs, y, gw_fmt_num(nb, sizeof nb, in, 4), &val);
        }
    }
    cairo_new_path(cr);
    cairo_move_to(cr, cx, ytop);
    cairo_line_to(cr, cx, ybot);
    cairo_set_source_rgb(cr, 0.2, 0.2, 0.22);
    cairo_set_line_width(cr, 1.5 * fs);
    cairo_stroke(cr);

    gw_text_style bal = {11.5, 1, 0, 0, 0, 0.1, 0.1, 0.12};
    snprintf(buf, sizeof buf, "Balance: total inflow %s, total outflow %s %s, discrepancy %s %%",
             gw_fmt_num(nb, sizeof nb, b->total_in, 6), gw_fmt_num(nb2, sizeof nb2, b->total_out, 6), unit,
             gw_fmt_num(nb3, sizeof nb3, b->discrepancy_percent, 2));
    gw_canvas_text(&cv, 40 * fs, ybot + 44 * fs, buf, &bal);
    gw_text_style ft = {8.5, 0, 0, 0, 0, 0.4, 0.4, 0.4};
    gw_canvas_text(&cv, 40 * fs, ybot + 76 * fs,
                   "Signs are the aquifer's: a gaining stream takes water from the aquifer (outflow). "
                   "Steady-state screening result.", &ft);

    char units[128];
    snprintf(units, sizeof units, "flow in %s", unit);
    gw_png_meta meta = {l->title ? l->title : "Water budget", units, l->crs, "Water budget per feature"};
    int rc = gw_canvas_write_png(&cv, path, &meta, err);
    gw_canvas_free(&cv);
    return rc;
}
