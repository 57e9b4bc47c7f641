#include "report_html.h"

#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "map_canvas.h"

#ifndef GWDIVIDE_VERSION
#define GWDIVIDE_VERSION "dev"
#endif

static void esc(FILE *f, const char *s)
{
    for (; s && *s; s++) {
        switch (*s) {
        case '&': fputs("&amp;", f); break;
        case '<': fputs("&lt;", f); break;
        case '>': fputs("&gt;", f); break;
        case '"': fputs("&quot;", f); break;
        default: fputc(*s, f);
        }
    }
}

static const char *num(char *buf, double v)
{
    return gw_fmt_num(buf, 32, v, 6);
}

/* Base64 (RFC 4648) of a whole file into f. */
static int embed_file(FILE *f, const char *path, gw_error *err)
{
    static const char tab[] = "ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/";
    FILE *in = fopen(path, "rb");
    if (!in) return gw_fail(err, "cannot read %s: %s", path, strerror(errno));
    unsigned char b[3];
    size_t n;
    int col = 0;
    while ((n = fread(b, 1, 3, in)) > 0) {
        unsigned v = (unsigned)b[0] << 16 | (n > 1 ? (unsigned)b[1] << 8 : 0) | (n > 2 ? b[2] : 0);
        fputc(tab[(v >> 18) & 63], f);
        fputc(tab[(v >> 12) & 63], f);
        fputc(n > 1 ? tab[(v >> 6) & 63] : '=', f);
        fputc(n > 2 ? tab[v & 63] : '=', f);
        if (++col == 19) { fputc('\n', f); col = 0; }
        if (n < 3) break;
    }
    int bad = ferror(in);
    fclose(in);
    if (bad) return gw_fail(err, "cannot read %s", path);
    return 0;
}

static const char *CSS =
    "body{font-family:'DejaVu Sans',Verdana,sans-serif;color:#1b1d22;background:#fff;margin:0;line-height:1.45}"
    "main{max-width:1100px;margin:0 auto;padding:1.2rem 1.6rem 3rem}"
    "h1{font-size:1.6rem;margin:.2rem 0 .2rem}h2{font-size:1.2rem;margin:2rem 0 .6rem;"
    "border-bottom:2px solid #2b4a6f;padding-bottom:.2rem}"
    ".sub{color:#555;margin:0 0 1rem}"
    "table{border-collapse:collapse;margin:.4rem 0 1rem;font-size:.92rem;display:block;max-width:100%;overflow-x:auto}"
    "th,td{padding:.3rem .7rem;border-bottom:1px solid #d7dbe2;text-align:left;vertical-align:top}"
    "th{background:#eef1f5}td.n{text-align:right;font-variant-numeric:tabular-nums}"
    ".cards{display:flex;flex-wrap:wrap;gap:.8rem}.card{border:1px solid #d7dbe2;border-radius:6px;"
    "padding:.6rem .9rem;min-width:12rem}.card b{display:block;font-size:1.25rem}"
    "figure{margin:1rem 0}figure img{max-width:100%;height:auto;border:1px solid #d7dbe2}"
    "figcaption{color:#444;font-size:.9rem}"
    ".warn{background:#fff4e0;border-left:4px solid #c77800;padding:.5rem .8rem}"
    ".caution{background:#eef3f8;border-left:4px solid #2b4a6f;padding:.5rem .8rem}"
    ".first{border:2px solid #c77800;border-radius:6px;padding:.2rem 1rem;margin:1rem 0}"
    ".first h2{border:none;margin:.6rem 0 .2rem}"
    "pre{background:#f6f7f9;border:1px solid #d7dbe2;padding:.7rem;overflow-x:auto;font-size:.82rem}"
    "nav a{margin-right:1rem}"
    "@media print{main{max-width:none;padding:0}nav{display:none}h2{break-after:avoid}"
    "figure,table{break-inside:avoid}figure img{max-width:100%;border:none}pre{white-space:pre-wrap}"
    "table{display:table;font-size:.8rem}th,td{padding:.2rem .45rem}}";

/* Warnings and cautions, boxed right under the summary: a reader who
 * stops after the first screen has still seen them. */
static void write_notes(FILE *f, const gw_results *r)
{
    fputs("<div class=\"first\"><h2 id=\"notes\">Read before use: warnings and cautions</h2>\n", f);
    if (r->warnings.n == 0) fputs("<p>No warnings for this run.</p>\n", f);
    else {
        fputs("<div class=\"warn\"><ul>\n", f);
        for (int i = 0; i < r->warnings.n; i++) {
            fputs("<li>", f);
            esc(f, r->warnings.item[i]);
            fputs("</li>\n", f);
        }
        fputs("</ul></div>\n", f);
    }
    if (r->cautions.n > 0) {
        fputs("<div class=\"caution\"><ul>\n", f);
        for (int i = 0; i < r->cautions.n; i++) {
            fputs("<li>", f);
            esc(f, r->cautions.item[i]);
            fputs("</li>\n", f);
        }
        fputs("</ul></div>\n", f);
    }
    fputs("<p></p></div>\n", f);
}

/* What a feature does to the aquifer, in words (net = in - out, the
 * aquifer's view). */
static const char *exchange_words(const gw_feature *ft, const gw_feature_budget *fb)
{
    switch (ft->type) {
    case GW_FEAT_STREAM:
        switch (fb->state) {
        case GW_STATE_GAINING: return "gaining: takes water from the aquifer";
        case GW_STATE_LOSING: return "losing: feeds the aquifer";
        case GW_STATE_MIXED:
            return fb->net < 0 ? "gaining and losing reaches; gaining overall"
                               : "gaining and losing reaches; losing overall";
        default: return "no exchange";
        }
    case GW_FEAT_DRAIN: return fb->out > 0 ? "drains the aquifer" : "dry: no flow";
    case GW_FEAT_WELL: return fb->out > 0 ? "pumps from the aquifer" : fb->in > 0 ? "injects into the aquifer" : "idle";
    case GW_FEAT_RECHARGE: return "recharges the aquifer";
    default:
        if (fb->in > 0 && fb->out > 0)
            return fb->net < 0 ? "gives and takes; takes overall" : "gives and takes; gives overall";
        return fb->out > 0 ? "takes water from the aquifer" : fb->in > 0 ? "gives water to the aquifer" : "no exchange";
    }
}

int gw_report_html_write(const gw_results *r, const gw_map_layers *l, const gw_report_image *img,
                         int nimg, const char *path, gw_error *err)
{
    const gw_model *m = r->model;
    const char *lu = m && m->length_unit ? m->length_unit : "m";
    const char *tu = m && m->time_unit ? m->time_unit : "day";
    char nb[32], nb2[32], nb3[32], nb4[32], flow[64], area[32];
    snprintf(flow, sizeof flow, "%s&sup3;/%s", lu, tu);
    snprintf(area, sizeof area, "%s&sup2;", lu);
    FILE *f = fopen(path, "w");
    if (!f) return gw_fail(err, "cannot write %s: %s", path, strerror(errno));
    const char *title = m && m->title ? m->title : "Groundwater model";

    fputs("<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">\n"
          "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n<title>", f);
    esc(f, title);
    fprintf(f, " - gwdivide report</title>\n<style>%s</style></head>\n<body><main>\n", CSS);
    fputs("<h1>", f);
    esc(f, title);
    fprintf(f, "</h1>\n<p class=\"sub\">Steady-state groundwater model results, gwdivide %s. ", GWDIVIDE_VERSION);
    if (m && m->path) { fputs("Model file: <code>", f); esc(f, m->path); fputs("</code>.", f); }
    fputs("</p>\n<nav><a href=\"#notes\">Cautions</a><a href=\"#balance\">Balance</a><a href=\"#features\">Features</a>"
          "<a href=\"#maps\">Maps</a><a href=\"#divides\">Divides</a><a href=\"#obs\">Observations</a>"
          "<a href=\"#inputs\">Inputs</a></nav>\n", f);

    /* Summary cards. */
    fputs("<h2 id=\"summary\">Summary</h2><div class=\"cards\">\n", f);
    if (r->have_budget) {
        fprintf(f, "<div class=\"card\">Total inflow<b>%s %s</b></div>\n", num(nb, r->budget.total_in), flow);
        fprintf(f, "<div class=\"card\">Balance discrepancy<b>%s %%</b></div>\n",
                gw_fmt_num(nb, sizeof nb, r->budget.discrepancy_percent, 2));
    }
    if (r->problem) {
        const gw_grid *g = &r->problem->grid;
        long act = 0;
        for (size_t k = 0; k < gw_grid_ncells(g); k++) act += r->problem->active[k] != 0;
        fprintf(f, "<div class=\"card\">Grid<b>%d &times; %d cells</b>%s &times; %s %s, %ld active</div>\n",
                g->nx, g->ny, num(nb, g->dx), num(nb2, g->dy), lu, act);
    }
    if (r->have_solution)
        fprintf(f, "<div class=\"card\">Solver<b>%s</b>%d iteration%s</div>\n",
                r->solution.converged ? "converged" : "NOT converged", r->solution.iterations,
                r->solution.iterations == 1 ? "" : "s");
    if (l && l->ndivides)
        fprintf(f, "<div class=\"card\">Groundwater divides<b>%d</b></div>\n", l->ndivides);
    if (r->obs_stats.n > 0)
        fprintf(f, "<div class=\"card\">Fit to observed heads<b>RMS %s %s</b>mean %s %s, %d well%s</div>\n",
                gw_fmt_num(nb, sizeof nb, r->obs_stats.rms_error, 3), lu,
                gw_fmt_num(nb2, sizeof nb2, r->obs_stats.mean_error, 3), lu, r->obs_stats.n,
                r->obs_stats.n == 1 ? "" : "s");
    fputs("</div>\n", f);
    write_notes(f, r);

    /* Balance and features. */
    if (r->have_budget && r->problem) {
        const gw_budget *b = &r->budget;
        fprintf(f, "<h2 id=\"balance\">Water balance</h2>\n<table><tr><th>Total inflow (%s)</th>"
                   "<th>Total outflow (%s)</th><th>Discrepancy</th></tr>\n", flow, flow);
        fprintf(f, "<tr><td class=\"n\">%s</td><td class=\"n\">%s</td><td class=\"n\">%s %%</td></tr></table>\n",
                num(nb, b->total_in), num(nb2, b->total_out), gw_fmt_num(nb3, sizeof nb3, b->discrepancy_percent, 2));
        fprintf(f, "<h2 id=\"features\">Features</h2>\n<p>Signs are the aquifer's: inflow enters the "
                   "aquifer from the feature, outflow leaves the aquifer to it; a gaining stream "
                   "takes water from the aquifer.</p>\n<table><tr><th>Feature</th><th>Type</th>"
                   "<th>Exchange with the aquifer</th><th>Inflow (%s)</th><th>Outflow (%s)</th><th>Net (%s)</th></tr>\n",
                flow, flow, flow);
        for (int i = 0; i < b->nfeatures && i < r->problem->nfeatures; i++) {
            const gw_feature_budget *fb = &b->feature[i];
            fputs("<tr><td>", f);
            esc(f, r->problem->features[i].name);
            fprintf(f, "</td><td>%s</td><td>%s</td><td class=\"n\">%s</td><td class=\"n\">%s</td>"
                       "<td class=\"n\">%s</td></tr>\n",
                    gw_feature_type_name(r->problem->features[i].type),
                    exchange_words(&r->problem->features[i], fb),
                    num(nb, fb->in), num(nb2, fb->out), num(nb3, fb->net));
        }
        fputs("</table>\n", f);
    }

    /* Maps. */
    if (nimg > 0) fputs("<h2 id=\"maps\">Maps and charts</h2>\n", f);
    for (int i = 0; i < nimg; i++) {
        fputs("<figure><img alt=\"", f);
        esc(f, img[i].caption);
        fputs("\" src=\"data:image/png;base64,\n", f);
        if (embed_file(f, img[i].path, err) != 0) {
            fclose(f);
            return -1;
        }
        fputs("\"><figcaption>", f);
        esc(f, img[i].caption);
        fputs("</figcaption></figure>\n", f);
    }

    /* Cross-section: recharge / discharge areas and flow systems (Toth 1963). */
    if (r->section) {
        const gw_section *s = r->section;
        fputs("<h2 id=\"section\">Cross-section: flow systems</h2>\n", f);
        fprintf(f, "<p>Recharge areas %s %s long, discharge areas %s %s long; %d hinge point%s. "
                   "Flows are per %s of section width.</p>\n",
                num(nb, s->recharge_length), lu, num(nb2, s->discharge_length), lu, s->nhinges,
                s->nhinges == 1 ? "" : "s", lu);
        if (s->nsystems > 0)
            fputs("<table><tr><th>System</th><th>Recharge x</th><th>Discharge x</th><th>Flow</th>"
                  "<th>Depth below water table</th></tr>\n", f);
        for (int i = 0; i < s->nsystems; i++) {
            const gw_flow_system *y = &s->system[i];
            fprintf(f, "<tr><td>%s</td><td class=\"n\">%s&ndash;%s</td>", gw_system_kind_name(y->kind),
                    num(nb, y->x_from), num(nb2, y->x_to));
            fprintf(f, "<td class=\"n\">%s&ndash;%s</td><td class=\"n\">%s</td><td class=\"n\">%s</td></tr>\n",
                    num(nb, s->area[y->discharge_area].x0), num(nb2, s->area[y->discharge_area].x1),
                    num(nb3, y->flux), num(nb4, y->depth));
        }
        if (s->nsystems > 0) fputs("</table>\n", f);
    }

    /* Divides, catchments, capture zones. */
    fputs("<h2 id=\"divides\">Divides, catchments and capture zones</h2>\n", f);
    if (!l || (!l->ndivides && !l->ncatchments && !l->ncapture))
        fputs("<p>No divides, catchments or capture zones were computed for this run.</p>\n", f);
    if (l && l->ndivides) {
        fputs("<table><tr><th>Divide between</th><th>Vertices</th><th>From (x, y)</th><th>To (x, y)</th></tr>\n", f);
        for (int i = 0; i < l->ndivides; i++) {
            const gw_map_divide *d = &l->divides[i];
            fputs("<tr><td>", f);
            esc(f, d->between[0]);
            fputs(" | ", f);
            esc(f, d->between[1]);
            fprintf(f, "</td><td class=\"n\">%d</td>", d->line.n);
            if (d->line.n > 0)
                fprintf(f, "<td class=\"n\">%s, %s</td><td class=\"n\">%s, %s</td>",
                        gw_fmt_num(nb, sizeof nb, d->line.xy[0], 9), gw_fmt_num(nb2, sizeof nb2, d->line.xy[1], 9),
                        gw_fmt_num(nb3, sizeof nb3, d->line.xy[2 * d->line.n - 2], 9),
                        gw_fmt_num(nb4, sizeof nb4, d->line.xy[2 * d->line.n - 1], 9));
            else
                fputs("<td></td><td></td>", f);
            fputs("</tr>\n", f);
        }
        fputs("</table>\n", f);
    }
    if (l && l->ncatchments && r->problem) {
        fprintf(f, "<table><tr><th>Catchment of</th><th>Area (%s)</th><th>Recharge (%s)</th></tr>\n", area, flow);
        for (int i = 0; i < l->ncatchments; i++) {
            int fi = l->catchments[i].feature;
            fputs("<tr><td>", f);
            esc(f, fi >= 0 && fi < r->problem->nfeatures ? r->problem->features[fi].name : "?");
            fprintf(f, "</td><td class=\"n\">%s</td><td class=\"n\">%s</td></tr>\n",
                    num(nb, l->catchments[i].area), num(nb2, l->catchments[i].recharge));
        }
        fputs("</table>\n", f);
    }
    if (l && l->ncapture) {
        fprintf(f, "<table><tr><th>Well</th><th>Capture zone area (%s)</th><th>Travel-time zones "
                   "(time %s: area %s)</th></tr>\n", area, tu, area);
        for (int i = 0; i < l->ncapture; i++) {
            const gw_map_capture *c = &l->capture[i];
            fputs("<tr><td>", f);
            esc(f, c->well);
            fprintf(f, "</td><td class=\"n\">%s</td><td>", num(nb, c->area));
            for (int z = 0; z < c->nzones; z++)
                fprintf(f, "%s%s: %s", z ? "; " : "", num(nb, c->zones[z].time), num(nb2, c->zones[z].area));
            fputs("</td></tr>\n", f);
        }
        fputs("</table>\n", f);
    }

    /* Observations. */
    fputs("<h2 id=\"obs\">Observation wells</h2>\n", f);
    if (!m || m->nobs == 0) {
        fputs("<p>No observation wells in the model.</p>\n", f);
    } else {
        fprintf(f, "<table><tr><th>Name</th><th>x</th><th>y</th><th>Observed (%s)</th><th>Simulated (%s)</th>"
                   "<th>Residual (%s)</th></tr>\n", lu, lu, lu);
        for (int i = 0; i < m->nobs; i++) {
            double sim = (r->obs_simulated && i < r->nobs) ? r->obs_simulated[i] : NAN;
            double obs = m->obs[i].head;
            fputs("<tr><td>", f);
            esc(f, m->obs[i].name);
            fprintf(f, "</td><td class=\"n\">%s</td><td class=\"n\">%s</td>",
                    gw_fmt_num(nb, sizeof nb, m->obs[i].x, 10), gw_fmt_num(nb2, sizeof nb2, m->obs[i].y, 10));
            fprintf(f, "<td class=\"n\">%s</td><td class=\"n\">%s</td><td class=\"n\">%s</td></tr>\n",
                    num(nb, obs), num(nb2, sim),
                    (isfinite(obs) && isfinite(sim)) ? gw_fmt_num(nb3, sizeof nb3, obs - sim, 4) : "-");
        }
        fputs("</table>\n", f);
        if (r->obs_stats.n > 0)
            fprintf(f, "<p>Residuals (observed &minus; simulated) over %d well%s: mean %s %s, mean absolute "
                       "%s %s, root mean square %s %s.</p>\n",
                    r->obs_stats.n, r->obs_stats.n == 1 ? "" : "s",
                    gw_fmt_num(nb, sizeof nb, r->obs_stats.mean_error, 4), lu,
                    gw_fmt_num(nb2, sizeof nb2, r->obs_stats.mean_abs_error, 4), lu,
                    gw_fmt_num(nb3, sizeof nb3, r->obs_stats.rms_error, 4), lu);
    }

    /* The model file as given, so the report stands on its own. */
    fputs("<h2 id=\"inputs\">Model inputs</h2>\n", f);
    FILE *in = (m && m->path) ? fopen(m->path, "r") : NULL;
    if (in) {
        fputs("<pre>", f);
        char line[4096];
        long total = 0;
        while (fgets(line, sizeof line, in) && total < 2000000) {
            esc(f, line);
            total += (long)strlen(line);
        }
        fclose(in);
        fputs("</pre>\n", f);
    } else {
        fputs("<p>The model file could not be read back for this report.</p>\n", f);
    }
    fputs("</main></body></html>\n", f);
    if (fflush(f) != 0 || ferror(f)) {
        int e = errno;
        fclose(f);
        return gw_fail(err, "cannot write %s: %s", path, e ? strerror(e) : "write error");
    }
    if (fclose(f) != 0) return gw_fail(err, "cannot write %s: %s", path, strerror(errno));
    return 0;
}
