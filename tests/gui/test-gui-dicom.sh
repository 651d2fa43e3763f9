#!/bin/sh
# test-gui-dicom.sh: a DICOM radiograph in the window.
#
# Copyright 2026 the hiplever developers
# SPDX-License-Identifier: GPL-3.0-or-later
#
# An invented 16-bit MONOCHROME1 DICOM file (tests/make-dicom.py) with
# detector spacing 0.15 mm, magnification factor 1.25, a window preset,
# Burned In Annotation YES and invented identifying elements, saved
# without an extension, is imported: its calibration comes from the file
# (0.12 plan mm a pixel, M 1.25), its window preset is shown turned over
# with the pixels.  A right-button drag and Page Up change the window by
# the amounts the page promises; the hip centre is placed with the guided
# placement.  The summary, the autosave, the settings, the
# program's output, the PDF report and the SVG figure hold none of the
# identifying elements.
#
# Usage: test-gui-dicom.sh HIPLEVER SOURCE_DIR CLI
. "$(dirname "$0")/hl-gui-lib.sh"
CLI=$1

SPACING_MM=0.15
ERMF=1.25
WANT_K=0.12               # 0.15 / 1.25, worked by hand
TOL_K=1e-6
DISC_U=400
DISC_V=300
# The file's preset 30000 / 20000 over MONOCHROME1 values: centre
# 65535 - 30000 = 35535 held (turned over), width 20000.
PRESET_C=35535
PRESET_W=20000
DRAG_DX=100
DRAG_DY=50
# 65535 / 500 per pixel of drag, 2% of 65535 per Page Up (hl-radiograph-page.c).
PER_PX=131.07
KEY_STEP=1310.7
WINDOW_TOL=1
LANDMARK_TOL_PX=0.5
GUIDED_OFFSET_PX=3

dcm="$HL_TMP/image"
python3 "$SRCDIR/tests/make-dicom.py" "$dcm" --rows 600 --cols 800 --bits 16 \
  --photometric MONOCHROME1 --disc "$DISC_U,$DISC_V" --radius 40 \
  --imager-spacing "$SPACING_MM\\$SPACING_MM" --ermf "$ERMF" --window 30000,20000 \
  --burned-in YES || hl_fail "could not write the DICOM file"
plan="$HL_TMP/case.hlplan"
# The demo without its marker calibration (a marker placed by the user
# would come before the file's calibration) and without its own radiograph
# (the first RADIOGRAPH line below must be the imported file's).
sed -e '/<calibration/,/<\/calibration>/d' -e '/<radiograph /d' "$HL_DEMO" >"$plan"
grep -q '<calibration' "$plan" && hl_fail "the calibration was not taken out of the demo"
grep -q '<radiograph ' "$plan" && hl_fail "the radiograph was not taken out of the demo"

HIPLEVER_TEST_UNDERLAY="$dcm" HIPLEVER_AUTOSAVE_SECONDS=1
export HIPLEVER_TEST_UNDERLAY HIPLEVER_AUTOSAVE_SECONDS
hl_start dicom --panel case --dump-summary-on-exit "$HL_TMP/dicom.xml" "$plan"
i=0
until grep -q '^RADIOGRAPH ' "$HL_OUT"; do
  i=$((i + 1))
  [ "$i" -le $((HL_WAIT_S * 10)) ] || hl_fail "the DICOM image was not imported"
  sleep 0.1
done
sleep 0.5
hl_mark

last () { awk -v k="$1" '$1 == k { line = $0 } END { print line }' "$HL_OUT"; }
set -- $(last RADIOGRAPH)
OX=$2 OY=$3 K=$4 M0=$5
HL_TOL=$TOL_K
hl_expect "plan mm per pixel from the file" "$K" "~" "$WANT_K"
HL_TOL=1e-9
hl_expect "magnification from the file" "$M0" "~" "$ERMF"

hl_click page-radiograph
hl_settle
hl_grab dicom-imported

# The hip centre, with the guided placement, a few pixels from where it
# was (a far move would take the demo's templated option out of range).
hl_mark
hl_click radiograph-guide
hl_settle
set -- $(hl_pos HANDLE hip-centre)
hip_sx=$(($1 + GUIDED_OFFSET_PX)) hip_sy=$(($2 + GUIDED_OFFSET_PX))
set -- $(last VIEW)
hip_x=$(awk -v sx="$hip_sx" -v s="$2" -v tx="$3" -v x0="$5" 'BEGIN { printf "%.9f", (sx - x0 - tx) / s }')
hip_y=$(awk -v sy="$hip_sy" -v s="$2" -v ty="$4" -v y0="$6" 'BEGIN { printf "%.9f", -(sy - y0 - ty) / s }')
hip_tol=$(awk -v t="$LANDMARK_TOL_PX" -v s="$2" 'BEGIN { print t / s }')
hl_mark
xdotool mousemove --window "$HL_WID" "$hip_sx" "$hip_sy" click 1
hl_settle
set -- $(last SELECTED)
[ "$2" = midline ] || hl_fail "after the hip centre the guided placement asks for $2"
hl_click radiograph-stop
sleep 0.5

# The window: a right-button drag from there, then Page Up on the canvas.
hl_mark
xdotool mousemove --window "$HL_WID" "$hip_sx" "$hip_sy" mousedown 3
sleep 0.2
xdotool mousemove --window "$HL_WID" $((hip_sx + DRAG_DX / 2)) $((hip_sy + DRAG_DY / 2))
sleep 0.2
xdotool mousemove --window "$HL_WID" $((hip_sx + DRAG_DX)) $((hip_sy + DRAG_DY))
sleep 0.2
xdotool mouseup 3
hl_settle
# Page Up on the canvas: a click on an empty part of it gives it the focus.
set -- $(last VIEW)
xdotool mousemove --window "$HL_WID" $(($5 + 30)) $(($6 + 250)) click 1
sleep 0.5
hl_mark
hl_key Page_Up
hl_settle
hl_grab dicom-windowed
sleep 2     # an autosave (every second here) of the unsaved changes
autosaves=$(find "$XDG_DATA_HOME" -type f | wc -l)
[ "$autosaves" -gt 0 ] || hl_fail "no autosave was written"
cat $(find "$XDG_DATA_HOME" -type f) >"$HL_TMP/autosave.txt"

hl_quit_discarding
dump="$HL_TMP/dicom.xml"
rg () { xmllint --xpath "string(//*[local-name()='plan']/*[local-name()='radiograph']/@$1)" "$dump"; }
want_c=$(awk -v c="$PRESET_C" -v d="$DRAG_DY" -v k="$PER_PX" -v s="$KEY_STEP" 'BEGIN { printf "%.3f", c + d * k - s }')
want_w=$(awk -v w="$PRESET_W" -v d="$DRAG_DX" -v k="$PER_PX" 'BEGIN { printf "%.3f", w + d * k }')
HL_TOL=$WINDOW_TOL
hl_expect "window centre after the drag and Page Up" "$(rg window-centre)" "~" "$want_c"
hl_expect "window width after the drag" "$(rg window-width)" "~" "$want_w"
[ "$(rg spacing-source)" = imager-spacing-ermf ] || hl_fail "spacing-source is '$(rg spacing-source)'"
HL_TOL=1e-9
hl_expect "pixel spacing kept from the file" "$(rg pixel-spacing-mm)" "~" "$SPACING_MM"
xmllint --noout --schema "$SRCDIR/data/hiplever-plan.xsd" "$dump" 2>/dev/null \
  || hl_fail "the summary is not valid against the schema"

HL_TOL=$(awk -v t="$hip_tol" 'BEGIN { print t + 1e-9 }')
hl_expect "hip centre x where clicked" "$(hl_landmark "$dump" hip-centre x-mm)" "~" "$hip_x"
hl_expect "hip centre y where clicked" "$(hl_landmark "$dump" hip-centre y-mm)" "~" "$hip_y"

# Nothing identifying anywhere.
"$CLI" report "$dump" -o "$HL_TMP/report.pdf" >/dev/null 2>"$HL_TMP/cli.err" \
  || hl_fail "no report from the summary: $(cat "$HL_TMP/cli.err")"
pdftotext "$HL_TMP/report.pdf" "$HL_TMP/report.txt" || hl_fail "pdftotext failed"
"$CLI" figure "$dump" -o "$HL_TMP/figure.svg" >/dev/null 2>"$HL_TMP/cli.err" \
  || hl_fail "no figure from the summary: $(cat "$HL_TMP/cli.err")"
for f in "$dump" "$HL_TMP/autosave.txt" "$HL_TMP/report.txt" "$HL_TMP/figure.svg" \
         "$HL_OUT" "$HL_OUT.err" $(find "$XDG_CONFIG_HOME" -type f); do
  if grep -q -e INVENTED -e ID-000 -e 19000101 -e ACC- "$f"; then
    hl_fail "$(basename "$f") holds an identifying element of the DICOM file"
  fi
done
hl_note "ok: no identifying element in the summary, autosave, report, figure, settings or output"
echo "gui-dicom: passed"
