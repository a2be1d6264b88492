#!/bin/bash
# End-to-end checks of crustforge-post (DESIGN 2.5: re-analyse saved output without re-solving):
# - on a coarse run of the default scenario (8 km cells) with the default extraction it writes
#   the solver's own summary.csv again, every column the same text (both are the same
#   computation on the same bits: include/crustforge/rundata.h; solve_seconds comes from the
#   run file's attribute, so it matches too);
# - a narrower focusing width gives no more crust (derived: it only removes melt);
# - it writes into RUN_DIR/post, refuses that directory once it holds files, and never touches
#   the run's own files; keys of the solved model are refused;
# - bad run files (missing, text, HDF5 without our marker, truncated): exit status 2 and one
#   line "crustforge-post: ..." on stderr, nothing written.
#
# Environment (set by ctest): CRUSTFORGE, CRUSTFORGE_POST the programs, CF_SOURCE_DIR the source
# tree, CF_TEST_TMP a scratch directory.
set -u
: "${CRUSTFORGE:?set CRUSTFORGE to the crustforge program}"
: "${CRUSTFORGE_POST:?set CRUSTFORGE_POST to the crustforge-post program}"
: "${CF_SOURCE_DIR:?set CF_SOURCE_DIR to the source tree}"
: "${CF_TEST_TMP:?set CF_TEST_TMP to a scratch directory}"

# One process per run: skip Open MPI's daemon and network set-up (common practice, no source).
export OMPI_MCA_ess_singleton_isolated=${OMPI_MCA_ess_singleton_isolated:-1}
export OMPI_MCA_pml=${OMPI_MCA_pml:-ob1} OMPI_MCA_btl=${OMPI_MCA_btl:-self}

mkdir -p "$CF_TEST_TMP" || exit 1
tmp=$(mktemp -d "$CF_TEST_TMP/post_e2e.XXXXXX") || exit 1
failures=0
fail() { echo "FAIL $*"; failures=$((failures + 1)); }
ok() { echo "ok   $*"; }

# column NAME FILE: the value of column NAME in the one data row of a CSV file.
column() { awk -F, -v name="$1" 'NR == 1 { for (i = 1; i <= NF; i++) if ($i == name) c = i } NR == 2 && c { print $c }' "$2"; }

run=$tmp/run
if ! "$CRUSTFORGE" run "$CF_SOURCE_DIR/inputs/default.yaml" -grid_spacing 8 -output_dir "$run" >"$tmp/run.stdout" 2>"$tmp/run.stderr"; then
  cat "$tmp/run.stderr"
  fail "crustforge run on the default scenario at 8 km"
  exit 1
fi
[ -f "$run/run.h5" ] || { fail "crustforge wrote no $run/run.h5"; exit 1; }
sum_before=$(cd "$run" && find . -maxdepth 1 -type f -exec md5sum {} + | sort)

# --- Default extraction: the solver's summary again ------------------------------------------
if "$CRUSTFORGE_POST" "$run" >"$tmp/post.stdout" 2>"$tmp/post.stderr"; then
  ok "crustforge-post on the saved run"
else
  cat "$tmp/post.stderr"
  fail "crustforge-post on the saved run exited non-zero"
fi
for f in summary.csv profiles.csv pt_paths.csv; do
  [ -s "$run/post/$f" ] || fail "no $run/post/$f"
done
grep -q "crustal thickness" "$tmp/post.stdout" || fail "no summary printed on stdout"
if [ ! -f "$run/summary.csv" ]; then
  fail "the solver wrote no $run/summary.csv (src/app/run.c must call CFPostRun), so nothing to compare"
elif cmp -s "$run/summary.csv" "$run/post/summary.csv"; then
  ok "summary.csv of the solver and of crustforge-post are identical"
else
  fail "summary.csv differs between the solver and crustforge-post:"
  diff <(tr , '\n' <"$run/summary.csv") <(tr , '\n' <"$run/post/summary.csv")
fi
for f in profiles.csv pt_paths.csv; do
  [ ! -f "$run/$f" ] || cmp -s "$run/$f" "$run/post/$f" || fail "$f differs between the solver and crustforge-post"
done
H=$(column crustal_thickness_km "$run/post/summary.csv")
Hs=$(column crustal_thickness_side_flux_km "$run/post/summary.csv")
awk -v a="$H" -v b="$Hs" 'BEGIN { d = a - b; if (d < 0) d = -d; exit !(a > 1 && d <= 1e-10 * a) }' &&
  ok "crust $H km from melting = $Hs km from the side flux (mass balance, derived)" ||
  fail "crust from melting $H km, from the side flux $Hs km"

# --- Other settings, a directory of their own --------------------------------------------------
if "$CRUSTFORGE_POST" "$run/run.h5" -extraction_focusing_width 20 -output_dir "$tmp/fw20" >"$tmp/fw20.stdout" 2>"$tmp/fw20.stderr"; then
  H20=$(column crustal_thickness_km "$tmp/fw20/summary.csv")
  w=$(column focusing_width_km "$tmp/fw20/summary.csv")
  awk -v a="$H20" -v b="$H" -v w="$w" 'BEGIN { exit !(a <= b && a > 0 && w == 20) }' &&
    ok "focusing width 20 km: crust $H20 km <= $H km" || fail "focusing width 20 km: crust $H20 km, all melt $H km, width column '$w'"
else
  cat "$tmp/fw20.stderr"
  fail "crustforge-post -extraction_focusing_width 20"
fi

# --- Refusals: exit 2, one line on stderr ------------------------------------------------------
# expect_bad NAME TEXT CMD...: CMD exits 2 with one stderr line "crustforge-post: ..." holding TEXT.
expect_bad() {
  local name=$1 text=$2 rc n
  shift 2
  "$@" >"$tmp/$name.stdout" 2>"$tmp/$name.stderr" </dev/null
  rc=$?
  n=$(awk 'END { print NR }' "$tmp/$name.stderr")
  if [ "$rc" -eq 2 ] && [ "$n" -eq 1 ] && grep -q '^crustforge-post: ' "$tmp/$name.stderr" && grep -qF -- "$text" "$tmp/$name.stderr"; then
    ok "$name: $(cat "$tmp/$name.stderr")"
  else
    fail "$name: exit $rc, $n stderr lines, expected 2 and one line naming '$text':"
    sed 's/^/     /' "$tmp/$name.stderr"
  fi
}
expect_bad post_dir_again "already holds files" "$CRUSTFORGE_POST" "$run"
expect_bad solved_model_key "mantle" "$CRUSTFORGE_POST" "$run" -mantle_potential_temperature 1400 -output_dir "$tmp/never1"
expect_bad misspelled_key "extraction.focusing_widht" "$CRUSTFORGE_POST" "$run" -extraction_focusing_widht 20 -output_dir "$tmp/never2"
expect_bad missing_file "No such file" "$CRUSTFORGE_POST" "$tmp/absent/run.h5"
expect_bad missing_dir_file "No such file" "$CRUSTFORGE_POST" "$tmp"
echo "not a run" >"$tmp/text.h5"
expect_bad text_file "not an HDF5 file" "$CRUSTFORGE_POST" "$tmp/text.h5"
if /usr/bin/python3 -c 'import sys, h5py; h5py.File(sys.argv[1], "w").close()' "$tmp/foreign.h5"; then
  expect_bad foreign_hdf5 "not a crustforge run" "$CRUSTFORGE_POST" "$tmp/foreign.h5"
else
  fail "h5py could not write $tmp/foreign.h5"
fi
head -c 4096 "$run/run.h5" >"$tmp/truncated.h5"
expect_bad truncated_hdf5 "truncated.h5" "$CRUSTFORGE_POST" "$tmp/truncated.h5"
expect_bad no_run "no run given" "$CRUSTFORGE_POST" -extraction_focusing_width 20
for d in never1 never2 absent/post post; do [ ! -e "$tmp/$d" ] || fail "$tmp/$d was created by a refused run"; done

sum_after=$(cd "$run" && find . -maxdepth 1 -type f -exec md5sum {} + | sort)
[ "$sum_before" = "$sum_after" ] && ok "the run's own files are unchanged" || fail "the run's own files changed"

"$CRUSTFORGE_POST" --help | grep -q "extraction" && ok "--help lists the keys" || fail "--help"
"$CRUSTFORGE_POST" --version | grep -q "^crustforge-post " && ok "--version" || fail "--version"

if [ "$failures" -eq 0 ]; then
  rm -rf "$tmp"
  echo "post_e2e: all passed"
  exit 0
fi
echo "post_e2e: $failures failed (files kept in $tmp)"
exit 1
