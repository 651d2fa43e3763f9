#!/bin/sh
# test-i18n-gui.sh: the window in German, its numbers, its plan files and
# its accessible names.
#
# Copyright 2026 the hiplever developers
# SPDX-License-Identifier: GPL-3.0-or-later
#
# Usage: test-i18n-gui.sh HIPLEVER SOURCE_DIR HIPLEVER_CLI BUILD_LOCALEDIR
#
# With the built catalogue (HIPLEVER_LOCALEDIR) and LC_ALL=de_DE.UTF-8:
# the visible labels (HIPLEVER_TEST_PRINT_LABELS=1 in --screenshot mode)
# are German, the caution among them; the results table has decimal
# commas; the planning summary written on quitting still uses the C
# locale's '.' and hiplever-cli validate reads it under LC_ALL=C.  In the
# C locale every side panel page passes HIPLEVER_TEST_CHECK_A11Y=1: no
# focusable control without an accessible name.  Those runs use GTK's own
# test accessibility backend (GTK_A11Y=test): with GTK_A11Y=none, as the
# other GUI tests run, widgets keep no accessible properties to check.
. "$(dirname "$0")/../gui/hl-gui-lib.sh" "$@"
CLI=$1
export HIPLEVER_LOCALEDIR=$2
HL_SHOT_W=1200
HL_SHOT_H=820

locale -a 2>/dev/null | grep -qi '^de_DE\.utf-\?8$' || {
  echo "the de_DE.UTF-8 locale is not generated (tests/bootstrap.sh does it)"
  exit 77
}

# Results: decimal commas in German, points in C (numbers are quoted in
# the CSV when they hold a comma).
LC_ALL=de_DE.UTF-8 "$HIPLEVER" --print-results "$HL_DEMO" >"$HL_TMP/de.csv" 2>"$HL_TMP/de.err" \
  || hl_fail "--print-results fails in German: $(cat "$HL_TMP/de.err")"
LC_ALL=C "$HIPLEVER" --print-results "$HL_DEMO" >"$HL_TMP/c.csv" 2>/dev/null \
  || hl_fail "--print-results fails in the C locale"
grep -q '^abductor-moment-arm,mm,"[0-9][0-9]*,[0-9]"' "$HL_TMP/de.csv" \
  || hl_fail "the German abductor moment arm has no decimal comma: $(grep '^abductor-moment-arm' "$HL_TMP/de.csv")"
grep -q '^abductor-moment-arm,mm,[0-9][0-9]*\.[0-9],' "$HL_TMP/c.csv" \
  || hl_fail "the C-locale abductor moment arm has no decimal point: $(grep '^abductor-moment-arm' "$HL_TMP/c.csv")"
hl_note "results: $(grep '^abductor-moment-arm' "$HL_TMP/de.csv")"

# The window in German: labels, accessibility, the picture and the summary.
rc=0
LC_ALL=de_DE.UTF-8 HIPLEVER_TEST_PRINT_LABELS=1 HIPLEVER_TEST_CHECK_A11Y=1 GTK_A11Y=test \
  "$HIPLEVER" --screenshot "$HL_TMP/de.png" --size "${HL_SHOT_W}x$HL_SHOT_H" --panel options \
  --dump-summary-on-exit "$HL_TMP/de-summary.xml" "$HL_DEMO" >"$HL_TMP/de.out" 2>"$HL_TMP/de.err" \
  || rc=$?
[ "$rc" -eq 0 ] || { HL_OUT=$HL_TMP/de.out; hl_fail "the German screenshot run exits with $rc"; }
for text in 'Nur eine Planungshilfe' 'Rekonstruktionsoptionen' 'Ergebnisse' \
            'Pfannenmedialisierung' 'Gelenkreaktionskraft' 'Befolgen Sie die örtlichen Protokolle'; do
  grep -q "^LABEL .*$text" "$HL_TMP/de.out" || { HL_OUT=$HL_TMP/de.out; hl_fail "no German label with '$text'"; }
done
grep -q '^LABEL Reconstruction options$' "$HL_TMP/de.out" \
  && { HL_OUT=$HL_TMP/de.out; hl_fail "an English heading in the German window"; }
grep -q '^A11Y 0 unlabelled$' "$HL_TMP/de.out" || { HL_OUT=$HL_TMP/de.out; hl_fail "unlabelled controls in German"; }
hl_check_png "$HL_TMP/de.png" "$HL_SHOT_W" "$HL_SHOT_H"
[ -n "${HL_GUI_KEEP:-}" ] && mkdir -p "$HL_GUI_KEEP" && cp "$HL_TMP/de.png" "$HL_GUI_KEEP/i18n-de.png"

# Files use the C locale whatever the window's: every number attribute
# has a '.' or none, never a ','.
[ -s "$HL_TMP/de-summary.xml" ] || hl_fail "no planning summary written"
mass=$(xmllint --xpath 'string(//*[local-name()="case"]/@mass-kg)' "$HL_TMP/de-summary.xml")
[ "$mass" = "72.5" ] || hl_fail "the case mass reads '$mass', not 72.5"
if grep -Eq '="-?[0-9]+,[0-9]+"' "$HL_TMP/de-summary.xml"; then
  hl_fail "a decimal comma in the summary: $(grep -Eo '[a-z-]+="-?[0-9]+,[0-9]+"' "$HL_TMP/de-summary.xml" | head -n 3)"
fi
points=$(grep -Eo '="-?[0-9]+\.[0-9]+"' "$HL_TMP/de-summary.xml" | wc -l)
hl_expect "numbers with a decimal point in the summary" "$points" ">" 20
LC_ALL=C "$CLI" validate "$HL_TMP/de-summary.xml" >"$HL_TMP/validate.out" 2>&1 \
  || hl_fail "hiplever-cli validate rejects the German window's summary: $(cat "$HL_TMP/validate.out")"
grep -q ': valid (4 options)$' "$HL_TMP/validate.out" || hl_fail "validate says: $(cat "$HL_TMP/validate.out")"

# Every page in the C locale: every control has an accessible name.
for page in case landmarks options aids radiograph analysis; do
  rc=0
  HIPLEVER_TEST_CHECK_A11Y=1 GTK_A11Y=test "$HIPLEVER" --screenshot "$HL_TMP/a11y-$page.png" \
    --size "${HL_SHOT_W}x$HL_SHOT_H" --panel "$page" "$HL_DEMO" >"$HL_TMP/a11y-$page.out" 2>/dev/null \
    || rc=$?
  grep -q '^A11Y 0 unlabelled$' "$HL_TMP/a11y-$page.out" && [ "$rc" -eq 0 ] \
    || { HL_OUT=$HL_TMP/a11y-$page.out; hl_fail "page $page: controls without an accessible name (exit $rc)"; }
done
hl_note "every page: every focusable control has an accessible name"
echo "i18n-gui: passed"
