#!/bin/sh
# hiplever quick start for a fresh Debian 12 machine.
#
#   sh tests/bootstrap.sh demo   install what is missing, build, open the demo case
#   sh tests/bootstrap.sh test   install what is missing, build, run the whole suite
#
# Runs as root, or as a user with sudo (only apt-get and locale-gen need it).
set -eu

mode=${1:-demo}
here=$(cd "$(dirname "$0")/.." && pwd)
cd "$here"

# What the build, the program and the tests use.  The GTK runtime's usual
# companions (icons, SVG loader, a font, the accessibility bus, MIME data)
# are named because the install leaves out recommended packages.
packages="gcc pkg-config python3 meson ninja-build libgtk-4-dev libxml2-dev
libxml2-utils check libgsl-dev gettext xvfb xauth xdotool dbus-x11
poppler-utils imagemagick locales desktop-file-utils appstream libgtk-4-bin
valgrind clang libclang-rt-14-dev bsdutils
adwaita-icon-theme librsvg2-common fonts-dejavu-core at-spi2-core dbus
shared-mime-info libglib2.0-bin
g++ cmake libgdcm-dev libgdcm-tools libpng-dev libtiff-dev libjpeg-dev
libpango1.0-dev"

if [ "$(id -u)" -eq 0 ]; then sudo=""; else sudo="sudo"; fi

missing=""
for p in $packages; do
  if ! dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "ok installed"; then
    missing="$missing $p"
  fi
done
if [ -n "$missing" ]; then
  echo "bootstrap: installing:$missing"
  $sudo apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $sudo apt-get install -y -qq --no-install-recommends $missing
fi

# The translation and decimal-comma tests run under German.
if ! locale -a 2>/dev/null | grep -qi '^de_DE\.utf-\?8$'; then
  echo "bootstrap: generating the de_DE.UTF-8 locale"
  $sudo sed -i 's/^# *\(de_DE.UTF-8 UTF-8\)/\1/' /etc/locale.gen
  grep -q '^de_DE.UTF-8 UTF-8' /etc/locale.gen || echo 'de_DE.UTF-8 UTF-8' | $sudo tee -a /etc/locale.gen >/dev/null
  $sudo locale-gen >/dev/null
fi

jobs=$(nproc 2>/dev/null || echo 2)

case "$mode" in
demo)
  [ -d build ] || meson setup build
  ninja -C build
  if [ -n "${DISPLAY:-}${WAYLAND_DISPLAY:-}" ]; then
    exec build/app/hiplever data/examples/demo.hlplan
  fi
  echo "bootstrap: no display; showing the demo case on the command line instead"
  exec build/app/hiplever-cli solve data/examples/demo.hlplan
  ;;
test)
  export LC_ALL=C TZ=UTC
  # The GUI tests drive the window through its test hooks.
  [ -d build-ci ] || meson setup build-ci --werror -Dtest_hooks=true
  meson configure build-ci -Dtest_hooks=true
  ninja -C build-ci -j "$jobs"
  status=0
  meson test -C build-ci --print-errorlogs --num-processes "$jobs" || status=1

  # The whole suite once more under AddressSanitizer and
  # UndefinedBehaviorSanitizer (but the install, fuzz and valgrind suites,
  # which build or instrument their own binaries).  fontconfig's caches,
  # freed only by FcFini, are the one leak suppressed (tests/valgrind/lsan.supp);
  # the window's tests run without leak checking, since GTK keeps allocations
  # until exit by design: valgrind checks the window's leaks instead.
  [ -d build-san ] || meson setup build-san --werror -Db_sanitize=address,undefined -Db_lundef=false -Dtest_hooks=true
  meson configure build-san -Dtest_hooks=true
  ninja -C build-san -j "$jobs"
  export UBSAN_OPTIONS=print_stacktrace=1:halt_on_error=1
  export LSAN_OPTIONS=suppressions=$here/tests/valgrind/lsan.supp:print_suppressions=0
  ASAN_OPTIONS=detect_leaks=1:abort_on_error=1 \
    meson test -C build-san --print-errorlogs --num-processes "$jobs" --logbase san-core \
    --suite core --suite cli --suite ui || status=1
  ASAN_OPTIONS=detect_leaks=0:abort_on_error=1 \
    meson test -C build-san --print-errorlogs --num-processes "$jobs" --logbase san-gui \
    --suite gui || status=1

  # One closing line for the whole run.
  python3 - build-ci/meson-logs/testlog.json build-san/meson-logs/san-core.json \
    build-san/meson-logs/san-gui.json <<'PY'
import json, sys
passed = failed = skipped = 0
for log in sys.argv[1:]:
    try:
        lines = open(log).read().splitlines()
    except OSError:
        continue
    for line in lines:
        r = json.loads(line).get('result', '')
        if r == 'OK' or r == 'EXPECTEDFAIL':
            passed += 1
        elif r == 'SKIP':
            skipped += 1
        else:
            failed += 1
print('suite: %d passed, %d failed, %d skipped' % (passed, failed, skipped))
PY
  exit $status
  ;;
*)
  echo "usage: sh tests/bootstrap.sh demo|test" >&2
  exit 2
  ;;
esac
