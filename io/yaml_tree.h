/* A small YAML document tree with 1-based line/column on every node.
 *
 * libfyaml 0.7 does not expose node positions in its document API, so the
 * tree is built from its event stream, where every event carries a mark.
 * Only what a model file needs: mappings (keys kept in order, duplicates
 * rejected), sequences, scalars.  Aliases of scalars resolve to the anchored
 * node; aliases of mappings/sequences are refused (they would let a tiny file
 * expand into a huge one). */
#ifndef GW_YAML_TREE_H
#define GW_YAML_TREE_H

#include <stddef.h>

#include "../solver/error.h"

typedef enum { GW_YSCALAR = 0, GW_YMAP, GW_YSEQ } gw_ykind;

typedef struct gw_ynode gw_ynode;
struct gw_ynode {
    gw_ykind kind;
    int line, col;        /* 1-based; 0 when unknown */
    char *text;           /* scalar: NUL-terminated copy */
    size_t len;
    int quoted;           /* scalar written quoted or as a block (a string) */
    int empty;            /* scalar with no text at all (YAML null) */
    gw_ynode **kids;      /* seq: items; map: key0, value0, key1, value1, ... */
    int n;                /* seq: item count; map: number of pairs */
    int cap;
};

typedef struct gw_ydoc gw_ydoc;

/* Parse `len` bytes of YAML.  `name` labels messages ("FILE:LINE:COL: ...").
 * Returns NULL with err filled on syntax errors (all those libfyaml reports,
 * one per line).  An empty stream gives a document whose root is NULL. */
gw_ydoc *gw_ydoc_parse(const char *text, size_t len, const char *name, gw_error *err);
void gw_ydoc_free(gw_ydoc *d);
const gw_ynode *gw_ydoc_root(const gw_ydoc *d);

/* Value of `key` in mapping m, or NULL. */
const gw_ynode *gw_ymap_get(const gw_ynode *m, const char *key);
static inline const gw_ynode *gw_ymap_key(const gw_ynode *m, int i) { return m->kids[2 * i]; }
static inline const gw_ynode *gw_ymap_value(const gw_ynode *m, int i) { return m->kids[2 * i + 1]; }

#endif
