#!/bin/sh
# Drag the abductor insertion laterally with the mouse, then undo and redo.
#
# Copyright 2026 the hiplever developers
# SPDX-License-Identifier: GPL-3.0-or-later
#
# Moving the insertion laterally lengthens the abductor moment arm, so the
# abductor force needed for the same external moment falls, and with it
# the joint reaction force: F_a = W_s d_w / d_a (the static free-body
# method after Pauwels, Biomechanics of the Normal and Diseased Hip,
# Springer 1976).
. "$(dirname "$0")/hl-gui-lib.sh"

# How far to drag, in pixels, and in how many steps (a person's drag).
DRAG_PX=15
DRAG_STEPS=5

plan="$HL_TMP/case.hlplan"
cp "$HL_DEMO" "$plan"

"$HIPLEVER" --print-results --dump-summary-on-exit "$HL_TMP/base.xml" "$plan" >/dev/null \
  || hl_fail "the baseline run failed"

# drag_insertion: the right hip is on the viewer's left, so lateral is
# towards smaller screen x.
drag_insertion () {
  set -- $(hl_pos HANDLE abductor-insertion)
  [ $# -eq 2 ] || hl_fail "no position printed for the abductor insertion"
  x=$1
  y=$2
  hl_mark
  xdotool mousemove --window "$HL_WID" "$x" "$y"
  sleep 0.2
  xdotool mousedown 1
  i=1
  while [ "$i" -le "$DRAG_STEPS" ]; do
    xdotool mousemove --window "$HL_WID" $((x - DRAG_PX * i / DRAG_STEPS)) "$y"
    sleep 0.05
    i=$((i + 1))
  done
  xdotool mouseup 1
  hl_settle
}

# 1. drag
hl_start drag --dump-summary-on-exit "$HL_TMP/drag.xml" "$plan"
hl_grab before-drag
drag_insertion
hl_grab after-drag
hl_quit_discarding

native="@kind='native'"
base_arm=$(hl_result "$HL_TMP/base.xml" "$native" abductor-arm-mm)
base_fa=$(hl_result "$HL_TMP/base.xml" "$native" abductor-force-n)
base_jrf=$(hl_result "$HL_TMP/base.xml" "$native" joint-force-n)
drag_arm=$(hl_result "$HL_TMP/drag.xml" "$native" abductor-arm-mm)
drag_fa=$(hl_result "$HL_TMP/drag.xml" "$native" abductor-force-n)
drag_jrf=$(hl_result "$HL_TMP/drag.xml" "$native" joint-force-n)
base_x=$(hl_landmark "$HL_TMP/base.xml" abductor-insertion x-mm)
drag_x=$(hl_landmark "$HL_TMP/drag.xml" abductor-insertion x-mm)
hl_expect "insertion moved laterally (plan x falls for a right hip)" "$drag_x" "<" "$base_x"
hl_expect "abductor moment arm grew" "$drag_arm" ">" "$base_arm"
hl_expect "abductor force fell" "$drag_fa" "<" "$base_fa"
hl_expect "joint reaction force fell" "$drag_jrf" "<" "$base_jrf"

# 2. the same drag, then Ctrl+Z: everything as before
hl_start undo --dump-summary-on-exit "$HL_TMP/undo.xml" "$plan"
drag_insertion
hl_mark
hl_key ctrl+z
hl_settle
hl_grab after-undo
hl_key ctrl+q
# Undo back to the saved state leaves nothing unsaved: no question.
hl_wait_exit
undo_x=$(hl_landmark "$HL_TMP/undo.xml" abductor-insertion x-mm)
undo_jrf=$(hl_result "$HL_TMP/undo.xml" "$native" joint-force-n)
hl_expect "undo restored the insertion" "$undo_x" "~" "$base_x"
hl_expect "undo restored the joint reaction force" "$undo_jrf" "~" "$base_jrf"

# 3. drag, undo, redo with Ctrl+Shift+Z, undo again and redo with Ctrl+Y
hl_start redo --dump-summary-on-exit "$HL_TMP/redo.xml" "$plan"
drag_insertion
hl_mark
hl_key ctrl+z
hl_settle
hl_mark
hl_key ctrl+shift+z
hl_settle
hl_mark
hl_key ctrl+z
hl_settle
hl_mark
hl_key ctrl+y
hl_settle
hl_quit_discarding
redo_x=$(hl_landmark "$HL_TMP/redo.xml" abductor-insertion x-mm)
redo_jrf=$(hl_result "$HL_TMP/redo.xml" "$native" joint-force-n)
# The same scripted drag lands on the same pixel, so on the same value.
hl_expect "redo put the insertion back where it was dragged" "$redo_x" "~" "$drag_x"
hl_expect "redo gave the dragged joint reaction force" "$redo_jrf" "~" "$drag_jrf"
echo "PASS"
