#include "budget_csv.h"

#include <errno.h>
#include <string.h>

#include "csv_writer.h"

int gw_budget_csv_write(const gw_results *r, FILE *f, gw_error *err)
{
    if (!r->model || !r->problem || !r->have_budget)
        return gw_fail(err, "internal error: budget table written before the budget");
    const gw_problem *p = r->problem;
    const gw_grid *g = &p->grid;
    const gw_budget *b = &r->budget;
    char L[32], T[32];
    gw_csv_unit_token(L, sizeof L, r->model->length_unit);
    gw_csv_unit_token(T, sizeof T, r->model->time_unit);

    fprintf(f, "feature,type,column,row,x_%s,y_%s,inflow_%s3_per_%s,outflow_%s3_per_%s\n", L, L, L, T, L, T);
    for (int i = 0; i < p->nfeatures && i < b->nfeatures; i++) {
        if (p->features[i].type != GW_FEAT_RECHARGE) continue;
        gw_csv_field(f, gw_results_feature_name(r, i));
        fprintf(f, ",%s,,,,,%.17g,%.17g\n", gw_feature_type_name(p->features[i].type),
                b->feature[i].in, b->feature[i].out);
    }
    for (int i = 0; i < b->nreaches; i++) {
        const gw_reach *rc = &b->reach[i];
        if (rc->feature < 0 || rc->feature >= p->nfeatures) continue;
        int col = rc->cell % g->nx, row = rc->cell / g->nx;
        gw_csv_field(f, gw_results_feature_name(r, rc->feature));
        fprintf(f, ",%s,%d,%d,%.17g,%.17g,%.17g,%.17g\n", gw_feature_type_name(p->features[rc->feature].type),
                col + 1, row + 1, gw_grid_xc(g, col), gw_grid_yc(g, row), rc->in, rc->out);
    }
    if (fflush(f) != 0 || ferror(f))
        return gw_fail(err, "could not write the budget table: %s", errno ? strerror(errno) : "write error");
    return 0;
}

static int write_table(FILE *f, const void *r, gw_error *err)
{
    return gw_budget_csv_write(r, f, err);
}

int gw_budget_csv_save(const gw_results *r, const char *path, gw_error *err)
{
    return gw_csv_save(path, write_table, r, err);
}
