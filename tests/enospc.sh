#!/bin/bash
# A full disk (ENOSPC) while the run file is written, end to end.  Each case must end with exit
# status 2 and a line naming "No space left on device", leave no file that looks complete, and
# leave an earlier output in the same directory untouched.
#   tmpfs   a real tiny file system (mount -t tmpfs), where the container allows it: too small for
#           the file's header (refused from the free space before the file exists), too small
#           for its fields (the reservation of room fails part way), and big enough (the run
#           completes and its file is the size of the same run written elsewhere).
#   shim    the same two failures staged by an LD_PRELOAD shim (tests/enospc_shim.c), always run,
#           so the test means the same where mounting is forbidden; and a disk that fills while
#           HDF5 writes a field, on a file system that cannot reserve room (fallocate
#           unsupported): then Open MPI and HDF5 print their own lines before and after ours,
#           so only the last of ours is checked, with the exit status and the files.
# Environment (set by ctest): CRUSTFORGE, CF_SOURCE_DIR, CF_TEST_TMP, CF_ENOSPC_SHIM.
set -u
: "${CRUSTFORGE:?}" "${CF_SOURCE_DIR:?}" "${CF_TEST_TMP:?}" "${CF_ENOSPC_SHIM:?}"
export OMPI_MCA_ess_singleton_isolated=${OMPI_MCA_ess_singleton_isolated:-1}
export OMPI_MCA_pml=${OMPI_MCA_pml:-ob1} OMPI_MCA_btl=${OMPI_MCA_btl:-self}
mkdir -p "$CF_TEST_TMP" || exit 1
tmp=$(mktemp -d "$CF_TEST_TMP/enospc.XXXXXX") || exit 1
export OMPI_MCA_orte_tmpdir_base=$tmp/ompi # Open MPI's session files stay off the full disk
default=$CF_SOURCE_DIR/inputs/default.yaml
tiny=(-grid_spacing 10 -grid_width 200 -grid_depth 200 -melting_model linear -output_figures false) # 20 x 20 cells, a 78 KB run file
failed=0
# Under the sanitizers the refused runs go without the leak check: when a write fails inside
# HDF5 the file's viewer is abandoned, not closed (closing a file HDF5 failed to write can crash
# it), a leak of about 1.7 kB on that error path only.
noleak=${ASAN_OPTIONS:+$ASAN_OPTIONS:}detect_leaks=0
fail() { echo "FAIL $1: $2"; failed=$((failed + 1)); }
pass() { echo "ok   $1: $2"; }
nospace="^crustforge: run file '.*/run.h5'.*: No space left on device"

earlier() { mkdir -p "$1" && echo kept >"$1/earlier-run.h5"; }
# nothing in DIR but the earlier file (temporaries are removed too)
only_earlier() { [ "$(ls -A "$1")" = earlier-run.h5 ] && [ "$(cat "$1/earlier-run.h5")" = kept ]; }
# check NAME DIR RC ERRFILE LINES: exit 2, the cause on the last line (the only one when LINES is
# "one"), nothing left but the earlier output.
check() {
  local why=""
  [ "$3" -eq 2 ] || why+="exit $3; "
  if [ "$5" = one ]; then [ "$(awk 'END { print NR }' "$4")" -eq 1 ] || why+="not one line; "; fi
  tail -n 1 "$4" | grep -q "$nospace" || why+="the last line does not name ENOSPC; "
  only_earlier "$2" || why+="the directory holds: $(ls -A "$2" | tr '\n' ' '); "
  if [ -n "$why" ]; then fail "$1" "$why stderr: $(tr '\n' '|' <"$4")"; else pass "$1" "$(tail -n 1 "$4")"; fi
}
run() { # run DIR [env ...]: the tiny case into DIR; stderr in DIR.err
  local d=$1
  shift
  env "$@" "$CRUSTFORGE" run "$default" "${tiny[@]}" -output_dir "$d" -output_overwrite true >"$d.out" 2>"$d.err"
}

# --- the same run on a big disk: its file size -------------------------------------------------
mkdir -p "$tmp/big" # big/run and mnt/run: paths of one length, so the stored scenarios are too
run "$tmp/big/run" || { fail roomy "the reference run failed: $(cat "$tmp/big/run.err")"; }
size=$(stat -c %s "$tmp/big/run/run.h5" 2>/dev/null || echo 0)

# --- tmpfs --------------------------------------------------------------------------------------
mnt=$tmp/mnt
mkdir -p "$mnt"
trap 'umount "$mnt" 2>/dev/null' EXIT
if mount -t tmpfs -o size=64k tmpfs "$mnt" 2>/dev/null; then
  earlier "$mnt/run"
  run "$mnt/run" ASAN_OPTIONS="$noleak"
  check tmpfs_header "$mnt/run" $? "$mnt/run.err" one
  umount "$mnt"
  mount -t tmpfs -o size=150k tmpfs "$mnt"
  earlier "$mnt/run"
  run "$mnt/run" ASAN_OPTIONS="$noleak"
  check tmpfs_fields "$mnt/run" $? "$mnt/run.err" one
  umount "$mnt"
  mount -t tmpfs -o size=256k tmpfs "$mnt"
  run "$mnt/run"
  rc=$?
  got=$(stat -c %s "$mnt/run/run.h5" 2>/dev/null || echo 0)
  used=$(df -k --output=used "$mnt" | tail -n 1 | tr -d ' ')
  # the reserved room is given back: what the disk holds is about what the files hold (KB)
  held=$(du -sk --apparent-size "$mnt" | cut -f1)
  if [ $rc -ne 0 ] || [ "$got" -ne "$size" ] || [ "$used" -gt $((held + 16)) ]; then
    fail tmpfs_fits "exit $rc, run.h5 $got bytes (elsewhere $size), disk used $used KB for $held KB of files: $(cat "$mnt/run.err")"
  else pass tmpfs_fits "run.h5 $got bytes, disk used $used KB for $held KB of files"; fi
  umount "$mnt"
else
  echo "     (mount -t tmpfs is not allowed here: the shim cases stand in for it)"
fi

# --- shim ---------------------------------------------------------------------------------------
# The shim sits in front of the sanitizer runtime in a sanitized build: let ASan accept that.
shim=(LD_PRELOAD="$CF_ENOSPC_SHIM" ASAN_OPTIONS="$noleak:verify_asan_link_order=0")
d=$tmp/shim_header
earlier "$d"
run "$d" "${shim[@]}" CF_ENOSPC_DIR="$d" CF_ENOSPC_BYTES=60000
check shim_header "$d" $? "$d.err" one
d=$tmp/shim_fields
earlier "$d"
run "$d" "${shim[@]}" CF_ENOSPC_DIR="$d" CF_ENOSPC_BYTES=150000
check shim_fields "$d" $? "$d.err" one
d=$tmp/shim_during_write
earlier "$d"
run "$d" "${shim[@]}" CF_ENOSPC_DIR="$d" CF_ENOSPC_BYTES=40000 CF_ENOSPC_NO_FALLOCATE=1
rc=$?
grep -v -e '^mca_fbtl_posix_pwritev: error in (p)write(v):No space left on device$' -e '^HDF5: infinite loop closing library$' -e '^ *[A-Za-z_,]*$' "$d.err" >"$d.ours"
check shim_during_write "$d" $rc "$d.ours" one

echo "$failed failed"
if [ $failed -eq 0 ]; then rm -rf "$tmp"; else echo "scratch kept in $tmp"; fi
[ $failed -eq 0 ]
