#!/bin/bash
# End-to-end checks of the command line against bad input (DESIGN.md section 4: a one-line error
# naming the key, a non-zero exit status, nothing written) and a few positive controls.
#
# Every tests/bad_inputs/*.yaml is run as `$CRUSTFORGE run FILE -output_dir DIR` with a fresh DIR;
# its first line `# expect: TEXT` names what the error message must contain.  Each case must:
# exit with status 2, print exactly one line "crustforge: ..." on stderr containing TEXT, and
# leave DIR uncreated.  More cases that cannot be committed files (empty, binary, missing) and the
# command-line cases are made below.  Cases run CF_JOBS at a time (default 4): each run spends
# most of its time starting MPI.
#
# Environment (set by ctest): CRUSTFORGE the program, CF_SOURCE_DIR the source tree,
# CF_TEST_TMP a scratch directory.
set -u
: "${CRUSTFORGE:?set CRUSTFORGE to the crustforge program}"
: "${CF_SOURCE_DIR:?set CF_SOURCE_DIR to the source tree}"
: "${CF_TEST_TMP:?set CF_TEST_TMP to a scratch directory}"

# Every run is one process: skip Open MPI's daemon and network set-up, which cost about half a
# second a run on the build machine (measured).
export OMPI_MCA_ess_singleton_isolated=${OMPI_MCA_ess_singleton_isolated:-1}
export OMPI_MCA_pml=${OMPI_MCA_pml:-ob1} OMPI_MCA_btl=${OMPI_MCA_btl:-self}
# Under the sanitizers, LeakSanitizer's table of suppressions used is not the program's output.
export LSAN_OPTIONS=${LSAN_OPTIONS:+$LSAN_OPTIONS:}print_suppressions=0

corpus=$CF_SOURCE_DIR/tests/bad_inputs
default=$CF_SOURCE_DIR/inputs/default.yaml
mkdir -p "$CF_TEST_TMP" || exit 1
tmp=$(mktemp -d "$CF_TEST_TMP/bad_inputs.XXXXXX") || exit 1
results=$tmp/results
mkdir -p "$results"
jobs_max=${CF_JOBS:-4}
ncase=0

# Lines in a file, counting a last line without a newline.
nlines() { awk 'END { print NR }' "$1"; }

# in_session NAME CMD...: run CMD with its own Open MPI session directory, since runs in parallel
# race to create and remove a shared one.
in_session() {
  local dir=$tmp/mpi/$1
  shift
  mkdir -p "$dir" && OMPI_MCA_orte_tmpdir_base=$dir "$@"
}

# expect_bad NAME TEXT OUTDIR CMD...: CMD must exit 2 with one stderr line naming TEXT and must
# not create OUTDIR.
expect_bad() {
  local name=$1 text=$2 out=$3 rc n why=()
  shift 3
  in_session "$name" "$@" >"$tmp/$name.stdout" 2>"$tmp/$name.stderr" </dev/null
  rc=$?
  n=$(nlines "$tmp/$name.stderr")
  [ "$rc" -eq 2 ] || why+=("exit status $rc, expected 2")
  [ "$n" -eq 1 ] || why+=("stderr has $n lines, expected 1")
  head -n 1 "$tmp/$name.stderr" | grep -q '^crustforge: ' || why+=("stderr does not start with 'crustforge: '")
  grep -qF -- "$text" "$tmp/$name.stderr" || why+=("stderr does not contain '$text'")
  [ ! -e "$out" ] || why+=("$out was created")
  report "$name" "$*" "${why[@]}"
}

# expect_ok NAME OUTDIR CMD...: CMD must exit 0 and create OUTDIR.
expect_ok() {
  local name=$1 out=$2 rc why=()
  shift 2
  in_session "$name" "$@" >"$tmp/$name.stdout" 2>"$tmp/$name.stderr" </dev/null
  rc=$?
  [ "$rc" -eq 0 ] || why+=("exit status $rc, expected 0")
  [ -d "$out" ] || why+=("$out was not created")
  report "$name" "$*" "${why[@]}"
}

# report NAME COMMAND [PROBLEM...]: record the case's result for the summary.
report() {
  local name=$1 cmd=$2
  shift 2
  if [ $# -eq 0 ]; then
    echo "ok   $name" >"$results/$name"
  else
    {
      echo "FAIL $name: $(IFS=';'; echo "$*")"
      echo "     command: $cmd"
      sed 's/^/     stderr: /' "$tmp/$name.stderr"
    } >"$results/$name"
  fi
}

# spawn FUNCTION ARGS...: run one case in the background, at most jobs_max at a time.
spawn() {
  while [ "$(jobs -rp | wc -l)" -ge "$jobs_max" ]; do wait -n; done
  ncase=$((ncase + 1))
  "$@" &
}

# --- The committed corpus ---------------------------------------------------------------------
for f in "$corpus"/*.yaml; do
  name=$(basename "$f" .yaml)
  text=$(sed -n '1s/^# expect: //p' "$f")
  if [ -z "$text" ]; then
    echo "FAIL $name: first line is not '# expect: TEXT'" >"$results/$name"
    ncase=$((ncase + 1))
    continue
  fi
  spawn expect_bad "$name" "$text" "$tmp/out-$name" "$CRUSTFORGE" run "$f" -output_dir "$tmp/out-$name"
done

# --- Files made here: not committed as they are empty, binary or absent ------------------------
: >"$tmp/empty.yaml"
printf 'ridge:\0\0\0\001\377 full_spreading_rate: 60\0\n' >"$tmp/binary.yaml"
spawn expect_bad gen_empty_file "holds no keys" "$tmp/out-empty" "$CRUSTFORGE" run "$tmp/empty.yaml" -output_dir "$tmp/out-empty"
spawn expect_bad gen_binary_file "is binary" "$tmp/out-binary" "$CRUSTFORGE" run "$tmp/binary.yaml" -output_dir "$tmp/out-binary"
spawn expect_bad gen_missing_file "no-such-scenario.yaml" "$tmp/out-missing" "$CRUSTFORGE" run "$tmp/no-such-scenario.yaml" -output_dir "$tmp/out-missing"
spawn expect_bad gen_directory "is a directory" "$tmp/out-directory" "$CRUSTFORGE" run "$corpus" -output_dir "$tmp/out-directory"
spawn expect_bad gen_no_scenario "no scenario file given" "$tmp/out-none" "$CRUSTFORGE" run -output_dir "$tmp/out-none"

# --- Bad values on the command line, over the default scenario ---------------------------------
# On the tiny grid, so that a value wrongly accepted costs a second, not a full solve.
tiny=(-grid_spacing 20 -grid_width 200 -grid_depth 200 -melting_model linear) # 10 x 10 cells
# The issue's own example, exactly as typed, run from a copy of the tree's inputs so that the
# scenario's own output.dir (relative) would land in scratch if anything were written.
mkdir -p "$tmp/exact/inputs" && cp "$default" "$tmp/exact/inputs/default.yaml"
spawn expect_bad cli_temperature_900_exact "mantle.potential_temperature" "$tmp/exact/output" \
  bash -c 'cd "$1" && exec "$2" run inputs/default.yaml -mantle_potential_temperature 900' _ "$tmp/exact" "$CRUSTFORGE"
spawn expect_bad cli_temperature_900 "mantle.potential_temperature: 900 C" "$tmp/out-cli-900" \
  "$CRUSTFORGE" run "$default" "${tiny[@]}" -mantle_potential_temperature 900 -output_dir "$tmp/out-cli-900"
spawn expect_bad cli_rate_negative "ridge.full_spreading_rate: -5 mm/yr" "$tmp/out-cli-rate" \
  "$CRUSTFORGE" run "$default" "${tiny[@]}" -ridge_full_spreading_rate -5 -output_dir "$tmp/out-cli-rate"
spawn expect_bad cli_word "grid.spacing: 'fine'" "$tmp/out-cli-word" \
  "$CRUSTFORGE" run "$default" "${tiny[@]}" -grid_spacing fine -output_dir "$tmp/out-cli-word"
spawn expect_bad cli_misspelled "mantle.potentail_temperature" "$tmp/out-cli-typo" \
  "$CRUSTFORGE" run "$default" "${tiny[@]}" -mantle_potentail_temperature 1300 -output_dir "$tmp/out-cli-typo"
spawn expect_bad cli_overwrite "output.overwrite" "$tmp/out-cli-bool" \
  "$CRUSTFORGE" run "$default" "${tiny[@]}" -output_overwrite 2 -output_dir "$tmp/out-cli-bool"

# --- Output directory: refused when it holds files, unless output.overwrite --------------------
# A small scenario that leaves output.overwrite at its default (false); default.yaml sets it true.
printf 'melting:\n  model: linear\ngrid: {width: 200, depth: 200, spacing: 20}\n' >"$tmp/small.yaml"
mkdir -p "$tmp/full" && echo kept >"$tmp/full/earlier-run.h5"
cp "$tmp/small.yaml" "$tmp/afile"
spawn expect_bad out_dir_holds_files "output.dir" "$tmp/full/crustforge-never" \
  "$CRUSTFORGE" run "$tmp/small.yaml" -output_dir "$tmp/full"
spawn expect_bad out_dir_is_a_file "output.dir" "$tmp/never" \
  "$CRUSTFORGE" run "$tmp/small.yaml" -output_dir "$tmp/afile"

# --- Positive controls: exit 0 and output.dir created ------------------------------------------
# The default scenario on a 10 x 10 grid (at its full 400 x 200 cells a solve takes minutes; that
# the file itself validates is checked in-process by test_config).
spawn expect_ok ok_default_tiny "$tmp/ok-tiny/nested" "$CRUSTFORGE" run "$default" "${tiny[@]}" -output_dir "$tmp/ok-tiny/nested"
mkdir -p "$tmp/full2" && echo kept >"$tmp/full2/earlier-run.h5"
spawn expect_ok ok_overwrite "$tmp/full2" "$CRUSTFORGE" run "$tmp/small.yaml" -output_dir "$tmp/full2" -output_overwrite true

# --- Validate only: values AT a range limit are accepted (no solve, nothing written) ------------
# Every limit of every key is checked in-process by test_limits; these go through the program.
expect_check_ok() {
  local name=$1 out=$2 rc why=()
  shift 2
  in_session "$name" "$@" >"$tmp/$name.stdout" 2>"$tmp/$name.stderr" </dev/null
  rc=$?
  [ "$rc" -eq 0 ] || why+=("exit status $rc, expected 0")
  grep -q '^check: scenario .* is valid' "$tmp/$name.stdout" || why+=("no 'check: ... is valid' line")
  [ ! -e "$out" ] || why+=("$out was created")
  report "$name" "$*" "${why[@]}"
}
spawn expect_check_ok check_at_upper_limits "$tmp/out-check-hi" "$CRUSTFORGE" check "$default" -output_dir "$tmp/out-check-hi" \
  -mantle_potential_temperature 1800 -mantle_water 5000 -ridge_full_spreading_rate 300 -surface_temperature 50 -hydrothermal_nusselt 100 -mantle_heat_capacity 2000
spawn expect_check_ok check_at_lower_limits "$tmp/out-check-lo" "$CRUSTFORGE" check "$default" -output_dir "$tmp/out-check-lo" \
  -mantle_potential_temperature 1000 -mantle_water 0 -surface_temperature -10 -hydrothermal_nusselt 1 -mantle_conductivity 0.5 -checkpoint_keep 1
spawn expect_bad check_past_upper_limit "mantle.water: 5000.01 ppm is outside the allowed range" "$tmp/out-check-past" \
  "$CRUSTFORGE" check "$default" -mantle_water 5000.01 -output_dir "$tmp/out-check-past"
spawn expect_bad check_no_file "check: no scenario file given" "$tmp/none" "$CRUSTFORGE" check

# --- Commands other than run -------------------------------------------------------------------
help_check() {
  local why=() rc section key unit listed
  in_session help "$CRUSTFORGE" --help >"$tmp/help.stdout" 2>"$tmp/help.stderr"
  rc=$?
  [ "$rc" -eq 0 ] || why+=("exit status $rc, expected 0")
  # "section.key unit" for each key line of the listing ("-" for keys without a unit)
  listed=$(awk '/^  [a-z0-9_]+:/ { s = $1; sub(":", "", s) }
                /^    [a-z0-9_]+ +default / { print s "." $1 " " ($4 == "range" ? "-" : $4) }' "$tmp/help.stdout")
  # Every key of the scenario contract (src/config/keys.c) with its unit, and the linear model's.
  while read -r key unit; do
    grep -qxF -- "$key $unit" <<<"$listed" || why+=("--help does not list '$key' in '$unit'")
  done <<'EOF'
ridge.full_spreading_rate mm/yr
mantle.potential_temperature C
mantle.water ppm
mantle.density kg/m3
mantle.heat_capacity J/kg/K
mantle.conductivity W/m/K
mantle.thermal_expansivity 1/K
mantle.adiabatic_gradient K/km
crust.density kg/m3
ocean.water_density kg/m3
surface.temperature C
constants.gravity m/s2
grid.width km
grid.depth km
grid.spacing km
hydrothermal.nusselt 1
hydrothermal.temperature_cutoff C
hydrothermal.depth_cutoff km
hydrothermal.temperature_width C
hydrothermal.depth_width km
melting.model -
melting.entropy_of_fusion J/kg/K
output.dir -
output.overwrite -
linear.solidus_surface C
linear.solidus_slope C/GPa
linear.liquidus_surface C
linear.liquidus_slope C/GPa
EOF
  report help "$CRUSTFORGE --help" "${why[@]}"
}

version_check() {
  local why=() rc
  in_session version "$CRUSTFORGE" --version >"$tmp/version.stdout" 2>"$tmp/version.stderr"
  rc=$?
  [ "$rc" -eq 0 ] || why+=("exit status $rc, expected 0")
  grep -qE '^crustforge [0-9]+\.[0-9]+\.[0-9]+' "$tmp/version.stdout" || why+=("no 'crustforge X.Y.Z' on stdout")
  report version "$CRUSTFORGE --version" "${why[@]}"
}

unknown_command_check() {
  local why=() rc
  in_session bogus "$CRUSTFORGE" bogus >"$tmp/bogus.stdout" 2>"$tmp/bogus.stderr"
  rc=$?
  [ "$rc" -eq 2 ] || why+=("exit status $rc, expected 2")
  tail -n 1 "$tmp/bogus.stderr" | grep -qF "unknown command 'bogus'" || why+=("last stderr line does not name 'bogus'")
  report bogus "$CRUSTFORGE bogus" "${why[@]}"
}

spawn help_check
spawn version_check
spawn unknown_command_check
# Until a command exists it says "not available yet"; once it does, a missing file is named.
# (A TEXT of several lines matches any one of them: grep -F takes each line as a pattern.)
spawn expect_bad cmd_sweep $'sweep: not available yet\nno-such-sweep.yaml' "$tmp/none" "$CRUSTFORGE" sweep "$tmp/no-such-sweep.yaml"
spawn expect_bad cmd_resume $'resume: not available yet\nno-such-checkpoint.h5' "$tmp/none" "$CRUSTFORGE" resume "$tmp/no-such-checkpoint.h5"
wait

# The refused directory keeps exactly what it held.
if [ "$(ls -A "$tmp/full")" != "earlier-run.h5" ] || [ "$(cat "$tmp/full/earlier-run.h5")" != kept ]; then
  echo "FAIL out_dir_untouched: $tmp/full changed: $(ls -A "$tmp/full" | tr '\n' ' ')" >"$results/out_dir_untouched"
else
  echo "ok   out_dir_untouched" >"$results/out_dir_untouched"
fi
ncase=$((ncase + 1))

# --- Summary -----------------------------------------------------------------------------------
cat "$results"/*
passed=$(cat "$results"/* | grep -c '^ok ')
failed=$(cat "$results"/* | grep -c '^FAIL ')
nresults=$(ls "$results" | wc -l)
if [ "$nresults" -ne "$ncase" ]; then
  echo "FAIL: $ncase cases started, $nresults reported"
  failed=$((failed + ncase - nresults))
fi
echo "$passed passed, $failed failed"
if [ "$failed" -eq 0 ]; then rm -rf "$tmp"; else echo "scratch kept in $tmp"; fi
[ "$failed" -eq 0 ]
