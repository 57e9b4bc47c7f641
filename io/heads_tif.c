#include "heads_tif.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include <cpl_conv.h>
#include <cpl_error.h>
#include <gdal.h>
#include <ogr_srs_api.h>

#include "gdal_quiet.h"

static OGRSpatialReferenceH make_srs(const char *crs, gw_error *err)
{
    OGRSpatialReferenceH srs = OSRNewSpatialReference(NULL);
    if (!srs) { gw_fail(err, "out of memory"); return NULL; }
    if (OSRSetFromUserInput(srs, crs) != OGRERR_NONE) {
        gw_fail(err, "grid.crs \"%s\" is not a coordinate reference system GDAL recognises (%s)", crs, gw_gdal_msg());
        OSRDestroySpatialReference(srs);
        return NULL;
    }
    return srs;
}

int gw_crs_check(const char *crs, gw_error *err)
{
    if (!crs || !*crs) return 0;
    gw_gdal_quiet_begin();
    OGRSpatialReferenceH srs = make_srs(crs, err);
    gw_gdal_quiet_end();
    if (!srs) return -1;
    OSRDestroySpatialReference(srs);
    return 0;
}

int gw_write_grid_tif(const char *path, const gw_grid *g, const double *v, const char *crs,
                      const char *description, gw_error *err)
{
    size_t n = gw_grid_ncells(g);
    double *buf = malloc(n * sizeof *buf);
    if (!buf) return gw_fail(err, "out of memory");
    for (size_t k = 0; k < n; k++) buf[k] = isfinite(v[k]) ? v[k] : GW_HEADS_NODATA;

    GDALAllRegister();
    gw_gdal_quiet_begin();
    int rc = -1;
    OGRSpatialReferenceH srs = NULL;
    GDALDatasetH ds = NULL;
    GDALDriverH drv = GDALGetDriverByName("GTiff");
    if (!drv) { gw_fail(err, "GDAL has no GeoTIFF driver"); goto done; }
    if (crs && *crs && !(srs = make_srs(crs, err))) goto done;

    /* NUM_THREADS: tiles are compressed side by side; the file is the same. */
    char *opts[] = {"COMPRESS=DEFLATE", "PREDICTOR=3", "TILED=YES", "NUM_THREADS=ALL_CPUS", NULL};
    ds = GDALCreate(drv, path, g->nx, g->ny, 1, GDT_Float64, opts);
    if (!ds) { gw_fail(err, "cannot create %s: %s", path, gw_gdal_msg()); goto done; }
    /* North-up: the first row is the north edge, pixel height negative. */
    double gt[6] = {g->x0, g->dx, 0.0, gw_grid_ytop(g), 0.0, -g->dy};
    if (GDALSetGeoTransform(ds, gt) != CE_None) { gw_fail(err, "%s: %s", path, gw_gdal_msg()); goto done; }
    if (srs && GDALSetSpatialRef(ds, srs) != CE_None) { gw_fail(err, "%s: %s", path, gw_gdal_msg()); goto done; }
    GDALRasterBandH band = GDALGetRasterBand(ds, 1);
    GDALSetRasterNoDataValue(band, GW_HEADS_NODATA);
    if (description) GDALSetDescription(band, description);
    if (GDALRasterIO(band, GF_Write, 0, 0, g->nx, g->ny, buf, g->nx, g->ny, GDT_Float64, 0, 0) != CE_None) {
        gw_fail(err, "cannot write %s: %s", path, gw_gdal_msg());
        goto done;
    }
    rc = 0;
done:
    if (ds) {
        CPLErrorReset();
        GDALClose(ds);   /* flushes; GDAL 3.6 reports failures only through CPLError */
        if (rc == 0 && CPLGetLastErrorType() >= CE_Failure) rc = gw_fail(err, "cannot write %s: %s", path, gw_gdal_msg());
    }
    if (srs) OSRDestroySpatialReference(srs);
    gw_gdal_quiet_end();
    free(buf);
    return rc;
}
