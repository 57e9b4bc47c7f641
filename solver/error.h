/* Error values carried up to the command.  A function that can fail returns
 * 0 on success or -1 after filling a gw_error; the command prints msg once. */
#ifndef GW_ERROR_H
#define GW_ERROR_H

#include <stdarg.h>

typedef struct {
    char msg[2048];
} gw_error;

/* Fill e (if not NULL) with a printf-style message; returns -1. */
int gw_fail(gw_error *e, const char *fmt, ...)
    __attribute__((format(printf, 2, 3)));

/* Prefix an existing message with more context ("while reading X: ..."). */
int gw_fail_prefix(gw_error *e, const char *fmt, ...)
    __attribute__((format(printf, 2, 3)));

#endif
