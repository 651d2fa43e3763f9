#!/usr/bin/env bash
# test-install.sh: install hiplever into a temporary prefix and run it there.
#
# Copyright 2026 the hiplever developers
# SPDX-License-Identifier: GPL-3.0-or-later
#
# Usage: test-install.sh SOURCE_DIR VERSION
#
# The source tree is copied, configured with --prefix in a temporary
# directory, built and installed; then the copy and its build directory are
# deleted, so that the installed programs can only find what the install put
# under the prefix (the uninstalled fallback to the source data directory is
# gone).  Prints one line per failure and, last, "install: N passed, M
# failed, K skipped"; exits non-zero on any failure.
set -u
export LC_ALL=C TZ=UTC

if [ $# -ne 2 ]; then
  echo "usage: $0 SOURCE_DIR VERSION" >&2
  exit 2
fi
SRC=$1
VERSION=$2
APP_ID=org.hiplever.Hiplever
PLAN_MIME=application/x-hiplever-plan
PLAN_NS=urn:hiplever:plan
CAUTION_START='Planning aid only'
# A screenshot of the window is far larger than this; an empty or
# failed render is not.
SCREENSHOT_MIN_BYTES=10000
# Seconds the window may take to start, render and quit under Xvfb.
GUI_TIMEOUT_S=120
GUI_PROBLEM_RE='(WARNING|CRITICAL|ERROR) \*\*|^hiplever: '

WORK=$(mktemp -d "${TMPDIR:-/tmp}/hiplever-install-test.XXXXXX")
trap 'rm -rf "$WORK"' EXIT
COPY=$WORK/src
BUILD=$WORK/build
PREFIX=$WORK/prefix

passed=0
failed=0
skipped=0

pass () { passed=$((passed + 1)); }
fail () { failed=$((failed + 1)); echo "FAIL: $*"; }
skip () { skipped=$((skipped + 1)); echo "SKIP: $*"; }
check () {
  local what=$1
  shift
  if "$@"; then pass; else fail "$what"; fi
}
finish () {
  echo "install: $passed passed, $failed failed, $skipped skipped"
  [ "$failed" -eq 0 ]
  exit
}

# run LOG ARGS...: runs a command; stdout in $WORK/LOG.out, stderr in
# $WORK/LOG.err, the exit status in $rc.
run () {
  local log=$1
  shift
  "$@" >"$WORK/$log.out" 2>"$WORK/$log.err"
  rc=$?
}
show () { sed 's/^/    /' "$WORK/$1.out" "$WORK/$1.err" | tail -n 30; }

# ---- Copy, configure, build, install --------------------------------------

copy_source () {
  mkdir -p "$COPY"
  # Tracked and new files, not the ignored build directories; without git
  # (or where git refuses the checkout), everything but build* and .git.
  if command -v git >/dev/null 2>&1 \
     && git -C "$SRC" ls-files -z --cached --others --exclude-standard \
          >"$WORK/files" 2>/dev/null \
     && [ -s "$WORK/files" ]; then
    (cd "$SRC" && xargs -0 sh -c 'for f; do [ -f "$f" ] && printf "%s\0" "$f"; done' sh \
       <"$WORK/files" | tar --null -T - -cf -) | (cd "$COPY" && tar -xf -)
  else
    (cd "$SRC" && tar --exclude='./build*' --exclude=./.git -cf - .) \
      | (cd "$COPY" && tar -xf -)
  fi
}

start=$(date +%s)
copy_source
check "copy the source tree" test -f "$COPY/meson.build"

run setup meson setup "$BUILD" "$COPY" --prefix="$PREFIX" --wrap-mode=nodownload
if [ "$rc" -ne 0 ]; then
  fail "meson setup --prefix=$PREFIX (exit $rc)"
  show setup
  finish
fi
run install meson install -C "$BUILD"
if [ "$rc" -ne 0 ]; then
  fail "meson install (exit $rc)"
  show install
  finish
fi
pass
echo "configure, build and install took $(( $(date +%s) - start )) s"

# The default build has no test hooks; the screenshots below need them, so
# the same tree is configured with them and installed again over it.
run default-help env -u DISPLAY -u WAYLAND_DISPLAY "$BUILD/app/hiplever" --help
check "the default build's window has no test hooks (no --screenshot)" \
  test "$(grep -c -- '--screenshot' "$WORK/default-help.out")" -eq 0
run hooks-configure meson configure "$BUILD" -Dtest_hooks=true
check "meson configure -Dtest_hooks=true" test "$rc" -eq 0
run hooks-install meson install -C "$BUILD"
if [ "$rc" -eq 0 ]; then pass; else fail "meson install with the test hooks (exit $rc)"; show hooks-install; fi

# The example plans of the tree, to compare with what was installed.
(cd "$COPY/data/examples" && ls -1 -- *.hlplan) >"$WORK/examples-source" 2>/dev/null

# From here on only the prefix exists.
rm -rf "$COPY" "$BUILD"

BIN=$PREFIX/bin
SHARE=$PREFIX/share
PKGDATA=$SHARE/hiplever
EXAMPLES=$PKGDATA/examples
CLI=$BIN/hiplever-cli
GUI=$BIN/hiplever

# ---- The installed files ------------------------------------------------

for f in \
  "$CLI" \
  "$PKGDATA/hiplever-plan.xsd" \
  "$EXAMPLES/demo.hlplan" \
  "$SHARE/applications/$APP_ID.desktop" \
  "$SHARE/metainfo/$APP_ID.metainfo.xml" \
  "$SHARE/mime/packages/$APP_ID.xml" \
  "$SHARE/icons/hicolor/scalable/apps/$APP_ID.svg" \
  "$SHARE/icons/hicolor/symbolic/apps/$APP_ID-symbolic.svg" \
  "$SHARE/man/man1/hiplever-cli.1" \
  "$SHARE/man/man1/hiplever.1"
do
  check "installed: ${f#"$PREFIX"/}" test -s "$f"
done
check "installed: hiplever-cli is executable" test -x "$CLI"

for f in "$SHARE/icons/hicolor/scalable/apps/$APP_ID.svg" \
         "$SHARE/icons/hicolor/symbolic/apps/$APP_ID-symbolic.svg" \
         "$SHARE/mime/packages/$APP_ID.xml" \
         "$PKGDATA/hiplever-plan.xsd"
do
  check "well-formed XML: ${f#"$PREFIX"/}" xmllint --noout "$f"
done

# ---- The installed command line ---------------------------------------------

run version "$CLI" --version
check "hiplever-cli --version exits 0" test "$rc" -eq 0
check "hiplever-cli --version names $VERSION" \
  grep -qx "hiplever-cli $VERSION" "$WORK/version.out"

run solve "$CLI" solve "$EXAMPLES/demo.hlplan"
if [ "$rc" -eq 0 ]; then pass; else fail "hiplever-cli solve demo.hlplan (exit $rc)"; show solve; fi
check "solve demo.hlplan: a native column" grep -q 'native' "$WORK/solve.out"
check "solve demo.hlplan: the joint reaction force" \
  grep -q '^Joint reaction force (x body weight)  *[0-9]' "$WORK/solve.out"
check "solve demo.hlplan: the caution" grep -q "$CAUTION_START" "$WORK/solve.out"
check "solve demo.hlplan: nothing on stderr" test ! -s "$WORK/solve.err"

shopt -s nullglob
examples=("$EXAMPLES"/*.hlplan)
shopt -u nullglob
check "installed examples: at least one" test "${#examples[@]}" -gt 0
(cd "$EXAMPLES" && ls -1 -- *.hlplan) >"$WORK/examples-installed" 2>/dev/null
run examples diff "$WORK/examples-source" "$WORK/examples-installed"
if [ "$rc" -eq 0 ]; then pass; else fail "every data/examples/*.hlplan is installed (data/meson.build)"; show examples; fi
run validate "$CLI" validate "${examples[@]}"
if [ "$rc" -eq 0 ]; then pass; else fail "hiplever-cli validate every installed example (exit $rc)"; show validate; fi
check "validate: one line per installed example (${#examples[@]})" \
  test "$(grep -c ': valid (' "$WORK/validate.out")" -eq "${#examples[@]}"

# The installed schema is the one the summary claims to follow.
run summary "$CLI" summary "$EXAMPLES/demo.hlplan" -o "$WORK/summary.xml"
check "hiplever-cli summary demo.hlplan exits 0" test "$rc" -eq 0
run schema xmllint --noout --schema "$PKGDATA/hiplever-plan.xsd" \
  "$WORK/summary.xml" "${examples[@]}"
if [ "$rc" -eq 0 ]; then pass; else fail "summary and examples valid against the installed schema"; show schema; fi

# The exports draw with cairo and the bundled fonts of the system: run them
# from the prefix once the command line has them.
if "$CLI" --help | grep -q '^  report '; then
  run report "$CLI" report "$EXAMPLES/demo.hlplan" -o "$WORK/report.pdf"
  if [ "$rc" -eq 0 ]; then pass; else fail "hiplever-cli report (exit $rc)"; show report; fi
  check "report: a PDF" grep -q '^%PDF-' "$WORK/report.pdf"
  if command -v pdftotext >/dev/null 2>&1; then
    pdftotext "$WORK/report.pdf" "$WORK/report.txt" 2>/dev/null
    check "report: the caution" grep -q "$CAUTION_START" "$WORK/report.txt"
  fi
else
  skip "hiplever-cli has no report subcommand yet"
fi
if "$CLI" --help | grep -q '^  figure '; then
  for ext in svg png; do
    run "figure-$ext" "$CLI" figure "$EXAMPLES/demo.hlplan" -o "$WORK/figure.$ext"
    if [ "$rc" -eq 0 ]; then pass; else fail "hiplever-cli figure -o figure.$ext (exit $rc)"; show "figure-$ext"; fi
    check "figure.$ext written" test -s "$WORK/figure.$ext"
  done
  check "figure.svg is well-formed" xmllint --noout "$WORK/figure.svg"
  check "figure.png is a PNG" test "$(head -c 8 "$WORK/figure.png" | od -An -tx1 | tr -d ' \n')" = 89504e470d0a1a0a
else
  skip "hiplever-cli has no figure subcommand yet"
fi

# ---- The manual pages -------------------------------------------------------

# man_page_checks PAGE: PAGE formats cleanly, names only installed files,
# and states the caution.
man_page_checks () {
  local page=$1
  local man=$SHARE/man/man1/$page
  run "man-$page" groff -man -ww -z "$man"
  check "$page formats without warnings" test "$rc" -eq 0 -a ! -s "$WORK/man-$page.err"
  check "$page: no unreplaced @VARIABLE@" test "$(grep -c '@[A-Z_]*@' "$man")" -eq 0
  grep '^\.I /' "$man" | sed 's/^\.I //' >"$WORK/$page-files"
  check "$page: names files under the prefix" test -s "$WORK/$page-files"
  while read -r f; do
    check "$page FILES entry exists: $f" test -e "$f"
  done <"$WORK/$page-files"
  check "$page: the caution" grep -q '^hiplever is a planning aid only\.' "$man"
}

# man_options_checks PAGE HELP: every long option in the --help text HELP
# (but GLib's own --help-* groups) is on the page.
man_options_checks () {
  local page=$1 help=$2
  grep -o -- '--[a-z][a-z-]*' "$help" | grep -v -- '^--help-' | sort -u >"$WORK/$page-options"
  check "$page: --help lists options" test -s "$WORK/$page-options"
  while read -r opt; do
    check "$page documents option '$opt'" \
      grep -q -- "${opt//-/\\\\-}" "$SHARE/man/man1/$page"
  done <"$WORK/$page-options"
}

man_page_checks hiplever-cli.1
man_page_checks hiplever.1

# Every subcommand and option the command line's help lists is on its page.
run help "$CLI" --help
check "hiplever-cli --help exits 0" test "$rc" -eq 0
sed -n '/^Subcommands:/,/^Options:/p' "$WORK/help.out" \
  | sed -n 's/^  \([a-z][a-z-]*\) .*/\1/p; s/^  \([a-z][a-z-]*\)$/\1/p' >"$WORK/subcommands"
check "hiplever-cli --help lists subcommands" test -s "$WORK/subcommands"
while read -r sub; do
  check "hiplever-cli.1 documents subcommand '$sub'" \
    grep -Eq "^\.B[IR]? \"?$sub( |\"|\$)" "$SHARE/man/man1/hiplever-cli.1"
done <"$WORK/subcommands"
man_options_checks hiplever-cli.1 "$WORK/help.out"

# ---- Desktop entry, software-centre entry, file type --------------------------

if command -v desktop-file-validate >/dev/null 2>&1; then
  run dfv desktop-file-validate "$SHARE/applications/$APP_ID.desktop"
  if [ "$rc" -eq 0 ]; then pass; else fail "desktop-file-validate (installed)"; show dfv; fi
else
  skip "desktop-file-validate not installed (desktop-file-utils)"
fi
if command -v appstreamcli >/dev/null 2>&1; then
  run asv appstreamcli validate --no-net "$SHARE/metainfo/$APP_ID.metainfo.xml"
  if [ "$rc" -eq 0 ]; then pass; else fail "appstreamcli validate (installed)"; show asv; fi
else
  skip "appstreamcli not installed (appstream)"
fi

# The caches meson's post-install step refreshes, where the tool exists.
if command -v gtk4-update-icon-cache >/dev/null 2>&1 \
   || command -v gtk-update-icon-cache >/dev/null 2>&1; then
  check "icon cache of the prefix written" test -s "$SHARE/icons/hicolor/icon-theme.cache"
else
  skip "no gtk4-update-icon-cache (libgtk-4-bin): icon cache"
fi
if command -v update-desktop-database >/dev/null 2>&1; then
  check "launcher registered for $PLAN_MIME" \
    grep -q "^$PLAN_MIME=.*$APP_ID\.desktop" "$SHARE/applications/mimeinfo.cache"
else
  skip "no update-desktop-database (desktop-file-utils): launcher cache"
fi
if command -v update-mime-database >/dev/null 2>&1; then
  check "MIME database of the prefix written" test -s "$SHARE/mime/mime.cache"
  check "MIME glob *.hlplan" \
    grep -q "^[0-9]*:$PLAN_MIME:\*\.hlplan" "$SHARE/mime/globs2"
  check "MIME root element <plan> in $PLAN_NS" \
    grep -q "^$PLAN_NS plan $PLAN_MIME\$" "$SHARE/mime/XMLnamespaces"
  if command -v gio >/dev/null 2>&1; then
    mkdir -p "$WORK/xdg-home"
    run gio env XDG_DATA_HOME="$WORK/xdg-home" XDG_DATA_DIRS="$SHARE:/usr/share" \
      gio info -a standard::content-type "$EXAMPLES/demo.hlplan"
    check "gio sees demo.hlplan as $PLAN_MIME" \
      grep -q "standard::content-type: $PLAN_MIME\$" "$WORK/gio.out"
  else
    skip "gio not installed: content type lookup"
  fi
else
  skip "update-mime-database not installed (shared-mime-info)"
fi

# ---- The installed window -----------------------------------------------------

# gui_run LOG ARGS...: the installed window under Xvfb and a private
# session bus, with XDG directories that see only the prefix and the system.
gui_run () {
  local log=$1
  shift
  mkdir -p "$WORK/xdg-home" "$WORK/xdg-config" "$WORK/xdg-cache"
  run "$log" env XDG_DATA_HOME="$WORK/xdg-home" XDG_CONFIG_HOME="$WORK/xdg-config" \
      XDG_CACHE_HOME="$WORK/xdg-cache" XDG_DATA_DIRS="$SHARE:/usr/share" \
      GSK_RENDERER=cairo GDK_BACKEND=x11 GTK_A11Y=none \
      timeout "$GUI_TIMEOUT_S" dbus-run-session -- \
      xvfb-run -a -s '-screen 0 1280x800x24' "$GUI" "$@"
}

# gui_screenshot NAME [PLAN]: a screenshot and the planning summary of what
# the window showed.
gui_screenshot () {
  local name=$1
  shift
  gui_run "$name" --screenshot="$WORK/$name.png" \
    --dump-summary-on-exit="$WORK/$name.xml" "$@"
  if [ "$rc" -eq 0 ]; then pass; else fail "hiplever --screenshot $* (exit $rc)"; show "$name"; fi
  check "$name: screenshot written" test -s "$WORK/$name.png"
  if [ -s "$WORK/$name.png" ]; then
    check "$name: screenshot is a real image (> $SCREENSHOT_MIN_BYTES bytes)" \
      test "$(wc -c <"$WORK/$name.png")" -gt "$SCREENSHOT_MIN_BYTES"
  fi
  check "$name: summary written" test -s "$WORK/$name.xml"
  check "$name: the window showed \"$demo_label\"" \
    grep -qF "label=\"$demo_label\"" "$WORK/$name.xml"
  # A resource, icon or file the window cannot find shows up as a GLib
  # warning or critical, or as the program's own message, on stderr (the
  # session bus and the X server say other things there).
  if [ "$(grep -Ec "$GUI_PROBLEM_RE" "$WORK/$name.err")" -eq 0 ]; then
    pass
  else
    fail "$name: warnings or criticals from the window"
    show "$name"
  fi
}

demo_label=$(sed -n 's/.*<case label="\([^"]*\)".*/\1/p' "$EXAMPLES/demo.hlplan")
if [ ! -x "$GUI" ]; then
  skip "no installed hiplever window program"
elif ! command -v xvfb-run >/dev/null 2>&1 || ! command -v dbus-run-session >/dev/null 2>&1; then
  skip "xvfb-run or dbus-run-session missing: the window"
else
  check "the demo plan has a case label" test -n "$demo_label"
  run gui-version env -u DISPLAY -u WAYLAND_DISPLAY "$GUI" --version
  check "hiplever --version exits 0" test "$rc" -eq 0
  check "hiplever --version names $VERSION" grep -q "^hiplever $VERSION\b" "$WORK/gui-version.out"
  run gui-help env -u DISPLAY -u WAYLAND_DISPLAY "$GUI" --help
  check "hiplever --help exits 0" test "$rc" -eq 0
  man_options_checks hiplever.1 "$WORK/gui-help.out"
  gui_screenshot shot-file "$EXAMPLES/demo.hlplan"
  # With no file the window opens the bundled demo, which it can only
  # have found under the prefix: the source tree is gone.
  gui_screenshot shot-demo
fi

finish
