#include "results_gpkg.h"

#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <cpl_conv.h>
#include <cpl_error.h>
#include <cpl_string.h>
#include <gdal.h>
#include <gdal_alg.h>
#include <ogr_api.h>
#include <ogr_srs_api.h>

#include "gdal_quiet.h"

struct gw_gpkg {
    char *path;
    GDALDatasetH ds;
    OGRSpatialReferenceH srs;     /* NULL: no CRS */
    OGRLayerH layer;              /* current layer */
    gw_vgeom kind;
    int nfields;
    int in_tx;                    /* a transaction is open */
};

void gw_field_unit(const char *unit, char *buf, size_t len)
{
    size_t j = 0;
    if (!len) return;
    for (const char *s = unit ? unit : ""; *s && j + 1 < len; s++) {
        if (*s == ' ') continue;
        if (*s == '/') {
            while (j > 0 && buf[j - 1] == '_') j--;
            const char *w = "_per_";
            for (; *w && j + 1 < len; w++) buf[j++] = *w;
        } else if ((*s >= 'a' && *s <= 'z') || (*s >= 'A' && *s <= 'Z') || (*s >= '0' && *s <= '9')) {
            buf[j++] = *s;
        } else if (*s == '^') {
            continue;   /* m^3 -> m3 */
        } else if (j > 0 && buf[j - 1] != '_') {
            buf[j++] = '_';
        }
    }
    while (j > 0 && buf[j - 1] == '_') j--;
    buf[j] = 0;
}

gw_gpkg *gw_gpkg_create(const char *path, const char *crs, gw_error *err)
{
    if (access(path, F_OK) == 0) {
        gw_fail(err, "%s already exists; results are written to a fresh file", path);
        return NULL;
    }
    gw_gpkg *g = calloc(1, sizeof *g);
    if (!g || !(g->path = strdup(path))) {
        free(g);
        gw_fail(err, "out of memory");
        return NULL;
    }
    if (crs && *crs && !(g->srs = gw_gis_srs(crs, err))) {
        gw_fail_prefix(err, "grid.crs: ");
        free(g->path);
        free(g);
        return NULL;
    }
    GDALAllRegister();
    CPLPushErrorHandler(CPLQuietErrorHandler);
    CPLErrorReset();
    GDALDriverH drv = GDALGetDriverByName("GPKG");
    if (drv) g->ds = GDALCreate(drv, path, 0, 0, 0, GDT_Unknown, NULL);
    if (!g->ds) gw_fail(err, "cannot create %s: %s", path, drv ? gw_gdal_msg() : "GDAL has no GeoPackage driver");
    CPLPopErrorHandler();
    if (!g->ds) {
        gw_gis_srs_free(g->srs);
        free(g->path);
        free(g);
        unlink(path);
        return NULL;
    }
    return g;
}

static int commit(gw_gpkg *g, gw_error *err)
{
    if (!g->in_tx) return 0;
    g->in_tx = 0;
    if (GDALDatasetCommitTransaction(g->ds) != OGRERR_NONE)
        return gw_fail(err, "cannot write %s: %s", g->path, gw_gdal_msg());
    return 0;
}

static OGRwkbGeometryType layer_type(gw_vgeom k)
{
    return k == GW_VGEOM_POINT ? wkbPoint : k == GW_VGEOM_LINE ? wkbMultiLineString : wkbMultiPolygon;
}

/* Create a layer with geometry type t and the given fields. */
static int make_layer(gw_gpkg *g, const char *name, OGRwkbGeometryType t, const gw_field *fields, int nfields,
                      const char *description, gw_error *err)
{
    if (commit(g, err) != 0) return -1;
    char **opts = NULL;
    if (description) opts = CSLSetNameValue(opts, "DESCRIPTION", description);
    opts = CSLSetNameValue(opts, "SPATIAL_INDEX", "YES");
    CPLErrorReset();
    g->layer = GDALDatasetCreateLayer(g->ds, name, g->srs, t, opts);
    CSLDestroy(opts);
    if (!g->layer) return gw_fail(err, "cannot create layer %s in %s: %s", name, g->path, gw_gdal_msg());
    for (int i = 0; i < nfields; i++) {
        OGRFieldType ft = fields[i].type == GW_FIELD_INT ? OFTInteger64
                        : fields[i].type == GW_FIELD_REAL ? OFTReal : OFTString;
        OGRFieldDefnH fd = OGR_Fld_Create(fields[i].name, ft);
        OGRErr e = OGR_L_CreateField(g->layer, fd, TRUE);
        OGR_Fld_Destroy(fd);
        if (e != OGRERR_NONE)
            return gw_fail(err, "cannot add field %s to layer %s: %s", fields[i].name, name, gw_gdal_msg());
    }
    g->nfields = nfields;
    if (GDALDatasetStartTransaction(g->ds, FALSE) == OGRERR_NONE) g->in_tx = 1;
    return 0;
}

int gw_gpkg_layer(gw_gpkg *g, const char *name, gw_vgeom kind, const gw_field *fields, int nfields,
                  const char *description, gw_error *err)
{
    CPLPushErrorHandler(CPLQuietErrorHandler);
    g->kind = kind;
    int rc = make_layer(g, name, layer_type(kind), fields, nfields, description, err);
    CPLPopErrorHandler();
    return rc;
}

static OGRGeometryH ring_of(const double *xy, int n, int polygon)
{
    OGRGeometryH r = OGR_G_CreateGeometry(polygon ? wkbLinearRing : wkbLineString);
    if (!r) return NULL;
    for (int i = 0; i < n; i++) OGR_G_AddPoint_2D(r, xy[2 * i], xy[2 * i + 1]);
    if (polygon && n > 0 && (xy[0] != xy[2 * n - 2] || xy[1] != xy[2 * n - 1])) OGR_G_AddPoint_2D(r, xy[0], xy[1]);
    return r;
}

/* Geometry of one feature from plain parts (see gw_gpkg_add). */
static OGRGeometryH build_geom(gw_vgeom kind, const double *const *parts, const int *n, int nparts)
{
    if (kind == GW_VGEOM_POINT) {
        if (nparts < 1 || n[0] < 1) return NULL;
        OGRGeometryH p = OGR_G_CreateGeometry(wkbPoint);
        if (p) OGR_G_SetPoint_2D(p, 0, parts[0][0], parts[0][1]);
        return p;
    }
    if (kind == GW_VGEOM_LINE) {
        OGRGeometryH m = OGR_G_CreateGeometry(wkbMultiLineString);
        for (int i = 0; m && i < nparts; i++) {
            if (n[i] < 2) continue;
            OGRGeometryH l = ring_of(parts[i], n[i], 0);
            if (!l) { OGR_G_DestroyGeometry(m); return NULL; }
            OGR_G_AddGeometryDirectly(m, l);
        }
        return m;
    }
    OGRGeometryH m = OGR_G_CreateGeometry(wkbMultiPolygon);
    OGRGeometryH poly = NULL;
    for (int i = 0; m && i < nparts; i++) {
        if (n[i] < 3) continue;
        /* Shoelace sign: clockwise rings are holes of the polygon before. */
        double a2 = 0.0;
        for (int j = 0; j < n[i]; j++) {
            int k = (j + 1) % n[i];
            a2 += parts[i][2 * j] * parts[i][2 * k + 1] - parts[i][2 * k] * parts[i][2 * j + 1];
        }
        int hole = poly && a2 < 0.0;
        if (!hole) {
            if (poly) OGR_G_AddGeometryDirectly(m, poly);
            poly = OGR_G_CreateGeometry(wkbPolygon);
            if (!poly) break;
        }
        OGRGeometryH r = ring_of(parts[i], n[i], 1);
        if (!r) break;
        OGR_G_AddGeometryDirectly(poly, r);
    }
    if (poly) OGR_G_AddGeometryDirectly(m, poly);
    return m;
}

static void set_values(OGRFeatureH f, const gw_field *unused, int nfields, const gw_fvalue *vals)
{
    (void)unused;
    OGRFeatureDefnH d = OGR_F_GetDefnRef(f);
    for (int i = 0; i < nfields; i++) {
        OGRFieldType t = OGR_Fld_GetType(OGR_FD_GetFieldDefn(d, i));
        if (t == OFTInteger64 || t == OFTInteger) OGR_F_SetFieldInteger64(f, i, vals[i].i);
        else if (t == OFTReal) {
            if (isfinite(vals[i].d)) OGR_F_SetFieldDouble(f, i, vals[i].d);
            else OGR_F_SetFieldNull(f, i);
        } else if (vals[i].s) OGR_F_SetFieldString(f, i, vals[i].s);
        else OGR_F_SetFieldNull(f, i);
    }
}

int gw_gpkg_add(gw_gpkg *g, const double *const *parts, const int *n, int nparts, const gw_fvalue *vals,
                gw_error *err)
{
    if (!g->layer) return gw_fail(err, "internal error: feature added before a layer");
    CPLPushErrorHandler(CPLQuietErrorHandler);
    CPLErrorReset();
    int rc = 0;
    OGRFeatureH f = OGR_F_Create(OGR_L_GetLayerDefn(g->layer));
    OGRGeometryH geom = build_geom(g->kind, parts, n, nparts);
    if (!f || !geom) {
        rc = gw_fail(err, "out of memory");
    } else {
        OGR_F_SetGeometryDirectly(f, geom);
        geom = NULL;
        set_values(f, NULL, g->nfields, vals);
        if (OGR_L_CreateFeature(g->layer, f) != OGRERR_NONE)
            rc = gw_fail(err, "cannot write a feature of layer %s: %s", OGR_L_GetName(g->layer), gw_gdal_msg());
    }
    if (geom) OGR_G_DestroyGeometry(geom);
    if (f) OGR_F_Destroy(f);
    CPLPopErrorHandler();
    return rc;
}

/* An in-memory Float64/Int32 raster over the grid (rows from the north). */
static GDALDatasetH mem_raster(const gw_grid *grid, GDALDataType t, const void *data, double nodata)
{
    GDALDriverH drv = GDALGetDriverByName("MEM");
    if (!drv) return NULL;
    GDALDatasetH ds = GDALCreate(drv, "", grid->nx, grid->ny, 1, t, NULL);
    if (!ds) return NULL;
    double gt[6] = {grid->x0, grid->dx, 0.0, gw_grid_ytop(grid), 0.0, -grid->dy};
    GDALSetGeoTransform(ds, gt);
    GDALRasterBandH b = GDALGetRasterBand(ds, 1);
    GDALSetRasterNoDataValue(b, nodata);
    if (GDALRasterIO(b, GF_Write, 0, 0, grid->nx, grid->ny, (void *)data, grid->nx, grid->ny, t, 0, 0) != CE_None) {
        GDALClose(ds);
        return NULL;
    }
    return ds;
}

/* A round contour interval giving about 20 levels over [lo, hi]. */
static double auto_interval(double lo, double hi)
{
    double span = hi - lo;
    if (!(span > 0)) return 1.0;
    double raw = span / 20.0, p = pow(10.0, floor(log10(raw)));
    double steps[] = {1, 2, 2.5, 5, 10};
    for (int i = 0; i < 5; i++)
        if (steps[i] * p >= raw) return steps[i] * p;
    return 10 * p;
}

int gw_gpkg_contours(gw_gpkg *g, const char *name, const gw_grid *grid, const double *v, double interval,
                     const char *level_field, const char *description, gw_error *err)
{
    size_t n = gw_grid_ncells(grid);
    const double ND = -1.0e30;
    double *buf = malloc(n * sizeof *buf);
    if (!buf) return gw_fail(err, "out of memory");
    double lo = HUGE_VAL, hi = -HUGE_VAL;
    for (size_t k = 0; k < n; k++) {
        buf[k] = isfinite(v[k]) ? v[k] : ND;
        if (isfinite(v[k])) {
            if (v[k] < lo) lo = v[k];
            if (v[k] > hi) hi = v[k];
        }
    }
    if (!(interval > 0)) interval = auto_interval(lo, hi);
    /* An interval too fine for the head range (the model's
     * output.contour_interval; results.c warns) would give thousands of
     * levels: fall back to the automatic one, as the maps do. */
    if (hi > lo && (hi - lo) / interval > 400) interval = auto_interval(lo, hi);
    /* Heads so far apart that their range overflows have no sensible
     * contours: the layer is left empty. */
    int skip = !isfinite(hi - lo) || !isfinite(interval) || !(interval > 0);
    CPLPushErrorHandler(CPLQuietErrorHandler);
    CPLErrorReset();
    int rc = -1;
    GDALDatasetH mem = NULL;
    gw_field f[2] = {{"id", GW_FIELD_INT}, {level_field, GW_FIELD_REAL}};
    g->kind = GW_VGEOM_LINE;
    if (make_layer(g, name, wkbLineString, f, 2, description, err) != 0) goto done;
    if (skip) { rc = 0; goto done; }
    mem = mem_raster(grid, GDT_Float64, buf, ND);
    if (!mem) { gw_fail(err, "cannot prepare heads for contouring: %s", gw_gdal_msg()); goto done; }
    char **opts = NULL;
    char tmp[64];
    snprintf(tmp, sizeof tmp, "%.17g", interval);
    opts = CSLSetNameValue(opts, "LEVEL_INTERVAL", tmp);
    opts = CSLSetNameValue(opts, "ID_FIELD", "0");
    opts = CSLSetNameValue(opts, "ELEV_FIELD", "1");
    snprintf(tmp, sizeof tmp, "%.17g", ND);
    opts = CSLSetNameValue(opts, "NODATA", tmp);
    CPLErr e = GDALContourGenerateEx(GDALGetRasterBand(mem, 1), g->layer, opts, NULL, NULL);
    CSLDestroy(opts);
    if (e != CE_None) { gw_fail(err, "head contours: %s", gw_gdal_msg()); goto done; }
    rc = 0;
done:
    if (mem) GDALClose(mem);
    CPLPopErrorHandler();
    free(buf);
    return rc;
}

int gw_gpkg_class_polygons(gw_gpkg *g, const char *name, const gw_grid *grid, const int *cls, int nclasses,
                           const gw_field *fields, int nfields, const gw_fvalue *vals, const char *area_field,
                           const char *description, gw_error *err)
{
    size_t n = gw_grid_ncells(grid);
    int32_t *buf = malloc(n * sizeof *buf);
    gw_field *fl = malloc(((size_t)nfields + 1) * sizeof *fl);
    OGRGeometryH *multi = calloc((size_t)(nclasses > 0 ? nclasses : 1), sizeof *multi);
    if (!buf || !fl || !multi) {
        free(buf);
        free(fl);
        free(multi);
        return gw_fail(err, "out of memory");
    }
    for (size_t k = 0; k < n; k++) buf[k] = (cls[k] >= 0 && cls[k] < nclasses) ? cls[k] : -1;
    memcpy(fl, fields, (size_t)nfields * sizeof *fl);
    int nf = nfields;
    if (area_field) fl[nf++] = (gw_field){area_field, GW_FIELD_REAL};

    CPLPushErrorHandler(CPLQuietErrorHandler);
    CPLErrorReset();
    int rc = -1;
    GDALDatasetH mem = NULL, vmem = NULL;
    g->kind = GW_VGEOM_POLYGON;
    if (make_layer(g, name, wkbMultiPolygon, fl, nf, description, err) != 0) goto done;
    mem = mem_raster(grid, GDT_Int32, buf, -1.0);
    GDALDriverH vdrv = GDALGetDriverByName("Memory");
    if (vdrv) vmem = GDALCreate(vdrv, "", 0, 0, 0, GDT_Unknown, NULL);
    OGRLayerH tmp = vmem ? GDALDatasetCreateLayer(vmem, "p", NULL, wkbPolygon, NULL) : NULL;
    if (!mem || !tmp) { gw_fail(err, "cannot prepare %s: %s", name, gw_gdal_msg()); goto done; }
    OGRFieldDefnH fd = OGR_Fld_Create("cls", OFTInteger);
    OGR_L_CreateField(tmp, fd, TRUE);
    OGR_Fld_Destroy(fd);
    GDALRasterBandH band = GDALGetRasterBand(mem, 1);
    if (GDALPolygonize(band, GDALGetMaskBand(band), tmp, 0, NULL, NULL, NULL) != CE_None) {
        gw_fail(err, "%s: polygonizing failed: %s", name, gw_gdal_msg());
        goto done;
    }
    /* Gather the pieces of each class into one multipolygon. */
    OGR_L_ResetReading(tmp);
    OGRFeatureH f;
    while ((f = OGR_L_GetNextFeature(tmp)) != NULL) {
        int c = OGR_F_GetFieldAsInteger(f, 0);
        OGRGeometryH pg = OGR_F_GetGeometryRef(f);
        if (c >= 0 && c < nclasses && pg) {
            if (!multi[c]) multi[c] = OGR_G_CreateGeometry(wkbMultiPolygon);
            if (multi[c]) OGR_G_AddGeometry(multi[c], pg);
        }
        OGR_F_Destroy(f);
    }
    for (int c = 0; c < nclasses; c++) {
        if (!multi[c]) continue;
        OGRFeatureH o = OGR_F_Create(OGR_L_GetLayerDefn(g->layer));
        if (!o) { gw_fail(err, "out of memory"); goto done; }
        set_values(o, fields, nfields, vals + (size_t)c * nfields);
        if (area_field) OGR_F_SetFieldDouble(o, nfields, OGR_G_Area(multi[c]));
        OGR_F_SetGeometryDirectly(o, multi[c]);
        multi[c] = NULL;
        OGRErr e = OGR_L_CreateFeature(g->layer, o);
        OGR_F_Destroy(o);
        if (e != OGRERR_NONE) { gw_fail(err, "cannot write layer %s: %s", name, gw_gdal_msg()); goto done; }
    }
    rc = 0;
done:
    for (int c = 0; c < nclasses; c++)
        if (multi[c]) OGR_G_DestroyGeometry(multi[c]);
    if (vmem) GDALClose(vmem);
    if (mem) GDALClose(mem);
    CPLPopErrorHandler();
    free(multi);
    free(fl);
    free(buf);
    return rc;
}

static void destroy(gw_gpkg *g)
{
    gw_gis_srs_free(g->srs);
    free(g->path);
    free(g);
}

int gw_gpkg_close(gw_gpkg *g, gw_error *err)
{
    if (!g) return 0;
    CPLPushErrorHandler(CPLQuietErrorHandler);
    CPLErrorReset();
    int rc = commit(g, err);
    GDALClose(g->ds);
    if (rc == 0 && CPLGetLastErrorType() >= CE_Failure) rc = gw_fail(err, "cannot write %s: %s", g->path, gw_gdal_msg());
    CPLPopErrorHandler();
    if (rc != 0) unlink(g->path);
    destroy(g);
    return rc;
}

void gw_gpkg_abort(gw_gpkg *g)
{
    if (!g) return;
    CPLPushErrorHandler(CPLQuietErrorHandler);
    if (g->in_tx) GDALDatasetRollbackTransaction(g->ds);
    GDALClose(g->ds);
    CPLPopErrorHandler();
    unlink(g->path);
    destroy(g);
}
