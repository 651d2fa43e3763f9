#!/usr/bin/env python3
"""Draws the plainly synthetic demo radiograph of data/examples/demo.hlplan.

Usage: draw-demo-radiograph.py OUT.png

Python 3 without extra modules (PNG through zlib).  Everything is drawn in
the plan frame of the demo case (true mm, x to the patient's left, y up)
and mapped to pixels as the program maps them back:
    plan = origin + image_mm / M,  image_mm = (u * s, -v * s)
with M = 1.2 (the demo's calibration), s = 0.4 image mm per pixel and the
top-left corner at plan (-230, 150).  The bones are simple invented shapes
placed on the demo's landmarks (right hip operated); the 25 mm calibration
sphere appears 30 image mm wide.  It is a drawing, not a patient image,
and says so in its corner.
"""
import math
import struct
import sys
import zlib

M = 1.2
S = 0.4                      # image mm per pixel
ORIGIN = (-230.0, 150.0)     # plan mm of the top-left corner
W, H = 1380, 1230            # pixels: 460 x 410 true mm

BG, SOFT, BONE, CORTEX, CANAL, MARK, TEXT = 18, 48, 150, 215, 95, 245, 235

img = bytearray([BG]) * (W * H)


def px(p):
    return ((p[0] - ORIGIN[0]) * M / S, (ORIGIN[1] - p[1]) * M / S)


def fill_polygon(pts, value):
    """Even-odd scanline fill of a polygon given in plan mm."""
    q = [px(p) for p in pts]
    ys = [p[1] for p in q]
    for y in range(max(0, int(min(ys))), min(H, int(max(ys)) + 1)):
        yc = y + 0.5
        xs = []
        for i in range(len(q)):
            (x0, y0), (x1, y1) = q[i], q[(i + 1) % len(q)]
            if (y0 <= yc < y1) or (y1 <= yc < y0):
                xs.append(x0 + (yc - y0) * (x1 - x0) / (y1 - y0))
        xs.sort()
        for a, b in zip(xs[0::2], xs[1::2]):
            lo, hi = max(0, int(math.ceil(a - 0.5))), min(W, int(math.floor(b - 0.5)) + 1)
            if hi > lo:
                img[y * W + lo:y * W + hi] = bytes([value]) * (hi - lo)


def circle(c, r, n=72):
    return [(c[0] + r * math.cos(2 * math.pi * k / n), c[1] + r * math.sin(2 * math.pi * k / n))
            for k in range(n)]


def fill_circle(c, r, value):
    fill_polygon(circle(c, r), value)


def ring(c, r, width, value):
    outer = circle(c, r)
    inner = circle(c, r - width)
    fill_polygon(outer, value)
    fill_polygon(inner, BONE)


def thick_line(a, b, width, value):
    dx, dy = b[0] - a[0], b[1] - a[1]
    n = math.hypot(dx, dy)
    ox, oy = -dy / n * width / 2, dx / n * width / 2
    fill_polygon([(a[0] + ox, a[1] + oy), (b[0] + ox, b[1] + oy),
                  (b[0] - ox, b[1] - oy), (a[0] - ox, a[1] - oy)], value)


def mirror(pts):
    return [(-x, y) for x, y in pts]


# ---- soft tissue ------------------------------------------------------------
fill_polygon([(-215, 150), (215, 150), (225, -260), (-225, -260)], SOFT)

# ---- pelvis (right half drawn, left half mirrored; the demo is nearly
# symmetric: left landmarks sit within 1-2 mm of the mirror image) ----------
ilium = [(-40, 60), (-70, 120), (-120, 135), (-165, 110), (-175, 60), (-150, 30),
         (-125, 24), (-112, 14), (-100, 28), (-80, 24), (-66, 6), (-62, -18),
         (-50, -40), (-30, -60), (-8, -62), (-8, 40)]
for side in (ilium, mirror(ilium)):
    fill_polygon(side, BONE)
# sacrum, the body between the halves, and the symphysis
fill_polygon([(-9, 40), (9, 40), (9, -36), (-9, -36)], BONE)
fill_polygon([(-38, 110), (38, 110), (22, 30), (-22, 30)], BONE)
fill_polygon([(-10, -35), (10, -35), (10, -62), (-10, -62)], CORTEX)
fill_polygon([(-2, -34), (2, -34), (2, -63), (-2, -63)], SOFT)
# obturator foramina
for c in ((-38, -50), (38, -50)):
    fill_polygon([(c[0] + 14 * math.cos(t / 20 * 2 * math.pi), c[1] + 10 * math.sin(t / 20 * 2 * math.pi))
                  for t in range(20)], SOFT)
# acetabula: a bright roof arc (sourcil) ending at the lateral margin
for sgn, hc in ((-1, (-95.0, 0.0)), (1, (96.0, 1.0))):
    arc = [(hc[0] + 27 * math.cos(math.radians(a)), hc[1] + 27 * math.sin(math.radians(a)))
           for a in range(20, 161, 5)]
    if sgn < 0:
        arc = [(2 * hc[0] - x, y) for x, y in arc]
    inner = [(hc[0] + (x - hc[0]) * 0.88, hc[1] + (y - hc[1]) * 0.88) for x, y in reversed(arc)]
    fill_polygon(arc + inner, CORTEX)
# ilioischial lines (bright), through the demo's two points and beyond
thick_line((-57.5, 55), (-60.5, -40), 2.2, CORTEX)
thick_line((57.5, 55), (60.5, -40), 2.2, CORTEX)
# teardrops: small U shapes, lowest point on the landmark
for c in ((-62.0, -18.0), (62.0, -18.0)):
    u = [(c[0] + 5 * math.cos(math.radians(a)), c[1] + 5 + 5 * math.sin(math.radians(a)))
         for a in range(180, 361, 10)]
    inner = [(c[0] + 3 * math.cos(math.radians(a)), c[1] + 5 + 3 * math.sin(math.radians(a)))
             for a in range(360, 179, -10)]
    fill_polygon(u + inner, MARK)


# ---- femora -------------------------------------------------------------------
def femur(hc, gt, lt, canal, sgn):
    """hc head centre, gt greater trochanter tip, lt lesser trochanter tip,
    canal [(y, medial x, lateral x)...] proximal to distal (the inner
    cortical edges); sgn -1 for the right femur (its medial is +x)."""
    y0, m0, l0 = canal[0]
    med, lat = -sgn, sgn            # x directions
    # the proximal femur: lesser trochanter, neck, greater trochanter
    fill_polygon([(m0 + med * 6.5, y0), (lt[0] + med * 4, lt[1] - 3),
                  (lt[0] + med * 1, lt[1] + 8), (hc[0] + med * 8, hc[1] - 18),
                  (hc[0] + lat * 6, hc[1] + 18), (gt[0] + med * 12, gt[1] + 10),
                  (gt[0], gt[1] + 6), (gt[0] + lat * 2, gt[1] - 15),
                  (l0 + lat * 6.5, y0)], BONE)
    # the shaft's cortex, 6.5 mm outside the canal edges
    shaft = [(m + med * 6.5, y) for y, m, l in canal] + \
            [(canal[-1][1] + med * 6.5, -260), (canal[-1][2] + lat * 6.5, -260)] + \
            [(l + lat * 6.5, y) for y, m, l in reversed(canal)]
    fill_polygon(shaft, CORTEX)
    # the canal: darker between the inner cortical edges, tapering above
    inner = [(m, y) for y, m, l in canal] + [(canal[-1][1], -260), (canal[-1][2], -260)] + \
            [(l, y) for y, m, l in reversed(canal)] + [((m0 + l0) / 2, y0 + 22)]
    fill_polygon(inner, CANAL)
    fill_circle(hc, 24, BONE)
    ring(hc, 24, 2.0, CORTEX)


femur((-95.0, 0.0), (-155.0, -8.0), (-115.0, -58.0),
      [(-75, -120.4, -142.4), (-120, -120.3, -135.3), (-160, -118.1, -131.1), (-200, -116.5, -128.5)], -1)
femur((96.0, 1.0), (156.0, -9.0), (114.0, -60.0),
      [(-75, 120.6, 142.6), (-120, 120.5, 135.5), (-160, 118.3, 131.3), (-200, 116.7, 128.7)], 1)

# ---- calibration sphere: 25 mm, at plan (190, -210) ----------------------------
fill_circle((190.0, -210.0), 12.5, MARK)

# ---- the words ------------------------------------------------------------------
FONT = {  # 5 x 7, rows top to bottom
    'S': ["01111", "10000", "10000", "01110", "00001", "00001", "11110"],
    'Y': ["10001", "10001", "01010", "00100", "00100", "00100", "00100"],
    'N': ["10001", "11001", "10101", "10011", "10001", "10001", "10001"],
    'T': ["11111", "00100", "00100", "00100", "00100", "00100", "00100"],
    'H': ["10001", "10001", "10001", "11111", "10001", "10001", "10001"],
    'E': ["11111", "10000", "10000", "11110", "10000", "10000", "11111"],
    'I': ["01110", "00100", "00100", "00100", "00100", "00100", "01110"],
    'C': ["01111", "10000", "10000", "10000", "10000", "10000", "01111"],
    'D': ["11110", "10001", "10001", "10001", "10001", "10001", "11110"],
    'M': ["10001", "11011", "10101", "10101", "10001", "10001", "10001"],
    'O': ["01110", "10001", "10001", "10001", "10001", "10001", "01110"],
    'A': ["01110", "10001", "10001", "11111", "10001", "10001", "10001"],
    'G': ["01111", "10000", "10000", "10011", "10001", "10001", "01111"],
    'n': ["00000", "00000", "10110", "11001", "10001", "10001", "10001"],
    'o': ["00000", "00000", "01110", "10001", "10001", "10001", "01110"],
    't': ["01000", "01000", "11100", "01000", "01000", "01001", "00110"],
    'a': ["00000", "00000", "01110", "00001", "01111", "10001", "01111"],
    'p': ["00000", "00000", "11110", "10001", "11110", "10000", "10000"],
    'i': ["00100", "00000", "01100", "00100", "00100", "00100", "01110"],
    'e': ["00000", "00000", "01110", "10001", "11111", "10000", "01110"],
    'm': ["00000", "00000", "11010", "10101", "10101", "10001", "10001"],
    '2': ["01110", "10001", "00001", "00010", "00100", "01000", "11111"],
    '5': ["11111", "10000", "11110", "00001", "00001", "10001", "01110"],
    '\u2014': ["00000", "00000", "00000", "11111", "00000", "00000", "00000"],
    ' ': ["00000"] * 7,
}


def text(s, x, y, scale, value):
    for ch in s:
        rows = FONT[ch]
        for r, row in enumerate(rows):
            for c, bit in enumerate(row):
                if bit == '1':
                    for dy in range(scale):
                        yy = y + r * scale + dy
                        img[yy * W + x + c * scale:yy * W + x + (c + 1) * scale] = bytes([value]) * scale
        x += 6 * scale


text("SYNTHETIC DEMO IMAGE \u2014 not a patient", 24, 24, 4, TEXT)
cx, cy = px((170.0, -232.0))
text("25 mm", int(cx), int(cy), 3, TEXT)

# ---- PNG ------------------------------------------------------------------------
def chunk(kind, data):
    c = struct.pack(">I", len(data)) + kind + data
    return c + struct.pack(">I", zlib.crc32(kind + data) & 0xFFFFFFFF)


raw = b"".join(b"\x00" + bytes(img[y * W:(y + 1) * W]) for y in range(H))
png = (b"\x89PNG\r\n\x1a\n" + chunk(b"IHDR", struct.pack(">IIBBBBB", W, H, 8, 0, 0, 0, 0))
       + chunk(b"IDAT", zlib.compress(raw, 9)) + chunk(b"IEND", b""))
with open(sys.argv[1], "wb") as f:
    f.write(png)
