#!/bin/sh
# Plans that cannot be read: a message with the line and the field, a
# non-zero status in the batch modes, and an open window that keeps its
# plan in the interactive mode.
#
# Copyright 2026 the hiplever developers
# SPDX-License-Identifier: GPL-3.0-or-later
. "$(dirname "$0")/hl-gui-lib.sh"

bad="$HL_TMP/bad.hlplan"
sed 's/mass-kg="72.5"/mass-kg="heavy"/' "$HL_DEMO" >"$bad"
grep -q 'mass-kg="heavy"' "$bad" || hl_fail "could not make a broken plan"

if "$HIPLEVER" --print-results "$bad" >"$HL_TMP/out.csv" 2>"$HL_TMP/err.log"; then
  hl_fail "a broken plan was accepted"
fi
grep -q 'line [0-9]' "$HL_TMP/err.log" || hl_fail "the message has no line: $(cat "$HL_TMP/err.log")"
hl_note "ok: $(cat "$HL_TMP/err.log")"
[ ! -s "$HL_TMP/out.csv" ] || hl_fail "results were printed for a broken plan"

if "$HIPLEVER" --print-results "$HL_TMP/missing.hlplan" 2>"$HL_TMP/err.log" >/dev/null; then
  hl_fail "a missing plan was accepted"
fi
hl_note "ok: $(cat "$HL_TMP/err.log")"

# Interactive: a dialog says why; closing it leaves the window usable.
hl_start bad-open --dump-summary-on-exit "$HL_TMP/after.xml" "$bad"
hl_wait_dialog Error
hl_grab load-error-dialog
hl_key Return
sleep 0.5
kill -0 "$HL_PID" 2>/dev/null || hl_fail "the program ended after a file failed to load"
hl_key ctrl+q
hl_wait_exit
hl_note "ok: the window stayed after the load error and quit on Ctrl+Q"

# The file chooser: typing a path that starts with "/" opens its location
# field; Return accepts.
choose () {
  hl_wait_dialog "$1"
  shift
  sleep 0.5
  xdotool type --delay 20 "$1"
  sleep 0.3
  hl_key Return
  sleep 1
}

# Ctrl+O on a broken file: a dialog, and the plan that was open stays.
hl_start open-bad --dump-summary-on-exit "$HL_TMP/kept.xml" "$HL_DEMO"
hl_key ctrl+o
choose "Open a Plan" "$bad"
hl_wait_dialog Error
hl_grab open-error-dialog
hl_key Return
sleep 0.5
# Ctrl+E exports the planning summary, Ctrl+Shift+S saves under a name.
hl_key ctrl+e
choose "Export the Planning Summary" "$HL_TMP/exported"
hl_key ctrl+shift+s
choose "Save the Plan" "$HL_TMP/saved-as"
hl_key ctrl+q
hl_wait_exit
mass=$(xmllint --xpath "string(//*[local-name()='case']/@mass-kg)" "$HL_TMP/kept.xml")
hl_expect "the open plan kept its body mass after the failed open" "$mass" "~" 72.5
[ -s "$HL_TMP/exported.xml" ] || hl_fail "Ctrl+E wrote no summary (exported.xml)"
xmllint --noout "$HL_TMP/exported.xml" || hl_fail "the exported summary is not well-formed"
grep -q 'Planning aid only' "$HL_TMP/exported.xml" || hl_fail "the exported summary has no caution"
hl_note "ok: Ctrl+E exported a summary with the caution, .xml added"
[ -s "$HL_TMP/saved-as.hlplan" ] || hl_fail "Ctrl+Shift+S wrote no plan (saved-as.hlplan)"
"$HIPLEVER" --print-results "$HL_TMP/saved-as.hlplan" >"$HL_TMP/saved.csv" \
  || hl_fail "the plan saved under a name does not open"
hl_note "ok: Ctrl+Shift+S saved a plan that opens, .hlplan added"

# A save that fails says so and the plan stays modified: nothing can be
# created in /proc, not even by root.
hl_start save-fails "$HL_DEMO"
hl_key ctrl+shift+n
hl_settle
hl_key ctrl+shift+s
choose "Save the Plan" "/proc/hiplever-test-plan"
hl_wait_dialog Error
hl_grab save-error-dialog
hl_key Return
sleep 0.5
title=$(xdotool getwindowname "$HL_WID")
case "$title" in
  "• "*) hl_note "ok: after the failed save the plan is still marked modified: $title" ;;
  *) hl_fail "the failed save cleared the modified mark: $title" ;;
esac
hl_quit_discarding

# Ctrl+O on a good file replaces the plan; with unsaved changes it asks
# first, and Discard goes on to the file chooser.
hl_start open-good --dump-summary-on-exit "$HL_TMP/left.xml" "$HL_DEMO"
hl_key ctrl+shift+n
hl_settle
hl_key ctrl+o
hl_wait_dialog "Unsaved changes"
hl_grab open-guard
hl_key alt+d
choose "Open a Plan" "$SRCDIR/data/examples/demo-left.hlplan"
hl_key ctrl+q
hl_wait_exit
side=$(xmllint --xpath "string(//*[local-name()='case']/@operated-side)" "$HL_TMP/left.xml")
[ "$side" = left ] || hl_fail "Ctrl+O did not open the left-hip plan (side '$side')"
hl_note "ok: Ctrl+O opened another plan"

# HIPLEVER_DUMP_SUMMARY does what --dump-summary-on-exit does.
HIPLEVER_DUMP_SUMMARY="$HL_TMP/env.xml" "$HIPLEVER" --print-results "$HL_DEMO" >/dev/null \
  || hl_fail "--print-results failed"
xmllint --noout "$HL_TMP/env.xml" || hl_fail "HIPLEVER_DUMP_SUMMARY wrote no summary"
hl_note "ok: HIPLEVER_DUMP_SUMMARY wrote the summary"

# A planning summary opens as a plan too.
"$HIPLEVER" --print-results --dump-summary-on-exit "$HL_TMP/summary.xml" "$HL_DEMO" >"$HL_TMP/a.csv"
"$HIPLEVER" --print-results "$HL_TMP/summary.xml" >"$HL_TMP/b.csv" \
  || hl_fail "a planning summary could not be opened"
cmp -s "$HL_TMP/a.csv" "$HL_TMP/b.csv" || hl_fail "the summary gave other results than its plan"
hl_note "ok: a planning summary opens with the same results"
echo "PASS"
