/* Thread settings of the libraries the solver calls, changed at run time
 * through the dynamic loader (CHOLMOD's OpenMP runtime and OpenBLAS are
 * CHOLMOD's dependencies, not ours, and may be absent or replaced:
 * Debian's alternatives can put another BLAS behind libblas.so.3). */
#ifndef GW_LIB_THREADS_H
#define GW_LIB_THREADS_H

/* Run OpenMP parallel regions serially (once per process), unless the user
 * set OMP_MAX_ACTIVE_LEVELS.  Debian's CHOLMOD 3 runs small loops of the
 * supernodal factorization on a fixed team of 4 OpenMP threads whatever
 * the machine, which only contend with OpenBLAS for the cores (measured in
 * docs/performance.md). */
void gw_lib_threads_init(void);

/* Set OpenBLAS' thread count; returns the previous count, or 0 (and does
 * nothing) when the BLAS loaded is not OpenBLAS. */
int gw_blas_threads(int n);

#endif
