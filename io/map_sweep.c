#include "map_sweep.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "map_profile.h"
#include "sweep_key.h"
#include "transect_csv.h"

enum { NS = GW_SWEEP_PROFILE_SAMPLES };

int gw_sweep_profiles_init(gw_sweep_profiles *sp, int nruns, gw_error *err)
{
    memset(sp, 0, sizeof *sp);
    if (nruns < 1) return 0;
    sp->nruns = nruns;
    sp->ncurves = nruns < GW_SWEEP_PROFILE_CURVES ? nruns : GW_SWEEP_PROFILE_CURVES;
    sp->run_of = malloc((size_t)sp->ncurves * sizeof *sp->run_of);
    sp->taken = calloc((size_t)sp->ncurves, sizeof *sp->taken);
    if (!sp->run_of || !sp->taken) {
        gw_sweep_profiles_free(sp);
        return gw_fail(err, "out of memory");
    }
    /* Evenly through the runs, first and last included. */
    for (int c = 0; c < sp->ncurves; c++)
        sp->run_of[c] = sp->ncurves > 1 ? (int)lround((double)c * (nruns - 1) / (sp->ncurves - 1)) : 0;
    sp->ntransects = -1;   /* not known until the first model */
    return 0;
}

/* Settings and transect names from the first model taken. */
static int first_model(gw_sweep_profiles *sp, const gw_model *m, gw_error *err)
{
    int nt = m->ntransects;
    sp->draw = m->maps && (m->map_set & GW_MAP_PROFILES) && nt > 0;
    sp->width = m->map_width;
    sp->ntransects = nt;
    if (!nt) return 0;
    sp->file = calloc((size_t)nt, sizeof *sp->file);
    sp->dist = malloc((size_t)nt * NS * sizeof *sp->dist);
    sp->head = malloc((size_t)nt * sp->ncurves * NS * sizeof *sp->head);
    if (!sp->file || !sp->dist || !sp->head || (m->crs && !(sp->crs = strdup(m->crs))))
        return gw_fail(err, "out of memory");
    for (size_t k = 0; k < (size_t)nt * sp->ncurves * NS; k++) sp->head[k] = NAN;
    for (int t = 0; t < nt; t++) {
        char csv[300], png[320];
        gw_transect_file_name(m, t, csv, sizeof csv);   /* "transect_<name>.csv" */
        size_t n = strlen(csv);
        if (n > 4) csv[n - 4] = 0;
        snprintf(png, sizeof png, "sweep_profile_%s.png", csv + strlen("transect_"));
        if (!(sp->file[t] = strdup(png))) return gw_fail(err, "out of memory");
    }
    return 0;
}

int gw_sweep_profiles_take(gw_sweep_profiles *sp, int run, const gw_model *m, const gw_grid *g,
                           const double *head, gw_error *err)
{
    if (sp->ncurves == 0) return 0;
    if (sp->ntransects < 0 && first_model(sp, m, err) != 0) return -1;
    if (!sp->draw || m->ntransects != sp->ntransects) return 0;
    for (int c = 0; c < sp->ncurves; c++) {
        if (sp->run_of[c] != run) continue;
        for (int t = 0; t < sp->ntransects; t++) {
            const gw_transect_spec *ts = &m->transects[t];
            double *h = sp->head + ((size_t)t * sp->ncurves + c) * NS;
            if (ts->line.n < 2) continue;
            if (gw_profile_sample(g, head, ts->line.xy, ts->line.n, NS, sp->dist + (size_t)t * NS, h, err) != 0)
                return -1;
        }
        sp->taken[c] = 1;
    }
    return 0;
}

int gw_sweep_profiles_write(const gw_sweep_profiles *sp, const gw_sweep *s, gw_outdir *o,
                            gw_error *err)
{
    if (!sp->draw || sp->ntransects <= 0) return 0;
    int rc = -1;
    gw_profile_curve *cu = calloc((size_t)sp->ncurves, sizeof *cu);
    char (*lab)[96] = calloc((size_t)sp->ncurves, sizeof *lab);
    int maxmarks = 0;
    for (int c = 0; c < sp->ncurves; c++) {
        int r = sp->run_of[c];
        if (r < s->nruns && s->run[r].ncross)
            for (int t = 0; t < s->ntransects; t++) maxmarks += s->run[r].ncross[t];
    }
    gw_profile_mark *mk = malloc((size_t)(maxmarks ? maxmarks : 1) * sizeof *mk);
    if (!cu || !lab || !mk) {
        gw_fail(err, "out of memory");
        goto done;
    }
    /* Subtitle: the swept keys; curve labels: their values. */
    char keys[400];
    size_t k = 0;
    keys[0] = 0;
    for (int i = 0; i < s->nvary && k + 8 < sizeof keys; i++) {
        int w = snprintf(keys + k, sizeof keys - k, "%s%s", i ? ", " : "", s->vary[i].key);
        if (w < 0) break;
        k += (size_t)w < sizeof keys - k ? (size_t)w : sizeof keys - k - 1;
    }
    for (int t = 0; t < sp->ntransects && t < s->ntransects; t++) {
        int nc = 0, nm = 0;
        for (int c = 0; c < sp->ncurves; c++) {
            int r = sp->run_of[c];
            if (!sp->taken[c] || r >= s->nruns) continue;
            const gw_sweep_run *run = &s->run[r];
            size_t kk = 0;
            lab[nc][0] = 0;
            for (int i = 0; i < s->nvary && run->values && kk + 4 < sizeof lab[nc]; i++) {
                char num[40];
                gw_format_number(num, sizeof num, run->values[i]);
                int w = snprintf(lab[nc] + kk, sizeof lab[nc] - kk, "%s%s", i ? ", " : "", num);
                if (w < 0) break;
                kk += (size_t)w < sizeof lab[nc] - kk ? (size_t)w : sizeof lab[nc] - kk - 1;
            }
            if (!s->nvary) snprintf(lab[nc], sizeof lab[nc], "run %d", r + 1);
            cu[nc] = (gw_profile_curve){lab[nc], sp->dist + (size_t)t * NS,
                                        sp->head + ((size_t)t * sp->ncurves + c) * NS, NS};
            if (run->ncross && run->cross)
                for (int j = 0; j < run->ncross[t] && nm < maxmarks; j++)
                    if (run->cross[t][j].kind == GW_CROSS_DIVIDE)
                        mk[nm++] = (gw_profile_mark){run->cross[t][j].at.dist, nc};
            nc++;
        }
        if (nc == 0) continue;
        char sub[600];
        const char *tn = s->transect_name && s->transect_name[t] ? s->transect_name[t] : "";
        if (sp->nruns > nc)
            snprintf(sub, sizeof sub, "Transect %s, %d of %d runs (values of %s)", tn, nc, sp->nruns, keys);
        else
            snprintf(sub, sizeof sub, "Transect %s, one curve per run (values of %s)", tn, keys);
        gw_profile_chart pc = {s->title, sub, s->length_unit, sp->crs, sp->width, cu, nc, mk, nm};
        const char *path = gw_outdir_path(o, sp->file[t], err);
        if (!path || gw_map_profile_write(&pc, path, err) != 0) goto done;
    }
    rc = 0;
done:
    free(cu);
    free(lab);
    free(mk);
    return rc;
}

void gw_sweep_profiles_free(gw_sweep_profiles *sp)
{
    if (sp->file)
        for (int t = 0; t < sp->ntransects; t++) free(sp->file[t]);
    free(sp->file);
    free(sp->run_of);
    free(sp->taken);
    free(sp->dist);
    free(sp->head);
    free(sp->crs);
    memset(sp, 0, sizeof *sp);
}
