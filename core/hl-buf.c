/* hl-buf.c
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <locale.h>
#include <pthread.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <glib.h>

#include "hl-buf.h"

#define HL_BUF_MIN_CAP 4096

/* One C locale per process, created once and never changed. */
static pthread_once_t c_locale_once = PTHREAD_ONCE_INIT;
static locale_t c_locale;

static void
c_locale_init (void)
{
  c_locale = newlocale (LC_ALL_MASK, "C", (locale_t) 0);
}

void
hl_buf_init (HlBuf *b)
{
  memset (b, 0, sizeof *b);
}

void
hl_buf_clear (HlBuf *b)
{
  free (b->data);
  hl_buf_init (b);
}

bool
hl_buf_reserve (HlBuf *b, size_t extra)
{
  if (b->failed)
    return false;
  if (b->len + extra + 1 <= b->cap)
    return true;

  size_t cap = b->cap > 0 ? b->cap : HL_BUF_MIN_CAP;
  while (cap < b->len + extra + 1)
    cap *= 2;
  char *grown = realloc (b->data, cap);
  if (grown == NULL)
    {
      b->failed = true;
      return false;
    }
  b->data = grown;
  b->cap = cap;
  return true;
}

void
hl_buf_append (HlBuf *b, const char *s, size_t n)
{
  if (!hl_buf_reserve (b, n))
    return;
  memcpy (b->data + b->len, s, n);
  b->len += n;
  b->data[b->len] = '\0';
}

void
hl_buf_puts (HlBuf *b, const char *s)
{
  hl_buf_append (b, s, strlen (s));
}

void
hl_buf_vprintf (HlBuf *b, const char *fmt, va_list ap)
{
  pthread_once (&c_locale_once, c_locale_init);
  locale_t old = c_locale != (locale_t) 0 ? uselocale (c_locale) : (locale_t) 0;

  va_list copy;
  va_copy (copy, ap);
  int n = vsnprintf (NULL, 0, fmt, copy);
  va_end (copy);
  if (n < 0)
    b->failed = true;
  else if (hl_buf_reserve (b, (size_t) n))
    {
      vsnprintf (b->data + b->len, (size_t) n + 1, fmt, ap);
      b->len += (size_t) n;
    }

  if (old != (locale_t) 0)
    uselocale (old);
}

void
hl_buf_printf (HlBuf *b, const char *fmt, ...)
{
  va_list ap;
  va_start (ap, fmt);
  hl_buf_vprintf (b, fmt, ap);
  va_end (ap);
}

/* A cell that reads whole as a number ("-2.5", "+1e3") stays a number. */
static bool
is_number (const char *field)
{
  char *end = NULL;
  if (field[0] == '\0' || g_ascii_isspace (field[0]))
    return false;
  (void) g_ascii_strtod (field, &end);
  return end != NULL && end != field && *end == '\0';
}

void
hl_csv_field_append (GString *out, const char *field)
{
  /* A text cell that a spreadsheet would run as a formula gets a leading
   * apostrophe (OWASP, "CSV Injection"); a number stays a number. */
  bool formula = field[0] != '\0' && strchr ("=+-@\t\r", field[0]) != NULL
                 && !is_number (field);
  if (strpbrk (field, ",\"\r\n") == NULL)
    {
      if (formula)
        g_string_append_c (out, '\'');
      g_string_append (out, field);
      return;
    }
  g_string_append_c (out, '"');
  if (formula)
    g_string_append_c (out, '\'');
  for (const char *p = field; *p != '\0'; p++)
    {
      if (*p == '"')
        g_string_append_c (out, '"');
      g_string_append_c (out, *p);
    }
  g_string_append_c (out, '"');
}

void
hl_buf_csv_field (HlBuf *b, const char *field)
{
  GString *s = g_string_sized_new (strlen (field) + 4);
  hl_csv_field_append (s, field);
  hl_buf_append (b, s->str, s->len);
  g_string_free (s, TRUE);
}
