#!/usr/bin/python3
"""Time `gwdivide sweep` against the same number of separate runs.

    sweep_vs_runs.py GWDIVIDE [CELLS] [N] [FULL]   (defaults: 250000 cells, 50 values, 3)

Builds the synthetic model of make_model.py (about CELLS active cells, maps
off) with one transect added, then times
  1. `gwdivide sweep MODEL --vary recharge.rate=0.0002:0.0006:N` (one solver:
     one symbolic analysis, one numeric factorization, N solves);
  2. N separate processes doing the same per-run work with nothing reused:
     `gwdivide sweep MODEL --vary recharge.rate=V` for each of the N rates
     (read, build, analyse, factorize, solve, budgets, catchments, divides,
     transect crossings, outputs);
  3. FULL separate `gwdivide run`s (these also track capture zones and write
     every output), scaled to N;
and prints wall-clock and CPU seconds and the ratios.
"""
import os
import re
import resource
import subprocess
import sys
import tempfile
import time

HERE = os.path.dirname(os.path.abspath(__file__))


def cpu_children():
    r = resource.getrusage(resource.RUSAGE_CHILDREN)
    return r.ru_utime + r.ru_stime


def timed(cmd):
    c0, t0 = cpu_children(), time.monotonic()
    p = subprocess.run(cmd, capture_output=True, text=True)
    if p.returncode != 0:
        sys.exit("failed: %s\n%s" % (" ".join(cmd), p.stderr))
    return time.monotonic() - t0, cpu_children() - c0, p.stdout


def main(argv):
    if len(argv) < 2:
        sys.stderr.write(__doc__)
        return 2
    gw = argv[1]
    cells = int(float(argv[2])) if len(argv) > 2 else 250000
    n = int(argv[3]) if len(argv) > 3 else 50
    full = int(argv[4]) if len(argv) > 4 else 3
    with tempfile.TemporaryDirectory() as work:
        model = os.path.join(work, "model.yaml")
        subprocess.run([sys.executable, os.path.join(HERE, "make_model.py"), str(cells), model], check=True)
        text = open(model).read()
        side = float(re.search(r"columns: (\d+)", text).group(1)) * 10.0
        text = text.replace("analysis:\n", "analysis:\n  transects:\n    - {name: T1, line: [[5, %.1f], [%.1f, %.1f]]}\n"
                            % (side * 0.4, side - 5, side * 0.4), 1)
        open(model, "w").write(text)
        rates = [0.0002 + (0.0006 - 0.0002) * i / (n - 1) for i in range(n)] if n > 1 else [0.0002]

        ws, cs, out = timed([gw, "sweep", model, "--vary", "recharge.rate=0.0002:0.0006:%d" % n,
                             "--out", os.path.join(work, "sweep")])
        print(out)
        wr = cr = 0.0
        for i, r in enumerate(rates):
            w, c, _ = timed([gw, "sweep", model, "--quiet", "--vary", "recharge.rate=%.12g" % r,
                             "--out", os.path.join(work, "one%d" % i)])
            wr += w
            cr += c
        wf = cf = 0.0
        for i in range(full):
            m = os.path.join(work, "run.yaml")
            r = rates[i * (n - 1) // max(1, full - 1)]
            open(m, "w").write(re.sub(r"\n  rate: [0-9.e+-]+\n", "\n  rate: %.12g\n" % r, text, count=1))
            w, c, _ = timed([gw, "run", m, "--quiet", "--out", os.path.join(work, "run%d" % i)])
            wf += w
            cf += c
        print("cells=%d values=%d" % (cells, n))
        print("sweep of %d values            wall %8.2f s   cpu %8.2f s" % (n, ws, cs))
        print("%d separate 1-value sweeps    wall %8.2f s   cpu %8.2f s   ratio wall %.3f  cpu %.3f"
              % (n, wr, cr, ws / wr, cs / cr))
        if full > 0:
            wf *= n / full
            cf *= n / full
            print("%d full runs (from %d timed)  wall %8.2f s   cpu %8.2f s   ratio wall %.3f  cpu %.3f"
                  % (n, full, wf, cf, ws / wf, cs / cf))
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv))
