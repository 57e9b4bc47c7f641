/* The output: section: output.maps is true, false or a list naming the
 * maps to draw; map_width sets the image width.  Unknown map names are
 * refused with the file:line:column of the name. */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <cmocka.h>

#include "io/model.h"

#define BASE \
    "title: t\n" \
    "units: {length: m, time: day}\n" \
    "grid: {origin: [0, 0], cell_size: 10, columns: 10, rows: 10}\n" \
    "aquifer: {type: confined, conductivity: 5, thickness: 10}\n" \
    "fixed_heads:\n" \
    "  - {name: Left, line: [[0, 0], [0, 100]], head: 10}\n"

static gw_model *load(const char *text, gw_error *e)
{
    memset(e, 0, sizeof *e);
    return gw_model_load_string(text, "t.yaml", e);
}

static void test_defaults_draw_everything(void **state)
{
    (void)state;
    gw_error e;
    gw_model *m = load(BASE, &e);
    if (!m) fail_msg("%s", e.msg);
    assert_int_equal(m->maps, 1);
    assert_int_equal(m->map_set, GW_MAP_ALL);
    assert_int_equal(m->map_width, 1400);
    gw_model_free(m);
}

static void test_true_false(void **state)
{
    (void)state;
    gw_error e;
    gw_model *m = load(BASE "output: {maps: false}\n", &e);
    if (!m) fail_msg("%s", e.msg);
    assert_int_equal(m->maps, 0);
    gw_model_free(m);
    m = load(BASE "output: {maps: true, map_width: 900}\n", &e);
    if (!m) fail_msg("%s", e.msg);
    assert_int_equal(m->maps, 1);
    assert_int_equal(m->map_set, GW_MAP_ALL);
    assert_int_equal(m->map_width, 900);
    gw_model_free(m);
}

static void test_list_names_the_maps(void **state)
{
    (void)state;
    gw_error e;
    gw_model *m = load(BASE "output: {maps: [head, budget], map_width: 1000}\n", &e);
    if (!m) fail_msg("%s", e.msg);
    assert_int_equal(m->maps, 1);
    assert_int_equal(m->map_set, GW_MAP_HEAD | GW_MAP_BUDGET);
    assert_int_equal(m->map_width, 1000);
    gw_model_free(m);

    m = load(BASE "output:\n  maps:\n    - profiles\n    - catchments\n    - head\n    - budget\n", &e);
    if (!m) fail_msg("%s", e.msg);
    assert_int_equal(m->map_set, GW_MAP_ALL);
    gw_model_free(m);

    /* An empty list draws nothing, like false. */
    m = load(BASE "output: {maps: []}\n", &e);
    if (!m) fail_msg("%s", e.msg);
    assert_int_equal(m->maps, 0);
    gw_model_free(m);
}

static void test_bad_names_refused(void **state)
{
    (void)state;
    gw_error e;
    gw_model *m = load(BASE "output: {maps: [head, contours, {a: 1}]}\n", &e);
    if (m) {
        gw_model_free(m);
        fail_msg("a list with unknown map names was accepted");
    }
    /* Line 7, columns of 'contours' and of the mapping. */
    assert_non_null(strstr(e.msg, "t.yaml:7:23: output.maps: unknown map 'contours'"));
    assert_non_null(strstr(e.msg, "t.yaml:7:33: output.maps"));
    assert_non_null(strstr(e.msg, "expected head, catchments, budget or profiles"));

    m = load(BASE "output: {maps: yes please}\n", &e);
    if (m) {
        gw_model_free(m);
        fail_msg("maps: 'yes please' was accepted");
    }
    assert_non_null(strstr(e.msg, "t.yaml:7:16: output.maps"));

    m = load(BASE "output: {map_width: 50}\n", &e);
    if (m) {
        gw_model_free(m);
        fail_msg("map_width 50 was accepted");
    }
    assert_non_null(strstr(e.msg, "output.map_width"));
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_defaults_draw_everything),
        cmocka_unit_test(test_true_false),
        cmocka_unit_test(test_list_names_the_maps),
        cmocka_unit_test(test_bad_names_refused),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
