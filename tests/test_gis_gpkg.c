/* io/results_gpkg: the GeoPackage writer.  Read back with OGR: contour
 * lines of a linear head field lie where linear interpolation puts them,
 * class polygons have the area of their cells, field types and CRS are as
 * written, and an abandoned file is removed. */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <cmocka.h>

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <gdal.h>
#include <ogr_api.h>
#include <ogr_srs_api.h>

#include "io/results_gpkg.h"
#include "fixture_tmpdir.h"

static char dir[256];

static int setup(void **state)
{
    (void)state;
    GDALAllRegister();
    return fixture_tmpdir_make(dir, sizeof dir, "gw-gpkg");
}

static int teardown(void **state)
{
    (void)state;
    return fixture_tmpdir_remove(dir);
}

static void test_field_unit(void **state)
{
    (void)state;
    char b[64];
    gw_field_unit("m3/day", b, sizeof b);
    assert_string_equal(b, "m3_per_day");
    gw_field_unit("ft", b, sizeof b);
    assert_string_equal(b, "ft");
    gw_field_unit("m^3 / s", b, sizeof b);
    assert_string_equal(b, "m3_per_s");
}

/* h = 100 + 0.05 x over cell centres: the contour of level L is the line
 * x = (L - 100) / 0.05, exact under linear interpolation between centres. */
static void test_contours_and_polygons(void **state)
{
    (void)state;
    char path[300];
    snprintf(path, sizeof path, "%s/a.gpkg", dir);
    gw_grid g = {40, 20, 1000.0, 2000.0, 10.0, 10.0};
    size_t n = gw_grid_ncells(&g);
    double *h = malloc(n * sizeof *h);
    int *cls = malloc(n * sizeof *cls);
    assert_non_null(h);
    assert_non_null(cls);
    long count[3] = {0, 0, 0};
    for (int r = 0; r < g.ny; r++)
        for (int c = 0; c < g.nx; c++) {
            size_t k = (size_t)r * g.nx + c;
            h[k] = 100.0 + 0.05 * (gw_grid_xc(&g, c) - 1000.0);
            cls[k] = c < 10 ? 0 : (c < 25 || r < 5) ? 1 : (c == 39 && r == 19) ? -1 : 2;
            if (cls[k] >= 0) count[cls[k]]++;
        }
    h[0] = NAN;   /* an inactive cell */
    gw_error err;
    gw_gpkg *w = gw_gpkg_create(path, "EPSG:32633", &err);
    assert_non_null(w);
    assert_int_equal(gw_gpkg_contours(w, "head_contours", &g, h, 5.0, "head_m", "heads", &err), 0);
    gw_field f[] = {{"feature", GW_FIELD_TEXT}, {"n", GW_FIELD_INT}};
    gw_fvalue v[6] = {{.s = "A"}, {.i = 1}, {.s = "B"}, {.i = 2}, {.s = "C"}, {.i = 3}};
    assert_int_equal(gw_gpkg_class_polygons(w, "catchments", &g, cls, 3, f, 2, v, "area_m2", "c", &err), 0);
    assert_int_equal(gw_gpkg_close(w, &err), 0);

    GDALDatasetH ds = GDALOpenEx(path, GDAL_OF_VECTOR, NULL, NULL, NULL);
    assert_non_null(ds);
    OGRLayerH l = GDALDatasetGetLayerByName(ds, "head_contours");
    assert_non_null(l);
    OGRSpatialReferenceH srs = OGR_L_GetSpatialRef(l);
    assert_non_null(srs);
    assert_string_equal(OSRGetAuthorityCode(srs, NULL), "32633");
    OGRFeatureDefnH d = OGR_L_GetLayerDefn(l);
    int hi = OGR_FD_GetFieldIndex(d, "head_m");
    assert_true(hi >= 0);
    assert_int_equal(OGR_Fld_GetType(OGR_FD_GetFieldDefn(d, hi)), OFTReal);
    OGRFeatureH ft;
    int nlines = 0;
    while ((ft = OGR_L_GetNextFeature(l)) != NULL) {
        double level = OGR_F_GetFieldAsDouble(ft, hi);
        double xe = 1000.0 + (level - 100.0) / 0.05;
        OGRGeometryH ge = OGR_F_GetGeometryRef(ft);
        /* GDAL's contour generator places vertices to about 1e-5 of a cell */
        for (int i = 0; i < OGR_G_GetPointCount(ge); i++) assert_true(fabs(OGR_G_GetX(ge, i) - xe) < 1e-3);
        nlines++;
        OGR_F_Destroy(ft);
    }
    /* heads run from 100.25 to 119.75: levels 105, 110, 115 */
    assert_int_equal(nlines, 3);

    l = GDALDatasetGetLayerByName(ds, "catchments");
    assert_non_null(l);
    d = OGR_L_GetLayerDefn(l);
    assert_int_equal(OGR_Fld_GetType(OGR_FD_GetFieldDefn(d, OGR_FD_GetFieldIndex(d, "n"))), OFTInteger64);
    int ai = OGR_FD_GetFieldIndex(d, "area_m2");
    int nfeat = 0;
    while ((ft = OGR_L_GetNextFeature(l)) != NULL) {
        int c = (int)OGR_F_GetFieldAsInteger64(ft, 1) - 1;
        double area = OGR_G_Area(OGR_F_GetGeometryRef(ft));
        assert_true(fabs(area - count[c] * 100.0) < 1e-6);
        assert_true(fabs(OGR_F_GetFieldAsDouble(ft, ai) - area) < 1e-6);
        nfeat++;
        OGR_F_Destroy(ft);
    }
    assert_int_equal(nfeat, 3);
    GDALClose(ds);
    free(h);
    free(cls);
}

static void test_abort_removes(void **state)
{
    (void)state;
    char path[300];
    snprintf(path, sizeof path, "%s/b.gpkg", dir);
    gw_error err;
    gw_gpkg *w = gw_gpkg_create(path, NULL, &err);
    assert_non_null(w);
    assert_int_equal(gw_gpkg_layer(w, "x", GW_VGEOM_POINT, NULL, 0, NULL, &err), 0);
    gw_gpkg_abort(w);
    assert_int_equal(access(path, F_OK), -1);
    /* an existing file is never overwritten */
    FILE *f = fopen(path, "w");
    assert_non_null(f);
    fclose(f);
    assert_null(gw_gpkg_create(path, NULL, &err));
    assert_non_null(strstr(err.msg, "already exists"));
    assert_null(gw_gpkg_create(path, "EPSG:999999", &err));
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_field_unit),
        cmocka_unit_test(test_contours_and_polygons),
        cmocka_unit_test(test_abort_removes),
    };
    return cmocka_run_group_tests(tests, setup, teardown);
}
