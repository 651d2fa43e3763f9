#!/usr/bin/env bash
# test-cli-analysis.sh: inverse, sweep, uncertainty, report and figure.
#
# Copyright 2026 the hiplever developers
# SPDX-License-Identifier: GPL-3.0-or-later
#
# Usage: test-cli-analysis.sh CLI SOURCE_DIR
# Every subcommand on every bundled example; answers plugged back into the
# forward solve; sweep ends against solve of edited plans; the PDF, SVG and
# PNG checked with poppler, xmllint and the PNG header; every error path
# with its exit status and no output file left behind.  Prints one line per
# failure and, last, "cli-analysis: N passed, M failed".
set -u
export LC_ALL=C TZ=UTC

if [ $# -ne 2 ]; then
  echo "usage: $0 CLI SOURCE_DIR" >&2
  exit 2
fi
CLI=$1
SRC=$2
XSD=$SRC/data/hiplever-plan.xsd
CHECK="python3 $SRC/tests/cli/cli-analysis-check.py"
CAUTION_START='Planning aid only'
SWEEP_HEADER='param,value,option,abductor_arm_mm,bw_arm_mm,lever_ratio,abductor_force_N,abductor_force_BW,jrf_N,jrf_BW,jrf_angle_deg,global_offset_change_mm,leg_length_change_mm,abductor_length_change_mm,flags'
# The inverse answers are found to 1e-6 in the unknown (model notes s. 7);
# plugged back, the abductor arm must match native to 1e-3 mm.
ARM_TOL_MM=1e-3

WORK=$(mktemp -d "${TMPDIR:-/tmp}/hiplever-cli-analysis.XXXXXX")
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
run () {
  "$CLI" "$@" >"$WORK/out" 2>"$WORK/err"
  rc=$?
}
expect_rc () {
  if [ "$rc" -eq "$1" ]; then pass; else
    fail "$2: exit status $rc, expected $1 (stderr: $(head -c 300 "$WORK/err"))"
  fi
}
out_has () { grep -q -e "$1" "$WORK/out"; }
err_has () { grep -q -e "$1" "$WORK/err"; }
no_file () { [ ! -e "$1" ]; }
not_in () { ! grep -q -e "$1" "$2"; }
differ () { ! cmp -s "$1" "$2"; }
no_temp_left () { [ -z "$(find "$1" -name '.*' -type f)" ]; }
near () { python3 -c "import sys; sys.exit(0 if abs(float('$1') - float('$2')) <= float('$3') else 1)"; }
have () { command -v "$1" >/dev/null; }

for tool in xmllint python3 pdfinfo pdftotext pdfimages; do
  check "$tool is installed" have "$tool"
done

shopt -s nullglob
EXAMPLES=("$SRC"/data/examples/*.hlplan)
shopt -u nullglob
check "three or more bundled examples" [ ${#EXAMPLES[@]} -ge 3 ]
DEMO=$SRC/data/examples/demo.hlplan

# ---- help ---------------------------------------------------------------------

run --help
expect_rc 0 "--help"
for word in inverse sweep uncertainty report figure --target-jrf --param --from \
            --to --steps --samples --seed --size --option; do
  check "--help lists $word" out_has "$word"
done
for sub in inverse sweep uncertainty report figure; do
  run "$sub" --help
  expect_rc 0 "$sub --help"
done

# ---- every subcommand on every example -------------------------------------------

for plan in "${EXAMPLES[@]}"; do
  name=$(basename "$plan" .hlplan)
  n_options=$(grep -o '<option ' "$plan" | wc -l)

  run solve "$plan" --format csv
  expect_rc 0 "solve $name"
  cp "$WORK/out" "$WORK/$name.solve.csv"
  native_jrf=$(awk -F, 'NR == 2 { print $8 }' "$WORK/$name.solve.csv")
  label=$(sed -n 's/.*<case label="\([^"]*\)".*/\1/p' "$plan")

  # inverse
  run inverse "$plan"
  expect_rc 0 "inverse $name"
  check "inverse $name answers the cane question in words" \
    out_has "cane force\|without a cane\|Not reachable"
  check "inverse $name ends with the caution" grep -q "^Caution: $CAUTION_START" <(tail -n 1 "$WORK/out")
  run inverse "$plan" --format csv
  expect_rc 0 "inverse $name --format csv"
  cp "$WORK/out" "$WORK/$name.inverse.csv"
  rows=$($CHECK csv-rows "$WORK/$name.inverse.csv")
  check "inverse $name: 5 answers for native and 7 per option ($rows rows)" \
    [ "$rows" -eq $((5 + 7 * n_options)) ]

  # sweep: the header, N x (1 + options) rows, both ends against solve
  run sweep "$plan" --param femoral_offset_mm --from -4 --to 10 --steps 8 --csv
  expect_rc 0 "sweep $name femoral_offset_mm"
  check "sweep $name: the header" [ "$(head -n 1 "$WORK/out")" = "$SWEEP_HEADER" ]
  rows=$($CHECK csv-rows "$WORK/out")
  check "sweep $name: 8 x (1 + $n_options) rows ($rows)" [ "$rows" -eq $((8 * (1 + n_options))) ]
  cp "$WORK/out" "$WORK/$name.sweep.csv"
  for end in -4 10; do
    if [ "$n_options" -gt 0 ]; then
      $CHECK edit "$plan" "$WORK/$name.off$end.hlplan" option '*' "femoral-offset-mm=$end"
    else
      cp "$plan" "$WORK/$name.off$end.hlplan"
    fi
    "$CLI" solve "$WORK/$name.off$end.hlplan" --format csv >"$WORK/$name.off$end.csv"
    check "sweep $name femoral_offset_mm = $end equals solve of the edited plan" \
      $CHECK sweep-rows "$WORK/$name.sweep.csv" "$WORK/$name.off$end.csv" "$end" >/dev/null
  done
  run sweep "$plan" --param cane_force_n --from 0 --to 150 --steps 4 --csv
  expect_rc 0 "sweep $name cane_force_n"
  cp "$WORK/out" "$WORK/$name.cane.csv"
  $CHECK edit "$plan" "$WORK/$name.cane150.hlplan" cane 0 enabled=true unit=newtons value=150
  "$CLI" solve "$WORK/$name.cane150.hlplan" --format csv >"$WORK/$name.cane150.csv"
  check "sweep $name cane_force_n = 150 equals solve with a 150 N cane" \
    $CHECK sweep-rows "$WORK/$name.cane.csv" "$WORK/$name.cane150.csv" 150 >/dev/null
  run sweep "$plan" --param load_ipsi_kg --from 0 --to 12 --steps 3
  expect_rc 0 "sweep $name load_ipsi_kg (text)"
  check "sweep $name text ends with the caution" grep -q "^Caution: $CAUTION_START" <(tail -n 1 "$WORK/out")

  # uncertainty: the seed decides
  run uncertainty "$plan" --samples 500 --seed 7
  expect_rc 0 "uncertainty $name"
  check "uncertainty $name prints the seed" out_has "^Seed 7; 500 samples asked"
  check "uncertainty $name prints the settings" out_has "^Errors (SD): landmark placement"
  # multiples of body weight to 2 decimals, as the window and the report
  check "uncertainty $name: body-weight multiples to 2 decimals" \
    out_has "^native  *[0-9]\.[0-9][0-9] / [0-9]\.[0-9][0-9] / [0-9]\.[0-9][0-9]  *[0-9]\.[0-9][0-9] / [0-9]\.[0-9][0-9] / [0-9]\.[0-9][0-9]  "
  cp "$WORK/out" "$WORK/$name.mc7"
  run uncertainty "$plan" --samples 500 --seed 7
  check "uncertainty $name: the same seed gives the same output" cmp -s "$WORK/out" "$WORK/$name.mc7"
  run uncertainty "$plan" --samples 500 --seed 8
  check "uncertainty $name: another seed gives another output" differ "$WORK/out" "$WORK/$name.mc7"
  run uncertainty "$plan" --csv
  expect_rc 0 "uncertainty $name --csv"
  rows=$($CHECK csv-rows "$WORK/out")
  check "uncertainty $name --csv: one row per case ($rows)" [ "$rows" -eq $((1 + n_options)) ]
  check "uncertainty $name --csv: native's share is empty" \
    [ "$(awk -F, 'NR == 2 { print $11 }' "$WORK/out")" = "" ]

  # report
  run report "$plan" -o "$WORK/$name.pdf"
  expect_rc 0 "report $name"
  pdfinfo "$WORK/$name.pdf" >"$WORK/$name.pdfinfo" 2>&1
  pages=$(sed -n 's/^Pages: *//p' "$WORK/$name.pdfinfo")
  check "report $name: 2 pages or more ($pages)" [ "${pages:-0}" -ge 2 ]
  check "report $name: A4 (595 x 842 pts)" grep -q '^Page size: *595 x 842 pts (A4)' "$WORK/$name.pdfinfo"
  pdftotext -layout "$WORK/$name.pdf" "$WORK/$name.txt" 2>/dev/null
  # Pages are added as the content needs them: the footers count them all.
  check "report $name: its last page says Page $pages of $pages" \
    grep -q "Page $pages of $pages\b" "$WORK/$name.txt"
  check "report $name: no page beyond the last" \
    sh -c "! grep -q 'Page $((pages + 1)) of' '$WORK/$name.txt'"
  check "report $name shows the caution" grep -q "CAUTION: planning aid only" "$WORK/$name.txt"
  check "report $name shows the full caution text" grep -q "$CAUTION_START\. hiplever gives" "$WORK/$name.txt"
  check "report $name shows the case label" grep -qF "$label" "$WORK/$name.txt"
  # The report shows body weights to 2 decimals (HL_DECIMALS_BW), the CSV to 3.
  native_jrf2=$(printf '%.2f' "$native_jrf")
  check "report $name shows solve's native joint force ($native_jrf2 xBW)" \
    grep -q "Joint reaction force (x body weight) *$native_jrf2\b" "$WORK/$name.txt"
  check "report $name shows the assumptions" grep -q "^ *Assumptions" "$WORK/$name.txt"
  check "report $name names Pauwels 1976" grep -q "Pauwels F 1976" "$WORK/$name.txt"
  check "report $name shows the 5-95% range" grep -q "5-95% range" "$WORK/$name.txt"

  # figure
  run figure "$plan" -o "$WORK/$name.svg"
  expect_rc 0 "figure $name svg"
  check "figure $name.svg is well-formed XML" xmllint --noout "$WORK/$name.svg"
  run figure "$plan" -o "$WORK/$name.png" --size 640x480
  expect_rc 0 "figure $name png"
  check "figure $name.png decodes at 640 x 480" [ "$($CHECK png-size "$WORK/$name.png")" = "640 480" ]
  run figure "$plan" -o "$WORK/$name-native.PNG" --size 333x300 --option 0
  expect_rc 0 "figure $name --option 0 (.PNG)"
  check "figure $name-native.PNG decodes at 333 x 300" \
    [ "$($CHECK png-size "$WORK/$name-native.PNG")" = "333 300" ]
  if have identify; then
    check "identify reads $name.png as 640x480" \
      [ "$(identify -format '%wx%h' "$WORK/$name.png" 2>/dev/null)" = "640x480" ]
  fi
done
check "no temporary files left by the writers" no_temp_left "$WORK"

# ---- the radiograph under the figure and the report -----------------------------------

# The demo's synthetic radiograph has a dark background: under the figure it
# darkens a large share of the pixels, while without it only lines and text
# are dark.  Shares of pixels with a grey below 80 of 255.
more () { python3 -c "import sys; sys.exit(0 if float('$1') > float('$2') else 1)"; }
dark () { $CHECK png-dark-share "$1"; }
run figure "$DEMO" -o "$WORK/u.png" --size 400x300
expect_rc 0 "figure with the radiograph (the default)"
check "figure with the radiograph: nothing on stderr" [ ! -s "$WORK/err" ]
run figure "$DEMO" -o "$WORK/u-asked.png" --size 400x300 --underlay
expect_rc 0 "figure --underlay"
check "--underlay draws what the default draws" cmp -s "$WORK/u.png" "$WORK/u-asked.png"
run figure "$DEMO" -o "$WORK/nu.png" --size 400x300 --no-underlay
expect_rc 0 "figure --no-underlay"
dark_u=$(dark "$WORK/u.png")
dark_nu=$(dark "$WORK/nu.png")
check "the radiograph darkens the figure: $dark_u of the pixels dark, over 0.08" more "$dark_u" 0.08
check "without it few pixels are dark: $dark_nu, under 0.03" more 0.03 "$dark_nu"
run figure "$DEMO" -o "$WORK/u.svg" --preset slide
expect_rc 0 "figure --preset slide with the radiograph (SVG)"
check "the SVG embeds the radiograph as an image" grep -q "<image" "$WORK/u.svg"
run figure "$DEMO" -o "$WORK/nu.svg" --preset slide --no-underlay
check "the SVG without it has no image" not_in "<image" "$WORK/nu.svg"

# The plan's window is the one drawn: a window below every grey shows the
# whole image white (few dark pixels), one above every grey black (the bones
# dark too, beyond the default window's dark background).
mkdir -p "$WORK/wl"
cp "$SRC/data/examples/demo-radiograph.png" "$WORK/wl/"
$CHECK edit "$DEMO" "$WORK/wl/white.hlplan" radiograph 0 window-centre=-1000 window-width=10
$CHECK edit "$DEMO" "$WORK/wl/black.hlplan" radiograph 0 window-centre=100000 window-width=10
$CHECK edit "$DEMO" "$WORK/wl/invert.hlplan" radiograph 0 invert=true
run figure "$WORK/wl/white.hlplan" -o "$WORK/wl/white.png" --size 400x300
expect_rc 0 "figure with a window below every grey"
run figure "$WORK/wl/black.hlplan" -o "$WORK/wl/black.png" --size 400x300
run figure "$WORK/wl/invert.hlplan" -o "$WORK/wl/invert.png" --size 400x300
dark_white=$(dark "$WORK/wl/white.png")
dark_black=$(dark "$WORK/wl/black.png")
dark_inv=$(dark "$WORK/wl/invert.png")
check "a window below every grey: the image white ($dark_white dark, under 0.03)" more 0.03 "$dark_white"
dark_u_more=$(python3 -c "print(1.2 * float('$dark_u'))")
check "a window above every grey: the image black ($dark_black dark, over $dark_u_more)" \
  more "$dark_black" "$dark_u_more"
check "inverted: the dark background turns light ($dark_inv dark, under $dark_u)" more "$dark_u" "$dark_inv"

# A missing or changed image: the export goes on without it and says so.
mkdir -p "$WORK/miss" "$WORK/changed"
cp "$DEMO" "$WORK/miss/demo.hlplan"
run figure "$WORK/miss/demo.hlplan" -o "$WORK/miss/f.png" --size 400x300
expect_rc 0 "figure of a plan whose radiograph is missing"
check "the missing radiograph is said on stderr" err_has "figure is drawn without the radiograph: .*missing"
check "the figure without the missing radiograph is the one without any" cmp -s "$WORK/miss/f.png" "$WORK/nu.png"
cp "$DEMO" "$WORK/changed/demo.hlplan"
{ cat "$SRC/data/examples/demo-radiograph.png"; printf 'x'; } >"$WORK/changed/demo-radiograph.png"
run figure "$WORK/changed/demo.hlplan" -o "$WORK/changed/f.png" --size 400x300
expect_rc 0 "figure of a plan whose radiograph has changed"
check "the changed radiograph is said on stderr" err_has "figure is drawn without the radiograph: .*changed"
check "a changed radiograph is not drawn" cmp -s "$WORK/changed/f.png" "$WORK/nu.png"
run figure "$SRC/data/examples/minimal.hlplan" -o "$WORK/min.png" --underlay
expect_rc 0 "figure --underlay of a plan without a radiograph"
check "--underlay without a radiograph is said" err_has "the plan has no radiograph"
run figure "$DEMO" -o "$WORK/both.png" --underlay --no-underlay
expect_rc 2 "figure --underlay --no-underlay"
check "no figure with both" no_file "$WORK/both.png"

# The report's schematic: the radiograph is an image in the PDF.
images () { pdfimages -list "$1" 2>/dev/null | tail -n +3 | wc -l; }
run report "$DEMO" -o "$WORK/u.pdf"
expect_rc 0 "report with the radiograph (the default)"
check "report with the radiograph: nothing on stderr" [ ! -s "$WORK/err" ]
check "the report embeds the radiograph ($(images "$WORK/u.pdf") images)" [ "$(images "$WORK/u.pdf")" -ge 1 ]
pdftotext "$WORK/u.pdf" - | tr '\n' ' ' >"$WORK/u.txt"
check "the report with the radiograph keeps the caution" grep -q "$CAUTION_START" "$WORK/u.txt"
run report "$DEMO" -o "$WORK/nu.pdf" --no-underlay
expect_rc 0 "report --no-underlay"
check "the report --no-underlay has no image" [ "$(images "$WORK/nu.pdf")" -eq 0 ]
run report "$WORK/miss/demo.hlplan" -o "$WORK/miss/r.pdf" --underlay
expect_rc 0 "report of a plan whose radiograph is missing"
check "the report says the radiograph is left out" err_has "schematic is drawn without the radiograph: .*missing"
check "the report without the missing radiograph has no image" [ "$(images "$WORK/miss/r.pdf")" -eq 0 ]
usage_case_early () { run "$@"; expect_rc 2 "$*"; }
usage_case_early report "$DEMO" -o "$WORK/both.pdf" --underlay --no-underlay
check "no report with both" no_file "$WORK/both.pdf"

# ---- inverse answers plugged back -------------------------------------------------

# The femoral offset that restores the native abductor moment arm, put into
# the option, gives the native arm (full precision from the XML summary).
opt="Lateralised stem +6 mm"
value=$($CHECK inverse-value "$WORK/demo.inverse.csv" "$opt" offset-for-arm)
check "demo: an offset-for-arm answer for \"$opt\" ($value)" [ -n "$value" ]
$CHECK edit "$DEMO" "$WORK/arm.hlplan" option 1 "femoral-offset-mm=$value"
"$CLI" solve "$WORK/arm.hlplan" --format xml >"$WORK/arm.xml"
native_arm=$($CHECK result "$WORK/arm.xml" 0 abductor-arm-mm)
option_arm=$($CHECK result "$WORK/arm.xml" 2 abductor-arm-mm)
check "plugged back: \"$opt\" arm $option_arm mm equals native $native_arm mm within $ARM_TOL_MM" \
  near "$option_arm" "$native_arm" "$ARM_TOL_MM"

# The cane force that brings native's joint load to the target: plugged
# back as a cane in newtons, the joint load is the target (the answer is
# the bracket end on the met side, 1e-6 N from the root).
target=1.2
run inverse "$DEMO" --target-jrf "$target" --format csv
expect_rc 0 "inverse --target-jrf $target"
cane=$($CHECK inverse-value "$WORK/out" native cane-for-jrf 2>/dev/null)
if [ -n "$cane" ] && [ "$cane" != nan ]; then
  $CHECK edit "$DEMO" "$WORK/cane.hlplan" cane 0 enabled=true unit=newtons "value=$cane"
  "$CLI" solve "$WORK/cane.hlplan" --format xml >"$WORK/cane.xml"
  jrf=$($CHECK result "$WORK/cane.xml" 0 joint-force-bw)
  check "plugged back: a $cane N cane gives $jrf xBW, the target $target" near "$jrf" "$target" 1e-6
else
  fail "no cane answer for a target of $target xBW"
fi

# ---- the summary carries the ranges -------------------------------------------------

run summary "$DEMO" -o "$WORK/summary.xml"
expect_rc 0 "summary"
check "the summary is valid against the schema" xmllint --noout --schema "$XSD" "$WORK/summary.xml" 2>/dev/null
check "the summary records the seed" grep -q 'uncertainty-seed="20260417"' "$WORK/summary.xml"
check "the summary has the joint-load range per result" \
  [ "$(grep -c 'jrf-bw-p05=' "$WORK/summary.xml")" -eq 5 ]
check "the summary has each option's share" \
  [ "$(grep -c 'share-lower-than-native=' "$WORK/summary.xml")" -eq 4 ]
$CHECK edit "$DEMO" "$WORK/seed.hlplan" uncertainty 0 samples=300 seed=99
run uncertainty "$WORK/seed.hlplan"
expect_rc 0 "uncertainty with the plan's own settings"
check "uncertainty takes the plan's seed and samples" out_has "^Seed 99; 300 samples asked"

# ---- errors: exit status, message, no file -------------------------------------------

usage_case () {
  local what=$1
  shift
  run "$@"
  expect_rc 2 "$what"
}
invalid_case () {
  local what=$1
  shift
  run "$@"
  expect_rc 1 "$what"
  check "$what: the message names the program" err_has "^hiplever-cli: "
}

usage_case "sweep without --param" sweep "$DEMO" --from 0 --to 1 --steps 3
usage_case "sweep with an unknown parameter" sweep "$DEMO" --param femoral_length --from 0 --to 1 --steps 3
check "the unknown parameter is named" err_has "femoral_length"
usage_case "sweep --from not a number" sweep "$DEMO" --param lean_mm --from abc --to 1 --steps 3
usage_case "sweep --steps not whole" sweep "$DEMO" --param lean_mm --from 0 --to 1 --steps 2.5
invalid_case "sweep --steps 1" sweep "$DEMO" --param lean_mm --from 0 --to 1 --steps 1
invalid_case "sweep out of the accepted range" sweep "$DEMO" --param femoral_offset_mm --from -80 --to 10 --steps 3
check "the range error names the parameter" err_has "femoral_offset_mm"
invalid_case "sweep of the line angle with an origin placed" sweep "$DEMO" --param abductor_angle_deg --from 60 --to 70 --steps 3
usage_case "inverse --format xml" inverse "$DEMO" --format xml
usage_case "inverse --target-jrf not a number" inverse "$DEMO" --target-jrf two
invalid_case "inverse --target-jrf 50" inverse "$DEMO" --target-jrf 50
usage_case "uncertainty --seed -3" uncertainty "$DEMO" --seed -3
usage_case "uncertainty --samples x" uncertainty "$DEMO" --samples x
invalid_case "uncertainty --samples 0" uncertainty "$DEMO" --samples 0
usage_case "report without -o" report "$DEMO"
invalid_case "report into a missing folder" report "$DEMO" -o "$WORK/no/such/dir/r.pdf"
check "report into a missing folder names the output" err_has "no/such/dir/r.pdf"
check "no report in a missing folder" no_file "$WORK/no/such/dir/r.pdf"
usage_case "figure without -o" figure "$DEMO"
usage_case "figure with a .jpg name" figure "$DEMO" -o "$WORK/f.jpg"
check "no .jpg written" no_file "$WORK/f.jpg"
usage_case "figure --size 640" figure "$DEMO" -o "$WORK/f.png" --size 640
invalid_case "figure --size 10x10" figure "$DEMO" -o "$WORK/f.png" --size 10x10
# The smallest figure the layout holds at is 300 x 300 (test-render).
invalid_case "figure --size 299x300" figure "$DEMO" -o "$WORK/f.png" --size 299x300
check "figure --size 299x300 says the smallest size" err_has "must be 300 to 8192"
invalid_case "figure --size 300x299" figure "$DEMO" -o "$WORK/f.png" --size 300x299
invalid_case "figure --size 200x150" figure "$DEMO" -o "$WORK/f.png" --size 200x150
run figure "$DEMO" -o "$WORK/smallest.png" --size 300x300
expect_rc 0 "figure --size 300x300 (the smallest)"
check "figure --size 300x300 decodes at 300 x 300" \
  [ "$($CHECK png-size "$WORK/smallest.png")" = "300 300" ]
invalid_case "figure --option 9" figure "$DEMO" -o "$WORK/f.png" --option 9
check "no figure written on errors" no_file "$WORK/f.png"

# A plan that cannot be solved: exit 1, the landmark named, nothing written,
# and an old file of the same name left as it was.
$CHECK edit "$DEMO" "$WORK/bad.hlplan" landmark 1 x-mm=-200
printf 'old report\n' >"$WORK/old.pdf"
cp "$WORK/old.pdf" "$WORK/old.pdf.orig"
invalid_case "inverse on an unsolvable plan" inverse "$WORK/bad.hlplan"
check "inverse on an unsolvable plan prints nothing" [ ! -s "$WORK/out" ]
invalid_case "uncertainty on an unsolvable plan" uncertainty "$WORK/bad.hlplan"
check "uncertainty on an unsolvable plan prints nothing" [ ! -s "$WORK/out" ]
invalid_case "sweep on an unsolvable plan" sweep "$WORK/bad.hlplan" --param lean_mm \
  --from 0 --to 5 --steps 3
check "sweep on an unsolvable plan prints nothing" [ ! -s "$WORK/out" ]
invalid_case "figure of an unsolvable plan" figure "$WORK/bad.hlplan" -o "$WORK/bad.svg"
invalid_case "report of an unsolvable plan" report "$WORK/bad.hlplan" -o "$WORK/old.pdf"
check "the report error names the midline" err_has "midline"
check "a failed report leaves the old file as it was" cmp -s "$WORK/old.pdf" "$WORK/old.pdf.orig"
invalid_case "report of a missing plan" report "$WORK/missing.hlplan" -o "$WORK/new.pdf"
check "no report of a missing plan" no_file "$WORK/new.pdf"
check "no temporary files left after the failures" no_temp_left "$WORK"

echo "cli-analysis: $passed passed, $failed failed"
[ "$failed" -eq 0 ]
