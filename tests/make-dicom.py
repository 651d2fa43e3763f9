#!/usr/bin/env python3
# make-dicom.py: writes a small synthetic DICOM radiograph for the tests.
#
# Copyright 2026 the hiplever developers
# SPDX-License-Identifier: GPL-3.0-or-later
#
# Invented images only: a left-to-right grey ramp with bright discs at
# given pixel positions, in explicit VR little endian (the tests compress
# it with gdcmconv for RLE, JPEG lossless and JPEG 2000).  Every element
# can be set from the command line, including invented identifying ones,
# so the tests can check that none of them leaves the program.
#
#   make-dicom.py OUT [--rows N] [--cols N] [--bits 8|12|16] ...

import argparse
import struct
import sys

EXPLICIT_LE = "1.2.840.10008.1.2.1"
DX_PRESENTATION = "1.2.840.10008.5.1.4.1.1.1.1"
LONG_VRS = {"OB", "OW", "OF", "SQ", "UT", "UN"}


def element(group, elem, vr, value):
    if isinstance(value, str):
        value = value.encode("ascii")
    if len(value) % 2:
        value += b"\0" if vr in ("UI", "OB") else b" "
    head = struct.pack("<HH", group, elem) + vr.encode("ascii")
    if vr in LONG_VRS:
        head += b"\0\0" + struct.pack("<I", len(value))
    else:
        head += struct.pack("<H", len(value))
    return head + value


def us(v):
    return struct.pack("<H", v)


def pixels(args):
    rows, cols = args.rows, args.cols
    top = (1 << args.bits) - 1
    lo, hi = int(top * 0.2), int(top * 0.6)
    discs = []
    for d in args.disc:
        x, y = (float(t) for t in d.split(","))
        discs.append((x, y))
    frames = []
    for f in range(args.frames):
        out = []
        for y in range(rows):
            for x in range(cols):
                v = lo + (hi - lo) * x // max(cols - 1, 1)
                for (cx, cy) in discs:
                    if (x - cx) ** 2 + (y - cy) ** 2 <= args.radius ** 2:
                        v = top
                if f > 0:
                    v = top - v  # later frames differ from the first
                if args.photometric == "MONOCHROME1":
                    v = top - v  # stored dark-for-bone; shown turned over
                out.append(v)
        frames.append(out)
    data = bytearray()
    for out in frames:
        for v in out:
            if args.samples == 3:
                # grey written as colour with a slight tint; luma stays v
                r, g, b = v, v, v
                data += bytes((r, g, b)) if args.bits == 8 else struct.pack("<HHH", r, g, b)
            elif args.bits == 8:
                data.append(v)
            else:
                data += struct.pack("<H", v)
    return bytes(data)


def main():
    p = argparse.ArgumentParser()
    p.add_argument("out")
    p.add_argument("--rows", type=int, default=64)
    p.add_argument("--cols", type=int, default=80)
    p.add_argument("--bits", type=int, default=16, choices=(8, 12, 16))
    p.add_argument("--photometric", default="MONOCHROME2")
    p.add_argument("--samples", type=int, default=1)
    p.add_argument("--frames", type=int, default=1)
    p.add_argument("--disc", action="append", default=[],
                   help="X,Y: a bright disc centred on this pixel")
    p.add_argument("--radius", type=float, default=3.0)
    p.add_argument("--pixel-spacing", help="raw text, e.g. 0.1\\0.1")
    p.add_argument("--calibration-type", help="e.g. GEOMETRY")
    p.add_argument("--imager-spacing", help="raw text")
    p.add_argument("--ermf", help="raw text")
    p.add_argument("--window", help="CENTRE,WIDTH")
    p.add_argument("--slope")
    p.add_argument("--intercept")
    p.add_argument("--burned-in", help="YES or NO")
    p.add_argument("--patient-name", default="TEST^INVENTED")
    p.add_argument("--patient-id", default="ID-000")
    p.add_argument("--transfer-syntax", default=EXPLICIT_LE)
    p.add_argument("--bits-allocated", type=int)
    p.add_argument("--no-pixels", action="store_true",
                   help="leave the pixel data out (header-only files)")
    p.add_argument("--truncate", type=int, default=0,
                   help="cut this many bytes off the end")
    a = p.parse_args()

    alloc = a.bits_allocated or (8 if a.bits == 8 else 16)
    ds = []
    ds.append(element(0x0008, 0x0016, "UI", DX_PRESENTATION))
    ds.append(element(0x0008, 0x0018, "UI", "2.25.1234567890"))
    ds.append(element(0x0008, 0x0050, "SH", "ACC-INVENTED-7"))
    ds.append(element(0x0008, 0x0060, "CS", "DX"))
    ds.append(element(0x0008, 0x0080, "LO", "INVENTED HOSPITAL"))
    ds.append(element(0x0008, 0x0090, "PN", "REFERRER^INVENTED"))
    ds.append(element(0x0010, 0x0010, "PN", a.patient_name))
    ds.append(element(0x0010, 0x0020, "LO", a.patient_id))
    ds.append(element(0x0010, 0x0030, "DA", "19000101"))
    if a.ermf is not None:
        ds.append(element(0x0018, 0x1114, "DS", a.ermf))
    if a.imager_spacing is not None:
        ds.append(element(0x0018, 0x1164, "DS", a.imager_spacing))
    ds.append(element(0x0020, 0x000D, "UI", "2.25.1234567891"))
    ds.append(element(0x0020, 0x000E, "UI", "2.25.1234567892"))
    ds.append(element(0x0028, 0x0002, "US", us(a.samples)))
    ds.append(element(0x0028, 0x0004, "CS", a.photometric))
    if a.samples == 3:
        ds.append(element(0x0028, 0x0006, "US", us(0)))
    if a.frames > 1:
        ds.append(element(0x0028, 0x0008, "IS", str(a.frames)))
    ds.append(element(0x0028, 0x0010, "US", us(a.rows)))
    ds.append(element(0x0028, 0x0011, "US", us(a.cols)))
    if a.pixel_spacing is not None:
        ds.append(element(0x0028, 0x0030, "DS", a.pixel_spacing))
    ds.append(element(0x0028, 0x0100, "US", us(alloc)))
    ds.append(element(0x0028, 0x0101, "US", us(a.bits)))
    ds.append(element(0x0028, 0x0102, "US", us(a.bits - 1)))
    ds.append(element(0x0028, 0x0103, "US", us(0)))
    if a.burned_in is not None:
        ds.append(element(0x0028, 0x0301, "CS", a.burned_in))
    if a.calibration_type is not None:
        ds.append(element(0x0028, 0x0A02, "CS", a.calibration_type))
    if a.window is not None:
        c, w = a.window.split(",")
        ds.append(element(0x0028, 0x1050, "DS", c))
        ds.append(element(0x0028, 0x1051, "DS", w))
    if a.intercept is not None:
        ds.append(element(0x0028, 0x1052, "DS", a.intercept))
    if a.slope is not None:
        ds.append(element(0x0028, 0x1053, "DS", a.slope))
    if not a.no_pixels:
        ds.append(element(0x7FE0, 0x0010, "OB" if alloc == 8 else "OW", pixels(a)))

    meta_body = b"".join([
        element(0x0002, 0x0001, "OB", b"\0\1"),
        element(0x0002, 0x0002, "UI", DX_PRESENTATION),
        element(0x0002, 0x0003, "UI", "2.25.1234567890"),
        element(0x0002, 0x0010, "UI", a.transfer_syntax),
        element(0x0002, 0x0012, "UI", "2.25.99"),
    ])
    meta = element(0x0002, 0x0000, "UL", struct.pack("<I", len(meta_body))) + meta_body
    data = b"\0" * 128 + b"DICM" + meta + b"".join(ds)
    if a.truncate:
        data = data[:-a.truncate]
    with open(a.out, "wb") as f:
        f.write(data)
    return 0


if __name__ == "__main__":
    sys.exit(main())
