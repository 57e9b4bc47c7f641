/* Results of a parameter sweep (`gwdivide sweep`) and their files.
 *
 * sweep.csv, one row per run:
 *   run, one column per varied key (headed by the key), converged,
 *   iterations, discrepancy_percent, then per feature "<name> inflow_<L>3_per_<T>",
 *   "<name> outflow_<L>3_per_<T>", "<name> state", then divide_count, then
 *   one column per divide met on a transect, "<transect>: <A> | <B> divide
 *   distance_<L>" (distance from the transect's first vertex; " #2" etc.
 *   when the same divide crosses it again; empty in runs where it does not
 *   cross), and no_divide ("LOSING -> RECEIVING; ...": features whose water
 *   reaches another with no divide between them).
 * sweep_divides.json (schema "gwdivide-sweep/1"): the varied keys and values
 *   and, per run, its values, the divides (as in report.json), the divide
 *   crossings on every transect and the no-divide pairs. */
#ifndef GW_SWEEP_OUT_H
#define GW_SWEEP_OUT_H

#include "../solver/budget.h"
#include "../solver/divide.h"
#include "../solver/error.h"
#include "../solver/transect.h"
#include "sweep_key.h"

#define GW_SWEEP_SCHEMA "gwdivide-sweep/1"

typedef struct {
    double *values;            /* one per varied key (owned) */
    int converged, iterations, factorizations;
    int new_solver;            /* 1: a new symbolic analysis was needed */
    double seconds;
    double discrepancy_percent;
    double *in, *out;          /* per feature, L^3/T (owned) */
    gw_state *state;           /* per feature (owned) */
    int have_divides;          /* 0: divides not computed (e.g. cross-section) */
    gw_divides divides;        /* owned */
    gw_no_divide *no_divide;   /* owned */
    int nno_divide;
    int *ncross;               /* per transect */
    gw_transect_crossing **cross;   /* per transect, divide crossings (owned) */
} gw_sweep_run;

/* One divide-position column: the occurrence-th crossing of the divide
 * between features a and b on a transect. */
typedef struct {
    int transect, a, b, occurrence;
} gw_sweep_track;

typedef struct {
    const char *model_path;            /* borrowed */
    char *title, *length_unit, *time_unit;   /* owned */
    int zip;                           /* 1: values paired, 0: full grid */
    const gw_vary *vary;               /* borrowed */
    int nvary;
    int nfeatures;
    char **feature_name;               /* owned */
    int *feature_type;                 /* gw_feature_type, owned */
    int ntransects;
    char **transect_name;              /* owned */
    int nruns;
    gw_sweep_run *run;                 /* owned */
    gw_sweep_track *track;             /* owned, after gw_sweep_collect_tracks */
    int ntrack;
} gw_sweep;

/* Gather the divide-position columns from all runs (in order of first
 * appearance). */
int gw_sweep_collect_tracks(gw_sweep *s, gw_error *err);

/* Distance of track t in run r, NAN when that divide does not cross there. */
double gw_sweep_track_value(const gw_sweep *s, int r, int t);

int gw_sweep_csv_save(const gw_sweep *s, const char *path, gw_error *err);
int gw_sweep_json_save(const gw_sweep *s, const char *path, gw_error *err);

void gw_sweep_run_free(gw_sweep_run *r, int ntransects);
void gw_sweep_free(gw_sweep *s);

#endif
