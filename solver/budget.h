/* Water budgets from a solved problem: per feature, per reach (cell), and the
 * global balance.  Signs are the aquifer's: inflow enters the aquifer from
 * the feature, outflow leaves the aquifer to it. */
#ifndef GW_BUDGET_H
#define GW_BUDGET_H

#include "problem.h"
#include "solve.h"

typedef enum { GW_STATE_NONE = 0, GW_STATE_GAINING, GW_STATE_LOSING, GW_STATE_MIXED } gw_state;
const char *gw_state_name(gw_state s);   /* "none", "gaining", ... */

typedef struct {
    int feature;
    int cell;
    double in, out;     /* L^3/T, both >= 0 */
} gw_reach;

typedef struct {
    double in, out, net;    /* net = in - out */
    gw_state state;
} gw_feature_budget;

typedef struct {
    int nfeatures;
    gw_feature_budget *feature;
    int nreaches;
    gw_reach *reach;          /* links, wells and fixed-head cells, grouped by feature */
    double total_in, total_out;
    double discrepancy_percent;   /* 100 (in - out) / ((in + out) / 2) */
} gw_budget;

/* Budget of solution sol of problem p.  A fixed-head cell's flux is what the
 * boundary must supply to balance that cell (including recharge and other
 * exchanges inside it), so the global balance closes to round-off. */
int gw_budget_compute(const gw_problem *p, const gw_solution *sol, gw_budget *b, gw_error *err);
void gw_budget_free(gw_budget *b);

/* Flux into the aquifer (L^3/T) of link l at head h (the exchange law). */
double gw_link_flux(const gw_link *l, double h);

/* Flux into the aquifer of link l at head h in a given state (on = head-
 * dependent), as the final solve used it (gw_solution.link_on), so budgets
 * and flow fields balance the matrix to round-off. */
double gw_link_flux_in_state(const gw_link *l, int on, double h);

#endif
