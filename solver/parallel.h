/* A parallel loop over independent items, for work whose results go to
 * per-item slots (so the outcome never depends on the number of threads or
 * on which thread ran what; callers merge the slots in item order). */
#ifndef GW_PARALLEL_H
#define GW_PARALLEL_H

#include "error.h"

/* Largest thread count gw_parallel_for uses. */
#define GW_MAX_THREADS 64

/* Threads to use by default: the online CPUs, at most 8 (the loops here
 * are memory-light and gain little beyond that). */
int gw_default_threads(void);

/* Item function: do item i (0 <= i < n); return 0, or -1 after filling err. */
typedef int (*gw_item_fn)(void *ctx, long i, gw_error *err);

/* Run fn for every i in [0, n) on up to `threads` threads (<= 0: the
 * default), the calling thread being one of them.  Items are handed out in
 * small chunks as threads become free.  Returns 0, or -1 with the error of
 * the lowest-numbered failing item (items after a failure may be skipped).
 * If threads cannot be started the loop runs on the calling thread alone. */
int gw_parallel_for(int threads, long n, gw_item_fn fn, void *ctx, gw_error *err);

#endif
