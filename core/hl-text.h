/* hl-text.h: text that cannot mislead.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Names and labels (option names, the case label) are shown in tables,
 * messages, CSV and reports.  A line break would fake a row; a
 * bidirectional control character (U+202A-U+202E, U+2066-U+2069, U+200E,
 * U+200F, U+061C) would show the text in another order than it is stored
 * (a "Trojan Source" name).  Such names are refused.  Messages that quote
 * a value cut it at a UTF-8 character boundary.
 */
#pragma once

#include <stdbool.h>
#include <stddef.h>

#ifdef __cplusplus
extern "C" {
#endif

/* Bytes of the longest prefix of s of at most max bytes that ends on a
 * character boundary (s is read as UTF-8; a stray byte counts as one). */
size_t hl_utf8_cut (const char *s, size_t max);

/* Trims a NUL-terminated buffer in place so that it ends on a character
 * boundary (after a truncating snprintf). */
void hl_utf8_trim_end (char *s);

/* NULL when s is safe for a name or a label; otherwise a short plain
 * description of the first character that is not ("a line break",
 * "a control character", "the bidirectional control character U+202E"),
 * written to buf. */
const char *hl_text_unsafe (const char *s, char *buf, size_t size);

/* A value quoted in a message: at most max bytes of s, cut at a whole
 * character and ending in "…" when it was cut, each line break, control
 * or bidirectional control character replaced by '?'.  Writes to buf (size >= max + 1) and returns it. */
const char *hl_text_quote (const char *s, size_t max, char *buf, size_t size);

/* The one CSV rule of every CSV the programs write (the command line's,
 * the window's copies, sweeps): a cell with a comma, a quote or a line
 * break is quoted as RFC 4180 asks, quotes doubled; a text cell a
 * spreadsheet would run as a formula (=, +, -, @, tab, CR first) gets a
 * leading apostrophe (OWASP, "CSV Injection") unless it reads whole as a
 * number.  Use it for text (names, flags, messages); numbers come from
 * hl_format_number.  Appends to a GString. */
typedef struct _GString GString;
void hl_csv_field_append (GString *out, const char *field);

#ifdef __cplusplus
}
#endif
