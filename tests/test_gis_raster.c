/* io/gis_raster: resampling rasters onto the model grid by rule, coverage
 * and nodata errors, and `grid: {like: ...}`.
 *
 * Expected values are computed here from the definitions of the rules
 * (area-weighted geometric mean, area average, majority by area), on rasters
 * written with GDAL through io/heads_tif.h. */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <cmocka.h>

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <ogr_srs_api.h>

#include "io/gis_raster.h"
#include "io/heads_tif.h"
#include "fixture_tmpdir.h"

static char dir[256];

static int setup(void **state)
{
    (void)state;
    return fixture_tmpdir_make(dir, sizeof dir, "gw-gisr");
}

static int teardown(void **state)
{
    (void)state;
    return fixture_tmpdir_remove(dir);
}

/* A raster of nx x ny pixels of size d from (x0, y0), value f(col, row). */
static void make_raster(const char *name, int nx, int ny, double x0, double y0, double d, const char *crs,
                        double (*f)(int, int), char *path, size_t len)
{
    snprintf(path, len, "%s/%s", dir, name);
    gw_grid g = {nx, ny, x0, y0, d, d};
    double *v = malloc((size_t)nx * ny * sizeof *v);
    assert_non_null(v);
    for (int r = 0; r < ny; r++)
        for (int c = 0; c < nx; c++) v[r * nx + c] = f(c, r);
    gw_error err;
    unlink(path);
    assert_int_equal(gw_write_grid_tif(path, &g, v, crs, "test", &err), 0);
    free(v);
}

static double f_pow(int c, int r) { return pow(2.0, (c * 7 + r * 3) % 5); }
static double f_class(int c, int r) { return (c + 2 * r) % 3 == 0 ? 5.0 : 1.0; }

/* Model cells of 2 x 2 raster pixels: the geometric mean and the average
 * of the four values, and the majority class. */
static void test_block_rules(void **state)
{
    (void)state;
    char path[300], cpath[300];
    make_raster("k.tif", 8, 6, 100.0, 200.0, 1.0, NULL, f_pow, path, sizeof path);
    make_raster("cls.tif", 8, 6, 100.0, 200.0, 1.0, NULL, f_class, cpath, sizeof cpath);
    gw_grid g = {4, 3, 100.0, 200.0, 2.0, 2.0};
    double geo[12], avg[12], maj[12];
    gw_error err;
    gw_raster_query q = {path, 1, 1.0, GW_RESAMPLE_GEOMEAN, NULL, "k", 0};
    assert_int_equal(gw_raster_resample(&q, &g, NULL, geo, &err), 0);
    q.rule = GW_RESAMPLE_MEAN;
    q.scale = 2.0;
    assert_int_equal(gw_raster_resample(&q, &g, NULL, avg, &err), 0);
    gw_raster_query qc = {cpath, 1, 1.0, GW_RESAMPLE_MAJORITY, NULL, "mask", 0};
    assert_int_equal(gw_raster_resample(&qc, &g, NULL, maj, &err), 0);
    for (int r = 0; r < 3; r++)
        for (int c = 0; c < 4; c++) {
            double sl = 0, s = 0;
            int n5 = 0;
            for (int j = 0; j < 2; j++)
                for (int i = 0; i < 2; i++) {
                    double v = f_pow(2 * c + i, 2 * r + j);
                    sl += log(v);
                    s += v;
                    n5 += f_class(2 * c + i, 2 * r + j) == 5.0;
                }
            int k = r * 4 + c;
            assert_true(fabs(geo[k] - exp(sl / 4)) < 1e-12 * geo[k]);
            assert_true(fabs(avg[k] - 2.0 * s / 4) < 1e-12 * avg[k]);
            /* two each is a tie: the larger value wins by the stated rule */
            assert_true(maj[k] == (n5 >= 2 ? 5.0 : 1.0));
        }
}

/* A grid shifted by half a pixel: every model cell takes a quarter of four
 * pixels; a coarser raster: each model cell lies inside one pixel. */
static void test_shifted_and_coarse(void **state)
{
    (void)state;
    char path[300];
    make_raster("k2.tif", 8, 6, 0.0, 0.0, 10.0, NULL, f_pow, path, sizeof path);
    gw_grid g = {7, 5, 5.0, 5.0, 10.0, 10.0};
    double out[35];
    gw_error err;
    gw_raster_query q = {path, 1, 1.0, GW_RESAMPLE_MEAN, NULL, "recharge", 0};
    assert_int_equal(gw_raster_resample(&q, &g, NULL, out, &err), 0);
    for (int r = 0; r < 5; r++)
        for (int c = 0; c < 7; c++) {
            /* model row r spans raster rows r and r + 1 (both grids end at
             * different tops: raster top 60, grid top 55). */
            double e = 0.25 * (f_pow(c, r) + f_pow(c + 1, r) + f_pow(c, r + 1) + f_pow(c + 1, r + 1));
            assert_true(fabs(out[r * 7 + c] - e) < 1e-12 * e);
        }
    gw_grid fine = {40, 30, 0.0, 0.0, 2.0, 2.0};
    double *o2 = malloc(1200 * sizeof *o2);
    assert_non_null(o2);
    q.rule = GW_RESAMPLE_GEOMEAN;
    assert_int_equal(gw_raster_resample(&q, &fine, NULL, o2, &err), 0);
    for (int r = 0; r < 30; r++)
        for (int c = 0; c < 40; c++) {
            double e = f_pow(c / 5, r / 5);
            assert_true(fabs(o2[r * 40 + c] - e) < 1e-12 * e);
        }
    free(o2);
}

static double f_hole(int c, int r) { return (c == 3 && r == 1) ? NAN : 4.0; }

/* Nodata under a needed cell is an error naming the cell and its map
 * position; under a cell that is not needed it is not. */
static void test_nodata_and_cover(void **state)
{
    (void)state;
    char path[300];
    make_raster("hole.tif", 6, 4, 0.0, 0.0, 10.0, NULL, f_hole, path, sizeof path);
    gw_grid g = {6, 4, 0.0, 0.0, 10.0, 10.0};
    double out[24];
    gw_error err;
    gw_raster_query q = {path, 1, 1.0, GW_RESAMPLE_GEOMEAN, NULL, "m.yaml:3:4: aquifer.conductivity", 0};
    assert_int_equal(gw_raster_resample(&q, &g, NULL, out, &err), -1);
    assert_non_null(strstr(err.msg, "m.yaml:3:4: aquifer.conductivity"));
    assert_non_null(strstr(err.msg, "col 3, row 1"));
    assert_non_null(strstr(err.msg, "x 35, y 25"));
    assert_non_null(strstr(err.msg, "nodata"));
    unsigned char need[24];
    memset(need, 1, sizeof need);
    need[1 * 6 + 3] = 0;
    out[9] = -1.0;
    assert_int_equal(gw_raster_resample(&q, &g, need, out, &err), 0);
    assert_true(out[9] == -1.0);    /* left as it was */
    assert_true(out[0] == 4.0);

    /* A grid reaching past the raster's east edge. */
    gw_grid big = {7, 4, 0.0, 0.0, 10.0, 10.0};
    double o2[28];
    assert_int_equal(gw_raster_resample(&q, &big, NULL, o2, &err), -1);
    assert_non_null(strstr(err.msg, "does not cover"));
    assert_non_null(strstr(err.msg, "col 6, row 0"));

    /* Missing file and missing band. */
    gw_raster_query bad = {"/nonexistent/k.tif", 1, 1.0, GW_RESAMPLE_MEAN, NULL, "k", 0};
    assert_int_equal(gw_raster_resample(&bad, &g, NULL, out, &err), -1);
    assert_non_null(strstr(err.msg, "/nonexistent/k.tif"));
    gw_raster_query band = {path, 2, 1.0, GW_RESAMPLE_MEAN, NULL, "k", 0};
    assert_int_equal(gw_raster_resample(&band, &g, NULL, out, &err), -1);
    assert_non_null(strstr(err.msg, "band 2"));
}

static double f_neg(int c, int r) { return c == 1 && r == 0 ? 0.0 : 3.0; }

static void test_geomean_positive(void **state)
{
    (void)state;
    char path[300];
    make_raster("neg.tif", 3, 2, 0.0, 0.0, 1.0, NULL, f_neg, path, sizeof path);
    gw_grid g = {3, 2, 0.0, 0.0, 1.0, 1.0};
    double out[6];
    gw_error err;
    gw_raster_query q = {path, 1, 1.0, GW_RESAMPLE_GEOMEAN, NULL, "k", 0};
    assert_int_equal(gw_raster_resample(&q, &g, NULL, out, &err), -1);
    assert_non_null(strstr(err.msg, "col 1, row 0"));
}

static double f_one(int c, int r) { (void)c; (void)r; return 7.5; }

/* grid: {like: ...} takes the raster's grid and CRS; a raster in another
 * CRS than the grid is warped onto it (a constant stays that constant). */
static void test_grid_like_and_crs(void **state)
{
    (void)state;
    char path[300];
    make_raster("like.tif", 30, 20, 500000.0, 5000000.0, 25.0, "EPSG:32633", f_one, path, sizeof path);
    gw_grid g;
    char *crs = NULL;
    gw_error err;
    assert_int_equal(gw_raster_grid_like(path, "grid.like", &g, &crs, &err), 0);
    assert_int_equal(g.nx, 30);
    assert_int_equal(g.ny, 20);
    assert_true(g.x0 == 500000.0 && g.y0 == 5000000.0 && g.dx == 25.0 && g.dy == 25.0);
    assert_string_equal(crs, "EPSG:32633");
    free(crs);

    /* The same raster read onto a grid in web Mercator (EPSG:3857) over the
     * middle of the same ground: the raster is warped onto the grid, every
     * cell is covered and keeps the constant. */
    OGRSpatialReferenceH a = OSRNewSpatialReference(NULL), b = OSRNewSpatialReference(NULL);
    OSRImportFromEPSG(a, 32633);
    OSRImportFromEPSG(b, 3857);
    OSRSetAxisMappingStrategy(a, OAMS_TRADITIONAL_GIS_ORDER);
    OSRSetAxisMappingStrategy(b, OAMS_TRADITIONAL_GIS_ORDER);
    OGRCoordinateTransformationH ct = OCTNewCoordinateTransformation(a, b);
    double cx = 500375.0, cy = 5000250.0;
    assert_true(OCTTransform(ct, 1, &cx, &cy, NULL));
    OCTDestroyCoordinateTransformation(ct);
    OSRDestroySpatialReference(a);
    OSRDestroySpatialReference(b);
    gw_grid sub = {5, 4, cx - 125.0, cy - 100.0, 50.0, 50.0};
    double out[20];
    gw_raster_query q = {path, 1, 1.0, GW_RESAMPLE_MEAN, "EPSG:3857", "k", 0};
    assert_int_equal(gw_raster_resample(&q, &sub, NULL, out, &err), 0);
    for (int k = 0; k < 20; k++) assert_true(fabs(out[k] - 7.5) < 1e-12);
    /* A raster without CRS against a grid with one is refused. */
    char p2[300];
    make_raster("nocrs.tif", 4, 4, 0.0, 0.0, 1.0, NULL, f_one, p2, sizeof p2);
    gw_raster_query q2 = {p2, 1, 1.0, GW_RESAMPLE_MEAN, "EPSG:32633", "k", 0};
    gw_grid g2 = {4, 4, 0.0, 0.0, 1.0, 1.0};
    double o2[16];
    assert_int_equal(gw_raster_resample(&q2, &g2, NULL, o2, &err), -1);
    assert_non_null(strstr(err.msg, "no coordinate reference system"));
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_block_rules),
        cmocka_unit_test(test_shifted_and_coarse),
        cmocka_unit_test(test_nodata_and_cover),
        cmocka_unit_test(test_geomean_positive),
        cmocka_unit_test(test_grid_like_and_crs),
    };
    return cmocka_run_group_tests(tests, setup, teardown);
}
