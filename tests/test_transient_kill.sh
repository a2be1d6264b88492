#!/bin/bash
# End-to-end checks of transient checkpoints (DESIGN 4: a killed and restarted run ends bit for
# bit where the uninterrupted one ends): a run killed with SIGKILL and resumed from its last
# checkpoint, a run stopped with SIGTERM (exit status 4, then resumed), a truncated checkpoint and
# one with a flipped byte refused with one line and status 2 while the previous one still loads,
# and a resume that changes the physics refused.  Serial runs of inputs/transient-rate-halving.yaml on a coarse grid.
# Environment (set by ctest): CRUSTFORGE, CF_SOURCE_DIR, CF_TEST_TMP.
set -u
: "${CRUSTFORGE:?}" "${CF_SOURCE_DIR:?}" "${CF_TEST_TMP:?}"
export OMPI_MCA_ess_singleton_isolated=${OMPI_MCA_ess_singleton_isolated:-1}
export OMPI_MCA_pml=${OMPI_MCA_pml:-ob1} OMPI_MCA_btl=${OMPI_MCA_btl:-self}
mkdir -p "$CF_TEST_TMP" || exit 1
tmp=$(mktemp -d "$CF_TEST_TMP/transient_kill.XXXXXX") || exit 1
scenario=$CF_SOURCE_DIR/inputs/transient-rate-halving.yaml
# 120 steps: the kill below lands while the run is still going only if the run outlasts the
# shell's reaction; with 30 steps a loaded machine once let run b finish first
small=(-grid_width 100 -grid_depth 80 -grid_spacing 10 -time_end 3 -time_step 0.025 -checkpoint_every_steps 8 -checkpoint_keep 3 -snapshots_every_steps 0)
fail=0
bad() { echo "FAIL: $*"; fail=1; }
latest() { ls "$1"/checkpoints/checkpoint_*.h5 2>/dev/null | sort | tail -1; }
same_state() { # the state datasets of two checkpoints, bit for bit
  /usr/bin/python3 -c "import h5py,numpy,sys; a,b=[h5py.File(f,'r') for f in sys.argv[1:3]]; sys.exit(0 if numpy.array_equal(a['state'][()],b['state'][()]) and numpy.array_equal(a['crust_record'][()],b['crust_record'][()]) else 1)" "$1" "$2"
}
# Start a run in the background and wait for its first checkpoint.
start_and_wait() {
  "$CRUSTFORGE" run "$scenario" "${small[@]}" -output_dir "$1" >"$1.log" 2>&1 &
  pid=$!
  for _ in $(seq 1 600); do
    [ -n "$(latest "$1")" ] && return 0
    kill -0 $pid 2>/dev/null || return 1
    sleep 0.05
  done
  return 1
}

# 1. the uninterrupted run
"$CRUSTFORGE" run "$scenario" "${small[@]}" -output_dir "$tmp/a" >"$tmp/a.log" 2>&1 || { bad "uninterrupted run failed"; cat "$tmp/a.log"; exit 1; }
final=$(latest "$tmp/a")

# 2. killed with SIGKILL part way, resumed from the last checkpoint
start_and_wait "$tmp/b" || bad "run b wrote no checkpoint"
kill -9 $pid 2>/dev/null; wait $pid 2>/dev/null
ck=$(latest "$tmp/b")
echo "killed run b at $(basename "$ck")"
[ "$(basename "$ck")" != "$(basename "$final")" ] || bad "run b finished before it was killed"
"$CRUSTFORGE" resume "$ck" >"$tmp/b2.log" 2>&1 || bad "resume of $ck failed: $(tail -1 "$tmp/b2.log")"
same_state "$final" "$(latest "$tmp/b")" || bad "killed and resumed run does not end bit for bit where the uninterrupted one ends"
cmp -s "$tmp/a/crust_vs_time.csv" "$tmp/b/crust_vs_time.csv" || bad "crust_vs_time.csv differs after kill -9 and resume"
cmp -s "$tmp/a/crust_vs_distance.csv" "$tmp/b/crust_vs_distance.csv" || bad "crust_vs_distance.csv differs after kill -9 and resume"

# 3. SIGTERM: finish the step, checkpoint, exit 4; resume to the same end
start_and_wait "$tmp/c" || bad "run c wrote no checkpoint"
kill -TERM $pid; wait $pid; status=$?
[ $status -eq 4 ] || bad "SIGTERM: exit status $status, expected 4"
grep -q "interrupted by SIGTERM" "$tmp/c.log" || bad "SIGTERM: no 'interrupted by SIGTERM' line"
"$CRUSTFORGE" resume "$(latest "$tmp/c")" >"$tmp/c2.log" 2>&1 || bad "resume after SIGTERM failed"
same_state "$final" "$(latest "$tmp/c")" || bad "SIGTERM-stopped and resumed run does not end bit for bit where the uninterrupted one ends"

# 4. a truncated checkpoint is refused (one line, status 2); the previous one still loads
mkdir -p "$tmp/t"
set -- $(ls "$tmp/a"/checkpoints/checkpoint_*.h5 | sort | tail -2)
cp "$1" "$tmp/t/older.h5"; cp "$2" "$tmp/t/newer.h5"
truncate -s $(( $(stat -c %s "$tmp/t/newer.h5") / 2 )) "$tmp/t/newer.h5"
"$CRUSTFORGE" resume "$tmp/t/newer.h5" -output_dir "$tmp/t/out" >"$tmp/t.out" 2>"$tmp/t.err"; status=$?
[ $status -eq 2 ] || bad "truncated checkpoint: exit status $status, expected 2"
[ "$(wc -l <"$tmp/t.err")" -eq 1 ] && grep -q "newer.h5' is truncated: [0-9]* bytes, header says [0-9]*$" "$tmp/t.err" || bad "truncated checkpoint: stderr is not one line naming the cause: $(cat "$tmp/t.err")"
echo "refused: $(cat "$tmp/t.err")"
# one byte flipped in the middle of the data: the integrity header's checksum refuses it
cp "$2" "$tmp/t/flipped.h5"
off=$(( $(stat -c %s "$tmp/t/flipped.h5") / 2 ))
byte=$(od -An -tu1 -j $off -N1 "$tmp/t/flipped.h5" | tr -d ' ')
printf "\\$(printf %03o $(( byte ^ 1 )))" | dd of="$tmp/t/flipped.h5" bs=1 seek=$off conv=notrunc 2>/dev/null
"$CRUSTFORGE" resume "$tmp/t/flipped.h5" -output_dir "$tmp/t/out" >"$tmp/f.out" 2>"$tmp/f.err"; status=$?
[ $status -eq 2 ] && [ "$(wc -l <"$tmp/f.err")" -eq 1 ] && grep -q "flipped.h5' is damaged: checksum mismatch" "$tmp/f.err" || bad "flipped byte: exit status $status, $(cat "$tmp/f.err")"
echo "refused: $(cat "$tmp/f.err")"
"$CRUSTFORGE" resume "$tmp/t/older.h5" -output_dir "$tmp/t/out" >"$tmp/t2.log" 2>&1 || bad "the previous checkpoint does not load: $(tail -1 "$tmp/t2.log")"

# 5. a resume that changes the physics is refused; one that changes the end time is not
"$CRUSTFORGE" resume "$final" -mantle_potential_temperature 1400 -output_dir "$tmp/p" >/dev/null 2>"$tmp/p.err"; status=$?
[ $status -eq 2 ] && grep -q "physics differs" "$tmp/p.err" || bad "changed physics: status $status, $(cat "$tmp/p.err")"
echo "refused: $(cat "$tmp/p.err")"
"$CRUSTFORGE" resume "$final" -time_end 3.5 -output_dir "$tmp/e" >"$tmp/e.log" 2>&1 || bad "extending time.end was refused: $(tail -1 "$tmp/e.log")"

[ $fail -eq 0 ] && echo "transient kill/resume: all checks passed" && rm -rf "$tmp"
exit $fail
