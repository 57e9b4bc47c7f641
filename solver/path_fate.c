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

/* Open addressing on the face id; each used slot heads a chain of the
 * crossings of that face (newest first). */
struct gw_fate_map {
    size_t *key;            /* face + 1; 0 marks an empty slot */
    long *head;
    size_t nslot, used;
    struct entry {
        double along;
        long next;
        unsigned char fate;
    } *e;
    long ne, ecap;
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
    free(m->e);
    free(m);
}

static int grow_slots(gw_fate_map *m)
{
    gw_fate_map b = {.nslot = m->nslot ? 2 * m->nslot : 4096};
    b.key = calloc(b.nslot, sizeof *b.key);
    b.head = malloc(b.nslot * sizeof *b.head);
    if (!b.key || !b.head) {
        free(b.key);
        free(b.head);
        return -1;
    }
    for (size_t i = 0; i < m->nslot; i++)
        if (m->key[i]) {
            size_t j = slot_of(&b, m->key[i] - 1);
            b.key[j] = m->key[i];
            b.head[j] = m->head[i];
        }
    free(m->key);
    free(m->head);
    m->key = b.key;
    m->head = b.head;
    m->nslot = b.nslot;
    return 0;
}

int gw_fate_map_learn(gw_fate_map *m, const gw_crossing_log *l)
{
    if (m->ne + l->n > m->ecap) {
        long nc = m->ecap ? m->ecap : 4096;
        while (nc < m->ne + l->n)
            nc *= 2;
        struct entry *ne = realloc(m->e, (size_t)nc * sizeof *ne);
        if (!ne)
            return -1;
        m->e = ne;
        m->ecap = nc;
    }
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
        m->e[m->ne] = (struct entry){.along = c->along, .next = m->head[s], .fate = c->fate};
        m->head[s] = m->ne++;
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
    for (long i = m->head[s]; i >= 0; i = m->e[i].next) {
        double d = along - m->e[i].along;
        if (d >= 0.0 && d <= tol && d < dlo) {
            dlo = d;
            lo = m->e[i].fate;
        }
        if (d <= 0.0 && -d <= tol && -d < dhi) {
            dhi = -d;
            hi = m->e[i].fate;
        }
    }
    return lo >= 0 && lo == hi ? lo : -1;
}

long gw_fate_map_size(const gw_fate_map *m)
{
    return m->ne;
}
