#!/bin/sh
# Installs what is missing, builds, and runs the default scenario end to end.
set -e
cd "$(dirname "$0")/.."
sh scripts/install-deps.sh
cmake -S . -B build -DCMAKE_BUILD_TYPE=Release >/dev/null
cmake --build build -j"$(nproc)"
./build/src/crustforge run inputs/default.yaml "$@"
