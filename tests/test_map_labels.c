/* Label placement: accepted labels never overlap each other and never run
 * off the frame; labels laid along a line follow it and stay upright.
 * Overlap is checked independently of the separating-axis test in
 * io/map_labels.c, by sampling points inside each rotated rectangle. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdlib.h>
#include <cmocka.h>

#include "io/map_labels.h"

static const double PI = 3.14159265358979323846;

/* Is (x, y) inside box b (shrunk by `in` px)? */
static int inside(const gw_label_box *b, double x, double y, double in)
{
    double c = cos(b->angle), s = sin(b->angle);
    double u = (x - b->cx) * c + (y - b->cy) * s, v = -(x - b->cx) * s + (y - b->cy) * c;
    return fabs(u) < 0.5 * b->w - in && fabs(v) < 0.5 * b->h - in;
}

/* Brute force: any sample point of a lying in b? */
static int sampled_overlap(const gw_label_box *a, const gw_label_box *b)
{
    double c = cos(a->angle), s = sin(a->angle);
    for (int i = 0; i <= 40; i++)
        for (int j = 0; j <= 12; j++) {
            double u = (i / 40.0 - 0.5) * a->w * 0.999, v = (j / 12.0 - 0.5) * a->h * 0.999;
            if (inside(b, a->cx + u * c - v * s, a->cy + u * s + v * c, 0)) return 1;
        }
    return 0;
}

static void corners_inside(const gw_label_set *s, const gw_label_box *b)
{
    double c = cos(b->angle), sn = sin(b->angle);
    for (int k = 0; k < 4; k++) {
        double u = (k == 0 || k == 3 ? -0.5 : 0.5) * b->w, v = (k < 2 ? -0.5 : 0.5) * b->h;
        double x = b->cx + u * c - v * sn, y = b->cy + u * sn + v * c;
        assert_true(x >= s->x0 - 1e-9 && x <= s->x1 + 1e-9 && y >= s->y0 - 1e-9 && y <= s->y1 + 1e-9);
    }
}

static void test_random_labels_never_overlap(void **state)
{
    (void)state;
    gw_label_set s;
    gw_labels_init(&s, 0, 0, 800, 600, 0);
    srand(12345);
    int accepted = 0;
    for (int i = 0; i < 3000; i++) {
        gw_label_box b = {rand() % 900 - 50, rand() % 700 - 50, 20 + rand() % 80, 10 + rand() % 10,
                          (rand() % 360) * PI / 180.0};
        int r = gw_labels_try(&s, &b);
        assert_true(r == 0 || r == 1);
        accepted += r;
    }
    assert_true(accepted > 50);   /* the check is not vacuous */
    for (int i = 0; i < s.n; i++) {
        corners_inside(&s, &s.box[i]);
        for (int j = 0; j < s.n; j++)
            if (i != j) assert_false(sampled_overlap(&s.box[i], &s.box[j]));
    }
    gw_labels_free(&s);
}

/* The separating-axis test must not be a mere bounding-box test: two thin
 * boxes crossing at 45 degrees whose bounding boxes overlap but which do
 * not touch are both accepted; a copy of an accepted box is refused. */
static void test_rotated_boxes(void **state)
{
    (void)state;
    gw_label_set s;
    gw_labels_init(&s, 0, 0, 500, 500, 0);
    gw_label_box a = {200, 200, 200, 10, PI / 4};
    gw_label_box b = {200 + 40, 200 - 40, 200, 10, PI / 4};   /* parallel, offset sideways by 56 px */
    assert_int_equal(gw_labels_try(&s, &a), 1);
    assert_int_equal(gw_labels_try(&s, &b), 1);
    assert_false(sampled_overlap(&a, &b));
    gw_label_box c = a;
    assert_int_equal(gw_labels_try(&s, &c), 0);
    gw_label_box d = {200, 200, 200, 10, -PI / 4};           /* crosses a */
    assert_int_equal(gw_labels_try(&s, &d), 0);
    assert_true(sampled_overlap(&a, &d));
    gw_label_box off = {495, 250, 40, 10, 0};                  /* runs off the frame */
    assert_int_equal(gw_labels_try(&s, &off), 0);
    gw_labels_free(&s);
}

/* Along a straight line at -30 degrees: every label centre is on the line,
 * its angle is the line's (upright: within +-90 deg), spacing is kept. */
static void test_along_line(void **state)
{
    (void)state;
    gw_label_set s;
    gw_labels_init(&s, 0, 0, 1000, 1000, 2);
    double ang = -30 * PI / 180;
    /* Drawn right to left so the raw direction is upside down. */
    double line[4] = {900, 500 + 400 * tan(ang) * -1, 100, 500};
    line[1] = 500 + 800 * sin(ang) / cos(ang);
    gw_label_box out[10];
    int n = gw_labels_along_line(&s, line, 2, 60, 14, 150, out, 10);
    assert_true(n >= 3);
    double dirx = line[0] - line[2], diry = line[1] - line[3], L = hypot(dirx, diry);
    for (int i = 0; i < n; i++) {
        /* distance from the centre to the line */
        double d = fabs((out[i].cx - line[2]) * diry / L - (out[i].cy - line[3]) * dirx / L);
        assert_true(d < 1e-6);
        assert_true(out[i].angle >= -PI / 2 && out[i].angle <= PI / 2);
        assert_true(fabs(out[i].angle - ang) < 1e-6);
        for (int j = 0; j < i; j++)
            assert_true(hypot(out[i].cx - out[j].cx, out[i].cy - out[j].cy) >= 150 - 1e-6);
    }
    /* A tight zigzag has no straight stretch for a long label. */
    double zig[20];
    for (int i = 0; i < 10; i++) { zig[2 * i] = 100 + 8 * i; zig[2 * i + 1] = 100 + (i % 2) * 8; }
    assert_int_equal(gw_labels_along_line(&s, zig, 10, 60, 14, 150, out, 10), 0);
    gw_labels_free(&s);
}

/* Distance from point (x, y) to the rotated rectangle b (0 inside). */
static double point_box_dist(const gw_label_box *b, double x, double y)
{
    double c = cos(b->angle), s = sin(b->angle);
    double u = (x - b->cx) * c + (y - b->cy) * s, v = -(x - b->cx) * s + (y - b->cy) * c;
    double du = fmax(fabs(u) - 0.5 * b->w, 0), dv = fmax(fabs(v) - 0.5 * b->h, 0);
    return hypot(du, dv);
}

/* Least distance from a box to a polyline, by sampling the line every
 * 0.25 px: independent of the clipping test in io/map_labels.c. */
static double line_box_dist(const gw_label_box *b, const double *xy, int n)
{
    double best = HUGE_VAL;
    for (int i = 0; i + 1 < n; i++) {
        double ax = xy[2 * i], ay = xy[2 * i + 1], dx = xy[2 * i + 2] - ax, dy = xy[2 * i + 3] - ay;
        double L = hypot(dx, dy);
        /* Segments far from the box need no sampling (saves time only). */
        double t0 = L > 0 ? ((b->cx - ax) * dx + (b->cy - ay) * dy) / (L * L) : 0;
        t0 = t0 < 0 ? 0 : t0 > 1 ? 1 : t0;
        if (hypot(ax + t0 * dx - b->cx, ay + t0 * dy - b->cy) > 0.5 * hypot(b->w, b->h) + 50) continue;
        int m = (int)(L / 0.25) + 1;
        for (int j = 0; j <= m; j++) {
            double t = (double)j / m;
            double d = point_box_dist(b, xy[2 * i] + t * (xy[2 * i + 2] - xy[2 * i]),
                                      xy[2 * i + 1] + t * (xy[2 * i + 3] - xy[2 * i + 1]));
            if (d < best) best = d;
        }
    }
    return best;
}

/* Feature lines reserved as obstacles: no label accepted afterwards, by
 * gw_labels_try or along other lines, comes within the clearance. */
static void test_labels_keep_off_feature_lines(void **state)
{
    (void)state;
    gw_label_set s;
    gw_labels_init(&s, 0, 0, 1000, 700, 2);
    /* Two winding "streams" and a straight "drain". */
    double s1[14], s2[12], dr[4] = {300, 350, 700, 352};
    for (int i = 0; i < 7; i++) { s1[2 * i] = 150 + 30 * sin(i * 1.3); s1[2 * i + 1] = i * 700.0 / 6; }
    for (int i = 0; i < 6; i++) { s2[2 * i] = 820 + 45 * cos(i * 0.9); s2[2 * i + 1] = i * 700.0 / 5; }
    const double clear = 7;
    assert_int_equal(gw_labels_reserve_line(&s, s1, 7, 0, clear, 0), 0);
    assert_int_equal(gw_labels_reserve_line(&s, s2, 6, 0, clear, 1), 0);
    assert_int_equal(gw_labels_reserve_line(&s, dr, 2, 0, 4, 2), 0);
    srand(777);
    int accepted = 0, refused_near_line = 0;
    for (int i = 0; i < 4000; i++) {
        gw_label_box b = {rand() % 1000, rand() % 700, 20 + rand() % 60, 10 + rand() % 6,
                          (rand() % 360) * PI / 180.0};
        int free_of_lines = line_box_dist(&b, s1, 7) >= clear && line_box_dist(&b, s2, 6) >= clear &&
                            line_box_dist(&b, dr, 2) >= 4;
        int r = gw_labels_try(&s, &b);
        accepted += r;
        if (!free_of_lines) {
            assert_int_equal(r, 0);
            refused_near_line++;
        }
    }
    /* "Contour" lines crossing the streams: labels go along them but
     * never onto a stream. */
    for (int k = 0; k < 12; k++) {
        double cl[4] = {0, 30 + 55 * k, 1000, 60 + 50 * k};
        gw_label_box out[10];
        int n = gw_labels_along_line(&s, cl, 2, 50, 12, 120, out, 10);
        assert_true(n >= 0);
        accepted += n;
    }
    assert_true(accepted > 80 && refused_near_line > 100);   /* not vacuous */
    for (int i = 0; i < s.n; i++) {
        assert_true(line_box_dist(&s.box[i], s1, 7) >= clear - 1e-9);
        assert_true(line_box_dist(&s.box[i], s2, 6) >= clear - 1e-9);
        assert_true(line_box_dist(&s.box[i], dr, 2) >= 4 - 1e-9);
        for (int j = 0; j < i; j++) assert_false(sampled_overlap(&s.box[i], &s.box[j]));
    }
    /* A label laid on its own line is allowed only when that line's tag
     * is skipped. */
    gw_label_box on = {300 + 200, 351, 40, 10, 0};
    assert_int_equal(gw_labels_hits_line(&s, &on), 1);
    s.skip_tag = 2;
    assert_int_equal(gw_labels_hits_line(&s, &on), 0);
    s.skip_tag = -1;
    gw_labels_free(&s);
}

/* A single label along a line sits at its middle when there is room. */
static void test_single_label_mid_line(void **state)
{
    (void)state;
    gw_label_set s;
    gw_labels_init(&s, 0, 0, 1000, 1000, 2);
    double line[6] = {100, 100, 500, 100, 900, 100};
    gw_label_box b;
    assert_int_equal(gw_labels_along_line(&s, line, 3, 80, 14, 1e9, &b, 1), 1);
    assert_true(fabs(b.cx - 500) < 8 && fabs(b.cy - 100) < 1e-9);
    /* With the middle taken, the next one goes as near to it as fits. */
    gw_label_box c;
    assert_int_equal(gw_labels_along_line(&s, line, 3, 80, 14, 1e9, &c, 1), 1);
    assert_true(fabs(c.cx - 500) < 100 && fabs(c.cx - 500) >= 80);
    gw_labels_free(&s);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_random_labels_never_overlap),
        cmocka_unit_test(test_rotated_boxes),
        cmocka_unit_test(test_along_line),
        cmocka_unit_test(test_labels_keep_off_feature_lines),
        cmocka_unit_test(test_single_label_mid_line),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
