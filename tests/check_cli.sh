#!/usr/bin/env bash
# The gwdivide command end to end on small models: exit status, outputs and
# their agreement with each other.
#  - exit 0 / 1 / 2 per DESIGN.md; a rejected model leaves no files;
#  - report.json parses and has the schema "gwdivide-report/1" keys;
#  - budget.csv rows sum to the report's feature and balance totals;
#  - heads.tif opens with GDAL, carries the model CRS and the grid's
#    geotransform, and matches report/observation heads;
#  - the global water balance closes to < 1e-6 percent (DESIGN.md);
#  - the exported linear system, solved independently with
#    scipy.sparse.linalg.spsolve (SciPy reference library), reproduces the
#    heads gwdivide wrote.
set -uo pipefail
GW="${GW_COMMAND:?GW_COMMAND must name the built gwdivide}"
# Debian's python3 carries numpy, scipy and GDAL bindings (tools/setup-deps.sh).
PY=/usr/bin/python3
[ -x "$PY" ] || PY=python3
work="$(mktemp -d "${TMPDIR:-/tmp}/gw-cli-XXXXXX")"
trap 'rm -rf "$work"' EXIT
fails=0
pass() { echo "ok   - $*"; }
fail() { echo "FAIL - $*"; fails=$((fails + 1)); }

expect_status() {   # expect_status WANT DESCRIPTION -- command...
    local want="$1" what="$2"; shift 3
    "$@" >"$work/out.txt" 2>"$work/err.txt"
    local got=$?
    if [ "$got" -eq "$want" ]; then pass "$what (exit $got)"
    else fail "$what: exit $got, expected $want"; sed 's/^/     /' "$work/err.txt"; fi
}

# A 400 m x 200 m confined strip: fixed heads at both ends, uniform recharge,
# a stream, a drain, a pumping well and two observation wells.
cat >"$work/good.yaml" <<'YAML'
title: CLI test strip "quoted" title
units: {length: m, time: day}
grid: {origin: [500000, 4100000], cell_size: 10.0, columns: 40, rows: 20, crs: EPSG:32633}
aquifer: {type: confined, conductivity: 10.0, thickness: 20.0, porosity: 0.25}
recharge: {rate: 0.0005}
fixed_heads:
  - {name: West end, line: [[500005, 4100000], [500005, 4100200]], head: 100.0}
  - {name: East end, line: [[500395, 4100000], [500395, 4100200]], head: 99.0}
streams:
  - name: Middle brook
    line: [[500200, 4100000], [500210, 4100200]]
    stage: [100.2, 100.6]
    bed_bottom: 98.0
    bed_conductance: 0.5
drains:
  - {name: Ditch, line: [[500050, 4100150], [500150, 4100150]], elevation: 99.9, conductance: 1.0}
wells:
  - {name: Well A, at: [500305, 4100105], pumping: 5.0}
observations:
  - {name: OB-1, at: [500105, 4100055], head: 100.4}
  - {name: OB-2, at: [500255, 4100125]}
output: {maps: false}
YAML

# --- usage errors: exit 2 -------------------------------------------------
expect_status 2 "no arguments" -- "$GW"
expect_status 2 "unknown command" -- "$GW" solve "$work/good.yaml"
expect_status 2 "unknown option" -- "$GW" run "$work/good.yaml" --fast
expect_status 2 "run without a model" -- "$GW" run
expect_status 2 "--out without a value" -- "$GW" run "$work/good.yaml" --out
expect_status 2 "two model files" -- "$GW" check "$work/good.yaml" "$work/good.yaml"
expect_status 0 "--help" -- "$GW" --help
grep -q "gwdivide run MODEL.yaml" "$work/out.txt" && pass "--help shows the run usage" || fail "--help text"
expect_status 0 "--version" -- "$GW" --version
grep -Eq "^gwdivide [0-9]+\.[0-9]+\.[0-9]+" "$work/out.txt" && pass "--version prints a version" || fail "--version text"

# --- check ---------------------------------------------------------------
expect_status 0 "check on a good model" -- "$GW" check "$work/good.yaml"
printf 'title: broken\nunits: {length: m, time: day}\ngrid: {origin: [0, 0], cell_size: -5, columns: 10, rows: 10}\naquifer: {type: confined, conductivity: 1, thickness: 1}\n' >"$work/bad.yaml"
expect_status 1 "check on a bad model" -- "$GW" check "$work/bad.yaml"
grep -q "bad.yaml:3:" "$work/err.txt" && pass "check names file:line of the problem" || { fail "check message lacks file:line"; cat "$work/err.txt"; }

# --- run on the good model ------------------------------------------------
out="$work/results"
expect_status 0 "run on a good model" -- "$GW" run "$work/good.yaml" --out "$out" --export-matrix "$work/system"
for f in report.json budget.csv heads.tif; do
    [ -s "$out/$f" ] && pass "$f written" || fail "$f missing"
done
[ -z "$(find "$out" -name '.gwdivide-staging*')" ] && pass "no staging folder left" || fail "staging folder left behind"
grep -q "m3/day" "$work/out.txt" && pass "summary prints flow units" || fail "summary lacks m3/day"
grep -q "Cautions" "$work/out.txt" && pass "summary prints cautions" || fail "summary lacks cautions"

"$PY" - "$out" "$work" <<'PYEOF' || fails=$((fails + 1))
import csv, json, math, sys
out, work = sys.argv[1], sys.argv[2]
bad = 0
def check(cond, what):
    global bad
    print(("ok   - " if cond else "FAIL - ") + what)
    if not cond: bad += 1

r = json.load(open(out + "/report.json"))
keys = ["schema", "title", "units", "grid", "solver", "balance", "features", "divides",
        "stagnation_points", "observations", "catchments", "hinge_points", "capture_zones",
        "warnings", "cautions"]
check(all(k in r for k in keys), "report.json has every schema key")
check(r["schema"] == "gwdivide-report/1", "schema name")
check(r["title"] == 'CLI test strip "quoted" title', "title survives quoting")
check(r["units"] == {"length": "m", "time": "day"}, "units")
g = r["grid"]
check(g["columns"] == 40 and g["rows"] == 20 and g["cell_size"] == [10, 10]
      and g["origin"] == [500000, 4100000] and g["active_cells"] == 800, "grid block")
check(r["solver"]["converged"] is True and r["solver"]["iterations"] >= 1, "solver block")
b = r["balance"]
check(abs(b["discrepancy_percent"]) < 1e-6, "global balance closes: %.3g %%" % b["discrepancy_percent"])
# Recharge alone: 0.0005 m/day over 400 m x 200 m (the whole grid is active).
rech = [f for f in r["features"] if f["type"] == "recharge"]
check(len(rech) == 1 and abs(rech[0]["inflow"] - 0.0005 * 400 * 200) < 1e-9, "recharge inflow = R x area")
well = [f for f in r["features"] if f["name"] == "Well A"][0]
check(well["type"] == "well" and abs(well["outflow"] - 5.0) < 1e-12 and well["inflow"] == 0, "well outflow = pumping")
for f in r["features"]:
    check(abs(f["net"] - (f["inflow"] - f["outflow"])) <= 1e-9 * max(1.0, f["inflow"] + f["outflow"]),
          "net = inflow - outflow for %s" % f["name"])
    check(f["state"] in ("gaining", "losing", "mixed", "none"), "state word for %s" % f["name"])
tin = sum(f["inflow"] for f in r["features"]); tout = sum(f["outflow"] for f in r["features"])
check(math.isclose(tin, b["inflow"], rel_tol=1e-12) and math.isclose(tout, b["outflow"], rel_tol=1e-12),
      "features sum to the balance totals")
check(len(r["cautions"]) >= 3 and any("screening" in c.lower() for c in r["cautions"]), "cautions present")
obs = {o["name"]: o for o in r["observations"]}
check(obs["OB-1"]["observed"] == 100.4 and obs["OB-2"]["observed"] is None and obs["OB-2"]["residual"] is None,
      "observation without a head has null observed/residual")
check(abs(obs["OB-1"]["residual"] - (100.4 - obs["OB-1"]["simulated"])) < 1e-12, "residual = observed - simulated")

# budget.csv: per-feature sums and grand totals equal the report's.
rows = list(csv.DictReader(open(out + "/budget.csv")))
hdr = list(rows[0].keys())
check(hdr == ["feature", "type", "column", "row", "x_m", "y_m", "inflow_m3_per_day", "outflow_m3_per_day"],
      "budget.csv header names carry units")
sums = {}
for row in rows:
    s = sums.setdefault(row["feature"], [0.0, 0.0])
    s[0] += float(row["inflow_m3_per_day"]); s[1] += float(row["outflow_m3_per_day"])
for f in r["features"]:
    s = sums.get(f["name"], [0.0, 0.0])
    check(math.isclose(s[0], f["inflow"], rel_tol=1e-12, abs_tol=1e-12)
          and math.isclose(s[1], f["outflow"], rel_tol=1e-12, abs_tol=1e-12),
          "budget.csv rows of %s sum to the report" % f["name"])
check(math.isclose(sum(v[0] for v in sums.values()), b["inflow"], rel_tol=1e-12)
      and math.isclose(sum(v[1] for v in sums.values()), b["outflow"], rel_tol=1e-12),
      "budget.csv sums to the balance totals")
wrow = [row for row in rows if row["feature"] == "Well A"][0]
check((wrow["column"], wrow["row"]) == ("31", "10") and float(wrow["x_m"]) == 500305 and float(wrow["y_m"]) == 4100105,
      "well reach at 1-based column 31, row 10 from the north, cell centre")

# heads.tif
from osgeo import gdal, osr
gdal.UseExceptions()
ds = gdal.Open(out + "/heads.tif")
check(ds.RasterXSize == 40 and ds.RasterYSize == 20, "heads.tif size")
check(ds.GetGeoTransform() == (500000, 10, 0, 4100200, 0, -10), "heads.tif geotransform (north-up)")
srs = osr.SpatialReference(wkt=ds.GetProjection())
check(srs.GetAuthorityCode(None) == "32633", "heads.tif CRS is EPSG:32633")
band = ds.GetRasterBand(1)
check(band.DataType == gdal.GDT_Float64, "heads.tif is Float64")
h = band.ReadAsArray()
check(abs(h[:, 0].mean() - 100.0) < 1e-9 and abs(h[:, -1].mean() - 99.0) < 1e-9, "fixed heads in the raster")
# OB-2 sits exactly on the centre of column 25, row 7 (0-based): simulated = cell head.
check(abs(obs["OB-2"]["simulated"] - h[7, 25]) < 1e-9, "observation at a cell centre equals the raster head")

# Reference solve of the exported system (SciPy).
import numpy as np, scipy.io, scipy.sparse.linalg as sla
A = scipy.io.mmread(work + "/system.mtx").tocsc()
rhs = np.asarray(scipy.io.mmread(work + "/system.rhs.mtx")).ravel()
# cells.txt: unknown number, column, row (all 1-based, rows from the north)
cr = np.loadtxt(work + "/system.cells.txt", dtype=int, comments="#", ndmin=2)
cells = (cr[:, 2] - 1) * 40 + (cr[:, 1] - 1)
import scipy.sparse as sp
if sp.triu(A, 1).nnz == 0:   # only the lower triangle was expanded: mirror it
    A = A + sp.tril(A, -1).T
x = sla.spsolve(A.tocsc(), rhs)
hv = h.ravel()[cells]
err = np.max(np.abs(x - hv))
check(err < 1e-8, "SciPy spsolve of the exported system matches heads.tif (max diff %.2g m)" % err)
sys.exit(1 if bad else 0)
PYEOF

# --- quiet and default output folder -------------------------------------
cp "$work/good.yaml" "$work/strip.yaml"
expect_status 0 "run --quiet with the default output folder" -- "$GW" run "$work/strip.yaml" --quiet
[ ! -s "$work/out.txt" ] && pass "--quiet prints nothing" || fail "--quiet printed output"
[ -s "$work/strip-results/report.json" ] && pass "default output folder MODEL-results" || fail "no strip-results/report.json"

# --- rejected models leave nothing ---------------------------------------
# (a) a model-file error; (b) an active area with no head-controlling boundary.
sed 's/conductivity: 10.0/conductivity: -10.0/' "$work/good.yaml" >"$work/rej1.yaml"
cat >"$work/rej2.yaml" <<'YAML'
title: nothing holds the heads
units: {length: m, time: day}
grid: {origin: [0, 0], cell_size: 10.0, columns: 10, rows: 10}
aquifer: {type: confined, conductivity: 5.0, thickness: 10.0}
recharge: {rate: 0.001}
YAML
for m in rej1 rej2; do
    expect_status 1 "$m rejected" -- "$GW" run "$work/$m.yaml" --out "$work/$m-out"
    [ ! -e "$work/$m-out" ] && pass "$m: no output folder created" || fail "$m: output folder exists"
    [ "$(wc -l <"$work/err.txt")" -ge 1 ] && [ ! -s "$work/out.txt" ] && pass "$m: message on stderr only" \
        || fail "$m: message placement"
    mkdir -p "$work/$m-pre"
    expect_status 1 "$m rejected into an existing folder" -- "$GW" run "$work/$m.yaml" --out "$work/$m-pre"
    [ -z "$(ls -A "$work/$m-pre")" ] && pass "$m: existing folder left empty" || fail "$m: files left in $m-pre"
done
grep -q "rej2" "$work/err.txt" || grep -qi "boundary\|fixed" "$work/err.txt" && pass "unbounded model explained" \
    || { fail "unbounded model message"; cat "$work/err.txt"; }

echo
if [ "$fails" -ne 0 ]; then echo "$fails check(s) failed"; exit 1; fi
echo "all CLI checks passed"
