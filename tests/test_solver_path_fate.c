/* Known path fates at cell faces (solver/path_fate.h): the face numbering
 * and the lookup rule -- a new crossing takes a fate only when the nearest
 * known crossings below and above it on the same face, both within tol,
 * agree.  (The rule itself rests on path lines not crossing; the capture
 * tests check that zones do not move when it is used.) */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdlib.h>
#include <cmocka.h>

#include "solver/path_fate.h"

static void learn(gw_fate_map *m, size_t face, double along, unsigned char fate)
{
    gw_crossing_log l = {0};
    assert_int_equal(gw_crossing_log_add(&l, face, along), 0);
    gw_crossing_log_set_fate(&l, 0, fate);
    assert_int_equal(gw_fate_map_learn(m, &l), 0);
    gw_crossing_log_free(&l);
}

static void test_face_ids(void **state)
{
    (void)state;
    const int nx = 7;
    int k = 3 * nx + 2;
    /* One id per face, whichever side the path comes from. */
    assert_true(gw_face_id(k, k + 1) == gw_face_id(k + 1, k));
    assert_true(gw_face_id(k, k + nx) == gw_face_id(k + nx, k));
    assert_true(gw_face_id(k, k + 1) != gw_face_id(k, k + nx));
    assert_true(gw_face_id(k, k + 1) != gw_face_id(k - 1, k));
    assert_true(gw_face_is_ew(gw_face_id(k, k - 1)));
    assert_false(gw_face_is_ew(gw_face_id(k, k - nx)));
}

static void test_lookup_rule(void **state)
{
    (void)state;
    gw_fate_map *m = gw_fate_map_new();
    assert_non_null(m);
    const size_t F = 42, G = 43;
    assert_int_equal(gw_fate_map_lookup(m, F, 5.0, 1.0), -1);   /* empty */
    learn(m, F, 4.0, 1);
    /* One known path only: its other side is unknown. */
    assert_int_equal(gw_fate_map_lookup(m, F, 4.5, 1.0), -1);
    assert_int_equal(gw_fate_map_lookup(m, F, 3.5, 1.0), -1);
    learn(m, F, 6.0, 1);
    /* Between two captured paths, both within tol. */
    assert_int_equal(gw_fate_map_lookup(m, F, 5.0, 1.0), 1);
    assert_int_equal(gw_fate_map_lookup(m, F, 4.0, 1.0), 1);   /* on one of them */
    /* ...but not when one of them is farther than tol. */
    assert_int_equal(gw_fate_map_lookup(m, F, 5.5, 1.0), -1);
    assert_int_equal(gw_fate_map_lookup(m, F, 5.0, 0.5), -1);
    /* Not on another face. */
    assert_int_equal(gw_fate_map_lookup(m, G, 5.0, 1.0), -1);
    /* A path of the other fate between them: the edge runs there. */
    learn(m, F, 5.2, 0);
    assert_int_equal(gw_fate_map_lookup(m, F, 5.0, 1.0), -1);
    assert_int_equal(gw_fate_map_lookup(m, F, 5.5, 1.0), -1);
    learn(m, F, 5.8, 0);
    assert_int_equal(gw_fate_map_lookup(m, F, 5.5, 1.0), 0);   /* between two of fate 0 */
    assert_int_equal(gw_fate_map_size(m), 4);
    gw_fate_map_free(m);
}

static void test_many_faces(void **state)
{
    (void)state;
    /* Enough faces to grow the table several times; every face keeps its
     * own paths. */
    gw_fate_map *m = gw_fate_map_new();
    gw_crossing_log l = {0};
    const size_t n = 50000;
    for (size_t f = 0; f < n; f++) {
        assert_int_equal(gw_crossing_log_add(&l, 3 * f, 1.0), 0);
        assert_int_equal(gw_crossing_log_add(&l, 3 * f, 2.0), 0);
    }
    for (long i = 0; i < l.n; i++)
        gw_crossing_log_set_fate(&l, i, (unsigned char)(l.c[i].face / 3 % 2));
    assert_int_equal(gw_fate_map_learn(m, &l), 0);
    for (size_t f = 0; f < n; f++) {
        assert_int_equal(gw_fate_map_lookup(m, 3 * f, 1.5, 1.0), (int)(f % 2));
        assert_int_equal(gw_fate_map_lookup(m, 3 * f + 1, 1.5, 1.0), -1);
    }
    assert_int_equal(gw_fate_map_size(m), (long)(2 * n));
    gw_crossing_log_free(&l);
    gw_fate_map_free(m);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_face_ids),
        cmocka_unit_test(test_lookup_rule),
        cmocka_unit_test(test_many_faces),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
