#include "csv_writer.h"

#include <errno.h>
#include <math.h>
#include <string.h>

void gw_csv_field(FILE *f, const char *s)
{
    if (!strpbrk(s, ",\"\r\n")) { fputs(s, f); return; }
    fputc('"', f);
    for (; *s; s++) {
        if (*s == '"') fputc('"', f);
        fputc(*s, f);
    }
    fputc('"', f);
}

void gw_csv_unit_token(char *out, size_t n, const char *u)
{
    size_t k = 0;
    for (; u && *u && k + 1 < n; u++) {
        char c = *u;
        out[k++] = ((c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || (c >= '0' && c <= '9')) ? c : '_';
    }
    out[k] = 0;
    if (k == 0) snprintf(out, n, "unit");
}

void gw_csv_num(FILE *f, double v, int digits)
{
    fputc(',', f);
    if (isfinite(v)) fprintf(f, "%.*g", digits, v);
}

int gw_csv_save(const char *path, gw_csv_write_fn write, const void *ctx, gw_error *err)
{
    FILE *f = fopen(path, "w");
    if (!f) return gw_fail(err, "cannot write %s: %s", path, strerror(errno));
    int rc = write(f, ctx, err);
    if (rc) gw_fail_prefix(err, "%s: ", path);
    else if (fflush(f) != 0 || ferror(f)) rc = gw_fail(err, "cannot write %s", path);
    if (fclose(f) != 0 && rc == 0) rc = gw_fail(err, "cannot write %s: %s", path, strerror(errno));
    return rc;
}
