#!/bin/sh
# Benchmark of the steady solve on the default scenario: wall time, Newton and linear
# iterations, peak memory, time per cell and per log stage, at several spacings, on 1 and 2 MPI
# ranks and with 1 and 2 OpenMP threads for the melting model, and a 15-rate sweep at 1 km on 2
# ranks (tests/bench/sweep15.yaml).  Prints figures; asserts nothing.
#   sh tests/bench/steady.sh [BUILD_DIR] [SPACINGS_KM]      (default: build "2 1 0.5 0.25")
set -e
BUILD=${1:-build}
SPACINGS=${2:-"2 1 0.5 0.25"}
CF=$BUILD/src/crustforge
SCEN=$(dirname "$0")/../../inputs/default.yaml
TMP=$(mktemp -d)
trap 'rm -rf "$TMP"' EXIT
export OMPI_ALLOW_RUN_AS_ROOT=1 OMPI_ALLOW_RUN_AS_ROOT_CONFIRM=1 OMPI_MCA_rmaps_base_oversubscribe=1

run() { # label ranks threads spacing
  label=$1 np=$2 nt=$3 h=$4
  out=$TMP/$label
  log=$TMP/$label.log
  if [ "$np" = 1 ]; then
    OMP_NUM_THREADS=$nt /usr/bin/time -v "$CF" run "$SCEN" -grid_spacing "$h" -output_dir "$out" -output_figures false -log_view >"$log" 2>"$log.time"
  else
    OMP_NUM_THREADS=$nt /usr/bin/time -v mpiexec -n "$np" --bind-to none "$CF" run "$SCEN" -grid_spacing "$h" -output_dir "$out" -output_figures false -log_view >"$log" 2>"$log.time"
  fi
  wall=$(grep "Elapsed (wall clock)" "$log.time" | awk '{print $NF}')
  rss=$(grep "Maximum resident" "$log.time" | awk '{print $NF}')
  its=$(grep "^steady solve:" "$log" | sed 's/steady solve: \([0-9]*\) Newton iterations, \([0-9]*\) linear.*/\1 \2/')
  cells=$(awk -v h="$h" 'BEGIN{printf "%d", (400/h)*(200/h)}')
  stages=$(awk -F: '/Summary of Stages/{f=1;next} /^ *[0-9]+: /&&f{split($3,a," "); gsub(/^ +| +$/,"",$2); gsub(/ /,"_",$2); printf "%s=%.2fs ", $2, a[1]} /Event Stage/{f=0}' "$log")
  secs=$(echo "$wall" | awk -F: '{s=0; for(i=1;i<=NF;i++) s=s*60+$i; print s}')
  printf "%-14s h=%-5s cells=%-8s ranks=%s threads=%s wall=%-8s (%.1f us/cell) newton/linear=%-9s peakRSS=%s kB (%.0f B/cell) %s\n" \
    "$label" "$h" "$cells" "$np" "$nt" "$wall" "$(awk -v s="$secs" -v c="$cells" 'BEGIN{print s*1e6/c}')" "$(echo $its | tr ' ' /)" "$rss" "$(awk -v r="$rss" -v c="$cells" 'BEGIN{print r*1024/c}')" "$stages"
}

echo "crustforge steady benchmark, $(nproc) cores, $(date -u +%Y-%m-%dT%H:%MZ)"
for h in $SPACINGS; do run "serial" 1 1 "$h"; done
run "2 ranks" 2 1 1
finest=$(echo $SPACINGS | awk '{print $NF}')
[ "$finest" = 1 ] || run "2 ranks" 2 1 "$finest"
run "2 threads" 1 2 1
# the 15-rate sweep at 1 km on 2 ranks (2 groups of 1 rank)
SWEEP=$(dirname "$0")/sweep15.yaml
OMP_NUM_THREADS=1 /usr/bin/time -v mpiexec -n 2 --bind-to none "$CF" sweep "$SWEEP" -output_dir "$TMP/sweep" -sweep_ranks_per_case 1 >"$TMP/sweep.log" 2>"$TMP/sweep.time" || { tail -n 5 "$TMP/sweep.log"; echo "sweep failed"; }
wall=$(grep "Elapsed (wall clock)" "$TMP/sweep.time" | awk '{print $NF}')
its=$(awk -F, 'NR==1{for(i=1;i<=NF;i++) if($i=="nonlinear_iterations") c=i} NR>1&&c{s+=$c; n++} END{printf "%d cases, %d Newton iterations", n, s}' "$TMP/sweep/sweep.csv" 2>/dev/null)
printf "%-14s h=%-5s 15 rates ranks=2 wall=%s (%s)\n" "sweep" 1 "$wall" "$its"
