#!/usr/bin/env python3
"""End-to-end check of a well in a leaky aquifer against de Glee (1930) /
Hantush and Jacob (1955), steady state:

    s(r) = Q / (2 pi T) K0(r / lambda),   lambda = sqrt(T c),

with K0 from SciPy (scipy.special.k0, reference library).  The model is a
YAML file run through the built `gwdivide` command, so the model-file path
of `leakage:` (conductance = cell area / resistance, head beyond the
aquitard) is covered too; tests/test_solver_verify_leaky.c checks the same
law on the solver alone with GSL.

Environment: GW_COMMAND (the built command).  Exit 0 on success.
"""
import json
import math
import os
import subprocess
import sys
import tempfile

import gwcheck_util

# SciPy/GDAL are Debian packages: use the system interpreter when the one on
# PATH (e.g. a private one) lacks them.
gwcheck_util.need_system_python("numpy", "scipy", "osgeo.gdal")

import numpy as np  # noqa: E402
from osgeo import gdal  # noqa: E402
from scipy.special import k0  # noqa: E402

N, D = 201, 20.0
K, B, C, Q, H0 = 5.0, 20.0, 1000.0, 400.0, 30.0
XW = YW = (N // 2 + 0.5) * D       # centre of the middle cell

MODEL = """title: Well in a leaky aquifer (de Glee)
units: {length: m, time: day}
grid: {origin: [0.0, 0.0], cell_size: %(d)g, columns: %(n)d, rows: %(n)d}
aquifer: {type: confined, conductivity: %(k)g, thickness: %(b)g}
recharge: {rate: 0.0}
leakage:
  - {name: Aquitard, head: %(h0)g, resistance: %(c)g}
wells:
  - {name: Supply well, at: [%(xw)g, %(yw)g], pumping: %(q)g}
analysis: {divides: false}
output: {maps: false}
""" % {"d": D, "n": N, "k": K, "b": B, "h0": H0, "c": C, "xw": XW, "yw": YW, "q": Q}


def main():
    cmd = gwcheck_util.built_command()
    if cmd is None:
        return 1
    T = K * B
    lam = math.sqrt(T * C)
    with tempfile.TemporaryDirectory(prefix="gw-leaky-") as tmp:
        mpath = os.path.join(tmp, "model.yaml")
        with open(mpath, "w") as f:
            f.write(MODEL)
        out = os.path.join(tmp, "out")
        run = subprocess.run([cmd, "run", mpath, "--out", out, "--quiet"], capture_output=True, text=True)
        if run.returncode != 0:
            print("gwdivide failed (%d):\n%s%s" % (run.returncode, run.stdout, run.stderr))
            return 1
        with open(os.path.join(out, "report.json")) as f:
            report = json.load(f)
        ds = gdal.Open(os.path.join(out, "heads.tif"))   # keep ds alive while reading the band
        heads = ds.GetRasterBand(1).ReadAsArray().astype(float)
        ds = None

    # Rows count from the north edge: row r has centre y = (N - r - 0.5) D.
    cols = (np.arange(N) + 0.5) * D
    rows_y = (N - np.arange(N) - 0.5) * D
    X, Y = np.meshgrid(cols, rows_y)
    r = np.hypot(X - XW, Y - YW)
    sel = (r >= 3 * D) & (r <= 3 * lam)
    s_an = Q / (2 * math.pi * T) * k0(r[sel] / lam)
    s_num = H0 - heads[sel]
    maxrel = float(np.max(np.abs(s_num - s_an) / s_an))
    print("lambda %.1f m; %d cells with 3 dx <= r <= 3 lambda; max relative drawdown error %.3e"
          % (lam, int(sel.sum()), maxrel))
    feats = {f["name"]: f for f in report["features"]}
    leak = feats.get("Aquitard", {}).get("net", float("nan"))
    print("aquitard net inflow %.8g (pumping %.8g); balance discrepancy %.3e %%"
          % (leak, Q, report["balance"]["discrepancy_percent"]))
    failures = []
    if not maxrel < 0.01:
        failures.append("drawdown differs from de Glee by %.3e (relative)" % maxrel)
    if not abs(leak - Q) <= 1e-6 * Q:
        failures.append("leakage through the aquitard %.8g != pumping %.8g" % (leak, Q))
    if not abs(report["balance"]["discrepancy_percent"]) < 1e-6:
        failures.append("water balance does not close")
    if failures:
        print("FAILED: " + "; ".join(failures))
        return 1
    print("check_scipy_leaky: passed")
    return 0


if __name__ == "__main__":
    sys.exit(main())
