#!/usr/bin/python3
"""gwdivide benchmark: one command, one table.

    /usr/bin/python3 tools/bench/bench.py [--build DIR] [--work DIR]
        [--sizes 0.25,1,4] [--scipy-max 1.5] [--repeat 3] [--sweep-cells 1]
        [--markdown FILE] [--svg FILE]

For every size (millions of active cells) it writes a synthetic model
(make_model.py), runs `gwdivide run` once with --export-matrix (not timed)
and once timed (maps off, every other output on), then solves the exported
system with CHOLMOD alone (cholmod_raw, default settings) and with the
reference library, scipy.sparse.linalg.spsolve (Debian python3-scipy), each
in its own process so each peak memory is its own.  At the sizes scipy
solves, gwdivide and scipy each run --repeat times and the medians are
compared (every time is printed); likewise the sweep member's ratio.  It also times a sweep
member (sweep_bench: second run changing only recharge, stages, pumping) and
counts the factorizations of unconfined models.  Prints the machine, the BLAS
actually loaded, per-stage wall times, peak memory, ratios, and the targets
of docs/performance.md with PASS/FAIL.  Timings are wall clock on a shared
machine: compare ratios within one run, not across runs.
"""
import argparse
import json
import os
import platform
import re
import subprocess
import sys
import time

HERE = os.path.dirname(os.path.abspath(__file__))
ROOT = os.path.dirname(os.path.dirname(HERE))
PY = "/usr/bin/python3"   # Debian's: has numpy and scipy

# Stages as report.json's solver.seconds names them.  "build" is rasterizing
# the model onto the grid; "divides" is flow field, divides and catchments;
# "tracking" is capture and travel-time zones; "analysis" is every analysis
# (divides and tracking included); "outputs" every file but report.json.
STAGES = ["read", "build", "assemble", "analyse", "factorize", "solve", "budget",
          "divides", "tracking", "analysis", "outputs"]

SCIPY_SOLVE = r"""
import sys, time, resource
import numpy as np, scipy.io, scipy.sparse.linalg as sla
prefix = sys.argv[1]
A = scipy.io.mmread(prefix + ".mtx")   # symmetric file: both triangles come back
A = A.tocsc()
b = np.asarray(scipy.io.mmread(prefix + ".rhs.mtx")).ravel()
t = time.perf_counter()
x = sla.spsolve(A, b)
dt = time.perf_counter() - t
r = np.linalg.norm(A @ x - b) / np.linalg.norm(b)
print("solve=%.4f residual=%.3g peak_mb=%.1f" % (dt, r, resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0))
"""


def kv(line):
    return dict(m.groups() for m in re.finditer(r"(\w+)=(\S+)", line))


def num(v):
    try:
        return float(v)
    except (TypeError, ValueError):
        return v


def timed(cmd, env=None):
    """Run cmd under /usr/bin/time -v; return (stdout, wall s, peak MB)."""
    t = time.perf_counter()
    p = subprocess.run(["/usr/bin/time", "-v"] + cmd, capture_output=True, text=True, env=env)
    wall = time.perf_counter() - t
    if p.returncode != 0:
        sys.stderr.write(p.stdout + p.stderr)
        raise SystemExit("bench: command failed: " + " ".join(cmd))
    m = re.search(r"Maximum resident set size \(kbytes\): (\d+)", p.stderr)
    return p.stdout, wall, (int(m.group(1)) / 1024.0 if m else float("nan"))


def median_of(n, run_once, key):
    """Run run_once() n times (at least once); return the run whose key is
    the median, and every run sorted by key."""
    runs = sorted((run_once() for _ in range(max(1, n))), key=key)
    return runs[len(runs) // 2], runs


def machine():
    cpu = "unknown"
    try:
        for line in open("/proc/cpuinfo"):
            if line.startswith("model name"):
                cpu = line.split(":", 1)[1].strip()
                break
    except OSError:
        pass
    mem = 0
    try:
        for line in open("/proc/meminfo"):
            if line.startswith("MemTotal"):
                mem = int(line.split()[1]) / 1024.0 / 1024.0
    except OSError:
        pass
    alt = subprocess.run(["update-alternatives", "--query", "libblas.so.3-x86_64-linux-gnu"],
                         capture_output=True, text=True).stdout
    m = re.search(r"^Value: (.*)$", alt, re.M)
    return {"cpu": cpu, "cores": os.cpu_count(), "memory_gb": round(mem, 1),
            "kernel": platform.release(), "blas_alternative": m.group(1) if m else "unknown",
            "load_average": os.getloadavg()[0]}


def run_size(args, cells):
    tag = ("%g" % (cells / 1e6)).replace(".", "_")
    model = os.path.join(args.work, "bench_%sM.yaml" % tag)
    prefix = os.path.join(args.work, "bench_%sM" % tag)
    out = os.path.join(args.work, "bench_%sM-results" % tag)
    light = os.path.join(args.work, "bench_%sM_solve_only.yaml" % tag)
    subprocess.run([PY, os.path.join(HERE, "make_model.py"), str(int(cells)), model], check=True)
    subprocess.run([PY, os.path.join(HERE, "make_model.py"), str(int(cells)), light, "--solve-only"],
                   check=True)
    gw = os.path.join(args.build, "gwdivide")
    # 1. export the system (same system, divides off); not timed
    subprocess.run([gw, "run", light, "--out", out + "-export", "--export-matrix", prefix, "--quiet"],
                   check=True)
    # 2. the timed end-to-end runs (the median one is reported, with its stages)
    reps = args.repeat if cells <= args.scipy_max * 1e6 else 1

    def gw_run():
        _, wall, peak = timed([gw, "run", model, "--out", out, "--quiet"])
        return wall, peak, json.load(open(os.path.join(out, "report.json")))

    (wall, peak, rep), runs = median_of(reps, gw_run, key=lambda t: t[0])
    sv = rep["solver"]
    sec = {k: float(v) for k, v in sv.get("seconds", {}).items()}
    row = {"cells": rep["grid"]["active_cells"], "wall": wall, "peak_mb": max(t[1] for t in runs),
           "seconds": sec, "factorizations": sv.get("factorizations"), "method": sv.get("method"),
           "walls": [t[0] for t in runs]}
    # 3. CHOLMOD alone, default settings
    o, _, _ = timed([os.path.join(args.build, "tools", "bench", "cholmod_raw"), prefix])
    row["cholmod"] = {k: num(v) for k, v in kv(o).items()}
    # 4. the reference library
    if cells <= args.scipy_max * 1e6:
        def scipy_run():
            o, _, sp_peak = timed([PY, "-c", SCIPY_SOLVE, prefix])
            d = {k: num(v) for k, v in kv(o).items()}
            d["process_peak_mb"] = sp_peak
            return d

        med, sps = median_of(reps, scipy_run, key=lambda d: d["solve"])
        row["scipy"] = dict(med)
        row["scipy"]["solves"] = [d["solve"] for d in sps]
    if not args.keep:
        for suffix in (".mtx", ".rhs.mtx", ".cells.txt"):
            try:
                os.remove(prefix + suffix)
            except OSError:
                pass
    return row


def fmt(v, w=7):
    if v is None or v != v:
        return "-".rjust(w)
    return ("%.2f" % v).rjust(w) if v < 100 else ("%.0f" % v).rjust(w)


def table(rows):
    used = [s for s in STAGES if any(s in r["seconds"] for r in rows)]
    head = "%-9s" % "cells" + "".join(s[:9].rjust(10) for s in used) + \
        "      total   peak MB | cholmod  scipy | e2e/scipy  -track/scipy chol/scipy"
    lines = [head]
    for r in rows:
        chol = r["cholmod"]
        c_t = chol.get("analyse", 0) + chol.get("factorize", 0) + chol.get("solve", 0)
        sp = r.get("scipy", {}).get("solve")
        line = "%-9d" % r["cells"] + "".join(fmt(r["seconds"].get(s), 10) for s in used)
        line += fmt(r["wall"], 11) + fmt(r["peak_mb"], 10) + " |" + fmt(c_t, 8) + fmt(sp, 7)
        notrack = r["wall"] - r["seconds"].get("tracking", 0.0)
        line += " |" + fmt(r["wall"] / sp if sp else None, 9) + fmt(notrack / sp if sp else None, 14)
        line += fmt(c_t / sp if sp else None, 11)
        lines.append(line)
    return "\n".join(lines), used


def markdown(rows, used, mach, sweep, unconf, targets):
    out = ["| active cells | " + " | ".join(used) + " | end to end s | peak MB | CHOLMOD alone s "
           "| scipy spsolve s | end to end / scipy |",
           "|" + "---|" * (len(used) + 6)]
    for r in rows:
        chol = r["cholmod"]
        c_t = chol.get("analyse", 0) + chol.get("factorize", 0) + chol.get("solve", 0)
        sp = r.get("scipy", {}).get("solve")
        cells = [("%.2f" % r["seconds"][s]) if s in r["seconds"] else "-" for s in used]
        out.append("| %d | %s | %.1f | %.0f | %.1f | %s | %s |" % (
            r["cells"], " | ".join(cells), r["wall"], r["peak_mb"], c_t,
            "%.1f" % sp if sp else "not run", "%.3f" % (r["wall"] / sp) if sp else "-"))
    out.append("")
    out.append("Machine: %s, %d cores, %.0f GB; BLAS loaded: %s; load average at start %.1f." % (
        mach["cpu"], mach["cores"], mach["memory_gb"], mach.get("blas_loaded", "?"),
        mach["load_average"]))
    if sweep:
        out.append("Sweep member (%d cells): first run %.2f s, second %.3f s, ratio %.3f, "
                   "%d factorization(s) in the second run." % (
                       sweep["cells"], sweep["first"], sweep["second"], sweep["ratio"],
                       sweep["second_factorizations"]))
    for u in unconf:
        out.append("Unconfined %s: %d factorizations, %d iterations." % (
            u["name"], u["factorizations"], u["iterations"]))
    out.append("")
    out += ["- %s: %s" % (t, "PASS" if ok else "FAIL") for t, ok in targets]
    return "\n".join(out) + "\n"


def svg_chart(rows, used, path):
    """Stacked horizontal bars: where the time of each run went, beside the
    reference library's solve of the same matrix.  Plain SVG, no library."""
    colours = ["#4e79a7", "#f28e2b", "#e15759", "#76b7b2", "#59a14f", "#edc948",
               "#b07aa1", "#ff9da7", "#9c755f", "#bab0ac", "#86bcb6", "#d37295"]
    stacked = [s for s in used if s != "analysis"]   # analysis holds divides and tracking
    bars = []
    for r in rows:
        bars.append(("gwdivide %.2fM" % (r["cells"] / 1e6),
                     [(s, r["seconds"].get(s, 0.0)) for s in stacked] +
                     [("other", max(0.0, r["wall"] - sum(r["seconds"].get(s, 0.0) for s in stacked)))]))
        if r.get("scipy"):
            bars.append(("scipy %.2fM" % (r["cells"] / 1e6), [("scipy spsolve", r["scipy"]["solve"])]))
    tmax = max(sum(v for _, v in b) for _, b in bars) or 1.0
    W, left, bh, gap = 860, 130, 22, 10
    H = 40 + len(bars) * (bh + gap) + 60
    scale = (W - left - 70) / tmax
    names = stacked + ["other", "scipy spsolve"]
    col = {n: colours[i % len(colours)] for i, n in enumerate(names)}
    col["scipy spsolve"] = "#555555"
    s = ['<svg xmlns="http://www.w3.org/2000/svg" width="%d" height="%d" font-family="sans-serif" '
         'font-size="12">' % (W, H),
         '<text x="10" y="20" font-size="14">Wall time per stage (s), same matrices</text>']
    y = 35
    for label, parts in bars:
        s.append('<text x="10" y="%d">%s</text>' % (y + 15, label))
        x = left
        for name, v in parts:
            w = v * scale
            if w > 0.2:
                s.append('<rect x="%.1f" y="%d" width="%.1f" height="%d" fill="%s"><title>%s %.2f s'
                         '</title></rect>' % (x, y, w, bh, col[name], name, v))
            x += w
        s.append('<text x="%.1f" y="%d">%.1f s</text>' % (x + 4, y + 15, sum(v for _, v in parts)))
        y += bh + gap
    x = 10
    for n in names:
        s.append('<rect x="%d" y="%d" width="10" height="10" fill="%s"/><text x="%d" y="%d">%s</text>'
                 % (x, y + 10, col[n], x + 14, y + 19, n))
        x += 14 + 7 * len(n) + 12
        if x > W - 100:
            x, y = 10, y + 18
    s.append("</svg>")
    with open(path, "w") as fh:
        fh.write("\n".join(s) + "\n")


def main():
    ap = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    ap.add_argument("--build", default=os.environ.get("GW_BUILD_DIR", os.path.join(ROOT, "build")))
    ap.add_argument("--work", default="/tmp/gwdivide-bench")
    ap.add_argument("--sizes", default="0.25,1,4", help="millions of active cells")
    ap.add_argument("--scipy-max", type=float, default=1.5,
                    help="largest size (millions) given to scipy (4M takes about half an hour)")
    ap.add_argument("--sweep-cells", type=float, default=1.0, help="millions of cells of the sweep bench")
    ap.add_argument("--markdown", help="also write the table as Markdown to this file")
    ap.add_argument("--svg", help="also draw the chart to this SVG file")
    ap.add_argument("--json", help="also write every figure to this JSON file")
    ap.add_argument("--keep", action="store_true", help="keep the exported matrices")
    ap.add_argument("--repeat", type=int, default=3,
                    help="timed runs of gwdivide and of scipy at the sizes scipy solves; the "
                         "median of each is compared (a shared machine's timings vary by 20 %%+)")
    args = ap.parse_args()
    for exe in ("gwdivide", "tools/bench/cholmod_raw", "tools/bench/sweep_bench"):
        if not os.access(os.path.join(args.build, exe), os.X_OK):
            raise SystemExit("bench: %s not built in %s (cmake --build %s)" % (exe, args.build, args.build))
    os.makedirs(args.work, exist_ok=True)

    mach = machine()
    rows = []
    for size in [float(s) for s in args.sizes.split(",") if s]:
        print("bench: %.2f million cells ..." % size, flush=True)
        rows.append(run_size(args, size * 1e6))
        mach["blas_loaded"] = rows[-1]["cholmod"].get("blas", "unknown")

    print("bench: sweep member and unconfined runs ...", flush=True)
    def sweep_run():
        o, _, _ = timed([os.path.join(args.build, "tools", "bench", "sweep_bench"), str(int(args.sweep_cells * 1e6))])
        return {k: num(v) for k, v in kv(o).items()}

    med, sweeps = median_of(args.repeat, sweep_run, key=lambda d: d["ratio"])
    sweep = dict(med)   # the median pair of runs
    sweep["ratios"] = [d["ratio"] for d in sweeps]
    o, _, _ = timed([os.path.join(args.build, "tools", "bench", "sweep_bench"), "250000", "unconfined"])
    u = {k: num(v) for k, v in kv(o).items()}
    unconf = [{"name": "synthetic %d cells" % u["cells"], "factorizations": int(u["first_factorizations"]),
               "iterations": int(u["first_iterations"])}]
    demo = os.path.join(ROOT, "demo", "valley.yaml")
    if os.path.exists(demo):
        dout = os.path.join(args.work, "demo-results")
        subprocess.run([os.path.join(args.build, "gwdivide"), "run", demo, "--out", dout, "--quiet"], check=True)
        d = json.load(open(os.path.join(dout, "report.json")))["solver"]
        unconf.append({"name": "demo/valley.yaml", "factorizations": d.get("factorizations", -1),
                       "iterations": d.get("iterations", -1)})

    text, used = table(rows)
    print()
    print("Machine: %s, %d cores, %.1f GB RAM, kernel %s, load average at start %.1f" % (
        mach["cpu"], mach["cores"], mach["memory_gb"], mach["kernel"], mach["load_average"]))
    print("BLAS: alternative %s; loaded %s" % (mach["blas_alternative"], mach.get("blas_loaded")))
    for r in rows:
        c = r["cholmod"]
        print("%d cells: gwdivide %s, %s factorization(s); CHOLMOD default ordering %s, nnz(L) %.3g, "
              "analyse %.2f factorize %.2f solve %.2f s, peak %.0f MB%s" % (
                  r["cells"], r["method"], r["factorizations"], c.get("ordering"), c.get("nnz_L", 0),
                  c.get("analyse", 0), c.get("factorize", 0), c.get("solve", 0), c.get("peak_mb", 0),
                  "; scipy peak %.0f MB" % r["scipy"]["process_peak_mb"] if r.get("scipy") else ""))
    print()
    print("Wall seconds per stage (gwdivide report.json), end to end, peak memory:")
    print(text)
    for r in rows:
        if len(r.get("walls", [])) > 1:
            sp = r.get("scipy", {}).get("solves", [])
            print("%d cells: median of %d runs each; gwdivide end to end %s s; scipy solve %s s" % (
                r["cells"], len(r["walls"]), " ".join("%.2f" % w for w in r["walls"]),
                " ".join("%.2f" % w for w in sp)))
    print()
    print("Sweep member (%d cells): first run %.3f s, second run %.3f s, ratio %.3f, factorizations in "
          "the second run: %d (median of ratios %s)" % (
              sweep["cells"], sweep["first"], sweep["second"], sweep["ratio"],
              sweep["second_factorizations"], " ".join("%.3f" % r for r in sweep["ratios"])))
    for u in unconf:
        print("Unconfined %s: %d factorizations, %d iterations" % (u["name"], u["factorizations"], u["iterations"]))

    targets = []
    one = [r for r in rows if 0.9e6 <= r["cells"] <= 1.1e6]
    if one and one[0].get("scipy"):
        r = one[0]
        targets.append(("1M cells end to end <= 0.30 x scipy solve (%.3f)" % (r["wall"] / r["scipy"]["solve"]),
                        r["wall"] <= 0.30 * r["scipy"]["solve"]))
        notrack = r["wall"] - r["seconds"].get("tracking", 0.0)
        targets.append(("  (the same without capture-zone tracking: %.3f)" % (notrack / r["scipy"]["solve"]),
                        notrack <= 0.30 * r["scipy"]["solve"]))
        targets.append(("1M cells peak memory <= 1.5 GB (%.0f MB)" % r["peak_mb"], r["peak_mb"] <= 1536))
    four = [r for r in rows if r["cells"] >= 3.5e6]
    if four:
        targets.append(("4M cells completes within 24 GB (%.0f MB)" % four[0]["peak_mb"],
                        four[0]["peak_mb"] <= 24 * 1024))
    targets.append(("sweep member <= 0.10 x first run (%.3f)" % sweep["ratio"], sweep["ratio"] <= 0.10))
    for u in unconf:
        if u["name"].startswith("demo"):
            targets.append(("demo converges in <= 15 factorizations (%d)" % u["factorizations"],
                            0 < u["factorizations"] <= 15))
    print()
    for t, ok in targets:
        print("%-60s %s" % (t, "PASS" if ok else "FAIL"))

    if args.markdown:
        with open(args.markdown, "w") as fh:
            fh.write(markdown(rows, used, mach, sweep, unconf, targets))
    if args.svg:
        svg_chart(rows, used, args.svg)
    if args.json:
        with open(args.json, "w") as fh:
            json.dump({"machine": mach, "rows": rows, "sweep": sweep, "unconfined": unconf,
                       "targets": targets}, fh, indent=1)
    return 0 if all(ok for _, ok in targets) else 1


if __name__ == "__main__":
    sys.exit(main())
