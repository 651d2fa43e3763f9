#!/usr/bin/env bash
# test-potfiles.sh: po/POTFILES lists exactly the files with translatable
# strings.
#
# Copyright 2026 the hiplever developers
# SPDX-License-Identifier: GPL-3.0-or-later
#
# Usage: test-potfiles.sh SOURCE_DIR
#
# Every source, template, desktop and metainfo file from which xgettext
# (with the keywords of meson's glib preset) extracts a string must be
# listed, and every listed file must exist and hold at least one string.
# Prints one line per problem and, last, "potfiles: N files checked, M
# problems"; exits non-zero on any problem.
set -u
export LC_ALL=C TZ=UTC

if [ $# -ne 1 ]; then
  echo "usage: $0 SOURCE_DIR" >&2
  exit 2
fi
SRC=$1
POTFILES=$SRC/po/POTFILES

if ! command -v xgettext >/dev/null 2>&1; then
  echo "xgettext not installed (gettext)"
  exit 77
fi

# The keywords meson's i18n.gettext(preset: 'glib') passes, plus the C
# library's ngettext that xgettext knows by itself.
KEYWORDS=(--keyword=_ --keyword=N_ --keyword=C_:1c,2 --keyword=NC_:1c,2
          --keyword=g_dcgettext:2 --keyword=g_dngettext:2,3
          --keyword=g_dpgettext2:2c,3)

checked=0
problems=0
problem () { problems=$((problems + 1)); echo "POTFILES: $*"; }

# n_strings FILE: how many messages xgettext finds in FILE.
n_strings () {
  (cd "$SRC" && xgettext --from-code=UTF-8 "${KEYWORDS[@]}" -o - "$1" 2>/dev/null) \
    | grep -c '^msgid ' | awk '{ print ($1 > 0 ? $1 - 1 : 0) }'
}

listed=()
while read -r line; do
  case "$line" in
    ''|'#'*) continue ;;
  esac
  listed+=("$line")
done <"$POTFILES"

is_listed () {
  local f
  for f in "${listed[@]}"; do
    [ "$f" = "$1" ] && return 0
  done
  return 1
}

for f in "${listed[@]}"; do
  checked=$((checked + 1))
  if [ ! -f "$SRC/$f" ]; then
    problem "$f is listed but does not exist"
  elif [ "$(n_strings "$f")" -eq 0 ]; then
    problem "$f is listed but has no translatable strings"
  fi
done

shopt -s nullglob
cd "$SRC" || exit 1
for f in core/*.c app/*.c ui/*.c ui/*.ui ui/gtk/*.ui data/*.desktop.in data/*.metainfo.xml.in; do
  is_listed "$f" && continue
  checked=$((checked + 1))
  n=$(n_strings "$f")
  if [ "$n" -gt 0 ]; then
    problem "$f has $n translatable strings but is not listed"
  fi
done

echo "potfiles: $checked files checked, $problems problems"
[ "$problems" -eq 0 ]
