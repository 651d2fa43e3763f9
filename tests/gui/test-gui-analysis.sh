#!/bin/sh
# The analysis in the window: the 5-95% ranges of the results table agree
# with hiplever-cli uncertainty; the charts view is drawn and follows the
# chart chosen; an inverse answer applied with the mouse and with the
# keyboard changes the option as the CLI's answer says and is one undo
# step; a capacity preset is one edit; the report, the figure, the sweep
# table and the print carry the caution; a file that cannot be written
# gives a dialog.
#
# Copyright 2026 the hiplever developers
# SPDX-License-Identifier: GPL-3.0-or-later
. "$(dirname "$0")/hl-gui-lib.sh"
CLI=$1

# The demo with its first option 6 mm less lateral, so that applying the
# answer moves its abductor arm by millimetres.
plan="$HL_TMP/case.hlplan"
sed '0,/femoral-offset-mm="0"/s//femoral-offset-mm="-6"/' "$HL_DEMO" >"$plan"
grep -q 'name="Standard stem".*femoral-offset-mm="-6"' "$plan" || hl_fail "could not move the first option"

# ---- the ranges --------------------------------------------------------
"$HIPLEVER" --print-results "$plan" >"$HL_TMP/window.csv" || hl_fail "--print-results failed"
"$CLI" uncertainty "$plan" --csv >"$HL_TMP/mc.csv" || hl_fail "hiplever-cli uncertainty failed"
python3 - "$HL_TMP/window.csv" "$HL_TMP/mc.csv" <<'PY' || hl_fail "the ranges of the window and the CLI disagree"
import csv, sys

# window row -> CLI column (the CLI's 4 decimals against the window's 2)
COLUMNS = {
    "abductor-force-bw-p05": "abductor_force_BW_p05",
    "abductor-force-bw-p95": "abductor_force_BW_p95",
    "joint-reaction-force-bw-p05": "jrf_BW_p05",
    "joint-reaction-force-bw-p95": "jrf_BW_p95",
}
FLOAT_SLACK = 1e-9

def half_unit(text):
    digits = len(text.split(".")[1]) if "." in text else 0
    return 0.5 * 10.0 ** -digits

win = {r[0]: r[2:] for r in csv.reader(open(sys.argv[1]))}
cli = list(csv.DictReader(open(sys.argv[2])))
checked = 0
for key, column in COLUMNS.items():
    if key not in win:
        sys.exit("the window prints no %s row" % key)
    for j, cell in enumerate(win[key]):
        ref = cli[j][column]
        tol = half_unit(cell) + half_unit(ref) + FLOAT_SLACK
        if abs(float(cell) - float(ref)) > tol:
            sys.exit("%s %s: window %s, CLI %s" % (cli[j]["option"], key, cell, ref))
        checked += 1
# Each figure lies inside its own range.
for figure, low, high in (("abductor-force-bw", "abductor-force-bw-p05", "abductor-force-bw-p95"),
                          ("joint-reaction-force-bw", "joint-reaction-force-bw-p05",
                           "joint-reaction-force-bw-p95")):
    for j, cell in enumerate(win[figure]):
        if not float(win[low][j]) <= float(cell) <= float(win[high][j]):
            sys.exit("%s of column %d, %s, outside %s-%s" % (figure, j, cell, win[low][j], win[high][j]))
        checked += 1
shares = win["lower-jrf-than-native"]
if shares[0] != "":
    sys.exit("native has a share against itself: %r" % shares[0])
for j, cell in enumerate(shares[1:], start=1):
    ref = 100.0 * float(cli[j]["share_lower_jrf_than_native"])
    if abs(float(cell) - ref) > 0.5 + FLOAT_SLACK:
        sys.exit("%s share: window %s%%, CLI %.2f%%" % (cli[j]["option"], cell, ref))
    checked += 1
print("# ok: %d range figures agree with hiplever-cli uncertainty" % checked)
PY

# The answers the window must apply, from the command line.
"$CLI" inverse "$plan" --format csv >"$HL_TMP/inverse.csv" || hl_fail "hiplever-cli inverse failed"
answer=$(awk -F, '$1 == "Standard stem" && $2 == "offset-for-arm" && $4 == "ok" { print $5 }' "$HL_TMP/inverse.csv")
[ -n "$answer" ] || hl_fail "the CLI has no offset-for-arm answer for the first option"
hl_note "the CLI's femoral offset change restoring the native arm: $answer mm"

# hl_last KIND NAME FIELD: a field of the last printed line of that kind.
hl_last () {
  awk -v k="$1" -v n="$2" -v f="$3" '$1 == k && $2 == n { v = $f } END { print v }' "$HL_OUT"
}

# ---- the charts, then Apply with the mouse, a preset, the exports -------
export HIPLEVER_TEST_PRINT_TO="$HL_TMP/printed.pdf"
hl_start applied --dump-summary-on-exit "$HL_TMP/applied.xml" "$plan"
hl_key alt+2
hl_settle
# The exports draw the radiograph the window shows, from memory: with the
# file gone after it was loaded, the report, the figure and the print
# still carry it (checked below).
mv "$HL_TMP/demo-radiograph.png" "$HL_TMP/demo-radiograph.moved.png"
set -- $(awk '$1 == "AREA" && $2 == "charts-view" { x = $3; y = $4; w = $5; h = $6 } END { print x, y, w, h }' "$HL_OUT")
[ $# -eq 4 ] || hl_fail "Alt+2 did not show the charts"
hl_grab charts
sd=$(convert "$HL_TMP/charts.png" -crop "${3}x${4}+${1}+${2}" +repage -colorspace Gray \
       -format '%[fx:standard_deviation]' info:)
hl_expect "the charts area is drawn (pixel spread)" "$sd" ">" "$HL_MIN_STDDEV"
kind=$(awk '$1 == "CHARTS" { k = $2; s = $4 } END { print k, s }' "$HL_OUT")
[ "$kind" = "0 ok" ] || hl_fail "the charts show '$kind', expected the femoral offset chart, solved"
runs=$(awk '$1 == "CHARTS" { n = $3 } END { print n }' "$HL_OUT")
# The cane chart: the dropdown, one step down.
hl_click chart-kind
sleep 0.5
hl_key Down Return
hl_settle
kind=$(awk '$1 == "CHARTS" { k = $2; n = $3; s = $4 } END { print k, s }' "$HL_OUT")
[ "$kind" = "1 ok" ] || hl_fail "the dropdown shows chart '$kind', expected the cane chart, solved"
runs2=$(awk '$1 == "CHARTS" { n = $3 } END { print n }' "$HL_OUT")
hl_expect "the core ran again for the new chart" "$runs2" ">" "$runs"
hl_grab charts-cane

hl_click page-analysis
hl_settle
hl_grab analysis-page
[ "$(hl_last ANSWER offset-for-arm 5)" = "1" ] || hl_fail "the offset-for-arm answer cannot be applied"
hl_click apply-offset-for-arm
hl_settle
[ "$(hl_last ANSWER offset-for-arm 5)" = "0" ] || hl_fail "after Apply the answer is not in the plan"
runs3=$(awk '$1 == "CHARTS" { n = $3 } END { print n }' "$HL_OUT")
hl_note "ok: the answer was applied; the charts ran the core $runs2 -> $runs3 times"

# The capacity preset, further down the page: one step down from young
# women (the plan's 1.13).
set -- $(hl_pos WIDGET apply-offset-for-global)
xdotool mousemove --window "$HL_WID" "$1" "$2"
sleep 0.3
xdotool click --repeat 15 --delay 30 5
hl_settle
# The list opens below the dropdown, one row per preset (rows of about
# 32 px under Adwaita; the third, "Before surgery", is clicked).
hl_click capacity-preset
sleep 0.8
set -- $(hl_pos WIDGET capacity-preset)
xdotool mousemove --window "$HL_WID" "$1" $(($2 + 111)) click 1
hl_settle
hl_grab capacity-preset

# Ctrl+Shift+E exports the report, Ctrl+P prints it (to a file here).
# The save chooser selects the suggested name up to its extension, so a
# path typed over it keeps the suggested extension; Ctrl+A first replaces
# it all.
choose () {
  sleep 1
  xdotool type --delay 20 "$1"
  sleep 0.3
  hl_key Return
  sleep 1.5
}
hl_key ctrl+shift+e
choose "$HL_TMP/report"
hl_key ctrl+p
sleep 2
# The menu (F10) has the figure and the sweeps under their mnemonics.
hl_key F10
sleep 0.5
hl_key i
sleep 1
hl_grab figure-dialog
hl_key Return
sleep 1
hl_key ctrl+a
choose "$HL_TMP/figure.svg"
# The dialog's presets are the command line's: a slide with the plan's
# radiograph under it, then a half slide with the check box cleared
# (Alt+S the size, Alt+R the radiograph, Alt+F accepts).  The size list
# opens on its first row; figure_preset KEYS... moves down to the preset.
figure_preset () {
  hl_key F10
  sleep 0.5
  hl_key i
  sleep 1
  hl_key alt+s
  sleep 0.3
  hl_key space
  sleep 0.8
  hl_key "$@" Return
  sleep 0.5
}
figure_preset Down
hl_grab figure-dialog-slide
hl_key alt+f
sleep 1
hl_key ctrl+a
choose "$HL_TMP/slide.svg"
figure_preset Down Down
hl_key alt+r
sleep 0.3
hl_grab figure-dialog-half-slide
hl_key alt+f
sleep 1
hl_key ctrl+a
choose "$HL_TMP/half-slide.svg"
hl_key F10
sleep 0.5
hl_key w
sleep 1
hl_grab sweeps-chooser
choose "$HL_TMP/sweeps"
# A file that cannot be written: a dialog says so, and the window stays.
hl_key ctrl+shift+e
choose "/proc/report"
timeout "$HL_WAIT_S" xdotool search --sync --onlyvisible --name '^Error$' >/dev/null \
  || hl_fail "no error dialog for a report that cannot be written"
hl_grab export-error
hl_key Return
sleep 0.5
kill -0 "$HL_PID" 2>/dev/null || hl_fail "the program ended after a failed export"
hl_quit_discarding

offset=$(xmllint --xpath "string(//*[local-name()='options']/*[local-name()='option'][1]/@femoral-offset-mm)" "$HL_TMP/applied.xml")
HL_TOL=2e-6
hl_expect "the first option's femoral offset change is the CLI's answer" "$offset" "~" "$answer"
native_arm=$(hl_result "$HL_TMP/applied.xml" "@kind='native'" abductor-arm-mm)
arm=$(hl_result "$HL_TMP/applied.xml" "@kind='option' and @option-index='0'" abductor-arm-mm)
HL_TOL=0.01
hl_expect "its abductor moment arm equals native's" "$arm" "~" "$native_arm"
torque=$(xmllint --xpath "string(//*[local-name()='capacity']/@torque-nm-per-kg)" "$HL_TMP/applied.xml")
HL_TOL=1e-9
hl_expect "the capacity preset below young women (before surgery, 1.13 x 0.82)" "$torque" "~" 0.9266

# Two pages or more: pages are added when the content needs them.
report_pages=$(pdfinfo "$HL_TMP/report.pdf" | awk '/^Pages:/ { print $2 }')
[ "${report_pages:-0}" -ge 2 ] \
  || hl_fail "the report (.pdf added) has fewer than two pages (${report_pages:-none})"
pdftotext "$HL_TMP/report.pdf" - | tr '\n' ' ' >"$HL_TMP/report.txt"
grep -q "Planning aid only" "$HL_TMP/report.txt" || hl_fail "the report has no caution"
grep -q "Demo case A" "$HL_TMP/report.txt" || hl_fail "the report does not name the case"
grep -q "Page $report_pages of $report_pages" "$HL_TMP/report.txt" \
  || hl_fail "the report's last page does not say Page $report_pages of $report_pages"
hl_note "ok: Ctrl+Shift+E wrote a report of $report_pages pages with the caution"
[ "$(pdfinfo "$HL_TMP/printed.pdf" | awk '/^Pages:/ { print $2 }')" = "$report_pages" ] \
  || hl_fail "Ctrl+P printed not the report's $report_pages pages"
pdfinfo "$HL_TMP/printed.pdf" | grep -q 'Page size:.*(A4)' \
  || hl_fail "the print is not on A4: $(pdfinfo "$HL_TMP/printed.pdf" | grep 'Page size')"
pdftotext "$HL_TMP/printed.pdf" - | tr '\n' ' ' | grep -q "Planning aid only" \
  || hl_fail "the print has no caution"
hl_note "ok: Ctrl+P printed the report's $report_pages A4 pages with the caution"
# The plan has a radiograph: the report and the print carry it under the
# schematic (the chooser's choice and print default to it), the window's
# own copy, its file having been moved away after it was loaded.
for pdf in report printed; do
  n=$(pdfimages -list "$HL_TMP/$pdf.pdf" 2>/dev/null | tail -n +3 | wc -l)
  [ "$n" -ge 1 ] || hl_fail "the $pdf PDF does not carry the radiograph (no image in it)"
done
hl_note "ok: the report and the print carry the radiograph"
xmllint --noout "$HL_TMP/figure.svg" || hl_fail "the figure is not a well-formed SVG"
grep -q 'width="1600pt"' "$HL_TMP/figure.svg" || hl_fail "the figure is not 1600 wide: $(head -c 300 "$HL_TMP/figure.svg")"
hl_note "ok: the figure is an SVG of the default size"
grep -q 'width="1920pt" height="1080pt"' "$HL_TMP/slide.svg" \
  || hl_fail "the slide preset is not 1920 x 1080: $(head -c 300 "$HL_TMP/slide.svg")"
grep -q '<image' "$HL_TMP/slide.svg" || hl_fail "the slide does not carry the radiograph"
grep -q 'width="960pt" height="1080pt"' "$HL_TMP/half-slide.svg" \
  || hl_fail "the half-slide preset is not 960 x 1080: $(head -c 300 "$HL_TMP/half-slide.svg")"
grep -q '<image' "$HL_TMP/half-slide.svg" && hl_fail "the half slide carries the radiograph with the box cleared"
hl_note "ok: the dialog's slide (with the radiograph) and half slide (without) are the CLI's sizes"
head -n 1 "$HL_TMP/sweeps.csv" | grep -q '^# hiplever' || hl_fail "the sweep table does not start with a comment"
grep -q '^# Planning aid only' "$HL_TMP/sweeps.csv" || hl_fail "the sweep table has no caution"
grep -q '^param,value,option,' "$HL_TMP/sweeps.csv" || hl_fail "the sweep table has no header"
n=$(grep -c '^femoral_offset_mm,' "$HL_TMP/sweeps.csv")
hl_expect "rows of the femoral offset sweep (.csv added)" "$n" ">" 0
hl_note "ok: the sweep table carries the caution as # lines"

# ---- Apply with the keyboard, then undo ----------------------------------
unset HIPLEVER_TEST_PRINT_TO
hl_start undone --panel analysis --dump-summary-on-exit "$HL_TMP/undone.xml" "$plan"
hl_click analysis-target
hl_key Tab
sleep 0.3
hl_key space
hl_settle
[ "$(hl_last ANSWER offset-for-arm 5)" = "0" ] || hl_fail "Tab and Space from the target did not apply the answer"
hl_note "ok: applied with the keyboard"
hl_key ctrl+z
hl_settle
[ "$(hl_last ANSWER offset-for-arm 5)" = "1" ] || hl_fail "after Ctrl+Z the answer is still in the plan"
hl_grab undone
# Without the test hook Ctrl+P shows the print dialog; Escape cancels it.
hl_key ctrl+p
hl_wait_dialog Print
hl_grab print-dialog
hl_key Escape
sleep 0.5
kill -0 "$HL_PID" 2>/dev/null || hl_fail "the program ended after the print dialog was cancelled"
hl_note "ok: the print dialog came and went"
hl_quit_discarding
offset=$(xmllint --xpath "string(//*[local-name()='options']/*[local-name()='option'][1]/@femoral-offset-mm)" "$HL_TMP/undone.xml")
HL_TOL=1e-9
hl_expect "Ctrl+Z restored the first option's femoral offset change" "$offset" "~" -6
arm=$(hl_result "$HL_TMP/undone.xml" "@kind='option' and @option-index='0'" abductor-arm-mm)
native_arm=$(hl_result "$HL_TMP/undone.xml" "@kind='native'" abductor-arm-mm)
HL_TOL=1
if hl_cmp "$arm" "~" "$native_arm"; then
  hl_fail "after undo the arm still equals native's ($arm)"
fi
hl_note "ok: after undo the arm is $arm mm again (native $native_arm mm)"

# ---- a plan that cannot be solved ----------------------------------------
# No answers and no charts, each saying why; nothing to apply.
bad="$HL_TMP/midline-lateral.hlplan"
sed 's|<landmark name="midline" x-mm="0"|<landmark name="midline" x-mm="-130"|' "$HL_DEMO" >"$bad"
grep -q 'x-mm="-130"' "$bad" || hl_fail "could not move the midline"
hl_start unsolvable --panel analysis "$bad"
hl_key alt+2
hl_settle
hl_grab unsolvable
state=$(awk '$1 == "CHARTS" { s = $4 } END { print s }' "$HL_OUT")
[ "$state" = "error" ] || hl_fail "the charts of an unsolvable plan say '$state'"
n=$(awk '$1 == "ANSWER" { last[$2] = $3 " " $5 } END { for (k in last) if (last[k] != "none 0") n++; print n + 0 }' "$HL_OUT")
hl_expect "answers or Apply buttons for an unsolvable plan" "$n" "~" 0
# Printing it: a dialog says why there is no report.
hl_key ctrl+p
hl_wait_dialog Error
hl_grab print-error
hl_key Return
sleep 0.5
kill -0 "$HL_PID" 2>/dev/null || hl_fail "the program ended after a print that could not be made"
hl_key ctrl+q
hl_wait_exit
hl_note "ok: an unsolvable plan gives no answers and no charts, and the window quits cleanly"
echo "PASS"
