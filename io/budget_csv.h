/* budget.csv: the water budget of every feature, one row per reach.
 *
 * Columns: feature, type, column, row, x_<L>, y_<L>, inflow_<L>3_per_<T>,
 * outflow_<L>3_per_<T>, where L and T are the model's units (e.g.
 * inflow_m3_per_day).  column and row are 1-based, rows counted from the
 * north edge as in the heads raster; x, y is the cell centre.  A reach is
 * one cell of a stream, drain, leakage area, fixed head or well.  Recharge,
 * spread over the whole area, is one row with column, row, x and y empty.
 * Signs are the aquifer's: inflow enters the aquifer, outflow leaves it;
 * both are >= 0, so the inflow and outflow columns sum to the report's
 * balance totals. */
#ifndef GW_BUDGET_CSV_H
#define GW_BUDGET_CSV_H

#include <stdio.h>

#include "../solver/error.h"
#include "results.h"

int gw_budget_csv_write(const gw_results *r, FILE *f, gw_error *err);
int gw_budget_csv_save(const gw_results *r, const char *path, gw_error *err);

#endif
