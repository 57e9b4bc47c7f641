#!/usr/bin/env python3
"""Cross-check of cross-section mode against Toth's series with numpy/scipy.

Toth (1963), "A theoretical analysis of groundwater flow in small drainage
basins", J. Geophys. Res. 68(16): basin 0 <= x <= L, 0 <= z <= z0, no flow
through base and sides, head on top equal to the water table
f(x) = z0 + c x + a sin(b x) (Toth 1962 is the case a = 0).  Separation of
variables gives
    h(x, z) = A0 + sum_n An cos(n pi x/L) cosh(n pi z/L) / cosh(n pi z0/L),
with An the cosine coefficients of f.  Here they are computed by numerical
quadrature (scipy.integrate.quad, QAWO), independently of the closed forms
in tests/test_solver_section_toth.c, and streamlines are integrated in the
analytic velocity field with scipy.integrate.solve_ivp.

The C test writes its solved Toth (1963) section (GW_SECTION_DUMP); this
script checks:
  1. heads against the series (to the grid accuracy the C test also uses);
  2. hinge points against the sign changes of the series' vertical flux;
  3. that each streamline started on the water table ends in the same
     discharge area in the program and in the series' flow field, and that
     classifying the series' streamlines (Toth 1963: local / intermediate /
     regional) gives the same set of flow systems as the program.
"""
import os
import subprocess
import sys
import tempfile

import gwcheck_util

# The Debian python3-numpy/python3-scipy packages belong to the system
# interpreter; rerun under it when another python3 comes first on PATH.
gwcheck_util.need_system_python("numpy", "scipy.integrate")

import numpy as np  # noqa: E402
from scipy.integrate import quad, solve_ivp  # noqa: E402


def fail(msg):
    print("FAIL:", msg)
    sys.exit(1)


def run_c_test():
    build = os.environ.get("GW_BUILD_DIR", "")
    exe = os.path.join(build, "tests", "test_solver_section_toth")
    if not os.path.exists(exe):
        fail("built test program not found: %s (set GW_BUILD_DIR)" % exe)
    fd, path = tempfile.mkstemp(suffix=".txt")
    os.close(fd)
    env = dict(os.environ, GW_SECTION_DUMP=path)
    r = subprocess.run([exe], env=env, capture_output=True, text=True)
    if r.returncode != 0:
        fail("C test failed:\n" + r.stdout + r.stderr)
    with open(path) as f:
        lines = f.read().split("\n")
    os.unlink(path)
    d = {"h": [], "hinge": [], "area": [], "system": [], "trace": []}
    for ln in lines:
        w = ln.split()
        if not w:
            continue
        if w[0] == "basin":
            d["L"], d["z0"], d["c"], d["a"], d["b"], d["K"] = map(float, w[1:])
        elif w[0] == "grid":
            d["nx"], d["ny"] = int(w[1]), int(w[2])
            d["dx"], d["dy"] = float(w[3]), float(w[4])
        elif w[0] == "h":
            d["h"].append(float(w[1]))
        elif w[0] == "hinge":
            d["hinge"].append((float(w[1]), float(w[2])))
        elif w[0] == "area":
            d["area"].append((int(w[1]), float(w[2]), float(w[3])))
        elif w[0] == "system":
            d["system"].append((w[1], int(w[2]), int(w[3]), float(w[4]), float(w[5])))
        elif w[0] == "trace":
            d["trace"].append(tuple(map(float, w[1:])))
    return d


class Series:
    def __init__(self, d, nmax):
        self.L, self.z0, self.K = d["L"], d["z0"], d["K"]
        c, a, b, z0, L = d["c"], d["a"], d["b"], d["z0"], d["L"]
        f = lambda x: z0 + c * x + a * np.sin(b * x)
        self.a0 = quad(f, 0, L, limit=200)[0] / L
        n = np.arange(1, nmax + 1)
        self.lam = n * np.pi / L
        self.an = np.array([2.0 / L * quad(f, 0, L, weight="cos", wvar=l, limit=200)[0]
                            for l in self.lam])

    def _ratios(self, z):
        # terms until exp(-lam (z0 - z)) < 1e-12: fewer needed at depth
        z = min(z, self.z0) if np.isfinite(z) else self.z0
        d = max(self.z0 - z, 1e-3)
        n = min(len(self.lam), int(28 * self.L / (np.pi * d)) + 20)
        lam = self.lam[:n]
        e = np.exp(-lam * (self.z0 - z))
        den = 1.0 + np.exp(-2 * lam * self.z0)
        return e * (1 + np.exp(-2 * lam * z)) / den, e * (1 - np.exp(-2 * lam * z)) / den

    def head(self, x, z):
        ch, _ = self._ratios(z)
        n = len(ch)
        return self.a0 + np.sum(self.an[:n] * np.cos(self.lam[:n] * x) * ch)

    def grad(self, x, z):
        ch, sh = self._ratios(z)
        n = len(ch)
        an, lam = self.an[:n], self.lam[:n]
        gx = -np.sum(an * lam * np.sin(lam * x) * ch)
        gz = np.sum(an * lam * np.cos(lam * x) * sh)
        return gx, gz


def area_of(areas, x):
    for i, (_, x0, x1) in enumerate(areas):
        if x0 <= x <= x1:
            return i
    return 0 if x < areas[0][1] else len(areas) - 1


def toth_kind(ra, da, hi_area, lo_area):
    """Toth (1963): regional from the area holding the highest water table to
    the one holding the lowest; local between neighbouring areas; else
    intermediate."""
    if ra == hi_area and da == lo_area:
        return "regional"
    if abs(ra - da) == 1:
        return "local"
    return "intermediate"


def main():
    d = run_c_test()
    L, z0, dx, dy, nx, ny = d["L"], d["z0"], d["dx"], d["dy"], d["nx"], d["ny"]
    ztop_face = z0 - 0.5 * dy
    nmax = int(32 * L / (np.pi * 0.5 * dy)) + 20
    s = Series(d, nmax)
    relief = d["c"] * L + 2 * abs(d["a"])

    # 1. heads (non-fixed rows)
    h = np.array(d["h"]).reshape(ny, nx)
    err = 0.0
    for r in range(1, ny, 4):
        z = (ny - r - 0.5) * dy
        for c in range(0, nx, 4):
            x = (c + 0.5) * dx
            err = max(err, abs(h[r, c] - s.head(x, z)))
    print("heads: max |h - series| on every 4th cell %.4g m (relief %.0f m)" % (err, relief))
    if err > 0.005 * relief:
        fail("heads differ from the series by more than 0.5 % of the relief")

    # 2. hinge points: sign changes of dh/dz at the level of the top faces
    xs = np.linspace(0, L, 4001)
    gz = np.array([s.grad(x, ztop_face)[1] for x in xs])
    roots = []
    for i in range(len(xs) - 1):
        if (gz[i] > 0) != (gz[i + 1] > 0):
            lo, hi = xs[i], xs[i + 1]
            for _ in range(50):
                mid = 0.5 * (lo + hi)
                if (s.grad(mid, ztop_face)[1] > 0) == (gz[i] > 0):
                    lo = mid
                else:
                    hi = mid
            roots.append(0.5 * (lo + hi))
    hx = [p[0] for p in d["hinge"]]
    print("hinges: program %d, series %d" % (len(hx), len(roots)))
    if len(hx) != len(roots):
        fail("number of hinge points differs")
    worst = max(abs(a - b) for a, b in zip(hx, roots))
    print("hinges: worst offset %.3g m (cell %.3g m)" % (worst, dx))
    if worst > dx:
        fail("a hinge point is more than one cell from the series")

    # 3. streamlines from the water table: destinations and systems
    K = s.K

    def vel(t, y):
        gx, gz = s.grad(y[0], y[1])
        return [-K * gx, -K * gz]

    def back_up(t, y):
        return y[1] - ztop_face
    back_up.terminal = True
    back_up.direction = 1

    areas = d["area"]
    tops = [(x0, x1) for (_, x0, x1) in areas]
    # highest / lowest water table: f at the column centres
    xc = (np.arange(nx) + 0.5) * dx
    f = z0 + d["c"] * xc + d["a"] * np.sin(d["b"] * xc)
    hi_area, lo_area = area_of(areas, xc[np.argmax(f)]), area_of(areas, xc[np.argmin(f)])
    # system boundaries (starts of dividing streamlines and hinges) in the program
    bounds = [sy[3] for sy in d["system"]] + [sy[4] for sy in d["system"]]
    agree = near = disagree = 0
    series_systems = set()
    for (x, z, xend, zmin) in d["trace"]:
        sol = solve_ivp(vel, [0, 1e9], [x, z - 1e-6], events=back_up, rtol=1e-8, atol=1e-6)
        if sol.status != 1:
            fail("series streamline from x = %.1f did not come back to the top" % x)
        xe = sol.y_events[0][0][0]
        ra, da_s = area_of(areas, x), area_of(areas, xe)
        da_p = area_of(areas, xend) if np.isfinite(xend) else -1
        close = min(abs(x - b) for b in bounds) < 2 * dx
        if areas[da_s][0] == 1:
            # Back at the level of the top faces inside a recharge area: the
            # half-cell between that level and the water table (next to a
            # hinge or the corner), not a flow system of its own.
            near += 1
            continue
        series_systems.add((ra, da_s, toth_kind(ra, da_s, hi_area, lo_area)))
        if da_s == da_p:
            agree += 1
        elif close:
            near += 1
        else:
            disagree += 1
            print("  streamline from x = %.1f: program -> area %d, series -> area %d (x %.1f)"
                  % (x, da_p, da_s, xe))
    print("streamlines: %d agree, %d differ within 2 cells of a system boundary, %d differ elsewhere"
          % (agree, near, disagree))
    if disagree:
        fail("streamlines end in different discharge areas away from system boundaries")
    prog_systems = set((sy[1], sy[2], sy[0]) for sy in d["system"])
    print("systems: program", sorted(prog_systems))
    print("systems: series ", sorted(series_systems))
    # Systems narrower than the seed spacing may be missed by the series
    # sample; every system the series finds must be in the program's list.
    missing = series_systems - prog_systems
    if missing:
        fail("flow systems predicted by the series are missing: %s" % sorted(missing))
    kinds_p = sorted(k for (_, _, k) in prog_systems)
    kinds_s = sorted(k for (_, _, k) in series_systems)
    for kind in ("local", "regional"):
        if (kind in kinds_s) != (kind in kinds_p):
            fail("%s systems: program and series disagree" % kind)
    print("OK")


if __name__ == "__main__":
    main()
