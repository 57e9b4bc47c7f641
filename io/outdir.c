#include "outdir.h"

#include <dirent.h>
#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

struct gw_outdir {
    char *dir;          /* output directory */
    char *stage;        /* staging folder inside it */
    int created_dir;    /* this run created `dir` */
    int done;           /* committed or aborted */
    char **paths; int npaths;   /* strings handed out, freed at the end */
};

static char *join(const char *a, const char *b)
{
    size_t n = strlen(a) + strlen(b) + 2;
    char *s = malloc(n);
    if (s) snprintf(s, n, "%s/%s", a, b);
    return s;
}

/* mkdir -p; *created is set when the last component was made here. */
static int make_dirs(const char *dir, int *created, gw_error *err)
{
    struct stat st;
    *created = 0;
    if (stat(dir, &st) == 0) {
        if (!S_ISDIR(st.st_mode)) return gw_fail(err, "%s: exists and is not a directory", dir);
        return 0;
    }
    char *tmp = strdup(dir);
    if (!tmp) return gw_fail(err, "out of memory");
    for (char *p = tmp + 1; *p; p++) {
        if (*p != '/') continue;
        *p = 0;
        if (mkdir(tmp, 0777) != 0 && errno != EEXIST) {
            int e = errno;
            gw_fail(err, "cannot create directory %s: %s", tmp, strerror(e));
            free(tmp);
            return -1;
        }
        *p = '/';
    }
    free(tmp);
    if (mkdir(dir, 0777) != 0) {
        if (errno == EEXIST) return 0;
        return gw_fail(err, "cannot create directory %s: %s", dir, strerror(errno));
    }
    *created = 1;
    return 0;
}

gw_outdir *gw_outdir_open(const char *dir, gw_error *err)
{
    if (!dir || !*dir) { gw_fail(err, "empty output directory name"); return NULL; }
    gw_outdir *o = calloc(1, sizeof *o);
    if (!o) { gw_fail(err, "out of memory"); return NULL; }
    o->dir = strdup(dir);
    if (!o->dir) { gw_fail(err, "out of memory"); free(o); return NULL; }
    size_t n = strlen(o->dir);
    while (n > 1 && o->dir[n - 1] == '/') o->dir[--n] = 0;
    if (make_dirs(o->dir, &o->created_dir, err) != 0) { free(o->dir); free(o); return NULL; }
    char name[64];
    snprintf(name, sizeof name, ".gwdivide-staging-%ld", (long)getpid());
    o->stage = join(o->dir, name);
    if (!o->stage) { gw_fail(err, "out of memory"); o->done = 1; gw_outdir_abort(o); gw_outdir_free(o); return NULL; }
    if (mkdir(o->stage, 0777) != 0) {
        gw_fail(err, "cannot write in %s: %s", o->dir, strerror(errno));
        free(o->stage); o->stage = NULL;
        gw_outdir_abort(o);
        gw_outdir_free(o);
        return NULL;
    }
    return o;
}

const char *gw_outdir_dir(const gw_outdir *o) { return o->dir; }

static const char *remember(gw_outdir *o, char *s, gw_error *err)
{
    if (!s) { gw_fail(err, "out of memory"); return NULL; }
    char **np = realloc(o->paths, (size_t)(o->npaths + 1) * sizeof *np);
    if (!np) { free(s); gw_fail(err, "out of memory"); return NULL; }
    o->paths = np;
    o->paths[o->npaths++] = s;
    return s;
}

static int good_name(const char *name)
{
    return name && *name && !strchr(name, '/') && strcmp(name, ".") != 0 && strcmp(name, "..") != 0;
}

const char *gw_outdir_path(gw_outdir *o, const char *name, gw_error *err)
{
    if (!good_name(name)) { gw_fail(err, "bad output file name \"%s\"", name ? name : ""); return NULL; }
    if (o->done || !o->stage) { gw_fail(err, "output directory already closed"); return NULL; }
    return remember(o, join(o->stage, name), err);
}

const char *gw_outdir_final_path(gw_outdir *o, const char *name, gw_error *err)
{
    if (!good_name(name)) { gw_fail(err, "bad output file name \"%s\"", name ? name : ""); return NULL; }
    return remember(o, join(o->dir, name), err);
}

/* Remove every entry of the staging folder, then the folder. */
static void clear_stage(gw_outdir *o)
{
    if (!o->stage) return;
    DIR *d = opendir(o->stage);
    if (d) {
        struct dirent *e;
        while ((e = readdir(d)) != NULL) {
            if (!strcmp(e->d_name, ".") || !strcmp(e->d_name, "..")) continue;
            char *p = join(o->stage, e->d_name);
            if (p) { remove(p); free(p); }
        }
        closedir(d);
    }
    rmdir(o->stage);
}

int gw_outdir_commit(gw_outdir *o, gw_error *err)
{
    if (o->done) return gw_fail(err, "output directory already closed");
    DIR *d = opendir(o->stage);
    if (!d) {
        int e = errno;
        gw_outdir_abort(o);
        return gw_fail(err, "cannot read %s: %s", o->stage, strerror(e));
    }
    struct dirent *e;
    int rc = 0;
    while ((e = readdir(d)) != NULL) {
        if (!strcmp(e->d_name, ".") || !strcmp(e->d_name, "..")) continue;
        char *from = join(o->stage, e->d_name), *to = join(o->dir, e->d_name);
        if (!from || !to) rc = gw_fail(err, "out of memory");
        else if (rename(from, to) != 0)
            rc = gw_fail(err, "cannot move %s into place: %s", to, strerror(errno));
        free(from);
        free(to);
        if (rc) break;
    }
    closedir(d);
    clear_stage(o);
    o->done = 1;
    return rc;
}

void gw_outdir_abort(gw_outdir *o)
{
    if (!o) return;
    clear_stage(o);
    if (o->created_dir) rmdir(o->dir);   /* only succeeds when empty */
    o->done = 1;
}

void gw_outdir_free(gw_outdir *o)
{
    if (!o) return;
    if (!o->done) gw_outdir_abort(o);
    for (int i = 0; i < o->npaths; i++) free(o->paths[i]);
    free(o->paths);
    free(o->stage);
    free(o->dir);
    free(o);
}
