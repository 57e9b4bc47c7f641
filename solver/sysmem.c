#include "sysmem.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* First number on the line of `file` that starts with `key` (whole file
 * when key is ""), or -1. */
static double read_number(const char *file, const char *key)
{
    FILE *f = fopen(file, "r");
    if (!f)
        return -1.0;
    char line[256];
    double v = -1.0;
    size_t kl = strlen(key);
    while (fgets(line, sizeof line, f)) {
        if (strncmp(line, key, kl) != 0)
            continue;
        char *end;
        double x = strtod(line + kl, &end);
        if (end != line + kl)
            v = x;
        break;
    }
    fclose(f);
    return v;
}

double gw_memory_available(void)
{
    const char *o = getenv("GW_MEMORY_MB");
    if (o && *o) {
        char *end;
        double mb = strtod(o, &end);
        if (*end == '\0' && mb > 0.0)
            return mb * 1048576.0;
    }
    double kb = read_number("/proc/meminfo", "MemAvailable:");
    double avail = kb > 0.0 ? kb * 1024.0 : 0.0;
    /* cgroup v2: memory.max is "max" (no limit; strtod fails) or bytes. */
    double max = read_number("/sys/fs/cgroup/memory.max", "");
    double cur = read_number("/sys/fs/cgroup/memory.current", "");
    if (max > 0.0 && cur >= 0.0) {
        double room = max > cur ? max - cur : 0.0;
        if (avail <= 0.0 || room < avail)
            avail = room;
    }
    return avail;
}
