#!/usr/bin/env python3
"""Embeds a text file as a NUL-terminated C string: embed-text.py IN OUT NAME."""
import sys

src, out, name = sys.argv[1:4]
data = open(src, 'rb').read()
with open(out, 'w') as f:
    f.write('/* generated from %s; do not edit */\n' % src.rsplit('/', 1)[-1])
    f.write('#include <stddef.h>\n')
    f.write('extern const char %s[];\nextern const size_t %s_len;\n' % (name, name))
    f.write('const char %s[] = {\n' % name)
    for i in range(0, len(data), 16):
        f.write('  ' + ', '.join('0x%02x' % b for b in data[i:i + 16]) + ',\n')
    f.write('  0x00\n};\n')
    f.write('const size_t %s_len = %d;\n' % (name, len(data)))
