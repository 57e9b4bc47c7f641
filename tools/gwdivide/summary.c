/* The short human summary printed after a run: what was solved, whether the
 * water balance closes, what each feature does, how well the observation
 * wells are matched, and what to be careful about. */
#include <math.h>
#include <stdio.h>
#include <string.h>
#include <unistd.h>

#include "cli.h"

static const char *type_word(gw_feature_type t)
{
    switch (t) {
    case GW_FEAT_RECHARGE: return "recharge";
    case GW_FEAT_FIXED_HEAD: return "fixed head";
    case GW_FEAT_STREAM: return "stream";
    case GW_FEAT_DRAIN: return "drain";
    case GW_FEAT_WELL: return "well";
    case GW_FEAT_LEAKAGE: return "leakage";
    }
    return "feature";
}

static const char *aquifer_word(gw_aquifer_type t)
{
    return t == GW_UNCONFINED ? "unconfined" : t == GW_SECTION ? "cross-section" : "confined";
}

/* What the feature does, in words, from the aquifer's point of view. */
static void describe(char *buf, size_t n, const gw_feature *ft, const gw_feature_budget *fb, const char *Q,
                     int section)
{
    if (section && ft->type == GW_FEAT_FIXED_HEAD && fb->in > 0 && fb->out > 0) {
        /* the water table of a section: its two roles, in the trade's words */
        snprintf(buf, n, "recharge areas let %.4g %s into the aquifer, discharge areas take %.4g %s out",
                 fb->in, Q, fb->out, Q);
        return;
    }
    switch (ft->type) {
    case GW_FEAT_RECHARGE:
        snprintf(buf, n, "adds %.4g %s", fb->net, Q);
        return;
    case GW_FEAT_DRAIN:
        if (fb->out > 0) snprintf(buf, n, "removes %.4g %s from the aquifer", fb->out, Q);
        else snprintf(buf, n, "dry: the water table stays below the drain");
        return;
    case GW_FEAT_WELL:
        if (fb->net < 0) snprintf(buf, n, "pumps %.4g %s", -fb->net, Q);
        else if (fb->net > 0) snprintf(buf, n, "injects %.4g %s", fb->net, Q);
        else snprintf(buf, n, "idle");
        return;
    default:
        break;
    }
    switch (fb->state) {
    case GW_STATE_GAINING:
        snprintf(buf, n, "gaining: takes %.4g %s from the aquifer", fb->out, Q);
        break;
    case GW_STATE_LOSING:
        snprintf(buf, n, "losing: gives %.4g %s to the aquifer", fb->in, Q);
        break;
    case GW_STATE_MIXED:
        snprintf(buf, n, "mixed: takes %.4g %s from the aquifer along some reaches and gives %.4g along "
                 "others; overall it %s %.4g %s",
                 fb->out, Q, fb->in, fb->net < 0 ? "gains" : "loses", fabs(fb->net), Q);
        break;
    default:
        snprintf(buf, n, "no exchange");
    }
}

/* Divides, features without one, catchments and stagnation points. */
static void print_divides(FILE *f, const gw_results *r, const char *Q)
{
    const gw_divide_analysis *a = r->divides;
    const gw_model *m = r->model;
    const char *L = m->length_unit ? m->length_unit : "";
    const char *T = m->time_unit ? m->time_unit : "";
    fprintf(f, "\nDivides and catchments\n");
    int nshort = 0;
    for (int i = 0; i < a->divides.n; i++) {
        const gw_divide *d = &a->divides.d[i];
        double len = 0.0;
        for (int k = 0; k + 1 < d->npts; k++)
            len += hypot(d->xy[2 * k + 2] - d->xy[2 * k], d->xy[2 * k + 3] - d->xy[2 * k + 1]);
        /* Pieces shorter than two cells, where three catchments meet, are noise in
         * a summary; report.json keeps them all. */
        if (len < 2.0 * fmin(r->problem->grid.dx, r->problem->grid.dy)) {
            nshort++;
            continue;
        }
        fprintf(f, "  divide between %s and %s: %.4g %s long, from (%.1f, %.1f) to (%.1f, %.1f)%s\n",
                gw_results_feature_name(r, d->a), gw_results_feature_name(r, d->b), len, L, d->xy[0], d->xy[1],
                d->xy[2 * d->npts - 2], d->xy[2 * d->npts - 1], d->closed ? " (closed loop)" : "");
    }
    if (nshort > 0)
        fprintf(f, "  (%d divide piece%s shorter than two cells not listed; see report.json)\n", nshort,
                nshort == 1 ? "" : "s");
    for (int i = 0; i < a->nno_divide; i++) {
        char line[512];
        gw_no_divide_describe(&a->no_divide[i], gw_results_feature_name(r, a->no_divide[i].losing),
                              gw_results_feature_name(r, a->no_divide[i].receiving), L, T, line, sizeof line);
        fprintf(f, "  %s\n", line);
    }
    if (a->divides.n == 0 && a->nno_divide == 0)
        fprintf(f, "  no divides: all water ends in one feature\n");
    const gw_catchments *c = &a->catchments;
    for (int k = 0; k < c->nfeatures; k++)
        if (c->discharge[k])
            fprintf(f, "  catchment of %-28.28s %10.0f %s2, recharge %.4g %s\n", gw_results_feature_name(r, k),
                    c->area[k], L, c->recharge[k], Q);
    for (int i = 0; i < a->nstagnation; i++)
        fprintf(f, "  stagnation point (%s) at (%.1f, %.1f), head %.3f %s\n",
                gw_stag_type_name(a->stagnation[i].type), a->stagnation[i].x, a->stagnation[i].y,
                a->stagnation[i].head, L);
}

/* Capture zones: area, source split, travel-time zone areas. */
static void print_capture(FILE *f, const gw_results *r, const char *Q)
{
    const gw_model *m = r->model;
    const char *L = m->length_unit ? m->length_unit : "";
    const char *T = m->time_unit ? m->time_unit : "";
    const gw_capture *c = r->capture;
    fprintf(f, "\nWell capture zones (steady state; share of the pumped water by source)\n");
    for (int i = 0; i < c->nzone; i++) {
        const gw_capture_zone *z = &c->zone[i];
        fprintf(f, "  %-28.28s pumping %.6g %s, capture zone %.6g %s2\n", gw_results_feature_name(r, z->feature),
                z->rate, Q, z->capture.area, L);
        fprintf(f, "    sources:");
        int any = 0;
        for (int k = 0; k < c->nfeatures; k++) {
            if (!(z->source[k] > 1e-3 * z->rate)) continue;
            fprintf(f, "%s %s %.1f %%", any ? "," : "", k == 0 ? "recharge" : gw_results_feature_name(r, k),
                    100.0 * z->source[k] / z->rate);
            any = 1;
        }
        fprintf(f, "%s\n", any ? "" : " none found");
        for (int t = 0; t < z->nttz; t++)
            fprintf(f, "    within %g %s: %.6g %s2\n", z->ttz[t].time, T, z->ttz[t].area, L);
    }
}

/* Cross-section: recharge and discharge areas, hinge points, flow systems. */
static void print_section(FILE *f, const gw_results *r, const char *Q)
{
    const gw_section *s = r->section;
    const char *L = r->model->length_unit ? r->model->length_unit : "";
    const char *T = r->model->time_unit ? r->model->time_unit : "";
    fprintf(f, "\nCross-section: recharge and discharge areas along the top\n");
    fprintf(f, "  recharge areas  %.4g %s long, %.4g %s in, mean %.3g %s/%s\n", s->recharge_length, L,
            s->recharge_flux, Q, s->recharge_rate, L, T);
    fprintf(f, "  discharge areas %.4g %s long, %.4g %s out, mean %.3g %s/%s\n", s->discharge_length, L,
            s->discharge_flux, Q, s->discharge_rate, L, T);
    fprintf(f, "  %d hinge point%s (recharge/discharge boundaries)", s->nhinges, s->nhinges == 1 ? "" : "s");
    for (int i = 0; i < s->nhinges && i < 8; i++)
        fprintf(f, "%s x %.1f", i ? "," : ":", s->hinge[i].x);
    fprintf(f, "%s\n", s->nhinges > 8 ? ", ..." : "");
    int n[3] = {0, 0, 0};
    double q[3] = {0, 0, 0}, depth[3] = {0, 0, 0};
    for (int i = 0; i < s->nsystems; i++) {
        int k = (int)s->system[i].kind;
        n[k]++;
        q[k] += s->system[i].flux;
        if (s->system[i].depth > depth[k]) depth[k] = s->system[i].depth;
    }
    for (int k = 0; k < 3; k++)
        if (n[k])
            fprintf(f, "  %-12s %2d flow system%s carrying %.4g %s, reaching down to %.4g %s below the water table\n",
                    gw_system_kind_name((gw_system_kind)k), n[k], n[k] == 1 ? " " : "s", q[k], Q, depth[k], L);
}

/* The main files this run wrote, so the user knows what to open first. */
static void print_written(FILE *f, const gw_results *r, const char *out_dir)
{
    static const char *const names[] = { "report.html", "report.json", "budget.csv", "heads.tif", "results.gpkg",
                                         "head.png", "catchments.png", "section.png", "budget.png" };
    fprintf(f, "\nResults in %s/:", out_dir);
    for (size_t i = 0; i < sizeof names / sizeof names[0]; i++) {
        char path[4096];
        snprintf(path, sizeof path, "%s/%s", out_dir, names[i]);
        if (access(path, F_OK) == 0)
            fprintf(f, " %s", names[i]);
    }
    if (r->model->ntransects > 0)
        fprintf(f, " transect_*.csv");
    fprintf(f, "\n");
}

void gw_print_summary(FILE *f, const gw_results *r, const char *out_dir)
{
    const gw_model *m = r->model;
    const gw_problem *p = r->problem;
    const gw_grid *g = &p->grid;
    const char *L = m->length_unit ? m->length_unit : "";
    char Q[64];
    if (p->type == GW_SECTION)   /* flows per unit width of section */
        snprintf(Q, sizeof Q, "%s2/%s", L, m->time_unit ? m->time_unit : "");
    else
        snprintf(Q, sizeof Q, "%s3/%s", L, m->time_unit ? m->time_unit : "");

    long active = 0;
    for (size_t k = 0; k < gw_grid_ncells(g); k++) active += p->active[k] != 0;

    fprintf(f, "gwdivide %s: %s\n", GWDIVIDE_VERSION, m->title && *m->title ? m->title : m->path);
    fprintf(f, "  grid      %d columns x %d rows, cells %g x %g %s, %ld active, %s\n", g->nx, g->ny, g->dx, g->dy,
            L, active, aquifer_word(p->type));
    const gw_solution *s = &r->solution;
    fprintf(f, "  solver    %s in %d iteration%s (%d factorization%s), %.3g s total\n",
            s->converged ? "converged" : "NOT converged", s->iterations, s->iterations == 1 ? "" : "s",
            s->factorizations, s->factorizations == 1 ? "" : "s", r->timing.total);
    const gw_budget *b = &r->budget;
    fprintf(f, "  balance   in %.6g %s, out %.6g %s, discrepancy %.2g %%\n", b->total_in, Q, b->total_out, Q,
            b->discrepancy_percent);

    fprintf(f, "\nWater budget by feature (%s%s%s; inflow enters the aquifer, outflow leaves it)\n", Q,
            p->type == GW_SECTION ? " per " : "", p->type == GW_SECTION ? L : "");
    fprintf(f, "  %-28s %-10s %12s %12s %12s\n", "feature", "type", "inflow", "outflow", "net");
    for (int i = 0; i < p->nfeatures && i < b->nfeatures; i++) {
        const gw_feature_budget *fb = &b->feature[i];
        char words[320];
        describe(words, sizeof words, &p->features[i], fb, Q, p->type == GW_SECTION);
        fprintf(f, "  %-28.28s %-10s %12.6g %12.6g %+12.6g  %s\n", gw_results_feature_name(r, i),
                type_word(p->features[i].type), fb->in, fb->out, fb->net, words);
    }

    /* ---- analysis summaries (divides, catchments, capture zones) go here ---- */
    if (r->divides) print_divides(f, r, Q);
    if (r->capture && r->capture->nzone > 0) print_capture(f, r, Q);
    if (r->section) print_section(f, r, Q);

    if (r->nobs > 0) {
        fprintf(f, "\nObservation wells (head, %s; residual = observed - simulated)\n", L);
        for (int i = 0; i < r->nobs; i++) {
            const gw_obs_spec *o = &m->obs[i];
            double sim = r->obs_simulated[i];
            if (isnan(o->head))
                fprintf(f, "  %-20.20s simulated %10.4f\n", o->name, sim);
            else
                fprintf(f, "  %-20.20s observed %10.4f  simulated %10.4f  residual %+8.4f\n", o->name, o->head, sim,
                        o->head - sim);
        }
        if (r->obs_stats.n > 0)
            fprintf(f, "  %d with observed heads: mean error %+.3g %s, mean absolute error %.3g %s, RMS %.3g %s\n",
                    r->obs_stats.n, r->obs_stats.mean_error, L, r->obs_stats.mean_abs_error, L,
                    r->obs_stats.rms_error, L);
    }

    if (r->warnings.n > 0) {
        fprintf(f, "\nWarnings\n");
        for (int i = 0; i < r->warnings.n; i++) fprintf(f, "  - %s\n", r->warnings.item[i]);
    }
    if (p->type == GW_SECTION)
        fprintf(f, "\nCautions: screening tool; steady state, 2-D vertical section per unit width with no flow\n"
                   "across its plane; the top boundary is prescribed, so flow systems follow from its shape,\n"
                   "the conductivity and the anisotropy (full text in report.json).\n");
    else
        fprintf(f, "\nCautions: screening tool; steady state, 2-D Dupuit flow; divides and capture zones are\n"
                   "sensitive to recharge and conductivity; protection areas are a matter for local regulation\n"
                   "and licensed professional judgement (full text in report.json).\n");
    print_written(f, r, out_dir);
}
