/* Releasing a gw_model and everything it owns. */
#include "model.h"

#include <stdlib.h>

static void path_free(gw_path *p)
{
    free(p->xy);
    free(p->layer_file);
    free(p->layer_name);
    free(p->layer_where);
    free(p->name_field);
}

static void prop_free(gw_property *p)
{
    free(p->raster);
    for (int i = 0; i < p->nzones; i++) {
        free(p->zones[i].name);
        path_free(&p->zones[i].polygon);
    }
    free(p->zones);
}

void gw_model_free(gw_model *m)
{
    if (!m) return;
    free(m->path);
    free(m->dir);
    free(m->title);
    free(m->length_unit);
    free(m->time_unit);
    free(m->crs);
    prop_free(&m->conductivity);
    prop_free(&m->thickness);
    prop_free(&m->bottom);
    prop_free(&m->anisotropy);
    prop_free(&m->porosity);
    prop_free(&m->recharge);
    path_free(&m->active);
    free(m->active_raster);
    for (int i = 0; i < m->nfixed; i++) {
        free(m->fixed[i].name);
        path_free(&m->fixed[i].geom);
        free(m->fixed[i].head.v);
        free(m->fixed[i].head.field);
    }
    free(m->fixed);
    for (int i = 0; i < m->nstreams; i++) {
        gw_stream_spec *s = &m->streams[i];
        free(s->name);
        path_free(&s->line);
        free(s->stage.v);
        free(s->bed_bottom.v);
        free(s->bed_conductance.v);
        free(s->stage.field);
        free(s->bed_bottom.field);
        free(s->bed_conductance.field);
    }
    free(m->streams);
    for (int i = 0; i < m->ndrains; i++) {
        gw_drain_spec *d = &m->drains[i];
        free(d->name);
        path_free(&d->line);
        free(d->elevation.v);
        free(d->conductance.v);
        free(d->elevation.field);
        free(d->conductance.field);
    }
    free(m->drains);
    for (int i = 0; i < m->nwells; i++) {
        free(m->wells[i].name);
        path_free(&m->wells[i].at);
        free(m->wells[i].pumping_field);
    }
    free(m->wells);
    for (int i = 0; i < m->nobs; i++) {
        free(m->obs[i].name);
        path_free(&m->obs[i].at);
        free(m->obs[i].head_field);
    }
    free(m->obs);
    for (int i = 0; i < m->nleakage; i++) {
        free(m->leakage[i].name);
        path_free(&m->leakage[i].polygon);
    }
    free(m->leakage);
    if (m->water_table) {
        free(m->water_table->name);
        path_free(&m->water_table->line);
        free(m->water_table->elevation.v);
        free(m->water_table->elevation.field);
        free(m->water_table);
    }
    for (int i = 0; i < m->nseepage; i++) {
        free(m->seepage[i].name);
        path_free(&m->seepage[i].line);
    }
    free(m->seepage);
    free(m->travel_times);
    for (int i = 0; i < m->ntransects; i++) {
        free(m->transects[i].name);
        path_free(&m->transects[i].line);
    }
    free(m->transects);
    free(m);
}
