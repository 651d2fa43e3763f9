#!/bin/sh
# On a 1366 x 768 screen the schematic gets most of the height beside the
# results and the pelvis fills it; the view refits when the window is
# resized, smaller and back.
#
# Copyright 2026 the hiplever developers
# SPDX-License-Identifier: GPL-3.0-or-later
#
# Positions from HIPLEVER_TEST_PRINT_HANDLES=1: "AREA canvas|lower X Y W H"
# (the schematic and the lower area under it) and "HANDLE key X Y" (the
# placed landmarks).  The demo's landmarks span 270 mm from the abductor
# origin to the distal shaft points (invented geometry, model.md section
# 2).  The shares below are this project's layout choices, not outside
# facts.
HL_GUI_SCREEN=1366x768
export HL_GUI_SCREEN
. "$(dirname "$0")/hl-gui-lib.sh"

# The last printed block, and what it says of the schematic: sets
# CANVAS_H, LOWER_H and SPAN (landmarks' height in px over the canvas's
# height, in per cent); fails when a landmark lies outside the canvas.
read_view () {
  awk '/^FRAME / { blk = cur; cur = ""; next } { cur = cur $0 "\n" } END { printf "%s", blk }' \
    "$HL_OUT" >"$HL_TMP/block"
  set -- $(awk '$1 == "AREA" && $2 == "canvas" { print $3, $4, $5, $6 }' "$HL_TMP/block")
  [ $# -eq 4 ] || hl_fail "$1: no canvas area printed"
  cx=$1 cy=$2 cw=$3 ch=$4
  LOWER_H=$(awk '$1 == "AREA" && $2 == "lower" { print $6 }' "$HL_TMP/block")
  [ -n "$LOWER_H" ] || hl_fail "no lower area printed"
  CANVAS_H=$ch
  set -- $(awk -v x0="$cx" -v y0="$cy" -v w="$cw" -v h="$ch" '
    $1 == "HANDLE" && $2 !~ /^template-/ {
      n++
      if ($3 < x0 || $3 > x0 + w || $4 < y0 || $4 > y0 + h) out++
      if (n == 1 || $4 < lo) lo = $4
      if (n == 1 || $4 > hi) hi = $4
    }
    END { print n + 0, out + 0, (n ? int(100 * (hi - lo) / h + 0.5) : 0) }' "$HL_TMP/block")
  [ "$1" -ge 10 ] || hl_fail "only $1 landmarks printed"
  [ "$2" -eq 0 ] || hl_fail "$2 landmarks outside the schematic"
  SPAN=$3
}

hl_start small "$HL_DEMO"
read_view
hl_note "1366x768: schematic $CANVAS_H px high, lower area $LOWER_H px, landmarks over $SPAN% of the height"
hl_expect "schematic height (px)" "$CANVAS_H" ">=" 340
hl_expect "schematic share of the height (%)" "$((100 * CANVAS_H / (CANVAS_H + LOWER_H)))" ">=" 55
hl_expect "landmarks' height over the schematic's (%)" "$SPAN" ">=" 55
span0=$SPAN h0=$CANVAS_H
set -- $(xdotool getwindowgeometry "$HL_WID" | awk '/Geometry:/ { sub("x", " ", $2); print $2 }')
[ $# -eq 2 ] || hl_fail "no window size"
w0=$1 wh0=$2
hl_note "the window: $w0 x $wh0"
hl_grab small-screen

# Smaller: the schematic shrinks and the drawing refits to it.
hl_mark
xdotool windowsize "$HL_WID" 1100 680
hl_settle
read_view
hl_note "1100x680: schematic $CANVAS_H px high, landmarks over $SPAN% of the height"
hl_expect "the schematic shrank (px)" "$CANVAS_H" "<" "$h0"
HL_TOL=6 hl_expect "the drawing refitted: landmarks' share of the height (%)" "$SPAN" "~" "$span0"
hl_grab small-screen-resized

# Back to the first size: as at first.
hl_mark
xdotool windowsize "$HL_WID" "$w0" "$wh0"
hl_settle
read_view
hl_grab small-screen-back
hl_expect "the schematic grew back (px)" "$CANVAS_H" ">=" "$h0"
HL_TOL=1 hl_expect "the drawing refitted back (%)" "$SPAN" "~" "$span0"
hl_quit_discarding
echo "PASS"
