/* `gwdivide sweep`: re-solve one model over values of some of its numbers
 * and report how budgets and divides move.
 *
 * Each run puts its values into the model text (io/sweep_key.h) and reads,
 * builds and solves it like `run` does.  One gw_solver serves every run
 * whose active/fixed-head pattern matches the previous one, so the
 * symbolic analysis is done once, and the numeric factorization is skipped
 * whenever the matrix is unchanged (recharge, pumping or fixed-head values
 * only change the right-hand side).  A value that changes the pattern (a
 * moved line, another grid) simply gets a new solver. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "../../io/model.h"
#include "../../io/outdir.h"
#include "../../io/model_text.h"
#include "../../io/sweep_key.h"
#include "../../io/sweep_out.h"
#include "../../io/map_sweep.h"
#include "../../solver/budget.h"
#include "../../solver/divide.h"
#include "../../solver/solve.h"
#include "../../solver/transect.h"
#include "cli.h"

#define GW_SWEEP_MAX_RUNS 100000
#define GW_SWEEP_MAX_FILE (64L << 20)

/* "<dir>/<model name>-sweep" beside the model. */
static char *default_sweep_dir(const char *model_path)
{
    char *d = gw_default_out_dir(model_path);   /* ".../NAME-results" */
    if (!d) return NULL;
    size_t n = strlen(d);
    if (n >= 8 && !strcmp(d + n - 8, "-results")) {
        char *s = malloc(n + 1);
        if (s) snprintf(s, n + 1, "%.*s-sweep", (int)(n - 8), d);
        free(d);
        return s;
    }
    return d;
}

/* Values of run r: the last key varies fastest (full grid), or the r-th
 * value of every key (zip). */
static void run_values(const gw_vary *v, int nv, int zip, int r, double *out)
{
    for (int i = nv - 1; i >= 0; i--) {
        if (zip) { out[i] = v[i].values[r]; continue; }
        out[i] = v[i].values[r % v[i].nvalues];
        r /= v[i].nvalues;
    }
}

static void describe_values(const gw_vary *v, int nv, const double *vals, char *buf, size_t n)
{
    size_t k = 0;
    buf[0] = 0;
    for (int i = 0; i < nv && k + 4 < n; i++) {
        char num[40];
        gw_format_number(num, sizeof num, vals[i]);
        int w = snprintf(buf + k, n - k, "%s%s=%s", i ? ", " : "", v[i].key, num);
        if (w < 0) break;
        k += (size_t)w < n - k ? (size_t)w : n - k - 1;
    }
}

/* The active/fixed pattern a solver was made for. */
typedef struct {
    int nx, ny;
    unsigned char *active;
    unsigned char *fixed;
} pattern_t;

static int pattern_same(const pattern_t *pt, const gw_problem *p)
{
    if (!pt->active || pt->nx != p->grid.nx || pt->ny != p->grid.ny) return 0;
    size_t nc = gw_grid_ncells(&p->grid);
    if (memcmp(pt->active, p->active, nc) != 0) return 0;
    for (size_t k = 0; k < nc; k++)
        if (pt->fixed[k] != (p->fixed_feature[k] >= 0)) return 0;
    return 1;
}

static int pattern_take(pattern_t *pt, const gw_problem *p)
{
    size_t nc = gw_grid_ncells(&p->grid);
    free(pt->active);
    free(pt->fixed);
    pt->active = malloc(nc);
    pt->fixed = malloc(nc);
    if (!pt->active || !pt->fixed) return -1;
    memcpy(pt->active, p->active, nc);
    for (size_t k = 0; k < nc; k++) pt->fixed[k] = p->fixed_feature[k] >= 0;
    pt->nx = p->grid.nx;
    pt->ny = p->grid.ny;
    return 0;
}

/* Names that outlive each run's model and problem. */
static int take_names(gw_sweep *s, const gw_model *m, const gw_problem *p, gw_error *err)
{
    s->title = strdup(m->title ? m->title : "");
    s->length_unit = strdup(m->length_unit ? m->length_unit : "");
    s->time_unit = strdup(m->time_unit ? m->time_unit : "");
    s->feature_name = calloc((size_t)p->nfeatures, sizeof *s->feature_name);
    s->feature_type = calloc((size_t)p->nfeatures, sizeof *s->feature_type);
    s->transect_name = calloc((size_t)(m->ntransects ? m->ntransects : 1), sizeof *s->transect_name);
    if (!s->title || !s->length_unit || !s->time_unit || !s->feature_name || !s->feature_type || !s->transect_name)
        return gw_fail(err, "out of memory");
    s->nfeatures = p->nfeatures;
    for (int i = 0; i < p->nfeatures; i++) {
        s->feature_type[i] = (int)p->features[i].type;
        if (!(s->feature_name[i] = strdup(p->features[i].name ? p->features[i].name : "")))
            return gw_fail(err, "out of memory");
    }
    s->ntransects = m->ntransects;
    for (int i = 0; i < m->ntransects; i++)
        if (!(s->transect_name[i] = strdup(m->transects[i].name ? m->transects[i].name : "")))
            return gw_fail(err, "out of memory");
    return 0;
}

/* State kept from one run to the next. */
typedef struct {
    gw_solver *solver;
    pattern_t pattern;
    gw_solution sol;
    int have_sol;
    double *start;          /* previous heads, the starting guess of nonlinear runs */
    int nsolvers;           /* symbolic analyses done */
    long factorizations;    /* numeric factorizations done */
    double t_build, t_solve, t_analysis;   /* seconds, summed over runs */
    gw_sweep_profiles prof; /* heads along the transects, for sweep_profile_*.png */
} engine_t;

static void engine_free(engine_t *e)
{
    gw_solver_free(e->solver);
    if (e->have_sol) gw_solution_free(&e->sol);
    free(e->pattern.active);
    free(e->pattern.fixed);
    free(e->start);
    gw_sweep_profiles_free(&e->prof);
}

/* Read, build, solve and analyse one run into s->run[r]. */
static int one_run(gw_sweep *s, engine_t *e, const char *text, int r, gw_error *err)
{
    gw_sweep_run *run = &s->run[r];
    double t0 = gw_now();
    int rc = -1;
    char *mtext = gw_vary_apply(text, s->vary, s->nvary, run->values);
    if (!mtext) return gw_fail(err, "out of memory");
    gw_model *m = gw_model_load_string(mtext, s->model_path, err);
    free(mtext);
    gw_problem *p = m ? gw_model_build(m, err) : NULL;
    double t1 = gw_now();
    e->t_build += t1 - t0;
    gw_budget b;
    int have_b = 0;
    if (!p) goto done;
    if (r == 0 && take_names(s, m, p, err) != 0) goto done;
    if (p->nfeatures != s->nfeatures || m->ntransects != s->ntransects) {
        gw_fail(err, "the features of the model changed between runs");
        goto done;
    }

    gw_solve_options opt;
    gw_solve_options_default(&opt);
    if (m->head_tol > 0) opt.head_tol = m->head_tol;
    if (m->resid_tol > 0) opt.resid_tol = m->resid_tol;
    if (m->max_iter > 0) opt.max_iter = m->max_iter;
    int reuse = e->solver && pattern_same(&e->pattern, p);
    if (!reuse) {
        gw_solver_free(e->solver);
        e->solver = NULL;
        if (e->have_sol) gw_solution_free(&e->sol);
        memset(&e->sol, 0, sizeof e->sol);
        e->have_sol = 0;
        free(e->start);
        e->start = NULL;
        if (!(e->solver = gw_solver_new(p, &opt, err))) goto done;
        if (pattern_take(&e->pattern, p) != 0) { gw_fail(err, "out of memory"); goto done; }
        e->nsolvers++;
        run->new_solver = 1;
    }
    e->have_sol = 1;
    int src = gw_solver_run(e->solver, p, e->start, &e->sol, err);
    double t2 = gw_now();
    e->t_solve += t2 - t1;
    e->factorizations += e->sol.factorizations;
    run->converged = e->sol.converged;
    run->iterations = e->sol.iterations;
    run->factorizations = e->sol.factorizations;
    if (src != 0 && (e->sol.converged || e->sol.iterations == 0 || !e->sol.head)) goto done;   /* no solution at all */
    err->msg[0] = 0;   /* non-convergence is reported per run, not fatal */

    size_t nc = gw_grid_ncells(&p->grid);
    if (!e->start && !(e->start = malloc(nc * sizeof *e->start))) { gw_fail(err, "out of memory"); goto done; }
    memcpy(e->start, e->sol.head, nc * sizeof *e->start);

    if (gw_sweep_profiles_take(&e->prof, r, m, &p->grid, e->sol.head, err) != 0) goto done;
    if (gw_budget_compute(p, &e->sol, &b, err) != 0) goto done;
    have_b = 1;
    run->in = malloc((size_t)p->nfeatures * sizeof *run->in);
    run->out = malloc((size_t)p->nfeatures * sizeof *run->out);
    run->state = malloc((size_t)p->nfeatures * sizeof *run->state);
    run->ncross = calloc((size_t)(s->ntransects ? s->ntransects : 1), sizeof *run->ncross);
    run->cross = calloc((size_t)(s->ntransects ? s->ntransects : 1), sizeof *run->cross);
    if (!run->in || !run->out || !run->state || !run->ncross || !run->cross) { gw_fail(err, "out of memory"); goto done; }
    for (int i = 0; i < p->nfeatures; i++) {
        run->in[i] = i < b.nfeatures ? b.feature[i].in : NAN;
        run->out[i] = i < b.nfeatures ? b.feature[i].out : NAN;
        run->state[i] = i < b.nfeatures ? b.feature[i].state : GW_STATE_NONE;
    }
    run->discrepancy_percent = b.discrepancy_percent;

    if (m->divides && p->type != GW_SECTION) {
        gw_divide_analysis a;
        if (gw_divide_analysis_run(p, &e->sol, &a, err) != 0) { gw_fail_prefix(err, "divides: "); goto done; }
        run->divides = a.divides;           /* kept: moved out of the analysis */
        memset(&a.divides, 0, sizeof a.divides);
        run->no_divide = a.no_divide;
        run->nno_divide = a.nno_divide;
        a.no_divide = NULL;
        a.nno_divide = 0;
        gw_divide_analysis_free(&a);
        run->have_divides = 1;
        for (int t = 0; t < s->ntransects; t++)
            if (gw_transect_divide_crossings(m->transects[t].line.xy, m->transects[t].line.n, &run->divides,
                                             &run->cross[t], &run->ncross[t], err) != 0)
                goto done;
    }
    rc = 0;
    e->t_analysis += gw_now() - t2;
done:
    if (have_b) gw_budget_free(&b);
    gw_problem_free(p);
    gw_model_free(m);
    run->seconds = gw_now() - t0;
    return rc;
}

/* ---- Summary ------------------------------------------------------------ */

/* Length-weighted centre of all divide lines between a and b in a run. */
static int pair_centre(const gw_sweep_run *run, int a, int b, double *cx, double *cy)
{
    double sx = 0, sy = 0, sl = 0;
    int found = 0;
    for (int i = 0; i < run->divides.n; i++) {
        const gw_divide *d = &run->divides.d[i];
        if (d->a != a || d->b != b) continue;
        found = 1;
        for (int k = 0; k + 1 < d->npts; k++) {
            double x0 = d->xy[2 * k], y0 = d->xy[2 * k + 1], x1 = d->xy[2 * k + 2], y1 = d->xy[2 * k + 3];
            double l = hypot(x1 - x0, y1 - y0);
            sx += l * 0.5 * (x0 + x1);
            sy += l * 0.5 * (y0 + y1);
            sl += l;
        }
        if (d->npts == 1) { sx += d->xy[0]; sy += d->xy[1]; sl += 1; }
    }
    if (!found || sl <= 0) return 0;
    *cx = sx / sl;
    *cy = sy / sl;
    return 1;
}

static void print_summary(FILE *f, const gw_sweep *s, const engine_t *e, const char *out_dir, double seconds)
{
    const char *L = s->length_unit;
    fprintf(f, "gwdivide %s sweep: %s\n", GWDIVIDE_VERSION, s->title ? s->title : "");
    for (int v = 0; v < s->nvary; v++) {
        char a[40], b[40];
        gw_format_number(a, sizeof a, s->vary[v].values[0]);
        gw_format_number(b, sizeof b, s->vary[v].values[s->vary[v].nvalues - 1]);
        fprintf(f, "  vary      %s from %s to %s (%d value%s, %d number%s in the file)\n", s->vary[v].key, a, b,
                s->vary[v].nvalues, s->vary[v].nvalues == 1 ? "" : "s", s->vary[v].nspans,
                s->vary[v].nspans == 1 ? "" : "s");
    }
    fprintf(f, "  runs      %d (%s), %.3g s in all, %.3g s per run\n", s->nruns,
            s->nvary < 2 ? "one key" : s->zip ? "values paired in order" : "every combination", seconds,
            s->nruns ? seconds / s->nruns : 0.0);
    fprintf(f, "  solver    %d symbolic analys%s, %ld numeric factorization%s for %d runs\n", e->nsolvers,
            e->nsolvers == 1 ? "is" : "es", e->factorizations, e->factorizations == 1 ? "" : "s", s->nruns);
    if (s->nruns > 0)
        fprintf(f, "  per run   read+build %.3g s, solve %.3g s, budgets+divides %.3g s\n", e->t_build / s->nruns,
                e->t_solve / s->nruns, e->t_analysis / s->nruns);
    int bad = 0;
    for (int r = 0; r < s->nruns; r++) bad += !s->run[r].converged;
    if (bad) {
        fprintf(f, "  WARNING   %d run%s did not converge (converged = false in sweep.csv):", bad, bad == 1 ? "" : "s");
        for (int r = 0, shown = 0; r < s->nruns && shown < 10; r++)
            if (!s->run[r].converged) { fprintf(f, " %d", r + 1); shown++; }
        fprintf(f, "%s\n", bad > 10 ? " ..." : "");
    }

    if (s->ntrack > 0) {
        fprintf(f, "\nDivide positions along the transects (%s from the first vertex of each line)\n", L);
        for (int t = 0; t < s->ntrack; t++) {
            const gw_sweep_track *k = &s->track[t];
            double lo = INFINITY, hi = -INFINITY, first = NAN, last = NAN;
            int present = 0;
            for (int r = 0; r < s->nruns; r++) {
                double d = gw_sweep_track_value(s, r, t);
                if (!isfinite(d)) continue;
                present++;
                if (!isfinite(first)) first = d;
                last = d;
                if (d < lo) lo = d;
                if (d > hi) hi = d;
            }
            char occ[16] = "";
            if (k->occurrence > 1) snprintf(occ, sizeof occ, " #%d", k->occurrence);
            fprintf(f, "  %s: %s | %s%s: from %.4g to %.4g %s, range %.4g .. %.4g (moved %.4g %s), crosses in %d of %d runs\n",
                    s->transect_name[k->transect], s->feature_name[k->a], s->feature_name[k->b], occ, first, last, L,
                    lo, hi, hi - lo, L, present, s->nruns);
        }
    } else if (s->ntransects == 0) {
        fprintf(f, "\n(no transects in the model: add analysis.transects to follow divide positions along a line)\n");
    }

    /* Every feature pair that has a divide in some run. */
    int nf = s->nfeatures, header = 0;
    for (int a = 0; a < nf; a++)
        for (int b = a + 1; b < nf; b++) {
            int present = 0, first_run = -1;
            double cx0 = 0, cy0 = 0, moved = 0;
            for (int r = 0; r < s->nruns; r++) {
                double cx, cy;
                if (!pair_centre(&s->run[r], a, b, &cx, &cy)) continue;
                present++;
                if (first_run < 0) { first_run = r; cx0 = cx; cy0 = cy; }
                double dd = hypot(cx - cx0, cy - cy0);
                if (dd > moved) moved = dd;
            }
            if (!present) continue;
            if (!header) { fprintf(f, "\nDivides between features (centre of each divide line, compared with its first run)\n"); header = 1; }
            fprintf(f, "  %s | %s: present in %d of %d runs; its centre moved up to %.4g %s\n", s->feature_name[a],
                    s->feature_name[b], present, s->nruns, moved, L);
        }
    /* Pairs with no divide in some runs. */
    for (int a = 0; a < nf; a++)
        for (int b = 0; b < nf; b++) {
            int n = 0, r0 = -1, r1 = -1;
            for (int r = 0; r < s->nruns; r++)
                for (int i = 0; i < s->run[r].nno_divide; i++)
                    if (s->run[r].no_divide[i].losing == a && s->run[r].no_divide[i].receiving == b) {
                        n++;
                        if (r0 < 0) r0 = r;
                        r1 = r;
                    }
            if (n)
                fprintf(f, "  no divide between %s and %s in %d of %d runs (runs %d to %d): %s loses water that ends in %s\n",
                        s->feature_name[a], s->feature_name[b], n, s->nruns, r0 + 1, r1 + 1, s->feature_name[a],
                        s->feature_name[b]);
        }
    fprintf(f, "\nResults in %s (sweep.csv, sweep_divides.json%s)\n", out_dir,
            e->prof.draw ? ", sweep_profile_*.png" : "");
}

static void progress(int r, int n, const char *vals, double elapsed)
{
    double left = r > 0 ? elapsed / r * (n - r) : 0.0;
    fprintf(stderr, "\r\033[Ksweep: run %d of %d (%.60s)  %.1f s, about %.0f s left", r + 1, n, vals, elapsed, left);
    fflush(stderr);
}

int gw_cmd_sweep(const gw_sweep_args *a)
{
    gw_error err = {{0}};
    int status = GW_EXIT_REJECTED;
    gw_vary *vary = calloc((size_t)(a->nvary ? a->nvary : 1), sizeof *vary);
    gw_sweep s;
    memset(&s, 0, sizeof s);
    engine_t e;
    memset(&e, 0, sizeof e);
    char *text = NULL, *out_dir = NULL;
    gw_outdir *o = NULL;
    int nv = 0;
    if (!vary) { gw_fail(&err, "out of memory"); goto fail; }

    /* Usage problems first (exit 2). */
    for (; nv < a->nvary; nv++)
        if (gw_vary_parse(a->vary[nv], &vary[nv], &err) != 0) goto usage;
    long nruns = 1;
    for (int i = 0; i < nv; i++) {
        if (a->zip) {
            if (vary[i].nvalues != vary[0].nvalues) {
                gw_fail(&err, "--zip pairs values in order, so every --vary needs the same count (%s has %d, %s has %d)",
                        vary[0].key, vary[0].nvalues, vary[i].key, vary[i].nvalues);
                goto usage;
            }
            nruns = vary[0].nvalues;
        } else {
            nruns *= vary[i].nvalues;
            if (nruns > GW_SWEEP_MAX_RUNS) {
                gw_fail(&err, "the sweep would make more than %d runs; use fewer values", GW_SWEEP_MAX_RUNS);
                goto usage;
            }
        }
    }

    /* Keys must name numbers in this model (exit 1: a model problem). */
    if (!(text = gw_model_read_text(a->model_path, GW_SWEEP_MAX_FILE, &err))) goto fail;
    for (int i = 0; i < nv; i++)
        if (gw_vary_resolve(&vary[i], text, a->model_path, &err) != 0) goto fail;
    if (gw_vary_check_overlap(vary, nv, &err) != 0) goto usage;

    s.model_path = a->model_path;
    s.vary = vary;
    s.nvary = nv;
    s.zip = a->zip;
    s.run = calloc((size_t)nruns, sizeof *s.run);
    if (!s.run) { gw_fail(&err, "out of memory"); goto fail; }
    if (gw_sweep_profiles_init(&e.prof, (int)nruns, &err) != 0) goto fail;
    int tty = !a->quiet && isatty(fileno(stderr));
    double t0 = gw_now();
    for (int r = 0; r < nruns; r++) {
        gw_sweep_run *run = &s.run[r];
        s.nruns = r + 1;
        char desc[600];
        if (!(run->values = malloc((size_t)(nv ? nv : 1) * sizeof *run->values))) { gw_fail(&err, "out of memory"); goto fail; }
        run_values(vary, nv, a->zip, r, run->values);
        describe_values(vary, nv, run->values, desc, sizeof desc);
        if (tty) progress(r, (int)nruns, desc, gw_now() - t0);
        if (one_run(&s, &e, text, r, &err) != 0) {
            if (tty) fputs("\r\033[K", stderr);
            gw_fail_prefix(&err, "run %d of %ld (%s): ", r + 1, nruns, desc);
            goto fail;
        }
    }
    double seconds = gw_now() - t0;
    if (tty) fputs("\r\033[K", stderr);
    if (gw_sweep_collect_tracks(&s, &err) != 0) goto fail;

    out_dir = a->out_dir ? strdup(a->out_dir) : default_sweep_dir(a->model_path);
    if (!out_dir) { gw_fail(&err, "out of memory"); goto fail; }
    if (!(o = gw_outdir_open(out_dir, &err))) goto fail;
    const char *path;
    if (!(path = gw_outdir_path(o, "sweep.csv", &err)) || gw_sweep_csv_save(&s, path, &err) != 0) goto fail;
    if (!(path = gw_outdir_path(o, "sweep_divides.json", &err)) || gw_sweep_json_save(&s, path, &err) != 0) goto fail;
    if (gw_sweep_profiles_write(&e.prof, &s, o, &err) != 0) goto fail;
    if (gw_outdir_commit(o, &err) != 0) goto fail;
    if (!a->quiet) print_summary(stdout, &s, &e, out_dir, seconds);
    status = GW_EXIT_OK;
    goto done;
usage:
    fprintf(stderr, "gwdivide: %s\n(see gwdivide --help)\n", err.msg);
    status = GW_EXIT_USAGE;
    goto done;
fail:
    if (o) {
        gw_outdir_unstage(o, &err);
        gw_outdir_abort(o);
    }
    gw_print_error(a->model_path, &err);
    status = GW_EXIT_REJECTED;
done:
    gw_outdir_free(o);
    gw_sweep_free(&s);
    engine_free(&e);
    for (int i = 0; i < nv; i++) gw_vary_free(&vary[i]);
    free(vary);
    free(text);
    free(out_dir);
    return status;
}
