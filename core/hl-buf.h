/* hl-buf.h: a growable text buffer for writers (plan files, CSV, reports).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Out of memory is sticky: the first failed growth sets `failed`, every
 * later append is a no-op, and the writer checks `failed` once at the end.
 * The text is always NUL-terminated when data is not NULL.
 */
#pragma once

#include <stdarg.h>
#include <stdbool.h>
#include <stddef.h>

#ifdef __cplusplus
extern "C" {
#endif

typedef struct {
  char *data;
  size_t len;
  size_t cap;
  bool failed;
} HlBuf;

void hl_buf_init (HlBuf *b);
/* Frees the text; the buffer is empty and usable again. */
void hl_buf_clear (HlBuf *b);
/* Room for `extra` more bytes; false (and `failed`) when out of memory. */
bool hl_buf_reserve (HlBuf *b, size_t extra);
void hl_buf_append (HlBuf *b, const char *s, size_t n);
void hl_buf_puts (HlBuf *b, const char *s);
/* printf in the C locale, whatever the thread's locale: numbers always
 * have a decimal point. */
void hl_buf_printf (HlBuf *b, const char *fmt, ...)
  __attribute__ ((format (printf, 2, 3)));
void hl_buf_vprintf (HlBuf *b, const char *fmt, va_list ap)
  __attribute__ ((format (printf, 2, 0)));
/* The one CSV rule of every CSV the programs write (the command line's,
 * the window's copies, sweeps): a cell with a comma, a quote or a line
 * break is quoted, quotes doubled; a text cell a spreadsheet would run as
 * a formula (=, +, -, @, tab, CR first) gets a leading apostrophe unless
 * it reads whole as a number.  Appends to a GString. */
typedef struct _GString GString;
void hl_csv_field_append (GString *out, const char *field);
/* The same rule into an HlBuf. */
/* One CSV text field, quoted as RFC 4180 asks when it holds a comma, a
 * quote, CR or LF.  A field that begins with =, +, -, @, a tab or a CR
 * gets a leading apostrophe, as the OWASP CSV-injection guidance asks, so
 * that a spreadsheet does not run it as a formula: use it for text (names,
 * flags, messages), never for numbers. */
void hl_buf_csv_field (HlBuf *b, const char *field);

#ifdef __cplusplus
}
#endif
