#include "lib_threads.h"

#include <dlfcn.h>
#include <pthread.h>
#include <stdlib.h>
#include <string.h>

/* A function of the process' global symbol table (the program and the
 * libraries loaded with it), or NULL. */
static void *global_symbol(const char *name)
{
    void *self = dlopen(NULL, RTLD_NOW);
    if (!self)
        return NULL;
    void *sym = dlsym(self, name);
    dlclose(self);   /* the program's own handle: nothing is unloaded */
    return sym;
}

/* The libraries' functions, looked up once per process. */
static void (*omp_set_levels)(int);
static int (*blas_get_threads)(void);
static void (*blas_set_threads)(int);
static pthread_once_t lookup_once = PTHREAD_ONCE_INIT;

static void lookup(void)
{
    void *sym = global_symbol("omp_set_max_active_levels");
    if (sym)
        memcpy(&omp_set_levels, &sym, sizeof omp_set_levels);   /* object -> function pointer */
    void *get = global_symbol("openblas_get_num_threads");
    void *set = global_symbol("openblas_set_num_threads");
    if (get && set) {
        memcpy(&blas_get_threads, &get, sizeof blas_get_threads);
        memcpy(&blas_set_threads, &set, sizeof blas_set_threads);
    }
}

static void serialize_openmp(void)
{
    pthread_once(&lookup_once, lookup);
    if (!getenv("OMP_MAX_ACTIVE_LEVELS") && omp_set_levels)
        omp_set_levels(0);
}

static pthread_once_t openmp_once = PTHREAD_ONCE_INIT;

void gw_lib_threads_init(void)
{
    pthread_once(&openmp_once, serialize_openmp);
}

int gw_blas_threads(int n)
{
    pthread_once(&lookup_once, lookup);
    if (!blas_get_threads)
        return 0;
    int prev = blas_get_threads();
    if (n > 0 && n != prev)
        blas_set_threads(n);
    return prev;
}
