#!/bin/bash
# Resource and solver faults, end to end: each must end with a clear one-line message, leave no
# file that looks complete, and leave earlier outputs untouched.
#   path     output.dir under a regular file
#   fsize    the file-size limit (ulimit -f) reached part way through the run file
#   sigterm  SIGTERM while the run is writing its output
#   lock     a second run on the same output.dir while the first runs; a stale lock taken over
#   noconv   a solve that cannot converge (-snes_max_it 1): PETSc's reason, exit status 3
# Environment (set by ctest): CRUSTFORGE, CF_SOURCE_DIR, CF_TEST_TMP.
set -u
: "${CRUSTFORGE:?}" "${CF_SOURCE_DIR:?}" "${CF_TEST_TMP:?}"
export OMPI_MCA_ess_singleton_isolated=${OMPI_MCA_ess_singleton_isolated:-1}
export OMPI_MCA_pml=${OMPI_MCA_pml:-ob1} OMPI_MCA_btl=${OMPI_MCA_btl:-self}
mkdir -p "$CF_TEST_TMP" || exit 1
tmp=$(mktemp -d "$CF_TEST_TMP/faults.XXXXXX") || exit 1
export OMPI_MCA_orte_tmpdir_base=$tmp
default=$CF_SOURCE_DIR/inputs/default.yaml
tiny=(-grid_spacing 10 -grid_width 200 -grid_depth 200 -melting_model linear -output_figures false) # 20 x 20 cells
failed=0

fail() { echo "FAIL $1: $2"; failed=$((failed + 1)); }
pass() { echo "ok   $1"; }
# complete FILE: a run file is complete only with its root attribute format = crustforge-run.
complete() { h5dump -a /format "$1" 2>/dev/null | grep -q '"crustforge-run"'; }
# no_complete_new DIR: nothing in DIR but the earlier file, incomplete temporaries and the lock.
no_complete_new() {
  local f
  for f in "$1"/*; do
    case $(basename "$f") in earlier-run.h5 | *.tmp) ;; *) echo "$f"; return 1 ;; esac
  done
  return 0
}
earlier() { mkdir -p "$1" && echo kept >"$1/earlier-run.h5"; }
untouched() { [ "$(cat "$1/earlier-run.h5" 2>/dev/null)" = kept ]; }
one_line() { [ "$(awk 'END { print NR }' "$1")" -eq 1 ] && grep -q "^crustforge: .*$2" "$1"; }

# --- path: output.dir under a regular file -----------------------------------------------------
echo kept >"$tmp/afile"
"$CRUSTFORGE" run "$default" "${tiny[@]}" -output_dir "$tmp/afile/run" >"$tmp/path.out" 2>"$tmp/path.err"
rc=$?
if [ $rc -ne 2 ] || ! one_line "$tmp/path.err" "cannot create '$tmp/afile/run': Not a directory" || [ "$(cat "$tmp/afile")" != kept ]; then
  fail path "exit $rc: $(cat "$tmp/path.err")"
else pass path; fi

# --- fsize: ulimit -f of 140 KB: the header fits, the fields do not -----------------------------
earlier "$tmp/fsize"
(ulimit -f 140 && exec "$CRUSTFORGE" run "$default" "${tiny[@]}" -output_dir "$tmp/fsize" -output_overwrite true) >"$tmp/fsize.out" 2>"$tmp/fsize.err"
rc=$?
if [ $rc -ne 2 ] || ! one_line "$tmp/fsize.err" "File too large: the file-size limit (ulimit -f) is 140 KB" || ! untouched "$tmp/fsize" || ! no_complete_new "$tmp/fsize" >/dev/null; then
  fail fsize "exit $rc: $(cat "$tmp/fsize.err"); dir holds: $(ls -A "$tmp/fsize" | tr '\n' ' ')"
else pass fsize; fi

# --- sigterm: stop the run once its solve is done and output has begun --------------------------
earlier "$tmp/term"
"$CRUSTFORGE" run "$default" -grid_spacing 4 -grid_width 200 -grid_depth 100 -output_dir "$tmp/term" -output_overwrite true >"$tmp/term.out" 2>"$tmp/term.err" &
pid=$!
for _ in $(seq 600); do grep -q '^steady solve:' "$tmp/term.out" 2>/dev/null && break; kill -0 $pid 2>/dev/null || break; sleep 0.05; done
kill -TERM $pid 2>/dev/null
wait $pid
rc=$?
why=""
untouched "$tmp/term" || why="earlier output changed; "
[ ! -e "$tmp/term/.lock" ] || why+="lock left behind; "
if [ $rc -eq 143 ]; then
  one_line "$tmp/term.err" "stopped by SIGTERM" || why+="stderr: $(cat "$tmp/term.err"); "
  # whatever carries a final name must be complete; the rest are .tmp
  if [ -e "$tmp/term/run.h5" ] && ! complete "$tmp/term/run.h5"; then why+="incomplete run.h5 under its final name; "; fi
elif [ $rc -ne 0 ]; then why+="exit $rc: $(cat "$tmp/term.err"); "
else echo "     (the run finished before the signal arrived)"; fi
if [ -n "$why" ]; then fail sigterm "$why"; else pass sigterm; fi

# --- lock: a second run on a directory in use is refused; neither output is damaged -------------
# the first run must outlast the second's start: 400 x 200 cells, a few seconds
"$CRUSTFORGE" run "$default" -grid_spacing 0.5 -grid_width 200 -grid_depth 100 -output_figures false -output_dir "$tmp/shared" >"$tmp/first.out" 2>"$tmp/first.err" &
pid=$!
for _ in $(seq 600); do [ -e "$tmp/shared/.lock" ] && break; sleep 0.05; done
"$CRUSTFORGE" run "$default" "${tiny[@]}" -output_dir "$tmp/shared" -output_overwrite true >"$tmp/second.out" 2>"$tmp/second.err"
rc2=$?
wait $pid
rc1=$?
why=""
[ $rc2 -eq 2 ] && one_line "$tmp/second.err" "is in use by another crustforge run (process $pid" || why+="second: exit $rc2: $(cat "$tmp/second.err"); "
[ $rc1 -eq 0 ] && complete "$tmp/shared/run.h5" || why+="first: exit $rc1: $(cat "$tmp/first.err"); "
grep -q 'grid cells: 400 x 200' "$tmp/first.out" && h5dump -d /x -H "$tmp/shared/run.h5" | grep -q '( 400 )' || why+="the first run's file is not its own; "
[ ! -e "$tmp/shared/.lock" ] || why+="lock left behind; "
if [ -n "$why" ]; then fail lock "$why"; else pass lock; fi
# a lock file whose process is gone (killed) is taken over
mkdir -p "$tmp/stale" && echo 999999 >"$tmp/stale/.lock"
"$CRUSTFORGE" run "$default" "${tiny[@]}" -output_dir "$tmp/stale" -output_overwrite true >"$tmp/stale.out" 2>"$tmp/stale.err"
rc=$?
if [ $rc -ne 0 ] || ! complete "$tmp/stale/run.h5" || [ -e "$tmp/stale/.lock" ]; then fail stale_lock "exit $rc: $(cat "$tmp/stale.err")"; else pass stale_lock; fi

# --- noconv: one Newton iteration allowed -------------------------------------------------------
"$CRUSTFORGE" run "$default" "${tiny[@]}" -snes_max_it 1 -output_dir "$tmp/noconv" >"$tmp/noconv.out" 2>"$tmp/noconv.err"
rc=$?
if [ $rc -ne 3 ] || ! one_line "$tmp/noconv.err" "steady solve did not converge: DIVERGED_MAX_IT" || [ -e "$tmp/noconv/run.h5" ]; then
  fail noconv "exit $rc: $(cat "$tmp/noconv.err")"
else pass noconv; fi

echo "$failed failed"
if [ $failed -eq 0 ]; then rm -rf "$tmp"; else echo "scratch kept in $tmp"; fi
[ $failed -eq 0 ]
