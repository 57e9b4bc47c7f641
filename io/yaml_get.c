#include "yaml_get.h"

#include <errno.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define GW_MSGS_KEEP 40      /* more than this is noise; the count says how many */

void gw_msgs_init(gw_msgs *m, const char *file)
{
    memset(m, 0, sizeof *m);
    m->file = file ? file : "(model)";
}

void gw_msgs_add(gw_msgs *m, int line, int col, const char *fmt, ...)
{
    m->count++;
    if (m->kept >= GW_MSGS_KEEP)
        return;
    char msg[768];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(msg, sizeof msg, fmt, ap);
    va_end(ap);
    char line_buf[1024];
    if (snprintf(line_buf, sizeof line_buf, "%s:%d:%d: %s", m->file, line, col, msg) < 0) return;
    if (m->kept == m->cap) {
        int cap = m->cap ? 2 * m->cap : 16;
        gw_msg *v = realloc(m->v, (size_t)cap * sizeof *v);
        if (!v) return;          /* count still tells there was a problem */
        m->v = v;
        m->cap = cap;
    }
    char *t = strdup(line_buf);
    if (!t) return;
    m->v[m->kept++] = (gw_msg){ line, col, t };
}

/* File order; insertion sort keeps equal positions in the order found. */
static void sort_msgs(gw_msgs *m)
{
    for (int i = 1; i < m->kept; i++) {
        gw_msg x = m->v[i];
        int j = i - 1;
        while (j >= 0 && (m->v[j].line > x.line || (m->v[j].line == x.line && m->v[j].col > x.col))) {
            m->v[j + 1] = m->v[j];
            j--;
        }
        m->v[j + 1] = x;
    }
}

int gw_msgs_fail(gw_msgs *m, gw_error *err)
{
    if (err) {
        size_t room = sizeof err->msg, len = 0;
        int shown = 0;
        sort_msgs(m);
        err->msg[0] = '\0';
        for (int i = 0; i < m->kept; i++) {
            size_t l = strlen(m->v[i].text);
            if (len + l + 1 + 64 > room) break;        /* leave room for the tail line */
            if (len) err->msg[len++] = '\n';
            memcpy(err->msg + len, m->v[i].text, l + 1);
            len += l;
            shown++;
        }
        if (shown < m->count)
            snprintf(err->msg + len, room - len, "%s%s: %d more problem(s) not shown", len ? "\n" : "",
                     m->file, m->count - shown);
    }
    gw_msgs_free(m);
    return -1;
}

void gw_msgs_free(gw_msgs *m)
{
    for (int i = 0; i < m->kept; i++) free(m->v[i].text);
    free(m->v);
    m->v = NULL;
    m->kept = m->cap = 0;
}

int gw_parse_number(const char *s, double *out)
{
    const char *p = s;
    if (*p == '+' || *p == '-') p++;
    int digits = 0;
    while (*p >= '0' && *p <= '9') { p++; digits++; }
    if (*p == '.') {
        p++;
        while (*p >= '0' && *p <= '9') { p++; digits++; }
    }
    if (!digits) return -1;
    if (*p == 'e' || *p == 'E') {
        p++;
        if (*p == '+' || *p == '-') p++;
        if (!(*p >= '0' && *p <= '9')) return -1;
        while (*p >= '0' && *p <= '9') p++;
    }
    if (*p) return -1;
    errno = 0;
    char *end;
    double v = strtod(s, &end);
    if (*end || !isfinite(v) || (errno == ERANGE && fabs(v) > 1.0))
        return -1;
    if (errno == ERANGE) v = 0.0;      /* underflow: a denormal or zero is fine */
    *out = v;
    return 0;
}

static const char *kind_word(const gw_ynode *n)
{
    if (!n) return "nothing";
    switch (n->kind) {
    case GW_YMAP: return "a mapping";
    case GW_YSEQ: return "a list";
    default: return n->empty ? "an empty value" : "a single value";
    }
}

/* Short, printable excerpt of a scalar for messages. */
static void excerpt(const gw_ynode *n, char *buf, size_t room)
{
    size_t k = 0;
    for (size_t i = 0; i < n->len && k + 4 < room; i++) {
        unsigned char c = (unsigned char)n->text[i];
        buf[k++] = (c >= 32 && c < 127) ? (char)c : '?';
    }
    if (n->len && k + 4 >= room) { buf[k++] = '.'; buf[k++] = '.'; buf[k++] = '.'; }
    buf[k] = '\0';
}

int gw_yget_number(gw_msgs *m, const gw_ynode *n, const char *what, double *out)
{
    if (!n || n->kind != GW_YSCALAR || n->empty) {
        gw_msgs_add(m, n ? n->line : 0, n ? n->col : 0, "%s: expected a number, got %s", what, kind_word(n));
        return -1;
    }
    char ex[64];
    excerpt(n, ex, sizeof ex);
    if (n->quoted) {
        gw_msgs_add(m, n->line, n->col, "%s: expected a number, got the quoted text \"%s\"", what, ex);
        return -1;
    }
    if (strlen(n->text) != n->len || gw_parse_number(n->text, out) < 0) {
        const char *t = n->text;
        if (t[0] == '+' || t[0] == '-') t++;
        if (!strcmp(t, ".inf") || !strcmp(t, ".Inf") || !strcmp(t, ".INF") ||
            !strcmp(t, ".nan") || !strcmp(t, ".NaN") || !strcmp(t, ".NAN"))
            gw_msgs_add(m, n->line, n->col, "%s: expected a finite number, got '%s'", what, ex);
        else if (gw_parse_number(n->text, &(double){0}) < 0 && strspn(t, "0123456789.eE+-") == strlen(t) && *t)
            gw_msgs_add(m, n->line, n->col, "%s: '%s' is not a number a double can hold", what, ex);
        else
            gw_msgs_add(m, n->line, n->col, "%s: expected a number, got '%s'", what, ex);
        return -1;
    }
    return 0;
}

int gw_yget_int(gw_msgs *m, const gw_ynode *n, const char *what, long lo, long hi, int *out)
{
    double v;
    if (gw_yget_number(m, n, what, &v) < 0) return -1;
    if (v != floor(v) || strpbrk(n->text, ".eE")) {
        gw_msgs_add(m, n->line, n->col, "%s: expected a whole number, got '%s'", what, n->text);
        return -1;
    }
    if (v < (double)lo || v > (double)hi) {
        gw_msgs_add(m, n->line, n->col, "%s: %s is out of range (%ld to %ld)", what, n->text, lo, hi);
        return -1;
    }
    *out = (int)v;
    return 0;
}

int gw_yget_bool(gw_msgs *m, const gw_ynode *n, const char *what, int *out)
{
    if (n && n->kind == GW_YSCALAR && !n->quoted) {
        const char *t = n->text;
        if (!strcmp(t, "true") || !strcmp(t, "True") || !strcmp(t, "TRUE")) { *out = 1; return 0; }
        if (!strcmp(t, "false") || !strcmp(t, "False") || !strcmp(t, "FALSE")) { *out = 0; return 0; }
    }
    char ex[64] = "";
    if (n && n->kind == GW_YSCALAR) excerpt(n, ex, sizeof ex);
    gw_msgs_add(m, n ? n->line : 0, n ? n->col : 0, "%s: expected true or false, got %s%s%s", what,
                n && n->kind == GW_YSCALAR && !n->empty ? "'" : "",
                n && n->kind == GW_YSCALAR && !n->empty ? ex : kind_word(n),
                n && n->kind == GW_YSCALAR && !n->empty ? "'" : "");
    return -1;
}

int gw_yget_string(gw_msgs *m, const gw_ynode *n, const char *what, char **out)
{
    if (!n || n->kind != GW_YSCALAR || (n->empty && !n->quoted) || n->len == 0) {
        gw_msgs_add(m, n ? n->line : 0, n ? n->col : 0, "%s: expected some text, got %s", what, kind_word(n));
        return -1;
    }
    if (strlen(n->text) != n->len) {
        gw_msgs_add(m, n->line, n->col, "%s: text contains a NUL character", what);
        return -1;
    }
    char *s = strdup(n->text);
    if (!s) {
        gw_msgs_add(m, n->line, n->col, "%s: out of memory", what);
        return -1;
    }
    *out = s;
    return 0;
}

#define GW_MAX_COORD 1e12

int gw_yget_point(gw_msgs *m, const gw_ynode *n, const char *what, double xy[2])
{
    if (!n || n->kind != GW_YSEQ || n->n != 2) {
        gw_msgs_add(m, n ? n->line : 0, n ? n->col : 0, "%s: expected a point [x, y], got %s%s", what,
                    n && n->kind == GW_YSEQ ? "a list of length " : kind_word(n),
                    n && n->kind == GW_YSEQ ? (n->n == 1 ? "1" : n->n == 0 ? "0" : "more than 2") : "");
        return -1;
    }
    int bad = 0;
    for (int i = 0; i < 2; i++) {
        if (gw_yget_number(m, n->kids[i], what, &xy[i]) < 0) {
            bad = 1;
        } else if (fabs(xy[i]) > GW_MAX_COORD) {
            /* Far beyond any map: lengths and areas computed from such
             * points would overflow to infinity. */
            gw_msgs_add(m, n->kids[i]->line, n->kids[i]->col, "%s: coordinate %g is out of range (at most %g "
                        "in size)", what, xy[i], GW_MAX_COORD);
            bad = 1;
        }
    }
    return bad ? -1 : 0;
}

int gw_yget_coords(gw_msgs *m, const gw_ynode *n, const char *what, int min_n, double **xy, int *npts)
{
    if (!n || n->kind != GW_YSEQ) {
        gw_msgs_add(m, n ? n->line : 0, n ? n->col : 0, "%s: expected a list of points [[x, y], ...], got %s",
                    what, kind_word(n));
        return -1;
    }
    if (n->n < min_n) {
        gw_msgs_add(m, n->line, n->col, "%s: needs at least %d points, got %d", what, min_n, n->n);
        return -1;
    }
    double *p = malloc(2 * (size_t)n->n * sizeof *p);
    if (!p) {
        gw_msgs_add(m, n->line, n->col, "%s: out of memory", what);
        return -1;
    }
    int bad = 0;
    for (int i = 0; i < n->n && bad < 3; i++)
        if (gw_yget_point(m, n->kids[i], what, p + 2 * i) < 0) bad++;
    if (bad) { free(p); return -1; }
    *xy = p;
    *npts = n->n;
    return 0;
}

int gw_yget_numbers(gw_msgs *m, const gw_ynode *n, const char *what, double **v, int *nv)
{
    int cnt = n && n->kind == GW_YSEQ ? n->n : 1;
    if (n && n->kind == GW_YSEQ && n->n == 0) {
        gw_msgs_add(m, n->line, n->col, "%s: expected a number or a list of numbers, got an empty list", what);
        return -1;
    }
    if (n && n->kind == GW_YMAP) {
        gw_msgs_add(m, n->line, n->col, "%s: expected a number or a list of numbers, got a mapping", what);
        return -1;
    }
    double *p = malloc((size_t)cnt * sizeof *p);
    if (!p) {
        gw_msgs_add(m, n ? n->line : 0, n ? n->col : 0, "%s: out of memory", what);
        return -1;
    }
    int bad = 0;
    if (n && n->kind == GW_YSEQ) {
        for (int i = 0; i < n->n && bad < 3; i++)
            if (gw_yget_number(m, n->kids[i], what, p + i) < 0) bad++;
    } else {
        bad = gw_yget_number(m, n, what, p) < 0;
    }
    if (bad) { free(p); return -1; }
    *v = p;
    *nv = cnt;
    return 0;
}

int gw_yis_map(gw_msgs *m, const gw_ynode *n, const char *what)
{
    if (n && n->kind == GW_YMAP) return 1;
    gw_msgs_add(m, n ? n->line : 0, n ? n->col : 0, "%s: expected a mapping (key: value pairs), got %s",
                what, kind_word(n));
    return 0;
}

int gw_yis_seq(gw_msgs *m, const gw_ynode *n, const char *what)
{
    if (n && n->kind == GW_YSEQ) return 1;
    gw_msgs_add(m, n ? n->line : 0, n ? n->col : 0, "%s: expected a list, got %s", what, kind_word(n));
    return 0;
}

void gw_ycheck_keys(gw_msgs *m, const gw_ynode *map, const char *what, const char *const *allowed)
{
    if (!map || map->kind != GW_YMAP) return;
    for (int i = 0; i < map->n; i++) {
        const gw_ynode *k = gw_ymap_key(map, i);
        int ok = 0;
        for (const char *const *a = allowed; *a && !ok; a++)
            ok = k->kind == GW_YSCALAR && strlen(*a) == k->len && !memcmp(*a, k->text, k->len);
        if (!ok) {
            char list[400] = "";
            size_t l = 0;
            for (const char *const *a = allowed; *a && l + 40 < sizeof list; a++)
                l += (size_t)snprintf(list + l, sizeof list - l, "%s%s", l ? ", " : "", *a);
            char ex[64] = "?";
            if (k->kind == GW_YSCALAR) excerpt(k, ex, sizeof ex);
            gw_msgs_add(m, k->line, k->col, "%s: unknown key '%s' (expected one of: %s)", what, ex, list);
        }
    }
}

const gw_ynode *gw_yrequire(gw_msgs *m, const gw_ynode *map, const char *key, const char *what)
{
    const gw_ynode *v = gw_ymap_get(map, key);
    if (!v)
        gw_msgs_add(m, map ? map->line : 0, map ? map->col : 0, "%s: missing required key '%s'", what, key);
    return v;
}
