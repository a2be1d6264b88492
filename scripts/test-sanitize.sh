#!/bin/sh
# The sanitizer stage: builds with AddressSanitizer + UndefinedBehaviorSanitizer
# (-DCRUSTFORGE_SANITIZE=ON) and runs the whole ctest suite.  Open MPI's and fontconfig's leaks
# at exit are suppressed (tests/sanitizer/lsan.supp, applied by tests/CMakeLists.txt).
# Usage: sh scripts/test-sanitize.sh [BUILD_DIR]   (default: build-asan)
set -e
cd "$(dirname "$0")/.."
dir=${1:-build-asan}
cmake -S . -B "$dir" -DCMAKE_BUILD_TYPE=Debug -DCRUSTFORGE_SANITIZE=ON >/dev/null
cmake --build "$dir" -j"$(nproc)"
# Sanitized runs are several times slower than the usual build.
ctest --test-dir "$dir" --output-on-failure -j"$(nproc)" --timeout 600
