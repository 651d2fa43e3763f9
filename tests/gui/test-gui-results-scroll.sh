#!/bin/sh
# The results table keeps its option names and its quantity names in view
# while it scrolls: after scrolling the figures down and to the right with
# the mouse wheel, the option names are still over the figures (same place,
# each over its own column) and the quantity names still left of them
# (same place, each beside its own row).
#
# Copyright 2026 the hiplever developers
# SPDX-License-Identifier: GPL-3.0-or-later
#
# Positions come from HIPLEVER_TEST_PRINT_HANDLES=1 (hl_results_print_handles):
# "RESULTS scroll H V", "RESULTS-AREA body|header|names X Y W H",
# "RESULTS-HEADER C ...", "RESULTS-CELL C ...", "RESULTS-NAME ROW ..." and
# "RESULTS-ROW ROW ..." in window coordinates.  No computation is checked.
. "$(dirname "$0")/hl-gui-lib.sh"

# The lines of the last printed block.
last_block () {
  awk '/^FRAME / { blk = cur; cur = ""; next } { cur = cur $0 "\n" } END { printf "%s", blk }' \
    "$HL_OUT" >"$HL_TMP/block"
}

# field KIND NAME N: field N (1-based after the name) of that line.
field () {
  awk -v k="$1" -v n="$2" -v f="$3" '$1 == k && $2 == n { print $(2 + f) }' "$HL_TMP/block"
}

# check_table WHEN: every column whose figures are in the body's view has
# its option name over them, inside the header strip and above the body;
# every row in view has its name beside it, inside the names strip and
# left of the body.  Prints the first column and row in view.
check_table () {
  set -- $(awk '$1 == "RESULTS-AREA" && $2 == "body" { print $3, $4, $5, $6 }' "$HL_TMP/block")
  [ $# -eq 4 ] || hl_fail "$WHEN: the results body printed no position"
  bx=$1 by=$2 bw=$3 bh=$4
  set -- $(awk '$1 == "RESULTS-AREA" && $2 == "header" { print $3, $4, $5, $6 }' "$HL_TMP/block")
  hx=$1 hy=$2 hw=$3 hh=$4
  set -- $(awk '$1 == "RESULTS-AREA" && $2 == "names" { print $3, $4, $5, $6 }' "$HL_TMP/block")
  nx=$1 ny=$2 nw=$3 nh=$4
  hl_expect "$WHEN: header strip above the body" "$((hy + hh))" "<=" "$by"
  hl_expect "$WHEN: names strip left of the body" "$((nx + nw))" "<=" "$bx"
  cols=0
  first_col=
  for c in $(awk '$1 == "RESULTS-CELL" { print $2 }' "$HL_TMP/block"); do
    cx=$(field RESULTS-CELL "$c" 1)
    cw=$(field RESULTS-CELL "$c" 3)
    # Wholly in view sideways.
    [ "$cx" -ge "$bx" ] && [ $((cx + cw)) -le $((bx + bw)) ] || continue
    x=$(field RESULTS-HEADER "$c" 1)
    y=$(field RESULTS-HEADER "$c" 2)
    h=$(field RESULTS-HEADER "$c" 4)
    [ -n "$x" ] || hl_fail "$WHEN: column $c has no option name"
    HL_TOL=1 hl_cmp "$x" "~" "$cx" || hl_fail "$WHEN: column $c's name at x $x, its figures at $cx"
    [ "$y" -ge "$hy" ] && [ $((y + h)) -le $((hy + hh)) ] \
      || hl_fail "$WHEN: column $c's name ($y, $h high) is outside the header strip ($hy, $hh)"
    cols=$((cols + 1))
    [ -n "$first_col" ] || first_col=$c
  done
  hl_expect "$WHEN: columns in view with their names" "$cols" ">=" 1
  rows=0
  first_row=
  for r in $(awk '$1 == "RESULTS-ROW" { print $2 }' "$HL_TMP/block"); do
    ry=$(field RESULTS-ROW "$r" 2)
    rh=$(field RESULTS-ROW "$r" 4)
    [ "$ry" -ge "$by" ] && [ $((ry + rh)) -le $((by + bh)) ] || continue
    x=$(field RESULTS-NAME "$r" 1)
    y=$(field RESULTS-NAME "$r" 2)
    w=$(field RESULTS-NAME "$r" 3)
    h=$(field RESULTS-NAME "$r" 4)
    HL_TOL=1 hl_cmp "$y" "~" "$ry" || hl_fail "$WHEN: row $r's name at y $y, its cells at $ry"
    HL_TOL=1 hl_cmp "$h" "~" "$rh" || hl_fail "$WHEN: row $r's name is $h high, its cells $rh"
    [ "$x" -ge "$nx" ] && [ $((x + w)) -le $((nx + nw)) ] \
      || hl_fail "$WHEN: row $r's name ($x, $w wide) is outside the names strip ($nx, $nw)"
    rows=$((rows + 1))
    [ -n "$first_row" ] || first_row=$r
  done
  hl_expect "$WHEN: rows in view with their names" "$rows" ">=" 3
  HEADER_Y=$hy NAMES_X=$nx FIRST_COL=$first_col FIRST_ROW=$first_row
  hl_note "$WHEN: $cols columns and $rows rows in view, first column $first_col, first row $first_row"
}

hl_start scroll "$HL_DEMO"
last_block
WHEN=before
check_table
set -- $(awk '$1 == "RESULTS" && $2 == "scroll" { print $3, $4 }' "$HL_TMP/block")
hl_expect "not scrolled at first (x)" "$1" "~" 0
hl_expect "not scrolled at first (y)" "$2" "~" 0
header_y0=$HEADER_Y names_x0=$NAMES_X col0=$FIRST_COL row0=$FIRST_ROW
hl_grab results-before

# The wheel over the figures: down, then to the right (buttons 5 and 7).
set -- $(hl_pos WIDGET results-body)
[ $# -eq 2 ] || hl_fail "no position printed for the results body"
xdotool mousemove --window "$HL_WID" "$1" "$2"
xdotool click --repeat 6 --delay 40 5
xdotool click --repeat 12 --delay 40 7
hl_settle
last_block
set -- $(awk '$1 == "RESULTS" && $2 == "scroll" { print $3, $4 }' "$HL_TMP/block")
hl_expect "scrolled to the right" "$1" ">" 0
hl_expect "scrolled down" "$2" ">" 0
WHEN=after
check_table
hl_expect "the option names stayed (y)" "$HEADER_Y" "~" "$header_y0"
hl_expect "the quantity names stayed (x)" "$NAMES_X" "~" "$names_x0"
[ "$FIRST_COL" != "$col0" ] || hl_fail "the first column in view is still column $col0"
[ "$FIRST_ROW" != "$row0" ] || hl_fail "the first row in view is still row $row0"
hl_grab results-scrolled
hl_quit_discarding

# Flags: one short line each, the full sentences on a click of "Why" (and
# gone again with Escape), not on hover.  The first option is changed so
# that it is flagged (global offset reduced, leg length change beyond
# tolerance, implausible geometry).
flagged="$HL_TMP/flagged.hlplan"
sed 's/name="Standard stem" cup-medial-mm="2" cup-superior-mm="1" femoral-offset-mm="0" femoral-length-mm="2"/name="Short offset" cup-medial-mm="18" cup-superior-mm="1" femoral-offset-mm="-12" femoral-length-mm="25"/' \
  "$HL_DEMO" >"$flagged"
grep -q 'name="Short offset"' "$flagged" || hl_fail "could not change the first option"
hl_start flagged "$flagged"
last_block
flag_h=$(field RESULTS-ROW 0 4)
row_h=$(field RESULTS-ROW 3 4)
hl_expect "three flags take at most three lines" "$flag_h" "<=" "$((row_h * 7 / 2))"
awk '$1 == "RESULTS-WHY"' "$HL_TMP/block" | grep -q . && hl_fail "the full sentences are shown before any click"
hl_click results-why-1
hl_settle
last_block
lines=$(awk '$1 == "RESULTS-WHY" && $2 == 1 { print $3 }' "$HL_TMP/block")
[ -n "$lines" ] || hl_fail "a click on Why did not show the full sentences"
hl_expect "full sentences and the limits behind them (lines)" "$lines" ">=" 4
hl_grab results-why
hl_key Escape
hl_settle
last_block
awk '$1 == "RESULTS-WHY"' "$HL_TMP/block" | grep -q . && hl_fail "Escape did not hide the full sentences"
hl_quit_discarding
echo "PASS"
