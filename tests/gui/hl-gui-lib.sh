# hl-gui-lib.sh: shared by the GUI tests; sourced, not run.
#
# Copyright 2026 the hiplever developers
# SPDX-License-Identifier: GPL-3.0-or-later
#
# Usage from a test:   . "$(dirname "$0")/hl-gui-lib.sh" "$@"
# Arguments: HIPLEVER (the program), SRCDIR (the source tree), then the
# test's own.  Each test re-runs itself under its own X server and session
# bus, with a fixed locale and time zone and an empty home.
#
# The window is driven as a person would with xdotool.  Handle and control
# positions come from HIPLEVER_TEST_PRINT_HANDLES=1, which makes the window
# print "HANDLE key x y" / "WIDGET name x y" lines (window coordinates)
# followed by "FRAME n" after each frame in which something moved.

set -eu

# The window's test hooks are built only with -Dtest_hooks=true (as
# tests/bootstrap.sh configures CI): without them there is nothing to drive.
if ! "$1" --help 2>/dev/null | grep -q -- '--screenshot'; then
  echo "SKIP: $1 was built without -Dtest_hooks=true"
  exit 77
fi

if [ -z "${HL_GUI_INNER:-}" ]; then
  export HL_GUI_INNER=1
  exec xvfb-run -a -s "-screen 0 ${HL_GUI_SCREEN:-1280x900}x24" dbus-run-session -- sh "$0" "$@"
fi

HIPLEVER=$1
SRCDIR=$2
shift 2

export LC_ALL=C TZ=UTC GSK_RENDERER=cairo NO_AT_BRIDGE=1 GTK_A11Y=none
# Under /var/tmp when possible: the file chooser lists the folders on a
# typed path, and a crowded /tmp makes it cancel its own listing.
HL_TMP=$(mktemp -d /var/tmp/hlgui.XXXXXX 2>/dev/null || mktemp -d)
export HOME="$HL_TMP/home" XDG_CONFIG_HOME="$HL_TMP/config" \
       XDG_DATA_HOME="$HL_TMP/data" XDG_CACHE_HOME="$HL_TMP/cache" \
       XDG_STATE_HOME="$HL_TMP/state" XDG_RUNTIME_DIR="$HL_TMP/runtime"
mkdir -p "$HOME" "$XDG_CONFIG_HOME" "$XDG_DATA_HOME" "$XDG_CACHE_HOME" \
         "$XDG_STATE_HOME" "$XDG_RUNTIME_DIR"
chmod 700 "$XDG_RUNTIME_DIR"
HL_DEMO="$SRCDIR/data/examples/demo.hlplan"
# The demo refers to its radiograph by a path beside the plan: copies of
# the demo in $HL_TMP find it there.
cp "$SRCDIR/data/examples/demo-radiograph.png" "$HL_TMP/" 2>/dev/null || true
HL_PID=
HL_OUT=
HL_WID=

# Seconds to wait for the window and for each printed frame.
HL_WAIT_S=${HL_WAIT_S:-20}

hl_cleanup () {
  if [ -n "$HL_PID" ] && kill -0 "$HL_PID" 2>/dev/null; then
    kill "$HL_PID" 2>/dev/null || true
  fi
  rm -rf "$HL_TMP"
}
trap hl_cleanup EXIT

hl_fail () {
  echo "FAIL: $*" >&2
  if [ -n "$HL_OUT" ] && [ -f "$HL_OUT" ]; then
    echo "--- program output ---" >&2
    tail -n 40 "$HL_OUT" >&2
  fi
  exit 1
}

hl_note () {
  echo "# $*"
}

# hl_start OUT_NAME [program arguments...]: starts the window in the
# background, printing handles, and waits until it is shown.
hl_start () {
  HL_OUT="$HL_TMP/$1.out"
  shift
  HIPLEVER_TEST_PRINT_HANDLES=1 "$HIPLEVER" "$@" >"$HL_OUT" 2>"$HL_OUT.err" &
  HL_PID=$!
  HL_WID=$(timeout "$HL_WAIT_S" xdotool search --sync --onlyvisible --name 'hiplever$' | head -n 1) \
    || hl_fail "no window named hiplever appeared"
  hl_wait_frame 1
  xdotool windowfocus --sync "$HL_WID" 2>/dev/null || true
  hl_mark
}

hl_frames () {
  grep -c '^FRAME ' "$HL_OUT" 2>/dev/null || true
}

# hl_wait_frame N: waits until at least N position blocks were printed.
hl_wait_frame () {
  i=0
  while [ "$(hl_frames)" -lt "$1" ]; do
    i=$((i + 1))
    [ "$i" -le $((HL_WAIT_S * 10)) ] || hl_fail "the window printed no frame $1"
    kill -0 "$HL_PID" 2>/dev/null || hl_fail "the program ended early"
    sleep 0.1
  done
}

# hl_mark before an input, hl_settle after it: waits until the window has
# printed at least one block since the mark and then nothing new for a
# moment (a drag prints many).
HL_MARK=0
HL_QUIET_S=0.3
hl_mark () {
  HL_MARK=$(hl_frames)
}
hl_settle () {
  hl_wait_frame $((HL_MARK + 1))
  n=$(hl_frames)
  while :; do
    sleep "$HL_QUIET_S"
    m=$(hl_frames)
    [ "$m" -ne "$n" ] || break
    n=$m
  done
  hl_mark
}

# hl_pos KIND NAME: "x y" of the last printed position.
hl_pos () {
  awk -v k="$1" -v n="$2" '$1 == k && $2 == n { x = $3; y = $4 } END { if (x != "") print x, y }' "$HL_OUT"
}

hl_click () {
  set -- $(hl_pos WIDGET "$1")
  [ $# -eq 2 ] || hl_fail "no position printed for that control"
  xdotool mousemove --window "$HL_WID" "$1" "$2" click 1
}

hl_key () {
  xdotool key --clearmodifiers "$@"
}

# hl_quit_discarding: Ctrl+Q, then "Discard" in the unsaved-changes dialog
# when it comes; waits for the program to end and checks its status.
hl_quit_discarding () {
  hl_key ctrl+q
  i=0
  while kill -0 "$HL_PID" 2>/dev/null; do
    if xdotool search --onlyvisible --name '^Unsaved changes$' >/dev/null 2>&1; then
      sleep 0.2
      hl_key alt+d
      break
    fi
    i=$((i + 1))
    [ "$i" -le $((HL_WAIT_S * 10)) ] || hl_fail "neither quit nor asked about unsaved changes"
    sleep 0.1
  done
  hl_wait_exit
}

# hl_wait_dialog TITLE: waits until a window of that title is shown.
hl_wait_dialog () {
  timeout "$HL_WAIT_S" xdotool search --sync --onlyvisible --name "^$1\$" >/dev/null \
    || hl_fail "no '$1' window came up"
  sleep 0.2
}

hl_wait_exit () {
  i=0
  while kill -0 "$HL_PID" 2>/dev/null; do
    i=$((i + 1))
    [ "$i" -le $((HL_WAIT_S * 10)) ] || hl_fail "the program did not quit"
    sleep 0.1
  done
  status=0
  wait "$HL_PID" || status=$?
  HL_PID=
  [ "$status" -eq 0 ] || hl_fail "the program exited with status $status"
}

# hl_attr FILE XPATH-PREDICATE ATTRIBUTE: one attribute of the summary.
hl_result () {
  xmllint --xpath "string(//*[local-name()='result'][$2]/@$3)" "$1"
}

hl_landmark () {
  xmllint --xpath "string(//*[local-name()='landmark'][@name='$2']/@$3)" "$1"
}

hl_count () {
  xmllint --xpath "count(//*[local-name()='$2'])" "$1"
}

# hl_cmp A OP B: floating-point comparison with awk (OP one of < > <= >=),
# or "~" for equality within HL_TOL.
HL_TOL=1e-9
hl_cmp () {
  awk -v a="$1" -v b="$3" -v op="$2" -v tol="$HL_TOL" 'BEGIN {
    d = a - b; if (d < 0) d = -d
    ok = (op == "<" && a < b) || (op == ">" && a > b) || (op == "<=" && a <= b) \
         || (op == ">=" && a >= b) || (op == "~" && d <= tol)
    exit ok ? 0 : 1 }'
}

hl_expect () {
  hl_cmp "$2" "$3" "$4" || hl_fail "$1: expected $2 $3 $4"
  hl_note "ok: $1: $2 $3 $4"
}

# hl_check_png FILE WIDTH HEIGHT: right size and not blank.
HL_MIN_STDDEV=0.02
hl_check_png () {
  size=$(identify -format '%w %h' "$1") || hl_fail "$1 is not an image"
  [ "$size" = "$2 $3" ] || hl_fail "$1 is $size, expected $2 $3"
  sd=$(convert "$1" -colorspace Gray -format '%[fx:standard_deviation]' info:)
  hl_expect "$(basename "$1") pixel spread" "$sd" ">" "$HL_MIN_STDDEV"
}

# hl_grab NAME: the whole X screen as it is now, checked.
hl_grab () {
  import -window root "$HL_TMP/$1.png" 2>/dev/null || hl_fail "could not grab the screen"
  hl_check_png "$HL_TMP/$1.png" $(echo "${HL_GUI_SCREEN:-1280x900}" | tr x ' ')
  if [ -n "${HL_GUI_KEEP:-}" ]; then
    cp "$HL_TMP/$1.png" "$HL_GUI_KEEP/"
  fi
}
