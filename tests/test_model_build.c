/* Putting a model on its grid: per-cell properties, fixed heads, stream /
 * drain / leakage links, wells.  Expected lengths come from plane geometry
 * (Pythagoras); interpolated values are worked by hand in the comments. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <cmocka.h>
#include <gdal.h>

#include "io/model.h"

/* 10 x 10 cells of 10 m, x 0..100, y 0..100; row 0 is y 90..100. */
#define HEAD \
    "units: {length: m, time: day}\n" \
    "grid: {origin: [0, 0], cell_size: 10, columns: 10, rows: 10}\n"
#define AQ "aquifer: {conductivity: 5, thickness: 10}\n"
#define LEFT "fixed_heads: [{name: Left, line: [[0, 0], [0, 100]], head: 10}]\n"

static gw_model *model;
static gw_problem *prob;
static gw_error err;

static void build(const char *yaml)
{
    memset(&err, 0, sizeof err);
    model = gw_model_load_string(yaml, "t.yaml", &err);
    if (!model) fail_msg("load: %s", err.msg);
    prob = gw_model_build(model, &err);
    if (!prob) fail_msg("build: %s", err.msg);
}

static void done(void)
{
    gw_problem_free(prob);
    gw_model_free(model);
    prob = NULL;
    model = NULL;
}

static int cell(int col, int row) { return row * 10 + col; }

static const gw_link *link_at(int feature, int k)
{
    for (int i = 0; i < prob->nlinks; i++)
        if (prob->links[i].feature == feature && prob->links[i].cell == k) return &prob->links[i];
    return NULL;
}

static void test_diagonal_stream_length(void **state)
{
    /* (0,0)-(100,100) runs through cell corners: exactly the 10 diagonal
     * cells, 10*sqrt(2) in each; total = sqrt(100^2 + 100^2). */
    build(HEAD AQ LEFT
          "streams:\n"
          "  - {name: Diag, line: [[0, 0], [100, 100]], stage: 5, bed_bottom: 1, bed_conductance: 0.8}\n"
          "  - {name: Slant, line: [[0, 5], [100, 35]], stage: 5, bed_bottom: 1, bed_conductance: 2}\n");
    assert_int_equal(prob->nfeatures, 4);
    assert_string_equal(prob->features[2].name, "Diag");
    assert_int_equal(prob->features[2].type, GW_FEAT_STREAM);
    int n = 0;
    double total = 0.0, total2 = 0.0;
    for (int i = 0; i < prob->nlinks; i++) {
        const gw_link *l = &prob->links[i];
        if (l->feature == 2) {
            n++;
            total += l->cond / 0.8;
            assert_int_equal(l->kind, GW_LINK_STREAM);
            assert_float_equal(l->cond, 0.8 * 10.0 * sqrt(2.0), 1e-9);
            assert_int_equal(l->cell % 10, 9 - l->cell / 10);     /* col = 9 - row */
            assert_float_equal(l->ref, 5.0, 1e-12);
            assert_float_equal(l->floor, 1.0, 1e-12);
        } else if (l->feature == 3) {
            total2 += l->cond / 2.0;
        }
    }
    assert_int_equal(n, 10);
    assert_float_equal(total, hypot(100.0, 100.0), 1e-9);
    assert_float_equal(total2, hypot(100.0, 30.0), 1e-9);
    done();
}

static void test_per_vertex_stage(void **state)
{
    /* Line along y = 55 (row 4), vertices at x = 0, 45, 100.
     * Cell col 4 (x 40..50) holds 40..45 (mean stage 100 - 9*42.5/45 = 91.5)
     * and 45..50 (mean 91 - 11*2.5/55 = 90.5): length-weighted 91.0.
     * Cell col 7 (x 70..80): mean at x = 75: 91 - 11*30/55 = 85.0. */
    build(HEAD AQ LEFT
          "streams:\n"
          "  - name: Bent\n"
          "    line: [[0, 55], [45, 55], [100, 55]]\n"
          "    stage: [100, 91, 80]\n"
          "    bed_bottom: [90, 81, 70]\n"
          "    bed_conductance: [1, 1, 3]\n");
    const gw_link *l4 = link_at(2, cell(4, 4)), *l7 = link_at(2, cell(7, 4));
    assert_non_null(l4);
    assert_non_null(l7);
    assert_float_equal(l4->ref, 91.0, 1e-9);
    assert_float_equal(l4->floor, 81.0, 1e-9);
    assert_float_equal(l4->cond, 5.0 * 1.0 + 5.0 * (1.0 + 2.0 * 2.5 / 55.0), 1e-9);
    assert_float_equal(l7->ref, 85.0, 1e-9);
    assert_float_equal(l7->floor, 75.0, 1e-9);
    assert_int_equal(prob->nlinks, 10);
    done();
}

static void test_pieces_merged_per_cell(void **state)
{
    /* A U-turn: (2,52)->(18,52)->(18,58)->(2,58).  Cell col 0 row 4 holds
     * 8 m of the first leg and 8 m of the last: one link with 16 m.
     * Cell col 1 holds 8 + 6 + 8 = 22 m. */
    build(HEAD AQ LEFT
          "drains: [{name: U, line: [[2, 52], [18, 52], [18, 58], [2, 58]], elevation: [4, 4, 6, 6], "
          "conductance: 1.5}]\n");
    assert_int_equal(prob->nlinks, 2);
    const gw_link *a = link_at(2, cell(0, 4)), *b = link_at(2, cell(1, 4));
    assert_non_null(a);
    assert_non_null(b);
    assert_int_equal(a->kind, GW_LINK_DRAIN);
    assert_float_equal(a->cond, 1.5 * 16.0, 1e-9);
    assert_float_equal(b->cond, 1.5 * 22.0, 1e-9);
    /* Drain elevation: first leg 4, last leg 6 -> mean 5 in col 0; floor = ref. */
    assert_float_equal(a->ref, 5.0, 1e-9);
    assert_float_equal(a->floor, a->ref, 0);
    done();
}

static void test_fixed_heads(void **state)
{
    /* Line along y = 5 (row 9) with head 100 at x = 0 and 90 at x = 100:
     * cell col c holds x 10c..10c+10, mean head 100 - 0.1 (10c + 5). */
    build(HEAD AQ
          "fixed_heads:\n"
          "  - {name: South, line: [[0, 5], [100, 5]], head: [100, 90]}\n"
          "  - {name: Lake, polygon: [[40, 40], [70, 40], [70, 60], [40, 60]], head: 97}\n");
    for (int c = 0; c < 10; c++) {
        assert_int_equal(prob->fixed_feature[cell(c, 9)], 1);
        assert_float_equal(prob->fixed[cell(c, 9)], 99.5 - c, 1e-9);
    }
    /* Lake: centres x 45, 55, 65 and y 45, 55 (rows 5 and 4). */
    int lake = 0;
    for (int k = 0; k < 100; k++)
        if (prob->fixed_feature[k] == 2) {
            lake++;
            assert_float_equal(prob->fixed[k], 97.0, 0);
        }
    assert_int_equal(lake, 6);
    assert_int_equal(prob->fixed_feature[cell(4, 4)], 2);
    assert_int_equal(prob->fixed_feature[cell(0, 0)], -1);
    done();
}

static void test_properties_wells_leakage(void **state)
{
    build("units: {length: m, time: day}\n"
          "grid: {origin: [0, 0], cell_size: [10, 20], columns: 10, rows: 5}\n"
          "aquifer:\n"
          "  conductivity:\n"
          "    value: 5\n"
          "    zones:\n"
          "      - {name: a, polygon: [[0, 0], [50, 0], [50, 100], [0, 100]], value: 7}\n"
          "      - {name: b, polygon: [[40, 0], [100, 0], [100, 100], [40, 100]], value: 9}\n"
          "  thickness: 12\n"
          "  porosity: 0.3\n"
          "  anisotropy: 0.1\n"
          "recharge: {rate: 0.001, zones: [{name: r, polygon: [[0, 80], [100, 80], [100, 100], [0, 100]], "
          "rate: 0.002}]}\n"
          "wells: [{name: W, at: [55, 35], pumping: 120}]\n"
          "leakage: [{name: Under, head: 3, resistance: 400}]\n");
    assert_float_equal(prob->k[cell(0, 0)], 7.0, 0);
    assert_float_equal(prob->k[cell(4, 0)], 9.0, 0);     /* centre x 45: both zones, later wins */
    assert_float_equal(prob->k[cell(9, 4)], 9.0, 0);
    assert_float_equal(prob->thick[cell(3, 3)], 12.0, 0);
    assert_float_equal(prob->porosity[cell(3, 3)], 0.3, 0);
    assert_float_equal(prob->anis[cell(3, 3)], 0.1, 0);
    assert_float_equal(prob->recharge[cell(2, 0)], 0.002, 0);   /* row 0 is y 80..100 */
    assert_float_equal(prob->recharge[cell(2, 1)], 0.001, 0);
    assert_int_equal(prob->nwells, 1);
    /* (55, 35): col 5, row = floor((100 - 35) / 20) = 3. */
    assert_int_equal(prob->wells[0].cell, 3 * 10 + 5);
    assert_float_equal(prob->wells[0].rate, 120.0, 0);
    assert_int_equal(prob->features[prob->wells[0].feature].type, GW_FEAT_WELL);
    /* Leakage everywhere: 50 links of dx*dy/resistance = 200/400. */
    assert_int_equal(prob->nlinks, 50);
    for (int i = 0; i < prob->nlinks; i++) {
        assert_int_equal(prob->links[i].kind, GW_LINK_LEAKAGE);
        assert_float_equal(prob->links[i].cond, 0.5, 1e-15);
        assert_float_equal(prob->links[i].ref, 3.0, 0);
        assert_true(isinf(prob->links[i].floor) && prob->links[i].floor < 0);
    }
    done();
}

static void test_active_and_section(void **state)
{
    /* Active: x < 50 only.  The stream at x = 75 lies in inactive cells. */
    const char *y = "units: {length: m, time: day}\n"
                    "grid: {origin: [0, 0], cell_size: 10, columns: 10, rows: 10}\n"
                    "aquifer: {type: section, conductivity: 5, active: {polygon: [[0, 0], [50, 0], [50, 100], [0, 100]]}}\n"
                    "fixed_heads: [{name: Top, line: [[0, 95], [100, 95]], head: 10}]\n";
    build(y);
    assert_int_equal(prob->type, GW_SECTION);
    assert_int_equal(prob->active[cell(4, 5)], 1);
    assert_int_equal(prob->active[cell(5, 5)], 0);
    assert_int_equal(prob->fixed_feature[cell(4, 0)], 1);
    assert_int_equal(prob->fixed_feature[cell(5, 0)], -1);        /* inactive: not fixed */
    assert_float_equal(prob->thick[cell(2, 2)], 1.0, 0);
    done();

    char y2[1024];
    snprintf(y2, sizeof y2, "%sstreams: [{name: Gone, line: [[75, 0], [75, 100]], stage: 1, bed_bottom: 0, "
             "bed_conductance: 1}]\n", y);
    gw_model *m = gw_model_load_string(y2, "t.yaml", &err);
    assert_non_null(m);
    assert_null(gw_model_build(m, &err));
    assert_non_null(strstr(err.msg, "t.yaml:5:11: stream 'Gone' crosses no active cell"));
    gw_model_free(m);
}

static void test_unbounded_rejected(void **state)
{
    gw_model *m = gw_model_load_string(HEAD AQ "recharge: 0.001\n", "t.yaml", &err);
    assert_non_null(m);
    assert_null(gw_model_build(m, &err));
    assert_true(strncmp(err.msg, "t.yaml: ", 8) == 0);
    gw_model_free(m);
}

/* A 4 x 4 GeoTIFF of 25 m pixels over x 0..100, y 0..100, value 10*row+col
 * (pixel row 0 at the north), pixel (3, 3) nodata. */
static void write_raster(const char *path)
{
    GDALAllRegister();
    GDALDriverH drv = GDALGetDriverByName("GTiff");
    assert_non_null(drv);
    GDALDatasetH ds = GDALCreate(drv, path, 4, 4, 1, GDT_Float32, NULL);
    assert_non_null(ds);
    double gt[6] = { 0.0, 25.0, 0.0, 100.0, 0.0, -25.0 };
    GDALSetGeoTransform(ds, gt);
    float v[16];
    for (int i = 0; i < 16; i++) v[i] = (float)(10 * (i / 4) + i % 4 + 1);
    v[15] = -9999.0f;
    GDALRasterBandH b = GDALGetRasterBand(ds, 1);
    GDALSetRasterNoDataValue(b, -9999.0);
    assert_int_equal(GDALRasterIO(b, GF_Write, 0, 0, 4, 4, v, 4, 4, GDT_Float32, 0, 0), CE_None);
    GDALClose(ds);
}

static void test_raster_property(void **state)
{
    char dir[] = "/tmp/gwrasterXXXXXX";
    assert_non_null(mkdtemp(dir));
    char tif[1100], model_path[1100];
    snprintf(tif, sizeof tif, "%s/k.tif", dir);
    snprintf(model_path, sizeof model_path, "%s/m.yaml", dir);
    write_raster(tif);
    /* Active x 0..70 keeps the nodata pixel (x 75..100, y 0..25) out. */
    const char *y = HEAD
        "aquifer: {conductivity: {raster: k.tif, scale: 2}, thickness: 1,\n"
        "          active: {polygon: [[0, 0], [70, 0], [70, 100], [0, 100]]}}\n" LEFT;
    gw_error e;
    gw_model *m = gw_model_load_string(y, model_path, &e);
    if (!m) fail_msg("%s", e.msg);
    gw_problem *p = gw_model_build(m, &e);
    if (!p) fail_msg("%s", e.msg);
    /* Cell col 0 row 0 centre (5, 95): pixel (0, 0) = 1, x2 = 2.
     * Cell col 6 row 9 centre (65, 5): pixel col 2, row 3 = 33, x2 = 66. */
    assert_float_equal(p->k[0], 2.0, 0);
    assert_float_equal(p->k[9 * 10 + 6], 66.0, 0);
    gw_problem_free(p);
    gw_model_free(m);

    /* Without the active polygon, cells over the nodata pixel (x 75..100,
     * y 0..25) fail; the first in row order that lies more than half on it
     * is col 8, row 8, centre (85, 15) (gis_raster.h states the rule). */
    m = gw_model_load_string(HEAD "aquifer: {conductivity: {raster: k.tif}, thickness: 1}\n" LEFT, model_path, &e);
    assert_non_null(m);
    assert_null(gw_model_build(m, &e));
    assert_non_null(strstr(e.msg, "m.yaml:3:25: aquifer.conductivity"));
    assert_non_null(strstr(e.msg, "col 8, row 8"));
    assert_non_null(strstr(e.msg, "nodata"));
    gw_model_free(m);

    /* A grid reaching past the raster: cell col 10 centre x 105 is outside. */
    m = gw_model_load_string("units: {length: m, time: day}\n"
                             "grid: {origin: [0, 0], cell_size: 10, columns: 11, rows: 10}\n"
                             "aquifer: {conductivity: 1, thickness: 1, porosity: {raster: k.tif, scale: 0.01}}\n"
                             LEFT, model_path, &e);
    assert_non_null(m);
    assert_null(gw_model_build(m, &e));
    assert_non_null(strstr(e.msg, "m.yaml:3:52: aquifer.porosity"));
    assert_non_null(strstr(e.msg, "cell col 10, row 0 (x 105, y 95) lies outside"));
    gw_model_free(m);
    unlink(tif);
    rmdir(dir);
}

static void test_full_model_builds(void **state)
{
    char path[1024];
    const char *d = getenv("GW_TEST_DATA");
    snprintf(path, sizeof path, "%s/models/full.yaml", d ? d : "tests/data");
    gw_error e;
    gw_model *m = gw_model_load(path, &e);
    if (!m) fail_msg("%s", e.msg);
    gw_problem *p = gw_model_build(m, &e);
    if (!p) fail_msg("%s", e.msg);
    /* Recharge, West Creek, Pond, East Creek, Tile line, Supply well 1, Lower aquifer. */
    assert_int_equal(p->nfeatures, 7);
    assert_string_equal(p->features[0].name, "Recharge");
    assert_string_equal(p->features[6].name, "Lower aquifer");
    assert_int_equal(p->features[6].type, GW_FEAT_LEAKAGE);
    /* Links: stream 10 cells (x 195, all rows), drain 8 (x 60..140 in row 2),
     * leakage 8 (centres x 65..95, y 10 and 30). */
    assert_int_equal(p->nlinks, 26);
    /* Stream stage 101 at y 0 -> 99 at y 200: row 0 centre y 190 -> 99.1. */
    const gw_link *l = NULL;
    for (int i = 0; i < p->nlinks; i++)
        if (p->links[i].feature == 3 && p->links[i].cell == 19) l = &p->links[i];
    assert_non_null(l);
    assert_float_equal(l->ref, 99.1, 1e-9);
    assert_float_equal(l->cond, 0.8 * 20.0, 1e-9);
    assert_float_equal(p->k[0], 60.0, 0);           /* gravel zone */
    assert_float_equal(p->k[10], 12.0, 0);
    assert_float_equal(p->recharge[19], 0.0009, 0);  /* orchard, NE */
    assert_float_equal(p->recharge[0], 0.0004, 0);
    gw_problem_free(p);
    gw_model_free(m);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_diagonal_stream_length),
        cmocka_unit_test(test_per_vertex_stage),
        cmocka_unit_test(test_pieces_merged_per_cell),
        cmocka_unit_test(test_fixed_heads),
        cmocka_unit_test(test_properties_wells_leakage),
        cmocka_unit_test(test_active_and_section),
        cmocka_unit_test(test_unbounded_rejected),
        cmocka_unit_test(test_raster_property),
        cmocka_unit_test(test_full_model_builds),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
