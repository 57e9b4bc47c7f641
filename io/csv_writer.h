/* Small pieces shared by the CSV tables (budget.csv, transect_*.csv,
 * sweep.csv): field quoting, unit tokens for column names, numbers, and
 * writing one table to a file with the file's name on every error. */
#ifndef GW_CSV_WRITER_H
#define GW_CSV_WRITER_H

#include <stddef.h>
#include <stdio.h>

#include "../solver/error.h"

/* One field per RFC 4180: quoted when it holds a comma, quote or line
 * break, inner quotes doubled. */
void gw_csv_field(FILE *f, const char *s);

/* A unit name as it goes into a column name: letters and digits kept, any
 * other character '_'; "unit" when nothing is left.  Fits in n bytes. */
void gw_csv_unit_token(char *out, size_t n, const char *unit);

/* ",<v>" with `digits` significant digits; just "," when v is not finite
 * (an empty field). */
void gw_csv_num(FILE *f, double v, int digits);

/* Writes one table through write(f, ctx, err). */
typedef int (*gw_csv_write_fn)(FILE *f, const void *ctx, gw_error *err);

/* Open path, write the table, flush and close.  An error from write gets
 * "<path>: " in front; a failed open, flush or close names path. */
int gw_csv_save(const char *path, gw_csv_write_fn write, const void *ctx, gw_error *err);

#endif
