/* Sweep keys: which numbers of a model file a `--vary KEY=...` option sets,
 * and the model text with new values put in.
 *
 * KEY is the dotted path of the value in the model file.  A list item is
 * picked by its name in brackets (`streams[East Creek].stage`) or by its
 * position counted from 0 (`stage[1]`, `line[0][1]`).  A key that ends on a
 * list of numbers (a per-vertex `stage`) sets every number in it.  Values
 * are put into the model text in place of the old ones (same line, so
 * messages about the changed model still point at the right line), and the
 * changed text is read like any model file; only numbers written in the file
 * can be varied (defaults have no place to go). */
#ifndef GW_SWEEP_KEY_H
#define GW_SWEEP_KEY_H

#include <stddef.h>

#include "../solver/error.h"

typedef struct {
    size_t off, len;     /* bytes of one number in the model text */
} gw_span;

typedef struct {
    char *key;           /* as given, without "=..." (owned) */
    double *values;      /* the values to try, in order (owned) */
    int nvalues;
    gw_span *spans;      /* the numbers it sets (owned), after gw_vary_resolve */
    int nspans;
} gw_vary;

/* Parse "KEY=FROM:TO:N" (N evenly spaced values, both ends included; N = 1
 * gives FROM) or "KEY=V1,V2,...".  -1 with a message on bad syntax. */
int gw_vary_parse(const char *arg, gw_vary *v, gw_error *err);

/* Find the numbers `v->key` names in model `text` (`path` names it in
 * messages).  -1 with a message naming the key and what is missing, e.g.
 * "--vary streams[East Creek].stage: the model has no stream item named
 * 'East Creek' (items: Mill Creek, Alder Creek)". */
int gw_vary_resolve(gw_vary *v, const char *text, const char *path, gw_error *err);

/* Two options that set the same number: -1 with a message. */
int gw_vary_check_overlap(const gw_vary *v, int n, gw_error *err);

/* Copy of `text` with every span of v[i] replaced by values[i] (written so
 * it reads back to the same double).  malloc'ed; NULL on out of memory. */
char *gw_vary_apply(const char *text, const gw_vary *v, int n, const double *values);

/* Shortest decimal that reads back to exactly x. */
void gw_format_number(char *buf, size_t n, double x);

void gw_vary_free(gw_vary *v);

#endif
