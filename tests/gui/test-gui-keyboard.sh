#!/bin/sh
# Select a landmark with the mouse and nudge it with the arrow keys; each
# nudge is one undo step; the unsaved-changes guard; Ctrl+S.
#
# Copyright 2026 the hiplever developers
# SPDX-License-Identifier: GPL-3.0-or-later
#
# Arrow keys move the selected landmark by 0.5 mm, with Shift by 5 mm
# (ui.md); plan x points to the patient's left, which is screen right.
. "$(dirname "$0")/hl-gui-lib.sh"

plan="$HL_TMP/case.hlplan"
cp "$HL_DEMO" "$plan"
lm=abductor-origin
base_x=$(xmllint --xpath "string(//*[local-name()='landmark'][@name='$lm']/@x-mm)" "$plan")
base_y=$(xmllint --xpath "string(//*[local-name()='landmark'][@name='$lm']/@y-mm)" "$plan")

# 1. nudges, one undo, then the guard: Ctrl+Q asks; Escape keeps the
#    window; Ctrl+Q and Discard end it.
hl_start nudge --dump-summary-on-exit "$HL_TMP/nudge.xml" "$plan"
set -- $(hl_pos HANDLE $lm)
[ $# -eq 2 ] || hl_fail "no position printed for $lm"
xdotool mousemove --window "$HL_WID" "$1" "$2" click 1
hl_settle
sel=$(awk '$1 == "SELECTED" { s = $2 " " $3 } END { print s }' "$HL_OUT")
[ "$sel" = "$lm $lm" ] || hl_fail "a click on the handle selected '$sel' (schematic, table)"
hl_note "ok: the click selected $lm on the schematic and in the landmark table"
for k in Right Right shift+Up shift+Left Down; do
  hl_key "$k"
  hl_settle
done
hl_grab after-nudges
hl_key ctrl+z
hl_settle
hl_key ctrl+q
hl_wait_dialog "Unsaved changes"
kill -0 "$HL_PID" 2>/dev/null || hl_fail "quit with unsaved changes did not ask first"
hl_note "ok: the unsaved-changes question came up"
hl_grab guard-dialog
hl_key Escape
sleep 0.5
kill -0 "$HL_PID" 2>/dev/null || hl_fail "Cancel in the unsaved-changes question still quit"
hl_note "ok: Cancel kept the window open"
hl_quit_discarding

x=$(hl_landmark "$HL_TMP/nudge.xml" $lm x-mm)
y=$(hl_landmark "$HL_TMP/nudge.xml" $lm y-mm)
# Right, Right, Shift+Left: +0.5 +0.5 -5; Shift+Up +5; Down -0.5 undone.
hl_expect "x after two small steps right and one large step left" "$x" "~" "$(awk -v b="$base_x" 'BEGIN { print b + 0.5 + 0.5 - 5 }')"
hl_expect "y after a large step up (the small step down undone)" "$y" "~" "$(awk -v b="$base_y" 'BEGIN { print b + 5 }')"
grep -q "x-mm=\"$base_x\" y-mm=\"$base_y\"" "$plan" || hl_fail "discarding changed the file on disk"
hl_note "ok: Discard left the file as it was"

# 2. a nudge, Ctrl+S, then Ctrl+Q quits without asking.
hl_start save "$plan"
set -- $(hl_pos HANDLE $lm)
xdotool mousemove --window "$HL_WID" "$1" "$2" click 1
hl_settle
hl_key shift+Right
hl_settle
hl_key ctrl+s
sleep 0.5
hl_key ctrl+q
hl_wait_exit
saved_x=$(xmllint --xpath "string(//*[local-name()='landmark'][@name='$lm']/@x-mm)" "$plan")
hl_expect "the saved file has the nudged landmark" "$saved_x" "~" "$(awk -v b="$base_x" 'BEGIN { print b + 5 }')"

# 3. the mass spin button: three steps up are one undo step.
hl_start spin --dump-summary-on-exit "$HL_TMP/spin.xml" "$plan"
set -- $(hl_pos WIDGET mass-spin)
[ $# -eq 2 ] || hl_fail "no position printed for the mass spin button"
xdotool mousemove --window "$HL_WID" "$1" "$2" click 1
for k in Up Up Up; do
  hl_key "$k"
  sleep 0.2
done
# Ctrl+Z with the focus still in the number field is the plan's undo.
sleep 0.3
title=$(xdotool getwindowname "$HL_WID")
case "$title" in
  "• "*) hl_note "ok: the title marks the change: $title" ;;
  *) hl_fail "the spin button steps changed nothing (title '$title')" ;;
esac
hl_mark
hl_key ctrl+z
hl_settle
title=$(xdotool getwindowname "$HL_WID")
case "$title" in
  "• "*) hl_fail "still marked modified after undo: $title" ;;
  *) hl_note "ok: back to the saved state: $title" ;;
esac
hl_quit_discarding
mass=$(xmllint --xpath "string(//*[local-name()='case']/@mass-kg)" "$HL_TMP/spin.xml")
hl_expect "one Ctrl+Z undid three steps of the mass spin button" "$mass" "~" 72.5

# 4. a coordinate typed into the landmark table.
hl_start table --dump-summary-on-exit "$HL_TMP/table.xml" "$plan"
hl_click page-landmarks
hl_settle
set -- $(hl_pos WIDGET lm-x-hip-centre)
[ $# -eq 2 ] || hl_fail "no position printed for the hip centre's x"
# The row's name, left of its x field, selects it on the schematic too.
xdotool mousemove --window "$HL_WID" $(($1 - 150)) "$2" click 1
hl_settle
sel=$(awk '$1 == "SELECTED" { s = $2 " " $3 } END { print s }' "$HL_OUT")
[ "$sel" = "hip-centre hip-centre" ] || hl_fail "a click on the table row selected '$sel' (schematic, table)"
hl_note "ok: the table row selected the hip centre on the schematic"
xdotool mousemove --window "$HL_WID" "$1" "$2" click 1
hl_key ctrl+a
xdotool type --delay 20 -- "-97.5"
hl_key Return
hl_settle
hl_quit_discarding
x=$(hl_landmark "$HL_TMP/table.xml" hip-centre x-mm)
hl_expect "the typed hip centre x" "$x" "~" -97.5
echo "PASS"
