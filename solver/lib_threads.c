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

static void serialize_openmp(void)
{
    if (getenv("OMP_MAX_ACTIVE_LEVELS"))
        return;
    void *sym = global_symbol("omp_set_max_active_levels");
    if (sym) {
        void (*set_levels)(int);
        memcpy(&set_levels, &sym, sizeof set_levels);   /* object -> function pointer */
        set_levels(0);
    }
}

static pthread_once_t openmp_once = PTHREAD_ONCE_INIT;

void gw_lib_threads_init(void)
{
    pthread_once(&openmp_once, serialize_openmp);
}

int gw_blas_threads(int n)
{
    void *get = global_symbol("openblas_get_num_threads");
    void *set = global_symbol("openblas_set_num_threads");
    if (!get || !set)
        return 0;
    int (*get_fn)(void);
    void (*set_fn)(int);
    memcpy(&get_fn, &get, sizeof get_fn);
    memcpy(&set_fn, &set, sizeof set_fn);
    int prev = get_fn();
    if (n > 0 && n != prev)
        set_fn(n);
    return prev;
}
