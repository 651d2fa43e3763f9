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
hl_wait_dialog "Keyboard Shortcuts"
sleep 0.5
hl_grab shortcuts
hl_note "ok: the shortcuts window is shown"
hl_key Escape
sleep 0.5
hl_quit_discarding

# The caution strip collapses to its one line and comes back; it is never
# gone.
hl_start caution "$plan"
last_block () {
  awk 'BEGIN { n = 0 } $1 == "FRAME" { n++ } { line[n] = line[n] "\n" $0 } END { print line[n - 1] }' "$HL_OUT"
}
last_block | grep -q '^WIDGET caution-full ' || hl_fail "the full caution is not shown at start"
last_block | grep -q '^WIDGET caution-short ' && hl_fail "the short caution shows beside the full one"
hl_mark
hl_click caution-toggle
hl_settle
hl_grab caution-collapsed
last_block | grep -q '^WIDGET caution-short ' || hl_fail "the collapsed strip has no caution line"
last_block | grep -q '^WIDGET caution-full ' && hl_fail "the collapsed strip still shows the full caution"
hl_note "ok: collapsed to the one-line caution"
hl_click caution-toggle
hl_settle
last_block | grep -q '^WIDGET caution-full ' || hl_fail "the full caution did not come back"
hl_note "ok: expanded again to the full caution"
hl_key ctrl+q
hl_wait_exit

option_names () {
  xmllint --xpath "//*[local-name()='options']/*[local-name()='option']/@name" "$1" \
    | sed 's/ name=/\n/g' | tr -d '"' | sed '/^$/d' | tr '\n' '|'
}

# Duplicate the selected (first) option and rename the copy.
hl_start rename --dump-summary-on-exit "$HL_TMP/renamed.xml" "$plan"
hl_click page-options
hl_settle
hl_click duplicate-option
hl_settle
hl_click option-name
hl_key ctrl+a
xdotool type --delay 20 "Cemented stem"
hl_key Tab
hl_settle
hl_grab options-renamed
hl_quit_discarding
names=$(option_names "$HL_TMP/renamed.xml")
[ "$names" = "Standard stem|Lateralised stem +6 mm|Medialised cup 4 mm + long head|Templated: demo cementless stem|Cemented stem|" ] \
  || hl_fail "after duplicate and rename: $names"
hl_note "ok: duplicated and renamed: $names"
cemented=$(xmllint --xpath "string(//*[local-name()='option'][@name='Cemented stem']/@femoral-length-mm)" "$HL_TMP/renamed.xml")
hl_expect "the copy has the first option's femoral length change" "$cemented" "~" 2

# Remove the selected option twice, then undo the last removal.
hl_start remove --dump-summary-on-exit "$HL_TMP/removed.xml" "$plan"
hl_click page-options
hl_settle
hl_click remove-option
hl_settle
hl_click remove-option
hl_settle
hl_mark
hl_key ctrl+z
hl_settle
hl_quit_discarding
names=$(option_names "$HL_TMP/removed.xml")
# The first option goes, the selection moves to the next, which goes too;
# undo brings that one back.
[ "$names" = "Lateralised stem +6 mm|Medialised cup 4 mm + long head|Templated: demo cementless stem|" ] \
  || hl_fail "after two removals and an undo: $names"
hl_note "ok: removed twice and undone once: $names"

# A plan holds at most 64 options: Add refuses the 65th with a message, and
# the plan keeps its 64 (Duplicate's refusal: test-trust).
full="$HL_TMP/full.hlplan"
python3 - "$plan" "$full" <<'PY'
import re, sys
text = open(sys.argv[1], encoding="utf-8").read()
have = len(re.findall(r"<option[ >]", text))
more = "".join('    <option name="Extra %d" femoral-offset-mm="%d"/>\n' % (i, i % 5)
               for i in range(1, 64 - have + 1))
open(sys.argv[2], "w", encoding="utf-8").write(text.replace("</options>", more + "  </options>", 1))
PY
[ "$(hl_count "$full" option)" = 64 ] || hl_fail "the full plan does not have 64 options"
hl_start full --dump-summary-on-exit "$HL_TMP/full.xml" "$full"
hl_key ctrl+shift+n
hl_wait_dialog Error
hl_grab option-limit
hl_key Return
sleep 0.5
kill -0 "$HL_PID" 2>/dev/null || hl_fail "the program ended at the option limit"
hl_quit_discarding
n_full=$(xmllint --xpath "count(//*[local-name()='options']/*[local-name()='option'])" "$HL_TMP/full.xml")
hl_expect "the plan keeps 64 options after Add" "$n_full" "~" 64
hl_note "ok: the 65th option was refused"

n=$(xmllint --xpath "count(//*[local-name()='result'][@kind='option'])" "$HL_TMP/options.xml")
hl_expect "two more options solved in the summary" "$n" "~" "$((n0 + 2))"
name=$(xmllint --xpath "string(//*[local-name()='options']/*[local-name()='option'][last()]/@name)" "$HL_TMP/options.xml")
[ "$name" = "Option $((n0 + 2))" ] || hl_fail "the new option is named '$name'"
hl_note "ok: the new option is named '$name'"
echo "PASS"
