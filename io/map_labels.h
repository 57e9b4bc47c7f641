/* Label placement without overlaps.  Every placed label (and every area the
 * map reserves, such as the legend) is an oriented rectangle in pixels; a
 * new label is accepted only if it lies wholly inside the frame and
 * overlaps nothing placed before (separating-axis test).  Contour labels
 * are laid along their line, rotated to follow it and kept upright. */
#ifndef GW_MAP_LABELS_H
#define GW_MAP_LABELS_H

typedef struct {
    double cx, cy;     /* centre, px */
    double w, h;       /* size along / across the label, px */
    double angle;      /* radians, of the label's baseline (y down) */
} gw_label_box;

/* A line segment no label may come near (stream, drain, divide...). */
typedef struct {
    double x0, y0, x1, y1;
    double clear;            /* px kept free on each side (half the drawn width + margin) */
    int tag;                 /* which line it belongs to */
} gw_label_seg;

typedef struct {
    gw_label_box *box;
    int n, cap;
    gw_label_seg *seg;       /* obstacle lines */
    int nseg, capseg;
    int skip_tag;            /* segments with this tag are ignored (-1: none), so a
                              * label can sit on its own line */
    double x0, y0, x1, y1;   /* frame every label must stay inside */
    double gap;              /* extra clearance around each label, px */
} gw_label_set;

void gw_labels_init(gw_label_set *s, double x0, double y0, double x1, double y1, double gap);
void gw_labels_free(gw_label_set *s);

/* 1 when a and b overlap (grown by gap / 2 each). */
int gw_labels_overlap(const gw_label_box *a, const gw_label_box *b, double gap);

/* 1 when b lies wholly inside the frame. */
int gw_labels_inside(const gw_label_set *s, const gw_label_box *b);

/* Record polyline pxy (n vertices, px; closed: last joins first) as an
 * obstacle: no label may later be accepted within `clear` px of it.
 * Returns 0, or -1 on allocation failure. */
int gw_labels_reserve_line(gw_label_set *s, const double *pxy, int n, int closed, double clear,
                           int tag);

/* 1 when b comes within the clearance of an obstacle segment (those tagged
 * s->skip_tag excepted). */
int gw_labels_hits_line(const gw_label_set *s, const gw_label_box *b);

/* Accept b if inside, off every obstacle line and free: returns 1 and records it; 0 when refused;
 * -1 on allocation failure. */
int gw_labels_try(gw_label_set *s, const gw_label_box *b);

/* Record an obstacle regardless of overlaps (legend, north arrow...). */
int gw_labels_reserve(gw_label_set *s, const gw_label_box *b);

/* Find places along polyline pxy (n vertices, px) for a label w x h: the
 * line must run nearly straight over the label's length there.  Tries
 * positions every `step` px starting half a spacing in and keeps those
 * accepted by the set, at least `spacing` px apart along the line.  With
 * max == 1 the positions are tried from the middle of the line outward, so
 * a single name sits mid-feature rather than at an end.  Writes
 * up to `max` boxes to out; returns how many were placed (-1 on allocation
 * failure). */
int gw_labels_along_line(gw_label_set *s, const double *pxy, int n, double w, double h,
                         double spacing, gw_label_box *out, int max);

#endif
