#!/bin/sh
# run-valgrind.sh: valgrind memcheck over the command line on every example
# and over one screenshot run of the desktop program.
#
#   sh tests/valgrind/run-valgrind.sh CLI [GUI] [SOURCE_DIR]
#
# CLI: solve and summary on each data/examples/*.hlplan, and validate on
# each hostile file in tests/files (a refusal, exit status 1, must be clean
# too).  GUI (when given and Xvfb is installed): hiplever --screenshot of
# the demo under Xvfb with GSK_RENDERER=cairo in a private D-Bus session.
#
# Fails on any memcheck error and on any definite leak; "possibly lost" and
# "still reachable" blocks are GLib's and GTK's caches.  The toolkit's own
# definite leaks are suppressed in tests/valgrind/gtk.supp, each with a note.
# Exits 77 (a skip for meson) when valgrind is not installed.
set -u

if [ $# -lt 1 ]; then
  echo "usage: $0 CLI [GUI] [SOURCE_DIR]" >&2
  exit 2
fi
cli=$1
gui=${2:-}
src=${3:-$(cd "$(dirname "$0")/../.." && pwd)}
export LC_ALL=C TZ=UTC

if ! command -v valgrind >/dev/null 2>&1; then
  echo "run-valgrind: valgrind not installed (apt-get install valgrind)" >&2
  exit 77
fi

work=$(mktemp -d "${TMPDIR:-/tmp}/hiplever-valgrind.XXXXXX")
trap 'rm -rf "$work"' EXIT
start=$(date +%s)
runs=0
failed=0

# Memcheck's own failures use a status no hiplever program returns, so that
# an expected refusal (status 1) is told apart from a memory error.
vg_status=99
vg() {
  runs=$((runs + 1))
  log="$work/run-$runs.log"
  valgrind --error-exitcode=$vg_status --leak-check=full \
    --errors-for-leak-kinds=definite --show-leak-kinds=definite \
    --suppressions="$src/tests/valgrind/gtk.supp" --num-callers=30 \
    --log-file="$log" "$@" >"$work/out-$runs.txt" 2>&1
}

# expect STATUS DESCRIPTION -- COMMAND...
expect() {
  want=$1
  what=$2
  shift 3
  vg "$@"
  got=$?
  if [ "$got" -eq "$want" ]; then
    return 0
  fi
  failed=$((failed + 1))
  if [ "$got" -eq "$vg_status" ]; then
    echo "FAIL: $what: memcheck errors or definite leaks:"
    grep -v '^==[0-9]*== *$' "$log" | tail -n 80
  else
    echo "FAIL: $what: exit status $got, expected $want"
    tail -n 20 "$work/out-$runs.txt"
  fi
}

for plan in "$src"/data/examples/*.hlplan; do
  name=$(basename "$plan")
  expect 0 "cli solve $name" -- "$cli" solve "$plan"
  expect 0 "cli solve --format csv $name" -- "$cli" solve --format csv "$plan"
  expect 0 "cli summary $name" -- "$cli" summary "$plan" -o "$work/summary.xml"
done
for plan in "$src"/tests/files/*.hlplan; do
  [ -e "$plan" ] || continue
  expect 1 "cli validate $(basename "$plan") (a refusal)" -- "$cli" validate "$plan"
done

if [ -n "$gui" ] && ! "$gui" --help 2>/dev/null | grep -q -- '--screenshot'; then
  echo "run-valgrind: $gui was built without -Dtest_hooks=true: the desktop program is not checked" >&2
elif [ -n "$gui" ]; then
  if ! command -v xvfb-run >/dev/null 2>&1 || ! command -v dbus-run-session >/dev/null 2>&1; then
    echo "run-valgrind: xvfb-run or dbus-run-session missing: the desktop program is not checked" >&2
  else
    # G_SLICE and G_DEBUG make GLib's allocations visible to memcheck;
    # NO_AT_BRIDGE keeps the accessibility bus (not ours) out of the run.
    runs=$((runs + 1))
    GSK_RENDERER=cairo G_SLICE=always-malloc G_DEBUG=gc-friendly NO_AT_BRIDGE=1 \
      dbus-run-session -- xvfb-run -a -s "-screen 0 1280x900x24" \
      valgrind --error-exitcode=$vg_status --leak-check=full \
      --errors-for-leak-kinds=definite --show-leak-kinds=definite \
      --suppressions="$src/tests/valgrind/gtk.supp" --num-callers=30 \
      --log-file="$work/gui.log" "$gui" --screenshot "$work/shot.png" \
      "$src/data/examples/demo.hlplan" >"$work/gui-out.txt" 2>&1
    got=$?
    if [ "$got" -eq "$vg_status" ]; then
      echo "FAIL: hiplever --screenshot: memcheck errors or definite leaks:"
      grep -v '^==[0-9]*== *$' "$work/gui.log" | tail -n 80
      failed=$((failed + 1))
    elif [ "$got" -ne 0 ]; then
      echo "FAIL: hiplever --screenshot: exit status $got"
      tail -n 20 "$work/gui-out.txt"
      failed=$((failed + 1))
    elif [ ! -s "$work/shot.png" ]; then
      echo "FAIL: hiplever --screenshot wrote no image"
      failed=$((failed + 1))
    fi
  fi
fi

echo "valgrind: $runs runs, $failed failed, $(($(date +%s) - start)) s"
[ "$failed" -eq 0 ]
