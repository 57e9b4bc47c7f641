#include "yaml_tree.h"

#include <libfyaml.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define GW_YAML_MAX_DEPTH 64     /* a model file nests 5 or 6 levels */

typedef struct {
    char *name;
    gw_ynode *node;
} anchor_t;

struct gw_ydoc {
    gw_ynode *root;
    gw_ynode **all; int nall, capall;   /* every node, freed together */
};

/* Error lines gathered while building ("name:line:col: msg\n"...). */
typedef struct {
    const char *name;
    char buf[2048];
    size_t len;
    int count;
} errbuf_t;

static void add_err(errbuf_t *eb, int line, int col, const char *fmt, ...)
    __attribute__((format(printf, 4, 5)));

static void add_err(errbuf_t *eb, int line, int col, const char *fmt, ...)
{
    eb->count++;
    if (eb->len + 1 >= sizeof eb->buf)
        return;
    char msg[512];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(msg, sizeof msg, fmt, ap);
    va_end(ap);
    int w = snprintf(eb->buf + eb->len, sizeof eb->buf - eb->len, "%s%s:%d:%d: %s",
                     eb->len ? "\n" : "", eb->name, line, col, msg);
    if (w > 0)
        eb->len += (size_t)w < sizeof eb->buf - eb->len ? (size_t)w : sizeof eb->buf - eb->len - 1;
}

static gw_ynode *new_node(gw_ydoc *d, gw_ykind kind, const struct fy_mark *m)
{
    if (d->nall == d->capall) {
        int cap = d->capall ? 2 * d->capall : 64;
        gw_ynode **a = realloc(d->all, (size_t)cap * sizeof *a);
        if (!a) return NULL;
        d->all = a;
        d->capall = cap;
    }
    gw_ynode *n = calloc(1, sizeof *n);
    if (!n) return NULL;
    n->kind = kind;
    if (m && m->line >= 0 && m->column >= 0) {
        n->line = m->line + 1;
        n->col = m->column + 1;
    }
    d->all[d->nall++] = n;
    return n;
}

static int reserve_kid(gw_ynode *parent, int idx)
{
    if (idx >= parent->cap) {
        int cap = parent->cap ? 2 * parent->cap : 8;
        gw_ynode **k = realloc(parent->kids, (size_t)cap * sizeof *k);
        if (!k) return -1;
        parent->kids = k;
        parent->cap = cap;
    }
    return 0;
}

/* Attach kid to the open collection `top`.  Map children alternate key,
 * value; `half` counts the entries of a map (odd = waiting for a value). */
static int attach(gw_ynode *top, int *half, gw_ynode *kid, errbuf_t *eb)
{
    if (reserve_kid(top, top->kind == GW_YSEQ ? top->n : *half) < 0) return -1;
    if (top->kind == GW_YSEQ) {
        if (!kid->line) { kid->line = top->line; kid->col = top->col; }
        top->kids[top->n++] = kid;
        return 0;
    }
    int idx = *half;
    top->kids[idx] = kid;
    (*half)++;
    if (idx % 2 == 0) {        /* a key */
        if (kid->kind != GW_YSCALAR) {
            add_err(eb, kid->line, kid->col, "a mapping key must be a plain word");
        } else {
            for (int i = 0; i < idx; i += 2) {
                const gw_ynode *k = top->kids[i];
                if (k->kind == GW_YSCALAR && k->len == kid->len && !memcmp(k->text, kid->text, k->len))
                    add_err(eb, kid->line, kid->col, "duplicate key '%s' (first given at line %d)",
                            kid->text, k->line);
            }
        }
    } else {                   /* a value: unknown position -> its key's */
        const gw_ynode *key = top->kids[idx - 1];
        if (!kid->line) { kid->line = key->line; kid->col = key->col; }
        top->n++;
    }
    return 0;
}

static int is_null_word(const char *t, size_t n)
{
    return n == 0 || (n == 1 && t[0] == '~') ||
           (n == 4 && (!memcmp(t, "null", 4) || !memcmp(t, "Null", 4) || !memcmp(t, "NULL", 4)));
}

gw_ydoc *gw_ydoc_parse(const char *text, size_t len, const char *name, gw_error *err)
{
    errbuf_t eb = { .name = name ? name : "(model)" };
    gw_ydoc *d = calloc(1, sizeof *d);
    struct fy_diag_cfg dc;
    fy_diag_cfg_default(&dc);
    dc.fp = NULL;
    dc.output_fn = NULL;
    struct fy_diag *diag = fy_diag_create(&dc);
    struct fy_parser *fyp = NULL;
    anchor_t *anchors = NULL; int nanch = 0, capanch = 0;
    gw_ynode *stack[GW_YAML_MAX_DEPTH + 1];
    int halves[GW_YAML_MAX_DEPTH + 1];
    int depth = 0, ndocs = 0, oom = 0, too_deep = 0;

    if (!d || !diag) { oom = 1; goto done; }
    fy_diag_set_collect_errors(diag, true);
    struct fy_parse_cfg cfg = { .search_path = NULL, .flags = FYPCF_QUIET, .userdata = NULL, .diag = diag };
    fyp = fy_parser_create(&cfg);
    if (!fyp || fy_parser_set_string(fyp, text, len) != 0) { oom = 1; goto done; }

    struct fy_event *e;
    while (!oom && (e = fy_parser_parse(fyp)) != NULL) {
        const struct fy_mark *mk = fy_event_start_mark(e);
        int skip = too_deep > 0;   /* inside a collection nested too deeply */
        gw_ynode *node = NULL;
        struct fy_token *anchor = NULL;
        switch (e->type) {
        case FYET_DOCUMENT_START:
            if (++ndocs == 2)
                add_err(&eb, mk && mk->line >= 0 ? mk->line + 1 : 0, mk && mk->line >= 0 ? mk->column + 1 : 0,
                        "only one YAML document is expected in a model file");
            break;
        case FYET_SCALAR:
            if (skip || ndocs > 1) break;
            node = new_node(d, GW_YSCALAR, mk);
            if (!node) { oom = 1; break; }
            {
                size_t n = 0;
                const char *t = fy_token_get_text(e->scalar.value, &n);
                if (!t) { t = ""; n = 0; }
                node->text = malloc(n + 1);
                if (!node->text) { oom = 1; break; }
                memcpy(node->text, t, n);
                node->text[n] = '\0';
                node->len = n;
                enum fy_scalar_style st = fy_token_scalar_style(e->scalar.value);
                node->quoted = st != FYSS_PLAIN;
                /* Quoted scalars are marked at their first character inside
                 * the quotes; point at the opening quote instead. */
                if ((st == FYSS_SINGLE_QUOTED || st == FYSS_DOUBLE_QUOTED) && node->col > 1)
                    node->col--;
                node->empty = !node->quoted && is_null_word(t, n);
            }
            anchor = e->scalar.anchor;
            break;
        case FYET_MAPPING_START:
        case FYET_SEQUENCE_START:
            if (skip || ndocs > 1 || depth >= GW_YAML_MAX_DEPTH) {
                if (!skip && ndocs <= 1)
                    add_err(&eb, mk ? mk->line + 1 : 0, mk ? mk->column + 1 : 0,
                            "nesting deeper than %d levels", GW_YAML_MAX_DEPTH);
                if (ndocs <= 1) too_deep++;
                break;
            }
            node = new_node(d, e->type == FYET_MAPPING_START ? GW_YMAP : GW_YSEQ, mk);
            if (!node) { oom = 1; break; }
            anchor = e->type == FYET_MAPPING_START ? e->mapping_start.anchor : e->sequence_start.anchor;
            break;
        case FYET_MAPPING_END:
        case FYET_SEQUENCE_END:
            if (too_deep) { too_deep--; break; }
            if (ndocs > 1) break;
            if (depth > 0) {
                depth--;     /* a dangling key (no value) is simply not counted */
            }
            break;
        case FYET_ALIAS:
            if (skip || ndocs > 1) break;
            {
                size_t n = 0;
                const char *t = fy_token_get_text(e->alias.anchor, &n);
                /* The mark is on the name; the '*' is one column left. */
                int line = mk ? mk->line + 1 : 0, col = mk && mk->column > 0 ? mk->column : 0;
                gw_ynode *target = NULL;
                for (int i = nanch - 1; i >= 0 && t; i--)
                    if (strlen(anchors[i].name) == n && !memcmp(anchors[i].name, t, n)) {
                        target = anchors[i].node;
                        break;
                    }
                if (!target) {
                    add_err(&eb, line, col, "alias '*%.*s' names no anchor", (int)(t ? n : 0), t ? t : "");
                } else if (target->kind != GW_YSCALAR) {
                    add_err(&eb, line, col, "alias '*%.*s': only single values may be reused with aliases",
                            (int)n, t);
                } else if (depth > 0) {
                    if (attach(stack[depth - 1], &halves[depth - 1], target, &eb) < 0) oom = 1;
                } else {
                    d->root = target;
                }
            }
            break;
        default:
            break;
        }
        if (node && !oom) {
            if (depth > 0) {
                if (attach(stack[depth - 1], &halves[depth - 1], node, &eb) < 0) oom = 1;
            } else if (!d->root) {
                d->root = node;
            }
            if (node->kind != GW_YSCALAR) {
                stack[depth] = node;
                halves[depth] = 0;
                depth++;
            }
            if (anchor) {
                size_t n = 0;
                const char *t = fy_token_get_text(anchor, &n);
                if (nanch == capanch) {
                    int cap = capanch ? 2 * capanch : 8;
                    anchor_t *a = realloc(anchors, (size_t)cap * sizeof *a);
                    if (!a) oom = 1; else { anchors = a; capanch = cap; }
                }
                if (!oom && t) {
                    anchors[nanch].name = strndup(t, n);
                    anchors[nanch].node = node;
                    if (!anchors[nanch].name) oom = 1; else nanch++;
                }
            }
        }
        fy_parser_event_free(fyp, e);
    }

    if (fyp && fy_parser_get_stream_error(fyp)) {
        void *it = NULL;
        struct fy_diag_error *de;
        int got = 0;
        while ((de = fy_diag_errors_iterate(diag, &it)) != NULL) {
            add_err(&eb, de->line, de->column, "YAML syntax error: %s", de->msg ? de->msg : "?");
            got = 1;
        }
        if (!got)
            add_err(&eb, 0, 0, "YAML syntax error");
    }

done:
    for (int i = 0; i < nanch; i++) free(anchors[i].name);
    free(anchors);
    if (fyp) fy_parser_destroy(fyp);
    if (diag) fy_diag_destroy(diag);
    if (oom) {
        gw_ydoc_free(d);
        gw_fail(err, "%s: out of memory while reading the model file", eb.name);
        return NULL;
    }
    if (eb.count) {
        gw_ydoc_free(d);
        gw_fail(err, "%s", eb.buf);
        return NULL;
    }
    return d;
}

void gw_ydoc_free(gw_ydoc *d)
{
    if (!d) return;
    for (int i = 0; i < d->nall; i++) {
        free(d->all[i]->text);
        free(d->all[i]->kids);
        free(d->all[i]);
    }
    free(d->all);
    free(d);
}

const gw_ynode *gw_ydoc_root(const gw_ydoc *d) { return d ? d->root : NULL; }

const gw_ynode *gw_ymap_get(const gw_ynode *m, const char *key)
{
    if (!m || m->kind != GW_YMAP) return NULL;
    size_t n = strlen(key);
    for (int i = 0; i < m->n; i++) {
        const gw_ynode *k = m->kids[2 * i];
        if (k->kind == GW_YSCALAR && k->len == n && !memcmp(k->text, key, n))
            return m->kids[2 * i + 1];
    }
    return NULL;
}
