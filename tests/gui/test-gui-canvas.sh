#!/bin/sh
# The schematic's own gestures and keys: Escape cancels a drag, Tab steps
# through the landmarks, Ctrl+scroll zooms about the pointer, a drag on
# empty space pans.
#
# Copyright 2026 the hiplever developers
# SPDX-License-Identifier: GPL-3.0-or-later
#
# These check the widget against its own contract (ui/hl-canvas.h); no
# computation is checked against an outside source.
. "$(dirname "$0")/hl-gui-lib.sh"

DRAG_PX=40
DRAG_STEPS=8
# Two Ctrl+scroll steps of 1.2 each: a drag of the same pixels then moves
# the landmark by 1/1.44 of the distance; allow for rounding to whole px.
ZOOM_RATIO_MAX=0.8
NUDGE_MM=0.5
NUDGE_LARGE_MM=5
HL_TOL=1e-6

plan="$HL_TMP/case.hlplan"
cp "$HL_DEMO" "$plan"
lm_x () { hl_landmark "$1" "$2" x-mm; }
lm_y () { hl_landmark "$1" "$2" y-mm; }

# drag_from X Y [key]: presses at (X, Y), moves DRAG_PX to the right in
# steps, presses `key` (if any) while the button is still down, releases.
drag_from () {
  hl_mark
  xdotool mousemove --window "$HL_WID" "$1" "$2"
  sleep 0.2
  xdotool mousedown 1
  i=1
  while [ "$i" -le "$DRAG_STEPS" ]; do
    xdotool mousemove --window "$HL_WID" $(($1 + DRAG_PX * i / DRAG_STEPS)) "$2"
    sleep 0.05
    i=$((i + 1))
  done
  if [ $# -ge 3 ]; then
    # Not hl_key: --clearmodifiers would lift the mouse button as well.
    xdotool key "$3"
    sleep 0.2
  fi
  xdotool mouseup 1
  sleep 0.3
}

base_ins_x=$(lm_x "$plan" abductor-insertion)
base_ins_y=$(lm_y "$plan" abductor-insertion)
base_hip_x=$(lm_x "$plan" hip-centre)
base_mid_x=$(lm_x "$plan" midline)

# 1. Escape during a drag puts the landmark back.
hl_start cancel --dump-summary-on-exit "$HL_TMP/cancel.xml" "$plan"
set -- $(hl_pos HANDLE abductor-insertion)
[ $# -eq 2 ] || hl_fail "no position printed for the abductor insertion"
drag_from "$1" "$2" Escape
hl_quit_discarding
hl_expect "Escape: insertion x back where it was" "$(lm_x "$HL_TMP/cancel.xml" abductor-insertion)" "~" "$base_ins_x"
hl_expect "Escape: insertion y back where it was" "$(lm_y "$HL_TMP/cancel.xml" abductor-insertion)" "~" "$base_ins_y"

# 2. Tab steps from the hip centre to the next landmark (the midline);
#    Shift+Tab comes back.  Each nudge moves only the selected landmark.
hl_start tab --dump-summary-on-exit "$HL_TMP/tab.xml" "$plan"
set -- $(hl_pos HANDLE hip-centre)
[ $# -eq 2 ] || hl_fail "no position printed for the hip centre"
xdotool mousemove --window "$HL_WID" "$1" "$2" click 1
sleep 0.3
hl_key Tab
sleep 0.2
hl_key shift+Right
sleep 0.3
hl_key shift+Tab
sleep 0.2
hl_key Right
sleep 0.3
hl_quit_discarding
hl_expect "Tab then Shift+Right moved the midline" "$(lm_x "$HL_TMP/tab.xml" midline)" "~" \
  "$(awk -v b="$base_mid_x" -v d="$NUDGE_LARGE_MM" 'BEGIN { print b + d }')"
hl_expect "Shift+Tab then Right moved the hip centre" "$(lm_x "$HL_TMP/tab.xml" hip-centre)" "~" \
  "$(awk -v b="$base_hip_x" -v d="$NUDGE_MM" 'BEGIN { print b + d }')"

# 3. The same drag in pixels moves the landmark less after zooming in
#    about the pointer (the handle stays under it, or the drag would miss).
hl_start plain --dump-summary-on-exit "$HL_TMP/plain.xml" "$plan"
set -- $(hl_pos HANDLE abductor-insertion)
drag_from "$1" "$2"
hl_quit_discarding
d_plain=$(awk -v a="$(lm_x "$HL_TMP/plain.xml" abductor-insertion)" -v b="$base_ins_x" 'BEGIN { print a - b }')
hl_expect "an unzoomed drag moved the insertion" "$d_plain" ">" 0

hl_start zoomed --dump-summary-on-exit "$HL_TMP/zoomed.xml" "$plan"
set -- $(hl_pos HANDLE abductor-insertion)
xdotool mousemove --window "$HL_WID" "$1" "$2"
sleep 0.2
xdotool keydown ctrl click 4 click 4 keyup ctrl
sleep 0.4
drag_from "$1" "$2"
hl_quit_discarding
d_zoom=$(awk -v a="$(lm_x "$HL_TMP/zoomed.xml" abductor-insertion)" -v b="$base_ins_x" 'BEGIN { print a - b }')
hl_expect "a zoomed drag still caught the handle" "$d_zoom" ">" 0
hl_expect "a zoomed drag moved it less" "$(awk -v z="$d_zoom" -v p="$d_plain" 'BEGIN { print z / p }')" "<" "$ZOOM_RATIO_MAX"

# 4. A drag on empty space pans: a press where the handle was then misses.
#    Below the hip centre, above the lesser trochanter, no handle is near.
hl_start pan --dump-summary-on-exit "$HL_TMP/pan.xml" "$plan"
set -- $(hl_pos HANDLE abductor-insertion)
hx=$1
hy=$2
set -- $(hl_pos HANDLE hip-centre)
drag_from "$1" $(($2 + 40))
drag_from "$hx" "$hy"
hl_quit_discarding
hl_expect "after panning, a drag at the old handle position moved nothing" \
  "$(lm_x "$HL_TMP/pan.xml" abductor-insertion)" "~" "$base_ins_x"

echo PASS
