#!/usr/bin/env python3
"""Bounded, deterministic fuzz test of the model reader and the command.

Seeded random mutations of the test and demo model files (delete, duplicate,
swap and re-indent lines; numbers turned into 0, -1, 1e308, nan or huge
strings; values of another type; truncation; binary bytes and tabs; deep
nesting; anchors and aliases; huge grids; files that are not what a key
expects; damaged copies of the demo's GIS layers) go through `gwdivide check` and `gwdivide run --out`.  Every run
must
  - end with exit status 0 or 1 (never a signal, never 2: the usage is
    always right, so a 2 would be a model problem reported as bad usage);
  - finish within a time limit (no hang), without sanitizer reports;
  - on exit 1 print one error block (one "gwdivide:" line, at most a
    bounded number of lines) that names the model file;
  - on a failed run leave the output folder absent or exactly as it was
    (nothing half-written), and on success leave report.json and no staging
    folder behind.

Environment: GW_COMMAND (the built gwdivide), GW_TEST_DATA (tests/data),
GW_SOURCE_DIR (for demo/).  For a longer campaign: GW_FUZZ_COUNT (mutants,
default 300), GW_FUZZ_SEED (default 20240611), GW_FUZZ_SECONDS (stop
starting new mutants after this many seconds, default 70),
GW_FUZZ_KEEP=DIR (copy every failing mutant there).
"""
import hashlib
import os
import random
import re
import shutil
import subprocess
import sys
import tempfile
import time
from concurrent.futures import ThreadPoolExecutor

GW = os.environ.get("GW_COMMAND")
if not GW:
    sys.exit("GW_COMMAND must name the built gwdivide")
HERE = os.path.dirname(os.path.abspath(__file__))
DATA = os.environ.get("GW_TEST_DATA", os.path.join(HERE, "data"))
SRC = os.environ.get("GW_SOURCE_DIR", os.path.dirname(HERE))
COUNT = int(os.environ.get("GW_FUZZ_COUNT", "300"))
SEED = int(os.environ.get("GW_FUZZ_SEED", "20240611"))
SECONDS = float(os.environ.get("GW_FUZZ_SECONDS", "70"))
KEEP = os.environ.get("GW_FUZZ_KEEP")
TIMEOUT = float(os.environ.get("GW_FUZZ_TIMEOUT", "60"))
MAX_ERR_LINES = 120      # one error block lists every problem, but not without end

SEEDS = []
for d in (os.path.join(DATA, "models"), os.path.join(SRC, "demo")):
    if os.path.isdir(d):
        for f in sorted(os.listdir(d)):
            if f.endswith(".yaml"):
                SEEDS.append(os.path.join(d, f))
if not SEEDS:
    sys.exit("no seed models found")

NUMBERS = ["0", "-1", "1", "1e308", "-1e308", "1e-320", "nan", ".nan", ".inf", "-.inf",
           "-0", "2147483648", "-2147483649", "4294967297", "9223372036854775808",
           "100000000", "1000000", "99999999999999999999999999999", "0x7fffffff", "1_000",
           "3.", ".5e", "1e", "0o777", "'" + "9" * 4000 + "'", "9" * 5000, "1" * 400 + ".5"]
VALUES = ["[]", "{}", "~", "null", "true", "no", '""', '"text"', "'quoted'", "[1, 2, 3]",
          "{a: 1}", "[[0, 0]]", "[[0, 0], [0, 0]]", "[[1e308, -1e308], [nan, 0]]", "!!binary aGk=",
          "!!str 12", "!!float x", "!custom 1", "*undefined_alias", "|\n  block text",
          ">-\n  folded", "? complex key\n: v", "[" * 200 + "]" * 200, "{" * 70 + "}" * 70,
          "{raster: /dev/null}", "{raster: .}", "{raster: missing.tif, band: 7}",
          "{file: /dev/null, layer: x}", "{file: ., layer: x}", "{file: nothing.gpkg}",
          "{value: 1, zones: [{name: z, polygon: [[0, 0]], value: 2}]}",
          "{polygon: [[0, 0], [1e308, 0], [1e308, 1e308]]}",
          "x" * 70000]
KEYS = ["title", "units", "grid", "aquifer", "recharge", "fixed_heads", "streams", "drains",
        "wells", "observations", "leakage", "analysis", "output", "solver", "name", "line",
        "polygon", "at", "head", "stage", "bed_bottom", "bed_conductance", "columns", "rows",
        "cell_size", "origin", "type", "conductivity", "thickness", "bottom", "maps"]
BINARY = [b"\x00", b"\xff\xfe", b"\xc3\x28", b"\xed\xa0\x80", b"\x1b[31m", b"\r", b"\t",
          b"\x7f", b"\xef\xbb\xbf", b"\xe2\x80\xae", bytes(range(0, 32))]
GRIDS = [("100000000", "1"), ("1000000", "1000000"), ("20000", "20000"), ("10000", "9999"),
         ("1000000", "101"), ("0", "10"), ("-5", "10"), ("2147483647", "2147483647"),
         ("1", "1"), ("2", "1"), ("1", "3")]
NUM_RE = re.compile(rb"(?<![\w.])-?\d+(?:\.\d*)?(?:[eE][-+]?\d+)?(?![\w.])")
VAL_RE = re.compile(rb"^(\s*-?\s*[A-Za-z_]+\s*:\s*)(\S.*)$")


def m_delete_line(r, lines):
    if lines:
        del lines[r.randrange(len(lines))]


def m_duplicate_line(r, lines):
    if lines:
        i = r.randrange(len(lines))
        lines.insert(r.randrange(len(lines) + 1), lines[i])


def m_swap_lines(r, lines):
    if len(lines) > 1:
        i, j = r.randrange(len(lines)), r.randrange(len(lines))
        lines[i], lines[j] = lines[j], lines[i]


def m_indent(r, lines):
    if lines:
        i = r.randrange(len(lines))
        if r.random() < 0.5:
            lines[i] = b" " * r.choice([1, 2, 3, 8]) + lines[i]
        else:
            lines[i] = lines[i].lstrip(b" ")


def m_tab(r, lines):
    if lines:
        i = r.randrange(len(lines))
        lines[i] = re.sub(rb"^ +", b"\t", lines[i]) if r.random() < 0.7 else lines[i] + b"\t"


def m_number(r, lines):
    spots = [(i, m) for i, l in enumerate(lines) for m in NUM_RE.finditer(l)]
    if spots:
        i, m = r.choice(spots)
        lines[i] = lines[i][:m.start()] + r.choice(NUMBERS).encode() + lines[i][m.end():]


def m_value(r, lines):
    spots = [i for i, l in enumerate(lines) if VAL_RE.match(l)]
    if spots:
        i = r.choice(spots)
        m = VAL_RE.match(lines[i])
        lines[i] = m.group(1) + r.choice(VALUES).encode()


def m_key(r, lines):
    spots = [i for i, l in enumerate(lines) if VAL_RE.match(l)]
    if spots:
        i = r.choice(spots)
        lines[i] = re.sub(rb"[A-Za-z_]+(?=\s*:)", r.choice(KEYS).encode()
                          if r.random() < 0.7 else b"k" * r.choice([1, 300]), lines[i], count=1)


def m_binary(r, lines):
    if lines:
        i = r.randrange(len(lines))
        p = r.randrange(len(lines[i]) + 1)
        lines[i] = lines[i][:p] + r.choice(BINARY) + lines[i][p:]


def m_truncate(r, lines):
    data = b"\n".join(lines)
    cut = r.randrange(len(data) + 1)
    lines[:] = data[:cut].split(b"\n")


def m_nesting(r, lines):
    depth = r.choice([65, 1000, 100000])
    kind = r.random()
    if kind < 0.4:
        text = b"[" * depth + b"]" * depth
    elif kind < 0.7:
        text = b"{a: " * depth + b"1" + b"}" * depth
    else:   # block nesting by indentation
        text = b"\n".join(b" " * k + b"a:" for k in range(min(depth, 3000))) + b" 1"
    if lines and r.random() < 0.6:
        spots = [i for i, l in enumerate(lines) if VAL_RE.match(l)] or [0]
        i = r.choice(spots)
        m = VAL_RE.match(lines[i])
        lines[i] = (m.group(1) if m else b"title: ") + text
    else:
        lines.insert(0, b"deep: " + text)


def m_grid(r, lines):
    c, rows = r.choice(GRIDS)
    for i, l in enumerate(lines):
        lines[i] = re.sub(rb"(columns:\s*)\d+", b"\\g<1>" + c.encode(), l)
        lines[i] = re.sub(rb"(rows:\s*)\d+", b"\\g<1>" + rows.encode(), lines[i])


def m_aliases(r, lines):
    bomb = [b"lol0: &l0 [x, x, x, x, x, x, x, x, x]"]
    for k in range(1, 9):
        bomb.append(b"lol%d: &l%d [*l%d, *l%d, *l%d, *l%d, *l%d, *l%d, *l%d, *l%d, *l%d]"
                    % ((k, k) + (k - 1,) * 9))
    if r.random() < 0.5:
        lines[0:0] = bomb
    else:   # an anchor reused where another key expects something else
        spots = [i for i, l in enumerate(lines) if VAL_RE.match(l)]
        if len(spots) > 1:
            a, b = r.sample(spots, 2)
            ma, mb = VAL_RE.match(lines[a]), VAL_RE.match(lines[b])
            lines[a] = ma.group(1) + b"&z " + ma.group(2)
            lines[b] = mb.group(1) + b"*z"


def m_documents(r, lines):
    choice = r.random()
    if choice < 0.3:
        lines[:] = [b"---"] + lines + [b"---", b"title: second"]
    elif choice < 0.6:
        lines[:] = [r.choice([b"", b"# only a comment", b"---", b"...", b"~", b"[]", b"42",
                              b"\x00", b"%YAML 9.9\n---\na: 1", b"%TAG ! tag:x,2000:\n---\n!a b"])]
    else:
        i = r.randrange(len(lines) + 1)
        lines.insert(i, r.choice(KEYS).encode() + b": " + r.choice(VALUES).encode())


def m_long(r, lines):
    i = r.randrange(len(lines) + 1)
    lines.insert(i, b"title: " + b"w" * r.choice([10000, 2000000]))


def m_geometry(r, lines):
    spots = [i for i, l in enumerate(lines) if re.search(rb"\[\[", l)]
    if spots:
        i = r.choice(spots)
        geo = r.choice([b"[[0, 0]]", b"[[1, 1], [1, 1], [1, 1]]", b"[]",
                        b"[[1e300, 1e300], [-1e300, -1e300]]", b"[[nan, 0], [0, nan]]",
                        b"[[0, 0], [1, 1], [0, 1], [1, 0]]",
                        b"[" + b", ".join(b"[%d, %d]" % (k % 97, k % 89) for k in range(20000)) + b"]"])
        lines[i] = re.sub(rb"\[\[.*\]\]", geo, lines[i], count=1)


MUTATORS = [m_delete_line, m_duplicate_line, m_swap_lines, m_indent, m_tab, m_number, m_number,
            m_number, m_value, m_value, m_value, m_key, m_binary, m_truncate, m_nesting, m_grid,
            m_aliases, m_documents, m_long, m_geometry, m_geometry]


def mutate(r, data):
    lines = data.split(b"\n")
    for _ in range(r.choice([1, 1, 1, 2, 3])):
        r.choice(MUTATORS)(r, lines)
    return b"\n".join(lines)


def corrupt_gis(r, src, dst):
    """A copy of the GIS layers with one file damaged: bytes overwritten,
    truncated, emptied or replaced by a folder."""
    shutil.copytree(src, dst)
    names = sorted(os.listdir(dst))
    if not names:
        return
    victim = os.path.join(dst, r.choice(names))
    data = bytearray(open(victim, "rb").read())
    how = r.random()
    if how < 0.5 and data:
        for _ in range(r.choice([1, 10, 200])):
            data[r.randrange(len(data))] = r.randrange(256)
    elif how < 0.8:
        data = data[:r.randrange(len(data) + 1)]
    elif how < 0.9:
        data = bytearray()
    else:
        os.remove(victim)
        os.mkdir(victim)
        return
    with open(victim, "wb") as f:
        f.write(data)


def snapshot(path):
    """What a folder holds: None when absent, else name -> content digest."""
    if not os.path.lexists(path):
        return None
    if not os.path.isdir(path):
        return ("file", open(path, "rb").read())
    out = {}
    for root, dirs, files in os.walk(path):
        for f in dirs + files:
            p = os.path.join(root, f)
            rel = os.path.relpath(p, path)
            out[rel] = hashlib.sha1(open(p, "rb").read()).hexdigest() if os.path.isfile(p) else "dir"
    return out


def invoke(args):
    env = dict(os.environ)
    env.setdefault("ASAN_OPTIONS", "detect_leaks=1")
    env.setdefault("LSAN_OPTIONS", "suppressions=" + os.path.join(HERE, "lsan.supp"))
    try:
        p = subprocess.run([GW] + args, capture_output=True, timeout=TIMEOUT, env=env)
        return p.returncode, p.stdout.decode("utf-8", "replace"), p.stderr.decode("utf-8", "replace")
    except subprocess.TimeoutExpired:
        return "timeout", "", ""


def judge(kind, model, rc, out, err):
    """Problems with one invocation (empty when it behaved)."""
    bad = []
    if rc == "timeout":
        return ["no answer within %g s (hang?)" % TIMEOUT]
    if rc not in (0, 1):
        bad.append("exit status %s" % rc)
    for word in ("Sanitizer", "runtime error:", "Segmentation", "Aborted", "free(): ",
                 "malloc(): ", "double free", "stack smashing"):
        if word in err:
            bad.append("%r on stderr" % word)
    if rc == 1:
        lines = err.rstrip("\n").split("\n")
        heads = [l for l in lines if l.startswith("gwdivide:")]
        if len(heads) != 1 or not lines[0].startswith("gwdivide:"):
            bad.append("expected one error block starting 'gwdivide:', got %d" % len(heads))
        if len(lines) > MAX_ERR_LINES:
            bad.append("error block of %d lines" % len(lines))
        if model not in err:
            bad.append("error does not name the model file")
        if "(no message)" in err:
            bad.append("error without a message")
    if rc == 0 and kind == "check" and " ok: " not in out:
        bad.append("check exit 0 without 'ok'")
    return bad


def one(i):
    r = random.Random(SEED * 1000003 + i)
    seed = r.choice(SEEDS)
    data = open(seed, "rb").read()
    work = tempfile.mkdtemp(prefix="gw-fuzz-")
    try:
        # Relative paths in a model (GIS layers) resolve beside it.
        gis = os.path.join(os.path.dirname(seed), "gis")
        if os.path.isdir(gis) and r.random() < 0.25:
            corrupt_gis(r, gis, os.path.join(work, "gis"))
        elif os.path.isdir(gis):
            os.symlink(gis, os.path.join(work, "gis"))
        model = os.path.join(work, "m%05d.yaml" % i)
        mutant = mutate(r, data)
        with open(model, "wb") as f:
            f.write(mutant)
        problems = []
        rc, out, err = invoke(["check", model])
        problems += ["check: " + b for b in judge("check", model, rc, out, err)]
        # Solving is slower than checking: run a third of the mutants, and
        # skip the big demo models (maps) unless the campaign is long.
        small = os.path.getsize(seed) < 2500 or COUNT > 1000
        if r.random() < 0.35 and small:
            outdir = os.path.join(work, "out")
            state = r.choice(["absent", "empty", "old"])
            if state != "absent":
                os.mkdir(outdir)
            if state == "old":
                for name, text in (("report.json", b"{\"old\": true}\n"), ("notes.txt", b"keep me\n")):
                    with open(os.path.join(outdir, name), "wb") as f:
                        f.write(text)
            before = snapshot(outdir)
            rc, out, err = invoke(["run", model, "--out", outdir, "--quiet"])
            bad = judge("run", model, rc, out, err)
            after = snapshot(outdir)
            if rc == 1 and after != before:
                bad.append("failed run changed the output folder (%s before)" % state)
            if rc == 0:
                if not after or "report.json" not in after:
                    bad.append("successful run without report.json")
                elif any(k.startswith(".gwdivide-staging") for k in after):
                    bad.append("staging folder left behind")
            problems += ["run: " + b for b in bad]
        if problems and KEEP:
            os.makedirs(KEEP, exist_ok=True)
            shutil.copy(model, os.path.join(KEEP, "fail-%d-%d.yaml" % (SEED, i)))
            with open(os.path.join(KEEP, "fail-%d-%d.txt" % (SEED, i)), "w") as f:
                f.write("seed model %s\n%s\n--- last stderr ---\n%s\n" % (seed, "\n".join(problems), err[:20000]))
        return i, seed, rc, problems, err
    finally:
        shutil.rmtree(work, ignore_errors=True)


def fixed_cases():
    """Model paths that are not model files."""
    work = tempfile.mkdtemp(prefix="gw-fuzz-")
    cases = []
    try:
        d = os.path.join(work, "folder.yaml")
        os.mkdir(d)
        fifo_free = os.path.join(work, "empty.yaml")
        open(fifo_free, "w").close()
        for path in (d, fifo_free, os.path.join(work, "missing.yaml"), "/dev/null"):
            for kind in ("check", "run"):
                args = [kind, path] + (["--out", os.path.join(work, "o")] if kind == "run" else [])
                rc, out, err = invoke(args)
                bad = judge(kind, path, rc, out, err)
                if rc == 0:
                    bad.append("accepted a model file that is not one")
                if kind == "run" and os.path.exists(os.path.join(work, "o")):
                    bad.append("failed run created the output folder")
                cases.append((path, kind, bad))
    finally:
        shutil.rmtree(work, ignore_errors=True)
    return cases


def main():
    t0 = time.time()
    failed = 0
    for path, kind, bad in fixed_cases():
        tag = "ok  " if not bad else "FAIL"
        failed += bool(bad)
        print("%s %s %s %s" % (tag, kind, path, "; ".join(bad)))
    done = 0
    statuses = {}
    with ThreadPoolExecutor(max_workers=2) as pool:
        futures = []
        for i in range(COUNT):
            futures.append(pool.submit(lambda k=i: one(k) if time.time() - t0 < SECONDS else None))
        for f in futures:
            res = f.result()
            if res is None:
                continue
            i, seed, rc, problems, err = res
            done += 1
            statuses[rc] = statuses.get(rc, 0) + 1
            if problems:
                failed += 1
                print("FAIL mutant %d of %s (seed %d): %s" % (i, os.path.basename(seed), SEED,
                                                             "; ".join(problems)))
                for l in err.strip().split("\n")[:6]:
                    print("     " + l[:300])
    print("fuzzed %d of %d mutants in %.1f s (seed %d); last exit statuses %s" %
          (done, COUNT, time.time() - t0, SEED, dict(sorted(statuses.items(), key=str))))
    if done < min(COUNT, 50):
        print("FAIL too few mutants in the time allowed")
        failed += 1
    print("%d passed, %d failed" % (done - min(failed, done), failed))
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
