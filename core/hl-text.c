/* hl-text.c: text that cannot mislead (see hl-text.h).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <stdint.h>
#include <stdio.h>
#include <string.h>

#include <glib.h>

#include "hl-i18n.h"
#include "hl-text.h"

static bool
is_continuation (unsigned char c)
{
  return (c & 0xC0) == 0x80;
}

size_t
hl_utf8_cut (const char *s, size_t max)
{
  size_t len = strnlen (s, max + 1);
  if (len <= max)
    return len;
  size_t n = max;
  /* Back off over continuation bytes to the start of the cut character. */
  while (n > 0 && is_continuation ((unsigned char) s[n]))
    n--;
  return n;
}

void
hl_utf8_trim_end (char *s)
{
  size_t len = strlen (s);
  if (len == 0)
    return;
  /* The last character's lead byte, and how long it says it is. */
  size_t lead = len - 1;
  while (lead > 0 && is_continuation ((unsigned char) s[lead]) && len - lead < 4)
    lead--;
  unsigned char c = (unsigned char) s[lead];
  size_t need = c < 0x80 ? 1 : (c & 0xE0) == 0xC0 ? 2 : (c & 0xF0) == 0xE0 ? 3
                : (c & 0xF8) == 0xF0 ? 4 : 1;
  if (len - lead < need)
    s[lead] = '\0';
}

/* Decodes one character at s (UTF-8); *len its bytes.  A malformed byte
 * gives its own value and length 1. */
static uint32_t
decode (const unsigned char *s, size_t *len)
{
  if (s[0] < 0x80)
    {
      *len = 1;
      return s[0];
    }
  size_t n = (s[0] & 0xE0) == 0xC0 ? 2 : (s[0] & 0xF0) == 0xE0 ? 3
             : (s[0] & 0xF8) == 0xF0 ? 4 : 0;
  uint32_t cp = n == 2 ? s[0] & 0x1Fu : n == 3 ? s[0] & 0x0Fu : s[0] & 0x07u;
  for (size_t i = 1; i < n; i++)
    {
      if (!is_continuation (s[i]))
        {
          n = 0;
          break;
        }
      cp = (cp << 6) | (s[i] & 0x3Fu);
    }
  if (n == 0)
    {
      *len = 1;
      return s[0];
    }
  *len = n;
  return cp;
}

const char *
hl_text_unsafe (const char *s, char *buf, size_t size)
{
  for (const unsigned char *p = (const unsigned char *) s; *p != '\0';)
    {
      size_t len;
      uint32_t cp = decode (p, &len);
      if (cp == '\n' || cp == '\r' || cp == 0x0B || cp == 0x0C || cp == 0x85
          || cp == 0x2028 || cp == 0x2029)
        {
          snprintf (buf, size, "%s", _("a line break"));
          return buf;
        }
      if (cp == 0x061C || cp == 0x200E || cp == 0x200F
          || (cp >= 0x202A && cp <= 0x202E) || (cp >= 0x2066 && cp <= 0x2069))
        {
          snprintf (buf, size, _("the bidirectional control character U+%04X"),
                    (unsigned) cp);
          return buf;
        }
      if (len == 1 && *p >= 0x80)
        {
          snprintf (buf, size, "%s", _("a byte that is not UTF-8 text"));
          return buf;
        }
      if (cp < 0x20 || cp == 0x7F || (cp >= 0x80 && cp < 0xA0))
        {
          snprintf (buf, size, _("the control character U+%04X"), (unsigned) cp);
          return buf;
        }
      p += len;
    }
  return NULL;
}

const char *
hl_text_quote (const char *s, size_t max, char *buf, size_t size)
{
  static const char ellipsis[] = "\xe2\x80\xa6";   /* U+2026, 3 bytes */
  size_t out = 0;
  size_t end = hl_utf8_cut (s, max);
  /* A value that does not fit is cut shorter still, so that "…" shows it
   * was cut and the whole stays within max bytes. */
  bool cut = s[end] != '\0' && max >= sizeof ellipsis - 1;
  if (cut)
    end = hl_utf8_cut (s, max - (sizeof ellipsis - 1));
  char what[64];
  if (size == 0)
    return "";
  for (size_t i = 0; i < end && out + 1 < size;)
    {
      size_t len;
      char one[8];
      decode ((const unsigned char *) s + i, &len);
      if (i + len > end)
        break;
      memcpy (one, s + i, len);
      one[len] = '\0';
      if (hl_text_unsafe (one, what, sizeof what) != NULL)
        buf[out++] = '?';
      else if (out + len < size)
        {
          memcpy (buf + out, one, len);
          out += len;
        }
      else
        break;
      i += len;
    }
  if (cut && out + sizeof ellipsis <= size)
    {
      memcpy (buf + out, ellipsis, sizeof ellipsis - 1);
      out += sizeof ellipsis - 1;
    }
  buf[out] = '\0';
  return buf;
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
