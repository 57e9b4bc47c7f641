/* `gwdivide run`: read, build, solve, budget, analyse, write.  Every stage
 * returns an error value; this file turns them into one message and an exit
 * status.  Outputs are staged (io/outdir.h) so a failed run writes nothing. */
#include <pthread.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "../../io/budget_csv.h"
#include "../../io/heads_tif.h"
#include "../../io/map_results.h"
#include "../../io/model.h"
#include "../../io/outdir.h"
#include "../../io/report_json.h"
#include "../../io/results.h"
#include "../../io/results_gpkg.h"
#include "../../solver/flowfield.h"
#include "cli.h"

double gw_now(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

void gw_print_error(const char *model_path, const gw_error *err)
{
    const char *msg = err->msg[0] ? err->msg : "failed (no message)";
    if (model_path && !strstr(msg, model_path))
        fprintf(stderr, "gwdivide: %s: %s\n", model_path, msg);
    else
        fprintf(stderr, "gwdivide: %s\n", msg);
}

char *gw_default_out_dir(const char *model_path)
{
    const char *slash = strrchr(model_path, '/');
    const char *base = slash ? slash + 1 : model_path;
    size_t dirlen = slash ? (size_t)(slash - model_path) : 0;
    size_t baselen = strlen(base);
    const char *dot = strrchr(base, '.');
    if (dot && dot != base && (!strcmp(dot, ".yaml") || !strcmp(dot, ".yml"))) baselen = (size_t)(dot - base);
    size_t n = dirlen + baselen + 16;
    char *s = malloc(n);
    if (!s) return NULL;
    if (slash)
        snprintf(s, n, "%.*s/%.*s-results", (int)(dirlen ? dirlen : 1), dirlen ? model_path : "/",
                 (int)baselen, base);
    else
        snprintf(s, n, "%.*s-results", (int)baselen, base);
    return s;
}

static void apply_solver_settings(const gw_model *m, gw_solve_options *o)
{
    gw_solve_options_default(o);
    if (m->head_tol > 0) o->head_tol = m->head_tol;
    if (m->resid_tol > 0) o->resid_tol = m->resid_tol;
    if (m->max_iter > 0) o->max_iter = m->max_iter;
}

/* Solve, export the matrix if asked, keep the solver's description. */
static int solve_stage(gw_results *r, const gw_run_args *a, gw_error *err)
{
    gw_solve_options opt;
    apply_solver_settings(r->model, &opt);
    gw_solver *s = gw_solver_new(r->problem, &opt, err);
    if (!s) return -1;
    r->have_solution = 1;   /* arrays, once allocated, are freed with r */
    int rc = gw_solver_run(s, r->problem, NULL, &r->solution, err);
    if (rc == 0 && a->export_prefix && gw_solver_export(s, a->export_prefix, err) != 0) {
        gw_fail_prefix(err, "--export-matrix: ");
        rc = -1;
    }
    const char *d = gw_solver_describe(s);
    if (d) r->solver_method = strdup(d);
    gw_solver_free(s);
    return rc;
}

/* The divides analysis on its own thread: it only reads the model and the
 * solution, like the capture zones computed meanwhile on the caller's. */
typedef struct {
    const gw_results *r;
    const gw_flowfield *f;
    gw_divide_analysis *a;
    gw_error err;
    int rc;
    double seconds;
} divides_job;

static void *divides_thread(void *arg)
{
    divides_job *j = arg;
    double t = gw_now();
    j->rc = gw_run_divides_compute(j->r, j->f, &j->a, &j->err);
    j->seconds = gw_now() - t;
    return NULL;
}

/* Divides, transects and capture zones.  The divides and the zones are
 * independent, so they run at the same time from one flow field; all they
 * add to r (warnings, cautions) is added afterwards in the order of a
 * one-thread run, and the first failure in that order is the one reported. */
static int analyses(gw_results *r, gw_error *err)
{
    int want_div = gw_run_divides_wanted(r), want_cap = gw_capture_wanted(r);
    gw_flowfield ff = {0};
    double ta = gw_now();
    if ((want_div || want_cap) && gw_flowfield_compute(r->problem, &r->solution, &ff, err) != 0) {
        if (want_div) gw_fail_prefix(err, "divides: ");
        return -1;
    }
    double t_flow = gw_now() - ta;
    divides_job job = {.r = r, .f = &ff};
    pthread_t th;
    int threaded = want_div && pthread_create(&th, NULL, divides_thread, &job) == 0;
    if (!threaded)
        divides_thread(&job);
    ta = gw_now();
    gw_error cerr = {{0}};
    int crc = gw_capture_run_zones(r, &ff, &cerr);
    r->timing.tracking = gw_now() - ta;
    if (threaded)
        pthread_join(th, NULL);
    gw_flowfield_free(&ff);
    job.seconds += t_flow;
    r->timing.divides = job.seconds;
    if (job.rc != 0) {
        *err = job.err;
        return -1;
    }
    if (gw_run_divides_store(r, job.a, err) != 0) return -1;
    if (gw_run_transects(r, err) != 0) return -1;
    if (crc != 0) {
        *err = cerr;
        return -1;
    }
    return gw_capture_add_notes(r, err);
}

/* Write every output into the staged folder, then move them into place. */
static int write_outputs(gw_results *r, const char *out_dir, gw_error *err)
{
    double t_out = gw_now();
    gw_outdir *o = gw_outdir_open(out_dir, err);
    if (!o) return -1;
    const char *path;
    int rc = -1;
    char desc[96];
    snprintf(desc, sizeof desc, "head (%s)", r->model->length_unit ? r->model->length_unit : "");

    if (!(path = gw_outdir_path(o, "budget.csv", err)) || gw_budget_csv_save(r, path, err) != 0) goto fail;
    if (!(path = gw_outdir_path(o, "heads.tif", err)) ||
        gw_write_grid_tif(path, &r->problem->grid, r->solution.head,
                          r->problem->type == GW_SECTION ? NULL : r->model->crs, desc, err) != 0)
        goto fail;
    /* ---- further outputs (maps, GIS layers of divides, catchments,
     *      capture zones, contours) go here, each written to
     *      gw_outdir_path(o, NAME) ---- */
    if (gw_write_transects(r, o, err) != 0) goto fail;
    if (r->model->maps && gw_maps_write(r, o, err) != 0) goto fail;
    /* GIS layers (plan view only: a section's y is elevation, not a map). */
    if (r->problem->type != GW_SECTION &&
        (!(path = gw_outdir_path(o, "results.gpkg", err)) || gw_results_gpkg_write(r, path, err) != 0))
        goto fail;

    /* report.json last: it is the file other programs look for first.  It
     * records the time of every output before it. */
    r->timing.outputs = gw_now() - t_out;
    if (!(path = gw_outdir_path(o, "report.json", err)) || gw_report_json_save(r, path, err) != 0) goto fail;
    rc = gw_outdir_commit(o, err);
    gw_outdir_free(o);
    return rc;
fail:
    gw_outdir_unstage(o, err);
    gw_outdir_abort(o);
    gw_outdir_free(o);
    return -1;
}

int gw_cmd_run(const gw_run_args *a)
{
    gw_error err = {{0}};
    gw_results r;
    gw_results_init(&r);
    char *out_dir = NULL;
    int status = GW_EXIT_REJECTED;
    double t0 = gw_now(), t;

    t = gw_now();
    r.model = gw_model_load(a->model_path, &err);
    r.timing.read = gw_now() - t;
    if (!r.model) goto fail;
    if (gw_crs_check(r.model->crs, &err) != 0) {
        gw_fail_prefix(&err, "%s: ", a->model_path);
        goto fail;
    }

    t = gw_now();
    r.problem = gw_model_build(r.model, &err);
    r.timing.build = gw_now() - t;
    if (!r.problem) goto fail;

    t = gw_now();
    if (solve_stage(&r, a, &err) != 0) goto fail;
    r.timing.solve = gw_now() - t;

    t = gw_now();
    if (gw_budget_compute(r.problem, &r.solution, &r.budget, &err) != 0) goto fail;
    r.have_budget = 1;
    r.timing.budget = gw_now() - t;

    t = gw_now();
    if (gw_results_observe(&r, &err) != 0) goto fail;
    /* ---- analyses (divides, catchments, capture zones, ...) go here,
     *      each storing its result in r (see io/results.h) ---- */
    if (analyses(&r, &err) != 0) goto fail;
    if (gw_run_section(&r, &err) != 0) goto fail;
    r.timing.analysis = gw_now() - t;

    if (gw_results_check(&r, &err) != 0 || gw_results_add_cautions(&r, &err) != 0) goto fail;

    out_dir = a->out_dir ? strdup(a->out_dir) : gw_default_out_dir(a->model_path);
    if (!out_dir) { gw_fail(&err, "out of memory"); goto fail; }
    t = gw_now();
    if (write_outputs(&r, out_dir, &err) != 0) goto fail;
    r.timing.outputs = gw_now() - t;
    r.timing.total = gw_now() - t0;

    if (!a->quiet) gw_print_summary(stdout, &r, out_dir);
    status = GW_EXIT_OK;
    goto done;
fail:
    gw_print_error(a->model_path, &err);
done:
    free(out_dir);
    gw_results_free(&r);
    return status;
}
