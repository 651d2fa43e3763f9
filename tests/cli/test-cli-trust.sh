#!/usr/bin/env bash
# test-cli-trust.sh: hiplever-cli never harms what is at an output path,
# "-" is standard output for text, batch --keep-going.
#
# Copyright 2026 the hiplever developers
# SPDX-License-Identifier: GPL-3.0-or-later
#
# Usage: test-cli-trust.sh CLI SOURCE_DIR
# Every pipe, link and file written over is the test's own, in a
# temporary folder.
set -u
export LC_ALL=C TZ=UTC

if [ $# -ne 2 ]; then
  echo "usage: $0 CLI SOURCE_DIR" >&2
  exit 2
fi
CLI=$(cd "$(dirname "$1")" && pwd)/$(basename "$1")
SRC=$(cd "$2" && pwd)
XSD=$SRC/data/hiplever-plan.xsd
WORK=$(mktemp -d "${TMPDIR:-/tmp}/hiplever-cli-trust.XXXXXX")
trap 'rm -rf "$WORK"' EXIT
cd "$WORK" || exit 1

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
    fail "$2: exit status $rc, expected $1 (stderr: $(head -c 300 "$WORK/err"))"; fi
}
err_has () { grep -q -e "$1" "$WORK/err"; }
is_fifo () { [ -p "$1" ]; }
is_link () { [ -L "$1" ]; }
only_names () { [ "$(ls -A | tr '\n' ' ')" = "$1" ]; }

cp "$SRC/data/examples/demo.hlplan" plan.hlplan
cp "$SRC/data/examples/minimal.hlplan" other.hlplan
printf 'not a plan\n' > bad.hlplan

# A named pipe and a link to one are refused and left as they are, for
# every command that writes a file.
mkfifo pipe
ln -s pipe to-pipe
for target in pipe to-pipe; do
  run summary plan.hlplan -o "$target"
  expect_rc 1 "summary -o $target"
  check "summary -o $target: says named pipe" err_has "named pipe"
  run batch plan.hlplan --csv "$target"
  expect_rc 1 "batch --csv $target"
  run report plan.hlplan -o "$target"
  expect_rc 1 "report -o $target"
done
run figure plan.hlplan -o pipe.svg
expect_rc 0 "figure to a new name"
rm -f pipe.svg
mkfifo pipe.svg
run figure plan.hlplan -o pipe.svg
expect_rc 1 "figure -o a pipe"
check "pipe stays a pipe" is_fifo pipe
check "pipe.svg stays a pipe" is_fifo pipe.svg
check "the link stays a link" is_link to-pipe
check "no temporary file left" only_names "bad.hlplan err other.hlplan out pipe pipe.svg plan.hlplan to-pipe "
rm -f pipe pipe.svg to-pipe

# A socket is refused and left as it is.
if python3 -c 'import socket, sys; socket.socket(socket.AF_UNIX).bind(sys.argv[1])' sock; then
  run summary plan.hlplan -o sock
  expect_rc 1 "summary -o a socket"
  check "summary -o socket: says socket" err_has "a socket, not a regular file"
  check "the socket stays a socket" test -S sock
  rm -f sock
fi

# A folder is refused.
mkdir folder.xml
run summary plan.hlplan -o folder.xml
expect_rc 1 "summary -o a folder"
check "summary -o folder: says folder" err_has "folder"
rmdir folder.xml

# A link to a regular file: the target is written, the link stays.
printf 'old\n' > real.xml
ln -s real.xml alias.xml
run summary plan.hlplan -o alias.xml
expect_rc 0 "summary -o a link to a file"
check "the link stays" is_link alias.xml
check "the target holds the summary" grep -q "planning-summary" real.xml
rm -f alias.xml real.xml

# The output onto an input is refused, for every command with -o or --csv;
# the plan is unchanged.
cp plan.hlplan plan.orig
ln -s plan.hlplan plan-link.hlplan
for args in "summary plan.hlplan -o plan.hlplan" "summary plan.hlplan -o plan-link.hlplan" \
            "report plan.hlplan -o plan.hlplan" "figure plan.hlplan -o plan.hlplan" \
            "batch other.hlplan plan.hlplan --csv plan.hlplan" \
            "batch plan.hlplan --keep-going --csv plan-link.hlplan"; do
  # shellcheck disable=SC2086
  run $args
  if [ "$rc" -ne 0 ] && cmp -s plan.hlplan plan.orig; then pass; else
    fail "$args: exit $rc, or the plan changed"; fi
done
run summary plan.hlplan -o plan.hlplan
check "says the output is the input" err_has "is the input"
rm -f plan-link.hlplan plan.orig

# The plan's radiograph and a --catalogue file are inputs too: an output
# onto them (also through a link) is refused and they keep their bytes.
cp "$SRC/data/examples/demo-radiograph.png" demo-radiograph.png
cp demo-radiograph.png radiograph.orig
ln -s demo-radiograph.png radiograph-link.png
cp "$SRC/data/catalogues/demo.hlcat" cat.hlcat
cp cat.hlcat cat.orig
for args in "summary plan.hlplan -o demo-radiograph.png" \
            "summary plan.hlplan -o radiograph-link.png" \
            "report plan.hlplan -o demo-radiograph.png" \
            "figure plan.hlplan -o demo-radiograph.png" \
            "fit plan.hlplan --apply 1 -o demo-radiograph.png" \
            "batch other.hlplan plan.hlplan --csv demo-radiograph.png" \
            "batch plan.hlplan bad.hlplan --keep-going --csv demo-radiograph.png"; do
  # shellcheck disable=SC2086
  run $args
  if [ "$rc" -eq 1 ] && cmp -s demo-radiograph.png radiograph.orig \
     && err_has "is the plan's radiograph"; then pass; else
    fail "$args: exit $rc, or the radiograph changed, or no message"; fi
done
run fit plan.hlplan --catalogue cat.hlcat --apply 1 -o cat.hlcat
if [ "$rc" -eq 1 ] && cmp -s cat.hlcat cat.orig && err_has "is the input"; then pass; else
  fail "fit --catalogue cat.hlcat -o cat.hlcat: exit $rc, or the catalogue changed"; fi
HIPLEVER_CATALOGUES=/nonexistent:cat.hlcat run fit plan.hlplan --apply 1 -o cat.hlcat
if [ "$rc" -eq 1 ] && cmp -s cat.hlcat cat.orig && err_has "is the input"; then pass; else
  fail "HIPLEVER_CATALOGUES=cat.hlcat fit -o cat.hlcat: exit $rc, or the catalogue changed"; fi
rm -f demo-radiograph.png radiograph.orig radiograph-link.png cat.hlcat cat.orig

# "-" is standard output for the text outputs, and no file named "-".
run summary plan.hlplan -o -
expect_rc 0 "summary -o -"
check "summary -o - writes the summary to stdout" grep -q "<planning-summary" out
check "summary -o -: the XML is valid" xmllint --noout --schema "$XSD" out 2>/dev/null
check "no file named -" test ! -e ./-
run batch plan.hlplan other.hlplan --csv -
expect_rc 0 "batch --csv -"
check "batch --csv - writes the table" grep -q "^plan,option," out
check "batch --csv -: every plan" grep -q "^other.hlplan," out
run fit plan.hlplan --apply 1 -o -
expect_rc 0 "fit --apply 1 -o -"
check "fit -o - writes the plan to stdout" grep -q "^<plan " out
check "fit -o -: the rank line on stderr" err_has "now has rank 1"
cp out applied.hlplan
run validate applied.hlplan
expect_rc 0 "the plan fit wrote to stdout reads back"
rm -f applied.hlplan
run report plan.hlplan -o -
expect_rc 2 "report -o - is refused (PDF)"
run figure plan.hlplan -o -
expect_rc 2 "figure -o - is refused"
check "no file named -" test ! -e ./-

# An existing file keeps its mode.
printf 'old\n' > kept.xml
chmod 600 kept.xml
run summary plan.hlplan -o kept.xml
expect_rc 0 "summary over a 0600 file"
check "0600 stays 0600" test "$(stat -c %a kept.xml)" = 600
printf 'old\n' > kept.csv
chmod 640 kept.csv
run batch plan.hlplan --csv kept.csv
check "0640 stays 0640" test "$(stat -c %a kept.csv)" = 640
rm -f kept.xml kept.csv

# A name of 255 bytes (NAME_MAX on the usual file systems).
long=$(printf 'n%.0s' $(seq 1 251)).xml
run summary plan.hlplan -o "$long"
expect_rc 0 "summary to a 255-byte name"
check "the 255-byte file holds the summary" grep -q "planning-summary" "$long"
run summary plan.hlplan -o "$long"
expect_rc 0 "summary over a 255-byte name"
rm -f "$long"

# batch --keep-going: the table of the plans that solved, the failures
# beside it, exit status 3.
run batch plan.hlplan bad.hlplan other.hlplan --keep-going --csv res.csv
expect_rc 3 "batch --keep-going with a bad plan"
check "res.csv has plan.hlplan" grep -q "^plan.hlplan,native," res.csv
check "res.csv has other.hlplan" grep -q "^other.hlplan,native," res.csv
check "res.csv has no bad.hlplan" bash -c '! grep -q "^bad.hlplan" res.csv'
check "failures header" test "$(head -n 1 res-failures.csv)" = "plan,error"
check "failures row" grep -q "^bad.hlplan," res-failures.csv
check "failures: two lines" test "$(wc -l < res-failures.csv)" = 2
check "says where the failures are" err_has "res-failures.csv"
run batch plan.hlplan other.hlplan --keep-going --csv res.csv
expect_rc 0 "batch --keep-going, all good"
check "failures table with the header only" test "$(cat res-failures.csv)" = "plan,error"
run batch plan.hlplan bad.hlplan --keep-going --csv noext
expect_rc 3 "batch --keep-going, a name without extension"
check "noext-failures" test -s noext-failures
run batch plan.hlplan bad.hlplan --csv strict.csv
expect_rc 1 "batch without --keep-going"
check "without --keep-going nothing is written" test ! -e strict.csv

# Each batch plan's time budget stops its work from inside the long loops:
# a 400 MB radiograph beside the plan takes seconds to hash; with a budget
# of 0.05 s (HIPLEVER_BATCH_PLAN_SECONDS) the plan fails with the budget's
# message long before the hash could end, and its radiograph is not
# reported as changed.
mkdir budget
cp plan.hlplan budget/plan.hlplan
printf '\211PNG\r\n\032\n' > budget/demo-radiograph.png
truncate -s 400M budget/demo-radiograph.png
t0=$(date +%s%N)
run batch budget/plan.hlplan --keep-going --csv budget.csv
full_ms=$(( ($(date +%s%N) - t0) / 1000000 ))
expect_rc 0 "batch with a 400 MB radiograph, the default budget"
check "the radiograph is reported as changed" err_has "changed"
t0=$(date +%s%N)
HIPLEVER_BATCH_PLAN_SECONDS=0.05 run batch budget/plan.hlplan --keep-going --csv budget.csv
cut_ms=$(( ($(date +%s%N) - t0) / 1000000 ))
expect_rc 3 "batch over a tiny time budget"
check "the failure names the budget" \
  grep -q '^budget/plan.hlplan,"loading and solving took .* s, over the time budget of 0.05 s"$' \
  budget-failures.csv
check "cut short: ${cut_ms} ms against ${full_ms} ms for the whole" \
  test "$cut_ms" -lt "$full_ms"
check "cut within a small margin of the budget (${cut_ms} ms)" test "$cut_ms" -lt 1000
check "no radiograph warning for a check cut short" bash -c '! grep -q changed "$0"' "$WORK/err"
rm -rf budget budget.csv budget-failures.csv

# CSV injection (OWASP): text cells that a spreadsheet would run get a
# leading apostrophe; negative numbers stay numbers.
sed 's/"Standard stem"/"=HYPERLINK(1)"/; s/"Lateralised stem +6 mm"/"-2+3"/' plan.hlplan > inj.hlplan
run solve inj.hlplan --format csv
expect_rc 0 "solve a plan with formula-like option names"
check "=HYPERLINK gets an apostrophe" grep -q "^'=HYPERLINK(1),52" out
check "-2+3 gets an apostrophe" grep -q "^'-2+3,56" out
check "negative numbers stay numbers" grep -q ",-2.000," out
run batch inj.hlplan --csv inj.csv
check "batch: =HYPERLINK gets an apostrophe" grep -q "^inj.hlplan,'=HYPERLINK(1)," inj.csv
run sweep inj.hlplan --param femoral_offset_mm --from -2 --to 2 --steps 3 --csv
check "sweep: =HYPERLINK gets an apostrophe" grep -q "^femoral_offset_mm,-2,'=HYPERLINK(1)," out
sed 's/"Standard stem"/"@cmd"/; s/"Lateralised stem +6 mm"/"+1"/' plan.hlplan > '@inj.hlplan'
printf 'not a plan\n' > "$(printf '\tbad.hlplan')"
run batch '@inj.hlplan' "$(printf './\tbad.hlplan')" --keep-going --csv inj2.csv
check "@cmd gets an apostrophe" grep -q "^'@inj.hlplan,'@cmd," inj2.csv
check "an option named +1 reads whole as a number and stays" grep -q "^'@inj.hlplan,+1," inj2.csv
run batch "$(printf '\tbad.hlplan')" --keep-going --csv inj3.csv
check "a plan name that begins with a tab gets an apostrophe" \
  grep -q "$(printf "^'\tbad.hlplan,")" inj3-failures.csv
rm -f '@inj.hlplan' "$(printf '\tbad.hlplan')" inj2.csv inj2-failures.csv inj3.csv \
  inj3-failures.csv

# Sweeps: written a block at a time (one header however long), and more
# than 100,000 rows refused with a message.
run sweep plan.hlplan --param femoral_offset_mm --from -5 --to 5 --steps 2500 --csv
expect_rc 0 "a sweep of 2,500 values"
check "one header" test "$(grep -c '^param,' out)" = 1
check "every row (native and the demo's four options)" test "$(wc -l < out)" = $((2500 * 5 + 1))
check "the values in order" bash -c "awk -F, 'NR>1 && \$3==\"native\"{print \$2}' '$WORK/out' | sort -g -c"
run sweep plan.hlplan --param femoral_offset_mm --from -5 --to 5 --steps 25001 --csv
expect_rc 1 "a sweep of 100,004 rows"
check "says the row limit" err_has "more than the 100000 a sweep may have"
check "nothing written" test ! -s out

# A Monte Carlo run holds at most 20,000,000 sample rows (samples times
# native and the options): 4,000,001 samples of the demo's five rows are
# refused at once, before any memory is taken.
t0=$(date +%s%N)
run uncertainty plan.hlplan --samples 4000001
mc_ms=$(( ($(date +%s%N) - t0) / 1000000 ))
expect_rc 1 "uncertainty over 20,000,000 sample rows"
check "says the sample-row limit" err_has "more than the 20000000 a run may hold: use at most 4000000 samples"
check "refused at once (${mc_ms} ms)" test "$mc_ms" -lt 2000

# fit ranks in chunks of at most 4,000,000 sample rows: a plan of 200,000
# samples ranks its 160 mechanics within 400 MB of address space (it
# took 530 MB before).  Not under a sanitizer, whose shadow memory needs
# more address space than that.
sed 's#  <options>#  <uncertainty samples="200000" seed="1" landmark-sd-mm="2" magnification-sd="0.02" angle-sd-deg="5"/>\n  <options>#' \
  plan.hlplan > samples.hlplan
if ! ldd "$CLI" 2>/dev/null | grep -q -e asan -e ubsan; then
  (ulimit -v 400000; "$CLI" fit samples.hlplan --sizes --format csv >"$WORK/out" 2>"$WORK/err")
  rc=$?
  expect_rc 0 "fit --sizes with 200,000 samples within 400 MB"
  check "fit: every combination ranked" test "$(grep -c '^[0-9]' out)" -ge 100
fi
rm -f samples.hlplan

# At most 64 options, said so.
{
  sed -n '1,/<options>/p' plan.hlplan
  for i in $(seq 1 65); do echo "    <option name=\"Option $i\"/>"; done
  sed -n '/<\/options>/,$p' plan.hlplan
} > many.hlplan
run validate many.hlplan
expect_rc 1 "65 options"
check "says at most 64 options" err_has "at most 64 options"

# A radiograph over 512 MB (a sparse file) is refused before it is read,
# and the warning says why; the plan is used without it.
mkdir big
cp plan.hlplan big/plan.hlplan
printf '\211PNG\r\n\032\n' > big/demo-radiograph.png
truncate -s 600M big/demo-radiograph.png
t0=$(date +%s%N)
run validate big/plan.hlplan
big_ms=$(( ($(date +%s%N) - t0) / 1000000 ))
expect_rc 0 "a plan with a 600 MB radiograph"
check "the warning says the size limit" err_has "is 600 MB: files over 512 MB are not opened"
check "the 600 MB file is not read through (${big_ms} ms)" test "$big_ms" -lt 2000
rm -rf big

# FILE:LINE: in front, and the line not said again after it.
run validate bad.hlplan
expect_rc 1 "validate a file that is not XML"
check "FILE:LINE: in front" err_has "^hiplever-cli: bad.hlplan:1: the file is not well-formed"
check "the line said once" bash -c '! grep -q "line 1" "$0"' "$WORK/err"
sed 's/mass-kg="72.5"/mass-kg="5"/' plan.hlplan > light.hlplan
run validate light.hlplan
expect_rc 1 "a body mass of 5 kg"
check "range error: FILE:LINE: in front" err_has "^hiplever-cli: light.hlplan:7: "
check "range error: the line said once" bash -c '! grep -q "line 7" "$0"' "$WORK/err"

echo "cli-trust: $passed passed, $failed failed"
[ "$failed" -eq 0 ]
