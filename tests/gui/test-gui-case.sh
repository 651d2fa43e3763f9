#!/bin/sh
# The case page: body mass in pounds, and the operated side.
#
# Copyright 2026 the hiplever developers
# SPDX-License-Identifier: GPL-3.0-or-later
#
# Changing the side mirrors every landmark about the plan's x = 0, so every
# result stays the same (hl-plan.h).  A pound is 0.45359237 kg exactly
# (the international avoirdupois pound of the 1959 international yard and
# pound agreement).
. "$(dirname "$0")/hl-gui-lib.sh"

plan="$HL_TMP/case.hlplan"
# the demo on the schematic: over a radiograph the side only relabels the
# landmarks (they stay on their pixels), and mirroring is what is tested
sed '/<radiograph /d' "$HL_DEMO" >"$plan"
"$HIPLEVER" --print-results --dump-summary-on-exit "$HL_TMP/base.xml" "$plan" >/dev/null \
  || hl_fail "the baseline run failed"

# pick DROPDOWN N: opens a dropdown and moves N items down.
pick () {
  hl_click "$1"
  sleep 0.5
  i=0
  while [ "$i" -lt "$2" ]; do
    hl_key Down
    i=$((i + 1))
  done
  hl_key Return
  sleep 0.3
}

hl_start case --dump-summary-on-exit "$HL_TMP/case.xml" "$plan"
pick mass-unit 1
hl_grab pounds
hl_click mass-spin
hl_key ctrl+a
xdotool type --delay 20 "180"
hl_key Tab
hl_settle
pick side 1
hl_settle
hl_grab left-side
hl_quit_discarding

mass=$(xmllint --xpath "string(//*[local-name()='case']/@mass-kg)" "$HL_TMP/case.xml")
HL_TOL=1e-6
hl_expect "180 lb typed in pounds" "$mass" "~" "$(awk 'BEGIN { printf "%.10f", 180 * 0.45359237 }')"
side=$(xmllint --xpath "string(//*[local-name()='case']/@operated-side)" "$HL_TMP/case.xml")
[ "$side" = left ] || hl_fail "the operated side is '$side', not left"
hl_note "ok: the operated side is left"
base_x=$(hl_landmark "$HL_TMP/base.xml" abductor-insertion x-mm)
x=$(hl_landmark "$HL_TMP/case.xml" abductor-insertion x-mm)
hl_expect "the insertion mirrored" "$x" "~" "$(awk -v b="$base_x" 'BEGIN { print -b }')"

# The moment arm depends on the geometry only, not on the mass.
arm_base=$(hl_result "$HL_TMP/base.xml" "@kind='native'" abductor-arm-mm)
arm=$(hl_result "$HL_TMP/case.xml" "@kind='native'" abductor-arm-mm)
HL_TOL=1e-9
hl_expect "mirroring kept the abductor moment arm" "$arm" "~" "$arm_base"
echo "PASS"
