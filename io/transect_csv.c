#include "transect_csv.h"

#include <string.h>

#include "csv_writer.h"

static void clean_name(const char *name, char *out, size_t n)
{
    size_t k = 0;
    for (const char *s = name ? name : ""; *s && k + 1 < n; s++) {
        char c = *s;
        int ok = (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || (c >= '0' && c <= '9') ||
                 c == '-' || c == '_' || c == '.';
        out[k++] = ok ? c : '_';
    }
    out[k] = 0;
    if (k == 0 || !strcmp(out, ".") || !strcmp(out, "..")) snprintf(out, n, "unnamed");
}

void gw_transect_file_name(const gw_model *m, int i, char *buf, size_t n)
{
    char mine[200], other[200];
    clean_name(m->transects[i].name, mine, sizeof mine);
    int clash = 0;
    for (int j = 0; j < i; j++) {
        clean_name(m->transects[j].name, other, sizeof other);
        if (!strcmp(mine, other)) clash = 1;
    }
    if (clash) snprintf(buf, n, "transect_%s_%d.csv", mine, i + 1);
    else snprintf(buf, n, "transect_%s.csv", mine);
}

const char *gw_cross_kind_name(gw_cross_kind k)
{
    switch (k) {
    case GW_CROSS_DIVIDE: return "divide";
    case GW_CROSS_DIVERGING: return "flow divides";
    case GW_CROSS_CONVERGING: return "flow meets";
    }
    return "divide";
}

static void row(FILE *f, const gw_transect_sample *s)
{
    fprintf(f, "%.10g", s->dist);
    gw_csv_num(f, s->x, 10);
    gw_csv_num(f, s->y, 10);
    gw_csv_num(f, s->head, 10);
    gw_csv_num(f, s->qn, 10);
    gw_csv_num(f, s->qa, 10);
    fputc(',', f);
}

static const char *feature_name(const gw_problem *p, int i)
{
    return (i >= 0 && i < p->nfeatures && p->features[i].name) ? p->features[i].name : "?";
}

int gw_transect_csv_write(FILE *f, const gw_transect *t, const gw_problem *p,
                          const char *length_unit, const char *time_unit, gw_error *err)
{
    char L[32], T[32], F[80];
    gw_csv_unit_token(L, sizeof L, length_unit);
    gw_csv_unit_token(T, sizeof T, time_unit);
    if (p->type == GW_SECTION) snprintf(F, sizeof F, "%s_per_%s", L, T);
    else snprintf(F, sizeof F, "%s2_per_%s", L, T);
    fprintf(f, "distance_%s,x_%s,y_%s,head_%s,flux_normal_%s,flux_along_%s,crossing\n", L, L, L, L, F, F);
    int j = 0;
    for (int i = 0; i <= t->n; i++) {
        /* Crossings at or before this sample come first. */
        while (j < t->ncross && (i == t->n || t->c[j].at.dist <= t->s[i].dist)) {
            const gw_transect_crossing *c = &t->c[j++];
            char what[600];
            if (c->kind == GW_CROSS_DIVIDE)
                snprintf(what, sizeof what, "divide %s | %s", feature_name(p, c->a), feature_name(p, c->b));
            else
                snprintf(what, sizeof what, "%s", gw_cross_kind_name(c->kind));
            row(f, &c->at);
            gw_csv_field(f, what);
            fputc('\n', f);
        }
        if (i < t->n) {
            row(f, &t->s[i]);
            fputc('\n', f);
        }
    }
    if (fflush(f) != 0 || ferror(f)) return gw_fail(err, "could not write the transect table");
    return 0;
}

typedef struct {
    const gw_transect *t;
    const gw_problem *p;
    const char *length_unit, *time_unit;
} table_args;

static int write_table(FILE *f, const void *ctx, gw_error *err)
{
    const table_args *a = ctx;
    return gw_transect_csv_write(f, a->t, a->p, a->length_unit, a->time_unit, err);
}

int gw_transect_csv_save(const char *path, const gw_transect *t, const gw_problem *p,
                         const char *length_unit, const char *time_unit, gw_error *err)
{
    table_args a = { t, p, length_unit, time_unit };
    return gw_csv_save(path, write_table, &a, err);
}
