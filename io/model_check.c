#include "model_check.h"

#include "../solver/rasterize.h"
#include "yaml_get.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

static void add_at(gw_msgs *ms, gw_src s, const char *fmt, const char *a, const char *b)
{
    gw_msgs_add(ms, s.line, s.col, fmt, a, b);
}

static double value_at(const gw_values *v, int i) { return v->n == 1 ? v->v[0] : v->v[i]; }

/* One value, or exactly one per vertex of the line. */
static int check_count(gw_msgs *ms, const char *word, const char *name, const char *key,
                       const gw_values *v, const gw_path *line)
{
    if (!v->v || v->n == 1 || v->n == line->n) return 0;
    gw_msgs_add(ms, v->src.line, v->src.col,
                "%s '%s': %s has %d values but the line has %d vertices (give one value, or one per vertex)",
                word, name, key, v->n, line->n);
    return -1;
}

static void check_line(gw_msgs *ms, const gw_grid *g, const char *word, const char *name, const gw_path *p)
{
    if (!p->xy || p->n < 2) return;
    double len = 0.0;
    for (int i = 1; i < p->n; i++)
        len += hypot(p->xy[2 * i] - p->xy[2 * i - 2], p->xy[2 * i + 1] - p->xy[2 * i - 1]);
    if (!(len > 0.0)) {
        add_at(ms, p->src, "%s '%s': the line has zero length", word, name);
        return;
    }
    gw_line_piece *pc = NULL;
    int npc = 0;
    double inside = 0.0;
    if (gw_rasterize_line(g, p->xy, p->n, &pc, &npc, NULL) < 0) {
        add_at(ms, p->src, "%s '%s': out of memory placing the line on the grid", word, name);
        return;
    }
    for (int i = 0; i < npc; i++) inside += pc[i].length;
    free(pc);
    if (!(inside > 0.0))
        add_at(ms, p->src, "%s '%s': the line lies entirely outside the grid", word, name);
}

static void check_polygon(gw_msgs *ms, const gw_grid *g, const char *word, const char *name, const gw_path *p)
{
    if (!p->xy || p->n < 3) return;
    unsigned char *mask = calloc(gw_grid_ncells(g), 1);
    if (!mask) {
        add_at(ms, p->src, "%s '%s': out of memory placing the polygon on the grid", word, name);
        return;
    }
    long n = gw_rasterize_polygon(g, p->xy, p->n, mask, 1);
    free(mask);
    if (n == 0)
        add_at(ms, p->src, "%s '%s': the polygon contains no cell centre of the grid (outside the grid or "
               "smaller than a cell)", word, name);
}

static void check_point(gw_msgs *ms, const gw_grid *g, const char *word, const char *name,
                        double x, double y, gw_src s)
{
    int c, r;
    if (gw_grid_locate(g, x, y, &c, &r) != 0)
        gw_msgs_add(ms, s.line, s.col, "%s '%s': point (%g, %g) lies outside the grid (x %g to %g, y %g to %g)",
                    word, name, x, y, g->x0, g->x0 + g->nx * g->dx, g->y0, gw_grid_ytop(g));
}

static void check_zones(gw_msgs *ms, const gw_grid *g, const char *prop, const gw_property *p)
{
    if (p->kind != GW_PROP_ZONES) return;
    for (int i = 0; i < p->nzones; i++) {
        char word[128];
        snprintf(word, sizeof word, "%s zone", prop);
        check_polygon(ms, g, word, p->zones[i].name ? p->zones[i].name : "?", &p->zones[i].polygon);
    }
}

int gw_model_check(const gw_model *m, gw_error *err)
{
    gw_msgs ms;
    gw_msgs_init(&ms, m->path);
    const gw_grid *g = &m->grid;

    check_zones(&ms, g, "conductivity", &m->conductivity);
    check_zones(&ms, g, "thickness", &m->thickness);
    check_zones(&ms, g, "bottom", &m->bottom);
    check_zones(&ms, g, "anisotropy", &m->anisotropy);
    check_zones(&ms, g, "porosity", &m->porosity);
    check_zones(&ms, g, "recharge", &m->recharge);
    if (m->active.n) check_polygon(&ms, g, "aquifer.active", "polygon", &m->active);

    for (int i = 0; i < m->nfixed; i++) {
        const gw_fixed_spec *f = &m->fixed[i];
        if (f->is_polygon) {
            check_polygon(&ms, g, "fixed head", f->name, &f->geom);
        } else {
            check_line(&ms, g, "fixed head", f->name, &f->geom);
            check_count(&ms, "fixed head", f->name, "head", &f->head, &f->geom);
        }
    }
    for (int i = 0; i < m->nstreams; i++) {
        const gw_stream_spec *s = &m->streams[i];
        check_line(&ms, g, "stream", s->name, &s->line);
        int bad = check_count(&ms, "stream", s->name, "stage", &s->stage, &s->line);
        bad |= check_count(&ms, "stream", s->name, "bed_bottom", &s->bed_bottom, &s->line);
        bad |= check_count(&ms, "stream", s->name, "bed_conductance", &s->bed_conductance, &s->line);
        if (!bad && s->stage.v && s->bed_bottom.v)
            for (int k = 0; k < s->line.n; k++)
                if (value_at(&s->stage, k) < value_at(&s->bed_bottom, k)) {
                    gw_msgs_add(&ms, s->stage.src.line, s->stage.src.col,
                                "stream '%s': stage %g is below bed_bottom %g at vertex %d", s->name,
                                value_at(&s->stage, k), value_at(&s->bed_bottom, k), k + 1);
                    break;
                }
    }
    for (int i = 0; i < m->ndrains; i++) {
        const gw_drain_spec *d = &m->drains[i];
        check_line(&ms, g, "drain", d->name, &d->line);
        check_count(&ms, "drain", d->name, "elevation", &d->elevation, &d->line);
        check_count(&ms, "drain", d->name, "conductance", &d->conductance, &d->line);
    }
    for (int i = 0; i < m->nwells; i++)
        check_point(&ms, g, "well", m->wells[i].name, m->wells[i].x, m->wells[i].y, m->wells[i].at.src);
    for (int i = 0; i < m->nobs; i++)
        check_point(&ms, g, "observation", m->obs[i].name, m->obs[i].x, m->obs[i].y, m->obs[i].at.src);
    for (int i = 0; i < m->nleakage; i++)
        if (m->leakage[i].polygon.n) check_polygon(&ms, g, "leakage", m->leakage[i].name, &m->leakage[i].polygon);
    for (int i = 0; i < m->ntransects; i++)
        check_line(&ms, g, "transect", m->transects[i].name, &m->transects[i].line);
    if (m->water_table) {
        const gw_water_table_spec *w = m->water_table;
        check_line(&ms, g, "water table", w->name, &w->line);
        check_count(&ms, "water table", w->name, "elevation", &w->elevation, &w->line);
    }
    for (int i = 0; i < m->nseepage; i++)
        check_line(&ms, g, "seepage face", m->seepage[i].name, &m->seepage[i].line);

    if (ms.count) return gw_msgs_fail(&ms, err);
    gw_msgs_free(&ms);
    return 0;
}
