#include "raster_read.h"

#include <gdal.h>
#include <math.h>
#include <stdlib.h>

int gw_raster_sample(const char *path, int band, double scale, const gw_grid *g,
                     const unsigned char *need, double *out, const char *what, gw_error *err)
{
    if (GDALGetDriverCount() == 0) GDALAllRegister();
    CPLPushErrorHandler(CPLQuietErrorHandler);     /* we report our own message */
    GDALDatasetH ds = GDALOpenEx(path, GDAL_OF_RASTER | GDAL_OF_READONLY, NULL, NULL, NULL);
    CPLPopErrorHandler();
    if (!ds) return gw_fail(err, "%s: cannot open raster '%s'", what, path);
    int rc = 0;
    double *row = NULL;
    int W = GDALGetRasterXSize(ds), H = GDALGetRasterYSize(ds);
    double gt[6], inv[6];
    if (band < 1 || band > GDALGetRasterCount(ds)) {
        rc = gw_fail(err, "%s: raster '%s' has %d band(s), band %d was asked for", what, path,
                     GDALGetRasterCount(ds), band);
        goto done;
    }
    if (GDALGetGeoTransform(ds, gt) != CE_None || !GDALInvGeoTransform(gt, inv)) {
        rc = gw_fail(err, "%s: raster '%s' has no usable georeferencing", what, path);
        goto done;
    }
    GDALRasterBandH b = GDALGetRasterBand(ds, band);
    int has_nd = 0;
    double nd = GDALGetRasterNoDataValue(b, &has_nd);
    int north_up = gt[2] == 0.0 && gt[4] == 0.0;
    row = malloc((size_t)W * sizeof *row);
    if (!row) { rc = gw_fail(err, "%s: out of memory reading '%s'", what, path); goto done; }
    int loaded = -1;       /* raster row held in `row` (north-up case) */
    for (int r = 0; r < g->ny && rc == 0; r++) {
        double y = gw_grid_yc(g, r);
        for (int c = 0; c < g->nx; c++) {
            size_t k = (size_t)r * g->nx + c;
            if (need && !need[k]) continue;
            double x = gw_grid_xc(g, c);
            double px = inv[0] + inv[1] * x + inv[2] * y, py = inv[3] + inv[4] * x + inv[5] * y;
            if (!(px >= 0.0 && px < W && py >= 0.0 && py < H)) {
                rc = gw_fail(err, "%s: cell col %d, row %d (x %g, y %g) lies outside raster '%s'",
                             what, c, r, x, y, path);
                break;
            }
            int ix = (int)floor(px), iy = (int)floor(py);
            double v;
            if (north_up) {
                if (iy != loaded) {
                    if (GDALRasterIO(b, GF_Read, 0, iy, W, 1, row, W, 1, GDT_Float64, 0, 0) != CE_None) {
                        rc = gw_fail(err, "%s: read error in raster '%s' (row %d)", what, path, iy);
                        break;
                    }
                    loaded = iy;
                }
                v = row[ix];
            } else if (GDALRasterIO(b, GF_Read, ix, iy, 1, 1, &v, 1, 1, GDT_Float64, 0, 0) != CE_None) {
                rc = gw_fail(err, "%s: read error in raster '%s'", what, path);
                break;
            }
            if (isnan(v) || (has_nd && (v == nd || (isnan(nd) && isnan(v))))) {
                rc = gw_fail(err, "%s: cell col %d, row %d (x %g, y %g) falls on a nodata pixel of raster '%s'",
                             what, c, r, x, y, path);
                break;
            }
            out[k] = v * scale;
        }
    }
done:
    free(row);
    GDALClose(ds);
    return rc;
}
