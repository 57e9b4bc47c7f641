#include "error.h"

#include <stdio.h>
#include <string.h>

int gw_fail(gw_error *e, const char *fmt, ...)
{
    if (e) {
        va_list ap;
        va_start(ap, fmt);
        vsnprintf(e->msg, sizeof e->msg, fmt, ap);
        va_end(ap);
    }
    return -1;
}

int gw_fail_prefix(gw_error *e, const char *fmt, ...)
{
    if (e) {
        char head[1024], old[sizeof e->msg];
        va_list ap;
        va_start(ap, fmt);
        vsnprintf(head, sizeof head, fmt, ap);
        va_end(ap);
        memcpy(old, e->msg, sizeof old);
        int n = snprintf(e->msg, sizeof e->msg, "%s%s", head, old);
        (void)n; /* truncation of very long messages is acceptable */
    }
    return -1;
}
