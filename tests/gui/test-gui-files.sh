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
hl_grab load-error-dialog
hl_key Return
sleep 0.5
kill -0 "$HL_PID" 2>/dev/null || hl_fail "the program ended after a file failed to load"
hl_key ctrl+q
hl_wait_exit
hl_note "ok: the window stayed after the load error and quit on Ctrl+Q"

# A planning summary opens as a plan too.
"$HIPLEVER" --print-results --dump-summary-on-exit "$HL_TMP/summary.xml" "$HL_DEMO" >"$HL_TMP/a.csv"
"$HIPLEVER" --print-results "$HL_TMP/summary.xml" >"$HL_TMP/b.csv" \
  || hl_fail "a planning summary could not be opened"
cmp -s "$HL_TMP/a.csv" "$HL_TMP/b.csv" || hl_fail "the summary gave other results than its plan"
hl_note "ok: a planning summary opens with the same results"
echo "PASS"
