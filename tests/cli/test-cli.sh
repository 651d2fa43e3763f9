#!/usr/bin/env bash
# test-cli.sh: tests of hiplever-cli against the bundled examples.
#
# Copyright 2026 the hiplever developers
# SPDX-License-Identifier: GPL-3.0-or-later
#
# Usage: test-cli.sh CLI SOURCE_DIR
# Prints one line per failure and, last, "cli: N passed, M failed"; exits
# non-zero on any failure.
set -u
export LC_ALL=C TZ=UTC

if [ $# -ne 2 ]; then
  echo "usage: $0 CLI SOURCE_DIR" >&2
  exit 2
fi
CLI=$1
SRC=$2
HERE=$SRC/tests/cli
XSD=$SRC/data/hiplever-plan.xsd
HEADER=$HERE/expected-header.csv
CHECK="python3 $HERE/cli-check.py"
CAUTION_START='Planning aid only'

WORK=$(mktemp -d "${TMPDIR:-/tmp}/hiplever-cli-test.XXXXXX")
trap 'rm -rf "$WORK"' EXIT

passed=0
failed=0

pass () { passed=$((passed + 1)); }
fail () { failed=$((failed + 1)); echo "FAIL: $*"; }
check () {
  local what=$1
  shift
  if "$@"; then pass; else fail "$what"; fi
}

# run ARGS...: runs the CLI; stdout in $WORK/out, stderr in $WORK/err, the
# exit status in $rc.
run () {
  "$CLI" "$@" >"$WORK/out" 2>"$WORK/err"
  rc=$?
}

expect_rc () {
  local want=$1 what=$2
  if [ "$rc" -eq "$want" ]; then
    pass
  else
    fail "$what: exit status $rc, expected $want (stderr: $(head -c 300 "$WORK/err"))"
  fi
}

out_has () { grep -q -e "$1" "$WORK/out"; }
err_has () { grep -q -e "$1" "$WORK/err"; }
err_empty () { [ ! -s "$WORK/err" ]; }
valid_xml () { xmllint --noout --schema "$XSD" "$1" 2>"$WORK/xmllint"; }
no_file () { [ ! -e "$1" ]; }
differ () { ! cmp -s "$1" "$2"; }
out_lacks () { ! grep -q -e "$1" "$WORK/out"; }
have () { command -v "$1" >/dev/null; }
no_temp_left () { [ -z "$(find "$1" -name '.*' -type f)" ]; }
quote_re () { printf '%s' "$1" | sed 's/[][\.*^$/]/\\&/g'; }

# ---- the tools and the examples --------------------------------------------

check "xmllint is installed" have xmllint
check "python3 is installed" have python3

shopt -s nullglob
EXAMPLES=("$SRC"/data/examples/*.hlplan)
shopt -u nullglob
check "at least three bundled examples in data/examples" [ ${#EXAMPLES[@]} -ge 3 ]
DEMO=$SRC/data/examples/demo.hlplan
check "demo.hlplan exists" [ -f "$DEMO" ]

# ---- help and version ---------------------------------------------------------

run --help
expect_rc 0 "--help"
for word in solve summary validate batch bench --format -o --csv --quick \
            --help --version text csv xml; do
  check "--help mentions $word" out_has "$(quote_re "$word")"
done
check "--help shows the caution" out_has "$CAUTION_START"

run solve --help
expect_rc 0 "solve --help"
check "solve --help names --format" out_has "--format"

run --version
expect_rc 0 "--version"
check "--version gives the program version" \
  grep -qE '^hiplever-cli [0-9]+\.[0-9]+\.[0-9]+$' "$WORK/out"
check "--version gives the model version" grep -qE 'model [0-9]+\.[0-9]+' "$WORK/out"

# ---- every example ------------------------------------------------------------

declare -A OPTIONS
for plan in "${EXAMPLES[@]}"; do
  name=$(basename "$plan")

  run validate "$plan"
  expect_rc 0 "validate $name"
  check "validate $name prints 'valid (N options)'" \
    grep -qE "^$(quote_re "$plan"): valid \([0-9]+ options?\)$" "$WORK/out"
  n=$(sed -nE 's/.*: valid \(([0-9]+) options?\)$/\1/p' "$WORK/out")
  OPTIONS[$plan]=${n:-0}
  in_file=$(grep -o '<option ' "$plan" | wc -l)
  check "validate $name counts the options in the file ($n, $in_file <option> elements)" \
    [ "${n:-x}" = "$in_file" ]

  run solve "$plan"
  expect_rc 0 "solve $name"
  check "solve $name (text) has the table" out_has "^Abductor moment arm (mm)"
  check "solve $name (text) has native" out_has "native"
  check "solve $name (text) has the demand over capacity" \
    out_has "^Abductor demand over capacity  *[0-9]"
  check "solve $name (text) states the capacity assumption" \
    out_has "^Abductor capacity: [0-9.]* N m per kg"
  check "solve $name (text) has the flags" out_has "^Flags:"
  check "solve $name (text) ends with the caution" \
    grep -q "^Caution: $CAUTION_START" <(tail -n 1 "$WORK/out")
  cp "$WORK/out" "$WORK/$name.txt"

  run solve "$plan" --format csv
  expect_rc 0 "solve $name --format csv"
  cp "$WORK/out" "$WORK/$name.csv"
  rows=$($CHECK csv "$WORK/$name.csv" "$HEADER" 2>&1)
  check "solve $name csv: $rows" [ "$?" -eq 0 ]
  check "solve $name csv has 1 + ${OPTIONS[$plan]} rows (got $rows)" \
    [ "$rows" = "$((1 + ${OPTIONS[$plan]}))" ]
  check "solve $name csv header is exact" \
    cmp -s <(head -n 1 "$WORK/$name.csv") "$HEADER"
  agree=$($CHECK text-vs-csv "$WORK/$name.txt" "$WORK/$name.csv" 2>&1)
  check "solve $name: text and csv agree: $agree" [ "$?" -eq 0 ]

  run solve --format=xml "$plan"
  expect_rc 0 "solve $name --format=xml"
  cp "$WORK/out" "$WORK/$name.xml"
  check "solve $name xml validates: $(cat "$WORK/xmllint" 2>/dev/null)" \
    valid_xml "$WORK/$name.xml"
  check "solve $name xml has the caution" grep -q "$CAUTION_START" "$WORK/$name.xml"

  run summary "$plan" -o "$WORK/$name.summary.xml"
  expect_rc 0 "summary $name"
  check "summary $name prints nothing" [ ! -s "$WORK/out" ]
  check "summary $name writes a file that validates" \
    valid_xml "$WORK/$name.summary.xml"
  check "summary $name has the caution" \
    grep -q "$CAUTION_START" "$WORK/$name.summary.xml"

  # A summary is a plan file too: it loads and solves the same.
  run solve "$WORK/$name.summary.xml" --format csv
  expect_rc 0 "solve the summary of $name"
  check "the summary of $name solves as the plan" cmp -s "$WORK/out" "$WORK/$name.csv"
done

# ---- several plans ------------------------------------------------------------

run validate "${EXAMPLES[@]}"
expect_rc 0 "validate every example"
check "validate prints one line per plan" \
  [ "$(grep -c ': valid (' "$WORK/out")" -eq ${#EXAMPLES[@]} ]

run batch "${EXAMPLES[@]}" --csv "$WORK/batch.csv"
expect_rc 0 "batch every example"
check "batch prints nothing on stdout" [ ! -s "$WORK/out" ]
check "batch shows no progress when stderr is not a terminal" err_empty
specs=()
for plan in "${EXAMPLES[@]}"; do specs+=(--plan "$plan:${OPTIONS[$plan]}"); done
rows=$($CHECK csv "$WORK/batch.csv" "$HEADER" "${specs[@]}" 2>&1)
check "batch csv: $rows" [ "$?" -eq 0 ]
expected_rows=0
for plan in "${EXAMPLES[@]}"; do
  expected_rows=$((expected_rows + 1 + ${OPTIONS[$plan]}))
done
check "batch has one row per plan and option ($rows, expected $expected_rows)" \
  [ "$rows" = "$expected_rows" ]
check "batch rows are the solve rows with the plan in front" \
  cmp -s <(grep -F "$DEMO," "$WORK/batch.csv") \
         <(tail -n +2 "$WORK/demo.hlplan.csv" | sed "s|^|$DEMO,|")

# A plan file name that needs CSV quoting in the plan column.
cp "$DEMO" "$WORK/a,b.hlplan"
run batch "$WORK/a,b.hlplan" --csv "$WORK/comma.csv"
expect_rc 0 "batch a plan whose name has a comma"
check "the plan column is quoted and reads back" \
  [ "$($CHECK field "$WORK/comma.csv" 0 plan 2>&1)" = "$WORK/a,b.hlplan" ]

if command -v script >/dev/null; then
  script -qec "$(printf '%q ' "$CLI" batch "${EXAMPLES[@]}" --csv "$WORK/tty.csv")" \
    /dev/null >"$WORK/tty.out" 2>&1
  check "batch shows N/M progress on a terminal" \
    grep -q "${#EXAMPLES[@]}/${#EXAMPLES[@]}" "$WORK/tty.out"
  check "batch on a terminal writes the same table" cmp -s "$WORK/tty.csv" "$WORK/batch.csv"
else
  fail "script (util-linux) is needed for the terminal progress test"
fi

# ---- bad input: files derived from the demo -------------------------------------

cp "$DEMO" "$WORK/good.hlplan"
head -c "$(($(wc -c <"$DEMO") / 2))" "$DEMO" >"$WORK/truncated.hlplan"
printf '<?xml version="1.0"?>\n<plan xmlns="urn:hiplever:plan" format-version="1">\n<case label="x"\n</plan>\n' \
  >"$WORK/malformed.hlplan"
# The first coordinate of the hip centre becomes text.
sed -E '0,/name="hip-centre"/{/name="hip-centre"/s/x-mm="[^"]*"/x-mm="abc"/}' "$DEMO" \
  >"$WORK/bad-number.hlplan"
sed -E '/name="hip-centre"/d' "$DEMO" >"$WORK/no-hip-centre.hlplan"
check "bad-number.hlplan differs from the demo" differ "$DEMO" "$WORK/bad-number.hlplan"
check "no-hip-centre.hlplan differs from the demo" differ "$DEMO" "$WORK/no-hip-centre.hlplan"

line_of () { grep -n -m 1 -e "$2" "$1" | cut -d: -f1; }

run solve "$WORK/missing.hlplan"
expect_rc 1 "solve a file that does not exist"
check "a missing file is named" err_has "^hiplever-cli: $WORK/missing.hlplan"

run solve "$WORK/truncated.hlplan"
expect_rc 1 "solve a truncated file"
check "a truncated file gives FILE:LINE" err_has "^hiplever-cli: $WORK/truncated.hlplan:[0-9][0-9]*: "

run solve "$WORK/malformed.hlplan"
expect_rc 1 "solve malformed XML"
check "malformed XML gives FILE:LINE" err_has "^hiplever-cli: $WORK/malformed.hlplan:[0-9][0-9]*: "

run solve "$WORK/bad-number.hlplan"
expect_rc 1 "solve a bad number"
bad_line=$(line_of "$WORK/bad-number.hlplan" 'x-mm="abc"')
check "a bad number gives FILE:LINE (line $bad_line)" \
  err_has "^hiplever-cli: $WORK/bad-number.hlplan:$bad_line: "
check "a bad number names the field" err_has "x-mm"
check "a bad number shows the text" err_has "abc"

run solve "$WORK/no-hip-centre.hlplan"
expect_rc 1 "solve without the hip centre"
check "a missing landmark gives FILE:LINE" \
  err_has "^hiplever-cli: $WORK/no-hip-centre.hlplan:[0-9][0-9]*: "
check "a missing landmark is named" err_has "hip-centre"

# The abductor origin moved onto the insertion: the file is well formed and
# in range, but the geometry cannot be solved.
ins=$(sed -nE 's/.*<landmark name="abductor-insertion" (x-mm="[^"]*" y-mm="[^"]*").*/\1/p' "$DEMO")
sed -E "s/(<landmark name=\"abductor-origin\" )x-mm=\"[^\"]*\" y-mm=\"[^\"]*\"/\1$ins/" \
  "$DEMO" >"$WORK/degenerate.hlplan"
check "degenerate.hlplan differs from the demo" differ "$DEMO" "$WORK/degenerate.hlplan"
run solve "$WORK/degenerate.hlplan" --format csv
expect_rc 1 "solve a geometry that cannot be solved"
check "an unsolvable geometry names the landmark" \
  err_has "^hiplever-cli: $WORK/degenerate.hlplan: .*landmark abductor-"
check "an unsolvable geometry prints no table" [ ! -s "$WORK/out" ]
run summary "$WORK/degenerate.hlplan" -o "$WORK/degenerate.xml"
expect_rc 1 "summary of a geometry that cannot be solved"
check "summary of an unsolvable geometry writes no file" no_file "$WORK/degenerate.xml"

# One option that cannot be solved (its femur moved until the abductor line
# passes 0.2 mm from the hip centre): every output format words the refusal
# the same way, naming the option and the landmark.
sed -E 's/(name="Standard stem" cup-medial-mm="2" cup-superior-mm="1") femoral-offset-mm="0" femoral-length-mm="2"/\1 femoral-offset-mm="-50" femoral-length-mm="-48"/' \
  "$DEMO" >"$WORK/refused-option.hlplan"
check "refused-option.hlplan differs from the demo" differ "$DEMO" "$WORK/refused-option.hlplan"
refusal="^hiplever-cli: $WORK/refused-option.hlplan: option \"Standard stem\": landmark abductor-insertion: The abductor moment arm is 0.2 mm"
for fmt in text csv xml; do
  run solve "$WORK/refused-option.hlplan" --format $fmt
  expect_rc 1 "solve --format $fmt with an option that cannot be solved"
  check "solve --format $fmt names the option and the landmark" err_has "$refusal"
  cp "$WORK/err" "$WORK/refusal-$fmt"
done
check "solve words a refusal alike in text and csv" cmp -s "$WORK/refusal-text" "$WORK/refusal-csv"
check "solve words a refusal alike in text and xml" cmp -s "$WORK/refusal-text" "$WORK/refusal-xml"
run summary "$WORK/refused-option.hlplan" -o "$WORK/refused.xml"
expect_rc 1 "summary with an option that cannot be solved"
check "summary words a refusal as solve does" cmp -s "$WORK/refusal-text" "$WORK/err"

run validate "$WORK/good.hlplan" "$WORK/bad-number.hlplan"
expect_rc 1 "validate a good and a bad file"
check "validate still reports the good file" out_has "good.hlplan: valid ("
check "validate reports the bad file" err_has "bad-number.hlplan:$bad_line: "
check "validate prints no 'valid' for the bad file" out_lacks "bad-number.hlplan: valid"

# ---- no output file on failure --------------------------------------------------

run summary "$WORK/bad-number.hlplan" -o "$WORK/none.xml"
expect_rc 1 "summary of a bad plan"
check "summary of a bad plan writes no file" no_file "$WORK/none.xml"

echo "previous contents" >"$WORK/kept.xml"
run summary "$WORK/no-hip-centre.hlplan" -o "$WORK/kept.xml"
expect_rc 1 "summary of a bad plan over an existing file"
check "summary of a bad plan leaves the old file" \
  grep -qx "previous contents" "$WORK/kept.xml"

run summary "$DEMO" -o "$WORK/no-such-dir/out.xml"
expect_rc 1 "summary into a folder that does not exist"
check "summary into a missing folder names it" err_has "no-such-dir"
check "summary into a missing folder writes nothing" no_file "$WORK/no-such-dir"

run batch "$WORK/good.hlplan" "$WORK/bad-number.hlplan" "$WORK/truncated.hlplan" \
  --csv "$WORK/none.csv"
expect_rc 1 "batch with bad plans"
check "batch reports the first bad plan" err_has "bad-number.hlplan:$bad_line: "
check "batch reports the second bad plan" err_has "truncated.hlplan:[0-9]"
check "batch says nothing was written" err_has "2 of 3 plans failed"
check "batch with a bad plan writes no file" no_file "$WORK/none.csv"

run batch "$WORK/good.hlplan" --csv "$WORK/no-such-dir/out.csv"
expect_rc 1 "batch into a folder that does not exist"
check "batch into a missing folder names it" err_has "no-such-dir"
check "batch into a missing folder writes nothing" no_file "$WORK/no-such-dir"

echo "previous,table" >"$WORK/kept.csv"
run batch "$WORK/good.hlplan" "$WORK/missing.hlplan" --csv "$WORK/kept.csv"
expect_rc 1 "batch with a missing plan over an existing file"
check "batch with a bad plan leaves the old file" grep -qx "previous,table" "$WORK/kept.csv"
check "no temporary files are left behind" no_temp_left "$WORK"

# ---- usage errors ---------------------------------------------------------------

usage_case () {
  local what=$1
  shift
  run "$@"
  expect_rc 2 "$what"
  check "$what: hint to --help" err_has "hiplever-cli --help"
  check "$what: nothing on stdout" [ ! -s "$WORK/out" ]
}

usage_case "no subcommand"
usage_case "unknown subcommand" frobnicate "$DEMO"
usage_case "unknown global option" --frobnicate
usage_case "unknown option" solve "$DEMO" --frobnicate
usage_case "unknown short option" solve "$DEMO" -x
usage_case "unknown format" solve "$DEMO" --format pdf
usage_case "--format without its value" solve "$DEMO" --format
usage_case "solve without a plan" solve
usage_case "solve with two plans" solve "$DEMO" "$DEMO"
usage_case "summary without -o" summary "$DEMO"
usage_case "summary with -o and no value" summary "$DEMO" -o
usage_case "validate without a plan" validate
usage_case "batch without --csv" batch "$DEMO"
usage_case "batch without a plan" batch --csv "$WORK/x.csv"
usage_case "bench with a value for --quick" bench --quick=yes
# getopt_long would take an unambiguous prefix; the command line wants the
# whole name, and a switch with letters after it is one unknown option.
usage_case "an abbreviated long option" solve "$DEMO" --form csv
check "an abbreviated long option is named as typed" err_has "unknown option '--form'"
usage_case "a switch with letters after it" bench -qx
usage_case "an empty value" solve "$DEMO" --format=
check "an empty value says the option needs one" err_has "option '--format=' needs a value"
run solve "$DEMO" --format=csv
expect_rc 0 "--format=csv, the value after '='"
check "--format=csv gives CSV" out_has "^option,"
check "usage errors write no file" no_file "$WORK/x.csv"

run solve "$DEMO" --format pdf
check "an unknown format is named" err_has "pdf"
run frobnicate
check "an unknown subcommand is named" err_has "frobnicate"

# ---- option syntax -----------------------------------------------------------------

run summary -o"$WORK/joined.xml" "$DEMO"
expect_rc 0 "summary -oFILE before the plan"
check "summary -oFILE writes the file" valid_xml "$WORK/joined.xml"
run summary "$DEMO" --output="$WORK/long.xml"
expect_rc 0 "summary --output=FILE"
check "summary --output=FILE writes the file" valid_xml "$WORK/long.xml"
cp "$DEMO" "$WORK/-dash.hlplan"
run solve --format csv -- "$WORK/-dash.hlplan"
expect_rc 0 "solve -- PLAN"

# ---- writing to a full device ---------------------------------------------------------

if [ -w /dev/full ]; then
  "$CLI" solve "$DEMO" >/dev/full 2>"$WORK/err"
  rc=$?
  expect_rc 1 "solve into a full device"
  check "a failed write to stdout is reported" err_has "standard output"
fi

# ---- a name that needs CSV quoting ------------------------------------------------------

# The first option is renamed to one with a comma and a double quote.
sed -E '0,/<option [^>]*name="[^"]*"/s/(<option [^>]*name=)"[^"]*"/\1"Stem, \&quot;lateral\&quot; 6"/' \
  "$DEMO" >"$WORK/quoted.hlplan"
run solve "$WORK/quoted.hlplan" --format csv
expect_rc 0 "solve a plan whose option name needs quoting"
check "an option name is quoted as RFC 4180 asks" \
  out_has '^"Stem, ""lateral"" 6",'
check "the quoted name reads back" \
  [ "$($CHECK field "$WORK/out" 1 option 2>&1)" = 'Stem, "lateral" 6' ]

# ---- muscles only pull --------------------------------------------------------------------

# A heavy bag in the hand on the operated side balances the pelvis alone.
sed -E 's/(<hand-load [^>]*hand="ipsilateral"[^>]*mass-kg=)"[^"]*"/\1"60"/' \
  "$DEMO" >"$WORK/heavy.hlplan"
check "heavy.hlplan differs from the demo" differ "$DEMO" "$WORK/heavy.hlplan"
run solve "$WORK/heavy.hlplan" --format csv
expect_rc 0 "solve with a heavy ipsilateral load"
check "abductors not needed: the flag key" \
  grep -qE '(^|;)abductors-not-needed(;|$)' <($CHECK field "$WORK/out" 0 flags 2>&1)
check "abductors not needed: no abductor force" \
  [ "$($CHECK field "$WORK/out" 0 abductor_force_N 2>&1)" = "0.000" ]
run solve "$WORK/heavy.hlplan"
check "abductors not needed: the plain words and the unbalanced moment" \
  out_has "^  native: .*unbalanced moment [0-9][0-9.]* N m"

# ---- numbers stay in the C locale ------------------------------------------------------

if LC_ALL=de_DE.UTF-8 locale -k decimal_point 2>/dev/null | grep -q '","'; then
  LC_ALL=de_DE.UTF-8 "$CLI" solve "$DEMO" --format csv >"$WORK/de.csv" 2>"$WORK/err"
  check "csv under a German locale is the same as under C" cmp -s "$WORK/de.csv" "$WORK/demo.hlplan.csv"
  LC_ALL=de_DE.UTF-8 "$CLI" solve "$DEMO" >"$WORK/de.txt" 2>"$WORK/err"
  check "text under a German locale has the same numbers" \
    $CHECK text-vs-csv "$WORK/de.txt" "$WORK/demo.hlplan.csv" >/dev/null
  LC_ALL=de_DE.UTF-8 "$CLI" bench --quick >"$WORK/de-bench.txt" 2>"$WORK/err"
  check "bench under a German locale prints '.' decimals" \
    grep -qE '^1\) .* [0-9]+\.[0-9] ns' "$WORK/de-bench.txt"
else
  fail "the de_DE.UTF-8 locale is missing (tests/bootstrap.sh generates it)"
fi

# ---- plausibility guards -----------------------------------------------------------------

# Magnification 1.0-1.5 from any calibration (HL_MAGNIFICATION_MIN/MAX; Brew
# et al. 2012, J Arthroplasty 27:643-647 measured 1.17-1.234; the margin is
# common practice): refused with exit 1, naming the magnification.
run calibrate --two-point 0,0 160,0 --distance 100
expect_rc 1 "calibrate: two points giving 1.6"
check "calibrate names the magnification 1.600" err_has "magnification comes out at 1.600"
run calibrate --marker 20,10 10,20 0,10
expect_rc 1 "calibrate: a marker giving 0.8"
check "calibrate names the magnification 0.800" err_has "magnification comes out at 0.800"
run calibrate --two-point 0,0 150,0 --distance 100
expect_rc 0 "calibrate: two points giving 1.5, the upper limit"
sed 's/<calibration method="marker" magnification="1.2"/<calibration method="typed" magnification="1.6"/' \
  "$DEMO" >"$WORK/typed16.hlplan"
run solve "$WORK/typed16.hlplan"
expect_rc 1 "solve: a typed magnification of 1.6"
check "solve names the typed magnification" err_has "typed magnification is 1.6"
# Calibration points that contradict the recorded magnification (the
# demo's marker gives 1.2).
sed 's/<calibration method="marker" magnification="1.2"/<calibration method="marker" magnification="1.25"/' \
  "$DEMO" >"$WORK/contradict.hlplan"
run validate "$WORK/contradict.hlplan"
expect_rc 1 "validate: calibration points against the recorded magnification"
check "the contradiction names both magnifications" err_has "1.200, but the plan records 1.250"

# Implausible geometry: the demo's third option with the cup 40 mm medial
# (limit 15 mm, common practice) carries the key "implausible" in the CSV
# and the reasons in the text.
sed 's/cup-medial-mm="4"/cup-medial-mm="40"/' "$DEMO" >"$WORK/implausible.hlplan"
run solve "$WORK/implausible.hlplan" --format csv
expect_rc 0 "solve --format csv of an implausible option"
check "the CSV flags carry 'implausible'" grep -qE '^Medialised cup[^,]*,.*(^|[,;])implausible$' "$WORK/out"
check "the plausible options carry no 'implausible'" sh -c "! grep -E '^(native|Standard stem),' '$WORK/out' | grep -q implausible"
run solve "$WORK/implausible.hlplan"
check "the text says which limit" out_has "more than the 15 mm a reconstruction usually moves it (common practice)"

# A cane in the same-side hand: the note of Neumann 1998.
sed 's/hand="contralateral" unit="percent-bw"/hand="ipsilateral" unit="percent-bw"/' "$DEMO" >"$WORK/ipsi.hlplan"
run solve "$WORK/ipsi.hlplan"
check "solve notes the same-side cane" out_has "held in the other hand it helps the hip more"
run solve "$DEMO"
check "no cane note for the opposite hand" out_lacks "held in the other hand"
# Leg length and global offset against the other hip in words, for native
# and every option (the demo's measures; operated minus other side).
check "solve: against the other hip" out_has "^Against the other hip:$"
check "solve: native against the other hip" \
  out_has "^  native: operated leg 2.0 mm shorter than the other; global offset 1.0 mm less than the other side$"
check "solve: the standard stem against the other hip" \
  out_has "^  Standard stem: operated leg 1.0 mm shorter than the other; global offset 2.8 mm less than the other side$"
for opt in "Lateralised stem +6 mm" "Medialised cup 4 mm + long head" "Templated: demo cementless stem"; do
  check "solve: $opt against the other hip" out_has "^  $(quote_re "$opt"): operated leg .* than the other; global offset .* than the other side$"
done

# Inverse answers about loads are planning estimates, not advice.
run inverse "$DEMO"
check "inverse says the answers are planning estimates" out_has "planning estimates of a static model"
check "inverse says they are not advice to the patient" out_has "not advice to the patient"

# An empty or incomplete plan gets plain words, not schema text.
printf '<?xml version="1.0"?>\n<plan xmlns="urn:hiplever:plan" format-version="1">\n  <case label="x" mass-kg="70" operated-side="right"/>\n</plan>\n' >"$WORK/nolm.hlplan"
run validate "$WORK/nolm.hlplan"
expect_rc 1 "validate: a plan without landmarks"
check "no landmarks: plain words" err_has "the plan has no landmarks: place at least the hip centre, the midline and the abductor insertion"
check "no landmarks: no schema text" sh -c "! grep -q 'Expected is' '$WORK/err'"

# ---- sweep --mode and negative numbers ---------------------------------------------------

run sweep "$DEMO" --param femoral_offset_mm --from -5 --to 5 --steps 3 --mode add
expect_rc 0 "sweep --mode add"
check "sweep --mode add says the value is added" out_has "Mode add: each value is added to every option's own setting"
# The lateralised option plans +6 mm: at +5 added its arm is larger than the
# standard stem's (0 mm own) at +5.
run sweep "$DEMO" --param femoral_offset_mm --from -5 --to 5 --steps 3
expect_rc 0 "sweep without --mode"
check "sweep without --mode replaces (today's behaviour) and says so" out_has "Mode set: each value replaces every option's own setting"
run sweep "$DEMO" --param femoral_offset_mm --from -5 --to 5 --steps 3 --mode add --csv
expect_rc 0 "sweep --mode add --csv"
check "sweep --mode add --csv keeps the CSV header" sh -c "head -1 '$WORK/out' | grep -q '^param,value,option,'"
# arm_at MODE OPTION: the abductor arm of OPTION at +5 mm in that mode.
arm_at () {
  "$CLI" sweep "$DEMO" --param femoral_offset_mm --from -5 --to 5 --steps 3 --mode "$1" --csv \
    | awk -F, -v o="$2" '$2 == "5" && $3 == o { print $4 }'
}
std_set=$(arm_at set "Standard stem") lat_set=$(arm_at set "Lateralised stem +6 mm")
std_add=$(arm_at add "Standard stem") lat_add=$(arm_at add "Lateralised stem +6 mm")
check "sweep --mode set: both stems at +5 mm have one arm ($std_set, $lat_set)" \
  test -n "$std_set" -a "$std_set" = "$lat_set"
check "sweep --mode add: +5 mm over the lateralised stem's own +6 mm gives a longer arm ($lat_add > $std_add)" \
  awk -v a="$lat_add" -v b="$std_add" 'BEGIN { exit !(a != "" && b != "" && a + 0 > b + 0) }'
check "sweep --mode add leaves the standard stem (own 0 mm) as set does" test "$std_add" = "$std_set"
run sweep "$DEMO" --param mass_kg --from 60 --to 70 --steps 3 --mode add
expect_rc 1 "sweep --mode add of a non-option parameter"
run sweep "$DEMO" --param femoral_offset_mm --from -5 --to 5 --steps 3 --mode twice
expect_rc 2 "sweep --mode twice"
# Negative numbers are values, not options (a 16 mm marker measuring 20 mm:
# magnification 1.25).
run calibrate --marker -10,0 0,10 10,0 --diameter 16
expect_rc 0 "calibrate --marker -10,0 ..."
check "calibrate with a negative first point" out_has "Magnification: 1.250 "
check "calibrate gives the diameter to 1 decimal (mm)" out_has "^Marker diameter: 16.0 mm; 3 points"
run calibrate --marker 0,10 -10,0 10,0 --diameter 16
expect_rc 0 "calibrate --marker 0,10 -10,0 ..."
run calibrate --two-point -60,0 -.5,0 --distance 50
check "calibrate with a negative decimal point value" test "$rc" -ne 2

# ---- bench, as a smoke test (figures are not judged) ------------------------------------

run bench --quick
expect_rc 0 "bench --quick"
for n in 1 2 3 4 5; do
  check "bench --quick prints figure $n" out_has "^$n) .*target <= "
done

TMPDIR=$WORK/no-such-dir "$CLI" bench --quick >"$WORK/out" 2>"$WORK/err"
rc=$?
expect_rc 1 "bench --quick with a temporary folder that does not exist"
check "bench names the temporary folder it cannot use" err_has "no-such-dir"

echo "cli: $passed passed, $failed failed"
[ "$failed" -eq 0 ]
