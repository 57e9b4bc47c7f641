#include "parallel.h"

#include <pthread.h>
#include <stdatomic.h>
#include <string.h>
#include <unistd.h>

int gw_default_threads(void)
{
    long n = sysconf(_SC_NPROCESSORS_ONLN);
    if (n < 1)
        return 1;
    return n > 8 ? 8 : (int)n;
}

typedef struct {
    gw_item_fn fn;
    void *ctx;
    long n, chunk;
    atomic_long next;     /* first item not yet handed out */
    atomic_long failed;   /* lowest failing item so far, n when none */
} loop;

typedef struct {
    loop *lp;
    long fail_at;         /* this worker's lowest failing item, or n */
    gw_error err;
} worker;

static void *run_worker(void *arg)
{
    worker *w = arg;
    loop *lp = w->lp;
    w->fail_at = lp->n;
    for (;;) {
        long i0 = atomic_fetch_add(&lp->next, lp->chunk);
        if (i0 >= lp->n || i0 > atomic_load(&lp->failed))
            break;
        long i1 = i0 + lp->chunk < lp->n ? i0 + lp->chunk : lp->n;
        for (long i = i0; i < i1; i++)
            if (lp->fn(lp->ctx, i, &w->err) != 0) {
                w->fail_at = i;
                long cur = atomic_load(&lp->failed);
                while (i < cur && !atomic_compare_exchange_weak(&lp->failed, &cur, i))
                    ;
                return NULL;
            }
    }
    return NULL;
}

int gw_parallel_for(int threads, long n, gw_item_fn fn, void *ctx, gw_error *err)
{
    if (n <= 0)
        return 0;
    if (threads <= 0)
        threads = gw_default_threads();
    if (threads > GW_MAX_THREADS)
        threads = GW_MAX_THREADS;
    if ((long)threads > n)
        threads = (int)n;
    if (threads <= 1) {
        for (long i = 0; i < n; i++)
            if (fn(ctx, i, err) != 0)
                return -1;
        return 0;
    }
    loop lp = {.fn = fn, .ctx = ctx, .n = n};
    /* About 16 chunks per thread: small enough to balance items of very
     * different cost, large enough to keep the counter cold. */
    lp.chunk = n / (16L * threads);
    if (lp.chunk < 1)
        lp.chunk = 1;
    atomic_init(&lp.next, 0);
    atomic_init(&lp.failed, n);
    worker w[GW_MAX_THREADS];
    pthread_t tid[GW_MAX_THREADS];
    int started = 0;
    for (int t = 0; t < threads; t++) {
        w[t].lp = &lp;
        w[t].fail_at = n;
        w[t].err.msg[0] = '\0';
    }
    for (int t = 1; t < threads; t++) {
        if (pthread_create(&tid[t], NULL, run_worker, &w[t]) != 0)
            break;   /* run with the threads we have */
        started = t;
    }
    run_worker(&w[0]);
    for (int t = 1; t <= started; t++)
        pthread_join(tid[t], NULL);
    int best = -1;
    for (int t = 0; t <= started; t++)
        if (w[t].fail_at < n && (best < 0 || w[t].fail_at < w[best].fail_at))
            best = t;
    if (best < 0)
        return 0;
    if (err)
        memcpy(err, &w[best].err, sizeof *err);
    return -1;
}
