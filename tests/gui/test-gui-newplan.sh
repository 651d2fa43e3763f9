#!/bin/sh
# New plan (Ctrl+N): the window starts from the schematic with every
# landmark at a plausible default, no options and no radiograph, says which
# landmarks to move, and asks first when the open plan has unsaved changes.
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

# 1. An unchanged plan: Ctrl+N at once, and the status line says what to move.
hl_start new --dump-summary-on-exit "$HL_TMP/new.xml" "$HL_DEMO"
hl_key ctrl+n
hl_settle
hl_grab new-plan
hl_quit_discarding
check_new_plan "$HL_TMP/new.xml"

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
echo "PASS"
