#include "model_layers.h"

#include "model_gis.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

int gw_path_read_layer(gw_path *p, gw_geom_kind kind, const char *crs, const char *what, gw_error *err)
{
    return gw_model_read_path(p, kind, crs, what, err);   /* GDAL/OGR reading lives in gis_vector.c */
}

static int resolve(const char *crs, gw_path *p, gw_geom_kind kind, const char *word, const char *name, const char *key,
                   gw_error *err)
{
    if (!p->layer_file) return 0;
    char what[300];
    snprintf(what, sizeof what, "%s '%s': %s", word, name ? name : "?", key);
    return gw_path_read_layer(p, kind, crs, what, err);
}

int gw_model_resolve_layers(gw_model *m, gw_error *err)
{
    /* Attribute values and one-feature-per-row layers first (model_gis.c). */
    if (gw_model_read_gis(m, err) < 0) return -1;
    gw_property *props[] = { &m->conductivity, &m->thickness, &m->bottom, &m->anisotropy,
                             &m->porosity, &m->recharge };
    for (size_t k = 0; k < sizeof props / sizeof *props; k++)
        for (int i = 0; i < props[k]->nzones; i++)
            if (resolve(m->crs, &props[k]->zones[i].polygon, GW_GEOM_POLYGON, "zone", props[k]->zones[i].name,
                        "polygon", err) < 0)
                return -1;
    if (resolve(m->crs, &m->active, GW_GEOM_POLYGON, "aquifer", "active", "polygon", err) < 0) return -1;
    for (int i = 0; i < m->nfixed; i++)
        if (resolve(m->crs, &m->fixed[i].geom, m->fixed[i].is_polygon ? GW_GEOM_POLYGON : GW_GEOM_LINE, "fixed head",
                    m->fixed[i].name, m->fixed[i].is_polygon ? "polygon" : "line", err) < 0)
            return -1;
    for (int i = 0; i < m->nstreams; i++)
        if (resolve(m->crs, &m->streams[i].line, GW_GEOM_LINE, "stream", m->streams[i].name, "line", err) < 0) return -1;
    for (int i = 0; i < m->ndrains; i++)
        if (resolve(m->crs, &m->drains[i].line, GW_GEOM_LINE, "drain", m->drains[i].name, "line", err) < 0) return -1;
    for (int i = 0; i < m->nleakage; i++)
        if (resolve(m->crs, &m->leakage[i].polygon, GW_GEOM_POLYGON, "leakage", m->leakage[i].name, "polygon", err) < 0)
            return -1;
    for (int i = 0; i < m->ntransects; i++)
        if (resolve(m->crs, &m->transects[i].line, GW_GEOM_LINE, "transect", m->transects[i].name, "line", err) < 0)
            return -1;
    for (int i = 0; i < m->nwells; i++) {
        gw_well_spec *w = &m->wells[i];
        if (!w->at.layer_file) continue;
        if (resolve(m->crs, &w->at, GW_GEOM_POINT, "well", w->name, "at", err) < 0) return -1;
        w->x = w->at.xy[0];
        w->y = w->at.xy[1];
    }
    for (int i = 0; i < m->nobs; i++) {
        gw_obs_spec *o = &m->obs[i];
        if (!o->at.layer_file) continue;
        if (resolve(m->crs, &o->at, GW_GEOM_POINT, "observation", o->name, "at", err) < 0) return -1;
        o->x = o->at.xy[0];
        o->y = o->at.xy[1];
    }
    return 0;
}
