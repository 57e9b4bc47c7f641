/* io/outdir: outputs appear only on commit, and a failed run leaves nothing
 * behind (DESIGN.md, Reliability: "nothing half-written"). */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <cmocka.h>

#include <dirent.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "io/outdir.h"

static char root[256];

static int setup(void **state)
{
    (void)state;
    const char *tmp = getenv("TMPDIR");
    snprintf(root, sizeof root, "%s/gw-outdir-XXXXXX", tmp && *tmp ? tmp : "/tmp");
    return mkdtemp(root) ? 0 : -1;
}

static int rm_rf(const char *path)
{
    char cmd[600];
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", path);
    return system(cmd);
}

static int teardown(void **state)
{
    (void)state;
    return rm_rf(root) == 0 ? 0 : -1;
}

static int exists(const char *path)
{
    struct stat st;
    return stat(path, &st) == 0;
}

static int entries(const char *dir)
{
    DIR *d = opendir(dir);
    if (!d) return -1;
    int n = 0;
    struct dirent *e;
    while ((e = readdir(d)) != NULL)
        if (strcmp(e->d_name, ".") && strcmp(e->d_name, "..")) n++;
    closedir(d);
    return n;
}

static void write_text(const char *path, const char *text)
{
    FILE *f = fopen(path, "w");
    assert_non_null(f);
    fputs(text, f);
    assert_int_equal(fclose(f), 0);
}

static void test_commit_moves_everything(void **state)
{
    (void)state;
    char dir[400], final_a[500], final_b[500];
    snprintf(dir, sizeof dir, "%s/new/results", root);   /* parents created too */
    snprintf(final_a, sizeof final_a, "%s/a.txt", dir);
    snprintf(final_b, sizeof final_b, "%s/b.shp", dir);
    gw_error err = {{0}};
    gw_outdir *o = gw_outdir_open(dir, &err);
    assert_non_null(o);
    const char *a = gw_outdir_path(o, "a.txt", &err);
    const char *b = gw_outdir_path(o, "b.shp", &err);
    assert_non_null(a);
    assert_non_null(b);
    write_text(a, "one");
    write_text(b, "two");
    /* a side file written by a multi-file format lands beside its main file */
    char side[500];
    snprintf(side, sizeof side, "%.*s.dbf", (int)(strlen(b) - 4), b);
    write_text(side, "three");
    assert_false(exists(final_a));   /* nothing visible before the commit */
    assert_int_equal(gw_outdir_commit(o, &err), 0);
    gw_outdir_free(o);
    assert_true(exists(final_a));
    assert_true(exists(final_b));
    assert_int_equal(entries(dir), 3);   /* a.txt, b.shp, b.dbf; no staging folder */
}

static void test_abort_removes_created_dir(void **state)
{
    (void)state;
    char dir[400];
    snprintf(dir, sizeof dir, "%s/failed", root);
    gw_error err = {{0}};
    gw_outdir *o = gw_outdir_open(dir, &err);
    assert_non_null(o);
    write_text(gw_outdir_path(o, "report.json", &err), "{}");
    gw_outdir_free(o);   /* never committed: same as abort */
    assert_false(exists(dir));
}

static void test_abort_keeps_existing_files(void **state)
{
    (void)state;
    char dir[400], old[500];
    snprintf(dir, sizeof dir, "%s/existing", root);
    assert_int_equal(mkdir(dir, 0777), 0);
    snprintf(old, sizeof old, "%s/notes.txt", dir);
    write_text(old, "keep me");
    gw_error err = {{0}};
    gw_outdir *o = gw_outdir_open(dir, &err);
    assert_non_null(o);
    write_text(gw_outdir_path(o, "heads.tif", &err), "partial");
    gw_outdir_abort(o);
    gw_outdir_free(o);
    assert_true(exists(old));
    assert_int_equal(entries(dir), 1);
}

static void test_bad_names_and_paths(void **state)
{
    (void)state;
    char file[400];
    snprintf(file, sizeof file, "%s/plain-file", root);
    write_text(file, "x");
    gw_error err = {{0}};
    assert_null(gw_outdir_open(file, &err));   /* a file is not a directory */
    assert_non_null(strstr(err.msg, "not a directory"));
    char dir[400];
    snprintf(dir, sizeof dir, "%s/names", root);
    gw_outdir *o = gw_outdir_open(dir, &err);
    assert_non_null(o);
    assert_null(gw_outdir_path(o, "../escape", &err));
    assert_null(gw_outdir_path(o, "", &err));
    assert_null(gw_outdir_path(o, NULL, &err));
    gw_outdir_free(o);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_commit_moves_everything),
        cmocka_unit_test(test_abort_removes_created_dir),
        cmocka_unit_test(test_abort_keeps_existing_files),
        cmocka_unit_test(test_bad_names_and_paths),
    };
    return cmocka_run_group_tests(tests, setup, teardown);
}
