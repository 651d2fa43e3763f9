#!/usr/bin/env python3
"""Writes the seed corpus of the core fuzz target: make-core-seeds.py OUTDIR.

The byte layout follows fill_plan() in hl-fuzz-core.c: a number is a
selector byte (0xff: in range) and eight bytes giving a fraction of its
range.  The seeds are invented plans near the demo geometry, so that the
fuzzer starts inside the solver rather than at the first refusal.  Random
seeds use a fixed seed and are the same on every run.
"""
import os
import random
import struct
import sys

IN_RANGE = 0xFF
N_LANDMARKS = 13


def num(u):
    """A number at fraction u of its range."""
    u = min(max(u, 0.0), 1.0 - 2.0 ** -53)
    return bytes([IN_RANGE]) + struct.pack('>Q', int(u * 2 ** 53) << 11)


def plan(side=0, mirror=False, cane=False, loads=False, cal=0, n_options=2,
         limb=0, bw_line=0, line_mode=0):
    b = bytearray()
    b += num(55.0 / 330.0)                    # mass 75 kg
    b += bytes([side, limb]) + num(0.37)      # custom fraction ~0.16
    b += bytes([bw_line, line_mode]) + num(40.0 / 59.0) + num(100.0 / 300.0)
    how = 0x20 | (0x10 if mirror else 0)      # 2 mm spread, required placed
    b += bytes([how, 0x1F, 0xFF])
    for _ in range(2 * N_LANDMARKS):
        b += num(0.5)
    b += bytes([cal]) + num(0.5) + num(24.0 / 49.0) + num(99.0 / 499.0)
    circle = [(52.5, 40.0), (40.0, 52.5), (27.5, 40.0)]   # radius 12.5 mm
    for x, y in circle:
        b += num(x / 80.0) + num(y / 80.0)
    b += bytes([4])                           # three points
    b += bytes([1 if cane else 0, 0, 1]) + num(0.15) + num(0.28)
    for _ in range(2):
        b += num(0.1 if loads else 0.0) + num(0.22)
    b += num(0.0)
    b += num(0.1) + num(0.2) + num(0.1) + num(1.08 / 4.95)
    b += bytes([n_options])
    for i in range(n_options):
        for u in (0.55 + 0.05 * i, 0.5, 0.6, 0.52, 0.5):
            b += num(u)
        b += num(0.5625)                      # neck-shaft 135 deg
    return bytes(b)


def main():
    out = sys.argv[1]
    os.makedirs(out, exist_ok=True)
    seeds = {
        'right-hip': plan(),
        'left-hip': plan(side=1, mirror=True),
        'cane-and-loads': plan(cane=True, loads=True, n_options=3),
        'marker-calibration': plan(cal=2, limb=6, bw_line=1),
        'two-point-calibration': plan(cal=3, line_mode=1, n_options=0),
    }
    rng = random.Random(20261201)
    for i in range(3):
        seeds['random-%d' % i] = bytes(rng.randrange(256) for _ in range(700))
    for name, data in seeds.items():
        with open(os.path.join(out, name), 'wb') as f:
            f.write(data)


if __name__ == '__main__':
    main()
