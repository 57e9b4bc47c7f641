/* `gwdivide check`: everything `run` verifies before solving (the model
 * file, its CRS, putting it on the grid, a head-controlling boundary for
 * every active area), with no outputs. */
#include <stdio.h>

#include "../../io/heads_tif.h"
#include "../../io/model.h"
#include "cli.h"

int gw_cmd_check(const char *model_path)
{
    gw_error err = {{0}};
    gw_problem *p = NULL;
    gw_model *m = gw_model_load(model_path, &err);
    if (!m) goto fail;
    if (gw_crs_check(m->crs, &err) != 0) {
        gw_fail_prefix(&err, "%s: ", model_path);
        goto fail;
    }
    if (!(p = gw_model_build(m, &err))) goto fail;
    if (gw_problem_check_bounded(p, &err) != 0) goto fail;

    long active = 0, fixed = 0;
    for (size_t k = 0; k < gw_grid_ncells(&p->grid); k++) {
        active += p->active[k] != 0;
        fixed += p->active[k] && p->fixed_feature[k] >= 0;
    }
    printf("%s: ok: %d columns x %d rows (%g x %g %s cells), %ld active, %ld fixed-head, "
           "%d features, %d observation wells\n",
           model_path, p->grid.nx, p->grid.ny, p->grid.dx, p->grid.dy, m->length_unit, active, fixed,
           p->nfeatures, m->nobs);
    gw_problem_free(p);
    gw_model_free(m);
    return GW_EXIT_OK;
fail:
    gw_print_error(model_path, &err);
    gw_problem_free(p);
    gw_model_free(m);
    return GW_EXIT_REJECTED;
}
