#include "sweep_key.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "yaml_get.h"
#include "yaml_tree.h"

#define GW_VARY_MAX_VALUES 100000

void gw_format_number(char *buf, size_t n, double x)
{
    for (int prec = 1; prec <= 17; prec++) {
        snprintf(buf, n, "%.*g", prec, x);
        if (strtod(buf, NULL) == x) break;
    }
    /* Plain decimals read better than 1e+01 for everyday magnitudes. */
    double ax = fabs(x);
    if (!strchr(buf, 'e') || !(ax >= 1e-4 && ax < 1e15)) return;
    char tmp[64];
    for (int dec = 0; dec <= 20; dec++) {
        snprintf(tmp, sizeof tmp, "%.*f", dec, x);
        if (strtod(tmp, NULL) == x) {
            if (strlen(tmp) < n) memcpy(buf, tmp, strlen(tmp) + 1);
            return;
        }
    }
}

void gw_vary_free(gw_vary *v)
{
    if (!v) return;
    free(v->key);
    free(v->values);
    free(v->spans);
    memset(v, 0, sizeof *v);
}

/* The '=' that ends the key: the first one outside brackets (names in
 * brackets may hold '='). */
static const char *key_end(const char *s)
{
    int depth = 0;
    for (; *s; s++) {
        if (*s == '[') depth++;
        else if (*s == ']' && depth > 0) depth--;
        else if (*s == '=' && depth == 0) return s;
    }
    return NULL;
}

static int number(const char *s, size_t len, double *out)
{
    char buf[64];
    while (len && (*s == ' ')) { s++; len--; }
    while (len && s[len - 1] == ' ') len--;
    if (len == 0 || len >= sizeof buf) return -1;
    memcpy(buf, s, len);
    buf[len] = 0;
    return gw_parse_number(buf, out);
}

/* KEY syntax: NAME ([SELECTOR])* ('.' NAME ([SELECTOR])*)*. */
static const char *key_syntax(const char *k)
{
    for (;;) {
        size_t len = strcspn(k, ".[]");
        if (len == 0) return "every part of the key needs a name (e.g. streams[East Creek].stage)";
        k += len;
        while (*k == '[') {
            const char *close = strchr(k, ']');
            if (!close) return "a '[' without its ']'";
            if (close == k + 1) return "empty [ ]";
            if (memchr(k + 1, '[', (size_t)(close - k - 1))) return "'[' inside [ ]";
            k = close + 1;
        }
        if (*k == 0) return NULL;
        if (*k != '.') return "expected '.' or '[' after a ']'";
        k++;
    }
}

int gw_vary_parse(const char *arg, gw_vary *v, gw_error *err)
{
    memset(v, 0, sizeof *v);
    const char *eq = key_end(arg);
    if (!eq || eq == arg)
        return gw_fail(err, "--vary %s: expected KEY=FROM:TO:N or KEY=V1,V2,... (e.g. recharge.rate=0.0002:0.0008:7)", arg);
    const char *spec = eq + 1;
    if (!(v->key = strndup(arg, (size_t)(eq - arg)))) return gw_fail(err, "out of memory");
    const char *bad = key_syntax(v->key);
    if (bad) {
        gw_fail(err, "--vary %s: bad key '%s': %s", arg, v->key, bad);
        gw_vary_free(v);
        return -1;
    }
    const char *c1 = strchr(spec, ':');
    if (c1) {
        const char *c2 = strchr(c1 + 1, ':');
        double from, to, nd;
        if (!c2 || strchr(c2 + 1, ':') || number(spec, (size_t)(c1 - spec), &from) != 0 ||
            number(c1 + 1, (size_t)(c2 - c1 - 1), &to) != 0 || number(c2 + 1, strlen(c2 + 1), &nd) != 0) {
            gw_fail(err, "--vary %s: expected FROM:TO:N with two numbers and a count after '='", arg);
            gw_vary_free(v);
            return -1;
        }
        if (nd != floor(nd) || nd < 1 || nd > GW_VARY_MAX_VALUES) {
            gw_fail(err, "--vary %s: N must be a whole number from 1 to %d", arg, GW_VARY_MAX_VALUES);
            gw_vary_free(v);
            return -1;
        }
        int n = (int)nd;
        if (!(v->values = malloc((size_t)n * sizeof *v->values))) {
            gw_vary_free(v);
            return gw_fail(err, "out of memory");
        }
        for (int i = 0; i < n; i++) {
            double x = (i == n - 1 && n > 1) ? to : from + (to - from) * i / (n > 1 ? n - 1 : 1);
            /* Drop the round-off of the spacing (0.00034999999999999994 -> 0.00035). */
            char b[40];
            snprintf(b, sizeof b, "%.15g", x);
            v->values[i] = strtod(b, NULL);
        }
        v->nvalues = n;
        return 0;
    }
    /* A list V1,V2,... */
    int n = 1;
    for (const char *s = spec; *s; s++) n += *s == ',';
    if (n > GW_VARY_MAX_VALUES || !(v->values = malloc((size_t)n * sizeof *v->values))) {
        gw_vary_free(v);
        return gw_fail(err, "--vary %s: too many values", arg);
    }
    const char *s = spec;
    for (int i = 0; i < n; i++) {
        const char *e = strchr(s, ',');
        size_t len = e ? (size_t)(e - s) : strlen(s);
        if (number(s, len, &v->values[i]) != 0) {
            gw_fail(err, "--vary %s: '%.*s' is not a number (expected FROM:TO:N or V1,V2,...)", arg, (int)len, s);
            gw_vary_free(v);
            return -1;
        }
        s = e ? e + 1 : s + len;
    }
    v->nvalues = n;
    return 0;
}

/* ---- Walking the model tree ------------------------------------------- */

typedef struct {
    const char *text;
    size_t textlen;
    size_t *line_start;   /* byte offset of each line (1-based index) */
    int nlines;
    gw_vary *v;
    int cap;
    gw_error *err;
    const char *path;
} walk_t;

static int fail_key(walk_t *w, const char *fmt, const char *a, const char *b)
{
    char msg[1200];
    snprintf(msg, sizeof msg, fmt, a, b);
    return gw_fail(w->err, "%s: --vary %s: %s", w->path, w->v->key, msg);
}

static int utf8_lead(unsigned char c) { return (c & 0xC0) != 0x80; }

/* Byte offset of scalar n in the text, checked against its text: the
 * column is tried as a byte count, then as a character count, then the
 * rest of the line is searched (an anchor may come first). */
static int locate(walk_t *w, const gw_ynode *n, gw_span *sp)
{
    if (n->line < 1 || n->line > w->nlines) return -1;
    size_t ls = w->line_start[n->line], le = ls;
    while (le < w->textlen && w->text[le] != '\n') le++;
    size_t len = strlen(n->text);
    size_t cand[2];
    cand[0] = ls + (size_t)(n->col - 1);
    size_t off = ls;
    for (int c = 1; c < n->col && off < le; off++)
        if (off + 1 <= le && utf8_lead((unsigned char)w->text[off + 1])) c++;
    cand[1] = off;
    for (int i = 0; i < 2; i++)
        if (cand[i] + len <= le && !memcmp(w->text + cand[i], n->text, len)) {
            sp->off = cand[i];
            sp->len = len;
            return 0;
        }
    for (size_t o = cand[0] < le ? cand[0] : ls; o + len <= le; o++) {
        if (memcmp(w->text + o, n->text, len)) continue;
        char before = o > ls ? w->text[o - 1] : ' ', after = o + len < le ? w->text[o + len] : ' ';
        if (strchr("0123456789.eE+-", before) || strchr("0123456789.eE+-", after)) continue;
        sp->off = o;
        sp->len = len;
        return 0;
    }
    return -1;
}

static int add_scalar(walk_t *w, const gw_ynode *n, const char *where)
{
    double x;
    if (n->kind != GW_YSCALAR) return fail_key(w, "%s is a list of lists or mappings; pick one item, e.g. %s[0]", where, where);
    if (n->quoted || n->empty || gw_parse_number(n->text, &x) != 0)
        return fail_key(w, "%s is '%s', not a number", where, n->empty ? "" : n->text);
    gw_span sp;
    if (locate(w, n, &sp) != 0)
        return fail_key(w, "cannot find the text of %s ('%s') in the model file", where, n->text);
    if (w->v->nspans == w->cap) {
        int nc = w->cap ? 2 * w->cap : 8;
        gw_span *s = realloc(w->v->spans, (size_t)nc * sizeof *s);
        if (!s) return gw_fail(w->err, "out of memory");
        w->v->spans = s;
        w->cap = nc;
    }
    w->v->spans[w->v->nspans++] = sp;
    return 0;
}

/* "name1, name2, ..." of a list's named items, or its size. */
static void item_names(const gw_ynode *seq, char *buf, size_t n)
{
    size_t k = 0;
    buf[0] = 0;
    for (int i = 0; i < seq->n && k + 4 < n; i++) {
        const gw_ynode *it = seq->kids[i];
        const gw_ynode *nm = it->kind == GW_YMAP ? gw_ymap_get(it, "name") : NULL;
        if (!nm || nm->kind != GW_YSCALAR) continue;
        int wr = snprintf(buf + k, n - k, "%s%s", k ? ", " : "", nm->text);
        if (wr < 0) break;
        k += (size_t)wr < n - k ? (size_t)wr : n - k - 1;
    }
    if (k == 0) snprintf(buf, n, "a list of %d items; pick one by position from 0", seq->n);
}

static void map_keys(const gw_ynode *map, char *buf, size_t n)
{
    size_t k = 0;
    buf[0] = 0;
    for (int i = 0; i < map->n && k + 4 < n; i++) {
        int wr = snprintf(buf + k, n - k, "%s%s", k ? ", " : "", gw_ymap_key(map, i)->text);
        if (wr < 0) break;
        k += (size_t)wr < n - k ? (size_t)wr : n - k - 1;
    }
}

/* Pick [sel] of a list: the item named sel, else position sel from 0. */
static const gw_ynode *select_item(walk_t *w, const gw_ynode *seq, const char *sel, const char *where)
{
    for (int i = 0; i < seq->n; i++) {
        const gw_ynode *it = seq->kids[i];
        const gw_ynode *nm = it->kind == GW_YMAP ? gw_ymap_get(it, "name") : NULL;
        if (nm && nm->kind == GW_YSCALAR && !strcmp(nm->text, sel)) return it;
    }
    size_t dl = strspn(sel, "0123456789");
    if (dl > 0 && sel[dl] == 0 && dl < 9) {
        int i = atoi(sel);
        if (i < seq->n) return seq->kids[i];
        char msg[700];
        snprintf(msg, sizeof msg, "%s[%s] is out of range: %s has %d items (positions count from 0)",
                 where, sel, where, seq->n);
        fail_key(w, "%s%s", msg, "");
        return NULL;
    }
    char names[800];
    item_names(seq, names, sizeof names);
    char what[700];
    snprintf(what, sizeof what, "%s has no item named '%s'", where, sel);
    fail_key(w, "%s (items: %s)", what, names);
    return NULL;
}

/* Follow the path; every problem names the part that was reached. */
static int walk(walk_t *w, const gw_ynode *root)
{
    const char *k = w->v->key;
    const gw_ynode *n = root;
    char where[600] = "";
    size_t wl = 0;
    if (!n || n->kind != GW_YMAP) return fail_key(w, "%s%sthe model file is not a mapping", "", "");
    while (*k) {
        /* A name segment. */
        size_t len = strcspn(k, ".[");
        if (len == 0) return fail_key(w, "empty part in the key after '%s'%s", where, "");
        char seg[256];
        if (len >= sizeof seg) return fail_key(w, "key part too long%s%s", "", "");
        memcpy(seg, k, len);
        seg[len] = 0;
        if (n->kind != GW_YMAP) {
            if (n->kind == GW_YSEQ)
                return fail_key(w, "%s is a list; pick an item as %s[NAME] or by position", where, where);
            return fail_key(w, "%s is a single value; it has no key '%s'", where, seg);
        }
        const gw_ynode *next = gw_ymap_get(n, seg);
        if (!next) {
            char keys[700];
            map_keys(n, keys, sizeof keys);
            char msg[1000];
            snprintf(msg, sizeof msg, "'%s' is not in the model file%s%s%s (keys there: %s)", seg,
                     wl ? " under '" : "", where, wl ? "'" : "", keys);
            return fail_key(w, "%s%s", msg, "");
        }
        wl += (size_t)snprintf(where + wl, sizeof where - (wl < sizeof where ? wl : sizeof where), "%s%s", wl ? "." : "", seg);
        if (wl >= sizeof where) wl = sizeof where - 1;
        n = next;
        k += len;
        /* Any number of [selectors]. */
        while (*k == '[') {
            const char *close = strchr(k, ']');
            if (!close) return fail_key(w, "missing ']' after '%s'%s", where, "");
            char sel[256];
            size_t sl = (size_t)(close - k - 1);
            if (sl == 0 || sl >= sizeof sel) return fail_key(w, "empty or too long [ ] after '%s'%s", where, "");
            memcpy(sel, k + 1, sl);
            sel[sl] = 0;
            if (n->kind != GW_YSEQ)
                return fail_key(w, "%s is not a list, so [%s] cannot pick from it", where, sel);
            n = select_item(w, n, sel, where);
            if (!n) return -1;
            wl += (size_t)snprintf(where + wl, sizeof where - wl, "[%s]", sel);
            if (wl >= sizeof where) wl = sizeof where - 1;
            k = close + 1;
        }
        if (*k == '.') {
            k++;
            if (!*k) return fail_key(w, "the key ends with '.'%s%s", "", "");
        } else if (*k) {
            return fail_key(w, "unexpected '%c' after '%s'", (char[]){ *k, 0 }, where);
        }
    }
    if (n->kind == GW_YSCALAR) return add_scalar(w, n, where);
    if (n->kind == GW_YSEQ) {
        if (n->n == 0) return fail_key(w, "%s is an empty list%s", where, "");
        for (int i = 0; i < n->n; i++) {
            char wi[700];
            snprintf(wi, sizeof wi, "%s[%d]", where, i);
            if (add_scalar(w, n->kids[i], wi) != 0) return -1;
        }
        return 0;
    }
    char keys[700];
    map_keys(n, keys, sizeof keys);
    return fail_key(w, "%s is a mapping; name one of its numbers (keys there: %s)", where, keys);
}

int gw_vary_resolve(gw_vary *v, const char *text, const char *path, gw_error *err)
{
    free(v->spans);
    v->spans = NULL;
    v->nspans = 0;
    walk_t w = { text, strlen(text), NULL, 0, v, 0, err, path };
    int lines = 1;
    for (size_t i = 0; i < w.textlen; i++) lines += text[i] == '\n';
    w.line_start = malloc(((size_t)lines + 1) * sizeof *w.line_start);
    if (!w.line_start) return gw_fail(err, "out of memory");
    w.line_start[1] = 0;
    int ln = 1;
    for (size_t i = 0; i < w.textlen; i++)
        if (text[i] == '\n') w.line_start[++ln] = i + 1;
    w.nlines = ln;
    gw_ydoc *doc = gw_ydoc_parse(text, w.textlen, path, err);
    int rc = -1;
    if (doc) {
        rc = walk(&w, gw_ydoc_root(doc));
        gw_ydoc_free(doc);
    }
    free(w.line_start);
    return rc;
}

int gw_vary_check_overlap(const gw_vary *v, int n, gw_error *err)
{
    for (int a = 0; a < n; a++)
        for (int b = a; b < n; b++)
            for (int i = 0; i < v[a].nspans; i++)
                for (int j = (a == b ? i + 1 : 0); j < v[b].nspans; j++)
                    if (v[a].spans[i].off == v[b].spans[j].off) {
                        if (a == b) continue;   /* an alias seen twice: same number */
                        return gw_fail(err, "--vary %s and --vary %s set the same number; give it once",
                                       v[a].key, v[b].key);
                    }
    return 0;
}

typedef struct {
    gw_span sp;
    const char *s;
} repl_t;

static int repl_cmp(const void *pa, const void *pb)
{
    const repl_t *a = pa, *b = pb;
    return a->sp.off < b->sp.off ? -1 : a->sp.off > b->sp.off;
}

char *gw_vary_apply(const char *text, const gw_vary *v, int n, const double *values)
{
    if (n < 0) n = 0;
    int total = 0;
    for (int i = 0; i < n; i++) total += v[i].nspans;
    char (*num)[40] = malloc((size_t)(n ? n : 1) * sizeof *num);
    repl_t *r = malloc((size_t)(total ? total : 1) * sizeof *r);
    if (!num || !r) { free(num); free(r); return NULL; }
    size_t len = strlen(text), outlen = len;
    int k = 0;
    for (int i = 0; i < n; i++) {
        gw_format_number(num[i], sizeof num[i], values[i]);
        for (int j = 0; j < v[i].nspans; j++) {
            r[k].sp = v[i].spans[j];
            r[k].s = num[i];
            outlen += strlen(num[i]);
            k++;
        }
    }
    qsort(r, (size_t)k, sizeof *r, repl_cmp);
    char *out = malloc(outlen + 1);
    if (out) {
        size_t at = 0, o = 0;
        for (int i = 0; i < k; i++) {
            if (r[i].sp.off < at) continue;   /* the same number twice (alias) */
            memcpy(out + o, text + at, r[i].sp.off - at);
            o += r[i].sp.off - at;
            size_t sl = strlen(r[i].s);
            memcpy(out + o, r[i].s, sl);
            o += sl;
            at = r[i].sp.off + r[i].sp.len;
        }
        memcpy(out + o, text + at, len - at);
        o += len - at;
        out[o] = 0;
    }
    free(num);
    free(r);
    return out;
}
