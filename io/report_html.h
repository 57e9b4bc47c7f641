/* report.html: one self-contained page (images embedded as base64 data
 * URIs, styles inline) with the summary, water balance, feature budgets,
 * divides and catchments, capture zones, observations and residual
 * statistics, warnings, cautions and the model file echoed.  Laid out for a
 * laptop screen and for printing. */
#ifndef GW_REPORT_HTML_H
#define GW_REPORT_HTML_H

#include "../solver/error.h"
#include "map_layers.h"
#include "results.h"

typedef struct {
    const char *path;      /* PNG file to embed */
    const char *caption;
} gw_report_image;

/* l may be NULL (no divides, catchments or capture zones to list). */
int gw_report_html_write(const gw_results *r, const gw_map_layers *l, const gw_report_image *img,
                         int nimg, const char *path, gw_error *err);

#endif
