#!/usr/bin/python3
"""Write a synthetic gwdivide model file with about N active cells.

The model is an invented valley of 10 m cells: heterogeneous conductivity
zones, a fixed-head river along the west side, a leaky stream meandering down
the east side, a drain, several pumping wells and two recharge zones.  A
corner of the grid is inactive so the solver has to skip cells.  The same
shapes are scaled to every size, so runs differ only in resolution.

    make_model.py CELLS OUT.yaml [--unconfined] [--maps] [--solve-only]

--solve-only turns the divide analysis off (same linear system; used for the
untimed run that exports it).  Capture zones cannot be turned off while
there are wells, so that run still tracks them.
"""
import math
import sys

CELL = 10.0
CUT = 0.08   # share of the grid left inactive (north-east corner triangle)


def grid_side(cells):
    return int(round(math.sqrt(cells / (1.0 - CUT))))


def pts(points):
    return "[" + ", ".join("[%.1f, %.1f]" % p for p in points) + "]"


def model(cells, unconfined=False, maps=False, solve_only=False):
    n = grid_side(cells)
    L = n * CELL                       # side in metres
    f = lambda u, v: (u * L, v * L)    # unit square -> map
    c = math.sqrt(2.0 * CUT)           # legs of the inactive corner triangle
    active = [f(0, 0), f(1, 0), f(1, 1 - c), f(1 - c, 1), f(0, 1)]
    stream = [f(0.86 + 0.05 * math.sin(6.0 * t), 0.02 + 0.70 * t) for t in
              [i / 12.0 for i in range(13)]]
    stages = ["%.2f" % (101.0 + 3.0 * t) for t in [i / 12.0 for i in range(13)]]
    bottoms = ["%.2f" % (99.5 + 3.0 * t) for t in [i / 12.0 for i in range(13)]]
    # Pumping stays the same at every size: the captured area (about 5 km2 at
    # 0.0004 m/day of recharge) is then a fixed piece of a growing region.
    # Capture-zone tracking costs about (captured cells) x (path length in
    # cells), so scaling pumping with the grid makes it grow as N^1.5.
    wells = [(0.30, 0.30, 400), (0.55, 0.62, 700), (0.70, 0.25, 300),
             (0.40, 0.80, 600), (0.62, 0.45, 250), (0.22, 0.55, 350)]
    lines = [
        "# Synthetic benchmark model (tools/bench/make_model.py), %d x %d cells" % (n, n),
        "title: Synthetic benchmark valley, about %d active cells" % cells,
        "units: {length: m, time: day}",
        "grid:",
        "  origin: [0.0, 0.0]",
        "  cell_size: %.1f" % CELL,
        "  columns: %d" % n,
        "  rows: %d" % n,
        "aquifer:",
        "  type: %s" % ("unconfined" if unconfined else "confined"),
        "  conductivity:",
        "    value: 15.0",
        "    zones:",
        "      - {name: buried gravel channel, polygon: %s, value: 80.0}" %
        pts([f(0.35, 0.0), f(0.45, 0.0), f(0.55, 0.5), f(0.45, 1.0), f(0.35, 1.0), f(0.45, 0.5)]),
        "      - {name: clay lens, polygon: %s, value: 0.5}" %
        pts([f(0.10, 0.60), f(0.30, 0.62), f(0.28, 0.75), f(0.12, 0.72)]),
        "      - {name: silty sand, polygon: %s, value: 4.0}" %
        pts([f(0.60, 0.05), f(0.80, 0.05), f(0.80, 0.20), f(0.60, 0.20)]),
        "      - {name: coarse fan, polygon: %s, value: 40.0}" %
        pts([f(0.05, 0.05), f(0.25, 0.10), f(0.20, 0.30), f(0.05, 0.25)]),
        "  thickness: 30.0",
        "  bottom: 60.0",
        "  porosity: 0.2",
        "  active: {polygon: %s}" % pts(active),
        "recharge:",
        "  rate: 0.0004",
        "  zones:",
        "    - {name: irrigated fields, polygon: %s, rate: 0.0011}" %
        pts([f(0.50, 0.30), f(0.75, 0.30), f(0.75, 0.50), f(0.50, 0.50)]),
        "    - {name: paved area, polygon: %s, rate: 0.0001}" %
        pts([f(0.15, 0.35), f(0.30, 0.35), f(0.30, 0.50), f(0.15, 0.50)]),
        "fixed_heads:",
        "  - name: West River",
        "    line: %s" % pts([(CELL / 2, 0.0), (CELL / 2, L)]),
        "    head: [100.0, 104.0]",
        "streams:",
        "  - name: East Brook",
        "    line: %s" % pts(stream),
        "    stage: [%s]" % ", ".join(stages),
        "    bed_bottom: [%s]" % ", ".join(bottoms),
        "    bed_conductance: 1.5",
        "drains:",
        "  - {name: Field drain, line: %s, elevation: 101.0, conductance: 0.8}" %
        pts([f(0.15, 0.15), f(0.30, 0.18)]),
        "wells:",
    ]
    for i, (u, v, q) in enumerate(wells):
        x, y = f(u, v)
        lines.append("  - {name: Well %d, at: [%.1f, %.1f], pumping: %d}" %
                     (i + 1, x + CELL / 2, y + CELL / 2, q))
    lines += [
        "analysis:",
        "  divides: %s" % ("false" if solve_only else "true"),
        "  capture: {travel_times: [365, 3650]}",
    ]
    lines += [
        "output:",
        "  maps: %s" % ("true" if maps else "false"),
    ]
    return "\n".join(lines) + "\n", n


def main(argv):
    if len(argv) < 3:
        sys.stderr.write(__doc__)
        return 2
    text, _ = model(int(float(argv[1])), "--unconfined" in argv, "--maps" in argv,
                    "--solve-only" in argv)
    with open(argv[2], "w") as fh:
        fh.write(text)
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv))
