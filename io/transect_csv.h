/* transect_<name>.csv: a head and flux profile along one transect of the
 * model (analysis.transects), with the places where divides cross it.
 *
 * Columns: distance_<L>, x_<L>, y_<L>, head_<L>, flux_normal_<F>,
 * flux_along_<F>, crossing; F is <L>2_per_<T> (flux per unit width) in plan
 * view and <L>_per_<T> in a vertical section.  flux_along is positive in the
 * drawing direction of the line, flux_normal positive to its left.  Rows are
 * the samples (every half cell and every vertex) merged, by distance, with
 * one row per crossing whose last column says what crosses there:
 * "divide A | B" (a divide polyline between features A and B), "flow
 * divides" (the along-line flux turns from backward to forward) or "flow
 * meets" (forward to backward, e.g. at a gaining stream).  Empty fields:
 * outside the active area. */
#ifndef GW_TRANSECT_CSV_H
#define GW_TRANSECT_CSV_H

#include <stddef.h>
#include <stdio.h>

#include "../solver/error.h"
#include "../solver/problem.h"
#include "../solver/transect.h"
#include "model.h"

/* "transect_<name>.csv", the name reduced to letters, digits, '-', '_'
 * and '.'; a name that reduces to one already used by an earlier transect
 * of the model gets "_<number>" appended. */
void gw_transect_file_name(const gw_model *m, int i, char *buf, size_t n);

/* Words for a crossing ("divide", "flow divides", "flow meets"). */
const char *gw_cross_kind_name(gw_cross_kind k);

int gw_transect_csv_write(FILE *f, const gw_transect *t, const gw_problem *p,
                          const char *length_unit, const char *time_unit, gw_error *err);
int gw_transect_csv_save(const char *path, const gw_transect *t, const gw_problem *p,
                         const char *length_unit, const char *time_unit, gw_error *err);

#endif
