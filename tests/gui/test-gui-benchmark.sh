#!/bin/sh
# --benchmark-drag runs and prints its figures (the targets are for people
# to read; machines differ too much to fail on them).
#
# Copyright 2026 the hiplever developers
# SPDX-License-Identifier: GPL-3.0-or-later
. "$(dirname "$0")/hl-gui-lib.sh"

"$HIPLEVER" --benchmark-drag >"$HL_TMP/bench.txt" 2>"$HL_TMP/bench.err" \
  || { cat "$HL_TMP/bench.err" >&2; hl_fail "--benchmark-drag failed"; }
cat "$HL_TMP/bench.txt"
num='[0-9][0-9]*\.[0-9][0-9]*'
grep -q "^benchmark-drag: 200 frames, 4 options" "$HL_TMP/bench.txt" || hl_fail "no header line"
grep -q "^frame interval: median $num ms, p95 $num ms" "$HL_TMP/bench.txt" || hl_fail "no frame interval"
grep -q "^frame time .*median $num ms, p95 $num ms" "$HL_TMP/bench.txt" || hl_fail "no frame time"
grep -q "^frame CPU time .*median $num ms, p95 $num ms" "$HL_TMP/bench.txt" || hl_fail "no frame CPU time"
grep -q "^startup to first frame: $num s" "$HL_TMP/bench.txt" || hl_fail "no startup time"
grep -q "^resident memory: $num MB" "$HL_TMP/bench.txt" || hl_fail "no resident memory"
echo "PASS"
