#include "model_gis.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "gis_vector.h"

#define AT(s) (s).file ? (s).file : "(model)", (s).line, (s).col

int gw_model_read_path(gw_path *p, gw_geom_kind kind, const char *crs, const char *what, gw_error *err)
{
    char w[600];
    snprintf(w, sizeof w, "%s:%d:%d: %s", AT(p->src), what);
    gw_vquery q = {p->layer_file, p->layer_name, p->layer_where, (gw_vgeom)kind, crs, p->assume_crs,
                   NULL, NULL, 0, w};
    gw_vfeature *f = NULL;
    int n = 0;
    if (gw_vector_read(&q, &f, &n, err) < 0) return -1;
    if (n != 1) {
        gw_vfeatures_free(f, n);
        return gw_fail(err, "%s: layer '%s'%s%s%s of %s holds %d features; exactly one is expected here "
                            "(narrow it with where:, or use name: {field: ...} for one feature per row)",
                       w, p->layer_name ? p->layer_name : "", p->layer_where ? " filtered by \"" : "",
                       p->layer_where ? p->layer_where : "", p->layer_where ? "\"" : "", p->layer_file, n);
    }
    free(p->xy);
    p->xy = f[0].xy;
    p->n = f[0].n;
    f[0].xy = NULL;
    gw_vfeatures_free(f, n);
    return 0;
}

/* A uniform view of one feature spec of any section. */
typedef struct {
    char **name;
    gw_path *geom;
    gw_geom_kind kind;
    gw_values *vals[3];
    const char *vkey[3];
    int nvals;
    double *scalar;          /* wells: pumping; observations: head */
    char **scalar_field;
    const char *skey;
    double *x, *y;           /* point features: copied from the geometry */
    gw_src src;
} view;

typedef enum { S_FIXED = 0, S_STREAM, S_DRAIN, S_WELL, S_OBS } section;

static const char *const WORD[] = {"fixed head", "stream", "drain", "well", "observation"};
static const size_t SIZE[] = {sizeof(gw_fixed_spec), sizeof(gw_stream_spec), sizeof(gw_drain_spec),
                              sizeof(gw_well_spec), sizeof(gw_obs_spec)};

static void view_of(section s, void *item, view *v)
{
    memset(v, 0, sizeof *v);
    switch (s) {
    case S_FIXED: {
        gw_fixed_spec *f = item;
        *v = (view){&f->name, &f->geom, f->is_polygon ? GW_GEOM_POLYGON : GW_GEOM_LINE, {&f->head}, {"head"}, 1,
                    NULL, NULL, NULL, NULL, NULL, f->src};
        break;
    }
    case S_STREAM: {
        gw_stream_spec *f = item;
        *v = (view){&f->name, &f->line, GW_GEOM_LINE, {&f->stage, &f->bed_bottom, &f->bed_conductance},
                    {"stage", "bed_bottom", "bed_conductance"}, 3, NULL, NULL, NULL, NULL, NULL, f->src};
        break;
    }
    case S_DRAIN: {
        gw_drain_spec *f = item;
        *v = (view){&f->name, &f->line, GW_GEOM_LINE, {&f->elevation, &f->conductance}, {"elevation", "conductance"},
                    2, NULL, NULL, NULL, NULL, NULL, f->src};
        break;
    }
    case S_WELL: {
        gw_well_spec *f = item;
        *v = (view){&f->name, &f->at, GW_GEOM_POINT, {NULL}, {NULL}, 0, &f->pumping, &f->pumping_field, "pumping",
                    &f->x, &f->y, f->src};
        break;
    }
    case S_OBS: {
        gw_obs_spec *f = item;
        *v = (view){&f->name, &f->at, GW_GEOM_POINT, {NULL}, {NULL}, 0, &f->head, &f->head_field, "head",
                    &f->x, &f->y, f->src};
        break;
    }
    }
}

static int has_fields(const view *v)
{
    for (int i = 0; i < v->nvals; i++)
        if (v->vals[i]->field) return 1;
    return v->scalar_field && *v->scalar_field;
}

/* Release what a template spec owns (it is replaced by its expansion). */
static void view_release(view *v)
{
    free(*v->name);
    *v->name = NULL;
    free(v->geom->xy);
    free(v->geom->layer_file);
    free(v->geom->layer_name);
    free(v->geom->layer_where);
    free(v->geom->name_field);
    memset(v->geom, 0, sizeof *v->geom);
    for (int i = 0; i < v->nvals; i++) {
        free(v->vals[i]->v);
        free(v->vals[i]->field);
        v->vals[i]->v = NULL;
        v->vals[i]->field = NULL;
    }
    if (v->scalar_field) {
        free(*v->scalar_field);
        *v->scalar_field = NULL;
    }
}

/* Forget everything a shallow copy borrowed from its template. */
static void blank(view *d)
{
    *d->name = NULL;
    gw_src gsrc = d->geom->src;
    memset(d->geom, 0, sizeof *d->geom);
    d->geom->src = gsrc;
    for (int i = 0; i < d->nvals; i++) {
        d->vals[i]->v = NULL;
        d->vals[i]->field = NULL;
        d->vals[i]->n = 0;
    }
    if (d->scalar_field) *d->scalar_field = NULL;
}

/* Fill the copy `d` (a shallow copy of template `t`) from feature f:
 * its own name, geometry and values.  `fields` order: vals with a field,
 * then the scalar. */
static int fill_copy(const view *t, view *d, gw_vfeature *f, int take_name, const char *what, gw_error *err)
{
    blank(d);   /* first, so an error leaves d safe to free */

    const char *nm = take_name ? f->name : *t->name;
    if (!(*d->name = strdup(nm ? nm : ""))) return gw_fail(err, "out of memory");
    d->geom->xy = f->xy;
    d->geom->n = f->n;
    f->xy = NULL;
    int j = 0;
    for (int i = 0; i < d->nvals; i++) {
        gw_values *tv = t->vals[i], *dv = d->vals[i];
        if (tv->field) {
            double x = f->values[j++];
            if (isnan(x))
                return gw_fail(err, "%s:%d:%d: %s '%s': field '%s' (for %s) is empty in feature %ld of layer '%s'",
                               AT(tv->src), what, *d->name, tv->field, t->vkey[i], f->fid,
                               t->geom->layer_name ? t->geom->layer_name : t->geom->layer_file);
            if (!(dv->v = malloc(sizeof *dv->v))) return gw_fail(err, "out of memory");
            dv->v[0] = x;
            dv->n = 1;
        } else if (tv->n > 0) {
            if (!(dv->v = malloc((size_t)tv->n * sizeof *dv->v))) return gw_fail(err, "out of memory");
            memcpy(dv->v, tv->v, (size_t)tv->n * sizeof *dv->v);
            dv->n = tv->n;
        }
    }
    if (t->scalar_field && *t->scalar_field) {
        double x = f->values[j++];
        if (isnan(x) && strcmp(t->skey, "head") != 0)   /* an observation may lack a measured head */
            return gw_fail(err, "%s:%d:%d: %s '%s': field '%s' (for %s) is empty in feature %ld", AT(t->src), what,
                           *d->name, *t->scalar_field, t->skey, f->fid);
        *d->scalar = x;
    }
    if (d->x && d->geom->n >= 1) {
        *d->x = d->geom->xy[0];
        *d->y = d->geom->xy[1];
    }
    return 0;
}

/* Expand / read one section.  *arr holds *n items of SIZE[s] bytes. */
static int do_section(gw_model *m, section s, void **arr, int *n, int *changed, gw_error *err)
{
    char *items = *arr;
    size_t sz = SIZE[s];
    for (int i = 0; i < *n; i++) {
        view t;
        view_of(s, items + (size_t)i * sz, &t);
        if (!t.geom->layer_file) {
            if (has_fields(&t) || t.geom->name_field) {
                const char *fld = t.geom->name_field;
                for (int k = 0; !fld && k < t.nvals; k++) fld = t.vals[k]->field;
                if (!fld && t.scalar_field) fld = *t.scalar_field;
                return gw_fail(err, "%s:%d:%d: %s '%s': {field: %s} reads an attribute of the feature's layer, but "
                                    "its geometry is given as coordinates; give it as {file: ..., layer: ...}",
                               AT(t.src), WORD[s], *t.name ? *t.name : "?", fld ? fld : "?");
            }
            continue;
        }
        int per_row = t.geom->name_field != NULL;
        if (!per_row && !has_fields(&t)) continue;   /* plain geometry: gw_path_read_layer */

        const char *fields[4];
        int nf = 0;
        for (int k = 0; k < t.nvals; k++)
            if (t.vals[k]->field) fields[nf++] = t.vals[k]->field;
        if (t.scalar_field && *t.scalar_field) fields[nf++] = *t.scalar_field;
        char what[600];
        snprintf(what, sizeof what, "%s:%d:%d: %s '%s'", AT(t.geom->src), WORD[s],
                 per_row ? t.geom->name_field : (*t.name ? *t.name : "?"));
        gw_vquery q = {t.geom->layer_file, t.geom->layer_name, t.geom->layer_where, (gw_vgeom)t.kind, m->crs,
                       t.geom->assume_crs, t.geom->name_field, fields, nf, what};
        gw_vfeature *f = NULL;
        int nfeat = 0;
        if (gw_vector_read(&q, &f, &nfeat, err) < 0) return -1;
        if (!per_row && nfeat != 1) {
            gw_vfeatures_free(f, nfeat);
            return gw_fail(err, "%s: the layer selection holds %d features; exactly one is expected (narrow it "
                                "with where:, or name the features with name: {field: ...})",
                           what, nfeat);
        }
        /* Make room: item i becomes nfeat items. */
        if (nfeat > 1) {
            char *grown = realloc(items, ((size_t)*n + nfeat - 1) * sz);
            if (!grown) {
                gw_vfeatures_free(f, nfeat);
                return gw_fail(err, "out of memory");
            }
            items = grown;
            *arr = items;
            memmove(items + (size_t)(i + nfeat) * sz, items + (size_t)(i + 1) * sz, (size_t)(*n - i - 1) * sz);
            *n += nfeat - 1;
        }
        /* The template moves to a local copy; slots i .. i+nfeat-1 get the features. */
        char *tmpl = malloc(sz);
        if (!tmpl) {
            gw_vfeatures_free(f, nfeat);
            return gw_fail(err, "out of memory");
        }
        memcpy(tmpl, items + (size_t)i * sz, sz);
        view tv;
        view_of(s, tmpl, &tv);
        int rc = 0, filled = 0;
        for (int k = 0; k < nfeat; k++) {
            char *slot = items + (size_t)(i + k) * sz;
            memcpy(slot, tmpl, sz);
            view dv;
            view_of(s, slot, &dv);
            rc = fill_copy(&tv, &dv, &f[k], per_row, WORD[s], err);
            filled = k + 1;
            if (rc != 0) break;
        }
        for (int k = filled; k < nfeat; k++) {   /* after an error: slots must not alias the template */
            view dv;
            view_of(s, items + (size_t)(i + k) * sz, &dv);
            blank(&dv);
        }
        view_release(&tv);
        free(tmpl);
        gw_vfeatures_free(f, nfeat);
        if (rc != 0) return -1;
        *changed = 1;
        i += nfeat - 1;
    }
    return 0;
}

static int check_unique(const char *const *names, const gw_src *src, int n, const char *kind, gw_error *err)
{
    for (int i = 0; i < n; i++)
        for (int j = 0; j < i; j++)
            if (names[i] && names[j] && !strcmp(names[i], names[j]))
                return gw_fail(err, "%s:%d:%d: duplicate %s name '%s' (also at line %d); names read from a layer "
                                    "must be unique",
                               AT(src[i]), kind, names[i], src[j].line);
    return 0;
}

int gw_model_read_gis(gw_model *m, gw_error *err)
{
    int changed = 0;
    if (do_section(m, S_FIXED, (void **)&m->fixed, &m->nfixed, &changed, err) < 0 ||
        do_section(m, S_STREAM, (void **)&m->streams, &m->nstreams, &changed, err) < 0 ||
        do_section(m, S_DRAIN, (void **)&m->drains, &m->ndrains, &changed, err) < 0 ||
        do_section(m, S_WELL, (void **)&m->wells, &m->nwells, &changed, err) < 0 ||
        do_section(m, S_OBS, (void **)&m->obs, &m->nobs, &changed, err) < 0)
        return -1;
    for (int i = 0; i < m->nleakage; i++)
        if (m->leakage[i].polygon.name_field)
            return gw_fail(err, "%s:%d:%d: leakage: name: {field: ...} (one feature per row) is not available for "
                                "leakage areas; list them one by one",
                           AT(m->leakage[i].src));
    for (int i = 0; i < m->ntransects; i++)
        if (m->transects[i].line.name_field)
            return gw_fail(err, "%s:%d:%d: transects: name: {field: ...} is not available here; list them one by one",
                           AT(m->transects[i].src));
    if (!changed) return 0;
    int n = m->nfixed + m->nstreams + m->ndrains + m->nwells + m->nleakage;
    int cap = n > m->nobs ? n : m->nobs;
    const char **names = malloc(((size_t)cap + 1) * sizeof *names);
    gw_src *src = malloc(((size_t)cap + 1) * sizeof *src);
    if (!names || !src) {
        free(names);
        free(src);
        return gw_fail(err, "out of memory");
    }
    int k = 0;
    for (int i = 0; i < m->nfixed; i++, k++) names[k] = m->fixed[i].name, src[k] = m->fixed[i].src;
    for (int i = 0; i < m->nstreams; i++, k++) names[k] = m->streams[i].name, src[k] = m->streams[i].src;
    for (int i = 0; i < m->ndrains; i++, k++) names[k] = m->drains[i].name, src[k] = m->drains[i].src;
    for (int i = 0; i < m->nwells; i++, k++) names[k] = m->wells[i].name, src[k] = m->wells[i].src;
    for (int i = 0; i < m->nleakage; i++, k++) names[k] = m->leakage[i].name, src[k] = m->leakage[i].src;
    int rc = check_unique(names, src, k, "feature", err);
    if (rc == 0) {
        for (int i = 0; i < m->nobs; i++) names[i] = m->obs[i].name, src[i] = m->obs[i].src;
        rc = check_unique(names, src, m->nobs, "observation", err);
    }
    free(names);
    free(src);
    return rc;
}
