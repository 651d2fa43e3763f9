#!/bin/sh
# make-image-seeds.sh: writes the seed corpus of the image fuzz target.
#
# Copyright 2026 the hiplever developers
# SPDX-License-Identifier: GPL-3.0-or-later
#
# Small invented images (tests/make-dicom.py, gdcmconv, ImageMagick):
# DICOM uncompressed, RLE, JPEG lossless, JPEG 2000, MONOCHROME1 and 2,
# 8, 12 and 16 bits, colour, two frames, each calibration element; a
# 16-bit PNG, TIFF and an 8-bit JPEG.  Usage: make-image-seeds.sh OUTDIR
set -eu
here=$(cd "$(dirname "$0")/../.." && pwd)
out=$1
mkdir -p "$out"
mk () { name=$1; shift; python3 "$here/tests/make-dicom.py" "$out/$name" --rows 12 --cols 16 --radius 2 --disc 8,6 "$@"; }
mk d16-raw.dcm --bits 16 --imager-spacing '0.15\0.15' --ermf 1.25 --window 30000,20000
mk d12-m1.dcm --bits 12 --photometric MONOCHROME1 --pixel-spacing '0.1\0.1' --calibration-type GEOMETRY
mk d8-default.dcm --bits 8 --imager-spacing '0.2\0.2' --burned-in YES
mk d16-rescale.dcm --bits 12 --slope 0.5 --intercept -1000
mk d8-rgb.dcm --bits 8 --samples 3 --photometric RGB
mk d16-frames.dcm --bits 16 --frames 2
gdcmconv --rle "$out/d16-raw.dcm" "$out/d16-rle.dcm"
gdcmconv --jpeg "$out/d12-m1.dcm" "$out/d12-jpeg-lossless.dcm"
gdcmconv --j2k "$out/d8-default.dcm" "$out/d8-j2k.dcm"
convert -size 16x12 gradient: -depth 16 "$out/g16.png"
convert -size 16x12 gradient: -depth 16 -compress zip "$out/g16.tif"
convert -size 16x12 gradient: -depth 8 "$out/g8.jpg"
