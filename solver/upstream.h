/* The cells whose water can reach a feature: every active cell from which
 * a chain of positive face fluxes leads into one of the feature's cells.
 * Outside this set a feature's flux-weighted share is exactly 0, so the
 * per-feature share passes (catchments, capture zones) visit only these
 * cells -- for a well, a few percent of a regional grid. */
#ifndef GW_UPSTREAM_H
#define GW_UPSTREAM_H

#include "error.h"
#include "flowfield.h"

typedef struct {
    int *cell;              /* the set, in no particular order */
    long n;
    unsigned char *mark;    /* ncells: 1 in the set */
} gw_upstream;

/* Cells upstream of the cells where feature `feature` takes water out of
 * the aquifer (its negative exchanges), those cells included.  u must be
 * zeroed before its first use; it can be reused (its arrays are kept and
 * cleared).  Returns 0, or -1 when out of memory. */
int gw_upstream_of_feature(const gw_flowfield *f, int feature, gw_upstream *u, gw_error *err);
void gw_upstream_free(gw_upstream *u);

#endif
