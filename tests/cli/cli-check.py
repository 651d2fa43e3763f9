#!/usr/bin/env python3
# cli-check.py: checks on hiplever-cli output that are clumsy in bash.
#
# Copyright 2026 the hiplever developers
# SPDX-License-Identifier: GPL-3.0-or-later
#
#   cli-check.py csv FILE HEADER [--plan PATH:N_OPTIONS ...]
#       The header is exactly HEADER's line (with "plan," in front when
#       --plan is given); every row has every field; numbers are C-locale
#       fixed-point (3 decimals, lever_ratio 4); flags are keys joined by
#       ';'.  Without --plan: the first row is "native".  With --plan: the
#       rows are, in order, 1 + N_OPTIONS rows per PATH, each group
#       starting with "native".  Prints the number of data rows.
#   cli-check.py text-vs-csv TEXT CSV
#       The numbers of the text table equal the CSV's, column by column,
#       each with the decimals people read (TEXT_DECIMALS).
#   cli-check.py field CSV ROW COLUMN
#       Prints one parsed field (ROW 0 = the first data row).
import csv
import math
import re
import sys

NUMBER = re.compile(r'^-?[0-9]+\.[0-9]{3}$')
RATIO = re.compile(r'^-?[0-9]+\.[0-9]{4}$')
FLAGS = re.compile(r'^([a-z0-9-]+(;[a-z0-9-]+)*)?$')
# The decimals people read in the text (issue contract, core/hl-types.h
# HL_DECIMALS_*): forces in N none, multiples of body weight 2, mm 1,
# angles 1, the lever ratio 2.
TEXT_DECIMALS = {
    'abductor_arm_mm': 1, 'bw_arm_mm': 1, 'lever_ratio': 2, 'abductor_force_N': 0,
    'abductor_force_BW': 2, 'jrf_N': 0, 'jrf_BW': 2, 'jrf_angle_deg': 1,
    'global_offset_change_mm': 1, 'leg_length_change_mm': 1, 'abductor_length_change_mm': 1,
}


def fail(msg):
    print('cli-check: ' + msg, file=sys.stderr)
    sys.exit(1)


def read_rows(path):
    with open(path, newline='', encoding='utf-8') as f:
        text = f.read()
    first = text.split('\n', 1)[0]
    rows = list(csv.reader(text.splitlines(keepends=True)))
    return first, rows


def check_csv(path, header_path, plans):
    with open(header_path, encoding='utf-8') as f:
        header = f.readline().rstrip('\n')
    if plans:
        header = 'plan,' + header
    first, rows = read_rows(path)
    if first != header:
        fail('%s: header is %r, expected %r' % (path, first, header))
    names = rows[0]
    data = rows[1:]
    if not data:
        fail('%s: no data rows' % path)
    for n, row in enumerate(data, start=2):
        if len(row) != len(names):
            fail('%s: row %d has %d fields, expected %d' % (path, n, len(row), len(names)))
        for name, value in zip(names, row):
            if name in ('plan', 'option'):
                continue
            if name == 'flags':
                if not FLAGS.match(value):
                    fail('%s: row %d: flags %r are not keys joined by ";"' % (path, n, value))
                continue
            pattern = RATIO if name == 'lever_ratio' else NUMBER
            if not pattern.match(value) or not math.isfinite(float(value)):
                fail('%s: row %d: %s = %r is not a C-locale fixed-point number'
                     % (path, n, name, value))
    if not plans:
        if data[0][0] != 'native':
            fail('%s: first row is %r, not native' % (path, data[0][0]))
    else:
        expected = []
        for spec in plans:
            plan, count = spec.rsplit(':', 1)
            expected += [(plan, i == 0) for i in range(1 + int(count))]
        if len(expected) != len(data):
            fail('%s: %d rows, expected %d' % (path, len(data), len(expected)))
        for n, ((plan, native), row) in enumerate(zip(expected, data), start=2):
            if row[0] != plan:
                fail('%s: row %d: plan %r, expected %r' % (path, n, row[0], plan))
            if native and row[1] != 'native':
                fail('%s: row %d: %r, expected native first for %s' % (path, n, row[1], plan))
    print(len(data))


def text_vs_csv(text_path, csv_path):
    _, rows = read_rows(csv_path)
    names = rows[0]
    data = rows[1:]
    columns = [i for i, name in enumerate(names) if name not in ('option', 'flags')]
    with open(text_path, encoding='utf-8') as f:
        lines = f.read().split('\n')
    # The table: one line per quantity, ending in one number per case, in
    # the order of the CSV columns; it starts after the first blank line.
    start = lines.index('') + 2
    table = lines[start:start + len(columns)]
    # The text shows fewer decimals than the CSV (the digits that mean
    # something to a reader): each text number is the CSV value rounded
    # to the text's decimals.
    for col, line in zip(columns, table):
        numbers = line.split()[-len(data):]
        expected = [row[col] for row in data]
        if len(numbers) != len(expected):
            fail('text row %r: %s, csv column %s: %s' % (line, numbers, names[col], expected))
        for shown, exact in zip(numbers, expected):
            decimals = len(shown.split('.')[1]) if '.' in shown else 0
            want = TEXT_DECIMALS.get(names[col])
            if want is not None and decimals != want:
                fail('text row %r shows %s with %d decimals, not %d'
                     % (line, shown, decimals, want))
            if decimals >= len(exact.split('.')[1]) if '.' in exact else True:
                fail('text row %r shows %s, no fewer decimals than the csv %s'
                     % (line, shown, exact))
            if abs(float(shown) - float(exact)) > 0.5 * 10 ** -decimals + 1e-9:
                fail('text row %r: %s is not csv column %s: %s rounded'
                     % (line, shown, names[col], exact))
    if len(table) != len(columns):
        fail('text table has %d rows, expected %d' % (len(table), len(columns)))
    print(len(columns))


def field(csv_path, row, column):
    _, rows = read_rows(csv_path)
    print(rows[1 + int(row)][rows[0].index(column)])


def main(argv):
    if len(argv) >= 3 and argv[0] == 'csv':
        plans = []
        rest = argv[3:]
        while rest:
            if rest[0] != '--plan' or len(rest) < 2:
                fail('usage: csv FILE HEADER [--plan PATH:N ...]')
            plans.append(rest[1])
            rest = rest[2:]
        check_csv(argv[1], argv[2], plans)
    elif len(argv) == 3 and argv[0] == 'text-vs-csv':
        text_vs_csv(argv[1], argv[2])
    elif len(argv) == 4 and argv[0] == 'field':
        field(argv[1], argv[2], argv[3])
    else:
        fail('usage: csv | text-vs-csv | field')


if __name__ == '__main__':
    main(sys.argv[1:])
