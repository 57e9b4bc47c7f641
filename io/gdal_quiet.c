#include "gdal_quiet.h"

#include <cpl_error.h>

void gw_gdal_quiet_begin(void)
{
    CPLPushErrorHandler(CPLQuietErrorHandler);
    CPLErrorReset();
}

void gw_gdal_quiet_end(void) { CPLPopErrorHandler(); }

const char *gw_gdal_msg(void)
{
    const char *m = CPLGetLastErrorMsg();
    return (m && *m) ? m : "no detail from GDAL";
}
