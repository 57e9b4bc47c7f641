/* Fates of tracked paths, remembered at the cell faces they crossed.
 *
 * Path lines of a steady flow field do not cross, so a new path that passes
 * a face between two known paths of the same fate, both within a small
 * distance of it, shares that fate -- unless a whole zone narrower than
 * that distance lies between them.  Callers that track many paths to one
 * yes/no question (does the water reach this well?) use this to stop a
 * path at the first such face instead of following it to its end.  The
 * fate is the caller's: any value 0..254. */
#ifndef GW_PATH_FATE_H
#define GW_PATH_FATE_H

#include <stddef.h>

/* Face between cell k and its neighbour nk (grid index order, row * nx +
 * col): 2 x the lower index, +1 for a north/south face. */
static inline size_t gw_face_id(int k, int nk)
{
    int ew = nk == k + 1 || nk == k - 1;
    return 2 * (size_t)(k < nk ? k : nk) + (ew ? 0 : 1);
}

/* Whether face id is an east/west face (position along it is y). */
static inline int gw_face_is_ew(size_t face)
{
    return (face & 1) == 0;
}

typedef struct {
    size_t face;
    double along;           /* position along the face, metres */
    unsigned char fate;
} gw_face_crossing;

/* The crossings of one or more paths, in the order they were made. */
typedef struct {
    gw_face_crossing *c;
    long n, cap;
} gw_crossing_log;

/* Append a crossing (fate to be set later); -1 when out of memory. */
int gw_crossing_log_add(gw_crossing_log *l, size_t face, double along);
/* Set the fate of crossings from .. n-1 (one path's). */
void gw_crossing_log_set_fate(gw_crossing_log *l, long from, unsigned char fate);
void gw_crossing_log_free(gw_crossing_log *l);

typedef struct gw_fate_map gw_fate_map;

gw_fate_map *gw_fate_map_new(void);
void gw_fate_map_free(gw_fate_map *m);
/* Remember every crossing of the log; -1 when out of memory (the map keeps
 * what it had, and stays usable). */
int gw_fate_map_learn(gw_fate_map *m, const gw_crossing_log *l);
/* Fate of a path crossing face at along: the known paths nearest below
 * and above it on that face, both within tol, share it; else -1. */
int gw_fate_map_lookup(const gw_fate_map *m, size_t face, double along, double tol);
/* Crossings remembered (for reports and tests). */
long gw_fate_map_size(const gw_fate_map *m);

#endif
