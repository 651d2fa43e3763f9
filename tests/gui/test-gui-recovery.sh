#!/bin/sh
# No lost work: unsaved edits are autosaved, a killed program offers them
# back at the next start (Recover, Discard, Later), a second running
# window leaves the first one's autosave alone, Save keeps the previous
# version as PLAN.hlplan~, and a file of a newer format is refused and
# never written.
#
# Copyright 2026 the hiplever developers
# SPDX-License-Identifier: GPL-3.0-or-later
. "$(dirname "$0")/hl-gui-lib.sh"

# Test hook: autosave every second instead of every 30.
export HIPLEVER_AUTOSAVE_SECONDS=1
AUTOSAVE_DIR="$XDG_DATA_HOME/hiplever/autosave"
EDIT_KG=81.5
RECOVER_TITLE="Recover unsaved changes"

plan="$HL_TMP/case.hlplan"
cp "$HL_DEMO" "$plan"
cp "$HL_DEMO" "$HL_TMP/pristine.hlplan"

mass_of () {
  xmllint --xpath "string(//*[local-name()='case']/@mass-kg)" "$1"
}

autosaves () {
  ls "$AUTOSAVE_DIR"/*.hlplan 2>/dev/null | wc -l
}

# wait_autosave: until an autosaved plan holds the edit.
wait_autosave () {
  i=0
  until grep -qs "mass-kg=\"$EDIT_KG\"" "$AUTOSAVE_DIR"/*.hlplan; do
    i=$((i + 1))
    [ "$i" -le $((HL_WAIT_S * 10)) ] || hl_fail "no autosave with the edit in $AUTOSAVE_DIR"
    sleep 0.1
  done
}

# edit_and_crash NAME: opens the plan, types the body mass, waits for the
# autosave and kills the program as a crash would.
edit_and_crash () {
  hl_start "$1" "$plan"
  hl_click mass-spin
  hl_key ctrl+a
  xdotool type --delay 20 "$EDIT_KG"
  hl_key Tab
  hl_settle
  wait_autosave
  info=$(ls "$AUTOSAVE_DIR"/*.info | head -n 1)
  grep -q "^pid=$HL_PID\$" "$info" || hl_fail "the autosave does not name its owner: $(cat "$info")"
  grep -q "^original=$plan\$" "$info" || hl_fail "the autosave does not name the original file"
  grep -q '^version=' "$info" || hl_fail "the autosave has no program version"
  kill -KILL "$HL_PID"
  wait "$HL_PID" 2>/dev/null || true
  HL_PID=
  [ "$(autosaves)" -eq 1 ] || hl_fail "the autosave did not outlive the crash"
  cmp -s "$plan" "$HL_TMP/pristine.hlplan" || hl_fail "the autosave wrote into the plan file"
  hl_note "ok: the edit was autosaved, the plan file untouched, and the program killed"
}

# no_recovery_dialog: none comes up within a few seconds.
no_recovery_dialog () {
  sleep 2
  if xdotool search --onlyvisible --name "^$RECOVER_TITLE\$" >/dev/null 2>&1; then
    hl_fail "$1"
  fi
}

# 1. Recover (Return on the default button): the edit is back, the title
#    says so; quitting with Discard removes the autosave.
edit_and_crash crash-1
hl_start recover --dump-summary-on-exit "$HL_TMP/recovered.xml" "$plan"
hl_wait_dialog "$RECOVER_TITLE"
hl_grab recovery-dialog
hl_key Return
sleep 1
title=$(xdotool getwindowname "$HL_WID")
case "$title" in
  *"(recovered)"*) hl_note "ok: the title shows the recovery: $title" ;;
  *) hl_fail "the title does not show the recovery: $title" ;;
esac
case "$title" in
  "•"*) ;;
  *) hl_fail "the recovered plan is not marked modified: $title" ;;
esac
info=$(ls "$AUTOSAVE_DIR"/*.info | head -n 1)
grep -q "^pid=$HL_PID\$" "$info" || hl_fail "the recovering program did not take the autosave over"
hl_quit_discarding
hl_expect "the recovered plan has the edit" "$(mass_of "$HL_TMP/recovered.xml")" "~" "$EDIT_KG"
[ "$(autosaves)" -eq 0 ] || hl_fail "Discard on quitting left the autosave"
cmp -s "$plan" "$HL_TMP/pristine.hlplan" || hl_fail "recovering wrote into the plan file"
hl_note "ok: Discard on quitting removed the autosave and left the file"

# 2. Discard in the recovery dialog: the autosave goes, the file's plan
#    stays.
edit_and_crash crash-2
hl_start decline --dump-summary-on-exit "$HL_TMP/declined.xml" "$plan"
hl_wait_dialog "$RECOVER_TITLE"
hl_key alt+d
sleep 1
[ "$(autosaves)" -eq 0 ] || hl_fail "declining the recovery left the autosave"
hl_key ctrl+q
hl_wait_exit
hl_expect "declining kept the file's body mass" "$(mass_of "$HL_TMP/declined.xml")" "~" 72.5
hl_note "ok: declining removed the autosave"

# 3. Later keeps it, also through a clean quit; a second start offers it
#    again, and Ctrl+S after confirming saves it over the original, whose
#    previous version becomes case.hlplan~.
edit_and_crash crash-3
hl_start later "$plan"
hl_wait_dialog "$RECOVER_TITLE"
hl_key alt+l
sleep 1
hl_key ctrl+q
hl_wait_exit
[ "$(autosaves)" -eq 1 ] || hl_fail "Later did not keep the autosave"
hl_note "ok: Later kept the autosave through a clean quit"

hl_start save-recovered --dump-summary-on-exit "$HL_TMP/saved.xml" "$plan"
hl_wait_dialog "$RECOVER_TITLE"
hl_key Return
sleep 1
hl_key ctrl+s
hl_wait_dialog "Save recovered plan"
hl_grab confirm-save
hl_key Return
sleep 1
title=$(xdotool getwindowname "$HL_WID")
case "$title" in
  *"(recovered)"*|"•"*) hl_fail "after saving the title still says recovered or modified: $title" ;;
esac
[ "$(autosaves)" -eq 0 ] || hl_fail "saving left the autosave"
hl_key ctrl+q
hl_wait_exit
hl_expect "the saved file has the edit" "$(mass_of "$plan")" "~" "$EDIT_KG"
cmp -s "$plan~" "$HL_TMP/pristine.hlplan" || hl_fail "case.hlplan~ is not the previous version"
hl_expect "the saved window's summary" "$(mass_of "$HL_TMP/saved.xml")" "~" "$EDIT_KG"
hl_note "ok: Ctrl+S saved the recovered plan over its file and kept the old one as case.hlplan~"

# 4. A second window started while the first runs does not take the
#    first one's autosave.
cp "$HL_TMP/pristine.hlplan" "$plan"
hl_start first "$plan"
first=$HL_PID
hl_click mass-spin
hl_key ctrl+a
xdotool type --delay 20 "$EDIT_KG"
hl_key Tab
hl_settle
wait_autosave
HIPLEVER_TEST_PRINT_HANDLES=1 "$HIPLEVER" --dump-summary-on-exit "$HL_TMP/second.xml" "$plan" \
  >"$HL_TMP/second.out" 2>&1 &
second=$!
no_recovery_dialog "a second running window offered the first one's autosave"
grep -q "^pid=$first\$" "$AUTOSAVE_DIR"/*.info || hl_fail "the first window lost its autosave"
kill "$second"
wait "$second" 2>/dev/null || true
xdotool windowfocus --sync "$HL_WID" 2>/dev/null || true
hl_quit_discarding
[ "$(autosaves)" -eq 0 ] || hl_fail "the first window's clean quit left its autosave"
hl_note "ok: a running window keeps its autosave from a second one"

# 5. A file of a newer format: refused with a dialog, never written, not
#    even by Save or by quitting.
newer="$HL_TMP/newer.hlplan"
sed 's/format-version="1"/format-version="7"/' "$HL_DEMO" >"$newer"
grep -q 'format-version="7"' "$newer" || hl_fail "could not make a newer plan"
cp "$newer" "$HL_TMP/newer.orig"
hl_start newer --dump-summary-on-exit "$HL_TMP/newer-dump.xml" "$newer"
hl_wait_dialog Error
hl_grab newer-refused
hl_key Return
sleep 0.5
hl_key ctrl+s
hl_wait_dialog "Save the Plan"
hl_key Escape
sleep 0.5
hl_key ctrl+q
hl_wait_exit
cmp -s "$newer" "$HL_TMP/newer.orig" || hl_fail "the newer file was changed"
[ ! -e "$newer~" ] || hl_fail "a backup of the newer file was made"
hl_note "ok: the newer file was refused and its bytes are unchanged after Save and quit"
echo "PASS"
