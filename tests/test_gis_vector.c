/* io/gis_vector: reading lines, polygons and points with attributes from a
 * GeoPackage (written here with io/results_gpkg.h), reprojection, and the
 * errors a user meets with bad GIS input. */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <cmocka.h>

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "io/gis_vector.h"
#include "io/results_gpkg.h"
#include "fixture_tmpdir.h"

static char dir[256], gpkg[300], nocrs[300], geo[300];

/* streams (lines, NAME/STAGE/NOTE), wells (points, ID/Q), area (polygon),
 * braided (a two-part line), all in EPSG:32633; one layer without CRS; one
 * layer in geographic coordinates. */
static int setup(void **state)
{
    (void)state;
    if (fixture_tmpdir_make(dir, sizeof dir, "gw-gisv") != 0) return -1;
    snprintf(gpkg, sizeof gpkg, "%s/in.gpkg", dir);
    snprintf(nocrs, sizeof nocrs, "%s/nocrs.gpkg", dir);
    snprintf(geo, sizeof geo, "%s/geo.gpkg", dir);
    gw_error err;
    gw_gpkg *g = gw_gpkg_create(gpkg, "EPSG:32633", &err);
    if (!g) return -1;
    gw_field sf[] = {{"NAME", GW_FIELD_TEXT}, {"STAGE", GW_FIELD_REAL}, {"NOTE", GW_FIELD_TEXT}};
    if (gw_gpkg_layer(g, "streams", GW_VGEOM_LINE, sf, 3, NULL, &err)) return -1;
    double l1[] = {0, 0, 100, 0, 200, 50}, l2[] = {0, 500, 300, 500};
    const double *p1 = l1, *p2 = l2;
    int n1 = 3, n2 = 2;
    gw_fvalue v1[] = {{.s = "North Creek"}, {.d = 101.5}, {.s = "12.5"}};
    gw_fvalue v2[] = {{.s = "South Creek"}, {.d = NAN}, {.s = "high"}};
    if (gw_gpkg_add(g, &p1, &n1, 1, v1, &err) || gw_gpkg_add(g, &p2, &n2, 1, v2, &err)) return -1;
    gw_field wf[] = {{"ID", GW_FIELD_TEXT}, {"Q", GW_FIELD_INT}};
    if (gw_gpkg_layer(g, "wells", GW_VGEOM_POINT, wf, 2, NULL, &err)) return -1;
    double w1[] = {120, 240};
    const double *pw = w1;
    int one = 1;
    gw_fvalue wv[] = {{.s = "W1"}, {.i = 800}};
    if (gw_gpkg_add(g, &pw, &one, 1, wv, &err)) return -1;
    if (gw_gpkg_layer(g, "area", GW_VGEOM_POLYGON, NULL, 0, NULL, &err)) return -1;
    double ring[] = {0, 0, 400, 0, 400, 300, 0, 300, 0, 0};
    const double *pr = ring;
    int nr = 5;
    if (gw_gpkg_add(g, &pr, &nr, 1, NULL, &err)) return -1;
    if (gw_gpkg_layer(g, "braided", GW_VGEOM_LINE, NULL, 0, NULL, &err)) return -1;
    const double *pp[2] = {l1, l2};
    int nn[2] = {3, 2};
    if (gw_gpkg_add(g, pp, nn, 2, NULL, &err)) return -1;
    if (gw_gpkg_close(g, &err)) return -1;

    g = gw_gpkg_create(nocrs, NULL, &err);
    if (!g || gw_gpkg_layer(g, "pts", GW_VGEOM_POINT, NULL, 0, NULL, &err) ||
        gw_gpkg_add(g, &pw, &one, 1, NULL, &err) || gw_gpkg_close(g, &err))
        return -1;

    /* Points on the central meridian of UTM zone 33 (15 E): transverse
     * Mercator puts them at false easting 500000 exactly; on the equator
     * northing is 0 (Snyder, Map Projections - A Working Manual, 1987). */
    g = gw_gpkg_create(geo, "EPSG:4326", &err);
    if (!g || gw_gpkg_layer(g, "pts", GW_VGEOM_POINT, NULL, 0, NULL, &err)) return -1;
    double e1[] = {15.0, 0.0}, e2[] = {15.0, 45.0};
    const double *pe1 = e1, *pe2 = e2;
    if (gw_gpkg_add(g, &pe1, &one, 1, NULL, &err) || gw_gpkg_add(g, &pe2, &one, 1, NULL, &err) ||
        gw_gpkg_close(g, &err))
        return -1;
    return 0;
}

static int teardown(void **state)
{
    (void)state;
    return fixture_tmpdir_remove(dir);
}

static void test_lines_with_attributes(void **state)
{
    (void)state;
    const char *fields[] = {"STAGE"};
    gw_vquery q = {gpkg, "streams", NULL, GW_VGEOM_LINE, "EPSG:32633", 0, "NAME", fields, 1, "streams"};
    gw_vfeature *f = NULL;
    int n = 0;
    gw_error err;
    assert_int_equal(gw_vector_read(&q, &f, &n, &err), 0);
    assert_int_equal(n, 2);
    assert_string_equal(f[0].name, "North Creek");
    assert_int_equal(f[0].n, 3);
    assert_true(f[0].xy[4] == 200.0 && f[0].xy[5] == 50.0);
    assert_true(f[0].values[0] == 101.5);
    assert_true(isnan(f[1].values[0]));   /* empty attribute */
    gw_vfeatures_free(f, n);

    /* where selects one; a text field holding a number is read as one */
    const char *note[] = {"NOTE"};
    q.where = "NAME = 'North Creek'";
    q.fields = note;
    assert_int_equal(gw_vector_read(&q, &f, &n, &err), 0);
    assert_int_equal(n, 1);
    assert_true(f[0].values[0] == 12.5);
    gw_vfeatures_free(f, n);
    /* ... but a word is an error naming the field and feature */
    q.where = "NAME = 'South Creek'";
    assert_int_equal(gw_vector_read(&q, &f, &n, &err), -1);
    assert_non_null(strstr(err.msg, "'NOTE'"));
    assert_non_null(strstr(err.msg, "\"high\""));
}

static void test_points_polygons(void **state)
{
    (void)state;
    const char *fields[] = {"Q"};
    gw_vquery q = {gpkg, "wells", NULL, GW_VGEOM_POINT, NULL, 0, "ID", fields, 1, "wells"};
    gw_vfeature *f = NULL;
    int n = 0;
    gw_error err;
    assert_int_equal(gw_vector_read(&q, &f, &n, &err), 0);
    assert_int_equal(n, 1);
    assert_true(f[0].xy[0] == 120.0 && f[0].xy[1] == 240.0 && f[0].values[0] == 800.0);
    gw_vfeatures_free(f, n);
    gw_vquery qp = {gpkg, "area", NULL, GW_VGEOM_POLYGON, "EPSG:32633", 0, NULL, NULL, 0, "active"};
    assert_int_equal(gw_vector_read(&qp, &f, &n, &err), 0);
    assert_int_equal(f[0].n, 5);
    gw_vfeatures_free(f, n);
}

static void test_errors(void **state)
{
    (void)state;
    gw_vfeature *f = NULL;
    int n = 0;
    gw_error err;
    gw_vquery q = {"/nonexistent/x.gpkg", "streams", NULL, GW_VGEOM_LINE, NULL, 0, NULL, NULL, 0, "m.yaml:4:9: line"};
    assert_int_equal(gw_vector_read(&q, &f, &n, &err), -1);
    assert_non_null(strstr(err.msg, "m.yaml:4:9: line"));
    assert_non_null(strstr(err.msg, "/nonexistent/x.gpkg"));

    q.file = gpkg;
    q.layer = "rivers";
    assert_int_equal(gw_vector_read(&q, &f, &n, &err), -1);
    assert_non_null(strstr(err.msg, "no layer 'rivers'"));
    assert_non_null(strstr(err.msg, "streams"));   /* lists the layers there are */

    q.layer = "streams";
    q.where = "NAME = 'Nowhere'";
    assert_int_equal(gw_vector_read(&q, &f, &n, &err), -1);
    assert_non_null(strstr(err.msg, "selects no features"));

    q.where = "NAME ==== 3";
    assert_int_equal(gw_vector_read(&q, &f, &n, &err), -1);
    assert_non_null(strstr(err.msg, "not a valid filter"));

    q.where = NULL;
    q.kind = GW_VGEOM_POINT;
    assert_int_equal(gw_vector_read(&q, &f, &n, &err), -1);
    assert_non_null(strstr(err.msg, "expected a point"));

    q.kind = GW_VGEOM_LINE;
    q.layer = "braided";
    assert_int_equal(gw_vector_read(&q, &f, &n, &err), -1);
    assert_non_null(strstr(err.msg, "2 parts"));

    q.layer = "streams";
    q.name_field = "TITLE";
    assert_int_equal(gw_vector_read(&q, &f, &n, &err), -1);
    assert_non_null(strstr(err.msg, "no field 'TITLE'"));

    q.name_field = NULL;
    q.layer = NULL;   /* several layers: must say which */
    assert_int_equal(gw_vector_read(&q, &f, &n, &err), -1);
    assert_non_null(strstr(err.msg, "layer:"));
    assert_null(f);
}

static void test_crs_rules(void **state)
{
    (void)state;
    gw_vfeature *f = NULL;
    int n = 0;
    gw_error err;
    gw_vquery q = {nocrs, NULL, NULL, GW_VGEOM_POINT, "EPSG:32633", 0, NULL, NULL, 0, "wells"};
    assert_int_equal(gw_vector_read(&q, &f, &n, &err), -1);
    assert_non_null(strstr(err.msg, "no coordinate reference system"));
    assert_non_null(strstr(err.msg, "assume_crs"));
    q.assume_crs = 1;
    assert_int_equal(gw_vector_read(&q, &f, &n, &err), 0);
    assert_true(f[0].xy[0] == 120.0);
    gw_vfeatures_free(f, n);

    gw_vquery g = {geo, "pts", NULL, GW_VGEOM_POINT, "EPSG:32633", 0, NULL, NULL, 0, "wells"};
    assert_int_equal(gw_vector_read(&g, &f, &n, &err), 0);
    assert_int_equal(n, 2);
    /* x = easting, y = northing whatever the CRS's axis order. */
    assert_true(fabs(f[0].xy[0] - 500000.0) < 1e-6 && fabs(f[0].xy[1]) < 1e-6);
    assert_true(fabs(f[1].xy[0] - 500000.0) < 1e-6 && f[1].xy[1] > 4.9e6 && f[1].xy[1] < 5.0e6);
    gw_vfeatures_free(f, n);
    /* degrees with a grid without CRS cannot be placed */
    g.target_crs = NULL;
    assert_int_equal(gw_vector_read(&g, &f, &n, &err), -1);
    assert_non_null(strstr(err.msg, "degrees"));
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_lines_with_attributes),
        cmocka_unit_test(test_points_polygons),
        cmocka_unit_test(test_errors),
        cmocka_unit_test(test_crs_rules),
    };
    return cmocka_run_group_tests(tests, setup, teardown);
}
