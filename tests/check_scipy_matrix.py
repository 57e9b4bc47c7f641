#!/usr/bin/env python3
"""Cross-check of the linear solve against a reference library (SciPy).

A heterogeneous 2-D confined model (conductivity zones drawn at random with
a fixed seed, a fixed-head creek, a stream with a leaky bed, a pumping well,
two recharge rates) is solved by the built `gwdivide` command with
`--export-matrix`.  The exported system A h = b (Matrix Market) is solved
again with scipy.sparse.linalg.spsolve (SuperLU, a different direct method)
and the heads must agree with the command's heads.tif to 1e-8 m.  The script
also checks the matrix properties the theory promises: symmetric, positive
diagonal, non-positive off-diagonals, weakly diagonally dominant (an
M-matrix, hence SPD once any head-controlling boundary is present).

Environment: GW_COMMAND (the built command); GW_SPLIT=1 (ctest's
check_scipy_matrix_split) makes the command factorize the grid as two halves
side by side, and the heads must then agree with SciPy just the same.  Exit
0 on success.
"""
import json
import os
import subprocess
import sys
import tempfile

import gwcheck_util

# SciPy/GDAL are Debian packages: use the system interpreter when the one on
# PATH (e.g. a private one) lacks them.
gwcheck_util.need_system_python("numpy", "scipy", "osgeo.gdal")

import numpy as np  # noqa: E402
import scipy.io  # noqa: E402
import scipy.sparse  # noqa: E402
import scipy.sparse.linalg  # noqa: E402
from osgeo import gdal  # noqa: E402

NX, NY, D = 60, 40, 25.0          # columns, rows, cell size (m)
W, H = NX * D, NY * D


def model_text(seed=7):
    rng = np.random.default_rng(seed)
    zones = []
    for i in range(6):
        x0 = rng.uniform(0, W * 0.8)
        y0 = rng.uniform(0, H * 0.8)
        w = rng.uniform(150, 600)
        h = rng.uniform(150, 500)
        k = float(np.exp(rng.normal(np.log(10.0), 1.0)))
        zones.append(
            "      - {name: zone%d, polygon: [[%.3f, %.3f], [%.3f, %.3f], [%.3f, %.3f], [%.3f, %.3f]], value: %.6f}"
            % (i, x0, y0, x0 + w, y0, x0 + w, y0 + h, x0, y0 + h, k))
    return """title: Random conductivity zones (SciPy cross-check)
units: {length: m, time: day}
grid:
  origin: [0.0, 0.0]
  cell_size: %(d)g
  columns: %(nx)d
  rows: %(ny)d
aquifer:
  type: confined
  conductivity:
    value: 8.0
    zones:
%(zones)s
  thickness: 25.0
  porosity: 0.2
recharge:
  rate: 0.0004
  zones:
    - {name: orchard, polygon: [[300, 300], [800, 300], [800, 700], [300, 700]], rate: 0.0011}
fixed_heads:
  - name: West Creek
    line: [[12.5, 5], [12.5, 995]]
    head: 100.0
streams:
  - name: East Brook
    line: [[1400, 20], [1350, 400], [1420, 700], [1380, 980]]
    stage: [101.0, 100.6, 100.3, 100.0]
    bed_bottom: 60.0
    bed_conductance: 2.0
wells:
  - {name: Supply well, at: [810.0, 515.0], pumping: 350.0}
analysis:
  divides: false
output:
  maps: false
""" % {"d": D, "nx": NX, "ny": NY, "zones": "\n".join(zones)}


def main():
    cmd = gwcheck_util.built_command()
    if cmd is None:
        return 1
    with tempfile.TemporaryDirectory(prefix="gw-scipy-") as tmp:
        mpath = os.path.join(tmp, "model.yaml")
        with open(mpath, "w") as f:
            f.write(model_text())
        out = os.path.join(tmp, "out")
        prefix = os.path.join(tmp, "system")
        run = subprocess.run([cmd, "run", mpath, "--out", out, "--export-matrix", prefix, "--quiet"],
                             capture_output=True, text=True)
        if run.returncode != 0:
            print("gwdivide failed (%d):\n%s%s" % (run.returncode, run.stdout, run.stderr))
            return 1
        with open(os.path.join(out, "report.json")) as f:
            report = json.load(f)
        A = scipy.sparse.csc_matrix(scipy.io.mmread(prefix + ".mtx"))
        b = np.asarray(scipy.io.mmread(prefix + ".rhs.mtx"), dtype=float).ravel()
        # cells.txt: "unknown column row", 1-based, rows from the north edge.
        ucr = np.loadtxt(prefix + ".cells.txt", dtype=np.int64, comments="#", ndmin=2)
        if not np.array_equal(ucr[:, 0], np.arange(1, ucr.shape[0] + 1)):
            print("cells.txt does not list the unknowns in order")
            return 1
        cells = (ucr[:, 2] - 1) * NX + (ucr[:, 1] - 1)
        ds = gdal.Open(os.path.join(out, "heads.tif"))
        heads = ds.GetRasterBand(1).ReadAsArray().astype(float).ravel()
        ds = None

        n = A.shape[0]
        failures = []
        if A.shape != (n, n) or b.size != n or cells.size != n:
            failures.append("sizes: A %s, b %d, cells %d" % (A.shape, b.size, cells.size))
            print("\n".join(failures))
            return 1

        # Matrix properties (theory.md): symmetric M-matrix.
        asym = abs(A - A.T).max()
        diag = A.diagonal()
        off = A - scipy.sparse.diags(diag)
        offmax = off.max() if off.nnz else 0.0
        rowsum_off = np.asarray(abs(off).sum(axis=1)).ravel()
        dominance = np.min(diag - rowsum_off) / np.max(diag)
        print("unknowns %d, nonzeros %d; asymmetry %.3e; min diag %.4g; max offdiag %.3g; "
              "min (diag - sum|off|)/max diag %.3e" % (n, A.nnz, asym, diag.min(), offmax, dominance))
        if asym > 0:
            failures.append("matrix not symmetric")
        if diag.min() <= 0 or offmax > 0:
            failures.append("sign pattern is not that of a conductance matrix")
        if dominance < -1e-12:
            failures.append("matrix not diagonally dominant")

        # Reference solve (SciPy, SuperLU).
        x = scipy.sparse.linalg.spsolve(A, b)
        resid = np.max(np.abs(A @ x - b)) / np.max(np.abs(b))
        diff = np.max(np.abs(x - heads[cells]))
        print("SciPy spsolve vs gwdivide heads: max |dh| = %.3e m (relative residual of SciPy "
              "solution %.3e); converged %s after %s iterations"
              % (diff, resid, report["solver"]["converged"], report["solver"]["iterations"]))
        print("balance: in %.8g out %.8g discrepancy %.3e %%"
              % (report["balance"]["inflow"], report["balance"]["outflow"],
                 report["balance"]["discrepancy_percent"]))
        print("method: %s" % report["solver"]["method"])
        if not report["solver"]["converged"]:
            failures.append("solver did not converge")
        # GW_SPLIT=1: the heads must come from the two-halves factorization.
        if os.environ.get("GW_SPLIT") == "1" and "two halves" not in report["solver"]["method"]:
            failures.append("GW_SPLIT=1 but the solver did not split the grid")
        if not diff <= 1e-8:
            failures.append("heads differ from SciPy by %.3e m" % diff)
        if not abs(report["balance"]["discrepancy_percent"]) < 1e-6:
            failures.append("water balance does not close")
        if failures:
            print("FAILED: " + "; ".join(failures))
            return 1
    print("check_scipy_matrix: passed")
    return 0


if __name__ == "__main__":
    sys.exit(main())
