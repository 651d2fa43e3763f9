#!/usr/bin/env python3
# cli-analysis-check.py: helpers of test-cli-analysis.sh (standard library only).
#
# Copyright 2026 the hiplever developers
# SPDX-License-Identifier: GPL-3.0-or-later
#
#   edit PLAN OUT ELEMENT SELECTOR ATTR=VALUE...
#       copy PLAN to OUT with attributes set on elements of that name:
#       SELECTOR "*" for every one, a number for the Nth (0-based), or a
#       value of its "hand" attribute; a missing element under <aids>, or
#       a missing <uncertainty>, is added.
#   result SUMMARY INDEX ATTR
#       print ATTR of the result INDEX (0 native, 1 + i option i) of a
#       planning summary at full precision.
#   png-size FILE          print "WIDTH HEIGHT" from the PNG header
#   png-dark-share FILE [BELOW]
#       print the share (0..1) of pixels whose grey (mean of R, G, B) is
#       below BELOW (default 80) in an 8-bit RGB or RGBA PNG
#   csv-rows FILE          print the number of data rows of a CSV file
#   sweep-rows SWEEP SOLVE VALUE
#       the sweep rows at VALUE, from "option" on, must equal solve's CSV
#       rows; prints the number compared
#   inverse-value CSV OPTION QUESTION [SITE]
#       print the value column of one inverse answer
import csv
import struct
import sys
import zlib
import xml.etree.ElementTree as ET

NS = "urn:hiplever:plan"
ET.register_namespace("", NS)


def q(name):
    return "{%s}%s" % (NS, name)


def fail(msg):
    print("cli-analysis-check: " + msg, file=sys.stderr)
    sys.exit(1)


def edit(plan, out, element, selector, assignments):
    tree = ET.parse(plan)
    root = tree.getroot()
    nodes = list(root.iter(q(element)))
    if not nodes and element in ("cane", "hand-load", "midline-load"):
        aids = root.find(q("aids"))
        if aids is None:
            aids = ET.Element(q("aids"))
            anchor = [i for i, c in enumerate(root) if c.tag in (q("landmarks"), q("calibration"))]
            root.insert(anchor[-1] + 1, aids)
        node = ET.SubElement(aids, q(element))
        if selector not in ("*", "0"):
            node.set("hand", selector)
        nodes = [node]
    elif not nodes and element == "uncertainty":
        node = ET.Element(q(element))
        later = [i for i, c in enumerate(root) if c.tag in (q("options"), q("notes"))]
        root.insert(later[0] if later else len(root), node)
        nodes = [node]
    if selector == "*":
        chosen = nodes
    elif selector.isdigit():
        chosen = [nodes[int(selector)]]
    else:
        chosen = [n for n in nodes if n.get("hand") == selector]
    if not chosen:
        fail("no <%s> matches %s in %s" % (element, selector, plan))
    for node in chosen:
        for a in assignments:
            k, v = a.split("=", 1)
            node.set(k, v)
        # A number set on a templated option makes it a manual option with
        # the numbers its implants made, as a sweep of that option does.
        if element == "option":
            for t in node.findall(q("template")):
                node.remove(t)
    tree.write(out, xml_declaration=True, encoding="UTF-8")


def result(summary, index, attr):
    root = ET.parse(summary).getroot()
    results = root.find(q("results")).findall(q("result"))
    print(repr(float(results[int(index)].get(attr))))


def png_size(path):
    with open(path, "rb") as f:
        head = f.read(24)
    if head[:8] != b"\x89PNG\r\n\x1a\n" or head[12:16] != b"IHDR":
        fail("%s is not a PNG" % path)
    w, h = struct.unpack(">II", head[16:24])
    print(w, h)


def png_pixels(path):
    """Width, height, bytes per pixel and the unfiltered rows of an 8-bit
    RGB or RGBA PNG without interlace (what cairo writes)."""
    with open(path, "rb") as f:
        data = f.read()
    if data[:8] != b"\x89PNG\r\n\x1a\n":
        fail("%s is not a PNG" % path)
    pos, idat, ihdr = 8, [], None
    while pos < len(data):
        n, kind = struct.unpack(">I4s", data[pos:pos + 8])
        body = data[pos + 8:pos + 8 + n]
        if kind == b"IHDR":
            ihdr = struct.unpack(">IIBBBBB", body)
        elif kind == b"IDAT":
            idat.append(body)
        pos += 12 + n
    w, h, depth, colour, _, _, interlace = ihdr
    if depth != 8 or colour not in (2, 6) or interlace != 0:
        fail("%s: only 8-bit RGB or RGBA without interlace is read here" % path)
    bpp = 3 if colour == 2 else 4
    raw = zlib.decompress(b"".join(idat))
    stride = w * bpp
    rows, prev = [], bytearray(stride)
    for y in range(h):
        ftype = raw[y * (stride + 1)]
        line = bytearray(raw[y * (stride + 1) + 1:(y + 1) * (stride + 1)])
        for i in range(stride):
            a = line[i - bpp] if i >= bpp else 0
            b = prev[i]
            c = prev[i - bpp] if i >= bpp else 0
            if ftype == 1:
                line[i] = (line[i] + a) & 0xFF
            elif ftype == 2:
                line[i] = (line[i] + b) & 0xFF
            elif ftype == 3:
                line[i] = (line[i] + ((a + b) >> 1)) & 0xFF
            elif ftype == 4:
                p = a + b - c
                pa, pb, pc = abs(p - a), abs(p - b), abs(p - c)
                pred = a if pa <= pb and pa <= pc else (b if pb <= pc else c)
                line[i] = (line[i] + pred) & 0xFF
        rows.append(line)
        prev = line
    return w, h, bpp, rows


def png_dark_share(path, below="80"):
    w, h, bpp, rows = png_pixels(path)
    limit = 3 * float(below)
    dark = 0
    for line in rows:
        for x in range(0, w * bpp, bpp):
            if line[x] + line[x + 1] + line[x + 2] < limit:
                dark += 1
    print("%.4f" % (dark / float(w * h)))


def read_csv(path):
    with open(path, newline="") as f:
        return list(csv.reader(f))


def sweep_rows(sweep, solve, value):
    s = read_csv(sweep)
    v = read_csv(solve)
    rows = [r[2:] for r in s[1:] if float(r[1]) == float(value)]
    want = v[1:]
    if len(rows) != len(want):
        fail("%d sweep rows at %s, %d solve rows" % (len(rows), value, len(want)))
    for a, b in zip(rows, want):
        if a != b:
            fail("sweep row %s differs from solve row %s" % (a, b))
    print(len(rows))


def inverse_value(path, option, question, site=""):
    for r in read_csv(path)[1:]:
        if r[0] == option and r[1] == question and r[2] == site:
            print(r[4])
            return
    fail("no answer %s %s %s" % (option, question, site))


def main(argv):
    if len(argv) < 2:
        fail("usage: see the header of this file")
    cmd, args = argv[1], argv[2:]
    if cmd == "edit" and len(args) >= 5:
        edit(args[0], args[1], args[2], args[3], args[4:])
    elif cmd == "result" and len(args) == 3:
        result(*args)
    elif cmd == "png-size" and len(args) == 1:
        png_size(args[0])
    elif cmd == "png-dark-share" and len(args) in (1, 2):
        png_dark_share(*args)
    elif cmd == "csv-rows" and len(args) == 1:
        print(len(read_csv(args[0])) - 1)
    elif cmd == "sweep-rows" and len(args) == 3:
        sweep_rows(*args)
    elif cmd == "inverse-value" and len(args) in (3, 4):
        inverse_value(*args)
    else:
        fail("bad arguments: %s" % " ".join(argv[1:]))


if __name__ == "__main__":
    main(sys.argv)
