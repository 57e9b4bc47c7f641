#include "map_contour.h"

#include <gdal.h>
#include <gdal_alg.h>
#include <math.h>
#include <ogr_api.h>
#include <stdlib.h>
#include <string.h>

double gw_contour_nice_interval(double hmin, double hmax, int target)
{
    double range = hmax - hmin;
    if (!(range > 0) || !isfinite(range)) return 1.0;
    if (target < 2) target = 2;
    double raw = range / target;
    double p = pow(10.0, floor(log10(raw)));
    static const double steps[] = {1, 2, 2.5, 5, 10};
    double best = p * 10, bestd = HUGE_VAL;
    for (int i = 0; i < 5; i++) {
        double d = fabs(log(steps[i] * p / raw));
        if (d < bestd) { bestd = d; best = steps[i] * p; }
    }
    return best;
}

long gw_contour_index(double level, double interval)
{
    return lround(level / interval);
}

int gw_contour_major_every(double interval)
{
    if (!(interval > 0)) return 5;
    double m = interval / pow(10.0, floor(log10(interval) + 1e-9));
    if (fabs(m - 2.5) < 1e-6) return 4;
    if (fabs(m - 5.0) < 1e-6) return 2;
    return 5;
}

void gw_contour_set_free(gw_contour_set *s)
{
    if (!s) return;
    for (int i = 0; i < s->nlines; i++) free(s->line[i].xy);
    free(s->line);
    s->line = NULL;
    s->nlines = 0;
}

static int add_line(gw_contour_set *s, int *cap, double level, OGRGeometryH geom, gw_error *err)
{
    int n = OGR_G_GetPointCount(geom);
    if (n < 2) return 0;
    if (s->nlines == *cap) {
        int nc = *cap ? 2 * *cap : 64;
        gw_contour_line *nl = realloc(s->line, (size_t)nc * sizeof *nl);
        if (!nl) return gw_fail(err, "out of memory tracing contours");
        s->line = nl;
        *cap = nc;
    }
    gw_contour_line *L = &s->line[s->nlines];
    L->xy = malloc((size_t)n * 2 * sizeof(double));
    if (!L->xy) return gw_fail(err, "out of memory tracing contours");
    for (int i = 0; i < n; i++) {
        L->xy[2 * i] = OGR_G_GetX(geom, i);
        L->xy[2 * i + 1] = OGR_G_GetY(geom, i);
    }
    L->n = n;
    L->level = level;
    L->closed = (L->xy[0] == L->xy[2 * n - 2] && L->xy[1] == L->xy[2 * n - 1]);
    s->nlines++;
    return 0;
}

int gw_contour_trace(const gw_grid *g, const double *head, double interval,
                     gw_contour_set *out, gw_error *err)
{
    memset(out, 0, sizeof *out);
    out->interval = interval;
    if (!(interval > 0) || !isfinite(interval))
        return gw_fail(err, "contour interval must be positive (got %g)", interval);

    const double NODATA = -1.0e30;
    double hmin = HUGE_VAL, hmax = -HUGE_VAL;
    size_t nc = gw_grid_ncells(g);
    for (size_t k = 0; k < nc; k++)
        if (isfinite(head[k])) {
            if (head[k] < hmin) hmin = head[k];
            if (head[k] > hmax) hmax = head[k];
        }
    if (!(hmax > hmin)) return 0;   /* flat or empty field: no contours */
    if ((hmax - hmin) / interval > 5000)
        return gw_fail(err, "contour interval %g is too small for a head range of %g", interval,
                       hmax - hmin);

    GDALAllRegister();
    GDALDriverH mem = GDALGetDriverByName("MEM");
    GDALDriverH vmem = GDALGetDriverByName("Memory");
    if (!mem || !vmem) return gw_fail(err, "GDAL has no in-memory drivers");

    GDALDatasetH ras = GDALCreate(mem, "", g->nx, g->ny, 1, GDT_Float64, NULL);
    GDALDatasetH vec = GDALCreate(vmem, "", 0, 0, 0, GDT_Unknown, NULL);
    double *buf = malloc(nc * sizeof(double));
    int rc = -1;
    if (!ras || !vec || !buf) {
        gw_fail(err, "out of memory tracing contours");
        goto done;
    }
    for (size_t k = 0; k < nc; k++) buf[k] = isfinite(head[k]) ? head[k] : NODATA;
    /* Row 0 is the north row in both the grid and the raster. */
    double gt[6] = {g->x0, g->dx, 0, gw_grid_ytop(g), 0, -g->dy};
    GDALSetGeoTransform(ras, gt);
    GDALRasterBandH band = GDALGetRasterBand(ras, 1);
    GDALSetRasterNoDataValue(band, NODATA);
    if (GDALRasterIO(band, GF_Write, 0, 0, g->nx, g->ny, buf, g->nx, g->ny, GDT_Float64, 0, 0) !=
        CE_None) {
        gw_fail(err, "GDAL could not fill the contour raster");
        goto done;
    }
    OGRLayerH lyr = GDALDatasetCreateLayer(vec, "contour", NULL, wkbLineString, NULL);
    if (!lyr) {
        gw_fail(err, "GDAL could not create the contour layer");
        goto done;
    }
    OGRFieldDefnH fid = OGR_Fld_Create("id", OFTInteger);
    OGRFieldDefnH fel = OGR_Fld_Create("level", OFTReal);
    OGR_L_CreateField(lyr, fid, TRUE);
    OGR_L_CreateField(lyr, fel, TRUE);
    OGR_Fld_Destroy(fid);
    OGR_Fld_Destroy(fel);

    char opt_int[64], opt_nd[64];
    snprintf(opt_int, sizeof opt_int, "LEVEL_INTERVAL=%.17g", interval);
    snprintf(opt_nd, sizeof opt_nd, "NODATA=%.17g", NODATA);
    char *opts[] = {opt_int, "LEVEL_BASE=0", opt_nd, "ID_FIELD=0", "ELEV_FIELD=1", NULL};
    if (GDALContourGenerateEx(band, lyr, opts, NULL, NULL) != CE_None) {
        gw_fail(err, "GDAL contouring failed: %s", CPLGetLastErrorMsg());
        goto done;
    }

    int cap = 0;
    OGR_L_ResetReading(lyr);
    OGRFeatureH f;
    rc = 0;
    while (rc == 0 && (f = OGR_L_GetNextFeature(lyr)) != NULL) {
        double level = OGR_F_GetFieldAsDouble(f, 1);
        OGRGeometryH geom = OGR_F_GetGeometryRef(f);
        if (geom) {
            OGRwkbGeometryType t = wkbFlatten(OGR_G_GetGeometryType(geom));
            if (t == wkbLineString) {
                rc = add_line(out, &cap, level, geom, err);
            } else if (t == wkbMultiLineString) {
                for (int i = 0; rc == 0 && i < OGR_G_GetGeometryCount(geom); i++)
                    rc = add_line(out, &cap, level, OGR_G_GetGeometryRef(geom, i), err);
            }
        }
        OGR_F_Destroy(f);
    }
    if (rc != 0) gw_contour_set_free(out);
done:
    free(buf);
    if (vec) GDALClose(vec);
    if (ras) GDALClose(ras);
    return rc;
}
