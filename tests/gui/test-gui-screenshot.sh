#!/bin/sh
# --screenshot: the real window saved as PNG, light and dark themes, 1x
# and 2x scale; each picture of the size asked for and not blank.
#
# Copyright 2026 the hiplever developers
# SPDX-License-Identifier: GPL-3.0-or-later
HL_GUI_SCREEN=${HL_GUI_SCREEN:-2400x1800}
export HL_GUI_SCREEN
. "$(dirname "$0")/hl-gui-lib.sh"

W=1100
H=760

shot () {
  out="$HL_TMP/$1.png"
  shift
  "$@" --screenshot "$out" --size "${W}x${H}" "$HL_DEMO" >"$HL_TMP/shot.log" 2>&1 \
    || { cat "$HL_TMP/shot.log" >&2; hl_fail "--screenshot failed: $*"; }
  if [ -n "${HL_GUI_KEEP:-}" ]; then
    cp "$out" "$HL_GUI_KEEP/"
  fi
}

mean () {
  convert "$1" -colorspace Gray -format '%[fx:mean]' info:
}

shot light "$HIPLEVER"
hl_check_png "$HL_TMP/light.png" $W $H
shot dark env GTK_THEME=Adwaita:dark "$HIPLEVER"
hl_check_png "$HL_TMP/dark.png" $W $H
hl_expect "the dark theme is darker" "$(mean "$HL_TMP/dark.png")" "<" "$(mean "$HL_TMP/light.png")"
shot scale2 env GDK_SCALE=2 "$HIPLEVER"
hl_check_png "$HL_TMP/scale2.png" $((W * 2)) $((H * 2))

# Failures say what is wrong and end with a non-zero status.
if "$HIPLEVER" --screenshot "$HL_TMP/x.png" --size 12x "$HL_DEMO" 2>"$HL_TMP/err.log"; then
  hl_fail "a bad --size was accepted"
fi
grep -q -- '--size' "$HL_TMP/err.log" || hl_fail "the bad --size message does not name the option"
hl_note "ok: a bad --size is refused: $(cat "$HL_TMP/err.log")"
if "$HIPLEVER" --screenshot "$HL_TMP/no/such/folder/x.png" "$HL_DEMO" 2>"$HL_TMP/err.log"; then
  hl_fail "a screenshot into a missing folder reported success"
fi
grep -q 'screenshot' "$HL_TMP/err.log" || hl_fail "the failed screenshot has no message"
hl_note "ok: an unwritable screenshot fails: $(cat "$HL_TMP/err.log")"
echo "PASS"
