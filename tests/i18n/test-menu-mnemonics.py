#!/usr/bin/env python3
# The window's main menu (ui/hl-window.ui, primary_menu): every item has one
# mnemonic, and no two items share a letter (Alt plus the letter reaches
# one item only), in English and in German (po/de.po as msgfmt uses it:
# fuzzy or empty entries fall back to the English label).
#
# Usage: test-menu-mnemonics.py SOURCE_ROOT
#
# Copyright 2026 the hiplever developers
# SPDX-License-Identifier: GPL-3.0-or-later

import os
import sys
import xml.etree.ElementTree as ET


def menu_labels(ui_path):
    root = ET.parse(ui_path).getroot()
    for menu in root.iter("menu"):
        if menu.get("id") == "primary_menu":
            return [a.text for a in menu.iter("attribute")
                    if a.get("name") == "label" and a.text]
    raise SystemExit(f"{ui_path}: no menu primary_menu")


def po_unquote(s):
    s = s.strip()
    assert s.startswith('"') and s.endswith('"'), s
    out, i, body = [], 0, s[1:-1]
    while i < len(body):
        c = body[i]
        if c == "\\" and i + 1 < len(body):
            out.append({"n": "\n", "t": "\t", '"': '"', "\\": "\\"}.get(body[i + 1], body[i + 1]))
            i += 2
        else:
            out.append(c)
            i += 1
    return "".join(out)


def read_po(path):
    """msgid -> msgstr of the entries msgfmt keeps (not fuzzy, not empty)."""
    catalogue = {}
    with open(path, encoding="utf-8") as f:
        blocks = f.read().split("\n\n")
    for block in blocks:
        fuzzy = False
        field, parts = None, {"msgid": [], "msgstr": []}
        for line in block.splitlines():
            if line.startswith("#,") and "fuzzy" in line:
                fuzzy = True
            elif line.startswith("#"):
                continue
            elif line.startswith("msgid "):
                field = "msgid"
                parts[field].append(po_unquote(line[6:]))
            elif line.startswith("msgstr "):
                field = "msgstr"
                parts[field].append(po_unquote(line[7:]))
            elif line.startswith("msgctxt") or line.startswith("msgid_plural"):
                field = None
            elif line.startswith('"') and field is not None:
                parts[field].append(po_unquote(line))
        msgid, msgstr = "".join(parts["msgid"]), "".join(parts["msgstr"])
        if msgid and msgstr and not fuzzy:
            catalogue[msgid] = msgstr
    return catalogue


def mnemonic(label):
    """The letter after the single '_' of a label ('__' is a literal)."""
    found = []
    i = 0
    while i < len(label):
        if label[i] == "_":
            if i + 1 < len(label) and label[i + 1] == "_":
                i += 2
                continue
            if i + 1 < len(label):
                found.append(label[i + 1])
        i += 1
    return found


def check(language, labels):
    failures = []
    seen = {}
    for label in labels:
        m = mnemonic(label)
        if len(m) != 1:
            failures.append(f"{language}: '{label}' has {len(m)} mnemonics, not 1")
            continue
        key = m[0].casefold()
        if key in seen:
            failures.append(f"{language}: '{label}' and '{seen[key]}' share the mnemonic "
                            f"'{m[0]}'")
        else:
            seen[key] = label
    return failures


def main():
    root = sys.argv[1] if len(sys.argv) > 1 else "."
    labels = menu_labels(os.path.join(root, "ui", "hl-window.ui"))
    if len(labels) < 10:
        raise SystemExit(f"only {len(labels)} menu items found")
    de = read_po(os.path.join(root, "po", "de.po"))
    german = [de.get(label, label) for label in labels]
    failures = check("English", labels) + check("German", german)
    for f in failures:
        print("FAIL: " + f)
    print(f"{len(labels)} menu items; English {''.join(mnemonic(l)[0] for l in labels if mnemonic(l))}; "
          f"German {''.join(mnemonic(l)[0] for l in german if mnemonic(l))}")
    return 1 if failures else 0


if __name__ == "__main__":
    sys.exit(main())
