/* Sweep profile charts (io/map_sweep.c): heads sampled run by run along a
 * transect, one curve per run, written as sweep_profile_<transect>.png.
 *
 * The runs solve a confined strip between two fixed heads with uniform
 * recharge R, whose head is the parabola h = h0 + R / (2 T) (x - a) (b - x)
 * (Dupuit/confined strip with recharge; e.g. Bear, Hydraulics of
 * Groundwater, 1979, sec. 6 -- from memory).  Finite differences are exact
 * at cell centres for a quadratic, so the sampled profile differs from it
 * only by the linear interpolation between centres, at most
 * R / (8 T) dx^2. */
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

#include "io/map_ramp.h"
#include "io/map_sweep.h"
#include "io/model.h"
#include "io/outdir.h"
#include "solver/solve.h"

/* 40 x 3 cells of 25 m; fixed heads through the first and last column
 * centres (x = 12.5 and 987.5); transect along the middle row. */
static const char *MODEL =
    "title: Strip sweep\n"
    "units: {length: m, time: day}\n"
    "grid: {origin: [0, 0], cell_size: 25, columns: 40, rows: 3}\n"
    "aquifer: {type: confined, conductivity: 10, thickness: 20}\n"
    "recharge: %.6g\n"
    "fixed_heads:\n"
    "  - {name: West, line: [[12.5, 0], [12.5, 75]], head: 50}\n"
    "  - {name: East, line: [[987.5, 0], [987.5, 75]], head: 50}\n"
    "analysis: {divides: false, transects: [{name: \"A-A'\", line: [[12.5, 37.5], [987.5, 37.5]]}]}\n"
    "output: {maps: %s, map_width: 900}\n";

static const double RATES[3] = {0.0005, 0.001, 0.0015};

static char tmpdir[256];

static int setup(void **state)
{
    (void)state;
    snprintf(tmpdir, sizeof tmpdir, "/tmp/gw_test_map_sweep_%d", (int)getpid());
    return 0;
}

/* Solve run r and hand it to the collector. */
static void run_one(gw_sweep_profiles *sp, int r, double rate, const char *maps)
{
    char text[2048];
    snprintf(text, sizeof text, MODEL, rate, maps);
    gw_error e = {{0}};
    gw_model *m = gw_model_load_string(text, "strip.yaml", &e);
    if (!m) fail_msg("%s", e.msg);
    gw_problem *p = gw_model_build(m, &e);
    if (!p) fail_msg("%s", e.msg);
    gw_solution sol;
    memset(&sol, 0, sizeof sol);
    if (gw_solve(p, NULL, &sol, &e) != 0) fail_msg("%s", e.msg);
    if (gw_sweep_profiles_take(sp, r, m, &p->grid, sol.head, &e) != 0) fail_msg("%s", e.msg);
    gw_solution_free(&sol);
    gw_problem_free(p);
    gw_model_free(m);
}

/* A hand-made sweep record: what `gwdivide sweep` keeps of each run. */
typedef struct {
    gw_sweep s;
    gw_vary v;
    gw_sweep_run run[3];
    double values[3];
    int ncross[3];
    gw_transect_crossing cross1;
    gw_transect_crossing *crossp[3];
    char *tnames[1];
} fake_sweep;

static void fake_init(fake_sweep *f)
{
    memset(f, 0, sizeof *f);
    f->s.title = "Strip sweep";
    f->s.length_unit = "m";
    f->s.time_unit = "day";
    f->v.key = "recharge";
    f->v.values = f->values;
    f->v.nvalues = 3;
    f->s.vary = &f->v;
    f->s.nvary = 1;
    f->tnames[0] = "A-A'";
    f->s.transect_name = f->tnames;
    f->s.ntransects = 1;
    f->s.nruns = 3;
    f->s.run = f->run;
    /* Run 2 has a divide crossing the transect mid-way (by symmetry the
     * strip's divide is at its centre, 487.5 m along the line). */
    f->cross1.kind = GW_CROSS_DIVIDE;
    f->cross1.at.dist = 487.5;
    f->crossp[1] = &f->cross1;
    f->ncross[1] = 1;
    for (int r = 0; r < 3; r++) {
        f->values[r] = RATES[r];
        f->run[r].values = &f->values[r];
        f->run[r].ncross = &f->ncross[r];
        f->run[r].cross = &f->crossp[r];
    }
}

static int read_png(const char *path, png_image *img, unsigned char **px)
{
    memset(img, 0, sizeof *img);
    img->version = PNG_IMAGE_VERSION;
    if (!png_image_begin_read_from_file(img, path)) return -1;
    img->format = PNG_FORMAT_RGB;
    *px = malloc(PNG_IMAGE_SIZE(*img));
    if (!*px || !png_image_finish_read(img, NULL, *px, 0, NULL)) return -1;
    return 0;
}

static void test_profiles_follow_the_runs(void **state)
{
    (void)state;
    gw_error e = {{0}};
    gw_sweep_profiles sp;
    assert_int_equal(gw_sweep_profiles_init(&sp, 3, &e), 0);
    for (int r = 0; r < 3; r++) run_one(&sp, r, RATES[r], "true");
    assert_int_equal(sp.ncurves, 3);
    assert_int_equal(sp.ntransects, 1);
    assert_string_equal(sp.file[0], "sweep_profile_A-A_.png");
    const double T = 10 * 20, dx = 25, a = 12.5, b = 987.5;
    for (int c = 0; c < 3; c++) {
        double R = RATES[c], tol = R / (8 * T) * dx * dx + 1e-6;
        const double *h = sp.head + (size_t)c * GW_SWEEP_PROFILE_SAMPLES;
        for (int i = 0; i < GW_SWEEP_PROFILE_SAMPLES; i++) {
            double x = a + sp.dist[i];
            double exact = 50 + R / (2 * T) * (x - a) * (b - x);
            if (fabs(h[i] - exact) > tol)
                fail_msg("run %d, x = %g: head %.6f, parabola %.6f", c, x, h[i], exact);
        }
    }

    fake_sweep f;
    fake_init(&f);
    gw_outdir *o = gw_outdir_open(tmpdir, &e);
    if (!o) fail_msg("%s", e.msg);
    if (gw_sweep_profiles_write(&sp, &f.s, o, &e) != 0) fail_msg("%s", e.msg);
    assert_int_equal(gw_outdir_commit(o, &e), 0);
    gw_outdir_free(o);
    char path[400];
    snprintf(path, sizeof path, "%s/sweep_profile_A-A_.png", tmpdir);
    png_image img;
    unsigned char *px = NULL;
    assert_int_equal(read_png(path, &img, &px), 0);
    assert_int_equal(img.width, 900);   /* output.map_width */
    /* One curve per run: each run's colour from our ramp appears. */
    for (int c = 0; c < 3; c++) {
        double rgb[3];
        gw_ramp_rgb(0.6 * c / 2, rgb);
        long hits = 0;
        for (size_t k = 0; k < (size_t)img.width * img.height; k++)
            if (k % img.width < 0.7 * img.width &&   /* plot area, not the legend */
                (abs(px[3 * k] - (int)lround(255 * rgb[0])) < 6 && abs(px[3 * k + 1] - (int)lround(255 * rgb[1])) < 6 &&
                abs(px[3 * k + 2] - (int)lround(255 * rgb[2])) < 6))
                hits++;
        if (hits < 40) fail_msg("curve %d: only %ld pixels of its colour", c, hits);
    }
    free(px);
    png_image_free(&img);
    unlink(path);
    rmdir(tmpdir);
    gw_sweep_profiles_free(&sp);
}

/* output.maps without profiles: nothing is sampled or written. */
static void test_profiles_left_out(void **state)
{
    (void)state;
    gw_error e = {{0}};
    gw_sweep_profiles sp;
    assert_int_equal(gw_sweep_profiles_init(&sp, 3, &e), 0);
    for (int r = 0; r < 3; r++) run_one(&sp, r, RATES[r], "[head, budget]");
    assert_int_equal(sp.draw, 0);
    fake_sweep f;
    fake_init(&f);
    gw_outdir *o = gw_outdir_open(tmpdir, &e);
    if (!o) fail_msg("%s", e.msg);
    assert_int_equal(gw_sweep_profiles_write(&sp, &f.s, o, &e), 0);
    assert_int_equal(gw_outdir_commit(o, &e), 0);
    gw_outdir_free(o);
    char path[400];
    snprintf(path, sizeof path, "%s/sweep_profile_A-A_.png", tmpdir);
    assert_int_not_equal(access(path, F_OK), 0);
    rmdir(tmpdir);
    gw_sweep_profiles_free(&sp);
}

/* Long sweeps: at most GW_SWEEP_PROFILE_CURVES runs drawn, first and last
 * among them, in order. */
static void test_runs_drawn(void **state)
{
    (void)state;
    gw_error e = {{0}};
    gw_sweep_profiles sp;
    assert_int_equal(gw_sweep_profiles_init(&sp, 30, &e), 0);
    assert_int_equal(sp.ncurves, GW_SWEEP_PROFILE_CURVES);
    assert_int_equal(sp.run_of[0], 0);
    assert_int_equal(sp.run_of[sp.ncurves - 1], 29);
    for (int c = 1; c < sp.ncurves; c++) assert_true(sp.run_of[c] > sp.run_of[c - 1]);
    gw_sweep_profiles_free(&sp);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_profiles_follow_the_runs),
        cmocka_unit_test(test_profiles_left_out),
        cmocka_unit_test(test_runs_drawn),
    };
    return cmocka_run_group_tests(tests, setup, NULL);
}
