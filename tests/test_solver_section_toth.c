/* Verification of cross-section mode against Toth's series solutions.
 *
 * Set-up of Toth (1962), "A theory of groundwater motion in small drainage
 * basins in central Alberta, Canada", J. Geophys. Res. 67(11): a basin
 * 0 <= x <= L, 0 <= z <= z0, no flow through the base (z = 0) and the sides
 * (x = 0, x = L); on top the head equals the water-table elevation.  Laplace's
 * equation gives, for a top head f(x) expanded in a cosine series
 *   f(x) = A0 + sum_n An cos(n pi x / L),
 *   h(x, z) = A0 + sum_n An cos(n pi x / L) cosh(n pi z / L) / cosh(n pi z0 / L)
 * (separation of variables; each term is harmonic, has dh/dx = 0 at the
 * sides and dh/dz = 0 at the base).
 *  - Toth (1962): linear water table f = z0 + c x.  Odd n only,
 *    An = -4 c L / (n pi)^2, A0 = z0 + c L / 2, i.e.
 *    h = z0 + cL/2 - (4cL/pi^2) sum_m cos((2m+1) pi x/L) cosh((2m+1) pi z/L)
 *                                    / ((2m+1)^2 cosh((2m+1) pi z0/L)).
 *  - Toth (1963), "A theoretical analysis of groundwater flow in small
 *    drainage basins", J. Geophys. Res. 68(16): linear plus sinusoidal water
 *    table f = z0 + c x + a sin(b x); the sine adds
 *    An += (a / L) [(1 - cos((b+l)L))/(b+l) + (1 - cos((b-l)L))/(b-l)],
 *    l = n pi / L (second term 0 when b = l), A0 += a (1 - cos bL) / (b L).
 *    (Coefficients re-derived here; tests/check_toth_series.py recomputes
 *    them by numerical quadrature with scipy.)
 *
 * Discretization: the top row of cells is fixed at f(x_centre) with its
 * centres at z = z0; the base and sides are cell faces.  The scheme is
 * second-order, so errors must fall about fourfold when the cell size is
 * halved; that, not a fixed number, is what "grid accuracy" means here.
 *
 * Set GW_SECTION_DUMP=FILE to write the Toth (1963) run for the scipy
 * streamline cross-check (tests/check_toth_series.py). */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <cmocka.h>

#include "solver/budget.h"
#include "solver/problem.h"
#include "solver/section.h"
#include "solver/solve.h"
#include "fixture_strip.h"

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif

static const double BL = 6000.0, Z0 = 1000.0, SLOPE = 0.02;   /* basin, m */
static const double AMP = 15.0, WAVE = 1500.0;                /* Toth (1963) relief, m */
static const double KH = 2.0;                                 /* m/d */

typedef struct {
    double c, a, b;    /* f = Z0 + c x + a sin(b x) */
    double L;
} water_table;

static double wt_f(const water_table *w, double x)
{
    return Z0 + w->c * x + (w->a != 0.0 ? w->a * sin(w->b * x) : 0.0);
}

/* Cosine coefficient An (n >= 1) and A0 of f on [0, L] (derived above). */
static double coef(const water_table *w, int n)
{
    double L = w->L;
    if (n == 0) {
        double a0 = Z0 + w->c * L / 2.0;
        if (w->a != 0.0)
            a0 += w->a * (1.0 - cos(w->b * L)) / (w->b * L);
        return a0;
    }
    double l = n * M_PI / L;
    double an = 2.0 / L * w->c * (cos(n * M_PI) - 1.0) / (l * l);
    if (w->a != 0.0) {
        double s = (1.0 - cos((w->b + l) * L)) / (w->b + l);
        if (fabs(w->b - l) > 1e-12 * l)
            s += (1.0 - cos((w->b - l) * L)) / (w->b - l);
        an += w->a / L * s;
    }
    return an;
}

/* cosh(l z) / cosh(l z0) without overflow */
static double cosh_ratio(double l, double z)
{
    return exp(-l * (Z0 - z)) * (1.0 + exp(-2.0 * l * z)) / (1.0 + exp(-2.0 * l * Z0));
}
static double sinh_ratio(double l, double z)
{
    return exp(-l * (Z0 - z)) * (1.0 - exp(-2.0 * l * z)) / (1.0 + exp(-2.0 * l * Z0));
}

/* Terms until exp(-l (z0 - z)) < 1e-14 (at least 20). */
static int nterms(double L, double z)
{
    double d = Z0 - z;
    int n = d > 0 ? (int)(32.0 * L / (M_PI * d)) + 20 : 20000;
    return n > 20000 ? 20000 : n;
}

static double series_h(const water_table *w, double x, double z)
{
    double h = coef(w, 0);
    int N = nterms(w->L, z);
    for (int n = 1; n <= N; n++) {
        double l = n * M_PI / w->L;
        h += coef(w, n) * cos(l * x) * cosh_ratio(l, z);
    }
    return h;
}

/* Toth (1962) closed form, as printed (odd terms only). */
static double toth1962_h(double L, double x, double z)
{
    double h = Z0 + SLOPE * L / 2.0;
    int N = nterms(L, z);
    for (int m = 0; 2 * m + 1 <= N; m++) {
        int n = 2 * m + 1;
        double l = n * M_PI / L;
        h -= 4.0 * SLOPE * L / (M_PI * M_PI) * cos(l * x) * cosh_ratio(l, z) / ((double)n * n);
    }
    return h;
}

/* dh/dz from the series (vertical Darcy flux is -Kv dh/dz). */
static double series_dhdz(const water_table *w, double x, double z)
{
    double d = 0.0;
    int N = nterms(w->L, z);
    for (int n = 1; n <= N; n++) {
        double l = n * M_PI / w->L;
        d += coef(w, n) * cos(l * x) * l * sinh_ratio(l, z);
    }
    return d;
}

/* Section of length L (nx columns), top-row centres at Z0, base at 0. */
static gw_problem *basin(const water_table *w, int nx, int ny, double anis, double k)
{
    gw_grid g = {.nx = nx, .ny = ny, .x0 = 0.0, .y0 = 0.0, .dx = w->L / nx, .dy = Z0 / (ny - 0.5)};
    gw_error err = {{0}};
    gw_problem *p = gw_problem_new(&g, GW_SECTION, &err);
    assert_non_null(p);
    int f = gw_problem_add_feature(p, "Water table", GW_FEAT_FIXED_HEAD, &err);
    assert_true(f > 0);
    for (int i = 0; i < nx * ny; i++) {
        p->k[i] = k;
        p->anis[i] = anis;
    }
    for (int c = 0; c < nx; c++) {
        p->fixed[c] = wt_f(w, gw_grid_xc(&g, c));
        p->fixed_feature[c] = f;
    }
    return p;
}

typedef struct {
    gw_problem *p;
    gw_solution sol;
    gw_budget b;
    gw_section s;
} run;

static void solve_section(run *r)
{
    fixture_solve_tight(r->p, &r->sol, 1e-11);
    gw_error err = {{0}};
    if (gw_budget_compute(r->p, &r->sol, &r->b, &err)) fail_msg("budget: %s", err.msg);
    /* DESIGN: the balance closes to < 1e-6 percent on every test model. */
    print_message("    balance: in %.10g out %.10g discrepancy %.3g %%\n", r->b.total_in,
                  r->b.total_out, r->b.discrepancy_percent);
    /* (a flat water table moves only round-off: nothing to balance) */
    assert_true(r->b.total_in + r->b.total_out < 1e-8 || fabs(r->b.discrepancy_percent) < 1e-6);
    if (gw_section_analyse(r->p, &r->sol, &r->b, NULL, &r->s, &err)) fail_msg("section: %s", err.msg);
}

static void run_free(run *r)
{
    gw_section_free(&r->s);
    gw_budget_free(&r->b);
    gw_solution_free(&r->sol);
    gw_problem_free(r->p);
}

/* Max |h - series| over the non-fixed cells, leaving out a margin of
 * `skip` (fraction of L) at both ends. */
static double head_error_in(const run *r, const water_table *w, int closed_form, double skip)
{
    const gw_grid *g = &r->p->grid;
    double e = 0.0;
    for (int row = 1; row < g->ny; row++)
        for (int c = 0; c < g->nx; c++) {
            double x = gw_grid_xc(g, c), z = gw_grid_yc(g, row);
            if (x < skip * w->L || x > (1.0 - skip) * w->L)
                continue;
            double ha = closed_form ? toth1962_h(w->L, x, z) : series_h(w, x, z);
            e = fmax(e, fabs(r->sol.head[row * g->nx + c] - ha));
        }
    return e;
}

static double head_error(const run *r, const water_table *w, int closed_form)
{
    return head_error_in(r, w, closed_form, 0.0);
}

/* ---- Toth (1962): linear water table ----------------------------------- */

static void test_toth1962_heads(void **state)
{
    (void)state;
    water_table w = {.c = SLOPE, .a = 0.0, .L = BL};
    double relief = SLOPE * BL;
    double err[2], mid[2];
    for (int i = 0; i < 2; i++) {
        run r = {.p = basin(&w, 60 << i, 20 << i, 1.0, KH)};
        solve_section(&r);
        err[i] = head_error(&r, &w, 1);
        mid[i] = head_error_in(&r, &w, 1, 0.1);
        print_message("    Toth (1962) %dx%d: max |h - series| = %.4g m (%.3g %% of relief %.0f m), "
                      "away from the ends %.4g m\n",
                      r.p->grid.nx, r.p->grid.ny, err[i], 100 * err[i] / relief, relief, mid[i]);
        /* Cross-check: the printed closed form equals the general series. */
        if (i == 0)
            assert_true(fabs(toth1962_h(BL, 1234.0, 500.0) - series_h(&w, 1234.0, 500.0)) < 1e-9);
        run_free(&r);
    }
    /* The top corners are singular (the water table slopes where the side
     * is a no-flow boundary, so the velocity grows like log r there): near
     * them the error can only fall about linearly; away from them the
     * scheme's second order shows. */
    print_message("    error ratio on halving the cells: %.2f overall (corners: ~2), %.2f away from "
                  "the ends (second order: ~4)\n", err[0] / err[1], mid[0] / mid[1]);
    assert_true(err[0] / err[1] > 1.8);
    assert_true(mid[0] / mid[1] > 3.0);
    assert_true(err[1] < 0.005 * relief);
}

static void test_toth1962_hinge(void **state)
{
    (void)state;
    water_table w = {.c = SLOPE, .a = 0.0, .L = BL};
    run r = {.p = basin(&w, 120, 40, 1.0, KH)};
    solve_section(&r);
    const gw_section *s = &r.s;
    /* One hinge, at mid-basin: h - (z0 + cL/2) is odd about x = L/2
     * (Toth 1962: recharge on the upper half, discharge on the lower). */
    assert_int_equal(s->nhinges, 1);
    print_message("    hinge at x = %.9g (L/2 = %.9g), z = %.9g\n", s->hinge[0].x, BL / 2, s->hinge[0].z);
    assert_true(fabs(s->hinge[0].x - BL / 2) < 1e-9 * BL);
    assert_true(fabs(s->hinge[0].z - (Z0 + SLOPE * BL / 2)) < 1e-9 * Z0);
    assert_int_equal(s->nareas, 2);
    assert_int_equal(s->area[0].recharge, 0);
    assert_int_equal(s->area[1].recharge, 1);
    assert_true(fabs(s->recharge_length - BL / 2) < 1e-9 * BL);
    assert_true(fabs(s->discharge_length - BL / 2) < 1e-9 * BL);
    assert_true(fabs(s->recharge_flux - s->discharge_flux) < 1e-9 * s->recharge_flux);
    /* Total recharge from the series: the stream function
     * psi = K sum An sin(l x) sinh(l z)/cosh(l z0) is 0 on base and sides, so
     * the flow entering between L/2 and L is |psi(L/2, z0)| =
     * (4 c L K / pi^2) sum_m tanh((2m+1) pi z0 / L) / (2m+1)^2. */
    double q = 0.0;
    for (int m = 0; m < 200000; m++) {
        double n = 2 * m + 1;
        q += (m % 2 ? -1.0 : 1.0) * tanh(n * M_PI * Z0 / BL) / (n * n);
    }
    q *= 4.0 * SLOPE * BL * KH / (M_PI * M_PI);
    print_message("    recharge %.6g m2/d (series %.6g, %.2f %%), rate %.4g m/d\n", s->recharge_flux, q,
                  100 * (s->recharge_flux - q) / q, s->recharge_rate);
    assert_true(fabs(s->recharge_flux - q) < 0.03 * q);
    /* One flow system: recharged at the top end, discharged at the bottom
     * end, so regional; it carries all the recharge and, next to the hinge,
     * reaches down toward the base. */
    assert_int_equal(s->nsystems, 1);
    assert_int_equal(s->system[0].kind, GW_SYSTEM_REGIONAL);
    assert_true(fabs(s->system[0].flux - s->recharge_flux) < 1e-9 * s->recharge_flux);
    assert_true(s->other_flux == 0.0);
    print_message("    system: %s, bottom %.1f m, depth %.1f m, travel %.3g-%.3g d, %d lines\n",
                  gw_system_kind_name(s->system[0].kind), s->system[0].bottom, s->system[0].depth,
                  s->system[0].time_min, s->system[0].time_max, s->ntraced);
    assert_true(s->system[0].bottom < 0.2 * Z0);
    run_free(&r);
}

/* ---- Anisotropy: coordinate transformation ------------------------------
 * Kh d2h/dx2 + Kv d2h/dz2 = 0 becomes Laplace's equation in X = x sqrt(a),
 * a = Kv/Kh (standard result; e.g. Freeze and Cherry 1979, Groundwater,
 * sec. 5.4 (from memory)).  The discrete scheme inherits it exactly: with
 * dx' = dx sqrt(a) and K' = sqrt(Kh Kv) every face conductance is the same,
 * so heads agree to round-off, and both agree with Toth's series on the
 * scaled basin. */
static void test_anisotropy_scaling(void **state)
{
    (void)state;
    const double a = 0.1;
    water_table w = {.c = SLOPE, .a = AMP, .b = 2 * M_PI / WAVE, .L = BL};
    water_table ws = {.c = SLOPE / sqrt(a), .a = AMP, .b = 2 * M_PI / WAVE / sqrt(a), .L = BL * sqrt(a)};
    run r1 = {.p = basin(&w, 120, 40, a, KH)};
    run r2 = {.p = basin(&ws, 120, 40, 1.0, KH * sqrt(a))};
    solve_section(&r1);
    solve_section(&r2);
    double e = 0.0;
    for (int i = 0; i < 120 * 40; i++)
        e = fmax(e, fabs(r1.sol.head[i] - r2.sol.head[i]));
    print_message("    anisotropic vs scaled isotropic: max |dh| = %.3g m\n", e);
    assert_true(e < 1e-9 * Z0);
    assert_int_equal(r1.s.nhinges, r2.s.nhinges);
    for (int i = 0; i < r1.s.nhinges; i++)
        assert_true(fabs(r1.s.hinge[i].x * sqrt(a) - r2.s.hinge[i].x) < 1e-9 * BL);
    assert_true(fabs(r1.s.recharge_flux - r2.s.recharge_flux) < 1e-9 * r1.s.recharge_flux);
    assert_int_equal(r1.s.nsystems, r2.s.nsystems);
    for (int i = 0; i < r1.s.nsystems; i++)
        assert_int_equal(r1.s.system[i].kind, r2.s.system[i].kind);
    /* and against the series on the scaled basin */
    double es = head_error(&r2, &ws, 0);
    print_message("    scaled basin vs Toth series: max |h - series| = %.3g m; %d hinges, %d systems\n",
                  es, r2.s.nhinges, r2.s.nsystems);
    assert_true(es < 0.01 * (SLOPE * BL + 2 * AMP));
    run_free(&r1);
    run_free(&r2);
}

/* ---- Toth (1963): linear plus sinusoidal water table ------------------- */

/* Zeros of the vertical flux at the level of the top faces, from the series. */
static int series_hinges(const water_table *w, double z, double *xs, int max)
{
    int n = 0, ns = 6000;
    double xp = 0.0, dp = series_dhdz(w, 0.0, z);
    for (int i = 1; i <= ns && n < max; i++) {
        double x = w->L * i / ns, d = series_dhdz(w, x, z);
        if ((d > 0) != (dp > 0)) {
            double lo = xp, hi = x, dlo = dp;
            for (int it = 0; it < 50; it++) {
                double mid = 0.5 * (lo + hi), dm = series_dhdz(w, mid, z);
                if ((dm > 0) == (dlo > 0)) { lo = mid; dlo = dm; } else hi = mid;
            }
            xs[n++] = 0.5 * (lo + hi);
        }
        xp = x;
        dp = d;
    }
    return n;
}

static void dump_run(const char *path, const run *r, const water_table *w)
{
    FILE *f = fopen(path, "w");
    assert_non_null(f);
    const gw_grid *g = &r->p->grid;
    fprintf(f, "basin %.17g %.17g %.17g %.17g %.17g %.17g\n", w->L, Z0, w->c, w->a, w->b, KH);
    fprintf(f, "grid %d %d %.17g %.17g\n", g->nx, g->ny, g->dx, g->dy);
    for (int i = 0; i < g->nx * g->ny; i++)
        fprintf(f, "h %.17g\n", r->sol.head[i]);
    for (int i = 0; i < r->s.nhinges; i++)
        fprintf(f, "hinge %.17g %.17g\n", r->s.hinge[i].x, r->s.hinge[i].z);
    for (int i = 0; i < r->s.nareas; i++)
        fprintf(f, "area %d %.17g %.17g\n", r->s.area[i].recharge, r->s.area[i].x0, r->s.area[i].x1);
    for (int i = 0; i < r->s.nsystems; i++) {
        const gw_flow_system *y = &r->s.system[i];
        fprintf(f, "system %s %d %d %.17g %.17g %.17g %.17g\n", gw_system_kind_name(y->kind),
                y->recharge_area, y->discharge_area, y->x_from, y->x_to, y->flux, y->bottom);
    }
    /* streamlines from every column centre on the top faces of recharge columns */
    for (int t = 0; t < r->s.ntop; t++) {
        if (r->s.top[t].flux <= 0)
            continue;
        double x = r->s.top[t].x, z = Z0 - 0.5 * g->dy - 1e-9;
        gw_section_line line = {0};
        int end;
        double tt, zmin;
        gw_error err = {{0}};
        if (gw_section_trace(r->p, &r->sol, x, z, &line, &end, &tt, &zmin, &err)) fail_msg("%s", err.msg);
        fprintf(f, "trace %.17g %.17g %.17g %.17g\n", x, z,
                end >= 0 ? gw_grid_xc(g, end % g->nx) : NAN, zmin);
        gw_section_line_free(&line);
    }
    fclose(f);
}

static void test_toth1963_systems(void **state)
{
    (void)state;
    water_table w = {.c = SLOPE, .a = AMP, .b = 2 * M_PI / WAVE, .L = BL};
    run r = {.p = basin(&w, 240, 80, 1.0, KH)};
    solve_section(&r);
    const gw_section *s = &r.s;
    const gw_grid *g = &r.p->grid;
    double eh = head_error(&r, &w, 0);
    print_message("    Toth (1963) 240x80: max |h - series| = %.3g m\n", eh);
    assert_true(eh < 0.005 * (SLOPE * BL + 2 * AMP));

    /* Hinge points where the series' vertical flux changes sign at the
     * level of the top faces, to within one cell. */
    double xs[64];
    int nh = series_hinges(&w, Z0 - 0.5 * g->dy, xs, 64);
    print_message("    hinges: %d (series %d)\n", s->nhinges, nh);
    assert_int_equal(s->nhinges, nh);
    double worst = 0.0;
    for (int i = 0; i < nh; i++)
        worst = fmax(worst, fabs(s->hinge[i].x - xs[i]));
    print_message("    worst hinge offset from the series: %.3g m (cell %.3g m)\n", worst, g->dx);
    assert_true(worst < g->dx);

    /* Systems: every recharge area but the topmost feeds its neighbouring
     * discharge areas (local systems), and the topmost feeds the lowest
     * discharge area below them (regional system) -- the pattern Toth
     * (1963) found for this kind of relief.  That the streamlines go where
     * the series sends them is checked by tests/check_toth_series.py. */
    int nloc = 0, nreg = 0, nint = 0;
    double qsum = 0.0;
    for (int i = 0; i < s->nsystems; i++) {
        const gw_flow_system *y = &s->system[i];
        print_message("    system %-12s recharge %7.1f-%7.1f -> area %d, %8.4g m2/d, bottom %6.1f m, depth %6.1f m\n",
                      gw_system_kind_name(y->kind), y->x_from, y->x_to, y->discharge_area, y->flux,
                      y->bottom, y->depth);
        nloc += y->kind == GW_SYSTEM_LOCAL;
        nreg += y->kind == GW_SYSTEM_REGIONAL;
        nint += y->kind == GW_SYSTEM_INTERMEDIATE;
        qsum += y->flux;
    }
    assert_int_equal(nreg, 1);
    assert_true(nloc >= 2);
    assert_true(fabs(qsum + s->other_flux - s->recharge_flux) < 1e-9 * s->recharge_flux);
    /* The regional system runs below the local ones. */
    for (int i = 0; i < s->nsystems; i++)
        if (s->system[i].kind == GW_SYSTEM_LOCAL)
            for (int j = 0; j < s->nsystems; j++)
                if (s->system[j].kind == GW_SYSTEM_REGIONAL)
                    assert_true(s->system[j].bottom < s->system[i].bottom);
    /* Within a recharge area the systems are separated by dividing
     * streamlines; between recharge areas by the discharge areas. */
    int nrech = 0;
    for (int i = 0; i < s->nareas; i++)
        nrech += s->area[i].recharge;
    assert_int_equal(s->ndivides, s->nsystems - nrech);
    const char *dump = getenv("GW_SECTION_DUMP");
    if (dump && *dump)
        dump_run(dump, &r, &w);
    (void)nint;
    run_free(&r);
}

/* Bad input is an error value, not a crash: a plan-view problem, and a
 * section whose top exchanges no water. */
static void test_rejects(void **state)
{
    (void)state;
    water_table w = {.c = 0.0, .a = 0.0, .L = BL};
    run r = {.p = basin(&w, 20, 8, 1.0, KH)};
    solve_section(&r);
    assert_int_equal(r.s.nareas, 0);      /* flat water table: no flow, no areas */
    assert_int_equal(r.s.nsystems, 0);
    gw_section s2;
    gw_error err = {{0}};
    r.p->type = GW_CONFINED;
    assert_int_equal(gw_section_analyse(r.p, &r.sol, &r.b, NULL, &s2, &err), -1);
    print_message("    rejected: %s\n", err.msg);
    r.p->type = GW_SECTION;
    assert_int_equal(gw_section_trace(r.p, &r.sol, 10.0, Z0, NULL, NULL, NULL, NULL, &err), -1);
    print_message("    rejected: %s\n", err.msg);
    run_free(&r);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_toth1962_heads),
        cmocka_unit_test(test_toth1962_hinge),
        cmocka_unit_test(test_anisotropy_scaling),
        cmocka_unit_test(test_toth1963_systems),
        cmocka_unit_test(test_rejects),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
