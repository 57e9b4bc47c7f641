/* A small streaming JSON writer.
 *
 * Values are written as they come; the writer only remembers, per open
 * container, whether a comma is due.  Strings are escaped per RFC 8259;
 * doubles use "%.17g" so they read back to the same bits; NaN and
 * infinities (which JSON cannot hold) are written as null.
 *
 * Output is indented two spaces per level.  A container opened "inline"
 * (and everything inside it) stays on one line, which keeps coordinate
 * pairs and short number lists readable. */
#ifndef GW_JSON_WRITER_H
#define GW_JSON_WRITER_H

#include <stdio.h>

#include "../solver/error.h"

#define GW_JSON_MAX_DEPTH 64

typedef struct {
    FILE *f;                       /* borrowed */
    int depth;
    int inline_from;               /* depth of the outermost inline container; 0 = none */
    unsigned char count[GW_JSON_MAX_DEPTH];  /* items so far (0, 1 = "more than zero") */
    unsigned char is_obj[GW_JSON_MAX_DEPTH];
    int after_key;                 /* a key was just written; the value follows */
    int bad;                       /* misuse (nesting) detected */
} gw_json;

void gw_json_init(gw_json *j, FILE *f);

void gw_json_object_begin(gw_json *j);
void gw_json_object_begin_inline(gw_json *j);
void gw_json_object_end(gw_json *j);
void gw_json_array_begin(gw_json *j);
void gw_json_array_begin_inline(gw_json *j);
void gw_json_array_end(gw_json *j);

/* Inside an object: the key of the next value. */
void gw_json_key(gw_json *j, const char *key);

void gw_json_string(gw_json *j, const char *s);   /* NULL writes null */
void gw_json_double(gw_json *j, double v);        /* non-finite writes null */
void gw_json_int(gw_json *j, long long v);
void gw_json_bool(gw_json *j, int v);
void gw_json_null(gw_json *j);

/* Convenience: key + value. */
void gw_json_kv_string(gw_json *j, const char *key, const char *s);
void gw_json_kv_double(gw_json *j, const char *key, double v);
void gw_json_kv_int(gw_json *j, const char *key, long long v);
void gw_json_kv_bool(gw_json *j, const char *key, int v);
/* [x, y] on one line. */
void gw_json_kv_pair(gw_json *j, const char *key, double a, double b);
void gw_json_pair(gw_json *j, double a, double b);

/* Finish: every container must be closed and the stream error-free.
 * Writes the final newline.  Returns 0 or -1 with a message. */
int gw_json_finish(gw_json *j, gw_error *err);

#endif
