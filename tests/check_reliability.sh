#!/usr/bin/env bash
# Reliability (DESIGN.md, "Reliability"), end to end through the command:
#  - an active island with no head-controlling boundary is rejected, its
#    extent given in map coordinates, nothing written;
#  - a drain that goes dry, leaving the aquifer with no boundary, is
#    detected as a singular system and explained, nothing written;
#  - a grid whose Cholesky factor cannot fit in the memory available is
#    refused before factorizing, with both figures, nothing written;
#  - an unconfined model that does not converge within
#    solver.max_iterations is rejected with its iteration history;
#  - cells going dry are a warning that says how many and where, and the
#    water balance is still printed; a pumping well in a dry cell is named
#    with the rate the aquifer cannot deliver;
#  - a stream stage below its bed bottom is rejected with file:line:column;
#  - a failure while the outputs are written (a file in the way of the out
#    folder, a folder in the way of an output, a full disk simulated with a
#    file-size limit, a rename that fails half-way through moving the
#    outputs into place) leaves the out folder absent or exactly as it was.
set -uo pipefail
GW="${GW_COMMAND:?GW_COMMAND must name the built gwdivide}"
work="$(mktemp -d "${TMPDIR:-/tmp}/gw-rel-XXXXXX")"
trap 'rm -rf "$work"' EXIT
cd "$work" || exit 1
passed=0
failed=0
pass() { echo "ok   - $*"; passed=$((passed + 1)); }
fail() { echo "FAIL - $*"; failed=$((failed + 1)); }

# run_gw NAME -- args: runs gwdivide, keeps stdout/stderr in NAME.out/.err
# and the exit status in $rc.
run_gw() {
    local name="$1"; shift 2
    "$GW" "$@" >"$name.out" 2>"$name.err"
    rc=$?
}
expect_rc() {      # expect_rc WANT WHAT
    if [ "$rc" -eq "$1" ]; then pass "$2: exit $rc"
    else fail "$2: exit $rc, expected $1"; sed 's/^/     /' "$3.err" | head -20; fi
}
expect_in() {      # expect_in FILE TEXT WHAT (fixed string)
    if grep -qF -- "$2" "$1"; then pass "$3"
    else fail "$3: '$2' not in $1:"; sed 's/^/     /' "$1" | head -20; fi
}
expect_re() {      # expect_re FILE REGEX WHAT (extended regex)
    if grep -qE -- "$2" "$1"; then pass "$3"
    else fail "$3: /$2/ not in $1:"; sed 's/^/     /' "$1" | head -20; fi
}
expect_one_block() {   # one error block on stderr: a single "gwdivide:" line, first
    local n
    n=$(grep -c '^gwdivide:' "$1.err")
    if [ "$n" -eq 1 ] && head -1 "$1.err" | grep -q '^gwdivide:'; then pass "$1: one error block"
    else fail "$1: $n 'gwdivide:' lines on stderr"; sed 's/^/     /' "$1.err" | head -20; fi
}
expect_absent() {
    if [ ! -e "$1" ]; then pass "$2: nothing written"
    else fail "$2: $1 exists:"; ls -la "$1" | sed 's/^/     /'; fi
}
# Listing with content digests: "exactly as it was" compares these.
state() { (cd "$1" 2>/dev/null && find . -print0 | sort -z | xargs -0 -r stat -c '%n %F %s' && \
          find . -type f -print0 | sort -z | xargs -0 -r sha1sum) || echo absent; }

# --- an active island with no boundary --------------------------------------
# Two 100 m x 200 m blocks joined by a strip thinner than a cell (no cell
# centre in it), so the east block is cut off from the fixed head in the west.
cat >island.yaml <<'YAML'
units: {length: m, time: day}
grid: {origin: [1000, 2000], cell_size: 10, columns: 30, rows: 20}
aquifer:
  conductivity: 5
  thickness: 10
  active:
    polygon: [[1000, 2000], [1100, 2000], [1100, 2100], [1200, 2100], [1200, 2000], [1300, 2000],
              [1300, 2200], [1200, 2200], [1200, 2104], [1100, 2104], [1100, 2200], [1000, 2200]]
recharge: {rate: 0.001}
fixed_heads:
  - {name: West, line: [[1005, 2000], [1005, 2200]], head: 10}
output: {maps: false}
YAML
for cmd in check run; do
    run_gw "island-$cmd" -- $cmd island.yaml $([ $cmd = run ] && echo --out island-out)
    expect_rc 1 "island ($cmd)" "island-$cmd"
    expect_one_block "island-$cmd"
    expect_in "island-$cmd.err" "island.yaml" "island ($cmd): names the model file"
    # The east block: columns 21-30, x 1200 to 1300, y 2000 to 2200.
    expect_in "island-$cmd.err" "x 1200 to 1300, y 2000 to 2200" "island ($cmd): extent in map coordinates"
done
expect_absent island-out "island (run)"

# --- a drain that goes dry: singular system ---------------------------------
# No recharge, a well pumping 50 m3/day and a drain as the only boundary:
# once the heads fall below the drain elevation nothing holds them, and no
# steady state exists (continuity: the well's water must come from somewhere).
cat >drain.yaml <<'YAML'
units: {length: m, time: day}
grid: {origin: [0, 0], cell_size: 10, columns: 30, rows: 20}
aquifer: {conductivity: 5, thickness: 10}
recharge: {rate: 0.0}
wells:
  - {name: Pump, at: [155, 105], pumping: 50}
drains:
  - {name: Ditch, line: [[5, 0], [5, 200]], elevation: 50, conductance: 1}
output: {maps: false}
YAML
run_gw drain -- run drain.yaml --out drain-out
expect_rc 1 "drain gone dry" drain
expect_one_block drain
expect_in drain.err "drain.yaml" "drain gone dry: names the model file"
expect_in drain.err "singular" "drain gone dry: says the system is singular"
expect_in drain.err "fallen dry" "drain gone dry: says why"
expect_in drain.err "x 0 to 300, y 0 to 200" "drain gone dry: extent in map coordinates"
expect_absent drain-out "drain gone dry"

# --- a factor that cannot fit in memory ---------------------------------------
# GW_MEMORY_MB stands in for a small machine: a 300 x 300 grid needs some
# 20 MB for its factor, so with 5 MB "available" the run must stop before
# factorizing, give the numbers and write nothing.
cat >big.yaml <<'YAML'
units: {length: m, time: day}
grid: {origin: [0, 0], cell_size: 10, columns: 300, rows: 300}
aquifer: {type: confined, conductivity: 5, thickness: 20}
recharge: 0.0005
fixed_heads:
  - {name: West, line: [[5, 0], [5, 3000]], head: 10}
output: {maps: false}
YAML
GW_MEMORY_MB=5 run_gw bigmem -- run big.yaml --out big-out
expect_rc 1 "factor too large for memory" bigmem
expect_one_block bigmem
expect_in bigmem.err "big.yaml" "factor too large: names the model file"
expect_re bigmem.err "need a Cholesky factor of [0-9.e+]+ values, about [0-9.]+ GB" "factor too large: says what it needs"
expect_in bigmem.err "GB of memory is available" "factor too large: says what there is"
expect_absent big-out "factor too large"
GW_MEMORY_MB=4000 run_gw bigok -- run big.yaml --out big-out
expect_rc 0 "the same model with memory to spare" bigok

# --- unconfined non-convergence ----------------------------------------------
# A well drawing an unconfined aquifer down towards its base needs more than
# three Picard iterations; with solver.max_iterations: 3 the run must stop.
cat >noconv.yaml <<'YAML'
units: {length: m, time: day}
grid: {origin: [0, 0], cell_size: 10, columns: 40, rows: 20}
aquifer: {type: unconfined, conductivity: 5, bottom: 0}
fixed_heads:
  - {name: West, line: [[5, 0], [5, 200]], head: 3}
wells:
  - {name: Pump, at: [305, 105], pumping: 40}
solver: {max_iterations: 3}
output: {maps: false}
YAML
run_gw noconv -- run noconv.yaml --out noconv-out
expect_rc 1 "non-convergence" noconv
expect_one_block noconv
expect_in noconv.err "noconv.yaml" "non-convergence: names the model file"
expect_in noconv.err "did not converge in 3 iterations" "non-convergence: says so"
for i in 1 2 3; do
    expect_re noconv.err "iteration $i: max head change [-+0-9.e]+, residual [-+0-9.e]+" \
        "non-convergence: history line for iteration $i"
done
expect_absent noconv-out "non-convergence"

# --- cells going dry: a warning with how many and where ----------------------
sed 's/max_iterations: 3/max_iterations: 200/' noconv.yaml >dry.yaml
run_gw dry -- run dry.yaml --out dry-out
expect_rc 0 "dry cells" dry
expect_re dry.out "[0-9]+ cells went dry \(head at or below the aquifer bottom\), within columns [0-9]+-[0-9]+, rows [0-9]+-[0-9]+ \(x [-0-9.e+]+ to [-0-9.e+]+, y [-0-9.e+]+ to [-0-9.e+]+\)" \
    "dry cells: warning gives how many and where"
expect_re dry.out "the driest is column [0-9]+, row [0-9]+" "dry cells: warning names the driest cell"
expect_re dry.out "^ *balance +in [0-9.e+]+ m3/day, out [0-9.e+]+ m3/day" "dry cells: water balance printed"
expect_in dry-out/report.json "cells went dry" "dry cells: warning in report.json"
# The pumping well's cell is the driest: it is where the drawdown is deepest.
expect_in dry.out "the driest is column 31, row 10 (x 305, y 105)" "dry cells: driest cell is the well's"
# ...and the well itself is named: its pumping cannot be delivered there.
expect_re dry.out "well 'Pump' is in a cell that went dry \(column 31, row 10; x 305, y 105; head [0-9.e+]+ m below the aquifer bottom\): the aquifer cannot deliver its pumping of 40 m3/day there" \
    "dry cells: the pumping well in a dry cell is named with its rate"
expect_in dry-out/report.json "well 'Pump' is in a cell that went dry" "dry cells: well warning in report.json"

# --- stage below bed bottom ----------------------------------------------------
cat >stage.yaml <<'YAML'
units: {length: m, time: day}
grid: {origin: [0, 0], cell_size: 10, columns: 30, rows: 20}
aquifer: {conductivity: 5, thickness: 10}
fixed_heads:
  - {name: West, line: [[5, 0], [5, 200]], head: 10}
streams:
  - {name: Brook, line: [[155, 0], [155, 200]], stage: [10, 9], bed_bottom: [9, 9.5], bed_conductance: 1}
YAML
run_gw stage -- check stage.yaml
expect_rc 1 "stage below bed bottom" stage
expect_one_block stage
expect_re stage.err "^gwdivide: stage\.yaml:7:[0-9]+: stream 'Brook'.*below.*bed_bottom" \
    "stage below bed bottom: file:line:column and the stream"

# --- interrupted writes ----------------------------------------------------------
cat >good.yaml <<'YAML'
title: strip with a brook
units: {length: m, time: day}
grid: {origin: [0, 0], cell_size: 10, columns: 30, rows: 12}
aquifer: {conductivity: 8, thickness: 12}
recharge: {rate: 0.0005}
fixed_heads:
  - {name: West, line: [[5, 0], [5, 120]], head: 20}
  - {name: East, line: [[295, 0], [295, 120]], head: 19}
streams:
  - {name: Brook, line: [[150, 0], [150, 120]], stage: 19.8, bed_bottom: 18, bed_conductance: 0.5}
output: {maps: true}
YAML
run_gw good -- run good.yaml --out good-out --quiet
expect_rc 0 "good model" good

# The out path is a file.
echo "not a folder" >outfile
before="$(sha1sum outfile; stat -c '%F %s' outfile)"
run_gw outfile -- run good.yaml --out outfile --quiet
expect_rc 1 "out path is a file" outfile
expect_one_block outfile
expect_in outfile.err "outfile" "out path is a file: named"
[ "$(sha1sum outfile; stat -c '%F %s' outfile)" = "$before" ] && pass "out path is a file: unchanged" \
    || fail "out path is a file: changed"

# Out folder parents that cannot be made: no stray folders left.
run_gw nested -- run good.yaml --out outfile/sub/dir --quiet
expect_rc 1 "out path under a file" nested
run_gw nested2 -- run drain.yaml --out new1/new2/new3 --quiet
expect_rc 1 "failed run with a new nested out path" nested2
expect_absent new1 "failed run with a new nested out path: no parent folders left"

# prepare_old DIR: an out folder holding an earlier run's results and a note.
prepare_old() {
    rm -rf "$1"
    cp -r good-out "$1"
    echo "my notes" >"$1/notes.txt"
    echo '{"old": true}' >"$1/report.json"
}

# A folder in the way of an output: found before anything moves.
prepare_old inway
rm -f inway/report.json
mkdir inway/report.json
before="$(state inway)"
run_gw inway -- run good.yaml --out inway --quiet
expect_rc 1 "folder in the way of report.json" inway
expect_one_block inway
expect_in inway.err "inway/report.json" "folder in the way: names the output"
[ "$(state inway)" = "$before" ] && pass "folder in the way: out folder exactly as it was" \
    || { fail "folder in the way: out folder changed"; diff <(echo "$before") <(state inway) | head; }

# A full disk, simulated with a file-size limit at several sizes (with
# SIGXFSZ ignored, writes past the limit fail with EFBIG), so the failure
# hits different outputs: the table, a map, the report...
for lim in 1 8 40 200; do
    prepare_old "full$lim"
    before="$(state "full$lim")"
    (trap '' XFSZ; ulimit -f "$lim"; "$GW" run good.yaml --out "full$lim" --quiet >"full$lim.out" 2>"full$lim.err")
    rc=$?
    expect_rc 1 "file-size limit $lim KiB" "full$lim"
    expect_one_block "full$lim"
    expect_in "full$lim.err" "full$lim/" "file-size limit $lim KiB: names the output in the out folder"
    if grep -q "staging" "full$lim.err"; then fail "file-size limit $lim KiB: message shows the staging path"
    else pass "file-size limit $lim KiB: message shows the final path"; fi
    [ "$(state "full$lim")" = "$before" ] && pass "file-size limit $lim KiB: out folder exactly as it was" \
        || { fail "file-size limit $lim KiB: out folder changed"; diff <(echo "$before") <(state "full$lim") | head; }
    rm -rf "fresh$lim"
    (trap '' XFSZ; ulimit -f "$lim"; "$GW" run good.yaml --out "fresh$lim" --quiet >/dev/null 2>&1)
    expect_absent "fresh$lim" "file-size limit $lim KiB, new out folder"
done

# A rename that fails half-way through moving the outputs into place: a
# small preloaded library fails the rename that would put report.json in
# place (after budget.csv, the maps and heads.tif have moved), so the outputs
# already moved must be taken back and the old files restored.
CC="${CC:-cc}"
if command -v "$CC" >/dev/null 2>&1; then
    cat >failrename.c <<'C'
#define _GNU_SOURCE
#include <dlfcn.h>
#include <errno.h>
#include <stdlib.h>
#include <string.h>
int rename(const char *from, const char *to)
{
    static int (*real)(const char *, const char *);
    if (!real) real = (int (*)(const char *, const char *))dlsym(RTLD_NEXT, "rename");
    const char *name = getenv("GW_FAIL_RENAME");
    size_t n = name ? strlen(name) : 0, lt = strlen(to);
    if (n && lt > n && to[lt - n - 1] == '/' && !strcmp(to + lt - n, name) && strstr(from, ".gwdivide-staging")) {
        errno = EIO;
        return -1;
    }
    return real(from, to);
}
C
    if "$CC" -shared -fPIC -o failrename.so failrename.c -ldl 2>cc.err; then
        for victim in report.json results.gpkg; do
            prepare_old "ren-$victim"
            before="$(state "ren-$victim")"
            GW_FAIL_RENAME=$victim LD_PRELOAD="$work/failrename.so" \
                ASAN_OPTIONS="${ASAN_OPTIONS:-}:verify_asan_link_order=0" \
                "$GW" run good.yaml --out "ren-$victim" --quiet >"ren-$victim.out" 2>"ren-$victim.err"
            rc=$?
            expect_rc 1 "rename of $victim fails" "ren-$victim"
            expect_one_block "ren-$victim"
            expect_in "ren-$victim.err" "ren-$victim/$victim" "rename of $victim fails: names the output"
            [ "$(state "ren-$victim")" = "$before" ] && pass "rename of $victim fails: out folder exactly as it was" \
                || { fail "rename of $victim fails: out folder changed"; diff <(echo "$before") <(state "ren-$victim") | head; }
        done
    else
        echo "skip - cannot build the rename-failing library: $(head -1 cc.err)"
    fi
else
    echo "skip - no C compiler for the rename-failing library"
fi

echo "$passed passed, $failed failed"
[ "$failed" -eq 0 ]
