/* All-or-nothing output directories.
 *
 * Every output is first written inside a private staging folder in the
 * output directory (".gwdivide-staging-PID").  Writers ask for the staged
 * path of each file and write it normally; multi-file formats (e.g. a
 * Shapefile's .shp/.shx/.dbf/.prj) simply land beside it.  gw_outdir_commit
 * renames every staged file into the output directory at the end; on any
 * failure gw_outdir_abort removes everything staged (and the output
 * directory itself when this run created it), so a failed run leaves
 * nothing half-written. */
#ifndef GW_OUTDIR_H
#define GW_OUTDIR_H

#include "../solver/error.h"

typedef struct gw_outdir gw_outdir;

/* Create `dir` if missing (with its parents) and a staging folder in it. */
gw_outdir *gw_outdir_open(const char *dir, gw_error *err);

/* Staged path for output file `name` (a plain file name, no '/').  The
 * string is owned by o and valid until gw_outdir_free.  NULL on a bad name
 * or allocation failure. */
const char *gw_outdir_path(gw_outdir *o, const char *name, gw_error *err);

/* Final path of `name` (for messages), owned by o like gw_outdir_path. */
const char *gw_outdir_final_path(gw_outdir *o, const char *name, gw_error *err);

/* Move every staged file into the output directory, replacing older files of
 * the same name, and remove the staging folder.  On failure the files not
 * yet moved are removed. */
int gw_outdir_commit(gw_outdir *o, gw_error *err);

/* Remove everything staged (and the output directory if this run created
 * it and it is now empty). */
void gw_outdir_abort(gw_outdir *o);

/* Frees o; aborts first when neither committed nor aborted. */
void gw_outdir_free(gw_outdir *o);

const char *gw_outdir_dir(const gw_outdir *o);

/* Rewrite staged paths in an error message as the final paths the user
 * asked for (".../.gwdivide-staging-PID/x.png" -> ".../x.png"). */
void gw_outdir_unstage(const gw_outdir *o, gw_error *err);

#endif
