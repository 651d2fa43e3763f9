#!/bin/sh
# Settings kept between runs (ui/hl-settings.h): the window's size and the
# mass unit come back after a restart; batch runs never write the file; a
# corrupt file starts with the defaults; model defaults apply to a new plan
# and not to a plan opened from a file.
#
# Copyright 2026 the hiplever developers
# SPDX-License-Identifier: GPL-3.0-or-later
. "$(dirname "$0")/hl-gui-lib.sh"

ini="$XDG_CONFIG_HOME/hiplever/settings.ini"
# Pixels a window size may differ by after a restart (none expected without
# a window manager; a little slack for one).
HL_SIZE_TOL_PX=8
want_w=1010
want_h=830

# hl_geometry: "width height" of the window as X has it.
hl_geometry () {
  xdotool getwindowgeometry "$HL_WID" | awk '/Geometry:/ { sub("x", " ", $2); print $2 }'
}

# hl_labels NAME: the visible labels of a --screenshot run.
hl_labels () {
  HIPLEVER_TEST_PRINT_LABELS=1 "$HIPLEVER" --screenshot "$HL_TMP/$1.png" \
    >"$HL_TMP/$1.labels" 2>"$HL_TMP/$1.err" || hl_fail "the --screenshot run $1 failed"
}

# 1. a fresh start writes nothing until something changes, then shows kg.
[ ! -e "$ini" ] || hl_fail "settings existed before the first run"
hl_labels fresh
grep -qx 'LABEL kg' "$HL_TMP/fresh.labels" || hl_fail "a fresh start does not show kg"
[ ! -e "$ini" ] || hl_fail "a --screenshot run wrote the settings"
hl_note "ok: fresh start in kg, a batch run wrote no settings"

# 2. resize, switch to lb, quit; the file has both.
hl_start first
set -- $(hl_geometry)
[ "$1 $2" != "$want_w $want_h" ] || hl_fail "the window already had the size the test sets"
xdotool windowsize --sync "$HL_WID" $want_w $want_h
hl_settle
set -- $(hl_geometry)
[ "$1 $2" = "$want_w $want_h" ] || hl_fail "xdotool windowsize gave $1 x $2, not $want_w x $want_h"
hl_click mass-unit
sleep 0.5
hl_key Down Return
sleep 0.5
hl_grab lb-chosen
hl_quit_discarding
[ -f "$ini" ] || hl_fail "quitting wrote no $ini"
grep -qx 'mass=lb' "$ini" || hl_fail "the settings do not say mass=lb: $(tr "\n" " " <"$ini")"
grep -qx "width=$want_w" "$ini" || hl_fail "the settings do not hold width $want_w: $(tr "\n" " " <"$ini")"
grep -qx "height=$want_h" "$ini" || hl_fail "the settings do not hold height $want_h: $(tr "\n" " " <"$ini")"
hl_note "ok: the settings file holds the size and the unit"

# 3. reopen: the same size and lb.
hl_start second
set -- $(hl_geometry)
[ $# -eq 2 ] || hl_fail "xdotool printed no geometry"
HL_TOL=$HL_SIZE_TOL_PX
hl_expect "width after a restart" "$1" "~" $want_w
hl_expect "height after a restart" "$2" "~" $want_h
HL_TOL=1e-9
hl_quit_discarding
cp "$ini" "$HL_TMP/before-batch.ini"
hl_labels lb
grep -qx 'LABEL lb' "$HL_TMP/lb.labels" || hl_fail "the mass unit lb did not persist"
cmp -s "$ini" "$HL_TMP/before-batch.ini" || hl_fail "a --screenshot run changed the settings"
hl_note "ok: lb persisted; the batch run left the file as it was"

# 4. binary garbage: a normal start with the defaults, no warning.
head -c 4096 /dev/urandom >"$ini"
printf '\000\377\376[\n=\n' >>"$ini"
hl_labels corrupt
grep -qx 'LABEL kg' "$HL_TMP/corrupt.labels" || hl_fail "a corrupt file did not give the default unit"
if grep -Eq 'WARNING|CRITICAL|ERROR' "$HL_TMP/corrupt.err"; then
  hl_fail "a corrupt file gave warnings: $(cat "$HL_TMP/corrupt.err")"
fi
hl_start corrupt-window
hl_grab corrupt-start
hl_quit_discarding
grep -Eq 'WARNING|CRITICAL' "$HL_OUT.err" && hl_fail "the window warned about a corrupt file"
hl_note "ok: a corrupt settings file starts normally with the defaults"

# 5. model defaults: a new plan takes them, a plan from a file does not;
#    a default the core rejects is not used.
printf '[model]\nbw-line=midline\nabductor-line=angle\nabductor-angle-deg=62.5\n' >"$ini"
hl_start defaults --dump-summary-on-exit "$HL_TMP/new.xml"
hl_quit_discarding
model () {
  xmllint --xpath "string(//*[local-name()='model']/@$2)" "$1"
}
[ "$(model "$HL_TMP/new.xml" body-weight-line)" = midline ] || hl_fail "a new plan did not take the body-weight line default"
[ "$(model "$HL_TMP/new.xml" abductor-line)" = angle ] || hl_fail "a new plan did not take the abductor line default"
hl_expect "a new plan's abductor angle" "$(model "$HL_TMP/new.xml" abductor-angle-deg)" "~" 62.5
plan="$HL_TMP/case.hlplan"
cp "$HL_DEMO" "$plan"
hl_start fromfile --dump-summary-on-exit "$HL_TMP/file.xml" "$plan"
hl_quit_discarding
[ "$(model "$HL_TMP/file.xml" body-weight-line)" = segmental ] || hl_fail "a plan from a file took the default body-weight line"
hl_expect "a plan from a file keeps its abductor angle" "$(model "$HL_TMP/file.xml" abductor-angle-deg)" "~" 70
printf '[model]\nbw-line=midline\nabductor-angle-deg=5\n' >"$ini"
hl_start baddefaults --dump-summary-on-exit "$HL_TMP/bad.xml"
hl_quit_discarding
[ "$(model "$HL_TMP/bad.xml" body-weight-line)" = segmental ] || hl_fail "an out-of-range default was partly used"
grep -Eq 'WARNING|CRITICAL' "$HL_OUT.err" && hl_fail "an out-of-range default gave a warning"
hl_note "ok: model defaults for new plans only, and only when the core accepts them"
echo "PASS"
