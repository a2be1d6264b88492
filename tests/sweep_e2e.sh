#!/bin/bash
# End-to-end checks of `crustforge sweep` (DESIGN 4, Sweeps), one mode per ctest:
#  ranks   the small sweep (tests/sweep/small.yaml, continuation on) gives the same sweep.csv
#          numbers on 1 rank and on 2 ranks in 2 groups, each row equals a single
#          `crustforge run` of that case, and a run on 3 OpenMP threads equals it on 1.
#          Continuation changes only the initial guess, so the
#          answers agree to the solver's tolerance (an RMS residual of 1e-6 K per unknown:
#          measured differences up to 4e-8 relative): compared to 1e-6 relative (1e-9 km
#          absolute for zero crust).  nonlinear_iterations and solve_seconds
#          depend on the start and the machine and are not compared; regime_mean_melt_fraction
#          and melting_region_area_km2 / _width_km count cells a threshold classifies as
#          melting (postprocess, CF_POST_MELTING_TOL), which flips for an edge cell with
#          solver-level differences: compared to 1e-3 relative (measured 8e-5) and to one cell.
#  resume  a sweep killed (SIGKILL) after 2 finished cases, rerun: the recorded cases are
#          skipped, not solved again, and the final sweep.csv equals an uninterrupted sweep's.
#  refuse  a list with a value out of its key's range: exit status 2, one line naming the key
#          and the value, before any case runs (nothing written).
#  trends  at a fixed rate the crust thickens with potential temperature (McKenzie & Bickle 1988,
#          J. Petrol. 29, 625; White, McKenzie & O'Nions 1992, JGR 97, 19683), and crust at
#          10 mm/yr is thinner than at 60 mm/yr (White, Minshull, Bickle & Robinson 2001,
#          J. Petrol. 42, 1171; Bown & White 1994, EPSL 121, 435).
# Environment (set by ctest): CRUSTFORGE, CF_MPIEXEC, CF_SOURCE_DIR, CF_TEST_TMP.
set -u
: "${CRUSTFORGE:?}" "${CF_MPIEXEC:?}" "${CF_SOURCE_DIR:?}" "${CF_TEST_TMP:?}"
mode=${1:?mode: ranks, resume, refuse or trends}
mkdir -p "$CF_TEST_TMP" || exit 1
tmp=$(mktemp -d "$CF_TEST_TMP/sweep_$mode.XXXXXX") || exit 1
small=$CF_SOURCE_DIR/tests/sweep/small.yaml
failures=0
fail() { echo "FAIL $*"; failures=$((failures + 1)); }
ok() { echo "ok   $*"; }
np1() { OMPI_MCA_ess_singleton_isolated=1 OMPI_MCA_pml=ob1 OMPI_MCA_btl=self "$CRUSTFORGE" "$@"; }

# same A B: the physical columns of two sweep.csv (or a sweep.csv row set and summary.csv rows)
# agree to 1e-6 relative; prints the worst difference.
same() {
  /usr/bin/python3 - "$1" "$2" <<'PY'
import csv, math, sys
skip = {"case", "nonlinear_iterations", "solve_seconds", "status", "reason"}
a = list(csv.DictReader(open(sys.argv[1]))); b = list(csv.DictReader(open(sys.argv[2])))
if len(a) != len(b) or not a: print("row counts", len(a), len(b)); sys.exit(1)
worst = 0.0
for x, y in zip(a, b):
    for k, u in x.items():
        if k in skip or k not in y: continue
        u, v = float(u), float(y[k])
        if math.isnan(u) and math.isnan(v): continue
        d = abs(u - v)
        # cell classification (see above): within one 10 km cell
        tol = {"regime_mean_melt_fraction": 1e-3 * abs(u), "melting_region_area_km2": 100.0, "melting_region_width_km": 10.0}
        if not d <= tol.get(k, max(1e-6 * max(abs(u), abs(v)), 1e-9)): print("differ:", k, u, v); sys.exit(1)
        if k in tol: continue
        worst = max(worst, d / max(abs(u), 1e-300))
print("worst relative difference %.2e" % worst)
PY
}

case $mode in
ranks)
  np1 sweep "$small" -output_dir "$tmp/np1" >"$tmp/np1.log" 2>&1 || { cat "$tmp/np1.log"; fail "sweep on 1 rank"; exit 1; }
  # OMP_NUM_THREADS unset: each rank takes its share of the node's processors as OpenMP threads
  # (at least one; common practice, no source), so the comparison below also covers the thread
  # count; a user's OMP_NUM_THREADS wins (OpenMP API 4.5, section 4.2; the libgomp manual,
  # OMP_NUM_THREADS: "if undefined one thread per CPU is used", in every rank)
  env -u OMP_NUM_THREADS "$CF_MPIEXEC" -n 2 --bind-to none "$CRUSTFORGE" sweep "$small" -output_dir "$tmp/np2" -sweep_ranks_per_case 1 >"$tmp/np2.log" 2>&1 || { cat "$tmp/np2.log"; fail "sweep on 2 ranks"; exit 1; }
  grep -q "2 groups of 1 rank" "$tmp/np2.log" && ok "2 ranks split into 2 groups" || fail "2 ranks not in 2 groups"
  procs=$(env -u OMP_NUM_THREADS nproc) # nproc itself honours OMP_NUM_THREADS
  share=$((procs / 2)); [ "$share" -ge 1 ] || share=1
  grep -q "^parallel: 2 MPI ranks x $share OpenMP thread" "$tmp/np2.log" && ok "2 ranks x $share OpenMP thread(s) each by default on $procs processors" || fail "default threads: $(grep '^parallel' "$tmp/np2.log")"
  OMP_NUM_THREADS=3 np1 run "$small" -ridge_full_spreading_rate 30 -mantle_potential_temperature 1300 -output_dir "$tmp/threads3" -output_figures false >"$tmp/threads3.log" 2>&1 || { cat "$tmp/threads3.log"; fail "run with 3 threads"; }
  grep -q "^parallel: 1 MPI rank x 3 OpenMP threads$" "$tmp/threads3.log" && ok "OMP_NUM_THREADS=3 kept" || fail "OMP_NUM_THREADS=3 not kept: $(grep '^parallel' "$tmp/threads3.log")"
  [ "$(grep -c ',ok,' "$tmp/np1/sweep.csv")" = 6 ] && ok "6 cases ok" || fail "sweep.csv lacks 6 ok rows"
  r=$(same "$tmp/np1/sweep.csv" "$tmp/np2/sweep.csv") && ok "1 rank = 2 groups ($r)" || fail "1 rank and 2 groups differ: $r"
  # each row against a single run of its case
  : >"$tmp/runs.csv"
  for T in 1300 1400; do for V in 10 30 60; do
    np1 run "$small" -ridge_full_spreading_rate $V -mantle_potential_temperature $T -output_dir "$tmp/run_${V}_$T" >"$tmp/run.log" 2>&1 || { cat "$tmp/run.log"; fail "run $V mm/yr $T C"; }
    if [ -s "$tmp/runs.csv" ]; then tail -1 "$tmp/run_${V}_$T/summary.csv" >>"$tmp/runs.csv"; else cat "$tmp/run_${V}_$T/summary.csv" >"$tmp/runs.csv"; fi
  done; done
  r=$(same "$tmp/np1/sweep.csv" "$tmp/runs.csv") && ok "every sweep row = a single run of its case ($r)" || fail "sweep rows differ from single runs: $r"
  r=$(same "$tmp/threads3/summary.csv" "$tmp/run_30_1300/summary.csv") && ok "3 threads = 1 thread ($r)" || fail "3 threads and 1 differ: $r"
  ;;
resume)
  # run files make each case slow enough (~0.5 s) to kill the sweep part way
  np1 sweep "$small" -output_dir "$tmp/full" >"$tmp/full.log" 2>&1 || { cat "$tmp/full.log"; fail "uninterrupted sweep"; exit 1; }
  # env execs the program, so $! is the sweep itself
  env OMPI_MCA_ess_singleton_isolated=1 OMPI_MCA_pml=ob1 OMPI_MCA_btl=self "$CRUSTFORGE" sweep "$small" -output_dir "$tmp/cut" -sweep_run_files true -output_figures true >"$tmp/cut1.log" 2>&1 &
  pid=$!
  for _ in $(seq 600); do
    [ "$(ls "$tmp/cut/progress" 2>/dev/null | grep -c '^case-.*\.csv$')" -ge 2 ] && break
    sleep 0.02
  done
  kill -KILL $pid 2>/dev/null; wait $pid 2>/dev/null
  n=$(ls "$tmp/cut/progress" | grep -c '^case-.*\.csv$')
  [ "$n" -ge 2 ] && [ "$n" -lt 6 ] && ok "killed with $n of 6 cases recorded" || fail "kill left $n of 6 cases recorded (want 2-5)"
  np1 sweep "$small" -output_dir "$tmp/cut" -sweep_run_files true -output_figures true >"$tmp/cut2.log" 2>&1 || { cat "$tmp/cut2.log"; fail "rerun"; }
  s=$(grep -c "done in an earlier run, skipped" "$tmp/cut2.log"); solved=$(grep -c ": crust " "$tmp/cut2.log")
  [ "$s" = "$n" ] && [ "$solved" = $((6 - n)) ] && ok "rerun skipped $s recorded cases and solved $solved" || fail "rerun skipped $s, solved $solved (recorded $n)"
  r=$(same "$tmp/full/sweep.csv" "$tmp/cut/sweep.csv") && ok "resumed sweep.csv = uninterrupted ($r)" || fail "resumed sweep.csv differs: $r"
  ;;
refuse)
  out=$tmp/out
  np1 sweep "$CF_SOURCE_DIR/tests/sweep/bad_value.yaml" -output_dir "$out" >"$tmp/stdout" 2>"$tmp/stderr"
  rc=$?
  [ $rc = 2 ] && ok "exit status 2" || fail "exit status $rc, want 2"
  [ "$(wc -l <"$tmp/stderr")" = 1 ] && grep -q "mantle.potential_temperature: 1801 C" "$tmp/stderr" && ok "one line: $(cat "$tmp/stderr")" || { fail "message:"; cat "$tmp/stderr"; }
  [ ! -e "$out" ] && ok "nothing written" || fail "$out was created"
  ;;
trends)
  np1 sweep "$small" -output_dir "$tmp/s" >"$tmp/s.log" 2>&1 || { cat "$tmp/s.log"; fail "sweep"; exit 1; }
  /usr/bin/python3 - "$tmp/s/sweep.csv" <<'PY' && ok "crust grows with T_p at each rate; thinner at 10 than at 60 mm/yr" || fail "trends"
import csv, sys
H = {(float(r["full_spreading_rate_mm_yr"]), float(r["potential_temperature_C"])): float(r["crustal_thickness_km"]) for r in csv.DictReader(open(sys.argv[1]))}
bad = [v for v in (10, 30, 60) if not H[(v, 1400)] > H[(v, 1300)]] + [T for T in (1300, 1400) if not H[(10, T)] < H[(60, T)]]
print(H); sys.exit(1 if bad else 0)
PY
  ;;
esac
[ $failures = 0 ] && rm -rf "$tmp"
exit $((failures > 0))
