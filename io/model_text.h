/* Reading a model file's text whole, for the YAML parser and for
 * `gwdivide sweep` (which edits the text before each run). */
#ifndef GW_MODEL_TEXT_H
#define GW_MODEL_TEXT_H

#include "../solver/error.h"

/* The file's text, NUL-terminated; the caller frees it.  NULL with err
 * naming path when the file cannot be opened or read, outgrows max_bytes,
 * or holds a NUL byte (not a text file). */
char *gw_model_read_text(const char *path, long max_bytes, gw_error *err);

#endif
