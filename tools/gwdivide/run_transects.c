/* The transect stage of `gwdivide run`: head and flux profiles along the
 * model's analysis.transects, with the divides that cross them
 * (solver/transect.h), written as transect_<name>.csv. */
#include <stdlib.h>

#include "../../io/outdir.h"
#include "../../io/transect_csv.h"
#include "../../solver/transect.h"
#include "cli.h"

int gw_run_transects(gw_results *r, gw_error *err)
{
    const gw_model *m = r->model;
    if (!m || m->ntransects == 0 || !r->have_solution) return 0;
    r->transects = calloc((size_t)m->ntransects, sizeof *r->transects);
    if (!r->transects) return gw_fail(err, "out of memory");
    const gw_divides *d = r->divides ? &r->divides->divides : NULL;
    for (int i = 0; i < m->ntransects; i++) {
        const gw_transect_spec *ts = &m->transects[i];
        if (gw_transect_compute(r->problem, &r->solution, ts->line.xy, ts->line.n, 0.0, d,
                                &r->transects[i], err) != 0)
            return gw_fail_prefix(err, "transect '%s': ", ts->name);
        r->ntransects = i + 1;
    }
    return 0;
}

int gw_write_transects(const gw_results *r, struct gw_outdir *o, gw_error *err)
{
    for (int i = 0; i < r->ntransects && r->model && i < r->model->ntransects; i++) {
        char name[256];
        gw_transect_file_name(r->model, i, name, sizeof name);
        const char *path = gw_outdir_path(o, name, err);
        if (!path || gw_transect_csv_save(path, &r->transects[i], r->problem, r->model->length_unit,
                                          r->model->time_unit, err) != 0)
            return -1;
    }
    return 0;
}
