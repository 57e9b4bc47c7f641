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
    char *first_made;   /* shallowest folder this run created (dir or a parent) */
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

/* mkdir -p; *created is set when the last component was made here, and
 * *first names the shallowest folder made here (so abort can remove the
 * parents it created too). */
static int make_dirs(const char *dir, int *created, char **first, gw_error *err)
{
    struct stat st;
    *created = 0;
    *first = NULL;
    if (stat(dir, &st) == 0) {
        if (!S_ISDIR(st.st_mode)) return gw_fail(err, "%s: exists and is not a directory", dir);
        return 0;
    }
    char *tmp = strdup(dir);
    if (!tmp) return gw_fail(err, "out of memory");
    for (char *p = tmp + 1; *p; p++) {
        if (*p != '/') continue;
        *p = 0;
        if (mkdir(tmp, 0777) == 0) {
            if (!*first) *first = strdup(tmp);
        } else if (errno != EEXIST) {
            int e = errno;
            gw_fail(err, "cannot create directory %s: %s", tmp, strerror(e));
            free(tmp);
            return -1;
        }
        *p = '/';
    }
    free(tmp);
    if (mkdir(dir, 0777) != 0) {
        if (errno == EEXIST && stat(dir, &st) == 0 && S_ISDIR(st.st_mode)) return 0;
        return gw_fail(err, "cannot create directory %s: %s", dir, strerror(errno));
    }
    *created = 1;
    if (!*first) *first = strdup(dir);
    return 0;
}

/* Remove the folders make_dirs created, deepest first (only when empty). */
static void remove_made_dirs(gw_outdir *o)
{
    if (!o->first_made) return;
    char *p = strdup(o->dir);
    size_t n = strlen(o->first_made);
    while (p && strlen(p) >= n) {
        if (rmdir(p) != 0) break;
        if (!strcmp(p, o->first_made)) break;
        char *slash = strrchr(p, '/');
        if (!slash || slash == p) break;
        *slash = 0;
    }
    free(p);
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
    if (make_dirs(o->dir, &o->created_dir, &o->first_made, err) != 0) {
        remove_made_dirs(o);
        free(o->first_made);
        free(o->dir);
        free(o);
        return NULL;
    }
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

void gw_outdir_unstage(const gw_outdir *o, gw_error *err)
{
    if (!o || !o->stage || !err) return;
    size_t ls = strlen(o->stage), ld = strlen(o->dir);
    char out[sizeof err->msg];
    size_t w = 0;
    for (const char *m = err->msg; *m && w + 1 < sizeof out;) {
        if (!strncmp(m, o->stage, ls) && w + ld + 1 < sizeof out) {
            memcpy(out + w, o->dir, ld);
            w += ld;
            m += ls;
        } else {
            out[w++] = *m++;
        }
    }
    out[w] = 0;
    memcpy(err->msg, out, w + 1);
}

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

#define GW_PREVIOUS ".gwdivide-previous-"

static int cmp_names(const void *a, const void *b)
{
    return strcmp(*(char *const *)a, *(char *const *)b);
}

/* Put back what the first `moved` renames of commit replaced. */
static void roll_back(gw_outdir *o, char **names, int moved)
{
    for (int i = moved - 1; i >= 0; i--) {
        char *to = join(o->dir, names[i]), *prev = NULL;
        size_t n = strlen(GW_PREVIOUS) + strlen(names[i]) + 1;
        char *pname = malloc(n);
        if (pname) { snprintf(pname, n, "%s%s", GW_PREVIOUS, names[i]); prev = join(o->stage, pname); }
        if (to) {
            struct stat st;
            if (prev && lstat(prev, &st) == 0) rename(prev, to);
            else remove(to);
        }
        free(to);
        free(prev);
        free(pname);
    }
}

/* All or nothing: every target is checked before anything moves; an older
 * file of the same name is first set aside in the staging folder, so a
 * rename that fails half-way is undone and the folder is left as it was. */
int gw_outdir_commit(gw_outdir *o, gw_error *err)
{
    if (o->done) return gw_fail(err, "output directory already closed");
    DIR *d = opendir(o->stage);
    if (!d) {
        int e = errno;
        gw_outdir_abort(o);
        return gw_fail(err, "cannot read %s: %s", o->stage, strerror(e));
    }
    char **names = NULL;
    int n = 0, cap = 0, rc = 0, moved = 0;
    struct dirent *e;
    while (rc == 0 && (e = readdir(d)) != NULL) {
        if (!strcmp(e->d_name, ".") || !strcmp(e->d_name, "..")) continue;
        if (n == cap) {
            cap = cap ? 2 * cap : 16;
            char **nn = realloc(names, (size_t)cap * sizeof *nn);
            if (!nn) { rc = gw_fail(err, "out of memory"); break; }
            names = nn;
        }
        if (!(names[n] = strdup(e->d_name))) rc = gw_fail(err, "out of memory");
        else n++;
    }
    closedir(d);
    if (n > 1) qsort(names, (size_t)n, sizeof *names, cmp_names);
    for (int i = 0; i < n && rc == 0; i++) {   /* nothing in the way? */
        char *to = join(o->dir, names[i]);
        struct stat st;
        if (!to) rc = gw_fail(err, "out of memory");
        else if (lstat(to, &st) == 0 && !S_ISREG(st.st_mode))
            rc = gw_fail(err, "cannot write %s: something other than a file is in the way", to);
        free(to);
    }
    for (int i = 0; i < n && rc == 0; i++) {
        size_t pn = strlen(GW_PREVIOUS) + strlen(names[i]) + 1;
        char *pname = malloc(pn);
        if (pname) snprintf(pname, pn, "%s%s", GW_PREVIOUS, names[i]);
        char *from = join(o->stage, names[i]), *to = join(o->dir, names[i]);
        char *prev = pname ? join(o->stage, pname) : NULL;
        struct stat st;
        if (!from || !to || !prev) rc = gw_fail(err, "out of memory");
        /* A hard link keeps the older file in place while the new one
         * replaces it atomically; rename is the fallback where links fail. */
        else if (lstat(to, &st) == 0 && link(to, prev) != 0 && rename(to, prev) != 0)
            rc = gw_fail(err, "cannot replace %s: %s", to, strerror(errno));
        else if (rename(from, to) != 0) {
            rc = gw_fail(err, "cannot move %s into place: %s", to, strerror(errno));
            if (lstat(to, &st) != 0 && lstat(prev, &st) == 0) rename(prev, to);
        } else
            moved++;
        free(from);
        free(to);
        free(prev);
        free(pname);
    }
    if (rc) roll_back(o, names, moved);
    for (int i = 0; i < n; i++) free(names[i]);
    free(names);
    clear_stage(o);
    if (rc && o->created_dir) remove_made_dirs(o);
    o->done = 1;
    return rc;
}

void gw_outdir_abort(gw_outdir *o)
{
    if (!o) return;
    clear_stage(o);
    remove_made_dirs(o);   /* only succeeds when empty */
    o->done = 1;
}

void gw_outdir_free(gw_outdir *o)
{
    if (!o) return;
    if (!o->done) gw_outdir_abort(o);
    for (int i = 0; i < o->npaths; i++) free(o->paths[i]);
    free(o->paths);
    free(o->stage);
    free(o->first_made);
    free(o->dir);
    free(o);
}
