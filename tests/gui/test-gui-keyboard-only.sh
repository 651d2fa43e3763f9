#!/bin/sh
# The whole workflow with key presses only (no pointer moves or clicks):
# Tab into the schematic, Tab to the abductor insertion, nudge it (Right x3
# = 1.5 mm, Shift+Up = 5 mm), add an option (Ctrl+Shift+N), quit with
# Ctrl+Q and Alt+D (Discard) and read the planning summary.  After each key
# the schematic's accessible label (what a screen reader is told) must name
# the selected landmark and its coordinates.
#
# Copyright 2026 the hiplever developers
# SPDX-License-Identifier: GPL-3.0-or-later
#
# HIPLEVER_TEST_PRINT_A11Y=1 (with GTK_A11Y=test, which keeps accessible
# properties without a screen reader) adds "ACCESSIBLE canvas <label>" to
# each block of printed positions.
. "$(dirname "$0")/hl-gui-lib.sh"
HL_CLI=${1:?the hiplever-cli program is the third argument}
export GTK_A11Y=test HIPLEVER_TEST_PRINT_A11Y=1

plan="$HL_TMP/case.hlplan"
cp "$HL_DEMO" "$plan"
lm=abductor-insertion
lm_label="Abductor insertion"
# Tabs allowed to reach the schematic and then the landmark.
HL_MAX_TABS=40

plan_xy () {
  xmllint --xpath "concat(//*[local-name()='landmark'][@name='$2']/@x-mm, ' ', //*[local-name()='landmark'][@name='$2']/@y-mm)" "$1"
}
selected () {
  awk '$1 == "SELECTED" { s = $2 } END { print s }' "$HL_OUT"
}
accessible () {
  awk '$1 == "ACCESSIBLE" && $2 == "canvas" { $1 = ""; $2 = ""; s = $0 } END { sub(/^  /, "", s); print s }' "$HL_OUT"
}
# check_label X Y: the accessible label names the landmark at (X, Y).
check_label () {
  want=$(awk -v x="$1" -v y="$2" -v n="$lm_label" 'BEGIN { printf "Schematic. Selected: %s, x %.1f mm, y %.1f mm", n, x, y }')
  got=$(accessible)
  [ "$got" = "$want" ] || hl_fail "the schematic tells assistive technology '$got', expected '$want'"
  hl_note "ok: accessible label: $got"
}

set -- $(plan_xy "$plan" $lm)
base_x=$1 base_y=$2
n_options=$(xmllint --xpath "count(//*[local-name()='option'])" "$plan")

hl_start keys --dump-summary-on-exit "$HL_TMP/keys.xml" "$plan"
# Tab moves the focus through the window until the schematic takes it; the
# next Tab there selects its first landmark.
i=0
while [ "$(selected)" = none ] || [ -z "$(selected)" ]; do
  i=$((i + 1))
  [ "$i" -le $HL_MAX_TABS ] || hl_fail "$HL_MAX_TABS presses of Tab never selected a landmark on the schematic"
  hl_key Tab
  sleep 0.3
done
hl_settle
hl_note "ok: after $i presses of Tab the schematic has the focus and $(selected) selected"
i=0
while [ "$(selected)" != $lm ]; do
  i=$((i + 1))
  [ "$i" -le $HL_MAX_TABS ] || hl_fail "Tab on the schematic never reached $lm"
  hl_key Tab
  hl_settle
done
check_label "$base_x" "$base_y"

x=$base_x
for k in Right Right Right; do
  hl_key $k
  hl_settle
  x=$(awk -v x="$x" 'BEGIN { print x + 0.5 }')
  check_label "$x" "$base_y"
done
hl_key shift+Up
hl_settle
y=$(awk -v y="$base_y" 'BEGIN { print y + 5 }')
check_label "$x" "$y"
hl_grab nudged
hl_key ctrl+shift+n
hl_settle
[ "$(selected)" = $lm ] || hl_fail "adding an option lost the selected landmark"
hl_quit_discarding
grep -Eq 'WARNING|CRITICAL' "$HL_OUT.err" && hl_fail "the run printed warnings: $(head -n 3 "$HL_OUT.err")"

sum="$HL_TMP/keys.xml"
# Exactly that landmark moved, by +1.5 mm in x and +5 mm in y.
for key in $(xmllint --xpath "//*[local-name()='landmarks']/*[local-name()='landmark']/@name" "$plan" \
             | sed 's/ name="\([^"]*\)"/\1 /g'); do
  set -- $(plan_xy "$plan" "$key")
  bx=$1 by=$2
  set -- $(plan_xy "$sum" "$key")
  if [ "$key" = $lm ]; then
    hl_expect "$key x after Right x3" "$1" "~" "$(awk -v b="$bx" 'BEGIN { print b + 1.5 }')"
    hl_expect "$key y after Shift+Up" "$2" "~" "$(awk -v b="$by" 'BEGIN { print b + 5 }')"
  else
    hl_cmp "$1" "~" "$bx" && hl_cmp "$2" "~" "$by" || hl_fail "$key moved: $1 $2, was $bx $by"
  fi
done
hl_note "ok: only $lm moved"
n=$(hl_count "$sum" option)
hl_expect "options after Ctrl+Shift+N" "$n" "~" $((n_options + 1))

# The results follow the move.  The abductor line runs from the origin to
# the insertion; its moment arm is the hip centre's distance from that line
# (common practice: the perpendicular lever arm of Pauwels' free body).
# For this right hip Right is medial (1.5 mm nearer the hip centre: a
# shorter arm) and Shift+Up swings the line more vertical, away from the
# hip centre: a longer arm; worked by hand from the demo geometry, the net
# is longer, so the abductor force and the joint load fall.
set -- $(plan_xy "$plan" hip-centre)
hx=$1 hy=$2
set -- $(plan_xy "$plan" abductor-origin)
ox=$1 oy=$2
arm=$(awk -v ox="$ox" -v oy="$oy" -v hx="$hx" -v hy="$hy" -v ix="$(awk -v b="$base_x" 'BEGIN { print b + 1.5 }')" \
          -v iy="$(awk -v b="$base_y" 'BEGIN { print b + 5 }')" 'BEGIN {
  dx = ix - ox; dy = iy - oy; c = dx * (hy - oy) - dy * (hx - ox); if (c < 0) c = -c
  printf "%.12g", c / sqrt(dx * dx + dy * dy) }')
before="$HL_TMP/before.xml"
"$HL_CLI" summary "$plan" -o "$before" || hl_fail "hiplever-cli summary failed on the original plan"
HL_TOL=1e-6
hl_expect "native abductor arm, as worked by hand" "$(hl_result "$sum" "@kind='native'" abductor-arm-mm)" "~" "$arm"
HL_TOL=1e-9
hl_expect "the abductor arm grew" "$(hl_result "$sum" "@kind='native'" abductor-arm-mm)" ">" \
  "$(hl_result "$before" "@kind='native'" abductor-arm-mm)"
hl_expect "the abductor force fell" "$(hl_result "$sum" "@kind='native'" abductor-force-n)" "<" \
  "$(hl_result "$before" "@kind='native'" abductor-force-n)"
hl_expect "the joint load fell" "$(hl_result "$sum" "@kind='native'" joint-force-n)" "<" \
  "$(hl_result "$before" "@kind='native'" joint-force-n)"
echo "PASS"
