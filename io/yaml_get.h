/* Typed reading of YAML nodes with strict checks, and the list of problems
 * found so far.  Every problem is one line "FILE:LINE:COL: what: message";
 * readers keep going after a problem so one run reports as many as it can. */
#ifndef GW_YAML_GET_H
#define GW_YAML_GET_H

#include "../solver/error.h"
#include "yaml_tree.h"

typedef struct {
    int line, col;
    char *text;      /* the whole line, "FILE:LINE:COL: ..." */
} gw_msg;

typedef struct {
    const char *file;
    gw_msg *v;       /* kept problems, listed in file order by gw_msgs_fail */
    int kept, cap;
    int count;       /* problems added (all, even those not kept) */
} gw_msgs;

void gw_msgs_init(gw_msgs *m, const char *file);
void gw_msgs_add(gw_msgs *m, int line, int col, const char *fmt, ...)
    __attribute__((format(printf, 4, 5)));
/* Copy every kept problem into err (one per line, the count of those left
 * out when they do not fit), free the list, return -1. */
int gw_msgs_fail(gw_msgs *m, gw_error *err);
void gw_msgs_free(gw_msgs *m);

/* Strict number syntax: [+-]digits[.digits][e[+-]digits] (also ".5");
 * rejects words, NaN, infinities and values that overflow a double. */
int gw_parse_number(const char *s, double *out);

/* Each getter returns 0, or -1 after adding a problem that names `what`. */
int gw_yget_number(gw_msgs *m, const gw_ynode *n, const char *what, double *out);
int gw_yget_int(gw_msgs *m, const gw_ynode *n, const char *what, long lo, long hi, int *out);
int gw_yget_bool(gw_msgs *m, const gw_ynode *n, const char *what, int *out);
int gw_yget_string(gw_msgs *m, const gw_ynode *n, const char *what, char **out);
/* [x, y] */
int gw_yget_point(gw_msgs *m, const gw_ynode *n, const char *what, double xy[2]);
/* [[x, y], ...] with at least min_n vertices; *xy malloc'ed. */
int gw_yget_coords(gw_msgs *m, const gw_ynode *n, const char *what, int min_n,
                   double **xy, int *npts);
/* A number, or a list of numbers (at least one); *v malloc'ed. */
int gw_yget_numbers(gw_msgs *m, const gw_ynode *n, const char *what, double **v, int *nv);

/* Is n a mapping?  Adds "what: expected a mapping" when not. */
int gw_yis_map(gw_msgs *m, const gw_ynode *n, const char *what);
int gw_yis_seq(gw_msgs *m, const gw_ynode *n, const char *what);
/* Report every key of map not in the NULL-terminated list `allowed`. */
void gw_ycheck_keys(gw_msgs *m, const gw_ynode *map, const char *what, const char *const *allowed);
/* map[key], or NULL after adding "what: missing required key 'key'". */
const gw_ynode *gw_yrequire(gw_msgs *m, const gw_ynode *map, const char *key, const char *what);

#endif
