#include "sweep_out.h"

#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "csv_writer.h"
#include "json_writer.h"

void gw_sweep_run_free(gw_sweep_run *r, int ntransects)
{
    if (!r) return;
    free(r->values);
    free(r->in);
    free(r->out);
    free(r->state);
    gw_divides_free(&r->divides);
    free(r->no_divide);
    if (r->cross)
        for (int t = 0; t < ntransects; t++) free(r->cross[t]);
    free(r->cross);
    free(r->ncross);
    memset(r, 0, sizeof *r);
}

void gw_sweep_free(gw_sweep *s)
{
    if (!s) return;
    for (int i = 0; i < s->nruns; i++) gw_sweep_run_free(&s->run[i], s->ntransects);
    free(s->run);
    for (int i = 0; i < s->nfeatures; i++) free(s->feature_name[i]);
    free(s->feature_name);
    free(s->feature_type);
    for (int i = 0; i < s->ntransects; i++) free(s->transect_name[i]);
    free(s->transect_name);
    free(s->track);
    free(s->title);
    free(s->length_unit);
    free(s->time_unit);
    memset(s, 0, sizeof *s);
}

/* Occurrence number of crossing c among the crossings of run r on transect
 * t with the same feature pair (1-based, by distance). */
static int occurrence(const gw_sweep_run *r, int t, int c)
{
    int k = 0;
    for (int i = 0; i <= c; i++)
        if (r->cross[t][i].a == r->cross[t][c].a && r->cross[t][i].b == r->cross[t][c].b) k++;
    return k;
}

int gw_sweep_collect_tracks(gw_sweep *s, gw_error *err)
{
    int cap = 0;
    for (int r = 0; r < s->nruns; r++) {
        const gw_sweep_run *run = &s->run[r];
        if (!run->cross) continue;
        for (int t = 0; t < s->ntransects; t++)
            for (int c = 0; c < run->ncross[t]; c++) {
                gw_sweep_track k = { t, run->cross[t][c].a, run->cross[t][c].b, occurrence(run, t, c) };
                int seen = 0;
                for (int i = 0; i < s->ntrack && !seen; i++)
                    seen = !memcmp(&s->track[i], &k, sizeof k);
                if (seen) continue;
                if (s->ntrack == cap) {
                    int nc = cap ? 2 * cap : 8;
                    gw_sweep_track *nt = realloc(s->track, (size_t)nc * sizeof *nt);
                    if (!nt) return gw_fail(err, "out of memory");
                    s->track = nt;
                    cap = nc;
                }
                s->track[s->ntrack++] = k;
            }
    }
    return 0;
}

double gw_sweep_track_value(const gw_sweep *s, int r, int t)
{
    const gw_sweep_run *run = &s->run[r];
    const gw_sweep_track *k = &s->track[t];
    if (!run->cross) return NAN;
    for (int c = 0; c < run->ncross[k->transect]; c++) {
        const gw_transect_crossing *x = &run->cross[k->transect][c];
        if (x->a == k->a && x->b == k->b && occurrence(run, k->transect, c) == k->occurrence)
            return x->at.dist;
    }
    return NAN;
}

/* ---- sweep.csv -------------------------------------------------------- */

static const char *fname(const gw_sweep *s, int i)
{
    return i >= 0 && i < s->nfeatures ? s->feature_name[i] : "?";
}

static int write_table(FILE *f, const void *ctx, gw_error *err)
{
    const gw_sweep *s = ctx;
    char L[32], T[32], h[1200];
    gw_csv_unit_token(L, sizeof L, s->length_unit);
    gw_csv_unit_token(T, sizeof T, s->time_unit);

    fputs("run", f);
    for (int v = 0; v < s->nvary; v++) { fputc(',', f); gw_csv_field(f, s->vary[v].key); }
    fputs(",converged,iterations,discrepancy_percent", f);
    for (int i = 0; i < s->nfeatures; i++) {
        snprintf(h, sizeof h, "%s inflow_%s3_per_%s", fname(s, i), L, T);
        fputc(',', f); gw_csv_field(f, h);
        snprintf(h, sizeof h, "%s outflow_%s3_per_%s", fname(s, i), L, T);
        fputc(',', f); gw_csv_field(f, h);
        snprintf(h, sizeof h, "%s state", fname(s, i));
        fputc(',', f); gw_csv_field(f, h);
    }
    fputs(",divide_count", f);
    for (int t = 0; t < s->ntrack; t++) {
        const gw_sweep_track *k = &s->track[t];
        char occ[16] = "";
        if (k->occurrence > 1) snprintf(occ, sizeof occ, " #%d", k->occurrence);
        snprintf(h, sizeof h, "%s: %s | %s divide%s distance_%s", s->transect_name[k->transect],
                 fname(s, k->a), fname(s, k->b), occ, L);
        fputc(',', f); gw_csv_field(f, h);
    }
    fputs(",no_divide\n", f);

    for (int r = 0; r < s->nruns; r++) {
        const gw_sweep_run *run = &s->run[r];
        fprintf(f, "%d", r + 1);
        for (int v = 0; v < s->nvary; v++) {
            char b[40];
            gw_format_number(b, sizeof b, run->values[v]);
            fprintf(f, ",%s", b);
        }
        fprintf(f, ",%s,%d", run->converged ? "true" : "false", run->iterations);
        gw_csv_num(f, run->discrepancy_percent, 12);
        for (int i = 0; i < s->nfeatures; i++) {
            gw_csv_num(f, run->in[i], 12);
            gw_csv_num(f, run->out[i], 12);
            fprintf(f, ",%s", gw_state_name(run->state[i]));
        }
        if (run->have_divides) fprintf(f, ",%d", run->divides.n);
        else fputc(',', f);
        for (int t = 0; t < s->ntrack; t++) gw_csv_num(f, gw_sweep_track_value(s, r, t), 12);
        h[0] = 0;
        size_t hl = 0;
        for (int i = 0; i < run->nno_divide && hl + 4 < sizeof h; i++) {
            int w = snprintf(h + hl, sizeof h - hl, "%s%s -> %s", i ? "; " : "",
                             fname(s, run->no_divide[i].losing), fname(s, run->no_divide[i].receiving));
            if (w < 0) break;
            hl += (size_t)w < sizeof h - hl ? (size_t)w : sizeof h - hl - 1;
        }
        fputc(',', f);
        gw_csv_field(f, h);
        fputc('\n', f);
    }
    return 0;
}

int gw_sweep_csv_save(const gw_sweep *s, const char *path, gw_error *err)
{
    return gw_csv_save(path, write_table, s, err);
}

/* ---- sweep_divides.json ----------------------------------------------- */

static void pair(gw_json *j, const gw_sweep *s, int a, int b)
{
    gw_json_key(j, "between");
    gw_json_array_begin_inline(j);
    gw_json_string(j, fname(s, a));
    gw_json_string(j, fname(s, b));
    gw_json_array_end(j);
}

static void write_run(gw_json *j, const gw_sweep *s, int r)
{
    const gw_sweep_run *run = &s->run[r];
    gw_json_object_begin(j);
    gw_json_kv_int(j, "run", r + 1);
    gw_json_key(j, "values");
    gw_json_object_begin_inline(j);
    for (int v = 0; v < s->nvary; v++) gw_json_kv_double(j, s->vary[v].key, run->values[v]);
    gw_json_object_end(j);
    gw_json_kv_bool(j, "converged", run->converged);
    gw_json_key(j, "divides");
    gw_json_array_begin(j);
    for (int i = 0; i < run->divides.n; i++) {
        const gw_divide *d = &run->divides.d[i];
        gw_json_object_begin(j);
        pair(j, s, d->a, d->b);
        gw_json_key(j, "line");
        gw_json_array_begin(j);
        for (int k = 0; k < d->npts; k++) gw_json_pair(j, d->xy[2 * k], d->xy[2 * k + 1]);
        gw_json_array_end(j);
        if (d->closed) gw_json_kv_bool(j, "closed", 1);
        gw_json_object_end(j);
    }
    gw_json_array_end(j);
    gw_json_key(j, "transect_crossings");
    gw_json_array_begin(j);
    for (int t = 0; run->cross && t < s->ntransects; t++)
        for (int c = 0; c < run->ncross[t]; c++) {
            const gw_transect_crossing *x = &run->cross[t][c];
            gw_json_object_begin_inline(j);
            gw_json_kv_string(j, "transect", s->transect_name[t]);
            gw_json_kv_double(j, "distance", x->at.dist);
            gw_json_kv_pair(j, "at", x->at.x, x->at.y);
            pair(j, s, x->a, x->b);
            gw_json_object_end(j);
        }
    gw_json_array_end(j);
    gw_json_key(j, "no_divide");
    gw_json_array_begin(j);
    for (int i = 0; i < run->nno_divide; i++) {
        gw_json_object_begin_inline(j);
        pair(j, s, run->no_divide[i].losing, run->no_divide[i].receiving);
        gw_json_kv_double(j, "loss", run->no_divide[i].loss);
        gw_json_kv_double(j, "reaching", run->no_divide[i].delivered);
        gw_json_object_end(j);
    }
    gw_json_array_end(j);
    gw_json_object_end(j);
}

int gw_sweep_json_save(const gw_sweep *s, const char *path, gw_error *err)
{
    FILE *f = fopen(path, "w");
    if (!f) return gw_fail(err, "cannot write %s: %s", path, strerror(errno));
    gw_json j;
    gw_json_init(&j, f);
    gw_json_object_begin(&j);
    gw_json_kv_string(&j, "schema", GW_SWEEP_SCHEMA);
    gw_json_kv_string(&j, "model", s->model_path);
    gw_json_kv_string(&j, "title", s->title);
    gw_json_key(&j, "units");
    gw_json_object_begin_inline(&j);
    gw_json_kv_string(&j, "length", s->length_unit);
    gw_json_kv_string(&j, "time", s->time_unit);
    gw_json_object_end(&j);
    gw_json_kv_string(&j, "combination", s->zip ? "zip" : "grid");
    gw_json_key(&j, "vary");
    gw_json_array_begin(&j);
    for (int v = 0; v < s->nvary; v++) {
        gw_json_object_begin(&j);
        gw_json_kv_string(&j, "key", s->vary[v].key);
        gw_json_key(&j, "values");
        gw_json_array_begin_inline(&j);
        for (int i = 0; i < s->vary[v].nvalues; i++) gw_json_double(&j, s->vary[v].values[i]);
        gw_json_array_end(&j);
        gw_json_object_end(&j);
    }
    gw_json_array_end(&j);
    gw_json_key(&j, "runs");
    gw_json_array_begin(&j);
    for (int r = 0; r < s->nruns; r++) write_run(&j, s, r);
    gw_json_array_end(&j);
    gw_json_object_end(&j);
    int rc = gw_json_finish(&j, err);
    if (rc) gw_fail_prefix(err, "%s: ", path);
    if (fclose(f) != 0 && rc == 0) rc = gw_fail(err, "cannot write %s: %s", path, strerror(errno));
    return rc;
}
