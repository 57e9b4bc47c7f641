/* report.json, schema "gwdivide-report/1" (see DESIGN.md).  Keys may be
 * added; none may be renamed without bumping the schema name. */
#ifndef GW_REPORT_JSON_H
#define GW_REPORT_JSON_H

#include <stdio.h>

#include "../solver/error.h"
#include "results.h"

#define GW_REPORT_SCHEMA "gwdivide-report/1"

int gw_report_json_write(const gw_results *r, FILE *f, gw_error *err);

/* Write to `path` (normally a staged path from gw_outdir_path). */
int gw_report_json_save(const gw_results *r, const char *path, gw_error *err);

#endif
