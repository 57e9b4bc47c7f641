/* io/json_writer: layout, string escaping and number round trips.
 * Escaping rules: RFC 8259 section 7 (quotation mark, reverse solidus and
 * control characters U+0000..U+001F must be escaped).
 * Round trip: 17 significant decimal digits identify every IEEE 754 binary64
 * value uniquely (IEEE 754-2008, section 5.12.2), so strtod of "%.17g"
 * output must give back the same bits. */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <cmocka.h>

#include <float.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "io/json_writer.h"

/* Run fn on a writer over a memory stream; return the text (caller frees). */
static char *render(void (*fn)(gw_json *), int *rc)
{
    char *buf = NULL;
    size_t len = 0;
    FILE *f = open_memstream(&buf, &len);
    assert_non_null(f);
    gw_json j;
    gw_json_init(&j, f);
    fn(&j);
    gw_error err = {{0}};
    *rc = gw_json_finish(&j, &err);
    fclose(f);
    return buf;
}

static void doc_small(gw_json *j)
{
    gw_json_object_begin(j);
    gw_json_kv_string(j, "a", "x");
    gw_json_key(j, "b");
    gw_json_array_begin(j);
    gw_json_int(j, 1);
    gw_json_pair(j, 2.5, -3);
    gw_json_array_end(j);
    gw_json_key(j, "e");
    gw_json_array_begin(j);
    gw_json_array_end(j);
    gw_json_kv_bool(j, "t", 1);
    gw_json_key(j, "n");
    gw_json_null(j);
    gw_json_object_end(j);
}

static void test_layout(void **state)
{
    (void)state;
    int rc;
    char *s = render(doc_small, &rc);
    assert_int_equal(rc, 0);
    assert_string_equal(s, "{\n  \"a\": \"x\",\n  \"b\": [\n    1,\n    [2.5, -3]\n  ],\n"
                           "  \"e\": [],\n  \"t\": true,\n  \"n\": null\n}\n");
    free(s);
}

static void doc_escapes(gw_json *j)
{
    gw_json_array_begin_inline(j);
    gw_json_string(j, "q\"b\\s/\n\r\t\b\f\x01\x1f end");
    gw_json_string(j, "K\xc3\xa4rnten");   /* UTF-8 passes through unchanged */
    gw_json_string(j, NULL);
    gw_json_array_end(j);
}

static void test_escapes(void **state)
{
    (void)state;
    int rc;
    char *s = render(doc_escapes, &rc);
    assert_int_equal(rc, 0);
    assert_string_equal(s, "[\"q\\\"b\\\\s/\\n\\r\\t\\b\\f\\u0001\\u001f end\", \"K\xc3\xa4rnten\", null]\n");
    free(s);
}

static const double values[] = {0.1, 1.0 / 3.0, 2.0 / 3.0, 1e-300, 5e-324, DBL_MAX, DBL_MIN,
                                -123456.789, 100.00000000000001, 9007199254740993.0, 0.0004};

static void doc_numbers(gw_json *j)
{
    gw_json_array_begin_inline(j);
    for (size_t i = 0; i < sizeof values / sizeof values[0]; i++) gw_json_double(j, values[i]);
    gw_json_double(j, NAN);
    gw_json_double(j, INFINITY);
    gw_json_double(j, -INFINITY);
    gw_json_array_end(j);
}

static void test_numbers_round_trip(void **state)
{
    (void)state;
    int rc;
    char *s = render(doc_numbers, &rc);
    assert_int_equal(rc, 0);
    char *p = s + 1;   /* after '[' */
    for (size_t i = 0; i < sizeof values / sizeof values[0]; i++) {
        char *end;
        double back = strtod(p, &end);
        assert_true(end != p);
        assert_memory_equal(&back, &values[i], sizeof back);   /* same bits */
        p = end;
        assert_true(*p == ',');
        p += 2;
    }
    /* JSON has no NaN or infinity: they become null. */
    assert_string_equal(p, "null, null, null]\n");
    free(s);
}

static void doc_unbalanced(gw_json *j)
{
    gw_json_object_begin(j);
    gw_json_key(j, "a");
}

static void doc_value_without_key(gw_json *j)
{
    gw_json_object_begin(j);
    gw_json_int(j, 3);
    gw_json_object_end(j);
}

static void test_misuse_detected(void **state)
{
    (void)state;
    int rc;
    free(render(doc_unbalanced, &rc));
    assert_int_equal(rc, -1);
    free(render(doc_value_without_key, &rc));
    assert_int_equal(rc, -1);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_layout),
        cmocka_unit_test(test_escapes),
        cmocka_unit_test(test_numbers_round_trip),
        cmocka_unit_test(test_misuse_detected),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
