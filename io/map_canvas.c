#include "map_canvas.h"

#include <errno.h>
#include <math.h>
#include <png.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#ifndef GWDIVIDE_VERSION
#define GWDIVIDE_VERSION "dev"
#endif

/* DejaVu Sans is in Debian's fonts-dejavu-core, which the set-up script
 * installs; fontconfig falls back to any sans face otherwise. */
static const char *FONT = "DejaVu Sans";

int gw_canvas_init(gw_map_canvas *c, int width, int height, gw_error *err)
{
    memset(c, 0, sizeof *c);
    if (width < 200 || height < 150 || width > 20000 || height > 20000)
        return gw_fail(err, "map size %d x %d pixels is out of range (200..20000)", width, height);
    c->surface = cairo_image_surface_create(CAIRO_FORMAT_ARGB32, width, height);
    if (cairo_surface_status(c->surface) != CAIRO_STATUS_SUCCESS) {
        cairo_surface_destroy(c->surface);
        c->surface = NULL;
        return gw_fail(err, "cannot create a %d x %d image (out of memory?)", width, height);
    }
    c->cr = cairo_create(c->surface);
    if (cairo_status(c->cr) != CAIRO_STATUS_SUCCESS) {
        gw_canvas_free(c);
        return gw_fail(err, "cannot create a drawing context");
    }
    c->width = width;
    c->height = height;
    c->font_scale = width / 1400.0;
    if (c->font_scale < 0.6) c->font_scale = 0.6;
    cairo_set_source_rgb(c->cr, 1, 1, 1);
    cairo_paint(c->cr);
    return 0;
}

void gw_canvas_free(gw_map_canvas *c)
{
    if (c->cr) cairo_destroy(c->cr);
    if (c->surface) cairo_surface_destroy(c->surface);
    c->cr = NULL;
    c->surface = NULL;
}

void gw_canvas_fit(gw_map_canvas *c, double bx0, double by0, double bx1, double by1,
                   double xmin, double ymin, double xmax, double ymax)
{
    double w = xmax - xmin, h = ymax - ymin;
    if (!(w > 0)) w = 1;
    if (!(h > 0)) h = 1;
    double sx = (bx1 - bx0) / w, sy = (by1 - by0) / h;
    c->scale = sx < sy ? sx : sy;
    double pw = w * c->scale, ph = h * c->scale;
    c->fx0 = bx0 + 0.5 * ((bx1 - bx0) - pw);
    c->fy0 = by0 + 0.5 * ((by1 - by0) - ph);
    c->fx1 = c->fx0 + pw;
    c->fy1 = c->fy0 + ph;
    c->xmin = xmin;
    c->ymin = ymin;
    c->xmax = xmin + w;
    c->ymax = ymin + h;
}

void gw_canvas_font(gw_map_canvas *c, const gw_text_style *st)
{
    cairo_select_font_face(c->cr, FONT, CAIRO_FONT_SLANT_NORMAL,
                           st->bold ? CAIRO_FONT_WEIGHT_BOLD : CAIRO_FONT_WEIGHT_NORMAL);
    cairo_set_font_size(c->cr, st->size * c->font_scale * (96.0 / 72.0));
}

void gw_canvas_text_size(gw_map_canvas *c, const char *s, const gw_text_style *st,
                         double *w, double *h)
{
    cairo_text_extents_t te;
    cairo_font_extents_t fe;
    gw_canvas_font(c, st);
    cairo_text_extents(c->cr, s, &te);
    cairo_font_extents(c->cr, &fe);
    if (w) *w = te.x_advance;
    if (h) *h = fe.ascent + fe.descent;
}

void gw_canvas_text(gw_map_canvas *c, double x, double y, const char *s, const gw_text_style *st)
{
    cairo_t *cr = c->cr;
    cairo_text_extents_t te;
    cairo_font_extents_t fe;
    gw_canvas_font(c, st);
    cairo_text_extents(cr, s, &te);
    cairo_font_extents(cr, &fe);
    double x0 = x - st->halign * te.x_advance;
    double y0 = y - st->valign * (fe.ascent + fe.descent) + fe.ascent;
    cairo_save(cr);
    cairo_move_to(cr, x0, y0);
    cairo_text_path(cr, s);
    if (st->halo > 0) {
        cairo_set_source_rgba(cr, 1, 1, 1, 0.9);
        cairo_set_line_width(cr, st->halo * 2);
        cairo_set_line_join(cr, CAIRO_LINE_JOIN_ROUND);
        cairo_stroke_preserve(cr);
    }
    cairo_set_source_rgb(cr, st->r, st->g, st->b);
    cairo_fill(cr);
    cairo_restore(cr);
}

char *gw_fmt_num(char *buf, int len, double v, int sig)
{
    if (!isfinite(v)) {
        snprintf(buf, len, "-");
        return buf;
    }
    if (v == 0) {
        snprintf(buf, len, "0");
        return buf;
    }
    double a = fabs(v);
    if (a >= 1e7 || a < 1e-4) {
        snprintf(buf, len, "%.*g", sig, v);
        return buf;
    }
    int mag = (int)floor(log10(a));
    int dec = sig - 1 - mag;
    if (dec < 0) {   /* round large numbers to `sig` digits: 487766 -> 488000 */
        double p = pow(10.0, -dec);
        v = round(v / p) * p;
        dec = 0;
    }
    snprintf(buf, len, "%.*f", dec, v);
    if (dec > 0) {   /* drop trailing zeros */
        char *e = buf + strlen(buf) - 1;
        while (*e == '0') *e-- = 0;
        if (*e == '.') *e = 0;
    }
    if (!strcmp(buf, "-0")) snprintf(buf, len, "0");
    return buf;
}

/* libpng would print its messages on stderr; keep them for the error value
 * instead (only the command prints). */
static void png_error_keep(png_structp png, png_const_charp msg)
{
    char *buf = png_get_error_ptr(png);
    int e = errno;   /* a failed fwrite leaves the reason here (disk full, ...) */
    if (e) snprintf(buf, 128, "%s (%s)", msg ? msg : "", strerror(e));
    else snprintf(buf, 128, "%s", msg ? msg : "");
    png_longjmp(png, 1);
}

static void png_warning_drop(png_structp png, png_const_charp msg)
{
    (void)png;
    (void)msg;
}

int gw_canvas_write_png(gw_map_canvas *c, const char *path, const gw_png_meta *meta,
                        gw_error *err)
{
    char png_msg[128] = "";
    cairo_surface_flush(c->surface);
    const unsigned char *data = cairo_image_surface_get_data(c->surface);
    int stride = cairo_image_surface_get_stride(c->surface);
    int w = c->width, h = c->height;

    unsigned char *row = malloc((size_t)w * 3);
    if (!row) return gw_fail(err, "out of memory writing %s", path);
    FILE *f = fopen(path, "wb");
    if (!f) {
        free(row);
        return gw_fail(err, "cannot write %s: %s", path, strerror(errno));
    }
    png_structp png = png_create_write_struct(PNG_LIBPNG_VER_STRING, png_msg, png_error_keep,
                                              png_warning_drop);
    png_infop info = png ? png_create_info_struct(png) : NULL;
    if (!png || !info) {
        png_destroy_write_struct(&png, &info);
        fclose(f);
        free(row);
        return gw_fail(err, "out of memory writing %s", path);
    }
    if (setjmp(png_jmpbuf(png))) {
        png_destroy_write_struct(&png, &info);
        fclose(f);
        free(row);
        return gw_fail(err, "cannot write %s: %s", path, png_msg[0] ? png_msg : "libpng failed");
    }
    png_init_io(png, f);
    errno = 0;
    png_set_IHDR(png, info, (png_uint_32)w, (png_uint_32)h, 8, PNG_COLOR_TYPE_RGB,
                 PNG_INTERLACE_NONE, PNG_COMPRESSION_TYPE_DEFAULT, PNG_FILTER_TYPE_DEFAULT);

    png_text txt[5];
    int nt = 0;
    char software[64];
    snprintf(software, sizeof software, "gwdivide %s", GWDIVIDE_VERSION);
    const char *keys[4] = {"Title", "Units", "CRS", "Description"};
    const char *vals[4] = {meta ? meta->title : NULL, meta ? meta->units : NULL,
                           meta ? meta->crs : NULL, meta ? meta->description : NULL};
    for (int i = 0; i < 4; i++) {
        if (!vals[i] || !*vals[i]) continue;
        memset(&txt[nt], 0, sizeof txt[nt]);
        txt[nt].compression = PNG_TEXT_COMPRESSION_NONE;
        txt[nt].key = (char *)keys[i];
        txt[nt].text = (char *)vals[i];
        nt++;
    }
    memset(&txt[nt], 0, sizeof txt[nt]);
    txt[nt].compression = PNG_TEXT_COMPRESSION_NONE;
    txt[nt].key = "Software";
    txt[nt].text = software;
    nt++;
    png_set_text(png, info, txt, nt);
    png_write_info(png, info);

    /* Cairo ARGB32 is premultiplied native-endian 0xAARRGGBB; the canvas was
     * painted opaque white first, so alpha is 255 and no un-premultiplying
     * is needed. */
    for (int y = 0; y < h; y++) {
        const uint32_t *src = (const uint32_t *)(data + (size_t)y * stride);
        for (int x = 0; x < w; x++) {
            uint32_t p = src[x];
            row[3 * x] = (p >> 16) & 0xff;
            row[3 * x + 1] = (p >> 8) & 0xff;
            row[3 * x + 2] = p & 0xff;
        }
        png_write_row(png, row);
    }
    png_write_end(png, info);
    png_destroy_write_struct(&png, &info);
    free(row);
    if (fclose(f) != 0) return gw_fail(err, "cannot write %s: %s", path, strerror(errno));
    return 0;
}
