#!/bin/sh
# One end-to-end run under valgrind memcheck: the default scenario on a 10 x 10 grid (figures
# off), with Open MPI's own suppressions and ours (tests/sanitizer/valgrind-openmpi.supp).
# Fails on any memcheck error: invalid reads or writes, uninitialised values, definite leaks.
# Usage: sh scripts/test-valgrind.sh [BUILD_DIR]   (default: build; the program is BUILD_DIR/src/crustforge)
set -e
cd "$(dirname "$0")/.."
prog=${1:-build}/src/crustforge
out=$(mktemp -d)
export OMPI_ALLOW_RUN_AS_ROOT=1 OMPI_ALLOW_RUN_AS_ROOT_CONFIRM=1 OMP_NUM_THREADS=1
export OMPI_MCA_ess_singleton_isolated=1 OMPI_MCA_pml=ob1 OMPI_MCA_btl=self
supp="--suppressions=tests/sanitizer/valgrind-openmpi.supp"
[ -f /usr/share/openmpi/openmpi-valgrind.supp ] && supp="$supp --suppressions=/usr/share/openmpi/openmpi-valgrind.supp"
# shellcheck disable=SC2086
valgrind --tool=memcheck --leak-check=full --show-leak-kinds=definite --errors-for-leak-kinds=definite \
  --error-exitcode=99 --num-callers=30 $supp --log-file="$out/valgrind.log" \
  "$prog" run inputs/default.yaml -grid_spacing 20 -grid_width 200 -grid_depth 200 -output_figures false \
  -output_dir "$out/run" >"$out/run.log" 2>&1 || { tail -n 30 "$out/valgrind.log"; echo "valgrind: failed, see $out"; exit 1; }
grep -E "ERROR SUMMARY|definitely lost|Invalid" "$out/valgrind.log"
rm -rf "$out"
