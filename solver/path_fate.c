#include "path_fate.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

int gw_crossing_log_add(gw_crossing_log *l, size_t face, double along)
{
    if (l->n == l->cap) {
        long nc = l->cap ? 2 * l->cap : 256;
        gw_face_crossing *c = realloc(l->c, (size_t)nc * sizeof *c);
        if (!c)
            return -1;
        l->c = c;
        l->cap = nc;
    }
    l->c[l->n++] = (gw_face_crossing){.face = face, .along = along, .fate = 255};
    return 0;
}

void gw_crossing_log_set_fate(gw_crossing_log *l, long from, unsigned char fate)
{
    for (long i = from; i < l->n; i++)
        l->c[i].fate = fate;
}

void gw_crossing_log_free(gw_crossing_log *l)
{
    free(l->c);
    memset(l, 0, sizeof *l);
}

/* Open addressing on the face id; each used slot heads a chain of blocks
 * holding that face's crossings, newest block first.  A block fills one
 * cache line, so a lookup reads a face's crossings in one or two loads
 * instead of one per crossing. */
#define BLOCK_N 6
struct block {
    double along[BLOCK_N];
    unsigned char fate[BLOCK_N];
    unsigned char n;
    int next;               /* older block of the same face, -1 at the end */
};

struct gw_fate_map {
    size_t *key;            /* face + 1; 0 marks an empty slot */
    int *head;              /* newest block of the face */
    size_t nslot, used;
    struct block *b;
    long nb, bcap;
    long ne;                /* crossings remembered */
};

static size_t slot_of(const gw_fate_map *m, size_t face)
{
    size_t i = (size_t)(((unsigned long long)face + 1) * 0x9E3779B97F4A7C15ull >> 20) &
               (m->nslot - 1);
    while (m->key[i] && m->key[i] != face + 1)
        i = (i + 1) & (m->nslot - 1);
    return i;
}

gw_fate_map *gw_fate_map_new(void)
{
    return calloc(1, sizeof(gw_fate_map));
}

void gw_fate_map_free(gw_fate_map *m)
{
    if (!m)
        return;
    free(m->key);
    free(m->head);
    free(m->b);
    free(m);
}

static int grow_slots(gw_fate_map *m)
{
    gw_fate_map g = {.nslot = m->nslot ? 2 * m->nslot : 4096};
    g.key = calloc(g.nslot, sizeof *g.key);
    g.head = malloc(g.nslot * sizeof *g.head);
    if (!g.key || !g.head) {
        free(g.key);
        free(g.head);
        return -1;
    }
    for (size_t i = 0; i < m->nslot; i++)
        if (m->key[i]) {
            size_t j = slot_of(&g, m->key[i] - 1);
            g.key[j] = m->key[i];
            g.head[j] = m->head[i];
        }
    free(m->key);
    free(m->head);
    m->key = g.key;
    m->head = g.head;
    m->nslot = g.nslot;
    return 0;
}

/* A new, empty block in front of slot s's chain; -1 when out of memory. */
static int new_block(gw_fate_map *m, size_t s)
{
    if (m->nb == m->bcap) {
        long nc = m->bcap ? 2 * m->bcap : 4096;
        if (nc > 0x7fffffffL)
            return -1;
        struct block *nb = realloc(m->b, (size_t)nc * sizeof *nb);
        if (!nb)
            return -1;
        m->b = nb;
        m->bcap = nc;
    }
    struct block *b = &m->b[m->nb];
    b->n = 0;
    b->next = m->head[s];
    m->head[s] = (int)m->nb++;
    return 0;
}

int gw_fate_map_learn(gw_fate_map *m, const gw_crossing_log *l)
{
    for (long i = 0; i < l->n; i++) {
        const gw_face_crossing *c = &l->c[i];
        if (2 * (m->used + 1) > m->nslot && grow_slots(m) != 0)
            return -1;
        size_t s = slot_of(m, c->face);
        if (!m->key[s]) {
            m->key[s] = c->face + 1;
            m->head[s] = -1;
            m->used++;
        }
        if ((m->head[s] < 0 || m->b[m->head[s]].n == BLOCK_N) && new_block(m, s) != 0)
            return -1;
        struct block *b = &m->b[m->head[s]];
        b->along[b->n] = c->along;
        b->fate[b->n] = c->fate;
        b->n++;
        m->ne++;
    }
    return 0;
}

int gw_fate_map_lookup(const gw_fate_map *m, size_t face, double along, double tol)
{
    if (!m->nslot)
        return -1;
    size_t s = slot_of(m, face);
    if (!m->key[s])
        return -1;
    double dlo = HUGE_VAL, dhi = HUGE_VAL;
    int lo = -1, hi = -1;
    for (int bi = m->head[s]; bi >= 0; bi = m->b[bi].next) {
        const struct block *b = &m->b[bi];
        for (int i = 0; i < b->n; i++) {
            double d = along - b->along[i];
            if (d >= 0.0 && d <= tol && d < dlo) {
                dlo = d;
                lo = b->fate[i];
            }
            if (d <= 0.0 && -d <= tol && -d < dhi) {
                dhi = -d;
                hi = b->fate[i];
            }
        }
    }
    return lo >= 0 && lo == hi ? lo : -1;
}

long gw_fate_map_size(const gw_fate_map *m)
{
    return m->ne;
}
