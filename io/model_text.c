#include "model_text.h"

#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

char *gw_model_read_text(const char *path, long max_bytes, gw_error *err)
{
    FILE *f = fopen(path, "rb");
    if (!f) {
        gw_fail(err, "%s: cannot open the model file: %s", path, strerror(errno));
        return NULL;
    }
    size_t cap = 65536, len = 0;
    char *buf = malloc(cap);
    while (buf) {
        size_t got = fread(buf + len, 1, cap - len - 1, f);
        len += got;
        if (got == 0) break;
        if (len + 1 == cap) {
            if (cap > (size_t)max_bytes) {
                free(buf);
                fclose(f);
                gw_fail(err, "%s: the model file is larger than %ld MB", path, max_bytes >> 20);
                return NULL;
            }
            char *b = realloc(buf, cap * 2);
            if (!b) { free(buf); buf = NULL; break; }
            buf = b;
            cap *= 2;
        }
    }
    int rerr = ferror(f);
    fclose(f);
    if (!buf) { gw_fail(err, "%s: out of memory", path); return NULL; }
    if (rerr) { free(buf); gw_fail(err, "%s: read error", path); return NULL; }
    buf[len] = '\0';
    if (strlen(buf) != len) {
        size_t at = strlen(buf);
        free(buf);
        gw_fail(err, "%s: the model file contains a NUL byte at offset %zu (not a text file?)", path, at);
        return NULL;
    }
    return buf;
}
