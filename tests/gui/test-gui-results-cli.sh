#!/bin/sh
# The results table agrees with hiplever-cli solve on the same plans: every
# figure as the window formats it is the CLI's figure rounded to the
# window's digits, and the flags are the same.
#
# Copyright 2026 the hiplever developers
# SPDX-License-Identifier: GPL-3.0-or-later
. "$(dirname "$0")/hl-gui-lib.sh"
CLI=$1

compare () {
  python3 - "$1" "$2" <<'PY'
import csv, sys

# window row key -> CLI column
COLUMNS = {
    "abductor-moment-arm": "abductor_arm_mm",
    "body-weight-moment-arm": "bw_arm_mm",
    "lever-ratio": "lever_ratio",
    "abductor-force-n": "abductor_force_N",
    "abductor-force-bw": "abductor_force_BW",
    "joint-reaction-force-n": "jrf_N",
    "joint-reaction-force-bw": "jrf_BW",
    "joint-force-angle": "jrf_angle_deg",
    "global-offset-change": "global_offset_change_mm",
    "leg-length-change": "leg_length_change_mm",
    "abductor-length-change": "abductor_length_change_mm",
}
# Both sides round; a figure may differ by half a unit in the last place
# of each, and a little for binary floating point.
FLOAT_SLACK = 1e-9

def half_unit(text):
    digits = len(text.split(".")[1]) if "." in text else 0
    return 0.5 * 10.0 ** -digits

win = list(csv.reader(open(sys.argv[1])))
cli = list(csv.DictReader(open(sys.argv[2])))
header = win[0]
names = header[2:]
if len(names) != len(cli):
    sys.exit("window has %d columns, CLI %d rows" % (len(names), len(cli)))
checked = 0
for row in win[1:]:
    key = row[0]
    if key.endswith(("-p05", "-p95")) or key == "lower-jrf-than-native":
        continue  # the Monte Carlo ranges: test-gui-analysis.sh
    for j, cell in enumerate(row[2:]):
        ref = cli[j]
        if key == "error":
            if cell:
                sys.exit("%s: the window could not solve it: %s" % (names[j], cell))
            continue
        if key == "flags":
            a = sorted(f for f in cell.replace(";", " ").split() if f)
            b = sorted(f for f in ref["flags"].replace(";", " ").replace("|", " ").split() if f)
            if a != b:
                sys.exit("%s flags: window %s, CLI %s" % (names[j], a, b))
            checked += 1
            continue
        value = float(cell)
        expected = float(ref[COLUMNS[key]])
        tol = half_unit(cell) + half_unit(ref[COLUMNS[key]]) + FLOAT_SLACK
        if abs(value - expected) > tol:
            sys.exit("%s %s: window %s, CLI %s (tolerance %g)"
                     % (names[j], key, cell, ref[COLUMNS[key]], tol))
        checked += 1
print("# ok: %d figures agree" % checked)
PY
}

nocane="$HL_TMP/no-cane.hlplan"
sed 's/<cane enabled="true"/<cane enabled="false"/' "$HL_DEMO" >"$nocane"
# The first option with a cup 9 mm medial and the femur 14 mm longer:
# global offset down 9 mm and the leg 13 mm longer, both flagged.
flagged="$HL_TMP/flagged.hlplan"
sed '0,/cup-medial-mm="2" cup-superior-mm="1" femoral-offset-mm="0" femoral-length-mm="2"/s//cup-medial-mm="9" cup-superior-mm="1" femoral-offset-mm="0" femoral-length-mm="14"/' \
  "$HL_DEMO" >"$flagged"
"$HIPLEVER" --print-results "$flagged" >"$HL_TMP/flagged.csv" || hl_fail "--print-results failed on $flagged"
grep -q '^flags,,,global-offset-reduced;leg-length,' "$HL_TMP/flagged.csv" \
  || hl_fail "the flagged option shows no flags: $(grep '^flags' "$HL_TMP/flagged.csv")"
hl_note "ok: $(grep '^flags' "$HL_TMP/flagged.csv")"
for plan in "$HL_DEMO" "$SRCDIR/data/examples/demo-left.hlplan" "$nocane" "$flagged"; do
  [ -f "$plan" ] || continue
  "$HIPLEVER" --print-results "$plan" >"$HL_TMP/window.csv" || hl_fail "--print-results failed on $plan"
  "$CLI" solve "$plan" --format csv >"$HL_TMP/cli.csv" || hl_fail "hiplever-cli solve failed on $plan"
  hl_note "$(basename "$plan")"
  compare "$HL_TMP/window.csv" "$HL_TMP/cli.csv" || hl_fail "the window and the CLI disagree on $plan"
done
# The window writes numbers the way the user's locale does (where a
# German locale is installed: a decimal comma); files stay in C.
de=$(locale -a 2>/dev/null | grep -i '^de_DE\.utf-\?8$' | head -n 1 || true)
if [ -n "$de" ]; then
  LC_ALL=$de "$HIPLEVER" --print-results --dump-summary-on-exit "$HL_TMP/de.xml" "$HL_DEMO" \
    >"$HL_TMP/de.csv" || hl_fail "--print-results failed in $de"
  grep -q '^abductor-moment-arm,mm,"52,5","52,4"' "$HL_TMP/de.csv" \
    || hl_fail "no decimal commas in $de: $(grep '^abductor-moment-arm' "$HL_TMP/de.csv")"
  grep -q 'abductor-arm-mm="52\.5' "$HL_TMP/de.xml" || hl_fail "the summary written in $de is not in C numbers"
  hl_note "ok: $de: $(grep '^abductor-moment-arm' "$HL_TMP/de.csv"); the summary keeps C numbers"
else
  hl_note "skip: no German locale installed for the locale check"
fi

# A plan that cannot be solved: the reason where the numbers would be.
bad="$HL_TMP/midline-lateral.hlplan"
sed 's|<landmark name="midline" x-mm="0"|<landmark name="midline" x-mm="-130"|' "$HL_DEMO" >"$bad"
grep -q 'x-mm="-130"' "$bad" || hl_fail "could not move the midline"
"$HIPLEVER" --print-results "$bad" >"$HL_TMP/bad.csv" || hl_fail "--print-results failed on $bad"
python3 - "$HL_TMP/bad.csv" <<'PY' || hl_fail "the unsolvable plan is not reported in every column"
import csv, sys
rows = {r[0]: r[2:] for r in csv.reader(open(sys.argv[1]))}
errors = rows["error"]
assert errors and all("midline" in e for e in errors), errors
assert all(v == "" for v in rows["joint-reaction-force-n"]), rows["joint-reaction-force-n"]
print("# ok: every column says: " + errors[0])
PY
echo "PASS"
