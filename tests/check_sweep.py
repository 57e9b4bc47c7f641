#!/usr/bin/python3
"""Transects and parameter sweeps of `gwdivide` on the confined strip.

Reference (derivation from Darcy's law and continuity, the standard textbook
result, DESIGN.md): between two fixed heads h1 (x = 0) and h2 (x = L) with
uniform recharge R on a confined aquifer of transmissivity T,
    h(x) = h1 + (h2 - h1) x / L + R x (L - x) / (2 T)
    q(x) = -T dh/dx = R (x - x_d)           (flux per unit width, +x)
    x_d  = L/2 - (T/R)(h1 - h2)/L           (the divide)
and there is no divide when (T/R)|h1 - h2|/L > L/2 (the higher boundary then
loses water across the whole strip).  The divide depends on R and T only
through R/T.

Checks:
  - a sweep over R, K and h2 (every combination, equal heads included, both
    sides of the no-divide threshold) puts the divide crossing of the
    transect within 0.1 cell of x_d in every run that has one, and reports
    no divide (naming the losing boundary) in every run that has none;
  - a --zip sweep with R/T held constant keeps the divide in place;
  - moving the east boundary (a new active/fixed pattern, so a new solver)
    still gives x_d for the new L;
  - recharge-only sweeps factorize once (solver contract, solver/solve.h);
  - `gwdivide run` writes transect_<name>.csv whose head, along-line flux and
    divide row follow the closed form above, and report.json "transects";
  - bad --vary options: exit 2 for syntax, exit 1 naming the key for a key
    that is not in the model, and nothing written in either case.
"""
import csv
import json
import os
import subprocess
import sys
import tempfile

GW = os.environ.get("GW_COMMAND")
if not GW:
    sys.exit("GW_COMMAND must name the built gwdivide")

DX = 10.0
L = 1000.0          # between the fixed-head cell centres x = 5 and x = 1005
X0 = 5.0            # the transect starts at the west fixed-head cell centre
THICK = 10.0
H1 = 100.0

MODEL = """title: Confined strip for the sweep check
units: {length: m, time: day}
grid: {origin: [0, 0], cell_size: 10.0, columns: 101, rows: 5}
aquifer: {type: confined, conductivity: 20.0, thickness: 10.0}
recharge: {rate: 0.001}
fixed_heads:
  - {name: West, line: [[5, 0], [5, 50]], head: 100.0}
  - name: East
    line: [[1005, 0], [1005, 50]]
    head: 99.0
analysis:
  transects:
    - name: "A-A'"
      line: [[5, 25], [1005, 25]]
output: {maps: false}
"""

fails = 0
checks = 0


def check(ok, what):
    global fails, checks
    checks += 1
    print(("ok   - " if ok else "FAIL - ") + what)
    if not ok:
        fails += 1


def x_divide(R, T, h1, h2, length):
    return length / 2 - (T / R) * (h1 - h2) / length


def run(args):
    p = subprocess.run([GW] + args, capture_output=True, text=True)
    return p.returncode, p.stdout, p.stderr


def read_csv(path):
    with open(path, newline="") as f:
        return list(csv.DictReader(f))


def divide_column(header):
    cols = [c for c in header if c.startswith("A-A'") and "West | East divide" in c]
    return cols[0] if cols else None


with tempfile.TemporaryDirectory() as work:
    model = os.path.join(work, "strip.yaml")
    with open(model, "w") as f:
        f.write(MODEL)

    # ---- 1. Grid sweep over R, K and h2 ---------------------------------
    out = os.path.join(work, "grid")
    rc, so, se = run(["sweep", model, "--vary", "recharge.rate=0.0004:0.002:5",
                      "--vary", "aquifer.conductivity=5:45:5",
                      "--vary", "fixed_heads[East].head=100,99.5,98", "--out", out, "--quiet"])
    check(rc == 0, "grid sweep exits 0 (%s)" % se.strip())
    rows = read_csv(os.path.join(out, "sweep.csv"))
    check(len(rows) == 75, "grid sweep makes 5 x 5 x 3 = 75 runs (got %d)" % len(rows))
    col = divide_column(rows[0].keys())
    check(col is not None, "sweep.csv has a divide-position column for transect A-A'")
    worst, n_div, n_none, wrong = 0.0, 0, 0, []
    for r in rows:
        R = float(r["recharge.rate"])
        T = float(r["aquifer.conductivity"]) * THICK
        h2 = float(r["fixed_heads[East].head"])
        xd = x_divide(R, T, H1, h2, L)
        got = r[col]
        if xd > 0:
            n_div += 1
            if got == "" or r["divide_count"] != "1":
                wrong.append(r["run"])
                continue
            worst = max(worst, abs(float(got) - xd))
        else:
            n_none += 1
            if got != "" or "West -> East" not in r["no_divide"]:
                wrong.append(r["run"])
    check(n_div >= 40 and n_none >= 10, "sweep covers both sides of the no-divide threshold "
          "(%d runs with a divide, %d without)" % (n_div, n_none))
    check(not wrong, "divide present exactly when x_d > 0, no divide named 'West -> East' otherwise "
          "(wrong runs: %s)" % (", ".join(wrong) or "none"))
    check(worst <= 0.1 * DX, "divide within 0.1 cell of x_d = L/2 - (T/R)(h1-h2)/L in every run "
          "(worst %.3g m)" % worst)
    eq = [r for r in rows if float(r["fixed_heads[East].head"]) == H1]
    check(all(abs(float(r[col]) - L / 2) <= 0.1 * DX for r in eq),
          "equal heads put the divide at L/2 in all %d such runs" % len(eq))
    with open(os.path.join(out, "sweep_divides.json")) as f:
        sj = json.load(f)
    check(sj.get("schema") == "gwdivide-sweep/1" and len(sj["runs"]) == 75 and sj["combination"] == "grid",
          "sweep_divides.json: schema, 75 runs, full grid")
    check(all(len(run_["divides"]) == int(r["divide_count"] or 0) for run_, r in zip(sj["runs"], rows)),
          "sweep_divides.json holds every run's divides (counts match sweep.csv)")

    # ---- 2. Zip: R/T constant, divide fixed ------------------------------
    out = os.path.join(work, "zip")
    rc, so, se = run(["sweep", model, "--zip", "--vary", "recharge.rate=0.0005:0.002:4",
                      "--vary", "aquifer.conductivity=10:40:4", "--out", out, "--quiet"])
    rows = read_csv(os.path.join(out, "sweep.csv")) if rc == 0 else []
    xd = x_divide(0.0005, 100.0, H1, 99.0, L)
    check(rc == 0 and len(rows) == 4 and all(abs(float(r[divide_column(rows[0].keys())]) - xd) <= 0.1 * DX for r in rows),
          "--zip with R/T constant keeps the divide at x_d = %.1f m in all 4 runs" % xd)

    # ---- 3. A new active/fixed pattern: move the east boundary ----------
    out = os.path.join(work, "move")
    rc, so, se = run(["sweep", model, "--zip", "--vary", "fixed_heads[East].line[0][0]=805,905,1005",
                      "--vary", "fixed_heads[East].line[1][0]=805,905,1005", "--out", out])
    rows = read_csv(os.path.join(out, "sweep.csv")) if rc == 0 else []
    ok = rc == 0 and len(rows) == 3
    worst = 0.0
    for r in rows:
        Lr = float(r["fixed_heads[East].line[0][0]"]) - X0
        worst = max(worst, abs(float(r[divide_column(r.keys())]) - x_divide(0.001, 200.0, H1, 99.0, Lr)))
    check(ok and worst <= 0.1 * DX, "moving the east boundary (L = 800, 900, 1000 m) keeps x_d "
          "within 0.1 cell (worst %.3g m)" % worst)
    check("3 symbolic analyses" in so, "each new fixed-head pattern gets a new solver ('3 symbolic analyses')")

    # ---- 4. Recharge only changes the right-hand side --------------------
    out = os.path.join(work, "rate")
    rc, so, se = run(["sweep", model, "--vary", "recharge.rate=0.0002:0.002:20", "--out", out])
    check(rc == 0 and "1 symbolic analysis, 1 numeric factorization for 20 runs" in so,
          "a recharge sweep analyses and factorizes once for 20 runs")
    check("moved" in so and "A-A'" in so, "the summary says how far the divide moved along A-A'")

    # ---- 5. Transect of a single run -------------------------------------
    out = os.path.join(work, "run")
    rc, so, se = run(["run", model, "--out", out, "--quiet"])
    check(rc == 0, "run exits 0 (%s)" % se.strip())
    tpath = os.path.join(out, "transect_A-A_.csv")
    check(os.path.exists(tpath), "run writes transect_A-A_.csv (name made safe for files)")
    R, T, h2 = 0.001, 200.0, 99.0
    xd = x_divide(R, T, H1, h2, L)
    trows = read_csv(tpath) if os.path.exists(tpath) else []
    samples = [r for r in trows if r["crossing"] == ""]
    herr = max(abs(float(r["head_m"]) - (H1 + (h2 - H1) * float(r["distance_m"]) / L
                                         + R * float(r["distance_m"]) * (L - float(r["distance_m"])) / (2 * T)))
               for r in samples) if samples else 1e9
    check(len(samples) >= 200 and herr < 1e-3, "transect head follows the parabola (max error %.2g m)" % herr)
    inner = [r for r in samples if DX / 2 <= float(r["distance_m"]) <= L - DX / 2]
    qerr = max(abs(float(r["flux_along_m2_per_day"]) - R * (float(r["distance_m"]) - xd)) for r in inner) if inner else 1e9
    check(qerr < 1e-6, "along-line flux per unit width is R (x - x_d) (max error %.2g m2/day)" % qerr)
    nerr = max(abs(float(r["flux_normal_m2_per_day"])) for r in inner) if inner else 1e9
    check(nerr < 1e-9, "no flux across the strip's axis (max %.2g)" % nerr)
    div = [r for r in trows if r["crossing"].startswith("divide West | East")]
    check(len(div) == 1 and abs(float(div[0]["distance_m"]) - xd) <= 0.1 * DX,
          "transect finds the divide at x_d = %.1f m" % xd)
    with open(os.path.join(out, "report.json")) as f:
        rep = json.load(f)
    tr = rep.get("transects", [])
    ok = (len(tr) == 1 and tr[0]["name"] == "A-A'" and len(tr[0]["divide_crossings"]) == 1 and
          abs(tr[0]["divide_crossings"][0]["distance"] - xd) <= 0.1 * DX and
          tr[0]["divide_crossings"][0]["between"] == ["West", "East"])
    check(ok, "report.json 'transects' gives the divide crossing at x_d between West and East")

    # ---- 6. Bad --vary options -------------------------------------------
    bad = os.path.join(work, "bad")
    for arg, want, text in [
        ("recharge.rate", 2, "expected KEY=FROM:TO:N"),
        ("recharge.rate=1:2", 2, "FROM:TO:N"),
        ("recharge.rate=0.1:0.2:0", 2, "N must be"),
        ("recharge..rate=1:2:3", 2, "bad key"),
        ("streams[East Creek].stage=1:2:3", 1, "--vary streams[East Creek].stage: 'streams' is not in the model file"),
        ("fixed_heads[Middle].head=1:2:3", 1, "fixed_heads has no item named 'Middle' (items: West, East)"),
        ("fixed_heads[7].head=1:2:3", 1, "out of range"),
        ("aquifer.porosity=0.1:0.3:3", 1, "'porosity' is not in the model file under 'aquifer'"),
        ("aquifer.type=1:2:2", 1, "not a number"),
        ("aquifer.conductivity=-5:5:3", 1, "run 1 of 3 (aquifer.conductivity=-5)"),
    ]:
        rc, so, se = run(["sweep", model, "--vary", arg, "--out", bad])
        check(rc == want and text in se and not os.path.exists(bad),
              "--vary %s: exit %d with '%s', nothing written (got exit %d: %s)" % (arg, want, text, rc, se.strip()[:200]))
    rc, so, se = run(["sweep", model, "--out", bad])
    check(rc == 2 and "--vary" in se, "sweep without --vary is a usage error (exit 2)")
    rc, so, se = run(["sweep", model, "--zip", "--vary", "recharge.rate=1:2:3", "--vary", "aquifer.conductivity=1:2:2",
                      "--out", bad])
    check(rc == 2 and "same count" in se, "--zip with different counts is a usage error (exit 2)")

print("%d passed, %d failed" % (checks - fails, fails))
sys.exit(1 if fails else 0)
