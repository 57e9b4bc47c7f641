/* Cross-section analysis: recharge and discharge areas along the water
 * table, the hinge points between them, and the flow systems below.
 *
 * Works on a solved GW_SECTION problem (x horizontal, y elevation, per unit
 * width).  The top boundary is whatever exchanges water with the outside:
 * fixed-head cells (the water table), stream/drain/seepage links and
 * recharge.  Wells are internal and do not count as top.
 *
 * Flow per unit width is L^2/T; rates along the top are L/T.  Signs follow
 * the budgets: positive enters the aquifer (recharge), negative leaves it
 * (discharge).
 *
 * Flow systems follow Toth (1963): water entering in one recharge area and
 * leaving in one discharge area forms a system.  It is
 *   - regional when it enters in the area holding the highest point of the
 *     water table and leaves in the area holding the lowest;
 *   - local when its recharge and discharge areas are next to each other;
 *   - intermediate otherwise (highs and lows lie between its two ends).
 * Streamlines are traced on the cell-face fluxes with Pollock's (1988)
 * semi-analytic method (velocity linear across each cell). */
#ifndef GW_SECTION_H
#define GW_SECTION_H

#include "budget.h"
#include "problem.h"
#include "solve.h"

/* One grid column that has a top boundary. */
typedef struct {
    int col;
    double x;          /* column centre */
    double z;          /* water-table elevation: head of the topmost boundary cell */
    double flux;       /* L^2/T through the top in this column, + = recharge */
    double rate;       /* flux / dx, L/T */
} gw_section_top;

typedef struct {
    double x, z;       /* map x and water-table elevation */
} gw_hinge;

/* A stretch of the top between hinge points (or the ends of the top). */
typedef struct {
    int recharge;      /* 1 recharge area, 0 discharge area */
    double x0, x1;     /* extent along x */
    double flux;       /* L^2/T, >= 0 (entering for recharge, leaving for discharge) */
    double zmax, zmin; /* highest and lowest water table in it */
} gw_section_area;

typedef enum { GW_SYSTEM_LOCAL = 0, GW_SYSTEM_INTERMEDIATE, GW_SYSTEM_REGIONAL } gw_system_kind;
const char *gw_system_kind_name(gw_system_kind k);   /* "local", ... */

/* A polyline in the section, x then elevation per vertex. */
typedef struct {
    double *xz;        /* owned, 2n values */
    int n;
} gw_section_line;

typedef struct {
    gw_system_kind kind;
    int recharge_area, discharge_area;   /* indices into gw_section.area */
    double x_from, x_to;     /* extent of its recharge along x (outermost starting points) */
    double flux;             /* L^2/T carried */
    double bottom;           /* lowest elevation its traced streamlines reach */
    double depth;            /* depth of penetration: water table above that point minus bottom */
    double time_min, time_max;   /* travel times of its traced streamlines, T */
} gw_flow_system;

typedef struct {
    int ntop;        gw_section_top *top;      /* ordered by column */
    int nhinges;     gw_hinge *hinge;          /* ordered by x */
    int nareas;      gw_section_area *area;    /* ordered by x */
    double recharge_length, discharge_length;  /* L */
    double recharge_flux, discharge_flux;      /* L^2/T, both >= 0 */
    double recharge_rate, discharge_rate;      /* mean over the areas, L/T */
    int nsystems;    gw_flow_system *system;   /* ordered by x_from */
    /* Dividing streamlines: the boundaries between flow systems, each
     * traced from where it leaves the water table. */
    int ndivides;    gw_section_line *divide;
    int ntraced;     /* streamlines traced */
    /* Recharge whose streamlines end at a well or stall at a stagnation
     * point instead of reaching the top (not part of any system), L^2/T. */
    double other_flux;
} gw_section;

typedef struct {
    int seeds_per_face;    /* streamlines started per inflow face (default 4) */
    double divide_tol;     /* bisection tolerance for dividing streamlines, in cells (default 1e-4) */
    double zero_flux;      /* |flux| below zero_flux * max |flux| counts as none (default 1e-9) */
} gw_section_options;

void gw_section_options_default(gw_section_options *o);

/* Analyse solution sol (budget b) of section problem p.  opt may be NULL.
 * Fails when p is not a section or has no top boundary. */
int gw_section_analyse(const gw_problem *p, const gw_solution *sol, const gw_budget *b,
                       const gw_section_options *opt, gw_section *s, gw_error *err);
void gw_section_free(gw_section *s);

/* Trace one streamline forward from map point (x, z) (inside an active,
 * non-fixed cell) until it leaves the aquifer, stalls, or reaches a strong
 * sink.  line (may be NULL) receives the path, *end_cell the cell where the
 * water leaves (-1 if it stalled), *time the travel time (porosity from p),
 * *zmin the lowest elevation reached.  For drawing flow lines on maps. */
int gw_section_trace(const gw_problem *p, const gw_solution *sol, double x, double z,
                     gw_section_line *line, int *end_cell, double *time, double *zmin,
                     gw_error *err);

void gw_section_line_free(gw_section_line *l);

/* Flow-system kind (gw_system_kind) of every active, non-fixed cell of an
 * analysed section, -1 elsewhere or where the water's origin or end is
 * not an area of the top (wells, stagnation).  Each cell centre is traced
 * forward to its discharge area and backward to its recharge area; with
 * stride > 1 one trace per stride x stride block of cells fills the block
 * (for large grids).  kind has one entry per cell.  For shading maps. */
/* Up to n streamline starts (x, z pairs into xz) on the faces where water
 * enters the aquifer in the recharge areas, spaced so that each carries
 * 1/n of that inflow: flow lines drawn from them are equal-flow tubes. */
int gw_section_flow_seeds(const gw_problem *p, const gw_solution *sol, const gw_section *s, int n,
                          double *xz, int *nout, gw_error *err);

int gw_section_cell_kinds(const gw_problem *p, const gw_solution *sol, const gw_section *s, int stride,
                          int *kind, gw_error *err);

#endif
