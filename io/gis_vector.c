#include "gis_vector.h"

#include <errno.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <cpl_conv.h>
#include <cpl_error.h>
#include <gdal.h>
#include <ogr_api.h>
#include <ogr_srs_api.h>

#include "gdal_quiet.h"

void *gw_gis_srs(const char *crs, gw_error *err)
{
    OGRSpatialReferenceH srs = OSRNewSpatialReference(NULL);
    if (!srs) { gw_fail(err, "out of memory"); return NULL; }
    gw_gdal_quiet_begin();
    OGRErr e = OSRSetFromUserInput(srs, crs);
    if (e != OGRERR_NONE)
        gw_fail(err, "\"%s\" is not a coordinate reference system GDAL recognises (%s)", crs, gw_gdal_msg());
    gw_gdal_quiet_end();
    if (e != OGRERR_NONE) {
        OSRDestroySpatialReference(srs);
        return NULL;
    }
    /* x = easting/longitude, y = northing/latitude, whatever the authority says. */
    OSRSetAxisMappingStrategy(srs, OAMS_TRADITIONAL_GIS_ORDER);
    return srs;
}

void gw_gis_srs_free(void *srs)
{
    if (srs) OSRDestroySpatialReference((OGRSpatialReferenceH)srs);
}

void gw_vfeatures_free(gw_vfeature *f, int n)
{
    if (!f) return;
    for (int i = 0; i < n; i++) {
        free(f[i].name);
        free(f[i].xy);
        free(f[i].values);
    }
    free(f);
}

static const char *kind_word(gw_vgeom k)
{
    return k == GW_VGEOM_POINT ? "a point" : k == GW_VGEOM_LINE ? "a line" : "a polygon";
}

/* Names of the layers in ds, for "no layer X (layers here: a, b)". */
static void list_layers(GDALDatasetH ds, char *buf, size_t cap)
{
    buf[0] = 0;
    size_t len = 0;
    int n = GDALDatasetGetLayerCount(ds);
    for (int i = 0; i < n && len + 4 < cap; i++) {
        const char *nm = OGR_L_GetName(GDALDatasetGetLayer(ds, i));
        int w = snprintf(buf + len, cap - len, "%s%s", i ? ", " : "", nm ? nm : "?");
        if (w < 0) break;
        len += (size_t)w;
        if (len >= cap) { len = cap - 1; break; }
    }
    if (n == 0) snprintf(buf, cap, "none");
}

static void list_fields(OGRFeatureDefnH defn, char *buf, size_t cap)
{
    buf[0] = 0;
    size_t len = 0;
    int n = OGR_FD_GetFieldCount(defn);
    for (int i = 0; i < n && len + 4 < cap; i++) {
        int w = snprintf(buf + len, cap - len, "%s%s", i ? ", " : "",
                         OGR_Fld_GetNameRef(OGR_FD_GetFieldDefn(defn, i)));
        if (w < 0) break;
        len += (size_t)w;
        if (len >= cap) { len = cap - 1; break; }
    }
    if (n == 0) snprintf(buf, cap, "none");
}

/* Strict decimal number from a text attribute. */
static int text_number(const char *s, double *out)
{
    if (!s) return -1;
    while (*s == ' ') s++;
    if (!*s) return -1;
    char *end = NULL;
    errno = 0;
    double v = strtod(s, &end);
    while (end && *end == ' ') end++;
    if (errno || !end || *end || !isfinite(v)) return -1;
    *out = v;
    return 0;
}

/* Bring g (owned) down to the single part of the expected kind: curves are
 * turned into vertices, one-part multi geometries unwrapped.  Returns the
 * simple geometry (owned) or NULL with a reason in *why. */
static OGRGeometryH simplify_geom(OGRGeometryH g, gw_vgeom kind, const char **why, int *parts)
{
    *parts = 1;
    if (OGR_G_HasCurveGeometry(g, TRUE)) {
        OGRGeometryH lin = OGR_G_GetLinearGeometry(g, 0.0, NULL);
        OGR_G_DestroyGeometry(g);
        g = lin;
        if (!g) { *why = "its curves could not be turned into vertices"; return NULL; }
    }
    OGRwkbGeometryType t = wkbFlatten(OGR_G_GetGeometryType(g));
    if (t == wkbMultiPoint || t == wkbMultiLineString || t == wkbMultiPolygon) {
        int np = OGR_G_GetGeometryCount(g);
        if (np != 1) {
            *parts = np;
            *why = "multi";
            OGR_G_DestroyGeometry(g);
            return NULL;
        }
        OGRGeometryH part = OGR_G_Clone(OGR_G_GetGeometryRef(g, 0));
        OGR_G_DestroyGeometry(g);
        g = part;
        if (!g) { *why = "out of memory"; return NULL; }
        t = wkbFlatten(OGR_G_GetGeometryType(g));
    }
    int ok = (kind == GW_VGEOM_POINT && t == wkbPoint) || (kind == GW_VGEOM_LINE && t == wkbLineString) ||
             (kind == GW_VGEOM_POLYGON && t == wkbPolygon);
    if (!ok) {
        *why = OGRGeometryTypeToName(t);
        OGR_G_DestroyGeometry(g);
        return NULL;
    }
    return g;
}

/* Vertices of a simple geometry into f->xy.  Returns 0 or -1 with a reason. */
static int take_vertices(OGRGeometryH g, gw_vgeom kind, gw_vfeature *f, const char **why)
{
    OGRGeometryH src = g;
    if (kind == GW_VGEOM_POLYGON) {
        if (OGR_G_GetGeometryCount(g) > 1) { *why = "has holes (inner rings), which are not supported"; return -1; }
        src = OGR_G_GetGeometryRef(g, 0);
        if (!src) { *why = "is empty"; return -1; }
    }
    int n = OGR_G_GetPointCount(src);
    int need = kind == GW_VGEOM_POINT ? 1 : kind == GW_VGEOM_LINE ? 2 : 4;
    if (n < need) {
        *why = kind == GW_VGEOM_POINT ? "is empty"
             : kind == GW_VGEOM_LINE ? "has fewer than 2 vertices"
                                     : "has fewer than 3 distinct vertices";
        return -1;
    }
    f->xy = malloc((size_t)n * 2 * sizeof *f->xy);
    if (!f->xy) { *why = "out of memory"; return -1; }
    for (int i = 0; i < n; i++) {
        f->xy[2 * i] = OGR_G_GetX(src, i);
        f->xy[2 * i + 1] = OGR_G_GetY(src, i);
        if (!isfinite(f->xy[2 * i]) || !isfinite(f->xy[2 * i + 1])) {
            *why = "has a vertex that is not a finite number";
            return -1;
        }
    }
    f->n = n;
    return 0;
}

/* Decide whether coordinates must be transformed; *ct stays NULL when not. */
static int plan_transform(const gw_vquery *q, OGRLayerH lyr, const char *lname, OGRCoordinateTransformationH *ct,
                          gw_error *err)
{
    *ct = NULL;
    OGRSpatialReferenceH lsrs = OGR_L_GetSpatialRef(lyr);   /* owned by the layer */
    /* GeoPackage stores "no CRS" as one of two placeholder systems. */
    const char *sname = lsrs ? OSRGetName(lsrs) : NULL;
    if (sname && !strncmp(sname, "Undefined ", 10)) lsrs = NULL;
    int have_target = q->target_crs && *q->target_crs;
    if (!have_target) {
        if (lsrs && OSRIsGeographic(lsrs))
            return gw_fail(err, "%s: layer '%s' of %s is in geographic coordinates (degrees) but the grid has no "
                                "crs; give grid.crs so the layer can be reprojected",
                           q->what, lname, q->file);
        return 0;   /* no CRS to compare with: coordinates are taken as they are */
    }
    if (!lsrs) {
        if (q->assume_crs) return 0;
        return gw_fail(err, "%s: layer '%s' of %s has no coordinate reference system while the grid is in %s; "
                            "fix the layer, or add assume_crs: true if its coordinates are already in the grid's CRS",
                       q->what, lname, q->file, q->target_crs);
    }
    gw_error e2;
    OGRSpatialReferenceH dst = gw_gis_srs(q->target_crs, &e2);
    if (!dst) return gw_fail(err, "%s: grid.crs %s", q->what, e2.msg);
    OGRSpatialReferenceH src = OSRClone(lsrs);
    if (!src) {
        OSRDestroySpatialReference(dst);
        return gw_fail(err, "out of memory");
    }
    OSRSetAxisMappingStrategy(src, OAMS_TRADITIONAL_GIS_ORDER);
    int rc = 0;
    if (!OSRIsSame(src, dst)) {
        *ct = OCTNewCoordinateTransformation(src, dst);
        if (!*ct)
            rc = gw_fail(err, "%s: cannot reproject layer '%s' of %s to %s: %s", q->what, lname, q->file,
                         q->target_crs, gw_gdal_msg());
    }
    OSRDestroySpatialReference(src);
    OSRDestroySpatialReference(dst);
    return rc;
}

/* Read one feature into f.  Returns 0, or -1 with err filled. */
static int read_feature(const gw_vquery *q, const char *lname, OGRFeatureH feat, const int *fidx, int name_idx,
                        OGRCoordinateTransformationH ct, gw_vfeature *f, gw_error *err)
{
    f->fid = (long)OGR_F_GetFID(feat);
    if (name_idx >= 0) {
        if (!OGR_F_IsFieldSetAndNotNull(feat, name_idx) || !*OGR_F_GetFieldAsString(feat, name_idx))
            return gw_fail(err, "%s: feature %ld of layer '%s' in %s has no name in field '%s'", q->what, f->fid,
                           lname, q->file, q->name_field);
        f->name = strdup(OGR_F_GetFieldAsString(feat, name_idx));
        if (!f->name) return gw_fail(err, "out of memory");
    }
    if (q->nfields > 0) {
        f->values = malloc((size_t)q->nfields * sizeof *f->values);
        if (!f->values) return gw_fail(err, "out of memory");
        for (int j = 0; j < q->nfields; j++) {
            int i = fidx[j];
            if (!OGR_F_IsFieldSetAndNotNull(feat, i)) { f->values[j] = NAN; continue; }
            OGRFieldType ft = OGR_Fld_GetType(OGR_F_GetFieldDefnRef(feat, i));
            if (ft == OFTInteger || ft == OFTInteger64 || ft == OFTReal) {
                f->values[j] = OGR_F_GetFieldAsDouble(feat, i);
            } else if (ft != OFTString || text_number(OGR_F_GetFieldAsString(feat, i), &f->values[j]) != 0) {
                return gw_fail(err, "%s: feature %ld of layer '%s' in %s: field '%s' holds \"%s\", not a number",
                               q->what, f->fid, lname, q->file, q->fields[j], OGR_F_GetFieldAsString(feat, i));
            }
            if (!isfinite(f->values[j]))
                return gw_fail(err, "%s: feature %ld of layer '%s' in %s: field '%s' is not a finite number",
                               q->what, f->fid, lname, q->file, q->fields[j]);
        }
    }
    OGRGeometryH g0 = OGR_F_GetGeometryRef(feat);
    if (!g0 || OGR_G_IsEmpty(g0))
        return gw_fail(err, "%s: feature %ld of layer '%s' in %s has no geometry", q->what, f->fid, lname, q->file);
    OGRGeometryH g = OGR_G_Clone(g0);
    if (!g) return gw_fail(err, "out of memory");
    const char *why = NULL;
    int parts = 1;
    g = simplify_geom(g, q->kind, &why, &parts);
    if (!g) {
        if (why && !strcmp(why, "multi"))
            return gw_fail(err, "%s: feature %ld of layer '%s' in %s has %d parts; %s must be one piece "
                                "(split it into separate features)",
                           q->what, f->fid, lname, q->file, parts, kind_word(q->kind));
        return gw_fail(err, "%s: feature %ld of layer '%s' in %s is a %s, expected %s", q->what, f->fid, lname,
                       q->file, why ? why : "?", kind_word(q->kind));
    }
    int rc = 0;
    if (ct && OGR_G_Transform(g, ct) != OGRERR_NONE)
        rc = gw_fail(err, "%s: feature %ld of layer '%s' in %s could not be reprojected to %s: %s", q->what, f->fid,
                     lname, q->file, q->target_crs, gw_gdal_msg());
    if (rc == 0 && take_vertices(g, q->kind, f, &why) != 0)
        rc = gw_fail(err, "%s: feature %ld of layer '%s' in %s %s", q->what, f->fid, lname, q->file, why);
    OGR_G_DestroyGeometry(g);
    return rc;
}

int gw_vector_read(const gw_vquery *q, gw_vfeature **out, int *nout, gw_error *err)
{
    *out = NULL;
    *nout = 0;
    const char *what = q->what ? q->what : "layer";
    if (!q->file || !*q->file) return gw_fail(err, "%s: no file given", what);
    if (access(q->file, R_OK) != 0)
        return gw_fail(err, "%s: cannot open %s: %s", what, q->file, strerror(errno));

    GDALAllRegister();
    gw_gdal_quiet_begin();
    int rc = -1;
    gw_vfeature *fs = NULL;
    int nf = 0, cap = 0;
    int *fidx = NULL;
    OGRCoordinateTransformationH ct = NULL;
    GDALDatasetH ds = GDALOpenEx(q->file, GDAL_OF_VECTOR | GDAL_OF_READONLY, NULL, NULL, NULL);
    if (!ds) {
        gw_fail(err, "%s: %s is not a vector file GDAL can read (%s)", what, q->file, gw_gdal_msg());
        goto done;
    }
    OGRLayerH lyr = NULL;
    char names[512];
    if (q->layer && *q->layer) {
        lyr = GDALDatasetGetLayerByName(ds, q->layer);
        if (!lyr) {
            list_layers(ds, names, sizeof names);
            gw_fail(err, "%s: %s has no layer '%s' (layers there: %s)", what, q->file, q->layer, names);
            goto done;
        }
    } else {
        if (GDALDatasetGetLayerCount(ds) != 1) {
            list_layers(ds, names, sizeof names);
            gw_fail(err, "%s: %s holds %d layers; say which with layer: (layers there: %s)", what, q->file,
                    GDALDatasetGetLayerCount(ds), names);
            goto done;
        }
        lyr = GDALDatasetGetLayer(ds, 0);
    }
    const char *lname = OGR_L_GetName(lyr);
    OGRFeatureDefnH defn = OGR_L_GetLayerDefn(lyr);

    int name_idx = -1;
    if (q->name_field) {
        name_idx = OGR_FD_GetFieldIndex(defn, q->name_field);
        if (name_idx < 0) {
            list_fields(defn, names, sizeof names);
            gw_fail(err, "%s: layer '%s' of %s has no field '%s' (fields: %s)", what, lname, q->file, q->name_field,
                    names);
            goto done;
        }
    }
    if (q->nfields > 0) {
        fidx = malloc((size_t)q->nfields * sizeof *fidx);
        if (!fidx) { gw_fail(err, "out of memory"); goto done; }
        for (int j = 0; j < q->nfields; j++) {
            fidx[j] = OGR_FD_GetFieldIndex(defn, q->fields[j]);
            if (fidx[j] < 0) {
                list_fields(defn, names, sizeof names);
                gw_fail(err, "%s: layer '%s' of %s has no field '%s' (fields: %s)", what, lname, q->file,
                        q->fields[j], names);
                goto done;
            }
        }
    }
    if (q->where && *q->where && OGR_L_SetAttributeFilter(lyr, q->where) != OGRERR_NONE) {
        gw_fail(err, "%s: where \"%s\" is not a valid filter for layer '%s' of %s (%s)", what, q->where, lname,
                q->file, gw_gdal_msg());
        goto done;
    }
    gw_vquery qq = *q;
    qq.what = what;
    if (plan_transform(&qq, lyr, lname, &ct, err) != 0) goto done;

    OGR_L_ResetReading(lyr);
    OGRFeatureH feat;
    while ((feat = OGR_L_GetNextFeature(lyr)) != NULL) {
        if (nf == cap) {
            int nc = cap ? 2 * cap : 8;
            gw_vfeature *p = realloc(fs, (size_t)nc * sizeof *p);
            if (!p) { OGR_F_Destroy(feat); gw_fail(err, "out of memory"); goto done; }
            fs = p;
            cap = nc;
        }
        memset(&fs[nf], 0, sizeof fs[nf]);
        nf++;
        int r = read_feature(&qq, lname, feat, fidx, name_idx, ct, &fs[nf - 1], err);
        OGR_F_Destroy(feat);
        if (r != 0) goto done;
    }
    if (CPLGetLastErrorType() >= CE_Failure) {
        if (q->where && *q->where)   /* some drivers check the filter only when reading */
            gw_fail(err, "%s: where \"%s\" is not a valid filter for layer '%s' of %s (%s)", what, q->where, lname,
                    q->file, gw_gdal_msg());
        else
            gw_fail(err, "%s: error while reading layer '%s' of %s: %s", what, lname, q->file, gw_gdal_msg());
        goto done;
    }
    if (nf == 0) {
        if (q->where && *q->where)
            gw_fail(err, "%s: where \"%s\" selects no features in layer '%s' of %s", what, q->where, lname, q->file);
        else
            gw_fail(err, "%s: layer '%s' of %s has no features", what, lname, q->file);
        goto done;
    }
    rc = 0;
done:
    if (ct) OCTDestroyCoordinateTransformation(ct);
    if (ds) GDALClose(ds);
    gw_gdal_quiet_end();
    free(fidx);
    if (rc == 0) {
        *out = fs;
        *nout = nf;
    } else {
        gw_vfeatures_free(fs, nf);
    }
    return rc;
}
