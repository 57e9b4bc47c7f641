/* Profile charts of a sweep: for each transect, sweep_profile_<transect>.png
 * with one head curve per swept value (at most GW_SWEEP_PROFILE_CURVES, taken
 * evenly through the runs) and each run's divide crossings marked on its
 * curve.  Heads are sampled run by run, as the sweep goes, so only the drawn
 * runs are kept. */
#ifndef GW_MAP_SWEEP_H
#define GW_MAP_SWEEP_H

#include "../solver/error.h"
#include "../solver/grid.h"
#include "model.h"
#include "outdir.h"
#include "sweep_out.h"

#define GW_SWEEP_PROFILE_CURVES 12
#define GW_SWEEP_PROFILE_SAMPLES 400

typedef struct {
    int nruns, ntransects;   /* ntransects: from the first model taken */
    int ncurves;             /* runs drawn */
    int *run_of;             /* per curve: its run (owned) */
    int *taken;              /* per curve: 1 once sampled (owned) */
    double *dist;            /* [t][i]: distance along transect t (owned) */
    double *head;            /* [t][curve][i] (owned); NAN off the active area */
    int draw;                /* output.maps on with profiles */
    int width;               /* output.map_width */
    char *crs;               /* owned, may be NULL */
    char **file;             /* per transect: sweep_profile_<name>.png (owned) */
} gw_sweep_profiles;

/* Start collecting for a sweep of nruns runs. */
int gw_sweep_profiles_init(gw_sweep_profiles *sp, int nruns, gw_error *err);

/* Sample run `run` (model m, grid g, heads `head`) along every transect if
 * the run is one of those drawn; other runs cost nothing. */
int gw_sweep_profiles_take(gw_sweep_profiles *sp, int run, const gw_model *m, const gw_grid *g,
                           const double *head, gw_error *err);

/* Write sweep_profile_<transect>.png (the name reduced as for
 * transect_<name>.csv) for every transect into o (nothing
 * when the model has no transects or output.maps leaves profiles out).
 * Curve labels are the run's values, the keys are named in the subtitle;
 * divide crossings come from s->run[r].cross. */
int gw_sweep_profiles_write(const gw_sweep_profiles *sp, const gw_sweep *s, gw_outdir *o,
                            gw_error *err);

void gw_sweep_profiles_free(gw_sweep_profiles *sp);

#endif
