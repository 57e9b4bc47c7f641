/* Maps and report end to end on a small solved model (test_map_fixture.h):
 * every map is written, decodes with libpng, carries its tEXt chunks
 * (Title, Units, CRS, Software), is not blank, and shows what it should
 * where it should (inactive cells blank, high heads lighter than low heads
 * on our ramp); report.html embeds each image as a data URI that decodes
 * back to a valid PNG.  With GW_REPORT_OUT set, the files are left in that
 * folder (tests/check_html_report.sh loads the report in Chromium). */
#include <math.h>
#include <png.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>
#include <cmocka.h>

#include "io/map_budget.h"
#include "io/map_canvas.h"
#include "io/map_catchment.h"
#include "io/map_contour.h"
#include "io/map_frame.h"
#include "io/map_head.h"
#include "io/map_profile.h"
#include "io/map_ramp.h"
#include "io/report_html.h"
#include "test_map_fixture.h"

typedef struct {
    const unsigned char *p;
    size_t n, at;
} membuf;

static void mem_read(png_structp png, png_bytep out, png_size_t len)
{
    membuf *m = png_get_io_ptr(png);
    if (m->at + len > m->n) png_error(png, "truncated");
    memcpy(out, m->p + m->at, len);
    m->at += len;
}

typedef struct {
    int w, h;
    unsigned char *rgb;          /* w*h*3 */
    int has_title, has_units, has_crs, has_software;
    double variance;             /* of the grey level */
} decoded;

/* Decode a PNG from memory with libpng (any colour type -> 8-bit RGB). */
static int decode_png(const unsigned char *buf, size_t n, decoded *d)
{
    memset(d, 0, sizeof *d);
    if (n < 8 || png_sig_cmp(buf, 0, 8)) return -1;
    png_structp png = png_create_read_struct(PNG_LIBPNG_VER_STRING, NULL, NULL, NULL);
    png_infop info = png_create_info_struct(png);
    membuf m = {buf, n, 0};
    unsigned char *volatile img = NULL;
    if (setjmp(png_jmpbuf(png))) {
        png_destroy_read_struct(&png, &info, NULL);
        free(img);
        return -1;
    }
    png_set_read_fn(png, &m, mem_read);
    png_read_info(png, info);
    png_set_expand(png);
    png_set_strip_16(png);
    png_set_strip_alpha(png);
    png_set_gray_to_rgb(png);
    png_read_update_info(png, info);
    int w = (int)png_get_image_width(png, info), h = (int)png_get_image_height(png, info);
    img = malloc((size_t)w * h * 3);
    png_bytep *rows = malloc(sizeof(png_bytep) * h);
    for (int y = 0; y < h; y++) rows[y] = img + (size_t)y * w * 3;
    png_read_image(png, rows);
    png_read_end(png, info);
    png_textp txt;
    int nt = 0;
    png_get_text(png, info, &txt, &nt);
    for (int i = 0; i < nt; i++) {
        if (!strcmp(txt[i].key, "Title")) d->has_title = 1;
        if (!strcmp(txt[i].key, "Units")) d->has_units = 1;
        if (!strcmp(txt[i].key, "CRS")) d->has_crs = 1;
        if (!strcmp(txt[i].key, "Software") && !strncmp(txt[i].text, "gwdivide ", 9)) d->has_software = 1;
    }
    png_destroy_read_struct(&png, &info, NULL);
    free(rows);
    double s = 0, s2 = 0;
    for (size_t i = 0; i < (size_t)w * h; i++) {
        double g = (img[3 * i] + img[3 * i + 1] + img[3 * i + 2]) / 3.0;
        s += g;
        s2 += g * g;
    }
    double N = (double)w * h;
    d->variance = s2 / N - (s / N) * (s / N);
    d->w = w;
    d->h = h;
    d->rgb = img;
    return 0;
}

static unsigned char *slurp(const char *path, size_t *n)
{
    FILE *f = fopen(path, "rb");
    if (!f) return NULL;
    fseek(f, 0, SEEK_END);
    long len = ftell(f);
    fseek(f, 0, SEEK_SET);
    unsigned char *b = malloc((size_t)len + 1);
    if (b && fread(b, 1, (size_t)len, f) != (size_t)len) { free(b); b = NULL; }
    if (b) b[len] = 0;
    fclose(f);
    *n = (size_t)len;
    return b;
}

static int b64val(int c)
{
    if (c >= 'A' && c <= 'Z') return c - 'A';
    if (c >= 'a' && c <= 'z') return c - 'a' + 26;
    if (c >= '0' && c <= '9') return c - '0' + 52;
    if (c == '+') return 62;
    if (c == '/') return 63;
    return -1;
}

static char outdir[512];
static int own_outdir;   /* made by this test: removed at the end */

static void path_in(char *buf, size_t n, const char *name)
{
    snprintf(buf, n, "%s/%s", outdir, name);
}

static void check_file_png(const char *name, int want_crs)
{
    char p[600];
    path_in(p, sizeof p, name);
    size_t n;
    unsigned char *b = slurp(p, &n);
    assert_non_null(b);
    decoded d;
    assert_int_equal(decode_png(b, n, &d), 0);
    assert_true(d.w >= 600 && d.h >= 300);
    assert_true(d.has_title && d.has_units && d.has_software);
    if (want_crs) assert_true(d.has_crs);
    assert_true(d.variance > 100);   /* not a blank page */
    free(d.rgb);
    free(b);
}

static map_fixture F;
static int *catchment_of;
static gw_map_catchment catchments[2];

static int setup(void **state)
{
    (void)state;
    gw_error err = {{0}};
    if (fixture_build(&F, &err) != 0) {
        fprintf(stderr, "fixture: %s\n", err.msg);
        return -1;
    }
    const char *env = getenv("GW_REPORT_OUT");
    if (env && *env) {
        snprintf(outdir, sizeof outdir, "%s", env);
        mkdir(outdir, 0755);
    } else {
        snprintf(outdir, sizeof outdir, "/tmp/gw-map-test-XXXXXX");
        if (!mkdtemp(outdir)) return -1;
        own_outdir = 1;
    }
    /* Catchments split by the fixture's divide line x = 501000 (drawing
     * only; the catchment computation is tested elsewhere). */
    const gw_grid *g = &F.p->grid;
    catchment_of = malloc(sizeof(int) * gw_grid_ncells(g));
    double area[2] = {0, 0};
    for (int r = 0; r < g->ny; r++)
        for (int c = 0; c < g->nx; c++) {
            size_t k = (size_t)r * g->nx + c;
            int f = !F.p->active[k] ? -1 : gw_grid_xc(g, c) < 501000 ? 1 : 2;
            catchment_of[k] = f;
            if (f > 0) area[f - 1] += g->dx * g->dy;
        }
    catchments[0] = (gw_map_catchment){1, area[0], area[0] * 0.0006};
    catchments[1] = (gw_map_catchment){2, area[1], area[1] * 0.0006};
    F.l.catchment_of = catchment_of;
    F.l.catchments = catchments;
    F.l.ncatchments = 2;
    return 0;
}

static int teardown(void **state)
{
    (void)state;
    fixture_free(&F);
    free(catchment_of);
    if (own_outdir) {
        static const char *files[] = {"head.png", "catchments.png", "budget.png", "profile.png", "report.html"};
        char p[600];
        for (int i = 0; i < 5; i++) {
            path_in(p, sizeof p, files[i]);
            unlink(p);
        }
        rmdir(outdir);
    }
    return 0;
}

static void test_head_map(void **state)
{
    (void)state;
    char p[600];
    gw_error err = {{0}};
    path_in(p, sizeof p, "head.png");
    if (gw_map_head_write(F.p, F.sol.head, &F.b, &F.l, p, &err) != 0) fail_msg("%s", err.msg);
    check_file_png("head.png", 1);

    /* Pixel checks against the layout the page used. */
    size_t n;
    unsigned char *b = slurp(p, &n);
    decoded d;
    assert_int_equal(decode_png(b, n, &d), 0);
    const gw_grid *g = &F.p->grid;
    /* Find the frame (it spans the grid exactly) by its dark outline on
     * the middle row, and derive the map -> pixel scale from it. */
    /* A frame edge is a dark column 100 px tall around the middle row;
     * labels and hatching are never that tall. */
    int mid = d.h / 2, left = -1, right = -1;
    for (int x = 0; x < d.w; x++) {
        int dark = 1;
        for (int y = mid - 50; y <= mid + 50 && dark; y++) {
            unsigned char *q = d.rgb + ((size_t)y * d.w + x) * 3;
            int mx = q[0] > q[1] ? (q[0] > q[2] ? q[0] : q[2]) : (q[1] > q[2] ? q[1] : q[2]);
            int mn = q[0] < q[1] ? (q[0] < q[2] ? q[0] : q[2]) : (q[1] < q[2] ? q[1] : q[2]);
            dark = mx < 150 && mx - mn < 25;   /* the grey frame line, not the navy stream */
        }
        if (dark && left < 0) left = x;
        else if (dark && x > left + 100) { right = x; break; }
    }
    assert_true(left > 0 && right > left);
    double scale = (right - left) / (g->nx * g->dx);
    /* The frame's top edge: first dark grey pixel going down a column
     * just inside the frame, below the title band. */
    int top = -1;
    for (int y = 80; y < d.h && top < 0; y++) {
        unsigned char *q = d.rgb + ((size_t)y * d.w + left + 30) * 3;
        if (q[0] < 150 && q[1] < 150 && q[2] < 150 && abs(q[0] - q[2]) < 25) top = y;
    }
    assert_true(top > 0);
    /* Inactive north-east corner (cells with col - row > 72): blank. */
    double xi = gw_grid_xc(g, 78), yi = gw_grid_yc(g, 1);
    int px = left + (int)((xi - g->x0) * scale), py = top + (int)((gw_grid_ytop(g) - yi) * scale);
    unsigned char *q = d.rgb + ((size_t)py * d.w + px) * 3;
    assert_true(q[0] > 245 && q[1] > 245 && q[2] > 245);
    /* Ramp order: near West Creek (head ~100) darker than near East Brook's
     * upstream end (head ~102.5), as the legend says. */
    double xl = gw_grid_xc(g, 6), xh = gw_grid_xc(g, 66), ym = gw_grid_yc(g, 5);
    unsigned char *lo = d.rgb + ((size_t)(top + (int)((gw_grid_ytop(g) - ym) * scale)) * d.w +
                                 left + (int)((xl - g->x0) * scale)) * 3;
    unsigned char *hi = d.rgb + ((size_t)(top + (int)((gw_grid_ytop(g) - ym) * scale)) * d.w +
                                 left + (int)((xh - g->x0) * scale)) * 3;
    double rl[3] = {lo[0] / 255.0, lo[1] / 255.0, lo[2] / 255.0}, rh[3] = {hi[0] / 255.0, hi[1] / 255.0, hi[2] / 255.0};
    assert_true(gw_srgb_luminance(rh) > gw_srgb_luminance(rl) + 0.15);
    free(d.rgb);
    free(b);
}

static void test_other_maps(void **state)
{
    (void)state;
    char p[600];
    gw_error err = {{0}};
    path_in(p, sizeof p, "catchments.png");
    if (gw_map_catchment_write(F.p, &F.l, p, &err) != 0) fail_msg("%s", err.msg);
    check_file_png("catchments.png", 1);
    path_in(p, sizeof p, "budget.png");
    if (gw_map_budget_write(F.p, &F.b, &F.l, p, &err) != 0) fail_msg("%s", err.msg);
    check_file_png("budget.png", 1);

    const gw_grid *g = &F.p->grid;
    double line[4] = {g->x0 + 10, 4100600, g->x0 + g->nx * g->dx - 10, 4100600};
    double dist[120], head[120];
    assert_int_equal(gw_profile_sample(g, F.sol.head, line, 2, 120, dist, head, &err), 0);
    /* The sample at the start is next to the fixed-head creek (100 m). */
    assert_true(fabs(head[0] - 100.0) < 0.2);
    gw_profile_curve cu = {"base case", dist, head, 120};
    gw_profile_mark mk = {990, -1};
    gw_profile_chart pc = {"Head along A-A'", "Transect across the valley", "m", "EPSG:32633", 0, &cu, 1, &mk, 1};
    path_in(p, sizeof p, "profile.png");
    if (gw_map_profile_write(&pc, p, &err) != 0) fail_msg("%s", err.msg);
    check_file_png("profile.png", 1);
}

static void test_report_images_decode(void **state)
{
    (void)state;
    gw_results r;
    gw_results_init(&r);
    r.problem = F.p;
    r.budget = F.b;
    r.have_budget = 1;
    r.solution = F.sol;
    r.have_solution = 1;
    gw_strlist_add(&r.warnings, "example warning: 2 cells < 1 m saturated");
    gw_strlist_add(&r.cautions, "Steady state, 2-D: a screening result.");
    char names[4][600];
    const char *files[4] = {"head.png", "catchments.png", "budget.png", "profile.png"};
    gw_report_image img[4];
    for (int i = 0; i < 4; i++) {
        path_in(names[i], sizeof names[i], files[i]);
        img[i] = (gw_report_image){names[i], files[i]};
    }
    char p[600];
    path_in(p, sizeof p, "report.html");
    gw_error err = {{0}};
    if (gw_report_html_write(&r, &F.l, img, 4, p, &err) != 0) fail_msg("%s", err.msg);
    gw_strlist_free(&r.warnings);
    gw_strlist_free(&r.cautions);

    size_t n;
    char *html = (char *)slurp(p, &n);
    assert_non_null(html);
    assert_non_null(strstr(html, "West Creek"));
    assert_non_null(strstr(html, "example warning"));
    assert_null(strstr(html, "src=\"http"));          /* self-contained */
    int found = 0;
    for (char *s = strstr(html, "data:image/png;base64,"); s; s = strstr(s + 1, "data:image/png;base64,")) {
        char *q = s + strlen("data:image/png;base64,");
        char *end = strchr(q, '"');
        assert_non_null(end);
        unsigned char *bin = malloc((size_t)(end - q));
        size_t nb = 0;
        unsigned v = 0;
        int bits = 0;
        for (char *c = q; c < end; c++) {
            int x = b64val(*c);
            if (x < 0) continue;   /* newlines, padding */
            v = (v << 6) | (unsigned)x;
            bits += 6;
            if (bits >= 8) {
                bits -= 8;
                bin[nb++] = (unsigned char)(v >> bits);
            }
        }
        decoded d;
        assert_int_equal(decode_png(bin, nb, &d), 0);
        assert_true(d.has_title && d.variance > 100);
        free(d.rgb);
        free(bin);
        found++;
    }
    assert_int_equal(found, 4);
    free(html);
}

/* Least distance (px) from label box b to map polyline xy (n vertices),
 * sampling the line every 0.25 px. */
static double box_line_px(const gw_map_page *pg, const gw_label_box *b, const double *xy, int n)
{
    double best = HUGE_VAL, c = cos(b->angle), s = sin(b->angle);
    for (int i = 0; i + 1 < n; i++) {
        double ax = gw_canvas_px(&pg->cv, xy[2 * i]), ay = gw_canvas_py(&pg->cv, xy[2 * i + 1]);
        double bx = gw_canvas_px(&pg->cv, xy[2 * i + 2]), by = gw_canvas_py(&pg->cv, xy[2 * i + 3]);
        int m = (int)(hypot(bx - ax, by - ay) / 0.25) + 1;
        for (int j = 0; j <= m; j++) {
            double x = ax + (bx - ax) * j / m - b->cx, y = ay + (by - ay) * j / m - b->cy;
            double u = fabs(x * c + y * s) - 0.5 * b->w, v = fabs(-x * s + y * c) - 0.5 * b->h;
            double d = hypot(u > 0 ? u : 0, v > 0 ? v : 0);
            if (d < best) best = d;
        }
    }
    return best;
}

/* The head map's layout steps on the fixture: stream, drain and divide
 * reserved, then feature names and contour labels.  No label may come
 * within the clearance of a stream, drain or divide, and names sit beside
 * their own line (near it, not on it). */
static void test_labels_clear_feature_lines(void **state)
{
    (void)state;
    gw_error err = {{0}};
    gw_map_page pg;
    assert_int_equal(gw_map_page_begin(&pg, &F.p->grid, 1400, "t", NULL, &err), 0);
    double fs = pg.fs, line_clear = 7 * fs, div_clear = 5 * fs;
    assert_int_equal(gw_map_reserve_features(&pg, F.p, &F.l, line_clear, div_clear), 0);
    gw_text_style st = gw_map_style(&pg, 10, 1);
    assert_int_equal(gw_map_place_feature_names(&pg, F.p, &F.l, &st, &st, 11 * fs), 0);
    int names = pg.ntext;
    gw_contour_set cs = {0};
    assert_int_equal(gw_contour_trace(&F.p->grid, F.sol.head, 0.25, &cs, &err), 0);
    for (int i = 0; i < cs.nlines; i++) {
        double *pxy = malloc((size_t)cs.line[i].n * 2 * sizeof(double));
        assert_non_null(pxy);
        for (int k = 0; k < cs.line[i].n; k++) {
            pxy[2 * k] = gw_canvas_px(&pg.cv, cs.line[i].xy[2 * k]);
            pxy[2 * k + 1] = gw_canvas_py(&pg.cv, cs.line[i].xy[2 * k + 1]);
        }
        gw_label_box boxes[8];
        int n = gw_labels_along_line(&pg.labels, pxy, cs.line[i].n, 40 * fs, 12 * fs, 300 * fs, boxes, 8);
        assert_true(n >= 0);
        for (int j = 0; j < n; j++) assert_int_equal(gw_map_queue_text(&pg, &boxes[j], "x", &st), 0);
        free(pxy);
    }
    assert_true(names >= 2);             /* East Brook and the drain at least */
    assert_true(pg.ntext - names >= 5);  /* contour labels were placed */
    int streams_or_drains = 0;
    for (int t = 0; t < pg.ntext; t++) {
        const gw_label_box *b = &pg.text[t].box;
        for (int g = 0; g < F.l.ngeoms; g++) {
            gw_feature_type ty = F.p->features[F.l.geoms[g].feature].type;
            if (ty != GW_FEAT_STREAM && ty != GW_FEAT_DRAIN) continue;
            streams_or_drains++;
            double d = box_line_px(&pg, b, F.l.geoms[g].path.xy, F.l.geoms[g].path.n);
            if (d < line_clear - 1e-6) fail_msg("label %d ('%s') is %.2f px from feature line %d", t, pg.text[t].text, d, g);
        }
        for (int v = 0; v < F.l.ndivides; v++) {
            double d = box_line_px(&pg, b, F.l.divides[v].line.xy, F.l.divides[v].line.n);
            if (d < div_clear - 1e-6) fail_msg("label %d is %.2f px from the divide", t, d);
        }
    }
    assert_true(streams_or_drains > 0);
    /* Each placed name is beside its own line: within 30 px of it. */
    for (int t = 0; t < names; t++)
        for (int g = 0; g < F.l.ngeoms; g++)
            if (!strcmp(pg.text[t].text, F.p->features[F.l.geoms[g].feature].name))
                assert_true(box_line_px(&pg, &pg.text[t].box, F.l.geoms[g].path.xy, F.l.geoms[g].path.n) < 30 * fs);
    gw_contour_set_free(&cs);
    gw_map_page_free(&pg);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_head_map),
        cmocka_unit_test(test_other_maps),
        cmocka_unit_test(test_report_images_decode),
        cmocka_unit_test(test_labels_clear_feature_lines),
    };
    return cmocka_run_group_tests(tests, setup, teardown);
}
