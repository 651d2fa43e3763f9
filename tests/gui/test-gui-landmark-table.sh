#!/bin/sh
# The landmark table fits its columns at the window's default size in
# English and in German: every cell and column title gets at least its
# natural width, none reaches past the right edge of the table, and each
# title stands over its column.
#
# Copyright 2026 the hiplever developers
# SPDX-License-Identifier: GPL-3.0-or-later
#
# Usage: test-gui-landmark-table.sh HIPLEVER SOURCE_DIR HIPLEVER_CLI BUILD_LOCALEDIR
#
# HIPLEVER_TEST_PRINT_HANDLES=1 prints "LMTABLE COLUMN SHORT OVER SHIFT" for
# the columns name, x, y and placed (hl-landmarks-page.c): the most a cell
# lacks of its natural width, the most it reaches past the table's right
# edge (px, <= 0 fits) and how far the title is off its column.  No
# computation is checked.
. "$(dirname "$0")/hl-gui-lib.sh"
export HIPLEVER_LOCALEDIR=$2

check_columns () {
  lang=$1
  n=$(grep -c '^FRAME ' "$HL_OUT")
  awk -v n="$n" '/^FRAME / { f++; next } f == n - 1 && $1 == "LMTABLE"' "$HL_OUT" >"$HL_TMP/cols"
  for col in name x y placed; do
    set -- $(awk -v c="$col" '$2 == c { print $3, $4, $5 }' "$HL_TMP/cols")
    [ $# -eq 3 ] || hl_fail "$lang: no figures for the $col column"
    hl_expect "$lang: $col column, most lacking of natural width (px)" "$1" "<=" 0
    hl_expect "$lang: $col column, most past the right edge (px)" "$2" "<=" 0
    hl_expect "$lang: $col title off its column (px)" "$3" "<=" 1
  done
}

hl_start table-en --panel landmarks "$HL_DEMO"
check_columns English
hl_grab landmark-table-en
hl_quit_discarding

if locale -a 2>/dev/null | grep -qi '^de_DE\.utf-\?8$'; then
  LC_ALL=de_DE.UTF-8
  export LC_ALL
  hl_start table-de --panel landmarks "$HL_DEMO"
  grep -q '^WIDGET page-landmarks ' "$HL_OUT" || hl_fail "no landmarks page in German"
  check_columns German
  hl_grab landmark-table-de
  hl_quit_discarding
  LC_ALL=C
  export LC_ALL
else
  hl_note "the de_DE.UTF-8 locale is not generated (tests/bootstrap.sh does it): German not checked"
fi
echo "PASS"
