#!/usr/bin/env bash
# test-cli-template.sh: hiplever-cli catalogue and fit (implant templating).
#
# Copyright 2026 the hiplever developers
# SPDX-License-Identifier: GPL-3.0-or-later
#
# Usage: test-cli-template.sh CLI SOURCE_DIR
# Prints one line per failure and, last, "cli-template: N passed, M failed";
# exits non-zero on any failure.  The demo plan's templated option is the
# fourth; its four derived numbers are written in the plan file, and the
# ranking must reproduce them for its own combination.
set -u
export LC_ALL=C TZ=UTC

if [ $# -ne 2 ]; then
  echo "usage: $0 CLI SOURCE_DIR" >&2
  exit 2
fi
CLI=$1
SRC=$2
DEMO=$SRC/data/examples/demo.hlplan
CAT=$SRC/data/catalogues/demo.hlcat
XSD=$SRC/data/hiplever-plan.xsd
CAT_XSD=$SRC/data/hiplever-implants.xsd
HEADER='rank,cup_mm,liner,stem_size,version,head_mm,c_med_mm,c_sup_mm,f_off_mm,f_len_mm,leg_length_change_mm,global_offset_change_mm,leg_length_residual_mm,global_offset_residual_mm,abductor_force_BW,jrf_BW,jrf_p95_BW'

WORK=$(mktemp -d "${TMPDIR:-/tmp}/hiplever-cli-template.XXXXXX")
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
  local want=$1 what=$2
  if [ "$rc" -eq "$want" ]; then pass; else
    fail "$what: exit status $rc, expected $want (stderr: $(head -c 300 "$WORK/err"))"
  fi
}
out_has () { grep -q -e "$1" "$WORK/out"; }
err_has () { grep -q -e "$1" "$WORK/err"; }

# ---- catalogue ------------------------------------------------------------------

check "the demo catalogue validates against its schema" \
  xmllint --noout --schema "$CAT_XSD" "$CAT"
run catalogue "$CAT"
expect_rc 0 "catalogue demo"
check "catalogue lists the cup family and its 12 sizes" \
  out_has "^cup family demo-cup .*12 sizes, outer diameter (mm) 44 46 48 50 52 54 56 58 60 62 64 66"
check "catalogue lists both stem families" \
  sh -c "grep -q '^stem family demo-cementless .*cementless' '$WORK/out' && grep -q '^stem family demo-cemented .*cemented' '$WORK/out'"
check "catalogue lists ten sizes per stem family" test "$(grep -c '^  size ' "$WORK/out")" -eq 20
check "catalogue lists the heads" out_has "^head family demo-head-36, diameter 36 mm: lengths (mm) -4 0 +4 +8"

# Four broken catalogues, each with its own message naming element and line.
broken () {  # NAME SED-EXPRESSION WORDS LINE-PATTERN
  sed -e "$2" "$CAT" >"$WORK/$1.hlcat"
  run catalogue "$WORK/$1.hlcat"
  expect_rc 1 "catalogue $1"
  check "catalogue $1: says '$3'" err_has "$3"
  check "catalogue $1: names the element and line" err_has "$1.hlcat: line [0-9][0-9]*, element <$4>"
  check "catalogue $1: nothing on stdout" test ! -s "$WORK/out"
}
broken missing-size 's/<stem size="3" /<stem /' "missing size" stem
broken bad-width '0,/width-mm="18.0"/s//width-mm="wide"/' "is not a number" body
broken unknown-version '0,/<neck version="lateralised"/s//<neck version="offset"/' "unknown version" neck
broken duplicate-size 's/<stem size="4" /<stem size="3" /' "duplicate size" stem
run catalogue "$WORK/no-such.hlcat"
expect_rc 1 "catalogue of a missing file"

# ---- fit --------------------------------------------------------------------------

run fit "$DEMO" --format csv
expect_rc 0 "fit demo"
check "fit: the header is exactly the contract" test "$(head -1 "$WORK/out")" = "$HEADER"
check "fit: 2 liners x 2 versions x 4 heads = 16 rows" test "$(tail -n +2 "$WORK/out" | wc -l)" -eq 16
cp "$WORK/out" "$WORK/fit.csv"
python3 - "$WORK/fit.csv" <<'PY' || fail "fit: ranks, scores and the plan's own combination"
import csv, sys
rows = list(csv.DictReader(open(sys.argv[1])))
assert [int(r["rank"]) for r in rows] == list(range(1, len(rows) + 1))
score = [abs(float(r["leg_length_residual_mm"])) + abs(float(r["global_offset_residual_mm"])) for r in rows]
assert all(a <= b + 0.0015 for a, b in zip(score, score[1:])), score
for r in rows:
    # leg length change f_len - c_sup, global offset change f_off - c_med
    assert abs(float(r["leg_length_change_mm"]) - (float(r["f_len_mm"]) - float(r["c_sup_mm"]))) <= 0.0015
    assert abs(float(r["global_offset_change_mm"]) - (float(r["f_off_mm"]) - float(r["c_med_mm"]))) <= 0.0015
    assert float(r["jrf_p95_BW"]) >= float(r["jrf_BW"]) * 0.9
    for k in ("cup_mm", "c_med_mm", "jrf_BW", "jrf_p95_BW"):
        assert len(r[k].split(".")[1]) == 3, (k, r[k])
# the plan's own implants: 56 mm cup, neutral liner, size 8 standard, head 0;
# their numbers are in demo.hlplan (2, -1, 0.81406..., -0.95851...)
own = [r for r in rows if r["liner"] == "neutral" and r["stem_size"] == "8"
       and r["version"] == "standard" and r["head_mm"] == "0.000"]
assert len(own) == 1, own
o = own[0]
assert (o["cup_mm"], o["c_med_mm"], o["c_sup_mm"], o["f_off_mm"], o["f_len_mm"]) == \
       ("56.000", "2.000", "-1.000", "0.814", "-0.959"), o
# the lateralised liner moves the centre 4 mm along the face normal at
# 40 degrees: c_med 2 - 4 sin 40 = -0.571, c_sup -1 - 4 cos 40 = -4.064
lat = [r for r in rows if r["liner"] == "lateralised-4"]
assert all((r["c_med_mm"], r["c_sup_mm"]) == ("-0.571", "-4.064") for r in lat), lat[0]
PY
pass
# the same numbers as solve gives for the templated option
run solve "$DEMO" --format csv
cp "$WORK/out" "$WORK/solve.csv"
python3 - "$WORK/fit.csv" "$WORK/solve.csv" <<'PY' || fail "fit: the plan's own row has solve's forces"
import csv, sys
fit = [r for r in csv.DictReader(open(sys.argv[1])) if r["liner"] == "neutral"
       and r["stem_size"] == "8" and r["version"] == "standard" and r["head_mm"] == "0.000"][0]
rows = list(csv.reader(open(sys.argv[2])))
head = rows[0]
sol = [dict(zip(head, r)) for r in rows[1:] if r and r[0] == "Templated: demo cementless stem"][0]
assert fit["abductor_force_BW"] == sol["abductor_force_BW"], (fit, sol)
assert fit["jrf_BW"] == sol["jrf_BW"], (fit, sol)
assert fit["leg_length_change_mm"] == sol["leg_length_change_mm"]
assert fit["global_offset_change_mm"] == sol["global_offset_change_mm"]
PY
pass

run fit "$DEMO" --sizes --format csv
expect_rc 0 "fit --sizes"
check "fit --sizes: 12 cups x 2 liners x 10 stems x 2 versions x 4 heads rows" \
  test "$(tail -n +2 "$WORK/out" | wc -l)" -eq 1920
run fit "$DEMO"
expect_rc 0 "fit as text"
check "fit text names the option and the target" out_has 'option "Templated: demo cementless stem".*against the other hip'
check "fit text carries the caution" out_has "Planning aid only"

# --apply writes the plan; solve then gives the same forces as the ranked row
run fit "$DEMO" --apply 3 -o "$WORK/applied.hlplan"
expect_rc 0 "fit --apply 3"
check "the applied plan validates" xmllint --noout --schema "$XSD" "$WORK/applied.hlplan"
run solve "$WORK/applied.hlplan" --format csv
expect_rc 0 "solve the applied plan"
cp "$WORK/out" "$WORK/applied.csv"
python3 - "$WORK/fit.csv" "$WORK/applied.csv" <<'PY' || fail "--apply then solve gives the ranked row's forces"
import csv, sys
third = list(csv.DictReader(open(sys.argv[1])))[2]
rows = list(csv.reader(open(sys.argv[2])))
sol = [dict(zip(rows[0], r)) for r in rows[1:] if r and r[0] == "Templated: demo cementless stem"][0]
for a, b in (("abductor_force_BW", "abductor_force_BW"), ("jrf_BW", "jrf_BW"),
             ("leg_length_change_mm", "leg_length_change_mm"),
             ("global_offset_change_mm", "global_offset_change_mm")):
    assert third[a] == sol[b], (a, third[a], sol[b])
PY
pass
check "the applied plan records the combination" \
  grep -q "stem-size=\"$(sed -n 4p "$WORK/fit.csv" | cut -d, -f4)\"" "$WORK/applied.hlplan"

# usage and refusals
run fit "$DEMO" --apply 1
expect_rc 2 "--apply without -o"
run fit "$DEMO" --apply 0 -o "$WORK/x.hlplan"
expect_rc 2 "--apply 0"
run fit "$DEMO" --apply 17 -o "$WORK/x.hlplan"
expect_rc 1 "--apply beyond the last rank"
check "nothing written on a refused --apply" test ! -e "$WORK/x.hlplan"
run fit "$DEMO" --apply 1 -o "$DEMO"
expect_rc 1 "--apply over the input"
run fit "$DEMO" --format xml
expect_rc 2 "fit --format xml"
run fit "$DEMO" --option "Standard stem"
expect_rc 1 "fit of a manual option"
check "fit of a manual option says so" err_has "not templated"
run fit "$DEMO" --option "No such option"
expect_rc 1 "fit of an unknown option"
run fit "$SRC/data/examples/minimal.hlplan"
expect_rc 1 "fit of a plan without a template"
check "fit without a template says so" err_has "no templated option"

# without the lesser trochanter tip the seat is measured from the hip
# centre, and the text says so
sed -e '/<landmark name="lesser-trochanter" /d' "$DEMO" >"$WORK/no-tip.hlplan"
run fit "$WORK/no-tip.hlplan"
expect_rc 0 "fit without the lesser trochanter tip"
check "fit says the seat is from the hip centre" out_has "measured from the hip centre"

# a changed catalogue is reported when the plan opens, nothing re-derived
sed -e 's/sha256="25be/sha256="00be/' "$DEMO" >"$WORK/changed.hlplan"
cp "$SRC/data/examples/demo-radiograph.png" "$WORK/"
run solve "$WORK/changed.hlplan" --format csv
expect_rc 0 "solve a plan whose catalogue changed"
check "the changed catalogue is reported" err_has "warning: .*has changed since the plan was saved"
check "the saved numbers stand" out_has "^Templated: demo cementless stem,53.952,"
run fit "$WORK/changed.hlplan"
expect_rc 1 "fit refuses a changed catalogue"

echo "cli-template: $passed passed, $failed failed"
[ "$failed" -eq 0 ]
