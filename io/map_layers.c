#include "map_layers.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

void gw_map_layers_init(gw_map_layers *l)
{
    memset(l, 0, sizeof *l);
}

void gw_map_layers_free(gw_map_layers *l)
{
    free(l->owned_[0]);
    free(l->owned_[1]);
    l->owned_[0] = l->owned_[1] = NULL;
}

static int find_feature(const gw_problem *p, const char *name, gw_feature_type t)
{
    for (int i = 0; i < p->nfeatures; i++)
        if (p->features[i].type == t && p->features[i].name && name &&
            !strcmp(p->features[i].name, name))
            return i;
    return -1;
}

int gw_map_layers_from_model(gw_map_layers *l, const gw_model *m, const gw_problem *p,
                             const double *simulated, gw_error *err)
{
    l->title = m->title;
    l->length_unit = m->length_unit;
    l->time_unit = m->time_unit;
    l->crs = m->crs;
    l->width = m->map_width;
    l->contour_interval = m->contour_interval;

    int ng = m->nfixed + m->nstreams + m->ndrains;
    gw_map_geom *g = ng ? calloc((size_t)ng, sizeof *g) : NULL;
    gw_map_obs *o = m->nobs ? calloc((size_t)m->nobs, sizeof *o) : NULL;
    if ((ng && !g) || (m->nobs && !o)) {
        free(g);
        free(o);
        return gw_fail(err, "out of memory preparing the maps");
    }
    int k = 0;
    for (int i = 0; i < m->nfixed; i++) {
        int f = find_feature(p, m->fixed[i].name, GW_FEAT_FIXED_HEAD);
        if (f < 0 || m->fixed[i].geom.n < 1) continue;
        g[k++] = (gw_map_geom){f, {m->fixed[i].geom.xy, m->fixed[i].geom.n}, m->fixed[i].is_polygon};
    }
    for (int i = 0; i < m->nstreams; i++) {
        int f = find_feature(p, m->streams[i].name, GW_FEAT_STREAM);
        if (f < 0 || m->streams[i].line.n < 2) continue;
        g[k++] = (gw_map_geom){f, {m->streams[i].line.xy, m->streams[i].line.n}, 0};
    }
    for (int i = 0; i < m->ndrains; i++) {
        int f = find_feature(p, m->drains[i].name, GW_FEAT_DRAIN);
        if (f < 0 || m->drains[i].line.n < 2) continue;
        g[k++] = (gw_map_geom){f, {m->drains[i].line.xy, m->drains[i].line.n}, 0};
    }
    for (int i = 0; i < m->nobs; i++) {
        o[i].name = m->obs[i].name;
        o[i].x = m->obs[i].x;
        o[i].y = m->obs[i].y;
        o[i].observed = m->obs[i].head;
        o[i].simulated = simulated ? simulated[i] : NAN;
    }
    l->geoms = g;
    l->ngeoms = k;
    l->obs = o;
    l->nobs = m->nobs;
    l->owned_[0] = g;
    l->owned_[1] = o;
    return 0;
}
