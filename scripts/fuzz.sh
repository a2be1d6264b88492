#!/bin/sh
# Fuzzing with libFuzzer (clang, Debian's clang-14 / libclang-rt-14-dev): builds the two targets
# of tests/fuzz/ with AddressSanitizer + UndefinedBehaviorSanitizer over the loader and reader
# sources, then runs each for SECONDS (default 30) from the seeds in tests/fuzz/ (the reader's
# seed is a run file with its integrity header: crustforge run inputs/default.yaml -grid_width 80
# -grid_depth 80 -grid_spacing 10 -melting_model linear -output_figures false).
# Usage: sh scripts/fuzz.sh [SECONDS] [BUILD_DIR] [TARGETS]
#   (defaults: 30, build-fuzz, "config reader")
# Exit status: 0 no crash, 1 a crash (its input is left in BUILD_DIR/crash-*), 77 no clang.
set -e
cd "$(dirname "$0")/.."
secs=${1:-30}
dir=${2:-build-fuzz}
targets=${3:-"config reader"}
CC=${FUZZ_CC:-$(command -v clang || command -v clang-14 || true)}
if [ -z "$CC" ] || ! echo 'int LLVMFuzzerTestOneInput(const char *d, long n){return 0;}' |
     "$CC" -x c -fsanitize=fuzzer - -o /dev/null 2>/dev/null; then
  echo "fuzz: no clang with libFuzzer (apt-get install clang); skipped" >&2
  exit 77
fi
mkdir -p "$dir/gen" "$dir/corpus_config" "$dir/corpus_reader"
ver=$(sed -n 's/^project(crustforge VERSION \([0-9.]*\).*/\1/p' CMakeLists.txt)
printf '#define CRUSTFORGE_VERSION "%s"\n#define CRUSTFORGE_REVISION "fuzz"\n' "$ver" >"$dir/gen/crustforge_version.h"
flags="-g -O1 -fsanitize=fuzzer,address,undefined -fno-sanitize-recover=undefined -Iinclude -I$dir/gen $(pkg-config --cflags PETSc hdf5-openmpi yaml-0.1)"
libs="$(pkg-config --libs PETSc hdf5-openmpi yaml-0.1) -lm"
config="src/config/keys.c src/config/config.c src/config/scan.c src/config/resources.c src/melting/registry.c
  src/melting/model.c src/melting/linear.c src/melting/katz2003.c src/melting/brent.c"
output="src/output/run_file.c src/output/dataset.c src/output/header.c src/output/xdmf.c src/output/h5attr.c src/output/read.c src/output/integrity.c src/output/room.c"
# shellcheck disable=SC2086
"$CC" $flags -Wno-unknown-pragmas tests/fuzz/fuzz_config.c $config $libs -o "$dir/fuzz_config"
# shellcheck disable=SC2086
"$CC" $flags -Wno-unknown-pragmas tests/fuzz/fuzz_reader.c $output $config $libs -o "$dir/fuzz_reader"

export OMPI_ALLOW_RUN_AS_ROOT=1 OMPI_ALLOW_RUN_AS_ROOT_CONFIRM=1 OMP_NUM_THREADS=1
export OMPI_MCA_ess_singleton_isolated=1 OMPI_MCA_pml=ob1 OMPI_MCA_btl=self
# A session directory of our own: isolated singletons share one under /tmp, which the first of
# them to exit removes, and MPI-IO in a long fuzz run then fails to open files (seen once).
mkdir -p "$dir/ompi-session"
export OMPI_MCA_orte_tmpdir_base="$PWD/$dir/ompi-session"
# Open MPI's and PETSc's allocations at exit are not ours; ASan's leak check stays on for inputs.
export ASAN_OPTIONS=${ASAN_OPTIONS:-detect_odr_violation=0:detect_leaks=1}
# PETSc's own YAML loader (not instrumented) leaks its libyaml parser when it refuses a document
# that libyaml parsed: suppressed here, see tests/fuzz/lsan.supp.
export LSAN_OPTIONS=suppressions=$PWD/tests/fuzz/lsan.supp:fast_unwind_on_malloc=0
rc=0
case " $targets " in *" config "*)
nice "$dir/fuzz_config" -max_total_time="$secs" -max_len=8192 -timeout=10 -print_final_stats=1 -artifact_prefix="$dir/" \
  -dict=tests/fuzz/scenario.dict "$dir/corpus_config" tests/fuzz/seeds_config tests/bad_inputs 2>"$dir/fuzz_config.log" || rc=1
tail -n 3 "$dir/fuzz_config.log" ;;
esac
case " $targets " in *" reader "*)
# The files that once crashed HDF5 1.10 inside the reader (tests/fuzz/known/) run first: the
# integrity gate (src/output/integrity.c) must refuse them before HDF5 sees a byte.
"$dir/fuzz_reader" tests/fuzz/known/* 2>"$dir/fuzz_reader_known.log" || { rc=1; tail -n 20 "$dir/fuzz_reader_known.log"; }
# Any crash fails, HDF5's own included.
nice "$dir/fuzz_reader" -max_total_time="$secs" -max_len=65536 -timeout=10 -print_final_stats=1 -artifact_prefix="$dir/" \
  "$dir/corpus_reader" tests/fuzz/seeds_reader 2>"$dir/fuzz_reader.log" || rc=1
tail -n 3 "$dir/fuzz_reader.log" ;;
esac
for t in $targets; do
  echo "fuzz_$t: $(grep -h -E '^#[0-9]+[[:space:]]+DONE' "$dir/fuzz_$t.log" | tail -n 1) $(grep -h -E '^stat::number_of_executed_units' "$dir/fuzz_$t.log")"
done
exit $rc
