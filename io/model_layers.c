#include "model_layers.h"

#include <gdal.h>
#include <ogr_api.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* Copy the vertices of a simple geometry (point, line string, ring). */
static int copy_points(OGRGeometryH g, double **xy, int *n)
{
    int np = OGR_G_GetPointCount(g);
    if (np <= 0) return -1;
    double *p = malloc(2 * (size_t)np * sizeof *p);
    if (!p) return -1;
    for (int i = 0; i < np; i++) {
        p[2 * i] = OGR_G_GetX(g, i);
        p[2 * i + 1] = OGR_G_GetY(g, i);
    }
    *xy = p;
    *n = np;
    return 0;
}

static const char *kind_word(gw_geom_kind k)
{
    return k == GW_GEOM_POINT ? "point" : k == GW_GEOM_LINE ? "line" : "polygon";
}

int gw_path_read_layer(gw_path *p, gw_geom_kind kind, const char *what, gw_error *err)
{
    const char *file = p->src.file ? p->src.file : "(model)";
    if (GDALGetDriverCount() == 0) GDALAllRegister();
    GDALDatasetH ds = GDALOpenEx(p->layer_file, GDAL_OF_VECTOR | GDAL_OF_READONLY, NULL, NULL, NULL);
    if (!ds)
        return gw_fail(err, "%s:%d:%d: %s: cannot open vector file '%s'", file, p->src.line, p->src.col,
                       what, p->layer_file);
    OGRLayerH lay = NULL;
    if (p->layer_name) {
        lay = GDALDatasetGetLayerByName(ds, p->layer_name);
        if (!lay) {
            GDALClose(ds);
            return gw_fail(err, "%s:%d:%d: %s: '%s' has no layer named '%s'", file, p->src.line, p->src.col,
                           what, p->layer_file, p->layer_name);
        }
    } else if (GDALDatasetGetLayerCount(ds) == 1) {
        lay = GDALDatasetGetLayer(ds, 0);
    } else {
        int nl = GDALDatasetGetLayerCount(ds);
        GDALClose(ds);
        return gw_fail(err, "%s:%d:%d: %s: '%s' has %d layers; name one with 'layer'", file, p->src.line,
                       p->src.col, what, p->layer_file, nl);
    }
    if (p->layer_where && OGR_L_SetAttributeFilter(lay, p->layer_where) != OGRERR_NONE) {
        GDALClose(ds);
        return gw_fail(err, "%s:%d:%d: %s: the filter \"%s\" is not valid for layer '%s'", file, p->src.line,
                       p->src.col, what, p->layer_where, OGR_L_GetName(lay));
    }
    OGR_L_ResetReading(lay);
    OGRFeatureH feat, first = NULL;
    int count = 0;
    while ((feat = OGR_L_GetNextFeature(lay)) != NULL) {
        if (count++ == 0) first = feat;
        else OGR_F_Destroy(feat);
    }
    int rc = 0;
    if (count != 1) {
        rc = gw_fail(err, "%s:%d:%d: %s: layer '%s'%s%s%s holds %d features; exactly one %s is expected",
                     file, p->src.line, p->src.col, what, OGR_L_GetName(lay),
                     p->layer_where ? " filtered by \"" : "", p->layer_where ? p->layer_where : "",
                     p->layer_where ? "\"" : "", count, kind_word(kind));
    } else {
        OGRGeometryH g = OGR_F_GetGeometryRef(first);
        OGRwkbGeometryType t = g ? wkbFlatten(OGR_G_GetGeometryType(g)) : wkbUnknown;
        /* A multi-geometry with a single part is taken as that part. */
        if (g && (t == wkbMultiPoint || t == wkbMultiLineString || t == wkbMultiPolygon) &&
            OGR_G_GetGeometryCount(g) == 1) {
            g = OGR_G_GetGeometryRef(g, 0);
            t = wkbFlatten(OGR_G_GetGeometryType(g));
        }
        OGRwkbGeometryType want = kind == GW_GEOM_POINT ? wkbPoint : kind == GW_GEOM_LINE ? wkbLineString
                                                                                           : wkbPolygon;
        if (!g || t != want) {
            rc = gw_fail(err, "%s:%d:%d: %s: layer '%s' holds a %s, expected a %s", file, p->src.line,
                         p->src.col, what, OGR_L_GetName(lay), g ? OGRGeometryTypeToName(t) : "missing geometry",
                         kind_word(kind));
        } else {
            OGRGeometryH pts = kind == GW_GEOM_POLYGON ? OGR_G_GetGeometryRef(g, 0) : g;
            int minpts = kind == GW_GEOM_POINT ? 1 : kind == GW_GEOM_LINE ? 2 : 3;
            free(p->xy);
            p->xy = NULL;
            p->n = 0;
            if (!pts || copy_points(pts, &p->xy, &p->n) < 0 || p->n < minpts) {
                free(p->xy);
                p->xy = NULL;
                p->n = 0;
                rc = gw_fail(err, "%s:%d:%d: %s: the %s in layer '%s' has too few vertices", file,
                             p->src.line, p->src.col, what, kind_word(kind), OGR_L_GetName(lay));
            }
        }
    }
    if (first) OGR_F_Destroy(first);
    GDALClose(ds);
    return rc;
}

static int resolve(gw_path *p, gw_geom_kind kind, const char *word, const char *name, const char *key,
                   gw_error *err)
{
    if (!p->layer_file) return 0;
    char what[300];
    snprintf(what, sizeof what, "%s '%s': %s", word, name ? name : "?", key);
    return gw_path_read_layer(p, kind, what, err);
}

int gw_model_resolve_layers(gw_model *m, gw_error *err)
{
    gw_property *props[] = { &m->conductivity, &m->thickness, &m->bottom, &m->anisotropy,
                             &m->porosity, &m->recharge };
    for (size_t k = 0; k < sizeof props / sizeof *props; k++)
        for (int i = 0; i < props[k]->nzones; i++)
            if (resolve(&props[k]->zones[i].polygon, GW_GEOM_POLYGON, "zone", props[k]->zones[i].name,
                        "polygon", err) < 0)
                return -1;
    if (resolve(&m->active, GW_GEOM_POLYGON, "aquifer", "active", "polygon", err) < 0) return -1;
    for (int i = 0; i < m->nfixed; i++)
        if (resolve(&m->fixed[i].geom, m->fixed[i].is_polygon ? GW_GEOM_POLYGON : GW_GEOM_LINE, "fixed head",
                    m->fixed[i].name, m->fixed[i].is_polygon ? "polygon" : "line", err) < 0)
            return -1;
    for (int i = 0; i < m->nstreams; i++)
        if (resolve(&m->streams[i].line, GW_GEOM_LINE, "stream", m->streams[i].name, "line", err) < 0) return -1;
    for (int i = 0; i < m->ndrains; i++)
        if (resolve(&m->drains[i].line, GW_GEOM_LINE, "drain", m->drains[i].name, "line", err) < 0) return -1;
    for (int i = 0; i < m->nleakage; i++)
        if (resolve(&m->leakage[i].polygon, GW_GEOM_POLYGON, "leakage", m->leakage[i].name, "polygon", err) < 0)
            return -1;
    for (int i = 0; i < m->ntransects; i++)
        if (resolve(&m->transects[i].line, GW_GEOM_LINE, "transect", m->transects[i].name, "line", err) < 0)
            return -1;
    for (int i = 0; i < m->nwells; i++) {
        gw_well_spec *w = &m->wells[i];
        if (!w->at.layer_file) continue;
        if (resolve(&w->at, GW_GEOM_POINT, "well", w->name, "at", err) < 0) return -1;
        w->x = w->at.xy[0];
        w->y = w->at.xy[1];
    }
    for (int i = 0; i < m->nobs; i++) {
        gw_obs_spec *o = &m->obs[i];
        if (!o->at.layer_file) continue;
        if (resolve(&o->at, GW_GEOM_POINT, "observation", o->name, "at", err) < 0) return -1;
        o->x = o->at.xy[0];
        o->y = o->at.xy[1];
    }
    return 0;
}
