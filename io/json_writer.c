#include "json_writer.h"

#include <math.h>
#include <string.h>

void gw_json_init(gw_json *j, FILE *f)
{
    memset(j, 0, sizeof *j);
    j->f = f;
}

static int is_inline(const gw_json *j) { return j->inline_from > 0 && j->depth >= j->inline_from; }

static void newline_indent(gw_json *j)
{
    fputc('\n', j->f);
    for (int i = 0; i < j->depth; i++) fputs("  ", j->f);
}

/* Separator and indentation before a new item (a value or a key). */
static void before_item(gw_json *j)
{
    if (j->after_key) {           /* value of a key: already placed */
        j->after_key = 0;
        return;
    }
    if (j->depth == 0) return;
    if (j->count[j->depth - 1]) fputc(',', j->f);
    if (is_inline(j)) {
        if (j->count[j->depth - 1]) fputc(' ', j->f);
    } else {
        newline_indent(j);
    }
    j->count[j->depth - 1] = 1;
}

static void container_open(gw_json *j, char c, int obj, int inl)
{
    if (j->depth > 0 && j->is_obj[j->depth - 1] && !j->after_key) j->bad = 1;
    before_item(j);
    fputc(c, j->f);
    if (j->depth >= GW_JSON_MAX_DEPTH) { j->bad = 1; return; }
    j->is_obj[j->depth] = (unsigned char)obj;
    j->count[j->depth] = 0;
    j->depth++;
    if (inl && j->inline_from == 0) j->inline_from = j->depth;
}

static void container_close(gw_json *j, char c, int obj)
{
    if (j->depth == 0 || j->is_obj[j->depth - 1] != obj || j->after_key) { j->bad = 1; return; }
    int had = j->count[j->depth - 1];
    int inl = is_inline(j);
    j->depth--;
    if (had && !inl) newline_indent(j);
    fputc(c, j->f);
    if (j->inline_from > j->depth) j->inline_from = 0;
}

void gw_json_object_begin(gw_json *j) { container_open(j, '{', 1, 0); }
void gw_json_object_begin_inline(gw_json *j) { container_open(j, '{', 1, 1); }
void gw_json_object_end(gw_json *j) { container_close(j, '}', 1); }
void gw_json_array_begin(gw_json *j) { container_open(j, '[', 0, 0); }
void gw_json_array_begin_inline(gw_json *j) { container_open(j, '[', 0, 1); }
void gw_json_array_end(gw_json *j) { container_close(j, ']', 0); }

static void write_escaped(FILE *f, const char *s)
{
    fputc('"', f);
    for (const unsigned char *p = (const unsigned char *)s; *p; p++) {
        switch (*p) {
        case '"': fputs("\\\"", f); break;
        case '\\': fputs("\\\\", f); break;
        case '\b': fputs("\\b", f); break;
        case '\f': fputs("\\f", f); break;
        case '\n': fputs("\\n", f); break;
        case '\r': fputs("\\r", f); break;
        case '\t': fputs("\\t", f); break;
        default:
            /* Other control characters must be escaped; bytes >= 0x80 are
             * passed through (the model file is UTF-8). */
            if (*p < 0x20) fprintf(f, "\\u%04x", *p);
            else fputc(*p, f);
        }
    }
    fputc('"', f);
}

void gw_json_key(gw_json *j, const char *key)
{
    if (j->depth == 0 || !j->is_obj[j->depth - 1] || j->after_key) { j->bad = 1; return; }
    before_item(j);
    write_escaped(j->f, key);
    fputs(": ", j->f);
    j->after_key = 1;
}

static void value_start(gw_json *j)
{
    if (j->depth > 0 && j->is_obj[j->depth - 1] && !j->after_key) j->bad = 1;
    before_item(j);
}

void gw_json_string(gw_json *j, const char *s)
{
    value_start(j);
    if (s) write_escaped(j->f, s);
    else fputs("null", j->f);
}

void gw_json_double(gw_json *j, double v)
{
    value_start(j);
    if (!isfinite(v)) { fputs("null", j->f); return; }
    if (v == 0.0) v = 0.0;   /* no "-0" in reports */
    char buf[40];
    snprintf(buf, sizeof buf, "%.17g", v);
    /* %.17g never writes locale commas under the C locale, which the command
     * keeps; integral values print without a point, which JSON accepts. */
    fputs(buf, j->f);
}

void gw_json_int(gw_json *j, long long v) { value_start(j); fprintf(j->f, "%lld", v); }
void gw_json_bool(gw_json *j, int v) { value_start(j); fputs(v ? "true" : "false", j->f); }
void gw_json_null(gw_json *j) { value_start(j); fputs("null", j->f); }

void gw_json_kv_string(gw_json *j, const char *k, const char *s) { gw_json_key(j, k); gw_json_string(j, s); }
void gw_json_kv_double(gw_json *j, const char *k, double v) { gw_json_key(j, k); gw_json_double(j, v); }
void gw_json_kv_int(gw_json *j, const char *k, long long v) { gw_json_key(j, k); gw_json_int(j, v); }
void gw_json_kv_bool(gw_json *j, const char *k, int v) { gw_json_key(j, k); gw_json_bool(j, v); }

void gw_json_pair(gw_json *j, double a, double b)
{
    gw_json_array_begin_inline(j);
    gw_json_double(j, a);
    gw_json_double(j, b);
    gw_json_array_end(j);
}

void gw_json_kv_pair(gw_json *j, const char *k, double a, double b) { gw_json_key(j, k); gw_json_pair(j, a, b); }

int gw_json_finish(gw_json *j, gw_error *err)
{
    if (j->bad || j->depth != 0 || j->after_key)
        return gw_fail(err, "internal error: unbalanced JSON output");
    fputc('\n', j->f);
    if (fflush(j->f) != 0 || ferror(j->f))
        return gw_fail(err, "could not write JSON output (disk full or not writable?)");
    return 0;
}
