/* Model file validation: every rejection names FILE:LINE:COL and the key or
 * feature, several problems are listed at once, and malformed input of any
 * kind gives a message, never a crash. */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <cmocka.h>

#include "io/model.h"

/* Lines 1-6 of every test model; the test's own text starts at line 7. */
#define BASE \
    "title: t\n" \
    "units: {length: m, time: day}\n" \
    "grid: {origin: [0, 0], cell_size: 10, columns: 10, rows: 10}\n" \
    "aquifer: {type: confined, conductivity: 5, thickness: 10}\n" \
    "fixed_heads:\n" \
    "  - {name: Left, line: [[0, 0], [0, 100]], head: 10}\n"

static gw_error err;

/* Load must fail; the message must contain each NULL-terminated needle. */
static void expect_reject(const char *yaml, ...)
{
    memset(&err, 0, sizeof err);
    gw_model *m = gw_model_load_string(yaml, "t.yaml", &err);
    if (m) {
        gw_model_free(m);
        fail_msg("model was accepted:\n%s", yaml);
    }
    va_list ap;
    va_start(ap, yaml);
    const char *needle;
    while ((needle = va_arg(ap, const char *)) != NULL)
        if (!strstr(err.msg, needle))
            fail_msg("message lacks \"%s\":\n%s", needle, err.msg);
    va_end(ap);
}

static void test_base_is_valid(void **state)
{
    gw_model *m = gw_model_load_string(BASE, "t.yaml", &err);
    if (!m) fail_msg("%s", err.msg);
    gw_model_free(m);
}

static void test_unknown_keys(void **state)
{
    expect_reject(BASE "colour: blue\n", "t.yaml:7:1:", "unknown key 'colour'", NULL);
    expect_reject(BASE "streams:\n  - {name: S, line: [[50, 0], [50, 100]], stage: 3, bed_bottom: 1,\n"
                       "     bed_conductance: 1, width: 4}\n",
                  "t.yaml:9:26:", "stream 'S'", "unknown key 'width'", NULL);
    expect_reject("units: {length: m, time: day, mass: kg}\n"
                  "grid: {origin: [0, 0], cell_size: 10, columns: 10, rows: 10}\n"
                  "aquifer: {conductivity: 5, thickness: 10}\n",
                  "t.yaml:1:31:", "units: unknown key 'mass'", NULL);
}

static void test_wrong_types(void **state)
{
    expect_reject("units: {length: m, time: day}\n"
                  "grid: {origin: [0, 0], cell_size: 10, columns: 10, rows: 10}\n"
                  "aquifer: {conductivity: twelve, thickness: 10}\n",
                  "t.yaml:3:25:", "aquifer.conductivity", "expected a number, got 'twelve'", NULL);
    expect_reject(BASE "wells: [{name: W, at: [50, 50], pumping: \"80\"}]\n",
                  "t.yaml:7:42:", "well 'W': pumping", "quoted", NULL);
    expect_reject(BASE "analysis: {divides: yes}\n", "t.yaml:7:21:", "analysis.divides", "true or false", NULL);
    expect_reject(BASE "wells: [{name: W, at: 50, pumping: 1}]\n", "t.yaml:7:23:", "well 'W': at",
                  "expected a point", NULL);
    expect_reject("units: {length: m, time: day}\n"
                  "grid: {origin: [0, 0], cell_size: 10, columns: 10, rows: 10}\n"
                  "aquifer: [1, 2]\n",
                  "t.yaml:3:10:", "aquifer: expected a mapping", NULL);
    expect_reject(BASE "streams: {name: S}\n", "t.yaml:7:10:", "streams: expected a list", NULL);
    expect_reject(BASE "drains: [1, [2]]\n", "t.yaml:7:10:", "drains item 1", "t.yaml:7:13:", "drains item 2",
                  NULL);
}

static void test_non_positive(void **state)
{
    expect_reject("units: {length: m, time: day}\n"
                  "grid: {origin: [0, 0], cell_size: 10, columns: 10, rows: 10}\n"
                  "aquifer: {conductivity: -3, thickness: 0}\n",
                  "t.yaml:3:25:", "aquifer.conductivity must be greater than zero",
                  "t.yaml:3:40:", "aquifer.thickness must be greater than zero", NULL);
    expect_reject("units: {length: m, time: day}\n"
                  "grid: {origin: [0, 0], cell_size: [10, 0], columns: 0, rows: -2}\n"
                  "aquifer: {conductivity: 1, thickness: 1}\n",
                  "t.yaml:2:40:", "grid.cell_size dy must be greater than zero",
                  "t.yaml:2:53:", "grid.columns: 0 is out of range",
                  "t.yaml:2:62:", "grid.rows: -2 is out of range", NULL);
    expect_reject("units: {length: m, time: day}\n"
                  "grid: {origin: [0, 0], cell_size: 10, columns: 10, rows: 10}\n"
                  "aquifer: {conductivity: {value: 1, zones: [{name: clay, polygon: [[0, 0], [50, 0], [50, 50]],\n"
                  "          value: 0}]}, thickness: 1}\n",
                  "t.yaml:4:18:", "zone 'clay': value must be greater than zero", NULL);
}

static void test_porosity_anisotropy(void **state)
{
    const char *head = "units: {length: m, time: day}\n"
                       "grid: {origin: [0, 0], cell_size: 10, columns: 10, rows: 10}\n";
    char y[1024];
    snprintf(y, sizeof y, "%saquifer: {conductivity: 1, thickness: 1, porosity: 0}\n", head);
    expect_reject(y, "t.yaml:3:52:", "aquifer.porosity must be in (0, 1]", NULL);
    snprintf(y, sizeof y, "%saquifer: {conductivity: 1, thickness: 1, porosity: 1.5}\n", head);
    expect_reject(y, "t.yaml:3:52:", "aquifer.porosity must be in (0, 1], got 1.5", NULL);
    snprintf(y, sizeof y, "%saquifer: {conductivity: 1, thickness: 1, anisotropy: -0.1}\n", head);
    expect_reject(y, "t.yaml:3:54:", "aquifer.anisotropy must be greater than zero", NULL);
}

static void test_per_vertex_count(void **state)
{
    expect_reject(BASE "streams:\n"
                       "  - name: S\n"
                       "    line: [[50, 0], [50, 100]]\n"
                       "    stage: [3, 2, 1]\n"
                       "    bed_bottom: 0\n"
                       "    bed_conductance: 1\n",
                  "t.yaml:10:12:", "stream 'S': stage has 3 values but the line has 2 vertices", NULL);
    expect_reject(BASE "drains: [{name: D, line: [[50, 0], [50, 50], [60, 90]], elevation: [1, 2], conductance: 1}]\n",
                  "t.yaml:7:68:", "drain 'D': elevation has 2 values", NULL);
    expect_reject(BASE "fixed_heads:\n", "t.yaml:7:1:", "duplicate key 'fixed_heads'", NULL);
}

static void test_outside_grid(void **state)
{
    expect_reject(BASE "wells: [{name: Far, at: [150, 50], pumping: 1}]\n",
                  "t.yaml:7:25:", "well 'Far': point (150, 50) lies outside the grid", NULL);
    expect_reject(BASE "observations:\n  - {name: OW-9, at: [50, -1]}\n",
                  "t.yaml:8:22:", "observation 'OW-9'", "outside the grid", NULL);
    expect_reject(BASE "streams: [{name: Away, line: [[200, 0], [200, 100]], stage: 1, bed_bottom: 0, "
                       "bed_conductance: 1}]\n",
                  "t.yaml:7:30:", "stream 'Away': the line lies entirely outside the grid", NULL);
    expect_reject(BASE "leakage: [{name: Off, polygon: [[200, 0], [300, 0], [300, 100]], head: 1, resistance: 10}]\n",
                  "t.yaml:7:32:", "leakage 'Off': the polygon contains no cell centre", NULL);
}

static void test_duplicate_names(void **state)
{
    expect_reject(BASE "wells:\n  - {name: Left, at: [50, 50], pumping: 1}\n",
                  "t.yaml:8:5:", "duplicate feature name 'Left' (first used at line 6)", NULL);
    expect_reject(BASE "observations: [{name: A, at: [1, 1]}, {name: A, at: [2, 2]}]\n",
                  "t.yaml:7:39:", "duplicate observation name 'A'", NULL);
}

static void test_missing_keys(void **state)
{
    expect_reject("units: {length: m, time: day}\n"
                  "grid: {origin: [0, 0], cell_size: 10, rows: 10}\n"
                  "aquifer: {type: unconfined, conductivity: 1}\n",
                  "t.yaml:2:7:", "grid: missing required key 'columns'",
                  "t.yaml:3:10:", "missing required key 'bottom'", NULL);
    expect_reject(BASE "streams: [{name: S, line: [[50, 0], [50, 100]], bed_bottom: 0, bed_conductance: 1}]\n",
                  "t.yaml:7:11:", "stream 'S': missing required key 'stage'", NULL);
    expect_reject("grid: {origin: [0, 0], cell_size: 10, columns: 10, rows: 10}\n"
                  "aquifer: {conductivity: 1, thickness: 1}\n",
                  "t.yaml:1:1:", "missing required key 'units'", NULL);
    expect_reject(BASE "wells: [{at: [5, 5], pumping: 1}]\n", "t.yaml:7:9:", "wells item 1",
                  "missing required key 'name'", NULL);
}

static void test_syntax_errors(void **state)
{
    expect_reject("units: {length: m, time: day\ngrid: 3\n", "t.yaml:", "YAML syntax error", NULL);
    expect_reject("aquifer:\n  conductivity: 1\n thickness: 2\n", "t.yaml:3:", "YAML syntax error", NULL);
    expect_reject(BASE "a: *nowhere\n", "t.yaml:7:4:", "names no anchor", NULL);
}

static void test_several_problems_listed(void **state)
{
    expect_reject(BASE "wells:\n"
                       "  - {name: W1, at: [500, 50], pumping: 1}\n"
                       "  - {name: W2, at: [50, 50], pumping: abc}\n"
                       "output: {maps: 1}\n",
                  "t.yaml:9:39:", "well 'W2': pumping",
                  "t.yaml:10:16:", "output.maps", NULL);
    /* One problem per line, in file order. */
    const char *a = strstr(err.msg, "t.yaml:9:39:"), *b = strstr(err.msg, "t.yaml:10:16:");
    assert_true(a && b && a < b);
    assert_non_null(strchr(err.msg, '\n'));
}

/* Nothing malformed may crash; each gets a message naming the file. */
static void test_nasty_inputs(void **state)
{
    expect_reject("", "t.yaml:1:1:", "empty", NULL);
    expect_reject("# only a comment\n", "t.yaml:1:1:", "empty", NULL);
    expect_reject("42\n", "t.yaml:1:1:", "must be a mapping", NULL);
    expect_reject("- a\n- b\n", "t.yaml:1:1:", "must be a mapping", NULL);
    expect_reject("units: 1\ngrid: [[[]]]\naquifer: {conductivity: [{}]}\nstreams: [[], {}, -1]\n"
                  "recharge: {rate: {raster: {}}}\nanalysis: {capture: 5, transects: [{line: 1}]}\n",
                  "t.yaml:1:8:", "units: expected a mapping", "t.yaml:2:7:", "grid: expected a mapping",
                  "t.yaml:4:11:", "streams item 1", NULL);
    expect_reject("units: {length: m, time: day}\n"
                  "grid: {origin: [1e999, 0], cell_size: .inf, columns: 1e300, rows: 99999999999999999999}\n"
                  "aquifer: {conductivity: .nan, thickness: -.inf, porosity: NaN}\n",
                  "t.yaml:2:17:", "not a number a double can hold", "t.yaml:2:39:", "finite number",
                  "t.yaml:2:54:", "grid.columns", "t.yaml:2:67:", "grid.rows",
                  "t.yaml:3:25:", "finite number", "t.yaml:3:42:", "t.yaml:3:59:", "got 'NaN'", NULL);
    expect_reject("units: {length: m, time: day}\n"
                  "grid: {origin: [0, 0], cell_size: 1, columns: 100000, rows: 100000}\n"
                  "aquifer: {conductivity: 1, thickness: 1}\n",
                  "t.yaml:2:47:", "more than", NULL);
    char deep[2100];
    memset(deep, '[', 1000);
    memset(deep + 1000, ']', 1000);
    deep[2000] = '\0';
    expect_reject(deep, "t.yaml:1:", NULL);
    expect_reject("a: &x [1, 2]\nb: *x\n", "t.yaml:2:4:", "aliases", NULL);
    expect_reject("---\na: 1\n---\nb: 2\n", "t.yaml:3:1:", "only one YAML document", NULL);
    expect_reject("\t\x01\xff\xfe: [\n", "t.yaml:", NULL);
    expect_reject("? [a, b]\n: 1\n", "t.yaml:1:3:", "plain word", NULL);
}

/* The same from a file on disk: messages carry its path. */
static void test_file_on_disk(void **state)
{
    char path[1024];
    const char *d = getenv("GW_TEST_DATA");
    snprintf(path, sizeof path, "%s/models/bad_several.yaml", d ? d : "tests/data");
    memset(&err, 0, sizeof err);
    assert_null(gw_model_load(path, &err));
    char want[1100];
    snprintf(want, sizeof want, "%s:5:17: aquifer.conductivity must be greater than zero", path);
    assert_non_null(strstr(err.msg, want));
    snprintf(want, sizeof want, "%s:7:3: aquifer: unknown key 'colour'", path);
    assert_non_null(strstr(err.msg, want));
    snprintf(want, sizeof want, "%s:9:50: stream 'S': stage: expected a number", path);
    assert_non_null(strstr(err.msg, want));
    assert_null(gw_model_load("/nonexistent/model.yaml", &err));
    assert_non_null(strstr(err.msg, "/nonexistent/model.yaml: cannot open"));
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_base_is_valid),
        cmocka_unit_test(test_unknown_keys),
        cmocka_unit_test(test_wrong_types),
        cmocka_unit_test(test_non_positive),
        cmocka_unit_test(test_porosity_anisotropy),
        cmocka_unit_test(test_per_vertex_count),
        cmocka_unit_test(test_outside_grid),
        cmocka_unit_test(test_duplicate_names),
        cmocka_unit_test(test_missing_keys),
        cmocka_unit_test(test_syntax_errors),
        cmocka_unit_test(test_several_problems_listed),
        cmocka_unit_test(test_nasty_inputs),
        cmocka_unit_test(test_file_on_disk),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
