#!/usr/bin/env bash
# Build and run every test, then rebuild the unit tests with AddressSanitizer
# and UndefinedBehaviorSanitizer (leak checking on) and run those again.
set -euo pipefail
cd "$(dirname "$0")/.."
jobs="$(nproc 2>/dev/null || echo 2)"

echo "== Build ./build and run all tests =="
cmake -S . -B build
cmake --build build -j"$jobs"
(cd build && ctest --output-on-failure -j"$jobs")

echo
echo "== Build ./build-asan (sanitizers) and run the unit tests =="
cmake -S . -B build-asan -DGW_SANITIZE=ON -DCMAKE_BUILD_TYPE=Debug
cmake --build build-asan -j"$jobs"
# The unit tests are the cmocka programs test_*; the script checks run long
# models that the plain build already covers.  tests/lsan.supp silences
# fontconfig's configuration, which it loads on cairo's first text and keeps
# for the life of the process (not a leak of ours).
lsan="suppressions=$PWD/tests/lsan.supp"
(cd build-asan && ASAN_OPTIONS=detect_leaks=1:abort_on_error=1 UBSAN_OPTIONS=print_stacktrace=1 \
   LSAN_OPTIONS="${LSAN_OPTIONS:+$LSAN_OPTIONS:}$lsan" \
   ctest --output-on-failure -j"$jobs" -R '^test_')
echo
echo "All tests passed."
