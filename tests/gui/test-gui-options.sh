#!/bin/sh
# Add reconstruction options with the shortcut and with the Add button.
#
# Copyright 2026 the hiplever developers
# SPDX-License-Identifier: GPL-3.0-or-later
. "$(dirname "$0")/hl-gui-lib.sh"

plan="$HL_TMP/case.hlplan"
cp "$HL_DEMO" "$plan"
n0=$(hl_count "$plan" option)

hl_start options --dump-summary-on-exit "$HL_TMP/options.xml" "$plan"
hl_key ctrl+shift+n
hl_settle
hl_click page-options
hl_settle
hl_grab options-page
hl_click add-option
hl_settle
hl_grab options-added
# The shortcuts window comes with Ctrl+? and goes with Escape.
hl_key ctrl+question
timeout "$HL_WAIT_S" xdotool search --sync --onlyvisible --name '^Keyboard Shortcuts$' >/dev/null \
  || hl_fail "Ctrl+? showed no shortcuts window"
hl_grab shortcuts
hl_note "ok: the shortcuts window is shown"
hl_key Escape
sleep 0.5
hl_quit_discarding

n=$(xmllint --xpath "count(//*[local-name()='result'][@kind='option'])" "$HL_TMP/options.xml")
hl_expect "two more options solved in the summary" "$n" "~" "$((n0 + 2))"
name=$(xmllint --xpath "string(//*[local-name()='options']/*[local-name()='option'][last()]/@name)" "$HL_TMP/options.xml")
[ "$name" = "Option $((n0 + 2))" ] || hl_fail "the new option is named '$name'"
hl_note "ok: the new option is named '$name'"
echo "PASS"
