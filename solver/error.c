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
        /* head then the old message, cut at the buffer's end (very long
         * messages may lose their tail). */
        size_t cap = sizeof e->msg - 1;
        size_t hl = strnlen(head, sizeof head), ol = strnlen(old, sizeof old);
        if (hl > cap) hl = cap;
        if (ol > cap - hl) ol = cap - hl;
        memcpy(e->msg, head, hl);
        memcpy(e->msg + hl, old, ol);
        e->msg[hl + ol] = '\0';
    }
    return -1;
}
