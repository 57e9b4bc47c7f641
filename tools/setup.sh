#!/usr/bin/env bash
# One-step set-up: install the Debian packages, build gwdivide into ./build,
# and run the demonstration model.  Safe to run again.
set -euo pipefail
cd "$(dirname "$0")/.."
bash tools/setup-deps.sh
cmake -S . -B build -DCMAKE_BUILD_TYPE=Release
cmake --build build -j"$(nproc 2>/dev/null || echo 2)"
echo
echo "== Demo: demo/valley.yaml =="
./build/gwdivide run demo/valley.yaml --out demo/valley-results
echo
echo "gwdivide is built at ./build/gwdivide"
echo "Demo results are in ./demo/valley-results/ (report.json, budget.csv, heads.tif, maps)"
echo "Try:  ./build/gwdivide --help"
