#!/usr/bin/env bash
# test-cli-image.sh: hiplever-cli image on DICOM files made here.
#
# Copyright 2026 the hiplever developers
# SPDX-License-Identifier: GPL-3.0-or-later
#
# Usage: test-cli-image.sh CLI SOURCE_DIR
# The DICOM files are invented (tests/make-dicom.py) and carry invented
# identifying elements ("TEST^INVENTED", "ID-000"); none may be printed.
# Prints one line per failure and, last, "cli-image: N passed, M failed".
set -u
export LC_ALL=C TZ=UTC

CLI=$1
SRC=$2
MAKE="python3 $SRC/tests/make-dicom.py"
WORK=$(mktemp -d "${TMPDIR:-/tmp}/hiplever-cli-image.XXXXXX")
trap 'rm -rf "$WORK"' EXIT

passed=0
failed=0
pass () { passed=$((passed + 1)); }
fail () { failed=$((failed + 1)); echo "FAIL: $*"; }
run () { "$CLI" "$@" >"$WORK/out" 2>"$WORK/err"; rc=$?; }
expect_rc () {
  if [ "$rc" -eq "$1" ]; then pass; else
    fail "$2: exit status $rc, expected $1 ($(head -c 300 "$WORK/err"))"; fi
}
# key VALUE: the line "key: VALUE" is in the output
expect_key () {
  if grep -qx "$1: $2" "$WORK/out"; then pass; else
    fail "$3: no line '$1: $2' in: $(tr '\n' '|' <"$WORK/out")"; fi
}
no_identifiers () {
  if cat "$WORK/out" "$WORK/err" | grep -q -e INVENTED -e ID-000 -e 19000101; then
    fail "$1: an identifying element was printed"
  else pass; fi
}

if ! "$CLI" image --help >/dev/null 2>&1; then
  echo "FAIL: image --help"; exit 1
fi

# Without DICOM support the program says so plainly.
$MAKE "$WORK/plain.dcm"
run image "$WORK/plain.dcm"
if [ "$rc" -eq 1 ] && grep -q "DICOM is not available" "$WORK/err"; then
  echo "cli-image: 1 passed, 0 failed (DICOM not available in this build)"
  exit 0
fi

# The contract: the keys, in this order, first.
$MAKE "$WORK/ermf" --imager-spacing '0.15\0.15' --ermf 1.25 --window 30000,20000 --burned-in YES
run image "$WORK/ermf"
expect_rc 0 "image, a DICOM without extension"
keys=$(cut -d: -f1 "$WORK/out" | head -9 | tr '\n' ' ')
if [ "$keys" = "format width height bits photometric mm_per_pixel spacing_source window_centre window_width " ]; then
  pass; else fail "keys in order: $keys"; fi
expect_key format dicom "ermf"
expect_key width 80 "ermf"
expect_key height 64 "ermf"
expect_key bits 16 "ermf"
expect_key photometric MONOCHROME2 "ermf"
expect_key mm_per_pixel 0.12 "ermf"
expect_key spacing_source imager-spacing-ermf "ermf"
expect_key window_centre 30000 "ermf"
expect_key window_width 20000 "ermf"
expect_key burned_in_annotation yes "ermf"
no_identifiers "ermf"

$MAKE "$WORK/cal.dcm" --bits 12 --photometric MONOCHROME1 --pixel-spacing '0.143\0.143' --calibration-type GEOMETRY
run image "$WORK/cal.dcm"
expect_rc 0 "calibrated pixel spacing"
expect_key mm_per_pixel 0.143 "calibrated"
expect_key spacing_source pixel-spacing "calibrated"
expect_key bits 12 "calibrated"
expect_key photometric MONOCHROME1 "calibrated"
no_identifiers "calibrated"

$MAKE "$WORK/def.dcm" --bits 8 --imager-spacing '0.1\0.1'
gdcmconv --j2k "$WORK/def.dcm" "$WORK/def-j2k.dcm"
run image "$WORK/def-j2k.dcm"
expect_rc 0 "default magnification, JPEG 2000"
expect_key mm_per_pixel 0.0833333 "default"
expect_key spacing_source imager-spacing-default "default"
expect_key magnification_assumed yes "default"
no_identifiers "default"

$MAKE "$WORK/none.dcm" --frames 2
gdcmconv --rle "$WORK/none.dcm" "$WORK/none-rle.dcm"
run image "$WORK/none-rle.dcm"
expect_rc 0 "no spacing, RLE"
expect_key mm_per_pixel none "none"
expect_key spacing_source none "none"
expect_key frames 2 "none"
no_identifiers "none"

# Bad input: exit 1, the file named, nothing identifying.
$MAKE "$WORK/zero.dcm" --pixel-spacing '0\0' --calibration-type GEOMETRY
$MAKE "$WORK/ermf-low.dcm" --imager-spacing '0.15\0.15' --ermf 0.9
$MAKE "$WORK/trunc.dcm" --truncate 2000
$MAKE "$WORK/huge.dcm" --rows 20000 --cols 20000 --no-pixels
printf 'not an image\n' >"$WORK/text.dcm"
for f in zero.dcm ermf-low.dcm trunc.dcm huge.dcm text.dcm missing.dcm; do
  run image "$WORK/$f"
  expect_rc 1 "bad input $f"
  if grep -q "$f" "$WORK/err" && [ ! -s "$WORK/out" ]; then pass; else
    fail "bad input $f: message $(cat "$WORK/err")"; fi
  no_identifiers "bad input $f"
done
run image "$WORK/ermf-low.dcm"
if grep -q "magnification 0.9" "$WORK/err"; then pass; else fail "ERMF 0.9 named: $(cat "$WORK/err")"; fi

run image
expect_rc 2 "image without FILE"

echo "cli-image: $passed passed, $failed failed"
[ "$failed" -eq 0 ]
