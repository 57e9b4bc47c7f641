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

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_random_labels_never_overlap),
        cmocka_unit_test(test_rotated_boxes),
        cmocka_unit_test(test_along_line),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
