/* A private temporary folder for a group of tests (a header, not a test
 * program): made in setup, removed with its contents in teardown. */
#ifndef GW_FIXTURE_TMPDIR_H
#define GW_FIXTURE_TMPDIR_H

#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>

/* "<$TMPDIR or /tmp>/<stem>-XXXXXX" made with mkdtemp into dir; 0 or -1. */
static inline int fixture_tmpdir_make(char *dir, size_t n, const char *stem)
{
    const char *tmp = getenv("TMPDIR");
    snprintf(dir, n, "%s/%s-XXXXXX", tmp && *tmp ? tmp : "/tmp", stem);
    return mkdtemp(dir) ? 0 : -1;
}

/* Remove dir and everything in it; 0 or -1. */
static inline int fixture_tmpdir_remove(const char *dir)
{
    char cmd[300];
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", dir);
    return system(cmd) == 0 ? 0 : -1;
}

#endif
