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
cp "$SRCDIR/tests/gui/templated-demo.hlplan" "$plan"
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
tfield () {
  grep '^TEMPLATE ' "$HL_OUT" | tail -n 1 | awk -v k="$1" '{ for (i = 1; i < NF; i++) if ($i == k) print $(i + 1) }'
}
# scroll_to WIDGET: scrolls the side panel until the control is on screen.
scroll_to () {
  set -- "$1" $(hl_pos WIDGET template-manual) $(hl_pos WIDGET template-place)
  panel_x=$2
  i=0
  while :; do
    set -- "$1" $(hl_pos WIDGET "$1")
    [ $# -eq 3 ] || hl_fail "no $1 printed"
    [ "$3" -lt $((SCREEN_H - 60)) ] && break
    i=$((i + 1))
    [ "$i" -le 40 ] || hl_fail "could not scroll to $1"
    hl_mark
    xdotool mousemove --window "$HL_WID" "$panel_x" $((SCREEN_H / 2)) click 5
    hl_settle
  done
}
key_settle () {
  hl_mark
  hl_key "$@"
  hl_settle
}

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
# The whole drag is one undo step: Ctrl+Z puts the cup back, Ctrl+Shift+Z
# moves it again.
dragged_x=$(tfield cup-x)
key_settle ctrl+z
HL_TOL=1e-6 hl_expect "one Ctrl+Z undid the whole drag" "$(tfield cup-x)" "~" "$start_x"
key_settle ctrl+shift+z
HL_TOL=1e-6 hl_expect "Ctrl+Shift+Z redid it" "$(tfield cup-x)" "~" "$dragged_x"

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

# 3. keyboard only: Shift+Tab from the stem reaches the inclination lever,
# then the cup; Right nudges the cup 0.5 mm (plan +x), Shift+Up turns the
# lever 5 degrees steeper... and Ctrl+Z takes each back, one step each.
key_settle shift+Tab
[ "$(tfield selected)" = 1 ] || hl_fail "Shift+Tab did not reach the inclination lever"
incl0=$(tfield inclination)
key_settle shift+Up
incl1=$(tfield inclination)
HL_TOL=1e-6 hl_expect "Shift+Up turned the cup 5 degrees steeper" "$incl1" "~" "$(awk -v a="$incl0" 'BEGIN { print a + 5 }')"
key_settle shift+Tab
[ "$(tfield selected)" = 0 ] || hl_fail "Shift+Tab did not reach the cup"
x0=$(tfield cup-x)
key_settle Right
x1=$(tfield cup-x)
HL_TOL=1e-6 hl_expect "Right nudged the cup 0.5 mm" "$x1" "~" "$(awk -v a="$x0" 'BEGIN { print a + 0.5 }')"
key_settle ctrl+z
HL_TOL=1e-6 hl_expect "Ctrl+Z took the nudge back" "$(tfield cup-x)" "~" "$x0"
key_settle ctrl+z
HL_TOL=1e-6 hl_expect "Ctrl+Z took the inclination back" "$(tfield inclination)" "~" "$incl0"
wait_ranked

# 4. apply the best ranked combination: scroll the side panel to it
scroll_to template-rank-1
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
base=$(hl_result "$SRCDIR/tests/gui/templated-demo.hlplan" "$opt" joint-force-n)
"$HIPLEVER_CLI" summary "$plan" -o "$HL_TMP/start.xml" >/dev/null
start_off=$(hl_result "$HL_TMP/start.xml" "$opt" femoral-offset-change-mm)
end_off=$(hl_result "$HL_TMP/after.xml" "$opt" femoral-offset-change-mm)
HL_TOL=1e-3
hl_cmp "$start_off" "~" "$end_off" && hl_fail "the femoral offset change did not follow the implants"
hl_note "ok: femoral offset change $start_off -> $end_off mm"

# 5. Template a manual option: the demo's first option, "Template this
# option"; its numbers then come from the placed implants.
demo="$HL_TMP/demo.hlplan"
cp "$HL_DEMO" "$demo"
cp "$SRCDIR/data/examples/demo-radiograph.png" "$HL_TMP/" 2>/dev/null || true
hl_start place --panel=options --dump-summary-on-exit "$HL_TMP/placed.xml" "$demo"
scroll_to template-place
hl_mark
hl_click template-place
hl_settle
wait_ranked
hl_grab template-placed
hl_quit_discarding
placed=$(tmpl_attr "$HL_TMP/placed.xml" catalogue)
[ "$placed" = "hiplever-demo" ] || hl_fail "the first option was not templated (catalogue '$placed')"
hl_note "ok: the first option is templated from catalogue $placed"
