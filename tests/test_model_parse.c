/* Model file parsing: every key of a full model lands in the right field,
 * defaults apply when keys are left out, and layer references are read. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <cmocka.h>

#include "io/model.h"

static char full_path[1024];

static int setup(void **state)
{
    const char *d = getenv("GW_TEST_DATA");
    snprintf(full_path, sizeof full_path, "%s/models/full.yaml", d ? d : "tests/data");
    return 0;
}

static void test_full_model(void **state)
{
    gw_error e = { { 0 } };
    gw_model *m = gw_model_load(full_path, &e);
    if (!m) fail_msg("%s", e.msg);
    assert_string_equal(m->title, "Valley between two creeks");
    assert_string_equal(m->length_unit, "m");
    assert_string_equal(m->time_unit, "day");
    assert_int_equal(m->grid.nx, 20);
    assert_int_equal(m->grid.ny, 10);
    assert_float_equal(m->grid.dx, 10.0, 0);
    assert_float_equal(m->grid.dy, 20.0, 0);
    assert_float_equal(m->grid.x0, 0.0, 0);
    assert_string_equal(m->crs, "EPSG:32633");

    assert_int_equal(m->aquifer_type, GW_CONFINED);
    assert_int_equal(m->conductivity.kind, GW_PROP_ZONES);
    assert_float_equal(m->conductivity.value, 12.0, 0);
    assert_int_equal(m->conductivity.nzones, 1);
    assert_string_equal(m->conductivity.zones[0].name, "gravel");
    assert_float_equal(m->conductivity.zones[0].value, 60.0, 0);
    assert_int_equal(m->conductivity.zones[0].polygon.n, 4);
    assert_float_equal(m->conductivity.zones[0].polygon.xy[5], 200.0, 0);
    assert_int_equal(m->thickness.kind, GW_PROP_VALUE);
    assert_float_equal(m->thickness.value, 20.0, 0);
    assert_float_equal(m->bottom.value, 80.0, 0);
    assert_float_equal(m->anisotropy.value, 0.5, 0);
    assert_float_equal(m->porosity.value, 0.2, 0);
    assert_int_equal(m->active.n, 4);
    /* Positions are 1-based lines of full.yaml. */
    assert_int_equal(m->conductivity.src.line, 13);
    assert_string_equal(m->conductivity.src.file, full_path);

    assert_int_equal(m->recharge.kind, GW_PROP_ZONES);
    assert_float_equal(m->recharge.value, 0.0004, 0);
    assert_int_equal(m->recharge.nzones, 1);
    assert_string_equal(m->recharge.zones[0].name, "orchard");
    assert_float_equal(m->recharge.zones[0].value, 0.0009, 0);

    assert_int_equal(m->nfixed, 2);
    assert_string_equal(m->fixed[0].name, "West Creek");
    assert_int_equal(m->fixed[0].is_polygon, 0);
    assert_int_equal(m->fixed[0].geom.n, 2);
    assert_int_equal(m->fixed[0].head.n, 2);
    assert_float_equal(m->fixed[0].head.v[1], 102.0, 0);
    assert_int_equal(m->fixed[0].src.line, 26);
    assert_int_equal(m->fixed[0].src.col, 5);
    assert_string_equal(m->fixed[1].name, "Pond");
    assert_int_equal(m->fixed[1].is_polygon, 1);
    assert_int_equal(m->fixed[1].head.n, 1);

    assert_int_equal(m->nstreams, 1);
    assert_string_equal(m->streams[0].name, "East Creek");
    assert_float_equal(m->streams[0].stage.v[0], 101.0, 0);
    assert_float_equal(m->streams[0].bed_bottom.v[1], 97.0, 0);
    assert_int_equal(m->streams[0].bed_conductance.n, 1);
    assert_float_equal(m->streams[0].bed_conductance.v[0], 0.8, 0);

    assert_int_equal(m->ndrains, 1);
    assert_string_equal(m->drains[0].name, "Tile line");
    assert_float_equal(m->drains[0].elevation.v[0], 98.0, 0);
    assert_float_equal(m->drains[0].conductance.v[0], 1.5, 0);

    assert_int_equal(m->nwells, 1);
    assert_string_equal(m->wells[0].name, "Supply well 1");
    assert_float_equal(m->wells[0].x, 105.0, 0);
    assert_float_equal(m->wells[0].y, 95.0, 0);
    assert_float_equal(m->wells[0].pumping, 80.0, 0);

    assert_int_equal(m->nobs, 2);
    assert_float_equal(m->obs[0].head, 101.2, 0);
    assert_true(isnan(m->obs[1].head));
    assert_float_equal(m->obs[1].x, 85.0, 0);

    assert_int_equal(m->nleakage, 1);
    assert_float_equal(m->leakage[0].head, 95.0, 0);
    assert_float_equal(m->leakage[0].resistance, 500.0, 0);
    assert_int_equal(m->leakage[0].polygon.n, 4);

    assert_int_equal(m->divides, 1);
    assert_int_equal(m->capture, 1);
    assert_int_equal(m->ntravel_times, 3);
    assert_float_equal(m->travel_times[2], 3650.0, 0);
    assert_int_equal(m->ntransects, 1);
    assert_string_equal(m->transects[0].name, "A-A'");
    assert_int_equal(m->maps, 0);
    assert_float_equal(m->contour_interval, 0.5, 0);
    assert_int_equal(m->map_width, 900);
    assert_float_equal(m->head_tol, 1e-7, 0);
    assert_float_equal(m->resid_tol, 1e-9, 0);
    assert_int_equal(m->max_iter, 50);
    gw_model_free(m);
}

static void test_defaults(void **state)
{
    const char *y =
        "units: {length: ft, time: d}\n"
        "grid: {origin: [100, 200], cell_size: 5, columns: 3, rows: 4}\n"
        "aquifer: {type: unconfined, conductivity: 2, bottom: 1}\n"
        "fixed_heads:\n"
        "  - {name: A, line: [[100, 200], [100, 220]], head: 5}\n";
    gw_error e = { { 0 } };
    gw_model *m = gw_model_load_string(y, "dir/defaults.yaml", &e);
    if (!m) fail_msg("%s", e.msg);
    assert_string_equal(m->title, "defaults");          /* file name without extension */
    assert_string_equal(m->dir, "dir");
    assert_int_equal(m->aquifer_type, GW_UNCONFINED);
    assert_float_equal(m->grid.dx, 5.0, 0);
    assert_float_equal(m->grid.dy, 5.0, 0);
    assert_float_equal(m->anisotropy.value, 1.0, 0);
    assert_int_equal(m->anisotropy.given, 0);
    assert_float_equal(m->porosity.value, 0.25, 0);
    assert_float_equal(m->recharge.value, 0.0, 0);
    assert_null(m->crs);
    assert_int_equal(m->divides, 1);
    assert_int_equal(m->capture, 0);
    assert_int_equal(m->maps, 1);
    assert_int_equal(m->map_width, 1400);
    assert_float_equal(m->head_tol, 1e-6, 0);
    assert_int_equal(m->max_iter, 100);
    gw_model_free(m);
}

static void test_raster_and_aliases(void **state)
{
    const char *y =
        "units: {length: m, time: day}\n"
        "grid: {origin: [0, 0], cell_size: 10, columns: 3, rows: 3}\n"
        "aquifer: {type: section, conductivity: {raster: k.tif, band: 2, scale: 0.5}}\n"
        "recharge: {rate: &r 0.001}\n"
        "fixed_heads:\n"
        "  - {name: Top, line: [[0, 30], [30, 30]], head: *r}\n"
        "wells: [{name: W, at: [15, 15], pumping: -2.5}]\n";
    gw_error e = { { 0 } };
    gw_model *m = gw_model_load_string(y, "/data/site/m.yaml", &e);
    if (!m) fail_msg("%s", e.msg);
    assert_int_equal(m->aquifer_type, GW_SECTION);
    assert_int_equal(m->conductivity.kind, GW_PROP_RASTER);
    assert_string_equal(m->conductivity.raster, "/data/site/k.tif");   /* relative to the model */
    assert_int_equal(m->conductivity.band, 2);
    assert_float_equal(m->conductivity.scale, 0.5, 0);
    assert_float_equal(m->fixed[0].head.v[0], 0.001, 0);
    assert_float_equal(m->wells[0].pumping, -2.5, 0);
    assert_int_equal(m->capture, 1);                                   /* wells exist */
    gw_model_free(m);
}

/* Geometry read from a vector file: {file, layer, where}. */
static void test_layer_geometry(void **state)
{
    char dir[] = "/tmp/gwmodelXXXXXX";
    assert_non_null(mkdtemp(dir));
    char gj[1100], model[1100];
    snprintf(gj, sizeof gj, "%s/creeks.geojson", dir);
    snprintf(model, sizeof model, "%s/m.yaml", dir);
    FILE *f = fopen(gj, "w");
    assert_non_null(f);
    fputs("{\"type\": \"FeatureCollection\",\n"
          " \"crs\": {\"type\": \"name\", \"properties\": {\"name\": \"urn:ogc:def:crs:EPSG::32633\"}},\n"
          " \"features\": [\n"
          "{\"type\": \"Feature\", \"properties\": {\"name\": \"East\"},\n"
          " \"geometry\": {\"type\": \"LineString\", \"coordinates\": [[95, 0], [95, 50], [96, 100]]}},\n"
          "{\"type\": \"Feature\", \"properties\": {\"name\": \"West\"},\n"
          " \"geometry\": {\"type\": \"LineString\", \"coordinates\": [[5, 0], [5, 100]]}}]}\n", f);
    fclose(f);
    const char *y =
        "units: {length: m, time: day}\n"
        "grid: {origin: [0, 0], cell_size: 10, columns: 10, rows: 10, crs: EPSG:32633}\n"
        "aquifer: {conductivity: 1, thickness: 1}\n"
        "fixed_heads:\n"
        "  - {name: W, line: {file: creeks.geojson, where: \"name = 'West'\"}, head: 1}\n"
        "streams:\n"
        "  - {name: E, line: {file: creeks.geojson, where: \"name = 'East'\"},\n"
        "     stage: [3, 2, 1], bed_bottom: 0, bed_conductance: 1}\n";
    gw_error e = { { 0 } };
    gw_model *m = gw_model_load_string(y, model, &e);
    if (!m) fail_msg("%s", e.msg);
    assert_int_equal(m->streams[0].line.n, 3);            /* per-vertex stage checked against 3 */
    assert_float_equal(m->streams[0].line.xy[4], 96.0, 0);
    assert_int_equal(m->fixed[0].geom.n, 2);
    assert_float_equal(m->fixed[0].geom.xy[0], 5.0, 0);
    gw_model_free(m);

    /* A filter matching both features is refused, naming the feature. */
    const char *y2 =
        "units: {length: m, time: day}\n"
        "grid: {origin: [0, 0], cell_size: 10, columns: 10, rows: 10, crs: EPSG:32633}\n"
        "aquifer: {conductivity: 1, thickness: 1}\n"
        "fixed_heads:\n"
        "  - {name: Both, line: {file: creeks.geojson}, head: 1}\n";
    m = gw_model_load_string(y2, model, &e);
    assert_null(m);
    assert_non_null(strstr(e.msg, "m.yaml:5:24:"));
    assert_non_null(strstr(e.msg, "fixed head 'Both'"));
    assert_non_null(strstr(e.msg, "2 features"));
    unlink(gj);
    rmdir(dir);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test_setup(test_full_model, setup),
        cmocka_unit_test(test_defaults),
        cmocka_unit_test(test_raster_and_aliases),
        cmocka_unit_test(test_layer_geometry),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
