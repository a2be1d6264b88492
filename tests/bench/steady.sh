#!/bin/sh
# Benchmark of the steady solve on the default scenario: wall time, Newton and linear
# iterations, peak memory, time per cell and per log stage, at several spacings, on 1 and 2 MPI
# ranks and with 1 and 2 OpenMP threads, and a 15-rate sweep at 1 km on 2 ranks
# (tests/bench/sweep15.yaml).  Every case runs REPEAT times (default 3) and the run with the
# median wall time is reported, with the fastest and slowest beside it: a shared virtual machine's
# timings drift by tens of percent from one minute to the next.  Prints figures; asserts nothing.
#   [REPEAT=N] sh tests/bench/steady.sh [BUILD_DIR] [SPACINGS_KM]   (default: build "2 1 0.5 0.25")
set -e
BUILD=${1:-build}
SPACINGS=${2:-"2 1 0.5 0.25"}
REPEAT=${REPEAT:-3}
CF=$BUILD/src/crustforge
SCEN=$(dirname "$0")/../../inputs/default.yaml
TMP=$(mktemp -d)
trap 'rm -rf "$TMP"' EXIT
export OMPI_ALLOW_RUN_AS_ROOT=1 OMPI_ALLOW_RUN_AS_ROOT_CONFIRM=1 OMPI_MCA_rmaps_base_oversubscribe=1

secs() { awk -F: '{s=0; for(i=1;i<=NF;i++) s=s*60+$i; print s}'; }

# One run of case $label into $TMP/$label.$k.{log,time}; prints its wall seconds.
once() { # label ranks threads spacing k
  out=$TMP/$1.$5.dir
  rm -rf "$out"
  if [ "$2" = 1 ]; then
    OMP_NUM_THREADS=$3 /usr/bin/time -v "$CF" run "$SCEN" -grid_spacing "$4" -output_dir "$out" -output_figures false -log_view >"$TMP/$1.$5.log" 2>"$TMP/$1.$5.time"
  else
    OMP_NUM_THREADS=$3 /usr/bin/time -v mpiexec -n "$2" --bind-to none "$CF" run "$SCEN" -grid_spacing "$4" -output_dir "$out" -output_figures false -log_view >"$TMP/$1.$5.log" 2>"$TMP/$1.$5.time"
  fi
  rm -rf "$out"
  grep "Elapsed (wall clock)" "$TMP/$1.$5.time" | awk '{print $NF}' | secs
}

run() { # label ranks threads spacing
  label=$(echo "$1" | tr ' ' _) np=$2 nt=$3 h=$4
  : >"$TMP/$label.walls"
  k=1
  while [ $k -le "$REPEAT" ]; do
    echo "$(once "$label" "$np" "$nt" "$h" $k) $k" >>"$TMP/$label.walls"
    k=$((k + 1))
  done
  sort -n "$TMP/$label.walls" >"$TMP/$label.sorted"
  med=$(awk -v n="$REPEAT" 'NR==int((n+1)/2){print $2}' "$TMP/$label.sorted")
  range=$(awk 'NR==1{lo=$1} {hi=$1} END{printf "%.2f-%.2f", lo, hi}' "$TMP/$label.sorted")
  log=$TMP/$label.$med.log
  wall=$(awk -v k="$med" '$2==k{print $1}' "$TMP/$label.walls")
  rss=$(grep "Maximum resident" "$TMP/$label.$med.time" | awk '{print $NF}')
  its=$(grep "^steady solve:" "$log" | sed 's/steady solve: \([0-9]*\) Newton iterations, \([0-9]*\) linear.*/\1 \2/')
  cells=$(awk -v h="$h" 'BEGIN{printf "%d", (400/h)*(200/h)}')
  stages=$(awk -F: '/Summary of Stages/{f=1;next} /^ *[0-9]+: /&&f{split($3,a," "); gsub(/^ +| +$/,"",$2); gsub(/ /,"_",$2); printf "%s=%.2fs ", $2, a[1]} /Event Stage/{f=0}' "$log")
  printf "%-10s h=%-5s cells=%-8s ranks=%s threads=%s wall=%.2fs (range %s, %.1f us/cell) newton/linear=%-6s peakRSS=%s kB (%.0f B/cell; %.0f B/cell above the floor) %s\n" \
    "$1" "$h" "$cells" "$np" "$nt" "$wall" "$range" "$(awk -v s="$wall" -v c="$cells" 'BEGIN{print s*1e6/c}')" "$(echo $its | tr ' ' /)" "$rss" "$(awk -v r="$rss" -v c="$cells" 'BEGIN{print r*1024/c}')" "$(awk -v r="$rss" -v f="$floor" -v n="$np" -v c="$cells" 'BEGIN{print (r-f)*1024*n/c}')" "$stages"
}

echo "crustforge steady benchmark, $(nproc) cores, $(date -u +%Y-%m-%dT%H:%MZ), median of $REPEAT runs"
# The floor: the peak resident size of an 8 km run (1 250 cells), nearly all of it the shared
# libraries and MPI that every run loads whatever its grid; "above the floor" is per rank times
# ranks over cells, what the grid itself costs
once floor 1 1 8 1 >/dev/null
floor=$(grep "Maximum resident" "$TMP/floor.1.time" | awk '{print $NF}')
echo "floor      h=8     peakRSS=$floor kB"
for h in $SPACINGS; do run "serial" 1 1 "$h"; done
run "2 ranks" 2 1 1
finest=$(echo $SPACINGS | awk '{print $NF}')
[ "$finest" = 1 ] || run "2 ranks" 2 1 "$finest"
run "2 threads" 1 2 1
# 1 against 2 ranks at the finest spacing in alternation, so that both see the same machine: the
# median of the per-pair ratios
k=1
: >"$TMP/pairs"
while [ $k -le "$REPEAT" ]; do
  a=$(once pair1 1 1 "$finest" $k)
  b=$(once pair2 2 1 "$finest" $k)
  echo "$a $b" | awk '{print $1 / $2, $1, $2}' >>"$TMP/pairs"
  k=$((k + 1))
done
sort -n "$TMP/pairs" | awk -v n="$REPEAT" -v h="$finest" '{r[NR]=$0} END{split(r[int((n+1)/2)], m, " "); split(r[1], lo, " "); split(r[n], hi, " "); printf "%-10s h=%-5s 2 ranks over 1, alternated: %.2f times faster (median pair %.2f s / %.2f s; ratios %.2f-%.2f)\n", "speedup", h, m[1], m[2], m[3], lo[1], hi[1]}'
# the 15-rate sweep at 1 km on 2 ranks (2 groups of 1 rank)
SWEEP=$(dirname "$0")/sweep15.yaml
: >"$TMP/sweep.walls"
k=1
while [ $k -le "$REPEAT" ]; do
  rm -rf "$TMP/sweep"
  OMP_NUM_THREADS=1 /usr/bin/time -v mpiexec -n 2 --bind-to none "$CF" sweep "$SWEEP" -output_dir "$TMP/sweep" -sweep_ranks_per_case 1 >"$TMP/sweep.log" 2>"$TMP/sweep.time" || { tail -n 5 "$TMP/sweep.log"; echo "sweep failed"; }
  grep "Elapsed (wall clock)" "$TMP/sweep.time" | awk '{print $NF}' | secs >>"$TMP/sweep.walls"
  k=$((k + 1))
done
its=$(awk -F, 'NR==1{for(i=1;i<=NF;i++) if($i=="nonlinear_iterations") c=i} NR>1&&c{s+=$c; n++} END{printf "%d cases, %d Newton iterations", n, s}' "$TMP/sweep/sweep.csv" 2>/dev/null)
sort -n "$TMP/sweep.walls" | awk -v n="$REPEAT" -v its="$its" 'NR==1{lo=$1} NR==int((n+1)/2){m=$1} {hi=$1} END{printf "%-10s h=%-5s 15 rates ranks=2 wall=%.2fs (range %.2f-%.2f; %s)\n", "sweep", 1, m, lo, hi, its}'
