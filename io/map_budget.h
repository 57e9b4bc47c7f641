/* Water-budget chart: for each feature, the water it gives the aquifer
 * (inflow, bar to the right) and takes from it (outflow, bar to the left),
 * with the totals and the balance discrepancy underneath. */
#ifndef GW_MAP_BUDGET_H
#define GW_MAP_BUDGET_H

#include "../solver/budget.h"
#include "../solver/error.h"
#include "../solver/problem.h"
#include "map_layers.h"

int gw_map_budget_write(const gw_problem *p, const gw_budget *b, const gw_map_layers *l,
                        const char *path, gw_error *err);

#endif
