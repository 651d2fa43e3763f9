#!/bin/sh
# Switch the cane on in the side panel: the joint reaction force falls.
#
# Copyright 2026 the hiplever developers
# SPDX-License-Identifier: GPL-3.0-or-later
#
# A cane in the contralateral hand pushes up on the body far from the hip
# and so takes moment off the abductors (Neumann 1998, Phys Ther
# 78:490-501: less abductor activity with a contralateral cane; Brand and
# Crowninshield 1980, Clin Orthop 147:181-184).
. "$(dirname "$0")/hl-gui-lib.sh"

plan="$HL_TMP/no-cane.hlplan"
sed 's/<cane enabled="true"/<cane enabled="false"/' "$HL_DEMO" >"$plan"
grep -q '<cane enabled="false"' "$plan" || hl_fail "could not make a plan without the cane"
"$HIPLEVER" --print-results --dump-summary-on-exit "$HL_TMP/base.xml" "$plan" >/dev/null \
  || hl_fail "the baseline run failed"

hl_start cane --dump-summary-on-exit "$HL_TMP/cane.xml" "$plan"
hl_click page-aids
hl_settle
hl_click cane-check
hl_settle
hl_grab cane-on
hl_quit_discarding

on=$(xmllint --xpath "string(//*[local-name()='cane']/@enabled)" "$HL_TMP/cane.xml")
[ "$on" = "true" ] || hl_fail "the cane is not on in the summary"
n=$(xmllint --xpath "count(//*[local-name()='result'])" "$HL_TMP/cane.xml")
i=1
while [ "$i" -le "$n" ]; do
  before=$(hl_result "$HL_TMP/base.xml" "position()=$i" joint-force-n)
  after=$(hl_result "$HL_TMP/cane.xml" "position()=$i" joint-force-n)
  hl_expect "joint reaction force, column $i" "$after" "<" "$before"
  i=$((i + 1))
done

# A cane in the hand on the operated side: the Aids page says that the
# other hand helps more (Neumann 1998, Phys Ther 78:490-501); the demo's
# cane in the opposite hand gets no such note.
sed 's/hand="contralateral" unit="percent-bw"/hand="ipsilateral" unit="percent-bw"/' \
  "$HL_DEMO" >"$HL_TMP/ipsi.hlplan"
grep -q 'hand="ipsilateral" unit="percent-bw"' "$HL_TMP/ipsi.hlplan" \
  || hl_fail "could not move the demo's cane to the same-side hand"
for plan in ipsi demo; do
  file="$HL_TMP/ipsi.hlplan"
  [ "$plan" = demo ] && file=$HL_DEMO
  HIPLEVER_TEST_PRINT_LABELS=1 "$HIPLEVER" --screenshot "$HL_TMP/aids-$plan.png" --panel aids \
    "$file" >"$HL_TMP/aids-$plan.labels" 2>"$HL_TMP/aids-$plan.err" \
    || hl_fail "the --screenshot run of the $plan plan failed"
done
grep -q '^LABEL The cane is in the hand on the operated side: held in the other hand it helps the hip more.*Neumann 1998' \
  "$HL_TMP/aids-ipsi.labels" || hl_fail "no same-side cane note on the Aids page"
! grep -q 'held in the other hand' "$HL_TMP/aids-demo.labels" \
  || hl_fail "a cane in the opposite hand gets the same-side note"
hl_note "ok: the Aids page notes a same-side cane (Neumann 1998), not an opposite one"
echo "PASS"
