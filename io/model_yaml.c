/* Model file -> gw_model: the schema walk.  Every key is checked (unknown
 * keys, wrong types, out-of-range values) and every problem is collected
 * with its file:line:column, so one `gwdivide check` shows them all. */
#include "model.h"
#include "model_check.h"
#include "gis_raster.h"
#include "model_layers.h"
#include "model_text.h"
#include "yaml_get.h"
#include "yaml_tree.h"

#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#define GW_MAX_CELLS 100000000L   /* cell indices are int; memory ~100 B/cell */
#define GW_MAX_FILE_BYTES (256L * 1024 * 1024)
/* Peak memory of a whole run per grid cell: measured 720-820 bytes a cell
 * (grid arrays, matrix, CHOLMOD factor, maps) on square confined grids of
 * 0.25 to 2.25 million cells; rounded up for the fill-in that grows with
 * the grid. */
#define GW_BYTES_PER_CELL 1024.0

typedef struct {
    gw_msgs *msgs;
    gw_model *m;
    char *name_field;   /* `name: {field: F}` of the current feature, until its geometry takes it */
} P;

typedef enum { C_ANY = 0, C_POSITIVE, C_FRACTION } gw_constraint;

static gw_src src_of(const P *p, const gw_ynode *n)
{
    gw_src s = { p->m->path, n ? n->line : 0, n ? n->col : 0 };
    return s;
}

static int check_value(P *p, const gw_ynode *n, const char *what, double v, gw_constraint c)
{
    if (c == C_POSITIVE && !(v > 0.0)) {
        gw_msgs_add(p->msgs, n->line, n->col, "%s must be greater than zero, got %g", what, v);
        return -1;
    }
    if (c == C_FRACTION && !(v > 0.0 && v <= 1.0)) {
        gw_msgs_add(p->msgs, n->line, n->col, "%s must be in (0, 1], got %g", what, v);
        return -1;
    }
    return 0;
}

static int get_checked(P *p, const gw_ynode *n, const char *what, gw_constraint c, double *out)
{
    if (gw_yget_number(p->msgs, n, what, out) < 0) return -1;
    return check_value(p, n, what, *out, c);
}

/* Relative paths in the model file are relative to the model file. */
static char *resolve_path(const gw_model *m, const char *s)
{
    if (s[0] == '/' || !m->dir || !m->dir[0] || !strcmp(m->dir, "."))
        return strdup(s);
    size_t n = strlen(m->dir) + strlen(s) + 2;
    char *r = malloc(n);
    if (r) snprintf(r, n, "%s/%s", m->dir, s);
    return r;
}

static int get_file(P *p, const gw_ynode *n, const char *what, char **out)
{
    char *s = NULL;
    if (gw_yget_string(p->msgs, n, what, &s) < 0) return -1;
    *out = resolve_path(p->m, s);
    free(s);
    if (!*out) { gw_msgs_add(p->msgs, n->line, n->col, "%s: out of memory", what); return -1; }
    return 0;
}

/* ---- geometry ---------------------------------------------------------- */

static const char *const LAYER_KEYS[] = { "file", "layer", "where", "assume_crs", NULL };

/* `{field: NAME}`: a value read from an attribute of the feature's layer.
 * Returns 1 (and *out) when n is such a mapping, 0 when it is not, -1 on a
 * malformed one. */
static int field_of(P *p, const gw_ynode *n, const char *what, char **out)
{
    static const char *const keys[] = { "field", NULL };
    if (!n || n->kind != GW_YMAP || !gw_ymap_get(n, "field")) return 0;
    gw_ycheck_keys(p->msgs, n, what, keys);
    return gw_yget_string(p->msgs, gw_ymap_get(n, "field"), what, out) < 0 ? -1 : 1;
}

static int parse_path(P *p, const gw_ynode *n, const char *what, gw_geom_kind kind, gw_path *out)
{
    memset(out, 0, sizeof *out);
    out->src = src_of(p, n);
    if (n && n->kind == GW_YMAP) {
        char w[256];
        snprintf(w, sizeof w, "%s (layer)", what);
        gw_ycheck_keys(p->msgs, n, w, LAYER_KEYS);
        const gw_ynode *f = gw_yrequire(p->msgs, n, "file", w);
        int bad = !f || get_file(p, f, w, &out->layer_file) < 0;
        const gw_ynode *l = gw_ymap_get(n, "layer"), *q = gw_ymap_get(n, "where");
        if (l) bad |= gw_yget_string(p->msgs, l, w, &out->layer_name) < 0;
        if (q) bad |= gw_yget_string(p->msgs, q, w, &out->layer_where) < 0;
        const gw_ynode *ac = gw_ymap_get(n, "assume_crs");
        if (ac) bad |= gw_yget_bool(p->msgs, ac, w, &out->assume_crs) < 0;
        out->name_field = p->name_field;   /* one feature per row */
        p->name_field = NULL;
        return bad ? -1 : 0;
    }
    if (p->name_field) {
        gw_msgs_add(p->msgs, n ? n->line : 0, n ? n->col : 0,
                    "%s: name: {field: %s} reads one feature per row of a layer; give the geometry as "
                    "{file: ..., layer: ...}", what, p->name_field);
        free(p->name_field);
        p->name_field = NULL;
    }
    if (kind == GW_GEOM_POINT) {
        out->xy = malloc(2 * sizeof *out->xy);
        if (!out->xy) return -1;
        if (gw_yget_point(p->msgs, n, what, out->xy) < 0) {
            free(out->xy);
            out->xy = NULL;
            return -1;
        }
        out->n = 1;
        return 0;
    }
    return gw_yget_coords(p->msgs, n, what, kind == GW_GEOM_LINE ? 2 : 3, &out->xy, &out->n);
}

/* ---- gridded properties ------------------------------------------------ */

static const char *const RASTER_KEYS[] = { "raster", "band", "scale", NULL };

static void parse_zones(P *p, const gw_ynode *n, const char *what, const char *value_key,
                        gw_constraint c, gw_property *prop)
{
    char w[256];
    snprintf(w, sizeof w, "%s zones", what);
    if (!gw_yis_seq(p->msgs, n, w)) return;
    prop->zones = calloc((size_t)(n->n ? n->n : 1), sizeof *prop->zones);
    if (!prop->zones) { gw_msgs_add(p->msgs, n->line, n->col, "%s: out of memory", w); return; }
    const char *keys[] = { "name", "polygon", value_key, NULL };
    for (int i = 0; i < n->n; i++) {
        const gw_ynode *z = n->kids[i];
        gw_zone *zo = &prop->zones[prop->nzones++];
        zo->src = src_of(p, z);
        char zw[320];
        snprintf(zw, sizeof zw, "%s zone %d", what, i + 1);
        if (!gw_yis_map(p->msgs, z, zw)) continue;
        const gw_ynode *nm = gw_ymap_get(z, "name");
        if (nm && nm->kind == GW_YSCALAR && !nm->empty)
            snprintf(zw, sizeof zw, "%s zone '%s'", what, nm->text);
        gw_ycheck_keys(p->msgs, z, zw, keys);
        nm = gw_yrequire(p->msgs, z, "name", zw);
        if (nm) gw_yget_string(p->msgs, nm, zw, &zo->name);
        const gw_ynode *pg = gw_yrequire(p->msgs, z, "polygon", zw);
        if (pg) {
            char pw[400];
            snprintf(pw, sizeof pw, "%s: polygon", zw);
            parse_path(p, pg, pw, GW_GEOM_POLYGON, &zo->polygon);
        }
        const gw_ynode *v = gw_yrequire(p->msgs, z, value_key, zw);
        if (v) {
            char vw[400];
            snprintf(vw, sizeof vw, "%s: %s", zw, value_key);
            get_checked(p, v, vw, c, &zo->value);
        }
    }
    /* Zone names must be unique within one property. */
    for (int i = 0; i < prop->nzones; i++)
        for (int j = 0; j < i; j++)
            if (prop->zones[i].name && prop->zones[j].name && !strcmp(prop->zones[i].name, prop->zones[j].name)) {
                gw_msgs_add(p->msgs, prop->zones[i].src.line, prop->zones[i].src.col,
                            "%s: duplicate zone name '%s' (first at line %d)", what,
                            prop->zones[i].name, prop->zones[j].src.line);
                break;
            }
}

static void parse_raster(P *p, const gw_ynode *n, const char *what, gw_property *prop)
{
    char w[256];
    snprintf(w, sizeof w, "%s raster", what);
    gw_ycheck_keys(p->msgs, n, w, RASTER_KEYS);
    prop->kind = GW_PROP_RASTER;
    prop->band = 1;
    prop->scale = 1.0;
    get_file(p, gw_ymap_get(n, "raster"), w, &prop->raster);
    const gw_ynode *b = gw_ymap_get(n, "band"), *s = gw_ymap_get(n, "scale");
    char bw[300], sw[300];
    snprintf(bw, sizeof bw, "%s: band", w);
    snprintf(sw, sizeof sw, "%s: scale", w);
    if (b) gw_yget_int(p->msgs, b, bw, 1, 100000, &prop->band);
    if (s) gw_yget_number(p->msgs, s, sw, &prop->scale);
}

/* A number; {raster: PATH, band, scale}; or {value: X, zones: [...]}. */
static void parse_property(P *p, const gw_ynode *n, const char *what, gw_constraint c, gw_property *prop)
{
    prop->given = 1;
    prop->src = src_of(p, n);
    if (n->kind == GW_YMAP && gw_ymap_get(n, "raster")) {
        parse_raster(p, n, what, prop);
    } else if (n->kind == GW_YMAP && (gw_ymap_get(n, "value") || gw_ymap_get(n, "zones"))) {
        static const char *const keys[] = { "value", "zones", NULL };
        gw_ycheck_keys(p->msgs, n, what, keys);
        prop->kind = GW_PROP_ZONES;
        const gw_ynode *v = gw_yrequire(p->msgs, n, "value", what);
        if (v) get_checked(p, v, what, c, &prop->value);
        const gw_ynode *z = gw_ymap_get(n, "zones");
        if (z) parse_zones(p, z, what, "value", c, prop);
    } else if (n->kind == GW_YMAP) {
        gw_msgs_add(p->msgs, n->line, n->col,
                    "%s: expected a number, {raster: PATH} or {value: X, zones: [...]}", what);
    } else {
        prop->kind = GW_PROP_VALUE;
        get_checked(p, n, what, c, &prop->value);
    }
}

/* ---- sections ---------------------------------------------------------- */

static void parse_units(P *p, const gw_ynode *n)
{
    static const char *const keys[] = { "length", "time", NULL };
    if (!gw_yis_map(p->msgs, n, "units")) return;
    gw_ycheck_keys(p->msgs, n, "units", keys);
    const gw_ynode *l = gw_yrequire(p->msgs, n, "length", "units");
    const gw_ynode *t = gw_yrequire(p->msgs, n, "time", "units");
    if (l) gw_yget_string(p->msgs, l, "units.length", &p->m->length_unit);
    if (t) gw_yget_string(p->msgs, t, "units.time", &p->m->time_unit);
}

/* A grid whose run would need more memory than the machine has is rejected
 * before anything is allocated: trying would only end in swapping or an
 * out-of-memory kill. */
static void check_grid_memory(P *p, const gw_ynode *at, const char *what, int nx, int ny)
{
    double cells = (double)nx * (double)ny;
    long pages = sysconf(_SC_PHYS_PAGES), page = sysconf(_SC_PAGESIZE);
    if (pages <= 0 || page <= 0) return;
    double have = (double)pages * (double)page, need = cells * GW_BYTES_PER_CELL;
    if (need <= have) return;
    gw_msgs_add(p->msgs, at->line, at->col,
                "%s: %d columns x %d rows (%.0f cells) would need about %.1f GiB of memory "
                "(about %.0f bytes a cell) and this machine has %.1f GiB; use larger cells "
                "or a smaller area", what, nx, ny, cells, need / 1073741824.0, GW_BYTES_PER_CELL,
                have / 1073741824.0);
}

static void parse_grid(P *p, const gw_ynode *n)
{
    static const char *const keys[] = { "origin", "cell_size", "columns", "rows", "crs", "like", NULL };
    gw_grid *g = &p->m->grid;
    if (!gw_yis_map(p->msgs, n, "grid")) return;
    gw_ycheck_keys(p->msgs, n, "grid", keys);
    const gw_ynode *like = gw_ymap_get(n, "like");
    if (like) {   /* grid: {like: some.tif}: the raster's cells and CRS */
        static const char *const own[] = { "origin", "cell_size", "columns", "rows", NULL };
        for (int i = 0; own[i]; i++) {
            const gw_ynode *k = gw_ymap_get(n, own[i]);
            if (k) gw_msgs_add(p->msgs, k->line, k->col, "grid.%s: not allowed with grid.like (the raster sets it)",
                               own[i]);
        }
        char *file = NULL, *crs = NULL;
        if (get_file(p, like, "grid.like", &file) < 0) return;
        gw_error e;
        char what[64];
        snprintf(what, sizeof what, "grid.like");
        if (gw_raster_grid_like(file, what, g, &crs, &e) < 0) {
            gw_msgs_add(p->msgs, like->line, like->col, "%s", e.msg);
        } else if ((long)g->nx * (long)g->ny > GW_MAX_CELLS) {
            gw_msgs_add(p->msgs, like->line, like->col, "grid.like: %d columns x %d rows is more than %ld cells",
                        g->nx, g->ny, GW_MAX_CELLS);
        } else {
            check_grid_memory(p, like, "grid.like", g->nx, g->ny);
        }
        free(file);
        const gw_ynode *c2 = gw_ymap_get(n, "crs");
        if (c2) gw_yget_string(p->msgs, c2, "grid.crs", &p->m->crs);   /* an explicit crs wins */
        if (!p->m->crs) p->m->crs = crs;
        else free(crs);
        return;
    }
    const gw_ynode *o = gw_yrequire(p->msgs, n, "origin", "grid");
    if (o) {
        double xy[2];
        if (gw_yget_point(p->msgs, o, "grid.origin", xy) == 0) { g->x0 = xy[0]; g->y0 = xy[1]; }
    }
    const gw_ynode *cs = gw_yrequire(p->msgs, n, "cell_size", "grid");
    if (cs && cs->kind == GW_YSEQ) {
        if (cs->n != 2) {
            gw_msgs_add(p->msgs, cs->line, cs->col, "grid.cell_size: expected a number or [dx, dy]");
        } else {
            get_checked(p, cs->kids[0], "grid.cell_size dx", C_POSITIVE, &g->dx);
            get_checked(p, cs->kids[1], "grid.cell_size dy", C_POSITIVE, &g->dy);
        }
    } else if (cs) {
        if (get_checked(p, cs, "grid.cell_size", C_POSITIVE, &g->dx) == 0) g->dy = g->dx;
    }
    const gw_ynode *c = gw_yrequire(p->msgs, n, "columns", "grid");
    const gw_ynode *r = gw_yrequire(p->msgs, n, "rows", "grid");
    int okc = c && gw_yget_int(p->msgs, c, "grid.columns", 1, 1000000, &g->nx) == 0;
    int okr = r && gw_yget_int(p->msgs, r, "grid.rows", 1, 1000000, &g->ny) == 0;
    if (okc && okr && (long)g->nx * (long)g->ny > GW_MAX_CELLS)
        gw_msgs_add(p->msgs, c->line, c->col, "grid: %d columns x %d rows is more than %ld cells",
                    g->nx, g->ny, GW_MAX_CELLS);
    else if (okc && okr)
        check_grid_memory(p, c, "grid", g->nx, g->ny);
    const gw_ynode *crs = gw_ymap_get(n, "crs");
    if (crs) gw_yget_string(p->msgs, crs, "grid.crs", &p->m->crs);
}

static void parse_aquifer(P *p, const gw_ynode *n)
{
    static const char *const keys[] = { "type", "conductivity", "thickness", "bottom",
                                        "anisotropy", "porosity", "active", NULL };
    gw_model *m = p->m;
    if (!gw_yis_map(p->msgs, n, "aquifer")) return;
    gw_ycheck_keys(p->msgs, n, "aquifer", keys);
    const gw_ynode *t = gw_ymap_get(n, "type");
    if (t) {
        if (t->kind == GW_YSCALAR && !strcmp(t->text, "confined")) m->aquifer_type = GW_CONFINED;
        else if (t->kind == GW_YSCALAR && !strcmp(t->text, "unconfined")) m->aquifer_type = GW_UNCONFINED;
        else if (t->kind == GW_YSCALAR && !strcmp(t->text, "section")) m->aquifer_type = GW_SECTION;
        else gw_msgs_add(p->msgs, t->line, t->col,
                         "aquifer.type: expected confined, unconfined or section, got '%s'",
                         t->kind == GW_YSCALAR ? t->text : "(not a word)");
    }
    const gw_ynode *k = gw_yrequire(p->msgs, n, "conductivity", "aquifer");
    if (k) parse_property(p, k, "aquifer.conductivity", C_POSITIVE, &m->conductivity);
    const gw_ynode *th = gw_ymap_get(n, "thickness");
    if (th && m->aquifer_type == GW_SECTION)
        gw_msgs_add(p->msgs, th->line, th->col,
                    "aquifer.thickness is not used in a cross-section (flow is per unit width); remove it");
    else if (th)
        parse_property(p, th, "aquifer.thickness", C_POSITIVE, &m->thickness);
    else if (m->aquifer_type == GW_CONFINED)
        gw_msgs_add(p->msgs, n->line, n->col, "aquifer: missing required key 'thickness' (confined aquifer)");
    const gw_ynode *b = gw_ymap_get(n, "bottom");
    if (b) parse_property(p, b, "aquifer.bottom", C_ANY, &m->bottom);
    else if (m->aquifer_type == GW_UNCONFINED)
        gw_msgs_add(p->msgs, n->line, n->col, "aquifer: missing required key 'bottom' (unconfined aquifer)");
    const gw_ynode *a = gw_ymap_get(n, "anisotropy");
    if (a) parse_property(p, a, "aquifer.anisotropy", C_POSITIVE, &m->anisotropy);
    const gw_ynode *po = gw_ymap_get(n, "porosity");
    if (po) parse_property(p, po, "aquifer.porosity", C_FRACTION, &m->porosity);
    const gw_ynode *ac = gw_ymap_get(n, "active");
    if (ac && gw_yis_map(p->msgs, ac, "aquifer.active")) {
        static const char *const akeys[] = { "polygon", "raster", "band", NULL };
        gw_ycheck_keys(p->msgs, ac, "aquifer.active", akeys);
        const gw_ynode *ar = gw_ymap_get(ac, "raster"), *ab = gw_ymap_get(ac, "band");
        if (ar) {   /* a mask raster: non-zero = active (majority of each cell) */
            m->active_band = 1;
            get_file(p, ar, "aquifer.active.raster", &m->active_raster);
            if (ab) gw_yget_int(p->msgs, ab, "aquifer.active.band", 1, 100000, &m->active_band);
        }
        const gw_ynode *pg = ar ? gw_ymap_get(ac, "polygon") : gw_yrequire(p->msgs, ac, "polygon", "aquifer.active");
        if (pg) parse_path(p, pg, "aquifer.active.polygon", GW_GEOM_POLYGON, &m->active);
    }
}

static void parse_recharge(P *p, const gw_ynode *n)
{
    gw_property *r = &p->m->recharge;
    if (n->kind != GW_YMAP) {          /* recharge: 0.0004 */
        parse_property(p, n, "recharge", C_ANY, r);
        return;
    }
    static const char *const keys[] = { "rate", "zones", NULL };
    gw_ycheck_keys(p->msgs, n, "recharge", keys);
    const gw_ynode *rate = gw_yrequire(p->msgs, n, "rate", "recharge");
    const gw_ynode *zones = gw_ymap_get(n, "zones");
    if (rate) parse_property(p, rate, "recharge.rate", C_ANY, r);
    r->src = src_of(p, n);
    r->given = 1;
    if (zones) {
        if (rate && r->kind != GW_PROP_VALUE) {
            gw_msgs_add(p->msgs, rate->line, rate->col,
                        "recharge.rate: must be a single number when recharge.zones are given");
            return;
        }
        r->kind = GW_PROP_ZONES;
        parse_zones(p, zones, "recharge", "rate", C_ANY, r);
    }
}

/* Features: a list of mappings, each with a name. */
typedef struct { const char *name; gw_src src; } named_t;

static const gw_ynode *feature_item(P *p, const gw_ynode *list, int i, const char *section,
                                    const char *word, const char *const *keys,
                                    char **name, gw_src *src, char *what, size_t wlen)
{
    const gw_ynode *it = list->kids[i];
    *src = src_of(p, it);
    snprintf(what, wlen, "%s item %d", section, i + 1);
    if (!gw_yis_map(p->msgs, it, what)) return NULL;
    const gw_ynode *nm = gw_ymap_get(it, "name");
    if (nm && nm->kind == GW_YSCALAR && !nm->empty && nm->len < 120 && strlen(nm->text) == nm->len)
        snprintf(what, wlen, "%s '%s'", word, nm->text);
    gw_ycheck_keys(p->msgs, it, what, keys);
    free(p->name_field);
    p->name_field = NULL;
    if (field_of(p, nm, what, &p->name_field) != 0) return it;   /* named per layer row */
    nm = gw_yrequire(p->msgs, it, "name", what);
    if (nm) gw_yget_string(p->msgs, nm, what, name);
    return it;
}

static int values_of(P *p, const gw_ynode *it, const char *key, const char *what,
                     gw_constraint c, gw_values *out)
{
    char w[400];
    snprintf(w, sizeof w, "%s: %s", what, key);
    const gw_ynode *v = gw_yrequire(p->msgs, it, key, what);
    if (!v) return -1;
    out->src = src_of(p, v);
    int fo = field_of(p, v, w, &out->field);
    if (fo != 0) return fo < 0 ? -1 : 0;
    if (gw_yget_numbers(p->msgs, v, w, &out->v, &out->n) < 0) return -1;
    for (int i = 0; i < out->n; i++)
        if (check_value(p, v->kind == GW_YSEQ ? v->kids[i] : v, w, out->v[i], c) < 0) return -1;
    return 0;
}

static int number_of(P *p, const gw_ynode *it, const char *key, const char *what,
                     gw_constraint c, double *out)
{
    char w[400];
    snprintf(w, sizeof w, "%s: %s", what, key);
    const gw_ynode *v = gw_yrequire(p->msgs, it, key, what);
    return v ? get_checked(p, v, w, c, out) : -1;
}

static int geom_of(P *p, const gw_ynode *node, const char *key, const char *what,
                   gw_geom_kind kind, gw_path *out)
{
    char w[400];
    snprintf(w, sizeof w, "%s: %s", what, key);
    return parse_path(p, node, w, kind, out);
}

#define ALLOC_LIST(ptr, cnt, node) \
    do { (ptr) = calloc((size_t)((node)->n ? (node)->n : 1), sizeof *(ptr)); \
         if (!(ptr)) { gw_msgs_add(p->msgs, (node)->line, (node)->col, "out of memory"); return; } } while (0)

static void parse_fixed(P *p, const gw_ynode *n)
{
    static const char *const keys[] = { "name", "line", "polygon", "head", NULL };
    gw_model *m = p->m;
    if (!gw_yis_seq(p->msgs, n, "fixed_heads")) return;
    ALLOC_LIST(m->fixed, m->nfixed, n);
    for (int i = 0; i < n->n; i++) {
        gw_fixed_spec *f = &m->fixed[m->nfixed++];
        char what[200];
        const gw_ynode *it = feature_item(p, n, i, "fixed_heads", "fixed head", keys, &f->name, &f->src,
                                          what, sizeof what);
        if (!it) continue;
        const gw_ynode *l = gw_ymap_get(it, "line"), *pg = gw_ymap_get(it, "polygon");
        if (l && pg)
            gw_msgs_add(p->msgs, pg->line, pg->col, "%s: give either 'line' or 'polygon', not both", what);
        else if (!l && !pg)
            gw_msgs_add(p->msgs, it->line, it->col, "%s: missing required key 'line' or 'polygon'", what);
        else if (l)
            geom_of(p, l, "line", what, GW_GEOM_LINE, &f->geom);
        else {
            f->is_polygon = 1;
            geom_of(p, pg, "polygon", what, GW_GEOM_POLYGON, &f->geom);
        }
        if (values_of(p, it, "head", what, C_ANY, &f->head) == 0 && f->is_polygon && f->head.n != 1)
            gw_msgs_add(p->msgs, f->head.src.line, f->head.src.col,
                        "%s: head: a fixed-head polygon takes one value, got %d", what, f->head.n);
    }
}

static void parse_streams(P *p, const gw_ynode *n)
{
    static const char *const keys[] = { "name", "line", "stage", "bed_bottom", "bed_conductance", NULL };
    gw_model *m = p->m;
    if (!gw_yis_seq(p->msgs, n, "streams")) return;
    ALLOC_LIST(m->streams, m->nstreams, n);
    for (int i = 0; i < n->n; i++) {
        gw_stream_spec *s = &m->streams[m->nstreams++];
        char what[200];
        const gw_ynode *it = feature_item(p, n, i, "streams", "stream", keys, &s->name, &s->src,
                                          what, sizeof what);
        if (!it) continue;
        const gw_ynode *l = gw_yrequire(p->msgs, it, "line", what);
        if (l) geom_of(p, l, "line", what, GW_GEOM_LINE, &s->line);
        values_of(p, it, "stage", what, C_ANY, &s->stage);
        values_of(p, it, "bed_bottom", what, C_ANY, &s->bed_bottom);
        values_of(p, it, "bed_conductance", what, C_POSITIVE, &s->bed_conductance);
    }
}

static void parse_drains(P *p, const gw_ynode *n)
{
    static const char *const keys[] = { "name", "line", "elevation", "conductance", NULL };
    gw_model *m = p->m;
    if (!gw_yis_seq(p->msgs, n, "drains")) return;
    ALLOC_LIST(m->drains, m->ndrains, n);
    for (int i = 0; i < n->n; i++) {
        gw_drain_spec *d = &m->drains[m->ndrains++];
        char what[200];
        const gw_ynode *it = feature_item(p, n, i, "drains", "drain", keys, &d->name, &d->src,
                                          what, sizeof what);
        if (!it) continue;
        const gw_ynode *l = gw_yrequire(p->msgs, it, "line", what);
        if (l) geom_of(p, l, "line", what, GW_GEOM_LINE, &d->line);
        values_of(p, it, "elevation", what, C_ANY, &d->elevation);
        values_of(p, it, "conductance", what, C_POSITIVE, &d->conductance);
    }
}

static void parse_wells(P *p, const gw_ynode *n)
{
    static const char *const keys[] = { "name", "at", "pumping", NULL };
    gw_model *m = p->m;
    if (!gw_yis_seq(p->msgs, n, "wells")) return;
    ALLOC_LIST(m->wells, m->nwells, n);
    for (int i = 0; i < n->n; i++) {
        gw_well_spec *w = &m->wells[m->nwells++];
        char what[200];
        const gw_ynode *it = feature_item(p, n, i, "wells", "well", keys, &w->name, &w->src,
                                          what, sizeof what);
        if (!it) continue;
        const gw_ynode *at = gw_yrequire(p->msgs, it, "at", what);
        if (at && geom_of(p, at, "at", what, GW_GEOM_POINT, &w->at) == 0 && w->at.n == 1) {
            w->x = w->at.xy[0];
            w->y = w->at.xy[1];
        }
        if (!field_of(p, gw_ymap_get(it, "pumping"), what, &w->pumping_field))
            number_of(p, it, "pumping", what, C_ANY, &w->pumping);
    }
}

static void parse_obs(P *p, const gw_ynode *n)
{
    static const char *const keys[] = { "name", "at", "head", NULL };
    gw_model *m = p->m;
    if (!gw_yis_seq(p->msgs, n, "observations")) return;
    ALLOC_LIST(m->obs, m->nobs, n);
    for (int i = 0; i < n->n; i++) {
        gw_obs_spec *o = &m->obs[m->nobs++];
        o->head = NAN;
        char what[200];
        const gw_ynode *it = feature_item(p, n, i, "observations", "observation", keys, &o->name, &o->src,
                                          what, sizeof what);
        if (!it) continue;
        const gw_ynode *at = gw_yrequire(p->msgs, it, "at", what);
        if (at && geom_of(p, at, "at", what, GW_GEOM_POINT, &o->at) == 0 && o->at.n == 1) {
            o->x = o->at.xy[0];
            o->y = o->at.xy[1];
        }
        if (gw_ymap_get(it, "head") && !field_of(p, gw_ymap_get(it, "head"), what, &o->head_field))
            number_of(p, it, "head", what, C_ANY, &o->head);
    }
}

static void parse_leakage(P *p, const gw_ynode *n)
{
    static const char *const keys[] = { "name", "polygon", "head", "resistance", NULL };
    gw_model *m = p->m;
    if (!gw_yis_seq(p->msgs, n, "leakage")) return;
    ALLOC_LIST(m->leakage, m->nleakage, n);
    for (int i = 0; i < n->n; i++) {
        gw_leakage_spec *l = &m->leakage[m->nleakage++];
        char what[200];
        const gw_ynode *it = feature_item(p, n, i, "leakage", "leakage", keys, &l->name, &l->src,
                                          what, sizeof what);
        if (!it) continue;
        const gw_ynode *pg = gw_ymap_get(it, "polygon");
        if (pg) geom_of(p, pg, "polygon", what, GW_GEOM_POLYGON, &l->polygon);
        number_of(p, it, "head", what, C_ANY, &l->head);
        number_of(p, it, "resistance", what, C_POSITIVE, &l->resistance);
    }
}

/* Cross-section top.  Lines are [[x, z], ...] in the section's own
 * coordinates; GIS layers have no elevation axis, so they are refused. */
static int section_line(P *p, const gw_ynode *it, const char *what, gw_path *out)
{
    const gw_ynode *l = gw_yrequire(p->msgs, it, "line", what);
    if (!l) return -1;
    if (l->kind == GW_YMAP) {
        gw_msgs_add(p->msgs, l->line, l->col,
                    "%s: line: give the line as [[x, z], ...] in section coordinates (a GIS layer "
                    "has no elevation axis)", what);
        return -1;
    }
    return geom_of(p, l, "line", what, GW_GEOM_LINE, out);
}

static int section_only(P *p, const gw_ynode *n, const char *key)
{
    if (p->m->aquifer_type == GW_SECTION) return 0;
    gw_msgs_add(p->msgs, n->line, n->col,
                "%s is for cross-sections only (aquifer.type: section); in plan view use %s", key,
                !strcmp(key, "water_table") ? "fixed_heads" : "drains");
    return -1;
}

static void parse_water_table(P *p, const gw_ynode *n)
{
    static const char *const keys[] = { "name", "line", "elevation", NULL };
    gw_model *m = p->m;
    if (section_only(p, n, "water_table") < 0 || !gw_yis_map(p->msgs, n, "water_table")) return;
    gw_ycheck_keys(p->msgs, n, "water_table", keys);
    m->water_table = calloc(1, sizeof *m->water_table);
    if (!m->water_table) { gw_msgs_add(p->msgs, n->line, n->col, "out of memory"); return; }
    gw_water_table_spec *w = m->water_table;
    w->src = src_of(p, n);
    const gw_ynode *nm = gw_ymap_get(n, "name");
    if (nm) gw_yget_string(p->msgs, nm, "water_table: name", &w->name);
    else if (!(w->name = strdup("Water table"))) gw_msgs_add(p->msgs, n->line, n->col, "out of memory");
    section_line(p, n, "water_table", &w->line);
    if (gw_ymap_get(n, "elevation")) values_of(p, n, "elevation", "water_table", C_ANY, &w->elevation);
    if (w->elevation.field)
        gw_msgs_add(p->msgs, w->elevation.src.line, w->elevation.src.col,
                    "water_table: elevation: give numbers (one, or one per vertex), not a layer field");
}

static void parse_seepage(P *p, const gw_ynode *n)
{
    static const char *const keys[] = { "name", "line", "elevation", NULL };
    gw_model *m = p->m;
    if (section_only(p, n, "seepage") < 0 || !gw_yis_seq(p->msgs, n, "seepage")) return;
    ALLOC_LIST(m->seepage, m->nseepage, n);
    for (int i = 0; i < n->n; i++) {
        gw_seepage_spec *s = &m->seepage[m->nseepage++];
        char what[200];
        const gw_ynode *it = feature_item(p, n, i, "seepage", "seepage face", keys, &s->name, &s->src,
                                          what, sizeof what);
        if (!it) continue;
        if (p->name_field) {
            gw_msgs_add(p->msgs, it->line, it->col, "%s: name: give a name, not a layer field", what);
            free(p->name_field);
            p->name_field = NULL;
        }
        section_line(p, it, what, &s->line);
        number_of(p, it, "elevation", what, C_ANY, &s->elevation);
    }
}

static void parse_analysis(P *p, const gw_ynode *n)
{
    static const char *const keys[] = { "divides", "capture", "transects", NULL };
    gw_model *m = p->m;
    if (!gw_yis_map(p->msgs, n, "analysis")) return;
    gw_ycheck_keys(p->msgs, n, "analysis", keys);
    const gw_ynode *d = gw_ymap_get(n, "divides");
    if (d) gw_yget_bool(p->msgs, d, "analysis.divides", &m->divides);
    const gw_ynode *c = gw_ymap_get(n, "capture");
    if (c && gw_yis_map(p->msgs, c, "analysis.capture")) {
        static const char *const ckeys[] = { "travel_times", NULL };
        gw_ycheck_keys(p->msgs, c, "analysis.capture", ckeys);
        m->capture = 1;
        const gw_ynode *tt = gw_ymap_get(c, "travel_times");
        if (tt && gw_yis_seq(p->msgs, tt, "analysis.capture.travel_times") && tt->n > 0) {
            m->travel_times = calloc((size_t)tt->n, sizeof *m->travel_times);
            if (!m->travel_times) { gw_msgs_add(p->msgs, tt->line, tt->col, "out of memory"); return; }
            for (int i = 0; i < tt->n; i++)
                if (get_checked(p, tt->kids[i], "analysis.capture.travel_times", C_POSITIVE,
                                &m->travel_times[m->ntravel_times]) == 0)
                    m->ntravel_times++;
        }
    }
    const gw_ynode *ts = gw_ymap_get(n, "transects");
    if (ts && gw_yis_seq(p->msgs, ts, "analysis.transects")) {
        static const char *const tkeys[] = { "name", "line", NULL };
        ALLOC_LIST(m->transects, m->ntransects, ts);
        for (int i = 0; i < ts->n; i++) {
            gw_transect_spec *t = &m->transects[m->ntransects++];
            char what[200];
            const gw_ynode *it = feature_item(p, ts, i, "analysis.transects", "transect", tkeys,
                                              &t->name, &t->src, what, sizeof what);
            if (!it) continue;
            const gw_ynode *l = gw_yrequire(p->msgs, it, "line", what);
            if (l) geom_of(p, l, "line", what, GW_GEOM_LINE, &t->line);
        }
    }
}

/* output.maps: true, false, or a list of map names. */
static void parse_map_list(P *p, const gw_ynode *v)
{
    static const struct { const char *name; unsigned bit; } kinds[] = {
        {"head", GW_MAP_HEAD}, {"catchments", GW_MAP_CATCHMENTS}, {"budget", GW_MAP_BUDGET},
        {"profiles", GW_MAP_PROFILES}};
    gw_model *m = p->m;
    if (v->kind != GW_YSEQ) {
        if (gw_yget_bool(p->msgs, v, "output.maps", &m->maps) == 0) m->map_set = GW_MAP_ALL;
        return;
    }
    unsigned set = 0;
    for (int i = 0; i < v->n; i++) {
        const gw_ynode *it = v->kids[i];
        unsigned bit = 0;
        if (it->kind == GW_YSCALAR)
            for (size_t k = 0; k < sizeof kinds / sizeof kinds[0]; k++)
                if (!strcmp(it->text, kinds[k].name)) bit = kinds[k].bit;
        if (!bit) {
            gw_msgs_add(p->msgs, it->line, it->col,
                        "output.maps: unknown map '%.40s' (expected head, catchments, budget or profiles)",
                        it->kind == GW_YSCALAR ? it->text : "a list or mapping");
            continue;
        }
        set |= bit;
    }
    m->map_set = set;
    m->maps = set != 0;   /* an empty list draws nothing, like false */
}

static void parse_output(P *p, const gw_ynode *n)
{
    static const char *const keys[] = { "maps", "contour_interval", "map_width", NULL };
    gw_model *m = p->m;
    if (!gw_yis_map(p->msgs, n, "output")) return;
    gw_ycheck_keys(p->msgs, n, "output", keys);
    const gw_ynode *v;
    if ((v = gw_ymap_get(n, "maps"))) parse_map_list(p, v);
    if ((v = gw_ymap_get(n, "contour_interval")))
        get_checked(p, v, "output.contour_interval", C_POSITIVE, &m->contour_interval);
    if ((v = gw_ymap_get(n, "map_width"))) gw_yget_int(p->msgs, v, "output.map_width", 100, 20000, &m->map_width);
}

static void parse_solver(P *p, const gw_ynode *n)
{
    static const char *const keys[] = { "head_tolerance", "residual_tolerance", "max_iterations", NULL };
    gw_model *m = p->m;
    if (!gw_yis_map(p->msgs, n, "solver")) return;
    gw_ycheck_keys(p->msgs, n, "solver", keys);
    const gw_ynode *v;
    if ((v = gw_ymap_get(n, "head_tolerance"))) get_checked(p, v, "solver.head_tolerance", C_POSITIVE, &m->head_tol);
    if ((v = gw_ymap_get(n, "residual_tolerance")))
        get_checked(p, v, "solver.residual_tolerance", C_POSITIVE, &m->resid_tol);
    if ((v = gw_ymap_get(n, "max_iterations")))
        gw_yget_int(p->msgs, v, "solver.max_iterations", 1, 100000, &m->max_iter);
}

/* Names must be unique among the features reported in budgets (fixed heads,
 * streams, drains, wells, leakage), among observations, among transects. */
static void check_unique(P *p, named_t *v, int n, const char *kind)
{
    for (int i = 0; i < n; i++)
        for (int j = 0; j < i; j++)
            if (v[i].name && v[j].name && !strcmp(v[i].name, v[j].name)) {
                gw_msgs_add(p->msgs, v[i].src.line, v[i].src.col,
                            "duplicate %s name '%s' (first used at line %d)", kind, v[i].name, v[j].src.line);
                break;
            }
}

static void check_names(P *p)
{
    gw_model *m = p->m;
    int n = m->nfixed + m->nstreams + m->ndrains + m->nwells + m->nleakage + m->nseepage + 1;
    int cap = n > m->nobs ? n : m->nobs;
    if (m->ntransects > cap) cap = m->ntransects;
    named_t *v = calloc((size_t)cap + 1, sizeof *v);
    if (!v) { gw_msgs_add(p->msgs, 0, 0, "out of memory"); return; }
    int k = 0;
    for (int i = 0; i < m->nfixed; i++) v[k++] = (named_t){ m->fixed[i].name, m->fixed[i].src };
    for (int i = 0; i < m->nstreams; i++) v[k++] = (named_t){ m->streams[i].name, m->streams[i].src };
    for (int i = 0; i < m->ndrains; i++) v[k++] = (named_t){ m->drains[i].name, m->drains[i].src };
    for (int i = 0; i < m->nwells; i++) v[k++] = (named_t){ m->wells[i].name, m->wells[i].src };
    for (int i = 0; i < m->nleakage; i++) v[k++] = (named_t){ m->leakage[i].name, m->leakage[i].src };
    if (m->water_table) v[k++] = (named_t){ m->water_table->name, m->water_table->src };
    for (int i = 0; i < m->nseepage; i++) v[k++] = (named_t){ m->seepage[i].name, m->seepage[i].src };
    check_unique(p, v, k, "feature");
    for (int i = 0; i < m->nobs; i++) v[i] = (named_t){ m->obs[i].name, m->obs[i].src };
    check_unique(p, v, m->nobs, "observation");
    for (int i = 0; i < m->ntransects; i++) v[i] = (named_t){ m->transects[i].name, m->transects[i].src };
    check_unique(p, v, m->ntransects, "transect");
    free(v);
}

static void parse_root(P *p, const gw_ynode *root)
{
    static const char *const keys[] = { "title", "units", "grid", "aquifer", "recharge", "fixed_heads",
                                        "streams", "drains", "wells", "observations", "leakage",
                                        "water_table", "seepage", "analysis", "output", "solver", NULL };
    gw_model *m = p->m;
    if (!root || (root->kind == GW_YSCALAR && root->empty)) {
        gw_msgs_add(p->msgs, 1, 1, "the model file is empty (expected title, units, grid, aquifer, ...)");
        return;
    }
    if (root->kind != GW_YMAP) {
        gw_msgs_add(p->msgs, root->line, root->col,
                    "the model file must be a mapping of keys (title, units, grid, aquifer, ...), got %s",
                    root->kind == GW_YSEQ ? "a list" : "a single value");
        return;
    }
    gw_ycheck_keys(p->msgs, root, "model", keys);
    const gw_ynode *v;
    if ((v = gw_ymap_get(root, "title"))) gw_yget_string(p->msgs, v, "title", &m->title);
    if ((v = gw_yrequire(p->msgs, root, "units", "model"))) parse_units(p, v);
    if ((v = gw_yrequire(p->msgs, root, "grid", "model"))) parse_grid(p, v);
    if ((v = gw_yrequire(p->msgs, root, "aquifer", "model"))) parse_aquifer(p, v);
    if ((v = gw_ymap_get(root, "recharge"))) parse_recharge(p, v);
    if ((v = gw_ymap_get(root, "fixed_heads"))) parse_fixed(p, v);
    if ((v = gw_ymap_get(root, "streams"))) parse_streams(p, v);
    if ((v = gw_ymap_get(root, "drains"))) parse_drains(p, v);
    if ((v = gw_ymap_get(root, "wells"))) parse_wells(p, v);
    if ((v = gw_ymap_get(root, "observations"))) parse_obs(p, v);
    if ((v = gw_ymap_get(root, "leakage"))) parse_leakage(p, v);
    if ((v = gw_ymap_get(root, "water_table"))) parse_water_table(p, v);
    if ((v = gw_ymap_get(root, "seepage"))) parse_seepage(p, v);
    if ((v = gw_ymap_get(root, "analysis"))) parse_analysis(p, v);
    if ((v = gw_ymap_get(root, "output"))) parse_output(p, v);
    if ((v = gw_ymap_get(root, "solver"))) parse_solver(p, v);
    check_names(p);
    if (m->nwells > 0) m->capture = 1;
}

/* Defaults for everything a model file may leave out. */
static void set_defaults(gw_model *m)
{
    m->aquifer_type = GW_CONFINED;
    m->conductivity = (gw_property){ .kind = GW_PROP_VALUE, .value = 1.0, .band = 1, .scale = 1.0 };
    m->thickness = (gw_property){ .kind = GW_PROP_VALUE, .value = 1.0, .band = 1, .scale = 1.0 };
    m->bottom = (gw_property){ .kind = GW_PROP_VALUE, .value = 0.0, .band = 1, .scale = 1.0 };
    m->anisotropy = (gw_property){ .kind = GW_PROP_VALUE, .value = 1.0, .band = 1, .scale = 1.0 };
    m->porosity = (gw_property){ .kind = GW_PROP_VALUE, .value = 0.25, .band = 1, .scale = 1.0 };
    m->recharge = (gw_property){ .kind = GW_PROP_VALUE, .value = 0.0, .band = 1, .scale = 1.0 };
    m->divides = 1;
    m->maps = 1;
    m->map_set = GW_MAP_ALL;
    m->contour_interval = 0.0;
    m->map_width = 1400;
    /* The solver's own defaults (solver/solve.h). */
    m->head_tol = 1e-6;
    m->resid_tol = 1e-8;
    m->max_iter = 100;
}

static char *dir_of(const char *path)
{
    const char *slash = strrchr(path, '/');
    if (!slash) return strdup(".");
    if (slash == path) return strdup("/");
    return strndup(path, (size_t)(slash - path));
}

static char *title_from(const char *path)
{
    const char *b = strrchr(path, '/');
    b = b ? b + 1 : path;
    const char *dot = strrchr(b, '.');
    return dot && dot != b ? strndup(b, (size_t)(dot - b)) : strdup(b);
}

gw_model *gw_model_load_string(const char *text, const char *path, gw_error *err)
{
    if (!path) path = "(model)";
    gw_ydoc *doc = gw_ydoc_parse(text ? text : "", text ? strlen(text) : 0, path, err);
    if (!doc) return NULL;
    gw_model *m = calloc(1, sizeof *m);
    if (!m || !(m->path = strdup(path)) || !(m->dir = dir_of(path))) {
        gw_model_free(m);
        gw_ydoc_free(doc);
        gw_fail(err, "%s: out of memory", path);
        return NULL;
    }
    set_defaults(m);
    gw_msgs msgs;
    gw_msgs_init(&msgs, m->path);
    P p = { &msgs, m, NULL };
    parse_root(&p, gw_ydoc_root(doc));
    free(p.name_field);
    gw_ydoc_free(doc);
    if (!m->title) m->title = title_from(path);
    if (msgs.count) {
        gw_msgs_fail(&msgs, err);
        gw_model_free(m);
        return NULL;
    }
    gw_msgs_free(&msgs);
    if (gw_model_resolve_layers(m, err) < 0 || gw_model_check(m, err) < 0) {
        gw_model_free(m);
        return NULL;
    }
    return m;
}

gw_model *gw_model_load(const char *path, gw_error *err)
{
    char *buf = gw_model_read_text(path, GW_MAX_FILE_BYTES, err);
    if (!buf) return NULL;
    gw_model *m = gw_model_load_string(buf, path, err);
    free(buf);
    return m;
}
