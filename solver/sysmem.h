/* How much memory the process can still use, so that a grid whose Cholesky
 * factor cannot fit is refused with the numbers before the factorization
 * starts, instead of the system killing the run part way. */
#ifndef GW_SYSMEM_H
#define GW_SYSMEM_H

/* Bytes available: the system's MemAvailable (/proc/meminfo), lowered to
 * the room left under a cgroup v2 memory limit when one is set.
 * GW_MEMORY_MB in the environment overrides it (for tests).  0 when it
 * cannot be told (then no check is made). */
double gw_memory_available(void);

#endif
