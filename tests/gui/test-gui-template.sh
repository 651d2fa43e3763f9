#!/bin/sh
# Templating in the window: drag the cup, step the stem size by key, apply
# the best ranked combination; the results follow the implants as the core
# derives them (templating.md section 2), and the row applied is the one
# `hiplever-cli fit` ranks first for the same placement.
#
# Copyright 2026 the hiplever developers
# SPDX-License-Identifier: GPL-3.0-or-later
. "$(dirname "$0")/hl-gui-lib.sh"
HIPLEVER_CLI=$1

# How far to drag the cup, px, in how many steps; where to grab it: below
# its centre, inside the circle and clear of the hip-centre landmark.
DRAG_PX=10
DRAG_STEPS=6
GRAB_BELOW_PX=13
SCREEN_H=$(echo "${HL_GUI_SCREEN:-1280x900}" | cut -dx -f2)

plan="$HL_TMP/case.hlplan"
cp "$SRCDIR/tests/files/templated-demo.hlplan" "$plan"
tmpl_attr () {
  xmllint --xpath "string(//*[local-name()='option'][1]/*[local-name()='template']/@$2)" "$1"
}
start_x=$(tmpl_attr "$plan" cup-x-mm)
start_size=$(tmpl_attr "$plan" stem-size)

hl_start template --panel=options --dump-summary-on-exit "$HL_TMP/after.xml" "$plan"

# wait_ranked: until the ranking for the current state has arrived.
wait_ranked () {
  i=0
  while :; do
    line=$(grep '^TEMPLATE ' "$HL_OUT" | tail -n 1)
    set -- $line
    [ "${5:-0}" -gt 0 ] && [ "${7:-1}" -eq 0 ] && break
    i=$((i + 1))
    [ "$i" -le $((HL_WAIT_S * 10)) ] || hl_fail "no ranking appeared: $line"
    sleep 0.1
  done
}
wait_ranked
hl_grab template-start

# 1. drag the cup medially (towards the midline: screen right for a right hip)
set -- $(hl_pos HANDLE template-cup)
[ $# -eq 2 ] || hl_fail "no template cup handle printed"
x=$1
y=$(($2 + GRAB_BELOW_PX))
hl_mark
xdotool mousemove --window "$HL_WID" "$x" "$y"
sleep 0.2
xdotool mousedown 1
i=1
while [ "$i" -le "$DRAG_STEPS" ]; do
  xdotool mousemove --window "$HL_WID" $((x + DRAG_PX * i / DRAG_STEPS)) "$y"
  sleep 0.05
  i=$((i + 1))
done
xdotool mouseup 1
hl_settle
hl_grab template-cup-dragged

# 2. select the stem by its handle, Page Up: the next size
set -- $(hl_pos HANDLE template-stem)
[ $# -eq 2 ] || hl_fail "no template stem handle printed"
hl_mark
xdotool mousemove --window "$HL_WID" "$1" "$2" click 1
hl_settle
sel=$(grep '^TEMPLATE ' "$HL_OUT" | tail -n 1 | awk '{ print $3 }')
[ "$sel" = 2 ] || hl_fail "the stem handle was not selected (selected part $sel)"
hl_mark
hl_key Page_Up
hl_settle
wait_ranked
hl_grab template-stem-stepped

# 3. apply the best ranked combination: scroll the side panel to it
set -- $(hl_pos WIDGET template-manual)
panel_x=$1
i=0
while :; do
  set -- $(hl_pos WIDGET template-rank-1)
  [ $# -eq 2 ] || hl_fail "no ranked row printed"
  [ "$2" -lt $((SCREEN_H - 60)) ] && break
  i=$((i + 1))
  [ "$i" -le 40 ] || hl_fail "could not scroll to the ranking"
  hl_mark
  xdotool mousemove --window "$HL_WID" "$panel_x" $((SCREEN_H / 2)) click 5
  hl_settle
done
hl_mark
hl_click template-rank-1
hl_settle
wait_ranked
hl_grab template-applied
hl_quit_discarding

end_x=$(tmpl_attr "$HL_TMP/after.xml" cup-x-mm)
end_size=$(tmpl_attr "$HL_TMP/after.xml" stem-size)
hl_expect "the cup moved medially (plan x grows for a right hip)" "$end_x" ">" "$start_x"
hl_expect "the stem is one size larger" "$end_size" "~" "$((start_size + 1))"

# The ranking of the state before the apply (liner, version and head as
# at the start; the drag and the key change neither): its first row is
# what the window applied.
before="$HL_TMP/before.hlplan"
sed -e '/<template /s/liner="[^"]*"/liner="neutral"/' \
    -e '/<template /s/version="[^"]*"/version="standard"/' \
    -e '/<template /s/head-length-mm="[^"]*"/head-length-mm="0"/' \
    "$HL_TMP/after.xml" >"$before"
first=$("$HIPLEVER_CLI" fit "$before" --format csv | sed -n 2p)
[ -n "$first" ] || hl_fail "hiplever-cli fit gave no ranking"
want=$(echo "$first" | awk -F, '{ printf "%s %s %s", $3, $5, $6 + 0 }')
got="$(tmpl_attr "$HL_TMP/after.xml" liner) $(tmpl_attr "$HL_TMP/after.xml" version) $(tmpl_attr "$HL_TMP/after.xml" head-length-mm)"
[ "$want" = "$got" ] || hl_fail "applied '$got', the core ranks '$want' first"
hl_note "ok: applied the first ranked combination: $got"

# The window's results for the option are the core's for its implants.
"$HIPLEVER_CLI" summary "$HL_TMP/after.xml" -o "$HL_TMP/cli.xml" >/dev/null \
  || hl_fail "hiplever-cli summary failed on the window's plan"
opt="@kind='option' and @option-index='0'"
for a in femoral-offset-change-mm leg-length-change-mm joint-force-n abductor-force-n; do
  w=$(hl_result "$HL_TMP/after.xml" "$opt" "$a")
  c=$(hl_result "$HL_TMP/cli.xml" "$opt" "$a")
  HL_TOL=1e-6 hl_expect "window and core agree on $a" "$w" "~" "$c"
done
base=$(hl_result "$SRCDIR/tests/files/templated-demo.hlplan" "$opt" joint-force-n)
"$HIPLEVER_CLI" summary "$plan" -o "$HL_TMP/start.xml" >/dev/null
start_off=$(hl_result "$HL_TMP/start.xml" "$opt" femoral-offset-change-mm)
end_off=$(hl_result "$HL_TMP/after.xml" "$opt" femoral-offset-change-mm)
HL_TOL=1e-3
hl_cmp "$start_off" "~" "$end_off" && hl_fail "the femoral offset change did not follow the implants"
hl_note "ok: femoral offset change $start_off -> $end_off mm"
