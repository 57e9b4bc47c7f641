/* Cross-section model keys: water_table and seepage (io/model_yaml.c,
 * io/model_build.c) and the section map (io/map_section.c).
 *
 *  - The water-table key on the Toth (1962) basin ("A theory of groundwater
 *    motion in small drainage basins in central Alberta, Canada",
 *    J. Geophys. Res. 67(11)): a horizontal line through the top-row cell
 *    centres with heads z0 + c x must give the same heads as the same
 *    fixed-head line on a grid that ends at that row (cells above the line
 *    are made inactive), and both must match Toth's series
 *      h = z0 + cL/2 - (4cL/pi^2) sum_m cos(n pi x/L) cosh(n pi z/L)
 *                                      / (n^2 cosh(n pi z0/L)),  n = 2m+1.
 *  - A seepage face only takes water out of the aquifer (Darcy flow to a
 *    face at atmospheric pressure; outflow-only law, DESIGN.md).
 *  - section.png decodes with libpng and is not blank.
 *  - Bad keys are rejected with FILE:LINE:COL. */
#include <math.h>
#include <png.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <cmocka.h>

#include "io/map_section.h"
#include "io/model.h"
#include "solver/budget.h"
#include "solver/section.h"
#include "solver/solve.h"

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif

static const double BL = 6000.0, Z0 = 975.0, SLOPE = 0.02;   /* basin length, top-row centre, c */

typedef struct {
    gw_model *m;
    gw_problem *p;
    gw_solution sol;
    gw_budget b;
} run;

static void run_model(const char *yaml, run *r)
{
    gw_error err = { { 0 } };
    memset(r, 0, sizeof *r);
    r->m = gw_model_load_string(yaml, "s.yaml", &err);
    if (!r->m) fail_msg("load: %s", err.msg);
    r->p = gw_model_build(r->m, &err);
    if (!r->p) fail_msg("build: %s", err.msg);
    if (gw_solve(r->p, NULL, &r->sol, &err) != 0) fail_msg("solve: %s", err.msg);
    if (gw_budget_compute(r->p, &r->sol, &r->b, &err) != 0) fail_msg("budget: %s", err.msg);
}

static void run_free(run *r)
{
    gw_budget_free(&r->b);
    gw_solution_free(&r->sol);
    gw_problem_free(r->p);
    gw_model_free(r->m);
}

/* Toth (1962) series, cosh ratio written without overflow. */
static double toth1962(double x, double z)
{
    double h = Z0 + SLOPE * BL / 2.0;
    for (int n = 1; n < 4000; n += 2) {
        double l = n * M_PI / BL;
        double ch = exp(-l * (Z0 - z)) * (1.0 + exp(-2.0 * l * z)) / (1.0 + exp(-2.0 * l * Z0));
        h -= 4.0 * SLOPE * BL / (M_PI * M_PI) * cos(l * x) * ch / ((double)n * n);
    }
    return h;
}

/* 60 x 20 cells of 100 m x 50 m; the base at 0, the top row's centres at
 * Z0 = 975.  The water-table grid has three more rows above. */
static char *toth_yaml(int water_table)
{
    char *s = malloc(2048);
    snprintf(s, 2048,
             "title: Toth 1962 basin\n"
             "units: {length: m, time: day}\n"
             "grid: {origin: [0, 0], cell_size: [100, 50], columns: 60, rows: %d}\n"
             "aquifer: {type: section, conductivity: 2.0}\n"
             "%s\n"
             "  line: [[0, %g], [%g, %g]]\n"
             "  %s: [%g, %g]\n",
             water_table ? 23 : 20,
             water_table ? "water_table:\n  name: Water table" : "fixed_heads:\n- name: Water table",
             Z0, BL, Z0, water_table ? "elevation" : "head", Z0, Z0 + SLOPE * BL);
    if (!water_table) {   /* list item: indent the keys under '-' */
        char *t = malloc(2048);
        snprintf(t, 2048,
                 "title: Toth 1962 basin\n"
                 "units: {length: m, time: day}\n"
                 "grid: {origin: [0, 0], cell_size: [100, 50], columns: 60, rows: 20}\n"
                 "aquifer: {type: section, conductivity: 2.0}\n"
                 "fixed_heads:\n"
                 "  - name: Water table\n"
                 "    line: [[0, %g], [%g, %g]]\n"
                 "    head: [%g, %g]\n",
                 Z0, BL, Z0, Z0, Z0 + SLOPE * BL);
        free(s);
        s = t;
    }
    return s;
}

static void test_water_table_equals_fixed_top_row(void **state)
{
    (void)state;
    char *ya = toth_yaml(1), *yb = toth_yaml(0);
    run a, b;
    run_model(ya, &a);
    run_model(yb, &b);
    free(ya);
    free(yb);
    const gw_grid *ga = &a.p->grid;
    /* cells above the line left the model */
    for (int r = 0; r < 3; r++)
        for (int c = 0; c < 60; c++) assert_int_equal(a.p->active[r * 60 + c], 0);
    double maxdiff = 0, maxerr = 0, relief = SLOPE * BL;
    for (int r = 0; r < 20; r++)
        for (int c = 0; c < 60; c++) {
            size_t ka = (size_t)(r + 3) * 60 + c, kb = (size_t)r * 60 + c;
            assert_true(a.p->active[ka]);
            assert_int_equal(a.p->fixed_feature[ka] >= 0, b.p->fixed_feature[kb] >= 0);
            maxdiff = fmax(maxdiff, fabs(a.sol.head[ka] - b.sol.head[kb]));
            if (r > 0)
                maxerr = fmax(maxerr, fabs(a.sol.head[ka] - toth1962(gw_grid_xc(ga, c), gw_grid_yc(ga, r + 3))));
        }
    /* same linear system up to the order of the unknowns: round-off */
    assert_true(maxdiff < 1e-9 * relief);
    /* Toth (1962) series to grid accuracy: on this 60 x 20 grid within 0.5 %
     * of the relief (the 120 x 40 grid of test_solver_section_toth.c is
     * within 0.013 %; second order, and the two top corners are singular). */
    assert_true(maxerr < 5e-3 * relief);
    /* the hinge at mid-basin (Toth 1962: symmetric recharge and discharge) */
    gw_section s;
    gw_error err = { { 0 } };
    if (gw_section_analyse(a.p, &a.sol, &a.b, NULL, &s, &err) != 0) fail_msg("%s", err.msg);
    assert_int_equal(s.nhinges, 1);
    assert_true(fabs(s.hinge[0].x - BL / 2) < 1e-6 * BL);
    gw_section_free(&s);
    assert_true(fabs(a.b.total_in - a.b.total_out) < 1e-9 * a.b.total_in);
    run_free(&a);
    run_free(&b);
}

/* A confined strip in section: fixed heads on both sides, the left one above
 * ground (20 m), a seepage face along the whole top.  Near the left end the
 * water comes out; further right the heads drop below ground and the face
 * must stay dry, never feeding the aquifer. */
static const char *SEEP =
    "title: seepage\n"
    "units: {length: m, time: day}\n"
    "grid: {origin: [0, 0], cell_size: [10, 1], columns: 40, rows: 20}\n"
    "aquifer: {type: section, conductivity: 3.0, anisotropy: 0.2}\n"
    "fixed_heads:\n"
    "  - {name: Left, line: [[5, 0.5], [5, 18.5]], head: 24}\n"
    "  - {name: Right, line: [[395, 0.5], [395, 18.5]], head: 12}\n"
    "seepage:\n"
    "  - {name: Ground face, line: [[10, 19.5], [390, 19.5]], elevation: 15}\n";

static void test_seepage_outflow_only(void **state)
{
    (void)state;
    run r;
    run_model(SEEP, &r);
    int f = -1;
    for (int i = 0; i < r.p->nfeatures; i++)
        if (!strcmp(r.p->features[i].name, "Ground face")) f = i;
    assert_true(f > 0);
    assert_int_equal(r.p->features[f].type, GW_FEAT_DRAIN);
    int wet = 0, dry = 0;
    for (int i = 0; i < r.b.nreaches; i++) {
        const gw_reach *rc = &r.b.reach[i];
        if (rc->feature != f) continue;
        assert_true(rc->in == 0.0);     /* never into the aquifer */
        double h = r.sol.head[rc->cell];
        if (rc->out > 0) {
            wet++;
            assert_true(h > 19.5);      /* water leaves only where the head is above the face */
        } else {
            dry++;
            assert_true(h <= 19.5 + 1e-9);
        }
    }
    assert_true(wet > 0 && dry > 0);
    assert_true(r.b.feature[f].out > 0 && r.b.feature[f].in == 0.0);
    /* conductance: vertical K x length / half cell = 0.6 x 10 / 0.5 per cell */
    for (int i = 0; i < r.p->nlinks; i++)
        if (r.p->links[i].feature == f) assert_true(fabs(r.p->links[i].cond - 12.0) < 1e-9);
    assert_true(fabs(r.b.total_in - r.b.total_out) < 1e-9 * r.b.total_in);
    run_free(&r);
}

static void test_section_png(void **state)
{
    (void)state;
    char *ya = toth_yaml(1);
    run a;
    run_model(ya, &a);
    free(ya);
    gw_section s;
    gw_error err = { { 0 } };
    if (gw_section_analyse(a.p, &a.sol, &a.b, NULL, &s, &err) != 0) fail_msg("%s", err.msg);
    char path[] = "/tmp/gw_section_XXXXXX";
    int fd = mkstemp(path);
    assert_true(fd >= 0);
    close(fd);
    gw_section_map o = { "Toth 1962 basin", "m", "day", 900, 0, 20 };
    if (gw_map_section_write(&o, a.p, &a.sol, &s, path, &err) != 0) fail_msg("%s", err.msg);
    png_image img;
    memset(&img, 0, sizeof img);
    img.version = PNG_IMAGE_VERSION;
    assert_true(png_image_begin_read_from_file(&img, path));
    img.format = PNG_FORMAT_RGB;
    unsigned char *px = malloc(PNG_IMAGE_SIZE(img));
    assert_non_null(px);
    assert_true(png_image_finish_read(&img, NULL, px, 0, NULL));
    assert_int_equal(img.width, 900);
    assert_true(img.height > 250);
    long nonwhite = 0, n = (long)img.width * img.height, dark = 0;
    for (long i = 0; i < n; i++) {
        int r = px[3 * i], g = px[3 * i + 1], b = px[3 * i + 2];
        nonwhite += r < 245 || g < 245 || b < 245;
        dark += r + g + b < 200;
    }
    /* The basin (6000 m x 1000 m) is drawn with a vertical exaggeration of
     * 2, so the shaded section fills much of the page; line work and text
     * are dark. */
    assert_true(nonwhite > n / 4);
    assert_true(dark > n / 200);
    assert_true(fabs(gw_section_map_exaggeration(a.p, 900) - 2.0) < 1e-12);
    free(px);
    unlink(path);
    gw_section_free(&s);
    run_free(&a);
}

static gw_error rerr;

static void expect_reject(const char *yaml, ...)
{
    memset(&rerr, 0, sizeof rerr);
    gw_model *m = gw_model_load_string(yaml, "t.yaml", &rerr);
    if (m) {
        gw_problem *p = gw_model_build(m, &rerr);
        gw_problem_free(p);
        gw_model_free(m);
        if (p) fail_msg("model was accepted:\n%s", yaml);
    }
    va_list ap;
    va_start(ap, yaml);
    const char *needle;
    while ((needle = va_arg(ap, const char *)) != NULL)
        if (!strstr(rerr.msg, needle)) fail_msg("message lacks \"%s\":\n%s", needle, rerr.msg);
    va_end(ap);
}

#define HEAD4 \
    "title: t\n" \
    "units: {length: m, time: day}\n" \
    "grid: {origin: [0, 0], cell_size: 10, columns: 10, rows: 10}\n"
#define SECTION HEAD4 "aquifer: {type: section, conductivity: 5}\n"
#define PLAN HEAD4 "aquifer: {type: confined, conductivity: 5, thickness: 10}\n" \
    "fixed_heads: [{name: L, line: [[0, 0], [0, 100]], head: 10}]\n"

static void test_bad_keys(void **state)
{
    (void)state;
    expect_reject(PLAN "water_table: {line: [[0, 95], [100, 95]]}\n", "t.yaml:6:14:",
                  "water_table is for cross-sections only", NULL);
    expect_reject(PLAN "seepage: [{name: S, line: [[0, 95], [100, 95]], elevation: 0}]\n", "t.yaml:6:10:",
                  "seepage is for cross-sections only", NULL);
    expect_reject(SECTION "water_table: {line: [[0, 95], [100, 95]], head: 3}\n", "t.yaml:5:43:",
                  "water_table: unknown key 'head'", NULL);
    expect_reject(SECTION "water_table:\n  line: [[0, 95], [50, 96], [100, 95]]\n  elevation: [95, 96]\n",
                  "t.yaml:7:14:", "elevation has 2 values but the line has 3 vertices", NULL);
    expect_reject(SECTION "water_table: {line: {file: wt.gpkg}}\n", "t.yaml:5:21:",
                  "a GIS layer has no elevation axis", NULL);
    expect_reject(SECTION "water_table: {line: [[0, 95], [100, 95]]}\n"
                          "seepage:\n  - {name: S, line: [[0, 50], [100, 50]]}\n",
                  "t.yaml:7:5:", "seepage face 'S': missing required key 'elevation'", NULL);
    /* below its elevation everywhere: a build error naming the feature */
    expect_reject(SECTION "water_table: {line: [[0, 95], [100, 95]]}\n"
                          "seepage:\n  - {name: S, line: [[0, 50], [100, 50]], elevation: 60}\n",
                  "t.yaml:7:5:", "seepage face 'S'", "above elevation 60", NULL);
    expect_reject(SECTION "water_table: {name: W, line: [[0, 95], [100, 95]]}\n"
                          "fixed_heads: [{name: W, line: [[0, 0], [0, 50]], head: 3}]\n",
                  "duplicate feature name 'W'", NULL);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_water_table_equals_fixed_top_row),
        cmocka_unit_test(test_seepage_outflow_only),
        cmocka_unit_test(test_section_png),
        cmocka_unit_test(test_bad_keys),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
