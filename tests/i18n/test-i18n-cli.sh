#!/usr/bin/env bash
# test-i18n-cli.sh: the German catalogue, built, as hiplever-cli shows it.
#
# Copyright 2026 the hiplever developers
# SPDX-License-Identifier: GPL-3.0-or-later
#
# Usage: test-i18n-cli.sh HIPLEVER_CLI SOURCE_DIR BUILD_LOCALEDIR
#
# Checks that po/de.po is complete and consistent (msgfmt --check: the
# format specifiers of every message match), that hiplever-cli --help in
# de_DE.UTF-8 comes from the built catalogue and still lists every option
# the C-locale help lists, and that the caution is shown in German.
set -u
export TZ=UTC

CLI=$1
SRC=$2
LOCALEDIR=$3
failures=0
fail () { failures=$((failures + 1)); echo "FAIL: $*"; }

if ! locale -a 2>/dev/null | grep -qi '^de_DE\.utf-\?8$'; then
  echo "the de_DE.UTF-8 locale is not generated (tests/bootstrap.sh does it)"
  exit 77
fi
[ -f "$LOCALEDIR/de/LC_MESSAGES/hiplever.mo" ] \
  || { echo "FAIL: no built catalogue in $LOCALEDIR"; exit 1; }

# Every message translated, none fuzzy, specifiers as in the original.
stats=$(LC_ALL=C msgfmt --check --statistics -o /dev/null "$SRC/po/de.po" 2>&1) \
  || fail "msgfmt --check rejects po/de.po: $stats"
case $stats in
  *untranslated*|*fuzzy*) fail "po/de.po is incomplete: $stats" ;;
esac

export HIPLEVER_LOCALEDIR=$LOCALEDIR
help_c=$(LC_ALL=C "$CLI" --help) || fail "--help fails in the C locale"
help_de=$(LC_ALL=de_DE.UTF-8 "$CLI" --help) || fail "--help fails in German"

for heading in 'Aufruf:' 'Unterbefehle:' 'Optionen:' 'Exit-Status:'; do
  grep -qF -- "$heading" <<<"$help_de" || fail "German --help lacks '$heading'"
done
grep -qF 'Subcommands:' <<<"$help_de" && fail "German --help still says 'Subcommands:'"
grep -qF 'Subcommands:' <<<"$help_c" || fail "C-locale --help lacks 'Subcommands:'"

# The options are not translated: each one the C help names is still there.
options=$(grep -oE -- '--[a-z][a-z0-9-]+' <<<"$help_c" | sort -u)
[ -n "$options" ] || fail "no options found in the C-locale --help"
for opt in $options; do
  grep -qF -- "$opt" <<<"$help_de" || fail "German --help lacks $opt"
done

# The caution, complete, in German, in the text output.
solve_de=$(LC_ALL=de_DE.UTF-8 "$CLI" solve "$SRC/data/examples/demo.hlplan") \
  || fail "solve fails in German"
for part in 'Warnhinweis:' 'Nur eine Planungshilfe' 'ersetzt nicht die chirurgische Urteilskraft' \
            'Befolgen Sie die örtlichen Protokolle und die zugelassene klinische Praxis.'; do
  grep -qF -- "$part" <<<"$solve_de" || fail "German solve output lacks '$part'"
done

# One name for the body-weight lever arm, and the German body-weight unit
# KGW (Körpergewicht), never a bare "KG", which reads as kilograms.
if grep -nE '(^|[^[:alpha:]])KG([^[:alpha:]]|$)' "$SRC/po/de.po"; then
  fail "po/de.po writes the body-weight unit as KG (kilograms?), not KGW"
fi
for id in 'Body-weight lever arm (mm)' 'Body-weight lever arm' 'lever arm %.1f mm'; do
  msggrep --msgid -F -e "$id" "$SRC/po/de.po" | grep -q '^msgstr "Körpergewichtshebelarm' \
    || fail "'$id' is not 'Körpergewichtshebelarm' in German"
done
unc_de=$(LC_ALL=de_DE.UTF-8 "$CLI" uncertainty "$SRC/data/examples/demo.hlplan" --samples 200) \
  || fail "uncertainty fails in German"
grep -qF '(xKGW)' <<<"$unc_de" || fail "German uncertainty output lacks the unit xKGW"
# The native row's name is German in the text tables (uncertainty, sweep);
# the CSV keeps "native", its contract.
grep -qE '^nativ ' <<<"$unc_de" || fail "German uncertainty output lacks the row 'nativ'"
grep -qE '^native ' <<<"$unc_de" && fail "German uncertainty output has the row 'native'"
sweep_de=$(LC_ALL=de_DE.UTF-8 "$CLI" sweep "$SRC/data/examples/demo.hlplan" \
             --param lean_mm --from 0 --to 10 --steps 2) || fail "sweep fails in German"
grep -qE '^ *[0-9]+  nativ ' <<<"$sweep_de" || fail "German sweep output lacks the row 'nativ'"
grep -qE '  native ' <<<"$sweep_de" && fail "German sweep output has the row 'native'"
unc_csv_de=$(LC_ALL=de_DE.UTF-8 "$CLI" uncertainty "$SRC/data/examples/demo.hlplan" \
               --samples 200 --csv) || fail "uncertainty --csv fails in German"
grep -qE '^native,' <<<"$unc_csv_de" || fail "German uncertainty CSV lost the row 'native'"

# An unknown option is reported in German, with the usage exit status.
LC_ALL=de_DE.UTF-8 "$CLI" solve --no-such-option x >/dev/null 2>"${TMPDIR:-/tmp}/hl-i18n-err.$$"
rc=$?
[ "$rc" -eq 2 ] || fail "an unknown option exits with $rc, not 2"
grep -qF 'unbekannte Option' "${TMPDIR:-/tmp}/hl-i18n-err.$$" \
  || fail "the unknown-option message is not German: $(cat "${TMPDIR:-/tmp}/hl-i18n-err.$$")"
rm -f "${TMPDIR:-/tmp}/hl-i18n-err.$$"

echo "i18n-cli: $(wc -l <<<"$options") options checked, $failures failures"
[ "$failures" -eq 0 ]
