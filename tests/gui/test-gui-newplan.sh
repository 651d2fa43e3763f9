#!/bin/sh
# New plan (Ctrl+N and the menu): the window starts from the schematic with every
# landmark at a plausible default, no options and no radiograph, says which
# landmarks to move, and asks first when the open plan has unsaved changes.
# Importing a new radiograph over a plan's own asks whether to keep or clear
# the landmarks and the calibration.
#
# Copyright 2026 the hiplever developers
# SPDX-License-Identifier: GPL-3.0-or-later
#
# The defaults are the invented adult geometry of model.md section 2
# (hl_plan_set_demo_landmarks): hip centre at (-95, 0) mm.  No computation
# is checked against an outside source.
. "$(dirname "$0")/hl-gui-lib.sh"

check_new_plan () {
  summary=$1
  [ -s "$summary" ] || hl_fail "no summary was written"
  label=$(xmllint --xpath "string(//*[local-name()='case']/@label)" "$summary")
  [ "$label" = "New plan" ] || hl_fail "the case label is '$label', not 'New plan'"
  hl_expect "options of the new plan" "$(hl_count "$summary" option)" "~" 0
  hl_expect "radiographs of the new plan" "$(hl_count "$summary" radiograph)" "~" 0
  hl_expect "hip centre x of the new plan" "$(hl_landmark "$summary" hip-centre x-mm)" "~" -95
  hl_expect "hip centre y of the new plan" "$(hl_landmark "$summary" hip-centre y-mm)" "~" 0
  for lm in midline abductor-insertion teardrop lesser-trochanter hip-centre-other; do
    x=$(hl_landmark "$summary" "$lm" x-mm)
    [ -n "$x" ] || hl_fail "the new plan has no $lm"
  done
  hl_expect "results of the new plan" "$(hl_count "$summary" result)" "~" 1
  hl_expect "joint force of the new plan" "$(hl_result "$summary" 1 joint-force-n)" ">" 0
}

# The status line after a new plan: which landmarks to move first.
check_status () {
  status=$(awk '$1 == "STATUS" { line = $0 } END { print substr(line, 8) }' "$HL_OUT")
  case $status in
    *"Move the required ones to the patient (Hip centre, Midline point, Abductor insertion)"*)
      hl_note "ok: $1: the status line says which landmarks to move" ;;
    *) hl_fail "$1: the status line says '$status'" ;;
  esac
}

# 1. An unchanged plan: Ctrl+N at once, and the status line says what to move.
hl_start new --dump-summary-on-exit "$HL_TMP/new.xml" "$HL_DEMO"
hl_key ctrl+n
hl_settle
hl_grab new-plan
check_status "Ctrl+N"
hl_quit_discarding
check_new_plan "$HL_TMP/new.xml"

# 1b. The same from the menu (F10, New Plan under its mnemonic N).
hl_start menu --dump-summary-on-exit "$HL_TMP/menu.xml" "$HL_DEMO"
hl_key F10
sleep 0.5
hl_key n
hl_settle
hl_grab new-plan-menu
check_status "the menu's New Plan"
hl_quit_discarding
check_new_plan "$HL_TMP/menu.xml"

# 2. With unsaved changes the window asks first; Discard starts the new plan.
hl_start edited --dump-summary-on-exit "$HL_TMP/edited.xml" "$HL_DEMO"
hl_click page-aids
hl_settle
hl_click cane-check
hl_settle
hl_key ctrl+n
hl_wait_dialog "Unsaved changes"
hl_key alt+d
hl_settle
hl_quit_discarding
check_new_plan "$HL_TMP/edited.xml"
# 3. A new radiograph over the plan's own asks whether to keep or clear the
# landmarks and the calibration (never silently keeps them).  The plan's
# hip centre is moved off the default so that keeping and clearing differ.
moved="$HL_TMP/moved.hlplan"
sed 's/<landmark name="hip-centre" x-mm="-95" y-mm="0"/<landmark name="hip-centre" x-mm="-97" y-mm="1"/' \
  "$HL_DEMO" >"$moved"
cp "$SRCDIR/data/examples/demo-radiograph.png" "$HL_TMP/"
grep -q 'x-mm="-97" y-mm="1"' "$moved" || hl_fail "could not move the hip centre"
cp "$SRCDIR/data/examples/demo-radiograph.png" "$HL_TMP/new-image.png"
for answer in clear keep; do
  HIPLEVER_TEST_UNDERLAY="$HL_TMP/new-image.png" HIPLEVER_TEST_IMPORT_ANSWER=ask \
    hl_start "import-$answer" --dump-summary-on-exit "$HL_TMP/import-$answer.xml" "$moved"
  hl_wait_dialog "A new radiograph"
  if [ "$answer" = clear ]; then hl_key alt+l; else hl_key alt+k; fi
  sleep 1
  hl_quit_discarding
  s="$HL_TMP/import-$answer.xml"
  path=$(xmllint --xpath "string(//*[local-name()='radiograph']/@path)" "$s")
  case "$path" in *new-image.png) ;; *) hl_fail "$answer: the radiograph is '$path'" ;; esac
  method=$(xmllint --xpath "string(//*[local-name()='calibration']/@method)" "$s")
  if [ "$answer" = clear ]; then
    hl_expect "clear: hip centre x back to the default" "$(hl_landmark "$s" hip-centre x-mm)" "~" -95
    [ "$method" = assumed ] || hl_fail "clear: the calibration is '$method', not assumed"
  else
    hl_expect "keep: hip centre x kept" "$(hl_landmark "$s" hip-centre x-mm)" "~" -97
    [ "$method" = marker ] || hl_fail "keep: the calibration is '$method', not the marker"
  fi
done
echo "PASS"
