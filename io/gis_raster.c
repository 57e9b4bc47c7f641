#include "gis_raster.h"

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
#include <gdalwarper.h>
#include <ogr_srs_api.h>

#include "gdal_quiet.h"
#include "gis_vector.h"

const char *gw_resample_rule_name(gw_resample_rule r)
{
    switch (r) {
    case GW_RESAMPLE_GEOMEAN: return "geometric mean";
    case GW_RESAMPLE_MEAN: return "area average";
    case GW_RESAMPLE_MAJORITY: return "majority";
    }
    return "?";
}

static GDALDatasetH open_raster(const char *path, const char *what, gw_error *err)
{
    if (access(path, R_OK) != 0) {
        gw_fail(err, "%s: cannot open raster %s: %s", what, path, strerror(errno));
        return NULL;
    }
    GDALAllRegister();
    GDALDatasetH ds = GDALOpenEx(path, GDAL_OF_RASTER | GDAL_OF_READONLY, NULL, NULL, NULL);
    if (!ds) gw_fail(err, "%s: %s is not a raster GDAL can read (%s)", what, path, gw_gdal_msg());
    return ds;
}

/* The CRS as the shortest string that names it: "EPSG:n" when it has an
 * EPSG code, WKT otherwise.  malloc'ed, or NULL when srs is NULL. */
static char *crs_string(OGRSpatialReferenceH srs)
{
    if (!srs) return NULL;
    const char *auth = OSRGetAuthorityName(srs, NULL), *code = OSRGetAuthorityCode(srs, NULL);
    if (auth && code && !strcmp(auth, "EPSG")) {
        char buf[64];
        snprintf(buf, sizeof buf, "EPSG:%s", code);
        return strdup(buf);
    }
    char *wkt = NULL;
    if (OSRExportToWkt(srs, &wkt) != OGRERR_NONE || !wkt) {
        CPLFree(wkt);
        return NULL;
    }
    char *s = strdup(wkt);
    CPLFree(wkt);
    return s;
}

int gw_raster_grid_like(const char *path, const char *what, gw_grid *g, char **crs, gw_error *err)
{
    *crs = NULL;
    CPLPushErrorHandler(CPLQuietErrorHandler);
    CPLErrorReset();
    int rc = -1;
    GDALDatasetH ds = open_raster(path, what, err);
    if (!ds) goto done;
    double gt[6];
    if (GDALGetGeoTransform(ds, gt) != CE_None) {
        gw_fail(err, "%s: raster %s has no georeferencing to take a grid from", what, path);
        goto done;
    }
    if (gt[2] != 0.0 || gt[4] != 0.0 || !(gt[1] > 0.0) || !(gt[5] < 0.0)) {
        gw_fail(err, "%s: raster %s is rotated or not north-up; a model grid must be aligned with x and y", what,
                path);
        goto done;
    }
    g->nx = GDALGetRasterXSize(ds);
    g->ny = GDALGetRasterYSize(ds);
    g->dx = gt[1];
    g->dy = -gt[5];
    g->x0 = gt[0];
    g->y0 = gt[3] + g->ny * gt[5];
    OGRSpatialReferenceH srs = GDALGetSpatialRef(ds);
    if (srs && !(*crs = crs_string(srs))) {
        gw_fail(err, "%s: cannot describe the CRS of %s", what, path);
        goto done;
    }
    rc = 0;
done:
    if (ds) GDALClose(ds);
    CPLPopErrorHandler();
    return rc;
}

/* One axis of the overlay: for model cell i along an axis, the raster
 * pixels it overlaps and by how much.  first[i], count[i] index into
 * pix[] / len[]. */
typedef struct {
    int *first, *count, *pix;
    double *len;
    int lo, hi;          /* range of raster pixels used (hi < lo: none) */
} axis_overlap;

static void axis_free(axis_overlap *a)
{
    free(a->first);
    free(a->count);
    free(a->pix);
    free(a->len);
}

/* Model cells [a0 + i*d, a0 + (i+1)*d), i < n, against raster pixels
 * [r0 + j*p, r0 + (j+1)*p), j < m.  Both measured in the same direction. */
static int axis_build(axis_overlap *a, double a0, double d, int n, double r0, double p, int m)
{
    memset(a, 0, sizeof *a);
    a->lo = m;
    a->hi = -1;
    a->first = malloc((size_t)n * sizeof *a->first);
    a->count = calloc((size_t)n, sizeof *a->count);
    if (!a->first || !a->count) return -1;
    size_t cap = (size_t)n * 2 + 16, used = 0;
    a->pix = malloc(cap * sizeof *a->pix);
    a->len = malloc(cap * sizeof *a->len);
    if (!a->pix || !a->len) return -1;
    double tol = 1e-9 * (d < p ? d : p);
    for (int i = 0; i < n; i++) {
        double lo = a0 + i * d, hi = lo + d;
        long j0 = (long)floor((lo - r0) / p), j1 = (long)ceil((hi - r0) / p) - 1;
        if (j0 < 0) j0 = 0;
        if (j1 > m - 1) j1 = m - 1;
        a->first[i] = (int)used;
        for (long j = j0; j <= j1; j++) {
            double plo = r0 + j * p, phi = plo + p;
            double ov = fmin(hi, phi) - fmax(lo, plo);
            if (ov <= tol) continue;
            if (used == cap) {
                cap *= 2;
                int *np = realloc(a->pix, cap * sizeof *np);
                if (!np) return -1;
                a->pix = np;
                double *nl = realloc(a->len, cap * sizeof *nl);
                if (!nl) return -1;
                a->len = nl;
            }
            a->pix[used] = (int)j;
            a->len[used] = ov;
            used++;
            a->count[i]++;
            if (j < a->lo) a->lo = (int)j;
            if (j > a->hi) a->hi = (int)j;
        }
    }
    return 0;
}

/* Weighted values of one cell, for the majority rule. */
typedef struct {
    double *v, *w;
    int n, cap;
} tally;

static int tally_add(tally *t, double v, double w)
{
    for (int i = 0; i < t->n; i++)
        if (t->v[i] == v) { t->w[i] += w; return 0; }
    if (t->n == t->cap) {
        int c = t->cap ? 2 * t->cap : 16;
        double *nv = realloc(t->v, (size_t)c * sizeof *nv);
        if (!nv) return -1;
        t->v = nv;
        double *nw = realloc(t->w, (size_t)c * sizeof *nw);
        if (!nw) return -1;
        t->w = nw;
        t->cap = c;
    }
    t->v[t->n] = v;
    t->w[t->n] = w;
    t->n++;
    return 0;
}

/* Warp ds to dst_wkt (the grid CRS, or its own to make it north-up) as a
 * virtual raster.  Pixels outside the source get the nodata value nd, so
 * "outside" stays visible after the warp. */
static GDALDatasetH warp_to(GDALDatasetH ds, const char *dst_wkt, int has_src_nd, double nd, const char *what,
                            const char *path, gw_error *err)
{
    const char *src_wkt = GDALGetProjectionRef(ds);
    int nb = GDALGetRasterCount(ds);
    GDALWarpOptions *wo = GDALCreateWarpOptions();
    if (!wo) { gw_fail(err, "out of memory"); return NULL; }
    wo->nBandCount = nb;
    wo->panSrcBands = CPLMalloc(sizeof(int) * (size_t)nb);
    wo->panDstBands = CPLMalloc(sizeof(int) * (size_t)nb);
    wo->padfDstNoDataReal = CPLMalloc(sizeof(double) * (size_t)nb);
    wo->padfDstNoDataImag = CPLCalloc((size_t)nb, sizeof(double));
    if (has_src_nd) {
        wo->padfSrcNoDataReal = CPLMalloc(sizeof(double) * (size_t)nb);
        wo->padfSrcNoDataImag = CPLCalloc((size_t)nb, sizeof(double));
    }
    for (int i = 0; i < nb; i++) {
        wo->panSrcBands[i] = wo->panDstBands[i] = i + 1;
        wo->padfDstNoDataReal[i] = nd;
        if (has_src_nd) wo->padfSrcNoDataReal[i] = nd;
    }
    wo->papszWarpOptions = CSLSetNameValue(wo->papszWarpOptions, "INIT_DEST", "NO_DATA");
    GDALDatasetH w = GDALAutoCreateWarpedVRT(ds, (src_wkt && *src_wkt) ? src_wkt : NULL, dst_wkt,
                                             GRA_NearestNeighbour, 0.0, wo);
    GDALDestroyWarpOptions(wo);
    if (!w) gw_fail(err, "%s: cannot reproject raster %s onto the grid: %s", what, path, gw_gdal_msg());
    return w;
}

int gw_raster_resample(const gw_raster_query *q, const gw_grid *g, const unsigned char *need, double *out,
                       gw_error *err)
{
    const char *what = q->what ? q->what : "raster";
    CPLPushErrorHandler(CPLQuietErrorHandler);
    CPLErrorReset();
    int rc = -1;
    GDALDatasetH ds = NULL, warped = NULL;
    OGRSpatialReferenceH gsrs = NULL;
    char *dst_wkt = NULL;
    axis_overlap ax, ay;
    memset(&ax, 0, sizeof ax);
    memset(&ay, 0, sizeof ay);
    double *buf = NULL;
    tally t = {0};

    ds = open_raster(q->path, what, err);
    if (!ds) goto done;
    if (q->band < 1 || q->band > GDALGetRasterCount(ds)) {
        gw_fail(err, "%s: raster %s has %d band(s); band %d was asked for", what, q->path, GDALGetRasterCount(ds),
                q->band);
        goto done;
    }
    double gt[6];
    if (GDALGetGeoTransform(ds, gt) != CE_None) {
        gw_fail(err, "%s: raster %s has no georeferencing, so it cannot be placed on the grid", what, q->path);
        goto done;
    }
    /* Decide whether the raster needs warping: another CRS, or not north-up. */
    OGRSpatialReferenceH rsrs = GDALGetSpatialRef(ds);
    int need_warp = gt[2] != 0.0 || gt[4] != 0.0 || !(gt[1] > 0.0) || !(gt[5] < 0.0);
    if (q->grid_crs && *q->grid_crs) {
        gw_error e2;
        gsrs = gw_gis_srs(q->grid_crs, &e2);
        if (!gsrs) { gw_fail(err, "%s: grid.crs %s", what, e2.msg); goto done; }
        if (!rsrs) {
            gw_fail(err, "%s: raster %s has no coordinate reference system while the grid is in %s; "
                         "set the raster's CRS in your GIS (the grid cannot know where it lies)",
                    what, q->path, q->grid_crs);
            goto done;
        }
        if (!OSRIsSame(rsrs, gsrs)) {
            need_warp = 1;
            if (OSRExportToWkt(gsrs, &dst_wkt) != OGRERR_NONE) {
                gw_fail(err, "%s: cannot describe grid.crs %s", what, q->grid_crs);
                goto done;
            }
        }
    } else if (rsrs && OSRIsGeographic(rsrs)) {
        gw_fail(err, "%s: raster %s is in geographic coordinates (degrees) but the grid has no crs; give grid.crs",
                what, q->path);
        goto done;
    }
    GDALRasterBandH band = GDALGetRasterBand(ds, q->band);
    int has_nd = 0;
    double nd = GDALGetRasterNoDataValue(band, &has_nd);
    if (need_warp) {
        /* A nodata value must exist to tell "outside the source" from data. */
        int src_nd = has_nd;
        if (!has_nd) {
            has_nd = 1;
            nd = -3.0e38;
        }
        const char *src_wkt = GDALGetProjectionRef(ds);
        warped = warp_to(ds, dst_wkt ? dst_wkt : (src_wkt && *src_wkt ? src_wkt : NULL), src_nd, nd, what,
                         q->path, err);
        if (!warped) goto done;
        band = GDALGetRasterBand(warped, q->band);
        if (GDALGetGeoTransform(warped, gt) != CE_None) {
            gw_fail(err, "%s: cannot reproject raster %s onto the grid", what, q->path);
            goto done;
        }
    }
    GDALDatasetH src = warped ? warped : ds;
    int W = GDALGetRasterXSize(src), H = GDALGetRasterYSize(src);
    double px = gt[1], py = -gt[5], rx0 = gt[0], rytop = gt[3];

    /* x grows east on both; y is measured downwards from each top edge so
     * model rows and raster rows both count from the north. */
    double ytop = gw_grid_ytop(g);
    if (axis_build(&ax, g->x0, g->dx, g->nx, rx0, px, W) != 0 ||
        axis_build(&ay, rytop - ytop, g->dy, g->ny, 0.0, py, H) != 0) {
        gw_fail(err, "out of memory");
        goto done;
    }
    double area = g->dx * g->dy;
    int wx0 = ax.lo, wx1 = ax.hi;
    int wn = wx1 >= wx0 ? wx1 - wx0 + 1 : 0;
    for (int r = 0; r < g->ny; r++) {
        int rows_here = ay.count[r];
        int ry0 = rows_here ? ay.pix[ay.first[r]] : 0;
        int ry1 = rows_here ? ay.pix[ay.first[r] + rows_here - 1] : -1;
        int need_row = 0;
        for (int c = 0; c < g->nx && !need_row; c++) need_row = !need || need[(size_t)r * g->nx + c];
        if (!need_row) continue;
        int nrows = ry1 - ry0 + 1;
        if (rows_here && wn > 0) {
            free(buf);
            buf = malloc((size_t)wn * (size_t)nrows * sizeof *buf);
            if (!buf) { gw_fail(err, "out of memory reading %s", q->path); goto done; }
            if (GDALRasterIO(band, GF_Read, wx0, ry0, wn, nrows, buf, wn, nrows, GDT_Float64, 0, 0) != CE_None) {
                gw_fail(err, "%s: read error in raster %s: %s", what, q->path, gw_gdal_msg());
                goto done;
            }
        }
        for (int c = 0; c < g->nx; c++) {
            size_t k = (size_t)r * g->nx + c;
            int needed = !need || need[k];
            double sw = 0.0, swv = 0.0, wnd = 0.0, ref = NAN;
            t.n = 0;
            int bad_value = 0;
            double badv = 0.0;
            for (int a = 0; a < ay.count[r] && wn > 0; a++) {
                int j = ay.pix[ay.first[r] + a];
                double ly = ay.len[ay.first[r] + a];
                const double *row = buf + (size_t)(j - ry0) * wn;
                for (int b = 0; b < ax.count[c]; b++) {
                    int i = ax.pix[ax.first[c] + b];
                    double w = ly * ax.len[ax.first[c] + b];
                    double v = row[i - wx0];
                    if (isnan(v) || (has_nd && v == nd)) { wnd += w; continue; }
                    switch (q->rule) {
                    case GW_RESAMPLE_GEOMEAN:
                        /* logs taken relative to the first value, so a cell
                         * covered by one value gets exactly that value */
                        if (!(v > 0.0)) { bad_value = 1; badv = v; }
                        else {
                            if (isnan(ref)) ref = v;
                            swv += w * log(v / ref);
                        }
                        break;
                    case GW_RESAMPLE_MEAN: swv += w * v; break;
                    case GW_RESAMPLE_MAJORITY:
                        if (tally_add(&t, v, w) != 0) { gw_fail(err, "out of memory"); goto done; }
                        break;
                    }
                    sw += w;
                }
            }
            double xc = gw_grid_xc(g, c), yc = gw_grid_yc(g, r);
            if (sw < 0.5 * area) {
                if (!needed) continue;
                if (q->missing_ok) { out[k] = NAN; continue; }
                if (wnd > 0.0 && wnd + sw > 0.5 * area)
                    gw_fail(err, "%s: cell col %d, row %d (x %.10g, y %.10g) lies on nodata in raster %s "
                                 "(%.0f%% of the cell); fill the gap or make the cell inactive",
                            what, c, r, xc, yc, q->path, 100.0 * wnd / area);
                else
                    gw_fail(err, "%s: raster %s does not cover the grid: cell col %d, row %d (x %.10g, y %.10g) "
                                 "lies outside it",
                            what, q->path, c, r, xc, yc);
                goto done;
            }
            if (bad_value) {
                if (!needed) continue;
                gw_fail(err, "%s: raster %s holds %g under cell col %d, row %d (x %.10g, y %.10g); the %s needs "
                             "values greater than zero",
                        what, q->path, badv, c, r, xc, yc, gw_resample_rule_name(q->rule));
                goto done;
            }
            double v;
            if (q->rule == GW_RESAMPLE_GEOMEAN) v = ref * exp(swv / sw);
            else if (q->rule == GW_RESAMPLE_MEAN) v = swv / sw;
            else {
                /* Largest covered area wins; ties go to the larger value so
                 * the result does not depend on reading order. */
                int best = 0;
                for (int i = 1; i < t.n; i++)
                    if (t.w[i] > t.w[best] * (1 + 1e-12) ||
                        (fabs(t.w[i] - t.w[best]) <= 1e-12 * t.w[best] && t.v[i] > t.v[best]))
                        best = i;
                v = t.v[best];
            }
            out[k] = v * q->scale;
        }
    }
    rc = 0;
done:
    free(buf);
    free(t.v);
    free(t.w);
    axis_free(&ax);
    axis_free(&ay);
    if (warped) GDALClose(warped);
    if (ds) GDALClose(ds);
    if (gsrs) gw_gis_srs_free(gsrs);
    CPLFree(dst_wkt);
    CPLPopErrorHandler();
    return rc;
}
